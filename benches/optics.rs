//! Criterion benchmarks of the optics and materials computations, each beside a baseline
//! in the same run:
//!
//! - hemispherical emissivity (40 geometric Gauss-Legendre panels) against a composite
//!   Simpson rule in mu with 20001 points, the straightforward way (a dielectric and a
//!   metal, whose grazing peak a uniform rule needs many points for);
//! - the small-target fraction against one Airy encircled energy (the p -> 0 limit it
//!   generalises), for a small and a larger target;
//! - the multi-wavelength fit (4 bands, linear ln e) against the band inversions of the
//!   same four signals (what a single-colour reading of each band costs).
//!
//! Run: `cargo bench --bench optics`.

use bandtemp::band::Band;
use bandtemp::emissivity::OpticalConstants;
use bandtemp::multiwavelength::{fit, EmissivityModel};
use bandtemp::optics::diffraction::{airy_encircled_energy, small_target_fraction};
use bandtemp::planck::Detector;
use criterion::{black_box, criterion_group, criterion_main, BenchmarkId, Criterion};

fn simpson_hemispherical(m: &OpticalConstants, points: usize) -> f64 {
    let n = points - 1;
    let h = 1.0 / n as f64;
    let f = |mu: f64| {
        let deg = mu.acos().to_degrees().min(89.999);
        2.0 * mu * m.directional(deg).unwrap().unpolarised
    };
    let mut sum = f(0.0) + f(1.0);
    for i in 1..n {
        sum += if i % 2 == 1 { 4.0 } else { 2.0 } * f(i as f64 * h);
    }
    sum * h / 3.0
}

fn hemispherical(c: &mut Criterion) {
    let mut group = c.benchmark_group("hemispherical_emissivity");
    for (name, n, k) in [
        ("glass_n1.5", 1.5, 0.0),
        ("metal_n54.75_k54.75", 54.75, 54.75),
    ] {
        let m = OpticalConstants::new(n, k).unwrap();
        group.bench_with_input(BenchmarkId::new("bandtemp", name), &m, |b, m| {
            b.iter(|| black_box(m).hemispherical());
        });
        group.bench_with_input(
            BenchmarkId::new("baseline_simpson_20001", name),
            &m,
            |b, m| {
                b.iter(|| simpson_hemispherical(black_box(m), 20_001));
            },
        );
    }
    group.finish();
}

fn small_target(c: &mut Criterion) {
    let mut group = c.benchmark_group("small_target_fraction");
    for (name, d) in [("17um_on_17um_pitch", 17.0), ("170um_on_17um_pitch", 170.0)] {
        group.bench_with_input(BenchmarkId::new("bandtemp", name), &d, |b, &d| {
            b.iter(|| small_target_fraction(black_box(d), 17.0, 10.0, 1.0).unwrap());
        });
        group.bench_with_input(BenchmarkId::new("baseline_airy_ee", name), &d, |b, &d| {
            b.iter(|| airy_encircled_energy(black_box(d) / 2.0, 10.0, 1.0).unwrap());
        });
    }
    group.finish();
}

fn multiwavelength(c: &mut Criterion) {
    let mut group = c.benchmark_group("multiwavelength_fit_4_bands");
    let bands = [0.7, 0.8, 0.9, 1.0]
        .map(|c| Band::rectangular(c - 0.005, c + 0.005, Detector::Energy).unwrap());
    let signals: Vec<f64> = bands
        .iter()
        .map(|b| {
            b.weighted_radiance_and_derivative(1500.0, &[], |l: f64| 0.4 * (-0.3 * l).exp())
                .unwrap()
                .0
        })
        .collect();
    group.bench_function("bandtemp_linear", |b| {
        b.iter(|| {
            fit(
                black_box(&bands),
                black_box(&signals),
                EmissivityModel::LINEAR,
            )
            .unwrap()
        });
    });
    group.bench_function("baseline_four_band_inversions", |b| {
        b.iter(|| {
            bands
                .iter()
                .zip(black_box(&signals))
                .map(|(band, &s)| band.temperature(s).unwrap())
                .sum::<f64>()
        });
    });
    group.finish();
}

criterion_group!(benches, hemispherical, small_target, multiwavelength);
criterion_main!(benches);
