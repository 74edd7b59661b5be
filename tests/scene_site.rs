//! Site inverse problems: emissivity from a reference temperature (contact probe or
//! reference coating, ASTM E1933 style) and reflected apparent temperature from a diffuse
//! reflector (ASTM E1862 style). Scenes are invented.

use bandtemp::band::{Band, SignalCurve};
use bandtemp::calibration::SakumaHattori;
use bandtemp::constants::STEFAN_BOLTZMANN_W_M2_K4;
use bandtemp::planck::{blackbody_fraction, blackbody_fraction_complement, Detector};
use bandtemp::scene::Scene;
use bandtemp::Error;
use core::f64::consts::PI;
use proptest::prelude::*;

fn lwir() -> Band<'static> {
    Band::rectangular(8.0, 14.0, Detector::Energy).unwrap()
}

fn site_scene(e: f64, tr: f64) -> Scene {
    Scene::new(e, tr)
        .unwrap()
        .with_atmosphere(0.93, 301.0)
        .unwrap()
        .with_window(0.72, 0.05, 306.0, 297.0)
        .unwrap()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(128))]

    /// Contact probe: the emissivity that made the reading is recovered.
    #[test]
    fn contact_probe_recovers_emissivity(
        e in 0.05..=1.0f64,
        tr in 250.0..400.0f64,
        excess in 20.0..600.0f64,
    ) {
        let band = lwir();
        let t = tr + excess;
        let scene = site_scene(e, tr);
        let reading = scene.sensor_signal(&band, t).unwrap();
        // The scene's own emissivity must not matter.
        let guess = scene.with_emissivity(0.5).unwrap();
        let found = guess.emissivity_from_reference(&band, reading, t).unwrap();
        prop_assert!((found - e).abs() <= 1e-9 * e, "{} vs {}", found, e);
    }

    /// Reference coating beside the spot: temperature and emissivity both recovered.
    #[test]
    fn reference_coating_recovers_both(
        e in 0.05..0.99f64,
        coating_e in 0.85..0.97f64,
        tr in 250.0..320.0f64,
        t in 340.0..900.0f64,
    ) {
        let curve = SakumaHattori::new(10.2, 45.0, 4.0e6).unwrap();
        let scene = site_scene(e, tr);
        let surface = scene.sensor_signal(&curve, t).unwrap();
        let coating = scene.with_emissivity(coating_e).unwrap().sensor_signal(&curve, t).unwrap();
        let found = scene
            .emissivity_from_reference_coating(&curve, surface, coating, coating_e)
            .unwrap();
        prop_assert!((found.temperature_k - t).abs() <= 1e-9 * t);
        prop_assert!((found.emissivity - e).abs() <= 1e-9, "{} vs {}", found.emissivity, e);
    }

    /// Diffuse reflector: the reflected apparent temperature is recovered, for an ideal
    /// reflector and for one with some emission of its own at its own temperature.
    #[test]
    fn reflector_recovers_reflected_temperature(
        tr in 200.0..600.0f64,
        reflector_e in 0.0..0.2f64,
        reflector_k in 270.0..330.0f64,
    ) {
        let band = lwir();
        // The reflector is a surface of emissivity ef at its own temperature reflecting Tr
        // (an ideal reflector, ef = 0, as the smallest positive emissivity a scene takes).
        let reflector = site_scene(reflector_e.max(f64::MIN_POSITIVE), tr);
        let reading = reflector.sensor_signal(&band, reflector_k).unwrap();
        let target = site_scene(0.9, 100.0); // Tr unknown: the scene's value must not matter
        let found = target
            .reflected_k_from_reflector(&band, reading, reflector_e, reflector_k)
            .unwrap();
        prop_assert!((found - tr).abs() <= 1e-9 * tr, "{} vs {}", found, tr);
        // The found value slots back into the scene.
        prop_assert!(target.with_reflected_k(found).is_ok());
    }
}

/// Over a very wide band (0.1-1000 um) the contact-probe emissivity must match the
/// Stefan-Boltzmann closed form e = (S pi - sigma Tr^4) / (sigma (T^4 - Tr^4)) within the
/// band's truncated fraction (no path, no window).
#[test]
fn contact_probe_matches_stefan_boltzmann() {
    let band = Band::rectangular(0.1, 1000.0, Detector::Energy).unwrap();
    let sigma = STEFAN_BOLTZMANN_W_M2_K4;
    let truncated = |t: f64| {
        blackbody_fraction(0.1 * t).unwrap() + blackbody_fraction_complement(1000.0 * t).unwrap()
    };
    for &(e, tr, t) in &[
        (0.3, 293.0, 450.0),
        (0.8, 300.0, 1000.0),
        (0.6, 500.0, 320.0),
    ] {
        let scene = Scene::new(e, tr).unwrap();
        let reading = scene.sensor_signal(&band, t).unwrap();
        let found = scene.emissivity_from_reference(&band, reading, t).unwrap();
        assert!((found - e).abs() <= 1e-12, "{found} vs {e}");
        let closed_form = (reading * PI - sigma * tr.powi(4)) / (sigma * (t.powi(4) - tr.powi(4)));
        // Truncation removes f(T) of the object's and f(Tr) of the reflection's radiance.
        let bound = (e * t.powi(4) * truncated(t) + tr.powi(4) * truncated(tr))
            / (t.powi(4) - tr.powi(4)).abs();
        assert!(
            (closed_form - e).abs() <= 1.01 * bound && (closed_form - e).abs() > 0.0,
            "e {e}: closed form {closed_form}, bound {bound:e}"
        );
    }
}

#[test]
fn emissivity_not_determined_at_the_reflected_temperature() {
    let band = lwir();
    let scene = site_scene(0.7, 300.0);
    let reading = scene.sensor_signal(&band, 300.0).unwrap();
    assert_eq!(
        scene.emissivity_from_reference(&band, reading, 300.0),
        Err(Error::EmissivityNotDetermined)
    );
    // The coating method fails the same way when the coating reads the reflected temperature.
    let coating = scene
        .with_emissivity(0.95)
        .unwrap()
        .sensor_signal(&band, 300.0)
        .unwrap();
    assert_eq!(
        scene.emissivity_from_reference_coating(&band, reading, coating, 0.95),
        Err(Error::EmissivityNotDetermined)
    );
    // Close but distinct temperatures still work (badly conditioned, but determined).
    let reading = scene.sensor_signal(&band, 305.0).unwrap();
    let e = scene
        .emissivity_from_reference(&band, reading, 305.0)
        .unwrap();
    assert!((e - 0.7).abs() < 1e-9);
}

#[test]
fn inconsistent_readings_are_named() {
    let band = lwir();
    let scene = site_scene(0.7, 300.0);
    // Above a blackbody at the reference temperature.
    let blackbody = scene
        .with_emissivity(1.0)
        .unwrap()
        .sensor_signal(&band, 400.0)
        .unwrap();
    assert_eq!(
        scene.emissivity_from_reference(&band, blackbody * 1.01, 400.0),
        Err(Error::EmissivityReadingInconsistent)
    );
    // Below what a perfect reflector would give.
    let reflector = scene
        .with_emissivity(1e-9)
        .unwrap()
        .sensor_signal(&band, 400.0)
        .unwrap();
    assert_eq!(
        scene.emissivity_from_reference(&band, reflector * 0.99, 400.0),
        Err(Error::EmissivityReadingInconsistent)
    );
    assert_eq!(
        scene.emissivity_from_reference(&band, f64::NAN, 400.0),
        Err(Error::NonFinite)
    );
    assert_eq!(
        scene.emissivity_from_reference(&band, blackbody, 0.0),
        Err(Error::TemperatureNotPositive)
    );
    assert_eq!(
        scene.emissivity_from_reference_coating(&band, blackbody, blackbody, 1.2),
        Err(Error::EmissivityOutOfRange)
    );
    assert_eq!(
        scene.emissivity_from_reference_coating(&band, blackbody, 0.0, 0.95),
        Err(Error::SignalBelowBackground)
    );
}

#[test]
fn reflector_errors_are_named() {
    let band = lwir();
    let scene = site_scene(0.7, 300.0);
    let reading = scene.sensor_signal(&band, 300.0).unwrap();
    for e in [1.0, 1.5, -0.01] {
        assert_eq!(
            scene.reflected_k_from_reflector(&band, reading, e, 300.0),
            Err(Error::ReflectorEmissivityOutOfRange),
            "{e}"
        );
    }
    assert_eq!(
        scene.reflected_k_from_reflector(&band, reading, f64::NAN, 300.0),
        Err(Error::NonFinite)
    );
    assert_eq!(
        scene.reflected_k_from_reflector(&band, reading, 0.05, -3.0),
        Err(Error::TemperatureNotPositive)
    );
    // A reading at or below what the path and the window alone give.
    // (With e = 1 the background is the path and the window alone.)
    let path_only = scene
        .with_emissivity(1.0)
        .unwrap()
        .grey_terms(&band)
        .unwrap()
        .background;
    assert_eq!(
        scene.reflected_k_from_reflector(&band, path_only, 0.0, 300.0),
        Err(Error::ReflectedNotDetermined)
    );
    // A warm reflector whose own emission explains the whole reading.
    // (Tr = 1 K: its signal underflows and counts as zero.)
    let own = scene
        .with_emissivity(0.2)
        .unwrap()
        .with_reflected_k(1.0)
        .unwrap();
    let warm = own.sensor_signal(&band, 330.0).unwrap();
    assert_eq!(
        scene.reflected_k_from_reflector(&band, warm * 0.999, 0.2, 330.0),
        Err(Error::ReflectedNotDetermined)
    );
    assert_eq!(band.signal(1.0), Err(Error::RadianceUnderflow));
}
