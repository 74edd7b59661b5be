//! Batch conversion against exact per-pixel inversion.
//!
//! The exact reference for every pixel is `Scene::object_temperature` over the exact
//! curve: `band::Band` (band integrals and their Newton inversion, verified against mpmath
//! in the band module's own tests) or the closed-form Sakuma-Hattori inverse. The
//! reference works in f64 from the same counts (or the same f32 signal) and the same f32
//! emissivity, so a difference is the converter's own error: the table (at most the
//! declared tolerance, which already covers a uniform scene's f32 arithmetic) plus, for
//! emissivity maps and signal input, the f32 rounding of the per-pixel scene correction,
//! bounded below from the f64 reference's own terms.

use bandtemp::band::{Band, SignalCurve};
use bandtemp::calibration::SakumaHattori;
use bandtemp::frame::{
    CountsMap, FrameConverter, FrameSummary, PixelStatus, Rails, TableRow, TemperatureRange,
};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use bandtemp::Error;
use proptest::prelude::*;

const TOLERANCE_K: f64 = 1e-3;
/// 2^-22: four f32 half-ulps, the rounding budget of the per-pixel scene correction.
const F32_BUDGET: f64 = 2.384_185_791_015_625e-7;
/// Pixels whose exact object signal lies within this relative distance of a range end
/// (or of zero, relative to the background) may round either way in f32: their status is
/// not asserted, only their accuracy if converted.
const AMBIGUOUS: f64 = 1e-5;

#[derive(Clone, Debug)]
enum CurveCase {
    Band {
        lo_um: f64,
        hi_um: f64,
        photon: bool,
    },
    SakumaHattori {
        a_um: f64,
        b_umk: f64,
    },
}

#[derive(Clone, Debug)]
struct Case {
    curve: CurveCase,
    emissivity: f64,
    reflected_k: f64,
    atmosphere: Option<(f64, f64)>,
    window: Option<(f64, f64, f64, f64)>,
    lo_k: f64,
    hi_k: f64,
    full_scale: f64,
    offset_counts: f64,
}

fn curve_case() -> impl Strategy<Value = CurveCase> {
    prop_oneof![
        (7.0..9.0f64, 11.0..14.5f64, any::<bool>()).prop_map(|(lo_um, hi_um, photon)| {
            CurveCase::Band {
                lo_um,
                hi_um,
                photon,
            }
        }),
        (3.0..5.0f64, 0.0..80.0f64).prop_map(|(lo_um, width)| CurveCase::Band {
            lo_um,
            hi_um: lo_um + 0.5 + width / 40.0,
            photon: true,
        }),
        (3.5..12.0f64, -40.0..60.0f64)
            .prop_map(|(a_um, b_umk)| CurveCase::SakumaHattori { a_um, b_umk }),
    ]
}

fn case() -> impl Strategy<Value = Case> {
    (
        curve_case(),
        0.1..=1.0f64,
        200.0..450.0f64,
        proptest::option::of((0.5..=1.0f64, 240.0..330.0f64)),
        proptest::option::of((0.5..=1.0f64, 0.0..0.3f64, 260.0..340.0f64, 260.0..340.0f64)),
        250.0..420.0f64,
        700.0..1500.0f64,
        30_000.0..62_000.0f64,
        0.0..3000.0f64,
    )
        .prop_map(
            |(curve, e, tr, atmosphere, window, lo_k, hi_k, full_scale, offset_counts)| Case {
                curve,
                emissivity: e,
                reflected_k: tr,
                atmosphere,
                window: window.map(|(tw, rw, t, tr)| (tw, rw.min(1.0 - tw), t, tr)),
                lo_k,
                hi_k,
                full_scale,
                offset_counts,
            },
        )
}

/// The curve, scene, counts map and range of a case.
struct Setup {
    curve: Box<dyn SignalCurve>,
    scene: Scene,
    counts: CountsMap,
    range: TemperatureRange,
}

fn setup(case: &Case) -> Setup {
    let range = TemperatureRange::new(case.lo_k, case.hi_k).unwrap();
    let mut scene = Scene::new(case.emissivity, case.reflected_k).unwrap();
    if let Some((ta, t)) = case.atmosphere {
        scene = scene.with_atmosphere(ta, t).unwrap();
    }
    if let Some((tw, rw, t, tr)) = case.window {
        scene = scene.with_window(tw, rw, t, tr).unwrap();
    }
    let (curve, counts): (Box<dyn SignalCurve>, CountsMap) = match case.curve {
        CurveCase::Band {
            lo_um,
            hi_um,
            photon,
        } => {
            let detector = if photon {
                Detector::Photon
            } else {
                Detector::Energy
            };
            let band = Band::rectangular(lo_um, hi_um, detector).unwrap();
            // Invented radiometric calibration: the range's top at `full_scale` counts.
            let gain = band.radiance(case.hi_k).unwrap() / case.full_scale;
            let map = CountsMap::linear(gain, -case.offset_counts * gain).unwrap();
            (Box::new(band), map)
        }
        CurveCase::SakumaHattori { a_um, b_umk } => {
            let unit = SakumaHattori::new(a_um, b_umk, 1.0).unwrap();
            let c = case.full_scale / unit.signal(case.hi_k).unwrap();
            let sh = SakumaHattori::new(a_um, b_umk, c).unwrap();
            (
                Box::new(sh),
                CountsMap::dark_offset(case.offset_counts).unwrap(),
            )
        }
    };
    Setup {
        curve,
        scene,
        counts,
        range,
    }
}

/// What the exact reference says about one pixel: its status (None where f32 rounding may
/// decide either way) and, if it has one, its temperature and the f32 allowance in K.
struct Expected {
    status: Option<PixelStatus>,
    temperature_k: Option<f64>,
    allowance_k: f64,
}

/// Exact expectation for a pixel with sensor signal `signal` (f64, curve units) and
/// emissivity `e` (None: the scene's). `input_terms` is the part of the per-pixel
/// rounding budget (in signal units) that depends on the input path.
fn expect(setup: &Setup, signal: f64, e: Option<f32>, from_counts: bool) -> Expected {
    let curve = setup.curve.as_ref();
    let scene = match e {
        None => setup.scene,
        Some(e) => match setup.scene.with_emissivity(f64::from(e)) {
            Ok(scene) => scene,
            Err(_) => {
                return Expected {
                    status: Some(PixelStatus::EmissivityInvalid),
                    temperature_k: None,
                    allowance_k: 0.0,
                }
            }
        },
    };
    let terms = scene.grey_terms(curve).unwrap();
    let object = (signal - terms.background) / terms.gain;
    let lo = curve.signal(setup.range.lo_k).unwrap();
    let hi = curve.signal(setup.range.hi_k).unwrap();
    let near = |a: f64, b: f64| (a - b).abs() <= AMBIGUOUS * b.abs();
    let scale = terms.background.abs() / terms.gain + lo;
    let status = if object.abs() <= AMBIGUOUS * scale || near(object, lo) || near(object, hi) {
        None
    } else if object <= 0.0 {
        Some(PixelStatus::BelowBackground)
    } else if object < lo {
        Some(PixelStatus::BelowRange)
    } else if object > hi {
        Some(PixelStatus::AboveRange)
    } else {
        Some(PixelStatus::Converted)
    };
    let temperature_k = scene.object_temperature(curve, signal).ok();
    let allowance_k = temperature_k.map_or(0.0, |t| {
        let (_, slope) = curve.signal_and_derivative(t).unwrap();
        let budget = match (e, from_counts) {
            // Covered by the table's declared tolerance.
            (None, true) => 0.0,
            (None, false) => F32_BUDGET * (terms.background / terms.gain + object),
            (Some(_), _) => {
                let reflected = curve.signal(scene.reflected_k()).unwrap();
                let path = if from_counts {
                    0.0
                } else {
                    let k = terms.background + terms.gain * reflected;
                    k / terms.gain
                };
                F32_BUDGET * (path + (object - reflected).abs() + reflected + object)
            }
        };
        budget / slope
    });
    Expected {
        status,
        temperature_k,
        allowance_k,
    }
}

/// Checks one converted frame pixel by pixel against the exact reference and the scalar
/// path, and the summary against the statuses.
/// One pixel for [`check_frame`]: sensor signal (f64, curve units), emissivity, and the
/// scalar path's (kelvin, status).
type Pixel = (f64, Option<f32>, (f32, PixelStatus));

fn check_frame(
    setup: &Setup,
    inputs: &[Pixel],
    kelvin: &[f32],
    summary: FrameSummary,
    from_counts: bool,
) -> Result<(), TestCaseError> {
    let mut tally = FrameSummary::default();
    for (i, ((signal, e, scalar), &got)) in inputs.iter().zip(kelvin).enumerate() {
        let (scalar_k, status) = *scalar;
        // The batch path and the scalar reference path agree bit for bit.
        prop_assert!(
            scalar_k.to_bits() == got.to_bits() || (scalar_k.is_nan() && got.is_nan()),
            "pixel {i}: batch {got} scalar {scalar_k}"
        );
        prop_assert_eq!(got.is_nan(), status != PixelStatus::Converted);
        bump(&mut tally, status);
        if matches!(status, PixelStatus::Dead | PixelStatus::Saturated) {
            continue;
        }
        let expected = expect(setup, *signal, *e, from_counts);
        if let Some(want) = expected.status {
            prop_assert_eq!(status, want, "pixel {} signal {} e {:?}", i, signal, e);
        }
        if status == PixelStatus::Converted {
            let exact = expected.temperature_k.unwrap();
            let error = (f64::from(got) - exact).abs();
            prop_assert!(
                error <= TOLERANCE_K + expected.allowance_k,
                "pixel {i}: {got} K vs exact {exact} K (error {error:.3e}, allowance {:.3e})",
                expected.allowance_k
            );
        }
    }
    tally.pixels = kelvin.len() as u64;
    prop_assert_eq!(summary, tally);
    Ok(())
}

fn bump(summary: &mut FrameSummary, status: PixelStatus) {
    let field = match status {
        PixelStatus::Converted => &mut summary.converted,
        PixelStatus::Dead => &mut summary.dead,
        PixelStatus::Saturated => &mut summary.saturated,
        PixelStatus::EmissivityInvalid => &mut summary.emissivity_invalid,
        PixelStatus::NonFinite => &mut summary.non_finite,
        PixelStatus::BelowBackground => &mut summary.below_background,
        PixelStatus::BelowRange => &mut summary.below_range,
        PixelStatus::AboveRange => &mut summary.above_range,
    };
    *field += 1;
}

/// Counts for a pixel of a blackbody-like object at `object_k` under the case's scene
/// (the exact forward model), rounded and clamped to u16.
fn counts_for(setup: &Setup, object_k: f64, e: f64) -> u16 {
    let scene = setup.scene.with_emissivity(e).unwrap();
    let signal = scene.sensor_signal(setup.curve.as_ref(), object_k).unwrap();
    let n = (signal - setup.counts.offset()) / setup.counts.gain();
    n.round().clamp(0.0, 65535.0) as u16
}

fn pixel_counts() -> impl Strategy<Value = Vec<(u8, f64, u16)>> {
    // (kind, temperature fraction, raw counts): kind < 180 -> an object inside or near the
    // range, otherwise raw counts anywhere (rails included).
    proptest::collection::vec((any::<u8>(), -0.1..1.1f64, any::<u16>()), 1..300)
}

fn build_counts(setup: &Setup, case: &Case, pixels: &[(u8, f64, u16)]) -> Vec<u16> {
    pixels
        .iter()
        .map(|&(kind, fraction, raw)| match kind {
            0..=179 => {
                let t = case.lo_k + fraction * (case.hi_k - case.lo_k);
                counts_for(setup, t.max(1.0), case.emissivity)
            }
            180..=189 => 0,
            190..=199 => u16::MAX,
            _ => raw,
        })
        .collect()
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 24, ..ProptestConfig::default() })]

    #[test]
    fn uniform_scene_counts_match_exact_inversion(case in case(), pixels in pixel_counts()) {
        let setup = setup(&case);
        let mut storage = vec![[0.0f32; 4]; 8192];
        let converter = FrameConverter::new(
            setup.curve.as_ref(), &setup.scene, setup.counts, Rails::default(),
            setup.range, TOLERANCE_K, &mut storage,
        ).unwrap();
        let counts = build_counts(&setup, &case, &pixels);
        let mut kelvin = vec![0.0f32; counts.len()];
        let summary = converter.convert_counts(&counts, None, &mut kelvin).unwrap();
        let inputs: Vec<_> = counts
            .iter()
            .map(|&n| {
                let signal = setup.counts.gain() * f64::from(n) + setup.counts.offset();
                (signal, None, converter.pixel_from_counts(n, None))
            })
            .collect();
        check_frame(&setup, &inputs, &kelvin, summary, true)?;
        for (&n, (_, _, scalar)) in counts.iter().zip(&inputs) {
            let status = scalar.1;
            prop_assert_eq!(n == 0, status == PixelStatus::Dead);
            prop_assert_eq!(n == u16::MAX, status == PixelStatus::Saturated);
        }
    }

    #[test]
    fn emissivity_map_counts_match_exact_inversion(
        case in case(),
        pixels in pixel_counts(),
        emissivity in proptest::collection::vec((0.05..=1.0f32, any::<u8>()), 300),
    ) {
        let setup = setup(&case);
        let mut storage = vec![[0.0f32; 4]; 8192];
        let converter = FrameConverter::new(
            setup.curve.as_ref(), &setup.scene, setup.counts, Rails::default(),
            setup.range, TOLERANCE_K, &mut storage,
        ).unwrap();
        let e: Vec<f32> = emissivity[..pixels.len()]
            .iter()
            .map(|&(e, kind)| match kind {
                0..=4 => 0.0,
                5..=9 => f32::NAN,
                10..=14 => 1.25,
                15..=19 => -0.5,
                _ => e,
            })
            .collect();
        // Counts of objects seen with their own emissivity.
        let counts: Vec<u16> = pixels
            .iter()
            .zip(&e)
            .map(|(&(kind, fraction, raw), &ei)| match kind {
                0..=179 if ei > 0.0 && ei <= 1.0 => {
                    let t = case.lo_k + fraction * (case.hi_k - case.lo_k);
                    counts_for(&setup, t.max(1.0), f64::from(ei))
                }
                180..=189 => 0,
                190..=199 => u16::MAX,
                _ => raw,
            })
            .collect();
        let mut kelvin = vec![0.0f32; counts.len()];
        let summary = converter.convert_counts(&counts, Some(&e), &mut kelvin).unwrap();
        let inputs: Vec<_> = counts
            .iter()
            .zip(&e)
            .map(|(&n, &ei)| {
                let signal = setup.counts.gain() * f64::from(n) + setup.counts.offset();
                (signal, Some(ei), converter.pixel_from_counts(n, Some(ei)))
            })
            .collect();
        check_frame(&setup, &inputs, &kelvin, summary, true)?;
    }

    #[test]
    fn signal_frames_match_exact_inversion(
        case in case(),
        pixels in proptest::collection::vec((any::<u8>(), -0.1..1.1f64, 0.05..=1.0f32), 1..300),
        with_map in any::<bool>(),
    ) {
        let setup = setup(&case);
        let mut storage = vec![[0.0f32; 4]; 8192];
        let converter = FrameConverter::new(
            setup.curve.as_ref(), &setup.scene, setup.counts, Rails::default(),
            setup.range, TOLERANCE_K, &mut storage,
        ).unwrap();
        let curve = setup.curve.as_ref();
        let signal: Vec<f32> = pixels
            .iter()
            .map(|&(kind, fraction, e)| {
                let t = case.lo_k + fraction * (case.hi_k - case.lo_k);
                let e = if with_map { f64::from(e) } else { case.emissivity };
                let s = setup.scene.with_emissivity(e).unwrap().sensor_signal(curve, t).unwrap();
                match kind {
                    0..=4 => f32::NAN,
                    5..=9 => f32::INFINITY,
                    10..=14 => -1.0,
                    _ => s as f32,
                }
            })
            .collect();
        let e: Vec<f32> = pixels.iter().map(|p| p.2).collect();
        let map = with_map.then_some(e.as_slice());
        let mut kelvin = vec![0.0f32; signal.len()];
        let summary = converter.convert_signal(&signal, map, &mut kelvin).unwrap();
        let mut non_finite = 0;
        let inputs: Vec<_> = signal
            .iter()
            .zip(&e)
            .map(|(&s, &ei)| {
                let ei = with_map.then_some(ei);
                let scalar = converter.pixel_from_signal(s, ei);
                if !s.is_finite() {
                    non_finite += 1;
                    assert_eq!(scalar.1, PixelStatus::NonFinite);
                }
                (f64::from(s), ei, scalar)
            })
            .collect();
        prop_assert_eq!(summary.non_finite, non_finite);
        // Non-finite inputs have no exact reference: check the finite ones.
        let (finite, finite_k): (Vec<_>, Vec<f32>) = inputs
            .into_iter()
            .zip(kelvin.iter().copied())
            .filter(|((s, _, _), _)| s.is_finite())
            .unzip();
        let mut finite_summary = summary;
        finite_summary.non_finite = 0;
        finite_summary.pixels -= non_finite;
        check_frame(&setup, &finite, &finite_k, finite_summary, false)?;
    }

    /// A frame with random dead and saturated pixels converts every other pixel exactly as
    /// the clean frame does.
    #[test]
    fn dead_and_saturated_pixels_do_not_stop_the_frame(
        broken in proptest::collection::vec((0usize..48 * 40, any::<bool>()), 0..200),
        with_map in any::<bool>(),
    ) {
        let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
        let scene = Scene::new(0.9, 300.0).unwrap();
        let gain = band.radiance(1200.0).unwrap() / 50_000.0;
        let counts_map = CountsMap::linear(gain, -500.0 * gain).unwrap();
        let range = TemperatureRange::new(260.0, 1200.0).unwrap();
        let mut storage = vec![[0.0f32; 4]; 512];
        let converter = FrameConverter::new(
            &band, &scene, counts_map, Rails::default(), range, TOLERANCE_K, &mut storage,
        ).unwrap();
        // Invented scene: a warm plate with a hot spot, 48 x 40 pixels.
        let (width, height) = (48usize, 40usize);
        let mut clean = Vec::with_capacity(width * height);
        let mut e = Vec::with_capacity(width * height);
        for y in 0..height {
            for x in 0..width {
                let dx = x as f64 - 30.0;
                let dy = y as f64 - 12.0;
                let t = 320.0 + 600.0 * (-(dx * dx + dy * dy) / 60.0).exp();
                let ei = 0.7 + 0.2 * (x as f64 / width as f64);
                let s = scene.with_emissivity(if with_map { ei } else { 0.9 }).unwrap();
                let signal = s.sensor_signal(&band, t).unwrap();
                clean.push(((signal / gain) + 500.0).round() as u16);
                e.push(ei as f32);
            }
        }
        let map = with_map.then_some(e.as_slice());
        let mut clean_k = vec![0.0f32; clean.len()];
        let clean_summary = converter.convert_counts(&clean, map, &mut clean_k).unwrap();
        prop_assert_eq!(clean_summary.converted, clean.len() as u64);
        let mut frame = clean.clone();
        let mut is_dead = vec![None; frame.len()];
        for &(i, dead) in &broken {
            frame[i] = if dead { 0 } else { u16::MAX };
            is_dead[i] = Some(dead);
        }
        let mut kelvin = vec![0.0f32; frame.len()];
        let summary = converter.convert_counts(&frame, map, &mut kelvin).unwrap();
        let dead = is_dead.iter().filter(|d| **d == Some(true)).count() as u64;
        let saturated = is_dead.iter().filter(|d| **d == Some(false)).count() as u64;
        prop_assert_eq!(summary.dead, dead);
        prop_assert_eq!(summary.saturated, saturated);
        prop_assert_eq!(summary.converted, frame.len() as u64 - dead - saturated);
        for i in 0..frame.len() {
            if is_dead[i].is_some() {
                prop_assert!(kelvin[i].is_nan());
            } else {
                prop_assert_eq!(kelvin[i].to_bits(), clean_k[i].to_bits());
            }
        }
    }
}

fn lwir_converter<'t>(storage: &'t mut [TableRow], scene: &Scene) -> FrameConverter<'t> {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let gain = band.radiance(1500.0).unwrap() / 60_000.0;
    FrameConverter::new(
        &band,
        scene,
        CountsMap::linear(gain, -200.0 * gain).unwrap(),
        Rails::default(),
        TemperatureRange::new(250.0, 1500.0).unwrap(),
        TOLERANCE_K,
        storage,
    )
    .unwrap()
}

#[test]
fn length_mismatches_are_errors() {
    let mut storage = vec![[0.0f32; 4]; 512];
    let converter = lwir_converter(&mut storage, &Scene::new(0.95, 300.0).unwrap());
    let counts = [1000u16; 10];
    let mut short = [0.0f32; 9];
    let mut out = [0.0f32; 10];
    assert_eq!(
        converter.convert_counts(&counts, None, &mut short),
        Err(Error::FrameLengthMismatch)
    );
    assert_eq!(
        converter.convert_counts(&counts, Some(&[0.9; 11]), &mut out),
        Err(Error::FrameLengthMismatch)
    );
    assert_eq!(
        converter.convert_signal(&[1.0; 9], None, &mut out),
        Err(Error::FrameLengthMismatch)
    );
    // Empty frames are fine.
    let summary = converter.convert_counts(&[], None, &mut []).unwrap();
    assert_eq!(summary, FrameSummary::default());
}

#[test]
fn set_scene_equals_a_fresh_build_and_checks_the_curve() {
    let first = Scene::new(0.95, 300.0).unwrap();
    let second = Scene::new(0.6, 350.0)
        .unwrap()
        .with_atmosphere(0.9, 290.0)
        .unwrap();
    let mut storage_a = vec![[0.0f32; 4]; 512];
    let mut storage_b = vec![[0.0f32; 4]; 512];
    let mut updated = lwir_converter(&mut storage_a, &first);
    let fresh = lwir_converter(&mut storage_b, &second);
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    updated.set_scene(&band, &second).unwrap();
    let counts: Vec<u16> = (0..4000u16).map(|i| i * 16).collect();
    let mut a = vec![0.0f32; counts.len()];
    let mut b = vec![0.0f32; counts.len()];
    let sa = updated.convert_counts(&counts, None, &mut a).unwrap();
    let sb = fresh.convert_counts(&counts, None, &mut b).unwrap();
    assert_eq!(sa, sb);
    assert!(a.iter().zip(&b).all(|(x, y)| x.to_bits() == y.to_bits()));
    let other = Band::rectangular(8.0, 13.0, Detector::Energy).unwrap();
    assert_eq!(
        updated.set_scene(&other, &second),
        Err(Error::FrameCurveMismatch)
    );
    // Plain-data round trip (what the C ABI keeps between calls).
    let again = FrameConverter::from_parts(fresh.state(), fresh.table().rows()).unwrap();
    let mut c = vec![0.0f32; counts.len()];
    assert_eq!(again.convert_counts(&counts, None, &mut c).unwrap(), sb);
    assert!(c.iter().zip(&b).all(|(x, y)| x.to_bits() == y.to_bits()));
}

#[test]
fn fourteen_bit_rails() {
    let mut storage = vec![[0.0f32; 4]; 512];
    let mut converter = lwir_converter(&mut storage, &Scene::new(1.0, 300.0).unwrap());
    converter.set_rails(Rails::new(0, 16_383).unwrap());
    let counts = [0u16, 2_000, 16_382, 16_383, 20_000, 65_535];
    let mut out = [0.0f32; 6];
    let summary = converter.convert_counts(&counts, None, &mut out).unwrap();
    assert_eq!(
        (summary.dead, summary.saturated, summary.converted),
        (1, 3, 2)
    );
    assert!(out[0].is_nan() && out[3].is_nan() && out[4].is_nan() && out[5].is_nan());
    assert!(out[2] > out[1]);
    assert_eq!(Rails::new(5, 5), Err(Error::FrameRailsInvalid));
}

#[test]
fn emissivity_map_needs_a_signal_at_the_reflected_temperature() {
    // Invented Sakuma-Hattori curve undefined below 300 K (A T + B <= 0): a perfect
    // emitter ignores its 250 K surroundings, so the uniform scene works, a map does not.
    let sh = SakumaHattori::new(10.0, -3000.0, 1e7).unwrap();
    let scene = Scene::new(1.0, 250.0).unwrap();
    let mut storage = vec![[0.0f32; 4]; 1024];
    let converter = FrameConverter::new(
        &sh,
        &scene,
        CountsMap::dark_offset(100.0).unwrap(),
        Rails::default(),
        TemperatureRange::new(400.0, 1200.0).unwrap(),
        TOLERANCE_K,
        &mut storage,
    )
    .unwrap();
    let counts = [5000u16; 4];
    let mut out = [0.0f32; 4];
    assert!(converter.convert_counts(&counts, None, &mut out).is_ok());
    assert_eq!(
        converter.convert_counts(&counts, Some(&[0.9; 4]), &mut out),
        Err(Error::FrameEmissivityMapUnavailable)
    );
}
