//! Sensitivity coefficients: analytic partial derivatives of the solved object temperature
//! with respect to the signal and every scene input (formulas in the docs of
//! [`Scene::sensitivities`]).

use super::{background_signal, Scene};
use crate::band::SignalCurve;
use crate::error::{Error, Result};

/// Partial derivatives of the object temperature at a solution; each field in K per unit
/// of its input.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Sensitivities {
    /// The solved object temperature, K.
    pub object_k: f64,
    /// dT/dS, K per signal unit.
    pub signal: f64,
    /// dT/de, K (per unit emissivity).
    pub emissivity: f64,
    /// dT/dTr, K/K.
    pub reflected_k: f64,
    /// dT/dta, K (per unit atmosphere transmittance).
    pub atm_transmittance: f64,
    /// dT/dTa, K/K.
    pub atm_k: f64,
    /// dT/dtw at fixed rw, K (per unit window transmittance).
    pub window_transmittance: f64,
    /// dT/drw at fixed tw, K (per unit window reflectance).
    pub window_reflectance: f64,
    /// dT/dTw, K/K.
    pub window_k: f64,
    /// dT/dTwr, K/K.
    pub window_reflected_k: f64,
}

impl Scene {
    /// Object temperature for `sensor_signal` (as [`Scene::object_temperature`]) and its
    /// analytic partial derivatives with respect to the signal and each scene input.
    ///
    /// With the measurement equation written S = F(T, p) for the scene inputs p, the object
    /// temperature solves F(T, p) = S, and implicit differentiation gives
    ///
    /// ```text
    /// dT/dS = 1 / (dF/dT) = 1 / (tw ta e L'(T)),      dT/dp = -(dF/dp) / (dF/dT)
    /// ```
    ///
    /// with L' = dL/dT of the signal curve and
    ///
    /// ```text
    /// dF/de   = tw ta (L(T) - L(Tr))
    /// dF/dTr  = tw ta (1-e) L'(Tr)
    /// dF/dta  = tw (e L(T) + (1-e) L(Tr) - L(Ta))
    /// dF/dTa  = tw (1-ta) L'(Ta)
    /// dF/dtw  = ta (e L(T) + (1-e) L(Tr)) + (1-ta) L(Ta) - L(Tw)
    /// dF/drw  = L(Twr) - L(Tw)
    /// dF/dTw  = (1-tw-rw) L'(Tw)
    /// dF/dTwr = rw L'(Twr)
    /// ```
    ///
    /// dF/dtw and dF/drw hold the other window property fixed, so the window's emissivity
    /// 1 - tw - rw absorbs the change. At a domain edge (ta = 1, tw = 1, e = 1) the value is
    /// the one-sided derivative from inside the domain. Checked against central finite
    /// differences and against mpmath derivatives of the same equation
    /// (`tests/scene_sensitivity.rs`).
    ///
    /// The curve is evaluated at every scene temperature, also where the term's weight is
    /// zero (the derivative with respect to the weight needs its signal); a background
    /// signal that underflows counts as zero with zero derivative.
    ///
    /// Accuracy: a few ulp beyond the curve's own signal and derivative (relative 1e-13 for
    /// a [`crate::band::Band`]); agreement with central differences to 1e-6 relative
    /// (`tests/scene_sensitivity.rs`).
    ///
    /// # Errors
    /// As [`Scene::object_temperature`]; errors of the curve at the scene temperatures;
    /// [`Error::RadianceUnderflow`] when dS/dT at the solution is below the normal double
    /// range.
    pub fn sensitivities<C: SignalCurve + ?Sized>(
        &self,
        curve: &C,
        sensor_signal: f64,
    ) -> Result<Sensitivities> {
        let object_k = self.object_temperature(curve, sensor_signal)?;
        let e = self.emissivity;
        let ta = self.atm_transmittance;
        let tw = self.window_transmittance;
        let rw = self.window_reflectance;
        let (l_o, dl_o) = curve.signal_and_derivative(object_k)?;
        let (l_r, dl_r) = background_signal(curve, self.reflected_k)?;
        let (l_a, dl_a) = background_signal(curve, self.atm_k)?;
        let (l_w, dl_w) = background_signal(curve, self.window_k)?;
        let (l_wr, dl_wr) = background_signal(curve, self.window_reflected_k)?;

        let slope = tw * ta * e * dl_o;
        if !(slope >= f64::MIN_POSITIVE) {
            return Err(Error::RadianceUnderflow);
        }
        let per_signal = 1.0 / slope;
        let seen_at_window = e * l_o + (1.0 - e) * l_r;
        Ok(Sensitivities {
            object_k,
            signal: per_signal,
            emissivity: -tw * ta * (l_o - l_r) * per_signal,
            reflected_k: -tw * ta * (1.0 - e) * dl_r * per_signal,
            atm_transmittance: -tw * (seen_at_window - l_a) * per_signal,
            atm_k: -tw * (1.0 - ta) * dl_a * per_signal,
            window_transmittance: -(ta * seen_at_window + (1.0 - ta) * l_a - l_w) * per_signal,
            window_reflectance: -(l_wr - l_w) * per_signal,
            window_k: -(1.0 - tw - rw) * dl_w * per_signal,
            window_reflected_k: -rw * dl_wr * per_signal,
        })
    }
}
