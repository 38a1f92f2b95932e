/* robust: maximal covering over several scenarios at once (the base network and
 * its what-if variants). Choose p sites (or within a budget) so that the WORST
 * scenario's covered persons are as large as possible, or so that the weighted
 * sum over scenarios (EXPECTED coverage) is. Each scenario has its own covering
 * sets (which sites reach which unit under that scenario's travel times); a site
 * closed in a scenario simply has no pairs in it. Units whose tuple of covering
 * sets (one set per scenario) is identical are merged first (exact). Exact MIP in
 * GLPK through solver.h, started from a greedy plan on the same objective. */
#ifndef ROBUST_H
#define ROBUST_H

#include <stddef.h>

#include "err.h"
#include "location.h"
#include "solver.h"

enum robust_objective {
    ROBUST_WORST = 0,     /* max min_v covered_v */
    ROBUST_EXPECTED       /* max sum_v weight_v covered_v */
};

typedef struct robust_problem {
    size_t n_units, n_sites, n_scen;
    double *weight;       /* persons per unit, >= 0 (the same in every scenario) */
    int *state;           /* enum loc_state per site: LOC_FIXED_OPEN stays open and does not
                           * count against p or the budget; anything else is a candidate */
    double *fixed_cost;   /* per site, >= 0 (budget) */
    double *scen_weight;  /* per scenario, >= 0 (expected objective; need not sum to 1) */
    /* Covering pairs: site covers unit under scenario. Insertion order. */
    size_t n_pairs, cap_pairs;
    int *pair_scen, *pair_unit, *pair_site;
} robust_problem_t;

/* New problem: weights 1, all sites candidates, fixed cost 0, scenario weights 1.
 * Caller frees with robust_free. */
int robust_new(size_t n_units, size_t n_sites, size_t n_scen, robust_problem_t **out, err_t *e);
void robust_free(robust_problem_t *p);   /* NULL-safe */
/* Record that 'site' covers 'unit' under scenario 'scen' (repeats are harmless). */
int robust_add_cover(robust_problem_t *p, size_t scen, size_t unit, size_t site, err_t *e);

typedef struct robust_opts {
    solver_opts_t solver;
    int objective;        /* enum robust_objective */
    int p;                /* sites to open besides fixed-open ones; < 0 = no count limit */
    double budget;        /* fixed cost of opened sites; INFINITY = none */
    int heuristic;        /* 1 = greedy start offered to the solver */
    int merge;            /* 1 = merge units with identical covering-set tuples */
} robust_opts_t;

/* Worst case, p = -1, no budget, heuristic and merging on, solver defaults. */
void robust_opts_default(robust_opts_t *o);

typedef struct robust_result {
    int status;                 /* SOLVER_* */
    double objective;           /* persons: worst-case or weighted coverage of the plan */
    double bound;               /* best bound proved on it */
    double gap;                 /* relative */
    double heuristic_objective; /* of the greedy start; NAN when none */
    size_t n_open;
    int *open;                  /* open site indices ascending (fixed-open included); owned */
    double *covered;            /* persons covered per scenario by the plan; owned */
    double total_weight;        /* persons in all units */
    size_t units_before, units_after;  /* units with some cover, groups after merging */
    size_t n_cols, n_rows;
    long nodes;
    double seconds;
} robust_result_t;

void robust_result_destroy(robust_result_t *r);   /* NULL-safe */

/* Solve. Errors: no scenario, p above the candidate count, neither p nor budget,
 * negative or non-finite weights, expected objective with all scenario weights 0,
 * GLPK failure, NOMEM. */
int robust_solve(const robust_problem_t *p, const robust_opts_t *o, robust_result_t *r,
                 err_t *e);

/* Persons covered under each scenario (covered[0..n_scen-1]) by the open sites
 * is_open[i] != 0 (fixed-open sites count as open whatever is_open says). */
int robust_evaluate(const robust_problem_t *p, const unsigned char *is_open, double *covered,
                    err_t *e);

#endif
