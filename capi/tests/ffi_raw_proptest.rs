//! The raw-frame exports (`capi/src/raw.rs`) driven with arbitrary bit patterns: f64
//! arguments, f32 map values, drift models and points, bad-pixel maps and frame
//! geometry. No panic; every result a value or a named status; out values written only
//! on success; agreement with the Rust API they wrap.

use bandtemp::band::Band;
use bandtemp::frame::{
    effective_exponent, multi_point, net_signal, netd_k, Correction, CountsMap, DriftStep,
    FrameConverter, Rails, StackStats, TableRow, TemperatureRange,
};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use bandtemp::Error;
use bandtemp_capi::*;
use proptest::prelude::*;

mod common;
use common::{any_f64_to, SENTINEL};

fn any_f64() -> impl Strategy<Value = f64> {
    any_f64_to(4.0)
}

fn any_f32() -> impl Strategy<Value = f32> {
    prop_oneof![
        2 => any::<u32>().prop_map(f32::from_bits),
        1 => prop::sample::select(&[f32::NAN, f32::INFINITY, -1.0f32, 0.0, 1.0, 1e-40, 3e38][..]),
        3 => 0.5f32..1.5,
    ]
}

fn lwir() -> bt_band {
    bt_band {
        lo_um: 8.0,
        hi_um: 14.0,
        detector: bt_detector::Energy,
        response_um: core::ptr::null(),
        response: core::ptr::null(),
        response_len: 0,
    }
}

fn rust_band() -> Band<'static> {
    Band::rectangular(8.0, 14.0, Detector::Energy).unwrap()
}

/// Success with a finite value, or an error with the out value untouched.
fn sane(s: bt_status, out: f64) -> bool {
    if s == bt_status::Ok {
        out.is_finite()
    } else {
        out.to_bits() == SENTINEL.to_bits()
    }
}

fn status_of<T>(r: &Result<T, Error>) -> bt_status {
    match r {
        Ok(_) => bt_status::Ok,
        Err(e) => bt_status::from(*e),
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn scalar_exports_agree_with_rust(a in any_f64(), b in any_f64(), c in any_f64()) {
        let band = lwir();
        let mut out = SENTINEL;
        // SAFETY: valid pointers.
        let s = unsafe { bt_netd_k(a, b, &mut out) };
        let r = netd_k(a, b);
        prop_assert_eq!(s, status_of(&r));
        match r {
            Ok(v) => prop_assert_eq!(out.to_bits(), v.to_bits()),
            Err(_) => prop_assert_eq!(out.to_bits(), SENTINEL.to_bits()),
        }
        let mut out = SENTINEL;
        // SAFETY: valid pointers.
        let s = unsafe { bt_effective_exponent_band(&band, a, &mut out) };
        let r = effective_exponent(&rust_band(), a);
        prop_assert_eq!(s, status_of(&r));
        prop_assert!(sane(s, out), "status {:?}, out {}", s, out);
        let mut out = SENTINEL;
        // SAFETY: valid pointers.
        let s = unsafe { bt_net_signal_band(&band, a, b, c, 300.0, &mut out) };
        let r = net_signal(&rust_band(), a, b, c, 300.0);
        prop_assert_eq!(s, status_of(&r));
        prop_assert!(sane(s, out), "status {:?}, out {}", s, out);
        let mut out = SENTINEL;
        // SAFETY: valid pointers.
        let s = unsafe { bt_object_from_net_signal_band(&band, a, b, c, 300.0, &mut out) };
        prop_assert!(sane(s, out), "status {:?}, out {}", s, out);
        let mut out = SENTINEL;
        // SAFETY: valid pointers.
        let s = unsafe { bt_nuc_shutter_target_band(&band, a, b, c, &mut out) };
        prop_assert!(sane(s, out), "status {:?}, out {}", s, out);
    }

    #[test]
    fn drift_exports_never_fail_open(
        fields in prop::collection::vec(any_f64(), 18),
        model in prop::collection::vec(any_f64(), 7),
        degree in 0u32..5,
        n in 0usize..4,
        t in any_f64(),
    ) {
        let band = lwir();
        let points: Vec<bt_drift_point> = fields.chunks(6).map(|f| bt_drift_point {
            fpa_k: f[0], internal_k: f[1], low_k: f[2], high_k: f[3], low_counts: f[4], high_counts: f[5],
        }).collect();
        let sentinel = bt_drift_model { reference_k: SENTINEL, degree: 77, responsivity: [SENTINEL; 3], offset: [SENTINEL; 3] };
        let mut out = sentinel;
        // SAFETY: valid pointers; n <= 3 points.
        let s = unsafe { bt_drift_fit_band(&band, points.as_ptr(), n, degree, &mut out) };
        if s == bt_status::Ok {
            prop_assert!(out.reference_k.is_finite() && out.degree <= 2);
        } else {
            prop_assert_eq!(out, sentinel);
        }
        let m = bt_drift_model {
            reference_k: model[0], degree: degree % 3,
            responsivity: [model[1], model[2], model[3]], offset: [model[4], model[5], model[6]],
        };
        // The same points through an arbitrary Sakuma-Hattori curve.
        let sh = bt_sakuma_hattori { a_um: model[1], b_umk: model[2], c: model[3] };
        let mut out = sentinel;
        // SAFETY: valid pointers; n <= 3 points.
        let s = unsafe { bt_drift_fit_sakuma_hattori(&sh, points.as_ptr(), n, degree, &mut out) };
        if s == bt_status::Ok {
            prop_assert!(out.reference_k.is_finite() && out.degree <= 2);
        } else {
            prop_assert_eq!(out, sentinel);
        }
        let mut target = SENTINEL;
        // SAFETY: valid pointers.
        let s = unsafe { bt_nuc_shutter_target_sakuma_hattori(&sh, model[4], model[5], t, &mut target) };
        prop_assert!(sane(s, target), "status {:?}, out {}", s, target);
        let step_sentinel = bt_drift_step { a: -7.0, b: -7.0 };
        let mut step = step_sentinel;
        // SAFETY: valid pointers.
        let s = unsafe { bt_drift_step_band(&m, &band, 0.01, -1.0, t, 300.0, &mut step) };
        if s == bt_status::Ok {
            prop_assert!(step.a > 0.0 && step.a.is_finite() && step.b.is_finite());
        } else {
            prop_assert_eq!(step, step_sentinel);
        }
        let mut step = step_sentinel;
        // SAFETY: valid pointers.
        let s = unsafe { bt_drift_step_sakuma_hattori(&m, &sh, 1.0, 0.0, t, 300.0, &mut step) };
        if s == bt_status::Ok {
            prop_assert!(step.a > 0.0 && step.a.is_finite() && step.b.is_finite());
        } else {
            prop_assert_eq!(step, step_sentinel);
        }
    }

    /// Arbitrary map bits, bad maps, widths, steps and emissivity maps (or none): the
    /// fused two-point exports either refuse with a status (output untouched) or agree bit
    /// for bit with the Rust API.
    #[test]
    fn fused_conversion_agrees_with_rust(
        gain in prop::collection::vec(any_f32(), 24),
        offset in prop::collection::vec(any_f32(), 24),
        bad in prop::collection::vec(prop_oneof![4 => Just(0u8), 1 => any::<u8>()], 24),
        counts in prop::collection::vec(any::<u16>(), 24),
        width in 0usize..30,
        a in any_f32(),
        b in any_f32(),
        emissivity in prop::option::of(prop::collection::vec(any_f32(), 24)),
    ) {
        let band = rust_band();
        let scene = Scene::new(0.9, 293.15).unwrap();
        let counts_map = CountsMap::linear(0.002, -2.0).unwrap();
        let mut storage = vec![[0.0f32; 4]; 128];
        let conv = FrameConverter::new(&band, &scene, counts_map, Rails::default(),
            TemperatureRange::new(250.0, 1500.0).unwrap(), 1e-3, &mut storage).unwrap();
        let rows: Vec<TableRow> = conv.table().rows().to_vec();
        let state = conv.state();
        let mut c_conv = bt_frame_converter { opaque: [0; 32] };
        // SAFETY: the state fits the converter's bytes (the capi crate asserts it).
        unsafe { core::ptr::write(core::ptr::addr_of_mut!(c_conv).cast(), state) };
        let step = bt_drift_step { a, b };
        let mut kelvin = vec![-1.0f32; 24];
        let sentinel_summary = bt_corrected_summary { bad_replaced: 99, ..Default::default() };
        let mut summary = sentinel_summary;
        // SAFETY: every buffer holds 24 values; rows and converter as built above.
        let s = unsafe {
            match &emissivity {
                None => bt_frame_convert_counts_corrected(&c_conv, rows.as_ptr().cast(),
                    rows.len(), gain.as_ptr(), offset.as_ptr(), bad.as_ptr(), width, &step,
                    counts.as_ptr(), kelvin.as_mut_ptr(), 24, &mut summary),
                Some(e) => bt_frame_convert_counts_corrected_emissivity(&c_conv,
                    rows.as_ptr().cast(), rows.len(), gain.as_ptr(), offset.as_ptr(),
                    bad.as_ptr(), width, &step, counts.as_ptr(), e.as_ptr(),
                    kelvin.as_mut_ptr(), 24, &mut summary),
            }
        };
        let mut expected = vec![-1.0f32; 24];
        let r = Correction::new(&gain, &offset, &bad, width)
            .and_then(|c| c.with_step(DriftStep { a, b }))
            .and_then(|c| match &emissivity {
                None => conv.convert_counts_corrected(&c, &counts, &mut expected),
                Some(e) => conv.convert_counts_corrected_emissivity(&c, &counts, e, &mut expected),
            });
        prop_assert_eq!(s, status_of(&r));
        match r {
            Ok(rs) => {
                prop_assert_eq!(summary.bad_replaced, rs.bad_replaced);
                prop_assert_eq!(summary.frame.converted, rs.frame.converted);
                prop_assert_eq!(summary.frame.emissivity_invalid, rs.frame.emissivity_invalid);
                let f = summary.frame;
                prop_assert_eq!(f.pixels, f.converted + f.dead + f.saturated + f.emissivity_invalid
                    + f.non_finite + f.below_background + f.below_range + f.above_range);
                for (x, y) in kelvin.iter().zip(&expected) {
                    prop_assert_eq!(x.to_bits(), y.to_bits());
                }
            }
            Err(_) => {
                prop_assert_eq!(summary, sentinel_summary);
                prop_assert!(kelvin.iter().all(|&k| k == -1.0));
            }
        }
    }

    /// Arbitrary multi-point map bits (breakpoints included), level counts, map lengths,
    /// widths, steps and emissivity maps (or none): the fused multi-point export either refuses with a status
    /// (output untouched) or agrees bit for bit with the Rust API.
    #[test]
    fn fused_multi_point_agrees_with_rust(
        maps in prop::collection::vec(any_f32(), 5 * 24 + 2),
        maps_len in prop_oneof![4 => Just(5 * 24usize), 1 => 0usize..5 * 24 + 2],
        levels in prop_oneof![4 => Just(3usize), 1 => 0usize..6],
        bad in prop::collection::vec(prop_oneof![4 => Just(0u8), 1 => any::<u8>()], 24),
        counts in prop::collection::vec(any::<u16>(), 24),
        width in prop_oneof![3 => Just(6usize), 1 => 0usize..30],
        a in any_f32(),
        b in any_f32(),
        emissivity in prop::option::of(prop::collection::vec(any_f32(), 24)),
    ) {
        let band = rust_band();
        let scene = Scene::new(0.9, 293.15).unwrap();
        let counts_map = CountsMap::linear(0.002, -2.0).unwrap();
        let mut storage = vec![[0.0f32; 4]; 128];
        let conv = FrameConverter::new(&band, &scene, counts_map, Rails::default(),
            TemperatureRange::new(250.0, 1500.0).unwrap(), 1e-3, &mut storage).unwrap();
        let rows: Vec<TableRow> = conv.table().rows().to_vec();
        let mut c_conv = bt_frame_converter { opaque: [0; 32] };
        // SAFETY: the state fits the converter's bytes (the capi crate asserts it).
        unsafe { core::ptr::write(core::ptr::addr_of_mut!(c_conv).cast(), conv.state()) };
        let step = bt_drift_step { a, b };
        let mut kelvin = vec![-1.0f32; 24];
        let sentinel_summary = bt_corrected_summary { bad_replaced: 99, ..Default::default() };
        let mut summary = sentinel_summary;
        // SAFETY: every buffer holds what its length says; rows and converter as above.
        let s = unsafe {
            match &emissivity {
                None => bt_frame_convert_counts_multi_point(&c_conv, rows.as_ptr().cast(),
                    rows.len(), maps.as_ptr(), maps_len, levels, bad.as_ptr(), width, &step,
                    counts.as_ptr(), kelvin.as_mut_ptr(), 24, &mut summary),
                Some(e) => bt_frame_convert_counts_multi_point_emissivity(&c_conv,
                    rows.as_ptr().cast(), rows.len(), maps.as_ptr(), maps_len, levels,
                    bad.as_ptr(), width, &step, counts.as_ptr(), e.as_ptr(),
                    kelvin.as_mut_ptr(), 24, &mut summary),
            }
        };
        let mut expected = vec![-1.0f32; 24];
        let r = Correction::multi_point(&maps[..maps_len], levels, &bad, width)
            .and_then(|c| c.with_step(DriftStep { a, b }))
            .and_then(|c| match &emissivity {
                None => conv.convert_counts_corrected(&c, &counts, &mut expected),
                Some(e) => conv.convert_counts_corrected_emissivity(&c, &counts, e, &mut expected),
            });
        prop_assert_eq!(s, status_of(&r));
        match r {
            Ok(rs) => {
                prop_assert_eq!(summary.bad_replaced, rs.bad_replaced);
                prop_assert_eq!(summary.bad_unreplaced, rs.bad_unreplaced);
                prop_assert_eq!(summary.frame.converted, rs.frame.converted);
                prop_assert_eq!(summary.frame.emissivity_invalid, rs.frame.emissivity_invalid);
                let f = summary.frame;
                prop_assert_eq!(f.pixels, f.converted + f.dead + f.saturated + f.emissivity_invalid
                    + f.non_finite + f.below_background + f.below_range + f.above_range);
                for (x, y) in kelvin.iter().zip(&expected) {
                    prop_assert_eq!(x.to_bits(), y.to_bits());
                }
                prop_assert_eq!(kelvin.iter().filter(|k| k.is_nan()).count() as u64,
                    f.pixels - f.converted);
            }
            Err(_) => {
                prop_assert_eq!(summary, sentinel_summary);
                prop_assert!(kelvin.iter().all(|&k| k == -1.0));
            }
        }
    }

    /// Arbitrary level means (bits), frame counts and level counts: the map build either
    /// refuses (maps, bad map and report untouched) or agrees bit for bit with the Rust
    /// API, with finite maps and every flagged pixel counted.
    #[test]
    fn multi_point_build_agrees_with_rust(
        means in prop::collection::vec(
            prop_oneof![3 => 0.0f64..60_000.0, 1 => any_f64()], 4 * 8),
        levels in prop_oneof![4 => Just(4usize), 1 => 0usize..5],
        frames in prop_oneof![4 => Just(2u32), 1 => 0u32..3],
        bad in prop::collection::vec(prop_oneof![4 => Just(0u8), 1 => any::<u8>()], 8),
    ) {
        // Levels sorted per pixel most of the time: each level's means in increasing
        // order of the level for most pixels, arbitrary for the rest.
        let mut level_means: Vec<Vec<f64>> = means.chunks(8).map(<[f64]>::to_vec).collect();
        for p in 0..6 {
            let mut col: Vec<f64> = level_means.iter().map(|l| l[p]).collect();
            col.sort_by(f64::total_cmp);
            for (l, v) in level_means.iter_mut().zip(col) {
                l[p] = v;
            }
        }
        let zeros = [0.0f64; 8];
        let views: Vec<bt_stack_view> = level_means.iter().map(|m| bt_stack_view {
            mean: m.as_ptr(), m2: zeros.as_ptr(), len: 8, frames,
        }).collect();
        let n = levels.min(4);
        let len = 8 * (3 * levels.max(2) - 4);
        let mut c_maps = vec![-3.0f32; len];
        let mut c_bad = bad.clone();
        let sentinel = bt_multi_point_report {
            levels: 77, good_pixels: 77, order_flagged: 77, level_means: [SENTINEL; 16],
        };
        let mut report = sentinel;
        // SAFETY: `levels` <= 4 views, each valid.
        let s = unsafe {
            bt_nuc_multi_point(views.as_ptr(), levels, c_bad.as_mut_ptr(), 8,
                c_maps.as_mut_ptr(), len, &mut report)
        };
        let stats: Vec<StackStats> = level_means.iter().take(n)
            .map(|m| StackStats::new(m, &zeros, frames)).collect::<Result<_, _>>()
            .unwrap_or_default();
        let mut maps = vec![-3.0f32; len];
        let mut rust_bad = bad.clone();
        let r = if levels < 2 {
            Err(Error::NucLevelCount)
        } else if stats.len() < n {
            Err(Error::NucStackEmpty)
        } else {
            multi_point(&stats, &mut rust_bad, &mut maps)
        };
        prop_assert_eq!(s, status_of(&r));
        match r {
            Ok(rr) => {
                prop_assert_eq!(report.good_pixels, rr.good_pixels);
                prop_assert_eq!(report.order_flagged, rr.order_flagged);
                prop_assert_eq!(&c_bad, &rust_bad);
                prop_assert!(c_maps.iter().zip(&maps).all(|(x, y)| x.to_bits() == y.to_bits()));
                prop_assert!(c_maps.iter().all(|v| v.is_finite()));
                let flagged = c_bad.iter().zip(&bad).filter(|(&a, &b)| a != b).count() as u64;
                prop_assert_eq!(flagged, rr.order_flagged);
            }
            Err(_) => {
                prop_assert_eq!(report, sentinel);
                prop_assert_eq!(&c_bad, &bad);
                prop_assert!(c_maps.iter().all(|&v| v == -3.0));
            }
        }
    }

    /// Stacks: arbitrary float frames either add (frames incremented, all finite) or are
    /// refused with the stack unchanged.
    #[test]
    fn stack_updates_are_all_or_nothing(frame in prop::collection::vec(any_f32(), 6), start in 0u32..3) {
        let (mut mean, mut m2) = ([1.0f64; 6], [0.5f64; 6]);
        let mut frames = start;
        let (before_mean, before_m2) = (mean, m2);
        // SAFETY: valid buffers of 6 values.
        let s = unsafe { bt_frame_stack_add_signal(mean.as_mut_ptr(), m2.as_mut_ptr(), 6, &mut frames, frame.as_ptr(), 6) };
        if s == bt_status::Ok {
            prop_assert_eq!(frames, start + 1);
            prop_assert!(mean.iter().chain(&m2).all(|v| v.is_finite()));
        } else {
            prop_assert_eq!(s, bt_status::NonFinite);
            prop_assert_eq!(frames, start);
            if start > 0 {
                prop_assert_eq!(mean, before_mean);
                prop_assert_eq!(m2, before_m2);
            }
        }
    }
}
