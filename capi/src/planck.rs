//! Spectral laws of a blackbody through the C ABI.

use super::{bt_status, deliver};
use bandtemp::planck;

/// Spectral radiance of a blackbody, Planck's law:
/// L = c1L / lambda^5 / (exp(c2 / (lambda T)) - 1), in W m^-2 sr^-1 um^-1.
///
/// `wavelength_um` > 0 (um), `temperature_k` > 0 (K). Accuracy: a few ulp.
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_WAVELENGTH_NOT_POSITIVE`, `BT_STATUS_TEMPERATURE_NOT_POSITIVE`,
/// `BT_STATUS_RADIANCE_UNDERFLOW`, `BT_STATUS_RADIANCE_OVERFLOW`.
///
/// # Safety
/// `out` is null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_spectral_radiance(
    wavelength_um: f64,
    temperature_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee on `out` is `deliver`'s.
    unsafe {
        deliver(out, || {
            planck::spectral_radiance(wavelength_um, temperature_k)
        })
    }
}

/// Photon spectral radiance of a blackbody, Lp = c1p / lambda^4 / (exp(c2 / (lambda T)) - 1),
/// in photons s^-1 m^-2 sr^-1 um^-1.
///
/// Domain and errors as `bt_spectral_radiance`.
///
/// # Safety
/// `out` is null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_spectral_photon_radiance(
    wavelength_um: f64,
    temperature_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee on `out` is `deliver`'s.
    unsafe {
        deliver(out, || {
            planck::spectral_photon_radiance(wavelength_um, temperature_k)
        })
    }
}

/// Blackbody fraction F(0 -> lambda*T): the share of total radiance emitted below lambda,
/// F = 15/pi^4 * integral from c2/(lambda T) to infinity of t^3/(e^t - 1) dt.
///
/// `lambda_t_umk` > 0 (um K). Full double precision; exactly 0 where F underflows
/// (lambda T below about 20 um K).
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_LAMBDA_T_NOT_POSITIVE`.
///
/// # Safety
/// `out` is null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_blackbody_fraction(lambda_t_umk: f64, out: *mut f64) -> bt_status {
    // SAFETY: the caller's guarantee on `out` is `deliver`'s.
    unsafe { deliver(out, || planck::blackbody_fraction(lambda_t_umk)) }
}

/// Wavelength of peak spectral radiance, Wien's displacement law: lambda_max = b / T, um
/// (b = 2897.771955 um K, CODATA 2018).
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_RADIANCE_OVERFLOW` where the result
/// overflows.
///
/// # Safety
/// `out` is null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_peak_wavelength_um(temperature_k: f64, out: *mut f64) -> bt_status {
    // SAFETY: the caller's guarantee on `out` is `deliver`'s.
    unsafe { deliver(out, || planck::peak_wavelength_um(temperature_k)) }
}

/// Total radiance of a blackbody, L = sigma T^4 / pi, W m^-2 sr^-1.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_RADIANCE_UNDERFLOW`,
/// `BT_STATUS_RADIANCE_OVERFLOW`.
///
/// # Safety
/// `out` is null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_total_radiance(temperature_k: f64, out: *mut f64) -> bt_status {
    // SAFETY: the caller's guarantee on `out` is `deliver`'s.
    unsafe { deliver(out, || planck::total_radiance(temperature_k)) }
}
