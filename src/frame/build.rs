//! The table's construction and its error bound.
//!
//! # Order of work, cheapest refusal first
//!
//! 1. Arguments (no curve evaluation). Then the f32 output floor: every table's bound holds
//!    the rounding of the last Horner addition, at least u T with u = 2^-24 and T >= hi_k/4
//!    on the last row (a band signal grows at least linearly in T, so the last row, at most
//!    one octave of signal wide, starts above hi_k/2), so `tolerance_k <= u hi_k / 4` is
//!    refused at once.
//! 2. The signal at the range ends (two curve evaluations). The rows of every level follow
//!    from the ends' f32 bits alone: 2^level rows per octave; a level needing more than
//!    [`MAX_TABLE_ROWS`] ends the search ([`Error::FrameTableTooLarge`]), a level needing
//!    more than the caller's storage ends it too ([`Error::FrameStorageTooSmall`]).
//! 3. Probes: for each level, [`PROBES`] rows spread over the range (first and last
//!    included) are built and their error at the centre t = 1/2 (where the Hermite error
//!    peaks) is taken. Each probe is a lower bound on what the full check finds, so a
//!    failing probe skips the level without its full check.
//! 4. The full check of the first level whose probes pass, row by row, stopping at the
//!    first row over the tolerance; then the next level, and so on. Levels of at most 64
//!    rows skip the probes (the full check stops at their first failing row anyway).
//!    `build` checks every row densely (9 points) and reports the tighter of two bounds per
//!    row; `required_rows`, which only needs the level, accepts a row on its centre-only
//!    bound when that fits, and checks densely only the rows where it does not; a level it
//!    would refuse while some row was accepted on the centre alone is checked again
//!    densely, so both pick the same level (`tests/frame_table.rs` checks this).
//!
//! Worst case, in curve evaluations E (one signal-and-derivative of the curve; an
//! inversion is I, a Newton solve of at most a few E for a band, closed form for a
//! Sakuma-Hattori curve): 2 E for the ends, at most 13 levels x [`PROBES`] x (2 I + E) of
//! probes, and full checks over at most 2 x [`MAX_TABLE_ROWS`] rows (each level has twice
//! the rows of the one before, and none has more than [`MAX_TABLE_ROWS`]) at
//! (I + 7 E + 2 E for the range ends) per row, twice for an undecided lazy level. The
//! slowest refusal found (a 0.4-0.5 um photon band, 500-5000 K, 0.5 mK: probes pass at
//! ~1250 rows, the full check fails, the next level is too large) takes 9-13 ms on
//! the host (`benches/frame.rs`, group `table_rows_refusal`); refusals at the f32 floor
//! take nanoseconds.
//!
//! Start-up measured with callgrind (`examples/frame_startup.rs`, 8-14 um energy band,
//! 250-1200 K, 1 mK, 56 rows; host x86-64 instructions, before -> now):
//! `required_rows` + `new` 12.28 M -> 0.85 M (14.5x; 10 287 -> 756 band evaluations),
//! `new` alone 0.48 M (425 evaluations), a stored converter re-wrapped and given its scene 8 k.
//!
//! # The bound
//!
//! For row i with nodes (T0, L0) and (T1, L1) the reported table error is
//!
//! ```text
//! E_i = min(E_s / (1 - 8 d^2), E_c)          interpolation, dense check plus margin
//!     + g1|c0| + g3|c1|R + g5|c2|R^2 + g6|c3|R^3   f32 Horner rounding (rigorous)
//! ```
//!
//! with E_c the centre-only bound under the same premise (see `check_row`): twice the
//! Hermite remainder at t = 1/2, plus the coefficients' rounding. It is rarely the smaller
//! in `build`, and is what lets `required_rows` skip most dense points.
//!
//! - E_s is the largest |P(r) - T(L(r))| over the check points r = j R / 8, j = 0..8,
//!   that lie in the range, and the range ends; P is the row's cubic with its stored f32
//!   coefficients, evaluated in f64 (error below 1e-15 relative), so the rounding of the
//!   coefficients is measured, not bounded. At the nodes T is known; inside, T(L) comes
//!   from one Newton step from P's value: T = P - (L(P) - L)/L'(P). The step's own error
//!   is below (max|L''| / L') e^2; it is bounded by widening e by 2 k |e| with k the
//!   row's |ln(L'(T1)/L'(T0))| / (T1 - T0), and a point where k|e| > 1/4 counts as
//!   failed.
//! - The margin between check points: the Hermite remainder is
//!   e(t) = f''''(xi)/24 t^2 (1 - t)^2 (f = T(L(t)), t in [0, 1] across the row), so with
//!   f'''' within a factor 2 across a row (a row is at most one octave of a signal in
//!   which T is analytic and log-like; at the levels tables use, 1/8 octave or finer, it
//!   varies by a few percent) |e''| <= 2 f''''/12 = 64 max|e|. The maximum of |e| lies
//!   within d/2 of a check point (spacing d = 1/8) and is a turning point there, so it
//!   exceeds that point's value by at most |e''| d^2 / 8 = 8 d^2 max|e|, which gives the
//!   factor 1 / (1 - 8 d^2) = 8/7. This is the "dense check plus a stated margin" kind of
//!   bound: rigorous given the factor-2 premise, which is common practice for Hermite
//!   tables of smooth functions, not proven here.
//! - Horner rounding: t is exact (an integer below 2^23), and ((c3 t + c2) t + c1) t + c0
//!   in f32 without fused multiply-add gives c_k t^k relative perturbations of
//!   g1, g3, g5, g6 (g_n = n u / (1 - n u), u = 2^-24) [Higham, Accuracy and Stability of
//!   Numerical Algorithms, 2nd ed., 5.1]; R = 2^(23 - level) bounds t.
//!
//! A uniform-scene pixel from counts adds the rounding of its f32 signal,
//! [`SIGNAL_ROUNDING_ULPS`] f32 ulps of L, worth that times L / L'(T) in kelvin; taken at
//! the row's larger node (L / L' grows with T). `max_pixel_error_k` = max_i E_i + max_i
//! of that allowance.

use super::lookup::Lookup;
use super::params::TemperatureRange;
use super::table::{geometry_for, signal_ends, TableGeometry, TableRow};
use super::{to_f32_checked, MAX_LEVEL, MAX_TABLE_ROWS};
use crate::band::SignalCurve;
use crate::error::{Error, Result};

/// Check intervals per row: points t = j/8.
const CHECK_INTERVALS: u32 = 8;

/// Margin factor for the maximum between check points, 1 / (1 - 8 d^2), d = 1/8.
const BETWEEN_POINTS: f64 = 8.0 / 7.0;

/// Rows probed per level before its full check.
pub const PROBES: u32 = 5;

/// Levels with more rows than this are probed before their full check.
const PROBE_ABOVE_ROWS: u32 = 64;

/// f32 unit roundoff, 2^-24.
const UNIT_ROUNDOFF: f64 = 5.960_464_477_539_063e-8;

/// Allowance, in f32 ulps of L (2^-23 L), for the counts-to-signal arithmetic of a
/// uniform scene: (n - z_int) is exact, `- z_rem` and `* scale` each round once (0.5 ulp),
/// and the f32 scale carries 0.5 ulp. Not counted: the f32 rounding of the remainder
/// z_rem, at most 2^-25 counts, which is below 1/128 ulp of L for pixels at least 64
/// counts above the background zero z, and the f64 coefficients (about 1e-16 relative).
pub(super) const SIGNAL_ROUNDING_ULPS: f64 = 1.5;

/// Exact T and the slope dL/dT at one segment boundary.
#[derive(Clone, Copy)]
struct Node {
    signal: f64,
    temperature_k: f64,
    slope: f64,
}

fn node<C: SignalCurve + ?Sized>(curve: &C, signal: f64) -> Result<Node> {
    let temperature_k = curve.temperature(signal)?;
    let (_, slope) = curve.signal_and_derivative(temperature_k)?;
    if slope > 0.0 && slope.is_finite() {
        Ok(Node {
            signal,
            temperature_k,
            slope,
        })
    } else {
        Err(Error::FrameToleranceUnreachable)
    }
}

fn segment_start(segment: u32, shift: u32) -> f64 {
    f64::from(f32::from_bits(segment << shift))
}

/// The Hermite row between two nodes: T and dT/dt = (L1 - L0) / L'(T) at both ends,
/// converted to power-basis coefficients in f64 and rounded once.
fn hermite_row(n0: &Node, n1: &Node, shift: u32) -> Result<TableRow> {
    let width = n1.signal - n0.signal;
    let (t0, t1) = (n0.temperature_k, n1.temperature_k);
    let (m0, m1) = (width / n0.slope, width / n1.slope);
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

/// The row's cubic at r in f64 (the f32 coefficients are exact in f64).
fn cubic(row: &TableRow, r: f64) -> f64 {
    let [c0, c1, c2, c3] = row.map(f64::from);
    ((c3 * r + c2) * r + c1) * r + c0
}

/// Bound on the f32 Horner rounding over r in [0, span].
fn horner_rounding(row: &TableRow, span: f64) -> f64 {
    let g = |n: f64| n * UNIT_ROUNDOFF / (1.0 - n * UNIT_ROUNDOFF);
    let [c0, c1, c2, c3] = row.map(|c| libm::fabs(f64::from(c)));
    g(1.0) * c0 + g(3.0) * c1 * span + g(5.0) * c2 * span * span + g(6.0) * c3 * span * span * span
}

/// T_row(L) - T(L) at one signal inside the row, by one Newton step from the row's value
/// (see the module docs): the signed estimate and the bound on its magnitude; `None` when
/// the step cannot be trusted.
fn signed_point_error<C: SignalCurve + ?Sized>(
    curve: &C,
    row: &TableRow,
    r: f64,
    signal: f64,
    curvature: f64,
) -> Result<Option<(f64, f64)>> {
    let approx = cubic(row, r);
    let (at_approx, slope) = curve.signal_and_derivative(approx)?;
    if !(slope > 0.0 && slope.is_finite()) {
        return Ok(None);
    }
    let error = (at_approx - signal) / slope;
    let widen = curvature * libm::fabs(error);
    Ok((widen <= 0.25).then_some((error, libm::fabs(error) * (1.0 + 2.0 * widen))))
}

/// |T_row(L) - T(L)| bound at one signal, as [`signed_point_error`].
fn point_error<C: SignalCurve + ?Sized>(
    curve: &C,
    row: &TableRow,
    r: f64,
    signal: f64,
    curvature: f64,
) -> Result<Option<f64>> {
    Ok(signed_point_error(curve, row, r, signal, curvature)?.map(|(_, bound)| bound))
}

/// k = |ln(L'(T1)/L'(T0))| / (T1 - T0): the row's log-slope change per kelvin.
fn row_curvature(n0: &Node, n1: &Node) -> f64 {
    libm::fabs(libm::log(n1.slope / n0.slope))
        / libm::fabs(n1.temperature_k - n0.temperature_k).max(f64::MIN_POSITIVE)
}

/// The uniform-scene signal rounding in kelvin, at the row's larger L / L'.
fn signal_allowance(n0: &Node, n1: &Node) -> f64 {
    SIGNAL_ROUNDING_ULPS * 2.0 * UNIT_ROUNDOFF * (n0.signal / n0.slope).max(n1.signal / n1.slope)
}

/// What the check of one row found: its table error bound and its signal allowance, K,
/// and whether the bound is the centre-only one of a lazy check.
#[derive(Clone, Copy)]
struct RowBound {
    table_k: f64,
    signal_k: f64,
    centre_only: bool,
}

/// Checks one row over its part of [lo, hi] (see the module docs). `None` when a check
/// point cannot be trusted (the row is far too coarse).
///
/// Two bounds under the same premise (the fourth derivative within a factor 2 across the
/// row, one sign): the dense one (all check points, margin 8/7) and the centre one,
/// 2 (|e(1/2) - dc0| + w) + |dc0| + 3 D + Horner, where dc0 = c0 - T0 is the stored
/// constant's exact rounding, D = u (|c1| R + |c2| R^2 + |c3| R^3) bounds the other
/// coefficients' rounding and w the Newton step's widening: the Hermite remainder is at
/// most twice its centre value. The row's bound is the smaller. With `lazy` =
/// (tolerance, largest signal allowance so far), the dense points are skipped when the
/// centre bound already fits. A row whose centre bound is at most `known_max` (the largest
/// row bound so far) cannot raise the table's maximum, so its dense points are skipped in
/// either mode: the reported maximum is the one the dense check of every row would give.
#[allow(clippy::too_many_arguments)]
fn check_row<C: SignalCurve + ?Sized>(
    curve: &C,
    lookup: &Lookup<'_>,
    row: &TableRow,
    nodes: (&Node, &Node),
    segment: u32,
    shift: u32,
    lazy: Option<(f64, f64)>,
    known_max: f64,
) -> Result<Option<RowBound>> {
    let (n0, n1) = nodes;
    let span = f64::from(1u32 << shift);
    let base = segment << shift;
    let curvature = row_curvature(n0, n1);
    let horner = horner_rounding(row, span);
    let signal_k = signal_allowance(n0, n1);
    let step = 1u32 << (shift - 3);
    // The centre bound.
    let centre_bits = base + (CHECK_INTERVALS / 2) * step;
    let centre = f32::from_bits(centre_bits);
    let mut centre_bound = f64::INFINITY;
    let mut worst = 0.0f64;
    if lookup.in_range(centre) {
        let r = f64::from(centre_bits - base);
        let Some((e, bound)) = signed_point_error(curve, row, r, f64::from(centre), curvature)?
        else {
            return Ok(None);
        };
        worst = bound;
        let dc0 = f64::from(row[0]) - n0.temperature_k;
        let [_, c1, c2, c3] = row.map(|c| libm::fabs(f64::from(c)));
        let d =
            UNIT_ROUNDOFF * (1.0 + UNIT_ROUNDOFF) * (c1 * span + (c2 + c3 * span) * span * span);
        let widen = bound - libm::fabs(e);
        centre_bound = 2.0 * (libm::fabs(e - dc0) + widen) + libm::fabs(dc0) + 3.0 * d + horner;
        if centre_bound <= known_max {
            return Ok(Some(RowBound {
                table_k: centre_bound,
                signal_k,
                centre_only: false,
            }));
        }
        if let Some((tolerance_k, max_signal)) = lazy {
            if centre_bound + max_signal.max(signal_k) <= tolerance_k {
                return Ok(Some(RowBound {
                    table_k: centre_bound,
                    signal_k,
                    centre_only: true,
                }));
            }
        }
    }
    let mut consider = |error: Option<f64>| -> bool {
        match error {
            Some(e) => {
                worst = worst.max(e);
                true
            }
            None => false,
        }
    };
    // The nodes: T known exactly.
    if lookup.in_range(f32::from_bits(base)) {
        consider(Some(libm::fabs(cubic(row, 0.0) - n0.temperature_k)));
    }
    if lookup.in_range(f32::from_bits((segment + 1) << shift)) {
        consider(Some(libm::fabs(cubic(row, span) - n1.temperature_k)));
    }
    let inner = (1..CHECK_INTERVALS)
        .filter(|&j| j != CHECK_INTERVALS / 2)
        .map(|j| base + j * step);
    let ends = [lookup.lo, lookup.hi]
        .into_iter()
        .map(f32::to_bits)
        .filter(|&bits| bits >> shift == segment);
    for bits in inner.chain(ends) {
        let signal = f32::from_bits(bits);
        if !lookup.in_range(signal) {
            continue;
        }
        let r = f64::from(bits - base);
        if !consider(point_error(curve, row, r, f64::from(signal), curvature)?) {
            return Ok(None);
        }
    }
    Ok(Some(RowBound {
        table_k: (worst * BETWEEN_POINTS + horner).min(centre_bound),
        signal_k,
        centre_only: false,
    }))
}

/// Lower bounds on a row's pixel error: (everything, the level-independent floor), from
/// the centre point only; `None` when the centre's Newton step cannot be trusted.
fn probe_row<C: SignalCurve + ?Sized>(
    curve: &C,
    lookup: &Lookup<'_>,
    segment: u32,
    shift: u32,
) -> Result<Option<(f64, f64)>> {
    let n0 = node(curve, segment_start(segment, shift))?;
    let n1 = node(curve, segment_start(segment + 1, shift))?;
    let row = hermite_row(&n0, &n1, shift)?;
    // The floor: the last Horner addition's rounding (g1 |c0|) and the signal allowance,
    // which no finer level removes.
    let floor = UNIT_ROUNDOFF * libm::fabs(f64::from(row[0])) + signal_allowance(&n0, &n1);
    let centre = f32::from_bits((segment << shift) + (1u32 << (shift - 1)));
    if !lookup.in_range(centre) {
        return Ok(Some((floor, floor)));
    }
    let r = f64::from(1u32 << (shift - 1));
    let curvature = row_curvature(&n0, &n1);
    // The bare Newton estimate e (no widening), less its possible excess 2 k e^2: a lower
    // bound on the error the full check finds at this point.
    let error = point_error(curve, &row, r, f64::from(centre), 0.0)?;
    Ok(error.map(|e| (e * (1.0 - 2.0 * curvature * e).max(0.0) + floor, floor)))
}

/// What a level's probes say.
enum Probe {
    /// Every probe is within the tolerance: run the full check.
    Pass,
    /// A probe exceeds it: the level fails.
    Fail,
    /// A probe's floor exceeds it: every level fails.
    Unreachable,
}

/// The level's probes. `Err` when a probe reaches outside the curve's domain.
fn probe_level<C: SignalCurve + ?Sized>(
    curve: &C,
    geometry: &TableGeometry,
    tolerance_k: f64,
) -> Result<Probe> {
    let lookup = Lookup::new(geometry, &[]);
    let shift = geometry.shift();
    let rows = geometry.rows;
    let count = PROBES.min(rows);
    // The last row first: its floor is the largest.
    for k in (0..count).rev() {
        // Spread over [0, rows - 1], both ends included.
        let index = if count > 1 {
            u32::try_from(u64::from(k) * u64::from(rows - 1) / u64::from(count - 1)).unwrap_or(0)
        } else {
            0
        };
        match probe_row(curve, &lookup, geometry.first_segment + index, shift)? {
            Some((_, floor)) if !(floor <= tolerance_k) => return Ok(Probe::Unreachable),
            Some((e, _)) if e <= tolerance_k => {}
            _ => return Ok(Probe::Fail),
        }
    }
    Ok(Probe::Pass)
}

/// What the full check of one level found.
enum Outcome {
    /// Every row fits: (max table error, max pixel error), K.
    Pass(f64, f64),
    /// A row does not fit.
    Fail,
    /// A lazy check failed with centre-only rows in its maximum: decide again densely.
    Undecided,
}

/// The full check of one level, rows written to `storage` when given; lazy (centre-only
/// rows where they fit) when `lazy`. Stops at the first row that makes the table exceed
/// the tolerance.
fn full_check<C: SignalCurve + ?Sized>(
    curve: &C,
    geometry: &TableGeometry,
    tolerance_k: f64,
    mut storage: Option<&mut [TableRow]>,
    lazy: bool,
) -> Result<Outcome> {
    let lookup = Lookup::new(geometry, &[]);
    let shift = geometry.shift();
    let first = geometry.first_segment;
    let mut left = node(curve, segment_start(first, shift))?;
    let (mut max_table, mut max_signal) = (0.0f64, 0.0f64);
    let mut centre_only = false;
    for index in 0..geometry.rows {
        let segment = first + index;
        let right = node(curve, segment_start(segment + 1, shift))?;
        let row = hermite_row(&left, &right, shift)?;
        let budget = lazy.then_some((tolerance_k, max_signal));
        let Some(bound) = check_row(
            curve,
            &lookup,
            &row,
            (&left, &right),
            segment,
            shift,
            budget,
            max_table,
        )?
        else {
            return Ok(Outcome::Fail);
        };
        centre_only |= bound.centre_only;
        max_table = max_table.max(bound.table_k);
        max_signal = max_signal.max(bound.signal_k);
        if !(max_table + max_signal <= tolerance_k) {
            return Ok(if centre_only {
                Outcome::Undecided
            } else {
                Outcome::Fail
            });
        }
        if let Some(slot) = storage
            .as_deref_mut()
            .and_then(|s| s.get_mut(index as usize))
        {
            *slot = row;
        }
        left = right;
    }
    Ok(Outcome::Pass(max_table, max_table + max_signal))
}

/// Finds the coarsest level whose table meets `tolerance_k` and, given storage, writes
/// its rows there. See the module docs for the order of work and its worst case.
pub(super) fn plan<C: SignalCurve + ?Sized>(
    curve: &C,
    range: TemperatureRange,
    tolerance_k: f64,
    mut storage: Option<&mut [TableRow]>,
) -> Result<TableGeometry> {
    let range = TemperatureRange::new(range.lo_k, range.hi_k)?;
    if !(tolerance_k.is_finite() && tolerance_k > 0.0) {
        return Err(Error::FrameToleranceInvalid);
    }
    if !(tolerance_k > 0.25 * UNIT_ROUNDOFF * range.hi_k) {
        return Err(Error::FrameToleranceUnreachable);
    }
    let (signal_lo, signal_hi) = signal_ends(curve, range)?;
    let mut last_error = Error::FrameToleranceUnreachable;
    let mut probed = false;
    for level in 0..=MAX_LEVEL {
        let mut geometry = geometry_for(level, signal_lo, signal_hi, range);
        if geometry.rows() > MAX_TABLE_ROWS {
            return Err(Error::FrameTableTooLarge);
        }
        if storage.as_ref().is_some_and(|s| geometry.rows() > s.len()) {
            return Err(Error::FrameStorageTooSmall);
        }
        // Small levels go straight to the full check, which stops at the first failing
        // row: probing them would cost more than it saves.
        if !probed && geometry.rows > PROBE_ABOVE_ROWS {
            match probe_level(curve, &geometry, tolerance_k) {
                Ok(Probe::Pass) => probed = true,
                Ok(Probe::Fail) => continue,
                Ok(Probe::Unreachable) => return Err(Error::FrameToleranceUnreachable),
                // A coarse row may reach outside the curve's domain; finer rows stay closer.
                Err(error) => {
                    last_error = error;
                    continue;
                }
            }
        }
        // Without storage only the level is wanted: a lazy check decides it as the dense
        // check of `build` would (its bounds are never below the dense ones, and an
        // undecided level is checked again densely).
        let lazy = storage.is_none();
        let mut outcome = full_check(curve, &geometry, tolerance_k, storage.as_deref_mut(), lazy);
        if matches!(outcome, Ok(Outcome::Undecided)) {
            outcome = full_check(curve, &geometry, tolerance_k, None, false);
        }
        match outcome {
            Ok(Outcome::Pass(table_k, pixel_k)) => {
                geometry.tolerance_k = tolerance_k;
                geometry.max_table_error_k = table_k;
                geometry.max_pixel_error_k = pixel_k;
                return Ok(geometry);
            }
            Ok(_) => last_error = Error::FrameToleranceUnreachable,
            Err(error) => last_error = error,
        }
    }
    Err(last_error)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The Horner bound holds for every r of a row (checked exhaustively on one row of a
    /// level-12 table, 2^11 positions, against f64 evaluation of the same coefficients).
    #[test]
    fn horner_rounding_bounds_every_position() {
        let row: TableRow = [1391.25, 3.1e-4, -2.2e-11, 7.5e-18];
        let span = 2048.0;
        let bound = horner_rounding(&row, span);
        let mut worst = 0.0f64;
        for r in 0..2048u32 {
            #[allow(clippy::cast_precision_loss)]
            let t = r as f32;
            let f32_value = ((row[3] * t + row[2]) * t + row[1]) * t + row[0];
            worst = worst.max((f64::from(f32_value) - cubic(&row, f64::from(r))).abs());
        }
        assert!(worst <= bound, "{worst} > {bound}");
        // And the bound is not vacuous: within a few ulps of T.
        assert!(bound < 4.0 * f64::from(f32::EPSILON) * 1391.25, "{bound}");
    }
}
