//! The random generators and streaming statistics of the Monte Carlo method.
//!
//! Reference vectors: SplitMix64 and xoshiro256** outputs produced by the authors'
//! reference C implementations (splitmix64.c, xoshiro256starstar.c at prng.di.unimi.it),
//! as published in the test suite of the `rand_xoshiro` crate (rust-random/rngs).

use approx::assert_relative_eq;
use bandtemp::uncertainty::{monte_carlo_streaming, RunningStats, SplitMix64, Xoshiro256StarStar};
use bandtemp::Error;

#[test]
fn splitmix64_reference_vector() {
    let mut g = SplitMix64::new(1_477_776_061_723_855_037);
    let expected: [u64; 6] = [
        1_985_237_415_132_408_290,
        2_979_275_885_539_914_483,
        13_511_426_838_097_143_398,
        8_488_337_342_461_049_707,
        15_141_737_807_933_549_159,
        17_093_170_987_380_407_015,
    ];
    for e in expected {
        assert_eq!(g.next_u64(), e);
    }
}

#[test]
fn xoshiro256starstar_reference_vector() {
    let mut g = Xoshiro256StarStar::from_state([1, 2, 3, 4]).unwrap();
    let expected: [u64; 10] = [
        11_520,
        0,
        1_509_978_240,
        1_215_971_899_390_074_240,
        1_216_172_134_540_287_360,
        607_988_272_756_665_600,
        16_172_922_978_634_559_625,
        8_476_171_486_693_032_832,
        10_595_114_339_597_558_777,
        2_904_607_092_377_533_576,
    ];
    for e in expected {
        assert_eq!(g.next_u64(), e);
    }
    assert_eq!(
        Xoshiro256StarStar::from_state([0; 4]),
        Err(Error::RandomStateZero)
    );
}

#[test]
fn seeding_is_reproducible_and_seed_dependent() {
    let mut a = Xoshiro256StarStar::seed_from_u64(42);
    let mut b = Xoshiro256StarStar::seed_from_u64(42);
    let mut c = Xoshiro256StarStar::seed_from_u64(43);
    let xa: Vec<f64> = (0..100).map(|_| a.normal(1.0, 2.0)).collect();
    let xb: Vec<f64> = (0..100).map(|_| b.normal(1.0, 2.0)).collect();
    let xc: Vec<f64> = (0..100).map(|_| c.normal(1.0, 2.0)).collect();
    assert_eq!(xa, xb);
    assert_ne!(xa, xc);
}

#[test]
fn deviates_have_their_distributions_moments() {
    // N = 1e6 at a fixed seed; tolerances are 5 standard errors of each statistic.
    let n = 1_000_000;
    let mut g = Xoshiro256StarStar::seed_from_u64(7);
    let mut uniform = RunningStats::new();
    let mut normal = RunningStats::new();
    let mut rect = RunningStats::new();
    let mut tail = 0u32;
    for _ in 0..n {
        let u = g.uniform();
        assert!((0.0..1.0).contains(&u));
        uniform.push(u).unwrap();
        let z = g.standard_normal();
        if z > 1.959_963_984_540_054 {
            tail += 1; // P(Z > 1.96) = 0.025 (normal quantile, scipy.stats.norm.ppf)
        }
        normal.push(z).unwrap();
        rect.push(g.rectangular(5.0, 2.0)).unwrap();
    }
    let nf = n as f64;
    assert!((uniform.mean - 0.5).abs() < 5.0 * (1.0 / 12.0_f64).sqrt() / nf.sqrt());
    assert!((uniform.variance().unwrap() - 1.0 / 12.0).abs() < 5.0 * 0.0745 / nf.sqrt());
    assert!(normal.mean.abs() < 5.0 / nf.sqrt());
    assert!((normal.variance().unwrap() - 1.0).abs() < 5.0 * 2.0_f64.sqrt() / nf.sqrt());
    let p = f64::from(tail) / nf;
    assert!((p - 0.025).abs() < 5.0 * (0.025 * 0.975 / nf).sqrt(), "{p}");
    // Rectangular, half-width a: sd = a / sqrt(3) (JCGM 101:2008 6.4.2).
    assert!((rect.mean - 5.0).abs() < 5.0 * 1.155 / nf.sqrt());
    assert!((rect.standard_deviation().unwrap() - 2.0 / 3.0_f64.sqrt()).abs() < 5e-3);
}

#[test]
fn welford_matches_two_pass_on_offset_data() {
    // A large offset ruins the naive sum-of-squares formula; Welford keeps full precision.
    let values: Vec<f64> = (0..1000).map(|i| 1e9 + f64::from(i % 7) * 0.1).collect();
    let mut s = RunningStats::new();
    for &v in &values {
        s.push(v).unwrap();
    }
    // Reference: two passes on v - 1e9, which is exact (Sterbenz) and small.
    let d: Vec<f64> = values.iter().map(|v| v - 1e9).collect();
    let mean_d = d.iter().sum::<f64>() / 1000.0;
    let var = d.iter().map(|x| (x - mean_d) * (x - mean_d)).sum::<f64>() / 999.0;
    // The naive one-pass formula loses everything here: (sum v^2 - n mean^2) / (n - 1).
    let naive =
        (values.iter().map(|v| v * v).sum::<f64>() - 1000.0 * (1e9 + mean_d).powi(2)) / 999.0;
    assert!((naive - var).abs() > 100.0 * var);
    assert!((s.mean - (1e9 + mean_d)).abs() < 1e-6);
    // Welford's running mean sits at 1e9 with a half-ulp of 6e-8, against deviations of
    // 0.2: a relative floor near 1e-7 per step that averages down (measured: 7e-9).
    assert_relative_eq!(s.variance().unwrap(), var, max_relative = 1e-7);
    assert_eq!(RunningStats::new().variance(), Err(Error::TooFewTrials));
    let mut one = RunningStats::new();
    one.push(1.0).unwrap();
    assert_eq!(one.standard_deviation(), Err(Error::TooFewTrials));
    assert_eq!(one.push(f64::NAN), Err(Error::NonFinite));
    assert_eq!(one.count, 1);
}

#[test]
fn streaming_monte_carlo() {
    let mut g = Xoshiro256StarStar::seed_from_u64(3);
    let s = monte_carlo_streaming(&mut g, 100_000, |r| Ok(r.normal(10.0, 0.5))).unwrap();
    assert_eq!(s.count, 100_000);
    assert!((s.mean - 10.0).abs() < 5.0 * 0.5 / 316.2);
    assert!((s.standard_deviation().unwrap() - 0.5).abs() < 5.0 * 0.5 / 447.2);
    assert_eq!(
        monte_carlo_streaming(&mut g, 1, |_| Ok(0.0)).map(|s| s.count),
        Err(Error::TooFewTrials)
    );
    assert_eq!(
        monte_carlo_streaming(&mut g, 10, |_| Err(Error::SignalBelowBackground)).map(|s| s.count),
        Err(Error::SignalBelowBackground)
    );
}
