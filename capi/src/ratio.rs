//! Two-colour (ratio) pyrometry through the C ABI.

use super::band::{band_from_c, bt_band};
use super::{bt_status, deliver};
use bandtemp::ratio::RatioPyrometer;

/// True temperature of a surface, K, from its signals in two bands (two-colour or ratio
/// pyrometry): solves R = S1/S2 = kappa L1(T)/L2(T) for T over [`t_min_k`, `t_max_k`],
/// kappa = `emissivity_ratio` = e1/e2 (1 for a grey surface). The signals are band
/// radiances in the bands' units, or both scaled by one common factor.
///
/// Accuracy: |dT/T| below 1e-12 for any accepted pair of bands.
/// Errors: the bands' errors (as `bt_band_radiance`), `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_RATIO_RANGE_INVALID` unless
/// t_min_k < t_max_k, `BT_STATUS_BANDS_INDISTINGUISHABLE` when |d ln R / d ln T| falls
/// below 0.1 in the range, `BT_STATUS_RADIANCE_NOT_POSITIVE` for a signal <= 0,
/// `BT_STATUS_EMISSIVITY_RATIO_NOT_POSITIVE`, `BT_STATUS_RATIO_OUT_OF_RANGE` when R/kappa
/// is outside what the range produces, `BT_STATUS_NOT_CONVERGED`.
///
/// The working range is checked on every call (65 band-ratio evaluations); a fast path
/// over many readings is a frame converter's job.
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
