#!/usr/bin/env python3
"""Check values for the non-uniformity, drift and self-emission stages (tests/frame_nuc.rs).

Computed with mpmath at 40 significant digits from the exact CODATA 2018 (SI 2019)
constants h = 6.62607015e-34 J s, c = 299792458 m/s, k = 1.380649e-23 J/K:

  1. The effective exponent n(T) = d ln L / d ln T = T L'(T) / L(T) of the rectangular
     8-14 um band radiance of an energy detector, with L and L' integrated by mpmath.quad
     of Planck's law and its temperature derivative over wavelength.
  2. The single-element thermopile's net exchange sigma (e T_o^4 + (1 - e) T_r^4 - T_s^4)
     for e = 0.98 and e = 1, T_o = 310.15 K, T_s = T_r = 298.15 K, with
     sigma = 2 pi^5 k^4 / (15 h^3 c^2).

Usage: python3 tools/refgen/nuc_refs.py   (prints the values the test pins)
"""

import mpmath as mp

mp.mp.dps = 40
H = mp.mpf("6.62607015e-34")
C = mp.mpf("299792458")
K = mp.mpf("1.380649e-23")
C1L = 2 * H * C**2  # W m^2 sr^-1
C2 = H * C / K  # m K


def spectral(lam_m, t):
    return C1L / lam_m**5 / mp.expm1(C2 / (lam_m * t))


def band(t, lo_um=8, hi_um=14):
    f = lambda lam: spectral(lam, t)
    return mp.quad(f, [mp.mpf(lo_um) * 1e-6, mp.mpf(hi_um) * 1e-6])


def exponent(t):
    t = mp.mpf(t)
    dl = mp.diff(lambda tt: band(tt), t)
    return t * dl / band(t)


if __name__ == "__main__":
    for t in (250, 300, 350):
        print(f"exponent 8-14 um at {t} K: {mp.nstr(exponent(t), 15)}")
    sigma = 2 * mp.pi**5 * K**4 / (15 * H**3 * C**2)
    to, ts = mp.mpf("310.15"), mp.mpf("298.15")
    for e in (mp.mpf("0.98"), mp.mpf(1)):
        u = sigma * (e * to**4 + (1 - e) * ts**4 - ts**4)
        print(f"net exchange e={mp.nstr(e, 3)}: {mp.nstr(u, 15)} W m^-2")
