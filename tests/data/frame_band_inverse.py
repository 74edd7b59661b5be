"""Reference vectors for tests/frame_table.rs: temperature of given f32 band radiances.

Band: rectangular 8-14 um, energy detector. For each temperature on a grid over
250-1500 K the band radiance is computed, rounded to the nearest f32 (so the test can feed
it to the f32 table exactly), and the temperature of that f32 radiance is solved with
mpmath at 40 digits. Band radiance uses the closed form of the tail integral
    int_x^inf t^3/(e^t - 1) dt = x^3 Li1(e^-x) + 3x^2 Li2(e^-x) + 6x Li3(e^-x) + 6 Li4(e^-x)
with c1L = 2 h c^2 and c2 = h c / k from the exact CODATA 2018 values of h, c, k.
The second way: the same radiance by mpmath.quad of Planck's law split into 60 panels;
the script stops if the two disagree by more than 1e-25 relative.

Run: python3 tests/data/frame_band_inverse.py > tests/data/frame_band_inverse.csv
"""
import struct

import mpmath as mp

mp.mp.dps = 40
H = mp.mpf("6.62607015e-34")
C = mp.mpf("299792458")
K = mp.mpf("1.380649e-23")
C1L = 2 * H * C**2 * mp.mpf(10) ** 24  # W um^4 m^-2 sr^-1
C2 = H * C / K * mp.mpf(10) ** 6  # um K
LO_UM, HI_UM = mp.mpf(8), mp.mpf(14)


def tail(x):
    q = mp.e ** (-x)
    return x**3 * mp.polylog(1, q) + 3 * x**2 * mp.polylog(2, q) + 6 * x * mp.polylog(3, q) + 6 * mp.polylog(4, q)


def radiance(t):
    xa, xb = C2 / (HI_UM * t), C2 / (LO_UM * t)
    return C1L * t**4 / C2**4 * (tail(xa) - tail(xb))


def radiance_quad(t):
    f = lambda lam: C1L / lam**5 / mp.expm1(C2 / (lam * t))
    edges = mp.linspace(LO_UM, HI_UM, 61)
    return mp.fsum(mp.quad(f, [edges[i], edges[i + 1]]) for i in range(60))


def to_f32(x):
    return struct.unpack("<f", struct.pack("<f", float(x)))[0]


print("# 8-14 um energy band; radiance_f32 (W m^-2 sr^-1, exactly an f32), temperature_k of that radiance (mpmath, 40 digits)")
print("radiance_f32,temperature_k")
for i in range(41):
    t = mp.mpf(250) + mp.mpf(1250) * i / 40
    l = radiance(t)
    lq = radiance_quad(t)
    assert abs(l - lq) / l < mp.mpf("1e-25"), (t, l, lq)
    s = to_f32(l)
    root = mp.findroot(lambda tt: radiance(tt) - mp.mpf(s), t)
    print(f"{s!r},{mp.nstr(root, 20)}")
