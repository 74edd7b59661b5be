//! The one error type of the crate.
//!
//! Every failure is a named, fieldless variant, so the C ABI can map each one to a stable
//! status code and a static message. Sections group the variants by the module that
//! raises them first; a variant may be raised by later modules too.

use core::fmt;

/// Everything that can go wrong in `bandtemp`.
///
/// Fieldless and `Copy`, so it costs nothing to return from firmware code paths.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub enum Error {
    // ---- general inputs -------------------------------------------------------------------
    /// An input was NaN or infinite.
    NonFinite,
    /// A required pointer was null (C ABI only).
    NullPointer,

    // ---- planck: spectral laws ------------------------------------------------------------
    /// A temperature was zero or negative (kelvin are absolute).
    TemperatureNotPositive,
    /// A wavelength was zero or negative.
    WavelengthNotPositive,
    /// A product lambda*T was zero or negative.
    LambdaTNotPositive,
    /// A computed radiance is too small to be a normal double (it underflows).
    RadianceUnderflow,
    /// A computed radiance is too large to be represented (it overflows).
    RadianceOverflow,
    /// A detector kind outside its declared values (C ABI only).
    InvalidDetector,

    // ---- band: band integrals and inversion -------------------------------------------------
    /// A band with `lo_um >= hi_um`, or a non-positive edge.
    InvalidBand,
    /// A spectral table with fewer than two points.
    TableTooShort,
    /// A spectral table whose two arrays differ in length.
    TableLengthMismatch,
    /// A spectral table whose wavelengths are not strictly increasing and positive.
    TableNotIncreasing,
    /// A spectral table with a negative value.
    TableValueNegative,
    /// The response table does not overlap the band, or is zero over the overlap.
    BandEmpty,
    /// A radiance that is zero or negative where a positive one is required.
    RadianceNotPositive,
    /// A positive radiance below the normal double range (subnormal): too imprecise to invert.
    RadianceSubnormal,
    /// A radiance that no temperature in the solver's range produces.
    RadianceOutOfRange,
    /// An iterative solver did not converge.
    NotConverged,
    // ---- scene ---------------------------------------------------------------------------------
    /// Emissivity outside (0, 1].
    EmissivityOutOfRange,
    /// Atmosphere transmittance outside (0, 1].
    AtmosphereTransmittanceOutOfRange,
    /// Window transmittance outside (0, 1].
    WindowTransmittanceOutOfRange,
    /// Window reflectance outside [0, 1).
    WindowReflectanceOutOfRange,
    /// Window transmittance + reflectance above 1.
    WindowSumExceedsOne,
    /// The signal is at or below what reflections, air and window alone give: the object
    /// cannot be resolved against its background.
    SignalBelowBackground,

    // ---- calibration ---------------------------------------------------------------------------
    /// Calibration parameters out of their domain (A <= 0 or C <= 0 for Sakuma-Hattori).
    CalibrationParameterInvalid,
    /// A temperature or signal outside where the calibration curve is defined
    /// (A T + B <= 0 for Sakuma-Hattori, or an inverse that is not a positive temperature).
    CalibrationOutOfDomain,
    // ---- uncertainty and ratio -------------------------------------------------------------------

    // ---- atmosphere ---------------------------------------------------------------------------

    // ---- frame --------------------------------------------------------------------------------
    /// A frame temperature range with `lo_k >= hi_k` (or a non-positive end).
    FrameRangeInvalid,
    /// A table tolerance that is not a finite positive number of kelvin.
    FrameToleranceInvalid,
    /// No table up to the finest segment level meets the requested tolerance (f32 output
    /// cannot resolve it, or the curve is too curved at the range's ends).
    FrameToleranceUnreachable,
    /// The caller's table storage has fewer rows than the table needs.
    FrameStorageTooSmall,
    /// The curve's signal over the range is not inside the normal f32 range.
    FrameSignalUnrepresentable,
    /// Frame buffers (input, emissivity map, output) differ in length.
    FrameLengthMismatch,
    /// Rails with `dead_counts >= saturation_counts`.
    FrameRailsInvalid,
    /// A counts-to-signal map with a gain that is not finite and positive, or a non-finite
    /// offset.
    FrameCountsMapInvalid,
    /// Table geometry that does not describe the given rows (C ABI re-wrapping).
    FrameTableInvalid,
    /// Scene coefficients that do not fit an f32 (an extreme gain or background).
    FrameCoefficientOverflow,
    /// An emissivity map was given but the curve has no signal at the reflected
    /// temperature, so the per-pixel correction cannot be formed.
    FrameEmissivityMapUnavailable,
    /// The curve given to update a converter is not the one its table was built from.
    FrameCurveMismatch,
}

impl Error {
    /// A short, static, human-readable message for this error.
    #[must_use]
    pub const fn message(self) -> &'static str {
        match self {
            // general
            Error::NonFinite => "an input is NaN or infinite",
            Error::NullPointer => "a required pointer is null",
            // planck
            Error::TemperatureNotPositive => "temperature must be positive (kelvin)",
            Error::WavelengthNotPositive => "wavelength must be positive (micrometres)",
            Error::LambdaTNotPositive => "lambda*T must be positive (um*K)",
            Error::RadianceUnderflow => "the radiance underflows the normal double range",
            Error::RadianceOverflow => "the radiance overflows the double range",
            Error::InvalidDetector => "detector kind is not energy (0) or photon (1)",
            // band
            Error::InvalidBand => "band edges must satisfy 0 < lo_um < hi_um",
            Error::TableTooShort => "a spectral table needs at least two points",
            Error::TableLengthMismatch => "spectral table arrays differ in length",
            Error::TableNotIncreasing => {
                "spectral table wavelengths must be positive and strictly increasing"
            }
            Error::TableValueNegative => "spectral table values must not be negative",
            Error::BandEmpty => "the response is zero over the band (no overlap or all zero)",
            Error::RadianceNotPositive => "radiance must be positive",
            Error::RadianceSubnormal => "radiance is subnormal: too small to invert precisely",
            Error::RadianceOutOfRange => "no temperature in the solver range gives this radiance",
            Error::NotConverged => "the iterative solver did not converge",
            // scene
            Error::EmissivityOutOfRange => "emissivity must be in (0, 1]",
            Error::AtmosphereTransmittanceOutOfRange => {
                "atmosphere transmittance must be in (0, 1]"
            }
            Error::WindowTransmittanceOutOfRange => "window transmittance must be in (0, 1]",
            Error::WindowReflectanceOutOfRange => "window reflectance must be in [0, 1)",
            Error::WindowSumExceedsOne => "window transmittance + reflectance must not exceed 1",
            Error::SignalBelowBackground => {
                "signal at or below the background: the object cannot be resolved"
            }

            // calibration
            Error::CalibrationParameterInvalid => "calibration parameters out of their domain",
            Error::CalibrationOutOfDomain => "outside the domain of the calibration curve",
            // uncertainty and ratio

            // atmosphere

            // frame
            Error::FrameRangeInvalid => "frame temperature range must satisfy 0 < lo_k < hi_k",
            Error::FrameToleranceInvalid => {
                "table tolerance must be a finite positive kelvin value"
            }
            Error::FrameToleranceUnreachable => {
                "no table up to the finest level meets the requested tolerance"
            }
            Error::FrameStorageTooSmall => "table storage has fewer rows than the table needs",
            Error::FrameSignalUnrepresentable => {
                "the signal over the temperature range is outside the normal f32 range"
            }
            Error::FrameLengthMismatch => "frame buffers differ in length",
            Error::FrameRailsInvalid => "rails must satisfy dead_counts < saturation_counts",
            Error::FrameCountsMapInvalid => {
                "counts map gain must be finite and positive, offset finite"
            }
            Error::FrameTableInvalid => "table geometry does not describe the given rows",
            Error::FrameCoefficientOverflow => "scene coefficients do not fit an f32",
            Error::FrameEmissivityMapUnavailable => {
                "no signal at the reflected temperature: emissivity maps unavailable"
            }
            Error::FrameCurveMismatch => "the curve is not the one the table was built from",
        }
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.message())
    }
}

#[cfg(feature = "std")]
impl std::error::Error for Error {}

/// The crate's result type.
pub type Result<T> = core::result::Result<T, Error>;

/// Checks that `value` is finite.
pub(crate) fn finite(value: f64) -> Result<f64> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(Error::NonFinite)
    }
}

/// Checks that a temperature is finite and positive.
pub(crate) fn check_temperature_k(temperature_k: f64) -> Result<f64> {
    if finite(temperature_k)? > 0.0 {
        Ok(temperature_k)
    } else {
        Err(Error::TemperatureNotPositive)
    }
}
