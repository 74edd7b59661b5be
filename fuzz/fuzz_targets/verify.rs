//! Calibration checks through the C ABI (`bt_verify_*`): coverage of a range by points of
//! any value, residuals of a Sakuma-Hattori calibration at points of any value, a curve
//! against the band model, round trips of band and Sakuma-Hattori curves, the uncertainty
//! of a calibration from a covariance of any content, and frame tables (built here, or
//! with rows altered) against exact inversion. Counts stay small (at most 64 points or
//! samples; tables of at most 62 rows and 64 samples) so that each call stays well
//! inside the per-call limit (`bt_verify_coverage` is O(n^2)).
//!
//! Oracles: errors leave the report untouched; a success is finite (every report field
//! the docs promise finite), counts what it was given, and is consistent with itself
//! (max |e| = |worst e|, |mean| <= max, the worst sample inside the range); coverage
//! equals an independent computation (sort, clip, largest difference: exact arithmetic on
//! the same doubles, so bit for bit); a band's round trip is within the inversion's
//! documented "a few 1e-9 T"; a table built here has no refusals, no falls and every
//! sampled error within the geometry's max_pixel_error_k; each call within the per-call
//! limit.
#![no_main]

use bandtemp_capi::*;
use bandtemp_fuzz::{band, oracle, timed, Dec, FuzzBand, Kind, Poisoned};
use libfuzzer_sys::fuzz_target;

const MAX_N: usize = 64;

/// |mean| of n values each at most `max` in size, summed as e_i / n: each term and each
/// partial sum rounds by at most 2^-53 relative, so |mean| <= max (1 + 2 n 2^-53).
fn mean_bound(max: f64, n: usize) -> f64 {
    max * (1.0 + 2.0 * n as f64 * f64::EPSILON)
}

fuzz_target!(|data: &[u8]| {
    let mut d = Dec::new(data);
    let flags = d.u16();

    // Coverage.
    let n = d.len(MAX_N);
    let t: Vec<f64> = (0..n).map(|_| d.f64(Kind::TempK)).collect();
    let (lo_k, hi_k) = if flags & 1 == 0 {
        let lo = 200.0 + 1000.0 * f64::from(d.u8()) / 255.0;
        (lo, lo * (1.1 + 3.0 * f64::from(d.u8()) / 255.0))
    } else {
        (d.f64(Kind::TempK), d.f64(Kind::TempK))
    };
    let mut cov = Poisoned::<bt_verify_coverage_report>::new();
    let s = timed(
        || format!("bt_verify_coverage({t:?}, {lo_k:e}, {hi_k:e})"),
        || unsafe { bt_verify_coverage(t.as_ptr(), n, lo_k, hi_k, cov.ptr()) },
    );
    if s == bt_status::Ok {
        let r = cov.value;
        let expected = coverage(&t, lo_k, hi_k);
        oracle(format!("{r:?}") == format!("{expected:?}"), || {
            format!("coverage({t:?}, {lo_k:e}, {hi_k:e}) = {r:?}, expected {expected:?}")
        });
    } else {
        oracle(cov.untouched(), || {
            format!("bt_verify_coverage wrote on {s:?}")
        });
    }

    // A Sakuma-Hattori curve: plausible for an 8-14 um instrument, or any.
    let sh = if flags & 2 == 0 {
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
    let dark = if flags & 4 == 0 {
        0.0
    } else {
        d.f64(Kind::Signed)
    };
    let samples = d.len(MAX_N);

    // Residuals at points of any value (signals from the curve itself, or any).
    let signal: Vec<f64> = t
        .iter()
        .map(|&tk| {
            if flags & 8 == 0 {
                let mut sv = Poisoned::<f64>::new();
                if unsafe { bt_sakuma_hattori_signal(&sh, tk, sv.ptr()) } == bt_status::Ok {
                    sv.value + dark
                } else {
                    d.f64(Kind::Magnitude)
                }
            } else {
                d.f64(Kind::Magnitude)
            }
        })
        .collect();
    let mut res = Poisoned::<bt_verify_residuals_report>::new();
    let s = timed(
        || format!("bt_verify_residuals_sakuma_hattori({sh:?}, {dark:e}, {t:?}, {signal:?})"),
        || unsafe {
            bt_verify_residuals_sakuma_hattori(&sh, dark, t.as_ptr(), signal.as_ptr(), n, res.ptr())
        },
    );
    if s == bt_status::Ok {
        let r = res.value;
        oracle(
            r.points == n
                && r.worst_index < n
                && r.worst_t_k.to_bits() == t[r.worst_index].to_bits()
                && r.max_abs_residual_k == r.worst_residual_k.abs()
                && r.mean_residual_k.abs() <= mean_bound(r.max_abs_residual_k, n)
                && r.rms_residual_k <= mean_bound(r.max_abs_residual_k, n),
            || format!("residuals {r:?} for {sh:?}, {dark:e}, {t:?}, {signal:?}"),
        );
    } else {
        oracle(res.untouched(), || format!("residuals wrote on {s:?}"));
    }

    // The band.
    let the_band: FuzzBand = if flags & 16 == 0 {
        let mut b = band(&mut Dec::new(&[]));
        b.raw.lo_um = 8.0;
        b.raw.hi_um = 14.0;
        b
    } else {
        band(&mut d)
    };
    let band_args = || {
        format!(
            "band {:?} wl {:?} r {:?}",
            the_band.raw, the_band.wl, the_band.r
        )
    };
    let (counts_gain, counts_offset) = if flags & 32 == 0 {
        (1.0, 0.0)
    } else {
        (d.f64(Kind::Magnitude), d.f64(Kind::Signed))
    };

    // Curve against the band model.
    let mut cr = Poisoned::<bt_verify_curve_report>::new();
    let s = timed(
        || {
            format!(
                "bt_verify_curve_band({sh:?}, {dark:e}, {}, {counts_gain:e}, {counts_offset:e}, {lo_k:e}..{hi_k:e}, {samples})",
                band_args()
            )
        },
        || unsafe {
            bt_verify_curve_band(
                &sh,
                dark,
                the_band.ptr(),
                counts_gain,
                counts_offset,
                lo_k,
                hi_k,
                samples,
                cr.ptr(),
            )
        },
    );
    if s == bt_status::Ok {
        let r = cr.value;
        oracle(
            r.samples == samples
                && r.max_abs_error_k == r.worst_error_k.abs()
                && r.mean_error_k.abs() <= mean_bound(r.max_abs_error_k, samples)
                && r.worst_t_k >= lo_k
                && r.worst_t_k <= hi_k,
            || {
                format!(
                    "curve report {r:?}: {sh:?}, {}, {lo_k:e}..{hi_k:e}",
                    band_args()
                )
            },
        );
    } else {
        oracle(cr.untouched(), || {
            format!("bt_verify_curve_band wrote on {s:?}")
        });
    }

    // Round trips.
    for which in 0..2 {
        let mut rt = Poisoned::<bt_verify_round_trip_report>::new();
        let name = [
            "bt_verify_round_trip_band",
            "bt_verify_round_trip_sakuma_hattori",
        ][which];
        let s = timed(
            || {
                format!(
                    "{name}({}, {sh:?}, {dark:e}, {lo_k:e}..{hi_k:e}, {samples})",
                    band_args()
                )
            },
            || unsafe {
                if which == 0 {
                    bt_verify_round_trip_band(the_band.ptr(), lo_k, hi_k, samples, rt.ptr())
                } else {
                    bt_verify_round_trip_sakuma_hattori(&sh, dark, lo_k, hi_k, samples, rt.ptr())
                }
            },
        );
        if s != bt_status::Ok {
            oracle(rt.untouched(), || format!("{name} wrote on {s:?}"));
            continue;
        }
        let r = rt.value;
        oracle(
            r.samples == samples
                && r.max_abs_error_k == r.worst_error_k.abs()
                && r.worst_t_k >= lo_k
                && r.worst_t_k <= hi_k
                && (r.monotonic == 1 && r.first_non_monotonic_k == 0.0
                    || r.monotonic == 0
                        && r.first_non_monotonic_k >= lo_k
                        && r.first_non_monotonic_k <= hi_k),
            || {
                format!(
                    "{name} report {r:?}: {}, {sh:?}, {lo_k:e}..{hi_k:e}",
                    band_args()
                )
            },
        );
        // The band's inverse is Newton to below 1e-9 T on a forward integral of relative
        // accuracy 1e-12 (which moves T by 1e-12 T / n, n >= 1 the effective exponent of a
        // band radiance): "a round-trip error above a few 1e-9 T is a defect" (the
        // round-trip docs), so 3e-9 T at the range's top. The Sakuma-Hattori inverse is
        // closed form, its rounding set by the curve's conditioning: no bound here.
        if which == 0 {
            let tol = 3e-9 * hi_k;
            oracle(r.max_abs_error_k <= tol, || {
                format!(
                    "band round trip error {:e} K > {tol:e}: {r:?}, {}, {lo_k:e}..{hi_k:e}",
                    r.max_abs_error_k,
                    band_args()
                )
            });
        }
    }

    // Uncertainty from a covariance: a diagonal of plausible variances, or any.
    let covariance: [f64; 9] = if flags & 64 == 0 {
        let v = [
            d.f64(Kind::Uncertainty).powi(2) * 1e-6,
            d.f64(Kind::Uncertainty).powi(2) * 1e-2,
            (d.f64(Kind::Uncertainty) * sh.c.abs()).powi(2) * 1e-6,
        ];
        [v[0], 0.0, 0.0, 0.0, v[1], 0.0, 0.0, 0.0, v[2]]
    } else {
        core::array::from_fn(|_| d.f64(Kind::Signed))
    };
    let mut un = Poisoned::<bt_verify_uncertainty_report>::new();
    let s = timed(
        || {
            format!("bt_verify_uncertainty_sakuma_hattori({sh:?}, {covariance:?}, {lo_k:e}..{hi_k:e}, {samples})")
        },
        || unsafe {
            bt_verify_uncertainty_sakuma_hattori(
                &sh,
                covariance.as_ptr(),
                lo_k,
                hi_k,
                samples,
                un.ptr(),
            )
        },
    );
    if s == bt_status::Ok {
        let r = un.value;
        oracle(
            r.samples == samples
                && r.lo_u_k >= 0.0
                && r.hi_u_k >= 0.0
                && r.max_u_k >= r.lo_u_k
                && r.max_u_k >= r.hi_u_k
                && r.worst_t_k >= lo_k
                && r.worst_t_k <= hi_k,
            || format!("uncertainty {r:?}: {sh:?}, {covariance:?}, {lo_k:e}..{hi_k:e}"),
        );
    } else {
        oracle(un.untouched(), || format!("uncertainty wrote on {s:?}"));
    }

    // Frame tables: built here over a narrow physical range, then checked (with rows
    // altered on request).
    if flags & 128 == 0 {
        return;
    }
    let use_sh = flags & 256 == 256;
    let (t_lo, t_hi) = (250.0 + f64::from(d.u8()), 400.0 + 2.0 * f64::from(d.u8()));
    let tol_k = 10f64.powf(-3.0 + 2.0 * f64::from(d.u8()) / 255.0);
    let rails = bt_rails {
        dead_counts: 0,
        saturation_counts: u16::MAX,
    };
    let mut rows = Poisoned::<usize>::new();
    let s = unsafe {
        if use_sh {
            bt_frame_table_rows_sakuma_hattori(&sh, t_lo, t_hi, tol_k, rows.ptr())
        } else {
            bt_frame_table_rows_band(the_band.ptr(), t_lo, t_hi, tol_k, rows.ptr())
        }
    };
    // Each sample of the check is one exact inversion of the curve, and a tabulated band
    // can cost 220 us per inversion (a photon table from 1e-9 um walks ~700 one-unit
    // panels of c2/(lambda T) per evaluation: the tabulated quadrature's known cost, see
    // `bandtemp_fuzz::band`). The check takes rows x points per row + 2 samples, so at
    // most 62 rows and 64 samples keep the call near 15 ms.
    if s != bt_status::Ok || rows.value > 62 {
        return;
    }
    let mut table = vec![
        bt_frame_row {
            coefficients: [0.0; 4]
        };
        rows.value
    ];
    let sc = bandtemp_fuzz::scene_from([1.0, 295.0, 1.0, 295.0, 1.0, 0.0, 295.0, 295.0]);
    let mut conv = Poisoned::<bt_frame_converter>::new();
    let s = unsafe {
        if use_sh {
            bt_frame_converter_new_sakuma_hattori(
                &sh,
                &sc,
                0.0,
                &rails,
                t_lo,
                t_hi,
                tol_k,
                table.as_mut_ptr(),
                table.len(),
                conv.ptr(),
            )
        } else {
            bt_frame_converter_new_band(
                the_band.ptr(),
                &sc,
                1.0,
                0.0,
                &rails,
                t_lo,
                t_hi,
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
    let mut geometry = Poisoned::<bt_frame_geometry>::new();
    if unsafe {
        bt_frame_converter_geometry(conv.ptr(), table.as_ptr(), table.len(), geometry.ptr())
    } != bt_status::Ok
    {
        return;
    }
    let g = geometry.value;
    let altered = flags & 512 == 512;
    if altered && !table.is_empty() {
        for _ in 0..1 + d.len(3) {
            let row = d.len(table.len() - 1);
            let c = usize::from(d.u8() % 4);
            table[row].coefficients[c] = d.f32(Kind::Signed);
        }
    }
    // Valid counts stay small (see above); the invalid ones are refused before any
    // work (a valid 4096 per row over 62 rows is 2.5e5 exact inversions, a
    // cost the call documents as proportional to rows x points per row, not a defect).
    let points_per_row = if flags & 1024 == 0 {
        (1 + d.len(7)).min((62 / table.len().max(1)).max(1))
    } else {
        [0, 4097, usize::MAX, 1_000_001 / table.len().max(1) + 4097][d.len(3)]
    };
    let mut tr = Poisoned::<bt_verify_table_report>::new();
    let args = || {
        format!(
            "{}, {sh:?}, {t_lo:e}..{t_hi:e} tol {tol_k:e}, {} rows, {points_per_row} per row, altered {altered}",
            if use_sh { String::new() } else { band_args() },
            table.len()
        )
    };
    let s = timed(
        || format!("bt_verify_frame_table_*({})", args()),
        || unsafe {
            if use_sh {
                bt_verify_frame_table_sakuma_hattori(
                    &sh,
                    conv.ptr(),
                    table.as_ptr(),
                    table.len(),
                    points_per_row,
                    tr.ptr(),
                )
            } else {
                bt_verify_frame_table_band(
                    the_band.ptr(),
                    conv.ptr(),
                    table.as_ptr(),
                    table.len(),
                    points_per_row,
                    tr.ptr(),
                )
            }
        },
    );
    if s != bt_status::Ok {
        oracle(tr.untouched(), || {
            format!("verify_frame_table wrote on {s:?}")
        });
        oracle(
            altered || points_per_row == 0 || points_per_row > 4096,
            || format!("verify of a sound table refused: {s:?}: {}", args()),
        );
        return;
    }
    let r = tr.value;
    oracle(
        r.rows == table.len() && r.max_abs_error_k == r.worst_error_k.abs(),
        || format!("table report {r:?}: {}", args()),
    );
    if !altered {
        // The geometry promises every converted pixel within max_pixel_error_k of exact
        // inversion (the table's own f32 arithmetic included); the check compares at the
        // same f32 signal, so no signal rounding enters.
        oracle(
            r.refused == 0
                && r.non_monotonic == 0
                && r.max_abs_error_k <= g.max_pixel_error_k
                && r.claimed_max_error_k == g.max_table_error_k,
            || format!("sound table: {r:?}, geometry {g:?}: {}", args()),
        );
    }
});

/// The coverage report, computed independently: sort the clipped points, take the largest
/// difference of neighbours (the first, from below, on a tie).
fn coverage(t: &[f64], lo_k: f64, hi_k: f64) -> bt_verify_coverage_report {
    let t_min_k = t.iter().copied().fold(f64::INFINITY, f64::min);
    let t_max_k = t.iter().copied().fold(0.0, f64::max);
    let mut clipped: Vec<f64> = t.iter().map(|&v| v.max(lo_k).min(hi_k)).collect();
    clipped.sort_by(f64::total_cmp);
    clipped.dedup();
    let (mut largest_gap_k, mut gap_lo_k, mut gap_hi_k) = (0.0, lo_k, lo_k);
    for w in clipped.windows(2) {
        if w[1] - w[0] > largest_gap_k {
            (largest_gap_k, gap_lo_k, gap_hi_k) = (w[1] - w[0], w[0], w[1]);
        }
    }
    bt_verify_coverage_report {
        points: t.len(),
        points_in_range: t.iter().filter(|&&v| v >= lo_k && v <= hi_k).count(),
        t_min_k,
        t_max_k,
        extrapolated_below_k: (t_min_k - lo_k).max(0.0),
        extrapolated_above_k: (hi_k - t_max_k).max(0.0),
        largest_gap_k,
        gap_lo_k,
        gap_hi_k,
    }
}
