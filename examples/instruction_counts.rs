//! Runs each operation of the grid a fixed number of times inside `measured` (or
//! `measured_frame`), so that `valgrind --tool=callgrind --dump-before=...` counts the
//! instructions of each region (see `scripts/instructions.sh`, which runs this and prints
//! the counts per call). Run alone, it only lists the measurements it makes, in order.
//!
//! The operations: rectangular band radiance and its inversion over the grid of
//! `benches/sweep.rs` (six bands, two detector kinds, 250-3000 K), band radiance over the
//! invented 100-point response of `benches/band.rs` (7-14.5 um, both detector kinds, 300 K
//! and 1500 K), and a 640x512 frame of invented counts converted by the table converter
//! (uniform scene and emissivity map).

use bandtemp::band::{Band, SpectralTable};
use bandtemp::frame::{CountsMap, FrameConverter, FrameTable, Rails, TableRow, TemperatureRange};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use std::hint::black_box;

/// Calls per measurement of a single-value operation.
const CALLS: u32 = 100;
const BANDS: [(f64, f64); 6] = [
    (0.65, 0.66),
    (0.9, 1.1),
    (1.5, 1.6),
    (3.0, 5.0),
    (8.0, 14.0),
    (8.0, 9.4),
];
const TEMPERATURES_K: [f64; 8] = [250.0, 300.0, 400.0, 600.0, 900.0, 1250.0, 2000.0, 3000.0];
/// The invented 100-point response of `benches/band.rs` (tests/data, from
/// tools/refgen/planck_refs.py).
const LWIR_100: &str = include_str!("../tests/data/response_invented_lwir_100.csv");
/// Temperatures of the tabulated band radiance, K.
const TABULATED_K: [f64; 2] = [300.0, 1500.0];
const WIDTH: usize = 640;
const HEIGHT: usize = 512;

/// One measurement: what it runs, on which point, and how many calls it makes.
enum Job<'a> {
    Radiance(&'a Band<'a>, f64),
    Inversion(&'a Band<'a>, f64),
}

/// The measured region. callgrind dumps its counters on entry, so a dump holds one region
/// and the few instructions of the loop that leads to the next.
#[inline(never)]
fn measured(job: &Job<'_>) {
    match *job {
        Job::Radiance(band, temperature_k) => {
            for _ in 0..CALLS {
                let _ = black_box(black_box(band).radiance(black_box(temperature_k)));
            }
        }
        Job::Inversion(band, radiance) => {
            for _ in 0..CALLS {
                let _ = black_box(black_box(band).temperature(black_box(radiance)));
            }
        }
    }
}

/// The wavelengths (um) and values of the 100-point response.
fn parse_table(text: &str) -> (Vec<f64>, Vec<f64>) {
    text.lines()
        .filter(|l| !l.starts_with('#') && !l.starts_with("wavelength"))
        .filter_map(|l| l.split_once(','))
        .filter_map(|(w, r)| Some((w.parse::<f64>().ok()?, r.parse::<f64>().ok()?)))
        .unzip()
}

fn main() -> Result<(), bandtemp::Error> {
    let (wavelengths_um, values) = parse_table(LWIR_100);
    let table = SpectralTable::new(&wavelengths_um, &values)?;
    let mut tabulated = Vec::new();
    for (detector, kind) in [(Detector::Energy, "energy"), (Detector::Photon, "photon")] {
        tabulated.push((
            Band::with_response(7.0, 14.5, detector, table)?,
            format!("100pt_7-14.5um_{kind}"),
        ));
    }
    let mut bands = Vec::new();
    for (lo_um, hi_um) in BANDS {
        for (detector, kind) in [(Detector::Energy, "energy"), (Detector::Photon, "photon")] {
            bands.push((
                Band::rectangular(lo_um, hi_um, detector)?,
                format!("{lo_um}-{hi_um}um_{kind}"),
            ));
        }
    }
    // Every job and label first, so that nothing but the loop runs between regions.
    let mut jobs = Vec::new();
    let mut labels = Vec::new();
    for (band, regime) in &bands {
        for temperature_k in TEMPERATURES_K {
            let Ok(radiance) = band.radiance(temperature_k) else {
                continue;
            };
            jobs.push(Job::Radiance(band, temperature_k));
            labels.push(format!("radiance {regime} {temperature_k} {CALLS}"));
            jobs.push(Job::Inversion(band, radiance));
            labels.push(format!("inversion {regime} {temperature_k} {CALLS}"));
        }
    }
    for (band, regime) in &tabulated {
        for temperature_k in TABULATED_K {
            jobs.push(Job::Radiance(band, temperature_k));
            labels.push(format!("tabulated {regime} {temperature_k} {CALLS}"));
        }
    }
    for job in &jobs {
        measured(job);
    }
    measured_end();
    // What runs from here to the first frame region is set-up, not measured.
    labels.push("setup - 0 1".to_string());
    frame(&mut labels)?;
    for label in labels {
        println!("{label}");
    }
    Ok(())
}

/// The frame of `benches/frame.rs`, rebuilt here: an invented furnace-wall survey through
/// an invented 8-14 um camera (280-1200 K, emissivity 0.6-0.95).
fn frame(labels: &mut Vec<String>) -> Result<(), bandtemp::Error> {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy)?;
    let scene = Scene::new(0.92, 295.0)?.with_atmosphere(0.97, 293.0)?;
    let gain = band.radiance(1500.0)? / 59_200.0;
    let offset = -800.0 * gain;
    let counts_map = CountsMap::linear(gain, offset)?;
    let mut counts = Vec::with_capacity(WIDTH * HEIGHT);
    let mut emissivity = Vec::with_capacity(WIDTH * HEIGHT);
    for y in 0..HEIGHT {
        for x in 0..WIDTH {
            let u = x as f64 / WIDTH as f64;
            let v = y as f64 / HEIGHT as f64;
            let stripe = if (300..340).contains(&x) { 400.0 } else { 0.0 };
            let object_k = 280.0 + 500.0 * u * u + 120.0 * v + stripe;
            let e = 0.6 + 0.35 * v;
            let radiance = scene.with_emissivity(e)?.sensor_signal(&band, object_k)?;
            let n = ((radiance - offset) / gain).round();
            counts.push(n.clamp(0.0, 65535.0) as u16);
            emissivity.push(e as f32);
        }
    }
    let range = TemperatureRange::new(250.0, 1500.0)?;
    let rows = FrameTable::required_rows(&band, range, 1e-3)?;
    let mut storage: Vec<TableRow> = vec![[0.0; 4]; rows];
    let converter = FrameConverter::new(
        &band,
        &scene,
        counts_map,
        Rails::default(),
        range,
        1e-3,
        &mut storage,
    )?;
    let mut out = vec![0.0f32; WIDTH * HEIGHT];
    let pixels = WIDTH * HEIGHT;
    labels.push(format!("frame_pixel uniform_scene 0 {pixels}"));
    measured_frame(&converter, &counts, None, &mut out);
    labels.push(format!("frame_pixel emissivity_map 0 {pixels}"));
    measured_frame(&converter, &counts, Some(&emissivity), &mut out);
    measured_end();
    Ok(())
}

/// Ends the region before it (its dump is taken on entry here).
#[inline(never)]
fn measured_end() {
    black_box(());
}

/// The measured region for frames (see [`measured`]).
#[inline(never)]
fn measured_frame(
    converter: &FrameConverter<'_>,
    counts: &[u16],
    emissivity: Option<&[f32]>,
    out: &mut [f32],
) {
    let _ = black_box(converter.convert_counts(black_box(counts), emissivity, out));
}
