//! Non-uniformity correction (NUC): averaging of calibration frames, two-point gain and
//! offset maps, the shutter (flag) offset refresh, and the fused conversion of raw counts
//! through the maps (two-point, or multi-point from [`crate::frame::multi_point`]),
//! bad-pixel replacement and drift step straight to kelvin, with or without a per-pixel
//! emissivity map.
//!
//! # Two-point correction (Perry & Dereniak 1993, Opt. Eng. 32, 1854)
//!
//! With S_L,ij and S_H,ij the time-averaged signals of pixel (i, j) viewing a uniform
//! blackbody (flat field) at a low and a high radiance, and <S_L>, <S_H> their means over
//! the good pixels:
//!
//! ```text
//! G_ij = (<S_H> - <S_L>) / (S_H,ij - S_L,ij)       (dimensionless)
//! O_ij = <S_L> - G_ij S_L,ij                        (counts)
//! x_ij = G_ij n_ij + O_ij                           (corrected counts)
//! ```
//!
//! Every pixel then answers both calibration levels with the array mean. A pixel that is
//! linear in radiance (S = a + b L) is corrected exactly at every radiance; one with a
//! quadratic term (S = a + b L + c L^2) keeps the residual G c (L - L_L)(L - L_H):
//! zero at both calibration radiances, -G c (L_H - L_L)^2 / 4 at the midpoint. Budzier &
//! Gerlach 2015 (J. Sens. Sens. Syst. 4, 187) chain this step, an array-temperature
//! correction, the shutter correction and the radiometric calibration, as this module
//! does with [`crate::frame::DriftModel`] and [`shutter_refresh`].
//!
//! # Storage
//!
//! Everything lives in the caller's storage: the averaging accumulators ([`FrameStack`],
//! two f64 per pixel), the maps (two f32 per pixel) and the bad-pixel map (one byte per
//! pixel, [`crate::frame::bad_pixels`]). Nothing allocates.

use super::bad_pixels::replacement_mean;
use super::kernel::run;
use super::lookup::Lookup;
use super::summary::{FrameSummary, PixelStatus};
use super::{FrameConverter, LANES};
use crate::band::SignalCurve;
use crate::error::{Error, Result};

/// Per-pixel running mean and sum of squared deviations of a stack of frames (Welford's
/// algorithm, exact to f64 rounding at any stack depth), in caller storage.
///
/// The temporal variance of pixel p is `m2[p] / (frames - 1)` (unbiased); the variance
/// of its mean is that over `frames`.
#[derive(Debug)]
pub struct FrameStack<'a> {
    mean: &'a mut [f64],
    m2: &'a mut [f64],
    frames: u32,
}

impl<'a> FrameStack<'a> {
    /// An empty stack over `mean` and `m2` (one f64 each per pixel), which it zeroes.
    ///
    /// # Errors
    /// [`Error::NucFrameEmpty`] for empty buffers, [`Error::FrameLengthMismatch`] if they
    /// differ in length.
    pub fn new(mean: &'a mut [f64], m2: &'a mut [f64]) -> Result<Self> {
        check_pair(mean.len(), m2.len())?;
        mean.fill(0.0);
        m2.fill(0.0);
        Ok(FrameStack {
            mean,
            m2,
            frames: 0,
        })
    }

    /// Resumes a stack kept by the caller (the C ABI's way): `frames` frames already
    /// accumulated into `mean` and `m2`. With `frames == 0` the buffers are zeroed.
    ///
    /// # Errors
    /// As [`FrameStack::new`]; [`Error::NonFinite`] if a stored value is not finite,
    /// [`Error::MeritInputInvalid`] if a stored `m2` is negative.
    pub fn resume(mean: &'a mut [f64], m2: &'a mut [f64], frames: u32) -> Result<Self> {
        if frames == 0 {
            return FrameStack::new(mean, m2);
        }
        check_pair(mean.len(), m2.len())?;
        if !mean.iter().chain(m2.iter()).all(|v| v.is_finite()) {
            return Err(Error::NonFinite);
        }
        if m2.iter().any(|&v| v < 0.0) {
            return Err(Error::MeritInputInvalid);
        }
        Ok(FrameStack { mean, m2, frames })
    }

    /// Adds a frame of u16 counts.
    ///
    /// # Errors
    /// [`Error::FrameLengthMismatch`] unless the frame has the stack's length;
    /// [`Error::TooManyInputs`] after `u32::MAX` frames. On error the stack is unchanged.
    pub fn add_counts(&mut self, frame: &[u16]) -> Result<()> {
        self.add(frame.len(), frame.iter().map(|&n| f64::from(n)))
    }

    /// Adds a frame of f32 signal (counts or radiance).
    ///
    /// # Errors
    /// As [`FrameStack::add_counts`], and [`Error::NonFinite`] if any value is NaN or
    /// infinite (the stack is then unchanged).
    pub fn add_signal(&mut self, frame: &[f32]) -> Result<()> {
        if !frame.iter().all(|v| v.is_finite()) {
            return Err(Error::NonFinite);
        }
        self.add(frame.len(), frame.iter().map(|&s| f64::from(s)))
    }

    fn add<I: Iterator<Item = f64>>(&mut self, len: usize, values: I) -> Result<()> {
        if len != self.mean.len() {
            return Err(Error::FrameLengthMismatch);
        }
        let frames = self.frames.checked_add(1).ok_or(Error::TooManyInputs)?;
        let weight = 1.0 / f64::from(frames);
        for ((mean, m2), x) in self.mean.iter_mut().zip(self.m2.iter_mut()).zip(values) {
            let delta = x - *mean;
            *mean += delta * weight;
            *m2 += delta * (x - *mean);
        }
        self.frames = frames;
        Ok(())
    }

    /// Frames accumulated.
    #[must_use]
    pub fn frames(&self) -> u32 {
        self.frames
    }

    /// The per-pixel means (counts or signal).
    #[must_use]
    pub fn mean(&self) -> &[f64] {
        self.mean
    }

    /// The per-pixel sums of squared deviations from the mean.
    #[must_use]
    pub fn m2(&self) -> &[f64] {
        self.m2
    }

    /// The stack's statistics, read-only.
    ///
    /// # Errors
    /// [`Error::NucStackEmpty`] for a stack without frames.
    pub fn stats(&self) -> Result<StackStats<'_>> {
        StackStats::new(self.mean, self.m2, self.frames)
    }
}

/// Read-only statistics of a stack: per-pixel means, sums of squared deviations, and the
/// number of frames.
#[derive(Clone, Copy, Debug)]
pub struct StackStats<'a> {
    pub(super) mean: &'a [f64],
    pub(super) m2: &'a [f64],
    pub(super) frames: u32,
}

impl<'a> StackStats<'a> {
    /// Wraps stored statistics of `frames` >= 1 frames.
    ///
    /// # Errors
    /// [`Error::NucStackEmpty`] for `frames == 0`, [`Error::NucFrameEmpty`],
    /// [`Error::FrameLengthMismatch`].
    pub fn new(mean: &'a [f64], m2: &'a [f64], frames: u32) -> Result<Self> {
        check_pair(mean.len(), m2.len())?;
        if frames == 0 {
            return Err(Error::NucStackEmpty);
        }
        Ok(StackStats { mean, m2, frames })
    }

    /// Unbiased temporal variance of pixel `pixel`, counts^2 (None out of bounds or with
    /// one frame).
    #[must_use]
    pub fn variance(&self, pixel: usize) -> Option<f64> {
        if self.frames < 2 {
            return None;
        }
        self.m2.get(pixel).map(|m2| m2 / f64::from(self.frames - 1))
    }

    /// Pixels.
    #[must_use]
    pub fn len(&self) -> usize {
        self.mean.len()
    }

    /// Never true (a stack has at least one pixel); here for the `len` convention.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.mean.is_empty()
    }

    /// Frames.
    #[must_use]
    pub fn frames(&self) -> u32 {
        self.frames
    }

    /// The per-pixel means.
    #[must_use]
    pub fn mean(&self) -> &'a [f64] {
        self.mean
    }
}

fn check_pair(a: usize, b: usize) -> Result<()> {
    if a == 0 || b == 0 {
        Err(Error::NucFrameEmpty)
    } else if a == b {
        Ok(())
    } else {
        Err(Error::FrameLengthMismatch)
    }
}

/// What [`two_point`] found: the array means of the two levels and the good pixels.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TwoPointReport {
    /// <S_L>, mean low-level signal of the good pixels (counts).
    pub mean_low: f64,
    /// <S_H>, mean high-level signal of the good pixels (counts).
    pub mean_high: f64,
    /// Pixels that received a map (not flagged bad).
    pub good_pixels: u64,
}

/// Two-point NUC maps from the averaged low- and high-level flat-field frames: gain
/// G_ij = (<S_H> - <S_L>) / (S_H,ij - S_L,ij) and offset O_ij = <S_L> - G_ij S_L,ij, with
/// the means over the pixels whose `bad` byte is 0 (all pixels when `bad` is None).
/// Pixels flagged bad get G = 1, O = 0 (they are replaced in the conversion).
///
/// Accuracy: the maps are computed in f64 and rounded to f32 (relative 6e-8); a linear
/// pixel is then corrected to within that rounding at every radiance.
///
/// # Errors
/// [`Error::FrameLengthMismatch`] unless every buffer has the stacks' length;
/// [`Error::NucNoGoodPixels`]; [`Error::NucLevelsNotDistinct`] if a good pixel's high
/// mean is not above its low mean (flag it bad first: [`crate::frame::detect_bad_pixels`])
/// or the array means tie after rounding; [`Error::NonFinite`] (also for array means that
/// overflow); [`Error::FrameCoefficientOverflow`] if a good pixel's gain or offset does
/// not fit an f32 as a finite value (the gain also nonzero). On error the maps are
/// untouched.
pub fn two_point(
    low: &StackStats<'_>,
    high: &StackStats<'_>,
    bad: Option<&[u8]>,
    gain: &mut [f32],
    offset: &mut [f32],
) -> Result<TwoPointReport> {
    let len = low.len();
    if high.len() != len
        || gain.len() != len
        || offset.len() != len
        || bad.is_some_and(|b| b.len() != len)
    {
        return Err(Error::FrameLengthMismatch);
    }
    let is_good = |p: usize| bad.and_then(|b| b.get(p)).is_none_or(|&f| f == 0);
    let (mut sum_low, mut sum_high, mut good) = (0.0f64, 0.0f64, 0u64);
    for (p, (&l, &h)) in low.mean.iter().zip(high.mean).enumerate() {
        if !is_good(p) {
            continue;
        }
        if !(l.is_finite() && h.is_finite()) {
            return Err(Error::NonFinite);
        }
        if !(h > l) {
            return Err(Error::NucLevelsNotDistinct);
        }
        sum_low += l;
        sum_high += h;
        good += 1;
    }
    if good == 0 {
        return Err(Error::NucNoGoodPixels);
    }
    #[allow(clippy::cast_precision_loss)]
    let count = good as f64;
    let (mean_low, mean_high) = (sum_low / count, sum_high / count);
    if !(mean_low.is_finite() && mean_high.is_finite()) {
        return Err(Error::NonFinite);
    }
    // Every good pixel's h > l, so the sums keep that order, but rounding can tie them;
    // a tie would give every pixel a gain of 0.
    if !(mean_high > mean_low) {
        return Err(Error::NucLevelsNotDistinct);
    }
    // Every good pixel's maps must fit an f32 before anything is written (a mean of
    // -9e307 or a response of 1e-300 counts per level would give an infinite gain or
    // offset, or a gain that rounds to 0).
    for (p, (&l, &h)) in low.mean.iter().zip(high.mean).enumerate() {
        if is_good(p) {
            let gp = (mean_high - mean_low) / (h - l);
            let (g, o) = (super::to_f32(gp), super::to_f32(mean_low - gp * l));
            if !(g.is_finite() && g > 0.0 && o.is_finite()) {
                return Err(Error::FrameCoefficientOverflow);
            }
        }
    }
    for (p, ((g, o), (&l, &h))) in gain
        .iter_mut()
        .zip(offset.iter_mut())
        .zip(low.mean.iter().zip(high.mean))
        .enumerate()
    {
        if is_good(p) {
            let gp = (mean_high - mean_low) / (h - l);
            *g = super::to_f32(gp);
            *o = super::to_f32(mean_low - gp * l);
        } else {
            *g = 1.0;
            *o = 0.0;
        }
    }
    Ok(TwoPointReport {
        mean_low,
        mean_high,
        good_pixels: good,
    })
}

/// Shutter (flag) offset refresh: with the shutter closed, a near-blackbody at a measured
/// temperature fills every pixel's view, so every corrected pixel should read the same
/// `target_counts`: the corrected counts x' (after the drift step) of a blackbody at the
/// shutter's temperature, [`shutter_target_counts`]. One point per pixel re-determines
/// the offset and keeps the gain:
///
/// ```text
/// O_ij = (target - b) / a - G_ij n_sh,ij          (a, b: the drift step in force)
/// ```
///
/// The shutter is not a zero: its own radiance enters through the target, so a shutter
/// warmer than the last calibration raises the target, not the offsets.
///
/// # Errors
/// [`Error::FrameLengthMismatch`]; [`Error::NonFinite`] for a non-finite target or a
/// non-finite shutter mean at a good pixel; [`Error::NucMapInvalid`] for an invalid drift
/// step; [`Error::FrameCoefficientOverflow`] if a good pixel's new offset is not a finite
/// f32 (a target or a gain out of an f32's range, a gain that is not finite). On error
/// `offset` is untouched.
pub fn shutter_refresh(
    shutter: &StackStats<'_>,
    gain: &[f32],
    bad: Option<&[u8]>,
    target_counts: f64,
    step: DriftStep,
    offset: &mut [f32],
) -> Result<()> {
    let len = shutter.len();
    if gain.len() != len || offset.len() != len || bad.is_some_and(|b| b.len() != len) {
        return Err(Error::FrameLengthMismatch);
    }
    step.check()?;
    if !target_counts.is_finite() {
        return Err(Error::NonFinite);
    }
    let is_good = |p: usize| bad.and_then(|b| b.get(p)).is_none_or(|&f| f == 0);
    if (0..len).any(|p| is_good(p) && !shutter.mean.get(p).is_some_and(|m| m.is_finite())) {
        return Err(Error::NonFinite);
    }
    let base = (target_counts - f64::from(step.b)) / f64::from(step.a);
    let new_offset = |g: f32, m: f64| super::to_f32(base - f64::from(g) * m);
    // Every good pixel's new offset must fit an f32 before anything is written (a target
    // of 4e297 counts, or a gain that is not finite, would write inf or NaN).
    let fits = gain
        .iter()
        .zip(shutter.mean)
        .enumerate()
        .all(|(p, (&g, &m))| !is_good(p) || new_offset(g, m).is_finite());
    if !fits {
        return Err(Error::FrameCoefficientOverflow);
    }
    for (p, ((o, &g), &m)) in offset.iter_mut().zip(gain).zip(shutter.mean).enumerate() {
        if is_good(p) {
            *o = new_offset(g, m);
        }
    }
    Ok(())
}

/// Corrected counts x' that a blackbody at `shutter_k` produces for a converter whose
/// counts map is S = g x' + o over `curve`: x' = (S(shutter_k) - o) / g. The shutter sits
/// inside the instrument, so no scene, air or window term applies; a shutter emissivity
/// below 1 reflects the housing, which is at nearly the shutter's temperature.
///
/// # Errors
/// Those of `curve.signal`.
pub fn shutter_target_counts<C: SignalCurve + ?Sized>(
    curve: &C,
    counts: super::CountsMap,
    shutter_k: f64,
) -> Result<f64> {
    Ok((curve.signal(shutter_k)? - counts.offset()) / counts.gain())
}

/// A per-frame affine step on corrected counts, x' = a x + b: the array-temperature drift
/// correction in force (see [`crate::frame::DriftModel::step`]); [`DriftStep::IDENTITY`]
/// without one.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DriftStep {
    /// a, dimensionless (> 0).
    pub a: f32,
    /// b, counts.
    pub b: f32,
}

impl DriftStep {
    /// x' = x.
    pub const IDENTITY: DriftStep = DriftStep { a: 1.0, b: 0.0 };

    pub(super) fn check(self) -> Result<()> {
        if self.a.is_finite() && self.a > 0.0 && self.b.is_finite() {
            Ok(())
        } else {
            Err(Error::NucMapInvalid)
        }
    }
}

/// The correction a raw frame goes through before the scene stage: the non-uniformity
/// maps (two-point, or piecewise-linear between N levels, see
/// [`crate::frame::multi_point`]), the bad-pixel map and the drift step, over a frame of
/// `width` pixels per row.
///
/// The maps are planes of one f32 per pixel, row-major: S = N - 1 gain planes, S offset
/// planes and S - 1 breakpoint planes (raw counts), in that order. Two-point maps are
/// the case N = 2 (one gain and one offset plane, no breakpoint).
#[derive(Clone, Copy, Debug)]
pub struct Correction<'m> {
    gain: &'m [f32],
    offset: &'m [f32],
    breaks: &'m [f32],
    segments: usize,
    pixels: usize,
    bad: &'m [u8],
    width: usize,
    step: DriftStep,
}

/// True if every gain is finite and positive and every offset finite, tested in f32
/// lanes the compiler vectorises: a sum of 0 * value turns NaN for any NaN or infinity,
/// and the lane-wise minimum of the gains must be positive.
// Forced inline only on x86-64 (into the AVX2 context). On the Cortex-M build forcing it
// left `Zip::new` out of line with its division by the chunk size, a panic path the
// firmware's link-time proof refuses.
#[cfg_attr(all(target_arch = "x86_64", target_feature = "sse2"), inline(always))]
fn maps_valid_fast(gain: &[f32], offset: &[f32]) -> bool {
    let valid = |g: f32, o: f32| g > 0.0 && g < f32::INFINITY && o.abs() < f32::INFINITY;
    let mut probe = [0.0f32; 16];
    let mut least = [f32::INFINITY; 16];
    for (g, o) in gain.chunks_exact(16).zip(offset.chunks_exact(16)) {
        let (Ok(g), Ok(o)) = (<&[f32; 16]>::try_from(g), <&[f32; 16]>::try_from(o)) else {
            continue;
        };
        for j in 0..16 {
            probe[j] += g[j] * 0.0 + o[j] * 0.0;
            least[j] = if g[j] < least[j] { g[j] } else { least[j] };
        }
    }
    let tail = gain.len() - gain.len() % 16;
    gain.len() == offset.len()
        && probe.iter().all(|&p| p == 0.0)
        && least.iter().all(|&g| g > 0.0)
        && gain
            .iter()
            .zip(offset)
            .skip(tail)
            .all(|(&g, &o)| valid(g, o))
}

/// Checks a width against a pixel count.
fn check_geometry(pixels: usize, width: usize) -> Result<()> {
    // `%`, not `is_multiple_of` (Rust 1.87): the library itself keeps building with
    // older compilers (Debian 12's firmware toolchain has shipped Rust 1.85).
    #[allow(clippy::manual_is_multiple_of)]
    if width == 0 || pixels % width != 0 {
        Err(Error::NucGeometryInvalid)
    } else {
        Ok(())
    }
}

impl<'m> Correction<'m> {
    /// Wraps two-point maps (one value per pixel, row-major, `width` pixels per row) and
    /// checks them: at every pixel whose `bad` byte is 0, gain finite and positive and
    /// offset finite. A bad pixel's map values are never read.
    ///
    /// # Errors
    /// [`Error::NucGeometryInvalid`], [`Error::FrameLengthMismatch`], [`Error::NucMapInvalid`].
    pub fn new(gain: &'m [f32], offset: &'m [f32], bad: &'m [u8], width: usize) -> Result<Self> {
        let len = gain.len();
        check_geometry(len, width)?;
        if offset.len() != len || bad.len() != len {
            return Err(Error::FrameLengthMismatch);
        }
        let valid = |g: f32, o: f32| g > 0.0 && g < f32::INFINITY && o.abs() < f32::INFINITY;
        // Fast path over the maps alone; only when it fails are the bad-pixel flags
        // consulted, pixel by pixel.
        let ok = maps_valid_fast(gain, offset)
            || gain
                .iter()
                .zip(offset)
                .zip(bad)
                .all(|((&g, &o), &f)| f != 0 || valid(g, o));
        if !ok {
            return Err(Error::NucMapInvalid);
        }
        Ok(Correction {
            gain,
            offset,
            breaks: &[],
            segments: 1,
            pixels: len,
            bad,
            width,
            step: DriftStep::IDENTITY,
        })
    }

    /// Wraps multi-point maps of `levels` flat-field levels as
    /// [`crate::frame::multi_point`] writes them (`maps` holds
    /// [`crate::frame::multi_point_map_len`] floats: N - 1 gain planes, N - 1 offset
    /// planes, N - 2 breakpoint planes, one f32 per pixel each) over the pixels of `bad`,
    /// `width` per row, and checks them: at every pixel whose `bad` byte is 0, every gain
    /// finite and positive, every offset finite, the breakpoints finite and
    /// non-decreasing. A bad pixel's map values are never read. With `levels == 2` this
    /// is [`Correction::new`] over the two planes.
    ///
    /// Cost: one pass over the maps per call (four levels on 640x512: about 0.4 ms on one
    /// core of the shared x86-64 test machine with AVX2, half the fused conversion's time;
    /// `benches/nuc.rs`); wrap once and keep the `Correction` when the maps do not change
    /// between frames.
    ///
    /// # Errors
    /// [`Error::NucLevelCount`], [`Error::NucFrameEmpty`] (no pixels),
    /// [`Error::NucGeometryInvalid`], [`Error::NucMapStorageMismatch`],
    /// [`Error::NucMapInvalid`].
    pub fn multi_point(
        maps: &'m [f32],
        levels: usize,
        bad: &'m [u8],
        width: usize,
    ) -> Result<Self> {
        // The checks are whole-plane folds the compiler vectorises: twice the lanes with
        // AVX2 where the processor has it (same result; see `simd.rs`).
        #[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
        if super::simd::avx2() {
            // SAFETY: the processor supports AVX2 (just checked).
            #[allow(unsafe_code)]
            return unsafe {
                super::simd::with_avx2(
                    #[inline(always)]
                    || Self::multi_point_checked(maps, levels, bad, width),
                )
            };
        }
        Self::multi_point_checked(maps, levels, bad, width)
    }

    /// [`Correction::multi_point`] for one instruction set.
    #[inline(always)]
    fn multi_point_checked(
        maps: &'m [f32],
        levels: usize,
        bad: &'m [u8],
        width: usize,
    ) -> Result<Self> {
        let pixels = bad.len();
        let expected = super::multipoint::multi_point_map_len(levels, pixels)?;
        check_geometry(pixels, width)?;
        if maps.len() != expected {
            return Err(Error::NucMapStorageMismatch);
        }
        // `multi_point_map_len` refuses zero pixels and levels outside 2..=16 and the
        // length is checked; the early returns say so to the compiler, which removes the
        // division-by-zero and slicing panic paths.
        if pixels == 0 || levels < 2 {
            return Err(Error::NucFrameEmpty);
        }
        let segments = levels - 1;
        let plane = segments * pixels;
        let (gain, rest) = maps
            .split_at_checked(plane)
            .ok_or(Error::NucMapStorageMismatch)?;
        let (offset, breaks) = rest
            .split_at_checked(plane)
            .ok_or(Error::NucMapStorageMismatch)?;
        let valid = |g: f32, o: f32| g > 0.0 && g < f32::INFINITY && o.abs() < f32::INFINITY;
        let plane = |map, k| window(map, k, pixels, 0, pixels);
        // Slow paths plane by plane, zipped with the bad-pixel map (no division).
        let maps_ok = maps_valid_fast(gain, offset)
            || (0..segments).all(|k| {
                plane(gain, k)
                    .iter()
                    .zip(plane(offset, k))
                    .zip(bad)
                    .all(|((&g, &o), &f)| f != 0 || valid(g, o))
            });
        // Breakpoints: finite, and each plane at least the one before it. Fast path over
        // whole planes with non-short-circuiting folds (vectorised); only when it fails
        // are the bad-pixel flags consulted.
        let finite = |b: f32| b.abs() < f32::INFINITY;
        let previous = |j: usize| plane(breaks, j.saturating_sub(1));
        #[allow(clippy::needless_bitwise_bool)] // `&`, not `&&`: no branch, so it vectorises
        let fast = (0..segments - 1).fold(true, |ok, j| {
            ok & plane(breaks, j)
                .iter()
                .zip(previous(j))
                .fold(true, |ok, (&b, &a)| ok & finite(b) & (b >= a))
        });
        let ordered = || {
            (0..segments - 1).all(|j| {
                plane(breaks, j)
                    .iter()
                    .zip(previous(j))
                    .zip(bad)
                    .all(|((&b, &a), &f)| f != 0 || (finite(b) && b >= a))
            })
        };
        if !(maps_ok && (fast || ordered())) {
            return Err(Error::NucMapInvalid);
        }
        Ok(Correction {
            gain,
            offset,
            breaks,
            segments,
            pixels,
            bad,
            width,
            step: DriftStep::IDENTITY,
        })
    }

    /// The same maps with the drift step `step` applied after them.
    ///
    /// # Errors
    /// [`Error::NucMapInvalid`] unless a > 0 and both are finite.
    pub fn with_step(mut self, step: DriftStep) -> Result<Self> {
        step.check()?;
        self.step = step;
        Ok(self)
    }

    /// Segments of the maps (flat-field levels - 1): 1 for two-point maps.
    #[must_use]
    pub fn segments(&self) -> usize {
        self.segments
    }

    /// Pixels the maps cover.
    #[must_use]
    pub fn pixels(&self) -> usize {
        self.pixels
    }

    /// Corrected counts x = G_k n + O_k of pixel `p` from raw counts `n`, before the drift
    /// step (no rail or bad check): k the last segment whose lower breakpoint is at or
    /// below n (segment 0 below the first breakpoint).
    #[inline(always)]
    pub(super) fn corrected(&self, p: usize, n: u16) -> f32 {
        let x = f32::from(n);
        let mut k = 0usize;
        for j in 1..self.segments {
            let b = self
                .breaks
                .get((j - 1) * self.pixels + p)
                .copied()
                .unwrap_or(f32::NAN);
            if x >= b {
                k = j;
            }
        }
        let at = k * self.pixels + p;
        let g = self.gain.get(at).copied().unwrap_or(f32::NAN);
        let o = self.offset.get(at).copied().unwrap_or(f32::NAN);
        g * x + o
    }

    pub(super) fn width(&self) -> usize {
        self.width
    }

    pub(super) fn bad(&self) -> &'m [u8] {
        self.bad
    }
}

/// Pixels `start..start + m` of plane `k` of a map of `pixels` values per plane; empty
/// if out of bounds.
fn window(map: &[f32], k: usize, pixels: usize, start: usize, m: usize) -> &[f32] {
    map.get(k * pixels + start..k * pixels + start + m)
        .unwrap_or(&[])
}

/// Tally of a corrected conversion: the frame summary (an unreplaceable bad pixel is
/// counted as dead there) and the bad pixels replaced and not.
#[repr(C)]
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct CorrectedSummary {
    /// Every pixel's outcome; `frame.pixels` = `frame.converted` + the failures.
    pub frame: FrameSummary,
    /// Bad pixels given the mean of their good neighbours.
    pub bad_replaced: u64,
    /// Bad pixels with no good neighbour (output NaN, counted as dead in `frame`).
    pub bad_unreplaced: u64,
}

/// Pixels per strip of the fused pass: the strip of object signals (1 KiB on the stack)
/// stays in L1 cache between the correction loop and the table kernel.
const STRIP: usize = 256;

/// The scene stage's counts coefficients (zero_int, zero_rem, scale) with the drift step
/// x' = a x + b folded in: ((x' - z_int) - z_rem) s = ((x - z'_int) - z'_rem) (a s) with
/// z' = (z_int + z_rem - b) / a, formed in f64; unchanged for the identity step.
fn fold_step(coefficients: (f32, f32, f32), step: DriftStep) -> Result<(f32, f32, f32)> {
    let (zi, zr, scale) = coefficients;
    if step == DriftStep::IDENTITY {
        return Ok((zi, zr, scale));
    }
    let (a, b) = (f64::from(step.a), f64::from(step.b));
    let (zi2, zr2) = super::pixel_map::split_offset((f64::from(zi) + f64::from(zr) - b) / a)?;
    Ok((zi2, zr2, super::to_f32_checked(f64::from(scale) * a)?))
}

#[inline(always)]
fn valid_emissivity(e: f32) -> bool {
    e > 0.0 && e <= 1.0
}

/// Object signal of one pixel from corrected counts x (before the drift step, which the
/// coefficients carry) and its emissivity: the uniform-scene or the emissivity-map form
/// of the scene stage (see the module docs of [`crate::frame`]).
#[derive(Clone, Copy)]
struct SceneStage {
    zero_int: f32,
    zero_rem: f32,
    scale: f32,
    reflected: f32,
}

impl SceneStage {
    /// Uniform scene: L = ((x - z_int) - z_rem) s.
    #[inline(always)]
    fn uniform(&self, x: f32) -> f32 {
        ((x - self.zero_int) - self.zero_rem) * self.scale
    }

    /// Emissivity map: L = ((x - k_int) - k_rem) s_k / e + Lr; NaN for an emissivity
    /// outside (0, 1].
    #[inline(always)]
    fn per_pixel(&self, x: f32, e: f32) -> f32 {
        let l = ((x - self.zero_int) - self.zero_rem) * self.scale / e + self.reflected;
        if valid_emissivity(e) {
            l
        } else {
            f32::NAN
        }
    }

    #[inline(always)]
    fn signal(&self, x: f32, e: Option<f32>) -> f32 {
        match e {
            None => self.uniform(x),
            Some(e) => self.per_pixel(x, e),
        }
    }
}

/// One strip's correction and scene stage: vectorisable, branch-free. Rails are marked
/// with infinities (an in-range signal is finite), which the table kernel rejects and the
/// classification reads back; constant selects keep the loop vectorised.
#[inline(always)]
#[allow(clippy::too_many_arguments)]
fn scene_pass(
    strip: &mut [f32],
    n_block: &[u16],
    g_block: &[f32],
    o_block: &[f32],
    e_block: Option<&[f32]>,
    rails: (f32, f32),
    stage: SceneStage,
) {
    let (deadf, satf) = rails;
    match e_block {
        None => {
            for (s, ((&n, &g), &o)) in strip
                .iter_mut()
                .zip(n_block.iter().zip(g_block).zip(o_block))
            {
                let x = f32::from(n);
                let l = stage.uniform(g * x + o);
                let l = if x <= deadf { f32::NEG_INFINITY } else { l };
                *s = if x >= satf { f32::INFINITY } else { l };
            }
        }
        Some(e_block) => {
            for (s, (((&n, &g), &o), &e)) in strip
                .iter_mut()
                .zip(n_block.iter().zip(g_block).zip(o_block).zip(e_block))
            {
                let x = f32::from(n);
                let l = stage.per_pixel(g * x + o, e);
                let l = if x <= deadf { f32::NEG_INFINITY } else { l };
                *s = if x >= satf { f32::INFINITY } else { l };
            }
        }
    }
}

/// Each pixel's segment gain and offset for a strip of multi-point maps, by a chain of
/// selects over the breakpoint planes (vectorisable; the breakpoints are non-decreasing,
/// so the last plane at or below n wins).
#[inline(always)]
fn select_segments(
    correction: &Correction<'_>,
    start: usize,
    n_block: &[u16],
    gains: &mut [f32],
    offsets: &mut [f32],
) {
    let (p, m) = (correction.pixels, n_block.len());
    let at = |map, k| window(map, k, p, start, m);
    for ((g, o), (&g0, &o0)) in gains
        .iter_mut()
        .zip(offsets.iter_mut())
        .zip(at(correction.gain, 0).iter().zip(at(correction.offset, 0)))
    {
        *g = g0;
        *o = o0;
    }
    for k in 1..correction.segments {
        let (gk, ok, bk) = (
            at(correction.gain, k),
            at(correction.offset, k),
            at(correction.breaks, k - 1),
        );
        // Lanes of 16 in fixed-size arrays (the loop vectorises), then the tail.
        let whole = m - m % LANES;
        for (((g, o), n), ((gn, on), b)) in gains
            .chunks_exact_mut(LANES)
            .zip(offsets.chunks_exact_mut(LANES))
            .zip(n_block.chunks_exact(LANES))
            .zip(
                gk.chunks_exact(LANES)
                    .zip(ok.chunks_exact(LANES))
                    .zip(bk.chunks_exact(LANES)),
            )
        {
            let (Ok(g), Ok(o), Ok(n), Ok(gn), Ok(on), Ok(b)) = (
                <&mut [f32; LANES]>::try_from(g),
                <&mut [f32; LANES]>::try_from(o),
                <&[u16; LANES]>::try_from(n),
                <&[f32; LANES]>::try_from(gn),
                <&[f32; LANES]>::try_from(on),
                <&[f32; LANES]>::try_from(b),
            ) else {
                continue;
            };
            for j in 0..LANES {
                let upper = f32::from(n[j]) >= b[j];
                g[j] = if upper { gn[j] } else { g[j] };
                o[j] = if upper { on[j] } else { o[j] };
            }
        }
        for (((g, o), &n), ((&gn, &on), &b)) in gains
            .iter_mut()
            .zip(offsets.iter_mut())
            .zip(n_block)
            .skip(whole)
            .zip(
                gk.iter()
                    .skip(whole)
                    .zip(ok.iter().skip(whole))
                    .zip(bk.iter().skip(whole)),
            )
        {
            let upper = f32::from(n) >= b;
            *g = if upper { gn } else { *g };
            *o = if upper { on } else { *o };
        }
    }
}

impl FrameConverter<'_> {
    /// Converts a raw frame of counts to object temperature in K through the correction
    /// (non-uniformity maps, drift step, bad-pixel replacement) and the converter's scene
    /// and table, in one pass: per strip of 256 pixels, corrected counts x = G_ij n_ij +
    /// O_ij (multi-point maps: the segment of the pixel's raw counts, see
    /// [`crate::frame::multi_point`]) go straight into the scene stage (the drift step
    /// x' = a x + b folded into its coefficients once per frame) and the converter's batch
    /// kernel; no corrected frame is stored.
    ///
    /// A good pixel with raw counts at a rail is dead or saturated (the rails of the
    /// converter apply to the raw counts). A bad pixel takes the mean corrected counts of
    /// its good, in-rail 8-neighbours; with none it comes out NaN and is counted as dead
    /// and in `bad_unreplaced`. Everything else is as [`FrameConverter::convert_counts`]
    /// (uniform scene; a per-pixel emissivity map:
    /// [`FrameConverter::convert_counts_corrected_emissivity`]). Rails are carried through
    /// the kernel as -inf (dead) and +inf (saturated), so a map extreme enough to overflow
    /// the corrected signal to +inf reads as saturated. With the identity step the
    /// scene stage's arithmetic is the plain path's, so identity maps give the plain
    /// conversion bit for bit.
    ///
    /// Accuracy: that of [`FrameConverter::convert_counts`] at the corrected counts, plus
    /// the f32 rounding of G n + O (about 1 ulp of x, converted to kelvin by the scene's
    /// slope) and of the folded step (1 ulp of the scale, relative).
    ///
    /// Speed (`benches/nuc.rs`, 640x512, and instruction counts under callgrind; see the
    /// README): about 25 % more instructions than [`FrameConverter::convert_counts`] for
    /// two-point maps; multi-point maps add one select pass per breakpoint plane.
    ///
    /// # Errors
    /// [`Error::FrameLengthMismatch`] unless counts, maps and output have one length;
    /// [`Error::FrameCoefficientOverflow`] if the folded step does not fit an f32.
    pub fn convert_counts_corrected(
        &self,
        correction: &Correction<'_>,
        counts: &[u16],
        kelvin: &mut [f32],
    ) -> Result<CorrectedSummary> {
        let map = self.state().map;
        let stage = fold_step(map.counts_coefficients(), correction.step)?;
        self.fused(
            correction,
            counts,
            None,
            kelvin,
            SceneStage {
                zero_int: stage.0,
                zero_rem: stage.1,
                scale: stage.2,
                reflected: 0.0,
            },
        )
    }

    /// As [`FrameConverter::convert_counts_corrected`] with a per-pixel emissivity map,
    /// applied in the same pass: per pixel, the corrected counts x (after the drift step)
    /// give L = ((x - k_int) - k_rem) s_k / e_ij + Lr, the emissivity-map form of
    /// [`FrameConverter::convert_counts`]. A replaced bad pixel takes its neighbours'
    /// corrected counts and its own emissivity. A pixel with an emissivity outside (0, 1]
    /// comes out NaN and is counted as [`PixelStatus::EmissivityInvalid`] (rails are
    /// reported first, as in the plain path).
    ///
    /// With the identity step, pixel for pixel the same as correcting the frame first and
    /// converting the corrected counts with [`FrameConverter::convert_counts`] and the
    /// same map (bit for bit where the corrected counts are whole numbers; tested).
    ///
    /// Accuracy: that of the emissivity-map path of [`FrameConverter::convert_counts`] at
    /// the corrected counts, plus the rounding of G n + O as for
    /// [`FrameConverter::convert_counts_corrected`].
    ///
    /// Speed (`benches/nuc.rs`, 640x512, two-point maps): 1.05x the plain emissivity-map
    /// conversion of the same counts in wall time, 1.13x in instructions (README).
    ///
    /// # Errors
    /// [`Error::FrameLengthMismatch`] unless counts, maps, emissivity and output have one
    /// length; [`Error::FrameEmissivityMapUnavailable`] if the curve had no signal at the
    /// reflected temperature; [`Error::FrameCoefficientOverflow`] if the folded step does
    /// not fit an f32.
    pub fn convert_counts_corrected_emissivity(
        &self,
        correction: &Correction<'_>,
        counts: &[u16],
        emissivity: &[f32],
        kelvin: &mut [f32],
    ) -> Result<CorrectedSummary> {
        if emissivity.len() != counts.len() {
            return Err(Error::FrameLengthMismatch);
        }
        let map = self.state().map;
        if map.map_ready != 1 {
            return Err(Error::FrameEmissivityMapUnavailable);
        }
        let stage = fold_step(map.counts_k_coefficients(), correction.step)?;
        self.fused(
            correction,
            counts,
            Some(emissivity),
            kelvin,
            SceneStage {
                zero_int: stage.0,
                zero_rem: stage.1,
                scale: stage.2,
                reflected: map.reflected(),
            },
        )
    }

    /// The fused pass shared by the corrected conversions: on x86-64 processors with AVX2
    /// compiled for AVX2 as a whole (the correction passes too, not only the lookup; same
    /// bits, see `simd.rs`).
    fn fused(
        &self,
        correction: &Correction<'_>,
        counts: &[u16],
        emissivity: Option<&[f32]>,
        kelvin: &mut [f32],
        stage: SceneStage,
    ) -> Result<CorrectedSummary> {
        #[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
        if super::simd::avx2() {
            // SAFETY: the processor supports AVX2 (just checked).
            #[allow(unsafe_code)]
            return unsafe {
                super::simd::with_avx2(
                    #[inline(always)]
                    || self.fused_body(correction, counts, emissivity, kelvin, stage),
                )
            };
        }
        self.fused_body(correction, counts, emissivity, kelvin, stage)
    }

    /// [`FrameConverter::fused`] for one instruction set (forced inline only on x86-64,
    /// where it must inline into the AVX2 context; elsewhere the compiler decides).
    #[allow(clippy::too_many_lines)]
    #[cfg_attr(all(target_arch = "x86_64", target_feature = "sse2"), inline(always))]
    fn fused_body(
        &self,
        correction: &Correction<'_>,
        counts: &[u16],
        emissivity: Option<&[f32]>,
        kelvin: &mut [f32],
        stage: SceneStage,
    ) -> Result<CorrectedSummary> {
        if counts.len() != kelvin.len() || counts.len() != correction.pixels {
            return Err(Error::FrameLengthMismatch);
        }
        let state = self.state();
        let table = self.table();
        let lookup = Lookup::new(&state.geometry, table.rows);
        let (dead, saturated) = (state.rails.dead_counts, state.rails.saturation_counts);
        let rails = (f32::from(dead), f32::from(saturated));
        let mut summary = CorrectedSummary {
            frame: FrameSummary {
                pixels: counts.len() as u64,
                ..FrameSummary::default()
            },
            ..CorrectedSummary::default()
        };
        let mut strip = [0.0f32; STRIP];
        let mut gains = [0.0f32; STRIP];
        let mut offsets = [0.0f32; STRIP];
        let per_pixel = emissivity.is_some();
        let mut start = 0usize;
        for ((n_block, k_block), bad_block) in counts
            .chunks(STRIP)
            .zip(kelvin.chunks_mut(STRIP))
            .zip(correction.bad.chunks(STRIP))
        {
            let m = n_block.len();
            let end = start + m;
            let (Some(strip), Some(e_block)) = (
                strip.get_mut(..m),
                emissivity.map_or(Some(None), |em| em.get(start..end).map(Some)),
            ) else {
                continue;
            };
            if correction.segments == 1 {
                let (Some(g_block), Some(o_block)) = (
                    correction.gain.get(start..end),
                    correction.offset.get(start..end),
                ) else {
                    continue;
                };
                scene_pass(strip, n_block, g_block, o_block, e_block, rails, stage);
            } else {
                let (Some(g_block), Some(o_block)) = (gains.get_mut(..m), offsets.get_mut(..m))
                else {
                    continue;
                };
                select_segments(correction, start, n_block, g_block, o_block);
                scene_pass(strip, n_block, g_block, o_block, e_block, rails, stage);
            }
            // Bad pixels: rare; whole chunks of 16 good bytes are skipped with one test.
            for (c, flags) in bad_block.chunks(16).enumerate() {
                let clear = <[u8; 16]>::try_from(flags).map_or_else(
                    |_| flags.iter().all(|&f| f == 0),
                    |chunk| u128::from_ne_bytes(chunk) == 0,
                );
                if clear {
                    continue;
                }
                for (k, &f) in flags.iter().enumerate() {
                    if f == 0 {
                        continue;
                    }
                    let local = c * 16 + k;
                    let replaced =
                        replacement_mean(correction, counts, start + local, dead, saturated);
                    let e = e_block.map(|em| em.get(local).copied().unwrap_or(f32::NAN));
                    if let Some(s) = strip.get_mut(local) {
                        *s = if let Some(x) = replaced {
                            summary.bad_replaced += 1;
                            stage.signal(x, e)
                        } else {
                            summary.bad_unreplaced += 1;
                            f32::NEG_INFINITY
                        };
                    }
                }
            }
            run(
                &lookup,
                strip,
                e_block,
                k_block,
                &mut summary.frame,
                #[inline(always)]
                |s: f32, _| (lookup.in_range(s), s),
                |s: f32, e: f32| {
                    if s == f32::NEG_INFINITY {
                        PixelStatus::Dead
                    } else if s == f32::INFINITY {
                        PixelStatus::Saturated
                    } else if per_pixel && !valid_emissivity(e) {
                        PixelStatus::EmissivityInvalid
                    } else {
                        lookup.classify(s)
                    }
                },
            );
            start = end;
        }
        summary.frame.converted = summary.frame.pixels - summary.frame.failed();
        Ok(summary)
    }
}
