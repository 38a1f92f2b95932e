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
 * OSM files default to their "points" layer; a named field missing from its own
 * column is also looked up in OSM's other_tags. A layer without a CRS is taken
 * to be in the grid's CRS. An empty layer gives n = 0.
 * Errors (ERR_INPUT unless said): missing file (ERR_IO), not points, a MultiPoint
 * of more than one point, a named field missing (listing the fields present),
 * duplicate or empty ids, a capacity/cost/storage value that is empty, not a
 * number, NaN or negative (cost also infinite), points outside the grid or on
 * barrier cells (listing the first 10 ids). Caller frees with points_free. */
int points_load(const scen_layer_t *l, const char *what, const grid_t *g,
                points_t **out, err_t *e);
void points_free(points_t *p);  /* NULL-safe */

#endif
