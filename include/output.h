/* output: writers for GeoTIFF, GeoPackage, CSV and JSON that never leave a
 * half-written file: each output is written to a hidden temporary name in the
 * same folder and renamed over the final name only when complete. Also file
 * checksums (SHA-256, OpenSSL) for the summaries. Wraps GDAL (writing) and cJSON. */
#ifndef OUTPUT_H
#define OUTPUT_H

#include <stdint.h>
#include <stdio.h>

#include <cJSON.h>

#include "err.h"
#include "grid.h"
#include "table.h"

/* Create folder 'dir' (and parents) if missing. */
int out_mkdir(const char *dir, err_t *e);
/* Remove the index of an earlier run in 'dir' (summary.json, report.html; absent is
 * fine) before a command writes new outputs there, so that a run failing half-way
 * leaves no summary or report describing a mix of old and new files. ERR_IO names
 * the file it could not remove. */
int out_forget_run(const char *dir, err_t *e);
/* "dir/name" into a new string; caller frees. NULL when out of memory. */
char *out_join(const char *dir, const char *name);

/* A text file being written: f is open on the temporary name. */
typedef struct out_file {
    FILE *f;
    char *final;   /* owned */
    char *tmp;     /* owned */
} out_file_t;

int out_file_open(out_file_t *of, const char *path, err_t *e);
/* Close and rename into place; on any failure the temporary is removed. */
int out_file_commit(out_file_t *of, err_t *e);
/* Drop a file being written (NULL-safe, idempotent). */
void out_file_abort(out_file_t *of);

/* Write a cJSON tree as pretty JSON text. */
int out_write_json(const char *path, const cJSON *j, err_t *e);

/* Write one band on grid g: float32 (nodata = NAN written as 'nodata') or int32.
 * Compressed tiled GeoTIFF in g's CRS. */
int out_write_tif_f32(const char *path, const grid_t *g, const float *v, float nodata,
                      const char *description, err_t *e);
int out_write_tif_i32(const char *path, const grid_t *g, const int32_t *v, int32_t nodata,
                      const char *description, err_t *e);

/* A GeoPackage layer of points (x[i], y[i] in the CRS 'wkt') with the attribute
 * row i of 't' on point i. */
int out_write_points_gpkg(const char *path, const char *layer, const char *wkt,
                          const double *x, const double *y, const table_t *t, err_t *e);

/* A GeoPackage layer of line strings in the CRS 'wkt': feature i has the vertices
 * x[start[i] .. start[i+1]-1], y[...] and the attribute row i of 't'. */
int out_write_lines_gpkg(const char *path, const char *layer, const char *wkt,
                         const double *x, const double *y, const size_t *start,
                         const table_t *t, err_t *e);

/* A GeoPackage layer of polygons from a label raster on g (label[c] = row of 't',
 * -1 = no polygon): GDAL polygonizes the labels and each row becomes one
 * (multi)polygon feature carrying that row's attributes. Rows with no cells get
 * no feature. */
int out_write_label_polygons(const char *path, const char *layer, const grid_t *g,
                             const int32_t *label, const table_t *t, err_t *e);

/* SHA-256 of a file as 64 hex characters into hex[65]; size in bytes into *size. */
int out_sha256_file(const char *path, char hex[65], long long *size, err_t *e);

/* Temporary name used for 'path' (hidden, same folder, same extension so GDAL
 * drivers that care about extensions are happy). Caller frees. */
char *out_tmp_name(const char *path);
/* Rename tmp over final; removes tmp on failure. */
int out_rename(const char *tmp, const char *final, err_t *e);

#endif
