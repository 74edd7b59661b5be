//! Site inverse problems: the scene inputs a practitioner determines on site.
//!
//! - Emissivity from a reference temperature, as ASTM E1933 (Standard Practice for
//!   Measuring and Compensating for Emissivity Using Infrared Imaging Radiometers)
//!   describes: the surface's true temperature is known from a contact probe, or from a
//!   reference coating (tape, paint) of known emissivity applied beside the spot.
//! - Reflected apparent temperature from a diffuse reflector, as ASTM E1862 (Standard
//!   Practice for Measuring and Compensating for Reflected Temperature Using Infrared
//!   Imaging Radiometers) describes: a rough, low-emissivity reflector placed at the
//!   target in the same orientation reflects what the target reflects.
//!
//! Both solve the grey measurement equation of [`Scene`] for one unknown; it is linear in
//! e and in L(Tr), so the answers are closed form.

use super::{background_signal, Scene};
use crate::band::SignalCurve;
use crate::error::{check_temperature_k, finite, Error, Result};

/// The result of the reference-coating method: the surface temperature found through the
/// coating, and the surface's emissivity at that temperature.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ReferenceCoating {
    /// Emissivity of the surface, in (0, 1].
    pub emissivity: f64,
    /// Temperature of the coating (taken to be the surface's), K.
    pub temperature_k: f64,
}

/// A background term weighted by `weight`; zero weight is not evaluated.
fn term<C: SignalCurve + ?Sized>(curve: &C, weight: f64, temperature_k: f64) -> Result<f64> {
    if weight > 0.0 {
        Ok(weight * background_signal(curve, temperature_k)?.0)
    } else {
        Ok(0.0)
    }
}

impl Scene {
    /// What the window and the path add in front of the surface, in signal units:
    /// W = tw (1-ta) L(Ta) + rw L(Twr) + (1-tw-rw) L(Tw).
    fn path_and_window<C: SignalCurve + ?Sized>(&self, curve: &C) -> Result<f64> {
        let tw = self.window_transmittance;
        let rw = self.window_reflectance;
        Ok(
            term(curve, tw * (1.0 - self.atm_transmittance), self.atm_k)?
                + term(curve, rw, self.window_reflected_k)?
                + term(curve, 1.0 - tw - rw, self.window_k)?,
        )
    }

    /// Emissivity of the surface from its sensor signal S and its true temperature
    /// `reference_k` (K, > 0; from a contact probe, ASTM E1933 style). The scene's own
    /// emissivity is ignored; every other input is used.
    ///
    /// The measurement equation is linear in e:
    ///
    /// ```text
    /// e = (S - W - tw ta L(Tr)) / (tw ta (L(Tref) - L(Tr)))
    /// W = tw (1-ta) L(Ta) + rw L(Twr) + (1-tw-rw) L(Tw)
    /// ```
    ///
    /// An error dS in the reading gives de = dS / (tw ta (L(Tref) - L(Tr))): the method
    /// needs the surface well away from the reflected apparent temperature.
    ///
    /// To use an apparent reading `apparent_k`, pass `curve.signal(apparent_k)`.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], errors of `curve`;
    /// [`Error::EmissivityNotDetermined`] when |L(Tref) - L(Tr)| <= 64 eps max(L(Tref),
    /// L(Tr)) (surface at the reflected temperature: every emissivity gives the same
    /// signal); [`Error::EmissivityReadingInconsistent`] when the result is outside (0, 1]
    /// (a reading below the reflections of a perfect reflector, or above a blackbody's).
    pub fn emissivity_from_reference<C: SignalCurve + ?Sized>(
        &self,
        curve: &C,
        sensor_signal: f64,
        reference_k: f64,
    ) -> Result<f64> {
        finite(sensor_signal)?;
        check_temperature_k(reference_k)?;
        let l_ref = curve.signal(reference_k)?;
        let l_r = background_signal(curve, self.reflected_k)?.0;
        let difference = l_ref - l_r;
        if !(libm::fabs(difference) > 64.0 * f64::EPSILON * l_ref.max(l_r)) {
            return Err(Error::EmissivityNotDetermined);
        }
        let surface = self.window_transmittance * self.atm_transmittance;
        let excess = sensor_signal - self.path_and_window(curve)? - surface * l_r;
        let emissivity = excess / (surface * difference);
        if emissivity > 0.0 && emissivity <= 1.0 {
            Ok(emissivity)
        } else {
            Err(Error::EmissivityReadingInconsistent)
        }
    }

    /// Emissivity of a surface from a reference coating of known emissivity beside it
    /// (ASTM E1933 style, non-contact): the coating's signal gives the common temperature,
    /// T = object temperature of the scene with e = `coating_emissivity` for
    /// `coating_signal`; then e = [`Scene::emissivity_from_reference`] for
    /// `surface_signal` at T. Both spots share the scene's reflected temperature, path and
    /// window.
    ///
    /// # Errors
    /// [`Error::EmissivityOutOfRange`] for a coating emissivity outside (0, 1];
    /// [`Error::SignalBelowBackground`] when the coating cannot be resolved; those of
    /// [`Scene::emissivity_from_reference`] ([`Error::EmissivityNotDetermined`] when the
    /// surface is at the reflected temperature).
    pub fn emissivity_from_reference_coating<C: SignalCurve + ?Sized>(
        &self,
        curve: &C,
        surface_signal: f64,
        coating_signal: f64,
        coating_emissivity: f64,
    ) -> Result<ReferenceCoating> {
        let temperature_k = self
            .with_emissivity(coating_emissivity)?
            .object_temperature(curve, coating_signal)?;
        let emissivity = self.emissivity_from_reference(curve, surface_signal, temperature_k)?;
        Ok(ReferenceCoating {
            emissivity,
            temperature_k,
        })
    }

    /// Reflected apparent temperature Tr from the signal of a diffuse reflector placed at
    /// the target (ASTM E1862 style), K. The reflector has emissivity `reflector_emissivity`
    /// in [0, 1) (0 for an ideal reflector; crumpled aluminium foil is low but not zero)
    /// and temperature `reflector_k` (K, > 0; it matters only when its emissivity is not
    /// zero). The scene's own emissivity and Tr are ignored; path and window are used.
    ///
    /// ```text
    /// L(Tr) = [ (S_f - W) / (tw ta) - ef L(Tf) ] / (1 - ef),   Tr = L^-1(L(Tr))
    /// W = tw (1-ta) L(Ta) + rw L(Twr) + (1-tw-rw) L(Tw)
    /// ```
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::ReflectorEmissivityOutOfRange`],
    /// [`Error::TemperatureNotPositive`], errors of `curve`;
    /// [`Error::ReflectedNotDetermined`] when the reading is at or below what the
    /// reflector's own emission, the air and the window give; errors of the curve's
    /// inversion.
    pub fn reflected_k_from_reflector<C: SignalCurve + ?Sized>(
        &self,
        curve: &C,
        reflector_signal: f64,
        reflector_emissivity: f64,
        reflector_k: f64,
    ) -> Result<f64> {
        finite(reflector_signal)?;
        if !(finite(reflector_emissivity)? >= 0.0 && reflector_emissivity < 1.0) {
            return Err(Error::ReflectorEmissivityOutOfRange);
        }
        check_temperature_k(reflector_k)?;
        let surface = self.window_transmittance * self.atm_transmittance;
        let own = term(curve, reflector_emissivity, reflector_k)?;
        let at_reflector = (reflector_signal - self.path_and_window(curve)?) / surface;
        let reflected = (at_reflector - own) / (1.0 - reflector_emissivity);
        if !(reflected > 0.0) {
            return Err(Error::ReflectedNotDetermined);
        }
        curve.temperature(reflected)
    }
}
