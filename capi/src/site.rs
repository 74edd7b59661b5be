//! Site methods through the C ABI: the scene inputs a thermographer determines on site
//! (emissivity from a reference temperature or a reference coating, ASTM E1933 style;
//! reflected apparent temperature from a diffuse reflector, ASTM E1862 style).

use super::band::{band_from_c, bt_band};
use super::scene::{bt_scene, read_scene};
use super::{bt_status, deliver, deliver2};

/// Emissivity of a surface from its sensor radiance and its true temperature
/// `reference_k` (K, from a contact probe): the measurement equation is linear in e,
/// e = (S - W - tw ta L(Tr)) / (tw ta (L(Tref) - L(Tr))),
/// W = tw (1-ta) L(Ta) + rw L(Twr) + (1-tw-rw) L(Tw). The scene's emissivity is ignored
/// (it must still be a valid value in (0, 1]); every other input is used. An error dS in
/// the reading gives de = dS / (tw ta (L(Tref) - L(Tr))): keep the surface well away from
/// the reflected temperature. For an apparent reading, pass `bt_band_radiance` of it.
///
/// Accuracy: closed form over the band radiances (full double precision for a rectangular
/// band).
/// Errors: those of `bt_sensor_radiance`; `BT_STATUS_TEMPERATURE_NOT_POSITIVE` for the
/// reference; `BT_STATUS_EMISSIVITY_NOT_DETERMINED` when the surface is at the reflected
/// temperature (every emissivity gives the same signal);
/// `BT_STATUS_EMISSIVITY_READING_INCONSISTENT` when the result is outside (0, 1].
///
/// # Safety
/// `band` as in `bt_band_radiance`; `scene` null or valid for reading a `bt_scene`;
/// `emissivity` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_emissivity_from_reference(
    band: *const bt_band,
    scene: *const bt_scene,
    sensor_radiance: f64,
    reference_k: f64,
    emissivity: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `read_scene`, `deliver`.
    unsafe {
        deliver(emissivity, || {
            let band = band_from_c(band)?;
            read_scene(scene)?.emissivity_from_reference(&band, sensor_radiance, reference_k)
        })
    }
}

/// Emissivity of a surface from a reference coating (tape or paint of known emissivity
/// `coating_emissivity`) applied beside the spot: the coating's radiance gives the common
/// temperature T (the scene solved with e = `coating_emissivity`), then the surface's
/// emissivity follows as in `bt_emissivity_from_reference` at T. Both spots share the
/// scene's reflected temperature, air path and window; the scene's own emissivity is
/// ignored (it must still be valid). Writes the surface emissivity and T (K).
///
/// Errors: those of `bt_object_temperature` for the coating
/// (`BT_STATUS_EMISSIVITY_OUT_OF_RANGE` for a coating emissivity outside (0, 1],
/// `BT_STATUS_SIGNAL_BELOW_BACKGROUND`) and of `bt_emissivity_from_reference`.
///
/// # Safety
/// As `bt_emissivity_from_reference`; `emissivity` and `temperature_k` each null or valid
/// for writing a double; both written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_emissivity_from_reference_coating(
    band: *const bt_band,
    scene: *const bt_scene,
    surface_radiance: f64,
    coating_radiance: f64,
    coating_emissivity: f64,
    emissivity: *mut f64,
    temperature_k: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `read_scene`, `deliver2`.
    unsafe {
        deliver2(emissivity, temperature_k, || {
            let band = band_from_c(band)?;
            let found = read_scene(scene)?.emissivity_from_reference_coating(
                &band,
                surface_radiance,
                coating_radiance,
                coating_emissivity,
            )?;
            Ok((found.emissivity, found.temperature_k))
        })
    }
}

/// Reflected apparent temperature Tr, K, from the sensor radiance of a diffuse reflector
/// (crumpled aluminium foil, say) placed at the target in the same orientation:
/// L(Tr) = [ (S_f - W) / (tw ta) - ef L(Tf) ] / (1 - ef), Tr = L^-1(L(Tr)), with
/// `reflector_emissivity` ef in [0, 1) (0 for an ideal reflector) and its temperature
/// `reflector_k` Tf (K; matters only when ef > 0). The scene's emissivity and reflected
/// temperature are ignored (they must still be valid); air path and window are used.
///
/// Accuracy: closed form, then the band inversion (1e-12 T).
/// Errors: those of `bt_sensor_radiance`; `BT_STATUS_REFLECTOR_EMISSIVITY_OUT_OF_RANGE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE` for the reflector;
/// `BT_STATUS_REFLECTED_NOT_DETERMINED` when the reading is at or below what the
/// reflector's own emission, the air and the window give; the errors of
/// `bt_band_temperature`.
///
/// # Safety
/// As `bt_emissivity_from_reference`, with `reflected_k` the out-pointer.
#[no_mangle]
pub unsafe extern "C" fn bt_reflected_temperature_from_reflector(
    band: *const bt_band,
    scene: *const bt_scene,
    reflector_radiance: f64,
    reflector_emissivity: f64,
    reflector_k: f64,
    reflected_k: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `read_scene`, `deliver`.
    unsafe {
        deliver(reflected_k, || {
            let band = band_from_c(band)?;
            read_scene(scene)?.reflected_k_from_reflector(
                &band,
                reflector_radiance,
                reflector_emissivity,
                reflector_k,
            )
        })
    }
}
