//! The scene module against references outside the project: mpmath vectors of worked
//! scenes (grey and spectral, `tools/refgen/scene_refs.py`), the Stefan-Boltzmann closed
//! form over a very wide band, and the Wien-approximation emissivity sensitivity.

use bandtemp::band::{Band, SignalCurve, SpectralTable};
use bandtemp::constants::{C2_UMK, STEFAN_BOLTZMANN_W_M2_K4};
use bandtemp::planck::{blackbody_fraction, blackbody_fraction_complement, Detector};
use bandtemp::scene::{Scene, SpectralScene};
use core::f64::consts::PI;
use std::collections::HashMap;

// ---- tolerances (one place) ---------------------------------------------------------------
/// Relative tolerance on band signals: the band integrals are good to 1e-13 relative.
const SIGNAL_REL: f64 = 1e-12;
/// Absolute tolerance on solved temperatures, K.
const TEMPERATURE_ABS_K: f64 = 1e-9;
/// Spectral mode: Gauss-Legendre panels (1e-13 relative) and a Newton stop at 1e-12 T.
const SPECTRAL_TEMPERATURE_ABS_K: f64 = 1e-8;
/// Analytic sensitivities against mpmath.diff of the inverted equation.
const SENSITIVITY_REL: f64 = 1e-12;

fn close(actual: f64, expected: f64, rel: f64, abs: f64) -> bool {
    (actual - expected).abs() <= abs + rel * expected.abs()
}

/// Rows of a CSV in tests/data (comment lines start with '#'), keyed by header names. The
/// last column may be a quoted free-text note; it is not parsed.
fn read_csv(name: &str) -> Vec<HashMap<String, String>> {
    let path = format!("{}/tests/data/{name}", env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{path}: {e}"));
    let mut lines = text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.is_empty());
    let header: Vec<String> = lines
        .next()
        .expect("header")
        .split(',')
        .map(str::to_owned)
        .collect();
    lines
        .map(|line| {
            let fields = line.splitn(header.len(), ',');
            header
                .iter()
                .cloned()
                .zip(fields.map(str::to_owned))
                .collect()
        })
        .collect()
}

fn num(row: &HashMap<String, String>, key: &str) -> f64 {
    row[key]
        .parse()
        .unwrap_or_else(|_| panic!("{key} = {} is not a number", row[key]))
}

fn detector(row: &HashMap<String, String>) -> Detector {
    match row["detector"].as_str() {
        "energy" => Detector::Energy,
        "photon" => Detector::Photon,
        other => panic!("unknown detector {other}"),
    }
}

fn scene_of(row: &HashMap<String, String>) -> Scene {
    Scene::new(num(row, "emissivity"), num(row, "reflected_k"))
        .and_then(|s| s.with_atmosphere(num(row, "atm_transmittance"), num(row, "atm_k")))
        .and_then(|s| {
            s.with_window(
                num(row, "window_transmittance"),
                num(row, "window_reflectance"),
                num(row, "window_k"),
                num(row, "window_reflected_k"),
            )
        })
        .expect("valid scene")
}

// ---- worked grey cases ---------------------------------------------------------------------

/// Motor housing behind a window, bus bar with a hot background, furnace wall through 20 m
/// of humid air (transmittance assumed), kiln through a viewport (photon detector): all
/// invented scenes, computed independently with mpmath.
#[test]
fn worked_cases_match_mpmath() {
    let rows = read_csv("scene_cases.csv");
    assert_eq!(rows.len(), 4);
    let (mut worst_signal_rel, mut worst_k): (f64, f64) = (0.0, 0.0);
    for row in &rows {
        let name = &row["name"];
        let band = Band::rectangular(num(row, "lo_um"), num(row, "hi_um"), detector(row)).unwrap();
        let scene = scene_of(row);
        let object_k = num(row, "object_k");
        let signal = num(row, "sensor_signal");
        let apparent_k = num(row, "apparent_k");

        let terms = scene.grey_terms(&band).unwrap();
        assert!(
            close(terms.gain, num(row, "gain"), 1e-15, 0.0),
            "{name} gain"
        );
        assert!(
            close(terms.background, num(row, "background"), SIGNAL_REL, 0.0),
            "{name} background {} vs {}",
            terms.background,
            num(row, "background")
        );
        let s = scene.sensor_signal(&band, object_k).unwrap();
        assert!(
            close(s, signal, SIGNAL_REL, 0.0),
            "{name} signal {s} vs {signal}"
        );
        let t_app = scene.apparent_temperature(&band, object_k).unwrap();
        assert!(
            close(t_app, apparent_k, 0.0, TEMPERATURE_ABS_K),
            "{name} apparent {t_app} vs {apparent_k}"
        );
        // The site question: correct the apparent reading to the object temperature.
        let t = scene
            .object_temperature_from_apparent(&band, apparent_k)
            .unwrap();
        assert!(
            close(t, object_k, 0.0, TEMPERATURE_ABS_K),
            "{name} object {t} vs {object_k}"
        );
        let t = scene.object_temperature(&band, signal).unwrap();
        assert!(
            close(t, object_k, 0.0, TEMPERATURE_ABS_K),
            "{name} object from S"
        );
        worst_signal_rel = worst_signal_rel.max(((s - signal) / signal).abs());
        worst_k = worst_k
            .max((t - object_k).abs())
            .max((t_app - apparent_k).abs());
    }
    println!("worked cases: signal rel {worst_signal_rel:.1e}, temperatures {worst_k:.1e} K");
}

/// Analytic sensitivities against mpmath.diff of the numerically inverted equation.
#[test]
fn sensitivities_match_mpmath_derivatives() {
    let cases = read_csv("scene_cases.csv");
    let derivatives = read_csv("scene_sensitivities.csv");
    assert_eq!(cases.len(), derivatives.len());
    for (row, d) in cases.iter().zip(&derivatives) {
        assert_eq!(row["name"], d["name"]);
        let name = &row["name"];
        let band = Band::rectangular(num(row, "lo_um"), num(row, "hi_um"), detector(row)).unwrap();
        let scene = scene_of(row);
        let s = scene.sensitivities(&band, num(d, "sensor_signal")).unwrap();
        assert!(close(
            s.object_k,
            num(row, "object_k"),
            0.0,
            TEMPERATURE_ABS_K
        ));
        let pairs = [
            (s.signal, "d_signal"),
            (s.emissivity, "d_emissivity"),
            (s.reflected_k, "d_reflected_k"),
            (s.atm_transmittance, "d_atm_transmittance"),
            (s.atm_k, "d_atm_k"),
            (s.window_transmittance, "d_window_transmittance"),
            (s.window_reflectance, "d_window_reflectance"),
            (s.window_k, "d_window_k"),
            (s.window_reflected_k, "d_window_reflected_k"),
        ];
        for (actual, key) in pairs {
            let expected = num(d, key);
            if expected != 0.0 {
                println!(
                    "{name} {key}: rel {:.1e}",
                    ((actual - expected) / expected).abs()
                );
            }
            // Zero references (a weight of zero) must come out zero to rounding.
            assert!(
                close(actual, expected, SENSITIVITY_REL, 1e-12),
                "{name} {key}: {actual} vs {expected}"
            );
        }
    }
}

// ---- spectral cases ------------------------------------------------------------------------

fn tables() -> HashMap<String, (Vec<f64>, Vec<f64>)> {
    let mut out: HashMap<String, (Vec<f64>, Vec<f64>)> = HashMap::new();
    for row in read_csv("scene_spectral_tables.csv") {
        let entry = out.entry(row["table"].clone()).or_default();
        entry.0.push(num(&row, "wavelength_um"));
        entry.1.push(num(&row, "value"));
    }
    out
}

/// Spectral mode against mpmath quadrature of the same integral; and how far the grey
/// approximation (band-mean emissivity and transmittance) is off.
#[test]
fn spectral_cases_match_mpmath() {
    let tables = tables();
    let table = |name: &str| -> Option<SpectralTable<'_>> {
        if name == "none" {
            None
        } else {
            let (wl, v) = &tables[name];
            Some(SpectralTable::new(wl, v).unwrap())
        }
    };
    let rows = read_csv("scene_spectral.csv");
    assert_eq!(rows.len(), 4);
    let mut largest_grey_error_k: f64 = 0.0;
    for row in &rows {
        let name = &row["name"];
        let (lo, hi, det) = (num(row, "lo_um"), num(row, "hi_um"), detector(row));
        let band = match table(&row["response"]) {
            None => Band::rectangular(lo, hi, det).unwrap(),
            Some(response) => Band::with_response(lo, hi, det, response).unwrap(),
        };
        let grey = scene_of(row);
        let mut spectral = SpectralScene::new(band, grey).unwrap();
        if let Some(e) = table(&row["emissivity_table"]) {
            spectral = spectral.with_spectral_emissivity(e).unwrap();
        }
        if let Some(ta) = table(&row["atm_table"]) {
            spectral = spectral
                .with_spectral_atmosphere(ta, num(row, "atm_k"))
                .unwrap();
        }
        let object_k = num(row, "object_k");
        let signal = num(row, "sensor_signal");
        assert!(
            close(
                spectral.background(),
                num(row, "background"),
                SIGNAL_REL,
                0.0
            ),
            "{name} background {} vs {}",
            spectral.background(),
            num(row, "background")
        );
        let s = spectral.sensor_signal(object_k).unwrap();
        assert!(
            close(s, signal, SIGNAL_REL, 0.0),
            "{name} signal {s} vs {signal}"
        );
        let t_app = spectral.apparent_temperature(object_k).unwrap();
        assert!(
            close(
                t_app,
                num(row, "apparent_k"),
                0.0,
                SPECTRAL_TEMPERATURE_ABS_K
            ),
            "{name} apparent {t_app}"
        );
        let solution = spectral.solve_object_temperature(signal).unwrap();
        assert!(
            close(
                solution.temperature_k,
                object_k,
                0.0,
                SPECTRAL_TEMPERATURE_ABS_K
            ),
            "{name} object {} vs {object_k}",
            solution.temperature_k
        );
        assert!(
            solution.iterations <= 10,
            "{name}: {} iterations",
            solution.iterations
        );
        println!(
            "{name}: signal rel {:.1e}, object {:.1e} K, {} iterations",
            ((s - signal) / signal).abs(),
            (solution.temperature_k - object_k).abs(),
            solution.iterations
        );
        let t = spectral
            .object_temperature_from_apparent(num(row, "apparent_k"))
            .unwrap();
        assert!(
            close(t, object_k, 0.0, SPECTRAL_TEMPERATURE_ABS_K),
            "{name}"
        );

        // The grey approximation: the same signal through the grey equation with the band
        // means, as mpmath computed it.
        let grey_scene = Scene::new(num(row, "mean_emissivity"), grey.reflected_k())
            .and_then(|s| s.with_atmosphere(num(row, "mean_atm_transmittance"), num(row, "atm_k")))
            .and_then(|s| {
                s.with_window(
                    grey.window_transmittance(),
                    grey.window_reflectance(),
                    grey.window_k(),
                    grey.window_reflected_k(),
                )
            })
            .unwrap();
        let grey_k = grey_scene.object_temperature(&band, signal).unwrap();
        assert!(
            close(grey_k, num(row, "grey_k"), 0.0, TEMPERATURE_ABS_K),
            "{name} grey {grey_k} vs {}",
            num(row, "grey_k")
        );
        let grey_error_k = grey_k - object_k;
        println!("{name}: grey approximation off by {grey_error_k:+.4} K");
        largest_grey_error_k = largest_grey_error_k.max(grey_error_k.abs());
    }
    // The sloping emissivity makes the grey approximation wrong by tenths of a kelvin to
    // over a kelvin: far more than the 1e-8 K the spectral mode is held to.
    assert!(largest_grey_error_k > 0.5);
}

/// The grey error for the emissivity sloping 0.95 -> 0.75 across 8-14 um (band mean 0.85),
/// object at 353.15 K, surroundings at 293.15 K: 0.87 K with the plain band mean. The
/// radiance-weighted effective emissivity at the object temperature helps but is still not
/// exact, because the reflected term weights (1 - e) with the surroundings' spectrum.
#[test]
fn sloping_emissivity_grey_error() {
    let wl = [8.0, 14.0];
    let e = [0.95, 0.75];
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let table = SpectralTable::new(&wl, &e).unwrap();
    let grey = Scene::new(0.85, 293.15).unwrap();
    let spectral = SpectralScene::new(band, grey)
        .unwrap()
        .with_spectral_emissivity(table)
        .unwrap();
    let signal = spectral.sensor_signal(353.15).unwrap();
    let grey_k = grey.object_temperature(&band, signal).unwrap();
    // mpmath (scene_spectral.csv, slope_only): 354.0189029 K, 0.869 K high.
    assert!(
        close(grey_k - 353.15, 0.8689, 0.0, 1e-3),
        "{}",
        grey_k - 353.15
    );
    let effective = spectral.effective_gain(353.15).unwrap();
    assert!(
        effective > 0.85,
        "radiance weights the short, high-emissivity end"
    );
    let weighted_k = grey
        .with_emissivity(effective)
        .unwrap()
        .object_temperature(&band, signal)
        .unwrap();
    println!(
        "grey with band mean: {:+.4} K; with effective emissivity {effective:.5}: {:+.4} K",
        grey_k - 353.15,
        weighted_k - 353.15
    );
    assert!((weighted_k - 353.15).abs() < 0.5 * (grey_k - 353.15).abs());
    assert!(
        (weighted_k - 353.15).abs() > 1e-3,
        "not exact: reflections weigh (1-e) differently"
    );
    assert!(close(
        spectral.object_temperature(signal).unwrap(),
        353.15,
        0.0,
        1e-9
    ));
}

// ---- Stefan-Boltzmann over a very wide band -------------------------------------------------

/// Over 0.1-1000 um the band holds all but a fraction f(T) = F(0.1 T) + 1 - F(1000 T) of
/// the total radiance sigma T^4 / pi, so the Stefan-Boltzmann closed form of the emissivity
/// and reflection correction, T = ((S pi - (1-e) sigma Tr^4) / (e sigma))^(1/4), applied to
/// the band signal S, must fall short of the true temperature by the truncated fraction's
/// effect, dT/T = (1/4) [f(T) + (1-e)/e (Tr/T)^4 f(Tr)] to first order (held to 1 %).
#[test]
fn very_wide_band_reproduces_stefan_boltzmann() {
    let band = Band::rectangular(0.1, 1000.0, Detector::Energy).unwrap();
    let sigma = STEFAN_BOLTZMANN_W_M2_K4;
    let truncated = |t: f64| {
        blackbody_fraction(0.1 * t).unwrap() + blackbody_fraction_complement(1000.0 * t).unwrap()
    };
    for &(e, tr, t) in &[
        (0.9, 293.15, 373.15),
        (0.5, 300.0, 600.0),
        (0.2, 400.0, 1200.0),
        (1.0, 300.0, 250.0),
        (0.7, 250.0, 2500.0),
    ] {
        let scene = Scene::new(e, tr).unwrap();
        let signal = scene.sensor_signal(&band, t).unwrap();
        let closed_form = ((signal * PI - (1.0 - e) * sigma * tr.powi(4)) / (e * sigma)).powf(0.25);
        let shortfall = (t - closed_form) / t;
        let bound = 0.25 * (truncated(t) + (1.0 - e) / e * (tr / t).powi(4) * truncated(tr));
        assert!(
            (shortfall - bound).abs() <= 0.01 * bound + 1e-14,
            "e {e} Tr {tr} T {t}: shortfall {shortfall:e}, bound {bound:e}"
        );
        // And the inversion of the band signal recovers T exactly (no truncation there).
        println!("SB e {e} Tr {tr} T {t}: shortfall {shortfall:.4e} of bound {bound:.4e}");
        let back = scene.object_temperature(&band, signal).unwrap();
        assert!(close(back, t, 1e-12, 0.0));
    }
    // The check can fail: at 250 K the truncated fraction is 1.0e-5, seen as a 2.5e-6
    // relative shortfall; a wrong reflection term would be far larger.
    assert!(truncated(250.0) > 5e-6);
}

// ---- Wien-approximation emissivity sensitivity ----------------------------------------------

/// Narrow band: dT/T = -(lambda T / c2) de/e, the Wien-approximation result for a surface
/// whose reflections are negligible (DeWitt and Nutter, "Theory and Practice of Radiation
/// Thermometry", Wiley 1988; also Zhang, Tsai and Machin, "Radiometric Temperature
/// Measurements", 2010; cited from memory). With Planck's law instead of Wien's the factor
/// is (1 - exp(-c2/(lambda T))), so the Wien form is off by the relative amount
/// exp(-c2/(lambda T)), which the test allows (plus 1e-6 for the band's finite width).
#[test]
fn narrow_band_emissivity_sensitivity_matches_wien() {
    for &(lambda_um, t_k, e, tr_k) in &[
        (0.65, 1500.0, 0.4, 300.0),
        (0.9, 1000.0, 0.7, 300.0),
        (1.6, 800.0, 0.8, 300.0),
        (3.9, 900.0, 0.6, 200.0),
        (10.0, 600.0, 0.9, 50.0),
    ] {
        let band =
            Band::rectangular(lambda_um * 0.9999, lambda_um * 1.0001, Detector::Energy).unwrap();
        let scene = Scene::new(e, tr_k).unwrap();
        let signal = scene.sensor_signal(&band, t_k).unwrap();
        let s = scene.sensitivities(&band, signal).unwrap();
        let x = C2_UMK / (lambda_um * t_k);
        let wien = -(lambda_um * t_k / C2_UMK) * t_k / e; // dT/de, K
        let planck = wien * -libm_expm1(-x); // exact for a line, no reflections
        let relative = (s.emissivity - wien) / wien;
        assert!(
            relative.abs() <= (-x).exp() * 1.01 + 1e-6,
            "lambda {lambda_um} T {t_k}: dT/de {} vs Wien {wien} (rel {relative:e})",
            s.emissivity
        );
        assert!(
            close(s.emissivity, planck, 1e-5, 0.0),
            "Planck line form {planck} vs {}",
            s.emissivity
        );
    }
}

fn libm_expm1(x: f64) -> f64 {
    x.exp_m1()
}

/// e = 1 and no atmosphere or window: apparent == object, over a curve and a band.
#[test]
fn blackbody_scene_apparent_equals_object() {
    let bands = [
        Band::rectangular(8.0, 14.0, Detector::Energy).unwrap(),
        Band::rectangular(3.0, 5.0, Detector::Photon).unwrap(),
        Band::rectangular(0.1, 1000.0, Detector::Energy).unwrap(),
    ];
    for band in &bands {
        for &tr in &[3.0, 77.0, 293.15, 2000.0] {
            let scene = Scene::new(1.0, tr).unwrap();
            for &t in &[150.0, 300.0, 1000.0, 3000.0] {
                let apparent = scene.apparent_temperature(band, t).unwrap();
                assert!(close(apparent, t, 1e-12, 0.0), "{apparent} vs {t}");
                let object = scene.object_temperature_from_apparent(band, t).unwrap();
                assert!(close(object, t, 1e-12, 0.0));
                assert_eq!(
                    scene.sensor_signal(band, t).unwrap(),
                    band.signal(t).unwrap()
                );
            }
        }
    }
}
