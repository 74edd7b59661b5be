#!/usr/bin/env python3
"""Cross-check the bandtemp C ABI from Python against independent implementations.

Loads the cdylib with ctypes and compares, for seeded random cases,

- band radiance (rectangular bands, energy and photon detectors) with two references:
  mpmath's closed form (polylog series of integral t^m/(e^t - 1), 40 digits) and
  scipy.integrate.quad of Planck's law written here from scipy.constants (h, c, k:
  CODATA 2018 exact values); the two references are checked against each other first;
- band radiance of tabulated responses (piecewise linear) with scipy quad split at the
  table's nodes, and mpmath quad as the second reference;
- inversion: the library's temperature for the reference radiance of a known temperature;
- the measurement equation (DESIGN.md) written out here over reference band radiances,
  against bt_sensor_radiance, and its inversion bt_object_temperature;
- the Sakuma-Hattori signal and its closed-form inverse in mpmath at 40 digits;
- spectral scenes against scipy quad of the tabulated equation split at every node;
- the site methods (emissivity from a reference or a coating, reflected temperature from
  a reflector) on readings written out in mpmath;
- the Wien ratio model and curves of both forms behind a dark offset, in mpmath, and a
  Wien-form fit recovering a known curve from exact readings;
- Monte Carlo (seeded) against the GUM law of propagation with sensitivities from
  mpmath derivatives of the written-out equation;
- the calibration checks: a fitted curve against the band model (bt_verify_curve_band) with
  the band radiance and the curve's inverse in mpmath, and the calibration uncertainty
  (bt_verify_uncertainty_sakuma_hattori) with the Jacobian by mpmath.diff;
- optics and materials: Fresnel directional emissivity (mpmath complex), hemispherical
  emissivity (scipy quad), Airy encircled energy (scipy.special) and MTF (numpy);
- multi-point NUC maps (bt_nuc_multi_point): each pixel's corrected counts from the maps
  against numpy's piecewise-linear interpolation (np.interp) of the pixel's levels onto
  the array means (np.mean over the good pixels), extrapolated with the end segments.

Usage:
    cargo build --release --lib
    python3 capi/tests/python/ctypes_check.py [path/to/libbandtemp_capi.so]

Prints the largest relative error per check and 'N passed, N failed'; exits 1 on any
failure. Tolerances are in TOL (one place).
"""

import ctypes
import math
import os
import sys

import mpmath as mp
import numpy as np
from scipy import constants, integrate

mp.mp.dps = 40

# Relative tolerances, with the reason.
TOL = {
    # mpmath closed form vs scipy quad: both references must agree before either is used
    # (measured: 7e-16).
    "references agree": 1e-12,
    # Effective exponent T L'/L against mpmath.diff of the closed form: the library's
    # analytic derivative is good to ~1e-14 relative.
    "effective exponent vs mpmath": 1e-11,
    # Net signal e L(To) + (1-e) L(Tr) - L(Ti) against the same written out with mpmath:
    # a difference of band radiances, so relative to the largest term.
    "net signal vs written-out exchange": 1e-12,
    # The library claims full double precision for rectangular bands (measured: 2e-15).
    "band radiance vs mpmath": 1e-13,
    "band radiance vs scipy quad": 1e-12,
    # Tabulated responses: the library's Gauss-Legendre panels claim 1e-13 (measured: 1e-15).
    "tabulated radiance vs scipy quad": 1e-12,
    "tabulated radiance vs mpmath quad": 1e-12,
    # Inversion: 1e-12 T claimed; the reference radiance itself is good to ~1e-15.
    "band temperature": 1e-12,
    "sensor radiance vs written-out equation": 1e-13,
    "object temperature": 1e-12,
    "sakuma-hattori signal vs mpmath": 1e-13,
    "sakuma-hattori temperature vs mpmath": 1e-12,
    # Spectral scenes: Gauss-Legendre panels at every table node, 1e-13 claimed (quad 1e-13).
    "spectral sensor radiance vs scipy quad": 1e-11,
    "spectral object temperature": 1e-11,
    # Site methods: closed forms over band radiances (full double precision claimed); the
    # emissivity's error is the signal's amplified by S / (tw ta (L(Tref) - L(Tr))) <= ~20.
    "emissivity from reference": 1e-11,
    "coating emissivity": 1e-10,
    "coating temperature": 1e-12,
    "reflected temperature from reflector": 1e-11,
    # Wien ratio model: closed forms, a few ulp.
    # lambda^-5 amplifies the rounding of the band centres (measured: 6e-14).
    "wien ratio model vs mpmath": 3e-13,
    "wien ratio temperature vs mpmath": 1e-12,
    # Calibration curves: closed forms (a few ulp); fits recover exact data to < 1 uK.
    "curve signal vs mpmath": 1e-13,
    "curve temperature vs mpmath": 1e-12,
    "curve fit recovers A": 1e-7,
    # Monte Carlo against the GUM law of propagation with sensitivities from mpmath
    # derivatives of the written-out equation, for a near-linear case: 4 standard errors
    # of the standard deviation (1/sqrt(2(M-1)) relative) plus 2 % for what is left
    # nonlinear. The mean: |mean - T| / (4 u/sqrt(M) + 0.02 u) must be at most 1.
    "monte carlo standard deviation vs law of propagation": 4.0 / math.sqrt(2 * 39999) + 0.02,
    "monte carlo mean vs estimate (error / bound)": 1.0,
    # The largest curve-vs-band error (mK to tens of mK) is a difference of temperatures
    # each good to ~1e-13 K, so its relative error is ~1e-10 (measured: 6e-11).
    "verify curve max error vs mpmath": 1e-8,
    # u(T) from the covariance: the library's closed-form sensitivities against
    # mpmath.diff at 40 digits (double rounding of the terms: ~1e-15; measured 4e-16).
    "verify uncertainty vs mpmath": 1e-10,
}

H = mp.mpf(constants.h)  # 6.62607015e-34 J s, exact (SI 2019)
C = mp.mpf(constants.c)  # 299792458 m/s, exact
K = mp.mpf(constants.k)  # 1.380649e-23 J/K, exact
C1L_UM = 2 * H * C**2 * mp.mpf(10) ** 24  # W um^4 m^-2 sr^-1
C1P_UM = 2 * C * mp.mpf(10) ** 18  # photons s^-1 um^3 m^-2 sr^-1
C2_UMK = H * C / K * mp.mpf(10) ** 6  # um K


class Band(ctypes.Structure):
    _fields_ = [
        ("lo_um", ctypes.c_double),
        ("hi_um", ctypes.c_double),
        ("detector", ctypes.c_uint),  # a C enum: int-sized on the platforms tested
        ("response_um", ctypes.POINTER(ctypes.c_double)),
        ("response", ctypes.POINTER(ctypes.c_double)),
        ("response_len", ctypes.c_size_t),
    ]


class Scene(ctypes.Structure):
    _fields_ = [
        (name, ctypes.c_double)
        for name in (
            "emissivity",
            "reflected_k",
            "atm_transmittance",
            "atm_k",
            "window_transmittance",
            "window_reflectance",
            "window_k",
            "window_reflected_k",
        )
    ]


class SakumaHattori(ctypes.Structure):
    _fields_ = [("a_um", ctypes.c_double), ("b_umk", ctypes.c_double), ("c", ctypes.c_double)]


class SpectralTables(ctypes.Structure):
    _fields_ = [
        ("emissivity_um", ctypes.POINTER(ctypes.c_double)),
        ("emissivity", ctypes.POINTER(ctypes.c_double)),
        ("emissivity_len", ctypes.c_size_t),
        ("transmittance_um", ctypes.POINTER(ctypes.c_double)),
        ("transmittance", ctypes.POINTER(ctypes.c_double)),
        ("transmittance_len", ctypes.c_size_t),
    ]


class WienRatio(ctypes.Structure):
    _fields_ = [("lambda1_um", ctypes.c_double), ("lambda2_um", ctypes.c_double), ("prefactor", ctypes.c_double)]


class Curve(ctypes.Structure):
    _fields_ = [
        ("form", ctypes.c_uint),  # a C enum: 0 Planck, 1 Wien
        ("a_um", ctypes.c_double),
        ("b_umk", ctypes.c_double),
        ("c", ctypes.c_double),
        ("offset", ctypes.c_double),
    ]


class CurveFit(ctypes.Structure):
    _fields_ = [
        ("curve", Curve),
        ("covariance", (ctypes.c_double * 3) * 3),
        ("max_residual_k", ctypes.c_double),
        ("rms_residual_k", ctypes.c_double),
        ("iterations", ctypes.c_uint32),
    ]


class Uncertainties(ctypes.Structure):
    _fields_ = [
        (name, ctypes.c_double)
        for name in (
            "signal",
            "calibration_k",
            "calibration_signal",
            "emissivity",
            "reflected_k",
            "atm_transmittance",
            "atm_k",
            "window_transmittance",
            "window_reflectance",
            "window_k",
            "window_reflected_k",
        )
    ]


class MonteCarlo(ctypes.Structure):
    _fields_ = [("trials", ctypes.c_size_t)] + [
        (name, ctypes.c_double)
        for name in (
            "mean_k",
            "standard_deviation_k",
            "probability",
            "low_k",
            "high_k",
            "shortest_low_k",
            "shortest_high_k",
        )
    ]


class CurveReport(ctypes.Structure):
    _fields_ = [
        ("samples", ctypes.c_size_t),
        ("max_abs_error_k", ctypes.c_double),
        ("worst_t_k", ctypes.c_double),
        ("worst_error_k", ctypes.c_double),
        ("mean_error_k", ctypes.c_double),
    ]


class UncertaintyReport(ctypes.Structure):
    _fields_ = [
        ("samples", ctypes.c_size_t),
        ("max_u_k", ctypes.c_double),
        ("worst_t_k", ctypes.c_double),
        ("lo_u_k", ctypes.c_double),
        ("hi_u_k", ctypes.c_double),
    ]


def load(path):
    lib = ctypes.CDLL(path)
    d, p = ctypes.c_double, ctypes.POINTER(ctypes.c_double)
    signatures = {
        "bt_band_radiance": [ctypes.POINTER(Band), d, p],
        "bt_band_temperature": [ctypes.POINTER(Band), d, p],
        "bt_sensor_radiance": [ctypes.POINTER(Band), ctypes.POINTER(Scene), d, p],
        "bt_object_temperature": [ctypes.POINTER(Band), ctypes.POINTER(Scene), d, p],
        "bt_sakuma_hattori_signal": [ctypes.POINTER(SakumaHattori), d, p],
        "bt_sakuma_hattori_temperature": [ctypes.POINTER(SakumaHattori), d, p],
        "bt_spectral_sensor_radiance": [ctypes.POINTER(Band), ctypes.POINTER(Scene), ctypes.POINTER(SpectralTables), d, p],
        "bt_spectral_object_temperature": [ctypes.POINTER(Band), ctypes.POINTER(Scene), ctypes.POINTER(SpectralTables), d, p],
        "bt_emissivity_from_reference": [ctypes.POINTER(Band), ctypes.POINTER(Scene), d, d, p],
        "bt_emissivity_from_reference_coating": [ctypes.POINTER(Band), ctypes.POINTER(Scene), d, d, d, p, p],
        "bt_reflected_temperature_from_reflector": [ctypes.POINTER(Band), ctypes.POINTER(Scene), d, d, d, p],
        "bt_wien_ratio_from_bands": [ctypes.POINTER(Band), ctypes.POINTER(Band), ctypes.POINTER(WienRatio)],
        "bt_wien_ratio_temperature": [ctypes.POINTER(WienRatio), d, d, p],
        "bt_curve_signal": [ctypes.POINTER(Curve), d, p],
        "bt_curve_temperature": [ctypes.POINTER(Curve), d, p],
        "bt_curve_fit_points": [ctypes.c_int, p, p, p, ctypes.c_size_t, d, ctypes.POINTER(CurveFit)],
        "bt_surface_monte_carlo": [
            ctypes.POINTER(Band), ctypes.POINTER(Scene), d, ctypes.POINTER(Uncertainties),
            ctypes.c_uint64, d, p, ctypes.c_size_t, ctypes.POINTER(MonteCarlo),
        ],
        "bt_effective_exponent_band": [ctypes.POINTER(Band), d, p],
        "bt_net_signal_band": [ctypes.POINTER(Band), d, d, d, d, p],
    }
    sh_p = ctypes.POINTER(SakumaHattori)
    signatures["bt_sakuma_hattori_fit_band"] = [ctypes.POINTER(Band), d, d, sh_p, p]
    signatures["bt_verify_curve_band"] = [
        sh_p, d, ctypes.POINTER(Band), d, d, d, d, ctypes.c_size_t, ctypes.POINTER(CurveReport)
    ]
    signatures["bt_verify_uncertainty_sakuma_hattori"] = [
        sh_p, p, d, d, ctypes.c_size_t, ctypes.POINTER(UncertaintyReport)
    ]
    for name, args in signatures.items():
        fn = getattr(lib, name)
        fn.argtypes = args
        fn.restype = ctypes.c_int
    lib.bt_status_message.argtypes = [ctypes.c_int]
    lib.bt_status_message.restype = ctypes.c_char_p
    lib.bt_version.restype = ctypes.c_char_p
    return lib


def call(lib, name, *args):
    out = ctypes.c_double(-12345.0)
    status = getattr(lib, name)(*args, ctypes.byref(out))
    if status != 0:
        raise RuntimeError(f"{name}: status {status} ({lib.bt_status_message(status).decode()})")
    return out.value


# ---- references ----------------------------------------------------------------------------


def tail(m, x):
    """integral from x to infinity of t^m / (e^t - 1) dt, closed form (m = 2, 3)."""
    e = mp.exp(-x)
    li = [None] + [mp.polylog(n, e) for n in range(1, m + 2)]
    fact = [1, 1, 2, 6]
    return sum(
        mp.mpf(fact[m]) / fact[m - j] * x ** (m - j) * li[j + 1] for j in range(0, m + 1)
    )


def band_mpmath(lo_um, hi_um, t_k, photon):
    m = 2 if photon else 3
    c1 = C1P_UM if photon else C1L_UM
    t = mp.mpf(t_k)
    xa, xb = C2_UMK / (mp.mpf(hi_um) * t), C2_UMK / (mp.mpf(lo_um) * t)
    return c1 * (t / C2_UMK) ** (m + 1) * (tail(m, xa) - tail(m, xb))


def planck_si(wl_um, t_k, photon):
    """Planck's law from scipy.constants in floating point, per um."""
    wl = wl_um * 1e-6
    x = constants.h * constants.c / (wl * constants.k * t_k)
    if x > 700:
        return 0.0
    spectral = 2 * constants.h * constants.c**2 / wl**5 / math.expm1(x) * 1e-6
    return spectral * wl / (constants.h * constants.c) if photon else spectral


def band_quad(lo_um, hi_um, t_k, photon, nodes=None, response=None):
    def integrand(wl):
        r = 1.0 if response is None else float(np.interp(wl, nodes, response, left=0.0, right=0.0))
        return r * planck_si(wl, t_k, photon)

    edges = [lo_um, hi_um] if nodes is None else sorted({lo_um, hi_um, *[n for n in nodes if lo_um < n < hi_um]})
    total = 0.0
    for a, b in zip(edges, edges[1:]):
        value, _ = integrate.quad(integrand, a, b, epsabs=0.0, epsrel=1e-13, limit=400)
        total += value
    return total


def band_table_mpmath(lo_um, hi_um, t_k, nodes, response):
    edges = sorted({lo_um, hi_um, *[n for n in nodes if lo_um < n < hi_um]})
    t = mp.mpf(t_k)

    def integrand(wl):
        r = mp.mpf(float(np.interp(float(wl), nodes, response, left=0.0, right=0.0)))
        return r * C1L_UM / wl**5 / mp.expm1(C2_UMK / (wl * t))

    total = mp.mpf(0)
    with mp.workdps(20):  # 1e-9 comparisons need no more; quad at 40 digits is slow
        for a, b in zip(edges, edges[1:]):
            total += mp.quad(integrand, mp.linspace(a, b, 5))
    return total


# ---- the checks ----------------------------------------------------------------------------


class Tally:
    def __init__(self):
        self.passed = 0
        self.failed = 0
        self.worst = {}

    def ratio(self, what, value):
        """A nonnegative figure that must not exceed TOL[what]."""
        self.worst[what] = max(self.worst.get(what, 0.0), value)
        if value <= TOL[what]:
            self.passed += 1
        else:
            self.failed += 1
            print(f"FAIL {what}: {value:.3g} > {TOL[what]:.3g}")

    def rel(self, what, got, want):
        want = float(want)
        err = abs(got - want) / abs(want)
        self.worst[what] = max(self.worst.get(what, 0.0), err)
        if err <= TOL[what]:
            self.passed += 1
        else:
            self.failed += 1
            print(f"FAIL {what}: got {got!r}, want {want!r}, rel err {err:.3g}")


def status_of(lib, name, *args):
    status = getattr(lib, name)(*args)
    if status != 0:
        raise RuntimeError(f"{name}: status {status} ({lib.bt_status_message(status).decode()})")


def doubles(values):
    return (ctypes.c_double * len(values))(*values)


def check_rest(lib, rng, tally):
    """Spectral scenes, site methods, the Wien ratio model, calibration curves, Monte Carlo."""
    lwir = Band(8.0, 14.0, 0, None, None, 0)

    def lb(temperature):
        return band_mpmath(8.0, 14.0, temperature, False)

    # Spectral scenes: 20 invented tables over 7.5-14.5 um; reference by scipy quad split at
    # every node of both tables.
    for _ in range(20):
        e_wl = np.sort(rng.uniform(7.5, 14.5, 3)).tolist()
        e_wl = [7.5] + e_wl + [14.5]
        e_v = rng.uniform(0.3, 1.0, len(e_wl)).tolist()
        ta_wl = [7.0, float(rng.uniform(8.5, 12.5)), 15.0]
        ta_v = rng.uniform(0.6, 1.0, 3).tolist()
        tr, tatm, twin, twr = (float(x) for x in rng.uniform(260.0, 320.0, 4))
        tw = float(rng.uniform(0.7, 1.0))
        rw = float(rng.uniform(0.0, 1.0 - tw))
        t = float(rng.uniform(300.0, 1200.0))
        scene = Scene(0.5, tr, 0.9, tatm, tw, rw, twin, twr)  # grey e, ta replaced by tables
        tables = SpectralTables(doubles(e_wl), doubles(e_v), len(e_wl), doubles(ta_wl), doubles(ta_v), 3)

        def integrand(wl):
            e = float(np.interp(wl, e_wl, e_v))
            ta = float(np.interp(wl, ta_wl, ta_v))
            return ta * e * planck_si(wl, t, False) + ta * (1 - e) * planck_si(wl, tr, False) + (1 - ta) * planck_si(wl, tatm, False)

        edges = sorted({8.0, 14.0, *[w for w in e_wl + ta_wl if 8.0 < w < 14.0]})
        inner = sum(integrate.quad(integrand, a, b, epsabs=0.0, epsrel=1e-13, limit=400)[0] for a, b in zip(edges, edges[1:]))
        s_ref = tw * inner + rw * float(lb(twr)) + (1 - tw - rw) * float(lb(twin))
        got = call(lib, "bt_spectral_sensor_radiance", ctypes.byref(lwir), ctypes.byref(scene), ctypes.byref(tables), t)
        tally.rel("spectral sensor radiance vs scipy quad", got, s_ref)
        got = call(lib, "bt_spectral_object_temperature", ctypes.byref(lwir), ctypes.byref(scene), ctypes.byref(tables), s_ref)
        tally.rel("spectral object temperature", got, t)

    # Site methods: 30 invented scenes, readings from the written-out equation in mpmath.
    for _ in range(30):
        e = float(rng.uniform(0.2, 0.98))
        tr, tatm, twin, twr = (float(x) for x in rng.uniform(270.0, 310.0, 4))
        ta = float(rng.uniform(0.8, 1.0))
        tw = float(rng.uniform(0.7, 1.0))
        rw = float(rng.uniform(0.0, min(0.1, 1.0 - tw)))
        t = float(rng.uniform(340.0, 900.0))
        scene = Scene(0.9, tr, ta, tatm, tw, rw, twin, twr)

        def reading(emissivity, t_object, t_reflected):
            return tw * (ta * (emissivity * lb(t_object) + (1 - emissivity) * lb(t_reflected)) + (1 - ta) * lb(tatm)) + rw * lb(twr) + (1 - tw - rw) * lb(twin)

        s_surface = float(reading(e, t, tr))
        got = call(lib, "bt_emissivity_from_reference", ctypes.byref(lwir), ctypes.byref(scene), s_surface, t)
        tally.rel("emissivity from reference", got, e)
        e_out, t_out = ctypes.c_double(), ctypes.c_double()
        status_of(lib, "bt_emissivity_from_reference_coating", ctypes.byref(lwir), ctypes.byref(scene),
                  s_surface, float(reading(0.95, t, tr)), 0.95, ctypes.byref(e_out), ctypes.byref(t_out))
        tally.rel("coating emissivity", e_out.value, e)
        tally.rel("coating temperature", t_out.value, t)
        ef, tf, t_refl = 0.04, float(rng.uniform(280.0, 320.0)), float(rng.uniform(250.0, 450.0))
        got = call(lib, "bt_reflected_temperature_from_reflector", ctypes.byref(lwir), ctypes.byref(scene), float(reading(ef, tf, t_refl)), ef, tf)
        tally.rel("reflected temperature from reflector", got, t_refl)

    # The Wien ratio model: rectangular bands (effective wavelength = centre), in mpmath.
    for _ in range(40):
        l1, l2 = float(rng.uniform(0.5, 1.0)), float(rng.uniform(1.05, 2.0))
        w1, w2 = float(rng.uniform(0.005, 0.05)), float(rng.uniform(0.005, 0.05))
        b1 = Band(l1 - w1 / 2, l1 + w1 / 2, 0, None, None, 0)
        b2 = Band(l2 - w2 / 2, l2 + w2 / 2, 1, None, None, 0)  # energy / photon
        model = WienRatio()
        status_of(lib, "bt_wien_ratio_from_bands", ctypes.byref(b1), ctypes.byref(b2), ctypes.byref(model))
        lam1 = (mp.mpf(b1.lo_um) + mp.mpf(b1.hi_um)) / 2
        lam2 = (mp.mpf(b2.lo_um) + mp.mpf(b2.hi_um)) / 2
        d1, d2 = mp.mpf(b1.hi_um) - mp.mpf(b1.lo_um), mp.mpf(b2.hi_um) - mp.mpf(b2.lo_um)
        w_ref = (C1L_UM * lam1**-5 * d1) / (C1P_UM * lam2**-4 * d2)
        tally.rel("wien ratio model vs mpmath", model.lambda1_um, lam1)
        tally.rel("wien ratio model vs mpmath", model.lambda2_um, lam2)
        tally.rel("wien ratio model vs mpmath", model.prefactor, w_ref)
        kappa, r = float(rng.uniform(0.8, 1.2)), float(rng.uniform(1e-3, 0.5)) * float(w_ref)
        lam_r = mp.mpf(model.lambda1_um) * mp.mpf(model.lambda2_um) / (mp.mpf(model.lambda2_um) - mp.mpf(model.lambda1_um))
        t_ref = C2_UMK / (lam_r * mp.log(mp.mpf(kappa) * mp.mpf(model.prefactor) / mp.mpf(r)))
        got = call(lib, "bt_wien_ratio_temperature", ctypes.byref(model), r, kappa)
        tally.rel("wien ratio temperature vs mpmath", got, t_ref)

    # Calibration curves of both forms behind a dark offset, in mpmath; and a fit of the
    # Wien form to exact readings (mpmath) of a known curve.
    for case in range(100):
        form = case % 2
        a = float(rng.uniform(0.6, 1.6) if form else rng.uniform(0.6, 14.0))
        b, c, off = float(rng.uniform(-20.0, 50.0)), float(10 ** rng.uniform(3, 9)), float(rng.uniform(-500.0, 500.0))
        t = float(rng.uniform(600.0, 2500.0) if form else rng.uniform(250.0, 2500.0))
        curve = Curve(form, a, b, c, off)
        y = C2_UMK / (mp.mpf(a) * t + mp.mpf(b))
        s_c = mp.mpf(c) * mp.exp(-y) if form else mp.mpf(c) / mp.expm1(y)
        if s_c < mp.mpf("1e-6") * abs(mp.mpf(off)) + mp.mpf("1e-300"):
            continue  # the offset would swamp the signal: the inverse is ill-conditioned
        got = call(lib, "bt_curve_signal", ctypes.byref(curve), t)
        tally.rel("curve signal vs mpmath", got, mp.mpf(off) + s_c)
        net = mp.mpf(float(mp.mpf(off) + s_c)) - mp.mpf(off)
        t_ref = (C2_UMK / (mp.log(mp.mpf(c) / net) if form else mp.log1p(mp.mpf(c) / net)) - mp.mpf(b)) / mp.mpf(a)
        got = call(lib, "bt_curve_temperature", ctypes.byref(curve), float(mp.mpf(off) + s_c))
        tally.rel("curve temperature vs mpmath", got, t_ref)
    for _ in range(10):
        a, b, c, off = float(rng.uniform(0.6, 1.6)), float(rng.uniform(0.0, 5.0)), float(10 ** rng.uniform(6, 10)), 250.0
        t_k = [800.0 + 150.0 * i for i in range(6)]
        counts = [float(off + mp.mpf(c) * mp.exp(-C2_UMK / (mp.mpf(a) * t + mp.mpf(b)))) for t in t_k]
        fit = CurveFit()
        status_of(lib, "bt_curve_fit_points", 1, doubles(t_k), doubles(counts), None, 6, off, ctypes.byref(fit))
        tally.rel("curve fit recovers A", fit.curve.a_um, a)

    # Monte Carlo against the law of propagation (JCGM 100) for two near-linear scenes:
    # T(S, e, Tr, ta) solved from the written-out equation in mpmath, sensitivities by
    # mpmath.diff, combined in quadrature.
    trials = 40000
    samples = (ctypes.c_double * trials)()
    for case, (e, tr, ta, t) in enumerate([(0.93, 291.0, 0.97, 338.15), (0.85, 300.0, 0.95, 420.0)]):
        scene = Scene(e, tr, ta, 288.0, 1.0, 0.0, 293.15, 293.15)
        s = ta * (e * lb(t) + (1 - e) * lb(tr)) + (1 - ta) * lb(288.0)

        def object_k(sig, emis, refl, tau):
            target = ((sig - (1 - tau) * lb(288.0)) / tau - (1 - emis) * lb(refl)) / emis
            return mp.findroot(lambda x: lb(x) - target, mp.mpf(t))

        u = {"signal": 0.05, "emissivity": 0.005, "reflected_k": 1.0, "atm_transmittance": 0.003}
        args = [s, mp.mpf(e), mp.mpf(tr), mp.mpf(ta)]
        sens = []
        for i in range(4):
            def along(x, i=i):
                a = list(args)
                a[i] = x
                return object_k(*a)
            sens.append(mp.diff(along, args[i]))
        uc = mp.sqrt(sum((c_i * u_i) ** 2 for c_i, u_i in zip(sens, u.values())))
        unc = Uncertainties(**u)
        out = MonteCarlo()
        status_of(lib, "bt_surface_monte_carlo", ctypes.byref(lwir), ctypes.byref(scene), float(s),
                  ctypes.byref(unc), 2024 + case, 0.95, samples, trials, ctypes.byref(out))
        tally.rel("monte carlo standard deviation vs law of propagation", out.standard_deviation_k, uc)
        bound = float(4 * uc / math.sqrt(trials) + mp.mpf("0.02") * uc)
        tally.ratio("monte carlo mean vs estimate (error / bound)", abs(out.mean_k - t) / bound)


# ---- multi-point non-uniformity correction -------------------------------------------------


class StackView(ctypes.Structure):
    _fields_ = [
        ("mean", ctypes.POINTER(ctypes.c_double)),
        ("m2", ctypes.POINTER(ctypes.c_double)),
        ("len", ctypes.c_size_t),
        ("frames", ctypes.c_uint32),
    ]


class MultiPointReport(ctypes.Structure):
    _fields_ = [
        ("levels", ctypes.c_uint32),
        ("good_pixels", ctypes.c_uint64),
        ("order_flagged", ctypes.c_uint64),
        ("level_means", ctypes.c_double * 16),
    ]


def multi_point_checks(lib, rng, tally):
    """Multi-point maps against numpy: the corrected counts G_k n + O_k of every good pixel
    (segment from the pixel's breakpoints in the maps) against np.interp of the pixel's
    levels onto the array means, outside the span the end segments' lines; the array means
    against np.mean; pixels whose levels do not increase flagged 16 and counted."""
    TOL.update({
        # f32 maps: 2^-24 relative on G and O and on the breakpoints, a few roundings:
        # relative to |G n| + |O| + |x| (the largest term of the sum).
        "multi-point corrected counts vs np.interp": 4.0 * 2.0 ** -24,
        "multi-point level means vs np.mean": 1e-14,
    })
    lib.bt_nuc_multi_point.argtypes = [
        ctypes.POINTER(StackView), ctypes.c_size_t, ctypes.POINTER(ctypes.c_uint8),
        ctypes.c_size_t, ctypes.POINTER(ctypes.c_float), ctypes.c_size_t,
        ctypes.POINTER(MultiPointReport),
    ]
    lib.bt_nuc_multi_point.restype = ctypes.c_int
    for case in range(20):
        n_levels = int(rng.integers(2, 7))
        pixels = int(rng.integers(4, 60))
        # Array counts of the levels, increasing; pixels with their own gain, offset and a
        # quadratic term (monotone over the range); a few pixels whose levels do not increase.
        xs = np.sort(rng.uniform(5_000.0, 50_000.0, n_levels))
        while np.any(np.diff(xs) < 100.0):
            xs = np.sort(rng.uniform(5_000.0, 50_000.0, n_levels))
        g = rng.uniform(0.8, 1.2, pixels)
        o = rng.uniform(-500.0, 500.0, pixels)
        c = rng.uniform(-2e-6, 2e-6, pixels)
        levels = np.array([(x - o) / g + c * (x - 20_000.0) ** 2 for x in xs])  # [level][pixel]
        broken = rng.choice(pixels, size=min(2, pixels - 2), replace=False) if case % 3 == 0 else []
        for p in broken:
            levels[-1][p] = levels[0][p] - 1.0
        zeros = np.zeros(pixels)
        keep = [doubles(list(row)) for row in levels] + [doubles(list(zeros))]
        views = (StackView * n_levels)(*[
            StackView(keep[k], keep[-1], pixels, 1) for k in range(n_levels)
        ])
        bad = (ctypes.c_uint8 * pixels)()
        maps = (ctypes.c_float * ((3 * n_levels - 4) * pixels))()
        report = MultiPointReport()
        status = lib.bt_nuc_multi_point(views, n_levels, bad, pixels, maps, len(maps), ctypes.byref(report))
        if status != 0:
            raise RuntimeError(f"bt_nuc_multi_point: status {status}")
        increasing = np.all(np.diff(levels, axis=0) > 0.0, axis=0)
        good = np.flatnonzero(increasing)
        if report.order_flagged != pixels - len(good) or report.good_pixels != len(good):
            tally.failed += 1
            print(f"FAIL multi-point: flagged {report.order_flagged}, good {report.good_pixels}")
        for p in range(pixels):
            if (bad[p] == 16) == bool(increasing[p]):
                tally.failed += 1
                print(f"FAIL multi-point: pixel {p} flag {bad[p]}")
        means = levels[:, good].mean(axis=1)
        for k in range(n_levels):
            tally.rel("multi-point level means vs np.mean", report.level_means[k], means[k])
        seg = n_levels - 1
        for p in good:
            s_p = levels[:, p]
            for n in rng.uniform(s_p[0] - 2_000.0, s_p[-1] + 2_000.0, 8):
                k = 0
                for j in range(1, seg):
                    if n >= float(maps[(2 * seg + j - 1) * pixels + p]):
                        k = j
                gk, ok = float(maps[k * pixels + p]), float(maps[(seg + k) * pixels + p])
                x = gk * n + ok
                if s_p[0] <= n <= s_p[-1]:
                    want = np.interp(n, s_p, means)
                else:
                    e = 0 if n < s_p[0] else seg - 1
                    want = means[e] + (means[e + 1] - means[e]) * (n - s_p[e]) / (s_p[e + 1] - s_p[e])
                scale = abs(gk * n) + abs(ok) + abs(want)
                tally.ratio("multi-point corrected counts vs np.interp", abs(x - want) / scale)


# ---- optics and materials ------------------------------------------------------------------


class DirectionalEmissivity(ctypes.Structure):
    _fields_ = [("s", ctypes.c_double), ("p", ctypes.c_double), ("unpolarised", ctypes.c_double)]


def optics_checks(lib, rng, tally):
    """Fresnel emissivity (mpmath complex arithmetic), hemispherical emissivity (scipy quad),
    the Airy encircled energy (scipy.special j0, j1) and the MTF (written out in numpy)."""
    from scipy import special

    TOL.update({
        # Fresnel reflectances: a few ulp of cancellation in 1 - |r|^2 (absolute; the
        # directional value can be near 0 at grazing angles).
        "directional emissivity vs mpmath (abs)": 1e-13,
        # scipy quad to 1e-13 against the library's 1e-12 claim.
        "hemispherical emissivity vs scipy quad (abs)": 1e-12,
        "airy encircled energy vs scipy (abs)": 1e-14,
        "system mtf vs numpy (abs)": 1e-14,
    })
    d = ctypes.c_double
    lib.bt_emissivity_directional.argtypes = [d, d, d, ctypes.POINTER(DirectionalEmissivity)]
    lib.bt_emissivity_directional.restype = ctypes.c_int
    lib.bt_emissivity_hemispherical.argtypes = [d, d, ctypes.POINTER(d)]
    lib.bt_emissivity_hemispherical.restype = ctypes.c_int
    lib.bt_airy_encircled_energy.argtypes = [d, d, d, ctypes.POINTER(d)]
    lib.bt_airy_encircled_energy.restype = ctypes.c_int

    def fresnel(n, k, deg):
        m = mp.mpc(n, -k)
        c = mp.cos(mp.radians(deg))
        w = mp.sqrt(m * m - mp.sin(mp.radians(deg)) ** 2)
        rs = abs((c - w) / (c + w)) ** 2
        rp = abs((m * m * c - w) / (m * m * c + w)) ** 2
        return 1 - (rs + rp) / 2

    def absolute(what, got, want):
        err = abs(float(got) - float(want))
        tally.worst[what] = max(tally.worst.get(what, 0.0), err)
        if err <= TOL[what]:
            tally.passed += 1
        else:
            tally.failed += 1
            print(f"FAIL {what}: got {got!r}, want {float(want)!r}")

    for _ in range(60):
        n = float(10 ** rng.uniform(-0.5, 2))
        k = float(0.0 if rng.uniform() < 0.3 else 10 ** rng.uniform(-2, 2))
        deg = float(rng.uniform(0.0, 89.9))
        out = DirectionalEmissivity(-1.0, -1.0, -1.0)
        status = lib.bt_emissivity_directional(n, k, deg, ctypes.byref(out))
        if status != 0:
            raise RuntimeError(f"bt_emissivity_directional: status {status}")
        absolute("directional emissivity vs mpmath (abs)", out.unpolarised, fresnel(n, k, deg))
    for _ in range(12):
        n = float(10 ** rng.uniform(0, 1.5))
        k = float(10 ** rng.uniform(-2, 1.5))
        f = lambda mu: float(fresnel(n, k, math.degrees(math.acos(mu)))) * 2 * mu
        a = 1 / math.hypot(n, k)
        pts = sorted({a / 4, a, min(4 * a, 0.9)})
        want = integrate.quad(f, 0, 1, points=pts, epsabs=1e-14, epsrel=1e-13, limit=200)[0]
        absolute("hemispherical emissivity vs scipy quad (abs)",
                 call(lib, "bt_emissivity_hemispherical", n, k), want)
    for _ in range(40):
        r, lam, fno = float(rng.uniform(0, 200)), float(rng.uniform(0.5, 14)), float(rng.uniform(0.7, 8))
        v = math.pi * r / (lam * fno)
        want = 1 - special.j0(v) ** 2 - special.j1(v) ** 2
        absolute("airy encircled energy vs scipy (abs)", call(lib, "bt_airy_encircled_energy", r, lam, fno), want)

    class Mtf(ctypes.Structure):
        _fields_ = [("diffraction", d), ("pixel", d), ("system", d)]

    lib.bt_mtf_evaluate.argtypes = [d, d, d, d, ctypes.POINTER(Mtf)]
    lib.bt_mtf_evaluate.restype = ctypes.c_int
    for _ in range(40):
        nu, p, lam, fno = (float(x) for x in (rng.uniform(0, 120), rng.uniform(5, 30), rng.uniform(3, 14), rng.uniform(0.8, 2)))
        x = nu * lam * fno / 1000.0
        dif = 0.0 if x >= 1 else 2 / math.pi * (math.acos(x) - x * math.sqrt(1 - x * x))
        pix = abs(np.sinc(p * 1e-3 * nu))
        out = Mtf(-1.0, -1.0, -1.0)
        if lib.bt_mtf_evaluate(nu, p, lam, fno, ctypes.byref(out)) != 0:
            raise RuntimeError("bt_mtf_evaluate failed")
        absolute("system mtf vs numpy (abs)", out.system, dif * pix)


def main():
    root = os.path.dirname(os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__)))))
    default = os.path.join(root, "target", "release", "libbandtemp_capi.so")
    path = sys.argv[1] if len(sys.argv) > 1 else default
    lib = load(path)
    print(f"bandtemp {lib.bt_version().decode()} from {path}")
    rng = np.random.default_rng(20240611)
    tally = Tally()

    # Rectangular bands: 150 cases, energy and photon detectors.
    for case in range(150):
        photon = case % 2 == 1
        lo = float(rng.uniform(0.7, 12.0))
        hi = lo + float(rng.uniform(0.05, 8.0))
        t = float(rng.uniform(200.0, 3000.0))
        band = Band(lo, hi, 1 if photon else 0, None, None, 0)
        want = band_mpmath(lo, hi, t, photon)
        tally.rel("references agree", band_quad(lo, hi, t, photon), want)
        got = call(lib, "bt_band_radiance", ctypes.byref(band), t)
        tally.rel("band radiance vs mpmath", got, want)
        tally.rel("band radiance vs scipy quad", got, band_quad(lo, hi, t, photon))
        tally.rel("band temperature", call(lib, "bt_band_temperature", ctypes.byref(band), float(want)), t)

    # Tabulated responses: 40 cases of 3-7 nodes with random positive responses.
    for _ in range(40):
        n = int(rng.integers(3, 8))
        nodes = np.sort(rng.uniform(2.0, 14.0, n))
        if np.any(np.diff(nodes) <= 1e-3):
            continue
        response = rng.uniform(0.0, 1.0, n)
        lo, hi = float(nodes[0] - rng.uniform(0, 1)), float(nodes[-1] + rng.uniform(0, 1))
        t = float(rng.uniform(250.0, 1500.0))
        wl_c = (ctypes.c_double * n)(*nodes)
        r_c = (ctypes.c_double * n)(*response)
        band = Band(lo, hi, 0, wl_c, r_c, n)
        got = call(lib, "bt_band_radiance", ctypes.byref(band), t)
        tally.rel("tabulated radiance vs scipy quad", got, band_quad(lo, hi, t, False, list(nodes), list(response)))
        tally.rel("tabulated radiance vs mpmath quad", got, band_table_mpmath(lo, hi, t, list(nodes), list(response)))
        ref = band_quad(lo, hi, t, False, list(nodes), list(response))
        tally.rel("band temperature", call(lib, "bt_band_temperature", ctypes.byref(band), ref), t)

    # The measurement equation: 100 scenes over an 8-14 um or 3-5 um band.
    for case in range(100):
        lo, hi = (8.0, 14.0) if case % 2 == 0 else (3.0, 5.0)
        band = Band(lo, hi, 0, None, None, 0)
        e = float(rng.uniform(0.3, 1.0))
        ta = float(rng.uniform(0.5, 1.0))
        tw = float(rng.uniform(0.5, 1.0))
        rw = float(rng.uniform(0.0, min(0.3, 1.0 - tw)))
        tr, tatm, twin, twr = (float(x) for x in rng.uniform(250.0, 330.0, 4))
        t = float(rng.uniform(350.0, 1200.0))
        scene = Scene(e, tr, ta, tatm, tw, rw, twin, twr)

        def lb(temperature):
            return band_mpmath(lo, hi, temperature, False)

        s_ref = tw * (ta * (e * lb(t) + (1 - e) * lb(tr)) + (1 - ta) * lb(tatm)) + rw * lb(twr) + (1 - tw - rw) * lb(twin)
        got = call(lib, "bt_sensor_radiance", ctypes.byref(band), ctypes.byref(scene), t)
        tally.rel("sensor radiance vs written-out equation", got, s_ref)
        got = call(lib, "bt_object_temperature", ctypes.byref(band), ctypes.byref(scene), float(s_ref))
        tally.rel("object temperature", got, t)

    # Sakuma-Hattori: 150 curves with A 0.6-14 um, B -50..150 um K, C 1e2..1e9.
    for _ in range(150):
        a = float(rng.uniform(0.6, 14.0))
        b = float(rng.uniform(-50.0, 150.0))
        c = float(10 ** rng.uniform(2, 9))
        t = float(rng.uniform(250.0, 2500.0))
        curve = SakumaHattori(a, b, c)
        s_ref = mp.mpf(c) / mp.expm1(C2_UMK / (mp.mpf(a) * t + mp.mpf(b)))
        if s_ref < mp.mpf("1e-300"):
            continue
        got = call(lib, "bt_sakuma_hattori_signal", ctypes.byref(curve), t)
        tally.rel("sakuma-hattori signal vs mpmath", got, s_ref)
        s = float(s_ref)
        t_ref = (C2_UMK / mp.log1p(mp.mpf(c) / mp.mpf(s)) - mp.mpf(b)) / mp.mpf(a)
        got = call(lib, "bt_sakuma_hattori_temperature", ctypes.byref(curve), s)
        tally.rel("sakuma-hattori temperature vs mpmath", got, t_ref)

    check_rest(lib, rng, tally)

    # Calibration checks: a curve fitted to a band, against the band model over its range,
    # on 21 temperatures; and the uncertainty of a curve from a covariance.
    for lo, hi, t_lo, t_hi in [(8.0, 14.0, 250.0, 500.0), (3.0, 5.0, 300.0, 900.0), (0.8, 1.1, 900.0, 2000.0)]:
        band = Band(lo, hi, 0, None, None, 0)
        curve = SakumaHattori()
        fit_error = ctypes.c_double()
        status = lib.bt_sakuma_hattori_fit_band(
            ctypes.byref(band), t_lo, t_hi, ctypes.byref(curve), ctypes.byref(fit_error)
        )
        if status != 0:
            raise RuntimeError(f"bt_sakuma_hattori_fit_band: status {status}")
        report = CurveReport()
        status = lib.bt_verify_curve_band(
            ctypes.byref(curve), 0.0, ctypes.byref(band), 1.0, 0.0, t_lo, t_hi, 21, ctypes.byref(report)
        )
        if status != 0:
            raise RuntimeError(f"bt_verify_curve_band: status {status}")
        a, b, c = (mp.mpf(x) for x in (curve.a_um, curve.b_umk, curve.c))
        worst = mp.mpf(0)
        for i in range(21):
            t = t_hi if i == 20 else t_lo + (t_hi - t_lo) * (i / 20.0)
            lb = band_mpmath(lo, hi, t, False)
            err = (C2_UMK / mp.log1p(c / lb) - b) / a - t
            worst = max(worst, abs(err))
        tally.rel("verify curve max error vs mpmath", report.max_abs_error_k, worst)

        # Standard deviations 1e-3 A, 0.5 um K, 1e-3 C and correlations -0.9 (A, B),
        # -0.5 (A, C), 0.6 (B, C): positive definite (determinant of the correlations 0.12).
        sd = [1e-3 * curve.a_um, 0.5, 1e-3 * curve.c]
        rho = [[1.0, -0.9, -0.5], [-0.9, 1.0, 0.6], [-0.5, 0.6, 1.0]]
        cov = [sd[r] * rho[r][k] * sd[k] for r in range(3) for k in range(3)]
        cov_c = (ctypes.c_double * 9)(*cov)
        unc = UncertaintyReport()
        status = lib.bt_verify_uncertainty_sakuma_hattori(
            ctypes.byref(curve), cov_c, t_lo, t_hi, 3, ctypes.byref(unc)
        )
        if status != 0:
            raise RuntimeError(f"bt_verify_uncertainty_sakuma_hattori: status {status}")
        for t, got in ((t_lo, unc.lo_u_k), (t_hi, unc.hi_u_k)):
            s_t = c / mp.expm1(C2_UMK / (a * t + b))

            def temp(pa, pb, pc):
                return (C2_UMK / mp.log1p(pc / s_t) - pb) / pa

            j = [
                mp.diff(lambda x: temp(x, b, c), a),
                mp.diff(lambda x: temp(a, x, c), b),
                mp.diff(lambda x: temp(a, b, x), c),
            ]
            var = sum(j[r] * mp.mpf(cov[3 * r + k]) * j[k] for r in range(3) for k in range(3))
            tally.rel("verify uncertainty vs mpmath", got, mp.sqrt(var))

    optics_checks(lib, rng, tally)
    multi_point_checks(lib, rng, tally)

    # Self-emission: effective exponent and net signal, 40 cases over LWIR and MWIR bands.
    for case in range(40):
        lo, hi = (8.0, 14.0) if case % 2 == 0 else (3.0, 5.0)
        band = Band(lo, hi, 0, None, None, 0)
        t = float(rng.uniform(220.0, 600.0))
        n_ref = t * mp.diff(lambda tt: band_mpmath(lo, hi, tt, False), mp.mpf(t)) / band_mpmath(lo, hi, t, False)
        tally.rel("effective exponent vs mpmath", call(lib, "bt_effective_exponent_band", ctypes.byref(band), t), n_ref)
        e = float(rng.uniform(0.1, 1.0))
        to, tr, ti = (float(x) for x in rng.uniform(250.0, 400.0, 3))
        terms = [e * band_mpmath(lo, hi, to, False), (1 - e) * band_mpmath(lo, hi, tr, False), band_mpmath(lo, hi, ti, False)]
        want = terms[0] + terms[1] - terms[2]
        got = call(lib, "bt_net_signal_band", ctypes.byref(band), e, to, tr, ti)
        # Compared relative to the largest term (the difference may be near zero).
        scale = max(abs(x) for x in terms)
        tally.rel("net signal vs written-out exchange", 1.0 + float((got - want) / scale), 1.0)

    for what, worst in tally.worst.items():
        print(f"  {what}: max rel err {worst:.2e} (tolerance {TOL[what]:.0e})")
    print(f"{tally.passed} passed, {tally.failed} failed")
    return 0 if tally.failed == 0 and tally.passed > 0 else 1


if __name__ == "__main__":
    sys.exit(main())
