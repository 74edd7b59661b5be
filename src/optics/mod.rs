//! Spot size, minimum target and size-of-source effect: the geometric and optical limits
//! of a reading.
//!
//! - Geometry ([`spot_diameter_m`], [`ifov_mrad`], [`footprint_m`], [`check_target`]):
//!   how large the measured spot is at a distance, and whether a target fills it, under a
//!   named rule ([`TargetRule`]).
//! - Diffraction and detector sampling ([`diffraction`]): the Airy encircled energy, the
//!   system MTF, and how much a small round target reads low on an imager.
//! - Size-of-source effect ([`sse`]): the correction of a radiation thermometer's reading
//!   for a source of another size than the calibration source, from a measured SSE curve.
//!
//! Distances and target sizes are in metres (`_m`), pixel pitches in micrometres (`_um`),
//! focal lengths in millimetres (`_mm`), angles in milliradians (`_mrad`).
//!
//! Caution: a target too small for the spot reads low (cooler for a hot target); on
//! electrical panels, furnaces and molten metal that error is on the unsafe side. A
//! temperature from this library is not a safety clearance: follow local codes and
//! licensed practice.

pub mod diffraction;
pub mod sse;

use crate::error::{finite, Error, Result};

/// The rule a target is checked against. Each names where it comes from.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum TargetRule {
    /// ISO 10878:2013 (non-contact thermometers, vocabulary): the target size of a
    /// radiation thermometer is the diameter of the circle from which 99 % of the received
    /// power comes. The target must be at least that spot: target >= distance / DSR, with
    /// the distance-to-spot ratio (DSR) specified at 99 %. A DSR stated at 90 % or 95 %
    /// (common in data sheets) gives a smaller spot than the ISO one: convert it first.
    /// (The definition as commonly quoted; the standard's text was not consulted here.)
    Iso10878,
    /// The often-quoted "at least 3 x 3 pixels" for an imager: common practice with no
    /// standard behind it. Target >= 3 pixel footprints across.
    ThreeByThree,
    /// Pusnik and Gersak 2021 (Sensors 21, 607): at least 10 x 10 exposed pixels, with the
    /// reading averaged over the central 3 x 3 (their recommendation as quoted, from
    /// memory). Target >= 10 pixel footprints across.
    PusnikGersak,
}

impl TargetRule {
    /// The rule for an integer (the C ABI's encoding): 0 ISO 10878, 1 three-by-three,
    /// 2 Pusnik-Gersak.
    ///
    /// # Errors
    /// [`Error::TargetRuleInvalid`] for any other value.
    pub const fn from_raw(raw: u32) -> Result<TargetRule> {
        match raw {
            0 => Ok(TargetRule::Iso10878),
            1 => Ok(TargetRule::ThreeByThree),
            2 => Ok(TargetRule::PusnikGersak),
            _ => Err(Error::TargetRuleInvalid),
        }
    }

    /// Pixel footprints the target must span for an imager rule; `None` for ISO 10878.
    #[must_use]
    pub const fn pixels_required(self) -> Option<f64> {
        match self {
            TargetRule::Iso10878 => None,
            TargetRule::ThreeByThree => Some(3.0),
            TargetRule::PusnikGersak => Some(10.0),
        }
    }
}

/// The outcome of [`check_target`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TargetCheck {
    /// The rule applied.
    pub rule: TargetRule,
    /// The smallest target the rule accepts at this distance, m.
    pub minimum_m: f64,
    /// Target size over `minimum_m` (>= 1 when valid).
    pub ratio: f64,
    /// For the imager rules, pixel footprints across the target; for ISO 10878, target
    /// diameter over spot diameter.
    pub across: f64,
    /// Whether the target satisfies the rule (`ratio >= 1`).
    pub valid: bool,
}

fn positive(value: f64) -> Result<f64> {
    if finite(value)? > 0.0 {
        Ok(value)
    } else {
        Err(Error::OpticsGeometryInvalid)
    }
}

/// Spot diameter at `distance_m` of an instrument with distance-to-spot ratio
/// `distance_to_spot` (D:S, dimensionless): d = D / (D:S), m. Assumes a far-field spot
/// that grows linearly with distance (focused optics have a minimum at the focus: use the
/// data sheet's D:S at that distance).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::OpticsGeometryInvalid`] for a value that is not positive.
pub fn spot_diameter_m(distance_m: f64, distance_to_spot: f64) -> Result<f64> {
    finite(positive(distance_m)? / positive(distance_to_spot)?)
}

/// Instantaneous field of view of one pixel, mrad: IFOV = 2 atan(p / (2 f)) with pitch p
/// (um) and focal length f (mm); p/f to better than 1e-7 relative for any real lens.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::OpticsGeometryInvalid`].
pub fn ifov_mrad(pitch_um: f64, focal_length_mm: f64) -> Result<f64> {
    let half = positive(pitch_um)? * 1e-3 / (2.0 * positive(focal_length_mm)?);
    finite(2.0e3 * libm::atan(half))
}

/// Footprint of one pixel at `distance_m`: 2 D tan(IFOV/2), m (equal to D p / f).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::OpticsGeometryInvalid`] for a distance that is not
/// positive or an IFOV outside (0, pi) rad (tan(IFOV/2) would be negative or undefined;
/// [`ifov_mrad`] always gives less).
pub fn footprint_m(distance_m: f64, ifov_mrad: f64) -> Result<f64> {
    let half = positive(ifov_mrad)? * 0.5e-3;
    if half >= core::f64::consts::FRAC_PI_2 {
        return Err(Error::OpticsGeometryInvalid);
    }
    finite(2.0 * positive(distance_m)? * libm::tan(half))
}

/// Checks a target of diameter (or smallest width) `target_m` at `distance_m` against
/// `rule`. `resolution` is the instrument's distance-to-spot ratio (99 % spot) for
/// [`TargetRule::Iso10878`], and its IFOV in mrad for the imager rules.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TargetSizeNotPositive`],
/// [`Error::OpticsGeometryInvalid`].
pub fn check_target(
    rule: TargetRule,
    target_m: f64,
    distance_m: f64,
    resolution: f64,
) -> Result<TargetCheck> {
    if !(finite(target_m)? > 0.0) {
        return Err(Error::TargetSizeNotPositive);
    }
    let (minimum_m, unit_m) = match rule.pixels_required() {
        None => {
            let spot = spot_diameter_m(distance_m, resolution)?;
            (spot, spot)
        }
        Some(pixels) => {
            let footprint = footprint_m(distance_m, resolution)?;
            (pixels * footprint, footprint)
        }
    };
    let ratio = finite(target_m / minimum_m)?;
    Ok(TargetCheck {
        rule,
        minimum_m,
        ratio,
        across: finite(target_m / unit_m)?,
        valid: ratio >= 1.0,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn geometry_by_hand() {
        // D:S 50:1 at 2 m: a 40 mm spot.
        assert!((spot_diameter_m(2.0, 50.0).unwrap() - 0.04).abs() < 1e-15);
        // 17 um pitch, 25 mm lens: 0.68 mrad; at 10 m a 6.8 mm footprint.
        let ifov = ifov_mrad(17.0, 25.0).unwrap();
        assert!((ifov - 0.68).abs() < 1e-7);
        assert!((footprint_m(10.0, ifov).unwrap() - 0.0068).abs() < 1e-15);
        let check = check_target(TargetRule::PusnikGersak, 0.05, 10.0, ifov).unwrap();
        assert!(!check.valid);
        assert!((check.across - 0.05 / 0.0068).abs() < 1e-9);
        let check = check_target(TargetRule::ThreeByThree, 0.05, 10.0, ifov).unwrap();
        assert!(check.valid);
    }

    #[test]
    fn bad_inputs() {
        assert_eq!(
            check_target(TargetRule::Iso10878, 0.0, 1.0, 10.0),
            Err(Error::TargetSizeNotPositive)
        );
        assert_eq!(spot_diameter_m(1.0, 0.0), Err(Error::OpticsGeometryInvalid));
        assert_eq!(TargetRule::from_raw(3), Err(Error::TargetRuleInvalid));
    }
}
