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
//! Band integrals (`moment_integral`) use instead fixed polynomial fits of the same
//! functions (`moment_fit.rs`, from `tools/refgen/moment_fits.py`), so that a band radiance
//! costs the same wherever the band lies: see `moment_end` for the pieces and their error.

use crate::constants::{
    C1L_UM, C1P_UM, C2_UMK, STEFAN_BOLTZMANN_W_M2_K4, WIEN_B_PHOTON_UMK, WIEN_B_UMK, ZETA_3,
};
use crate::error::{check_temperature_k, finite, Error, Result};
use core::f64::consts::PI;

// Forced inlining (`inline(always)`) below applies on hosted targets only: on bare-metal
// firmware (`target_os = "none"`) it cost 11.7 KiB of flash for band radiance and
// inversion (71.1 against 59.4 KiB at opt-level 3) for under 2 % fewer instructions
// (`scripts/firmware.sh measure`), so there the compiler decides.

mod moment_fit;

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

/// Where the head fits of the band integrals give way to the tail fits (see
/// [`moment_end`]; `X_SPLIT` in `tools/refgen/moment_fits.py`).
const FIT_SPLIT_X: f64 = 3.0;

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

/// 4-, 6- and 8-point Gauss-Legendre nodes (positive half) and weights on [-1, 1], computed
/// with mpmath (Legendre roots by `findroot`, 40 digits) and rounded.
const GAUSS_LEGENDRE_4: [(f64, f64); 2] = [
    (0.861_136_311_594_052_6, 0.347_854_845_137_453_86),
    (0.339_981_043_584_856_26, 0.652_145_154_862_546_1),
];
/// 5-point Gauss-Legendre: the outer nodes (positive half) and weights on [-1, 1], and the
/// centre's weight 128/225 (mpmath, `findroot` on the Legendre polynomial, 40 digits).
const GAUSS_LEGENDRE_5: [(f64, f64); 2] = [
    (0.906_179_845_938_664, 0.236_926_885_056_189_08),
    (0.538_469_310_105_683_1, 0.478_628_670_499_366_47),
];
/// See [`GAUSS_LEGENDRE_5`].
const GAUSS_LEGENDRE_5_CENTRE: f64 = 0.568_888_888_888_888_9;
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
/// A panel with a >= width/2 and width <= 0.25 (the only ones `moment_integral` takes)
/// goes through [`panel_sums`], the same sums inlined, with 5 nodes instead of 6 for
/// widths 0.03 to 0.25: truncation below 1.7e-17 relative at width 0.25 and 3e-18 at
/// 0.2 over a = width/2 .. 700, m = 2, 3 (against mpmath's quadrature,
/// `tools/refgen/gauss_panel_error.py`), and one node, a division and a pair of
/// sinh/cosh series fewer.
fn gauss_panel(m: u32, a: f64, width: f64) -> (f64, f64, f64) {
    let unit = |_: f64, _: f64| 1.0;
    if a >= 0.5 * width && width <= 0.03 {
        panel_sums::<true, 2>(m, a, width, &GAUSS_LEGENDRE_4, 0.0)
    } else if a >= 0.5 * width && width <= 0.25 {
        panel_sums::<true, 2>(m, a, width, &GAUSS_LEGENDRE_5, GAUSS_LEGENDRE_5_CENTRE)
    } else if width <= 0.03 {
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
///
/// The weight is given each node t and its offset t - a from the panel's start, formed as
/// width/2 -+ the node's half-width distance (exact to a rounding of that offset, where
/// `t - a` itself would lose the digits a and t share).
pub(crate) fn weighted_gauss_panel<W: Fn(f64, f64) -> f64>(
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

/// 1/(2k+1)!, k = 0..=5: sinh(d)/d = sum of these times d^2k.
const SINH_OVER_X: [f64; 6] = [
    1.0,
    1.0 / 6.0,
    1.0 / 120.0,
    1.0 / 5040.0,
    1.0 / 362_880.0,
    1.0 / 39_916_800.0,
];
/// 1/(2k+2)!, k = 0..=5: (cosh(d) - 1)/d^2 = sum of these times d^2k.
const COSH_M1_OVER_X2: [f64; 6] = [
    0.5,
    1.0 / 24.0,
    1.0 / 720.0,
    1.0 / 40320.0,
    1.0 / 3_628_800.0,
    1.0 / 479_001_600.0,
];

/// E = expm1(mid) shared by the nodes of a panel [a, a + 2 half] (mid = a + half), where
/// that is safe (see `gauss_sum`): half <= 0.125, a >= half and mid <= 700, else `None`.
/// From mid = 1 on, E = (1 - q)/q with q = e^-mid from `exp_neg` (an inlined exponential
/// within 3 ulp: then E within 5 ulp, 1 - q losing at most a factor 1/(1 - e^-1) of q's
/// error); below, libm's `expm1`.
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn shared_expm1(a: f64, half: f64, exp_neg: fn(f64) -> f64) -> Option<f64> {
    let mid = a + half;
    if half <= 0.125 && a >= half && mid <= 700.0 {
        Some(if mid >= 1.0 {
            let q = exp_neg(mid);
            (1.0 - q) / q
        } else {
            libm::expm1(mid)
        })
    } else {
        None
    }
}

/// Gauss-Legendre sums on [a, a + width] of f = t^m/(e^t - 1) times `weight`, of f k1 and
/// of f k2, where k1 = t e^t/(e^t - 1) and k2 = k1 (t (e^t + 1)/(e^t - 1) - 1) are the
/// first and second derivatives of ln-temperature of 1/(e^t - 1) over it
/// (d/d ln T of 1/(e^x - 1) at fixed wavelength, x = c2/(lambda T)).
#[inline]
fn gauss_sum<W: Fn(f64, f64) -> f64>(
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
    // On a panel no wider than 0.25 whose lower end a is at least its half-width, e^t - 1
    // at the nodes t = mid + d comes from one expm1: e^t - 1 = E + (E + 1) expm1(d),
    // E = expm1(mid), with expm1(+-d) from the Taylor series of sinh d and cosh d - 1
    // (|d| <= 0.125: truncation below 3e-21 relative). Both terms have the same sign for
    // d > 0; for d < 0 the sum is at least (mid - |d|)/(mid + |d|) >= 1/3 of the larger
    // term (mid >= 2 |d|), so it loses at most a factor 3 to cancellation. Beyond
    // mid = 700, E would overflow; each node then takes its own expm1. From mid = 1 on,
    // E = (1 - q)/q with q = e^-mid from the inlined [`exp_neg_core`] (3 ulp) costs less
    // than libm's `expm1` and stays within 5 ulp (1 - q loses at most a factor
    // 1/(1 - e^-1) = 1.6 of q's error).
    let shared = shared_expm1(a, half, exp_neg_core);
    for &(node, w) in rule {
        let d = half * node;
        let expm1_pair = shared.map(|e_mid| {
            let d2 = d * d;
            let sinh = d * horner(&SINH_OVER_X, d2);
            let cosh_m1 = d2 * horner(&COSH_M1_OVER_X2, d2);
            let scale = e_mid + 1.0;
            (
                e_mid + scale * (cosh_m1 - sinh),
                e_mid + scale * (cosh_m1 + sinh),
            )
        });
        for (t, offset, e_shared) in [
            (mid - d, half - d, expm1_pair.map(|p| p.0)),
            (mid + d, half + d, expm1_pair.map(|p| p.1)),
        ] {
            let e = e_shared.unwrap_or_else(|| libm::expm1(t));
            let inv_e = 1.0 / e;
            // The Planck factors first: t^m/(e^t - 1) <= 1.43 and its product with
            // k1 <= 4.9 (m <= 3), so a response near the largest double overflows only
            // where the integral itself does, never in an intermediate product.
            let planck = power(m, t) * inv_e;
            let weighted = w * weight(t, offset);
            let f = weighted * planck;
            // k1 = t e^t/(e^t - 1) = t (1 + 1/e) and t (e + 2)/e = t (1 + 2/e): finite at
            // nodes past t = 709.78, where e overflows to infinity and (e + 1)/e was NaN.
            let d = weighted * (planck * (t * (1.0 + inv_e)));
            sum += f;
            sum_derivative += d;
            sum_second += d * (t * (1.0 + 2.0 * inv_e) - 1.0);
        }
    }
    (half * sum, half * sum_derivative, half * sum_second)
}

/// A response linear in wavelength on one table segment, seen as a weight of x: at a node
/// t an offset o (in x) into the segment, r = `edge` + `rise` `per_span` p/t with
/// p = `sign` o + `start` (see `Band::response_panels`: `edge` the response at the
/// segment's end nearest its smaller value, `rise` >= 0 the rise towards its larger value,
/// `per_span` p/t the fraction of the segment between the node and that end, in 0..=1;
/// `Band::response_panels` passes half the rise and twice the fraction, the same product).
#[derive(Clone, Copy)]
pub(crate) struct LinearResponse {
    pub(crate) edge: f64,
    pub(crate) rise: f64,
    pub(crate) per_span: f64,
    pub(crate) sign: f64,
    pub(crate) start: f64,
}

/// Widest panel, from a lower end a >= 1, that [`linear_response_panel`] integrates with 4
/// Gauss-Legendre nodes (below a = 1 the rule of [`weighted_gauss_panel`]: width <= 0.03 a).
///
/// Error argument. From a >= 1, s = width/a <= 0.045: the response's pole at t = 0 lies at
/// least 22 panel widths from the panel and the Planck poles at +-2 pi i further still, so
/// the 4-node truncation error (proportional to width^8 times the integrand's eighth
/// derivative) is set by the integrand's derivatives on the real axis.
/// Measured with mpmath (`tools/refgen/panel_rule_study.py`: 40 digits, the 4-node rule
/// against `mpmath.quad` on [a, a + width])
/// for the three kernels (f, f k1, f k2 with f = t^m/(e^t - 1), m = 2 and 3) times each
/// weight a response linear in wavelength can give (1, 1/t, and 1/t - 1/b, 1/a - 1/t,
/// which vanish at one end: there the error is relative to a panel integral that the
/// weight halves): at width 0.045 the relative error is at most 5.8e-18 over a = 1 .. 700
/// (largest near a = 1.4; 3.1e-18 at a = 1, 3.3e-18 from a = 120 on), against 3.4e-19
/// for the 0.03 of [`weighted_gauss_panel`], and 2.1e-16 at width 0.075. The 6-node rule
/// that such panels took before is not needed for the 1e-17 per panel the rules keep.
pub(crate) const FOUR_NODE_WIDTH: f64 = 0.045;

/// [`weighted_gauss_panel`] for a [`LinearResponse`], the panel starting `offset` into its
/// segment: the rules of [`weighted_gauss_panel`] (picked by s = max(width, width/a),
/// compared as width against the threshold times min(1, a) so that no division is
/// needed) except that 4 nodes also serve panels up to [`FOUR_NODE_WIDTH`] wide from
/// a >= 1 (see there); the same nodes and the same shared exponential as [`gauss_sum`],
/// with the response folded into the Planck factors so that each node takes one division
/// (1/(e^t - 1)) instead of two: r t^m/(e^t - 1) = `edge` P + `rise` ((`per_span` p) G)
/// with G = t^(m-1)/(e^t - 1) and P = t G. Both terms are non-negative, P <= 1.43,
/// (`per_span` p) G = fraction P <= P, so no intermediate product overflows unless the
/// integral does (the Planck factors first, as in [`gauss_sum`]), and each node's value
/// keeps the rounding error of that form: within a few ulp, with no cancellation.
///
/// The shared exponential's series for sinh d and cosh d - 1 is cut to what each rule's
/// widest node offset needs: 4 terms of each for 4 nodes (width <= 0.045,
/// |d| <= 0.0194: first dropped term 5.6e-20 relative), 5 for 6 nodes (width <= 0.15,
/// |d| <= 0.070: 7.0e-20), all 6 for 8 and 12 nodes (|d| <= 0.125, the limit of the
/// shared exponential: 2.3e-21). Agrees with [`weighted_gauss_panel`] on the same weight
/// to rounding where both pick the same rule (below 1e-15 relative, worst 5.3e-16 in the
/// test `linear_response_panel_matches_the_weighted_panel`), and where they do not, to the
/// rounding of the nodes' positions (t ulp, below 4 (1 + a) eps); band radiance against mpmath
/// on panels at the 4-node limit: `tests/reference_band.rs`
/// (`tabulated_panel_rules_match_mpmath`).
#[inline]
pub(crate) fn linear_response_panel(
    m: u32,
    a: f64,
    width: f64,
    offset: f64,
    response: &LinearResponse,
) -> (f64, f64, f64) {
    // s <= c exactly when width <= c min(1, a).
    let unit = if a < 1.0 { a } else { 1.0 };
    if width <= 0.03 * unit || (a >= 1.0 && width <= FOUR_NODE_WIDTH) {
        linear_response_sum::<2, 4>(m, a, width, offset, &GAUSS_LEGENDRE_4, response)
    } else if width <= 0.15 * unit {
        linear_response_sum::<3, 5>(m, a, width, offset, &GAUSS_LEGENDRE_6, response)
    } else if width <= 0.4 * unit {
        linear_response_sum::<4, 6>(m, a, width, offset, &GAUSS_LEGENDRE_8, response)
    } else {
        linear_response_sum::<6, 6>(m, a, width, offset, &GAUSS_LEGENDRE_12, response)
    }
}

/// The sums of [`gauss_sum`] for [`linear_response_panel`], over a rule of `N` node pairs
/// (a fixed size, so that the node loop unrolls).
#[cfg_attr(not(target_os = "none"), inline(always))]
#[allow(clippy::inline_always)]
fn linear_response_sum<const N: usize, const K: usize>(
    m: u32,
    a: f64,
    width: f64,
    offset: f64,
    rule: &[(f64, f64); N],
    response: &LinearResponse,
) -> (f64, f64, f64) {
    let half = 0.5 * width;
    let mid = a + half;
    // The shared exponential of [`gauss_sum`] (same conditions, same error argument; below
    // mid = 1 from the inlined [`expm1_below_one`] instead of libm's), its
    // series in d cut to the first K terms of sinh d and cosh d - 1: enough for the
    // panel's widest |d| (see `linear_response_panel`).
    let shared = half <= 0.125 && a >= half && mid <= 700.0;
    // 1/(e^t - 1) = numerator/(base + factor expm1(d)) at t = mid + d. From mid = 1 on, in
    // units of e^mid: with q = e^-mid, e^t - 1 = ((1 - q) + expm1(d))/q, so the panel
    // needs no division of its own (where (1 - q)/q took one) and each node one; below,
    // E + (E + 1) expm1(d) with E = expm1(mid). Either sum cancels as little as that of
    // [`gauss_sum`] (the same sum, scaled).
    let (numerator, base, factor) = if !shared {
        (1.0, 0.0, 0.0)
    } else if mid >= 1.0 {
        let q = exp_neg_core(mid);
        (q, 1.0 - q, 1.0)
    } else {
        let e_mid = expm1_below_one(mid);
        (1.0, e_mid, e_mid + 1.0)
    };
    // p at the panel's centre; a node d from it has p = p_centre -+ sign d (the low node
    // lies half - d into the panel), so that a node near the segment's small end keeps
    // the digits of its small p.
    let p_centre = response.sign * (offset + half) + response.start;
    // Sums kept per node of a pair (low, high): two independent chains of the same
    // operations, which the compiler can run side by side.
    let mut low = (0.0, 0.0, 0.0);
    let mut high = (0.0, 0.0, 0.0);
    let node_value = |sums: &mut (f64, f64, f64), t: f64, p: f64, denominator: f64, w: f64| {
        // 1/(e^t - 1).
        let inv_e = numerator / denominator;
        // G = t^(m-1)/(e^t - 1) for m = 1, 2, 3, and P = t G.
        let g = match m {
            1 => inv_e,
            2 => t * inv_e,
            _ => t * t * inv_e,
        };
        let planck = g * t;
        // rise g first: g = planck/t is below 1 for m >= 2 (it may round to one ulp above
        // 1 for t near 1e-16, which is why `Band::response_panels` passes half the rise),
        // so rise g cannot overflow, and it is as small only as the integrand itself; then
        // the fraction per_span p <= 2t (so the product stays below 1.43 times the full
        // rise, as with the weight times planck). Taking
        // per_span p g first underflowed to subnormal for a long segment (per_span 4e-301,
        // g 6e-22 at t = 57) and lost half a percent of the radiance.
        let f = w * (response.edge * planck + (response.rise * g) * (response.per_span * p));
        let d = f * (t * (1.0 + inv_e));
        sums.0 += f;
        sums.1 += d;
        sums.2 += d * (t * (1.0 + 2.0 * inv_e) - 1.0);
    };
    for &(node, w) in rule {
        let d = half * node;
        let (t_low, t_high) = (mid - d, mid + d);
        let (e_low, e_high) = if shared {
            let d2 = d * d;
            let sinh = d * horner(SINH_OVER_X.iter().take(K), d2);
            let cosh_m1 = d2 * horner(COSH_M1_OVER_X2.iter().take(K), d2);
            (
                base + factor * (cosh_m1 - sinh),
                base + factor * (cosh_m1 + sinh),
            )
        } else {
            (libm::expm1(t_low), libm::expm1(t_high))
        };
        let sd = response.sign * d;
        node_value(&mut low, t_low, p_centre - sd, e_low, w);
        node_value(&mut high, t_high, p_centre + sd, e_high, w);
    }
    (
        half * (low.0 + high.0),
        half * (low.1 + high.1),
        half * (low.2 + high.2),
    )
}

/// An upper bound of the tail integral G_m(x) for x > m + 1, from one exponential:
/// t^m e^-t decays at least at rate 1 - m/x beyond x, so
/// G_m(x) <= x^m e^-x / (1 - e^-x) * x / (x - m).
#[must_use]
pub(crate) fn tail_bound(m: u32, x: f64) -> f64 {
    let q = libm::exp(-x);
    power(m, x) * q / (1.0 - q) * x / (x - f64::from(m))
}

/// Horner's scheme for coefficients stored lowest degree first.
#[inline]
fn horner<'c, I>(coefficients: I, z: f64) -> f64
where
    I: IntoIterator<Item = &'c f64>,
    I::IntoIter: DoubleEndedIterator,
{
    coefficients
        .into_iter()
        .rev()
        .fold(0.0, |acc, &c| acc * z + c)
}

/// A polynomial (coefficients lowest degree first) by four interleaved Horner chains in
/// z^4: p(z) = P0(z^4) + z P1(z^4) + z^2 P2(z^4) + z^3 P3(z^4), lane j holding the
/// coefficients c_j, c_(j+4), c_(j+8), ... The same operations as Horner's scheme plus
/// three, in a quarter of its dependency chain (the fits here have 8 to 14 coefficients:
/// two or three steps instead of up to thirteen). Each lane starts from its own highest
/// coefficient, so a degree that is not 3 mod 4 costs no work on padding (the result is
/// the same as with zero padding: 0 z^4 + c = c exactly). Each term c_i z^i passes
/// through at most one rounding more than in Horner's scheme (the final combination), so
/// for z >= 0 the rounding error stays within the first-order bound printed per fit in
/// `moment_fit.rs` plus 1 ulp.
#[inline]
fn polynomial<const N: usize>(coefficients: &[f64; N], z: f64) -> f64 {
    let z2 = z * z;
    let z4 = z2 * z2;
    let mut lanes = [0.0; 4];
    for (j, lane) in lanes.iter_mut().enumerate() {
        if j >= N {
            break;
        }
        // The highest index i = j mod 4 below N, then down in steps of 4.
        let mut i = j + (N - 1 - j) / 4 * 4;
        let mut acc = coefficients.get(i).copied().unwrap_or(0.0);
        while i >= j + 4 {
            i -= 4;
            acc = acc * z4 + coefficients.get(i).copied().unwrap_or(0.0);
        }
        *lane = acc;
    }
    let [p0, p1, p2, p3] = lanes;
    (p0 + z * p1) + z2 * (p2 + z * p3)
}

/// 1/n! for n = 0..=13: the Taylor coefficients of e^z.
const EXP_TAYLOR: [f64; 14] = [
    1.0,
    1.0,
    0.5,
    1.0 / 6.0,
    1.0 / 24.0,
    1.0 / 120.0,
    1.0 / 720.0,
    1.0 / 5040.0,
    1.0 / 40_320.0,
    1.0 / 362_880.0,
    1.0 / 3_628_800.0,
    1.0 / 39_916_800.0,
    1.0 / 479_001_600.0,
    1.0 / 6_227_020_800.0,
];

/// Beyond this x, e^-x is below the normal range and [`exp_neg`] defers to libm.
const EXP_NEG_NORMAL_MAX: f64 = 708.0;

/// e^-x for 0 <= x <= 708, inlined where libm's `exp` is a call with branches for every
/// special case: x = k ln 2 + r with k = round(x / ln 2) (by the 1.5 * 2^52 shifter, so
/// 0 <= k <= 1022 and |r| <= ln(2)/2), r by Cody-Waite reduction with ln 2 split into a
/// 32-bit head (k ln2_hi exact) and a tail (r within 1e-19 absolute), e^-r by its Taylor
/// polynomial of degree 13 (truncation (ln(2)/2)^14/14! < 5e-18 relative), and 2^-k
/// written into the exponent bits. Error within 3 ulp (against libm's `exp` over
/// x = 2..702 in steps of 0.007: at most 2.1 ulp apart; the test `exp_neg_matches_libm`).
#[inline]
#[cfg(test)]
fn exp_neg(x: f64) -> f64 {
    if x <= EXP_NEG_NORMAL_MAX {
        exp_neg_core(x)
    } else {
        libm::exp(-x)
    }
}

/// [`exp_neg`] without the range check: 0 <= x <= 708 only.
// Forced: the two band ends are evaluated by the same straight-line code side by
// side (see `moment_ends`), which the compiler packs into vector registers only when
// all of it is inlined (measured with callgrind: 6 % fewer instructions per band
// radiance over the sweep grid, and shorter dependency chains).
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn exp_neg_core(x: f64) -> f64 {
    const LN2_HI: f64 = 6.931_471_803_691_238e-1;
    const LN2_LO: f64 = 1.908_214_929_270_587_7e-10;
    const INV_LN2: f64 = core::f64::consts::LOG2_E;
    const SHIFTER: f64 = 6_755_399_441_055_744.0;
    let shifted = x * INV_LN2 + SHIFTER;
    let k = shifted - SHIFTER;
    let r = (x - k * LN2_HI) - k * LN2_LO;
    // The low bits of `shifted` hold k (0 <= k <= 1022 for 0 <= x <= 708).
    let scale = f64::from_bits((1023 - (shifted.to_bits() & 0x3ff)) << 52);
    polynomial(&EXP_TAYLOR, -r) * scale
}

/// 1/(k+2)! for k = 0..=17: (expm1(x) - x)/x^2 = sum of these times x^k.
const EXPM1_SERIES: [f64; 18] = {
    let mut table = [0.0; 18];
    let mut k = 0;
    let mut factorial = 1.0;
    let mut n = 2.0;
    while k < 18 {
        factorial *= n;
        table[k] = 1.0 / factorial;
        k += 1;
        n += 1.0;
    }
    table
};

/// e^x - 1 for 0 <= x <= 1, inlined where libm's `expm1` is a call with range reduction:
/// x + x^2 P(x) with P the Taylor polynomial of (expm1(x) - x)/x^2 to degree 17 (first
/// dropped term x^19/20! <= 4.2e-19 of the result), evaluated by [`polynomial`]. Every
/// term is positive and x^2 P(x) is at most 0.42 of the result, so P's rounding counts
/// at most 0.42 times: within 1.5 ulp (1.4 ulp at x = 0.8888 against mpmath; against
/// libm's `expm1`, itself within 1 ulp, at most 1.4 eps relative over x = 0..1 in steps of
/// 1e-4: the test `expm1_below_one_matches_libm`). libm's `expm1` costs about 65
/// instructions here, this about 30.
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn expm1_below_one(x: f64) -> f64 {
    x + (x * x) * polynomial(&EXPM1_SERIES, x)
}

/// 2^(-j/32) for j = 0..=31 (mpmath at 40 digits, rounded to the nearest double).
const EXP2_NEG_THIRTYSECONDS: [f64; 32] = [
    1.0,
    0.978_572_062_087_700_1,
    0.957_603_280_698_573_7,
    0.937_083_817_055_15,
    0.917_004_043_204_671_2,
    0.897_354_537_501_553_6,
    0.878_126_080_186_649_7,
    0.859_309_649_061_239,
    0.840_896_415_253_714_5,
    0.822_877_739_076_982_5,
    0.805_245_165_974_627_1,
    0.787_990_422_553_943_2,
    0.771_105_412_703_970_4,
    0.754_582_213_796_711_4,
    0.738_413_072_969_749_7,
    0.722_590_403_488_523_3,
    core::f64::consts::FRAC_1_SQRT_2,
    0.691_954_940_981_916,
    0.677_127_773_468_446_3,
    0.662_618_321_579_870_7,
    0.648_419_777_325_504_8,
    0.634_525_478_595_866_6,
    0.620_928_906_036_742,
    0.607_623_679_990_234_5,
    0.594_603_557_501_360_5,
    0.581_862_429_388_788_7,
    0.569_394_317_378_345_8,
    0.557_193_371_297_946_2,
    0.545_253_866_332_628_8,
    0.533_570_200_338_411_8,
    0.522_136_891_213_706_9,
    0.510_948_574_327_058_3,
];

/// 1/n! for n = 0..=6: the Taylor coefficients of e^z for |z| <= ln(2)/64.
const EXP_TAYLOR_SHORT: [f64; 7] = [
    1.0,
    1.0,
    0.5,
    1.0 / 6.0,
    1.0 / 24.0,
    1.0 / 120.0,
    1.0 / 720.0,
];

/// e^-x for 0 <= x <= 708 with a table in place of half the polynomial of
/// [`exp_neg_core`]: x = (32 k + j) ln(2)/32 + r with k, j from round(32 x/ln 2) (by the
/// 1.5 * 2^52 shifter: 0 <= 32 k + j <= 32 700, so k <= 1021), r by Cody-Waite reduction
/// with ln(2)/32 split into a 32-bit head (exact products) and a tail, |r| <= ln(2)/64,
/// e^-r by its Taylor polynomial of degree 6 (truncation (ln(2)/64)^7/7! < 4e-18
/// relative), times 2^(-j/32) from [`EXP2_NEG_THIRTYSECONDS`] (within 0.5 ulp) and 2^-k
/// written into the exponent bits. Error within 3 ulp (against libm's `exp` over
/// x = 0..708 in steps of 0.007: the test `exp_neg_table_matches_libm`). Used by the
/// rectangular band integral; the tabulated quadrature keeps [`exp_neg_core`].
// Forced, as `exp_neg_core`.
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn exp_neg_table(x: f64) -> f64 {
    const LN2_32_HI: f64 = 6.931_471_803_691_238e-1 / 32.0;
    const LN2_32_LO: f64 = 1.908_214_929_270_587_7e-10 / 32.0;
    const INV_LN2_32: f64 = 32.0 * core::f64::consts::LOG2_E;
    const SHIFTER: f64 = 6_755_399_441_055_744.0;
    let shifted = x * INV_LN2_32 + SHIFTER;
    let n = shifted - SHIFTER;
    let r = (x - n * LN2_32_HI) - n * LN2_32_LO;
    // The low bits of `shifted` hold n = 32 k + j (0 <= n <= 32 700 for 0 <= x <= 708).
    let low = shifted.to_bits() & 0x7fff;
    let index = usize::try_from(low & 31).unwrap_or(0);
    let scale = f64::from_bits((1023 - (low >> 5)) << 52);
    let table = EXP2_NEG_THIRTYSECONDS.get(index).copied().unwrap_or(1.0);
    polynomial(&EXP_TAYLOR_SHORT, -r) * (table * scale)
}

/// What a band integral needs at one of its ends x >= 0 (m = 2 photon, 3 energy).
#[derive(Clone, Copy)]
struct MomentEnd {
    /// H_m(x) = integral of t^m/(e^t - 1) over [0, x].
    head: f64,
    /// G_m(x) = integral of t^m/(e^t - 1) over [x, inf) = m! zeta(m+1) - H_m(x).
    tail: f64,
    /// The edge term h(x) = x f(x) = x^(m+1)/(e^x - 1) = x^m B(x), B(x) = x/(e^x - 1).
    edge: f64,
    /// x h'(x) = h(x) (m + 1 - x/(1 - e^-x)) = h(x) (m + 1 - B(x) - x).
    edge_slope: f64,
}

/// H_m, G_m and the edge terms at x >= 0, at a cost that does not depend on x: two fixed
/// polynomials for x < 3, one exponential and m + 1 fixed polynomials beyond
/// (coefficients from `tools/refgen/moment_fits.py`, in `moment_fit.rs`). The split sits
/// at x = 3 ([`FIT_SPLIT_X`]) rather than 2 because the m + 1 tail fits then need degree
/// 7 or 8 instead of 11, for three more degrees in the one head fit a band radiance uses.
///
/// - x < 3, s = x^2: B(x) = 1 - x/2 + s PB(s) and
///   H_m(x) = x^m (1/m - x/(2(m+1)) + s PH_m(s)) (the Bernoulli-number expansions,
///   fitted on s in [0, 9]: truncation below 5e-18 relative); G_m = m! zeta(m+1) - H_m,
///   which cannot cancel there (G_m(x) >= G_m(3) = 0.36 m! zeta(m+1) for m = 2, 0.61
///   for m = 3: at most 2.8 times the error of H_m relative).
/// - x >= 3, q = e^-x <= e^-3: G_2 = q (x^2 A1 + 2x A2 + 2 A3),
///   G_3 = q (x^3 A1 + 3x^2 A2 + 6x A3 + 6 A4) with A_k(q) = Li_k(q)/q fitted on
///   [0, e^-3] (truncation below 2e-18); every term is positive. B = x q/(1 - q), and
///   H_m = m! zeta(m+1) - G_m (H_m(x) >= H_m(3), so at most 2.6 times the error of G_m
///   relative: H_3(3) = 2.55 of 6.49, H_2(3) = 1.54 of 2.40).
///
/// Error of each value, relative: coefficients rounded to doubles below 6e-17 (B up to
/// 2.5e-16 near x = 3, where 1 - x/2 + s PB(s) cancels to B(3) = 0.157), Horner's
/// rounding at most 2.6e-16 (B 8.9e-16; first-order bounds, printed per fit in
/// `moment_fit.rs`), the inlined exponential within 3 ulp, and 3 to 5 roundings in
/// combining the terms (all positive for the tails; for the heads 1/m - x/(2(m+1)) +
/// s PH_m(s) cancels by at most a factor 9 at x = 3, about 3 ulp of its result): below
/// 12 ulp (2.7e-15) for each of H_m, G_m, h, x h' in its own region, and 2.8 times that
/// for a value converted across the split at x = 3. The tests hold the band integrals
/// built from them to 1e-13 against mpmath (`tests/band_switch_points.rs`,
/// `tests/band_fit_split.rs` on both sides of x = 3 and over the operating grid).
#[inline]
fn moment_end(m: u32, x: f64) -> MomentEnd {
    if x < FIT_SPLIT_X {
        head_end(m, x)
    } else if x <= EXP_NEG_NORMAL_MAX {
        tail_end(m, x)
    } else {
        // x > 708: the tail is below 1e-300 and vanishes beside any band that reaches
        // further in; its value still matters only for a band lying wholly out here.
        let q = libm::exp(-x);
        if q == 0.0 {
            // x > 745: every term is zero in double precision (and x^(m+1) alone may
            // overflow for a band edge at a tiny lambda*T, which would give 0 * inf).
            return MomentEnd {
                head: moment_total(m),
                tail: 0.0,
                edge: 0.0,
                edge_slope: 0.0,
            };
        }
        let (tail, bernoulli) = tail_terms(m, x, q);
        with_edges(m, x, moment_total(m) - tail, tail, bernoulli)
    }
}

/// [`moment_end`] for 0 <= x < 3 (branch-free, so that two ends inline side by side).
// Forced: the two band ends are evaluated by the same straight-line code side by
// side (see `moment_ends`), which the compiler packs into vector registers only when
// all of it is inlined (measured with callgrind: 6 % fewer instructions per band
// radiance over the sweep grid, and shorter dependency chains).
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn head_end(m: u32, x: f64) -> MomentEnd {
    let s = x * x;
    let bernoulli = (1.0 - 0.5 * x) + s * polynomial(&moment_fit::BERNOULLI, s);
    let (head, tail) = head_pair(m, x);
    with_edges(m, x, head, tail, bernoulli)
}

/// H_m(x) for 0 <= x < 3 from its fit (see [`moment_end`]).
// Forced, as `head_end`.
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn head_value(m: u32, x: f64) -> f64 {
    let s = x * x;
    if m == 2 {
        s * ((0.5 - x * (1.0 / 6.0)) + s * polynomial(&moment_fit::HEAD_2, s))
    } else {
        s * x * ((1.0 / 3.0 - 0.125 * x) + s * polynomial(&moment_fit::HEAD_3, s))
    }
}

/// [`moment_end`] for 3 <= x <= 708 (branch-free, so that two ends inline side by side).
// Forced: the two band ends are evaluated by the same straight-line code side by
// side (see `moment_ends`), which the compiler packs into vector registers only when
// all of it is inlined (measured with callgrind: 6 % fewer instructions per band
// radiance over the sweep grid, and shorter dependency chains).
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn tail_end(m: u32, x: f64) -> MomentEnd {
    let (tail, bernoulli) = tail_terms(m, x, exp_neg_table(x));
    with_edges(m, x, moment_total(m) - tail, tail, bernoulli)
}

/// G_m(x) and B(x) from q = e^-x, x >= 3.
// Forced: the two band ends are evaluated by the same straight-line code side by
// side (see `moment_ends`), which the compiler packs into vector registers only when
// all of it is inlined (measured with callgrind: 6 % fewer instructions per band
// radiance over the sweep grid, and shorter dependency chains).
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn tail_terms(m: u32, x: f64, q: f64) -> (f64, f64) {
    (tail_value(m, x, q), x * q / (1.0 - q))
}

/// G_m(x) from q = e^-x, x >= 3 (see [`moment_end`]).
// Forced, as `tail_terms`.
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn tail_value(m: u32, x: f64, q: f64) -> f64 {
    let a1 = polynomial(&moment_fit::POLYLOG_1, q);
    let a2 = polynomial(&moment_fit::POLYLOG_2, q);
    let a3 = polynomial(&moment_fit::POLYLOG_3, q);
    let x2 = x * x;
    // Summed in two halves so that the powers of x and the polynomials run side by side.
    if m == 2 {
        q * ((x2 * a1) + (2.0 * x * a2 + 2.0 * a3))
    } else {
        let a4 = polynomial(&moment_fit::POLYLOG_4, q);
        q * ((x2 * x * a1 + 3.0 * x2 * a2) + (6.0 * x * a3 + 6.0 * a4))
    }
}

/// Completes a [`MomentEnd`] with the edge terms from B(x).
// Forced: the two band ends are evaluated by the same straight-line code side by
// side (see `moment_ends`), which the compiler packs into vector registers only when
// all of it is inlined (measured with callgrind: 6 % fewer instructions per band
// radiance over the sweep grid, and shorter dependency chains).
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn with_edges(m: u32, x: f64, head: f64, tail: f64, bernoulli: f64) -> MomentEnd {
    let edge = power(m, x) * bernoulli;
    MomentEnd {
        head,
        tail,
        edge,
        edge_slope: edge * ((f64::from(m + 1) - bernoulli) - x),
    }
}

/// [`moment_end`] at both ends of a band. Where both ends fall in the same region the two
/// evaluations are the same straight-line code on two values, which the compiler
/// interleaves (and may pack into vector registers); the work per end is unchanged.
#[inline]
fn moment_ends(m: u32, a: f64, b: f64) -> (MomentEnd, MomentEnd) {
    if b < FIT_SPLIT_X {
        let [end_a, end_b] = [a, b].map(|x| head_end(m, x));
        (end_a, end_b)
    } else if a >= FIT_SPLIT_X && b <= EXP_NEG_NORMAL_MAX {
        let [end_a, end_b] = [a, b].map(|x| tail_end(m, x));
        (end_a, end_b)
    } else {
        (moment_end(m, a), moment_end(m, b))
    }
}

/// I = G(a) - G(b) when G(a) <= H(b), else H(b) - H(a): the difference of the two
/// smaller operands (see [`moment_integral`] for its condition).
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn band_difference((head_a, tail_a): (f64, f64), (head_b, tail_b): (f64, f64)) -> f64 {
    if tail_a <= head_b {
        tail_a - tail_b
    } else {
        head_b - head_a
    }
}

/// Widest band in x integrated by one Gauss-Legendre panel ([`gauss_panel`], 4 or 5
/// nodes); wider bands take differences of [`moment_end`] values.
const NARROW_X: f64 = 0.25;

/// Integral I of t^m / (e^t - 1) over [a, b] (0 < a < b), m = 2 (photon) or 3 (energy),
/// where `width` = b - a is passed separately so that a caller who knows it more precisely
/// than the rounded difference (a narrow band) keeps that precision;
/// together with the integrals D and D2 of the integrand times the kernels k1 and k2 of
/// [`gauss_sum`], which give the first and second derivatives with respect to ln T of a
/// band radiance K T^(m+1) I (a = c2/(hi T), b = c2/(lo T)): d/dlnT = K T^(m+1) D,
/// d2/dlnT2 = K T^(m+1) D2.
///
/// Two methods, each at a cost independent of where the band lies:
/// - A band no wider than 0.25 in x whose lower end is at least half its width
///   (a >= w/2) is one Gauss-Legendre panel ([`gauss_panel`]: 4 nodes up to width 0.03,
///   5 up to 0.25; truncation below 2e-17 relative) with one `expm1` for the whole panel.
///   No difference is taken, so a narrow band keeps full precision however narrow.
/// - Otherwise the ends' values from [`moment_end`]: I = G(a) - G(b) when
///   G(a) <= H(b), else H(b) - H(a) (the difference of the two smaller operands); D and D2
///   from differentiating I(ln T) with moving ends: D = (m+1) I + h(a) - h(b),
///   D2 = (m+1)^2 I + 2 (m+1) (h(a) - h(b)) + b h'(b) - a h'(a), h(t) = t f(t),
///   f(t) = t^m/(e^t-1). The difference's condition number, (sum of operands) / I,
///   is at most about 2/w near the peak of f and 1/(1 - e^-w) far from it, so at most 8
///   for w >= 0.25, and at most 1.3 for w < 0.25 with a < w/2 (then a < b/3 and
///   b < 0.375, where H_m(a)/H_m(b) < (a/b)^m <= 1/9). With the ends' errors
///   of [`moment_end`] this keeps I within 2.5e-14 relative (a bound; measured below
///   4e-14 against mpmath for x < 100), D within the same and D2 (used only by the inversion's
///   Halley correction) within a few digits of it.
#[must_use]
pub(crate) fn moment_integral(m: u32, a: f64, b: f64, width: f64) -> (f64, f64, f64) {
    if width <= NARROW_X && a >= 0.5 * width {
        return gauss_panel(m, a, width);
    }
    let (end_a, end_b) = moment_ends(m, a, b);
    let integral = band_difference((end_a.head, end_a.tail), (end_b.head, end_b.tail));
    let m1 = f64::from(m + 1);
    let edge = end_a.edge - end_b.edge;
    (
        integral,
        m1 * integral + edge,
        m1 * (m1 * integral + 2.0 * edge) + (end_b.edge_slope - end_a.edge_slope),
    )
}

/// (H_m(x), G_m(x)) at one end for a band radiance without derivatives: the values of
/// [`moment_end`] by the same operations (so the same to the bit), without the edge
/// terms and B(x).
#[inline]
fn end_value(m: u32, x: f64) -> (f64, f64) {
    if x < FIT_SPLIT_X {
        head_pair(m, x)
    } else if x <= EXP_NEG_NORMAL_MAX {
        tail_pair(m, x)
    } else {
        // As in `moment_end`.
        let q = libm::exp(-x);
        if q == 0.0 {
            return (moment_total(m), 0.0);
        }
        let tail = tail_value(m, x, q);
        (moment_total(m) - tail, tail)
    }
}

/// (H_m, G_m) for 0 <= x < 3, as [`head_end`].
// Forced, as `head_end`.
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn head_pair(m: u32, x: f64) -> (f64, f64) {
    let head = head_value(m, x);
    (head, moment_total(m) - head)
}

/// (H_m, G_m) for 3 <= x <= 708, as [`tail_end`].
// Forced, as `tail_end`.
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn tail_pair(m: u32, x: f64) -> (f64, f64) {
    let tail = tail_value(m, x, exp_neg_table(x));
    (moment_total(m) - tail, tail)
}

/// The integral I of [`moment_integral`] alone, for a band radiance without derivatives:
/// the same method and the same operations on I (so the same value to the bit), without
/// the edge terms, B(x) and the derivative sums.
#[must_use]
pub(crate) fn moment_integral_value(m: u32, a: f64, b: f64, width: f64) -> f64 {
    if width <= NARROW_X && a >= 0.5 * width {
        return if width <= 0.03 {
            panel_sums::<false, 2>(m, a, width, &GAUSS_LEGENDRE_4, 0.0).0
        } else {
            panel_sums::<false, 2>(m, a, width, &GAUSS_LEGENDRE_5, GAUSS_LEGENDRE_5_CENTRE).0
        };
    }
    // The regions as in `moment_ends`, written out: a generic dispatcher over closures
    // shared by both cost 20-50 % more instructions per band radiance (callgrind).
    let (end_a, end_b) = if b < FIT_SPLIT_X {
        (head_pair(m, a), head_pair(m, b))
    } else if a >= FIT_SPLIT_X && b <= EXP_NEG_NORMAL_MAX {
        (tail_pair(m, a), tail_pair(m, b))
    } else {
        (end_value(m, a), end_value(m, b))
    };
    band_difference(end_a, end_b)
}

/// [`gauss_panel`] for a rectangular band (unit weight, width <= 0.25, a >= width/2):
/// the sums of `gauss_sum` by the same operations in the same order, inlined with the
/// rule's size known, and with `DERIVATIVES` false only the first (the integral, the
/// same value to the bit), for a band radiance without derivatives.
// Forced: inlined with the rule's size known, the node loop unrolls, and without
// derivatives their sums are removed.
#[allow(clippy::inline_always)]
#[cfg_attr(not(target_os = "none"), inline(always))]
fn panel_sums<const DERIVATIVES: bool, const N: usize>(
    m: u32,
    a: f64,
    width: f64,
    rule: &[(f64, f64); N],
    centre_weight: f64,
) -> (f64, f64, f64) {
    let half = 0.5 * width;
    let mid = a + half;
    // As in `gauss_sum`: one shared exponential for the panel where it is safe.
    let shared = shared_expm1(a, half, exp_neg_table);
    let mut sum = 0.0;
    let mut sum_derivative = 0.0;
    let mut sum_second = 0.0;
    let mut add = |t: f64, e: f64, w: f64| {
        let inv_e = 1.0 / e;
        let planck = power(m, t) * inv_e;
        // `gauss_sum` forms w * weight = w * 1 (exact) times the Planck factor.
        sum += w * planck;
        if DERIVATIVES {
            // The kernels k1 and k2 of `gauss_sum`, in its operations.
            let derivative = w * (planck * (t * (1.0 + inv_e)));
            sum_derivative += derivative;
            sum_second += derivative * (t * (1.0 + 2.0 * inv_e) - 1.0);
        }
    };
    for &(node, w) in rule {
        let d = half * node;
        if let Some(e_mid) = shared {
            let d2 = d * d;
            let sinh = d * horner(&SINH_OVER_X, d2);
            let cosh_m1 = d2 * horner(&COSH_M1_OVER_X2, d2);
            let scale = e_mid + 1.0;
            add(mid - d, e_mid + scale * (cosh_m1 - sinh), w);
            add(mid + d, e_mid + scale * (cosh_m1 + sinh), w);
        } else {
            add(mid - d, libm::expm1(mid - d), w);
            add(mid + d, libm::expm1(mid + d), w);
        }
    }
    // The node at the centre of an odd rule, where e^t - 1 is the shared value itself.
    if centre_weight > 0.0 {
        add(
            mid,
            shared.unwrap_or_else(|| libm::expm1(mid)),
            centre_weight,
        );
    }
    (half * sum, half * sum_derivative, half * sum_second)
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
    fn exp_neg_matches_libm() {
        let mut worst = 0.0_f64;
        let mut x = 0.0;
        while x < 745.0 {
            let expected = libm::exp(-x);
            worst = worst.max(libm::fabs(exp_neg(x) - expected) / expected);
            x += 0.007;
        }
        // libm's exp is within 1 ulp; exp_neg within 3 ulp (2^-53 relative each).
        assert!(worst <= 3.0 * f64::EPSILON, "worst {worst:e}");
        assert_eq!(exp_neg(800.0), 0.0);
        assert_eq!(exp_neg(f64::INFINITY), 0.0);
    }

    #[test]
    fn expm1_below_one_matches_libm() {
        let mut worst = 0.0_f64;
        for i in 0..=10_000 {
            let x = f64::from(i) * 1e-4;
            let expected = libm::expm1(x);
            if expected > 0.0 {
                worst = worst.max(libm::fabs(expm1_below_one(x) - expected) / expected);
            }
        }
        for x in [1e-300, 1e-30, 1e-8] {
            let expected = libm::expm1(x);
            worst = worst.max(libm::fabs(expm1_below_one(x) - expected) / expected);
        }
        // libm's expm1 within 1 ulp, the polynomial within 1.5 ulp (1.4 ulp at x = 0.8888
        // against mpmath): at most 2.5 ulp apart, 2.5 eps relative (measured 1.4 eps).
        assert!(worst <= 2.5 * f64::EPSILON, "worst {worst:e}");
        assert_eq!(expm1_below_one(0.0), 0.0);
    }

    #[test]
    fn linear_response_panel_matches_the_weighted_panel() {
        // Panels across the rules and regimes (a below and above 1, widths for 4 to 12
        // nodes, beyond the shared exponential's reach), both ends of a segment, both
        // detector moments: the folded form against the generic weighted panel with the
        // weight written out as in the band walk. Where both take the same rule, they
        // differ by rounding only (a few per node: allowed 1e-15, worst seen 5.3e-16).
        // Where the folded form takes 4 nodes and the generic one 6 (a >= 1, width in
        // (0.03, 0.045]), the nodes differ too, and each node's position carries half an
        // ulp of t, which moves t^m/(e^t - 1) by up to t ulp: allowed 4 (1 + a) eps (the
        // truncation of either rule is below 6e-18, see `FOUR_NODE_WIDTH`).
        let mut worst = 0.0_f64;
        for m in [2, 3] {
            for a in [0.02, 0.3, 0.9, 1.0, 2.5, 7.0, 40.0, 300.0, 699.0, 705.0] {
                for fraction in [1e-4, 0.01, 0.029, 0.031, 0.044, 0.14, 0.16, 0.39, 0.41, 1.0] {
                    let width = fraction * f64::min(a, 1.0);
                    let same_rule = !(a >= 1.0 && width > 0.03 && width <= FOUR_NODE_WIDTH);
                    let allowed = if same_rule {
                        1e-15
                    } else {
                        4.0 * (1.0 + a) * f64::EPSILON
                    };
                    for (falls, offset) in [(true, 0.0), (false, 0.0), (true, 0.5), (false, 0.5)] {
                        let offset = offset * width;
                        let segment = offset + width;
                        let response = LinearResponse {
                            edge: 0.3,
                            rise: 0.7,
                            per_span: 1.0 / segment * a,
                            sign: if falls { 1.0 } else { -1.0 },
                            start: if falls { 0.0 } else { segment },
                        };
                        let folded = linear_response_panel(m, a, width, offset, &response);
                        let generic = weighted_gauss_panel(m, a, width, |t, node_offset| {
                            let p = response.sign * (offset + node_offset) + response.start;
                            response.edge + response.rise * (response.per_span * (p / t))
                        });
                        for (x, y) in [
                            (folded.0, generic.0),
                            (folded.1, generic.1),
                            (folded.2, generic.2),
                        ] {
                            assert!(y > 0.0, "m {m} a {a} width {width}");
                            worst = worst.max(((x - y) / y).abs() / allowed);
                        }
                    }
                }
            }
        }
        assert!(worst < 1.0, "worst difference {worst:e} of the allowance");
        // Extreme responses deep in the Wien region, where the Planck factor is tiny: a
        // segment reaching 1e300 um (fraction per um 4e-301, rise 4e299), a response near
        // the largest double, and one near the smallest normal. The folded products must
        // neither underflow nor overflow before the integrand does.
        let mut worst = 0.0_f64;
        for m in [2, 3] {
            for a in [40.0, 57.0, 300.0, 650.0] {
                for (edge, rise, per_span) in [
                    (0.18, 4.1e299, 4.1e-301),
                    (1e300, 1e307, 1e-3),
                    (1e-300, 1e-290, 1e-5),
                    (0.0, 1e300, 1e-306),
                ] {
                    for falls in [true, false] {
                        let width = 1.0;
                        let response = LinearResponse {
                            edge,
                            rise,
                            per_span,
                            sign: if falls { 1.0 } else { -1.0 },
                            start: if falls { 0.0 } else { 3.0 * width },
                        };
                        let folded = linear_response_panel(m, a, width, width, &response);
                        let generic = weighted_gauss_panel(m, a, width, |t, node_offset| {
                            let p = response.sign * (width + node_offset) + response.start;
                            response.edge + response.rise * (response.per_span * (p / t))
                        });
                        if !(generic.0 > f64::MIN_POSITIVE * 1e3) {
                            continue;
                        }
                        worst = worst.max(((folded.0 - generic.0) / generic.0).abs());
                    }
                }
            }
        }
        assert!(
            worst < 1e-14,
            "extreme responses: worst relative difference {worst:e}"
        );
    }

    #[test]
    fn exp_neg_table_matches_libm() {
        let mut worst = 0.0_f64;
        let mut x = 0.0;
        while x <= 708.0 {
            let expected = libm::exp(-x);
            worst = worst.max(libm::fabs(exp_neg_table(x) - expected) / expected);
            x += 0.007;
        }
        // libm's exp is within 1 ulp; exp_neg_table within 3 ulp (2^-53 relative each).
        assert!(worst <= 3.0 * f64::EPSILON, "worst {worst:e}");
        // The table against libm's exp2 (within 1 ulp of 2^(-j/32)).
        for (j, &value) in (0u32..).zip(EXP2_NEG_THIRTYSECONDS.iter()) {
            let expected = libm::exp2(-f64::from(j) / 32.0);
            assert!(
                libm::fabs(value - expected) <= f64::EPSILON * expected,
                "j = {j}"
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
