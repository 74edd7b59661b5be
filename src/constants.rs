//! Physical constants, CODATA 2018 (SI 2019 redefinition), in the crate's units.
//!
//! `h`, `c` and `k` are exact by definition of the SI since 2019. Everything else here is
//! derived from them in double precision; the values written out in each doc are the
//! CODATA 2018 recommended values (or, where CODATA gives none, the exact derivation
//! evaluated to 20 digits with mpmath), and `tests/constants.rs` checks the derived values
//! against them.
//!
//! Units of the crate: wavelength in micrometres (um), temperature in kelvin (K), spectral
//! radiance in W m^-2 sr^-1 um^-1, photon spectral radiance in photons s^-1 m^-2 sr^-1 um^-1.

use core::f64::consts::PI;

/// Planck constant h = 6.626 070 15e-34 J s (exact, SI 2019).
pub const PLANCK_J_S: f64 = 6.626_070_15e-34;
/// Speed of light in vacuum c = 299 792 458 m s^-1 (exact).
pub const SPEED_OF_LIGHT_M_S: f64 = 299_792_458.0;
/// Boltzmann constant k = 1.380 649e-23 J K^-1 (exact, SI 2019).
pub const BOLTZMANN_J_K: f64 = 1.380_649e-23;

/// First radiation constant for spectral radiance, c1L = 2 h c^2 = 1.191 042 972...e-16 W m^2 sr^-1.
pub const C1L_W_M2_SR: f64 = 2.0 * PLANCK_J_S * SPEED_OF_LIGHT_M_S * SPEED_OF_LIGHT_M_S;

/// c1L expressed for wavelength in um and radiance per um:
/// L = C1L_UM / lambda_um^5 / (exp(c2/(lambda T)) - 1) in W m^-2 sr^-1 um^-1.
/// Value 1.191 042 972 397 188 4e8 W um^4 m^-2 sr^-1 (= c1L * 1e24).
pub const C1L_UM: f64 = C1L_W_M2_SR * 1.0e24;

/// Photon first radiation constant 2c for wavelength in um and photon radiance per um:
/// Lp = C1P_UM / lambda_um^4 / (exp(c2/(lambda T)) - 1) in photons s^-1 m^-2 sr^-1 um^-1.
/// Value 5.995 849 16e26 (= 2 c * 1e18).
pub const C1P_UM: f64 = 2.0 * SPEED_OF_LIGHT_M_S * 1.0e18;

/// Second radiation constant c2 = h c / k = 14 387.768 775 039 338 um K
/// (CODATA 2018: 1.438 776 877...e-2 m K, exact in the SI 2019).
pub const C2_UMK: f64 = PLANCK_J_S * SPEED_OF_LIGHT_M_S / BOLTZMANN_J_K * 1.0e6;

/// Stefan-Boltzmann constant sigma = 2 pi^5 k^4 / (15 h^3 c^2) = 5.670 374 419...e-8 W m^-2 K^-4.
pub const STEFAN_BOLTZMANN_W_M2_K4: f64 = 2.0 * PI * PI * PI * PI * PI * K4
    / (15.0 * PLANCK_J_S * PLANCK_J_S * PLANCK_J_S * SPEED_OF_LIGHT_M_S * SPEED_OF_LIGHT_M_S);

const K4: f64 = BOLTZMANN_J_K * BOLTZMANN_J_K * BOLTZMANN_J_K * BOLTZMANN_J_K;

/// Root x5 = 4.965 114 231 744 276 of x = 5 (1 - exp(-x)), i.e. x5 = 5 + W0(-5 e^-5)
/// (Lambert W, evaluated with mpmath). The peak of spectral radiance per unit wavelength
/// lies at c2 / (lambda T) = x5.
pub const WIEN_X_ENERGY: f64 = 4.965_114_231_744_276;

/// Root x4 = 3.920 690 394 872 886 of x = 4 (1 - exp(-x)): the peak of photon spectral
/// radiance per unit wavelength lies at c2 / (lambda T) = x4.
pub const WIEN_X_PHOTON: f64 = 3.920_690_394_872_886;

/// Wien wavelength displacement constant b = c2 / x5 = 2897.771 955 um K
/// (CODATA 2018: 2.897 771 955e-3 m K).
pub const WIEN_B_UMK: f64 = C2_UMK / WIEN_X_ENERGY;

/// Wien displacement constant for photon radiance per unit wavelength, c2 / x4
/// = 3669.706 um K (derived; no CODATA value).
pub const WIEN_B_PHOTON_UMK: f64 = C2_UMK / WIEN_X_PHOTON;

/// Riemann zeta(3) = 1.202 056 903 159 594 3 (Apery's constant).
pub const ZETA_3: f64 = 1.202_056_903_159_594_3;
