//! Multi-wavelength pyrometry: temperature and emissivity together from the signals of
//! N bands, with a fitted model of ln emissivity, and an honest report of how badly the
//! problem is conditioned.
//!
//! # Model
//! Band i (response r_i) sees S_i = integral r_i(lambda) e(lambda) L(lambda, T) dlambda
//! with a polynomial model of ln e in wavelength (um):
//!
//! ```text
//! ln e(lambda) = a_0 + a_1 lambda + ... + a_(m-1) lambda^(m-1)
//! ```
//!
//! m = [`EmissivityModel::terms`]: 0 (emissivity known: the signals are already divided
//! by it, e = 1), 1 (grey), 2 (ln e linear), 3 (quadratic). The fit minimises
//! sum (ln S_i - ln M_i(T, a))^2 (equal relative noise in every band) over T and a; it
//! needs N >= m + 1 bands.
//!
//! Method: a Wien-linearised start (ln S_i - ln L_i(T_ref) ~= ln e(lambda_i) -
//! (c2/lambda_i)(1/T - 1/T_ref), lambda_i the band's limit effective wavelength at T_ref,
//! T_ref the largest single-band brightness temperature, solved as linear least squares),
//! then Gauss-Newton on the exact band integrals (the band's own quadrature with the
//! weight e(lambda)) in ln T and a, to a step below 1e-12.
//!
//! # Ill-conditioning (Coates 1981, Metrologia 17, 103; Cassady and Choueiri 2003)
//! Temperature and a smooth emissivity trade against each other: every extra model term
//! multiplies the noise. With noise s (standard deviation of ln S per band, independent),
//! the standard deviation of dT/T is g s, the noise gain g = sqrt([(J^T J)^-1]_TT) with J
//! the Jacobian of ln M in (ln T, a). At 1500 K (Wien-linearised, check values
//! recomputed with numpy in `tools/refgen/multiwavelength_refs.py`): one band at 0.9 um
//! with e known 0.0938; two-colour 0.8/1.0 um grey 0.590; 3 bands 0.8-1.0 um linear 9.19;
//! 4 bands 0.7-1.0 um linear 3.08, quadratic 39.2; 7 bands (0.7-1.0 um) linear 2.69;
//! 11 bands 0.6-1.6 um linear 0.36.
//!
//! A model that misses the true emissivity's shape biases T. The fit reports the bias per
//! unit of the first omitted term: if ln e has an extra c lambda^m, dT/T ~= b c
//! ([`MultiwavelengthFit::bias_per_next_term`]). Example: ln e = ln 0.4 - 0.3 lambda at
//! 0.7, 0.8, 0.9, 1.0 um and 1500 K: a linear model returns 1500.000 K, a grey model
//! 1533.3 K.
//!
//! Caution: with N bands close together, a few per mille of signal noise become tens of
//! kelvin. Multi-wavelength readings of molten metal or furnace loads are not a safety
//! clearance; defer to local codes and licensed practice.

use crate::band::Band;
use crate::calibration::limit_effective_wavelength_um;
use crate::constants::C2_UMK;
use crate::error::{check_temperature_k, finite, Error, Result};

/// Most bands a fit holds (fixed capacity, no heap).
pub const MAX_BANDS: usize = 16;
/// Most terms of the ln-emissivity polynomial.
pub const MAX_TERMS: usize = 3;
/// Most Gauss-Newton iterations. The start is within a factor 2 in T and steps are
/// damped to 20 % in T, so a fit that converges reaches the solution's neighbourhood in
/// at most 4 damped steps and then converges quadratically (under 10 iterations in the
/// tests). Each iteration costs (terms + 1) weighted band integrals per band, up to about
/// 0.7 ms for two wide bands, so the bound also bounds the time of a fit that does not
/// converge (60 iterations took 40 ms on the host, 82 ms under load: over the C ABI's
/// 50 ms per-call budget).
pub const MAX_ITERATIONS: u32 = 20;

/// Parameters: ln T and up to MAX_TERMS coefficients.
const P: usize = MAX_TERMS + 1;

/// The ln-emissivity model: a polynomial in wavelength with `terms` coefficients.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct EmissivityModel {
    terms: usize,
}

impl EmissivityModel {
    /// Emissivity known (signals already divided by it): no coefficient.
    pub const KNOWN: EmissivityModel = EmissivityModel { terms: 0 };
    /// Grey: ln e = a_0.
    pub const GREY: EmissivityModel = EmissivityModel { terms: 1 };
    /// ln e linear in wavelength: a_0 + a_1 lambda.
    pub const LINEAR: EmissivityModel = EmissivityModel { terms: 2 };
    /// ln e quadratic in wavelength.
    pub const QUADRATIC: EmissivityModel = EmissivityModel { terms: 3 };

    /// A model with `terms` coefficients (0 to [`MAX_TERMS`]).
    ///
    /// # Errors
    /// [`Error::EmissivityModelInvalid`] above [`MAX_TERMS`].
    pub const fn new(terms: u32) -> Result<EmissivityModel> {
        match terms {
            0 => Ok(Self::KNOWN),
            1 => Ok(Self::GREY),
            2 => Ok(Self::LINEAR),
            3 => Ok(Self::QUADRATIC),
            _ => Err(Error::EmissivityModelInvalid),
        }
    }

    /// Number of coefficients.
    #[must_use]
    pub const fn terms(self) -> usize {
        self.terms
    }
}

/// The result of [`fit`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MultiwavelengthFit {
    /// Temperature, K.
    pub temperature_k: f64,
    /// Coefficients a_0.. of ln e (a_j in um^-j); entries from `terms` on are zero.
    pub coefficients: [f64; MAX_TERMS],
    /// The model fitted.
    pub model: EmissivityModel,
    /// Noise gain g: std(dT/T) = g s for independent noise s in each ln S_i (from the
    /// exact Jacobian at the solution).
    pub noise_gain: f64,
    /// First-order model-error bias: dT/T per unit coefficient (um^-m) of an omitted
    /// term lambda^m, m = terms (from the exact band integrals of lambda^m).
    pub bias_per_next_term: f64,
    /// Root mean square of the residuals ln S_i - ln M_i (0 when N = terms + 1).
    pub residual_rms: f64,
    /// Gauss-Newton iterations used.
    pub iterations: u32,
}

impl MultiwavelengthFit {
    /// The emissivity of the fitted model at `wavelength_um`.
    #[must_use]
    pub fn emissivity_at(&self, wavelength_um: f64) -> f64 {
        libm::exp(poly(&self.coefficients, self.model.terms, wavelength_um))
    }
}

fn poly(a: &[f64; MAX_TERMS], terms: usize, lambda: f64) -> f64 {
    let mut sum = 0.0;
    let mut power = 1.0;
    for &coefficient in a.iter().take(terms) {
        sum += coefficient * power;
        power *= lambda;
    }
    sum
}

/// The normal equations of `rows` (Jacobian row, right-hand side) for the first `n`
/// parameters, padded to P x P with a unit diagonal (a block that leaves the first n
/// unknowns alone), so every loop runs over the fixed size P and no index can leave the
/// arrays.
fn normal_system<'r>(
    rows: impl Iterator<Item = (&'r [f64; P], f64)>,
    n: usize,
) -> [[f64; P + 1]; P] {
    let mut m = [[0.0; P + 1]; P];
    for (row, rhs) in rows {
        for (i, line) in m.iter_mut().enumerate() {
            let ri = if i < n { row[i % P] } else { 0.0 };
            for (j, entry) in line.iter_mut().take(P).enumerate() {
                let rj = if j < n { row[j % P] } else { 0.0 };
                *entry += ri * rj;
            }
            line[P] += ri * rhs;
        }
    }
    for (i, line) in m.iter_mut().enumerate().skip(n) {
        line[i % P] = 1.0;
    }
    m
}

/// Solves the P x P system in `m` (augmented with the right-hand side in column P) by
/// Gaussian elimination with partial pivoting; `None` when a pivot is below 1e-12 of the
/// largest entry of its column in the original matrix (a numerically singular system:
/// the normal matrix squares the Jacobian's condition number, so this refuses Jacobians
/// conditioned worse than about 1e6). All indices are below the fixed sizes (`% P` makes that
/// visible to the compiler, which then drops the checks).
fn solve(mut m: [[f64; P + 1]; P]) -> Option<[f64; P]> {
    let mut column_scale = [0.0_f64; P];
    for line in &m {
        for (scale, v) in column_scale.iter_mut().zip(line) {
            *scale = scale.max(v.abs());
        }
    }
    for col in 0..P {
        let mut pivot = col;
        let mut scale: f64 = 0.0;
        for r in col..P {
            let value = m[r % P][col % P].abs();
            if value > scale {
                scale = value;
                pivot = r;
            }
        }
        if !(scale > 1e-12 * column_scale[col % P]) {
            return None;
        }
        m.swap(col % P, pivot % P);
        let head = m[col % P];
        for line in m.iter_mut().skip(col + 1) {
            let f = line[col % P] / head[col % P];
            for (entry, h) in line.iter_mut().zip(head).skip(col) {
                *entry -= f * h;
            }
        }
    }
    let mut x = [0.0; P];
    for r in (0..P).rev() {
        let line = m[r % P];
        let mut s = line[P];
        for c in r + 1..P {
            s -= line[c % P] * x[c % P];
        }
        x[r % P] = s / line[r % P];
    }
    Some(x)
}

/// [(J^T J)^-1 J^T v]_0 and sqrt([(J^T J)^-1]_00) for the first `rows` rows of J.
fn gain_and_projection(
    jacobian: &[[f64; P]; MAX_BANDS],
    rows: usize,
    n: usize,
    v: &[f64; MAX_BANDS],
) -> Result<(f64, f64)> {
    // Column 0 of the inverse: solve N x = e_0.
    let mut unit = normal_system(jacobian.iter().take(rows).map(|row| (row, 0.0)), n);
    unit[0][P] = 1.0;
    let inverse0 = solve(unit).ok_or(Error::MultiwavelengthIllConditioned)?;
    let projected = normal_system(jacobian.iter().take(rows).zip(v.iter().copied()), n);
    let bias = solve(projected).ok_or(Error::MultiwavelengthIllConditioned)?;
    if !(inverse0[0] > 0.0) {
        return Err(Error::MultiwavelengthIllConditioned);
    }
    Ok((finite(libm::sqrt(inverse0[0]))?, finite(bias[0])?))
}

fn check_count(count: usize, model: EmissivityModel) -> Result<()> {
    if count > MAX_BANDS {
        Err(Error::TooManyBands)
    } else if count < model.terms + 1 {
        Err(Error::TooFewBands)
    } else {
        Ok(())
    }
}

/// The Wien-linearised noise gain of monochromatic channels at `wavelengths_um`, at
/// `temperature_k`, for `model`: g = sqrt([(J^T J)^-1]_TT) with rows
/// J_i = (c2/(lambda_i T), 1, lambda_i, lambda_i^2, ...) (the Wien approximation, as in
/// Coates 1981; the exact-Planck column x/(1 - e^-x) changes g by under 1e-4 relative for
/// lambda T below 2000 um K). This is what a design study needs before any band exists;
/// [`fit`] reports the exact band value at its solution. Also returns the bias per unit
/// of the first omitted term (see [`MultiwavelengthFit::bias_per_next_term`]).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], [`Error::WavelengthNotPositive`],
/// [`Error::TooFewBands`], [`Error::TooManyBands`],
/// [`Error::MultiwavelengthIllConditioned`] (two equal wavelengths with too many terms).
pub fn noise_gain(
    wavelengths_um: &[f64],
    temperature_k: f64,
    model: EmissivityModel,
) -> Result<(f64, f64)> {
    let t = check_temperature_k(temperature_k)?;
    check_count(wavelengths_um.len(), model)?;
    let n = model.terms + 1;
    let mut jacobian = [[0.0; P]; MAX_BANDS];
    let mut next = [0.0; MAX_BANDS];
    for ((row, slot), &lambda) in jacobian.iter_mut().zip(&mut next).zip(wavelengths_um) {
        if !(finite(lambda)? > 0.0) {
            return Err(Error::WavelengthNotPositive);
        }
        row[0] = C2_UMK / (lambda * t);
        let mut power = 1.0;
        for entry in row.iter_mut().skip(1).take(model.terms) {
            *entry = power;
            power *= lambda;
        }
        *slot = power;
    }
    gain_and_projection(&jacobian, wavelengths_um.len(), n, &next)
}

/// ln M_i and its Jacobian row (d/d ln T, d/d a_j), plus the omitted-term column.
fn evaluate(
    band: &Band<'_>,
    t: f64,
    a: &[f64; MAX_TERMS],
    terms: usize,
) -> Result<(f64, [f64; P], f64)> {
    let emissivity = |lambda: f64| libm::exp(poly(a, terms, lambda));
    let (m, dm_dt) = band.weighted_radiance_and_derivative(t, &[], emissivity)?;
    if !(m > 0.0) {
        return Err(Error::RadianceUnderflow);
    }
    let mut row = [0.0; P];
    row[0] = t * dm_dt / m;
    // Column 1 + j is d ln M / d a_j: the band integral weighted by lambda^j e, over M
    // (exactly 1 for a_0).
    let mut exponent = 0.0;
    for entry in row.iter_mut().skip(1).take(terms) {
        *entry = if exponent == 0.0 {
            1.0
        } else {
            let (mj, _) = band.weighted_radiance_and_derivative(t, &[], |lambda| {
                libm::pow(lambda, exponent) * emissivity(lambda)
            })?;
            mj / m
        };
        exponent += 1.0;
    }
    let next = if exponent == 0.0 {
        1.0
    } else {
        let (mn, _) = band.weighted_radiance_and_derivative(t, &[], |lambda| {
            libm::pow(lambda, exponent) * emissivity(lambda)
        })?;
        mn / m
    };
    Ok((libm::log(m), row, next))
}

/// Fits temperature and the ln-emissivity model to the signals of N bands (see the module
/// docs). `signals[i]` is band i's signal in its band-radiance units (W m^-2 sr^-1 for an
/// energy band), that is, the instrument's signal divided by its responsivity; any
/// path or window must already be corrected. Bands may be rectangular or tabulated,
/// energy or photon.
///
/// Accuracy: the exact band integrals (1e-13 relative) make the fit exact for data that
/// follow the model: ln e = ln 0.4 - 0.3 lambda on four 10 nm bands at 0.7-1.0 um
/// returns 1500 K within 1e-12 relative (`tests/multiwavelength.rs`, signals from mpmath).
///
/// # Errors
/// [`Error::TooFewBands`] (N < terms + 1), [`Error::TooManyBands`] (N > 16),
/// [`Error::BandCountMismatch`], [`Error::NonFinite`], [`Error::RadianceNotPositive`] for a
/// signal <= 0, [`Error::MultiwavelengthIllConditioned`] when the bands cannot separate
/// T from the model (identical bands, say), [`Error::MultiwavelengthNotConverged`], and
/// band errors.
pub fn fit(
    bands: &[Band<'_>],
    signals: &[f64],
    model: EmissivityModel,
) -> Result<MultiwavelengthFit> {
    if bands.len() != signals.len() {
        return Err(Error::BandCountMismatch);
    }
    check_count(bands.len(), model)?;
    let terms = model.terms;
    let n = terms + 1;
    let count = bands.len();
    let mut ln_s = [0.0; MAX_BANDS];
    for (slot, &s) in ln_s.iter_mut().zip(signals) {
        if !(finite(s)? > 0.0) {
            return Err(Error::RadianceNotPositive);
        }
        *slot = libm::log(s);
    }
    // Start: the largest brightness temperature is a lower bound of T for e <= 1.
    let mut t_ref: f64 = 0.0;
    for (band, &s) in bands.iter().zip(signals) {
        t_ref = t_ref.max(band.temperature(s)?);
    }
    let mut jacobian = [[0.0; P]; MAX_BANDS];
    let mut rhs = [0.0; MAX_BANDS];
    for ((row, y), (band, &ln)) in jacobian
        .iter_mut()
        .zip(&mut rhs)
        .zip(bands.iter().zip(&ln_s))
    {
        let lambda = limit_effective_wavelength_um(band, t_ref)?;
        // y = ln S - ln L(T_ref) = (c2/(lambda T_ref)) d ln T + sum a_j lambda^j, to first order
        *y = ln - libm::log(band.radiance(t_ref)?);
        row[0] = C2_UMK / (lambda * t_ref);
        let mut power = 1.0;
        for entry in row.iter_mut().skip(1).take(terms) {
            *entry = power;
            power *= lambda;
        }
    }
    let system = normal_system(jacobian.iter().zip(rhs.iter().copied()).take(count), n);
    let start = solve(system).ok_or(Error::MultiwavelengthIllConditioned)?;
    // A Wien start may overshoot; limit it to a factor of 2 in T.
    let mut ln_t = libm::log(t_ref) + start[0].clamp(-0.7, 0.7);
    let mut a = [0.0; MAX_TERMS];
    for (slot, value) in a.iter_mut().zip(start.iter().skip(1)).take(terms) {
        *slot = *value;
    }
    let mut next = [0.0; MAX_BANDS];
    let mut iterations = 0;
    loop {
        iterations += 1;
        let t = libm::exp(ln_t);
        let mut residuals = [0.0; MAX_BANDS];
        for k in 0..count {
            let (Some(band), Some(row), Some(r), Some(v), Some(&ln)) = (
                bands.get(k),
                jacobian.get_mut(k),
                residuals.get_mut(k),
                next.get_mut(k),
                ln_s.get(k),
            ) else {
                return Err(Error::BandCountMismatch);
            };
            let (ln_m, j_row, omitted) = evaluate(band, t, &a, terms)?;
            *row = j_row;
            *r = ln - ln_m;
            *v = omitted;
        }
        let system = normal_system(
            jacobian.iter().zip(residuals.iter().copied()).take(count),
            n,
        );
        let step = solve(system).ok_or(Error::MultiwavelengthIllConditioned)?;
        // Damp steps that would move T by more than 20 % (far from the solution only).
        let damping = if step[0].abs() > 0.2 {
            0.2 / step[0].abs()
        } else {
            1.0
        };
        ln_t += damping * step[0];
        let mut largest = (damping * step[0]).abs();
        for (slot, s) in a.iter_mut().zip(step.iter().skip(1)).take(terms) {
            *slot += damping * s;
            largest = largest.max((damping * s).abs());
        }
        finite(ln_t)?;
        if largest < 1e-12 {
            let t = libm::exp(ln_t);
            let (gain, bias) = gain_and_projection(&jacobian, count, n, &next)?;
            #[allow(clippy::cast_precision_loss)]
            let rms =
                libm::sqrt(residuals.iter().take(count).map(|r| r * r).sum::<f64>() / count as f64);
            return Ok(MultiwavelengthFit {
                temperature_k: finite(t)?,
                coefficients: a,
                model,
                noise_gain: gain,
                bias_per_next_term: bias,
                residual_rms: rms,
                iterations,
            });
        }
        if iterations >= MAX_ITERATIONS {
            return Err(Error::MultiwavelengthNotConverged);
        }
    }
}
