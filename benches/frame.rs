//! Frame conversion speed: a 640x512 u16 frame to f32 kelvin with the full scene
//! correction, beside the floor (a plain u16 -> f32 widening of the same frame) and exact
//! per-pixel inversion (`Scene::object_temperature` over the exact band radiance).
//!
//! The frame is invented: a fictional furnace-wall survey seen by a fictional 8-14 um
//! microbolometer core, temperatures 280-1200 K laid out as a smooth field with a hot
//! stripe, encoded to counts through the exact forward model.

use bandtemp::band::Band;
use bandtemp::frame::{CountsMap, FrameConverter, FrameTable, Rails, TableRow, TemperatureRange};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use criterion::{black_box, criterion_group, criterion_main, Criterion, Throughput};

const WIDTH: usize = 640;
const HEIGHT: usize = 512;

struct Setup {
    band: Band<'static>,
    scene: Scene,
    counts_map: CountsMap,
    counts: Vec<u16>,
    emissivity: Vec<f32>,
}

fn setup() -> Setup {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let scene = Scene::new(0.92, 295.0)
        .unwrap()
        .with_atmosphere(0.97, 293.0)
        .unwrap();
    // Invented radiometric calibration: 60 000 counts at 1500 K, 800 counts of offset.
    let gain = band.radiance(1500.0).unwrap() / 59_200.0;
    let offset = -800.0 * gain;
    let counts_map = CountsMap::linear(gain, offset).unwrap();
    let mut counts = Vec::with_capacity(WIDTH * HEIGHT);
    let mut emissivity = Vec::with_capacity(WIDTH * HEIGHT);
    for y in 0..HEIGHT {
        for x in 0..WIDTH {
            let u = x as f64 / WIDTH as f64;
            let v = y as f64 / HEIGHT as f64;
            let stripe = if (300..340).contains(&x) { 400.0 } else { 0.0 };
            let object_k = 280.0 + 500.0 * u * u + 120.0 * v + stripe;
            let e = 0.6 + 0.35 * v;
            let s = scene.with_emissivity(e).unwrap();
            let radiance = s.sensor_signal(&band, object_k).unwrap();
            let n = ((radiance - offset) / gain).round();
            counts.push(n.clamp(0.0, 65535.0) as u16);
            emissivity.push(e as f32);
        }
    }
    Setup {
        band,
        scene,
        counts_map,
        counts,
        emissivity,
    }
}

fn frame(c: &mut Criterion) {
    let s = setup();
    let range = TemperatureRange::new(250.0, 1500.0).unwrap();
    let rows = FrameTable::required_rows(&s.band, range, 1e-3).unwrap();
    let mut storage: Vec<TableRow> = vec![[0.0; 4]; rows];
    let converter = FrameConverter::new(
        &s.band,
        &s.scene,
        s.counts_map,
        Rails::default(),
        range,
        1e-3,
        &mut storage,
    )
    .unwrap();
    let mut out = vec![0.0f32; WIDTH * HEIGHT];
    let table = converter.table().geometry();
    eprintln!(
        "table: {} rows, {} bytes, level {}, max table error {:.3e} K, max pixel error {:.3e} K",
        table.rows(),
        table.bytes(),
        table.level(),
        table.max_table_error_k(),
        table.max_pixel_error_k()
    );
    let uniform = converter.convert_counts(&s.counts, None, &mut out).unwrap();
    let mapped = converter
        .convert_counts(&s.counts, Some(&s.emissivity), &mut out)
        .unwrap();
    eprintln!("uniform-scene summary: {uniform:?}\nemissivity-map summary: {mapped:?}");

    let mut group = c.benchmark_group("frame_640x512");
    group.throughput(Throughput::Elements((WIDTH * HEIGHT) as u64));
    group.bench_function("widen_u16_to_f32_floor", |b| {
        b.iter(|| {
            for (y, &n) in out.iter_mut().zip(black_box(&s.counts)) {
                *y = f32::from(n);
            }
            black_box(&mut out);
        });
    });
    group.bench_function("table_uniform_scene", |b| {
        b.iter(|| {
            black_box(
                converter
                    .convert_counts(black_box(&s.counts), None, &mut out)
                    .unwrap(),
            )
        });
    });
    for threads in [2usize, 4] {
        let n = std::num::NonZeroUsize::new(threads).unwrap();
        group.bench_function(
            format!("table_uniform_scene_parallel_{threads}_threads"),
            |b| {
                b.iter(|| {
                    black_box(
                        converter
                            .convert_counts_parallel(black_box(&s.counts), None, &mut out, n)
                            .unwrap(),
                    )
                });
            },
        );
    }
    group.bench_function("table_emissivity_map", |b| {
        b.iter(|| {
            black_box(
                converter
                    .convert_counts(
                        black_box(&s.counts),
                        Some(black_box(&s.emissivity)),
                        &mut out,
                    )
                    .unwrap(),
            )
        });
    });
    // The same frame as sensor signal (band radiance, W m^-2 sr^-1) in f32, through
    // `convert_signal`: the input of a camera whose counts are already linearised.
    let signal: Vec<f32> = s
        .counts
        .iter()
        .map(|&n| (s.counts_map.gain() * f64::from(n) + s.counts_map.offset()) as f32)
        .collect();
    let converted = converter.convert_signal(&signal, None, &mut out).unwrap();
    eprintln!("f32-signal summary: {converted:?}");
    group.bench_function("table_signal_f32_uniform_scene", |b| {
        b.iter(|| {
            black_box(
                converter
                    .convert_signal(black_box(&signal), None, &mut out)
                    .unwrap(),
            )
        });
    });
    group.bench_function("table_signal_f32_emissivity_map", |b| {
        b.iter(|| {
            black_box(
                converter
                    .convert_signal(black_box(&signal), Some(black_box(&s.emissivity)), &mut out)
                    .unwrap(),
            )
        });
    });
    // What every C call does before converting: re-wrap the stored state and rows, which
    // checks the geometry and recomputes the rows' fingerprint. Same frame, same run.
    let state = converter.state();
    let rows = converter.table().rows();
    group.bench_function("table_uniform_scene_rewrapped_each_frame", |b| {
        b.iter(|| {
            let again = FrameConverter::from_parts(black_box(state), black_box(rows)).unwrap();
            black_box(
                again
                    .convert_counts(black_box(&s.counts), None, &mut out)
                    .unwrap(),
            )
        });
    });
    group.sample_size(10);
    group.bench_function("exact_per_pixel_inversion", |b| {
        b.iter(|| {
            let gain = s.counts_map.gain();
            let offset = s.counts_map.offset();
            for (y, &n) in out.iter_mut().zip(black_box(&s.counts)) {
                let radiance = gain * f64::from(n) + offset;
                *y = s
                    .scene
                    .object_temperature(&s.band, radiance)
                    .map_or(f32::NAN, |t| t as f32);
            }
            black_box(&mut out);
        });
    });
    group.finish();
}

/// The re-wrap alone (geometry check and fingerprint of the rows), beside a copy of the
/// same rows' bytes as the floor.
fn rewrap(c: &mut Criterion) {
    let s = setup();
    let range = TemperatureRange::new(250.0, 1500.0).unwrap();
    let mut storage: Vec<TableRow> = vec![[0.0; 4]; 256];
    let converter = FrameConverter::new(
        &s.band,
        &s.scene,
        s.counts_map,
        Rails::default(),
        range,
        1e-3,
        &mut storage,
    )
    .unwrap();
    let state = converter.state();
    let rows = converter.table().rows();
    let mut group = c.benchmark_group("rewrap_61_rows");
    group.bench_function("copy_rows_floor", |b| {
        let mut copy = [[0.0f32; 4]; 61];
        b.iter(|| {
            for (y, x) in copy.iter_mut().zip(black_box(rows)) {
                *y = *x;
            }
            black_box(&mut copy);
        });
    });
    group.bench_function("from_parts_with_fingerprint", |b| {
        b.iter(|| {
            black_box(FrameConverter::from_parts(
                black_box(state),
                black_box(rows),
            ))
        });
    });
    group.finish();
}

/// Refusals of unservable ranges (each must come back without building rows), beside the
/// start-up of a servable 1 mK table in the same run.
fn refusal(c: &mut Criterion) {
    let mut group = c.benchmark_group("table_rows_refusal");
    group.sample_size(10);
    let nir = Band::rectangular(0.9, 1.1, Detector::Energy).unwrap();
    let lwir = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let absurd_hot = TemperatureRange::new(300.0, 1.39e25).unwrap();
    let absurd_wide = TemperatureRange::new(250.0, 1e6).unwrap();
    group.bench_function("nir_300k_to_1e25k_0.9k", |b| {
        b.iter(|| black_box(FrameTable::required_rows(&nir, black_box(absurd_hot), 0.9)));
    });
    group.bench_function("lwir_250k_to_1e6k_1mk", |b| {
        b.iter(|| {
            black_box(FrameTable::required_rows(
                &lwir,
                black_box(absurd_wide),
                1e-3,
            ))
        });
    });
    // The slowest refusal found: a blue photon band whose table passes its probes at
    // ~1250 rows, fails the full check, and the next level would exceed MAX_TABLE_ROWS.
    let blue = Band::rectangular(0.4, 0.5, Detector::Photon).unwrap();
    let blue_range = TemperatureRange::new(500.0, 5000.0).unwrap();
    group.bench_function("blue_photon_500_5000k_0.5mk_too_large", |b| {
        b.iter(|| {
            black_box(FrameTable::required_rows(
                &blue,
                black_box(blue_range),
                5e-4,
            ))
        });
    });
    let servable = TemperatureRange::new(250.0, 1200.0).unwrap();
    group.bench_function("lwir_250_1200k_1mk_servable", |b| {
        b.iter(|| black_box(FrameTable::required_rows(&lwir, black_box(servable), 1e-3)));
    });
    group.finish();
}

criterion_group!(benches, frame, rewrap, refusal);
criterion_main!(benches);
