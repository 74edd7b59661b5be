//! Multi-point (piecewise-linear) non-uniformity correction and the emissivity-map path
//! of the fused corrected conversion, against values derived here outside the code under
//! test: the chord algebra of a quadratic pixel (written out below), two-point maps
//! ([`two_point`], Perry & Dereniak 1993) for N = 2, and the plain conversion of frames
//! corrected first, built from pixels whose exact corrected counts are whole numbers.

#![allow(clippy::needless_range_loop)]

use bandtemp::band::Band;
use bandtemp::frame::{
    multi_point, multi_point_map_len, two_point, Correction, CountsMap, DriftStep, FrameConverter,
    PixelStatus, Rails, StackStats, TableRow, TemperatureRange, BAD_ORDER, BAD_USER,
    MAX_NUC_LEVELS,
};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use bandtemp::Error;

/// Reads corrected counts from multi-point maps in f64 through the documented layout
/// (N - 1 gain planes, N - 1 offset planes, N - 2 breakpoint planes), with the segment
/// chosen from the raw signal s against the pixel's breakpoints.
fn corrected_from_maps(maps: &[f32], levels: usize, pixels: usize, p: usize, s: f64) -> f64 {
    let segments = levels - 1;
    let mut k = 0;
    for j in 1..segments {
        let b = f64::from(maps[2 * segments * pixels + (j - 1) * pixels + p]);
        if s >= b {
            k = j;
        }
    }
    f64::from(maps[k * pixels + p]) * s + f64::from(maps[segments * pixels + k * pixels + p])
}

/// Residual of a quadratic pixel S = a + b L + c L^2 after N-level piecewise-linear
/// correction. Derivation: on segment k (L_k <= L <= L_k+1) the pixel's chord through
/// its two levels is S_k + (S_k+1 - S_k)(L - L_k)/dL_k, and S(L) minus the chord is
/// c (L - L_k)(L - L_k+1) (a quadratic with leading coefficient c vanishing at both
/// ends). With G_k = (<S_k+1> - <S_k>)/(S_k+1 - S_k), the corrected
/// x = <S_k> + G_k (S(L) - S_k) minus the array's piecewise-linear response
/// <S_k> + (<S_k+1> - <S_k>)(L - L_k)/dL_k is therefore G_k c (L - L_k)(L - L_k+1): zero
/// at every level, -G_k c dL_k^2 / 4 at the segment's midpoint and no larger anywhere on
/// the segment. Unequal segments, so each segment's own bound is checked.
#[test]
fn piecewise_linear_residual_of_quadratic_pixels() {
    let levels_l = [20.0, 32.0, 50.0, 60.0, 90.0];
    let n = levels_l.len();
    let pixels = [
        (9000.0, 120.0, 0.0),
        (8700.0, 110.0, 0.05),
        (9300.0, 131.0, -0.08),
        (9100.0, 125.0, 0.02),
        (8950.0, 118.0, 0.11),
    ];
    let np = pixels.len();
    let s = |(a, b, c): (f64, f64, f64), l: f64| a + b * l + c * l * l;
    let means: Vec<Vec<f64>> = levels_l
        .iter()
        .map(|&l| pixels.iter().map(|&p| s(p, l)).collect())
        .collect();
    let zeros = vec![0.0; np];
    let stats: Vec<StackStats> = means
        .iter()
        .map(|m| StackStats::new(m, &zeros, 1).unwrap())
        .collect();
    let mut bad = vec![0u8; np];
    let mut maps = vec![0.0f32; multi_point_map_len(n, np).unwrap()];
    assert_eq!(maps.len(), (3 * n - 4) * np);
    let report = multi_point(&stats, &mut bad, &mut maps).unwrap();
    assert_eq!(
        (report.levels, report.good_pixels, report.order_flagged),
        (n, 5, 0)
    );
    // Array means, computed here.
    let m: Vec<f64> = means
        .iter()
        .map(|v| v.iter().sum::<f64>() / np as f64)
        .collect();
    for k in 0..n {
        assert!((report.level_means[k] - m[k]).abs() < 1e-9 * m[k]);
    }
    let array = |l: f64| {
        let k = (0..n - 1)
            .rev()
            .find(|&k| l >= levels_l[k])
            .unwrap_or(0)
            .min(n - 2);
        m[k] + (m[k + 1] - m[k]) * (l - levels_l[k]) / (levels_l[k + 1] - levels_l[k])
    };
    // f32 maps: 2^-24 relative on G (~1) and O (~1e4 counts) and on the breakpoints:
    // about 2e-3 counts, as for the two-point test.
    let tol = 2e-3;
    for (i, &p) in pixels.iter().enumerate() {
        for k in 0..n - 1 {
            let (l0, l1) = (levels_l[k], levels_l[k + 1]);
            let g = (m[k + 1] - m[k]) / (s(p, l1) - s(p, l0));
            let bound = (g * p.2).abs() * (l1 - l0).powi(2) / 4.0;
            let mut worst = 0.0f64;
            for step in 0..=40 {
                let l = l0 + (l1 - l0) * f64::from(step) / 40.0;
                let x = corrected_from_maps(&maps, n, np, i, s(p, l));
                let residual = x - array(l);
                let expected = g * p.2 * (l - l0) * (l - l1);
                assert!(
                    (residual - expected).abs() < tol,
                    "pixel {i} segment {k} L {l}: {residual} vs {expected}"
                );
                worst = worst.max(residual.abs());
            }
            assert!(
                worst <= bound + tol,
                "pixel {i} segment {k}: {worst} > {bound}"
            );
            // Zero at the levels, -G c dL^2/4 at the midpoint.
            for l in [l0, l1] {
                let x = corrected_from_maps(&maps, n, np, i, s(p, l));
                assert!((x - array(l)).abs() < tol, "pixel {i} level {l}");
            }
            let mid = 0.5 * (l0 + l1);
            let x = corrected_from_maps(&maps, n, np, i, s(p, mid));
            assert!((x - array(mid) + g * p.2 * (l1 - l0).powi(2) / 4.0).abs() < tol);
        }
        // Beyond the span: the end segments extrapolate, keeping their quadratic residual.
        for (l, k) in [(10.0, 0), (110.0, n - 2)] {
            let (l0, l1) = (levels_l[k], levels_l[k + 1]);
            let g = (m[k + 1] - m[k]) / (s(p, l1) - s(p, l0));
            let x = corrected_from_maps(&maps, n, np, i, s(p, l));
            let linear = m[k] + (m[k + 1] - m[k]) * (l - l0) / (l1 - l0);
            assert!(
                (x - linear - g * p.2 * (l - l0) * (l - l1)).abs() < tol,
                "{i} {l}"
            );
        }
    }
    // Against two-point maps over the whole span: the midpoint residual of pixel 4
    // is G c (70)^2/4 = 134 counts two-point, at most G c 30^2/4 = 25 counts here.
    let (mut g2, mut o2) = (vec![0.0f32; np], vec![0.0f32; np]);
    two_point(&stats[0], &stats[n - 1], None, &mut g2, &mut o2).unwrap();
    let l = 55.0;
    let two = f64::from(g2[4]) * s(pixels[4], l) + f64::from(o2[4]);
    let line = m[0] + (m[n - 1] - m[0]) * (l - 20.0) / 70.0;
    let multi = corrected_from_maps(&maps, n, np, 4, s(pixels[4], l)) - array(l);
    assert!(
        (two - line).abs() > 100.0 && multi.abs() < 25.0,
        "{two} {line} {multi}"
    );
}

/// N = 2 is two-point NUC: the same maps bit for bit, and the same conversion.
#[test]
fn two_levels_reproduce_two_point_bit_for_bit() {
    let np = 96;
    let low: Vec<f64> = (0..np)
        .map(|p| 9000.0 + 37.3 * ((p * 7) % 11) as f64)
        .collect();
    let high: Vec<f64> = (0..np)
        .map(|p| low[p] + 4000.0 * (1.0 + 0.013 * ((p * 5) % 9) as f64))
        .collect();
    let zeros = vec![0.0; np];
    let (ls, hs) = (
        StackStats::new(&low, &zeros, 4).unwrap(),
        StackStats::new(&high, &zeros, 4).unwrap(),
    );
    let mut bad = vec![0u8; np];
    bad[17] = BAD_USER;
    let (mut g, mut o) = (vec![0.0f32; np], vec![0.0f32; np]);
    let r2 = two_point(&ls, &hs, Some(&bad), &mut g, &mut o).unwrap();
    let mut maps = vec![0.0f32; 2 * np];
    let rm = multi_point(&[ls, hs], &mut bad, &mut maps).unwrap();
    assert_eq!(rm.level_means[0].to_bits(), r2.mean_low.to_bits());
    assert_eq!(rm.level_means[1].to_bits(), r2.mean_high.to_bits());
    assert_eq!(rm.good_pixels, r2.good_pixels);
    for p in 0..np {
        assert_eq!(maps[p].to_bits(), g[p].to_bits(), "gain {p}");
        assert_eq!(maps[np + p].to_bits(), o[p].to_bits(), "offset {p}");
    }
    let (conv_storage, frame) = (storage(), ramp(np));
    let mut rows = conv_storage;
    let conv = converter(&mut rows);
    let step = DriftStep { a: 1.002, b: -3.5 };
    let two = Correction::new(&g, &o, &bad, 12)
        .unwrap()
        .with_step(step)
        .unwrap();
    let multi = Correction::multi_point(&maps, 2, &bad, 12)
        .unwrap()
        .with_step(step)
        .unwrap();
    let (mut a, mut b) = (vec![0.0f32; np], vec![0.0f32; np]);
    let sa = conv.convert_counts_corrected(&two, &frame, &mut a).unwrap();
    let sb = conv
        .convert_counts_corrected(&multi, &frame, &mut b)
        .unwrap();
    assert_eq!(sa, sb);
    assert!(a.iter().zip(&b).all(|(x, y)| x.to_bits() == y.to_bits()));
    assert!(sa.frame.converted > 0 && sa.bad_replaced == 1);
}

fn storage() -> Vec<TableRow> {
    vec![[0.0; 4]; 256]
}

fn ramp(n: usize) -> Vec<u16> {
    (0..n).map(|i| (9000 + i * 397 % 30_000) as u16).collect()
}

/// Invented core: L = 0.002 W m^-2 sr^-1 per corrected count - 2, 8-14 um, 250-600 K.
fn converter(rows: &mut [TableRow]) -> FrameConverter<'_> {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    FrameConverter::new(
        &band,
        &Scene::new(0.95, 293.15).unwrap(),
        CountsMap::linear(0.002, -2.0).unwrap(),
        Rails::default(),
        TemperatureRange::new(250.0, 600.0).unwrap(),
        1e-3,
        rows,
    )
    .unwrap()
}

/// A frame whose exact corrected counts are whole numbers, so that correcting first and
/// converting the corrected counts with the plain conversion is possible without
/// rounding: pixels in groups of three whose raw span on each segment is D/2, D/2 and 2D
/// of the array's span D (permuted per group and segment), so the level means are the
/// chosen whole numbers <S_k>, every segment gain is 2, 2 or 1/2 and every offset a whole
/// number (all levels even). Returns (level stacks' means, raw frame, corrected frame).
struct ExactFrame {
    width: usize,
    levels: Vec<Vec<f64>>,
    raw: Vec<u16>,
    corrected: Vec<u16>,
}

const MEANS: [f64; 4] = [10_000.0, 14_000.0, 22_000.0, 34_000.0];

fn exact_frame() -> ExactFrame {
    let (width, height) = (12usize, 9usize);
    let np = width * height;
    let n = MEANS.len();
    let mut levels = vec![vec![0.0f64; np]; n];
    let spans = |group: usize, k: usize, member: usize| {
        let d = MEANS[k + 1] - MEANS[k];
        let pattern = [d / 2.0, d / 2.0, 2.0 * d];
        pattern[(member + group + k) % 3]
    };
    for p in 0..np {
        let (group, member) = (p / 3, p % 3);
        // Level-0 offsets summing to zero over the group: even whole numbers.
        let e = 2.0 * ((group * 7 % 13) as f64 - 6.0) * 10.0;
        let f = 2.0 * ((group * 3 % 5) as f64 - 2.0) * 14.0;
        levels[0][p] = MEANS[0] + [e, f, -e - f][member];
        for k in 0..n - 1 {
            levels[k + 1][p] = levels[k][p] + spans(group, k, member);
        }
    }
    // Corrected counts x: a ramp across the frame from below the first level to above
    // the last, even, whole; raw counts n from the pixel's own segment.
    let mut raw = vec![0u16; np];
    let mut corrected = vec![0u16; np];
    for p in 0..np {
        let x = 8_000.0 + 2.0 * ((p * 1237) % 14_000) as f64;
        let k = (0..n - 1)
            .rev()
            .find(|&k| x >= MEANS[k])
            .unwrap_or(0)
            .min(n - 2);
        let d = MEANS[k + 1] - MEANS[k];
        let g = d / (levels[k + 1][p] - levels[k][p]);
        let n_raw = levels[k][p] + (x - MEANS[k]) / g;
        assert_eq!(n_raw, n_raw.round());
        raw[p] = n_raw as u16;
        corrected[p] = x as u16;
    }
    ExactFrame {
        width,
        levels,
        raw,
        corrected,
    }
}

/// Bad pixels placed in flat patches of the corrected frame (so that the neighbour mean
/// is the patch's whole number), with the corrected frame made flat there.
fn plant_bad(f: &mut ExactFrame, bad: &mut [u8], at: &[usize]) {
    let w = f.width;
    for &p in at {
        let x = f.corrected[p];
        let (r, c) = (p / w, p % w);
        for rr in r - 1..=r + 1 {
            for cc in c - 1..=c + 1 {
                let q = rr * w + cc;
                f.corrected[q] = x;
                // Raw counts of q for corrected x, from q's own segment (levels even).
                let xf = f64::from(x);
                let n = MEANS.len();
                let k = (0..n - 1)
                    .rev()
                    .find(|&k| xf >= MEANS[k])
                    .unwrap_or(0)
                    .min(n - 2);
                let g = (MEANS[k + 1] - MEANS[k]) / (f.levels[k + 1][q] - f.levels[k][q]);
                f.raw[q] = (f.levels[k][q] + (xf - MEANS[k]) / g) as u16;
            }
        }
        bad[p] = BAD_USER;
        f.raw[p] = 123; // whatever a bad pixel reads
    }
}

fn build_maps(f: &ExactFrame, bad: &mut [u8]) -> Vec<f32> {
    let zeros = vec![0.0; f.raw.len()];
    let stats: Vec<StackStats> = f
        .levels
        .iter()
        .map(|m| StackStats::new(m, &zeros, 8).unwrap())
        .collect();
    let mut maps = vec![0.0f32; multi_point_map_len(stats.len(), f.raw.len()).unwrap()];
    let r = multi_point(&stats, bad, &mut maps).unwrap();
    for (k, m) in MEANS.iter().enumerate() {
        assert_eq!(r.level_means[k], *m, "the construction's means are exact");
    }
    maps
}

/// The fused multi-point conversion against correcting first (exact whole corrected
/// counts, neighbour mean for the bad pixels) and converting with the plain
/// conversion: bit for bit, summaries equal.
#[test]
fn fused_multi_point_is_correct_then_convert() {
    let mut f = exact_frame();
    let np = f.raw.len();
    let mut bad = vec![0u8; np];
    plant_bad(&mut f, &mut bad, &[13, 50, 94]);
    // Maps from every pixel (the construction's means need all of them), bad pixels
    // flagged for the conversion only.
    let maps = build_maps(&f, &mut vec![0u8; np]);
    let mut rows = storage();
    let conv = converter(&mut rows);
    let corr = Correction::multi_point(&maps, MEANS.len(), &bad, f.width).unwrap();
    assert_eq!(corr.segments(), 3);
    let (mut fused, mut plain) = (vec![0.0f32; np], vec![0.0f32; np]);
    let s = conv
        .convert_counts_corrected(&corr, &f.raw, &mut fused)
        .unwrap();
    let p = conv.convert_counts(&f.corrected, None, &mut plain).unwrap();
    assert_eq!(s.frame, p);
    assert_eq!((s.bad_replaced, s.bad_unreplaced), (3, 0));
    for i in 0..np {
        assert_eq!(fused[i].to_bits(), plain[i].to_bits(), "pixel {i}");
    }
    assert!(p.converted > np as u64 / 2, "{p:?}");
}

/// Emissivity-map path of the fused conversion, pixel for pixel against correcting
/// first and converting with the plain conversion's emissivity-map path: bit for bit
/// with the identity step (invalid emissivities included, counted alike); with a drift
/// step, against the plain conversion of the stepped corrected counts within the
/// rounding of the folded step (1 ulp of the scale: < 1 mK here).
#[test]
fn fused_emissivity_map_is_correct_then_convert() {
    let mut f = exact_frame();
    let np = f.raw.len();
    let mut bad = vec![0u8; np];
    plant_bad(&mut f, &mut bad, &[26, 65]);
    let maps = build_maps(&f, &mut vec![0u8; np]);
    let emissivity: Vec<f32> = (0..np)
        .map(|p| match p % 17 {
            3 => 0.0,
            5 => 1.5,
            7 => f32::NAN,
            _ => 0.3 + 0.7 * ((p * 13 % 29) as f32 / 28.0),
        })
        .collect();
    let mut rows = storage();
    let conv = converter(&mut rows);
    let corr = Correction::multi_point(&maps, MEANS.len(), &bad, f.width).unwrap();
    let (mut fused, mut plain) = (vec![0.0f32; np], vec![0.0f32; np]);
    let s = conv
        .convert_counts_corrected_emissivity(&corr, &f.raw, &emissivity, &mut fused)
        .unwrap();
    let p = conv
        .convert_counts(&f.corrected, Some(&emissivity), &mut plain)
        .unwrap();
    assert_eq!(s.frame, p);
    assert!(
        p.emissivity_invalid >= 15 && p.converted > np as u64 / 2,
        "{p:?}"
    );
    for i in 0..np {
        assert_eq!(fused[i].to_bits(), plain[i].to_bits(), "pixel {i}");
    }
    // Two-point maps (the N = 2 case) through the same path.
    let two_levels = ExactFrame {
        levels: vec![f.levels[0].clone(), f.levels[1].clone()],
        ..exact_frame()
    };
    let zeros = vec![0.0; np];
    let (mut g, mut o) = (vec![0.0f32; np], vec![0.0f32; np]);
    two_point(
        &StackStats::new(&two_levels.levels[0], &zeros, 1).unwrap(),
        &StackStats::new(&two_levels.levels[1], &zeros, 1).unwrap(),
        None,
        &mut g,
        &mut o,
    )
    .unwrap();
    let none = vec![0u8; np];
    let corr2 = Correction::new(&g, &o, &none, f.width).unwrap();
    // Corrected counts of the first segment's maps, exact (gains 2 or 1/2, even levels):
    // the raw frame through segment 0 only.
    let raw2: Vec<u16> = (0..np)
        .map(|p| (f.levels[0][p] as u16) + 2 * (p as u16 % 500))
        .collect();
    let x2: Vec<u16> = (0..np)
        .map(|p| (f64::from(g[p]) * f64::from(raw2[p]) + f64::from(o[p])) as u16)
        .collect();
    for p in 0..np {
        assert_eq!(
            f64::from(g[p]) * f64::from(raw2[p]) + f64::from(o[p]),
            f64::from(x2[p])
        );
    }
    let s2 = conv
        .convert_counts_corrected_emissivity(&corr2, &raw2, &emissivity, &mut fused)
        .unwrap();
    let p2 = conv
        .convert_counts(&x2, Some(&emissivity), &mut plain)
        .unwrap();
    assert_eq!(s2.frame, p2);
    assert!(fused
        .iter()
        .zip(&plain)
        .all(|(a, b)| a.to_bits() == b.to_bits()));

    // With a drift step x' = a x + b: the stepped counts are whole numbers again for
    // a = 1.25, b = -1000 and x a multiple of 4.
    let step = DriftStep {
        a: 1.25,
        b: -1000.0,
    };
    let corr = corr.with_step(step).unwrap();
    let keep: Vec<bool> = f.corrected.iter().map(|&x| x % 4 == 0).collect();
    let stepped: Vec<u16> = f
        .corrected
        .iter()
        .map(|&x| (1.25 * f64::from(x) - 1000.0) as u16)
        .collect();
    conv.convert_counts_corrected_emissivity(&corr, &f.raw, &emissivity, &mut fused)
        .unwrap();
    conv.convert_counts(&stepped, Some(&emissivity), &mut plain)
        .unwrap();
    let mut compared = 0;
    for i in 0..np {
        if !keep[i] || bad[i] != 0 {
            continue;
        }
        assert_eq!(fused[i].is_nan(), plain[i].is_nan(), "pixel {i}");
        if plain[i].is_finite() {
            assert!(
                (fused[i] - plain[i]).abs() < 1e-3,
                "pixel {i}: {} vs {}",
                fused[i],
                plain[i]
            );
            compared += 1;
        }
    }
    assert!(compared > 10, "{compared}");
}

/// Refusals and the per-pixel order rule: a pixel whose levels do not increase is
/// flagged [`BAD_ORDER`], counted, gets finite maps and is replaced in the conversion.
#[test]
fn multi_point_refuses_and_flags() {
    let np = 12usize;
    let lv = |base: f64| -> Vec<f64> { (0..np).map(|p| base + p as f64).collect() };
    let (l0, l1, l2) = (lv(10_000.0), lv(20_000.0), lv(35_000.0));
    fn st<'a>(m: &'a [f64]) -> StackStats<'a> {
        StackStats::new(m, &ZEROS[..m.len()], 2).unwrap()
    }
    let mut bad = vec![0u8; np];
    let mut maps = vec![7.0f32; multi_point_map_len(3, np).unwrap()];
    assert_eq!(
        multi_point(&[st(&l0)], &mut bad, &mut maps),
        Err(Error::NucLevelCount)
    );
    assert_eq!(
        multi_point(&[], &mut bad, &mut maps),
        Err(Error::NucLevelCount)
    );
    let many: Vec<StackStats> = (0..=MAX_NUC_LEVELS).map(|_| st(&l0)).collect();
    assert_eq!(
        multi_point(&many, &mut bad, &mut maps),
        Err(Error::NucLevelCount)
    );
    assert_eq!(multi_point_map_len(1, 5), Err(Error::NucLevelCount));
    assert_eq!(multi_point_map_len(3, 0), Err(Error::NucFrameEmpty));
    assert_eq!(
        multi_point_map_len(16, usize::MAX),
        Err(Error::NucMapStorageMismatch)
    );
    assert_eq!(
        multi_point(&[st(&l0), st(&l1), st(&l2)], &mut bad, &mut maps[1..]),
        Err(Error::NucMapStorageMismatch)
    );
    let short = vec![0.0; np - 1];
    assert_eq!(
        multi_point(&[st(&l0), st(&short), st(&l2)], &mut bad, &mut maps),
        Err(Error::FrameLengthMismatch)
    );
    // Levels out of order, or two at one radiance.
    assert_eq!(
        multi_point(&[st(&l0), st(&l2), st(&l1)], &mut bad, &mut maps),
        Err(Error::NucLevelsNotIncreasing)
    );
    assert_eq!(
        multi_point(&[st(&l0), st(&l1), st(&l1)], &mut bad, &mut maps),
        Err(Error::NucLevelsNotIncreasing)
    );
    let mut nan = l1.clone();
    nan[4] = f64::NAN;
    assert_eq!(
        multi_point(&[st(&l0), st(&nan), st(&l2)], &mut bad, &mut maps),
        Err(Error::NonFinite)
    );
    let mut all_bad = vec![BAD_USER; np];
    assert_eq!(
        multi_point(&[st(&l0), st(&l1), st(&l2)], &mut all_bad, &mut maps),
        Err(Error::NucNoGoodPixels)
    );
    assert!(
        maps.iter().all(|&v| v == 7.0) && bad.iter().all(|&b| b == 0),
        "untouched"
    );
    // NaN at a pixel already flagged is never read.
    bad[4] = BAD_USER;
    assert!(multi_point(&[st(&l0), st(&nan), st(&l2)], &mut bad, &mut maps).is_ok());
    bad[4] = 0;

    // Pixel 6 does not increase between levels 1 and 2; pixel 9 repeats level 0.
    let (mut m1, mut m2) = (l1.clone(), l2.clone());
    m2[6] = m1[6] - 5.0;
    m1[9] = l0[9];
    let r = multi_point(&[st(&l0), st(&m1), st(&m2)], &mut bad, &mut maps).unwrap();
    assert_eq!((r.order_flagged, r.good_pixels), (2, 10));
    assert_eq!((bad[6], bad[9]), (BAD_ORDER, BAD_ORDER));
    assert!(maps.iter().all(|v| v.is_finite()));
    let good: Vec<usize> = (0..np).filter(|&p| p != 6 && p != 9).collect();
    let mean = |m: &[f64]| good.iter().map(|&p| m[p]).sum::<f64>() / 10.0;
    assert_eq!(r.level_means[1], mean(&m1));
    // The flagged pixels are replaced, never NaN.
    let mut rows = storage();
    let conv = converter(&mut rows);
    let corr = Correction::multi_point(&maps, 3, &bad, 4).unwrap();
    let counts: Vec<u16> = (0..np).map(|p| 25_000 + 10 * p as u16).collect();
    let mut kelvin = vec![0.0f32; np];
    let s = conv
        .convert_counts_corrected(&corr, &counts, &mut kelvin)
        .unwrap();
    assert_eq!((s.bad_replaced, s.bad_unreplaced), (2, 0));
    assert_eq!(s.frame.converted, np as u64);
    assert!(kelvin[6].is_finite() && kelvin[9].is_finite());

    // One wild pixel (its last level far below everything) is flagged, never a refusal;
    // half the pixels not increasing is (the levels, not the pixels, are at fault).
    let mut wild = l2.clone();
    wild[2] = -1e9;
    let mut fresh = vec![0u8; np];
    let mut scratch_maps = maps.clone();
    let r = multi_point(
        &[st(&l0), st(&l1), st(&wild)],
        &mut fresh,
        &mut scratch_maps,
    )
    .unwrap();
    assert_eq!((r.order_flagged, fresh[2]), (1, BAD_ORDER));
    let mut half = l2.clone();
    for v in half.iter_mut().take(np / 2) {
        *v = 0.0;
    }
    let mut fresh = vec![0u8; np];
    assert_eq!(
        multi_point(
            &[st(&l0), st(&l1), st(&half)],
            &mut fresh,
            &mut scratch_maps
        ),
        Err(Error::NucLevelsNotIncreasing)
    );
    assert!(fresh.iter().all(|&f| f == 0));
    half[0] = l2[0];
    assert!(multi_point(
        &[st(&l0), st(&l1), st(&half)],
        &mut fresh,
        &mut scratch_maps
    )
    .is_ok());
    let mut again = bad.clone();
    let r = multi_point(&[st(&l0), st(&l1), st(&l2)], &mut again, &mut scratch_maps).unwrap();
    assert_eq!(r.order_flagged, 0, "pixels 6 and 9 were flagged already");

    // Correction::multi_point refusals.
    assert_eq!(
        Correction::multi_point(&maps, 3, &bad, 5).err(),
        Some(Error::NucGeometryInvalid)
    );
    assert_eq!(
        Correction::multi_point(&maps, 4, &bad, 4).err(),
        Some(Error::NucMapStorageMismatch)
    );
    assert_eq!(
        Correction::multi_point(&maps, 1, &bad, 4).err(),
        Some(Error::NucLevelCount)
    );
    let mut broken = maps.clone();
    broken[3] = -1.0; // gain of pixel 3, segment 0
    assert_eq!(
        Correction::multi_point(&broken, 3, &bad, 4).err(),
        Some(Error::NucMapInvalid)
    );
    broken[3] = maps[3];
    broken[4 * np + 3] = f32::INFINITY; // breakpoint of pixel 3
    assert_eq!(
        Correction::multi_point(&broken, 3, &bad, 4).err(),
        Some(Error::NucMapInvalid)
    );
    broken[4 * np + 6] = f32::NAN; // a bad pixel's breakpoint: never read
    broken[4 * np + 3] = maps[4 * np + 3];
    assert!(Correction::multi_point(&broken, 3, &bad, 4).is_ok());
    // Emissivity map of the wrong length.
    assert_eq!(
        conv.convert_counts_corrected_emissivity(&corr, &counts, &[0.9; 11], &mut kelvin),
        Err(Error::FrameLengthMismatch)
    );
}

static ZEROS: [f64; 64] = [0.0; 64];

/// A four-level breakpoint order check: decreasing breakpoint planes are refused.
#[test]
fn decreasing_breakpoints_are_refused() {
    let np = 4;
    let mut maps = vec![1.0f32; multi_point_map_len(4, np).unwrap()];
    // Offsets 0; breakpoint planes 1 and 2 at 100 and 200.
    for v in &mut maps[3 * np..6 * np] {
        *v = 0.0;
    }
    for p in 0..np {
        maps[6 * np + p] = 100.0;
        maps[7 * np + p] = 200.0;
    }
    let bad = vec![0u8; np];
    assert!(Correction::multi_point(&maps, 4, &bad, 2).is_ok());
    maps[7 * np + 1] = 99.0;
    assert_eq!(
        Correction::multi_point(&maps, 4, &bad, 2).err(),
        Some(Error::NucMapInvalid)
    );
    let mut flagged = bad.clone();
    flagged[1] = BAD_USER;
    assert!(Correction::multi_point(&maps, 4, &flagged, 2).is_ok());
    let _ = PixelStatus::Converted;
}
