//! The table's fingerprint: a 64-bit hash of the rows' bytes and the geometry that
//! describes them, computed when the table is built and checked whenever stored parts are
//! re-wrapped ([`super::FrameTable::from_parts`], [`super::FrameConverter::from_parts`],
//! every C call). It makes a converter recognise its own rows: another table's rows (a
//! second lens or gain mode), a shifted pointer or rows changed since are refused with
//! [`crate::Error::FrameRowsMismatch`] instead of converting to wrong temperatures.
//!
//! The hash reads the input as 32-bit words w and keeps a 64-bit state,
//! h <- ((h ^ w) * K) ^ (((h ^ w) * K) >> 29) with K = 0x9E37_79B9_7F4A_7C15 (the 64-bit
//! golden-ratio constant, common practice for multiplicative hashing), and ends with the
//! splitmix64 finaliser. It guards against accidents, not adversaries: two different
//! tables share a fingerprint with a chance of about 2^-64. Cost: one multiply and three
//! cheap operations per word, 4 words per row (measured in `benches/frame.rs`).

use super::table::{TableGeometry, TableRow};

const K: u64 = 0x9E37_79B9_7F4A_7C15;

#[inline(always)]
fn mix(h: u64, word: u32) -> u64 {
    let x = (h ^ u64::from(word)).wrapping_mul(K);
    x ^ (x >> 29)
}

/// splitmix64's finaliser.
fn finish(mut h: u64) -> u64 {
    h ^= h >> 30;
    h = h.wrapping_mul(0xBF58_476D_1CE4_E5B9);
    h ^= h >> 27;
    h = h.wrapping_mul(0x94D0_49BB_1331_11EB);
    h ^ (h >> 31)
}

fn mix_f64(h: u64, value: f64) -> u64 {
    let bits = value.to_bits();
    #[allow(clippy::cast_possible_truncation)]
    let (lo, hi) = (bits as u32, (bits >> 32) as u32);
    mix(mix(h, lo), hi)
}

/// Fingerprint of `rows` under `geometry` (every field but the fingerprint itself).
pub(crate) fn fingerprint(geometry: &TableGeometry, rows: &[TableRow]) -> u64 {
    let mut h = mix(0x6261_6e64_7465_6d70, geometry.level);
    h = mix(h, geometry.first_segment);
    h = mix(h, geometry.rows);
    h = mix(h, geometry.signal_lo.to_bits());
    h = mix(h, geometry.signal_hi.to_bits());
    for value in [
        geometry.lo_k,
        geometry.hi_k,
        geometry.tolerance_k,
        geometry.max_table_error_k,
        geometry.max_pixel_error_k,
    ] {
        h = mix_f64(h, value);
    }
    // Two independent lanes over the rows (even and odd words) keep two multiplies in
    // flight; they are joined before the finaliser.
    let mut a = h;
    let mut b = h ^ K;
    for row in rows {
        a = mix(a, row[0].to_bits());
        b = mix(b, row[1].to_bits());
        a = mix(a, row[2].to_bits());
        b = mix(b, row[3].to_bits());
    }
    finish(mix_f64(a ^ b.rotate_left(32), 0.0) ^ (rows.len() as u64))
}
