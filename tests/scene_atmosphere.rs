//! The spectral scene fed with a transmittance table filled by `bandtemp::atmosphere`
//! (the water-vapour continuum of a 20 m humid path): consistency of the two modules'
//! band integrals, and how far a grey transmittance is off.

use bandtemp::atmosphere::{Air, Path, PathTransmittance, TransmittanceTable};
use bandtemp::band::{Band, SpectralTable};
use bandtemp::planck::Detector;
use bandtemp::scene::{Scene, SpectralScene};

#[test]
fn spectral_scene_agrees_with_the_atmosphere_band_integrals() {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let air = Air::new(303.15, 0.80, 1013.25).unwrap();
    let path = Path::new(air, 20.0).unwrap();
    let wavelengths_um: Vec<f64> = (0..=60).map(|i| 8.0 + 0.1 * f64::from(i)).collect();
    let mut tau = vec![0.0; wavelengths_um.len()];
    path.fill_transmittance_table(&wavelengths_um, &mut tau)
        .unwrap();
    let table = SpectralTable::new(&wavelengths_um, &tau).unwrap();
    let model = PathTransmittance::Table(TransmittanceTable::new(&wavelengths_um, &tau).unwrap());

    // A blackbody object: S = int r tau L(T) + int r (1 - tau) L(Ta), as the atmosphere
    // module computes them.
    let blackbody = Scene::new(1.0, 300.0).unwrap();
    let spectral = SpectralScene::new(band, blackbody)
        .unwrap()
        .with_spectral_atmosphere(table, 303.15)
        .unwrap();
    for object_k in [280.0, 338.15, 523.15, 1200.0] {
        let expected = model.band_transmitted_radiance(&band, object_k).unwrap()
            + model.band_path_radiance(&band, 303.15).unwrap();
        let s = spectral.sensor_signal(object_k).unwrap();
        assert!(
            (s - expected).abs() <= 1e-13 * expected,
            "{s} vs {expected}"
        );
        let back = spectral.object_temperature(s).unwrap();
        assert!((back - object_k).abs() <= 1e-9 * object_k);
    }

    // The furnace shell (e 0.90, 523.15 K, surroundings 303.15 K): a grey transmittance
    // weighted at the object temperature against the spectral path.
    let shell = Scene::new(0.90, 303.15).unwrap();
    let spectral = SpectralScene::new(band, shell)
        .unwrap()
        .with_spectral_atmosphere(table, 303.15)
        .unwrap();
    let signal = spectral.sensor_signal(523.15).unwrap();
    let tau_eff = model.band_transmittance(&band, 523.15).unwrap();
    let grey = shell.with_atmosphere(tau_eff, 303.15).unwrap();
    let grey_k = grey.object_temperature(&band, signal).unwrap();
    println!(
        "20 m at 30 C, 80 % RH: tau_eff(523 K) = {tau_eff:.5}, grey error {:+.2e} K",
        grey_k - 523.15
    );
    assert!(tau_eff > 0.98 && tau_eff < 0.99);
    // Small over 20 m (tau near 1), but not zero: the path emission and the reflection
    // see tau weighted by the air's and the surroundings' spectra, not the object's
    // (measured +0.047 K).
    assert!((0.01..0.1).contains(&(grey_k - 523.15)));
}
