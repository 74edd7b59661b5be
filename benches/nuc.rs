//! Raw-frame conversion speed: two-point NUC, drift step and bad-pixel replacement fused
//! into the table conversion (`convert_counts_corrected`), beside the plain conversion of
//! the same counts (`convert_counts`, the baseline) in the same run; the same with
//! four-level multi-point maps (three segments, two breakpoint planes), and the fused
//! emissivity-map path beside the plain emissivity-map conversion.
//!
//! The frame is invented: a 640x512 field of 280-600 K on a fictional 8-14 um
//! microbolometer core, with a seeded 5 % gain and 300-count offset spread and 0.1 % bad
//! pixels (about 330), encoded to raw counts through the inverse of the maps.

use bandtemp::band::Band;
use bandtemp::frame::{
    multi_point_map_len, Correction, CountsMap, DriftStep, FrameConverter, FrameTable, Rails,
    TableRow, TemperatureRange,
};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use criterion::{black_box, criterion_group, criterion_main, Criterion, Throughput};

const WIDTH: usize = 640;
const HEIGHT: usize = 512;

/// splitmix64: a seeded, portable generator.
fn next(state: &mut u64) -> f64 {
    *state = state.wrapping_add(0x9E37_79B9_7F4A_7C15);
    let mut z = *state;
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    ((z ^ (z >> 31)) >> 11) as f64 / (1u64 << 53) as f64
}

fn nuc(c: &mut Criterion) {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let scene = Scene::new(0.95, 295.0).unwrap();
    let gain = band.radiance(1500.0).unwrap() / 59_200.0;
    let offset = -800.0 * gain;
    let counts_map = CountsMap::linear(gain, offset).unwrap();
    let range = TemperatureRange::new(250.0, 1500.0).unwrap();
    let rows = FrameTable::required_rows(&band, range, 1e-3).unwrap();
    let mut storage: Vec<TableRow> = vec![[0.0; 4]; rows];
    let converter = FrameConverter::new(
        &band,
        &scene,
        counts_map,
        Rails::default(),
        range,
        1e-3,
        &mut storage,
    )
    .unwrap();
    let n = WIDTH * HEIGHT;
    let mut state = 2026u64;
    let mut g = Vec::with_capacity(n);
    let mut o = Vec::with_capacity(n);
    let mut bad = vec![0u8; n];
    let mut counts = Vec::with_capacity(n);
    for (p, flag) in bad.iter_mut().enumerate() {
        let (x, y) = (
            (p % WIDTH) as f64 / WIDTH as f64,
            (p / WIDTH) as f64 / HEIGHT as f64,
        );
        let object_k = 280.0 + 250.0 * x * x + 70.0 * y;
        let radiance = scene.sensor_signal(&band, object_k).unwrap();
        let ideal = (radiance - offset) / gain; // corrected counts
        let gp = 1.0 + 0.1 * (next(&mut state) - 0.5);
        let op = 600.0 * (next(&mut state) - 0.5);
        // Raw counts such that G n + O = ideal.
        counts.push(((ideal - op) / gp).round().clamp(0.0, 65535.0) as u16);
        g.push(gp as f32);
        o.push(op as f32);
        if next(&mut state) < 1e-3 {
            *flag = 1;
        }
    }
    let correction = Correction::new(&g, &o, &bad, WIDTH)
        .unwrap()
        .with_step(DriftStep { a: 1.0005, b: -0.5 })
        .unwrap();
    // Four-level maps: the two-point gain and offset on the middle segment, gains 0.3 %
    // higher below the first breakpoint and 0.3 % lower above the second (a mildly
    // non-linear pixel), offsets making every pixel's map continuous at its breakpoints.
    let levels = 4;
    let mut maps = vec![0.0f32; multi_point_map_len(levels, n).unwrap()];
    for p in 0..n {
        let (gp, op) = (f64::from(g[p]), f64::from(o[p]));
        let (b1, b2) = (
            15_000.0 + 50.0 * next(&mut state),
            30_000.0 + 50.0 * next(&mut state),
        );
        let (g0, g2) = (gp * 1.003, gp * 0.997);
        maps[p] = g0 as f32;
        maps[n + p] = gp as f32;
        maps[2 * n + p] = g2 as f32;
        maps[3 * n + p] = (op + (gp - g0) * b1) as f32;
        maps[4 * n + p] = op as f32;
        maps[5 * n + p] = (op + (gp - g2) * b2) as f32;
        maps[6 * n + p] = b1 as f32;
        maps[7 * n + p] = b2 as f32;
    }
    let multi = Correction::multi_point(&maps, levels, &bad, WIDTH)
        .unwrap()
        .with_step(DriftStep { a: 1.0005, b: -0.5 })
        .unwrap();
    let emissivity: Vec<f32> = (0..n)
        .map(|p| if (p % WIDTH) < WIDTH / 4 { 0.35 } else { 0.95 })
        .collect();
    let mut out = vec![0.0f32; n];
    let summary = converter
        .convert_counts_corrected(&correction, &counts, &mut out)
        .unwrap();
    eprintln!("fused summary: {summary:?}");

    let mut group = c.benchmark_group("raw_frame_640x512");
    group.throughput(Throughput::Elements(n as u64));
    group.bench_function("plain_convert_counts_baseline", |b| {
        b.iter(|| {
            black_box(
                converter
                    .convert_counts(black_box(&counts), None, &mut out)
                    .unwrap(),
            )
        });
    });
    group.bench_function("fused_nuc_drift_bad_pixels", |b| {
        b.iter(|| {
            black_box(
                converter
                    .convert_counts_corrected(black_box(&correction), black_box(&counts), &mut out)
                    .unwrap(),
            )
        });
    });
    group.bench_function("fused_multi_point_4_levels", |b| {
        b.iter(|| {
            black_box(
                converter
                    .convert_counts_corrected(black_box(&multi), black_box(&counts), &mut out)
                    .unwrap(),
            )
        });
    });
    group.bench_function("fused_multi_point_4_levels_with_map_check", |b| {
        b.iter(|| {
            let multi = Correction::multi_point(black_box(&maps), levels, black_box(&bad), WIDTH)
                .unwrap()
                .with_step(DriftStep { a: 1.0005, b: -0.5 })
                .unwrap();
            black_box(
                converter
                    .convert_counts_corrected(&multi, black_box(&counts), &mut out)
                    .unwrap(),
            )
        });
    });
    group.bench_function("plain_convert_counts_emissivity_map", |b| {
        b.iter(|| {
            black_box(
                converter
                    .convert_counts(black_box(&counts), Some(black_box(&emissivity)), &mut out)
                    .unwrap(),
            )
        });
    });
    group.bench_function("fused_emissivity_map", |b| {
        b.iter(|| {
            black_box(
                converter
                    .convert_counts_corrected_emissivity(
                        black_box(&correction),
                        black_box(&counts),
                        black_box(&emissivity),
                        &mut out,
                    )
                    .unwrap(),
            )
        });
    });
    group.bench_function("fused_with_map_check_per_frame", |b| {
        b.iter(|| {
            let correction = Correction::new(black_box(&g), black_box(&o), black_box(&bad), WIDTH)
                .unwrap()
                .with_step(DriftStep { a: 1.0005, b: -0.5 })
                .unwrap();
            black_box(
                converter
                    .convert_counts_corrected(&correction, black_box(&counts), &mut out)
                    .unwrap(),
            )
        });
    });
    group.finish();
}

criterion_group!(benches, nuc);
criterion_main!(benches);
