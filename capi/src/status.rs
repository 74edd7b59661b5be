//! Status codes, their messages, and the library version.

use bandtemp::Error;
use core::ffi::{c_char, c_int};

/// Major version of the library this header belongs to (Cargo.toml's; `tests/ffi_header.rs`
/// checks that they agree).
pub const BT_VERSION_MAJOR: u32 = 0;
/// Minor version of the library this header belongs to.
pub const BT_VERSION_MINOR: u32 = 1;
/// Patch version of the library this header belongs to.
pub const BT_VERSION_PATCH: u32 = 0;

/// What a `bt_` function reports: `BT_STATUS_OK` (0) or the named reason it failed.
///
/// Values are explicit and never reused: a retired status keeps its number unused. They
/// are grouped by the layer that raises them first (1-99 general and C ABI, 100 planck,
/// 200 band, 300 scene, 400 calibration, 500 uncertainty and ratio, 600 atmosphere,
/// 700 frame, 800 frame non-uniformity), so that layers can add codes independently.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum bt_status {
    /// Success: the out-pointers hold the results.
    Ok = 0,

    // ---- general inputs and the C ABI --------------------------------------------------
    /// An input was NaN or infinite.
    NonFinite = 1,
    /// A required pointer was null.
    NullPointer = 2,
    /// A pointer was misaligned for its type, or a buffer length was impossible.
    InvalidBuffer = 3,

    // ---- planck: spectral laws ----------------------------------------------------------
    /// A temperature was zero or negative (kelvin are absolute).
    TemperatureNotPositive = 100,
    /// A wavelength was zero or negative.
    WavelengthNotPositive = 101,
    /// A product lambda*T was zero or negative.
    LambdaTNotPositive = 102,
    /// A computed radiance is below the normal double range (it underflows).
    RadianceUnderflow = 103,
    /// A computed radiance is above the double range (it overflows).
    RadianceOverflow = 104,
    /// A detector kind other than `BT_DETECTOR_ENERGY` (0) or `BT_DETECTOR_PHOTON` (1).
    InvalidDetector = 105,

    // ---- band: band integrals and inversion ----------------------------------------------
    /// A band without 0 < lo_um < hi_um.
    InvalidBand = 200,
    /// A response table with fewer than two points.
    TableTooShort = 201,
    /// A response table whose two arrays differ in length.
    TableLengthMismatch = 202,
    /// A response table whose wavelengths are not positive and strictly increasing.
    TableNotIncreasing = 203,
    /// A response table with a negative value.
    TableValueNegative = 204,
    /// The response does not overlap the band, or is zero over the overlap.
    BandEmpty = 205,
    /// A radiance that is zero or negative where a positive one is required.
    RadianceNotPositive = 206,
    /// A positive radiance below the normal double range: too imprecise to invert.
    RadianceSubnormal = 207,
    /// A radiance that no temperature in the solver's range (0.1 K to 1e6 K) produces.
    RadianceOutOfRange = 208,
    /// The iterative solver did not converge.
    NotConverged = 209,

    // ---- scene: the measurement equation ---------------------------------------------------
    /// Emissivity outside (0, 1].
    EmissivityOutOfRange = 300,
    /// Atmosphere transmittance outside (0, 1].
    AtmosphereTransmittanceOutOfRange = 301,
    /// Window transmittance outside (0, 1].
    WindowTransmittanceOutOfRange = 302,
    /// Window reflectance outside [0, 1).
    WindowReflectanceOutOfRange = 303,
    /// Window transmittance + reflectance above 1.
    WindowSumExceedsOne = 304,
    /// The signal is at or below what reflections, air and window alone give: the object
    /// cannot be resolved against its background.
    SignalBelowBackground = 305,
    /// The reflected apparent temperature of the scene is zero or negative.
    ReflectedTemperatureNotPositive = 306,
    /// The atmosphere temperature of the scene is zero or negative.
    AtmosphereTemperatureNotPositive = 307,
    /// The window temperature of the scene is zero or negative.
    WindowTemperatureNotPositive = 308,
    /// The temperature the window reflects (sensor side) is zero or negative.
    WindowReflectedTemperatureNotPositive = 309,
    /// A spectral emissivity or transmittance table does not cover the whole band.
    SpectralTableDoesNotCoverBand = 310,
    /// A spectral emissivity table has a value above 1.
    SpectralEmissivityOutOfRange = 311,
    /// A spectral transmittance table has a value above 1.
    SpectralTransmittanceOutOfRange = 312,
    /// Response x transmittance x emissivity is zero over the whole band.
    ObjectNotVisible = 313,
    /// Emissivity cannot be determined: the object is at the reflected temperature.
    EmissivityNotDetermined = 314,
    /// The readings imply an emissivity outside (0, 1].
    EmissivityReadingInconsistent = 315,
    /// The emissivity of a reflector is outside [0, 1).
    ReflectorEmissivityOutOfRange = 316,
    /// The reflector reading is at or below its own emission, air and window.
    ReflectedNotDetermined = 317,

    // ---- calibration -----------------------------------------------------------------------
    /// Calibration parameters out of their domain (Sakuma-Hattori: A <= 0 or C <= 0).
    CalibrationParameterInvalid = 400,
    /// A temperature or signal outside where the calibration curve is defined.
    CalibrationOutOfDomain = 401,
    /// A calibration fit was given fewer than three points.
    CalibrationTooFewPoints = 402,
    /// Calibration arrays differ in length.
    CalibrationLengthMismatch = 403,
    /// Two calibration points share one temperature.
    CalibrationDuplicateTemperature = 404,
    /// Calibration signals do not rise strictly with temperature.
    CalibrationSignalNotIncreasing = 405,
    /// A signal uncertainty that is not positive.
    CalibrationUncertaintyInvalid = 406,
    /// A fit temperature range that is not 0 < t_lo_k < t_hi_k.
    CalibrationRangeInvalid = 407,
    /// A calibration fit did not converge (the data do not follow the curve).
    CalibrationNotConverged = 408,
    /// The data do not determine all three calibration parameters.
    CalibrationIllConditioned = 409,
    /// A signal at or below the detector's dark offset (or at or below zero).
    SignalAtOrBelowOffset = 410,

    // ---- uncertainty (500-549) and ratio (550-599) ------------------------------------------
    /// More inputs than an uncertainty budget holds.
    TooManyInputs = 500,
    /// An uncertainty budget with no inputs.
    NoInputs = 501,
    /// A standard uncertainty below zero.
    UncertaintyNegative = 502,
    /// A correlation matrix whose length is not n * n for n inputs.
    CorrelationShapeMismatch = 503,
    /// A correlation matrix not symmetric, without a unit diagonal, or outside [-1, 1].
    CorrelationInvalid = 504,
    /// Correlations that make the combined variance negative.
    CorrelationNotPositiveSemidefinite = 505,
    /// A coverage factor that is not positive.
    CoverageFactorNotPositive = 506,
    /// A coverage probability outside (0, 1).
    CoverageProbabilityOutOfRange = 507,
    /// Too few Monte Carlo trials for the requested statistic.
    TooFewTrials = 508,
    /// A random-generator state of all zeros.
    RandomStateZero = 509,
    /// A band-signal ratio that is zero or negative.
    RatioNotPositive = 550,
    /// An emissivity ratio e1/e2 that is zero or negative.
    EmissivityRatioNotPositive = 551,
    /// A ratio that no temperature in the pyrometer's range produces.
    RatioOutOfRange = 552,
    /// Two bands whose ratio changes too little with temperature to resolve it.
    BandsIndistinguishable = 553,
    /// A ratio-pyrometer temperature range with t_min_k >= t_max_k.
    RatioRangeInvalid = 554,

    // ---- atmosphere ---------------------------------------------------------------------------
    /// Relative humidity outside [0, 1] (a fraction, not percent).
    RelativeHumidityOutOfRange = 600,
    /// Air temperature outside the saturation-vapour-pressure formula's range.
    AirTemperatureOutOfRange = 601,
    /// Air pressure outside [500, 1100] hPa.
    AirPressureOutOfRange = 602,
    /// A vapour pressure not positive, or with a dew point outside the formula's range.
    VapourPressureOutOfRange = 603,
    /// A negative path distance.
    DistanceNegative = 604,
    /// A wavelength or band outside the 8-14 um water-vapour continuum model.
    OutsideContinuumModel = 605,
    /// A spectral transmittance table with a value above 1.
    TransmittanceTableAboveOne = 606,
    /// The band reaches beyond the spectral transmittance table.
    BandOutsideTransmittanceTable = 607,
    /// The air path is opaque: its transmittance underflows a double.
    PathOpaque = 608,

    // 700: frame
    /// A frame temperature range with `lo_k >= hi_k` (or a non-positive end).
    FrameRangeInvalid = 700,
    /// A table tolerance that is not a finite positive number of kelvin.
    FrameToleranceInvalid = 701,
    /// No table up to the finest segment level meets the requested tolerance (f32 output
    /// cannot resolve it, or the curve is too curved at the range's ends).
    FrameToleranceUnreachable = 702,
    /// The caller's table storage has fewer rows than the table needs.
    FrameStorageTooSmall = 703,
    /// The curve's signal over the range is not inside the normal f32 range.
    FrameSignalUnrepresentable = 704,
    /// Frame buffers (input, emissivity map, output) differ in length.
    FrameLengthMismatch = 705,
    /// Rails with `dead_counts >= saturation_counts`.
    FrameRailsInvalid = 706,
    /// A counts-to-signal map with a gain that is not finite and positive, or a non-finite
    /// offset.
    FrameCountsMapInvalid = 707,
    /// Table geometry that does not describe the given rows (C ABI re-wrapping).
    FrameTableInvalid = 708,
    /// Scene coefficients that do not fit an f32 (an extreme gain or background).
    FrameCoefficientOverflow = 709,
    /// An emissivity map was given but the curve has no signal at the reflected
    /// temperature, so the per-pixel correction cannot be formed.
    FrameEmissivityMapUnavailable = 710,
    /// The curve given to update a converter is not the one its table was built from.
    FrameCurveMismatch = 711,
    /// A calibration-curve form outside its declared values (`bt_curve.form`, or a form
    /// argument, not 0 or 1).
    InvalidCurveForm = 1100,

    // ---- verify: calibration checks --------------------------------------------------------
    /// A verification temperature range without 0 < lo_k < hi_k.
    VerifyRangeInvalid = 1000,
    /// A verification sample count out of bounds (see `bt_verify_*`).
    VerifySampleCountInvalid = 1001,
    /// A verification over calibration points was given none.
    VerifyNoPoints = 1002,
    /// A parameter covariance with a non-finite entry, a negative variance or an asymmetry.
    VerifyCovarianceInvalid = 1003,
    /// A coverage check over more than 1024 points (`bt_verify_coverage`).
    VerifyTooManyPoints = 1004,

    // 900: optics and materials
    /// A distance-to-spot ratio, IFOV, pixel pitch, focal length, f-number, wavelength or distance that is not positive.
    OpticsGeometryInvalid = 900,
    /// A target size (diameter) that is not positive.
    TargetSizeNotPositive = 901,
    /// An encircled-energy or signal fraction outside (0, 1).
    FractionOutOfRange = 902,
    /// A spatial frequency below zero.
    SpatialFrequencyNegative = 903,
    /// A size-of-source table with fewer than two points, arrays of different length, diameters not positive and strictly increasing, or a sigma outside [0, 1).
    SseTableInvalid = 904,
    /// A source diameter outside the span of the size-of-source table (no extrapolation).
    SseDiameterOutsideTable = 905,
    /// Optical constants with n <= 0, k < 0, or |m| above 1e6.
    RefractiveIndexInvalid = 906,
    /// A viewing angle outside [0, 89.999] degrees.
    AngleOutOfRange = 907,
    /// A relative emissivity tolerance outside (0, 1).
    AngleToleranceInvalid = 908,
    /// An electrical resistivity that is not positive.
    ResistivityNotPositive = 909,
    /// The Hagen-Rubens first term exceeds 0.2, where its error reaches 10 %.
    HagenRubensOutOfRange = 910,
    /// Fewer bands than the emissivity model has parameters plus one (temperature).
    TooFewBands = 911,
    /// More bands than multi-wavelength pyrometry holds (`multiwavelength::MAX_BANDS`).
    TooManyBands = 912,
    /// Band, wavelength or signal arrays of different lengths.
    BandCountMismatch = 913,
    /// The multi-wavelength normal matrix is singular: the bands cannot separate temperature from emissivity.
    MultiwavelengthIllConditioned = 914,
    /// The multi-wavelength Gauss-Newton fit did not converge.
    MultiwavelengthNotConverged = 915,
    /// An emissivity model outside its declared values (0-3 polynomial terms).
    EmissivityModelInvalid = 916,
    /// A minimum-target rule outside its declared values (C ABI only).
    TargetRuleInvalid = 917,
    /// Spectral moments with a mean wavelength that is not positive or a negative variance.
    MomentsInvalid = 918,
    /// Table rows that are not the ones the converter was built with (their fingerprint
    /// differs): another table's rows, or rows changed since.
    FrameRowsMismatch = 712,
    /// The table would need more rows than the library builds (4096 rows, 64 KiB); refused
    /// up front, before any row is built.
    FrameTableTooLarge = 713,
    /// A calibration fit was given more than 256 points (the limit bounds its time).
    CalibrationTooManyPoints = 1300,

    // 800: frame non-uniformity, bad pixels, drift, figures of merit
    /// A frame stack with fewer frames than the estimate needs (one for a mean, two for a temporal variance).
    NucStackEmpty = 800,
    /// An empty frame (no pixels) where calibration frames are required.
    NucFrameEmpty = 801,
    /// A frame width of zero, or a pixel count that is not a whole number of rows.
    NucGeometryInvalid = 802,
    /// Every pixel is flagged bad: no array mean, no map, no replacement can be formed.
    NucNoGoodPixels = 803,
    /// A pixel not flagged bad, or the array mean, whose high-level signal is not above its low-level signal: two-point correction needs a response.
    NucLevelsNotDistinct = 804,
    /// A correction map value that is not finite, or a gain that is not positive, at a pixel not flagged bad.
    NucMapInvalid = 805,
    /// Bad-pixel rules with a threshold that is not finite and positive.
    BadPixelRulesInvalid = 806,
    /// Too few drift calibration points for the polynomial degree (degree + 1 needed), or a degree above 2.
    DriftTooFewPoints = 807,
    /// A drift calibration point with a non-finite value, non-positive temperatures, or blackbody levels that do not give a positive response.
    DriftPointInvalid = 808,
    /// Drift calibration points whose array temperatures are too close together to fit the polynomial.
    DriftIllConditioned = 809,
    /// A figure-of-merit input that is out of its domain (a non-positive responsivity, a negative variance, fewer than two good pixels).
    MeritInputInvalid = 810,

    // 814: multi-point non-uniformity correction
    /// Multi-point NUC with fewer than 2 or more than 16 flat-field levels.
    NucLevelCount = 814,
    /// Multi-point NUC levels that do not increase for at least half of the pixels not flagged bad (levels out of order, or two at one radiance), or array means that tie.
    NucLevelsNotIncreasing = 815,
    /// Multi-point map storage that does not hold (3 N - 4) floats per pixel for N levels.
    NucMapStorageMismatch = 816,
}

/// Writes the one mapping between `Error` and `bt_status` (both directions' matches are
/// exhaustive: a new `Error` variant does not compile until it has a status, a status
/// needs its `Error`), and the NUL-terminated message of every status, taken at compile
/// time from [`Error::message`].
macro_rules! status_table {
    ($($variant:ident),* $(,)?) => {
        impl From<Error> for bt_status {
            fn from(error: Error) -> bt_status {
                match error {
                    $(Error::$variant => bt_status::$variant,)*
                }
            }
        }

        impl bt_status {
            /// Every status, `Ok` first.
            pub const ALL: &'static [bt_status] = &[bt_status::Ok, $(bt_status::$variant),*];

            /// The error this status reports; `None` for `Ok`.
            #[must_use]
            pub const fn error(self) -> Option<Error> {
                match self {
                    bt_status::Ok => None,
                    $(bt_status::$variant => Some(Error::$variant),)*
                }
            }

            /// The status's message as a static NUL-terminated string: "ok", or the
            /// message of the error.
            fn message_ptr(self) -> *const c_char {
                match self {
                    bt_status::Ok => c"ok".as_ptr(),
                    $(bt_status::$variant => {
                        const TEXT: &str = Error::$variant.message();
                        static BYTES: [u8; TEXT.len() + 1] = nul_terminated(TEXT);
                        BYTES.as_ptr().cast::<c_char>()
                    })*
                }
            }
        }
    };
}

status_table!(
    NonFinite,
    NullPointer,
    InvalidBuffer,
    TemperatureNotPositive,
    WavelengthNotPositive,
    LambdaTNotPositive,
    RadianceUnderflow,
    RadianceOverflow,
    InvalidDetector,
    InvalidBand,
    TableTooShort,
    TableLengthMismatch,
    TableNotIncreasing,
    TableValueNegative,
    BandEmpty,
    RadianceNotPositive,
    RadianceSubnormal,
    RadianceOutOfRange,
    NotConverged,
    EmissivityOutOfRange,
    AtmosphereTransmittanceOutOfRange,
    WindowTransmittanceOutOfRange,
    WindowReflectanceOutOfRange,
    WindowSumExceedsOne,
    SignalBelowBackground,
    ReflectedTemperatureNotPositive,
    AtmosphereTemperatureNotPositive,
    WindowTemperatureNotPositive,
    WindowReflectedTemperatureNotPositive,
    SpectralTableDoesNotCoverBand,
    SpectralEmissivityOutOfRange,
    SpectralTransmittanceOutOfRange,
    ObjectNotVisible,
    EmissivityNotDetermined,
    EmissivityReadingInconsistent,
    ReflectorEmissivityOutOfRange,
    ReflectedNotDetermined,
    CalibrationParameterInvalid,
    CalibrationOutOfDomain,
    CalibrationTooFewPoints,
    CalibrationLengthMismatch,
    CalibrationDuplicateTemperature,
    CalibrationSignalNotIncreasing,
    CalibrationUncertaintyInvalid,
    CalibrationRangeInvalid,
    CalibrationNotConverged,
    CalibrationIllConditioned,
    SignalAtOrBelowOffset,
    TooManyInputs,
    NoInputs,
    UncertaintyNegative,
    CorrelationShapeMismatch,
    CorrelationInvalid,
    CorrelationNotPositiveSemidefinite,
    CoverageFactorNotPositive,
    CoverageProbabilityOutOfRange,
    TooFewTrials,
    RandomStateZero,
    RatioNotPositive,
    EmissivityRatioNotPositive,
    RatioOutOfRange,
    BandsIndistinguishable,
    RatioRangeInvalid,
    RelativeHumidityOutOfRange,
    AirTemperatureOutOfRange,
    AirPressureOutOfRange,
    VapourPressureOutOfRange,
    DistanceNegative,
    OutsideContinuumModel,
    TransmittanceTableAboveOne,
    BandOutsideTransmittanceTable,
    PathOpaque,
    FrameRangeInvalid,
    FrameToleranceInvalid,
    FrameToleranceUnreachable,
    FrameStorageTooSmall,
    FrameSignalUnrepresentable,
    FrameLengthMismatch,
    FrameRailsInvalid,
    FrameCountsMapInvalid,
    FrameTableInvalid,
    FrameCoefficientOverflow,
    FrameEmissivityMapUnavailable,
    FrameCurveMismatch,
    InvalidCurveForm,
    VerifyRangeInvalid,
    VerifySampleCountInvalid,
    VerifyNoPoints,
    VerifyCovarianceInvalid,
    VerifyTooManyPoints,
    OpticsGeometryInvalid,
    TargetSizeNotPositive,
    FractionOutOfRange,
    SpatialFrequencyNegative,
    SseTableInvalid,
    SseDiameterOutsideTable,
    RefractiveIndexInvalid,
    AngleOutOfRange,
    AngleToleranceInvalid,
    ResistivityNotPositive,
    HagenRubensOutOfRange,
    TooFewBands,
    TooManyBands,
    BandCountMismatch,
    MultiwavelengthIllConditioned,
    MultiwavelengthNotConverged,
    EmissivityModelInvalid,
    TargetRuleInvalid,
    MomentsInvalid,
    FrameRowsMismatch,
    FrameTableTooLarge,
    CalibrationTooManyPoints,
    NucStackEmpty,
    NucFrameEmpty,
    NucGeometryInvalid,
    NucNoGoodPixels,
    NucLevelsNotDistinct,
    NucMapInvalid,
    BadPixelRulesInvalid,
    DriftTooFewPoints,
    DriftPointInvalid,
    DriftIllConditioned,
    MeritInputInvalid,
    NucLevelCount,
    NucLevelsNotIncreasing,
    NucMapStorageMismatch,
);

impl bt_status {
    /// The status with this numeric value, if there is one.
    #[must_use]
    pub fn from_raw(raw: c_int) -> Option<bt_status> {
        bt_status::ALL
            .iter()
            .copied()
            .find(|&status| status as c_int == raw)
    }
}

/// `text` followed by a NUL, in an array of exactly `N` = `text.len() + 1` bytes.
///
/// Evaluated only in `static` initialisers (at compile time). Cannot fail: an interior NUL
/// would become '?', a short array truncates (neither happens: `tests/ffi_status.rs` checks
/// every message against [`Error::message`]).
pub(super) const fn nul_terminated<const N: usize>(text: &str) -> [u8; N] {
    let bytes = text.as_bytes();
    let mut out = [0u8; N];
    let mut i = 0;
    while i + 1 < N && i < bytes.len() {
        // In bounds: i < N - 1 and i < bytes.len() (a compile-time evaluation in any case).
        #[allow(clippy::indexing_slicing)]
        {
            out[i] = if bytes[i] == 0 { b'?' } else { bytes[i] };
        }
        i += 1;
    }
    out
}

/// A static, NUL-terminated, human-readable message for a status value: "ok" for
/// `BT_STATUS_OK`, "unknown status" for a value that is no `bt_status`.
///
/// Takes the status as an `int` so that any value a C caller passes is defined behaviour
/// (pass a `bt_status`; it converts implicitly). Never returns NULL; the string is static:
/// do not free it.
#[no_mangle]
pub extern "C" fn bt_status_message(status: c_int) -> *const c_char {
    match bt_status::from_raw(status) {
        Some(status) => status.message_ptr(),
        None => c"unknown status".as_ptr(),
    }
}

/// The library version as a static NUL-terminated string, "MAJOR.MINOR.PATCH" (equal to
/// `BT_VERSION_MAJOR`.`BT_VERSION_MINOR`.`BT_VERSION_PATCH` of the header it was built
/// with). Never returns NULL; do not free it.
#[no_mangle]
pub extern "C" fn bt_version() -> *const c_char {
    concat!(env!("CARGO_PKG_VERSION"), "\0")
        .as_ptr()
        .cast::<c_char>()
}
