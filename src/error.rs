//! The one error type of the crate.
//!
//! Every failure is a named, fieldless variant, so the C ABI can map each one to a stable
//! status code and a static message. Sections group the variants by the module that
//! raises them first; a variant may be raised by later modules too.

use core::fmt;

/// Everything that can go wrong in `bandtemp`.
///
/// Fieldless and `Copy`, so it costs nothing to return from firmware code paths.
///
/// Deliberately not `#[non_exhaustive]`: the C library (`bandtemp-capi`) maps every
/// variant to a `bt_status` with an exhaustive `match`, so a new variant does not compile
/// until it has its status code. A new variant is therefore a breaking change of the Rust
/// API (a minor version bump while the crate is 0.x).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Error {
    // ---- general inputs -------------------------------------------------------------------
    /// An input was NaN or infinite.
    NonFinite,
    /// A required pointer was null (C ABI only).
    NullPointer,
    /// A pointer misaligned for its type, or a buffer length no buffer in memory can have
    /// (C ABI only).
    InvalidBuffer,

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
    /// The reflected apparent temperature of a scene is zero or negative.
    ReflectedTemperatureNotPositive,
    /// The atmosphere temperature of a scene is zero or negative.
    AtmosphereTemperatureNotPositive,
    /// The window temperature of a scene is zero or negative.
    WindowTemperatureNotPositive,
    /// The temperature a window reflects (sensor side) is zero or negative.
    WindowReflectedTemperatureNotPositive,
    /// A spectral emissivity or transmittance table does not cover the whole band.
    SpectralTableDoesNotCoverBand,
    /// A spectral emissivity table has a value above 1.
    SpectralEmissivityOutOfRange,
    /// A spectral transmittance table has a value above 1.
    SpectralTransmittanceOutOfRange,
    /// Response x transmittance x emissivity is zero over the whole band: the object
    /// contributes nothing to the signal.
    ObjectNotVisible,
    /// Emissivity cannot be determined: the reference temperature gives the same signal as
    /// the reflected apparent temperature (object at the reflected temperature).
    EmissivityNotDetermined,
    /// The readings imply an emissivity outside (0, 1]: reading, reference temperature and
    /// scene are inconsistent.
    EmissivityReadingInconsistent,
    /// The emissivity of a reflector is outside [0, 1) (a reflector must reflect).
    ReflectorEmissivityOutOfRange,
    /// The reflector reading is at or below what the reflector's own emission, the air and
    /// the window give: no reflected apparent temperature fits it.
    ReflectedNotDetermined,

    // ---- calibration ---------------------------------------------------------------------------
    /// Calibration parameters out of their domain (A <= 0 or C <= 0 for Sakuma-Hattori).
    CalibrationParameterInvalid,
    /// A temperature or signal outside where the calibration curve is defined
    /// (A T + B <= 0 for Sakuma-Hattori, or an inverse that is not a positive temperature).
    CalibrationOutOfDomain,
    /// A calibration fit was given fewer than three points (three parameters need three).
    CalibrationTooFewPoints,
    /// Calibration arrays (temperatures, signals, uncertainties, output) differ in length.
    CalibrationLengthMismatch,
    /// Two calibration points share one temperature.
    CalibrationDuplicateTemperature,
    /// Calibration signals do not rise strictly with temperature.
    CalibrationSignalNotIncreasing,
    /// A signal uncertainty that is not positive.
    CalibrationUncertaintyInvalid,
    /// A fit temperature range that is not 0 < t_lo_k < t_hi_k.
    CalibrationRangeInvalid,
    /// A calibration fit did not converge (the data do not follow the curve's form).
    CalibrationNotConverged,
    /// The fit's normal matrix is singular: the data do not determine all three parameters.
    CalibrationIllConditioned,
    /// A signal at or below the detector's dark offset (or at or below zero without one).
    SignalAtOrBelowOffset,
    // ---- uncertainty and ratio -------------------------------------------------------------------
    /// More inputs than an uncertainty budget holds (`uncertainty::MAX_INPUTS`).
    TooManyInputs,
    /// An uncertainty budget with no inputs.
    NoInputs,
    /// A standard uncertainty below zero.
    UncertaintyNegative,
    /// A correlation matrix whose length is not n * n for n inputs.
    CorrelationShapeMismatch,
    /// A correlation matrix that is not symmetric, has a diagonal other than 1 or an
    /// entry outside [-1, 1].
    CorrelationInvalid,
    /// Correlations that make the combined variance negative (the matrix is not positive
    /// semidefinite).
    CorrelationNotPositiveSemidefinite,
    /// A coverage factor that is not positive.
    CoverageFactorNotPositive,
    /// A coverage probability outside (0, 1).
    CoverageProbabilityOutOfRange,
    /// Too few Monte Carlo trials (or too small a sample buffer) for the requested
    /// statistic or coverage probability.
    TooFewTrials,
    /// A random-generator state of all zeros (xoshiro256** never leaves it).
    RandomStateZero,
    /// A band-signal ratio that is zero or negative.
    RatioNotPositive,
    /// An emissivity ratio e1/e2 that is zero or negative.
    EmissivityRatioNotPositive,
    /// A ratio that no temperature in the pyrometer's range produces.
    RatioOutOfRange,
    /// Two bands whose ratio changes too little with temperature (they overlap or sit too
    /// close) to resolve it: |d ln R / d ln T| falls below `ratio::MIN_LOG_SLOPE`.
    BandsIndistinguishable,
    /// A ratio-pyrometer temperature range with t_min_k >= t_max_k.
    RatioRangeInvalid,
    // ---- atmosphere ---------------------------------------------------------------------------
    /// Relative humidity outside [0, 1] (a fraction, not percent).
    RelativeHumidityOutOfRange,
    /// Air temperature outside the range of the chosen saturation-vapour-pressure formula.
    AirTemperatureOutOfRange,
    /// Air pressure outside [500, 1100] hPa (the range the humidity and continuum models cover).
    AirPressureOutOfRange,
    /// A vapour pressure that is not positive, or whose dew or frost point lies outside the
    /// formula's range.
    VapourPressureOutOfRange,
    /// A negative path distance.
    DistanceNegative,
    /// A wavelength or band outside the water-vapour continuum model (8-14 um): supply a
    /// spectral transmittance table instead.
    OutsideContinuumModel,
    /// A spectral transmittance table with a value above 1.
    TransmittanceTableAboveOne,
    /// The band reaches beyond the spectral transmittance table.
    BandOutsideTransmittanceTable,
    /// The air path is opaque: its transmittance underflows a double (an optical depth
    /// above about 745), so no radiance of the object reaches the sensor.
    PathOpaque,
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
    // ---- calibration curves through the C ABI ---------------------------------------------
    /// A calibration-curve form outside its declared values (C ABI only).
    InvalidCurveForm,
    // ---- verify -------------------------------------------------------------------------------
    /// A verification temperature range that is not 0 < lo_k < hi_k.
    VerifyRangeInvalid,
    /// A verification sample count outside its documented bounds (at least 2 samples over
    /// a range, 1 to `verify::MAX_POINTS_PER_ROW` per table row, at most
    /// `verify::MAX_SAMPLES` in all).
    VerifySampleCountInvalid,
    /// A verification over calibration points was given none.
    VerifyNoPoints,
    /// A parameter covariance with a non-finite entry, a negative variance or an asymmetry.
    VerifyCovarianceInvalid,
    /// A coverage check over more than `verify::MAX_COVERAGE_POINTS` points (its scan is
    /// quadratic in the point count; the limit bounds its time).
    VerifyTooManyPoints,
    // ---- optics and materials ---------------------------------------------------------------
    /// A distance-to-spot ratio, IFOV, pixel pitch, focal length, f-number, wavelength or distance that is not positive.
    OpticsGeometryInvalid,
    /// A target size (diameter) that is not positive.
    TargetSizeNotPositive,
    /// An encircled-energy or signal fraction outside (0, 1).
    FractionOutOfRange,
    /// A spatial frequency below zero.
    SpatialFrequencyNegative,
    /// A size-of-source table with fewer than two points, arrays of different length, diameters not positive and strictly increasing, or a sigma outside [0, 1).
    SseTableInvalid,
    /// A source diameter outside the span of the size-of-source table (no extrapolation).
    SseDiameterOutsideTable,
    /// Optical constants with n <= 0, k < 0, or |m| above 1e6.
    RefractiveIndexInvalid,
    /// A viewing angle outside [0, 89.999] degrees.
    AngleOutOfRange,
    /// A relative emissivity tolerance outside (0, 1).
    AngleToleranceInvalid,
    /// An electrical resistivity that is not positive.
    ResistivityNotPositive,
    /// The Hagen-Rubens first term exceeds 0.2, where its error reaches 10 %.
    HagenRubensOutOfRange,
    /// Fewer bands than the emissivity model has parameters plus one (temperature).
    TooFewBands,
    /// More bands than multi-wavelength pyrometry holds (`multiwavelength::MAX_BANDS`).
    TooManyBands,
    /// Band, wavelength or signal arrays of different lengths.
    BandCountMismatch,
    /// The multi-wavelength normal matrix is singular: the bands cannot separate temperature from emissivity.
    MultiwavelengthIllConditioned,
    /// The multi-wavelength Gauss-Newton fit did not converge.
    MultiwavelengthNotConverged,
    /// An emissivity model outside its declared values (0-3 polynomial terms).
    EmissivityModelInvalid,
    /// A minimum-target rule outside its declared values (C ABI only).
    TargetRuleInvalid,
    /// Spectral moments with a mean wavelength that is not positive or a negative variance.
    MomentsInvalid,
    /// Table rows that are not the ones the converter or geometry was built with: their
    /// fingerprint (of the rows' bytes and the geometry) differs from the stored one.
    FrameRowsMismatch,
    /// The table would need more rows than [`crate::frame::MAX_TABLE_ROWS`] (refused up
    /// front, before the rows are built).
    FrameTableTooLarge,

    // ---- bounded time ---------------------------------------------------------------------------
    /// A calibration fit was given more points than it accepts
    /// ([`crate::calibration::MAX_FIT_POINTS`]); the limit bounds the fit's time.
    CalibrationTooManyPoints,

    // ---- frame: non-uniformity, bad pixels, drift, figures of merit ------------------------
    /// A frame stack with fewer frames than the estimate needs (one for a mean, two for a temporal variance).
    NucStackEmpty,
    /// An empty frame (no pixels) where calibration frames are required.
    NucFrameEmpty,
    /// A frame width of zero, or a pixel count that is not a whole number of rows.
    NucGeometryInvalid,
    /// Every pixel is flagged bad: no array mean, no map, no replacement can be formed.
    NucNoGoodPixels,
    /// A pixel not flagged bad, or the array mean, whose high-level signal is not above its low-level signal: two-point correction needs a response.
    NucLevelsNotDistinct,
    /// A correction map value that is not finite, or a gain that is not positive, at a pixel not flagged bad.
    NucMapInvalid,
    /// Bad-pixel rules with a threshold that is not finite and positive.
    BadPixelRulesInvalid,
    /// Too few drift calibration points for the polynomial degree (degree + 1 needed), or a degree above 2.
    DriftTooFewPoints,
    /// A drift calibration point with a non-finite value, non-positive temperatures, or blackbody levels that do not give a positive response.
    DriftPointInvalid,
    /// Drift calibration points whose array temperatures are too close together to fit the polynomial.
    DriftIllConditioned,
    /// A figure-of-merit input that is out of its domain (a non-positive responsivity, a negative variance, fewer than two good pixels).
    MeritInputInvalid,

    // ---- frame: multi-point non-uniformity correction ----------------------------------------
    /// Multi-point NUC with fewer than 2 or more than [`crate::frame::MAX_NUC_LEVELS`] flat-field levels.
    NucLevelCount,
    /// Multi-point NUC levels that do not increase for at least half of the pixels not flagged bad (levels out of order, or two at one radiance), or array means that tie.
    NucLevelsNotIncreasing,
    /// Multi-point map storage that does not hold (3 N - 4) floats per pixel for N levels.
    NucMapStorageMismatch,
}

impl Error {
    /// A short, static, human-readable message for this error.
    #[must_use]
    // One arm per variant: the match grows with the enum, and splitting it would hide
    // a missing message.
    #[allow(clippy::too_many_lines)]
    pub const fn message(self) -> &'static str {
        match self {
            // general
            Error::NonFinite => "an input is NaN or infinite",
            Error::NullPointer => "a required pointer is null",
            Error::InvalidBuffer => "a pointer is misaligned or a buffer length is impossible",
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
            Error::ReflectedTemperatureNotPositive => "reflected temperature must be positive (K)",
            Error::AtmosphereTemperatureNotPositive => "atmosphere temperature must be positive (K)",
            Error::WindowTemperatureNotPositive => "window temperature must be positive (K)",
            Error::WindowReflectedTemperatureNotPositive => "window's reflected K must be positive",
            Error::SpectralTableDoesNotCoverBand => "a spectral table must cover the whole band",
            Error::SpectralEmissivityOutOfRange => "spectral emissivity values must be in [0, 1]",
            Error::SpectralTransmittanceOutOfRange => "spectral transmittance must be in [0, 1]",
            Error::ObjectNotVisible => "object not visible: response x tau x e is zero in band",
            Error::EmissivityNotDetermined => "emissivity undetermined: object at reflected K",
            Error::EmissivityReadingInconsistent => "readings imply emissivity outside (0, 1]",
            Error::ReflectorEmissivityOutOfRange => "reflector emissivity must be in [0, 1)",
            Error::ReflectedNotDetermined => "reflector reading at or below its own emission",

            // calibration
            Error::CalibrationParameterInvalid => "calibration parameters out of their domain",
            Error::CalibrationOutOfDomain => "outside the domain of the calibration curve",
            Error::CalibrationTooFewPoints => "a calibration fit needs at least three points",
            Error::CalibrationLengthMismatch => "calibration arrays differ in length",
            Error::CalibrationDuplicateTemperature => {
                "two calibration points share one temperature"
            }
            Error::CalibrationSignalNotIncreasing => {
                "calibration signals must rise strictly with temperature"
            }
            Error::CalibrationUncertaintyInvalid => "signal uncertainties must be positive",
            Error::CalibrationRangeInvalid => "fit range must satisfy 0 < t_lo_k < t_hi_k",
            Error::CalibrationNotConverged => "the calibration fit did not converge",
            Error::CalibrationIllConditioned => {
                "the calibration data do not determine all three parameters"
            }
            Error::SignalAtOrBelowOffset => "signal at or below the dark offset",
            // uncertainty and ratio
            Error::TooManyInputs => "more inputs than an uncertainty budget holds (16)",
            Error::NoInputs => "an uncertainty budget needs at least one input",
            Error::UncertaintyNegative => "a standard uncertainty must not be negative",
            Error::CorrelationShapeMismatch => "the correlation matrix must hold n * n entries",
            Error::CorrelationInvalid => {
                "correlations must be symmetric, in [-1, 1], with a unit diagonal"
            }
            Error::CorrelationNotPositiveSemidefinite => {
                "the correlations give a negative combined variance"
            }
            Error::CoverageFactorNotPositive => "the coverage factor must be positive",
            Error::CoverageProbabilityOutOfRange => "the coverage probability must be in (0, 1)",
            Error::TooFewTrials => "too few Monte Carlo trials for this statistic",
            Error::RandomStateZero => "the random generator state must not be all zeros",
            Error::RatioNotPositive => "the band-signal ratio must be positive",
            Error::EmissivityRatioNotPositive => "the emissivity ratio must be positive",
            Error::RatioOutOfRange => "no temperature in the pyrometer's range gives this ratio",
            Error::BandsIndistinguishable => {
                "the two bands' ratio barely changes with temperature: it cannot resolve it"
            }
            Error::RatioRangeInvalid => "the ratio temperature range needs t_min_k < t_max_k",
            // atmosphere
            Error::RelativeHumidityOutOfRange => {
                "relative humidity must be a fraction in [0, 1] (not percent)"
            }
            Error::AirTemperatureOutOfRange => {
                "air temperature outside the saturation-vapour-pressure formula's range"
            }
            Error::AirPressureOutOfRange => "air pressure must be in [500, 1100] hPa",
            Error::VapourPressureOutOfRange => {
                "vapour pressure not positive, or its dew point is outside the formula's range"
            }
            Error::DistanceNegative => "path distance must not be negative",
            Error::OutsideContinuumModel => {
                "outside the 8-14 um water-vapour continuum model: supply a spectral transmittance table"
            }
            Error::TransmittanceTableAboveOne => "spectral transmittance values must not exceed 1",
            Error::BandOutsideTransmittanceTable => {
                "the band reaches beyond the spectral transmittance table"
            }
            Error::PathOpaque => {
                "the air path is opaque: its transmittance underflows (optical depth above ~745)"
            }

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
            Error::InvalidCurveForm => "calibration curve form is not Planck (0) or Wien (1)",
            // verify
            Error::VerifyRangeInvalid => "verification range must satisfy 0 < lo_k < hi_k",
            Error::VerifySampleCountInvalid => "verification sample count out of bounds",
            Error::VerifyNoPoints => "verification needs at least one calibration point",
            Error::VerifyCovarianceInvalid => {
                "covariance must be finite and symmetric with non-negative variances"
            }
            Error::VerifyTooManyPoints => {
                "a coverage check accepts at most 1024 points (MAX_COVERAGE_POINTS)"
            }
            // optics and materials
            Error::OpticsGeometryInvalid => "optical geometry values must be positive",
            Error::TargetSizeNotPositive => "target size must be positive",
            Error::FractionOutOfRange => "the energy fraction must be in (0, 1)",
            Error::SpatialFrequencyNegative => "spatial frequency must not be negative",
            Error::SseTableInvalid => "SSE table: >= 2 points, increasing positive diameters, sigma in [0, 1)",
            Error::SseDiameterOutsideTable => "source diameter outside the SSE table",
            Error::RefractiveIndexInvalid => "optical constants need n > 0, k >= 0, |m| <= 1e6",
            Error::AngleOutOfRange => "angle must be in [0, 89.999] degrees",
            Error::AngleToleranceInvalid => "relative tolerance must be in (0, 1)",
            Error::ResistivityNotPositive => "resistivity must be positive (ohm m)",
            Error::HagenRubensOutOfRange => "outside the Hagen-Rubens range (first term above 0.2)",
            Error::TooFewBands => "too few bands for the emissivity model",
            Error::TooManyBands => "more bands than the fit holds (16)",
            Error::BandCountMismatch => "band and signal arrays differ in length",
            Error::MultiwavelengthIllConditioned => "bands cannot separate temperature from emissivity",
            Error::MultiwavelengthNotConverged => "the multi-wavelength fit did not converge",
            Error::EmissivityModelInvalid => "emissivity model must have 0 to 3 terms",
            Error::TargetRuleInvalid => "unknown minimum-target rule",
            Error::MomentsInvalid => "moments need a positive mean and non-negative variance",
            Error::FrameRowsMismatch => "the table rows are not the ones the converter was built with",
            Error::FrameTableTooLarge => "the table would need more rows than the library builds",
            Error::CalibrationTooManyPoints => {
                "a calibration fit accepts at most 256 points (MAX_FIT_POINTS)"
            }
            // frame: non-uniformity, bad pixels, drift, figures of merit
            Error::NucStackEmpty => "a frame stack has too few frames for this estimate",
            Error::NucFrameEmpty => "calibration frames must hold at least one pixel",
            Error::NucGeometryInvalid => "frame width must be positive and divide the pixel count",
            Error::NucNoGoodPixels => "every pixel is flagged bad",
            Error::NucLevelsNotDistinct => "high-level calibration signal must exceed the low level for every good pixel",
            Error::NucMapInvalid => "correction map gain must be finite and positive, offset finite, at good pixels",
            Error::BadPixelRulesInvalid => "bad-pixel thresholds must be finite and positive",
            Error::DriftTooFewPoints => "drift fit needs degree + 1 points and a degree of at most 2",
            Error::DriftPointInvalid => "drift point needs finite values, positive temperatures and a positive response",
            Error::DriftIllConditioned => "drift points' array temperatures are too close together for the fit",
            Error::NucLevelCount => "multi-point NUC needs between 2 and 16 flat-field levels",
            Error::NucLevelsNotIncreasing => "multi-point NUC levels must increase from level to level for most pixels",
            Error::NucMapStorageMismatch => "multi-point map storage must hold 3 N - 4 floats per pixel for N levels",
            Error::MeritInputInvalid => "figure-of-merit input out of domain",
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
