//! Size-of-source effect (SSE) of a radiation thermometer: its signal still grows with
//! the source diameter beyond the nominal spot, because of scatter and diffraction in the
//! optics. A thermometer calibrated on a source of one diameter reads another diameter
//! differently.
//!
//! # Definition used here
//! sigma(d) is the fraction of the signal that a uniform source of diameter d lacks
//! relative to the largest source of the measured SSE curve (where sigma is taken as 0):
//! S(d) = S_max (1 - sigma(d)), sigma in [0, 1), falling with d. A reading on a source of
//! diameter d_meas by a thermometer calibrated on d_cal has the relative signal error
//!
//! ```text
//! dS/S = (1 - sigma(d_meas)) / (1 - sigma(d_cal)) - 1  ~=  sigma(d_cal) - sigma(d_meas)
//! ```
//!
//! (first order, the form of the CCT-WG5 uncertainty guidance for radiation thermometers;
//! cited from memory). The corrected reading divides the signal by 1 + dS/S and inverts
//! the instrument's exact signal curve; the first-order temperature error is
//! dT = (dS/S) S / (dS/dT).
//!
//! Check values (mpmath, `tools/refgen/optics_refs.py`): dS/S = 1e-3 at 0.65 um and
//! 1273.15 K gives 0.0732 K; dS/S = 1 % for 8-14 um at 300 K gives 0.656 K.
//!
//! The SSE curve is measured (the central-obscuration or variable-aperture method) and
//! handed over in caller storage as a table of diameters and sigma values, linearly
//! interpolated; no extrapolation.

use crate::band::SignalCurve;
use crate::error::{check_temperature_k, finite, Error, Result};

/// A measured SSE curve in caller storage: source diameters, mm (positive, strictly
/// increasing) and sigma(d) (in [0, 1)).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SseTable<'a> {
    diameters_mm: &'a [f64],
    sigma: &'a [f64],
}

/// A size-of-source correction.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SseCorrection {
    /// Exact relative signal error of the reading, (1 - sigma_meas)/(1 - sigma_cal) - 1.
    pub relative_signal: f64,
    /// The first-order form sigma(d_cal) - sigma(d_meas).
    pub relative_signal_first_order: f64,
    /// The reading corrected to the calibration source size, K.
    pub corrected_k: f64,
    /// corrected_k minus the reading, K.
    pub correction_k: f64,
}

impl<'a> SseTable<'a> {
    /// Validates a table.
    ///
    /// # Errors
    /// [`Error::NonFinite`]; [`Error::SseTableInvalid`] for fewer than two points, arrays of
    /// different length, diameters not positive and strictly increasing, or a sigma
    /// outside [0, 1).
    pub fn new(diameters_mm: &'a [f64], sigma: &'a [f64]) -> Result<Self> {
        if diameters_mm.len() < 2 || diameters_mm.len() != sigma.len() {
            return Err(Error::SseTableInvalid);
        }
        let mut previous = 0.0;
        for (&d, &s) in diameters_mm.iter().zip(sigma) {
            finite(d)?;
            finite(s)?;
            if !(d > previous) || !(0.0..1.0).contains(&s) {
                return Err(Error::SseTableInvalid);
            }
            previous = d;
        }
        Ok(SseTable {
            diameters_mm,
            sigma,
        })
    }

    /// sigma at `diameter_mm`, linearly interpolated.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::SseDiameterOutsideTable`] outside the table's span.
    pub fn sigma_at(&self, diameter_mm: f64) -> Result<f64> {
        finite(diameter_mm)?;
        let i = self.diameters_mm.partition_point(|&d| d < diameter_mm);
        let (Some(&d1), Some(&s1)) = (self.diameters_mm.get(i), self.sigma.get(i)) else {
            return Err(Error::SseDiameterOutsideTable);
        };
        if d1 == diameter_mm {
            return Ok(s1);
        }
        let Some(j) = i.checked_sub(1) else {
            return Err(Error::SseDiameterOutsideTable);
        };
        let (Some(&d0), Some(&s0)) = (self.diameters_mm.get(j), self.sigma.get(j)) else {
            return Err(Error::SseDiameterOutsideTable);
        };
        Ok(s0 + (s1 - s0) * (diameter_mm - d0) / (d1 - d0))
    }

    /// The correction of a reading `apparent_k` (the blackbody temperature the instrument
    /// shows, K) taken on a source of `measured_mm` by an instrument calibrated on a source
    /// of `calibration_mm`, through the instrument's signal curve (a [`crate::band::Band`]
    /// for its exact band radiance, or a Sakuma-Hattori curve).
    ///
    /// ```text
    /// S = curve(T_app),  S_corr = S / (1 + dS/S),  T_corr = curve^-1(S_corr)
    /// ```
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
    /// [`Error::SseDiameterOutsideTable`], errors of `curve`.
    pub fn correction<C: SignalCurve + ?Sized>(
        &self,
        curve: &C,
        apparent_k: f64,
        calibration_mm: f64,
        measured_mm: f64,
    ) -> Result<SseCorrection> {
        check_temperature_k(apparent_k)?;
        let sigma_cal = self.sigma_at(calibration_mm)?;
        let sigma_meas = self.sigma_at(measured_mm)?;
        let ratio = (1.0 - sigma_meas) / (1.0 - sigma_cal);
        let signal = curve.signal(apparent_k)?;
        let corrected_k = curve.temperature(signal / ratio)?;
        Ok(SseCorrection {
            relative_signal: ratio - 1.0,
            relative_signal_first_order: sigma_cal - sigma_meas,
            corrected_k,
            correction_k: corrected_k - apparent_k,
        })
    }
}

/// First-order temperature error, K, of a relative signal error `relative_signal` (dS/S)
/// at `temperature_k`: dT = (dS/S) S / (dS/dT), with the curve's exact derivative (the
/// band's dL/dT for a [`crate::band::Band`]). Exact to first order in dS/S; the second
/// order is below (dS/S)^2 T for the bands of radiation thermometry.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], errors of `curve`.
pub fn temperature_error_k<C: SignalCurve + ?Sized>(
    curve: &C,
    temperature_k: f64,
    relative_signal: f64,
) -> Result<f64> {
    finite(relative_signal)?;
    let (signal, slope) = curve.signal_and_derivative(check_temperature_k(temperature_k)?)?;
    finite(relative_signal * signal / slope)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn interpolation_and_errors() {
        let d = [10.0, 20.0, 40.0];
        let s = [0.004, 0.002, 0.0];
        let t = SseTable::new(&d, &s).unwrap();
        assert!((t.sigma_at(15.0).unwrap() - 0.003).abs() < 1e-18);
        assert_eq!(t.sigma_at(40.0).unwrap(), 0.0);
        assert_eq!(t.sigma_at(10.0).unwrap(), 0.004);
        assert_eq!(t.sigma_at(9.9), Err(Error::SseDiameterOutsideTable));
        assert_eq!(t.sigma_at(40.1), Err(Error::SseDiameterOutsideTable));
        assert_eq!(SseTable::new(&d, &s[..2]), Err(Error::SseTableInvalid));
        assert_eq!(
            SseTable::new(&[1.0, 1.0], &[0.0, 0.0]),
            Err(Error::SseTableInvalid)
        );
        assert_eq!(
            SseTable::new(&[1.0, 2.0], &[1.0, 0.0]),
            Err(Error::SseTableInvalid)
        );
    }
}
