//! Band radiance and its inversion against mpmath reference vectors (tests/data, generated
//! by tools/refgen/planck_refs.py), and every error path of the band API.

mod common;

use bandtemp::band::{Band, SpectralTable};
use bandtemp::planck::{spectral, Detector};
use bandtemp::Error;
use common::{
    assert_close, band_case, detector, read_csv, read_response, relative_error, tol, BandCase,
    C2_UMK,
};

#[test]
fn rectangular_band_radiance_matches_mpmath() {
    let rows = read_csv("band_radiance.csv");
    let (mut worst, mut worst_derivative) = (0.0_f64, 0.0_f64);
    for row in &rows {
        let BandCase {
            band,
            temperature_k,
            what,
            ..
        } = band_case(row);
        let (radiance, derivative) = band.radiance_and_derivative(temperature_k).unwrap();
        worst = worst.max(assert_close(
            &what,
            radiance,
            row.f64("radiance"),
            tol::BAND_REL,
            0.0,
        ));
        worst_derivative = worst_derivative.max(assert_close(
            &format!("{what} dL/dT"),
            derivative,
            row.f64("dradiance_dt"),
            tol::BAND_DERIVATIVE_REL,
            0.0,
        ));
        assert_eq!(band.radiance(temperature_k), Ok(radiance), "{what}");
        assert_eq!(
            band.radiance_derivative(temperature_k),
            Ok(derivative),
            "{what}"
        );
    }
    assert!(rows.len() > 400, "too few band rows: {}", rows.len());
    println!("rectangular: worst rel error {worst:e}, derivative {worst_derivative:e}");
}

#[test]
fn tabulated_band_radiance_matches_mpmath() {
    let rows = read_csv("tabulated_band_radiance.csv");
    let mut worst = 0.0_f64;
    for row in &rows {
        let (wavelengths_um, values) = read_response(row.text("table"));
        let table = SpectralTable::new(&wavelengths_um, &values).unwrap();
        let det = detector(row);
        let (lo_um, hi_um) = (row.f64("lo_um"), row.f64("hi_um"));
        let temperature_k = row.f64("temperature_k");
        let band = Band::with_response(lo_um, hi_um, det, table).unwrap();
        worst = worst.max(assert_close(
            &format!(
                "line {}: {} {det:?} [{lo_um}, {hi_um}] at {temperature_k} K",
                row.line,
                row.text("table")
            ),
            band.radiance(temperature_k).unwrap(),
            row.f64("radiance"),
            tol::TABULATED_REL,
            0.0,
        ));
    }
    assert!(rows.len() >= 100, "too few tabulated rows: {}", rows.len());
    assert!(
        rows.iter().any(|r| r.text("table") == "invented_lwir_100"),
        "the 100-point table must be covered"
    );
    println!("tabulated: worst rel error {worst:e}");
}

#[test]
fn inversion_round_trips_over_the_reference_domain() {
    let mut worst = 0.0_f64;
    let mut max_iterations = 0;
    for row in &read_csv("band_radiance.csv") {
        let det = detector(row);
        let band = Band::rectangular(row.f64("lo_um"), row.f64("hi_um"), det).unwrap();
        let temperature_k = row.f64("temperature_k");
        let what = format!("line {}", row.line);
        // From the crate's own forward value (the round trip the issue names) ...
        let solution = band
            .solve_temperature(band.radiance(temperature_k).unwrap())
            .unwrap();
        worst = worst.max(assert_close(
            &what,
            solution.temperature_k,
            temperature_k,
            tol::ROUND_TRIP_REL,
            0.0,
        ));
        max_iterations = max_iterations.max(solution.iterations);
        // ... and from mpmath's radiance, independent of the forward code.
        assert_close(
            &format!("{what} from the mpmath radiance"),
            band.temperature(row.f64("radiance")).unwrap(),
            temperature_k,
            tol::ROUND_TRIP_REL,
            0.0,
        );
    }
    println!("round trip: worst |dT|/T {worst:e}, at most {max_iterations} evaluations");
}

/// The tabulated quadrature's widest 4-node panels (width up to 0.045 in x from x >= 1,
/// `FOUR_NODE_WIDTH` in src/planck.rs; truncation below 6e-18 per panel by its error
/// argument) against mpmath: the 100-point table at 200-600 K, the 20-point table at
/// 1800-3400 K, where panel widths cross that limit, and the 5-point table at 1500-8000 K,
/// whose segments are up to 0.45 wide. What is left is rounding, mostly that of
/// x = c2/(lambda T), which moves the result by about x_max ulp (x_max = c2/(lo T) at the
/// band's short end): allowed 2 (1 + x_max) eps. A rule wider than its error argument
/// shows: a 4-node limit of 0.2 gives 2.3e-15 at 3000 K (allowed 1.9e-15), of 0.4 gives
/// 2e-13 at 1500 K. (Between 0.045 and 0.2 the truncation stays below what a band
/// integral in double precision resolves; the limit rests on the mpmath measurement
/// stated at `FOUR_NODE_WIDTH`.)
#[test]
fn tabulated_panel_rules_match_mpmath() {
    let rows = read_csv("tabulated_panel_rules.csv");
    let mut worst = 0.0_f64;
    for row in &rows {
        let (wavelengths_um, values) = read_response(row.text("table"));
        let table = SpectralTable::new(&wavelengths_um, &values).unwrap();
        let det = detector(row);
        let (lo_um, hi_um) = (row.f64("lo_um"), row.f64("hi_um"));
        let temperature_k = row.f64("temperature_k");
        let band = Band::with_response(lo_um, hi_um, det, table).unwrap();
        let x_max = C2_UMK / (lo_um * temperature_k);
        let allowed = 2.0 * (1.0 + x_max) * f64::EPSILON;
        let error = assert_close(
            &format!(
                "line {}: {} {det:?} [{lo_um}, {hi_um}] at {temperature_k} K",
                row.line,
                row.text("table")
            ),
            band.radiance(temperature_k).unwrap(),
            row.f64("radiance"),
            allowed,
            0.0,
        );
        worst = worst.max(error / allowed);
    }
    assert_eq!(rows.len(), 30, "the generator writes 30 rows");
    println!("panel rules: worst error {worst:.2} of the allowance");
}

#[test]
fn tabulated_inversion_round_trips() {
    for row in &read_csv("tabulated_band_radiance.csv") {
        let (wavelengths_um, values) = read_response(row.text("table"));
        let table = SpectralTable::new(&wavelengths_um, &values).unwrap();
        let band =
            Band::with_response(row.f64("lo_um"), row.f64("hi_um"), detector(row), table).unwrap();
        let temperature_k = row.f64("temperature_k");
        assert_close(
            &format!("line {}", row.line),
            band.temperature(row.f64("radiance")).unwrap(),
            temperature_k,
            tol::ROUND_TRIP_REL,
            0.0,
        );
    }
}

#[test]
fn inversion_reaches_cryogenic_and_hot_ends() {
    // The solver's documented range is 0.1 K .. 1e6 K; sample its ends where the radiance
    // is a normal double.
    let cases = [
        (Detector::Energy, 8.0, 14.0, 20.0),
        (Detector::Photon, 3.0, 5.0, 60.0),
        (Detector::Energy, 100.0, 1000.0, 0.5),
        (Detector::Energy, 0.9, 1.1, 20_000.0),
        (Detector::Photon, 0.3, 30.0, 500_000.0),
    ];
    for (det, lo_um, hi_um, temperature_k) in cases {
        let band = Band::rectangular(lo_um, hi_um, det).unwrap();
        let radiance = band.radiance(temperature_k).unwrap();
        let back = band.temperature(radiance).unwrap();
        assert!(
            relative_error(back, temperature_k) <= tol::ROUND_TRIP_REL,
            "{det:?} [{lo_um}, {hi_um}] at {temperature_k} K: got {back}"
        );
    }
}

// ---------------------------------------------------------------- error paths

/// Asserts an error result (never a panic, never an Ok NaN).
#[track_caller]
fn expect_err<T: std::fmt::Debug>(what: &str, result: bandtemp::Result<T>, expected: Error) {
    assert_eq!(result.unwrap_err(), expected, "{what}");
}

#[test]
fn spectral_laws_reject_bad_inputs() {
    for det in [Detector::Energy, Detector::Photon] {
        expect_err(
            "NaN wavelength",
            spectral(det, f64::NAN, 300.0),
            Error::NonFinite,
        );
        expect_err(
            "inf wavelength",
            spectral(det, f64::INFINITY, 300.0),
            Error::NonFinite,
        );
        expect_err("NaN T", spectral(det, 10.0, f64::NAN), Error::NonFinite);
        expect_err(
            "-inf T",
            spectral(det, 10.0, f64::NEG_INFINITY),
            Error::NonFinite,
        );
        expect_err(
            "zero wavelength",
            spectral(det, 0.0, 300.0),
            Error::WavelengthNotPositive,
        );
        expect_err(
            "negative wavelength",
            spectral(det, -1.0, 300.0),
            Error::WavelengthNotPositive,
        );
        expect_err(
            "zero T",
            spectral(det, 10.0, 0.0),
            Error::TemperatureNotPositive,
        );
        expect_err(
            "negative T",
            spectral(det, 10.0, -5.0),
            Error::TemperatureNotPositive,
        );
        // x = c2/(0.1 um * 10 K) = 14 388: e^-x is far below any double.
        expect_err(
            "underflow",
            spectral(det, 0.1, 10.0),
            Error::RadianceUnderflow,
        );
        // Subnormal result: at 1 um, x = 735 (energy: c1L e^-x ~ 7e-312) or x = 790
        // (photon: c1p e^-x ~ 3e-317) leaves the radiance below MIN_POSITIVE but not zero.
        let x = if det == Detector::Energy {
            735.0
        } else {
            790.0
        };
        expect_err(
            "subnormal",
            spectral(det, 1.0, C2_UMK / x),
            Error::RadianceUnderflow,
        );
        expect_err(
            "overflow",
            spectral(det, 1e-60, 1e300),
            Error::RadianceOverflow,
        );
    }
    use bandtemp::planck::{blackbody_fraction, blackbody_fraction_complement};
    expect_err("F(NaN)", blackbody_fraction(f64::NAN), Error::NonFinite);
    expect_err("F(0)", blackbody_fraction(0.0), Error::LambdaTNotPositive);
    expect_err("F(-1)", blackbody_fraction(-1.0), Error::LambdaTNotPositive);
    expect_err(
        "1-F(-inf)",
        blackbody_fraction_complement(f64::NEG_INFINITY),
        Error::NonFinite,
    );
}

#[test]
fn bands_reject_bad_edges() {
    let cases = [
        (10.0, 8.0, Error::InvalidBand),
        (10.0, 10.0, Error::InvalidBand),
        (0.0, 10.0, Error::InvalidBand),
        (-1.0, 10.0, Error::InvalidBand),
        (f64::NAN, 10.0, Error::NonFinite),
        (8.0, f64::INFINITY, Error::NonFinite),
    ];
    for (lo_um, hi_um, expected) in cases {
        expect_err(
            &format!("[{lo_um}, {hi_um}]"),
            Band::rectangular(lo_um, hi_um, Detector::Energy),
            expected,
        );
        let (w, v) = ([8.0, 14.0], [1.0, 1.0]);
        let table = SpectralTable::new(&w, &v).unwrap();
        expect_err(
            &format!("table band [{lo_um}, {hi_um}]"),
            Band::with_response(lo_um, hi_um, Detector::Photon, table),
            expected,
        );
    }
}

#[test]
fn tables_reject_bad_data() {
    let cases: [(&[f64], &[f64], Error); 9] = [
        (
            &[8.0, 10.0, 9.0],
            &[1.0, 1.0, 1.0],
            Error::TableNotIncreasing,
        ),
        (
            &[8.0, 8.0, 9.0],
            &[1.0, 1.0, 1.0],
            Error::TableNotIncreasing,
        ),
        (&[-1.0, 8.0], &[1.0, 1.0], Error::TableNotIncreasing),
        (&[0.0, 8.0], &[1.0, 1.0], Error::TableNotIncreasing),
        (&[8.0, 9.0], &[1.0, -0.1], Error::TableValueNegative),
        (&[8.0], &[1.0], Error::TableTooShort),
        (&[], &[], Error::TableTooShort),
        (&[8.0, 9.0, 10.0], &[1.0, 1.0], Error::TableLengthMismatch),
        (&[8.0, f64::NAN], &[1.0, 1.0], Error::NonFinite),
    ];
    for (wavelengths_um, values, expected) in cases {
        expect_err(
            &format!("{wavelengths_um:?} {values:?}"),
            SpectralTable::new(wavelengths_um, values),
            expected,
        );
    }
    expect_err(
        "infinite value",
        SpectralTable::new(&[8.0, 9.0], &[1.0, f64::INFINITY]),
        Error::NonFinite,
    );
}

#[test]
fn tabulated_bands_need_overlap_and_response() {
    let (w, v) = ([8.0, 10.0, 14.0], [0.5, 1.0, 0.5]);
    let table = SpectralTable::new(&w, &v).unwrap();
    expect_err(
        "disjoint",
        Band::with_response(3.0, 5.0, Detector::Energy, table),
        Error::BandEmpty,
    );
    expect_err(
        "touching",
        Band::with_response(14.0, 15.0, Detector::Energy, table),
        Error::BandEmpty,
    );
    let zeros = [0.0, 0.0, 0.0];
    let dark = SpectralTable::new(&w, &zeros).unwrap();
    expect_err(
        "all zero",
        Band::with_response(7.0, 15.0, Detector::Energy, dark),
        Error::BandEmpty,
    );
    // Zero over the overlap only.
    let (w2, v2) = ([8.0, 10.0, 11.0, 14.0], [1.0, 0.0, 0.0, 1.0]);
    let notch = SpectralTable::new(&w2, &v2).unwrap();
    expect_err(
        "zero over the overlap",
        Band::with_response(10.0, 11.0, Detector::Photon, notch),
        Error::BandEmpty,
    );
}

#[test]
fn band_radiance_rejects_bad_temperatures_and_underflow() {
    let (w, v) = ([0.3, 0.35, 0.4], [1.0, 1.0, 1.0]);
    let table = SpectralTable::new(&w, &v).unwrap();
    for band in [
        Band::rectangular(0.3, 0.4, Detector::Energy).unwrap(),
        Band::rectangular(0.3, 0.4, Detector::Photon).unwrap(),
        Band::with_response(0.3, 0.4, Detector::Energy, table).unwrap(),
    ] {
        expect_err("NaN T", band.radiance(f64::NAN), Error::NonFinite);
        expect_err("inf T", band.radiance(f64::INFINITY), Error::NonFinite);
        expect_err("zero T", band.radiance(0.0), Error::TemperatureNotPositive);
        expect_err(
            "negative T",
            band.radiance(-300.0),
            Error::TemperatureNotPositive,
        );
        expect_err(
            "-0 T",
            band.radiance_derivative(-0.0),
            Error::TemperatureNotPositive,
        );
        // 0.3-0.4 um at 40 K: x ~ 900-1200, the band radiance is below any double.
        expect_err("underflow", band.radiance(40.0), Error::RadianceUnderflow);
        expect_err(
            "underflow 1 K",
            band.radiance(1.0),
            Error::RadianceUnderflow,
        );
    }
}

#[test]
fn band_radiance_never_returns_nan_at_extreme_temperatures() {
    // Far outside the thermometric domain: either a finite positive radiance or a named
    // error, never NaN and never a panic.
    let (w, v) = ([8.0, 14.0], [1.0, 1.0]);
    let table = SpectralTable::new(&w, &v).unwrap();
    for det in [Detector::Energy, Detector::Photon] {
        for band in [
            Band::rectangular(8.0, 14.0, det).unwrap(),
            Band::rectangular(10.0, 10.001, det).unwrap(),
            Band::with_response(8.0, 14.0, det, table).unwrap(),
        ] {
            for temperature_k in [
                1e-300,
                1e-10,
                1e-3,
                1e7,
                1e12,
                1e100,
                1e200,
                1e300,
                f64::MAX,
            ] {
                match band.radiance_and_derivative(temperature_k) {
                    Ok((radiance, derivative)) => {
                        assert!(
                            radiance.is_finite() && radiance > 0.0,
                            "{det:?} {temperature_k} K: radiance {radiance}"
                        );
                        assert!(
                            derivative.is_finite() && derivative >= 0.0,
                            "{det:?} {temperature_k} K: derivative {derivative}"
                        );
                    }
                    Err(e) => assert!(
                        matches!(e, Error::RadianceUnderflow | Error::RadianceOverflow),
                        "{det:?} {temperature_k} K: {e:?}"
                    ),
                }
            }
        }
    }
}

#[test]
fn inversion_rejects_bad_radiances() {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    expect_err("NaN", band.temperature(f64::NAN), Error::NonFinite);
    expect_err("inf", band.temperature(f64::INFINITY), Error::NonFinite);
    expect_err(
        "-inf",
        band.temperature(f64::NEG_INFINITY),
        Error::NonFinite,
    );
    expect_err("zero", band.temperature(0.0), Error::RadianceNotPositive);
    expect_err("-0", band.temperature(-0.0), Error::RadianceNotPositive);
    expect_err(
        "negative",
        band.temperature(-1.0),
        Error::RadianceNotPositive,
    );
    expect_err(
        "subnormal",
        band.temperature(1e-310),
        Error::RadianceSubnormal,
    );
    expect_err(
        "smallest subnormal",
        band.temperature(f64::from_bits(1)),
        Error::RadianceSubnormal,
    );
    // Above what 1e6 K gives (about 7e8 W m^-2 sr^-1 in 8-14 um).
    expect_err(
        "too bright",
        band.temperature(1e300),
        Error::RadianceOutOfRange,
    );
    expect_err(
        "too bright (solve)",
        band.solve_temperature(f64::MAX),
        Error::RadianceOutOfRange,
    );
    // Below what 0.1 K gives in a far-infrared band (x ~ 96 at 0.1 K, L ~ 1e-39).
    let far = Band::rectangular(1000.0, 2000.0, Detector::Photon).unwrap();
    expect_err(
        "too dark",
        far.temperature(1e-300),
        Error::RadianceOutOfRange,
    );
}

/// A band reaching down to a tiny lower edge (lambda*T far below 1 um K) is the band from
/// that edge up: its radiance is the finite value of the rest of the band, not an error.
/// Reference: the rectangular 0-8 um band at 300 K equals sigma T^4/pi * F(8 um * 300 K);
/// both F and sigma are checked against CODATA/mpmath in reference_planck.rs.
#[test]
fn band_with_a_tiny_lower_edge_has_the_value_of_the_rest() {
    use bandtemp::planck::{blackbody_fraction, total_radiance};
    for lo_um in [1e-99, 1e-300] {
        let band = Band::rectangular(lo_um, 8.0, Detector::Energy).unwrap();
        let (radiance, derivative) = band.radiance_and_derivative(300.0).unwrap();
        let expected = total_radiance(300.0).unwrap() * blackbody_fraction(2400.0).unwrap();
        assert!(
            (radiance / expected - 1.0).abs() < 1e-13,
            "{lo_um}: {radiance} vs {expected}"
        );
        assert!(derivative.is_finite() && derivative > 0.0);
    }
}
