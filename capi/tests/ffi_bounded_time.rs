//! Bounded time on every input: the exports of the C ABI driven with hostile inputs
//! (huge and tiny ranges, tiny and huge tolerances, NaN and infinities, subnormals, long
//! response tables and frames in valid buffers), each call timed on its own. A firmware
//! watchdog resets a part whose call runs away; here a call fails the test when it takes
//! longer than [`limit`] (50 ms in a release build, the configuration that matters:
//! `cargo test --release -p bandtemp-capi --test ffi_bounded_time`, which `.ci/run` runs).
//!
//! Calls whose input is a frame or a list of points take time in proportion to its
//! length; their limit adds [`PER_ELEMENT`] per element on top (frames and point lists
//! of a million entries are driven).
//!
//! The limit is a bound on runaway work (seconds on bad input), not a speed measurement:
//! typical calls take microseconds (criterion benches measure speed).
//!
//! Four groups are `#[ignore]`d, with their reasons (two more below: the band
//! verification reports cost one inversion per sample, up to a million samples; the
//! coverage report is quadratic in its point count). Band integrals over long tabulated
//! responses cost time linear in the table length, up to about 8 us per point on the host
//! (a 10,000-point table: about 80 ms per inversion; `bt_sakuma_hattori_fit_band`, 2,065
//! integrals, about 0.8 s at 1,000 points), bounded by the length but over the limit. An
//! instrument's response table has tens to hundreds of points. Spectral-mode inversions
//! on a band twelve decades wide (1e-6 to 1e6 um) take 25-50 ms per call under load.
//!
//! `every_header_export_is_driven` parses `include/bandtemp.h` and fails when an export is
//! neither called here nor listed, with a reason, in `NO_INPUT_EXPORTS` (empty today).
//!
//! Run it with `cargo test --release -p bandtemp-capi --test ffi_bounded_time --
//! --ignored`; `BANDTEMP_TIME_PROFILE=1` with `--nocapture` prints the slowest call of
//! every function.
#![allow(clippy::too_many_lines)]

use bandtemp_capi::*;
use std::time::{Duration, Instant};

/// The per-call limit: 50 ms in release; a debug build (unoptimised float code runs
/// 10-40 times slower) gets 25 times as long, still far below the seconds of a runaway.
fn limit() -> Duration {
    if cfg!(debug_assertions) {
        Duration::from_millis(50 * 25)
    } else {
        Duration::from_millis(50)
    }
}

/// The documented exceptions to [`limit`], as a factor on it: `bt_sakuma_hattori_fit_band`
/// evaluates 2,065 band integrals by design (64 fit temperatures and a 2,001-point check
/// of the fitted curve against the exact integral), about 100 ms on the host for a short
/// tabulated response; it is a calibration-station function, not a per-reading one.
/// `bt_curve_fit_band` is the same fit for either curve form (the same 2,001-point check).
fn cost_factor(label: &str) -> u32 {
    if label.starts_with("bt_sakuma_hattori_fit_band") || label.starts_with("bt_curve_fit_band") {
        10
    } else {
        1
    }
}

/// The allowance per buffer element (table point, pixel), on top of [`limit`].
const PER_ELEMENT: Duration = Duration::from_nanos(200);

/// Hostile scalars: non-finite, signed zeros, subnormals, the double range's ends, and
/// magnitudes from far below to far above anything physical.
const VALUES: &[f64] = &[
    f64::NAN,
    f64::INFINITY,
    f64::NEG_INFINITY,
    0.0,
    -0.0,
    -1.0,
    5e-324,
    1e-300,
    1e-9,
    1e-3,
    0.9,
    1.0,
    300.0,
    1500.0,
    1e6,
    1e25,
    1e300,
    f64::MAX,
];

/// Temperatures and ranges for the range-taking calls (a shorter list: these calls take
/// four of them at once).
const RANGE_VALUES: &[f64] = &[
    f64::NAN,
    -1.0,
    5e-324,
    1e-3,
    1.0,
    250.0,
    300.0,
    1200.0,
    1e6,
    1.39e25,
    f64::MAX,
];

/// Tolerances, kelvin.
const TOLERANCES: &[f64] = &[
    f64::NAN,
    -1.0,
    5e-324,
    1e-12,
    1e-6,
    1e-3,
    0.9,
    10.0,
    1e6,
    f64::MAX,
];

/// Collects the calls that ran over their limit.
struct Watch {
    over: Vec<String>,
    calls: u64,
    slowest: Duration,
    slowest_what: String,
    /// Slowest call per (function, buffer length), kept when BANDTEMP_TIME_PROFILE is set.
    profile: std::collections::BTreeMap<(String, usize), (Duration, String)>,
}

impl Watch {
    fn new() -> Self {
        Watch {
            over: Vec::new(),
            calls: 0,
            slowest: Duration::ZERO,
            slowest_what: String::new(),
            profile: std::collections::BTreeMap::new(),
        }
    }

    /// Times one call; `elements` is the length of its largest buffer (0 for none).
    fn call(&mut self, what: impl Fn() -> String, elements: usize, f: impl FnOnce() -> bt_status) {
        let start = Instant::now();
        let status = f();
        let took = start.elapsed();
        self.calls += 1;
        let label = what();
        let allowed = limit() * cost_factor(&label)
            + PER_ELEMENT * u32::try_from(elements).unwrap_or(u32::MAX);
        if std::env::var_os("BANDTEMP_TIME_PROFILE").is_some() {
            let function = label.split('(').next().unwrap_or("").to_string();
            let entry = self.profile.entry((function, elements)).or_default();
            if took > entry.0 {
                *entry = (took, label.clone());
            }
        }
        if took > self.slowest {
            self.slowest = took;
            self.slowest_what.clone_from(&label);
        }
        if took > allowed {
            self.over.push(format!(
                "{label} took {took:?} (limit {allowed:?}), status {status:?}"
            ));
        }
    }

    fn finish(self, group: &str) {
        for ((_, elements), (took, what)) in &self.profile {
            println!("  {took:>12?}  n={elements:<8} {what}");
        }
        println!(
            "{group}: {} calls, slowest {:?}: {}",
            self.calls, self.slowest, self.slowest_what
        );
        assert!(self.calls > 0, "{group}: no calls made");
        assert!(
            self.over.is_empty(),
            "{group}: {} calls over the limit:\n{}",
            self.over.len(),
            self.over.join("\n")
        );
    }
}

/// A long valid response table: `n` points over 0.5-30 um, a smooth bump.
fn long_table(n: usize) -> (Vec<f64>, Vec<f64>) {
    let step = 29.5 / (n - 1) as f64;
    let wavelengths: Vec<f64> = (0..n).map(|i| 0.5 + step * i as f64).collect();
    let values = wavelengths
        .iter()
        .map(|w| (-((w - 10.0) / 4.0) * ((w - 10.0) / 4.0)).exp())
        .collect();
    (wavelengths, values)
}

fn rect(lo_um: f64, hi_um: f64, detector: bt_detector) -> bt_band {
    bt_band {
        lo_um,
        hi_um,
        detector,
        response_um: core::ptr::null(),
        response: core::ptr::null(),
        response_len: 0,
    }
}

fn tabulated(lo_um: f64, hi_um: f64, table: &(Vec<f64>, Vec<f64>)) -> bt_band {
    bt_band {
        lo_um,
        hi_um,
        detector: bt_detector::Energy,
        response_um: table.0.as_ptr(),
        response: table.1.as_ptr(),
        response_len: table.0.len(),
    }
}

/// Hostile bands: ordinary, very narrow, very wide, at the ends of the double range, and
/// tabulated with the given tables.
fn bands(tables: &[(Vec<f64>, Vec<f64>)]) -> Vec<(String, bt_band)> {
    let mut out = vec![
        ("8-14 energy".into(), rect(8.0, 14.0, bt_detector::Energy)),
        ("3-5 photon".into(), rect(3.0, 5.0, bt_detector::Photon)),
        ("0.9-1.1 energy".into(), rect(0.9, 1.1, bt_detector::Energy)),
        (
            "1e-3 wide 1e-15".into(),
            rect(1e-3, 1e-3 * (1.0 + 1e-15), bt_detector::Energy),
        ),
        ("1e-6-1e6".into(), rect(1e-6, 1e6, bt_detector::Photon)),
        (
            "1e-300-1e300".into(),
            rect(1e-300, 1e300, bt_detector::Energy),
        ),
        (
            "5e-324-MAX".into(),
            rect(5e-324, f64::MAX, bt_detector::Photon),
        ),
        ("1e3-1e4".into(), rect(1e3, 1e4, bt_detector::Energy)),
        ("NaN".into(), rect(f64::NAN, 14.0, bt_detector::Energy)),
        ("inverted".into(), rect(14.0, 8.0, bt_detector::Energy)),
    ];
    for table in tables {
        out.push((
            format!("table {} points", table.0.len()),
            tabulated(0.1, 100.0, table),
        ));
    }
    out
}

/// The response tables of the always-on tests: a short one (the rectangular bands above
/// cover the rest). Long tables are the ignored test's, below.
fn tables() -> Vec<(Vec<f64>, Vec<f64>)> {
    vec![(vec![7.0, 15.0], vec![1.0, 0.5]), long_table(16)]
}

fn scenes() -> Vec<bt_scene> {
    let ordinary = bt_scene {
        emissivity: 0.92,
        reflected_k: 293.15,
        atm_transmittance: 0.97,
        atm_k: 295.0,
        window_transmittance: 0.95,
        window_reflectance: 0.02,
        window_k: 300.0,
        window_reflected_k: 298.0,
    };
    vec![
        ordinary,
        bt_scene {
            emissivity: 1e-300,
            reflected_k: 1e25,
            ..ordinary
        },
        bt_scene {
            emissivity: 5e-324,
            atm_transmittance: 5e-324,
            window_transmittance: 1e-300,
            window_reflectance: 0.999_999,
            ..ordinary
        },
        bt_scene {
            emissivity: f64::NAN,
            ..ordinary
        },
        bt_scene {
            reflected_k: 5e-324,
            atm_k: f64::MAX,
            window_k: 1e-300,
            ..ordinary
        },
    ]
}

fn curves() -> Vec<bt_sakuma_hattori> {
    vec![
        bt_sakuma_hattori {
            a_um: 3.88,
            b_umk: 21.0,
            c: 4.0e7,
        },
        bt_sakuma_hattori {
            a_um: 1e-300,
            b_umk: 1e300,
            c: 1e300,
        },
        bt_sakuma_hattori {
            a_um: 1e6,
            b_umk: -1e6,
            c: 5e-324,
        },
        bt_sakuma_hattori {
            a_um: f64::NAN,
            b_umk: 0.0,
            c: 1.0,
        },
        bt_sakuma_hattori {
            a_um: 0.65,
            b_umk: 0.0,
            c: f64::MAX,
        },
    ]
}

#[test]
fn spectral_and_air_calls_are_bounded() {
    let mut watch = Watch::new();
    let mut out = 0.0;
    for &a in VALUES {
        for &b in VALUES {
            let what = || format!("({a:e}, {b:e})");
            watch.call(
                || format!("bt_spectral_radiance{}", what()),
                0,
                || unsafe { bt_spectral_radiance(a, b, &mut out) },
            );
            watch.call(
                || format!("bt_spectral_photon_radiance{}", what()),
                0,
                || unsafe { bt_spectral_photon_radiance(a, b, &mut out) },
            );
            watch.call(
                || format!("bt_air_dew_point_k{}", what()),
                0,
                || unsafe { bt_air_dew_point_k(a, b, &mut out) },
            );
            for &c in &[f64::NAN, 1e-300, 1013.25, 1e300] {
                for &d in &[f64::NAN, 5e-324, 10.0, 1e300] {
                    watch.call(
                        || format!("bt_path_spectral_transmittance{} {c:e} {d:e}", what()),
                        0,
                        || unsafe { bt_path_spectral_transmittance(a, 0.5, c, d, b, &mut out) },
                    );
                }
            }
        }
        watch.call(
            || format!("bt_blackbody_fraction({a:e})"),
            0,
            || unsafe { bt_blackbody_fraction(a, &mut out) },
        );
        watch.call(
            || format!("bt_peak_wavelength_um({a:e})"),
            0,
            || unsafe { bt_peak_wavelength_um(a, &mut out) },
        );
        watch.call(
            || format!("bt_total_radiance({a:e})"),
            0,
            || unsafe { bt_total_radiance(a, &mut out) },
        );
        watch.call(
            || format!("bt_air_saturation_vapour_pressure_hpa({a:e})"),
            0,
            || unsafe { bt_air_saturation_vapour_pressure_hpa(a, &mut out) },
        );
    }
    for status in [-1, 0, 1, 105, 1300, i32::MAX, i32::MIN] {
        watch.call(
            || format!("bt_status_message({status})"),
            0,
            || {
                let _ = bt_status_message(status);
                bt_status::Ok
            },
        );
    }
    for index in [0, 10, 11, usize::MAX] {
        watch.call(
            || format!("bt_surface_input_name({index})"),
            0,
            || {
                let _ = bt_surface_input_name(index);
                bt_status::Ok
            },
        );
    }
    watch.call(
        || "bt_version".into(),
        0,
        || {
            let _ = bt_version();
            bt_status::Ok
        },
    );
    watch.finish("spectral, air, names");
}

#[test]
fn band_calls_are_bounded() {
    let tables = tables();
    let mut watch = Watch::new();
    let mut out = 0.0;
    for (name, band) in bands(&tables) {
        let n = 0; // short tables only: no per-element allowance
        for &t in VALUES {
            watch.call(
                || format!("bt_band_radiance({name}, {t:e})"),
                n,
                || unsafe { bt_band_radiance(&band, t, &mut out) },
            );
            watch.call(
                || format!("bt_band_radiance_derivative({name}, {t:e})"),
                n,
                || unsafe { bt_band_radiance_derivative(&band, t, &mut out) },
            );
            watch.call(
                || format!("bt_band_temperature({name}, {t:e})"),
                n,
                || unsafe { bt_band_temperature(&band, t, &mut out) },
            );
            for &rh in &[f64::NAN, 0.0, 0.5, 1.0] {
                for &distance in &[5e-324, 10.0, 1e300] {
                    watch.call(
                        || format!("bt_path_band_transmittance({name}, {t:e}, {rh}, {distance:e})"),
                        n,
                        || unsafe {
                            bt_path_band_transmittance(
                                &band, 295.0, rh, 1013.25, distance, t, &mut out,
                            )
                        },
                    );
                }
            }
        }
        for &lo in RANGE_VALUES {
            for &hi in RANGE_VALUES {
                let mut fit = bt_sakuma_hattori {
                    a_um: 0.0,
                    b_umk: 0.0,
                    c: 0.0,
                };
                watch.call(
                    || format!("bt_sakuma_hattori_fit_band({name}, {lo:e}, {hi:e})"),
                    n,
                    || unsafe { bt_sakuma_hattori_fit_band(&band, lo, hi, &mut fit, &mut out) },
                );
            }
        }
    }
    watch.finish("band");
}

#[test]
fn scene_calls_are_bounded() {
    let tables = tables();
    let mut watch = Watch::new();
    let mut out = 0.0;
    for (name, band) in bands(&tables) {
        let n = 0; // short tables only: no per-element allowance
        for (s, scene) in scenes().iter().enumerate() {
            for &t in VALUES {
                let what = || format!("({name}, scene {s}, {t:e})");
                watch.call(
                    || format!("bt_sensor_radiance{}", what()),
                    n,
                    || unsafe { bt_sensor_radiance(&band, scene, t, &mut out) },
                );
                watch.call(
                    || format!("bt_object_temperature{}", what()),
                    n,
                    || unsafe { bt_object_temperature(&band, scene, t, &mut out) },
                );
                watch.call(
                    || format!("bt_object_temperature_from_apparent{}", what()),
                    n,
                    || unsafe { bt_object_temperature_from_apparent(&band, scene, t, &mut out) },
                );
                watch.call(
                    || format!("bt_apparent_temperature{}", what()),
                    n,
                    || unsafe { bt_apparent_temperature(&band, scene, t, &mut out) },
                );
                let u = bt_input_uncertainties {
                    signal: t.abs() * 1e-3,
                    calibration_k: 0.5,
                    emissivity: 0.02,
                    reflected_k: 2.0,
                    ..Default::default()
                };
                let mut budget: bt_budget = unsafe { core::mem::zeroed() };
                watch.call(
                    || format!("bt_surface_budget{}", what()),
                    n,
                    || unsafe { bt_surface_budget(&band, scene, t, &u, &mut budget) },
                );
            }
        }
    }
    watch.finish("scene");
}

#[test]
fn calibration_and_ratio_calls_are_bounded() {
    let tables = tables();
    let mut watch = Watch::new();
    let mut out = 0.0;
    for (c, curve) in curves().iter().enumerate() {
        for (s, scene) in scenes().iter().enumerate() {
            for &t in VALUES {
                let what = || format!("(curve {c}, scene {s}, {t:e})");
                watch.call(
                    || format!("bt_sakuma_hattori_signal{}", what()),
                    0,
                    || unsafe { bt_sakuma_hattori_signal(curve, t, &mut out) },
                );
                watch.call(
                    || format!("bt_sakuma_hattori_temperature{}", what()),
                    0,
                    || unsafe { bt_sakuma_hattori_temperature(curve, t, &mut out) },
                );
                watch.call(
                    || format!("bt_sakuma_hattori_sensor_signal{}", what()),
                    0,
                    || unsafe { bt_sakuma_hattori_sensor_signal(curve, scene, t, &mut out) },
                );
                watch.call(
                    || format!("bt_sakuma_hattori_object_temperature{}", what()),
                    0,
                    || unsafe { bt_sakuma_hattori_object_temperature(curve, scene, t, &mut out) },
                );
            }
        }
    }
    // Point fits: hostile values, and a million valid points.
    let n_big = 1_000_000;
    let t_big: Vec<f64> = (0..n_big).map(|i| 300.0 + 1e-3 * i as f64).collect();
    let curve = SakumaHattoriRef {
        a_um: 3.88,
        b_umk: 21.0,
        c: 4.0e7,
    };
    let s_big: Vec<f64> = t_big.iter().map(|&t| curve.signal(t)).collect();
    let u_big = vec![1.0; n_big];
    let mut fit = bt_sakuma_hattori {
        a_um: 0.0,
        b_umk: 0.0,
        c: 0.0,
    };
    let mut report: bt_points_fit = unsafe { core::mem::zeroed() };
    // Up to MAX_FIT_POINTS (256) points are fitted; more are refused up front.
    for n in [3, 10, 256, 257, 1000, n_big] {
        watch.call(
            || format!("bt_sakuma_hattori_fit_points(n = {n})"),
            n,
            || unsafe { bt_sakuma_hattori_fit_points(t_big.as_ptr(), s_big.as_ptr(), n, &mut fit) },
        );
        watch.call(
            || format!("bt_sakuma_hattori_fit_points_report(n = {n})"),
            n,
            || unsafe {
                bt_sakuma_hattori_fit_points_report(
                    t_big.as_ptr(),
                    s_big.as_ptr(),
                    u_big.as_ptr(),
                    n,
                    &mut report,
                )
            },
        );
    }
    for &a in VALUES {
        for &b in VALUES {
            let t3 = [a, b, 1000.0, 1e6];
            let s3 = [b, 1.0, a, 1e300];
            watch.call(
                || format!("bt_sakuma_hattori_fit_points([{a:e}, {b:e}, ..])"),
                4,
                || unsafe { bt_sakuma_hattori_fit_points(t3.as_ptr(), s3.as_ptr(), 4, &mut fit) },
            );
            watch.call(
                || format!("bt_sakuma_hattori_fit_points_report([{a:e}, {b:e}, ..])"),
                4,
                || unsafe {
                    bt_sakuma_hattori_fit_points_report(
                        t3.as_ptr(),
                        s3.as_ptr(),
                        s3.as_ptr(),
                        4,
                        &mut report,
                    )
                },
            );
        }
    }
    // Ratio pyrometry: hostile band pairs, ranges and signals.
    let bands = bands(&tables);
    let pairs = [(0, 1), (2, 0), (3, 4), (5, 6), (7, 2), (10, 2), (11, 0)];
    for (i, j) in pairs {
        let (ni, bi) = &bands[i];
        let (nj, bj) = &bands[j];
        let n = 0;
        for &lo in RANGE_VALUES {
            for &hi in RANGE_VALUES {
                for &signal in &[f64::NAN, 5e-324, 1.0, 1e300] {
                    watch.call(
                        || format!("bt_ratio_temperature({ni}, {nj}, {lo:e}, {hi:e}, {signal:e})"),
                        n,
                        || unsafe {
                            bt_ratio_temperature(bi, bj, lo, hi, signal, 1.0, 1.0, &mut out)
                        },
                    );
                }
            }
        }
    }
    watch.finish("calibration and ratio");
}

/// The Sakuma-Hattori form written out, for generating valid points.
struct SakumaHattoriRef {
    a_um: f64,
    b_umk: f64,
    c: f64,
}

impl SakumaHattoriRef {
    /// S(T) = C / (exp(c2 / (A T + B)) - 1), c2 = 14387.768775 um K (CODATA 2018).
    fn signal(&self, t_k: f64) -> f64 {
        self.c / ((14_387.768_775_039_34 / (self.a_um * t_k + self.b_umk)).exp() - 1.0)
    }
}

/// A converter for an ordinary 8-14 um camera, and its rows.
fn ordinary_converter() -> (bt_frame_converter, Vec<bt_frame_row>) {
    let band = rect(8.0, 14.0, bt_detector::Energy);
    let scene = scenes()[0];
    let rails = bt_rails {
        dead_counts: 0,
        saturation_counts: 65535,
    };
    let mut rows = 0;
    assert_eq!(
        unsafe { bt_frame_table_rows_band(&band, 250.0, 420.0, 0.01, &mut rows) },
        bt_status::Ok
    );
    let mut table = vec![
        bt_frame_row {
            coefficients: [0.0; 4]
        };
        rows
    ];
    let mut converter = bt_frame_converter { opaque: [0; 32] };
    assert_eq!(
        unsafe {
            bt_frame_converter_new_band(
                &band,
                &scene,
                0.002,
                -2.0,
                &rails,
                250.0,
                420.0,
                0.01,
                table.as_mut_ptr(),
                rows,
                &mut converter,
            )
        },
        bt_status::Ok
    );
    (converter, table)
}

#[test]
fn frame_conversion_calls_are_bounded() {
    let tables = tables();
    let mut watch = Watch::new();
    let (converter, table) = ordinary_converter();
    let rows = table.len();
    // Frames up to a million pixels, with hostile values in them.
    let n_big = 1_000_000;
    let counts: Vec<u16> = (0..n_big).map(|i| (i * 7919 % 65536) as u16).collect();
    let hostile_f32 = [f32::NAN, f32::INFINITY, -1.0, 0.0, 1e-45, 1e38, 50.0, 100.0];
    let signal: Vec<f32> = (0..n_big)
        .map(|i| hostile_f32[i % hostile_f32.len()])
        .collect();
    let emissivity: Vec<f32> = (0..n_big)
        .map(|i| hostile_f32[(i / 3) % hostile_f32.len()])
        .collect();
    let mut kelvin = vec![0.0f32; n_big];
    let mut summary: bt_frame_summary = unsafe { core::mem::zeroed() };
    for n in [0, 1, 64, 3072, n_big] {
        for map in [false, true] {
            let (e_ptr, e_len) = if map {
                (emissivity.as_ptr(), n)
            } else {
                (core::ptr::null(), 0)
            };
            watch.call(
                || format!("bt_frame_convert_counts({n} px, map {map})"),
                n,
                || unsafe {
                    bt_frame_convert_counts(
                        &converter,
                        table.as_ptr(),
                        rows,
                        counts.as_ptr(),
                        n,
                        e_ptr,
                        e_len,
                        kelvin.as_mut_ptr(),
                        n,
                        &mut summary,
                    )
                },
            );
            watch.call(
                || format!("bt_frame_convert_signal({n} px, map {map})"),
                n,
                || unsafe {
                    bt_frame_convert_signal(
                        &converter,
                        table.as_ptr(),
                        rows,
                        signal.as_ptr(),
                        n,
                        e_ptr,
                        e_len,
                        kelvin.as_mut_ptr(),
                        n,
                        &mut summary,
                    )
                },
            );
        }
    }
    // Geometry, rails and scene replacement on a valid converter, with hostile inputs.
    let mut geometry: bt_frame_geometry = unsafe { core::mem::zeroed() };
    watch.call(
        || "bt_frame_converter_geometry".into(),
        rows,
        || unsafe { bt_frame_converter_geometry(&converter, table.as_ptr(), rows, &mut geometry) },
    );
    for (dead, saturation) in [(0, 65535), (65535, 0), (100, 101), (0, 0)] {
        let mut c = converter;
        let rails = bt_rails {
            dead_counts: dead,
            saturation_counts: saturation,
        };
        watch.call(
            || format!("bt_frame_converter_set_rails({dead}, {saturation})"),
            rows,
            || unsafe { bt_frame_converter_set_rails(&mut c, table.as_ptr(), rows, &rails) },
        );
    }
    for (name, band) in bands(&tables) {
        for (s, scene) in scenes().iter().enumerate() {
            let mut c = converter;
            watch.call(
                || format!("bt_frame_converter_set_scene_band({name}, scene {s})"),
                0,
                || unsafe {
                    bt_frame_converter_set_scene_band(&mut c, table.as_ptr(), rows, &band, scene)
                },
            );
        }
    }
    for (k, curve) in curves().iter().enumerate() {
        for (s, scene) in scenes().iter().enumerate() {
            let mut c = converter;
            watch.call(
                || format!("bt_frame_converter_set_scene_sakuma_hattori(curve {k}, scene {s})"),
                0,
                || unsafe {
                    bt_frame_converter_set_scene_sakuma_hattori(
                        &mut c,
                        table.as_ptr(),
                        rows,
                        curve,
                        scene,
                    )
                },
            );
        }
    }
    watch.finish("frame conversion");
}

/// Multi-point non-uniformity correction: map sizes on hostile counts, map builds from up
/// to 16 levels with hostile level values, and the fused multi-point conversions (with and
/// without an emissivity map) over frames up to a million pixels, with valid maps and with
/// maps holding hostile values (refused by the per-call check, which reads them all).
#[test]
fn multi_point_calls_are_bounded() {
    let mut watch = Watch::new();
    let (converter, table) = ordinary_converter();
    let rows = table.len();
    let mut len = 0usize;
    for levels in [0, 1, 2, 3, 16, 17, usize::MAX] {
        for pixels in [0, 1, 1_000_000, usize::MAX] {
            watch.call(
                || format!("bt_nuc_multi_point_map_len({levels}, {pixels})"),
                0,
                || unsafe { bt_nuc_multi_point_map_len(levels, pixels, &mut len) },
            );
        }
    }
    // Map builds: levels whose means increase by 1000 counts per level, a pixel pattern of
    // +-37 counts, and hostile values planted (NaN, a level out of order, 1e300).
    let hostile = [f64::NAN, f64::INFINITY, -1.0, 1e300, 5e-324];
    for (levels, pixels) in [(2usize, 3072usize), (4, 65_536), (16, 65_536)] {
        for plant in [None, Some(0usize), Some(1), Some(2), Some(3), Some(4)] {
            let means: Vec<Vec<f64>> = (0..levels)
                .map(|k| {
                    (0..pixels)
                        .map(|p| {
                            let v = 1000.0 * (k as f64 + 1.0) + 37.0 * ((p * 7) % 5) as f64;
                            match plant {
                                Some(h) if p % 97 == 3 && k == levels / 2 => hostile[h],
                                _ => v,
                            }
                        })
                        .collect()
                })
                .collect();
            let zeros = vec![0.0f64; pixels];
            let views: Vec<bt_stack_view> = means
                .iter()
                .map(|m| bt_stack_view {
                    mean: m.as_ptr(),
                    m2: zeros.as_ptr(),
                    len: pixels,
                    frames: 4,
                })
                .collect();
            let mut bad = vec![0u8; pixels];
            let mut maps = vec![0.0f32; (3 * levels - 4) * pixels];
            let mut report: bt_multi_point_report = unsafe { core::mem::zeroed() };
            watch.call(
                || format!("bt_nuc_multi_point({levels} levels, {pixels} px, plant {plant:?})"),
                levels * pixels,
                || unsafe {
                    bt_nuc_multi_point(
                        views.as_ptr(),
                        levels,
                        bad.as_mut_ptr(),
                        pixels,
                        maps.as_mut_ptr(),
                        maps.len(),
                        &mut report,
                    )
                },
            );
        }
    }
    // Fused conversions: four-level maps (gains 1, offsets 0, breakpoints 20000 and
    // 40000) over frames up to a million pixels, valid and with hostile map values.
    let n_big = 1_000_000;
    let levels = 4;
    let counts: Vec<u16> = (0..n_big).map(|i| (i * 7919 % 65536) as u16).collect();
    let hostile_f32 = [f32::NAN, f32::INFINITY, -1.0, 0.0, 1e-45, 1e38, 0.5, 0.95];
    let emissivity: Vec<f32> = (0..n_big)
        .map(|i| hostile_f32[(i / 3) % hostile_f32.len()])
        .collect();
    let bad: Vec<u8> = (0..n_big).map(|i| u8::from(i % 1009 == 0)).collect();
    let mut kelvin = vec![0.0f32; n_big];
    let mut summary: bt_corrected_summary = unsafe { core::mem::zeroed() };
    let step = bt_drift_step { a: 1.0, b: 0.0 };
    for n in [1usize, 3072, n_big] {
        let mut maps = vec![0.0f32; (3 * levels - 4) * n];
        maps[..3 * n].fill(1.0);
        maps[6 * n..7 * n].fill(20_000.0);
        maps[7 * n..].fill(40_000.0);
        for poison in [None, Some(f32::NAN), Some(-1.0), Some(f32::INFINITY)] {
            let mut m = maps.clone();
            if let Some(v) = poison {
                let at = m.len() - 1;
                m[at] = v; // the last pixel's last breakpoint (or gain for 1 px)
            }
            for map in [false, true] {
                let width = if n == n_big { 1000 } else { n.min(64) };
                watch.call(
                    || format!("bt_frame_convert_counts_multi_point({n} px, poison {poison:?}, map {map})"),
                    n,
                    || unsafe {
                        if map {
                            bt_frame_convert_counts_multi_point_emissivity(
                                &converter,
                                table.as_ptr(),
                                rows,
                                m.as_ptr(),
                                m.len(),
                                levels,
                                bad.as_ptr(),
                                width,
                                &step,
                                counts.as_ptr(),
                                emissivity.as_ptr(),
                                kelvin.as_mut_ptr(),
                                n,
                                &mut summary,
                            )
                        } else {
                            bt_frame_convert_counts_multi_point(
                                &converter,
                                table.as_ptr(),
                                rows,
                                m.as_ptr(),
                                m.len(),
                                levels,
                                bad.as_ptr(),
                                width,
                                &step,
                                counts.as_ptr(),
                                kelvin.as_mut_ptr(),
                                n,
                                &mut summary,
                            )
                        }
                    },
                );
            }
        }
    }
    watch.finish("multi-point NUC");
}

/// The frame-table constructors on hostile ranges and tolerances: unservable ranges are
/// refused up front (cheap bounds on rows per octave, octaves and storage before any row
/// is built), so no call searches for seconds (it once did: a 0.9-1.1 um band from 300 K
/// to 1.39e25 K at 0.9 K; 8-14 um from 250 K to 1e6 K at 1 mK).
#[test]
fn frame_table_calls_are_bounded() {
    let tables = tables();
    let mut watch = Watch::new();
    let mut rows = 0;
    let mut table = vec![
        bt_frame_row {
            coefficients: [0.0; 4]
        };
        4096
    ];
    let rails = bt_rails {
        dead_counts: 0,
        saturation_counts: 65535,
    };
    let scene = scenes()[0];
    let mut converter = bt_frame_converter { opaque: [0; 32] };
    let bands = bands(&tables);
    let curves = curves();
    for &lo in RANGE_VALUES {
        for &hi in RANGE_VALUES {
            for &tolerance in TOLERANCES {
                let what = |name: &str| format!("({name}, {lo:e}, {hi:e}, {tolerance:e})");
                for (name, band) in &bands {
                    let n = 0;
                    watch.call(
                        || format!("bt_frame_table_rows_band{}", what(name)),
                        n,
                        || unsafe { bt_frame_table_rows_band(band, lo, hi, tolerance, &mut rows) },
                    );
                    watch.call(
                        || format!("bt_frame_converter_new_band{}", what(name)),
                        n,
                        || unsafe {
                            bt_frame_converter_new_band(
                                band,
                                &scene,
                                0.002,
                                -2.0,
                                &rails,
                                lo,
                                hi,
                                tolerance,
                                table.as_mut_ptr(),
                                table.len(),
                                &mut converter,
                            )
                        },
                    );
                }
                for (k, curve) in curves.iter().enumerate() {
                    let name = format!("curve {k}");
                    watch.call(
                        || format!("bt_frame_table_rows_sakuma_hattori{}", what(&name)),
                        0,
                        || unsafe {
                            bt_frame_table_rows_sakuma_hattori(curve, lo, hi, tolerance, &mut rows)
                        },
                    );
                    watch.call(
                        || format!("bt_frame_converter_new_sakuma_hattori{}", what(&name)),
                        0,
                        || unsafe {
                            bt_frame_converter_new_sakuma_hattori(
                                curve,
                                &scene,
                                100.0,
                                &rails,
                                lo,
                                hi,
                                tolerance,
                                table.as_mut_ptr(),
                                table.len(),
                                &mut converter,
                            )
                        },
                    );
                }
            }
        }
    }
    watch.finish("frame tables");
}

/// Every band-taking export with long tabulated responses (1,000 and 10,000 points,
/// valid buffers).
#[test]
#[ignore = "band integrals over long tabulated responses cost up to ~16 us per table point on the host; bounded by the length but over 50 ms from ~3,000 points (fit_band: from ~25 points)"]
fn long_tabulated_band_calls_are_bounded() {
    let tables = vec![long_table(1_000), long_table(10_000)];
    let mut watch = Watch::new();
    let mut out = 0.0;
    let scene = scenes()[0];
    let mut fit = bt_sakuma_hattori {
        a_um: 0.0,
        b_umk: 0.0,
        c: 0.0,
    };
    let (mut converter, table) = ordinary_converter();
    for table_data in &tables {
        let band = tabulated(0.1, 100.0, table_data);
        let name = format!("table {} points", table_data.0.len());
        for &t in &[5e-324, 1.0, 300.0, 1e6, 1e25, f64::MAX] {
            watch.call(
                || format!("bt_band_radiance({name}, {t:e})"),
                0,
                || unsafe { bt_band_radiance(&band, t, &mut out) },
            );
            watch.call(
                || format!("bt_band_radiance_derivative({name}, {t:e})"),
                0,
                || unsafe { bt_band_radiance_derivative(&band, t, &mut out) },
            );
            watch.call(
                || format!("bt_band_temperature({name}, {t:e})"),
                0,
                || unsafe { bt_band_temperature(&band, t, &mut out) },
            );
            watch.call(
                || format!("bt_object_temperature({name}, {t:e})"),
                0,
                || unsafe { bt_object_temperature(&band, &scene, t, &mut out) },
            );
            watch.call(
                || format!("bt_path_band_transmittance({name}, {t:e})"),
                0,
                || unsafe {
                    bt_path_band_transmittance(&band, 295.0, 0.5, 1013.25, 10.0, t, &mut out)
                },
            );
        }
        watch.call(
            || format!("bt_sakuma_hattori_fit_band({name}, 250, 1200)"),
            0,
            || unsafe { bt_sakuma_hattori_fit_band(&band, 250.0, 1200.0, &mut fit, &mut out) },
        );
        watch.call(
            || format!("bt_frame_converter_set_scene_band({name})"),
            0,
            || unsafe {
                bt_frame_converter_set_scene_band(
                    &mut converter,
                    table.as_ptr(),
                    table.len(),
                    &band,
                    &scene,
                )
            },
        );
    }
    watch.finish("long tabulated bands");
}

/// The pixel count of a large realistic focal-plane array, 1280 x 1024, in a release
/// build (the configuration whose bound matters); a debug build drives 320 x 256 (its
/// unoptimised calls on the full frame come within a few tenths of their limit and add a
/// minute to the debug suite).
const BIG_FRAME: usize = if cfg!(debug_assertions) {
    320 * 256
} else {
    1280 * 1024
};

/// Hostile doubles planted in stacks and fit points.
const HOSTILE_F64: &[f64] = &[
    f64::NAN,
    f64::INFINITY,
    f64::NEG_INFINITY,
    -1.0,
    0.0,
    5e-324,
    1e-300,
    1e308,
    f64::MAX,
];

/// Hostile floats planted in frames and maps.
const HOSTILE_F32: &[f32] = &[
    f32::NAN,
    f32::INFINITY,
    f32::NEG_INFINITY,
    -1.0,
    0.0,
    1e-45,
    1e38,
    f32::MAX,
];

/// A stack's mean and m2 planes of `n` pixels: means around `level` with a +-37 count
/// pixel pattern, m2 of 4 counts^2 per frame over `frames` frames; `plant` puts the
/// given value into every 97th mean and m2.
fn stack_planes(n: usize, level: f64, frames: u32, plant: Option<f64>) -> (Vec<f64>, Vec<f64>) {
    let mean = (0..n)
        .map(|p| match plant {
            Some(v) if p % 97 == 3 => v,
            _ => level + 37.0 * ((p * 7) % 5) as f64,
        })
        .collect();
    let m2 = (0..n)
        .map(|p| match plant {
            Some(v) if p % 97 == 5 => v,
            _ => 4.0 * f64::from(frames.max(1)),
        })
        .collect();
    (mean, m2)
}

fn view(mean: &[f64], m2: &[f64], frames: u32) -> bt_stack_view {
    bt_stack_view {
        mean: mean.as_ptr(),
        m2: m2.as_ptr(),
        len: mean.len(),
        frames,
    }
}

/// Bad-pixel maps of `n` pixels: none (NULL), sparse (every 1009th), and all bad.
fn bad_maps(n: usize) -> Vec<(&'static str, Option<Vec<u8>>)> {
    vec![
        ("none", None),
        (
            "sparse",
            Some((0..n).map(|i| u8::from(i % 1009 == 0)).collect()),
        ),
        ("all", Some(vec![1u8; n])),
    ]
}

/// Stack accumulation, two-point maps, bad-pixel detection, shutter refresh and spatial
/// statistics on frames up to [`BIG_FRAME`] pixels: frame counts at the ends of their range,
/// length mismatches, hostile values planted in the stacks and frames, all-bad and sparse
/// maps, hostile rules and shutter targets.
#[test]
fn raw_frame_stack_calls_are_bounded() {
    let mut watch = Watch::new();
    for n in [0usize, 1, 2, 3072, BIG_FRAME] {
        // Stack accumulation: a fresh stack, a deep one, one about to overflow its frame
        // count, one with poisoned stored values; frames of u16 and of hostile floats.
        let counts: Vec<u16> = (0..n + 1).map(|i| (i * 7919 % 65536) as u16).collect();
        let signal: Vec<f32> = (0..n + 1)
            .map(|i| {
                if i % 101 == 7 {
                    HOSTILE_F32[(i / 101) % HOSTILE_F32.len()]
                } else {
                    1000.0 + (i % 13) as f32
                }
            })
            .collect();
        let clean_signal: Vec<f32> = (0..n + 1).map(|i| 1000.0 + (i % 13) as f32).collect();
        for start in [0u32, 1, 1000, u32::MAX - 1, u32::MAX] {
            for plant in [None, Some(f64::NAN), Some(-1.0), Some(f64::MAX)] {
                if n == BIG_FRAME && plant.is_some() && start != 1 {
                    continue; // the big frame once per hostile value is enough
                }
                for frame_len in [n, n + 1] {
                    let (mut mean, mut m2) = stack_planes(n, 1000.0, start, plant);
                    let mut frames = start;
                    watch.call(
                        || {
                            format!(
                                "bt_frame_stack_add_counts({n} px, frames {start}, plant {plant:?}, frame {frame_len})"
                            )
                        },
                        n,
                        || unsafe {
                            bt_frame_stack_add_counts(
                                mean.as_mut_ptr(),
                                m2.as_mut_ptr(),
                                n,
                                &mut frames,
                                counts.as_ptr(),
                                frame_len,
                            )
                        },
                    );
                    for (kind, frame) in [("hostile", &signal), ("clean", &clean_signal)] {
                        let mut frames = start;
                        watch.call(
                            || {
                                format!(
                                    "bt_frame_stack_add_signal({n} px, frames {start}, plant {plant:?}, {kind} frame {frame_len})"
                                )
                            },
                            n,
                            || unsafe {
                                bt_frame_stack_add_signal(
                                    mean.as_mut_ptr(),
                                    m2.as_mut_ptr(),
                                    n,
                                    &mut frames,
                                    frame.as_ptr(),
                                    frame_len,
                                )
                            },
                        );
                    }
                }
            }
        }

        // Two-point maps, bad-pixel detection, spatial statistics: low and high stacks
        // (the high one 2000 counts up, or equal to the low one: no response anywhere),
        // hostile values planted, frame counts 0, 1, 64 and u32::MAX.
        let rules_list = [
            bt_bad_pixel_rules {
                k_sigma: 5.0,
                noise_factor: 3.0,
                stuck_fraction: 0.1,
            },
            bt_bad_pixel_rules {
                k_sigma: 5e-324,
                noise_factor: 5e-324,
                stuck_fraction: 0.999_999,
            },
            bt_bad_pixel_rules {
                k_sigma: f64::NAN,
                noise_factor: 3.0,
                stuck_fraction: 0.1,
            },
            bt_bad_pixel_rules {
                k_sigma: f64::MAX,
                noise_factor: f64::INFINITY,
                stuck_fraction: -1.0,
            },
        ];
        let gain: Vec<f32> = (0..n)
            .map(|i| {
                if i % 89 == 11 {
                    HOSTILE_F32[(i / 89) % HOSTILE_F32.len()]
                } else {
                    1.0
                }
            })
            .collect();
        let clean_gain = vec![1.0f32; n];
        let offset = vec![0.0f32; n];
        let mut gain_out = vec![0.0f32; n];
        let mut offset_out = vec![0.0f32; n];
        let mut scratch = vec![0.0f32; n];
        let plants: Vec<Option<f64>> = if n == BIG_FRAME {
            vec![None, Some(f64::NAN), Some(5e-324), Some(1e308)]
        } else {
            std::iter::once(None)
                .chain(HOSTILE_F64.iter().map(|&v| Some(v)))
                .collect()
        };
        for plant in plants {
            for (step_high, frames) in [
                (2000.0, 64u32),
                (0.0, 64),
                (2000.0, 1),
                (2000.0, 0),
                (2000.0, u32::MAX),
            ] {
                if n == BIG_FRAME && frames != 64 && plant.is_some() {
                    continue;
                }
                let (low_mean, low_m2) = stack_planes(n, 1000.0, frames, plant);
                let (high_mean, high_m2) = stack_planes(n, 1000.0 + step_high, frames, plant);
                let low = view(&low_mean, &low_m2, frames);
                let high = view(&high_mean, &high_m2, frames);
                let what = || format!("{n} px, plant {plant:?}, step {step_high}, frames {frames}");
                for (map_name, map) in bad_maps(n) {
                    let (bad_ptr, bad_len) = map
                        .as_ref()
                        .map_or((core::ptr::null(), 0), |m| (m.as_ptr(), m.len()));
                    let mut report: bt_two_point_report = unsafe { core::mem::zeroed() };
                    watch.call(
                        || format!("bt_nuc_two_point({}, bad {map_name})", what()),
                        n,
                        || unsafe {
                            bt_nuc_two_point(
                                &low,
                                &high,
                                bad_ptr,
                                bad_len,
                                gain_out.as_mut_ptr(),
                                offset_out.as_mut_ptr(),
                                n,
                                &mut report,
                            )
                        },
                    );
                    for (g_name, g) in [("clean", &clean_gain), ("hostile", &gain)] {
                        for with_maps in [false, true] {
                            let (g_ptr, o_ptr) = if with_maps {
                                (g.as_ptr(), offset.as_ptr())
                            } else {
                                (core::ptr::null(), core::ptr::null())
                            };
                            let mut stats: bt_spatial_stats = unsafe { core::mem::zeroed() };
                            watch.call(
                                || {
                                    format!(
                                        "bt_frame_spatial_stats({}, bad {map_name}, gain {g_name}, maps {with_maps})",
                                        what()
                                    )
                                },
                                n,
                                || unsafe {
                                    bt_frame_spatial_stats(
                                        &high,
                                        if map.is_some() { bad_ptr } else { core::ptr::null() },
                                        g_ptr,
                                        o_ptr,
                                        n,
                                        &mut stats,
                                    )
                                },
                            );
                        }
                        for (k, step) in [
                            bt_drift_step { a: 1.0, b: 0.0 },
                            bt_drift_step { a: 0.0, b: 0.0 },
                            bt_drift_step {
                                a: 1e-45,
                                b: f32::MAX,
                            },
                            bt_drift_step {
                                a: f32::NAN,
                                b: 0.0,
                            },
                        ]
                        .into_iter()
                        .enumerate()
                        {
                            for (t, target) in [1500.0, f64::NAN, 5e-324, 1e308, f64::MAX]
                                .into_iter()
                                .enumerate()
                            {
                                if n == BIG_FRAME && (k, t) != (0, 0) {
                                    continue; // hostile steps and targets: smaller frames
                                }
                                let mut off = offset.clone();
                                watch.call(
                                    || {
                                        format!(
                                            "bt_nuc_shutter_refresh({}, bad {map_name}, gain {g_name}, step {step:?}, target {target:e})",
                                            what()
                                        )
                                    },
                                    n,
                                    || unsafe {
                                        bt_nuc_shutter_refresh(
                                            &low,
                                            g.as_ptr(),
                                            bad_ptr,
                                            bad_len,
                                            target,
                                            &step,
                                            off.as_mut_ptr(),
                                            n,
                                        )
                                    },
                                );
                            }
                        }
                    }
                    for (r, rules) in rules_list.iter().enumerate() {
                        if n == BIG_FRAME && r > 1 {
                            continue; // invalid rules are refused before any pixel is read
                        }
                        let mut bad = map.clone().unwrap_or_else(|| vec![0u8; n]);
                        let mut report: bt_bad_pixel_report = unsafe { core::mem::zeroed() };
                        watch.call(
                            || {
                                format!(
                                    "bt_bad_pixels_detect({}, bad {map_name}, rules {r})",
                                    what()
                                )
                            },
                            n,
                            || unsafe {
                                bt_bad_pixels_detect(
                                    &low,
                                    &high,
                                    rules,
                                    scratch.as_mut_ptr(),
                                    bad.as_mut_ptr(),
                                    n,
                                    &mut report,
                                )
                            },
                        );
                    }
                }
            }
        }
    }
    watch.finish("raw-frame stacks and maps");
}

/// Hostile drift models: ordinary, every degree, coefficients at the ends of the range.
fn drift_models() -> Vec<bt_drift_model> {
    let ordinary = bt_drift_model {
        reference_k: 300.0,
        degree: 1,
        responsivity: [1000.0, 2.0, 0.0],
        offset: [50.0, -0.5, 0.0],
    };
    vec![
        ordinary,
        bt_drift_model {
            degree: 2,
            responsivity: [1e308, 1e308, 1e308],
            ..ordinary
        },
        bt_drift_model {
            degree: 3,
            ..ordinary
        },
        bt_drift_model {
            degree: u32::MAX,
            ..ordinary
        },
        bt_drift_model {
            reference_k: f64::NAN,
            ..ordinary
        },
        bt_drift_model {
            reference_k: 5e-324,
            responsivity: [5e-324, 0.0, 0.0],
            offset: [f64::MAX, f64::MAX, f64::MAX],
            degree: 2,
        },
        bt_drift_model {
            responsivity: [-1.0, f64::INFINITY, 0.0],
            ..ordinary
        },
    ]
}

/// Drift fit points: `n` points of an ordinary array (T_fpa 290-320 K) with `plant`
/// written into one field of every 7th point.
fn drift_points(n: usize, plant: Option<(usize, f64)>) -> Vec<bt_drift_point> {
    (0..n)
        .map(|i| {
            let fpa_k = 290.0 + 30.0 * i as f64 / n.max(1) as f64;
            let mut fields = [fpa_k, fpa_k + 5.0, 300.0, 400.0, 1000.0 + i as f64, 9000.0];
            if let Some((field, v)) = plant {
                if i % 7 == 0 {
                    fields[field % fields.len()] = v;
                }
            }
            bt_drift_point {
                fpa_k: fields[0],
                internal_k: fields[1],
                low_k: fields[2],
                high_k: fields[3],
                low_counts: fields[4],
                high_counts: fields[5],
            }
        })
        .collect()
}

/// The per-camera radiometric exports of the raw-frame path: shutter targets, drift fits
/// and steps (band and Sakuma-Hattori), net signal and its inverse, effective exponent
/// and NETD, on hostile bands (including tabulated ones), curves, temperatures, counts
/// maps, point lists (0 to 1,000 points; more than 64 are refused) and models.
#[test]
fn raw_radiometric_calls_are_bounded() {
    let tables = tables();
    let mut watch = Watch::new();
    let mut out = 0.0;
    let bands = bands(&tables);
    let curves = curves();
    let counts_maps = [
        (0.002, -2.0),
        (f64::NAN, 0.0),
        (0.0, 0.0),
        (5e-324, f64::MAX),
        (1e308, -1e308),
    ];
    let temps = [f64::NAN, -1.0, 5e-324, 1e-3, 300.0, 1500.0, 1e25, f64::MAX];
    let emissivities = [f64::NAN, -0.0, 5e-324, 0.5, 1.0, 1.0 + 1e-15];
    for &a in VALUES {
        for &b in VALUES {
            watch.call(
                || format!("bt_netd_k({a:e}, {b:e})"),
                0,
                || unsafe { bt_netd_k(a, b, &mut out) },
            );
        }
    }
    let models = drift_models();
    let mut step = bt_drift_step { a: 0.0, b: 0.0 };
    let mut model: bt_drift_model = unsafe { core::mem::zeroed() };
    let point_sets: Vec<(String, Vec<bt_drift_point>)> = [0usize, 1, 3, 64, 65, 1000]
        .iter()
        .map(|&n| (format!("{n} points"), drift_points(n, None)))
        .chain((0..6).flat_map(|field| {
            HOSTILE_F64.iter().map(move |&v| {
                (
                    format!("64 points, field {field} = {v:e}"),
                    drift_points(64, Some((field, v))),
                )
            })
        }))
        .collect();
    for (name, band) in &bands {
        for &(g, o) in &counts_maps {
            for &t in &temps {
                watch.call(
                    || format!("bt_nuc_shutter_target_band({name}, {g:e}, {o:e}, {t:e})"),
                    0,
                    || unsafe { bt_nuc_shutter_target_band(band, g, o, t, &mut out) },
                );
                for model_in in &models {
                    for &t_int in &[f64::NAN, 5e-324, 300.0, 1e25] {
                        watch.call(
                            || {
                                format!(
                                    "bt_drift_step_band({model_in:?}, {name}, {g:e}, {o:e}, {t:e}, {t_int:e})"
                                )
                            },
                            0,
                            || unsafe { bt_drift_step_band(model_in, band, g, o, t, t_int, &mut step) },
                        );
                    }
                }
            }
        }
        for &t in &temps {
            watch.call(
                || format!("bt_effective_exponent_band({name}, {t:e})"),
                0,
                || unsafe { bt_effective_exponent_band(band, t, &mut out) },
            );
            for &e in &emissivities {
                for &tr in &[f64::NAN, 5e-324, 293.15, 1e25] {
                    for &t_int in &[5e-324, 300.0, f64::MAX] {
                        let what = || format!("({name}, {e:e}, {t:e}, {tr:e}, {t_int:e})");
                        watch.call(
                            || format!("bt_net_signal_band{}", what()),
                            0,
                            || unsafe { bt_net_signal_band(band, e, t, tr, t_int, &mut out) },
                        );
                        watch.call(
                            || format!("bt_object_from_net_signal_band{}", what()),
                            0,
                            || unsafe {
                                bt_object_from_net_signal_band(band, t, e, tr, t_int, &mut out)
                            },
                        );
                    }
                }
            }
        }
        for (points_name, points) in &point_sets {
            for degree in [0u32, 1, 2, 3, u32::MAX] {
                watch.call(
                    || format!("bt_drift_fit_band({name}, {points_name}, degree {degree})"),
                    0,
                    || unsafe {
                        bt_drift_fit_band(band, points.as_ptr(), points.len(), degree, &mut model)
                    },
                );
            }
        }
    }
    for (k, curve) in curves.iter().enumerate() {
        for &(g, o) in &counts_maps {
            for &t in &temps {
                watch.call(
                    || {
                        format!(
                            "bt_nuc_shutter_target_sakuma_hattori(curve {k}, {g:e}, {o:e}, {t:e})"
                        )
                    },
                    0,
                    || unsafe { bt_nuc_shutter_target_sakuma_hattori(curve, g, o, t, &mut out) },
                );
                for model_in in &models {
                    for &t_int in &[f64::NAN, 5e-324, 300.0, 1e25] {
                        watch.call(
                            || {
                                format!(
                                    "bt_drift_step_sakuma_hattori({model_in:?}, curve {k}, {g:e}, {o:e}, {t:e}, {t_int:e})"
                                )
                            },
                            0,
                            || unsafe {
                                bt_drift_step_sakuma_hattori(model_in, curve, g, o, t, t_int, &mut step)
                            },
                        );
                    }
                }
            }
        }
        for (points_name, points) in &point_sets {
            for degree in [0u32, 1, 2, 3, u32::MAX] {
                watch.call(
                    || format!("bt_drift_fit_sakuma_hattori(curve {k}, {points_name}, degree {degree})"),
                    0,
                    || unsafe {
                        bt_drift_fit_sakuma_hattori(
                            curve,
                            points.as_ptr(),
                            points.len(),
                            degree,
                            &mut model,
                        )
                    },
                );
            }
        }
    }
    watch.finish("raw-frame radiometry");
}

/// The fused corrected conversions (two-point maps, drift step, bad-pixel replacement,
/// with and without an emissivity map) on frames up to [`BIG_FRAME`] pixels: widths 0, 1,
/// the camera's, the whole frame and `usize::MAX`; clean maps and maps with hostile
/// gains and offsets (refused by the per-call check, which reads them all); no, sparse
/// and all-bad pixel maps; hostile drift steps.
#[test]
fn corrected_conversion_calls_are_bounded() {
    let mut watch = Watch::new();
    let (converter, table) = ordinary_converter();
    let rows = table.len();
    let n_big = BIG_FRAME;
    let counts: Vec<u16> = (0..n_big).map(|i| (i * 7919 % 65536) as u16).collect();
    let emissivity: Vec<f32> = (0..n_big)
        .map(|i| [f32::NAN, f32::INFINITY, -1.0, 0.0, 1e-45, 1e38, 0.5, 0.95][(i / 3) % 8])
        .collect();
    let clean_gain = vec![1.0f32; n_big];
    let clean_offset = vec![0.0f32; n_big];
    let mut kelvin = vec![0.0f32; n_big];
    let mut summary: bt_corrected_summary = unsafe { core::mem::zeroed() };
    let steps = [
        None,
        Some(bt_drift_step { a: 1.0, b: 0.0 }),
        Some(bt_drift_step {
            a: f32::NAN,
            b: 0.0,
        }),
        Some(bt_drift_step {
            a: 1e-45,
            b: f32::MAX,
        }),
    ];
    for n in [1usize, 3072, n_big] {
        let bad_list = bad_maps(n);
        for (poison_name, poison) in [
            ("clean", None),
            ("gain NaN", Some((0, f32::NAN))),
            ("gain 0", Some((0, 0.0))),
            ("offset inf", Some((1, f32::INFINITY))),
            ("gain 1e-45", Some((0, 1e-45))),
        ] {
            let mut gain = clean_gain[..n].to_vec();
            let mut offset = clean_offset[..n].to_vec();
            if let Some((which, v)) = poison {
                let target = if which == 0 { &mut gain } else { &mut offset };
                let at = n - 1;
                target[at] = v; // the last pixel: the check must read the whole map
            }
            for width in [0usize, 1, 64, 1280, n, usize::MAX] {
                for (map_name, bad) in &bad_list {
                    let bad_all = vec![0u8; n];
                    let bad_ptr = bad.as_ref().map_or(bad_all.as_ptr(), Vec::as_ptr);
                    for (s, step) in steps.iter().enumerate() {
                        if n == n_big && (s > 1 || (width != 1280 && poison.is_some())) {
                            continue; // hostile steps and widths: smaller frames
                        }
                        let step_ptr = step.as_ref().map_or(core::ptr::null(), |x| x as *const _);
                        for map in [false, true] {
                            let what = || {
                                format!(
                                    "({n} px, {poison_name}, width {width}, bad {map_name}, step {s}, map {map})"
                                )
                            };
                            watch.call(
                                || format!("bt_frame_convert_counts_corrected{}", what()),
                                n,
                                || unsafe {
                                    if map {
                                        bt_frame_convert_counts_corrected_emissivity(
                                            &converter,
                                            table.as_ptr(),
                                            rows,
                                            gain.as_ptr(),
                                            offset.as_ptr(),
                                            bad_ptr,
                                            width,
                                            step_ptr,
                                            counts.as_ptr(),
                                            emissivity.as_ptr(),
                                            kelvin.as_mut_ptr(),
                                            n,
                                            &mut summary,
                                        )
                                    } else {
                                        bt_frame_convert_counts_corrected(
                                            &converter,
                                            table.as_ptr(),
                                            rows,
                                            gain.as_ptr(),
                                            offset.as_ptr(),
                                            bad_ptr,
                                            width,
                                            step_ptr,
                                            counts.as_ptr(),
                                            kelvin.as_mut_ptr(),
                                            n,
                                            &mut summary,
                                        )
                                    }
                                },
                            );
                        }
                    }
                }
            }
        }
    }
    watch.finish("corrected conversion");
}

/// Optics, target-size rules, emissivity from optical constants, wavelength sensitivities
/// and MTF: every scalar input from [`VALUES`] (three- and four-input calls from a shorter
/// list), target rules including unknown ones.
#[test]
fn optics_and_emissivity_calls_are_bounded() {
    let mut watch = Watch::new();
    let mut out = 0.0;
    let mut out2 = 0.0;
    let short = [
        f64::NAN,
        f64::INFINITY,
        -1.0,
        0.0,
        5e-324,
        1e-3,
        0.9,
        10.0,
        1e6,
        1e300,
        f64::MAX,
    ];
    for &a in VALUES {
        for &b in VALUES {
            let what = || format!("({a:e}, {b:e})");
            watch.call(
                || format!("bt_footprint_m{}", what()),
                0,
                || unsafe { bt_footprint_m(a, b, &mut out) },
            );
            watch.call(
                || format!("bt_ifov_mrad{}", what()),
                0,
                || unsafe { bt_ifov_mrad(a, b, &mut out) },
            );
            watch.call(
                || format!("bt_spot_diameter_m{}", what()),
                0,
                || unsafe { bt_spot_diameter_m(a, b, &mut out) },
            );
            watch.call(
                || format!("bt_hagen_rubens_normal{}", what()),
                0,
                || unsafe { bt_hagen_rubens_normal(a, b, &mut out) },
            );
            watch.call(
                || format!("bt_emissivity_hemispherical{}", what()),
                0,
                || unsafe { bt_emissivity_hemispherical(a, b, &mut out) },
            );
            watch.call(
                || format!("bt_emissivity_normal{}", what()),
                0,
                || unsafe { bt_emissivity_normal(a, b, &mut out) },
            );
            watch.call(
                || format!("bt_emissivity_peak{}", what()),
                0,
                || unsafe { bt_emissivity_peak(a, b, &mut out, &mut out2) },
            );
            for &angle in &[f64::NAN, -0.0, 45.0, 89.999_999, 90.0, 1e300] {
                let mut directional: bt_directional_emissivity = unsafe { core::mem::zeroed() };
                watch.call(
                    || format!("bt_emissivity_directional{} {angle:e}", what()),
                    0,
                    || unsafe { bt_emissivity_directional(a, b, angle, &mut directional) },
                );
            }
            for &tolerance in TOLERANCES {
                watch.call(
                    || format!("bt_emissivity_trusted_angle_deg{} {tolerance:e}", what()),
                    0,
                    || unsafe { bt_emissivity_trusted_angle_deg(a, b, tolerance, &mut out) },
                );
            }
        }
    }
    for &a in &short {
        for &b in &short {
            for &c in &short {
                let what = || format!("({a:e}, {b:e}, {c:e})");
                watch.call(
                    || format!("bt_airy_encircled_energy{}", what()),
                    0,
                    || unsafe { bt_airy_encircled_energy(a, b, c, &mut out) },
                );
                watch.call(
                    || format!("bt_airy_radius_um{}", what()),
                    0,
                    || unsafe { bt_airy_radius_um(a, b, c, &mut out) },
                );
                watch.call(
                    || format!("bt_one_point_wavelength_sensitivity{}", what()),
                    0,
                    || unsafe { bt_one_point_wavelength_sensitivity(a, b, c, &mut out) },
                );
                for &d in &[f64::NAN, 5e-324, 2.0, 1e300] {
                    watch.call(
                        || format!("bt_small_target_fraction{} {d:e}", what()),
                        0,
                        || unsafe { bt_small_target_fraction(a, b, c, d, &mut out) },
                    );
                    let mut mtf: bt_mtf = unsafe { core::mem::zeroed() };
                    watch.call(
                        || format!("bt_mtf_evaluate{} {d:e}", what()),
                        0,
                        || unsafe { bt_mtf_evaluate(a, b, c, d, &mut mtf) },
                    );
                    watch.call(
                        || format!("bt_two_point_sigma_sensitivity{} {d:e}", what()),
                        0,
                        || unsafe { bt_two_point_sigma_sensitivity(a, b, c, d, 1000.0, &mut out) },
                    );
                }
                for rule in [0u32, 1, 2, 3, u32::MAX] {
                    let mut verdict: bt_target_verdict = unsafe { core::mem::zeroed() };
                    watch.call(
                        || format!("bt_target_check({rule}, {a:e}, {b:e}, {c:e})"),
                        0,
                        || unsafe { bt_target_check(rule, a, b, c, &mut verdict) },
                    );
                }
            }
        }
    }
    watch.finish("optics and emissivity");
}

/// Band helpers, site methods and Wien-ratio and general-curve models on the hostile
/// bands, scenes, curves and temperatures.
#[test]
fn band_helper_and_site_calls_are_bounded() {
    let tables = tables();
    let mut watch = Watch::new();
    let mut out = 0.0;
    let mut out2 = 0.0;
    let bands = bands(&tables);
    let temps = [f64::NAN, -1.0, 5e-324, 1e-3, 300.0, 1500.0, 1e25, f64::MAX];
    let fractions = [f64::NAN, -0.0, 5e-324, 0.5, 1.0, 1.0 + 1e-15, 1e300];
    for (name, band) in &bands {
        watch.call(
            || format!("bt_sakuma_hattori_from_moments({name})"),
            0,
            || unsafe { bt_sakuma_hattori_from_moments(band, &mut out, &mut out2) },
        );
        for &t in &temps {
            watch.call(
                || format!("bt_limit_effective_wavelength_um({name}, {t:e})"),
                0,
                || unsafe { bt_limit_effective_wavelength_um(band, t, &mut out) },
            );
            for &t2 in &temps {
                watch.call(
                    || format!("bt_mean_effective_wavelength_um({name}, {t:e}, {t2:e})"),
                    0,
                    || unsafe { bt_mean_effective_wavelength_um(band, t, t2, &mut out) },
                );
            }
            for &f in &fractions {
                watch.call(
                    || format!("bt_sse_temperature_error_k({name}, {t:e}, {f:e})"),
                    0,
                    || unsafe { bt_sse_temperature_error_k(band, t, f, &mut out) },
                );
                for &t2 in &[f64::NAN, 5e-324, 293.15, 1e25] {
                    watch.call(
                        || format!("bt_reflector_bias_k({name}, {t:e}, {f:e}, {t2:e})"),
                        0,
                        || unsafe { bt_reflector_bias_k(band, t, f, t2, &mut out) },
                    );
                }
            }
        }
        for (s, scene) in scenes().iter().enumerate() {
            for &signal in VALUES {
                let what = || format!("({name}, scene {s}, {signal:e})");
                for &t in &[f64::NAN, 5e-324, 350.0, 1e25] {
                    watch.call(
                        || format!("bt_emissivity_from_reference{} {t:e}", what()),
                        0,
                        || unsafe {
                            bt_emissivity_from_reference(band, scene, signal, t, &mut out)
                        },
                    );
                    for &f in &[f64::NAN, 5e-324, 0.95, 1.0] {
                        watch.call(
                            || {
                                format!(
                                    "bt_emissivity_from_reference_coating{} {t:e} {f:e}",
                                    what()
                                )
                            },
                            0,
                            || unsafe {
                                bt_emissivity_from_reference_coating(
                                    band, scene, signal, t, f, &mut out, &mut out2,
                                )
                            },
                        );
                        watch.call(
                            || {
                                format!(
                                    "bt_reflected_temperature_from_reflector{} {t:e} {f:e}",
                                    what()
                                )
                            },
                            0,
                            || unsafe {
                                bt_reflected_temperature_from_reflector(
                                    band, scene, signal, f, t, &mut out,
                                )
                            },
                        );
                    }
                }
            }
        }
        for &radiance in VALUES {
            for &u in &[f64::NAN, -1.0, 0.0, 1e-3, 1e300] {
                let mut budget: bt_site_budget = unsafe { core::mem::zeroed() };
                watch.call(
                    || format!("bt_direct_reflected_budget({name}, {radiance:e}, {u:e})"),
                    0,
                    || unsafe {
                        bt_direct_reflected_budget(band, radiance, u, 0.5, u, &mut budget)
                    },
                );
            }
        }
        for (name2, band2) in &bands {
            let mut model = bt_wien_ratio {
                lambda1_um: 0.0,
                lambda2_um: 0.0,
                prefactor: 0.0,
            };
            watch.call(
                || format!("bt_wien_ratio_from_bands({name}, {name2})"),
                0,
                || unsafe { bt_wien_ratio_from_bands(band, band2, &mut model) },
            );
        }
    }
    let models = [
        bt_wien_ratio {
            lambda1_um: 0.9,
            lambda2_um: 1.05,
            prefactor: 1.0,
        },
        bt_wien_ratio {
            lambda1_um: 1.0,
            lambda2_um: 1.0 + 1e-15,
            prefactor: 1e300,
        },
        bt_wien_ratio {
            lambda1_um: 5e-324,
            lambda2_um: f64::MAX,
            prefactor: 5e-324,
        },
        bt_wien_ratio {
            lambda1_um: f64::NAN,
            lambda2_um: 1.0,
            prefactor: 1.0,
        },
    ];
    for (m, model) in models.iter().enumerate() {
        for &a in VALUES {
            for &e in &[f64::NAN, 5e-324, 0.9, 1.0, 1e300] {
                let what = || format!("(model {m}, {a:e}, {e:e})");
                watch.call(
                    || format!("bt_wien_ratio_signal_ratio{}", what()),
                    0,
                    || unsafe { bt_wien_ratio_signal_ratio(model, a, e, &mut out) },
                );
                watch.call(
                    || format!("bt_wien_ratio_temperature{}", what()),
                    0,
                    || unsafe { bt_wien_ratio_temperature(model, a, e, &mut out) },
                );
                watch.call(
                    || format!("bt_wien_ratio_correct_grey{}", what()),
                    0,
                    || unsafe { bt_wien_ratio_correct_grey(model, a, e, &mut out) },
                );
            }
        }
    }
    for form in [bt_curve_form::Planck, bt_curve_form::Wien] {
        for (k, c) in curves().iter().enumerate() {
            for &offset in &[f64::NAN, -1e300, 0.0, 5e-324, 1e300] {
                let curve = bt_curve {
                    form,
                    a_um: c.a_um,
                    b_umk: c.b_umk,
                    c: c.c,
                    offset,
                };
                for &v in VALUES {
                    let what = || format!("({form:?}, curve {k}, offset {offset:e}, {v:e})");
                    watch.call(
                        || format!("bt_curve_signal{}", what()),
                        0,
                        || unsafe { bt_curve_signal(&curve, v, &mut out) },
                    );
                    watch.call(
                        || format!("bt_curve_temperature{}", what()),
                        0,
                        || unsafe { bt_curve_temperature(&curve, v, &mut out) },
                    );
                    for (s, scene) in scenes().iter().enumerate() {
                        watch.call(
                            || format!("bt_curve_sensor_signal{} scene {s}", what()),
                            0,
                            || unsafe { bt_curve_sensor_signal(&curve, scene, v, &mut out) },
                        );
                        watch.call(
                            || format!("bt_curve_object_temperature{} scene {s}", what()),
                            0,
                            || unsafe { bt_curve_object_temperature(&curve, scene, v, &mut out) },
                        );
                    }
                }
            }
        }
    }
    watch.finish("band helpers and site methods");
}

/// Site-method budgets, general-curve fits, size-of-source correction, multi-wavelength
/// fits and noise gains, and the measurement equation with spectral emissivity and
/// transmittance tables: hostile bands, scenes, signals and uncertainties; fit point lists
/// and tables up to 1,000 entries (with hostile values planted; one spanning 5e-324 to
/// 1e300 um, so the widest bands are integrated against a table); band lists up to 17
/// (more than 16 are refused).
#[test]
fn site_fit_and_spectral_calls_are_bounded() {
    let tables = tables();
    let mut watch = Watch::new();
    let mut out = 0.0;
    let bands = bands(&tables);
    let signals = [f64::NAN, -1.0, 5e-324, 1.0, 30.0, 1e300, f64::MAX];
    let uncertainties = [f64::NAN, -1.0, 0.0, 1e-3, 1e300];
    for (name, band) in &bands {
        for (s, scene) in scenes().iter().enumerate() {
            for &signal in &signals {
                for &u in &uncertainties {
                    let what = || format!("({name}, scene {s}, {signal:e}, u {u:e})");
                    let mut budget: bt_site_budget = unsafe { core::mem::zeroed() };
                    watch.call(
                        || format!("bt_contact_emissivity_budget{}", what()),
                        0,
                        || unsafe {
                            bt_contact_emissivity_budget(
                                band,
                                scene,
                                signal,
                                350.0,
                                u,
                                u,
                                u,
                                &mut budget,
                            )
                        },
                    );
                    let u4 = [u, u, u, u];
                    watch.call(
                        || format!("bt_coating_emissivity_budget{}", what()),
                        0,
                        || unsafe {
                            bt_coating_emissivity_budget(
                                band,
                                scene,
                                signal,
                                30.0,
                                0.95,
                                u4.as_ptr(),
                                &mut budget,
                            )
                        },
                    );
                    watch.call(
                        || format!("bt_reflector_budget{}", what()),
                        0,
                        || unsafe {
                            bt_reflector_budget(
                                band,
                                scene,
                                signal,
                                0.03,
                                295.0,
                                u,
                                u,
                                u,
                                &mut budget,
                            )
                        },
                    );
                }
            }
        }
        for form in [-1, 0, 1, 2, i32::MIN] {
            for &lo in RANGE_VALUES {
                for &hi in &[f64::NAN, 300.0, 1200.0, 1e6, f64::MAX] {
                    let mut curve: bt_curve = unsafe { core::mem::zeroed() };
                    watch.call(
                        || format!("bt_curve_fit_band({form}, {name}, {lo:e}, {hi:e})"),
                        0,
                        || unsafe { bt_curve_fit_band(form, band, lo, hi, &mut curve, &mut out) },
                    );
                }
            }
        }
        // Size-of-source tables: 2 to 1,000 diameters, increasing, hostile values planted.
        for len in [0usize, 1, 2, 100, 1000] {
            for plant in std::iter::once(None).chain(HOSTILE_F64.iter().map(|&v| Some(v))) {
                let diameters: Vec<f64> = (0..len).map(|i| 1.0 + i as f64).collect();
                let sigma: Vec<f64> = (0..len)
                    .map(|i| match plant {
                        Some(v) if i == len / 2 => v,
                        _ => 0.9 + 0.1 * i as f64 / len.max(1) as f64,
                    })
                    .collect();
                for &t in &[f64::NAN, 5e-324, 1000.0, 1e25] {
                    for &(cal, meas) in &[
                        (10.0, 5.0),
                        (f64::NAN, 5.0),
                        (5e-324, f64::MAX),
                        (10.0, 10.0),
                    ] {
                        let mut correction: bt_sse_correction = unsafe { core::mem::zeroed() };
                        watch.call(
                            || format!("bt_sse_correct({name}, {len}, plant {plant:?}, {t:e}, {cal:e}, {meas:e})"),
                            len,
                            || unsafe {
                                bt_sse_correct(
                                    band,
                                    diameters.as_ptr(),
                                    sigma.as_ptr(),
                                    len,
                                    t,
                                    cal,
                                    meas,
                                    &mut correction,
                                )
                            },
                        );
                    }
                }
            }
        }
        // Spectral emissivity and transmittance tables: short and 1,000 points, hostile
        // values planted.
        for len in [0usize, 2, 3, 1000] {
            for plant in [None, Some(f64::NAN), Some(-1.0), Some(5e-324), Some(1e300)] {
                let (table_um, mut values) = if len == 0 {
                    (Vec::new(), Vec::new())
                } else if len == 3 {
                    // Spans every hostile band but the one reaching f64::MAX.
                    (vec![5e-324, 1.0, 1e300], vec![0.5; 3])
                } else {
                    let (w, _) = long_table(len.max(2));
                    let v = vec![0.5; w.len()];
                    (w, v)
                };
                if let (Some(v), Some(slot)) = (plant, values.get_mut(len / 2)) {
                    *slot = v;
                }
                let spectral = bt_spectral_tables {
                    emissivity_um: table_um.as_ptr(),
                    emissivity: values.as_ptr(),
                    emissivity_len: len,
                    transmittance_um: table_um.as_ptr(),
                    transmittance: values.as_ptr(),
                    transmittance_len: len,
                };
                for (s, scene) in scenes().iter().enumerate().take(3) {
                    for &v in &[f64::NAN, 5e-324, 300.0, 30.0, 1e25] {
                        let what =
                            || format!("({name}, scene {s}, {len} points, plant {plant:?}, {v:e})");
                        watch.call(
                            || format!("bt_spectral_sensor_radiance{}", what()),
                            len,
                            || unsafe {
                                bt_spectral_sensor_radiance(band, scene, &spectral, v, &mut out)
                            },
                        );
                        if name == "1e-6-1e6" {
                            continue; // the inversions: `wide_band_spectral_inversions_are_bounded`
                        }
                        watch.call(
                            || format!("bt_spectral_object_temperature{}", what()),
                            len,
                            || unsafe {
                                bt_spectral_object_temperature(band, scene, &spectral, v, &mut out)
                            },
                        );
                        watch.call(
                            || format!("bt_spectral_object_temperature_from_apparent{}", what()),
                            len,
                            || unsafe {
                                bt_spectral_object_temperature_from_apparent(
                                    band, scene, &spectral, v, &mut out,
                                )
                            },
                        );
                    }
                }
            }
        }
    }
    // General-curve point fits: valid Sakuma-Hattori points, hostile values planted,
    // 0 to 1,000 points, every form integer.
    let curve = SakumaHattoriRef {
        a_um: 3.88,
        b_umk: 21.0,
        c: 4.0e7,
    };
    for n in [0usize, 1, 3, 256, 257, 1000] {
        for plant in std::iter::once(None).chain(HOSTILE_F64.iter().map(|&v| Some(v))) {
            let t: Vec<f64> = (0..n)
                .map(|i| 300.0 + 700.0 * i as f64 / n.max(1) as f64)
                .collect();
            let mut signal: Vec<f64> = t.iter().map(|&t| curve.signal(t)).collect();
            if let (Some(v), Some(slot)) = (plant, signal.get_mut(n / 2)) {
                *slot = v;
            }
            let u = vec![1.0; n];
            for form in [0, 1, 7] {
                for &dark in &[0.0, f64::NAN, 1e300] {
                    let mut fit: bt_curve_fit = unsafe { core::mem::zeroed() };
                    watch.call(
                        || format!("bt_curve_fit_points({form}, n = {n}, plant {plant:?}, dark {dark:e})"),
                        n,
                        || unsafe {
                            bt_curve_fit_points(form, t.as_ptr(), signal.as_ptr(), u.as_ptr(), n, dark, &mut fit)
                        },
                    );
                }
            }
        }
    }
    // Multi-wavelength: 0 to 17 bands (narrow ones across 0.6-1.6 um and the hostile
    // ones), hostile signals and temperatures, every number of terms.
    let narrow: Vec<bt_band> = (0..17)
        .map(|i| {
            let c = 0.6 + 0.06 * f64::from(i);
            rect(c - 0.01, c + 0.01, bt_detector::Energy)
        })
        .collect();
    let hostile_bands: Vec<bt_band> = bands.iter().map(|(_, b)| *b).cycle().take(17).collect();
    let wavelengths: Vec<f64> = narrow.iter().map(|b| 0.5 * (b.lo_um + b.hi_um)).collect();
    for (set_name, set) in [("narrow", &narrow), ("hostile", &hostile_bands)] {
        for count in [0usize, 1, 2, 4, 16, 17] {
            for &sig in &signals {
                let signals_in: Vec<f64> =
                    (0..count).map(|i| sig * (1.0 + 0.01 * i as f64)).collect();
                for terms in [0u32, 1, 3, 4, u32::MAX] {
                    let mut result: bt_multiwavelength_result = unsafe { core::mem::zeroed() };
                    watch.call(
                        || format!("bt_multiwavelength_fit({set_name}, {count}, {sig:e}, terms {terms})"),
                        0,
                        || unsafe {
                            bt_multiwavelength_fit(set.as_ptr(), signals_in.as_ptr(), count, terms, &mut result)
                        },
                    );
                }
            }
        }
    }
    let mut bias = 0.0;
    for count in [0usize, 1, 2, 4, 16, 17] {
        for &t in &[f64::NAN, 5e-324, 1500.0, 1e25, f64::MAX] {
            for terms in [0u32, 1, 3, 4, u32::MAX] {
                watch.call(
                    || format!("bt_multiwavelength_noise_gain({count}, {t:e}, terms {terms})"),
                    0,
                    || unsafe {
                        bt_multiwavelength_noise_gain(
                            wavelengths.as_ptr(),
                            count,
                            t,
                            terms,
                            &mut out,
                            &mut bias,
                        )
                    },
                );
            }
        }
    }
    watch.finish("site methods, fits, spectral tables");
}

/// The spectral-mode inversions on a band twelve decades wide (1e-6 to 1e6 um) with no
/// tables or a table spanning it, for hostile scenes and signals.
#[test]
#[ignore = "spectral inversions on a 1e-6-1e6 um band take 25-50 ms on the host (an apparent 1e25 K with emissivity 1e-300 runs safeguarded Newton over a quadrature of the whole band until RadianceOutOfRange): bounded but at the 50 ms limit under load"]
fn wide_band_spectral_inversions_are_bounded() {
    let mut watch = Watch::new();
    let mut out = 0.0;
    let band = rect(1e-6, 1e6, bt_detector::Photon);
    let table_um = [5e-324, 1.0, 1e300];
    let values = [0.5, 0.5, 0.5];
    for len in [0usize, 3] {
        let spectral = bt_spectral_tables {
            emissivity_um: table_um.as_ptr(),
            emissivity: values.as_ptr(),
            emissivity_len: len,
            transmittance_um: table_um.as_ptr(),
            transmittance: values.as_ptr(),
            transmittance_len: len,
        };
        for (s, scene) in scenes().iter().enumerate() {
            for &v in VALUES {
                let what = || format!("(1e-6-1e6, scene {s}, {len} points, {v:e})");
                watch.call(
                    || format!("bt_spectral_object_temperature{}", what()),
                    0,
                    || unsafe {
                        bt_spectral_object_temperature(&band, scene, &spectral, v, &mut out)
                    },
                );
                watch.call(
                    || format!("bt_spectral_object_temperature_from_apparent{}", what()),
                    0,
                    || unsafe {
                        bt_spectral_object_temperature_from_apparent(
                            &band, scene, &spectral, v, &mut out,
                        )
                    },
                );
            }
        }
    }
    watch.finish("wide-band spectral inversions");
}

/// Monte Carlo budgets and the verification reports at modest sizes (up to 1,000 trials
/// or points, 100 band samples, 8 points per row), hostile ranges, seeds, curves and covariances.
/// Their documented maxima (a million band samples; coverage point lists of any length)
/// are the ignored groups below.
#[test]
fn monte_carlo_and_verify_calls_are_bounded() {
    let tables = tables();
    let mut watch = Watch::new();
    let bands = bands(&tables);
    let curves = curves();
    let (converter, table) = ordinary_converter();
    let rows = table.len();
    let u = bt_input_uncertainties {
        signal: 0.01,
        calibration_k: 0.5,
        emissivity: 0.02,
        reflected_k: 2.0,
        ..Default::default()
    };
    let mut samples = vec![0.0; 1000];
    let (mut mean, mut sd) = (0.0, 0.0);
    for (name, band) in bands.iter().take(4) {
        for (s, scene) in scenes().iter().enumerate() {
            for &signal in &[f64::NAN, 5e-324, 30.0, 1e300] {
                for n in [0usize, 1, 2, 1000] {
                    for &p in &[f64::NAN, 0.0, 0.95, 1.0] {
                        let mut mc: bt_monte_carlo = unsafe { core::mem::zeroed() };
                        watch.call(
                            || format!("bt_surface_monte_carlo({name}, scene {s}, {signal:e}, {n}, {p:e})"),
                            n,
                            || unsafe {
                                bt_surface_monte_carlo(
                                    band, scene, signal, &u, 7, p, samples.as_mut_ptr(), n, &mut mc,
                                )
                            },
                        );
                    }
                    watch.call(
                        || format!("bt_surface_monte_carlo_streaming({name}, scene {s}, {signal:e}, {n})"),
                        n,
                        || unsafe {
                            bt_surface_monte_carlo_streaming(
                                band, scene, signal, &u, u64::MAX, n, &mut mean, &mut sd,
                            )
                        },
                    );
                }
            }
        }
    }
    let ranges = [
        (250.0, 1200.0),
        (f64::NAN, 300.0),
        (300.0, 300.0),
        (5e-324, f64::MAX),
        (1e-3, 1e25),
    ];
    for (name, band) in &bands {
        for &(lo, hi) in &ranges {
            for n in [0usize, 1, 2, 100, 1_000_001] {
                // Up to 100 samples (one band inversion each: larger counts are the
                // ignored group's); a million and one is refused up front.
                let short = n.min(100);
                let samples = if n > 1_000_000 { n } else { short };
                let mut rt: bt_verify_round_trip_report = unsafe { core::mem::zeroed() };
                watch.call(
                    || format!("bt_verify_round_trip_band({name}, {lo:e}, {hi:e}, {n})"),
                    short,
                    || unsafe { bt_verify_round_trip_band(band, lo, hi, samples, &mut rt) },
                );
                let mut report: bt_verify_curve_report = unsafe { core::mem::zeroed() };
                watch.call(
                    || format!("bt_verify_curve_band({name}, {lo:e}, {hi:e}, {n})"),
                    short,
                    || unsafe {
                        bt_verify_curve_band(
                            &curves[0],
                            0.0,
                            band,
                            1.0,
                            0.0,
                            lo,
                            hi,
                            samples,
                            &mut report,
                        )
                    },
                );
            }
        }
        for per_row in [0usize, 1, 8, 4097] {
            let mut report: bt_verify_table_report = unsafe { core::mem::zeroed() };
            watch.call(
                || format!("bt_verify_frame_table_band({name}, {per_row})"),
                rows * per_row.min(8),
                || unsafe {
                    bt_verify_frame_table_band(
                        band,
                        &converter,
                        table.as_ptr(),
                        rows,
                        per_row,
                        &mut report,
                    )
                },
            );
        }
    }
    let covariance_sets = [
        [1e-6, 0.0, 0.0, 0.0, 1e-4, 0.0, 0.0, 0.0, 1e6],
        [f64::NAN; 9],
        [-1.0; 9],
        [1e300; 9],
    ];
    let t_pts: Vec<f64> = (0..1000).map(|i| 300.0 + 0.7 * f64::from(i)).collect();
    let sh = SakumaHattoriRef {
        a_um: 3.88,
        b_umk: 21.0,
        c: 4.0e7,
    };
    let s_pts: Vec<f64> = t_pts.iter().map(|&t| sh.signal(t)).collect();
    for (k, curve) in curves.iter().enumerate() {
        for &(lo, hi) in &ranges {
            for n in [0usize, 1, 2, 1000] {
                let what = || format!("(curve {k}, {lo:e}, {hi:e}, {n})");
                let mut rt: bt_verify_round_trip_report = unsafe { core::mem::zeroed() };
                watch.call(
                    || format!("bt_verify_round_trip_sakuma_hattori{}", what()),
                    n,
                    || unsafe {
                        bt_verify_round_trip_sakuma_hattori(curve, 0.0, lo, hi, n, &mut rt)
                    },
                );
                for (c, covariance) in covariance_sets.iter().enumerate() {
                    let mut report: bt_verify_uncertainty_report = unsafe { core::mem::zeroed() };
                    watch.call(
                        || {
                            format!(
                                "bt_verify_uncertainty_sakuma_hattori{} covariance {c}",
                                what()
                            )
                        },
                        n,
                        || unsafe {
                            bt_verify_uncertainty_sakuma_hattori(
                                curve,
                                covariance.as_ptr(),
                                lo,
                                hi,
                                n,
                                &mut report,
                            )
                        },
                    );
                }
                let mut residuals: bt_verify_residuals_report = unsafe { core::mem::zeroed() };
                watch.call(
                    || format!("bt_verify_residuals_sakuma_hattori{}", what()),
                    n,
                    || unsafe {
                        bt_verify_residuals_sakuma_hattori(
                            curve,
                            0.0,
                            t_pts.as_ptr(),
                            s_pts.as_ptr(),
                            n,
                            &mut residuals,
                        )
                    },
                );
                let mut coverage: bt_verify_coverage_report = unsafe { core::mem::zeroed() };
                watch.call(
                    || format!("bt_verify_coverage{}", what()),
                    n,
                    || unsafe { bt_verify_coverage(t_pts.as_ptr(), n, lo, hi, &mut coverage) },
                );
            }
        }
        for per_row in [0usize, 1, 8, 4097] {
            let mut report: bt_verify_table_report = unsafe { core::mem::zeroed() };
            watch.call(
                || format!("bt_verify_frame_table_sakuma_hattori(curve {k}, {per_row})"),
                rows * per_row.min(8),
                || unsafe {
                    bt_verify_frame_table_sakuma_hattori(
                        curve,
                        &converter,
                        table.as_ptr(),
                        rows,
                        per_row,
                        &mut report,
                    )
                },
            );
        }
    }
    watch.finish("Monte Carlo and verify");
}

/// The band verification reports at 1,000 and a million samples (the documented
/// maximum): one band inversion per sample.
#[test]
#[ignore = "bt_verify_round_trip_band and bt_verify_curve_band cost one band inversion per sample, up to ~34 us per sample for a 16-point tabulated response on the host (34 ms at 1,000 samples, ~34 s at the documented maximum of 1,000,000)"]
fn verify_reports_at_their_sample_limits_are_bounded() {
    let tables = tables();
    let mut watch = Watch::new();
    let curves = curves();
    for (name, band) in &bands(&tables) {
        for samples in [1000usize, 1_000_000] {
            let mut rt: bt_verify_round_trip_report = unsafe { core::mem::zeroed() };
            watch.call(
                || format!("bt_verify_round_trip_band({name}, 250, 1200, {samples})"),
                samples,
                || unsafe { bt_verify_round_trip_band(band, 250.0, 1200.0, samples, &mut rt) },
            );
            let mut report: bt_verify_curve_report = unsafe { core::mem::zeroed() };
            watch.call(
                || format!("bt_verify_curve_band({name}, 250, 1200, {samples})"),
                samples,
                || unsafe {
                    bt_verify_curve_band(
                        &curves[0],
                        0.0,
                        band,
                        1.0,
                        0.0,
                        250.0,
                        1200.0,
                        samples,
                        &mut report,
                    )
                },
            );
        }
    }
    watch.finish("verify reports at their sample limits");
}

/// `bt_verify_coverage` on long point lists: its scan is O(n x distinct points in range)
/// without storage (0.64 s at 20,000 distinct points, 14.8 s at 100,000), so it accepts at
/// most 1024 points and refuses longer lists up front.
#[test]
fn long_coverage_lists_are_bounded() {
    let mut watch = Watch::new();
    for n in [1024usize, 1025, 20_000, 100_000] {
        let t: Vec<f64> = (0..n).map(|i| 300.0 + 1e-3 * i as f64).collect();
        let mut coverage: bt_verify_coverage_report = unsafe { core::mem::zeroed() };
        watch.call(
            || format!("bt_verify_coverage({n} points)"),
            n,
            || unsafe { bt_verify_coverage(t.as_ptr(), n, 250.0, 1200.0, &mut coverage) },
        );
    }
    watch.finish("long coverage lists");
    // At the limit a report; one past it a refusal, out untouched.
    let t: Vec<f64> = (0..1025).map(|i| 300.0 + f64::from(i)).collect();
    let mut coverage: bt_verify_coverage_report = unsafe { core::mem::zeroed() };
    let s = unsafe { bt_verify_coverage(t.as_ptr(), 1024, 250.0, 1200.0, &mut coverage) };
    assert_eq!(s, bt_status::Ok);
    assert_eq!(coverage.points, 1024);
    let s = unsafe { bt_verify_coverage(t.as_ptr(), 1025, 250.0, 1200.0, &mut coverage) };
    assert_eq!(s, bt_status::VerifyTooManyPoints);
}

/// Exports that take no input worth bounding: none today. Every export takes input
/// (`bt_version` takes none but is driven above anyway).
const NO_INPUT_EXPORTS: &[&str] = &[];

/// The function names declared in the header: on a line that starts a declaration (no
/// leading blank, not a comment or preprocessor line), the `bt_` identifier right before
/// the first `(`.
fn header_exports(header: &str) -> Vec<String> {
    let mut names: Vec<String> = header
        .lines()
        .filter(|line| {
            line.chars().next().is_some_and(|c| c.is_ascii_alphabetic())
                && !line.starts_with("typedef")
        })
        .filter_map(|line| {
            let head = &line[..line.find('(')?];
            let name = head.rsplit([' ', '*']).next()?;
            name.starts_with("bt_").then(|| name.to_string())
        })
        .collect();
    names.sort();
    names.dedup();
    names
}

/// Whether `name` occurs in `source` as a whole identifier (not as a prefix of a longer
/// one, e.g. `bt_frame_convert_counts` inside `bt_frame_convert_counts_corrected`).
fn mentions(source: &str, name: &str) -> bool {
    source.match_indices(name).any(|(at, _)| {
        let before = source[..at].chars().next_back();
        let after = source[at + name.len()..].chars().next();
        let ident = |c: Option<char>| c.is_some_and(|c| c.is_ascii_alphanumeric() || c == '_');
        !ident(before) && !ident(after)
    })
}

/// Every export of `include/bandtemp.h` is called by a group of this file, or is on the
/// list above with its reason. Comments and the list itself are discounted: a name counts
/// as driven only where it occurs in code above the list.
#[test]
fn every_header_export_is_driven() {
    let root = concat!(env!("CARGO_MANIFEST_DIR"), "/..");
    let header = std::fs::read_to_string(format!("{root}/include/bandtemp.h"))
        .expect("include/bandtemp.h is readable");
    let source = std::fs::read_to_string(format!("{root}/capi/tests/ffi_bounded_time.rs"))
        .expect("this file is readable");
    // The code before the list (it starts at NO_INPUT_EXPORTS's doc comment), without
    // comment lines.
    let marker = "/// Exports that take no input worth bounding";
    let driven_part: String = source
        .split(marker)
        .next()
        .unwrap_or("")
        .lines()
        .filter(|line| !line.trim_start().starts_with("//"))
        .collect::<Vec<_>>()
        .join("\n");
    let exports = header_exports(&header);
    // The parse must find the exports (a header of well over 100 functions today).
    assert!(exports.len() > 100, "parsed only {} exports", exports.len());
    assert!(exports.iter().any(|e| e == "bt_version"));
    assert!(exports.iter().any(|e| e == "bt_status_message"));
    let mut problems = Vec::new();
    for name in &exports {
        let driven = mentions(&driven_part, name);
        let exempt = NO_INPUT_EXPORTS.contains(&name.as_str());
        match (driven, exempt) {
            (false, false) => problems.push(format!("{name}: not driven and not listed")),
            (true, true) => problems.push(format!("{name}: driven, remove it from its list")),
            _ => {}
        }
    }
    for listed in NO_INPUT_EXPORTS {
        if !exports.iter().any(|e| e == listed) {
            problems.push(format!("{listed}: listed but not in the header"));
        }
    }
    assert!(problems.is_empty(), "{}", problems.join("\n"));
}
