//! Calibration of an instrument against blackbody references: the Sakuma-Hattori
//! equation (Planck form).
//!
//! ```text
//! S(T) = C / (exp(c2 / (A T + B)) - 1)
//! ```
//!
//! A in um, B in um K, C in signal units. A plays the role of an effective wavelength and
//! B corrects its drift with temperature; for a narrow band A is close to the band's
//! mean wavelength and B is small. The inverse is closed-form:
//! T = (c2 / ln(C / S + 1) - B) / A.

use crate::band::SignalCurve;
use crate::constants::C2_UMK;
use crate::error::{check_temperature_k, finite, Error, Result};

/// Sakuma-Hattori (Planck form) parameters.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SakumaHattori {
    a_um: f64,
    b_umk: f64,
    c: f64,
}

impl SakumaHattori {
    /// Validates A > 0 (um), finite B (um K) and C > 0 (signal units).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::CalibrationParameterInvalid`].
    pub fn new(a_um: f64, b_umk: f64, c: f64) -> Result<Self> {
        finite(a_um)?;
        finite(b_umk)?;
        finite(c)?;
        if a_um > 0.0 && c > 0.0 {
            Ok(SakumaHattori { a_um, b_umk, c })
        } else {
            Err(Error::CalibrationParameterInvalid)
        }
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

impl SignalCurve for SakumaHattori {
    /// S = C / (exp(c2/(A T + B)) - 1) and dS/dT = S A y e^y / ((A T + B)(e^y - 1)),
    /// y = c2/(A T + B).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
    /// [`Error::CalibrationOutOfDomain`] where A T + B <= 0,
    /// [`Error::RadianceUnderflow`] where the signal underflows.
    fn signal_and_derivative(&self, temperature_k: f64) -> Result<(f64, f64)> {
        let t = check_temperature_k(temperature_k)?;
        let denominator = self.a_um * t + self.b_umk;
        if !(denominator > 0.0) {
            return Err(Error::CalibrationOutOfDomain);
        }
        let y = C2_UMK / denominator;
        let e = libm::expm1(y);
        let signal = self.c / e;
        if !(signal >= f64::MIN_POSITIVE) {
            return Err(Error::RadianceUnderflow);
        }
        let derivative = signal * self.a_um * y * (e + 1.0) / (denominator * e);
        Ok((signal, derivative))
    }

    /// T = (c2 / ln(C/S + 1) - B) / A, closed form.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::RadianceNotPositive`],
    /// [`Error::CalibrationOutOfDomain`] when the result is not a positive temperature.
    fn temperature(&self, signal: f64) -> Result<f64> {
        if !(finite(signal)? > 0.0) {
            return Err(Error::RadianceNotPositive);
        }
        let temperature_k = (C2_UMK / libm::log1p(self.c / signal) - self.b_umk) / self.a_um;
        if temperature_k > 0.0 && temperature_k.is_finite() {
            Ok(temperature_k)
        } else {
            Err(Error::CalibrationOutOfDomain)
        }
    }
}
