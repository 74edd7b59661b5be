//! Figures of merit from calibration stacks: temporal noise and NETD, spatial
//! non-uniformity with the EMVA 1288 correction for temporal noise, and the residual
//! fixed-pattern noise after NUC in kelvin.
//!
//! # Definitions (EMVA Standard 1288, Release 4.0, open standard)
//!
//! For a stack of L frames of an M x N sensor with per-pixel means `<y>_p`:
//!
//! ```text
//! temporal variance    sigma_y^2 = mean over pixels of the pixels' temporal variance
//! spatial variance     s_y,meas^2 = 1/(MN - 1) sum_p (<y>_p - mu_y)^2
//!                      s_y^2      = s_y,meas^2 - sigma_y^2 / L
//! DSNU (counts)        sqrt(s_y,dark^2)
//! PRNU                 sqrt(s_y,50^2 - s_y,dark^2) / (mu_y,50 - mu_y,dark)
//! ```
//!
//! The correction removes the temporal noise still present in the averaged frame; the
//! standard states DSNU in electrons (divide by the system gain K); here it stays in
//! counts. The temporal variance is the unbiased per-pixel stack variance averaged over
//! the pixels (the standard's two-frame difference estimator gives the same expectation).
//! Temporal NETD is sigma_y / (dx/dT) at the scene temperature, with dx/dT = R L'(T).
//! Pixels flagged bad are left out everywhere.

use super::nonuniformity::StackStats;
use crate::error::{Error, Result};

/// Spatial statistics of a stack's mean frame over the good pixels.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SpatialStats {
    /// mu_y, mean over the good pixels of the per-pixel means.
    pub mean: f64,
    /// sigma_y^2, the mean temporal variance per frame (counts^2).
    pub temporal_variance: f64,
    /// s_y,meas^2, spatial variance of the averaged frame (counts^2).
    pub spatial_variance_measured: f64,
    /// s_y^2 = s_y,meas^2 - sigma_y^2 / L (may come out negative by chance for a very
    /// uniform array; it is reported as computed).
    pub spatial_variance: f64,
    /// Good pixels used.
    pub pixels: u64,
}

/// Spatial statistics (EMVA 1288 R4.0) of a stack of at least two frames, over the pixels
/// whose `bad` byte is 0, after the per-pixel affine map x = G y + O when `maps` is given
/// (the residual non-uniformity after NUC; the temporal variance then scales by G^2).
///
/// # Errors
/// [`Error::NucStackEmpty`] for fewer than two frames, [`Error::FrameLengthMismatch`],
/// [`Error::MeritInputInvalid`] for fewer than two good pixels or a negative stored sum of
/// squared deviations at a good pixel, [`Error::NonFinite`].
pub fn spatial_stats(
    stack: &StackStats<'_>,
    bad: Option<&[u8]>,
    maps: Option<(&[f32], &[f32])>,
) -> Result<SpatialStats> {
    let len = stack.len();
    if bad.is_some_and(|b| b.len() != len)
        || maps.is_some_and(|(g, o)| g.len() != len || o.len() != len)
    {
        return Err(Error::FrameLengthMismatch);
    }
    if stack.frames < 2 {
        return Err(Error::NucStackEmpty);
    }
    // A stored sum of squared deviations below 0 at a good pixel is not a stack's (the
    // stack update refuses it the same way): it would give a negative temporal variance.
    let good = |p: usize| bad.and_then(|b| b.get(p)).is_none_or(|&f| f == 0);
    if stack
        .m2
        .iter()
        .enumerate()
        .any(|(p, &m2)| good(p) && m2 < 0.0)
    {
        return Err(Error::MeritInputInvalid);
    }
    let frames = f64::from(stack.frames);
    let pixel = |p: usize| -> Option<(f64, f64)> {
        if bad.and_then(|b| b.get(p)).is_some_and(|&f| f != 0) {
            return None;
        }
        let m = *stack.mean.get(p)?;
        let v = stack.m2.get(p)? / (frames - 1.0);
        match maps {
            None => Some((m, v)),
            Some((g, o)) => {
                let (g, o) = (f64::from(*g.get(p)?), f64::from(*o.get(p)?));
                Some((g * m + o, g * g * v))
            }
        }
    };
    let (mut n, mut mean, mut m2, mut temporal) = (0u64, 0.0f64, 0.0f64, 0.0f64);
    for (x, v) in (0..len).filter_map(pixel) {
        n += 1;
        #[allow(clippy::cast_precision_loss)]
        let w = 1.0 / n as f64;
        let delta = x - mean;
        mean += delta * w;
        m2 += delta * (x - mean);
        temporal += (v - temporal) * w;
    }
    if n < 2 {
        return Err(Error::MeritInputInvalid);
    }
    #[allow(clippy::cast_precision_loss)]
    let measured = m2 / (n - 1) as f64;
    let stats = SpatialStats {
        mean,
        temporal_variance: temporal,
        spatial_variance_measured: measured,
        spatial_variance: measured - temporal / frames,
        pixels: n,
    };
    if [mean, temporal, measured].iter().all(|v| v.is_finite()) {
        Ok(stats)
    } else {
        Err(Error::NonFinite)
    }
}

/// DSNU in counts (EMVA 1288 R4.0): sqrt of the corrected spatial variance of a dark
/// stack, clamped at 0 only where chance made the corrected variance negative (reported
/// as 0: the array is uniform within the measurement's resolution).
#[must_use]
pub fn dsnu_counts(dark: &SpatialStats) -> f64 {
    libm::sqrt(dark.spatial_variance.max(0.0))
}

/// PRNU, a fraction (EMVA 1288 R4.0): sqrt(s_50^2 - s_dark^2) / (mu_50 - mu_dark).
///
/// # Errors
/// [`Error::MeritInputInvalid`] unless the bright mean exceeds the dark mean.
pub fn prnu(dark: &SpatialStats, bright: &SpatialStats) -> Result<f64> {
    let span = bright.mean - dark.mean;
    if !(span > 0.0) {
        return Err(Error::MeritInputInvalid);
    }
    Ok(libm::sqrt((bright.spatial_variance - dark.spatial_variance).max(0.0)) / span)
}

/// Temporal NETD, K: sqrt(`temporal_variance`) / `responsivity_counts_per_k` (the slope
/// dx/dT of the pixel at the scene temperature, e.g. R L'(T) from
/// [`crate::frame::DriftModel::at`] and the curve's derivative).
///
/// # Errors
/// [`Error::MeritInputInvalid`] for a negative variance, a responsivity that is not
/// finite and positive, or a quotient that overflows; [`Error::NonFinite`].
pub fn netd_k(temporal_variance: f64, responsivity_counts_per_k: f64) -> Result<f64> {
    if temporal_variance.is_nan() || responsivity_counts_per_k.is_nan() {
        return Err(Error::NonFinite);
    }
    let variance_ok = temporal_variance >= 0.0 && temporal_variance.is_finite();
    let slope_ok = responsivity_counts_per_k > 0.0 && responsivity_counts_per_k.is_finite();
    if !(variance_ok && slope_ok) {
        return Err(Error::MeritInputInvalid);
    }
    let netd = libm::sqrt(temporal_variance) / responsivity_counts_per_k;
    if netd.is_finite() {
        Ok(netd)
    } else {
        // A subnormal responsivity: the quotient overflows.
        Err(Error::MeritInputInvalid)
    }
}

/// Residual fixed-pattern noise, K: sqrt of the corrected spatial variance (clamped at 0
/// as in [`dsnu_counts`]) over the responsivity dx/dT.
///
/// # Errors
/// As [`netd_k`].
pub fn fpn_k(stats: &SpatialStats, responsivity_counts_per_k: f64) -> Result<f64> {
    netd_k(stats.spatial_variance.max(0.0), responsivity_counts_per_k)
}
