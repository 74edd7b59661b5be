//! Uncertainty budgets of the site methods (ASTM E1933, E1862) through the C ABI
//! (`bandtemp::site_budget`).

use super::band::{band_from_c, bt_band};
use super::scene::{bt_scene, read_scene};
use super::{bt_status, deliver, Output};
use bandtemp::site_budget::{
    coating_emissivity_budget, contact_emissivity_budget, direct_reflected_budget,
    reflector_bias_k, reflector_budget,
};
use bandtemp::uncertainty::Budget;
use bandtemp::Result;

/// Most lines of a `bt_site_budget`.
pub const BT_SITE_BUDGET_MAX_LINES: usize = 4;

/// One line of a `bt_site_budget`.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct bt_site_line {
    /// The input's position (0-based) in the function's argument order (documented with
    /// each function).
    pub index: usize,
    /// Standard uncertainty u(x_i), input unit.
    pub standard_uncertainty: f64,
    /// Sensitivity coefficient c_i, estimate unit per input unit.
    pub sensitivity: f64,
    /// Contribution |c_i| u(x_i), estimate unit.
    pub contribution: f64,
    /// Share of the combined variance.
    pub variance_share: f64,
}

/// A site-method budget: the estimate (emissivity, dimensionless, or reflected apparent
/// temperature, K, as each function says), its combined standard uncertainty in the same
/// unit, and the lines ranked largest first.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq, Default)]
pub struct bt_site_budget {
    /// The estimate (emissivity, or K for a reflected temperature).
    pub estimate: f64,
    /// Combined standard uncertainty, in the estimate's unit.
    pub combined_standard_uncertainty: f64,
    /// Number of lines in use.
    pub len: usize,
    /// Lines ranked by contribution, largest first; unused lines are zero.
    pub ranked: [bt_site_line; BT_SITE_BUDGET_MAX_LINES],
}

impl From<&Budget> for bt_site_budget {
    fn from(b: &Budget) -> bt_site_budget {
        let mut out = bt_site_budget {
            estimate: b.estimate,
            combined_standard_uncertainty: b.combined_standard_uncertainty,
            len: b.len.min(BT_SITE_BUDGET_MAX_LINES),
            ..bt_site_budget::default()
        };
        for (slot, line) in out.ranked.iter_mut().zip(b.entries()) {
            *slot = bt_site_line {
                index: line.index,
                standard_uncertainty: line.standard_uncertainty,
                sensitivity: line.sensitivity,
                contribution: line.contribution,
                variance_share: line.variance_share,
            };
        }
        out
    }
}

impl Output for bt_site_budget {
    fn finite(self) -> Result<Self> {
        let mut ranked = self.ranked;
        for line in &mut ranked {
            *line = bt_site_line {
                standard_uncertainty: line.standard_uncertainty.finite()?,
                sensitivity: line.sensitivity.finite()?,
                contribution: line.contribution.finite()?,
                variance_share: line.variance_share.finite()?,
                ..*line
            };
        }
        Ok(bt_site_budget {
            estimate: self.estimate.finite()?,
            combined_standard_uncertainty: self.combined_standard_uncertainty.finite()?,
            ranked,
            ..self
        })
    }
}

/// GUM budget of the emissivity from the ASTM E1933 contact method: estimate e
/// (dimensionless) from `sensor_radiance` and the probe's `reference_k`; inputs (index):
/// 0 the signal (`u_signal`, band radiance units), 1 the reference temperature
/// (`u_reference_k`), 2 the scene's reflected temperature (`u_reflected_k`). The scene's
/// emissivity is ignored; its path and window are used.
///
/// Errors: those of `bt_object_temperature` for band and scene,
/// `BT_STATUS_UNCERTAINTY_NEGATIVE`, `BT_STATUS_EMISSIVITY_NOT_DETERMINED`,
/// `BT_STATUS_EMISSIVITY_READING_INCONSISTENT`; pointer errors.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `scene` null or valid for reading a `bt_scene`; `out`
/// null or valid for writing a `bt_site_budget`; written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_contact_emissivity_budget(
    band: *const bt_band,
    scene: *const bt_scene,
    sensor_radiance: f64,
    reference_k: f64,
    u_signal: f64,
    u_reference_k: f64,
    u_reflected_k: f64,
    out: *mut bt_site_budget,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `read_scene`, `deliver`.
    unsafe {
        deliver(out, || {
            let band = band_from_c(band)?;
            let scene = read_scene(scene)?;
            contact_emissivity_budget(
                &scene,
                &band,
                sensor_radiance,
                reference_k,
                u_signal,
                u_reference_k,
                u_reflected_k,
            )
            .map(|b| bt_site_budget::from(&b))
        })
    }
}

/// GUM budget of the emissivity from the ASTM E1933 reference-coating method: estimate e
/// from the surface's and the coating's radiances and the coating's emissivity; inputs
/// (index): 0 surface signal, 1 coating signal (band radiance units), 2 coating
/// emissivity, 3 reflected temperature (K), with standard uncertainties `u[0..4]` in that
/// order.
///
/// Errors: as `bt_contact_emissivity_budget`, and `BT_STATUS_EMISSIVITY_OUT_OF_RANGE`,
/// `BT_STATUS_SIGNAL_BELOW_BACKGROUND` for the coating; pointer errors (`u` must hold 4
/// doubles).
///
/// # Safety
/// As `bt_contact_emissivity_budget`; `u` null or valid for reading 4 doubles.
#[no_mangle]
pub unsafe extern "C" fn bt_coating_emissivity_budget(
    band: *const bt_band,
    scene: *const bt_scene,
    surface_radiance: f64,
    coating_radiance: f64,
    coating_emissivity: f64,
    u: *const f64,
    out: *mut bt_site_budget,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `read_scene`,
    // `slice_from_c` (4 doubles) and `deliver`.
    unsafe {
        deliver(out, || {
            let band = band_from_c(band)?;
            let scene = read_scene(scene)?;
            let u = match *super::slice_from_c(u, 4)? {
                [a, b, c, d] => [a, b, c, d],
                _ => return Err(bandtemp::Error::InvalidBuffer),
            };
            coating_emissivity_budget(
                &scene,
                &band,
                surface_radiance,
                coating_radiance,
                coating_emissivity,
                u,
            )
            .map(|b| bt_site_budget::from(&b))
        })
    }
}

/// GUM budget of the reflected apparent temperature (K) from the ASTM E1862 reflector
/// method; inputs (index): 0 reflector signal (`u_signal`, band radiance units),
/// 1 reflector emissivity (`u_emissivity`), 2 reflector temperature (`u_reflector_k`).
/// The scene's emissivity and reflected temperature are ignored.
///
/// Errors: those of `bt_object_temperature` for band and scene,
/// `BT_STATUS_UNCERTAINTY_NEGATIVE`, `BT_STATUS_REFLECTOR_EMISSIVITY_OUT_OF_RANGE`,
/// `BT_STATUS_REFLECTED_NOT_DETERMINED`, the inversion's errors; pointer errors.
///
/// # Safety
/// As `bt_contact_emissivity_budget`.
#[no_mangle]
pub unsafe extern "C" fn bt_reflector_budget(
    band: *const bt_band,
    scene: *const bt_scene,
    reflector_radiance: f64,
    reflector_emissivity: f64,
    reflector_k: f64,
    u_signal: f64,
    u_emissivity: f64,
    u_reflector_k: f64,
    out: *mut bt_site_budget,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c`, `read_scene`, `deliver`.
    unsafe {
        deliver(out, || {
            let band = band_from_c(band)?;
            let scene = read_scene(scene)?;
            reflector_budget(
                &scene,
                &band,
                reflector_radiance,
                reflector_emissivity,
                reflector_k,
                [u_signal, u_emissivity, u_reflector_k],
            )
            .map(|b| bt_site_budget::from(&b))
        })
    }
}

/// The error, K, of the reflector method when a reflector of `reflector_emissivity` at
/// `reflector_k` is taken as ideal, for a true reflected temperature `reflected_k`.
///
/// Errors: the band's errors, `BT_STATUS_NON_FINITE`, `BT_STATUS_TEMPERATURE_NOT_POSITIVE`,
/// `BT_STATUS_REFLECTOR_EMISSIVITY_OUT_OF_RANGE`; pointer errors.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `out` null or valid for writing a double; written only
/// on success.
#[no_mangle]
pub unsafe extern "C" fn bt_reflector_bias_k(
    band: *const bt_band,
    reflected_k: f64,
    reflector_emissivity: f64,
    reflector_k: f64,
    out: *mut f64,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            reflector_bias_k(
                &band_from_c(band)?,
                reflected_k,
                reflector_emissivity,
                reflector_k,
            )
        })
    }
}

/// GUM budget of the reflected apparent temperature (K) from the ASTM E1862 direct method
/// (the instrument at emissivity 1 reads the surroundings): Tr = L^-1(`radiance`); inputs
/// (index): 0 signal noise (`u_signal`, band radiance units), 1 calibration
/// (`u_calibration_k`), 2 spread of the surroundings (`u_spread_k`).
///
/// Errors: the band's errors, `BT_STATUS_NON_FINITE`, `BT_STATUS_UNCERTAINTY_NEGATIVE`, the
/// inversion's errors; pointer errors.
///
/// # Safety
/// `band` as in `bt_band_radiance`; `out` null or valid for writing a `bt_site_budget`;
/// written only on success.
#[no_mangle]
pub unsafe extern "C" fn bt_direct_reflected_budget(
    band: *const bt_band,
    radiance: f64,
    u_signal: f64,
    u_calibration_k: f64,
    u_spread_k: f64,
    out: *mut bt_site_budget,
) -> bt_status {
    // SAFETY: the caller's guarantees are those of `band_from_c` and `deliver`.
    unsafe {
        deliver(out, || {
            direct_reflected_budget(
                &band_from_c(band)?,
                radiance,
                [u_signal, u_calibration_k, u_spread_k],
            )
            .map(|b| bt_site_budget::from(&b))
        })
    }
}
