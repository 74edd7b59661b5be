//! Humid air and horizontal air paths through the C ABI (the water-vapour continuum model
//! of 8-14 um).

use super::band::{band_from_c, bt_band};
use super::{bt_status, deliver};
use bandtemp::atmosphere::humidity::STANDARD_PRESSURE_HPA;
use bandtemp::atmosphere::{Air, Path, PathTransmittance, Phase, SaturationFormula};
use bandtemp::Result;

/// A continuum path of `distance_m` through air at `air_k`, `relative_humidity` (a
/// fraction in [0, 1]) and `pressure_hpa`.
fn continuum_path(
    air_k: f64,
    relative_humidity: f64,
    pressure_hpa: f64,
    distance_m: f64,
) -> Result<Path> {
    Path::new(
        Air::new(air_k, relative_humidity, pressure_hpa)?,
        distance_m,
    )
}

/// Saturation vapour pressure of pure water vapour over a plane surface of liquid water
/// at `temperature_k`, hPa, by the CIMO (WMO No. 8) Magnus formula
/// e_w = 6.112 exp(17.62 t / (243.12 + t)), t in deg C; no enhancement factor.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_AIR_TEMPERATURE_OUT_OF_RANGE` outside
/// -45..+60 deg C.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_air_saturation_vapour_pressure_hpa(
    temperature_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee on `out` is that of `deliver`.
    unsafe {
        deliver(out, || {
            SaturationFormula::MagnusCimo
                .saturation_vapour_pressure_hpa(Phase::Water, temperature_k)
        })
    }
}

/// Dew point, K, of air at `temperature_k` with `relative_humidity` (a fraction in
/// [0, 1], with respect to liquid water): the temperature at which e_w(T_d) = U e_w(T)
/// (CIMO Magnus). Independent of the air pressure (the enhancement factor cancels).
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_AIR_TEMPERATURE_OUT_OF_RANGE` outside
/// -45..+60 deg C, `BT_STATUS_RELATIVE_HUMIDITY_OUT_OF_RANGE`,
/// `BT_STATUS_VAPOUR_PRESSURE_OUT_OF_RANGE` for dry air (U = 0) or a dew point below
/// -45 deg C.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_air_dew_point_k(
    temperature_k: f64,
    relative_humidity: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee on `out` is that of `deliver`.
    unsafe {
        deliver(out, || {
            Air::new(temperature_k, relative_humidity, STANDARD_PRESSURE_HPA)?.dew_point_k()
        })
    }
}

/// Band-effective transmittance of a horizontal air path, weighted by the object's own
/// spectrum: tau_eff = int r tau L(T_obj) / int r L(T_obj), in [0, 1], with tau(lambda)
/// from the water-vapour continuum model (valid for bands inside 8-14 um). The value to
/// put in `bt_scene.atm_transmittance`.
///
/// `air_k` the air temperature, `relative_humidity` a fraction in [0, 1], `pressure_hpa`
/// in [500, 1100], `distance_m` >= 0 (0 gives 1), `object_k` the object temperature. The
/// vapour pressure is e = RH f(p) e_w(T): the CIMO Magnus saturation pressure e_w times the
/// enhancement factor f(p) = 1.0016 + 3.15e-6 p - 0.074/p of moist air (p in hPa).
///
/// Accuracy: relative 1e-12 against quadrature of the model, thick paths included (the
/// quadrature is sized by the optical depth as well as by the Planck variable; checked on
/// 2-5 km of saturated air up to 60 C, energy and photon detectors). The model's own
/// error is larger; see the crate's atmosphere docs.
/// Errors: the band's errors (as `bt_band_radiance`), `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_AIR_TEMPERATURE_OUT_OF_RANGE`,
/// `BT_STATUS_RELATIVE_HUMIDITY_OUT_OF_RANGE`, `BT_STATUS_AIR_PRESSURE_OUT_OF_RANGE`,
/// `BT_STATUS_DISTANCE_NEGATIVE`, `BT_STATUS_OUTSIDE_CONTINUUM_MODEL` for a band
/// reaching outside 8-14 um, `BT_STATUS_RADIANCE_UNDERFLOW`, `BT_STATUS_PATH_OPAQUE` when
/// nothing of the object's radiance gets through (the transmitted integral underflows).
///
/// # Safety
/// `band` as in `bt_band_radiance`; `out` null or valid for writing a double; written
/// only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_path_band_transmittance(
    band: *const bt_band,
    air_k: f64,
    relative_humidity: f64,
    pressure_hpa: f64,
    distance_m: f64,
    object_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            let band = band_from_c(band)?;
            let path = continuum_path(air_k, relative_humidity, pressure_hpa, distance_m)?;
            PathTransmittance::Continuum(path).band_transmittance(&band, object_k)
        })
    }
}

/// Spectral transmittance tau(lambda) = exp(-k w) in (0, 1] of a horizontal air path at
/// `wavelength_um` (8-14 um), the water-vapour continuum model; arguments as
/// `bt_path_band_transmittance` (the same enhancement factor f(p) on the vapour pressure).
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`, the air's and path's
/// errors (as `bt_path_band_transmittance`), `BT_STATUS_OUTSIDE_CONTINUUM_MODEL` outside
/// 8-14 um, `BT_STATUS_PATH_OPAQUE` when exp(-k w) underflows (an optical depth above about
/// 745, e.g. thousands of km of humid air): a success is never 0.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_path_spectral_transmittance(
    air_k: f64,
    relative_humidity: f64,
    pressure_hpa: f64,
    distance_m: f64,
    wavelength_um: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee on `out` is that of `deliver`.
    unsafe {
        deliver(out, || {
            continuum_path(air_k, relative_humidity, pressure_hpa, distance_m)?
                .spectral_transmittance(wavelength_um)
        })
    }
}
