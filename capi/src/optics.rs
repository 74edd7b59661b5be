//! Spot size, minimum target, diffraction, MTF and size-of-source effect through the C
//! ABI (`bandtemp::optics`).

use super::band::{band_from_c, bt_band};
use super::{bt_status, deliver, slice_from_c, Output};
use bandtemp::optics::diffraction::{
    airy_encircled_energy, airy_radius_um, mtf, small_target_fraction, Mtf,
};
use bandtemp::optics::sse::{temperature_error_k, SseCorrection, SseTable};
use bandtemp::optics::{check_target, footprint_m, ifov_mrad, spot_diameter_m, TargetRule};
use bandtemp::Result;

/// `bt_target_check` rule: ISO 10878:2013, target >= the 99 % spot (distance / D:S).
pub const BT_TARGET_RULE_ISO10878: u32 = 0;
/// `bt_target_check` rule: "3 x 3 pixels", common practice with no standard behind it.
pub const BT_TARGET_RULE_THREE_BY_THREE: u32 = 1;
/// `bt_target_check` rule: Pusnik and Gersak 2021 (Sensors 21, 607), >= 10 x 10 pixels
/// with the central 3 x 3 averaged.
pub const BT_TARGET_RULE_PUSNIK_GERSAK: u32 = 2;

/// The outcome of `bt_target_check`.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_target_verdict {
    /// The rule applied (a `BT_TARGET_RULE_*` value).
    pub rule: u32,
    /// 1 when the target satisfies the rule, 0 when it does not.
    pub valid: u32,
    /// The smallest target the rule accepts at this distance, m.
    pub minimum_m: f64,
    /// Target size over `minimum_m` (>= 1 when valid).
    pub ratio: f64,
    /// Pixel footprints across the target (imager rules), or target over spot (ISO).
    pub across: f64,
}

impl Output for bt_target_verdict {
    fn finite(self) -> Result<Self> {
        Ok(bt_target_verdict {
            minimum_m: self.minimum_m.finite()?,
            ratio: self.ratio.finite()?,
            across: self.across.finite()?,
            ..self
        })
    }
}

/// The MTF of an imager at one spatial frequency (`bt_mtf_evaluate`).
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_mtf {
    /// Diffraction MTF of the circular aperture.
    pub diffraction: f64,
    /// Pixel MTF of a square pixel, 100 % fill factor.
    pub pixel: f64,
    /// Their product.
    pub system: f64,
}

impl From<Mtf> for bt_mtf {
    fn from(m: Mtf) -> bt_mtf {
        bt_mtf {
            diffraction: m.diffraction,
            pixel: m.pixel,
            system: m.system,
        }
    }
}

impl Output for bt_mtf {
    fn finite(self) -> Result<Self> {
        Ok(bt_mtf {
            diffraction: self.diffraction.finite()?,
            pixel: self.pixel.finite()?,
            system: self.system.finite()?,
        })
    }
}

/// A size-of-source correction (`bt_sse_correct`).
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_sse_correction {
    /// Exact relative signal error, (1 - sigma_meas)/(1 - sigma_cal) - 1.
    pub relative_signal: f64,
    /// First-order form sigma(d_cal) - sigma(d_meas).
    pub relative_signal_first_order: f64,
    /// The reading corrected to the calibration source size, K.
    pub corrected_k: f64,
    /// corrected_k minus the reading, K.
    pub correction_k: f64,
}

impl From<SseCorrection> for bt_sse_correction {
    fn from(c: SseCorrection) -> bt_sse_correction {
        bt_sse_correction {
            relative_signal: c.relative_signal,
            relative_signal_first_order: c.relative_signal_first_order,
            corrected_k: c.corrected_k,
            correction_k: c.correction_k,
        }
    }
}

impl Output for bt_sse_correction {
    fn finite(self) -> Result<Self> {
        Ok(bt_sse_correction {
            relative_signal: self.relative_signal.finite()?,
            relative_signal_first_order: self.relative_signal_first_order.finite()?,
            corrected_k: self.corrected_k.finite()?,
            correction_k: self.correction_k.finite()?,
        })
    }
}

/// Spot diameter at `distance_m` for a distance-to-spot ratio `distance_to_spot`:
/// distance / D:S, m.
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_OPTICS_GEOMETRY_INVALID` for a value that is
/// not positive; `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER` for `out`.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_spot_diameter_m(
    distance_m: f64,
    distance_to_spot: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe { deliver(out, || spot_diameter_m(distance_m, distance_to_spot)) }
}

/// Instantaneous field of view of one pixel, mrad: 2 atan(p / (2 f)), pitch p in um,
/// focal length f in mm.
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_OPTICS_GEOMETRY_INVALID`; pointer errors.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_ifov_mrad(
    pitch_um: f64,
    focal_length_mm: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe { deliver(out, || ifov_mrad(pitch_um, focal_length_mm)) }
}

/// Footprint of one pixel at `distance_m`: 2 D tan(IFOV/2), m.
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_OPTICS_GEOMETRY_INVALID`; pointer errors.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_footprint_m(
    distance_m: f64,
    ifov_mrad: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe { deliver(out, || footprint_m(distance_m, ifov_mrad)) }
}

/// Checks a target of diameter `target_m` at `distance_m` against `rule` (a
/// `BT_TARGET_RULE_*` value). `resolution` is the distance-to-spot ratio (99 % spot) for
/// `BT_TARGET_RULE_ISO10878`, the IFOV in mrad for the pixel rules.
///
/// Errors: `BT_STATUS_TARGET_RULE_INVALID` for another rule value, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TARGET_SIZE_NOT_POSITIVE`, `BT_STATUS_OPTICS_GEOMETRY_INVALID`; pointer
/// errors.
///
/// # Safety
/// `out` null or valid for writing a `bt_target_verdict`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_target_check(
    rule: u32,
    target_m: f64,
    distance_m: f64,
    resolution: f64,
    out: *mut bt_target_verdict,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe {
        deliver(out, || {
            let check = check_target(
                TargetRule::from_raw(rule)?,
                target_m,
                distance_m,
                resolution,
            )?;
            Ok(bt_target_verdict {
                rule,
                valid: u32::from(check.valid),
                minimum_m: check.minimum_m,
                ratio: check.ratio,
                across: check.across,
            })
        })
    }
}

/// Fraction of a point image's power within `radius_um` (Airy pattern):
/// 1 - J0(v)^2 - J1(v)^2, v = pi r / (lambda N).
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_OPTICS_GEOMETRY_INVALID` (negative radius,
/// wavelength or f-number not positive); pointer errors.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_airy_encircled_energy(
    radius_um: f64,
    wavelength_um: f64,
    f_number: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe {
        deliver(out, || {
            airy_encircled_energy(radius_um, wavelength_um, f_number)
        })
    }
}

/// The smallest radius, um, holding `fraction` (in (0, 1)) of the Airy pattern's power.
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_FRACTION_OUT_OF_RANGE`,
/// `BT_STATUS_OPTICS_GEOMETRY_INVALID`; pointer errors.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_airy_radius_um(
    fraction: f64,
    wavelength_um: f64,
    f_number: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe { deliver(out, || airy_radius_um(fraction, wavelength_um, f_number)) }
}

/// System MTF (diffraction x pixel) at `frequency_cy_mm` for pitch `pitch_um`, wavelength
/// `wavelength_um` and f-number `f_number`.
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_SPATIAL_FREQUENCY_NEGATIVE`,
/// `BT_STATUS_OPTICS_GEOMETRY_INVALID`; pointer errors.
///
/// # Safety
/// `out` null or valid for writing a `bt_mtf`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_mtf_evaluate(
    frequency_cy_mm: f64,
    pitch_um: f64,
    wavelength_um: f64,
    f_number: f64,
    out: *mut bt_mtf,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe {
        deliver(out, || {
            mtf(frequency_cy_mm, pitch_um, wavelength_um, f_number).map(bt_mtf::from)
        })
    }
}

/// Fraction of the full-field signal that the pixel centred on a small round target's
/// image receives (diffraction-limited optic, square pixel): how much a small target
/// reads low. `target_diameter_um` is the image diameter on the detector.
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_TARGET_SIZE_NOT_POSITIVE`,
/// `BT_STATUS_OPTICS_GEOMETRY_INVALID` (also for an image beyond 2000 lambda N in radius,
/// or pitch and image so large against lambda N that the work bound is exceeded);
/// pointer errors.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_small_target_fraction(
    target_diameter_um: f64,
    pitch_um: f64,
    wavelength_um: f64,
    f_number: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe {
        deliver(out, || {
            small_target_fraction(target_diameter_um, pitch_um, wavelength_um, f_number)
        })
    }
}

/// Size-of-source correction of a reading `apparent_k` taken on a source of `measured_mm`
/// by an instrument (band `band`) calibrated on a source of `calibration_mm`, from the
/// SSE curve sigma(d) in caller storage (`diameters_mm` increasing, `sigma` in [0, 1),
/// `len` >= 2 entries each; linear interpolation, no extrapolation).
///
/// Errors: the band's errors, `BT_STATUS_SSE_TABLE_INVALID`,
/// `BT_STATUS_SSE_DIAMETER_OUTSIDE_TABLE`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, the inversion's errors; pointer errors.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `diameters_mm` and `sigma` null or valid for reading
/// `len` doubles; `out` null or valid for writing a `bt_sse_correction`; written only on
/// success.
#[no_mangle]
pub unsafe extern "C" fn bt_sse_correct(
    band: *const bt_band,
    diameters_mm: *const f64,
    sigma: *const f64,
    len: usize,
    apparent_k: f64,
    calibration_mm: f64,
    measured_mm: f64,
    out: *mut bt_sse_correction,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `slice_from_c` and
    // `deliver`; the slices live for this call only.
    unsafe {
        deliver(out, || {
            let band = band_from_c(band)?;
            let table = SseTable::new(slice_from_c(diameters_mm, len)?, slice_from_c(sigma, len)?)?;
            table
                .correction(&band, apparent_k, calibration_mm, measured_mm)
                .map(bt_sse_correction::from)
        })
    }
}

/// First-order temperature error, K, of a relative signal error `relative_signal` at
/// `temperature_k` through the band's exact dL/dT: (dS/S) L / (dL/dT).
///
/// Errors: the band's errors, `BT_STATUS_NON_FINITE`, `BT_STATUS_TEMPERATURE_NOT_POSITIVE`;
/// pointer errors.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `out` null or valid for writing a double; written only
/// on success.
#[no_mangle]
pub unsafe extern "C" fn bt_sse_temperature_error_k(
    band: *const bt_band,
    temperature_k: f64,
    relative_signal: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            temperature_error_k(&band_from_c(band)?, temperature_k, relative_signal)
        })
    }
}
