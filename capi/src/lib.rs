//! The C ABI: a thin skin over the Rust API. No physics lives here.
//!
//! Every function returns a [`bt_status`] (`BT_STATUS_OK` = 0, nonzero = a named error,
//! [`bt_status_message`] gives its text) and writes its results through trailing
//! out-pointers, which are written only on success: on error the caller's out values are
//! left untouched. The header `include/bandtemp.h` is generated from these sources by
//! cbindgen (`cbindgen.toml`); `tests/ffi_header.rs` fails when the checked-in header
//! differs from a fresh generation.
//!
//! # What the caller must guarantee
//! Every non-null pointer points to memory valid for reads (inputs) or writes (outputs) of
//! its type for the duration of the call, and a table pointer to at least `response_len`
//! doubles. Null pointers, misaligned pointers and impossible lengths are detected and
//! answered with a status (`BT_STATUS_NULL_POINTER`, `BT_STATUS_INVALID_BUFFER`); a
//! dangling pointer or a short buffer cannot be detected and is the caller's bug.
//! Functions are reentrant and thread-safe: nothing is global, nothing allocates.
//!
//! # Values are validated, never trusted
//! NaN, infinities and out-of-domain values are errors. C enum fields (`bt_band.detector`)
//! are read as integers and validated, so a detector of 7 is `BT_STATUS_INVALID_DETECTOR`,
//! not undefined behaviour. [`bt_status_message`] takes its status as an `int` for the
//! same reason. A success never delivers NaN or infinity: every result is checked once
//! more at the boundary (NaN becomes `BT_STATUS_NON_FINITE`, an infinity
//! `BT_STATUS_RADIANCE_OVERFLOW`), whatever path the core took.
//!
//! # No panic crosses the boundary
//! 1. By construction: the exports check every pointer with an early return, build slices
//!    only after null, alignment and length checks (a length of 0 accepts a null pointer),
//!    and use no `unwrap`, `expect`, indexing, `assert!` or `unreachable!`; the lints
//!    below deny them in this module, and the core they call reports every bad input as
//!    an [`Error`] variant.
//! 2. By test: `tests/ffi_proptest.rs` drives every export and the Rust entry points behind
//!    them with arbitrary f64 bit patterns; `tests/c/ffi_test.c` drives every export with
//!    hostile input from C and C++, under AddressSanitizer and UndefinedBehaviorSanitizer.
//! 3. By configuration: the release profile sets `panic = "abort"`, so even a panic that
//!    escaped 1 and 2 cannot unwind; and since Rust 1.81 (the crate's MSRV is 1.88) a
//!    panic reaching an `extern "C"` function aborts in every profile instead of
//!    unwinding into C.
//!
//! # Crate layout
//! This crate is the C library of `bandtemp` (`libbandtemp_capi.a` / `.so` in the build tree,
//! installed as `libbandtemp`); the physics is the `bandtemp` core crate, which it wraps.
//! Built without the `std` feature it is `no_std` and brings the panic handler the C
//! libraries need: a trap (an undefined instruction), never reached by design. With the
//! `panic-proof` feature the handler instead references an undefined symbol, so a build
//! that still contains a reachable panic path fails to link (the link-time proof, run in
//! CI for the firmware target).
#![no_std]
#![deny(unsafe_op_in_unsafe_fn)]
#![deny(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing,
    clippy::unreachable,
    clippy::todo,
    clippy::unimplemented,
    clippy::undocumented_unsafe_blocks
)]
// The C ABI names (`bt_status`, `bt_band`) are the contract: lower snake case, `bt_`
// prefix, as DESIGN.md fixes them.
#![allow(non_camel_case_types)]
#![warn(clippy::pedantic)]
// Allowed pedantic lints, with the reason:
// - `doc_markdown`: docs carry C names and formulas in plain text.
// - `missing_errors_doc`, `missing_safety_doc`: every export documents its statuses and
//   the caller's guarantees in the module docs above and in its own doc comment.
// - `float_cmp`, `similar_names`, `many_single_char_names`, `module_name_repetitions`,
//   `neg_cmp_op_on_partial_ord`: as in the core crate.
#![allow(
    clippy::doc_markdown,
    clippy::missing_errors_doc,
    clippy::missing_safety_doc,
    clippy::float_cmp,
    clippy::similar_names,
    clippy::many_single_char_names,
    clippy::module_name_repetitions,
    clippy::neg_cmp_op_on_partial_ord
)]

#[cfg(feature = "std")]
extern crate std;

// Declared in the order the header lists them (cbindgen follows this order).
mod status;
// Spectral laws.
mod planck;
// Bands: integrals and inversion.
mod band;
// The measurement equation.
mod scene;
// Calibration curves.
mod calibration;
// Whole frames.
mod frame;
// Two-colour (ratio) pyrometry.
mod ratio;
// Humid air and air paths.
mod atmosphere;
// Uncertainty budgets.
mod uncertainty;
// Spectral (non-grey) scenes and the site methods.
mod site;
mod spectral;
// Calibration checks.
mod verify;
// Optics and materials: spot, diffraction, SSE, emissivity from optical constants,
// effective wavelengths, multi-wavelength pyrometry, site-method budgets.
mod effective;
mod emissivity;
mod multiwavelength;
mod optics;
mod site_budget;
// Raw detector frames: non-uniformity, bad pixels, drift, figures of merit.
mod raw;

pub use atmosphere::{
    bt_air_dew_point_k, bt_air_saturation_vapour_pressure_hpa, bt_path_band_transmittance,
    bt_path_spectral_transmittance,
};
pub use band::{
    bt_band, bt_band_radiance, bt_band_radiance_derivative, bt_band_temperature, bt_detector,
};
pub use calibration::{
    bt_curve, bt_curve_fit, bt_curve_fit_band, bt_curve_fit_points, bt_curve_form,
    bt_curve_object_temperature, bt_curve_sensor_signal, bt_curve_signal, bt_curve_temperature,
};
pub use calibration::{
    bt_points_fit, bt_sakuma_hattori, bt_sakuma_hattori_fit_band, bt_sakuma_hattori_fit_points,
    bt_sakuma_hattori_fit_points_report, bt_sakuma_hattori_object_temperature,
    bt_sakuma_hattori_sensor_signal, bt_sakuma_hattori_signal, bt_sakuma_hattori_temperature,
};
pub use frame::{
    bt_frame_convert_counts, bt_frame_convert_signal, bt_frame_converter,
    bt_frame_converter_geometry, bt_frame_converter_new_band,
    bt_frame_converter_new_sakuma_hattori, bt_frame_converter_set_rails,
    bt_frame_converter_set_scene_band, bt_frame_converter_set_scene_sakuma_hattori,
    bt_frame_geometry, bt_frame_row, bt_frame_summary, bt_frame_table_rows_band,
    bt_frame_table_rows_sakuma_hattori, bt_rails,
};
pub use planck::{
    bt_blackbody_fraction, bt_peak_wavelength_um, bt_spectral_photon_radiance,
    bt_spectral_radiance, bt_total_radiance,
};
pub use ratio::bt_ratio_temperature;
pub use ratio::{
    bt_wien_ratio, bt_wien_ratio_correct_grey, bt_wien_ratio_from_bands,
    bt_wien_ratio_signal_ratio, bt_wien_ratio_temperature,
};
pub use raw::{
    bt_bad_pixel_report, bt_bad_pixel_rules, bt_bad_pixels_detect, bt_corrected_summary,
    bt_drift_fit_band, bt_drift_fit_sakuma_hattori, bt_drift_model, bt_drift_point, bt_drift_step,
    bt_drift_step_band, bt_drift_step_sakuma_hattori, bt_effective_exponent_band,
    bt_frame_convert_counts_corrected, bt_frame_spatial_stats, bt_frame_stack_add_counts,
    bt_frame_stack_add_signal, bt_net_signal_band, bt_netd_k, bt_nuc_shutter_refresh,
    bt_nuc_shutter_target_band, bt_nuc_shutter_target_sakuma_hattori, bt_nuc_two_point,
    bt_object_from_net_signal_band, bt_spatial_stats, bt_stack_view, bt_two_point_report,
};
pub use raw::{
    bt_frame_convert_counts_corrected_emissivity, bt_frame_convert_counts_multi_point,
    bt_frame_convert_counts_multi_point_emissivity, bt_multi_point_report, bt_nuc_multi_point,
    bt_nuc_multi_point_map_len, BT_NUC_MAX_LEVELS,
};
pub use scene::{
    bt_apparent_temperature, bt_object_temperature, bt_object_temperature_from_apparent, bt_scene,
    bt_sensor_radiance,
};
pub use site::{
    bt_emissivity_from_reference, bt_emissivity_from_reference_coating,
    bt_reflected_temperature_from_reflector,
};
pub use spectral::{
    bt_spectral_object_temperature, bt_spectral_object_temperature_from_apparent,
    bt_spectral_sensor_radiance, bt_spectral_tables,
};
pub use status::{
    bt_status, bt_status_message, bt_version, BT_VERSION_MAJOR, BT_VERSION_MINOR, BT_VERSION_PATCH,
};
pub use uncertainty::{
    bt_budget, bt_contribution, bt_input_uncertainties, bt_surface_budget, bt_surface_input_name,
    BT_BUDGET_MAX_LINES,
};
pub use uncertainty::{bt_monte_carlo, bt_surface_monte_carlo, bt_surface_monte_carlo_streaming};
pub use verify::{
    bt_verify_coverage, bt_verify_coverage_report, bt_verify_curve_band, bt_verify_curve_report,
    bt_verify_frame_table_band, bt_verify_frame_table_sakuma_hattori, bt_verify_residuals_report,
    bt_verify_residuals_sakuma_hattori, bt_verify_round_trip_band, bt_verify_round_trip_report,
    bt_verify_round_trip_sakuma_hattori, bt_verify_table_report, bt_verify_uncertainty_report,
    bt_verify_uncertainty_sakuma_hattori,
};

pub use effective::{
    bt_limit_effective_wavelength_um, bt_mean_effective_wavelength_um,
    bt_one_point_wavelength_sensitivity, bt_sakuma_hattori_from_moments,
    bt_two_point_sigma_sensitivity,
};
pub use emissivity::{
    bt_directional_emissivity, bt_emissivity_directional, bt_emissivity_hemispherical,
    bt_emissivity_normal, bt_emissivity_peak, bt_emissivity_trusted_angle_deg,
    bt_hagen_rubens_normal,
};
pub use multiwavelength::{
    bt_multiwavelength_fit, bt_multiwavelength_noise_gain, bt_multiwavelength_result,
    BT_MULTIWAVELENGTH_MAX_BANDS, BT_MULTIWAVELENGTH_MAX_TERMS,
};
pub use optics::{
    bt_airy_encircled_energy, bt_airy_radius_um, bt_footprint_m, bt_ifov_mrad, bt_mtf,
    bt_mtf_evaluate, bt_small_target_fraction, bt_spot_diameter_m, bt_sse_correct,
    bt_sse_correction, bt_sse_temperature_error_k, bt_target_check, bt_target_verdict,
    BT_TARGET_RULE_ISO10878, BT_TARGET_RULE_PUSNIK_GERSAK, BT_TARGET_RULE_THREE_BY_THREE,
};
pub use site_budget::{
    bt_coating_emissivity_budget, bt_contact_emissivity_budget, bt_direct_reflected_budget,
    bt_reflector_bias_k, bt_reflector_budget, bt_site_budget, bt_site_line,
    BT_SITE_BUDGET_MAX_LINES,
};

use bandtemp::{Error, Result};

/// The C libraries' panic handler without `std`: a trap. The exports never panic by
/// design (see the module docs); should one ever be reached, an undefined instruction
/// stops the program where a debugger or a fault handler sees it, instead of a silent
/// spin that a watchdog would have to find.
#[cfg(all(not(feature = "std"), not(test), not(feature = "panic-proof")))]
#[panic_handler]
fn trap_on_panic(_: &core::panic::PanicInfo<'_>) -> ! {
    #[cfg(any(target_arch = "arm", target_arch = "aarch64"))]
    // SAFETY: `udf` raises an undefined-instruction exception; it touches no memory.
    unsafe {
        core::arch::asm!("udf #0", options(noreturn, nomem, nostack));
    }
    #[cfg(any(target_arch = "x86", target_arch = "x86_64"))]
    // SAFETY: `ud2` raises an invalid-opcode exception; it touches no memory.
    unsafe {
        core::arch::asm!("ud2", options(noreturn, nomem, nostack));
    }
    #[cfg(not(any(
        target_arch = "arm",
        target_arch = "aarch64",
        target_arch = "x86",
        target_arch = "x86_64"
    )))]
    loop {}
}

/// The link-time proof that no panic path survives: this handler calls a symbol that no
/// library defines, so the final link of a firmware image fails if any reachable code can
/// still panic (the optimiser removes the handler when nothing calls it).
#[cfg(all(not(feature = "std"), not(test), feature = "panic-proof"))]
#[panic_handler]
fn link_error_on_panic(_: &core::panic::PanicInfo<'_>) -> ! {
    extern "C" {
        /// Defined nowhere, on purpose.
        fn bandtemp_panic_path_reachable() -> !;
    }
    // SAFETY: never executes in a build that links; the point is the unresolved symbol.
    unsafe { bandtemp_panic_path_reachable() }
}

/// Checks a pointer from the caller: non-null and aligned for `T`.
fn check_ptr<T>(ptr: *const T) -> Result<()> {
    if ptr.is_null() {
        Err(Error::NullPointer)
    } else if !ptr.is_aligned() {
        Err(Error::InvalidBuffer)
    } else {
        Ok(())
    }
}

/// Reads a plain-data input struct (every bit pattern of it valid: numbers only).
///
/// # Safety
/// `ptr` is null or valid for reads of a `T`.
unsafe fn read_input<T: Copy>(ptr: *const T) -> Result<T> {
    check_ptr(ptr)?;
    // SAFETY: non-null and aligned (checked), valid for reads (caller); `T` is only
    // instantiated with structs of floats and integers (and padding), for which every bit
    // pattern is valid.
    Ok(unsafe { ptr.read() })
}

/// Checks that `len` elements of `T` at `ptr` form a possible buffer: non-null, aligned,
/// a byte size within `isize::MAX` that does not wrap the address space.
fn check_buffer<T>(ptr: *const T, len: usize) -> Result<()> {
    check_ptr(ptr)?;
    let bytes = len
        .checked_mul(core::mem::size_of::<T>())
        .filter(|&bytes| bytes <= isize::MAX.unsigned_abs())
        .ok_or(Error::InvalidBuffer)?;
    if (ptr as usize).checked_add(bytes).is_none() {
        return Err(Error::InvalidBuffer);
    }
    Ok(())
}

/// A slice of `len` values at `ptr`; `len == 0` gives the empty slice whatever `ptr` is.
///
/// # Errors
/// [`Error::NullPointer`]; [`Error::InvalidBuffer`] for a misaligned pointer or a length
/// whose byte size exceeds `isize::MAX` or wraps the address space.
///
/// # Safety
/// For `len > 0`, a non-null `ptr` is valid for reads of `len` values of `T` that nobody
/// writes during the call; `T` is a plain type every bit pattern of which is valid.
unsafe fn slice_from_c<'a, T>(ptr: *const T, len: usize) -> Result<&'a [T]> {
    if len == 0 {
        return Ok(&[]);
    }
    check_buffer(ptr, len)?;
    // SAFETY: non-null and aligned (checked); the byte size fits isize and does not wrap
    // (checked); validity for reads of `len` values is the caller's guarantee.
    Ok(unsafe { core::slice::from_raw_parts(ptr, len) })
}

/// As [`slice_from_c`], mutable: an output buffer.
///
/// # Safety
/// For `len > 0`, a non-null `ptr` is valid for reads and writes of `len` values of `T`
/// that nothing else reads or writes during the call (no other buffer of the call
/// overlaps it).
unsafe fn slice_from_c_mut<'a, T>(ptr: *mut T, len: usize) -> Result<&'a mut [T]> {
    if len == 0 {
        return Ok(&mut []);
    }
    check_buffer(ptr.cast_const(), len)?;
    // SAFETY: as in `slice_from_c`, with exclusive access the caller's guarantee.
    Ok(unsafe { core::slice::from_raw_parts_mut(ptr, len) })
}

/// A value an export hands to C: checked once more at the boundary.
trait Output: Sized {
    /// The value itself when every number in it is finite. The core already reports
    /// every non-finite result as a named error; this is the boundary's guarantee that a
    /// `BT_STATUS_OK` never delivers NaN or infinity even if a core path misses one (NaN
    /// becomes [`Error::NonFinite`], an infinity [`Error::RadianceOverflow`]).
    fn finite(self) -> Result<Self>;
}

impl Output for f64 {
    fn finite(self) -> Result<f64> {
        if self.is_finite() {
            Ok(self)
        } else if self.is_nan() {
            Err(Error::NonFinite)
        } else {
            Err(Error::RadianceOverflow)
        }
    }
}

/// Checks `out`, runs `compute`, and writes its value through `out` only on success.
///
/// # Safety
/// `out` is null or valid for writes of a `T`.
unsafe fn deliver<T: Output>(out: *mut T, compute: impl FnOnce() -> Result<T>) -> bt_status {
    if let Err(error) = check_ptr(out.cast_const()) {
        return error.into();
    }
    match compute().and_then(Output::finite) {
        Ok(value) => {
            // SAFETY: non-null and aligned (checked), valid for writes (caller).
            unsafe { out.write(value) };
            bt_status::Ok
        }
        Err(error) => error.into(),
    }
}

/// As [`deliver`] for two outputs, both written only when `compute` succeeds.
///
/// # Safety
/// `out_a` and `out_b` are each null or valid for writes of their type.
unsafe fn deliver2<A: Output, B: Output>(
    out_a: *mut A,
    out_b: *mut B,
    compute: impl FnOnce() -> Result<(A, B)>,
) -> bt_status {
    if let Err(error) = check_ptr(out_a.cast_const()).and(check_ptr(out_b.cast_const())) {
        return error.into();
    }
    match compute().and_then(|(a, b)| Ok((a.finite()?, b.finite()?))) {
        Ok((a, b)) => {
            // SAFETY: both non-null and aligned (checked), valid for writes (caller).
            unsafe {
                out_a.write(a);
                out_b.write(b);
            }
            bt_status::Ok
        }
        Err(error) => error.into(),
    }
}
