//! The Roberts-Selby-Biberman continuum against an independent mpmath evaluation of the
//! same formulas (tests/data/atmosphere_continuum.csv, tools/refgen/atmosphere_refs.py), and
//! its invariants: Beer-Lambert, monotone in distance and humidity.

use approx::assert_relative_eq;
use bandtemp::atmosphere::continuum::{self_coefficient_296, temperature_factor};
use bandtemp::atmosphere::{Air, Path};
use bandtemp::Error;
use proptest::prelude::*;

const CONTINUUM_CSV: &str = include_str!("data/atmosphere_continuum.csv");

fn rows(csv: &str) -> impl Iterator<Item = Vec<f64>> + '_ {
    csv.lines()
        .filter(|line| !line.starts_with('#') && !line.trim().is_empty())
        .skip(1)
        .map(|line| line.split(',').map(|x| x.parse().unwrap()).collect())
}

#[test]
fn transmittance_matches_mpmath_evaluation() {
    let mut count = 0;
    for row in rows(CONTINUUM_CSV) {
        let [air_k, rh, p_hpa, d_m, wl_um, tau] = row[..] else {
            panic!("bad row {row:?}")
        };
        let path = Path::new(Air::new(air_k, rh, p_hpa).unwrap(), d_m).unwrap();
        let got = path.spectral_transmittance(wl_um).unwrap();
        // Optical depths are O(0.01-3); exp and the formula's few operations lose a few ulps.
        assert_relative_eq!(got, tau, max_relative = 1e-14);
        // And the optical depth itself, relative.
        assert_relative_eq!(
            path.optical_depth(wl_um).unwrap(),
            -tau.ln(),
            max_relative = 1e-13
        );
        count += 1;
    }
    assert_eq!(count, 60);
}

#[test]
fn coefficient_by_hand_at_10_um() {
    // C_s(1000 cm^-1, 296 K) = 4.18 + 5578 e^-7.87 = 6.3113... cm^2 g^-1 atm^-1.
    assert_relative_eq!(
        self_coefficient_296(1000.0),
        4.18 + 5578.0 * (-7.87f64).exp(),
        max_relative = 1e-15
    );
    assert!((self_coefficient_296(1000.0) - 6.3114).abs() < 1e-3);
    assert_eq!(temperature_factor(296.0), Ok(1.0));
    // Colder air absorbs more per gram (negative temperature dependence of the continuum).
    assert!(temperature_factor(273.15).unwrap() > 1.0);
}

#[test]
fn fill_table_samples_the_model_and_leaves_output_alone_on_error() {
    let path = Path::new(Air::new(303.15, 0.9, 1013.25).unwrap(), 1000.0).unwrap();
    let wavelengths: [f64; 61] = core::array::from_fn(|i| 8.0 + 0.1 * i as f64);
    let mut tau = [0.0; 61];
    path.fill_transmittance_table(&wavelengths, &mut tau)
        .unwrap();
    for (wl, t) in wavelengths.iter().zip(tau) {
        assert_eq!(t, path.spectral_transmittance(*wl).unwrap());
    }
    // Linear interpolation on this 0.1 um grid: largest error at midpoints, checked against
    // the model on a fine grid (the documented bound is 1e-4 for this humid 1 km path).
    let table = bandtemp::band::SpectralTable::new(&wavelengths, &tau).unwrap();
    let mut worst: f64 = 0.0;
    for i in 0..=6000 {
        let wl = 8.0 + 0.001 * f64::from(i);
        worst = worst.max((table.value_at(wl) - path.spectral_transmittance(wl).unwrap()).abs());
    }
    eprintln!("interpolation error on a 0.1 um grid: {worst:.3e}");
    assert!(worst < 1e-4, "interpolation error {worst}");

    let mut out = [7.0; 3];
    assert_eq!(
        path.fill_transmittance_table(&[9.0, 10.0, 15.0], &mut out),
        Err(Error::OutsideContinuumModel)
    );
    assert_eq!(out, [7.0; 3], "untouched on error");
    assert_eq!(
        path.fill_transmittance_table(&[9.0, 10.0], &mut out),
        Err(Error::TableLengthMismatch)
    );
}

#[test]
fn named_errors() {
    let air = Air::new(293.15, 0.5, 1013.25).unwrap();
    assert_eq!(Path::new(air, -1.0), Err(Error::DistanceNegative));
    assert_eq!(Path::new(air, f64::NAN), Err(Error::NonFinite));
    let path = Path::new(air, 100.0).unwrap();
    // 3-5 um (MWIR) and 7.5 um are outside the model: the caller must supply a table.
    assert_eq!(
        path.spectral_transmittance(4.0),
        Err(Error::OutsideContinuumModel)
    );
    assert_eq!(
        path.spectral_transmittance(7.99),
        Err(Error::OutsideContinuumModel)
    );
    assert_eq!(
        path.spectral_transmittance(14.01),
        Err(Error::OutsideContinuumModel)
    );
    assert_eq!(path.spectral_transmittance(f64::NAN), Err(Error::NonFinite));
    assert_eq!(
        Error::OutsideContinuumModel.message(),
        "outside the 8-14 um water-vapour continuum model: supply a spectral transmittance table"
    );
    // Zero distance and dry air both transmit everything.
    assert_eq!(
        Path::new(air, 0.0).unwrap().spectral_transmittance(10.0),
        Ok(1.0)
    );
    let dry = Path::new(Air::new(293.15, 0.0, 1013.25).unwrap(), 1000.0).unwrap();
    assert_eq!(dry.spectral_transmittance(10.0), Ok(1.0));
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    /// Beer-Lambert: tau(d1 + d2) = tau(d1) tau(d2) at every wavelength.
    #[test]
    fn beer_lambert_multiplies(
        t_c in -40.0f64..50.0, rh in 0.0f64..=1.0, p_hpa in 500.0f64..1100.0,
        d1 in 0.0f64..3000.0, d2 in 0.0f64..3000.0, wl in 8.0f64..=14.0,
    ) {
        let air = Air::new(t_c + 273.15, rh, p_hpa).unwrap();
        let whole = Path::new(air, d1 + d2).unwrap().spectral_transmittance(wl).unwrap();
        let a = Path::new(air, d1).unwrap().spectral_transmittance(wl).unwrap();
        let b = Path::new(air, d2).unwrap().spectral_transmittance(wl).unwrap();
        // tau = exp(-k d): a rounding of the optical depth k d (a few ulp of it) is a
        // relative error of that size in tau, so the tolerance grows with the depth (a
        // fixed 1e-14 failed at a depth of 34: 49 C, 80 %, 3.9 km at 13.9 um, where the
        // product is 1.24e-14 off).
        let depth = -whole.max(1e-300).ln();
        let tolerance = 8.0 * f64::EPSILON * (1.0 + depth);
        prop_assert!((whole - a * b).abs() <= tolerance * whole.max(1e-300) + 1e-300);
    }

    /// More distance or more humidity never transmits more (strictly less when there is
    /// water on the path).
    #[test]
    fn monotone_in_distance_and_humidity(
        t_c in -40.0f64..50.0, rh in 0.01f64..0.99, d in 1.0f64..2000.0, wl in 8.0f64..=14.0,
        more in 1.001f64..2.0,
    ) {
        let air = Air::new(t_c + 273.15, rh, 1013.25).unwrap();
        let base = Path::new(air, d).unwrap().spectral_transmittance(wl).unwrap();
        let longer = Path::new(air, d * more).unwrap().spectral_transmittance(wl).unwrap();
        let wetter_air = Air::new(t_c + 273.15, (rh * more).min(1.0), 1013.25).unwrap();
        let wetter = Path::new(wetter_air, d).unwrap().spectral_transmittance(wl).unwrap();
        prop_assert!(longer < base);
        prop_assert!(wetter < base);
        prop_assert!(base > 0.0 && base < 1.0);
    }
}
