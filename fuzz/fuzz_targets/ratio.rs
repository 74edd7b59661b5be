//! Two-colour (ratio) pyrometry through the C ABI: any two bands, any range, any signals
//! and emissivity ratio.
//!
//! Oracles: a success is finite and inside [t_min_k, t_max_k] (to 1e-12 T); an error leaves the out
//! value untouched; signals made from the bands' own radiances at T (scaled by one common
//! factor and by the emissivity ratio) give T back within 1e-9 T; each call within the
//! per-call limit.
#![no_main]

use bandtemp_capi::*;
use bandtemp_fuzz::{band, oracle, timed, Dec, Kind, Poisoned};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let mut d = Dec::new(data);
    let b1 = band(&mut d);
    let b2 = band(&mut d);
    let t_min = d.f64(Kind::TempK);
    let t_max = d.f64(Kind::TempK);
    let s1 = d.f64(Kind::Magnitude);
    let s2 = d.f64(Kind::Magnitude);
    let kappa = if d.bool() { 1.0 } else { d.f64(Kind::Fraction) };
    let t = d.f64(Kind::TempK);
    let scale = d.f64(Kind::Magnitude);
    let args = || {
        format!(
            "band1 {:?} {:?} {:?}, band2 {:?} {:?} {:?}, range {t_min:e}..{t_max:e}, kappa {kappa:e}",
            b1.raw, b1.wl, b1.r, b2.raw, b2.wl, b2.r
        )
    };
    let run = |x1: f64, x2: f64, k: f64| {
        let mut out = Poisoned::<f64>::new();
        let s = timed(
            || format!("bt_ratio_temperature({}, S {x1:e} {x2:e}, k {k:e})", args()),
            || unsafe {
                bt_ratio_temperature(b1.ptr(), b2.ptr(), t_min, t_max, x1, x2, k, out.ptr())
            },
        );
        if s == bt_status::Ok {
            let v = out.value;
            // Within the documented accuracy (|dT/T| < 1e-12) of the range's ends.
            oracle(
                v.is_finite() && v >= t_min * (1.0 - 1e-12) && v <= t_max * (1.0 + 1e-12),
                || {
                    format!(
                        "ratio temperature {v:e} outside the range: {}, S {x1:e} {x2:e}",
                        args()
                    )
                },
            );
        } else {
            oracle(out.untouched(), || {
                format!("bt_ratio_temperature wrote on {s:?}: {}", args())
            });
        }
        (s, out.value)
    };
    run(s1, s2, kappa);

    // Round trip: the bands' radiances at T, scaled by one factor, with kappa on band 1.
    if !(t >= t_min && t <= t_max) {
        return;
    }
    let (mut l1, mut l2) = (Poisoned::<f64>::new(), Poisoned::<f64>::new());
    if unsafe { bt_band_radiance(b1.ptr(), t, l1.ptr()) } != bt_status::Ok
        || unsafe { bt_band_radiance(b2.ptr(), t, l2.ptr()) } != bt_status::Ok
    {
        return;
    }
    let (x1, x2) = (l1.value * kappa * scale, l2.value * scale);
    if !(x1.is_normal() && x2.is_normal()) {
        return;
    }
    let (s, back) = run(x1, x2, kappa);
    if s == bt_status::Ok {
        let err = (back - t).abs();
        oracle(err <= 1e-9 * t, || {
            format!(
                "round trip T {t:e} -> T {back:e} (error {err:e}): {}",
                args()
            )
        });
    }
});
