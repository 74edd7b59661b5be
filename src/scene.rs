//! The measurement equation: what a sensor sees of a real surface through air and a
//! window, and its inversion to the surface's true temperature.
//!
//! Grey in band, with L(T) the blackbody signal curve (band radiance, or a calibration
//! curve in signal units):
//!
//! ```text
//! S = tw * [ ta * (e*L(T) + (1-e)*L(Tr)) + (1-ta)*L(Ta) ] + rw*L(Twr) + (1-tw-rw)*L(Tw)
//! ```
//!
//! e emissivity in (0, 1]; Tr reflected apparent temperature; ta, Ta atmosphere
//! transmittance in (0, 1] and temperature; tw, rw, Tw window transmittance in (0, 1],
//! reflectance in [0, 1) with tw + rw <= 1, and temperature; Twr the temperature the
//! window reflects (the sensor side). No window: tw = 1, rw = 0. All temperatures in K.
//!
//! S is linear in L(T): S = G L(T) + B with gain G = tw ta e and background
//! B = S - G L(T), so the object's own signal is L(T) = (S - B) / G.

use crate::band::SignalCurve;
use crate::error::{check_temperature_k, finite, Error, Result};

/// Validated scene parameters of the measurement equation.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Scene {
    emissivity: f64,
    reflected_k: f64,
    atm_transmittance: f64,
    atm_k: f64,
    window_transmittance: f64,
    window_reflectance: f64,
    window_k: f64,
    window_reflected_k: f64,
}

/// The scene's signal split: S = gain * L(T_object) + background.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct GreyTerms {
    /// G = tw ta e, dimensionless, in (0, 1].
    pub gain: f64,
    /// B, in the curve's signal units: everything the sensor sees that is not the
    /// object's own emission.
    pub background: f64,
}

impl Scene {
    /// A surface of emissivity `emissivity` in (0, 1] reflecting surroundings at the
    /// reflected apparent temperature `reflected_k`, seen through a perfectly transparent
    /// path and no window (ta = 1, tw = 1, rw = 0; their temperatures are then irrelevant
    /// and set to `reflected_k`).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::EmissivityOutOfRange`],
    /// [`Error::TemperatureNotPositive`].
    pub fn new(emissivity: f64, reflected_k: f64) -> Result<Self> {
        if !(finite(emissivity)? > 0.0 && emissivity <= 1.0) {
            return Err(Error::EmissivityOutOfRange);
        }
        check_temperature_k(reflected_k)?;
        Ok(Scene {
            emissivity,
            reflected_k,
            atm_transmittance: 1.0,
            atm_k: reflected_k,
            window_transmittance: 1.0,
            window_reflectance: 0.0,
            window_k: reflected_k,
            window_reflected_k: reflected_k,
        })
    }

    /// The same scene seen through air of transmittance `transmittance` in (0, 1] at
    /// temperature `temperature_k`.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::AtmosphereTransmittanceOutOfRange`],
    /// [`Error::TemperatureNotPositive`].
    pub fn with_atmosphere(self, transmittance: f64, temperature_k: f64) -> Result<Self> {
        if !(finite(transmittance)? > 0.0 && transmittance <= 1.0) {
            return Err(Error::AtmosphereTransmittanceOutOfRange);
        }
        check_temperature_k(temperature_k)?;
        Ok(Scene {
            atm_transmittance: transmittance,
            atm_k: temperature_k,
            ..self
        })
    }

    /// The same scene seen through a window of transmittance in (0, 1] and reflectance in
    /// [0, 1) with transmittance + reflectance <= 1, at `temperature_k`, reflecting the
    /// sensor-side surroundings at `reflected_k`.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::WindowTransmittanceOutOfRange`],
    /// [`Error::WindowReflectanceOutOfRange`], [`Error::WindowSumExceedsOne`],
    /// [`Error::TemperatureNotPositive`].
    pub fn with_window(
        self,
        transmittance: f64,
        reflectance: f64,
        temperature_k: f64,
        reflected_k: f64,
    ) -> Result<Self> {
        if !(finite(transmittance)? > 0.0 && transmittance <= 1.0) {
            return Err(Error::WindowTransmittanceOutOfRange);
        }
        if !(finite(reflectance)? >= 0.0 && reflectance < 1.0) {
            return Err(Error::WindowReflectanceOutOfRange);
        }
        if transmittance + reflectance > 1.0 {
            return Err(Error::WindowSumExceedsOne);
        }
        check_temperature_k(temperature_k)?;
        check_temperature_k(reflected_k)?;
        Ok(Scene {
            window_transmittance: transmittance,
            window_reflectance: reflectance,
            window_k: temperature_k,
            window_reflected_k: reflected_k,
            ..self
        })
    }

    /// Emissivity e.
    #[must_use]
    pub fn emissivity(&self) -> f64 {
        self.emissivity
    }
    /// Reflected apparent temperature Tr, K.
    #[must_use]
    pub fn reflected_k(&self) -> f64 {
        self.reflected_k
    }
    /// Atmosphere transmittance ta.
    #[must_use]
    pub fn atm_transmittance(&self) -> f64 {
        self.atm_transmittance
    }
    /// Atmosphere temperature Ta, K.
    #[must_use]
    pub fn atm_k(&self) -> f64 {
        self.atm_k
    }
    /// Window transmittance tw.
    #[must_use]
    pub fn window_transmittance(&self) -> f64 {
        self.window_transmittance
    }
    /// Window reflectance rw.
    #[must_use]
    pub fn window_reflectance(&self) -> f64 {
        self.window_reflectance
    }
    /// Window temperature Tw, K.
    #[must_use]
    pub fn window_k(&self) -> f64 {
        self.window_k
    }
    /// Temperature the window reflects (sensor side) Twr, K.
    #[must_use]
    pub fn window_reflected_k(&self) -> f64 {
        self.window_reflected_k
    }

    /// The same scene with another emissivity (for per-pixel emissivity maps).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::EmissivityOutOfRange`].
    pub fn with_emissivity(self, emissivity: f64) -> Result<Self> {
        let checked = Scene::new(emissivity, self.reflected_k)?;
        Ok(Scene {
            emissivity: checked.emissivity,
            ..self
        })
    }

    /// Gain G = tw ta e and background B of the measurement equation for `curve`.
    ///
    /// Terms with zero weight (no atmosphere, no window) are not evaluated, so a scene
    /// without them never fails on their temperatures.
    ///
    /// # Errors
    /// Errors of `curve.signal` for the background temperatures.
    pub fn grey_terms<C: SignalCurve + ?Sized>(&self, curve: &C) -> Result<GreyTerms> {
        let tw = self.window_transmittance;
        let rw = self.window_reflectance;
        let ta = self.atm_transmittance;
        let e = self.emissivity;
        let term = |weight: f64, temperature_k: f64| -> Result<f64> {
            if weight > 0.0 {
                Ok(weight * curve.signal(temperature_k)?)
            } else {
                Ok(0.0)
            }
        };
        let background = term(tw * ta * (1.0 - e), self.reflected_k)?
            + term(tw * (1.0 - ta), self.atm_k)?
            + term(rw, self.window_reflected_k)?
            + term(1.0 - tw - rw, self.window_k)?;
        Ok(GreyTerms {
            gain: tw * ta * e,
            background,
        })
    }

    /// Sensor signal S for an object at `object_k`, in the curve's units.
    ///
    /// # Errors
    /// [`Error::TemperatureNotPositive`], [`Error::NonFinite`], and errors of `curve`.
    pub fn sensor_signal<C: SignalCurve + ?Sized>(&self, curve: &C, object_k: f64) -> Result<f64> {
        let terms = self.grey_terms(curve)?;
        Ok(terms.gain * curve.signal(object_k)? + terms.background)
    }

    /// Object temperature from the sensor signal S, K: L(T) = (S - B) / G, inverted on the
    /// curve.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::SignalBelowBackground`] when S <= B (the object
    /// cannot be resolved against what the reflections, air and window alone give), and
    /// errors of the curve's inversion.
    pub fn object_temperature<C: SignalCurve + ?Sized>(
        &self,
        curve: &C,
        sensor_signal: f64,
    ) -> Result<f64> {
        finite(sensor_signal)?;
        let terms = self.grey_terms(curve)?;
        let object_signal = (sensor_signal - terms.background) / terms.gain;
        if !(object_signal > 0.0) {
            return Err(Error::SignalBelowBackground);
        }
        curve.temperature(object_signal)
    }
}
