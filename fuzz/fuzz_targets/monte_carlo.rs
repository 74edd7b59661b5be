//! Monte Carlo propagation (Rust API; not in the C ABI yet): `surface_monte_carlo` over any
//! band, scene, signal, uncertainties, seed, trial count and coverage probability; the
//! generic `monte_carlo` with a model returning decoded values (NaN and infinities
//! included); `coverage_interval`, `RunningStats`, `numerical_tolerance` and
//! `validate_lpu` on any data; the generator from any state.
//!
//! Oracles: successes finite, with low <= high, the shortest interval no wider than the
//! probabilistically symmetric one, the samples sorted and the mean inside their range;
//! the same seed gives the same summary bit for bit; errors are named; each call within
//! the per-call limit.
#![no_main]

use bandtemp::band::Band;
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use bandtemp::uncertainty::{
    coverage_interval, monte_carlo, numerical_tolerance, surface_monte_carlo, validate_lpu,
    InputUncertainties, RunningStats, Xoshiro256StarStar,
};
use bandtemp_fuzz::{finite, oracle, timed, Dec, Kind};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let mut d = Dec::new(data);
    match d.u8() % 3 {
        0 => surface(&mut d),
        1 => generic(&mut d),
        _ => pieces(&mut d),
    }
});

fn surface(d: &mut Dec<'_>) {
    let detector = if d.bool() {
        Detector::Energy
    } else {
        Detector::Photon
    };
    let (lo, hi) = if d.bool() {
        (8.0, 14.0)
    } else {
        (d.f64(Kind::Um), d.f64(Kind::Um))
    };
    let Ok(band) = Band::rectangular(lo, hi, detector) else {
        return;
    };
    let f: [f64; 8] = core::array::from_fn(|i| match i {
        0 | 2 | 4 => 0.3 + 0.7 * f64::from(d.u8()) / 255.0,
        5 => 0.05 * f64::from(d.u8()) / 255.0,
        _ => d.f64(Kind::TempK),
    });
    let Ok(scene) = Scene::new(f[0], f[1])
        .and_then(|s| s.with_atmosphere(f[2], f[3]))
        .and_then(|s| s.with_window(f[4], f[5], f[6], f[7]))
    else {
        return;
    };
    let t = d.f64(Kind::TempK);
    let Ok(signal) = scene.sensor_signal(&band, t) else {
        return;
    };
    let small = |d: &mut Dec<'_>, scale: f64| {
        if d.u8().is_multiple_of(8) {
            d.f64(Kind::Uncertainty)
        } else {
            scale * f64::from(d.u8()) / 255.0
        }
    };
    let u = InputUncertainties {
        signal: small(d, 1e-3) * signal,
        calibration_k: small(d, 1.0),
        calibration_signal: small(d, 1e-3) * signal,
        emissivity: small(d, 0.02),
        reflected_k: small(d, 5.0),
        atm_transmittance: small(d, 0.02),
        atm_k: small(d, 5.0),
        window_transmittance: small(d, 0.02),
        window_reflectance: small(d, 0.01),
        window_k: small(d, 5.0),
        window_reflected_k: small(d, 5.0),
    };
    let seed = d.u64();
    let m = d.len(200);
    let p = if d.bool() {
        0.95
    } else {
        d.f64(Kind::Fraction)
    };
    let args = || {
        format!("band {lo:e}..{hi:e} {detector:?}, scene {f:?}, T {t:e}, S {signal:e}, u {u:?}, seed {seed}, M {m}, p {p:e}")
    };
    let run = || {
        let mut rng = Xoshiro256StarStar::seed_from_u64(seed);
        let mut samples = vec![0.0; m];
        let r = surface_monte_carlo(&scene, &band, signal, &u, &mut rng, &mut samples, p);
        (r, samples)
    };
    let (r, samples) = timed(|| format!("surface_monte_carlo({})", args()), run);
    if let Ok(s) = r {
        check_summary(&s, &samples, &args);
        let (again, _) = run();
        oracle(again == r, || {
            format!("not reproducible: {r:?} vs {again:?}: {}", args())
        });
    }
}

fn check_summary(
    s: &bandtemp::uncertainty::MonteCarloSummary,
    samples: &[f64],
    args: &dyn Fn() -> String,
) {
    let iv = s.interval;
    oracle(
        finite(&[
            s.mean,
            s.standard_deviation,
            iv.low,
            iv.high,
            iv.shortest_low,
            iv.shortest_high,
        ]),
        || format!("non-finite summary {s:?}: {}", args()),
    );
    oracle(
        iv.low <= iv.high && iv.shortest_low <= iv.shortest_high && s.standard_deviation >= 0.0,
        || format!("summary {s:?}: {}", args()),
    );
    oracle(
        iv.shortest_high - iv.shortest_low <= (iv.high - iv.low) * (1.0 + 1e-15),
        || {
            format!(
                "shortest interval wider than the symmetric one: {s:?}: {}",
                args()
            )
        },
    );
    oracle(
        s.trials == samples.len() && samples.windows(2).all(|w| w[0] <= w[1]),
        || format!("samples not sorted: {}", args()),
    );
    let (first, last) = (samples[0], samples[samples.len() - 1]);
    let slack = 1e-12 * (first.abs() + last.abs());
    oracle(s.mean >= first - slack && s.mean <= last + slack, || {
        format!("mean {} outside [{first}, {last}]: {}", s.mean, args())
    });
}

fn generic(d: &mut Dec<'_>) {
    let m = d.len(300);
    let p = if d.bool() {
        0.95
    } else {
        d.f64(Kind::Fraction)
    };
    let values: Vec<f64> = (0..d.len(64).max(1)).map(|_| d.f64(Kind::Signed)).collect();
    let seed = [d.u64(), d.u64(), d.u64(), d.u64()];
    let args = || format!("M {m}, p {p:e}, values {values:?}, state {seed:?}");
    let Ok(mut rng) = Xoshiro256StarStar::from_state(seed) else {
        oracle(seed == [0; 4], || {
            format!("from_state refused a nonzero state: {}", args())
        });
        return;
    };
    let mut samples = vec![0.0; m];
    let mut i = 0usize;
    let r = timed(
        || format!("monte_carlo({})", args()),
        || {
            monte_carlo(&mut rng, &mut samples, p, |rng| {
                let v = values[i % values.len()] + rng.uniform();
                i += 1;
                Ok(v)
            })
        },
    );
    if let Ok(s) = r {
        check_summary(&s, &samples, &args);
    }
}

fn pieces(d: &mut Dec<'_>) {
    let mut samples: Vec<f64> = (0..d.len(300)).map(|_| d.f64(Kind::Signed)).collect();
    let p = d.f64(Kind::Fraction);
    let args = || format!("p {p:e}");
    if let Ok(iv) = timed(
        || format!("coverage_interval({})", args()),
        || coverage_interval(&mut samples, p),
    ) {
        oracle(
            finite(&[iv.low, iv.high, iv.shortest_low, iv.shortest_high]) && iv.low <= iv.high,
            || format!("{iv:?}"),
        );
        oracle(samples.windows(2).all(|w| w[0] <= w[1]), || {
            "coverage_interval left the samples unsorted".to_string()
        });
        let est = d.f64(Kind::Signed);
        let big_u = d.f64(Kind::Uncertainty);
        let tol = d.f64(Kind::Uncertainty);
        if let Ok(v) = validate_lpu(est, big_u, &iv, tol) {
            oracle(
                finite(&[v.d_low, v.d_high]) && v.passed == (v.d_low <= tol && v.d_high <= tol),
                || format!("{v:?}"),
            );
        }
    }
    let mut stats = RunningStats::new();
    for &x in &samples {
        let before = stats;
        if stats.push(x).is_err() {
            // Bit for bit: the running mean may already be inf or NaN after values near 1e308
            // (the variance then reports NonFinite).
            let same = stats.count == before.count
                && stats.mean.to_bits() == before.mean.to_bits()
                && stats.m2.to_bits() == before.m2.to_bits();
            oracle(same, || format!("RunningStats changed on an error: {x:e}"));
        }
    }
    if let Ok(var) = stats.variance() {
        oracle(var.is_finite() && var >= 0.0, || {
            format!("variance {var:e} of {} values", stats.count)
        });
    }
    let u = d.f64(Kind::Uncertainty);
    let digits = u32::from(d.u8() % 24);
    if let Ok(delta) = numerical_tolerance(u, digits) {
        // 10^l / 2 underflows to 0 for a subnormal u: still a valid (zero) tolerance.
        oracle(delta.is_finite() && delta >= 0.0, || {
            format!("numerical_tolerance({u:e}, {digits}) = {delta:e}")
        });
    }
}
