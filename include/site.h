/* site: the site-selection stage. Builds the models' problem either from the
 * grid (demand units = populated cells; candidate, existing and generated sites;
 * coverage lists from bounded searches run on all cores) or from CSV tables
 * (edge list or cost matrix), runs the model the scenario's "siting" section
 * names (max_cover, set_cover, p_median, capacitated), the coverage before
 * (existing sites only) and the coverage curve, evaluates an aggregated plan on
 * the cells, and writes the outputs and its part of summary.json. Reusable by
 * later commands (plan) like reach_run/reach_write. */
#ifndef SITE_H
#define SITE_H

#include <cJSON.h>

#include "cover.h"
#include "err.h"
#include "inputs.h"
#include "location.h"
#include "network.h"
#include "scenario.h"

enum site_origin { SITE_EXISTING = 0, SITE_LAYER = 1, SITE_GENERATED = 2, SITE_TABLE = 3 };

/* The problem as the stage built it. Units are populated cells (grid) or demand
 * rows (tables); sites are existing + candidate layer + generated (grid), or the
 * site table's rows. Costs are seconds, or table cost units, times the
 * capacitated model's assignment_cost_rate (cost_scale per unit of time/cost). */
typedef struct site_data {
    int is_grid;
    loc_problem_t *prob;      /* owned */
    double limit;             /* coverage limit / max cost, in prob's cost units; INFINITY */
    double cost_scale;        /* prob cost = scale x (seconds or table cost) */
    double total_people;      /* all people (grid total, or sum of demand weights) */
    /* Grid only (NULL for tables): */
    const grid_t *grid;       /* borrowed */
    int64_t *unit_cell;       /* n_units: cell of each unit */
    double *site_x, *site_y;  /* n_sites, grid CRS */
    int64_t *site_cell;       /* n_sites */
    char **site_name;         /* n_sites, owned ("" when none) */
    int *origin;              /* n_sites: enum site_origin */
    int *existing;            /* n_sites: 1 when the site is there today */
    size_t n_existing, n_layer, n_generated;
    double seconds_searches;  /* bounded searches */
    double seconds_build;     /* everything else of preparing */
} site_data_t;

typedef struct site_result {
    int model;                /* enum scen_site_model */
    loc_result_t plan;        /* the plan on the units of 'prob' (cells or demand rows) */
    double before_covered;    /* people within the limit of existing sites alone */
    size_t before_sites;
    /* Aggregation (median, capacitated with aggregate_cells = k > 1): */
    int k;                    /* 1 = none */
    size_t agg_units;         /* blocks given to the model */
    double objective_agg;     /* the model's objective on the blocks */
    double objective_cells;   /* the same plan evaluated on the cells */
    double penalty;           /* per unserved person (median, capacitated), cost units */
    double *flow;             /* capacitated, split: persons per pair of prob (the
                               * exact split behind the plan's loads); NULL otherwise */
    cover_point_t *curve;     /* coverage curve, n_curve points (NULL when none) */
    int n_curve;
    double seconds_model, seconds_curve;
} site_result_t;

/* Build the problem from the grid inputs and network 'net' (bounded searches on
 * n_threads threads; 0 = all cores). Errors: no siting section, no candidates,
 * duplicate ids across layers, candidate generation errors, search failures. */
int site_prepare_grid(const inputs_t *in, const network_t *net, int n_threads, int quiet,
                      site_data_t *d, err_t *e);
/* Build the problem from the scenario's inputs.tables. */
int site_prepare_tables(const scen_t *s, site_data_t *d, err_t *e);
void site_data_destroy(site_data_t *d);   /* NULL-safe; frees what d owns */

/* Run the model of s->siting on 'd'. A time limit is not an error (the status
 * says so); unmet demand is reported, not an error. */
int site_run(const scen_t *s, const site_data_t *d, int quiet, site_result_t *r, err_t *e);
void site_result_destroy(site_result_t *r);

/* Write sites.csv (+ sites.gpkg, assignment.tif, unserved.tif on grids),
 * assignment.csv (tables), unserved.csv, coverage_curve.csv and add the "site"
 * section (and its headline keys at the top level) to 'summary'. */
int site_write(const char *outdir, const scen_t *s, const site_data_t *d,
               const site_result_t *r, cJSON *summary, err_t *e);
/* The human summary on stdout, coverage before and after included. */
void site_print(const scen_t *s, const site_data_t *d, const site_result_t *r);
/* Model name as in the scenario ("max_cover", ...). */
const char *site_model_name(int model);

#endif
