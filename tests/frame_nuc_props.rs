//! Invariants of the non-uniformity stage under arbitrary input: two-point NUC of a
//! linear pixel model is exact (to f32 map rounding) at every radiance; the fused
//! conversion survives any bad-pixel pattern (all bad, a bad border, a bad column, random
//! flags) with a counted result and never lets a bad pixel change a good one.

use bandtemp::band::Band;
use bandtemp::frame::{
    multi_point, multi_point_map_len, two_point, Correction, CountsMap, FrameConverter, Rails,
    StackStats, TemperatureRange,
};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use proptest::prelude::*;

#[derive(Clone, Debug)]
enum Pattern {
    AllBad,
    Border,
    Column(usize),
    Random(Vec<bool>),
    None,
}

fn pattern() -> impl Strategy<Value = Pattern> {
    prop_oneof![
        Just(Pattern::AllBad),
        Just(Pattern::Border),
        (0usize..64).prop_map(Pattern::Column),
        prop::collection::vec(prop::bool::weighted(0.2), 1..=64 * 48).prop_map(Pattern::Random),
        Just(Pattern::None),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    /// S_p = a_p + b_p L with arbitrary a_p, b_p > 0: after two-point NUC every pixel
    /// reads the array's linear response <S_L> + (<S_H> - <S_L>)(L - L_L)/(L_H - L_L)
    /// at every L (within 4 f32 ulps of the largest term).
    #[test]
    fn linear_pixels_are_corrected_exactly(
        pixels in prop::collection::vec((0.0f64..20_000.0, 10.0f64..500.0), 2..40),
        ll in 5.0f64..40.0,
        span in 5.0f64..80.0,
        l in 0.0f64..150.0,
    ) {
        let lh = ll + span;
        let low: Vec<f64> = pixels.iter().map(|&(a, b)| a + b * ll).collect();
        let high: Vec<f64> = pixels.iter().map(|&(a, b)| a + b * lh).collect();
        let zeros = vec![0.0; pixels.len()];
        let (mut g, mut o) = (vec![0.0f32; pixels.len()], vec![0.0f32; pixels.len()]);
        let r = two_point(
            &StackStats::new(&low, &zeros, 1).unwrap(),
            &StackStats::new(&high, &zeros, 1).unwrap(),
            None, &mut g, &mut o,
        ).unwrap();
        let array = r.mean_low + (r.mean_high - r.mean_low) * (l - ll) / (lh - ll);
        for (i, &(a, b)) in pixels.iter().enumerate() {
            let s = a + b * l;
            let x = f64::from(g[i]) * s + f64::from(o[i]);
            let scale = (f64::from(g[i]) * s).abs() + f64::from(o[i]).abs() + array.abs();
            prop_assert!((x - array).abs() <= 4.0 * f64::from(f32::EPSILON) * scale,
                "pixel {}: {} vs {}", i, x, array);
        }
    }

    /// The same for multi-point maps: S_p = a_p + b_p L with N = 2..8 levels at arbitrary
    /// increasing radiances; every segment's map (not only the one the raw value picks)
    /// maps the pixel onto the array's response <S_0> + (<S_N-1> - <S_0>)(L - L_0) /
    /// (L_N-1 - L_0), which is linear because every pixel is (within 4 f32 ulps of the
    /// largest term per map, as above).
    #[test]
    fn linear_pixels_are_exact_for_any_number_of_levels(
        pixels in prop::collection::vec((0.0f64..20_000.0, 10.0f64..500.0), 2..30),
        first in 5.0f64..40.0,
        steps in prop::collection::vec(1.0f64..40.0, 1..8),
        l in 0.0f64..200.0,
    ) {
        let mut levels = vec![first];
        for d in &steps {
            levels.push(levels[levels.len() - 1] + d);
        }
        let n = levels.len();
        let np = pixels.len();
        let means: Vec<Vec<f64>> = levels.iter()
            .map(|&ll| pixels.iter().map(|&(a, b)| a + b * ll).collect()).collect();
        let zeros = vec![0.0; np];
        let stats: Vec<StackStats> = means.iter().map(|m| StackStats::new(m, &zeros, 1).unwrap()).collect();
        let mut bad = vec![0u8; np];
        let mut maps = vec![0.0f32; multi_point_map_len(n, np).unwrap()];
        let r = multi_point(&stats, &mut bad, &mut maps).unwrap();
        prop_assert_eq!(r.order_flagged, 0);
        let (m0, m1) = (r.level_means[0], r.level_means[n - 1]);
        let array = m0 + (m1 - m0) * (l - levels[0]) / (levels[n - 1] - levels[0]);
        let segments = n - 1;
        for (i, &(a, b)) in pixels.iter().enumerate() {
            let s = a + b * l;
            for k in 0..segments {
                let g = f64::from(maps[k * np + i]);
                let o = f64::from(maps[(segments + k) * np + i]);
                let x = g * s + o;
                let scale = (g * s).abs() + o.abs() + array.abs();
                prop_assert!((x - array).abs() <= 4.0 * f64::from(f32::EPSILON) * scale,
                    "pixel {} segment {}: {} vs {}", i, k, x, array);
            }
            for j in 1..segments {
                let b_j = maps[(2 * segments + j - 1) * np + i];
                prop_assert_eq!(b_j, (a + b * levels[j]) as f32);
            }
        }
    }

    #[test]
    fn any_bad_pattern_gives_a_counted_result(
        w in 1usize..64,
        h in 1usize..48,
        pat in pattern(),
        seed in any::<u64>(),
    ) {
        let n = w * h;
        let bad: Vec<u8> = (0..n).map(|p| {
            let (r, c) = (p / w, p % w);
            u8::from(match &pat {
                Pattern::AllBad => true,
                Pattern::Border => r == 0 || c == 0 || r + 1 == h || c + 1 == w,
                Pattern::Column(k) => c == k % w,
                Pattern::Random(v) => v.get(p).copied().unwrap_or(false),
                Pattern::None => false,
            })
        }).collect();
        let mut state = seed;
        let mut next = || { state = state.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407); (state >> 33) as u32 };
        let counts: Vec<u16> = (0..n).map(|_| (next() % 65536) as u16).collect();
        let g: Vec<f32> = (0..n).map(|_| 0.8 + (next() % 1000) as f32 * 4e-4).collect();
        let o: Vec<f32> = (0..n).map(|_| (next() % 2000) as f32 - 1000.0).collect();
        let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
        let scene = Scene::new(0.95, 293.15).unwrap();
        let mut storage = vec![[0.0f32; 4]; 128];
        let conv = FrameConverter::new(&band, &scene, CountsMap::linear(0.002, -2.0).unwrap(),
            Rails::new(10, 65000).unwrap(), TemperatureRange::new(250.0, 1500.0).unwrap(), 1e-3,
            &mut storage).unwrap();
        let corr = Correction::new(&g, &o, &bad, w).unwrap();
        let mut kelvin = vec![0.0f32; n];
        let s = conv.convert_counts_corrected(&corr, &counts, &mut kelvin).unwrap();
        let f = s.frame;
        prop_assert_eq!(f.pixels, n as u64);
        prop_assert_eq!(f.pixels, f.converted + f.dead + f.saturated + f.emissivity_invalid
            + f.non_finite + f.below_background + f.below_range + f.above_range);
        let n_bad = bad.iter().filter(|&&b| b != 0).count() as u64;
        prop_assert_eq!(s.bad_replaced + s.bad_unreplaced, n_bad);
        prop_assert_eq!(f.non_finite, 0);
        let nans = kelvin.iter().filter(|t| t.is_nan()).count() as u64;
        prop_assert_eq!(nans, f.pixels - f.converted);
        if matches!(pat, Pattern::AllBad) {
            prop_assert_eq!(s.bad_unreplaced, n as u64);
        }
        // Good pixels are exactly what the same maps give without any bad pixel.
        let none = vec![0u8; n];
        let mut clean = vec![0.0f32; n];
        conv.convert_counts_corrected(&Correction::new(&g, &o, &none, w).unwrap(), &counts, &mut clean).unwrap();
        for p in 0..n {
            if bad[p] == 0 {
                prop_assert_eq!(kelvin[p].to_bits(), clean[p].to_bits(), "pixel {}", p);
            }
        }
    }
}
