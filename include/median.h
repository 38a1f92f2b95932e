/* median: the p-median model (choose p sites minimising total persons x cost to
 * the nearest open site), optionally with a max cost; unserved persons pay a
 * penalty instead of making the model infeasible. Exact MIP in GLPK using the
 * sorted-distance (closest-assignment) formulation with bound-based reductions. */
#ifndef MEDIAN_H
#define MEDIAN_H

#include "location.h"

/* Solve with o->p new sites (fixed-open sites come on top), o->limit as the max
 * cost and o->penalty per unserved person (automatic when <= 0: 10 x the largest
 * cost + 1). Objective = sum weight x cost + penalty x unserved persons.
 * Fills 'r' (caller frees with loc_result_destroy). */
int median_solve(const loc_problem_t *p, const loc_opts_t *o, loc_result_t *r, err_t *e);

#endif
