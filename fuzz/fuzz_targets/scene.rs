//! The measurement equation through the C ABI: sensor radiance, object temperature (from
//! signal and from apparent temperature) and apparent temperature, over any band and any
//! scene.
//!
//! Oracles: successes finite and positive; errors leave the out value untouched; sensor
//! signal -> object temperature -> the same T within the scene's tolerance (1e-9 T plus
//! the conditioning of the equation, 1e-12 S / (G L'(T)) with G = tw ta e), and object
//! temperature -> apparent temperature -> object temperature likewise; each call within
//! the per-call limit.
#![no_main]

use bandtemp_capi::*;
use bandtemp_fuzz::{band, finite, oracle, scene, timed, Dec, Kind, Poisoned};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let mut d = Dec::new(data);
    let b = band(&mut d);
    let sc = scene(&mut d);
    let t = d.f64(Kind::TempK);
    let any_signal = d.f64(Kind::Magnitude);
    let args = || {
        format!(
            "band {:?} wl {:?} r {:?}, scene {sc:?}, T {t:e}",
            b.raw, b.wl, b.r
        )
    };

    type Fwd = unsafe extern "C" fn(*const bt_band, *const bt_scene, f64, *mut f64) -> bt_status;
    let calls: [(&str, Fwd, f64); 4] = [
        ("bt_sensor_radiance", bt_sensor_radiance, t),
        ("bt_apparent_temperature", bt_apparent_temperature, t),
        ("bt_object_temperature", bt_object_temperature, any_signal),
        (
            "bt_object_temperature_from_apparent",
            bt_object_temperature_from_apparent,
            t,
        ),
    ];
    let mut results = [(bt_status::Ok, 0.0); 4];
    for (slot, (name, f, x)) in results.iter_mut().zip(calls) {
        let mut out = Poisoned::<f64>::new();
        let s = timed(
            || format!("{name}({}, x {x:e})", args()),
            || unsafe { f(b.ptr(), &sc, x, out.ptr()) },
        );
        if s == bt_status::Ok {
            oracle(finite(&[out.value]) && out.value > 0.0, || {
                format!("{name} returned {:e}: {}, x {x:e}", out.value, args())
            });
        } else {
            oracle(out.untouched(), || {
                format!("{name} wrote on {s:?}: {}", args())
            });
        }
        *slot = (s, out.value);
    }

    // Round trip through the signal.
    let (s_fwd, signal) = results[0];
    if s_fwd == bt_status::Ok {
        let mut back = Poisoned::<f64>::new();
        let s = timed(
            || format!("bt_object_temperature({}, S {signal:e})", args()),
            || unsafe { bt_object_temperature(b.ptr(), &sc, signal, back.ptr()) },
        );
        if s == bt_status::Ok {
            let tol = tolerance_k(&b, &sc, t, signal);
            let err = (back.value - t).abs();
            oracle(err <= tol, || {
                format!(
                    "T {t:e} -> S {signal:e} -> T {:e}: error {err:e} > {tol:e}: {}",
                    back.value,
                    args()
                )
            });
        } else {
            oracle(back.untouched(), || {
                format!("bt_object_temperature wrote on {s:?}")
            });
        }
    }
    // Round trip through the apparent temperature.
    let (s_app, apparent) = results[1];
    if s_app == bt_status::Ok && s_fwd == bt_status::Ok {
        let mut back = Poisoned::<f64>::new();
        let s = timed(
            || {
                format!(
                    "bt_object_temperature_from_apparent({}, Tapp {apparent:e})",
                    args()
                )
            },
            || unsafe { bt_object_temperature_from_apparent(b.ptr(), &sc, apparent, back.ptr()) },
        );
        if s == bt_status::Ok {
            // The apparent temperature carries the inversion's 1e-12 relative error on top.
            let mut slope = Poisoned::<f64>::new();
            let extra = if unsafe { bt_band_radiance_derivative(b.ptr(), apparent, slope.ptr()) }
                == bt_status::Ok
            {
                let g = sc.window_transmittance * sc.atm_transmittance * sc.emissivity;
                1e-12 * apparent * slope.value / (g * derivative(&b, t))
            } else {
                0.0
            };
            let tol = tolerance_k(&b, &sc, t, signal) + extra;
            let err = (back.value - t).abs();
            oracle(err <= tol, || {
                format!(
                    "T {t:e} -> Tapp {apparent:e} -> T {:e}: error {err:e} > {tol:e}: {}",
                    back.value,
                    args()
                )
            });
        }
    }
});

/// dL/dT of the band at T (0 when it has none).
fn derivative(b: &bandtemp_fuzz::FuzzBand, t: f64) -> f64 {
    let mut slope = Poisoned::<f64>::new();
    if unsafe { bt_band_radiance_derivative(b.ptr(), t, slope.ptr()) } == bt_status::Ok {
        slope.value
    } else {
        0.0
    }
}

/// The round-trip tolerance of the measurement equation at T with sensor signal S:
/// 1e-9 T, plus S's 1e-12 relative uncertainty (the band integrals' accuracy, the sum of
/// five terms, and the subtraction of the background) converted to kelvin by
/// 1 / (G L'(T)).
fn tolerance_k(b: &bandtemp_fuzz::FuzzBand, sc: &bt_scene, t: f64, signal: f64) -> f64 {
    let g = sc.window_transmittance * sc.atm_transmittance * sc.emissivity;
    let conditioning = 1e-12 * signal / (g * derivative(b, t));
    1e-9 * t
        + if conditioning.is_nan() {
            f64::INFINITY
        } else {
            conditioning
        }
}
