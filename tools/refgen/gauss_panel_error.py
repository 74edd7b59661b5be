#!/usr/bin/env python3
"""Truncation error of the Gauss-Legendre panels of bandtemp's rectangular band integral
(src/planck.rs `gauss_panel`, `panel_sums`): the n-point rule on [a, a + w] for
t^m/(e^t - 1), m = 2 and 3, against mpmath's Gauss-Legendre quadrature at 60 digits,
worst relative error over a = w/2 .. 700 (the panels the crate takes have a >= w/2).

Nodes and weights are the roots of the Legendre polynomial (mpmath.findroot from numpy's
starting values) and 2/((1 - x^2) P_n'(x)^2), at 60 digits: the error printed is the rule's,
not that of its double-precision coefficients.

Usage: python3 tools/refgen/gauss_panel_error.py   (about 1 minute; prints n, w, error)
Last run: n = 4: 5.1e-19 at w = 0.03; n = 5: 2.9e-18 at 0.2, 1.7e-17 at 0.25;
n = 6: 1.7e-21 at 0.25.
"""

import mpmath as mp
import numpy as np

mp.mp.dps = 60


def f(m, t):
    return t**m / mp.expm1(t)


def rule(n):
    out = []
    for xi in np.polynomial.legendre.leggauss(n)[0]:
        r = mp.findroot(lambda z: mp.legendre(n, z), mp.mpf(xi))
        dp = mp.diff(lambda z: mp.legendre(n, z), r)
        out.append((r, 2 / ((1 - r**2) * dp**2)))
    return out


def main():
    rules = {n: rule(n) for n in (4, 5, 6)}
    for n in (4, 5, 6):
        for w in ("0.03", "0.1", "0.15", "0.2", "0.25"):
            w = mp.mpf(w)
            worst = mp.mpf(0)
            for a in [w / 2, "0.02", "0.05", "0.1", "0.3", "0.7", 1, 2, 3, 5, 10, 30, 100, 300, 700]:
                a = mp.mpf(a)
                if a < w / 2:
                    continue
                for m in (2, 3):
                    h = w / 2
                    mid = a + h
                    approx = sum(wi * f(m, mid + h * xi) for xi, wi in rules[n]) * h
                    exact = mp.quad(lambda t: f(m, t), [a, a + w], method="gauss-legendre")
                    worst = max(worst, abs(approx / exact - 1))
            print(n, mp.nstr(w, 3), mp.nstr(worst, 3))


if __name__ == "__main__":
    main()
