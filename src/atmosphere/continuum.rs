//! Spectral transmittance of a horizontal path in the 8-14 um window from the water-vapour
//! continuum of Roberts, Selby and Biberman (1976).
//!
//! # Model
//! R. E. Roberts, J. E. A. Selby, L. M. Biberman, "Infrared continuum absorption by
//! atmospheric water vapor in the 8-12 um window", Applied Optics 15 (1976) 2085-2090.
//! The absorption coefficient per unit mass of water vapour is
//!
//! ```text
//! k(nu, T) = C_s(nu, T) (e + gamma (P - e))                    cm^2 g^-1
//! C_s(nu, 296 K) = 4.18 + 5578 exp(-7.87e-3 nu)                cm^2 g^-1 atm^-1
//! C_s(nu, T) = C_s(nu, 296 K) exp(1800 (1/T - 1/296))          T in K
//! gamma = 0.002                                                foreign/self broadening
//! tau(lambda) = exp(-k w)
//! ```
//!
//! with nu = 10^4 / lambda the wavenumber in cm^-1 (lambda in um), e the water-vapour
//! partial pressure and P the total pressure, both in **atm** (hPa / 1013.25), and w the
//! water along the path in **g cm^-2** ([`crate::atmosphere::Air::precipitable_water_g_cm2`]:
//! w = rho_v (g m^-3) d (m) 1e-4). The optical depth k w is dimensionless.
//!
//! The self term e is collisions of water with water; the foreign term gamma (P - e) is
//! collisions with dry air (partial pressure P - e). Some texts write gamma P; the two differ
//! by gamma e / (e + gamma (P - e)), below 0.25 % of k for any e up to 60 C saturation.
//!
//! What was verified: the constants 4.18, 5578, 7.87e-3 cm, 1800 K, 296 K and 0.002, and the
//! form e + gamma (P - e), agree with a public implementation (the two-stream radiation code
//! of the RAMS/OLAM atmospheric models, which cites the LOWTRAN 5 report of Kneizys et al.
//! 1980 for the coefficient). The 1976 paper itself could not be read here, so the units
//! (cm^2 g^-1 atm^-1), the fitted spectral range and the temperature range of the 1800 K
//! coefficient are taken from that implementation and from memory of the paper.
//!
//! # Validity and what the model leaves out
//! - Wavelengths [`CONTINUUM_MIN_UM`]..[`CONTINUUM_MAX_UM`] (714-1250 cm^-1). RSB fitted
//!   the 8-12 um window; 12-14 um is the same exponential carried on. Outside 8-14 um the
//!   model is not even an approximation: [`Error::OutsideContinuumModel`] tells the caller
//!   to supply a spectral table ([`crate::atmosphere::TransmittanceTable`]).
//! - Air temperatures are those of [`Air`] (-45..+60 C); the 1800 K coefficient is
//!   applied as published, and below 296 K it is an extrapolation whose fitted range could
//!   not be checked here.
//! - **Water-vapour lines** are left out: the weak lines inside the window and the wing of
//!   the 6.3 um band, which closes the window below about 8 um. Where a band edge sits at
//!   8 um and the path is humid and long (hundreds of metres and more), this matters.
//! - **CO2** is left out: the wing of its 15 um band absorbs strongly above about 13 um, and
//!   weak CO2 bands near 9.4 and 10.4 um absorb a little. Bands reaching past 13 um over
//!   paths of hundreds of metres and more need a radiative-transfer table.
//! - **Ozone** (9.6 um band) is left out; near the ground it matters little, through the
//!   stratosphere (slant paths) a lot.
//! - **Aerosols, haze, fog, rain, dust and smoke** are left out; in haze they can attenuate
//!   more than the continuum does.
//!
//! The continuum is the dominant absorber of the 8-13 um window near the ground, so the
//! model's transmittance is an upper bound that is closest for paths of metres to a few
//! hundred metres in clear air and bands inside 8-13 um. The magnitudes above are
//! qualitative (from memory of published atmospheric spectra, not computed here): for
//! kilometre paths, and for bands reaching past 13 um, take the transmittance from a
//! radiative-transfer code instead.

use super::humidity::{Air, STANDARD_PRESSURE_HPA};
use crate::error::{finite, Error, Result};

/// Shortest wavelength of the continuum model, um (1250 cm^-1).
pub const CONTINUUM_MIN_UM: f64 = 8.0;
/// Longest wavelength of the continuum model, um (714.3 cm^-1).
pub const CONTINUUM_MAX_UM: f64 = 14.0;
/// The constant term of C_s(nu, 296 K), cm^2 g^-1 atm^-1.
pub const SELF_A: f64 = 4.18;
/// The exponential amplitude of C_s(nu, 296 K), cm^2 g^-1 atm^-1.
pub const SELF_B: f64 = 5578.0;
/// The exponential rate of C_s(nu, 296 K), cm (per cm^-1 of wavenumber).
pub const SELF_BETA_CM: f64 = 7.87e-3;
/// Temperature coefficient of C_s, K.
pub const SELF_TEMPERATURE_K: f64 = 1800.0;
/// Reference temperature of C_s, K.
pub const REFERENCE_K: f64 = 296.0;
/// Ratio of foreign (dry-air) to self broadening, gamma.
pub const FOREIGN_RATIO: f64 = 0.002;

/// The self-broadening coefficient C_s(nu, 296 K) = 4.18 + 5578 exp(-7.87e-3 nu),
/// cm^2 g^-1 atm^-1, at wavenumber `wavenumber_cm1` (cm^-1). Not range-checked.
#[must_use]
pub fn self_coefficient_296(wavenumber_cm1: f64) -> f64 {
    SELF_A + SELF_B * libm::exp(-SELF_BETA_CM * wavenumber_cm1)
}

/// The temperature factor exp(1800 (1/T - 1/296)) of C_s (1 at 296 K, 1.10 at 283 K).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`].
pub fn temperature_factor(temperature_k: f64) -> Result<f64> {
    let t = crate::error::check_temperature_k(temperature_k)?;
    Ok(libm::exp(
        SELF_TEMPERATURE_K * (1.0 / t - 1.0 / REFERENCE_K),
    ))
}

/// A horizontal path of uniform air: its length and the continuum transmittance.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Path {
    air: Air,
    distance_m: f64,
    water_g_cm2: f64,
    /// Optical depth per unit C_s(nu, 296 K): factor(T) (e + gamma (P - e)) w, in
    /// g cm^-2 atm (so C_s * scale is dimensionless).
    scale: f64,
}

impl Path {
    /// A horizontal path of `distance_m` metres through `air` (0 m is allowed: tau = 1).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::DistanceNegative`].
    pub fn new(air: Air, distance_m: f64) -> Result<Self> {
        let water_g_cm2 = air.precipitable_water_g_cm2(distance_m)?;
        let e_atm = air.vapour_pressure_hpa() / STANDARD_PRESSURE_HPA;
        let p_atm = air.pressure_hpa() / STANDARD_PRESSURE_HPA;
        let broadening_atm = e_atm + FOREIGN_RATIO * (p_atm - e_atm);
        let scale = temperature_factor(air.temperature_k())? * broadening_atm * water_g_cm2;
        finite(scale)?;
        Ok(Path {
            air,
            distance_m,
            water_g_cm2,
            scale,
        })
    }

    /// The air of the path.
    #[must_use]
    pub fn air(&self) -> Air {
        self.air
    }
    /// Path length, m.
    #[must_use]
    pub fn distance_m(&self) -> f64 {
        self.distance_m
    }
    /// Water along the path, g cm^-2.
    #[must_use]
    pub fn precipitable_water_g_cm2(&self) -> f64 {
        self.water_g_cm2
    }

    /// The optical depth k w (dimensionless) without the range check; `wavelength_um`
    /// must be positive.
    pub(crate) fn optical_depth_unchecked(&self, wavelength_um: f64) -> f64 {
        self_coefficient_296(1.0e4 / wavelength_um) * self.scale
    }

    /// Optical depth k(nu, T) w of the path at `wavelength_um` (dimensionless).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::OutsideContinuumModel`] outside
    /// [[`CONTINUUM_MIN_UM`], [`CONTINUUM_MAX_UM`]].
    pub fn optical_depth(&self, wavelength_um: f64) -> Result<f64> {
        check_wavelength_um(wavelength_um)?;
        Ok(self.optical_depth_unchecked(wavelength_um))
    }

    /// Spectral transmittance tau(lambda) = exp(-k w) in (0, 1].
    ///
    /// Accuracy: the formula to rounding (relative 1e-15 against mpmath,
    /// `tests/atmosphere_continuum.rs`); the model's own error is discussed in the module
    /// docs.
    ///
    /// # Errors
    /// As [`Path::optical_depth`]; [`Error::PathOpaque`] when exp(-k w) underflows to zero
    /// (an optical depth above about 745: the path is opaque at this wavelength).
    pub fn spectral_transmittance(&self, wavelength_um: f64) -> Result<f64> {
        let tau = libm::exp(-self.optical_depth(wavelength_um)?);
        if tau > 0.0 {
            Ok(tau)
        } else {
            Err(Error::PathOpaque)
        }
    }

    /// Samples tau(lambda) at `wavelengths_um` into the caller's `out_transmittance` (same
    /// length), e.g. to build a [`crate::band::SpectralTable`] for the scene's spectral mode.
    /// Every wavelength is checked before anything is written, so on error
    /// `out_transmittance` is untouched.
    ///
    /// Linear interpolation between samples spaced h um apart errs by at most
    /// max|tau''| h^2 / 8; on a 0.1 um grid over 8-14 um it is 4.9e-5 for a 1 km path at
    /// 90 % RH and 30 C (measured, `tests/atmosphere_continuum.rs`).
    ///
    /// # Errors
    /// [`Error::TableLengthMismatch`] when the slices differ in length, and the errors of
    /// [`Path::optical_depth`].
    pub fn fill_transmittance_table(
        &self,
        wavelengths_um: &[f64],
        out_transmittance: &mut [f64],
    ) -> Result<()> {
        if wavelengths_um.len() != out_transmittance.len() {
            return Err(Error::TableLengthMismatch);
        }
        for &wavelength_um in wavelengths_um {
            check_wavelength_um(wavelength_um)?;
        }
        for (out, &wavelength_um) in out_transmittance.iter_mut().zip(wavelengths_um) {
            *out = libm::exp(-self.optical_depth_unchecked(wavelength_um));
        }
        Ok(())
    }
}

/// Checks that a wavelength lies in the continuum model's range.
fn check_wavelength_um(wavelength_um: f64) -> Result<f64> {
    if (CONTINUUM_MIN_UM..=CONTINUUM_MAX_UM).contains(&finite(wavelength_um)?) {
        Ok(wavelength_um)
    } else {
        Err(Error::OutsideContinuumModel)
    }
}
