//! Multi-wavelength pyrometry through the C ABI (`bandtemp::multiwavelength`).

use super::band::{band_from_c, bt_band};
use super::{bt_status, check_buffer, deliver, deliver2, slice_from_c, Output};
use bandtemp::band::Band;
use bandtemp::multiwavelength::{fit, noise_gain, EmissivityModel, MAX_BANDS, MAX_TERMS};
use bandtemp::planck::Detector;
use bandtemp::{Error, Result};

/// Most bands a multi-wavelength fit holds.
pub const BT_MULTIWAVELENGTH_MAX_BANDS: usize = 16;
const _: () = assert!(BT_MULTIWAVELENGTH_MAX_BANDS == MAX_BANDS);
/// Most coefficients of the ln-emissivity polynomial (0 known, 1 grey, 2 linear,
/// 3 quadratic).
pub const BT_MULTIWAVELENGTH_MAX_TERMS: usize = 3;
const _: () = assert!(BT_MULTIWAVELENGTH_MAX_TERMS == MAX_TERMS);

/// The result of `bt_multiwavelength_fit`.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_multiwavelength_result {
    /// Temperature, K.
    pub temperature_k: f64,
    /// Coefficients a_0.. of ln e = a_0 + a_1 lambda + a_2 lambda^2 (lambda in um; a_j in
    /// um^-j); unused ones are 0.
    pub coefficients: [f64; BT_MULTIWAVELENGTH_MAX_TERMS],
    /// Number of coefficients fitted.
    pub terms: u32,
    /// Gauss-Newton iterations used.
    pub iterations: u32,
    /// Noise gain: std(dT/T) per unit standard deviation of ln S in each band.
    pub noise_gain: f64,
    /// dT/T per unit coefficient of the first omitted term lambda^terms.
    pub bias_per_next_term: f64,
    /// RMS of the residuals in ln S.
    pub residual_rms: f64,
}

impl Output for bt_multiwavelength_result {
    fn finite(self) -> Result<Self> {
        let mut coefficients = self.coefficients;
        for c in &mut coefficients {
            *c = c.finite()?;
        }
        Ok(bt_multiwavelength_result {
            temperature_k: self.temperature_k.finite()?,
            coefficients,
            noise_gain: self.noise_gain.finite()?,
            bias_per_next_term: self.bias_per_next_term.finite()?,
            residual_rms: self.residual_rms.finite()?,
            ..self
        })
    }
}

/// Wien-linearised noise gain of `count` monochromatic channels at `wavelengths_um`, at
/// `temperature_k`, for an ln-emissivity polynomial of `terms` coefficients (0-3); also
/// the bias per unit omitted term.
///
/// Errors: `BT_STATUS_EMISSIVITY_MODEL_INVALID`, `BT_STATUS_TOO_FEW_BANDS`,
/// `BT_STATUS_TOO_MANY_BANDS`, `BT_STATUS_NON_FINITE`, `BT_STATUS_TEMPERATURE_NOT_POSITIVE`,
/// `BT_STATUS_WAVELENGTH_NOT_POSITIVE`, `BT_STATUS_MULTIWAVELENGTH_ILL_CONDITIONED`;
/// pointer errors.
///
/// # Safety
/// `wavelengths_um` null or valid for reading `count` doubles; `gain` and `bias` null or
/// valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_multiwavelength_noise_gain(
    wavelengths_um: *const f64,
    count: usize,
    temperature_k: f64,
    terms: u32,
    gain: *mut f64,
    bias: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `slice_from_c` and `deliver2`.
    unsafe {
        deliver2(gain, bias, || {
            let model = EmissivityModel::new(terms)?;
            noise_gain(slice_from_c(wavelengths_um, count)?, temperature_k, model)
        })
    }
}

/// Fits temperature and an ln-emissivity polynomial of `terms` coefficients (0-3) to the
/// signals of `count` bands (`bands[i]` with band radiance `signals[i]` in its units),
/// by least squares in ln S: a Wien-linearised start, then Gauss-Newton on the exact band
/// integrals.
///
/// Errors: `BT_STATUS_EMISSIVITY_MODEL_INVALID`, `BT_STATUS_TOO_FEW_BANDS` (count <
/// terms + 1), `BT_STATUS_TOO_MANY_BANDS` (count > 16), the bands' errors,
/// `BT_STATUS_NON_FINITE`, `BT_STATUS_RADIANCE_NOT_POSITIVE`,
/// `BT_STATUS_MULTIWAVELENGTH_ILL_CONDITIONED`, `BT_STATUS_MULTIWAVELENGTH_NOT_CONVERGED`;
/// pointer errors.
///
/// # Safety
/// `bands` null or valid for reading `count` `bt_band` (each as in `bt_band_radiance`);
/// `signals` null or valid for reading `count` doubles; `out` null or valid for writing a
/// `bt_multiwavelength_result`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_multiwavelength_fit(
    bands: *const bt_band,
    signals: *const f64,
    count: usize,
    terms: u32,
    out: *mut bt_multiwavelength_result,
) -> bt_status {
    // SAFETY: `bands` is checked as a buffer of `count` bands before any is read; each
    // element is then read by `band_from_c` (the caller guarantees the tables); the other
    // guarantees are those of `slice_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            let model = EmissivityModel::new(terms)?;
            if count > MAX_BANDS {
                return Err(Error::TooManyBands);
            }
            let signals = slice_from_c(signals, count)?;
            if count > 0 {
                check_buffer(bands, count)?;
            }
            let mut storage: [Band<'_>; MAX_BANDS] =
                [Band::rectangular(1.0, 2.0, Detector::Energy)?; MAX_BANDS];
            for (i, slot) in storage.iter_mut().enumerate().take(count) {
                *slot = band_from_c(bands.wrapping_add(i))?;
            }
            let used = storage.get(..count).ok_or(Error::TooManyBands)?;
            let f = fit(used, signals, model)?;
            Ok(bt_multiwavelength_result {
                temperature_k: f.temperature_k,
                coefficients: f.coefficients,
                terms,
                iterations: f.iterations,
                noise_gain: f.noise_gain,
                bias_per_next_term: f.bias_per_next_term,
                residual_rms: f.residual_rms,
            })
        })
    }
}
