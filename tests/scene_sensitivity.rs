//! Analytic sensitivity coefficients against central finite differences of the inverted
//! measurement equation (the mpmath comparison is in `scene_reference.rs`).

use bandtemp::band::{Band, SignalCurve};
use bandtemp::calibration::SakumaHattori;
use bandtemp::planck::Detector;
use bandtemp::scene::{Scene, Sensitivities};
use proptest::prelude::*;

/// Central differences with relative step 1e-5 are good to about 1e-8 relative here; the
/// tolerance leaves room for the solver's 1e-12 T noise divided by the step.
const FD_REL: f64 = 1e-6;

#[derive(Clone, Copy, Debug)]
struct Inputs([f64; 8]);

impl Inputs {
    fn scene(self) -> Scene {
        let [e, tr, ta, tak, tw, rw, twk, twr] = self.0;
        Scene::new(e, tr)
            .and_then(|s| s.with_atmosphere(ta, tak))
            .and_then(|s| s.with_window(tw, rw, twk, twr))
            .unwrap()
    }
}

/// dT/dp by central differences at fixed signal. The step is 1e-5 of the input (at least
/// 1e-6 absolute), shortened where needed so that it moves T by no more than about 1e-4 T
/// (`analytic` only sizes the step): in scenes where the object is faint against a bright
/// background, T is strongly non-linear in the inputs.
fn finite_differences<C: SignalCurve>(
    curve: &C,
    inputs: Inputs,
    signal: f64,
    analytic: &[f64; 9],
    object_k: f64,
) -> [f64; 9] {
    let h = 1e-5;
    let object = |inputs: Inputs, s: f64| inputs.scene().object_temperature(curve, s).unwrap();
    let step = |nominal: f64, coefficient: f64| {
        if coefficient == 0.0 {
            nominal
        } else {
            nominal.min(1e-4 * object_k / coefficient.abs())
        }
    };
    let mut out = [0.0; 9];
    // The signal step is relative to the object's own share of the signal.
    let background = inputs.scene().grey_terms(curve).unwrap().background;
    let ds = step(h * (signal - background), analytic[0]);
    out[0] = (object(inputs, signal + ds) - object(inputs, signal - ds)) / (2.0 * ds);
    for i in 0..8 {
        let d = step(h * inputs.0[i].abs().max(0.1), analytic[i + 1]);
        let mut up = inputs;
        let mut down = inputs;
        up.0[i] += d;
        down.0[i] -= d;
        out[i + 1] = (object(up, signal) - object(down, signal)) / (2.0 * d);
    }
    out
}

fn as_array(s: &Sensitivities) -> [f64; 9] {
    [
        s.signal,
        s.emissivity,
        s.reflected_k,
        s.atm_transmittance,
        s.atm_k,
        s.window_transmittance,
        s.window_reflectance,
        s.window_k,
        s.window_reflected_k,
    ]
}

fn check<C: SignalCurve>(curve: &C, inputs: Inputs, object_k: f64) -> Result<(), TestCaseError> {
    let scene = inputs.scene();
    let signal = scene.sensor_signal(curve, object_k).unwrap();
    let analytic = scene.sensitivities(curve, signal).unwrap();
    prop_assert!((analytic.object_k - object_k).abs() <= 1e-9 * object_k);
    let numeric = finite_differences(curve, inputs, signal, &as_array(&analytic), object_k);
    // Scale for near-zero coefficients: the largest K-per-unit coefficient.
    let scale = as_array(&analytic)[1..]
        .iter()
        .fold(0.0f64, |m, v| m.max(v.abs()));
    for (i, (a, n)) in as_array(&analytic).iter().zip(numeric).enumerate() {
        let tolerance = FD_REL * a.abs() + if i == 0 { 0.0 } else { 1e-10 * scale };
        prop_assert!(
            (a - n).abs() <= tolerance,
            "coefficient {}: analytic {} vs numeric {}",
            i,
            a,
            n
        );
    }
    Ok(())
}

fn interior_inputs() -> impl Strategy<Value = Inputs> {
    // Strictly inside the domain so that central differences stay valid.
    (
        0.1..0.98f64,
        260.0..900.0f64,
        0.4..0.98f64,
        260.0..900.0f64,
        0.4..0.9f64,
        0.01..0.08f64,
        260.0..900.0f64,
        260.0..900.0f64,
    )
        .prop_map(|(e, tr, ta, tak, tw, rw, twk, twr)| Inputs([e, tr, ta, tak, tw, rw, twk, twr]))
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    #[test]
    fn band_sensitivities_match_finite_differences(
        inputs in interior_inputs(),
        object_k in 300.0..1200.0f64,
        photon in any::<bool>(),
    ) {
        let band = if photon {
            Band::rectangular(3.0, 5.0, Detector::Photon).unwrap()
        } else {
            Band::rectangular(8.0, 14.0, Detector::Energy).unwrap()
        };
        check(&band, inputs, object_k)?;
    }

    #[test]
    fn calibration_curve_sensitivities_match_finite_differences(
        inputs in interior_inputs(),
        object_k in 300.0..1200.0f64,
    ) {
        let curve = SakumaHattori::new(10.2, 45.0, 4.0e6).unwrap();
        check(&curve, inputs, object_k)?;
    }
}

/// Signs a practitioner expects: a higher emissivity, transmittance or background explains
/// more of the signal, so the object must be colder.
#[test]
fn signs_follow_the_physics() {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let inputs = Inputs([0.8, 293.0, 0.9, 300.0, 0.8, 0.05, 310.0, 295.0]);
    let scene = inputs.scene();
    let signal = scene.sensor_signal(&band, 400.0).unwrap();
    let s = scene.sensitivities(&band, signal).unwrap();
    assert!(s.signal > 0.0);
    assert!(s.emissivity < 0.0, "hot object above its surroundings");
    assert!(s.reflected_k < 0.0);
    assert!(s.atm_transmittance < 0.0);
    assert!(s.atm_k < 0.0);
    assert!(s.window_transmittance < 0.0);
    assert!(s.window_k < 0.0);
    assert!(s.window_reflected_k < 0.0);
    // An object colder than its surroundings: a higher emissivity shows more of its low
    // radiance and less of the warm reflection, so the same signal needs a warmer object.
    let signal = scene.sensor_signal(&band, 250.0).unwrap();
    let cold = scene.sensitivities(&band, signal).unwrap();
    assert!(cold.emissivity > 0.0);
}

/// At domain edges (no atmosphere, no window) the coefficients are the one-sided
/// derivatives from inside, and the zero-weight temperatures have zero coefficients.
#[test]
fn edges_give_one_sided_derivatives() {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let scene = Scene::new(0.9, 300.0).unwrap();
    let signal = scene.sensor_signal(&band, 350.0).unwrap();
    let s = scene.sensitivities(&band, signal).unwrap();
    assert_eq!(s.atm_k, 0.0);
    assert_eq!(s.window_k, 0.0);
    assert_eq!(s.window_reflected_k, 0.0);
    let h = 1e-6;
    let inside = |ta: f64| {
        scene
            .with_atmosphere(ta, 300.0)
            .unwrap()
            .object_temperature(&band, signal)
            .unwrap()
    };
    let one_sided = (inside(1.0) - inside(1.0 - h)) / h;
    assert!((one_sided - s.atm_transmittance).abs() <= 1e-4 * s.atm_transmittance.abs());
}
