//! Humid air and air paths through the C ABI: saturation vapour pressure, dew point,
//! spectral and band transmittance of a path, any arguments.
//!
//! Oracles: successes finite (pressures positive, dew points positive and at most the air
//! temperature, transmittances in [0, 1]); errors leave the out value untouched; the dew
//! point's own round trip e_w(T_d) = U e_w(T) within 1e-12 relative; each call within the
//! per-call limit.
#![no_main]

use bandtemp_capi::*;
use bandtemp_fuzz::{band, oracle, timed, Dec, Kind, Poisoned};
use libfuzzer_sys::fuzz_target;

fn check(name: &str, s: bt_status, out: &Poisoned<f64>, valid: bool, args: &dyn Fn() -> String) {
    if s == bt_status::Ok {
        oracle(out.value.is_finite() && valid, || {
            format!("{name} returned {:e}: {}", out.value, args())
        });
    } else {
        oracle(out.untouched(), || {
            format!("{name} wrote on {s:?}: {}", args())
        });
    }
}

fuzz_target!(|data: &[u8]| {
    let mut d = Dec::new(data);
    let air_k = if d.bool() {
        228.15 + 105.0 * f64::from(d.u16()) / 65535.0
    } else {
        d.f64(Kind::TempK)
    };
    let rh = d.f64(Kind::Fraction);
    let p = if d.bool() {
        500.0 + 600.0 * f64::from(d.u16()) / 65535.0
    } else {
        d.f64(Kind::Magnitude)
    };
    let dist = if d.bool() {
        1000.0 * f64::from(d.u16()) / 65535.0
    } else {
        d.f64(Kind::Signed)
    };
    let wl = if d.bool() {
        8.0 + 6.0 * f64::from(d.u16()) / 65535.0
    } else {
        d.f64(Kind::Um)
    };
    let obj_k = d.f64(Kind::TempK);
    let args = || {
        format!("air {air_k:e} K, U {rh:e}, p {p:e} hPa, d {dist:e} m, wl {wl:e}, object {obj_k:e}")
    };

    let mut ew = Poisoned::<f64>::new();
    let s = timed(
        || format!("bt_air_saturation_vapour_pressure_hpa({})", args()),
        || unsafe { bt_air_saturation_vapour_pressure_hpa(air_k, ew.ptr()) },
    );
    check(
        "bt_air_saturation_vapour_pressure_hpa",
        s,
        &ew,
        ew.value > 0.0,
        &args,
    );

    let mut td = Poisoned::<f64>::new();
    let sd = timed(
        || format!("bt_air_dew_point_k({})", args()),
        || unsafe { bt_air_dew_point_k(air_k, rh, td.ptr()) },
    );
    check(
        "bt_air_dew_point_k",
        sd,
        &td,
        td.value > 0.0 && td.value <= air_k * (1.0 + 1e-12),
        &args,
    );
    if sd == bt_status::Ok && s == bt_status::Ok {
        let mut ewd = Poisoned::<f64>::new();
        let se = unsafe { bt_air_saturation_vapour_pressure_hpa(td.value, ewd.ptr()) };
        oracle(se == bt_status::Ok, || {
            format!(
                "dew point {:e} has no saturation pressure ({se:?}): {}",
                td.value,
                args()
            )
        });
        if se == bt_status::Ok {
            let want = rh * ew.value;
            oracle(((ewd.value - want) / want).abs() <= 1e-12, || {
                format!(
                    "e_w(T_d) = {:e} vs U e_w(T) = {want:e}: {}",
                    ewd.value,
                    args()
                )
            });
        }
    }

    let mut tau = Poisoned::<f64>::new();
    let s = timed(
        || format!("bt_path_spectral_transmittance({})", args()),
        || unsafe { bt_path_spectral_transmittance(air_k, rh, p, dist, wl, tau.ptr()) },
    );
    check(
        "bt_path_spectral_transmittance",
        s,
        &tau,
        tau.value > 0.0 && tau.value <= 1.0,
        &args,
    );

    let b = if d.bool() {
        let mut b = band(&mut Dec::new(&[]));
        b.raw.lo_um = 8.0 + 3.0 * f64::from(d.u8()) / 255.0;
        b.raw.hi_um = b.raw.lo_um + 0.01 + (14.0 - 0.01 - b.raw.lo_um) * f64::from(d.u8()) / 255.0;
        b.raw.detector = u32::from(d.u8() & 1);
        b
    } else {
        band(&mut d)
    };
    let bargs = || format!("{}, band {:?} wl {:?} r {:?}", args(), b.raw, b.wl, b.r);
    let mut tb = Poisoned::<f64>::new();
    let s = timed(
        || format!("bt_path_band_transmittance({})", bargs()),
        || unsafe { bt_path_band_transmittance(b.ptr(), air_k, rh, p, dist, obj_k, tb.ptr()) },
    );
    check(
        "bt_path_band_transmittance",
        s,
        &tb,
        tb.value >= 0.0 && tb.value <= 1.0,
        &bargs,
    );
});
