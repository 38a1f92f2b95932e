/* heuristic: greedy add + one-swap interchange (Teitz-Bart style) for the
 * covering and median models. Gives a good plan fast; the models hand it to
 * GLPK as the first incumbent and use its value as an upper bound. */
#ifndef HEURISTIC_H
#define HEURISTIC_H

#include "location.h"

/* Maximal covering. is_open[n_sites] holds on entry the sites already open
 * (fixed-open ones and any warm start); sites are added until 'count' sites
 * that are not fixed-open are open (count < 0: no count limit) and their fixed
 * cost stays within 'budget', then swaps are tried while they raise coverage.
 * Fixed-open sites are never closed. *covered = persons within 'limit'. */
int heuristic_cover(const loc_problem_t *p, double limit, int count, double budget,
                    unsigned char *is_open, double *covered, err_t *e);

/* p-median: exactly 'count' non-fixed sites open (fewer only when there are
 * fewer candidates), minimising sum of weight x cost to the nearest open site
 * within 'limit', or 'penalty' per person when none. *cost = that sum. */
int heuristic_median(const loc_problem_t *p, int count, double limit, double penalty,
                     unsigned char *is_open, double *cost, err_t *e);

#endif
