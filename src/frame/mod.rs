//! Whole frames: table-based conversion of counts or signal images to object temperature,
//! with a guaranteed table error, caller-owned storage and no heap.
//!
//! ```
//! use bandtemp::band::Band;
//! use bandtemp::frame::{CountsMap, FrameConverter, FrameTable, Rails, TemperatureRange};
//! use bandtemp::planck::Detector;
//! use bandtemp::scene::Scene;
//!
//! // Invented instrument: an 8-14 um microbolometer core whose radiometric calibration
//! // reads L = 0.002 W m^-2 sr^-1 per count above 1000 dark counts.
//! let band = Band::rectangular(8.0, 14.0, Detector::Energy)?;
//! let scene = Scene::new(0.95, 293.15)?;
//! let counts = CountsMap::linear(0.002, -2.0)?;
//! let range = TemperatureRange::new(250.0, 1500.0)?;
//! let mut storage = [[0.0f32; 4]; 128]; // 2 KiB on the stack: no heap
//! assert!(FrameTable::required_rows(&band, range, 1e-3)? <= storage.len());
//! let converter =
//!     FrameConverter::new(&band, &scene, counts, Rails::default(), range, 1e-3, &mut storage)?;
//! let frame = [0u16, 30_000, 65_535, 40_000];
//! let mut kelvin = [0.0f32; 4];
//! let summary = converter.convert_counts(&frame, None, &mut kelvin)?;
//! assert_eq!((summary.converted, summary.dead, summary.saturated), (2, 1, 1));
//! assert!(kelvin[0].is_nan() && kelvin[1] > 290.0 && kelvin[3] > kelvin[1]);
//! # Ok::<(), bandtemp::Error>(())
//! ```
//!
//! # Pipeline
//!
//! Per pixel, with the scene's grey measurement equation S = G L(T) + B
//! ([`crate::scene`]) and an affine counts map S = g n + o ([`CountsMap`]):
//!
//! ```text
//! uniform scene:     L = (n - z) * (g / G),                  z  = (B - o) / g
//! emissivity map:    L = (n - z0) * (g / (tw ta)) / e + Lr,   z0 = (K - o) / g
//! signal input:      L = (S - B) / G,   or   (S - K) / (tw ta) / e + Lr
//! then               T = table(L)
//! ```
//!
//! n counts, L the object's own signal in the curve's units, G = tw ta e, B the
//! background, K = B(e = 0) = what the sensor sees from a perfect reflector, Lr the
//! curve's signal at the reflected temperature, e the pixel's emissivity. The per-pixel
//! form follows from B(e) = K - tw ta e Lr. The offset z is split into an integer part
//! and a remainder so that n - z loses nothing to cancellation (u16 counts are exact in
//! f32).
//!
//! # Where each stage lives
//!
//! In the order a pixel goes through them (raw counts enter at the top; a frame that is
//! already uniform enters at the scene stage):
//!
//! | stage                                   | file           | items                                  |
//! |-----------------------------------------|----------------|----------------------------------------|
//! | two-point NUC maps, shutter refresh     | `nonuniformity.rs` | [`FrameStack`], [`two_point`], [`shutter_refresh`], [`Correction`] |
//! | multi-point (piecewise-linear) NUC maps | `multipoint.rs` | [`multi_point`], [`multi_point_map_len`], [`Correction::multi_point`] |
//! | bad-pixel map and replacement           | `bad_pixels.rs` | [`detect_bad_pixels`], [`BadPixelRules`] |
//! | array-temperature drift, self-emission  | `drift.rs`     | [`DriftModel`], [`DriftStep`], [`net_signal`] |
//! | fused raw counts -> kelvin              | `nonuniformity.rs` | [`FrameConverter::convert_counts_corrected`], [`FrameConverter::convert_counts_corrected_emissivity`] |
//! | declared inputs                         | `params.rs`    | [`TemperatureRange`], [`CountsMap`], [`Rails`] |
//! | counts or S -> object signal L          | `pixel_map.rs` | [`PixelMap`]                           |
//! | L -> row and position -> T (per pixel)  | `lookup.rs`    | row index from the f32 bits, Horner    |
//! | chunks of [`LANES`] pixels              | `kernel.rs`    | the vectorisable batch loop            |
//! | the x86-64 lookup (SSE2; AVX2 detected) | `simd.rs`      | row loads, 4x4 transposes, Horner      |
//! | status of a failed pixel, frame tally   | `summary.rs`   | [`PixelStatus`], [`FrameSummary`]      |
//! | the converter, scalar reference path    | `converter.rs` | [`FrameConverter`], [`ConverterState`] |
//!
//! Built once, before any pixel: the rows, `table.rs` ([`FrameTable`], [`TableGeometry`],
//! [`TableRow`]); their construction, check and error bound, `build.rs`; their
//! fingerprint, `fingerprint.rs`. Later per-pixel stages (non-uniformity correction, bad
//! pixels, drift) belong between `pixel_map.rs` and `lookup.rs`: they act on the counts or
//! the object signal before the row index is taken; a target-specific vector lookup
//! hooks into `chunk` in `kernel.rs` as `simd.rs` does for x86-64. Checked on calibration frames, not per pixel: the
//! figures of merit, `merit.rs` ([`spatial_stats`], [`netd_k`], [`fpn_k`], EMVA 1288).
//!
//! # The table variable, and why
//!
//! Rows are cubic Hermite pieces of T(L) on segments that are uniform in the *bit pattern*
//! of the f32 signal: the exponent and the top `level` mantissa bits of L select the row,
//! the remaining mantissa bits give the position inside it (see [`TableRow`]). The segments are
//! therefore 2^level per octave of L (a piecewise-linear log2 L), and the index costs two
//! integer operations and no transcendental function, for any unit and dynamic range
//! (band radiance in W m^-2 sr^-1, photon radiance near 1e20, counts).
//!
//! Why this choice. Nodes needed for an 8-14 um energy band over 250-1500 K at 1 mK
//! (exact band radiance; the first four rows from a design study with scipy, node counts
//! searched in steps of 1.5x, so they are upper bounds within that factor; the last row
//! from `tests/frame_table.rs`):
//!
//! | table variable          | linear  | cubic Hermite     | per-pixel index cost          |
//! |-------------------------|---------|-------------------|-------------------------------|
//! | L (uniform)             | 12 138  | 711               | one multiply-add              |
//! | L^(1/2)                 |  1 066  |  63               | one sqrt                      |
//! | L^(1/4)                 |  1 066  |  19               | two sqrt                      |
//! | ln L                    |  2 398  |  42               | a log (no vector log in core) |
//! | f32 bits (this module)  | ~3 800* |  61 rows, 976 B   | shift, subtract, mask         |
//!
//! (*) estimated from the ln L column: level 9, 512 rows per octave; at 8 bytes per
//! linear row that is 30 KiB against 976 bytes for the cubic.
//!
//! In a log-like variable Wien's law makes 1/T linear, so T(L) is smooth at every
//! wavelength and temperature; a power transform is better for one long-wave band but
//! loses its advantage over a short-wave band's many decades and costs square roots
//! per pixel (a packed sqrt is as slow as the whole lookup). Hermite interpolation with
//! the exact derivative dT/dL = 1/L'(T) has error h^4 T''''/384 instead of h^2 T''/8,
//! so 1 mK costs about 1 KiB instead of 30 KiB, and the table stays in L1 cache (or in
//! a microcontroller's tightly coupled memory) beside the streaming frame. Every row is
//! independent (no spline system to solve) and is four f32 power-basis coefficients, one
//! 16-byte row per pixel lookup and three multiply-adds. The price against a linear
//! table is two more loads and two more multiply-adds per pixel.
//!
//! # Accuracy
//!
//! Construction ([`FrameTable::build`], in `build.rs`, with the derivation) reports a
//! bound, not a sample: per row, the largest error of the stored f32 row at 9 check points
//! (against exact inversion; the row's cubic evaluated in f64 with its f32
//! coefficients), times 8/7 for the points between them (the Hermite remainder's shape,
//! with its fourth derivative within a factor 2 across a row), plus a rigorous bound on
//! the f32 Horner rounding (u|c0| + 3u|c1|R + 5u|c2|R^2 + 6u|c3|R^3, to first order), and,
//! for a uniform-scene pixel from counts, 1.5 f32 ulps of L converted to kelvin
//! (L / L'(T)): `max_pixel_error_k`. A table whose figure exceeds the requested tolerance is
//! refused. Checked by converting every count of 16-bit ramps for several bands and
//! curves (`tests/frame_bound.rs`): the worst pixel is 63-87 % of the reported bound. The
//! emissivity-map and signal-input paths round a little more where the background
//! dominates (their L is a difference of larger terms); see
//! [`FrameConverter::convert_counts`].
//!
//! The f32 output limits the tolerance: 8-14 um over 250-1500 K cannot go below about
//! 0.26 mK (u T = 89 uK for the last Horner addition at 1500 K, plus the 1.5-ulp signal
//! allowance, 168 uK).
//!
//! # Identity of the rows
//!
//! A converter keeps a 64-bit fingerprint of its rows and geometry (`fingerprint.rs`) and
//! every re-wrap of stored parts recomputes it, so another table's rows are refused
//! ([`crate::Error::FrameRowsMismatch`]) instead of converting to wrong temperatures. Cost:
//! about 0.7 us per call for a 61-row table (README), against milliseconds for a frame.
//!
//! # Start-up and worst case
//!
//! Building a table costs curve evaluations: one inversion per row boundary, 7 evaluations
//! inside each row and a few probe rows per level (`build.rs` gives the order of work and
//! the worst case). Unservable requests are refused before that work: a tolerance under
//! the f32 floor before any evaluation, a table over [`MAX_TABLE_ROWS`] or over the
//! caller's storage after two. Three ways to start a converter, cheapest last:
//! [`FrameTable::required_rows`] then [`FrameConverter::new`] (two checks of the table);
//! [`FrameConverter::new`] alone into statically sized storage (one check); or the state
//! and rows built offline and kept in flash, re-wrapped with
//! [`FrameConverter::from_parts`] (geometry check and fingerprint) and adapted with
//! [`FrameConverter::set_scene`] (a few curve evaluations). The stored bytes are the same
//! on every little-endian target with 8-byte aligned f64.
//!
//! # Speed
//!
//! The batch loops work on chunks of [`LANES`] pixels held in fixed-size arrays: the
//! object signal and validity in passes the compiler vectorises (branch-free: validity
//! tests combine with `&`, not `&&`), then the lookup. On x86-64 the lookup is explicit
//! SIMD (`simd.rs`): each pixel's row is one 16-byte load, four rows are transposed in
//! registers and evaluated together, four pixels per SSE2 register or, where the
//! processor has AVX2 (detected once with `cpuid`), eight per AVX2 register with the whole
//! batch loop compiled for AVX2. Elsewhere (Arm, RISC-V, ...) the portable lookup runs:
//! the same passes in plain Rust, each row load bounded by a `min`. All paths compute the
//! same operations in the same order, so the same bits (`simd.rs` tests every lane of
//! random chunks against the portable path; the frame proptests compare every pixel with
//! the scalar reference path). `simd.rs` is the only module of the core with `unsafe`.
//! For a uniform scene, validity is a test of the counts against a window [n_lo, n_hi]
//! worked out once per scene with the pixel path's own f32 arithmetic (L(n) is monotone
//! in n), so the hot loop needs no signal clamps. Pixels that fail are classified in a
//! second, scalar pass over the rare chunks that hold one.
//!
//! Measured (`benches/frame.rs`, 640x512 u16 frame, one core of a shared 2-core AMD EPYC
//! VM, default x86-64 target with the AVX2 path chosen at run time): see the crate README
//! for the figures.

// The hot path is a handful of tiny functions that must inline into the chunk loop for it
// to vectorise; `#[inline(always)]` says so where LLVM's heuristics might not.
#![allow(clippy::inline_always)]
// Pixel validity tests use `&` on booleans, not `&&`: both sides are cheap compares, and
// without the short circuit the compiler keeps them as lane masks (callgrind: 9 instead of
// 25 instructions per pixel on the AVX2 path).
#![allow(clippy::needless_bitwise_bool)]

mod bad_pixels;
mod build;
mod converter;
mod drift;
pub(crate) mod fingerprint;
mod kernel;
mod lookup;
mod merit;
mod multipoint;
mod nonuniformity;
#[cfg(feature = "std")]
mod parallel;
mod params;
mod pixel_map;
#[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
mod simd;
mod summary;
mod table;

pub use bad_pixels::{
    detect_bad_pixels, BadPixelReport, BadPixelRules, BAD_GAIN, BAD_NOISY, BAD_OFFSET, BAD_ORDER,
    BAD_STUCK, BAD_USER,
};
pub use build::PROBES;
pub use converter::{ConverterState, FrameConverter};
pub use drift::{
    effective_exponent, net_signal, object_from_net_signal, DriftModel, DriftPoint,
    MAX_DRIFT_POINTS,
};
pub use merit::{dsnu_counts, fpn_k, netd_k, prnu, spatial_stats, SpatialStats};
pub use multipoint::{multi_point, multi_point_map_len, MultiPointReport, MAX_NUC_LEVELS};
pub use nonuniformity::{
    shutter_refresh, shutter_target_counts, two_point, CorrectedSummary, Correction, DriftStep,
    FrameStack, StackStats, TwoPointReport,
};
#[cfg(feature = "std")]
pub use parallel::MAX_THREADS;
pub use params::{CountsMap, Rails, TemperatureRange};
pub use pixel_map::PixelMap;
pub use summary::{FrameSummary, PixelStatus};
pub use table::{FrameTable, TableGeometry, TableRow};

use crate::error::{Error, Result};

/// Finest segment level tried: 2^12 = 4096 rows per octave of signal.
pub const MAX_LEVEL: u32 = 12;

/// The most rows a table may have: 2048 rows, 32 KiB. A range and tolerance that would
/// need more are refused before any row is built ([`crate::Error::FrameTableTooLarge`]),
/// which bounds the construction time on every input.
pub const MAX_TABLE_ROWS: usize = 2048;

/// Pixels per chunk of the batch loops.
pub const LANES: usize = 16;

/// Explicit f32 mantissa width.
const MANTISSA_BITS: u32 = 23;

/// Rounds to the nearest f32.
#[allow(clippy::cast_possible_truncation)]
fn to_f32(value: f64) -> f32 {
    value as f32
}

/// Rounds to f32, refusing what does not fit.
fn to_f32_checked(value: f64) -> Result<f32> {
    let rounded = to_f32(value);
    if rounded.is_finite() {
        Ok(rounded)
    } else {
        Err(Error::FrameCoefficientOverflow)
    }
}
