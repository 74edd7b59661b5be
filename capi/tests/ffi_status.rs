//! Status codes: pinned values, one mapping to `Error`, and static NUL-terminated messages.

use bandtemp::Error;
use bandtemp_capi::{bt_status, bt_status_message, bt_version};
use std::collections::HashSet;
use std::ffi::{c_int, CStr};

/// The published values of every status. They are part of the C ABI: a value, once
/// released, never changes and is never reused. Changing a line here is a breaking change.
const PINNED: &[(bt_status, c_int)] = &[
    (bt_status::Ok, 0),
    (bt_status::NonFinite, 1),
    (bt_status::NullPointer, 2),
    (bt_status::InvalidBuffer, 3),
    (bt_status::TemperatureNotPositive, 100),
    (bt_status::WavelengthNotPositive, 101),
    (bt_status::LambdaTNotPositive, 102),
    (bt_status::RadianceUnderflow, 103),
    (bt_status::RadianceOverflow, 104),
    (bt_status::InvalidDetector, 105),
    (bt_status::InvalidBand, 200),
    (bt_status::TableTooShort, 201),
    (bt_status::TableLengthMismatch, 202),
    (bt_status::TableNotIncreasing, 203),
    (bt_status::TableValueNegative, 204),
    (bt_status::BandEmpty, 205),
    (bt_status::RadianceNotPositive, 206),
    (bt_status::RadianceSubnormal, 207),
    (bt_status::RadianceOutOfRange, 208),
    (bt_status::NotConverged, 209),
    (bt_status::EmissivityOutOfRange, 300),
    (bt_status::AtmosphereTransmittanceOutOfRange, 301),
    (bt_status::WindowTransmittanceOutOfRange, 302),
    (bt_status::WindowReflectanceOutOfRange, 303),
    (bt_status::WindowSumExceedsOne, 304),
    (bt_status::SignalBelowBackground, 305),
    (bt_status::ReflectedTemperatureNotPositive, 306),
    (bt_status::AtmosphereTemperatureNotPositive, 307),
    (bt_status::WindowTemperatureNotPositive, 308),
    (bt_status::WindowReflectedTemperatureNotPositive, 309),
    (bt_status::SpectralTableDoesNotCoverBand, 310),
    (bt_status::SpectralEmissivityOutOfRange, 311),
    (bt_status::SpectralTransmittanceOutOfRange, 312),
    (bt_status::ObjectNotVisible, 313),
    (bt_status::EmissivityNotDetermined, 314),
    (bt_status::EmissivityReadingInconsistent, 315),
    (bt_status::ReflectorEmissivityOutOfRange, 316),
    (bt_status::ReflectedNotDetermined, 317),
    (bt_status::CalibrationParameterInvalid, 400),
    (bt_status::CalibrationOutOfDomain, 401),
    (bt_status::CalibrationTooFewPoints, 402),
    (bt_status::CalibrationLengthMismatch, 403),
    (bt_status::CalibrationDuplicateTemperature, 404),
    (bt_status::CalibrationSignalNotIncreasing, 405),
    (bt_status::CalibrationUncertaintyInvalid, 406),
    (bt_status::CalibrationRangeInvalid, 407),
    (bt_status::CalibrationNotConverged, 408),
    (bt_status::CalibrationIllConditioned, 409),
    (bt_status::SignalAtOrBelowOffset, 410),
    (bt_status::TooManyInputs, 500),
    (bt_status::NoInputs, 501),
    (bt_status::UncertaintyNegative, 502),
    (bt_status::CorrelationShapeMismatch, 503),
    (bt_status::CorrelationInvalid, 504),
    (bt_status::CorrelationNotPositiveSemidefinite, 505),
    (bt_status::CoverageFactorNotPositive, 506),
    (bt_status::CoverageProbabilityOutOfRange, 507),
    (bt_status::TooFewTrials, 508),
    (bt_status::RandomStateZero, 509),
    (bt_status::RatioNotPositive, 550),
    (bt_status::EmissivityRatioNotPositive, 551),
    (bt_status::RatioOutOfRange, 552),
    (bt_status::BandsIndistinguishable, 553),
    (bt_status::RatioRangeInvalid, 554),
    (bt_status::RelativeHumidityOutOfRange, 600),
    (bt_status::AirTemperatureOutOfRange, 601),
    (bt_status::AirPressureOutOfRange, 602),
    (bt_status::VapourPressureOutOfRange, 603),
    (bt_status::DistanceNegative, 604),
    (bt_status::OutsideContinuumModel, 605),
    (bt_status::TransmittanceTableAboveOne, 606),
    (bt_status::BandOutsideTransmittanceTable, 607),
    (bt_status::PathOpaque, 608),
    (bt_status::FrameRangeInvalid, 700),
    (bt_status::FrameToleranceInvalid, 701),
    (bt_status::FrameToleranceUnreachable, 702),
    (bt_status::FrameStorageTooSmall, 703),
    (bt_status::FrameSignalUnrepresentable, 704),
    (bt_status::FrameLengthMismatch, 705),
    (bt_status::FrameRailsInvalid, 706),
    (bt_status::FrameCountsMapInvalid, 707),
    (bt_status::FrameTableInvalid, 708),
    (bt_status::FrameCoefficientOverflow, 709),
    (bt_status::FrameEmissivityMapUnavailable, 710),
    (bt_status::FrameCurveMismatch, 711),
    (bt_status::InvalidCurveForm, 1100),
    (bt_status::VerifyRangeInvalid, 1000),
    (bt_status::VerifySampleCountInvalid, 1001),
    (bt_status::VerifyNoPoints, 1002),
    (bt_status::VerifyCovarianceInvalid, 1003),
    (bt_status::VerifyTooManyPoints, 1004),
    (bt_status::OpticsGeometryInvalid, 900),
    (bt_status::TargetSizeNotPositive, 901),
    (bt_status::FractionOutOfRange, 902),
    (bt_status::SpatialFrequencyNegative, 903),
    (bt_status::SseTableInvalid, 904),
    (bt_status::SseDiameterOutsideTable, 905),
    (bt_status::RefractiveIndexInvalid, 906),
    (bt_status::AngleOutOfRange, 907),
    (bt_status::AngleToleranceInvalid, 908),
    (bt_status::ResistivityNotPositive, 909),
    (bt_status::HagenRubensOutOfRange, 910),
    (bt_status::TooFewBands, 911),
    (bt_status::TooManyBands, 912),
    (bt_status::BandCountMismatch, 913),
    (bt_status::MultiwavelengthIllConditioned, 914),
    (bt_status::MultiwavelengthNotConverged, 915),
    (bt_status::EmissivityModelInvalid, 916),
    (bt_status::TargetRuleInvalid, 917),
    (bt_status::MomentsInvalid, 918),
    (bt_status::FrameRowsMismatch, 712),
    (bt_status::FrameTableTooLarge, 713),
    (bt_status::CalibrationTooManyPoints, 1300),
    (bt_status::NucStackEmpty, 800),
    (bt_status::NucFrameEmpty, 801),
    (bt_status::NucGeometryInvalid, 802),
    (bt_status::NucNoGoodPixels, 803),
    (bt_status::NucLevelsNotDistinct, 804),
    (bt_status::NucMapInvalid, 805),
    (bt_status::BadPixelRulesInvalid, 806),
    (bt_status::DriftTooFewPoints, 807),
    (bt_status::DriftPointInvalid, 808),
    (bt_status::DriftIllConditioned, 809),
    (bt_status::MeritInputInvalid, 810),
    (bt_status::NucLevelCount, 814),
    (bt_status::NucLevelsNotIncreasing, 815),
    (bt_status::NucMapStorageMismatch, 816),
];

fn message(raw: c_int) -> &'static str {
    let ptr = bt_status_message(raw);
    assert!(!ptr.is_null(), "bt_status_message({raw}) returned NULL");
    // SAFETY: bt_status_message returns a static NUL-terminated string.
    unsafe { CStr::from_ptr(ptr) }
        .to_str()
        .expect("messages are ASCII")
}

#[test]
fn status_values_are_pinned_and_unique() {
    assert_eq!(
        PINNED.len(),
        bt_status::ALL.len(),
        "a status was added: pin its value here"
    );
    let mut seen = HashSet::new();
    for &(status, value) in PINNED {
        assert_eq!(status as c_int, value, "{status:?} changed its value");
        assert!(seen.insert(value), "value {value} used twice");
        assert_eq!(bt_status::from_raw(value), Some(status));
    }
}

#[test]
fn every_error_maps_to_its_own_status_and_message() {
    for &status in bt_status::ALL {
        let text = message(status as c_int);
        match status.error() {
            None => {
                assert_eq!(status, bt_status::Ok);
                assert_eq!(text, "ok");
            }
            Some(error) => {
                assert_eq!(bt_status::from(error), status, "round trip of {error:?}");
                assert_ne!(status as c_int, 0, "{error:?} maps to success");
                assert_eq!(text, error.message(), "message of {status:?}");
            }
        }
    }
    // Spot checks of the mapping against names a C caller sees.
    assert_eq!(bt_status::from(Error::NullPointer), bt_status::NullPointer);
    assert_eq!(bt_status::from(Error::InvalidDetector) as c_int, 105);
}

#[test]
fn unknown_status_values_have_a_message_too() {
    for raw in [-1, 4, 99, 106, 999, c_int::MIN, c_int::MAX] {
        assert_eq!(message(raw), "unknown status", "value {raw}");
    }
}

#[test]
fn messages_are_static_and_stable() {
    let first = bt_status_message(bt_status::NonFinite as c_int);
    let second = bt_status_message(bt_status::NonFinite as c_int);
    assert_eq!(first, second, "one static string per status");
    let version = bt_version();
    // SAFETY: a static NUL-terminated string.
    let text = unsafe { CStr::from_ptr(version) }.to_str().unwrap();
    let parts: Vec<u32> = text.split('.').map(|p| p.parse().unwrap()).collect();
    assert_eq!(
        parts,
        [
            bandtemp_capi::BT_VERSION_MAJOR,
            bandtemp_capi::BT_VERSION_MINOR,
            bandtemp_capi::BT_VERSION_PATCH
        ]
    );
}
