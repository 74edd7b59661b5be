//! Every export of the C ABI, and the Rust entry points behind it, driven with arbitrary
//! f64 bit patterns (plus the edge values NaN, +-inf, +-0, subnormals, the double range's
//! ends, and physical magnitudes): no panic, and every result either a valid value or a
//! named error. The exports must also agree with the Rust API they wrap, write their out
//! values only on success, and answer bad pointers with a status.

use bandtemp::atmosphere::{Air, Path, PathTransmittance, Phase, SaturationFormula};
use bandtemp::band::{Band, SignalCurve, SpectralTable};
use bandtemp::calibration::{fit_band, fit_points, SakumaHattori};
use bandtemp::planck::{self, Detector};
use bandtemp::ratio::RatioPyrometer;
use bandtemp::scene::Scene;
use bandtemp::uncertainty::{surface_budget, InputUncertainties, SURFACE_INPUT_NAMES};
use bandtemp::Error;
use bandtemp_capi::*;
use core::ffi::c_int;
use core::mem::{offset_of, size_of};
use proptest::prelude::*;

mod common;
use common::{any_f64_to, SENTINEL};

fn any_f64() -> impl Strategy<Value = f64> {
    any_f64_to(7.0)
}

/// Small tables of arbitrary values, and increasing ones (sorted, so that some are valid).
fn table() -> impl Strategy<Value = (Vec<f64>, Vec<f64>)> {
    let len = 0usize..6;
    len.prop_flat_map(|n| {
        (
            prop::collection::vec(any_f64(), n),
            prop::collection::vec(any_f64(), n),
            any::<bool>(),
        )
    })
    .prop_map(|(mut wl, r, sort)| {
        if sort {
            wl.sort_by(f64::total_cmp);
        }
        (wl, r)
    })
}

/// An export's (status, out) agrees with the Rust result it wraps: the same status and
/// value on success (with a finite value), the same error and an untouched out value on
/// failure. The boundary also refuses non-finite successes of the core: those must come
/// back as NonFinite (NaN) or RadianceOverflow (infinity).
fn agrees(status: bt_status, out: f64, rust: Result<f64, Error>) -> Result<(), TestCaseError> {
    match rust {
        Ok(value) if value.is_finite() => {
            prop_assert_eq!(status, bt_status::Ok);
            prop_assert_eq!(out.to_bits(), value.to_bits());
        }
        Ok(value) => {
            let want = if value.is_nan() {
                bt_status::NonFinite
            } else {
                bt_status::RadianceOverflow
            };
            prop_assert_eq!(status, want);
            prop_assert_eq!(out.to_bits(), SENTINEL.to_bits());
        }
        Err(error) => {
            prop_assert_eq!(status, bt_status::from(error));
            prop_assert_ne!(status, bt_status::Ok);
            prop_assert!(!error.message().is_empty());
            prop_assert_eq!(out.to_bits(), SENTINEL.to_bits());
        }
    }
    Ok(())
}

/// A Rust result is a valid value (finite, and inside `range`) or a named error.
fn valid_or_named(
    result: Result<f64, Error>,
    range: core::ops::RangeInclusive<f64>,
) -> Result<(), TestCaseError> {
    match result {
        Ok(value) => prop_assert!(
            value.is_finite() && range.contains(&value),
            "value {value} outside {range:?}"
        ),
        Err(error) => prop_assert_ne!(bt_status::from(error), bt_status::Ok),
    }
    Ok(())
}

fn rect_band(lo_um: f64, hi_um: f64, detector: bt_detector) -> bt_band {
    bt_band {
        lo_um,
        hi_um,
        detector,
        response_um: core::ptr::null(),
        response: core::ptr::null(),
        response_len: 0,
    }
}

fn c_scene(f: [f64; 8]) -> bt_scene {
    bt_scene {
        emissivity: f[0],
        reflected_k: f[1],
        atm_transmittance: f[2],
        atm_k: f[3],
        window_transmittance: f[4],
        window_reflectance: f[5],
        window_k: f[6],
        window_reflected_k: f[7],
    }
}

fn rust_scene(s: &bt_scene) -> Result<Scene, Error> {
    Scene::new(s.emissivity, s.reflected_k)?
        .with_atmosphere(s.atm_transmittance, s.atm_k)?
        .with_window(
            s.window_transmittance,
            s.window_reflectance,
            s.window_k,
            s.window_reflected_k,
        )
}

/// A scene drawn near valid values with one field replaced by an arbitrary value, or all
/// fields arbitrary.
fn scene_fields() -> impl Strategy<Value = [f64; 8]> {
    let valid = [0.9, 295.0, 0.95, 290.0, 0.9, 0.05, 300.0, 293.0];
    prop_oneof![
        (0usize..8, any_f64()).prop_map(move |(i, x)| {
            let mut f = valid;
            if let Some(slot) = f.get_mut(i) {
                *slot = x;
            }
            f
        }),
        prop::array::uniform8(any_f64()),
        Just(valid),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 512, ..ProptestConfig::default() })]

    #[test]
    fn spectral_laws(wl in any_f64(), t in any_f64(), lt in any_f64()) {
        let mut out = SENTINEL;
        let s = unsafe { bt_spectral_radiance(wl, t, &mut out) };
        agrees(s, out, planck::spectral_radiance(wl, t))?;
        valid_or_named(planck::spectral_radiance(wl, t), 0.0..=f64::MAX)?;

        let mut out = SENTINEL;
        let s = unsafe { bt_spectral_photon_radiance(wl, t, &mut out) };
        agrees(s, out, planck::spectral_photon_radiance(wl, t))?;
        valid_or_named(planck::spectral_photon_radiance(wl, t), 0.0..=f64::MAX)?;

        let mut out = SENTINEL;
        let s = unsafe { bt_blackbody_fraction(lt, &mut out) };
        agrees(s, out, planck::blackbody_fraction(lt))?;
        if s == bt_status::Ok {
            prop_assert!((0.0..=1.0).contains(&out));
        }

        let mut out = SENTINEL;
        let s = unsafe { bt_total_radiance(t, &mut out) };
        agrees(s, out, planck::total_radiance(t))?;
        valid_or_named(planck::total_radiance(t), 0.0..=f64::MAX)?;

        let mut out = SENTINEL;
        let s = unsafe { bt_peak_wavelength_um(t, &mut out) };
        agrees(s, out, planck::peak_wavelength_um(t))?;
    }

    #[test]
    fn detector_from_any_integer(raw in any::<u32>()) {
        let detector = Detector::from_raw(raw);
        prop_assert_eq!(detector.is_ok(), raw <= 1);
    }

    #[test]
    fn rectangular_bands(
        lo in any_f64(), hi in any_f64(), t in any_f64(), radiance in any_f64(),
        photon in any::<bool>(),
    ) {
        let (c_detector, detector) = if photon {
            (bt_detector::Photon, Detector::Photon)
        } else {
            (bt_detector::Energy, Detector::Energy)
        };
        let band = rect_band(lo, hi, c_detector);
        let rust = Band::rectangular(lo, hi, detector);

        let mut out = SENTINEL;
        let s = unsafe { bt_band_radiance(&band, t, &mut out) };
        let want = rust.and_then(|b| b.radiance(t));
        agrees(s, out, want)?;
        valid_or_named(want, 0.0..=f64::MAX)?;

        let mut out = SENTINEL;
        let s = unsafe { bt_band_radiance_derivative(&band, t, &mut out) };
        agrees(s, out, rust.and_then(|b| b.radiance_derivative(t)))?;

        let mut out = SENTINEL;
        let s = unsafe { bt_band_temperature(&band, radiance, &mut out) };
        let want = rust.and_then(|b| b.temperature(radiance));
        agrees(s, out, want)?;
        valid_or_named(want, 0.0..=2e6)?;
    }

    #[test]
    fn tabulated_bands(
        lo in any_f64(), hi in any_f64(), (wl, r) in table(), t in any_f64(),
        radiance in any_f64(),
    ) {
        let band = bt_band {
            lo_um: lo,
            hi_um: hi,
            detector: bt_detector::Energy,
            response_um: wl.as_ptr(),
            response: r.as_ptr(),
            response_len: wl.len(),
        };
        let rust = if wl.is_empty() {
            Band::rectangular(lo, hi, Detector::Energy)
        } else {
            SpectralTable::new(&wl, &r)
                .and_then(|table| Band::with_response(lo, hi, Detector::Energy, table))
        };
        let mut out = SENTINEL;
        let s = unsafe { bt_band_radiance(&band, t, &mut out) };
        let want = rust.and_then(|b| b.radiance(t));
        agrees(s, out, want)?;
        valid_or_named(want, 0.0..=f64::MAX)?;

        let mut out = SENTINEL;
        let s = unsafe { bt_band_temperature(&band, radiance, &mut out) };
        let want = rust.and_then(|b| b.temperature(radiance));
        agrees(s, out, want)?;
        valid_or_named(want, 0.0..=2e6)?;
    }

    #[test]
    fn scenes(fields in scene_fields(), t in any_f64(), signal in any_f64(), lo in 1.0f64..10.0) {
        let band = rect_band(lo, lo + 4.0, bt_detector::Energy);
        let rust_band = Band::rectangular(lo, lo + 4.0, Detector::Energy).unwrap();
        let scene = c_scene(fields);
        let rust = rust_scene(&scene);

        let mut out = SENTINEL;
        let s = unsafe { bt_sensor_radiance(&band, &scene, t, &mut out) };
        let want = rust.and_then(|sc| sc.sensor_signal(&rust_band, t));
        agrees(s, out, want)?;
        valid_or_named(want, 0.0..=f64::MAX)?;

        let mut out = SENTINEL;
        let s = unsafe { bt_object_temperature(&band, &scene, signal, &mut out) };
        let want = rust.and_then(|sc| sc.object_temperature(&rust_band, signal));
        agrees(s, out, want)?;
        valid_or_named(want, 0.0..=2e6)?;

        let mut out = SENTINEL;
        let s = unsafe { bt_object_temperature_from_apparent(&band, &scene, t, &mut out) };
        let want = rust.and_then(|sc| sc.object_temperature(&rust_band, rust_band.radiance(t)?));
        agrees(s, out, want)?;

        let mut out = SENTINEL;
        let s = unsafe { bt_apparent_temperature(&band, &scene, t, &mut out) };
        let want = rust
            .and_then(|sc| sc.sensor_signal(&rust_band, t))
            .and_then(|signal| rust_band.temperature(signal));
        agrees(s, out, want)?;
    }

    #[test]
    fn sakuma_hattori(
        a in any_f64(), b in any_f64(), c in any_f64(), t in any_f64(), signal in any_f64(),
        fields in scene_fields(),
    ) {
        let p = bt_sakuma_hattori { a_um: a, b_umk: b, c };
        let rust = SakumaHattori::new(a, b, c);

        let mut out = SENTINEL;
        let s = unsafe { bt_sakuma_hattori_signal(&p, t, &mut out) };
        agrees(s, out, rust.and_then(|curve| curve.signal(t)))?;

        let mut out = SENTINEL;
        let s = unsafe { bt_sakuma_hattori_temperature(&p, signal, &mut out) };
        let want = rust.and_then(|curve| curve.temperature(signal));
        agrees(s, out, want)?;
        valid_or_named(want, 0.0..=f64::MAX)?;

        let scene = c_scene(fields);
        let mut out = SENTINEL;
        let s = unsafe { bt_sakuma_hattori_sensor_signal(&p, &scene, t, &mut out) };
        agrees(
            s,
            out,
            rust.and_then(|curve| rust_scene(&scene)?.sensor_signal(&curve, t)),
        )?;

        let mut out = SENTINEL;
        let s = unsafe { bt_sakuma_hattori_object_temperature(&p, &scene, signal, &mut out) };
        let want = rust.and_then(|curve| rust_scene(&scene)?.object_temperature(&curve, signal));
        agrees(s, out, want)?;
        valid_or_named(want, 0.0..=f64::MAX)?;
    }

    #[test]
    fn status_messages_for_any_int(raw in any::<c_int>()) {
        let ptr = bt_status_message(raw);
        prop_assert!(!ptr.is_null());
        // SAFETY: a static NUL-terminated string.
        let text = unsafe { core::ffi::CStr::from_ptr(ptr) }.to_str().unwrap();
        prop_assert!(!text.is_empty());
        prop_assert_eq!(bt_status::from_raw(raw).is_some(), text != "unknown status");
    }
}

// Calibration fits iterate (Levenberg-Marquardt, and band integrals for `fit_band`):
// fewer cases.
proptest! {
    #![proptest_config(ProptestConfig { cases: 64, ..ProptestConfig::default() })]

    #[test]
    fn fit_to_band(lo in any_f64(), hi in any_f64(), t_lo in any_f64(), t_hi in any_f64()) {
        let band = rect_band(lo, hi, bt_detector::Energy);
        let mut params = bt_sakuma_hattori { a_um: SENTINEL, b_umk: SENTINEL, c: SENTINEL };
        let mut max_error_k = SENTINEL;
        let s = unsafe { bt_sakuma_hattori_fit_band(&band, t_lo, t_hi, &mut params, &mut max_error_k) };
        let rust = Band::rectangular(lo, hi, Detector::Energy)
            .and_then(|b| fit_band(&b, t_lo, t_hi));
        match rust {
            Ok(fit) => {
                prop_assert_eq!(s, bt_status::Ok);
                prop_assert_eq!(params, bt_sakuma_hattori::from(fit.params));
                prop_assert!(max_error_k.is_finite() && max_error_k >= 0.0);
            }
            Err(error) => {
                prop_assert_eq!(s, bt_status::from(error));
                prop_assert_eq!(params.a_um.to_bits(), SENTINEL.to_bits());
                prop_assert_eq!(max_error_k.to_bits(), SENTINEL.to_bits());
            }
        }
    }

    #[test]
    fn fit_to_points(
        t in prop::collection::vec(any_f64(), 0..6),
        signal in prop::collection::vec(any_f64(), 0..6),
        with_u in any::<bool>(),
        u in prop::collection::vec(any_f64(), 6),
    ) {
        let n = t.len().min(signal.len());
        let (t, signal, u) = (&t[..n], &signal[..n], &u[..n]);
        let mut report = core::mem::MaybeUninit::<bt_points_fit>::zeroed();
        let u_ptr = if with_u { u.as_ptr() } else { core::ptr::null() };
        let s = unsafe {
            bt_sakuma_hattori_fit_points_report(t.as_ptr(), signal.as_ptr(), u_ptr, n, report.as_mut_ptr())
        };
        let rust = fit_points(t, signal, with_u.then_some(u));
        match rust {
            Ok(fit) if fit.params.a_um().is_finite() => {
                prop_assert_eq!(s, bt_status::Ok);
                // SAFETY: written on success.
                let report = unsafe { report.assume_init() };
                prop_assert_eq!(report.params, bt_sakuma_hattori::from(fit.params));
                prop_assert!(report.max_residual_k.is_finite());
            }
            Ok(_) => prop_assert_ne!(s, bt_status::Ok),
            Err(error) => prop_assert_eq!(s, bt_status::from(error)),
        }
        let mut params = bt_sakuma_hattori { a_um: SENTINEL, b_umk: SENTINEL, c: SENTINEL };
        let s = unsafe { bt_sakuma_hattori_fit_points(t.as_ptr(), signal.as_ptr(), n, &mut params) };
        match fit_points(t, signal, None) {
            Ok(fit) => prop_assert_eq!(params, bt_sakuma_hattori::from(fit.params)),
            Err(error) => {
                prop_assert_eq!(s, bt_status::from(error));
                prop_assert_eq!(params.a_um.to_bits(), SENTINEL.to_bits());
            }
        }
    }
}

// The Rust entry points whose successes once were not always finite (NaN fractions below
// lambda*T ~ 3e-99 um K, infinite Sakuma-Hattori signals where A T overflows): stated
// strictly, on the Rust side of the boundary check.
proptest! {
    #![proptest_config(ProptestConfig { cases: 512, ..ProptestConfig::default() })]

    /// F is a fraction, also where x = c2/(lambda T) overflows (F = 0 there).
    #[test]
    fn blackbody_fraction_is_a_fraction_or_an_error(lt in any_f64()) {
        let result = planck::blackbody_fraction(lt);
        valid_or_named(result, 0.0..=1.0)?;
    }

    /// The band radiance derivative is a finite value or a named error, also for bands
    /// reaching hi_um = f64::MAX or lo_um near zero (it once was NaN there).
    #[test]
    fn band_derivative_is_finite_or_an_error(lo in any_f64(), hi in any_f64(), t in any_f64()) {
        let result = Band::rectangular(lo, hi, Detector::Energy)
            .and_then(|b| b.radiance_derivative(t));
        valid_or_named(result, 0.0..=f64::MAX)?;
    }

    /// Finite or an error, also where A T overflows (y -> 0).
    #[test]
    fn sakuma_hattori_signal_is_finite_or_an_error(
        a in any_f64(), b in any_f64(), c in any_f64(), t in any_f64(),
    ) {
        let result = SakumaHattori::new(a, b, c).and_then(|curve| curve.signal(t));
        valid_or_named(result, 0.0..=f64::MAX)?;
    }
}

/// Band edges so small that x = c2/(lambda T) overflows: a value or a status, quickly.
#[test]
fn extreme_band_edges_answer_with_a_status() {
    for lo_um in [f64::MIN_POSITIVE, 1e-120] {
        let band = rect_band(lo_um, 8.0, bt_detector::Energy);
        let mut out = SENTINEL;
        let s = unsafe { bt_band_radiance(&band, 300.0, &mut out) };
        assert!(s == bt_status::Ok && out.is_finite() || out.to_bits() == SENTINEL.to_bits());
    }
}

/// The C view of `bt_band` with the detector as a plain integer, to hand the library a
/// detector value outside the enum the way C code can (without making an invalid enum
/// value on the Rust side).
#[repr(C)]
struct RawBand {
    lo_um: f64,
    hi_um: f64,
    detector: u32,
    response_um: *const f64,
    response: *const f64,
    response_len: usize,
}

#[test]
fn raw_band_mirrors_bt_band() {
    assert_eq!(size_of::<bt_detector>(), size_of::<u32>());
    assert_eq!(size_of::<RawBand>(), size_of::<bt_band>());
    assert_eq!(offset_of!(RawBand, detector), offset_of!(bt_band, detector));
    assert_eq!(
        offset_of!(RawBand, response_um),
        offset_of!(bt_band, response_um)
    );
    assert_eq!(
        offset_of!(RawBand, response_len),
        offset_of!(bt_band, response_len)
    );
}

proptest! {
    #[test]
    fn detector_values_outside_the_enum_are_errors(raw in any::<u32>()) {
        let band = RawBand {
            lo_um: 8.0,
            hi_um: 14.0,
            detector: raw,
            response_um: core::ptr::null(),
            response: core::ptr::null(),
            response_len: 0,
        };
        let ptr = (&band as *const RawBand).cast::<bt_band>();
        let mut out = SENTINEL;
        let s = unsafe { bt_band_radiance(ptr, 300.0, &mut out) };
        if raw <= 1 {
            prop_assert_eq!(s, bt_status::Ok);
        } else {
            prop_assert_eq!(s, bt_status::InvalidDetector);
            prop_assert_eq!(out.to_bits(), SENTINEL.to_bits());
        }
    }
}

#[test]
fn bad_pointers_are_answered_with_a_status() {
    let good = rect_band(8.0, 14.0, bt_detector::Energy);
    let scene = c_scene([0.9, 295.0, 0.95, 290.0, 0.9, 0.05, 300.0, 293.0]);
    let mut out = SENTINEL;
    let null_out: *mut f64 = core::ptr::null_mut();
    // Null inputs and outputs.
    unsafe {
        assert_eq!(
            bt_band_radiance(core::ptr::null(), 300.0, &mut out),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_band_radiance(&good, 300.0, null_out),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_sensor_radiance(&good, core::ptr::null(), 300.0, &mut out),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_sensor_radiance(core::ptr::null(), &scene, 300.0, &mut out),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_ratio_temperature(
                core::ptr::null(),
                &good,
                900.0,
                3000.0,
                1.0,
                1.0,
                1.0,
                &mut out
            ),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_ratio_temperature(
                &good,
                core::ptr::null(),
                900.0,
                3000.0,
                1.0,
                1.0,
                1.0,
                &mut out
            ),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_sakuma_hattori_signal(core::ptr::null(), 300.0, &mut out),
            bt_status::NullPointer
        );
    }
    assert_eq!(out.to_bits(), SENTINEL.to_bits());

    // Misaligned pointers (which C code cannot form legally, but a bad cast can).
    let mut buffer = [0u64; 8];
    let misaligned_out = buffer
        .as_mut_ptr()
        .cast::<u8>()
        .wrapping_add(1)
        .cast::<f64>();
    let misaligned_band = (&good as *const bt_band)
        .cast::<u8>()
        .wrapping_add(4)
        .cast::<bt_band>();
    let wl = [8.0, 11.0, 14.0, 15.0];
    let r = [0.0, 1.0, 0.0, 0.0];
    let misaligned_table = bt_band {
        lo_um: 8.0,
        hi_um: 14.0,
        detector: bt_detector::Energy,
        response_um: wl.as_ptr().cast::<u8>().wrapping_add(2).cast::<f64>(),
        response: r.as_ptr(),
        response_len: 3,
    };
    unsafe {
        assert_eq!(
            bt_band_radiance(&good, 300.0, misaligned_out),
            bt_status::InvalidBuffer
        );
        assert_eq!(
            bt_band_radiance(misaligned_band, 300.0, &mut out),
            bt_status::InvalidBuffer
        );
        assert_eq!(
            bt_band_radiance(&misaligned_table, 300.0, &mut out),
            bt_status::InvalidBuffer
        );
    }
    assert_eq!(
        buffer, [0u64; 8],
        "nothing written through a misaligned out-pointer"
    );

    // Lengths no buffer can have.
    for len in [usize::MAX, usize::MAX / 8 + 1, isize::MAX as usize] {
        let band = bt_band {
            response_len: len,
            ..misaligned_table
        };
        let band = bt_band {
            response_um: wl.as_ptr(),
            ..band
        };
        let mut out = SENTINEL;
        let s = unsafe { bt_band_temperature(&band, 40.0, &mut out) };
        assert_eq!(s, bt_status::InvalidBuffer, "length {len}");
        assert_eq!(out.to_bits(), SENTINEL.to_bits());
    }
    // A pointer near the top of the address space whose length would wrap around.
    let near_top = bt_band {
        response_um: usize::MAX.wrapping_sub(15) as *const f64,
        response: r.as_ptr(),
        response_len: 3,
        ..good
    };
    let near_top = bt_band {
        response_um: (near_top.response_um as usize & !7) as *const f64,
        ..near_top
    };
    let s = unsafe { bt_band_radiance(&near_top, 300.0, &mut out) };
    assert_eq!(s, bt_status::InvalidBuffer);
}

// ---- ratio pyrometry ---------------------------------------------------------------------

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn ratio_temperature(
        edges in prop_oneof![
            Just([0.65, 0.75, 0.85, 0.95]),
            prop::array::uniform4(any_f64()),
            (0usize..4, any_f64()).prop_map(|(i, x)| {
                let mut e = [0.65, 0.75, 0.85, 0.95];
                if let Some(slot) = e.get_mut(i) {
                    *slot = x;
                }
                e
            }),
        ],
        t_min in prop_oneof![Just(900.0), any_f64()],
        t_max in prop_oneof![Just(3000.0), any_f64()],
        t in 900.0f64..3000.0,
        s1 in any_f64(), s2 in any_f64(), kappa in prop_oneof![Just(1.0), any_f64()],
        from_t in any::<bool>(),
    ) {
        let [lo1, hi1, lo2, hi2] = edges;
        let band1 = rect_band(lo1, hi1, bt_detector::Energy);
        let band2 = rect_band(lo2, hi2, bt_detector::Energy);
        let b1 = Band::rectangular(lo1, hi1, Detector::Energy);
        let b2 = Band::rectangular(lo2, hi2, Detector::Energy);
        // Half the cases take signals a real surface gives.
        let (s1, s2) = match (from_t, b1, b2) {
            (true, Ok(b1), Ok(b2)) => (
                b1.radiance(t).unwrap_or(s1),
                b2.radiance(t).unwrap_or(s2),
            ),
            _ => (s1, s2),
        };
        let mut out = SENTINEL;
        let s = unsafe {
            bt_ratio_temperature(&band1, &band2, t_min, t_max, s1, s2, kappa, &mut out)
        };
        let want = (|| {
            let pyrometer = RatioPyrometer::new(b1?, b2?, t_min, t_max)?;
            Ok(pyrometer.temperature_from_signals(s1, s2, kappa)?.solution.temperature_k)
        })();
        agrees(s, out, want)?;
        valid_or_named(want, 0.0..=f64::MAX)?;
    }
}

// ---- air and air paths -------------------------------------------------------------------

/// Air near valid values with one argument arbitrary, or all arbitrary.
fn air_args() -> impl Strategy<Value = [f64; 4]> {
    let valid = [300.0, 0.6, 1013.25, 100.0];
    prop_oneof![
        (0usize..4, any_f64()).prop_map(move |(i, x)| {
            let mut a = valid;
            if let Some(slot) = a.get_mut(i) {
                *slot = x;
            }
            a
        }),
        prop::array::uniform4(any_f64()),
        (
            230.0f64..330.0,
            0.0f64..=1.0,
            500.0f64..=1100.0,
            0.0f64..5000.0
        )
            .prop_map(|(t, u, p, d)| [t, u, p, d]),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn air_and_paths(
        [air_k, rh, p, d] in air_args(),
        wl in prop_oneof![8.0f64..=14.0, any_f64()],
        object_k in prop_oneof![200.0f64..2000.0, any_f64()],
        lo in prop_oneof![8.0f64..11.0, any_f64()],
    ) {
        let mut out = SENTINEL;
        let s = unsafe { bt_air_saturation_vapour_pressure_hpa(air_k, &mut out) };
        agrees(
            s,
            out,
            SaturationFormula::MagnusCimo.saturation_vapour_pressure_hpa(Phase::Water, air_k),
        )?;

        let mut out = SENTINEL;
        let s = unsafe { bt_air_dew_point_k(air_k, rh, &mut out) };
        let want = Air::new(air_k, rh, 1013.25).and_then(|air| air.dew_point_k());
        agrees(s, out, want)?;
        valid_or_named(want, 0.0..=air_k)?;

        let path = Air::new(air_k, rh, p).and_then(|air| Path::new(air, d));
        let mut out = SENTINEL;
        let s = unsafe { bt_path_spectral_transmittance(air_k, rh, p, d, wl, &mut out) };
        let want = path.and_then(|path| path.spectral_transmittance(wl));
        agrees(s, out, want)?;
        valid_or_named(want, 0.0..=1.0)?;

        let band = rect_band(lo, 14.0, bt_detector::Energy);
        let mut out = SENTINEL;
        let s = unsafe { bt_path_band_transmittance(&band, air_k, rh, p, d, object_k, &mut out) };
        let want = Band::rectangular(lo, 14.0, Detector::Energy).and_then(|band| {
            PathTransmittance::Continuum(path?).band_transmittance(&band, object_k)
        });
        agrees(s, out, want)?;
        valid_or_named(want, 0.0..=1.0)?;
    }
}

// ---- uncertainty budgets -----------------------------------------------------------------

fn budget_sentinel() -> bt_budget {
    bt_budget {
        estimate_k: SENTINEL,
        combined_standard_uncertainty_k: SENTINEL,
        len: 999,
        ranked: [bt_contribution {
            index: 999,
            standard_uncertainty: SENTINEL,
            sensitivity: SENTINEL,
            contribution_k: SENTINEL,
            variance_share: SENTINEL,
        }; BT_BUDGET_MAX_LINES],
    }
}

fn c_uncertainties(f: [f64; 11]) -> bt_input_uncertainties {
    let [signal, calibration_k, calibration_signal, emissivity, reflected_k, atm_transmittance, atm_k, window_transmittance, window_reflectance, window_k, window_reflected_k] =
        f;
    bt_input_uncertainties {
        signal,
        calibration_k,
        calibration_signal,
        emissivity,
        reflected_k,
        atm_transmittance,
        atm_k,
        window_transmittance,
        window_reflectance,
        window_k,
        window_reflected_k,
    }
}

fn rust_uncertainties(f: [f64; 11]) -> InputUncertainties {
    let [signal, calibration_k, calibration_signal, emissivity, reflected_k, atm_transmittance, atm_k, window_transmittance, window_reflectance, window_k, window_reflected_k] =
        f;
    InputUncertainties {
        signal,
        calibration_k,
        calibration_signal,
        emissivity,
        reflected_k,
        atm_transmittance,
        atm_k,
        window_transmittance,
        window_reflectance,
        window_k,
        window_reflected_k,
    }
}

fn uncertainty_fields() -> impl Strategy<Value = [f64; 11]> {
    let valid = [
        0.05, 0.5, 0.02, 0.02, 2.0, 0.01, 1.0, 0.005, 0.005, 1.0, 1.0,
    ];
    prop_oneof![
        (0usize..11, any_f64()).prop_map(move |(i, x)| {
            let mut f = valid;
            if let Some(slot) = f.get_mut(i) {
                *slot = x;
            }
            f
        }),
        prop::array::uniform11(any_f64()),
        prop::array::uniform11(0.0f64..1.0),
        Just(valid),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn surface_budgets(
        fields in scene_fields(),
        u in uncertainty_fields(),
        signal in prop_oneof![any_f64(), 5.0f64..200.0],
    ) {
        let band = rect_band(8.0, 14.0, bt_detector::Energy);
        let rust_band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
        let scene = c_scene(fields);
        let c_u = c_uncertainties(u);
        let mut out = budget_sentinel();
        let s = unsafe { bt_surface_budget(&band, &scene, signal, &c_u, &mut out) };
        let want = rust_scene(&scene)
            .and_then(|sc| surface_budget(&sc, &rust_band, signal, &rust_uncertainties(u)));
        match want {
            Ok(b) if s == bt_status::Ok => {
                prop_assert_eq!(out.estimate_k.to_bits(), b.estimate.to_bits());
                prop_assert_eq!(
                    out.combined_standard_uncertainty_k.to_bits(),
                    b.combined_standard_uncertainty.to_bits()
                );
                prop_assert_eq!(out.len, b.len);
                for (c, r) in out.ranked.iter().zip(b.ranked.iter()) {
                    prop_assert_eq!(c.index, r.index);
                    prop_assert_eq!(c.standard_uncertainty.to_bits(), r.standard_uncertainty.to_bits());
                    prop_assert_eq!(c.sensitivity.to_bits(), r.sensitivity.to_bits());
                    prop_assert_eq!(c.contribution_k.to_bits(), r.contribution.to_bits());
                    prop_assert_eq!(c.variance_share.to_bits(), r.variance_share.to_bits());
                    prop_assert!(c.contribution_k.is_finite() && c.variance_share.is_finite());
                }
            }
            Ok(b) => {
                // Only the boundary's own finiteness check may refuse a core success.
                prop_assert!(
                    s == bt_status::NonFinite || s == bt_status::RadianceOverflow,
                    "status {:?} for a core success {:?}", s, b
                );
                prop_assert_eq!(out, budget_sentinel());
            }
            Err(error) => {
                prop_assert_eq!(s, bt_status::from(error));
                prop_assert_eq!(out, budget_sentinel());
            }
        }
    }

    #[test]
    fn surface_input_names(index in any::<usize>()) {
        let ptr = bt_surface_input_name(index);
        match SURFACE_INPUT_NAMES.get(index) {
            Some(name) => {
                prop_assert!(!ptr.is_null());
                let text = unsafe { core::ffi::CStr::from_ptr(ptr) };
                prop_assert_eq!(text.to_str().unwrap(), *name);
            }
            None => prop_assert!(ptr.is_null()),
        }
    }
}

#[test]
fn every_surface_input_has_its_name() {
    for (i, name) in SURFACE_INPUT_NAMES.iter().enumerate() {
        let text = unsafe { core::ffi::CStr::from_ptr(bt_surface_input_name(i)) };
        assert_eq!(text.to_str().unwrap(), *name);
    }
    assert!(bt_surface_input_name(SURFACE_INPUT_NAMES.len()).is_null());
    assert_eq!(size_of::<bt_input_uncertainties>(), 11 * size_of::<f64>());
    assert_eq!(BT_BUDGET_MAX_LINES, bandtemp::uncertainty::MAX_INPUTS);
}

#[test]
fn budget_bad_pointers() {
    let band = rect_band(8.0, 14.0, bt_detector::Energy);
    let scene = c_scene([0.9, 295.0, 0.95, 290.0, 0.9, 0.05, 300.0, 293.0]);
    let u = c_uncertainties([
        0.05, 0.5, 0.02, 0.02, 2.0, 0.01, 1.0, 0.005, 0.005, 1.0, 1.0,
    ]);
    let mut out = budget_sentinel();
    unsafe {
        for s in [
            bt_surface_budget(core::ptr::null(), &scene, 50.0, &u, &mut out),
            bt_surface_budget(&band, core::ptr::null(), 50.0, &u, &mut out),
            bt_surface_budget(&band, &scene, 50.0, core::ptr::null(), &mut out),
            bt_surface_budget(&band, &scene, 50.0, &u, core::ptr::null_mut()),
        ] {
            assert_eq!(s, bt_status::NullPointer);
        }
        let misaligned = (&u as *const bt_input_uncertainties)
            .cast::<u8>()
            .wrapping_add(4)
            .cast::<bt_input_uncertainties>();
        assert_eq!(
            bt_surface_budget(&band, &scene, 50.0, misaligned, &mut out),
            bt_status::InvalidBuffer
        );
    }
    assert_eq!(out, budget_sentinel());
}

// ---- frames ------------------------------------------------------------------------------

use bandtemp::frame::{
    ConverterState, CountsMap, FrameConverter, FrameTable, Rails, TableRow, TemperatureRange,
};

/// Rows of the frame tests' storage.
const FRAME_ROWS: usize = 256;

fn frame_band() -> bt_band {
    rect_band(8.0, 14.0, bt_detector::Energy)
}

fn frame_scene() -> bt_scene {
    c_scene([0.9, 295.0, 0.95, 290.0, 0.9, 0.05, 300.0, 293.0])
}

/// A converter over 8-14 um, 250-1500 K, 1 mK, built through the C ABI, and its rows.
/// Boxed, and never copied as words once the export has written it: the state's padding
/// bytes inside the opaque words are unspecified.
fn c_converter() -> (Box<bt_frame_converter>, Vec<bt_frame_row>, usize) {
    let mut rows = vec![
        bt_frame_row {
            coefficients: [0.0; 4]
        };
        FRAME_ROWS
    ];
    let mut conv = Box::new(bt_frame_converter { opaque: [0; 32] });
    let rails = bt_rails {
        dead_counts: 0,
        saturation_counts: u16::MAX,
    };
    let mut used = 0usize;
    let (band, scene) = (frame_band(), frame_scene());
    unsafe {
        assert_eq!(
            bt_frame_table_rows_band(&band, 250.0, 1500.0, 1e-3, &mut used),
            bt_status::Ok
        );
        assert_eq!(
            bt_frame_converter_new_band(
                &band,
                &scene,
                0.002,
                -2.0,
                &rails,
                250.0,
                1500.0,
                1e-3,
                rows.as_mut_ptr(),
                rows.len(),
                &mut *conv,
            ),
            bt_status::Ok
        );
    }
    (conv, rows, used)
}

/// Reads the state a C converter holds (the layout the export writes).
fn state_of(conv: &bt_frame_converter) -> ConverterState {
    unsafe {
        (conv as *const bt_frame_converter)
            .cast::<ConverterState>()
            .read()
    }
}

/// An upper range end: any f64 (every range is refused or served in bounded time: the
/// f32 output floor, the table-size limit and the probes refuse unservable ranges before
/// their rows are built).
fn frame_hi_k() -> impl Strategy<Value = f64> {
    any_f64()
}

fn any_f32() -> impl Strategy<Value = f32> {
    prop_oneof![
        3 => any::<u32>().prop_map(f32::from_bits),
        2 => prop::sample::select(&[f32::NAN, f32::INFINITY, -f32::INFINITY, 0.0, -0.0, 1.0,
            0.5, 1e-30, f32::MAX, f32::MIN_POSITIVE][..]),
        3 => 0.0f32..200.0,
    ]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    /// Row counts agree with the Rust API for any range and tolerance.
    #[test]
    fn frame_table_rows(lo in any_f64(), hi in frame_hi_k(), tol in any_f64(), a in any_f64()) {
        let band = frame_band();
        let mut rows = 777usize;
        let s = unsafe { bt_frame_table_rows_band(&band, lo, hi, tol, &mut rows) };
        let rust = Band::rectangular(8.0, 14.0, Detector::Energy).and_then(|b| {
            FrameTable::required_rows(&b, TemperatureRange::new(lo, hi)?, tol)
        });
        match rust {
            Ok(n) => { prop_assert_eq!(s, bt_status::Ok); prop_assert_eq!(rows, n); }
            Err(e) => { prop_assert_eq!(s, bt_status::from(e)); prop_assert_eq!(rows, 777); }
        }
        let sh = bt_sakuma_hattori { a_um: a, b_umk: 50.0, c: 1e6 };
        let mut rows = 777usize;
        let s = unsafe { bt_frame_table_rows_sakuma_hattori(&sh, 250.0, 1000.0, 1e-2, &mut rows) };
        let rust = SakumaHattori::new(a, 50.0, 1e6).and_then(|c| {
            FrameTable::required_rows(&c, TemperatureRange::new(250.0, 1000.0)?, 1e-2)
        });
        match rust {
            Ok(n) => { prop_assert_eq!(s, bt_status::Ok); prop_assert_eq!(rows, n); }
            Err(e) => { prop_assert_eq!(s, bt_status::from(e)); prop_assert_eq!(rows, 777); }
        }
    }

    /// Converter construction agrees with the Rust API (the same state, or the same error
    /// and an untouched converter) for any counts map, range and tolerance.
    #[test]
    fn frame_converter_new(
        gain in any_f64(), offset in any_f64(), lo in any_f64(), hi in frame_hi_k(),
        tol in any_f64(), dead in any::<u16>(), sat in any::<u16>(),
    ) {
        let (band, scene) = (frame_band(), frame_scene());
        let rails = bt_rails { dead_counts: dead, saturation_counts: sat };
        let mut rows = vec![bt_frame_row { coefficients: [0.0; 4] }; FRAME_ROWS];
        let mut conv = bt_frame_converter { opaque: [0xA5A5; 32] };
        let s = unsafe {
            bt_frame_converter_new_band(&band, &scene, gain, offset, &rails, lo, hi, tol,
                rows.as_mut_ptr(), rows.len(), &mut conv)
        };
        let mut storage = vec![[0.0f32; 4]; FRAME_ROWS];
        let rust = (|| {
            let b = Band::rectangular(8.0, 14.0, Detector::Energy)?;
            let sc = rust_scene(&scene)?;
            let counts = CountsMap::linear(gain, offset)?;
            let rails = Rails::new(dead, sat)?;
            let range = TemperatureRange::new(lo, hi)?;
            Ok::<_, Error>(FrameConverter::new(&b, &sc, counts, rails, range, tol, &mut storage)?
                .state())
        })();
        match rust {
            Ok(state) => {
                prop_assert_eq!(s, bt_status::Ok);
                let got = state_of(&conv);
                prop_assert_eq!(format!("{got:?}"), format!("{state:?}"));
                let n = state.geometry.rows();
                let c_rows: Vec<TableRow> = rows[..n].iter().map(|r| r.coefficients).collect();
                prop_assert_eq!(&c_rows[..], &storage[..n]);
            }
            Err(e) => {
                prop_assert_eq!(s, bt_status::from(e));
                prop_assert_eq!(conv.opaque, [0xA5A5; 32]);
            }
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    /// Conversion of arbitrary counts, signals and emissivities agrees bit for bit with the
    /// Rust converter, and every pixel is a temperature in range or NaN.
    #[test]
    fn frame_convert(
        counts in prop::collection::vec(any::<u16>(), 0..40),
        signal in prop::collection::vec(any_f32(), 0..40),
        emissivity in prop::collection::vec(any_f32(), 0..40),
        use_map in any::<bool>(),
    ) {
        let (conv, rows, used) = c_converter();
        let storage: Vec<TableRow> = rows.iter().map(|r| r.coefficients).collect();
        let rust = FrameConverter::from_parts(state_of(&conv), &storage).unwrap();
        let e_ptr = if use_map { emissivity.as_ptr() } else { core::ptr::null() };
        let e_rust = use_map.then_some(&emissivity[..]);
        // Counts.
        let mut kelvin = vec![-1.0f32; counts.len()];
        let mut summary = bt_frame_summary::default();
        let s = unsafe {
            bt_frame_convert_counts(&*conv, rows.as_ptr(), used, counts.as_ptr(), counts.len(),
                e_ptr, emissivity.len(), kelvin.as_mut_ptr(), kelvin.len(), &mut summary)
        };
        let mut want = vec![-1.0f32; counts.len()];
        match rust.convert_counts(&counts, e_rust, &mut want) {
            Ok(sum) => {
                prop_assert_eq!(s, bt_status::Ok);
                prop_assert_eq!(summary.pixels, sum.pixels);
                prop_assert_eq!(summary.converted, sum.converted);
                prop_assert_eq!(summary.emissivity_invalid, sum.emissivity_invalid);
                for (k, w) in kelvin.iter().zip(&want) {
                    prop_assert_eq!(k.to_bits(), w.to_bits());
                    prop_assert!(k.is_nan() || (249.9..=1500.1).contains(k));
                }
            }
            Err(e) => {
                prop_assert_eq!(s, bt_status::from(e));
                prop_assert!(kelvin.iter().all(|&k| k == -1.0));
                prop_assert_eq!(summary, bt_frame_summary::default());
            }
        }
        // Signal.
        let mut kelvin = vec![-1.0f32; signal.len()];
        let mut summary = bt_frame_summary::default();
        let s = unsafe {
            bt_frame_convert_signal(&*conv, rows.as_ptr(), used, signal.as_ptr(), signal.len(),
                e_ptr, emissivity.len(), kelvin.as_mut_ptr(), kelvin.len(), &mut summary)
        };
        let mut want = vec![-1.0f32; signal.len()];
        match rust.convert_signal(&signal, e_rust, &mut want) {
            Ok(sum) => {
                prop_assert_eq!(s, bt_status::Ok);
                prop_assert_eq!(summary.non_finite, sum.non_finite);
                prop_assert_eq!(summary.converted, sum.converted);
                for (k, w) in kelvin.iter().zip(&want) {
                    prop_assert_eq!(k.to_bits(), w.to_bits());
                }
            }
            Err(e) => {
                prop_assert_eq!(s, bt_status::from(e));
                prop_assert!(kelvin.iter().all(|&k| k == -1.0));
            }
        }
    }

    /// A converter of arbitrary bytes (or a good one with arbitrary words written over it)
    /// is answered with a named status or a frame, never a panic; the table rows may hold
    /// arbitrary floats too.
    #[test]
    fn frame_convert_hostile_converter(
        words in prop::collection::vec((0usize..32, any::<u64>()), 0..4),
        garbage in any::<bool>(),
        row_bits in prop::collection::vec(any::<u32>(), 4),
        counts in prop::collection::vec(any::<u16>(), 0..20),
        rows_len in prop_oneof![Just(None), (0usize..300).prop_map(Some)],
    ) {
        let (mut conv, mut rows, used) = c_converter();
        if garbage {
            *conv = bt_frame_converter { opaque: [0; 32] };
        }
        for (i, w) in words {
            conv.opaque[i] = w;
        }
        if let Some(r) = rows.first_mut() {
            r.coefficients = [0, 1, 2, 3].map(|i| f32::from_bits(row_bits[i]));
        }
        let n = rows_len.unwrap_or(used).min(rows.len());
        let mut kelvin = vec![0.0f32; counts.len()];
        let mut summary = bt_frame_summary::default();
        let s = unsafe {
            bt_frame_convert_counts(&*conv, rows.as_ptr(), n, counts.as_ptr(), counts.len(),
                core::ptr::null(), 0, kelvin.as_mut_ptr(), kelvin.len(), &mut summary)
        };
        if s == bt_status::Ok {
            prop_assert_eq!(summary.pixels, counts.len() as u64);
        } else {
            prop_assert!(s.error().is_some());
        }
        let scene = frame_scene();
        let band = frame_band();
        let before = format!("{:?}", state_of(&conv));
        let s = unsafe {
            bt_frame_converter_set_scene_band(&mut *conv, rows.as_ptr(), n, &band, &scene)
        };
        if s != bt_status::Ok {
            prop_assert_eq!(format!("{:?}", state_of(&conv)), before);
        }
    }
}

// ---- site methods, spectral scenes, the Wien ratio, calibration curves, Monte Carlo ----------

/// Two-output exports: both values equal the Rust result on success; both untouched on error.
fn agrees2(
    status: bt_status,
    out: (f64, f64),
    rust: Result<(f64, f64), Error>,
) -> Result<(), TestCaseError> {
    match rust {
        Ok((a, b)) if a.is_finite() && b.is_finite() => {
            prop_assert_eq!(status, bt_status::Ok);
            prop_assert_eq!(out.0.to_bits(), a.to_bits());
            prop_assert_eq!(out.1.to_bits(), b.to_bits());
        }
        Ok(_) => {
            prop_assert!(status == bt_status::NonFinite || status == bt_status::RadianceOverflow);
            prop_assert_eq!(out.0.to_bits(), SENTINEL.to_bits());
            prop_assert_eq!(out.1.to_bits(), SENTINEL.to_bits());
        }
        Err(error) => {
            prop_assert_eq!(status, bt_status::from(error));
            prop_assert_eq!(out.0.to_bits(), SENTINEL.to_bits());
            prop_assert_eq!(out.1.to_bits(), SENTINEL.to_bits());
        }
    }
    Ok(())
}

/// A spectral scene in Rust, built as the export builds it.
fn rust_spectral<'a>(
    scene: &bt_scene,
    e: &'a (Vec<f64>, Vec<f64>),
    ta: &'a (Vec<f64>, Vec<f64>),
) -> Result<bandtemp::scene::SpectralScene<'a>, Error> {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy)?;
    let grey = rust_scene(scene)?;
    let mut spectral = bandtemp::scene::SpectralScene::new(band, grey)?;
    if !e.0.is_empty() {
        spectral = spectral.with_spectral_emissivity(SpectralTable::new(&e.0, &e.1)?)?;
    }
    if !ta.0.is_empty() {
        spectral =
            spectral.with_spectral_atmosphere(SpectralTable::new(&ta.0, &ta.1)?, grey.atm_k())?;
    }
    Ok(spectral)
}

/// Tables over 7-15 um with values in [0, 1.2] (most valid, some above 1), or arbitrary.
fn spectral_table() -> impl Strategy<Value = (Vec<f64>, Vec<f64>)> {
    prop_oneof![
        (2usize..6)
            .prop_flat_map(|n| { (Just(n), prop::collection::vec(0.0f64..1.2, n),) })
            .prop_map(|(n, v)| {
                #[allow(clippy::cast_precision_loss)]
                let wl = (0..n)
                    .map(|i| 7.0 + 8.0 * i as f64 / (n - 1) as f64)
                    .collect();
                (wl, v)
            }),
        table(),
        Just((Vec::new(), Vec::new())),
    ]
}

/// `bt_curve` with the form as a plain integer, to hand the library any value.
#[repr(C)]
struct RawCurve {
    form: u32,
    a_um: f64,
    b_umk: f64,
    c: f64,
    offset: f64,
}

#[test]
fn raw_curve_mirrors_bt_curve() {
    assert_eq!(size_of::<bt_curve_form>(), size_of::<u32>());
    assert_eq!(size_of::<RawCurve>(), size_of::<bt_curve>());
    assert_eq!(offset_of!(RawCurve, a_um), offset_of!(bt_curve, a_um));
    assert_eq!(offset_of!(RawCurve, offset), offset_of!(bt_curve, offset));
}

fn rust_curve_value(
    form: u32,
    p: [f64; 4],
    f: impl Fn(&dyn SignalCurve) -> Result<f64, Error>,
) -> Result<f64, Error> {
    use bandtemp::calibration::{OffsetCurve, SakumaHattoriWien};
    match form {
        0 => f(&OffsetCurve::new(
            SakumaHattori::new(p[0], p[1], p[2])?,
            p[3],
        )?),
        1 => f(&OffsetCurve::new(
            SakumaHattoriWien::new(p[0], p[1], p[2])?,
            p[3],
        )?),
        _ => Err(Error::InvalidCurveForm),
    }
}

fn monte_carlo_sentinel() -> bt_monte_carlo {
    bt_monte_carlo {
        trials: 7,
        mean_k: SENTINEL,
        standard_deviation_k: SENTINEL,
        probability: SENTINEL,
        low_k: SENTINEL,
        high_k: SENTINEL,
        shortest_low_k: SENTINEL,
        shortest_high_k: SENTINEL,
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn site_methods(
        fields in scene_fields(),
        signal in prop_oneof![any_f64(), 5.0f64..200.0],
        other in prop_oneof![any_f64(), 5.0f64..200.0],
        x in prop_oneof![any_f64(), 0.0f64..1.0, 250.0f64..600.0],
        t in prop_oneof![any_f64(), 250.0f64..600.0],
    ) {
        let band = rect_band(8.0, 14.0, bt_detector::Energy);
        let rust_band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
        let scene = c_scene(fields);
        let rust = rust_scene(&scene);

        let mut out = SENTINEL;
        let s = unsafe { bt_emissivity_from_reference(&band, &scene, signal, x, &mut out) };
        agrees(s, out, rust.and_then(|sc| sc.emissivity_from_reference(&rust_band, signal, x)))?;

        let (mut e, mut tk) = (SENTINEL, SENTINEL);
        let s = unsafe {
            bt_emissivity_from_reference_coating(&band, &scene, signal, other, x, &mut e, &mut tk)
        };
        let want = rust.and_then(|sc| {
            sc.emissivity_from_reference_coating(&rust_band, signal, other, x)
                .map(|r| (r.emissivity, r.temperature_k))
        });
        agrees2(s, (e, tk), want)?;

        let mut out = SENTINEL;
        let s = unsafe { bt_reflected_temperature_from_reflector(&band, &scene, signal, x, t, &mut out) };
        agrees(s, out, rust.and_then(|sc| sc.reflected_k_from_reflector(&rust_band, signal, x, t)))?;
    }

    #[test]
    fn spectral_scenes(
        fields in scene_fields(),
        e in spectral_table(),
        ta in spectral_table(),
        t in prop_oneof![any_f64(), 250.0f64..1500.0],
        signal in prop_oneof![any_f64(), 5.0f64..2000.0],
    ) {
        let band = rect_band(8.0, 14.0, bt_detector::Energy);
        let scene = c_scene(fields);
        let tables = bt_spectral_tables {
            emissivity_um: e.0.as_ptr(),
            emissivity: e.1.as_ptr(),
            emissivity_len: e.0.len(),
            transmittance_um: ta.0.as_ptr(),
            transmittance: ta.1.as_ptr(),
            transmittance_len: ta.0.len(),
        };
        let rust = rust_spectral(&scene, &e, &ta);
        let mut out = SENTINEL;
        let s = unsafe { bt_spectral_sensor_radiance(&band, &scene, &tables, t, &mut out) };
        agrees(s, out, rust.and_then(|sp| sp.sensor_signal(t)))?;
        let mut out = SENTINEL;
        let s = unsafe { bt_spectral_object_temperature(&band, &scene, &tables, signal, &mut out) };
        agrees(s, out, rust.and_then(|sp| sp.object_temperature(signal)))?;
        let mut out = SENTINEL;
        let s = unsafe {
            bt_spectral_object_temperature_from_apparent(&band, &scene, &tables, t, &mut out)
        };
        agrees(s, out, rust.and_then(|sp| sp.object_temperature_from_apparent(t)))?;
    }

    #[test]
    fn wien_ratio(
        l1 in prop_oneof![any_f64(), 0.5f64..1.0],
        l2 in prop_oneof![any_f64(), 0.8f64..2.0],
        w in prop_oneof![any_f64(), 0.1f64..10.0],
        x in prop_oneof![any_f64(), 0.001f64..2.0, 500.0f64..3000.0],
        kappa in prop_oneof![any_f64(), 0.8f64..1.2],
        lo in any_f64(),
    ) {
        use bandtemp::ratio::WienRatio;
        let model = bt_wien_ratio { lambda1_um: l1, lambda2_um: l2, prefactor: w };
        let rust = WienRatio::new(l1, l2, w);
        let mut out = SENTINEL;
        let s = unsafe { bt_wien_ratio_signal_ratio(&model, x, kappa, &mut out) };
        agrees(s, out, rust.and_then(|m| m.ratio(x, kappa)))?;
        let mut out = SENTINEL;
        let s = unsafe { bt_wien_ratio_temperature(&model, x, kappa, &mut out) };
        agrees(s, out, rust.and_then(|m| m.temperature(x, kappa)))?;
        let mut out = SENTINEL;
        let s = unsafe { bt_wien_ratio_correct_grey(&model, x, kappa, &mut out) };
        agrees(s, out, rust.and_then(|m| m.correct_grey(x, kappa)))?;

        let band1 = rect_band(lo, 0.655, bt_detector::Energy);
        let band2 = rect_band(0.895, 0.905, bt_detector::Photon);
        let mut got = bt_wien_ratio { lambda1_um: SENTINEL, lambda2_um: SENTINEL, prefactor: SENTINEL };
        let s = unsafe { bt_wien_ratio_from_bands(&band1, &band2, &mut got) };
        let want = Band::rectangular(lo, 0.655, Detector::Energy).and_then(|b1| {
            WienRatio::from_bands(&b1, &Band::rectangular(0.895, 0.905, Detector::Photon)?)
        });
        match want {
            Ok(m) => {
                prop_assert_eq!(s, bt_status::Ok);
                prop_assert_eq!(got.lambda1_um.to_bits(), m.lambda1_um().to_bits());
                prop_assert_eq!(got.prefactor.to_bits(), m.prefactor().to_bits());
            }
            Err(error) => {
                prop_assert_eq!(s, bt_status::from(error));
                prop_assert_eq!(got.prefactor.to_bits(), SENTINEL.to_bits());
            }
        }
    }

    #[test]
    fn calibration_curves(
        form in prop_oneof![0u32..2, any::<u32>()],
        p in prop_oneof![
            prop::array::uniform4(any_f64()),
            (0.5f64..14.0, -50.0f64..150.0, 1.0f64..1e9, -1e3f64..1e3).prop_map(|(a, b, c, o)| [a, b, c, o]),
        ],
        x in prop_oneof![any_f64(), 250.0f64..2500.0, 1.0f64..1e9],
        fields in scene_fields(),
    ) {
        let raw = RawCurve { form, a_um: p[0], b_umk: p[1], c: p[2], offset: p[3] };
        let curve = (&raw as *const RawCurve).cast::<bt_curve>();
        let mut out = SENTINEL;
        let s = unsafe { bt_curve_signal(curve, x, &mut out) };
        agrees(s, out, rust_curve_value(form, p, |c| c.signal(x)))?;
        let mut out = SENTINEL;
        let s = unsafe { bt_curve_temperature(curve, x, &mut out) };
        agrees(s, out, rust_curve_value(form, p, |c| c.temperature(x)))?;
        let scene = c_scene(fields);
        let mut out = SENTINEL;
        let s = unsafe { bt_curve_sensor_signal(curve, &scene, x, &mut out) };
        // The export validates the curve first, then the scene.
        let want = rust_curve_value(form, p, |_| Ok(0.0))
            .and_then(|_| rust_scene(&scene))
            .and_then(|sc| rust_curve_value(form, p, |c| sc.sensor_signal(c, x)));
        agrees(s, out, want)?;
        let mut out = SENTINEL;
        let s = unsafe { bt_curve_object_temperature(curve, &scene, x, &mut out) };
        let want = rust_curve_value(form, p, |_| Ok(0.0))
            .and_then(|_| rust_scene(&scene))
            .and_then(|sc| rust_curve_value(form, p, |c| sc.object_temperature(c, x)));
        agrees(s, out, want)?;
    }

    #[test]
    fn curve_forms_outside_the_enum_are_errors(form in any::<i32>()) {
        let band = rect_band(0.645, 0.655, bt_detector::Energy);
        let mut curve = bt_curve { form: bt_curve_form::Planck, a_um: SENTINEL, b_umk: SENTINEL, c: SENTINEL, offset: SENTINEL };
        let mut max_error = SENTINEL;
        if !(0..=1).contains(&form) {
            let s = unsafe { bt_curve_fit_band(form, &band, 700.0, 1400.0, &mut curve, &mut max_error) };
            prop_assert_eq!(s, bt_status::InvalidCurveForm);
            prop_assert_eq!(curve.a_um.to_bits(), SENTINEL.to_bits());
            prop_assert_eq!(max_error.to_bits(), SENTINEL.to_bits());
            let t = [900.0, 1000.0, 1100.0];
            let mut fit = core::mem::MaybeUninit::<bt_curve_fit>::zeroed();
            let s = unsafe {
                bt_curve_fit_points(form, t.as_ptr(), t.as_ptr(), core::ptr::null(), 3, 0.0, fit.as_mut_ptr())
            };
            prop_assert_eq!(s, bt_status::InvalidCurveForm);
        }
    }
}

proptest! {
    // Each case runs up to 40 Monte Carlo trials twice.
    #![proptest_config(ProptestConfig::with_cases(128))]

    #[test]
    fn monte_carlo_budgets(
        fields in scene_fields(),
        u in uncertainty_fields(),
        signal in prop_oneof![any_f64(), 5.0f64..200.0],
        seed in any::<u64>(),
        n in 0usize..40,
        probability in prop_oneof![any_f64(), 0.5f64..0.99],
    ) {
        use bandtemp::uncertainty::{surface_monte_carlo, surface_monte_carlo_streaming, Xoshiro256StarStar};
        let band = rect_band(8.0, 14.0, bt_detector::Energy);
        let rust_band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
        let scene = c_scene(fields);
        let c_u = c_uncertainties(u);
        let mut samples = vec![SENTINEL; n];
        let mut out = monte_carlo_sentinel();
        let s = unsafe {
            bt_surface_monte_carlo(&band, &scene, signal, &c_u, seed, probability, samples.as_mut_ptr(), n, &mut out)
        };
        let mut rust_samples = vec![0.0; n];
        let want = rust_scene(&scene).and_then(|sc| {
            surface_monte_carlo(&sc, &rust_band, signal, &rust_uncertainties(u),
                &mut Xoshiro256StarStar::seed_from_u64(seed), &mut rust_samples, probability)
        });
        match want {
            Ok(m) if s == bt_status::Ok => {
                prop_assert_eq!(out.trials, n);
                prop_assert_eq!(out.mean_k.to_bits(), m.mean.to_bits());
                prop_assert_eq!(out.standard_deviation_k.to_bits(), m.standard_deviation.to_bits());
                prop_assert_eq!(out.low_k.to_bits(), m.interval.low.to_bits());
                prop_assert_eq!(out.shortest_high_k.to_bits(), m.interval.shortest_high.to_bits());
                prop_assert_eq!(&samples, &rust_samples);
            }
            Ok(m) => {
                prop_assert!(s == bt_status::NonFinite || s == bt_status::RadianceOverflow, "{:?} {:?}", s, m);
                prop_assert_eq!(out, monte_carlo_sentinel());
            }
            Err(error) => {
                prop_assert_eq!(s, bt_status::from(error));
                prop_assert_eq!(out, monte_carlo_sentinel());
            }
        }
        let (mut mean, mut sd) = (SENTINEL, SENTINEL);
        let s = unsafe {
            bt_surface_monte_carlo_streaming(&band, &scene, signal, &c_u, seed, n, &mut mean, &mut sd)
        };
        let want = rust_scene(&scene).and_then(|sc| {
            let stats = surface_monte_carlo_streaming(&sc, &rust_band, signal, &rust_uncertainties(u),
                &mut Xoshiro256StarStar::seed_from_u64(seed), n)?;
            Ok((stats.mean, stats.standard_deviation()?))
        });
        agrees2(s, (mean, sd), want)?;
    }
}

#[test]
fn new_exports_answer_bad_pointers_with_a_status() {
    let band = rect_band(8.0, 14.0, bt_detector::Energy);
    let scene = c_scene([0.9, 295.0, 0.95, 290.0, 0.9, 0.05, 300.0, 293.0]);
    let tables = bt_spectral_tables {
        emissivity_um: core::ptr::null(),
        emissivity: core::ptr::null(),
        emissivity_len: 0,
        transmittance_um: core::ptr::null(),
        transmittance: core::ptr::null(),
        transmittance_len: 0,
    };
    let model = bt_wien_ratio {
        lambda1_um: 0.65,
        lambda2_um: 0.9,
        prefactor: 5.0,
    };
    let curve = bt_curve {
        form: bt_curve_form::Wien,
        a_um: 0.9,
        b_umk: 1.0,
        c: 1e9,
        offset: 0.0,
    };
    let u = c_uncertainties([0.05, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0]);
    let mut out = SENTINEL;
    let mut samples = [0.0; 8];
    let null = core::ptr::null_mut::<f64>();
    unsafe {
        assert_eq!(
            bt_emissivity_from_reference(&band, &scene, 50.0, 400.0, null),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_reflected_temperature_from_reflector(
                &band,
                core::ptr::null(),
                50.0,
                0.0,
                300.0,
                &mut out
            ),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_spectral_sensor_radiance(&band, &scene, core::ptr::null(), 400.0, &mut out),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_spectral_object_temperature(&band, &scene, &tables, 50.0, null),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_wien_ratio_temperature(core::ptr::null(), 0.1, 1.0, &mut out),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_wien_ratio_temperature(&model, 0.1, 1.0, null),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_curve_signal(core::ptr::null(), 1000.0, &mut out),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_curve_temperature(&curve, 1e3, null),
            bt_status::NullPointer
        );
        let misaligned = (&curve as *const bt_curve)
            .cast::<u8>()
            .add(1)
            .cast::<bt_curve>();
        assert_eq!(
            bt_curve_signal(misaligned, 1000.0, &mut out),
            bt_status::InvalidBuffer
        );
        assert_eq!(
            bt_surface_monte_carlo(
                &band,
                &scene,
                50.0,
                &u,
                1,
                0.95,
                samples.as_mut_ptr(),
                8,
                core::ptr::null_mut()
            ),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_surface_monte_carlo_streaming(&band, &scene, 50.0, &u, 1, 8, &mut out, null),
            bt_status::NullPointer
        );
    }
    assert_eq!(out.to_bits(), SENTINEL.to_bits());
}

// ---- calibration checks ------------------------------------------------------------------

/// Sample counts: small ones (including the refused 0 and 1) and the refused huge ones.
fn verify_samples() -> impl Strategy<Value = usize> {
    prop_oneof![
        4 => 0usize..24,
        1 => Just(bandtemp::verify::MAX_SAMPLES + 1),
        1 => Just(usize::MAX),
    ]
}

/// A C report and the Rust report behind it agree: the same status, the same fields bit
/// for bit on success (compared through `Debug`, which prints every bit of an f64), the
/// report untouched on error.
fn report_agrees<C: core::fmt::Debug + PartialEq, R: Into<C>>(
    status: bt_status,
    out: &C,
    sentinel: &C,
    rust: Result<R, Error>,
) -> Result<(), TestCaseError> {
    match rust {
        Ok(report) => {
            prop_assert_eq!(status, bt_status::Ok);
            prop_assert_eq!(format!("{out:?}"), format!("{:?}", report.into()));
        }
        Err(error) => {
            prop_assert_eq!(status, bt_status::from(error));
            prop_assert_eq!(out, sentinel);
        }
    }
    Ok(())
}

const RESIDUALS_SENTINEL: bt_verify_residuals_report = bt_verify_residuals_report {
    points: 7,
    max_abs_residual_k: SENTINEL,
    rms_residual_k: SENTINEL,
    mean_residual_k: SENTINEL,
    worst_index: 7,
    worst_t_k: SENTINEL,
    worst_residual_k: SENTINEL,
};
const CURVE_SENTINEL: bt_verify_curve_report = bt_verify_curve_report {
    samples: 7,
    max_abs_error_k: SENTINEL,
    worst_t_k: SENTINEL,
    worst_error_k: SENTINEL,
    mean_error_k: SENTINEL,
};
const TRIP_SENTINEL: bt_verify_round_trip_report = bt_verify_round_trip_report {
    samples: 7,
    max_abs_error_k: SENTINEL,
    worst_t_k: SENTINEL,
    worst_error_k: SENTINEL,
    monotonic: 7,
    first_non_monotonic_k: SENTINEL,
};
const COVERAGE_SENTINEL: bt_verify_coverage_report = bt_verify_coverage_report {
    points: 7,
    points_in_range: 7,
    t_min_k: SENTINEL,
    t_max_k: SENTINEL,
    extrapolated_below_k: SENTINEL,
    extrapolated_above_k: SENTINEL,
    largest_gap_k: SENTINEL,
    gap_lo_k: SENTINEL,
    gap_hi_k: SENTINEL,
};

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    /// Residuals, coverage, round trips and the curve-against-band check with every
    /// argument drawn from arbitrary bit patterns (or near valid values): agreement with
    /// the Rust API, the report untouched on error.
    #[test]
    fn verify_checks(
        [a, b, c] in prop_oneof![Just([10.2, 60.0, 2.0e6]), prop::array::uniform3(any_f64())],
        dark in prop_oneof![Just(900.0), any_f64()],
        points in prop::collection::vec(
            (prop_oneof![250.0f64..500.0, any_f64()], prop_oneof![1000.0f64..1e5, any_f64()]),
            0..6,
        ),
        lo in prop_oneof![250.0f64..300.0, any_f64()],
        hi in prop_oneof![400.0f64..500.0, any_f64()],
        [gain, offset] in prop_oneof![Just([1.0, 0.0]), prop::array::uniform2(any_f64())],
        edges in prop_oneof![Just((8.0, 14.0)), (any_f64(), any_f64())],
        samples in verify_samples(),
    ) {
        let p = bt_sakuma_hattori { a_um: a, b_umk: b, c };
        let (t_k, signal): (Vec<f64>, Vec<f64>) = points.into_iter().unzip();
        let n = t_k.len();
        let rust_curve = SakumaHattori::new(a, b, c)
            .and_then(|sh| bandtemp::calibration::OffsetCurve::new(sh, dark));
        let band = rect_band(edges.0, edges.1, bt_detector::Energy);
        let rust_band = Band::rectangular(edges.0, edges.1, Detector::Energy);

        let mut out = RESIDUALS_SENTINEL;
        let s = unsafe {
            bt_verify_residuals_sakuma_hattori(&p, dark, t_k.as_ptr(), signal.as_ptr(), n, &mut out)
        };
        let want = rust_curve.and_then(|curve| bandtemp::verify::residuals(&curve, &t_k, &signal));
        report_agrees(s, &out, &RESIDUALS_SENTINEL, want)?;

        let mut out = COVERAGE_SENTINEL;
        let s = unsafe { bt_verify_coverage(t_k.as_ptr(), n, lo, hi, &mut out) };
        report_agrees(s, &out, &COVERAGE_SENTINEL, bandtemp::verify::coverage(&t_k, lo, hi))?;

        let mut out = TRIP_SENTINEL;
        let s = unsafe { bt_verify_round_trip_sakuma_hattori(&p, dark, lo, hi, samples, &mut out) };
        let want = rust_curve
            .and_then(|curve| bandtemp::verify::round_trip(&curve, lo, hi, samples));
        report_agrees(s, &out, &TRIP_SENTINEL, want)?;

        let mut out = TRIP_SENTINEL;
        let s = unsafe { bt_verify_round_trip_band(&band, lo, hi, samples, &mut out) };
        let want = rust_band
            .and_then(|band| bandtemp::verify::round_trip(&band, lo, hi, samples));
        report_agrees(s, &out, &TRIP_SENTINEL, want)?;

        let mut out = CURVE_SENTINEL;
        let s = unsafe {
            bt_verify_curve_band(&p, dark, &band, gain, offset, lo, hi, samples, &mut out)
        };
        let want = (|| {
            let map = bandtemp::frame::CountsMap::linear(gain, offset)?;
            bandtemp::verify::curve_against_model(&rust_curve?, &rust_band?, map, lo, hi, samples)
        })();
        // The C side reads the curve, the band and the map in that order; the Rust side
        // above builds them in another, so only the success/failure and, on success, the
        // report must agree; an error is still a named one with the report untouched.
        match want {
            Ok(report) => {
                prop_assert_eq!(s, bt_status::Ok);
                prop_assert_eq!(format!("{out:?}"), format!("{:?}", bt_verify_curve_report::from(report)));
            }
            Err(_) => {
                prop_assert!(s != bt_status::Ok && s.error().is_some());
                prop_assert_eq!(out, CURVE_SENTINEL);
            }
        }
    }

    /// The uncertainty check with arbitrary covariances (near valid ones or bit patterns)
    /// and ranges: agreement with the Rust API, the report untouched on error.
    #[test]
    fn verify_uncertainty(
        [a, b, c] in prop_oneof![Just([10.2, 60.0, 2.0e6]), prop::array::uniform3(any_f64())],
        v in prop_oneof![
            Just([1e-4, 0.0, 0.0, 0.0, 1e-2, 0.0, 0.0, 0.0, 1e6]),
            prop::array::uniform9(any_f64()),
            (0usize..9, any_f64()).prop_map(|(i, x)| {
                let mut v = [1e-4, 0.0, 0.0, 0.0, 1e-2, 0.0, 0.0, 0.0, 1e6];
                if let Some(slot) = v.get_mut(i) {
                    *slot = x;
                }
                v
            }),
        ],
        lo in prop_oneof![250.0f64..300.0, any_f64()],
        hi in prop_oneof![400.0f64..500.0, any_f64()],
        samples in verify_samples(),
    ) {
        let p = bt_sakuma_hattori { a_um: a, b_umk: b, c };
        let sentinel = bt_verify_uncertainty_report {
            samples: 7,
            max_u_k: SENTINEL,
            worst_t_k: SENTINEL,
            lo_u_k: SENTINEL,
            hi_u_k: SENTINEL,
        };
        let mut out = sentinel;
        let s = unsafe {
            bt_verify_uncertainty_sakuma_hattori(&p, v.as_ptr(), lo, hi, samples, &mut out)
        };
        let matrix = [[v[0], v[1], v[2]], [v[3], v[4], v[5]], [v[6], v[7], v[8]]];
        let want = SakumaHattori::new(a, b, c).and_then(|curve| {
            bandtemp::verify::calibration_uncertainty(&curve, &matrix, lo, hi, samples)
        });
        report_agrees(s, &out, &sentinel, want)?;
    }

    /// The frame-table check over a good converter with arbitrary rows, row counts and
    /// points per row, and over converters with words overwritten: a report that agrees
    /// with the Rust check, or a named status with the report untouched.
    #[test]
    fn verify_frame_table_hostile(
        words in prop::collection::vec((0usize..32, any::<u64>()), 0..3),
        row_bits in prop::collection::vec(any::<u32>(), 4),
        corrupt_row in any::<bool>(),
        rows_len in prop_oneof![Just(None), (0usize..300).prop_map(Some)],
        points_per_row in prop_oneof![0usize..8, Just(5000usize)],
    ) {
        let (mut conv, mut rows, used) = c_converter();
        for (i, w) in words {
            conv.opaque[i] = w;
        }
        if corrupt_row {
            if let Some(r) = rows.first_mut() {
                r.coefficients = [0, 1, 2, 3].map(|i| f32::from_bits(row_bits[i]));
            }
        }
        let n = rows_len.unwrap_or(used).min(rows.len());
        let band = frame_band();
        let sentinel = bt_verify_table_report {
            rows: 7,
            samples: 7,
            max_abs_error_k: SENTINEL,
            worst_signal: SENTINEL,
            worst_t_k: SENTINEL,
            worst_error_k: SENTINEL,
            refused: 7,
            non_monotonic: 7,
            claimed_max_error_k: SENTINEL,
        };
        let mut out = sentinel;
        let s = unsafe {
            bt_verify_frame_table_band(&band, &*conv, rows.as_ptr(), n, points_per_row, &mut out)
        };
        let rust_rows: Vec<[f32; 4]> = rows.iter().map(|r| r.coefficients).collect();
        let want = (|| {
            let converter = bandtemp::frame::FrameConverter::from_parts(
                state_of(&conv),
                rust_rows.get(..n).unwrap_or(&[]),
            )?;
            let band = Band::rectangular(8.0, 14.0, Detector::Energy)?;
            bandtemp::verify::frame_table(&converter.table(), &band, points_per_row)
        })();
        report_agrees(s, &out, &sentinel, want)?;
    }
}
