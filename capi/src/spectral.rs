//! Spectral (non-grey) scenes through the C ABI: tabulated emissivity and air
//! transmittance, integrated with the band's response.

use super::band::{band_from_c, bt_band};
use super::scene::{bt_scene, read_scene};
use super::{bt_status, deliver, read_input, slice_from_c};
use bandtemp::band::SpectralTable;
use bandtemp::scene::SpectralScene;
use bandtemp::Result;

/// The tables of a spectral (non-grey) scene: emissivity e(lambda) and air-path
/// transmittance ta(lambda), each a table of wavelengths (um, positive, strictly
/// increasing) and values in [0, 1], linear between points. Each table must cover the
/// whole band (a table reads zero outside its span, which would silently make the surface
/// a perfect reflector there, so a short table is an error). A length of 0 keeps the
/// scene's grey value (`bt_scene.emissivity` or `bt_scene.atm_transmittance`) and accepts
/// NULL pointers. The air path emits (1 - ta(lambda)) L(lambda, Ta) at
/// `bt_scene.atm_k`; the window stays grey.
///
/// Measurement equation, r the band's response:
/// S = tw * integral r [ ta e L(T) + ta (1-e) L(Tr) + (1-ta) L(Ta) ] dlambda
///     + rw Lb(Twr) + (1-tw-rw) Lb(Tw).
#[repr(C)]
#[derive(Clone, Copy, Debug)]
pub struct bt_spectral_tables {
    /// Wavelengths of the emissivity table, um; `emissivity_len` entries.
    pub emissivity_um: *const f64,
    /// Emissivity at `emissivity_um`, each in [0, 1].
    pub emissivity: *const f64,
    /// Points in the emissivity table; 0 for the grey `bt_scene.emissivity`.
    pub emissivity_len: usize,
    /// Wavelengths of the transmittance table, um; `transmittance_len` entries.
    pub transmittance_um: *const f64,
    /// Air-path transmittance at `transmittance_um`, each in [0, 1].
    pub transmittance: *const f64,
    /// Points in the transmittance table; 0 for the grey `bt_scene.atm_transmittance`.
    pub transmittance_len: usize,
}

/// Reads a band, a scene and the tables into a [`SpectralScene`] borrowing the caller's
/// tables.
///
/// # Safety
/// As `band_from_c` and `read_scene`; `tables` null or valid for reads of a
/// `bt_spectral_tables` whose tables hold their lengths' doubles for `'a`.
unsafe fn spectral_from_c<'a>(
    band: *const bt_band,
    scene: *const bt_scene,
    tables: *const bt_spectral_tables,
) -> Result<SpectralScene<'a>> {
    // SAFETY: the caller's guarantees; `bt_spectral_tables` is pointers and lengths, every
    // bit pattern of which is a valid value (the pointers are checked before use).
    let (band, scene, t) = unsafe { (band_from_c(band)?, read_scene(scene)?, read_input(tables)?) };
    let mut spectral = SpectralScene::new(band, scene)?;
    if t.emissivity_len > 0 {
        // SAFETY: the caller guarantees both arrays hold `emissivity_len` doubles for 'a.
        let (wavelengths_um, values) = unsafe {
            (
                slice_from_c(t.emissivity_um, t.emissivity_len)?,
                slice_from_c(t.emissivity, t.emissivity_len)?,
            )
        };
        spectral =
            spectral.with_spectral_emissivity(SpectralTable::new(wavelengths_um, values)?)?;
    }
    if t.transmittance_len > 0 {
        // SAFETY: as above, for `transmittance_len`.
        let (wavelengths_um, values) = unsafe {
            (
                slice_from_c(t.transmittance_um, t.transmittance_len)?,
                slice_from_c(t.transmittance, t.transmittance_len)?,
            )
        };
        spectral = spectral
            .with_spectral_atmosphere(SpectralTable::new(wavelengths_um, values)?, scene.atm_k())?;
    }
    Ok(spectral)
}

/// Sensor radiance S of an object at `object_k` (K) in a spectral scene, band-radiance
/// units (the equation at `bt_spectral_tables`).
///
/// Accuracy: each band integral is Gauss-Legendre with panel edges at every table node,
/// relative error below 1e-13 (checked against mpmath quadrature in
/// `tests/scene_reference.rs` and scipy in `capi/tests/python/ctypes_check.py`).
/// Errors: those of `bt_sensor_radiance`; for the tables `BT_STATUS_NULL_POINTER`,
/// `BT_STATUS_INVALID_BUFFER`, the table errors (`BT_STATUS_TABLE_*`),
/// `BT_STATUS_SPECTRAL_TABLE_DOES_NOT_COVER_BAND`,
/// `BT_STATUS_SPECTRAL_EMISSIVITY_OUT_OF_RANGE`,
/// `BT_STATUS_SPECTRAL_TRANSMITTANCE_OUT_OF_RANGE` for a value above 1,
/// `BT_STATUS_OBJECT_NOT_VISIBLE` when response x ta x e is zero over the band.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `scene` null or valid for reading a `bt_scene`;
/// `tables` null or valid for reading a `bt_spectral_tables` (and its tables); `out` null
/// or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_spectral_sensor_radiance(
    band: *const bt_band,
    scene: *const bt_scene,
    tables: *const bt_spectral_tables,
    object_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `spectral_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            spectral_from_c(band, scene, tables)?.sensor_signal(object_k)
        })
    }
}

/// Object temperature, K, from the sensor radiance in a spectral scene: solves
/// tw integral r ta e L(T) = S - B by safeguarded Newton (within about 1e-12 T of the
/// tabulated equation's solution).
///
/// Errors: those of `bt_spectral_sensor_radiance`, `BT_STATUS_SIGNAL_BELOW_BACKGROUND`
/// when S is at or below what reflections, path and window alone give,
/// `BT_STATUS_RADIANCE_SUBNORMAL`, `BT_STATUS_RADIANCE_OUT_OF_RANGE`,
/// `BT_STATUS_NOT_CONVERGED`.
///
/// # Safety
/// As `bt_spectral_sensor_radiance`, with `object_k` the out-pointer.
#[no_mangle]
pub unsafe extern "C" fn bt_spectral_object_temperature(
    band: *const bt_band,
    scene: *const bt_scene,
    tables: *const bt_spectral_tables,
    sensor_radiance: f64,
    object_k: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_spectral_sensor_radiance`.
    unsafe {
        deliver(object_k, || {
            spectral_from_c(band, scene, tables)?.object_temperature(sensor_radiance)
        })
    }
}

/// Object temperature, K, from an apparent (blackbody-equivalent) temperature
/// `apparent_k` in a spectral scene: S = Lb(T_app), then as
/// `bt_spectral_object_temperature`.
///
/// Errors: those of `bt_band_radiance` for `apparent_k` and of
/// `bt_spectral_object_temperature`.
///
/// # Safety
/// As `bt_spectral_sensor_radiance`, with `object_k` the out-pointer.
#[no_mangle]
pub unsafe extern "C" fn bt_spectral_object_temperature_from_apparent(
    band: *const bt_band,
    scene: *const bt_scene,
    tables: *const bt_spectral_tables,
    apparent_k: f64,
    object_k: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_spectral_sensor_radiance`.
    unsafe {
        deliver(object_k, || {
            spectral_from_c(band, scene, tables)?.object_temperature_from_apparent(apparent_k)
        })
    }
}
