//! Spectral moments of a band and the published first-order estimates of the
//! Sakuma-Hattori A and B from them; effective wavelengths and the sensitivity of a
//! calibration to the band's wavelength and width.

use crate::band::{Band, SignalCurve};
use crate::constants::C2_UMK;
use crate::error::{check_temperature_k, finite, Error, Result};
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

/// Limit effective wavelength of an instrument at `temperature_k`, um:
///
/// ```text
/// 1/lambda_T = (T^2 / c2) d ln S / dT
/// ```
///
/// the wavelength of a line instrument (Wien approximation) whose signal changes with
/// temperature as this one's does at T. For a Sakuma-Hattori curve (Wien form) it is
/// lambda_T = A + 2B/T + B^2/(A T^2) exactly; for a [`Band`], it uses the band's exact
/// dL/dT (so it includes the departure from Wien at long lambda T). Definitions as in the
/// CCT-WG5 uncertainty guidance for radiation thermometers (from memory).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], errors of `curve`.
pub fn limit_effective_wavelength_um<C: SignalCurve + ?Sized>(
    curve: &C,
    temperature_k: f64,
) -> Result<f64> {
    let t = check_temperature_k(temperature_k)?;
    let (signal, slope) = curve.signal_and_derivative(t)?;
    // c2 (S / S') / T / T: S/S' is of order T, so no intermediate overflows (T^2 S'
    // overflowed to infinity for T near 1e74 and gave a wavelength of 0).
    finite(C2_UMK * (signal / slope) / t / t)
}

/// Mean effective wavelength between `t1_k` and `t2_k`, um:
///
/// ```text
/// lambda_12 = c2 (1/T1 - 1/T2) / ln(S(T2)/S(T1))
/// ```
///
/// the line wavelength (Wien approximation) whose signal ratio over [T1, T2] equals the
/// instrument's; it tends to the limit effective wavelength as T2 -> T1.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
/// [`Error::CalibrationDuplicateTemperature`] when T1 = T2 (or so close, at temperatures so
/// high, that 1/T1 - 1/T2 underflows), errors of `curve`.
pub fn mean_effective_wavelength_um<C: SignalCurve + ?Sized>(
    curve: &C,
    t1_k: f64,
    t2_k: f64,
) -> Result<f64> {
    let t1 = check_temperature_k(t1_k)?;
    let t2 = check_temperature_k(t2_k)?;
    if t1 == t2 {
        return Err(Error::CalibrationDuplicateTemperature);
    }
    let s1 = curve.signal(t1)?;
    let s2 = curve.signal(t2)?;
    // (1/T1 - 1/T2) = (T2 - T1)/T1/T2, free of cancellation, and divided in turn so that
    // T1 T2 cannot overflow; ln(S2/S1) as the difference of logarithms when the quotient
    // over- or underflows (S2/S1 = inf gave a wavelength of 0).
    let q = s2 / s1;
    let log_ratio = if q.is_normal() {
        libm::log(q)
    } else {
        libm::log(s2) - libm::log(s1)
    };
    let lambda = finite(C2_UMK * ((t2 - t1) / t1 / t2) / log_ratio)?;
    if lambda > 0.0 {
        Ok(lambda)
    } else {
        // 1/T1 - 1/T2 underflowed: the two temperatures are one at double precision.
        Err(Error::CalibrationDuplicateTemperature)
    }
}

/// Sensitivity of the measured temperature to the effective wavelength, one-point
/// calibration at `calibration_k` (T1), in K per um, at `temperature_k` (T):
///
/// ```text
/// dT/dlambda = (1 - T/T1) T / lambda
/// ```
///
/// Model (Wien approximation, line instrument): the instrument converts the signal ratio
/// S/S1 = exp((c2/lambda)(1/T1 - 1/T)) to temperature with an assumed `wavelength_um`;
/// if its true effective wavelength is longer by dlambda, it reads dT = (dT/dlambda)
/// dlambda (negative above T1, positive below: a longer wavelength makes the ratio rise
/// more slowly). Zero at T = T1, where the calibration pins the reading. Check: 1 nm at
/// 650 nm, T1 = 1234.93 K (the silver point), T = 2000 K: -1.906 K (CCT-WG5 guidance
/// for radiation thermometers, cited from memory; recomputed in
/// `tools/refgen/calibration_sensitivity_refs.py`).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
/// [`Error::WavelengthNotPositive`].
pub fn one_point_wavelength_sensitivity(
    wavelength_um: f64,
    calibration_k: f64,
    temperature_k: f64,
) -> Result<f64> {
    let t1 = check_temperature_k(calibration_k)?;
    let t = check_temperature_k(temperature_k)?;
    if !(finite(wavelength_um)? > 0.0) {
        return Err(Error::WavelengthNotPositive);
    }
    finite((t1 - t) / t1 * t / wavelength_um)
}

/// Sensitivity of the measured temperature to the band's standard deviation sigma
/// (um), two-point calibration at `t1_k` and `t2_k`, in K per um, at `temperature_k`.
///
/// Model: the Sakuma-Hattori curve (Wien form) S = C exp(-c2/(A T + B)) with
/// B = c2 sigma^2 / (2 lambda0^2) taken from the band's moments and A, C fitted through
/// the two calibration points. An error dsigma moves B by dB = c2 sigma dsigma / lambda0^2;
/// A and C re-fit to the same two signals, and the reading at T moves by
///
/// ```text
/// X_i = A T_i + B,  A' = dA/dB = (1/X1^2 - 1/X2^2) / (T2/X2^2 - T1/X1^2)
/// dT/dB = [ X^2 (A' T1 + 1) / X1^2 - A' T - 1 ] / A,      dT/dsigma = dT/dB dB/dsigma
/// ```
///
/// (implicit differentiation of 1/X1 - 1/X2 and 1/X1 - 1/X fixed by the signals; derived
/// here, checked against an explicit two-point solve with mpmath in
/// `tools/refgen/calibration_sensitivity_refs.py`). Zero at T1 and T2; the estimate's A
/// is A = lambda0 (1 - 6 sigma^2/lambda0^2) ([`moment_estimate`], energy detector).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], [`Error::MomentsInvalid`]
/// for a mean that is not positive or a variance below zero,
/// [`Error::CalibrationDuplicateTemperature`] when T1 = T2.
pub fn two_point_sigma_sensitivity(
    moments: SpectralMoments,
    t1_k: f64,
    t2_k: f64,
    temperature_k: f64,
) -> Result<f64> {
    let lambda0 = finite(moments.mean_um)?;
    let variance = finite(moments.variance_um2)?;
    if !(lambda0 > 0.0 && variance >= 0.0) {
        return Err(Error::MomentsInvalid);
    }
    let t1 = check_temperature_k(t1_k)?;
    let t2 = check_temperature_k(t2_k)?;
    let t = check_temperature_k(temperature_k)?;
    if t1 == t2 {
        return Err(Error::CalibrationDuplicateTemperature);
    }
    let estimate = moment_estimate(moments, Detector::Energy);
    let (a, b) = (estimate.a_um, estimate.b_umk);
    let (x1, x2, x) = (a * t1 + b, a * t2 + b, a * t + b);
    let (w1, w2) = (1.0 / (x1 * x1), 1.0 / (x2 * x2));
    let a_prime = (w1 - w2) / (t2 * w2 - t1 * w1);
    let dt_db = (x * x * (a_prime * t1 + 1.0) * w1 - a_prime * t - 1.0) / a;
    let sigma = libm::sqrt(variance);
    finite(dt_db * C2_UMK * sigma / (lambda0 * lambda0))
}
