//! Directional, normal and hemispherical emissivity from optical constants against mpmath
//! (`tests/data/emissivity_*.csv`, written by `tools/refgen/optics_refs.py`), and the
//! printed check values (computed with Fresnel's equations as in Siegel and Howell and
//! Modest; the generator reproduces them to their printed digits before writing).

mod common;

use bandtemp::emissivity::{
    brewster_angle_deg, hagen_rubens_constants, hagen_rubens_normal, OpticalConstants,
};
use bandtemp::Error;
use common::{assert_close, read_csv};
use proptest::prelude::*;

/// Directional emissivities: a few ulp of cancellation in 1 - |r|^2; 1e-13 absolute.
const DIRECTIONAL_ABS: f64 = 1e-13;
/// Hemispherical: 10-point Gauss-Legendre on 40 geometric panels; the promise is 1e-12.
const HEMI_ABS: f64 = 1e-12;
/// Trusted angle: bisection to 1e-10 deg, mpmath root to 1e-15 deg.
const ANGLE_ABS_DEG: f64 = 1e-8;

#[test]
fn directional_against_mpmath() {
    for row in read_csv("emissivity_fresnel.csv") {
        let m = OpticalConstants::new(row.f64("n"), row.f64("k")).unwrap();
        let angle = row.f64("angle_deg");
        let d = m.directional(angle).unwrap();
        let what = format!("n={} k={} {angle} deg", row.f64("n"), row.f64("k"));
        assert_close(
            &format!("{what} s"),
            d.s,
            row.f64("e_s"),
            0.0,
            DIRECTIONAL_ABS,
        );
        assert_close(
            &format!("{what} p"),
            d.p,
            row.f64("e_p"),
            0.0,
            DIRECTIONAL_ABS,
        );
        assert_close(&what, d.unpolarised, row.f64("e"), 0.0, DIRECTIONAL_ABS);
    }
}

#[test]
fn normal_hemispherical_peak_and_trusted_angle_against_mpmath() {
    for row in read_csv("emissivity_hemispherical.csv") {
        let (n, k) = (row.f64("n"), row.f64("k"));
        let m = OpticalConstants::new(n, k).unwrap();
        let what = format!("n={n} k={k}");
        assert_close(
            &format!("{what} e_n"),
            m.normal(),
            row.f64("e_n"),
            0.0,
            1e-15,
        );
        assert_close(
            &format!("{what} e_h"),
            m.hemispherical(),
            row.f64("e_h"),
            0.0,
            HEMI_ABS,
        );
        let peak = m.peak();
        assert_close(
            &format!("{what} peak e"),
            peak.emissivity,
            row.f64("peak_e"),
            0.0,
            1e-13,
        );
        if row.f64("peak_deg") > 1e-3 {
            assert_close(
                &format!("{what} peak deg"),
                peak.angle_deg,
                row.f64("peak_deg"),
                0.0,
                1e-5,
            );
        } else {
            assert_eq!(peak.angle_deg, 0.0, "{what}");
        }
        for (tol, column) in [(0.01, "trusted_1pct_deg"), (0.05, "trusted_5pct_deg")] {
            assert_close(
                &format!("{what} trusted {tol}"),
                m.trusted_angle_deg(tol).unwrap(),
                row.f64(column),
                0.0,
                ANGLE_ABS_DEG,
            );
        }
    }
}

/// The printed figures, to their printed digits (half a unit in the last digit).
#[test]
fn printed_check_values() {
    let glass = OpticalConstants::new(1.5, 0.0).unwrap();
    assert_close("n=1.5 e_n", glass.normal(), 0.96000, 0.0, 5e-6);
    assert_close("n=1.5 e_h", glass.hemispherical(), 0.90822, 0.0, 5e-6);
    for (deg, value) in [
        (45.0, 0.9498),
        (60.0, 0.9108),
        (70.0, 0.8290),
        (80.0, 0.6123),
        (85.0, 0.3872),
    ] {
        let e = glass.directional(deg).unwrap().unpolarised;
        assert_close(&format!("n=1.5 at {deg}"), e, value, 0.0, 5e-5);
    }
    let brewster = brewster_angle_deg(1.5).unwrap();
    assert_close("Brewster", brewster, 56.31, 0.0, 5e-3);
    assert_close(
        "e_p at Brewster",
        glass.directional(brewster).unwrap().p,
        1.0,
        0.0,
        1e-15,
    );
    let two = OpticalConstants::new(2.0, 0.0).unwrap();
    assert_close("n=2 e_n", two.normal(), 0.88889, 0.0, 5e-6);
    assert_close("n=2 e_h", two.hemispherical(), 0.83940, 0.0, 5e-6);
    let three = OpticalConstants::new(3.0, 0.0).unwrap();
    assert_close("n=3 e_n", three.normal(), 0.75, 0.0, 1e-15);
    assert_close("n=3 e_h", three.hemispherical(), 0.72380, 0.0, 5e-6);
    let metal = OpticalConstants::new(54.75, 54.75).unwrap();
    assert_close("metal e_n", metal.normal(), 0.03587, 0.0, 5e-6);
    assert_close("metal e_h", metal.hemispherical(), 0.04563, 0.0, 5e-6);
    assert_close(
        "metal ratio",
        metal.hemispherical() / metal.normal(),
        1.272,
        0.0,
        5e-4,
    );
    let peak = metal.peak();
    assert_close("metal peak", peak.emissivity, 0.414, 0.0, 5e-4);
    assert_close("metal peak angle", peak.angle_deg, 89.26, 0.0, 5e-3);
}

/// Hagen-Rubens: the first term is the leading term of the exact n = k Fresnel value;
/// 0.365 is the coefficient as heat-transfer texts print it (Siegel and Howell, from
/// memory); derived, 2 sqrt(4 pi / Z0) = 0.36528.
#[test]
fn hagen_rubens_first_term() {
    // An invented conductor, r_e = 1e-7 ohm m, at 10 um: r_e/lambda = 0.01 ohm.
    let e = hagen_rubens_normal(1e-7, 10.0).unwrap();
    assert_close("0.365 sqrt(r/l)", e, 0.365 * 0.1, 1.0e-3, 0.0);
    // The relation as published, A = 1 - R = 2 sqrt(2 eps0 omega / sigma) (Hummel,
    // Electronic Properties of Materials, via the encyclopaedia article), with
    // eps0 = 8.8541878128e-12 F/m (CODATA 2018), omega = 2 pi c / lambda, sigma = 1/r_e.
    let omega = 2.0 * std::f64::consts::PI * 299_792_458.0 / 10e-6;
    let published = 2.0 * (2.0 * 8.854_187_812_8e-12 * omega * 1e-7).sqrt();
    assert_close("published relation", e, published, 1e-9, 0.0);
    let m = hagen_rubens_constants(1e-7, 10.0).unwrap();
    assert_eq!(m.n(), m.k());
    // Relative error of the first term about 1/n = e/2.
    let exact = m.normal();
    assert!(
        (e / exact - 1.0 - 1.0 / m.n()).abs() < 2.0 / (m.n() * m.n()),
        "{e} {exact}"
    );
    assert_eq!(
        hagen_rubens_normal(0.0, 10.0),
        Err(Error::ResistivityNotPositive)
    );
    assert_eq!(
        hagen_rubens_normal(1e-7, -1.0),
        Err(Error::WavelengthNotPositive)
    );
}

proptest! {
    /// Kirchhoff and energy: every emissivity in [0, 1]; hemispherical between the
    /// minimum and maximum of the directional values; s <= p (p is never below s for a
    /// passive interface from vacuum).
    #[test]
    fn emissivities_are_bounded(n in 0.05f64..200.0, k in 0.0f64..200.0, deg in 0.0f64..89.999) {
        let m = OpticalConstants::new(n, k).unwrap();
        let d = m.directional(deg).unwrap();
        prop_assert!((0.0..=1.0).contains(&d.s) && (0.0..=1.0 + 1e-15).contains(&d.p));
        prop_assert!(d.s <= d.p + 1e-12);
        let h = m.hemispherical();
        prop_assert!(h > 0.0 && h <= m.peak().emissivity + 1e-12);
    }

    /// Hostile inputs are errors, never panics.
    #[test]
    fn hostile_inputs(n in proptest::num::f64::ANY, k in proptest::num::f64::ANY, deg in proptest::num::f64::ANY) {
        if let Ok(m) = OpticalConstants::new(n, k) {
            let _ = m.directional(deg);
            let _ = m.trusted_angle_deg(deg);
        }
    }
}
