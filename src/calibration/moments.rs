//! Spectral moments of a band and the published first-order estimates of the
//! Sakuma-Hattori A and B from them.

use crate::band::Band;
use crate::constants::C2_UMK;
use crate::error::{Error, Result};
use crate::planck::Detector;

/// Mean and variance of a band's relative spectral response over wavelength.
///
/// ```text
/// lambda0 = integral r(l) l dl / integral r(l) dl
/// sigma^2 = integral r(l) (l - lambda0)^2 dl / integral r(l) dl
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SpectralMoments {
    /// lambda0, um.
    pub mean_um: f64,
    /// sigma^2, um^2.
    pub variance_um2: f64,
}

/// First-order Sakuma-Hattori parameters from a band's spectral moments.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MomentEstimate {
    /// A, um.
    pub a_um: f64,
    /// B, um K.
    pub b_umk: f64,
}

/// The spectral moments of `band`: for a rectangular band lambda0 = (lo + hi)/2 and
/// sigma^2 = (hi - lo)^2/12; for a tabulated response the integrals of the
/// piecewise-linear response over the band (the overlap with the table) are exact
/// (Simpson's rule on each segment, exact for the cubic integrands).
///
/// # Errors
/// [`Error::BandEmpty`] if the response integrates to zero (cannot happen for a
/// validated [`Band`]).
pub fn spectral_moments(band: &Band<'_>) -> Result<SpectralMoments> {
    let lo = band.lo_um();
    let hi = band.hi_um();
    let Some(table) = band.response() else {
        let width = hi - lo;
        return Ok(SpectralMoments {
            mean_um: 0.5 * (lo + hi),
            variance_um2: width * width / 12.0,
        });
    };
    // Moments about the band centre keep the variance free of cancellation.
    let centre = 0.5 * (lo + hi);
    let mut m = [0.0_f64; 3];
    let mut add_segment = |w0: f64, w1: f64| {
        if w1 <= w0 {
            return;
        }
        let (v0, v1) = (table.value_at(w0), table.value_at(w1));
        let vm = 0.5 * (v0 + v1);
        let (d0, d1, dm) = (w0 - centre, w1 - centre, 0.5 * (w0 + w1) - centre);
        let h = (w1 - w0) / 6.0;
        m[0] += h * (v0 + 4.0 * vm + v1);
        m[1] += h * (v0 * d0 + 4.0 * vm * dm + v1 * d1);
        m[2] += h * (v0 * d0 * d0 + 4.0 * vm * dm * dm + v1 * d1 * d1);
    };
    let mut previous = lo;
    for &node in table.wavelengths_um() {
        if node > lo && node < hi {
            add_segment(previous, node);
            previous = node;
        }
    }
    add_segment(previous, hi);
    if !(m[0] > 0.0) {
        return Err(Error::BandEmpty);
    }
    let shift = m[1] / m[0];
    Ok(SpectralMoments {
        mean_um: centre + shift,
        variance_um2: (m[2] / m[0] - shift * shift).max(0.0),
    })
}

/// The first-order estimates of A and B from a band's spectral moments (Saunders and
/// White 2003, "Physical basis of interpolation equations for radiation thermometry",
/// Metrologia 40, 195-203, cited from memory):
///
/// ```text
/// A = lambda0 (1 - k sigma^2 / lambda0^2)        B = c2 sigma^2 / (2 lambda0^2)
/// ```
///
/// with k = 6 for an energy detector. They follow from expanding the Wien-approximation
/// band signal in the cumulants of 1/lambda under the weight r(lambda) lambda^-5; for a
/// photon detector the weight is r(lambda) lambda^-4 and the same expansion gives k = 5
/// (derived here, not taken from the paper). lambda0 in um, sigma^2 in um^2.
///
/// Accuracy: first order in sigma^2/lambda0^2 and exact only in the Wien limit; a start
/// for [`super::fit_band`], not a calibration. Where the published A would fall below
/// lambda0/2 (bands wider than about 0.6 lambda0) the equivalent first-order form
/// A = lambda0 / (1 + k sigma^2/lambda0^2) is used instead, which stays positive.
#[must_use]
pub fn moment_estimate(moments: SpectralMoments, detector: Detector) -> MomentEstimate {
    let k = match detector {
        Detector::Energy => 6.0,
        Detector::Photon => 5.0,
    };
    let lambda0 = moments.mean_um;
    let relative = moments.variance_um2 / (lambda0 * lambda0);
    let factor = 1.0 - k * relative;
    let a_um = if factor >= 0.5 {
        lambda0 * factor
    } else {
        lambda0 / (1.0 + k * relative)
    };
    MomentEstimate {
        a_um,
        b_umk: C2_UMK * relative / 2.0,
    }
}
