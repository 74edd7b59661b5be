//! Calibration checks through the C ABI (`bt_verify_*`): each fills a report with the
//! worst case and where it is; pass or fail is the caller's decision against its own
//! tolerances. The Rust `bandtemp::verify` module does the work.

use super::band::{band_from_c, bt_band};
use super::calibration::{bt_sakuma_hattori, read_curve};
use super::{
    bt_frame_converter, bt_frame_row, bt_status, deliver, read_input, slice_from_c, Output,
};
use bandtemp::band::SignalCurve;
use bandtemp::calibration::OffsetCurve;
use bandtemp::frame::{ConverterState, CountsMap, FrameConverter, FrameTable, TableRow};
use bandtemp::verify::{
    self, CoverageReport, CurveReport, ResidualReport, RoundTripReport, TableReport,
    UncertaintyReport,
};
use bandtemp::Result;
use core::mem::{align_of, size_of};

// The reinterpretations below rely on these layouts (asserted where the types are
// defined too; repeated here so this file stands on its own).
const _: () = assert!(size_of::<bt_frame_row>() == size_of::<TableRow>());
const _: () = assert!(align_of::<bt_frame_row>() == align_of::<TableRow>());
const _: () = assert!(size_of::<ConverterState>() <= size_of::<bt_frame_converter>());
const _: () = assert!(align_of::<ConverterState>() <= align_of::<bt_frame_converter>());

/// Residuals T_curve(S_i) - T_i of a calibration curve at its blackbody points, K.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_verify_residuals_report {
    /// Points checked.
    pub points: usize,
    /// max |T_curve(S_i) - T_i|, K.
    pub max_abs_residual_k: f64,
    /// sqrt(mean (T_curve(S_i) - T_i)^2), K.
    pub rms_residual_k: f64,
    /// mean (T_curve(S_i) - T_i), K.
    pub mean_residual_k: f64,
    /// Index of the worst point (the first, on a tie).
    pub worst_index: usize,
    /// The worst point's blackbody temperature, K.
    pub worst_t_k: f64,
    /// The worst point's signed residual, K (positive: the curve reads warm).
    pub worst_residual_k: f64,
}

/// A calibration curve against the exact band model over a range, K.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_verify_curve_report {
    /// Temperatures sampled.
    pub samples: usize,
    /// max |T_curve(S(L_band(T))) - T|, K.
    pub max_abs_error_k: f64,
    /// Where it occurs (the first, on a tie), K.
    pub worst_t_k: f64,
    /// The signed error there, K (positive: the curve reads warm).
    pub worst_error_k: f64,
    /// Mean signed error over the samples, K.
    pub mean_error_k: f64,
}

/// Round trip T -> S(T) -> T(S) and monotonicity of a curve over a range.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_verify_round_trip_report {
    /// Temperatures sampled.
    pub samples: usize,
    /// max |T(S(T)) - T|, K.
    pub max_abs_error_k: f64,
    /// Where it occurs (the first, on a tie), K.
    pub worst_t_k: f64,
    /// The signed error there, K.
    pub worst_error_k: f64,
    /// 1 when S, dS/dT and T(S) rose over every sample, else 0.
    pub monotonic: u32,
    /// The first sample temperature where they did not, K; 0 when `monotonic` is 1.
    pub first_non_monotonic_k: f64,
}

/// Coverage of a range by blackbody points, K.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_verify_coverage_report {
    /// Points given.
    pub points: usize,
    /// Points inside [lo_k, hi_k].
    pub points_in_range: usize,
    /// The coldest point, K.
    pub t_min_k: f64,
    /// The hottest point, K.
    pub t_max_k: f64,
    /// How far the range reaches below the coldest point (extrapolation), K; 0 if none.
    pub extrapolated_below_k: f64,
    /// How far the range reaches above the hottest point (extrapolation), K; 0 if none.
    pub extrapolated_above_k: f64,
    /// The widest interval inside the range between neighbouring points, K.
    pub largest_gap_k: f64,
    /// Its lower end (clipped to the range), K.
    pub gap_lo_k: f64,
    /// Its upper end (clipped to the range), K.
    pub gap_hi_k: f64,
}

/// A frame table against exact inversion of its curve.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_verify_table_report {
    /// Rows checked.
    pub rows: usize,
    /// Signals sampled inside the table's range.
    pub samples: usize,
    /// max |T_table(L) - T_exact(L)|, K.
    pub max_abs_error_k: f64,
    /// The signal where it occurs (the first, on a tie), curve units.
    pub worst_signal: f64,
    /// The exact temperature there, K.
    pub worst_t_k: f64,
    /// The signed table error there, K (positive: the table reads warm).
    pub worst_error_k: f64,
    /// Samples inside the range for which the table gave no finite temperature (refused,
    /// or NaN or infinite from corrupted rows; a sound table has none).
    pub refused: usize,
    /// Neighbouring samples where the table's temperature fell with rising signal (a
    /// sound table has none).
    pub non_monotonic: usize,
    /// The maximum error the table's construction measured, K.
    pub claimed_max_error_k: f64,
}

/// The standard uncertainty (k = 1) of a calibration's temperatures over a range, K.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_verify_uncertainty_report {
    /// Temperatures sampled.
    pub samples: usize,
    /// max u(T), K.
    pub max_u_k: f64,
    /// Where it occurs (the first, on a tie), K.
    pub worst_t_k: f64,
    /// u(T) at lo_k, K.
    pub lo_u_k: f64,
    /// u(T) at hi_k, K.
    pub hi_u_k: f64,
}

impl From<UncertaintyReport> for bt_verify_uncertainty_report {
    fn from(r: UncertaintyReport) -> Self {
        bt_verify_uncertainty_report {
            samples: r.samples,
            max_u_k: r.max_u_k,
            worst_t_k: r.worst_t_k,
            lo_u_k: r.lo_u_k,
            hi_u_k: r.hi_u_k,
        }
    }
}

impl Output for bt_verify_uncertainty_report {
    fn finite(self) -> Result<Self> {
        Ok(bt_verify_uncertainty_report {
            max_u_k: self.max_u_k.finite()?,
            worst_t_k: self.worst_t_k.finite()?,
            lo_u_k: self.lo_u_k.finite()?,
            hi_u_k: self.hi_u_k.finite()?,
            ..self
        })
    }
}

impl From<ResidualReport> for bt_verify_residuals_report {
    fn from(r: ResidualReport) -> Self {
        bt_verify_residuals_report {
            points: r.points,
            max_abs_residual_k: r.max_abs_residual_k,
            rms_residual_k: r.rms_residual_k,
            mean_residual_k: r.mean_residual_k,
            worst_index: r.worst_index,
            worst_t_k: r.worst_t_k,
            worst_residual_k: r.worst_residual_k,
        }
    }
}

impl Output for bt_verify_residuals_report {
    fn finite(self) -> Result<Self> {
        Ok(bt_verify_residuals_report {
            max_abs_residual_k: self.max_abs_residual_k.finite()?,
            rms_residual_k: self.rms_residual_k.finite()?,
            mean_residual_k: self.mean_residual_k.finite()?,
            worst_t_k: self.worst_t_k.finite()?,
            worst_residual_k: self.worst_residual_k.finite()?,
            ..self
        })
    }
}

impl From<CurveReport> for bt_verify_curve_report {
    fn from(r: CurveReport) -> Self {
        bt_verify_curve_report {
            samples: r.samples,
            max_abs_error_k: r.max_abs_error_k,
            worst_t_k: r.worst_t_k,
            worst_error_k: r.worst_error_k,
            mean_error_k: r.mean_error_k,
        }
    }
}

impl Output for bt_verify_curve_report {
    fn finite(self) -> Result<Self> {
        Ok(bt_verify_curve_report {
            max_abs_error_k: self.max_abs_error_k.finite()?,
            worst_t_k: self.worst_t_k.finite()?,
            worst_error_k: self.worst_error_k.finite()?,
            mean_error_k: self.mean_error_k.finite()?,
            ..self
        })
    }
}

impl From<RoundTripReport> for bt_verify_round_trip_report {
    fn from(r: RoundTripReport) -> Self {
        bt_verify_round_trip_report {
            samples: r.samples,
            max_abs_error_k: r.max_abs_error_k,
            worst_t_k: r.worst_t_k,
            worst_error_k: r.worst_error_k,
            monotonic: u32::from(r.monotonic()),
            first_non_monotonic_k: r.first_non_monotonic_k.unwrap_or(0.0),
        }
    }
}

impl Output for bt_verify_round_trip_report {
    fn finite(self) -> Result<Self> {
        Ok(bt_verify_round_trip_report {
            max_abs_error_k: self.max_abs_error_k.finite()?,
            worst_t_k: self.worst_t_k.finite()?,
            worst_error_k: self.worst_error_k.finite()?,
            first_non_monotonic_k: self.first_non_monotonic_k.finite()?,
            ..self
        })
    }
}

impl From<CoverageReport> for bt_verify_coverage_report {
    fn from(r: CoverageReport) -> Self {
        bt_verify_coverage_report {
            points: r.points,
            points_in_range: r.points_in_range,
            t_min_k: r.t_min_k,
            t_max_k: r.t_max_k,
            extrapolated_below_k: r.extrapolated_below_k,
            extrapolated_above_k: r.extrapolated_above_k,
            largest_gap_k: r.largest_gap_k,
            gap_lo_k: r.gap_lo_k,
            gap_hi_k: r.gap_hi_k,
        }
    }
}

impl Output for bt_verify_coverage_report {
    fn finite(self) -> Result<Self> {
        Ok(bt_verify_coverage_report {
            t_min_k: self.t_min_k.finite()?,
            t_max_k: self.t_max_k.finite()?,
            extrapolated_below_k: self.extrapolated_below_k.finite()?,
            extrapolated_above_k: self.extrapolated_above_k.finite()?,
            largest_gap_k: self.largest_gap_k.finite()?,
            gap_lo_k: self.gap_lo_k.finite()?,
            gap_hi_k: self.gap_hi_k.finite()?,
            ..self
        })
    }
}

impl From<TableReport> for bt_verify_table_report {
    fn from(r: TableReport) -> Self {
        bt_verify_table_report {
            rows: r.rows,
            samples: r.samples,
            max_abs_error_k: r.max_abs_error_k,
            worst_signal: r.worst_signal,
            worst_t_k: r.worst_t_k,
            worst_error_k: r.worst_error_k,
            refused: r.refused,
            non_monotonic: r.non_monotonic,
            claimed_max_error_k: r.claimed_max_error_k,
        }
    }
}

impl Output for bt_verify_table_report {
    fn finite(self) -> Result<Self> {
        Ok(bt_verify_table_report {
            max_abs_error_k: self.max_abs_error_k.finite()?,
            worst_signal: self.worst_signal.finite()?,
            worst_t_k: self.worst_t_k.finite()?,
            worst_error_k: self.worst_error_k.finite()?,
            claimed_max_error_k: self.claimed_max_error_k.finite()?,
            ..self
        })
    }
}

/// A Sakuma-Hattori curve behind a dark offset (signal units; 0 for none).
///
/// # Safety
/// As `read_curve`.
unsafe fn offset_curve(
    p: *const bt_sakuma_hattori,
    dark_offset: f64,
) -> Result<OffsetCurve<bandtemp::calibration::SakumaHattori>> {
    // SAFETY: the caller's guarantee.
    OffsetCurve::new(unsafe { read_curve(p) }?, dark_offset)
}

/// The table of a converter built by `bt_frame_converter_new_*`, over the caller's rows.
///
/// # Safety
/// `converter` null or valid for reads of a `bt_frame_converter`; `table` as
/// `slice_from_c` for `rows` rows.
unsafe fn table_from_c<'a>(
    converter: *const bt_frame_converter,
    table: *const bt_frame_row,
    rows: usize,
) -> Result<FrameTable<'a>> {
    // SAFETY: the caller's guarantees; the state fits the converter's bytes and alignment
    // and is made of f64, f32, u32 and u16 fields only, every bit pattern of which is
    // valid; a row and a `TableRow` have one layout (compile-time asserts above).
    let (state, rows) = unsafe {
        (
            read_input(converter.cast::<ConverterState>())?,
            slice_from_c(table.cast::<TableRow>(), rows)?,
        )
    };
    Ok(FrameConverter::from_parts(state, rows)?.table())
}

/// Residuals of a Sakuma-Hattori calibration with a dark offset at `n` >= 1 blackbody
/// points: r_i = T_curve(`signal[i]`) - `t_k[i]`, K, with T_curve the closed-form inverse
/// of S = `dark_offset` + C / (exp(c2 / (A T + B)) - 1). Reports max |r|, rms, mean and
/// the worst point.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`,
/// `BT_STATUS_VERIFY_NO_POINTS` for n = 0, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_CALIBRATION_PARAMETER_INVALID`,
/// `BT_STATUS_SIGNAL_AT_OR_BELOW_OFFSET`, `BT_STATUS_CALIBRATION_OUT_OF_DOMAIN`.
///
/// # Safety
/// `p` null or valid for reading a `bt_sakuma_hattori`; `t_k` and `signal` null or valid
/// for reading `n` doubles; `out` null or valid for writing a `bt_verify_residuals_report`;
/// written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_verify_residuals_sakuma_hattori(
    p: *const bt_sakuma_hattori,
    dark_offset: f64,
    t_k: *const f64,
    signal: *const f64,
    n: usize,
    out: *mut bt_verify_residuals_report,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `offset_curve`, `slice_from_c` and
    // `deliver`.
    unsafe {
        deliver(out, || {
            let curve = offset_curve(p, dark_offset)?;
            let (t_k, signal) = (slice_from_c(t_k, n)?, slice_from_c(signal, n)?);
            Ok(verify::residuals(&curve, t_k, signal)?.into())
        })
    }
}

/// A Sakuma-Hattori calibration (with dark offset) against the exact band model over
/// [lo_k, hi_k] at `samples` temperatures spread uniformly, ends included: at each T the
/// band gives L(T); the counts map L = `counts_gain` S + `counts_offset` takes it to the
/// curve's signal S; the error is T_curve(S) - T, K. For a curve fitted to band radiance
/// pass gain 1 and offset 0.
///
/// Errors: those of `bt_band_radiance` and `bt_sakuma_hattori_temperature`;
/// `BT_STATUS_FRAME_COUNTS_MAP_INVALID` unless the gain is finite and positive and the
/// offset finite, `BT_STATUS_VERIFY_RANGE_INVALID` unless 0 < lo_k < hi_k,
/// `BT_STATUS_VERIFY_SAMPLE_COUNT_INVALID` unless 2 <= samples <= 1000000,
/// `BT_STATUS_SIGNAL_AT_OR_BELOW_OFFSET` where the band's signal maps below the dark
/// offset.
///
/// # Safety
/// `p` as in `bt_verify_residuals_sakuma_hattori`; `band` as in `bt_band_radiance`; `out`
/// null or valid for writing a `bt_verify_curve_report`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_verify_curve_band(
    p: *const bt_sakuma_hattori,
    dark_offset: f64,
    band: *const bt_band,
    counts_gain: f64,
    counts_offset: f64,
    lo_k: f64,
    hi_k: f64,
    samples: usize,
    out: *mut bt_verify_curve_report,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `offset_curve`, `band_from_c` and
    // `deliver`.
    unsafe {
        deliver(out, || {
            let curve = offset_curve(p, dark_offset)?;
            let band = band_from_c(band)?;
            let map = CountsMap::linear(counts_gain, counts_offset)?;
            Ok(verify::curve_against_model(&curve, &band, map, lo_k, hi_k, samples)?.into())
        })
    }
}

/// Round trip and monotonicity of a curve (see `bt_verify_round_trip_report`).
fn round_trip<C: SignalCurve>(
    curve: &C,
    lo_k: f64,
    hi_k: f64,
    samples: usize,
) -> Result<bt_verify_round_trip_report> {
    Ok(verify::round_trip(curve, lo_k, hi_k, samples)?.into())
}

/// Round trip T -> S(T) -> T(S) of a Sakuma-Hattori calibration with dark offset at
/// `samples` temperatures over [lo_k, hi_k], and whether S, dS/dT and T(S) rise over
/// them.
///
/// Errors: those of `bt_sakuma_hattori_signal`, `BT_STATUS_VERIFY_RANGE_INVALID`,
/// `BT_STATUS_VERIFY_SAMPLE_COUNT_INVALID` (as in `bt_verify_curve_band`).
///
/// # Safety
/// `p` as in `bt_verify_residuals_sakuma_hattori`; `out` null or valid for writing a
/// `bt_verify_round_trip_report`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_verify_round_trip_sakuma_hattori(
    p: *const bt_sakuma_hattori,
    dark_offset: f64,
    lo_k: f64,
    hi_k: f64,
    samples: usize,
    out: *mut bt_verify_round_trip_report,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `offset_curve` and `deliver`.
    unsafe {
        deliver(out, || {
            round_trip(&offset_curve(p, dark_offset)?, lo_k, hi_k, samples)
        })
    }
}

/// As `bt_verify_round_trip_sakuma_hattori` for a band's exact radiance (Newton
/// inversion of the band integral).
///
/// Errors: those of `bt_band_radiance` and `bt_band_temperature`,
/// `BT_STATUS_VERIFY_RANGE_INVALID`, `BT_STATUS_VERIFY_SAMPLE_COUNT_INVALID`.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `out` as in `bt_verify_round_trip_sakuma_hattori`.
#[no_mangle]
pub unsafe extern "C" fn bt_verify_round_trip_band(
    band: *const bt_band,
    lo_k: f64,
    hi_k: f64,
    samples: usize,
    out: *mut bt_verify_round_trip_report,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver`.
    unsafe { deliver(out, || round_trip(&band_from_c(band)?, lo_k, hi_k, samples)) }
}

/// Coverage of [lo_k, hi_k] by `n` >= 1 blackbody points at `t_k` (any order): the
/// extrapolation below the coldest and above the hottest point, and the largest gap
/// between neighbouring points inside the range, K. O(n^2) without storage, so n is at
/// most 1024.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`,
/// `BT_STATUS_VERIFY_NO_POINTS`, `BT_STATUS_VERIFY_TOO_MANY_POINTS` for n > 1024,
/// `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_VERIFY_RANGE_INVALID`.
///
/// # Safety
/// `t_k` null or valid for reading `n` doubles; `out` null or valid for writing a
/// `bt_verify_coverage_report`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_verify_coverage(
    t_k: *const f64,
    n: usize,
    lo_k: f64,
    hi_k: f64,
    out: *mut bt_verify_coverage_report,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `slice_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            Ok(verify::coverage(slice_from_c(t_k, n)?, lo_k, hi_k)?.into())
        })
    }
}

/// A converter's table (built by `bt_frame_converter_new_band` over `band`) against exact
/// inversion of the band's radiance: `points_per_row` signals per row, off the table's own
/// check points, plus the range's ends. Works on rows from anywhere (a firmware image's
/// copy, say): the converter's geometry must describe them.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`,
/// `BT_STATUS_FRAME_TABLE_INVALID` / `BT_STATUS_FRAME_STORAGE_TOO_SMALL` for a converter
/// that does not describe the rows, `BT_STATUS_VERIFY_SAMPLE_COUNT_INVALID` unless
/// 1 <= points_per_row <= 4096 and rows x points_per_row <= 1000000, errors of
/// `bt_band_temperature`.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `converter` null or valid for reading a
/// `bt_frame_converter`; `table` null or valid for reading `rows` rows; `out` null or
/// valid for writing a `bt_verify_table_report`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_verify_frame_table_band(
    band: *const bt_band,
    converter: *const bt_frame_converter,
    table: *const bt_frame_row,
    rows: usize,
    points_per_row: usize,
    out: *mut bt_verify_table_report,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `table_from_c` and
    // `deliver`.
    unsafe {
        deliver(out, || {
            let band = band_from_c(band)?;
            let table = table_from_c(converter, table, rows)?;
            Ok(verify::frame_table(&table, &band, points_per_row)?.into())
        })
    }
}

/// As `bt_verify_frame_table_band` for a converter built by
/// `bt_frame_converter_new_sakuma_hattori` over `p` (the curve without dark offset, as
/// the converter's table holds it).
///
/// Errors: as `bt_verify_frame_table_band`, with those of `bt_sakuma_hattori_temperature`.
///
/// # Safety
/// `p` as in `bt_sakuma_hattori_signal`; the rest as in `bt_verify_frame_table_band`.
#[no_mangle]
pub unsafe extern "C" fn bt_verify_frame_table_sakuma_hattori(
    p: *const bt_sakuma_hattori,
    converter: *const bt_frame_converter,
    table: *const bt_frame_row,
    rows: usize,
    points_per_row: usize,
    out: *mut bt_verify_table_report,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `read_curve`, `table_from_c` and
    // `deliver`.
    unsafe {
        deliver(out, || {
            let curve = read_curve(p)?;
            let table = table_from_c(converter, table, rows)?;
            Ok(verify::frame_table(&table, &curve, points_per_row)?.into())
        })
    }
}

/// Standard uncertainty (k = 1) of the temperature a Sakuma-Hattori calibration reads, from
/// the covariance of its parameters, at `samples` temperatures over [lo_k, hi_k]:
/// u^2(T) = J V J^T, J = (dT/dA, dT/dB, dT/dC) at the curve's signal S(T) (GUM law of
/// propagation, first order). `covariance` points to 9 doubles, row-major, rows and
/// columns in the order A (um), B (um K), C (signal units), as `bt_points_fit` gives it.
///
/// Errors: those of `bt_sakuma_hattori_signal`, `BT_STATUS_NULL_POINTER`,
/// `BT_STATUS_INVALID_BUFFER`, `BT_STATUS_VERIFY_COVARIANCE_INVALID` for a non-finite
/// entry, a negative variance or an asymmetry,
/// `BT_STATUS_CORRELATION_NOT_POSITIVE_SEMIDEFINITE` where J V J^T < 0,
/// `BT_STATUS_VERIFY_RANGE_INVALID`, `BT_STATUS_VERIFY_SAMPLE_COUNT_INVALID`.
///
/// # Safety
/// `p` as in `bt_sakuma_hattori_signal`; `covariance` null or valid for reading 9
/// doubles; `out` null or valid for writing a `bt_verify_uncertainty_report`; written only
/// on success.
#[no_mangle]
pub unsafe extern "C" fn bt_verify_uncertainty_sakuma_hattori(
    p: *const bt_sakuma_hattori,
    covariance: *const f64,
    lo_k: f64,
    hi_k: f64,
    samples: usize,
    out: *mut bt_verify_uncertainty_report,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `read_curve`, `slice_from_c` and
    // `deliver`.
    unsafe {
        deliver(out, || {
            let curve = read_curve(p)?;
            let flat = slice_from_c(covariance, 9)?;
            let mut v = [[0.0; 3]; 3];
            for (slot, &x) in v.iter_mut().flatten().zip(flat) {
                *slot = x;
            }
            Ok(verify::calibration_uncertainty(&curve, &v, lo_k, hi_k, samples)?.into())
        })
    }
}
