//! Least-squares fits of the Sakuma-Hattori curves to a band and to blackbody readings.
//!
//! Both fits run one Levenberg-Marquardt core in the parameters p = (A, B, ln C)
//! (ln C makes the fit blind to the scale of the signal units). Each iteration streams
//! over the caller's points, accumulating J^T J (3x3), J^T r and chi^2 on the stack, so
//! nothing is stored per point and there is no limit on the number of points.
//!
//! Step: (J^T J + lambda diag(J^T J)) delta = -J^T r (Marquardt's scaling, solved by
//! Cholesky in the diagonally scaled system); lambda falls tenfold on an accepted step
//! and rises tenfold on a rejected one. Stops when chi^2 reaches rounding level, when a
//! step changes A by less than 1e-12 A, B by less than 1e-12 A T_max and ln C by less
//! than 1e-12, or when both the actual and the predicted reduction of chi^2 are below
//! 1e-12 chi^2.

use super::sealed::Model;
use super::{moment_estimate, spectral_moments, CurveForm, SakumaHattori};
use crate::band::{Band, SignalCurve};
use crate::error::{check_temperature_k, finite, Error, Result};

/// Cap on Levenberg-Marquardt iterations (accepted plus rejected steps); reaching it is
/// [`Error::CalibrationNotConverged`].
pub const MAX_FIT_ITERATIONS: u32 = 500;
/// The most points [`fit_points`] accepts. The pairwise duplicate check is O(n^2), so this
/// bounds a fit's time on any input (a calibration has tens of points; 256 points take
/// about 20 ms in all on a desktop core).
pub const MAX_FIT_POINTS: usize = 256;
/// Temperatures (uniform over the range, ends included) at which [`fit_band`] fits the
/// exact band radiance.
pub const BAND_FIT_POINTS: usize = 64;
/// Temperatures (uniform over the range, ends included) at which [`fit_band`] measures
/// the maximum error of the fitted curve against the exact band radiance.
pub const BAND_CHECK_POINTS: usize = 2001;

const STEP_TOLERANCE: f64 = 1e-12;
const REDUCTION_TOLERANCE: f64 = 1e-12;
/// Residuals below this fraction of the data's scale are rounding noise.
const FLOOR_FRACTION: f64 = 1e-12;
const LAMBDA_START: f64 = 1e-3;
const LAMBDA_MIN: f64 = 1e-12;
const LAMBDA_MAX: f64 = 1e16;
/// Smallest Cholesky pivot (of the matrix scaled to unit diagonal) taken as non-singular.
const PIVOT_MIN: f64 = 1e-15;

/// A curve fitted to a band's exact radiance over a temperature range.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct BandFit<P = SakumaHattori> {
    /// The fitted curve; its C is in band-radiance units (W m^-2 sr^-1 for an energy band,
    /// photons s^-1 m^-2 sr^-1 for a photon band).
    pub params: P,
    /// max |T_fit(L_band(T)) - T| over [`BAND_CHECK_POINTS`] temperatures spread uniformly
    /// over the range, ends included, K. Measured against the exact band integral, not
    /// estimated.
    pub max_error_k: f64,
}

/// A curve fitted to blackbody readings.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PointsFit<P = SakumaHattori> {
    /// The fitted curve (of the signal with any dark offset removed).
    pub params: P,
    /// Covariance of (A um, B um K, C signal units), row and column order A, B, C.
    ///
    /// With signal uncertainties u_i: (J^T J)^-1 of the weighted signal residuals, the
    /// uncertainties taken as absolute standard deviations. Without: s^2 (J^T J)^-1 of the
    /// temperature residuals, s^2 = sum r_i^2 / (n - 3) estimated from the scatter; with
    /// exactly three points there is no scatter to estimate it from and every entry is
    /// NaN. First order (linearised at the solution).
    pub covariance: [[f64; 3]; 3],
    /// max |T_fit(S_i) - T_i| over the points, K.
    pub max_residual_k: f64,
    /// sqrt(mean (T_fit(S_i) - T_i)^2) over the points, K.
    pub rms_residual_k: f64,
    /// Levenberg-Marquardt iterations used (accepted and rejected steps).
    pub iterations: u32,
}

/// Fits the Sakuma-Hattori curve (Planck form) to n >= 3 blackbody readings
/// (`temperatures_k[i]`, `signals[i]`), optionally with the standard uncertainty of each
/// signal.
///
/// Minimises, by Levenberg-Marquardt over (A, B, ln C):
/// - without uncertainties, sum (T_fit(S_i) - T_i)^2: least squares in temperature,
///   every point weighted alike, T_fit the closed-form inverse;
/// - with uncertainties u_i (signal units), sum ((S_fit(T_i) - S_i) / u_i)^2: the
///   maximum-likelihood fit for independent Gaussian signal noise.
///
/// Starting values: B = 0, and A and ln C from a least-squares fit of ln S_i against the
/// curve's shape, A scanned over 0.05-200 um and refined by golden section. Points may
/// come in any order. Checks every pair of points (O(n^2); calibrations have tens of
/// points, and at most [`MAX_FIT_POINTS`] are accepted). Same as [`fit_points_with`] with the Planck form and no offset.
///
/// Accuracy: exact data from a Sakuma-Hattori curve are recovered to below 1 uK
/// (`tests/calibration_points.rs`, invented instruments).
///
/// # Errors
/// [`Error::CalibrationLengthMismatch`] when the arrays differ in length,
/// [`Error::CalibrationTooFewPoints`] for n < 3, [`Error::CalibrationTooManyPoints`] for
/// n > [`MAX_FIT_POINTS`], [`Error::NonFinite`],
/// [`Error::TemperatureNotPositive`], [`Error::CalibrationUncertaintyInvalid`] for an
/// uncertainty that is not positive, [`Error::SignalAtOrBelowOffset`] for a signal <= 0,
/// [`Error::CalibrationDuplicateTemperature`], [`Error::CalibrationSignalNotIncreasing`],
/// [`Error::CalibrationNotConverged`] when the data do not follow the curve's form (a
/// signal linear in T, say), [`Error::CalibrationIllConditioned`] when the covariance
/// cannot be formed or overflows (C near the top of the double range).
pub fn fit_points(
    temperatures_k: &[f64],
    signals: &[f64],
    signal_uncertainties: Option<&[f64]>,
) -> Result<PointsFit> {
    fit_points_with(temperatures_k, signals, signal_uncertainties, 0.0)
}

/// As [`fit_points`], for either curve form `F` ([`SakumaHattori`] or
/// [`super::SakumaHattoriWien`]) and a detector with a known dark offset: the curve is
/// fitted to S_i - `dark_offset` (the blackbody part of the signal), and
/// [`super::OffsetCurve`] puts the offset back when converting readings.
///
/// ```
/// use bandtemp::calibration::{fit_points_with, OffsetCurve, SakumaHattoriWien};
/// use bandtemp::band::SignalCurve;
///
/// // Invented readings of an invented 0.9 um pyrometer with a 250-count dark offset.
/// let t_k = [873.15, 1073.15, 1273.15, 1473.15];
/// let curve = OffsetCurve::new(SakumaHattoriWien::new(0.905, 1.5, 2.0e9)?, 250.0)?;
/// let mut counts = [0.0; 4];
/// for (s, &t) in counts.iter_mut().zip(&t_k) {
///     *s = curve.signal(t)?;
/// }
/// let fit = fit_points_with::<SakumaHattoriWien>(&t_k, &counts, None, 250.0)?;
/// assert!(fit.max_residual_k < 1e-6);
/// assert!((fit.params.a_um() - 0.905).abs() < 1e-6);
/// # Ok::<(), bandtemp::Error>(())
/// ```
///
/// # Errors
/// As [`fit_points`]; [`Error::NonFinite`] for a non-finite offset and
/// [`Error::SignalAtOrBelowOffset`] for a signal at or below it.
pub fn fit_points_with<F: CurveForm>(
    temperatures_k: &[f64],
    signals: &[f64],
    signal_uncertainties: Option<&[f64]>,
    dark_offset: f64,
) -> Result<PointsFit<F>> {
    let data = Data::new(temperatures_k, signals, signal_uncertainties, dark_offset)?;
    let start = start_from_shape::<F>(&data)?;
    let solution = levenberg_marquardt::<F>(&data, start)?;
    let count = temperatures_k.len();
    let scale = match data.uncertainties {
        Some(_) => 1.0,
        // NaN on purpose when n = 3: no degrees of freedom to estimate the scatter.
        #[allow(clippy::cast_precision_loss)]
        None if count > 3 => solution.normal.chi2 / (count - 3) as f64,
        None => f64::NAN,
    };
    let covariance_p = invert(&solution.normal.jtj).ok_or(Error::CalibrationIllConditioned)?;
    let c = libm::exp(solution.parameters[2]);
    let mut covariance = [[0.0; 3]; 3];
    for (i, row) in covariance.iter_mut().enumerate() {
        for (j, entry) in row.iter_mut().enumerate() {
            let to_c = |k: usize| if k == 2 { c } else { 1.0 };
            *entry = scale * covariance_p[i][j] * to_c(i) * to_c(j);
        }
    }
    // With C near the top of the double range, C^2 Var(ln C) overflows: a covariance
    // that cannot be represented (NaN stays, documented for n = 3).
    if covariance.iter().flatten().any(|x| x.is_infinite()) {
        return Err(Error::CalibrationIllConditioned);
    }
    let (max_residual_k, rms_residual_k) = data.temperature_residuals(&solution.model)?;
    Ok(PointsFit {
        params: solution.model,
        covariance,
        max_residual_k,
        rms_residual_k,
        iterations: solution.iterations,
    })
}

/// Fits the Sakuma-Hattori curve (Planck form) to a band's exact radiance over
/// [`t_lo_k`, `t_hi_k`], and measures how well it does.
///
/// Method: start from the band's spectral moments ([`super::spectral_moments`],
/// [`super::moment_estimate`]: A = lambda0 (1 - 6 sigma^2/lambda0^2),
/// B = c2 sigma^2/(2 lambda0^2), Saunders and White 2003), C by least squares in
/// ln L at those A and B; then least squares in temperature,
/// sum (T_fit(L_band(T_i)) - T_i)^2 over [`BAND_FIT_POINTS`] temperatures spread
/// uniformly over the range, by Levenberg-Marquardt. The maximum error is then measured
/// on a denser grid of [`BAND_CHECK_POINTS`] temperatures against the exact band
/// integral ([`Band::radiance`]). If the moment start does not converge (a very wide
/// band), the fit restarts from the shape scan of [`fit_points`].
///
/// Works for rectangular and tabulated bands, energy and photon detectors. C comes out
/// in band-radiance units; scale it ([`SakumaHattori::scaled`]) by the instrument's
/// responsivity to get a curve in its signal units.
///
/// Measured max_error_k (`tests/calibration_band.rs`, agreeing within 10 % with a scipy
/// least-squares fit to mpmath band radiance): rectangular 0.645-0.655 um, 700-1400 K,
/// 14 uK; 0.64-0.66 um photon, 0.23 mK; 8-14 um, 250-500 K, 2.6 mK (energy) and 12 mK
/// (photon); 8-14 um energy, 233-773 K, 38 mK.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::CalibrationRangeInvalid`] unless
/// 0 < `t_lo_k` < `t_hi_k`; band-radiance errors ([`Error::RadianceUnderflow`] for a
/// range too cold for the band); [`Error::CalibrationNotConverged`],
/// [`Error::CalibrationOutOfDomain`] if the fitted curve cannot invert a band radiance in
/// the range.
pub fn fit_band(band: &Band<'_>, t_lo_k: f64, t_hi_k: f64) -> Result<BandFit> {
    fit_band_with(band, t_lo_k, t_hi_k)
}

/// As [`fit_band`], for either curve form `F` ([`SakumaHattori`] or
/// [`super::SakumaHattoriWien`]).
///
/// # Errors
/// As [`fit_band`].
pub fn fit_band_with<F: CurveForm>(
    band: &Band<'_>,
    t_lo_k: f64,
    t_hi_k: f64,
) -> Result<BandFit<F>> {
    finite(t_lo_k)?;
    finite(t_hi_k)?;
    if !(t_lo_k > 0.0 && t_lo_k < t_hi_k) {
        return Err(Error::CalibrationRangeInvalid);
    }
    let mut temperatures_k = [0.0; BAND_FIT_POINTS];
    let mut radiances = [0.0; BAND_FIT_POINTS];
    for (i, (t, l)) in temperatures_k.iter_mut().zip(&mut radiances).enumerate() {
        *t = grid(t_lo_k, t_hi_k, i, BAND_FIT_POINTS);
        *l = band.radiance(*t)?;
    }
    let data = Data::new(&temperatures_k, &radiances, None, 0.0)?;
    let estimate = moment_estimate(spectral_moments(band)?, band.detector());
    let ln_c = data.best_ln_c::<F>(estimate.a_um, estimate.b_umk);
    let solution = match levenberg_marquardt::<F>(&data, [estimate.a_um, estimate.b_umk, ln_c]) {
        Ok(solution) => solution,
        Err(_) => levenberg_marquardt::<F>(&data, start_from_shape::<F>(&data)?)?,
    };
    let mut max_error_k: f64 = 0.0;
    for i in 0..BAND_CHECK_POINTS {
        let t = grid(t_lo_k, t_hi_k, i, BAND_CHECK_POINTS);
        let error = solution.model.temperature(band.radiance(t)?)? - t;
        max_error_k = max_error_k.max(libm::fabs(error));
    }
    Ok(BandFit {
        params: solution.model,
        max_error_k,
    })
}

/// Temperature residuals of a Sakuma-Hattori curve at calibration points:
/// `out_k[i]` = T_fit(`signals[i]`) - `temperatures_k[i]`, K (positive where the curve
/// reads warm). Same as [`curve_residuals_k`].
///
/// # Errors
/// As [`curve_residuals_k`].
pub fn residuals_k(
    params: &SakumaHattori,
    temperatures_k: &[f64],
    signals: &[f64],
    out_k: &mut [f64],
) -> Result<()> {
    curve_residuals_k(params, temperatures_k, signals, out_k)
}

/// Temperature residuals of any signal curve (a calibration, an [`super::OffsetCurve`],
/// a band): `out_k[i]` = T_curve(`signals[i]`) - `temperatures_k[i]`, K. `out_k` is
/// written only when every residual could be computed.
///
/// # Errors
/// [`Error::CalibrationLengthMismatch`] unless all three slices have one length;
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], and the curve's inverse's
/// errors.
pub fn curve_residuals_k<C: SignalCurve>(
    curve: &C,
    temperatures_k: &[f64],
    signals: &[f64],
    out_k: &mut [f64],
) -> Result<()> {
    if temperatures_k.len() != signals.len() || out_k.len() != signals.len() {
        return Err(Error::CalibrationLengthMismatch);
    }
    for (&t, &s) in temperatures_k.iter().zip(signals) {
        check_temperature_k(t)?;
        curve.temperature(s)?;
    }
    for ((out, &t), &s) in out_k.iter_mut().zip(temperatures_k).zip(signals) {
        *out = curve.temperature(s)? - t;
    }
    Ok(())
}

/// The i-th of `count` temperatures spread uniformly over [lo, hi], ends exact.
fn grid(lo: f64, hi: f64, i: usize, count: usize) -> f64 {
    if i + 1 >= count {
        return hi;
    }
    #[allow(clippy::cast_precision_loss)]
    let fraction = i as f64 / (count - 1) as f64;
    lo + (hi - lo) * fraction
}

/// Validated calibration points.
struct Data<'a> {
    temperatures_k: &'a [f64],
    signals: &'a [f64],
    uncertainties: Option<&'a [f64]>,
    offset: f64,
    /// Largest temperature, K (scale of B and of temperature residuals).
    t_max_k: f64,
    /// chi^2 at which the residuals are rounding noise.
    chi2_floor: f64,
}

/// The normal equations of one iteration: J^T J, J^T r and chi^2 = r^T r.
struct Normal {
    jtj: [[f64; 3]; 3],
    jtr: [f64; 3],
    chi2: f64,
}

impl Normal {
    fn add(&mut self, residual: f64, row: [f64; 3]) {
        for (i, &ri) in row.iter().enumerate() {
            for (j, &rj) in row.iter().enumerate() {
                self.jtj[i][j] += ri * rj;
            }
            self.jtr[i] += ri * residual;
        }
        self.chi2 += residual * residual;
    }
}

impl<'a> Data<'a> {
    fn new(
        temperatures_k: &'a [f64],
        signals: &'a [f64],
        uncertainties: Option<&'a [f64]>,
        offset: f64,
    ) -> Result<Self> {
        let count = temperatures_k.len();
        if signals.len() != count || uncertainties.is_some_and(|u| u.len() != count) {
            return Err(Error::CalibrationLengthMismatch);
        }
        if count < 3 {
            return Err(Error::CalibrationTooFewPoints);
        }
        if count > MAX_FIT_POINTS {
            return Err(Error::CalibrationTooManyPoints);
        }
        finite(offset)?;
        let mut t_max_k: f64 = 0.0;
        let mut ratio_max: f64 = 0.0;
        for (i, (&t, &s)) in temperatures_k.iter().zip(signals).enumerate() {
            t_max_k = t_max_k.max(check_temperature_k(t)?);
            if !(finite(s)? - offset > 0.0) {
                return Err(Error::SignalAtOrBelowOffset);
            }
            if let Some(u) = uncertainties.and_then(|u| u.get(i)) {
                if !(finite(*u)? > 0.0) {
                    return Err(Error::CalibrationUncertaintyInvalid);
                }
                ratio_max = ratio_max.max(libm::fabs(s) / u);
            }
        }
        for (i, &ti) in temperatures_k.iter().enumerate() {
            if temperatures_k.iter().skip(i + 1).any(|&tj| tj == ti) {
                return Err(Error::CalibrationDuplicateTemperature);
            }
        }
        for (i, (&ti, &si)) in temperatures_k.iter().zip(signals).enumerate() {
            let pairs = temperatures_k.iter().zip(signals).skip(i + 1);
            for (&tj, &sj) in pairs {
                if !((tj - ti) * (sj - si) > 0.0) {
                    return Err(Error::CalibrationSignalNotIncreasing);
                }
            }
        }
        let scale = if uncertainties.is_some() {
            ratio_max
        } else {
            t_max_k
        };
        #[allow(clippy::cast_precision_loss)]
        let chi2_floor = count as f64 * (FLOOR_FRACTION * scale) * (FLOOR_FRACTION * scale);
        Ok(Data {
            temperatures_k,
            signals,
            uncertainties,
            offset,
            t_max_k,
            chi2_floor,
        })
    }

    /// J^T J, J^T r and chi^2 of the model at these points.
    fn normal<M: Model>(&self, model: &M) -> Result<Normal> {
        let mut normal = Normal {
            jtj: [[0.0; 3]; 3],
            jtr: [0.0; 3],
            chi2: 0.0,
        };
        let points = self.temperatures_k.iter().zip(self.signals);
        match self.uncertainties {
            None => {
                for (&t, &s) in points {
                    let (t_fit, gradient) = model.temperature_gradient(s - self.offset)?;
                    normal.add(t_fit - t, gradient);
                }
            }
            Some(uncertainties) => {
                for ((&t, &s), &u) in points.zip(uncertainties) {
                    let (s_fit, gradient) = model.signal_gradient(t)?;
                    normal.add((s_fit + self.offset - s) / u, gradient.map(|g| g / u));
                }
            }
        }
        finite(normal.chi2)?;
        Ok(normal)
    }

    /// ln C that best fits ln(S_i - offset) for given A and B (least squares in ln S), and
    /// the sum of squared log residuals.
    fn ln_c_and_cost<M: Model>(&self, a_um: f64, b_umk: f64) -> (f64, f64) {
        let mut sum = 0.0;
        let mut sum_squares = 0.0;
        for (&t, &s) in self.temperatures_k.iter().zip(self.signals) {
            let d = libm::log(s - self.offset) - M::ln_shape(a_um, b_umk, t);
            sum += d;
            sum_squares += d * d;
        }
        #[allow(clippy::cast_precision_loss)]
        let count = self.temperatures_k.len() as f64;
        let mean = sum / count;
        (mean, sum_squares - sum * mean)
    }

    fn best_ln_c<M: Model>(&self, a_um: f64, b_umk: f64) -> f64 {
        self.ln_c_and_cost::<M>(a_um, b_umk).0
    }

    /// Largest and root-mean-square temperature residual of a model, K.
    fn temperature_residuals<M: Model>(&self, model: &M) -> Result<(f64, f64)> {
        let mut max_k: f64 = 0.0;
        let mut sum_squares = 0.0;
        for (&t, &s) in self.temperatures_k.iter().zip(self.signals) {
            let residual = model.temperature(s - self.offset)? - t;
            max_k = max_k.max(libm::fabs(residual));
            sum_squares += residual * residual;
        }
        #[allow(clippy::cast_precision_loss)]
        let count = self.temperatures_k.len() as f64;
        Ok((max_k, libm::sqrt(sum_squares / count)))
    }
}

/// Starting values (A, 0, ln C) from the shape scan: A over 0.05-200 um on a log grid,
/// then golden section on ln A around the best grid point.
fn start_from_shape<M: Model>(data: &Data<'_>) -> Result<[f64; 3]> {
    const GRID: usize = 90;
    const LN_A_MIN: f64 = -2.995_732_273_553_991; // ln 0.05
    const LN_A_MAX: f64 = 5.298_317_366_548_036; // ln 200
    let cost = |ln_a: f64| {
        let c = data.ln_c_and_cost::<M>(libm::exp(ln_a), 0.0).1;
        if c.is_finite() {
            c
        } else {
            f64::INFINITY
        }
    };
    let step = (LN_A_MAX - LN_A_MIN) / 89.0;
    let mut best = (f64::INFINITY, LN_A_MIN);
    for i in 0..GRID {
        #[allow(clippy::cast_precision_loss)]
        let ln_a = LN_A_MIN + step * i as f64;
        let c = cost(ln_a);
        if c < best.0 {
            best = (c, ln_a);
        }
    }
    if !best.0.is_finite() {
        return Err(Error::CalibrationNotConverged);
    }
    // Golden section on [best - step, best + step].
    let ratio = 0.618_033_988_749_894_8;
    let (mut lo, mut hi) = (best.1 - step, best.1 + step);
    let mut x1 = hi - ratio * (hi - lo);
    let mut x2 = lo + ratio * (hi - lo);
    let (mut f1, mut f2) = (cost(x1), cost(x2));
    for _ in 0..60 {
        if f1 <= f2 {
            hi = x2;
            x2 = x1;
            f2 = f1;
            x1 = hi - ratio * (hi - lo);
            f1 = cost(x1);
        } else {
            lo = x1;
            x1 = x2;
            f1 = f2;
            x2 = lo + ratio * (hi - lo);
            f2 = cost(x2);
        }
    }
    let ln_a = if f1 <= f2 { x1 } else { x2 };
    let a_um = libm::exp(ln_a);
    let ln_c = data.best_ln_c::<M>(a_um, 0.0);
    if !(ln_c.is_finite() && a_um.is_finite()) {
        return Err(Error::CalibrationNotConverged);
    }
    Ok([a_um, 0.0, ln_c])
}

/// A converged fit.
struct Solution<M> {
    model: M,
    parameters: [f64; 3],
    normal: Normal,
    iterations: u32,
}

/// The Levenberg-Marquardt core (see the module docs).
fn levenberg_marquardt<M: Model>(data: &Data<'_>, start: [f64; 3]) -> Result<Solution<M>> {
    let evaluate = |p: [f64; 3]| -> Result<(M, Normal)> {
        let model = M::from_fit(p)?;
        let normal = data.normal(&model)?;
        Ok((model, normal))
    };
    let (mut model, mut current) = evaluate(start).map_err(|_| Error::CalibrationNotConverged)?;
    let mut p = start;
    let mut lambda = LAMBDA_START;
    let mut iterations = 0;
    let done = |model, p, normal, iterations| {
        Ok(Solution {
            model,
            parameters: p,
            normal,
            iterations,
        })
    };
    while iterations < MAX_FIT_ITERATIONS {
        if current.chi2 <= data.chi2_floor {
            return done(model, p, current, iterations);
        }
        iterations += 1;
        let trial = damped_step(&current, lambda).and_then(|delta| {
            let trial_p = [p[0] + delta[0], p[1] + delta[1], p[2] + delta[2]];
            evaluate(trial_p).ok().map(|(m, n)| (delta, trial_p, m, n))
        });
        match trial {
            Some((delta, trial_p, trial_model, trial_normal))
                if trial_normal.chi2 <= current.chi2 =>
            {
                let predicted = predicted_reduction(&current, &delta);
                let actual = current.chi2 - trial_normal.chi2;
                let small_gain = actual <= REDUCTION_TOLERANCE * current.chi2
                    && predicted <= REDUCTION_TOLERANCE * current.chi2;
                let small_step = libm::fabs(delta[0]) <= STEP_TOLERANCE * p[0]
                    && libm::fabs(delta[1]) <= STEP_TOLERANCE * p[0] * data.t_max_k
                    && libm::fabs(delta[2]) <= STEP_TOLERANCE;
                p = trial_p;
                model = trial_model;
                current = trial_normal;
                lambda = (lambda * 0.1).max(LAMBDA_MIN);
                if small_gain || small_step {
                    return done(model, p, current, iterations);
                }
            }
            _ => {
                lambda *= 10.0;
                if lambda > LAMBDA_MAX {
                    // No step reduces chi^2 even at gradient-descent scale: stationary
                    // if the gradient is at rounding level, else the fit is stuck.
                    return if stationary(&current) {
                        done(model, p, current, iterations)
                    } else {
                        Err(Error::CalibrationNotConverged)
                    };
                }
            }
        }
    }
    Err(Error::CalibrationNotConverged)
}

/// chi^2 - |r + J delta|^2 = -(2 delta^T J^T r + delta^T J^T J delta).
fn predicted_reduction(normal: &Normal, delta: &[f64; 3]) -> f64 {
    let mut quadratic = 0.0;
    let mut linear = 0.0;
    for i in 0..3 {
        linear += delta[i] * normal.jtr[i];
        for j in 0..3 {
            quadratic += delta[i] * normal.jtj[i][j] * delta[j];
        }
    }
    -(2.0 * linear + quadratic)
}

/// Every column of J is orthogonal to r to within 1e-6 (cosine of the angle).
fn stationary(normal: &Normal) -> bool {
    (0..3).all(|k| {
        let norm = libm::sqrt(normal.jtj[k][k] * normal.chi2);
        libm::fabs(normal.jtr[k]) <= 1e-6 * norm
    })
}

/// sqrt(diag(J^T J)), if every parameter moves the residuals.
fn diagonal_scale(jtj: &[[f64; 3]; 3]) -> Option<[f64; 3]> {
    let d = [
        libm::sqrt(jtj[0][0]),
        libm::sqrt(jtj[1][1]),
        libm::sqrt(jtj[2][2]),
    ];
    if d.iter().all(|&x| x > 0.0 && x.is_finite()) {
        Some(d)
    } else {
        None
    }
}

/// The Levenberg-Marquardt step: (J^T J + lambda diag(J^T J)) delta = -J^T r.
fn damped_step(normal: &Normal, lambda: f64) -> Option<[f64; 3]> {
    let d = diagonal_scale(&normal.jtj)?;
    let mut a = [[0.0; 3]; 3];
    for i in 0..3 {
        for j in 0..3 {
            a[i][j] = normal.jtj[i][j] / (d[i] * d[j]);
        }
        a[i][i] = 1.0 + lambda;
    }
    let b = [
        -normal.jtr[0] / d[0],
        -normal.jtr[1] / d[1],
        -normal.jtr[2] / d[2],
    ];
    let factor = cholesky(&a)?;
    let z = cholesky_solve(&factor, b);
    let delta = [z[0] / d[0], z[1] / d[1], z[2] / d[2]];
    delta.iter().all(|x| x.is_finite()).then_some(delta)
}

/// (J^T J)^-1 by Cholesky in the diagonally scaled system.
fn invert(jtj: &[[f64; 3]; 3]) -> Option<[[f64; 3]; 3]> {
    let d = diagonal_scale(jtj)?;
    let mut a = [[0.0; 3]; 3];
    for i in 0..3 {
        for j in 0..3 {
            a[i][j] = jtj[i][j] / (d[i] * d[j]);
        }
    }
    let factor = cholesky(&a)?;
    let mut inverse = [[0.0; 3]; 3];
    for j in 0..3 {
        let mut unit = [0.0; 3];
        unit[j] = 1.0;
        let column = cholesky_solve(&factor, unit);
        for i in 0..3 {
            inverse[i][j] = column[i] / (d[i] * d[j]);
        }
    }
    inverse
        .iter()
        .flatten()
        .all(|x| x.is_finite())
        .then_some(inverse)
}

/// Lower Cholesky factor of a symmetric 3x3 matrix with a unit-scale diagonal, if it is
/// positive definite with every pivot above [`PIVOT_MIN`].
// Index loops read as the textbook algorithm; all bounds are the constant 3.
#[allow(clippy::needless_range_loop)]
fn cholesky(a: &[[f64; 3]; 3]) -> Option<[[f64; 3]; 3]> {
    let mut l = [[0.0; 3]; 3];
    for i in 0..3 {
        for j in 0..=i {
            let mut sum = a[i][j];
            for k in 0..j {
                sum -= l[i][k] * l[j][k];
            }
            if i == j {
                if !(sum > PIVOT_MIN) {
                    return None;
                }
                l[i][i] = libm::sqrt(sum);
            } else {
                l[i][j] = sum / l[j][j];
            }
        }
    }
    Some(l)
}

/// Solves L L^T x = b.
fn cholesky_solve(l: &[[f64; 3]; 3], b: [f64; 3]) -> [f64; 3] {
    let mut y = [0.0; 3];
    for i in 0..3 {
        let mut sum = b[i];
        for k in 0..i {
            sum -= l[i][k] * y[k];
        }
        y[i] = sum / l[i][i];
    }
    let mut x = [0.0; 3];
    for i in (0..3).rev() {
        let mut sum = y[i];
        for k in i + 1..3 {
            sum -= l[k][i] * x[k];
        }
        x[i] = sum / l[i][i];
    }
    x
}
