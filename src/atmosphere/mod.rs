//! The air between object and sensor: humidity, spectral transmittance of a horizontal
//! path, and the band values the measurement equation needs.
//!
//! On site one knows the distance, the air temperature, the relative humidity and perhaps
//! the pressure, not the transmittance. This module estimates the path's spectral
//! transmittance tau(lambda) from those with a published model ([`continuum`]) or takes it
//! from the caller's table ([`TransmittanceTable`]: a radiative-transfer code's output or a
//! measured path), and reduces it to band values:
//!
//! ```text
//! band-effective transmittance  tau_eff(T_obj) = int r tau L(T_obj) dl / int r L(T_obj) dl
//! path radiance                 L_path(T_air)  = int r (1 - tau) L(T_air) dl
//! ```
//!
//! (r the band's relative response, L Planck's spectral radiance, integrals over the band;
//! radiance units as [`crate::band`]). With these the spectral measurement equation for a
//! blackbody object reads S = tau_eff(T_obj) L(T_obj) + L_path(T_air) exactly.
//!
//! tau_eff depends on the object temperature because the object's spectrum shifts within
//! the band, and the continuum absorbs more at the long-wave end: for an 8-14 um band and a
//! 1 km path at 25 C and 50 % RH, tau_eff is 0.821 for a 0 C object, 0.826 at 25 C and 0.860
//! at 1000 C; over 100 m the same spread is 0.005 (measured in `tests/atmosphere_band.rs`).
//! A grey (scalar) transmittance is exact only for the one temperature it was weighted at;
//! `tests/atmosphere_grey_shortcut.rs` gives the temperature error of that shortcut.
//!
//! Units: temperatures K, wavelengths um, pressures hPa, distances m, relative humidity a
//! fraction in [0, 1]. Nothing here allocates or panics.
//!
//! ```
//! use bandtemp::atmosphere::{Air, Path, PathTransmittance};
//! use bandtemp::band::Band;
//! use bandtemp::planck::Detector;
//!
//! // 25 C, 60 % RH, sea-level pressure, 100 m.
//! let air = Air::new(298.15, 0.60, 1013.25)?;
//! let path = Path::new(air, 100.0)?;
//! let band = Band::rectangular(8.0, 14.0, Detector::Energy)?;
//! let model = PathTransmittance::Continuum(path);
//! let tau = model.band_transmittance(&band, 373.15)?; // object at 100 C
//! assert!(tau > 0.9 && tau < 1.0);
//! # Ok::<(), bandtemp::Error>(())
//! ```

pub mod continuum;
pub mod humidity;

pub use continuum::Path;
pub use humidity::{Air, Phase, SaturationFormula};

use crate::band::{Band, SpectralTable};
use crate::error::{Error, Result};

/// Largest change of the optical depth across one sub-band of a continuum integral. The
/// band's quadrature is sized by the Planck variable x = c2/(lambda T); on a thick path
/// the transmittance exp(-k w) also varies steeply (an 8-14 um band through 2 km of hot,
/// saturated air runs from depth 13 to 65, a factor e^52), so the band is split first into
/// sub-bands over which the depth changes by at most this much. Within one sub-band
/// exp(-depth) then varies by at most e^0.5 and is entire, and the Gauss-Legendre rules
/// of the band quadrature integrate it to below 1e-14 relative (checked against mpmath
/// on thick, hot, humid km paths in `tests/atmosphere_band.rs`).
const MAX_DEPTH_STEP: f64 = 0.5;

/// Samples of the optical depth used to measure its total variation over a band.
const DEPTH_SAMPLES: u32 = 64;

/// Most sub-bands one continuum integral uses: a depth variation of 1024 across the band.
/// Beyond it (paths of hundreds of km, whose band transmittance is below 1e-100) the
/// sub-bands see a larger depth step and the 1e-12 accuracy is no longer checked; the cap
/// bounds the time of a call on any input (at most 2 x 2048 sub-band quadratures).
const MAX_SUB_BANDS: u32 = 2048;

/// int r w L(T) dlambda and int r L(T) dlambda over `band` with w = exp(-depth) or
/// -expm1(-depth), on sub-bands sized by [`MAX_DEPTH_STEP`].
fn continuum_integrals(
    path: &Path,
    band: &Band<'_>,
    temperature_k: f64,
    complement: bool,
) -> Result<(f64, f64)> {
    let (lo_um, hi_um) = (band.lo_um(), band.hi_um());
    // Total variation of the depth, sampled: the depth is smooth and has at most one
    // extremum in the model's range, so the samples see all of its variation but for a
    // sliver at an extremum (made up by the margin in the step).
    let step_um = (hi_um - lo_um) / f64::from(DEPTH_SAMPLES);
    let mut variation = 0.0;
    let mut previous = path.optical_depth_unchecked(lo_um);
    for i in 1..=DEPTH_SAMPLES {
        let wavelength_um = if i == DEPTH_SAMPLES {
            hi_um
        } else {
            lo_um + step_um * f64::from(i)
        };
        let depth = path.optical_depth_unchecked(wavelength_um);
        variation += (depth - previous).abs();
        previous = depth;
    }
    if !variation.is_finite() {
        return Err(Error::NonFinite);
    }
    let pieces = libm::ceil(variation / MAX_DEPTH_STEP).clamp(1.0, f64::from(MAX_SUB_BANDS));
    // `pieces` is an integer in [1, MAX_SUB_BANDS]: the conversion is exact.
    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
    let count = pieces as u32;
    let width_um = (hi_um - lo_um) / pieces;
    let weight = |wavelength_um: f64| {
        let depth = path.optical_depth_unchecked(wavelength_um);
        if complement {
            -libm::expm1(-depth)
        } else {
            libm::exp(-depth)
        }
    };
    if count == 1 {
        let weighted = band
            .weighted_radiance_and_derivative(temperature_k, &[], weight)?
            .0;
        let plain = band
            .weighted_radiance_and_derivative(temperature_k, &[], |_| 1.0)?
            .0;
        return Ok((weighted, plain));
    }
    let mut weighted = 0.0;
    let mut plain = 0.0;
    for i in 0..count {
        let a_um = lo_um + width_um * f64::from(i);
        let b_um = if i + 1 == count {
            hi_um
        } else {
            lo_um + width_um * f64::from(i + 1)
        };
        let sub = match band.response() {
            None => Band::rectangular(a_um, b_um, band.detector()),
            Some(response) => Band::with_response(a_um, b_um, band.detector(), response),
        };
        let sub = match sub {
            Ok(sub) => sub,
            // A stretch where the response is zero contributes nothing.
            Err(Error::BandEmpty) => continue,
            Err(error) => return Err(error),
        };
        weighted += sub
            .weighted_radiance_and_derivative(temperature_k, &[], weight)?
            .0;
        plain += sub
            .weighted_radiance_and_derivative(temperature_k, &[], |_| 1.0)?
            .0;
    }
    Ok((weighted, plain))
}

/// [`Error::PathOpaque`] when the object's band radiance is there but nothing of it gets
/// through (the transmitted integral underflowed to zero).
fn opaque_check(weighted: f64, plain: f64) -> Result<()> {
    if weighted == 0.0 && plain > 0.0 {
        Err(Error::PathOpaque)
    } else {
        Ok(())
    }
}

/// A caller's spectral transmittance table: tau at strictly increasing wavelengths (um),
/// values in [0, 1], linear between points. Borrowed, never copied.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TransmittanceTable<'a> {
    table: SpectralTable<'a>,
}

impl<'a> TransmittanceTable<'a> {
    /// Validates and wraps a table.
    ///
    /// # Errors
    /// The errors of [`SpectralTable::new`], and [`Error::TransmittanceTableAboveOne`].
    pub fn new(wavelengths_um: &'a [f64], transmittance: &'a [f64]) -> Result<Self> {
        let table = SpectralTable::new(wavelengths_um, transmittance)?;
        if transmittance.iter().any(|&t| t > 1.0) {
            return Err(Error::TransmittanceTableAboveOne);
        }
        Ok(TransmittanceTable { table })
    }

    /// The underlying spectral table (what the scene's spectral mode takes).
    #[must_use]
    pub fn table(&self) -> SpectralTable<'a> {
        self.table
    }
}

/// Where a path's spectral transmittance comes from.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum PathTransmittance<'a> {
    /// The water-vapour continuum model of a horizontal path ([`continuum`]), valid for
    /// bands inside 8-14 um.
    Continuum(Path),
    /// A caller's table; the band must lie within its span.
    Table(TransmittanceTable<'a>),
}

impl PathTransmittance<'_> {
    /// Checks that `band` lies where this transmittance is defined.
    ///
    /// # Errors
    /// [`Error::OutsideContinuumModel`] for the model and a band reaching outside
    /// 8-14 um (supply a table instead); [`Error::BandOutsideTransmittanceTable`] for a
    /// table that does not cover the band.
    pub fn check_band(&self, band: &Band<'_>) -> Result<()> {
        match self {
            PathTransmittance::Continuum(_) => {
                if band.lo_um() >= continuum::CONTINUUM_MIN_UM
                    && band.hi_um() <= continuum::CONTINUUM_MAX_UM
                {
                    Ok(())
                } else {
                    Err(Error::OutsideContinuumModel)
                }
            }
            PathTransmittance::Table(table) => {
                let (first, last) = table.table.span_um();
                if band.lo_um() >= first && band.hi_um() <= last {
                    Ok(())
                } else {
                    Err(Error::BandOutsideTransmittanceTable)
                }
            }
        }
    }

    /// Band integral int r w L(T) dlambda with w = tau (`complement` false) or 1 - tau
    /// (`complement` true); and, for the same panels, int r L(T) dlambda.
    fn integrals(
        &self,
        band: &Band<'_>,
        temperature_k: f64,
        complement: bool,
    ) -> Result<(f64, f64)> {
        self.check_band(band)?;
        match self {
            PathTransmittance::Continuum(path) => {
                continuum_integrals(path, band, temperature_k, complement)
            }
            PathTransmittance::Table(table) => {
                let tables = [table.table];
                let weighted =
                    band.weighted_radiance_and_derivative(temperature_k, &tables, |wl| {
                        let tau = table.table.value_at(wl);
                        if complement {
                            1.0 - tau
                        } else {
                            tau
                        }
                    })?;
                let plain =
                    band.weighted_radiance_and_derivative(temperature_k, &tables, |_| 1.0)?;
                Ok((weighted.0, plain.0))
            }
        }
    }

    /// Band radiance of a blackbody at `object_k` after the path: int r tau L(T_obj)
    /// dlambda, in the band's radiance units.
    ///
    /// Accuracy: relative 1e-12 against mpmath quadrature (`tests/atmosphere_band.rs`).
    ///
    /// # Errors
    /// [`PathTransmittance::check_band`], the errors of
    /// [`Band::weighted_radiance_and_derivative`], and [`Error::PathOpaque`] when the
    /// transmitted radiance underflows to zero (a path no object radiance gets through).
    pub fn band_transmitted_radiance(&self, band: &Band<'_>, object_k: f64) -> Result<f64> {
        let (weighted, plain) = self.integrals(band, object_k, false)?;
        opaque_check(weighted, plain)?;
        Ok(weighted)
    }

    /// Band-effective transmittance weighted by the object's own spectrum,
    /// tau_eff(T_obj) = int r tau L(T_obj) / int r L(T_obj), dimensionless in [0, 1].
    ///
    /// Depends on `object_k` (see the module docs for how much). Numerator and denominator
    /// use the same quadrature, so a path with tau = 1 gives exactly 1.
    ///
    /// # Errors
    /// As [`PathTransmittance::band_transmitted_radiance`]; [`Error::RadianceUnderflow`]
    /// when the object's band radiance underflows.
    ///
    /// Accuracy: relative 1e-12 against mpmath quadrature, thick paths included (2 km of
    /// saturated air at 60 C: `tests/atmosphere_band.rs`).
    pub fn band_transmittance(&self, band: &Band<'_>, object_k: f64) -> Result<f64> {
        let (weighted, plain) = self.integrals(band, object_k, false)?;
        if !(plain > 0.0) {
            return Err(Error::RadianceUnderflow);
        }
        opaque_check(weighted, plain)?;
        // The ratio of two sums over the same nodes with weights in (0, 1]: the clamp only
        // removes a rounding excess of a few ulp above 1.
        Ok((weighted / plain).clamp(0.0, 1.0))
    }

    /// Band radiance the path itself emits, int r (1 - tau) L(T_air) dlambda, in the band's
    /// radiance units (Kirchhoff: a non-scattering path emits with emissivity 1 - tau).
    /// Computed with 1 - tau = -expm1(-k w) for the model, so short paths keep their digits.
    ///
    /// # Errors
    /// As [`PathTransmittance::band_transmitted_radiance`].
    pub fn band_path_radiance(&self, band: &Band<'_>, air_k: f64) -> Result<f64> {
        self.integrals(band, air_k, true)
            .map(|(weighted, _)| weighted)
    }
}

impl Path {
    /// [`PathTransmittance::band_path_radiance`] at this path's own air temperature.
    ///
    /// # Errors
    /// As [`PathTransmittance::band_path_radiance`].
    pub fn band_path_radiance(&self, band: &Band<'_>) -> Result<f64> {
        PathTransmittance::Continuum(*self).band_path_radiance(band, self.air().temperature_k())
    }

    /// [`PathTransmittance::band_transmittance`] for this path.
    ///
    /// # Errors
    /// As [`PathTransmittance::band_transmittance`].
    pub fn band_transmittance(&self, band: &Band<'_>, object_k: f64) -> Result<f64> {
        PathTransmittance::Continuum(*self).band_transmittance(band, object_k)
    }
}
