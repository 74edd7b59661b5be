//! Criterion benchmarks over the whole operating grid: rectangular band radiance and its
//! inversion for six bands (0.65-0.66, 0.9-1.1, 1.5-1.6, 3-5, 8-14 and 8-9.4 um), both
//! detector kinds, at 250, 300, 400, 600, 900, 1250, 2000 and 3000 K (every point where
//! the radiance is a normal double).
//!
//! One group per regime (band and detector), one entry per temperature, and in every
//! group the baselines in the same run:
//! - `baseline_planck`: one evaluation of Planck's law written out plainly (`powi` and
//!   `exp_m1`) at the band's centre and 600 K, i.e. the cost of a single spectral value;
//! - `baseline_planck_inverse`: Planck's law inverted in closed form at the band's centre
//!   (`ln_1p`), the cost of a single-wavelength inversion.
//!
//! Run: `cargo bench --bench sweep` (short: `bash scripts/bench_sweep.sh`, which also
//! prints min / median / max per regime from criterion's estimates).

use bandtemp::band::Band;
use bandtemp::constants::{C1L_UM, C1P_UM, C2_UMK};
use bandtemp::planck::Detector;
use criterion::{black_box, criterion_group, criterion_main, BenchmarkId, Criterion};

/// The bands of the grid, um.
const BANDS: [(f64, f64); 6] = [
    (0.65, 0.66),
    (0.9, 1.1),
    (1.5, 1.6),
    (3.0, 5.0),
    (8.0, 14.0),
    (8.0, 9.4),
];
/// The temperatures of the grid, K.
const TEMPERATURES_K: [f64; 8] = [250.0, 300.0, 400.0, 600.0, 900.0, 1250.0, 2000.0, 3000.0];

/// Planck's law written out plainly (energy or photon), no validation.
fn planck(detector: Detector, wavelength_um: f64, temperature_k: f64) -> f64 {
    let x = C2_UMK / (wavelength_um * temperature_k);
    match detector {
        Detector::Energy => C1L_UM / wavelength_um.powi(5) / x.exp_m1(),
        Detector::Photon => C1P_UM / wavelength_um.powi(4) / x.exp_m1(),
    }
}

/// Planck's law inverted in closed form at one wavelength.
fn planck_inverse(detector: Detector, wavelength_um: f64, spectral: f64) -> f64 {
    let c1 = match detector {
        Detector::Energy => C1L_UM / wavelength_um.powi(5),
        Detector::Photon => C1P_UM / wavelength_um.powi(4),
    };
    C2_UMK / (wavelength_um * (c1 / spectral).ln_1p())
}

fn regime_name(lo_um: f64, hi_um: f64, detector: Detector) -> String {
    let kind = match detector {
        Detector::Energy => "energy",
        Detector::Photon => "photon",
    };
    format!("{lo_um}-{hi_um}um_{kind}")
}

fn sweep(c: &mut Criterion) {
    for (lo_um, hi_um) in BANDS {
        for detector in [Detector::Energy, Detector::Photon] {
            let band = Band::rectangular(lo_um, hi_um, detector).unwrap();
            let centre_um = 0.5 * (lo_um + hi_um);
            let regime = regime_name(lo_um, hi_um, detector);

            let mut group = c.benchmark_group(format!("radiance_{regime}"));
            group.bench_function("baseline_planck/600K", |b| {
                b.iter(|| planck(detector, black_box(centre_um), black_box(600.0)));
            });
            for temperature_k in TEMPERATURES_K {
                if band.radiance(temperature_k).is_err() {
                    continue; // below the normal double range: not part of the grid
                }
                group.bench_function(BenchmarkId::new("bandtemp", temperature_k), |b| {
                    b.iter(|| black_box(&band).radiance(black_box(temperature_k)));
                });
            }
            group.finish();

            let mut group = c.benchmark_group(format!("inversion_{regime}"));
            let spectral = planck(detector, centre_um, 600.0);
            group.bench_function("baseline_planck_inverse/600K", |b| {
                b.iter(|| planck_inverse(detector, black_box(centre_um), black_box(spectral)));
            });
            for temperature_k in TEMPERATURES_K {
                let Ok(radiance) = band.radiance(temperature_k) else {
                    continue;
                };
                group.bench_function(BenchmarkId::new("bandtemp", temperature_k), |b| {
                    b.iter(|| black_box(&band).temperature(black_box(radiance)));
                });
            }
            group.finish();
        }
    }
}

criterion_group!(benches, sweep);
criterion_main!(benches);
