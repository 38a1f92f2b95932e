/* ogr_util: small OGR helpers shared by the vector readers (roads, points):
 * opening a vector file with the right error code, picking a layer (OSM files
 * default to "lines" or "points"), listing fields for messages, reading an
 * attribute either from its own field or from OSM's hstore "other_tags" text,
 * and the transformation from a layer's CRS onto the population grid's CRS.
 * GDAL drivers must be registered (GDALAllRegister) by main before use. */
#ifndef OGR_UTIL_H
#define OGR_UTIL_H

#include <stddef.h>

#include <gdal.h>
#include <ogr_api.h>
#include <ogr_srs_api.h>
#include <geodesic.h>

#include "err.h"

/* Open 'path' read-only as a vector dataset. 'what' names the input in
 * messages ("road", "existing sites"). ERR_IO when the file does not exist,
 * ERR_INPUT when GDAL cannot read it as vector data. Caller closes with GDALClose. */
int ogr_util_open(const char *path, const char *what, GDALDatasetH *out, err_t *e);

/* 1 when the dataset was opened by GDAL's OSM driver (PBF or XML). */
int ogr_util_is_osm(GDALDatasetH ds);

/* The layer called 'name', or when 'name' is NULL the OSM layer 'osm_default'
 * for OSM files and the first layer otherwise. ERR_INPUT listing the layers
 * present when there is no such layer. The layer belongs to 'ds'. */
int ogr_util_layer(GDALDatasetH ds, const char *path, const char *name,
                   const char *osm_default, OGRLayerH *out, err_t *e);

/* Comma-separated field names of 'l' into buf (truncated with "..." if long). */
void ogr_util_field_list(OGRLayerH l, char *buf, size_t n);

/* An attribute read from its own field or, failing that, from the hstore text
 * of an "other_tags" field (as GDAL's OSM driver writes it: "k"=>"v",...). */
typedef struct ogr_util_attr {
    int field;       /* field index, -1 when the layer has no such field */
    int tags;        /* index of "other_tags", -1 when absent or not used */
    const char *key; /* borrowed: the attribute name */
} ogr_util_attr_t;

/* Resolve 'key' on layer 'l'. Returns 1 when the attribute can be read from a
 * field or from other_tags, 0 when neither exists (reads then give ""). */
int ogr_util_attr_init(ogr_util_attr_t *a, OGRLayerH l, const char *key);
/* Value of the attribute on feature 'f' into buf ("" when unset or null). */
void ogr_util_attr_get(const ogr_util_attr_t *a, OGRFeatureH f, char *buf, size_t n);

/* Look 'key' up in hstore text 'tags'; copies its value into buf and returns 1,
 * or returns 0 (buf = "") when the key is absent or its value is NULL. */
int ogr_util_hstore_get(const char *tags, const char *key, char *buf, size_t n);

/* Coordinate handling from a layer's CRS onto the grid's CRS. Both CRSs use
 * the traditional GIS axis order (x = easting or longitude). A layer without a
 * CRS is taken to be in the grid's CRS (layer_has_crs = 0 says so). */
typedef struct ogr_util_crs {
    OGRSpatialReferenceH src, dst;     /* owned */
    OGRCoordinateTransformationH ct;   /* owned; NULL when the CRSs are the same */
    int layer_has_crs;
    int src_geographic, dst_geographic;
    double src_deg_per_unit;  /* geographic source: degrees per coordinate unit */
    double src_m_per_unit;    /* projected source: metres per coordinate unit */
    double dst_m_per_unit;    /* projected grid: metres per coordinate unit */
    double dst_deg_per_unit;  /* geographic grid: degrees per coordinate unit */
    double src_a, src_f;      /* source ellipsoid: semi-major axis (m), flattening */
    double dst_a, dst_f;      /* grid ellipsoid */
    struct geod_geodesic geod;/* PROJ geodesic on the source ellipsoid */
} ogr_util_crs_t;

/* Fill 'c' for layer 'l' (of file 'path') onto the grid CRS 'grid_wkt'.
 * ERR_INPUT when the grid has no CRS or no transformation exists. On failure
 * 'c' needs no destroy; on success release it with ogr_util_crs_destroy. */
int ogr_util_crs_init(ogr_util_crs_t *c, OGRLayerH l, const char *path,
                      const char *grid_wkt, err_t *e);
void ogr_util_crs_destroy(ogr_util_crs_t *c);  /* NULL-safe */

/* Transform n points in place (source -> grid). Returns the number of points
 * that failed (their coordinates are then unspecified). */
size_t ogr_util_crs_apply(const ogr_util_crs_t *c, size_t n, double *x, double *y);

/* Length in metres between two source-CRS points: geodesic on the source
 * ellipsoid when the source is geographic, planar times the unit otherwise. */
double ogr_util_crs_src_length(const ogr_util_crs_t *c, double x1, double y1,
                               double x2, double y2);

#endif
