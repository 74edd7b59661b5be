//! Scene validation: every violation is its own named error; nothing returns NaN.

use bandtemp::band::{Band, SignalCurve, SpectralTable};
use bandtemp::planck::Detector;
use bandtemp::scene::{Scene, SpectralScene};
use bandtemp::Error;

fn lwir() -> Band<'static> {
    Band::rectangular(8.0, 14.0, Detector::Energy).unwrap()
}

#[test]
fn emissivity_domain() {
    for e in [0.0, -0.1, 1.000_000_1, 2.0, -0.0] {
        assert_eq!(
            Scene::new(e, 300.0),
            Err(Error::EmissivityOutOfRange),
            "{e}"
        );
    }
    for e in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
        assert_eq!(Scene::new(e, 300.0), Err(Error::NonFinite));
    }
    assert!(Scene::new(1.0, 300.0).is_ok());
    assert!(Scene::new(f64::MIN_POSITIVE, 300.0).is_ok());
    let scene = Scene::new(0.5, 300.0).unwrap();
    assert_eq!(scene.with_emissivity(0.0), Err(Error::EmissivityOutOfRange));
    assert_eq!(scene.with_emissivity(1.5), Err(Error::EmissivityOutOfRange));
    assert_eq!(scene.with_emissivity(f64::NAN), Err(Error::NonFinite));
    assert_eq!(scene.with_emissivity(0.7).unwrap().emissivity(), 0.7);
}

#[test]
fn each_temperature_has_its_own_error() {
    for t in [0.0, -1.0, -273.15] {
        assert_eq!(
            Scene::new(0.9, t),
            Err(Error::ReflectedTemperatureNotPositive)
        );
        let scene = Scene::new(0.9, 300.0).unwrap();
        assert_eq!(
            scene.with_reflected_k(t),
            Err(Error::ReflectedTemperatureNotPositive)
        );
        assert_eq!(
            scene.with_atmosphere(0.9, t),
            Err(Error::AtmosphereTemperatureNotPositive)
        );
        assert_eq!(
            scene.with_window(0.9, 0.05, t, 300.0),
            Err(Error::WindowTemperatureNotPositive)
        );
        assert_eq!(
            scene.with_window(0.9, 0.05, 300.0, t),
            Err(Error::WindowReflectedTemperatureNotPositive)
        );
    }
    let scene = Scene::new(0.9, 300.0).unwrap();
    assert_eq!(Scene::new(0.9, f64::NAN), Err(Error::NonFinite));
    assert_eq!(
        scene.with_atmosphere(0.9, f64::INFINITY),
        Err(Error::NonFinite)
    );
    assert_eq!(
        scene.with_window(0.9, 0.0, f64::NAN, 300.0),
        Err(Error::NonFinite)
    );
    assert_eq!(
        scene.with_window(0.9, 0.0, 300.0, f64::NAN),
        Err(Error::NonFinite)
    );
}

#[test]
fn transmittance_and_reflectance_domains() {
    let scene = Scene::new(0.9, 300.0).unwrap();
    for ta in [0.0, -0.5, 1.01] {
        assert_eq!(
            scene.with_atmosphere(ta, 290.0),
            Err(Error::AtmosphereTransmittanceOutOfRange)
        );
    }
    assert_eq!(
        scene.with_atmosphere(f64::NAN, 290.0),
        Err(Error::NonFinite)
    );
    for tw in [0.0, -0.1, 1.2] {
        assert_eq!(
            scene.with_window(tw, 0.0, 300.0, 300.0),
            Err(Error::WindowTransmittanceOutOfRange)
        );
    }
    for rw in [-0.01, 1.0, 1.5] {
        assert_eq!(
            scene.with_window(0.5, rw, 300.0, 300.0),
            Err(Error::WindowReflectanceOutOfRange)
        );
    }
    assert_eq!(
        scene.with_window(0.8, 0.3, 300.0, 300.0),
        Err(Error::WindowSumExceedsOne)
    );
    assert_eq!(
        scene.with_window(0.9, f64::NAN, 300.0, 300.0),
        Err(Error::NonFinite)
    );
    // Edges that are inside the domain.
    assert!(scene.with_atmosphere(1.0, 290.0).is_ok());
    assert!(scene.with_window(1.0, 0.0, 300.0, 300.0).is_ok());
    assert!(scene.with_window(0.6, 0.4, 300.0, 300.0).is_ok());
}

#[test]
fn getters_return_what_was_set() {
    let scene = Scene::new(0.85, 298.0)
        .unwrap()
        .with_atmosphere(0.9, 303.0)
        .unwrap()
        .with_window(0.7, 0.05, 310.0, 295.0)
        .unwrap();
    assert_eq!(scene.emissivity(), 0.85);
    assert_eq!(scene.reflected_k(), 298.0);
    assert_eq!(scene.atm_transmittance(), 0.9);
    assert_eq!(scene.atm_k(), 303.0);
    assert_eq!(scene.window_transmittance(), 0.7);
    assert_eq!(scene.window_reflectance(), 0.05);
    assert_eq!(scene.window_k(), 310.0);
    assert_eq!(scene.window_reflected_k(), 295.0);
    let plain = Scene::new(0.5, 280.0).unwrap();
    assert_eq!(plain.atm_transmittance(), 1.0);
    assert_eq!(plain.window_transmittance(), 1.0);
    assert_eq!(plain.window_reflectance(), 0.0);
}

#[test]
fn signal_at_or_below_background_is_its_own_error() {
    let band = lwir();
    // Low emissivity, hot surroundings, a window: a large background.
    let scene = Scene::new(0.1, 400.0)
        .unwrap()
        .with_atmosphere(0.8, 300.0)
        .unwrap()
        .with_window(0.7, 0.05, 310.0, 295.0)
        .unwrap();
    let background = scene.grey_terms(&band).unwrap().background;
    assert!(background > 0.0);
    for s in [
        background,
        background * (1.0 - 1e-12),
        0.5 * background,
        0.0,
        -1.0,
    ] {
        assert_eq!(
            scene.object_temperature(&band, s),
            Err(Error::SignalBelowBackground),
            "{s}"
        );
    }
    assert_eq!(
        scene.object_temperature(&band, f64::NAN),
        Err(Error::NonFinite)
    );
    assert_eq!(
        scene.object_temperature(&band, f64::INFINITY),
        Err(Error::NonFinite)
    );
    // An apparent temperature whose signal is below the background.
    let floor_k = band.temperature(background).unwrap();
    assert_eq!(
        scene.object_temperature_from_apparent(&band, floor_k - 1.0),
        Err(Error::SignalBelowBackground)
    );
    assert_eq!(
        scene.object_temperature_from_apparent(&band, 0.0),
        Err(Error::TemperatureNotPositive)
    );
    // Just above the background the answer is a (cold) positive temperature, not NaN.
    let t = scene
        .object_temperature(&band, background * (1.0 + 1e-6))
        .unwrap();
    assert!(t.is_finite() && t > 0.0 && t < 400.0, "{t}");
    // Sensitivities share the error.
    assert_eq!(
        scene.sensitivities(&band, background).map(|s| s.object_k),
        Err(Error::SignalBelowBackground)
    );
}

#[test]
fn object_temperature_errors_for_bad_object_inputs() {
    let band = lwir();
    let scene = Scene::new(0.9, 300.0).unwrap();
    assert_eq!(
        scene.sensor_signal(&band, 0.0),
        Err(Error::TemperatureNotPositive)
    );
    assert_eq!(scene.sensor_signal(&band, f64::NAN), Err(Error::NonFinite));
    assert_eq!(
        scene.apparent_temperature(&band, -5.0),
        Err(Error::TemperatureNotPositive)
    );
}

#[test]
fn an_underflowing_background_counts_as_zero() {
    // A 3 K sky seen in a 0.9-1.1 um band: its signal is far below the double range.
    let band = Band::rectangular(0.9, 1.1, Detector::Energy).unwrap();
    assert_eq!(band.signal(3.0), Err(Error::RadianceUnderflow));
    let scene = Scene::new(0.5, 3.0)
        .unwrap()
        .with_atmosphere(0.9, 3.0)
        .unwrap();
    assert_eq!(scene.grey_terms(&band).unwrap().background, 0.0);
    let s = scene.sensor_signal(&band, 1200.0).unwrap();
    assert!((s - 0.45 * band.signal(1200.0).unwrap()).abs() <= 1e-15 * s);
    let t = scene.object_temperature(&band, s).unwrap();
    assert!((t - 1200.0).abs() < 1e-9);
}

#[test]
fn spectral_tables_must_cover_the_band_and_be_physical() {
    let band = lwir();
    let scene = Scene::new(0.9, 300.0).unwrap();
    let base = SpectralScene::new(band, scene).unwrap();
    let short_wl = [8.5, 14.0];
    let short_v = [0.9, 0.9];
    let short = SpectralTable::new(&short_wl, &short_v).unwrap();
    assert_eq!(
        base.with_spectral_emissivity(short),
        Err(Error::SpectralTableDoesNotCoverBand)
    );
    assert_eq!(
        base.with_spectral_atmosphere(short, 300.0),
        Err(Error::SpectralTableDoesNotCoverBand)
    );
    let wl = [7.0, 11.0, 15.0];
    let above_one = [0.9, 1.01, 0.9];
    let table = SpectralTable::new(&wl, &above_one).unwrap();
    assert_eq!(
        base.with_spectral_emissivity(table),
        Err(Error::SpectralEmissivityOutOfRange)
    );
    assert_eq!(
        base.with_spectral_atmosphere(table, 300.0),
        Err(Error::SpectralTransmittanceOutOfRange)
    );
    let zeros = [0.0, 0.0, 0.0];
    let opaque = SpectralTable::new(&wl, &zeros).unwrap();
    assert_eq!(
        base.with_spectral_atmosphere(opaque, 300.0),
        Err(Error::ObjectNotVisible)
    );
    assert_eq!(
        base.with_spectral_emissivity(opaque),
        Err(Error::ObjectNotVisible)
    );
    let fine = [0.5, 0.6, 0.7];
    let fine = SpectralTable::new(&wl, &fine).unwrap();
    assert_eq!(
        base.with_spectral_atmosphere(fine, 0.0),
        Err(Error::AtmosphereTemperatureNotPositive)
    );
    assert_eq!(
        base.with_spectral_atmosphere(fine, f64::NAN),
        Err(Error::NonFinite)
    );
    // Zero at some wavelengths is allowed: an absorption band.
    let partly = [0.8, 0.0, 0.8];
    let partly = SpectralTable::new(&wl, &partly).unwrap();
    let spectral = base.with_spectral_atmosphere(partly, 300.0).unwrap();
    assert_eq!(spectral.atm_transmittance_table(), Some(partly));
    assert_eq!(spectral.emissivity_table(), None);
    assert_eq!(spectral.scene().atm_k(), 300.0);
    assert_eq!(spectral.band(), band);
    let background = spectral.background();
    assert_eq!(
        spectral.object_temperature(background),
        Err(Error::SignalBelowBackground)
    );
    assert_eq!(
        spectral.object_temperature(0.5 * background),
        Err(Error::SignalBelowBackground)
    );
    assert_eq!(spectral.object_temperature(f64::NAN), Err(Error::NonFinite));
    assert_eq!(
        spectral.sensor_signal(-1.0),
        Err(Error::TemperatureNotPositive)
    );
}

#[test]
fn scene_errors_have_distinct_messages() {
    let errors = [
        Error::EmissivityOutOfRange,
        Error::AtmosphereTransmittanceOutOfRange,
        Error::WindowTransmittanceOutOfRange,
        Error::WindowReflectanceOutOfRange,
        Error::WindowSumExceedsOne,
        Error::SignalBelowBackground,
        Error::ReflectedTemperatureNotPositive,
        Error::AtmosphereTemperatureNotPositive,
        Error::WindowTemperatureNotPositive,
        Error::WindowReflectedTemperatureNotPositive,
        Error::SpectralTableDoesNotCoverBand,
        Error::SpectralEmissivityOutOfRange,
        Error::SpectralTransmittanceOutOfRange,
        Error::ObjectNotVisible,
        Error::EmissivityNotDetermined,
        Error::EmissivityReadingInconsistent,
        Error::ReflectorEmissivityOutOfRange,
        Error::ReflectedNotDetermined,
    ];
    for (i, a) in errors.iter().enumerate() {
        assert!(!a.message().is_empty());
        for b in &errors[i + 1..] {
            assert_ne!(a.message(), b.message());
        }
    }
}
