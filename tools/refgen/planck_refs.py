#!/usr/bin/env python3
"""Reference vectors for bandtemp's Planck laws and band integrals (tests/data/*.csv).

Every value is computed with mpmath at DPS = 50 significant digits from the exact
CODATA 2018 (SI 2019) constants h = 6.62607015e-34 J s, c = 299792458 m/s,
k = 1.380649e-23 J/K, and, where it is cheap, two independent ways:

  A. closed forms with mpmath.polylog: with x = c2/(lambda T) and q = exp(-x),
       G1(x) = int_x^inf t   /(e^t-1) dt = x Li1(q) + Li2(q)
       G2(x) = int_x^inf t^2 /(e^t-1) dt = x^2 Li1(q) + 2x Li2(q) + 2 Li3(q)
       G3(x) = int_x^inf t^3 /(e^t-1) dt = x^3 Li1(q) + 3x^2 Li2(q) + 6x Li3(q) + 6 Li4(q)
     (Li1(q) = -ln(1 - q)); a band of a rectangular or piecewise-linear response is a sum
     of differences of these.
  B. mpmath.quad (tanh-sinh, at QUAD_DPS = 40 digits) of the integrand itself, split
     into pieces no wider than STEP = 4 in x (the integrand's nearest singularities are the poles at +-2 pi i, so
     each piece converges to working precision), with the Wien tail cut only where a
     rigorous bound on what is left is below 1e-42 of the value.

Generation stops with an error if A and B differ by more than AGREE relative. Inputs
(wavelengths, band edges, temperatures, table nodes) are doubles, and the references
are computed for those exact binary values, so a Rust test that parses the same decimal
strings integrates exactly the same problem. Random inputs come from random.Random(SEED):
the output is deterministic.

Usage:
  python3 tools/refgen/planck_refs.py            # (re)write tests/data/*.csv
  python3 tools/refgen/planck_refs.py --check    # recompute a sample; exit 1 on any
                                                 # disagreement above 1e-13 relative

The tabulated spectral responses are INVENTED for testing (smooth shapes with seeded
noise); they describe no real instrument.
"""

import argparse
import math
import os
import random
import sys

import mpmath as mp
from mpmath import mpf

DPS = 50
SEED = 20180520  # fixed: the SI redefinition date, nothing more
AGREE = mpf("1e-32")  # required agreement of methods A and B
CHECK_TOLERANCE = 1e-13  # --check: stored vs recomputed, relative
QUAD_DPS = 40  # working digits of method B
STEP = mpf(4)  # widest quadrature piece in x for method B
GENERATOR = "tools/refgen/planck_refs.py"

mp.mp.dps = DPS

# CODATA 2018 exact defining constants (SI 2019).
H = mpf("6.62607015e-34")  # J s
C = mpf(299792458)  # m s^-1
K = mpf("1.380649e-23")  # J K^-1
C2 = H * C / K * mpf(10) ** 6  # um K
C1L = 2 * H * C**2 * mpf(10) ** 24  # W um^4 m^-2 sr^-1 (radiance per um)
C1P = 2 * C * mpf(10) ** 18  # photons s^-1 um^3 m^-2 sr^-1 (photon radiance per um)
MIN_NORMAL = 2.2250738585072014e-308
DATA_DIR = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "tests", "data")


# ---------------------------------------------------------------- closed forms (method A)
def li1(q):
    return -mp.log1p(-q)


def tail_closed(m, x):
    """int_x^inf t^m/(e^t-1) dt for m = 1, 2, 3 by polylogarithms."""
    x = mpf(x)
    q = mp.exp(-x)
    l1, l2, l3 = li1(q), mp.polylog(2, q), mp.polylog(3, q)
    if m == 1:
        return x * l1 + l2
    if m == 2:
        return x**2 * l1 + 2 * x * l2 + 2 * l3
    return x**3 * l1 + 3 * x**2 * l2 + 6 * x * l3 + 6 * mp.polylog(4, q)


def total_moment(m):
    """int_0^inf t^m/(e^t-1) dt = m! zeta(m+1)."""
    return mp.factorial(m) * mp.zeta(m + 1)


# ---------------------------------------------------------------- quadrature (method B)
def tail_bound(m, c):
    """Upper bound of int_c^inf t^m/(e^t-1) dt: e^-c poly(c) / (1 - e^-c)."""
    poly = {1: c + 1, 2: c**2 + 2 * c + 2, 3: c**3 + 3 * c**2 + 6 * c + 6}[m]
    return poly * mp.exp(-c) / -mp.expm1(-c)


def pieces(a, b):
    points = [a]
    while points[-1] + STEP < b:
        points.append(points[-1] + STEP)
    points.append(b)
    return points


def moment_quad(m, a, b):
    """int_a^b t^m/(e^t-1) dt (b may be mp.inf) by split tanh-sinh quadrature."""
    with mp.workdps(QUAD_DPS):
        return +_moment_quad(m, a, b)


def _moment_quad(m, a, b):
    a = mpf(a)
    total = mpf(0)
    lower = a
    while lower < b:
        upper = min(lower + STEP, b)
        # Factor e^-lower out of each piece, so the quadrature sees values of order one
        # (its convergence test is absolute) even deep in the Wien tail.
        def scaled(t, lower=lower):
            return t**m * mp.exp(lower - t) / -mp.expm1(-t)

        total += mp.quad(scaled, [lower, upper]) * mp.exp(-lower)
        lower = upper
        if b == mp.inf or lower < b:
            if total > 0 and tail_bound(m, lower) < mpf("1e-42") * total:
                break
    return total


def agree(a, b, what):
    scale = max(abs(a), abs(b))
    if scale != 0 and abs(a - b) > AGREE * scale:
        raise SystemExit(f"methods disagree for {what}: {mp.nstr(a, 25)} vs {mp.nstr(b, 25)}")
    return a


# ---------------------------------------------------------------- physical quantities
def spectral(detector, lam, t):
    lam, t = mpf(lam), mpf(t)
    x = C2 / (lam * t)
    if detector == "energy":
        return C1L / lam**5 / mp.expm1(x)
    return C1P / lam**4 / mp.expm1(x)


def spectral_derivative_closed(detector, lam, t):
    lam, t = mpf(lam), mpf(t)
    x = C2 / (lam * t)
    return spectral(detector, lam, t) * x / (t * -mp.expm1(-x))


def scale(detector, t):
    """Band-integral scale c1 T^(m+1)/c2^(m+1) (m = 3 energy, 2 photon)."""
    t = mpf(t)
    if detector == "energy":
        return C1L * (t / C2) ** 4
    return C1P * (t / C2) ** 3


def moment(detector):
    return 3 if detector == "energy" else 2


def band_closed(detector, lo, hi, t):
    m = moment(detector)
    t = mpf(t)
    xa, xb = C2 / (mpf(hi) * t), C2 / (mpf(lo) * t)
    return scale(detector, t) * (tail_closed(m, xa) - tail_closed(m, xb))


def band_quad(detector, lo, hi, t):
    m = moment(detector)
    t = mpf(t)
    xa, xb = C2 / (mpf(hi) * t), C2 / (mpf(lo) * t)
    return scale(detector, t) * moment_quad(m, xa, xb)


def band_value(detector, lo, hi, t):
    a = band_closed(detector, lo, hi, t)
    b = band_quad(detector, lo, hi, t)
    return agree(a, b, f"band {detector} [{lo}, {hi}] at {t} K")


def band_derivative(detector, lo, hi, t):
    """dL_band/dT, by differentiating the closed form (mpmath.diff) at DPS digits."""
    return mp.diff(lambda tt: band_closed(detector, lo, hi, tt), mpf(t))


# ---------------------------------------------------------------- tabulated response
def overlap_segments(nodes_um, values, lo, hi):
    """Linear pieces (w0, w1, r0, r1) of the response over [lo, hi] ∩ table span."""
    a = max(mpf(lo), mpf(nodes_um[0]))
    b = min(mpf(hi), mpf(nodes_um[-1]))
    out = []
    for i in range(len(nodes_um) - 1):
        w0, w1 = mpf(nodes_um[i]), mpf(nodes_um[i + 1])
        r0, r1 = mpf(values[i]), mpf(values[i + 1])
        lo_s, hi_s = max(w0, a), min(w1, b)
        if lo_s >= hi_s:
            continue
        slope = (r1 - r0) / (w1 - w0)
        out.append((lo_s, hi_s, r0 + slope * (lo_s - w0), r0 + slope * (hi_s - w0)))
    return out


def tabulated_closed(detector, nodes_um, values, lo, hi, t):
    """Sum over linear pieces r = alpha + beta*lambda of closed-form moment differences:
    int (alpha + beta lambda) c1 lambda^-p/(e^x-1) dlambda
      = alpha c1 T^(m+1)/c2^(m+1) dG_m + beta c1 T^m/c2^m dG_(m-1)."""
    m = moment(detector)
    c1 = C1L if detector == "energy" else C1P
    t = mpf(t)
    total = mpf(0)
    for w0, w1, r0, r1 in overlap_segments(nodes_um, values, lo, hi):
        beta = (r1 - r0) / (w1 - w0)
        alpha = r0 - beta * w0
        xa, xb = C2 / (w1 * t), C2 / (w0 * t)
        d_m = tail_closed(m, xa) - tail_closed(m, xb)
        d_m1 = tail_closed(m - 1, xa) - tail_closed(m - 1, xb)
        total += alpha * c1 * (t / C2) ** (m + 1) * d_m + beta * c1 * (t / C2) ** m * d_m1
    return total


def tabulated_quad(detector, nodes_um, values, lo, hi, t):
    """Direct quadrature in wavelength of r(lambda) L(lambda, T), split at every table node
    and into pieces no wider than STEP in x."""
    t = mpf(t)
    total = mpf(0)
    for w0, w1, r0, r1 in overlap_segments(nodes_um, values, lo, hi):
        slope = (r1 - r0) / (w1 - w0)

        def f(lam, w0=w0, r0=r0, slope=slope):
            return (r0 + slope * (lam - w0)) * spectral(detector, lam, t)

        xa, xb = C2 / (w1 * t), C2 / (w0 * t)
        cuts = [C2 / (x * t) for x in pieces(xa, xb)]  # decreasing wavelengths
        with mp.workdps(QUAD_DPS):
            for upper, lower in zip(cuts, cuts[1:]):
                # Normalise by the spectral radiance at the piece's end: the quadrature's
                # convergence test is absolute, and radiances go down to 1e-300.
                unit = spectral(detector, upper, t)
                total += mp.quad(lambda lam, f=f, unit=unit: f(lam) / unit, [lower, upper]) * unit
    return total


def tabulated_value(detector, table, lo, hi, t):
    nodes_um, values = table
    a = tabulated_closed(detector, nodes_um, values, lo, hi, t)
    b = tabulated_quad(detector, nodes_um, values, lo, hi, t)
    return agree(a, b, f"tabulated {detector} [{lo}, {hi}] at {t} K")


def invented_tables():
    """Invented relative spectral responses (test data only, no real instrument)."""
    rng = random.Random(SEED + 1)
    tables = {}

    # 100 points, 7.0-14.5 um: a smooth plateau with seeded ripple, zero at both ends.
    nodes = [round(7.0 + 7.5 * i / 99, 6) for i in range(100)]
    vals = []
    for i, w in enumerate(nodes):
        edge = min(1.0, (w - 7.0) / 0.8, (14.5 - w) / 1.2)
        v = max(0.0, edge) * (0.85 + 0.1 * math.sin(w * 2.1) + 0.04 * rng.random())
        vals.append(0.0 if i in (0, 99) else round(v, 5))
    tables["invented_lwir_100"] = (nodes, vals)

    # 20 points, 3.0-5.2 um: a rising photon-detector-like response with a cut-off.
    nodes = [round(3.0 + 2.2 * i / 19, 6) for i in range(20)]
    vals = [round(max(0.0, (w / 5.0) * (1.0 - math.exp((w - 5.2) * 6.0))) + 0.01 * rng.random(), 5) for w in nodes]
    vals[-1] = 0.0
    tables["invented_mwir_20"] = (nodes, vals)

    # 12 points, 0.80-1.10 um, irregular spacing: a short-wave pyrometer filter.
    nodes = sorted(round(0.80 + 0.30 * rng.random(), 6) for _ in range(10)) + [0.8, 1.1]
    nodes = sorted(set(nodes))
    vals = [round(math.sin(math.pi * (w - 0.8) / 0.3) ** 2 + 0.02 * rng.random(), 5) for w in nodes]
    tables["invented_nir_irregular"] = (nodes, vals)

    # 5 points, 1.45-1.80 um: a coarse triangle-and-shoulder.
    tables["invented_swir_5"] = ([1.45, 1.52, 1.6, 1.71, 1.8], [0.0, 0.7, 1.0, 0.4, 0.0])
    return tables


# ---------------------------------------------------------------- rows
def fmt(v):
    return repr(float(v))


def spectral_rows(rng):
    rows = []
    wavelengths = [0.3, 0.5, 0.65, 1.0, 1.55, 2.2, 3.9, 4.0, 8.0, 10.0, 10.6, 14.0, 30.0, 100.0]
    temps = [77.0, 150.0, 273.15, 300.0, 1000.0, 3000.0, 5778.0]
    pairs = [(w, t) for w in wavelengths for t in temps]
    for _ in range(60):
        w = round(10 ** rng.uniform(math.log10(0.2), math.log10(200.0)), 6)
        t = round(10 ** rng.uniform(math.log10(20.0), math.log10(10000.0)), 4)
        pairs.append((w, t))
    for w, t in pairs:
        for det in ("energy", "photon"):
            rows.append((det, w, t))
    return rows


def spectral_eval(row):
    det, w, t = row
    value = spectral(det, w, t)
    # Independent check: photon = energy * lambda / (h c) (lambda in m).
    if det == "photon":
        alt = spectral("energy", w, t) * mpf(w) * mpf("1e-6") / (H * C)
    else:
        alt = spectral("photon", w, t) * H * C / (mpf(w) * mpf("1e-6"))
    agree(value, alt, f"spectral {row}")
    deriv = spectral_derivative_closed(det, w, t)
    agree(deriv, mp.diff(lambda tt: spectral(det, w, tt), mpf(t)), f"spectral derivative {row}")
    if not (MIN_NORMAL <= value < 1e308 and MIN_NORMAL <= deriv < 1e308):
        return None
    return [fmt(value), fmt(deriv)]


def fraction_rows(rng):
    grid = [10.0 * 10 ** (5 * i / 80) for i in range(81)]  # 10 .. 1e6 um K, log-uniform
    handbook = [1000.0, 1500.0, 2000.0, 2897.771955, 3000.0, 4000.0, 5000.0, 10000.0, 50000.0]
    extra = [round(10 ** rng.uniform(1.0, 6.0), 4) for _ in range(24)]
    return [(round(v, 6),) for v in grid + handbook + extra]


def fraction_eval(row):
    (lt,) = row
    x = C2 / mpf(lt)
    total3, total2 = total_moment(3), total_moment(2)
    tail3 = agree(tail_closed(3, x), moment_quad(3, x, mp.inf), f"F tail {lt}")
    head3 = total3 - tail3
    head3_q = moment_quad(3, mpf(0), x) if x < 60 else head3
    agree(head3, head3_q, f"F head {lt}")
    tail2 = agree(tail_closed(2, x), moment_quad(2, x, mp.inf), f"photon F tail {lt}")
    return [fmt(tail3 / total3), fmt(head3 / total3), fmt(tail2 / total2)]


BANDS = [
    # wide
    (0.3, 30.0), (8.0, 14.0), (7.5, 13.0), (3.0, 5.0), (0.3, 1.0), (14.0, 30.0),
    (1.0, 1.7), (2.0, 2.5), (0.9, 1.1), (3.9, 30.0),
    # narrow
    (10.0, 10.1), (3.9, 4.0), (0.65, 0.66), (1.55, 1.6), (29.0, 30.0),
    # very narrow
    (10.0, 10.001), (0.5, 0.5001), (3.9, 3.9005), (29.999, 30.0), (0.3, 0.30001), (4.0, 4.00001),
]
BAND_TEMPS = [150.0, 200.0, 273.15, 300.0, 500.0, 1000.0, 2000.0, 4000.0]


def band_rows(rng):
    bands = list(BANDS)
    for _ in range(12):
        lo = round(10 ** rng.uniform(math.log10(0.3), math.log10(29.0)), 5)
        rel = 10 ** rng.uniform(-4.0, 1.0)
        hi = round(min(30.0, lo * (1 + rel)), 6)
        if hi > lo:
            bands.append((lo, hi))
    rows = []
    for lo, hi in bands:
        temps = BAND_TEMPS + [round(rng.uniform(150.0, 4000.0), 3) for _ in range(3)]
        for t in temps:
            for det in ("energy", "photon"):
                rows.append((det, lo, hi, t))
    return rows


def band_eval(row):
    det, lo, hi, t = row
    value = band_value(det, lo, hi, t)
    deriv = band_derivative(det, lo, hi, t)
    if not (MIN_NORMAL <= value < 1e308 and MIN_NORMAL <= deriv < 1e308):
        return None
    return [fmt(value), fmt(deriv)]


def tabulated_rows(rng):
    tables = invented_tables()
    rows = []
    for name, (nodes, _) in tables.items():
        first, last = nodes[0], nodes[-1]
        span = last - first
        bands = [
            (first, last),  # the whole table
            (round(first - 0.5 * span, 4), round(last + 0.5 * span, 4)),  # band wider than table
            (round(first + 0.237 * span, 5), round(first + 0.61 * span, 5)),  # cuts segments
        ]
        for lo, hi in bands:
            temps = [150.0, 300.0, 1000.0, 4000.0] + [round(rng.uniform(150.0, 4000.0), 3)]
            for t in temps:
                for det in ("energy", "photon"):
                    rows.append((det, name, lo, hi, t))
    return rows


def tabulated_eval(row):
    det, name, lo, hi, t = row
    value = tabulated_value(det, invented_tables()[name], lo, hi, t)
    if not (MIN_NORMAL <= value < 1e308):
        return None
    return [fmt(value)]


def panel_rule_rows(rng):
    """Whole-table bands where the tabulated quadrature's 4-node rule reaches its widest
    panels (width 0.03 to 0.045 in x from a lower end a >= 1): the 100-point table at
    200-600 K (x = 1.7-10, panels 0.01-0.1 wide), the 20-point table at 1800-3400 K
    (x = 0.8-2.7, panels 0.03-0.1 wide, across the limit near a = 1-2, where the 4-node
    truncation is largest), and the 5-point table at 1500-8000 K (x = 1-6.6, segments
    0.05-0.45 wide, the response vanishing at the table's ends: 4 nodes on the widest
    would be 1e-12 off, so a rule far wider than its error argument shows)."""
    del rng  # fixed rows
    rows = []
    for name, temps in (("invented_lwir_100", [200.0, 250.0, 300.0, 400.0, 600.0]),
                        ("invented_mwir_20", [1800.0, 2200.0, 2600.0, 3000.0, 3400.0]),
                        ("invented_swir_5", [1500.0, 2000.0, 3000.0, 5000.0, 8000.0])):
        nodes, _ = invented_tables()[name]
        for t in temps:
            for det in ("energy", "photon"):
                rows.append((det, name, nodes[0], nodes[-1], t))
    return rows


def switch_rows(rng):
    """Bands placed on the switches of the crate's band integral (src/planck.rs
    moment_integral): the end x = c2/(lambda T) on either side of 2 (head and tail fits),
    the width in x on either side of 0.25 (one Gauss-Legendre panel or end differences),
    the lower end on either side of half the width, and ends deep in the Wien tail (x up
    to 690, short of where the crate refuses a band whose integral is below 1e-295)."""
    del rng  # deterministic placement
    c2 = float(C2)
    rows = []

    def band(a, b, t):
        # x = c2/(lambda T): the lower x is the upper wavelength.
        return (c2 / (b * t), c2 / (a * t), t)

    t = 1000.0
    cases = []
    for rel in (-1e-6, -1e-12, 1e-12, 1e-6):
        x = 2.0 * (1.0 + rel)
        cases += [band(x, 4.8, t), band(0.72, x, t), band(x, x + 0.3, t)]
    for a in (0.124, 0.13, 0.3, 1.0, 1.99, 2.01, 5.0, 40.0):
        for w in (0.25 * (1.0 - 1e-9), 0.25 * (1.0 + 1e-9), 0.03 * (1.0 - 1e-9), 0.03 * (1.0 + 1e-9)):
            cases.append(band(a, a + w, t))
    for w in (0.2, 0.02):
        for rel in (-1e-9, 1e-9):
            a = 0.5 * w * (1.0 + rel)
            cases.append(band(a, a + w, t))
    # Deep in the Wien tail, short of where the crate refuses a band as unresolved (an
    # integral below 1e-295 with the whole band beyond x = 1, from about x = 690 to 699
    # by the band's width).
    for a, b in ((680.0, 689.9), (685.0, 689.95), (686.0, 686.2), (686.5, 686.51)):
        cases.append(band(a, b, 20.0))
    for lo, hi, temp in cases:
        for det in ("energy", "photon"):
            rows.append((det, round(lo, 12), round(hi, 12), temp))
    return rows


# ---------------------------------------------------------------- files
HEADER = """# Generated by {gen} (mpmath {ver}, {dps} digits, seed {seed}); do not edit.
# Constants: CODATA 2018 exact h = 6.62607015e-34 J s, c = 299792458 m/s, k = 1.380649e-23 J/K.
# {what}
# Method: {method}
# Inputs are doubles (the decimal text below parses to the exact input used); each value
# is the mpmath result rounded once to the nearest double.
"""

FILES = {
    "spectral_radiance.csv": dict(
        rows=spectral_rows, eval=spectral_eval,
        columns="detector,wavelength_um,temperature_k,radiance,dradiance_dt",
        what="Spectral radiance (W m^-2 sr^-1 um^-1; photon: photons s^-1 m^-2 sr^-1 um^-1) and its T derivative.",
        method="Planck's law directly; checked against the other detector's law times lambda/(hc) "
        "and the derivative against mpmath.diff. Rows whose values are not normal doubles are omitted.",
    ),
    "blackbody_fraction.csv": dict(
        rows=fraction_rows, eval=fraction_eval,
        columns="lambda_t_umk,fraction,complement,photon_fraction",
        what="Blackbody fraction F(0->lambda T) = 15/pi^4 int_x^inf t^3/(e^t-1), its complement, "
        "and the photon fraction 1/(2 zeta 3) int_x^inf t^2/(e^t-1); x = c2/(lambda T).",
        method="A polylog closed form, B split tanh-sinh quadrature to infinity; agree to 1e-32. "
        "Values below the normal double range are written as they round (possibly 0 or subnormal).",
    ),
    "band_radiance.csv": dict(
        rows=band_rows, eval=band_eval,
        columns="detector,lo_um,hi_um,temperature_k,radiance,dradiance_dt",
        what="Rectangular band radiance int_lo^hi L dlambda (W m^-2 sr^-1; photon: photons s^-1 m^-2 sr^-1) "
        "and its T derivative.",
        method="A polylog closed-form difference, B split tanh-sinh quadrature in x; agree to 1e-32. "
        "Derivative: mpmath.diff of A. Rows that are not normal doubles are omitted.",
    ),
    "band_switch_points.csv": dict(
        rows=switch_rows, eval=band_eval,
        columns="detector,lo_um,hi_um,temperature_k,radiance,dradiance_dt",
        what="Rectangular band radiance and its T derivative on the switches of the band integral "
        "(x = 2, width 0.25 and 0.03 in x, lower end at half the width, x up to 690).",
        method="A polylog closed-form difference, B split tanh-sinh quadrature in x; agree to 1e-32. "
        "Derivative: mpmath.diff of A. Rows that are not normal doubles are omitted.",
    ),
    "tabulated_band_radiance.csv": dict(
        rows=tabulated_rows, eval=tabulated_eval,
        columns="detector,table,lo_um,hi_um,temperature_k,radiance",
        what="Band radiance over INVENTED piecewise-linear responses (tests/data/response_<table>.csv), "
        "integrated over [lo, hi] ∩ table span, response zero outside the table.",
        method="A per-segment closed form (r = alpha + beta lambda -> polylog differences of moments m and m-1), "
        "B tanh-sinh quadrature in lambda split at every node and every 4 in x; agree to 1e-32.",
    ),
    "tabulated_panel_rules.csv": dict(
        rows=panel_rule_rows, eval=tabulated_eval,
        columns="detector,table,lo_um,hi_um,temperature_k,radiance",
        what="Band radiance over INVENTED piecewise-linear responses (tests/data/response_<table>.csv) "
        "where the tabulated quadrature's widest 4-node panels occur (width up to 0.045 in x from x >= 1).",
        method="A per-segment closed form (r = alpha + beta lambda -> polylog differences of moments m and m-1), "
        "B tanh-sinh quadrature in lambda split at every node and every 4 in x; agree to 1e-32.",
    ),
}


def build_rows(name):
    rng = random.Random(f"{SEED}-{name}")
    return FILES[name]["rows"](rng)


def row_text(row):
    return [fmt(v) if isinstance(v, float) else str(v) for v in row]


def write_all(only):
    os.makedirs(DATA_DIR, exist_ok=True)
    for name, (nodes, vals) in invented_tables().items():
        with open(os.path.join(DATA_DIR, f"response_{name}.csv"), "w") as out:
            out.write(f"# INVENTED relative spectral response for tests; generated by {GENERATOR} "
                      f"(seed {SEED}). Describes no real instrument.\n")
            out.write("wavelength_um,response\n")
            for w, v in zip(nodes, vals):
                out.write(f"{fmt(w)},{fmt(v)}\n")
    for name, spec in FILES.items():
        if only and name not in only:
            continue
        lines = []
        for row in build_rows(name):
            values = spec["eval"](row)
            if values is not None:
                lines.append(",".join(row_text(row) + values))
        with open(os.path.join(DATA_DIR, name), "w") as out:
            out.write(HEADER.format(gen=GENERATOR, ver=mp.__version__, dps=DPS, seed=SEED,
                                    what=spec["what"], method=spec["method"]))
            out.write(spec["columns"] + "\n")
            out.write("\n".join(lines) + "\n")
        print(f"wrote {name}: {len(lines)} rows", file=sys.stderr)


def rel_diff(a, b):
    a, b = float(a), float(b)
    if a == b:
        return 0.0
    if abs(a) < MIN_NORMAL and abs(b) < MIN_NORMAL:
        return 0.0  # both below the normal range: the tests treat them as underflow
    return abs(a - b) / max(abs(a), abs(b))


def check(stride):
    failures = 0
    compared = 0
    for name, (nodes, vals) in invented_tables().items():
        with open(os.path.join(DATA_DIR, f"response_{name}.csv")) as f:
            stored = [ln.strip() for ln in f if ln.strip() and not ln.startswith("#")][1:]
        expect = [f"{fmt(w)},{fmt(v)}" for w, v in zip(nodes, vals)]
        if stored != expect:
            print(f"FAIL response_{name}.csv differs from the generator's table")
            failures += 1
    for name, spec in FILES.items():
        with open(os.path.join(DATA_DIR, name)) as f:
            lines = [ln.strip() for ln in f if ln.strip() and not ln.startswith("#")]
        header, stored = lines[0], lines[1:]
        if header != spec["columns"]:
            print(f"FAIL {name}: header {header!r}")
            failures += 1
            continue
        stored_by_inputs = {}
        n_values = {"spectral_radiance.csv": 2, "blackbody_fraction.csv": 3,
                    "band_radiance.csv": 2, "band_switch_points.csv": 2,
                    "tabulated_band_radiance.csv": 1, "tabulated_panel_rules.csv": 1}[name]
        for ln in stored:
            cells = ln.split(",")
            stored_by_inputs[tuple(cells[:-n_values])] = cells[-n_values:]
        rows = build_rows(name)
        sample = rows[::stride] + rows[-1:]
        for row in sample:
            key = tuple(row_text(row))
            values = spec["eval"](row)
            if values is None:
                if key in stored_by_inputs:
                    print(f"FAIL {name}: {key} stored but not a normal double now")
                    failures += 1
                continue
            if key not in stored_by_inputs:
                print(f"FAIL {name}: inputs {key} missing from the stored file")
                failures += 1
                continue
            for new, old in zip(values, stored_by_inputs[key]):
                compared += 1
                if rel_diff(new, old) > CHECK_TOLERANCE:
                    print(f"FAIL {name}: {key}: stored {old}, recomputed {new}")
                    failures += 1
    print(f"checked {compared} values; {failures} failure(s)")
    return failures


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--check", action="store_true",
                        help="recompute a sample and compare with tests/data (exit 1 on disagreement)")
    parser.add_argument("--stride", type=int, default=17,
                        help="--check recomputes every STRIDE-th row of each file (default 17)")
    parser.add_argument("--only", nargs="*", choices=sorted(FILES), default=[],
                        help="write only these vector files (default: all)")
    args = parser.parse_args()
    if args.check:
        sys.exit(1 if check(max(1, args.stride)) else 0)
    write_all(args.only)


if __name__ == "__main__":
    main()
