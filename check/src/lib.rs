//! `bandtemp-check`: calibration checks for a user's CI.
//!
//! Reads an instrument record ([`record`], TOML), runs the checks of
//! [`bandtemp::verify`] against the record's tolerances ([`run`]), and writes the result
//! as a compact text report, JSON or JUnit XML ([`report`]). The binary `bandtemp-check`
//! is a thin command line over these.
#![forbid(unsafe_code)]
#![warn(clippy::pedantic)]
// Allowed pedantic lints, with the reason:
// - `doc_markdown`: docs carry formulas and field names in plain text.
// - `module_name_repetitions`: `record::RecordError` is the clearest name.
// - `cast_possible_truncation`: u32 record counts as usize on 32- and 64-bit hosts only.
#![allow(
    clippy::doc_markdown,
    clippy::module_name_repetitions,
    clippy::cast_possible_truncation
)]

pub mod record;
pub mod report;
pub mod run;
