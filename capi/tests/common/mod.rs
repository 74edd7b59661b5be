//! What the bit-pattern proptests of the C ABI share: the sentinel that out values hold
//! before a call, the edge values every argument is also drawn from, and the f64 strategy.

use proptest::prelude::*;

/// The value out variables hold before a call; it must survive every error.
pub const SENTINEL: f64 = -12345.678;

/// Edge values every argument is also drawn from: NaN, the infinities, signed zeros and
/// the smallest normal and subnormal numbers of both signs, the ends of the double range,
/// and physical magnitudes (wavelengths in um, temperatures in K).
pub const SPECIAL: &[f64] = &[
    f64::NAN,
    f64::INFINITY,
    f64::NEG_INFINITY,
    0.0,
    -0.0,
    -1.0,
    f64::MAX,
    f64::MIN,
    f64::MIN_POSITIVE,
    -f64::MIN_POSITIVE,
    5e-324,
    -5e-324,
    2e-310,
    f64::EPSILON,
    1e-300,
    1e300,
    0.01,
    0.5,
    1.0,
    8.0,
    14.0,
    300.0,
    1000.0,
    1e6,
];

/// Arbitrary bit patterns, the edge values, and magnitudes from 1e-3 to 10^`max_exponent`.
pub fn any_f64_to(max_exponent: f64) -> impl Strategy<Value = f64> {
    prop_oneof![
        3 => any::<u64>().prop_map(f64::from_bits),
        2 => prop::sample::select(SPECIAL),
        3 => (-3.0f64..max_exponent).prop_map(|e| 10f64.powf(e)),
    ]
}
