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
//! The f32 output limits the tolerance: 8-14 um over 250-1500 K cannot go below about
//! 0.25 mK (half an ulp of 1500 K is 61 uK, plus the 1.5-ulp signal allowance).
//!
//! # Accuracy
//!
//! Construction evaluates the f32 table, exactly as the pixel path does, at 16 points of
//! every row and at the range ends, compares with exact inversion of the same signal
//! ([`SignalCurve::temperature`]: Newton on the exact band integral, or the closed-form
//! Sakuma-Hattori inverse), and adds an allowance of 1.5 f32 ulps of L for the
//! counts-to-signal arithmetic of a uniform scene: `max_pixel_error_k` =
//! max |T_table(L) - T(L)| + 1.5 * 2^-23 * L / L'(T). A table whose figure exceeds the
//! requested tolerance is refused. The emissivity-map and signal-input paths round a
//! little more where the background dominates (their L is a difference of larger
//! terms); see [`FrameConverter::convert_counts`].
//!
//! # Speed
//!
//! The batch loops work on chunks of [`LANES`] pixels held in fixed-size arrays, in
//! passes the compiler vectorises on stable Rust (signal and validity, row index and
//! position, row loads, Horner and the NaN select), with branch-free selects only; the
//! same code is the portable scalar path on targets without SIMD, and no `unsafe` is
//! used (each row load is bounded by a `min`, which compiles to a conditional move).
//! For a uniform scene, validity is a test of the counts against a window [n_lo, n_hi]
//! worked out once per scene with the pixel path's own f32 arithmetic (L(n) is monotone
//! in n), so the hot loop needs no signal clamps. Pixels that fail are classified in a
//! second, scalar pass over the rare chunks that hold one.
//!
//! Measured (`benches/frame.rs`, 640x512 u16 frame, one core of a shared 2-core AMD EPYC
//! VM, default x86-64 target, i.e. SSE2): see the crate README for the figures.

// The hot path is a handful of tiny functions that must inline into the chunk loop for it
// to vectorise; `#[inline(always)]` says so where LLVM's heuristics might not.
#![allow(clippy::inline_always)]

use crate::band::SignalCurve;
use crate::error::{check_temperature_k, Error, Result};
use crate::scene::Scene;

/// One table row: the cubic T = ((c3 r + c2) r + c1) r + c0 on one segment, in kelvin,
/// stored as `[c0, c1, c2, c3]`. r is the segment's position as the integer held in the
/// low 23 - level mantissa bits of the f32 signal, r in [0, 2^(23 - level)): the Hermite
/// coefficients in t = r 2^-(23 - level) scaled by powers of two (exact), which saves the
/// per-pixel scaling of t. In C: `float[4]`.
pub type TableRow = [f32; 4];

/// Finest segment level tried: 2^12 = 4096 rows per octave of signal.
pub const MAX_LEVEL: u32 = 12;

/// Pixels per chunk of the batch loops.
pub const LANES: usize = 16;

/// Explicit f32 mantissa width.
const MANTISSA_BITS: u32 = 23;

/// Check points per row of the construction check (t = j/16).
const CHECK_POINTS: u32 = 16;

/// Allowance, in f32 ulps of L, for the counts-to-signal arithmetic of a uniform scene:
/// (n - z_int) is exact, `- z_rem` and `* scale` each round once (0.5 ulp), and the f32
/// scale itself carries 0.5 ulp.
const SIGNAL_ROUNDING_ULPS: f64 = 1.5;

/// The largest signal a table may cover: two octaves below f32::MAX, so the end of the
/// last segment is still finite.
const MAX_TABLE_SIGNAL: f64 = 8.507_059e37;

/// A declared object-temperature range [lo_k, hi_k], K.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TemperatureRange {
    /// Lower end, K.
    pub lo_k: f64,
    /// Upper end, K.
    pub hi_k: f64,
}

impl TemperatureRange {
    /// A range 0 < `lo_k` < `hi_k`, K.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
    /// [`Error::FrameRangeInvalid`] unless `lo_k < hi_k`.
    pub fn new(lo_k: f64, hi_k: f64) -> Result<Self> {
        check_temperature_k(lo_k)?;
        check_temperature_k(hi_k)?;
        if lo_k < hi_k {
            Ok(TemperatureRange { lo_k, hi_k })
        } else {
            Err(Error::FrameRangeInvalid)
        }
    }
}

/// Affine map from detector counts n to the sensor signal S in the curve's units:
/// S = gain * n + offset.
///
/// For a Sakuma-Hattori calibration in counts, gain = 1 and offset = -dark counts
/// ([`CountsMap::dark_offset`]); for a radiometric calibration over the band radiance,
/// gain in (W m^-2 sr^-1) per count and offset in W m^-2 sr^-1 ([`CountsMap::linear`]).
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CountsMap {
    gain: f64,
    offset: f64,
}

impl CountsMap {
    /// S = `gain` n + `offset`; `gain` > 0 in signal units per count, `offset` in signal
    /// units.
    ///
    /// # Errors
    /// [`Error::FrameCountsMapInvalid`] unless `gain` is finite and positive and `offset`
    /// finite.
    pub fn linear(gain: f64, offset: f64) -> Result<Self> {
        if gain.is_finite() && gain > 0.0 && offset.is_finite() {
            Ok(CountsMap { gain, offset })
        } else {
            Err(Error::FrameCountsMapInvalid)
        }
    }

    /// S = n - `dark_counts`: a calibration curve in counts above the dark level.
    ///
    /// # Errors
    /// [`Error::FrameCountsMapInvalid`] for a non-finite `dark_counts`.
    pub fn dark_offset(dark_counts: f64) -> Result<Self> {
        CountsMap::linear(1.0, -dark_counts)
    }

    /// Gain, signal units per count.
    #[must_use]
    pub fn gain(&self) -> f64 {
        self.gain
    }

    /// Offset, signal units.
    #[must_use]
    pub fn offset(&self) -> f64 {
        self.offset
    }
}

/// The detector's rails: counts at or below `dead_counts` are dead pixels, counts at or
/// above `saturation_counts` are saturated. A pixel stuck at the top rail reads as
/// saturated: one frame cannot tell the two apart.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Rails {
    dead_counts: u16,
    saturation_counts: u16,
}

impl Default for Rails {
    /// The rails of a full 16-bit converter: dead at 0, saturated at 65535.
    fn default() -> Self {
        Rails {
            dead_counts: 0,
            saturation_counts: u16::MAX,
        }
    }
}

impl Rails {
    /// Rails with `dead_counts` < `saturation_counts` (a 14-bit converter: 0 and 16383).
    ///
    /// # Errors
    /// [`Error::FrameRailsInvalid`] unless `dead_counts < saturation_counts`.
    pub fn new(dead_counts: u16, saturation_counts: u16) -> Result<Self> {
        if dead_counts < saturation_counts {
            Ok(Rails {
                dead_counts,
                saturation_counts,
            })
        } else {
            Err(Error::FrameRailsInvalid)
        }
    }

    /// Counts at or below which a pixel is dead.
    #[must_use]
    pub fn dead_counts(&self) -> u16 {
        self.dead_counts
    }

    /// Counts at or above which a pixel is saturated.
    #[must_use]
    pub fn saturation_counts(&self) -> u16 {
        self.saturation_counts
    }
}

/// What became of one pixel. Every pixel gets exactly one status; the first that applies
/// in this order wins.
#[repr(u32)]
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum PixelStatus {
    /// Converted; the output is the object temperature in K.
    Converted = 0,
    /// Counts at or below the dead rail.
    Dead = 1,
    /// Counts at or above the saturation rail.
    Saturated = 2,
    /// The pixel's emissivity is outside (0, 1] or NaN.
    EmissivityInvalid = 3,
    /// A signal input was NaN or infinite.
    NonFinite = 4,
    /// The object's own signal L is at or below zero: the sensor sees no more than the
    /// background (reflections, air, window).
    BelowBackground = 5,
    /// 0 < L < L(lo_k): colder than the table's range.
    BelowRange = 6,
    /// L > L(hi_k): hotter than the table's range.
    AboveRange = 7,
}

/// Counts of pixel outcomes for one frame. Every non-converted pixel's output is NaN.
/// `pixels` = `converted` + the sum of the other fields.
#[repr(C)]
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct FrameSummary {
    /// Pixels in the frame.
    pub pixels: u64,
    /// Pixels converted to a temperature.
    pub converted: u64,
    /// [`PixelStatus::Dead`] pixels.
    pub dead: u64,
    /// [`PixelStatus::Saturated`] pixels.
    pub saturated: u64,
    /// [`PixelStatus::EmissivityInvalid`] pixels.
    pub emissivity_invalid: u64,
    /// [`PixelStatus::NonFinite`] pixels.
    pub non_finite: u64,
    /// [`PixelStatus::BelowBackground`] pixels.
    pub below_background: u64,
    /// [`PixelStatus::BelowRange`] pixels.
    pub below_range: u64,
    /// [`PixelStatus::AboveRange`] pixels.
    pub above_range: u64,
}

impl FrameSummary {
    fn record(&mut self, status: PixelStatus) {
        let field = match status {
            PixelStatus::Converted => return,
            PixelStatus::Dead => &mut self.dead,
            PixelStatus::Saturated => &mut self.saturated,
            PixelStatus::EmissivityInvalid => &mut self.emissivity_invalid,
            PixelStatus::NonFinite => &mut self.non_finite,
            PixelStatus::BelowBackground => &mut self.below_background,
            PixelStatus::BelowRange => &mut self.below_range,
            PixelStatus::AboveRange => &mut self.above_range,
        };
        *field += 1;
    }

    fn failed(&self) -> u64 {
        self.dead
            + self.saturated
            + self.emissivity_invalid
            + self.non_finite
            + self.below_background
            + self.below_range
            + self.above_range
    }
}

/// Where a table lives in signal space and what its construction measured. Plain data
/// (`#[repr(C)]`, `Copy`): a C caller keeps it beside the rows and hands both back.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TableGeometry {
    /// Rows per octave of signal = 2^level.
    level: u32,
    /// `bits(L) >> (23 - level)` of the first row.
    first_segment: u32,
    /// Rows used.
    rows: u32,
    /// f32 signal at `lo_k` (nearest), curve units: smaller signals are below range.
    signal_lo: f32,
    /// f32 signal at `hi_k` (nearest), curve units: larger signals are above range.
    signal_hi: f32,
    /// Declared range, K.
    lo_k: f64,
    hi_k: f64,
    /// Requested tolerance, K.
    tolerance_k: f64,
    /// Measured max |T_table(L) - T(L)| over the check grid, K.
    max_table_error_k: f64,
    /// `max_table_error_k` plus the uniform-scene signal rounding allowance, K.
    max_pixel_error_k: f64,
}

impl TableGeometry {
    /// Rows per octave of signal = 2^level.
    #[must_use]
    pub fn level(&self) -> u32 {
        self.level
    }
    /// Rows the table uses.
    #[must_use]
    pub fn rows(&self) -> usize {
        self.rows as usize
    }
    /// Table storage in bytes (16 per row).
    #[must_use]
    pub fn bytes(&self) -> usize {
        self.rows() * core::mem::size_of::<TableRow>()
    }
    /// The f32 signal at `lo_k`, curve units.
    #[must_use]
    pub fn signal_lo(&self) -> f32 {
        self.signal_lo
    }
    /// The f32 signal at `hi_k`, curve units.
    #[must_use]
    pub fn signal_hi(&self) -> f32 {
        self.signal_hi
    }
    /// The declared range.
    #[must_use]
    pub fn range(&self) -> TemperatureRange {
        TemperatureRange {
            lo_k: self.lo_k,
            hi_k: self.hi_k,
        }
    }
    /// The requested tolerance, K.
    #[must_use]
    pub fn tolerance_k(&self) -> f64 {
        self.tolerance_k
    }
    /// Measured max |T_table(L) - T_exact(L)| on the check grid (16 points per row and
    /// the range ends; f32 table evaluation against exact inversion of the same f32
    /// signal), K.
    #[must_use]
    pub fn max_table_error_k(&self) -> f64 {
        self.max_table_error_k
    }
    /// [`TableGeometry::max_table_error_k`] plus 1.5 f32 ulps of L converted to kelvin
    /// (L / L'(T)): the bound for a uniform-scene pixel from counts; at most the
    /// tolerance, K.
    #[must_use]
    pub fn max_pixel_error_k(&self) -> f64 {
        self.max_pixel_error_k
    }

    fn shift(&self) -> u32 {
        MANTISSA_BITS - self.level
    }

    /// Validates the geometry: level, signal ends, and that the ends fall on the first and
    /// last rows.
    fn check(&self) -> Result<()> {
        if self.level > MAX_LEVEL
            || self.rows == 0
            || !(self.signal_lo >= f32::MIN_POSITIVE)
            || !(self.signal_lo < self.signal_hi)
            || !(f64::from(self.signal_hi) <= MAX_TABLE_SIGNAL)
        {
            return Err(Error::FrameTableInvalid);
        }
        let shift = self.shift();
        let first = self.signal_lo.to_bits() >> shift;
        let last = self.signal_hi.to_bits() >> shift;
        if first != self.first_segment || last - first + 1 != self.rows {
            return Err(Error::FrameTableInvalid);
        }
        Ok(())
    }
}

/// The hot-path view of a table: everything the index computation needs, by value.
#[derive(Clone, Copy)]
struct Lookup<'a> {
    rows: &'a [TableRow],
    shift: u32,
    first: u32,
    last: u32,
    mask: u32,
    lo: f32,
    hi: f32,
}

impl<'a> Lookup<'a> {
    fn new(geometry: &TableGeometry, rows: &'a [TableRow]) -> Self {
        let shift = geometry.shift();
        Lookup {
            rows,
            shift,
            first: geometry.first_segment,
            last: geometry.rows.saturating_sub(1),
            mask: (1u32 << shift) - 1,
            lo: geometry.signal_lo,
            hi: geometry.signal_hi,
        }
    }

    /// Row index and position t in [0, 1) of a signal, clamped into the table (NaN goes
    /// to the first row). Branch-free selects only.
    #[inline(always)]
    fn segment(&self, signal: f32) -> (usize, f32) {
        let c = if signal > self.lo { signal } else { self.lo };
        let c = if c < self.hi { c } else { self.hi };
        let bits = c.to_bits();
        let row = (bits >> self.shift).wrapping_sub(self.first);
        let row = if row < self.last { row } else { self.last };
        (row as usize, mantissa_to_f32(bits & self.mask))
    }

    /// As [`Lookup::segment`] without the clamp, with a 32-bit row index (keeps SIMD lanes
    /// 32 bits wide). Exact for signals in range; for others the index is garbage that the
    /// row load bounds, and the pixel is discarded.
    #[inline(always)]
    fn segment_u32(&self, signal: f32) -> (u32, f32) {
        let bits = signal.to_bits();
        let row = (bits >> self.shift).wrapping_sub(self.first);
        (row, mantissa_to_f32(bits & self.mask))
    }

    #[inline(always)]
    fn row(&self, index: usize) -> TableRow {
        match self.rows.get(index) {
            Some(row) => *row,
            None => [f32::NAN; 4],
        }
    }

    #[inline(always)]
    fn in_range(&self, signal: f32) -> bool {
        signal >= self.lo && signal <= self.hi
    }

    fn temperature(&self, signal: f32) -> f32 {
        let (index, t) = self.segment(signal);
        eval_row(self.row(index), t)
    }

    fn classify(&self, signal: f32) -> PixelStatus {
        if signal.is_nan() {
            PixelStatus::NonFinite
        } else if !(signal > 0.0) {
            PixelStatus::BelowBackground
        } else if signal < self.lo {
            PixelStatus::BelowRange
        } else if signal > self.hi {
            PixelStatus::AboveRange
        } else {
            PixelStatus::Converted
        }
    }
}

/// A value below 2^23 as f32 (exact), through the signed conversion every SIMD unit has.
#[inline(always)]
#[allow(clippy::cast_possible_wrap, clippy::cast_precision_loss)]
fn mantissa_to_f32(bits: u32) -> f32 {
    (bits as i32) as f32
}

/// Horner evaluation of one row at t, in f32 without fused multiply-add, so that every
/// target computes the same bits as the construction check did.
#[inline(always)]
fn eval_row(row: TableRow, t: f32) -> f32 {
    let [c0, c1, c2, c3] = row;
    ((c3 * t + c2) * t + c1) * t + c0
}

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

/// The Hermite row of one segment [s0, s1): T and dT/dt = (s1 - s0) / L'(T) at both ends
/// from the exact curve, converted to power-basis coefficients in f64 and rounded once.
fn hermite_row<C: SignalCurve + ?Sized>(curve: &C, shift: u32, segment: u32) -> Result<TableRow> {
    let s0 = f64::from(f32::from_bits(segment << shift));
    let s1 = f64::from(f32::from_bits(segment.wrapping_add(1) << shift));
    let width = s1 - s0;
    let node = |signal: f64| -> Result<(f64, f64)> {
        let temperature_k = curve.temperature(signal)?;
        let (_, slope) = curve.signal_and_derivative(temperature_k)?;
        if slope > 0.0 && slope.is_finite() {
            Ok((temperature_k, width / slope))
        } else {
            Err(Error::FrameToleranceUnreachable)
        }
    };
    let (t0, m0) = node(s0)?;
    let (t1, m1) = node(s1)?;
    let c2 = 3.0 * (t1 - t0) - 2.0 * m0 - m1;
    let c3 = 2.0 * (t0 - t1) + m0 + m1;
    // From t in [0, 1) to r = t 2^shift: powers of two, exact (no f32 underflow: shift <= 23).
    let scale = libm::exp2(-f64::from(shift));
    Ok([
        to_f32_checked(t0)?,
        to_f32_checked(m0 * scale)?,
        to_f32_checked(c2 * scale * scale)?,
        to_f32_checked(c3 * scale * scale * scale)?,
    ])
}

/// The geometry of a level-`level` table over the given f32 signal ends (errors not yet
/// measured).
fn geometry_for(
    level: u32,
    signal_lo: f32,
    signal_hi: f32,
    range: TemperatureRange,
) -> TableGeometry {
    let shift = MANTISSA_BITS - level;
    let first = signal_lo.to_bits() >> shift;
    let last = signal_hi.to_bits() >> shift;
    TableGeometry {
        level,
        first_segment: first,
        rows: last - first + 1,
        signal_lo,
        signal_hi,
        lo_k: range.lo_k,
        hi_k: range.hi_k,
        tolerance_k: 0.0,
        max_table_error_k: 0.0,
        max_pixel_error_k: 0.0,
    }
}

/// Measures a table against exact inversion: for every row, 16 points t = j/16 inside the
/// declared range, plus the range ends. Returns (max table error, max pixel error), or
/// `None` as soon as the pixel error exceeds `tolerance_k`.
fn measure<C, R>(
    curve: &C,
    geometry: &TableGeometry,
    mut row_of: R,
    tolerance_k: f64,
) -> Result<Option<(f64, f64)>>
where
    C: SignalCurve + ?Sized,
    R: FnMut(u32) -> Result<TableRow>,
{
    let lookup = Lookup::new(geometry, &[]);
    let shift = geometry.shift();
    let step = 1u32 << (shift - 4); // shift >= 11, so 16 points per row
    let ulp_allowance = SIGNAL_ROUNDING_ULPS * f64::from(f32::EPSILON);
    let mut max_table = 0.0f64;
    let mut max_pixel = 0.0f64;
    for index in 0..geometry.rows {
        let row = row_of(index)?;
        let base = (geometry.first_segment + index) << shift;
        let ends = [
            (index == 0).then_some(geometry.signal_lo),
            (index + 1 == geometry.rows).then_some(geometry.signal_hi),
        ];
        let inner = (0..CHECK_POINTS).map(|j| Some(f32::from_bits(base + j * step)));
        for signal in inner.chain(ends).flatten() {
            if !lookup.in_range(signal) {
                continue;
            }
            let (found, t) = lookup.segment(signal);
            if found != index as usize {
                return Err(Error::FrameTableInvalid);
            }
            let approx = f64::from(eval_row(row, t));
            let exact = curve.temperature(f64::from(signal))?;
            let (_, slope) = curve.signal_and_derivative(exact)?;
            let table_error = libm::fabs(approx - exact);
            let pixel_error = table_error + ulp_allowance * f64::from(signal) / slope;
            if !(pixel_error <= tolerance_k) {
                return Ok(None);
            }
            max_table = max_table.max(table_error);
            max_pixel = max_pixel.max(pixel_error);
        }
    }
    Ok(Some((max_table, max_pixel)))
}

/// Finds the coarsest level whose table meets `tolerance_k`, measuring rows computed on
/// the fly (no storage).
fn plan<C: SignalCurve + ?Sized>(
    curve: &C,
    range: TemperatureRange,
    tolerance_k: f64,
) -> Result<TableGeometry> {
    let range = TemperatureRange::new(range.lo_k, range.hi_k)?;
    if !(tolerance_k.is_finite() && tolerance_k > 0.0) {
        return Err(Error::FrameToleranceInvalid);
    }
    let (signal_lo, signal_hi) = signal_ends(curve, range)?;
    let mut last_error = Error::FrameToleranceUnreachable;
    for level in 0..=MAX_LEVEL {
        let mut geometry = geometry_for(level, signal_lo, signal_hi, range);
        let shift = geometry.shift();
        let first = geometry.first_segment;
        let measured = measure(
            curve,
            &geometry,
            |index| hermite_row(curve, shift, first + index),
            tolerance_k,
        );
        match measured {
            Ok(Some((table_error, pixel_error))) => {
                geometry.tolerance_k = tolerance_k;
                geometry.max_table_error_k = table_error;
                geometry.max_pixel_error_k = pixel_error;
                return Ok(geometry);
            }
            Ok(None) => last_error = Error::FrameToleranceUnreachable,
            // A coarse row may reach outside the curve's domain; finer rows stay closer.
            Err(error) => last_error = error,
        }
    }
    Err(last_error)
}

/// The f32 signals at the range ends, checked to lie in the normal f32 range.
fn signal_ends<C: SignalCurve + ?Sized>(curve: &C, range: TemperatureRange) -> Result<(f32, f32)> {
    let lo = curve.signal(range.lo_k)?;
    let hi = curve.signal(range.hi_k)?;
    if !(lo >= f64::from(f32::MIN_POSITIVE) && hi <= MAX_TABLE_SIGNAL) {
        return Err(Error::FrameSignalUnrepresentable);
    }
    let (lo, hi) = (to_f32(lo), to_f32(hi));
    if lo < hi {
        Ok((lo, hi))
    } else {
        Err(Error::FrameRangeInvalid)
    }
}

/// A temperature table over the object signal L of one curve, in caller-owned rows.
///
/// Build with [`FrameTable::build`] after asking [`FrameTable::required_rows`] how many
/// rows to provide; re-wrap stored parts with [`FrameTable::from_parts`].
#[derive(Clone, Copy, Debug)]
pub struct FrameTable<'t> {
    geometry: TableGeometry,
    rows: &'t [TableRow],
}

impl<'t> FrameTable<'t> {
    /// Rows a table of `curve` over `range` needs to meet `tolerance_k` (K) for every
    /// pixel of a uniform scene: the coarsest level 0..=[`MAX_LEVEL`] (2^level rows per
    /// octave of signal) whose measured `max_pixel_error_k` is at most `tolerance_k`.
    /// Storage is 16 bytes per row. Runs the same check as [`FrameTable::build`], with no
    /// storage (a few ms for a rectangular band).
    ///
    /// Example (measured, `tests/frame_table.rs`): 8-14 um energy band, 250-1500 K, 1 mK:
    /// level 3, 62 rows, 992 bytes.
    ///
    /// # Errors
    /// [`Error::FrameRangeInvalid`], [`Error::TemperatureNotPositive`],
    /// [`Error::NonFinite`], [`Error::FrameToleranceInvalid`],
    /// [`Error::FrameSignalUnrepresentable`], [`Error::FrameToleranceUnreachable`] (f32
    /// output resolves about 6e-8 T, so very small tolerances at high temperature are
    /// refused), and errors of the curve.
    pub fn required_rows<C: SignalCurve + ?Sized>(
        curve: &C,
        range: TemperatureRange,
        tolerance_k: f64,
    ) -> Result<usize> {
        plan(curve, range, tolerance_k).map(|geometry| geometry.rows())
    }

    /// Builds the table into `storage` (at least [`FrameTable::required_rows`] rows; only
    /// that many are written), then measures the stored table against exact inversion
    /// and refuses it unless `max_pixel_error_k <= tolerance_k`.
    ///
    /// # Errors
    /// As [`FrameTable::required_rows`], and [`Error::FrameStorageTooSmall`].
    pub fn build<C: SignalCurve + ?Sized>(
        curve: &C,
        range: TemperatureRange,
        tolerance_k: f64,
        storage: &'t mut [TableRow],
    ) -> Result<Self> {
        let mut geometry = plan(curve, range, tolerance_k)?;
        let used = storage
            .get_mut(..geometry.rows())
            .ok_or(Error::FrameStorageTooSmall)?;
        let shift = geometry.shift();
        for (index, slot) in (0u32..).zip(used.iter_mut()) {
            *slot = hermite_row(curve, shift, geometry.first_segment + index)?;
        }
        let rows: &'t [TableRow] = used;
        let measured = measure(
            curve,
            &geometry,
            |index| {
                rows.get(index as usize)
                    .copied()
                    .ok_or(Error::FrameTableInvalid)
            },
            tolerance_k,
        )?;
        let (table_error, pixel_error) = measured.ok_or(Error::FrameToleranceUnreachable)?;
        geometry.max_table_error_k = table_error;
        geometry.max_pixel_error_k = pixel_error;
        Ok(FrameTable { geometry, rows })
    }

    /// Re-wraps a geometry and rows that [`FrameTable::build`] produced (the C ABI keeps
    /// them in caller storage between calls). Only the geometry's consistency is checked,
    /// not the rows' values.
    ///
    /// # Errors
    /// [`Error::FrameTableInvalid`] for an inconsistent geometry,
    /// [`Error::FrameStorageTooSmall`] if `rows` is shorter than the geometry says.
    pub fn from_parts(geometry: TableGeometry, rows: &'t [TableRow]) -> Result<Self> {
        geometry.check()?;
        let rows = rows
            .get(..geometry.rows())
            .ok_or(Error::FrameStorageTooSmall)?;
        Ok(FrameTable { geometry, rows })
    }

    /// The table's geometry and measured errors.
    #[must_use]
    pub fn geometry(&self) -> TableGeometry {
        self.geometry
    }

    /// The rows in use.
    #[must_use]
    pub fn rows(&self) -> &'t [TableRow] {
        self.rows
    }

    /// The signal interval [s0, s1) that row `index` covers, curve units.
    #[must_use]
    pub fn interval(&self, index: usize) -> Option<(f32, f32)> {
        if index >= self.geometry.rows() {
            return None;
        }
        let shift = self.geometry.shift();
        let segment = self.geometry.first_segment + u32::try_from(index).ok()?;
        Some((
            f32::from_bits(segment << shift),
            f32::from_bits((segment + 1) << shift),
        ))
    }

    /// Temperature of an object signal L (curve units), K, or `None` outside
    /// [`TableGeometry::signal_lo`]..=[`TableGeometry::signal_hi`] (NaN included).
    /// Accuracy: [`TableGeometry::max_table_error_k`].
    #[must_use]
    pub fn temperature_k(&self, object_signal: f32) -> Option<f32> {
        let lookup = Lookup::new(&self.geometry, self.rows);
        lookup
            .in_range(object_signal)
            .then(|| lookup.temperature(object_signal))
    }
}

/// Per-pixel scene coefficients in f32 (see the module formulas). Plain data.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PixelMap {
    /// Uniform scene from counts: L = ((n - zero_int) - zero_rem) * scale.
    counts_zero_int: f32,
    counts_zero_rem: f32,
    counts_scale: f32,
    /// Emissivity map from counts: L = ((n - k_int) - k_rem) * k_scale / e + reflected.
    counts_k_int: f32,
    counts_k_rem: f32,
    counts_k_scale: f32,
    /// Uniform scene from signal: L = (S - background) * scale.
    signal_background: f32,
    signal_scale: f32,
    /// Emissivity map from signal: L = (S - k) * k_scale / e + reflected.
    signal_k: f32,
    signal_k_scale: f32,
    /// Lr, curve units.
    reflected_signal: f32,
    /// 1 when the emissivity-map coefficients exist.
    map_ready: u32,
}

/// An offset split into an f32 integer part (exact below 2^24) and an f32 remainder.
fn split_offset(value: f64) -> Result<(f32, f32)> {
    let whole = if libm::fabs(value) < 16_777_216.0 {
        libm::round(value)
    } else {
        value
    };
    let whole = to_f32_checked(whole)?;
    Ok((whole, to_f32_checked(value - f64::from(whole))?))
}

impl PixelMap {
    /// Coefficients for `scene` over `curve` with counts map `counts`: G and B from
    /// [`Scene::grey_terms`], K = B at e = 1 plus tw ta Lr, Lr = curve signal at the
    /// scene's reflected temperature.
    ///
    /// # Errors
    /// Errors of [`Scene::grey_terms`] and [`Error::FrameCoefficientOverflow`]. A curve
    /// without a signal at the reflected temperature only disables emissivity maps.
    pub fn new<C: SignalCurve + ?Sized>(
        curve: &C,
        scene: &Scene,
        counts: CountsMap,
    ) -> Result<Self> {
        let terms = scene.grey_terms(curve)?;
        let (zero_int, zero_rem) = split_offset((terms.background - counts.offset) / counts.gain)?;
        let mut map = PixelMap {
            counts_zero_int: zero_int,
            counts_zero_rem: zero_rem,
            counts_scale: to_f32_checked(counts.gain / terms.gain)?,
            counts_k_int: f32::NAN,
            counts_k_rem: f32::NAN,
            counts_k_scale: f32::NAN,
            signal_background: to_f32_checked(terms.background)?,
            signal_scale: to_f32_checked(1.0 / terms.gain)?,
            signal_k: f32::NAN,
            signal_k_scale: f32::NAN,
            reflected_signal: f32::NAN,
            map_ready: 0,
        };
        let transmittance = scene.window_transmittance() * scene.atm_transmittance();
        let others = scene.with_emissivity(1.0)?.grey_terms(curve)?.background;
        if let Ok(reflected) = curve.signal(scene.reflected_k()) {
            let k = others + transmittance * reflected;
            let (k_int, k_rem) = split_offset((k - counts.offset) / counts.gain)?;
            map.counts_k_int = k_int;
            map.counts_k_rem = k_rem;
            map.counts_k_scale = to_f32_checked(counts.gain / transmittance)?;
            map.signal_k = to_f32_checked(k)?;
            map.signal_k_scale = to_f32_checked(1.0 / transmittance)?;
            map.reflected_signal = to_f32_checked(reflected)?;
            map.map_ready = 1;
        }
        Ok(map)
    }

    /// Object signal L of a uniform-scene pixel with `counts`, curve units.
    #[inline(always)]
    fn object_counts(&self, counts: f32) -> f32 {
        ((counts - self.counts_zero_int) - self.counts_zero_rem) * self.counts_scale
    }

    /// Object signal L of a pixel with `counts` and emissivity `e`, curve units.
    #[inline(always)]
    fn object_counts_e(&self, counts: f32, e: f32) -> f32 {
        ((counts - self.counts_k_int) - self.counts_k_rem) * self.counts_k_scale / e
            + self.reflected_signal
    }

    #[inline(always)]
    fn object_signal(&self, signal: f32) -> f32 {
        (signal - self.signal_background) * self.signal_scale
    }

    #[inline(always)]
    fn object_signal_e(&self, signal: f32, e: f32) -> f32 {
        (signal - self.signal_k) * self.signal_k_scale / e + self.reflected_signal
    }
}

/// Everything a converter is besides its rows: plain data (`#[repr(C)]`, `Copy`) that a C
/// caller can keep in static storage beside the rows.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ConverterState {
    /// The table's geometry and measured errors.
    pub geometry: TableGeometry,
    /// The scene's per-pixel coefficients.
    pub map: PixelMap,
    /// The counts map the coefficients were made with.
    pub counts: CountsMap,
    /// The detector's rails.
    pub rails: Rails,
}

/// A frame converter: a [`FrameTable`] plus the scene's per-pixel coefficients and the
/// detector's rails. Built once; the scene can be changed cheaply with
/// [`FrameConverter::set_scene`] (no table rebuild).
#[derive(Clone, Copy, Debug)]
pub struct FrameConverter<'t> {
    state: ConverterState,
    rows: &'t [TableRow],
    /// Counts n with dead < n < saturation and L(n) in the table's range, as f32 bounds
    /// [lo, hi] (empty when lo > hi): the uniform-scene validity test, derived from the
    /// state.
    window: (f32, f32),
}

#[inline(always)]
fn valid_emissivity(e: f32) -> bool {
    e > 0.0 && e <= 1.0
}

impl<'t> FrameConverter<'t> {
    /// Builds the table for `curve` over `range` into `storage` (see
    /// [`FrameTable::build`]) and the coefficients of `scene` with counts map `counts`.
    ///
    /// `curve` is the object's blackbody signal in the units the counts map produces:
    /// a [`crate::band::Band`] with a radiometric [`CountsMap::linear`], or a
    /// [`crate::calibration::SakumaHattori`] in counts with [`CountsMap::dark_offset`].
    ///
    /// # Errors
    /// As [`FrameTable::build`] and [`PixelMap::new`].
    pub fn new<C: SignalCurve + ?Sized>(
        curve: &C,
        scene: &Scene,
        counts: CountsMap,
        rails: Rails,
        range: TemperatureRange,
        tolerance_k: f64,
        storage: &'t mut [TableRow],
    ) -> Result<Self> {
        let table = FrameTable::build(curve, range, tolerance_k, storage)?;
        let map = PixelMap::new(curve, scene, counts)?;
        let state = ConverterState {
            geometry: table.geometry,
            map,
            counts,
            rails,
        };
        Ok(FrameConverter {
            state,
            rows: table.rows,
            window: counts_window(&state),
        })
    }

    /// Re-wraps a state and rows kept by a caller.
    ///
    /// # Errors
    /// As [`FrameTable::from_parts`], and [`Error::FrameRailsInvalid`].
    pub fn from_parts(state: ConverterState, rows: &'t [TableRow]) -> Result<Self> {
        let table = FrameTable::from_parts(state.geometry, rows)?;
        Rails::new(state.rails.dead_counts, state.rails.saturation_counts)?;
        Ok(FrameConverter {
            state,
            rows: table.rows,
            window: counts_window(&state),
        })
    }

    /// The plain-data state (geometry, scene coefficients, counts map, rails).
    #[must_use]
    pub fn state(&self) -> ConverterState {
        self.state
    }

    /// The table.
    #[must_use]
    pub fn table(&self) -> FrameTable<'t> {
        FrameTable {
            geometry: self.state.geometry,
            rows: self.rows,
        }
    }

    /// Replaces the scene (emissivity, reflected temperature, air, window) without
    /// rebuilding the table. `curve` must be the table's curve: its signal at the range's
    /// ends must round to the table's f32 ends.
    ///
    /// # Errors
    /// [`Error::FrameCurveMismatch`], and as [`PixelMap::new`].
    pub fn set_scene<C: SignalCurve + ?Sized>(&mut self, curve: &C, scene: &Scene) -> Result<()> {
        let geometry = self.state.geometry;
        if signal_ends(curve, geometry.range())? != (geometry.signal_lo, geometry.signal_hi) {
            return Err(Error::FrameCurveMismatch);
        }
        self.state.map = PixelMap::new(curve, scene, self.state.counts)?;
        self.window = counts_window(&self.state);
        Ok(())
    }

    /// Replaces the rails.
    pub fn set_rails(&mut self, rails: Rails) {
        self.state.rails = rails;
        self.window = counts_window(&self.state);
    }

    /// Object temperature of one pixel from counts (the scalar reference path), K, and its
    /// status; NaN unless [`PixelStatus::Converted`]. `emissivity` overrides the scene's.
    #[must_use]
    pub fn pixel_from_counts(&self, counts: u16, emissivity: Option<f32>) -> (f32, PixelStatus) {
        let lookup = Lookup::new(&self.state.geometry, self.rows);
        let map = &self.state.map;
        let rails = self.state.rails;
        let status = if counts <= rails.dead_counts {
            PixelStatus::Dead
        } else if counts >= rails.saturation_counts {
            PixelStatus::Saturated
        } else {
            match emissivity {
                None => lookup.classify(map.object_counts(f32::from(counts))),
                Some(e) if valid_emissivity(e) && map.map_ready == 1 => {
                    lookup.classify(map.object_counts_e(f32::from(counts), e))
                }
                Some(_) => PixelStatus::EmissivityInvalid,
            }
        };
        let signal = match emissivity {
            None => map.object_counts(f32::from(counts)),
            Some(e) => map.object_counts_e(f32::from(counts), e),
        };
        finish(&lookup, signal, status)
    }

    /// Object temperature of one pixel from the sensor signal S (curve units), K, and its
    /// status, as [`FrameConverter::pixel_from_counts`].
    #[must_use]
    pub fn pixel_from_signal(&self, signal: f32, emissivity: Option<f32>) -> (f32, PixelStatus) {
        let lookup = Lookup::new(&self.state.geometry, self.rows);
        let map = &self.state.map;
        let object = match emissivity {
            None => map.object_signal(signal),
            Some(e) => map.object_signal_e(signal, e),
        };
        let status = if signal.is_finite() {
            match emissivity {
                Some(e) if !(valid_emissivity(e) && map.map_ready == 1) => {
                    PixelStatus::EmissivityInvalid
                }
                _ => lookup.classify(object),
            }
        } else {
            PixelStatus::NonFinite
        };
        finish(&lookup, object, status)
    }

    /// Converts a frame of counts to object temperature in K, pixel by pixel in order:
    /// `kelvin[i]` from `counts[i]` and, if given, `emissivity[i]` (which replaces the
    /// scene's emissivity for that pixel). Failed pixels come out NaN and are counted in
    /// the summary; they never stop the frame.
    ///
    /// Accuracy against exact inversion of the scene's measurement equation
    /// ([`Scene::object_temperature`]): uniform scene, at most
    /// [`TableGeometry::max_pixel_error_k`] (<= the tolerance); with an emissivity map,
    /// add about 2 f32 ulps of (|L - Lr| + Lr) converted to kelvin (|L - Lr| + Lr) *
    /// 1.2e-7 / L'(T) -- beyond the tolerance only where a cold, low-emissivity pixel
    /// sits in much hotter surroundings.
    ///
    /// # Errors
    /// [`Error::FrameLengthMismatch`] if the buffers differ in length;
    /// [`Error::FrameEmissivityMapUnavailable`] if a map is given but the curve had no
    /// signal at the reflected temperature.
    pub fn convert_counts(
        &self,
        counts: &[u16],
        emissivity: Option<&[f32]>,
        kelvin: &mut [f32],
    ) -> Result<FrameSummary> {
        check_lengths(counts.len(), emissivity, kelvin.len())?;
        let lookup = Lookup::new(&self.state.geometry, self.rows);
        let map = self.state.map;
        let (window_lo, window_hi) = self.window;
        // Rails compared in f32 (exact for u16): cheaper lanes than unsigned 16-bit compares.
        let (dead, saturated) = (
            f32::from(self.state.rails.dead_counts),
            f32::from(self.state.rails.saturation_counts),
        );
        let mut summary = FrameSummary {
            pixels: counts.len() as u64,
            ..FrameSummary::default()
        };
        match emissivity {
            None => run(
                &lookup,
                counts,
                None,
                kelvin,
                &mut summary,
                #[inline(always)]
                |n: u16, _| {
                    let x = f32::from(n);
                    (x >= window_lo && x <= window_hi, map.object_counts(x))
                },
                |n: u16, _| self.pixel_from_counts(n, None).1,
            ),
            Some(em) => {
                if map.map_ready != 1 {
                    return Err(Error::FrameEmissivityMapUnavailable);
                }
                run(
                    &lookup,
                    counts,
                    Some(em),
                    kelvin,
                    &mut summary,
                    #[inline(always)]
                    |n: u16, e: f32| {
                        let x = f32::from(n);
                        let s = map.object_counts_e(x, e);
                        (
                            x > dead && x < saturated && valid_emissivity(e) && lookup.in_range(s),
                            s,
                        )
                    },
                    |n: u16, e| self.pixel_from_counts(n, Some(e)).1,
                );
            }
        }
        summary.converted = summary.pixels - summary.failed();
        Ok(summary)
    }

    /// Converts a frame of sensor signal S (the curve's units: band radiance in
    /// W m^-2 sr^-1 for a band curve, counts above dark for a Sakuma-Hattori curve) to
    /// object temperature in K, as [`FrameConverter::convert_counts`]. NaN or infinite
    /// inputs are counted as [`PixelStatus::NonFinite`].
    ///
    /// Accuracy: the table's plus the f32 rounding of S - B (about 1 ulp of S + B,
    /// converted to kelvin by 1/(G L'(T))).
    ///
    /// # Errors
    /// As [`FrameConverter::convert_counts`].
    pub fn convert_signal(
        &self,
        signal: &[f32],
        emissivity: Option<&[f32]>,
        kelvin: &mut [f32],
    ) -> Result<FrameSummary> {
        check_lengths(signal.len(), emissivity, kelvin.len())?;
        let lookup = Lookup::new(&self.state.geometry, self.rows);
        let map = self.state.map;
        let mut summary = FrameSummary {
            pixels: signal.len() as u64,
            ..FrameSummary::default()
        };
        match emissivity {
            None => run(
                &lookup,
                signal,
                None,
                kelvin,
                &mut summary,
                #[inline(always)]
                |s: f32, _| {
                    let l = map.object_signal(s);
                    (s.is_finite() && lookup.in_range(l), l)
                },
                |s: f32, _| self.pixel_from_signal(s, None).1,
            ),
            Some(em) => {
                if map.map_ready != 1 {
                    return Err(Error::FrameEmissivityMapUnavailable);
                }
                run(
                    &lookup,
                    signal,
                    Some(em),
                    kelvin,
                    &mut summary,
                    #[inline(always)]
                    |s: f32, e: f32| {
                        let l = map.object_signal_e(s, e);
                        (
                            s.is_finite() && valid_emissivity(e) && lookup.in_range(l),
                            l,
                        )
                    },
                    |s: f32, e| self.pixel_from_signal(s, Some(e)).1,
                );
            }
        }
        summary.converted = summary.pixels - summary.failed();
        Ok(summary)
    }
}

/// The counts n with dead < n < saturation whose uniform-scene signal lies in the table's
/// range. Every f32 operation of [`PixelMap::object_counts`] is monotone, so the set is an
/// interval; its ends come from two binary searches with the pixel path's own arithmetic.
fn counts_window(state: &ConverterState) -> (f32, f32) {
    let lookup = Lookup::new(&state.geometry, &[]);
    let signal = |n: u32| state.map.object_counts(mantissa_to_f32(n));
    let start = u32::from(state.rails.dead_counts) + 1;
    let end = u32::from(state.rails.saturation_counts);
    let first = partition_point(start, end, |n| signal(n) < lookup.lo);
    let past_last = partition_point(start, end, |n| signal(n) <= lookup.hi);
    if first < past_last {
        (mantissa_to_f32(first), mantissa_to_f32(past_last - 1))
    } else {
        (1.0, 0.0)
    }
}

/// The first n in [start, end) where `pred` is false, for a predicate that is true and
/// then false; `end` if it never fails.
fn partition_point<P: Fn(u32) -> bool>(start: u32, end: u32, pred: P) -> u32 {
    let (mut lo, mut hi) = (start, end.max(start));
    while lo < hi {
        let mid = lo + (hi - lo) / 2;
        if pred(mid) {
            lo = mid + 1;
        } else {
            hi = mid;
        }
    }
    lo
}

/// Output of one pixel: the table's temperature if converted, else NaN.
fn finish(lookup: &Lookup<'_>, signal: f32, status: PixelStatus) -> (f32, PixelStatus) {
    if status == PixelStatus::Converted {
        (lookup.temperature(signal), status)
    } else {
        (f32::NAN, status)
    }
}

fn check_lengths(input: usize, emissivity: Option<&[f32]>, output: usize) -> Result<()> {
    let map_ok = emissivity.is_none_or(|em| em.len() == input);
    if input == output && map_ok {
        Ok(())
    } else {
        Err(Error::FrameLengthMismatch)
    }
}

/// One chunk of [`LANES`] pixels: object signals and validity (vectorisable), row
/// indices and positions (vectorisable), row loads (scalar gathers), Horner and the NaN
/// select (vectorisable). Returns true if any pixel failed.
#[inline(always)]
fn chunk<I: Copy, S>(
    lookup: &Lookup<'_>,
    input: &[I; LANES],
    emissivity: &[f32; LANES],
    out: &mut [f32; LANES],
    signal_of: &S,
) -> bool
where
    S: Fn(I, f32) -> (bool, f32),
{
    let mut signal = [0.0f32; LANES];
    let mut valid = [0u32; LANES];
    for j in 0..LANES {
        let (v, s) = signal_of(input[j], emissivity[j]);
        valid[j] = u32::from(v);
        signal[j] = s;
    }
    let mut index = [0u32; LANES];
    let mut t = [0.0f32; LANES];
    for j in 0..LANES {
        (index[j], t[j]) = lookup.segment_u32(signal[j]);
    }
    let mut c0 = [0.0f32; LANES];
    let mut c1 = [0.0f32; LANES];
    let mut c2 = [0.0f32; LANES];
    let mut c3 = [0.0f32; LANES];
    let rows = lookup.rows;
    let Some(last) = rows.len().checked_sub(1) else {
        *out = [f32::NAN; LANES];
        return true;
    };
    for j in 0..LANES {
        // Provably in bounds (i <= last < len), so the fallback compiles away.
        let row = rows
            .get((index[j] as usize).min(last))
            .copied()
            .unwrap_or([f32::NAN; 4]);
        c0[j] = row[0];
        c1[j] = row[1];
        c2[j] = row[2];
        c3[j] = row[3];
    }
    let mut good = 1u32;
    for j in 0..LANES {
        let value = ((c3[j] * t[j] + c2[j]) * t[j] + c1[j]) * t[j] + c0[j];
        out[j] = if valid[j] == 1 { value } else { f32::NAN };
        good &= valid[j];
    }
    good == 0
}

/// The batch loop: full chunks through [`chunk`], the tail and every failed pixel through
/// the scalar path (`classify` gives the failed pixel's status).
#[inline(always)]
fn run<I: Copy, S, K>(
    lookup: &Lookup<'_>,
    input: &[I],
    emissivity: Option<&[f32]>,
    out: &mut [f32],
    summary: &mut FrameSummary,
    signal_of: S,
    classify: K,
) where
    S: Fn(I, f32) -> (bool, f32),
    K: Fn(I, f32) -> PixelStatus,
{
    const ONES: [f32; LANES] = [1.0; LANES];
    let mut tally = |input: &[I], emissivity: Option<&[f32]>, out: &[f32]| {
        for (k, (&x, &value)) in input.iter().zip(out).enumerate() {
            if value.is_nan() {
                let e = emissivity.and_then(|em| em.get(k).copied()).unwrap_or(1.0);
                summary.record(classify(x, e));
            }
        }
    };
    let whole = input.len() - input.len() % LANES;
    let (input_body, input_tail) = input.split_at(whole.min(input.len()));
    let (out_body, out_tail) = out.split_at_mut(whole.min(out.len()));
    match emissivity {
        None => {
            for (x, y) in input_body
                .chunks_exact(LANES)
                .zip(out_body.chunks_exact_mut(LANES))
            {
                let (Ok(xa), Ok(ya)) = (
                    <&[I; LANES]>::try_from(x),
                    <&mut [f32; LANES]>::try_from(&mut *y),
                ) else {
                    continue;
                };
                if chunk(lookup, xa, &ONES, ya, &signal_of) {
                    tally(x, None, y);
                }
            }
            scalar_tail(lookup, input_tail, None, out_tail, &signal_of);
            tally(input_tail, None, out_tail);
        }
        Some(em) => {
            let (em_body, em_tail) = em.split_at(whole.min(em.len()));
            for ((x, e), y) in input_body
                .chunks_exact(LANES)
                .zip(em_body.chunks_exact(LANES))
                .zip(out_body.chunks_exact_mut(LANES))
            {
                let (Ok(xa), Ok(ea), Ok(ya)) = (
                    <&[I; LANES]>::try_from(x),
                    <&[f32; LANES]>::try_from(e),
                    <&mut [f32; LANES]>::try_from(&mut *y),
                ) else {
                    continue;
                };
                if chunk(lookup, xa, ea, ya, &signal_of) {
                    tally(x, Some(e), y);
                }
            }
            scalar_tail(lookup, input_tail, Some(em_tail), out_tail, &signal_of);
            tally(input_tail, Some(em_tail), out_tail);
        }
    }
}

/// The pixels after the last full chunk, one at a time.
fn scalar_tail<I: Copy, S>(
    lookup: &Lookup<'_>,
    input: &[I],
    emissivity: Option<&[f32]>,
    out: &mut [f32],
    signal_of: &S,
) where
    S: Fn(I, f32) -> (bool, f32),
{
    for (k, (&x, y)) in input.iter().zip(out.iter_mut()).enumerate() {
        let e = emissivity.and_then(|em| em.get(k).copied()).unwrap_or(1.0);
        let (valid, s) = signal_of(x, e);
        *y = if valid {
            lookup.temperature(s)
        } else {
            f32::NAN
        };
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::band::Band;
    use crate::planck::Detector;

    /// A C caller can hand back any bytes as a geometry: each inconsistency is refused.
    #[test]
    fn tampered_geometry_is_refused() {
        let band = Band::rectangular(8.0, 14.0, Detector::Energy).unwrap();
        let range = TemperatureRange::new(250.0, 1500.0).unwrap();
        let mut storage = [[0.0f32; 4]; 256];
        let good = FrameTable::build(&band, range, 1e-3, &mut storage)
            .unwrap()
            .geometry();
        let rows = [[300.0f32; 4]; 256];
        assert!(FrameTable::from_parts(good, &rows).is_ok());
        let tampered = [
            TableGeometry {
                level: MAX_LEVEL + 1,
                ..good
            },
            TableGeometry {
                level: good.level + 1,
                ..good
            },
            TableGeometry {
                first_segment: good.first_segment + 1,
                ..good
            },
            TableGeometry {
                rows: good.rows - 1,
                ..good
            },
            TableGeometry { rows: 0, ..good },
            TableGeometry {
                signal_lo: f32::NAN,
                ..good
            },
            TableGeometry {
                signal_lo: good.signal_hi,
                ..good
            },
            TableGeometry {
                signal_hi: f32::INFINITY,
                ..good
            },
        ];
        for geometry in tampered {
            assert_eq!(
                FrameTable::from_parts(geometry, &rows).map(|t| t.geometry()),
                Err(Error::FrameTableInvalid),
                "{geometry:?}"
            );
        }
    }
}
