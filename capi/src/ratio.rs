//! Two-colour (ratio) pyrometry through the C ABI.

use super::band::{band_from_c, bt_band};
use super::{bt_status, deliver, read_input, Output};
use bandtemp::ratio::{RatioPyrometer, WienRatio};
use bandtemp::Result;

/// True temperature of a surface, K, from its signals in two bands (two-colour or ratio
/// pyrometry): solves R = S1/S2 = kappa L1(T)/L2(T) for T over [`t_min_k`, `t_max_k`],
/// kappa = `emissivity_ratio` = e1/e2 (1 for a grey surface). The signals are band
/// radiances in the bands' units, or both scaled by one common factor.
///
/// Accuracy: |dT/T| below 1e-12 for any accepted pair of bands.
/// Errors: the bands' errors (as `bt_band_radiance`), `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_RATIO_RANGE_INVALID` unless
/// t_min_k < t_max_k, `BT_STATUS_BANDS_INDISTINGUISHABLE` when |d ln R / d ln T| falls
/// below 0.1 or changes sign in the range, `BT_STATUS_RADIANCE_NOT_POSITIVE` for a signal <= 0,
/// `BT_STATUS_EMISSIVITY_RATIO_NOT_POSITIVE`, `BT_STATUS_RATIO_OUT_OF_RANGE` when R/kappa
/// is outside what the range produces, `BT_STATUS_NOT_CONVERGED`.
///
/// The working range is checked on every call: 65 log-spaced band-ratio evaluations, and
/// more between them where d ln R / d ln T bends (none for an ordinary range such as
/// 500-2500 K; at most 2,048 more, past which the range is refused as
/// `BT_STATUS_BANDS_INDISTINGUISHABLE`). A fast path over many readings is a frame
/// converter's job.
///
/// # Safety
/// `band1` and `band2` as in `bt_band_radiance`; `temperature_k` null or valid for
/// writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_ratio_temperature(
    band1: *const bt_band,
    band2: *const bt_band,
    t_min_k: f64,
    t_max_k: f64,
    signal1: f64,
    signal2: f64,
    emissivity_ratio: f64,
    temperature_k: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver`; the bands
    // borrow their tables only during this call.
    unsafe {
        deliver(temperature_k, || {
            let pyrometer =
                RatioPyrometer::new(band_from_c(band1)?, band_from_c(band2)?, t_min_k, t_max_k)?;
            let reading = pyrometer.temperature_from_signals(signal1, signal2, emissivity_ratio)?;
            Ok(reading.solution.temperature_k)
        })
    }
}

/// The Wien-approximation model of a two-colour pyrometer, in closed form:
/// R = S1/S2 = kappa W exp(-c2 / (lambda_R T)), 1/lambda_R = 1/lambda1 - 1/lambda2,
/// kappa = e1/e2. `prefactor` W is the parameter the closed form needs besides the two
/// wavelengths: the ratio a grey body would give at infinite temperature in the Wien
/// approximation, W = (c1 lambda1^-n D1) / (c1 lambda2^-n D2) for bands of response
/// integral D_i (n = 5 energy, 4 photon). `bt_wien_ratio_from_bands` fills all three
/// from two bands; a calibrated instrument may set W from its own ratio calibration.
///
/// Valid when both wavelengths are positive and differ, and W > 0 (all finite).
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_wien_ratio {
    /// Effective wavelength of band 1, um.
    pub lambda1_um: f64,
    /// Effective wavelength of band 2, um.
    pub lambda2_um: f64,
    /// Prefactor W, ratio units (S1/S2).
    pub prefactor: f64,
}

impl Output for bt_wien_ratio {
    fn finite(self) -> Result<bt_wien_ratio> {
        Ok(bt_wien_ratio {
            lambda1_um: self.lambda1_um.finite()?,
            lambda2_um: self.lambda2_um.finite()?,
            prefactor: self.prefactor.finite()?,
        })
    }
}

/// Reads and validates a `bt_wien_ratio`.
///
/// # Safety
/// `model` is null or valid for reads of a `bt_wien_ratio`.
unsafe fn read_wien(model: *const bt_wien_ratio) -> Result<WienRatio> {
    // SAFETY: the caller's guarantee; `bt_wien_ratio` is doubles only.
    let m = unsafe { read_input(model) }?;
    WienRatio::new(m.lambda1_um, m.lambda2_um, m.prefactor)
}

/// The Wien model of two bands: lambda_i the response-weighted mean wavelength of band i
/// (exact for piecewise-linear responses), W from the bands' response integrals and
/// detector kinds.
///
/// The closed form agrees with the exact solver (`bt_ratio_temperature`) for narrow
/// short-wave bands (0.4 K at 800 K for 10 nm bands at 0.65 and 0.90 um) and not for wide
/// ones (hundreds of kelvin off for 3-5 and 8-14 um bands).
/// Errors: the bands' errors (as `bt_band_radiance`), `BT_STATUS_WAVELENGTH_NOT_POSITIVE`,
/// `BT_STATUS_BANDS_INDISTINGUISHABLE` for equal effective wavelengths,
/// `BT_STATUS_RATIO_NOT_POSITIVE`, `BT_STATUS_NON_FINITE`.
///
/// # Safety
/// `band1` and `band2` as in `bt_band_radiance`; `out` null or valid for writing a
/// `bt_wien_ratio`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_wien_ratio_from_bands(
    band1: *const bt_band,
    band2: *const bt_band,
    out: *mut bt_wien_ratio,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            let model = WienRatio::from_bands(&band_from_c(band1)?, &band_from_c(band2)?)?;
            Ok(bt_wien_ratio {
                lambda1_um: model.lambda1_um(),
                lambda2_um: model.lambda2_um(),
                prefactor: model.prefactor(),
            })
        })
    }
}

/// Signal ratio R = S1/S2 = kappa W exp(-c2 / (lambda_R T)) of the Wien model at
/// `temperature_k`, kappa = `emissivity_ratio` = e1/e2 (1 for a grey surface).
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`, the model's errors (as
/// `bt_wien_ratio_from_bands`), `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_EMISSIVITY_RATIO_NOT_POSITIVE`,
/// `BT_STATUS_RATIO_OUT_OF_RANGE` when R is not a normal double.
///
/// # Safety
/// `model` null or valid for reading a `bt_wien_ratio`; `ratio` null or valid for writing
/// a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_wien_ratio_signal_ratio(
    model: *const bt_wien_ratio,
    temperature_k: f64,
    emissivity_ratio: f64,
    ratio: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `read_wien` and `deliver`.
    unsafe {
        deliver(ratio, || {
            read_wien(model)?.ratio(temperature_k, emissivity_ratio)
        })
    }
}

/// Temperature from a signal ratio in the Wien model, closed form:
/// 1/T = (lambda_R / c2) ln(kappa W / R), K. Exact inverse of
/// `bt_wien_ratio_signal_ratio` (to a few ulp); its error against Planck's law is the
/// model's (see `bt_wien_ratio_from_bands`).
///
/// Errors: as `bt_wien_ratio_signal_ratio`, `BT_STATUS_RATIO_NOT_POSITIVE` for R <= 0,
/// `BT_STATUS_RATIO_OUT_OF_RANGE` when no positive temperature gives R (R beyond
/// kappa W, the infinite-temperature limit).
///
/// # Safety
/// As `bt_wien_ratio_signal_ratio`, with `temperature_k` the out-pointer.
#[no_mangle]
pub unsafe extern "C" fn bt_wien_ratio_temperature(
    model: *const bt_wien_ratio,
    ratio: f64,
    emissivity_ratio: f64,
    temperature_k: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_wien_ratio_signal_ratio`.
    unsafe {
        deliver(temperature_k, || {
            read_wien(model)?.temperature(ratio, emissivity_ratio)
        })
    }
}

/// Emissivity-slope correction of a grey ratio temperature in the Wien model:
/// 1/T = 1/T_grey + (lambda_R / c2) ln kappa, K (kappa = e1/e2 > 1, emissivity falling
/// with wavelength as for most metals, lowers the temperature). Exact within the model.
///
/// Errors: as `bt_wien_ratio_signal_ratio`; `BT_STATUS_RATIO_OUT_OF_RANGE` when the
/// corrected 1/T is not positive.
///
/// # Safety
/// As `bt_wien_ratio_signal_ratio`, with `temperature_k` the out-pointer.
#[no_mangle]
pub unsafe extern "C" fn bt_wien_ratio_correct_grey(
    model: *const bt_wien_ratio,
    grey_temperature_k: f64,
    emissivity_ratio: f64,
    temperature_k: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_wien_ratio_signal_ratio`.
    unsafe {
        deliver(temperature_k, || {
            read_wien(model)?.correct_grey(grey_temperature_k, emissivity_ratio)
        })
    }
}
