//! Bad pixels: detection from the two calibration stacks, a one-byte-per-pixel map in
//! caller storage, and replacement by the mean of the good neighbours (done inside the
//! fused conversion, [`FrameConverter::convert_counts_corrected`](crate::frame::FrameConverter::convert_counts_corrected)).
//!
//! # Rules (common practice; no standard sets them)
//!
//! With d = S_H - S_L the pixel's response between the two flat-field levels, sigma_t its
//! temporal standard deviation (the larger of the two levels), med() the median over the
//! array and rsd() the robust standard deviation 1.4826 * median absolute deviation (the
//! factor makes it the standard deviation of a normal population):
//!
//! | flag                 | rule                                               |
//! |----------------------|----------------------------------------------------|
//! | [`BAD_STUCK`]        | d <= `stuck_fraction` * med(d): does not respond   |
//! | [`BAD_GAIN`]         | abs(d - med(d)) > `k_sigma` * rsd(d)               |
//! | [`BAD_OFFSET`]       | abs(S_L - med(S_L)) > `k_sigma` * rsd(S_L)         |
//! | [`BAD_NOISY`]        | sigma_t > `noise_factor` * med(sigma_t)            |
//!
//! Detection ORs these flags into the map and keeps the flags already there (set
//! [`BAD_USER`] for pixels known bad from elsewhere). A pixel is bad when its byte is
//! nonzero. Thresholds of 5 robust sigmas and 3x the median noise are common starting
//! points; the right values depend on the detector and should be checked on its data.
//! A robust sigma of zero (more than half the array exactly at the median, as in
//! noise-free synthetic frames) flags every pixel that differs from the median at all.

use super::nonuniformity::{Correction, StackStats};
use crate::error::{Error, Result};

/// Flag: the pixel does not respond between the two levels (stuck or dead).
pub const BAD_STUCK: u8 = 1;
/// Flag: response (gain) outside `k_sigma` robust sigmas of the median.
pub const BAD_GAIN: u8 = 2;
/// Flag: low-level signal (offset) outside `k_sigma` robust sigmas of the median.
pub const BAD_OFFSET: u8 = 4;
/// Flag: temporal noise above `noise_factor` times the median.
pub const BAD_NOISY: u8 = 8;
/// Flag: the pixel's multi-point flat-field levels do not increase strictly (set by
/// [`crate::frame::multi_point`]).
pub const BAD_ORDER: u8 = 16;
/// Flag: set by the caller (known bad from elsewhere); never set by detection.
pub const BAD_USER: u8 = 128;

/// Thresholds of the detection rules (see the module docs).
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct BadPixelRules {
    /// Robust sigmas beyond which response or offset is bad (e.g. 5).
    pub k_sigma: f64,
    /// Multiple of the median temporal sigma beyond which a pixel is noisy (e.g. 3).
    pub noise_factor: f64,
    /// Fraction of the median response at or below which a pixel is stuck (e.g. 0.2).
    pub stuck_fraction: f64,
}

impl Default for BadPixelRules {
    /// 5 robust sigmas, 3x the median noise, 20 % of the median response.
    fn default() -> Self {
        BadPixelRules {
            k_sigma: 5.0,
            noise_factor: 3.0,
            stuck_fraction: 0.2,
        }
    }
}

impl BadPixelRules {
    fn check(&self) -> Result<()> {
        let ok = |v: f64| v.is_finite() && v > 0.0;
        if ok(self.k_sigma) && ok(self.noise_factor) && ok(self.stuck_fraction) {
            Ok(())
        } else {
            Err(Error::BadPixelRulesInvalid)
        }
    }
}

/// How many pixels each rule flagged (a pixel may be counted under several) and how many
/// are bad in the map afterwards (any flag, including earlier ones).
#[repr(C)]
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct BadPixelReport {
    /// [`BAD_STUCK`] pixels found.
    pub stuck: u64,
    /// [`BAD_GAIN`] pixels found.
    pub gain: u64,
    /// [`BAD_OFFSET`] pixels found.
    pub offset: u64,
    /// [`BAD_NOISY`] pixels found.
    pub noisy: u64,
    /// Pixels with a nonzero byte in the map after detection.
    pub bad: u64,
}

/// Median and robust standard deviation (1.4826 MAD) of `values`, using `scratch` (same
/// length) as working storage.
fn robust(values: impl Iterator<Item = f64>, scratch: &mut [f32]) -> (f64, f64) {
    for (s, v) in scratch.iter_mut().zip(values) {
        *s = super::to_f32(v);
    }
    let med = median(scratch);
    for s in scratch.iter_mut() {
        *s = (*s - super::to_f32(med)).abs();
    }
    (med, 1.482_602_218_505_602 * median(scratch))
}

/// Median of a non-empty slice (mean of the two middle values for an even length),
/// reordering it.
fn median(values: &mut [f32]) -> f64 {
    let n = values.len();
    if n == 0 {
        return f64::NAN;
    }
    // A selection (introselect, O(n) on average, no panic path), not a full sort: five
    // full heapsorts of a 1280 x 1024 frame took about 0.2 s on the host.
    crate::sort::select_nth_by(values, n / 2, |a, b| a.total_cmp(&b).is_lt());
    let upper = values.get(n / 2).copied().unwrap_or(f32::NAN);
    if n % 2 == 1 {
        return f64::from(upper);
    }
    // After the selection every value before n / 2 is at most `upper`: the lower middle
    // value is their maximum.
    let lower = values
        .get(..n / 2)
        .and_then(|below| {
            below
                .iter()
                .copied()
                .reduce(|a, b| if a.total_cmp(&b).is_lt() { b } else { a })
        })
        .unwrap_or(upper);
    0.5 * (f64::from(lower) + f64::from(upper))
}

/// Flags bad pixels from the averaged low- and high-level flat-field stacks (each of at
/// least two frames) by the rules of the module docs, OR-ing flags into `bad`.
/// `scratch` (one f32 per pixel) is working storage for the medians.
///
/// # Errors
/// [`Error::FrameLengthMismatch`]; [`Error::NucStackEmpty`] for a stack of fewer than two
/// frames (no temporal noise); [`Error::BadPixelRulesInvalid`]; [`Error::NonFinite`] for a
/// non-finite statistic. On error `bad` is untouched.
pub fn detect_bad_pixels(
    low: &StackStats<'_>,
    high: &StackStats<'_>,
    rules: &BadPixelRules,
    scratch: &mut [f32],
    bad: &mut [u8],
) -> Result<BadPixelReport> {
    rules.check()?;
    let len = low.len();
    if high.len() != len || scratch.len() != len || bad.len() != len {
        return Err(Error::FrameLengthMismatch);
    }
    if low.frames() < 2 || high.frames() < 2 {
        return Err(Error::NucStackEmpty);
    }
    let finite = low
        .mean
        .iter()
        .chain(high.mean)
        .chain(low.m2)
        .chain(high.m2)
        .all(|v| v.is_finite());
    if !finite {
        return Err(Error::NonFinite);
    }
    let response = |p: usize| {
        high.mean.get(p).copied().unwrap_or(f64::NAN) - low.mean.get(p).copied().unwrap_or(f64::NAN)
    };
    let sigma = |p: usize| {
        libm::sqrt(
            low.variance(p)
                .unwrap_or(0.0)
                .max(high.variance(p).unwrap_or(0.0)),
        )
    };
    let (d_med, d_rsd) = robust((0..len).map(response), scratch);
    let (o_med, o_rsd) = robust(low.mean.iter().copied(), scratch);
    for (s, p) in scratch.iter_mut().zip(0..len) {
        *s = super::to_f32(sigma(p));
    }
    let noise_med = median(scratch);
    let mut report = BadPixelReport::default();
    for (p, b) in bad.iter_mut().enumerate() {
        let d = response(p);
        let o = low.mean.get(p).copied().unwrap_or(f64::NAN);
        let mut flags = 0u8;
        if !(d > rules.stuck_fraction * d_med) {
            flags |= BAD_STUCK;
            report.stuck += 1;
        }
        if libm::fabs(d - d_med) > rules.k_sigma * d_rsd {
            flags |= BAD_GAIN;
            report.gain += 1;
        }
        if libm::fabs(o - o_med) > rules.k_sigma * o_rsd {
            flags |= BAD_OFFSET;
            report.offset += 1;
        }
        if sigma(p) > rules.noise_factor * noise_med {
            flags |= BAD_NOISY;
            report.noisy += 1;
        }
        *b |= flags;
        if *b != 0 {
            report.bad += 1;
        }
    }
    Ok(report)
}

/// Mean corrected counts x = G n + O (before the drift step) of the good 8-neighbours of pixel `p` whose raw counts are
/// strictly between the rails; None if there is none.
pub(super) fn replacement_mean(
    correction: &Correction<'_>,
    counts: &[u16],
    p: usize,
    dead: u16,
    saturated: u16,
) -> Option<f32> {
    let width = correction.width();
    // `Correction::new` refuses a zero width; the early return says so to the compiler,
    // which removes the division-by-zero panic path.
    if width == 0 {
        return None;
    }
    let bad = correction.bad();
    let height = counts.len() / width;
    let (row, col) = (p / width, p % width);
    let mut sum = 0.0f32;
    let mut used = 0u32;
    for r in row.saturating_sub(1)..=(row + 1).min(height.saturating_sub(1)) {
        for c in col.saturating_sub(1)..=(col + 1).min(width - 1) {
            let q = r * width + c;
            if q == p || bad.get(q).is_none_or(|&f| f != 0) {
                continue;
            }
            let Some(&n) = counts.get(q) else { continue };
            if n <= dead || n >= saturated {
                continue;
            }
            sum += correction.corrected(q, n);
            used += 1;
        }
    }
    #[allow(clippy::cast_precision_loss)]
    (used > 0).then(|| sum / used as f32)
}

#[cfg(test)]
mod tests {
    extern crate std;
    use super::median;
    use crate::test_rng::Lcg;
    use std::vec::Vec;

    /// The median by selection against the median of a full sort (core's sort), the
    /// mean of the two middle values for an even length: pseudo-random data with ties
    /// (a linear congruential generator, Knuth's MMIX constants) of every length up to
    /// 300, and long constant, sorted and two-valued frames.
    #[test]
    fn median_agrees_with_full_sort() {
        let mut rng = Lcg(3);
        let mut inputs: Vec<Vec<f32>> = (1..300)
            .map(|len| {
                (0..len)
                    .map(|_| f32::from(u16::try_from((rng.step() >> 33) % 41).unwrap()) - 20.0)
                    .collect()
            })
            .collect();
        inputs.push(std::vec![1000.5; 65_536]);
        inputs.push(
            (0..65_537u32)
                .map(|i| f32::from(u16::try_from(i % 60_000).unwrap()))
                .collect(),
        );
        inputs.push(
            (0..65_536u32)
                .map(|i| f32::from(u8::from(i % 2 == 0)))
                .collect(),
        );
        for data in inputs {
            let mut sorted = data.clone();
            sorted.sort_by(f32::total_cmp);
            let n = sorted.len();
            let expected = if n % 2 == 1 {
                f64::from(sorted[n / 2])
            } else {
                0.5 * (f64::from(sorted[n / 2 - 1]) + f64::from(sorted[n / 2]))
            };
            let mut work = data.clone();
            let got = median(&mut work);
            assert_eq!(got.to_bits(), expected.to_bits(), "length {n}");
        }
    }
}
