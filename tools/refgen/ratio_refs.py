#!/usr/bin/env python3
"""Reference vectors for two-colour ratio pyrometry (tests/data/ratio_reference.csv).

Independent of the crate: band radiances are computed with mpmath at 40 digits from the
closed form of the Planck moment integrals in polylogarithms,

    int_x^inf t^3/(e^t-1) dt = x^3 Li1(e^-x) + 3x^2 Li2(e^-x) + 6x Li3(e^-x) + 6 Li4(e^-x)
    int_x^inf t^2/(e^t-1) dt = x^2 Li1(e^-x) + 2x Li2(e^-x) + 2 Li3(e^-x)

(term-by-term integration of t^m sum_k e^-kt), and each is cross-checked against
mpmath.quad on an interval split into 64 pieces (the script stops if they differ by more
than 1e-20 relative). Band radiance of a rectangular band [lo, hi] um at T K:
L = c1 T^(m+1)/c2^(m+1) int_{c2/(hi T)}^{c2/(lo T)} t^m/(e^t-1) dt, m = 3 with c1 = 2hc^2
(energy detector, W m^-2 sr^-1), m = 2 with c1 = 2c (photon detector); constants CODATA
2018 exact (h, c, k), c2 = hc/k.

Columns: kind (narrow|wide), detector1, lo1_um, hi1_um, detector2, lo2_um, hi2_um,
temperature_k, emissivity_ratio, ratio (= kappa L1/L2), log_slope (d ln R / d ln T, from
the analytic derivative of the band integrals), wien_temperature_k (the Wien closed form 1/T = (lambda_R/c2) ln(kappa W/R)
with lambda_i the band centre, D_i the width, W = c1_1 lambda1^-n1 D1 / (c1_2 lambda2^-n2 D2),
evaluated here from the tabulated ratio).

Run: python3 tools/refgen/ratio_refs.py > tests/data/ratio_reference.csv
"""
import sys
import mpmath as mp

mp.mp.dps = 40
H = mp.mpf("6.62607015e-34")
C = mp.mpf("299792458")
K = mp.mpf("1.380649e-23")
C2 = H * C / K * mp.mpf(10) ** 6              # um K
C1L = 2 * H * C**2 * mp.mpf(10) ** 24         # W um^4 m^-2 sr^-1
C1P = 2 * C * mp.mpf(10) ** 18                # photons s^-1 um^3 m^-2 sr^-1... per um^4 form


def tail_closed(m, x):
    q = mp.exp(-x)
    if m == 3:
        return x**3 * mp.polylog(1, q) + 3 * x**2 * mp.polylog(2, q) + 6 * x * mp.polylog(3, q) + 6 * mp.polylog(4, q)
    return x**2 * mp.polylog(1, q) + 2 * x * mp.polylog(2, q) + 2 * mp.polylog(3, q)


def moment_quad(m, a, b):
    f = lambda t: t**m / mp.expm1(t)
    pts = [a + (b - a) * i / 64 for i in range(65)]
    return mp.quad(f, pts)


def band(detector, lo, hi, t):
    """(L, d ln L / dT) of a rectangular band."""
    m = 3 if detector == "energy" else 2
    c1 = C1L if detector == "energy" else C1P
    xa, xb = C2 / (hi * t), C2 / (lo * t)
    closed = tail_closed(m, xa) - tail_closed(m, xb)
    quad = moment_quad(m, xa, xb)
    if abs(closed - quad) > mp.mpf("1e-20") * abs(closed):
        sys.exit(f"closed form and quadrature disagree: {closed} {quad}")
    # d/dT of c1 T^(m+1)/c2^(m+1) int_{xa}^{xb} f, with dx/dT = -x/T:
    # d ln L/dT = (m+1)/T + (xa f(xa) - xb f(xb)) / (T int f),  f = t^m/(e^t-1).
    f = lambda x: x**m / mp.expm1(x)
    dlog = (m + 1) / t + (xa * f(xa) - xb * f(xb)) / (t * closed)
    return c1 * t ** (m + 1) / C2 ** (m + 1) * closed, dlog


def wien_temperature(b1, b2, ratio, kappa):
    def factor(det, lo, hi):
        lam = (lo + hi) / 2
        if det == "energy":
            return lam, C1L / lam**5 * (hi - lo)
        return lam, C1P / lam**4 * (hi - lo)
    l1, f1 = factor(*b1)
    l2, f2 = factor(*b2)
    lam_r = l1 * l2 / (l2 - l1)
    return C2 / (lam_r * mp.log(kappa * (f1 / f2) / ratio))


CASES = [
    # kind, band1, band2, temperatures, emissivity ratios
    ("narrow", ("energy", mp.mpf("0.645"), mp.mpf("0.655")), ("energy", mp.mpf("0.895"), mp.mpf("0.905")),
     [1000, 1500, 2000, 3000], [1, mp.mpf("1.1")]),
    ("narrow", ("photon", mp.mpf("0.795"), mp.mpf("0.805")), ("photon", mp.mpf("0.995"), mp.mpf("1.005")),
     [900, 1400, 2500], [1, mp.mpf("0.9")]),
    ("wide", ("photon", mp.mpf("0.8"), mp.mpf("1.1")), ("photon", mp.mpf("1.1"), mp.mpf("1.7")),
     [900, 1400, 2000, 3000], [1, mp.mpf("1.15")]),
    ("wide", ("energy", mp.mpf("3.0"), mp.mpf("5.0")), ("energy", mp.mpf("8.0"), mp.mpf("14.0")),
     [400, 700, 1000, 1500], [1, mp.mpf("0.8")]),
    ("wide", ("energy", mp.mpf("1.0"), mp.mpf("3.0")), ("energy", mp.mpf("3.0"), mp.mpf("8.0")),
     [600, 1200, 2000], [1]),
]

print("kind,detector1,lo1_um,hi1_um,detector2,lo2_um,hi2_um,temperature_k,emissivity_ratio,"
      "ratio,log_slope,wien_temperature_k")
for kind, b1, b2, temps, kappas in CASES:
    for t in temps:
        t = mp.mpf(t)
        for kappa in kappas:
            kappa = mp.mpf(kappa)
            l1, d1 = band(*b1, t)
            l2, d2 = band(*b2, t)
            ratio = kappa * l1 / l2
            slope = t * (d1 - d2)
            tw = wien_temperature(b1, b2, ratio, kappa)
            row = [kind, b1[0], b1[1], b1[2], b2[0], b2[1], b2[2], t, kappa, ratio, slope, tw]
            print(",".join(x if isinstance(x, str) else mp.nstr(x, 20, min_fixed=-5, max_fixed=8) for x in row))
