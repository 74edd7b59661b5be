//! Demo: from raw detector frames to kelvin on an invented uncooled camera.
//!
//! EVERYTHING HERE IS INVENTED: the camera (a fictional 160 x 120, 8-14 um
//! microbolometer core, simulated by the seeded model in `tests/nuc_support/sim.rs` with
//! per-pixel gain and offset spread, dead, stuck and noisy pixels, array-temperature
//! drift, self-emission of the housing and a shutter), the blackbody set-points and the
//! scene. No value is a measurement.
//!
//! The pipeline, in the order it runs:
//! 1. flat-field stacks at two blackbody temperatures (16 frames each, array at 303 K);
//! 2. bad-pixel map (stuck, gain, offset, noise rules) and two-point NUC maps;
//! 3. drift points at array temperatures 297-315 K, a quadratic drift model with the
//!    housing's self-emission through the exact band radiance;
//! 4. warm-up: the array drifts to 311 K; a shutter event refreshes the offsets;
//! 5. a scene frame converted to kelvin in one fused pass, against the simulator's truth;
//! 6. multi-point maps from a third flat field at 423.15 K (three levels, two segments),
//!    the shutter's offset change applied to both segments, the same frame converted.
//!
//! Run: `cargo run --release --example nuc_demo`
//!
//! A reading from this library is not a safety clearance: energised equipment, furnaces
//! and molten metal are inspected under the site's permits, local codes and licensed
//! practice.

#[path = "../tests/nuc_support/sim.rs"]
pub mod sim;

use bandtemp::band::SignalCurve;
use bandtemp::frame::{
    detect_bad_pixels, fpn_k, multi_point, multi_point_map_len, netd_k, shutter_refresh,
    shutter_target_counts, spatial_stats, two_point, BadPixelRules, Correction, CountsMap,
    DriftModel, DriftPoint, FrameConverter, FrameStack, Rails, TableRow, TemperatureRange,
};
use bandtemp::scene::Scene;
use bandtemp::Error;
use sim::{internal_k, Camera, Defect, HEIGHT, REFERENCE_FPA_K, WIDTH};

const N: usize = WIDTH * HEIGHT;
const BB_LOW_K: f64 = 293.15;
const BB_HIGH_K: f64 = 333.15;
/// The third flat-field level of the multi-point maps, above the scene's hottest part.
const BB_TOP_K: f64 = 423.15;

/// Accumulates `frames` flat-field frames into a fresh stack.
fn flat_stack<'a>(
    cam: &mut Camera,
    bb_k: f64,
    fpa_k: f64,
    frames: usize,
    mean: &'a mut [f64],
    m2: &'a mut [f64],
) -> Result<FrameStack<'a>, Error> {
    let mut stack = FrameStack::new(mean, m2)?;
    for _ in 0..frames {
        stack.add_counts(&cam.flat(bb_k, fpa_k, internal_k(fpa_k)))?;
    }
    Ok(stack)
}

/// Mean corrected counts over the good pixels.
fn corrected_mean(mean: &[f64], g: &[f32], o: &[f32], bad: &[u8]) -> f64 {
    let (mut sum, mut n) = (0.0, 0.0);
    for p in 0..mean.len() {
        if bad[p] == 0 {
            sum += f64::from(g[p]) * mean[p] + f64::from(o[p]);
            n += 1.0;
        }
    }
    sum / n
}

/// The invented scene: a 296 K wall with a warm pipe run and a hot flange; truth in K and
/// emissivity per pixel.
fn scene_truth(p: usize) -> (f64, f64) {
    let (x, y) = ((p % WIDTH) as f64, (p / WIDTH) as f64);
    let pipe = (y - 60.0).abs() < 12.0;
    let flange = (x - 110.0).powi(2) + (y - 60.0).powi(2) < 15.0f64.powi(2);
    if flange {
        (
            420.0 - 0.2 * ((x - 110.0).powi(2) + (y - 60.0).powi(2)),
            0.95,
        )
    } else if pipe {
        (340.0 + 0.25 * x, 0.95)
    } else {
        (296.0 + 0.02 * y, 0.95)
    }
}

/// What the demo measures.
#[derive(Debug)]
pub struct Figures {
    /// Planted defects and how many of them the bad-pixel map holds.
    pub planted: usize,
    /// Planted defects found.
    pub found: usize,
    /// Pixels flagged in all.
    pub flagged: u64,
    /// Residual FPN at 313.15 K before and after NUC, K.
    pub fpn_k: (f64, f64),
    /// Temporal NETD before and after NUC, K.
    pub netd_k: (f64, f64),
    /// Per correction case: worst error in the blackbody span, outside it, at replaced
    /// bad pixels, and the rms error over good pixels, K. Cases: no NUC; NUC and bad
    /// pixels; and the drift step; and the shutter; multi-point NUC (three levels) with bad
    /// pixels, drift step and shutter.
    pub errors: Vec<(f64, f64, f64, f64)>,
}

fn main() -> Result<(), Error> {
    let figures = run(true)?;
    if figures.found != figures.planted {
        println!(
            "note: {} planted defects not flagged",
            figures.planted - figures.found
        );
    }
    Ok(())
}

/// Runs the whole chain; prints the figures when `print` is set.
#[allow(clippy::too_many_lines)]
pub fn run(print: bool) -> Result<Figures, Error> {
    let mut cam = Camera::new(2026);
    let band = cam.band;
    let reflected_k = 293.15;

    // 1-2. Calibration at the reference array temperature.
    let (mut lm, mut l2, mut hm, mut h2) = (vec![0.0; N], vec![0.0; N], vec![0.0; N], vec![0.0; N]);
    let low = flat_stack(&mut cam, BB_LOW_K, REFERENCE_FPA_K, 16, &mut lm, &mut l2)?;
    let high = flat_stack(&mut cam, BB_HIGH_K, REFERENCE_FPA_K, 16, &mut hm, &mut h2)?;
    let (low, high) = (low.stats()?, high.stats()?);
    let mut bad = vec![0u8; N];
    let mut scratch = vec![0.0f32; N];
    let report = detect_bad_pixels(
        &low,
        &high,
        &BadPixelRules::default(),
        &mut scratch,
        &mut bad,
    )?;
    let planted: Vec<usize> = (0..N).filter(|&p| cam.defect[p] != Defect::None).collect();
    let found = planted.iter().filter(|&&p| bad[p] != 0).count();
    println!(
        "bad pixels: {report:?}; planted {}, found {found}",
        planted.len()
    );
    let (mut g, mut o) = (vec![0.0f32; N], vec![0.0f32; N]);
    let tp = two_point(&low, &high, Some(&bad), &mut g, &mut o)?;
    if print {
        println!(
            "two-point maps: <S_L> = {:.1}, <S_H> = {:.1} counts over {} good pixels",
            tp.mean_low, tp.mean_high, tp.good_pixels
        );
    }

    // Figures of merit at the reference: a separate 16-frame flat field at 313.15 K.
    let (mut vm, mut v2) = (vec![0.0; N], vec![0.0; N]);
    let check = flat_stack(&mut cam, 313.15, REFERENCE_FPA_K, 16, &mut vm, &mut v2)?;
    let check = check.stats()?;
    let slope = (tp.mean_high - tp.mean_low) / (band.signal(BB_HIGH_K)? - band.signal(BB_LOW_K)?)
        * band.signal_and_derivative(313.15)?.1; // counts per K
    let raw = spatial_stats(&check, Some(&bad), None)?;
    let nuc = spatial_stats(&check, Some(&bad), Some((&g, &o)))?;
    let fpn = (fpn_k(&raw, slope)?, fpn_k(&nuc, slope)?);
    let netd = (
        netd_k(raw.temporal_variance, slope)?,
        netd_k(nuc.temporal_variance, slope)?,
    );
    if print {
        println!("at 313.15 K, array 303 K (dx/dT = {slope:.2} counts/K):");
        println!(
            "  residual FPN: raw {:.3} K -> after NUC {:.4} K",
            fpn.0, fpn.1
        );
        println!(
            "  temporal NETD: raw {:.4} K, after NUC {:.4} K",
            netd.0, netd.1
        );
    }

    // 3. Drift calibration: two blackbodies at five array temperatures.
    let mut points = Vec::new();
    for fpa_k in [297.0, 301.0, 305.0, 310.0, 315.0] {
        let (mut a, mut b, mut c, mut d) = (vec![0.0; N], vec![0.0; N], vec![0.0; N], vec![0.0; N]);
        let lo = flat_stack(&mut cam, BB_LOW_K, fpa_k, 8, &mut a, &mut b)?;
        let hi = flat_stack(&mut cam, BB_HIGH_K, fpa_k, 8, &mut c, &mut d)?;
        points.push(DriftPoint {
            fpa_k,
            internal_k: internal_k(fpa_k),
            low_k: BB_LOW_K,
            high_k: BB_HIGH_K,
            low_counts: corrected_mean(lo.mean(), &g, &o, &bad),
            high_counts: corrected_mean(hi.mean(), &g, &o, &bad),
        });
    }
    let model = DriftModel::fit(&band, &points, 2)?;
    if print {
        println!("drift model: {model:?}");
    }

    // The converter's counts map: the drift model at the reference, so that the step is
    // close to identity there. S = g x' + o = (x' - D) / R.
    let (r, off) = model.at(REFERENCE_FPA_K)?;
    let d = off - r * band.signal(internal_k(REFERENCE_FPA_K))?;
    let counts_map = CountsMap::linear(1.0 / r, -d / r)?;
    let scene = Scene::new(0.95, reflected_k)?;
    let mut storage = vec![[0.0f32; 4] as TableRow; 256];
    let range = TemperatureRange::new(250.0, 600.0)?;
    let converter = FrameConverter::new(
        &band,
        &scene,
        counts_map,
        Rails::default(),
        range,
        1e-3,
        &mut storage,
    )?;

    // 4. Warm-up to 311 K; a shutter event at 310.6 K (shutter 0.4 K below the array).
    let (fpa_shutter, shutter_k) = (310.6, 310.2);
    let step = model.step(&band, counts_map, fpa_shutter, internal_k(fpa_shutter))?;
    let (mut sm, mut s2) = (vec![0.0; N], vec![0.0; N]);
    let mut shutter = FrameStack::new(&mut sm, &mut s2)?;
    for _ in 0..8 {
        shutter.add_counts(&cam.flat(shutter_k, fpa_shutter, internal_k(fpa_shutter)))?;
    }
    let target = shutter_target_counts(&band, counts_map, shutter_k)?;
    let mut o_refreshed = o.clone();
    shutter_refresh(
        &shutter.stats()?,
        &g,
        Some(&bad),
        target,
        step,
        &mut o_refreshed,
    )?;

    // 5. The scene frame at array 311 K.
    let fpa_k = 311.0;
    let radiance: Vec<f64> = (0..N)
        .map(|p| {
            let (t, e) = scene_truth(p);
            cam.scene_radiance(t, e, reflected_k)
        })
        .collect();
    let frame = cam.frame(&radiance, fpa_k, internal_k(fpa_k));
    let step = model.step(&band, counts_map, fpa_k, internal_k(fpa_k))?;
    let mut kelvin = vec![0.0f32; N];
    // Worst error of the good pixels inside the blackbody span (where two-point NUC is
    // exact for a linear pixel), of the good pixels outside it (the simulator's quadratic
    // term leaves G c (L - L_L)(L - L_H) there), of the replaced bad pixels; and the rms.
    let errors = |kelvin: &[f32], bad: &[u8]| {
        let (mut inside, mut outside, mut replaced, mut sum2) = (0.0f64, 0.0f64, 0.0f64, 0.0);
        for p in 0..N {
            let truth = scene_truth(p).0;
            let err = (f64::from(kelvin[p]) - truth).abs();
            if bad[p] != 0 {
                replaced = replaced.max(err);
            } else if (BB_LOW_K..=BB_HIGH_K).contains(&truth) {
                inside = inside.max(err);
                sum2 += err * err;
            } else {
                outside = outside.max(err);
                sum2 += err * err;
            }
        }
        (inside, outside, replaced, (sum2 / N as f64).sqrt())
    };
    let cases: [(&str, &[f32], &[f32], bool); 4] = [
        (
            "no NUC (unit maps), drift step only",
            &vec![1.0; N],
            &vec![0.0; N],
            false,
        ),
        ("NUC + bad pixels, no drift step", &g, &o, true),
        ("NUC + bad pixels + drift step", &g, &o, true),
        (
            "NUC + bad pixels + drift step + shutter",
            &g,
            &o_refreshed,
            true,
        ),
    ];
    if print {
        println!("scene at array {fpa_k} K (truth 296-420 K, e = 0.95); |T - truth| in K:");
        println!(
            "  {:<40} {:>7} {:>7} {:>7} {:>7}   {:>5} {:>3}",
            "correction", "in-span", "outside", "bad", "rms", "conv", "rep"
        );
    }
    let mut all_errors = Vec::new();
    for (i, (name, gm, om, use_bad)) in cases.iter().enumerate() {
        let none = vec![0u8; N];
        let flags = if *use_bad { &bad } else { &none };
        let mut c = Correction::new(gm, om, flags, WIDTH)?;
        if i != 1 {
            c = c.with_step(step)?;
        }
        let s = converter.convert_counts_corrected(&c, &frame, &mut kelvin)?;
        let (inside, outside, replaced, rms) = errors(&kelvin, &bad);
        if print {
            println!(
                "  {name:<40} {inside:7.3} {outside:7.3} {replaced:7.3} {rms:7.3}   {:>5} {:>3}",
                s.frame.converted, s.bad_replaced
            );
        }
        all_errors.push((inside, outside, replaced, rms));
    }

    // 6. Multi-point maps: a third flat field at 423.15 K, array at the reference (drawn
    // last so that every figure above keeps its random draws); the lower segment's levels
    // and means are the two-point ones, so the counts map and drift model still apply.
    let (mut tm, mut t2) = (vec![0.0; N], vec![0.0; N]);
    let top = flat_stack(&mut cam, BB_TOP_K, REFERENCE_FPA_K, 16, &mut tm, &mut t2)?;
    let top = top.stats()?;
    let mut multi_bad = bad.clone();
    let mut maps = vec![0.0f32; multi_point_map_len(3, N)?];
    let mp = multi_point(&[low, high, top], &mut multi_bad, &mut maps)?;
    // The shutter event is a one-point offset update: the pixel's drift moves every
    // segment's line by the same amount, the change the two-point refresh found (the
    // lower segment's map is the two-point map, bit for bit, when no pixel was flagged).
    for p in 0..N {
        let shift = o_refreshed[p] - o[p];
        for k in 0..2 {
            maps[2 * N + k * N + p] += shift;
        }
    }
    let c = Correction::multi_point(&maps, 3, &multi_bad, WIDTH)?.with_step(step)?;
    let s = converter.convert_counts_corrected(&c, &frame, &mut kelvin)?;
    let (inside, outside, replaced, rms) = errors(&kelvin, &multi_bad);
    if print {
        let name = "3-level NUC + bad + drift + shutter";
        println!(
            "  {name:<40} {inside:7.3} {outside:7.3} {replaced:7.3} {rms:7.3}   {:>5} {:>3}",
            s.frame.converted, s.bad_replaced
        );
        println!(
            "  (multi-point: {} pixels flagged by the order rule, {} good)",
            mp.order_flagged, mp.good_pixels
        );
    }
    all_errors.push((inside, outside, replaced, rms));
    Ok(Figures {
        planted: planted.len(),
        found,
        flagged: report.bad,
        fpn_k: fpn,
        netd_k: netd,
        errors: all_errors,
    })
}
