//! proptest strategies and reusable property functions for users' own tests (feature
//! `proptest`, off by default; it needs `std`).
//!
//! Strategies generate valid inputs: bands (rectangular and tabulated), scenes,
//! Sakuma-Hattori curves near a given band, counts frames with bad pixels. Property
//! functions check the library's invariants on them (round trip, monotonicity, refusal of
//! a signal below the background, bad pixels flagged) and return proptest's
//! `Result<(), TestCaseError>`, so a test reads as a few lines:
//!
//! ```
//! use bandtemp::testkit::{self, property};
//! use proptest::prelude::*;
//!
//! proptest! {
//!     #![proptest_config(ProptestConfig::with_cases(32))]
//!     // In a test file this function carries #[test]; here it is called below.
//!     fn my_bands_round_trip(spec in testkit::band(), t_k in 200.0f64..2000.0) {
//!         let band = spec.band()?;
//!         property::round_trip(&band, t_k, 1e-9 * t_k)?;
//!     }
//! }
//! # my_bands_round_trip();
//! ```
//!
//! The strategies allocate (a tabulated response and a frame are `Vec`s): this module is
//! test support behind its feature, not part of the heap-free core, and is never compiled
//! into a `no_std` build.

use crate::band::{Band, SignalCurve, SpectralTable};
use crate::calibration::{fit_band, SakumaHattori};
use crate::frame::{FrameConverter, Rails};
use crate::planck::Detector;
use crate::scene::Scene;
use crate::{Error, Result};
use proptest::prelude::*;
use proptest::test_runner::TestCaseError;
use std::format;
use std::vec::Vec;

/// A band that owns its response table; [`BandSpec::band`] borrows it as a [`Band`].
#[derive(Clone, Debug, PartialEq)]
pub struct BandSpec {
    /// Lower edge, um.
    pub lo_um: f64,
    /// Upper edge, um.
    pub hi_um: f64,
    /// Detector kind.
    pub detector: Detector,
    /// Tabulated relative response (wavelengths in um, values), `None` for rectangular.
    pub response: Option<(Vec<f64>, Vec<f64>)>,
}

impl BandSpec {
    /// The band.
    ///
    /// # Errors
    /// The band's validation errors (none for specs from this module's strategies).
    pub fn band(&self) -> Result<Band<'_>> {
        match &self.response {
            None => Band::rectangular(self.lo_um, self.hi_um, self.detector),
            Some((wavelengths_um, values)) => Band::with_response(
                self.lo_um,
                self.hi_um,
                self.detector,
                SpectralTable::new(wavelengths_um, values)?,
            ),
        }
    }
}

/// Either detector kind.
pub fn detector() -> impl Strategy<Value = Detector> {
    prop_oneof![Just(Detector::Energy), Just(Detector::Photon)]
}

/// Band edges inside [`min_um`, `max_um`] with a width of at least 2 % of the lower edge
/// (narrower bands are valid but ill-conditioned for inversion far from their peak).
fn edges(min_um: f64, max_um: f64) -> impl Strategy<Value = (f64, f64)> {
    (min_um..max_um, 0.0f64..1.0).prop_filter_map("band too narrow", move |(lo, f)| {
        let hi = lo + f * (max_um - lo);
        (hi > lo * 1.02 && hi <= max_um).then_some((lo, hi))
    })
}

/// Rectangular bands with edges in 0.4-20 um (silicon to long-wave imagers), either
/// detector.
pub fn rectangular_band() -> impl Strategy<Value = BandSpec> {
    rectangular_band_in(0.4, 20.0)
}

/// Rectangular bands with edges in [`min_um`, `max_um`], either detector.
pub fn rectangular_band_in(min_um: f64, max_um: f64) -> impl Strategy<Value = BandSpec> {
    (edges(min_um, max_um), detector()).prop_map(|((lo_um, hi_um), detector)| BandSpec {
        lo_um,
        hi_um,
        detector,
        response: None,
    })
}

/// Tabulated responses: 2-12 points at increasing wavelengths spanning the band exactly,
/// values in [0.05, 1] (so the band is never empty), edges in 0.4-20 um.
pub fn tabulated_band() -> impl Strategy<Value = BandSpec> {
    (
        edges(0.4, 20.0),
        detector(),
        prop::collection::vec((0.0f64..1.0, 0.05f64..=1.0), 0..10),
        (0.05f64..=1.0, 0.05f64..=1.0),
    )
        .prop_map(|((lo_um, hi_um), detector, inner, (r_lo, r_hi))| {
            let mut points: Vec<(f64, f64)> = inner
                .into_iter()
                .map(|(f, r)| (lo_um + f * (hi_um - lo_um), r))
                .filter(|&(w, _)| w > lo_um && w < hi_um)
                .collect();
            points.sort_by(|a, b| a.0.total_cmp(&b.0));
            points.dedup_by(|a, b| a.0 <= b.0 * (1.0 + 1e-9));
            let mut wavelengths_um = Vec::with_capacity(points.len() + 2);
            let mut values = Vec::with_capacity(points.len() + 2);
            wavelengths_um.push(lo_um);
            values.push(r_lo);
            for (w, r) in points {
                wavelengths_um.push(w);
                values.push(r);
            }
            wavelengths_um.push(hi_um);
            values.push(r_hi);
            BandSpec {
                lo_um,
                hi_um,
                detector,
                response: Some((wavelengths_um, values)),
            }
        })
}

/// Rectangular or tabulated bands, half each.
pub fn band() -> impl Strategy<Value = BandSpec> {
    prop_oneof![rectangular_band(), tabulated_band()]
}

/// Scenes a survey meets: emissivity 0.1-1, reflected 250-350 K, a path with
/// transmittance 0.6-1 at 250-320 K, and in half the cases a window (transmittance
/// 0.5-0.95, reflectance 0-0.05, 270-330 K).
pub fn scene() -> impl Strategy<Value = Scene> {
    (
        0.1f64..=1.0,
        250.0f64..350.0,
        (0.6f64..=1.0, 250.0f64..320.0),
        prop::option::of((0.5f64..0.95, 0.0f64..0.05, 270.0f64..330.0, 270.0f64..330.0)),
    )
        .prop_filter_map("invalid scene", |(e, reflected_k, (ta, atm_k), window)| {
            let scene = Scene::new(e, reflected_k)
                .and_then(|s| s.with_atmosphere(ta, atm_k))
                .ok()?;
            match window {
                None => Some(scene),
                Some((tw, rw, window_k, window_reflected_k)) => {
                    scene.with_window(tw, rw, window_k, window_reflected_k).ok()
                }
            }
        })
}

/// Sakuma-Hattori curves near the one fitted to `band` over [`t_lo_k`, `t_hi_k`]: A and C
/// moved by up to `spread` (relative), B by up to `spread` A t_lo_k. Such curves are what
/// an instrument with this band could carry after a calibration, and, with a larger
/// spread, what a wrong record looks like.
///
/// # Errors
/// Errors of [`fit_band`] for the band and range.
pub fn sakuma_hattori_near(
    band: &Band<'_>,
    t_lo_k: f64,
    t_hi_k: f64,
    spread: f64,
) -> Result<BoxedStrategy<SakumaHattori>> {
    let fit = fit_band(band, t_lo_k, t_hi_k)?.params;
    let spread = crate::error::finite(spread)?.abs();
    let (a, b, c) = (fit.a_um(), fit.b_umk(), fit.c());
    Ok((-1.0f64..=1.0, -1.0f64..=1.0, -1.0f64..=1.0)
        .prop_filter_map("invalid curve", move |(da, db, dc)| {
            SakumaHattori::new(
                a * (1.0 + spread * da),
                b + spread * a * t_lo_k * db,
                c * (1.0 + spread * dc),
            )
            .ok()
        })
        .boxed())
}

/// A counts frame with bad pixels, and an emissivity map with bad entries, of one length.
#[derive(Clone, Debug, PartialEq)]
pub struct BadPixelFrame {
    /// Counts: valid values mixed with pixels at or beyond the rails.
    pub counts: Vec<u16>,
    /// Emissivities: valid values in [0.1, 1] mixed with NaN, infinities, 0, negatives
    /// and values above 1.
    pub emissivity: Vec<f32>,
}

/// Frames of 0-`max_pixels` pixels for detectors with `rails`: about one pixel in four
/// dead (at or below the dead rail) or saturated (at or above the saturation rail), the
/// rest strictly between; about one emissivity in five invalid. `rails` comes from
/// [`Rails::new`], so its dead rail is below its saturation rail.
pub fn frame_with_bad_pixels(
    rails: Rails,
    max_pixels: usize,
) -> impl Strategy<Value = BadPixelFrame> {
    let (dead, saturated) = (rails.dead_counts(), rails.saturation_counts());
    let pixel = prop_oneof![
        // Strictly between the rails (rails one count apart leave no such value: the
        // saturation rail is drawn instead).
        6 => dead.saturating_add(1)..=saturated.saturating_sub(1).max(dead.saturating_add(1)),
        1 => 0..=dead,
        1 => saturated..=u16::MAX,
    ];
    let emissivity = prop_oneof![
        8 => 0.1f32..=1.0,
        2 => prop::sample::select(std::vec![
            f32::NAN,
            f32::INFINITY,
            f32::NEG_INFINITY,
            0.0,
            -0.5,
            1.000_001,
            2.0,
        ]),
    ];
    prop::collection::vec((pixel, emissivity), 0..=max_pixels).prop_map(|pixels| {
        let (counts, emissivity) = pixels.into_iter().unzip();
        BadPixelFrame { counts, emissivity }
    })
}

/// Property functions: each checks one invariant and fails the proptest case with a
/// message naming the values.
pub mod property {
    use super::{format, BadPixelFrame, Error, FrameConverter, Scene, SignalCurve, TestCaseError};

    fn fail(message: std::string::String) -> TestCaseError {
        TestCaseError::fail(message)
    }

    /// |T(S(T)) - T| <= `tolerance_k` for `curve` at `temperature_k`.
    ///
    /// # Errors
    /// A failed case when the round trip misses, or when the curve errs.
    pub fn round_trip<C: SignalCurve + ?Sized>(
        curve: &C,
        temperature_k: f64,
        tolerance_k: f64,
    ) -> Result<(), TestCaseError> {
        let signal = curve.signal(temperature_k)?;
        let back_k = curve.temperature(signal)?;
        if (back_k - temperature_k).abs() <= tolerance_k {
            Ok(())
        } else {
            Err(fail(format!(
                "round trip at {temperature_k} K gave {back_k} K (tolerance {tolerance_k} K)"
            )))
        }
    }

    /// For t1 < t2 (in either order; equal passes): S(t1) < S(t2), dS/dT > 0 at both, and
    /// T(S(t1)) < T(S(t2)).
    ///
    /// # Errors
    /// A failed case naming the temperatures, or the curve's error.
    pub fn monotonic<C: SignalCurve + ?Sized>(
        curve: &C,
        t1_k: f64,
        t2_k: f64,
    ) -> Result<(), TestCaseError> {
        let (lo, hi) = if t1_k <= t2_k {
            (t1_k, t2_k)
        } else {
            (t2_k, t1_k)
        };
        let (s_lo, d_lo) = curve.signal_and_derivative(lo)?;
        let (s_hi, d_hi) = curve.signal_and_derivative(hi)?;
        if !(d_lo > 0.0 && d_hi > 0.0) {
            return Err(fail(format!(
                "dS/dT not positive: {d_lo} at {lo} K, {d_hi} at {hi} K"
            )));
        }
        if lo < hi {
            let (t_lo, t_hi) = (curve.temperature(s_lo)?, curve.temperature(s_hi)?);
            if !(s_lo < s_hi && t_lo < t_hi) {
                return Err(fail(format!(
                    "not rising from {lo} K to {hi} K: S {s_lo} -> {s_hi}, T(S) {t_lo} -> {t_hi}"
                )));
            }
        }
        Ok(())
    }

    /// The measurement equation inverts itself: the object temperature of the sensor
    /// signal of an object at `object_k` in `scene` is `object_k` within `tolerance_k`.
    ///
    /// # Errors
    /// A failed case, or the scene's or curve's error.
    pub fn scene_round_trip<C: SignalCurve + ?Sized>(
        curve: &C,
        scene: &Scene,
        object_k: f64,
        tolerance_k: f64,
    ) -> Result<(), TestCaseError> {
        let signal = scene.sensor_signal(curve, object_k)?;
        let back_k = scene.object_temperature(curve, signal)?;
        if (back_k - object_k).abs() <= tolerance_k {
            Ok(())
        } else {
            Err(fail(format!(
                "scene round trip at {object_k} K gave {back_k} K (tolerance {tolerance_k} K)"
            )))
        }
    }

    /// A sensor signal of `fraction` (in [0, 1]) times what the background alone gives is
    /// refused with [`Error::SignalBelowBackground`], never turned into a temperature.
    ///
    /// # Errors
    /// A failed case when a temperature (or another error) comes back.
    pub fn below_background_refused<C: SignalCurve + ?Sized>(
        curve: &C,
        scene: &Scene,
        fraction: f64,
    ) -> Result<(), TestCaseError> {
        let background = scene.grey_terms(curve)?.background;
        let signal = fraction.clamp(0.0, 1.0) * background;
        match scene.object_temperature(curve, signal) {
            Err(Error::SignalBelowBackground) => Ok(()),
            other => Err(fail(format!(
                "signal {signal} at or below background {background} gave {other:?}"
            ))),
        }
    }

    /// Converting `frame` with its emissivity map flags every bad pixel: counts at or below
    /// the dead rail come out NaN and counted dead; then at or above the saturation rail,
    /// saturated; then an invalid emissivity, emissivity-invalid; every pixel is counted
    /// once, and exactly the converted ones are finite.
    ///
    /// # Errors
    /// A failed case naming the first pixel or count that is wrong, or the converter's
    /// error.
    pub fn bad_pixels_flagged(
        converter: &FrameConverter<'_>,
        frame: &BadPixelFrame,
    ) -> Result<(), TestCaseError> {
        let rails = converter.state().rails;
        let (dead, saturated) = (rails.dead_counts(), rails.saturation_counts());
        let mut kelvin = std::vec![0.0f32; frame.counts.len()];
        let summary =
            converter.convert_counts(&frame.counts, Some(&frame.emissivity), &mut kelvin)?;
        let (mut want_dead, mut want_saturated, mut want_e) = (0u64, 0u64, 0u64);
        for (i, ((&n, &e), &k)) in frame
            .counts
            .iter()
            .zip(&frame.emissivity)
            .zip(&kelvin)
            .enumerate()
        {
            let bad = if n <= dead {
                want_dead += 1;
                true
            } else if n >= saturated {
                want_saturated += 1;
                true
            } else if !(e > 0.0 && e <= 1.0) {
                want_e += 1;
                true
            } else {
                false
            };
            if bad && !k.is_nan() {
                return Err(fail(format!(
                    "pixel {i} (counts {n}, emissivity {e}) gave {k} K"
                )));
            }
        }
        let finite = kelvin.iter().filter(|k| k.is_finite()).count() as u64;
        let counted = (
            summary.pixels,
            summary.dead,
            summary.saturated,
            summary.emissivity_invalid,
        );
        let wanted = (frame.counts.len() as u64, want_dead, want_saturated, want_e);
        if counted != wanted || summary.converted != finite {
            return Err(fail(format!(
                "summary {summary:?}: want (pixels, dead, saturated, emissivity_invalid) {wanted:?} and {finite} converted"
            )));
        }
        Ok(())
    }
}
