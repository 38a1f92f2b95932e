/* capacity: capacitated location. Fixed costs plus assignment costs, site
 * capacities (persons), a max cost per assignment, split (fractional) or
 * single-source assignment; unmet demand is a penalised variable, so the model
 * is never infeasible and the plan says who is left out and why. GLPK MIP. */
#ifndef CAPACITY_H
#define CAPACITY_H

#include "location.h"

/* Minimise sum fixed_cost x open + assignment cost + penalty x unserved persons.
 * Assignment cost of unit j at site i: o->per_unit_cost ? weight_j x cost_ij :
 * cost_ij (the cost of serving the whole unit), times the share served there.
 * o->p >= 0 limits the sites opened besides fixed-open ones; o->budget limits
 * their fixed cost; o->limit is the max cost of a pair. Penalty per unserved
 * person: o->penalty, or when <= 0, 1 + 10 x the largest per-person cost + the
 * sum of fixed costs / the smallest positive weight. Caller frees r with
 * loc_result_destroy. */
int capacity_solve(const loc_problem_t *p, const loc_opts_t *o, loc_result_t *r, err_t *e);

#endif
