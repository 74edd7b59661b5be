//! The table stage: rows (cubic Hermite pieces of T(L) on f32-bit segments), their
//! construction and the check that measures them against exact inversion.

use super::lookup::{eval_row, Lookup};
use super::params::TemperatureRange;
use super::{to_f32, to_f32_checked, MANTISSA_BITS, MAX_LEVEL};
use crate::band::SignalCurve;
use crate::error::{Error, Result};

/// One table row: the cubic T = ((c3 r + c2) r + c1) r + c0 on one segment, in kelvin,
/// stored as `[c0, c1, c2, c3]`. r is the segment's position as the integer held in the
/// low 23 - level mantissa bits of the f32 signal, r in [0, 2^(23 - level)): the Hermite
/// coefficients in t = r 2^-(23 - level) scaled by powers of two (exact), which saves the
/// per-pixel scaling of t. In C: `float[4]`.
pub type TableRow = [f32; 4];
/// Check points per row of the construction check (t = j/16).
const CHECK_POINTS: u32 = 16;

/// Allowance, in f32 ulps of L, for the counts-to-signal arithmetic of a uniform scene:
/// (n - z_int) is exact, `- z_rem` and `* scale` each round once (0.5 ulp), and the f32
/// scale itself carries 0.5 ulp.
const SIGNAL_ROUNDING_ULPS: f64 = 1.5;

/// The largest signal a table may cover: two octaves below f32::MAX, so the end of the
/// last segment is still finite.
const MAX_TABLE_SIGNAL: f64 = 8.507_059e37;

/// Where a table lives in signal space and what its construction measured. Plain data
/// (`#[repr(C)]`, `Copy`): a C caller keeps it beside the rows and hands both back.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TableGeometry {
    /// Rows per octave of signal = 2^level.
    pub(super) level: u32,
    /// `bits(L) >> (23 - level)` of the first row.
    pub(super) first_segment: u32,
    /// Rows used.
    pub(super) rows: u32,
    /// f32 signal at `lo_k` (nearest), curve units: smaller signals are below range.
    pub(super) signal_lo: f32,
    /// f32 signal at `hi_k` (nearest), curve units: larger signals are above range.
    pub(super) signal_hi: f32,
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

    pub(super) fn shift(&self) -> u32 {
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
pub(super) fn signal_ends<C: SignalCurve + ?Sized>(
    curve: &C,
    range: TemperatureRange,
) -> Result<(f32, f32)> {
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
    pub(super) geometry: TableGeometry,
    pub(super) rows: &'t [TableRow],
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
