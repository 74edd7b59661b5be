//! Raw detector frames through the C ABI: frame stacks (averaging), two-point
//! non-uniformity maps, bad-pixel detection, the shutter offset refresh, the array-
//! temperature drift model, self-emission, figures of merit, and the fused conversion of
//! raw counts to kelvin (`bt_frame_convert_counts_corrected`).
//!
//! Everything lives in the caller's storage: stack accumulators (two doubles per pixel),
//! maps (two floats per pixel), the bad-pixel map (one byte per pixel, nonzero = bad) and
//! scratch space. Buffers a call writes must not overlap any other buffer of the call
//! (`BT_STATUS_INVALID_BUFFER`).

use super::band::{band_from_c, bt_band};
use super::calibration::{bt_sakuma_hattori, read_curve};
use super::frame::{
    bt_frame_converter, bt_frame_row, bt_frame_summary, overlaps, read_state, rows_from_c,
};
use super::{bt_status, check_ptr, deliver, read_input, slice_from_c, slice_from_c_mut, Output};
use bandtemp::band::SignalCurve;
use bandtemp::frame::{
    detect_bad_pixels, effective_exponent, multi_point, multi_point_map_len, net_signal, netd_k,
    object_from_net_signal, shutter_refresh, shutter_target_counts, spatial_stats, two_point,
    BadPixelRules, Correction, CountsMap, DriftModel, DriftPoint, DriftStep, FrameConverter,
    FrameStack, StackStats, MAX_DRIFT_POINTS, MAX_NUC_LEVELS,
};
use bandtemp::{Error, Result};
use core::mem::size_of;

/// A read-only view of a frame stack kept by the caller: `len` per-pixel means and sums
/// of squared deviations (as `bt_frame_stack_add_counts` leaves them) after `frames`
/// frames.
#[repr(C)]
#[derive(Clone, Copy, Debug)]
pub struct bt_stack_view {
    /// Per-pixel means; `len` doubles.
    pub mean: *const f64,
    /// Per-pixel sums of squared deviations from the mean; `len` doubles.
    pub m2: *const f64,
    /// Pixels.
    pub len: usize,
    /// Frames accumulated (>= 1).
    pub frames: u32,
}

/// The per-frame affine step x' = a x + b on corrected counts (the drift correction in
/// force); a = 1, b = 0 without one.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_drift_step {
    /// a (> 0).
    pub a: f32,
    /// b, counts.
    pub b: f32,
}

/// Two-point maps' array means and good-pixel count.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_two_point_report {
    /// <S_L>, counts.
    pub mean_low: f64,
    /// <S_H>, counts.
    pub mean_high: f64,
    /// Pixels not flagged bad.
    pub good_pixels: u64,
}

/// Thresholds of the bad-pixel rules (common practice; no standard sets them).
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_bad_pixel_rules {
    /// Robust sigmas beyond which response or offset is bad (e.g. 5).
    pub k_sigma: f64,
    /// Multiple of the median temporal sigma beyond which a pixel is noisy (e.g. 3).
    pub noise_factor: f64,
    /// Fraction of the median response at or below which a pixel is stuck (e.g. 0.2).
    pub stuck_fraction: f64,
}

/// Pixels each rule flagged, and pixels bad in the map afterwards. Flags: 1 stuck,
/// 2 gain, 4 offset, 8 noisy, 128 set by the caller.
#[repr(C)]
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct bt_bad_pixel_report {
    /// Stuck pixels found (flag 1).
    pub stuck: u64,
    /// Gain outliers found (flag 2).
    pub gain: u64,
    /// Offset outliers found (flag 4).
    pub offset: u64,
    /// Noisy pixels found (flag 8).
    pub noisy: u64,
    /// Pixels with a nonzero byte after detection.
    pub bad: u64,
}

/// One drift calibration point (see the Rust `frame::DriftPoint`).
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_drift_point {
    /// Array temperature, K.
    pub fpa_k: f64,
    /// Internal (housing and lens) temperature, K.
    pub internal_k: f64,
    /// Low blackbody temperature, K.
    pub low_k: f64,
    /// High blackbody temperature, K.
    pub high_k: f64,
    /// Array-mean corrected counts at the low blackbody.
    pub low_counts: f64,
    /// Array-mean corrected counts at the high blackbody.
    pub high_counts: f64,
}

/// Responsivity R(T) = sum r_i (T - T_ref)^i and offset O(T) = sum o_i (T - T_ref)^i
/// of the array temperature, degree 0..2.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_drift_model {
    /// T_ref, K.
    pub reference_k: f64,
    /// Degree, 0..2.
    pub degree: u32,
    /// r_0, r_1, r_2 (counts per unit of band radiance, per K^i).
    pub responsivity: [f64; 3],
    /// o_0, o_1, o_2 (counts per K^i).
    pub offset: [f64; 3],
}

/// Spatial statistics of a stack's mean frame (EMVA 1288 Release 4.0).
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_spatial_stats {
    /// Mean of the good pixels' means.
    pub mean: f64,
    /// Mean temporal variance per frame, counts^2.
    pub temporal_variance: f64,
    /// Spatial variance of the averaged frame, counts^2.
    pub spatial_variance_measured: f64,
    /// Spatial variance corrected for the temporal noise left in the average, counts^2.
    pub spatial_variance: f64,
    /// Good pixels used.
    pub pixels: u64,
}

/// Tally of a corrected conversion.
#[repr(C)]
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct bt_corrected_summary {
    /// Every pixel's outcome (an unreplaceable bad pixel counts as dead).
    pub frame: bt_frame_summary,
    /// Bad pixels replaced by the mean of their good neighbours.
    pub bad_replaced: u64,
    /// Bad pixels with no good neighbour (NaN, counted as dead).
    pub bad_unreplaced: u64,
}

impl Output for bt_two_point_report {
    fn finite(self) -> Result<Self> {
        Ok(bt_two_point_report {
            mean_low: self.mean_low.finite()?,
            mean_high: self.mean_high.finite()?,
            ..self
        })
    }
}

impl Output for bt_bad_pixel_report {
    fn finite(self) -> Result<Self> {
        Ok(self)
    }
}

impl Output for bt_corrected_summary {
    fn finite(self) -> Result<Self> {
        Ok(self)
    }
}

impl Output for bt_drift_step {
    fn finite(self) -> Result<Self> {
        if self.a.is_finite() && self.b.is_finite() {
            Ok(self)
        } else {
            Err(Error::NonFinite)
        }
    }
}

impl Output for bt_drift_model {
    fn finite(self) -> Result<Self> {
        let all = [self.reference_k]
            .iter()
            .chain(&self.responsivity)
            .chain(&self.offset)
            .all(|v| v.is_finite());
        if all {
            Ok(self)
        } else {
            Err(Error::NonFinite)
        }
    }
}

impl Output for bt_spatial_stats {
    fn finite(self) -> Result<Self> {
        Ok(bt_spatial_stats {
            mean: self.mean.finite()?,
            temporal_variance: self.temporal_variance.finite()?,
            spatial_variance_measured: self.spatial_variance_measured.finite()?,
            spatial_variance: self.spatial_variance.finite()?,
            ..self
        })
    }
}

/// A byte range [start, end).
type Span = (usize, usize);

/// Byte range of `len` values of `T` at `ptr`, for the overlap checks.
fn span<T>(ptr: *const T, len: usize) -> (usize, usize) {
    let start = ptr as usize;
    (
        start,
        start.saturating_add(len.saturating_mul(size_of::<T>())),
    )
}

/// True if any written range meets any other range (written or read). Empty ranges
/// never meet.
fn any_overlap(written: &[(usize, usize)], read: &[(usize, usize)]) -> bool {
    let meet =
        |a: &(usize, usize), b: &(usize, usize)| a.0 < a.1 && b.0 < b.1 && a.0 < b.1 && b.0 < a.1;
    written.iter().enumerate().any(|(i, w)| {
        read.iter().any(|r| meet(w, r))
            || written
                .iter()
                .enumerate()
                .any(|(j, v)| i != j && meet(w, v))
    })
}

/// Reads a stack view's two arrays.
///
/// # Safety
/// `view` null or valid for reads of a `bt_stack_view` whose arrays are valid for
/// reads of `len` doubles.
unsafe fn read_view<'a>(view: *const bt_stack_view) -> Result<(StackStats<'a>, Span, Span)> {
    // SAFETY: the caller's guarantee; a struct of two pointers, a usize and a u32.
    let v = unsafe { read_input(view) }?;
    // SAFETY: the caller's guarantee on the arrays.
    let mean = unsafe { slice_from_c(v.mean, v.len) }?;
    // SAFETY: as above.
    let m2 = unsafe { slice_from_c(v.m2, v.len) }?;
    let stats = StackStats::new(mean, m2, v.frames)?;
    Ok((stats, span(v.mean, v.len), span(v.m2, v.len)))
}

/// A nullable bad-pixel map: NULL means no pixel is bad (`bad_len` ignored).
///
/// # Safety
/// `bad` null or valid for reads of `bad_len` bytes.
unsafe fn optional_bad<'a>(bad: *const u8, bad_len: usize) -> Result<Option<&'a [u8]>> {
    if bad.is_null() {
        Ok(None)
    } else {
        // SAFETY: the caller's guarantee.
        Ok(Some(unsafe { slice_from_c(bad, bad_len) }?))
    }
}

/// Shared body of the two stack updates.
///
/// # Safety
/// As `bt_frame_stack_add_counts`, with `frame` of element type `T`.
#[allow(clippy::too_many_arguments)]
unsafe fn stack_add<T>(
    mean: *mut f64,
    m2: *mut f64,
    len: usize,
    frames: *mut u32,
    frame: *const T,
    frame_len: usize,
    add: impl FnOnce(&mut FrameStack<'_>, &[T]) -> Result<()>,
) -> bt_status {
    let run = || -> Result<()> {
        check_ptr(frames.cast_const())?;
        // SAFETY: non-null and aligned (checked); valid for reads (caller).
        let count = unsafe { frames.read() };
        let written = [span(mean, len), span(m2, len)];
        if any_overlap(&written, &[span(frame, frame_len), span(frames, 1)]) {
            return Err(Error::InvalidBuffer);
        }
        // SAFETY: the caller's guarantees; the buffers are disjoint (checked).
        let (mean, m2, input) = unsafe {
            (
                slice_from_c_mut(mean, len)?,
                slice_from_c_mut(m2, len)?,
                slice_from_c(frame, frame_len)?,
            )
        };
        let mut stack = FrameStack::resume(mean, m2, count)?;
        add(&mut stack, input)?;
        // SAFETY: checked above.
        unsafe { frames.write(stack.frames()) };
        Ok(())
    };
    match run() {
        Ok(()) => bt_status::Ok,
        Err(e) => e.into(),
    }
}

/// Adds a frame of u16 counts to a stack kept in caller storage: `mean` and `m2` (`len`
/// doubles each) and the frame count `*frames`. With `*frames == 0` the stack starts
/// afresh (the buffers are zeroed first). Welford's update: exact to double rounding at
/// any depth. On success `*frames` is incremented.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER` (misaligned, impossible
/// length, overlapping buffers), `BT_STATUS_NUC_FRAME_EMPTY` (len 0),
/// `BT_STATUS_FRAME_LENGTH_MISMATCH`, `BT_STATUS_NON_FINITE` (a stored value is not
/// finite), `BT_STATUS_MERIT_INPUT_INVALID` (a stored m2 is negative),
/// `BT_STATUS_TOO_MANY_INPUTS` (frame count overflow). On error nothing is written.
///
/// # Safety
/// `mean`, `m2` null or valid for reads and writes of `len` doubles; `frames` null or
/// valid for reads and writes of a uint32_t; `frame` null or valid for reading
/// `frame_len` values.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_stack_add_counts(
    mean: *mut f64,
    m2: *mut f64,
    len: usize,
    frames: *mut u32,
    frame: *const u16,
    frame_len: usize,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `stack_add`.
    unsafe {
        stack_add(mean, m2, len, frames, frame, frame_len, |s, f| {
            s.add_counts(f)
        })
    }
}

/// As `bt_frame_stack_add_counts` for a frame of floats (counts or signal); a NaN or
/// infinite value is `BT_STATUS_NON_FINITE` and leaves the stack unchanged.
///
/// # Safety
/// As `bt_frame_stack_add_counts`.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_stack_add_signal(
    mean: *mut f64,
    m2: *mut f64,
    len: usize,
    frames: *mut u32,
    frame: *const f32,
    frame_len: usize,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `stack_add`.
    unsafe {
        stack_add(mean, m2, len, frames, frame, frame_len, |s, f| {
            s.add_signal(f)
        })
    }
}

/// Two-point NUC maps from averaged low- and high-level flat-field stacks: gain
/// G = (<S_H> - <S_L>) / (S_H - S_L) and offset O = <S_L> - G S_L per pixel (Perry &
/// Dereniak 1993), means over the pixels whose `bad` byte is 0 (`bad` NULL: all pixels);
/// bad pixels get G = 1, O = 0. Corrected counts are x = G n + O.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`,
/// `BT_STATUS_NUC_STACK_EMPTY`, `BT_STATUS_FRAME_LENGTH_MISMATCH`,
/// `BT_STATUS_NUC_NO_GOOD_PIXELS`, `BT_STATUS_NUC_LEVELS_NOT_DISTINCT` (a good pixel
/// does not respond: flag it bad first; also array means that tie after rounding),
/// `BT_STATUS_NON_FINITE`, `BT_STATUS_FRAME_COEFFICIENT_OVERFLOW` (a good pixel's gain
/// or offset does not fit a float as a finite value, or the gain rounds to 0). On error
/// nothing is written.
///
/// # Safety
/// `low`, `high` null or valid views; `bad` null or valid for reading `bad_len` bytes;
/// `gain`, `offset` null or valid for writing `maps_len` floats; `out` null or valid for
/// writing a `bt_two_point_report`.
#[no_mangle]
#[allow(clippy::too_many_arguments)]
pub unsafe extern "C" fn bt_nuc_two_point(
    low: *const bt_stack_view,
    high: *const bt_stack_view,
    bad: *const u8,
    bad_len: usize,
    gain: *mut f32,
    offset: *mut f32,
    maps_len: usize,
    out: *mut bt_two_point_report,
) -> bt_status {
    // SAFETY: the caller's guarantees; written buffers are checked disjoint from all
    // others before slices are formed.
    unsafe {
        deliver(out, || {
            let (lo, l1, l2) = read_view(low)?;
            let (hi, h1, h2) = read_view(high)?;
            let bad = optional_bad(bad, bad_len)?;
            let reads = [
                l1,
                l2,
                h1,
                h2,
                bad.map_or((0, 0), |b| span(b.as_ptr(), b.len())),
                span(out, 1),
            ];
            if any_overlap(&[span(gain, maps_len), span(offset, maps_len)], &reads) {
                return Err(Error::InvalidBuffer);
            }
            let gain = slice_from_c_mut(gain, maps_len)?;
            let offset = slice_from_c_mut(offset, maps_len)?;
            let r = two_point(&lo, &hi, bad, gain, offset)?;
            Ok(bt_two_point_report {
                mean_low: r.mean_low,
                mean_high: r.mean_high,
                good_pixels: r.good_pixels,
            })
        })
    }
}

/// Flags bad pixels from the low- and high-level stacks (each of at least two frames):
/// stuck (response <= stuck_fraction x median, flag 1), gain or offset beyond k_sigma
/// robust sigmas of the median (flags 2 and 4), temporal noise above noise_factor x the
/// median (flag 8). Flags are OR-ed into `bad` (`len` bytes), keeping those already set.
/// `scratch` (`len` floats) is working storage. The rules are common practice, not a
/// standard.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`,
/// `BT_STATUS_NUC_STACK_EMPTY` (fewer than two frames), `BT_STATUS_FRAME_LENGTH_MISMATCH`,
/// `BT_STATUS_BAD_PIXEL_RULES_INVALID`, `BT_STATUS_NON_FINITE`. On error `bad` and `out`
/// are untouched (`scratch` may be overwritten).
///
/// # Safety
/// `low`, `high` null or valid views; `rules` null or valid for reading; `scratch` null
/// or valid for writing `len` floats; `bad` null or valid for reading and writing `len`
/// bytes; `out` null or valid for writing a `bt_bad_pixel_report`.
#[no_mangle]
pub unsafe extern "C" fn bt_bad_pixels_detect(
    low: *const bt_stack_view,
    high: *const bt_stack_view,
    rules: *const bt_bad_pixel_rules,
    scratch: *mut f32,
    bad: *mut u8,
    len: usize,
    out: *mut bt_bad_pixel_report,
) -> bt_status {
    // SAFETY: the caller's guarantees; written buffers checked disjoint first.
    unsafe {
        deliver(out, || {
            let (lo, l1, l2) = read_view(low)?;
            let (hi, h1, h2) = read_view(high)?;
            let r = read_input(rules)?;
            let rules = BadPixelRules {
                k_sigma: r.k_sigma,
                noise_factor: r.noise_factor,
                stuck_fraction: r.stuck_fraction,
            };
            if any_overlap(
                &[span(scratch, len), span(bad, len)],
                &[l1, l2, h1, h2, span(out, 1)],
            ) {
                return Err(Error::InvalidBuffer);
            }
            let scratch = slice_from_c_mut(scratch, len)?;
            let bad = slice_from_c_mut(bad, len)?;
            let r = detect_bad_pixels(&lo, &hi, &rules, scratch, bad)?;
            Ok(bt_bad_pixel_report {
                stuck: r.stuck,
                gain: r.gain,
                offset: r.offset,
                noisy: r.noisy,
                bad: r.bad,
            })
        })
    }
}

/// Reads and checks a drift step.
///
/// # Safety
/// `step` null or valid for reads of a `bt_drift_step`.
unsafe fn read_step(step: *const bt_drift_step) -> Result<DriftStep> {
    // SAFETY: the caller's guarantee; two floats.
    let s = unsafe { read_input(step) }?;
    let step = DriftStep { a: s.a, b: s.b };
    if s.a.is_finite() && s.a > 0.0 && s.b.is_finite() {
        Ok(step)
    } else {
        Err(Error::NucMapInvalid)
    }
}

/// Shutter (flag) offset refresh: with the shutter closed, every good pixel's corrected
/// counts x' = a (G n_sh + O) + b should equal `target_counts`
/// (`bt_nuc_shutter_target_band`), so O = (target - b) / a - G n_sh, the shutter stack's
/// mean n_sh. Gains are kept; bad pixels' offsets are left alone.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`,
/// `BT_STATUS_NUC_STACK_EMPTY`, `BT_STATUS_FRAME_LENGTH_MISMATCH`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_NUC_MAP_INVALID` (a step with a <= 0 or non-finite),
/// `BT_STATUS_FRAME_COEFFICIENT_OVERFLOW` (a good pixel's new offset is not a finite
/// float). On error `offset` is untouched.
///
/// # Safety
/// `shutter` null or a valid view; `gain` null or valid for reading `maps_len` floats;
/// `bad` null or valid for reading `bad_len` bytes; `step` null or valid for reading;
/// `offset` null or valid for reading and writing `maps_len` floats.
#[no_mangle]
#[allow(clippy::too_many_arguments)]
pub unsafe extern "C" fn bt_nuc_shutter_refresh(
    shutter: *const bt_stack_view,
    gain: *const f32,
    bad: *const u8,
    bad_len: usize,
    target_counts: f64,
    step: *const bt_drift_step,
    offset: *mut f32,
    maps_len: usize,
) -> bt_status {
    let run = || -> Result<()> {
        // SAFETY: the caller's guarantees; `offset` checked disjoint from every input.
        unsafe {
            let (sh, s1, s2) = read_view(shutter)?;
            let step = read_step(step)?;
            let bad = optional_bad(bad, bad_len)?;
            let reads = [
                s1,
                s2,
                span(gain, maps_len),
                bad.map_or((0, 0), |b| span(b.as_ptr(), b.len())),
            ];
            if any_overlap(&[span(offset, maps_len)], &reads) {
                return Err(Error::InvalidBuffer);
            }
            let gain = slice_from_c(gain, maps_len)?;
            let offset = slice_from_c_mut(offset, maps_len)?;
            shutter_refresh(&sh, gain, bad, target_counts, step, offset)
        }
    };
    match run() {
        Ok(()) => bt_status::Ok,
        Err(e) => e.into(),
    }
}

/// Corrected counts x' that a blackbody at `shutter_k` produces for a band converter
/// with counts map S = counts_gain x' + counts_offset: (L(shutter_k) - counts_offset) /
/// counts_gain, L the exact band radiance.
///
/// Errors: those of `bt_band_radiance`, `BT_STATUS_FRAME_COUNTS_MAP_INVALID`.
///
/// # Safety
/// `band` null or valid for reading a `bt_band`; `out` null or valid for writing.
#[no_mangle]
pub unsafe extern "C" fn bt_nuc_shutter_target_band(
    band: *const bt_band,
    counts_gain: f64,
    counts_offset: f64,
    shutter_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees.
    unsafe {
        deliver(out, || {
            let band = band_from_c(band)?;
            let counts = CountsMap::linear(counts_gain, counts_offset)?;
            shutter_target_counts(&band, counts, shutter_k)
        })
    }
}

/// Fits the array-temperature drift model (responsivity and offset polynomials of
/// `degree` 0..2 in T_fpa, with the internal temperature's self-emission through the
/// exact band radiance) from `n` points (degree + 1 to 64).
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`, those of `bt_band`,
/// `BT_STATUS_DRIFT_TOO_FEW_POINTS`, `BT_STATUS_DRIFT_POINT_INVALID`,
/// `BT_STATUS_DRIFT_ILL_CONDITIONED`. On error `out` is untouched.
///
/// # Safety
/// `band` null or valid; `points` null or valid for reading `n` points; `out` null or
/// valid for writing a `bt_drift_model`.
#[no_mangle]
pub unsafe extern "C" fn bt_drift_fit_band(
    band: *const bt_band,
    points: *const bt_drift_point,
    n: usize,
    degree: u32,
    out: *mut bt_drift_model,
) -> bt_status {
    // SAFETY: the caller's guarantees.
    unsafe { deliver(out, || fit_drift(&band_from_c(band)?, points, n, degree)) }
}

/// Shared body of the drift fits.
///
/// # Safety
/// `points` null or valid for reading `n` points.
unsafe fn fit_drift<C: SignalCurve + ?Sized>(
    curve: &C,
    points: *const bt_drift_point,
    n: usize,
    degree: u32,
) -> Result<bt_drift_model> {
    // SAFETY: the caller's guarantee on `points`.
    let pts = unsafe { slice_from_c(points, n) }?;
    if pts.len() > MAX_DRIFT_POINTS {
        return Err(Error::DriftTooFewPoints);
    }
    let mut copy = [DriftPoint {
        fpa_k: 0.0,
        internal_k: 0.0,
        low_k: 0.0,
        high_k: 0.0,
        low_counts: 0.0,
        high_counts: 0.0,
    }; MAX_DRIFT_POINTS];
    for (c, p) in copy.iter_mut().zip(pts) {
        *c = DriftPoint {
            fpa_k: p.fpa_k,
            internal_k: p.internal_k,
            low_k: p.low_k,
            high_k: p.high_k,
            low_counts: p.low_counts,
            high_counts: p.high_counts,
        };
    }
    let used = copy.get(..pts.len()).ok_or(Error::DriftTooFewPoints)?;
    let m = DriftModel::fit(curve, used, degree)?;
    Ok(bt_drift_model {
        reference_k: m.reference_k,
        degree: m.degree,
        responsivity: m.responsivity,
        offset: m.offset,
    })
}

/// Reads a drift model.
///
/// # Safety
/// `model` null or valid for reads.
unsafe fn read_model(model: *const bt_drift_model) -> Result<DriftModel> {
    // SAFETY: the caller's guarantee; doubles and a u32.
    let m = unsafe { read_input(model) }?;
    if m.degree > 2 {
        return Err(Error::DriftTooFewPoints);
    }
    Ok(DriftModel {
        reference_k: m.reference_k,
        degree: m.degree,
        responsivity: m.responsivity,
        offset: m.offset,
    })
}

/// The drift step x' = a x + b at array temperature `fpa_k` and internal temperature
/// `internal_k` for a band converter with counts map S = counts_gain x' + counts_offset:
/// a = 1 / (g R), b = -(D / R + o) / g with D = O(T_fpa) - R(T_fpa) L(T_int).
///
/// Errors: those of `bt_band`, `BT_STATUS_FRAME_COUNTS_MAP_INVALID`,
/// `BT_STATUS_NON_FINITE`, `BT_STATUS_TEMPERATURE_NOT_POSITIVE`,
/// `BT_STATUS_DRIFT_POINT_INVALID` (responsivity not positive there),
/// `BT_STATUS_DRIFT_TOO_FEW_POINTS` (degree > 2), `BT_STATUS_FRAME_COEFFICIENT_OVERFLOW`.
///
/// # Safety
/// `model`, `band` null or valid for reading; `out` null or valid for writing.
#[no_mangle]
pub unsafe extern "C" fn bt_drift_step_band(
    model: *const bt_drift_model,
    band: *const bt_band,
    counts_gain: f64,
    counts_offset: f64,
    fpa_k: f64,
    internal_k: f64,
    out: *mut bt_drift_step,
) -> bt_status {
    // SAFETY: the caller's guarantees.
    unsafe {
        deliver(out, || {
            let m = read_model(model)?;
            let band = band_from_c(band)?;
            let counts = CountsMap::linear(counts_gain, counts_offset)?;
            let s = m.step(&band, counts, fpa_k, internal_k)?;
            Ok(bt_drift_step { a: s.a, b: s.b })
        })
    }
}

/// The non-uniformity maps of a fused conversion as C hands them over.
#[derive(Clone, Copy)]
enum Maps {
    /// Two-point gain and offset, `len` floats each.
    TwoPoint(*const f32, *const f32),
    /// Multi-point maps: (pointer, floats, levels).
    MultiPoint(*const f32, usize, usize),
}

/// Shared body of the fused conversions: reads and checks everything, then converts.
///
/// # Safety
/// As `bt_frame_convert_counts_corrected`, with the maps valid for reading as `maps`
/// says and `emissivity` null or valid for reading `len` floats.
#[allow(clippy::too_many_arguments)]
unsafe fn fused_from_c(
    converter: *const bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    maps: Maps,
    bad: *const u8,
    width: usize,
    step: *const bt_drift_step,
    counts: *const u16,
    emissivity: Option<*const f32>,
    kelvin: *mut f32,
    len: usize,
    summary: *mut bt_corrected_summary,
) -> bt_status {
    // SAFETY: the caller's guarantees; `kelvin` checked disjoint from every input.
    unsafe {
        deliver(summary, || {
            let frame = FrameConverter::from_parts(
                read_state(converter)?,
                rows_from_c(table, table_rows)?,
            )?;
            // Checked by `with_step` below, after the maps (the Rust API's order).
            let step = if step.is_null() {
                DriftStep::IDENTITY
            } else {
                let s = read_input(step)?;
                DriftStep { a: s.a, b: s.b }
            };
            let b = slice_from_c(bad, len)?;
            let n = slice_from_c(counts, len)?;
            let e = match emissivity {
                Some(e) => Some(slice_from_c(e, len)?),
                None => None,
            };
            let (first, second) = match maps {
                Maps::TwoPoint(g, o) => (slice_from_c(g, len)?, slice_from_c(o, len)?),
                Maps::MultiPoint(m, m_len, _) => (slice_from_c(m, m_len)?, &[][..]),
            };
            if overlaps(kelvin, len, first.as_ptr(), first.len())
                || overlaps(kelvin, len, second.as_ptr(), second.len())
                || overlaps(kelvin, len, b.as_ptr(), len)
                || overlaps(kelvin, len, n.as_ptr(), len)
                || e.is_some_and(|e| overlaps(kelvin, len, e.as_ptr(), len))
                || overlaps(kelvin, len, table, table_rows)
                || overlaps(kelvin, len, converter, 1)
                || overlaps(kelvin, len, summary, 1)
            {
                return Err(Error::InvalidBuffer);
            }
            let correction = match maps {
                Maps::TwoPoint(..) => Correction::new(first, second, b, width)?,
                Maps::MultiPoint(_, _, levels) => Correction::multi_point(first, levels, b, width)?,
            }
            .with_step(step)?;
            let out = slice_from_c_mut(kelvin, len)?;
            let s = match e {
                None => frame.convert_counts_corrected(&correction, n, out)?,
                Some(e) => frame.convert_counts_corrected_emissivity(&correction, n, e, out)?,
            };
            Ok(bt_corrected_summary {
                frame: s.frame.into(),
                bad_replaced: s.bad_replaced,
                bad_unreplaced: s.bad_unreplaced,
            })
        })
    }
}

/// Converts a raw frame of counts to object temperature in K in one pass: two-point maps
/// (`gain`, `offset`), the drift step (`step`; NULL: none), bad-pixel replacement by the
/// mean of the good 8-neighbours (`bad`, nonzero = bad), then the converter's scene and
/// table, as `bt_frame_convert_counts` for a uniform scene. Rails apply to the raw
/// counts. The maps are checked on every call (gain finite and positive, offset finite at
/// good pixels).
///
/// Errors: those of `bt_frame_convert_counts`, `BT_STATUS_NUC_GEOMETRY_INVALID` (width 0
/// or not dividing the length), `BT_STATUS_NUC_MAP_INVALID`. On error neither `kelvin`
/// nor `summary` is written.
///
/// # Safety
/// As `bt_frame_convert_counts`; `gain`, `offset` null or valid for reading `len` floats,
/// `bad` for reading `len` bytes, `counts` `len` values, `kelvin` for writing `len`
/// floats; `step` null or valid for reading.
#[no_mangle]
#[allow(clippy::too_many_arguments)]
pub unsafe extern "C" fn bt_frame_convert_counts_corrected(
    converter: *const bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    gain: *const f32,
    offset: *const f32,
    bad: *const u8,
    width: usize,
    step: *const bt_drift_step,
    counts: *const u16,
    kelvin: *mut f32,
    len: usize,
    summary: *mut bt_corrected_summary,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `fused_from_c`.
    unsafe {
        fused_from_c(
            converter,
            table,
            table_rows,
            Maps::TwoPoint(gain, offset),
            bad,
            width,
            step,
            counts,
            None,
            kelvin,
            len,
            summary,
        )
    }
}

/// Spatial statistics of a stack's mean frame (EMVA 1288 Release 4.0): mean, temporal
/// variance, measured spatial variance and the spatial variance corrected for the
/// temporal noise left in the average (s^2 = s_meas^2 - sigma^2 / L), over the pixels
/// whose `bad` byte is 0 (`bad` NULL: all). With `gain` and `offset` both non-NULL the
/// statistics are of the corrected frame G y + O (the residual non-uniformity after
/// NUC); both NULL: of the raw frame. DSNU = sqrt(spatial_variance) of a dark stack;
/// PRNU = sqrt(s_50^2 - s_dark^2) / (mu_50 - mu_dark).
///
/// Errors: `BT_STATUS_NULL_POINTER` (one map given without the other),
/// `BT_STATUS_INVALID_BUFFER`, `BT_STATUS_NUC_STACK_EMPTY` (fewer than two frames),
/// `BT_STATUS_FRAME_LENGTH_MISMATCH`, `BT_STATUS_MERIT_INPUT_INVALID` (fewer than two
/// good pixels, or a negative stored m2 at a good pixel), `BT_STATUS_NON_FINITE`.
///
/// # Safety
/// `stack` null or a valid view; `bad` null or valid for reading `len` bytes; `gain`,
/// `offset` null or valid for reading `len` floats; `out` null or valid for writing.
#[no_mangle]
pub unsafe extern "C" fn bt_frame_spatial_stats(
    stack: *const bt_stack_view,
    bad: *const u8,
    gain: *const f32,
    offset: *const f32,
    len: usize,
    out: *mut bt_spatial_stats,
) -> bt_status {
    // SAFETY: the caller's guarantees.
    unsafe {
        deliver(out, || {
            let (st, _, _) = read_view(stack)?;
            let bad = optional_bad(bad, len)?;
            let maps = match (gain.is_null(), offset.is_null()) {
                (true, true) => None,
                (false, false) => Some((slice_from_c(gain, len)?, slice_from_c(offset, len)?)),
                _ => return Err(Error::NullPointer),
            };
            let s = spatial_stats(&st, bad, maps)?;
            Ok(bt_spatial_stats {
                mean: s.mean,
                temporal_variance: s.temporal_variance,
                spatial_variance_measured: s.spatial_variance_measured,
                spatial_variance: s.spatial_variance,
                pixels: s.pixels,
            })
        })
    }
}

/// Temporal NETD, K: sqrt(temporal_variance) / responsivity_counts_per_k.
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_MERIT_INPUT_INVALID` (negative variance,
/// responsivity not finite and positive).
///
/// # Safety
/// `out` null or valid for writing a double.
#[no_mangle]
pub unsafe extern "C" fn bt_netd_k(
    temporal_variance: f64,
    responsivity_counts_per_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee.
    unsafe { deliver(out, || netd_k(temporal_variance, responsivity_counts_per_k)) }
}

/// Net signal of a detector exchanging radiation with a grey object and its own housing:
/// e L(T_o) + (1 - e) L(T_r) - L(T_int), W m^-2 sr^-1 (exact band radiance; zero when
/// all three temperatures are equal).
///
/// Errors: those of `bt_band_radiance`, `BT_STATUS_EMISSIVITY_OUT_OF_RANGE`.
///
/// # Safety
/// `band` null or valid; `out` null or valid for writing.
#[no_mangle]
pub unsafe extern "C" fn bt_net_signal_band(
    band: *const bt_band,
    emissivity: f64,
    object_k: f64,
    reflected_k: f64,
    internal_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees.
    unsafe {
        deliver(out, || {
            net_signal(
                &band_from_c(band)?,
                emissivity,
                object_k,
                reflected_k,
                internal_k,
            )
        })
    }
}

/// Inverse of `bt_net_signal_band`: the object temperature, K.
///
/// Errors: those of `bt_net_signal_band` and `bt_band_temperature`.
///
/// # Safety
/// As `bt_net_signal_band`.
#[no_mangle]
pub unsafe extern "C" fn bt_object_from_net_signal_band(
    band: *const bt_band,
    net: f64,
    emissivity: f64,
    reflected_k: f64,
    internal_k: f64,
    object_k: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees.
    unsafe {
        deliver(object_k, || {
            object_from_net_signal(
                &band_from_c(band)?,
                net,
                emissivity,
                reflected_k,
                internal_k,
            )
        })
    }
}

/// Effective exponent d ln L / d ln T = T L'(T) / L(T) of the band radiance at
/// `temperature_k` (about 4.58 for 8-14 um at 300 K; 4 for the total radiance).
///
/// Errors: those of `bt_band_radiance`.
///
/// # Safety
/// `band` null or valid; `out` null or valid for writing.
#[no_mangle]
pub unsafe extern "C" fn bt_effective_exponent_band(
    band: *const bt_band,
    temperature_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees.
    unsafe {
        deliver(out, || {
            effective_exponent(&band_from_c(band)?, temperature_k)
        })
    }
}

/// As `bt_nuc_shutter_target_band` for a Sakuma-Hattori curve (signal in counts above
/// dark): (S(shutter_k) - counts_offset) / counts_gain.
///
/// Errors: those of `bt_sakuma_hattori_signal`, `BT_STATUS_FRAME_COUNTS_MAP_INVALID`.
///
/// # Safety
/// `curve` null or valid for reading; `out` null or valid for writing.
#[no_mangle]
pub unsafe extern "C" fn bt_nuc_shutter_target_sakuma_hattori(
    curve: *const bt_sakuma_hattori,
    counts_gain: f64,
    counts_offset: f64,
    shutter_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees.
    unsafe {
        deliver(out, || {
            let curve = read_curve(curve)?;
            let counts = CountsMap::linear(counts_gain, counts_offset)?;
            shutter_target_counts(&curve, counts, shutter_k)
        })
    }
}

/// As `bt_drift_fit_band` with the signal of a Sakuma-Hattori curve in place of the band
/// radiance (R in counts per count of curve signal).
///
/// Errors: as `bt_drift_fit_band`, with those of `bt_sakuma_hattori_signal`.
///
/// # Safety
/// `curve` null or valid for reading; `points` null or valid for reading `n` points;
/// `out` null or valid for writing.
#[no_mangle]
pub unsafe extern "C" fn bt_drift_fit_sakuma_hattori(
    curve: *const bt_sakuma_hattori,
    points: *const bt_drift_point,
    n: usize,
    degree: u32,
    out: *mut bt_drift_model,
) -> bt_status {
    // SAFETY: the caller's guarantees.
    unsafe { deliver(out, || fit_drift(&read_curve(curve)?, points, n, degree)) }
}

/// As `bt_drift_step_band` for a Sakuma-Hattori converter.
///
/// Errors: as `bt_drift_step_band`, with those of `bt_sakuma_hattori_signal`.
///
/// # Safety
/// `model`, `curve` null or valid for reading; `out` null or valid for writing.
#[no_mangle]
pub unsafe extern "C" fn bt_drift_step_sakuma_hattori(
    model: *const bt_drift_model,
    curve: *const bt_sakuma_hattori,
    counts_gain: f64,
    counts_offset: f64,
    fpa_k: f64,
    internal_k: f64,
    out: *mut bt_drift_step,
) -> bt_status {
    // SAFETY: the caller's guarantees.
    unsafe {
        deliver(out, || {
            let m = read_model(model)?;
            let curve = read_curve(curve)?;
            let counts = CountsMap::linear(counts_gain, counts_offset)?;
            let s = m.step(&curve, counts, fpa_k, internal_k)?;
            Ok(bt_drift_step { a: s.a, b: s.b })
        })
    }
}

/// The most flat-field levels `bt_nuc_multi_point` accepts.
pub const BT_NUC_MAX_LEVELS: usize = 16;
const _: () = assert!(BT_NUC_MAX_LEVELS == MAX_NUC_LEVELS);

/// One pixel of statistics: the placeholder that fills the unused levels of the
/// fixed-size array of stacks `bt_nuc_multi_point` builds (no heap).
const PLACEHOLDER: [f64; 1] = [0.0];

/// What `bt_nuc_multi_point` found.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_multi_point_report {
    /// Levels used, N.
    pub levels: u32,
    /// Pixels that received maps (not flagged bad).
    pub good_pixels: u64,
    /// Pixels flagged 16 (levels not strictly increasing) by this call.
    pub order_flagged: u64,
    /// <S_k>, the array means of the levels over the good pixels (counts); entries
    /// past `levels` are 0.
    pub level_means: [f64; 16],
}

impl Output for bt_multi_point_report {
    fn finite(self) -> Result<Self> {
        if self.level_means.iter().all(|m| m.is_finite()) {
            Ok(self)
        } else {
            Err(Error::NonFinite)
        }
    }
}

/// Floats of multi-point map storage for `levels` flat-field levels over `pixels`
/// pixels: (3 N - 4) x pixels (N - 1 gain planes, N - 1 offset planes, N - 2 breakpoint
/// planes, one float per pixel each).
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`,
/// `BT_STATUS_NUC_LEVEL_COUNT` (levels outside 2..16), `BT_STATUS_NUC_FRAME_EMPTY` (no
/// pixels), `BT_STATUS_NUC_MAP_STORAGE_MISMATCH` (the size overflows). On error `out`
/// is untouched.
///
/// # Safety
/// `out` null or valid for writing a size_t.
#[no_mangle]
pub unsafe extern "C" fn bt_nuc_multi_point_map_len(
    levels: usize,
    pixels: usize,
    out: *mut usize,
) -> bt_status {
    // SAFETY: the caller's guarantee.
    unsafe { deliver(out, || multi_point_map_len(levels, pixels)) }
}

/// Multi-point (piecewise-linear) NUC maps from `n_levels` averaged flat-field stacks
/// (`levels`, in order of increasing radiance, 2 to 16): per pixel and segment k,
/// G_k = (<S_k+1> - <S_k>) / (S_k+1 - S_k) and O_k = <S_k> - G_k S_k, with the pixel's
/// interior levels as breakpoints; written into `maps` (`bt_nuc_multi_point_map_len`
/// floats). `bad` (`bad_len` bytes, nonzero = bad) is read and updated: a pixel not yet
/// flagged whose levels do not increase strictly gets flag 16 and is counted in
/// `order_flagged` (it is replaced by its neighbours in the conversion). With two levels
/// the maps are `bt_nuc_two_point`'s gain followed by its offset, bit for bit.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER` (misaligned, impossible
/// length, overlapping buffers), `BT_STATUS_NUC_LEVEL_COUNT`, `BT_STATUS_NUC_STACK_EMPTY`,
/// `BT_STATUS_NUC_FRAME_EMPTY`, `BT_STATUS_FRAME_LENGTH_MISMATCH`,
/// `BT_STATUS_NUC_MAP_STORAGE_MISMATCH`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_NUC_LEVELS_NOT_INCREASING` (at least half of the pixels not already flagged
/// have levels that do not increase: levels out of order or two at one radiance),
/// `BT_STATUS_NUC_NO_GOOD_PIXELS` (every pixel flagged beforehand),
/// `BT_STATUS_FRAME_COEFFICIENT_OVERFLOW` (a good pixel's map does not fit a float, or a
/// gain rounds to 0). On error nothing is written.
///
/// # Safety
/// `levels` null or valid for reading `n_levels` views, each valid; `bad` null or valid
/// for reads and writes of `bad_len` bytes; `maps` null or valid for writing `maps_len`
/// floats; `out` null or valid for writing a `bt_multi_point_report`.
#[no_mangle]
pub unsafe extern "C" fn bt_nuc_multi_point(
    levels: *const bt_stack_view,
    n_levels: usize,
    bad: *mut u8,
    bad_len: usize,
    maps: *mut f32,
    maps_len: usize,
    out: *mut bt_multi_point_report,
) -> bt_status {
    // SAFETY: the caller's guarantees; written buffers are checked disjoint from all
    // others before slices are formed.
    unsafe {
        deliver(out, || {
            if !(2..=MAX_NUC_LEVELS).contains(&n_levels) {
                return Err(Error::NucLevelCount);
            }
            let views = slice_from_c(levels, n_levels)?;
            let placeholder = StackStats::new(&PLACEHOLDER, &PLACEHOLDER, 1)?;
            let mut stats = [placeholder; MAX_NUC_LEVELS];
            let mut reads = [(0usize, 0usize); 2 * MAX_NUC_LEVELS + 2];
            for (k, view) in views.iter().enumerate() {
                let (st, a, b) = read_view(view)?;
                if let Some(s) = stats.get_mut(k) {
                    *s = st;
                }
                if let Some(r) = reads.get_mut(2 * k) {
                    *r = a;
                }
                if let Some(r) = reads.get_mut(2 * k + 1) {
                    *r = b;
                }
            }
            if let Some(r) = reads.get_mut(2 * MAX_NUC_LEVELS) {
                *r = span(levels, n_levels);
            }
            if let Some(r) = reads.get_mut(2 * MAX_NUC_LEVELS + 1) {
                *r = span(out, 1);
            }
            if any_overlap(&[span(bad, bad_len), span(maps, maps_len)], &reads) {
                return Err(Error::InvalidBuffer);
            }
            let bad = slice_from_c_mut(bad, bad_len)?;
            let maps = slice_from_c_mut(maps, maps_len)?;
            let used = stats.get(..n_levels).ok_or(Error::NucLevelCount)?;
            let r = multi_point(used, bad, maps)?;
            Ok(bt_multi_point_report {
                levels: u32::try_from(r.levels).map_err(|_| Error::NucLevelCount)?,
                good_pixels: r.good_pixels,
                order_flagged: r.order_flagged,
                level_means: r.level_means,
            })
        })
    }
}

/// Converts a raw frame of counts to object temperature in K in one pass through
/// multi-point maps (`maps`, `maps_len` floats as `bt_nuc_multi_point` writes them for
/// `levels` levels): per pixel the segment of its raw counts (extrapolated with the end
/// segments outside the calibrated span), then as `bt_frame_convert_counts_corrected`
/// (drift step, bad-pixel replacement, scene, table). With two levels, the two-point
/// conversion bit for bit. The maps are checked on every call (gains finite and positive,
/// offsets finite, breakpoints finite and non-decreasing at good pixels).
///
/// Errors: those of `bt_frame_convert_counts_corrected`, `BT_STATUS_NUC_LEVEL_COUNT`,
/// `BT_STATUS_NUC_FRAME_EMPTY` (len 0), `BT_STATUS_NUC_MAP_STORAGE_MISMATCH`. On error
/// neither `kelvin` nor `summary` is written.
///
/// # Safety
/// As `bt_frame_convert_counts_corrected`; `maps` null or valid for reading `maps_len`
/// floats.
#[no_mangle]
#[allow(clippy::too_many_arguments)]
pub unsafe extern "C" fn bt_frame_convert_counts_multi_point(
    converter: *const bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    maps: *const f32,
    maps_len: usize,
    levels: usize,
    bad: *const u8,
    width: usize,
    step: *const bt_drift_step,
    counts: *const u16,
    kelvin: *mut f32,
    len: usize,
    summary: *mut bt_corrected_summary,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `fused_from_c`.
    unsafe {
        fused_from_c(
            converter,
            table,
            table_rows,
            Maps::MultiPoint(maps, maps_len, levels),
            bad,
            width,
            step,
            counts,
            None,
            kelvin,
            len,
            summary,
        )
    }
}

/// As `bt_frame_convert_counts_corrected` with a per-pixel emissivity map (`emissivity`,
/// `len` floats), applied in the same pass: each pixel's corrected counts (after the
/// drift step) go through the emissivity-map form of `bt_frame_convert_counts`,
/// L = (x - K) / (tw ta e) + Lr. A replaced bad pixel takes its neighbours' corrected
/// counts and its own emissivity; an emissivity outside (0, 1] gives NaN, counted as
/// `emissivity_invalid`. With the identity step, the same as correcting first and
/// converting with `bt_frame_convert_counts` and the same map.
///
/// Errors: those of `bt_frame_convert_counts_corrected`,
/// `BT_STATUS_FRAME_EMISSIVITY_MAP_UNAVAILABLE` (the curve had no signal at the reflected
/// temperature). On error neither `kelvin` nor `summary` is written.
///
/// # Safety
/// As `bt_frame_convert_counts_corrected`; `emissivity` null or valid for reading `len`
/// floats.
#[no_mangle]
#[allow(clippy::too_many_arguments)]
pub unsafe extern "C" fn bt_frame_convert_counts_corrected_emissivity(
    converter: *const bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    gain: *const f32,
    offset: *const f32,
    bad: *const u8,
    width: usize,
    step: *const bt_drift_step,
    counts: *const u16,
    emissivity: *const f32,
    kelvin: *mut f32,
    len: usize,
    summary: *mut bt_corrected_summary,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `fused_from_c`.
    unsafe {
        fused_from_c(
            converter,
            table,
            table_rows,
            Maps::TwoPoint(gain, offset),
            bad,
            width,
            step,
            counts,
            Some(emissivity),
            kelvin,
            len,
            summary,
        )
    }
}

/// As `bt_frame_convert_counts_multi_point` with a per-pixel emissivity map, applied in
/// the same pass as `bt_frame_convert_counts_corrected_emissivity` describes.
///
/// Errors: those of `bt_frame_convert_counts_multi_point`,
/// `BT_STATUS_FRAME_EMISSIVITY_MAP_UNAVAILABLE`. On error neither `kelvin` nor `summary`
/// is written.
///
/// # Safety
/// As `bt_frame_convert_counts_multi_point`; `emissivity` null or valid for reading `len`
/// floats.
#[no_mangle]
#[allow(clippy::too_many_arguments)]
pub unsafe extern "C" fn bt_frame_convert_counts_multi_point_emissivity(
    converter: *const bt_frame_converter,
    table: *const bt_frame_row,
    table_rows: usize,
    maps: *const f32,
    maps_len: usize,
    levels: usize,
    bad: *const u8,
    width: usize,
    step: *const bt_drift_step,
    counts: *const u16,
    emissivity: *const f32,
    kelvin: *mut f32,
    len: usize,
    summary: *mut bt_corrected_summary,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `fused_from_c`.
    unsafe {
        fused_from_c(
            converter,
            table,
            table_rows,
            Maps::MultiPoint(maps, maps_len, levels),
            bad,
            width,
            step,
            counts,
            Some(emissivity),
            kelvin,
            len,
            summary,
        )
    }
}
