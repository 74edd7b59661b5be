//! The grey scalar-transmittance shortcut against the spectral calculation: the
//! temperature error it makes for an 8-14 um microbolometer band at 10 m, 100 m and 1 km
//! and 20-90 % RH. Computes the table given in the README and checks it to its printed
//! digits, so the docs cannot drift from the code.
//!
//! Set-up (invented scenario, for illustration): blackbody object (emissivity 1, so only
//! the air matters), air at 25 C and 1013.25 hPa, rectangular 8-14 um band, energy
//! detector. The "truth" is the spectral measurement equation with the continuum model,
//!   S = int tau L(T_obj) + int (1 - tau) L(T_air).
//! The shortcuts invert S with the grey equation S = ta L(T) + (1 - ta) L(T_air)
//! (`Scene::with_atmosphere`), with
//!   A: ta = tau_eff(T_air), the band transmittance weighted by a blackbody at the air
//!      temperature (what a scalar calculation gives without knowing the object);
//!   B: ta = the plain wavelength mean of tau(lambda) over 8-14 um.
//! The error is T_shortcut - T_obj. Shortcut A is exact for an object at the air
//! temperature and errs more the further the object is from it.

use bandtemp::atmosphere::{Air, Path};
use bandtemp::band::Band;
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;

const AIR_K: f64 = 298.15;
const OBJECTS_K: [f64; 2] = [373.15, 773.15];

/// The README table: (distance m, RH, tau_eff(T_air), error A at 100 C, error A at 500 C,
/// tau mean, error B at 100 C, error B at 500 C). Errors in K, printed to 0.01 K;
/// transmittances to 0.001.
/// One printed row (see `TABLE`).
type Row = (f64, f64, f64, f64, f64, f64, f64, f64);

const TABLE: [Row; 12] = [
    (10.0, 0.2, 1.000, 0.00, 0.02, 1.000, 0.00, 0.03),
    (10.0, 0.5, 0.998, 0.01, 0.12, 0.998, 0.02, 0.15),
    (10.0, 0.7, 0.996, 0.02, 0.23, 0.996, 0.03, 0.29),
    (10.0, 0.9, 0.994, 0.04, 0.38, 0.994, 0.05, 0.47),
    (100.0, 0.2, 0.996, 0.02, 0.23, 0.996, 0.03, 0.28),
    (100.0, 0.5, 0.981, 0.13, 1.24, 0.980, 0.17, 1.51),
    (100.0, 0.7, 0.964, 0.24, 2.34, 0.962, 0.33, 2.86),
    (100.0, 0.9, 0.942, 0.38, 3.78, 0.939, 0.53, 4.62),
    (1000.0, 0.2, 0.964, 0.23, 2.31, 0.963, 0.33, 2.82),
    (1000.0, 0.5, 0.826, 1.22, 12.04, 0.820, 1.69, 14.72),
    (1000.0, 0.7, 0.702, 2.24, 22.19, 0.693, 3.10, 27.12),
    (1000.0, 0.9, 0.573, 3.48, 34.60, 0.561, 4.80, 42.24),
];

fn mean_transmittance(path: &Path, lo: f64, hi: f64) -> f64 {
    // Composite Simpson on 6000 intervals; tau is smooth (error far below 1e-10).
    let n = 6000;
    let h = (hi - lo) / f64::from(n);
    let mut sum = 0.0;
    for i in 0..=n {
        let w = if i == 0 || i == n {
            1.0
        } else if i % 2 == 1 {
            4.0
        } else {
            2.0
        };
        sum += w * path.spectral_transmittance(lo + h * f64::from(i)).unwrap();
    }
    sum * h / 3.0 / (hi - lo)
}

/// (tau_eff(T_air), [error A], tau_mean, [error B]) for one path.
fn shortcut_errors(distance_m: f64, rh: f64) -> (f64, [f64; 2], f64, [f64; 2]) {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let air = Air::new(AIR_K, rh, 1013.25).unwrap();
    let path = Path::new(air, distance_m).unwrap();
    let tau_air = path.band_transmittance(&band, AIR_K).unwrap();
    let tau_mean = mean_transmittance(&path, 8.0, 14.0);
    let path_radiance = path.band_path_radiance(&band).unwrap();
    let mut errors_a = [0.0; 2];
    let mut errors_b = [0.0; 2];
    for (i, object_k) in OBJECTS_K.into_iter().enumerate() {
        let model = bandtemp::atmosphere::PathTransmittance::Continuum(path);
        let signal = model.band_transmitted_radiance(&band, object_k).unwrap() + path_radiance;
        let grey = |ta: f64| {
            Scene::new(1.0, AIR_K)
                .unwrap()
                .with_atmosphere(ta, AIR_K)
                .unwrap()
                .object_temperature(&band, signal)
                .unwrap()
        };
        errors_a[i] = grey(tau_air) - object_k;
        errors_b[i] = grey(tau_mean) - object_k;
    }
    (tau_air, errors_a, tau_mean, errors_b)
}

#[test]
fn readme_table_is_what_the_code_computes() {
    for (d, rh, tau_air, a100, a500, tau_mean, b100, b500) in TABLE {
        let (ta, ea, tm, eb) = shortcut_errors(d, rh);
        println!(
            "| {d} m | {:.0} % | {ta:.3} | {:+.2} | {:+.2} | {tm:.3} | {:+.2} | {:+.2} |",
            rh * 100.0,
            ea[0],
            ea[1],
            eb[0],
            eb[1]
        );
        let close = |got: f64, printed: f64, half_digit: f64| {
            assert!(
                (got - printed).abs() <= half_digit + 1e-9,
                "{d} m {rh}: computed {got}, printed {printed}"
            );
        };
        close(ta, tau_air, 5e-4);
        close(tm, tau_mean, 5e-4);
        close(ea[0], a100, 5e-3);
        close(ea[1], a500, 5e-3);
        close(eb[0], b100, 5e-3);
        close(eb[1], b500, 5e-3);
    }
}

/// Shortcut A is exact for an object at the air temperature (the path-emission term is
/// exact for any grey scalar weighted at T_air), so its error is the object term alone.
#[test]
fn air_weighted_shortcut_is_exact_at_the_air_temperature() {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let path = Path::new(Air::new(AIR_K, 0.9, 1013.25).unwrap(), 1000.0).unwrap();
    let tau_air = path.band_transmittance(&band, AIR_K).unwrap();
    let model = bandtemp::atmosphere::PathTransmittance::Continuum(path);
    let signal = model.band_transmitted_radiance(&band, AIR_K).unwrap()
        + path.band_path_radiance(&band).unwrap();
    let t = Scene::new(1.0, AIR_K)
        .unwrap()
        .with_atmosphere(tau_air, AIR_K)
        .unwrap()
        .object_temperature(&band, signal)
        .unwrap();
    assert!((t - AIR_K).abs() < 1e-9, "{t}");
    // A cold object (0 C) through the same path: the shortcut errs the other way.
    let (ta, _, _, _) = shortcut_errors(1000.0, 0.9);
    assert!((ta - tau_air).abs() < 1e-15);
    let signal = model.band_transmitted_radiance(&band, 273.15).unwrap()
        + path.band_path_radiance(&band).unwrap();
    let t = Scene::new(1.0, AIR_K)
        .unwrap()
        .with_atmosphere(tau_air, AIR_K)
        .unwrap()
        .object_temperature(&band, signal)
        .unwrap();
    assert!(t < 273.15, "{t}");
}
