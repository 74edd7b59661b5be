//! Criterion benchmarks: spectral radiance, rectangular band radiance, 100-point tabulated
//! band radiance and inversion, one group per operation with one entry per regime
//! (short-wave hot, long-wave cold, very narrow), each beside a baseline in the same run:
//! a straightforward adaptive Simpson quadrature of Planck's law over the band (relative
//! tolerance 1e-10) and bisection on it for the inversion.
//!
//! Run: `cargo bench --bench band`.

use bandtemp::band::{Band, SpectralTable};
use bandtemp::constants::{C1L_UM, C1P_UM, C2_UMK};
use bandtemp::planck::{spectral_radiance, Detector};
use criterion::{black_box, criterion_group, criterion_main, BenchmarkId, Criterion};

/// The invented 100-point response (tests/data, from tools/refgen/planck_refs.py).
const LWIR_100: &str = include_str!("../tests/data/response_invented_lwir_100.csv");

fn parse_table(text: &str) -> (Vec<f64>, Vec<f64>) {
    text.lines()
        .filter(|l| !l.starts_with('#') && !l.starts_with("wavelength"))
        .filter_map(|l| l.split_once(','))
        .map(|(w, r)| (w.parse::<f64>().unwrap(), r.parse::<f64>().unwrap()))
        .unzip()
}

/// The regimes: (name, lo_um, hi_um, detector, temperature_k).
const REGIMES: [(&str, f64, f64, Detector, f64); 4] = [
    (
        "short_hot_0.9-1.1um_1500K",
        0.9,
        1.1,
        Detector::Photon,
        1500.0,
    ),
    ("mid_3-5um_600K", 3.0, 5.0, Detector::Photon, 600.0),
    ("long_cold_8-14um_250K", 8.0, 14.0, Detector::Energy, 250.0),
    (
        "narrow_10-10.001um_300K",
        10.0,
        10.001,
        Detector::Energy,
        300.0,
    ),
];

// ------------------------------------------------------------------ baseline
/// Planck's law written out plainly (energy or photon), no validation.
fn planck(detector: Detector, wavelength_um: f64, temperature_k: f64) -> f64 {
    let x = C2_UMK / (wavelength_um * temperature_k);
    match detector {
        Detector::Energy => C1L_UM / wavelength_um.powi(5) / x.exp_m1(),
        Detector::Photon => C1P_UM / wavelength_um.powi(4) / x.exp_m1(),
    }
}

/// A Simpson panel: its ends, the integrand at ends and middle, and its Simpson estimate.
#[derive(Clone, Copy)]
struct Panel {
    a: f64,
    b: f64,
    fa: f64,
    fm: f64,
    fb: f64,
    whole: f64,
}

impl Panel {
    fn new<F: Fn(f64) -> f64>(f: &F, a: f64, b: f64, fa: f64, fb: f64) -> Panel {
        let fm = f(0.5 * (a + b));
        Panel {
            a,
            b,
            fa,
            fm,
            fb,
            whole: (b - a) / 6.0 * (fa + 4.0 * fm + fb),
        }
    }
}

/// Textbook adaptive Simpson on a panel to absolute tolerance `tol` (Richardson-corrected).
fn simpson_step<F: Fn(f64) -> f64>(f: &F, p: Panel, tol: f64, depth: u32) -> f64 {
    let m = 0.5 * (p.a + p.b);
    let left = Panel::new(f, p.a, m, p.fa, p.fm);
    let right = Panel::new(f, m, p.b, p.fm, p.fb);
    let delta = left.whole + right.whole - p.whole;
    if depth == 0 || delta.abs() <= 15.0 * tol {
        left.whole + right.whole + delta / 15.0
    } else {
        simpson_step(f, left, 0.5 * tol, depth - 1) + simpson_step(f, right, 0.5 * tol, depth - 1)
    }
}

/// Adaptive Simpson on [a, b] to relative tolerance `rel` of a coarse 16-panel estimate
/// (which guards against a first 3-point estimate that misses the peak).
fn adaptive_simpson<F: Fn(f64) -> f64>(f: &F, a: f64, b: f64, rel: f64) -> f64 {
    let n = 16;
    let h = (b - a) / f64::from(n);
    let mut coarse = 0.0;
    for i in 0..n {
        let x0 = a + h * f64::from(i);
        coarse += h / 6.0 * (f(x0) + 4.0 * f(x0 + 0.5 * h) + f(x0 + h));
    }
    simpson_step(f, Panel::new(f, a, b, f(a), f(b)), rel * coarse.abs(), 48)
}

fn baseline_rectangular(lo: f64, hi: f64, det: Detector, t: f64) -> f64 {
    adaptive_simpson(&|w| planck(det, w, t), lo, hi, 1e-10)
}

fn baseline_tabulated(table: &SpectralTable<'_>, det: Detector, t: f64) -> f64 {
    let (lo, hi) = table.span_um();
    adaptive_simpson(&|w| table.value_at(w) * planck(det, w, t), lo, hi, 1e-10)
}

/// Plain bisection on [1 K, 10 000 K] until the bracket is below 1e-9 T.
fn baseline_inversion<F: Fn(f64) -> f64>(radiance_at: F, target: f64) -> f64 {
    let (mut lo, mut hi) = (1.0_f64, 10_000.0_f64);
    while hi - lo > 1e-9 * lo {
        let mid = 0.5 * (lo + hi);
        if radiance_at(mid) < target {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

// ------------------------------------------------------------------ benches
fn spectral(c: &mut Criterion) {
    let mut group = c.benchmark_group("spectral_radiance");
    for (name, wavelength_um, temperature_k) in [
        ("short_hot_1um_1500K", 1.0, 1500.0),
        ("long_cold_10um_250K", 10.0, 250.0),
    ] {
        group.bench_function(BenchmarkId::new("bandtemp", name), |b| {
            b.iter(|| spectral_radiance(black_box(wavelength_um), black_box(temperature_k)));
        });
        group.bench_function(BenchmarkId::new("plain_formula", name), |b| {
            b.iter(|| {
                planck(
                    Detector::Energy,
                    black_box(wavelength_um),
                    black_box(temperature_k),
                )
            });
        });
    }
    group.finish();
}

fn rectangular(c: &mut Criterion) {
    let mut group = c.benchmark_group("rectangular_band_radiance");
    for (name, lo, hi, det, t) in REGIMES {
        let band = Band::rectangular(lo, hi, det).unwrap();
        group.bench_function(BenchmarkId::new("bandtemp", name), |b| {
            b.iter(|| black_box(&band).radiance(black_box(t)));
        });
        group.bench_function(BenchmarkId::new("baseline_simpson", name), |b| {
            b.iter(|| baseline_rectangular(lo, hi, det, black_box(t)));
        });
    }
    group.finish();
}

fn tabulated(c: &mut Criterion) {
    let (wavelengths_um, values) = parse_table(LWIR_100);
    assert_eq!(wavelengths_um.len(), 100);
    let table = SpectralTable::new(&wavelengths_um, &values).unwrap();
    let mut group = c.benchmark_group("tabulated_100pt_band_radiance");
    for (name, det, t) in [
        ("lwir_energy_300K", Detector::Energy, 300.0),
        ("lwir_photon_300K", Detector::Photon, 300.0),
        ("lwir_photon_1000K", Detector::Photon, 1000.0),
        ("lwir_energy_1500K", Detector::Energy, 1500.0),
        ("lwir_photon_1500K", Detector::Photon, 1500.0),
    ] {
        let band = Band::with_response(7.0, 14.5, det, table).unwrap();
        group.bench_function(BenchmarkId::new("bandtemp", name), |b| {
            b.iter(|| black_box(&band).radiance(black_box(t)));
        });
        group.bench_function(BenchmarkId::new("baseline_simpson", name), |b| {
            b.iter(|| baseline_tabulated(&table, det, black_box(t)));
        });
    }
    group.finish();
}

fn inversion(c: &mut Criterion) {
    let mut group = c.benchmark_group("inversion");
    for (name, lo, hi, det, t) in REGIMES {
        let band = Band::rectangular(lo, hi, det).unwrap();
        let radiance = band.radiance(t).unwrap();
        group.bench_function(BenchmarkId::new("bandtemp", name), |b| {
            b.iter(|| black_box(&band).temperature(black_box(radiance)));
        });
        group.bench_function(BenchmarkId::new("baseline_simpson_bisection", name), |b| {
            b.iter(|| {
                baseline_inversion(
                    |tt| baseline_rectangular(lo, hi, det, tt),
                    black_box(radiance),
                )
            });
        });
    }
    group.finish();
}

criterion_group!(benches, spectral, rectangular, tabulated, inversion);
criterion_main!(benches);
