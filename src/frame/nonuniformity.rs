//! Non-uniformity correction (NUC): averaging of calibration frames, two-point gain and
//! offset maps, the shutter (flag) offset refresh, and the fused conversion of raw counts
//! through the maps, bad-pixel replacement and drift step straight to kelvin.
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
use super::FrameConverter;
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
/// mean is not above its low mean (flag it bad first: [`crate::frame::detect_bad_pixels`]);
/// [`Error::NonFinite`]. On error the maps are untouched.
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
/// step. On error `offset` is untouched.
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
    for (p, ((o, &g), &m)) in offset.iter_mut().zip(gain).zip(shutter.mean).enumerate() {
        if is_good(p) {
            *o = super::to_f32(base - f64::from(g) * m);
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

/// The correction a raw frame goes through before the scene stage: the two-point maps,
/// the bad-pixel map and the drift step, over a frame of `width` pixels per row.
#[derive(Clone, Copy, Debug)]
pub struct Correction<'m> {
    gain: &'m [f32],
    offset: &'m [f32],
    bad: &'m [u8],
    width: usize,
    step: DriftStep,
}

impl<'m> Correction<'m> {
    /// Wraps the maps (one value per pixel, row-major, `width` pixels per row) and checks
    /// them: at every pixel whose `bad` byte is 0, gain finite and positive and offset
    /// finite. A bad pixel's map values are never read.
    ///
    /// # Errors
    /// [`Error::NucGeometryInvalid`], [`Error::FrameLengthMismatch`], [`Error::NucMapInvalid`].
    pub fn new(gain: &'m [f32], offset: &'m [f32], bad: &'m [u8], width: usize) -> Result<Self> {
        let len = gain.len();
        // `%`, not `is_multiple_of` (Rust 1.87): the library itself keeps building with
        // older compilers (Debian 12's firmware toolchain has shipped Rust 1.85).
        #[allow(clippy::manual_is_multiple_of)]
        if width == 0 || len % width != 0 {
            return Err(Error::NucGeometryInvalid);
        }
        if offset.len() != len || bad.len() != len {
            return Err(Error::FrameLengthMismatch);
        }
        // Branch-free integer masks so that the check vectorises: a finite positive gain
        // is above zero and below infinity (NaN fails both), a finite offset has
        // |o| < infinity.
        // Fast path over the maps alone, in f32 lanes the compiler vectorises: a sum of
        // 0 * value turns NaN for any NaN or infinity, and the lane-wise minimum of the
        // gains must be positive. Only when this fails are the bad-pixel flags consulted,
        // pixel by pixel.
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
        let tail = len - len % 16;
        let mut ok = u32::from(
            probe.iter().all(|&p| p == 0.0)
                && least.iter().all(|&g| g > 0.0)
                && gain
                    .iter()
                    .zip(offset)
                    .skip(tail)
                    .all(|(&g, &o)| valid(g, o)),
        );
        if ok == 0 {
            ok = u32::from(
                gain.iter()
                    .zip(offset)
                    .zip(bad)
                    .all(|((&g, &o), &f)| f != 0 || valid(g, o)),
            );
        }
        if ok == 0 {
            return Err(Error::NucMapInvalid);
        }
        Ok(Correction {
            gain,
            offset,
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

    /// Corrected counts x = G n + O of pixel `p` from raw counts `n`, before the drift
    /// step (no rail or bad check).
    #[inline(always)]
    pub(super) fn corrected(&self, p: usize, n: u16) -> f32 {
        let g = self.gain.get(p).copied().unwrap_or(f32::NAN);
        let o = self.offset.get(p).copied().unwrap_or(f32::NAN);
        g * f32::from(n) + o
    }

    pub(super) fn width(&self) -> usize {
        self.width
    }

    pub(super) fn bad(&self) -> &'m [u8] {
        self.bad
    }
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

/// The scene stage's uniform-scene counts coefficients with the drift step folded in.
fn fold_step(map: &super::PixelMap, step: DriftStep) -> Result<(f32, f32, f32)> {
    let (zi, zr, scale) = map.counts_coefficients();
    if step == DriftStep::IDENTITY {
        return Ok((zi, zr, scale));
    }
    let (a, b) = (f64::from(step.a), f64::from(step.b));
    let (zi2, zr2) = super::pixel_map::split_offset((f64::from(zi) + f64::from(zr) - b) / a)?;
    Ok((zi2, zr2, super::to_f32_checked(f64::from(scale) * a)?))
}

impl FrameConverter<'_> {
    /// Converts a raw frame of counts to object temperature in K through the correction
    /// (two-point maps, drift step, bad-pixel replacement) and the converter's scene and
    /// table, in one pass: per strip of 256 pixels, corrected counts x = G_ij n_ij + O_ij
    /// go straight into the scene stage (the drift step x' = a x + b folded into its
    /// coefficients once per frame) and the converter's batch kernel; no corrected frame
    /// is stored.
    ///
    /// A good pixel with raw counts at a rail is dead or saturated (the rails of the
    /// converter apply to the raw counts). A bad pixel takes the mean corrected counts of
    /// its good, in-rail 8-neighbours; with none it comes out NaN and is counted as dead
    /// and in `bad_unreplaced`. Everything else is as [`FrameConverter::convert_counts`]
    /// (uniform scene; the emissivity-map path is not fused). Rails are carried through
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
    /// README): about 25 % more instructions than [`FrameConverter::convert_counts`].
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
        if counts.len() != kelvin.len() || counts.len() != correction.gain.len() {
            return Err(Error::FrameLengthMismatch);
        }
        let state = self.state();
        let table = self.table();
        let lookup = Lookup::new(&state.geometry, table.rows);
        let map = state.map;
        let (dead, saturated) = (state.rails.dead_counts, state.rails.saturation_counts);
        let mut summary = CorrectedSummary {
            frame: FrameSummary {
                pixels: counts.len() as u64,
                ..FrameSummary::default()
            },
            ..CorrectedSummary::default()
        };
        let mut strip = [0.0f32; STRIP];
        let (deadf, satf) = (f32::from(dead), f32::from(saturated));
        // The drift step x' = a x + b folded into the scene stage's counts coefficients
        // (exactly the plain path's for the identity step): L = ((x - z_int) - z_rem) s
        // with z = (z_int + z_rem - b) / a and s = a * scale, formed in f64.
        let (zero_int, zero_rem, scale) = fold_step(&map, correction.step)?;
        let mut start = 0usize;
        for ((n_block, k_block), ((g_block, o_block), bad_block)) in
            counts.chunks(STRIP).zip(kelvin.chunks_mut(STRIP)).zip(
                correction
                    .gain
                    .chunks(STRIP)
                    .zip(correction.offset.chunks(STRIP))
                    .zip(correction.bad.chunks(STRIP)),
            )
        {
            let Some(strip) = strip.get_mut(..n_block.len()) else {
                continue;
            };
            // Correction and scene stage: vectorisable, branch-free. The OR of the strip's
            // bad-pixel bytes rides along, so strips without a bad pixel are never scanned.
            // Rails are marked with infinities (an in-range signal is finite), which the
            // table kernel rejects and the classification below reads back; constant
            // selects keep the loop vectorised.
            for (s, ((&n, &g), &o)) in strip
                .iter_mut()
                .zip(n_block.iter().zip(g_block).zip(o_block))
            {
                let x = f32::from(n);
                let l = ((g * x + o - zero_int) - zero_rem) * scale;
                let l = if x <= deadf { f32::NEG_INFINITY } else { l };
                *s = if x >= satf { f32::INFINITY } else { l };
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
                    if let Some(s) = strip.get_mut(local) {
                        *s = if let Some(x) = replaced {
                            summary.bad_replaced += 1;
                            ((x - zero_int) - zero_rem) * scale
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
                None,
                k_block,
                &mut summary.frame,
                #[inline(always)]
                |s: f32, _| (lookup.in_range(s), s),
                |s: f32, _| {
                    if s == f32::NEG_INFINITY {
                        PixelStatus::Dead
                    } else if s == f32::INFINITY {
                        PixelStatus::Saturated
                    } else {
                        lookup.classify(s)
                    }
                },
            );
            start += n_block.len();
        }
        summary.frame.converted = summary.frame.pixels - summary.frame.failed();
        Ok(summary)
    }
}
