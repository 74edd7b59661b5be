/* README example: true temperature of a surface (emissivity 0.95, surroundings at 20 C) seen
 * by an 8-14 um microbolometer reading 115.567378 W m^-2 sr^-1. Invented values; the reading
 * is what scipy's quadrature of Planck's law gives for a 360 K surface in that scene. */
#include <stdio.h>
#include "bandtemp.h"

int main(void) {
    bt_band band = {8.0, 14.0, BT_DETECTOR_ENERGY, NULL, NULL, 0};           /* rectangular */
    bt_scene scene = {0.95, 293.15, 1.0, 293.15, 1.0, 0.0, 293.15, 293.15}; /* no air, no window */
    double object_k = 0.0;
    bt_status status = bt_object_temperature(&band, &scene, 115.567378, &object_k);
    if (status != BT_STATUS_OK) { fprintf(stderr, "%s\n", bt_status_message(status)); return 1; }
    printf("object: %.3f K\n", object_k);
    return 0;
}
