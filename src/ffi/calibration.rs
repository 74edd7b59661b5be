//! Sakuma-Hattori calibration curves through the C ABI.

use super::scene::read_scene;
use super::{bt_status, deliver, read_input};
use crate::band::SignalCurve;
use crate::calibration::SakumaHattori;
use crate::error::Result;

/// Sakuma-Hattori (Planck form) calibration parameters:
/// S(T) = C / (exp(c2 / (A T + B)) - 1), c2 = 14387.768775 um K.
///
/// Valid when A > 0 and C > 0 (and all finite); the curve is defined where A T + B > 0.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_sakuma_hattori {
    /// A, um (an effective wavelength).
    pub a_um: f64,
    /// B, um K (the drift of the effective wavelength with temperature).
    pub b_umk: f64,
    /// C, in the instrument's signal units.
    pub c: f64,
}

impl From<SakumaHattori> for bt_sakuma_hattori {
    fn from(curve: SakumaHattori) -> bt_sakuma_hattori {
        bt_sakuma_hattori {
            a_um: curve.a_um(),
            b_umk: curve.b_umk(),
            c: curve.c(),
        }
    }
}

/// Reads and validates Sakuma-Hattori parameters.
///
/// # Safety
/// `params` is null or valid for reads of a `bt_sakuma_hattori`.
unsafe fn read_curve(params: *const bt_sakuma_hattori) -> Result<SakumaHattori> {
    // SAFETY: the caller's guarantee; `bt_sakuma_hattori` is doubles only.
    let p = unsafe { read_input(params) }?;
    SakumaHattori::new(p.a_um, p.b_umk, p.c)
}

/// Signal of a blackbody at `temperature_k` on the calibration curve,
/// S = C / (exp(c2 / (A T + B)) - 1), in the curve's signal units.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_CALIBRATION_PARAMETER_INVALID`, `BT_STATUS_TEMPERATURE_NOT_POSITIVE`,
/// `BT_STATUS_CALIBRATION_OUT_OF_DOMAIN` where A T + B <= 0,
/// `BT_STATUS_RADIANCE_UNDERFLOW` where the signal underflows.
///
/// # Safety
/// `p` null or valid for reading a `bt_sakuma_hattori`; `out` null or valid for writing a
/// double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_sakuma_hattori_signal(
    p: *const bt_sakuma_hattori,
    temperature_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `read_curve` and `deliver`.
    unsafe { deliver(out, || read_curve(p)?.signal(temperature_k)) }
}

/// Temperature, K, whose signal on the calibration curve is `signal`, in closed form:
/// T = (c2 / ln(C / S + 1) - B) / A.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_CALIBRATION_PARAMETER_INVALID`, `BT_STATUS_RADIANCE_NOT_POSITIVE`,
/// `BT_STATUS_CALIBRATION_OUT_OF_DOMAIN` when the result is not a positive temperature.
///
/// # Safety
/// `p` as in `bt_sakuma_hattori_signal`; `temperature_k` null or valid for writing a
/// double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_sakuma_hattori_temperature(
    p: *const bt_sakuma_hattori,
    signal: f64,
    temperature_k: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_sakuma_hattori_signal`.
    unsafe { deliver(temperature_k, || read_curve(p)?.temperature(signal)) }
}

/// Instrument signal for an object at `object_k` in the scene, the measurement equation
/// over the calibration curve (L(T) replaced by S(T)), in the curve's signal units.
///
/// Errors: those of `bt_sakuma_hattori_signal` and of the scene (`bt_sensor_radiance`).
///
/// # Safety
/// `p` as in `bt_sakuma_hattori_signal`; `scene` null or valid for reading a `bt_scene`;
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_sakuma_hattori_sensor_signal(
    p: *const bt_sakuma_hattori,
    scene: *const super::bt_scene,
    object_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `read_curve`, `read_scene`, `deliver`.
    unsafe {
        deliver(out, || {
            let curve = read_curve(p)?;
            read_scene(scene)?.sensor_signal(&curve, object_k)
        })
    }
}

/// True temperature of the object, K, from the instrument signal in the scene: the
/// measurement equation solved over the calibration curve.
///
/// Errors: those of `bt_sakuma_hattori_sensor_signal` and `bt_sakuma_hattori_temperature`,
/// and `BT_STATUS_SIGNAL_BELOW_BACKGROUND`.
///
/// # Safety
/// As `bt_sakuma_hattori_sensor_signal`, with `object_k` the out-pointer.
#[no_mangle]
pub unsafe extern "C" fn bt_sakuma_hattori_object_temperature(
    p: *const bt_sakuma_hattori,
    scene: *const super::bt_scene,
    signal: f64,
    object_k: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_sakuma_hattori_sensor_signal`.
    unsafe {
        deliver(object_k, || {
            let curve = read_curve(p)?;
            read_scene(scene)?.object_temperature(&curve, signal)
        })
    }
}
