//! Uncertainty of a surface temperature through the measurement equation.
//!
//! Outside references:
//! - sensitivity coefficients against central finite differences of the model, evaluated
//!   here through the public API (`Scene::object_temperature`, the curve's inverse);
//! - the law of propagation against Monte Carlo (JCGM 101:2008) in near-linear cases:
//!   standard deviations within 4 standard errors, the mean within 4 standard errors of
//!   the second-order estimate y + sum_i f_ii u_i^2 / 2 (JCGM 100:2008 5.1.2 note; f_ii by
//!   central second differences), and the clause-8 validation passing;
//! - a non-linear case (low emissivity against a hot background) where clause 8 fails and
//!   the Monte Carlo distribution is visibly skewed;
//! - the Wien-approximation propagation formulas of radiation thermometry,
//!   dT = (lambda T^2 / c2) dS/S and dT = -(lambda T^2 / c2) de/e (a standard result, used
//!   throughout the CCT-WG5 uncertainty-budget guidance; quoted from memory), for a narrow
//!   short-wave band where Wien's law holds to 1e-8.

use approx::assert_relative_eq;
use bandtemp::band::{Band, SignalCurve};
use bandtemp::calibration::SakumaHattori;
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use bandtemp::uncertainty::{
    numerical_tolerance, surface_budget, surface_inputs, surface_monte_carlo, validate_lpu,
    InputUncertainties, Xoshiro256StarStar, SURFACE_INPUTS, SURFACE_INPUT_NAMES,
};
use bandtemp::Error;

/// Normal 97.5 % quantile (scipy.stats.norm.ppf(0.975)).
const K95: f64 = 1.959_963_984_540_054;

/// The model, re-assembled from the public API. x in the order of SURFACE_INPUT_NAMES:
/// [S, calibration shift K, signal offset, e, Tr, ta, Ta, tw, rw, Tw, Twr].
fn model<C: SignalCurve>(curve: &C, x: &[f64; SURFACE_INPUTS]) -> f64 {
    let scene = Scene::new(x[3], x[4])
        .unwrap()
        .with_atmosphere(x[5], x[6])
        .unwrap()
        .with_window(x[7], x[8], x[9], x[10])
        .unwrap();
    let mut s = x[0] + x[2];
    if x[1] != 0.0 {
        s = curve.signal(curve.temperature(s).unwrap() + x[1]).unwrap();
    }
    scene.object_temperature(curve, s).unwrap()
}

fn point(scene: &Scene, s: f64) -> [f64; SURFACE_INPUTS] {
    [
        s,
        0.0,
        0.0,
        scene.emissivity(),
        scene.reflected_k(),
        scene.atm_transmittance(),
        scene.atm_k(),
        scene.window_transmittance(),
        scene.window_reflectance(),
        scene.window_k(),
        scene.window_reflected_k(),
    ]
}

/// Finite-difference steps: 1e-6 S for the signal terms, 0.01 K for temperatures, 1e-5
/// for the fractions (truncation ~ h^2 f''' / 6, rounding ~ 1e-13 T / h).
fn steps(s: f64) -> [f64; SURFACE_INPUTS] {
    [
        1e-6 * s,
        0.01,
        1e-6 * s,
        1e-5,
        0.01,
        1e-5,
        0.01,
        1e-5,
        1e-5,
        0.01,
        0.01,
    ]
}

fn nudged(x: &[f64; SURFACE_INPUTS], i: usize, h: f64) -> [f64; SURFACE_INPUTS] {
    let mut y = *x;
    y[i] += h;
    y
}

fn industrial_scene() -> Scene {
    // Invented case: a motor housing seen through a protective window.
    Scene::new(0.95, 295.0)
        .unwrap()
        .with_atmosphere(0.98, 293.0)
        .unwrap()
        .with_window(0.9, 0.05, 300.0, 297.0)
        .unwrap()
}

fn near_linear_uncertainties<C: SignalCurve>(curve: &C, object_k: f64) -> InputUncertainties {
    // Noise equivalent to 0.05 K at the object.
    let ds_dt = curve.signal_and_derivative(object_k).unwrap().1 * 0.9 * 0.98 * 0.95;
    InputUncertainties {
        signal: 0.05 * ds_dt,
        calibration_k: 0.5,
        calibration_signal: 0.0,
        emissivity: 0.01,
        reflected_k: 2.0,
        atm_transmittance: 0.005,
        atm_k: 2.0,
        window_transmittance: 0.005,
        window_reflectance: 0.005,
        window_k: 2.0,
        window_reflected_k: 2.0,
    }
}

fn check_sensitivities<C: SignalCurve>(curve: &C, scene: &Scene, object_k: f64) {
    let s = scene.sensor_signal(curve, object_k).unwrap();
    let ones = InputUncertainties {
        calibration_k: 1.0,
        ..Default::default()
    };
    let (t, inputs) = surface_inputs(scene, curve, s, &ones).unwrap();
    assert_relative_eq!(t, object_k, max_relative = 1e-12);
    let x = point(scene, s);
    for (i, h) in steps(s).iter().enumerate() {
        let fd = (model(curve, &nudged(&x, i, *h)) - model(curve, &nudged(&x, i, -*h))) / (2.0 * h);
        let c = inputs[i].sensitivity;
        assert_eq!(inputs[i].name, SURFACE_INPUT_NAMES[i]);
        assert!(
            (c - fd).abs() <= 1e-6 * c.abs().max(1e-3 * fd.abs()) + 1e-9,
            "{}: analytic {c}, finite difference {fd}",
            inputs[i].name
        );
    }
}

#[test]
fn sensitivities_match_central_differences() {
    let sh = SakumaHattori::new(10.2, 40.0, 2.0e6).unwrap();
    let lw = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let mw = Band::rectangular(3.0, 5.0, Detector::Photon).unwrap();
    let scene = industrial_scene();
    check_sensitivities(&sh, &scene, 350.0);
    check_sensitivities(&lw, &scene, 350.0);
    check_sensitivities(&mw, &scene, 520.0);
    // A hot background and a low emissivity: the emissivity coefficient changes sign.
    let furnace = Scene::new(0.3, 500.0)
        .unwrap()
        .with_atmosphere(0.95, 310.0)
        .unwrap()
        .with_window(0.85, 0.1, 330.0, 300.0)
        .unwrap();
    check_sensitivities(&lw, &furnace, 450.0);
}

/// Second-order mean shift sum_i f_ii u_i^2 / 2 by central second differences, h = u_i.
fn second_order_shift<C: SignalCurve>(
    curve: &C,
    scene: &Scene,
    s: f64,
    u: &InputUncertainties,
) -> f64 {
    let us = u.as_array();
    let x = point(scene, s);
    let f0 = model(curve, &x);
    us.iter()
        .enumerate()
        .filter(|(_, &ui)| ui > 0.0)
        .map(|(i, &ui)| {
            let f2 = (model(curve, &nudged(&x, i, ui)) - 2.0 * f0
                + model(curve, &nudged(&x, i, -ui)))
                / (ui * ui);
            0.5 * f2 * ui * ui
        })
        .sum()
}

fn near_linear_agreement<C: SignalCurve>(
    curve: &C,
    trials: usize,
    seed: u64,
    validate: bool,
) -> (f64, f64, f64) {
    let scene = industrial_scene();
    let object_k = 350.0;
    let s = scene.sensor_signal(curve, object_k).unwrap();
    let u = near_linear_uncertainties(curve, object_k);
    let budget = surface_budget(&scene, curve, s, &u).unwrap();
    let uc = budget.combined_standard_uncertainty;
    let mut rng = Xoshiro256StarStar::seed_from_u64(seed);
    let mut samples = vec![0.0; trials];
    let mc = surface_monte_carlo(&scene, curve, s, &u, &mut rng, &mut samples, 0.95).unwrap();
    let m = trials as f64;
    // Standard deviation: standard error uc / sqrt(2(M-1)) for a near-normal output.
    assert!(
        (mc.standard_deviation - uc).abs() < 4.0 * uc / (2.0 * m).sqrt(),
        "sd {} vs u_c {uc}",
        mc.standard_deviation
    );
    // Mean: the law of propagation's estimate plus its own second-order term.
    let shift = second_order_shift(curve, &scene, s, &u);
    let expected = budget.estimate + shift;
    assert!(
        (mc.mean - expected).abs() < 4.0 * uc / m.sqrt(),
        "mean {} vs {expected} (shift {shift})",
        mc.mean
    );
    // JCGM 101:2008 clause 8 with one significant digit of u_c (delta = 0.05 K). Clause 8
    // presumes Monte Carlo results stable to delta: the 2.5 % point has a standard error
    // sqrt(p(1-p)/M)/pdf = 0.005 K at M = 2e5 but 0.016 K at 2e4, so only the long run
    // is validated.
    if validate {
        let delta = numerical_tolerance(uc, 1).unwrap();
        let v = validate_lpu(
            budget.estimate,
            budget.expanded_uncertainty(K95).unwrap(),
            &mc.interval,
            delta,
        )
        .unwrap();
        assert!(v.passed, "{v:?}");
    }
    (uc, mc.standard_deviation, shift)
}

#[test]
fn law_of_propagation_agrees_with_monte_carlo_when_near_linear() {
    // A calibrated long-wave camera (Sakuma-Hattori curve, invented parameters): 2e5
    // trials. Measured: u_c = 0.8308 K, MC 0.8312 K; second-order shift 0.006 K.
    let sh = SakumaHattori::new(10.2, 40.0, 2.0e6).unwrap();
    let (uc, sd, shift) = near_linear_agreement(&sh, 200_000, 20_081, true);
    assert!(uc > 0.8 && uc < 0.86 && sd > 0.8 && shift.abs() < 0.02);
}

#[test]
fn law_of_propagation_agrees_with_monte_carlo_on_exact_band_radiance() {
    let lw = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    near_linear_agreement(&lw, 20_000, 7, false);
}

#[test]
fn monte_carlo_shows_the_non_linearity_of_low_emissivity_against_a_hot_background() {
    // An invented oven case: a part at 450 K, e = 0.30 +- 0.05, oven walls at 500 +- 5 K.
    let lw = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let scene = Scene::new(0.3, 500.0).unwrap();
    let object_k = 450.0;
    let s = scene.sensor_signal(&lw, object_k).unwrap();
    let ds_dt = lw.signal_and_derivative(object_k).unwrap().1 * 0.3;
    let u = InputUncertainties {
        signal: 0.1 * ds_dt,
        emissivity: 0.05,
        reflected_k: 5.0,
        ..Default::default()
    };
    let budget = surface_budget(&scene, &lw, s, &u).unwrap();
    let uc = budget.combined_standard_uncertainty;
    let mut rng = Xoshiro256StarStar::seed_from_u64(11);
    let mut samples = vec![0.0; 20_000];
    let mc = surface_monte_carlo(&scene, &lw, s, &u, &mut rng, &mut samples, 0.95).unwrap();
    // Measured: u_c = 16.2 K against an MC standard deviation of 17.9 K; MC mean 2.2 K
    // low; 95 % interval [-44.6, +25.9] K about the estimate against +-31.7 K.
    let m = 20_000.0_f64;
    assert!(
        mc.standard_deviation > uc * 1.05,
        "{} vs {uc}",
        mc.standard_deviation
    );
    assert!(mc.mean < object_k - 4.0 * mc.standard_deviation / m.sqrt() - 1.0);
    let below = object_k - mc.interval.low;
    let above = mc.interval.high - object_k;
    assert!(below - above > 10.0, "{below} vs {above}");
    let delta = numerical_tolerance(uc, 1).unwrap();
    let v = validate_lpu(
        object_k,
        budget.expanded_uncertainty(K95).unwrap(),
        &mc.interval,
        delta,
    )
    .unwrap();
    assert!(!v.passed && v.d_low > 2.0 * delta, "{v:?}");
}

#[test]
fn wien_propagation_formulas_for_a_short_wave_band() {
    // 0.649-0.651 um at 1200 K: x = 18.4, e^-x = 1e-8. (The band's effective wavelength
    // sits about (D^2/12) d ln f/d lambda = 1e-5 relative off its centre for D = 2 nm;
    // 2.5e-4 for a 10 nm band.)
    let band = Band::rectangular(0.649, 0.651, Detector::Energy).unwrap();
    let t = 1200.0;
    let e = 0.4;
    let scene = Scene::new(e, 300.0).unwrap();
    let s = scene.sensor_signal(&band, t).unwrap();
    let u = InputUncertainties {
        signal: 0.01 * s,
        emissivity: 0.02,
        ..Default::default()
    };
    let budget = surface_budget(&scene, &band, s, &u).unwrap();
    let wien = 0.65 * t * t / 14_387.768_775_039_34;
    let by_name = |n: &str| {
        budget
            .entries()
            .iter()
            .find(|c| c.name == n)
            .unwrap()
            .contribution
    };
    // 1 % signal -> lambda T^2 / c2 * 0.01 = 0.651 K; 5 % emissivity -> 3.26 K.
    assert_relative_eq!(by_name("signal noise"), wien * 0.01, max_relative = 1e-4);
    assert_relative_eq!(by_name("emissivity"), wien * 0.02 / e, max_relative = 1e-4);
}

#[test]
fn errors_and_reproducibility() {
    let lw = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let scene = industrial_scene();
    let s = scene.sensor_signal(&lw, 350.0).unwrap();
    let u = near_linear_uncertainties(&lw, 350.0);
    let bad = InputUncertainties {
        emissivity: -0.01,
        ..u
    };
    assert_eq!(
        surface_budget(&scene, &lw, s, &bad).map(|_| ()),
        Err(Error::UncertaintyNegative)
    );
    let nan = InputUncertainties {
        atm_k: f64::NAN,
        ..u
    };
    assert_eq!(
        surface_budget(&scene, &lw, s, &nan).map(|_| ()),
        Err(Error::NonFinite)
    );
    // A signal below the background.
    let background = scene.grey_terms(&lw).unwrap().background;
    assert_eq!(
        surface_budget(&scene, &lw, background * 0.5, &u).map(|_| ()),
        Err(Error::SignalBelowBackground)
    );
    // An emissivity distribution reaching past 1 stops the Monte Carlo with its reason.
    let blackish = Scene::new(0.99, 295.0).unwrap();
    let s2 = blackish.sensor_signal(&lw, 350.0).unwrap();
    let wide = InputUncertainties {
        emissivity: 0.02,
        ..Default::default()
    };
    let mut rng = Xoshiro256StarStar::seed_from_u64(1);
    let mut samples = vec![0.0; 1000];
    assert_eq!(
        surface_monte_carlo(&blackish, &lw, s2, &wide, &mut rng, &mut samples, 0.95).map(|_| ()),
        Err(Error::EmissivityOutOfRange)
    );
    assert_eq!(
        surface_monte_carlo(&scene, &lw, s, &u, &mut rng, &mut samples[..1], 0.95).map(|_| ()),
        Err(Error::TooFewTrials)
    );
    assert_eq!(
        surface_monte_carlo(&scene, &lw, s, &u, &mut rng, &mut samples, 1.5).map(|_| ()),
        Err(Error::CoverageProbabilityOutOfRange)
    );
    // Same seed, same result, bit for bit.
    let run = |seed| {
        let mut rng = Xoshiro256StarStar::seed_from_u64(seed);
        let mut samples = vec![0.0; 500];
        surface_monte_carlo(&scene, &lw, s, &u, &mut rng, &mut samples, 0.95).unwrap()
    };
    assert_eq!(run(5), run(5));
    assert_ne!(run(5), run(6));
}

/// Regression: the calibration (temperature scale) line kept a sensitivity of 0 whenever
/// its own uncertainty was 0, while every other input kept its real coefficient. The
/// reference is the central finite difference of the model assembled from the public API
/// (independent of `surface_inputs`); the values in the comments were reported by an
/// independent high-precision check of the C ABI.
#[test]
fn calibration_sensitivity_does_not_depend_on_its_uncertainty() {
    let calibration_line = 1;
    let fd_calibration = |band: &Band, scene: &Scene, s: f64| {
        let x = point(scene, s);
        let h = 0.01;
        (model(band, &nudged(&x, calibration_line, h))
            - model(band, &nudged(&x, calibration_line, -h)))
            / (2.0 * h)
    };
    // Case 1: 8-14 um, e 0.93, reflected 291 K, air 0.97 at 288 K, no window.
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let scene = Scene::new(0.93, 291.0)
        .unwrap()
        .with_atmosphere(0.97, 288.0)
        .unwrap();
    let s = 88.040_785_273_998_84;
    let mut u = InputUncertainties {
        signal: 0.051,
        calibration_k: 0.0,
        emissivity: 0.02,
        reflected_k: 2.0,
        atm_transmittance: 0.01,
        atm_k: 1.0,
        ..Default::default()
    };
    let fd = fd_calibration(&band, &scene, s);
    // Independent check: 1.07840989006 K/K.
    assert_relative_eq!(fd, 1.078_409_890_06, max_relative = 1e-7);
    let zero = surface_inputs(&scene, &band, s, &u).unwrap().1[calibration_line];
    assert_eq!(zero.name, SURFACE_INPUT_NAMES[calibration_line]);
    assert_relative_eq!(zero.sensitivity, fd, max_relative = 1e-7);
    u.calibration_k = 0.5;
    let half = surface_inputs(&scene, &band, s, &u).unwrap().1[calibration_line];
    assert_eq!(zero.sensitivity, half.sensitivity);
    let budget = surface_budget(&scene, &band, s, &u).unwrap();
    assert!(budget.combined_standard_uncertainty > 0.0);

    // Case 2: 7.5-13.5 um behind a window, every uncertainty 0.
    let band = Band::rectangular(7.5, 13.5, Detector::Energy).unwrap();
    let scene = Scene::new(0.85, 300.0)
        .unwrap()
        .with_atmosphere(0.99, 298.0)
        .unwrap()
        .with_window(0.70, 0.10, 305.0, 298.0)
        .unwrap();
    let s = 79.705_305_760_836_48;
    let fd = fd_calibration(&band, &scene, s);
    // Independent check: 1.5288882566 K/K.
    assert_relative_eq!(fd, 1.528_888_256_6, max_relative = 1e-7);
    let inputs = surface_inputs(&scene, &band, s, &InputUncertainties::default())
        .unwrap()
        .1;
    assert_relative_eq!(
        inputs[calibration_line].sensitivity,
        fd,
        max_relative = 1e-7
    );
}
