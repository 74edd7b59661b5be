//! Multi-point non-uniformity correction: per-pixel piecewise-linear maps between N
//! averaged flat-field levels, the generalisation of two-point NUC.
//!
//! # Method (common practice)
//!
//! Correction from more than two flat-field sources to follow a non-linear pixel
//! response is treated by Schulz & Caldwell 1995, "Nonuniformity correction and
//! correctability of infrared focal plane arrays", Infrared Physics & Technology 36
//! (there by least-squares fits to the pixel responses; volume from memory). The
//! piecewise-linear form here, two-point correction (Perry & Dereniak 1993) applied
//! segment by segment between adjacent levels, is common practice ("multi-point NUC").
//!
//! With S_k,ij the time-averaged signal of pixel (i, j) viewing a uniform blackbody at
//! the k-th of N radiances (k = 0..N-1, increasing) and <S_k> the mean over the good
//! pixels, every pixel is mapped onto the array's response by linear interpolation
//! between its own levels:
//!
//! ```text
//! G_k,ij = (<S_k+1> - <S_k>) / (S_k+1,ij - S_k,ij)      (segment k = 0..N-2)
//! O_k,ij = <S_k> - G_k,ij S_k,ij
//! x_ij   = G_k,ij n_ij + O_k,ij,   k = the last segment with S_k,ij <= n_ij
//! ```
//!
//! Below S_1,ij the first segment applies and at or above S_N-2,ij the last one, so raw
//! counts outside the calibrated span are extrapolated with the end segments (as
//! two-point NUC extrapolates with its one segment). For N = 2 the maps are the
//! two-point maps of [`crate::frame::two_point`], bit for bit, over the same good pixels
//! (two-point refuses a pixel whose levels do not increase; this flags it).
//!
//! A pixel S = a + b L + c L^2 keeps on segment k the residual
//! G_k c (L - L_k)(L - L_k+1): zero at every level and -G_k c dL_k^2 / 4 at the segment's
//! midpoint (dL_k = L_k+1 - L_k), against -G c (L_H - L_L)^2 / 4 for two-point maps over
//! the whole span: N - 1 equal segments divide the residual by (N - 1)^2. A pixel linear
//! in radiance is corrected exactly (to f32 map rounding) for any N.
//!
//! # Storage
//!
//! The maps live in one caller buffer of [`multi_point_map_len`] = (3 N - 4) x pixels
//! floats, in planes of one f32 per pixel (row-major): N - 1 gain planes, N - 1 offset
//! planes, then N - 2 breakpoint planes holding S_1,ij .. S_N-2,ij (raw counts, the
//! interior levels). Plane-major storage keeps each pass of the fused conversion a
//! stream of contiguous f32 (vectorisable), and for N = 2 the buffer is the two-point
//! gain plane followed by the offset plane.

use super::bad_pixels::BAD_ORDER;
use super::nonuniformity::StackStats;
use crate::error::{Error, Result};

/// The most flat-field levels multi-point NUC accepts (the per-level sums live on the
/// stack; 16 levels already cost 44 floats per pixel of maps).
pub const MAX_NUC_LEVELS: usize = 16;

/// Floats of multi-point map storage for `levels` flat-field levels over `pixels` pixels:
/// (3 N - 4) x pixels.
///
/// # Errors
/// [`Error::NucLevelCount`] unless 2 <= `levels` <= [`MAX_NUC_LEVELS`];
/// [`Error::NucFrameEmpty`] for no pixels; [`Error::NucMapStorageMismatch`] if the size
/// overflows `usize`.
pub fn multi_point_map_len(levels: usize, pixels: usize) -> Result<usize> {
    if !(2..=MAX_NUC_LEVELS).contains(&levels) {
        return Err(Error::NucLevelCount);
    }
    if pixels == 0 {
        return Err(Error::NucFrameEmpty);
    }
    (3 * levels - 4)
        .checked_mul(pixels)
        .ok_or(Error::NucMapStorageMismatch)
}

/// What [`multi_point`] found.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MultiPointReport {
    /// Levels used, N.
    pub levels: usize,
    /// <S_k>, the array means of the levels over the good pixels (counts); the first
    /// `levels` entries are used, the rest are 0.
    pub level_means: [f64; MAX_NUC_LEVELS],
    /// Pixels that received maps (not flagged bad).
    pub good_pixels: u64,
    /// Pixels flagged [`BAD_ORDER`] by this call: levels not strictly increasing.
    pub order_flagged: u64,
}

/// Multi-point NUC maps from N >= 2 averaged flat-field stacks `levels` (in order of
/// increasing radiance), written into `maps` ([`multi_point_map_len`] floats; layout in
/// the module docs). `bad` (one byte per pixel, nonzero = bad) is read and updated: a
/// pixel not yet flagged whose levels do not increase strictly (S_k+1,ij > S_k,ij for
/// every k) gets [`BAD_ORDER`] and is counted in `order_flagged`; it is then replaced
/// by its neighbours in the conversion, like any bad pixel. Array means are over the
/// pixels left good. Bad pixels get G = 1, O = 0 and breakpoints 0 (never read).
///
/// Accuracy: the maps are computed in f64 and rounded to f32 (relative 6e-8), so a
/// linear pixel is corrected to within that rounding at every radiance; the breakpoints
/// are the levels rounded to f32 (exact for whole counts below 2^24).
///
/// # Errors
/// [`Error::NucLevelCount`] for fewer than 2 or more than [`MAX_NUC_LEVELS`] levels;
/// [`Error::FrameLengthMismatch`] unless every level and `bad` have one length;
/// [`Error::NucMapStorageMismatch`] if `maps` has the wrong length;
/// [`Error::NonFinite`] for a non-finite mean at a pixel not flagged bad;
/// [`Error::NucLevelsNotIncreasing`] if at least half of the pixels not flagged bad
/// beforehand have levels that do not increase (levels out of order, or two levels at
/// one radiance: a fault of the calibration, not of the pixels), or if the means over
/// the good pixels tie after rounding;
/// [`Error::NucNoGoodPixels`] if every pixel was flagged bad beforehand;
/// [`Error::FrameCoefficientOverflow`] if a good pixel's map does not fit an f32 (a
/// response far below an f32's range, or a gain that rounds to 0). On error `bad` and
/// `maps` are untouched.
pub fn multi_point(
    levels: &[StackStats<'_>],
    bad: &mut [u8],
    maps: &mut [f32],
) -> Result<MultiPointReport> {
    let n = levels.len();
    let Some(first) = levels.first() else {
        return Err(Error::NucLevelCount);
    };
    let pixels = first.len();
    let expected = multi_point_map_len(n, pixels)?;
    if levels.iter().any(|l| l.len() != pixels) || bad.len() != pixels {
        return Err(Error::FrameLengthMismatch);
    }
    if maps.len() != expected {
        return Err(Error::NucMapStorageMismatch);
    }
    let value = |k: usize, p: usize| {
        levels
            .get(k)
            .and_then(|l| l.mean.get(p))
            .copied()
            .unwrap_or(f64::NAN)
    };
    let increasing = |p: usize| (1..n).all(|k| value(k, p) > value(k - 1, p));
    // Pass 1, nothing written: finiteness, the order of each pixel's levels, and the sums
    // over the pixels that will stay good.
    let mut sums = [0.0f64; MAX_NUC_LEVELS];
    let (mut candidates, mut good, mut order_flagged) = (0u64, 0u64, 0u64);
    for (p, &flag) in bad.iter().enumerate() {
        if flag != 0 {
            continue;
        }
        if (0..n).any(|k| !value(k, p).is_finite()) {
            return Err(Error::NonFinite);
        }
        candidates += 1;
        if increasing(p) {
            good += 1;
            for (k, sum) in sums.iter_mut().take(n).enumerate() {
                *sum += value(k, p);
            }
        } else {
            order_flagged += 1;
        }
    }
    if candidates == 0 {
        return Err(Error::NucNoGoodPixels);
    }
    // Levels out of order, or two at one radiance, leave most pixels not increasing: a
    // fault of the calibration, not of the pixels.
    if good == 0 || order_flagged >= good {
        return Err(Error::NucLevelsNotIncreasing);
    }
    #[allow(clippy::cast_precision_loss)]
    let count = good as f64;
    let mut level_means = [0.0f64; MAX_NUC_LEVELS];
    for (m, &s) in level_means.iter_mut().zip(&sums).take(n) {
        *m = s / count;
    }
    let finite = level_means.iter().all(|m| m.is_finite());
    if !finite {
        return Err(Error::NonFinite);
    }
    if !(1..n).all(|k| level_means.get(k) > level_means.get(k - 1)) {
        return Err(Error::NucLevelsNotIncreasing);
    }
    // Every good pixel's maps must fit an f32 (a response of 1e-300 counts would not).
    for p in 0..pixels {
        if bad.get(p).is_some_and(|&f| f == 0) && increasing(p) {
            for k in 0..n - 1 {
                let (g, o, b) = segment_map(&level_means, value(k, p), value(k + 1, p), k);
                let fits = |v: f32| v.is_finite();
                if !(fits(g) && g > 0.0 && fits(o) && fits(super::to_f32(value(k, p))) && fits(b)) {
                    return Err(Error::FrameCoefficientOverflow);
                }
            }
        }
    }
    write_maps(levels, &level_means, bad, maps);
    Ok(MultiPointReport {
        levels: n,
        level_means,
        good_pixels: good,
        order_flagged,
    })
}

/// Pass 2 of [`multi_point`], after every check: flags and maps.
fn write_maps(
    levels: &[StackStats<'_>],
    level_means: &[f64; MAX_NUC_LEVELS],
    bad: &mut [u8],
    maps: &mut [f32],
) {
    let n = levels.len();
    let pixels = bad.len();
    let value = |k: usize, p: usize| {
        levels
            .get(k)
            .and_then(|l| l.mean.get(p))
            .copied()
            .unwrap_or(f64::NAN)
    };
    let increasing = |p: usize| (1..n).all(|k| value(k, p) > value(k - 1, p));
    let segments = n - 1;
    let Some((gain, rest)) = maps.split_at_mut_checked(segments * pixels) else {
        return;
    };
    let Some((offset, breaks)) = rest.split_at_mut_checked(segments * pixels) else {
        return;
    };
    for (p, flag) in bad.iter_mut().enumerate() {
        let good_pixel = *flag == 0 && increasing(p);
        if *flag == 0 && !good_pixel {
            *flag |= BAD_ORDER;
        }
        for k in 0..segments {
            let at = k * pixels + p;
            let (g, o) = if good_pixel {
                let (g, o, _) = segment_map(level_means, value(k, p), value(k + 1, p), k);
                (g, o)
            } else {
                (1.0, 0.0)
            };
            if let (Some(gs), Some(os)) = (gain.get_mut(at), offset.get_mut(at)) {
                *gs = g;
                *os = o;
            }
            if k >= 1 {
                if let Some(b) = breaks.get_mut((k - 1) * pixels + p) {
                    *b = if good_pixel {
                        super::to_f32(value(k, p))
                    } else {
                        0.0
                    };
                }
            }
        }
    }
}

/// Gain and offset of segment `k` for a pixel with levels `l` < `h`, and the upper
/// level as f32: two-point's arithmetic, term for term (N = 2 reproduces it exactly).
fn segment_map(level_means: &[f64; MAX_NUC_LEVELS], l: f64, h: f64, k: usize) -> (f32, f32, f32) {
    let ml = level_means.get(k).copied().unwrap_or(f64::NAN);
    let mh = level_means.get(k + 1).copied().unwrap_or(f64::NAN);
    let gp = (mh - ml) / (h - l);
    (
        super::to_f32(gp),
        super::to_f32(ml - gp * l),
        super::to_f32(h),
    )
}
