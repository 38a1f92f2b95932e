/* fixtures: small builders the module tests share: an in-memory grid in a given
 * EPSG CRS, and one-layer vector files written with OGR. Test code only. */
#ifndef FIXTURES_H
#define FIXTURES_H

#include <stddef.h>

#include <ogr_api.h>

#include "grid.h"
#include "roads.h"
#include "scenario.h"

/* nx x ny cells of size cs (CRS units), top-left corner (x0, y0), no people.
 * Free with grid_free. Exits the test with status 2 when out of memory. */
grid_t *fx_grid(int nx, int ny, double x0, double y0, double cs, int epsg);

/* A planar lattice of nx x ny square cells of 'cell' metres, no CRS, origin top-left
 * at (0, ny*cell): cell (col,row) has its centre at ((col+.5)cell, (ny-row-.5)cell).
 * Per-row sizes and areas filled, no people. Free with grid_free, which also frees
 * any elevation, land-cover and barrier layer a test adds. */
grid_t *fx_lattice(int nx, int ny, double cell);

/* A scenario for hand-made networks: walking at 1 m/s to the sites, 8 neighbours,
 * slope on (flat without elevation), land-cover factor 1, limit 60 min, bands 10
 * and 60 min. No paths, no tables: fields only. */
void fx_scen_init(scen_t *s);

/* Roads with room for n_nodes nodes, n_segs segments and n_classes zeroed classes
 * (class speeds are the test's to set; names, if any, must be heap strings). Free
 * with roads_free. */
roads_t *fx_roads(size_t n_nodes, size_t n_segs, size_t n_classes);

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
