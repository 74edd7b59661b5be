#!/usr/bin/env python3
"""Reference vectors for bandtemp's scene module (the measurement equation), computed
independently of the Rust code with mpmath at 50 significant digits.

Writes:
  tests/data/scene_cases.csv           worked grey cases: sensor signal, apparent and object
                                       temperature, background and gain
  tests/data/scene_sensitivities.csv   dT/dp of the same cases by mpmath.diff of the
                                       numerically inverted equation (not the analytic form)
  tests/data/scene_spectral.csv        spectral (non-grey) cases: signal, apparent and object
                                       temperature, and the grey approximation's answer
  tests/data/scene_spectral_tables.csv the tables those cases use

All scenes and tables are INVENTED for illustration (fictional plant, fictional
instruments); none is a measurement. Atmosphere transmittances are ASSUMED values, not the
output of an atmosphere model.

Physics (CODATA 2018 exact h, c, k):
  L(lambda, T) = c1L / lambda^5 / (exp(c2/(lambda T)) - 1)   W m^-2 sr^-1 um^-1 (energy)
  Lp(lambda, T) = 2c / lambda^4 / (exp(c2/(lambda T)) - 1)   photons s^-1 m^-2 sr^-1 um^-1
  Grey measurement equation:
  S = tw [ta (e L(T) + (1-e) L(Tr)) + (1-ta) L(Ta)] + rw L(Twr) + (1-tw-rw) L(Tw)
  Spectral: e and ta inside the band integral, window grey.

Each band integral is computed two ways and the script stops if they disagree:
  rectangular bands: closed form with polylogarithms,
      integral_x^inf t^3/(e^t-1) dt = x^3 Li1(e^-x) + 3x^2 Li2(e^-x) + 6x Li3(e^-x) + 6 Li4(e^-x)
      (t^2: x^2 Li1 + 2x Li2 + 2 Li3), and mpmath.quad over finely split intervals;
  tabulated integrands: mpmath.quad tanh-sinh and Gauss-Legendre on intervals split at every
      table node and subdivided.

Run: python3 tools/refgen/scene_refs.py   (from the repository root)
"""

import csv
import os
import sys

import mpmath as mp

mp.mp.dps = 50

H = mp.mpf("6.62607015e-34")
C = mp.mpf("299792458")
K = mp.mpf("1.380649e-23")
C1L_UM = 2 * H * C**2 * mp.mpf(10) ** 24
C1P_UM = 2 * C * mp.mpf(10) ** 18
C2_UMK = H * C / K * mp.mpf(10) ** 6

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "tests", "data")


def fmt(x):
    return mp.nstr(mp.mpf(x), 20, strip_zeros=False, min_fixed=-4, max_fixed=8)


# --------------------------------------------------------------------------- Planck
def spectral(detector, wl_um, t_k):
    wl_um = mp.mpf(wl_um)
    x = C2_UMK / (wl_um * t_k)
    if detector == "energy":
        return C1L_UM / wl_um**5 / mp.expm1(x)
    return C1P_UM / wl_um**4 / mp.expm1(x)


def tail(m, x):
    q = mp.exp(-x)
    if m == 3:
        return x**3 * mp.polylog(1, q) + 3 * x**2 * mp.polylog(2, q) + 6 * x * mp.polylog(3, q) + 6 * mp.polylog(4, q)
    return x**2 * mp.polylog(1, q) + 2 * x * mp.polylog(2, q) + 2 * mp.polylog(3, q)


def rect_closed(detector, lo, hi, t_k):
    m = 3 if detector == "energy" else 2
    c1 = C1L_UM if detector == "energy" else C1P_UM
    xa = C2_UMK / (mp.mpf(hi) * t_k)
    xb = C2_UMK / (mp.mpf(lo) * t_k)
    return c1 * t_k ** (m + 1) / C2_UMK ** (m + 1) * (tail(m, xa) - tail(m, xb))


def split_points(points, pieces):
    out = []
    for a, b in zip(points[:-1], points[1:]):
        for i in range(pieces):
            out.append(a + (b - a) * i / pieces)
    out.append(points[-1])
    return out


def quad2(f, points, what):
    """Integral of f over the breakpoints, two methods; they must agree to 1e-25."""
    pts = split_points([mp.mpf(p) for p in points], 16)
    a = mp.quad(f, pts, method="tanh-sinh")
    b = mp.quad(f, pts, method="gauss-legendre")
    if abs(a - b) > mp.mpf("1e-25") * abs(a):
        sys.exit(f"quadrature disagreement in {what}: {a} vs {b}")
    return a


class Table:
    def __init__(self, name, wl, val):
        self.name = name
        self.wl = [mp.mpf(w) for w in wl]
        self.val = [mp.mpf(v) for v in val]
        self.wl_text = wl
        self.val_text = val

    def __call__(self, w):
        if w < self.wl[0] or w > self.wl[-1]:
            return mp.mpf(0)
        for i in range(1, len(self.wl)):
            if w <= self.wl[i]:
                s = (w - self.wl[i - 1]) / (self.wl[i] - self.wl[i - 1])
                return self.val[i - 1] + s * (self.val[i] - self.val[i - 1])
        return self.val[-1]


class BandDef:
    def __init__(self, lo, hi, detector, response=None):
        self.detector = detector
        self.response = response
        if response is None:
            self.lo, self.hi = mp.mpf(lo), mp.mpf(hi)
        else:
            self.lo = max(mp.mpf(lo), response.wl[0])
            self.hi = min(mp.mpf(hi), response.wl[-1])
        self.lo_text, self.hi_text = lo, hi

    def r(self, w):
        return mp.mpf(1) if self.response is None else self.response(w)

    def nodes(self, tables):
        pts = {self.lo, self.hi}
        for t in tables + ([self.response] if self.response else []):
            for w in t.wl:
                if self.lo < w < self.hi:
                    pts.add(w)
        return sorted(pts)

    def weighted(self, t_k, weight, tables, what):
        f = lambda w: self.r(w) * weight(w) * spectral(self.detector, w, t_k)
        return quad2(f, self.nodes(tables), what)

    def radiance(self, t_k, check=False):
        t_k = mp.mpf(t_k)
        if self.response is None:
            closed = rect_closed(self.detector, self.lo, self.hi, t_k)
            if not check:
                return closed
            check = quad2(lambda w: spectral(self.detector, w, t_k), [self.lo, self.hi], "band")
            if abs(closed - check) > mp.mpf("1e-25") * closed:
                sys.exit(f"closed form vs quad disagree: {closed} {check}")
            return closed
        return self.weighted(t_k, lambda w: 1, [], "band radiance")

    def temperature(self, radiance, guess):
        return mp.findroot(lambda t: self.radiance(t) - radiance, mp.mpf(guess), tol=mp.mpf(10) ** -40)


# --------------------------------------------------------------------------- grey cases
PARAMS = ["emissivity", "reflected_k", "atm_transmittance", "atm_k",
          "window_transmittance", "window_reflectance", "window_k", "window_reflected_k"]


def grey_terms(band, p, cache):
    def L(t):
        t = mp.mpf(t)
        if t not in cache:
            cache[t] = band.radiance(t)
        return cache[t]
    e, tr, ta, tak, tw, rw, twk, twr = (p[k] for k in PARAMS)
    gain = tw * ta * e
    background = tw * (ta * (1 - e) * L(tr) + (1 - ta) * L(tak)) + rw * L(twr) + (1 - tw - rw) * L(twk)
    return gain, background


def grey_object(band, p, signal, guess, cache):
    gain, background = grey_terms(band, p, cache)
    return band.temperature((signal - background) / gain, guess)


GREY_CASES = [
    # name, band (lo, hi, detector), object_k, scene parameters, note
    ("motor_housing", (8, 14, "energy"), "338.15",
     dict(emissivity="0.85", reflected_k="298.15", atm_transmittance="0.995", atm_k="298.15",
          window_transmittance="0.70", window_reflectance="0.04", window_k="308.15",
          window_reflected_k="296.15"),
     "warm motor housing (65 C) behind a polymer infrared window in a switch cabinet door;"
     " window tw 0.70 rw 0.04 assumed, 2 m of air ta 0.995 assumed"),
    ("bus_bar", (7.5, 13, "energy"), "343.15",
     dict(emissivity="0.10", reflected_k="393.15", atm_transmittance="0.99", atm_k="303.15",
          window_transmittance="1", window_reflectance="0", window_k="303.15",
          window_reflected_k="303.15"),
     "bare aluminium bus bar (70 C, e 0.10 common practice for unoxidised aluminium) reflecting"
     " a 120 C heater panel; ta 0.99 assumed"),
    ("furnace_wall", (8, 14, "energy"), "523.15",
     dict(emissivity="0.90", reflected_k="303.15", atm_transmittance="0.96", atm_k="303.15",
          window_transmittance="1", window_reflectance="0", window_k="303.15",
          window_reflected_k="303.15"),
     "furnace shell (250 C, oxidised painted steel e 0.90) seen through 20 m of humid air at"
     " 30 C and 80 % RH; band-averaged ta 0.96 ASSUMED (below the 0.987 of the water-vapour"
     " continuum alone, to allow for line absorption near the band edges; not computed)"),
    ("kiln_viewport", (3, 5, "photon"), "700",
     dict(emissivity="0.80", reflected_k="320", atm_transmittance="0.97", atm_k="300",
          window_transmittance="0.86", window_reflectance="0.07", window_k="320",
          window_reflected_k="300"),
     "kiln shell (700 K) seen by a cooled 3-5 um photon camera through a sapphire viewport;"
     " tw 0.86 rw 0.07 ta 0.97 assumed"),
]


def run_grey():
    rows, sens_rows = [], []
    for name, (lo, hi, det), obj, params, note in GREY_CASES:
        band = BandDef(lo, hi, det)
        p = {k: mp.mpf(v) for k, v in params.items()}
        obj_k = mp.mpf(obj)
        cache = {}
        gain, background = grey_terms(band, p, cache)
        signal = gain * band.radiance(obj_k, check=True) + background
        for t in [p[k] for k in PARAMS if k.endswith("_k")]:
            band.radiance(t, check=True)
        apparent = band.temperature(signal, obj_k)
        back = grey_object(band, p, signal, obj_k, cache)
        if abs(back - obj_k) > mp.mpf("1e-30"):
            sys.exit(f"{name}: grey round trip failed")
        rows.append([name, lo, hi, det] + [params[k] for k in PARAMS]
                    + [obj, fmt(signal), fmt(apparent), fmt(gain), fmt(background), note])

        # Sensitivities by numerical differentiation of the inverted equation.
        def t_of(key):
            def f(x):
                q = dict(p)
                q[key] = x
                return grey_object(band, q, signal, obj_k, {})
            return f
        derivs = {"signal": mp.diff(lambda s: grey_object(band, p, s, obj_k, cache), signal)}
        for key in PARAMS:
            derivs[key] = mp.diff(t_of(key), p[key])
        sens_rows.append([name, fmt(signal)] + [fmt(derivs[k]) for k in ["signal"] + PARAMS])
        print(f"{name}: S={mp.nstr(signal, 12)} T_app={mp.nstr(apparent, 12)} K, T_obj={obj} K")
    with open(os.path.join(OUT, "scene_cases.csv"), "w", newline="") as fh:
        fh.write("# Worked scenes, INVENTED for illustration; atmosphere and window values assumed.\n")
        fh.write("# Generated by tools/refgen/scene_refs.py (mpmath, 50 digits, closed-form band integrals\n")
        fh.write("# with polylogarithms checked against mpmath.quad). Signal in W m^-2 sr^-1 (energy)\n")
        fh.write("# or photons s^-1 m^-2 sr^-1 (photon); temperatures in K.\n")
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(["name", "lo_um", "hi_um", "detector"] + PARAMS
                   + ["object_k", "sensor_signal", "apparent_k", "gain", "background", "note"])
        w.writerows(rows)
    with open(os.path.join(OUT, "scene_sensitivities.csv"), "w", newline="") as fh:
        fh.write("# dT_object/dp of the worked scenes in scene_cases.csv, by mpmath.diff of the object\n")
        fh.write("# temperature found by mpmath.findroot (numerical, independent of the analytic form).\n")
        fh.write("# Generated by tools/refgen/scene_refs.py. Units: K per unit of each input.\n")
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(["name", "sensor_signal", "d_signal"] + ["d_" + k for k in PARAMS])
        w.writerows(sens_rows)


# --------------------------------------------------------------------------- spectral cases
TABLES = {
    # Emissivity falling linearly from 0.95 at 8 um to 0.75 at 14 um (band mean 0.85): an
    # invented surface with a strong slope across the band.
    "e_slope": Table("e_slope", ["8", "14"], ["0.95", "0.75"]),
    # An invented painted-metal emissivity with a few nodes, covering 7.5-14.5 um.
    "e_paint": Table("e_paint", ["7.5", "9", "10", "11.5", "14.5"],
                     ["0.96", "0.91", "0.86", "0.90", "0.82"]),
    # An ASSUMED transmittance shape for a long (several hundred metre) humid path, not
    # from a model.
    "ta_long": Table("ta_long", ["7.5", "8", "9", "10", "11", "12", "13", "14", "14.5"],
                      ["0.55", "0.70", "0.80", "0.84", "0.83", "0.80", "0.74", "0.62", "0.50"]),
    # An invented microbolometer relative spectral response.
    "r_bolo": Table("r_bolo", ["7.5", "8", "9", "11", "13", "14"],
                    ["0", "0.6", "0.95", "1", "0.8", "0"]),
}

SPECTRAL_CASES = [
    # name, band (lo, hi, det, response), object_k, grey scene (emissivity used where no
    # table, ta likewise), emissivity table, ta table, note
    ("slope_only", (8, 14, "energy", None), "353.15",
     dict(emissivity="0.85", reflected_k="293.15", atm_transmittance="1", atm_k="293.15",
          window_transmittance="1", window_reflectance="0", window_k="293.15", window_reflected_k="293.15"),
     "e_slope", None, "sloping emissivity, no path; grey approximation uses the band mean 0.85"),
    ("slope_cold_object", (8, 14, "energy", None), "283.15",
     dict(emissivity="0.85", reflected_k="303.15", atm_transmittance="1", atm_k="303.15",
          window_transmittance="1", window_reflectance="0", window_k="303.15", window_reflected_k="303.15"),
     "e_slope", None, "sloping emissivity, object colder than its surroundings"),
    ("long_path_paint", (8, 14, "energy", None), "373.15",
     dict(emissivity="0.9", reflected_k="298.15", atm_transmittance="1", atm_k="298.15",
          window_transmittance="1", window_reflectance="0", window_k="298.15", window_reflected_k="298.15"),
     "e_paint", "ta_long", "painted tank across a long humid path (assumed shape) at 303.15 K"),
    ("bolo_window", (7, 15, "energy", "r_bolo"), "338.15",
     dict(emissivity="0.9", reflected_k="298.15", atm_transmittance="1", atm_k="298.15",
          window_transmittance="0.7", window_reflectance="0.04", window_k="308.15", window_reflected_k="296.15"),
     "e_slope_wide", "ta_long", "tabulated response, sloping emissivity, long humid path, grey window"),
]
TABLES["e_slope_wide"] = Table("e_slope_wide", ["7", "15"], ["0.96", "0.72"])
ATM_K = {"long_path_paint": "303.15", "bolo_window": "300.15"}


def run_spectral():
    rows = []
    for name, (lo, hi, det, resp), obj, params, e_name, ta_name, note in SPECTRAL_CASES:
        band = BandDef(lo, hi, det, TABLES[resp] if resp else None)
        p = {k: mp.mpf(v) for k, v in params.items()}
        if ta_name:
            p["atm_k"] = mp.mpf(ATM_K[name])
        e_tab = TABLES[e_name] if e_name else None
        ta_tab = TABLES[ta_name] if ta_name else None
        tables = [t for t in (e_tab, ta_tab) if t]
        e = e_tab if e_tab else (lambda w: p["emissivity"])
        ta = ta_tab if ta_tab else (lambda w: p["atm_transmittance"])
        tw, rw = p["window_transmittance"], p["window_reflectance"]

        def window_terms():
            out = mp.mpf(0)
            if rw > 0:
                out += rw * band.radiance(p["window_reflected_k"])
            if 1 - tw - rw > 0:
                out += (1 - tw - rw) * band.radiance(p["window_k"])
            return out

        background = tw * (band.weighted(p["reflected_k"], lambda w: ta(w) * (1 - e(w)), tables, name)
                           + band.weighted(p["atm_k"], lambda w: 1 - ta(w), tables, name)) + window_terms()

        def signal_of(t):
            return tw * band.weighted(t, lambda w: ta(w) * e(w), tables, name) + background

        obj_k = mp.mpf(obj)
        signal = signal_of(obj_k)
        apparent = band.temperature(signal, obj_k)
        back = mp.findroot(lambda t: signal_of(t) - signal, obj_k + 1, tol=mp.mpf(10) ** -40)
        if abs(back - obj_k) > mp.mpf("1e-25"):
            sys.exit(f"{name}: spectral round trip failed")
        # Grey approximation: emissivity and transmittance replaced by their plain band means
        # (unweighted averages over [lo, hi] of the band), then the grey equation inverted.
        width = band.hi - band.lo
        e_mean = quad2(lambda w: e(w), band.nodes(tables), "mean") / width
        ta_mean = quad2(lambda w: ta(w), band.nodes(tables), "mean") / width
        q = dict(p)
        q["emissivity"], q["atm_transmittance"] = e_mean, ta_mean
        grey_k = grey_object(band, q, signal, obj_k, {})
        rows.append([name, lo, hi, det, resp or "none", e_name or "none", ta_name or "none"]
                    + [fmt(p[k]) for k in PARAMS]
                    + [obj, fmt(signal), fmt(apparent), fmt(background), fmt(e_mean), fmt(ta_mean),
                       fmt(grey_k), note])
        print(f"{name}: S={mp.nstr(signal, 12)} T_app={mp.nstr(apparent, 10)} grey={mp.nstr(grey_k, 10)}"
              f" (grey error {mp.nstr(grey_k - obj_k, 4)} K)")
    with open(os.path.join(OUT, "scene_spectral.csv"), "w", newline="") as fh:
        fh.write("# Spectral (non-grey) scenes, INVENTED for illustration; transmittance shapes assumed.\n")
        fh.write("# Generated by tools/refgen/scene_refs.py: mpmath.quad (tanh-sinh and Gauss-Legendre,\n")
        fh.write("# agreeing to 1e-25) of r*[ta*e*L(T) + ta*(1-e)*L(Tr) + (1-ta)*L(Ta)] over the band,\n")
        fh.write("# split at every table node; window grey. grey_k is the object temperature the grey\n")
        fh.write("# equation gives with e and ta replaced by their unweighted band means.\n")
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(["name", "lo_um", "hi_um", "detector", "response", "emissivity_table", "atm_table"]
                   + PARAMS + ["object_k", "sensor_signal", "apparent_k", "background",
                               "mean_emissivity", "mean_atm_transmittance", "grey_k", "note"])
        w.writerows(rows)
    with open(os.path.join(OUT, "scene_spectral_tables.csv"), "w", newline="") as fh:
        fh.write("# Tables for scene_spectral.csv (INVENTED or ASSUMED shapes; see tools/refgen/scene_refs.py).\n")
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(["table", "wavelength_um", "value"])
        for t in TABLES.values():
            for wl, v in zip(t.wl_text, t.val_text):
                w.writerow([t.name, wl, v])


if __name__ == "__main__":
    os.makedirs(OUT, exist_ok=True)
    run_grey()
    run_spectral()
