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
//! reflectance in [0, 1) with tw + rw <= 1, and temperature (the window emits with
//! emissivity 1 - tw - rw); Twr the temperature the window reflects (the sensor side).
//! No window: tw = 1, rw = 0. All temperatures in K; S and L in the curve's signal units
//! (W m^-2 sr^-1 for the band radiance of an energy detector).
//!
//! S is linear in L(T): S = G L(T) + B with gain G = tw ta e and background
//! B = S - G L(T), so the object's own signal is L(T) = (S - B) / G.
//!
//! The module has four parts:
//! - [`Scene`]: the validated grey parameters, forward ([`Scene::sensor_signal`],
//!   [`Scene::apparent_temperature`]) and inverse ([`Scene::object_temperature`],
//!   [`Scene::object_temperature_from_apparent`]) over any [`SignalCurve`];
//! - [`Sensitivities`]: analytic partial derivatives of the object temperature
//!   ([`Scene::sensitivities`]);
//! - site inverse problems: emissivity from a reference temperature
//!   ([`Scene::emissivity_from_reference`], [`Scene::emissivity_from_reference_coating`])
//!   and reflected apparent temperature from a diffuse reflector
//!   ([`Scene::reflected_k_from_reflector`]);
//! - [`SpectralScene`]: emissivity and atmosphere transmittance as functions of
//!   wavelength, integrated with the band's response (non-grey mode).
//!
//! Correcting an apparent reading (an invented scene, `tests/data/scene_cases.csv`):
//!
//! ```
//! use bandtemp::{band::Band, planck::Detector, scene::Scene};
//!
//! // A motor housing (e = 0.85) seen through an infrared window reads 325.43 K apparent.
//! let band = Band::rectangular(8.0, 14.0, Detector::Energy)?; // 8-14 um microbolometer
//! let scene = Scene::new(0.85, 298.15)? // emissivity, reflected apparent temperature (K)
//!     .with_atmosphere(0.995, 298.15)? // 2 m of air: transmittance (assumed), temperature
//!     .with_window(0.70, 0.04, 308.15, 296.15)?; // tw, rw, window K, K it reflects
//! let object_k = scene.object_temperature_from_apparent(&band, 325.43)?;
//! assert!((object_k - 338.15).abs() < 0.02); // 65.0 C
//! // Forward again: the apparent reading this object gives.
//! let apparent_k = scene.apparent_temperature(&band, object_k)?;
//! assert!((apparent_k - 325.43).abs() < 1e-9);
//! # Ok::<(), bandtemp::Error>(())
//! ```

mod sensitivity;
mod site;
mod spectral;

pub use sensitivity::Sensitivities;
pub use site::ReferenceCoating;
pub use spectral::SpectralScene;

use crate::band::SignalCurve;
use crate::error::{finite, Error, Result};

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

/// Checks a scene temperature: finite ([`Error::NonFinite`]) and positive (`error`).
fn check_scene_k(temperature_k: f64, error: Error) -> Result<f64> {
    if finite(temperature_k)? > 0.0 {
        Ok(temperature_k)
    } else {
        Err(error)
    }
}

/// Checks a value that must lie in (0, 1].
fn check_unit_open_closed(value: f64, error: Error) -> Result<f64> {
    if finite(value)? > 0.0 && value <= 1.0 {
        Ok(value)
    } else {
        Err(error)
    }
}

/// Signal and temperature derivative of a background term at `temperature_k`. A signal
/// that underflows the normal double range (a cold sky in a short band, say) counts as
/// zero: it is below anything a sensor can resolve.
pub(crate) fn background_signal<C: SignalCurve + ?Sized>(
    curve: &C,
    temperature_k: f64,
) -> Result<(f64, f64)> {
    match curve.signal_and_derivative(temperature_k) {
        Err(Error::RadianceUnderflow) => Ok((0.0, 0.0)),
        other => other,
    }
}

impl Scene {
    /// A surface of emissivity `emissivity` in (0, 1] reflecting surroundings at the
    /// reflected apparent temperature `reflected_k` (K, > 0), seen through a perfectly
    /// transparent path and no window (ta = 1, tw = 1, rw = 0; their temperatures are then
    /// irrelevant and set to `reflected_k`).
    ///
    /// # Errors
    /// [`Error::NonFinite`] for NaN or infinite inputs, [`Error::EmissivityOutOfRange`],
    /// [`Error::ReflectedTemperatureNotPositive`].
    pub fn new(emissivity: f64, reflected_k: f64) -> Result<Self> {
        check_unit_open_closed(emissivity, Error::EmissivityOutOfRange)?;
        check_scene_k(reflected_k, Error::ReflectedTemperatureNotPositive)?;
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
    /// temperature `temperature_k` (K, > 0). The path emits (1 - ta) L(Ta).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::AtmosphereTransmittanceOutOfRange`],
    /// [`Error::AtmosphereTemperatureNotPositive`].
    pub fn with_atmosphere(self, transmittance: f64, temperature_k: f64) -> Result<Self> {
        check_unit_open_closed(transmittance, Error::AtmosphereTransmittanceOutOfRange)?;
        check_scene_k(temperature_k, Error::AtmosphereTemperatureNotPositive)?;
        Ok(Scene {
            atm_transmittance: transmittance,
            atm_k: temperature_k,
            ..self
        })
    }

    /// The same scene seen through a window of transmittance in (0, 1] and reflectance in
    /// [0, 1) with transmittance + reflectance <= 1, at `temperature_k` (K, > 0),
    /// reflecting the sensor-side surroundings at `reflected_k` (K, > 0). The window emits
    /// with emissivity 1 - tw - rw (Kirchhoff, opaque remainder absorbed).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::WindowTransmittanceOutOfRange`],
    /// [`Error::WindowReflectanceOutOfRange`], [`Error::WindowSumExceedsOne`],
    /// [`Error::WindowTemperatureNotPositive`],
    /// [`Error::WindowReflectedTemperatureNotPositive`].
    pub fn with_window(
        self,
        transmittance: f64,
        reflectance: f64,
        temperature_k: f64,
        reflected_k: f64,
    ) -> Result<Self> {
        check_unit_open_closed(transmittance, Error::WindowTransmittanceOutOfRange)?;
        if !(finite(reflectance)? >= 0.0 && reflectance < 1.0) {
            return Err(Error::WindowReflectanceOutOfRange);
        }
        if transmittance + reflectance > 1.0 {
            return Err(Error::WindowSumExceedsOne);
        }
        check_scene_k(temperature_k, Error::WindowTemperatureNotPositive)?;
        check_scene_k(reflected_k, Error::WindowReflectedTemperatureNotPositive)?;
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

    /// The same scene with another emissivity in (0, 1] (for per-pixel emissivity maps).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::EmissivityOutOfRange`].
    pub fn with_emissivity(self, emissivity: f64) -> Result<Self> {
        check_unit_open_closed(emissivity, Error::EmissivityOutOfRange)?;
        Ok(Scene { emissivity, ..self })
    }

    /// The same scene with another reflected apparent temperature Tr (K, > 0).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::ReflectedTemperatureNotPositive`].
    pub fn with_reflected_k(self, reflected_k: f64) -> Result<Self> {
        check_scene_k(reflected_k, Error::ReflectedTemperatureNotPositive)?;
        Ok(Scene {
            reflected_k,
            ..self
        })
    }

    /// Gain G = tw ta e and background
    /// B = tw [ta (1-e) L(Tr) + (1-ta) L(Ta)] + rw L(Twr) + (1-tw-rw) L(Tw)
    /// of the measurement equation for `curve` (B in the curve's signal units).
    ///
    /// Terms with zero weight (no atmosphere, no window) are not evaluated, so a scene
    /// without them never fails on their temperatures. A background term whose signal
    /// underflows the normal double range counts as zero.
    ///
    /// # Errors
    /// Errors of `curve.signal` for the background temperatures other than
    /// [`Error::RadianceUnderflow`] (for a calibration curve,
    /// [`Error::CalibrationOutOfDomain`], say).
    pub fn grey_terms<C: SignalCurve + ?Sized>(&self, curve: &C) -> Result<GreyTerms> {
        let tw = self.window_transmittance;
        let rw = self.window_reflectance;
        let ta = self.atm_transmittance;
        let e = self.emissivity;
        let term = |weight: f64, temperature_k: f64| -> Result<f64> {
            if weight > 0.0 {
                Ok(weight * background_signal(curve, temperature_k)?.0)
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

    /// Sensor signal S = G L(T) + B for an object at `object_k` (K, > 0), in the curve's
    /// units (see [`Scene::grey_terms`] for G and B). Exact up to rounding (a few ulp
    /// beyond the curve's own accuracy).
    ///
    /// # Errors
    /// [`Error::TemperatureNotPositive`], [`Error::NonFinite`], and errors of `curve`
    /// (including [`Error::RadianceUnderflow`] when the object's own signal underflows);
    /// [`Error::RadianceUnderflow`] also when S itself is not a normal double (weights near
    /// the smallest doubles: e = ta = tw = 5e-324 gave S = 0).
    pub fn sensor_signal<C: SignalCurve + ?Sized>(&self, curve: &C, object_k: f64) -> Result<f64> {
        let terms = self.grey_terms(curve)?;
        let signal = terms.gain * curve.signal(object_k)? + terms.background;
        if signal < f64::MIN_POSITIVE {
            return Err(Error::RadianceUnderflow);
        }
        Ok(signal)
    }

    /// Apparent temperature for an object at `object_k`, K: the blackbody temperature
    /// whose signal equals the sensor signal, T_app = L^-1(S(T_object)) (what an
    /// instrument set to e = 1 with no corrections reads).
    ///
    /// Accuracy: that of the curve's inversion (1e-12 relative for a [`crate::band::Band`]).
    ///
    /// # Errors
    /// As [`Scene::sensor_signal`], and errors of the curve's inversion.
    pub fn apparent_temperature<C: SignalCurve + ?Sized>(
        &self,
        curve: &C,
        object_k: f64,
    ) -> Result<f64> {
        curve.temperature(self.sensor_signal(curve, object_k)?)
    }

    /// Object temperature from the sensor signal S, K: L(T) = (S - B) / G, inverted on the
    /// curve.
    ///
    /// Accuracy: the curve's inversion of (S - B) / G; the subtraction loses about
    /// log10(B / (S - B)) digits of S when the object is faint against its background.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::SignalBelowBackground`] when S <= B (the object
    /// cannot be resolved against what the reflections, air and window alone give), and
    /// errors of the curve's inversion ([`Error::RadianceSubnormal`] when S - B is
    /// positive but below the normal double range).
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

    /// Object temperature from an apparent (blackbody-equivalent) temperature `apparent_k`
    /// (K, > 0): S = L(T_app), then as [`Scene::object_temperature`].
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], errors of `curve`, and
    /// those of [`Scene::object_temperature`] ([`Error::SignalBelowBackground`] when the
    /// apparent temperature is at or below what the background alone gives).
    pub fn object_temperature_from_apparent<C: SignalCurve + ?Sized>(
        &self,
        curve: &C,
        apparent_k: f64,
    ) -> Result<f64> {
        self.object_temperature(curve, curve.signal(apparent_k)?)
    }
}
