/* cover: maximal covering (choose p sites, or within a budget, to maximise the
 * persons within the limit) and set covering (fewest sites, or least fixed cost,
 * that put a target share of persons within the limit), plus the coverage curve
 * for p = 1..P. Units with identical sets of covering sites are merged first
 * (exact: the model only sees the set). Exact MIP in GLPK with a greedy +
 * interchange start. */
#ifndef COVER_H
#define COVER_H

#include "location.h"

/* Maximal covering within o->limit: o->p sites besides fixed-open ones
 * (o->p < 0: no count limit) and/or fixed cost within o->budget. Objective =
 * persons covered, fixed-open coverage included. Caller frees r. */
int cover_max(const loc_problem_t *p, const loc_opts_t *o, loc_result_t *r, err_t *e);

/* Set covering within o->limit: fewest sites (o->min_fixed_cost: least fixed
 * cost) so that o->share of the coverable persons is covered. Units no site can
 * cover are reported (why = LOC_NO_SITE_IN_REACH) and left out of the target.
 * Objective = sites opened (or their fixed cost), fixed-open ones excluded. */
int cover_set(const loc_problem_t *p, const loc_opts_t *o, loc_result_t *r, err_t *e);

typedef struct cover_point {
    int p;              /* sites opened besides fixed-open ones */
    double covered;     /* persons covered by the plan */
    double bound;       /* best bound on coverage */
    int status;         /* SOLVER_* */
    double seconds;
} cover_point_t;

/* Best coverage for p = 1..p_max, each solve started from the previous plan
 * plus the best greedy addition. *out gets p_max points (caller frees with free). */
int cover_curve(const loc_problem_t *p, const loc_opts_t *o, int p_max, cover_point_t **out,
                err_t *e);

#endif
