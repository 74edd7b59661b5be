//! The optics and materials exports driven with arbitrary f64 bit patterns (plus edge
//! values): no panic; every result a finite value or a named error; agreement with the
//! Rust API they wrap (same status, same bits); out values written only on success.

use bandtemp::band::Band;
use bandtemp::calibration::{
    limit_effective_wavelength_um, one_point_wavelength_sensitivity, two_point_sigma_sensitivity,
    SpectralMoments,
};
use bandtemp::emissivity::{hagen_rubens_normal, OpticalConstants};
use bandtemp::multiwavelength::{fit, noise_gain, EmissivityModel};
use bandtemp::optics::diffraction::{
    airy_encircled_energy, airy_radius_um, mtf, small_target_fraction,
};
use bandtemp::optics::sse::{temperature_error_k, SseTable};
use bandtemp::optics::{check_target, spot_diameter_m, TargetRule};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use bandtemp::site_budget::{contact_emissivity_budget, reflector_bias_k};
use bandtemp::Error;
use bandtemp_capi::*;
use proptest::prelude::*;

mod common;
use common::{any_f64_to, SENTINEL};

fn any_f64() -> impl Strategy<Value = f64> {
    any_f64_to(4.0)
}

/// The export's status and value agree with the Rust result, bit for bit; on error the
/// out value is untouched.
fn agrees(status: bt_status, out: f64, rust: Result<f64, Error>) -> Result<(), TestCaseError> {
    match rust {
        Ok(value) if value.is_finite() => {
            prop_assert_eq!(status, bt_status::Ok);
            prop_assert_eq!(out.to_bits(), value.to_bits());
        }
        Ok(_) => prop_assert!(status != bt_status::Ok && out.to_bits() == SENTINEL.to_bits()),
        Err(error) => {
            prop_assert_eq!(status, bt_status::from(error));
            prop_assert_eq!(out.to_bits(), SENTINEL.to_bits());
        }
    }
    Ok(())
}

fn rect(lo: f64, hi: f64) -> bt_band {
    bt_band {
        lo_um: lo,
        hi_um: hi,
        detector: bt_detector::Energy,
        response_um: core::ptr::null(),
        response: core::ptr::null(),
        response_len: 0,
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn geometry(a in any_f64(), b in any_f64(), c in any_f64(), rule in 0u32..5) {
        let mut out = SENTINEL;
        // SAFETY: `out` is a valid double.
        let status = unsafe { bt_spot_diameter_m(a, b, &mut out) };
        agrees(status, out, spot_diameter_m(a, b))?;
        let mut verdict = bt_target_verdict { rule: 99, valid: 99, minimum_m: SENTINEL, ratio: SENTINEL, across: SENTINEL };
        // SAFETY: `verdict` is valid for writes.
        let status = unsafe { bt_target_check(rule, a, b, c, &mut verdict) };
        match TargetRule::from_raw(rule).and_then(|r| check_target(r, a, b, c)) {
            Ok(check) => {
                prop_assert_eq!(status, bt_status::Ok);
                prop_assert_eq!(verdict.valid, u32::from(check.valid));
                prop_assert_eq!(verdict.minimum_m.to_bits(), check.minimum_m.to_bits());
            }
            Err(error) => {
                prop_assert_eq!(status, bt_status::from(error));
                prop_assert_eq!(verdict.minimum_m.to_bits(), SENTINEL.to_bits());
            }
        }
    }

    #[test]
    fn diffraction(a in any_f64(), b in any_f64(), c in any_f64()) {
        let mut out = SENTINEL;
        // SAFETY: `out` is a valid double.
        let status = unsafe { bt_airy_encircled_energy(a, b, c, &mut out) };
        agrees(status, out, airy_encircled_energy(a, b, c))?;
        let mut out = SENTINEL;
        // SAFETY: as above.
        let status = unsafe { bt_airy_radius_um(a, b, c, &mut out) };
        agrees(status, out, airy_radius_um(a, b, c))?;
        let mut m = bt_mtf { diffraction: SENTINEL, pixel: SENTINEL, system: SENTINEL };
        // SAFETY: `m` is valid for writes.
        let status = unsafe { bt_mtf_evaluate(a, b, c, 1.0, &mut m) };
        agrees(status, m.system, mtf(a, b, c, 1.0).map(|m| m.system))?;
    }

    #[test]
    fn materials(n in any_f64(), k in any_f64(), x in any_f64()) {
        let mut out = SENTINEL;
        // SAFETY: `out` is a valid double.
        let status = unsafe { bt_emissivity_normal(n, k, &mut out) };
        agrees(status, out, OpticalConstants::new(n, k).map(|m| m.normal()))?;
        let mut d = bt_directional_emissivity { s: SENTINEL, p: SENTINEL, unpolarised: SENTINEL };
        // SAFETY: `d` is valid for writes.
        let status = unsafe { bt_emissivity_directional(n, k, x, &mut d) };
        agrees(status, d.unpolarised, OpticalConstants::new(n, k).and_then(|m| m.directional(x)).map(|d| d.unpolarised))?;
        let mut out = SENTINEL;
        // SAFETY: `out` is a valid double.
        let status = unsafe { bt_hagen_rubens_normal(n, x, &mut out) };
        agrees(status, out, hagen_rubens_normal(n, x))?;
        let mut out = SENTINEL;
        // SAFETY: as above.
        let status = unsafe { bt_one_point_wavelength_sensitivity(n, k, x, &mut out) };
        agrees(status, out, one_point_wavelength_sensitivity(n, k, x))?;
        let mut out = SENTINEL;
        // SAFETY: as above.
        let status = unsafe { bt_two_point_sigma_sensitivity(0.65, n, 1200.0, k, x, &mut out) };
        let m = SpectralMoments { mean_um: 0.65, variance_um2: n };
        agrees(status, out, two_point_sigma_sensitivity(m, 1200.0, k, x))?;
    }

    #[test]
    fn band_based(t in any_f64(), r in any_f64(), e in any_f64()) {
        let lwir = rect(8.0, 14.0);
        let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
        let mut out = SENTINEL;
        // SAFETY: `lwir` is a valid rectangular band; `out` a valid double.
        let status = unsafe { bt_sse_temperature_error_k(&lwir, t, r, &mut out) };
        agrees(status, out, temperature_error_k(&band, t, r))?;
        let mut out = SENTINEL;
        // SAFETY: as above.
        let status = unsafe { bt_limit_effective_wavelength_um(&lwir, t, &mut out) };
        agrees(status, out, limit_effective_wavelength_um(&band, t))?;
        let mut out = SENTINEL;
        // SAFETY: as above.
        let status = unsafe { bt_reflector_bias_k(&lwir, t, e, 293.15, &mut out) };
        agrees(status, out, reflector_bias_k(&band, t, e, 293.15))?;
        let d = [10.0, 20.0, 60.0];
        let s = [0.002, 0.001, 0.0];
        let mut c = bt_sse_correction { relative_signal: SENTINEL, relative_signal_first_order: SENTINEL, corrected_k: SENTINEL, correction_k: SENTINEL };
        // SAFETY: the tables hold 3 doubles each; `c` is valid for writes.
        let status = unsafe { bt_sse_correct(&lwir, d.as_ptr(), s.as_ptr(), 3, t, r, 15.0, &mut c) };
        let rust = SseTable::new(&d, &s).and_then(|table| table.correction(&band, t, r, 15.0));
        agrees(status, c.corrected_k, rust.map(|c| c.corrected_k))?;
        let scene = bt_scene { emissivity: 0.9, reflected_k: 293.15, atm_transmittance: 1.0, atm_k: 293.15,
            window_transmittance: 1.0, window_reflectance: 0.0, window_k: 293.15, window_reflected_k: 293.15 };
        let mut budget = bt_site_budget { estimate: SENTINEL, ..bt_site_budget::default() };
        // SAFETY: band and scene are valid; `budget` is valid for writes.
        let status = unsafe { bt_contact_emissivity_budget(&lwir, &scene, r, t, 0.1, 0.5, e, &mut budget) };
        let rust_scene = Scene::new(0.9, 293.15).unwrap();
        let rust = contact_emissivity_budget(&rust_scene, &band, r, t, 0.1, 0.5, e);
        agrees(status, budget.estimate, rust.map(|b| b.estimate))?;
    }
}

proptest! {
    // The heavier computations: fewer cases.
    #![proptest_config(ProptestConfig::with_cases(48))]

    #[test]
    fn heavy(a in any_f64(), b in any_f64(), s in proptest::collection::vec(any_f64(), 4), terms in 0u32..5) {
        let mut out = SENTINEL;
        let d = a.abs().min(500.0);
        // SAFETY: `out` is a valid double.
        let status = unsafe { bt_small_target_fraction(d, b, 10.0, 1.0, &mut out) };
        agrees(status, out, small_target_fraction(d, b, 10.0, 1.0))?;
        let mut out = SENTINEL;
        // SAFETY: as above.
        let status = unsafe { bt_emissivity_hemispherical(a, b, &mut out) };
        agrees(status, out, OpticalConstants::new(a, b).map(|m| m.hemispherical()))?;
        let wl = [0.7, 0.8, 0.9, 1.0];
        let (mut gain, mut bias) = (SENTINEL, SENTINEL);
        // SAFETY: `wl` holds 4 doubles; the outs are valid doubles.
        let status = unsafe { bt_multiwavelength_noise_gain(wl.as_ptr(), 4, a, terms, &mut gain, &mut bias) };
        agrees(status, gain, EmissivityModel::new(terms).and_then(|m| noise_gain(&wl, a, m)).map(|g| g.0))?;
        let c_bands = wl.map(|c| rect(c - 0.005, c + 0.005));
        let bands = wl.map(|c| Band::rectangular(c - 0.005, c + 0.005, Detector::Energy).unwrap());
        let mut result = bt_multiwavelength_result { temperature_k: SENTINEL, coefficients: [0.0; 3], terms: 0,
            iterations: 0, noise_gain: SENTINEL, bias_per_next_term: SENTINEL, residual_rms: SENTINEL };
        // SAFETY: 4 bands and 4 signals; `result` is valid for writes.
        let status = unsafe { bt_multiwavelength_fit(c_bands.as_ptr(), s.as_ptr(), 4, terms, &mut result) };
        let rust = EmissivityModel::new(terms).and_then(|m| fit(&bands, &s, m));
        agrees(status, result.temperature_k, rust.map(|f| f.temperature_k))?;
    }
}

#[test]
fn null_and_misaligned_pointers_are_statuses() {
    let mut out = SENTINEL;
    // SAFETY: null out-pointers are checked before use.
    unsafe {
        assert_eq!(
            bt_emissivity_normal(1.5, 0.0, core::ptr::null_mut()),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_sse_temperature_error_k(core::ptr::null(), 300.0, 0.01, &mut out),
            bt_status::NullPointer
        );
        assert_eq!(
            bt_multiwavelength_noise_gain(
                core::ptr::null(),
                2,
                1500.0,
                1,
                &mut out,
                &mut out.clone()
            ),
            bt_status::NullPointer
        );
    }
    assert_eq!(out.to_bits(), SENTINEL.to_bits());
    let mut storage = [0u8; 64];
    let misaligned = storage.as_mut_ptr().wrapping_add(1).cast::<f64>();
    // SAFETY: a misaligned pointer is rejected before any write.
    unsafe {
        assert_eq!(
            bt_emissivity_normal(1.5, 0.0, misaligned),
            bt_status::InvalidBuffer
        );
    }
    assert!(storage.iter().all(|&b| b == 0));
}
