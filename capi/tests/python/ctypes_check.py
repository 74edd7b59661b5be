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
- the Sakuma-Hattori signal and its closed-form inverse in mpmath at 40 digits.

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
        "bt_effective_exponent_band": [ctypes.POINTER(Band), d, p],
        "bt_net_signal_band": [ctypes.POINTER(Band), d, d, d, d, p],
    }
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

    def rel(self, what, got, want):
        want = float(want)
        err = abs(got - want) / abs(want)
        self.worst[what] = max(self.worst.get(what, 0.0), err)
        if err <= TOL[what]:
            self.passed += 1
        else:
            self.failed += 1
            print(f"FAIL {what}: got {got!r}, want {want!r}, rel err {err:.3g}")


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
