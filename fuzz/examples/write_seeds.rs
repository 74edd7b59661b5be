//! Writes the checked-in seed corpus (`fuzz/corpus/<target>/`) from the test suite's cases
//! (`tests/data/*.csv`, the scenes, calibrations, ratios, air paths and the frame case of
//! the tests), encoded in the form each target decodes. Run from `fuzz/`:
//! `cargo run --example write_seeds`. Deterministic: the same data give the same files.

use bandtemp_fuzz::{enc_band, enc_scene, Enc};
use std::collections::BTreeMap;
use std::fs;
use std::path::Path;

type Row = BTreeMap<String, String>;

/// The rows of a CSV in `tests/data` (comment lines skipped; simple, unquoted fields
/// first, which is all the seeds use).
fn csv(name: &str) -> Vec<Row> {
    let text = fs::read_to_string(Path::new("../tests/data").join(name)).unwrap_or_default();
    let mut lines = text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty());
    let Some(header) = lines.next() else {
        return Vec::new();
    };
    let keys: Vec<String> = header.split(',').map(str::to_string).collect();
    lines
        .map(|l| {
            keys.iter()
                .cloned()
                .zip(l.split(',').map(str::to_string))
                .collect()
        })
        .collect()
}

fn num(row: &Row, key: &str) -> f64 {
    row.get(key)
        .and_then(|v| v.trim().parse().ok())
        .unwrap_or(f64::NAN)
}

fn detector(row: &Row, key: &str) -> u32 {
    u32::from(row.get(key).is_some_and(|v| v == "photon"))
}

/// A response table `response_<name>.csv`.
fn table(name: &str) -> (Vec<f64>, Vec<f64>) {
    let rows = csv(&format!("response_{name}.csv"));
    let mut wl: Vec<f64> = rows.iter().map(|r| num(r, "wavelength_um")).collect();
    let mut r: Vec<f64> = rows.iter().map(|r| num(r, "response")).collect();
    // The decoder reads at most 24 points: keep every k-th.
    let step = wl.len().div_ceil(24).max(1);
    wl = wl.into_iter().step_by(step).collect();
    r = r.into_iter().step_by(step).collect();
    (wl, r)
}

/// The scene fields of a `scene_cases.csv` row.
fn scene_of(row: &Row) -> [f64; 8] {
    [
        num(row, "emissivity"),
        num(row, "reflected_k"),
        num(row, "atm_transmittance"),
        num(row, "atm_k"),
        num(row, "window_transmittance"),
        num(row, "window_reflectance"),
        num(row, "window_k"),
        num(row, "window_reflected_k"),
    ]
}

fn write(target: &str, name: &str, e: &Enc) {
    let dir = Path::new("corpus").join(target);
    fs::create_dir_all(&dir).expect("corpus directory");
    fs::write(dir.join(format!("seed-{name}")), &e.bytes).expect("seed file");
}

fn main() {
    // planck_band: spectral cases (every 20th) and band cases, rectangular and tabulated.
    let bands = csv("band_radiance.csv");
    for (i, r) in csv("spectral_radiance.csv").iter().enumerate().step_by(20) {
        let b = bands
            .get(i % bands.len().max(1))
            .cloned()
            .unwrap_or_default();
        let mut e = Enc::new();
        e.u8(0)
            .f64(num(r, "wavelength_um"))
            .f64(num(r, "temperature_k"));
        enc_band(
            &mut e,
            num(&b, "lo_um"),
            num(&b, "hi_um"),
            detector(&b, "detector"),
            None,
        );
        e.f64(num(&b, "radiance"));
        write("planck_band", &format!("spectral-{i}"), &e);
    }
    for (i, r) in csv("tabulated_band_radiance.csv")
        .iter()
        .enumerate()
        .step_by(8)
    {
        let name = r.get("table").cloned().unwrap_or_default();
        let (wl, resp) = table(&name);
        let mut e = Enc::new();
        e.u8(0).f64(10.0).f64(num(r, "temperature_k"));
        enc_band(
            &mut e,
            num(r, "lo_um"),
            num(r, "hi_um"),
            detector(r, "detector"),
            Some((&wl, &resp)),
        );
        e.f64(num(r, "radiance"));
        write("planck_band", &format!("tabulated-{i}"), &e);
    }

    // scene and budget: the scene cases.
    for (i, r) in csv("scene_cases.csv").iter().enumerate() {
        let mut e = Enc::new();
        enc_band(
            &mut e,
            num(r, "lo_um"),
            num(r, "hi_um"),
            detector(r, "detector"),
            None,
        );
        enc_scene(&mut e, scene_of(r));
        e.f64(num(r, "object_k")).f64(num(r, "sensor_signal"));
        write("scene", &format!("case-{i}"), &e);

        let mut e = Enc::new();
        e.bool(true);
        enc_band(
            &mut e,
            num(r, "lo_um"),
            num(r, "hi_um"),
            detector(r, "detector"),
            None,
        );
        enc_scene(&mut e, scene_of(r));
        e.f64(num(r, "object_k")).bool(true).bool(false);
        for _ in 0..11 {
            e.u8(1).u8(5);
        }
        write("budget", &format!("case-{i}"), &e);
    }

    // calibration: the reference points (with and without uncertainties), the band fits
    // and their curves.
    let text = fs::read_to_string("../tests/data/calibration_points_ref.csv").unwrap_or_default();
    let mut rows: BTreeMap<String, Vec<f64>> = BTreeMap::new();
    for line in text.lines().filter(|l| !l.starts_with('#')) {
        let mut fields = line.split(',');
        if let Some(key) = fields.next() {
            rows.insert(
                key.to_string(),
                fields.filter_map(|v| v.trim().parse().ok()).collect(),
            );
        }
    }
    let t = rows.get("temperature_k").cloned().unwrap_or_default();
    let s = rows.get("signal").cloned().unwrap_or_default();
    let u = rows.get("uncertainty").cloned().unwrap_or_default();
    for with_u in [false, true] {
        let mut e = Enc::new();
        e.u8(2).bool(false).len(t.len(), 40);
        t.iter().for_each(|&v| {
            e.f64(v);
        });
        s.iter().for_each(|&v| {
            e.f64(v);
        });
        e.bool(with_u);
        u.iter().for_each(|&v| {
            e.f64(v);
        });
        write("calibration", &format!("points-u{}", u8::from(with_u)), &e);
    }
    for (i, r) in csv("calibration_band_ref.csv").iter().enumerate() {
        let mut e = Enc::new();
        e.u8(3);
        enc_band(
            &mut e,
            num(r, "lo_um"),
            num(r, "hi_um"),
            detector(r, "detector"),
            None,
        );
        e.f64(num(r, "t_lo_k")).f64(num(r, "t_hi_k"));
        write("calibration", &format!("band-{i}"), &e);

        let mut e = Enc::new();
        e.u8(0)
            .bool(true)
            .f64(num(r, "a_um"))
            .f64(num(r, "b_umk"))
            .f64(num(r, "c"));
        e.f64(0.5 * (num(r, "t_lo_k") + num(r, "t_hi_k")))
            .f64(num(r, "c") * 1e-3);
        enc_scene(&mut e, [0.9, 295.0, 0.95, 290.0, 0.9, 0.05, 300.0, 293.0]);
        write("calibration", &format!("curve-{i}"), &e);
    }

    // frame: the converter of the C tests (8-14 um, 250-1500 K at 1 mK, counts 0.002 n - 2)
    // and narrower ranges, with counts and signal frames.
    for (i, (lo, hi, tol)) in [
        (250.0, 1500.0, 1e-3),
        (280.0, 400.0, 1e-3),
        (500.0, 1200.0, 1e-2),
    ]
    .into_iter()
    .enumerate()
    {
        for as_counts in [true, false] {
            let mut e = Enc::new();
            e.u8(4 | 8);
            enc_scene(&mut e, [0.9, 295.0, 0.95, 290.0, 0.9, 0.05, 300.0, 293.0]);
            e.f64(lo).f64(hi).f64(tol).f64(0.002).f64(-2.0);
            e.u16(0).u16(0).len(256, 2048).u8(0).bool(false).bool(false);
            e.len(16, 1024).bool(as_counts);
            for k in 0..16u16 {
                e.u16(8000 + 2000 * k);
            }
            for k in 0..16u16 {
                e.f32(20.0 + 40.0 * f32::from(k));
            }
            e.u8(0).u8(1);
            write(
                "frame",
                &format!(
                    "converter-{i}-{}",
                    if as_counts { "counts" } else { "signal" }
                ),
                &e,
            );
        }
    }

    // ratio: the reference cases.
    for (i, r) in csv("ratio_reference.csv").iter().enumerate() {
        let mut e = Enc::new();
        enc_band(
            &mut e,
            num(r, "lo1_um"),
            num(r, "hi1_um"),
            detector(r, "detector1"),
            None,
        );
        enc_band(
            &mut e,
            num(r, "lo2_um"),
            num(r, "hi2_um"),
            detector(r, "detector2"),
            None,
        );
        let t = num(r, "temperature_k");
        e.f64(0.5 * t).f64(2.0 * t).f64(num(r, "ratio")).f64(1.0);
        e.bool(false)
            .f64(num(r, "emissivity_ratio"))
            .f64(t)
            .f64(1.0);
        write("ratio", &format!("case-{i}"), &e);
    }

    // air: the band transmittance cases.
    for (i, r) in csv("atmosphere_band.csv").iter().enumerate().step_by(6) {
        let mut e = Enc::new();
        e.bool(false)
            .f64(num(r, "air_k"))
            .f64(num(r, "relative_humidity"));
        e.bool(false)
            .f64(num(r, "pressure_hpa"))
            .bool(false)
            .f64(num(r, "distance_m"));
        e.bool(false).f64(10.0).f64(num(r, "object_k")).bool(false);
        enc_band(&mut e, num(r, "lo_um"), num(r, "hi_um"), 0, None);
        write("air", &format!("case-{i}"), &e);
    }

    // monte_carlo: a surface case, a generic run, and the pieces.
    for (i, r) in csv("scene_cases.csv").iter().enumerate().take(3) {
        let mut e = Enc::new();
        e.u8(0).bool(true).bool(true);
        let f = scene_of(r);
        let byte =
            |x: f64, lo: f64, span: f64| ((x - lo) / span * 255.0).round().clamp(0.0, 255.0) as u8;
        e.u8(byte(f[0], 0.3, 0.7))
            .f64(f[1])
            .u8(byte(f[2], 0.3, 0.7))
            .f64(f[3]);
        e.u8(byte(f[4], 0.3, 0.7))
            .u8(byte(f[5], 0.0, 0.05))
            .f64(f[6])
            .f64(f[7]);
        e.f64(num(r, "object_k"));
        for _ in 0..11 {
            e.u8(1).u8(40);
        }
        e.u64(20_260_101 + i as u64).len(64, 200).bool(true);
        write("monte_carlo", &format!("surface-{i}"), &e);
    }
    let mut e = Enc::new();
    e.u8(1)
        .len(100, 300)
        .bool(true)
        .len(3, 64)
        .f64(300.0)
        .f64(301.0)
        .f64(299.5);
    e.u64(1).u64(2).u64(3).u64(4);
    write("monte_carlo", "generic", &e);
    let mut e = Enc::new();
    e.u8(2).len(5, 300);
    for v in [1.0, 2.0, 3.0, 4.0, 5.0] {
        e.f64(v);
    }
    e.f64(0.6).f64(3.0).f64(1.0).f64(0.5).f64(0.12).u8(2);
    write("monte_carlo", "pieces", &e);

    raw_frame_seeds();
    verify_seeds();
}

/// raw_frame: small arrays (4x3, 8x8, 16x16) of plausible pixels, two to four physical
/// levels of two or three frames each, clean or partly flagged bad-pixel maps, with bad-
/// pixel detection and the fused conversions switched on (the 8-14 um band or a
/// Sakuma-Hattori curve, an invented 8-14 um camera).
fn raw_frame_seeds() {
    // (name, flags, width, height, levels, frames per level, bad-map mode)
    let cases: [(&str, u32, usize, usize, usize, u8, u8); 5] = [
        ("two-point-4x3", 1 | 4096, 4, 3, 2, 2, 1),
        ("multi-point-8x8", 1 | 4096 | 32, 8, 8, 4, 3, 1),
        ("flagged-16x16", 1 | 4096, 16, 16, 3, 2, 2),
        ("sakuma-hattori-8x8", 4096 | 256 | 32768, 8, 8, 2, 2, 1),
        ("no-bad-map-4x3", 0, 4, 3, 2, 3, 0),
    ];
    for (name, flags, w, h, levels, frames, bad_mode) in cases {
        let n = w * h;
        let mut e = Enc::new();
        e.u32(flags)
            .len(w - 1, 15)
            .len(h - 1, 15)
            .len(levels - 2, 3);
        for p in 0..n {
            // Response spread +-10 %, offsets 100..900 counts (invented).
            e.u8(u8::try_from(96 + (p * 37) % 64).unwrap_or(128));
        }
        for p in 0..n {
            e.u8(u8::try_from((p * 53) % 100).unwrap_or(0));
        }
        for k in 0..levels {
            e.u8(0).u8(frames - 1).u8(u8::try_from(10 * k).unwrap_or(0));
            for f in 0..usize::from(frames) {
                for p in 0..n {
                    e.u8(u8::try_from((p * 7 + f * 3 + k) % 16).unwrap_or(0));
                }
            }
        }
        e.u8(bad_mode);
        if bad_mode == 2 {
            for p in 0..n {
                e.u8(if p % 29 == 5 { 200 } else { 0 });
            }
        }
        if flags & 1 == 1 {
            // Rules 5 sigma, noise factor 3, stuck fraction 0.2 (common practice).
            e.u8(128).u8(64).u8(102);
        }
        write("raw_frame", name, &e);
    }
}

/// verify: calibration points and ranges of the test suite's kind (invented values), an
/// 8-14 um Sakuma-Hattori curve, and frame tables built over the 8-14 um band and the
/// curve.
fn verify_seeds() {
    let cases: [(&str, u16, &[f64]); 4] = [
        ("points-300-600", 0, &[300.0, 350.0, 400.0, 500.0, 600.0]),
        ("points-outside", 1, &[250.0, 273.15, 320.0, 900.0, 1200.0]),
        ("table-band", 128, &[300.0, 400.0]),
        ("table-sakuma-hattori", 128 | 256, &[310.0, 350.0, 390.0]),
    ];
    for (name, flags, points) in cases {
        let mut e = Enc::new();
        e.u16(flags).len(points.len(), 64);
        for &t in points {
            e.f64(t);
        }
        if flags & 1 == 0 {
            e.u8(20).u8(40);
        } else {
            e.f64(300.0).f64(1000.0);
        }
        // Curve a = 10 um, b = 0 um K, c = 1e4.6 (invented), 16 samples.
        e.u8(128).u8(128).u8(128).len(16, 64);
        // Diagonal covariance (standard uncertainties 1e-3 scale).
        e.f64(1.0).f64(1.0).f64(1.0);
        if flags & 128 == 128 {
            e.u8(50).u8(100).u8(255).len(3, 7);
        }
        write("verify", name, &e);
    }

    // optics_materials (first byte: the group): invented, physical cases of each group.
    let mut e = Enc::new();
    // Optics: r 12 um, EE 0.838, 10 um at F/1, 10 m at D:S 50, 17 um pitch, 25 mm lens,
    // 20 cy/mm, a 51 um image, the 3 x 3 rule.
    e.u8(0)
        .f64(12.0)
        .f64(0.838)
        .f64(10.0)
        .f64(1.0)
        .f64(10.0)
        .f64(50.0);
    e.f64(17.0)
        .f64(25.0)
        .f64(20.0)
        .f64(51.0)
        .u8(7)
        .u32(1)
        .bool(true);
    write("optics_materials", "optics", &e);
    let mut e = Enc::new();
    // Optical constants of a dielectric (n 1.5) and a metal-like pair; Hagen-Rubens.
    e.u8(1)
        .f64(1.5)
        .f64(0.0)
        .f64(30.0)
        .bool(false)
        .f64(0.01)
        .f64(1e-7)
        .f64(10.0);
    write("optics_materials", "dielectric", &e);
    let mut e = Enc::new();
    e.u8(1)
        .f64(12.0)
        .f64(40.0)
        .f64(75.0)
        .bool(false)
        .f64(0.05)
        .f64(2.5e-6)
        .f64(4.0);
    write("optics_materials", "metal", &e);
    let mut e = Enc::new();
    // Size of source: 8-14 um, SSE table 10..50 mm, reading 900 K.
    e.u8(2);
    enc_band(&mut e, 8.0, 14.0, 0, None);
    e.len(3, 8)
        .f64(10.0)
        .f64(25.0)
        .f64(50.0)
        .f64(0.0)
        .f64(0.004)
        .f64(0.007)
        .bool(true);
    e.f64(900.0).f64(25.0).f64(10.0).f64(0.003);
    write("optics_materials", "sse", &e);
    let mut e = Enc::new();
    // Multi-wavelength: three narrow bands, grey at 1400 K (e 0.4 each), two terms.
    e.u8(3).len(3, 6);
    for (lo, hi) in [(0.80, 0.82), (0.90, 0.92), (1.00, 1.02)] {
        enc_band(&mut e, lo, hi, 0, None);
    }
    e.f64(1400.0).bool(true).f64(0.4).f64(0.4).f64(0.4);
    e.bool(false).u32(2).f64(0.81).f64(0.91).f64(1.01);
    write("optics_materials", "multiwavelength", &e);
    for (group, name) in [(4u8, "site"), (5, "budget"), (6, "monte-carlo")] {
        let mut e = Enc::new();
        e.u8(group);
        enc_band(&mut e, 8.0, 14.0, 0, None);
        enc_scene(&mut e, [0.85, 295.0, 0.98, 293.0, 0.95, 0.01, 294.0, 296.0]);
        if group == 6 {
            e.f64(350.0).bool(true);
            for _ in 0..11 {
                e.f64(0.5);
            }
            e.u64(20_261_203).len(32, 48).bool(true);
        } else {
            // Reading from the scene at 350 K (group 4 also reads a spare signal), a
            // coating of emissivity 0.95, then (budgets) four uncertainties, and a
            // reflector of emissivity 0.1 (scaled by 0.2 on decoding) at 300 K.
            e.f64(350.0).bool(true);
            if group == 4 {
                e.f64(1.0);
            }
            e.f64(0.95).bool(true);
            if group == 5 {
                e.f64(0.5).f64(0.2).f64(0.5).f64(0.3);
            }
            e.f64(0.5).f64(300.0);
        }
        write("optics_materials", name, &e);
    }

    // spectral_curves (first byte: the group).
    let mut e = Enc::new();
    // A spectral scene over 3-5 um: emissivity falling 0.9 -> 0.7, air 0.95 -> 0.9.
    e.u8(0);
    enc_band(&mut e, 3.0, 5.0, 0, None);
    enc_scene(&mut e, [0.8, 295.0, 0.95, 293.0, 0.95, 0.01, 294.0, 296.0]);
    e.len(3, 8)
        .bool(true)
        .f64(2.5)
        .f64(4.0)
        .f64(5.5)
        .f64(0.9)
        .f64(0.8)
        .f64(0.7);
    e.len(2, 8).bool(true).f64(2.5).f64(5.5).f64(0.95).f64(0.9);
    e.f64(600.0).f64(1.0).f64(550.0);
    write("spectral_curves", "spectral", &e);
    for (form, name) in [(0u8, "curve-planck"), (4, "curve-wien")] {
        let mut e = Enc::new();
        // A curve near 3.9 um with an offset of 120 counts, in an invented scene.
        e.u8(1)
            .u8(form)
            .f64(3.9)
            .f64(0.0)
            .f64(2.0e7)
            .bool(false)
            .f64(120.0);
        enc_scene(&mut e, [0.9, 295.0, 0.98, 293.0, 0.96, 0.01, 294.0, 296.0]);
        e.f64(700.0).f64(5.0e4);
        write("spectral_curves", name, &e);
    }
    let mut e = Enc::new();
    // Fits: five points from a Planck-form curve, then a fit to a 0.645-0.655 um band.
    e.u8(2)
        .u8(0)
        .len(5, 8)
        .u8(0)
        .f64(0.65)
        .f64(0.0)
        .f64(1.0e9)
        .bool(true)
        .bool(true);
    for t in [700.0, 850.0, 1000.0, 1200.0, 1400.0] {
        e.f64(t);
    }
    e.bool(false);
    for _ in 0..5 {
        e.f64(1e-3);
    }
    enc_band(&mut e, 0.645, 0.655, 0, None);
    e.f64(700.0).f64(1400.0);
    write("spectral_curves", "fits", &e);
    let mut e = Enc::new();
    e.u8(3);
    enc_band(&mut e, 8.0, 14.0, 0, None);
    e.f64(300.0)
        .f64(400.0)
        .f64(350.0)
        .f64(10.0)
        .f64(10.5)
        .f64(3.0);
    write("spectral_curves", "effective", &e);
    let mut e = Enc::new();
    // A two-colour pyrometer: 10 nm bands at 0.65 and 0.90 um, 1100 K.
    e.u8(4);
    enc_band(&mut e, 0.645, 0.655, 0, None);
    enc_band(&mut e, 0.895, 0.905, 0, None);
    e.f64(0.65)
        .f64(0.9)
        .f64(1.0)
        .bool(true)
        .f64(1100.0)
        .bool(true)
        .f64(0.5)
        .f64(1050.0);
    write("spectral_curves", "wien", &e);
}
