//! Spectral (non-grey) mode: emissivity and atmosphere transmittance as tabulated functions
//! of wavelength, integrated with the band's response.
//!
//! With r the band's response, L(lambda, T) Planck's law (spectral radiance, or photon
//! radiance for a photon detector), e(lambda) and ta(lambda) piecewise-linear tables, and
//! Lb(T) the band radiance:
//!
//! ```text
//! S = tw * integral r [ ta e L(T) + ta (1-e) L(Tr) + (1-ta) L(Ta) ] dlambda
//!     + rw Lb(Twr) + (1-tw-rw) Lb(Tw)
//! ```
//!
//! The window stays grey (tw, rw). Each integral is computed by
//! [`Band::weighted_radiance_and_derivative`] with panel edges at every table node
//! (Gauss-Legendre in x = c2/(lambda T); relative error below 1e-13 for piecewise-linear
//! weights). With grey values (no table) the equation reduces to [`Scene`]'s.

use super::{background_signal, check_scene_k, Scene};
use crate::band::{solve_increasing, Band, Solution, SpectralTable};
use crate::constants::{WIEN_B_PHOTON_UMK, WIEN_B_UMK};
use crate::error::{finite, Error, Result};
use crate::planck::Detector;

/// A scene whose emissivity and atmosphere transmittance may vary with wavelength, bound to
/// the band it is seen in.
///
/// Tables are borrowed (the caller owns the storage; nothing is copied or allocated). Each
/// table must cover the whole band: a table is zero outside its span, which for an
/// emissivity would silently turn the surface into a perfect reflector there, so a
/// table that does not reach both band edges is an error
/// ([`Error::SpectralTableDoesNotCoverBand`]). The background B (reflections, path
/// emission, window) is computed once when the scene is built.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SpectralScene<'a> {
    band: Band<'a>,
    scene: Scene,
    emissivity: Option<SpectralTable<'a>>,
    atm_transmittance: Option<SpectralTable<'a>>,
    background: f64,
    reference_gain: f64,
}

impl<'a> SpectralScene<'a> {
    /// The grey `scene` seen in `band` (no tables yet: e and ta are the scene's grey
    /// values). Add tables with [`SpectralScene::with_spectral_emissivity`] and
    /// [`SpectralScene::with_spectral_atmosphere`].
    ///
    /// # Errors
    /// Errors of the band integrals at the scene temperatures
    /// ([`Error::RadianceOverflow`] for absurd temperatures).
    pub fn new(band: Band<'a>, scene: Scene) -> Result<Self> {
        SpectralScene {
            band,
            scene,
            emissivity: None,
            atm_transmittance: None,
            background: 0.0,
            reference_gain: 0.0,
        }
        .prepared()
    }

    /// The same scene with a spectral emissivity e(lambda): a table of values in [0, 1]
    /// covering the band (linear between nodes). Replaces the grey emissivity.
    ///
    /// # Errors
    /// [`Error::SpectralTableDoesNotCoverBand`], [`Error::SpectralEmissivityOutOfRange`]
    /// for a value above 1, [`Error::ObjectNotVisible`] when response x ta x e is zero
    /// over the band.
    pub fn with_spectral_emissivity(self, emissivity: SpectralTable<'a>) -> Result<Self> {
        self.check_covers(&emissivity)?;
        if emissivity.values().iter().any(|&v| v > 1.0) {
            return Err(Error::SpectralEmissivityOutOfRange);
        }
        SpectralScene {
            emissivity: Some(emissivity),
            ..self
        }
        .prepared()
    }

    /// The same scene seen through air of spectral transmittance ta(lambda) (a table of
    /// values in [0, 1] covering the band, such as an atmosphere model fills)
    /// at `temperature_k` (K, > 0). Replaces the grey atmosphere; the path emits
    /// (1 - ta(lambda)) L(lambda, Ta) inside the band integral.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::AtmosphereTemperatureNotPositive`],
    /// [`Error::SpectralTableDoesNotCoverBand`], [`Error::SpectralTransmittanceOutOfRange`]
    /// for a value above 1, [`Error::ObjectNotVisible`] when response x ta x e is zero over
    /// the band.
    pub fn with_spectral_atmosphere(
        self,
        transmittance: SpectralTable<'a>,
        temperature_k: f64,
    ) -> Result<Self> {
        check_scene_k(temperature_k, Error::AtmosphereTemperatureNotPositive)?;
        self.check_covers(&transmittance)?;
        if transmittance.values().iter().any(|&v| v > 1.0) {
            return Err(Error::SpectralTransmittanceOutOfRange);
        }
        SpectralScene {
            scene: Scene {
                atm_k: temperature_k,
                ..self.scene
            },
            atm_transmittance: Some(transmittance),
            ..self
        }
        .prepared()
    }

    /// The band.
    #[must_use]
    pub fn band(&self) -> Band<'a> {
        self.band
    }

    /// The grey scene: reflected temperature, atmosphere temperature and window are used;
    /// its emissivity and atmosphere transmittance are used only where no table replaces
    /// them.
    #[must_use]
    pub fn scene(&self) -> Scene {
        self.scene
    }

    /// The spectral emissivity table, if any.
    #[must_use]
    pub fn emissivity_table(&self) -> Option<SpectralTable<'a>> {
        self.emissivity
    }

    /// The spectral atmosphere transmittance table, if any.
    #[must_use]
    pub fn atm_transmittance_table(&self) -> Option<SpectralTable<'a>> {
        self.atm_transmittance
    }

    /// Background B, in band-radiance units: everything the sensor sees that is not the
    /// object's own emission,
    /// B = tw integral r [ta (1-e) L(Tr) + (1-ta) L(Ta)] + rw Lb(Twr) + (1-tw-rw) Lb(Tw).
    #[must_use]
    pub fn background(&self) -> f64 {
        self.background
    }

    /// Effective gain G(T) / Lb(T) at `object_k`: the grey gain tw ta e that would give
    /// the same object signal at this temperature (the band-averaged ta e, weighted by
    /// r L(lambda, T)).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], errors of
    /// [`Band::radiance`].
    pub fn effective_gain(&self, object_k: f64) -> Result<f64> {
        let (gain_signal, _) = self.object_signal(object_k)?;
        Ok(gain_signal / self.band.radiance(object_k)?)
    }

    /// Sensor signal S = G(T) + B for an object at `object_k` (K, > 0), in band-radiance
    /// units, with G(T) = tw integral r ta e L(lambda, T) dlambda. An object signal that
    /// underflows counts as zero (S = B).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`]; [`Error::RadianceUnderflow`]
    /// when S itself is not a normal double (as [`Scene::sensor_signal`]: a band and scene
    /// at 0.1 K gave S = 0).
    pub fn sensor_signal(&self, object_k: f64) -> Result<f64> {
        let signal = self.object_signal(object_k)?.0 + self.background;
        if signal < f64::MIN_POSITIVE {
            return Err(Error::RadianceUnderflow);
        }
        Ok(signal)
    }

    /// Apparent temperature for an object at `object_k`: the blackbody temperature whose
    /// band radiance equals [`SpectralScene::sensor_signal`], K.
    ///
    /// # Errors
    /// As [`SpectralScene::sensor_signal`] and [`Band::temperature`].
    pub fn apparent_temperature(&self, object_k: f64) -> Result<f64> {
        self.band.temperature(self.sensor_signal(object_k)?)
    }

    /// Object temperature from the sensor signal S (band-radiance units), K: solves
    /// G(T) = S - B by safeguarded Newton on temperature ([`solve_increasing`]).
    ///
    /// Accuracy: Newton stops below 1e-12 T; with the integrals' 1e-13 relative error the
    /// result is within about 1e-12 T of the exact solution of the tabulated equation.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::SignalBelowBackground`] when S <= B,
    /// [`Error::RadianceSubnormal`] when S - B is below the normal double range,
    /// [`Error::RadianceOutOfRange`], [`Error::NotConverged`].
    pub fn object_temperature(&self, sensor_signal: f64) -> Result<f64> {
        self.solve_object_temperature(sensor_signal)
            .map(|solution| solution.temperature_k)
    }

    /// As [`SpectralScene::object_temperature`], returning how the solver got there.
    ///
    /// # Errors
    /// As [`SpectralScene::object_temperature`].
    pub fn solve_object_temperature(&self, sensor_signal: f64) -> Result<Solution> {
        finite(sensor_signal)?;
        let target = sensor_signal - self.background;
        if !(target > 0.0) {
            return Err(Error::SignalBelowBackground);
        }
        let guess_k = self.band.guess_k(target / self.reference_gain);
        solve_increasing(
            |temperature_k| match self.object_signal(temperature_k) {
                // A non-finite integral at a trial temperature means "far above".
                Err(Error::NonFinite) => Err(Error::RadianceOverflow),
                other => other,
            },
            target,
            guess_k,
        )
    }

    /// Object temperature from an apparent (blackbody-equivalent) temperature `apparent_k`
    /// (K, > 0): S = Lb(T_app), then as [`SpectralScene::object_temperature`].
    ///
    /// # Errors
    /// Errors of [`Band::radiance`] and of [`SpectralScene::object_temperature`].
    pub fn object_temperature_from_apparent(&self, apparent_k: f64) -> Result<f64> {
        self.object_temperature(self.band.radiance(apparent_k)?)
    }

    /// G(T) = tw integral r ta e L(lambda, T) dlambda and dG/dT.
    fn object_signal(&self, object_k: f64) -> Result<(f64, f64)> {
        let tw = self.scene.window_transmittance;
        let (gain_signal, derivative) = self.integral(object_k, |wavelength_um| {
            self.atm_at(wavelength_um) * self.emissivity_at(wavelength_um)
        })?;
        Ok((tw * gain_signal, tw * derivative))
    }

    fn emissivity_at(&self, wavelength_um: f64) -> f64 {
        self.emissivity
            .map_or(self.scene.emissivity, |table| table.value_at(wavelength_um))
    }

    fn atm_at(&self, wavelength_um: f64) -> f64 {
        self.atm_transmittance
            .map_or(self.scene.atm_transmittance, |table| {
                table.value_at(wavelength_um)
            })
    }

    /// integral of r w L(lambda, T) dlambda and its T derivative, with panel edges at the
    /// nodes of every table in use.
    fn integral<W: Fn(f64) -> f64>(&self, temperature_k: f64, weight: W) -> Result<(f64, f64)> {
        match (self.emissivity, self.atm_transmittance) {
            (Some(e), Some(a)) => {
                self.band
                    .weighted_radiance_and_derivative(temperature_k, &[e, a], weight)
            }
            (Some(table), None) | (None, Some(table)) => self
                .band
                .weighted_radiance_and_derivative(temperature_k, &[table], weight),
            (None, None) => self
                .band
                .weighted_radiance_and_derivative(temperature_k, &[], weight),
        }
    }

    fn check_covers(&self, table: &SpectralTable<'_>) -> Result<()> {
        let (first, last) = table.span_um();
        if first <= self.band.lo_um() && last >= self.band.hi_um() {
            Ok(())
        } else {
            Err(Error::SpectralTableDoesNotCoverBand)
        }
    }

    /// Computes the background and the reference gain, and checks that the object is
    /// visible.
    fn prepared(self) -> Result<Self> {
        let scene = self.scene;
        let tw = scene.window_transmittance;
        let rw = scene.window_reflectance;
        let mut background = 0.0;
        let reflects = self.emissivity.is_some() || scene.emissivity < 1.0;
        if reflects {
            let (reflected, _) = self.integral(scene.reflected_k, |wavelength_um| {
                self.atm_at(wavelength_um) * (1.0 - self.emissivity_at(wavelength_um))
            })?;
            background += tw * reflected;
        }
        let absorbs = self.atm_transmittance.is_some() || scene.atm_transmittance < 1.0;
        if absorbs {
            let (path, _) = self.integral(scene.atm_k, |wavelength_um| {
                1.0 - self.atm_at(wavelength_um)
            })?;
            background += tw * path;
        }
        if rw > 0.0 {
            background += rw * background_signal(&self.band, scene.window_reflected_k)?.0;
        }
        let window_emissivity = 1.0 - tw - rw;
        if window_emissivity > 0.0 {
            background += window_emissivity * background_signal(&self.band, scene.window_k)?.0;
        }
        // Reference temperature: the Wien peak at the band's centroid.
        let wien_umk = match self.band.detector() {
            Detector::Energy => WIEN_B_UMK,
            Detector::Photon => WIEN_B_PHOTON_UMK,
        };
        let reference_k = wien_umk / self.band.centroid_um();
        let (gain_signal, _) = self.object_signal(reference_k)?;
        let reference_gain = gain_signal / self.band.radiance(reference_k)?;
        if !(reference_gain > 0.0) {
            return Err(Error::ObjectNotVisible);
        }
        finite(background)?;
        Ok(SpectralScene {
            background,
            reference_gain,
            ..self
        })
    }
}
