//! Band integrals of Planck's law over an instrument's spectral band, and their inversion
//! from band radiance to temperature.
//!
//! A band is `[lo_um, hi_um]` with an optional tabulated relative spectral response r
//! (linear between points, zero outside the table). Its band radiance is the unnormalised
//! integral
//!
//! ```text
//! L_band(T) = integral over [lo_um, hi_um] of r(lambda) L(lambda, T) dlambda
//! ```
//!
//! in W m^-2 sr^-1 for an energy detector and photons s^-1 m^-2 sr^-1 for a photon
//! detector (r = 1 for a rectangular band).
//!
//! Method. With x = c2/(lambda T) the integral becomes c1 T^(m+1)/c2^(m+1) times an
//! integral of r(lambda(x)) x^m/(e^x - 1) dx (m = 3 energy, 2 photon).
//! - Rectangular band, at a cost that does not depend on where the band lies: a band no
//!   wider than 0.25 in x (and not reaching near x = 0) is one Gauss-Legendre panel of 4
//!   or 5 nodes sharing one exponential; a wider one takes differences of the moment
//!   integrals at its ends, evaluated from fixed polynomial fits (generated with mpmath
//!   by `tools/refgen/moment_fits.py`) with one exponential per end, choosing the
//!   difference of the smaller operands ([`crate::planck`]). Relative error below 1e-13
//!   against mpmath (`tests/reference_band.rs`: worst 2.6e-14 over 726 cases in 0.3-30 um,
//!   150-4000 K).
//! - Tabulated response or extra spectral weights: Gauss-Legendre in x on panels split at
//!   every table node, no wider than 1 in x and no wider than their own lower edge (which
//!   keeps the pole of r(lambda(x)) at x = 0 far away), 4 to 12 nodes by the panel's
//!   width; relative error below 1e-13 against mpmath on the interpolated response
//!   (worst 1e-14 over 120 cases). A band's own response is walked segment by segment
//!   (no table search per node).

use crate::constants::{C1L_UM, C1P_UM, C2_UMK};
use crate::error::{check_temperature_k, finite, Error, Result};
use crate::planck::{
    check_radiance, linear_response_panel, moment_integral, moment_integral_value, tail_bound,
    weighted_gauss_panel, Detector, LinearResponse,
};

/// Lowest temperature the inversion searches, in kelvin.
pub const SOLVER_MIN_K: f64 = 0.1;
/// Highest temperature the inversion searches, in kelvin.
pub const SOLVER_MAX_K: f64 = 1.0e6;
/// A Newton step of the inversion below this fraction of T ends it (see
/// [`solve_increasing`]).
const NEWTON_FINAL_STEP: f64 = 1e-8;
/// A Halley step of the inversion below this fraction of T ends it (see [`solve_core`]):
/// the error it leaves is about c (4e-6)^3 < 1e-17 T for c <= 1/12.
const HALLEY_FINAL_STEP: f64 = 4e-6;
/// Evaluations the rectangular band's inversion makes before the safeguarded solver
/// takes over (see [`Band::rectangular_halley`]): from [`Band::guess_k`] (up to 20 %
/// off on the Rayleigh-Jeans side of a wide band) the third Halley step is below
/// [`HALLEY_FINAL_STEP`] over the operating grid.
const RECTANGULAR_HALLEY_EVALUATIONS: u32 = 3;
/// Iteration cap of the inversion; reaching it is [`Error::NotConverged`].
pub const SOLVER_MAX_ITERATIONS: u32 = 200;

/// Beyond this x = c2/(lambda T), expm1(x) overflows and the integrand x^m/(e^x - 1) is
/// exactly zero in double precision, so quadrature can stop there (it also bounds the
/// number of panels for any finite input).
const X_INTEGRAND_ZERO: f64 = 710.0;

/// The smallest band integral of x^m/(e^x - 1) over a rectangular band that carries full
/// double precision: beyond it the closed form's e^-x at the band's long-wavelength end
/// (x = c2/(lambda T) above about 699) approaches the subnormal range. The scale
/// c1 T^(m+1)/c2^(m+1) can lift such an integral back into the normal range with few
/// digits left (a photon band at 0.1 um came out 5e-4 off at 195 K and a factor 2 off at
/// 193 K), so a smaller integral is [`Error::RadianceUnderflow`].
const MIN_RESOLVED_INTEGRAL: f64 = 1e-295;

/// As [`MIN_RESOLVED_INTEGRAL`] for a tabulated response, per unit of the response's
/// largest value over the band (taken as at least 1e-7): the quadrature stops at
/// [`X_INTEGRAND_ZERO`] = 710, dropping at most 710^3 e^-710 (1.6e-300) per unit response, below 2e-17 of this
/// limit; and with the floor, an integral of at least 1e-290 keeps the products
/// response x integrand that carry it out of the subnormal range (a response of 2e-314
/// came out 1e-6 off in T).
const MIN_RESOLVED_TABULATED_INTEGRAL: f64 = 1e-283;

/// Below this x = c2/(lambda T) the Wien-tail test of [`walk_segment`] cannot pass, so it is
/// not made. The test asks b G_m(x) <= 1e-18 S, with b the response's largest value and S
/// the sum so far; S <= b m! zeta(m+1) (at most 6.50 b for m = 3, 2.41 b for m = 2, to the
/// quadrature's rounding), so it needs the bound x^m e^-x x/(x - m)/(1 - e^-x) below
/// 6.5e-18 (m = 3) or 2.41e-18 (m = 2), which first happens at x = 51.5 and 48.4; at
/// x = 40 the bound is 2.9e-13 (m = 3) and 7.1e-15 (m = 2).
const TAIL_TEST_MIN_X: f64 = 40.0;

/// The band-integral scale c1 T^(m+1)/c2^(m+1); T^4 beyond the double range (T above
/// about 1e77 K) is [`Error::RadianceOverflow`] rather than an inf * 0 = NaN later.
fn scale_or_overflow(detector: Detector, temperature_k: f64) -> Result<f64> {
    let scale = detector.scale(temperature_k);
    if scale.is_finite() {
        Ok(scale)
    } else {
        Err(Error::RadianceOverflow)
    }
}

/// dL/dT = scale * D / T from the scale, the derivative integral D and T.
///
/// The product scale * D can overflow where the quotient does not (near the top of the
/// double range, T of order 1e78 and L of order 1e308, dL/dT ~ L/T is far from overflow),
/// so that order is tried second: (scale / T) * D. Only if both overflow is it
/// [`Error::RadianceOverflow`]; the first order is kept where it is finite, so results
/// elsewhere are bit-identical to before.
#[inline]
fn derivative_per_k(scale: f64, derivative_integral: f64, temperature_k: f64) -> Result<f64> {
    let mut derivative = scale * derivative_integral / temperature_k;
    if derivative.is_infinite() {
        derivative = (scale / temperature_k) * derivative_integral;
    }
    if derivative.is_infinite() {
        return Err(Error::RadianceOverflow);
    }
    finite(derivative)
}

/// P1 = d ln f / d ln T = T f'/f. T f' can overflow where P1 does not (f near the top of
/// the double range): then the other order, T (f'/f); the first is kept where it is
/// finite.
#[inline]
fn log_slope(temperature_k: f64, slope: f64, value: f64) -> f64 {
    let p1 = temperature_k * slope / value;
    if p1.is_infinite() {
        temperature_k * (slope / value)
    } else {
        p1
    }
}

/// A piecewise-linear spectral table: values at strictly increasing wavelengths (um),
/// linear between points and zero outside the table.
///
/// Used for relative spectral responses, and by later modules for spectral emissivity and
/// transmittance. Borrowed, never copied: the caller owns the storage.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SpectralTable<'a> {
    wavelengths_um: &'a [f64],
    values: &'a [f64],
}

impl<'a> SpectralTable<'a> {
    /// Validates and wraps a table.
    ///
    /// # Errors
    /// [`Error::TableLengthMismatch`] when the arrays differ in length,
    /// [`Error::TableTooShort`] with fewer than two points, [`Error::NonFinite`] for any
    /// NaN or infinity, [`Error::TableNotIncreasing`] unless wavelengths are positive and
    /// strictly increasing, [`Error::TableValueNegative`] for a negative value.
    pub fn new(wavelengths_um: &'a [f64], values: &'a [f64]) -> Result<Self> {
        if wavelengths_um.len() != values.len() {
            return Err(Error::TableLengthMismatch);
        }
        if wavelengths_um.len() < 2 {
            return Err(Error::TableTooShort);
        }
        let mut previous_um = 0.0;
        for (&wavelength_um, &value) in wavelengths_um.iter().zip(values) {
            finite(wavelength_um)?;
            finite(value)?;
            if wavelength_um <= previous_um {
                return Err(Error::TableNotIncreasing);
            }
            if value < 0.0 {
                return Err(Error::TableValueNegative);
            }
            previous_um = wavelength_um;
        }
        Ok(SpectralTable {
            wavelengths_um,
            values,
        })
    }

    /// The table's wavelengths, um.
    #[must_use]
    pub fn wavelengths_um(&self) -> &'a [f64] {
        self.wavelengths_um
    }

    /// The table's values.
    #[must_use]
    pub fn values(&self) -> &'a [f64] {
        self.values
    }

    /// First and last wavelength of the table, um.
    #[must_use]
    pub fn span_um(&self) -> (f64, f64) {
        let first = self.wavelengths_um.first().copied().unwrap_or(0.0);
        let last = self.wavelengths_um.last().copied().unwrap_or(0.0);
        (first, last)
    }

    /// The linearly interpolated value at `wavelength_um`; zero outside the table (and for
    /// NaN).
    #[must_use]
    pub fn value_at(&self, wavelength_um: f64) -> f64 {
        let (first, last) = self.span_um();
        if !(wavelength_um >= first && wavelength_um <= last) {
            return 0.0;
        }
        // First node strictly above the wavelength; the segment is [i - 1, i]. Kept within
        // 1..=len-1 by `min` then `max`, not `Ord::clamp`: clamp asserts min <= max, which
        // the compiler cannot prove (it does not know that a table has two points), and
        // that assertion would leave a panic path in every firmware image.
        let upper = self
            .wavelengths_um
            .partition_point(|&w| w <= wavelength_um)
            .min(self.wavelengths_um.len().saturating_sub(1))
            .max(1);
        let (Some(&w0), Some(&w1), Some(&v0), Some(&v1)) = (
            self.wavelengths_um.get(upper - 1),
            self.wavelengths_um.get(upper),
            self.values.get(upper - 1),
            self.values.get(upper),
        ) else {
            return 0.0;
        };
        let s = (wavelength_um - w0) / (w1 - w0);
        v0 + s * (v1 - v0)
    }

    /// The largest value over [`lo_um`, `hi_um`]: at the nodes inside and at both ends
    /// (linear between nodes, so nowhere larger); 0 for an empty interval.
    fn max_over(&self, lo_um: f64, hi_um: f64) -> f64 {
        if !(hi_um > lo_um) {
            return 0.0;
        }
        self.wavelengths_um
            .iter()
            .zip(self.values)
            .filter(|&(&w, _)| w > lo_um && w < hi_um)
            .fold(
                self.value_at(lo_um).max(self.value_at(hi_um)),
                |max, (_, &v)| max.max(v),
            )
    }

    /// The largest node strictly below `wavelength_um`, if any.
    fn node_below(&self, wavelength_um: f64) -> Option<f64> {
        let count = self.wavelengths_um.partition_point(|&w| w < wavelength_um);
        count
            .checked_sub(1)
            .and_then(|i| self.wavelengths_um.get(i).copied())
    }
}

/// A validated spectral band of an instrument.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Band<'a> {
    lo_um: f64,
    hi_um: f64,
    detector: Detector,
    response: Option<SpectralTable<'a>>,
    /// The response's largest value over the band (its nodes inside and its values at the
    /// edges; values outside the band never enter the integral); 1 for a rectangular band.
    response_max: f64,
    /// Integral of the response over the band, um (trapezoid; a starting-guess aid only).
    width_um: f64,
    /// Response-weighted mean wavelength, um (a starting-guess aid only).
    centroid_um: f64,
    /// c2/hi_um, c2/lo_um and c2 (hi_um - lo_um)/(lo_um hi_um) in K: the band's ends and
    /// width in x = c2/(lambda T) times T, precomputed so each evaluation only scales by
    /// 1/T (one rounding more than c2/(lambda T) directly: still within 1.5 ulp).
    x_edges_k: (f64, f64, f64),
}

/// A temperature found by an iterative solver, with how it was found.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Solution {
    /// The temperature, K.
    pub temperature_k: f64,
    /// Function evaluations used.
    pub iterations: u32,
    /// Relative residual (f(T) - target) / target at the last evaluation before the final
    /// step (the final Newton step is below 1e-8 T, so the true residual is far smaller).
    pub residual: f64,
}

impl Band<'static> {
    /// A rectangular band: response 1 on `[lo_um, hi_um]`.
    ///
    /// # Errors
    /// [`Error::NonFinite`], or [`Error::InvalidBand`] unless 0 < `lo_um` < `hi_um`.
    pub fn rectangular(lo_um: f64, hi_um: f64, detector: Detector) -> Result<Self> {
        check_edges(lo_um, hi_um)?;
        Ok(Band {
            lo_um,
            hi_um,
            detector,
            response: None,
            response_max: 1.0,
            width_um: hi_um - lo_um,
            centroid_um: 0.5 * (lo_um + hi_um),
            x_edges_k: x_edges_k(lo_um, hi_um),
        })
    }
}

/// See `Band::x_edges_k`.
fn x_edges_k(lo_um: f64, hi_um: f64) -> (f64, f64, f64) {
    (
        C2_UMK / hi_um,
        C2_UMK / lo_um,
        C2_UMK * ((hi_um - lo_um) / (lo_um * hi_um)),
    )
}

fn check_edges(lo_um: f64, hi_um: f64) -> Result<()> {
    finite(lo_um)?;
    finite(hi_um)?;
    if lo_um > 0.0 && lo_um < hi_um {
        Ok(())
    } else {
        Err(Error::InvalidBand)
    }
}

impl<'a> Band<'a> {
    /// A band with a tabulated relative spectral response. The band radiance integrates
    /// over the overlap of `[lo_um, hi_um]` with the table's span.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::InvalidBand`] for bad edges, [`Error::BandEmpty`]
    /// when the table does not overlap the band or the response is zero over the overlap.
    pub fn with_response(
        lo_um: f64,
        hi_um: f64,
        detector: Detector,
        response: SpectralTable<'a>,
    ) -> Result<Self> {
        check_edges(lo_um, hi_um)?;
        let (first, last) = response.span_um();
        let a = lo_um.max(first);
        let b = hi_um.min(last);
        if a >= b {
            return Err(Error::BandEmpty);
        }
        // Trapezoid moments over the overlap (breakpoints: overlap ends and inner nodes).
        let mut width_um = 0.0;
        let mut moment_um2 = 0.0;
        let mut upper = b;
        let mut r_upper = response.value_at(b);
        while upper > a {
            let lower = response.node_below(upper).map_or(a, |w| w.max(a));
            let r_lower = response.value_at(lower);
            let area = 0.5 * (r_lower + r_upper) * (upper - lower);
            width_um += area;
            moment_um2 += area * 0.5 * (lower + upper);
            upper = lower;
            r_upper = r_lower;
        }
        if width_um <= 0.0 {
            return Err(Error::BandEmpty);
        }
        Ok(Band {
            lo_um: a,
            hi_um: b,
            detector,
            response: Some(response),
            response_max: response.max_over(a, b),
            width_um,
            centroid_um: moment_um2 / width_um,
            x_edges_k: x_edges_k(a, b),
        })
    }

    /// Lower edge, um (for a tabulated band, of the overlap with the table).
    #[must_use]
    pub fn lo_um(&self) -> f64 {
        self.lo_um
    }

    /// Upper edge, um (for a tabulated band, of the overlap with the table).
    #[must_use]
    pub fn hi_um(&self) -> f64 {
        self.hi_um
    }

    /// The detector kind.
    #[must_use]
    pub fn detector(&self) -> Detector {
        self.detector
    }

    /// The response table, if the band is not rectangular.
    #[must_use]
    pub fn response(&self) -> Option<SpectralTable<'a>> {
        self.response
    }

    /// Response-weighted mean wavelength of the band, um (trapezoid rule).
    #[must_use]
    pub fn centroid_um(&self) -> f64 {
        self.centroid_um
    }

    /// Band radiance L_band(T) = integral of r(lambda) L(lambda, T) over the band.
    ///
    /// Units: W m^-2 sr^-1 (energy) or photons s^-1 m^-2 sr^-1 (photon).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`]; [`Error::RadianceUnderflow`]
    /// or [`Error::RadianceOverflow`] where the result is not a normal double, and
    /// [`Error::RadianceUnderflow`] where the band lies so deep in the Wien tail that the
    /// integral has lost its precision (x = c2/(lambda T) above about 699 over the whole
    /// band, 680 for a tabulated response), or a tabulated response so small that its
    /// integral is below 1e-290 (see `MIN_RESOLVED_INTEGRAL` in the source).
    pub fn radiance(&self, temperature_k: f64) -> Result<f64> {
        if self.response.is_none() {
            return self.rectangular_radiance(temperature_k);
        }
        self.radiance_and_derivative(temperature_k)
            .map(|(radiance, _)| radiance)
    }

    /// [`Band::radiance`] of a rectangular band without the derivatives: the same
    /// integral, validation and errors as [`Band::radiance_derivatives`] (the same
    /// operations on I, so the same value to the bit), leaving out the edge terms and
    /// the derivative integrals that only the inversion and `radiance_and_derivative`
    /// need.
    #[inline]
    fn rectangular_radiance(&self, temperature_k: f64) -> Result<f64> {
        let t = check_temperature_k(temperature_k)?;
        let m = self.detector.moment();
        let inv_t = 1.0 / t;
        let (c2_hi, c2_lo, c2_width) = self.x_edges_k;
        let integral = moment_integral_value(m, c2_hi * inv_t, c2_lo * inv_t, c2_width * inv_t);
        let scale = scale_or_overflow(self.detector, t)?;
        // As in `radiance_derivatives`: see [`MIN_RESOLVED_INTEGRAL`].
        if integral < MIN_RESOLVED_INTEGRAL && self.hi_um * t < C2_UMK {
            return Err(Error::RadianceUnderflow);
        }
        check_radiance(scale * integral)
    }

    /// Temperature derivative dL_band/dT, in radiance units per kelvin.
    ///
    /// # Errors
    /// As [`Band::radiance`].
    pub fn radiance_derivative(&self, temperature_k: f64) -> Result<f64> {
        self.radiance_and_derivative(temperature_k)
            .map(|(_, derivative)| derivative)
    }

    /// Band radiance and its temperature derivative together (one pass).
    ///
    /// dL/dT = K T^m * integral of x^(m+1) e^x/(e^x - 1)^2 dx over the band in
    /// x = c2/(lambda T) (K = c1/c2^(m+1)), computed with the radiance; for a wide
    /// rectangular band in closed form, (m+1) L / T + K T^m (x_a f(x_a) - x_b f(x_b)),
    /// f(x) = x^m/(e^x - 1), x_a = c2/(hi T), x_b = c2/(lo T).
    ///
    /// # Errors
    /// As [`Band::radiance`].
    pub fn radiance_and_derivative(&self, temperature_k: f64) -> Result<(f64, f64)> {
        self.radiance_derivatives(temperature_k)
            .map(|(radiance, derivative, _)| (radiance, derivative))
    }

    /// L, P1 = d ln L / d ln T and its derivative dP1/d ln T = (d2L/d(ln T)2)/L - P1^2 at
    /// `temperature_k`: the curve and its shape, for the ratio pyrometer's range check. The
    /// second is NaN where it cannot be represented (and, as the second derivative it comes
    /// from, may be a few digits short where the closed form cancels).
    ///
    /// # Errors
    /// As [`Band::radiance`].
    pub(crate) fn log_slope_and_curvature(&self, temperature_k: f64) -> Result<(f64, f64, f64)> {
        let (radiance, derivative, second) = self.radiance_derivatives(temperature_k)?;
        let p1 = log_slope(temperature_k, derivative, radiance);
        let curvature = second / radiance - p1 * p1;
        let curvature = if curvature.is_finite() {
            curvature
        } else {
            f64::NAN
        };
        Ok((radiance, p1, curvature))
    }

    /// Band radiance L, dL/dT and d2L/d(ln T)2 (the last for the inversion's Halley step;
    /// unchecked, possibly a few digits short where the closed form cancels).
    #[inline]
    fn radiance_derivatives(&self, temperature_k: f64) -> Result<(f64, f64, f64)> {
        let t = check_temperature_k(temperature_k)?;
        let (integral, derivative_integral, second_integral, resolved) = match self.response {
            None => {
                let m = self.detector.moment();
                let inv_t = 1.0 / t;
                let (c2_hi, c2_lo, c2_width) = self.x_edges_k;
                let xa = c2_hi * inv_t;
                let xb = c2_lo * inv_t;
                // b - a from the band's own width: exact where the edges are close.
                let width = c2_width * inv_t;
                let (i, d, d2) = moment_integral(m, xa, xb, width);
                (i, d, d2, MIN_RESOLVED_INTEGRAL)
            }
            Some(response) => {
                let (i, d, d2) = self.response_panels(t, response);
                let mut floor = MIN_RESOLVED_TABULATED_INTEGRAL * self.response_max.max(1e-7);
                if i < floor {
                    // The floor guards what the walk drops beyond x = X_INTEGRAND_ZERO: only
                    // the response at wavelengths below c2/(X_INTEGRAND_ZERO T) can be
                    // dropped, so only it sets the floor (a response rising to 1e284 at the
                    // band's long end made an integral of 7 "unresolved" at 1000 K).
                    let cut_um = C2_UMK / (X_INTEGRAND_ZERO * t);
                    floor = MIN_RESOLVED_TABULATED_INTEGRAL
                        * response
                            .max_over(self.lo_um, self.hi_um.min(cut_um))
                            .max(1e-7);
                }
                (i, d, d2, floor)
            }
        };
        let scale = scale_or_overflow(self.detector, t)?;
        // Deep in the Wien tail (the whole band at x > 1), or from a tiny response, the
        // integral has lost its precision before the scale is applied: see
        // [`MIN_RESOLVED_INTEGRAL`].
        if integral < resolved && (self.response.is_some() || self.hi_um * t < C2_UMK) {
            return Err(Error::RadianceUnderflow);
        }
        let radiance = check_radiance(scale * integral)?;
        let derivative = derivative_per_k(scale, derivative_integral, t)?;
        Ok((radiance, derivative, scale * second_integral))
    }

    /// Band radiance with an extra spectral weight: integral of r(lambda) w(lambda)
    /// L(lambda, T) dlambda, and its temperature derivative.
    ///
    /// `weight` is evaluated at Gauss-Legendre nodes strictly inside panels whose edges
    /// include every node of `tables` (pass the tables `weight` interpolates, so that each
    /// panel sees a smooth weight). Used for spectral emissivity and transmittance.
    /// Relative error below 1e-13 for piecewise-linear weights.
    ///
    /// # Errors
    /// As [`Band::radiance`]; [`Error::NonFinite`] if the weight returns a non-finite value.
    pub fn weighted_radiance_and_derivative<W: Fn(f64) -> f64>(
        &self,
        temperature_k: f64,
        tables: &[SpectralTable<'_>],
        weight: W,
    ) -> Result<(f64, f64)> {
        let t = check_temperature_k(temperature_k)?;
        let (integral, derivative_integral, _) = match self.response {
            None => self.panels(t, tables, None, &weight),
            Some(response) => self.panels(t, tables, Some(response), |lambda_um| {
                response.value_at(lambda_um) * weight(lambda_um)
            }),
        };
        let scale = scale_or_overflow(self.detector, t)?;
        finite(integral)?;
        finite(derivative_integral)?;
        let radiance = scale * integral;
        if radiance.is_infinite() {
            return Err(Error::RadianceOverflow);
        }
        Ok((radiance, derivative_per_k(scale, derivative_integral, t)?))
    }

    /// Gauss-Legendre in x over panels. Walks the band from `hi_um` down (x rising), one
    /// segment between the tables' nodes at a time ([`walk_segment`]).
    /// Returns (integral of w f_m dx, integral of w f_m x e^x/(e^x-1) dx, integral of
    /// w f_m k2 dx with the kernel k2 of the second ln-T derivative).
    fn panels<W: Fn(f64) -> f64>(
        &self,
        t: f64,
        tables: &[SpectralTable<'_>],
        extra: Option<SpectralTable<'_>>,
        weight: W,
    ) -> (f64, f64, f64) {
        let m = self.detector.moment();
        let mut sums = (0.0, 0.0, 0.0);
        let mut upper_um = self.hi_um;
        while upper_um > self.lo_um {
            let mut lower_um = self.lo_um;
            for table in tables.iter().chain(extra.iter()) {
                if let Some(node) = table.node_below(upper_um) {
                    lower_um = lower_um.max(node);
                }
            }
            // One table segment: x from c2/(upper T) to c2/(lower T). Its width in x comes
            // from the difference of the wavelengths, c2 (upper - lower)/(upper lower T),
            // never from the difference of the two x values, which lost
            // log10(lambda/(upper - lower)) digits: a band one ulp wide at 1 um came out a
            // factor 2.3 off, or 0 (as `response_panels` does for the band's own response).
            let x_start = C2_UMK / (upper_um * t);
            let width_x = C2_UMK * ((upper_um - lower_um) / upper_um / lower_um) / t;
            if !(x_start > 0.0) {
                // upper_um * t overflowed: so does the radiance.
                return (f64::INFINITY, f64::INFINITY, f64::INFINITY);
            }
            if walk_segment(m, x_start, width_x, None, &mut sums, |x, width, _| {
                weighted_gauss_panel(m, x, width, |xi, _| weight(C2_UMK / (xi * t)))
            }) {
                break;
            }
            upper_um = lower_um;
        }
        sums
    }

    /// [`Band::panels`] for the band's own response alone, walking the table's segments
    /// in order instead of searching the table for every panel and node: on a segment
    /// [w0, w1] the response is linear in wavelength, the same interpolation as
    /// [`SpectralTable::value_at`] (to a rounding), and the panels, rules and Wien-tail cut
    /// are those of [`Band::panels`].
    ///
    /// A segment's geometry comes from differences of the table's own numbers, never from
    /// differences of computed x values: its width in x is c2 (w1 - w0)/(w0 w1 T), and a
    /// node an offset o into the segment (in x, from its upper end x1 = c2/(w1 T)) lies
    /// w1 o/(x1 + o) below w1 and w0 (width - o)/(x1 + o) above w0. Subtracting x values
    /// or wavelengths instead would lose log10(lambda/(w1 - w0)) digits on a narrow segment
    /// (a 1e-4 um segment at 1.5 um gave 6e-12 relative radiance error; a 1e-10 um sliver,
    /// 1e-6).
    ///
    /// Kept out of line: inlined into [`Band::radiance_derivatives`], it cost the
    /// rectangular path there 9 instructions per call and itself 2,200 on the 100-point
    /// response (register pressure; callgrind).
    #[inline(never)]
    fn response_panels(&self, t: f64, response: SpectralTable<'_>) -> (f64, f64, f64) {
        let m = self.detector.moment();
        let c2_over_t = C2_UMK / t;
        let cut_um = c2_over_t / (2.0 * X_INTEGRAND_ZERO);
        let mut sums = (0.0, 0.0, 0.0);
        let segments = response
            .wavelengths_um
            .windows(2)
            .zip(response.values.windows(2))
            .rev();
        for (wavelengths, values) in segments {
            let (&[w0, w1], &[v0, v1]) = (wavelengths, values) else {
                continue;
            };
            let upper_um = smaller(w1, self.hi_um);
            // Wavelengths below c2/(2 X_INTEGRAND_ZERO T) contribute exactly zero (the walk
            // stops at x = X_INTEGRAND_ZERO); starting the segment there keeps its width in
            // x finite however small its lower end (1e-308 um gave an infinite width and an
            // infinite weight at 1000 K).
            let lower_um = larger(larger(w0, self.lo_um), cut_um);
            if w1 <= self.lo_um {
                break;
            }
            if upper_um <= lower_um {
                continue;
            }
            // r(lambda) = r_small + (r_large - r_small) distance/(w1 - w0), measured from
            // the segment's smaller end: two non-negative terms, so neither end's value
            // cancels the other's (a segment rising from 0.1 to 1e300 is exact near its
            // small end too), and distance/(w1 - w0) <= 1, so nothing overflows for any
            // finite non-negative table. A node t = x_upper + o lies upper o/t below
            // `upper_um` and lower (width_x - o)/t above `lower_um`; the distance from the
            // small end is (its gap to the overlap) + scale p/t, p = o or width_x - o (the
            // response as a weight of x, [`LinearResponse`], folded into the Planck factors
            // by [`linear_response_panel`]).
            let inv_span = 1.0 / (w1 - w0);
            let falls = v1 <= v0;
            let (small, rise, gap_um, scale_um) = if falls {
                (v1, v0 - v1, w1 - upper_um, upper_um)
            } else {
                (v0, v1 - v0, lower_um - w0, lower_um)
            };
            let r_edge = small + rise * (gap_um * inv_span);
            let scale_per_span = scale_um * inv_span;
            // The panel forms rise G with G = t^(m-1)/(e^t - 1) <= 1, but G rounds to one
            // ulp above 1 for t near 1e-16: the rise is halved and the fraction doubled, so
            // that rise G stays finite for any rise (one of 1.8e308 gave an infinite
            // radiance at 414.6 K, finite ones at 300 and 500 K). Both scalings are exact
            // but for a subnormal rise (an error of at most 2.5e-324 there). Halving always
            // costs 2 % in instructions on a 100-point table; a branch on the rise's size
            // cost 5 %.
            let (rise, scale_per_span) = (0.5 * rise, 2.0 * scale_per_span);
            let x_upper = C2_UMK / (upper_um * t);
            if !(x_upper > 0.0) {
                // upper_um * t overflowed: so does the radiance.
                return (f64::INFINITY, f64::INFINITY, f64::INFINITY);
            }
            // c2 (upper - lower)/(upper lower T), ordered so that no product overflows.
            let width_x = c2_over_t * (((upper_um - lower_um) / upper_um) / lower_um);
            // p = sign o + start.
            let response = LinearResponse {
                edge: r_edge,
                rise,
                per_span: scale_per_span,
                sign: if falls { 1.0 } else { -1.0 },
                start: if falls { 0.0 } else { width_x },
            };
            let bound = Some(self.response_max);
            if walk_segment(m, x_upper, width_x, bound, &mut sums, |x, width, offset| {
                linear_response_panel(m, x, width, offset, &response)
            }) {
                break;
            }
        }
        sums
    }

    /// Temperature whose band radiance equals `radiance`, K.
    ///
    /// Accuracy: |T - T(L(T))| below 1e-12 T wherever L is a normal double (worst 1e-15
    /// over 0.3-30 um and 150-4000 K in `tests/reference_band.rs`). Halley steps on
    /// ln L against 1/T from [`Band::guess_k`] (see [`solve_increasing`] for the safeguards;
    /// a rectangular band first tries up to three unsafeguarded steps with one division
    /// each, `Band::rectangular_halley`): 1 or 2 band evaluations typical, at most 5 over
    /// that domain (mean 1.9 over its 726 reference cases).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::RadianceNotPositive`], [`Error::RadianceSubnormal`],
    /// [`Error::RadianceOutOfRange`] when no temperature in
    /// [[`SOLVER_MIN_K`], [`SOLVER_MAX_K`]] gives it (including a radiance below the
    /// smallest the band resolves, see [`Band::radiance`]), [`Error::NotConverged`].
    pub fn temperature(&self, radiance: f64) -> Result<f64> {
        self.solve_temperature(radiance).map(|s| s.temperature_k)
    }

    /// As [`Band::temperature`], returning how the solver got there.
    ///
    /// # Errors
    /// As [`Band::temperature`].
    pub fn solve_temperature(&self, radiance: f64) -> Result<Solution> {
        check_target(radiance)?;
        let start_k = if self.response.is_none() {
            let guess_k = self.centroid_guess_k(radiance, ln_approx);
            let start_k = self.rayleigh_jeans_guess_k(radiance, guess_k);
            match self.rectangular_halley(radiance, start_k) {
                Ok(solution) => return Ok(solution),
                Err(last_k) => last_k,
            }
        } else {
            self.guess_k(radiance)
        };
        solve_core(|t| self.radiance_derivatives(t), radiance, start_k)
    }

    /// The inversion of a rectangular band without safeguards: at most
    /// [`RECTANGULAR_HALLEY_EVALUATIONS`] Halley steps on g(u) = ln L(1/u) from `guess_k`,
    /// each from one evaluation of I, D and D2 ([`moment_integral`]) and three divisions
    /// (1/T, 1/I beside the logarithm, and the step); the first step no longer than
    /// [`HALLEY_FINAL_STEP`] (relative) ends it, as in [`solve_core`] (an error of order
    /// 1e-17 T).
    ///
    /// The step is that of [`solve_core`] written over a common denominator, so that
    /// one division replaces its chain of five: with P1 = D/I, lambda = ln(L/target)
    /// and the Newton step rho = lambda/P1 (relative, in u = 1/T), Halley's step is
    /// rho/(1 - rho (1 + D2/D - D/I)/2) = lambda P1/den,
    /// den = P1^2 - lambda (P1 + P2 - P1^2)/2 with P2 = D2/I, and the next temperature
    /// is T den/(den + lambda P1). The same rounding errors to within a few ulp of the
    /// step, which the next step corrects.
    ///
    /// Anything out of the ordinary (an evaluation that is an error or not a normal
    /// double, a step leaving the search range or too long for Halley's correction, no
    /// final step within the evaluations) returns the temperature reached so far, from
    /// which [`solve_core`] takes over with its bracket and all its error handling.
    fn rectangular_halley(&self, target: f64, guess_k: f64) -> core::result::Result<Solution, f64> {
        let m = self.detector.moment();
        let (c2_hi, c2_lo, c2_width) = self.x_edges_k;
        let inv_target = 1.0 / target;
        let mut t = guess_k;
        for iteration in 1..=RECTANGULAR_HALLEY_EVALUATIONS {
            if !(t > SOLVER_MIN_K && t < SOLVER_MAX_K) {
                return Err(t);
            }
            let inv_t = 1.0 / t;
            let (i, d, d2) = moment_integral(m, c2_hi * inv_t, c2_lo * inv_t, c2_width * inv_t);
            let value = self.detector.scale(t) * i;
            // The checks of `radiance_derivatives`, tightened: any doubt goes to the
            // safeguarded solver.
            if !(i >= MIN_RESOLVED_INTEGRAL
                && (f64::MIN_POSITIVE..f64::INFINITY).contains(&value)
                && d > 0.0
                && d.is_finite()
                && d2.is_finite())
            {
                return Err(t);
            }
            let r = (value - target) * inv_target;
            if r == 0.0 {
                return Ok(Solution {
                    temperature_k: t,
                    iterations: iteration,
                    residual: 0.0,
                });
            }
            // ln(L/target) as in `solve_core`: the series where it is exact to r^4/4,
            // else first the cheaper [`ln_approx`] (5e-9 relative), recomputed with
            // libm's `log1p` if the step it gives may be final.
            let series = libm::fabs(r) < 1e-4;
            let mut log_ratio = if series {
                r * (1.0 - r * (0.5 - r * (1.0 / 3.0)))
            } else {
                ln_approx(r)
            };
            // D and D2 relative to I (P1 = D/I and D2/I, both of order 1 to 1e3), so
            // that no product below leaves the normal range (I itself may be 1e-295);
            // this division runs beside the logarithm, off the step's critical path.
            let inv_i = 1.0 / i;
            let p1 = d * inv_i;
            let p2 = d2 * inv_i;
            let mut numerator = log_ratio * p1;
            let mut denominator = p1 * p1 - 0.5 * log_ratio * (p1 + p2 - p1 * p1);
            if !series && libm::fabs(numerator) <= 2.0 * HALLEY_FINAL_STEP * denominator {
                log_ratio = libm::log1p(r);
                numerator = log_ratio * p1;
                denominator = p1 * p1 - 0.5 * log_ratio * (p1 + p2 - p1 * p1);
            }
            // Halley's correction moderate (factor den/P1^2 within (1/2, 2), as in
            // `solve_core`), else the safeguarded solver.
            if !(denominator > 0.5 * p1 * p1 && denominator < 2.0 * p1 * p1) {
                return Err(t);
            }
            let next = t * denominator / (denominator + numerator);
            if !(next > SOLVER_MIN_K && next < SOLVER_MAX_K) {
                return Err(t);
            }
            if libm::fabs(numerator) <= HALLEY_FINAL_STEP * denominator {
                return Ok(Solution {
                    temperature_k: next,
                    iterations: iteration,
                    residual: r,
                });
            }
            t = next;
        }
        Err(t)
    }

    /// The starting temperature of a rectangular band's inversion: `guess_k` (Planck's
    /// law at the centroid) where the band lies on the Wien side or is narrow, and for a
    /// wide band (hi/lo >= 1.3) on the Rayleigh-Jeans side (x = c2/(lo T) below 2.5 at
    /// `guess_k`, where the centroid guess is up to 20 % off) the band integral's Bernoulli expansion
    /// to its third term inverted in closed form:
    /// H_m(x) = x^m/m - x^(m+1)/(2(m+1)) + x^(m+2)/(12(m+2)) - O(x^(m+4)/(720(m+4)))
    /// at both ends makes L/K = A T - B + C/T (K = c1/c2^(m+1), alpha = c2/hi,
    /// beta = c2/lo, A = (beta^m - alpha^m)/m, B = (beta^(m+1) - alpha^(m+1))/(2(m+1)),
    /// C = (beta^(m+2) - alpha^(m+2))/(12(m+2))), a quadratic in T with the root
    /// T = (B + L/K + sqrt((B + L/K)^2 - 4 A C))/(2 A). Its relative error is of order
    /// x^4/720 (about 2 % at x = 2.5, 1e-4 at x = 0.6), so that from it two Halley
    /// steps (cubic) end the search where three were needed from the centroid guess. A
    /// start only: the solver's accuracy does not depend on it.
    fn rayleigh_jeans_guess_k(&self, radiance: f64, guess_k: f64) -> f64 {
        let (alpha, beta, _) = self.x_edges_k;
        // Only for a wide band (hi/lo >= 1.3): over a narrower one the centroid guess is
        // within 3 % and leads to two evaluations as well.
        if !(beta < 2.5 * guess_k && beta >= 1.3 * alpha) {
            return guess_k;
        }
        let (m, k) = match self.detector {
            Detector::Energy => (3, C1L_UM / (C2_UMK * C2_UMK * C2_UMK * C2_UMK)),
            Detector::Photon => (2, C1P_UM / (C2_UMK * C2_UMK * C2_UMK)),
        };
        // Powers by multiplication (m = 2 or 3): alpha^m, alpha^(m+1), alpha^(m+2).
        let powers = |z: f64| {
            let z2 = z * z;
            let zm = if m == 2 { z2 } else { z2 * z };
            (zm, zm * z, zm * z2)
        };
        let (alpha_m, alpha_m1, alpha_m2) = powers(alpha);
        let (beta_m, beta_m1, beta_m2) = powers(beta);
        let mf = f64::from(m);
        let a = (beta_m - alpha_m) / mf;
        let b = (beta_m1 - alpha_m1) / (2.0 * (mf + 1.0));
        let c = (beta_m2 - alpha_m2) / (12.0 * (mf + 2.0));
        let linear = b + radiance / k;
        let discriminant = linear * linear - 4.0 * a * c;
        let guess = (linear + libm::sqrt(discriminant)) / (2.0 * a);
        if guess.is_finite() && guess > SOLVER_MIN_K && guess < SOLVER_MAX_K {
            guess
        } else {
            guess_k
        }
    }

    /// Starting guess for the inversion: Planck's law inverted at the band's centroid for a
    /// line of the band's effective width (exact for a delta band).
    #[must_use]
    pub fn guess_k(&self, radiance: f64) -> f64 {
        self.centroid_guess_k(radiance, libm::log1p)
    }

    /// [`Band::guess_k`] with the natural logarithm ln(1 + z) given (libm's `log1p`, or
    /// [`ln_approx`] where a start need not carry every digit).
    #[inline]
    fn centroid_guess_k<F: Fn(f64) -> f64>(&self, radiance: f64, ln_1p: F) -> f64 {
        let lambda = self.centroid_um;
        let lambda2 = lambda * lambda;
        let (c1, lambda_pow) = match self.detector {
            Detector::Energy => (C1L_UM, lambda2 * lambda2 * lambda),
            Detector::Photon => (C1P_UM, lambda2 * lambda2),
        };
        let spectral = radiance / self.width_um;
        let ratio = c1 / lambda_pow / spectral;
        let guess = C2_UMK / (lambda * ln_1p(ratio));
        if guess.is_finite() && guess > SOLVER_MIN_K && guess < SOLVER_MAX_K {
            guess
        } else {
            1000.0
        }
    }
}

/// ln(1 + z) for a start or a step that the next step corrects: ln of the double 1 + z by
/// its exponent and mantissa, 1 + z = 2^k w with w in [sqrt(1/2), sqrt(2)), and
/// ln w = 2 atanh(s), s = (w - 1)/(w + 1), |s| <= 0.1716, by the series
/// 2 s (1 + s^2/3 + ... + s^12/13) (truncation below 1.3e-12 relative). Error below
/// 5e-13 absolute plus the rounding of 1 + z (1.1e-16 absolute) and 2 ulp of the result
/// (the test `ln_approx_is_within_its_bound_of_libm`): for |z| >= 1e-4 within 5e-9
/// relative. Not for final results: [`Band::rectangular_halley`] recomputes a step
/// with libm's `log1p` before accepting it as final. For 1 + z not a positive normal
/// finite double the result is NaN (which fails every check after it).
fn ln_approx(z: f64) -> f64 {
    const SQRT_2: f64 = core::f64::consts::SQRT_2;
    let y = 1.0 + z;
    if !(f64::MIN_POSITIVE..f64::INFINITY).contains(&y) {
        return f64::NAN;
    }
    let bits = y.to_bits();
    // The exponent field of a positive normal double is 1..=2046.
    let exponent = f64::from(u32::try_from((bits >> 52) & 0x7ff).unwrap_or(1023)) - 1023.0;
    let mut w = f64::from_bits((bits & 0x000f_ffff_ffff_ffff) | 0x3ff0_0000_0000_0000);
    let mut k = exponent;
    if w > SQRT_2 {
        w *= 0.5;
        k += 1.0;
    }
    let s = (w - 1.0) / (w + 1.0);
    let s2 = s * s;
    let series = 1.0
        + s2 * (1.0 / 3.0
            + s2 * (1.0 / 5.0
                + s2 * (1.0 / 7.0 + s2 * (1.0 / 9.0 + s2 * (1.0 / 11.0 + s2 * (1.0 / 13.0))))));
    k * core::f64::consts::LN_2 + 2.0 * s * series
}

/// The panel walk over one table segment, shared by [`Band::panels`] and
/// [`Band::response_panels`]: panels from x = `x_start` across `width_x`, each at most 1
/// and at most its own start wide (see [`weighted_gauss_panel`]), adding to `sums` what
/// `panel(x, width, offset)` returns for the panel [x, x + width] that starts `offset`
/// into the segment (so that node offsets can be formed without losing the digits that
/// x and `x_start` share). Returns true when the rest of the band adds nothing: past
/// [`X_INTEGRAND_ZERO`], where every integrand value is exactly zero, or, given the
/// response's largest value `bound`, once the Wien tail beyond is below 1e-18 of the sum.
///
/// That tail test is made from x = [`TAIL_TEST_MIN_X`] on only: before it, it cannot pass
/// (see there), so skipping it changes no result and saves an exponential per panel.
fn walk_segment<P: FnMut(f64, f64, f64) -> (f64, f64, f64)>(
    m: u32,
    x_start: f64,
    width_x: f64,
    bound: Option<f64>,
    sums: &mut (f64, f64, f64),
    mut panel: P,
) -> bool {
    let mut offset = 0.0;
    while offset < width_x {
        let x = x_start + offset;
        if x > X_INTEGRAND_ZERO
            || bound.is_some_and(|b| x > TAIL_TEST_MIN_X && b * tail_bound(m, x) <= 1e-18 * sums.0)
        {
            return true;
        }
        let next = smaller(smaller(offset + 1.0, offset + x), width_x);
        let (s, d, d2) = panel(x, next - offset, offset);
        sums.0 += s;
        sums.1 += d;
        sums.2 += d2;
        offset = next;
    }
    false
}

/// The smaller of two numbers, neither NaN (a plain comparison: `f64::min` adds the NaN
/// handling that the quadrature's inner loops do not need).
#[inline]
fn smaller(a: f64, b: f64) -> f64 {
    if b < a {
        b
    } else {
        a
    }
}

/// The larger of two numbers, neither NaN (see [`smaller`]).
#[inline]
fn larger(a: f64, b: f64) -> f64 {
    if b > a {
        b
    } else {
        a
    }
}

/// Checks a radiance that is to be inverted: finite, positive, normal.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::RadianceNotPositive`], [`Error::RadianceSubnormal`].
pub fn check_target(radiance: f64) -> Result<f64> {
    if finite(radiance)? <= 0.0 {
        Err(Error::RadianceNotPositive)
    } else if radiance < f64::MIN_POSITIVE {
        Err(Error::RadianceSubnormal)
    } else {
        Ok(radiance)
    }
}

/// Solves f(T) = `target` for a function that increases with temperature, by Newton's
/// method on ln f against 1/T, safeguarded by a bracket and geometric bisection.
///
/// `eval(T)` returns f(T) and df/dT. In the Wien regime ln f is linear in 1/T, so Newton
/// converges in two or three steps from [`Band::guess_k`]. An `eval` error of
/// [`Error::RadianceUnderflow`] counts as "below target", [`Error::RadianceOverflow`] as
/// "above"; any other error is returned. The search stays in [[`SOLVER_MIN_K`],
/// [`SOLVER_MAX_K`]]; it stops after a Newton step below 1e-8 T (quadratic convergence
/// leaves an error of order 1e-16 T after it) or any step below 1e-12 T.
///
/// # Errors
/// [`Error::RadianceOutOfRange`] when the bracket collapses onto a search limit or onto
/// a jump of `eval` (a target between an underflow and the smallest value it resolves),
/// [`Error::NotConverged`] after [`SOLVER_MAX_ITERATIONS`], and errors of `eval`.
pub fn solve_increasing<F>(eval: F, target: f64, guess_k: f64) -> Result<Solution>
where
    F: Fn(f64) -> Result<(f64, f64)>,
{
    solve_core(
        |t| eval(t).map(|(value, slope)| (value, slope, f64::NAN)),
        target,
        guess_k,
    )
}

/// The step of [`solve_core`] from T where f = `value`, f' = `slope`, the second ln-T
/// derivative `second`, P1 = d ln f/d ln T and r = f/target - 1: (next T, whether it is
/// a Newton step, whether Halley's correction was applied); (NaN, false, false) where
/// there is no usable step, (+inf, false, false) where the tangent puts the root above
/// every temperature.
///
/// Newton on ln f(u), u = 1/T: du = (ln f - ln target) / (T^2 f'/f).
#[inline]
fn newton_halley_step(
    t: f64,
    value: f64,
    slope: f64,
    second: f64,
    p1: f64,
    r: f64,
) -> (f64, bool, bool) {
    if !(value > 0.0 && value.is_finite() && slope > 0.0 && p1.is_finite()) {
        return (f64::NAN, false, false);
    }
    // ln(f / target) via log1p keeps the last bits that ln f - ln target loses; near
    // convergence (|r| < 1e-4) its series r - r^2/2 + r^3/3 is exact to r^4/4 < 2.5e-17 r
    // and much cheaper.
    let log_ratio = if libm::fabs(r) < 1e-4 {
        r * (1.0 - r * (0.5 - r * (1.0 / 3.0)))
    } else {
        libm::log1p(r)
    };
    // The Newton step in u relative to u is rho = log_ratio/P1 (an infinite P1 would make
    // rho zero and fake a converged step: refused above, so that the solver bisects).
    let mut rho = log_ratio / p1;
    // Halley: rho / (1 + dN g2/(2 g1)) with dN g2/(2 g1) = -rho (1 + P2/P1)/2,
    // P2 = f_ss/f - P1^2; taken only while that correction is moderate (near the root),
    // otherwise the plain Newton step. NaN (no second derivative) fails the test.
    let mut halley = false;
    let factor = 1.0 - 0.5 * rho * (1.0 + (second / value - p1 * p1) / p1);
    if factor > 0.5 && factor < 2.0 {
        rho /= factor;
        halley = true;
    }
    let u = (1.0 + rho) / t;
    if u > 0.0 {
        (1.0 / u, true, halley)
    } else {
        // The tangent in u = 1/T reaches the target only beyond every temperature.
        (f64::INFINITY, false, false)
    }
}

/// The solver of [`solve_increasing`], where `eval(T)` may also return the second
/// derivative d2f/d(ln T)2 (NaN if unknown). With it, each step is Halley's (cubic
/// convergence) instead of Newton's on g(u) = ln f(1/u): with the Newton step dN in u,
/// the Halley step is dN / (1 + dN g2/(2 g1)) (g1, g2 the first and second derivatives of
/// g), and g2/g1 follows from the ln-T derivatives: g1 = -T P1, g2 = T^2 (P1 + P2),
/// P1 = d ln f/d ln T, P2 = d2 ln f/d(ln T)2. A Halley step s T leaves an error of about
/// c s^3 T with c = |g2^2/(4 g1^2) - g3/(6 g1)| u^2 (1/12 in the Rayleigh-Jeans limit,
/// near 0 in the Wien limit), so a Halley step below [`HALLEY_FINAL_STEP`] T ends the
/// search with an error of order 1e-17 T; Newton steps keep the rule of
/// [`solve_increasing`].
fn solve_core<F>(eval: F, target: f64, guess_k: f64) -> Result<Solution>
where
    F: Fn(f64) -> Result<(f64, f64, f64)>,
{
    check_target(target)?;
    let mut lo = SOLVER_MIN_K;
    let mut hi = SOLVER_MAX_K;
    let mut lo_seen = false;
    let mut hi_seen = false;
    // Residuals at the bracket's ends (NaN until seen; -1 / +inf where the signal there
    // underflowed / overflowed).
    let mut lo_residual = f64::NAN;
    let mut hi_residual = f64::NAN;
    // P1 = d ln f / d ln T at the bracket's ends (NaN until seen or where not usable).
    let mut lo_p1 = f64::NAN;
    let mut hi_p1 = f64::NAN;
    let mut t = if guess_k > lo && guess_k < hi {
        guess_k
    } else {
        libm::sqrt(lo * hi)
    };
    for iteration in 1..=SOLVER_MAX_ITERATIONS {
        let (value, slope, second) = match eval(t) {
            Ok(triple) => triple,
            Err(Error::RadianceUnderflow) => (0.0, 0.0, f64::NAN),
            Err(Error::RadianceOverflow) => (f64::INFINITY, 0.0, f64::NAN),
            Err(other) => return Err(other),
        };
        let residual = (value - target) / target;
        if value == target {
            return Ok(Solution {
                temperature_k: t,
                iterations: iteration,
                residual: 0.0,
            });
        }
        // P1 = d ln f / d ln T (NaN where f or f' is not usable).
        let p1 = if value > 0.0 && value.is_finite() && slope > 0.0 {
            log_slope(t, slope, value)
        } else {
            f64::NAN
        };
        if value < target {
            lo = t;
            lo_seen = true;
            (lo_residual, lo_p1) = (residual, p1);
        } else {
            hi = t;
            hi_seen = true;
            (hi_residual, hi_p1) = (residual, p1);
        }
        let (mut next, mut newton, mut halley) =
            newton_halley_step(t, value, slope, second, p1, residual);
        // A step onto an end of the bracket where the signal could not be represented
        // (the root lies within rounding of the overflow or underflow threshold) would
        // return a temperature without a signal: bisect instead, towards the end that has
        // one.
        let onto_unrepresentable =
            (next >= hi && hi_residual == f64::INFINITY) || (next <= lo && lo_residual == -1.0);
        if !(next >= lo && next <= hi) || onto_unrepresentable {
            // A Newton step beyond a search limit not yet evaluated goes to that limit:
            // one evaluation settles whether the root lies beyond it (an error at once,
            // instead of some 30 bisections towards it) and otherwise closes the bracket.
            next = if next > hi && !hi_seen && t < hi {
                hi
            } else if next < lo && !lo_seen && t > lo {
                lo
            } else {
                libm::sqrt(lo * hi)
            };
            newton = false;
            halley = false;
        }
        let step = libm::fabs(next - t);
        // A Newton step s T leaves an error of about k s^2 T, k = |u g''/(2 g')| for
        // g(u) = ln f(1/u): k <= 1/2 for Planck band radiance (1/2 in the Rayleigh-Jeans
        // limit, 2/(4 + x) in the Wien limit) and stays O(10) for grey scene signals over
        // a background. So a Newton step below 1e-8 T is already accurate to ~1e-15 T
        // and needs no further evaluation; other steps must shrink to 1e-12 T.
        //
        // A final step that lands within 1e-8 T of an end where the signal was not
        // representable is evaluated first: the root is then within rounding of the
        // overflow or underflow threshold, and the answer must have a signal.
        let near = NEWTON_FINAL_STEP * t;
        let near_overflow = hi_residual == f64::INFINITY && hi - next <= near;
        let near_underflow = lo_residual == -1.0 && next - lo <= near;
        let final_step = !(near_overflow || near_underflow)
            && ((newton && step <= NEWTON_FINAL_STEP * t)
                || (halley && step <= HALLEY_FINAL_STEP * t));
        if final_step || step <= 1e-12 * t || hi - lo <= 4.0 * f64::EPSILON * hi {
            // An answer within 1e-8 T of an unrepresentable end (a collapsed bracket, or
            // a last step of 1e-12 T next to it) is replaced by the other end, which has
            // a signal, and must pass the residual test below.
            let (mut next, mut residual, mut p1, mut stepped) =
                (next, residual, p1, newton || halley);
            if near_overflow && lo_seen {
                (next, residual, p1, stepped) = (lo, lo_residual, lo_p1, false);
            } else if near_underflow && hi_seen {
                (next, residual, p1, stepped) = (hi, hi_residual, hi_p1, false);
            }
            let at_floor = !lo_seen && next <= SOLVER_MIN_K * (1.0 + 1e-9);
            let at_ceiling = !hi_seen && next >= SOLVER_MAX_K * (1.0 - 1e-9);
            // A bracket that shrank by bisection onto a jump of the curve (from an
            // underflow straight to values far above the target, or from just below the
            // target to an overflow) holds no root: at a true root the value at the end
            // returned is within P1 times the bracket's relative width plus the
            // evaluation's rounding (1e-14 relative) of the target: the tolerance is
            // max(P1, 1) (1e-12 + 2 (hi - lo)/lo), a temperature error of
            // 1e-12 T + 2 (hi - lo) at most (the bracket is 4 ulp wide once collapsed, and
            // at most 2e-12 T after a last step of 1e-12 T). (A residual of 2e-8 against an
            // overflow at 1.8e308 was once taken as a root.)
            let tolerance = (1e-12 + 2.0 * (hi - lo) / lo) * if p1 > 1.0 { p1 } else { 1.0 };
            let on_a_jump = !(stepped || libm::fabs(residual) <= tolerance);
            if at_floor || at_ceiling || on_a_jump {
                return Err(Error::RadianceOutOfRange);
            }
            return Ok(Solution {
                temperature_k: next,
                iterations: iteration,
                residual,
            });
        }
        t = next;
    }
    Err(Error::NotConverged)
}

/// A monotone curve from temperature to signal: a blackbody's band radiance, or an
/// instrument's calibration curve in its own signal units.
///
/// The measurement equation ([`crate::scene`]) and the frame converter work over any such
/// curve, so the same correction applies to exact band radiance and to a fitted
/// calibration.
pub trait SignalCurve {
    /// Signal of a blackbody at `temperature_k`, and its temperature derivative (per K).
    ///
    /// # Errors
    /// Implementation-defined; [`Error::TemperatureNotPositive`] and [`Error::NonFinite`]
    /// for bad temperatures, [`Error::RadianceUnderflow`] / [`Error::RadianceOverflow`]
    /// where the signal cannot be represented.
    fn signal_and_derivative(&self, temperature_k: f64) -> Result<(f64, f64)>;

    /// Signal of a blackbody at `temperature_k`.
    ///
    /// # Errors
    /// As [`SignalCurve::signal_and_derivative`].
    fn signal(&self, temperature_k: f64) -> Result<f64> {
        self.signal_and_derivative(temperature_k)
            .map(|(signal, _)| signal)
    }

    /// Blackbody temperature whose signal equals `signal` (the apparent temperature), K.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::RadianceNotPositive`], [`Error::RadianceSubnormal`],
    /// [`Error::RadianceOutOfRange`], [`Error::NotConverged`] or implementation-defined.
    fn temperature(&self, signal: f64) -> Result<f64>;
}

impl SignalCurve for Band<'_> {
    fn signal_and_derivative(&self, temperature_k: f64) -> Result<(f64, f64)> {
        self.radiance_and_derivative(temperature_k)
    }

    fn temperature(&self, signal: f64) -> Result<f64> {
        Band::temperature(self, signal)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ln_approx_is_within_its_bound_of_libm() {
        // Against libm's log1p: 5e-13 absolute plus the rounding of 1 + z and 2 ulp of
        // the result, i.e. within
        // 5e-9 relative for |z| >= 1e-4, over z from -0.9999 to 1e300.
        let mut z = -0.9999_f64;
        let mut count = 0;
        while z < 1e300 {
            let expected = libm::log1p(z);
            let error = libm::fabs(ln_approx(z) - expected);
            let bound = 5e-13 + 2.3e-16 + 4.5e-16 * libm::fabs(expected);
            assert!(error <= bound, "z = {z}: {error:e}");
            if libm::fabs(z) >= 1e-4 {
                assert!(error <= 5e-9 * libm::fabs(expected), "z = {z}: {error:e}");
            }
            z = if z < -1e-3 {
                z * 0.93
            } else if z < 1e-3 {
                z + 1.3e-4
            } else {
                z * 1.37
            };
            count += 1;
        }
        assert!(count > 2000, "{count}");
        assert!(ln_approx(-1.0).is_nan());
        assert!(ln_approx(f64::INFINITY).is_nan());
        assert!(ln_approx(f64::NAN).is_nan());
    }

    #[test]
    fn extreme_temperatures_end_in_errors_not_loops() {
        let wavelengths_um = [8.0, 14.0];
        let values = [1.0, 1.0];
        let table = SpectralTable::new(&wavelengths_um, &values).unwrap();
        let band = Band::with_response(8.0, 14.0, Detector::Energy, table).unwrap();
        assert_eq!(band.radiance(1e-300), Err(Error::RadianceUnderflow));
        assert_eq!(band.radiance(1e300), Err(Error::RadianceOverflow));
        assert_eq!(band.radiance(f64::MAX), Err(Error::RadianceOverflow));
        let weighted = band
            .weighted_radiance_and_derivative(1e-300, &[], |_| 1.0)
            .unwrap();
        assert_eq!(weighted.0, 0.0);
        let rectangular = Band::rectangular(8.0, 14.0, Detector::Photon).unwrap();
        assert_eq!(rectangular.radiance(1e-300), Err(Error::RadianceUnderflow));
        assert_eq!(rectangular.radiance(f64::MAX), Err(Error::RadianceOverflow));
    }

    #[test]
    fn log_curvature_is_the_derivative_of_the_log_slope() {
        // dP1/d ln T against a central difference of P1 (step 1e-4 in ln T: truncation
        // ~1e-8 relative of P1's third derivative, well below the 1e-5 tolerance), for
        // rectangular and tabulated bands of both detector kinds, Wien to Rayleigh-Jeans.
        let wl = [2.0, 3.0, 5.0, 9.0];
        let r = [0.1, 1.0, 0.7, 0.2];
        let table = SpectralTable::new(&wl, &r).unwrap();
        let bands = [
            Band::rectangular(0.65, 0.7, Detector::Energy).unwrap(),
            Band::rectangular(8.0, 14.0, Detector::Photon).unwrap(),
            Band::rectangular(1e-3, 4.0, Detector::Photon).unwrap(),
            Band::with_response(2.0, 9.0, Detector::Energy, table).unwrap(),
            Band::with_response(2.5, 9.0, Detector::Photon, table).unwrap(),
        ];
        let h = 1e-4;
        let mut checked = 0;
        for band in bands {
            for t in [150.0, 300.0, 1000.0, 3000.0, 2e4, 1e6] {
                let (_, _, curvature) = band.log_slope_and_curvature(t).unwrap();
                let (_, up, _) = band.log_slope_and_curvature(t * libm::exp(h)).unwrap();
                let (_, down, _) = band.log_slope_and_curvature(t * libm::exp(-h)).unwrap();
                let difference = (up - down) / (2.0 * h);
                let scale = libm::fabs(difference).max(1e-3);
                assert!(
                    libm::fabs(curvature - difference) <= 1e-5 * scale,
                    "{band:?} at {t} K: {curvature} vs {difference}"
                );
                checked += 1;
            }
        }
        assert_eq!(checked, 30);
    }
}
