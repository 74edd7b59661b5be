//! Band values of a path (transmitted radiance, band-effective transmittance, path
//! radiance) against mpmath quadrature of the same continuum formulas times Planck's law
//! (tests/data/atmosphere_band.csv, tools/refgen/atmosphere_refs.py), and the user-table
//! path against the model.

use approx::assert_relative_eq;
use bandtemp::atmosphere::{Air, Path, PathTransmittance, TransmittanceTable};
use bandtemp::band::{Band, SpectralTable};
use bandtemp::planck::Detector;
use bandtemp::Error;

const BAND_CSV: &str = include_str!("data/atmosphere_band.csv");

fn rows(csv: &str) -> impl Iterator<Item = Vec<f64>> + '_ {
    csv.lines()
        .filter(|line| !line.starts_with('#') && !line.trim().is_empty())
        .skip(1)
        .map(|line| line.split(',').map(|x| x.parse().unwrap()).collect())
}

#[test]
fn band_values_match_mpmath_quadrature() {
    let mut count = 0;
    for row in rows(BAND_CSV) {
        let [air_k, rh, p_hpa, d_m, lo, hi, object_k, transmitted, tau_eff, path_rad] = row[..]
        else {
            panic!("bad row {row:?}")
        };
        let path = Path::new(Air::new(air_k, rh, p_hpa).unwrap(), d_m).unwrap();
        let model = PathTransmittance::Continuum(path);
        let band = Band::rectangular(lo, hi, Detector::Energy).unwrap();
        assert_relative_eq!(
            model.band_transmitted_radiance(&band, object_k).unwrap(),
            transmitted,
            max_relative = 1e-12
        );
        assert_relative_eq!(
            model.band_transmittance(&band, object_k).unwrap(),
            tau_eff,
            max_relative = 1e-12
        );
        assert_relative_eq!(
            path.band_path_radiance(&band).unwrap(),
            path_rad,
            max_relative = 1e-12
        );
        count += 1;
    }
    assert_eq!(count, 60);
}

/// How much the band-effective transmittance depends on the object temperature: the
/// figures quoted in the module docs.
#[test]
fn band_transmittance_depends_on_object_temperature() {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let path = Path::new(Air::new(298.15, 0.5, 1013.25).unwrap(), 1000.0).unwrap();
    let cold = path.band_transmittance(&band, 273.15).unwrap();
    let warm = path.band_transmittance(&band, 298.15).unwrap();
    let hot = path.band_transmittance(&band, 1273.15).unwrap();
    eprintln!("tau_eff 8-14 um, 1 km, 25 C, 50 %: 0 C {cold:.4}, 25 C {warm:.4}, 1000 C {hot:.4}");
    // Hotter objects put more of their band radiance at the short, more transparent end.
    assert!(cold < warm && warm < hot);
    assert!((hot - cold - 0.040).abs() < 0.005, "spread {}", hot - cold);
    // 100 m: the same effect, about ten times smaller.
    let short = Path::new(Air::new(298.15, 0.5, 1013.25).unwrap(), 100.0).unwrap();
    let spread = short.band_transmittance(&band, 1273.15).unwrap()
        - short.band_transmittance(&band, 273.15).unwrap();
    eprintln!("100 m spread {spread:.4}");
    assert!(spread > 0.003 && spread < 0.007, "spread {spread}");
}

/// A table sampled from the model on a fine grid gives the model's band values, to the
/// interpolation error; the table path integrates panel by panel between its nodes.
#[test]
fn sampled_table_reproduces_the_model() {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let path = Path::new(Air::new(303.15, 0.9, 1013.25).unwrap(), 1000.0).unwrap();
    let wavelengths: [f64; 241] = core::array::from_fn(|i| 8.0 + 0.025 * i as f64);
    let mut tau = [0.0; 241];
    path.fill_transmittance_table(&wavelengths, &mut tau)
        .unwrap();
    let table = PathTransmittance::Table(TransmittanceTable::new(&wavelengths, &tau).unwrap());
    let model = PathTransmittance::Continuum(path);
    for object_k in [250.0, 373.15, 1273.15] {
        let a = table.band_transmittance(&band, object_k).unwrap();
        let b = model.band_transmittance(&band, object_k).unwrap();
        // Interpolation error <= max|tau''| h^2 / 8, about 3e-6 on this 0.025 um grid.
        assert!((a - b).abs() < 5e-6, "{a} vs {b}");
    }
    let a = table.band_path_radiance(&band, 303.15).unwrap();
    let b = model.band_path_radiance(&band, 303.15).unwrap();
    assert_relative_eq!(a, b, max_relative = 5e-5);
}

#[test]
fn measurement_equation_identities() {
    // For a blackbody object at the air temperature the sensor sees exactly L(T_air):
    // int r tau L(T) + int r (1 - tau) L(T) = int r L(T).
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let air_k = 293.15;
    let path = Path::new(Air::new(air_k, 0.8, 1013.25).unwrap(), 500.0).unwrap();
    let model = PathTransmittance::Continuum(path);
    let total = model.band_transmitted_radiance(&band, air_k).unwrap()
        + model.band_path_radiance(&band, air_k).unwrap();
    assert_relative_eq!(total, band.radiance(air_k).unwrap(), max_relative = 1e-13);
    // A tabulated response band works too (triangle response 8-14 um peaking at 10 um).
    let wl = [8.0, 10.0, 14.0];
    let r = [0.0, 1.0, 0.0];
    let response = SpectralTable::new(&wl, &r).unwrap();
    let tri = Band::with_response(8.0, 14.0, Detector::Energy, response).unwrap();
    let total = model.band_transmitted_radiance(&tri, air_k).unwrap()
        + model.band_path_radiance(&tri, air_k).unwrap();
    assert_relative_eq!(total, tri.radiance(air_k).unwrap(), max_relative = 1e-12);
    // A perfectly transparent table gives exactly 1 and no path radiance.
    let ones = [1.0, 1.0];
    let span = [7.0, 15.0];
    let clear = PathTransmittance::Table(TransmittanceTable::new(&span, &ones).unwrap());
    assert_eq!(clear.band_transmittance(&band, 400.0), Ok(1.0));
    assert_eq!(clear.band_path_radiance(&band, 300.0), Ok(0.0));
}

#[test]
fn named_errors_for_bands_and_tables() {
    let path = Path::new(Air::new(293.15, 0.5, 1013.25).unwrap(), 100.0).unwrap();
    let model = PathTransmittance::Continuum(path);
    // MWIR and a band starting at 7.5 um are outside the continuum model.
    let mwir = Band::rectangular(3.0, 5.0, Detector::Photon).unwrap();
    assert_eq!(
        model.band_transmittance(&mwir, 400.0),
        Err(Error::OutsideContinuumModel)
    );
    let wide = Band::rectangular(7.5, 14.0, Detector::Energy).unwrap();
    assert_eq!(
        model.band_path_radiance(&wide, 300.0),
        Err(Error::OutsideContinuumModel)
    );
    // The caller's table must cover the band and hold values in [0, 1].
    let wl = [8.0, 12.0];
    let tau = [0.9, 0.8];
    let table = PathTransmittance::Table(TransmittanceTable::new(&wl, &tau).unwrap());
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    assert_eq!(
        table.band_transmittance(&band, 300.0),
        Err(Error::BandOutsideTransmittanceTable)
    );
    let above = [0.9, 1.2];
    assert_eq!(
        TransmittanceTable::new(&wl, &above),
        Err(Error::TransmittanceTableAboveOne)
    );
    let negative = [0.9, -0.1];
    assert_eq!(
        TransmittanceTable::new(&wl, &negative),
        Err(Error::TableValueNegative)
    );
    assert_eq!(
        model.band_transmittance(&band, -1.0),
        Err(Error::TemperatureNotPositive)
    );
}

const THICK_CSV: &str = include_str!("data/atmosphere_band_thick.csv");

/// Thick, hot, saturated km paths (the transmittance varies by up to e^52 across the
/// band), energy and photon detectors, against mpmath quadrature
/// (tests/data/atmosphere_band_thick.csv, tools/refgen/atmosphere_refs.py --only thick).
/// The band quadrature alone, sized by the Planck variable, missed these by up to 1e-7.
#[test]
fn thick_path_band_values_match_mpmath_quadrature() {
    let mut count = 0;
    for line in THICK_CSV
        .lines()
        .filter(|line| !line.starts_with('#') && !line.trim().is_empty())
        .skip(1)
    {
        let fields: Vec<&str> = line.split(',').collect();
        let number = |i: usize| -> f64 { fields[i].parse().unwrap() };
        let detector = match fields[4] {
            "energy" => Detector::Energy,
            "photon" => Detector::Photon,
            other => panic!("bad detector {other}"),
        };
        let path = Path::new(
            Air::new(number(0), number(1), number(2)).unwrap(),
            number(3),
        )
        .unwrap();
        let model = PathTransmittance::Continuum(path);
        let band = Band::rectangular(number(5), number(6), detector).unwrap();
        let object_k = number(7);
        assert_relative_eq!(
            model.band_transmitted_radiance(&band, object_k).unwrap(),
            number(8),
            max_relative = 1e-12
        );
        assert_relative_eq!(
            model.band_transmittance(&band, object_k).unwrap(),
            number(9),
            max_relative = 1e-12
        );
        assert_relative_eq!(
            path.band_path_radiance(&band).unwrap(),
            number(10),
            max_relative = 1e-12
        );
        count += 1;
    }
    assert_eq!(count, 48);
}

/// A path so long that its transmittance underflows is refused with a named error, never
/// a transmittance of 0 with success (10,000 km of air at 20 C, 50 % RH, is opaque at
/// 10 um; its least absorbed wavelengths still pass about 1e-245 of the band; 100,000 km
/// pass nothing).
#[test]
fn an_opaque_path_is_an_error() {
    let path = Path::new(Air::new(293.15, 0.5, 1013.25).unwrap(), 1.0e7).unwrap();
    assert_eq!(path.spectral_transmittance(10.0), Err(Error::PathOpaque));
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let tau = path.band_transmittance(&band, 300.0).unwrap();
    assert!(tau > 0.0 && tau < 1e-200, "{tau}");
    let path = Path::new(Air::new(293.15, 0.5, 1013.25).unwrap(), 1.0e8).unwrap();
    assert_eq!(
        path.band_transmittance(&band, 300.0),
        Err(Error::PathOpaque)
    );
    let model = PathTransmittance::Continuum(path);
    assert_eq!(
        model.band_transmitted_radiance(&band, 300.0),
        Err(Error::PathOpaque)
    );
    // The path's own emission is that of a blackbody at the air temperature.
    assert_relative_eq!(
        path.band_path_radiance(&band).unwrap(),
        band.radiance(293.15).unwrap(),
        max_relative = 1e-12
    );
}
