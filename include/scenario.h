/* scenario: one planning case read from a JSON file (cJSON).
 * The parser is strict: unknown keys (with a did-you-mean hint), wrong types,
 * out-of-range values and missing required keys are errors naming the key path
 * (e.g. "travel.walk.speed_kmh"); JSON syntax errors give line and column.
 * Paths in the file are resolved relative to the scenario file's folder.
 * Units inside are SI (seconds, metres); the file speaks minutes and km/h.
 * Every key is documented in docs/scenario.md with unit, default and range. */
#ifndef SCENARIO_H
#define SCENARIO_H

#include <stddef.h>

#include "err.h"

#define SCEN_MAX_BANDS 16

/* An OGR layer reference: file, optional layer name, and field names. */
typedef struct scen_layer {
    char *path;          /* resolved path, NULL when the layer is not given */
    char *layer;         /* layer name, NULL = first layer (OSM files: "lines"/"points") */
    char *id_field;      /* NULL = use the feature id (FID) */
    char *name_field;    /* NULL = none */
    char *capacity_field;/* persons served; NULL = unlimited */
    char *cost_field;    /* fixed opening cost; NULL = 0 */
    char *storage_field; /* storage capacity, m3; NULL = unlimited */
} scen_layer_t;

/* Speeds for one road class, metres per second (file: km/h). */
typedef struct scen_road_class {
    char *name;          /* class value as found in the class field, e.g. "primary" */
    double walk_mps;     /* > 0 */
    double vehicle_mps;  /* >= 0; 0 = closed to vehicles (footpaths) */
} scen_road_class_t;

/* Walking-speed factor for one land-cover class value. */
typedef struct scen_cover_factor {
    int value;           /* raster class value */
    double factor;       /* 0 <= factor <= 2; 0 makes the class impassable */
} scen_cover_factor_t;

enum scen_mode { SCEN_MODE_WALK = 0, SCEN_MODE_VEHICLE = 1 };
enum scen_direction { SCEN_TO_SITE = 0, SCEN_FROM_SITE = 1 };

/* A population group counted apart in the results: a share of every cell's
 * people, or its own raster of persons on the population grid. */
typedef struct scen_group {
    char *name;          /* e.g. "children under five" */
    double share;        /* (0, 1]; NAN when 'raster' is given */
    char *raster;        /* resolved path, or NULL when 'share' is given */
} scen_group_t;

/* Sections owned by later stages, each read by its own src/io/scen_<name>.c
 * (declared in include/scen_<name>.h); NULL when the section is absent. */
struct scen_siting;
struct scen_supply;
struct scen_variants;

typedef struct scen {
    char *file;              /* path of the scenario file as given */
    char *dir;               /* its folder, for resolving relative paths */
    char *name;              /* "name": free text; default = file base name */

    /* "inputs" */
    char *population;        /* GDAL raster, persons per cell in band 1; required unless
                                "inputs.tables" is given (then NULL) */
    char *landcover;         /* optional: GDAL raster of class values */
    char *elevation;         /* optional: GDAL raster, metres */
    char *barriers;          /* optional: GDAL raster, nonzero = impassable */
    scen_layer_t roads;      /* optional: OGR line layer */
    char *road_class_field;  /* default "highway" */
    char *road_bridge_field; /* default "bridge": values yes/true/1 mean bridge */
    char *road_tunnel_field; /* default "tunnel" */
    char *road_oneway_field; /* default "oneway": yes/true/1 forward, -1 reverse */
    char *road_access_field; /* default NULL: yes/true/1 = limited access (no connectors) */
    scen_layer_t districts;  /* optional: OGR polygon layer; name_field names districts */
    /* "inputs.tables": CSV inputs instead of a grid (docs/tables.md); all NULL when absent.
     * Either edges (from,to,cost) or matrix (demand_id,site_id,cost), with demand and sites. */
    char *table_edges;       /* resolved path or NULL */
    char *table_matrix;      /* resolved path or NULL */
    char *table_demand;      /* resolved path; required with tables */
    char *table_sites;       /* resolved path; required with tables */
    int table_directed;      /* "inputs.tables.directed": edges run from -> to only; default 0 */

    /* "sites" */
    scen_layer_t existing;   /* optional: OGR point layer of existing facilities */
    scen_layer_t candidates; /* optional: OGR point layer of candidate sites */
    scen_layer_t depots;     /* optional: OGR point layer of depots */

    /* "travel" */
    int mode;                /* SCEN_MODE_*; default walk */
    int direction;           /* SCEN_*; default to_site */
    int neighbours;          /* 8 (default) or 16 */
    double walk_mps;         /* "travel.walk.speed_kmh", default 5.0 km/h, (0, 20] */
    int use_slope;           /* "travel.walk.slope": Tobler on elevation, default true */
    double snap_tolerance_m; /* "travel.snap_tolerance_m", default 1.0, [0, 1000] */
    scen_road_class_t *road_classes;  /* "travel.road_speeds", defaults in docs; sorted by name */
    size_t n_road_classes;
    double unknown_walk_mps;    /* "travel.unknown_class.walk_kmh", default 4.0 */
    double unknown_vehicle_mps; /* "travel.unknown_class.vehicle_kmh", default 20 */
    scen_cover_factor_t *cover_factors; /* "travel.landcover_factors"; sorted by value */
    size_t n_cover_factors;
    double cover_default_factor;        /* "travel.landcover_default", default 1.0 */

    /* "coverage" */
    double limit_s;          /* "coverage.limit_min", default 60 min, (0, 1440] */
    double bands_s[SCEN_MAX_BANDS]; /* "coverage.bands_min", default 30,60,120 */
    size_t n_bands;          /* strictly increasing, 1..16 */

    /* "population_groups" */
    scen_group_t *groups;
    size_t n_groups;         /* 0..16 */

    struct scen_siting *siting;     /* "siting" */
    struct scen_supply *supply;     /* "supply" */
    struct scen_variants *variants; /* "variants" */
} scen_t;

/* Read and validate the scenario at 'path'. On success *out is a new scenario
 * (caller frees with scen_free); on failure *out is NULL and 'e' names the key. */
int scen_load(const char *path, scen_t **out, err_t *e);
/* Same, from a JSON text; 'path' is used for messages and for resolving files. */
int scen_parse(const char *json, const char *path, scen_t **out, err_t *e);
void scen_free(scen_t *s);   /* NULL-safe */

/* Speeds for a road class name; falls back to the unknown-class speeds and
 * returns 0 in that case, 1 when the class is in the table. */
int scen_road_speed(const scen_t *s, const char *cls, double *walk_mps, double *vehicle_mps);
/* Walking-speed factor for a land-cover class value; the default factor when
 * the class is not listed. */
double scen_cover_factor(const scen_t *s, int value);

#endif
