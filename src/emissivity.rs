//! Directional emissivity of a smooth, opaque surface from its optical constants
//! (Fresnel's equations with the complex refractive index m = n - ik), its normal and
//! hemispherical values, the viewing angle beyond which a reading should not be trusted,
//! and the Hagen-Rubens estimate for metals.
//!
//! # Model
//! A plane, optically smooth interface between vacuum (or air, index 1) and an opaque
//! medium of complex index m = n - ik (n > 0, k >= 0), at one wavelength. By Kirchhoff's
//! law the directional spectral emissivity is one minus the directional reflectance
//! (Siegel and Howell, *Thermal Radiation Heat Transfer*; Modest, *Radiative Heat
//! Transfer*, chapter on the radiative properties of real surfaces):
//!
//! ```text
//! w   = sqrt(m^2 - sin^2 theta)                 (principal root, Re w >= 0)
//! r_s = (cos theta - w) / (cos theta + w)
//! r_p = (m^2 cos theta - w) / (m^2 cos theta + w)
//! e_s = 1 - |r_s|^2,   e_p = 1 - |r_p|^2,   e(theta) = (e_s + e_p) / 2   (unpolarised)
//! e_n = e(0) = 4n / ((n + 1)^2 + k^2)
//! e_h = 2 * integral_0^(pi/2) e(theta) cos theta sin theta dtheta = integral_0^1 e(mu) 2 mu dmu
//! ```
//!
//! Validity: specular, clean, homogeneous surfaces much thicker than the penetration depth.
//! Real surfaces (roughness, oxide, contamination) depart from it, often far; the model
//! tells how emissivity changes with angle, not what a plant surface's emissivity is.
//! Optical constants at the instrument's wavelength come from the literature or from
//! ellipsometry; for a band, evaluate at several wavelengths.
//!
//! # Check values (recomputed with mpmath quadrature in `tools/refgen/optics_refs.py`)
//! n = 1.5: e_n = 0.96, e_h = 0.90822, e(60 deg) = 0.9108, e_p = 1 at Brewster's angle
//! 56.31 deg. Metal n = k = 54.75: e_n = 0.03587, e_h = 0.04563, peak 0.414 at 89.26 deg.

use crate::error::{finite, Error, Result};
use crate::quadrature::gauss10;

/// A complex number, just enough arithmetic for Fresnel's equations.
#[derive(Clone, Copy, Debug)]
struct Complex {
    re: f64,
    im: f64,
}

impl Complex {
    const fn new(re: f64, im: f64) -> Self {
        Complex { re, im }
    }
    fn add(self, o: Complex) -> Complex {
        Complex::new(self.re + o.re, self.im + o.im)
    }
    fn sub(self, o: Complex) -> Complex {
        Complex::new(self.re - o.re, self.im - o.im)
    }
    fn mul(self, o: Complex) -> Complex {
        Complex::new(
            self.re * o.re - self.im * o.im,
            self.re * o.im + self.im * o.re,
        )
    }
    fn scale(self, s: f64) -> Complex {
        Complex::new(self.re * s, self.im * s)
    }
    fn norm_sqr(self) -> f64 {
        self.re * self.re + self.im * self.im
    }
    /// Principal square root (Re >= 0), without cancellation.
    fn sqrt(self) -> Complex {
        let r = libm::hypot(self.re, self.im);
        if r == 0.0 {
            return Complex::new(0.0, 0.0);
        }
        if self.re >= 0.0 {
            let t = libm::sqrt(0.5 * (r + self.re));
            Complex::new(t, self.im / (2.0 * t))
        } else {
            let t = libm::sqrt(0.5 * (r - self.re));
            Complex::new(libm::fabs(self.im) / (2.0 * t), libm::copysign(t, self.im))
        }
    }
}

/// Complex refractive index m = n - ik of an opaque medium at one wavelength.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct OpticalConstants {
    n: f64,
    k: f64,
}

/// Directional emissivity at one angle, by polarisation.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct DirectionalEmissivity {
    /// s (TE, perpendicular) polarisation, 1 - |r_s|^2.
    pub s: f64,
    /// p (TM, parallel) polarisation, 1 - |r_p|^2.
    pub p: f64,
    /// Unpolarised, (s + p) / 2: what a thermometer without a polariser sees.
    pub unpolarised: f64,
}

/// Number of geometric panels of the hemispherical integral in mu = cos theta: panel j
/// covers [2^-(j+1), 2^-j], the last one [0, 2^-40].
const HEMI_PANELS: u32 = 40;

/// Largest angle, in degrees, that the directional functions accept (grazing incidence,
/// 90 deg, has e = 0 exactly and is excluded to keep cos theta away from zero).
pub const MAX_ANGLE_DEG: f64 = 89.999;

impl OpticalConstants {
    /// Optical constants n (refractive index, > 0) and k (extinction coefficient, >= 0):
    /// m = n - ik. A dielectric has k = 0.
    ///
    /// # Errors
    /// [`Error::NonFinite`]; [`Error::RefractiveIndexInvalid`] unless n > 0 and k >= 0, or
    /// when n^2 + k^2 exceeds 1e12 (|m| above 1e6: no real material at thermal
    /// wavelengths; keeps every product finite).
    pub fn new(n: f64, k: f64) -> Result<Self> {
        finite(n)?;
        finite(k)?;
        if n > 0.0 && k >= 0.0 && n * n + k * k <= 1e12 {
            Ok(OpticalConstants { n, k })
        } else {
            Err(Error::RefractiveIndexInvalid)
        }
    }

    /// n, the real part of m.
    #[must_use]
    pub fn n(&self) -> f64 {
        self.n
    }

    /// k, minus the imaginary part of m.
    #[must_use]
    pub fn k(&self) -> f64 {
        self.k
    }

    fn m_squared(&self) -> Complex {
        let m = Complex::new(self.n, -self.k);
        m.mul(m)
    }

    /// Fresnel emissivities at mu = cos theta in [0, 1] (no checks).
    fn at_cos(&self, mu: f64) -> DirectionalEmissivity {
        let m2 = self.m_squared();
        let sin2 = (1.0 - mu) * (1.0 + mu);
        let w = m2.sub(Complex::new(sin2, 0.0)).sqrt();
        let c = Complex::new(mu, 0.0);
        let rs = c.sub(w).norm_sqr() / c.add(w).norm_sqr();
        let m2c = m2.scale(mu);
        let rp = m2c.sub(w).norm_sqr() / m2c.add(w).norm_sqr();
        let s = 1.0 - rs;
        let p = 1.0 - rp;
        DirectionalEmissivity {
            s,
            p,
            unpolarised: 0.5 * (s + p),
        }
    }

    /// Directional spectral emissivity at `angle_deg` from the surface normal (degrees,
    /// [0, [`MAX_ANGLE_DEG`]]), by polarisation (formulas in the module docs).
    ///
    /// Accuracy: a few ulp of the reflectances against mpmath (`tests/emissivity_fresnel.rs`:
    /// 1e-13 absolute over the reference angles).
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::AngleOutOfRange`].
    pub fn directional(&self, angle_deg: f64) -> Result<DirectionalEmissivity> {
        let mu = cos_of_angle(angle_deg)?;
        Ok(self.at_cos(mu))
    }

    /// Normal spectral emissivity e_n = 4n / ((n + 1)^2 + k^2) (exact, closed form).
    ///
    /// Evaluated as 4n / (4n + (n - 1)^2 + k^2), the same quantity: 4n is exact and the
    /// added term is never negative, so the rounded denominator is never below the
    /// numerator and e_n <= 1 holds in floating point too (with (n + 1)^2, n = 1 + eps gave
    /// 1 + 2 eps, since n + 1 rounds down). Accuracy: a few ulp relative.
    #[must_use]
    pub fn normal(&self) -> f64 {
        let four_n = 4.0 * self.n;
        let nm1 = self.n - 1.0;
        four_n / (four_n + (nm1 * nm1 + self.k * self.k))
    }

    /// Hemispherical spectral emissivity e_h = integral_0^1 e(mu) 2 mu dmu (mu = cos theta).
    ///
    /// Method: 10-point Gauss-Legendre on 40 panels geometric in mu ([2^-(j+1), 2^-j]),
    /// which resolve the grazing-angle peak of metals (at mu of order 1/|m|) for any
    /// accepted |m|; the panel [0, 2^-40] contributes below 1e-24 and is dropped.
    /// Accuracy: 1e-12 absolute against mpmath quadrature over the reference cases
    /// (dielectrics n = 1.2-4, metals n, k up to 100).
    #[must_use]
    pub fn hemispherical(&self) -> f64 {
        let mut sum = 0.0;
        let mut hi = 1.0;
        for _ in 0..HEMI_PANELS {
            let lo = 0.5 * hi;
            sum += gauss10(lo, hi, |mu| 2.0 * mu * self.at_cos(mu).unpolarised);
            hi = lo;
        }
        sum
    }

    /// The largest viewing angle (degrees from the normal) up to which the unpolarised
    /// directional emissivity stays within `relative_tolerance` of the normal emissivity:
    /// |e(theta)/e_n - 1| <= tol for every theta in [0, theta_max]. Beyond it a reading
    /// taken with the normal emissivity errs by more than that fraction in emissivity.
    ///
    /// Dielectrics lose emissivity with angle (n = 1.5 drops 1 % by about 44 deg); metals
    /// gain it (their peak is near grazing), so the same rule bounds both. Common practice
    /// keeps viewing angles below 45-60 deg for non-metals; this gives the angle for the
    /// material and tolerance at hand.
    ///
    /// Method: a scan in 0.25 deg steps for the first angle outside the tolerance, then
    /// bisection to 1e-10 deg. e(theta) of Fresnel's equations has at most one interior
    /// maximum, so |e/e_n - 1| leaves the tolerance band for good once it crosses it,
    /// except on the near side of that maximum; an excursion narrower than 0.25 deg would
    /// need a maximum that narrow (|m| above about 200), and the answer is checked against
    /// mpmath root finding after a 0.01 deg scan in the tests. e(90 deg) = 0 guarantees a
    /// crossing for tol < 1.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::AngleToleranceInvalid`] unless 0 < tol < 1.
    pub fn trusted_angle_deg(&self, relative_tolerance: f64) -> Result<f64> {
        if !(finite(relative_tolerance)? > 0.0 && relative_tolerance < 1.0) {
            return Err(Error::AngleToleranceInvalid);
        }
        let en = self.normal();
        let outside = |deg: f64| {
            let e = self.at_cos(libm::cos(deg.to_radians())).unpolarised;
            libm::fabs(e / en - 1.0) > relative_tolerance
        };
        let mut lo = 0.0_f64;
        let mut hi = 90.0_f64;
        let mut step = 1_u32;
        while step <= 360 {
            let deg = 0.25 * f64::from(step);
            if outside(deg) {
                hi = deg;
                break;
            }
            lo = deg;
            step += 1;
        }
        while hi - lo > 1e-10 {
            let mid = 0.5 * (lo + hi);
            if outside(mid) {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        Ok(lo)
    }
}

/// The angle and value of the largest unpolarised directional emissivity.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct EmissivityPeak {
    /// Angle from the normal, degrees (0 when e falls from the normal on: most dielectrics).
    pub angle_deg: f64,
    /// e at that angle.
    pub emissivity: f64,
}

impl OpticalConstants {
    /// Where the unpolarised directional emissivity peaks: a metal's peak lies near grazing
    /// (n = k = 54.75: 0.414 at 89.26 deg), a dielectric's at the normal (n < about 3.7)
    /// or at a moderate angle (n = 4: 0.6422 at 57.5 deg).
    ///
    /// Method: a scan of [0, 89.999] deg in 0.01 deg steps, then golden-section search in
    /// the cells beside the best node to 1e-9 deg (e has at most one interior maximum).
    /// Accuracy: value 1e-13, angle 1e-5 deg (a maximum is flat: double precision fixes
    /// its position only to about sqrt(eps)), against mpmath golden-section search.
    #[must_use]
    pub fn peak(&self) -> EmissivityPeak {
        let e_at = |deg: f64| self.at_cos(libm::cos(deg.to_radians())).unpolarised;
        let mut best_deg = 0.0;
        // A rise of a few ulp over the normal value is rounding (e is flat there to fourth
        // order for n near 2), not a peak.
        let mut best = e_at(0.0) * (1.0 + 8.0 * f64::EPSILON);
        let mut i = 1_u32;
        while i <= 8_999 {
            let deg = 0.01 * f64::from(i);
            let e = e_at(deg);
            if e > best {
                best = e;
                best_deg = deg;
            }
            i += 1;
        }
        let (mut a, mut b) = (
            (best_deg - 0.01).max(0.0),
            (best_deg + 0.01).min(MAX_ANGLE_DEG),
        );
        let g = 0.618_033_988_749_894_8;
        while b - a > 1e-9 {
            let c = b - g * (b - a);
            let d = a + g * (b - a);
            if e_at(c) > e_at(d) {
                b = d;
            } else {
                a = c;
            }
        }
        let mid = 0.5 * (a + b);
        let e_mid = e_at(mid);
        if best_deg == 0.0 {
            return EmissivityPeak {
                angle_deg: 0.0,
                emissivity: self.normal(),
            };
        }
        if e_mid > best {
            EmissivityPeak {
                angle_deg: mid,
                emissivity: e_mid,
            }
        } else {
            EmissivityPeak {
                angle_deg: best_deg,
                emissivity: best,
            }
        }
    }
}

/// cos of an angle in degrees, checked to lie in [0, MAX_ANGLE_DEG].
fn cos_of_angle(angle_deg: f64) -> Result<f64> {
    if finite(angle_deg)? >= 0.0 && angle_deg <= MAX_ANGLE_DEG {
        Ok(libm::cos(angle_deg.to_radians()))
    } else {
        Err(Error::AngleOutOfRange)
    }
}

/// Brewster's angle of a dielectric (k = 0) in degrees: atan(n), where e_p = 1.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::RefractiveIndexInvalid`] unless n > 0.
pub fn brewster_angle_deg(n: f64) -> Result<f64> {
    if finite(n)? > 0.0 {
        Ok(libm::atan(n).to_degrees())
    } else {
        Err(Error::RefractiveIndexInvalid)
    }
}

/// The Hagen-Rubens constant 4 pi c eps0 = 4 pi / Z0 = 0.0333564... S (siemens), with the
/// impedance of free space Z0 = 1/(c eps0) = 376.730313412 ohm (CODATA 2018): the Drude
/// low-frequency optical constants are n^2 = k^2 = lambda / (4 pi c eps0 r_e).
const HAGEN_RUBENS_S: f64 = 4.0 * core::f64::consts::PI / 376.730_313_412;

/// Hagen-Rubens normal spectral emissivity of a metal, first term only:
///
/// ```text
/// e_n ~= 0.365 sqrt(r_e / lambda)      exactly: 2 sqrt(4 pi r_e / (Z0 lambda))
/// ```
///
/// r_e the DC electrical resistivity in ohm m, lambda the wavelength (here in um;
/// converted to m), Z0 the impedance of free space. It is the leading term of the exact
/// normal emissivity for the Drude low-frequency optical constants n = k =
/// sqrt(lambda / (4 pi c eps0 r_e)) ([`hagen_rubens_constants`]); its relative error is
/// about 1/n = e_n/2, so it is refused above e_n = 0.2 (error then near 10 %).
///
/// First term, checked: the Hagen-Rubens relation as the encyclopaedia article on it gives
/// it (citing R. E. Hummel, *Electronic Properties of Materials*, 4th ed.; Hummel itself
/// not seen) reads R ~= 1 - 2 sqrt(2 eps0 omega / sigma); with omega = 2 pi c / lambda
/// and sigma = 1/r_e that is e = 1 - R = 2 sqrt(4 pi c eps0 r_e / lambda) =
/// 0.36528 sqrt(r_e / lambda), the coefficient above (`tests/emissivity_fresnel.rs`).
///
/// Second term, not confirmed: a second-order coefficient (-0.0464 r_e/lambda) circulates
/// in heat-transfer texts (quoted here from memory). We found no printed source to check it
/// against, and expanding the exact Fresnel normal emissivity 4n/(2n^2 + 2n + 1) at n = k
/// gives 2/n - 2/n^2 + ..., i.e. -0.0667 r_e/lambda, which does not match it. So only the
/// first term ships; for more accuracy use the exact Fresnel value of
/// [`hagen_rubens_constants`], and for any metal at wavelengths where the Drude
/// low-frequency limit fails (below a few um for most metals) use measured n, k.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::ResistivityNotPositive`], [`Error::WavelengthNotPositive`],
/// [`Error::HagenRubensOutOfRange`] when the first term exceeds 0.2.
pub fn hagen_rubens_normal(resistivity_ohm_m: f64, wavelength_um: f64) -> Result<f64> {
    let n = hagen_rubens_n(resistivity_ohm_m, wavelength_um)?;
    let e = 2.0 / n;
    if e <= 0.2 {
        Ok(e)
    } else {
        Err(Error::HagenRubensOutOfRange)
    }
}

fn hagen_rubens_n(resistivity_ohm_m: f64, wavelength_um: f64) -> Result<f64> {
    if !(finite(resistivity_ohm_m)? > 0.0) {
        return Err(Error::ResistivityNotPositive);
    }
    if !(finite(wavelength_um)? > 0.0) {
        return Err(Error::WavelengthNotPositive);
    }
    finite(libm::sqrt(
        wavelength_um * 1e-6 / (HAGEN_RUBENS_S * resistivity_ohm_m),
    ))
}

/// The Drude low-frequency (Hagen-Rubens) optical constants of a metal, n = k =
/// sqrt(lambda / (4 pi c eps0 r_e)), r_e in ohm m, lambda in um. Feed them to
/// [`OpticalConstants::directional`] and [`OpticalConstants::hemispherical`] for the
/// angular behaviour of a metal in the far infrared. Validity: lambda much longer than
/// the metal's relaxation wavelength (c tau, tens of um for good conductors at room
/// temperature), so at 8-14 um it is an estimate that underestimates real, oxidised or
/// rough metals.
///
/// # Errors
/// As [`hagen_rubens_normal`] (without the range limit) and those of
/// [`OpticalConstants::new`].
pub fn hagen_rubens_constants(
    resistivity_ohm_m: f64,
    wavelength_um: f64,
) -> Result<OpticalConstants> {
    let n = hagen_rubens_n(resistivity_ohm_m, wavelength_um)?;
    OpticalConstants::new(n, n)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn normal_closed_form_matches_fresnel_at_zero() {
        let m = OpticalConstants::new(2.7, 3.1).unwrap();
        let d = m.directional(0.0).unwrap();
        assert!((d.unpolarised - m.normal()).abs() < 1e-15);
        assert!((d.s - d.p).abs() < 1e-15);
    }

    #[test]
    fn bad_inputs_are_errors() {
        assert_eq!(
            OpticalConstants::new(0.0, 1.0),
            Err(Error::RefractiveIndexInvalid)
        );
        assert_eq!(
            OpticalConstants::new(1.0, -1e-9),
            Err(Error::RefractiveIndexInvalid)
        );
        let m = OpticalConstants::new(1.5, 0.0).unwrap();
        assert_eq!(m.directional(90.0), Err(Error::AngleOutOfRange));
        assert_eq!(m.directional(-0.1), Err(Error::AngleOutOfRange));
        assert_eq!(m.directional(f64::NAN), Err(Error::NonFinite));
        assert_eq!(m.trusted_angle_deg(1.0), Err(Error::AngleToleranceInvalid));
        assert_eq!(
            hagen_rubens_normal(1e-7, 0.01),
            Err(Error::HagenRubensOutOfRange)
        );
    }
}
