//! Whole frames through the C ABI: table-based conversion of counts or signal images to
//! object temperature in caller-owned storage (`bt_frame_*`).
//!
//! The caller owns everything: the table rows (`bt_frame_row[]`, 16 bytes each, sized by
//! `bt_frame_table_rows_*`) and the converter (`bt_frame_converter`, plain bytes), both of
//! which may live in static storage. The library keeps no pointer between calls; each
//! conversion re-checks the converter against the rows it is given.

use super::band::{band_from_c, bt_band};
use super::calibration::{bt_sakuma_hattori, read_curve};
use super::scene::{bt_scene, read_scene};
use super::{bt_status, deliver, read_input, slice_from_c, slice_from_c_mut, Output};
use bandtemp::band::SignalCurve;
use bandtemp::frame::{
    ConverterState, CountsMap, FrameConverter, FrameSummary, FrameTable, Rails, TableRow,
    TemperatureRange,
};
use bandtemp::{Error, Result};
use core::mem::{align_of, size_of};

/// One table row: a cubic in the segment position, four floats (see the Rust
/// `frame::TableRow`). Opaque to the caller: provide storage, hand it back unchanged.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_frame_row {
    /// The row's coefficients (internal).
    pub coefficients: [f32; 4],
}

const _: () = assert!(size_of::<bt_frame_row>() == size_of::<TableRow>());
const _: () = assert!(align_of::<bt_frame_row>() == align_of::<TableRow>());

/// A frame converter: the table's geometry and measured errors, the scene's per-pixel
/// coefficients, the counts map and the rails, as opaque plain bytes (256 bytes, 8-byte
/// aligned). It holds no pointer: keep it anywhere (static storage included), copy it with
/// assignment or memcpy, and hand it back together with the table rows it was built with.
/// Do not modify its bytes. It records a 64-bit fingerprint of its rows' bytes (and of its
/// table geometry), and every call that takes a converter and rows recomputes it (about 4
/// multiply steps per row, well under 1 % of a frame's conversion): a converter handed
/// rows that are not its own (another table's, a shifted pointer, rows changed since) is
/// refused with `BT_STATUS_FRAME_ROWS_MISMATCH`; one whose geometry does not fit the rows
/// with `BT_STATUS_FRAME_TABLE_INVALID` or `BT_STATUS_FRAME_STORAGE_TOO_SMALL`.
///
/// The bytes are the same on every little-endian target with 8-byte aligned doubles
/// (x86-64, AArch64, Arm EABI such as Cortex-M), so a converter and its rows built on a
/// host can be placed in a firmware's flash and used there as they are (see
/// `bt_frame_converter_set_scene_band` for adapting the scene on the device).
#[repr(C)]
#[derive(Clone, Copy, Debug)]
pub struct bt_frame_converter {
    /// Internal state.
    pub opaque: [u64; 32],
}

const _: () = assert!(size_of::<ConverterState>() <= size_of::<bt_frame_converter>());
const _: () = assert!(align_of::<ConverterState>() <= align_of::<bt_frame_converter>());

/// The detector's rails: counts at or below `dead_counts` are dead pixels, counts at or
/// above `saturation_counts` saturated. A 16-bit converter: 0 and 65535; 14-bit: 0 and
/// 16383. Valid when `dead_counts < saturation_counts`.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct bt_rails {
    /// Counts at or below which a pixel is dead.
    pub dead_counts: u16,
    /// Counts at or above which a pixel is saturated.
    pub saturation_counts: u16,
}

/// Counts of pixel outcomes for one frame; `pixels` = `converted` + the other fields.
/// Every pixel that is not converted comes out NaN. Each pixel is counted once, under the
/// first outcome that applies in this order: dead, saturated, emissivity invalid, non
/// finite, below background, below range, above range (so a NaN signal with emissivity 0
/// counts as `emissivity_invalid`).
#[repr(C)]
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct bt_frame_summary {
    /// Pixels in the frame.
    pub pixels: u64,
    /// Pixels converted to a temperature.
    pub converted: u64,
    /// Counts at or below the dead rail.
    pub dead: u64,
    /// Counts at or above the saturation rail.
    pub saturated: u64,
    /// Pixel emissivity outside (0, 1] or NaN.
    pub emissivity_invalid: u64,
    /// Signal input NaN or infinite.
    pub non_finite: u64,
    /// The object's own signal at or below zero (no more than the background).
    pub below_background: u64,
    /// Colder than the table's range.
    pub below_range: u64,
    /// Hotter than the table's range.
    pub above_range: u64,
}

impl From<FrameSummary> for bt_frame_summary {
    fn from(s: FrameSummary) -> bt_frame_summary {
        bt_frame_summary {
            pixels: s.pixels,
            converted: s.converted,
            dead: s.dead,
            saturated: s.saturated,
            emissivity_invalid: s.emissivity_invalid,
            non_finite: s.non_finite,
            below_background: s.below_background,
            below_range: s.below_range,
            above_range: s.above_range,
        }
    }
}

impl Output for bt_frame_summary {
    fn finite(self) -> Result<bt_frame_summary> {
        Ok(self)
    }
}

/// What a converter's table is and what its construction measured.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_frame_geometry {
    /// Rows per octave of signal = 2^level.
    pub level: u32,
    /// Rows the table uses (16 bytes each).
    pub rows: usize,
    /// Declared range, lower end, K.
    pub lo_k: f64,
    /// Declared range, upper end, K.
    pub hi_k: f64,
    /// The curve's signal at `lo_k` (as float), curve units: smaller is below range.
    pub signal_lo: f64,
    /// The curve's signal at `hi_k` (as float), curve units: larger is above range.
    pub signal_hi: f64,
    /// Requested tolerance, K.
    pub tolerance_k: f64,
    /// Bound on |T_table(L) - T_exact(L)| for every float signal L in range, K: per row,
    /// the largest error at 9 check points times 8/7 for the points between them (or, where
    /// smaller, twice the centre error plus the coefficients' rounding), plus a rigorous
    /// bound on the float rounding of the evaluation.
    pub max_table_error_k: f64,
    /// `max_table_error_k` plus the rounding allowance of a uniform-scene pixel from
    /// counts (1.5 float ulps of L in kelvin): a bound on |T_pixel - T_exact| for a
    /// uniform scene against `bt_object_temperature`; at most `tolerance_k`, K.
    pub max_pixel_error_k: f64,
}

impl Output for bt_frame_geometry {
    fn finite(self) -> Result<bt_frame_geometry> {
        Ok(bt_frame_geometry {
            lo_k: self.lo_k.finite()?,
            hi_k: self.hi_k.finite()?,
            signal_lo: self.signal_lo.finite()?,
            signal_hi: self.signal_hi.finite()?,
            tolerance_k: self.tolerance_k.finite()?,
            max_table_error_k: self.max_table_error_k.finite()?,
            max_pixel_error_k: self.max_pixel_error_k.finite()?,
            ..self
        })
    }
}

impl Output for usize {
    fn finite(self) -> Result<usize> {
        Ok(self)
    }
}

/// The converter state is opaque to C: its coefficients may hold NaN by design (an
/// emissivity map that is unavailable), and it is never read as numbers by the caller.
impl Output for ConverterState {
    fn finite(self) -> Result<ConverterState> {
        Ok(self)
    }
}

/// Reads and validates rails.
///
/// # Safety
/// `rails` is null or valid for reads of a `bt_rails`.
unsafe fn read_rails(rails: *const bt_rails) -> Result<Rails> {
    // SAFETY: the caller's guarantee; `bt_rails` is two u16, any bit pattern valid.
    let r = unsafe { read_input(rails) }?;
    Rails::new(r.dead_counts, r.saturation_counts)
}

/// Reads the state out of a converter.
///
/// # Safety
/// `converter` is null or valid for reads of a `bt_frame_converter`.
unsafe fn read_state(converter: *const bt_frame_converter) -> Result<ConverterState> {
    // SAFETY: the caller's guarantee; the state fits the converter's bytes and alignment
    // (compile-time asserts above) and is made of f64, f32, u32 and u16 fields only, every
    // bit pattern of which is valid (padding bytes are not read as values).
    unsafe { read_input(converter.cast::<ConverterState>()) }
}

/// The caller's table rows, read-only.
///
/// # Safety
/// As `slice_from_c`.
unsafe fn rows_from_c<'a>(table: *const bt_frame_row, rows: usize) -> Result<&'a [TableRow]> {
    // SAFETY: the caller's guarantee; `bt_frame_row` and `TableRow` have one layout
    // (compile-time asserts above).
    unsafe { slice_from_c(table.cast::<TableRow>(), rows) }
}

/// Checks `out`, runs `compute`, and writes the state into the converter only on success.
///
/// # Safety
/// `out` is null or valid for writes of a `bt_frame_converter`.
unsafe fn deliver_state(
    out: *mut bt_frame_converter,
    compute: impl FnOnce() -> Result<ConverterState>,
) -> bt_status {
    // SAFETY: the caller's guarantee; the state fits the converter's bytes and alignment.
    unsafe { deliver(out.cast::<ConverterState>(), compute) }
}

/// A counts-to-signal map S = gain n + offset for a band curve.
fn band_counts(counts_gain: f64, counts_offset: f64) -> Result<CountsMap> {
    CountsMap::linear(counts_gain, counts_offset)
}

/// Rows a table of the band's radiance over [lo_k, hi_k] needs so that every pixel of a
/// uniform scene is within `tolerance_k` (K) of exact inversion: the coarsest of
/// 2^0..2^12 rows per octave of signal that meets it. Storage is 16 bytes per row.
/// Example (measured): 8-14 um energy band, 250-1500 K, 1 mK: 61 rows, 976 bytes.
///
/// Time is bounded on every input: a tolerance below the float output floor
/// (hi_k 2^-26) is refused before any band integral; then two band integrals give the
/// rows of every level from the float bits of the signal ends, a table over 2048 rows is
/// refused before its rows are built, and a few probe rows per level skip levels that
/// cannot pass. Worst case about 2 + 13 x 5 x 7 + 2 x 2048 x 12 band integrals; the
/// measured refusals of absurd ranges take microseconds (README, Frames).
///
/// Errors: those of `bt_band_radiance` for the band, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_FRAME_RANGE_INVALID` unless
/// lo_k < hi_k, `BT_STATUS_FRAME_TOLERANCE_INVALID`,
/// `BT_STATUS_FRAME_SIGNAL_UNREPRESENTABLE` (signal outside the float range),
/// `BT_STATUS_FRAME_TOLERANCE_UNREACHABLE` (float output resolves about 6e-8 T),
/// `BT_STATUS_FRAME_TABLE_TOO_LARGE` (more than 2048 rows).
///
/// # Safety
/// `band` as in `bt_band_radiance`; `rows` null or valid for writing a size_t; written
/// only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_table_rows_band(
    band: *const bt_band,
    lo_k: f64,
    hi_k: f64,
    tolerance_k: f64,
    rows: *mut usize,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver`.
    unsafe {
        deliver(rows, || {
            let band = band_from_c(band)?;
            FrameTable::required_rows(&band, TemperatureRange::new(lo_k, hi_k)?, tolerance_k)
        })
    }
}

/// As `bt_frame_table_rows_band`, for a Sakuma-Hattori calibration curve (signal in
/// counts above dark).
///
/// Errors: those of `bt_frame_table_rows_band` with the curve's
/// (`BT_STATUS_CALIBRATION_PARAMETER_INVALID`, `BT_STATUS_CALIBRATION_OUT_OF_DOMAIN`)
/// instead of the band's.
///
/// # Safety
/// `p` null or valid for reading a `bt_sakuma_hattori`; `rows` as in
/// `bt_frame_table_rows_band`.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_table_rows_sakuma_hattori(
    p: *const bt_sakuma_hattori,
    lo_k: f64,
    hi_k: f64,
    tolerance_k: f64,
    rows: *mut usize,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `read_curve` and `deliver`.
    unsafe {
        deliver(rows, || {
            let curve = read_curve(p)?;
            FrameTable::required_rows(&curve, TemperatureRange::new(lo_k, hi_k)?, tolerance_k)
        })
    }
}

/// Builds a table and converter for a band curve (radiometric calibration): counts n map
/// to band radiance S = `counts_gain` n + `counts_offset`, then the scene's measurement
/// equation gives the object's signal and the table its temperature over [lo_k, hi_k].
///
/// `table` receives the rows (`table_rows` >= what `bt_frame_table_rows_band` says;
/// only that many are written). Each row is checked against exact inversion as it is
/// stored, and the table is refused unless every uniform-scene pixel is within
/// `tolerance_k`. Calling this directly with statically sized storage (no
/// `bt_frame_table_rows_band` first) halves the start-up work; a table too large for the
/// storage is refused with `BT_STATUS_FRAME_STORAGE_TOO_SMALL` as soon as that is known.
///
/// Errors: those of `bt_frame_table_rows_band` and of the scene (`bt_sensor_radiance`),
/// `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`,
/// `BT_STATUS_FRAME_COUNTS_MAP_INVALID` (gain not finite and positive, offset not finite),
/// `BT_STATUS_FRAME_RAILS_INVALID`, `BT_STATUS_FRAME_STORAGE_TOO_SMALL`,
/// `BT_STATUS_FRAME_COEFFICIENT_OVERFLOW`.
///
/// `out` is written only on success; the rows of `table` are scratch until then (their
/// contents are unspecified after an error).
///
/// # Safety
/// `band` as in `bt_band_radiance`; `scene` and `rails` null or valid for reading their
/// types; `table` null or valid for reading and writing `table_rows` rows, not
/// overlapping the band's tables; `out` null or valid for writing a `bt_frame_converter`.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_converter_new_band(
    band: *const bt_band,
    scene: *const bt_scene,
    counts_gain: f64,
    counts_offset: f64,
    rails: *const bt_rails,
    lo_k: f64,
    hi_k: f64,
    tolerance_k: f64,
    table: *mut bt_frame_row,
    table_rows: usize,
    out: *mut bt_frame_converter,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `read_scene`,
    // `read_rails`, `slice_from_c_mut` and `deliver_state`.
    unsafe {
        deliver_state(out, || {
            let band = band_from_c(band)?;
            let scene = read_scene(scene)?;
            let counts = band_counts(counts_gain, counts_offset)?;
            let rails = read_rails(rails)?;
            let range = TemperatureRange::new(lo_k, hi_k)?;
            let storage = slice_from_c_mut(table.cast::<TableRow>(), table_rows)?;
            let converter =
                FrameConverter::new(&band, &scene, counts, rails, range, tolerance_k, storage)?;
            Ok(converter.state())
        })
    }
}

/// As `bt_frame_converter_new_band`, for a Sakuma-Hattori calibration curve in counts:
/// the signal is S = n - `dark_counts`.
///
/// Errors: those of `bt_frame_converter_new_band`, with the curve's instead of the
/// band's; `BT_STATUS_FRAME_COUNTS_MAP_INVALID` for a non-finite `dark_counts`.
///
/// # Safety
/// As `bt_frame_converter_new_band`, with `p` null or valid for reading a
/// `bt_sakuma_hattori`.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_converter_new_sakuma_hattori(
    p: *const bt_sakuma_hattori,
    scene: *const bt_scene,
    dark_counts: f64,
    rails: *const bt_rails,
    lo_k: f64,
    hi_k: f64,
    tolerance_k: f64,
    table: *mut bt_frame_row,
    table_rows: usize,
    out: *mut bt_frame_converter,
) -> bt_status {
    // SAFETY: as in `bt_frame_converter_new_band`.
    unsafe {
        deliver_state(out, || {
            let curve = read_curve(p)?;
            let scene = read_scene(scene)?;
            let counts = CountsMap::dark_offset(dark_counts)?;
            let rails = read_rails(rails)?;
            let range = TemperatureRange::new(lo_k, hi_k)?;
            let storage = slice_from_c_mut(table.cast::<TableRow>(), table_rows)?;
            let converter =
                FrameConverter::new(&curve, &scene, counts, rails, range, tolerance_k, storage)?;
            Ok(converter.state())
        })
    }
}

/// Replaces the converter's scene, keeping its table (no rebuild): for a new emissivity,
/// reflected temperature, air path or window.
///
/// # Safety
/// `converter` null or valid for reading and writing a `bt_frame_converter`; `table`
/// null or valid for reading `table_rows` rows.
unsafe fn set_scene<C: SignalCurve>(
    converter: *mut bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    curve: impl FnOnce() -> Result<C>,
    scene: *const bt_scene,
) -> bt_status {
    // SAFETY: the caller's guarantees on `converter`, `table` and `scene`.
    unsafe {
        deliver_state(converter, || {
            let state = read_state(converter)?;
            let rows = rows_from_c(table, table_rows)?;
            let mut frame = FrameConverter::from_parts(state, rows)?;
            frame.set_scene(&curve()?, &read_scene(scene)?)?;
            Ok(frame.state())
        })
    }
}

/// Replaces the scene of a converter built by `bt_frame_converter_new_band`, keeping its
/// table (no rebuild): a new emissivity, reflected temperature, air path or window. The
/// band must be the one the table was built from.
///
/// This is also how a firmware starts from a converter and rows built offline (on a host,
/// stored in flash): copy the converter to RAM and call this with the device's scene. It
/// checks the rows' fingerprint, that the band gives the table's signal ends, and forms
/// the scene's coefficients: a few band integrals instead of the table's construction.
///
/// Time: the fingerprint (linear in the rows), two band integrals for the signal ends,
/// those of the scene's terms (at most about ten), and two 16-step searches for the valid
/// counts window.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`,
/// `BT_STATUS_FRAME_ROWS_MISMATCH` for rows that are not the converter's,
/// `BT_STATUS_FRAME_TABLE_INVALID` or `BT_STATUS_FRAME_STORAGE_TOO_SMALL` for a converter
/// that does not describe the rows, `BT_STATUS_FRAME_RAILS_INVALID`,
/// `BT_STATUS_FRAME_CURVE_MISMATCH` for another band, the band's and the scene's errors,
/// `BT_STATUS_FRAME_COEFFICIENT_OVERFLOW`. The converter is changed only on success.
///
/// # Safety
/// `converter` null or valid for reading and writing a `bt_frame_converter`; `table` null
/// or valid for reading `table_rows` rows; `band` and `scene` as in `bt_sensor_radiance`.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_converter_set_scene_band(
    converter: *mut bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    band: *const bt_band,
    scene: *const bt_scene,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `set_scene` and `band_from_c`.
    unsafe { set_scene(converter, table, table_rows, || band_from_c(band), scene) }
}

/// As `bt_frame_converter_set_scene_band`, for a converter built by
/// `bt_frame_converter_new_sakuma_hattori` (the curve must be the same).
///
/// # Safety
/// As `bt_frame_converter_set_scene_band`, with `p` null or valid for reading a
/// `bt_sakuma_hattori`.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_converter_set_scene_sakuma_hattori(
    converter: *mut bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    p: *const bt_sakuma_hattori,
    scene: *const bt_scene,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `set_scene` and `read_curve`.
    unsafe { set_scene(converter, table, table_rows, || read_curve(p), scene) }
}

/// Replaces the converter's rails (no rebuild). Time: the fingerprint (linear in the rows)
/// and two 16-step searches for the valid counts window.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`,
/// `BT_STATUS_FRAME_RAILS_INVALID`, and those of a converter that does not describe the
/// rows (as `bt_frame_converter_set_scene_band`). Changed only on success.
///
/// # Safety
/// `converter` and `table` as in `bt_frame_converter_set_scene_band`; `rails` null or
/// valid for reading a `bt_rails`.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_converter_set_rails(
    converter: *mut bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    rails: *const bt_rails,
) -> bt_status {
    // SAFETY: the caller's guarantees on every pointer.
    unsafe {
        deliver_state(converter, || {
            let mut frame = FrameConverter::from_parts(
                read_state(converter)?,
                rows_from_c(table, table_rows)?,
            )?;
            frame.set_rails(read_rails(rails)?);
            Ok(frame.state())
        })
    }
}

/// The converter's table geometry and the errors its construction measured.
///
/// Errors: those of a converter that does not describe the rows (as
/// `bt_frame_converter_set_scene_band`).
///
/// # Safety
/// `converter` null or valid for reading a `bt_frame_converter`; `table` as in
/// `bt_frame_converter_set_scene_band`; `out` null or valid for writing a
/// `bt_frame_geometry`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_converter_geometry(
    converter: *const bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    out: *mut bt_frame_geometry,
) -> bt_status {
    // SAFETY: the caller's guarantees on every pointer.
    unsafe {
        deliver(out, || {
            let frame = FrameConverter::from_parts(
                read_state(converter)?,
                rows_from_c(table, table_rows)?,
            )?;
            let g = frame.table().geometry();
            Ok(bt_frame_geometry {
                level: g.level(),
                rows: g.rows(),
                lo_k: g.range().lo_k,
                hi_k: g.range().hi_k,
                signal_lo: f64::from(g.signal_lo()),
                signal_hi: f64::from(g.signal_hi()),
                tolerance_k: g.tolerance_k(),
                max_table_error_k: g.max_table_error_k(),
                max_pixel_error_k: g.max_pixel_error_k(),
            })
        })
    }
}

/// Does the half-open byte range of `a` (len `a_len` of `A`) meet that of `b`?
fn overlaps<A, B>(a: *const A, a_len: usize, b: *const B, b_len: usize) -> bool {
    let (a0, b0) = (a as usize, b as usize);
    let a1 = a0.saturating_add(a_len.saturating_mul(size_of::<A>()));
    let b1 = b0.saturating_add(b_len.saturating_mul(size_of::<B>()));
    a_len > 0 && b_len > 0 && a0 < b1 && b0 < a1
}

/// Shared body of the two conversions.
///
/// # Safety
/// As `bt_frame_convert_counts`, with `input` of element type `T`.
#[allow(clippy::too_many_arguments)]
#[allow(clippy::redundant_closure_for_method_calls)]
unsafe fn convert<T>(
    converter: *const bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    input: *const T,
    input_len: usize,
    emissivity: *const f32,
    emissivity_len: usize,
    kelvin: *mut f32,
    kelvin_len: usize,
    summary: *mut bt_frame_summary,
    run: impl FnOnce(&FrameConverter<'_>, &[T], Option<&[f32]>, &mut [f32]) -> Result<FrameSummary>,
) -> bt_status {
    // SAFETY: the caller's guarantees on every pointer; slices are formed only after the
    // checks of `slice_from_c`, and the output only when it overlaps no input.
    unsafe {
        deliver(summary, || {
            let frame = FrameConverter::from_parts(
                read_state(converter)?,
                rows_from_c(table, table_rows)?,
            )?;
            let input = slice_from_c(input, input_len)?;
            let emissivity = if emissivity.is_null() {
                None
            } else {
                Some(slice_from_c(emissivity, emissivity_len)?)
            };
            if overlaps(kelvin, kelvin_len, input.as_ptr(), input.len())
                || overlaps(kelvin, kelvin_len, table, table_rows)
                || overlaps(kelvin, kelvin_len, converter, 1)
                || emissivity.is_some_and(|e| overlaps(kelvin, kelvin_len, e.as_ptr(), e.len()))
                || overlaps(kelvin, kelvin_len, summary, 1)
            {
                return Err(Error::InvalidBuffer);
            }
            let kelvin = slice_from_c_mut(kelvin, kelvin_len)?;
            run(&frame, input, emissivity, kelvin).map(bt_frame_summary::from)
        })
    }
}

/// Converts a frame of counts to object temperature in K: `kelvin[i]` from `counts[i]`
/// and, unless `emissivity` is NULL, `emissivity[i]` (replacing the scene's emissivity for
/// that pixel; NULL: the scene's, and `emissivity_len` is ignored). Failed pixels come out
/// NaN and are counted in `summary`; they never stop the frame.
///
/// Accuracy against exact inversion of the measurement equation (`bt_object_temperature`
/// at the pixel's signal): uniform scene, within `max_pixel_error_k` of
/// `bt_frame_converter_geometry` (<= the tolerance); with an emissivity map, add about
/// (|L - Lr| + Lr) 1.2e-7 / L'(T) for the float arithmetic.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER` (misaligned, impossible
/// length, or `kelvin` overlapping another buffer), `BT_STATUS_FRAME_ROWS_MISMATCH` for
/// rows that are not the converter's (checked by fingerprint on every call), those of a
/// converter that does not describe the rows (as `bt_frame_converter_set_scene_band`),
/// `BT_STATUS_FRAME_LENGTH_MISMATCH` unless the lengths are equal,
/// `BT_STATUS_FRAME_EMISSIVITY_MAP_UNAVAILABLE` if a map is given but the curve has no
/// signal at the reflected temperature. On error neither `kelvin` nor `summary` is
/// written.
///
/// Time: linear in the pixels, plus the re-wrap of the converter (the rows' fingerprint,
/// linear in the rows, and two 16-step searches), about 1 us for a 61-row table on an
/// x86-64 host.
///
/// # Safety
/// `converter` null or valid for reading a `bt_frame_converter`; `table` null or valid
/// for reading `table_rows` rows; `counts` and `emissivity` null or valid for reading
/// their lengths; `kelvin` null or valid for writing `kelvin_len` floats; `summary` null or
/// valid for writing a `bt_frame_summary`.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_convert_counts(
    converter: *const bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    counts: *const u16,
    counts_len: usize,
    emissivity: *const f32,
    emissivity_len: usize,
    kelvin: *mut f32,
    kelvin_len: usize,
    summary: *mut bt_frame_summary,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `convert`.
    unsafe {
        convert(
            converter,
            table,
            table_rows,
            counts,
            counts_len,
            emissivity,
            emissivity_len,
            kelvin,
            kelvin_len,
            summary,
            |frame: &FrameConverter<'_>, input: &[u16], e, out| frame.convert_counts(input, e, out),
        )
    }
}

/// Converts a frame of sensor signal S (the curve's units: band radiance for a band
/// converter, counts above dark for a Sakuma-Hattori converter) to object temperature in
/// K, as `bt_frame_convert_counts`. NaN or infinite inputs are counted as `non_finite`.
///
/// Accuracy: the table's plus the float rounding of S - B (about 1 ulp of S + B,
/// converted to kelvin by 1/(G L'(T))).
///
/// Errors: as `bt_frame_convert_counts`.
///
/// # Safety
/// As `bt_frame_convert_counts`, with `signal` null or valid for reading `signal_len`
/// floats.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_convert_signal(
    converter: *const bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    signal: *const f32,
    signal_len: usize,
    emissivity: *const f32,
    emissivity_len: usize,
    kelvin: *mut f32,
    kelvin_len: usize,
    summary: *mut bt_frame_summary,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `convert`.
    unsafe {
        convert(
            converter,
            table,
            table_rows,
            signal,
            signal_len,
            emissivity,
            emissivity_len,
            kelvin,
            kelvin_len,
            summary,
            |frame: &FrameConverter<'_>, input: &[f32], e, out| frame.convert_signal(input, e, out),
        )
    }
}
