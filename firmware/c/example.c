/* A bare-metal C firmware using libbandtemp with static storage only (invented instrument
 * and data, our own fictional scenario).
 *
 * An 8-14 um microbolometer core (energy detector) and a 3-5 um photon detector look at
 * invented kiln-shell panels. The program prints every result as an exact bit pattern
 * (fw_io.h); the same source built for the host must print exactly the same lines, which
 * is how scripts/firmware.sh checks the emulated Cortex-M4F and Cortex-M7 against x86-64.
 *
 * FW_LEVEL selects how much of the library the image uses, for the flash budget:
 *   1  bt_version, band radiance and its inversion
 *   2  + the measurement equation (sensor radiance and the scene inverse)
 *   3  + a Sakuma-Hattori conversion, whole-frame conversion and the raw-frame stage
 *        (non-uniformity maps, bad-pixel replacement, fused conversion; the full example) */
#include <stddef.h>
#include <stdint.h>

#include "bandtemp.h"
#include "fw_io.h"

#ifndef FW_LEVEL
#define FW_LEVEL 3
#endif

static int failures;

/* Prints a status line and counts a failure unless it is the expected status. */
static void expect(const char *what, bt_status status, bt_status expected) {
    if (status != expected) {
        fw_line_str("unexpected status in", what);
        fw_line_u64("  status", (uint64_t)status);
        fw_line_str("  message", bt_status_message((int)status));
        failures++;
    }
}

static const bt_band band_lwir = {8.0, 14.0, BT_DETECTOR_ENERGY, NULL, NULL, 0};
static const bt_band band_mwir = {3.0, 5.0, BT_DETECTOR_PHOTON, NULL, NULL, 0};
static const double temperatures_k[] = {250.0, 300.0, 373.15, 800.0, 1200.0};

static void band_radiance_and_inversion(const char *name, const bt_band *band) {
    size_t i;
    fw_line_str("band", name);
    for (i = 0; i < sizeof temperatures_k / sizeof temperatures_k[0]; i++) {
        double radiance = 0.0, back_k = 0.0;
        expect("bt_band_radiance", bt_band_radiance(band, temperatures_k[i], &radiance),
               BT_STATUS_OK);
        fw_line_f64("  radiance", radiance);
        expect("bt_band_temperature", bt_band_temperature(band, radiance, &back_k),
               BT_STATUS_OK);
        fw_line_f64("  temperature_k", back_k);
    }
}

#if FW_LEVEL >= 2
/* Kiln shell seen through 5 m of air and a protective window (invented values). */
static const bt_scene shell_scene = {
    0.92,   /* emissivity */
    293.15, /* reflected apparent temperature, K */
    0.97,   /* air transmittance */
    295.0,  /* air temperature, K */
    0.95,   /* window transmittance */
    0.02,   /* window reflectance */
    300.0,  /* window temperature, K */
    298.0,  /* temperature the window reflects (sensor side), K */
};

static void scene_inverse(const char *name, const bt_band *band) {
    static const double objects_k[] = {320.0, 450.0, 900.0};
    size_t i;
    fw_line_str("scene", name);
    for (i = 0; i < sizeof objects_k / sizeof objects_k[0]; i++) {
        double sensor = 0.0, object_k = 0.0;
        expect("bt_sensor_radiance",
               bt_sensor_radiance(band, &shell_scene, objects_k[i], &sensor), BT_STATUS_OK);
        fw_line_f64("  sensor_radiance", sensor);
        expect("bt_object_temperature",
               bt_object_temperature(band, &shell_scene, sensor, &object_k), BT_STATUS_OK);
        fw_line_f64("  object_k", object_k);
    }
}
#endif

#if FW_LEVEL >= 3
/* An invented Sakuma-Hattori curve for a 3.9 um pyrometer, in counts above dark. */
static const bt_sakuma_hattori pyrometer = {3.88, 21.0, 4.0e7};

static void sakuma_hattori_conversion(void) {
    static const double signals[] = {1.0e3, 2.5e4, 6.0e5};
    size_t i;
    fw_line_str("sakuma_hattori", "3.9 um");
    for (i = 0; i < sizeof signals / sizeof signals[0]; i++) {
        double t_k = 0.0, signal = 0.0;
        expect("bt_sakuma_hattori_temperature",
               bt_sakuma_hattori_temperature(&pyrometer, signals[i], &t_k), BT_STATUS_OK);
        fw_line_f64("  temperature_k", t_k);
        expect("bt_sakuma_hattori_signal", bt_sakuma_hattori_signal(&pyrometer, t_k, &signal),
               BT_STATUS_OK);
        fw_line_f64("  signal", signal);
    }
}

#define WIDTH 64
#define HEIGHT 48
#define PIXELS (WIDTH * HEIGHT)
#define MAX_ROWS 128
#define DEAD_PIXEL (5 * WIDTH + 10)
#define SATURATED_PIXEL (40 * WIDTH + 50)

static bt_frame_row table[MAX_ROWS];
static bt_frame_converter converter;
static uint16_t counts[PIXELS];
static float emissivity_map[PIXELS];
static float kelvin[PIXELS];

/* Radiometric calibration of the invented core: L = 0.002 W m^-2 sr^-1 per count - 2.0;
 * a 16-bit converter (dead at 0, saturated at 65535). */
static const double counts_gain = 0.002, counts_offset = -2.0;
static const bt_rails rails = {0, 65535};
static const double frame_lo_k = 250.0, frame_hi_k = 420.0, frame_tolerance_k = 0.01;

/* An invented frame: a panel warming to the right and downwards, a hot seam (a disc of
 * radius 9 pixels around (40, 20)), one dead and one saturated pixel. The emissivity map
 * marks a bare-metal patch (0.35) in the upper left corner, 0.92 elsewhere. */
static void invent_frame(void) {
    int x, y;
    for (y = 0; y < HEIGHT; y++) {
        for (x = 0; x < WIDTH; x++) {
            int dx = x - 40, dy = y - 20, r2 = dx * dx + dy * dy;
            int value = 26000 + 40 * x + 25 * y;
            if (r2 < 81) {
                value += 18000 - 200 * r2;
            }
            counts[y * WIDTH + x] = (uint16_t)value;
            emissivity_map[y * WIDTH + x] = (x < 12 && y < 8) ? 0.35f : 0.92f;
        }
    }
    counts[DEAD_PIXEL] = 0;
    counts[SATURATED_PIXEL] = 65535;
}

static void print_frame(const char *name) {
    int i, j;
    fw_line_str("frame", name);
    for (i = 0; i < PIXELS; i += 8) {
        fw_puts("  px");
        for (j = i; j < i + 8; j++) {
            uint32_t bits;
            __builtin_memcpy(&bits, &kelvin[j], sizeof bits);
            fw_puts(" ");
            fw_put_hex(bits, 8);
        }
        fw_puts("\n");
    }
}

static void print_summary(const bt_frame_summary *s) {
    fw_line_u64("  pixels", s->pixels);
    fw_line_u64("  converted", s->converted);
    fw_line_u64("  dead", s->dead);
    fw_line_u64("  saturated", s->saturated);
    fw_line_u64("  emissivity_invalid", s->emissivity_invalid);
    fw_line_u64("  non_finite", s->non_finite);
    fw_line_u64("  below_background", s->below_background);
    fw_line_u64("  below_range", s->below_range);
    fw_line_u64("  above_range", s->above_range);
}

/* The raw-frame stage on a tiny invented 8x6 array: each pixel reads raw counts
 * n = (x - offset_p) / gain_p of the array's corrected counts x, plus a small quadratic
 * term (x - 20000)^2 / 2^21 that two-point maps leave and three-level maps mostly remove;
 * pixel 19 is stuck. Three flat-field stacks (4 frames each, +-1 count of invented noise)
 * give multi-point maps (the stuck pixel is flagged 16: its levels do not increase) and,
 * from the outer two, two-point maps; a raw frame then goes through each fused
 * conversion, and through the emissivity-map path. Integer arithmetic only, so the
 * invented counts are the same on every target. */
#define RAW_W 8
#define RAW_H 6
#define RAW_PIXELS (RAW_W * RAW_H)
#define RAW_LEVELS 3
#define RAW_STUCK 19

static double raw_mean[RAW_LEVELS][RAW_PIXELS];
static double raw_m2[RAW_LEVELS][RAW_PIXELS];
static uint16_t raw_frame[RAW_PIXELS];
static float raw_maps[(3 * RAW_LEVELS - 4) * RAW_PIXELS];
static float raw_gain[RAW_PIXELS], raw_offset[RAW_PIXELS];
static float raw_emissivity[RAW_PIXELS];
static float raw_kelvin[RAW_PIXELS];
static uint8_t raw_bad[RAW_PIXELS];

/* Raw counts of pixel p for corrected counts x: gain 1 + (p % 5 - 2) / 64, offset
 * 150 (p % 7 - 3), the quadratic term, rounded; the stuck pixel reads 7000. */
static uint16_t raw_counts(int p, int32_t x, int noise) {
    int32_t d = x - 20000, q = (int32_t)(((int64_t)d * d) >> 21);
    int32_t num = 64 * (x + q - 150 * (p % 7 - 3));
    int32_t den = 64 + (p % 5 - 2);
    if (p == RAW_STUCK) return 7000;
    return (uint16_t)((num + den / 2) / den + noise);
}

static void print_raw(const char *name, const bt_corrected_summary *s) {
    int i, j;
    fw_line_str("raw frame", name);
    print_summary(&s->frame);
    fw_line_u64("  bad_replaced", s->bad_replaced);
    fw_line_u64("  bad_unreplaced", s->bad_unreplaced);
    for (i = 0; i < RAW_PIXELS; i += 8) {
        fw_puts("  px");
        for (j = i; j < i + 8; j++) {
            uint32_t bits;
            __builtin_memcpy(&bits, &raw_kelvin[j], sizeof bits);
            fw_puts(" ");
            fw_put_hex(bits, 8);
        }
        fw_puts("\n");
    }
}

static void raw_frame_stage(size_t rows) {
    static const int32_t levels_x[RAW_LEVELS] = {14000, 22000, 34000};
    static const int noise[4] = {-1, 1, 0, 0};
    bt_stack_view views[RAW_LEVELS];
    uint32_t frames[RAW_LEVELS] = {0, 0, 0};
    bt_multi_point_report report;
    bt_two_point_report two;
    bt_corrected_summary summary;
    const bt_drift_step step = {1.0f, 0.0f};
    size_t map_len = 0;
    int k, f, p;

    for (k = 0; k < RAW_LEVELS; k++) {
        for (f = 0; f < 4; f++) {
            for (p = 0; p < RAW_PIXELS; p++) raw_frame[p] = raw_counts(p, levels_x[k], noise[(f + p) % 4]);
            expect("bt_frame_stack_add_counts",
                   bt_frame_stack_add_counts(raw_mean[k], raw_m2[k], RAW_PIXELS, &frames[k],
                                             raw_frame, RAW_PIXELS),
                   BT_STATUS_OK);
        }
        views[k].mean = raw_mean[k];
        views[k].m2 = raw_m2[k];
        views[k].len = RAW_PIXELS;
        views[k].frames = frames[k];
    }
    expect("bt_nuc_multi_point_map_len",
           bt_nuc_multi_point_map_len(RAW_LEVELS, RAW_PIXELS, &map_len), BT_STATUS_OK);
    fw_line_u64("multi-point map floats", map_len);
    expect("bt_nuc_multi_point",
           bt_nuc_multi_point(views, RAW_LEVELS, raw_bad, RAW_PIXELS, raw_maps, map_len, &report),
           BT_STATUS_OK);
    fw_line_u64("  good_pixels", report.good_pixels);
    fw_line_u64("  order_flagged", report.order_flagged);
    fw_line_u64("  stuck pixel flags", raw_bad[RAW_STUCK]);
    for (k = 0; k < RAW_LEVELS; k++) fw_line_f64("  level_mean", report.level_means[k]);
    fw_line_f32("  gain[0] segment 0", raw_maps[0]);
    fw_line_f32("  gain[0] segment 1", raw_maps[RAW_PIXELS]);
    fw_line_f32("  breakpoint[0]", raw_maps[4 * RAW_PIXELS]);
    /* Two-point maps from the outer levels, the stuck pixel already flagged. */
    expect("bt_nuc_two_point",
           bt_nuc_two_point(&views[0], &views[2], raw_bad, RAW_PIXELS, raw_gain, raw_offset,
                            RAW_PIXELS, &two),
           BT_STATUS_OK);
    fw_line_f64("  two-point mean_low", two.mean_low);
    fw_line_f64("  two-point mean_high", two.mean_high);

    /* A raw frame: corrected counts 16000 + 400 per pixel, an emissivity map of 0.92 with
     * a patch of 0.8 in the first row and one invalid value (0). */
    for (p = 0; p < RAW_PIXELS; p++) {
        raw_frame[p] = raw_counts(p, 16000 + 400 * p, 0);
        raw_emissivity[p] = p < RAW_W / 2 ? 0.8f : 0.92f;
    }
    raw_emissivity[RAW_W + 3] = 0.0f;
    expect("bt_frame_convert_counts_corrected",
           bt_frame_convert_counts_corrected(&converter, table, rows, raw_gain, raw_offset,
                                             raw_bad, RAW_W, &step, raw_frame, raw_kelvin,
                                             RAW_PIXELS, &summary),
           BT_STATUS_OK);
    print_raw("two-point", &summary);
    expect("bt_frame_convert_counts_multi_point",
           bt_frame_convert_counts_multi_point(&converter, table, rows, raw_maps, map_len,
                                               RAW_LEVELS, raw_bad, RAW_W, &step, raw_frame,
                                               raw_kelvin, RAW_PIXELS, &summary),
           BT_STATUS_OK);
    print_raw("multi-point", &summary);
    expect("bt_frame_convert_counts_multi_point_emissivity",
           bt_frame_convert_counts_multi_point_emissivity(
               &converter, table, rows, raw_maps, map_len, RAW_LEVELS, raw_bad, RAW_W, NULL,
               raw_frame, raw_emissivity, raw_kelvin, RAW_PIXELS, &summary),
           BT_STATUS_OK);
    print_raw("multi-point, emissivity map", &summary);
    expect("bt_frame_convert_counts_corrected_emissivity",
           bt_frame_convert_counts_corrected_emissivity(
               &converter, table, rows, raw_gain, raw_offset, raw_bad, RAW_W, NULL, raw_frame,
               raw_emissivity, raw_kelvin, RAW_PIXELS, &summary),
           BT_STATUS_OK);
    print_raw("two-point, emissivity map", &summary);
}

static void frame_conversion(void) {
    size_t rows = 0;
    bt_frame_geometry geometry;
    bt_frame_summary summary;
    bt_status status;
    invent_frame();
    status = bt_frame_table_rows_band(&band_lwir, frame_lo_k, frame_hi_k, frame_tolerance_k,
                                      &rows);
    expect("bt_frame_table_rows_band", status, BT_STATUS_OK);
    fw_line_u64("table_rows", rows);
    if (status != BT_STATUS_OK || rows > MAX_ROWS) {
        fw_line_str("error", "table storage too small");
        failures++;
        return;
    }
    expect("bt_frame_converter_new_band",
           bt_frame_converter_new_band(&band_lwir, &shell_scene, counts_gain, counts_offset,
                                       &rails, frame_lo_k, frame_hi_k, frame_tolerance_k, table,
                                       rows, &converter),
           BT_STATUS_OK);
    expect("bt_frame_converter_geometry",
           bt_frame_converter_geometry(&converter, table, rows, &geometry), BT_STATUS_OK);
    fw_line_f64("  max_table_error_k", geometry.max_table_error_k);
    fw_line_f64("  max_pixel_error_k", geometry.max_pixel_error_k);

    expect("bt_frame_convert_counts",
           bt_frame_convert_counts(&converter, table, rows, counts, PIXELS, NULL, 0, kelvin,
                                   PIXELS, &summary),
           BT_STATUS_OK);
    print_summary(&summary);
    print_frame("scene emissivity");

    expect("bt_frame_convert_counts (emissivity map)",
           bt_frame_convert_counts(&converter, table, rows, counts, PIXELS, emissivity_map,
                                   PIXELS, kelvin, PIXELS, &summary),
           BT_STATUS_OK);
    print_summary(&summary);
    print_frame("emissivity map");

    raw_frame_stage(rows);
}
#endif

int fw_main(void) {
    fw_line_str("version", bt_version());
    fw_line_u64("level", FW_LEVEL);
    band_radiance_and_inversion("8-14 um energy", &band_lwir);
    band_radiance_and_inversion("3-5 um photon", &band_mwir);
#if FW_LEVEL >= 2
    scene_inverse("8-14 um energy", &band_lwir);
    scene_inverse("3-5 um photon", &band_mwir);
#endif
#if FW_LEVEL >= 3
    sakuma_hattori_conversion();
    frame_conversion();
#endif
    fw_line_u64("failures", (uint64_t)failures);
    return failures == 0 ? 0 : 1;
}
