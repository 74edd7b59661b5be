//! Two-colour (ratio) pyrometry: temperature from the ratio of two band signals.
//!
//! A surface at temperature T with emissivities e1, e2 in the two bands gives signals
//! S1 = e1 L1(T) and S2 = e2 L2(T) (L_i the blackbody band radiances, [`Band::radiance`]),
//! so that
//!
//! ```text
//! R = S1 / S2 = kappa * L1(T) / L2(T),      kappa = e1 / e2  (emissivity ratio)
//! ```
//!
//! The emissivity itself cancels; only its spectral slope (kappa != 1) remains. A grey
//! surface has kappa = 1. Signals must be band radiances in the bands' units, or both
//! scaled by one common factor (remove a channel-gain ratio first).
//!
//! - [`RatioPyrometer`] solves the exact band-integral equation for T (energy or photon
//!   detectors, rectangular or tabulated responses), with the sensitivities of T to each
//!   signal and to kappa.
//! - [`WienRatio`] is the closed form in the Wien approximation for two narrow bands at
//!   effective wavelengths lambda1, lambda2 (derived in its docs):
//!
//! ```text
//! 1/T = (lambda_R / c2) ln(kappa W / R),     lambda_R = lambda1 lambda2 / (lambda2 - lambda1)
//!     = 1/T_grey + (lambda_R / c2) ln kappa  (emissivity-slope correction)
//! ```
//!
//!   W is the Wien prefactor ratio of the two bands.
//!
//! A ratio resolves temperature only as well as R changes with it:
//! dT/T = (dR/R) / (d ln R / d ln T). Bands that overlap or sit close together make
//! d ln R / d ln T small (in the Wien limit it is c2 / (lambda_R T)), and nested bands can
//! even make R non-monotonic. [`RatioPyrometer::new`] refuses bands whose
//! |d ln R / d ln T| falls below [`MIN_LOG_SLOPE`] anywhere in the working range
//! ([`Error::BandsIndistinguishable`]).

use crate::band::{Band, Solution, SOLVER_MAX_ITERATIONS};
use crate::constants::{C1L_UM, C1P_UM, C2_UMK};
use crate::error::{check_temperature_k, finite, Error, Result};
use crate::planck::Detector;

/// Smallest |d ln R / d ln T| a ratio pyrometer accepts over its working range.
///
/// At this floor a 1 % error in the ratio becomes a 10 % error in temperature; it is a
/// design choice of this crate (no standard fixes it), set to reject overlapping bands
/// while admitting any practical pair (0.65/0.9 um at 3000 K gives about 2.0; 3-5/8-14 um
/// at 1000 K about 1.7).
pub const MIN_LOG_SLOPE: f64 = 0.1;

/// Log-spaced temperatures at which [`RatioPyrometer::new`] starts its check of the slope
/// and sign of d ln R / d ln T (both ends always among them); it then refines between
/// them where the slope's own variation does not rule out a dip to the floor.
pub const RANGE_CHECK_POINTS: usize = 65;

/// Deepest bisection of one of the [`RANGE_CHECK_POINTS`] intervals by the range check
/// (down to 1/2^14 of it); an interval still unresolved there is refused.
pub const RANGE_CHECK_MAX_DEPTH: usize = 14;

/// Most evaluations the range check adds to its [`RANGE_CHECK_POINTS`]; a range that
/// needs more (dozens of decades of temperature with the bands' features in them) is
/// refused rather than accepted unverified.
pub const RANGE_CHECK_MAX_EXTRA: usize = 2048;

/// Sensitivity coefficients of a ratio temperature, K per unit of each input.
///
/// With s = d ln(L1/L2)/dT at the solution (per K):
/// dT/dS1 = 1/(S1 s), dT/dS2 = -1/(S2 s), dT/dR = 1/(R s), dT/dkappa = -1/(kappa s).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct RatioSensitivities {
    /// dT/dS1, K per signal unit of band 1.
    pub signal1: f64,
    /// dT/dS2, K per signal unit of band 2.
    pub signal2: f64,
    /// dT/dR, K per unit of the ratio.
    pub ratio: f64,
    /// dT/dkappa, K per unit of the emissivity ratio e1/e2.
    pub emissivity_ratio: f64,
    /// d ln R / d ln T at the solution (dimensionless): the ratio's temperature
    /// resolution; dT/T = (dR/R) / this.
    pub log_slope: f64,
}

/// A ratio temperature with how it was found and its sensitivities.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct RatioReading {
    /// The solved temperature, iterations and residual (the residual is
    /// ln(L1/L2) - ln(R/kappa) at the last evaluation).
    pub solution: Solution,
    /// Sensitivities at the solution.
    pub sensitivities: RatioSensitivities,
}

/// A two-band ratio pyrometer over a working temperature range.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct RatioPyrometer<'a> {
    band1: Band<'a>,
    band2: Band<'a>,
    t_min_k: f64,
    t_max_k: f64,
    /// ln(L1/L2) at t_min_k and t_max_k.
    log_ratio_min: f64,
    log_ratio_max: f64,
    /// True when L1/L2 rises with temperature (band 1 the shorter-wave one).
    increasing: bool,
    /// Evaluations the range check of [`RatioPyrometer::new`] took.
    check_evaluations: usize,
}

/// One point of the range check of [`RatioPyrometer::new`].
#[derive(Clone, Copy, Debug)]
struct Probe {
    t_k: f64,
    log_ratio: f64,
    /// s = d ln R / d ln T.
    slope: f64,
    /// s' = d s / d ln T (NaN where a band cannot represent it).
    curvature: f64,
}

impl Probe {
    /// u = sign s - [`MIN_LOG_SLOPE`]: how far the slope, taken with the range's `sign`,
    /// lies above the floor.
    fn floor_margin(&self, sign: f64) -> f64 {
        sign * self.slope - MIN_LOG_SLOPE
    }
}

/// Whether the interval between two checked points is resolved: see [`RatioPyrometer::new`].
/// Any NaN makes it unresolved.
fn resolved(a: &Probe, b: &Probe, sign: f64) -> bool {
    let h = libm::log(b.t_k / a.t_k);
    let (u_a, u_b) = (a.floor_margin(sign), b.floor_margin(sign));
    let (d_a, d_b) = (sign * a.curvature, sign * b.curvature);
    u_a - h * (-d_a).max(0.0) > 0.0
        && u_b - h * d_b.max(0.0) > 0.0
        && h * libm::fabs(d_b - d_a) <= u_a.min(u_b)
}

impl<'a> RatioPyrometer<'a> {
    /// A pyrometer taking R = S1/S2 over [`t_min_k`, `t_max_k`] (K).
    ///
    /// Checks that d ln R / d ln T = T (L1'/L1 - L2'/L2) keeps one sign and stays at or
    /// above [`MIN_LOG_SLOPE`] in size over the whole range, so that every ratio in
    /// [`RatioPyrometer::ratio_range`] has exactly one temperature. The slope s and its
    /// derivative s' = d s / d ln T are evaluated at [`RANGE_CHECK_POINTS`] log-spaced
    /// temperatures, and an interval of width h (in ln T) between two of them is accepted
    /// only when, with u = |s| - [`MIN_LOG_SLOPE`] and s' taken towards the floor,
    ///
    /// ```text
    /// u_a - h max(0, -s'_a) > 0,   u_b - h max(0, s'_b) > 0,   h |s'_b - s'_a| <= min(u_a, u_b)
    /// ```
    ///
    /// (the tangents from both ends stay above the floor, and the change of slope across
    /// the interval is too small for a dip to it: for a locally quadratic s the dip below
    /// min(u) is at most h |s'_b - s'_a| / 8). Otherwise the interval is bisected, to
    /// [`RANGE_CHECK_MAX_DEPTH`] levels and [`RANGE_CHECK_MAX_EXTRA`] evaluations in all.
    /// It is a check at finitely many points, refined where the curve bends, not a proof:
    /// a feature much narrower than the interval with no trace at its ends could pass.
    /// Ranges of ordinary width need no refinement (500-2500 K: intervals of 0.025 in
    /// ln T); wide ones cost up to 2 extra evaluations per refined interval and level.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], [`Error::RatioRangeInvalid`]
    /// unless t_min_k < t_max_k, [`Error::BandsIndistinguishable`] where the slope changes
    /// sign or falls below the floor, or the check cannot resolve the curve within its
    /// depth and evaluation limits, and band-radiance errors (e.g.
    /// [`Error::RadianceUnderflow`] where a band sees nothing at t_min_k).
    pub fn new(band1: Band<'a>, band2: Band<'a>, t_min_k: f64, t_max_k: f64) -> Result<Self> {
        check_temperature_k(t_min_k)?;
        check_temperature_k(t_max_k)?;
        if !(t_min_k < t_max_k) {
            return Err(Error::RatioRangeInvalid);
        }
        let mut pyrometer = RatioPyrometer {
            band1,
            band2,
            t_min_k,
            t_max_k,
            log_ratio_min: 0.0,
            log_ratio_max: 0.0,
            increasing: true,
            check_evaluations: 0,
        };
        let first = pyrometer.probe(t_min_k)?;
        let sign = if first.slope > 0.0 { 1.0 } else { -1.0 };
        if !(first.floor_margin(sign) > 0.0) {
            return Err(Error::BandsIndistinguishable);
        }
        pyrometer.log_ratio_min = first.log_ratio;
        pyrometer.increasing = sign > 0.0;
        let span = libm::log(t_max_k / t_min_k);
        #[allow(clippy::cast_precision_loss)]
        let last = (RANGE_CHECK_POINTS - 1) as f64;
        let mut left = first;
        let mut extra = 0;
        // Right ends still to be reached from `left`, nearest on top.
        let mut pending = [first; RANGE_CHECK_MAX_DEPTH + 1];
        for i in 1..RANGE_CHECK_POINTS {
            #[allow(clippy::cast_precision_loss)]
            let fraction = i as f64 / last;
            let t = if i + 1 == RANGE_CHECK_POINTS {
                t_max_k
            } else {
                t_min_k * libm::exp(span * fraction)
            };
            let point = pyrometer.probe(t)?;
            if !(point.floor_margin(sign) > 0.0) {
                return Err(Error::BandsIndistinguishable);
            }
            pending[0] = point;
            let mut depth = 0;
            loop {
                let right = pending[depth];
                if resolved(&left, &right, sign) {
                    left = right;
                    if depth == 0 {
                        break;
                    }
                    depth -= 1;
                    continue;
                }
                if depth == RANGE_CHECK_MAX_DEPTH || extra == RANGE_CHECK_MAX_EXTRA {
                    return Err(Error::BandsIndistinguishable);
                }
                let middle = pyrometer.probe(libm::sqrt(left.t_k * right.t_k))?;
                extra += 1;
                if !(middle.floor_margin(sign) > 0.0) {
                    return Err(Error::BandsIndistinguishable);
                }
                depth += 1;
                pending[depth] = middle;
            }
        }
        pyrometer.log_ratio_max = left.log_ratio;
        pyrometer.check_evaluations = RANGE_CHECK_POINTS + extra;
        Ok(pyrometer)
    }

    /// ln R, s = d ln R / d ln T and s' = d s / d ln T at `temperature_k`.
    fn probe(&self, temperature_k: f64) -> Result<Probe> {
        let (l1, p1, c1) = self.band1.log_slope_and_curvature(temperature_k)?;
        let (l2, p2, c2) = self.band2.log_slope_and_curvature(temperature_k)?;
        Ok(Probe {
            t_k: temperature_k,
            log_ratio: libm::log(l1) - libm::log(l2),
            slope: p1 - p2,
            curvature: c1 - c2,
        })
    }

    /// How many temperatures the range check of [`RatioPyrometer::new`] evaluated both
    /// bands at: [`RANGE_CHECK_POINTS`], plus those it added where the slope bends.
    #[must_use]
    pub fn range_check_evaluations(&self) -> usize {
        self.check_evaluations
    }

    /// Band 1 (numerator).
    #[must_use]
    pub fn band1(&self) -> Band<'a> {
        self.band1
    }

    /// Band 2 (denominator).
    #[must_use]
    pub fn band2(&self) -> Band<'a> {
        self.band2
    }

    /// Working range (t_min_k, t_max_k), K.
    #[must_use]
    pub fn range_k(&self) -> (f64, f64) {
        (self.t_min_k, self.t_max_k)
    }

    /// Blackbody ratios L1/L2 at the two ends of the range, (at t_min_k, at t_max_k): the
    /// ratios R/kappa the pyrometer can resolve lie between them.
    #[must_use]
    pub fn ratio_range(&self) -> (f64, f64) {
        (libm::exp(self.log_ratio_min), libm::exp(self.log_ratio_max))
    }

    /// ln(L1/L2) and its temperature derivative L1'/L1 - L2'/L2 (per K) at `temperature_k`.
    ///
    /// # Errors
    /// Band-radiance errors of either band.
    pub fn log_ratio_and_slope(&self, temperature_k: f64) -> Result<(f64, f64)> {
        let (l1, d1) = self.band1.radiance_and_derivative(temperature_k)?;
        let (l2, d2) = self.band2.radiance_and_derivative(temperature_k)?;
        Ok((libm::log(l1) - libm::log(l2), d1 / l1 - d2 / l2))
    }

    /// The forward model R = kappa L1(T)/L2(T) (dimensionless when both bands share a
    /// detector kind), at any positive temperature.
    ///
    /// # Errors
    /// [`Error::EmissivityRatioNotPositive`], band-radiance errors, [`Error::NonFinite`].
    pub fn ratio(&self, temperature_k: f64, emissivity_ratio: f64) -> Result<f64> {
        let kappa = check_emissivity_ratio(emissivity_ratio)?;
        let l1 = self.band1.radiance(temperature_k)?;
        let l2 = self.band2.radiance(temperature_k)?;
        finite(kappa * (l1 / l2))
    }

    /// Temperature whose ratio kappa L1(T)/L2(T) equals `ratio` (kappa = e1/e2; 1 for a
    /// grey surface), K, by Newton's method on ln(L1/L2) against 1/T (nearly linear: the
    /// Wien limit is exactly linear), safeguarded by the working-range bracket and
    /// geometric bisection; stops when a step is below 1e-13 T.
    ///
    /// Accuracy: |dT/T| <= (band-radiance relative error, 1e-14) / |d ln R / d ln T|,
    /// so below 1e-12 for any accepted pair; checked against mpmath in
    /// `tests/ratio_reference.rs`.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::RatioNotPositive`],
    /// [`Error::EmissivityRatioNotPositive`], [`Error::RatioOutOfRange`] when R/kappa lies
    /// outside [`RatioPyrometer::ratio_range`], [`Error::NotConverged`], band errors.
    pub fn temperature(&self, ratio: f64, emissivity_ratio: f64) -> Result<Solution> {
        if !(finite(ratio)? > 0.0) {
            return Err(Error::RatioNotPositive);
        }
        let kappa = check_emissivity_ratio(emissivity_ratio)?;
        let target = libm::log(ratio) - libm::log(kappa);
        finite(target)?;
        let sign = if self.increasing { 1.0 } else { -1.0 };
        // f(T) = sign (ln R(T) - target) rises with T.
        let f_min = sign * (self.log_ratio_min - target);
        let f_max = sign * (self.log_ratio_max - target);
        if f_min > 0.0 || f_max < 0.0 {
            return Err(Error::RatioOutOfRange);
        }
        if f_min == 0.0 {
            return Ok(done(self.t_min_k, 1, 0.0));
        }
        if f_max == 0.0 {
            return Ok(done(self.t_max_k, 1, 0.0));
        }
        let mut lo = self.t_min_k;
        let mut hi = self.t_max_k;
        // Start from the line through the two ends in (1/T, ln R): exact in the Wien limit.
        let u_lo = 1.0 / self.t_max_k;
        let u_hi = 1.0 / self.t_min_k;
        let u0 = u_lo
            + (target - self.log_ratio_max) / (self.log_ratio_min - self.log_ratio_max)
                * (u_hi - u_lo);
        let mut t = 1.0 / u0;
        if !(t > lo && t < hi) {
            t = libm::sqrt(lo * hi);
        }
        for iteration in 1..=SOLVER_MAX_ITERATIONS {
            let (log_ratio, slope) = self.log_ratio_and_slope(t)?;
            // The range check of `new` makes this hold everywhere in the range; it is
            // checked again where the answer is taken from, in case a feature slipped
            // between the check's points.
            if !(sign * t * slope >= MIN_LOG_SLOPE) {
                return Err(Error::BandsIndistinguishable);
            }
            let g = log_ratio - target;
            if g == 0.0 {
                return Ok(done(t, iteration, 0.0));
            }
            if sign * g < 0.0 {
                lo = t;
            } else {
                hi = t;
            }
            // Newton in u = 1/T: d ln R / du = -T^2 d ln R / dT.
            let u = 1.0 / t + g / (t * t * slope);
            let newton = if u > 0.0 { 1.0 / u } else { f64::NAN };
            // A converged Newton step is accepted even where rounding puts it a hair
            // outside the bracket (one bracket end may still be the far range limit).
            if libm::fabs(newton - t) <= 1e-13 * t {
                return Ok(done(newton, iteration, g));
            }
            let next = if newton > lo && newton < hi {
                newton
            } else {
                libm::sqrt(lo * hi)
            };
            if hi - lo <= 4.0 * f64::EPSILON * hi {
                return Ok(done(next, iteration, g));
            }
            t = next;
        }
        Err(Error::NotConverged)
    }

    /// Sensitivities of the ratio temperature at `temperature_k` to the two signals
    /// (signal units), the ratio and the emissivity ratio; see [`RatioSensitivities`].
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::RadianceNotPositive`] for a signal <= 0,
    /// [`Error::EmissivityRatioNotPositive`], band errors,
    /// [`Error::BandsIndistinguishable`] where d ln R/dT is zero.
    pub fn sensitivities(
        &self,
        temperature_k: f64,
        signal1: f64,
        signal2: f64,
        emissivity_ratio: f64,
    ) -> Result<RatioSensitivities> {
        if !(finite(signal1)? > 0.0 && finite(signal2)? > 0.0) {
            return Err(Error::RadianceNotPositive);
        }
        let kappa = check_emissivity_ratio(emissivity_ratio)?;
        let (_, slope) = self.log_ratio_and_slope(temperature_k)?;
        if !(slope != 0.0 && slope.is_finite()) {
            return Err(Error::BandsIndistinguishable);
        }
        let ratio = signal1 / signal2;
        Ok(RatioSensitivities {
            signal1: finite(1.0 / (signal1 * slope))?,
            signal2: finite(-1.0 / (signal2 * slope))?,
            ratio: finite(1.0 / (ratio * slope))?,
            emissivity_ratio: -1.0 / (kappa * slope),
            log_slope: temperature_k * slope,
        })
    }

    /// Temperature from the two band signals S1, S2 (R = S1/S2) with the emissivity ratio
    /// kappa = e1/e2, and its sensitivities.
    ///
    /// # Errors
    /// As [`RatioPyrometer::temperature`] and [`RatioPyrometer::sensitivities`];
    /// [`Error::RadianceNotPositive`] for a signal <= 0.
    pub fn temperature_from_signals(
        &self,
        signal1: f64,
        signal2: f64,
        emissivity_ratio: f64,
    ) -> Result<RatioReading> {
        if !(finite(signal1)? > 0.0 && finite(signal2)? > 0.0) {
            return Err(Error::RadianceNotPositive);
        }
        let solution = self.temperature(finite(signal1 / signal2)?, emissivity_ratio)?;
        let sensitivities =
            self.sensitivities(solution.temperature_k, signal1, signal2, emissivity_ratio)?;
        Ok(RatioReading {
            solution,
            sensitivities,
        })
    }

    /// The Wien closed form for these bands ([`WienRatio::from_bands`]).
    ///
    /// # Errors
    /// As [`WienRatio::from_bands`].
    pub fn wien(&self) -> Result<WienRatio> {
        WienRatio::from_bands(&self.band1, &self.band2)
    }
}

fn done(temperature_k: f64, iterations: u32, residual: f64) -> Solution {
    Solution {
        temperature_k,
        iterations,
        residual,
    }
}

fn check_emissivity_ratio(emissivity_ratio: f64) -> Result<f64> {
    if finite(emissivity_ratio)? > 0.0 {
        Ok(emissivity_ratio)
    } else {
        Err(Error::EmissivityRatioNotPositive)
    }
}

/// Two-colour ratio in the Wien approximation, in closed form.
///
/// Derivation. For a narrow band i of response integral D_i (um) at effective wavelength
/// lambda_i, Wien's law e^-x in place of 1/(e^x - 1) gives
/// S_i = e_i c1_i lambda_i^-n_i D_i exp(-c2/(lambda_i T)) (n = 5, c1 = c1L for an energy
/// detector; n = 4, c1 = c1p = 2c for a photon detector). Dividing,
///
/// ```text
/// R = S1/S2 = kappa W exp(-c2/(lambda_R T)),   W = (c1_1 lambda1^-n1 D1) / (c1_2 lambda2^-n2 D2),
/// 1/lambda_R = 1/lambda1 - 1/lambda2,          kappa = e1/e2
/// => 1/T = (lambda_R / c2) ln(kappa W / R) = 1/T_grey + (lambda_R / c2) ln kappa.
/// ```
///
/// Error of the approximation (T the exact temperature, T_W the closed form's), to first
/// order in each small term:
///
/// ```text
/// 1/T_W - 1/T = -(lambda_R / c2) [ ln((1 - e^-x2)/(1 - e^-x1)) + D1^2 h1/24 - D2^2 h2/24 ]
/// x_i = c2/(lambda_i T),   h_i = f_i''/f_i for f_i = lambda^-n_i exp(-c2/(lambda T)) at lambda_i:
/// h = (n/lambda^2 - 2a/lambda^3) + (-n/lambda + a/lambda^2)^2,  a = c2/T
/// ```
///
/// The first term is Wien's law itself (exact for line bands: Planck = Wien / (1 - e^-x));
/// with lambda1 < lambda2 it makes T_W read low by about T^2 (lambda_R/c2)(e^-x2 - e^-x1).
/// The second is the midpoint-rule error of treating a rectangular band of width D as a
/// line at its centre. For 10 nm bands at 0.65 and 0.90 um at 2000 K both are about
/// 0.1-0.2 K; `tests/ratio_wien.rs` checks the prediction. For wide bands neither term is
/// small and the closed form is off by tens of kelvin (`tests/ratio_reference.rs`).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct WienRatio {
    lambda1_um: f64,
    lambda2_um: f64,
    prefactor: f64,
}

impl WienRatio {
    /// A Wien ratio model from effective wavelengths (um) and the prefactor W (the ratio
    /// S1/S2 a grey body would give at infinite temperature in the Wien approximation).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::WavelengthNotPositive`],
    /// [`Error::BandsIndistinguishable`] when lambda1 == lambda2,
    /// [`Error::RatioNotPositive`] unless W > 0.
    pub fn new(lambda1_um: f64, lambda2_um: f64, prefactor: f64) -> Result<Self> {
        if !(finite(lambda1_um)? > 0.0 && finite(lambda2_um)? > 0.0) {
            return Err(Error::WavelengthNotPositive);
        }
        if lambda1_um == lambda2_um {
            return Err(Error::BandsIndistinguishable);
        }
        if !(finite(prefactor)? > 0.0) {
            return Err(Error::RatioNotPositive);
        }
        Ok(WienRatio {
            lambda1_um,
            lambda2_um,
            prefactor,
        })
    }

    /// The Wien model of two bands: lambda_i the response-weighted mean wavelength
    /// (integral of lambda r / integral of r, exact for piecewise-linear responses), D_i the
    /// response integral (um), W as in the type's docs.
    ///
    /// # Errors
    /// As [`WienRatio::new`].
    pub fn from_bands(band1: &Band<'_>, band2: &Band<'_>) -> Result<Self> {
        let (lambda1, factor1) = wien_factor(band1);
        let (lambda2, factor2) = wien_factor(band2);
        WienRatio::new(lambda1, lambda2, factor1 / factor2)
    }

    /// Effective wavelength of band 1, um.
    #[must_use]
    pub fn lambda1_um(&self) -> f64 {
        self.lambda1_um
    }

    /// Effective wavelength of band 2, um.
    #[must_use]
    pub fn lambda2_um(&self) -> f64 {
        self.lambda2_um
    }

    /// Prefactor W (ratio units).
    #[must_use]
    pub fn prefactor(&self) -> f64 {
        self.prefactor
    }

    /// Equivalent wavelength of the ratio, lambda_R = lambda1 lambda2 / (lambda2 - lambda1),
    /// um (negative when band 1 is the longer-wave one). A single-band thermometer at
    /// lambda_R has the ratio's sensitivity to signal errors.
    #[must_use]
    pub fn equivalent_wavelength_um(&self) -> f64 {
        self.lambda1_um * self.lambda2_um / (self.lambda2_um - self.lambda1_um)
    }

    /// R = kappa W exp(-c2 / (lambda_R T)).
    ///
    /// Accuracy: a few ulp while kappa W and the exponential are normal doubles; otherwise
    /// (a subnormal kappa W lost up to 1e-6 of R, and the temperature back with it) R is
    /// exp(ln kappa + ln W - c2/(lambda_R T)), relative error below 1e-13 (eps times the
    /// exponent, at most about 1500).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
    /// [`Error::EmissivityRatioNotPositive`], [`Error::RatioOutOfRange`] when R is not a
    /// normal double.
    pub fn ratio(&self, temperature_k: f64, emissivity_ratio: f64) -> Result<f64> {
        let t = check_temperature_k(temperature_k)?;
        let kappa = check_emissivity_ratio(emissivity_ratio)?;
        let exponent = -C2_UMK / (self.equivalent_wavelength_um() * t);
        let kw = kappa * self.prefactor;
        let e = libm::exp(exponent);
        let r = if kw.is_normal() && e.is_normal() {
            kw * e
        } else {
            libm::exp(libm::log(kappa) + libm::log(self.prefactor) + exponent)
        };
        if r.is_finite() && r >= f64::MIN_POSITIVE {
            Ok(r)
        } else {
            Err(Error::RatioOutOfRange)
        }
    }

    /// 1/T = (lambda_R / c2) ln(kappa W / R), K.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::RatioNotPositive`],
    /// [`Error::EmissivityRatioNotPositive`], [`Error::RatioOutOfRange`] when no positive
    /// temperature gives R (R beyond kappa W, the infinite-temperature limit).
    pub fn temperature(&self, ratio: f64, emissivity_ratio: f64) -> Result<f64> {
        if !(finite(ratio)? > 0.0) {
            return Err(Error::RatioNotPositive);
        }
        let kappa = check_emissivity_ratio(emissivity_ratio)?;
        let log_term = libm::log(kappa) + libm::log(self.prefactor) - libm::log(ratio);
        let t = C2_UMK / (self.equivalent_wavelength_um() * log_term);
        if t > 0.0 && t.is_finite() {
            Ok(t)
        } else {
            Err(Error::RatioOutOfRange)
        }
    }

    /// Emissivity-slope correction of a grey ratio temperature:
    /// 1/T = 1/T_grey + (lambda_R / c2) ln kappa, K. With kappa = e1/e2 > 1 (emissivity
    /// falling with wavelength, as for most metals) the true temperature is below the grey
    /// reading. Exact within the Wien model; dT/dkappa = -T^2 lambda_R / (c2 kappa).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
    /// [`Error::EmissivityRatioNotPositive`], [`Error::RatioOutOfRange`] when the corrected
    /// 1/T is not positive or T is not a positive finite double (1/T_grey overflowing).
    pub fn correct_grey(&self, grey_temperature_k: f64, emissivity_ratio: f64) -> Result<f64> {
        let t = check_temperature_k(grey_temperature_k)?;
        let kappa = check_emissivity_ratio(emissivity_ratio)?;
        let inverse = 1.0 / t + self.equivalent_wavelength_um() / C2_UMK * libm::log(kappa);
        let corrected = 1.0 / inverse;
        // A grey temperature so small that 1/T overflows gives 1/inf = 0: not a temperature.
        if inverse > 0.0 && corrected > 0.0 && corrected.is_finite() {
            Ok(corrected)
        } else {
            Err(Error::RatioOutOfRange)
        }
    }
}

/// (effective wavelength lambda, c1 lambda^-n D) of a band for the Wien model.
fn wien_factor(band: &Band<'_>) -> (f64, f64) {
    let (lo, hi) = (band.lo_um(), band.hi_um());
    let (width, moment) = match band.response() {
        None => (hi - lo, 0.5 * (hi * hi - lo * lo)),
        Some(table) => {
            // Exact integrals of r and lambda r for r linear between breakpoints
            // {lo, table nodes inside (lo, hi), hi}.
            let mut width = 0.0;
            let mut moment = 0.0;
            let mut a = lo;
            let mut ra = table.value_at(lo);
            let nodes = table
                .wavelengths_um()
                .iter()
                .copied()
                .filter(|&w| w > lo && w < hi)
                .chain(core::iter::once(hi));
            for b in nodes {
                let rb = table.value_at(b);
                let d = b - a;
                width += 0.5 * d * (ra + rb);
                moment += d / 6.0 * (a * (2.0 * ra + rb) + b * (ra + 2.0 * rb));
                a = b;
                ra = rb;
            }
            (width, moment)
        }
    };
    let lambda = moment / width;
    let factor = match band.detector() {
        Detector::Energy => C1L_UM / libm::pow(lambda, 5.0) * width,
        Detector::Photon => C1P_UM / libm::pow(lambda, 4.0) * width,
    };
    (lambda, factor)
}
