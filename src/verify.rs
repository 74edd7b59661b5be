//! Verification of an instrument's calibration: checks that return a report (the worst
//! case and where it is), not a boolean, so that a test or a CI job can say what drifted
//! and by how much.
//!
//! | check | function | what it measures, K |
//! |---|---|---|
//! | fit residuals | [`residuals`] | T_curve(S_i) - T_i at the blackbody points: max, rms, mean, worst point |
//! | curve against the band model | [`curve_against_model`] | T_curve(S(L_band(T))) - T over a range: max and where |
//! | frame table | [`frame_table`] | T_table(L) - T_curve(L) over every row, on a grid independent of the table's own check |
//! | round trip and monotonicity | [`round_trip`] | T(S(T)) - T over a range; S, dS/dT and T(S) rising |
//! | coverage | [`coverage`] | extrapolation below and above the blackbody points, the largest gap between them |
//! | calibration uncertainty | [`calibration_uncertainty`] | u(T) of the curve from the covariance of (A, B, C) over a range: max and where |
//!
//! Every function is a pure computation over the caller's data: no heap, no panic, bad
//! input a named [`Error`]. Pass or fail is the caller's decision, against its own
//! tolerances: the reports carry numbers, never a verdict (except the two that have no
//! tolerance: monotonicity and the table's refusals inside its range).
//!
//! Temperatures are sampled uniformly over [lo_k, hi_k], ends included; the i-th of n
//! samples is lo_k + (hi_k - lo_k) i / (n - 1), the last exactly hi_k.
//!
//! ```
//! use bandtemp::band::Band;
//! use bandtemp::calibration::fit_band;
//! use bandtemp::frame::CountsMap;
//! use bandtemp::planck::Detector;
//! use bandtemp::verify;
//!
//! // An invented 8-14 um microbolometer core, calibrated by a fit to its own band.
//! let band = Band::rectangular(8.0, 14.0, Detector::Energy)?;
//! let curve = fit_band(&band, 250.0, 500.0)?.params;
//! // The curve is in band radiance: the map to the model's units is the identity.
//! let identity = CountsMap::linear(1.0, 0.0)?;
//! let report = verify::curve_against_model(&curve, &band, identity, 250.0, 500.0, 2001)?;
//! assert!(report.max_abs_error_k < 0.05);
//! assert!(report.worst_t_k >= 250.0 && report.worst_t_k <= 500.0);
//! # Ok::<(), bandtemp::Error>(())
//! ```

use crate::band::SignalCurve;
use crate::calibration::{SakumaHattori, SakumaHattoriWien};
use crate::constants::C2_UMK;
use crate::error::{check_temperature_k, finite, Error, Result};
use crate::frame::{CountsMap, FrameTable};

/// Most samples one verification takes (over a range, or in all over a table's rows):
/// bounds the work a single call can be asked to do.
pub const MAX_SAMPLES: usize = 1_000_000;
/// Most check points per table row in [`frame_table`].
pub const MAX_POINTS_PER_ROW: usize = 4096;

/// The most points [`coverage`] accepts: its scan is quadratic in the point count, and a
/// calibration has tens of points.
pub const MAX_COVERAGE_POINTS: usize = 1024;
/// The sample count the command-line checker uses over a range (the crate's
/// [`crate::calibration::BAND_CHECK_POINTS`]).
pub const DEFAULT_SAMPLES: usize = 2001;
/// The check points per row the command-line checker uses in [`frame_table`]: 37, prime
/// and so never in step with the table's own 16 construction checks.
pub const DEFAULT_POINTS_PER_ROW: usize = 37;

/// Residuals of a calibration curve at its blackbody points.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ResidualReport {
    /// Points checked.
    pub points: usize,
    /// max |T_curve(S_i) - T_i|, K.
    pub max_abs_residual_k: f64,
    /// sqrt(mean (T_curve(S_i) - T_i)^2), K.
    pub rms_residual_k: f64,
    /// mean (T_curve(S_i) - T_i), K: a bias of the curve against the points.
    pub mean_residual_k: f64,
    /// Index of the worst point in the caller's arrays (the first, on a tie).
    pub worst_index: usize,
    /// The worst point's blackbody temperature T_i, K.
    pub worst_t_k: f64,
    /// The worst point's signed residual T_curve(S_i) - T_i, K (positive: the curve reads
    /// warm).
    pub worst_residual_k: f64,
}

/// Temperature residuals of `curve` at blackbody points (`temperatures_k[i]`,
/// `signals[i]`): r_i = T_curve(S_i) - T_i, K, with T_curve the curve's inverse
/// ([`SignalCurve::temperature`]; for an [`crate::calibration::OffsetCurve`] the dark
/// offset is subtracted first).
///
/// Accuracy: that of the curve's inverse (closed form for Sakuma-Hattori: a few ulp of T;
/// Newton on the band integral: below 1e-9 T); the sums are plain double sums over tens of
/// points.
///
/// # Errors
/// [`Error::CalibrationLengthMismatch`] when the arrays differ in length,
/// [`Error::VerifyNoPoints`] when they are empty, [`Error::NonFinite`],
/// [`Error::TemperatureNotPositive`], and the errors of the curve's inverse for a signal
/// it cannot convert (a signal at or below a dark offset, say).
pub fn residuals<C: SignalCurve + ?Sized>(
    curve: &C,
    temperatures_k: &[f64],
    signals: &[f64],
) -> Result<ResidualReport> {
    if temperatures_k.len() != signals.len() {
        return Err(Error::CalibrationLengthMismatch);
    }
    if temperatures_k.is_empty() {
        return Err(Error::VerifyNoPoints);
    }
    let n = count_f64(temperatures_k.len());
    let residual = |t_k: f64, signal: f64| -> Result<f64> {
        check_temperature_k(t_k)?;
        finite(curve.temperature(finite(signal)?)? - t_k)
    };
    // Two passes, so that the rms is formed from residuals scaled by the largest (no
    // overflow of the squares however wild a residual) and the mean from r_i / n.
    let mut worst = Worst::new();
    let mut mean = 0.0;
    for (index, (&t_k, &signal)) in temperatures_k.iter().zip(signals).enumerate() {
        let residual_k = residual(t_k, signal)?;
        mean += residual_k / n;
        worst.offer(index, t_k, residual_k);
    }
    let scale = libm::fabs(worst.error_k);
    let mut sum_sq = 0.0;
    if scale > 0.0 {
        for (&t_k, &signal) in temperatures_k.iter().zip(signals) {
            let scaled = residual(t_k, signal)? / scale;
            sum_sq += scaled * scaled;
        }
    }
    Ok(ResidualReport {
        points: temperatures_k.len(),
        max_abs_residual_k: scale,
        rms_residual_k: scale * libm::sqrt(sum_sq / n),
        mean_residual_k: mean,
        worst_index: worst.index,
        worst_t_k: worst.at_k,
        worst_residual_k: worst.error_k,
    })
}

/// A calibration curve against an exact model over a range.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CurveReport {
    /// Temperatures sampled.
    pub samples: usize,
    /// max |T_curve(S(L_model(T))) - T| over the samples, K.
    pub max_abs_error_k: f64,
    /// The temperature where it occurs (the first, on a tie), K.
    pub worst_t_k: f64,
    /// The signed error there, K (positive: the curve reads warm).
    pub worst_error_k: f64,
    /// mean of the signed errors over the samples, K.
    pub mean_error_k: f64,
}

/// The calibration curve `curve` against the exact model `model` (a
/// [`crate::band::Band`]: band radiance integrated exactly) over [`lo_k`, `hi_k`].
///
/// At each of `samples` temperatures T the model gives the signal an ideal instrument
/// produces, L_model(T); `map` takes the curve's signal to the model's units,
/// L = gain S + offset ([`CountsMap`]: for a curve in counts, the radiometric gain in
/// W m^-2 sr^-1 per count and the offset; for a curve in band radiance, the identity
/// `CountsMap::linear(1.0, 0.0)`), so the curve sees S = (L_model(T) - offset) / gain and
/// reads T_curve(S). The error is T_curve(S) - T, K: what the calibrated instrument
/// would read minus the true temperature, if the band in the model were the instrument's.
/// Same definition as [`crate::calibration::BandFit::max_error_k`].
///
/// Accuracy: the model's forward integral (relative 1e-12 for a rectangular band) and
/// the curve's inverse; errors below about 1e-9 T are rounding.
///
/// # Errors
/// [`Error::VerifyRangeInvalid`] unless 0 < `lo_k` < `hi_k` (both finite),
/// [`Error::VerifySampleCountInvalid`] unless 2 <= `samples` <= [`MAX_SAMPLES`], errors
/// of the model's forward evaluation and the curve's inverse anywhere in the range (a
/// signal below a dark offset, a curve out of its domain).
pub fn curve_against_model<C: SignalCurve + ?Sized, M: SignalCurve + ?Sized>(
    curve: &C,
    model: &M,
    map: CountsMap,
    lo_k: f64,
    hi_k: f64,
    samples: usize,
) -> Result<CurveReport> {
    check_range(lo_k, hi_k)?;
    check_samples(samples)?;
    let mut worst = Worst::new();
    let mut mean = 0.0;
    for i in 0..samples {
        let t_k = grid(lo_k, hi_k, i, samples);
        let signal = finite((model.signal(t_k)? - map.offset()) / map.gain())?;
        let error_k = finite(curve.temperature(signal)? - t_k)?;
        // Summed as e_i / n: no overflow, whatever the errors.
        mean += error_k / count_f64(samples);
        worst.offer(i, t_k, error_k);
    }
    Ok(CurveReport {
        samples,
        max_abs_error_k: libm::fabs(worst.error_k),
        worst_t_k: worst.at_k,
        worst_error_k: worst.error_k,
        mean_error_k: mean,
    })
}

/// A curve's round trip and monotonicity over a range.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct RoundTripReport {
    /// Temperatures sampled.
    pub samples: usize,
    /// max |T(S(T)) - T| over the samples, K.
    pub max_abs_error_k: f64,
    /// The temperature where it occurs (the first, on a tie), K.
    pub worst_t_k: f64,
    /// The signed round-trip error there, K.
    pub worst_error_k: f64,
    /// `None` when S(T) rises strictly from sample to sample with dS/dT > 0 everywhere and
    /// T(S) rises with it; otherwise the first sample temperature, K, where one of them
    /// does not.
    pub first_non_monotonic_k: Option<f64>,
}

impl RoundTripReport {
    /// Whether the curve, its slope and its inverse all rose over every sample.
    #[must_use]
    pub fn monotonic(&self) -> bool {
        self.first_non_monotonic_k.is_none()
    }
}

/// Round trip T -> S(T) -> T(S) of `curve` at `samples` temperatures over
/// [`lo_k`, `hi_k`], and monotonicity: S(T_i) > S(T_(i-1)), dS/dT(T_i) > 0 and
/// T(S(T_i)) > T(S(T_(i-1))).
///
/// Accuracy: the inverse's (closed form for Sakuma-Hattori; Newton to below 1e-9 T for a
/// band), so a round-trip error above a few 1e-9 T is a defect, not rounding. Monotonicity
/// is tested on the samples only: a wiggle narrower than the spacing can pass.
///
/// # Errors
/// [`Error::VerifyRangeInvalid`], [`Error::VerifySampleCountInvalid`] as in
/// [`curve_against_model`], and the curve's errors anywhere in the range.
pub fn round_trip<C: SignalCurve + ?Sized>(
    curve: &C,
    lo_k: f64,
    hi_k: f64,
    samples: usize,
) -> Result<RoundTripReport> {
    check_range(lo_k, hi_k)?;
    check_samples(samples)?;
    let mut worst = Worst::new();
    let mut first_non_monotonic_k = None;
    let mut previous: Option<(f64, f64)> = None;
    for i in 0..samples {
        let t_k = grid(lo_k, hi_k, i, samples);
        let (signal, slope) = curve.signal_and_derivative(t_k)?;
        let back_k = finite(curve.temperature(finite(signal)?)?)?;
        worst.offer(i, t_k, back_k - t_k);
        let rising = previous.is_none_or(|(s, t)| signal > s && back_k > t);
        if first_non_monotonic_k.is_none() && !(rising && slope > 0.0) {
            first_non_monotonic_k = Some(t_k);
        }
        previous = Some((signal, back_k));
    }
    Ok(RoundTripReport {
        samples,
        max_abs_error_k: libm::fabs(worst.error_k),
        worst_t_k: worst.at_k,
        worst_error_k: worst.error_k,
        first_non_monotonic_k,
    })
}

/// How well blackbody points cover a range.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CoverageReport {
    /// Points given.
    pub points: usize,
    /// Points inside [lo_k, hi_k].
    pub points_in_range: usize,
    /// The coldest point, K.
    pub t_min_k: f64,
    /// The hottest point, K.
    pub t_max_k: f64,
    /// How far the range reaches below the coldest point, K (0 when a point is at or
    /// below lo_k): the calibration is extrapolated over that much.
    pub extrapolated_below_k: f64,
    /// How far the range reaches above the hottest point, K (0 when a point is at or
    /// above hi_k).
    pub extrapolated_above_k: f64,
    /// The widest interval inside the range between two neighbouring points, K (0 when
    /// fewer than two distinct points fall in or around the range).
    pub largest_gap_k: f64,
    /// Lower end of that interval, K (clipped to the range).
    pub gap_lo_k: f64,
    /// Upper end of that interval, K (clipped to the range).
    pub gap_hi_k: f64,
}

impl CoverageReport {
    /// The larger of the two extrapolations, K.
    #[must_use]
    pub fn extrapolated_k(&self) -> f64 {
        self.extrapolated_below_k.max(self.extrapolated_above_k)
    }
}

/// Coverage of [`lo_k`, `hi_k`] by blackbody points at `temperatures_k` (any order,
/// duplicates allowed): how far the range extends beyond the coldest and the hottest point
/// (the size of the extrapolation, K), and the largest gap between neighbouring points
/// inside the range (points outside the range count as its ends). Exact arithmetic on the
/// inputs (differences of doubles). O(n^2) in the number of points without storage
/// (calibrations have tens of points), so at most [`MAX_COVERAGE_POINTS`] (about 4 ms on
/// a desktop core at the limit).
///
/// # Errors
/// [`Error::VerifyRangeInvalid`], [`Error::VerifyNoPoints`] for no points,
/// [`Error::VerifyTooManyPoints`] for more than [`MAX_COVERAGE_POINTS`],
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`].
pub fn coverage(temperatures_k: &[f64], lo_k: f64, hi_k: f64) -> Result<CoverageReport> {
    check_range(lo_k, hi_k)?;
    if temperatures_k.is_empty() {
        return Err(Error::VerifyNoPoints);
    }
    if temperatures_k.len() > MAX_COVERAGE_POINTS {
        return Err(Error::VerifyTooManyPoints);
    }
    let (mut t_min_k, mut t_max_k) = (f64::INFINITY, 0.0f64);
    let mut points_in_range = 0;
    for &t_k in temperatures_k {
        check_temperature_k(t_k)?;
        t_min_k = t_min_k.min(t_k);
        t_max_k = t_max_k.max(t_k);
        if (lo_k..=hi_k).contains(&t_k) {
            points_in_range += 1;
        }
    }
    // Walk the distinct clipped nodes upwards from the lowest; each step finds the next
    // larger node by a scan (no storage, no sort).
    // max/min, not f64::clamp: clamp asserts lo <= hi, a panic path the compiler cannot
    // remove although `check_range` has ensured it.
    let clip = |t_k: f64| t_k.max(lo_k).min(hi_k);
    let (mut largest_gap_k, mut gap_lo_k, mut gap_hi_k) = (0.0, lo_k, lo_k);
    let mut node = clip(t_min_k);
    loop {
        let next = temperatures_k
            .iter()
            .map(|&t_k| clip(t_k))
            .filter(|&t_k| t_k > node)
            .fold(f64::INFINITY, f64::min);
        if !next.is_finite() {
            break;
        }
        if next - node > largest_gap_k {
            (largest_gap_k, gap_lo_k, gap_hi_k) = (next - node, node, next);
        }
        node = next;
    }
    Ok(CoverageReport {
        points: temperatures_k.len(),
        points_in_range,
        t_min_k,
        t_max_k,
        extrapolated_below_k: (t_min_k - lo_k).max(0.0),
        extrapolated_above_k: (hi_k - t_max_k).max(0.0),
        largest_gap_k,
        gap_lo_k,
        gap_hi_k,
    })
}

/// A frame table against exact inversion.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TableReport {
    /// Rows checked (all of the table's).
    pub rows: usize,
    /// Signals sampled (inside the table's signal range).
    pub samples: usize,
    /// max |T_table(L) - T_curve(L)| over the samples, K.
    pub max_abs_error_k: f64,
    /// The signal L where it occurs (the first, on a tie), curve units.
    pub worst_signal: f64,
    /// The exact temperature T_curve(L) there, K.
    pub worst_t_k: f64,
    /// The signed table error there, K (positive: the table reads warm).
    pub worst_error_k: f64,
    /// Samples inside the table's signal range for which the table gave no finite
    /// temperature: refused, or NaN or infinite from corrupted rows (a sound table has
    /// none). They take no part in the error figures.
    pub refused: usize,
    /// Neighbouring samples (by rising signal) where the table's temperature fell (a sound
    /// table has none; f32 ties are allowed).
    pub non_monotonic: usize,
    /// What the table's construction measured, for comparison
    /// ([`crate::frame::TableGeometry::max_table_error_k`]), K.
    pub claimed_max_error_k: f64,
}

/// A frame table (built by [`FrameTable::build`], or re-wrapped from stored rows with
/// [`FrameTable::from_parts`], as a firmware image holds them) against exact inversion of
/// `curve`, the curve it was built from.
///
/// Samples `points_per_row` f32 signals in every row at positions (k + 0.382) /
/// `points_per_row` of the row's signal interval (off the construction's own check points
/// j/16 for any count), clipped to [`signal_lo`, `signal_hi`] of the table, plus both
/// ends. At each, T_table(L) from [`FrameTable::temperature_k`] (the pixel path's f32
/// arithmetic) against T_curve(L) of the same f32 signal, exact inversion. The report
/// also counts refusals inside the range and falls of the table's output with rising
/// signal.
///
/// Uses only the table's public view (rows, intervals, geometry, conversion), so it checks
/// rows from anywhere: a table built here, or rows read back from an instrument.
///
/// # Errors
/// [`Error::VerifySampleCountInvalid`] unless 1 <= `points_per_row` <=
/// [`MAX_POINTS_PER_ROW`] and rows x `points_per_row` <= [`MAX_SAMPLES`]; errors of the
/// curve's inverse at a sampled signal.
pub fn frame_table<C: SignalCurve + ?Sized>(
    table: &FrameTable<'_>,
    curve: &C,
    points_per_row: usize,
) -> Result<TableReport> {
    let geometry = table.geometry();
    let rows = table.rows().len();
    let within = rows
        .checked_mul(points_per_row)
        .is_some_and(|total| total <= MAX_SAMPLES);
    if !(within && (1..=MAX_POINTS_PER_ROW).contains(&points_per_row)) {
        return Err(Error::VerifySampleCountInvalid);
    }
    let (signal_lo, signal_hi) = (geometry.signal_lo(), geometry.signal_hi());
    let mut state = TableCheck {
        worst: Worst::new(),
        worst_signal: f64::from(signal_lo),
        samples: 0,
        refused: 0,
        non_monotonic: 0,
        previous_k: None,
    };
    state.sample(table, curve, signal_lo)?;
    let step = 1.0 / count_f64(points_per_row);
    for row in 0..rows {
        let Some((s0, s1)) = table.interval(row) else {
            break;
        };
        let (s0, s1) = (f64::from(s0), f64::from(s1));
        for k in 0..points_per_row {
            let position = (count_f64(k) + 0.382) * step;
            #[allow(clippy::cast_possible_truncation)] // the nearest f32: a pixel's signal
            let signal = (s0 + (s1 - s0) * position) as f32;
            if signal > signal_lo && signal < signal_hi {
                state.sample(table, curve, signal)?;
            }
        }
    }
    state.sample(table, curve, signal_hi)?;
    Ok(TableReport {
        rows,
        samples: state.samples,
        max_abs_error_k: libm::fabs(state.worst.error_k),
        worst_signal: state.worst_signal,
        worst_t_k: state.worst.at_k,
        worst_error_k: state.worst.error_k,
        refused: state.refused,
        non_monotonic: state.non_monotonic,
        claimed_max_error_k: geometry.max_table_error_k(),
    })
}

/// Sensitivities of a calibration curve's temperature to its parameters at a fixed
/// signal: what [`calibration_uncertainty`] propagates the covariance through.
pub trait ParameterSensitivity: SignalCurve {
    /// (dT/dA, dT/dB, dT/dC) at `signal` (curve units, without any dark offset), in
    /// K/um, K/(um K) and K per signal unit.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::RadianceNotPositive`] for a signal <= 0, and the
    /// curve's inverse's errors.
    fn temperature_sensitivities(&self, signal: f64) -> Result<[f64; 3]>;
}

impl ParameterSensitivity for SakumaHattori {
    /// With L = ln(1 + C/S) and T = (c2/L - B)/A:
    /// dT/dA = -T/A, dT/dB = -1/A, dT/dC = -c2 / (A L^2 (S + C)).
    fn temperature_sensitivities(&self, signal: f64) -> Result<[f64; 3]> {
        let t_k = self.temperature(signal)?;
        let a = self.a_um();
        let l = libm::log1p(self.c() / signal);
        Ok([
            -t_k / a,
            -1.0 / a,
            finite(-C2_UMK / (a * l * l * (signal + self.c())))?,
        ])
    }
}

impl ParameterSensitivity for SakumaHattoriWien {
    /// With L = ln(C/S) and T = (c2/L - B)/A:
    /// dT/dA = -T/A, dT/dB = -1/A, dT/dC = -c2 / (A L^2 C).
    fn temperature_sensitivities(&self, signal: f64) -> Result<[f64; 3]> {
        let t_k = self.temperature(signal)?;
        let a = self.a_um();
        let l = libm::log(self.c() / signal);
        Ok([
            -t_k / a,
            -1.0 / a,
            finite(-C2_UMK / (a * l * l * self.c()))?,
        ])
    }
}

/// The standard uncertainty of a calibration curve's temperatures over a range.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct UncertaintyReport {
    /// Temperatures sampled.
    pub samples: usize,
    /// max u(T) over the samples, K (standard uncertainty, k = 1).
    pub max_u_k: f64,
    /// Where it occurs (the first, on a tie), K.
    pub worst_t_k: f64,
    /// u(T) at the range's lower end, K.
    pub lo_u_k: f64,
    /// u(T) at the range's upper end, K.
    pub hi_u_k: f64,
}

/// Standard uncertainty of the temperature a calibration curve reads, from the covariance
/// of its parameters (A um, B um K, C signal units; rows and columns in that order, as
/// [`crate::calibration::PointsFit::covariance`] gives it), at `samples` temperatures over
/// [`lo_k`, `hi_k`]: u^2(T) = J V J^T with J = (dT/dA, dT/dB, dT/dC) at the curve's signal
/// S(T) ([`ParameterSensitivity`]), the GUM's law of propagation (JCGM 100:2008, 5.2).
/// First order in the parameter uncertainties. A dark offset does not enter (it is taken
/// as exact).
///
/// # Errors
/// [`Error::VerifyRangeInvalid`], [`Error::VerifySampleCountInvalid`] as in
/// [`curve_against_model`]; [`Error::VerifyCovarianceInvalid`] for a covariance with a
/// non-finite entry, a negative variance or an asymmetry;
/// [`Error::CorrelationNotPositiveSemidefinite`] where J V J^T < 0 (the matrix is not a
/// covariance); errors of the curve in the range.
pub fn calibration_uncertainty<C: ParameterSensitivity + ?Sized>(
    curve: &C,
    covariance: &[[f64; 3]; 3],
    lo_k: f64,
    hi_k: f64,
    samples: usize,
) -> Result<UncertaintyReport> {
    check_range(lo_k, hi_k)?;
    check_samples(samples)?;
    check_covariance(covariance)?;
    let mut worst = Worst::new();
    let (mut lo_u_k, mut hi_u_k) = (0.0, 0.0);
    for i in 0..samples {
        let t_k = grid(lo_k, hi_k, i, samples);
        let j = curve.temperature_sensitivities(curve.signal(t_k)?)?;
        let mut variance = 0.0;
        for (row, &ji) in covariance.iter().zip(&j) {
            for (&v, &jk) in row.iter().zip(&j) {
                variance += ji * v * jk;
            }
        }
        if !(variance >= 0.0) {
            return Err(if variance.is_nan() {
                Error::NonFinite
            } else {
                Error::CorrelationNotPositiveSemidefinite
            });
        }
        let u_k = finite(libm::sqrt(variance))?;
        worst.offer(i, t_k, u_k);
        if i == 0 {
            lo_u_k = u_k;
        }
        hi_u_k = u_k;
    }
    Ok(UncertaintyReport {
        samples,
        max_u_k: worst.error_k,
        worst_t_k: worst.at_k,
        lo_u_k,
        hi_u_k,
    })
}

/// Finite entries, symmetric (exactly: a covariance is written once per pair), variances
/// not negative.
fn check_covariance(covariance: &[[f64; 3]; 3]) -> Result<()> {
    for (i, row) in covariance.iter().enumerate() {
        for (j, &v) in row.iter().enumerate() {
            let mirror = covariance.get(j).and_then(|r| r.get(i)).copied();
            let symmetric = mirror.is_some_and(|m| m.total_cmp(&v).is_eq());
            if !(v.is_finite() && symmetric && (i != j || v >= 0.0)) {
                return Err(Error::VerifyCovarianceInvalid);
            }
        }
    }
    Ok(())
}

/// Running state of [`frame_table`].
struct TableCheck {
    worst: Worst,
    worst_signal: f64,
    samples: usize,
    refused: usize,
    non_monotonic: usize,
    previous_k: Option<f32>,
}

impl TableCheck {
    fn sample<C: SignalCurve + ?Sized>(
        &mut self,
        table: &FrameTable<'_>,
        curve: &C,
        signal: f32,
    ) -> Result<()> {
        let exact_k = curve.temperature(f64::from(signal))?;
        self.samples += 1;
        let Some(table_k) = table.temperature_k(signal).filter(|t| t.is_finite()) else {
            self.refused += 1;
            return Ok(());
        };
        if self.previous_k.is_some_and(|previous| table_k < previous) {
            self.non_monotonic += 1;
        }
        self.previous_k = Some(table_k);
        let error_k = f64::from(table_k) - exact_k;
        if self.worst.offer(self.samples - 1, exact_k, error_k) {
            self.worst_signal = f64::from(signal);
        }
        Ok(())
    }
}

/// The worst (largest |error|) of a sequence, the first on a tie. NaN errors win, so a
/// NaN can never hide behind a finite error.
struct Worst {
    seen: bool,
    index: usize,
    at_k: f64,
    error_k: f64,
}

impl Worst {
    fn new() -> Self {
        Worst {
            seen: false,
            index: 0,
            at_k: 0.0,
            error_k: 0.0,
        }
    }

    /// Takes the candidate if it is worse; says whether it did.
    fn offer(&mut self, index: usize, at_k: f64, error_k: f64) -> bool {
        let worse = libm::fabs(error_k) > libm::fabs(self.error_k)
            || (error_k.is_nan() && !self.error_k.is_nan())
            || !self.seen;
        if worse {
            *self = Worst {
                seen: true,
                index,
                at_k,
                error_k,
            };
        }
        worse
    }
}

fn check_range(lo_k: f64, hi_k: f64) -> Result<()> {
    if finite(lo_k)? > 0.0 && finite(hi_k)? > lo_k {
        Ok(())
    } else {
        Err(Error::VerifyRangeInvalid)
    }
}

fn check_samples(samples: usize) -> Result<()> {
    if (2..=MAX_SAMPLES).contains(&samples) {
        Ok(())
    } else {
        Err(Error::VerifySampleCountInvalid)
    }
}

/// A count as f64 (exact below 2^53, and counts here are at most [`MAX_SAMPLES`]).
#[allow(clippy::cast_precision_loss)]
fn count_f64(count: usize) -> f64 {
    count as f64
}

/// The i-th of `count` temperatures spread uniformly over [lo, hi], ends exact.
fn grid(lo_k: f64, hi_k: f64, i: usize, count: usize) -> f64 {
    if i + 1 >= count {
        return hi_k;
    }
    lo_k + (hi_k - lo_k) * (count_f64(i) / count_f64(count - 1))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn coverage_point_limit() {
        let mut t = [0.0; MAX_COVERAGE_POINTS + 1];
        let mut next_k = 300.0;
        for t_k in &mut t {
            *t_k = next_k;
            next_k += 1.0;
        }
        let report = coverage(&t[..MAX_COVERAGE_POINTS], 250.0, 1200.0).unwrap();
        assert_eq!(report.points, MAX_COVERAGE_POINTS);
        // Points 1 K apart from 300 K: 50 K of extrapolation below, gaps of 1 K.
        assert_eq!(report.extrapolated_below_k, 50.0);
        assert_eq!(report.largest_gap_k, 1.0);
        assert_eq!(coverage(&t, 250.0, 1200.0), Err(Error::VerifyTooManyPoints));
    }

    #[test]
    fn grid_ends_are_exact() {
        assert_eq!(grid(250.0, 500.0, 0, 3), 250.0);
        assert_eq!(grid(250.0, 500.0, 1, 3), 375.0);
        assert_eq!(grid(250.0, 500.0, 2, 3), 500.0);
    }

    #[test]
    fn worst_keeps_the_first_of_equals_and_lets_nan_win() {
        let mut worst = Worst::new();
        assert!(worst.offer(0, 300.0, 0.0));
        assert!(!worst.offer(1, 310.0, 0.0));
        assert!(worst.offer(2, 320.0, -0.5));
        assert!(!worst.offer(3, 330.0, 0.5));
        assert_eq!((worst.index, worst.at_k, worst.error_k), (2, 320.0, -0.5));
        assert!(worst.offer(4, 340.0, f64::NAN));
        assert_eq!(worst.index, 4);
    }

    /// A table whose rows are wrong but whose fingerprint matches them (what a faulty
    /// table builder would hand over; rows merely changed after the build are refused
    /// earlier, by the fingerprint). Crate-internal: the public API cannot make one.
    fn refingerprinted<'t>(
        table: &FrameTable<'_>,
        rows: &'t [crate::frame::TableRow],
    ) -> FrameTable<'t> {
        let mut geometry = table.geometry();
        geometry.fingerprint = crate::frame::fingerprint::fingerprint(&geometry, rows);
        FrameTable::from_parts(geometry, rows).unwrap()
    }

    #[test]
    fn a_moved_row_is_found_in_that_row_and_a_downhill_row_is_counted() {
        use crate::band::Band;
        use crate::frame::{TableRow, TemperatureRange};
        use crate::planck::Detector;
        let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
        let range = TemperatureRange::new(250.0, 1500.0).unwrap();
        let mut storage = [[0.0f32; 4]; 128];
        let needed = FrameTable::required_rows(&band, range, 1e-3).unwrap();
        let table = FrameTable::build(&band, range, 1e-3, &mut storage[..needed]).unwrap();
        let n = table.rows().len();
        let mut rows: [TableRow; 128] = [[0.0; 4]; 128];
        rows[..n].copy_from_slice(table.rows());
        let k = n / 2;
        rows[k][0] += 0.05; // the row's constant term: +50 mK over the whole row
        let moved = refingerprinted(&table, &rows[..n]);
        let report = frame_table(&moved, &band, 37).unwrap();
        assert!(
            (report.max_abs_error_k - 0.05).abs() < 1e-3,
            "50 mK within the table's own 1 mK: {report:?}"
        );
        assert!(report.worst_error_k > 0.0);
        let (s0, s1) = moved.interval(k).unwrap();
        assert!(
            report.worst_signal >= f64::from(s0) && report.worst_signal < f64::from(s1),
            "{report:?} not in row {k}"
        );

        // A row turned downhill: the table's output falls with rising signal there.
        rows[..n].copy_from_slice(table.rows());
        rows[k][1] = -rows[k][1].abs();
        let downhill = refingerprinted(&table, &rows[..n]);
        let report = frame_table(&downhill, &band, 37).unwrap();
        assert!(report.non_monotonic > 0, "{report:?}");
    }
}
