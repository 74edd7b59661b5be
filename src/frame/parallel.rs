//! Whole frames on several cores, for plant software (feature `std`; firmware and the
//! `no_std` build never see it).
//!
//! Pixels of a uniform-scene or emissivity-map conversion are independent, so a frame is
//! split into contiguous bands of pixels (whole chunks of [`super::LANES`], so that every
//! band runs the same vector loop as the serial call) converted on scoped threads
//! (`std::thread::scope`: no pool, no allocation by this crate, no dependency). Each pixel
//! gets exactly the value the serial call gives it (`tests/frame_parallel.rs` checks every
//! pixel bit for bit); the summaries are added. Worth it from a few hundred thousand pixels:
//! a thread start costs some tens of microseconds (measured in `benches/frame.rs`).

use core::num::NonZeroUsize;

use super::converter::FrameConverter;
use super::summary::FrameSummary;
use super::LANES;
use crate::error::{Error, Result};

impl FrameConverter<'_> {
    /// As [`FrameConverter::convert_counts`], on `threads` threads (the calling thread is
    /// one of them). Every pixel and the summary equal the serial call's.
    ///
    /// # Errors
    /// As [`FrameConverter::convert_counts`], checked before any thread starts.
    pub fn convert_counts_parallel(
        &self,
        counts: &[u16],
        emissivity: Option<&[f32]>,
        kelvin: &mut [f32],
        threads: NonZeroUsize,
    ) -> Result<FrameSummary> {
        if counts.len() != kelvin.len() || emissivity.is_some_and(|e| e.len() != counts.len()) {
            return Err(Error::FrameLengthMismatch);
        }
        let band = band_pixels(counts.len(), threads);
        if band >= counts.len() {
            return self.convert_counts(counts, emissivity, kelvin);
        }
        std::thread::scope(|scope| {
            let mut handles = [const { None }; MAX_THREADS];
            let mut counts_rest = counts;
            let mut kelvin_rest = &mut *kelvin;
            let mut emissivity_rest = emissivity;
            let mut first = None;
            let mut slot = 0;
            while !counts_rest.is_empty() {
                let take = band.min(counts_rest.len());
                let (c, c_rest) = counts_rest.split_at(take);
                let (k, k_rest) = core::mem::take(&mut kelvin_rest).split_at_mut(take);
                let (e, e_rest) = match emissivity_rest {
                    Some(map) => {
                        let (e, rest) = map.split_at(take);
                        (Some(e), Some(rest))
                    }
                    None => (None, None),
                };
                counts_rest = c_rest;
                kelvin_rest = k_rest;
                emissivity_rest = e_rest;
                if first.is_none() {
                    first = Some((c, e, k));
                } else if let Some(handle) = handles.get_mut(slot) {
                    *handle = Some(scope.spawn(move || self.convert_counts(c, e, k)));
                    slot += 1;
                }
            }
            let mut total = match first {
                Some((c, e, k)) => self.convert_counts(c, e, k)?,
                None => FrameSummary::default(),
            };
            for handle in handles.iter_mut().filter_map(Option::take) {
                // The conversion never panics; if it ever did, the panic goes on here as
                // it would in a serial call.
                let part = match handle.join() {
                    Ok(part) => part?,
                    Err(payload) => std::panic::resume_unwind(payload),
                };
                total.add(&part);
            }
            Ok(total)
        })
    }
}

/// Most threads used, however many are asked for.
pub const MAX_THREADS: usize = 64;

/// Pixels per band: the frame split evenly over at most [`MAX_THREADS`] threads, rounded
/// up to whole chunks of [`LANES`].
fn band_pixels(pixels: usize, threads: NonZeroUsize) -> usize {
    let threads = threads.get().min(MAX_THREADS);
    let per = pixels.div_ceil(threads);
    per.div_ceil(LANES).saturating_mul(LANES).max(LANES)
}
