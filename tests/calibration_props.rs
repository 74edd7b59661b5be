//! Invariants of the Sakuma-Hattori curves and fits (proptest). Parameters are drawn over
//! the ranges real instruments span (A 0.4-15 um, B 0-300 um K, C over 30 decades) with
//! temperatures kept where the signal is a normal double.

use bandtemp::band::SignalCurve;
use bandtemp::calibration::{
    fit_points, fit_points_with, OffsetCurve, PointsFit, SakumaHattori, SakumaHattoriWien,
};
use proptest::prelude::*;

/// Relative tolerance of a round trip through the closed-form inverse: the inverse loses
/// about y = c2/(A T + B) ulps (y < 60 here).
const ROUND_TRIP: f64 = 1e-12;

fn parameters() -> impl Strategy<Value = (f64, f64, f64)> {
    (0.4_f64..15.0, 0.0_f64..300.0, -10.0_f64..30.0).prop_map(|(a, b, lg)| (a, b, 10f64.powf(lg)))
}

/// A temperature range [t1, t2] with c2/(A T + B) between 0.5 and 60 at both ends.
fn temperature_range(a: f64, b: f64) -> (f64, f64) {
    let c2 = 14_387.768_775_039_34;
    let t_for = |y: f64| (c2 / y - b) / a;
    (t_for(60.0).max(1.0), t_for(0.5))
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn signal_of_temperature_of_signal_is_the_signal(
        (a, b, c) in parameters(), u in 0.0_f64..1.0, offset in -1e3_f64..1e3
    ) {
        let (t1, t2) = temperature_range(a, b);
        let planck = SakumaHattori::new(a, b, c).unwrap();
        let wien = SakumaHattoriWien::new(a, b, c).unwrap();
        // A signal drawn log-uniformly between the range's ends.
        for curve in [&planck as &dyn SignalCurve, &wien as &dyn SignalCurve] {
            let (s1, s2) = (curve.signal(t1).unwrap(), curve.signal(t2).unwrap());
            let s = (s1.ln() + u * (s2.ln() - s1.ln())).exp();
            let back = curve.signal(curve.temperature(s).unwrap()).unwrap();
            prop_assert!(((back - s) / s).abs() < ROUND_TRIP, "{s} -> {back}");
        }
        // Behind a dark offset, in offset units.
        let shifted = OffsetCurve::new(planck, offset * planck.signal(t1).unwrap()).unwrap();
        let s = shifted.signal(0.5 * (t1 + t2)).unwrap();
        let back = shifted.signal(shifted.temperature(s).unwrap()).unwrap();
        prop_assert!(((back - s) / (s - shifted.offset)).abs() < ROUND_TRIP);
    }

    #[test]
    fn curves_rise_with_temperature_and_their_derivative_is_the_slope(
        (a, b, c) in parameters(), u in 0.0_f64..1.0, v in 0.0_f64..1.0
    ) {
        let (t1, t2) = temperature_range(a, b);
        let (lo, hi) = {
            let x = t1 + u * (t2 - t1);
            let y = t1 + v * (t2 - t1);
            (x.min(y), x.max(y))
        };
        prop_assume!(hi > lo * (1.0 + 1e-9));
        let planck = SakumaHattori::new(a, b, c).unwrap();
        let wien = SakumaHattoriWien::new(a, b, c).unwrap();
        for curve in [&planck as &dyn SignalCurve, &wien as &dyn SignalCurve] {
            let (s_lo, d_lo) = curve.signal_and_derivative(lo).unwrap();
            let s_hi = curve.signal(hi).unwrap();
            prop_assert!(s_hi > s_lo && d_lo > 0.0);
            prop_assert!(curve.temperature(s_hi).unwrap() > curve.temperature(s_lo).unwrap());
            // Central difference, step 1e-5 T: truncation ~ (y h / T)^2 ~ 1e-7 relative.
            let h = 1e-5 * lo;
            let slope = (curve.signal(lo + h).unwrap() - curve.signal(lo - h).unwrap()) / (2.0 * h);
            prop_assert!(((slope - d_lo) / d_lo).abs() < 1e-6, "{slope} vs {d_lo}");
        }
    }
}

/// Noisy readings of an invented instrument: signals from (a, b, c) at `ts`, each scaled
/// by 1 + 1e-4 * noise[i].
fn noisy(a: f64, b: f64, c: f64, ts: &[f64], noise: &[f64]) -> Vec<f64> {
    let curve = SakumaHattori::new(a, b, c).unwrap();
    ts.iter()
        .zip(noise)
        .map(|(&t, &n)| curve.signal(t).unwrap() * (1.0 + 1e-4 * n))
        .collect()
}

fn same_fit(x: &PointsFit, y: &PointsFit) -> bool {
    let close = |p: f64, q: f64, scale: f64| (p - q).abs() <= 1e-7 * scale;
    close(x.params.a_um(), y.params.a_um(), x.params.a_um())
        && close(x.params.b_umk(), y.params.b_umk(), x.params.a_um() * 1000.0)
        && close(x.params.c(), y.params.c(), x.params.c() * 10.0)
        && (x.max_residual_k - y.max_residual_k).abs() <= 1e-6
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]

    #[test]
    fn fits_do_not_depend_on_the_order_of_the_points(
        a in 0.6_f64..12.0,
        b_fraction in 0.0_f64..0.05,
        lg_c in 0.0_f64..12.0,
        points in (3usize..10).prop_flat_map(|n| (
            Just(n),
            proptest::collection::vec(-1.0_f64..1.0, n),
            Just((0..n).collect::<Vec<usize>>()).prop_shuffle(),
        )),
        with_uncertainties in any::<bool>(),
    ) {
        let (n, noise, order) = points;
        // Invented calibration temperatures spread over a range the band can see.
        let c2 = 14_387.768_775_039_34;
        let t_lo = c2 / (a * 30.0);
        let ts: Vec<f64> = (0..n).map(|i| t_lo * (1.0 + 0.15 * i as f64)).collect();
        let b = b_fraction * a * t_lo;
        let c = 10f64.powf(lg_c);
        let signals = noisy(a, b, c, &ts, &noise);
        let u: Vec<f64> = signals.iter().map(|s| 1e-4 * s).collect();
        let t2: Vec<f64> = order.iter().map(|&i| ts[i]).collect();
        let s2: Vec<f64> = order.iter().map(|&i| signals[i]).collect();
        let u2: Vec<f64> = order.iter().map(|&i| u[i]).collect();
        let (first, second) = if with_uncertainties {
            (fit_points(&ts, &signals, Some(&u)), fit_points(&t2, &s2, Some(&u2)))
        } else {
            (fit_points(&ts, &signals, None), fit_points(&t2, &s2, None))
        };
        let (first, second) = (first.unwrap(), second.unwrap());
        prop_assert!(same_fit(&first, &second), "{first:?}\n{second:?}");
        // The offset variant with a zero offset is the same fit.
        let third: PointsFit = fit_points_with(&t2, &s2, None, 0.0).unwrap();
        if !with_uncertainties {
            prop_assert!(same_fit(&second, &third));
        }
    }
}
