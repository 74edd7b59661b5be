//! Uncertainty budgets of a surface temperature through the C ABI.

use super::band::{band_from_c, bt_band};
use super::scene::{bt_scene, read_scene};
use super::status::nul_terminated;
use super::{bt_status, deliver, deliver2, read_input, slice_from_c_mut, Output};
use bandtemp::uncertainty::{
    surface_budget, surface_monte_carlo, surface_monte_carlo_streaming, Budget, Contribution,
    InputUncertainties, Xoshiro256StarStar, MAX_INPUTS, SURFACE_INPUTS, SURFACE_INPUT_NAMES,
};
use bandtemp::Result;
use core::ffi::c_char;

/// Standard uncertainties of the inputs of a surface-temperature measurement, each in its
/// input's unit (0 = known exactly; every value finite and >= 0). The order and names of
/// the inputs are those of `bt_surface_input_name`.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct bt_input_uncertainties {
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

impl From<bt_input_uncertainties> for InputUncertainties {
    fn from(u: bt_input_uncertainties) -> InputUncertainties {
        InputUncertainties {
            signal: u.signal,
            calibration_k: u.calibration_k,
            calibration_signal: u.calibration_signal,
            emissivity: u.emissivity,
            reflected_k: u.reflected_k,
            atm_transmittance: u.atm_transmittance,
            atm_k: u.atm_k,
            window_transmittance: u.window_transmittance,
            window_reflectance: u.window_reflectance,
            window_k: u.window_k,
            window_reflected_k: u.window_reflected_k,
        }
    }
}

/// One line of a `bt_budget`.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_contribution {
    /// The input's position (0-based) in `bt_input_uncertainties`; its name is
    /// `bt_surface_input_name(index)`.
    pub index: usize,
    /// Standard uncertainty u(x_i), input unit.
    pub standard_uncertainty: f64,
    /// Sensitivity coefficient c_i, K per input unit.
    pub sensitivity: f64,
    /// Contribution u_i(T) = |c_i| u(x_i), K.
    pub contribution_k: f64,
    /// Share of the combined variance (dimensionless; the shares sum to 1, 0 each when the
    /// combined uncertainty is 0).
    pub variance_share: f64,
}

/// Maximum number of lines of a `bt_budget`.
pub const BT_BUDGET_MAX_LINES: usize = 16;
const _: () = assert!(BT_BUDGET_MAX_LINES == MAX_INPUTS);

/// An uncertainty budget of a temperature: the estimate, the combined standard
/// uncertainty, and the contributions ranked largest first.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_budget {
    /// The estimate: the object temperature, K.
    pub estimate_k: f64,
    /// Combined standard uncertainty u_c(T), K (multiply by the coverage factor, e.g. 2,
    /// for an expanded uncertainty).
    pub combined_standard_uncertainty_k: f64,
    /// Number of lines in use in `ranked`.
    pub len: usize,
    /// Lines ranked by `contribution_k`, largest first (ties keep input order); lines from
    /// `len` on are zero.
    pub ranked: [bt_contribution; BT_BUDGET_MAX_LINES],
}

impl From<&Contribution> for bt_contribution {
    fn from(c: &Contribution) -> bt_contribution {
        bt_contribution {
            index: c.index,
            standard_uncertainty: c.standard_uncertainty,
            sensitivity: c.sensitivity,
            contribution_k: c.contribution,
            variance_share: c.variance_share,
        }
    }
}

impl From<&Budget> for bt_budget {
    fn from(b: &Budget) -> bt_budget {
        let mut ranked = [bt_contribution::from(&Contribution::EMPTY); BT_BUDGET_MAX_LINES];
        for (slot, line) in ranked.iter_mut().zip(b.entries()) {
            *slot = bt_contribution::from(line);
        }
        bt_budget {
            estimate_k: b.estimate,
            combined_standard_uncertainty_k: b.combined_standard_uncertainty,
            len: b.len,
            ranked,
        }
    }
}

impl Output for bt_budget {
    fn finite(self) -> Result<bt_budget> {
        let mut ranked = self.ranked;
        for line in &mut ranked {
            *line = bt_contribution {
                standard_uncertainty: line.standard_uncertainty.finite()?,
                sensitivity: line.sensitivity.finite()?,
                contribution_k: line.contribution_k.finite()?,
                variance_share: line.variance_share.finite()?,
                ..*line
            };
        }
        Ok(bt_budget {
            estimate_k: self.estimate_k.finite()?,
            combined_standard_uncertainty_k: self.combined_standard_uncertainty_k.finite()?,
            ranked,
            ..self
        })
    }
}

/// Uncertainty budget of a surface temperature by the law of propagation (GUM, first
/// order, inputs uncorrelated): the estimate is `bt_object_temperature` of
/// `sensor_radiance`, and each input of `u` enters with the exact derivative of the
/// measurement equation as its sensitivity coefficient, whatever its uncertainty. Inputs
/// with u = 0 appear with their real sensitivity and a zero contribution; `out->len` is 11.
///
/// Valid where the measurement equation is near-linear over the input uncertainties
/// (low emissivity against a hot background is the classic case where it is not).
///
/// Errors: those of `bt_object_temperature`; `BT_STATUS_NULL_POINTER`,
/// `BT_STATUS_INVALID_BUFFER`, `BT_STATUS_NON_FINITE` or `BT_STATUS_UNCERTAINTY_NEGATIVE`
/// for `u`.
///
/// # Safety
/// `band` and `scene` as in `bt_object_temperature`; `u` null or valid for reading a
/// `bt_input_uncertainties`; `out` null or valid for writing a `bt_budget`; written only
/// on success.
#[no_mangle]
pub unsafe extern "C" fn bt_surface_budget(
    band: *const bt_band,
    scene: *const bt_scene,
    sensor_radiance: f64,
    u: *const bt_input_uncertainties,
    out: *mut bt_budget,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `read_scene`,
    // `read_input` (`bt_input_uncertainties` is doubles only) and `deliver`.
    unsafe {
        deliver(out, || {
            let band = band_from_c(band)?;
            let scene = read_scene(scene)?;
            let u = InputUncertainties::from(read_input(u)?);
            surface_budget(&scene, &band, sensor_radiance, &u).map(|b| bt_budget::from(&b))
        })
    }
}

/// The input names, NUL-terminated, in the order of [`SURFACE_INPUT_NAMES`].
macro_rules! input_names {
    ($($i:literal)*) => {
        /// The name of surface-budget input `index` as a static NUL-terminated string.
        fn input_name(index: usize) -> *const c_char {
            match index {
                $($i => {
                    const TEXT: &str = SURFACE_INPUT_NAMES[$i];
                    static BYTES: [u8; TEXT.len() + 1] = nul_terminated(TEXT);
                    BYTES.as_ptr().cast::<c_char>()
                })*
                _ => core::ptr::null(),
            }
        }
    };
}
input_names!(0 1 2 3 4 5 6 7 8 9 10);
const _: () = assert!(
    SURFACE_INPUTS == 11,
    "list every surface input in input_names!"
);

/// The name of input `index` of a surface budget (the field of `bt_input_uncertainties`
/// at that position, and `bt_contribution.index`), e.g. "signal noise", as a static
/// NUL-terminated string; NULL for an index past the last input (10). Do not free it.
#[no_mangle]
pub extern "C" fn bt_surface_input_name(index: usize) -> *const c_char {
    input_name(index)
}

/// The result of a Monte Carlo propagation (JCGM 101:2008) of a surface temperature.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_monte_carlo {
    /// Number of trials M.
    pub trials: usize,
    /// Mean of the trial temperatures, the Monte Carlo estimate, K. Standard error
    /// sigma / sqrt(M) for a spread sigma.
    pub mean_k: f64,
    /// Standard deviation of the trial temperatures, the standard uncertainty, K
    /// (relative standard error about 1 / sqrt(2 (M - 1))).
    pub standard_deviation_k: f64,
    /// The coverage probability of the intervals, as requested (e.g. 0.95).
    pub probability: f64,
    /// Probabilistically symmetric interval: the (1-p)/2 and (1+p)/2 quantiles, K.
    pub low_k: f64,
    /// Upper end of the symmetric interval, K.
    pub high_k: f64,
    /// Shortest interval holding the fraction p of the trials, K.
    pub shortest_low_k: f64,
    /// Upper end of the shortest interval, K.
    pub shortest_high_k: f64,
}

impl Output for bt_monte_carlo {
    fn finite(self) -> Result<bt_monte_carlo> {
        Ok(bt_monte_carlo {
            mean_k: self.mean_k.finite()?,
            standard_deviation_k: self.standard_deviation_k.finite()?,
            probability: self.probability.finite()?,
            low_k: self.low_k.finite()?,
            high_k: self.high_k.finite()?,
            shortest_low_k: self.shortest_low_k.finite()?,
            shortest_high_k: self.shortest_high_k.finite()?,
            ..self
        })
    }
}

/// Monte Carlo propagation (JCGM 101:2008) of the uncertainty of a surface temperature,
/// seeded and reproducible: `n_samples` trials, each drawing every input of `u` and
/// solving the measurement equation again (`bt_object_temperature`). Signal noise,
/// calibration terms and temperatures are drawn normal; emissivity, transmittances and
/// reflectance rectangular with the same standard uncertainty (half-width sqrt(3) u). The
/// generator is xoshiro256** seeded from `seed` through SplitMix64: the same seed and
/// inputs give the same result, bit for bit, on every platform.
///
/// `samples` is the caller's storage for the M = `n_samples` trial temperatures (K); on
/// success it holds them sorted ascending (for histograms or other quantiles). On error its
/// contents are unspecified (some trials may have been written); `out` is untouched.
///
/// Errors: those of `bt_surface_budget`; `BT_STATUS_TOO_FEW_TRIALS` for `n_samples` < 2
/// (and, after the trials, when M is too small to hold an interval of `probability`),
/// `BT_STATUS_COVERAGE_PROBABILITY_OUT_OF_RANGE` unless 0 < `probability` < 1 (both
/// checked before any draw); any error of a trial: a draw outside the model's domain
/// (e + sqrt(3) u(e) > 1, a transmittance above 1, or a signal at or below the background,
/// `BT_STATUS_SIGNAL_BELOW_BACKGROUND`) stops the run, since the stated distributions then
/// put probability where the model is undefined.
///
/// # Safety
/// `band`, `scene`, `u` as in `bt_surface_budget`; `samples` null or valid for reading and
/// writing `n_samples` doubles, overlapping no other argument; `out` null or valid for
/// writing a `bt_monte_carlo`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_surface_monte_carlo(
    band: *const bt_band,
    scene: *const bt_scene,
    sensor_radiance: f64,
    u: *const bt_input_uncertainties,
    seed: u64,
    probability: f64,
    samples: *mut f64,
    n_samples: usize,
    out: *mut bt_monte_carlo,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `read_scene`,
    // `read_input`, `slice_from_c_mut` and `deliver`.
    unsafe {
        deliver(out, || {
            let band = band_from_c(band)?;
            let scene = read_scene(scene)?;
            let u = InputUncertainties::from(read_input(u)?);
            let samples = slice_from_c_mut(samples, n_samples)?;
            let mut rng = Xoshiro256StarStar::seed_from_u64(seed);
            let summary = surface_monte_carlo(
                &scene,
                &band,
                sensor_radiance,
                &u,
                &mut rng,
                samples,
                probability,
            )?;
            Ok(bt_monte_carlo {
                trials: summary.trials,
                mean_k: summary.mean,
                standard_deviation_k: summary.standard_deviation,
                probability: summary.interval.probability,
                low_k: summary.interval.low,
                high_k: summary.interval.high,
                shortest_low_k: summary.interval.shortest_low,
                shortest_high_k: summary.interval.shortest_high,
            })
        })
    }
}

/// As `bt_surface_monte_carlo` without a buffer: `trials` trials of the same draws,
/// streamed into a running mean and standard deviation (Welford; no coverage interval,
/// which needs the sorted trials). With the same seed, `mean_k` and
/// `standard_deviation_k` equal those of `bt_surface_monte_carlo` with `trials` samples,
/// bit for bit. Both are written only on success.
///
/// Errors: as `bt_surface_monte_carlo` (`BT_STATUS_TOO_FEW_TRIALS` below 2 trials).
///
/// # Safety
/// `band`, `scene`, `u` as in `bt_surface_budget`; `mean_k` and `standard_deviation_k`
/// each null or valid for writing a double.
#[no_mangle]
pub unsafe extern "C" fn bt_surface_monte_carlo_streaming(
    band: *const bt_band,
    scene: *const bt_scene,
    sensor_radiance: f64,
    u: *const bt_input_uncertainties,
    seed: u64,
    trials: usize,
    mean_k: *mut f64,
    standard_deviation_k: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `read_scene`,
    // `read_input` and `deliver2`.
    unsafe {
        deliver2(mean_k, standard_deviation_k, || {
            let band = band_from_c(band)?;
            let scene = read_scene(scene)?;
            let u = InputUncertainties::from(read_input(u)?);
            let mut rng = Xoshiro256StarStar::seed_from_u64(seed);
            let stats = surface_monte_carlo_streaming(
                &scene,
                &band,
                sensor_radiance,
                &u,
                &mut rng,
                trials,
            )?;
            Ok((stats.mean, stats.standard_deviation()?))
        })
    }
}
