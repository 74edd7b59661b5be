//! Spectral laws of a blackbody: Planck's law for energy and photon detectors, its
//! temperature derivative, Wien's displacement law, Stefan-Boltzmann, and the blackbody
//! fraction F(0 -> lambda*T).
//!
//! With x = c2 / (lambda T) (dimensionless), Planck's law for spectral radiance is
//!
//! ```text
//! L(lambda, T)  = c1L / lambda^5 / (exp(x) - 1)    W m^-2 sr^-1 um^-1
//! Lp(lambda, T) = c1p / lambda^4 / (exp(x) - 1)    photons s^-1 m^-2 sr^-1 um^-1
//! ```
//!
//! and the change of variable lambda -> x turns every band integral into an integral of
//! t^m / (e^t - 1) (m = 3 for energy, m = 2 for photon detectors):
//!
//! ```text
//! integral L dlambda  = c1L T^4 / c2^4 * integral t^3 / (e^t - 1) dt
//! integral Lp dlambda = c1p T^3 / c2^3 * integral t^2 / (e^t - 1) dt
//! ```
//!
//! Those integrals are computed here to full double precision (`tail_integral`,
//! `head_integral`): for x >= 2 by the exponentially convergent series
//! sum_n e^(-n x) / n * sum_j m!/(m-j)! x^(m-j) / n^j (all terms positive), for x < 2 by
//! the Bernoulli-number expansion of t/(e^t - 1), convergent for |x| < 2 pi. Each regime
//! uses the series that converges fast there; neither is truncated above 1e-17 relative.

use crate::constants::{
    C1L_UM, C1P_UM, C2_UMK, STEFAN_BOLTZMANN_W_M2_K4, WIEN_B_PHOTON_UMK, WIEN_B_UMK, ZETA_3,
};
use crate::error::{check_temperature_k, finite, Error, Result};
use core::f64::consts::PI;

/// The kind of detector, which sets what a band integral sums.
///
/// Stored as `u32` discriminants 0 and 1, the values the C ABI fixes.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Detector {
    /// A thermal detector (microbolometer, thermopile): responds to radiant power, so bands
    /// integrate spectral radiance L (W m^-2 sr^-1 um^-1).
    Energy,
    /// A quantum detector (InSb, InGaAs, Si, MCT photodiodes): counts photons, so bands
    /// integrate photon spectral radiance Lp = L lambda / (h c).
    Photon,
}

impl Detector {
    /// The power m of t in the band integrand t^m / (e^t - 1): 3 for energy, 2 for photon.
    #[must_use]
    pub const fn moment(self) -> u32 {
        match self {
            Detector::Energy => 3,
            Detector::Photon => 2,
        }
    }

    /// Reads a C enum value: 0 is energy, 1 is photon, anything else is an error.
    ///
    /// # Errors
    /// [`Error::InvalidDetector`] for any other value.
    pub const fn from_raw(raw: u32) -> Result<Detector> {
        match raw {
            0 => Ok(Detector::Energy),
            1 => Ok(Detector::Photon),
            _ => Err(Error::InvalidDetector),
        }
    }

    /// The band-integral scale c1 T^(m+1) / c2^(m+1) for this detector, in radiance units
    /// per unit of the dimensionless integral (not validated: `temperature_k` > 0 finite).
    pub(crate) fn scale(self, temperature_k: f64) -> f64 {
        let r = temperature_k / C2_UMK;
        match self {
            Detector::Energy => C1L_UM * (r * r) * (r * r),
            Detector::Photon => C1P_UM * (r * r) * r,
        }
    }
}

/// The dimensionless x = c2 / (lambda T), validated.
fn reduced_x(wavelength_um: f64, temperature_k: f64) -> Result<f64> {
    if finite(wavelength_um)? <= 0.0 {
        return Err(Error::WavelengthNotPositive);
    }
    check_temperature_k(temperature_k)?;
    Ok(C2_UMK / wavelength_um / temperature_k)
}

/// Checks a computed radiance: finite and a normal double (zero and subnormals underflow).
pub(crate) fn check_radiance(radiance: f64) -> Result<f64> {
    if radiance.is_nan() {
        Err(Error::NonFinite)
    } else if radiance.is_infinite() {
        Err(Error::RadianceOverflow)
    } else if radiance < f64::MIN_POSITIVE {
        Err(Error::RadianceUnderflow)
    } else {
        Ok(radiance)
    }
}

/// Spectral radiance of a blackbody for a detector kind, without validation.
/// `x` = c2 / (lambda T). Uses a logarithmic form where exp(x) would overflow.
pub(crate) fn spectral_unchecked(detector: Detector, wavelength_um: f64, x: f64) -> f64 {
    // lambda^5 (lambda^4) by multiplication: within 2 ulp, and far cheaper than pow.
    let lambda2 = wavelength_um * wavelength_um;
    let (c1, power, lambda_pow) = match detector {
        Detector::Energy => (C1L_UM, 5, lambda2 * lambda2 * wavelength_um),
        Detector::Photon => (C1P_UM, 4, lambda2 * lambda2),
    };
    let pre = c1 / lambda_pow;
    if x <= 700.0 && pre.is_finite() {
        pre / libm::expm1(x)
    } else {
        // exp(ln c1 - p ln(lambda) - x) / (1 - e^-x): keeps radiances near the underflow
        // threshold normal where exp(x) alone overflows. Relative error about x * 1e-16.
        libm::exp(libm::log(c1) - f64::from(power) * libm::log(wavelength_um) - x)
            / -libm::expm1(-x)
    }
}

/// Spectral radiance of a blackbody, Planck's law:
/// L = c1L / lambda^5 / (exp(c2 / (lambda T)) - 1), in W m^-2 sr^-1 um^-1.
///
/// `wavelength_um` > 0 in um, `temperature_k` > 0 in K. Accuracy: a few ulp (libm `expm1`),
/// checked against mpmath in `tests/reference_planck.rs`.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::WavelengthNotPositive`], [`Error::TemperatureNotPositive`];
/// [`Error::RadianceUnderflow`] when the radiance is below the normal double range,
/// [`Error::RadianceOverflow`] when it is above it.
pub fn spectral_radiance(wavelength_um: f64, temperature_k: f64) -> Result<f64> {
    spectral(Detector::Energy, wavelength_um, temperature_k)
}

/// Photon spectral radiance of a blackbody: Lp = 2c / lambda^4 / (exp(c2/(lambda T)) - 1),
/// in photons s^-1 m^-2 sr^-1 um^-1 (equal to L lambda / (h c)).
///
/// # Errors
/// As [`spectral_radiance`].
pub fn spectral_photon_radiance(wavelength_um: f64, temperature_k: f64) -> Result<f64> {
    spectral(Detector::Photon, wavelength_um, temperature_k)
}

/// Spectral radiance for a detector kind: [`spectral_radiance`] for
/// [`Detector::Energy`], [`spectral_photon_radiance`] for [`Detector::Photon`].
///
/// # Errors
/// As [`spectral_radiance`].
pub fn spectral(detector: Detector, wavelength_um: f64, temperature_k: f64) -> Result<f64> {
    let x = reduced_x(wavelength_um, temperature_k)?;
    check_radiance(spectral_unchecked(detector, wavelength_um, x))
}

/// Temperature derivative of the spectral radiance for a detector kind:
/// dL/dT = L * x / (T (1 - exp(-x))), x = c2 / (lambda T); units of L per kelvin.
///
/// # Errors
/// As [`spectral_radiance`] (the radiance itself must be a normal double).
pub fn spectral_derivative(
    detector: Detector,
    wavelength_um: f64,
    temperature_k: f64,
) -> Result<f64> {
    let x = reduced_x(wavelength_um, temperature_k)?;
    let radiance = check_radiance(spectral_unchecked(detector, wavelength_um, x))?;
    check_radiance(radiance * x / temperature_k / -libm::expm1(-x))
}

/// Wavelength of peak spectral radiance (per unit wavelength), Wien's displacement law:
/// lambda_max = b / T with b = 2897.771 955 um K (CODATA 2018).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`].
pub fn peak_wavelength_um(temperature_k: f64) -> Result<f64> {
    Ok(WIEN_B_UMK / check_temperature_k(temperature_k)?)
}

/// Wavelength of peak photon spectral radiance (per unit wavelength): lambda = c2 / (x4 T),
/// x4 = 3.920 690 394 872 886, so b_p = 3669.706 um K.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`].
pub fn photon_peak_wavelength_um(temperature_k: f64) -> Result<f64> {
    Ok(WIEN_B_PHOTON_UMK / check_temperature_k(temperature_k)?)
}

/// Total (all-wavelength) radiance of a blackbody, L = sigma T^4 / pi, in W m^-2 sr^-1.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], and underflow/overflow.
pub fn total_radiance(temperature_k: f64) -> Result<f64> {
    Ok(total_exitance(temperature_k)? / PI)
}

/// Total hemispherical exitance of a blackbody, Stefan-Boltzmann: M = sigma T^4, W m^-2.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], and underflow/overflow.
pub fn total_exitance(temperature_k: f64) -> Result<f64> {
    let t = check_temperature_k(temperature_k)?;
    check_radiance(STEFAN_BOLTZMANN_W_M2_K4 * (t * t) * (t * t))
}

/// Total photon radiance of a blackbody, Lp = (2 c / c2^3 * 2 zeta(3)) T^3 in
/// photons s^-1 m^-2 sr^-1 (about 4.8398e14 T^3; pi times that, 1.5205e15 T^3, is the photon exitance).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], and underflow/overflow.
pub fn total_photon_radiance(temperature_k: f64) -> Result<f64> {
    let t = check_temperature_k(temperature_k)?;
    check_radiance(Detector::Photon.scale(t) * moment_total(2))
}

/// Blackbody fraction F(0 -> lambda T): the share of total radiance emitted at wavelengths
/// below lambda, F = 15/pi^4 * integral from c2/(lambda T) to infinity of t^3/(e^t - 1) dt.
///
/// `lambda_t_umk` > 0 in um K. Full double precision over the whole range (relative error
/// of a few ulp against mpmath, `tests/reference_planck.rs`), including deep in the Wien
/// tail where F is tiny. Returns exactly 0 where F underflows (lambda T below about
/// 20 um K); for 1 - F without cancellation use [`blackbody_fraction_complement`].
///
/// # Errors
/// [`Error::NonFinite`], [`Error::LambdaTNotPositive`].
pub fn blackbody_fraction(lambda_t_umk: f64) -> Result<f64> {
    let x = fraction_x(lambda_t_umk)?;
    Ok(tail_fraction(3, x))
}

/// Beyond this x = c2/(lambda T) the tail series' e^-x nears the subnormal range (it
/// enters it at x = 708.4, while F stays a normal double up to x = 726).
const FRACTION_DEEP_X: f64 = 700.0;

/// The tail share G_m(x) / G_m(0) to full precision, 0 where it is not a normal double.
///
/// Beyond [`FRACTION_DEEP_X`] only the first term of the tail series counts (the next is
/// e^-x = 1e-304 of it): G_m(x) = e^-x P_m(x), P_3 = x^3 + 3x^2 + 6x + 6,
/// P_2 = x^2 + 2x + 2, with e^-x applied in two halves so that no intermediate leaves the
/// normal range. (From e^-x directly, F came out with few significant bits there, and as
/// a subnormal that even decreased with lambda T.)
fn tail_fraction(m: u32, x: f64) -> f64 {
    let share = if x > FRACTION_DEEP_X {
        if x > 800.0 {
            // F < 1e-340: zero (and x^3 would overflow for an infinite x).
            return 0.0;
        }
        let poly = match m {
            2 => x * (x + 2.0) + 2.0,
            _ => x * (x * (x + 3.0) + 6.0) + 6.0,
        };
        let half = libm::exp(-0.5 * x);
        poly / moment_total(m) * half * half
    } else {
        tail_integral(m, x) / moment_total(m)
    };
    if share < f64::MIN_POSITIVE {
        0.0
    } else {
        share
    }
}

/// 1 - F(0 -> lambda T), the share emitted above lambda, computed directly (no
/// cancellation), to full double precision.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::LambdaTNotPositive`].
pub fn blackbody_fraction_complement(lambda_t_umk: f64) -> Result<f64> {
    let x = fraction_x(lambda_t_umk)?;
    Ok(head_integral(3, x) / moment_total(3))
}

/// Photon blackbody fraction: the share of total photon radiance below lambda,
/// 1/(2 zeta(3)) * integral from c2/(lambda T) to infinity of t^2/(e^t - 1) dt.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::LambdaTNotPositive`].
pub fn photon_blackbody_fraction(lambda_t_umk: f64) -> Result<f64> {
    let x = fraction_x(lambda_t_umk)?;
    Ok(tail_fraction(2, x))
}

fn fraction_x(lambda_t_umk: f64) -> Result<f64> {
    if finite(lambda_t_umk)? <= 0.0 {
        return Err(Error::LambdaTNotPositive);
    }
    Ok(C2_UMK / lambda_t_umk)
}

/// Integral of t^m / (e^t - 1) over (0, infinity) for m = 1, 2, 3:
/// pi^2/6, 2 zeta(3), pi^4/15 (Gamma(m+1) zeta(m+1)).
#[must_use]
pub(crate) fn moment_total(m: u32) -> f64 {
    match m {
        1 => PI * PI / 6.0,
        2 => 2.0 * ZETA_3,
        _ => PI * PI * PI * PI / 15.0,
    }
}

/// Where the two expansions of the moment integrals meet.
const SPLIT_X: f64 = 2.0;

/// B_2j / (2j)! for j = 1..=20: coefficients of t/(e^t - 1) = 1 - t/2 + sum c_j t^2j,
/// evaluated with mpmath (`bernoulli(2j)/factorial(2j)`). The series converges for
/// |t| < 2 pi; at t = 2 the 20th term is below 1e-20 of the first.
const BERNOULLI_OVER_FACTORIAL: [f64; 20] = [
    8.333_333_333_333_333e-2,
    -1.388_888_888_888_889e-3,
    3.306_878_306_878_307e-5,
    -8.267_195_767_195_767e-7,
    2.087_675_698_786_81e-8,
    -5.284_190_138_687_493e-10,
    1.338_253_653_068_468e-11,
    -3.389_680_296_322_583e-13,
    8.586_062_056_277_845e-15,
    -2.174_868_698_558_062e-16,
    5.509_002_828_360_23e-18,
    -1.395_446_468_581_252e-19,
    3.534_707_039_629_467e-21,
    -8.953_517_427_037_547e-23,
    2.267_952_452_337_683e-24,
    -5.744_790_668_872_202e-26,
    1.455_172_475_614_865e-27,
    -3.685_994_940_665_31e-29,
    9.336_734_257_095_045e-31,
    -2.365_022_415_700_63e-32,
];

/// Integral of t^m / (e^t - 1) from 0 to x (x >= 0), m = 1, 2, 3, to full precision.
#[must_use]
pub(crate) fn head_integral(m: u32, x: f64) -> f64 {
    if x < SPLIT_X {
        // t^m/(e^t-1) = t^(m-1) * (1 - t/2 + sum c_j t^2j); integrate term by term:
        // x^m/m - x^(m+1)/(2(m+1)) + sum c_j x^(2j+m)/(2j+m).
        let mf = f64::from(m);
        let x2 = x * x;
        let mut sum = 0.0;
        let mut power = x2; // x^(2j)
        for (j, c) in (1u32..).zip(BERNOULLI_OVER_FACTORIAL.iter()) {
            let term = c * power / (f64::from(2 * j) + mf);
            sum += term;
            if libm::fabs(term) < 1e-20 * (1.0 / mf) {
                break;
            }
            power *= x2;
        }
        libm::pow(x, mf) * (1.0 / mf - x / (2.0 * (mf + 1.0)) + sum)
    } else {
        moment_total(m) - tail_integral(m, x)
    }
}

/// Integral of t^m / (e^t - 1) from x to infinity (x >= 0), m = 1, 2, 3, to full precision.
#[must_use]
pub(crate) fn tail_integral(m: u32, x: f64) -> f64 {
    if x < SPLIT_X {
        return moment_total(m) - head_integral(m, x);
    }
    tail_series(m, x, libm::exp(-x))
}

/// 1/n for n = 1..=32, so the series below multiplies instead of dividing.
const INVERSE_N: [f64; 32] = {
    let mut table = [0.0; 32];
    let mut n = 0;
    let mut n_f64 = 1.0;
    while n < 32 {
        table[n] = 1.0 / n_f64;
        n += 1;
        n_f64 += 1.0;
    }
    table
};

/// The tail series for x >= 2 with q = e^-x:
/// integral_x^inf t^m e^(-n t) dt = e^(-n x) sum_{j=0}^{m} m!/(m-j)! x^(m-j) / n^(j+1),
/// summed over n while terms exceed 1e-18 of the sum (at most 21 terms at x = 2, where
/// q^32 = e^-64 bounds the 32nd; all terms positive).
fn tail_series(m: u32, x: f64, q: f64) -> f64 {
    if q == 0.0 {
        // x > 745: the tail is below e^-745 x^m, zero in double precision for every
        // finite scale this crate applies; returning early also keeps x = inf from
        // producing 0 * inf = NaN.
        return 0.0;
    }
    let mut qn = 1.0;
    let mut sum = 0.0;
    for &inv_n in &INVERSE_N {
        qn *= q;
        let poly = match m {
            1 => x + inv_n,
            2 => x * x + inv_n * (2.0 * x + 2.0 * inv_n),
            _ => x * x * x + inv_n * (3.0 * x * x + inv_n * (6.0 * x + 6.0 * inv_n)),
        };
        let term = qn * inv_n * poly;
        sum += term;
        if term <= 1e-18 * sum {
            break;
        }
    }
    sum
}

/// 12-point Gauss-Legendre nodes (positive half) and weights on [-1, 1], computed with
/// mpmath to 40 digits and rounded.
pub(crate) const GAUSS_LEGENDRE_12: [(f64, f64); 6] = [
    (0.981_560_634_246_719_3, 0.047_175_336_386_511_83),
    (0.904_117_256_370_474_9, 0.106_939_325_995_318_43),
    (0.769_902_674_194_304_7, 0.160_078_328_543_346_23),
    (0.587_317_954_286_617_4, 0.203_167_426_723_065_92),
    (0.367_831_498_998_180_2, 0.233_492_536_538_354_8),
    (0.125_233_408_511_468_9, 0.249_147_045_813_402_8),
];

/// t^m for m = 1, 2, 3.
#[inline]
pub(crate) fn power(m: u32, t: f64) -> f64 {
    match m {
        1 => t,
        2 => t * t,
        _ => t * t * t,
    }
}

/// Integrand t^m / (e^t - 1) for t > 0.
#[inline]
pub(crate) fn moment_integrand(m: u32, t: f64) -> f64 {
    if t > 800.0 {
        // Below the smallest double; t^m / expm1(t) would be inf / inf there.
        return 0.0;
    }
    power(m, t) / libm::expm1(t)
}

/// 4-, 6- and 8-point Gauss-Legendre nodes (positive half) and weights on [-1, 1], computed
/// with mpmath (Legendre roots by `findroot`, 40 digits) and rounded.
const GAUSS_LEGENDRE_4: [(f64, f64); 2] = [
    (0.861_136_311_594_052_6, 0.347_854_845_137_453_86),
    (0.339_981_043_584_856_26, 0.652_145_154_862_546_1),
];
/// See [`GAUSS_LEGENDRE_4`].
const GAUSS_LEGENDRE_6: [(f64, f64); 3] = [
    (0.932_469_514_203_152, 0.171_324_492_379_170_35),
    (0.661_209_386_466_264_5, 0.360_761_573_048_138_6),
    (0.238_619_186_083_196_9, 0.467_913_934_572_691_05),
];
/// See [`GAUSS_LEGENDRE_4`].
const GAUSS_LEGENDRE_8: [(f64, f64); 4] = [
    (0.960_289_856_497_536_2, 0.101_228_536_290_376_26),
    (0.796_666_477_413_626_7, 0.222_381_034_453_374_47),
    (0.525_532_409_916_329, 0.313_706_645_877_887_3),
    (0.183_434_642_495_649_8, 0.362_683_783_378_362),
];

/// One Gauss-Legendre panel [a, a + width] (width <= 1) of t^m/(e^t - 1) and of
/// t^(m+1) e^t/(e^t - 1)^2, with the fewest nodes that keep the truncation error below
/// 1e-17 relative for every a >= 0 (measured against mpmath for m = 2, 3 over
/// a = 0.001 .. 700; the nearest singularities are the poles at +-2 pi i):
/// 4 nodes for width <= 0.03 (error <= 8e-18), 6 for <= 0.25 (5e-20), 8 for <= 1 (5e-20).
fn gauss_panel(m: u32, a: f64, width: f64) -> (f64, f64, f64) {
    let unit = |_: f64| 1.0;
    if width <= 0.03 {
        gauss_sum(m, a, width, &GAUSS_LEGENDRE_4, unit)
    } else if width <= 0.25 {
        gauss_sum(m, a, width, &GAUSS_LEGENDRE_6, unit)
    } else {
        gauss_sum(m, a, width, &GAUSS_LEGENDRE_8, unit)
    }
}

/// As [`gauss_panel`] with a weight w(t) that is a rational function of t with its only
/// pole at t = 0 (a response linear in wavelength, lambda = c2/(t T), or a product of
/// a few), on a panel with 0 < width <= min(1, a). The pole sits at distance
/// a + width/2 >= 3 width/2 from the panel's centre; with s = max(width, width/a) the
/// rule is 4 nodes for s <= 0.03 (Bernstein ellipse rho >= 135 for the pole, error
/// ~rho^-8 < 1e-17), 6 for s <= 0.15 (rho >= 28), 8 for s <= 0.4 (rho >= 11.9), else 12
/// (rho >= 5.8, rho^-24 ~ 1e-18); the Planck poles at +-2 pi i need less (see
/// [`gauss_panel`]).
pub(crate) fn weighted_gauss_panel<W: Fn(f64) -> f64>(
    m: u32,
    a: f64,
    width: f64,
    weight: W,
) -> (f64, f64, f64) {
    let s = width.max(width / a);
    if s <= 0.03 {
        gauss_sum(m, a, width, &GAUSS_LEGENDRE_4, weight)
    } else if s <= 0.15 {
        gauss_sum(m, a, width, &GAUSS_LEGENDRE_6, weight)
    } else if s <= 0.4 {
        gauss_sum(m, a, width, &GAUSS_LEGENDRE_8, weight)
    } else {
        gauss_sum(m, a, width, &GAUSS_LEGENDRE_12, weight)
    }
}

/// Gauss-Legendre sums on [a, a + width] of f = t^m/(e^t - 1) times `weight`, of f k1 and
/// of f k2, where k1 = t e^t/(e^t - 1) and k2 = k1 (t (e^t + 1)/(e^t - 1) - 1) are the
/// first and second derivatives of ln-temperature of 1/(e^t - 1) over it
/// (d/d ln T of 1/(e^x - 1) at fixed wavelength, x = c2/(lambda T)).
#[inline]
fn gauss_sum<W: Fn(f64) -> f64>(
    m: u32,
    a: f64,
    width: f64,
    rule: &[(f64, f64)],
    weight: W,
) -> (f64, f64, f64) {
    let half = 0.5 * width;
    let mid = a + half;
    let mut sum = 0.0;
    let mut sum_derivative = 0.0;
    let mut sum_second = 0.0;
    // Near a panel's middle mid >= 1 (always so for the narrow panels of width <= 0.03
    // where this matters), e^t - 1 at the nodes t = mid + d comes from one expm1:
    // e^t - 1 = E + (E + 1) expm1(d), E = expm1(mid), with expm1(+-d) from the Taylor
    // series of sinh d and cosh d - 1 (|d| <= 0.015: truncation below 1e-19 relative).
    // Both terms have the same sign for d > 0; for d < 0 the second is at most
    // 1.6 |d| <= 0.024 times the first (E >= e - 1), so no cancellation.
    let shared = if half <= 0.015 && mid >= 1.0 {
        Some(libm::expm1(mid))
    } else {
        None
    };
    for &(node, w) in rule {
        let d = half * node;
        let expm1_pair = shared.map(|e_mid| {
            let d2 = d * d;
            let sinh = d * (1.0 + d2 * (1.0 / 6.0 + d2 * (1.0 / 120.0 + d2 * (1.0 / 5040.0))));
            let cosh_m1 =
                d2 * (0.5 + d2 * (1.0 / 24.0 + d2 * (1.0 / 720.0 + d2 * (1.0 / 40320.0))));
            let scale = e_mid + 1.0;
            (
                e_mid + scale * (cosh_m1 - sinh),
                e_mid + scale * (cosh_m1 + sinh),
            )
        });
        for (t, e_shared) in [
            (mid - d, expm1_pair.map(|p| p.0)),
            (mid + d, expm1_pair.map(|p| p.1)),
        ] {
            let e = e_shared.unwrap_or_else(|| libm::expm1(t));
            let inv_e = 1.0 / e;
            let f = w * weight(t) * power(m, t) * inv_e;
            let d = f * t * (e + 1.0) * inv_e;
            sum += f;
            sum_derivative += d;
            sum_second += d * (t * (e + 2.0) * inv_e - 1.0);
        }
    }
    (half * sum, half * sum_derivative, half * sum_second)
}

/// An upper bound of the tail integral G_m(x) for x > m + 1, from one exponential:
/// t^m e^-t decays at least at rate 1 - m/x beyond x, so
/// G_m(x) <= x^m e^-x / (1 - e^-x) * x / (x - m).
#[must_use]
pub(crate) fn tail_bound(m: u32, x: f64) -> f64 {
    let q = libm::exp(-x);
    power(m, x) * q / (1.0 - q) * x / (x - f64::from(m))
}

/// The edge terms of a band end at x with q = e^-x: h = x f(x) = x^(m+1) q/(1 - q)
/// (f(t) = t^m/(e^t - 1)) and x h'(x) = h (m + 1 - x/(1 - q)), given `one_minus_q` = 1 - q
/// computed without cancellation by the caller.
#[inline]
fn edges(m: u32, x: f64, q: f64, one_minus_q: f64) -> (f64, f64) {
    if q == 0.0 {
        // x > 745: h is zero in double precision, and x^(m+1) alone may overflow (a band
        // edge at a tiny lambda*T), which would make 0 * inf = NaN.
        return (0.0, 0.0);
    }
    let h = x * power(m, x) * (q / one_minus_q);
    (h, h * (f64::from(m + 1) - x / one_minus_q))
}

/// The tail integral G_m(x) = integral of t^m/(e^t - 1) over [x, inf) together with the
/// edge terms h(x) = x f(x) = x^(m+1)/(e^x - 1) and x h'(x) that the first and second
/// temperature derivatives need. For x >= 2 the edges reuse the series' e^-x:
/// x^(m+1) q/(1 - q), q = e^-x <= 0.14, so no cancellation.
fn tail_and_edge(m: u32, x: f64) -> (f64, (f64, f64)) {
    if x < SPLIT_X {
        let h = x * moment_integrand(m, x);
        (
            moment_total(m) - head_integral(m, x),
            (h, h * (f64::from(m + 1) - x / -libm::expm1(-x))),
        )
    } else {
        let q = libm::exp(-x);
        (tail_series(m, x, q), edges(m, x, q, 1.0 - q))
    }
}

/// [`tail_and_edge`] at two points 2 <= a < b at once: the two series run in one loop
/// (two independent dependency chains, so they overlap in the processor), each until its
/// own terms fall below 1e-18 of its sum; extra terms on the faster one only add
/// positive amounts below that.
#[allow(clippy::type_complexity)]
fn tails_and_edges(m: u32, a: f64, b: f64) -> ((f64, (f64, f64)), (f64, (f64, f64))) {
    let qa = libm::exp(-a);
    let qb = libm::exp(-b);
    let edge_a = edges(m, a, qa, 1.0 - qa);
    let edge_b = edges(m, b, qb, 1.0 - qb);
    if qa == 0.0 || qb == 0.0 {
        return (
            (tail_series(m, a, qa), edge_a),
            (tail_series(m, b, qb), edge_b),
        );
    }
    let poly = |x: f64, inv_n: f64| match m {
        1 => x + inv_n,
        2 => x * x + inv_n * (2.0 * x + 2.0 * inv_n),
        _ => x * x * x + inv_n * (3.0 * x * x + inv_n * (6.0 * x + 6.0 * inv_n)),
    };
    let (mut qna, mut qnb) = (1.0, 1.0);
    let (mut sum_a, mut sum_b) = (0.0, 0.0);
    for &inv_n in &INVERSE_N {
        qna *= qa;
        qnb *= qb;
        let term_a = qna * inv_n * poly(a, inv_n);
        let term_b = qnb * inv_n * poly(b, inv_n);
        sum_a += term_a;
        sum_b += term_b;
        if term_a <= 1e-18 * sum_a && term_b <= 1e-18 * sum_b {
            break;
        }
    }
    ((sum_a, edge_a), (sum_b, edge_b))
}

/// Integral I of t^m / (e^t - 1) over [a, b] (0 < a < b), m = 1, 2, 3, to full precision,
/// where `width` = b - a is passed separately so that a caller who knows it more precisely
/// than the rounded difference (a narrow band) keeps that precision;
/// together with the integrals D and D2 of the integrand times the kernels k1 and k2 of
/// [`gauss_sum`], which give the first and second derivatives with respect to ln T of a
/// band radiance K T^(m+1) I (a = c2/(hi T), b = c2/(lo T)): d/dlnT = K T^(m+1) D,
/// d2/dlnT2 = K T^(m+1) D2.
///
/// A band no wider than 1 in x is one Gauss-Legendre panel ([`gauss_panel`], truncation
/// error below 1e-17 relative). A wider band uses the difference that cannot cancel:
/// tails G(a) - G(b) when G(b) <= G(a)/2, heads H(b) - H(a) when H(a) <= H(b)/2; D and D2
/// then follow from differentiating I(ln T) with moving ends: D = (m+1) I + h(a) - h(b),
/// D2 = (m+1)^2 I + 2 (m+1) (h(a) - h(b)) + b h'(b) - a h'(a), h(t) = t f(t),
/// f(t) = t^m/(e^t-1) (D2 may lose a few digits to cancellation; only the solver's
/// Halley correction uses it). Otherwise (a wide band where neither end dominates, which
/// needs b - a > 1 with both ends near the peak) 8-point Gauss-Legendre on panels of
/// width <= 1.
#[must_use]
pub(crate) fn moment_integral(m: u32, a: f64, b: f64, width: f64) -> (f64, f64, f64) {
    if width <= 1.0 {
        return gauss_panel(m, a, width);
    }
    let ((tail_a, (h_a, xh_a)), (tail_b, (h_b, xh_b))) = if a >= SPLIT_X {
        tails_and_edges(m, a, b)
    } else {
        (tail_and_edge(m, a), tail_and_edge(m, b))
    };
    let m1 = f64::from(m + 1);
    let by_parts = |integral: f64| {
        let edge = h_a - h_b;
        (
            integral,
            m1 * integral + edge,
            m1 * (m1 * integral + 2.0 * edge) + (xh_b - xh_a),
        )
    };
    if tail_b <= 0.5 * tail_a {
        return by_parts(tail_a - tail_b);
    }
    let head = |x: f64, tail: f64| {
        if x < SPLIT_X {
            head_integral(m, x)
        } else {
            moment_total(m) - tail
        }
    };
    let head_a = head(a, tail_a);
    let head_b = head(b, tail_b);
    if head_a <= 0.5 * head_b {
        return by_parts(head_b - head_a);
    }
    let panels = libm::ceil(width).clamp(1.0, 1.0e6);
    let panel_width = width / panels;
    let mut sum = 0.0;
    let mut sum_derivative = 0.0;
    let mut sum_second = 0.0;
    let mut k = 0.0;
    while k < panels {
        let (s, d, d2) = gauss_sum(
            m,
            a + k * panel_width,
            panel_width,
            &GAUSS_LEGENDRE_8,
            |_| 1.0,
        );
        sum += s;
        sum_derivative += d;
        sum_second += d2;
        k += 1.0;
    }
    (sum, sum_derivative, sum_second)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn heads_and_tails_meet_at_the_split() {
        for m in 1..=3 {
            let below = head_integral(m, SPLIT_X * (1.0 - 1e-15));
            let above = moment_total(m) - tail_integral(m, SPLIT_X);
            assert!(
                libm::fabs(below - above) < 1e-14 * above,
                "m={m} {below} {above}"
            );
        }
    }

    #[test]
    fn detector_from_raw_rejects_unknown_values() {
        assert_eq!(Detector::from_raw(0), Ok(Detector::Energy));
        assert_eq!(Detector::from_raw(1), Ok(Detector::Photon));
        assert_eq!(Detector::from_raw(7), Err(Error::InvalidDetector));
    }
}
