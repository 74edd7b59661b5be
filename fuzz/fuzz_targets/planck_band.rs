//! Planck's law and band integrals through the C ABI: the spectral laws, the blackbody
//! fraction, band radiance, its derivative and its inversion, for rectangular and
//! tabulated responses of any content and any detector integer.
//!
//! Oracles: successes finite (and non-negative, fractions in [0, 1]); errors leave the out
//! value untouched; band radiance -> inversion -> the same T within 1e-9 T wherever T is
//! inside the solver's range and the radiance is a normal double; each call within the
//! per-call limit.
#![no_main]

use bandtemp_capi::*;
use bandtemp_fuzz::{band, finite, oracle, timed, Dec, Kind, Poisoned};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let mut d = Dec::new(data);
    let op = d.u8();
    let x = d.f64(Kind::Um);
    let t = d.f64(if op & 0x10 == 0 {
        Kind::TempK
    } else {
        Kind::WideTempK
    });

    // The spectral laws, each with the same checks.
    type Spectral = unsafe extern "C" fn(f64, f64, *mut f64) -> bt_status;
    let spectral: [(&str, Spectral); 2] = [
        ("bt_spectral_radiance", bt_spectral_radiance),
        ("bt_spectral_photon_radiance", bt_spectral_photon_radiance),
    ];
    for (name, f) in spectral {
        let mut out = Poisoned::<f64>::new();
        let s = timed(
            || format!("{name}({x:e}, {t:e})"),
            || unsafe { f(x, t, out.ptr()) },
        );
        check_value(name, s, &out, |v| v >= 0.0, || format!("({x:e}, {t:e})"));
    }
    let lt = x * t;
    let mut out = Poisoned::<f64>::new();
    let s = timed(
        || format!("bt_blackbody_fraction({lt:e})"),
        || unsafe { bt_blackbody_fraction(lt, out.ptr()) },
    );
    check_value(
        "bt_blackbody_fraction",
        s,
        &out,
        |v| (0.0..=1.0).contains(&v),
        || format!("{lt:e}"),
    );
    if s == bt_status::Ok {
        // F is non-decreasing in lambda*T.
        let mut up = Poisoned::<f64>::new();
        let lt2 = lt * 1.001;
        if unsafe { bt_blackbody_fraction(lt2, up.ptr()) } == bt_status::Ok {
            oracle(up.value >= out.value * (1.0 - 1e-15), || {
                format!("F({lt2:e}) = {} < F({lt:e}) = {}", up.value, out.value)
            });
        }
    }
    for (name, f) in [
        (
            "bt_peak_wavelength_um",
            bt_peak_wavelength_um as unsafe extern "C" fn(f64, *mut f64) -> bt_status,
        ),
        ("bt_total_radiance", bt_total_radiance),
    ] {
        let mut out = Poisoned::<f64>::new();
        let s = timed(|| format!("{name}({t:e})"), || unsafe { f(t, out.ptr()) });
        check_value(name, s, &out, |v| v > 0.0, || format!("{t:e}"));
    }

    // Bands.
    let b = band(&mut d);
    let args = || format!("band {:?} wl {:?} r {:?}, T {t:e}", b.raw, b.wl, b.r);
    let mut l = Poisoned::<f64>::new();
    let s = timed(
        || format!("bt_band_radiance({})", args()),
        || unsafe { bt_band_radiance(b.ptr(), t, l.ptr()) },
    );
    check_value("bt_band_radiance", s, &l, |v| v >= 0.0, args);
    let mut dl = Poisoned::<f64>::new();
    let sd = timed(
        || format!("bt_band_radiance_derivative({})", args()),
        || unsafe { bt_band_radiance_derivative(b.ptr(), t, dl.ptr()) },
    );
    check_value("bt_band_radiance_derivative", sd, &dl, |v| v >= 0.0, args);
    oracle(s == sd || s != bt_status::Ok && sd != bt_status::Ok, || {
        format!("radiance {s:?} but derivative {sd:?}: {}", args())
    });

    // The round trip: L(T) -> T.
    if s == bt_status::Ok {
        let radiance = l.value;
        let mut back = Poisoned::<f64>::new();
        let st = timed(
            || format!("bt_band_temperature({}, L {radiance:e})", args()),
            || unsafe { bt_band_temperature(b.ptr(), radiance, back.ptr()) },
        );
        check_value("bt_band_temperature", st, &back, |v| v > 0.0, args);
        let invertible = radiance >= f64::MIN_POSITIVE
            // The solver treats T within 1e-9 T of its limits as out of range (by design).
            && t > bandtemp::band::SOLVER_MIN_K * (1.0 + 1e-6)
            && t < bandtemp::band::SOLVER_MAX_K * (1.0 - 1e-6)
            && sd == bt_status::Ok
            && dl.value >= f64::MIN_POSITIVE;
        if invertible {
            oracle(st == bt_status::Ok, || {
                format!("L(T) = {radiance:e} does not invert ({st:?}): {}", args())
            });
        }
        if st == bt_status::Ok && invertible {
            let err = (back.value - t).abs();
            oracle(err <= 1e-9 * t, || {
                format!(
                    "round trip T {t:e} -> L {radiance:e} -> T {:e} (error {err:e}): {}",
                    back.value,
                    args()
                )
            });
        }
    }

    // Inversion of any radiance.
    let any_l = d.f64(Kind::Magnitude);
    let mut out = Poisoned::<f64>::new();
    let s = timed(
        || format!("bt_band_temperature({}, L {any_l:e})", args()),
        || unsafe { bt_band_temperature(b.ptr(), any_l, out.ptr()) },
    );
    check_value(
        "bt_band_temperature",
        s,
        &out,
        |v| v > 0.0,
        || format!("L {any_l:e}, {}", args()),
    );
    if s == bt_status::Ok {
        // Forward again: L(T(L)) = L within the conditioning of the inversion.
        let mut fwd = Poisoned::<f64>::new();
        let mut slope = Poisoned::<f64>::new();
        let tk = out.value;
        let sf = unsafe { bt_band_radiance(b.ptr(), tk, fwd.ptr()) };
        let ss = unsafe { bt_band_radiance_derivative(b.ptr(), tk, slope.ptr()) };
        oracle(sf == bt_status::Ok, || {
            format!("T(L) = {tk:e} has no radiance ({sf:?}): {}", args())
        });
        if sf == bt_status::Ok && ss == bt_status::Ok {
            let err_k = (fwd.value - any_l).abs() / slope.value;
            oracle(
                err_k <= 1e-9 * tk || (fwd.value - any_l).abs() <= 1e-12 * any_l,
                || format!("L {any_l:e} -> T {tk:e} -> L {:e}: {}", fwd.value, args()),
            );
        }
    }
});

/// A result is a finite value satisfying `valid` on success, the poison on error.
fn check_value(
    name: &str,
    status: bt_status,
    out: &Poisoned<f64>,
    valid: impl Fn(f64) -> bool,
    args: impl Fn() -> String,
) {
    if status == bt_status::Ok {
        oracle(finite(&[out.value]) && valid(out.value), || {
            format!("{name} returned {:e}: {}", out.value, args())
        });
    } else {
        oracle(out.untouched(), || {
            format!("{name} wrote its out value on {status:?}: {}", args())
        });
    }
}
