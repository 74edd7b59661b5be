//! Effective wavelengths, Sakuma-Hattori from the band's moments, and calibration
//! sensitivities through the C ABI (`bandtemp::calibration`).

use super::band::{band_from_c, bt_band};
use super::{bt_status, deliver, deliver2};
use bandtemp::calibration::{
    limit_effective_wavelength_um, mean_effective_wavelength_um, moment_estimate,
    one_point_wavelength_sensitivity, spectral_moments, two_point_sigma_sensitivity,
    SpectralMoments,
};

/// Limit effective wavelength of the band at `temperature_k`, um:
/// 1/lambda_T = (T^2/c2) d ln L / dT with the band's exact dL/dT.
///
/// Errors: the band's errors, `BT_STATUS_NON_FINITE`, `BT_STATUS_TEMPERATURE_NOT_POSITIVE`;
/// pointer errors.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `out` null or valid for writing a double; written
/// only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_limit_effective_wavelength_um(
    band: *const bt_band,
    temperature_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            limit_effective_wavelength_um(&band_from_c(band)?, temperature_k)
        })
    }
}

/// Mean effective wavelength of the band between `t1_k` and `t2_k`, um:
/// c2 (1/T1 - 1/T2) / ln(L(T2)/L(T1)).
///
/// Errors: the band's errors, `BT_STATUS_NON_FINITE`, `BT_STATUS_TEMPERATURE_NOT_POSITIVE`,
/// `BT_STATUS_CALIBRATION_DUPLICATE_TEMPERATURE` for T1 = T2; pointer errors.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `out` null or valid for writing a double; written
/// only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_mean_effective_wavelength_um(
    band: *const bt_band,
    t1_k: f64,
    t2_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            mean_effective_wavelength_um(&band_from_c(band)?, t1_k, t2_k)
        })
    }
}

/// Sakuma-Hattori A (um) and B (um K) from the band's spectral moments (Saunders and
/// White 2003): A = lambda0 (1 - 6 sigma^2/lambda0^2) (5 for a photon detector),
/// B = c2 sigma^2 / (2 lambda0^2). A start for `bt_sakuma_hattori_fit_band`, not a
/// calibration.
///
/// Errors: the band's errors; pointer errors.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `a_um` and `b_umk` null or valid for writing a double;
/// written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_sakuma_hattori_from_moments(
    band: *const bt_band,
    a_um: *mut f64,
    b_umk: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver2`.
    unsafe {
        deliver2(a_um, b_umk, || {
            let band = band_from_c(band)?;
            let estimate = moment_estimate(spectral_moments(&band)?, band.detector());
            Ok((estimate.a_um, estimate.b_umk))
        })
    }
}

/// dT/dlambda, K per um, of a one-point calibration at `calibration_k` read at
/// `temperature_k`: (1 - T/T1) T / lambda (Wien; the reading's error per unit error of the
/// effective wavelength).
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_TEMPERATURE_NOT_POSITIVE`,
/// `BT_STATUS_WAVELENGTH_NOT_POSITIVE`; pointer errors.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_one_point_wavelength_sensitivity(
    wavelength_um: f64,
    calibration_k: f64,
    temperature_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe {
        deliver(out, || {
            one_point_wavelength_sensitivity(wavelength_um, calibration_k, temperature_k)
        })
    }
}

/// dT/dsigma, K per um, of a two-point calibration at `t1_k` and `t2_k` read at
/// `temperature_k`, for a band of mean `mean_um` and variance `variance_um2` (B from the
/// moments, A and C through the two points; Sakuma-Hattori Wien form).
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_MOMENTS_INVALID`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_CALIBRATION_DUPLICATE_TEMPERATURE`;
/// pointer errors.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_two_point_sigma_sensitivity(
    mean_um: f64,
    variance_um2: f64,
    t1_k: f64,
    t2_k: f64,
    temperature_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe {
        deliver(out, || {
            let moments = SpectralMoments {
                mean_um,
                variance_um2,
            };
            two_point_sigma_sensitivity(moments, t1_k, t2_k, temperature_k)
        })
    }
}
