/* districts: a polygon layer (any OGR format, any CRS) burnt onto the grid so
 * every cell knows its district; cells outside all polygons get -1 and are
 * reported as "outside districts" so people are never lost. Wraps GDAL's
 * rasterizer (cell centres, last polygon wins where they overlap). */
#ifndef DISTRICTS_H
#define DISTRICTS_H

#include <stdint.h>

#include "err.h"
#include "grid.h"
#include "scenario.h"

typedef struct districts {
    size_t n;              /* number of districts */
    char **name;           /* n names (name field, or FID as text) */
    int32_t *cell;         /* nx*ny district index per cell, -1 outside all */
} districts_t;

/* Burn the layer 'l' onto g. Errors: missing file, layer not polygons, name field
 * missing. Caller frees with districts_free. */
int districts_load(const scen_layer_t *l, const grid_t *g, districts_t **out, err_t *e);
void districts_free(districts_t *d);  /* NULL-safe */

#endif
