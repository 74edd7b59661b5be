/*
 * The bandtemp C ABI tested from C (C99) and C++ (C++17): the same file compiles as both.
 * Run by tests/ffi_c.rs, which builds it with -Wall -Wextra -Werror -pedantic against
 * include/bandtemp.h and the staticlib, also under -fsanitize=address,undefined.
 *
 * Two kinds of checks:
 *  - values against independent references computed here: Planck's law from the CODATA 2018
 *    exact constants h, c, k, band integrals by composite Simpson quadrature, the
 *    measurement equation written out, the Sakuma-Hattori closed forms, and blackbody
 *    fractions from mpmath (polylog closed form, 40 digits; the command is beside them);
 *  - hostile input to every function (NULL, NaN, +-inf, 0, -0, negative, huge, subnormal,
 *    empty and reversed bands, unsorted or broken response tables, impossible lengths, a
 *    detector of 7): the call must return a named status, leave its out values untouched
 *    on error, and give a finite value on success. Any crash fails the run.
 *
 * Prints "N passed, N failed" last; exits nonzero on any failure.
 */
#include "bandtemp.h"

#include <float.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

/* ---- the harness ----------------------------------------------------------------------- */

static unsigned long passed = 0;
static unsigned long failed = 0;

static void check(int ok, const char *what, int line) {
    if (ok) {
        passed++;
    } else {
        failed++;
        printf("FAIL (line %d): %s\n", line, what);
    }
}
#define CHECK(cond) check((cond) ? 1 : 0, #cond, __LINE__)

/* The value every out variable holds before a call; it must survive every error. */
static const double SENTINEL = -12345.678;

static int untouched(double value) { return memcmp(&value, &SENTINEL, sizeof value) == 0; }

static int known_status(bt_status status) {
    const char *message = bt_status_message(status);
    return message != NULL && strcmp(message, "unknown status") != 0 && message[0] != '\0';
}

/* Any input: success with a finite value, or a named error with the out value untouched. */
static void expect_sane(bt_status status, double out, const char *what, int line) {
    int ok = status == BT_STATUS_OK ? (isfinite(out) ? 1 : 0)
                                    : untouched(out) && known_status(status);
    if (!ok) {
        printf("  status %d (%s), out %.17g\n", (int)status, bt_status_message(status), out);
    }
    check(ok, what, line);
}

/* A given status; on success also a finite value, on error the out value untouched. */
static void expect_status(bt_status got, bt_status want, double out, const char *what,
                          int line) {
    int ok = got == want &&
             (want == BT_STATUS_OK ? (isfinite(out) ? 1 : 0) : untouched(out));
    if (!ok) {
        printf("  got %d (%s), want %d (%s), out %.17g\n", (int)got, bt_status_message(got),
               (int)want, bt_status_message(want), out);
    }
    check(ok, what, line);
}

/* Success and |out - want| <= rel * |want|. */
static void expect_near(bt_status got, double out, double want, double rel, const char *what,
                        int line) {
    int ok = got == BT_STATUS_OK && fabs(out - want) <= rel * fabs(want);
    if (!ok) {
        printf("  status %d (%s), out %.17g, want %.17g, rel err %.3g > %.3g\n", (int)got,
               bt_status_message(got), out, want, fabs(out - want) / fabs(want), rel);
    }
    check(ok, what, line);
}

/* `out` is a double in scope; each macro resets it to the sentinel first. */
#define EXPECT(want, call)                                                                     \
    do {                                                                                       \
        bt_status status_;                                                                     \
        out = SENTINEL;                                                                        \
        status_ = (call);                                                                      \
        expect_status(status_, (want), out, #call, __LINE__);                                  \
    } while (0)
#define EXPECT_NEAR(call, want, rel)                                                           \
    do {                                                                                       \
        bt_status status_;                                                                     \
        out = SENTINEL;                                                                        \
        status_ = (call);                                                                      \
        expect_near(status_, out, (want), (rel), #call, __LINE__);                             \
    } while (0)
#define EXPECT_SANE(call)                                                                      \
    do {                                                                                       \
        bt_status status_;                                                                     \
        out = SENTINEL;                                                                        \
        status_ = (call);                                                                      \
        expect_sane(status_, out, #call, __LINE__);                                            \
    } while (0)

/* Subnormal doubles (DBL_TRUE_MIN is C11). */
#define SUBNORMAL_MIN 4.9406564584124654e-324
#define SUBNORMAL_BIG 2.0e-310

/* Hostile scalars, and the same with valid values mixed in: every argument of every
 * function is driven through ARGS. */
static const double ARGS[] = {
    NAN,           -NAN,           INFINITY, -INFINITY, 0.0,     -0.0,    -1.0,   -DBL_MAX,
    DBL_MAX,       DBL_MIN,        -DBL_MIN, SUBNORMAL_MIN,     -SUBNORMAL_MIN,   SUBNORMAL_BIG,
    1e-300,        1e300,          1e-9,     1e9,       0.5,     0.95,    1.0,    1.5,
    3.0,           8.0,            14.0,     300.0,     1000.0,  5000.0,  1e6,    2e6,
};
#define N_ARGS (sizeof ARGS / sizeof ARGS[0])


/* ---- independent references ------------------------------------------------------------ */

/* CODATA 2018 exact constants (SI). */
static const double H_J_S = 6.62607015e-34;
static const double C_M_S = 299792458.0;
static const double K_J_K = 1.380649e-23;
/* pi (M_PI is not C99). */
#define M_PI_REF 3.14159265358979323846

/* Planck's law, W m^-2 sr^-1 um^-1: 2 h c^2 / lambda^5 / (exp(h c / (lambda k T)) - 1). */
static double planck(double wavelength_um, double temperature_k) {
    double wavelength_m = wavelength_um * 1e-6;
    double x = H_J_S * C_M_S / (wavelength_m * K_J_K * temperature_k);
    return 2.0 * H_J_S * C_M_S * C_M_S / pow(wavelength_m, 5.0) / expm1(x) * 1e-6;
}

/* Photon spectral radiance, photons s^-1 m^-2 sr^-1 um^-1: L lambda / (h c). */
static double planck_photon(double wavelength_um, double temperature_k) {
    return planck(wavelength_um, temperature_k) * wavelength_um * 1e-6 / (H_J_S * C_M_S);
}

/* Composite Simpson rule of r(lambda) * L(lambda, T) over [lo, hi] with r linear from
 * r_lo to r_hi (r = 1 for a rectangular band). 4000 panels: error far below 1e-11. */
static double simpson(double lo_um, double hi_um, double r_lo, double r_hi, double t_k,
                      int photon) {
    const int n = 4000;
    double step = (hi_um - lo_um) / n;
    double sum = 0.0;
    int i;
    for (i = 0; i <= n; i++) {
        double wl = lo_um + i * step;
        double r = r_lo + (r_hi - r_lo) * (double)i / n;
        double f = r * (photon ? planck_photon(wl, t_k) : planck(wl, t_k));
        double weight = (i == 0 || i == n) ? 1.0 : (i % 2 ? 4.0 : 2.0);
        sum += weight * f;
    }
    return sum * step / 3.0;
}

static double band_ref(double lo_um, double hi_um, double t_k, int photon) {
    return simpson(lo_um, hi_um, 1.0, 1.0, t_k, photon);
}

/* The triangle response used below: 0 at 8 um, 1 at 11 um, 0 at 14 um. */
static double triangle_ref(double t_k) {
    return simpson(8.0, 11.0, 0.0, 1.0, t_k, 0) + simpson(11.0, 14.0, 1.0, 0.0, t_k, 0);
}

/* ---- band helpers ------------------------------------------------------------------------ */

static bt_band rectangular(double lo_um, double hi_um, bt_detector detector) {
    bt_band band = {lo_um, hi_um, detector, NULL, NULL, 0};
    return band;
}

static bt_band tabulated(double lo_um, double hi_um, const double *wl, const double *r,
                         size_t n) {
    bt_band band = {lo_um, hi_um, BT_DETECTOR_ENERGY, wl, r, n};
    return band;
}

/* Stores a raw integer in the detector field as C code holding an out-of-range enum value
 * would (memcpy, so that the C++ build has no out-of-range enum conversion either). */
static void set_raw_detector(bt_band *band, unsigned int value) {
    if (sizeof band->detector == sizeof(unsigned int)) {
        memcpy(&band->detector, &value, sizeof band->detector);
    } else if (sizeof band->detector == sizeof(unsigned short)) {
        unsigned short narrow = (unsigned short)value;
        memcpy(&band->detector, &narrow, sizeof band->detector);
    } else {
        unsigned char narrow = (unsigned char)value;
        memcpy(&band->detector, &narrow, sizeof band->detector);
    }
}

static bt_scene plain_scene(void) {
    bt_scene scene = {0.95, 293.15, 1.0, 293.15, 1.0, 0.0, 293.15, 293.15};
    return scene;
}

static bt_scene full_scene(void) {
    bt_scene scene = {0.9, 295.0, 0.95, 290.0, 0.9, 0.05, 300.0, 293.0};
    return scene;
}

/* Measurement equation written out from DESIGN.md, over any L values. */
static double measurement(const bt_scene *s, double l_object, double l_reflected,
                          double l_atm, double l_window_reflected, double l_window) {
    double tw = s->window_transmittance, rw = s->window_reflectance;
    double ta = s->atm_transmittance, e = s->emissivity;
    return tw * (ta * (e * l_object + (1.0 - e) * l_reflected) + (1.0 - ta) * l_atm) +
           rw * l_window_reflected + (1.0 - tw - rw) * l_window;
}

static double sakuma_hattori(const bt_sakuma_hattori *p, double t_k) {
    double c2_umk = H_J_S * C_M_S / K_J_K * 1e6;
    return p->c / expm1(c2_umk / (p->a_um * t_k + p->b_umk));
}

/* ---- version and status -------------------------------------------------------------- */

static void test_version_and_status(void) {
    char expected[64];
    int status;
    sprintf(expected, "%d.%d.%d", BT_VERSION_MAJOR, BT_VERSION_MINOR, BT_VERSION_PATCH);
    CHECK(bt_version() != NULL);
    CHECK(strcmp(bt_version(), expected) == 0);
    CHECK(BT_STATUS_OK == 0);
    CHECK(BT_DETECTOR_ENERGY == 0 && BT_DETECTOR_PHOTON == 1);
    CHECK(strcmp(bt_status_message(BT_STATUS_OK), "ok") == 0);
    CHECK(strcmp(bt_status_message(BT_STATUS_NULL_POINTER), "a required pointer is null") ==
          0);
    CHECK(strcmp(bt_status_message(BT_STATUS_INVALID_DETECTOR),
                 "detector kind is not energy (0) or photon (1)") == 0);
    /* Every int has a message; values that are no status say so. */
    for (status = -3; status < 1000; status++) {
        const char *message = bt_status_message(status);
        CHECK(message != NULL && message[0] != '\0');
    }
    CHECK(strcmp(bt_status_message(-1), "unknown status") == 0);
    CHECK(strcmp(bt_status_message(7), "unknown status") == 0);
    CHECK(strcmp(bt_status_message(INT32_MAX), "unknown status") == 0);
    CHECK(strcmp(bt_status_message(INT32_MIN), "unknown status") == 0);
    /* Pinned values (part of the ABI). */
    CHECK(BT_STATUS_NON_FINITE == 1 && BT_STATUS_NULL_POINTER == 2);
    CHECK(BT_STATUS_INVALID_BUFFER == 3 && BT_STATUS_TEMPERATURE_NOT_POSITIVE == 100);
    CHECK(BT_STATUS_INVALID_DETECTOR == 105 && BT_STATUS_INVALID_BAND == 200);
    CHECK(BT_STATUS_SIGNAL_BELOW_BACKGROUND == 305 &&
          BT_STATUS_CALIBRATION_OUT_OF_DOMAIN == 401);
}

/* ---- spectral laws ------------------------------------------------------------------- */

static void test_planck(void) {
    double out;
    size_t i, j;
    /* Values against Planck's law computed here from the CODATA constants. */
    EXPECT_NEAR(bt_spectral_radiance(10.0, 300.0, &out), planck(10.0, 300.0), 1e-12);
    EXPECT_NEAR(bt_spectral_radiance(0.5, 5778.0, &out), planck(0.5, 5778.0), 1e-12);
    EXPECT_NEAR(bt_spectral_radiance(3.9, 1000.0, &out), planck(3.9, 1000.0), 1e-12);
    EXPECT_NEAR(bt_spectral_photon_radiance(4.0, 500.0, &out), planck_photon(4.0, 500.0),
                1e-12);
    EXPECT_NEAR(bt_total_radiance(300.0, &out), 5.670374419e-8 * pow(300.0, 4) / M_PI_REF,
                1e-9);
    EXPECT_NEAR(bt_peak_wavelength_um(5000.0, &out), 2897.771955 / 5000.0, 1e-9);
    /* Blackbody fractions from mpmath, 40 digits:
     * F = 15/pi^4 (x^3 Li1(e^-x) + 3x^2 Li2 + 6x Li3 + 6 Li4), x = c2/(lambda T). */
    EXPECT_NEAR(bt_blackbody_fraction(2897.771955, &out), 0.25005454678069198748, 1e-13);
    EXPECT_NEAR(bt_blackbody_fraction(1000.0, &out), 0.00032076978404488972166, 1e-12);
    EXPECT_NEAR(bt_blackbody_fraction(5000.0, &out), 0.63372587191591024588, 1e-13);
    EXPECT_NEAR(bt_blackbody_fraction(10000.0, &out), 0.91415697092801560679, 1e-13);
    EXPECT_NEAR(bt_blackbody_fraction(100000.0, &out), 0.99985521024712409703, 1e-13);

    /* Named errors. */
    EXPECT(BT_STATUS_NON_FINITE, bt_spectral_radiance(NAN, 300.0, &out));
    EXPECT(BT_STATUS_NON_FINITE, bt_spectral_radiance(10.0, INFINITY, &out));
    EXPECT(BT_STATUS_WAVELENGTH_NOT_POSITIVE, bt_spectral_radiance(0.0, 300.0, &out));
    EXPECT(BT_STATUS_WAVELENGTH_NOT_POSITIVE, bt_spectral_radiance(-1.0, 300.0, &out));
    EXPECT(BT_STATUS_TEMPERATURE_NOT_POSITIVE, bt_spectral_radiance(10.0, -0.0, &out));
    EXPECT(BT_STATUS_RADIANCE_UNDERFLOW, bt_spectral_radiance(0.1, 10.0, &out));
    EXPECT(BT_STATUS_LAMBDA_T_NOT_POSITIVE, bt_blackbody_fraction(0.0, &out));
    EXPECT(BT_STATUS_NON_FINITE, bt_blackbody_fraction(-INFINITY, &out));
    EXPECT(BT_STATUS_TEMPERATURE_NOT_POSITIVE, bt_total_radiance(-5.0, &out));
    EXPECT(BT_STATUS_RADIANCE_OVERFLOW, bt_peak_wavelength_um(SUBNORMAL_MIN, &out));
    CHECK(bt_spectral_radiance(10.0, 300.0, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_spectral_photon_radiance(10.0, 300.0, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_blackbody_fraction(1000.0, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_peak_wavelength_um(1000.0, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_total_radiance(1000.0, NULL) == BT_STATUS_NULL_POINTER);

    /* Every pair of hostile and valid arguments. */
    for (i = 0; i < N_ARGS; i++) {
        EXPECT_SANE(bt_blackbody_fraction(ARGS[i], &out));
        if (bt_blackbody_fraction(ARGS[i], &out) == BT_STATUS_OK) {
            CHECK(out >= 0.0 && out <= 1.0);
        }
        EXPECT_SANE(bt_peak_wavelength_um(ARGS[i], &out));
        EXPECT_SANE(bt_total_radiance(ARGS[i], &out));
        for (j = 0; j < N_ARGS; j++) {
            EXPECT_SANE(bt_spectral_radiance(ARGS[i], ARGS[j], &out));
            EXPECT_SANE(bt_spectral_photon_radiance(ARGS[i], ARGS[j], &out));
        }
    }
}

/* ---- bands --------------------------------------------------------------------------- */

static void test_band_values(void) {
    double out;
    static const double wl[] = {8.0, 11.0, 14.0};
    static const double r[] = {0.0, 1.0, 0.0};
    bt_band lwir = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_band mwir = rectangular(3.0, 5.0, BT_DETECTOR_PHOTON);
    bt_band nir = rectangular(0.9, 1.1, BT_DETECTOR_ENERGY);
    bt_band triangle = tabulated(7.0, 15.0, wl, r, 3);
    double temperatures[] = {250.0, 300.0, 500.0, 1000.0, 1500.0};
    size_t i;

    for (i = 0; i < sizeof temperatures / sizeof temperatures[0]; i++) {
        double t = temperatures[i];
        double l_lwir = band_ref(8.0, 14.0, t, 0);
        double l_mwir = band_ref(3.0, 5.0, t, 1);
        double l_triangle = triangle_ref(t);
        double derivative = (band_ref(8.0, 14.0, t + 0.01, 0) -
                             band_ref(8.0, 14.0, t - 0.01, 0)) / 0.02;
        EXPECT_NEAR(bt_band_radiance(&lwir, t, &out), l_lwir, 1e-11);
        EXPECT_NEAR(bt_band_radiance(&mwir, t, &out), l_mwir, 1e-11);
        EXPECT_NEAR(bt_band_radiance(&triangle, t, &out), l_triangle, 1e-10);
        EXPECT_NEAR(bt_band_radiance_derivative(&lwir, t, &out), derivative, 1e-7);
        /* Inversion of the independent radiance. */
        EXPECT_NEAR(bt_band_temperature(&lwir, l_lwir, &out), t, 1e-10);
        EXPECT_NEAR(bt_band_temperature(&mwir, l_mwir, &out), t, 1e-10);
        EXPECT_NEAR(bt_band_temperature(&triangle, l_triangle, &out), t, 1e-9);
    }
    EXPECT_NEAR(bt_band_radiance(&nir, 1500.0, &out), band_ref(0.9, 1.1, 1500.0, 0), 1e-11);
    /* A table that overhangs the band is integrated over the overlap only: here the band
     * is [11, 20] and the table ends at 14, so only the falling half counts. */
    triangle.lo_um = 11.0;
    triangle.hi_um = 20.0;
    EXPECT_NEAR(bt_band_radiance(&triangle, 300.0, &out),
                simpson(11.0, 14.0, 1.0, 0.0, 300.0, 0), 1e-10);
}

static void test_band_hostile(void) {
    double out;
    size_t i, j;
    static const double wl[] = {8.0, 11.0, 14.0};
    static const double r[] = {0.0, 1.0, 0.0};
    static const double unsorted[] = {8.0, 14.0, 11.0};
    static const double duplicate[] = {8.0, 11.0, 11.0};
    static const double negative_wl[] = {-8.0, 11.0, 14.0};
    static const double negative_r[] = {0.5, -1.0, 0.5};
    static const double zero_r[] = {0.0, 0.0, 0.0};
    static const double far_wl[] = {100.0, 110.0, 120.0};
    static const double nan_r[] = {0.0, NAN, 0.0};
    static const double inf_wl[] = {8.0, INFINITY, 14.0};
    bt_band good = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_band band;
    bt_scene scene = plain_scene();
    bt_sakuma_hattori sh = {10.0, 50.0, 1e4};

    /* NULL band, NULL out. */
    EXPECT(BT_STATUS_NULL_POINTER, bt_band_radiance(NULL, 300.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_band_radiance_derivative(NULL, 300.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_band_temperature(NULL, 40.0, &out));
    CHECK(bt_band_radiance(&good, 300.0, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_band_radiance_derivative(&good, 300.0, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_band_temperature(&good, 40.0, NULL) == BT_STATUS_NULL_POINTER);

    /* Empty and reversed bands, bad edges. */
    band = rectangular(10.0, 10.0, BT_DETECTOR_ENERGY);
    EXPECT(BT_STATUS_INVALID_BAND, bt_band_radiance(&band, 300.0, &out));
    band = rectangular(14.0, 8.0, BT_DETECTOR_ENERGY);
    EXPECT(BT_STATUS_INVALID_BAND, bt_band_radiance(&band, 300.0, &out));
    EXPECT(BT_STATUS_INVALID_BAND, bt_band_temperature(&band, 40.0, &out));
    band = rectangular(0.0, 8.0, BT_DETECTOR_ENERGY);
    EXPECT(BT_STATUS_INVALID_BAND, bt_band_radiance(&band, 300.0, &out));
    band = rectangular(NAN, 8.0, BT_DETECTOR_ENERGY);
    EXPECT(BT_STATUS_NON_FINITE, bt_band_radiance(&band, 300.0, &out));
    band = rectangular(8.0, INFINITY, BT_DETECTOR_ENERGY);
    EXPECT(BT_STATUS_NON_FINITE, bt_band_radiance(&band, 300.0, &out));

    /* Detector values outside the enum: read as integers, rejected. */
    band = good;
    set_raw_detector(&band, 7);
    EXPECT(BT_STATUS_INVALID_DETECTOR, bt_band_radiance(&band, 300.0, &out));
    EXPECT(BT_STATUS_INVALID_DETECTOR, bt_band_temperature(&band, 40.0, &out));
    EXPECT(BT_STATUS_INVALID_DETECTOR, bt_sensor_radiance(&band, &scene, 300.0, &out));
    set_raw_detector(&band, 2);
    EXPECT(BT_STATUS_INVALID_DETECTOR, bt_band_radiance(&band, 300.0, &out));
    set_raw_detector(&band, 0xFFFFFFFFu);
    EXPECT(BT_STATUS_INVALID_DETECTOR, bt_band_radiance(&band, 300.0, &out));
    set_raw_detector(&band, 1);
    EXPECT(BT_STATUS_OK, bt_band_radiance(&band, 300.0, &out));

    /* Response tables. */
    band = tabulated(8.0, 14.0, NULL, r, 3);
    EXPECT(BT_STATUS_NULL_POINTER, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, wl, NULL, 3);
    EXPECT(BT_STATUS_NULL_POINTER, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, NULL, NULL, 0); /* rectangular: NULL allowed with length 0 */
    EXPECT_NEAR(bt_band_radiance(&band, 300.0, &out), band_ref(8.0, 14.0, 300.0, 0), 1e-11);
    band = tabulated(8.0, 14.0, wl, r, 0); /* length 0 ignores the pointers */
    EXPECT(BT_STATUS_OK, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, wl, r, 1);
    EXPECT(BT_STATUS_TABLE_TOO_SHORT, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, unsorted, r, 3);
    EXPECT(BT_STATUS_TABLE_NOT_INCREASING, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, duplicate, r, 3);
    EXPECT(BT_STATUS_TABLE_NOT_INCREASING, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, negative_wl, r, 3);
    EXPECT(BT_STATUS_TABLE_NOT_INCREASING, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, wl, negative_r, 3);
    EXPECT(BT_STATUS_TABLE_VALUE_NEGATIVE, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, wl, zero_r, 3);
    EXPECT(BT_STATUS_BAND_EMPTY, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, far_wl, r, 3);
    EXPECT(BT_STATUS_BAND_EMPTY, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, wl, nan_r, 3);
    EXPECT(BT_STATUS_NON_FINITE, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, inf_wl, r, 3);
    EXPECT(BT_STATUS_NON_FINITE, bt_band_radiance(&band, 300.0, &out));
    /* Impossible lengths are caught before any read. */
    band = tabulated(8.0, 14.0, wl, r, SIZE_MAX);
    EXPECT(BT_STATUS_INVALID_BUFFER, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, wl, r, SIZE_MAX / 8 + 1);
    EXPECT(BT_STATUS_INVALID_BUFFER, bt_band_radiance(&band, 300.0, &out));
    band = tabulated(8.0, 14.0, wl, r, SIZE_MAX / 2);
    EXPECT(BT_STATUS_INVALID_BUFFER, bt_band_temperature(&band, 40.0, &out));

    /* Inversion errors. */
    EXPECT(BT_STATUS_RADIANCE_NOT_POSITIVE, bt_band_temperature(&good, 0.0, &out));
    EXPECT(BT_STATUS_RADIANCE_NOT_POSITIVE, bt_band_temperature(&good, -1.0, &out));
    EXPECT(BT_STATUS_RADIANCE_SUBNORMAL, bt_band_temperature(&good, SUBNORMAL_MIN, &out));
    EXPECT(BT_STATUS_NON_FINITE, bt_band_temperature(&good, NAN, &out));
    EXPECT(BT_STATUS_RADIANCE_OUT_OF_RANGE, bt_band_temperature(&good, 1e300, &out));
    EXPECT(BT_STATUS_TEMPERATURE_NOT_POSITIVE, bt_band_radiance(&good, 0.0, &out));

    /* Every hostile edge pair, detector and argument. */
    for (i = 0; i < N_ARGS; i++) {
        for (j = 0; j < N_ARGS; j++) {
            band = rectangular(ARGS[i], ARGS[j], BT_DETECTOR_ENERGY);
            EXPECT_SANE(bt_band_radiance(&band, 300.0, &out));
            band.detector = BT_DETECTOR_PHOTON;
            EXPECT_SANE(bt_band_radiance_derivative(&band, 1000.0, &out));
            EXPECT_SANE(bt_band_temperature(&band, 1.0, &out));
        }
        EXPECT_SANE(bt_band_temperature(&good, ARGS[i], &out));
        EXPECT_SANE(bt_band_radiance(&good, ARGS[i], &out));
        EXPECT_SANE(bt_band_radiance_derivative(&good, ARGS[i], &out));
        EXPECT_SANE(bt_sakuma_hattori_signal(&sh, ARGS[i], &out));
    }
    /* Hostile values inside a table, in each slot of both arrays. */
    for (i = 0; i < N_ARGS; i++) {
        size_t slot;
        for (slot = 0; slot < 3; slot++) {
            double table_wl[3] = {8.0, 11.0, 14.0};
            double table_r[3] = {0.2, 1.0, 0.2};
            table_wl[slot] = ARGS[i];
            band = tabulated(7.0, 15.0, table_wl, table_r, 3);
            EXPECT_SANE(bt_band_radiance(&band, 300.0, &out));
            EXPECT_SANE(bt_band_temperature(&band, 20.0, &out));
            table_wl[slot] = wl[slot];
            table_r[slot] = ARGS[i];
            band = tabulated(7.0, 15.0, table_wl, table_r, 3);
            EXPECT_SANE(bt_band_radiance(&band, 300.0, &out));
            EXPECT_SANE(bt_band_temperature(&band, 20.0, &out));
        }
    }
}

/* ---- the measurement equation -------------------------------------------------------- */

static void test_scene(void) {
    double out;
    size_t i, field;
    bt_band lwir = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_scene scene = full_scene();
    double t = 400.0;
    double s_ref = measurement(&scene, band_ref(8.0, 14.0, t, 0),
                               band_ref(8.0, 14.0, scene.reflected_k, 0),
                               band_ref(8.0, 14.0, scene.atm_k, 0),
                               band_ref(8.0, 14.0, scene.window_reflected_k, 0),
                               band_ref(8.0, 14.0, scene.window_k, 0));
    double apparent;

    EXPECT_NEAR(bt_sensor_radiance(&lwir, &scene, t, &out), s_ref, 1e-11);
    EXPECT_NEAR(bt_object_temperature(&lwir, &scene, s_ref, &out), t, 1e-10);
    /* Apparent temperature: the blackbody temperature of the sensor radiance. */
    EXPECT(BT_STATUS_OK, bt_apparent_temperature(&lwir, &scene, t, &out));
    apparent = out;
    EXPECT_NEAR(bt_band_radiance(&lwir, apparent, &out), s_ref, 1e-11);
    EXPECT_NEAR(bt_object_temperature_from_apparent(&lwir, &scene, apparent, &out), t, 1e-10);
    /* A blackbody in a transparent scene: object = apparent. */
    scene = plain_scene();
    scene.emissivity = 1.0;
    EXPECT_NEAR(bt_object_temperature_from_apparent(&lwir, &scene, 321.0, &out), 321.0, 1e-12);

    /* Named errors. */
    scene = full_scene();
    EXPECT(BT_STATUS_NULL_POINTER, bt_sensor_radiance(NULL, &scene, t, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_sensor_radiance(&lwir, NULL, t, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_object_temperature(&lwir, NULL, s_ref, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_object_temperature(NULL, &scene, s_ref, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_object_temperature_from_apparent(&lwir, NULL, t, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_apparent_temperature(NULL, &scene, t, &out));
    CHECK(bt_sensor_radiance(&lwir, &scene, t, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_object_temperature(&lwir, &scene, s_ref, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_object_temperature_from_apparent(&lwir, &scene, t, NULL) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_apparent_temperature(&lwir, &scene, t, NULL) == BT_STATUS_NULL_POINTER);
    EXPECT(BT_STATUS_SIGNAL_BELOW_BACKGROUND,
           bt_object_temperature(&lwir, &scene, 1.0, &out));
    scene.emissivity = 0.0;
    EXPECT(BT_STATUS_EMISSIVITY_OUT_OF_RANGE, bt_sensor_radiance(&lwir, &scene, t, &out));
    scene.emissivity = 1.5;
    EXPECT(BT_STATUS_EMISSIVITY_OUT_OF_RANGE, bt_object_temperature(&lwir, &scene, 50.0, &out));
    scene = full_scene();
    scene.atm_transmittance = 0.0;
    EXPECT(BT_STATUS_ATMOSPHERE_TRANSMITTANCE_OUT_OF_RANGE,
           bt_sensor_radiance(&lwir, &scene, t, &out));
    scene = full_scene();
    scene.window_transmittance = 1.01;
    EXPECT(BT_STATUS_WINDOW_TRANSMITTANCE_OUT_OF_RANGE,
           bt_sensor_radiance(&lwir, &scene, t, &out));
    scene = full_scene();
    scene.window_reflectance = 1.0;
    EXPECT(BT_STATUS_WINDOW_REFLECTANCE_OUT_OF_RANGE,
           bt_sensor_radiance(&lwir, &scene, t, &out));
    scene = full_scene();
    scene.window_transmittance = 0.9;
    scene.window_reflectance = 0.2;
    EXPECT(BT_STATUS_WINDOW_SUM_EXCEEDS_ONE, bt_sensor_radiance(&lwir, &scene, t, &out));
    scene = full_scene();
    scene.window_k = -1.0;
    EXPECT(BT_STATUS_WINDOW_TEMPERATURE_NOT_POSITIVE, bt_sensor_radiance(&lwir, &scene, t, &out));
    scene = full_scene();
    scene.reflected_k = 0.0;
    EXPECT(BT_STATUS_REFLECTED_TEMPERATURE_NOT_POSITIVE,
           bt_sensor_radiance(&lwir, &scene, t, &out));
    scene = full_scene();
    scene.atm_k = -300.0;
    EXPECT(BT_STATUS_ATMOSPHERE_TEMPERATURE_NOT_POSITIVE,
           bt_object_temperature(&lwir, &scene, s_ref, &out));
    scene = full_scene();
    EXPECT(BT_STATUS_TEMPERATURE_NOT_POSITIVE, bt_sensor_radiance(&lwir, &scene, -1.0, &out));
    scene = full_scene();
    scene.reflected_k = NAN;
    EXPECT(BT_STATUS_NON_FINITE, bt_sensor_radiance(&lwir, &scene, t, &out));

    /* Every field of the scene, and the scalar argument, through every hostile value. */
    for (i = 0; i < N_ARGS; i++) {
        for (field = 0; field < 8; field++) {
            double *fields[8];
            scene = full_scene();
            fields[0] = &scene.emissivity;
            fields[1] = &scene.reflected_k;
            fields[2] = &scene.atm_transmittance;
            fields[3] = &scene.atm_k;
            fields[4] = &scene.window_transmittance;
            fields[5] = &scene.window_reflectance;
            fields[6] = &scene.window_k;
            fields[7] = &scene.window_reflected_k;
            *fields[field] = ARGS[i];
            EXPECT_SANE(bt_sensor_radiance(&lwir, &scene, t, &out));
            EXPECT_SANE(bt_object_temperature(&lwir, &scene, s_ref, &out));
            EXPECT_SANE(bt_object_temperature_from_apparent(&lwir, &scene, 350.0, &out));
            EXPECT_SANE(bt_apparent_temperature(&lwir, &scene, t, &out));
        }
        scene = full_scene();
        EXPECT_SANE(bt_sensor_radiance(&lwir, &scene, ARGS[i], &out));
        EXPECT_SANE(bt_object_temperature(&lwir, &scene, ARGS[i], &out));
        EXPECT_SANE(bt_object_temperature_from_apparent(&lwir, &scene, ARGS[i], &out));
        EXPECT_SANE(bt_apparent_temperature(&lwir, &scene, ARGS[i], &out));
    }
}

/* ---- Sakuma-Hattori ------------------------------------------------------------------ */

static void test_sakuma_hattori(void) {
    double out;
    size_t i, j, k;
    bt_sakuma_hattori p = {10.6, 35.0, 2.5e4}; /* invented: an 8-14 um instrument */
    bt_scene scene = full_scene();
    double temperatures[] = {250.0, 300.0, 600.0, 1200.0};

    for (i = 0; i < sizeof temperatures / sizeof temperatures[0]; i++) {
        double t = temperatures[i];
        double s = sakuma_hattori(&p, t);
        double s_scene =
            measurement(&scene, s, sakuma_hattori(&p, scene.reflected_k),
                        sakuma_hattori(&p, scene.atm_k), sakuma_hattori(&p, scene.window_reflected_k),
                        sakuma_hattori(&p, scene.window_k));
        EXPECT_NEAR(bt_sakuma_hattori_signal(&p, t, &out), s, 1e-13);
        EXPECT_NEAR(bt_sakuma_hattori_temperature(&p, s, &out), t, 1e-12);
        EXPECT_NEAR(bt_sakuma_hattori_sensor_signal(&p, &scene, t, &out), s_scene, 1e-12);
        EXPECT_NEAR(bt_sakuma_hattori_object_temperature(&p, &scene, s_scene, &out), t, 1e-11);
    }

    EXPECT(BT_STATUS_NULL_POINTER, bt_sakuma_hattori_signal(NULL, 300.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_sakuma_hattori_temperature(NULL, 1.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_sakuma_hattori_sensor_signal(&p, NULL, 300.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_sakuma_hattori_object_temperature(NULL, &scene, 1.0, &out));
    CHECK(bt_sakuma_hattori_signal(&p, 300.0, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_sakuma_hattori_temperature(&p, 1.0, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_sakuma_hattori_sensor_signal(&p, &scene, 300.0, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_sakuma_hattori_object_temperature(&p, &scene, 1.0, NULL) ==
          BT_STATUS_NULL_POINTER);
    p.a_um = 0.0;
    EXPECT(BT_STATUS_CALIBRATION_PARAMETER_INVALID, bt_sakuma_hattori_signal(&p, 300.0, &out));
    p.a_um = 10.6;
    p.c = -1.0;
    EXPECT(BT_STATUS_CALIBRATION_PARAMETER_INVALID,
           bt_sakuma_hattori_temperature(&p, 1.0, &out));
    p.c = 2.5e4;
    p.b_umk = -5000.0;
    EXPECT(BT_STATUS_CALIBRATION_OUT_OF_DOMAIN, bt_sakuma_hattori_signal(&p, 300.0, &out));
    p.b_umk = NAN;
    EXPECT(BT_STATUS_NON_FINITE, bt_sakuma_hattori_signal(&p, 300.0, &out));
    p.b_umk = 35.0;
    EXPECT(BT_STATUS_RADIANCE_NOT_POSITIVE, bt_sakuma_hattori_temperature(&p, 0.0, &out));

    /* Every combination of hostile parameters with hostile arguments. */
    for (i = 0; i < N_ARGS; i++) {
        for (j = 0; j < N_ARGS; j++) {
            for (k = 0; k < N_ARGS; k += 3) {
                bt_sakuma_hattori q = {ARGS[i], ARGS[j], ARGS[k]};
                EXPECT_SANE(bt_sakuma_hattori_signal(&q, 300.0, &out));
                EXPECT_SANE(bt_sakuma_hattori_temperature(&q, ARGS[(i + j + k) % N_ARGS], &out));
            }
        }
        EXPECT_SANE(bt_sakuma_hattori_temperature(&p, ARGS[i], &out));
        EXPECT_SANE(bt_sakuma_hattori_sensor_signal(&p, &scene, ARGS[i], &out));
        EXPECT_SANE(bt_sakuma_hattori_object_temperature(&p, &scene, ARGS[i], &out));
    }
}

/* ---- calibration fits ------------------------------------------------------------------ */

static const bt_sakuma_hattori SH_SENTINEL = {-1.0, -2.0, -3.0};

static int sh_untouched(const bt_sakuma_hattori *p) {
    return memcmp(p, &SH_SENTINEL, sizeof *p) == 0;
}

static void test_fits(void) {
    double out, max_error_k = SENTINEL;
    bt_sakuma_hattori fit = SH_SENTINEL;
    bt_points_fit report;
    bt_band lwir = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_band bad = rectangular(14.0, 8.0, BT_DETECTOR_ENERGY);
    const bt_sakuma_hattori truth = {10.6, 35.0, 2.5e4}; /* invented instrument */
    double t_k[6] = {273.15, 323.15, 373.15, 473.15, 573.15, 673.15};
    double signal[6], signal_u[6];
    double t;
    size_t i;
    bt_status status;

    /* Fit to the band: the curve must reproduce the independent band radiance. */
    status = bt_sakuma_hattori_fit_band(&lwir, 250.0, 500.0, &fit, &max_error_k);
    CHECK(status == BT_STATUS_OK);
    CHECK(max_error_k >= 0.0 && max_error_k < 0.05);
    for (t = 250.0; t <= 500.0; t += 25.0) {
        EXPECT_NEAR(bt_sakuma_hattori_temperature(&fit, band_ref(8.0, 14.0, t, 0), &out), t,
                    (max_error_k + 1e-6) / t);
    }
    fit = SH_SENTINEL;
    max_error_k = SENTINEL;
    CHECK(bt_sakuma_hattori_fit_band(&bad, 250.0, 500.0, &fit, &max_error_k) ==
          BT_STATUS_INVALID_BAND);
    CHECK(bt_sakuma_hattori_fit_band(&lwir, 500.0, 250.0, &fit, &max_error_k) ==
          BT_STATUS_CALIBRATION_RANGE_INVALID);
    CHECK(bt_sakuma_hattori_fit_band(&lwir, NAN, 250.0, &fit, &max_error_k) ==
          BT_STATUS_NON_FINITE);
    CHECK(bt_sakuma_hattori_fit_band(NULL, 250.0, 500.0, &fit, &max_error_k) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_sakuma_hattori_fit_band(&lwir, 250.0, 500.0, NULL, &max_error_k) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_sakuma_hattori_fit_band(&lwir, 250.0, 500.0, &fit, NULL) ==
          BT_STATUS_NULL_POINTER);
    CHECK(sh_untouched(&fit) && untouched(max_error_k));
    for (i = 0; i < N_ARGS; i++) {
        status = bt_sakuma_hattori_fit_band(&lwir, ARGS[i], 400.0, &fit, &max_error_k);
        CHECK(status == BT_STATUS_OK ? isfinite(fit.a_um) && isfinite(max_error_k)
                                     : sh_untouched(&fit) && untouched(max_error_k));
        fit = SH_SENTINEL;
        max_error_k = SENTINEL;
        status = bt_sakuma_hattori_fit_band(&lwir, 300.0, ARGS[i], &fit, &max_error_k);
        CHECK(status == BT_STATUS_OK ? isfinite(fit.a_um) && isfinite(max_error_k)
                                     : sh_untouched(&fit) && untouched(max_error_k));
        fit = SH_SENTINEL;
        max_error_k = SENTINEL;
    }

    /* Fit to points made with the closed form: the parameters come back. */
    for (i = 0; i < 6; i++) {
        signal[i] = sakuma_hattori(&truth, t_k[i]);
        signal_u[i] = 1e-3 * signal[i];
    }
    CHECK(bt_sakuma_hattori_fit_points(t_k, signal, 6, &fit) == BT_STATUS_OK);
    CHECK(fabs(fit.a_um - truth.a_um) < 1e-6 * truth.a_um);
    CHECK(fabs(fit.c - truth.c) < 1e-5 * truth.c);
    CHECK(fabs(fit.b_umk - truth.b_umk) < 1e-3);
    EXPECT_NEAR(bt_sakuma_hattori_temperature(&fit, signal[3], &out), t_k[3], 1e-9);
    CHECK(bt_sakuma_hattori_fit_points_report(t_k, signal, signal_u, 6, &report) ==
          BT_STATUS_OK);
    CHECK(fabs(report.params.a_um - truth.a_um) < 1e-6 * truth.a_um);
    CHECK(report.max_residual_k < 1e-6 && report.rms_residual_k <= report.max_residual_k);
    CHECK(report.iterations > 0 && report.covariance[0][0] > 0.0);
    CHECK(fabs(report.covariance[0][1] - report.covariance[1][0]) <=
          1e-9 * sqrt(report.covariance[0][0] * report.covariance[1][1]));
    CHECK(bt_sakuma_hattori_fit_points_report(t_k, signal, NULL, 6, &report) == BT_STATUS_OK);

    /* Hostile point sets. */
    fit = SH_SENTINEL;
    CHECK(bt_sakuma_hattori_fit_points(NULL, signal, 6, &fit) == BT_STATUS_NULL_POINTER);
    CHECK(bt_sakuma_hattori_fit_points(t_k, NULL, 6, &fit) == BT_STATUS_NULL_POINTER);
    CHECK(bt_sakuma_hattori_fit_points(t_k, signal, 6, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_sakuma_hattori_fit_points(NULL, NULL, 0, &fit) ==
          BT_STATUS_CALIBRATION_TOO_FEW_POINTS);
    CHECK(bt_sakuma_hattori_fit_points(t_k, signal, 2, &fit) ==
          BT_STATUS_CALIBRATION_TOO_FEW_POINTS);
    CHECK(bt_sakuma_hattori_fit_points(t_k, signal, SIZE_MAX, &fit) ==
          BT_STATUS_INVALID_BUFFER);
    {
        /* More than 256 points (valid buffers) are refused up front: bounded time. */
        static double many_t[257], many_s[257], many_u[257];
        int i;
        for (i = 0; i < 257; i++) {
            many_t[i] = 300.0 + i;
            many_s[i] = 1.0 + i;
            many_u[i] = 0.01;
        }
        CHECK(bt_sakuma_hattori_fit_points(many_t, many_s, 257, &fit) ==
              BT_STATUS_CALIBRATION_TOO_MANY_POINTS);
        CHECK(bt_sakuma_hattori_fit_points_report(many_t, many_s, many_u, 257, &report) ==
              BT_STATUS_CALIBRATION_TOO_MANY_POINTS);
    }
    CHECK(bt_sakuma_hattori_fit_points_report(t_k, signal, signal_u, 6, NULL) ==
          BT_STATUS_NULL_POINTER);
    CHECK(sh_untouched(&fit));
    {
        double dup_t[4] = {300.0, 400.0, 400.0, 500.0};
        double falling[4] = {4.0, 3.0, 2.0, 1.0};
        double rising[4] = {1.0, 2.0, 3.0, 4.0};
        double four_t[4] = {300.0, 400.0, 450.0, 500.0};
        double bad_u[4] = {1.0, 0.0, 1.0, 1.0};
        CHECK(bt_sakuma_hattori_fit_points(dup_t, rising, 4, &fit) ==
              BT_STATUS_CALIBRATION_DUPLICATE_TEMPERATURE);
        CHECK(bt_sakuma_hattori_fit_points(four_t, falling, 4, &fit) ==
              BT_STATUS_CALIBRATION_SIGNAL_NOT_INCREASING);
        CHECK(bt_sakuma_hattori_fit_points_report(four_t, rising, bad_u, 4, &report) ==
              BT_STATUS_CALIBRATION_UNCERTAINTY_INVALID);
        CHECK(sh_untouched(&fit));
        /* Every hostile value in every slot of both arrays. */
        for (i = 0; i < N_ARGS; i++) {
            size_t slot;
            for (slot = 0; slot < 4; slot++) {
                double tt[4] = {300.0, 400.0, 450.0, 500.0};
                double ss[4];
                size_t k;
                for (k = 0; k < 4; k++) {
                    ss[k] = sakuma_hattori(&truth, tt[k]);
                }
                tt[slot] = ARGS[i];
                status = bt_sakuma_hattori_fit_points(tt, ss, 4, &fit);
                CHECK(status == BT_STATUS_OK ? isfinite(fit.a_um) && isfinite(fit.c)
                                             : sh_untouched(&fit) && known_status(status));
                fit = SH_SENTINEL;
                tt[slot] = 300.0 + 50.0 * (double)slot;
                ss[slot] = ARGS[i];
                status = bt_sakuma_hattori_fit_points(tt, ss, 4, &fit);
                CHECK(status == BT_STATUS_OK ? isfinite(fit.a_um) && isfinite(fit.c)
                                             : sh_untouched(&fit) && known_status(status));
                fit = SH_SENTINEL;
            }
        }
    }
}

/* Edges and temperatures so small that x = c2/(lambda T) overflows or exceeds 1e96: a value
 * or a named status, never a crash or a hang. (The band [1e-120, 8] um at 300 K has the
 * radiance of [1e-3, 8] um, 20.5056 W m^-2 sr^-1.) */
static void test_extreme_edges(void) {
    double out;
    bt_band band = rectangular(DBL_MIN, 8.0, BT_DETECTOR_ENERGY);
    bt_band good = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_scene scene = full_scene();
    EXPECT_SANE(bt_band_radiance(&band, 300.0, &out));
    band.lo_um = 1e-120;
    EXPECT_NEAR(bt_band_radiance(&band, 300.0, &out), band_ref(1e-3, 8.0, 300.0, 0), 1e-9);
    band.lo_um = 1e-50;
    EXPECT_NEAR(bt_band_radiance(&band, 300.0, &out), band_ref(1e-3, 8.0, 300.0, 0), 1e-9);
    EXPECT_SANE(bt_band_radiance(&good, SUBNORMAL_MIN, &out));
    scene.reflected_k = DBL_MIN;
    EXPECT_SANE(bt_sensor_radiance(&good, &scene, 300.0, &out));
}

/* ---- frames ---------------------------------------------------------------------------- */

/* Invented instrument: 8-14 um microbolometer, L = 0.002 W m^-2 sr^-1 per count - 2. */
#define FRAME_GAIN 0.002
#define FRAME_OFFSET (-2.0)
#define FRAME_ROWS 128
static bt_frame_row frame_table[FRAME_ROWS];

static void *misaligned(void *p) { return (void *)((uintptr_t)p + 1); }

static int converter_equal(const bt_frame_converter *a, const bt_frame_converter *b) {
    return memcmp(a, b, sizeof *a) == 0;
}

static int summary_untouched(const bt_frame_summary *s) {
    return s->pixels == 777 && s->converted == 777 && s->dead == 777;
}

static bt_frame_summary summary_sentinel(void) {
    bt_frame_summary s;
    memset(&s, 0, sizeof s);
    s.pixels = s.converted = s.dead = 777;
    return s;
}

/* |T_frame - T_exact| for one pixel whose sensor signal is `signal` (double arithmetic),
 * against bt_object_temperature; NaN when the exact inversion fails. */
static double frame_error(const bt_band *band, const bt_scene *scene, double signal,
                          float kelvin) {
    double exact = SENTINEL;
    if (bt_object_temperature(band, scene, signal, &exact) != BT_STATUS_OK) {
        return NAN;
    }
    return fabs((double)kelvin - exact);
}

static void test_frame_rows(void) {
    bt_band band = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_sakuma_hattori sh = {10.5, 50.0, 1.0e6};
    size_t rows = 12345, i;
    CHECK(bt_frame_table_rows_band(&band, 250.0, 1500.0, 1e-3, &rows) == BT_STATUS_OK);
    /* 61 rows, 976 bytes for this band, range and tolerance (tests/frame_table.rs). */
    CHECK(rows >= 16 && rows * sizeof(bt_frame_row) <= 1024);
    rows = 12345;
    CHECK(bt_frame_table_rows_sakuma_hattori(&sh, 250.0, 1500.0, 1e-3, &rows) ==
          BT_STATUS_OK);
    CHECK(rows > 0 && rows <= FRAME_ROWS);
    rows = 12345;
    CHECK(bt_frame_table_rows_band(NULL, 250.0, 1500.0, 1e-3, &rows) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_table_rows_band(&band, 250.0, 1500.0, 1e-3, NULL) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_table_rows_band(&band, 250.0, 1500.0, 1e-3, (size_t *)misaligned(&rows)) ==
          BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_table_rows_sakuma_hattori(NULL, 250.0, 1500.0, 1e-3, &rows) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_table_rows_band(&band, 1500.0, 250.0, 1e-3, &rows) ==
          BT_STATUS_FRAME_RANGE_INVALID);
    CHECK(bt_frame_table_rows_band(&band, 300.0, 300.0, 1e-3, &rows) ==
          BT_STATUS_FRAME_RANGE_INVALID);
    CHECK(bt_frame_table_rows_band(&band, 250.0, 1500.0, 0.0, &rows) ==
          BT_STATUS_FRAME_TOLERANCE_INVALID);
    CHECK(bt_frame_table_rows_band(&band, 250.0, 1500.0, -1.0, &rows) ==
          BT_STATUS_FRAME_TOLERANCE_INVALID);
    CHECK(bt_frame_table_rows_band(&band, 250.0, 1500.0, NAN, &rows) ==
          BT_STATUS_FRAME_TOLERANCE_INVALID);
    CHECK(bt_frame_table_rows_band(&band, 250.0, 1500.0, 1e-9, &rows) ==
          BT_STATUS_FRAME_TOLERANCE_UNREACHABLE);
    CHECK(rows == 12345);
    /* Unservable ranges are refused up front (microseconds, not seconds): below the float
     * output floor, and more rows than the library builds. */
    {
        bt_band nir = rectangular(0.9, 1.1, BT_DETECTOR_ENERGY);
        bt_band blue = rectangular(0.4, 0.5, BT_DETECTOR_PHOTON);
        CHECK(bt_frame_table_rows_band(&nir, 300.0, 1.39e25, 0.9, &rows) ==
              BT_STATUS_FRAME_TOLERANCE_UNREACHABLE);
        CHECK(bt_frame_table_rows_band(&band, 250.0, 1e6, 1e-3, &rows) ==
              BT_STATUS_FRAME_TOLERANCE_UNREACHABLE);
        CHECK(bt_frame_table_rows_band(&blue, 500.0, 5000.0, 5e-4, &rows) ==
              BT_STATUS_FRAME_TABLE_TOO_LARGE);
        CHECK(rows == 12345);
    }
    /* Every hostile value in every scalar slot: a row count or a named status. */
    for (i = 0; i < N_ARGS; i++) {
        size_t slot;
        for (slot = 0; slot < 3; slot++) {
            double a[3] = {250.0, 1500.0, 1e-2};
            bt_status status;
            a[slot] = ARGS[i];
            rows = 12345;
            status = bt_frame_table_rows_band(&band, a[0], a[1], a[2], &rows);
            CHECK(status == BT_STATUS_OK ? rows > 0 : rows == 12345 && known_status(status));
            rows = 12345;
            status = bt_frame_table_rows_sakuma_hattori(&sh, a[0], a[1], a[2], &rows);
            CHECK(status == BT_STATUS_OK ? rows > 0 : rows == 12345 && known_status(status));
        }
    }
}

/* A converter refuses rows that are not its own (they used to convert, silently wrong).
 * Band 8-14 um energy; scene e 0.92, reflected 293.15 K, air 1 at 293.15 K, no window;
 * counts gain 0.002, offset -2; 250-1200 K. Reference temperatures from an outside check
 * against an independent high-precision reference, to the digits it gave. */
static bt_frame_row coarse_rows[64];
static bt_frame_row fine_rows[128];
static bt_frame_row sh_rows[128];

static void test_frame_foreign_rows(void) {
    bt_band band = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_scene scene = {0.92, 293.15, 1.0, 293.15, 1.0, 0.0, 293.15, 293.15};
    bt_rails rails = {0, 65535};
    bt_sakuma_hattori sh = {10.2, 25.0, 1.0e6};
    bt_frame_converter coarse, fine, shc;
    bt_frame_geometry geom;
    bt_frame_summary summary = summary_sentinel();
    uint16_t counts[4] = {30000, 31000, 40000, 52000};
    const double expected[4] = {304.46, 306.93, 327.13, 350.11};
    float kelvin[4] = {-1.0f, -1.0f, -1.0f, -1.0f};
    size_t coarse_n = 0, fine_n = 0, sh_n = 0, i;

    CHECK(bt_frame_table_rows_band(&band, 250.0, 1200.0, 1e-2, &coarse_n) == BT_STATUS_OK);
    CHECK(bt_frame_table_rows_band(&band, 250.0, 1200.0, 1e-3, &fine_n) == BT_STATUS_OK);
    CHECK(coarse_n < fine_n && fine_n <= 128);
    CHECK(bt_frame_converter_new_band(&band, &scene, 0.002, -2.0, &rails, 250.0, 1200.0, 1e-2,
                                      coarse_rows, 64, &coarse) == BT_STATUS_OK);
    CHECK(bt_frame_converter_new_band(&band, &scene, 0.002, -2.0, &rails, 250.0, 1200.0, 1e-3,
                                      fine_rows, 128, &fine) == BT_STATUS_OK);
    /* Its own rows: the reference temperatures. */
    CHECK(bt_frame_convert_counts(&coarse, coarse_rows, coarse_n, counts, 4, NULL, 0, kelvin, 4,
                                  &summary) == BT_STATUS_OK);
    CHECK(summary.converted == 4);
    for (i = 0; i < 4; i++) {
        CHECK(fabs((double)kelvin[i] - expected[i]) < 0.006);
    }
    /* The 1 mK table's rows with the 10 mK converter, as many rows as the caller claims. */
    summary = summary_sentinel();
    kelvin[0] = -1.0f;
    CHECK(bt_frame_convert_counts(&coarse, fine_rows, fine_n, counts, 4, NULL, 0, kelvin, 4,
                                  &summary) == BT_STATUS_FRAME_ROWS_MISMATCH);
    CHECK(bt_frame_convert_counts(&coarse, fine_rows, coarse_n, counts, 4, NULL, 0, kelvin, 4,
                                  &summary) == BT_STATUS_FRAME_ROWS_MISMATCH);
    CHECK(summary_untouched(&summary) && kelvin[0] == -1.0f);
    CHECK(bt_frame_converter_geometry(&coarse, fine_rows, fine_n, &geom) ==
          BT_STATUS_FRAME_ROWS_MISMATCH);
    CHECK(bt_frame_converter_set_rails(&coarse, fine_rows, fine_n, &rails) ==
          BT_STATUS_FRAME_ROWS_MISMATCH);
    CHECK(bt_frame_converter_set_scene_band(&coarse, fine_rows, fine_n, &band, &scene) ==
          BT_STATUS_FRAME_ROWS_MISMATCH);
    /* A Sakuma-Hattori converter given the band's 10 mK rows. */
    CHECK(bt_frame_converter_new_sakuma_hattori(&sh, &scene, 100.0, &rails, 250.0, 1200.0,
                                                1e-2, sh_rows, 128, &shc) == BT_STATUS_OK);
    CHECK(bt_frame_converter_geometry(&shc, sh_rows, 128, &geom) == BT_STATUS_OK);
    sh_n = geom.rows;
    CHECK(bt_frame_convert_counts(&shc, coarse_rows, sh_n, counts, 4, NULL, 0, kelvin, 4,
                                  &summary) == BT_STATUS_FRAME_ROWS_MISMATCH);
    /* One changed bit in its own rows. */
    coarse_rows[coarse_n / 2].coefficients[1] *= 1.0000001f;
    CHECK(bt_frame_convert_counts(&coarse, coarse_rows, coarse_n, counts, 4, NULL, 0, kelvin, 4,
                                  &summary) == BT_STATUS_FRAME_ROWS_MISMATCH);
    CHECK(summary_untouched(&summary));
    /* A copy of converter and rows (as from flash) works wherever it is placed. */
    memcpy(sh_rows, fine_rows, fine_n * sizeof fine_rows[0]);
    summary = summary_sentinel();
    CHECK(bt_frame_convert_counts(&fine, sh_rows, fine_n, counts, 4, NULL, 0, kelvin, 4,
                                  &summary) == BT_STATUS_OK);
    CHECK(summary.converted == 4 && fabs((double)kelvin[3] - expected[3]) < 0.006);
}

/* The reported bound holds for every converted count (it used to be exceeded). The two
 * outside reproductions, against bt_object_temperature: a Sakuma-Hattori curve (every
 * count of its 14-bit ramp) and a 0.8-1.1 um photon band (every 64th count, and the count
 * that exceeded the old figure). */
static bt_frame_row bound_rows[512];
static uint16_t ramp_counts[65536];
static float ramp_kelvin[65536];

static double ramp_worst(const bt_frame_converter *conv, size_t rows, const bt_band *band,
                         const bt_sakuma_hattori *sh, const bt_scene *scene, double gain,
                         double offset, size_t n) {
    bt_frame_summary summary = summary_sentinel();
    double worst = 0.0;
    size_t i;
    CHECK(bt_frame_convert_counts(conv, bound_rows, rows, ramp_counts, n, NULL, 0, ramp_kelvin,
                                  n, &summary) == BT_STATUS_OK);
    for (i = 0; i < n; i++) {
        double exact = SENTINEL, err;
        double signal = gain * ramp_counts[i] + offset;
        if (isnan(ramp_kelvin[i])) {
            continue;
        }
        if (band != NULL) {
            CHECK(bt_object_temperature(band, scene, signal, &exact) == BT_STATUS_OK);
        } else {
            /* Sakuma-Hattori: invert the scene on the curve's own signal scale. */
            double lo = 1.0, hi = 5000.0, s_refl = 0.0, s_air = 0.0, s_win = 0.0, s_wr = 0.0;
            int k;
            CHECK(bt_sakuma_hattori_signal(sh, scene->reflected_k, &s_refl) == BT_STATUS_OK);
            CHECK(bt_sakuma_hattori_signal(sh, scene->atm_k, &s_air) == BT_STATUS_OK);
            CHECK(bt_sakuma_hattori_signal(sh, scene->window_k, &s_win) == BT_STATUS_OK);
            CHECK(bt_sakuma_hattori_signal(sh, scene->window_reflected_k, &s_wr) ==
                  BT_STATUS_OK);
            for (k = 0; k < 200; k++) { /* bisection on the measurement equation */
                double mid = 0.5 * (lo + hi), s_obj = 0.0, model;
                CHECK(bt_sakuma_hattori_signal(sh, mid, &s_obj) == BT_STATUS_OK);
                model = scene->window_transmittance *
                            (scene->atm_transmittance *
                                 (scene->emissivity * s_obj + (1.0 - scene->emissivity) * s_refl) +
                             (1.0 - scene->atm_transmittance) * s_air) +
                        scene->window_reflectance * s_wr +
                        (1.0 - scene->window_transmittance - scene->window_reflectance) * s_win;
                if (model < signal) {
                    lo = mid;
                } else {
                    hi = mid;
                }
                if (hi - lo < 1e-9) {
                    break;
                }
            }
            exact = 0.5 * (lo + hi);
        }
        err = fabs((double)ramp_kelvin[i] - exact);
        if (err > worst) {
            worst = err;
        }
    }
    return worst;
}

static void test_frame_bound(void) {
    bt_sakuma_hattori sh = {0.9325, 0.41, 6e8};
    bt_scene sh_scene = {0.7, 600.0, 0.99, 300.0, 0.95, 0.02, 310.0, 300.0};
    bt_rails sh_rails = {0, 16383};
    bt_band nir = rectangular(0.8, 1.1, BT_DETECTOR_PHOTON);
    bt_scene nir_scene = {0.6, 900.0, 0.98, 300.0, 0.92, 0.04, 320.0, 300.0};
    bt_rails nir_rails = {64, 65472};
    const double gain = 1.5950699817113938e18, offset = -5.8042016636326524e20;
    bt_frame_converter conv;
    bt_frame_geometry geom;
    size_t i, n;
    double worst;

    CHECK(bt_frame_converter_new_sakuma_hattori(&sh, &sh_scene, 100.5, &sh_rails, 850.0, 1450.0,
                                                0.01, bound_rows, 512, &conv) == BT_STATUS_OK);
    CHECK(bt_frame_converter_geometry(&conv, bound_rows, 512, &geom) == BT_STATUS_OK);
    for (i = 0; i < 16384; i++) {
        ramp_counts[i] = (uint16_t)i;
    }
    worst = ramp_worst(&conv, geom.rows, NULL, &sh, &sh_scene, 1.0, -100.5, 16384);
    CHECK(worst > 0.0 && worst <= geom.max_pixel_error_k && geom.max_pixel_error_k <= 0.01);
    ramp_counts[0] = 6146; /* exact 1391.165896706 K from the outside reference */
    CHECK(bt_frame_convert_counts(&conv, bound_rows, geom.rows, ramp_counts, 1, NULL, 0,
                                  ramp_kelvin, 1, NULL) == BT_STATUS_NULL_POINTER);
    {
        bt_frame_summary summary = summary_sentinel();
        CHECK(bt_frame_convert_counts(&conv, bound_rows, geom.rows, ramp_counts, 1, NULL, 0,
                                      ramp_kelvin, 1, &summary) == BT_STATUS_OK);
        CHECK(fabs((double)ramp_kelvin[0] - 1391.165896706) <= geom.max_pixel_error_k);
    }

    CHECK(bt_frame_converter_new_band(&nir, &nir_scene, gain, offset, &nir_rails, 700.0, 2000.0,
                                      0.01, bound_rows, 512, &conv) == BT_STATUS_OK);
    CHECK(bt_frame_converter_geometry(&conv, bound_rows, 512, &geom) == BT_STATUS_OK);
    n = 0;
    for (i = 0; i < 65536; i += 64) {
        ramp_counts[n++] = (uint16_t)i;
    }
    ramp_counts[n++] = 29138; /* exact 1922.263644 K from the outside reference */
    worst = ramp_worst(&conv, geom.rows, &nir, NULL, &nir_scene, gain, offset, n);
    CHECK(worst > 0.0 && worst <= geom.max_pixel_error_k && geom.max_pixel_error_k <= 0.01);
    CHECK(fabs((double)ramp_kelvin[n - 1] - 1922.263644) <= geom.max_pixel_error_k);
}

/* Status order: an invalid emissivity wins over a non-finite signal. */
static void test_frame_status_order(void) {
    bt_band band = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_scene scene = {0.92, 293.15, 1.0, 293.15, 1.0, 0.0, 293.15, 293.15};
    bt_rails rails = {0, 65535};
    bt_frame_converter conv;
    bt_frame_summary summary = summary_sentinel();
    float signal[3] = {NAN, INFINITY, NAN};
    float emissivity[3] = {0.0f, NAN, 0.9f};
    float kelvin[3];
    size_t rows = 0;
    CHECK(bt_frame_converter_new_band(&band, &scene, 0.002, -2.0, &rails, 250.0, 1200.0, 1e-2,
                                      coarse_rows, 64, &conv) == BT_STATUS_OK);
    CHECK(bt_frame_table_rows_band(&band, 250.0, 1200.0, 1e-2, &rows) == BT_STATUS_OK);
    CHECK(bt_frame_convert_signal(&conv, coarse_rows, rows, signal, 3, emissivity, 3, kelvin, 3,
                                  &summary) == BT_STATUS_OK);
    CHECK(summary.emissivity_invalid == 2 && summary.non_finite == 1);
    CHECK(isnan(kelvin[0]) && isnan(kelvin[1]) && isnan(kelvin[2]));
}

static void test_frame_band(void) {
    bt_band band = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_band other = rectangular(8.0, 13.0, BT_DETECTOR_ENERGY);
    bt_scene scene = full_scene();
    bt_rails rails = {0, 65535};
    bt_rails bad_rails = {500, 500};
    bt_frame_converter conv, sentinel, copy;
    bt_frame_geometry geom;
    bt_frame_summary summary;
    uint16_t counts[8] = {0, 65535, 1, 20000, 30000, 40000, 50000, 60000};
    float emissivity[8] = {0.9f, 0.9f, 0.9f, 0.8f, 0.5f, 1.0f, NAN, 0.0f};
    float signal[8];
    float kelvin[8];
    float big[16];
    size_t i, rows = 0;
    bt_status status;

    memset(&sentinel, 0xA5, sizeof sentinel);
    conv = sentinel;
    CHECK(bt_frame_table_rows_band(&band, 250.0, 1500.0, 1e-3, &rows) == BT_STATUS_OK);
    /* Hostile construction: out untouched. */
    CHECK(bt_frame_converter_new_band(NULL, &scene, FRAME_GAIN, FRAME_OFFSET, &rails, 250.0,
                                      1500.0, 1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_converter_new_band(&band, NULL, FRAME_GAIN, FRAME_OFFSET, &rails, 250.0,
                                      1500.0, 1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, NULL, 250.0,
                                      1500.0, 1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, &rails, 250.0,
                                      1500.0, 1e-3, NULL, FRAME_ROWS, &conv) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, &rails, 250.0,
                                      1500.0, 1e-3, frame_table, FRAME_ROWS, NULL) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, &rails, 250.0,
                                      1500.0, 1e-3, frame_table, 0, &conv) ==
          BT_STATUS_FRAME_STORAGE_TOO_SMALL);
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, &rails, 250.0,
                                      1500.0, 1e-3, frame_table, rows - 1, &conv) ==
          BT_STATUS_FRAME_STORAGE_TOO_SMALL);
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, &rails, 250.0,
                                      1500.0, 1e-3, frame_table, SIZE_MAX, &conv) ==
          BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, &rails, 250.0,
                                      1500.0, 1e-3, (bt_frame_row *)misaligned(frame_table),
                                      FRAME_ROWS - 1, &conv) == BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, &rails, 250.0,
                                      1500.0, 1e-3, frame_table, FRAME_ROWS,
                                      (bt_frame_converter *)misaligned(&big)) ==
          BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_converter_new_band(&band, &scene, 0.0, FRAME_OFFSET, &rails, 250.0, 1500.0,
                                      1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_FRAME_COUNTS_MAP_INVALID);
    CHECK(bt_frame_converter_new_band(&band, &scene, NAN, FRAME_OFFSET, &rails, 250.0, 1500.0,
                                      1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_FRAME_COUNTS_MAP_INVALID);
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, INFINITY, &rails, 250.0,
                                      1500.0, 1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_FRAME_COUNTS_MAP_INVALID);
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, &bad_rails,
                                      250.0, 1500.0, 1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_FRAME_RAILS_INVALID);
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, &rails, 1500.0,
                                      250.0, 1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_FRAME_RANGE_INVALID);
    scene.emissivity = 1.5;
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, &rails, 250.0,
                                      1500.0, 1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_EMISSIVITY_OUT_OF_RANGE);
    scene = full_scene();
    CHECK(converter_equal(&conv, &sentinel));
    for (i = 0; i < N_ARGS; i++) {
        size_t slot;
        for (slot = 0; slot < 5; slot++) {
            double a[5] = {FRAME_GAIN, FRAME_OFFSET, 250.0, 1500.0, 1e-2};
            a[slot] = ARGS[i];
            conv = sentinel;
            status = bt_frame_converter_new_band(&band, &scene, a[0], a[1], &rails, a[2], a[3],
                                                 a[4], frame_table, FRAME_ROWS, &conv);
            CHECK(status == BT_STATUS_OK ? !converter_equal(&conv, &sentinel)
                                         : converter_equal(&conv, &sentinel) &&
                                               known_status(status));
        }
    }

    /* The converter, and its measured geometry. */
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, &rails, 250.0,
                                      1500.0, 1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_OK);
    CHECK(bt_frame_converter_geometry(&conv, frame_table, rows, &geom) == BT_STATUS_OK);
    CHECK(geom.rows == rows && geom.lo_k == 250.0 && geom.hi_k == 1500.0);
    CHECK(geom.tolerance_k == 1e-3 && geom.max_pixel_error_k <= 1e-3);
    CHECK(geom.max_table_error_k <= geom.max_pixel_error_k && geom.max_table_error_k > 0.0);
    CHECK(geom.signal_lo > 0.0 && geom.signal_lo < geom.signal_hi);
    CHECK(bt_frame_converter_geometry(NULL, frame_table, rows, &geom) == BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_converter_geometry(&conv, frame_table, rows, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_converter_geometry(&conv, frame_table, rows - 1, &geom) ==
          BT_STATUS_FRAME_STORAGE_TOO_SMALL);

    /* Uniform scene from counts, checked pixel by pixel against exact inversion. */
    summary = summary_sentinel();
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, counts, 8, NULL, 0, kelvin, 8,
                                  &summary) == BT_STATUS_OK);
    CHECK(summary.pixels == 8 && summary.dead == 1 && summary.saturated == 1);
    CHECK(summary.converted + summary.below_background + summary.below_range == 6);
    CHECK(summary.converted == 5 && summary.below_background == 1);
    CHECK(isnan(kelvin[0]) && isnan(kelvin[1]) && isnan(kelvin[2]));
    for (i = 3; i < 8; i++) {
        double err = frame_error(&band, &scene, FRAME_GAIN * counts[i] + FRAME_OFFSET, kelvin[i]);
        CHECK(err <= geom.max_pixel_error_k);
        CHECK(kelvin[i] > 250.0f && kelvin[i] < 1500.0f);
    }
    CHECK(kelvin[3] < kelvin[4] && kelvin[4] < kelvin[5] && kelvin[6] < kelvin[7]);

    /* Emissivity map: pixel i at emissivity[i], against the scene with that emissivity. */
    summary = summary_sentinel();
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, counts, 8, emissivity, 8, kelvin, 8,
                                  &summary) == BT_STATUS_OK);
    CHECK(summary.emissivity_invalid == 2 && summary.dead == 1 && summary.saturated == 1);
    CHECK(isnan(kelvin[6]) && isnan(kelvin[7]));
    for (i = 3; i < 6; i++) {
        bt_scene pixel = scene;
        pixel.emissivity = emissivity[i];
        /* Float arithmetic of the per-pixel form adds ~2 ulps of the signal: 10 mK here. */
        CHECK(frame_error(&band, &pixel, FRAME_GAIN * counts[i] + FRAME_OFFSET, kelvin[i]) <=
              1e-2);
    }

    /* Signal frame: the same pixels as band radiance. */
    for (i = 0; i < 8; i++) {
        signal[i] = (float)(FRAME_GAIN * counts[i] + FRAME_OFFSET);
    }
    signal[0] = NAN;
    signal[1] = INFINITY;
    summary = summary_sentinel();
    CHECK(bt_frame_convert_signal(&conv, frame_table, rows, signal, 8, NULL, 0, kelvin, 8,
                                  &summary) == BT_STATUS_OK);
    CHECK(summary.non_finite == 2 && summary.converted == 5);
    for (i = 3; i < 8; i++) {
        CHECK(frame_error(&band, &scene, (double)signal[i], kelvin[i]) <= 1e-2);
    }

    /* Hostile conversions: neither kelvin nor summary written. */
    for (i = 0; i < 8; i++) {
        kelvin[i] = -1.0f;
    }
    summary = summary_sentinel();
    CHECK(bt_frame_convert_counts(NULL, frame_table, rows, counts, 8, NULL, 0, kelvin, 8,
                                  &summary) == BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_convert_counts(&conv, NULL, rows, counts, 8, NULL, 0, kelvin, 8, &summary) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, NULL, 8, NULL, 0, kelvin, 8,
                                  &summary) == BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, counts, 8, NULL, 0, NULL, 8,
                                  &summary) == BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, counts, 8, NULL, 0, kelvin, 8,
                                  NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, counts, 8, NULL, 0, kelvin, 7,
                                  &summary) == BT_STATUS_FRAME_LENGTH_MISMATCH);
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, counts, 8, emissivity, 7, kelvin, 8,
                                  &summary) == BT_STATUS_FRAME_LENGTH_MISMATCH);
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, counts, SIZE_MAX, NULL, 0, kelvin,
                                  SIZE_MAX, &summary) == BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_convert_counts(&conv, frame_table, SIZE_MAX, counts, 8, NULL, 0, kelvin, 8,
                                  &summary) == BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, (const uint16_t *)misaligned(counts),
                                  7, NULL, 0, kelvin, 7, &summary) == BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, counts, 7, NULL, 0,
                                  (float *)misaligned(big), 7, &summary) ==
          BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, counts, 8, NULL, 0, kelvin, 8,
                                  (bt_frame_summary *)misaligned(big)) ==
          BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows - 1, counts, 8, NULL, 0, kelvin, 8,
                                  &summary) == BT_STATUS_FRAME_STORAGE_TOO_SMALL);
    /* In place (output over the input) is refused, not undefined. */
    CHECK(bt_frame_convert_signal(&conv, frame_table, rows, signal, 8, NULL, 0, signal, 8,
                                  &summary) == BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_convert_signal(&conv, frame_table, rows, signal, 8, NULL, 0,
                                  (float *)frame_table, 8, &summary) == BT_STATUS_INVALID_BUFFER);
    CHECK(summary_untouched(&summary));
    for (i = 0; i < 8; i++) {
        CHECK(kelvin[i] == -1.0f);
    }
    /* Zero pixels: a summary of nothing, nothing else. */
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, NULL, 0, NULL, 0, NULL, 0,
                                  &summary) == BT_STATUS_OK);
    CHECK(summary.pixels == 0 && summary.converted == 0);

    /* A converter that was never built, and every single-byte corruption of a good one: a
     * named status or a frame, never a crash. */
    memset(&copy, 0, sizeof copy);
    summary = summary_sentinel();
    CHECK(bt_frame_convert_counts(&copy, frame_table, rows, counts, 8, NULL, 0, kelvin, 8,
                                  &summary) == BT_STATUS_FRAME_TABLE_INVALID);
    CHECK(summary_untouched(&summary));
    for (i = 0; i < sizeof conv; i++) {
        unsigned char *bytes = (unsigned char *)&copy;
        copy = conv;
        bytes[i] ^= 0xFF;
        status = bt_frame_convert_counts(&copy, frame_table, rows, counts, 8, emissivity, 8,
                                         kelvin, 8, &summary);
        CHECK(status == BT_STATUS_OK ? summary.pixels == 8 : known_status(status));
        status = bt_frame_convert_signal(&copy, frame_table, FRAME_ROWS, signal, 8, NULL, 0,
                                         kelvin, 8, &summary);
        CHECK(status == BT_STATUS_OK ? summary.pixels == 8 : known_status(status));
    }

    /* A new scene without a rebuild; the wrong band is refused and changes nothing. */
    copy = conv;
    CHECK(bt_frame_converter_set_scene_band(&copy, frame_table, rows, &other, &scene) ==
          BT_STATUS_FRAME_CURVE_MISMATCH);
    CHECK(converter_equal(&copy, &conv));
    scene.emissivity = 2.0;
    CHECK(bt_frame_converter_set_scene_band(&copy, frame_table, rows, &band, &scene) ==
          BT_STATUS_EMISSIVITY_OUT_OF_RANGE);
    CHECK(bt_frame_converter_set_scene_band(NULL, frame_table, rows, &band, &scene) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_converter_set_scene_band(&copy, frame_table, rows, &band, NULL) ==
          BT_STATUS_NULL_POINTER);
    CHECK(converter_equal(&copy, &conv));
    scene.emissivity = 0.7;
    CHECK(bt_frame_converter_set_scene_band(&copy, frame_table, rows, &band, &scene) ==
          BT_STATUS_OK);
    CHECK(bt_frame_convert_counts(&copy, frame_table, rows, counts, 8, NULL, 0, kelvin, 8,
                                  &summary) == BT_STATUS_OK);
    for (i = 3; i < 8; i++) {
        CHECK(frame_error(&band, &scene, FRAME_GAIN * counts[i] + FRAME_OFFSET, kelvin[i]) <=
              geom.max_pixel_error_k);
    }
    /* New rails. */
    rails.dead_counts = 20000;
    rails.saturation_counts = 60000;
    CHECK(bt_frame_converter_set_rails(&copy, frame_table, rows, &bad_rails) ==
          BT_STATUS_FRAME_RAILS_INVALID);
    CHECK(bt_frame_converter_set_rails(&copy, frame_table, rows, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_converter_set_rails(&copy, frame_table, rows, &rails) == BT_STATUS_OK);
    CHECK(bt_frame_convert_counts(&copy, frame_table, rows, counts, 8, NULL, 0, kelvin, 8,
                                  &summary) == BT_STATUS_OK);
    CHECK(summary.dead == 3 && summary.saturated == 2 && summary.converted == 3);
}

static void test_frame_sakuma_hattori(void) {
    /* Invented counts calibration: A = 10.5 um, B = 50 um K, C = 1e6 counts, 1000 dark. */
    bt_sakuma_hattori sh = {10.5, 50.0, 1.0e6}, bad = {-1.0, 0.0, 1.0};
    bt_scene scene = plain_scene();
    bt_rails rails = {0, 16383};
    bt_frame_converter conv, sentinel;
    bt_frame_summary summary;
    uint16_t counts[6] = {0, 16383, 1000, 8000, 12000, 16000};
    float kelvin[6];
    size_t i, rows = 0;
    CHECK(bt_frame_table_rows_sakuma_hattori(&sh, 250.0, 1000.0, 1e-3, &rows) == BT_STATUS_OK);
    memset(&sentinel, 0x5A, sizeof sentinel);
    conv = sentinel;
    CHECK(bt_frame_converter_new_sakuma_hattori(&bad, &scene, 1000.0, &rails, 250.0, 1000.0,
                                                1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_CALIBRATION_PARAMETER_INVALID);
    CHECK(bt_frame_converter_new_sakuma_hattori(NULL, &scene, 1000.0, &rails, 250.0, 1000.0,
                                                1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_converter_new_sakuma_hattori(&sh, &scene, NAN, &rails, 250.0, 1000.0, 1e-3,
                                                frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_FRAME_COUNTS_MAP_INVALID);
    CHECK(converter_equal(&conv, &sentinel));
    CHECK(bt_frame_converter_new_sakuma_hattori(&sh, &scene, 1000.0, &rails, 250.0, 1000.0,
                                                1e-3, frame_table, rows, &conv) ==
          BT_STATUS_OK);
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, counts, 6, NULL, 0, kelvin, 6,
                                  &summary) == BT_STATUS_OK);
    CHECK(summary.dead == 1 && summary.saturated == 1 && summary.below_background == 1);
    CHECK(summary.converted == 3);
    for (i = 3; i < 6; i++) {
        double exact = SENTINEL;
        CHECK(bt_sakuma_hattori_object_temperature(&sh, &scene, counts[i] - 1000.0, &exact) ==
              BT_STATUS_OK);
        CHECK(fabs((double)kelvin[i] - exact) <= 1e-3);
    }
    scene.emissivity = 0.6;
    CHECK(bt_frame_converter_set_scene_sakuma_hattori(&conv, frame_table, rows, &bad, &scene) ==
          BT_STATUS_CALIBRATION_PARAMETER_INVALID);
    CHECK(bt_frame_converter_set_scene_sakuma_hattori(&conv, frame_table, rows, &sh, &scene) ==
          BT_STATUS_OK);
    CHECK(bt_frame_convert_counts(&conv, frame_table, rows, counts, 6, NULL, 0, kelvin, 6,
                                  &summary) == BT_STATUS_OK);
    for (i = 3; i < 6; i++) {
        double exact = SENTINEL;
        CHECK(bt_sakuma_hattori_object_temperature(&sh, &scene, counts[i] - 1000.0, &exact) ==
              BT_STATUS_OK);
        CHECK(fabs((double)kelvin[i] - exact) <= 1e-3);
    }
}

/* ---- ratio pyrometry ------------------------------------------------------------------- */

static void test_ratio(void) {
    double out;
    size_t i;
    bt_band b1 = rectangular(0.65, 0.75, BT_DETECTOR_ENERGY);
    bt_band b2 = rectangular(0.85, 0.95, BT_DETECTOR_ENERGY);
    bt_band p1 = rectangular(3.0, 4.0, BT_DETECTOR_PHOTON);
    bt_band p2 = rectangular(4.5, 5.0, BT_DETECTOR_PHOTON);
    double temperatures[] = {1000.0, 1500.0, 2000.0, 2900.0};
    double t = 2000.0, l1 = band_ref(0.65, 0.75, t, 0), l2 = band_ref(0.85, 0.95, t, 0);

    /* Signals from the independent band integrals: the ratio inverts to T. */
    for (i = 0; i < sizeof temperatures / sizeof temperatures[0]; i++) {
        double tk = temperatures[i];
        EXPECT_NEAR(bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, band_ref(0.65, 0.75, tk, 0),
                                         band_ref(0.85, 0.95, tk, 0), 1.0, &out),
                    tk, 1e-9);
        EXPECT_NEAR(bt_ratio_temperature(&p1, &p2, 500.0, 3000.0, band_ref(3.0, 4.0, tk, 1),
                                         band_ref(4.5, 5.0, tk, 1), 1.0, &out),
                    tk, 1e-9);
    }
    /* The emissivity cancels up to its ratio; a common gain cancels. */
    EXPECT_NEAR(bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, 0.8 * l1, 0.9 * l2, 0.8 / 0.9,
                                     &out),
                t, 1e-9);
    EXPECT_NEAR(bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, 3e4 * l1, 3e4 * l2, 1.0, &out),
                t, 1e-9);
    /* A working-range end is reachable. */
    EXPECT_NEAR(bt_ratio_temperature(&b1, &b2, 900.0, 2000.0, l1, l2, 1.0, &out), t, 1e-9);

    /* Named errors, out untouched. */
    EXPECT(BT_STATUS_NULL_POINTER,
           bt_ratio_temperature(NULL, &b2, 900.0, 3000.0, l1, l2, 1.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER,
           bt_ratio_temperature(&b1, NULL, 900.0, 3000.0, l1, l2, 1.0, &out));
    CHECK(bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, l1, l2, 1.0, NULL) ==
          BT_STATUS_NULL_POINTER);
    EXPECT(BT_STATUS_RATIO_RANGE_INVALID,
           bt_ratio_temperature(&b1, &b2, 3000.0, 900.0, l1, l2, 1.0, &out));
    EXPECT(BT_STATUS_RATIO_RANGE_INVALID,
           bt_ratio_temperature(&b1, &b2, 900.0, 900.0, l1, l2, 1.0, &out));
    EXPECT(BT_STATUS_TEMPERATURE_NOT_POSITIVE,
           bt_ratio_temperature(&b1, &b2, 0.0, 3000.0, l1, l2, 1.0, &out));
    EXPECT(BT_STATUS_BANDS_INDISTINGUISHABLE,
           bt_ratio_temperature(&b1, &b1, 900.0, 3000.0, l1, l2, 1.0, &out));
    EXPECT(BT_STATUS_RADIANCE_NOT_POSITIVE,
           bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, 0.0, l2, 1.0, &out));
    EXPECT(BT_STATUS_RADIANCE_NOT_POSITIVE,
           bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, l1, -l2, 1.0, &out));
    EXPECT(BT_STATUS_EMISSIVITY_RATIO_NOT_POSITIVE,
           bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, l1, l2, 0.0, &out));
    EXPECT(BT_STATUS_RATIO_OUT_OF_RANGE,
           bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, l1, l2 * 1e6, 1.0, &out));
    EXPECT(BT_STATUS_NON_FINITE,
           bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, NAN, l2, 1.0, &out));
    EXPECT(BT_STATUS_NON_FINITE,
           bt_ratio_temperature(&b1, &b2, 900.0, INFINITY, l1, l2, 1.0, &out));
    b2.lo_um = 2.0;
    EXPECT(BT_STATUS_INVALID_BAND,
           bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, l1, l2, 1.0, &out));
    b2 = rectangular(0.85, 0.95, BT_DETECTOR_ENERGY);
    set_raw_detector(&b2, 7);
    EXPECT(BT_STATUS_INVALID_DETECTOR,
           bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, l1, l2, 1.0, &out));
    b2 = rectangular(0.85, 0.95, BT_DETECTOR_ENERGY);

    /* Every argument hostile in turn. */
    for (i = 0; i < N_ARGS; i++) {
        double a = ARGS[i];
        EXPECT_SANE(bt_ratio_temperature(&b1, &b2, a, 3000.0, l1, l2, 1.0, &out));
        EXPECT_SANE(bt_ratio_temperature(&b1, &b2, 900.0, a, l1, l2, 1.0, &out));
        EXPECT_SANE(bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, a, l2, 1.0, &out));
        EXPECT_SANE(bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, l1, a, 1.0, &out));
        EXPECT_SANE(bt_ratio_temperature(&b1, &b2, 900.0, 3000.0, l1, l2, a, &out));
        EXPECT_SANE(bt_ratio_temperature(&b1, &b2, a, a, a, a, a, &out));
    }
}

/* ---- air and air paths ------------------------------------------------------------------ */

/* CIMO Magnus over water, hPa, and its inverse (WMO No. 8, Annex 4.B), written out. */
static double magnus_ref(double t_k) {
    double t = t_k - 273.15;
    return 6.112 * exp(17.62 * t / (243.12 + t));
}
static double dew_point_ref(double e_hpa) {
    double l = log(e_hpa / 6.112);
    return 243.12 * l / (17.62 - l) + 273.15;
}

/* The water-vapour continuum transmittance of a horizontal path written out from
 * src/atmosphere (self-broadened continuum, CIMO Magnus with the enhancement factor). */
static double continuum_ref(double air_k, double rh, double p_hpa, double d_m, double wl_um) {
    double f = 1.0016 + 3.15e-6 * p_hpa - 0.074 / p_hpa;
    double e = rh * f * magnus_ref(air_k);
    double w = 216.7 * e / air_k * d_m * 1e-4;
    double e_atm = e / 1013.25, p_atm = p_hpa / 1013.25;
    double scale = exp(1800.0 * (1.0 / air_k - 1.0 / 296.0)) *
                   (e_atm + 0.002 * (p_atm - e_atm)) * w;
    double c_s = 4.18 + 5578.0 * exp(-7.87e-3 * 1e4 / wl_um);
    return exp(-c_s * scale);
}

/* tau_eff = int tau L(T) / int L(T) over [lo, hi], Simpson with 4000 panels. */
static double band_transmittance_ref(double lo_um, double hi_um, double air_k, double rh,
                                     double p_hpa, double d_m, double object_k) {
    const int n = 4000;
    double step = (hi_um - lo_um) / n, num = 0.0, den = 0.0;
    int i;
    for (i = 0; i <= n; i++) {
        double wl = lo_um + i * step;
        double weight = (i == 0 || i == n) ? 1.0 : (i % 2 ? 4.0 : 2.0);
        double l = planck(wl, object_k);
        num += weight * continuum_ref(air_k, rh, p_hpa, d_m, wl) * l;
        den += weight * l;
    }
    return num / den;
}

static void test_atmosphere(void) {
    double out;
    size_t i;
    bt_band lwir = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_band narrow = rectangular(10.0, 11.0, BT_DETECTOR_PHOTON);
    bt_band mwir = rectangular(3.0, 5.0, BT_DETECTOR_ENERGY);
    double tau1 = SENTINEL, tau2 = SENTINEL;

    /* Saturation pressure and dew point against the Magnus formula written out. */
    EXPECT_NEAR(bt_air_saturation_vapour_pressure_hpa(273.15, &out), 6.112, 1e-15);
    EXPECT_NEAR(bt_air_saturation_vapour_pressure_hpa(293.15, &out), magnus_ref(293.15),
                1e-14);
    EXPECT_NEAR(bt_air_saturation_vapour_pressure_hpa(233.15, &out), magnus_ref(233.15),
                1e-14);
    EXPECT_NEAR(bt_air_dew_point_k(303.15, 0.5, &out), dew_point_ref(0.5 * magnus_ref(303.15)),
                1e-14);
    EXPECT_NEAR(bt_air_dew_point_k(293.15, 1.0, &out), 293.15, 1e-14);
    EXPECT_NEAR(bt_air_dew_point_k(288.0, 0.3, &out), dew_point_ref(0.3 * magnus_ref(288.0)),
                1e-14);

    /* Spectral transmittance against the continuum written out; Beer-Lambert in d. */
    EXPECT_NEAR(bt_path_spectral_transmittance(303.15, 0.8, 1013.25, 100.0, 10.0, &out),
                continuum_ref(303.15, 0.8, 1013.25, 100.0, 10.0), 1e-13);
    EXPECT_NEAR(bt_path_spectral_transmittance(283.15, 0.4, 900.0, 1000.0, 8.0, &out),
                continuum_ref(283.15, 0.4, 900.0, 1000.0, 8.0), 1e-13);
    EXPECT_NEAR(bt_path_spectral_transmittance(303.15, 0.8, 1013.25, 0.0, 12.0, &out), 1.0, 0.0);
    CHECK(bt_path_spectral_transmittance(300.0, 0.6, 1000.0, 200.0, 11.0, &tau1) ==
              BT_STATUS_OK &&
          bt_path_spectral_transmittance(300.0, 0.6, 1000.0, 400.0, 11.0, &tau2) ==
              BT_STATUS_OK);
    CHECK(fabs(tau2 - tau1 * tau1) <= 1e-14);
    CHECK(tau1 > 0.0 && tau1 < 1.0);

    /* Band transmittance against Simpson quadrature of the written-out model. */
    EXPECT_NEAR(bt_path_band_transmittance(&lwir, 303.15, 0.8, 1013.25, 100.0, 350.0, &out),
                band_transmittance_ref(8.0, 14.0, 303.15, 0.8, 1013.25, 100.0, 350.0), 1e-11);
    EXPECT_NEAR(bt_path_band_transmittance(&lwir, 290.0, 0.5, 950.0, 1000.0, 1200.0, &out),
                band_transmittance_ref(8.0, 14.0, 290.0, 0.5, 950.0, 1000.0, 1200.0), 1e-11);
    EXPECT_NEAR(bt_path_band_transmittance(&lwir, 303.15, 0.8, 1013.25, 0.0, 350.0, &out), 1.0,
                0.0);
    EXPECT_NEAR(bt_path_band_transmittance(&lwir, 303.15, 0.0, 1013.25, 500.0, 350.0, &out),
                band_transmittance_ref(8.0, 14.0, 303.15, 0.0, 1013.25, 500.0, 350.0), 1e-11);
    EXPECT(BT_STATUS_OK,
           bt_path_band_transmittance(&narrow, 303.15, 0.8, 1013.25, 100.0, 350.0, &out));
    CHECK(out > 0.0 && out < 1.0);

    /* Regression, thick path: 2 km of saturated air at 60 C and 1100 hPa, 2000 K object,
       8-14 um photon band; an independent high-precision quadrature (two methods agreeing
       to 1e-31) gives 1.2724080802391162e-06 (the quadrature sized by the Planck variable
       alone missed it by -1.1e-7 relative). */
    {
        bt_band lwir_photon = rectangular(8.0, 14.0, BT_DETECTOR_PHOTON);
        EXPECT_NEAR(
            bt_path_band_transmittance(&lwir_photon, 333.15, 1.0, 1100.0, 2000.0, 2000.0, &out),
            1.2724080802391162e-06, 1e-12);
    }
    /* An opaque path is an error, never a transmittance of 0 with success: 10,000 km at
       10 um, 100,000 km over the whole band. */
    EXPECT(BT_STATUS_PATH_OPAQUE,
           bt_path_spectral_transmittance(293.15, 0.5, 1013.25, 1.0e7, 10.0, &out));
    EXPECT(BT_STATUS_PATH_OPAQUE,
           bt_path_band_transmittance(&lwir, 293.15, 0.5, 1013.25, 1.0e8, 300.0, &out));

    /* Named errors, out untouched. */
    EXPECT(BT_STATUS_AIR_TEMPERATURE_OUT_OF_RANGE,
           bt_air_saturation_vapour_pressure_hpa(400.0, &out));
    EXPECT(BT_STATUS_AIR_TEMPERATURE_OUT_OF_RANGE,
           bt_air_saturation_vapour_pressure_hpa(200.0, &out));
    EXPECT(BT_STATUS_TEMPERATURE_NOT_POSITIVE, bt_air_saturation_vapour_pressure_hpa(-1.0, &out));
    EXPECT(BT_STATUS_NON_FINITE, bt_air_saturation_vapour_pressure_hpa(NAN, &out));
    CHECK(bt_air_saturation_vapour_pressure_hpa(300.0, NULL) == BT_STATUS_NULL_POINTER);
    EXPECT(BT_STATUS_VAPOUR_PRESSURE_OUT_OF_RANGE, bt_air_dew_point_k(300.0, 0.0, &out));
    EXPECT(BT_STATUS_RELATIVE_HUMIDITY_OUT_OF_RANGE, bt_air_dew_point_k(300.0, 1.5, &out));
    EXPECT(BT_STATUS_RELATIVE_HUMIDITY_OUT_OF_RANGE, bt_air_dew_point_k(300.0, -0.1, &out));
    EXPECT(BT_STATUS_NON_FINITE, bt_air_dew_point_k(300.0, NAN, &out));
    CHECK(bt_air_dew_point_k(300.0, 0.5, NULL) == BT_STATUS_NULL_POINTER);
    EXPECT(BT_STATUS_OUTSIDE_CONTINUUM_MODEL,
           bt_path_spectral_transmittance(300.0, 0.5, 1013.25, 100.0, 4.0, &out));
    EXPECT(BT_STATUS_DISTANCE_NEGATIVE,
           bt_path_spectral_transmittance(300.0, 0.5, 1013.25, -1.0, 10.0, &out));
    EXPECT(BT_STATUS_AIR_PRESSURE_OUT_OF_RANGE,
           bt_path_spectral_transmittance(300.0, 0.5, 200.0, 100.0, 10.0, &out));
    CHECK(bt_path_spectral_transmittance(300.0, 0.5, 1013.25, 100.0, 10.0, NULL) ==
          BT_STATUS_NULL_POINTER);
    EXPECT(BT_STATUS_NULL_POINTER,
           bt_path_band_transmittance(NULL, 300.0, 0.5, 1013.25, 100.0, 350.0, &out));
    CHECK(bt_path_band_transmittance(&lwir, 300.0, 0.5, 1013.25, 100.0, 350.0, NULL) ==
          BT_STATUS_NULL_POINTER);
    EXPECT(BT_STATUS_OUTSIDE_CONTINUUM_MODEL,
           bt_path_band_transmittance(&mwir, 300.0, 0.5, 1013.25, 100.0, 350.0, &out));
    EXPECT(BT_STATUS_TEMPERATURE_NOT_POSITIVE,
           bt_path_band_transmittance(&lwir, 300.0, 0.5, 1013.25, 100.0, 0.0, &out));
    EXPECT(BT_STATUS_NON_FINITE,
           bt_path_band_transmittance(&lwir, 300.0, 0.5, 1013.25, INFINITY, 350.0, &out));

    /* Every argument hostile in turn. */
    for (i = 0; i < N_ARGS; i++) {
        double a = ARGS[i];
        EXPECT_SANE(bt_air_saturation_vapour_pressure_hpa(a, &out));
        EXPECT_SANE(bt_air_dew_point_k(a, 0.5, &out));
        EXPECT_SANE(bt_air_dew_point_k(300.0, a, &out));
        EXPECT_SANE(bt_path_spectral_transmittance(a, 0.5, 1013.25, 100.0, 10.0, &out));
        EXPECT_SANE(bt_path_spectral_transmittance(300.0, a, 1013.25, 100.0, 10.0, &out));
        EXPECT_SANE(bt_path_spectral_transmittance(300.0, 0.5, a, 100.0, 10.0, &out));
        EXPECT_SANE(bt_path_spectral_transmittance(300.0, 0.5, 1013.25, a, 10.0, &out));
        EXPECT_SANE(bt_path_spectral_transmittance(300.0, 0.5, 1013.25, 100.0, a, &out));
        EXPECT_SANE(bt_path_band_transmittance(&lwir, a, 0.5, 1013.25, 100.0, 350.0, &out));
        EXPECT_SANE(bt_path_band_transmittance(&lwir, 300.0, a, 1013.25, 100.0, 350.0, &out));
        EXPECT_SANE(bt_path_band_transmittance(&lwir, 300.0, 0.5, a, 100.0, 350.0, &out));
        EXPECT_SANE(bt_path_band_transmittance(&lwir, 300.0, 0.5, 1013.25, a, 350.0, &out));
        EXPECT_SANE(bt_path_band_transmittance(&lwir, 300.0, 0.5, 1013.25, 100.0, a, &out));
        if (out != SENTINEL) {
            CHECK(out >= 0.0 && out <= 1.0);
        }
    }
}

/* ---- uncertainty budgets ---------------------------------------------------------------- */

static bt_budget budget_sentinel(void) {
    bt_budget b;
    memset(&b, 0xA5, sizeof b);
    return b;
}

static int budget_untouched(const bt_budget *b) {
    bt_budget s = budget_sentinel();
    return memcmp(b, &s, sizeof s) == 0;
}

/* Success with every number finite, or a named error with the budget untouched. */
static void expect_budget_sane(bt_status status, const bt_budget *b, const char *what,
                               int line) {
    int ok;
    if (status == BT_STATUS_OK) {
        size_t i;
        ok = isfinite(b->estimate_k) && isfinite(b->combined_standard_uncertainty_k) &&
             b->len == 11;
        for (i = 0; i < BT_BUDGET_MAX_LINES; i++) {
            ok = ok && isfinite(b->ranked[i].standard_uncertainty) &&
                 isfinite(b->ranked[i].sensitivity) && isfinite(b->ranked[i].contribution_k) &&
                 isfinite(b->ranked[i].variance_share);
        }
    } else {
        ok = budget_untouched(b) && known_status(status);
    }
    if (!ok) {
        printf("  status %d (%s)\n", (int)status, bt_status_message(status));
    }
    check(ok, what, line);
}
#define EXPECT_BUDGET_SANE(call)                                                               \
    do {                                                                                       \
        bt_status status_;                                                                     \
        budget = budget_sentinel();                                                            \
        status_ = (call);                                                                      \
        expect_budget_sane(status_, &budget, #call, __LINE__);                                 \
    } while (0)

static void test_uncertainty(void) {
    double out, s, t = 400.0, t_est = SENTINEL, g, derivative = SENTINEL, sum2 = 0.0;
    double share = 0.0, h = 1e-4, t_hi = SENTINEL, t_lo = SENTINEL;
    size_t i, j, seen[11] = {0};
    bt_band lwir = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_scene scene = full_scene(), shifted;
    bt_input_uncertainties u = {0.05, 0.5, 0.02, 0.02, 2.0, 0.01, 1.0, 0.005, 0.005, 1.0, 1.0};
    bt_input_uncertainties hostile;
    bt_budget budget;
    double fields[11];

    CHECK(bt_sensor_radiance(&lwir, &scene, t, &s) == BT_STATUS_OK);
    CHECK(bt_object_temperature(&lwir, &scene, s, &t_est) == BT_STATUS_OK);
    CHECK(sizeof u == sizeof fields);
    memcpy(fields, &u, sizeof fields);
    CHECK(bt_band_radiance_derivative(&lwir, t_est, &derivative) == BT_STATUS_OK);
    budget = budget_sentinel();
    CHECK(bt_surface_budget(&lwir, &scene, s, &u, &budget) == BT_STATUS_OK);
    CHECK(budget.len == 11);
    CHECK(fabs(budget.estimate_k - t_est) <= 1e-12 * t_est);
    for (i = 0; i < budget.len; i++) {
        const bt_contribution *c = &budget.ranked[i];
        double u_i = c->index < 11 ? fields[c->index] : NAN;
        CHECK(c->index < 11 && !seen[c->index]);
        if (c->index < 11) {
            seen[c->index] = 1;
        }
        CHECK(c->standard_uncertainty == u_i);
        CHECK(fabs(c->contribution_k - fabs(c->sensitivity) * u_i) <=
              1e-15 * c->contribution_k + 1e-300);
        CHECK(i == 0 || budget.ranked[i - 1].contribution_k >= c->contribution_k);
        sum2 += c->contribution_k * c->contribution_k;
        share += c->variance_share;
        /* Signal noise: c = 1 / (G L'(T)), G = tw ta e (the measurement equation). */
        if (c->index == 0) {
            g = scene.window_transmittance * scene.atm_transmittance * scene.emissivity;
            CHECK(fabs(c->sensitivity - 1.0 / (g * derivative)) <= 1e-12 * fabs(c->sensitivity));
        }
        /* Emissivity: against a central difference of bt_object_temperature. */
        if (c->index == 3) {
            double fd;
            shifted = scene;
            shifted.emissivity = scene.emissivity + h;
            CHECK(bt_object_temperature(&lwir, &shifted, s, &t_hi) == BT_STATUS_OK);
            shifted.emissivity = scene.emissivity - h;
            CHECK(bt_object_temperature(&lwir, &shifted, s, &t_lo) == BT_STATUS_OK);
            fd = (t_hi - t_lo) / (2.0 * h);
            CHECK(fabs(c->sensitivity - fd) <= 1e-6 * fabs(fd));
        }
    }
    for (i = budget.len; i < BT_BUDGET_MAX_LINES; i++) {
        CHECK(budget.ranked[i].contribution_k == 0.0 && budget.ranked[i].sensitivity == 0.0);
    }
    CHECK(fabs(budget.combined_standard_uncertainty_k - sqrt(sum2)) <=
          1e-12 * budget.combined_standard_uncertainty_k);
    CHECK(fabs(share - 1.0) <= 1e-12);
    CHECK(budget.combined_standard_uncertainty_k > 0.0);

    /* Input names: static strings, NULL past the end. */
    CHECK(bt_surface_input_name(0) != NULL &&
          strcmp(bt_surface_input_name(0), "signal noise") == 0);
    CHECK(bt_surface_input_name(3) != NULL &&
          strcmp(bt_surface_input_name(3), "emissivity") == 0);
    CHECK(bt_surface_input_name(10) != NULL &&
          strcmp(bt_surface_input_name(10), "window reflected temperature") == 0);
    for (i = 0; i < 11; i++) {
        CHECK(bt_surface_input_name(i) != NULL && bt_surface_input_name(i)[0] != '\0');
        for (j = 0; j < i; j++) {
            CHECK(strcmp(bt_surface_input_name(i), bt_surface_input_name(j)) != 0);
        }
    }
    CHECK(bt_surface_input_name(11) == NULL);
    CHECK(bt_surface_input_name(SIZE_MAX) == NULL);

    /* All uncertainties zero: a zero budget. */
    memset(&hostile, 0, sizeof hostile);
    budget = budget_sentinel();
    CHECK(bt_surface_budget(&lwir, &scene, s, &hostile, &budget) == BT_STATUS_OK);
    CHECK(budget.combined_standard_uncertainty_k == 0.0 && budget.len == 11);

    /* Regression: a zero uncertainty keeps the real sensitivity (the calibration line read 0).
       8-14 um, e 0.93, reflected 291 K, air 0.97 at 288 K, no window; an independent
       high-precision check gives 1.07840989006 K/K for the calibration (temperature) line. */
    {
        bt_scene plain = {0.93, 291.0, 0.97, 288.0, 1.0, 0.0, 288.0, 288.0};
        bt_input_uncertainties zero_cal = {0.051, 0.0, 0.0, 0.02, 2.0, 0.01, 1.0, 0, 0, 0, 0};
        int found = 0;
        budget = budget_sentinel();
        CHECK(bt_surface_budget(&lwir, &plain, 88.04078527399884, &zero_cal, &budget) ==
              BT_STATUS_OK);
        for (i = 0; i < budget.len; i++) {
            if (budget.ranked[i].index == 1) {
                found = 1;
                CHECK(fabs(budget.ranked[i].sensitivity - 1.07840989006) <= 1e-7);
                CHECK(budget.ranked[i].contribution_k == 0.0);
            }
        }
        CHECK(found);
    }

    /* Named errors, budget untouched. */
#define EXPECT_BUDGET(want, call)                                                              \
    do {                                                                                       \
        budget = budget_sentinel();                                                            \
        CHECK((call) == (want));                                                               \
        CHECK(budget_untouched(&budget));                                                      \
    } while (0)
    EXPECT_BUDGET(BT_STATUS_NULL_POINTER, bt_surface_budget(NULL, &scene, s, &u, &budget));
    EXPECT_BUDGET(BT_STATUS_NULL_POINTER, bt_surface_budget(&lwir, NULL, s, &u, &budget));
    EXPECT_BUDGET(BT_STATUS_NULL_POINTER, bt_surface_budget(&lwir, &scene, s, NULL, &budget));
    CHECK(bt_surface_budget(&lwir, &scene, s, &u, NULL) == BT_STATUS_NULL_POINTER);
    EXPECT_BUDGET(BT_STATUS_INVALID_BUFFER,
                  bt_surface_budget(&lwir, &scene, s,
                                    (const bt_input_uncertainties *)misaligned(&u), &budget));
    EXPECT_BUDGET(BT_STATUS_SIGNAL_BELOW_BACKGROUND,
                  bt_surface_budget(&lwir, &scene, 1.0, &u, &budget));
    EXPECT_BUDGET(BT_STATUS_NON_FINITE, bt_surface_budget(&lwir, &scene, NAN, &u, &budget));
    hostile = u;
    hostile.emissivity = -0.01;
    EXPECT_BUDGET(BT_STATUS_UNCERTAINTY_NEGATIVE,
                  bt_surface_budget(&lwir, &scene, s, &hostile, &budget));
    hostile = u;
    hostile.window_k = INFINITY;
    EXPECT_BUDGET(BT_STATUS_NON_FINITE, bt_surface_budget(&lwir, &scene, s, &hostile, &budget));
    shifted = scene;
    shifted.emissivity = 0.0;
    EXPECT_BUDGET(BT_STATUS_EMISSIVITY_OUT_OF_RANGE,
                  bt_surface_budget(&lwir, &shifted, s, &u, &budget));
#undef EXPECT_BUDGET

    /* Every argument hostile in turn. */
    for (i = 0; i < N_ARGS; i++) {
        EXPECT_BUDGET_SANE(bt_surface_budget(&lwir, &scene, ARGS[i], &u, &budget));
        for (j = 0; j < 11; j++) {
            memcpy(fields, &u, sizeof fields);
            fields[j] = ARGS[i];
            memcpy(&hostile, fields, sizeof fields);
            EXPECT_BUDGET_SANE(bt_surface_budget(&lwir, &scene, s, &hostile, &budget));
        }
        hostile = u;
        shifted = scene;
        shifted.reflected_k = ARGS[i];
        EXPECT_BUDGET_SANE(bt_surface_budget(&lwir, &shifted, s, &u, &budget));
    }
    (void)out;
}

/* ---- site methods: emissivity from a reference, reflected temperature from a reflector ---- */

/* The scene below with emissivity e, over Simpson band radiances of 8-14 um. */
static double site_signal(const bt_scene *s, double e, double t_object, double t_reflected) {
    bt_scene with_e = *s;
    with_e.emissivity = e;
    return measurement(&with_e, band_ref(8.0, 14.0, t_object, 0),
                       band_ref(8.0, 14.0, t_reflected, 0), band_ref(8.0, 14.0, s->atm_k, 0),
                       band_ref(8.0, 14.0, s->window_reflected_k, 0),
                       band_ref(8.0, 14.0, s->window_k, 0));
}

static void test_site(void) {
    double out, e = SENTINEL, t = SENTINEL;
    size_t i;
    bt_band lwir = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_scene scene = full_scene(); /* e 0.9, Tr 295 K, ta 0.95, tw 0.9, rw 0.05 */
    /* An invented surface of emissivity 0.62 at 400 K, a coating of 0.95 beside it. */
    double s_surface = site_signal(&scene, 0.62, 400.0, scene.reflected_k);
    double s_coating = site_signal(&scene, 0.95, 400.0, scene.reflected_k);
    /* A foil reflector of emissivity 0.05 at 300 K reflecting 330 K. */
    double s_foil = site_signal(&scene, 0.05, 300.0, 330.0);
    bt_status status;

    /* Values against the written-out equation (Simpson band radiances, ~1e-12). */
    EXPECT_NEAR(bt_emissivity_from_reference(&lwir, &scene, s_surface, 400.0, &out), 0.62, 1e-9);
    status = bt_emissivity_from_reference_coating(&lwir, &scene, s_surface, s_coating, 0.95, &e, &t);
    expect_near(status, e, 0.62, 1e-9, "coating: surface emissivity", __LINE__);
    expect_near(status, t, 400.0, 1e-9, "coating: common temperature", __LINE__);
    EXPECT_NEAR(bt_reflected_temperature_from_reflector(&lwir, &scene, s_foil, 0.05, 300.0, &out),
                330.0, 1e-9);
    /* An ideal reflector (ef = 0) sees Tr through the path and window alone. */
    EXPECT_NEAR(bt_reflected_temperature_from_reflector(&lwir, &scene,
                                                        site_signal(&scene, 0.0, 300.0, 330.0),
                                                        0.0, 300.0, &out),
                330.0, 1e-9);

    /* Named errors. */
    EXPECT(BT_STATUS_EMISSIVITY_NOT_DETERMINED,
           bt_emissivity_from_reference(&lwir, &scene, s_surface, scene.reflected_k, &out));
    EXPECT(BT_STATUS_EMISSIVITY_READING_INCONSISTENT,
           bt_emissivity_from_reference(&lwir, &scene, s_surface, 330.0, &out));
    EXPECT(BT_STATUS_REFLECTOR_EMISSIVITY_OUT_OF_RANGE,
           bt_reflected_temperature_from_reflector(&lwir, &scene, s_foil, 1.0, 300.0, &out));
    EXPECT(BT_STATUS_REFLECTED_NOT_DETERMINED,
           bt_reflected_temperature_from_reflector(&lwir, &scene, 0.0, 0.05, 300.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_emissivity_from_reference(NULL, &scene, s_surface, 400.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_emissivity_from_reference(&lwir, NULL, s_surface, 400.0, &out));
    CHECK(bt_emissivity_from_reference(&lwir, &scene, s_surface, 400.0, NULL) == BT_STATUS_NULL_POINTER);
    e = SENTINEL;
    t = SENTINEL;
    status = bt_emissivity_from_reference_coating(&lwir, &scene, s_surface, s_coating, 1.5, &e, &t);
    CHECK(status == BT_STATUS_EMISSIVITY_OUT_OF_RANGE && untouched(e) && untouched(t));
    CHECK(bt_emissivity_from_reference_coating(&lwir, &scene, s_surface, s_coating, 0.95, &e, NULL) ==
              BT_STATUS_NULL_POINTER &&
          untouched(e));
    status = bt_emissivity_from_reference_coating(&lwir, &scene, s_surface, 0.0, 0.95, &e, &t);
    CHECK(status == BT_STATUS_SIGNAL_BELOW_BACKGROUND && untouched(e) && untouched(t));

    /* Hostile scalars in every position. */
    for (i = 0; i < N_ARGS; i++) {
        double x = ARGS[i];
        EXPECT_SANE(bt_emissivity_from_reference(&lwir, &scene, x, 400.0, &out));
        EXPECT_SANE(bt_emissivity_from_reference(&lwir, &scene, s_surface, x, &out));
        EXPECT_SANE(bt_reflected_temperature_from_reflector(&lwir, &scene, x, 0.05, 300.0, &out));
        EXPECT_SANE(bt_reflected_temperature_from_reflector(&lwir, &scene, s_foil, x, 300.0, &out));
        EXPECT_SANE(bt_reflected_temperature_from_reflector(&lwir, &scene, s_foil, 0.05, x, &out));
        {
            size_t j;
            for (j = 0; j < 3; j++) {
                double args[3] = {s_surface, s_coating, 0.95};
                args[j] = x;
                e = SENTINEL;
                t = SENTINEL;
                status = bt_emissivity_from_reference_coating(&lwir, &scene, args[0], args[1],
                                                              args[2], &e, &t);
                CHECK(status == BT_STATUS_OK ? isfinite(e) && isfinite(t)
                                             : untouched(e) && untouched(t) && known_status(status));
            }
        }
    }
}

/* ---- spectral scenes ------------------------------------------------------------------- */

/* Linear interpolation in a table (inside its span). */
static double lerp_table(const double *wl, const double *v, size_t n, double x) {
    size_t i;
    for (i = 0; i + 1 < n; i++) {
        if (x <= wl[i + 1]) {
            return v[i] + (v[i + 1] - v[i]) * (x - wl[i]) / (wl[i + 1] - wl[i]);
        }
    }
    return v[n - 1];
}

static const double SPEC_E_WL[] = {8.0, 11.0, 14.0};
static const double SPEC_E[] = {0.95, 0.85, 0.75};  /* invented: emissivity falling with lambda */
static const double SPEC_TA_WL[] = {7.5, 10.0, 12.0, 14.5};
static const double SPEC_TA[] = {0.90, 0.97, 0.95, 0.85}; /* invented air transmittance */

/* The spectral equation of bt_spectral_tables written out: Simpson on each piece between the
 * tables' nodes (where the integrand is smooth), 1000 panels per piece. */
static double spectral_ref(const bt_scene *s, double t_k) {
    static const double edges[] = {8.0, 10.0, 11.0, 12.0, 14.0};
    double integral = 0.0;
    size_t k;
    for (k = 0; k + 1 < sizeof edges / sizeof edges[0]; k++) {
        const int n = 1000;
        double lo = edges[k], step = (edges[k + 1] - edges[k]) / n, sum = 0.0;
        int i;
        for (i = 0; i <= n; i++) {
            double wl = lo + i * step;
            double e = lerp_table(SPEC_E_WL, SPEC_E, 3, wl);
            double ta = lerp_table(SPEC_TA_WL, SPEC_TA, 4, wl);
            double f = ta * e * planck(wl, t_k) + ta * (1.0 - e) * planck(wl, s->reflected_k) +
                       (1.0 - ta) * planck(wl, s->atm_k);
            sum += ((i == 0 || i == n) ? 1.0 : (i % 2 ? 4.0 : 2.0)) * f;
        }
        integral += sum * step / 3.0;
    }
    return s->window_transmittance * integral +
           s->window_reflectance * band_ref(8.0, 14.0, s->window_reflected_k, 0) +
           (1.0 - s->window_transmittance - s->window_reflectance) *
               band_ref(8.0, 14.0, s->window_k, 0);
}

static void test_spectral(void) {
    double out, s_ref, apparent = SENTINEL, grey = SENTINEL;
    double bad[3] = {0.9, 1.5, 0.9}, short_wl[3] = {9.0, 11.0, 14.0};
    size_t i;
    bt_band lwir = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_scene scene = full_scene();
    bt_spectral_tables tables = {SPEC_E_WL, SPEC_E, 3, SPEC_TA_WL, SPEC_TA, 4};
    bt_spectral_tables none = {NULL, NULL, 0, NULL, NULL, 0};
    bt_spectral_tables broken;

    /* Against the written-out integral (Simpson, ~1e-12; the library claims 1e-13). */
    for (i = 0; i < 4; i++) {
        double t = 320.0 + 250.0 * (double)i;
        s_ref = spectral_ref(&scene, t);
        EXPECT_NEAR(bt_spectral_sensor_radiance(&lwir, &scene, &tables, t, &out), s_ref, 1e-10);
        EXPECT_NEAR(bt_spectral_object_temperature(&lwir, &scene, &tables, s_ref, &out), t, 1e-10);
        CHECK(bt_band_temperature(&lwir, s_ref, &apparent) == BT_STATUS_OK);
        EXPECT_NEAR(bt_spectral_object_temperature_from_apparent(&lwir, &scene, &tables, apparent,
                                                                 &out),
                    t, 1e-9);
    }
    /* Without tables the spectral scene is the grey one. */
    CHECK(bt_sensor_radiance(&lwir, &scene, 500.0, &grey) == BT_STATUS_OK);
    EXPECT_NEAR(bt_spectral_sensor_radiance(&lwir, &scene, &none, 500.0, &out), grey, 1e-13);

    /* Named errors. */
    EXPECT(BT_STATUS_NULL_POINTER, bt_spectral_sensor_radiance(&lwir, &scene, NULL, 500.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_spectral_sensor_radiance(NULL, &scene, &tables, 500.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_spectral_sensor_radiance(&lwir, NULL, &tables, 500.0, &out));
    CHECK(bt_spectral_sensor_radiance(&lwir, &scene, &tables, 500.0, NULL) == BT_STATUS_NULL_POINTER);
    broken = tables;
    broken.emissivity_um = short_wl; /* starts at 9 um: does not cover 8-14 um */
    EXPECT(BT_STATUS_SPECTRAL_TABLE_DOES_NOT_COVER_BAND,
           bt_spectral_sensor_radiance(&lwir, &scene, &broken, 500.0, &out));
    broken = tables;
    broken.emissivity = bad;
    EXPECT(BT_STATUS_SPECTRAL_EMISSIVITY_OUT_OF_RANGE,
           bt_spectral_sensor_radiance(&lwir, &scene, &broken, 500.0, &out));
    broken = tables;
    broken.transmittance = bad;
    broken.transmittance_len = 3;
    broken.transmittance_um = SPEC_E_WL;
    EXPECT(BT_STATUS_SPECTRAL_TRANSMITTANCE_OUT_OF_RANGE,
           bt_spectral_sensor_radiance(&lwir, &scene, &broken, 500.0, &out));
    broken = tables;
    broken.emissivity = NULL;
    EXPECT(BT_STATUS_NULL_POINTER, bt_spectral_sensor_radiance(&lwir, &scene, &broken, 500.0, &out));
    broken = tables;
    broken.transmittance_um = (const double *)misaligned((void *)SPEC_TA_WL);
    EXPECT(BT_STATUS_INVALID_BUFFER, bt_spectral_sensor_radiance(&lwir, &scene, &broken, 500.0, &out));
    broken = tables;
    broken.emissivity_len = SIZE_MAX;
    EXPECT(BT_STATUS_INVALID_BUFFER, bt_spectral_sensor_radiance(&lwir, &scene, &broken, 500.0, &out));
    broken = tables;
    broken.emissivity_len = 1;
    EXPECT(BT_STATUS_TABLE_TOO_SHORT, bt_spectral_sensor_radiance(&lwir, &scene, &broken, 500.0, &out));
    EXPECT(BT_STATUS_SIGNAL_BELOW_BACKGROUND,
           bt_spectral_object_temperature(&lwir, &scene, &tables, 1e-3, &out));

    /* Hostile scalars, and hostile table values. */
    for (i = 0; i < N_ARGS; i++) {
        double x = ARGS[i], values[4];
        size_t j;
        EXPECT_SANE(bt_spectral_sensor_radiance(&lwir, &scene, &tables, x, &out));
        EXPECT_SANE(bt_spectral_object_temperature(&lwir, &scene, &tables, x, &out));
        EXPECT_SANE(bt_spectral_object_temperature_from_apparent(&lwir, &scene, &tables, x, &out));
        for (j = 0; j < 4; j++) {
            memcpy(values, SPEC_TA, sizeof values);
            values[j] = x;
            broken = tables;
            broken.transmittance = values;
            EXPECT_SANE(bt_spectral_sensor_radiance(&lwir, &scene, &broken, 500.0, &out));
            broken = tables;
            broken.transmittance_um = values;
            EXPECT_SANE(bt_spectral_object_temperature(&lwir, &scene, &broken, 150.0, &out));
        }
    }
}

/* ---- Wien ratio model ---------------------------------------------------------------- */

static int wien_untouched(const bt_wien_ratio *w) {
    return untouched(w->lambda1_um) && untouched(w->lambda2_um) && untouched(w->prefactor);
}

static void test_wien_ratio(void) {
    double out, exact = SENTINEL;
    double c2_umk = H_J_S * C_M_S / K_J_K * 1e6;
    size_t i;
    bt_band b1 = rectangular(0.645, 0.655, BT_DETECTOR_ENERGY);
    bt_band b2 = rectangular(0.895, 0.905, BT_DETECTOR_ENERGY);
    bt_wien_ratio w = {SENTINEL, SENTINEL, SENTINEL}, bad;
    double lambda_r, r_ref, r_planck;
    bt_status status;

    /* The model of two rectangular bands: centre wavelengths, W = (l1^-5 D1)/(l2^-5 D2). */
    status = bt_wien_ratio_from_bands(&b1, &b2, &w);
    expect_near(status, w.lambda1_um, 0.65, 1e-14, "Wien lambda1", __LINE__);
    expect_near(status, w.lambda2_um, 0.90, 1e-14, "Wien lambda2", __LINE__);
    expect_near(status, w.prefactor, pow(0.65, -5.0) * 0.01 / (pow(0.90, -5.0) * 0.01), 1e-13,
                "Wien prefactor", __LINE__);
    lambda_r = w.lambda1_um * w.lambda2_um / (w.lambda2_um - w.lambda1_um);

    /* R = kappa W exp(-c2 / (lambda_R T)) and its inverse, written out. */
    r_ref = 1.1 * w.prefactor * exp(-c2_umk / (lambda_r * 1500.0));
    EXPECT_NEAR(bt_wien_ratio_signal_ratio(&w, 1500.0, 1.1, &out), r_ref, 1e-13);
    EXPECT_NEAR(bt_wien_ratio_temperature(&w, r_ref, 1.1, &out), 1500.0, 1e-12);
    EXPECT_NEAR(bt_wien_ratio_correct_grey(&w, 1500.0, 1.1, &out),
                1.0 / (1.0 / 1500.0 + lambda_r / c2_umk * log(1.1)), 1e-13);

    /* Against Planck's law: the documented agreement of the closed form with the exact solver
     * for 10 nm bands at 0.65/0.90 um is within 0.4 K at 800 K. */
    r_planck = band_ref(0.645, 0.655, 800.0, 0) / band_ref(0.895, 0.905, 800.0, 0);
    status = bt_wien_ratio_temperature(&w, r_planck, 1.0, &out);
    CHECK(status == BT_STATUS_OK && fabs(out - 800.0) < 0.4);
    CHECK(bt_ratio_temperature(&b1, &b2, 600.0, 2000.0, r_planck, 1.0, 1.0, &exact) ==
              BT_STATUS_OK &&
          fabs(exact - 800.0) < 1e-6);

    /* Named errors. */
    bad = w;
    bad.lambda2_um = bad.lambda1_um;
    EXPECT(BT_STATUS_BANDS_INDISTINGUISHABLE, bt_wien_ratio_temperature(&bad, 0.1, 1.0, &out));
    bad = w;
    bad.prefactor = 0.0;
    EXPECT(BT_STATUS_RATIO_NOT_POSITIVE, bt_wien_ratio_temperature(&bad, 0.1, 1.0, &out));
    bad = w;
    bad.lambda1_um = -0.65;
    EXPECT(BT_STATUS_WAVELENGTH_NOT_POSITIVE, bt_wien_ratio_signal_ratio(&bad, 900.0, 1.0, &out));
    EXPECT(BT_STATUS_EMISSIVITY_RATIO_NOT_POSITIVE, bt_wien_ratio_temperature(&w, 0.1, 0.0, &out));
    EXPECT(BT_STATUS_RATIO_NOT_POSITIVE, bt_wien_ratio_temperature(&w, 0.0, 1.0, &out));
    EXPECT(BT_STATUS_RATIO_OUT_OF_RANGE, bt_wien_ratio_temperature(&w, 2.0 * w.prefactor, 1.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_wien_ratio_temperature(NULL, 0.1, 1.0, &out));
    EXPECT(BT_STATUS_INVALID_BUFFER,
           bt_wien_ratio_temperature((const bt_wien_ratio *)misaligned(&w), 0.1, 1.0, &out));
    bad.lambda1_um = SENTINEL;
    bad.lambda2_um = SENTINEL;
    bad.prefactor = SENTINEL;
    CHECK(bt_wien_ratio_from_bands(&b1, &b1, &bad) == BT_STATUS_BANDS_INDISTINGUISHABLE &&
          wien_untouched(&bad));
    CHECK(bt_wien_ratio_from_bands(&b1, NULL, &bad) == BT_STATUS_NULL_POINTER && wien_untouched(&bad));
    CHECK(bt_wien_ratio_from_bands(&b1, &b2, NULL) == BT_STATUS_NULL_POINTER);

    /* Hostile scalars in every position, in the struct and as arguments. */
    for (i = 0; i < N_ARGS; i++) {
        double x = ARGS[i];
        size_t j;
        EXPECT_SANE(bt_wien_ratio_signal_ratio(&w, x, 1.0, &out));
        EXPECT_SANE(bt_wien_ratio_signal_ratio(&w, 1000.0, x, &out));
        EXPECT_SANE(bt_wien_ratio_temperature(&w, x, 1.0, &out));
        EXPECT_SANE(bt_wien_ratio_temperature(&w, 0.01, x, &out));
        EXPECT_SANE(bt_wien_ratio_correct_grey(&w, x, 1.1, &out));
        EXPECT_SANE(bt_wien_ratio_correct_grey(&w, 1500.0, x, &out));
        for (j = 0; j < 3; j++) {
            double fields[3];
            fields[0] = w.lambda1_um;
            fields[1] = w.lambda2_um;
            fields[2] = w.prefactor;
            fields[j] = x;
            bad.lambda1_um = fields[0];
            bad.lambda2_um = fields[1];
            bad.prefactor = fields[2];
            EXPECT_SANE(bt_wien_ratio_temperature(&bad, 0.01, 1.0, &out));
            EXPECT_SANE(bt_wien_ratio_signal_ratio(&bad, 1000.0, 1.0, &out));
        }
        b2 = rectangular(x, 0.905, BT_DETECTOR_PHOTON);
        bad.lambda1_um = SENTINEL;
        bad.lambda2_um = SENTINEL;
        bad.prefactor = SENTINEL;
        status = bt_wien_ratio_from_bands(&b1, &b2, &bad);
        CHECK(status == BT_STATUS_OK
                  ? isfinite(bad.lambda1_um) && isfinite(bad.lambda2_um) && isfinite(bad.prefactor)
                  : wien_untouched(&bad) && known_status(status));
    }
}

/* ---- calibration curves of either form, behind a dark offset --------------------------- */

static void set_raw_form(bt_curve *curve, unsigned int value) {
    if (sizeof curve->form == sizeof(unsigned int)) {
        memcpy(&curve->form, &value, sizeof curve->form);
    } else if (sizeof curve->form == sizeof(unsigned short)) {
        unsigned short narrow = (unsigned short)value;
        memcpy(&curve->form, &narrow, sizeof curve->form);
    } else {
        unsigned char narrow = (unsigned char)value;
        memcpy(&curve->form, &narrow, sizeof curve->form);
    }
}

/* The two forms written out: offset + C/(exp(c2/(A T + B)) - 1), offset + C exp(-c2/(A T + B)). */
static double curve_ref(const bt_curve *p, double t_k) {
    double c2_umk = H_J_S * C_M_S / K_J_K * 1e6;
    double y = c2_umk / (p->a_um * t_k + p->b_umk);
    return p->offset + (p->form == BT_CURVE_FORM_WIEN ? p->c * exp(-y) : p->c / expm1(y));
}

static int curve_untouched(const bt_curve *p) {
    return untouched(p->a_um) && untouched(p->b_umk) && untouched(p->c) && untouched(p->offset);
}

static void test_curves(void) {
    double out, max_error = SENTINEL, t_k[6], counts[6];
    size_t i;
    bt_curve planck_curve = {BT_CURVE_FORM_PLANCK, 10.2, 25.0, 5.0e4, 1024.0};
    bt_curve wien_curve = {BT_CURVE_FORM_WIEN, 0.905, 1.5, 2.0e9, 250.0};
    bt_curve bad, fitted;
    bt_curve_fit fit;
    bt_scene scene = full_scene();
    bt_band narrow = rectangular(0.645, 0.655, BT_DETECTOR_ENERGY);
    bt_status status;

    /* Both forms against the written-out curves, and their closed-form inverses. */
    for (i = 0; i < 5; i++) {
        double t_ir = 260.0 + 60.0 * (double)i, t_nir = 900.0 + 250.0 * (double)i;
        EXPECT_NEAR(bt_curve_signal(&planck_curve, t_ir, &out), curve_ref(&planck_curve, t_ir), 1e-14);
        EXPECT_NEAR(bt_curve_temperature(&planck_curve, curve_ref(&planck_curve, t_ir), &out), t_ir,
                    1e-12);
        EXPECT_NEAR(bt_curve_signal(&wien_curve, t_nir, &out), curve_ref(&wien_curve, t_nir), 1e-14);
        EXPECT_NEAR(bt_curve_temperature(&wien_curve, curve_ref(&wien_curve, t_nir), &out), t_nir,
                    1e-12);
    }
    /* The measurement equation over a curve: the offset enters once. */
    {
        double s = measurement(&scene, curve_ref(&planck_curve, 350.0) - 1024.0,
                               curve_ref(&planck_curve, scene.reflected_k) - 1024.0,
                               curve_ref(&planck_curve, scene.atm_k) - 1024.0,
                               curve_ref(&planck_curve, scene.window_reflected_k) - 1024.0,
                               curve_ref(&planck_curve, scene.window_k) - 1024.0) +
                   1024.0;
        EXPECT_NEAR(bt_curve_sensor_signal(&planck_curve, &scene, 350.0, &out), s, 1e-13);
        EXPECT_NEAR(bt_curve_object_temperature(&planck_curve, &scene, s, &out), 350.0, 1e-11);
    }

    /* Fits: exact readings of the invented Wien-form pyrometer behind its 250-count dark
     * offset come back to below 1 uK (the documented recovery), parameters to 1e-6. */
    for (i = 0; i < 6; i++) {
        t_k[i] = 873.15 + 120.0 * (double)i;
        counts[i] = curve_ref(&wien_curve, t_k[i]);
    }
    memset(&fit, 0, sizeof fit);
    status = bt_curve_fit_points(BT_CURVE_FORM_WIEN, t_k, counts, NULL, 6, 250.0, &fit);
    CHECK(status == BT_STATUS_OK && fit.curve.form == BT_CURVE_FORM_WIEN &&
          fit.max_residual_k < 1e-6 && fabs(fit.curve.a_um / 0.905 - 1.0) < 1e-6 &&
          fit.curve.offset == 250.0);
    /* The band fit in the Wien form: 0.645-0.655 um over 700-1400 K interpolates to well
     * under a millikelvin, and its curve inverts Simpson band radiance within that. */
    fitted.a_um = SENTINEL;
    fitted.b_umk = SENTINEL;
    fitted.c = SENTINEL;
    fitted.offset = SENTINEL;
    status = bt_curve_fit_band(BT_CURVE_FORM_WIEN, &narrow, 700.0, 1400.0, &fitted, &max_error);
    CHECK(status == BT_STATUS_OK && fitted.form == BT_CURVE_FORM_WIEN && fitted.offset == 0.0 &&
          max_error > 0.0 && max_error < 1e-3);
    EXPECT_NEAR(bt_curve_temperature(&fitted, band_ref(0.645, 0.655, 1000.0, 0), &out), 1000.0,
                (max_error + 1e-6) / 1000.0);

    /* Named errors. */
    bad = planck_curve;
    set_raw_form(&bad, 7);
    EXPECT(BT_STATUS_INVALID_CURVE_FORM, bt_curve_signal(&bad, 300.0, &out));
    set_raw_form(&bad, 0xFFFFFFFFu);
    EXPECT(BT_STATUS_INVALID_CURVE_FORM, bt_curve_temperature(&bad, 2000.0, &out));
    EXPECT(BT_STATUS_SIGNAL_AT_OR_BELOW_OFFSET, bt_curve_temperature(&planck_curve, 1024.0, &out));
    EXPECT(BT_STATUS_CALIBRATION_OUT_OF_DOMAIN, bt_curve_temperature(&wien_curve, 3.0e9, &out));
    bad = planck_curve;
    bad.a_um = 0.0;
    EXPECT(BT_STATUS_CALIBRATION_PARAMETER_INVALID, bt_curve_signal(&bad, 300.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_curve_signal(NULL, 300.0, &out));
    EXPECT(BT_STATUS_INVALID_BUFFER, bt_curve_signal((const bt_curve *)misaligned(&bad), 300.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_curve_sensor_signal(&planck_curve, NULL, 300.0, &out));
    CHECK(bt_curve_signal(&planck_curve, 300.0, NULL) == BT_STATUS_NULL_POINTER);
    bad.a_um = SENTINEL;
    bad.b_umk = SENTINEL;
    bad.c = SENTINEL;
    bad.offset = SENTINEL;
    max_error = SENTINEL;
    CHECK(bt_curve_fit_band(2, &narrow, 700.0, 1400.0, &bad, &max_error) ==
              BT_STATUS_INVALID_CURVE_FORM &&
          curve_untouched(&bad) && untouched(max_error));
    CHECK(bt_curve_fit_band(-1, &narrow, 700.0, 1400.0, &bad, &max_error) ==
              BT_STATUS_INVALID_CURVE_FORM &&
          curve_untouched(&bad));
    CHECK(bt_curve_fit_band(BT_CURVE_FORM_PLANCK, &narrow, 1400.0, 700.0, &bad, &max_error) ==
              BT_STATUS_CALIBRATION_RANGE_INVALID &&
          curve_untouched(&bad) && untouched(max_error));
    CHECK(bt_curve_fit_points(5, t_k, counts, NULL, 6, 250.0, &fit) == BT_STATUS_INVALID_CURVE_FORM);
    CHECK(bt_curve_fit_points(BT_CURVE_FORM_WIEN, t_k, counts, NULL, 2, 250.0, &fit) ==
          BT_STATUS_CALIBRATION_TOO_FEW_POINTS);
    CHECK(bt_curve_fit_points(BT_CURVE_FORM_WIEN, t_k, counts, NULL, 6, 1e12, &fit) ==
          BT_STATUS_SIGNAL_AT_OR_BELOW_OFFSET);
    CHECK(bt_curve_fit_points(BT_CURVE_FORM_WIEN, NULL, counts, NULL, 6, 250.0, &fit) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_curve_fit_points(BT_CURVE_FORM_WIEN, t_k, counts, NULL, SIZE_MAX, 250.0, &fit) ==
          BT_STATUS_INVALID_BUFFER);
    CHECK(bt_curve_fit_points(BT_CURVE_FORM_WIEN, t_k, counts, NULL, 6, 250.0, NULL) ==
          BT_STATUS_NULL_POINTER);

    /* Hostile scalars in every field and argument. */
    for (i = 0; i < N_ARGS; i++) {
        double x = ARGS[i];
        size_t j;
        for (j = 0; j < 4; j++) {
            bad = (j % 2 == 0) ? planck_curve : wien_curve;
            if (j == 0) bad.a_um = x;
            if (j == 1) bad.b_umk = x;
            if (j == 2) bad.c = x;
            if (j == 3) bad.offset = x;
            EXPECT_SANE(bt_curve_signal(&bad, 1000.0, &out));
            EXPECT_SANE(bt_curve_temperature(&bad, 5000.0, &out));
            EXPECT_SANE(bt_curve_object_temperature(&bad, &scene, 5000.0, &out));
        }
        EXPECT_SANE(bt_curve_signal(&planck_curve, x, &out));
        EXPECT_SANE(bt_curve_temperature(&planck_curve, x, &out));
        EXPECT_SANE(bt_curve_signal(&wien_curve, x, &out));
        EXPECT_SANE(bt_curve_temperature(&wien_curve, x, &out));
        EXPECT_SANE(bt_curve_sensor_signal(&wien_curve, &scene, x, &out));
        EXPECT_SANE(bt_curve_object_temperature(&planck_curve, &scene, x, &out));
        status = bt_curve_fit_points(BT_CURVE_FORM_PLANCK, t_k, counts, NULL, 6, x, &fit);
        CHECK(status == BT_STATUS_OK ? isfinite(fit.curve.a_um) : known_status(status));
    }
}

/* ---- Monte Carlo uncertainty of a surface temperature --------------------------------- */

#define MC_TRIALS 20000
static double mc_samples[MC_TRIALS];
static double mc_again[MC_TRIALS];

static int mc_untouched(const bt_monte_carlo *m) {
    return m->trials == 7 && untouched(m->mean_k) && untouched(m->standard_deviation_k) &&
           untouched(m->low_k) && untouched(m->high_k);
}

static bt_monte_carlo mc_sentinel(void) {
    bt_monte_carlo m;
    memset(&m, 0, sizeof m);
    m.trials = 7;
    m.mean_k = SENTINEL;
    m.standard_deviation_k = SENTINEL;
    m.probability = SENTINEL;
    m.low_k = SENTINEL;
    m.high_k = SENTINEL;
    m.shortest_low_k = SENTINEL;
    m.shortest_high_k = SENTINEL;
    return m;
}

static void test_monte_carlo(void) {
    double mean = SENTINEL, sd = SENTINEL, slope, sigma_t, s;
    size_t i, sorted = 1;
    bt_band lwir = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_scene scene = plain_scene(); /* e 0.95, no air, no window */
    bt_input_uncertainties u, bad_u;
    bt_monte_carlo mc = mc_sentinel(), again = mc_sentinel();
    bt_status status;

    /* Only signal noise: for a small noise the temperature spread is u(S) / (e L'(T)), L' by
     * a central difference of Simpson band radiance (independent of the library). */
    memset(&u, 0, sizeof u);
    u.signal = 0.05;
    s = measurement(&scene, band_ref(8.0, 14.0, 350.0, 0), band_ref(8.0, 14.0, 293.15, 0), 0.0,
                    0.0, 0.0);
    slope = (band_ref(8.0, 14.0, 350.01, 0) - band_ref(8.0, 14.0, 349.99, 0)) / 0.02;
    sigma_t = u.signal / (scene.emissivity * slope);
    status = bt_surface_monte_carlo(&lwir, &scene, s, &u, 2024, 0.95, mc_samples, MC_TRIALS, &mc);
    CHECK(status == BT_STATUS_OK && mc.trials == MC_TRIALS && mc.probability == 0.95);
    /* Statistical bounds (JCGM 101 7.6 standard errors, 4 sigma): mean sigma/sqrt(M), standard
     * deviation sigma/sqrt(2(M-1)); plus 1e-3 relative for the linearisation. */
    CHECK(fabs(mc.mean_k - 350.0) < 4.0 * sigma_t / sqrt((double)MC_TRIALS) + 1e-3 * sigma_t);
    CHECK(fabs(mc.standard_deviation_k / sigma_t - 1.0) < 4.0 / sqrt(2.0 * (MC_TRIALS - 1)) + 1e-3);
    /* A normal output: the 95 % interval is mean -+ 1.96 sigma (quantile standard error about
     * 2.7 sigma/sqrt(M) at 1.96 sigma; 4 of them allowed). */
    CHECK(fabs(mc.low_k - (350.0 - 1.959964 * sigma_t)) < 12.0 * sigma_t / sqrt((double)MC_TRIALS));
    CHECK(fabs(mc.high_k - (350.0 + 1.959964 * sigma_t)) < 12.0 * sigma_t / sqrt((double)MC_TRIALS));
    CHECK(mc.shortest_low_k >= mc_samples[0] && mc.shortest_high_k <= mc_samples[MC_TRIALS - 1]);
    for (i = 1; i < MC_TRIALS; i++) {
        sorted = sorted && mc_samples[i - 1] <= mc_samples[i];
    }
    CHECK(sorted && mc.low_k >= mc_samples[0] && mc.high_k <= mc_samples[MC_TRIALS - 1]);

    /* Reproducible bit for bit; another seed gives another run; streaming agrees exactly. */
    status = bt_surface_monte_carlo(&lwir, &scene, s, &u, 2024, 0.95, mc_again, MC_TRIALS, &again);
    CHECK(status == BT_STATUS_OK && memcmp(&mc, &again, sizeof mc) == 0 &&
          memcmp(mc_samples, mc_again, sizeof mc_samples) == 0);
    status = bt_surface_monte_carlo(&lwir, &scene, s, &u, 2025, 0.95, mc_again, MC_TRIALS, &again);
    CHECK(status == BT_STATUS_OK && again.mean_k != mc.mean_k);
    status = bt_surface_monte_carlo_streaming(&lwir, &scene, s, &u, 2024, MC_TRIALS, &mean, &sd);
    CHECK(status == BT_STATUS_OK && memcmp(&mean, &mc.mean_k, sizeof mean) == 0 &&
          memcmp(&sd, &mc.standard_deviation_k, sizeof sd) == 0);

    /* Named errors; out values untouched. */
    mc = mc_sentinel();
    CHECK(bt_surface_monte_carlo(&lwir, &scene, s, &u, 1, 0.95, mc_samples, 1, &mc) ==
              BT_STATUS_TOO_FEW_TRIALS && mc_untouched(&mc));
    CHECK(bt_surface_monte_carlo(&lwir, &scene, s, &u, 1, 0.95, NULL, 0, &mc) ==
              BT_STATUS_TOO_FEW_TRIALS && mc_untouched(&mc));
    CHECK(bt_surface_monte_carlo(&lwir, &scene, s, &u, 1, 1.0, mc_samples, 64, &mc) ==
              BT_STATUS_COVERAGE_PROBABILITY_OUT_OF_RANGE && mc_untouched(&mc));
    CHECK(bt_surface_monte_carlo(&lwir, &scene, s, &u, 1, 0.95, NULL, 64, &mc) ==
              BT_STATUS_NULL_POINTER && mc_untouched(&mc));
    CHECK(bt_surface_monte_carlo(&lwir, &scene, s, &u, 1, 0.95, (double *)misaligned(mc_samples), 64,
                                 &mc) == BT_STATUS_INVALID_BUFFER && mc_untouched(&mc));
    CHECK(bt_surface_monte_carlo(&lwir, &scene, s, &u, 1, 0.95, mc_samples, SIZE_MAX, &mc) ==
              BT_STATUS_INVALID_BUFFER && mc_untouched(&mc));
    CHECK(bt_surface_monte_carlo(&lwir, &scene, s, NULL, 1, 0.95, mc_samples, 64, &mc) ==
              BT_STATUS_NULL_POINTER && mc_untouched(&mc));
    CHECK(bt_surface_monte_carlo(&lwir, &scene, s, &u, 1, 0.95, mc_samples, 64, NULL) ==
          BT_STATUS_NULL_POINTER);
    bad_u = u;
    bad_u.emissivity = -0.01;
    CHECK(bt_surface_monte_carlo(&lwir, &scene, s, &bad_u, 1, 0.95, mc_samples, 64, &mc) ==
              BT_STATUS_UNCERTAINTY_NEGATIVE && mc_untouched(&mc));
    /* e = 0.95 with u(e) = 0.05 draws up to 0.95 + sqrt(3) 0.05 > 1: outside the model. */
    bad_u.emissivity = 0.05;
    CHECK(bt_surface_monte_carlo(&lwir, &scene, s, &bad_u, 1, 0.95, mc_samples, 256, &mc) ==
              BT_STATUS_EMISSIVITY_OUT_OF_RANGE && mc_untouched(&mc));
    mean = SENTINEL;
    sd = SENTINEL;
    CHECK(bt_surface_monte_carlo_streaming(&lwir, &scene, s, &u, 1, 1, &mean, &sd) ==
              BT_STATUS_TOO_FEW_TRIALS && untouched(mean) && untouched(sd));
    CHECK(bt_surface_monte_carlo_streaming(&lwir, &scene, s, &u, 1, 64, &mean, NULL) ==
              BT_STATUS_NULL_POINTER && untouched(mean));

    /* Hostile scalars: the reading, the probability, and every uncertainty (64 trials). */
    for (i = 0; i < N_ARGS; i++) {
        double x = ARGS[i];
        size_t j;
        mc = mc_sentinel();
        status = bt_surface_monte_carlo(&lwir, &scene, x, &u, 7, 0.95, mc_samples, 64, &mc);
        CHECK(status == BT_STATUS_OK ? isfinite(mc.mean_k) && mc.trials == 64
                                     : mc_untouched(&mc) && known_status(status));
        mc = mc_sentinel();
        status = bt_surface_monte_carlo(&lwir, &scene, s, &u, 7, x, mc_samples, 64, &mc);
        CHECK(status == BT_STATUS_OK ? isfinite(mc.low_k) && isfinite(mc.high_k)
                                     : mc_untouched(&mc) && known_status(status));
        for (j = 0; j < 11; j++) {
            double fields[11];
            memset(fields, 0, sizeof fields);
            fields[j] = x;
            memcpy(&bad_u, fields, sizeof bad_u);
            mean = SENTINEL;
            sd = SENTINEL;
            status = bt_surface_monte_carlo_streaming(&lwir, &scene, s, &bad_u, 7, 16, &mean, &sd);
            CHECK(status == BT_STATUS_OK ? isfinite(mean) && isfinite(sd)
                                         : untouched(mean) && untouched(sd) && known_status(status));
        }
    }
}

/* ---- calibration checks (bt_verify_*) ------------------------------------------------------ */

/* Sentinel report structs: filled with 0xA5 bytes, compared bytewise after each error. */
#define VERIFY_SENTINEL(x) memset(&(x), 0xA5, sizeof(x))
static int bytes_are_a5(const void *p, size_t n) {
    const unsigned char *b = (const unsigned char *)p;
    size_t i;
    for (i = 0; i < n; i++) {
        if (b[i] != 0xA5) {
            return 0;
        }
    }
    return 1;
}
#define VERIFY_UNTOUCHED(x) bytes_are_a5(&(x), sizeof(x))

/* A call must give `want`; on error the report stays untouched. */
#define EXPECT_REPORT(want, report, call)                                                      \
    do {                                                                                       \
        bt_status status_;                                                                     \
        VERIFY_SENTINEL(report);                                                               \
        status_ = (call);                                                                      \
        if (status_ != (want)) {                                                               \
            printf("  got %d (%s), want %d\n", (int)status_, bt_status_message(status_),      \
                   (int)(want));                                                               \
        }                                                                                      \
        check(status_ == (want) && ((want) == BT_STATUS_OK || VERIFY_UNTOUCHED(report)),       \
              #call, __LINE__);                                                                \
    } while (0)

/* Any input: success, or a named status with the report untouched. */
#define EXPECT_REPORT_SANE(report, call)                                                       \
    do {                                                                                       \
        bt_status status_;                                                                     \
        VERIFY_SENTINEL(report);                                                               \
        status_ = (call);                                                                      \
        check(status_ == BT_STATUS_OK || (known_status(status_) && VERIFY_UNTOUCHED(report)),  \
              #call, __LINE__);                                                                \
    } while (0)

/* Closed-form inverse of the Sakuma-Hattori curve (DESIGN.md), written out here. */
static double sakuma_hattori_inverse(const bt_sakuma_hattori *p, double signal) {
    double c2_umk = H_J_S * C_M_S / K_J_K * 1e6;
    return (c2_umk / log1p(p->c / signal) - p->b_umk) / p->a_um;
}

static void test_verify(void) {
    /* Invented calibration: A = 10.2 um, B = 60 um K, C = 2.0e6 counts, 900 dark counts. */
    bt_sakuma_hattori sh = {10.2, 60.0, 2.0e6};
    bt_sakuma_hattori bad_sh = {-1.0, 60.0, 2.0e6};
    const double dark = 900.0;
    double t_k[5] = {263.15, 300.0, 350.0, 420.0, 480.0};
    /* Residuals placed on purpose: the signal of T_i + delta_i reads back T_i + delta_i. */
    double delta_k[5] = {0.010, -0.020, 0.005, 0.030, -0.010};
    double signal[5];
    double sum_sq = 0.0, sum = 0.0;
    double coverage_points[4] = {300.0, 350.0, 500.0, 320.0};
    bt_band band = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_band bad_band = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_verify_residuals_report residuals;
    bt_verify_curve_report curve;
    bt_verify_round_trip_report trip;
    bt_verify_coverage_report coverage;
    bt_verify_table_report table;
    bt_sakuma_hattori fitted;
    double fit_error_k = 0.0;
    double max_ref_k = 0.0;
    bt_frame_converter conv;
    bt_scene scene = plain_scene();
    bt_rails rails = {0, 65535};
    static bt_frame_row corrupted[FRAME_ROWS];
    size_t i, j, rows = 0;

    set_raw_detector(&bad_band, 7);
    for (i = 0; i < 5; i++) {
        signal[i] = dark + sakuma_hattori(&sh, t_k[i] + delta_k[i]);
        sum_sq += delta_k[i] * delta_k[i];
        sum += delta_k[i];
    }

    /* Residuals against the placed offsets: max 0.03 K at the 420 K point (index 3). */
    EXPECT_REPORT(BT_STATUS_OK, residuals,
                  bt_verify_residuals_sakuma_hattori(&sh, dark, t_k, signal, 5, &residuals));
    CHECK(residuals.points == 5 && residuals.worst_index == 3 && residuals.worst_t_k == 420.0);
    CHECK(fabs(residuals.worst_residual_k - 0.030) < 1e-9);
    CHECK(fabs(residuals.max_abs_residual_k - 0.030) < 1e-9);
    CHECK(fabs(residuals.rms_residual_k - sqrt(sum_sq / 5.0)) < 1e-9);
    CHECK(fabs(residuals.mean_residual_k - sum / 5.0) < 1e-9);
    EXPECT_REPORT(BT_STATUS_VERIFY_NO_POINTS, residuals,
                  bt_verify_residuals_sakuma_hattori(&sh, dark, NULL, NULL, 0, &residuals));
    EXPECT_REPORT(BT_STATUS_NULL_POINTER, residuals,
                  bt_verify_residuals_sakuma_hattori(NULL, dark, t_k, signal, 5, &residuals));
    EXPECT_REPORT(BT_STATUS_NULL_POINTER, residuals,
                  bt_verify_residuals_sakuma_hattori(&sh, dark, NULL, signal, 5, &residuals));
    EXPECT_REPORT(BT_STATUS_NULL_POINTER, residuals,
                  bt_verify_residuals_sakuma_hattori(&sh, dark, t_k, NULL, 5, &residuals));
    CHECK(bt_verify_residuals_sakuma_hattori(&sh, dark, t_k, signal, 5, NULL) ==
          BT_STATUS_NULL_POINTER);
    EXPECT_REPORT(BT_STATUS_INVALID_BUFFER, residuals,
                  bt_verify_residuals_sakuma_hattori(
                      &sh, dark, (const double *)misaligned(t_k), signal, 4, &residuals));
    EXPECT_REPORT(BT_STATUS_INVALID_BUFFER, residuals,
                  bt_verify_residuals_sakuma_hattori(&sh, dark, t_k, signal, SIZE_MAX,
                                                     &residuals));
    EXPECT_REPORT(BT_STATUS_CALIBRATION_PARAMETER_INVALID, residuals,
                  bt_verify_residuals_sakuma_hattori(&bad_sh, dark, t_k, signal, 5, &residuals));
    /* A signal at the dark level has no temperature. */
    EXPECT_REPORT(BT_STATUS_SIGNAL_AT_OR_BELOW_OFFSET, residuals,
                  bt_verify_residuals_sakuma_hattori(&sh, 1e9, t_k, signal, 5, &residuals));

    /* Coverage, by hand: points 300..500 K over 290..480 K extrapolate 10 K below and none
     * above; clipped nodes 300, 320, 350, 480 leave the largest gap 350..480 K. */
    EXPECT_REPORT(BT_STATUS_OK, coverage,
                  bt_verify_coverage(coverage_points, 4, 290.0, 480.0, &coverage));
    CHECK(coverage.points == 4 && coverage.points_in_range == 3);
    CHECK(coverage.t_min_k == 300.0 && coverage.t_max_k == 500.0);
    CHECK(coverage.extrapolated_below_k == 10.0 && coverage.extrapolated_above_k == 0.0);
    CHECK(coverage.largest_gap_k == 130.0 && coverage.gap_lo_k == 350.0 &&
          coverage.gap_hi_k == 480.0);
    EXPECT_REPORT(BT_STATUS_VERIFY_NO_POINTS, coverage,
                  bt_verify_coverage(NULL, 0, 290.0, 480.0, &coverage));
    /* At most 1024 points: 1025 are refused. */
    {
        static double many_points[1025];
        for (int i = 0; i < 1025; ++i) many_points[i] = 300.0 + i;
        EXPECT_REPORT(BT_STATUS_OK, coverage,
                      bt_verify_coverage(many_points, 1024, 290.0, 480.0, &coverage));
        CHECK(coverage.points == 1024);
        EXPECT_REPORT(BT_STATUS_VERIFY_TOO_MANY_POINTS, coverage,
                      bt_verify_coverage(many_points, 1025, 290.0, 480.0, &coverage));
    }
    EXPECT_REPORT(BT_STATUS_NULL_POINTER, coverage,
                  bt_verify_coverage(NULL, 4, 290.0, 480.0, &coverage));
    EXPECT_REPORT(BT_STATUS_VERIFY_RANGE_INVALID, coverage,
                  bt_verify_coverage(coverage_points, 4, 480.0, 290.0, &coverage));
    EXPECT_REPORT(BT_STATUS_VERIFY_RANGE_INVALID, coverage,
                  bt_verify_coverage(coverage_points, 4, 0.0, 290.0, &coverage));
    coverage_points[2] = -500.0;
    EXPECT_REPORT(BT_STATUS_TEMPERATURE_NOT_POSITIVE, coverage,
                  bt_verify_coverage(coverage_points, 4, 290.0, 480.0, &coverage));
    coverage_points[2] = NAN;
    EXPECT_REPORT(BT_STATUS_NON_FINITE, coverage,
                  bt_verify_coverage(coverage_points, 4, 290.0, 480.0, &coverage));
    coverage_points[2] = 500.0;
    CHECK(bt_verify_coverage(coverage_points, 4, 290.0, 480.0, NULL) == BT_STATUS_NULL_POINTER);

    /* Round trips: the closed-form inverse is exact to rounding; the band's Newton to
     * 1e-9 T (the crate's promise). */
    EXPECT_REPORT(BT_STATUS_OK, trip,
                  bt_verify_round_trip_sakuma_hattori(&sh, dark, 250.0, 500.0, 101, &trip));
    CHECK(trip.samples == 101 && trip.monotonic == 1 && trip.first_non_monotonic_k == 0.0);
    CHECK(trip.max_abs_error_k < 1e-9 * 500.0);
    EXPECT_REPORT(BT_STATUS_OK, trip, bt_verify_round_trip_band(&band, 250.0, 500.0, 51, &trip));
    CHECK(trip.monotonic == 1 && trip.max_abs_error_k < 1e-9 * 500.0);
    EXPECT_REPORT(BT_STATUS_VERIFY_SAMPLE_COUNT_INVALID, trip,
                  bt_verify_round_trip_band(&band, 250.0, 500.0, 1, &trip));
    EXPECT_REPORT(BT_STATUS_VERIFY_SAMPLE_COUNT_INVALID, trip,
                  bt_verify_round_trip_band(&band, 250.0, 500.0, SIZE_MAX, &trip));
    EXPECT_REPORT(BT_STATUS_VERIFY_RANGE_INVALID, trip,
                  bt_verify_round_trip_band(&band, 500.0, 250.0, 11, &trip));
    EXPECT_REPORT(BT_STATUS_INVALID_DETECTOR, trip,
                  bt_verify_round_trip_band(&bad_band, 250.0, 500.0, 11, &trip));
    EXPECT_REPORT(BT_STATUS_NULL_POINTER, trip,
                  bt_verify_round_trip_band(NULL, 250.0, 500.0, 11, &trip));
    EXPECT_REPORT(BT_STATUS_NULL_POINTER, trip,
                  bt_verify_round_trip_sakuma_hattori(NULL, dark, 250.0, 500.0, 11, &trip));
    CHECK(bt_verify_round_trip_band(&band, 250.0, 500.0, 11, NULL) == BT_STATUS_NULL_POINTER);
    EXPECT_REPORT(BT_STATUS_INVALID_BUFFER, trip,
                  bt_verify_round_trip_band(&band, 250.0, 500.0, 11,
                                            (bt_verify_round_trip_report *)misaligned(&trip)));

    /* The curve fitted to the band, against the band: the largest error over 201
     * temperatures, recomputed here with Simpson band radiance and the closed-form
     * inverse. Simpson's relative error (~1e-10) moves a temperature by ~1e-8 K. */
    CHECK(bt_sakuma_hattori_fit_band(&band, 250.0, 500.0, &fitted, &fit_error_k) ==
          BT_STATUS_OK);
    EXPECT_REPORT(BT_STATUS_OK, curve,
                  bt_verify_curve_band(&fitted, 0.0, &band, 1.0, 0.0, 250.0, 500.0, 201, &curve));
    for (i = 0; i < 201; i++) {
        double t = i == 200 ? 500.0 : 250.0 + 250.0 * ((double)i / 200.0);
        double e = sakuma_hattori_inverse(&fitted, band_ref(8.0, 14.0, t, 0)) - t;
        if (fabs(e) > max_ref_k) {
            max_ref_k = fabs(e);
        }
    }
    CHECK(curve.samples == 201 && fabs(curve.max_abs_error_k - max_ref_k) < 1e-6);
    CHECK(fabs(curve.worst_error_k) == curve.max_abs_error_k);
    CHECK(curve.worst_t_k >= 250.0 && curve.worst_t_k <= 500.0);
    /* A counts map 1 % too high reads every temperature cold. */
    EXPECT_REPORT(BT_STATUS_OK, curve,
                  bt_verify_curve_band(&fitted, 0.0, &band, 1.01, 0.0, 250.0, 500.0, 11, &curve));
    CHECK(curve.worst_error_k < -0.1 && curve.mean_error_k < -0.1);
    EXPECT_REPORT(BT_STATUS_FRAME_COUNTS_MAP_INVALID, curve,
                  bt_verify_curve_band(&fitted, 0.0, &band, 0.0, 0.0, 250.0, 500.0, 11, &curve));
    EXPECT_REPORT(BT_STATUS_NULL_POINTER, curve,
                  bt_verify_curve_band(&fitted, 0.0, NULL, 1.0, 0.0, 250.0, 500.0, 11, &curve));
    EXPECT_REPORT(BT_STATUS_INVALID_DETECTOR, curve,
                  bt_verify_curve_band(&fitted, 0.0, &bad_band, 1.0, 0.0, 250.0, 500.0, 11,
                                       &curve));
    EXPECT_REPORT(BT_STATUS_VERIFY_SAMPLE_COUNT_INVALID, curve,
                  bt_verify_curve_band(&fitted, 0.0, &band, 1.0, 0.0, 250.0, 500.0, 0, &curve));

    /* A frame table built by a converter, then checked; then a copy with one row moved
     * by +0.05 K (its constant coefficient), which the converter's row fingerprint refuses
     * before any check runs. */
    CHECK(bt_frame_converter_new_band(&band, &scene, FRAME_GAIN, FRAME_OFFSET, &rails, 250.0,
                                      1500.0, 1e-3, frame_table, FRAME_ROWS, &conv) ==
          BT_STATUS_OK);
    CHECK(bt_frame_table_rows_band(&band, 250.0, 1500.0, 1e-3, &rows) == BT_STATUS_OK);
    EXPECT_REPORT(BT_STATUS_OK, table,
                  bt_verify_frame_table_band(&band, &conv, frame_table, rows, 37, &table));
    CHECK(table.rows == rows && table.samples > rows * 30 && table.refused == 0 &&
          table.non_monotonic == 0);
    CHECK(table.max_abs_error_k <= 1e-3 && table.max_abs_error_k > 0.0);
    CHECK(table.claimed_max_error_k <= 1e-3);
    memcpy(corrupted, frame_table, sizeof corrupted);
    corrupted[rows / 2].coefficients[0] += 0.05f;
    EXPECT_REPORT(BT_STATUS_FRAME_ROWS_MISMATCH, table,
                  bt_verify_frame_table_band(&band, &conv, corrupted, rows, 37, &table));
    EXPECT_REPORT(BT_STATUS_NULL_POINTER, table,
                  bt_verify_frame_table_band(&band, NULL, frame_table, rows, 37, &table));
    EXPECT_REPORT(BT_STATUS_NULL_POINTER, table,
                  bt_verify_frame_table_band(&band, &conv, NULL, rows, 37, &table));
    EXPECT_REPORT(BT_STATUS_NULL_POINTER, table,
                  bt_verify_frame_table_sakuma_hattori(NULL, &conv, frame_table, rows, 37,
                                                       &table));
    EXPECT_REPORT(BT_STATUS_FRAME_STORAGE_TOO_SMALL, table,
                  bt_verify_frame_table_band(&band, &conv, frame_table, rows - 1, 37, &table));
    EXPECT_REPORT(BT_STATUS_VERIFY_SAMPLE_COUNT_INVALID, table,
                  bt_verify_frame_table_band(&band, &conv, frame_table, rows, 0, &table));
    EXPECT_REPORT(BT_STATUS_VERIFY_SAMPLE_COUNT_INVALID, table,
                  bt_verify_frame_table_band(&band, &conv, frame_table, rows, 5000, &table));
    EXPECT_REPORT(BT_STATUS_INVALID_BUFFER, table,
                  bt_verify_frame_table_band(&band, (const bt_frame_converter *)misaligned(&conv),
                                             frame_table, rows, 37, &table));
    CHECK(bt_verify_frame_table_band(&band, &conv, frame_table, rows, 37, NULL) ==
          BT_STATUS_NULL_POINTER);
    {
        /* A converter of garbage bytes: refused, never read as rows. */
        bt_frame_converter garbage;
        memset(&garbage, 0x5A, sizeof garbage);
        EXPECT_REPORT_SANE(table, bt_verify_frame_table_band(&band, &garbage, frame_table,
                                                             rows, 37, &table));
    }

    /* Calibration uncertainty: with only A uncertain, u(T) = T sigma_A / A (the closed
     * form's dT/dA = -T/A), largest at the hot end. */
    {
        bt_verify_uncertainty_report unc;
        double v[9] = {1e-4, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0};
        double not_psd[9] = {1.0, -1200.0, 0.0, -1200.0, 360000.0, 0.0, 0.0, 0.0, 0.0};
        EXPECT_REPORT(BT_STATUS_OK, unc,
                      bt_verify_uncertainty_sakuma_hattori(&sh, v, 250.0, 500.0, 11, &unc));
        CHECK(unc.samples == 11 && unc.worst_t_k == 500.0);
        CHECK(fabs(unc.max_u_k - 500.0 * 0.01 / 10.2) < 1e-12);
        CHECK(fabs(unc.lo_u_k - 250.0 * 0.01 / 10.2) < 1e-12);
        EXPECT_REPORT(BT_STATUS_NULL_POINTER, unc,
                      bt_verify_uncertainty_sakuma_hattori(&sh, NULL, 250.0, 500.0, 11, &unc));
        EXPECT_REPORT(BT_STATUS_NULL_POINTER, unc,
                      bt_verify_uncertainty_sakuma_hattori(NULL, v, 250.0, 500.0, 11, &unc));
        CHECK(bt_verify_uncertainty_sakuma_hattori(&sh, v, 250.0, 500.0, 11, NULL) ==
              BT_STATUS_NULL_POINTER);
        EXPECT_REPORT(BT_STATUS_INVALID_BUFFER, unc,
                      bt_verify_uncertainty_sakuma_hattori(&sh, (const double *)misaligned(v),
                                                           250.0, 500.0, 11, &unc));
        EXPECT_REPORT(BT_STATUS_CORRELATION_NOT_POSITIVE_SEMIDEFINITE, unc,
                      bt_verify_uncertainty_sakuma_hattori(&sh, not_psd, 250.0, 500.0, 11, &unc));
        v[1] = 1e-6; /* asymmetric */
        EXPECT_REPORT(BT_STATUS_VERIFY_COVARIANCE_INVALID, unc,
                      bt_verify_uncertainty_sakuma_hattori(&sh, v, 250.0, 500.0, 11, &unc));
        v[1] = 0.0;
        EXPECT_REPORT(BT_STATUS_VERIFY_RANGE_INVALID, unc,
                      bt_verify_uncertainty_sakuma_hattori(&sh, v, 500.0, 250.0, 11, &unc));
        for (i = 0; i < N_ARGS; i++) {
            for (j = 0; j < 9; j++) {
                double w[9] = {1e-4, 0.0, 0.0, 0.0, 1e-2, 0.0, 0.0, 0.0, 1e6};
                w[j] = ARGS[i];
                EXPECT_REPORT_SANE(unc, bt_verify_uncertainty_sakuma_hattori(&sh, w, 250.0, 500.0,
                                                                             5, &unc));
            }
            if (ARGS[i] <= 5000.0) {
                EXPECT_REPORT_SANE(unc, bt_verify_uncertainty_sakuma_hattori(&sh, v, ARGS[i], 500.0,
                                                                             5, &unc));
                EXPECT_REPORT_SANE(unc, bt_verify_uncertainty_sakuma_hattori(&sh, v, 250.0, ARGS[i],
                                                                             5, &unc));
            }
        }
    }

    /* Every hostile value in every scalar slot: a report or a named status. */
    for (i = 0; i < N_ARGS; i++) {
        for (j = 0; j < 3; j++) {
            double a[3] = {dark, 250.0, 500.0};
            if (j > 0 && ARGS[i] > 5000.0) {
                continue; /* valid but slow ranges for a debug build */
            }
            a[j] = ARGS[i];
            EXPECT_REPORT_SANE(residuals, bt_verify_residuals_sakuma_hattori(
                                              &sh, a[0], t_k, signal, 5, &residuals));
            EXPECT_REPORT_SANE(trip, bt_verify_round_trip_sakuma_hattori(&sh, a[0], a[1], a[2],
                                                                         11, &trip));
            EXPECT_REPORT_SANE(trip, bt_verify_round_trip_band(&band, a[1], a[2], 5, &trip));
            EXPECT_REPORT_SANE(coverage,
                               bt_verify_coverage(coverage_points, 4, a[1], a[2], &coverage));
            EXPECT_REPORT_SANE(curve, bt_verify_curve_band(&fitted, a[0], &band, 1.0, 0.0, a[1],
                                                           a[2], 5, &curve));
            EXPECT_REPORT_SANE(curve, bt_verify_curve_band(&fitted, 0.0, &band, a[j], a[0],
                                                           250.0, 500.0, 5, &curve));
        }
        {
            double hostile_t[5];
            memcpy(hostile_t, t_k, sizeof hostile_t);
            hostile_t[2] = ARGS[i];
            EXPECT_REPORT_SANE(residuals, bt_verify_residuals_sakuma_hattori(
                                              &sh, dark, hostile_t, signal, 5, &residuals));
            EXPECT_REPORT_SANE(coverage, bt_verify_coverage(hostile_t, 5, 250.0, 500.0, &coverage));
        }
    }
}

/* ---- optics and materials ----------------------------------------------------------------
 * References computed here: Fresnel's equations for a dielectric in real arithmetic, the
 * closed-form normal emissivity 4n/((n+1)^2+k^2), the diffraction and pixel MTF written out,
 * the Wien noise gain of one channel (lambda T / c2), and the first-order temperature error
 * L/(dL/dT) with dL/dT by central differences of bt_band_radiance. Printed check values
 * (Born and Wolf, Budzier and Gerlach 2021, ASTM site-method examples) to their digits. */

/* A struct out value is filled with this byte before each call; an error must leave it. */
#define OPT_FILL 0xA5
static int bytes_untouched(const void *p, size_t n) {
    const unsigned char *b = (const unsigned char *)p;
    size_t i;
    for (i = 0; i < n; i++) {
        if (b[i] != OPT_FILL) {
            return 0;
        }
    }
    return 1;
}
/* Success with `finite_ok`, or a named error with the struct untouched. */
#define EXPECT_STRUCT_SANE(obj, call, finite_ok)                                               \
    do {                                                                                       \
        bt_status status_;                                                                     \
        int ok_;                                                                               \
        memset(&(obj), OPT_FILL, sizeof(obj));                                                 \
        status_ = (call);                                                                      \
        ok_ = status_ == BT_STATUS_OK ? ((finite_ok) ? 1 : 0)                                  \
                                      : bytes_untouched(&(obj), sizeof(obj)) &&               \
                                            known_status(status_);                            \
        if (!ok_) {                                                                            \
            printf("  status %d (%s)\n", (int)status_, bt_status_message(status_));           \
        }                                                                                      \
        check(ok_, #call, __LINE__);                                                           \
    } while (0)
#define EXPECT_STRUCT_STATUS(obj, want, call)                                                  \
    do {                                                                                       \
        bt_status status_;                                                                     \
        memset(&(obj), OPT_FILL, sizeof(obj));                                                 \
        status_ = (call);                                                                      \
        check(status_ == (want) && bytes_untouched(&(obj), sizeof(obj)), #call, __LINE__);     \
    } while (0)

static double fresnel_dielectric(double n, double angle_deg) {
    double c = cos(angle_deg * M_PI_REF / 180.0), s2 = 1.0 - c * c;
    double w = sqrt(n * n - s2);
    double rs = (c - w) / (c + w), rp = (n * n * c - w) / (n * n * c + w);
    return 1.0 - 0.5 * (rs * rs + rp * rp);
}

static int site_finite(const bt_site_budget *b) {
    size_t i;
    if (!isfinite(b->estimate) || !isfinite(b->combined_standard_uncertainty) || b->len > 4) {
        return 0;
    }
    for (i = 0; i < BT_SITE_BUDGET_MAX_LINES; i++) {
        if (!isfinite(b->ranked[i].sensitivity) || !isfinite(b->ranked[i].contribution)) {
            return 0;
        }
    }
    return 1;
}

static void test_optics(void) {
    double out, a = SENTINEL, b = SENTINEL, l, lp, lm, h = 1e-3;
    double c2 = H_J_S * C_M_S / K_J_K * 1e6;
    size_t i, j;
    bt_band lwir = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_band red = rectangular(0.6495, 0.6505, BT_DETECTOR_ENERGY);
    bt_band red10 = rectangular(0.645, 0.655, BT_DETECTOR_ENERGY);
    bt_band broken = rectangular(14.0, 8.0, BT_DETECTOR_ENERGY);
    bt_band mw[4];
    bt_scene scene = {0.85, 293.15, 1.0, 293.15, 1.0, 0.0, 293.15, 293.15};
    bt_target_verdict verdict;
    bt_mtf m;
    bt_sse_correction sse;
    bt_directional_emissivity d;
    bt_multiwavelength_result fit;
    bt_site_budget budget;
    double sse_d[3] = {10.0, 20.0, 60.0}, sse_s[3] = {0.002, 0.001, 0.0};
    double bad_s[3] = {0.002, 1.0, 0.0};
    double u4[4] = {0.01, 0.01, 0.02, 2.0};
    double wl[4] = {0.7, 0.8, 0.9, 1.0}, sig[4];
    double lc, lr, s;

    /* Geometry and target rules. */
    EXPECT_NEAR(bt_spot_diameter_m(1.5, 75.0, &out), 0.02, 1e-15);
    EXPECT_NEAR(bt_ifov_mrad(17.0, 25.0, &out), 0.68, 1e-7);
    EXPECT_NEAR(bt_footprint_m(10.0, 0.68, &out), 0.0068, 1e-7);
    EXPECT(BT_STATUS_OPTICS_GEOMETRY_INVALID, bt_spot_diameter_m(1.5, 0.0, &out));
    EXPECT(BT_STATUS_NULL_POINTER, bt_spot_diameter_m(1.5, 75.0, NULL));
    EXPECT_STRUCT_SANE(verdict, bt_target_check(BT_TARGET_RULE_ISO10878, 0.025, 1.5, 75.0, &verdict),
                       verdict.valid == 1 && fabs(verdict.ratio - 1.25) < 1e-12);
    EXPECT_STRUCT_SANE(verdict,
                       bt_target_check(BT_TARGET_RULE_PUSNIK_GERSAK, 0.05, 10.0, 0.68, &verdict),
                       verdict.valid == 0 && fabs(verdict.minimum_m - 0.068) < 1e-7);
    EXPECT_STRUCT_SANE(verdict,
                       bt_target_check(BT_TARGET_RULE_THREE_BY_THREE, 0.05, 10.0, 0.68, &verdict),
                       verdict.valid == 1);
    EXPECT_STRUCT_STATUS(verdict, BT_STATUS_TARGET_RULE_INVALID,
                         bt_target_check(3, 0.05, 10.0, 0.68, &verdict));
    EXPECT_STRUCT_STATUS(verdict, BT_STATUS_TARGET_RULE_INVALID,
                         bt_target_check(0xFFFFFFFFu, 0.05, 10.0, 0.68, &verdict));
    EXPECT_STRUCT_STATUS(verdict, BT_STATUS_TARGET_SIZE_NOT_POSITIVE,
                         bt_target_check(0, -0.05, 10.0, 75.0, &verdict));
    CHECK(bt_target_check(0, 0.05, 10.0, 75.0, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_target_check(0, 0.05, 10.0, 75.0, (bt_target_verdict *)misaligned(&verdict)) ==
          BT_STATUS_INVALID_BUFFER);

    /* Airy pattern (Born and Wolf) and MTF (Budzier and Gerlach 2021). */
    EXPECT_NEAR(bt_airy_encircled_energy(1.220, 1.0, 1.0, &out), 0.838, 6e-4);
    EXPECT_NEAR(bt_airy_radius_um(0.9, 1.0, 1.0, &out), 1.901, 3e-4);
    EXPECT_NEAR(bt_airy_radius_um(0.95, 10.0, 1.0, &out), 39.16, 3e-4);
    EXPECT(BT_STATUS_FRACTION_OUT_OF_RANGE, bt_airy_radius_um(1.0, 1.0, 1.0, &out));
    EXPECT_STRUCT_SANE(m, bt_mtf_evaluate(1000.0 / 34.0, 17.0, 10.0, 1.0, &m),
                       fabs(m.pixel - 2.0 / M_PI_REF) < 1e-15 &&
                           fabs(m.diffraction - 2.0 / M_PI_REF *
                                                    (acos(0.1 / 0.34) -
                                                     (0.1 / 0.34) *
                                                         sqrt(1.0 - (0.1 / 0.34) * (0.1 / 0.34)))) <
                               1e-14 &&
                           fabs(m.system - 0.4017) < 5e-5);
    EXPECT_STRUCT_STATUS(m, BT_STATUS_SPATIAL_FREQUENCY_NEGATIVE,
                         bt_mtf_evaluate(-1.0, 17.0, 10.0, 1.0, &m));
    EXPECT_SANE(bt_small_target_fraction(51.0, 17.0, 10.0, 1.0, &out));
    CHECK(out > 0.9 && out < 0.93);
    EXPECT(BT_STATUS_TARGET_SIZE_NOT_POSITIVE, bt_small_target_fraction(0.0, 17.0, 10.0, 1.0, &out));
    EXPECT(BT_STATUS_OPTICS_GEOMETRY_INVALID, bt_small_target_fraction(1e9, 17.0, 10.0, 1.0, &out));

    /* Size-of-source: first-order error against L / (dL/dT) by central differences. */
    CHECK(bt_band_radiance(&lwir, 300.0, &l) == BT_STATUS_OK);
    CHECK(bt_band_radiance(&lwir, 300.0 + h, &lp) == BT_STATUS_OK);
    CHECK(bt_band_radiance(&lwir, 300.0 - h, &lm) == BT_STATUS_OK);
    EXPECT_NEAR(bt_sse_temperature_error_k(&lwir, 300.0, 0.01, &out), 0.01 * l * 2.0 * h / (lp - lm),
                1e-8);
    EXPECT_NEAR(bt_sse_temperature_error_k(&red, 1273.15, 1e-3, &out), 0.0732, 7e-4);
    EXPECT_NEAR(bt_sse_temperature_error_k(&lwir, 300.0, 0.01, &out), 0.656, 8e-4);
    EXPECT_STRUCT_SANE(sse, bt_sse_correct(&red, sse_d, sse_s, 3, 1273.15, 60.0, 15.0, &sse),
                       fabs(sse.relative_signal_first_order + 0.0015) < 1e-15 &&
                           sse.correction_k > 0.1 && sse.correction_k < 0.12);
    EXPECT_STRUCT_STATUS(sse, BT_STATUS_SSE_DIAMETER_OUTSIDE_TABLE,
                         bt_sse_correct(&red, sse_d, sse_s, 3, 1273.15, 60.0, 5.0, &sse));
    EXPECT_STRUCT_STATUS(sse, BT_STATUS_SSE_TABLE_INVALID,
                         bt_sse_correct(&red, sse_d, bad_s, 3, 1273.15, 60.0, 15.0, &sse));
    EXPECT_STRUCT_STATUS(sse, BT_STATUS_SSE_TABLE_INVALID,
                         bt_sse_correct(&red, sse_d, sse_s, 1, 1273.15, 60.0, 15.0, &sse));
    EXPECT_STRUCT_STATUS(sse, BT_STATUS_NULL_POINTER,
                         bt_sse_correct(&red, NULL, sse_s, 3, 1273.15, 60.0, 15.0, &sse));
    EXPECT_STRUCT_STATUS(sse, BT_STATUS_INVALID_BUFFER,
                         bt_sse_correct(&red, sse_d, sse_s, SIZE_MAX, 1273.15, 60.0, 15.0, &sse));
    EXPECT_STRUCT_STATUS(sse, BT_STATUS_INVALID_BAND,
                         bt_sse_correct(&broken, sse_d, sse_s, 3, 1273.15, 60.0, 15.0, &sse));

    /* Emissivity from optical constants. */
    EXPECT_NEAR(bt_emissivity_normal(2.7, 3.1, &out), 4.0 * 2.7 / (3.7 * 3.7 + 3.1 * 3.1), 1e-15);
    EXPECT_STRUCT_SANE(d, bt_emissivity_directional(1.5, 0.0, 60.0, &d),
                       fabs(d.unpolarised - fresnel_dielectric(1.5, 60.0)) < 1e-14 &&
                           fabs(d.unpolarised - 0.9108) < 5e-5);
    EXPECT_NEAR(bt_emissivity_hemispherical(1.5, 0.0, &out), 0.90822, 1e-5);
    CHECK(bt_emissivity_peak(54.75, 54.75, &a, &b) == BT_STATUS_OK && fabs(a - 89.26) < 5e-3 &&
          fabs(b - 0.414) < 5e-4);
    EXPECT_NEAR(bt_emissivity_trusted_angle_deg(1.5, 0.0, 0.01, &out), 44.4265186383196, 1e-9);
    EXPECT(BT_STATUS_REFRACTIVE_INDEX_INVALID, bt_emissivity_normal(0.0, 1.0, &out));
    EXPECT(BT_STATUS_REFRACTIVE_INDEX_INVALID, bt_emissivity_normal(1.0, -1.0, &out));
    EXPECT_STRUCT_STATUS(d, BT_STATUS_ANGLE_OUT_OF_RANGE, bt_emissivity_directional(1.5, 0.0, 90.0, &d));
    EXPECT(BT_STATUS_ANGLE_TOLERANCE_INVALID, bt_emissivity_trusted_angle_deg(1.5, 0.0, 0.0, &out));
    EXPECT_NEAR(bt_hagen_rubens_normal(1e-7, 10.0, &out), 0.365 * 0.1, 1e-3);
    EXPECT(BT_STATUS_RESISTIVITY_NOT_POSITIVE, bt_hagen_rubens_normal(0.0, 10.0, &out));
    EXPECT(BT_STATUS_HAGEN_RUBENS_OUT_OF_RANGE, bt_hagen_rubens_normal(1e-6, 0.01, &out));
    a = SENTINEL;
    b = SENTINEL;
    CHECK(bt_emissivity_peak(NAN, 1.0, &a, &b) == BT_STATUS_NON_FINITE && untouched(a) &&
          untouched(b));
    CHECK(bt_emissivity_peak(1.5, 0.0, NULL, &b) == BT_STATUS_NULL_POINTER && untouched(b));

    /* Effective wavelengths and calibration sensitivities. */
    EXPECT_NEAR(bt_one_point_wavelength_sensitivity(0.65, 1234.93, 2000.0, &out),
                (1.0 - 2000.0 / 1234.93) * 2000.0 / 0.65, 1e-14);
    CHECK(fabs(fabs(out) * 1e-3 - 1.906) < 5e-4);
    EXPECT_SANE(bt_two_point_sigma_sensitivity(0.65, 1e-4, 1234.93, 1357.77, 2000.0, &out));
    EXPECT(BT_STATUS_MOMENTS_INVALID,
           bt_two_point_sigma_sensitivity(0.65, -1e-4, 1234.93, 1357.77, 2000.0, &out));
    EXPECT(BT_STATUS_CALIBRATION_DUPLICATE_TEMPERATURE,
           bt_mean_effective_wavelength_um(&lwir, 300.0, 300.0, &out));
    /* mpmath: tools/refgen/calibration_sensitivity_refs.py, 0.645-0.655 um at 1000 K. */
    EXPECT_NEAR(bt_limit_effective_wavelength_um(&red10, 1000.0, &out), 0.650206593924974387, 1e-11);
    a = SENTINEL;
    b = SENTINEL;
    CHECK(bt_sakuma_hattori_from_moments(&red, &a, &b) == BT_STATUS_OK &&
          fabs(a - 0.65 * (1.0 - 6.0 * (0.001 * 0.001 / 12.0) / (0.65 * 0.65))) < 1e-15);

    /* Multi-wavelength pyrometry: one channel's Wien gain is lambda T / c2. */
    a = SENTINEL;
    b = SENTINEL;
    CHECK(bt_multiwavelength_noise_gain(wl + 2, 1, 1500.0, 0, &a, &b) == BT_STATUS_OK &&
          fabs(a - 0.9 * 1500.0 / c2) < 1e-15);
    CHECK(bt_multiwavelength_noise_gain(wl, 4, 1500.0, 2, &a, &b) == BT_STATUS_OK &&
          fabs(a - 3.08) < 5e-3);
    a = SENTINEL;
    CHECK(bt_multiwavelength_noise_gain(wl, 4, 1500.0, 4, &a, &b) ==
              BT_STATUS_EMISSIVITY_MODEL_INVALID && untouched(a));
    CHECK(bt_multiwavelength_noise_gain(wl, 2, 1500.0, 2, &a, &b) == BT_STATUS_TOO_FEW_BANDS);
    CHECK(bt_multiwavelength_noise_gain(NULL, 2, 1500.0, 1, &a, &b) == BT_STATUS_NULL_POINTER);
    for (i = 0; i < 4; i++) {
        mw[i] = rectangular(wl[i] - 0.005, wl[i] + 0.005, BT_DETECTOR_ENERGY);
    }
    /* Grey e = 0.5 at 1400 K: the grey model recovers it. */
    for (i = 0; i < 4; i++) {
        CHECK(bt_band_radiance(&mw[i], 1400.0, &sig[i]) == BT_STATUS_OK);
        sig[i] *= 0.5;
    }
    EXPECT_STRUCT_SANE(fit, bt_multiwavelength_fit(mw, sig, 4, 1, &fit),
                       fabs(fit.temperature_k - 1400.0) < 1e-8 &&
                           fabs(exp(fit.coefficients[0]) - 0.5) < 1e-10 && fit.terms == 1);
    EXPECT_STRUCT_STATUS(fit, BT_STATUS_TOO_MANY_BANDS, bt_multiwavelength_fit(mw, sig, 17, 1, &fit));
    EXPECT_STRUCT_STATUS(fit, BT_STATUS_TOO_FEW_BANDS, bt_multiwavelength_fit(mw, sig, 1, 1, &fit));
    EXPECT_STRUCT_STATUS(fit, BT_STATUS_NULL_POINTER, bt_multiwavelength_fit(NULL, sig, 4, 1, &fit));
    EXPECT_STRUCT_STATUS(fit, BT_STATUS_INVALID_BUFFER,
                         bt_multiwavelength_fit((const bt_band *)misaligned(mw), sig, 4, 1, &fit));
    mw[2] = broken;
    EXPECT_STRUCT_STATUS(fit, BT_STATUS_INVALID_BAND, bt_multiwavelength_fit(mw, sig, 4, 1, &fit));
    mw[2] = rectangular(0.895, 0.905, BT_DETECTOR_ENERGY);

    /* Site-method budgets: the contact method's printed example (8-14 um). */
    CHECK(bt_band_radiance(&lwir, 353.15, &lc) == BT_STATUS_OK);
    CHECK(bt_band_radiance(&lwir, 293.15, &lr) == BT_STATUS_OK);
    s = 0.85 * lc + 0.15 * lr;
    EXPECT_STRUCT_SANE(budget,
                       bt_contact_emissivity_budget(&lwir, &scene, s, 353.15, 0.005 * s, 0.5, 2.0,
                                                    &budget),
                       fabs(budget.estimate - 0.85) < 1e-12 &&
                           fabs(budget.combined_standard_uncertainty - 0.0126) < 5e-5 &&
                           budget.len == 3);
    EXPECT_NEAR(bt_reflector_bias_k(&lwir, 283.15, 0.05, 293.15, &out), 0.525, 1e-3);
    EXPECT(BT_STATUS_REFLECTOR_EMISSIVITY_OUT_OF_RANGE,
           bt_reflector_bias_k(&lwir, 283.15, 1.0, 293.15, &out));
    EXPECT_STRUCT_STATUS(budget, BT_STATUS_UNCERTAINTY_NEGATIVE,
                         bt_contact_emissivity_budget(&lwir, &scene, s, 353.15, -1.0, 0.5, 2.0,
                                                      &budget));
    EXPECT_STRUCT_STATUS(budget, BT_STATUS_EMISSIVITY_NOT_DETERMINED,
                         bt_contact_emissivity_budget(&lwir, &scene, s, 293.15, 0.0, 0.5, 2.0,
                                                      &budget));
    EXPECT_STRUCT_STATUS(budget, BT_STATUS_NULL_POINTER,
                         bt_coating_emissivity_budget(&lwir, &scene, s, s, 0.95, NULL, &budget));
    EXPECT_STRUCT_SANE(budget, bt_coating_emissivity_budget(&lwir, &scene, s, s, 0.85, u4, &budget),
                       site_finite(&budget) && fabs(budget.estimate - 0.85) < 1e-9);
    EXPECT_STRUCT_SANE(budget,
                       bt_reflector_budget(&lwir, &scene, lr, 0.05, 293.15, 0.01, 0.02, 1.0, &budget),
                       site_finite(&budget) && fabs(budget.estimate - 293.15) < 1e-9);
    EXPECT_STRUCT_SANE(budget, bt_direct_reflected_budget(&lwir, lr, 0.0, 0.5, 1.5, &budget),
                       site_finite(&budget) &&
                           fabs(budget.combined_standard_uncertainty - sqrt(2.5)) < 1e-12);

    /* Every argument hostile in turn. */
    for (i = 0; i < N_ARGS; i++) {
        double x = ARGS[i];
        EXPECT_SANE(bt_spot_diameter_m(x, 75.0, &out));
        EXPECT_SANE(bt_spot_diameter_m(1.5, x, &out));
        EXPECT_SANE(bt_ifov_mrad(x, 25.0, &out));
        EXPECT_SANE(bt_footprint_m(10.0, x, &out));
        EXPECT_SANE(bt_airy_encircled_energy(x, 10.0, 1.0, &out));
        EXPECT_SANE(bt_airy_encircled_energy(1.0, x, x, &out));
        EXPECT_SANE(bt_airy_radius_um(x, 10.0, 1.0, &out));
        EXPECT_SANE(bt_small_target_fraction(x, 17.0, 10.0, 1.0, &out));
        EXPECT_SANE(bt_small_target_fraction(50.0, x, 10.0, 1.0, &out));
        EXPECT_SANE(bt_small_target_fraction(50.0, 17.0, x, 1.0, &out));
        EXPECT_SANE(bt_sse_temperature_error_k(&lwir, x, 0.01, &out));
        EXPECT_SANE(bt_sse_temperature_error_k(&lwir, 300.0, x, &out));
        EXPECT_SANE(bt_emissivity_normal(x, 1.0, &out));
        EXPECT_SANE(bt_emissivity_hemispherical(1.5, x, &out));
        EXPECT_SANE(bt_emissivity_trusted_angle_deg(2.0, 0.0, x, &out));
        EXPECT_SANE(bt_hagen_rubens_normal(x, 10.0, &out));
        EXPECT_SANE(bt_hagen_rubens_normal(1e-7, x, &out));
        EXPECT_SANE(bt_one_point_wavelength_sensitivity(x, 1234.93, 2000.0, &out));
        EXPECT_SANE(bt_two_point_sigma_sensitivity(0.65, x, 1234.93, 1357.77, 2000.0, &out));
        EXPECT_SANE(bt_limit_effective_wavelength_um(&lwir, x, &out));
        EXPECT_SANE(bt_mean_effective_wavelength_um(&lwir, 300.0, x, &out));
        EXPECT_SANE(bt_reflector_bias_k(&lwir, x, 0.05, 293.15, &out));
        EXPECT_SANE(bt_reflector_bias_k(&lwir, 283.15, x, 293.15, &out));
        for (j = 0; j < 3; j++) {
            EXPECT_STRUCT_SANE(verdict, bt_target_check((uint32_t)j, x, 10.0, 0.68, &verdict),
                               isfinite(verdict.ratio) && isfinite(verdict.minimum_m));
            EXPECT_STRUCT_SANE(verdict, bt_target_check((uint32_t)j, 0.05, x, 0.68, &verdict),
                               isfinite(verdict.ratio));
        }
        EXPECT_STRUCT_SANE(m, bt_mtf_evaluate(x, 17.0, 10.0, 1.0, &m), isfinite(m.system));
        EXPECT_STRUCT_SANE(m, bt_mtf_evaluate(10.0, x, x, 1.0, &m), isfinite(m.system));
        EXPECT_STRUCT_SANE(d, bt_emissivity_directional(1.5, 0.0, x, &d), isfinite(d.unpolarised));
        EXPECT_STRUCT_SANE(d, bt_emissivity_directional(x, x, 30.0, &d), isfinite(d.unpolarised));
        EXPECT_STRUCT_SANE(sse, bt_sse_correct(&red, sse_d, sse_s, 3, x, 60.0, 15.0, &sse),
                           isfinite(sse.corrected_k));
        EXPECT_STRUCT_SANE(sse, bt_sse_correct(&red, sse_d, sse_s, 3, 1273.15, x, 15.0, &sse),
                           isfinite(sse.corrected_k));
        for (j = 0; j < 4; j++) {
            double saved = sig[j];
            sig[j] = x;
            EXPECT_STRUCT_SANE(fit, bt_multiwavelength_fit(mw, sig, 4, 2, &fit),
                               isfinite(fit.temperature_k));
            sig[j] = saved;
        }
        EXPECT_STRUCT_SANE(budget,
                           bt_contact_emissivity_budget(&lwir, &scene, x, 353.15, 0.01, 0.5, 2.0,
                                                        &budget),
                           site_finite(&budget));
        EXPECT_STRUCT_SANE(budget,
                           bt_contact_emissivity_budget(&lwir, &scene, s, x, 0.01, 0.5, 2.0, &budget),
                           site_finite(&budget));
        EXPECT_STRUCT_SANE(budget,
                           bt_reflector_budget(&lwir, &scene, x, 0.05, 293.15, 0.01, 0.02, 1.0,
                                               &budget),
                           site_finite(&budget));
        EXPECT_STRUCT_SANE(budget,
                           bt_reflector_budget(&lwir, &scene, lr, 0.05, x, 0.01, 0.02, x, &budget),
                           site_finite(&budget));
        EXPECT_STRUCT_SANE(budget, bt_direct_reflected_budget(&lwir, x, 0.0, 0.5, 1.5, &budget),
                           site_finite(&budget));
        EXPECT_STRUCT_SANE(budget, bt_coating_emissivity_budget(&lwir, &scene, s, x, 0.9, u4, &budget),
                           site_finite(&budget));
        a = SENTINEL;
        b = SENTINEL;
        {
            bt_status st = bt_emissivity_peak(x, 1.0, &a, &b);
            CHECK(st == BT_STATUS_OK ? isfinite(a) && isfinite(b)
                                     : untouched(a) && untouched(b) && known_status(st));
        }
    }
}

/* ---- raw frames: stacks, two-point NUC, bad pixels, shutter, drift, merit ------------- */

#define RAW_W 4
#define RAW_H 3
#define RAW_N (RAW_W * RAW_H)

/* Pixel model of the test (invented): raw n = (x - O_p) / G_p with a per-pixel gain and
 * offset, x the array's corrected counts; pixel 5 is stuck at 7000. */
static double raw_gain(size_t p) { return 1.0 + 0.02 * (double)((int)(p % 5) - 2); }
static double raw_offset(size_t p) { return 300.0 * (double)((int)(p % 7) - 3); }
static uint16_t raw_counts(size_t p, double x, int noise) {
    if (p == 5) return 7000;
    return (uint16_t)floor((x - raw_offset(p)) / raw_gain(p) + 0.5 + noise);
}

static void test_raw_frames(void) {
    bt_band band = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    double lm[RAW_N], l2[RAW_N], hm[RAW_N], h2[RAW_N];
    uint32_t lf = 0, hf = 0, frames_sentinel;
    uint16_t frame[RAW_N];
    float fframe[RAW_N], gain[RAW_N], offset[RAW_N], scratch[RAW_N], kelvin[RAW_N];
    float gain_copy[RAW_N];
    uint8_t bad[RAW_N];
    bt_stack_view low, high, broken;
    bt_two_point_report report;
    bt_bad_pixel_rules rules = {5.0, 3.0, 0.2};
    bt_bad_pixel_rules bad_rules = {NAN, 3.0, 0.2};
    bt_bad_pixel_report bad_report;
    bt_drift_step step = {1.0f, 0.0f}, bad_step = {0.0f, 0.0f}, got_step;
    bt_corrected_summary cs;
    bt_scene scene = {1.0, 293.15, 1.0, 293.15, 1.0, 0.0, 293.15, 293.15};
    bt_rails rails = {0, 65535};
    bt_frame_converter conv;
    bt_spatial_stats stats;
    bt_drift_point points[3];
    bt_drift_model model;
    double out = SENTINEL, target = SENTINEL;
    size_t p, k;
    int f;
    const int noise[4] = {-1, 1, 0, 0};

    /* Stacks of four frames at x = 9000 and x = 13000 (+-1 count of noise). */
    for (f = 0; f < 4; f++) {
        for (p = 0; p < RAW_N; p++) frame[p] = raw_counts(p, 9000.0, noise[f]);
        CHECK(bt_frame_stack_add_counts(lm, l2, RAW_N, &lf, frame, RAW_N) == BT_STATUS_OK);
        for (p = 0; p < RAW_N; p++) frame[p] = raw_counts(p, 13000.0, noise[(f + 1) % 4]);
        CHECK(bt_frame_stack_add_counts(hm, h2, RAW_N, &hf, frame, RAW_N) == BT_STATUS_OK);
    }
    CHECK(lf == 4 && hf == 4);
    /* Mean and m2 against the sums written out here: mean offset by 0, m2 = 2 counts^2. */
    CHECK(fabs(lm[0] - (double)raw_counts(0, 9000.0, 0)) < 1e-9);
    CHECK(fabs(l2[0] - 2.0) < 1e-9);

    /* Hostile stack updates: nothing written. */
    frames_sentinel = lf;
    CHECK(bt_frame_stack_add_counts(NULL, l2, RAW_N, &lf, frame, RAW_N) == BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_stack_add_counts(lm, l2, RAW_N, NULL, frame, RAW_N) == BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_stack_add_counts(lm, l2, RAW_N, &lf, NULL, RAW_N) == BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_stack_add_counts(lm, l2, RAW_N, &lf, frame, RAW_N - 1) ==
          BT_STATUS_FRAME_LENGTH_MISMATCH);
    CHECK(bt_frame_stack_add_counts(lm, l2, 0, &lf, frame, 0) == BT_STATUS_NUC_FRAME_EMPTY);
    CHECK(bt_frame_stack_add_counts(lm, l2, SIZE_MAX, &lf, frame, RAW_N) ==
          BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_stack_add_counts(lm, lm, RAW_N, &lf, frame, RAW_N) == BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_stack_add_counts((double *)misaligned(lm), l2, RAW_N - 1, &lf, frame,
                                    RAW_N - 1) == BT_STATUS_INVALID_BUFFER);
    for (p = 0; p < RAW_N; p++) fframe[p] = 1.0f;
    fframe[3] = NAN;
    CHECK(bt_frame_stack_add_signal(lm, l2, RAW_N, &lf, fframe, RAW_N) == BT_STATUS_NON_FINITE);
    fframe[3] = INFINITY;
    CHECK(bt_frame_stack_add_signal(lm, l2, RAW_N, &lf, fframe, RAW_N) == BT_STATUS_NON_FINITE);
    CHECK(lf == frames_sentinel);
    CHECK(fabs(l2[0] - 2.0) < 1e-9);

    low.mean = lm; low.m2 = l2; low.len = RAW_N; low.frames = lf;
    high.mean = hm; high.m2 = h2; high.len = RAW_N; high.frames = hf;

    /* The stuck pixel makes plain two-point refuse; detection flags it. */
    CHECK(bt_nuc_two_point(&low, &high, NULL, 0, gain, offset, RAW_N, &report) ==
          BT_STATUS_NUC_LEVELS_NOT_DISTINCT);
    memset(bad, 0, sizeof bad);
    CHECK(bt_bad_pixels_detect(&low, &high, &bad_rules, scratch, bad, RAW_N, &bad_report) ==
          BT_STATUS_BAD_PIXEL_RULES_INVALID);
    CHECK(bt_bad_pixels_detect(&low, &high, &rules, scratch, bad, RAW_N, &bad_report) ==
          BT_STATUS_OK);
    CHECK((bad[5] & 1) != 0 && bad_report.stuck == 1);
    for (p = 0; p < RAW_N; p++) CHECK(p == 5 || bad[p] == 0);
    CHECK(bt_bad_pixels_detect(&low, &high, &rules, (float *)(void *)bad, bad, RAW_N,
                               &bad_report) == BT_STATUS_INVALID_BUFFER);

    CHECK(bt_nuc_two_point(&low, &high, bad, RAW_N, gain, offset, RAW_N, &report) == BT_STATUS_OK);
    /* Independent check: G = (<H> - <L>) / (H - L), O = <L> - G L, means without pixel 5. */
    {
        double sl = 0.0, sh = 0.0;
        for (p = 0; p < RAW_N; p++) if (p != 5) { sl += lm[p]; sh += hm[p]; }
        sl /= RAW_N - 1; sh /= RAW_N - 1;
        CHECK(fabs(report.mean_low - sl) < 1e-9 && fabs(report.mean_high - sh) < 1e-9);
        CHECK(report.good_pixels == RAW_N - 1);
        for (p = 0; p < RAW_N; p++) {
            if (p == 5) continue;
            double g = (sh - sl) / (hm[p] - lm[p]);
            CHECK(fabs(gain[p] - g) < 1e-6 && fabs(offset[p] - (sl - g * lm[p])) < 1e-2);
        }
    }
    memcpy(gain_copy, gain, sizeof gain);
    CHECK(bt_nuc_two_point(&low, &high, bad, RAW_N, gain, gain, RAW_N, &report) ==
          BT_STATUS_INVALID_BUFFER);
    CHECK(bt_nuc_two_point(&low, &high, bad, RAW_N, gain, offset, RAW_N - 1, &report) ==
          BT_STATUS_FRAME_LENGTH_MISMATCH);
    CHECK(memcmp(gain, gain_copy, sizeof gain) == 0);
    broken = low; broken.frames = 0;
    CHECK(bt_nuc_two_point(&broken, &high, bad, RAW_N, gain, offset, RAW_N, &report) ==
          BT_STATUS_NUC_STACK_EMPTY);
    broken = low; broken.mean = NULL;
    CHECK(bt_nuc_two_point(&broken, &high, bad, RAW_N, gain, offset, RAW_N, &report) ==
          BT_STATUS_NULL_POINTER);

    /* Fused conversion: a converter whose counts map sends x = 9000 to the band radiance of
     * 293.15 K and x = 13000 to 333.15 K; every pixel of a flat field at x = 11000 must read
     * the temperature of radiance midway (stuck pixel replaced by its neighbours). */
    {
        double l1, l2v, g, o, t_ref = SENTINEL, mid;
        CHECK(bt_band_radiance(&band, 293.15, &l1) == BT_STATUS_OK);
        CHECK(bt_band_radiance(&band, 333.15, &l2v) == BT_STATUS_OK);
        g = (l2v - l1) / (report.mean_high - report.mean_low);
        o = l1 - g * report.mean_low;
        CHECK(bt_frame_converter_new_band(&band, &scene, g, o, &rails, 250.0, 500.0, 1e-3,
                                          frame_table, FRAME_ROWS, &conv) == BT_STATUS_OK);
        for (p = 0; p < RAW_N; p++) frame[p] = raw_counts(p, 11000.0, 0);
        CHECK(bt_frame_convert_counts_corrected(&conv, frame_table, FRAME_ROWS, gain, offset, bad,
                                                RAW_W, &step, frame, kelvin, RAW_N, &cs) ==
              BT_STATUS_OK);
        mid = 0.5 * (l1 + l2v); /* x = 11000 is midway between the two levels */
        CHECK(bt_band_temperature(&band, mid, &t_ref) == BT_STATUS_OK);
        CHECK(cs.bad_replaced == 1 && cs.frame.converted == RAW_N);
        for (p = 0; p < RAW_N; p++) CHECK(fabs(kelvin[p] - t_ref) < 0.02);
        /* Hostile: nothing written. */
        for (p = 0; p < RAW_N; p++) kelvin[p] = -1.0f;
        CHECK(bt_frame_convert_counts_corrected(&conv, frame_table, FRAME_ROWS, gain, offset, bad,
                                                0, &step, frame, kelvin, RAW_N, &cs) ==
              BT_STATUS_NUC_GEOMETRY_INVALID);
        CHECK(bt_frame_convert_counts_corrected(&conv, frame_table, FRAME_ROWS, gain, offset, bad,
                                                5, &step, frame, kelvin, RAW_N, &cs) ==
              BT_STATUS_NUC_GEOMETRY_INVALID);
        CHECK(bt_frame_convert_counts_corrected(&conv, frame_table, FRAME_ROWS, gain, offset, bad,
                                                RAW_W, &bad_step, frame, kelvin, RAW_N, &cs) ==
              BT_STATUS_NUC_MAP_INVALID);
        CHECK(bt_frame_convert_counts_corrected(&conv, frame_table, FRAME_ROWS, gain, offset, NULL,
                                                RAW_W, &step, frame, kelvin, RAW_N, &cs) ==
              BT_STATUS_NULL_POINTER);
        CHECK(bt_frame_convert_counts_corrected(&conv, frame_table, FRAME_ROWS, gain, offset, bad,
                                                RAW_W, &step, frame, gain, RAW_N, &cs) ==
              BT_STATUS_INVALID_BUFFER);
        gain_copy[2] = NAN;
        CHECK(bt_frame_convert_counts_corrected(&conv, frame_table, FRAME_ROWS, gain_copy, offset,
                                                bad, RAW_W, &step, frame, kelvin, RAW_N, &cs) ==
              BT_STATUS_NUC_MAP_INVALID);
        CHECK(bt_frame_convert_counts_corrected(&conv, frame_table, FRAME_ROWS, gain, offset, bad,
                                                RAW_W, &step, frame, kelvin, SIZE_MAX, &cs) ==
              BT_STATUS_INVALID_BUFFER);
        for (p = 0; p < RAW_N; p++) CHECK(kelvin[p] == -1.0f);
        /* All bad: every pixel NaN and counted. */
        {
            uint8_t all[RAW_N];
            memset(all, 1, sizeof all);
            CHECK(bt_frame_convert_counts_corrected(&conv, frame_table, FRAME_ROWS, gain, offset,
                                                    all, RAW_W, NULL, frame, kelvin, RAW_N,
                                                    &cs) == BT_STATUS_OK);
            CHECK(cs.bad_unreplaced == RAW_N && cs.frame.dead == RAW_N);
            for (p = 0; p < RAW_N; p++) CHECK(isnan(kelvin[p]));
        }

        /* Shutter: target for a 300 K shutter, refresh offsets from a shutter stack. */
        CHECK(bt_nuc_shutter_target_band(&band, g, o, 300.0, &target) == BT_STATUS_OK);
        {
            double bl = SENTINEL;
            CHECK(bt_band_radiance(&band, 300.0, &bl) == BT_STATUS_OK);
            CHECK(fabs(g * target + o - bl) < 1e-9 * bl);
        }
        CHECK(bt_nuc_shutter_target_band(&band, 0.0, o, 300.0, &out) ==
              BT_STATUS_FRAME_COUNTS_MAP_INVALID && untouched(out));
        CHECK(bt_nuc_shutter_refresh(&low, gain, bad, RAW_N, target, &step, offset, RAW_N) ==
              BT_STATUS_OK);
        for (p = 0; p < RAW_N; p++) {
            if (p == 5) continue;
            CHECK(fabs(gain[p] * lm[p] + offset[p] - target) < 2e-2);
        }
        memcpy(gain_copy, offset, sizeof offset);
        CHECK(bt_nuc_shutter_refresh(&low, gain, bad, RAW_N, NAN, &step, offset, RAW_N) ==
              BT_STATUS_NON_FINITE);
        CHECK(bt_nuc_shutter_refresh(&low, gain, bad, RAW_N, target, &bad_step, offset, RAW_N) ==
              BT_STATUS_NUC_MAP_INVALID);
        CHECK(bt_nuc_shutter_refresh(&low, gain, bad, RAW_N, target, &step, gain, RAW_N) ==
              BT_STATUS_INVALID_BUFFER);
        CHECK(bt_nuc_shutter_refresh(&low, gain, bad, RAW_N, target, NULL, offset, RAW_N) ==
              BT_STATUS_NULL_POINTER);
        CHECK(memcmp(gain_copy, offset, sizeof offset) == 0);
    }

    /* Spatial statistics: raw stack vs corrected (the maps remove the pattern). */
    CHECK(bt_frame_spatial_stats(&low, bad, NULL, NULL, RAW_N, &stats) == BT_STATUS_OK);
    CHECK(stats.pixels == RAW_N - 1 && stats.spatial_variance > 1000.0);
    CHECK(fabs(stats.temporal_variance - 2.0 / 3.0) < 1e-9);
    CHECK(bt_frame_spatial_stats(&low, bad, gain, NULL, RAW_N, &stats) == BT_STATUS_NULL_POINTER);
    broken = low; broken.frames = 1;
    CHECK(bt_frame_spatial_stats(&broken, bad, NULL, NULL, RAW_N, &stats) ==
          BT_STATUS_NUC_STACK_EMPTY);

    /* Drift: points from known linear R(T), O(T); the fit returns them. */
    for (k = 0; k < 3; k++) {
        double t = 298.0 + 5.0 * (double)k, lo = SENTINEL, hi = SENTINEL, li = SENTINEL;
        double r = 120.0 * (1.0 - 0.004 * (t - 303.0)), of = 9000.0 + 90.0 * (t - 303.0);
        CHECK(bt_band_radiance(&band, 293.15, &lo) == BT_STATUS_OK);
        CHECK(bt_band_radiance(&band, 333.15, &hi) == BT_STATUS_OK);
        CHECK(bt_band_radiance(&band, t - 1.5, &li) == BT_STATUS_OK);
        points[k].fpa_k = t; points[k].internal_k = t - 1.5;
        points[k].low_k = 293.15; points[k].high_k = 333.15;
        points[k].low_counts = r * (lo - li) + of;
        points[k].high_counts = r * (hi - li) + of;
    }
    CHECK(bt_drift_fit_band(&band, points, 3, 1, &model) == BT_STATUS_OK);
    CHECK(fabs(model.reference_k - 303.0) < 1e-12);
    CHECK(fabs(model.responsivity[0] - 120.0) < 1e-9 && fabs(model.responsivity[1] + 0.48) < 1e-9);
    CHECK(fabs(model.offset[0] - 9000.0) < 1e-6 && fabs(model.offset[1] - 90.0) < 1e-7);
    CHECK(bt_drift_fit_band(&band, points, 1, 1, &model) == BT_STATUS_DRIFT_TOO_FEW_POINTS);
    CHECK(bt_drift_fit_band(&band, points, 3, 3, &model) == BT_STATUS_DRIFT_TOO_FEW_POINTS);
    CHECK(bt_drift_fit_band(&band, NULL, 3, 1, &model) == BT_STATUS_NULL_POINTER);
    points[1].fpa_k = NAN;
    CHECK(bt_drift_fit_band(&band, points, 3, 1, &model) == BT_STATUS_DRIFT_POINT_INVALID);
    CHECK(bt_drift_step_band(&model, &band, 0.01, 0.0, 303.0, 301.5, &got_step) == BT_STATUS_OK);
    CHECK(got_step.a > 0.0f && isfinite(got_step.b));
    CHECK(bt_drift_step_band(&model, &band, 0.01, 0.0, NAN, 301.5, &got_step) ==
          BT_STATUS_NON_FINITE);
    model.degree = 9;
    CHECK(bt_drift_step_band(&model, &band, 0.01, 0.0, 303.0, 301.5, &got_step) ==
          BT_STATUS_DRIFT_TOO_FEW_POINTS);

    /* Self-emission and merit. */
    out = SENTINEL;
    CHECK(bt_net_signal_band(&band, 0.3, 305.0, 305.0, 305.0, &out) == BT_STATUS_OK);
    CHECK(fabs(out) < 1e-12);
    out = SENTINEL;
    CHECK(bt_net_signal_band(&band, 1.5, 305.0, 305.0, 305.0, &out) ==
          BT_STATUS_EMISSIVITY_OUT_OF_RANGE && untouched(out));
    CHECK(bt_net_signal_band(&band, 0.9, 350.0, 290.0, 300.0, &out) == BT_STATUS_OK);
    target = SENTINEL;
    CHECK(bt_object_from_net_signal_band(&band, out, 0.9, 290.0, 300.0, &target) == BT_STATUS_OK);
    CHECK(fabs(target - 350.0) < 1e-6);
    out = SENTINEL;
    /* mpmath, tools/refgen/nuc_refs.py: 4.57546967838344 */
    CHECK(bt_effective_exponent_band(&band, 300.0, &out) == BT_STATUS_OK);
    CHECK(fabs(out - 4.57546967838344) < 1e-9);
    out = SENTINEL;
    CHECK(bt_netd_k(4.0, 50.0, &out) == BT_STATUS_OK && fabs(out - 0.04) < 1e-15);
    out = SENTINEL;
    for (k = 0; k < N_ARGS; k++) {
        EXPECT_SANE(bt_netd_k(ARGS[k], 50.0, &out));
        EXPECT_SANE(bt_netd_k(1.0, ARGS[k], &out));
        EXPECT_SANE(bt_effective_exponent_band(&band, ARGS[k], &out));
        EXPECT_SANE(bt_net_signal_band(&band, ARGS[k], 300.0, 300.0, 300.0, &out));
        EXPECT_SANE(bt_object_from_net_signal_band(&band, ARGS[k], 0.9, 290.0, 300.0, &out));
        EXPECT_SANE(bt_nuc_shutter_target_band(&band, 0.01, 0.0, ARGS[k], &out));
    }
    CHECK(bt_netd_k(1.0, 1.0, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_netd_k(1.0, 1.0, (double *)misaligned(&out)) == BT_STATUS_INVALID_BUFFER);
    /* Sakuma-Hattori curves (signal in counts above dark): the shutter target against the
     * closed form S = C / (exp(c2 / (A T + B)) - 1) written out here, and a drift fit that
     * returns known polynomials. */
    {
        const bt_sakuma_hattori sh = {10.0, 20.0, 4.0e6};
        const double c2 = 14387.768775039337; /* um K, CODATA 2018 h c / k */
        double want, got = SENTINEL, sl, shh, si;
        bt_drift_model shm;
        bt_drift_step shs;
        want = (sh.c / (exp(c2 / (sh.a_um * 300.0 + sh.b_umk)) - 1.0) - (-100.0)) / 1.5;
        CHECK(bt_nuc_shutter_target_sakuma_hattori(&sh, 1.5, -100.0, 300.0, &got) == BT_STATUS_OK);
        CHECK(fabs(got - want) < 1e-12 * fabs(want));
        got = SENTINEL;
        CHECK(bt_nuc_shutter_target_sakuma_hattori(NULL, 1.5, -100.0, 300.0, &got) ==
                  BT_STATUS_NULL_POINTER && untouched(got));
        for (k = 0; k < 3; k++) {
            double t = 298.0 + 5.0 * (double)k;
            double r = 2.0 * (1.0 - 0.004 * (t - 303.0)), of = 9000.0 + 90.0 * (t - 303.0);
            CHECK(bt_sakuma_hattori_signal(&sh, 293.15, &sl) == BT_STATUS_OK);
            CHECK(bt_sakuma_hattori_signal(&sh, 333.15, &shh) == BT_STATUS_OK);
            CHECK(bt_sakuma_hattori_signal(&sh, t - 1.5, &si) == BT_STATUS_OK);
            points[k].fpa_k = t; points[k].internal_k = t - 1.5;
            points[k].low_k = 293.15; points[k].high_k = 333.15;
            points[k].low_counts = r * (sl - si) + of;
            points[k].high_counts = r * (shh - si) + of;
        }
        CHECK(bt_drift_fit_sakuma_hattori(&sh, points, 3, 1, &shm) == BT_STATUS_OK);
        CHECK(fabs(shm.responsivity[0] - 2.0) < 1e-9 && fabs(shm.offset[1] - 90.0) < 1e-6);
        CHECK(bt_drift_fit_sakuma_hattori(NULL, points, 3, 1, &shm) == BT_STATUS_NULL_POINTER);
        CHECK(bt_drift_step_sakuma_hattori(&shm, &sh, 1.0, 0.0, 303.0, 301.5, &shs) ==
              BT_STATUS_OK);
        /* a = 1 / (g R) with g = 1 and R(303 K) = 2. */
        CHECK(fabs(shs.a - 0.5f) < 1e-6f);
        CHECK(bt_drift_step_sakuma_hattori(&shm, NULL, 1.0, 0.0, 303.0, 301.5, &shs) ==
              BT_STATUS_NULL_POINTER);
    }
}

/* Multi-point NUC: three flat-field stacks of the same invented pixels (x = 9000, 11000,
 * 13000), maps, the per-pixel order rule (the stuck pixel 5 is flagged 16), two levels
 * against two-point bit for bit, the fused conversion, and hostile input. */
static void test_multi_point(void) {
    bt_band band = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    static const double xs[3] = {9000.0, 11000.0, 13000.0};
    double means[3][RAW_N], m2s[3][RAW_N];
    uint32_t frames[3] = {0, 0, 0};
    uint16_t frame[RAW_N];
    float maps[5 * RAW_N], maps_copy[5 * RAW_N], two[2 * RAW_N], gain[RAW_N], offset[RAW_N];
    float kelvin[RAW_N];
    uint8_t bad[RAW_N], bad_copy[RAW_N];
    bt_stack_view views[3], reversed[3], broken[3];
    bt_multi_point_report report, report_sentinel;
    bt_two_point_report two_report;
    bt_drift_step step = {1.0f, 0.0f}, bad_step = {-1.0f, 0.0f};
    bt_corrected_summary cs, cs_sentinel;
    bt_scene scene = {1.0, 293.15, 1.0, 293.15, 1.0, 0.0, 293.15, 293.15};
    bt_rails rails = {0, 65535};
    bt_frame_converter conv;
    size_t p, k, len = 0;
    int f;
    const int noise[4] = {-1, 1, 0, 0};

    for (k = 0; k < 3; k++) {
        for (f = 0; f < 4; f++) {
            for (p = 0; p < RAW_N; p++) frame[p] = raw_counts(p, xs[k], noise[(f + k) % 4]);
            CHECK(bt_frame_stack_add_counts(means[k], m2s[k], RAW_N, &frames[k], frame, RAW_N) ==
                  BT_STATUS_OK);
        }
        views[k].mean = means[k]; views[k].m2 = m2s[k]; views[k].len = RAW_N;
        views[k].frames = frames[k];
    }

    /* Storage size. */
    CHECK(bt_nuc_multi_point_map_len(3, RAW_N, &len) == BT_STATUS_OK && len == 5 * RAW_N);
    len = 77;
    CHECK(bt_nuc_multi_point_map_len(1, RAW_N, &len) == BT_STATUS_NUC_LEVEL_COUNT && len == 77);
    CHECK(bt_nuc_multi_point_map_len(BT_NUC_MAX_LEVELS + 1, RAW_N, &len) ==
          BT_STATUS_NUC_LEVEL_COUNT);
    CHECK(bt_nuc_multi_point_map_len(3, 0, &len) == BT_STATUS_NUC_FRAME_EMPTY);
    CHECK(bt_nuc_multi_point_map_len(16, SIZE_MAX, &len) == BT_STATUS_NUC_MAP_STORAGE_MISMATCH);
    CHECK(bt_nuc_multi_point_map_len(3, RAW_N, NULL) == BT_STATUS_NULL_POINTER);
    CHECK(bt_nuc_multi_point_map_len(3, RAW_N, (size_t *)misaligned(&len)) ==
          BT_STATUS_INVALID_BUFFER);
    CHECK(len == 77);

    /* Hostile map builds: nothing written. */
    memset(bad, 0, sizeof bad);
    for (p = 0; p < 5 * RAW_N; p++) maps[p] = -7.0f;
    memcpy(maps_copy, maps, sizeof maps);
    memset(&report_sentinel, 0x5a, sizeof report_sentinel);
    report = report_sentinel;
    CHECK(bt_nuc_multi_point(views, 1, bad, RAW_N, maps, 5 * RAW_N, &report) ==
          BT_STATUS_NUC_LEVEL_COUNT);
    CHECK(bt_nuc_multi_point(views, BT_NUC_MAX_LEVELS + 1, bad, RAW_N, maps, 5 * RAW_N,
                             &report) == BT_STATUS_NUC_LEVEL_COUNT);
    CHECK(bt_nuc_multi_point(NULL, 3, bad, RAW_N, maps, 5 * RAW_N, &report) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_nuc_multi_point(views, 3, NULL, RAW_N, maps, 5 * RAW_N, &report) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_nuc_multi_point(views, 3, bad, RAW_N, NULL, 5 * RAW_N, &report) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_nuc_multi_point(views, 3, bad, RAW_N, maps, 5 * RAW_N, NULL) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_nuc_multi_point(views, 3, bad, RAW_N, maps, 5 * RAW_N - 1, &report) ==
          BT_STATUS_NUC_MAP_STORAGE_MISMATCH);
    CHECK(bt_nuc_multi_point(views, 3, bad, RAW_N - 1, maps, 5 * RAW_N, &report) ==
          BT_STATUS_FRAME_LENGTH_MISMATCH);
    CHECK(bt_nuc_multi_point(views, 3, bad, RAW_N, maps, SIZE_MAX, &report) ==
          BT_STATUS_INVALID_BUFFER);
    CHECK(bt_nuc_multi_point(views, 3, bad, RAW_N, (float *)misaligned(maps), 5 * RAW_N - 1,
                             &report) == BT_STATUS_INVALID_BUFFER);
    CHECK(bt_nuc_multi_point(views, 3, (uint8_t *)(void *)maps, RAW_N, maps, 5 * RAW_N,
                             &report) == BT_STATUS_INVALID_BUFFER);
    CHECK(bt_nuc_multi_point(views, 3, bad, RAW_N, (float *)(void *)means[1], 5 * RAW_N,
                             &report) == BT_STATUS_INVALID_BUFFER);
    reversed[0] = views[2]; reversed[1] = views[1]; reversed[2] = views[0];
    CHECK(bt_nuc_multi_point(reversed, 3, bad, RAW_N, maps, 5 * RAW_N, &report) ==
          BT_STATUS_NUC_LEVELS_NOT_INCREASING);
    broken[0] = views[0]; broken[1] = views[1]; broken[2] = views[1];
    CHECK(bt_nuc_multi_point(broken, 3, bad, RAW_N, maps, 5 * RAW_N, &report) ==
          BT_STATUS_NUC_LEVELS_NOT_INCREASING);
    broken[2] = views[2]; broken[1].frames = 0;
    CHECK(bt_nuc_multi_point(broken, 3, bad, RAW_N, maps, 5 * RAW_N, &report) ==
          BT_STATUS_NUC_STACK_EMPTY);
    broken[1] = views[1]; broken[1].m2 = NULL;
    CHECK(bt_nuc_multi_point(broken, 3, bad, RAW_N, maps, 5 * RAW_N, &report) ==
          BT_STATUS_NULL_POINTER);
    {
        uint8_t all[RAW_N];
        memset(all, 128, sizeof all);
        CHECK(bt_nuc_multi_point(views, 3, all, RAW_N, maps, 5 * RAW_N, &report) ==
              BT_STATUS_NUC_NO_GOOD_PIXELS);
    }
    CHECK(memcmp(maps, maps_copy, sizeof maps) == 0);
    for (p = 0; p < RAW_N; p++) CHECK(bad[p] == 0);
    CHECK(memcmp(&report, &report_sentinel, sizeof report) == 0);

    /* The build: pixel 5 (stuck) is flagged 16 and counted; means, gains and breakpoints
     * against the formulas written out here. */
    CHECK(bt_nuc_multi_point(views, 3, bad, RAW_N, maps, 5 * RAW_N, &report) == BT_STATUS_OK);
    CHECK(report.levels == 3 && report.order_flagged == 1 && report.good_pixels == RAW_N - 1);
    CHECK(bad[5] == 16);
    for (p = 0; p < RAW_N; p++) CHECK(p == 5 || bad[p] == 0);
    for (p = 0; p < 5 * RAW_N; p++) CHECK(isfinite(maps[p]));
    {
        double m[3] = {0.0, 0.0, 0.0};
        for (k = 0; k < 3; k++) {
            for (p = 0; p < RAW_N; p++) if (p != 5) m[k] += means[k][p];
            m[k] /= RAW_N - 1;
            CHECK(fabs(report.level_means[k] - m[k]) < 1e-9 * m[k]);
        }
        CHECK(report.level_means[3] == 0.0);
        for (p = 0; p < RAW_N; p++) {
            if (p == 5) continue;
            for (k = 0; k < 2; k++) {
                double g = (m[k + 1] - m[k]) / (means[k + 1][p] - means[k][p]);
                CHECK(fabs(maps[k * RAW_N + p] - g) < 1e-6);
                CHECK(fabs(maps[(2 + k) * RAW_N + p] - (m[k] - g * means[k][p])) < 1e-2);
            }
            CHECK(maps[4 * RAW_N + p] == (float)means[1][p]);
        }
    }

    /* Two levels: bt_nuc_two_point's maps, bit for bit (pixel 5 now flagged). */
    CHECK(bt_nuc_two_point(&views[0], &views[2], bad, RAW_N, gain, offset, RAW_N, &two_report) ==
          BT_STATUS_OK);
    broken[0] = views[0]; broken[1] = views[2];
    CHECK(bt_nuc_multi_point(broken, 2, bad, RAW_N, two, 2 * RAW_N, &report) == BT_STATUS_OK);
    CHECK(memcmp(two, gain, sizeof gain) == 0 && memcmp(two + RAW_N, offset, sizeof offset) == 0);
    CHECK(report.level_means[0] == two_report.mean_low &&
          report.level_means[1] == two_report.mean_high);

    /* Fused conversion: a converter sending the lowest level's array mean to the band
     * radiance of 293.15 K and the highest's to 333.15 K (the array's response is linear
     * in x, as every pixel's is); flat fields at x = 10000 and 12000 read the temperature
     * of the radiance a quarter and three quarters of the way (0.02 K for the rounding of
     * the raw counts), the flagged pixel replaced. */
    {
        double l1, l2v, g, o, t_ref = SENTINEL;
        static const double fractions[2] = {0.25, 0.75};
        CHECK(bt_band_radiance(&band, 293.15, &l1) == BT_STATUS_OK);
        CHECK(bt_band_radiance(&band, 333.15, &l2v) == BT_STATUS_OK);
        CHECK(bt_nuc_multi_point(views, 3, bad, RAW_N, maps, 5 * RAW_N, &report) ==
              BT_STATUS_OK);
        CHECK(report.order_flagged == 0); /* pixel 5 already flagged */
        g = (l2v - l1) / (report.level_means[2] - report.level_means[0]);
        o = l1 - g * report.level_means[0];
        CHECK(bt_frame_converter_new_band(&band, &scene, g, o, &rails, 250.0, 500.0, 1e-3,
                                          frame_table, FRAME_ROWS, &conv) == BT_STATUS_OK);
        for (k = 0; k < 2; k++) {
            for (p = 0; p < RAW_N; p++) frame[p] = raw_counts(p, 9000.0 + 4000.0 * fractions[k], 0);
            CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps,
                                                      5 * RAW_N, 3, bad, RAW_W, &step, frame,
                                                      kelvin, RAW_N, &cs) == BT_STATUS_OK);
            CHECK(bt_band_temperature(&band, l1 + fractions[k] * (l2v - l1), &t_ref) ==
                  BT_STATUS_OK);
            CHECK(cs.bad_replaced == 1 && cs.frame.converted == RAW_N);
            for (p = 0; p < RAW_N; p++) CHECK(fabs(kelvin[p] - t_ref) < 0.02);
        }
        /* Hostile: nothing written. */
        for (p = 0; p < RAW_N; p++) kelvin[p] = -1.0f;
        memset(&cs_sentinel, 0x5a, sizeof cs_sentinel);
        cs = cs_sentinel;
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps, 5 * RAW_N,
                                                  3, bad, 0, &step, frame, kelvin, RAW_N, &cs) ==
              BT_STATUS_NUC_GEOMETRY_INVALID);
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps, 5 * RAW_N,
                                                  3, bad, 5, &step, frame, kelvin, RAW_N, &cs) ==
              BT_STATUS_NUC_GEOMETRY_INVALID);
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps, 5 * RAW_N,
                                                  4, bad, RAW_W, &step, frame, kelvin, RAW_N,
                                                  &cs) == BT_STATUS_NUC_MAP_STORAGE_MISMATCH);
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps, 5 * RAW_N,
                                                  1, bad, RAW_W, &step, frame, kelvin, RAW_N,
                                                  &cs) == BT_STATUS_NUC_LEVEL_COUNT);
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps, 5 * RAW_N,
                                                  (size_t)-1, bad, RAW_W, &step, frame, kelvin,
                                                  RAW_N, &cs) == BT_STATUS_NUC_LEVEL_COUNT);
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, NULL, 5 * RAW_N,
                                                  3, bad, RAW_W, &step, frame, kelvin, RAW_N,
                                                  &cs) == BT_STATUS_NULL_POINTER);
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps, 5 * RAW_N,
                                                  3, bad, RAW_W, &bad_step, frame, kelvin, RAW_N,
                                                  &cs) == BT_STATUS_NUC_MAP_INVALID);
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps, 5 * RAW_N,
                                                  3, bad, RAW_W, &step, frame, maps, RAW_N,
                                                  &cs) == BT_STATUS_INVALID_BUFFER);
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps, 5 * RAW_N,
                                                  3, bad, RAW_W, &step, frame, kelvin, SIZE_MAX,
                                                  &cs) == BT_STATUS_INVALID_BUFFER);
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS,
                                                  (const float *)misaligned(maps), 5 * RAW_N - 1,
                                                  3, bad, RAW_W, &step, frame, kelvin, RAW_N,
                                                  &cs) == BT_STATUS_INVALID_BUFFER);
        memcpy(maps_copy, maps, sizeof maps);
        maps_copy[4 * RAW_N + 2] = NAN; /* a good pixel's breakpoint */
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps_copy,
                                                  5 * RAW_N, 3, bad, RAW_W, &step, frame, kelvin,
                                                  RAW_N, &cs) == BT_STATUS_NUC_MAP_INVALID);
        maps_copy[4 * RAW_N + 2] = maps[4 * RAW_N + 2];
        maps_copy[RAW_N + 3] = 0.0f; /* a good pixel's gain, segment 1 */
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps_copy,
                                                  5 * RAW_N, 3, bad, RAW_W, &step, frame, kelvin,
                                                  RAW_N, &cs) == BT_STATUS_NUC_MAP_INVALID);
        maps_copy[RAW_N + 3] = maps[RAW_N + 3];
        maps_copy[4 * RAW_N + 5] = NAN; /* the flagged pixel's breakpoint: never read */
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps_copy,
                                                  5 * RAW_N, 3, bad, RAW_W, NULL, frame, kelvin,
                                                  RAW_N, NULL) == BT_STATUS_NULL_POINTER);
        for (p = 0; p < RAW_N; p++) CHECK(kelvin[p] == -1.0f);
        CHECK(memcmp(&cs, &cs_sentinel, sizeof cs) == 0);
        CHECK(bt_frame_convert_counts_multi_point(&conv, frame_table, FRAME_ROWS, maps_copy,
                                                  5 * RAW_N, 3, bad, RAW_W, NULL, frame, kelvin,
                                                  RAW_N, &cs) == BT_STATUS_OK);
        CHECK(cs.frame.converted == RAW_N);
    }
    (void)bad_copy;
}

/* The fused emissivity-map path against correcting first and converting with the plain
 * emissivity-map conversion: with maps that leave every count whole (identity gains,
 * offsets of whole counts), and a bad pixel in a flat patch (its neighbours' mean is the
 * patch's count), the results agree bit for bit, invalid emissivities included. */
static bt_frame_row sh_table[1024];

static void test_fused_emissivity(void) {
    bt_band band = rectangular(8.0, 14.0, BT_DETECTOR_ENERGY);
    bt_scene scene = {0.9, 300.0, 1.0, 293.15, 1.0, 0.0, 293.15, 293.15};
    bt_rails rails = {0, 65535};
    bt_frame_converter conv, sh_conv;
    bt_frame_summary plain;
    bt_corrected_summary cs, cs_sentinel;
    bt_drift_step step = {1.0f, 0.0f};
    uint16_t raw[RAW_N], corrected[RAW_N];
    float gain[RAW_N], offset[RAW_N], maps[5 * RAW_N], em[RAW_N], fused[RAW_N], expected[RAW_N];
    uint8_t bad[RAW_N];
    size_t p;
    const bt_sakuma_hattori sh = {10.0, -3000.0, 1e7};
    bt_scene cold = {1.0, 250.0, 1.0, 293.15, 1.0, 0.0, 293.15, 293.15};

    CHECK(bt_frame_converter_new_band(&band, &scene, 0.002, -2.0, &rails, 250.0, 600.0, 1e-3,
                                      frame_table, FRAME_ROWS, &conv) == BT_STATUS_OK);
    /* Pixel p: offset (p % 3) * 100 counts, gain 1; corrected counts 20000 + 900 p, except
     * a flat patch of 22000 around the bad pixel 5 (row 1, column 1 of a 4-wide frame). */
    memset(bad, 0, sizeof bad);
    bad[5] = 1;
    for (p = 0; p < RAW_N; p++) {
        size_t r = p / RAW_W, c = p % RAW_W;
        int near5 = r <= 2 && c <= 2;
        corrected[p] = (uint16_t)(near5 ? 22000 : 20000 + 900 * p);
        gain[p] = 1.0f;
        offset[p] = (float)((p % 3) * 100);
        raw[p] = (uint16_t)(corrected[p] - (p % 3) * 100);
        em[p] = 0.2f + 0.07f * (float)p;
    }
    raw[5] = 1234; /* whatever a bad pixel reads */
    em[2] = 0.0f;
    em[7] = NAN;
    em[9] = 1.5f;
    CHECK(bt_frame_convert_counts(&conv, frame_table, FRAME_ROWS, corrected, RAW_N, em, RAW_N,
                                  expected, RAW_N, &plain) == BT_STATUS_OK);
    CHECK(bt_frame_convert_counts_corrected_emissivity(&conv, frame_table, FRAME_ROWS, gain,
                                                       offset, bad, RAW_W, &step, raw, em,
                                                       fused, RAW_N, &cs) == BT_STATUS_OK);
    CHECK(memcmp(fused, expected, sizeof fused) == 0);
    CHECK(memcmp(&cs.frame, &plain, sizeof plain) == 0);
    CHECK(cs.bad_replaced == 1 && plain.emissivity_invalid == 3 && plain.converted > 6);
    /* The same maps as three-level multi-point maps (every segment the same). */
    for (p = 0; p < RAW_N; p++) {
        maps[p] = maps[RAW_N + p] = 1.0f;
        maps[2 * RAW_N + p] = maps[3 * RAW_N + p] = offset[p];
        maps[4 * RAW_N + p] = 21000.0f;
    }
    CHECK(bt_frame_convert_counts_multi_point_emissivity(&conv, frame_table, FRAME_ROWS, maps,
                                                         5 * RAW_N, 3, bad, RAW_W, NULL, raw, em,
                                                         fused, RAW_N, &cs) == BT_STATUS_OK);
    CHECK(memcmp(fused, expected, sizeof fused) == 0);
    CHECK(memcmp(&cs.frame, &plain, sizeof plain) == 0);

    /* Hostile: nothing written. */
    for (p = 0; p < RAW_N; p++) fused[p] = -1.0f;
    memset(&cs_sentinel, 0x5a, sizeof cs_sentinel);
    cs = cs_sentinel;
    CHECK(bt_frame_convert_counts_corrected_emissivity(&conv, frame_table, FRAME_ROWS, gain,
                                                       offset, bad, RAW_W, &step, raw, NULL,
                                                       fused, RAW_N, &cs) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_convert_counts_corrected_emissivity(&conv, frame_table, FRAME_ROWS, gain,
                                                       offset, bad, RAW_W, &step, raw, fused,
                                                       fused, RAW_N, &cs) ==
          BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_convert_counts_corrected_emissivity(&conv, frame_table, FRAME_ROWS, gain,
                                                       offset, bad, RAW_W, &step, raw,
                                                       (const float *)misaligned(em), fused,
                                                       RAW_N - 1, &cs) ==
          BT_STATUS_INVALID_BUFFER);
    CHECK(bt_frame_convert_counts_corrected_emissivity(&conv, frame_table, FRAME_ROWS, gain,
                                                       offset, bad, 5, &step, raw, em, fused,
                                                       RAW_N, &cs) ==
          BT_STATUS_NUC_GEOMETRY_INVALID);
    CHECK(bt_frame_convert_counts_multi_point_emissivity(&conv, frame_table, FRAME_ROWS, maps,
                                                         5 * RAW_N, 3, bad, RAW_W, NULL, raw,
                                                         NULL, fused, RAW_N, &cs) ==
          BT_STATUS_NULL_POINTER);
    CHECK(bt_frame_convert_counts_multi_point_emissivity(&conv, frame_table, FRAME_ROWS, maps,
                                                         5 * RAW_N, 2, bad, RAW_W, NULL, raw, em,
                                                         fused, RAW_N, &cs) ==
          BT_STATUS_NUC_MAP_STORAGE_MISMATCH);
    CHECK(bt_frame_convert_counts_multi_point_emissivity(&conv, frame_table, FRAME_ROWS, maps,
                                                         5 * RAW_N, 3, bad, RAW_W, NULL, raw, em,
                                                         fused, RAW_N, NULL) ==
          BT_STATUS_NULL_POINTER);
    /* A curve without a signal at the reflected temperature (an invented Sakuma-Hattori
     * curve undefined below 300 K, surroundings at 250 K): no emissivity map. */
    CHECK(bt_frame_converter_new_sakuma_hattori(&sh, &cold, 100.0, &rails, 400.0, 1200.0, 0.01,
                                                sh_table, 1024, &sh_conv) == BT_STATUS_OK);
    CHECK(bt_frame_convert_counts_corrected_emissivity(&sh_conv, sh_table, 1024, gain, offset,
                                                       bad, RAW_W, &step, raw, em, fused, RAW_N,
                                                       &cs) ==
          BT_STATUS_FRAME_EMISSIVITY_MAP_UNAVAILABLE);
    CHECK(bt_frame_convert_counts_corrected(&sh_conv, sh_table, 1024, gain, offset, bad, RAW_W,
                                            &step, raw, fused, RAW_N, NULL) ==
          BT_STATUS_NULL_POINTER);
    for (p = 0; p < RAW_N; p++) CHECK(fused[p] == -1.0f);
    CHECK(memcmp(&cs, &cs_sentinel, sizeof cs) == 0);
}

int main(void) {
    test_version_and_status();
    test_planck();
    test_band_values();
    test_band_hostile();
    test_scene();
    test_sakuma_hattori();
    test_fits();
    test_extreme_edges();
    test_frame_rows();
    test_frame_band();
    test_frame_foreign_rows();
    test_frame_bound();
    test_frame_status_order();
    test_frame_sakuma_hattori();
    test_ratio();
    test_atmosphere();
    test_uncertainty();
    test_site();
    test_spectral();
    test_wien_ratio();
    test_curves();
    test_monte_carlo();
    test_verify();
    test_optics();
    test_raw_frames();
    test_multi_point();
    test_fused_emissivity();
    printf("%lu passed, %lu failed\n", passed, failed);
    return failed == 0 ? 0 : 1;
}
