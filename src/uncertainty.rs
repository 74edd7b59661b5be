//! Measurement uncertainty: the GUM law of propagation (JCGM 100:2008), Monte Carlo
//! propagation of distributions (JCGM 101:2008), and the budget of a surface temperature
//! measured through the grey measurement equation ([`crate::scene`]).
//!
//! # Law of propagation (JCGM 100:2008, 5.1.2 and 5.2.2)
//!
//! For a measurand y = f(x_1, ..., x_n) linearised at the estimates, each input has a
//! standard uncertainty u(x_i) (its own unit) and a sensitivity coefficient
//! c_i = df/dx_i (output unit per input unit). The combined standard uncertainty is
//!
//! ```text
//! u_c^2(y) = sum_i sum_j c_i c_j u(x_i) u(x_j) r_ij        (r_ii = 1, r_ij = r_ji in [-1, 1])
//! ```
//!
//! which reduces to sum_i (c_i u(x_i))^2 without correlations. The expanded uncertainty
//! is U = k u_c for a coverage factor k (k = 2 gives about 95 % for a normal output,
//! JCGM 100:2008 6.3.3). The budget lists each input's contribution u_i(y) = |c_i| u(x_i)
//! (output unit), ranked from largest to smallest, and its share of the combined variance
//! c_i u(x_i) sum_j r_ij c_j u(x_j) / u_c^2 (the shares sum to 1; with negative
//! correlations a share can be negative).
//!
//! # Monte Carlo (JCGM 101:2008)
//!
//! Inputs are drawn from their distributions with a seeded, reproducible generator
//! ([`Xoshiro256StarStar`], seeded through [`SplitMix64`]); normal deviates come from the
//! Box-Muller transform, rectangular ones from a scaled uniform. The model is evaluated per
//! draw; mean and standard deviation accumulate in one pass (Welford's update,
//! [`RunningStats`]), and the coverage interval is read from the sorted values in a
//! caller-provided buffer (JCGM 101:2008 7.7). No heap: the buffer's length is the number
//! of trials M. JCGM 101:2008 7.2.2 recommends M of at least 10^4 / (1 - p) for a
//! coverage probability p (2 * 10^5 for p = 0.95); clause 8 compares the Monte Carlo
//! interval with the law-of-propagation one ([`validate_lpu`]).
//!
//! # Surface temperature
//!
//! [`surface_budget`] and [`surface_monte_carlo`] propagate the uncertainties of the
//! signal, the calibration, the emissivity, the reflected temperature, the atmosphere and
//! the window through [`Scene::object_temperature`]. All temperatures in K; the signal in
//! the curve's units.

use crate::band::SignalCurve;
use crate::error::{finite, Error, Result};
use crate::scene::Scene;

/// Most inputs an uncertainty [`Budget`] holds (fixed capacity, no heap).
pub const MAX_INPUTS: usize = 16;

/// Coverage factor k = 2, which gives a coverage probability of about 95 % when the
/// output is close to normal (JCGM 100:2008 6.3.3).
pub const COVERAGE_FACTOR_95: f64 = 2.0;

/// One input quantity of an uncertainty budget.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Input {
    /// A short label for reports ("emissivity").
    pub name: &'static str,
    /// Standard uncertainty u(x_i), in the input's own unit; >= 0.
    pub standard_uncertainty: f64,
    /// Sensitivity coefficient c_i = dy/dx_i, output unit per input unit (K per unit for
    /// a temperature).
    pub sensitivity: f64,
}

impl Input {
    /// An input with `name`, standard uncertainty u (input unit, >= 0) and sensitivity
    /// coefficient c (output unit per input unit). Validated by [`combine`].
    #[must_use]
    pub const fn new(name: &'static str, standard_uncertainty: f64, sensitivity: f64) -> Self {
        Input {
            name,
            standard_uncertainty,
            sensitivity,
        }
    }
}

/// One line of a [`Budget`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Contribution {
    /// Position of the input in the slice given to [`combine`].
    pub index: usize,
    /// The input's label.
    pub name: &'static str,
    /// Standard uncertainty u(x_i), input unit.
    pub standard_uncertainty: f64,
    /// Sensitivity coefficient c_i, output unit per input unit.
    pub sensitivity: f64,
    /// Contribution u_i(y) = |c_i| u(x_i), output unit (K for a temperature).
    pub contribution: f64,
    /// Share of the combined variance, c_i u_i sum_j r_ij c_j u_j / u_c^2
    /// (dimensionless; 0 when u_c = 0).
    pub variance_share: f64,
}

impl Contribution {
    /// An unused slot of a budget (zeros and an empty name).
    pub const EMPTY: Contribution = Contribution {
        index: 0,
        name: "",
        standard_uncertainty: 0.0,
        sensitivity: 0.0,
        contribution: 0.0,
        variance_share: 0.0,
    };
}

/// An uncertainty budget: estimate, combined standard uncertainty and the ranked
/// contributions. Plain data with a fixed capacity of [`MAX_INPUTS`] lines.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Budget {
    /// The estimate y of the measurand (output unit, K for a temperature).
    pub estimate: f64,
    /// Combined standard uncertainty u_c(y), output unit.
    pub combined_standard_uncertainty: f64,
    /// Number of lines in use in `ranked`.
    pub len: usize,
    /// Lines ranked by `contribution`, largest first (ties keep input order); slots from
    /// `len` on are [`Contribution::EMPTY`].
    pub ranked: [Contribution; MAX_INPUTS],
}

impl Budget {
    /// The lines in use, ranked largest contribution first.
    #[must_use]
    pub fn entries(&self) -> &[Contribution] {
        self.ranked.get(..self.len).unwrap_or(&[])
    }

    /// Expanded uncertainty U = k u_c, output unit.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::CoverageFactorNotPositive`] unless k > 0.
    pub fn expanded_uncertainty(&self, coverage_factor: f64) -> Result<f64> {
        if !(finite(coverage_factor)? > 0.0) {
            return Err(Error::CoverageFactorNotPositive);
        }
        finite(coverage_factor * self.combined_standard_uncertainty)
    }
}

/// Combines inputs by the law of propagation (JCGM 100:2008 eq. 13):
/// u_c^2 = sum_ij c_i c_j u_i u_j r_ij, and ranks their contributions.
///
/// `estimate` is the output estimate y (carried into the budget). `correlations`, if
/// given, is the n x n correlation matrix r_ij, row-major; `None` means uncorrelated
/// inputs (JCGM 100:2008 eq. 10). Exact up to rounding (sums of at most 256 products).
///
/// # Errors
/// [`Error::NoInputs`], [`Error::TooManyInputs`] above [`MAX_INPUTS`],
/// [`Error::NonFinite`] for any NaN or infinity (also if u_c overflows),
/// [`Error::UncertaintyNegative`], [`Error::CorrelationShapeMismatch`],
/// [`Error::CorrelationInvalid`], [`Error::CorrelationNotPositiveSemidefinite`].
pub fn combine(estimate: f64, inputs: &[Input], correlations: Option<&[f64]>) -> Result<Budget> {
    finite(estimate)?;
    let n = inputs.len();
    if n == 0 {
        return Err(Error::NoInputs);
    }
    if n > MAX_INPUTS {
        return Err(Error::TooManyInputs);
    }
    // Signed c_i u_i, and the plain sum of squares for the rounding floor.
    let mut weighted = [0.0_f64; MAX_INPUTS];
    let mut sum_squares = 0.0;
    for (slot, input) in weighted.iter_mut().zip(inputs) {
        finite(input.sensitivity)?;
        if finite(input.standard_uncertainty)? < 0.0 {
            return Err(Error::UncertaintyNegative);
        }
        *slot = input.sensitivity * input.standard_uncertainty;
        sum_squares += *slot * *slot;
    }
    finite(sum_squares)?;
    if let Some(r) = correlations {
        check_correlations(r, n)?;
    }
    // Row sums a_i = sum_j r_ij w_j; variance = sum_i w_i a_i.
    let mut row_sums = [0.0_f64; MAX_INPUTS];
    let mut variance = 0.0;
    for i in 0..n {
        let wi = weighted.get(i).copied().unwrap_or(0.0);
        let mut a = 0.0;
        for (j, wj) in weighted.iter().take(n).enumerate() {
            let rij = match correlations {
                Some(r) => r.get(i * n + j).copied().unwrap_or(0.0),
                None => {
                    if i == j {
                        1.0
                    } else {
                        0.0
                    }
                }
            };
            a += rij * wj;
        }
        if let Some(slot) = row_sums.get_mut(i) {
            *slot = a;
        }
        variance += wi * a;
    }
    finite(variance)?;
    // Rounding can leave a tiny negative variance for a singular (but valid) matrix.
    if variance < -1e-12 * sum_squares {
        return Err(Error::CorrelationNotPositiveSemidefinite);
    }
    let variance = variance.max(0.0);
    let combined = libm::sqrt(variance);
    let mut ranked = [Contribution::EMPTY; MAX_INPUTS];
    for (i, (slot, input)) in ranked.iter_mut().zip(inputs).enumerate() {
        let w = weighted.get(i).copied().unwrap_or(0.0);
        let a = row_sums.get(i).copied().unwrap_or(0.0);
        *slot = Contribution {
            index: i,
            name: input.name,
            standard_uncertainty: input.standard_uncertainty,
            sensitivity: input.sensitivity,
            contribution: libm::fabs(w),
            variance_share: if variance > 0.0 {
                w * a / variance
            } else {
                0.0
            },
        };
    }
    // Stable insertion sort, largest contribution first (n <= 16).
    if let Some(lines) = ranked.get_mut(..n) {
        for i in 1..lines.len() {
            let mut j = i;
            while j > 0 {
                let (left, right) = lines.split_at_mut(j);
                match (left.last_mut(), right.first_mut()) {
                    (Some(a), Some(b)) if b.contribution > a.contribution => {
                        core::mem::swap(a, b);
                        j -= 1;
                    }
                    _ => break,
                }
            }
        }
    }
    Ok(Budget {
        estimate,
        combined_standard_uncertainty: combined,
        len: n,
        ranked,
    })
}

/// Checks an n x n correlation matrix: finite, unit diagonal, symmetric (to 1e-12), entries
/// in [-1, 1].
fn check_correlations(r: &[f64], n: usize) -> Result<()> {
    if r.len() != n * n {
        return Err(Error::CorrelationShapeMismatch);
    }
    for i in 0..n {
        for j in 0..n {
            let rij = finite(r.get(i * n + j).copied().unwrap_or(f64::NAN))?;
            let rji = finite(r.get(j * n + i).copied().unwrap_or(f64::NAN))?;
            let ok = if i == j {
                rij == 1.0
            } else {
                libm::fabs(rij) <= 1.0 && libm::fabs(rij - rji) <= 1e-12
            };
            if !ok {
                return Err(Error::CorrelationInvalid);
            }
        }
    }
    Ok(())
}

// ---- random numbers -------------------------------------------------------------------------

/// SplitMix64 (Steele, Lea and Flood, "Fast splittable pseudorandom number generators",
/// OOPSLA 2014; the 64-bit finaliser as in Vigna's public-domain `splitmix64.c`):
///
/// ```text
/// s <- s + 0x9E3779B97F4A7C15;  z = s
/// z <- (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9
/// z <- (z ^ (z >> 27)) * 0x94D049BB133111EB
/// output z ^ (z >> 31)                          (all arithmetic mod 2^64)
/// ```
///
/// Used here only to expand a 64-bit seed into the 256-bit state of
/// [`Xoshiro256StarStar`], as its authors recommend. Not cryptographic.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct SplitMix64 {
    state: u64,
}

impl SplitMix64 {
    /// A generator whose state is `seed` (every seed is valid).
    #[must_use]
    pub const fn new(seed: u64) -> Self {
        SplitMix64 { state: seed }
    }

    /// The next 64-bit output.
    pub fn next_u64(&mut self) -> u64 {
        self.state = self.state.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.state;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
}

/// xoshiro256** 1.0 (Blackman and Vigna, "Scrambled linear pseudorandom number
/// generators", ACM Trans. Math. Softw. 47(4), 2021): period 2^256 - 1, 4-dimensionally
/// equidistributed 64-bit outputs,
///
/// ```text
/// out = rotl(s1 * 5, 7) * 9
/// t = s1 << 17;  s2 ^= s0;  s3 ^= s1;  s1 ^= s2;  s0 ^= s3;  s2 ^= t;  s3 = rotl(s3, 45)
/// ```
///
/// with the deviates the Monte Carlo method needs: uniform on [0, 1) from the top 53 bits,
/// rectangular, and normal by the Box-Muller transform (Box and Muller, Ann. Math. Stat.
/// 29, 1958), which uses two uniforms per pair of normals and keeps the second for the next
/// call. Reproducible: the same seed gives the same stream on every platform (integer
/// arithmetic; the normal deviates use `libm`'s log, sqrt, sin and cos). Not cryptographic.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Xoshiro256StarStar {
    state: [u64; 4],
    spare_normal: f64,
    has_spare: bool,
}

impl Xoshiro256StarStar {
    /// A generator seeded from `seed` through [`SplitMix64`] (four outputs fill the state,
    /// which then cannot be all zeros in practice; a zero state is replaced by
    /// SplitMix64(0)'s, so every seed is valid).
    #[must_use]
    pub fn seed_from_u64(seed: u64) -> Self {
        let mut mix = SplitMix64::new(seed);
        let mut state = [
            mix.next_u64(),
            mix.next_u64(),
            mix.next_u64(),
            mix.next_u64(),
        ];
        if state == [0; 4] {
            let mut other = SplitMix64::new(0);
            state = [
                other.next_u64(),
                other.next_u64(),
                other.next_u64(),
                other.next_u64(),
            ];
        }
        Xoshiro256StarStar {
            state,
            spare_normal: 0.0,
            has_spare: false,
        }
    }

    /// A generator with the given raw state (for reference test vectors).
    ///
    /// # Errors
    /// [`Error::RandomStateZero`] for the all-zero state, which the generator never leaves.
    pub fn from_state(state: [u64; 4]) -> Result<Self> {
        if state == [0; 4] {
            return Err(Error::RandomStateZero);
        }
        Ok(Xoshiro256StarStar {
            state,
            spare_normal: 0.0,
            has_spare: false,
        })
    }

    /// The next 64-bit output.
    pub fn next_u64(&mut self) -> u64 {
        let [s0, s1, s2, s3] = self.state;
        let result = s1.wrapping_mul(5).rotate_left(7).wrapping_mul(9);
        let t = s1 << 17;
        let s2 = s2 ^ s0;
        let s3 = s3 ^ s1;
        let s1 = s1 ^ s2;
        let s0 = s0 ^ s3;
        let s2 = s2 ^ t;
        let s3 = s3.rotate_left(45);
        self.state = [s0, s1, s2, s3];
        result
    }

    /// Uniform deviate on [0, 1): the top 53 bits times 2^-53 (every multiple of 2^-53
    /// equally likely).
    pub fn uniform(&mut self) -> f64 {
        // 53-bit integer: exact in f64.
        #[allow(clippy::cast_precision_loss)]
        let top = (self.next_u64() >> 11) as f64;
        top * (1.0 / 9_007_199_254_740_992.0)
    }

    /// Standard normal deviate (mean 0, standard deviation 1) by Box-Muller:
    /// z0 = sqrt(-2 ln u1) cos(2 pi u2), z1 = sqrt(-2 ln u1) sin(2 pi u2), u1 in (0, 1],
    /// u2 in [0, 1). Returns z0 and keeps z1 for the next call. |z| <= 8.6 (u1 >= 2^-53).
    pub fn standard_normal(&mut self) -> f64 {
        if self.has_spare {
            self.has_spare = false;
            return self.spare_normal;
        }
        let u1 = 1.0 - self.uniform();
        let u2 = self.uniform();
        let radius = libm::sqrt(-2.0 * libm::log(u1));
        let angle = 2.0 * core::f64::consts::PI * u2;
        self.spare_normal = radius * libm::sin(angle);
        self.has_spare = true;
        radius * libm::cos(angle)
    }

    /// Normal deviate with mean `mean` and standard deviation `standard_deviation`
    /// (any unit; not validated: both finite, sd >= 0).
    pub fn normal(&mut self, mean: f64, standard_deviation: f64) -> f64 {
        mean + standard_deviation * self.standard_normal()
    }

    /// Rectangular (uniform) deviate on [mean - a, mean + a), a = `half_width`; its
    /// standard deviation is a / sqrt(3) (JCGM 101:2008 6.4.2).
    pub fn rectangular(&mut self, mean: f64, half_width: f64) -> f64 {
        mean + half_width * (2.0 * self.uniform() - 1.0)
    }
}

// ---- statistics -------------------------------------------------------------------------------

/// Streaming mean and standard deviation by Welford's update (Welford, Technometrics
/// 4(3), 1962): for each value x, n <- n + 1, d = x - mean, mean <- mean + d / n,
/// m2 <- m2 + d (x - mean). One pass, no buffer, no cancellation of large sums.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct RunningStats {
    /// Number of values seen.
    pub count: u64,
    /// Running mean (value unit); 0 before the first value.
    pub mean: f64,
    /// Sum of squared deviations from the running mean (value unit squared).
    pub m2: f64,
}

impl RunningStats {
    /// No values yet.
    #[must_use]
    pub const fn new() -> Self {
        RunningStats {
            count: 0,
            mean: 0.0,
            m2: 0.0,
        }
    }

    /// Adds one value.
    ///
    /// # Errors
    /// [`Error::NonFinite`] (the statistics are left unchanged).
    pub fn push(&mut self, value: f64) -> Result<()> {
        finite(value)?;
        self.count += 1;
        #[allow(clippy::cast_precision_loss)]
        let n = self.count as f64;
        let delta = value - self.mean;
        self.mean += delta / n;
        self.m2 += delta * (value - self.mean);
        Ok(())
    }

    /// Sample variance m2 / (n - 1) (value unit squared).
    ///
    /// # Errors
    /// [`Error::TooFewTrials`] with fewer than two values, [`Error::NonFinite`] when the
    /// sum of squared deviations overflowed (values spread over more than about 1e154).
    pub fn variance(&self) -> Result<f64> {
        if self.count < 2 {
            return Err(Error::TooFewTrials);
        }
        #[allow(clippy::cast_precision_loss)]
        let dof = (self.count - 1) as f64;
        finite(self.m2 / dof)
    }

    /// Sample standard deviation sqrt(m2 / (n - 1)) (value unit): the standard
    /// uncertainty u(y) of a Monte Carlo output (JCGM 101:2008 7.6).
    ///
    /// # Errors
    /// As [`RunningStats::variance`].
    pub fn standard_deviation(&self) -> Result<f64> {
        self.variance().map(libm::sqrt)
    }
}

/// A coverage interval read from sorted Monte Carlo values (JCGM 101:2008 7.7).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CoverageInterval {
    /// Coverage probability p.
    pub probability: f64,
    /// Lower end of the probabilistically symmetric interval (2.5 and 97.5 percentiles
    /// for p = 0.95), value unit.
    pub low: f64,
    /// Upper end of the probabilistically symmetric interval, value unit.
    pub high: f64,
    /// Lower end of the shortest interval of coverage p, value unit.
    pub shortest_low: f64,
    /// Upper end of the shortest interval of coverage p, value unit.
    pub shortest_high: f64,
}

/// Sorts `samples` in place (no heap) and returns the probabilistically symmetric and
/// the shortest 100p % coverage intervals (JCGM 101:2008 7.7.1-7.7.2).
///
/// With M sorted values y_(1) <= ... <= y_(M): q = pM if that is an integer, else the
/// integer part of pM + 1/2; an interval is [y_(r), y_(r+q)]. The symmetric one takes
/// r = (M - q)/2 if that is an integer, else the integer part of (M - q + 1)/2; the
/// shortest takes the r in 1..=M-q with the smallest y_(r+q) - y_(r).
///
/// # Errors
/// [`Error::CoverageProbabilityOutOfRange`] unless 0 < p < 1, [`Error::NonFinite`] for any
/// NaN or infinite sample, [`Error::TooFewTrials`] unless 1 <= q <= M - 1.
pub fn coverage_interval(samples: &mut [f64], probability: f64) -> Result<CoverageInterval> {
    if !(finite(probability)? > 0.0 && probability < 1.0) {
        return Err(Error::CoverageProbabilityOutOfRange);
    }
    for &x in samples.iter() {
        finite(x)?;
    }
    let m = samples.len();
    #[allow(clippy::cast_precision_loss)]
    let pm = probability * m as f64;
    let q_real = if pm == libm::floor(pm) {
        pm
    } else {
        libm::floor(pm + 0.5)
    };
    // pm <= m < 2^53: exact, non-negative.
    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
    let q = q_real as usize;
    if q < 1 || q + 1 > m {
        return Err(Error::TooFewTrials);
    }
    crate::sort::heapsort_by(samples, |a, b| a.total_cmp(&b).is_lt());
    let rest = m - q;
    // 1-based r; the interval is [y_(r), y_(r+q)] -> 0-based [r - 1, r + q - 1].
    // (M - q)/2 when even, (M - q + 1)/2 otherwise: the ceiling of (M - q)/2.
    let r = rest.div_ceil(2);
    let r = r.max(1);
    let low = samples.get(r - 1).copied().ok_or(Error::TooFewTrials)?;
    let high = samples.get(r + q - 1).copied().ok_or(Error::TooFewTrials)?;
    let mut best = (f64::INFINITY, low, high);
    for (lower, upper) in samples.iter().zip(samples.iter().skip(q)) {
        let width = upper - lower;
        if width < best.0 {
            best = (width, *lower, *upper);
        }
    }
    Ok(CoverageInterval {
        probability,
        low,
        high,
        shortest_low: best.1,
        shortest_high: best.2,
    })
}

/// The result of a Monte Carlo propagation.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct MonteCarloSummary {
    /// Number of trials M.
    pub trials: usize,
    /// Mean of the model values, the Monte Carlo estimate of y (output unit).
    pub mean: f64,
    /// Standard deviation of the model values, u(y) (output unit).
    pub standard_deviation: f64,
    /// Coverage intervals from the sorted values.
    pub interval: CoverageInterval,
}

/// Monte Carlo propagation (JCGM 101:2008 7): evaluates `model` once per slot of
/// `samples` (M = `samples.len()` trials), drawing its inputs from `rng`, and returns
/// mean, standard deviation (Welford) and the coverage intervals for `probability`.
/// `samples` ends up sorted.
///
/// Statistical accuracy of the results (normal output, standard deviation sigma): the
/// mean has a standard error sigma / sqrt(M), the standard deviation about
/// sigma / sqrt(2(M - 1)).
///
/// # Errors
/// [`Error::CoverageProbabilityOutOfRange`], [`Error::TooFewTrials`] (checked before any
/// draw), the first error `model` returns (the model is not defined there: truncate the
/// input distributions to its domain), [`Error::NonFinite`] for a non-finite value.
pub fn monte_carlo<F>(
    rng: &mut Xoshiro256StarStar,
    samples: &mut [f64],
    probability: f64,
    mut model: F,
) -> Result<MonteCarloSummary>
where
    F: FnMut(&mut Xoshiro256StarStar) -> Result<f64>,
{
    // Validate before spending any draw.
    if !(finite(probability)? > 0.0 && probability < 1.0) {
        return Err(Error::CoverageProbabilityOutOfRange);
    }
    if samples.len() < 2 {
        return Err(Error::TooFewTrials);
    }
    let mut stats = RunningStats::new();
    for slot in samples.iter_mut() {
        let value = model(rng)?;
        stats.push(value)?;
        *slot = value;
    }
    let interval = coverage_interval(samples, probability)?;
    Ok(MonteCarloSummary {
        trials: samples.len(),
        mean: stats.mean,
        standard_deviation: stats.standard_deviation()?,
        interval,
    })
}

/// Monte Carlo propagation without a buffer: `trials` evaluations of `model`, streaming
/// mean and standard deviation only (no coverage interval).
///
/// # Errors
/// [`Error::TooFewTrials`] below 2 trials, errors of `model`, [`Error::NonFinite`].
pub fn monte_carlo_streaming<F>(
    rng: &mut Xoshiro256StarStar,
    trials: usize,
    mut model: F,
) -> Result<RunningStats>
where
    F: FnMut(&mut Xoshiro256StarStar) -> Result<f64>,
{
    if trials < 2 {
        return Err(Error::TooFewTrials);
    }
    let mut stats = RunningStats::new();
    for _ in 0..trials {
        stats.push(model(rng)?)?;
    }
    Ok(stats)
}

/// The comparison of JCGM 101:2008 clause 8 between the law-of-propagation interval
/// [y - U, y + U] and a Monte Carlo interval [y_low, y_high].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Validation {
    /// d_low = |y - U - y_low|, output unit.
    pub d_low: f64,
    /// d_high = |y + U - y_high|, output unit.
    pub d_high: f64,
    /// The numerical tolerance delta they are compared with, output unit.
    pub tolerance: f64,
    /// True when both d_low and d_high are at most delta: the law of propagation is
    /// validated for this case.
    pub passed: bool,
}

/// Numerical tolerance of a standard uncertainty (JCGM 101:2008 7.9.2): write u with
/// `significant_digits` significant digits as c * 10^l; then delta = 10^l / 2.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::UncertaintyNegative`] unless u > 0,
/// [`Error::TooFewTrials`] for zero significant digits.
pub fn numerical_tolerance(standard_uncertainty: f64, significant_digits: u32) -> Result<f64> {
    if !(finite(standard_uncertainty)? > 0.0) {
        return Err(Error::UncertaintyNegative);
    }
    if significant_digits == 0 {
        return Err(Error::TooFewTrials);
    }
    let exponent =
        libm::floor(libm::log10(standard_uncertainty)) - f64::from(significant_digits) + 1.0;
    Ok(0.5 * libm::pow(10.0, exponent))
}

/// Validates the law of propagation against Monte Carlo (JCGM 101:2008 8.2):
/// d_low = |y - U - y_low| and d_high = |y + U - y_high| must both be at most `tolerance`
/// (see [`numerical_tolerance`]). `estimate` y and `expanded_uncertainty` U come from the
/// law of propagation for the same coverage probability as `interval` (its symmetric ends
/// are used).
///
/// # Errors
/// [`Error::NonFinite`] (also when d_low or d_high overflows),
/// [`Error::UncertaintyNegative`] for a negative U or tolerance.
pub fn validate_lpu(
    estimate: f64,
    expanded_uncertainty: f64,
    interval: &CoverageInterval,
    tolerance: f64,
) -> Result<Validation> {
    finite(estimate)?;
    if finite(expanded_uncertainty)? < 0.0 || finite(tolerance)? < 0.0 {
        return Err(Error::UncertaintyNegative);
    }
    // Finite inputs near the double range's end can still overflow the differences.
    let d_low = finite(libm::fabs(
        estimate - expanded_uncertainty - finite(interval.low)?,
    ))?;
    let d_high = finite(libm::fabs(
        estimate + expanded_uncertainty - finite(interval.high)?,
    ))?;
    Ok(Validation {
        d_low,
        d_high,
        tolerance,
        passed: d_low <= tolerance && d_high <= tolerance,
    })
}

// ---- surface temperature ----------------------------------------------------------------------

/// Standard uncertainties of the inputs of a surface-temperature measurement (each in its
/// input's unit; 0 = known exactly). Plain data; `Default` is all zeros.
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct InputUncertainties {
    /// Signal noise (repeatability), signal units.
    pub signal: f64,
    /// Calibration, as a temperature: the uncertainty of the blackbody temperature scale
    /// at the apparent temperature of the reading, K.
    pub calibration_k: f64,
    /// Calibration, as a signal offset (e.g. a zero or gain term), signal units.
    pub calibration_signal: f64,
    /// Emissivity e (dimensionless).
    pub emissivity: f64,
    /// Reflected apparent temperature Tr, K.
    pub reflected_k: f64,
    /// Atmosphere transmittance ta (dimensionless).
    pub atm_transmittance: f64,
    /// Atmosphere temperature Ta, K.
    pub atm_k: f64,
    /// Window transmittance tw (dimensionless).
    pub window_transmittance: f64,
    /// Window reflectance rw (dimensionless).
    pub window_reflectance: f64,
    /// Window temperature Tw, K.
    pub window_k: f64,
    /// Temperature the window reflects, Twr, K.
    pub window_reflected_k: f64,
}

impl InputUncertainties {
    /// The eleven standard uncertainties in the order of [`SURFACE_INPUT_NAMES`] (the one
    /// place that order is written for the fields).
    #[must_use]
    pub fn as_array(&self) -> [f64; SURFACE_INPUTS] {
        [
            self.signal,
            self.calibration_k,
            self.calibration_signal,
            self.emissivity,
            self.reflected_k,
            self.atm_transmittance,
            self.atm_k,
            self.window_transmittance,
            self.window_reflectance,
            self.window_k,
            self.window_reflected_k,
        ]
    }
}

/// Number of inputs of the surface-temperature budget.
pub const SURFACE_INPUTS: usize = 11;

/// Labels of the surface-temperature inputs, in the order of [`surface_inputs`].
pub const SURFACE_INPUT_NAMES: [&str; SURFACE_INPUTS] = [
    "signal noise",
    "calibration, temperature scale",
    "calibration, signal offset",
    "emissivity",
    "reflected temperature",
    "atmosphere transmittance",
    "atmosphere temperature",
    "window transmittance",
    "window reflectance",
    "window temperature",
    "window reflected temperature",
];

fn check_uncertainties(u: &InputUncertainties) -> Result<()> {
    for value in u.as_array() {
        if finite(value)? < 0.0 {
            return Err(Error::UncertaintyNegative);
        }
    }
    Ok(())
}

/// The object temperature and the [`SURFACE_INPUTS`] inputs of its budget, in the order
/// of [`SURFACE_INPUT_NAMES`], each with its sensitivity coefficient (K per input unit):
///
/// ```text
/// G = tw ta e,  dS/dT = G L'(T),  k = -1 / (G L'(T))
/// signal noise, calibration offset:    c = 1 / (G L'(T))               K per signal unit
/// calibration, temperature scale:      c = L'(T_app) / (G L'(T))      K/K, T_app = L^-1(S)
/// emissivity:                          c = k tw ta (L(T) - L(Tr))
/// reflected temperature:               c = k tw ta (1-e) L'(Tr)
/// atmosphere transmittance:            c = k tw (e L(T) + (1-e) L(Tr) - L(Ta))
/// atmosphere temperature:              c = k tw (1-ta) L'(Ta)
/// window transmittance:                c = k (ta (e L(T) + (1-e) L(Tr)) + (1-ta) L(Ta) - L(Tw))
/// window reflectance:                  c = k (L(Twr) - L(Tw))
/// window temperature:                  c = k (1-tw-rw) L'(Tw)
/// window reflected temperature:        c = k rw L'(Twr)
/// ```
///
/// The calibration in K is modelled as an error of the temperature scale at the reading's
/// apparent temperature: the corrected signal is L(T_app + dT_cal). Use the returned
/// inputs with [`combine`] to add correlations (an 11 x 11 matrix in this order).
///
/// Accuracy: the coefficients are exact derivatives of the model (checked against central
/// finite differences of [`Scene::object_temperature`] in `tests/uncertainty_surface.rs`).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::UncertaintyNegative`], and errors of
/// [`Scene::object_temperature`] and of `curve` (for example
/// [`Error::SignalBelowBackground`]).
pub fn surface_inputs<C: SignalCurve + ?Sized>(
    scene: &Scene,
    curve: &C,
    sensor_signal: f64,
    uncertainties: &InputUncertainties,
) -> Result<(f64, [Input; SURFACE_INPUTS])> {
    check_uncertainties(uncertainties)?;
    let s = scene.sensitivities(curve, sensor_signal)?;
    // Always computed, whatever the input's uncertainty: a zero uncertainty gives a zero
    // contribution, never a zero sensitivity.
    let apparent_k = curve.temperature(sensor_signal)?;
    let (_, slope) = curve.signal_and_derivative(apparent_k)?;
    let calibration_k = s.signal * slope;
    let sensitivities = [
        s.signal,
        calibration_k,
        s.signal,
        s.emissivity,
        s.reflected_k,
        s.atm_transmittance,
        s.atm_k,
        s.window_transmittance,
        s.window_reflectance,
        s.window_k,
        s.window_reflected_k,
    ];
    let mut inputs = [Input::new("", 0.0, 0.0); SURFACE_INPUTS];
    for (((slot, name), uncertainty), sensitivity) in inputs
        .iter_mut()
        .zip(SURFACE_INPUT_NAMES)
        .zip(uncertainties.as_array())
        .zip(sensitivities)
    {
        *slot = Input::new(name, uncertainty, finite(sensitivity)?);
    }
    Ok((s.object_k, inputs))
}

/// Uncertainty budget of a surface temperature by the law of propagation: the object
/// temperature from [`Scene::object_temperature`] as the estimate, the inputs of
/// [`surface_inputs`] combined without correlations.
///
/// Valid where the measurement equation is near-linear over the input uncertainties;
/// check with [`surface_monte_carlo`] otherwise (low emissivity against a hot background
/// is the classic case where it is not).
///
/// # Errors
/// As [`surface_inputs`].
pub fn surface_budget<C: SignalCurve + ?Sized>(
    scene: &Scene,
    curve: &C,
    sensor_signal: f64,
    uncertainties: &InputUncertainties,
) -> Result<Budget> {
    let (object_k, inputs) = surface_inputs(scene, curve, sensor_signal, uncertainties)?;
    combine(object_k, &inputs, None)
}

/// Draws one perturbed measurement and solves it: the model of [`surface_monte_carlo`].
fn surface_draw<C: SignalCurve + ?Sized>(
    scene: &Scene,
    curve: &C,
    sensor_signal: f64,
    u: &InputUncertainties,
    rng: &mut Xoshiro256StarStar,
) -> Result<f64> {
    // Rectangular half-width with the same standard deviation: a = sqrt(3) u.
    const ROOT3: f64 = 1.732_050_807_568_877_2;
    // Fixed draw order, every input every trial: the stream does not depend on which
    // uncertainties are zero.
    let noise = rng.normal(0.0, u.signal);
    let offset = rng.normal(0.0, u.calibration_signal);
    let scale_k = rng.normal(0.0, u.calibration_k);
    let e = rng.rectangular(scene.emissivity(), ROOT3 * u.emissivity);
    let tr = rng.normal(scene.reflected_k(), u.reflected_k);
    let ta = rng.rectangular(scene.atm_transmittance(), ROOT3 * u.atm_transmittance);
    let t_atm = rng.normal(scene.atm_k(), u.atm_k);
    let tw = rng.rectangular(scene.window_transmittance(), ROOT3 * u.window_transmittance);
    let rw = rng.rectangular(scene.window_reflectance(), ROOT3 * u.window_reflectance);
    let t_win = rng.normal(scene.window_k(), u.window_k);
    let t_wr = rng.normal(scene.window_reflected_k(), u.window_reflected_k);
    let drawn = Scene::new(e, tr)?
        .with_atmosphere(ta, t_atm)?
        .with_window(tw, rw, t_win, t_wr)?;
    let mut signal = sensor_signal + noise + offset;
    if u.calibration_k > 0.0 {
        let apparent_k = curve.temperature(signal)?;
        signal = curve.signal(apparent_k + scale_k)?;
    }
    drawn.object_temperature(curve, signal)
}

/// Monte Carlo propagation (JCGM 101:2008) of the surface-temperature uncertainty: each
/// trial draws every input and re-solves [`Scene::object_temperature`].
///
/// Distributions (JCGM 101:2008 6.4): the signal noise, the calibration terms and the
/// temperatures are normal; the emissivity, transmittances and reflectance are bounded
/// quantities and are drawn rectangular with the same standard uncertainty (half-width
/// sqrt(3) u). The calibration in K shifts the apparent temperature:
/// S' = L(L^-1(S + noise + offset) + dT_cal). `samples.len()` is the number of trials.
/// Reproducible: the same `rng` state and inputs give the same result, bit for bit.
///
/// # Errors
/// [`Error::UncertaintyNegative`], [`Error::NonFinite`],
/// [`Error::CoverageProbabilityOutOfRange`], [`Error::TooFewTrials`], and any error of a
/// trial: a draw outside the model's domain (an emissivity above 1, say, when
/// e + sqrt(3) u(e) > 1; or [`Error::SignalBelowBackground`]) stops the run, since the
/// stated distributions then put probability where the model is undefined.
pub fn surface_monte_carlo<C: SignalCurve + ?Sized>(
    scene: &Scene,
    curve: &C,
    sensor_signal: f64,
    uncertainties: &InputUncertainties,
    rng: &mut Xoshiro256StarStar,
    samples: &mut [f64],
    probability: f64,
) -> Result<MonteCarloSummary> {
    check_uncertainties(uncertainties)?;
    finite(sensor_signal)?;
    monte_carlo(rng, samples, probability, |rng| {
        surface_draw(scene, curve, sensor_signal, uncertainties, rng)
    })
}

/// As [`surface_monte_carlo`] without a buffer: `trials` draws of the same model, in the
/// same order from the same `rng`, streamed into a [`RunningStats`] (mean and standard
/// deviation by Welford's method; no coverage interval, which needs the sorted values).
/// With the same `rng` state the mean and standard deviation equal those of
/// [`surface_monte_carlo`] with `trials` samples, bit for bit.
///
/// # Errors
/// [`Error::UncertaintyNegative`], [`Error::NonFinite`], [`Error::TooFewTrials`] below 2
/// trials (checked before any draw), and any error of a trial, as in
/// [`surface_monte_carlo`].
pub fn surface_monte_carlo_streaming<C: SignalCurve + ?Sized>(
    scene: &Scene,
    curve: &C,
    sensor_signal: f64,
    uncertainties: &InputUncertainties,
    rng: &mut Xoshiro256StarStar,
    trials: usize,
) -> Result<RunningStats> {
    check_uncertainties(uncertainties)?;
    finite(sensor_signal)?;
    monte_carlo_streaming(rng, trials, |rng| {
        surface_draw(scene, curve, sensor_signal, uncertainties, rng)
    })
}
