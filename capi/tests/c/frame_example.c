/* Firmware-style frame conversion with static storage only (invented instrument and data).
 *
 * An 8-14 um microbolometer core whose radiometric calibration reads band radiance
 * L = 0.002 W m^-2 sr^-1 per count - 2.0, looking at invented kiln-shell panels
 * (emissivity 0.92, surroundings at 293.15 K). The table and the converter are built once
 * at start-up; each frame is then converted with no allocation and no pointer kept. */
#include "bandtemp.h"

#include <math.h>
#include <stdio.h>

#define WIDTH 4
#define HEIGHT 3
#define PIXELS (WIDTH * HEIGHT)
#define MAX_ROWS 128 /* 2 KiB; bt_frame_table_rows_band says how many are needed */

static bt_frame_row table[MAX_ROWS];
static bt_frame_converter converter;
static size_t table_rows;
static float kelvin[PIXELS];

static const bt_band band = {8.0, 14.0, BT_DETECTOR_ENERGY, NULL, NULL, 0};
static const bt_scene scene = {0.92, 293.15, 1.0, 293.15, 1.0, 0.0, 293.15, 293.15};
static const bt_rails rails = {0, 65535}; /* 16-bit converter */
static const double gain = 0.002, offset = -2.0;

/* One invented frame of counts: a warm panel, a hot seam, a dead and a saturated pixel. */
static const uint16_t frame[PIXELS] = {
    30000, 30100, 30200, 0,     /* 0: dead pixel     */
    31000, 52000, 65535, 30300, /* 65535: saturated   */
    29900, 30050, 30150, 30250,
};

static int start_up(void) {
    bt_status status = bt_frame_table_rows_band(&band, 250.0, 1200.0, 1e-3, &table_rows);
    if (status == BT_STATUS_OK && table_rows > MAX_ROWS) {
        status = BT_STATUS_FRAME_STORAGE_TOO_SMALL;
    }
    if (status == BT_STATUS_OK) {
        status = bt_frame_converter_new_band(&band, &scene, gain, offset, &rails, 250.0, 1200.0,
                                             1e-3, table, table_rows, &converter);
    }
    if (status != BT_STATUS_OK) {
        printf("start-up failed: %s\n", bt_status_message(status));
        return 0;
    }
    return 1;
}

int main(void) {
    bt_frame_summary summary;
    bt_status status;
    int i, bad = 0;
    if (!start_up()) {
        return 1;
    }
    status = bt_frame_convert_counts(&converter, table, table_rows, frame, PIXELS, NULL, 0,
                                     kelvin, PIXELS, &summary);
    if (status != BT_STATUS_OK) {
        printf("frame failed: %s\n", bt_status_message(status));
        return 1;
    }
    printf("%lu of %lu pixels converted (%lu dead, %lu saturated), table %lu bytes\n",
           (unsigned long)summary.converted, (unsigned long)summary.pixels,
           (unsigned long)summary.dead, (unsigned long)summary.saturated,
           (unsigned long)(table_rows * sizeof(bt_frame_row)));
    /* Check a few pixels against exact inversion of the measurement equation. */
    for (i = 0; i < PIXELS; i += 5) {
        double exact;
        if (bt_object_temperature(&band, &scene, gain * frame[i] + offset, &exact) ==
            BT_STATUS_OK) {
            printf("pixel %2d: %.3f K (exact %.3f K)\n", i, kelvin[i], exact);
            bad += fabs(kelvin[i] - exact) > 1e-3;
        }
    }
    bad += !(isnan(kelvin[3]) && isnan(kelvin[6]) && summary.converted == PIXELS - 2);
    return bad == 0 ? 0 : 1;
}
