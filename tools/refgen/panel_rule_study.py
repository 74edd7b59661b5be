#!/usr/bin/env python3
"""Truncation error of the 4-node Gauss-Legendre panel of the tabulated band quadrature
(`FOUR_NODE_WIDTH` in src/planck.rs), measured with mpmath at 40 digits.

For a panel [a, a + width] in x = c2/(lambda T) it integrates, with the 4-node rule and
with mpmath.quad (tanh-sinh, the integrand scaled by e^a so that the absolute convergence
test is meaningful), the three kernels of the band quadrature
    f = t^m/(e^t - 1),  f k1,  f k1 (t (1 + 2/(e^t - 1)) - 1),  k1 = t e^t/(e^t - 1),
for m = 2 and 3, times each weight a response linear in wavelength (lambda = c2/(t T))
can give on the panel: 1, 1/t, 1/t - 1/b and 1/a - 1/t (b = a + width; the last two
vanish at one end). It prints the largest relative error per (a, width).

Usage: python3 tools/refgen/panel_rule_study.py   (about 3 minutes; prints the table quoted
at `FOUR_NODE_WIDTH`)
"""

import mpmath as mp

mp.mp.dps = 40


def gauss_legendre(n):
    """Nodes and weights on [-1, 1] from the Legendre polynomial's roots."""
    out = []
    for i in range(n):
        x = mp.findroot(lambda y: mp.legendre(n, y), mp.cos(mp.pi * (i + 0.75) / (n + 0.5)))
        w = 2 / ((1 - x**2) * mp.diff(lambda y: mp.legendre(n, y), x) ** 2)
        out.append((x, w))
    return out


RULE = gauss_legendre(4)


def kernels(m, t):
    e = mp.expm1(t)
    f = t**m / e
    k1 = t * (1 + 1 / e)
    return [f, f * k1, f * k1 * (t * (1 + 2 / e) - 1)]


def relative_error(m, a, width, weight):
    half = width / 2
    centre = a + half
    gauss = [mp.mpf(0)] * 3
    for x, w in RULE:
        t = centre + half * x
        for i, k in enumerate(kernels(m, t)):
            gauss[i] += w * weight(t) * k
    scale = mp.exp(a)
    worst = mp.mpf(0)
    for i in range(3):
        exact = mp.quad(lambda t: scale * kernels(m, t)[i] * weight(t), [a, a + width]) / scale
        worst = max(worst, abs(half * gauss[i] - exact) / abs(exact))
    return worst


def worst_error(a, width):
    a, width = mp.mpf(a), mp.mpf(width)
    b = a + width
    weights = [lambda t: 1, lambda t: 1 / t, lambda t: 1 / t - 1 / b, lambda t: 1 / a - 1 / t]
    return max(relative_error(m, a, width, w) for m in (2, 3) for w in weights)


def main():
    widths = [0.03, 0.045, 0.06, 0.075]
    print("a       " + " ".join(f"{w:>9}" for w in widths))
    for a in [1, 1.25, 1.4, 1.5, 1.6, 2, 3, 5, 8, 15, 30, 60, 120, 250, 500, 700]:
        row = " ".join(f"{float(worst_error(a, w)):9.2e}" for w in widths)
        print(f"{a:<7} {row}", flush=True)


if __name__ == "__main__":
    main()
