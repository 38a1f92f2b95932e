/* scen_siting: the scenario's "siting" section (see docs/siting.md): which
 * site-selection model to run, its limits, solver options, how existing sites
 * count, optional candidate generation along roads, and aggregation of demand
 * cells. Read by src/io/scen_siting.c; reached as scen_t.siting (NULL when
 * absent). Units inside: seconds and metres; the file speaks minutes. */
#ifndef SCEN_SITING_H
#define SCEN_SITING_H

#include <stddef.h>

enum scen_site_model {
    SCEN_SITE_MAX_COVER = 0,  /* most people within the limit with p sites / a budget */
    SCEN_SITE_SET_COVER,      /* fewest sites (or least fixed cost) covering a target share */
    SCEN_SITE_P_MEDIAN,       /* p sites, least total person-time, max time = the limit */
    SCEN_SITE_CAPACITATED     /* fixed + assignment cost, capacities, unmet demand penalised */
};

enum scen_site_existing {
    SCEN_EXISTING_KEEP = 0,   /* existing sites stay open and count against nothing */
    SCEN_EXISTING_MAY_CLOSE   /* the model may close an existing site (its cost is keeping it) */
};

enum scen_site_generate {
    SCEN_GEN_NONE = 0,        /* candidates come from sites.candidates only */
    SCEN_GEN_JUNCTIONS,       /* road junctions in or near populated cells */
    SCEN_GEN_ALONG_ROADS      /* points every spacing_m along the roads */
};

struct scen_siting {
    int present;            /* 1: the section was given */
    int model;              /* enum scen_site_model; default max_cover */
    int p;                  /* "p": sites to open besides kept ones; -1 = not given */
    double budget;          /* "budget": limit on fixed cost of new sites; INFINITY = none */
    double limit_s;         /* "limit_min" x 60 (grids); NAN = coverage.limit_min */
    double limit_cost;      /* "limit" (table inputs, in the tables' cost unit); NAN = none */
    double target_share;    /* "target_share" (set_cover), (0, 1], default 1 */
    int min_fixed_cost;     /* "minimise": 0 = "sites" (default), 1 = "fixed_cost" */
    int single_source;      /* "assignment": 0 = "split" (default), 1 = "single" */
    double cost_rate;       /* "assignment_cost_rate": cost per person per minute (grids) or
                             * per table cost unit (tables); default 1, (0, 1e9] */
    double penalty;         /* "penalty_per_person"; 0 = automatic */
    int existing;           /* "existing": enum scen_site_existing; default keep */
    int aggregate_cells;    /* "aggregate_cells": k -> k x k blocks (median, capacitated); 1 */
    int curve_max_p;        /* "curve_max_p": coverage curve p = 1..P; -1 = default (p for
                             * max_cover, else none); 0 = none */
    double time_limit_s;    /* "time_limit_s": solver wall-clock limit; default 600 */
    double gap;             /* "gap": relative gap accepted, [0, 0.5]; default 0 */
    /* "candidates": generated candidate sites (grids with roads only). */
    int generate;           /* enum scen_site_generate */
    double spacing_m;       /* "candidates.spacing_m" (along_roads), default 1000 */
    double min_spacing_m;   /* "candidates.min_spacing_m", default 500 */
    double near_m;          /* "candidates.near_m": how near populated cells, default 500 */
    double min_people;      /* "candidates.min_people" within near_m, default 1 */
    double gen_capacity;    /* "candidates.capacity" persons; INFINITY = none */
    double gen_fixed_cost;  /* "candidates.fixed_cost", default 0 */
    int gen_max;            /* "candidates.max": at most this many generated, default 2000 */
    /* "robust": choose the sites over the base and every variant at once (max_cover
     * on grids only; needs the "variants" section). */
    int robust;             /* 1: "siting.robust" was given */
    int robust_objective;   /* "robust.objective": 0 = "worst" (default), 1 = "expected" */
    double robust_base_weight;  /* "robust.base_weight" (expected), >= 0, default 1 */
    char **robust_names;    /* "robust.weights": variant name -> weight (expected); variants */
    double *robust_weights; /*   not named weigh 1; names are checked against "variants" */
    size_t n_robust_weights;
};

/* Weight of variant 'name' in the robust expected objective (1 when not named). */
double scen_siting_robust_weight(const struct scen_siting *x, const char *name);

#endif
