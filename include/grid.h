/* grid: the population surface and the optional layers on the same grid.
 * Reads band 1 of any GDAL raster as persons per cell (nodata and NaN become
 * 0 people and are counted; negative values are an error). Optional land-cover,
 * elevation and barrier rasters are resampled onto the population grid with
 * GDAL warping (nearest for classes and masks, bilinear for elevation) when
 * their grid differs. Cell sizes are in metres: planar for projected CRSs and
 * on the WGS84 ellipsoid (PROJ geodesic routines) for geographic ones, so a
 * cell's width shrinks with latitude. Cells are numbered row-major from the
 * top-left: cell = row * nx + col. Wraps GDAL raster and PROJ geodesic. */
#ifndef GRID_H
#define GRID_H

#include <stddef.h>
#include <stdint.h>

#include "err.h"

typedef struct grid {
    int nx, ny;            /* columns, rows (both >= 1) */
    double gt[6];          /* GDAL geotransform (north-up; rotation terms are rejected) */
    char *wkt;             /* CRS as WKT (never NULL on a loaded grid) */
    char *crs_name;        /* short CRS name for reports, e.g. "WGS 84 / UTM zone 36S" */
    int geographic;        /* 1 when the CRS is geographic (lon/lat degrees) */

    double *people;        /* nx*ny persons per cell, >= 0, finite */
    double *row_dx_m;      /* ny: cell width in metres for each row */
    double *row_dy_m;      /* ny: cell height in metres for each row */
    double *row_area_m2;   /* ny: cell area in square metres for each row */

    /* Optional layers, NULL when not given. */
    int32_t *landcover;    /* nx*ny class values; INT32_MIN where nodata */
    float *elevation;      /* nx*ny metres; NAN where nodata */
    uint8_t *barrier;      /* nx*ny: 1 = impassable (water, mask), 0 = passable */

    /* Facts for the check report. */
    double total_people;   /* sum of people[], the invariant later stages keep */
    size_t n_nodata;       /* cells that were nodata (nodata value or mask) in the band */
    size_t n_nan;          /* cells that were NaN where NaN is not the declared nodata */
    size_t n_populated;    /* cells with people > 0 */
    double people_on_barrier; /* persons living on barrier cells */
    /* Cells of the grid an optional layer left without a value (its nodata, or
     * beyond its extent): land cover then takes travel.landcover_default,
     * elevation gives no slope (flat walking), a barrier raster lets people pass.
     * 0 when the layer is absent. Callers warn so a half-covering layer is seen. */
    size_t n_landcover_missing, n_elevation_missing, n_barrier_missing;
    double min_dx_m, max_dx_m, min_dy_m, max_dy_m; /* cell size range */
    /* Projected grids only: the largest relative difference, sampled over the grid,
     * between the planar cell width/height and the ground distance on the ellipsoid
     * (e.g. about 0.11 for World Mollweide far from its central meridian). 0 for
     * geographic grids; NAN when it could not be measured. Callers warn when large. */
    double scale_error;
} grid_t;

/* Read the population raster at 'path' (band 1, with its scale/offset). Nodata,
 * masked and NaN cells become 0 people and are counted. On success *out is a new grid
 * (caller frees with grid_free). Errors name the file: missing (ERR_IO), not a raster,
 * zero size, no bands, no CRS, no or rotated geotransform, negative or infinite
 * people (first cell and count) (ERR_INPUT). The input file is never modified. */
int grid_load(const char *path, grid_t **out, err_t *e);

/* Add optional layers, each resampled onto g's grid when needed (nearest for land
 * cover and barriers, bilinear for elevation). A NULL path adds nothing. Barrier
 * cells are nonzero, non-nodata values of the barrier raster. Errors name the file
 * and the layer; on error g keeps its earlier layer. */
int grid_load_landcover(grid_t *g, const char *path, err_t *e);
int grid_load_elevation(grid_t *g, const char *path, err_t *e);
int grid_load_barriers(grid_t *g, const char *path, err_t *e);

void grid_free(grid_t *g);  /* NULL-safe */

/* Cell centre in the grid's CRS. */
void grid_cell_center(const grid_t *g, int col, int row, double *x, double *y);
/* Cell holding CRS point (x, y); returns 1 and sets col,row when inside, else 0. */
int grid_locate(const grid_t *g, double x, double y, int *col, int *row);

/* Geodesic distance in metres between two lon/lat points (degrees) on WGS84. */
double grid_geodesic_m(double lon1, double lat1, double lon2, double lat2);

#endif
