//! Spot size, Airy encircled energy, MTF, small-target fraction and size-of-source
//! correction against mpmath/scipy (`tests/data/optics_*.csv`, written by
//! `tools/refgen/optics_refs.py`) and the printed check values (Born and Wolf for the Airy
//! pattern; Budzier and Gerlach 2021, J. Sens. Sens. Syst. 10, 179, for the MTF example).

mod common;

use bandtemp::band::Band;
use bandtemp::optics::diffraction::{
    airy_encircled_energy, airy_radius_um, cutoff_cy_mm, mtf, nyquist_cy_mm, small_target_fraction,
};
use bandtemp::optics::sse::{temperature_error_k, SseTable};
use bandtemp::optics::{check_target, footprint_m, ifov_mrad, spot_diameter_m, TargetRule};
use bandtemp::planck::Detector;
use bandtemp::Error;
use common::{assert_close, read_csv};
use proptest::prelude::*;

/// libm's j0/j1 are good to about 1e-15 absolute here; 1e-14 on 1 - J0^2 - J1^2.
const AIRY_ABS: f64 = 1e-14;
/// Radius from bisection to 1e-13 relative; the flat EE near the fraction magnifies
/// rounding of EE by 1/EE'(v): 1e-11 relative covers the cases.
const AIRY_RADIUS_REL: f64 = 1e-11;
/// MTF: closed forms, a few ulp.
const MTF_ABS: f64 = 1e-14;
/// Small-target fraction: Gauss-Legendre against scipy's adaptive quad of the same
/// integral (epsabs 1e-14 per panel); the promise is 1e-10.
const SMALL_TARGET_ABS: f64 = 1e-10;
/// First-order SSE error through the band derivative: the band's radiance and derivative
/// are good to 1e-12; mpmath.diff of mpmath.quad to 1e-20.
const SSE_REL: f64 = 1e-10;

#[test]
fn airy_against_mpmath() {
    for row in read_csv("optics_airy.csv") {
        let x = row.f64("x");
        match row.text("kind") {
            "ee" => {
                // radius x lambda N with lambda = 10 um, N = 2: r = 20 x um.
                let ee = airy_encircled_energy(20.0 * x, 10.0, 2.0).unwrap();
                assert_close(&format!("EE({x})"), ee, row.f64("value"), 0.0, AIRY_ABS);
            }
            "radius" => {
                let r = airy_radius_um(x, 10.0, 2.0).unwrap() / 20.0;
                assert_close(
                    &format!("radius({x})"),
                    r,
                    row.f64("value"),
                    AIRY_RADIUS_REL,
                    0.0,
                );
            }
            other => panic!("unknown kind {other}"),
        }
    }
    // Born and Wolf's figures, to their printed digits.
    assert_close(
        "EE(1.220)",
        airy_encircled_energy(1.220, 1.0, 1.0).unwrap(),
        0.838,
        0.0,
        5e-4,
    );
    assert_close(
        "r(90 %)",
        airy_radius_um(0.9, 1.0, 1.0).unwrap(),
        1.901,
        0.0,
        5e-4,
    );
    assert_close(
        "r(95 %)",
        airy_radius_um(0.95, 1.0, 1.0).unwrap(),
        3.916,
        0.0,
        5e-4,
    );
}

#[test]
fn mtf_against_mpmath_and_the_printed_example() {
    for row in read_csv("optics_mtf.csv") {
        let (nu, p, lam, n) = (
            row.f64("frequency_cy_mm"),
            row.f64("pitch_um"),
            row.f64("wavelength_um"),
            row.f64("f_number"),
        );
        let m = mtf(nu, p, lam, n).unwrap();
        let what = format!("MTF at {nu} cy/mm, p {p}, lambda {lam}, F/{n}");
        assert_close(
            &what,
            cutoff_cy_mm(lam, n).unwrap(),
            row.f64("cutoff_cy_mm"),
            1e-15,
            0.0,
        );
        assert_close(&what, m.diffraction, row.f64("diffraction"), 0.0, MTF_ABS);
        assert_close(&what, m.pixel, row.f64("pixel"), 0.0, MTF_ABS);
        assert_close(&what, m.system, row.f64("system"), 0.0, MTF_ABS);
    }
    // Budzier and Gerlach 2021: 10 um, F/1, 17 um pitch.
    let nyquist = nyquist_cy_mm(17.0).unwrap();
    assert_close(
        "cutoff",
        cutoff_cy_mm(10.0, 1.0).unwrap(),
        100.0,
        0.0,
        1e-12,
    );
    assert_close("Nyquist", nyquist, 29.41, 0.0, 5e-3);
    let m = mtf(nyquist, 17.0, 10.0, 1.0).unwrap();
    assert_close("diffraction", m.diffraction, 0.6310, 0.0, 5e-5);
    assert_close(
        "pixel = 2/pi",
        m.pixel,
        2.0 / std::f64::consts::PI,
        0.0,
        1e-15,
    );
    assert_close("system", m.system, 0.4017, 0.0, 5e-5);
}

#[test]
fn small_target_fraction_against_scipy_and_limits() {
    for row in read_csv("optics_small_target.csv") {
        let (d, p, lam, n) = (
            row.f64("target_diameter_um"),
            row.f64("pitch_um"),
            row.f64("wavelength_um"),
            row.f64("f_number"),
        );
        let what = format!("fraction d {d} p {p} lambda {lam} F/{n}");
        if p == 0.0 {
            // A vanishing pixel: the Airy encircled energy (independent physics). Here a
            // 1e-4 um pixel stands in for zero; its effect is of order (p nu_c)^2 = 1e-10.
            let f = small_target_fraction(d, 1e-4, lam, n).unwrap();
            assert_close(&what, f, row.f64("fraction"), 0.0, 1e-9);
        } else {
            let f = small_target_fraction(d, p, lam, n).unwrap();
            assert_close(&what, f, row.f64("fraction"), 0.0, SMALL_TARGET_ABS);
        }
    }
    // Large targets read their full signal.
    let big = small_target_fraction(4000.0, 17.0, 10.0, 1.0).unwrap();
    assert!((big - 1.0).abs() < 2e-3, "{big}");
}

#[test]
fn sse_first_order_error_against_mpmath_and_printed_values() {
    for row in read_csv("optics_sse.csv") {
        let band = Band::rectangular(row.f64("lo_um"), row.f64("hi_um"), Detector::Energy).unwrap();
        let dt = temperature_error_k(&band, row.f64("temperature_k"), row.f64("relative_signal"))
            .unwrap();
        assert_close("SSE dT", dt, row.f64("error_k"), SSE_REL, 0.0);
    }
    let red = Band::rectangular(0.6495, 0.6505, Detector::Energy).unwrap();
    assert_close(
        "0.65 um",
        temperature_error_k(&red, 1273.15, 1e-3).unwrap(),
        0.0732,
        0.0,
        5e-5,
    );
    let lwir = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    assert_close(
        "8-14 um",
        temperature_error_k(&lwir, 300.0, 0.01).unwrap(),
        0.656,
        0.0,
        5e-4,
    );
}

#[test]
fn sse_correction_inverts_the_band_exactly() {
    // An invented SSE curve: sigma 0.2 % at 10 mm, 0.1 % at 20 mm, 0 at 60 mm.
    let d = [10.0, 20.0, 60.0];
    let s = [0.002, 0.001, 0.0];
    let table = SseTable::new(&d, &s).unwrap();
    let red = Band::rectangular(0.6495, 0.6505, Detector::Energy).unwrap();
    // Calibrated on 60 mm, measured on 15 mm: sigma 0.15 %, the reading is low.
    let c = table.correction(&red, 1273.15, 60.0, 15.0).unwrap();
    assert_close(
        "first order",
        c.relative_signal_first_order,
        -0.0015,
        1e-12,
        0.0,
    );
    assert_close("exact", c.relative_signal, 0.9985 - 1.0, 1e-12, 0.0);
    let signal = red.radiance(1273.15).unwrap();
    let expected = red.radiance(c.corrected_k).unwrap();
    assert_close("corrected signal", expected, signal / 0.9985, 1e-12, 0.0);
    assert!(
        c.correction_k > 0.0 && (c.correction_k - 0.1098).abs() < 1e-3,
        "{c:?}"
    );
}

#[test]
fn geometry_and_rules() {
    // Invented: a D:S 75:1 thermometer at 1.5 m sees a 20 mm spot (99 % by ISO 10878).
    let spot = spot_diameter_m(1.5, 75.0).unwrap();
    assert_close("spot", spot, 0.02, 1e-15, 0.0);
    let ok = check_target(TargetRule::Iso10878, 0.025, 1.5, 75.0).unwrap();
    assert!(ok.valid && (ok.ratio - 1.25).abs() < 1e-12);
    let small = check_target(TargetRule::Iso10878, 0.015, 1.5, 75.0).unwrap();
    assert!(!small.valid);
    // An imager: 12 um pitch behind 13 mm: IFOV 0.923 mrad; at 5 m a 4.6 mm footprint.
    let ifov = ifov_mrad(12.0, 13.0).unwrap();
    assert_close("ifov", ifov, 12.0 / 13.0, 1e-7, 0.0);
    let fp = footprint_m(5.0, ifov).unwrap();
    assert_close("footprint", fp, 5.0 * 12e-6 / 13e-3, 1e-14, 0.0);
    let three = check_target(TargetRule::ThreeByThree, 0.03, 5.0, ifov).unwrap();
    let ten = check_target(TargetRule::PusnikGersak, 0.03, 5.0, ifov).unwrap();
    assert!(three.valid && !ten.valid);
    assert_close("minimum 10x10", ten.minimum_m, 10.0 * fp, 1e-15, 0.0);
    assert_eq!(
        check_target(TargetRule::ThreeByThree, f64::NAN, 5.0, ifov),
        Err(Error::NonFinite)
    );
}

proptest! {
    /// EE is a fraction, rising with radius; the inverse inverts it.
    #[test]
    fn airy_monotone_and_inverse(f in 0.01f64..0.999, lam in 0.5f64..14.0, n in 0.8f64..8.0) {
        let r = airy_radius_um(f, lam, n).unwrap();
        let ee = airy_encircled_energy(r, lam, n).unwrap();
        prop_assert!((ee - f).abs() < 1e-9, "{} {}", ee, f);
        prop_assert!(airy_encircled_energy(r * 0.999, lam, n).unwrap() <= ee + 1e-15);
    }

    /// The small-target fraction is a fraction: in (0, 1].
    #[test]
    fn small_target_fraction_bounded(d in 1.0f64..200.0, p in 5.0f64..30.0, n in 0.8f64..2.0) {
        let f = small_target_fraction(d, p, 10.0, n).unwrap();
        prop_assert!(f > 0.0 && f < 1.0 + 1e-9, "{}", f);
    }

    /// Hostile inputs are errors, never panics.
    #[test]
    fn hostile(a in proptest::num::f64::ANY, b in proptest::num::f64::ANY, c in proptest::num::f64::ANY) {
        let _ = airy_encircled_energy(a, b, c);
        let _ = airy_radius_um(a, b, c);
        let _ = mtf(a, b, c, 1.0);
        let _ = check_target(TargetRule::Iso10878, a, b, c);
        let _ = small_target_fraction(a.abs().min(1e3), b, 10.0, c);
    }
}
