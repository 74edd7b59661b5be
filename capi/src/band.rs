//! Spectral bands through the C ABI: `bt_band` and its band integrals and inversion.

use super::{bt_status, check_ptr, deliver, slice_from_c};
use bandtemp::band::{Band, SpectralTable};
use bandtemp::planck::Detector;
use bandtemp::Result;
use core::mem::size_of;
use core::ptr::addr_of;

/// The kind of detector, which sets what a band integral sums.
///
/// The library reads this field as an integer and validates it: any value other than 0
/// or 1 is `BT_STATUS_INVALID_DETECTOR`, never undefined behaviour.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum bt_detector {
    /// A thermal detector (microbolometer, thermopile): integrates spectral radiance,
    /// band radiance in W m^-2 sr^-1.
    Energy = 0,
    /// A quantum detector (InSb, InGaAs, Si, MCT): integrates photon spectral radiance,
    /// band radiance in photons s^-1 m^-2 sr^-1.
    Photon = 1,
}

// The detector field is read as an unsigned integer of the enum's size; C enums are
// 1, 2 or 4 bytes on every ABI Rust supports (1 with short enums).
const _: () = assert!(matches!(size_of::<bt_detector>(), 1 | 2 | 4));

/// A spectral band of an instrument: [lo_um, hi_um], a detector kind, and an optional
/// tabulated relative spectral response.
///
/// `response_len == 0` is a rectangular band (response 1 on [lo_um, hi_um]); the two
/// pointers are then ignored and may be NULL. Otherwise `response_um` and `response` each
/// point to `response_len` doubles: wavelengths (um, positive, strictly increasing) and
/// relative response (>= 0), linear between points and zero outside the table; the band
/// integrates over the overlap of [lo_um, hi_um] with the table's span. The library reads
/// the tables during the call only and never keeps the pointers.
#[repr(C)]
#[derive(Clone, Copy, Debug)]
pub struct bt_band {
    /// Lower band edge, um (> 0).
    pub lo_um: f64,
    /// Upper band edge, um (> lo_um).
    pub hi_um: f64,
    /// The detector kind.
    pub detector: bt_detector,
    /// Wavelengths of the response table, um; `response_len` entries.
    pub response_um: *const f64,
    /// Relative spectral response at `response_um`; `response_len` entries.
    pub response: *const f64,
    /// Number of points in the response table; 0 for a rectangular band.
    pub response_len: usize,
}

/// Reads and validates a `bt_band` into a [`Band`] borrowing the caller's tables.
///
/// The struct is read field by field through raw places (no reference to it is formed)
/// and the detector as an integer, so any bit pattern in it is defined behaviour.
///
/// # Safety
/// `band` is null or valid for reads of a `bt_band`, whose tables (when `response_len` >
/// 0) are valid for reads of `response_len` doubles and outlive `'a`.
pub(super) unsafe fn band_from_c<'a>(band: *const bt_band) -> Result<Band<'a>> {
    check_ptr(band)?;
    // SAFETY: `band` is non-null and aligned (checked) and valid for reads (caller). Each
    // read is of one field of a plain type (doubles, pointers, usize, and the detector as
    // an unsigned integer of the enum's exact size), every bit pattern of which is valid.
    let (lo_um, hi_um, raw_detector, response_um, response, response_len) = unsafe {
        let detector = addr_of!((*band).detector);
        let raw_detector = match size_of::<bt_detector>() {
            1 => u32::from(detector.cast::<u8>().read()),
            2 => u32::from(detector.cast::<u16>().read()),
            _ => detector.cast::<u32>().read(),
        };
        (
            addr_of!((*band).lo_um).read(),
            addr_of!((*band).hi_um).read(),
            raw_detector,
            addr_of!((*band).response_um).read(),
            addr_of!((*band).response).read(),
            addr_of!((*band).response_len).read(),
        )
    };
    let detector = Detector::from_raw(raw_detector)?;
    if response_len == 0 {
        return Band::rectangular(lo_um, hi_um, detector);
    }
    // SAFETY: the caller guarantees both tables hold `response_len` doubles for `'a`.
    let (wavelengths_um, values) = unsafe {
        (
            slice_from_c(response_um, response_len)?,
            slice_from_c(response, response_len)?,
        )
    };
    Band::with_response(
        lo_um,
        hi_um,
        detector,
        SpectralTable::new(wavelengths_um, values)?,
    )
}

/// Band radiance of a blackbody, L_band(T) = integral of r(lambda) L(lambda, T) dlambda
/// over the band: W m^-2 sr^-1 for an energy detector, photons s^-1 m^-2 sr^-1 for a
/// photon detector.
///
/// Accuracy: full double precision for a rectangular band (closed-form series); below
/// 1e-13 relative for a tabulated response.
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_INVALID_DETECTOR`, `BT_STATUS_INVALID_BAND`, the table errors
/// (`BT_STATUS_TABLE_*`), `BT_STATUS_BAND_EMPTY`, `BT_STATUS_TEMPERATURE_NOT_POSITIVE`,
/// `BT_STATUS_RADIANCE_UNDERFLOW`, `BT_STATUS_RADIANCE_OVERFLOW`.
///
/// # Safety
/// `band` is null or valid for reading a `bt_band` (and its tables, see `bt_band`); `out`
/// is null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_band_radiance(
    band: *const bt_band,
    temperature_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees on `band` and `out` are those of `band_from_c` and
    // `deliver`; the band borrows the tables only during this call.
    unsafe { deliver(out, || band_from_c(band)?.radiance(temperature_k)) }
}

/// Temperature derivative of the band radiance, dL_band/dT, in radiance units per kelvin
/// (the sensitivity of the band at T).
///
/// Errors as `bt_band_radiance`.
///
/// # Safety
/// As `bt_band_radiance`.
#[no_mangle]
pub unsafe extern "C" fn bt_band_radiance_derivative(
    band: *const bt_band,
    temperature_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_band_radiance`.
    unsafe {
        deliver(out, || {
            band_from_c(band)?.radiance_derivative(temperature_k)
        })
    }
}

/// The blackbody temperature whose band radiance equals `radiance` (the apparent, or
/// radiance, temperature), K: the inverse of `bt_band_radiance`.
///
/// Safeguarded Newton iteration over 0.1 K to 1e6 K; |T - T(L(T))| below 1e-12 T.
/// Errors: those of `bt_band_radiance` for the band, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_RADIANCE_NOT_POSITIVE`, `BT_STATUS_RADIANCE_SUBNORMAL`,
/// `BT_STATUS_RADIANCE_OUT_OF_RANGE`, `BT_STATUS_NOT_CONVERGED`.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `temperature_k` is null or valid for writing a double;
/// written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_band_temperature(
    band: *const bt_band,
    radiance: f64,
    temperature_k: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_band_radiance`.
    unsafe { deliver(temperature_k, || band_from_c(band)?.temperature(radiance)) }
}
