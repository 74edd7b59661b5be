//! Directional emissivity from optical constants through the C ABI
//! (`bandtemp::emissivity`). Optical constants: m = n - ik, n > 0, k >= 0.

use super::{bt_status, deliver, deliver2, Output};
use bandtemp::emissivity::{hagen_rubens_normal, OpticalConstants};
use bandtemp::Result;

/// Directional spectral emissivity at one angle, by polarisation.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct bt_directional_emissivity {
    /// s (TE) polarisation.
    pub s: f64,
    /// p (TM) polarisation.
    pub p: f64,
    /// Unpolarised, (s + p) / 2.
    pub unpolarised: f64,
}

impl Output for bt_directional_emissivity {
    fn finite(self) -> Result<Self> {
        Ok(bt_directional_emissivity {
            s: self.s.finite()?,
            p: self.p.finite()?,
            unpolarised: self.unpolarised.finite()?,
        })
    }
}

/// Directional spectral emissivity of a smooth opaque surface with optical constants
/// n, k at `angle_deg` from the normal ([0, 89.999] deg), by Fresnel's equations.
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_REFRACTIVE_INDEX_INVALID`,
/// `BT_STATUS_ANGLE_OUT_OF_RANGE`; pointer errors.
///
/// # Safety
/// `out` null or valid for writing a `bt_directional_emissivity`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_emissivity_directional(
    n: f64,
    k: f64,
    angle_deg: f64,
    out: *mut bt_directional_emissivity,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe {
        deliver(out, || {
            let d = OpticalConstants::new(n, k)?.directional(angle_deg)?;
            Ok(bt_directional_emissivity {
                s: d.s,
                p: d.p,
                unpolarised: d.unpolarised,
            })
        })
    }
}

/// Normal spectral emissivity 4n / ((n + 1)^2 + k^2).
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_REFRACTIVE_INDEX_INVALID`; pointer errors.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_emissivity_normal(n: f64, k: f64, out: *mut f64) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe { deliver(out, || Ok(OpticalConstants::new(n, k)?.normal())) }
}

/// Hemispherical spectral emissivity (integral of e(theta) over the hemisphere, 1e-12).
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_REFRACTIVE_INDEX_INVALID`; pointer errors.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_emissivity_hemispherical(n: f64, k: f64, out: *mut f64) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe { deliver(out, || Ok(OpticalConstants::new(n, k)?.hemispherical())) }
}

/// The angle (deg) and value of the largest unpolarised directional emissivity.
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_REFRACTIVE_INDEX_INVALID`; pointer errors.
///
/// # Safety
/// `angle_deg` and `emissivity` null or valid for writing a double; written only on
/// success.
#[no_mangle]
pub unsafe extern "C" fn bt_emissivity_peak(
    n: f64,
    k: f64,
    angle_deg: *mut f64,
    emissivity: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees for the out-pointers.
    unsafe {
        deliver2(angle_deg, emissivity, || {
            let peak = OpticalConstants::new(n, k)?.peak();
            Ok((peak.angle_deg, peak.emissivity))
        })
    }
}

/// The largest viewing angle (deg) up to which |e(theta)/e_n - 1| stays within
/// `relative_tolerance` (in (0, 1)).
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_REFRACTIVE_INDEX_INVALID`,
/// `BT_STATUS_ANGLE_TOLERANCE_INVALID`; pointer errors.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_emissivity_trusted_angle_deg(
    n: f64,
    k: f64,
    relative_tolerance: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe {
        deliver(out, || {
            OpticalConstants::new(n, k)?.trusted_angle_deg(relative_tolerance)
        })
    }
}

/// Hagen-Rubens normal emissivity of a metal, first term only: 0.365 sqrt(r_e / lambda),
/// r_e in ohm m, lambda in um (converted to m).
///
/// Errors: `BT_STATUS_NON_FINITE`, `BT_STATUS_RESISTIVITY_NOT_POSITIVE`,
/// `BT_STATUS_WAVELENGTH_NOT_POSITIVE`, `BT_STATUS_HAGEN_RUBENS_OUT_OF_RANGE` above 0.2;
/// pointer errors.
///
/// # Safety
/// `out` null or valid for writing a double; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_hagen_rubens_normal(
    resistivity_ohm_m: f64,
    wavelength_um: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantee for `out`.
    unsafe {
        deliver(out, || {
            hagen_rubens_normal(resistivity_ohm_m, wavelength_um)
        })
    }
}
