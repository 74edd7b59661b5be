//! The measurement equation through the C ABI: `bt_scene`.

use super::band::{band_from_c, bt_band};
use super::{bt_status, deliver, read_input};
use bandtemp::scene::Scene;
use bandtemp::Result;

/// The scene of a measurement: the surface, its surroundings, the air and the window.
///
/// Measurement equation (grey in band), L(T) the blackbody band signal:
/// S = tw * [ ta * (e*L(T) + (1-e)*L(Tr)) + (1-ta)*L(Ta) ] + rw*L(Twr) + (1-tw-rw)*L(Tw).
/// No air path: `atm_transmittance` = 1; no window: `window_transmittance` = 1 and
/// `window_reflectance` = 0. Every temperature must be a valid positive kelvin value even
/// where its weight is zero (set unused ones to the ambient temperature).
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_scene {
    /// Emissivity e of the surface in the band, (0, 1].
    pub emissivity: f64,
    /// Reflected apparent temperature Tr, K.
    pub reflected_k: f64,
    /// Transmittance ta of the air path, (0, 1].
    pub atm_transmittance: f64,
    /// Temperature Ta of the air path, K.
    pub atm_k: f64,
    /// Transmittance tw of the window, (0, 1].
    pub window_transmittance: f64,
    /// Reflectance rw of the window, [0, 1), tw + rw <= 1.
    pub window_reflectance: f64,
    /// Temperature Tw of the window, K.
    pub window_k: f64,
    /// Temperature Twr the window reflects (the sensor side), K.
    pub window_reflected_k: f64,
}

/// Validates a `bt_scene` into a [`Scene`].
pub(super) fn scene_from_c(scene: &bt_scene) -> Result<Scene> {
    Scene::new(scene.emissivity, scene.reflected_k)?
        .with_atmosphere(scene.atm_transmittance, scene.atm_k)?
        .with_window(
            scene.window_transmittance,
            scene.window_reflectance,
            scene.window_k,
            scene.window_reflected_k,
        )
}

/// Reads and validates a `bt_scene`.
///
/// # Safety
/// `scene` is null or valid for reads of a `bt_scene`.
pub(super) unsafe fn read_scene(scene: *const bt_scene) -> Result<Scene> {
    // SAFETY: the caller's guarantee; `bt_scene` is doubles only.
    scene_from_c(&unsafe { read_input(scene) }?)
}

/// Sensor radiance S of an object at `object_k` in the scene (the measurement equation),
/// in band radiance units.
///
/// Errors: those of `bt_band_radiance`; for the scene `BT_STATUS_NULL_POINTER`,
/// `BT_STATUS_NON_FINITE`, `BT_STATUS_EMISSIVITY_OUT_OF_RANGE`,
/// `BT_STATUS_ATMOSPHERE_TRANSMITTANCE_OUT_OF_RANGE`,
/// `BT_STATUS_WINDOW_TRANSMITTANCE_OUT_OF_RANGE`, `BT_STATUS_WINDOW_REFLECTANCE_OUT_OF_RANGE`,
/// `BT_STATUS_WINDOW_SUM_EXCEEDS_ONE`, `BT_STATUS_TEMPERATURE_NOT_POSITIVE`.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `scene` null or valid for reading a `bt_scene`; `out`
/// null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_sensor_radiance(
    band: *const bt_band,
    scene: *const bt_scene,
    object_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `read_scene`, `deliver`.
    unsafe {
        deliver(out, || {
            let band = band_from_c(band)?;
            read_scene(scene)?.sensor_signal(&band, object_k)
        })
    }
}

/// True temperature of the object, K, from the sensor radiance S: solves the measurement
/// equation for L(T) = (S - B) / G (G = tw ta e, B the background) and inverts the band.
///
/// Errors: those of `bt_sensor_radiance` and `bt_band_temperature`, and
/// `BT_STATUS_SIGNAL_BELOW_BACKGROUND` when S is at or below what the reflections, air
/// and window alone give.
///
/// # Safety
/// As `bt_sensor_radiance`, with `object_k` the out-pointer.
#[no_mangle]
pub unsafe extern "C" fn bt_object_temperature(
    band: *const bt_band,
    scene: *const bt_scene,
    sensor_radiance: f64,
    object_k: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_sensor_radiance`.
    unsafe {
        deliver(object_k, || {
            let band = band_from_c(band)?;
            read_scene(scene)?.object_temperature(&band, sensor_radiance)
        })
    }
}

/// True temperature of the object, K, from the apparent temperature `apparent_k` the
/// instrument shows for emissivity 1 and no corrections: the sensor radiance is the band
/// radiance at `apparent_k`, then as `bt_object_temperature`.
///
/// Errors: those of `bt_band_radiance` at `apparent_k` and of `bt_object_temperature`.
///
/// # Safety
/// As `bt_sensor_radiance`, with `object_k` the out-pointer.
#[no_mangle]
pub unsafe extern "C" fn bt_object_temperature_from_apparent(
    band: *const bt_band,
    scene: *const bt_scene,
    apparent_k: f64,
    object_k: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_sensor_radiance`.
    unsafe {
        deliver(object_k, || {
            let band = band_from_c(band)?;
            read_scene(scene)?.object_temperature_from_apparent(&band, apparent_k)
        })
    }
}

/// Apparent temperature, K, the instrument shows (emissivity 1, no corrections) for an
/// object at `object_k` in the scene: the band inverse of `bt_sensor_radiance`. The
/// inverse of `bt_object_temperature_from_apparent`.
///
/// Errors: those of `bt_sensor_radiance` and `bt_band_temperature`.
///
/// # Safety
/// As `bt_sensor_radiance`, with `apparent_k` the out-pointer.
#[no_mangle]
pub unsafe extern "C" fn bt_apparent_temperature(
    band: *const bt_band,
    scene: *const bt_scene,
    object_k: f64,
    apparent_k: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_sensor_radiance`.
    unsafe {
        deliver(apparent_k, || {
            let band = band_from_c(band)?;
            read_scene(scene)?.apparent_temperature(&band, object_k)
        })
    }
}
