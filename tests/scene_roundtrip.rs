//! Round trips of the measurement equation for random valid scenes (proptest): object
//! temperature -> sensor signal / apparent temperature -> object temperature, to 1e-6 K.
//!
//! Scene ranges (realistic, and well-conditioned enough for 1e-6 K): e in [0.05, 1],
//! ta and tw in [0.3, 1], rw in [0, 0.2] with tw + rw <= 1, every temperature in
//! [250, 1500] K.

use bandtemp::band::{Band, SignalCurve, SpectralTable};
use bandtemp::calibration::SakumaHattori;
use bandtemp::planck::Detector;
use bandtemp::scene::{Scene, SpectralScene};
use bandtemp::Error;
use proptest::prelude::*;

const ROUND_TRIP_K: f64 = 1e-6;

fn scene_strategy() -> impl Strategy<Value = Scene> {
    (
        0.05..=1.0f64,
        250.0..1500.0f64,
        0.3..=1.0f64,
        250.0..1500.0f64,
        0.3..=1.0f64,
        0.0..0.2f64,
        250.0..1500.0f64,
        250.0..1500.0f64,
    )
        .prop_map(|(e, tr, ta, tak, tw, rw, twk, twr)| {
            let rw = rw.min(1.0 - tw);
            Scene::new(e, tr)
                .and_then(|s| s.with_atmosphere(ta, tak))
                .and_then(|s| s.with_window(tw, rw, twk, twr))
                .expect("the strategy draws valid scenes")
        })
}

fn curve_check<C: SignalCurve + ?Sized>(
    curve: &C,
    scene: &Scene,
    object_k: f64,
) -> Result<(), TestCaseError> {
    let signal = scene.sensor_signal(curve, object_k).unwrap();
    let back = scene.object_temperature(curve, signal).unwrap();
    prop_assert!(
        (back - object_k).abs() <= ROUND_TRIP_K,
        "{} vs {}",
        back,
        object_k
    );
    let apparent = scene.apparent_temperature(curve, object_k).unwrap();
    let back = scene
        .object_temperature_from_apparent(curve, apparent)
        .unwrap();
    prop_assert!(
        (back - object_k).abs() <= ROUND_TRIP_K,
        "{} vs {}",
        back,
        object_k
    );
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn grey_round_trip_lwir_energy(scene in scene_strategy(), object_k in 250.0..1500.0f64) {
        let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
        curve_check(&band, &scene, object_k)?;
    }

    #[test]
    fn grey_round_trip_mwir_photon(scene in scene_strategy(), object_k in 250.0..1500.0f64) {
        let band = Band::rectangular(3.0, 5.0, Detector::Photon).unwrap();
        curve_check(&band, &scene, object_k)?;
    }

    #[test]
    fn grey_round_trip_sakuma_hattori(scene in scene_strategy(), object_k in 250.0..1500.0f64) {
        // An invented 8-14 um calibration curve in counts.
        let curve = SakumaHattori::new(10.2, 45.0, 4.0e6).unwrap();
        curve_check(&curve, &scene, object_k)?;
    }

    /// Any finite signal gives a finite positive temperature or a named error, never NaN.
    #[test]
    fn any_signal_gives_a_temperature_or_an_error(
        scene in scene_strategy(),
        factor in -0.5..3.0f64,
    ) {
        let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
        let background = scene.grey_terms(&band).unwrap().background;
        match scene.object_temperature(&band, factor * background) {
            Ok(t) => prop_assert!(t.is_finite() && t > 0.0 && factor > 1.0),
            Err(e) => prop_assert_eq!(e, Error::SignalBelowBackground),
        }
    }
}

/// Random piecewise-linear tables over 7-15 um, values in [lo, hi].
fn table_values(lo: f64, hi: f64) -> impl Strategy<Value = Vec<f64>> {
    proptest::collection::vec(lo..=hi, 5)
}

const TABLE_WL: [f64; 5] = [7.0, 9.0, 11.0, 12.5, 15.0];

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    #[test]
    fn spectral_round_trip(
        scene in scene_strategy(),
        e_values in table_values(0.05, 1.0),
        ta_values in table_values(0.3, 1.0),
        atm_k in 250.0..1500.0f64,
        object_k in 250.0..1500.0f64,
        photon in any::<bool>(),
    ) {
        let band = if photon {
            Band::rectangular(8.0, 14.0, Detector::Photon).unwrap()
        } else {
            Band::rectangular(8.0, 14.0, Detector::Energy).unwrap()
        };
        let e = SpectralTable::new(&TABLE_WL, &e_values).unwrap();
        let ta = SpectralTable::new(&TABLE_WL, &ta_values).unwrap();
        let spectral = SpectralScene::new(band, scene)
            .and_then(|s| s.with_spectral_emissivity(e))
            .and_then(|s| s.with_spectral_atmosphere(ta, atm_k))
            .unwrap();
        let signal = spectral.sensor_signal(object_k).unwrap();
        let solution = spectral.solve_object_temperature(signal).unwrap();
        prop_assert!((solution.temperature_k - object_k).abs() <= ROUND_TRIP_K,
            "{} vs {}", solution.temperature_k, object_k);
        prop_assert!(solution.iterations <= 12, "{} iterations", solution.iterations);
        let apparent = spectral.apparent_temperature(object_k).unwrap();
        let back = spectral.object_temperature_from_apparent(apparent).unwrap();
        prop_assert!((back - object_k).abs() <= ROUND_TRIP_K);
    }

    /// With constant tables the spectral mode is the grey equation.
    #[test]
    fn spectral_with_constant_tables_is_grey(
        scene in scene_strategy(),
        object_k in 250.0..1500.0f64,
    ) {
        let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
        let e_values = [scene.emissivity(); 5];
        let ta_values = [scene.atm_transmittance(); 5];
        let e = SpectralTable::new(&TABLE_WL, &e_values).unwrap();
        let ta = SpectralTable::new(&TABLE_WL, &ta_values).unwrap();
        let with_tables = SpectralScene::new(band, scene)
            .and_then(|s| s.with_spectral_emissivity(e))
            .and_then(|s| s.with_spectral_atmosphere(ta, scene.atm_k()))
            .unwrap();
        let grey = scene.sensor_signal(&band, object_k).unwrap();
        let spectral = with_tables.sensor_signal(object_k).unwrap();
        prop_assert!((spectral - grey).abs() <= 1e-12 * grey, "{} vs {}", spectral, grey);
        let no_tables = SpectralScene::new(band, scene).unwrap();
        let plain = no_tables.sensor_signal(object_k).unwrap();
        prop_assert!((plain - grey).abs() <= 1e-12 * grey);
        prop_assert!((no_tables.background() - scene.grey_terms(&band).unwrap().background).abs()
            <= 1e-12 * grey);
    }
}
