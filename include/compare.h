/* compare: the base scenario and each of its variants side by side. For every
 * variant: people by time band (overall and per district), people who lose or
 * gain access within each band limit and within the coverage limit, added
 * person-hours, sites whose load rises past capacity; a raster of minutes gained
 * or lost and a GeoPackage of the areas that lost access; and a ranking of the
 * variants by people pushed beyond the limit. The network is edited in place per
 * variant (variant.h) and restored after each. */
#ifndef COMPARE_H
#define COMPARE_H

#include <stddef.h>

#include <cJSON.h>

#include "districts.h"
#include "err.h"
#include "inputs.h"
#include "network.h"
#include "reach.h"

/* Differences between a base and a variant run on the same grid. */
typedef struct compare_diff {
    size_t n_bands;
    double lost_band[SCEN_MAX_BANDS];   /* people within limit k in base, not in variant */
    double gained_band[SCEN_MAX_BANDS]; /* the reverse */
    double pushed_beyond;   /* within the coverage limit in base, beyond it in variant */
    double gained_within;   /* the reverse */
    double cut_off;         /* reachable in base, unreachable in variant */
    double added_person_h;  /* sum of people x (variant - base time), hours, over people
                               reachable in both runs (negative when faster) */
    double *pushed_by_zone; /* n_zones + 1 (last row: outside zones) */
    size_t n_zones;
} compare_diff_t;

/* Compare two runs cell by cell (times in seconds, INFINITY = unreachable).
 * zone may be NULL. When not NULL, delta_min[c] receives variant minus base in
 * minutes (COMPARE_LOST where reach was lost, COMPARE_GAINED where it was gained,
 * COMPARE_NODATA where both are unreachable) and label[c] 0 for a cell pushed
 * beyond the limit, 1 for a cell brought within it, -1 otherwise. Caller destroys
 * 'out' with compare_diff_destroy. */
#define COMPARE_LOST 9999.0f
#define COMPARE_GAINED (-9999.0f)
#define COMPARE_NODATA (-99999.0f)
int compare_cells(size_t n_cells, const double *people, const double *base_s,
                  const double *var_s, double limit_s, const double *limits_s, size_t n_bands,
                  const int32_t *zone, size_t n_zones, compare_diff_t *out, float *delta_min,
                  int32_t *label, err_t *e);
void compare_diff_destroy(compare_diff_t *d);   /* NULL-safe */

/* Facts of one variant for the summary and the ranking. */
typedef struct compare_variant {
    char *name;              /* owned copy */
    char slug[64];           /* file-name form */
    compare_diff_t diff;
    double within_limit;     /* people within the coverage limit */
    double unreachable;
    size_t n_sites;          /* open sites in the variant */
    size_t sites_newly_over; /* sites over capacity in the variant but not in base */
    char *newly_over;        /* their ids, comma-separated (owned) */
    size_t segs_closed, segs_slowed, segs_flooded, cells_flooded;
    double people_flooded;
    size_t edges_changed;
    int no_site;             /* 1 when no open site was left or none could be reached */
    int incremental;         /* 1: times from the repaired base tree (sptree_resettle) */
    size_t nodes_resettled;  /* nodes searched again when incremental */
    double seconds;          /* time for this variant (apply, search, compare) */
} compare_variant_t;

typedef struct compare_result {
    double total_people;
    double base_within_limit, base_unreachable;
    size_t base_sites;
    compare_variant_t *v;    /* n variants, scenario order */
    size_t n;
    size_t *rank;            /* n indices into v, most people pushed beyond first */
    double seconds_base;
} compare_result_t;

/* Run the base and every variant of in->scen; write compare.csv, compare_bands.csv,
 * compare_sites.csv, delta_<slug>.tif and affected_<slug>.gpkg into outdir and add
 * the "compare" section to 'summary'. n_threads is accepted for later use (every run
 * is one search on this thread). Errors: no variants in the scenario, a variant
 * naming an unknown road or site, unreadable flood layers, write failures.
 * Caller destroys 'res' with compare_result_destroy. */
int compare_run(const inputs_t *in, network_t *net, const districts_t *districts,
                const char *outdir, int n_threads, int quiet, cJSON *summary,
                compare_result_t *res, err_t *e);
void compare_result_destroy(compare_result_t *res);
/* The human summary on stdout. */
void compare_print(const inputs_t *in, const compare_result_t *res);

#endif
