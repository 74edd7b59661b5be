//! Per-pixel outcomes and their tally for one frame.

/// What became of one pixel. Every pixel gets exactly one status; the first that applies
/// in this order (the order of the variants) wins: dead, saturated, invalid emissivity,
/// non-finite signal, below background, below range, above range. So a NaN signal with
/// emissivity 0 is [`PixelStatus::EmissivityInvalid`]; from counts, the rails come first.
#[repr(u32)]
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum PixelStatus {
    /// Converted; the output is the object temperature in K.
    Converted = 0,
    /// Counts at or below the dead rail.
    Dead = 1,
    /// Counts at or above the saturation rail.
    Saturated = 2,
    /// The pixel's emissivity is outside (0, 1] or NaN.
    EmissivityInvalid = 3,
    /// A signal input was NaN or infinite.
    NonFinite = 4,
    /// The object's own signal L is at or below zero: the sensor sees no more than the
    /// background (reflections, air, window).
    BelowBackground = 5,
    /// 0 < L < L(lo_k): colder than the table's range.
    BelowRange = 6,
    /// L > L(hi_k): hotter than the table's range.
    AboveRange = 7,
}

/// Counts of pixel outcomes for one frame. Every non-converted pixel's output is NaN.
/// `pixels` = `converted` + the sum of the other fields.
#[repr(C)]
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct FrameSummary {
    /// Pixels in the frame.
    pub pixels: u64,
    /// Pixels converted to a temperature.
    pub converted: u64,
    /// [`PixelStatus::Dead`] pixels.
    pub dead: u64,
    /// [`PixelStatus::Saturated`] pixels.
    pub saturated: u64,
    /// [`PixelStatus::EmissivityInvalid`] pixels.
    pub emissivity_invalid: u64,
    /// [`PixelStatus::NonFinite`] pixels.
    pub non_finite: u64,
    /// [`PixelStatus::BelowBackground`] pixels.
    pub below_background: u64,
    /// [`PixelStatus::BelowRange`] pixels.
    pub below_range: u64,
    /// [`PixelStatus::AboveRange`] pixels.
    pub above_range: u64,
}

impl FrameSummary {
    pub(super) fn record(&mut self, status: PixelStatus) {
        let field = match status {
            PixelStatus::Converted => return,
            PixelStatus::Dead => &mut self.dead,
            PixelStatus::Saturated => &mut self.saturated,
            PixelStatus::EmissivityInvalid => &mut self.emissivity_invalid,
            PixelStatus::NonFinite => &mut self.non_finite,
            PixelStatus::BelowBackground => &mut self.below_background,
            PixelStatus::BelowRange => &mut self.below_range,
            PixelStatus::AboveRange => &mut self.above_range,
        };
        *field += 1;
    }

    /// Adds another part's counts (a frame converted in parts).
    #[cfg(feature = "std")]
    pub(super) fn add(&mut self, other: &FrameSummary) {
        self.pixels += other.pixels;
        self.converted += other.converted;
        self.dead += other.dead;
        self.saturated += other.saturated;
        self.emissivity_invalid += other.emissivity_invalid;
        self.non_finite += other.non_finite;
        self.below_background += other.below_background;
        self.below_range += other.below_range;
        self.above_range += other.above_range;
    }

    pub(super) fn failed(&self) -> u64 {
        self.dead
            + self.saturated
            + self.emissivity_invalid
            + self.non_finite
            + self.below_background
            + self.below_range
            + self.above_range
    }
}
