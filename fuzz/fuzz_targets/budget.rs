//! Uncertainty budgets: `bt_surface_budget` through the C ABI over any band, scene, signal
//! and input uncertainties, and the Rust `uncertainty::combine` with any inputs and
//! correlation matrices (not in the C ABI).
//!
//! Oracles: successes finite; errors leave the out value untouched; the budget's estimate
//! is `bt_object_temperature` of the signal bit for bit; 11 lines ranked largest first,
//! lines past `len` zero; u_c^2 = sum of squared contributions (uncorrelated) within
//! 1e-12; the variance shares sum to 1 (or are all 0 when u_c = 0); each call within the
//! per-call limit.
#![no_main]

use bandtemp::uncertainty::{combine, Input, MAX_INPUTS};
use bandtemp_capi::*;
use bandtemp_fuzz::{band, bytes_of, finite, oracle, scene, timed, Dec, Kind, Poisoned};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let mut d = Dec::new(data);
    if d.bool() {
        surface(&mut d);
    } else {
        combined(&mut d);
    }
});

fn surface(d: &mut Dec<'_>) {
    let b = band(d);
    let sc = scene(d);
    let t = d.f64(Kind::TempK);
    // A signal from a temperature (the physical case) or any signal.
    let signal = if d.bool() {
        let mut s = Poisoned::<f64>::new();
        if unsafe { bt_sensor_radiance(b.ptr(), &sc, t, s.ptr()) } != bt_status::Ok {
            return;
        }
        s.value
    } else {
        d.f64(Kind::Magnitude)
    };
    let mut f = [0.0; 11];
    let all_hostile = d.bool();
    for v in &mut f {
        *v = if all_hostile || d.u8().is_multiple_of(8) {
            d.f64(Kind::Uncertainty)
        } else {
            1e-3 * f64::from(d.u8())
        };
    }
    let u = bt_input_uncertainties {
        signal: f[0] * signal,
        calibration_k: f[1],
        calibration_signal: f[2] * signal,
        emissivity: f[3] * 0.1,
        reflected_k: f[4],
        atm_transmittance: f[5] * 0.1,
        atm_k: f[6],
        window_transmittance: f[7] * 0.1,
        window_reflectance: f[8] * 0.1,
        window_k: f[9],
        window_reflected_k: f[10],
    };
    let args = || {
        format!(
            "band {:?} {:?} {:?}, scene {sc:?}, S {signal:e}, u {u:?}",
            b.raw, b.wl, b.r
        )
    };
    let mut out = Poisoned::<bt_budget>::new();
    let s = timed(
        || format!("bt_surface_budget({})", args()),
        || unsafe { bt_surface_budget(b.ptr(), &sc, signal, &u, out.ptr()) },
    );
    if s != bt_status::Ok {
        oracle(out.untouched(), || {
            format!("bt_surface_budget wrote on {s:?}: {}", args())
        });
        return;
    }
    let bud = out.value;
    let mut t_obj = Poisoned::<f64>::new();
    let so = unsafe { bt_object_temperature(b.ptr(), &sc, signal, t_obj.ptr()) };
    oracle(
        so == bt_status::Ok && t_obj.value.to_bits() == bud.estimate_k.to_bits(),
        || {
            format!(
                "budget estimate {} vs object temperature {so:?} {}: {}",
                bud.estimate_k,
                t_obj.value,
                args()
            )
        },
    );
    let uc = bud.combined_standard_uncertainty_k;
    oracle(
        bud.len == 11 && finite(&[bud.estimate_k, uc]) && uc >= 0.0,
        || format!("budget {bud:?}: {}", args()),
    );
    let lines = &bud.ranked[..bud.len.min(BT_BUDGET_MAX_LINES)];
    let mut sum_sq = 0.0;
    let mut share = 0.0;
    for (i, l) in lines.iter().enumerate() {
        oracle(
            finite(&[
                l.standard_uncertainty,
                l.sensitivity,
                l.contribution_k,
                l.variance_share,
            ]) && l.index < 11,
            || format!("line {i} {l:?}: {}", args()),
        );
        if let Some(next) = lines.get(i + 1) {
            oracle(l.contribution_k >= next.contribution_k, || {
                format!("lines {i} and {} out of order: {bud:?}", i + 1)
            });
        }
        sum_sq += l.contribution_k * l.contribution_k;
        share += l.variance_share;
    }
    for l in &bud.ranked[bud.len.min(BT_BUDGET_MAX_LINES)..] {
        oracle(bytes_of(l).iter().all(|&x| x == 0), || {
            format!("unused line not zero: {bud:?}")
        });
    }
    oracle(
        (uc * uc - sum_sq).abs() <= 1e-12 * sum_sq.max(f64::MIN_POSITIVE)
            || (uc == 0.0 && sum_sq == 0.0),
        || format!("u_c^2 {:e} vs sum {sum_sq:e}: {}", uc * uc, args()),
    );
    oracle(
        if uc > 0.0 {
            (share - 1.0).abs() <= 1e-12
        } else {
            share == 0.0
        },
        || format!("shares sum to {share}: {bud:?}: {}", args()),
    );
}

fn combined(d: &mut Dec<'_>) {
    let n = d.len(MAX_INPUTS + 2);
    let estimate = d.f64(Kind::TempK);
    let inputs: Vec<Input> = (0..n)
        .map(|_| Input::new("x", d.f64(Kind::Uncertainty), d.f64(Kind::Signed)))
        .collect();
    let corr_mode = d.u8() % 4;
    let corr: Option<Vec<f64>> = match corr_mode {
        0 | 1 => None,
        2 => {
            // A symmetric matrix with unit diagonal and decoded off-diagonal entries.
            let mut m = vec![0.0; n * n];
            for i in 0..n {
                m[i * n + i] = 1.0;
                for j in 0..i {
                    let r = if d.bool() {
                        -1.0 + 2.0 * f64::from(d.u8()) / 255.0
                    } else {
                        d.f64(Kind::Fraction)
                    };
                    m[i * n + j] = r;
                    m[j * n + i] = r;
                }
            }
            Some(m)
        }
        _ => Some(
            (0..d.len(n * n + 1))
                .map(|_| d.f64(Kind::Fraction))
                .collect(),
        ),
    };
    let args = || format!("estimate {estimate:e}, inputs {inputs:?}, correlations {corr:?}");
    let r = timed(
        || format!("combine({})", args()),
        || combine(estimate, &inputs, corr.as_deref()),
    );
    if let Ok(b) = r {
        let uc = b.combined_standard_uncertainty;
        oracle(
            b.len == n
                && finite(&[b.estimate, uc])
                && uc >= 0.0
                && b.estimate.to_bits() == estimate.to_bits(),
            || format!("budget {b:?}: {}", args()),
        );
        let mut share = 0.0;
        for (i, l) in b.entries().iter().enumerate() {
            oracle(
                finite(&[l.contribution, l.variance_share]) && l.contribution >= 0.0,
                || format!("line {i}: {b:?}: {}", args()),
            );
            share += l.variance_share;
            if let Some(next) = b.entries().get(i + 1) {
                oracle(l.contribution >= next.contribution, || {
                    format!("out of order: {b:?}")
                });
            }
        }
        oracle(
            if uc > 0.0 {
                (share - 1.0).abs() <= 1e-9
            } else {
                share == 0.0
            },
            || format!("shares sum to {share}: {b:?}: {}", args()),
        );
        if corr.is_none() {
            let sum_sq: f64 = b
                .entries()
                .iter()
                .map(|l| l.contribution * l.contribution)
                .sum();
            oracle(
                (uc * uc - sum_sq).abs() <= 1e-12 * sum_sq || (uc == 0.0 && sum_sq == 0.0),
                || format!("u_c^2 {:e} vs {sum_sq:e}: {}", uc * uc, args()),
            );
        }
        let k = d.f64(Kind::Magnitude);
        if let Ok(big_u) = b.expanded_uncertainty(k) {
            oracle(big_u.is_finite() && big_u >= 0.0, || {
                format!("U = {big_u:e} for k {k:e}: {b:?}")
            });
        }
    }
}
