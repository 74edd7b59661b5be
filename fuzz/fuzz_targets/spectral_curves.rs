//! Spectral (non-grey) scenes, general calibration curves (Sakuma-Hattori in Planck or Wien
//! form behind a dark offset) and their fits, effective wavelengths and calibration
//! sensitivities, and the Wien model of a ratio pyrometer, through the C ABI. The first
//! byte picks a group of calls.
//!
//! Oracles: a success is finite where the docs promise a value; an error leaves every out
//! value untouched; round trips (spectral sensor radiance -> object temperature, curve
//! signal -> temperature, curve sensor signal -> object temperature, Wien signal ratio ->
//! temperature) give T back within a tolerance derived from each closed form's or solver's
//! documented accuracy and the conditioning at T; each call within the per-call limit
//! (`bt_curve_fit_band` within its own documented limit).
#![no_main]

use bandtemp::constants::C2_UMK;
use bandtemp_capi::*;
use bandtemp_fuzz::{
    band, checked, checked2, finite, oracle, scene, timed_with_limit, Dec, Kind, Poisoned,
    RawCurve, RawCurveFit,
};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let mut d = Dec::new(data);
    match d.u8() % 5 {
        0 => spectral(&mut d),
        1 => curves(&mut d),
        2 => curve_fits(&mut d),
        3 => effective(&mut d),
        _ => wien(&mut d),
    }
});

/// A table of up to 8 points: wavelengths (sorted or not) and values of `kind`.
fn table(d: &mut Dec<'_>) -> (Vec<f64>, Vec<f64>) {
    let n = d.len(8);
    let sorted = d.bool();
    let mut wl: Vec<f64> = (0..n).map(|_| d.f64(Kind::Um)).collect();
    let v: Vec<f64> = (0..n).map(|_| d.f64(Kind::Fraction)).collect();
    if sorted {
        wl.sort_by(f64::total_cmp);
    }
    (wl, v)
}

fn ptr_or_null(v: &[f64]) -> *const f64 {
    if v.is_empty() {
        core::ptr::null()
    } else {
        v.as_ptr()
    }
}

fn nan_to_inf(v: f64) -> f64 {
    if v.is_nan() {
        f64::INFINITY
    } else {
        v
    }
}

fn spectral(d: &mut Dec<'_>) {
    let b = band(d);
    let sc = scene(d);
    let (ewl, e) = table(d);
    let (twl, tv) = table(d);
    let t = d.f64(Kind::TempK);
    let any = d.f64(Kind::Magnitude);
    let apparent = d.f64(Kind::TempK);
    let tables = bt_spectral_tables {
        emissivity_um: ptr_or_null(&ewl),
        emissivity: ptr_or_null(&e),
        emissivity_len: ewl.len(),
        transmittance_um: ptr_or_null(&twl),
        transmittance: ptr_or_null(&tv),
        transmittance_len: twl.len(),
    };
    let args = || {
        format!(
            "band {:?} wl {:?} r {:?}, scene {sc:?}, e {ewl:?} {e:?}, ta {twl:?} {tv:?}, T {t:e} \
             S {any:e} Tapp {apparent:e}",
            b.raw, b.wl, b.r
        )
    };
    let positive = |name: &str, v: Option<f64>| {
        if let Some(v) = v {
            oracle(v.is_finite() && v > 0.0, || {
                format!("{name} {v:e}: {}", args())
            });
        }
        v
    };
    let signal = positive(
        "bt_spectral_sensor_radiance",
        checked("bt_spectral_sensor_radiance", &args, |o| unsafe {
            bt_spectral_sensor_radiance(b.ptr(), &sc, &tables, t, o)
        }),
    );
    positive(
        "bt_spectral_object_temperature",
        checked("bt_spectral_object_temperature", &args, |o| unsafe {
            bt_spectral_object_temperature(b.ptr(), &sc, &tables, any, o)
        }),
    );
    positive(
        "bt_spectral_object_temperature_from_apparent",
        checked(
            "bt_spectral_object_temperature_from_apparent",
            &args,
            |o| unsafe {
                bt_spectral_object_temperature_from_apparent(b.ptr(), &sc, &tables, apparent, o)
            },
        ),
    );
    let Some(signal) = signal else { return };
    let back = positive(
        "bt_spectral_object_temperature",
        checked("bt_spectral_object_temperature", &args, |o| unsafe {
            bt_spectral_object_temperature(b.ptr(), &sc, &tables, signal, o)
        }),
    );
    if let Some(back) = back {
        // Tolerance: the solver's documented 1e-9 T margin as in the scene target (it
        // promises about 1e-12 T of the tabulated equation's solution), plus S's 1e-12
        // relative error (quadrature below 1e-13, the sum of the terms and the background
        // subtraction) over dS/dT = tw * integral r ta e dL/dT. That slope is bounded
        // below by tw min(ta e) L'(T) with no useful bound when a table has a zero, so it
        // is estimated by a central difference at T (1 +- 1e-4); a difference quotient of
        // a smooth function is within a few parts in 1e8 of the slope there, and the
        // factor 2 covers the case where it is not (kinks of the tables' interpolants
        // inside the step), so the slope used is never overstated by more than 2x.
        let h = 1e-4 * t;
        let at = |x: f64| {
            let mut o = Poisoned::<f64>::new();
            (unsafe { bt_spectral_sensor_radiance(b.ptr(), &sc, &tables, x, o.ptr()) }
                == bt_status::Ok)
                .then_some(o.value)
        };
        let slope = match (at(t + h), at(t - h)) {
            (Some(hi), Some(lo)) => (hi - lo) / (2.0 * h),
            _ => 0.0,
        };
        let tol = 1e-9 * t + nan_to_inf(2.0 * 1e-12 * signal / slope);
        let err = (back - t).abs();
        oracle(err <= tol, || {
            format!(
                "spectral T {t:e} -> S {signal:e} -> T {back:e}: error {err:e} > {tol:e}: {}",
                args()
            )
        });
    }
}

/// A curve: a form integer (mostly 0 or 1) and its parameters.
fn curve(d: &mut Dec<'_>) -> RawCurve {
    let form = match d.u8() % 8 {
        0..=3 => 0,
        4..=6 => 1,
        _ => d.u32(),
    };
    // A near an effective wavelength, B small against A T, C any magnitude, the offset
    // zero or of either sign.
    let a_um = d.f64(Kind::Um);
    let b_umk = d.f64(Kind::Signed) * 1e-4;
    let c = d.f64(Kind::Magnitude);
    let offset = if d.bool() { 0.0 } else { d.f64(Kind::Signed) };
    RawCurve {
        form,
        a_um,
        b_umk,
        c,
        offset,
    }
}

/// S_c and its logarithmic slope g = d ln S_c / d ln T at T, closed form: with
/// x = c2/(A T + B), S_c = C/(e^x - 1) (Planck) or C e^-x (Wien), and
/// g = x (A T/(A T + B)) times e^x/(e^x - 1) (Planck) or 1 (Wien). A change dS of the
/// signal moves T by T dS / (S_c g). Kept in this form because dS_c/dT itself overflows
/// for extreme curves (A = 1e308 at T = 1e-300 gives 1e334 per K, which as infinity made
/// the tolerance 0).
fn curve_log_slope(c: &RawCurve, t: f64) -> (f64, f64) {
    let at = c.a_um * t;
    let den = at + c.b_umk;
    let x = C2_UMK / den;
    let sc = if c.form == 0 {
        c.c / x.exp_m1()
    } else {
        c.c * (-x).exp()
    };
    let factor = if c.form == 0 {
        1.0 / (-(-x).exp_m1())
    } else {
        1.0
    };
    (sc, x * (at / den) * factor)
}

fn curves(d: &mut Dec<'_>) {
    let cv = curve(d);
    let sc = scene(d);
    let t = d.f64(Kind::TempK);
    let any = d.f64(Kind::Magnitude);
    let args = || format!("curve {cv:?}, scene {sc:?}, T {t:e}, S {any:e}");
    let eps = f64::EPSILON;

    let signal = checked("bt_curve_signal", &args, |o| unsafe {
        bt_curve_signal(cv.ptr(), t, o)
    });
    if let Some(s) = signal {
        // S = offset + S_c rounds: an S_c below half an ulp of the offset vanishes in the sum
        // (the docs promise only that S_c itself does not underflow), so S >= offset.
        oracle(s.is_finite() && s >= cv.offset, || {
            format!("curve signal {s:e}: {}", args())
        });
    }
    if let Some(v) = checked("bt_curve_temperature", &args, |o| unsafe {
        bt_curve_temperature(cv.ptr(), any, o)
    }) {
        oracle(v.is_finite() && v > 0.0, || {
            format!("curve T {v:e}: {}", args())
        });
    }
    if let Some(s) = signal {
        if let Some(back) = checked("bt_curve_temperature", &args, |o| unsafe {
            bt_curve_temperature(cv.ptr(), s, o)
        }) {
            // Both directions are closed forms accurate to a few ulp (documented). S =
            // offset + S_c carries 8 ulp of max(|S|, |offset|) absolutely, which the
            // inverse's S - offset exposes: 8 eps (|S| + |offset|) / (dS_c/dT) in T. The
            // inverse's c2/ln(..) - B loses 8 ulp of |A T| + |B|, divided by A; and the
            // result itself rounds to 8 ulp of T.
            let (sc, g) = curve_log_slope(&cv, t);
            let tol = 8.0 * eps * t
                + 8.0 * eps * (cv.a_um * t).abs().max(cv.b_umk.abs()) * 2.0 / cv.a_um.abs()
                + nan_to_inf(t * (8.0 * eps * (s.abs() + cv.offset.abs()) / sc) / g);
            let err = (back - t).abs();
            oracle(back.is_finite() && err <= tol, || {
                format!(
                    "curve T {t:e} -> S {s:e} -> T {back:e}: error {err:e} > {tol:e}: {}",
                    args()
                )
            });
        }
    }

    let sensor = checked("bt_curve_sensor_signal", &args, |o| unsafe {
        bt_curve_sensor_signal(cv.ptr(), &sc, t, o)
    });
    if let Some(s) = sensor {
        oracle(s.is_finite(), || {
            format!("curve sensor signal {s:e}: {}", args())
        });
    }
    if let Some(v) = checked("bt_curve_object_temperature", &args, |o| unsafe {
        bt_curve_object_temperature(cv.ptr(), &sc, any, o)
    }) {
        oracle(v.is_finite() && v > 0.0, || {
            format!("curve object T {v:e}: {}", args())
        });
    }
    if let Some(s) = sensor {
        if let Some(back) = checked("bt_curve_object_temperature", &args, |o| unsafe {
            bt_curve_object_temperature(cv.ptr(), &sc, s, o)
        }) {
            // As the scene target: 1e-9 T (the solver's documented 1e-12 T with margin),
            // plus S's 1e-12 relative error (the weighted sum of five curve values and the
            // subtraction of the background; the offset enters S once and is subtracted
            // again, so |S| + |offset| is the magnitude that error scales with) over the
            // object term's slope G dS_c/dT = G S_c g_l / T, G = tw ta e, g_l the
            // logarithmic slope (see `curve_log_slope`).
            let g = sc.window_transmittance * sc.atm_transmittance * sc.emissivity;
            let (sc, gl) = curve_log_slope(&cv, t);
            let tol =
                1e-9 * t + nan_to_inf(t * (1e-12 * (s.abs() + cv.offset.abs()) / (g * sc)) / gl);
            let err = (back - t).abs();
            oracle(err <= tol, || {
                format!(
                    "curve object T {t:e} -> S {s:e} -> T {back:e}: error {err:e} > {tol:e}: {}",
                    args()
                )
            });
        }
    }
}

fn curve_fits(d: &mut Dec<'_>) {
    let form = match d.u8() % 8 {
        0..=3 => 0,
        4..=6 => 1,
        _ => d.u32() as i32,
    };
    // Points: up to 8 (the fit is Levenberg-Marquardt over n points), from a curve or any.
    let n = d.len(8);
    let truth = curve(d);
    let from_curve = d.bool();
    let mut t: Vec<f64> = (0..n).map(|_| d.f64(Kind::TempK)).collect();
    t.sort_by(f64::total_cmp);
    let s: Vec<f64> = t
        .iter()
        .map(|&tk| {
            let mut o = Poisoned::<f64>::new();
            if from_curve && unsafe { bt_curve_signal(truth.ptr(), tk, o.ptr()) } == bt_status::Ok {
                o.value
            } else {
                d.f64(Kind::Magnitude)
            }
        })
        .collect();
    let with_u = d.bool();
    let u: Vec<f64> = (0..n)
        .map(|i| d.f64(Kind::Uncertainty) * s[i].abs().min(1e300) * 1e-3)
        .collect();
    let dark = if from_curve {
        truth.offset
    } else {
        d.f64(Kind::Signed)
    };
    let args = || format!("form {form} T {t:?} S {s:?} u {u:?} (used {with_u}) dark {dark:e}");
    let up = if with_u && n > 0 {
        u.as_ptr()
    } else {
        core::ptr::null()
    };
    if let Some(f) = checked::<RawCurveFit>("bt_curve_fit_points", &args, |o| unsafe {
        bt_curve_fit_points(
            form,
            ptr_or_null(&t),
            ptr_or_null(&s),
            up,
            n,
            dark,
            o.cast::<bt_curve_fit>(),
        )
    }) {
        let c = f.curve;
        // Documented: with exactly three points and no uncertainties every covariance
        // entry is NaN (no degrees of freedom for the scatter).
        let cov_ok = (n == 3 && !with_u) || finite(f.covariance.as_flattened());
        oracle(
            i64::from(c.form) == i64::from(form)
                && finite(&[
                    c.a_um,
                    c.b_umk,
                    c.c,
                    c.offset,
                    f.max_residual_k,
                    f.rms_residual_k,
                ])
                && c.offset.to_bits() == dark.to_bits()
                && f.max_residual_k >= 0.0
                && f.rms_residual_k >= 0.0
                && f.rms_residual_k <= f.max_residual_k * (1.0 + 1e-12)
                && cov_ok,
            || format!("curve fit {f:?}: {}", args()),
        );
    }

    let b = band(d);
    let t_lo = d.f64(Kind::TempK);
    let t_hi = d.f64(Kind::TempK);
    let bargs = || {
        format!(
            "form {form}, band {:?} wl {:?} r {:?}, {t_lo:e}..{t_hi:e}",
            b.raw, b.wl, b.r
        )
    };
    // Known cost: the fit is checked against 2001 exact band radiances, about 30 ms for a
    // rectangular band in a release build, 73 ms with a tabulated response (the
    // calibration target's `bt_sakuma_hattori_fit_band`, the same work): 4x the per-call
    // limit for a rectangular band (200 ms in the campaign, 1 s under the sanitizer),
    // and the known-slow limit for a tabulated one as the calibration target does.
    let limit = if b.raw.response_len > 0 {
        bandtemp_fuzz::known_slow_limit_ms()
    } else {
        4.0 * bandtemp_fuzz::call_limit_ms()
    };
    let mut out = Poisoned::<RawCurve>::new();
    let mut max_err = Poisoned::<f64>::new();
    let st = timed_with_limit(
        limit,
        || format!("bt_curve_fit_band({})", bargs()),
        || unsafe {
            bt_curve_fit_band(
                form,
                b.ptr(),
                t_lo,
                t_hi,
                out.ptr().cast::<bt_curve>(),
                max_err.ptr(),
            )
        },
    );
    if st != bt_status::Ok {
        oracle(out.untouched() && max_err.untouched(), || {
            format!("bt_curve_fit_band wrote on {st:?}: {}", bargs())
        });
        return;
    }
    let c = out.value;
    oracle(
        i64::from(c.form) == i64::from(form)
            && finite(&[c.a_um, c.b_umk, c.c, max_err.value])
            && c.a_um > 0.0
            && c.c > 0.0
            && c.offset == 0.0
            && max_err.value >= 0.0,
        || format!("fit_band gave {c:?} max {:e}: {}", max_err.value, bargs()),
    );
}

fn effective(d: &mut Dec<'_>) {
    let b = band(d);
    let t1 = d.f64(Kind::TempK);
    let t2 = d.f64(Kind::TempK);
    let t = d.f64(Kind::TempK);
    let lambda = d.f64(Kind::Um);
    let mean = d.f64(Kind::Um);
    let var = d.f64(Kind::Uncertainty);
    let args = || {
        format!(
            "band {:?} wl {:?} r {:?}, T1 {t1:e} T2 {t2:e} T {t:e} lambda {lambda:e} mean \
             {mean:e} var {var:e}",
            b.raw, b.wl, b.r
        )
    };
    if let Some((a, bb)) =
        checked2::<f64, f64>("bt_sakuma_hattori_from_moments", &args, |a, bb| unsafe {
            bt_sakuma_hattori_from_moments(b.ptr(), a, bb)
        })
    {
        // B = c2 sigma^2 / (2 lambda0^2) >= 0; A may be of either sign for a wide band.
        oracle(finite(&[a, bb]) && bb >= 0.0, || {
            format!("moments A {a:e} B {bb:e}: {}", args())
        });
    }
    for (name, v) in [
        (
            "bt_mean_effective_wavelength_um",
            checked("bt_mean_effective_wavelength_um", &args, |o| unsafe {
                bt_mean_effective_wavelength_um(b.ptr(), t1, t2, o)
            }),
        ),
        (
            "bt_limit_effective_wavelength_um",
            checked("bt_limit_effective_wavelength_um", &args, |o| unsafe {
                bt_limit_effective_wavelength_um(b.ptr(), t, o)
            }),
        ),
    ] {
        if let Some(v) = v {
            // L(T) rises with T in every band, so 1/lambda > 0.
            oracle(v.is_finite() && v > 0.0, || {
                format!("{name} {v:e}: {}", args())
            });
        }
    }
    if let Some(v) = checked("bt_one_point_wavelength_sensitivity", &args, |o| unsafe {
        bt_one_point_wavelength_sensitivity(lambda, t1, t, o)
    }) {
        oracle(v.is_finite(), || {
            format!("one-point sensitivity {v:e}: {}", args())
        });
    }
    if let Some(v) = checked("bt_two_point_sigma_sensitivity", &args, |o| unsafe {
        bt_two_point_sigma_sensitivity(mean, var, t1, t2, t, o)
    }) {
        oracle(v.is_finite(), || {
            format!("two-point sensitivity {v:e}: {}", args())
        });
    }
}

fn wien(d: &mut Dec<'_>) {
    let b1 = band(d);
    let b2 = band(d);
    let own = bt_wien_ratio {
        lambda1_um: d.f64(Kind::Um),
        lambda2_um: d.f64(Kind::Um),
        prefactor: d.f64(Kind::Magnitude),
    };
    let use_bands = d.bool();
    let t = d.f64(Kind::TempK);
    let kappa = if d.bool() {
        1.0
    } else {
        d.f64(Kind::Fraction) * 2.0
    };
    let any_ratio = d.f64(Kind::Magnitude);
    let t_grey = d.f64(Kind::TempK);
    let args = || {
        format!(
            "band1 {:?} {:?} {:?}, band2 {:?} {:?} {:?}, own {own:?}, T {t:e} kappa {kappa:e} \
             R {any_ratio:e} Tgrey {t_grey:e}",
            b1.raw, b1.wl, b1.r, b2.raw, b2.wl, b2.r
        )
    };
    let from_bands = checked::<bt_wien_ratio>("bt_wien_ratio_from_bands", &args, |o| unsafe {
        bt_wien_ratio_from_bands(b1.ptr(), b2.ptr(), o)
    });
    if let Some(m) = from_bands {
        oracle(
            finite(&[m.lambda1_um, m.lambda2_um, m.prefactor])
                && m.lambda1_um > 0.0
                && m.lambda2_um > 0.0
                && m.lambda1_um != m.lambda2_um
                && m.prefactor > 0.0,
            || format!("Wien model {m:?}: {}", args()),
        );
    }
    let m = match from_bands {
        Some(m) if use_bands => m,
        _ => own,
    };
    let margs = || format!("model {m:?}: {}", args());
    let ratio = checked("bt_wien_ratio_signal_ratio", &margs, |o| unsafe {
        bt_wien_ratio_signal_ratio(&m, t, kappa, o)
    });
    if let Some(r) = ratio {
        oracle(r.is_normal() && r > 0.0, || {
            format!("ratio {r:e}: {}", margs())
        });
    }
    if let Some(v) = checked("bt_wien_ratio_temperature", &margs, |o| unsafe {
        bt_wien_ratio_temperature(&m, any_ratio, kappa, o)
    }) {
        oracle(v.is_finite() && v > 0.0, || {
            format!("Wien T {v:e}: {}", margs())
        });
    }
    if let Some(v) = checked("bt_wien_ratio_correct_grey", &margs, |o| unsafe {
        bt_wien_ratio_correct_grey(&m, t_grey, kappa, o)
    }) {
        oracle(v.is_finite() && v > 0.0, || {
            format!("grey-corrected T {v:e}: {}", margs())
        });
    }
    let Some(r) = ratio else { return };
    if let Some(back) = checked("bt_wien_ratio_temperature", &margs, |o| unsafe {
        bt_wien_ratio_temperature(&m, r, kappa, o)
    }) {
        // Forward R = kappa W exp(-y), y = c2/(lambda_R T): the exponent rounds to ulps of
        // |y| and exp passes that on as a relative error of R, eps (|y| + 4). The inverse
        // ln(kappa W / R) then errs absolutely by eps (|y| + |ln(kappa W)| + |ln R| + 4)
        // (the quotient's rounding, or the two logarithms' if taken apart), which is that
        // over y relative to 1/T, hence to T; plus 4 ulp for the final division and
        // 1/lambda_R. Each eps taken 4x for the few ulp of each step ("a few ulp",
        // documented).
        let inv_lr = 1.0 / m.lambda1_um - 1.0 / m.lambda2_um;
        let y = (C2_UMK * inv_lr / t).abs();
        let kw = (kappa * m.prefactor).ln().abs();
        let eps = 4.0 * f64::EPSILON;
        let rel = eps * (y + kw + r.ln().abs() + 4.0) / y + eps * 4.0;
        let tol = nan_to_inf(rel * t);
        let err = (back - t).abs();
        oracle(err <= tol, || {
            format!(
                "Wien T {t:e} -> R {r:e} -> T {back:e}: error {err:e} > {tol:e}: {}",
                margs()
            )
        });
    }
}
