#!/usr/bin/env python3
"""Polynomial fits behind bandtemp's moment integrals (src/planck/moment_fit.rs).

The band integrals of Planck's law reduce to the moment integrals
    H_m(x) = int_0^x t^m/(e^t-1) dt,   G_m(x) = int_x^inf t^m/(e^t-1) dt,   m = 2, 3,
and their edge terms need the Bernoulli function B(x) = x/(e^x-1). The crate evaluates
them with fixed-degree polynomials whose coefficients this script computes with mpmath
(40 digits) and writes as Rust source:

  head, 0 <= x <= 3, s = x^2 (B and H_m have poles only at x = +-2 pi i, i.e. s = -4 pi^2):
    B(x)   = 1 - x/2 + s PB(s),                 PB(s)   = sum_j c_j s^(j-1)
    H_m(x) = x^m (1/m - x/(2(m+1)) + s PH_m(s)), PH_m(s) = sum_j c_j s^(j-1)/(2j+m)
    (c_j = B_2j/(2j)!, Bernoulli numbers; both series converge for s < 4 pi^2)
  tail, x >= 3, q = e^-x in [0, e^-3] (the polylogarithms' only singularity is q = 1):
    G_2(x) = q (x^2 A1 + 2x A2 + 2 A3),  G_3(x) = q (x^3 A1 + 3x^2 A2 + 6x A3 + 6 A4),
    A_k(q) = Li_k(q)/q = sum_n q^n/(n+1)^k.

Each fit is the Chebyshev interpolant (mpmath.chebyfit) of the smallest degree whose
approximation error, after rounding the coefficients to doubles, is below 2^-56 relative
in the quantity that uses it (B, H_m or A_k). Reference values come from the series
above, cross-checked against closed forms (B from expm1, H_m from the polylogarithm form
m! zeta(m+1) - G_m, A_k from mpmath.polylog) to 1e-30.

For every fit the script reports, on a 1001-point grid plus the interval ends:
  approx: max relative error of the double-coefficient polynomial (evaluated exactly);
  horner: first-order bound of the rounding error of Horner's scheme in double precision,
          sum_i (2i+1) |c_i| z^i u / |p(z)|, u = 2^-53 (z >= 0 on every interval).

Usage:
  python3 tools/refgen/moment_fits.py           # (re)write src/planck/moment_fit.rs
  python3 tools/refgen/moment_fits.py --check   # refit, compare with the stored file
                                                # (coefficients within 4 ulp, same degrees)
                                                # and check the stored coefficients on a
                                                # seeded random sample; exit 1 on failure
"""

import argparse
import os
import random
import sys

import mpmath as mp
from mpmath import mpf

mp.mp.dps = 40
U = mpf(2) ** -53
TARGET = mpf(2) ** -56  # approximation error allowed per fit, relative
X_SPLIT = 3  # where the head fits give way to the tail fits (FIT_SPLIT_X in src/planck.rs)
S_MAX = X_SPLIT**2
Q_MAX = mp.exp(-X_SPLIT)
GRID = 1000
CHECK_LIMIT = 2 * U  # --check: stored coefficients against the series, relative
# ... except B near x = 3, where 1 - x/2 + s PB(s) cancels to B(3) = 0.157 of operands
# near 0.66: rounding PB's coefficients to doubles alone leaves 2.5e-16 there (B enters
# only the edge terms of the derivatives).
CHECK_LIMITS = {"BERNOULLI": 4 * U}
SEED = 20180520
OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "src", "planck", "moment_fit.rs")
GENERATOR = "tools/refgen/moment_fits.py"


def bernoulli_c(j):
    return mp.bernoulli(2 * j) / mp.factorial(2 * j)


C = [None] + [bernoulli_c(j) for j in range(1, 80)]


def pb(s):
    s = mpf(s)
    total, power = mpf(0), mpf(1)
    for j in range(1, 80):
        term = C[j] * power
        total += term
        if abs(term) < mpf(10) ** -45 * abs(total):
            break
        power *= s
    return total


def ph(m, s):
    s = mpf(s)
    total, power = mpf(0), mpf(1)
    for j in range(1, 80):
        term = C[j] * power / (2 * j + m)
        total += term
        if abs(term) < mpf(10) ** -45 * abs(total):
            break
        power *= s
    return total


def a_k(k, q):
    q = mpf(q)
    total, power = mpf(0), mpf(1)
    n = 1
    while True:
        term = power / mpf(n) ** k
        total += term
        if term < mpf(10) ** -45 * total:
            return total
        power *= q
        n += 1


def b_exact(x):
    x = mpf(x)
    return x / mp.expm1(x) if x != 0 else mpf(1)


def h_exact(m, x):
    x = mpf(x)
    q = mp.exp(-x)
    lis = [-mp.log1p(-q)] + [mp.polylog(k, q) for k in (2, 3, 4)]
    g = sum(mp.factorial(m) / mp.factorial(m - j) * x ** (m - j) * lis[j] for j in range(m + 1))
    return mp.factorial(m) * mp.zeta(m + 1) - g


# Quantities: (name, doc, variable range, fitted function, quantity(z, p) -> value that uses p)
def quantities():
    out = [
        (
            "BERNOULLI",
            f"PB(s): B(x) = x/(e^x - 1) = 1 - x/2 + s PB(s), s = x^2 in [0, {S_MAX}].",
            S_MAX,
            pb,
            lambda s, p: 1 - mp.sqrt(s) / 2 + s * p,
        )
    ]
    for m in (2, 3):
        out.append(
            (
                f"HEAD_{m}",
                f"PH_{m}(s): H_{m}(x) = x^{m} (1/{m} - x/{2 * (m + 1)} + s PH_{m}(s)), s = x^2 in [0, {S_MAX}].",
                S_MAX,
                (lambda m: lambda s: ph(m, s))(m),
                (lambda m: lambda s, p: mp.sqrt(s) ** m * (mpf(1) / m - mp.sqrt(s) / (2 * (m + 1)) + s * p))(m),
            )
        )
    for k in (1, 2, 3, 4):
        out.append(
            (
                f"POLYLOG_{k}",
                f"A{k}(q) = Li_{k}(q)/q, q = e^-x in [0, e^-{X_SPLIT}].",
                Q_MAX,
                (lambda k: lambda q: a_k(k, q))(k),
                lambda q, p: p,
            )
        )
    return out


def grid(hi):
    return [hi * mpf(i) / GRID for i in range(GRID + 1)]


def horner_exact(coeffs, z):
    acc = mpf(0)
    for c in reversed(coeffs):
        acc = acc * z + mpf(c)
    return acc


def measure(coeffs, hi, f, quantity, points):
    """(approx, horner) relative errors of double coefficients over `points`."""
    worst_approx, worst_horner = mpf(0), mpf(0)
    for z in points:
        if quantity(z, mpf(1)) == 0 and quantity(z, mpf(0)) == 0:
            continue  # the quantity vanishes (H_m at x = 0): no relative error there
        exact = f(z)
        approx = horner_exact(coeffs, z)
        value = quantity(z, exact)
        worst_approx = max(worst_approx, abs(quantity(z, approx) - value) / abs(value))
        bound = sum((2 * i + 1) * abs(mpf(c)) * z**i for i, c in enumerate(coeffs)) * U
        # The polynomial enters the quantity through s * p (head) or directly (tail):
        # its rounding error scales like its share of the quantity.
        share = abs(quantity(z, exact) - quantity(z, mpf(0))) / abs(value) if z != 0 else mpf(0)
        if quantity(z, mpf(0)) == 0:
            share = mpf(1)
        worst_horner = max(worst_horner, bound / abs(exact) * share)
    return worst_approx, worst_horner


def fit(hi, f, quantity):
    """Smallest degree whose truncation error (exact coefficients) is below TARGET; then
    the errors of its double coefficients on the full grid."""
    coarse = [hi * mpf(i) / 200 for i in range(201)]
    for n in range(4, 30):
        poly = mp.chebyfit(f, [0, hi], n)
        exact_coeffs = list(reversed(poly))
        truncation, _ = measure(exact_coeffs, hi, f, quantity, coarse)
        if truncation <= TARGET:
            coeffs = [float(c) for c in exact_coeffs]  # lowest degree first
            approx, horner = measure(coeffs, hi, f, quantity, grid(hi))
            return coeffs, truncation, approx, horner
    raise SystemExit("no fit reached the target")


def cross_check():
    for x in ("0.001", "0.37", "1.0", "1.9999", "2.9999"):
        x = mpf(x)
        s = x * x
        if abs(1 - x / 2 + s * pb(s) - b_exact(x)) > mpf(10) ** -30:
            raise SystemExit(f"Bernoulli series disagrees with x/expm1(x) at {x}")
        for m in (2, 3):
            head = x**m * (mpf(1) / m - x / (2 * (m + 1)) + s * ph(m, s))
            if abs(head - h_exact(m, x)) > mpf(10) ** -30 * abs(head):
                raise SystemExit(f"head series disagrees with the polylog form at m={m}, x={x}")
    for q in ("0.0001", "0.02", "0.0497"):
        q = mpf(q)
        for k in (1, 2, 3, 4):
            if abs(a_k(k, q) - mp.polylog(k, q) / q) > mpf(10) ** -30:
                raise SystemExit(f"A{k} series disagrees with polylog at q={q}")


def fmt(value):
    text = repr(float(value))
    mantissa, _, exponent = text.partition("e")
    sign = ""
    if mantissa.startswith("-"):
        sign, mantissa = "-", mantissa[1:]
    whole, _, frac = mantissa.partition(".")
    groups = [frac[i : i + 3] for i in range(0, len(frac), 3)]
    out = sign + whole + "." + "_".join(groups or ["0"])
    if exponent:
        out += "e" + exponent
    return out


def render(fits):
    lines = [
        f"//! Generated by {GENERATOR} (mpmath {mp.__version__}, 40 digits); do not edit.",
        "//!",
        "//! Coefficients, lowest degree first, of the polynomial fits behind the moment",
        "//! integrals (evaluated by `moment_end` in `crate::planck`). For each: the maximum",
        "//! relative truncation error of the fit with exact coefficients (`truncation`), the",
        "//! same with the coefficients rounded to doubles (`approx`; on a 1001-point grid and",
        "//! the ends), and a first-order bound of the rounding error of Horner's scheme in",
        "//! that quantity (`horner`). All relative to the quantity B, H_m or A_k.",
        "",
    ]
    for (name, doc, hi, _f, _q), (coeffs, truncation, approx, horner) in fits:
        lines.append(f"/// {doc}")
        lines.append(
            f"/// Degree {len(coeffs) - 1}; truncation {mp.nstr(truncation, 2)}, "
            f"approx {mp.nstr(approx, 2)}, horner {mp.nstr(horner, 2)}."
        )
        lines.append(f"pub(super) const {name}: [f64; {len(coeffs)}] = [")
        for c in coeffs:
            lines.append(f"    {fmt(c)},")
        lines.append("];")
        lines.append("")
    return "\n".join(lines)


def parse_stored(text):
    stored, name, values = {}, None, []
    for line in text.splitlines():
        line = line.strip()
        if line.startswith("pub(super) const "):
            name = line.split()[2].rstrip(":")
            values = []
        elif name and line == "];":
            stored[name] = values
            name = None
        elif name and line.endswith(","):
            values.append(float(line.rstrip(",").replace("_", "")))
    return stored


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--check", action="store_true")
    args = parser.parse_args()
    cross_check()
    specs = quantities()
    if not args.check:
        fits = [(spec, fit(spec[2], spec[3], spec[4])) for spec in specs]
        for (name, _d, _h, _f, _q), (coeffs, truncation, approx, horner) in fits:
            print(
                f"{name}: degree {len(coeffs) - 1}, truncation {mp.nstr(truncation, 3)}, "
                f"approx {mp.nstr(approx, 3)}, horner {mp.nstr(horner, 3)}"
            )
        with open(OUT, "w") as handle:
            handle.write(render(fits))
        print(f"wrote {OUT}")
        return
    with open(OUT) as handle:
        stored = parse_stored(handle.read())
    rng = random.Random(SEED)
    failures = 0
    for name, _doc, hi, f, quantity in specs:
        coeffs = stored.get(name)
        if coeffs is None:
            print(f"{name}: missing from {OUT}")
            failures += 1
            continue
        # Refit at the stored degree and compare coefficients.
        poly = mp.chebyfit(f, [0, hi], len(coeffs))
        fresh = [float(c) for c in reversed(poly)]
        for i, (a, b) in enumerate(zip(coeffs, fresh)):
            if abs(a - b) > 4 * 2.0**-52 * max(abs(a), abs(b)) and abs(a - b) > 1e-300:
                print(f"{name}[{i}]: stored {a!r}, refit {b!r}")
                failures += 1
        # The stored coefficients on a random sample (and the ends) against the series.
        points = [mpf(0), hi] + [hi * mpf(rng.random()) for _ in range(200)]
        approx, horner = measure(coeffs, hi, f, quantity, points)
        ok = approx <= CHECK_LIMITS.get(name, CHECK_LIMIT)
        print(f"{name}: degree {len(coeffs) - 1}, sample approx {mp.nstr(approx, 3)}, horner {mp.nstr(horner, 3)}: {'ok' if ok else 'FAIL'}")
        failures += 0 if ok else 1
    sys.exit(1 if failures else 0)


if __name__ == "__main__":
    main()
