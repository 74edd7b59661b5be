//! The converter: a table, the scene's pixel map and the rails; the scalar reference path
//! per pixel and the batch conversions of whole frames.

use super::kernel::run;
use super::lookup::{mantissa_to_f32, Lookup};
use super::params::{CountsMap, Rails, TemperatureRange};
use super::pixel_map::PixelMap;
use super::summary::{FrameSummary, PixelStatus};
use super::table::{signal_ends, FrameTable, TableGeometry, TableRow};
use crate::band::SignalCurve;
use crate::error::{Error, Result};
use crate::scene::Scene;

/// Everything a converter is besides its rows: plain data (`#[repr(C)]`, `Copy`) that a C
/// caller can keep in static storage beside the rows.
#[repr(C)]
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ConverterState {
    /// The table's geometry and measured errors.
    pub geometry: TableGeometry,
    /// The scene's per-pixel coefficients.
    pub map: PixelMap,
    /// The counts map the coefficients were made with.
    pub counts: CountsMap,
    /// The detector's rails.
    pub rails: Rails,
}

/// A frame converter: a [`FrameTable`] plus the scene's per-pixel coefficients and the
/// detector's rails. Built once; the scene can be changed cheaply with
/// [`FrameConverter::set_scene`] (no table rebuild).
#[derive(Clone, Copy, Debug)]
pub struct FrameConverter<'t> {
    state: ConverterState,
    rows: &'t [TableRow],
    /// Counts n with dead < n < saturation and L(n) in the table's range, as f32 bounds
    /// [lo, hi] (empty when lo > hi): the uniform-scene validity test, derived from the
    /// state.
    window: (f32, f32),
}

#[inline(always)]
fn valid_emissivity(e: f32) -> bool {
    (e > 0.0) & (e <= 1.0)
}

impl<'t> FrameConverter<'t> {
    /// Builds the table for `curve` over `range` into `storage` (see
    /// [`FrameTable::build`]) and the coefficients of `scene` with counts map `counts`.
    ///
    /// `curve` is the object's blackbody signal in the units the counts map produces:
    /// a [`crate::band::Band`] with a radiometric [`CountsMap::linear`], or a
    /// [`crate::calibration::SakumaHattori`] in counts with [`CountsMap::dark_offset`].
    ///
    /// # Errors
    /// As [`FrameTable::build`] and [`PixelMap::new`].
    pub fn new<C: SignalCurve + ?Sized>(
        curve: &C,
        scene: &Scene,
        counts: CountsMap,
        rails: Rails,
        range: TemperatureRange,
        tolerance_k: f64,
        storage: &'t mut [TableRow],
    ) -> Result<Self> {
        let table = FrameTable::build(curve, range, tolerance_k, storage)?;
        let map = PixelMap::new(curve, scene, counts)?;
        let state = ConverterState {
            geometry: table.geometry,
            map,
            counts,
            rails,
        };
        Ok(FrameConverter {
            state,
            rows: table.rows,
            window: counts_window(&state),
        })
    }

    /// Re-wraps a state and rows kept by a caller.
    ///
    /// # Errors
    /// As [`FrameTable::from_parts`], and [`Error::FrameRailsInvalid`].
    pub fn from_parts(state: ConverterState, rows: &'t [TableRow]) -> Result<Self> {
        let table = FrameTable::from_parts(state.geometry, rows)?;
        Rails::new(state.rails.dead_counts, state.rails.saturation_counts)?;
        Ok(FrameConverter {
            state,
            rows: table.rows,
            window: counts_window(&state),
        })
    }

    /// The plain-data state (geometry, scene coefficients, counts map, rails).
    #[must_use]
    pub fn state(&self) -> ConverterState {
        self.state
    }

    /// The table.
    #[must_use]
    pub fn table(&self) -> FrameTable<'t> {
        FrameTable {
            geometry: self.state.geometry,
            rows: self.rows,
        }
    }

    /// Replaces the scene (emissivity, reflected temperature, air, window) without
    /// rebuilding the table. `curve` must be the table's curve: its signal at the range's
    /// ends must round to the table's f32 ends.
    ///
    /// # Errors
    /// [`Error::FrameCurveMismatch`], and as [`PixelMap::new`].
    pub fn set_scene<C: SignalCurve + ?Sized>(&mut self, curve: &C, scene: &Scene) -> Result<()> {
        let geometry = self.state.geometry;
        if signal_ends(curve, geometry.range())? != (geometry.signal_lo, geometry.signal_hi) {
            return Err(Error::FrameCurveMismatch);
        }
        self.state.map = PixelMap::new(curve, scene, self.state.counts)?;
        self.window = counts_window(&self.state);
        Ok(())
    }

    /// Replaces the rails.
    pub fn set_rails(&mut self, rails: Rails) {
        self.state.rails = rails;
        self.window = counts_window(&self.state);
    }

    /// Object temperature of one pixel from counts (the scalar reference path), K, and its
    /// status; NaN unless [`PixelStatus::Converted`]. `emissivity` overrides the scene's.
    #[must_use]
    pub fn pixel_from_counts(&self, counts: u16, emissivity: Option<f32>) -> (f32, PixelStatus) {
        let lookup = Lookup::new(&self.state.geometry, self.rows);
        let map = &self.state.map;
        let rails = self.state.rails;
        let status = if counts <= rails.dead_counts {
            PixelStatus::Dead
        } else if counts >= rails.saturation_counts {
            PixelStatus::Saturated
        } else {
            match emissivity {
                None => lookup.classify(map.object_counts(f32::from(counts))),
                Some(e) if valid_emissivity(e) && map.map_ready == 1 => {
                    lookup.classify(map.object_counts_e(f32::from(counts), e))
                }
                Some(_) => PixelStatus::EmissivityInvalid,
            }
        };
        let signal = match emissivity {
            None => map.object_counts(f32::from(counts)),
            Some(e) => map.object_counts_e(f32::from(counts), e),
        };
        finish(&lookup, signal, status)
    }

    /// Object temperature of one pixel from the sensor signal S (curve units), K, and its
    /// status, as [`FrameConverter::pixel_from_counts`].
    #[must_use]
    pub fn pixel_from_signal(&self, signal: f32, emissivity: Option<f32>) -> (f32, PixelStatus) {
        let lookup = Lookup::new(&self.state.geometry, self.rows);
        let map = &self.state.map;
        let object = match emissivity {
            None => map.object_signal(signal),
            Some(e) => map.object_signal_e(signal, e),
        };
        // The documented order: an invalid emissivity wins over a non-finite signal.
        let status = match emissivity {
            Some(e) if !(valid_emissivity(e) && map.map_ready == 1) => {
                PixelStatus::EmissivityInvalid
            }
            _ if !signal.is_finite() => PixelStatus::NonFinite,
            _ => lookup.classify(object),
        };
        finish(&lookup, object, status)
    }

    /// Converts a frame of counts to object temperature in K, pixel by pixel in order:
    /// `kelvin[i]` from `counts[i]` and, if given, `emissivity[i]` (which replaces the
    /// scene's emissivity for that pixel). Failed pixels come out NaN and are counted in
    /// the summary; they never stop the frame.
    ///
    /// Accuracy against exact inversion of the scene's measurement equation
    /// ([`Scene::object_temperature`]): uniform scene, at most
    /// [`TableGeometry::max_pixel_error_k`] (<= the tolerance); with an emissivity map,
    /// add about 2 f32 ulps of (|L - Lr| + Lr) converted to kelvin (|L - Lr| + Lr) *
    /// 1.2e-7 / L'(T) -- beyond the tolerance only where a cold, low-emissivity pixel
    /// sits in much hotter surroundings.
    ///
    /// # Errors
    /// [`Error::FrameLengthMismatch`] if the buffers differ in length;
    /// [`Error::FrameEmissivityMapUnavailable`] if a map is given but the curve had no
    /// signal at the reflected temperature.
    pub fn convert_counts(
        &self,
        counts: &[u16],
        emissivity: Option<&[f32]>,
        kelvin: &mut [f32],
    ) -> Result<FrameSummary> {
        check_lengths(counts.len(), emissivity, kelvin.len())?;
        let lookup = Lookup::new(&self.state.geometry, self.rows);
        let map = self.state.map;
        let (window_lo, window_hi) = self.window;
        // Rails compared in f32 (exact for u16): cheaper lanes than unsigned 16-bit compares.
        let (dead, saturated) = (
            f32::from(self.state.rails.dead_counts),
            f32::from(self.state.rails.saturation_counts),
        );
        let mut summary = FrameSummary {
            pixels: counts.len() as u64,
            ..FrameSummary::default()
        };
        match emissivity {
            None => run(
                &lookup,
                counts,
                None,
                kelvin,
                &mut summary,
                #[inline(always)]
                |n: u16, _| {
                    let x = f32::from(n);
                    ((x >= window_lo) & (x <= window_hi), map.object_counts(x))
                },
                |n: u16, _| self.pixel_from_counts(n, None).1,
            ),
            Some(em) => {
                if map.map_ready != 1 {
                    return Err(Error::FrameEmissivityMapUnavailable);
                }
                run(
                    &lookup,
                    counts,
                    Some(em),
                    kelvin,
                    &mut summary,
                    #[inline(always)]
                    |n: u16, e: f32| {
                        let x = f32::from(n);
                        let s = map.object_counts_e(x, e);
                        // Lane masks on x86-64 (`&`: 11 instead of 38 instructions per
                        // pixel), early exits elsewhere (`&&`: 109 instead of 123 on the
                        // Cortex-M4F); callgrind and the firmware measurement.
                        #[cfg(target_arch = "x86_64")]
                        let ok =
                            (x > dead) & (x < saturated) & valid_emissivity(e) & lookup.in_range(s);
                        #[cfg(not(target_arch = "x86_64"))]
                        let ok =
                            x > dead && x < saturated && valid_emissivity(e) && lookup.in_range(s);
                        (ok, s)
                    },
                    |n: u16, e| self.pixel_from_counts(n, Some(e)).1,
                );
            }
        }
        summary.converted = summary.pixels - summary.failed();
        Ok(summary)
    }

    /// Converts a frame of sensor signal S (the curve's units: band radiance in
    /// W m^-2 sr^-1 for a band curve, counts above dark for a Sakuma-Hattori curve) to
    /// object temperature in K, as [`FrameConverter::convert_counts`]. NaN or infinite
    /// inputs are counted as [`PixelStatus::NonFinite`].
    ///
    /// Accuracy: the table's plus the f32 rounding of S - B (about 1 ulp of S + B,
    /// converted to kelvin by 1/(G L'(T))).
    ///
    /// # Errors
    /// As [`FrameConverter::convert_counts`].
    pub fn convert_signal(
        &self,
        signal: &[f32],
        emissivity: Option<&[f32]>,
        kelvin: &mut [f32],
    ) -> Result<FrameSummary> {
        check_lengths(signal.len(), emissivity, kelvin.len())?;
        let lookup = Lookup::new(&self.state.geometry, self.rows);
        let map = self.state.map;
        let mut summary = FrameSummary {
            pixels: signal.len() as u64,
            ..FrameSummary::default()
        };
        match emissivity {
            None => run(
                &lookup,
                signal,
                None,
                kelvin,
                &mut summary,
                #[inline(always)]
                |s: f32, _| {
                    let l = map.object_signal(s);
                    (s.is_finite() & lookup.in_range(l), l)
                },
                |s: f32, _| self.pixel_from_signal(s, None).1,
            ),
            Some(em) => {
                if map.map_ready != 1 {
                    return Err(Error::FrameEmissivityMapUnavailable);
                }
                run(
                    &lookup,
                    signal,
                    Some(em),
                    kelvin,
                    &mut summary,
                    #[inline(always)]
                    |s: f32, e: f32| {
                        let l = map.object_signal_e(s, e);
                        (s.is_finite() & valid_emissivity(e) & lookup.in_range(l), l)
                    },
                    |s: f32, e| self.pixel_from_signal(s, Some(e)).1,
                );
            }
        }
        summary.converted = summary.pixels - summary.failed();
        Ok(summary)
    }
}

/// The counts n with dead < n < saturation whose uniform-scene signal lies in the table's
/// range. Every f32 operation of [`PixelMap::object_counts`] is monotone, so the set is an
/// interval; its ends come from two binary searches with the pixel path's own arithmetic.
fn counts_window(state: &ConverterState) -> (f32, f32) {
    let lookup = Lookup::new(&state.geometry, &[]);
    let signal = |n: u32| state.map.object_counts(mantissa_to_f32(n));
    let start = u32::from(state.rails.dead_counts) + 1;
    let end = u32::from(state.rails.saturation_counts);
    let first = partition_point(start, end, |n| signal(n) < lookup.lo);
    let past_last = partition_point(start, end, |n| signal(n) <= lookup.hi);
    if first < past_last {
        (mantissa_to_f32(first), mantissa_to_f32(past_last - 1))
    } else {
        (1.0, 0.0)
    }
}

/// The first n in [start, end) where `pred` is false, for a predicate that is true and
/// then false; `end` if it never fails.
fn partition_point<P: Fn(u32) -> bool>(start: u32, end: u32, pred: P) -> u32 {
    let (mut lo, mut hi) = (start, end.max(start));
    while lo < hi {
        let mid = lo + (hi - lo) / 2;
        if pred(mid) {
            lo = mid + 1;
        } else {
            hi = mid;
        }
    }
    lo
}

/// Output of one pixel: the table's temperature if converted, else NaN.
fn finish(lookup: &Lookup<'_>, signal: f32, status: PixelStatus) -> (f32, PixelStatus) {
    if status == PixelStatus::Converted {
        (lookup.temperature(signal), status)
    } else {
        (f32::NAN, status)
    }
}

fn check_lengths(input: usize, emissivity: Option<&[f32]>, output: usize) -> Result<()> {
    let map_ok = emissivity.is_none_or(|em| em.len() == input);
    if input == output && map_ok {
        Ok(())
    } else {
        Err(Error::FrameLengthMismatch)
    }
}
