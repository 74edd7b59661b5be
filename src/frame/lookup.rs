//! The per-pixel table lookup: object signal L -> row index and position (from the f32
//! bits) -> Horner evaluation of the row. Everything the hot loop calls lives here.

use super::summary::PixelStatus;
use super::table::{TableGeometry, TableRow};

/// The hot-path view of a table: everything the index computation needs, by value.
#[derive(Clone, Copy)]
pub(super) struct Lookup<'a> {
    pub(super) rows: &'a [TableRow],
    pub(super) shift: u32,
    pub(super) first: u32,
    last: u32,
    pub(super) mask: u32,
    pub(super) lo: f32,
    pub(super) hi: f32,
}

impl<'a> Lookup<'a> {
    pub(super) fn new(geometry: &TableGeometry, rows: &'a [TableRow]) -> Self {
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
    pub(super) fn segment(&self, signal: f32) -> (usize, f32) {
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
    #[cfg_attr(
        all(target_arch = "x86_64", target_feature = "sse2", not(test)),
        allow(dead_code)
    )]
    #[inline(always)]
    pub(super) fn segment_u32(&self, signal: f32) -> (u32, f32) {
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
    pub(super) fn in_range(&self, signal: f32) -> bool {
        (signal >= self.lo) & (signal <= self.hi)
    }

    pub(super) fn temperature(&self, signal: f32) -> f32 {
        let (index, t) = self.segment(signal);
        eval_row(self.row(index), t)
    }

    pub(super) fn classify(&self, signal: f32) -> PixelStatus {
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
pub(super) fn mantissa_to_f32(bits: u32) -> f32 {
    (bits as i32) as f32
}

/// Horner evaluation of one row at t, in f32 without fused multiply-add, so that every
/// target computes the same bits as the construction check did.
#[inline(always)]
pub(super) fn eval_row(row: TableRow, t: f32) -> f32 {
    let [c0, c1, c2, c3] = row;
    ((c3 * t + c2) * t + c1) * t + c0
}
