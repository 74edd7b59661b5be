//! Diffraction-limited spot and detector sampling.
//!
//! # Airy pattern (Born and Wolf, *Principles of Optics*, section 8.5.2)
//! A circular, unobstructed, aberration-free aperture of f-number N at wavelength lambda
//! puts the fraction
//!
//! ```text
//! EE(r) = 1 - J0(v)^2 - J1(v)^2,      v = pi r / (lambda N)
//! ```
//!
//! of the power within radius r of the image of a point. Check values (Born and Wolf;
//! recomputed with mpmath): 83.8 % within r = 1.220 lambda N (first dark ring), 90 % within
//! 1.901 lambda N, 95 % within 3.916 lambda N.
//!
//! # MTF (Budzier and Gerlach 2021, J. Sens. Sens. Syst. 10, 179)
//! ```text
//! diffraction: MTF_d(nu) = (2/pi) (acos x - x sqrt(1 - x^2)),   x = nu / nu_c,  nu_c = 1/(lambda N)
//! pixel:       MTF_p(nu) = |sin(pi p nu) / (pi p nu)|           (square pixel of pitch p, 100 % fill)
//! system:      MTF = MTF_d MTF_p,      Nyquist nu_N = 1/(2p)
//! ```
//!
//! Check: lambda = 10 um, F/1, 17 um pitch: nu_c = 100 cy/mm, nu_N = 29.41 cy/mm,
//! MTF_d(nu_N) = 0.6310, MTF_p(nu_N) = 2/pi = 0.6366, product 0.4017.
//!
//! Both assume a monochromatic, aberration-free optic: for a band, use the band's mean
//! wavelength as an estimate (a real lens is never better than this, often worse).
//! Spatial frequencies are in cycles per mm of the image plane (`_cy_mm`).

use crate::error::{finite, Error, Result};
use crate::quadrature::gauss10;
use core::f64::consts::PI;

fn positive(value: f64) -> Result<f64> {
    if finite(value)? > 0.0 {
        Ok(value)
    } else {
        Err(Error::OpticsGeometryInvalid)
    }
}

/// Airy encircled energy at v = pi r / (lambda N): 1 - J0(v)^2 - J1(v)^2 (libm's j0, j1;
/// about 1e-15 absolute).
///
/// Below v = 1/4 the difference cancels (J0^2 rounds to 1 once v^2 < eps, and
/// 1 - 1 - J1^2 came out as -v^2/4, negative), so there the Taylor series in w = v^2 is
/// used: sum of c_k w^k with c = 1/4, -1/32, 5/2304, -7/73728, 7/2457600, -11/176947200,
/// 143/138726604800, -143/10654203248640 (mpmath `taylor` of 1 - J0^2 - J1^2, exact
/// rationals); the first omitted term is below 1e-17 of the value at v = 1/4, so the
/// result is accurate to a few ulp relative and never negative.
fn encircled_at(v: f64) -> f64 {
    if v.abs() < 0.25 {
        let w = v * v;
        let c = [
            0.25,
            -1.0 / 32.0,
            5.0 / 2304.0,
            -7.0 / 73728.0,
            7.0 / 2_457_600.0,
            -11.0 / 176_947_200.0,
            143.0 / 138_726_604_800.0,
            -143.0 / 10_654_203_248_640.0,
        ];
        let mut sum = 0.0;
        for ck in c.iter().rev() {
            sum = sum * w + ck;
        }
        return sum * w;
    }
    let j0 = libm::j0(v);
    let j1 = libm::j1(v);
    1.0 - j0 * j0 - j1 * j1
}

/// Fraction of a point image's power within `radius_um` of its centre (Airy pattern), for
/// wavelength `wavelength_um` and f-number `f_number`. In [0, 1).
///
/// Accuracy: 1e-14 absolute against mpmath (`tests/optics_diffraction.rs`).
///
/// # Errors
/// [`Error::NonFinite`]; [`Error::OpticsGeometryInvalid`] for a negative radius or a
/// wavelength or f-number that is not positive.
pub fn airy_encircled_energy(radius_um: f64, wavelength_um: f64, f_number: f64) -> Result<f64> {
    if !(finite(radius_um)? >= 0.0) {
        return Err(Error::OpticsGeometryInvalid);
    }
    let scale = positive(wavelength_um)? * positive(f_number)?;
    finite(encircled_at(PI * radius_um / scale))
}

/// The smallest radius, um, within which the Airy pattern holds `fraction` (in (0, 1)) of
/// the power: the inverse of [`airy_encircled_energy`]. EE is non-decreasing in r (its
/// derivative is 2 J1(v)^2 / v >= 0), so the smallest such radius is unique; found by
/// bisection on v to 1e-13 relative. For fraction -> 1 the radius grows as
/// 2 lambda N / (pi^2 (1 - fraction)) (the tail J0^2 + J1^2 ~ 2/(pi v)).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::FractionOutOfRange`], [`Error::OpticsGeometryInvalid`].
pub fn airy_radius_um(fraction: f64, wavelength_um: f64, f_number: f64) -> Result<f64> {
    if !(finite(fraction)? > 0.0 && fraction < 1.0) {
        return Err(Error::FractionOutOfRange);
    }
    let scale = positive(wavelength_um)? * positive(f_number)?;
    let mut lo = 0.0_f64;
    let mut hi = 4.0 / (PI * (1.0 - fraction)) + 8.0;
    let mut grow = 0;
    while encircled_at(hi) < fraction {
        lo = hi;
        hi *= 2.0;
        grow += 1;
        if grow > 60 {
            return Err(Error::FractionOutOfRange);
        }
    }
    while hi - lo > 1e-13 * hi {
        let mid = 0.5 * (lo + hi);
        if encircled_at(mid) < fraction {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    finite(hi * scale / PI)
}

/// Diffraction cut-off frequency nu_c = 1 / (lambda N), cycles per mm.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::OpticsGeometryInvalid`].
pub fn cutoff_cy_mm(wavelength_um: f64, f_number: f64) -> Result<f64> {
    finite(1e3 / (positive(wavelength_um)? * positive(f_number)?))
}

/// Nyquist frequency of a detector of pitch `pitch_um`: 1 / (2 p), cycles per mm.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::OpticsGeometryInvalid`].
pub fn nyquist_cy_mm(pitch_um: f64) -> Result<f64> {
    finite(1e3 / (2.0 * positive(pitch_um)?))
}

/// The MTF of an imager at one spatial frequency, by factor.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Mtf {
    /// Diffraction MTF of the circular aperture (incoherent).
    pub diffraction: f64,
    /// Pixel (aperture) MTF of a square pixel with 100 % fill factor.
    pub pixel: f64,
    /// Their product, the system MTF of this model.
    pub system: f64,
}

/// Diffraction MTF at x = nu / nu_c (0 at and beyond the cut-off).
fn diffraction_mtf_at(x: f64) -> f64 {
    if x >= 1.0 {
        return 0.0;
    }
    let root = libm::sqrt((1.0 - x) * (1.0 + x));
    2.0 / PI * (libm::acos(x) - x * root)
}

/// sin(pi u) / (pi u), 1 at u = 0.
fn sinc(u: f64) -> f64 {
    if libm::fabs(u) < 1e-8 {
        1.0 - (PI * u) * (PI * u) / 6.0
    } else {
        libm::sin(PI * u) / (PI * u)
    }
}

/// System MTF at `frequency_cy_mm` (cycles per mm, >= 0) of an imager with pixel pitch
/// `pitch_um`, at wavelength `wavelength_um` and f-number `f_number` (formulas in the
/// module docs). Exact for the model, to a few ulp.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::SpatialFrequencyNegative`],
/// [`Error::OpticsGeometryInvalid`].
pub fn mtf(frequency_cy_mm: f64, pitch_um: f64, wavelength_um: f64, f_number: f64) -> Result<Mtf> {
    if !(finite(frequency_cy_mm)? >= 0.0) {
        return Err(Error::SpatialFrequencyNegative);
    }
    let x = frequency_cy_mm / cutoff_cy_mm(wavelength_um, f_number)?;
    let diffraction = diffraction_mtf_at(x);
    let pixel = libm::fabs(sinc(positive(pitch_um)? * 1e-3 * frequency_cy_mm));
    Ok(Mtf {
        diffraction,
        pixel,
        system: diffraction * pixel,
    })
}

/// Most radial panels [`small_target_fraction`] uses; it refuses target images so large
/// that more would be needed (beyond 2000 lambda N in radius, far larger than any
/// detector, where the fraction is 1 to within 1e-4 anyway).
const MAX_RADIAL_PANELS: f64 = 4096.0;
/// Most radial x angular panel pairs (each 100 evaluations of two sincs): bounds the work
/// at about 4.1e5 evaluations, about 36 ms at the 8.7 us per pair measured on the host
/// (inside the C ABI's 50 ms per-call budget; the former 65,536 pairs allowed 0.57 s,
/// and a 300 um pitch at 5 um, F/1 took 66 ms). A pixel pitch and image radius both above
/// about 30 lambda N, or a pitch alone above about 43 lambda N, would exceed it.
const MAX_PANEL_PAIRS: f64 = 4_096.0;

/// The fraction of the full-field signal that the pixel centred on the image of a small,
/// uniform, round target receives (the rest of the scene at zero): how much a small
/// target reads low in signal on an imager limited by diffraction and pixel size.
///
/// `target_diameter_um` is the diameter of the target's image on the detector (object
/// diameter times f / (D - f) for a thin lens at distance D); the pixel is square with
/// pitch `pitch_um` and 100 % fill factor, the optic diffraction limited at
/// `wavelength_um` and `f_number`. With the pixel indicator P, the Airy PSF and the disc
/// D_R of radius R, f = (1/p^2) integral over the pixel of (PSF * D_R); in the frequency
/// domain (Parseval):
///
/// ```text
/// f = integral_0^nu_c MTF_d(rho) R J1(2 pi R rho) A(rho) d rho
/// A(rho) = integral_0^(2 pi) sinc(p rho cos phi) sinc(p rho sin phi) d phi
/// ```
///
/// Limits (checked in the tests): p -> 0 gives the Airy encircled energy EE(R); R -> inf
/// gives 1. The apparent signal of the target is S_bg + f (S_target - S_bg): a target
/// filling f = 0.9 of its pixel's signal reads 10 % of the target-background contrast low.
///
/// Method: Gauss-Legendre in u with rho = nu_c (1 - u^2) (which smooths the
/// (1 - x)^(3/2) edge of MTF_d), panels finer than the oscillations of J1 and of the
/// sincs; A(rho) over the eighth [0, pi/4] by symmetry. Accuracy 1e-10 absolute against
/// scipy's adaptive quadrature of the same integral (`tools/refgen/optics_refs.py`).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TargetSizeNotPositive`],
/// [`Error::OpticsGeometryInvalid`] (also for a target image beyond 2000 lambda N in
/// radius, or a pitch and target so large against lambda N that the quadrature would
/// need more than 4096 panel pairs: p and R up to about 30 lambda N are always fine).
pub fn small_target_fraction(
    target_diameter_um: f64,
    pitch_um: f64,
    wavelength_um: f64,
    f_number: f64,
) -> Result<f64> {
    if !(finite(target_diameter_um)? > 0.0) {
        return Err(Error::TargetSizeNotPositive);
    }
    let p = positive(pitch_um)?;
    let nu_c = 1.0 / (positive(wavelength_um)? * positive(f_number)?);
    let r = 0.5 * target_diameter_um;
    // Oscillation counts over [0, nu_c]: J1 has period ~1/R in rho, each sinc ~1/p.
    let radial = libm::ceil(2.0 * nu_c * (r + p)) + 4.0;
    if radial > MAX_RADIAL_PANELS {
        return Err(Error::OpticsGeometryInvalid);
    }
    let angular = libm::ceil(p * nu_c) + 1.0;
    if radial * angular > MAX_PANEL_PAIRS {
        return Err(Error::OpticsGeometryInvalid);
    }
    let angular_width = 0.25 * PI / angular;
    let a_of = |rho: f64| {
        let mut sum = 0.0;
        let mut j = 0.0;
        while j < angular {
            let lo = j * angular_width;
            sum += gauss10(lo, lo + angular_width, |phi| {
                sinc(p * rho * libm::cos(phi)) * sinc(p * rho * libm::sin(phi))
            });
            j += 1.0;
        }
        8.0 * sum
    };
    let width = 1.0 / radial;
    let mut total = 0.0;
    let mut i = 0.0;
    while i < radial {
        let lo = i * width;
        total += gauss10(lo, lo + width, |u| {
            let x = (1.0 - u) * (1.0 + u);
            let rho = nu_c * x;
            // d rho = 2 nu_c u du
            2.0 * nu_c * u * diffraction_mtf_at(x) * r * libm::j1(2.0 * PI * r * rho) * a_of(rho)
        });
        i += 1.0;
    }
    finite(total)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cutoff_and_nyquist() {
        assert!((cutoff_cy_mm(10.0, 1.0).unwrap() - 100.0).abs() < 1e-12);
        assert!((nyquist_cy_mm(17.0).unwrap() - 1000.0 / 34.0).abs() < 1e-12);
        let m = mtf(0.0, 17.0, 10.0, 1.0).unwrap();
        assert_eq!((m.diffraction, m.pixel, m.system), (1.0, 1.0, 1.0));
        assert_eq!(mtf(100.0, 17.0, 10.0, 1.0).unwrap().diffraction, 0.0);
    }

    #[test]
    fn errors() {
        assert_eq!(
            airy_radius_um(1.0, 10.0, 1.0),
            Err(Error::FractionOutOfRange)
        );
        assert_eq!(
            mtf(-1.0, 17.0, 10.0, 1.0),
            Err(Error::SpatialFrequencyNegative)
        );
        assert_eq!(
            small_target_fraction(0.0, 17.0, 10.0, 1.0),
            Err(Error::TargetSizeNotPositive)
        );
    }
}
