//! # bandtemp
//!
//! Band-integrated radiation thermometry: turn the band-limited signal of an infrared
//! thermometer or thermal imager into the true temperature of a real surface.
//!
//! Layers, one direction only: [`constants`] -> [`planck`] (spectral laws) -> [`band`]
//! (band integrals and their inversion) -> scene, calibration, uncertainty, ratio,
//! atmosphere, frame. The C ABI is the sibling crate `bandtemp-capi` (`capi/`), a thin skin
//! over this one.
//!
//! Units: kelvin (`_k`), micrometres (`_um`), um*K (`_umk`); spectral radiance in
//! W m^-2 sr^-1 um^-1; band radiance in W m^-2 sr^-1 (energy detectors) or
//! photons s^-1 m^-2 sr^-1 (photon detectors). Constants are CODATA 2018.
//!
//! The core is `no_std`, allocates nothing and does not panic on any input: every bad
//! input is a named [`Error`].
//!
//! ```
//! use bandtemp::band::Band;
//! use bandtemp::planck::Detector;
//!
//! // A rectangular 8-14 um band seen by a microbolometer (an energy detector).
//! let band = Band::rectangular(8.0, 14.0, Detector::Energy)?;
//! let radiance = band.radiance(300.0)?; // W m^-2 sr^-1
//! let temperature_k = band.temperature(radiance)?;
//! assert!((temperature_k - 300.0).abs() < 1e-9);
//! # Ok::<(), bandtemp::Error>(())
//! ```
#![no_std]
// `unsafe` is denied everywhere but in `frame/simd.rs` (x86-64 SIMD intrinsics and row
// loads at clamped indices) and the two calls into it in `frame/kernel.rs`, each block
// with its argument.
#![deny(unsafe_code)]
#![deny(missing_docs)]
#![warn(clippy::pedantic)]
// Allowed pedantic lints, with the reason:
// - `many_single_char_names`, `similar_names`: physics formulas read best with their
//   textbook symbols (x, t, m, c1, c2).
#![allow(clippy::many_single_char_names, clippy::similar_names)]
// - `float_cmp`: exact comparisons are deliberate where they appear (a solver hitting its
//   target exactly, sentinel zeros).
#![allow(clippy::float_cmp)]
// - `doc_markdown`: docs carry formulas in plain text (L_band, x_a, c1L); backticks on
//   every symbol would make them harder to read.
#![allow(clippy::doc_markdown)]
// - `neg_cmp_op_on_partial_ord`: `!(x > 0.0)` is the deliberate idiom that also rejects
//   NaN; `x <= 0.0` would let NaN through.
#![allow(clippy::neg_cmp_op_on_partial_ord)]
// - `module_name_repetitions`: `band::Band` is the clearest name.
#![allow(clippy::module_name_repetitions)]

#[cfg(feature = "std")]
extern crate std;

pub mod atmosphere;
pub mod band;
pub mod calibration;
pub mod constants;
pub mod emissivity;
mod error;
pub mod frame;
pub mod multiwavelength;
pub mod optics;
pub mod planck;
mod quadrature;
pub mod ratio;
pub mod scene;
pub mod site_budget;
mod sort;
#[cfg(test)]
mod test_rng;
pub mod uncertainty;
pub mod verify;

#[cfg(feature = "proptest")]
pub mod testkit;

pub use error::{Error, Result};

/// The README's Rust examples, compiled and run as doc tests.
#[cfg(doctest)]
#[doc = include_str!("../README.md")]
pub struct ReadmeDoctests;
