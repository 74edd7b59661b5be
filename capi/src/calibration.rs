//! Sakuma-Hattori calibration curves through the C ABI.

use super::band::{band_from_c, bt_band};
use super::scene::read_scene;
use super::{bt_status, check_ptr, deliver, deliver2, read_input, slice_from_c, Output};
use bandtemp::band::SignalCurve;
use bandtemp::calibration::{
    fit_band, fit_band_with, fit_points, fit_points_with, OffsetCurve, SakumaHattori,
    SakumaHattoriWien,
};
use bandtemp::{Error, Result};
use core::ffi::c_int;
use core::mem::size_of;
use core::ptr::addr_of;

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

impl Output for bt_sakuma_hattori {
    fn finite(self) -> Result<bt_sakuma_hattori> {
        Ok(bt_sakuma_hattori {
            a_um: self.a_um.finite()?,
            b_umk: self.b_umk.finite()?,
            c: self.c.finite()?,
        })
    }
}

/// The full report of a Sakuma-Hattori fit to blackbody readings.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_points_fit {
    /// The fitted curve.
    pub params: bt_sakuma_hattori,
    /// Covariance of (A um, B um K, C signal units), rows and columns in that order; first
    /// order. Without signal uncertainties it is estimated from the scatter of the
    /// temperature residuals, and with exactly three points every entry is NaN (no scatter
    /// to estimate it from).
    pub covariance: [[f64; 3]; 3],
    /// max |T_fit(S_i) - T_i| over the points, K.
    pub max_residual_k: f64,
    /// sqrt(mean (T_fit(S_i) - T_i)^2) over the points, K.
    pub rms_residual_k: f64,
    /// Levenberg-Marquardt iterations used.
    pub iterations: u32,
}

impl Output for bt_points_fit {
    /// Parameters and residuals must be finite; the covariance may hold NaN (documented:
    /// three points without uncertainties) but no infinity.
    fn finite(self) -> Result<bt_points_fit> {
        if self.covariance.iter().flatten().any(|x| x.is_infinite()) {
            return Err(Error::CalibrationIllConditioned);
        }
        Ok(bt_points_fit {
            params: self.params.finite()?,
            max_residual_k: self.max_residual_k.finite()?,
            rms_residual_k: self.rms_residual_k.finite()?,
            ..self
        })
    }
}

/// Reads and validates Sakuma-Hattori parameters.
///
/// # Safety
/// `params` is null or valid for reads of a `bt_sakuma_hattori`.
pub(super) unsafe fn read_curve(params: *const bt_sakuma_hattori) -> Result<SakumaHattori> {
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
/// `BT_STATUS_CALIBRATION_OUT_OF_DOMAIN` when the result is not a positive temperature,
/// `BT_STATUS_RADIANCE_OVERFLOW` for a signal so near the largest double that the curve's
/// signal at the result would overflow.
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

/// Fits the Sakuma-Hattori curve to a band's exact radiance over [t_lo_k, t_hi_k]: the
/// calibration curve an ideal instrument with this band would have. C comes out in band
/// radiance units.
///
/// `max_error_k` receives max |T_fit(L_band(T)) - T| over the range, K, measured against
/// the exact band integral.
/// Errors: those of `bt_band_radiance` for the band, `BT_STATUS_NULL_POINTER`,
/// `BT_STATUS_NON_FINITE`, `BT_STATUS_CALIBRATION_RANGE_INVALID` unless
/// 0 < t_lo_k < t_hi_k, `BT_STATUS_RADIANCE_UNDERFLOW` for a range too cold for the
/// band, `BT_STATUS_CALIBRATION_NOT_CONVERGED`, `BT_STATUS_CALIBRATION_OUT_OF_DOMAIN`.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `out` null or valid for writing a
/// `bt_sakuma_hattori`; `max_error_k` null or valid for writing a double; both written
/// only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_sakuma_hattori_fit_band(
    band: *const bt_band,
    t_lo_k: f64,
    t_hi_k: f64,
    out: *mut bt_sakuma_hattori,
    max_error_k: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver2`.
    unsafe {
        deliver2(out, max_error_k, || {
            let fit = fit_band(&band_from_c(band)?, t_lo_k, t_hi_k)?;
            Ok((fit.params.into(), fit.max_error_k))
        })
    }
}

/// Fits the Sakuma-Hattori curve to `n` >= 3 blackbody readings (`t_k[i]` in K,
/// `signal[i]` in the instrument's units) by least squares in temperature
/// (Levenberg-Marquardt). Points may come in any order.
///
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`,
/// `BT_STATUS_CALIBRATION_TOO_FEW_POINTS` for n < 3,
/// `BT_STATUS_CALIBRATION_TOO_MANY_POINTS` for n > 256 (bounds the fit's time),
/// `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_TEMPERATURE_NOT_POSITIVE`, `BT_STATUS_SIGNAL_AT_OR_BELOW_OFFSET` for a
/// signal <= 0, `BT_STATUS_CALIBRATION_DUPLICATE_TEMPERATURE`,
/// `BT_STATUS_CALIBRATION_SIGNAL_NOT_INCREASING`, `BT_STATUS_CALIBRATION_NOT_CONVERGED`,
/// `BT_STATUS_CALIBRATION_ILL_CONDITIONED`.
///
/// # Safety
/// `t_k` and `signal` null or valid for reading `n` doubles; `out` null or valid for
/// writing a `bt_sakuma_hattori`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_sakuma_hattori_fit_points(
    t_k: *const f64,
    signal: *const f64,
    n: usize,
    out: *mut bt_sakuma_hattori,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `slice_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            let (temperatures_k, signals) = points(t_k, signal, n)?;
            Ok(fit_points(temperatures_k, signals, None)?.params.into())
        })
    }
}

/// As `bt_sakuma_hattori_fit_points`, with optional signal standard uncertainties and the
/// full report. With `signal_u` (n positive doubles, signal units) the fit is the
/// maximum-likelihood fit in signal, sum ((S_fit(T_i) - S_i) / u_i)^2; with NULL, least
/// squares in temperature.
///
/// Errors: those of `bt_sakuma_hattori_fit_points`, and
/// `BT_STATUS_CALIBRATION_UNCERTAINTY_INVALID` for an uncertainty that is not positive.
///
/// # Safety
/// `t_k`, `signal` and (unless NULL) `signal_u` valid for reading `n` doubles; `out` null
/// or valid for writing a `bt_points_fit`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_sakuma_hattori_fit_points_report(
    t_k: *const f64,
    signal: *const f64,
    signal_u: *const f64,
    n: usize,
    out: *mut bt_points_fit,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `slice_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            let (temperatures_k, signals) = points(t_k, signal, n)?;
            let uncertainties = if signal_u.is_null() {
                None
            } else {
                Some(slice_from_c(signal_u, n)?)
            };
            let fit = fit_points(temperatures_k, signals, uncertainties)?;
            Ok(bt_points_fit {
                params: fit.params.into(),
                covariance: fit.covariance,
                max_residual_k: fit.max_residual_k,
                rms_residual_k: fit.rms_residual_k,
                iterations: fit.iterations,
            })
        })
    }
}

/// The two arrays of a points fit. A count of 0 accepts NULL and leaves the fit to report
/// too few points.
///
/// # Safety
/// As `slice_from_c` for each array.
unsafe fn points<'a>(
    t_k: *const f64,
    signal: *const f64,
    n: usize,
) -> Result<(&'a [f64], &'a [f64])> {
    // SAFETY: the caller's guarantee.
    unsafe { Ok((slice_from_c(t_k, n)?, slice_from_c(signal, n)?)) }
}

// ---- calibration curves of either form, behind a dark offset -------------------------------

/// The form of a calibration curve. Read as an integer and validated: any value other than
/// 0 or 1 is `BT_STATUS_INVALID_CURVE_FORM`, never undefined behaviour.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum bt_curve_form {
    /// Sakuma-Hattori, Planck form: S(T) = C / (exp(c2 / (A T + B)) - 1). The default;
    /// right at any wavelength.
    Planck = 0,
    /// Sakuma-Hattori, Wien form: S(T) = C exp(-c2 / (A T + B)). For short-wavelength
    /// pyrometers only (lambda T below about 3000 um K); not for thermal imagers.
    Wien = 1,
}

// The form is read as an unsigned integer of the enum's size, as `bt_detector` is.
const _: () = assert!(matches!(size_of::<bt_curve_form>(), 1 | 2 | 4));

/// A calibration curve: the Sakuma-Hattori equation in either form, behind a dark offset:
/// the instrument reads S = `offset` + S_c(T), with S_c the curve of `form`
/// (c2 = 14387.768775 um K). `offset` = 0 for a curve without one.
///
/// Valid when A > 0, C > 0 and every number finite; the curve is defined where
/// A T + B > 0. The Wien form's inverse needs S - offset < C.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_curve {
    /// The form of S_c.
    pub form: bt_curve_form,
    /// A, um (an effective wavelength).
    pub a_um: f64,
    /// B, um K.
    pub b_umk: f64,
    /// C, signal units.
    pub c: f64,
    /// Dark offset (signal with the shutter closed), signal units; may be negative.
    pub offset: f64,
}

impl Output for bt_curve {
    fn finite(self) -> Result<bt_curve> {
        Ok(bt_curve {
            a_um: self.a_um.finite()?,
            b_umk: self.b_umk.finite()?,
            c: self.c.finite()?,
            offset: self.offset.finite()?,
            ..self
        })
    }
}

/// A validated `bt_curve`: the core's curve of either form behind its offset.
#[derive(Clone, Copy, Debug)]
enum Curve {
    Planck(OffsetCurve<SakumaHattori>),
    Wien(OffsetCurve<SakumaHattoriWien>),
}

impl SignalCurve for Curve {
    fn signal_and_derivative(&self, temperature_k: f64) -> Result<(f64, f64)> {
        match self {
            Curve::Planck(curve) => curve.signal_and_derivative(temperature_k),
            Curve::Wien(curve) => curve.signal_and_derivative(temperature_k),
        }
    }

    fn temperature(&self, signal: f64) -> Result<f64> {
        match self {
            Curve::Planck(curve) => curve.temperature(signal),
            Curve::Wien(curve) => curve.temperature(signal),
        }
    }
}

/// A curve form from the integer a C caller passed.
fn form_from_raw(raw: u32) -> Result<bt_curve_form> {
    match raw {
        0 => Ok(bt_curve_form::Planck),
        1 => Ok(bt_curve_form::Wien),
        _ => Err(Error::InvalidCurveForm),
    }
}

/// A curve form from a by-value `int` argument.
fn form_from_int(raw: c_int) -> Result<bt_curve_form> {
    u32::try_from(raw)
        .map_err(|_| Error::InvalidCurveForm)
        .and_then(form_from_raw)
}

/// Builds the core curve of `form`.
fn curve_from_parts(
    form: bt_curve_form,
    a_um: f64,
    b_umk: f64,
    c: f64,
    offset: f64,
) -> Result<Curve> {
    Ok(match form {
        bt_curve_form::Planck => Curve::Planck(OffsetCurve::new(
            SakumaHattori::new(a_um, b_umk, c)?,
            offset,
        )?),
        bt_curve_form::Wien => Curve::Wien(OffsetCurve::new(
            SakumaHattoriWien::new(a_um, b_umk, c)?,
            offset,
        )?),
    })
}

/// Reads and validates a `bt_curve`, field by field through raw places (no reference to it
/// is formed) and the form as an integer, so any bit pattern in it is defined behaviour.
///
/// # Safety
/// `curve` is null or valid for reads of a `bt_curve`.
unsafe fn read_any_curve(curve: *const bt_curve) -> Result<Curve> {
    check_ptr(curve)?;
    // SAFETY: non-null and aligned (checked), valid for reads (caller); each read is of
    // one field of a plain type (doubles, and the form as an unsigned integer of the
    // enum's exact size), every bit pattern of which is valid.
    let (raw_form, a_um, b_umk, c, offset) = unsafe {
        let form = addr_of!((*curve).form);
        let raw_form = match size_of::<bt_curve_form>() {
            1 => u32::from(form.cast::<u8>().read()),
            2 => u32::from(form.cast::<u16>().read()),
            _ => form.cast::<u32>().read(),
        };
        (
            raw_form,
            addr_of!((*curve).a_um).read(),
            addr_of!((*curve).b_umk).read(),
            addr_of!((*curve).c).read(),
            addr_of!((*curve).offset).read(),
        )
    };
    curve_from_parts(form_from_raw(raw_form)?, a_um, b_umk, c, offset)
}

/// Signal of a blackbody at `temperature_k` on the curve, S = offset + S_c(T), signal
/// units: S_c = C / (exp(c2/(A T + B)) - 1) (Planck form) or C exp(-c2/(A T + B)) (Wien).
///
/// Accuracy: a few ulp (one exp or expm1 and a division).
/// Errors: `BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`,
/// `BT_STATUS_INVALID_CURVE_FORM`, `BT_STATUS_NON_FINITE`,
/// `BT_STATUS_CALIBRATION_PARAMETER_INVALID`, `BT_STATUS_TEMPERATURE_NOT_POSITIVE`,
/// `BT_STATUS_CALIBRATION_OUT_OF_DOMAIN` where A T + B <= 0,
/// `BT_STATUS_RADIANCE_UNDERFLOW` where S_c underflows.
///
/// # Safety
/// `curve` null or valid for reading a `bt_curve`; `out` null or valid for writing a
/// double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_curve_signal(
    curve: *const bt_curve,
    temperature_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `read_any_curve` and `deliver`.
    unsafe { deliver(out, || read_any_curve(curve)?.signal(temperature_k)) }
}

/// Temperature, K, whose signal on the curve is `signal`, in closed form:
/// T = (c2 / ln(C/(S - offset) + 1) - B) / A (Planck form) or
/// T = (c2 / ln(C/(S - offset)) - B) / A (Wien form).
///
/// Accuracy: a few ulp of the closed form. Errors: those of `bt_curve_signal` for the
/// curve, `BT_STATUS_SIGNAL_AT_OR_BELOW_OFFSET` for S <= offset,
/// `BT_STATUS_CALIBRATION_OUT_OF_DOMAIN` when the result is not a positive temperature
/// (in the Wien form also for S - offset >= C).
///
/// # Safety
/// As `bt_curve_signal`, with `temperature_k` the out-pointer.
#[no_mangle]
pub unsafe extern "C" fn bt_curve_temperature(
    curve: *const bt_curve,
    signal: f64,
    temperature_k: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_curve_signal`.
    unsafe { deliver(temperature_k, || read_any_curve(curve)?.temperature(signal)) }
}

/// Instrument signal for an object at `object_k` in the scene: the measurement equation
/// with L(T) replaced by the curve's S(T) (the offset enters once, since the weights sum
/// to 1), signal units.
///
/// Errors: those of `bt_curve_signal` and of the scene (`bt_sensor_radiance`).
///
/// # Safety
/// `curve` as in `bt_curve_signal`; `scene` null or valid for reading a `bt_scene`; `out`
/// null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_curve_sensor_signal(
    curve: *const bt_curve,
    scene: *const super::bt_scene,
    object_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `read_any_curve`, `read_scene`,
    // `deliver`.
    unsafe {
        deliver(out, || {
            let curve = read_any_curve(curve)?;
            read_scene(scene)?.sensor_signal(&curve, object_k)
        })
    }
}

/// True temperature of the object, K, from the instrument signal in the scene: the
/// measurement equation solved over the curve (as `bt_object_temperature`, within 1e-12 T).
///
/// Errors: those of `bt_curve_sensor_signal` and `bt_curve_temperature`, and
/// `BT_STATUS_SIGNAL_BELOW_BACKGROUND`.
///
/// # Safety
/// As `bt_curve_sensor_signal`, with `object_k` the out-pointer.
#[no_mangle]
pub unsafe extern "C" fn bt_curve_object_temperature(
    curve: *const bt_curve,
    scene: *const super::bt_scene,
    signal: f64,
    object_k: *mut f64,
) -> bt_status {
    // SAFETY: as in `bt_curve_sensor_signal`.
    unsafe {
        deliver(object_k, || {
            let curve = read_any_curve(curve)?;
            read_scene(scene)?.object_temperature(&curve, signal)
        })
    }
}

/// Fits a curve of `form` (a `bt_curve_form` value: `BT_CURVE_FORM_PLANCK` or
/// `BT_CURVE_FORM_WIEN`) to a band's exact radiance over [t_lo_k, t_hi_k]; `out->offset`
/// is 0 and C is in band-radiance units. `max_error_k` receives
/// max |T_fit(L_band(T)) - T| over 2001 temperatures of the range, measured against the
/// exact band integral (for example 14 uK for 0.645-0.655 um over 700-1400 K, Planck form).
///
/// Errors: `BT_STATUS_INVALID_CURVE_FORM`, and those of `bt_sakuma_hattori_fit_band`.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `out` null or valid for writing a `bt_curve`;
/// `max_error_k` null or valid for writing a double; both written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_curve_fit_band(
    form: c_int,
    band: *const bt_band,
    t_lo_k: f64,
    t_hi_k: f64,
    out: *mut bt_curve,
    max_error_k: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver2`.
    unsafe {
        deliver2(out, max_error_k, || {
            let form = form_from_int(form)?;
            let band = band_from_c(band)?;
            Ok(match form {
                bt_curve_form::Planck => {
                    let fit = fit_band_with::<SakumaHattori>(&band, t_lo_k, t_hi_k)?;
                    let p = fit.params;
                    (
                        curve_out(form, p.a_um(), p.b_umk(), p.c(), 0.0),
                        fit.max_error_k,
                    )
                }
                bt_curve_form::Wien => {
                    let fit = fit_band_with::<SakumaHattoriWien>(&band, t_lo_k, t_hi_k)?;
                    let p = fit.params;
                    (
                        curve_out(form, p.a_um(), p.b_umk(), p.c(), 0.0),
                        fit.max_error_k,
                    )
                }
            })
        })
    }
}

/// The report of a curve fitted to blackbody readings.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_curve_fit {
    /// The fitted curve, with the dark offset it was fitted behind.
    pub curve: bt_curve,
    /// Covariance of (A um, B um K, C signal units), rows and columns in that order; first
    /// order. Without signal uncertainties it is estimated from the scatter of the
    /// temperature residuals, and with exactly three points every entry is NaN.
    pub covariance: [[f64; 3]; 3],
    /// max |T_fit(S_i) - T_i| over the points, K.
    pub max_residual_k: f64,
    /// sqrt(mean (T_fit(S_i) - T_i)^2) over the points, K.
    pub rms_residual_k: f64,
    /// Levenberg-Marquardt iterations used.
    pub iterations: u32,
}

impl Output for bt_curve_fit {
    /// As for `bt_points_fit`: the covariance may hold NaN (three points, no
    /// uncertainties) but no infinity.
    fn finite(self) -> Result<bt_curve_fit> {
        if self.covariance.iter().flatten().any(|x| x.is_infinite()) {
            return Err(Error::CalibrationIllConditioned);
        }
        Ok(bt_curve_fit {
            curve: self.curve.finite()?,
            max_residual_k: self.max_residual_k.finite()?,
            rms_residual_k: self.rms_residual_k.finite()?,
            ..self
        })
    }
}

fn curve_out(form: bt_curve_form, a_um: f64, b_umk: f64, c: f64, offset: f64) -> bt_curve {
    bt_curve {
        form,
        a_um,
        b_umk,
        c,
        offset,
    }
}

/// Fits a curve of `form` (`BT_CURVE_FORM_PLANCK` or `BT_CURVE_FORM_WIEN`) to `n` >= 3
/// blackbody readings (`t_k[i]` K, `signal[i]` signal units) behind a known
/// `dark_offset`: the curve is fitted to `signal[i] - dark_offset` by Levenberg-Marquardt,
/// in temperature without `signal_u` (NULL), or by maximum likelihood in signal with the
/// signals' standard uncertainties `signal_u` (n positive doubles). `out->curve.offset`
/// is `dark_offset`. Exact data from a curve of the form are recovered to below 1 uK.
///
/// Errors: `BT_STATUS_INVALID_CURVE_FORM`, those of
/// `bt_sakuma_hattori_fit_points_report`, `BT_STATUS_NON_FINITE` for the offset and
/// `BT_STATUS_SIGNAL_AT_OR_BELOW_OFFSET` for a signal at or below it.
///
/// # Safety
/// `t_k`, `signal` and (unless NULL) `signal_u` valid for reading `n` doubles; `out` null
/// or valid for writing a `bt_curve_fit`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_curve_fit_points(
    form: c_int,
    t_k: *const f64,
    signal: *const f64,
    signal_u: *const f64,
    n: usize,
    dark_offset: f64,
    out: *mut bt_curve_fit,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `slice_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            let form = form_from_int(form)?;
            let (temperatures_k, signals) = points(t_k, signal, n)?;
            let uncertainties = if signal_u.is_null() {
                None
            } else {
                Some(slice_from_c(signal_u, n)?)
            };
            let report = |p: (f64, f64, f64), covariance, max_k, rms_k, iterations| bt_curve_fit {
                curve: curve_out(form, p.0, p.1, p.2, dark_offset),
                covariance,
                max_residual_k: max_k,
                rms_residual_k: rms_k,
                iterations,
            };
            Ok(match form {
                bt_curve_form::Planck => {
                    let fit = fit_points_with::<SakumaHattori>(
                        temperatures_k,
                        signals,
                        uncertainties,
                        dark_offset,
                    )?;
                    let p = fit.params;
                    report(
                        (p.a_um(), p.b_umk(), p.c()),
                        fit.covariance,
                        fit.max_residual_k,
                        fit.rms_residual_k,
                        fit.iterations,
                    )
                }
                bt_curve_form::Wien => {
                    let fit = fit_points_with::<SakumaHattoriWien>(
                        temperatures_k,
                        signals,
                        uncertainties,
                        dark_offset,
                    )?;
                    let p = fit.params;
                    report(
                        (p.a_um(), p.b_umk(), p.c()),
                        fit.covariance,
                        fit.max_residual_k,
                        fit.rms_residual_k,
                        fit.iterations,
                    )
                }
            })
        })
    }
}
