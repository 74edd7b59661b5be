//! Instrument self-emission and focal-plane-array (FPA) temperature drift.
//!
//! # Signal model
//!
//! An uncooled detector exchanges radiation with everything it sees: the scene through
//! the optics, and the housing, lens and shutter around it. Its corrected counts follow
//!
//! ```text
//! x = R(T_fpa) [L_scene - L(T_int)] + O(T_fpa)
//! ```
//!
//! with L the exact band radiance of the instrument's curve (never T^4: the effective
//! exponent d ln L / d ln T of an 8-14 um band is about 5.34 at 250 K, 4.58 at 300 K and
//! 4.02 at 350 K, [`effective_exponent`]), T_int the internal (housing and lens)
//! temperature, R the responsivity (counts per unit of L) and O the offset. Both drift
//! with the array temperature; a low-order polynomial in T_fpa fitted from blackbody
//! frames taken at two or more ambient temperatures corrects them (Nugent, Shaw & Pust
//! 2013, Opt. Eng. 52, 061304: 0.21 C rms over a 7.2 C FPA swing; Wolf, Pezoa & Figueroa
//! 2016, Sensors 16, 1121: offset linear in the array temperature, RMSE below 0.25 C over
//! about 15 C of drift).
//!
//! # Limits
//!
//! The model holds only inside the array and internal temperatures of the fit points (a
//! polynomial extrapolates badly), in thermal equilibrium (a camera warming up has lens
//! and housing at different temperatures: measure T_int close to the optics or wait),
//! and for a drift that is common to the array; per-pixel drift left over is removed by
//! the shutter refresh ([`crate::frame::shutter_refresh`]).

use super::nonuniformity::DriftStep;
use super::CountsMap;
use crate::band::SignalCurve;
use crate::error::{Error, Result};

/// One drift calibration point: the array-mean corrected counts of a blackbody at two
/// temperatures, seen at one array and internal temperature.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DriftPoint {
    /// Array (FPA) temperature, K.
    pub fpa_k: f64,
    /// Internal (housing and lens) temperature, K.
    pub internal_k: f64,
    /// Low blackbody temperature, K.
    pub low_k: f64,
    /// High blackbody temperature, K.
    pub high_k: f64,
    /// Array-mean corrected counts at the low blackbody.
    pub low_counts: f64,
    /// Array-mean corrected counts at the high blackbody.
    pub high_counts: f64,
}

/// Responsivity and offset as polynomials of degree <= 2 in (T_fpa - `reference_k`):
/// R(T) = sum r_i (T - T_ref)^i (counts per unit of L), O(T) = sum o_i (T - T_ref)^i
/// (counts). Plain data.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DriftModel {
    /// T_ref, K: the mean array temperature of the fit points.
    pub reference_k: f64,
    /// Polynomial degree, 0..=2.
    pub degree: u32,
    /// r_0, r_1, r_2.
    pub responsivity: [f64; 3],
    /// o_0, o_1, o_2.
    pub offset: [f64; 3],
}

/// Least-squares polynomial of degree `degree` through (u_j, y_j), u already centred and
/// scaled to [-1, 1]; normal equations solved by Gaussian elimination with partial
/// pivoting.
fn polyfit(u: &[f64], y: &[f64], degree: usize) -> Result<[f64; 3]> {
    let m = degree + 1;
    let mut a = [[0.0f64; 4]; 3];
    for (&uj, &yj) in u.iter().zip(y) {
        let powers = [1.0, uj, uj * uj];
        for (r, row) in a.iter_mut().enumerate().take(m) {
            for (c, cell) in row.iter_mut().enumerate().take(m) {
                *cell += powers.get(r).unwrap_or(&0.0) * powers.get(c).unwrap_or(&0.0);
            }
            if let (Some(cell), Some(pr)) = (row.get_mut(3), powers.get(r)) {
                *cell += pr * yj;
            }
        }
    }
    #[allow(clippy::cast_precision_loss)]
    let scale = u.len() as f64;
    for col in 0..m {
        let pivot = (col..m)
            .max_by(|&i, &j| {
                let ai = a.get(i).and_then(|r| r.get(col)).map_or(0.0, |v| v.abs());
                let aj = a.get(j).and_then(|r| r.get(col)).map_or(0.0, |v| v.abs());
                ai.total_cmp(&aj)
            })
            .unwrap_or(col);
        // A checked exchange (array `swap` would keep a bounds panic the compiler cannot
        // remove).
        if let (Some(&row_pivot), Some(&row_col)) = (a.get(pivot), a.get(col)) {
            if let Some(slot) = a.get_mut(col) {
                *slot = row_pivot;
            }
            if let Some(slot) = a.get_mut(pivot) {
                *slot = row_col;
            }
        }
        let Some(prow) = a.get(col).copied() else {
            return Err(Error::DriftIllConditioned);
        };
        let p = prow.get(col).copied().unwrap_or(0.0);
        if !(p.abs() > 1e-9 * scale) {
            return Err(Error::DriftIllConditioned);
        }
        for (r, row) in a.iter_mut().enumerate().take(m) {
            if r == col {
                continue;
            }
            let f = row.get(col).copied().unwrap_or(0.0) / p;
            for (cell, &pc) in row.iter_mut().zip(prow.iter()) {
                *cell -= f * pc;
            }
        }
    }
    let mut out = [0.0; 3];
    for (i, o) in out.iter_mut().enumerate().take(m) {
        let row = a.get(i).copied().unwrap_or([0.0; 4]);
        *o = row.get(3).copied().unwrap_or(0.0) / row.get(i).copied().unwrap_or(1.0);
    }
    Ok(out)
}

/// At most this many drift points are used by [`DriftModel::fit`].
pub const MAX_DRIFT_POINTS: usize = 64;

impl DriftModel {
    /// Fits responsivity and offset polynomials of `degree` (0, 1 or 2) in the array
    /// temperature from `points` (at least `degree` + 1, at most [`MAX_DRIFT_POINTS`]),
    /// with the exact signal of `curve`: per point R_j = (x_H - x_L) / (L(T_H) - L(T_L)),
    /// O_j = x_L - R_j L(T_L) + R_j L(T_int), then least squares over the points.
    ///
    /// # Errors
    /// [`Error::DriftTooFewPoints`] (also for degree > 2 or too many points),
    /// [`Error::DriftPointInvalid`], [`Error::DriftIllConditioned`] when the array
    /// temperatures do not separate the polynomial's terms, and those of `curve.signal`.
    pub fn fit<C: SignalCurve + ?Sized>(
        curve: &C,
        points: &[DriftPoint],
        degree: u32,
    ) -> Result<DriftModel> {
        let d = degree as usize;
        if degree > 2 || points.len() < d + 1 || points.len() > MAX_DRIFT_POINTS {
            return Err(Error::DriftTooFewPoints);
        }
        let mut u = [0.0f64; MAX_DRIFT_POINTS];
        let mut r = [0.0f64; MAX_DRIFT_POINTS];
        let mut o = [0.0f64; MAX_DRIFT_POINTS];
        let mut sum_t = 0.0;
        for (j, p) in points.iter().enumerate() {
            let values = [
                p.fpa_k,
                p.internal_k,
                p.low_k,
                p.high_k,
                p.low_counts,
                p.high_counts,
            ];
            let positive = p.fpa_k > 0.0 && p.internal_k > 0.0 && p.low_k > 0.0 && p.high_k > 0.0;
            if !(values.iter().all(|v| v.is_finite()) && positive) {
                return Err(Error::DriftPointInvalid);
            }
            let (ll, lh, li) = (
                curve.signal(p.low_k)?,
                curve.signal(p.high_k)?,
                curve.signal(p.internal_k)?,
            );
            let rj = (p.high_counts - p.low_counts) / (lh - ll);
            if !(rj > 0.0) || !rj.is_finite() {
                return Err(Error::DriftPointInvalid);
            }
            if let (Some(ru), Some(ro), Some(uu)) = (r.get_mut(j), o.get_mut(j), u.get_mut(j)) {
                *ru = rj;
                *ro = p.low_counts - rj * ll + rj * li;
                *uu = p.fpa_k;
            }
            sum_t += p.fpa_k;
        }
        let n = points.len();
        #[allow(clippy::cast_precision_loss)]
        let reference_k = sum_t / n as f64;
        let (u, r, o) = (
            u.get_mut(..n).ok_or(Error::DriftTooFewPoints)?,
            r.get(..n).ok_or(Error::DriftTooFewPoints)?,
            o.get(..n).ok_or(Error::DriftTooFewPoints)?,
        );
        let spread = u
            .iter()
            .map(|t| libm::fabs(t - reference_k))
            .fold(0.0f64, f64::max);
        let spread = if spread > 0.0 { spread } else { 1.0 };
        for t in u.iter_mut() {
            *t = (*t - reference_k) / spread;
        }
        let rs = polyfit(u, r, d)?;
        let os = polyfit(u, o, d)?;
        let unscale = [1.0, 1.0 / spread, 1.0 / (spread * spread)];
        let mut model = DriftModel {
            reference_k,
            degree,
            responsivity: [0.0; 3],
            offset: [0.0; 3],
        };
        for i in 0..3 {
            if let (Some(mr), Some(mo), Some(&a), Some(&b), Some(&s)) = (
                model.responsivity.get_mut(i),
                model.offset.get_mut(i),
                rs.get(i),
                os.get(i),
                unscale.get(i),
            ) {
                *mr = a * s;
                *mo = b * s;
            }
        }
        Ok(model)
    }

    /// R(T_fpa) and O(T_fpa).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`], and
    /// [`Error::DriftPointInvalid`] for a model whose responsivity is not positive there.
    pub fn at(&self, fpa_k: f64) -> Result<(f64, f64)> {
        crate::error::check_temperature_k(fpa_k)?;
        let t = fpa_k - self.reference_k;
        let [r0, r1, r2] = self.responsivity;
        let [o0, o1, o2] = self.offset;
        let r = (r2 * t + r1) * t + r0;
        let o = (o2 * t + o1) * t + o0;
        if !(r.is_finite() && o.is_finite()) {
            return Err(Error::NonFinite);
        }
        if !(r > 0.0) {
            return Err(Error::DriftPointInvalid);
        }
        Ok((r, o))
    }

    /// Mean corrected counts the model predicts for a blackbody scene at `scene_k`:
    /// x = R (L(T_scene) - L(T_int)) + O.
    ///
    /// # Errors
    /// As [`DriftModel::at`] and `curve.signal`.
    pub fn predict_counts<C: SignalCurve + ?Sized>(
        &self,
        curve: &C,
        fpa_k: f64,
        internal_k: f64,
        scene_k: f64,
    ) -> Result<f64> {
        let (r, o) = self.at(fpa_k)?;
        Ok(r * (curve.signal(scene_k)? - curve.signal(internal_k)?) + o)
    }

    /// The per-frame step x' = a x + b that maps corrected counts x at (`fpa_k`,
    /// `internal_k`) onto the counts x' of a converter whose counts map is S = g x' + o
    /// and whose curve is `curve`: with D = O(T_fpa) - R(T_fpa) L(T_int),
    /// a = 1 / (g R), b = -(D / R + o) / g, so that g x' + o = (x - D) / R = L_scene.
    ///
    /// # Errors
    /// As [`DriftModel::at`]; [`Error::FrameCoefficientOverflow`] if a or b does not fit
    /// an f32.
    pub fn step<C: SignalCurve + ?Sized>(
        &self,
        curve: &C,
        counts: CountsMap,
        fpa_k: f64,
        internal_k: f64,
    ) -> Result<DriftStep> {
        let (r, o) = self.at(fpa_k)?;
        let d = o - r * curve.signal(internal_k)?;
        let a = super::to_f32_checked(1.0 / (counts.gain() * r))?;
        let b = super::to_f32_checked(-(d / r + counts.offset()) / counts.gain())?;
        let step = DriftStep { a, b };
        step.check()?;
        Ok(step)
    }
}

/// Net signal per unit responsivity of a detector that sees a grey object and exchanges
/// radiation with its own housing: e L(T_o) + (1 - e) L(T_r) - L(T_int), curve units.
/// Zero whenever T_o = T_r = T_int, for any emissivity. In the wide-band limit (L = sigma
/// T^4 / pi) times pi it is the single-element thermopile's net exchange
/// sigma (e T_o^4 + (1 - e) T_r^4 - T_s^4), W m^-2.
///
/// # Errors
/// [`Error::EmissivityOutOfRange`] unless 0 < e <= 1; those of `curve.signal`.
pub fn net_signal<C: SignalCurve + ?Sized>(
    curve: &C,
    emissivity: f64,
    object_k: f64,
    reflected_k: f64,
    internal_k: f64,
) -> Result<f64> {
    check_emissivity(emissivity)?;
    Ok(
        emissivity * curve.signal(object_k)? + (1.0 - emissivity) * curve.signal(reflected_k)?
            - curve.signal(internal_k)?,
    )
}

/// Inverse of [`net_signal`]: the object temperature, K, whose net signal is `net`:
/// L(T_o) = (net + L(T_int) - (1 - e) L(T_r)) / e, inverted with `curve.temperature`.
///
/// # Errors
/// As [`net_signal`], [`Error::NonFinite`], and those of `curve.temperature` (a net
/// signal below what a 0 K object would give is [`Error::RadianceNotPositive`]).
pub fn object_from_net_signal<C: SignalCurve + ?Sized>(
    curve: &C,
    net: f64,
    emissivity: f64,
    reflected_k: f64,
    internal_k: f64,
) -> Result<f64> {
    check_emissivity(emissivity)?;
    crate::error::finite(net)?;
    let l = (net + curve.signal(internal_k)? - (1.0 - emissivity) * curve.signal(reflected_k)?)
        / emissivity;
    curve.temperature(l)
}

/// Effective exponent n(T) = d ln L / d ln T = T L'(T) / L(T) of a curve: the power of T
/// the band signal follows locally (4 for the total radiance; larger for a band on the
/// short-wave side of the peak).
///
/// # Errors
/// Those of `curve.signal_and_derivative`.
pub fn effective_exponent<C: SignalCurve + ?Sized>(curve: &C, temperature_k: f64) -> Result<f64> {
    let (l, dl) = curve.signal_and_derivative(temperature_k)?;
    Ok(temperature_k * dl / l)
}

fn check_emissivity(e: f64) -> Result<()> {
    if e > 0.0 && e <= 1.0 {
        Ok(())
    } else if e.is_nan() {
        Err(Error::NonFinite)
    } else {
        Err(Error::EmissivityOutOfRange)
    }
}
