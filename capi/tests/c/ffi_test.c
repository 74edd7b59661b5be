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
    /* About 1 KiB of rows for this band, range and tolerance (src/frame.rs measures 61). */
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
    /* Every hostile value in every scalar slot: a row count or a named status. */
    for (i = 0; i < N_ARGS; i++) {
        size_t slot;
        for (slot = 0; slot < 3; slot++) {
            double a[3] = {250.0, 1500.0, 1e-2};
            bt_status status;
            if (slot == 1 && ARGS[i] > 1500.0) {
                continue; /* valid but slow to refuse (seconds per call in a debug build) */
            }
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
            if (slot == 3 && ARGS[i] > 1500.0) {
                continue; /* valid but slow to refuse (seconds per call in a debug build) */
            }
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
    test_frame_sakuma_hattori();
    test_ratio();
    test_atmosphere();
    test_uncertainty();
    test_raw_frames();
    printf("%lu passed, %lu failed\n", passed, failed);
    return failed == 0 ? 0 : 1;
}
