//! Multi-wavelength pyrometry against numpy and mpmath/scipy
//! (`tests/data/multiwavelength.csv`, `tools/refgen/multiwavelength_refs.py`), with the
//! printed noise gains (Coates 1981, Metrologia 17, 103 style analysis at 1500 K) and the
//! recovery example.

mod common;

use bandtemp::band::Band;
use bandtemp::multiwavelength::{fit, noise_gain, EmissivityModel, MAX_BANDS};
use bandtemp::planck::Detector;
use bandtemp::Error;
use common::{assert_close, read_csv};
use proptest::prelude::*;

/// Noise gains: small dense linear algebra on normal matrices with condition numbers up
/// to about 1e7 (quadratic model, four close bands), so eps x 1e7: 1e-9 relative.
const GAIN_REL: f64 = 1e-9;
/// Bias per omitted term: the projection of lambda^m onto a nearly dependent basis
/// (lambda^3 against 1, lambda, lambda^2 over 0.7-1.0 um) loses one digit more: 1e-8.
const BIAS_REL: f64 = 1e-8;

fn wavelengths(row: &common::Row) -> Vec<f64> {
    row.text("wavelengths_um")
        .split(' ')
        .map(|w| w.parse().unwrap())
        .collect()
}

fn model(terms: f64) -> EmissivityModel {
    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
    EmissivityModel::new(terms as u32).unwrap()
}

#[test]
fn noise_gains_against_numpy() {
    for row in read_csv("multiwavelength.csv")
        .iter()
        .filter(|r| r.text("kind") == "gain")
    {
        let (g, b) = noise_gain(
            &wavelengths(row),
            row.f64("temperature_k"),
            model(row.f64("terms")),
        )
        .unwrap();
        assert_close("gain", g, row.f64("value"), GAIN_REL, 0.0);
        assert_close("bias", b, row.f64("bias"), BIAS_REL, 1e-12);
    }
}

#[test]
fn printed_noise_gains() {
    let g = |w: &[f64], m| noise_gain(w, 1500.0, m).unwrap().0;
    let seven: Vec<f64> = (0..7).map(|i| 0.7 + 0.05 * f64::from(i)).collect();
    let eleven: Vec<f64> = (0..11).map(|i| 0.6 + 0.1 * f64::from(i)).collect();
    assert_close(
        "single 0.9",
        g(&[0.9], EmissivityModel::KNOWN),
        0.0938,
        0.0,
        5e-5,
    );
    assert_close(
        "two-colour",
        g(&[0.8, 1.0], EmissivityModel::GREY),
        0.590,
        0.0,
        5e-4,
    );
    assert_close(
        "3 linear",
        g(&[0.8, 0.9, 1.0], EmissivityModel::LINEAR),
        9.19,
        0.0,
        5e-3,
    );
    let four = [0.7, 0.8, 0.9, 1.0];
    assert_close(
        "4 linear",
        g(&four, EmissivityModel::LINEAR),
        3.08,
        0.0,
        5e-3,
    );
    assert_close(
        "4 quadratic",
        g(&four, EmissivityModel::QUADRATIC),
        39.2,
        0.0,
        5e-2,
    );
    assert_close(
        "7 linear",
        g(&seven, EmissivityModel::LINEAR),
        2.69,
        0.0,
        5e-3,
    );
    assert_close(
        "11 linear",
        g(&eleven, EmissivityModel::LINEAR),
        0.36,
        0.0,
        5e-3,
    );
}

fn example_bands() -> [Band<'static>; 4] {
    [0.7, 0.8, 0.9, 1.0].map(|c| Band::rectangular(c - 0.005, c + 0.005, Detector::Energy).unwrap())
}

fn example_signals() -> Vec<f64> {
    read_csv("multiwavelength.csv")
        .iter()
        .filter(|r| r.text("kind") == "signal")
        .map(|r| r.f64("value"))
        .collect()
}

#[test]
fn exact_recovery_and_grey_bias() {
    let bands = example_bands();
    let signals = example_signals();
    let linear = fit(&bands, &signals, EmissivityModel::LINEAR).unwrap();
    // Signals from mpmath at 25 digits: the linear model recovers T and e exactly.
    assert_close("linear T", linear.temperature_k, 1500.0, 1e-12, 0.0);
    assert_close("a0", linear.coefficients[0], 0.4_f64.ln(), 1e-9, 0.0);
    assert_close("a1", linear.coefficients[1], -0.3, 1e-9, 0.0);
    assert!(linear.residual_rms < 1e-12, "{linear:?}");
    assert_close(
        "e(0.85)",
        linear.emissivity_at(0.85),
        0.4 * (-0.3_f64 * 0.85).exp(),
        1e-9,
        0.0,
    );
    // The exact-band noise gain agrees with the monochromatic Wien value to the bands'
    // width and Planck's -1: within 1 %.
    assert_close("gain", linear.noise_gain, 3.081_279_855_970_116, 1e-2, 0.0);
    let grey = fit(&bands, &signals, EmissivityModel::GREY).unwrap();
    let reference = read_csv("multiwavelength.csv")
        .into_iter()
        .find(|r| r.text("kind") == "grey")
        .unwrap();
    // scipy least squares on scipy.quad band integrals (rtol 1e-13): 1e-9 relative.
    assert_close(
        "grey T",
        grey.temperature_k,
        reference.f64("value"),
        1e-9,
        0.0,
    );
    assert_close(
        "grey e",
        grey.coefficients[0].exp(),
        reference.f64("bias"),
        1e-8,
        0.0,
    );
    assert_close("printed 1533.3", grey.temperature_k, 1533.3, 0.0, 0.05);
    // The reported bias per unit of the omitted linear term predicts the grey error to
    // first order: dT/T ~= b a1 with a1 = -0.3 (second order: (b a1)^2 ~ 5e-4).
    let predicted = grey.bias_per_next_term * -0.3;
    assert_close(
        "bias",
        grey.temperature_k / 1500.0 - 1.0,
        predicted,
        0.05,
        0.0,
    );
}

#[test]
fn errors() {
    let bands = example_bands();
    let signals = example_signals();
    assert_eq!(
        fit(&bands[..2], &signals[..2], EmissivityModel::LINEAR),
        Err(Error::TooFewBands)
    );
    assert_eq!(
        fit(&bands, &signals[..3], EmissivityModel::LINEAR),
        Err(Error::BandCountMismatch)
    );
    let mut bad = signals.clone();
    bad[1] = -1.0;
    assert_eq!(
        fit(&bands, &bad, EmissivityModel::GREY),
        Err(Error::RadianceNotPositive)
    );
    let many = [0.9; MAX_BANDS + 1];
    assert_eq!(
        noise_gain(&many, 1500.0, EmissivityModel::GREY),
        Err(Error::TooManyBands)
    );
    assert_eq!(
        noise_gain(&[0.9, 0.9, 0.9], 1500.0, EmissivityModel::LINEAR),
        Err(Error::MultiwavelengthIllConditioned)
    );
    assert_eq!(EmissivityModel::new(4), Err(Error::EmissivityModelInvalid));
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(24))]
    /// Self-consistency: signals made by the model's own band integrals are fitted back.
    #[test]
    fn fits_its_own_model(t in 900.0f64..2500.0, a0 in -2.0f64..-0.05, a1 in -0.6f64..0.3) {
        let bands = example_bands();
        let e = |l: f64| (a0 + a1 * l).exp();
        let signals: Vec<f64> = bands
            .iter()
            .map(|b| b.weighted_radiance_and_derivative(t, &[], e).unwrap().0)
            .collect();
        let f = fit(&bands, &signals, EmissivityModel::LINEAR).unwrap();
        prop_assert!((f.temperature_k / t - 1.0).abs() < 1e-9, "{} vs {}", f.temperature_k, t);
    }

    /// Hostile signals are errors, never panics.
    #[test]
    fn hostile(s in proptest::collection::vec(proptest::num::f64::ANY, 4)) {
        let _ = fit(&example_bands(), &s, EmissivityModel::LINEAR);
    }
}
