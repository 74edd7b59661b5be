//! The table stage: rows (cubic Hermite pieces of T(L) on f32-bit segments), their
//! construction and the check that measures them against exact inversion.

use super::build::plan;
use super::fingerprint::fingerprint;
use super::lookup::Lookup;
use super::params::TemperatureRange;
use super::{to_f32, MANTISSA_BITS, MAX_LEVEL};
use crate::band::SignalCurve;
use crate::error::{Error, Result};

/// One table row: the cubic T = ((c3 r + c2) r + c1) r + c0 on one segment, in kelvin,
/// stored as `[c0, c1, c2, c3]`. r is the segment's position as the integer held in the
/// low 23 - level mantissa bits of the f32 signal, r in [0, 2^(23 - level)): the Hermite
/// coefficients in t = r 2^-(23 - level) scaled by powers of two (exact), which saves the
/// per-pixel scaling of t. In C: `float[4]`.
pub type TableRow = [f32; 4];

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
    pub(super) lo_k: f64,
    pub(super) hi_k: f64,
    /// Requested tolerance, K.
    pub(super) tolerance_k: f64,
    /// Bound on |T_table(L) - T(L)| for f32 signals L in range, K.
    pub(super) max_table_error_k: f64,
    /// `max_table_error_k` plus the uniform-scene signal rounding allowance, K.
    pub(super) max_pixel_error_k: f64,
    /// Fingerprint of the rows and the fields above (see `fingerprint.rs`).
    pub(crate) fingerprint: u64,
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
    /// Bound on |T_table(L) - T_exact(L)| for every f32 signal L in
    /// [`TableGeometry::signal_lo`]..=[`TableGeometry::signal_hi`]: the f32 table evaluation
    /// against exact inversion of the same signal, K. Per row, the largest error at 9 check
    /// points (measured with the stored f32 coefficients) times 8/7 for the points between
    /// them (or, where smaller, twice the centre error plus the coefficients' rounding),
    /// plus a rigorous bound on the f32 Horner rounding; see the derivation in the module
    /// docs ("Accuracy") and in `build.rs`.
    #[must_use]
    pub fn max_table_error_k(&self) -> f64 {
        self.max_table_error_k
    }
    /// [`TableGeometry::max_table_error_k`] plus 2 f32 ulps of L converted to kelvin
    /// (2^-22 L / L'(T), the largest over the rows): the bound for a uniform-scene pixel
    /// from counts against exact inversion of the f64 signal; at most the tolerance, K.
    #[must_use]
    pub fn max_pixel_error_k(&self) -> f64 {
        self.max_pixel_error_k
    }
    /// The fingerprint of the rows this geometry was built with (and of the geometry),
    /// checked by [`FrameTable::from_parts`].
    #[must_use]
    pub fn fingerprint(&self) -> u64 {
        self.fingerprint
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

/// The geometry of a level-`level` table over the given f32 signal ends (errors not yet
/// measured).
pub(super) fn geometry_for(
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
        fingerprint: 0,
    }
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
    /// octave of signal) whose `max_pixel_error_k` bound is at most `tolerance_k`.
    /// Storage is 16 bytes per row. Runs the same check as [`FrameTable::build`], with no
    /// storage.
    ///
    /// Example (measured, `tests/frame_table.rs`): 8-14 um energy band, 250-1500 K, 1 mK:
    /// level 3, 61 rows, 976 bytes.
    ///
    /// Time: bounded on every input. Tolerances below the f32 output floor (u hi_k / 4,
    /// u = 2^-24) are refused before any curve evaluation; then two curve evaluations give
    /// the rows of every level from the f32 bits of the signal ends, a table over
    /// [`MAX_TABLE_ROWS`](super::MAX_TABLE_ROWS) is refused before its rows are built, and a few probe rows per
    /// level skip levels that cannot pass. Worst case: see the module docs ("Start-up and
    /// worst case").
    ///
    /// # Errors
    /// [`Error::FrameRangeInvalid`], [`Error::TemperatureNotPositive`],
    /// [`Error::NonFinite`], [`Error::FrameToleranceInvalid`],
    /// [`Error::FrameSignalUnrepresentable`], [`Error::FrameToleranceUnreachable`] (f32
    /// output resolves about 6e-8 T, so very small tolerances at high temperature are
    /// refused), [`Error::FrameTableTooLarge`], and errors of the curve.
    pub fn required_rows<C: SignalCurve + ?Sized>(
        curve: &C,
        range: TemperatureRange,
        tolerance_k: f64,
    ) -> Result<usize> {
        plan(curve, range, tolerance_k, None).map(|geometry| geometry.rows())
    }

    /// Builds the table into `storage` (at least [`FrameTable::required_rows`] rows; only
    /// that many are written): each row is checked as it is stored, with the same check
    /// as [`FrameTable::required_rows`], and the table is refused unless
    /// `max_pixel_error_k <= tolerance_k`. The geometry carries the rows' fingerprint.
    ///
    /// # Errors
    /// As [`FrameTable::required_rows`], and [`Error::FrameStorageTooSmall`] as soon as a
    /// level under consideration needs more rows than `storage` holds (every later level
    /// needs more).
    pub fn build<C: SignalCurve + ?Sized>(
        curve: &C,
        range: TemperatureRange,
        tolerance_k: f64,
        storage: &'t mut [TableRow],
    ) -> Result<Self> {
        let mut geometry = plan(curve, range, tolerance_k, Some(&mut *storage))?;
        let rows: &'t [TableRow] = storage
            .get(..geometry.rows())
            .ok_or(Error::FrameStorageTooSmall)?;
        geometry.fingerprint = fingerprint(&geometry, rows);
        Ok(FrameTable { geometry, rows })
    }

    /// Re-wraps a geometry and rows that [`FrameTable::build`] produced (the C ABI keeps
    /// them in caller storage between calls). The geometry's consistency is checked, then
    /// the rows' fingerprint against the one stored in the geometry.
    ///
    /// # Errors
    /// [`Error::FrameTableInvalid`] for an inconsistent geometry,
    /// [`Error::FrameStorageTooSmall`] if `rows` is shorter than the geometry says,
    /// [`Error::FrameRowsMismatch`] for rows other than the ones the geometry was built
    /// with (another table's, or changed since).
    pub fn from_parts(geometry: TableGeometry, rows: &'t [TableRow]) -> Result<Self> {
        geometry.check()?;
        let rows = rows
            .get(..geometry.rows())
            .ok_or(Error::FrameStorageTooSmall)?;
        if fingerprint(&geometry, rows) != geometry.fingerprint {
            return Err(Error::FrameRowsMismatch);
        }
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
        let rows = storage;
        assert!(FrameTable::from_parts(good, &rows).is_ok());
        // Rows that are not the built ones, and a geometry whose recorded figures were
        // edited, fail the fingerprint.
        let mut foreign = rows;
        foreign[7][2] = f32::from_bits(foreign[7][2].to_bits() ^ 1);
        assert_eq!(
            FrameTable::from_parts(good, &foreign).map(|t| t.geometry()),
            Err(Error::FrameRowsMismatch)
        );
        let edited = TableGeometry {
            max_pixel_error_k: good.max_pixel_error_k / 2.0,
            ..good
        };
        assert_eq!(
            FrameTable::from_parts(edited, &rows).map(|t| t.geometry()),
            Err(Error::FrameRowsMismatch)
        );
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
