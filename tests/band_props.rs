//! proptest invariants of the Planck laws and band integrals (modest case counts: each
//! case evaluates several band integrals).

mod common;

use bandtemp::band::{Band, SpectralTable};
use bandtemp::planck::{
    blackbody_fraction, blackbody_fraction_complement, photon_blackbody_fraction, Detector,
};
use common::{relative_error, tol};
use proptest::prelude::*;

/// h c in J m, for photon/energy conversions (exact CODATA 2018 h and c).
const HC_J_M: f64 = 6.626_070_15e-34 * 299_792_458.0;

fn detector() -> impl Strategy<Value = Detector> {
    prop_oneof![Just(Detector::Energy), Just(Detector::Photon)]
}

/// A band inside 0.3-30 um, from very narrow (relative width 1e-5) to the whole range.
fn band_edges() -> impl Strategy<Value = (f64, f64)> {
    (0.3_f64.ln()..30.0_f64.ln(), -5.0_f64..2.0).prop_filter_map(
        "inside 0.3-30 um",
        |(ln_lo, log_rel)| {
            let lo = ln_lo.exp();
            let hi = (lo * (1.0 + 10f64.powf(log_rel))).min(30.0);
            (hi > lo).then_some((lo, hi))
        },
    )
}

/// Temperatures 150-4000 K, log-uniform.
fn temperature_k() -> impl Strategy<Value = f64> {
    (150.0_f64.ln()..4000.0_f64.ln()).prop_map(f64::exp)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn band_radiance_strictly_increases_with_temperature(
        det in detector(), (lo, hi) in band_edges(), t in temperature_k(), step in 1e-6_f64..0.5,
    ) {
        let band = Band::rectangular(lo, hi, det).unwrap();
        let (l0, d0) = band.radiance_and_derivative(t).unwrap();
        let l1 = band.radiance(t * (1.0 + step)).unwrap();
        prop_assert!(l1 > l0, "L({}) = {l1} <= L({t}) = {l0}", t * (1.0 + step));
        prop_assert!(d0 > 0.0);
    }

    #[test]
    fn band_radiance_is_additive_over_adjacent_bands(
        det in detector(), (lo, hi) in band_edges(), split in 0.01_f64..0.99, t in temperature_k(),
    ) {
        let mid = lo + split * (hi - lo);
        prop_assume!(mid > lo && mid < hi);
        let whole = Band::rectangular(lo, hi, det).unwrap().radiance(t).unwrap();
        let left = Band::rectangular(lo, mid, det).unwrap().radiance(t).unwrap();
        let right = Band::rectangular(mid, hi, det).unwrap().radiance(t).unwrap();
        let err = relative_error(left + right, whole);
        prop_assert!(err <= tol::ADDITIVE_REL, "{left} + {right} vs {whole}: {err:e}");
    }

    #[test]
    fn tabulated_constant_response_equals_rectangular(
        det in detector(), (lo, hi) in band_edges(), t in temperature_k(), level in 0.1_f64..2.0,
    ) {
        // A flat table r = level over [lo, hi] is `level` times the rectangular band.
        let (w, v) = ([lo, hi], [level, level]);
        let table = SpectralTable::new(&w, &v).unwrap();
        let tabulated = Band::with_response(lo, hi, det, table).unwrap().radiance(t).unwrap();
        let rectangular = Band::rectangular(lo, hi, det).unwrap().radiance(t).unwrap();
        let err = relative_error(tabulated, level * rectangular);
        prop_assert!(err <= tol::TABULATED_REL, "{tabulated} vs {level} * {rectangular}: {err:e}");
    }

    #[test]
    fn inversion_round_trips(det in detector(), (lo, hi) in band_edges(), t in temperature_k()) {
        let band = Band::rectangular(lo, hi, det).unwrap();
        let back = band.temperature(band.radiance(t).unwrap()).unwrap();
        prop_assert!(relative_error(back, t) <= tol::ROUND_TRIP_REL, "{t} -> {back}");
    }

    #[test]
    fn photon_and_energy_bands_are_consistent(
        (lo, hi) in band_edges(), t in temperature_k(),
    ) {
        // Lp = L lambda/(hc) pointwise, so by the mean-value theorem
        // lo/(hc) L_band <= Lp_band <= hi/(hc) L_band (lambda in m).
        let energy = Band::rectangular(lo, hi, Detector::Energy).unwrap().radiance(t).unwrap();
        let photon = Band::rectangular(lo, hi, Detector::Photon).unwrap().radiance(t).unwrap();
        let slack = 1.0 + tol::BOUND_SLACK_REL;
        prop_assert!(photon * slack >= energy * lo * 1e-6 / HC_J_M);
        prop_assert!(photon <= energy * hi * 1e-6 / HC_J_M * slack);
    }

    #[test]
    fn fraction_is_a_monotone_share(a in 1.0_f64..7.0, b in 1.0_f64..7.0) {
        // lambda T from 10 to 1e7 um K, log-uniform.
        let (lo, hi) = (10f64.powf(a.min(b)), 10f64.powf(a.max(b)));
        for det_fraction in [blackbody_fraction, photon_blackbody_fraction] {
            let (f_lo, f_hi) = (det_fraction(lo).unwrap(), det_fraction(hi).unwrap());
            prop_assert!((0.0..=1.0).contains(&f_lo) && (0.0..=1.0).contains(&f_hi));
            prop_assert!(f_lo <= f_hi, "F({lo}) = {f_lo} > F({hi}) = {f_hi}");
        }
    }

    #[test]
    fn fraction_and_complement_sum_to_one(a in 1.0_f64..7.0) {
        let lambda_t = 10f64.powf(a);
        let sum = blackbody_fraction(lambda_t).unwrap() + blackbody_fraction_complement(lambda_t).unwrap();
        prop_assert!((sum - 1.0).abs() <= tol::SUM_TO_ONE_ABS, "{sum}");
    }

    #[test]
    fn band_equals_difference_of_fractions(
        (lo, hi) in band_edges(), t in temperature_k(),
    ) {
        // L_band = sigma T^4/pi (F(hi T) - F(lo T)); only where the difference cannot
        // cancel (the band holds at least 1 % of the total), to 1e-12 relative.
        let total = bandtemp::planck::total_radiance(t).unwrap();
        let share = blackbody_fraction(hi * t).unwrap() - blackbody_fraction(lo * t).unwrap();
        prop_assume!(share > 0.01);
        let band = Band::rectangular(lo, hi, Detector::Energy).unwrap().radiance(t).unwrap();
        let err = relative_error(band, total * share);
        prop_assert!(err <= tol::fraction_difference_rel(share), "{band} vs {}: {err:e}", total * share);
    }
}
