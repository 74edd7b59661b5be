//! The batch kernel: chunks of [`LANES`] pixels through signal, index, row load and
//! Horner passes the compiler vectorises; the tail and failed pixels through the scalar
//! path. A vector kernel for a specific target hooks in here (see [`chunk`]).

use super::lookup::Lookup;
use super::summary::{FrameSummary, PixelStatus};
use super::LANES;

/// One chunk of [`LANES`] pixels: object signals and validity masks (vectorisable), then
/// the lookup (`simd.rs` on x86-64, [`portable_lookup`] elsewhere). Returns true if any
/// pixel failed.
#[inline(always)]
fn chunk<const WIDE: bool, I: Copy, S>(
    lookup: &Lookup<'_>,
    input: &[I; LANES],
    emissivity: &[f32; LANES],
    out: &mut [f32; LANES],
    signal_of: &S,
) -> bool
where
    S: Fn(I, f32) -> (bool, f32),
{
    let mut signal = [0.0f32; LANES];
    // Validity as lane masks (all ones or zero), the form vector compares produce.
    let mut valid = [0i32; LANES];
    for j in 0..LANES {
        let (v, s) = signal_of(input[j], emissivity[j]);
        valid[j] = -i32::from(v);
        signal[j] = s;
    }
    #[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
    {
        if WIDE {
            // SAFETY: `WIDE` is true only inside `simd::with_avx2`, which `run` calls
            // only after `simd::avx2()` found AVX2.
            #[allow(unsafe_code)]
            unsafe {
                super::simd::lookup_chunk_avx2(lookup, &signal, &valid, out)
            }
        } else {
            super::simd::lookup_chunk(lookup, &signal, &valid, out)
        }
    }
    #[cfg(not(all(target_arch = "x86_64", target_feature = "sse2")))]
    {
        portable_lookup(lookup, &signal, &valid, out)
    }
}

/// The portable lookup of a chunk (every target; x86-64 uses `simd.rs`, whose results
/// equal these bit for bit): row indices and positions (vectorisable), row loads (scalar
/// gathers), Horner and the NaN select (vectorisable). Returns true if any pixel failed.
#[cfg_attr(
    all(target_arch = "x86_64", target_feature = "sse2", not(test)),
    allow(dead_code)
)]
#[inline(always)]
pub(super) fn portable_lookup(
    lookup: &Lookup<'_>,
    signal: &[f32; LANES],
    valid: &[i32; LANES],
    out: &mut [f32; LANES],
) -> bool {
    let mut index = [0u32; LANES];
    let mut t = [0.0f32; LANES];
    for j in 0..LANES {
        (index[j], t[j]) = lookup.segment_u32(signal[j]);
    }
    let mut c0 = [0.0f32; LANES];
    let mut c1 = [0.0f32; LANES];
    let mut c2 = [0.0f32; LANES];
    let mut c3 = [0.0f32; LANES];
    let rows = lookup.rows;
    let Some(last) = rows.len().checked_sub(1) else {
        *out = [f32::NAN; LANES];
        return true;
    };
    for j in 0..LANES {
        // Provably in bounds (i <= last < len), so the fallback compiles away.
        let row = rows
            .get((index[j] as usize).min(last))
            .copied()
            .unwrap_or([f32::NAN; 4]);
        c0[j] = row[0];
        c1[j] = row[1];
        c2[j] = row[2];
        c3[j] = row[3];
    }
    let mut good = -1i32;
    for j in 0..LANES {
        let value = ((c3[j] * t[j] + c2[j]) * t[j] + c1[j]) * t[j] + c0[j];
        out[j] = if valid[j] != 0 { value } else { f32::NAN };
        good &= valid[j];
    }
    good == 0
}

/// The batch loop: full chunks through [`chunk`], the tail and every failed pixel through
/// the scalar path (`classify` gives the failed pixel's status). On x86-64 processors with
/// AVX2 the loop runs compiled for AVX2 (same bits; see `simd.rs`).
#[inline(always)]
pub(super) fn run<I: Copy, S, K>(
    lookup: &Lookup<'_>,
    input: &[I],
    emissivity: Option<&[f32]>,
    out: &mut [f32],
    summary: &mut FrameSummary,
    signal_of: S,
    classify: K,
) where
    S: Fn(I, f32) -> (bool, f32),
    K: Fn(I, f32) -> PixelStatus,
{
    #[cfg(all(target_arch = "x86_64", target_feature = "sse2"))]
    if super::simd::avx2() {
        // SAFETY: the processor supports AVX2 (just checked).
        #[allow(unsafe_code)]
        unsafe {
            super::simd::with_avx2(
                #[inline(always)]
                || {
                    run_with::<true, I, S, K>(
                        lookup, input, emissivity, out, summary, signal_of, classify,
                    );
                },
            );
        }
        return;
    }
    run_with::<false, I, S, K>(lookup, input, emissivity, out, summary, signal_of, classify);
}

/// [`run`] for one instruction set: `WIDE` selects the AVX2 lookup (x86-64 only, and only
/// inside `simd::with_avx2`).
#[inline(always)]
pub(super) fn run_with<const WIDE: bool, I: Copy, S, K>(
    lookup: &Lookup<'_>,
    input: &[I],
    emissivity: Option<&[f32]>,
    out: &mut [f32],
    summary: &mut FrameSummary,
    signal_of: S,
    classify: K,
) where
    S: Fn(I, f32) -> (bool, f32),
    K: Fn(I, f32) -> PixelStatus,
{
    const ONES: [f32; LANES] = [1.0; LANES];
    let mut tally = |input: &[I], emissivity: Option<&[f32]>, out: &[f32]| {
        for (k, (&x, &value)) in input.iter().zip(out).enumerate() {
            if value.is_nan() {
                let e = emissivity.and_then(|em| em.get(k).copied()).unwrap_or(1.0);
                summary.record(classify(x, e));
            }
        }
    };
    let whole = input.len() - input.len() % LANES;
    let (input_body, input_tail) = input.split_at(whole.min(input.len()));
    let (out_body, out_tail) = out.split_at_mut(whole.min(out.len()));
    match emissivity {
        None => {
            for (x, y) in input_body
                .chunks_exact(LANES)
                .zip(out_body.chunks_exact_mut(LANES))
            {
                let (Ok(xa), Ok(ya)) = (
                    <&[I; LANES]>::try_from(x),
                    <&mut [f32; LANES]>::try_from(&mut *y),
                ) else {
                    continue;
                };
                if chunk::<WIDE, I, S>(lookup, xa, &ONES, ya, &signal_of) {
                    tally(x, None, y);
                }
            }
            scalar_tail(lookup, input_tail, None, out_tail, &signal_of);
            tally(input_tail, None, out_tail);
        }
        Some(em) => {
            let (em_body, em_tail) = em.split_at(whole.min(em.len()));
            for ((x, e), y) in input_body
                .chunks_exact(LANES)
                .zip(em_body.chunks_exact(LANES))
                .zip(out_body.chunks_exact_mut(LANES))
            {
                let (Ok(xa), Ok(ea), Ok(ya)) = (
                    <&[I; LANES]>::try_from(x),
                    <&[f32; LANES]>::try_from(e),
                    <&mut [f32; LANES]>::try_from(&mut *y),
                ) else {
                    continue;
                };
                if chunk::<WIDE, I, S>(lookup, xa, ea, ya, &signal_of) {
                    tally(x, Some(e), y);
                }
            }
            scalar_tail(lookup, input_tail, Some(em_tail), out_tail, &signal_of);
            tally(input_tail, Some(em_tail), out_tail);
        }
    }
}

/// The pixels after the last full chunk, one at a time.
fn scalar_tail<I: Copy, S>(
    lookup: &Lookup<'_>,
    input: &[I],
    emissivity: Option<&[f32]>,
    out: &mut [f32],
    signal_of: &S,
) where
    S: Fn(I, f32) -> (bool, f32),
{
    for (k, (&x, y)) in input.iter().zip(out.iter_mut()).enumerate() {
        let e = emissivity.and_then(|em| em.get(k).copied()).unwrap_or(1.0);
        let (valid, s) = signal_of(x, e);
        *y = if valid {
            lookup.temperature(s)
        } else {
            f32::NAN
        };
    }
}
