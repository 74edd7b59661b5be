/* Budget measurements on the emulated Cortex-M4F (invented instrument and data): the
 * stack depth and the instruction count of each call that a camera or pyrometer firmware
 * makes, and the start-up cost of a 1 mK frame table.
 *
 * Instructions: every measured region is bracketed by two calls of fw_mark(); the QEMU
 * plugin firmware/tools/insncount.c (loaded with mark=<address of fw_mark>) prints the
 * running instruction count at every fw_mark, in order, and scripts/firmware.sh pairs
 * them with the "measure" lines this program prints, in the same order. An empty region
 * is measured first and its count (the marks' own instructions) subtracted.
 *
 * Stack: before each region the 32 KiB below the stack pointer are painted with a
 * pattern; after it, the lowest word no longer holding the pattern gives the depth the
 * region used below the caller's stack pointer (the exported call and everything it
 * calls, plus the few bytes of the small loop that makes the calls). Depth is measured
 * for the inputs used here, which include each function's slow paths (wide ranges, tight
 * tolerances), not proven for every input. */
#include <stddef.h>
#include <stdint.h>

#include "bandtemp.h"
#include "fw_io.h"

#define PAINT_BYTES 32768u
#define PAINT_WORD 0xA5C3E187u

__attribute__((noinline, used)) void fw_mark(void) { __asm volatile("nop" ::: "memory"); }

static uintptr_t stack_pointer(void) {
    uintptr_t sp;
    __asm volatile("mov %0, sp" : "=r"(sp));
    return sp;
}

static int failures;
static void check(bt_status status) {
    if (status != BT_STATUS_OK) {
        fw_line_u64("unexpected status", (uint64_t)status);
        failures++;
    }
}

/* Runs `job` between two marks with the stack painted; prints its name, how many calls
 * it makes (the script divides by it) and the stack depth in bytes. */
static void measure(const char *name, void (*job)(void), uint64_t calls) {
    uintptr_t sp = stack_pointer() & ~(uintptr_t)3;
    volatile uint32_t *floor = (volatile uint32_t *)(sp - PAINT_BYTES);
    volatile uint32_t *p;
    for (p = floor; p < (volatile uint32_t *)(sp - 16u); p++) {
        *p = PAINT_WORD;
    }
    fw_mark();
    job();
    fw_mark();
    for (p = floor; p < (volatile uint32_t *)(sp - 16u) && *p == PAINT_WORD; p++) {
    }
    fw_puts("measure ");
    fw_puts(name);
    fw_puts(" ");
    fw_put_u64(calls);
    fw_puts(" ");
    fw_put_u64((uint64_t)(sp - (uintptr_t)p));
    fw_puts("\n");
}

static const bt_band lwir = {8.0, 14.0, BT_DETECTOR_ENERGY, NULL, NULL, 0};
static const bt_band mwir = {3.0, 5.0, BT_DETECTOR_PHOTON, NULL, NULL, 0};
static const bt_scene scene = {0.92, 293.15, 0.97, 295.0, 0.95, 0.02, 300.0, 298.0};
static const bt_sakuma_hattori pyrometer = {3.88, 21.0, 4.0e7};

/* 250, 300, ..., 1500 K: 26 temperatures. */
#define SWEEP 26
static double sweep_k(int i) { return 250.0 + 50.0 * (double)i; }
static double lwir_sweep[SWEEP], mwir_sweep[SWEEP], sensor_sweep[SWEEP];
static double lwir_300, mwir_300, sensor_350, sink;

static void empty(void) {}
static void lwir_radiance_300(void) { check(bt_band_radiance(&lwir, 300.0, &sink)); }
static void lwir_radiance_sweep(void) {
    int i;
    for (i = 0; i < SWEEP; i++) {
        check(bt_band_radiance(&lwir, sweep_k(i), &sink));
    }
}
static void lwir_temperature_300(void) { check(bt_band_temperature(&lwir, lwir_300, &sink)); }
static void lwir_temperature_sweep(void) {
    int i;
    for (i = 0; i < SWEEP; i++) {
        check(bt_band_temperature(&lwir, lwir_sweep[i], &sink));
    }
}
static void mwir_radiance_300(void) { check(bt_band_radiance(&mwir, 300.0, &sink)); }
static void mwir_radiance_sweep(void) {
    int i;
    for (i = 0; i < SWEEP; i++) {
        check(bt_band_radiance(&mwir, sweep_k(i), &sink));
    }
}
static void mwir_temperature_300(void) { check(bt_band_temperature(&mwir, mwir_300, &sink)); }
static void mwir_temperature_sweep(void) {
    int i;
    for (i = 0; i < SWEEP; i++) {
        check(bt_band_temperature(&mwir, mwir_sweep[i], &sink));
    }
}
static void sensor_radiance_350(void) { check(bt_sensor_radiance(&lwir, &scene, 350.0, &sink)); }
static void object_temperature_350(void) {
    check(bt_object_temperature(&lwir, &scene, sensor_350, &sink));
}
static void object_temperature_sweep(void) {
    int i;
    for (i = 0; i < SWEEP; i++) {
        check(bt_object_temperature(&lwir, &scene, sensor_sweep[i], &sink));
    }
}
static void sakuma_hattori_temperature(void) {
    check(bt_sakuma_hattori_temperature(&pyrometer, 2.5e4, &sink));
}

/* Start-up: the 1 mK table for 8-14 um over 250-1200 K. */
#define MAX_ROWS 128
static bt_frame_row table[MAX_ROWS];
static bt_frame_converter converter;
static size_t rows;
static const bt_rails rails = {0, 65535};
static void table_rows_1mk(void) { check(bt_frame_table_rows_band(&lwir, 250.0, 1200.0, 1e-3, &rows)); }
static void converter_new_1mk(void) {
    if (rows > MAX_ROWS) {
        fw_line_u64("table rows beyond storage", rows);
        failures++;
        return;
    }
    check(bt_frame_converter_new_band(&lwir, &scene, 0.002, -2.0, &rails, 250.0, 1200.0, 1e-3,
                                      table, rows, &converter));
}

/* Frames: the first 64 pixels and the whole 64x48 frame; the difference gives the cost
 * per pixel, the rest the cost per call. */
#define PIXELS (64 * 48)
static uint16_t counts[PIXELS];
static float emissivity_map[PIXELS];
static float kelvin[PIXELS];
static bt_frame_summary summary;
static void frame_counts(size_t n, const float *map) {
    check(bt_frame_convert_counts(&converter, table, rows, counts, n, map, map ? n : 0, kelvin, n,
                                  &summary));
}
static void frame_64(void) { frame_counts(64, NULL); }
static void frame_full(void) { frame_counts(PIXELS, NULL); }
static void frame_64_map(void) { frame_counts(64, emissivity_map); }
static void frame_full_map(void) { frame_counts(PIXELS, emissivity_map); }

int fw_main(void) {
    int i;
    for (i = 0; i < SWEEP; i++) {
        check(bt_band_radiance(&lwir, sweep_k(i), &lwir_sweep[i]));
        check(bt_band_radiance(&mwir, sweep_k(i), &mwir_sweep[i]));
        check(bt_sensor_radiance(&lwir, &scene, sweep_k(i), &sensor_sweep[i]));
    }
    check(bt_band_radiance(&lwir, 300.0, &lwir_300));
    check(bt_band_radiance(&mwir, 300.0, &mwir_300));
    check(bt_sensor_radiance(&lwir, &scene, 350.0, &sensor_350));
    /* An invented scene: 300-400 K across the frame (counts 26000-50000). */
    for (i = 0; i < PIXELS; i++) {
        counts[i] = (uint16_t)(26000 + (i * 7919) % 24000);
        emissivity_map[i] = (i % 5 == 0) ? 0.6f : 0.92f;
    }

    measure("empty", empty, 1);
    measure("bt_band_radiance(8-14um,300K)", lwir_radiance_300, 1);
    measure("bt_band_radiance(8-14um,250-1500K)", lwir_radiance_sweep, SWEEP);
    measure("bt_band_temperature(8-14um,300K)", lwir_temperature_300, 1);
    measure("bt_band_temperature(8-14um,250-1500K)", lwir_temperature_sweep, SWEEP);
    measure("bt_band_radiance(3-5um-photon,300K)", mwir_radiance_300, 1);
    measure("bt_band_radiance(3-5um-photon,250-1500K)", mwir_radiance_sweep, SWEEP);
    measure("bt_band_temperature(3-5um-photon,300K)", mwir_temperature_300, 1);
    measure("bt_band_temperature(3-5um-photon,250-1500K)", mwir_temperature_sweep, SWEEP);
    measure("bt_sensor_radiance(8-14um,350K)", sensor_radiance_350, 1);
    measure("bt_object_temperature(8-14um,350K)", object_temperature_350, 1);
    measure("bt_object_temperature(8-14um,250-1500K)", object_temperature_sweep, SWEEP);
    measure("bt_sakuma_hattori_temperature", sakuma_hattori_temperature, 1);
    measure("bt_frame_table_rows_band(8-14um,250-1200K,1mK)", table_rows_1mk, 1);
    measure("bt_frame_converter_new_band(8-14um,250-1200K,1mK)", converter_new_1mk, 1);
    fw_line_u64("table_rows", rows);
    measure("bt_frame_convert_counts(64px)", frame_64, 1);
    measure("bt_frame_convert_counts(3072px)", frame_full, 1);
    measure("bt_frame_convert_counts(64px,emissivity-map)", frame_64_map, 1);
    measure("bt_frame_convert_counts(3072px,emissivity-map)", frame_full_map, 1);
    fw_line_u64("converted", summary.converted);
    fw_line_u64("failures", (uint64_t)failures);
    return failures == 0 ? 0 : 1;
}
