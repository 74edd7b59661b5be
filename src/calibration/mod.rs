//! Calibration of an instrument against blackbody references: the Sakuma-Hattori
//! equation, fitted to a band or to blackbody readings.
//!
//! # The curves
//!
//! Planck form ([`SakumaHattori`], the form fixed by the design contract):
//!
//! ```text
//! S(T) = C / (exp(c2 / (A T + B)) - 1)          T(S) = (c2 / ln(C/S + 1) - B) / A
//! ```
//!
//! Wien form ([`SakumaHattoriWien`]):
//!
//! ```text
//! S(T) = C exp(-c2 / (A T + B))                 T(S) = (c2 / ln(C/S) - B) / A
//! ```
//!
//! A in um, B in um K, C in signal units, T in K, c2 = 14387.768775... um K (CODATA 2018).
//! A T + B is the temperature-dependent effective wavelength times T: for a narrow band
//! A is close to the band's mean wavelength and B is small (see [`moment_estimate`]).
//! Both forms have a closed-form inverse, so firmware converts a signal to temperature
//! with one logarithm and one division.
//!
//! # Which form to use
//!
//! - The Planck form is the default. It reduces to Planck's law for a line band
//!   (B = 0), so it stays right where exp(-c2/(lambda T)) is not negligible: long
//!   wavelengths, low temperatures, thermal imagers (8-14 um at 250-500 K have
//!   c2/(lambda T) between 2 and 7, where dropping the "-1" costs kelvins). It is the
//!   form the CCT-WG5 uncertainty guidance for radiation thermometers below the silver
//!   point recommends (Fischer et al. 2008, Int. J. Thermophys. 29, 1066; from memory).
//! - The Wien form is for short-wavelength pyrometers (lambda T below about 3000 um K,
//!   so that exp(-c2/(lambda T)) < 1e-2: silicon and InGaAs pyrometers at 0.65-1.6 um up
//!   to 2000 K). There the two forms fit a band equally well (their interpolation errors
//!   differ by far less than a millikelvin, `tests/calibration_band.rs`), and the Wien
//!   form is the simpler one: ln S is exactly linear in 1/(A T + B), its inverse needs
//!   no log1p, and it is the form most short-wavelength literature and older pyrometer
//!   certificates quote. Its curve stops being a blackbody law at long wavelengths: do
//!   not use it for thermal imagers.
//!
//! # Fits
//!
//! - [`fit_band`]: A, B, C that reproduce an instrument's exact band radiance
//!   ([`crate::band::Band::radiance`]) over a temperature range, with the maximum
//!   temperature error measured on a dense grid.
//! - [`fit_points`]: A, B, C from n >= 3 blackbody readings, by Levenberg-Marquardt, with
//!   the parameter covariance and the residuals in kelvin.
//! - [`fit_points_with`] / [`fit_band_with`]: the same for either form and, for points,
//!   with a dark offset subtracted first ([`OffsetCurve`] applies it when converting).
//!
//! Nothing here allocates: the fits stream over the caller's slices and keep 3x3
//! matrices on the stack.
//!
//! # Example: calibrating from a handful of blackbody readings
//!
//! ```
//! use bandtemp::band::SignalCurve;
//! use bandtemp::calibration::{fit_points_with, OffsetCurve, SakumaHattori};
//!
//! // Invented readings of an invented 8-14 um thermometer: raw counts with the blackbody
//! // at five temperatures, and 1024 counts with the shutter closed (the dark offset).
//! let blackbody_k = [273.15, 298.15, 323.15, 373.15, 423.15];
//! let counts = [2420.0, 3144.0, 4056.0, 6452.0, 9581.0];
//! let dark = 1024.0;
//!
//! let fit = fit_points_with::<SakumaHattori>(&blackbody_k, &counts, None, dark)?;
//! // Whole counts: the residuals are the ADC's rounding, a few mK here.
//! assert!(fit.max_residual_k < 0.05);
//! let sd_a_um = fit.covariance[0][0].sqrt(); // standard uncertainty of A
//! assert!(sd_a_um < 0.1 * fit.params.a_um());
//!
//! // Firmware keeps three numbers and the offset, and converts both ways.
//! let curve = OffsetCurve::new(fit.params, dark)?;
//! let apparent_k = curve.temperature(5000.0)?;
//! assert!(apparent_k > 323.15 && apparent_k < 373.15);
//! assert!((curve.signal(apparent_k)? - 5000.0).abs() < 1e-9);
//! # Ok::<(), bandtemp::Error>(())
//! ```

mod fit;
mod moments;

pub use fit::{
    curve_residuals_k, fit_band, fit_band_with, fit_points, fit_points_with, residuals_k, BandFit,
    PointsFit, BAND_CHECK_POINTS, BAND_FIT_POINTS, MAX_FIT_ITERATIONS, MAX_FIT_POINTS,
};
pub use moments::{
    limit_effective_wavelength_um, mean_effective_wavelength_um, moment_estimate,
    one_point_wavelength_sensitivity, spectral_moments, two_point_sigma_sensitivity,
    MomentEstimate, SpectralMoments,
};

use crate::band::SignalCurve;
use crate::constants::C2_UMK;
use crate::error::{check_temperature_k, finite, Error, Result};

/// Sakuma-Hattori (Planck form) parameters: S(T) = C / (exp(c2/(A T + B)) - 1).
///
/// A in um, B in um K, C in signal units (the units of the signals it was fitted to;
/// W m^-2 sr^-1 when fitted to an energy band, photons s^-1 m^-2 sr^-1 to a photon band).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SakumaHattori {
    a_um: f64,
    b_umk: f64,
    c: f64,
}

/// Validates A > 0, finite B and C > 0, shared by both forms.
fn check_parameters(a_um: f64, b_umk: f64, c: f64) -> Result<()> {
    finite(a_um)?;
    finite(b_umk)?;
    finite(c)?;
    if a_um > 0.0 && c > 0.0 {
        Ok(())
    } else {
        Err(Error::CalibrationParameterInvalid)
    }
}

/// Checks a signal handed to a closed-form inverse: finite and positive.
fn check_signal(signal: f64) -> Result<f64> {
    if finite(signal)? > 0.0 {
        Ok(signal)
    } else {
        Err(Error::RadianceNotPositive)
    }
}

/// A T + B for a valid temperature, or [`Error::CalibrationOutOfDomain`] where it is not
/// positive.
fn effective_umk(a_um: f64, b_umk: f64, temperature_k: f64) -> Result<f64> {
    let t = check_temperature_k(temperature_k)?;
    let denominator = a_um * t + b_umk;
    if denominator > 0.0 && denominator.is_finite() {
        Ok(denominator)
    } else {
        Err(Error::CalibrationOutOfDomain)
    }
}

/// Beyond this y = c2/(A T + B), e^-y nears the subnormal range (it enters it at 708.4).
const DEEP_Y: f64 = 700.0;

/// C e^-y, through exp(ln C - y) beyond [`DEEP_Y`] so that no intermediate leaves the
/// normal range while the product is a normal double (C e^-y with e^-y subnormal lost its
/// digits, and C / expm1(y) with expm1(y) = inf gave 0 for a representable signal).
fn c_exp_neg(c: f64, y: f64) -> f64 {
    if y > DEEP_Y {
        libm::exp(libm::log(c) - y)
    } else {
        c * libm::exp(-y)
    }
}

/// ln(C / S) for positive C and S, also where C / S leaves the double range (ln C - ln S
/// then; C / S = inf made the inverse return T = -B/A, the edge of the curve's domain).
fn ln_ratio(c: f64, s: f64) -> f64 {
    let ratio = c / s;
    if ratio.is_finite() && ratio >= f64::MIN_POSITIVE {
        libm::log(ratio)
    } else {
        libm::log(c) - libm::log(s)
    }
}

/// A temperature from a closed-form inverse, if it is a positive finite number.
fn check_inverse(temperature_k: f64) -> Result<f64> {
    if temperature_k > 0.0 && temperature_k.is_finite() {
        Ok(temperature_k)
    } else {
        Err(Error::CalibrationOutOfDomain)
    }
}

impl SakumaHattori {
    /// Validates A > 0 (um), finite B (um K) and C > 0 (signal units).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::CalibrationParameterInvalid`].
    pub fn new(a_um: f64, b_umk: f64, c: f64) -> Result<Self> {
        check_parameters(a_um, b_umk, c)?;
        Ok(SakumaHattori { a_um, b_umk, c })
    }

    /// A, um.
    #[must_use]
    pub fn a_um(&self) -> f64 {
        self.a_um
    }
    /// B, um K.
    #[must_use]
    pub fn b_umk(&self) -> f64 {
        self.b_umk
    }
    /// C, signal units.
    #[must_use]
    pub fn c(&self) -> f64 {
        self.c
    }

    /// The same curve with C multiplied by `gain` > 0 (a detector gain change, or a
    /// conversion of signal units): S'(T) = gain S(T).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::CalibrationParameterInvalid`] unless the new C is
    /// positive and finite.
    pub fn scaled(&self, gain: f64) -> Result<Self> {
        SakumaHattori::new(self.a_um, self.b_umk, self.c * finite(gain)?)
    }
}

impl SignalCurve for SakumaHattori {
    /// S = C / (exp(y) - 1) and dS/dT = S A y e^y / ((A T + B)(e^y - 1)),
    /// y = c2/(A T + B). exp(y) - 1 is computed with expm1, so the relative error is a
    /// few ulp at any y.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
    /// [`Error::CalibrationOutOfDomain`] where A T + B <= 0,
    /// [`Error::RadianceUnderflow`] where the signal underflows.
    fn signal_and_derivative(&self, temperature_k: f64) -> Result<(f64, f64)> {
        let denominator = effective_umk(self.a_um, self.b_umk, temperature_k)?;
        let y = C2_UMK / denominator;
        if y > DEEP_Y {
            // e^y - 1 = e^y to 1e-304: S = C e^-y, dS/dT = S A y / (A T + B).
            let signal = c_exp_neg(self.c, y);
            if !(signal >= f64::MIN_POSITIVE) {
                return Err(Error::RadianceUnderflow);
            }
            return Ok((signal, signal * self.a_um * y / denominator));
        }
        let e = libm::expm1(y);
        let signal = self.c / e;
        if !(signal >= f64::MIN_POSITIVE) {
            return Err(Error::RadianceUnderflow);
        }
        if !signal.is_finite() {
            return Err(Error::RadianceOverflow);
        }
        let derivative = signal * self.a_um * y * (e + 1.0) / (denominator * e);
        Ok((signal, derivative))
    }

    /// T = (c2 / ln(C/S + 1) - B) / A, closed form (ln(1 + C/S) by log1p).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::RadianceNotPositive`],
    /// [`Error::CalibrationOutOfDomain`] when the result is not a positive temperature,
    /// [`Error::RadianceOverflow`] for a signal so near the largest double that the
    /// curve's signal at the result would overflow.
    fn temperature(&self, signal: f64) -> Result<f64> {
        let s = check_signal(signal)?;
        let ratio = self.c / s;
        // ln(1 + C/S) = ln(C/S) to 1e-308 where C/S overflows.
        let log = if ratio.is_finite() {
            libm::log1p(ratio)
        } else {
            ln_ratio(self.c, s)
        };
        let temperature_k = check_inverse((C2_UMK / log - self.b_umk) / self.a_um)?;
        // Within rounding of the largest double, the forward at the result can round up
        // past it (S = f64::MAX gave T = 2.5e302 K whose signal overflowed): such a
        // temperature has no signal to return to, so it is refused.
        if s > 0.5 * f64::MAX && self.signal(temperature_k).is_err() {
            return Err(Error::RadianceOverflow);
        }
        Ok(temperature_k)
    }
}

/// Sakuma-Hattori (Wien form) parameters: S(T) = C exp(-c2/(A T + B)).
///
/// A in um, B in um K, C in signal units. For short-wavelength pyrometers (see the module
/// docs for when to prefer it over [`SakumaHattori`]). Its inverse T = (c2/ln(C/S) - B)/A
/// needs S < C: C is the (unreachable) signal at infinite temperature.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SakumaHattoriWien {
    a_um: f64,
    b_umk: f64,
    c: f64,
}

impl SakumaHattoriWien {
    /// Validates A > 0 (um), finite B (um K) and C > 0 (signal units).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::CalibrationParameterInvalid`].
    pub fn new(a_um: f64, b_umk: f64, c: f64) -> Result<Self> {
        check_parameters(a_um, b_umk, c)?;
        Ok(SakumaHattoriWien { a_um, b_umk, c })
    }

    /// A, um.
    #[must_use]
    pub fn a_um(&self) -> f64 {
        self.a_um
    }
    /// B, um K.
    #[must_use]
    pub fn b_umk(&self) -> f64 {
        self.b_umk
    }
    /// C, signal units.
    #[must_use]
    pub fn c(&self) -> f64 {
        self.c
    }
}

impl SignalCurve for SakumaHattoriWien {
    /// S = C exp(-y) and dS/dT = S A y / (A T + B), y = c2/(A T + B).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
    /// [`Error::CalibrationOutOfDomain`] where A T + B <= 0,
    /// [`Error::RadianceUnderflow`] where the signal underflows.
    fn signal_and_derivative(&self, temperature_k: f64) -> Result<(f64, f64)> {
        let denominator = effective_umk(self.a_um, self.b_umk, temperature_k)?;
        let y = C2_UMK / denominator;
        let signal = c_exp_neg(self.c, y);
        if !(signal >= f64::MIN_POSITIVE) {
            return Err(Error::RadianceUnderflow);
        }
        Ok((signal, signal * self.a_um * y / denominator))
    }

    /// T = (c2 / ln(C/S) - B) / A, closed form.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::RadianceNotPositive`],
    /// [`Error::CalibrationOutOfDomain`] when S >= C or the result is not a positive
    /// temperature.
    fn temperature(&self, signal: f64) -> Result<f64> {
        let s = check_signal(signal)?;
        let log_ratio = ln_ratio(self.c, s);
        if !(log_ratio > 0.0) {
            return Err(Error::CalibrationOutOfDomain);
        }
        check_inverse((C2_UMK / log_ratio - self.b_umk) / self.a_um)
    }
}

/// A calibration curve behind a dark offset: the detector reads S = offset + S_c(T),
/// where S_c is the blackbody curve (`curve`) and `offset` the signal with the shutter
/// closed (dark current, amplifier offset), in the same signal units.
///
/// Converting subtracts the offset first: T = T_c(S - offset). A signal at or below the
/// offset has no temperature ([`Error::SignalAtOrBelowOffset`]).
///
/// ```
/// use bandtemp::band::SignalCurve;
/// use bandtemp::calibration::{OffsetCurve, SakumaHattori};
///
/// // An invented pyrometer: A = 0.652 um, B = 0.8 um K, C = 3.1e9 counts, 120-count dark.
/// let curve = OffsetCurve::new(SakumaHattori::new(0.652, 0.8, 3.1e9)?, 120.0)?;
/// let counts = curve.signal(1100.0)?;
/// assert!((curve.temperature(counts)? - 1100.0).abs() < 1e-9);
/// assert!(curve.temperature(120.0).is_err()); // at the offset: no temperature
/// # Ok::<(), bandtemp::Error>(())
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct OffsetCurve<C = SakumaHattori> {
    /// The blackbody curve of the offset-free signal.
    pub curve: C,
    /// The dark offset, signal units (may be negative).
    pub offset: f64,
}

impl<C: SignalCurve> OffsetCurve<C> {
    /// Wraps `curve` behind a finite dark `offset`.
    ///
    /// # Errors
    /// [`Error::NonFinite`] for a NaN or infinite offset.
    pub fn new(curve: C, offset: f64) -> Result<Self> {
        Ok(OffsetCurve {
            curve,
            offset: finite(offset)?,
        })
    }
}

impl<C: SignalCurve> SignalCurve for OffsetCurve<C> {
    /// S = offset + S_c(T), dS/dT = dS_c/dT.
    ///
    /// # Errors
    /// [`Error::NonFinite`] for a non-finite offset or sum; errors of the inner curve.
    fn signal_and_derivative(&self, temperature_k: f64) -> Result<(f64, f64)> {
        let (signal, derivative) = self.curve.signal_and_derivative(temperature_k)?;
        Ok((finite(finite(self.offset)? + signal)?, derivative))
    }

    /// T = T_c(S - offset).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::SignalAtOrBelowOffset`] where S <= offset; errors of
    /// the inner curve's inverse.
    fn temperature(&self, signal: f64) -> Result<f64> {
        let net = finite(signal)? - finite(self.offset)?;
        if !(net > 0.0) {
            return Err(Error::SignalAtOrBelowOffset);
        }
        self.curve.temperature(net)
    }
}

mod sealed {
    use crate::band::SignalCurve;
    use crate::error::Result;

    /// What the fits need of a curve form, in the fit parameters p = (A, B, ln C).
    pub trait Model: SignalCurve + Copy {
        /// Builds the curve from p = (A um, B um K, ln C).
        fn from_fit(p: [f64; 3]) -> Result<Self>;
        /// p = (A, B, ln C).
        fn fit_parameters(&self) -> [f64; 3];
        /// T(S) and dT/dp at a positive signal.
        fn temperature_gradient(&self, signal: f64) -> Result<(f64, [f64; 3])>;
        /// S(T) and dS/dp.
        fn signal_gradient(&self, temperature_k: f64) -> Result<(f64, [f64; 3])>;
        /// ln(S/C) for given A and B (NaN or infinite where A T + B <= 0): the shape the
        /// starting values are fitted with.
        fn ln_shape(a_um: f64, b_umk: f64, temperature_k: f64) -> f64;
    }
}

/// A Sakuma-Hattori curve form the fits can produce: [`SakumaHattori`] (Planck form) or
/// [`SakumaHattoriWien`] (Wien form). Sealed: the fits rely on each form's closed-form
/// gradients.
pub trait CurveForm: sealed::Model {}

impl CurveForm for SakumaHattori {}
impl CurveForm for SakumaHattoriWien {}

impl sealed::Model for SakumaHattori {
    fn from_fit(p: [f64; 3]) -> Result<Self> {
        SakumaHattori::new(p[0], p[1], libm::exp(p[2]))
    }

    fn fit_parameters(&self) -> [f64; 3] {
        [self.a_um, self.b_umk, libm::log(self.c)]
    }

    /// T = (c2/g - B)/A with g = ln(1 + q), q = C/S:
    /// dT/dA = -T/A, dT/dB = -1/A, dT/dlnC = -c2 q / (A g^2 (1 + q)).
    fn temperature_gradient(&self, signal: f64) -> Result<(f64, [f64; 3])> {
        let s = check_signal(signal)?;
        let q = self.c / s;
        let g = libm::log1p(q);
        let t = (C2_UMK / g - self.b_umk) / self.a_um;
        let d_ln_c = -C2_UMK * q / (self.a_um * g * g * (1.0 + q));
        let gradient = [-t / self.a_um, -1.0 / self.a_um, d_ln_c];
        finite_gradient(t, gradient)
    }

    /// S = C/(e^y - 1): dS/dB = S y e^y / ((A T + B)(e^y - 1)), dS/dA = T dS/dB,
    /// dS/dlnC = S.
    fn signal_gradient(&self, temperature_k: f64) -> Result<(f64, [f64; 3])> {
        let denominator = effective_umk(self.a_um, self.b_umk, temperature_k)?;
        let y = C2_UMK / denominator;
        let e = libm::expm1(y);
        let s = self.c / e;
        let d_b = s * y * (e + 1.0) / (denominator * e);
        finite_gradient(s, [temperature_k * d_b, d_b, s])
    }

    /// ln(1/(e^y - 1)) = -y - ln(1 - e^-y), written so that it neither overflows at large y
    /// nor loses digits at small y.
    fn ln_shape(a_um: f64, b_umk: f64, temperature_k: f64) -> f64 {
        let y = C2_UMK / (a_um * temperature_k + b_umk);
        if y > 1.0 {
            -y - libm::log1p(-libm::exp(-y))
        } else {
            -libm::log(libm::expm1(y))
        }
    }
}

impl sealed::Model for SakumaHattoriWien {
    fn from_fit(p: [f64; 3]) -> Result<Self> {
        SakumaHattoriWien::new(p[0], p[1], libm::exp(p[2]))
    }

    fn fit_parameters(&self) -> [f64; 3] {
        [self.a_um, self.b_umk, libm::log(self.c)]
    }

    /// T = (c2/g - B)/A with g = ln C - ln S: dT/dA = -T/A, dT/dB = -1/A,
    /// dT/dlnC = -c2 / (A g^2). Defined for any g > 0.
    fn temperature_gradient(&self, signal: f64) -> Result<(f64, [f64; 3])> {
        let s = check_signal(signal)?;
        let g = libm::log(self.c / s);
        if !(g > 0.0) {
            return Err(Error::CalibrationOutOfDomain);
        }
        let t = (C2_UMK / g - self.b_umk) / self.a_um;
        let gradient = [
            -t / self.a_um,
            -1.0 / self.a_um,
            -C2_UMK / (self.a_um * g * g),
        ];
        finite_gradient(t, gradient)
    }

    /// S = C e^-y: dS/dB = S y / (A T + B), dS/dA = T dS/dB, dS/dlnC = S.
    fn signal_gradient(&self, temperature_k: f64) -> Result<(f64, [f64; 3])> {
        let denominator = effective_umk(self.a_um, self.b_umk, temperature_k)?;
        let y = C2_UMK / denominator;
        let s = self.c * libm::exp(-y);
        let d_b = s * y / denominator;
        finite_gradient(s, [temperature_k * d_b, d_b, s])
    }

    fn ln_shape(a_um: f64, b_umk: f64, temperature_k: f64) -> f64 {
        -C2_UMK / (a_um * temperature_k + b_umk)
    }
}

/// Passes a value and its gradient on if all are finite.
fn finite_gradient(value: f64, gradient: [f64; 3]) -> Result<(f64, [f64; 3])> {
    finite(value)?;
    for g in gradient {
        finite(g)?;
    }
    Ok((value, gradient))
}
