//! The scene stage: per-pixel f32 coefficients that turn counts or sensor signal into the
//! object's own signal L (see the module formulas).

use super::params::CountsMap;
use super::to_f32_checked;
use crate::band::SignalCurve;
use crate::error::Result;
use crate::scene::Scene;

/// Per-pixel scene coefficients in f32 (see the module formulas). Plain data.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PixelMap {
    /// Uniform scene from counts: L = ((n - zero_int) - zero_rem) * scale.
    counts_zero_int: f32,
    counts_zero_rem: f32,
    counts_scale: f32,
    /// Emissivity map from counts: L = ((n - k_int) - k_rem) * k_scale / e + reflected.
    counts_k_int: f32,
    counts_k_rem: f32,
    counts_k_scale: f32,
    /// Uniform scene from signal: L = (S - background) * scale.
    signal_background: f32,
    signal_scale: f32,
    /// Emissivity map from signal: L = (S - k) * k_scale / e + reflected.
    signal_k: f32,
    signal_k_scale: f32,
    /// Lr, curve units.
    reflected_signal: f32,
    /// 1 when the emissivity-map coefficients exist.
    pub(super) map_ready: u32,
}

/// An offset split into an f32 integer part (exact below 2^24) and an f32 remainder.
pub(super) fn split_offset(value: f64) -> Result<(f32, f32)> {
    let whole = if libm::fabs(value) < 16_777_216.0 {
        libm::round(value)
    } else {
        value
    };
    let whole = to_f32_checked(whole)?;
    Ok((whole, to_f32_checked(value - f64::from(whole))?))
}

impl PixelMap {
    /// Coefficients for `scene` over `curve` with counts map `counts`: G and B from
    /// [`Scene::grey_terms`], K = B at e = 1 plus tw ta Lr, Lr = curve signal at the
    /// scene's reflected temperature.
    ///
    /// # Errors
    /// Errors of [`Scene::grey_terms`] and [`Error::FrameCoefficientOverflow`](crate::Error::FrameCoefficientOverflow). A curve
    /// without a signal at the reflected temperature only disables emissivity maps.
    pub fn new<C: SignalCurve + ?Sized>(
        curve: &C,
        scene: &Scene,
        counts: CountsMap,
    ) -> Result<Self> {
        let terms = scene.grey_terms(curve)?;
        let (zero_int, zero_rem) = split_offset((terms.background - counts.offset) / counts.gain)?;
        let mut map = PixelMap {
            counts_zero_int: zero_int,
            counts_zero_rem: zero_rem,
            counts_scale: to_f32_checked(counts.gain / terms.gain)?,
            counts_k_int: f32::NAN,
            counts_k_rem: f32::NAN,
            counts_k_scale: f32::NAN,
            signal_background: to_f32_checked(terms.background)?,
            signal_scale: to_f32_checked(1.0 / terms.gain)?,
            signal_k: f32::NAN,
            signal_k_scale: f32::NAN,
            reflected_signal: f32::NAN,
            map_ready: 0,
        };
        let transmittance = scene.window_transmittance() * scene.atm_transmittance();
        let others = scene.with_emissivity(1.0)?.grey_terms(curve)?.background;
        if let Ok(reflected) = curve.signal(scene.reflected_k()) {
            let k = others + transmittance * reflected;
            let (k_int, k_rem) = split_offset((k - counts.offset) / counts.gain)?;
            map.counts_k_int = k_int;
            map.counts_k_rem = k_rem;
            map.counts_k_scale = to_f32_checked(counts.gain / transmittance)?;
            map.signal_k = to_f32_checked(k)?;
            map.signal_k_scale = to_f32_checked(1.0 / transmittance)?;
            map.reflected_signal = to_f32_checked(reflected)?;
            map.map_ready = 1;
        }
        Ok(map)
    }

    /// Object signal L of a uniform-scene pixel with `counts`, curve units.
    #[inline(always)]
    pub(super) fn object_counts(&self, counts: f32) -> f32 {
        ((counts - self.counts_zero_int) - self.counts_zero_rem) * self.counts_scale
    }

    /// The uniform-scene counts coefficients (zero_int, zero_rem, scale), for a stage that
    /// folds a per-frame affine step on the counts into them (`nonuniformity.rs`).
    pub(super) fn counts_coefficients(&self) -> (f32, f32, f32) {
        (
            self.counts_zero_int,
            self.counts_zero_rem,
            self.counts_scale,
        )
    }

    /// The emissivity-map counts coefficients (k_int, k_rem, k_scale), for the fused
    /// corrected conversion (`nonuniformity.rs`); NaN unless `map_ready`.
    pub(super) fn counts_k_coefficients(&self) -> (f32, f32, f32) {
        (self.counts_k_int, self.counts_k_rem, self.counts_k_scale)
    }

    /// Lr, curve units; NaN unless `map_ready`.
    pub(super) fn reflected(&self) -> f32 {
        self.reflected_signal
    }

    /// Object signal L of a pixel with `counts` and emissivity `e`, curve units.
    #[inline(always)]
    pub(super) fn object_counts_e(&self, counts: f32, e: f32) -> f32 {
        ((counts - self.counts_k_int) - self.counts_k_rem) * self.counts_k_scale / e
            + self.reflected_signal
    }

    #[inline(always)]
    pub(super) fn object_signal(&self, signal: f32) -> f32 {
        (signal - self.signal_background) * self.signal_scale
    }

    #[inline(always)]
    pub(super) fn object_signal_e(&self, signal: f32, e: f32) -> f32 {
        (signal - self.signal_k) * self.signal_k_scale / e + self.reflected_signal
    }
}
