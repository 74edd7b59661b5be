//! The x86-64 lookup kernel: row index, position, row load, Horner and the NaN select for
//! a chunk of [`LANES`] pixels, four at a time in SSE2 registers (SSE2 is part of every
//! x86-64 target, so no run-time detection is needed).
//!
//! Each pixel's row is one 16-byte load; four rows are transposed in registers into the
//! coefficient vectors c0..c3, and the polynomial is evaluated by the same multiplications
//! and additions in the same order as [`super::lookup::eval_row`] (IEEE single precision,
//! round to nearest, no fused multiply-add), so every value is bit for bit the portable
//! path's (the tests `simd_kernel_equals_portable_kernel_bit_for_bit` and the frame
//! proptests compare the two on every pixel).
//!
//! Where the processor has AVX2 (detected once at run time with `cpuid`; every x86-64
//! processor since about 2013-2015 has it), the whole batch loop is compiled a second time
//! with AVX2 enabled ([`with_avx2`]) and the lookup works on eight pixels per register
//! ([`lookup_chunk_avx2`]): the same operations in the same order, so the same bits
//! (neither path enables fused multiply-add, and Rust never contracts a * b + c).
//!
//! This is the one module of the core that uses `unsafe`: the intrinsics are `unsafe` to
//! call outside a `#[target_feature]` function, and the row loads read through a raw
//! pointer at an index clamped into the table, which is what makes them sound (see each
//! block). Everything else in the crate stays `unsafe`-free (`#![deny(unsafe_code)]`).
#![allow(unsafe_code)]
// The vector loads are the unaligned kind (`loadu`), so the casts to vector pointers
// need no alignment.
#![allow(clippy::cast_ptr_alignment)]

use core::arch::x86_64::{
    __m128, __m128i, _mm_add_ps, _mm_and_ps, _mm_and_si128, _mm_andnot_ps, _mm_andnot_si128,
    _mm_castps_si128, _mm_castsi128_ps, _mm_cmpgt_epi32, _mm_cvtepi32_ps, _mm_cvtsi128_si32,
    _mm_cvtsi32_si128, _mm_loadu_ps, _mm_loadu_si128, _mm_movehl_ps, _mm_movelh_ps,
    _mm_movemask_ps, _mm_mul_ps, _mm_or_ps, _mm_or_si128, _mm_set1_epi32, _mm_set1_ps,
    _mm_setzero_si128, _mm_shuffle_epi32, _mm_srl_epi32, _mm_storeu_ps, _mm_sub_epi32,
    _mm_unpackhi_ps, _mm_unpacklo_ps,
};

use core::arch::x86_64::{
    __cpuid, __cpuid_count, __m256i, _mm256_add_ps, _mm256_and_si256, _mm256_blendv_ps,
    _mm256_castps128_ps256, _mm256_castps_si256, _mm256_castsi256_ps, _mm256_cvtepi32_ps,
    _mm256_insertf128_ps, _mm256_loadu_ps, _mm256_loadu_si256, _mm256_min_epu32,
    _mm256_movemask_ps, _mm256_mul_ps, _mm256_set1_epi32, _mm256_set1_ps, _mm256_shuffle_ps,
    _mm256_srl_epi32, _mm256_storeu_ps, _mm256_storeu_si256, _mm256_sub_epi32, _mm256_unpackhi_ps,
    _mm256_unpacklo_ps, _xgetbv,
};
use core::sync::atomic::{AtomicU8, Ordering};

use super::lookup::Lookup;
use super::LANES;

// Four- and eight-lane groups tile a chunk exactly.
// (`is_multiple_of` needs Rust 1.87; the core keeps building with 1.85.)
#[allow(clippy::manual_is_multiple_of)]
const _: () = assert!(LANES % 8 == 0);

/// Table lookup of a chunk whose object signals and validity masks (all ones valid, zero
/// not) are known: writes each valid pixel's temperature and NaN for the others. Returns
/// true if any pixel is invalid. A signal outside the table gives a row index clamped into the
/// table (its value is discarded by the select), never a read outside the rows.
#[inline(always)]
#[allow(clippy::cast_possible_wrap, clippy::cast_sign_loss)]
pub(super) fn lookup_chunk(
    lookup: &Lookup<'_>,
    signal: &[f32; LANES],
    valid: &[i32; LANES],
    out: &mut [f32; LANES],
) -> bool {
    let rows = lookup.rows;
    // An empty table converts nothing (never reached: a converter's table has rows).
    let Some(last) = rows.len().checked_sub(1) else {
        *out = [f32::NAN; LANES];
        return true;
    };
    // At most MAX_TABLE_ROWS = 2048 rows in a valid table; a longer caller slice is only
    // read up to i32::MAX rows, which keeps the signed clamp below exact.
    let last = i32::try_from(last).unwrap_or(i32::MAX);
    let base = rows.as_ptr().cast::<f32>();
    let mut any_invalid = 0;
    // SAFETY: SSE and SSE2 are enabled on every x86-64 target (this module is compiled
    // only with `target_feature = "sse2"`); the intrinsics below only read and write
    // registers, except the loads and stores, whose pointers are each derived from a
    // reference to an array of at least 4 * 4 elements past the offset used (the
    // chunk arrays: 4 * g + 3 < LANES) or from a row index clamped into 0..=last.
    unsafe {
        let shift = _mm_cvtsi32_si128(lookup.shift as i32);
        let first = _mm_set1_epi32(lookup.first as i32);
        let mask = _mm_set1_epi32(lookup.mask as i32);
        let last_v = _mm_set1_epi32(last);
        let zero = _mm_setzero_si128();
        let nan = _mm_set1_ps(f32::NAN);
        for g in 0..LANES / 4 {
            let s = _mm_loadu_ps(signal.as_ptr().add(4 * g));
            let bits = _mm_castps_si128(s);
            let index = _mm_sub_epi32(_mm_srl_epi32(bits, shift), first);
            let index = clamp(index, zero, last_v);
            let t = _mm_cvtepi32_ps(_mm_and_si128(bits, mask));
            // Each index is in 0..=last, so each 16-byte row read lies inside `rows`.
            let row = |i: __m128i| -> __m128 {
                let k = _mm_cvtsi128_si32(i) as u32 as usize;
                _mm_loadu_ps(base.add(4 * k))
            };
            let a = row(index);
            let b = row(_mm_shuffle_epi32::<0x55>(index));
            let c = row(_mm_shuffle_epi32::<0xaa>(index));
            let d = row(_mm_shuffle_epi32::<0xff>(index));
            let ab_lo = _mm_unpacklo_ps(a, b);
            let cd_lo = _mm_unpacklo_ps(c, d);
            let ab_hi = _mm_unpackhi_ps(a, b);
            let cd_hi = _mm_unpackhi_ps(c, d);
            let c0 = _mm_movelh_ps(ab_lo, cd_lo);
            let c1 = _mm_movehl_ps(cd_lo, ab_lo);
            let c2 = _mm_movelh_ps(ab_hi, cd_hi);
            let c3 = _mm_movehl_ps(cd_hi, ab_hi);
            let value = _mm_add_ps(
                _mm_mul_ps(
                    _mm_add_ps(_mm_mul_ps(_mm_add_ps(_mm_mul_ps(c3, t), c2), t), c1),
                    t,
                ),
                c0,
            );
            let ok = _mm_castsi128_ps(_mm_loadu_si128(valid.as_ptr().add(4 * g).cast::<__m128i>()));
            let value = _mm_or_ps(_mm_and_ps(ok, value), _mm_andnot_ps(ok, nan));
            _mm_storeu_ps(out.as_mut_ptr().add(4 * g), value);
            any_invalid |= _mm_movemask_ps(ok) ^ 0xf;
        }
    }
    any_invalid != 0
}

/// Signed clamp of four 32-bit lanes into [lo, hi] (SSE2 has compares, not min/max).
#[inline(always)]
fn clamp(x: __m128i, lo: __m128i, hi: __m128i) -> __m128i {
    // SAFETY: SSE2 is enabled on every x86-64 target; register operations only.
    unsafe {
        let above = _mm_cmpgt_epi32(x, hi);
        let x = _mm_or_si128(_mm_and_si128(above, hi), _mm_andnot_si128(above, x));
        let below = _mm_cmpgt_epi32(lo, x);
        _mm_or_si128(_mm_and_si128(below, lo), _mm_andnot_si128(below, x))
    }
}

/// Whether this processor and operating system support AVX2 (cached after the first call).
pub(super) fn avx2() -> bool {
    static STATE: AtomicU8 = AtomicU8::new(0);
    match STATE.load(Ordering::Relaxed) {
        1 => false,
        2 => true,
        _ => {
            let has = detect_avx2();
            STATE.store(if has { 2 } else { 1 }, Ordering::Relaxed);
            has
        }
    }
}

/// AVX2 support: the instruction set (cpuid leaf 7, EBX bit 5), AVX (leaf 1, ECX bit 28)
/// and the operating system saving the vector registers (leaf 1 ECX bit 27 OSXSAVE, then
/// XCR0 bits 1 and 2).
fn detect_avx2() -> bool {
    // SAFETY: `cpuid` exists on every x86-64 processor; `xgetbv` is executed only when
    // cpuid reports OSXSAVE, i.e. when the instruction is available.
    unsafe {
        if __cpuid(0).eax < 7 {
            return false;
        }
        let leaf1 = __cpuid(1);
        if leaf1.ecx & (1 << 27) == 0 || leaf1.ecx & (1 << 28) == 0 {
            return false;
        }
        if xcr0() & 0b110 != 0b110 {
            return false;
        }
        __cpuid_count(7, 0).ebx & (1 << 5) != 0
    }
}

/// The extended control register XCR0.
#[target_feature(enable = "xsave")]
unsafe fn xcr0() -> u64 {
    _xgetbv(0)
}

/// Runs `body` compiled with AVX2 enabled: everything it inlines (the batch loop, its
/// closures and [`lookup_chunk_avx2`]) is generated for AVX2.
///
/// # Safety
/// The processor must support AVX2 ([`avx2`]).
#[target_feature(enable = "avx2")]
#[inline]
pub(super) unsafe fn with_avx2<R>(body: impl FnOnce() -> R) -> R {
    body()
}

/// [`lookup_chunk`] eight pixels at a time (AVX2): the row index clamped by one unsigned
/// minimum, the eight row loads paired into 256-bit registers (pixel j and j + 4 of a
/// group), the 4x4 transposes inside each 128-bit half, Horner and a blend.
///
/// # Safety
/// The processor must support AVX2 ([`avx2`]).
#[target_feature(enable = "avx2")]
#[inline]
#[allow(clippy::cast_possible_wrap)]
pub(super) unsafe fn lookup_chunk_avx2(
    lookup: &Lookup<'_>,
    signal: &[f32; LANES],
    valid: &[i32; LANES],
    out: &mut [f32; LANES],
) -> bool {
    let rows = lookup.rows;
    let Some(last) = rows.len().checked_sub(1) else {
        *out = [f32::NAN; LANES];
        return true;
    };
    let last = u32::try_from(last).unwrap_or(u32::MAX);
    let base = rows.as_ptr().cast::<f32>();
    let shift = _mm_cvtsi32_si128(lookup.shift as i32);
    let first = _mm256_set1_epi32(lookup.first as i32);
    let mask = _mm256_set1_epi32(lookup.mask as i32);
    let last_v = _mm256_set1_epi32(last as i32);
    let nan = _mm256_set1_ps(f32::NAN);
    let mut any_invalid = 0;
    // SAFETY: the caller guarantees AVX2; the chunk loads and stores stay inside the
    // chunk arrays (8 * g + 7 < LANES); every row index is at most `last` (unsigned
    // minimum), so each 16-byte row read lies inside `rows`.
    unsafe {
        for g in 0..LANES / 8 {
            let s = _mm256_loadu_ps(signal.as_ptr().add(8 * g));
            let bits = _mm256_castps_si256(s);
            let index = _mm256_min_epu32(
                _mm256_sub_epi32(_mm256_srl_epi32(bits, shift), first),
                last_v,
            );
            let t = _mm256_cvtepi32_ps(_mm256_and_si256(bits, mask));
            let mut k = [0u32; 8];
            _mm256_storeu_si256(k.as_mut_ptr().cast::<__m256i>(), index);
            let row = |i: u32| _mm_loadu_ps(base.add(4 * i as usize));
            let pair = |lo: u32, hi: u32| {
                _mm256_insertf128_ps::<1>(_mm256_castps128_ps256(row(lo)), row(hi))
            };
            let a = pair(k[0], k[4]);
            let b = pair(k[1], k[5]);
            let c = pair(k[2], k[6]);
            let d = pair(k[3], k[7]);
            let ab_lo = _mm256_unpacklo_ps(a, b);
            let cd_lo = _mm256_unpacklo_ps(c, d);
            let ab_hi = _mm256_unpackhi_ps(a, b);
            let cd_hi = _mm256_unpackhi_ps(c, d);
            let c0 = _mm256_shuffle_ps::<0x44>(ab_lo, cd_lo);
            let c1 = _mm256_shuffle_ps::<0xee>(ab_lo, cd_lo);
            let c2 = _mm256_shuffle_ps::<0x44>(ab_hi, cd_hi);
            let c3 = _mm256_shuffle_ps::<0xee>(ab_hi, cd_hi);
            let value = _mm256_add_ps(
                _mm256_mul_ps(
                    _mm256_add_ps(
                        _mm256_mul_ps(_mm256_add_ps(_mm256_mul_ps(c3, t), c2), t),
                        c1,
                    ),
                    t,
                ),
                c0,
            );
            let ok = _mm256_castsi256_ps(_mm256_loadu_si256(
                valid.as_ptr().add(8 * g).cast::<__m256i>(),
            ));
            _mm256_storeu_ps(
                out.as_mut_ptr().add(8 * g),
                _mm256_blendv_ps(nan, value, ok),
            );
            any_invalid |= _mm256_movemask_ps(ok) ^ 0xff;
        }
    }
    any_invalid != 0
}

#[cfg(test)]
mod tests {
    use super::super::kernel::portable_lookup;
    use super::*;
    use crate::band::Band;
    use crate::frame::{CountsMap, FrameConverter, Rails, TemperatureRange};
    use crate::planck::Detector;
    use crate::scene::Scene;
    use crate::test_rng::Lcg;

    /// The SSE2 and AVX2 lookups against the portable one on every lane of random chunks:
    /// signals inside the table, around and far outside it, NaN, infinities, zero,
    /// negative and arbitrary bit patterns, with random validity masks. Outputs and
    /// failure flags equal bit for bit.
    #[test]
    #[allow(
        clippy::cast_precision_loss,
        clippy::large_stack_arrays,
        clippy::manual_is_multiple_of
    )]
    fn simd_kernel_equals_portable_kernel_bit_for_bit() {
        for (lo_um, hi_um, range, tolerance_k) in [
            (8.0, 14.0, (250.0, 600.0), 1e-3),
            (3.0, 5.0, (300.0, 1500.0), 1e-2),
            (0.9, 1.1, (900.0, 3000.0), 0.1),
        ] {
            let band = Band::rectangular(lo_um, hi_um, Detector::Energy).unwrap();
            let scene = Scene::new(0.9, 293.15).unwrap();
            let mut storage = [[0.0f32; 4]; 2048];
            let converter = FrameConverter::new(
                &band,
                &scene,
                CountsMap::linear(1.0, 0.0).unwrap(),
                Rails::default(),
                TemperatureRange::new(range.0, range.1).unwrap(),
                tolerance_k,
                &mut storage,
            )
            .unwrap();
            let table = converter.table();
            let geometry = table.geometry();
            // The lookup over the table's rows, and over a longer caller slice.
            let mut longer = [[7.0f32; 4]; 2048];
            longer[..table.rows().len()].copy_from_slice(table.rows());
            for rows in [table.rows(), &longer[..]] {
                let lookup = Lookup::new(&geometry, rows);
                let mut rng = Lcg(20_261_203);
                for round in 0..4000 {
                    let mut signal = [0.0f32; LANES];
                    let mut valid = [0i32; LANES];
                    for (s, v) in signal.iter_mut().zip(valid.iter_mut()) {
                        let u = rng.next_u32();
                        let span = lookup.hi - lookup.lo;
                        *s = match u % 8 {
                            0 => f32::from_bits(rng.next_u32()),
                            1 => [f32::NAN, f32::INFINITY, -f32::INFINITY, 0.0, -1.0]
                                [(rng.next_u32() % 5) as usize],
                            2 => lookup.lo - span * (rng.next_u32() as f32 / 4.3e9),
                            3 => lookup.hi + span * (rng.next_u32() as f32 / 4.3e9) * 100.0,
                            _ => lookup.lo + span * (rng.next_u32() as f32 / 4.295e9),
                        };
                        // Mostly valid lanes; every lane invalid in some rounds.
                        *v = if round % 7 == 0 || u % 5 == 0 { 0 } else { -1 };
                        if u % 5 != 0 && round % 7 != 0 && !lookup.in_range(*s) {
                            *v = 0;
                        }
                    }
                    let mut want = [0.0f32; LANES];
                    let want_flag = portable_lookup(&lookup, &signal, &valid, &mut want);
                    let mut got = [1.0f32; LANES];
                    let flag = lookup_chunk(&lookup, &signal, &valid, &mut got);
                    assert_eq!(flag, want_flag, "round {round}");
                    for j in 0..LANES {
                        assert_eq!(got[j].to_bits(), want[j].to_bits(), "SSE2 lane {j}");
                    }
                    if avx2() {
                        let mut wide = [1.0f32; LANES];
                        // SAFETY: AVX2 was detected.
                        let flag =
                            unsafe { lookup_chunk_avx2(&lookup, &signal, &valid, &mut wide) };
                        assert_eq!(flag, want_flag, "round {round}");
                        for j in 0..LANES {
                            assert_eq!(wide[j].to_bits(), want[j].to_bits(), "AVX2 lane {j}");
                        }
                    }
                }
            }
        }
    }

    /// The detection agrees with the standard library's (which this `no_std` crate cannot
    /// use outside tests).
    #[test]
    fn avx2_detection_agrees_with_std() {
        extern crate std;
        assert_eq!(avx2(), std::is_x86_feature_detected!("avx2"));
    }
}
