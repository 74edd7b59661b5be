//! What the caller declares about the instrument: the object-temperature range, the
//! counts-to-signal map and the detector's rails.

use crate::error::{check_temperature_k, Error, Result};

/// A declared object-temperature range [lo_k, hi_k], K.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct TemperatureRange {
    /// Lower end, K.
    pub lo_k: f64,
    /// Upper end, K.
    pub hi_k: f64,
}

impl TemperatureRange {
    /// A range 0 < `lo_k` < `hi_k`, K.
    ///
    /// # Errors
    /// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
    /// [`Error::FrameRangeInvalid`] unless `lo_k < hi_k`.
    pub fn new(lo_k: f64, hi_k: f64) -> Result<Self> {
        check_temperature_k(lo_k)?;
        check_temperature_k(hi_k)?;
        if lo_k < hi_k {
            Ok(TemperatureRange { lo_k, hi_k })
        } else {
            Err(Error::FrameRangeInvalid)
        }
    }
}

/// Affine map from detector counts n to the sensor signal S in the curve's units:
/// S = gain * n + offset.
///
/// For a Sakuma-Hattori calibration in counts, gain = 1 and offset = -dark counts
/// ([`CountsMap::dark_offset`]); for a radiometric calibration over the band radiance,
/// gain in (W m^-2 sr^-1) per count and offset in W m^-2 sr^-1 ([`CountsMap::linear`]).
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CountsMap {
    pub(super) gain: f64,
    pub(super) offset: f64,
}

impl CountsMap {
    /// S = `gain` n + `offset`; `gain` > 0 in signal units per count, `offset` in signal
    /// units.
    ///
    /// # Errors
    /// [`Error::FrameCountsMapInvalid`] unless `gain` is finite and positive and `offset`
    /// finite.
    pub fn linear(gain: f64, offset: f64) -> Result<Self> {
        if gain.is_finite() && gain > 0.0 && offset.is_finite() {
            Ok(CountsMap { gain, offset })
        } else {
            Err(Error::FrameCountsMapInvalid)
        }
    }

    /// S = n - `dark_counts`: a calibration curve in counts above the dark level.
    ///
    /// # Errors
    /// [`Error::FrameCountsMapInvalid`] for a non-finite `dark_counts`.
    pub fn dark_offset(dark_counts: f64) -> Result<Self> {
        CountsMap::linear(1.0, -dark_counts)
    }

    /// Gain, signal units per count.
    #[must_use]
    pub fn gain(&self) -> f64 {
        self.gain
    }

    /// Offset, signal units.
    #[must_use]
    pub fn offset(&self) -> f64 {
        self.offset
    }
}

/// The detector's rails: counts at or below `dead_counts` are dead pixels, counts at or
/// above `saturation_counts` are saturated. A pixel stuck at the top rail reads as
/// saturated: one frame cannot tell the two apart.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Rails {
    pub(super) dead_counts: u16,
    pub(super) saturation_counts: u16,
}

impl Default for Rails {
    /// The rails of a full 16-bit converter: dead at 0, saturated at 65535.
    fn default() -> Self {
        Rails {
            dead_counts: 0,
            saturation_counts: u16::MAX,
        }
    }
}

impl Rails {
    /// Rails with `dead_counts` < `saturation_counts` (a 14-bit converter: 0 and 16383).
    ///
    /// # Errors
    /// [`Error::FrameRailsInvalid`] unless `dead_counts < saturation_counts`.
    pub fn new(dead_counts: u16, saturation_counts: u16) -> Result<Self> {
        if dead_counts < saturation_counts {
            Ok(Rails {
                dead_counts,
                saturation_counts,
            })
        } else {
            Err(Error::FrameRailsInvalid)
        }
    }

    /// Counts at or below which a pixel is dead.
    #[must_use]
    pub fn dead_counts(&self) -> u16 {
        self.dead_counts
    }

    /// Counts at or above which a pixel is saturated.
    #[must_use]
    pub fn saturation_counts(&self) -> u16 {
        self.saturation_counts
    }
}
