//! Band radiance and its temperature derivative on both sides of every switch of the
//! rectangular band integral (src/planck.rs `moment_integral`): an end at x = 2 where the
//! head fits give way to the tail fits, a width in x of 0.25 and 0.03 (Gauss-Legendre
//! panel of 6 or 4 nodes, or end differences), a lower end at half the width, and ends
//! deep in the Wien tail up to x = 690 (beyond about 699 the band is refused as
//! unresolved, `tests/reference_band.rs`). Reference: mpmath, two
//! independent methods (tests/data/band_switch_points.csv, tools/refgen/planck_refs.py).

mod common;

use common::{assert_close, band_case, read_csv, tol, BandCase, C2_UMK};

#[test]
fn band_radiance_on_the_switches_matches_mpmath() {
    let rows = read_csv("band_switch_points.csv");
    let (mut worst, mut worst_derivative) = (0.0_f64, 0.0_f64);
    let mut worst_below_100 = 0.0_f64;
    for row in &rows {
        let BandCase {
            band,
            hi_um,
            temperature_k,
            what,
            ..
        } = band_case(row);
        let (radiance, derivative) = band.radiance_and_derivative(temperature_k).unwrap();
        // Deep in the Wien tail the problem's own condition number is x: rounding
        // x = c2/(lambda T) to a double moves e^-x by x ulp (see tol::conditioned_rel).
        let rel = tol::SWITCH_REL.max(tol::conditioned_rel(C2_UMK / (hi_um * temperature_k)));
        let error = assert_close(&what, radiance, row.f64("radiance"), rel, 0.0);
        worst = worst.max(error);
        if C2_UMK / (hi_um * temperature_k) < 100.0 {
            worst_below_100 = worst_below_100.max(error);
        }
        worst_derivative = worst_derivative.max(assert_close(
            &format!("{what} dL/dT"),
            derivative,
            row.f64("dradiance_dt"),
            rel,
            0.0,
        ));
        // And back: the inversion from mpmath's radiance.
        assert_close(
            &format!("{what} inversion"),
            band.temperature(row.f64("radiance")).unwrap(),
            temperature_k,
            tol::ROUND_TRIP_REL,
            0.0,
        );
    }
    assert!(rows.len() >= 100, "too few switch rows: {}", rows.len());
    println!(
        "switch points: worst rel error {worst:e} ({worst_below_100:e} for x < 100), \
         derivative {worst_derivative:e}"
    );
}
