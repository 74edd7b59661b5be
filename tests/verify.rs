//! The calibration checks of `bandtemp::verify`: each against values built outside the
//! code under test (residuals and map errors placed on purpose and recomputed here with the
//! Sakuma-Hattori closed forms written out from CODATA 2018 h, c, k; coverage figures by
//! hand; a table row moved by a known amount), each with a case that must pass and one that
//! must fail.

mod common;

use bandtemp::band::{Band, SignalCurve};
use bandtemp::calibration::{OffsetCurve, SakumaHattori};
use bandtemp::frame::{CountsMap, FrameTable, TableRow, TemperatureRange};
use bandtemp::planck::Detector;
use bandtemp::verify::{self, MAX_POINTS_PER_ROW, MAX_SAMPLES};
use bandtemp::Error;
use common::tol;

/// Agreement of a figure recomputed here in double precision with the check's: both
/// invert the same closed form at temperatures up to 600 K, each rounding to a few ulp of
/// T (1e-13 K); 1e-9 K leaves room for the log1p and division.
const CLOSED_FORM_ABS_K: f64 = 1e-9;

/// c2 = h c / k in um K from the CODATA 2018 exact constants.
fn c2_umk() -> f64 {
    6.626_070_15e-34 * 299_792_458.0 / 1.380_649e-23 * 1e6
}

/// S(T) = C / (exp(c2 / (A T + B)) - 1), written out (DESIGN.md).
fn sh_signal(a_um: f64, b_umk: f64, c: f64, t_k: f64) -> f64 {
    c / (c2_umk() / (a_um * t_k + b_umk)).exp_m1()
}

/// T(S) = (c2 / ln(C / S + 1) - B) / A, written out.
fn sh_temperature(a_um: f64, b_umk: f64, c: f64, signal: f64) -> f64 {
    (c2_umk() / (c / signal).ln_1p() - b_umk) / a_um
}

/// An invented 8-14 um calibration in counts: A = 10.2 um, B = 60 um K, C = 2e6 counts.
const SH: (f64, f64, f64) = (10.2, 60.0, 2.0e6);

fn sh() -> SakumaHattori {
    SakumaHattori::new(SH.0, SH.1, SH.2).unwrap()
}

#[test]
fn residuals_report_the_offsets_placed_in_the_data() {
    let dark = 900.0;
    let curve = OffsetCurve::new(sh(), dark).unwrap();
    let t_k = [263.15, 300.0, 350.0, 420.0, 480.0];
    let delta_k = [0.010, -0.020, 0.005, -0.030, 0.010];
    let signals: Vec<f64> = t_k
        .iter()
        .zip(delta_k)
        .map(|(&t, d)| dark + sh_signal(SH.0, SH.1, SH.2, t + d))
        .collect();
    let report = verify::residuals(&curve, &t_k, &signals).unwrap();
    let rms = (delta_k.iter().map(|d| d * d).sum::<f64>() / 5.0).sqrt();
    let mean = delta_k.iter().sum::<f64>() / 5.0;
    assert_eq!(report.points, 5);
    assert_eq!((report.worst_index, report.worst_t_k), (3, 420.0));
    assert!(
        (report.worst_residual_k - -0.030).abs() < CLOSED_FORM_ABS_K,
        "{report:?}"
    );
    assert!((report.max_abs_residual_k - 0.030).abs() < CLOSED_FORM_ABS_K);
    assert!((report.rms_residual_k - rms).abs() < CLOSED_FORM_ABS_K);
    assert!((report.mean_residual_k - mean).abs() < CLOSED_FORM_ABS_K);

    // Exact data pass a 1 mK limit; the placed 30 mK do not.
    let exact: Vec<f64> = t_k
        .iter()
        .map(|&t| dark + sh_signal(SH.0, SH.1, SH.2, t))
        .collect();
    let clean = verify::residuals(&curve, &t_k, &exact).unwrap();
    assert!(clean.max_abs_residual_k < 1e-9, "{clean:?}");
    assert!(report.max_abs_residual_k > 1e-3);
}

#[test]
fn residuals_refuse_bad_points_by_name() {
    let curve = OffsetCurve::new(sh(), 900.0).unwrap();
    assert_eq!(
        verify::residuals(&curve, &[], &[]),
        Err(Error::VerifyNoPoints)
    );
    assert_eq!(
        verify::residuals(&curve, &[300.0], &[1.0, 2.0]),
        Err(Error::CalibrationLengthMismatch)
    );
    assert_eq!(
        verify::residuals(&curve, &[-300.0], &[5000.0]),
        Err(Error::TemperatureNotPositive)
    );
    assert_eq!(
        verify::residuals(&curve, &[300.0], &[f64::NAN]),
        Err(Error::NonFinite)
    );
    assert_eq!(
        verify::residuals(&curve, &[300.0], &[800.0]),
        Err(Error::SignalAtOrBelowOffset)
    );
}

#[test]
fn residuals_do_not_overflow_for_wild_points() {
    // A signal far above the curve's range reads back near 1e155 K: the rms must stay
    // finite (the squares of such residuals overflow a double).
    let report = verify::residuals(&sh(), &[300.0, 301.0], &[1e157, 1e157]).unwrap();
    assert!(report.rms_residual_k.is_finite() && report.mean_residual_k.is_finite());
    assert!((report.rms_residual_k / report.max_abs_residual_k - 1.0).abs() < 1e-12);
}

#[test]
fn curve_against_model_finds_a_counts_map_error_where_it_is_largest() {
    // Model and curve are the same closed form; the map says the model's signal is 1.2 %
    // larger than the curve's (gain 1.012), so the curve reads every temperature cold by
    // T(S(T) / 1.012) - T, recomputed here.
    let (lo_k, hi_k, n) = (250.0, 600.0, 351);
    let map = CountsMap::linear(1.012, 0.0).unwrap();
    let report = verify::curve_against_model(&sh(), &sh(), map, lo_k, hi_k, n).unwrap();
    let mut expected = (0.0f64, 0.0f64);
    let mut mean = 0.0;
    for i in 0..n {
        let t = if i + 1 == n {
            hi_k
        } else {
            lo_k + (hi_k - lo_k) * (i as f64 / (n - 1) as f64)
        };
        let e = sh_temperature(SH.0, SH.1, SH.2, sh_signal(SH.0, SH.1, SH.2, t) / 1.012) - t;
        mean += e / n as f64;
        if e.abs() > expected.1.abs() {
            expected = (t, e);
        }
    }
    assert_eq!(report.samples, n);
    assert_eq!(report.worst_t_k, expected.0, "{report:?}");
    assert!((report.worst_error_k - expected.1).abs() < CLOSED_FORM_ABS_K);
    assert!((report.mean_error_k - mean).abs() < CLOSED_FORM_ABS_K);
    assert!(
        report.worst_error_k < -0.1,
        "a 1.2 % gain error is tenths of a kelvin"
    );

    // The identity map: the same curve agrees with itself to rounding.
    let identity = CountsMap::linear(1.0, 0.0).unwrap();
    let same = verify::curve_against_model(&sh(), &sh(), identity, lo_k, hi_k, n).unwrap();
    assert!(same.max_abs_error_k < CLOSED_FORM_ABS_K, "{same:?}");
}

#[test]
fn curve_against_model_of_a_band_against_itself_is_the_inversion_accuracy() {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let identity = CountsMap::linear(1.0, 0.0).unwrap();
    let report = verify::curve_against_model(&band, &band, identity, 250.0, 1500.0, 301).unwrap();
    assert!(
        report.max_abs_error_k <= tol::ROUND_TRIP_REL * 1500.0,
        "{report:?}"
    );
}

#[test]
fn range_and_sample_count_are_checked() {
    let identity = CountsMap::linear(1.0, 0.0).unwrap();
    for (lo, hi) in [
        (500.0, 250.0),
        (0.0, 250.0),
        (-1.0, 250.0),
        (250.0, f64::NAN),
    ] {
        let err = verify::curve_against_model(&sh(), &sh(), identity, lo, hi, 11);
        assert!(
            matches!(err, Err(Error::VerifyRangeInvalid | Error::NonFinite)),
            "{lo} {hi}: {err:?}"
        );
        assert!(verify::round_trip(&sh(), lo, hi, 11).is_err());
    }
    for n in [0, 1, MAX_SAMPLES + 1] {
        assert_eq!(
            verify::round_trip(&sh(), 250.0, 500.0, n),
            Err(Error::VerifySampleCountInvalid)
        );
    }
}

/// A curve that rises, falls by half its slope over (400, 410) K, and rises again: its
/// inverse is the identity, so round trips also fail there.
struct Dip;

impl SignalCurve for Dip {
    fn signal_and_derivative(&self, t: f64) -> bandtemp::Result<(f64, f64)> {
        Ok(if t <= 400.0 {
            (t, 1.0)
        } else if t < 410.0 {
            (400.0 - 0.5 * (t - 400.0), -0.5)
        } else {
            (t - 15.0, 1.0)
        })
    }
    fn temperature(&self, signal: f64) -> bandtemp::Result<f64> {
        Ok(signal)
    }
}

/// The exact curve with an inverse that reads 1 ppm warm.
struct Warm;

impl SignalCurve for Warm {
    fn signal_and_derivative(&self, t: f64) -> bandtemp::Result<(f64, f64)> {
        sh().signal_and_derivative(t)
    }
    fn temperature(&self, signal: f64) -> bandtemp::Result<f64> {
        Ok(sh().temperature(signal)? * (1.0 + 1e-6))
    }
}

#[test]
fn round_trip_passes_exact_curves_and_finds_a_dip_and_a_bias() {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let report = verify::round_trip(&band, 250.0, 1500.0, 251).unwrap();
    assert!(report.monotonic() && report.max_abs_error_k <= tol::ROUND_TRIP_REL * 1500.0);
    let report = verify::round_trip(&sh(), 250.0, 600.0, 351).unwrap();
    assert!(report.monotonic() && report.max_abs_error_k < CLOSED_FORM_ABS_K);

    // 1 K steps from 300 K: 401 K is the first sample whose signal fell.
    let dip = verify::round_trip(&Dip, 300.0, 500.0, 201).unwrap();
    assert_eq!(dip.first_non_monotonic_k, Some(401.0));
    assert!(!dip.monotonic());

    // 1 ppm of 600 K at the hot end.
    let warm = verify::round_trip(&Warm, 250.0, 600.0, 36).unwrap();
    assert_eq!(warm.worst_t_k, 600.0);
    assert!(
        (warm.worst_error_k - 600e-6).abs() < CLOSED_FORM_ABS_K,
        "{warm:?}"
    );
    assert!(warm.monotonic());
}

#[test]
fn coverage_by_hand() {
    // Points 300..500 K over 290..480 K: 10 K extrapolated below, none above; the clipped
    // nodes 300, 320, 350, 480 leave the widest gap 350..480 K.
    let c = verify::coverage(&[300.0, 350.0, 500.0, 320.0], 290.0, 480.0).unwrap();
    assert_eq!((c.points, c.points_in_range), (4, 3));
    assert_eq!((c.t_min_k, c.t_max_k), (300.0, 500.0));
    assert_eq!(
        (c.extrapolated_below_k, c.extrapolated_above_k),
        (10.0, 0.0)
    );
    assert_eq!(
        (c.largest_gap_k, c.gap_lo_k, c.gap_hi_k),
        (130.0, 350.0, 480.0)
    );
    assert_eq!(c.extrapolated_k(), 10.0);

    // Points that bracket the range: nothing extrapolated; duplicates change nothing.
    let c = verify::coverage(&[280.0, 400.0, 400.0, 490.0], 290.0, 480.0).unwrap();
    assert_eq!(c.extrapolated_k(), 0.0);
    assert_eq!(
        (c.largest_gap_k, c.gap_lo_k, c.gap_hi_k),
        (110.0, 290.0, 400.0)
    );

    // One point in the middle: 100 K each side, no gap between points.
    let c = verify::coverage(&[400.0], 300.0, 500.0).unwrap();
    assert_eq!(
        (c.extrapolated_below_k, c.extrapolated_above_k),
        (100.0, 100.0)
    );
    assert_eq!(c.largest_gap_k, 0.0);

    // All points below the range: the whole range is extrapolated above them.
    let c = verify::coverage(&[100.0, 200.0], 300.0, 400.0).unwrap();
    assert_eq!(
        (c.extrapolated_below_k, c.extrapolated_above_k),
        (0.0, 200.0)
    );
    assert_eq!(c.points_in_range, 0);

    assert_eq!(
        verify::coverage(&[], 300.0, 400.0),
        Err(Error::VerifyNoPoints)
    );
    assert_eq!(
        verify::coverage(&[0.0], 300.0, 400.0),
        Err(Error::TemperatureNotPositive)
    );
    assert_eq!(
        verify::coverage(&[350.0], 400.0, 300.0),
        Err(Error::VerifyRangeInvalid)
    );
}

fn lwir_table(storage: &mut Vec<TableRow>) -> FrameTable<'_> {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let range = TemperatureRange::new(250.0, 1500.0).unwrap();
    let rows = FrameTable::required_rows(&band, range, 1e-3).unwrap();
    storage.resize(rows, [0.0; 4]);
    FrameTable::build(&band, range, 1e-3, storage).unwrap()
}

#[test]
fn a_sound_table_passes_within_its_tolerance() {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let mut storage = Vec::new();
    let table = lwir_table(&mut storage);
    let report = verify::frame_table(&table, &band, 37).unwrap();
    assert_eq!(report.rows, table.rows().len());
    assert!(report.samples >= 30 * report.rows, "{report:?}");
    assert_eq!((report.refused, report.non_monotonic), (0, 0));
    // The table was built to 1 mK per pixel (table error plus a rounding allowance), so
    // the table error alone found on an independent grid is below 1 mK, and of the order
    // of what the construction measured.
    assert!(report.max_abs_error_k > 0.0 && report.max_abs_error_k <= 1e-3);
    assert!(report.max_abs_error_k <= 2.0 * report.claimed_max_error_k);
    assert_eq!(
        report.claimed_max_error_k,
        table.geometry().max_table_error_k()
    );
}

/// Rows changed after the build (a moved row, a row turned downhill) never reach the
/// check: the table's fingerprint refuses them when the stored parts are re-wrapped. (How
/// the check finds such rows in a table whose fingerprint matches them, as a faulty table
/// builder would produce, is tested inside the crate, `src/verify.rs`.)
#[test]
fn rows_changed_after_the_build_are_refused_before_the_check() {
    let mut storage = Vec::new();
    let table = lwir_table(&mut storage);
    let geometry = table.geometry();
    let k = table.rows().len() / 2;
    let mut rows = table.rows().to_vec();
    rows[k][0] += 0.05;
    assert_eq!(
        FrameTable::from_parts(geometry, &rows).err(),
        Some(Error::FrameRowsMismatch)
    );
    let mut rows = table.rows().to_vec();
    rows[k][1] = -rows[k][1].abs();
    assert_eq!(
        FrameTable::from_parts(geometry, &rows).err(),
        Some(Error::FrameRowsMismatch)
    );
}

#[test]
fn a_table_of_another_curve_fails_by_kelvins() {
    // Rows built for the photon band of the same edges, checked against the energy band.
    let photon = Band::rectangular(8.0, 14.0, Detector::Photon).unwrap();
    let energy = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let range = TemperatureRange::new(250.0, 1500.0).unwrap();
    let mut storage = vec![[0.0f32; 4]; FrameTable::required_rows(&photon, range, 1e-2).unwrap()];
    let table = FrameTable::build(&photon, range, 1e-2, &mut storage).unwrap();
    // Photon radiance is ~1e20 in these units: as band radiance it is far above any
    // temperature of the solver's range, so the exact inversion refuses it by name.
    assert_eq!(
        verify::frame_table(&table, &energy, 7),
        Err(Error::RadianceOutOfRange)
    );
    // A curve scaled by 2 reads every temperature too warm by kelvins.
    let sh_table_curve = sh();
    let doubled = SakumaHattori::new(SH.0, SH.1, 2.0 * SH.2).unwrap();
    let mut storage = vec![[0.0f32; 4]; 256];
    let table = FrameTable::build(
        &sh_table_curve,
        TemperatureRange::new(250.0, 600.0).unwrap(),
        1e-2,
        &mut storage,
    )
    .unwrap();
    let report = verify::frame_table(&table, &doubled, 7).unwrap();
    assert!(report.max_abs_error_k > 1.0, "{report:?}");
}

#[test]
fn points_per_row_are_bounded() {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
    let mut storage = Vec::new();
    let table = lwir_table(&mut storage);
    for n in [0, MAX_POINTS_PER_ROW + 1] {
        assert_eq!(
            verify::frame_table(&table, &band, n),
            Err(Error::VerifySampleCountInvalid)
        );
    }
    assert!(verify::frame_table(&table, &band, 1).is_ok());
}

#[test]
fn calibration_uncertainty_of_single_parameters_in_closed_form() {
    // Only A uncertain: T = (c2/L - B)/A at fixed signal gives u(T) = T sigma_A / A.
    let sigma_a = 0.01;
    let v = [[sigma_a * sigma_a, 0.0, 0.0], [0.0; 3], [0.0; 3]];
    let r = verify::calibration_uncertainty(&sh(), &v, 250.0, 600.0, 36).unwrap();
    assert_eq!(r.worst_t_k, 600.0);
    assert!((r.max_u_k - 600.0 * sigma_a / SH.0).abs() < 1e-12, "{r:?}");
    assert!((r.lo_u_k - 250.0 * sigma_a / SH.0).abs() < 1e-12);
    // Only B uncertain: u(T) = sigma_B / A everywhere.
    let v = [[0.0; 3], [0.0, 4.0, 0.0], [0.0; 3]];
    let r = verify::calibration_uncertainty(&sh(), &v, 250.0, 600.0, 36).unwrap();
    assert!((r.lo_u_k - 2.0 / SH.0).abs() < 1e-12 && (r.hi_u_k - 2.0 / SH.0).abs() < 1e-12);
}

/// u(T) with the Jacobian by central differences of the closed-form inverse written out
/// here, at the curve's own signal S(T).
fn u_by_differences(
    inverse: impl Fn(f64, f64, f64, f64) -> f64,
    p: [f64; 3],
    signal: f64,
    v: &[[f64; 3]; 3],
) -> f64 {
    let mut j = [0.0; 3];
    for (k, jk) in j.iter_mut().enumerate() {
        let h = 1e-6 * p[k].abs().max(1.0);
        let (mut up, mut down) = (p, p);
        up[k] += h;
        down[k] -= h;
        *jk = (inverse(up[0], up[1], up[2], signal) - inverse(down[0], down[1], down[2], signal))
            / (2.0 * h);
    }
    let mut var = 0.0;
    for a in 0..3 {
        for b in 0..3 {
            var += j[a] * v[a][b] * j[b];
        }
    }
    var.sqrt()
}

#[test]
fn calibration_uncertainty_matches_a_jacobian_by_differences() {
    // A covariance of the shape a points fit gives (strong A-B and B-C correlation).
    let v = [
        [2.4686e-5, -4.1753e-3, -5.0386],
        [-4.1753e-3, 0.71166, 847.86],
        [-5.0386, 847.86, 1.0321e6],
    ];
    let r = verify::calibration_uncertainty(&sh(), &v, 250.0, 600.0, 8).unwrap();
    for (t, u) in [(250.0, r.lo_u_k), (600.0, r.hi_u_k)] {
        let s = sh_signal(SH.0, SH.1, SH.2, t);
        let want = u_by_differences(sh_temperature, [SH.0, SH.1, SH.2], s, &v);
        assert!((u - want).abs() <= 1e-5 * want, "{t} K: {u} vs {want}");
    }
    // The Wien form: T = (c2 / ln(C/S) - B) / A.
    let wien = bandtemp::calibration::SakumaHattoriWien::new(0.905, 1.5, 2.0e9).unwrap();
    let v = [[1e-8, 0.0, 0.0], [0.0, 1e-2, 0.0], [0.0, 0.0, 1e14]];
    let r = verify::calibration_uncertainty(&wien, &v, 900.0, 1800.0, 5).unwrap();
    let wien_t = |a: f64, b: f64, c: f64, s: f64| (c2_umk() / (c / s).ln() - b) / a;
    for (t, u) in [(900.0, r.lo_u_k), (1800.0, r.hi_u_k)] {
        let s = 2.0e9 * (-c2_umk() / (0.905 * t + 1.5)).exp();
        let want = u_by_differences(wien_t, [0.905, 1.5, 2.0e9], s, &v);
        assert!((u - want).abs() <= 1e-5 * want, "{t} K: {u} vs {want}");
    }
}

#[test]
fn calibration_uncertainty_refuses_what_is_no_covariance() {
    let bad = |v: [[f64; 3]; 3]| verify::calibration_uncertainty(&sh(), &v, 250.0, 600.0, 5);
    let mut asym = [[1e-6, 0.0, 0.0], [0.0, 1e-2, 0.0], [0.0, 0.0, 1.0]];
    asym[0][1] = 1e-5;
    assert_eq!(bad(asym), Err(Error::VerifyCovarianceInvalid));
    assert_eq!(
        bad([[-1e-6, 0.0, 0.0], [0.0; 3], [0.0; 3]]),
        Err(Error::VerifyCovarianceInvalid)
    );
    assert_eq!(
        bad([[f64::NAN, 0.0, 0.0], [0.0; 3], [0.0; 3]]),
        Err(Error::VerifyCovarianceInvalid)
    );
    // Symmetric, with non-negative variances, yet not positive semidefinite (the A-B
    // determinant is 360000 - 1200^2 < 0): along J = (-T/A, -1/A, .) the variance is
    // (T^2 - 2400 T + 360000) / A^2, negative for 170 K < T < 2230 K.
    assert_eq!(
        bad([[1.0, -1200.0, 0.0], [-1200.0, 360_000.0, 0.0], [0.0; 3]]),
        Err(Error::CorrelationNotPositiveSemidefinite)
    );
}
