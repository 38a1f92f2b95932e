/* fixtures: small builders the module tests share: an in-memory grid in a given
 * EPSG CRS, and one-layer vector files written with OGR. Test code only. */
#ifndef FIXTURES_H
#define FIXTURES_H

#include <stddef.h>

#include <ogr_api.h>

#include "grid.h"

/* nx x ny cells of size cs (CRS units), top-left corner (x0, y0), no people.
 * Free with fx_grid_free. Exits the test with status 2 when out of memory. */
grid_t *fx_grid(int nx, int ny, double x0, double y0, double cs, int epsg);
void fx_grid_free(grid_t *g);   /* NULL-safe */

/* A feature to write: WKT geometry and up to FX_MAX_FIELDS string values (NULL = unset). */
#define FX_MAX_FIELDS 5
typedef struct fx_feat {
    const char *wkt;
    const char *v[FX_MAX_FIELDS];
} fx_feat_t;

/* Write a one-layer vector file named 'layer' with OGR's 'driver' (replacing any
 * file at 'path'); fields: up to FX_MAX_FIELDS string field names, NULL-ended.
 * epsg <= 0 writes no CRS. Exits the test with status 2 on failure. */
void fx_write_layer(const char *path, const char *driver, const char *layer, int epsg,
                    OGRwkbGeometryType type, const char *const *fields, const fx_feat_t *fs,
                    size_t n);

/* "dir/name" in one of 8 rotating static buffers (enough for one call's arguments). */
const char *fx_path(const char *dir, const char *name);

#endif
