//! Raw detector frames through the C ABI: frame stacks (counts and signal frames of any
//! content, stored accumulators altered to any value), two-point and multi-point NUC maps,
//! bad-pixel detection with any rules over bad-pixel maps of any pattern, spatial
//! statistics, NETD, the shutter target and offset refresh, the drift model (fit and
//! step, band and Sakuma-Hattori), the four fused conversions of raw counts (maps, bad
//! pixels, widths and drift steps of any content), and the net-signal model of a
//! detector that sees its own housing. Frames are small: geometry w x h decoded from the
//! input, 1..16 each (at most 256 pixels).
//!
//! Oracles: errors leave every out value untouched (accumulators, maps, bad map, report;
//! `scratch` of `bt_bad_pixels_detect` is documented storage and not checked); successes
//! are finite where the docs promise it (deliver-checked reports, stack accumulators,
//! maps at good pixels, a drift step with a > 0); a stack update counts one frame more; a
//! bad-pixel detection keeps every flag set before; two-point and multi-point maps applied
//! to the calibration levels' own mean frames give back the level means at every good
//! pixel, and with two levels and nothing newly flagged the two are bit for bit equal (as
//! documented); a shutter refresh makes every good pixel read the target; a fused
//! conversion's summary adds up to its pixel count with exactly the converted pixels
//! finite; net signal -> object temperature gives back T; each call within the per-call
//! limit.
#![no_main]

use bandtemp_capi::*;
use bandtemp_fuzz::{band, finite, oracle, slice_bytes, timed, Dec, FuzzBand, Kind, Poisoned};
use libfuzzer_sys::fuzz_target;

/// Relative rounding of an f32 (half an ulp): 2^-24.
const F32_HALF_ULP: f64 = 1.0 / 16_777_216.0;
/// Absolute rounding of an f32 in its subnormal range: half the smallest subnormal, 2^-150.
const F32_SUBNORMAL: f64 = 7.006_492_321_624_085e-46;

/// The tolerance of a map value x = G s + O against the level mean m it was built to
/// give, for a segment whose offset was built from its lower level l and mean m_l:
/// O = m_l - G' l and G' = (m_h - m_l) / (h - l) in f64, then both rounded to f32. Each
/// f32 rounding moves its own term by at most 2^-24 of itself (G s and O; 2^-150 absolute
/// when subnormal); the f64 arithmetic moves G' by a few 2^-53 of itself and O by a few
/// 2^-53 of |m_l| + |G' l|, the terms it cancels. Twice the f32 bound over every term
/// covers all of it: 2^-23 (|G s| + |O| + |m| + |G l| + |m_l|) + 2^-150 (|s| + |l| + 1).
/// (The terms of the cancellation matter: a pixel with l = -2.8e24 and an array mean of
/// -3.5e23 has G l ~ 3.5e23, whose 2^-53 is 4e7 counts, while O itself rounds to 0.)
fn map_tolerance(g: f64, s: f64, o: f64, m: f64, l: f64, m_l: f64) -> f64 {
    2.0 * F32_HALF_ULP * ((g * s).abs() + o.abs() + m.abs() + (g * l).abs() + m_l.abs())
        + F32_SUBNORMAL * (s.abs() + l.abs() + 1.0)
}

/// A frame stack in caller storage.
struct Stack {
    mean: Vec<f64>,
    m2: Vec<f64>,
    frames: u32,
}

impl Stack {
    fn view(&self) -> bt_stack_view {
        bt_stack_view {
            mean: self.mean.as_ptr(),
            m2: self.m2.as_ptr(),
            len: self.mean.len(),
            frames: self.frames,
        }
    }
}

/// Adds one frame through the C ABI and checks the stack oracles.
fn add_frame(stack: &mut Stack, counts: Option<&[u16]>, signal: &[f32], what: &str) {
    let (mean0, m20, frames0) = (stack.mean.clone(), stack.m2.clone(), stack.frames);
    let len = stack.mean.len();
    let s = timed(
        || format!("bt_frame_stack_add_*({what}, len {len})"),
        || unsafe {
            match counts {
                Some(c) => bt_frame_stack_add_counts(
                    stack.mean.as_mut_ptr(),
                    stack.m2.as_mut_ptr(),
                    len,
                    &mut stack.frames,
                    c.as_ptr(),
                    c.len(),
                ),
                None => bt_frame_stack_add_signal(
                    stack.mean.as_mut_ptr(),
                    stack.m2.as_mut_ptr(),
                    len,
                    &mut stack.frames,
                    signal.as_ptr(),
                    signal.len(),
                ),
            }
        },
    );
    if s == bt_status::Ok {
        oracle(
            stack.frames == frames0.max(0) + 1
                && finite(&stack.mean)
                && finite(&stack.m2)
                && stack.m2.iter().all(|&v| v >= 0.0),
            || {
                format!(
                    "stack add ({what}) from {frames0} frames {mean0:?} {m20:?} -> {} frames {:?} {:?}, counts {counts:?} signal {signal:?}",
                    stack.frames, stack.mean, stack.m2
                )
            },
        );
    } else {
        oracle(
            stack.frames == frames0
                && slice_bytes(&stack.mean) == slice_bytes(&mean0)
                && slice_bytes(&stack.m2) == slice_bytes(&m20),
            || format!("stack add ({what}) wrote on {s:?}"),
        );
    }
}

const MAX_SIDE: usize = 16;

fuzz_target!(|data: &[u8]| {
    let mut d = Dec::new(data);
    let flags = d.u32();
    let width = 1 + d.len(MAX_SIDE - 1);
    let height = 1 + d.len(MAX_SIDE - 1);
    let n = width * height;
    let n_levels = 2 + d.len(3);

    // Per-pixel response and offset of a plausible array (physical frames).
    let resp: Vec<f64> = (0..n)
        .map(|_| 0.7 + 0.6 * f64::from(d.u8()) / 255.0)
        .collect();
    let off: Vec<f64> = (0..n).map(|_| 100.0 + f64::from(d.u8()) * 8.0).collect();

    // The calibration levels' stacks.
    let mut stacks: Vec<Stack> = Vec::new();
    for k in 0..n_levels {
        let mode = d.u8();
        let frames = 1 + usize::from(d.u8() % 3);
        // Occasionally a stack of another length (a mismatch the calls must refuse).
        let len = if mode & 0x40 == 0x40 { d.len(n + 1) } else { n };
        let mut st = Stack {
            mean: vec![0.0; len],
            m2: vec![0.0; len],
            frames: 0,
        };
        let level = 1500.0 + 6000.0 * k as f64 + 20.0 * f64::from(d.u8());
        for f in 0..frames {
            let frame_len = if mode & 0x20 == 0x20 && f == 0 {
                d.len(len + 1)
            } else {
                len
            };
            match mode % 4 {
                // Physical counts: offset + response x level + noise.
                0 | 1 => {
                    let c: Vec<u16> = (0..frame_len)
                        .map(|p| {
                            let v = off.get(p).unwrap_or(&0.0)
                                + resp.get(p).unwrap_or(&1.0) * level
                                + f64::from(d.u8() % 16);
                            v.min(65535.0) as u16
                        })
                        .collect();
                    add_frame(&mut st, Some(&c), &[], "physical counts");
                }
                // Any counts.
                2 => {
                    let c: Vec<u16> = (0..frame_len).map(|_| d.u16()).collect();
                    add_frame(&mut st, Some(&c), &[], "any counts");
                }
                // Any signal.
                _ => {
                    let sig: Vec<f32> = (0..frame_len).map(|_| d.f32(Kind::Signed)).collect();
                    add_frame(&mut st, None, &sig, "any signal");
                }
            }
        }
        // Stored accumulators altered to any value (and frame counts of any value).
        if mode & 0x80 == 0x80 && len > 0 {
            let changes = d.len(4);
            for _ in 0..changes {
                let p = usize::from(d.u8()) % len;
                let which = d.u8();
                if which & 1 == 0 {
                    st.mean[p] = d.f64(Kind::Signed);
                } else {
                    st.m2[p] = d.f64(Kind::Magnitude);
                }
            }
            if which_frames(&mut d) {
                st.frames = d.u32();
            }
        }
        stacks.push(st);
    }
    let views: Vec<bt_stack_view> = stacks.iter().map(Stack::view).collect();
    let (low, high) = (views[0], views[n_levels - 1]);

    // The bad-pixel map: none, clean, any pattern, all bad.
    let bad_mode = d.u8() % 4;
    let mut bad: Vec<u8> = match bad_mode {
        0 | 1 => vec![0; n],
        2 => (0..n)
            .map(|_| {
                let b = d.u8();
                if b < 200 {
                    0
                } else {
                    b
                }
            })
            .collect(),
        _ => vec![128; n],
    };
    let bad_ptr = |b: &[u8]| {
        if bad_mode == 0 {
            core::ptr::null()
        } else {
            b.as_ptr()
        }
    };

    // Bad-pixel detection.
    if flags & 1 == 1 {
        let rules = if flags & 2 == 0 {
            bt_bad_pixel_rules {
                k_sigma: 3.0 + 4.0 * f64::from(d.u8()) / 255.0,
                noise_factor: 2.0 + 4.0 * f64::from(d.u8()) / 255.0,
                stuck_fraction: 0.5 * f64::from(d.u8()) / 255.0,
            }
        } else {
            bt_bad_pixel_rules {
                k_sigma: d.f64(Kind::Signed),
                noise_factor: d.f64(Kind::Signed),
                stuck_fraction: d.f64(Kind::Fraction),
            }
        };
        let mut scratch = vec![0.0f32; n];
        let before = bad.clone();
        let mut report = Poisoned::<bt_bad_pixel_report>::new();
        let s = timed(
            || format!("bt_bad_pixels_detect({n} px, {rules:?})"),
            || unsafe {
                bt_bad_pixels_detect(
                    &low,
                    &high,
                    &rules,
                    scratch.as_mut_ptr(),
                    bad.as_mut_ptr(),
                    n,
                    report.ptr(),
                )
            },
        );
        if s == bt_status::Ok {
            let r = report.value;
            let now_bad = bad.iter().filter(|&&b| b != 0).count() as u64;
            oracle(
                before.iter().zip(&bad).all(|(&b0, &b1)| b1 & b0 == b0) && r.bad == now_bad,
                || format!("detect {r:?}: bad {before:?} -> {bad:?}, {rules:?}"),
            );
        } else {
            oracle(report.untouched() && bad == before, || {
                format!("bt_bad_pixels_detect wrote on {s:?}")
            });
        }
    }

    // The map the calls below see: a null map means no pixel of the stacks (whatever
    // their length) is bad, whatever the detection above wrote into the buffer.
    let px = stacks[0].mean.len();
    let eff_bad: Vec<u8> = if bad_mode == 0 {
        vec![0; px]
    } else {
        bad.clone()
    };

    // Two-point maps.
    // Storage of at least the length the call is told (and of n for the calls below).
    let maps_len = if flags & 4 == 4 { d.len(n + 1) } else { n };
    let mut gain = vec![f32::from_bits(0xA5A5_A5A5); maps_len.max(n)];
    let mut offset = vec![f32::from_bits(0xA5A5_A5A5); maps_len.max(n)];
    let mut tp = Poisoned::<bt_two_point_report>::new();
    let bad_before_tp = bad.clone();
    let s_tp = timed(
        || format!("bt_nuc_two_point({n} px)"),
        || unsafe {
            bt_nuc_two_point(
                &low,
                &high,
                bad_ptr(&bad),
                n,
                gain.as_mut_ptr(),
                offset.as_mut_ptr(),
                maps_len,
                tp.ptr(),
            )
        },
    );
    let two_point_ok = s_tp == bt_status::Ok;
    if two_point_ok {
        let r = tp.value;
        let good = eff_bad.iter().filter(|&&b| b == 0).count() as u64;
        oracle(r.good_pixels == good, || {
            format!("two-point {r:?}, bad {eff_bad:?}")
        });
        let (lo, hi) = (&stacks[0], &stacks[n_levels - 1]);
        for p in 0..px {
            let (g, o) = (f64::from(gain[p]), f64::from(offset[p]));
            if eff_bad[p] != 0 {
                oracle(g == 1.0 && o == 0.0, || {
                    format!("bad pixel {p} got G {g:e} O {o:e}")
                });
                continue;
            }
            oracle(g.is_finite() && g > 0.0 && o.is_finite(), || {
                format!(
                    "two-point map at good pixel {p}: G {g:e} O {o:e} (low {:e} high {:e}, {r:?})",
                    lo.mean[p], hi.mean[p]
                )
            });
            for (s_raw, m) in [(lo.mean[p], r.mean_low), (hi.mean[p], r.mean_high)] {
                let x = g * s_raw + o;
                let tol = map_tolerance(g, s_raw, o, m, lo.mean[p], r.mean_low);
                oracle((x - m).abs() <= tol, || {
                    format!(
                        "two-point pixel {p}: G {g:e} x {s_raw:e} + O {o:e} = {x:e}, level mean {m:e}, error {:e} > {tol:e}",
                        (x - m).abs()
                    )
                });
            }
        }
    } else {
        oracle(
            tp.untouched()
                && gain.iter().all(|v| v.to_bits() == 0xA5A5_A5A5)
                && offset.iter().all(|v| v.to_bits() == 0xA5A5_A5A5),
            || format!("bt_nuc_two_point wrote on {s_tp:?}"),
        );
    }

    // Multi-point maps.
    let levels_arg = if flags & 8 == 8 { d.len(17) } else { n_levels };
    let mut map_len = Poisoned::<usize>::new();
    let s = timed(
        || format!("bt_nuc_multi_point_map_len({levels_arg}, {n})"),
        || unsafe { bt_nuc_multi_point_map_len(levels_arg, n, map_len.ptr()) },
    );
    if s == bt_status::Ok {
        oracle(map_len.value == (3 * levels_arg - 4) * n, || {
            format!("map_len({levels_arg}, {n}) = {}", map_len.value)
        });
    } else {
        oracle(map_len.untouched(), || format!("map_len wrote on {s:?}"));
    }
    let storage = if s == bt_status::Ok && flags & 16 == 0 {
        map_len.value
    } else {
        d.len(4 * n + 8)
    };
    let mut maps = vec![f32::from_bits(0xA5A5_A5A5); storage];
    let mut mp_bad = bad_before_tp.clone();
    let mut mp = Poisoned::<bt_multi_point_report>::new();
    let s_mp = timed(
        || format!("bt_nuc_multi_point({levels_arg} levels, {n} px, storage {storage})"),
        || unsafe {
            bt_nuc_multi_point(
                views.as_ptr(),
                levels_arg.min(views.len()),
                mp_bad.as_mut_ptr(),
                n,
                maps.as_mut_ptr(),
                storage,
                mp.ptr(),
            )
        },
    );
    let levels_used = levels_arg.min(views.len());
    let multi_ok = s_mp == bt_status::Ok;
    if multi_ok {
        let r = mp.value;
        let segs = levels_used - 1;
        oracle(
            r.levels as usize == levels_used
                && r.good_pixels == mp_bad.iter().filter(|&&b| b == 0).count() as u64
                && bad_before_tp
                    .iter()
                    .zip(&mp_bad)
                    .all(|(&b0, &b1)| b1 & b0 == b0),
            || format!("multi-point {r:?}, bad {bad_before_tp:?} -> {mp_bad:?}"),
        );
        for p in 0..n {
            if mp_bad[p] != 0 {
                continue;
            }
            for seg in 0..segs {
                let (g, o) = (
                    f64::from(maps[seg * n + p]),
                    f64::from(maps[(segs + seg) * n + p]),
                );
                oracle(g.is_finite() && g > 0.0 && o.is_finite(), || {
                    format!("multi-point map at good pixel {p} segment {seg}: G {g:e} O {o:e}")
                });
                // The segment's own two levels.
                for k in [seg, seg + 1] {
                    let s_raw = stacks[k].mean[p];
                    let m = r.level_means[k];
                    let x = g * s_raw + o;
                    let tol =
                        map_tolerance(g, s_raw, o, m, stacks[seg].mean[p], r.level_means[seg]);
                    oracle((x - m).abs() <= tol, || {
                        format!(
                            "multi-point pixel {p} segment {seg} level {k}: G {g:e} x {s_raw:e} + O {o:e} = {x:e}, level mean {m:e}, error {:e} > {tol:e}; {r:?}, {n} px, maps {maps:?}, levels {:?}",
                            (x - m).abs(), stacks.iter().map(|s| &s.mean).collect::<Vec<_>>()
                        )
                    });
                }
            }
        }
        // Two levels (the same two stacks as the two-point call: the first and the last),
        // the same bad map going in and nothing newly flagged: the maps are the two-point
        // maps bit for bit (documented).
        if levels_used == 2
            && n_levels == 2
            && two_point_ok
            && r.order_flagged == 0
            && bad_mode != 0
            && maps_len == n
        {
            oracle(
                slice_bytes(&maps[..n]) == slice_bytes(&gain[..n])
                    && slice_bytes(&maps[n..2 * n]) == slice_bytes(&offset[..n]),
                || {
                    format!("two-level multi-point maps {maps:?} differ from the two-point maps {gain:?} {offset:?}")
                },
            );
        }
    } else {
        oracle(
            mp.untouched()
                && mp_bad == bad_before_tp
                && maps.iter().all(|v| v.to_bits() == 0xA5A5_A5A5),
            || format!("bt_nuc_multi_point wrote on {s_mp:?}"),
        );
    }

    // Spatial statistics of the low stack, with or without maps.
    let mut stats = Poisoned::<bt_spatial_stats>::new();
    let with_maps = two_point_ok && flags & 32 == 32;
    let s = timed(
        || format!("bt_frame_spatial_stats({n} px)"),
        || unsafe {
            bt_frame_spatial_stats(
                &low,
                bad_ptr(&bad),
                if with_maps {
                    gain.as_ptr()
                } else {
                    core::ptr::null()
                },
                if with_maps {
                    offset.as_ptr()
                } else {
                    core::ptr::null()
                },
                n,
                stats.ptr(),
            )
        },
    );
    let temporal = if s == bt_status::Ok {
        let st = stats.value;
        oracle(
            st.temporal_variance >= 0.0 && st.spatial_variance_measured >= 0.0 && st.pixels >= 1,
            || format!("spatial stats {st:?}"),
        );
        st.temporal_variance
    } else {
        oracle(stats.untouched(), || {
            format!("spatial stats wrote on {s:?}")
        });
        d.f64(Kind::Magnitude)
    };
    let responsivity = d.f64(Kind::Magnitude);
    let mut netd = Poisoned::<f64>::new();
    let s = timed(
        || format!("bt_netd_k({temporal:e}, {responsivity:e})"),
        || unsafe { bt_netd_k(temporal, responsivity, netd.ptr()) },
    );
    if s == bt_status::Ok {
        oracle(netd.value.is_finite() && netd.value >= 0.0, || {
            format!("netd({temporal:e}, {responsivity:e}) = {:e}", netd.value)
        });
    } else {
        oracle(netd.untouched(), || format!("bt_netd_k wrote on {s:?}"));
    }

    // The curve: the usual 8-14 um band, any band, or a Sakuma-Hattori curve.
    let the_band: FuzzBand = if flags & 64 == 0 {
        let mut b = band(&mut Dec::new(&[]));
        b.raw.lo_um = 8.0;
        b.raw.hi_um = 14.0;
        b
    } else {
        band(&mut d)
    };
    let sh = if flags & 128 == 0 {
        bt_sakuma_hattori {
            a_um: 8.0 + 4.0 * f64::from(d.u8()) / 255.0,
            b_umk: -50.0 + 100.0 * f64::from(d.u8()) / 255.0,
            c: 10f64.powf(3.0 + 3.0 * f64::from(d.u8()) / 255.0),
        }
    } else {
        bt_sakuma_hattori {
            a_um: d.f64(Kind::Um),
            b_umk: d.f64(Kind::Signed),
            c: d.f64(Kind::Magnitude),
        }
    };
    let use_sh = flags & 256 == 256;
    let (counts_gain, counts_offset) = if flags & 512 == 0 {
        (
            10f64.powf(-4.0 + 2.0 * f64::from(d.u8()) / 255.0),
            -f64::from(d.u8()),
        )
    } else {
        (d.f64(Kind::Magnitude), d.f64(Kind::Signed))
    };
    let shutter_k = d.f64(Kind::TempK);
    let curve_args = || {
        if use_sh {
            format!("{sh:?}")
        } else {
            format!(
                "band {:?} wl {:?} r {:?}",
                the_band.raw, the_band.wl, the_band.r
            )
        }
    };

    // Shutter target.
    let mut target = Poisoned::<f64>::new();
    let s = timed(
        || {
            format!(
                "bt_nuc_shutter_target_*({}, {counts_gain:e}, {counts_offset:e}, {shutter_k:e})",
                curve_args()
            )
        },
        || unsafe {
            if use_sh {
                bt_nuc_shutter_target_sakuma_hattori(
                    &sh,
                    counts_gain,
                    counts_offset,
                    shutter_k,
                    target.ptr(),
                )
            } else {
                bt_nuc_shutter_target_band(
                    the_band.ptr(),
                    counts_gain,
                    counts_offset,
                    shutter_k,
                    target.ptr(),
                )
            }
        },
    );
    let target_counts = if s == bt_status::Ok {
        oracle(target.value.is_finite(), || {
            format!("shutter target {:e}", target.value)
        });
        target.value
    } else {
        oracle(target.untouched(), || {
            format!("shutter target wrote on {s:?}")
        });
        d.f64(Kind::Signed)
    };

    // Drift model fit and step.
    let n_points = d.len(8);
    let points: Vec<bt_drift_point> = (0..n_points)
        .map(|_| {
            if flags & 1024 == 0 {
                let fpa = 280.0 + 40.0 * f64::from(d.u8()) / 255.0;
                let lo_k = 280.0 + 40.0 * f64::from(d.u8()) / 255.0;
                let hi_k = lo_k + 20.0 + f64::from(d.u8());
                bt_drift_point {
                    fpa_k: fpa,
                    internal_k: fpa + f64::from(d.u8()) / 32.0,
                    low_k: lo_k,
                    high_k: hi_k,
                    low_counts: 2000.0 + 4.0 * f64::from(d.u8()),
                    high_counts: 6000.0 + 40.0 * f64::from(d.u8()),
                }
            } else {
                bt_drift_point {
                    fpa_k: d.f64(Kind::TempK),
                    internal_k: d.f64(Kind::TempK),
                    low_k: d.f64(Kind::TempK),
                    high_k: d.f64(Kind::TempK),
                    low_counts: d.f64(Kind::Signed),
                    high_counts: d.f64(Kind::Signed),
                }
            }
        })
        .collect();
    let degree = u32::from(d.u8() % 4);
    let mut model = Poisoned::<bt_drift_model>::new();
    let s = timed(
        || {
            format!(
                "bt_drift_fit_*({}, {points:?}, degree {degree})",
                curve_args()
            )
        },
        || unsafe {
            if use_sh {
                bt_drift_fit_sakuma_hattori(&sh, points.as_ptr(), points.len(), degree, model.ptr())
            } else {
                bt_drift_fit_band(
                    the_band.ptr(),
                    points.as_ptr(),
                    points.len(),
                    degree,
                    model.ptr(),
                )
            }
        },
    );
    let model_value = if s == bt_status::Ok {
        let m = model.value;
        oracle(m.degree == degree, || {
            format!("fit degree {degree} gave {m:?}")
        });
        m
    } else {
        oracle(model.untouched(), || format!("drift fit wrote on {s:?}"));
        bt_drift_model {
            reference_k: d.f64(Kind::TempK),
            degree: u32::from(d.u8() % 4),
            responsivity: [
                d.f64(Kind::Magnitude),
                d.f64(Kind::Signed),
                d.f64(Kind::Signed),
            ],
            offset: [
                d.f64(Kind::Signed),
                d.f64(Kind::Signed),
                d.f64(Kind::Signed),
            ],
        }
    };
    let (fpa_k, internal_k) = (d.f64(Kind::TempK), d.f64(Kind::TempK));
    let mut step = Poisoned::<bt_drift_step>::new();
    let s = timed(
        || {
            format!(
                "bt_drift_step_*({model_value:?}, {}, {fpa_k:e}, {internal_k:e})",
                curve_args()
            )
        },
        || unsafe {
            if use_sh {
                bt_drift_step_sakuma_hattori(
                    &model_value,
                    &sh,
                    counts_gain,
                    counts_offset,
                    fpa_k,
                    internal_k,
                    step.ptr(),
                )
            } else {
                bt_drift_step_band(
                    &model_value,
                    the_band.ptr(),
                    counts_gain,
                    counts_offset,
                    fpa_k,
                    internal_k,
                    step.ptr(),
                )
            }
        },
    );
    let step_value = if s == bt_status::Ok {
        let st = step.value;
        oracle(st.a.is_finite() && st.a > 0.0 && st.b.is_finite(), || {
            format!("drift step {st:?} from {model_value:?}")
        });
        st
    } else {
        oracle(step.untouched(), || format!("drift step wrote on {s:?}"));
        if flags & 2048 == 0 {
            bt_drift_step { a: 1.0, b: 0.0 }
        } else {
            bt_drift_step {
                a: d.f32(Kind::Magnitude),
                b: d.f32(Kind::Signed),
            }
        }
    };

    // Shutter refresh of the two-point offsets (or of maps of any content).
    let refresh_gain: Vec<f32> = if two_point_ok {
        gain.clone()
    } else {
        (0..n).map(|_| d.f32(Kind::Magnitude)).collect()
    };
    let mut refresh_offset: Vec<f32> = if two_point_ok {
        offset.clone()
    } else {
        (0..n).map(|_| d.f32(Kind::Signed)).collect()
    };
    let before = refresh_offset.clone();
    let si = d.len(n_levels - 1);
    let (shutter, shutter_stack) = (views[si], &stacks[si]);
    let s = timed(
        || format!("bt_nuc_shutter_refresh({n} px, target {target_counts:e}, {step_value:?})"),
        || unsafe {
            bt_nuc_shutter_refresh(
                &shutter,
                refresh_gain.as_ptr(),
                bad_ptr(&bad),
                n,
                target_counts,
                &step_value,
                refresh_offset.as_mut_ptr(),
                n,
            )
        },
    );
    if s == bt_status::Ok {
        let (a, b) = (f64::from(step_value.a), f64::from(step_value.b));
        for p in 0..n {
            if bad_mode != 0 && bad[p] != 0 {
                oracle(refresh_offset[p].to_bits() == before[p].to_bits(), || {
                    format!("refresh changed bad pixel {p}'s offset")
                });
                continue;
            }
            let (g, o) = (f64::from(refresh_gain[p]), f64::from(refresh_offset[p]));
            let sh_mean = shutter_stack.mean[p];
            oracle(o.is_finite(), || {
                format!("refresh wrote offset {o:e} at good pixel {p} (G {g:e}, shutter {sh_mean:e}, target {target_counts:e}, {step_value:?})")
            });
            // x' = a (G n + O) + b; O was rounded to f32 from (target - b) / a - G n, so
            // the error is a times map_tolerance of the uncorrected value plus the f64
            // rounding of a(.) + b (a few 2^-53 of |b| and |target|, inside 2^-23).
            let x = a * (g * sh_mean + o) + b;
            let tol = a * map_tolerance(
                g,
                sh_mean,
                o,
                (target_counts - b) / a,
                sh_mean,
                (target_counts - b) / a,
            ) + 2.0 * F32_HALF_ULP * (b.abs() + target_counts.abs());
            oracle((x - target_counts).abs() <= tol, || {
                format!(
                    "refresh pixel {p}: a {a:e} (G {g:e} x {sh_mean:e} + O {o:e}) + b {b:e} = {x:e}, target {target_counts:e}, error {:e} > {tol:e}",
                    (x - target_counts).abs()
                )
            });
        }
    } else {
        oracle(slice_bytes(&refresh_offset) == slice_bytes(&before), || {
            format!("bt_nuc_shutter_refresh wrote on {s:?}")
        });
    }

    // Net signal of a detector seeing its housing, and back.
    let emissivity = d.f64(Kind::Fraction);
    let (object_k, reflected_k, housing_k) =
        (d.f64(Kind::TempK), d.f64(Kind::TempK), d.f64(Kind::TempK));
    let net_args = || {
        format!(
            "{}, e {emissivity:e}, To {object_k:e}, Tr {reflected_k:e}, Tint {housing_k:e}",
            curve_args()
        )
    };
    let mut net = Poisoned::<f64>::new();
    let s = timed(
        || format!("bt_net_signal_band({})", net_args()),
        || unsafe {
            bt_net_signal_band(
                the_band.ptr(),
                emissivity,
                object_k,
                reflected_k,
                housing_k,
                net.ptr(),
            )
        },
    );
    if s == bt_status::Ok {
        oracle(net.value.is_finite(), || {
            format!("net signal {:e}: {}", net.value, net_args())
        });
        let mut back = Poisoned::<f64>::new();
        let s = timed(
            || {
                format!(
                    "bt_object_from_net_signal_band({}, net {:e})",
                    net_args(),
                    net.value
                )
            },
            || unsafe {
                bt_object_from_net_signal_band(
                    the_band.ptr(),
                    net.value,
                    emissivity,
                    reflected_k,
                    housing_k,
                    back.ptr(),
                )
            },
        );
        if s == bt_status::Ok {
            let tol = net_tolerance_k(&the_band, emissivity, object_k, reflected_k, housing_k);
            let err = (back.value - object_k).abs();
            oracle(err <= tol, || {
                format!(
                    "To {object_k:e} -> net {:e} -> To {:e}: error {err:e} > {tol:e}: {}",
                    net.value,
                    back.value,
                    net_args()
                )
            });
        } else {
            oracle(back.untouched(), || {
                format!("object_from_net_signal wrote on {s:?}")
            });
        }
    } else {
        oracle(net.untouched(), || {
            format!("bt_net_signal_band wrote on {s:?}")
        });
    }
    let mut exponent = Poisoned::<f64>::new();
    let s = timed(
        || format!("bt_effective_exponent_band({}, {object_k:e})", curve_args()),
        || unsafe { bt_effective_exponent_band(the_band.ptr(), object_k, exponent.ptr()) },
    );
    if s == bt_status::Ok {
        oracle(exponent.value.is_finite(), || {
            format!("exponent {:e}", exponent.value)
        });
    } else {
        oracle(exponent.untouched(), || {
            format!("bt_effective_exponent_band wrote on {s:?}")
        });
    }

    // Fused conversions of a raw frame.
    if flags & 4096 == 0 {
        return;
    }
    let (lo_k, hi_k) = (250.0 + f64::from(d.u8()), 400.0 + 2.0 * f64::from(d.u8()));
    let tol_k = 0.01;
    let rails = bt_rails {
        dead_counts: d.u16() % 64,
        saturation_counts: u16::MAX - d.u16() % 64,
    };
    let mut rows = Poisoned::<usize>::new();
    let s = unsafe {
        if use_sh {
            bt_frame_table_rows_sakuma_hattori(&sh, lo_k, hi_k, tol_k, rows.ptr())
        } else {
            bt_frame_table_rows_band(the_band.ptr(), lo_k, hi_k, tol_k, rows.ptr())
        }
    };
    if s != bt_status::Ok || rows.value > 4096 {
        return;
    }
    let mut table = vec![
        bt_frame_row {
            coefficients: [0.0; 4]
        };
        rows.value
    ];
    let sc = bandtemp_fuzz::scene_from([0.95, 295.0, 1.0, 295.0, 1.0, 0.0, 295.0, 295.0]);
    let mut conv = Poisoned::<bt_frame_converter>::new();
    let s = unsafe {
        if use_sh {
            bt_frame_converter_new_sakuma_hattori(
                &sh,
                &sc,
                -counts_offset,
                &rails,
                lo_k,
                hi_k,
                tol_k,
                table.as_mut_ptr(),
                table.len(),
                conv.ptr(),
            )
        } else {
            bt_frame_converter_new_band(
                the_band.ptr(),
                &sc,
                counts_gain,
                counts_offset,
                &rails,
                lo_k,
                hi_k,
                tol_k,
                table.as_mut_ptr(),
                table.len(),
                conv.ptr(),
            )
        }
    };
    if s != bt_status::Ok {
        return;
    }
    let conv_width = if flags & 8192 == 0 {
        width
    } else {
        d.len(n + 1)
    };
    let counts: Vec<u16> = (0..n)
        .map(|p| {
            if flags & 16384 == 0 {
                (off[p] + resp[p] * (2000.0 + 40.0 * f64::from(d.u8()))).min(65535.0) as u16
            } else {
                d.u16()
            }
        })
        .collect();
    let emissivity_map: Vec<f32> = (0..n).map(|_| d.f32(Kind::Fraction)).collect();
    let step_ptr: *const bt_drift_step = if flags & 32768 == 0 {
        core::ptr::null()
    } else {
        &step_value
    };
    let (any_gain, any_offset): (Vec<f32>, Vec<f32>) = if two_point_ok && flags & 65536 == 0 {
        (gain.clone(), offset.clone())
    } else {
        (
            (0..n).map(|_| d.f32(Kind::Magnitude)).collect(),
            (0..n).map(|_| d.f32(Kind::Signed)).collect(),
        )
    };
    let (mp_maps, mp_levels): (Vec<f32>, usize) = if multi_ok && flags & 65536 == 0 {
        (maps.clone(), levels_used)
    } else {
        let l = 2 + d.len(4);
        (
            (0..(3 * l - 4) * n).map(|_| d.f32(Kind::Signed)).collect(),
            l,
        )
    };
    let conv_bad = if multi_ok {
        mp_bad.clone()
    } else {
        bad.clone()
    };
    for variant in 0..4 {
        let mut kelvin = vec![f32::from_bits(0xA5A5_A5A5); n];
        let mut summary = Poisoned::<bt_corrected_summary>::new();
        let names = [
            "corrected",
            "corrected_emissivity",
            "multi_point",
            "multi_point_emissivity",
        ];
        let s = timed(
            || {
                format!(
                    "bt_frame_convert_counts_{}({n} px, width {conv_width}, {}, {step_value:?})",
                    names[variant],
                    curve_args()
                )
            },
            || unsafe {
                match variant {
                    0 => bt_frame_convert_counts_corrected(
                        conv.ptr(),
                        table.as_ptr(),
                        table.len(),
                        any_gain.as_ptr(),
                        any_offset.as_ptr(),
                        conv_bad.as_ptr(),
                        conv_width,
                        step_ptr,
                        counts.as_ptr(),
                        kelvin.as_mut_ptr(),
                        n,
                        summary.ptr(),
                    ),
                    1 => bt_frame_convert_counts_corrected_emissivity(
                        conv.ptr(),
                        table.as_ptr(),
                        table.len(),
                        any_gain.as_ptr(),
                        any_offset.as_ptr(),
                        conv_bad.as_ptr(),
                        conv_width,
                        step_ptr,
                        counts.as_ptr(),
                        emissivity_map.as_ptr(),
                        kelvin.as_mut_ptr(),
                        n,
                        summary.ptr(),
                    ),
                    2 => bt_frame_convert_counts_multi_point(
                        conv.ptr(),
                        table.as_ptr(),
                        table.len(),
                        mp_maps.as_ptr(),
                        mp_maps.len(),
                        mp_levels,
                        conv_bad.as_ptr(),
                        conv_width,
                        step_ptr,
                        counts.as_ptr(),
                        kelvin.as_mut_ptr(),
                        n,
                        summary.ptr(),
                    ),
                    _ => bt_frame_convert_counts_multi_point_emissivity(
                        conv.ptr(),
                        table.as_ptr(),
                        table.len(),
                        mp_maps.as_ptr(),
                        mp_maps.len(),
                        mp_levels,
                        conv_bad.as_ptr(),
                        conv_width,
                        step_ptr,
                        counts.as_ptr(),
                        emissivity_map.as_ptr(),
                        kelvin.as_mut_ptr(),
                        n,
                        summary.ptr(),
                    ),
                }
            },
        );
        if s != bt_status::Ok {
            oracle(
                summary.untouched() && kelvin.iter().all(|v| v.to_bits() == 0xA5A5_A5A5),
                || format!("convert_counts_{} wrote on {s:?}", names[variant]),
            );
            continue;
        }
        let c = summary.value;
        let m = c.frame;
        let parts = [
            m.converted,
            m.dead,
            m.saturated,
            m.emissivity_invalid,
            m.non_finite,
            m.below_background,
            m.below_range,
            m.above_range,
        ];
        let bad_count = conv_bad.iter().filter(|&&b| b != 0).count() as u64;
        let finite_px = kelvin.iter().filter(|k| k.is_finite()).count() as u64;
        let nan = kelvin.iter().filter(|k| k.is_nan()).count() as u64;
        oracle(
            m.pixels == n as u64
                && parts.iter().sum::<u64>() == m.pixels
                && c.bad_replaced + c.bad_unreplaced <= bad_count
                && finite_px == m.converted
                && nan == m.pixels - m.converted,
            || {
                format!(
                    "convert_counts_{}: {c:?} with {finite_px} finite and {nan} NaN of {n}, {bad_count} bad",
                    names[variant]
                )
            },
        );
    }
});

/// `which_frames`: whether the frame count is altered too (one byte).
fn which_frames(d: &mut Dec<'_>) -> bool {
    d.u8() & 1 == 1
}

/// dL/dT of the band at T (0 when it has none).
fn derivative(b: &FuzzBand, t: f64) -> f64 {
    let mut slope = Poisoned::<f64>::new();
    if unsafe { bt_band_radiance_derivative(b.ptr(), t, slope.ptr()) } == bt_status::Ok {
        slope.value
    } else {
        0.0
    }
}

/// Band radiance at T (NaN when it has none).
fn radiance(b: &FuzzBand, t: f64) -> f64 {
    let mut l = Poisoned::<f64>::new();
    if unsafe { bt_band_radiance(b.ptr(), t, l.ptr()) } == bt_status::Ok {
        l.value
    } else {
        f64::NAN
    }
}

/// The round-trip tolerance of net signal -> object temperature, K: the inversion gets
/// L(T_o) = (net + L(T_int) - (1 - e) L(T_r)) / e, whose absolute error is that of the
/// terms summed: each band radiance carries the band integral's 1e-12 relative accuracy
/// (as the scene target's tolerance) and the sums a few 2^-53, so 1e-12 (e L_o +
/// (1 - e) L_r + L_int) / e in radiance, which 1 / L'(T_o) converts to kelvin; plus the
/// band inversion's own 1e-9 T (the scene target's bound). A band with no derivative at T
/// gets no bound (infinite).
fn net_tolerance_k(b: &FuzzBand, e: f64, t_o: f64, t_r: f64, t_int: f64) -> f64 {
    let terms = e * radiance(b, t_o) + (1.0 - e) * radiance(b, t_r) + radiance(b, t_int);
    let conditioning = 1e-12 * terms / (e * derivative(b, t_o));
    1e-9 * t_o
        + if conditioning.is_nan() {
            f64::INFINITY
        } else {
            conditioning
        }
}
