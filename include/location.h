/* location: the problem data every site-selection model reads, the options they
 * share and the plan they hand back. Demand units j carry a weight (persons);
 * candidate sites i carry a capacity (persons), a fixed cost and a state; costs
 * (seconds, or any cost) are a SPARSE list of (unit, site, cost) pairs, grouped by
 * unit and sorted by cost once loc_finish has run. Knows nothing of GDAL or GLPK. */
#ifndef LOCATION_H
#define LOCATION_H

#include <stddef.h>

#include "err.h"
#include "solver.h"

enum loc_state {
    LOC_CANDIDATE = 0,   /* may be opened */
    LOC_FIXED_OPEN,      /* existing site that stays open whatever the model says */
    LOC_MAY_CLOSE        /* existing site the model may keep or close (a candidate) */
};

/* Why a unit is not (fully) served in a plan. */
enum loc_why {
    LOC_SERVED = 0,
    LOC_NO_SITE_IN_REACH,  /* no site at all within the limit (or no cost pair) */
    LOC_NOT_CHOSEN,        /* sites within the limit exist but none was opened */
    LOC_CAPACITY           /* an open site is within the limit but had no room left */
};

typedef struct loc_problem {
    size_t n_units, n_sites;
    double *weight;        /* persons per unit, >= 0 */
    double *capacity;      /* persons per site; INFINITY = no limit */
    double *fixed_cost;    /* cost of opening (or keeping) a site, >= 0 */
    int *state;            /* enum loc_state per site */
    char **unit_id;        /* owned names, entries may be NULL */
    char **site_id;
    /* Pairs: after loc_finish, unit j's pairs are [unit_start[j], unit_start[j+1]),
     * sorted by cost (ties by site). Before, pairs are in insertion order. */
    size_t n_pairs, cap_pairs;
    int *pair_unit, *pair_site;
    double *pair_cost;     /* seconds or any cost, finite, >= 0 */
    size_t *unit_start;    /* n_units + 1 entries, set by loc_finish */
    int finished;
} loc_problem_t;

/* New problem with n_units units (weight 1) and n_sites candidates (no capacity
 * limit, fixed cost 0). Caller frees with loc_free. */
int loc_new(size_t n_units, size_t n_sites, loc_problem_t **out, err_t *e);
void loc_free(loc_problem_t *p);   /* NULL-safe */
/* Copy a name for a unit or a site (used in messages and outputs). */
int loc_set_unit_id(loc_problem_t *p, size_t unit, const char *id, err_t *e);
int loc_set_site_id(loc_problem_t *p, size_t site, const char *id, err_t *e);
/* Add one cost pair; a repeated (unit, site) pair keeps the smaller cost. */
int loc_add_pair(loc_problem_t *p, size_t unit, size_t site, double cost, err_t *e);
/* Validate weights, capacities, costs and states, group pairs by unit, sort them. */
int loc_finish(loc_problem_t *p, err_t *e);
/* Name of a unit or site for messages: its id, or "#<index+1>". buf >= 32 bytes. */
const char *loc_unit_name(const loc_problem_t *p, size_t unit, char *buf, size_t n);
const char *loc_site_name(const loc_problem_t *p, size_t site, char *buf, size_t n);

typedef struct loc_opts {
    solver_opts_t solver;  /* time limit (s), relative gap, presolve, cuts */
    int p;                 /* sites to open besides the fixed-open ones; < 0 = no count limit */
    double budget;         /* limit on fixed cost of sites opened besides fixed-open; INFINITY none */
    double limit;          /* coverage limit / max cost per assignment; INFINITY = none */
    double share;          /* set covering: share of coverable weight to cover, (0, 1] */
    double penalty;        /* cost per unserved person (median, capacity); <= 0 = automatic */
    int min_fixed_cost;    /* set covering: 1 = least fixed cost, 0 = fewest sites */
    int single_source;     /* capacity: 1 = each unit served by one site */
    int per_unit_cost;     /* capacity: 1 = pair cost is per person, 0 = for the whole unit */
    int heuristic;         /* 1 = greedy + interchange start handed to the solver */
    int merge;             /* covering: 1 = merge units with identical covering sets */
    int reduce;            /* median: 1 = bound-based reductions (Lagrangian + heuristic) */
} loc_opts_t;

/* p = -1 (no count limit), no budget, no limit, share 1, automatic penalty, fewest sites, split,
 * per-person cost, heuristic, merging and reductions on; solver defaults. */
void loc_opts_default(loc_opts_t *o);

typedef struct loc_result {
    int status;                /* SOLVER_* */
    double objective;          /* in the model's own terms (covered persons, cost) */
    double bound;              /* best bound proved on the objective */
    double gap;                /* relative gap */
    long nodes;
    double seconds;            /* total wall-clock, heuristic and reductions included */
    double solver_seconds;     /* of which in GLPK */
    double heuristic_objective;/* objective of the start (NAN when none) */
    size_t n_open;
    int *open;                 /* n_open site indices, ascending; owned */
    int *assign;               /* per unit: main serving site or -1; owned */
    double *served;            /* per unit: persons served; owned */
    int *why;                  /* per unit: enum loc_why; owned */
    double total_weight, served_weight, unserved_weight;  /* persons */
    double fixed_cost_total;   /* fixed cost of open sites */
    size_t units_before, units_after;  /* covering: units before/after merging */
    size_t n_cols, n_rows;     /* size of the MIP solved */
    size_t n_nonzeros;         /* constraint matrix entries */
    double lagrange_bound;     /* median: Lagrangian lower bound (NAN when not run) */
    size_t n_fixed;            /* median: site variables fixed by the bounds */
} loc_result_t;

void loc_result_destroy(loc_result_t *r);  /* NULL-safe; frees the arrays */

/* A demand unit's signature for merging: n ints at s (its sorted covering sites,
 * or covering tuples over scenarios), and the unit it belongs to. */
typedef struct loc_sig {
    const int *s;
    size_t n;
    size_t unit;
} loc_sig_t;

/* Merge units with identical signatures (exact for covering models): sorts 'us'
 * when 'merge' is set, then writes one group per distinct signature (one per unit
 * when 'merge' is 0): its weight (sum of weight[unit]) into w[], its signature into
 * out_sig[start[g] .. start[g+1]). Room: w and start for nu (+1) entries, out_sig for
 * the total length. Returns the number of groups. */
size_t loc_merge_sigs(loc_sig_t *us, size_t nu, int merge, const double *weight, double *w,
                      size_t *start, int *out_sig);

/* Shared checks: p within the candidate count, at least one candidate. */
int loc_check_p(const loc_problem_t *p, int count, err_t *e);

/* Fill the plan in 'r' from open sites (is_open[i] != 0): each unit goes to its
 * nearest open site within 'limit' (uncapacitated models). Sets open, assign,
 * served, why and the weight totals; leaves the solver fields alone. */
int loc_plan_nearest(const loc_problem_t *p, const unsigned char *is_open, double limit,
                     loc_result_t *r, err_t *e);

#endif
