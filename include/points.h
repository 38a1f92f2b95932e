/* points: facility, candidate and depot point layers (any OGR point layer),
 * reprojected to the grid's CRS, each placed in its grid cell. A point outside
 * the grid or on a barrier cell is an error that lists the ids. Wraps GDAL/OGR. */
#ifndef POINTS_H
#define POINTS_H

#include <stddef.h>
#include <stdint.h>

#include "err.h"
#include "grid.h"
#include "scenario.h"

typedef struct points {
    size_t n;
    char **id;            /* n ids (id field, or FID as text); unique */
    char **name;          /* n names ("" when no name field) */
    double *x, *y;        /* n coordinates in the grid CRS */
    int64_t *cell;        /* n grid cells (row * nx + col) */
    double *capacity;     /* n persons served; INFINITY when not given */
    double *cost;         /* n fixed opening cost; 0 when not given */
    double *storage_m3;   /* n storage capacity; INFINITY when not given */
} points_t;

/* Read the point layer 'l' ('what' names it in messages: "existing sites", ...).
 * Errors: missing file, not points, duplicate ids, points outside the grid or on
 * barrier cells (listing the ids), negative capacity. Caller frees with points_free. */
int points_load(const scen_layer_t *l, const char *what, const grid_t *g,
                points_t **out, err_t *e);
void points_free(points_t *p);  /* NULL-safe */

#endif
