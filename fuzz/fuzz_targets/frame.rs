//! Frame tables and converters through the C ABI: table sizes for any range and tolerance,
//! converters built in storage of any size (band and Sakuma-Hattori curves, any scene,
//! counts map and rails), converter and table bytes altered, scene and rails updates,
//! geometry, and conversion of counts and signal frames of any content and length, with
//! and without emissivity maps of any length.
//!
//! Oracles: errors leave every out value untouched (the rows given to a constructor are
//! scratch on error, as documented; a converter that an update refuses is unchanged);
//! a geometry is finite, ordered and within its tolerance; a summary adds up to its pixel
//! count, with exactly the converted pixels finite (unaltered tables) and every other
//! pixel NaN; with an unaltered converter and no emissivity map, every converted pixel is
//! within the geometry's max_pixel_error_k (plus the float rounding of the signal) of
//! exact inversion by `bt_object_temperature`; each call within the per-call limit.
//!
//! Table planning (the calls that size or build a table: `bt_frame_table_rows_*`,
//! `bt_frame_converter_new_*`) was a finding of this target: it measured every row of every
//! level it tried and ran for seconds over wide ranges before refusing (8-14 um over
//! 14-1951 K at 1.4e-5 K: 8.6 s). Unservable ranges are now refused up front, so every
//! valid range is planned; planning calls get `BT_FUZZ_PLAN_LIMIT_MS` (default 500 ms, a
//! margin for AddressSanitizer over the 50 ms release bound that
//! `capi/tests/ffi_bounded_time.rs` enforces). `BT_FUZZ_BOUNDED_PLAN=1` restores the old
//! step-around (only ranges within 100-4000 K, at most a factor 8 wide, tolerance at
//! least 0.1 mK).
#![no_main]

use bandtemp_capi::*;
use bandtemp_fuzz::{
    band, bytes_of, oracle, scene, slice_bytes, timed, timed_with_limit, Dec, FuzzBand, Kind,
    Poisoned,
};
use libfuzzer_sys::fuzz_target;
use std::sync::OnceLock;

/// The limit of the table-planning calls (module docs), ms.
fn plan_limit_ms() -> f64 {
    static LIMIT: OnceLock<f64> = OnceLock::new();
    *LIMIT.get_or_init(|| {
        std::env::var("BT_FUZZ_PLAN_LIMIT_MS")
            .ok()
            .and_then(|s| s.parse().ok())
            .unwrap_or(500.0)
    })
}

/// `BT_FUZZ_BOUNDED_PLAN=1`: plan only the ranges of the old step-around (module docs).
fn bounded_plan_only() -> bool {
    static BOUNDED: OnceLock<bool> = OnceLock::new();
    *BOUNDED.get_or_init(|| std::env::var("BT_FUZZ_BOUNDED_PLAN").is_ok_and(|v| v == "1"))
}

/// The curve a converter is built over.
enum Curve {
    Band(FuzzBand),
    Sh(bt_sakuma_hattori),
}

const MAX_ROWS: usize = 2048;
const MAX_PIXELS: usize = 1024;

fuzz_target!(|data: &[u8]| {
    let mut d = Dec::new(data);
    let flags = d.u8();
    let curve = if flags & 1 == 0 {
        if flags & 2 == 0 {
            // The usual camera band: a rectangular 8-14 um microbolometer band.
            let mut b = band(&mut Dec::new(&[]));
            b.raw.lo_um = 8.0;
            b.raw.hi_um = 14.0;
            b.raw.detector = 0;
            Curve::Band(b)
        } else {
            Curve::Band(band(&mut d))
        }
    } else if flags & 2 == 0 {
        let a_um = 0.9 + 10.0 * f64::from(d.u8()) / 255.0;
        let b_umk = -100.0 + 200.0 * f64::from(d.u8()) / 255.0;
        let c = 10f64.powf(3.0 + 5.0 * f64::from(d.u8()) / 255.0);
        Curve::Sh(bt_sakuma_hattori { a_um, b_umk, c })
    } else {
        Curve::Sh(bt_sakuma_hattori {
            a_um: d.f64(Kind::Um),
            b_umk: d.f64(Kind::Signed),
            c: d.f64(Kind::Magnitude),
        })
    };
    let sc = scene(&mut d);
    // The range and tolerance: narrow physical most of the time, anything otherwise.
    let (lo_k, hi_k, tol_k) = if flags & 4 == 0 {
        let lo = 200.0 + 600.0 * f64::from(d.u8()) / 255.0;
        let hi = lo * (1.05 + 2.0 * f64::from(d.u8()) / 255.0);
        let tol = 10f64.powf(-3.0 + 2.0 * f64::from(d.u8()) / 255.0);
        (lo, hi, tol)
    } else {
        (
            d.f64(Kind::TempK),
            d.f64(Kind::TempK),
            d.f64(Kind::ToleranceK),
        )
    };
    let gain = if flags & 8 == 0 {
        10f64.powf(-4.0 + 3.0 * f64::from(d.u8()) / 255.0)
    } else {
        d.f64(Kind::Magnitude)
    };
    let offset = if flags & 8 == 0 {
        -f64::from(d.u8())
    } else {
        d.f64(Kind::Signed)
    };
    let rails = bt_rails {
        dead_counts: d.u16() % 64,
        saturation_counts: u16::MAX - d.u16() % 64,
    };
    let rails = if flags & 16 == 0 {
        rails
    } else {
        bt_rails {
            dead_counts: d.u16(),
            saturation_counts: d.u16(),
        }
    };
    let storage_rows = d.len(MAX_ROWS);
    // The old step-around, on request only (module docs).
    let valid = lo_k > 0.0 && hi_k > lo_k && hi_k.is_finite() && tol_k > 0.0 && tol_k.is_finite();
    let bounded = lo_k >= 100.0 && hi_k <= 4000.0 && hi_k <= 8.0 * lo_k && tol_k >= 1e-4;
    if valid && !bounded && bounded_plan_only() {
        return;
    }
    let describe = |c: &Curve| match c {
        Curve::Band(b) => format!("band {:?} wl {:?} r {:?}", b.raw, b.wl, b.r),
        Curve::Sh(p) => format!("{p:?}"),
    };
    let args = || {
        format!(
            "{}, scene {sc:?}, range {lo_k:e}..{hi_k:e} tol {tol_k:e}, gain {gain:e} offset {offset:e}, {rails:?}, storage {storage_rows}",
            describe(&curve)
        )
    };

    // Table size.
    let mut rows_needed = Poisoned::<usize>::new();
    let s = timed_with_limit(
        plan_limit_ms(),
        || format!("bt_frame_table_rows_*({})", args()),
        || unsafe {
            match &curve {
                Curve::Band(b) => {
                    bt_frame_table_rows_band(b.ptr(), lo_k, hi_k, tol_k, rows_needed.ptr())
                }
                Curve::Sh(p) => {
                    bt_frame_table_rows_sakuma_hattori(p, lo_k, hi_k, tol_k, rows_needed.ptr())
                }
            }
        },
    );
    if s == bt_status::Ok {
        oracle(rows_needed.value >= 1, || {
            format!("0 rows needed: {}", args())
        });
    } else {
        oracle(rows_needed.untouched(), || {
            format!("table_rows wrote on {s:?}: {}", args())
        });
        if flags & 32 == 0 {
            return;
        }
    }

    // The converter, in storage of the decoded size.
    let mut table = vec![
        bt_frame_row {
            coefficients: [0.0; 4]
        };
        storage_rows
    ];
    let mut conv = Poisoned::<bt_frame_converter>::new();
    let s = timed_with_limit(
        plan_limit_ms(),
        || format!("bt_frame_converter_new_*({})", args()),
        || unsafe {
            match &curve {
                Curve::Band(b) => bt_frame_converter_new_band(
                    b.ptr(),
                    &sc,
                    gain,
                    offset,
                    &rails,
                    lo_k,
                    hi_k,
                    tol_k,
                    table.as_mut_ptr(),
                    table.len(),
                    conv.ptr(),
                ),
                Curve::Sh(p) => bt_frame_converter_new_sakuma_hattori(
                    p,
                    &sc,
                    -offset,
                    &rails,
                    lo_k,
                    hi_k,
                    tol_k,
                    table.as_mut_ptr(),
                    table.len(),
                    conv.ptr(),
                ),
            }
        },
    );
    if s != bt_status::Ok {
        oracle(conv.untouched(), || {
            format!("converter_new wrote the converter on {s:?}: {}", args())
        });
        return;
    }
    oracle(
        rows_needed.untouched() || rows_needed.value <= storage_rows,
        || {
            format!(
                "built in {storage_rows} rows though {} are needed: {}",
                rows_needed.value,
                args()
            )
        },
    );
    let mut geometry = Poisoned::<bt_frame_geometry>::new();
    let s = timed(
        || format!("bt_frame_converter_geometry({})", args()),
        || unsafe {
            bt_frame_converter_geometry(conv.ptr(), table.as_ptr(), table.len(), geometry.ptr())
        },
    );
    oracle(s == bt_status::Ok, || {
        format!("geometry of a fresh converter: {s:?}: {}", args())
    });
    let g = geometry.value;
    oracle(
        g.lo_k == lo_k
            && g.hi_k == hi_k
            && g.signal_lo < g.signal_hi
            && g.rows >= 1
            && g.rows <= storage_rows
            && g.max_table_error_k <= g.max_pixel_error_k
            && g.max_pixel_error_k <= g.tolerance_k
            && g.tolerance_k == tol_k,
        || format!("geometry {g:?}: {}", args()),
    );

    // Alterations: the converter's bytes, the table's bytes, the rows handed back.
    let mut altered = false;
    let mut rows_given = table.len();
    for _ in 0..usize::from(d.u8() % 4) {
        match d.u8() % 4 {
            0 => {
                let i = usize::from(d.u8()) % 256;
                let v = d.u8();
                // SAFETY: the converter is 256 plain bytes.
                unsafe { (conv.ptr().cast::<u8>()).add(i).write(v) };
                altered = true;
            }
            1 if !table.is_empty() => {
                let i = usize::from(d.u16()) % table.len();
                let j = usize::from(d.u8() % 4);
                table[i].coefficients[j] = d.f32(Kind::Signed);
                altered = true;
            }
            2 => {
                rows_given = d.len(MAX_ROWS).min(table.len());
                altered = true;
            }
            _ => {}
        }
    }

    // Updates: rails and scene.
    if d.bool() {
        let new_rails = bt_rails {
            dead_counts: d.u16(),
            saturation_counts: d.u16(),
        };
        let before = bytes_of(&conv.value).to_vec();
        let s = timed(
            || format!("bt_frame_converter_set_rails({new_rails:?}, {})", args()),
            || unsafe {
                bt_frame_converter_set_rails(conv.ptr(), table.as_ptr(), rows_given, &new_rails)
            },
        );
        if s != bt_status::Ok {
            oracle(bytes_of(&conv.value) == before.as_slice(), || {
                format!("set_rails changed the converter on {s:?}")
            });
        }
    }
    let new_scene = if d.bool() { Some(scene(&mut d)) } else { None };
    let sc_now = if let Some(ns) = new_scene {
        let before = bytes_of(&conv.value).to_vec();
        let s = timed(
            || format!("bt_frame_converter_set_scene({ns:?}, {})", args()),
            || unsafe {
                match &curve {
                    Curve::Band(b) => bt_frame_converter_set_scene_band(
                        conv.ptr(),
                        table.as_ptr(),
                        rows_given,
                        b.ptr(),
                        &ns,
                    ),
                    Curve::Sh(p) => bt_frame_converter_set_scene_sakuma_hattori(
                        conv.ptr(),
                        table.as_ptr(),
                        rows_given,
                        p,
                        &ns,
                    ),
                }
            },
        );
        if s == bt_status::Ok {
            ns
        } else {
            oracle(bytes_of(&conv.value) == before.as_slice(), || {
                format!("set_scene changed the converter on {s:?}")
            });
            sc
        }
    } else {
        sc
    };

    // Frames.
    let n = d.len(MAX_PIXELS);
    let as_counts = d.bool();
    let counts: Vec<u16> = (0..n).map(|_| d.u16()).collect();
    let signal: Vec<f32> = (0..n).map(|_| d.f32(Kind::Magnitude)).collect();
    let emap_mode = d.u8() % 4;
    let emap: Option<Vec<f32>> = match emap_mode {
        0 | 1 => None,
        2 => Some((0..n).map(|_| d.f32(Kind::Fraction)).collect()),
        _ => Some(
            (0..d.len(MAX_PIXELS))
                .map(|_| d.f32(Kind::Fraction))
                .collect(),
        ),
    };
    let out_len = if d.u8().is_multiple_of(8) {
        d.len(MAX_PIXELS)
    } else {
        n
    };
    let mut kelvin = vec![f32::from_bits(0x7fa5_a5a5); out_len];
    let kelvin_before = slice_bytes(&kelvin).to_vec();
    let mut summary = Poisoned::<bt_frame_summary>::new();
    let (e_ptr, e_len) = match &emap {
        Some(e) => (e.as_ptr(), e.len()),
        None => (core::ptr::null(), 0),
    };
    let s = timed(
        || {
            format!(
                "bt_frame_convert({n} px, counts {as_counts}, emap {emap_mode}, {})",
                args()
            )
        },
        || unsafe {
            if as_counts {
                bt_frame_convert_counts(
                    conv.ptr(),
                    table.as_ptr(),
                    rows_given,
                    counts.as_ptr(),
                    n,
                    e_ptr,
                    e_len,
                    kelvin.as_mut_ptr(),
                    kelvin.len(),
                    summary.ptr(),
                )
            } else {
                bt_frame_convert_signal(
                    conv.ptr(),
                    table.as_ptr(),
                    rows_given,
                    signal.as_ptr(),
                    n,
                    e_ptr,
                    e_len,
                    kelvin.as_mut_ptr(),
                    kelvin.len(),
                    summary.ptr(),
                )
            }
        },
    );
    if s != bt_status::Ok {
        oracle(
            summary.untouched() && slice_bytes(&kelvin) == kelvin_before.as_slice(),
            || format!("convert wrote its outputs on {s:?}: {}", args()),
        );
        oracle(
            altered
                || out_len != n
                || emap_mode == 3 && e_len != n
                || s == bt_status::FrameEmissivityMapUnavailable,
            || {
                format!(
                    "convert of an unaltered converter refused: {s:?}: {}",
                    args()
                )
            },
        );
        return;
    }
    let m = summary.value;
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
    oracle(
        m.pixels == n as u64 && parts.iter().sum::<u64>() == m.pixels,
        || format!("summary {m:?} for {n} pixels: {}", args()),
    );
    let nan = kelvin.iter().filter(|k| k.is_nan()).count() as u64;
    oracle(nan >= m.pixels - m.converted, || {
        format!("{nan} NaN pixels but {m:?}: {}", args())
    });
    if altered {
        return;
    }
    let finite_px = kelvin.iter().filter(|k| k.is_finite()).count() as u64;
    oracle(
        finite_px == m.converted && nan == m.pixels - m.converted,
        || {
            format!(
                "{finite_px} finite and {nan} NaN pixels but {m:?}: {}",
                args()
            )
        },
    );
    // Accuracy against exact inversion (uniform scene): a few pixels per frame.
    if emap.is_some() {
        return;
    }
    for i in (0..n).step_by((n / 8).max(1)) {
        let k = kelvin[i];
        if !k.is_finite() {
            continue;
        }
        // The signal the pixel stands for, in the curve's units.
        let s = if as_counts {
            match &curve {
                Curve::Band(_) => gain * f64::from(counts[i]) + offset,
                Curve::Sh(_) => f64::from(counts[i]) + offset,
            }
        } else {
            f64::from(signal[i])
        };
        let mut exact = Poisoned::<f64>::new();
        let se = unsafe {
            match &curve {
                Curve::Band(b) => bt_object_temperature(b.ptr(), &sc_now, s, exact.ptr()),
                Curve::Sh(p) => bt_sakuma_hattori_object_temperature(p, &sc_now, s, exact.ptr()),
            }
        };
        if se != bt_status::Ok {
            continue;
        }
        let t = exact.value;
        // The float pipeline: S and the background in f32 (1 ulp of S + B each), turned
        // into kelvin by 1/(G S'(T)), plus the f32 output's half ulp.
        let g = sc_now.window_transmittance * sc_now.atm_transmittance * sc_now.emissivity;
        let slope = match &curve {
            Curve::Band(b) => {
                let mut dl = Poisoned::<f64>::new();
                if unsafe { bt_band_radiance_derivative(b.ptr(), t, dl.ptr()) } == bt_status::Ok {
                    dl.value
                } else {
                    continue;
                }
            }
            Curve::Sh(p) => {
                let mut sv = Poisoned::<f64>::new();
                if unsafe { bt_sakuma_hattori_signal(p, t, sv.ptr()) } != bt_status::Ok {
                    continue;
                }
                let den = p.a_um * t + p.b_umk;
                let y = bandtemp::constants::C2_UMK / den;
                sv.value * (p.a_um / den) * (y * (1.0 + 1.0 / y.exp_m1()))
            }
        };
        let float_allowance =
            4.0 * f64::from(f32::EPSILON) * (s.abs() * 2.0) / (g * slope) + 1e-7 * t;
        let err = (f64::from(k) - t).abs();
        oracle(err <= g_max(&geometry.value) + float_allowance, || {
            format!("pixel {i}: {k} K vs exact {t} K (error {err:e}, allowed {:e} + {float_allowance:e}), S {s:e}: {}",
                g_max(&geometry.value), args())
        });
    }
});

fn g_max(g: &bt_frame_geometry) -> f64 {
    g.max_pixel_error_k
}
