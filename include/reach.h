/* reach: the travel-time stage. From the loaded inputs and a built network it
 * finds every cell's time to the nearest open site and which site that is, counts
 * people by time band (overall, per district, per population group), loads per
 * site, and the capacity-aware assignment; then writes the stage's outputs
 * (GeoTIFFs, catchment GeoPackage, CSV tables) and its part of summary.json. */
#ifndef REACH_H
#define REACH_H

#include <cJSON.h>

#include "coverage.h"
#include "districts.h"
#include "err.h"
#include "inputs.h"
#include "network.h"
#include "points.h"

typedef struct reach_result {
    size_t n_cells;
    size_t n_sites;
    double *time_s;          /* n_cells: seconds to the nearest site; INFINITY unreachable */
    int32_t *site;           /* n_cells: nearest site index; -1 unreachable */
    band_table_t bands;      /* zones = districts (0 zones when none) */
    size_t n_groups;         /* scenario population groups */
    band_table_t *group_bands; /* n_groups tables, same layout as 'bands' */
    site_load_t *loads;      /* n_sites */
    double *capacity;        /* n_sites (INFINITY = unlimited) */
    int has_capacity;        /* 1 when any site has a finite capacity */
    double *served;          /* n_sites: capacity-aware assignment (NULL when no capacity) */
    double unserved_no_site; /* capacity-aware: no site within the limit */
    double unserved_capacity;/* capacity-aware: sites in reach were full */
    double people_within_limit; /* people whose nearest site is within the limit */
    double sites_isolated;   /* sites whose catchment is their own cell only */
    double seconds_nearest;  /* time of the nearest-site pass */
    double seconds_capacity; /* time of the bounded searches for capacity */
} reach_result_t;

/* Run the stage for the open sites 'sites' (cells from points_t) on 'net'.
 * 'districts' may be NULL. n_threads for the bounded searches (0 = all cores).
 * Caller destroys 'res' with reach_result_destroy. Errors: no site, igraph failure,
 * every site cut off from the population. */
int reach_run(const inputs_t *in, network_t *net, const points_t *sites,
              const districts_t *districts, int n_threads, int quiet, reach_result_t *res,
              err_t *e);
void reach_result_destroy(reach_result_t *res);

/* Write the stage's files into 'outdir' and add their facts to 'summary'
 * (a cJSON object the caller owns). */
int reach_write(const char *outdir, const inputs_t *in, const points_t *sites,
                const districts_t *districts, const reach_result_t *res, cJSON *summary,
                err_t *e);

/* Print the short human summary of the stage on stdout. */
void reach_print(const inputs_t *in, const points_t *sites, const districts_t *districts,
                 const reach_result_t *res);

#endif
