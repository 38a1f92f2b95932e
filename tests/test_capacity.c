/* Tests for capacitated location: the five villages served from two depots at
 * B and D worked out on paper (split and single-source), capacities below
 * demand giving unmet demand rather than an error, a max cost, fixed costs and
 * the count and budget limits, and bad options. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "capacity.h"
#include "check.h"

/* Villages A..E at 300, 600, 1200, 1800, 2100 s along a road with 100, 300,
 * 200, 50, 400 persons (1050). Sites: 0 = depot at B (600), 1 = depot at D
 * (1800), 2 = depot at C (1200). Cost = |position difference| per person. */
static const double pos5[5] = {300, 600, 1200, 1800, 2100};
static const double pop5[5] = {100, 300, 200, 50, 400};
static const double spos[3] = {600, 1800, 1200};

static loc_problem_t *villages(void)
{
    loc_problem_t *p = NULL;
    err_t e = {0};
    if (loc_new(5, 3, &p, &e) != ERR_OK) return NULL;
    for (size_t j = 0; j < 5; j++) {
        p->weight[j] = pop5[j];
        for (size_t i = 0; i < 3; i++) loc_add_pair(p, j, i, fabs(pos5[j] - spos[i]), &e);
    }
    return p;
}

int main(void)
{
    loc_problem_t *p = villages();
    loc_opts_t o;
    loc_result_t r;
    err_t e = {0};

    /* Depots B and D only (C gets a prohibitive fixed cost), capacity 500
     * each, no fixed cost, penalty 10000 per unserved person. 1050 persons, room
     * for 1000: the 50 left out are the dearest to serve. Per-person costs:
     * A 300 (to B), B 0, C 600 (either), D 0, E 300 (to D); so 50 of C's 200.
     * Split: 100*300 + 400*300 + 150*600 = 240000, plus 10000 x 50. */
    p->capacity[0] = p->capacity[1] = 500;
    p->fixed_cost[2] = 1e9;
    CHECK(loc_finish(p, &e) == ERR_OK);
    loc_opts_default(&o);
    o.penalty = 10000;
    CHECK(capacity_solve(p, &o, &r, &e) == ERR_OK);
    CHECK(r.status == SOLVER_OPTIMAL);
    CHECK_NEAR(r.objective, 240000 + 500000, 1e-4);
    CHECK(r.n_open == 2 && r.open[0] == 0 && r.open[1] == 1);
    CHECK_NEAR(r.unserved_weight, 50, 1e-6);
    CHECK_NEAR(r.served[2], 150, 1e-6);
    CHECK(r.why[2] == LOC_CAPACITY);
    CHECK(r.why[0] == LOC_SERVED && r.assign[0] == 0 && r.assign[4] == 1);
    loc_result_destroy(&r);

    /* Single-source: whole units into two depots of 500. At least 50 persons
     * must be left out; leaving out D (50) lets {A, E} and {B, C} fill 500 each.
     * Best: B's depot takes B, C (0 + 200*600), D's depot takes A, E
     * (100*1500 + 400*300): 390000, plus 10000 x 50 (D, capacity). Leaving out
     * A instead costs 240000 + 10000 x 100. */
    o.single_source = 1;
    CHECK(capacity_solve(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 390000 + 500000, 1e-4);
    CHECK_NEAR(r.unserved_weight, 50, 1e-6);
    CHECK(r.why[3] == LOC_CAPACITY && r.served[3] == 0 && r.assign[3] == -1);
    CHECK(r.assign[0] == 1 && r.assign[2] == 0);
    loc_result_destroy(&r);
    o.single_source = 0;

    /* Max cost 500 s: C is 600 from both open depots, room is no longer short:
     * 100*300 + 400*300 + 10000 x 200. C's own depot (too dear to open) is in
     * reach, so C is "not chosen"; with that depot gone, "no site in reach". */
    o.limit = 500;
    CHECK(capacity_solve(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.unserved_weight, 200, 1e-6);
    CHECK(r.why[2] == LOC_NOT_CHOSEN);
    CHECK(r.why[0] == LOC_SERVED && r.why[4] == LOC_SERVED);
    CHECK_NEAR(r.objective, 150000 + 2000000, 1e-4);
    loc_result_destroy(&r);
    o.limit = 400;
    CHECK(capacity_solve(p, &o, &r, &e) == ERR_OK);
    CHECK(r.why[2] == LOC_NOT_CHOSEN);
    loc_result_destroy(&r);
    {
        loc_problem_t *q = NULL;
        CHECK(loc_new(1, 1, &q, &e) == ERR_OK);
        CHECK(loc_add_pair(q, 0, 0, 900, &e) == ERR_OK);
        CHECK(loc_finish(q, &e) == ERR_OK);
        CHECK(capacity_solve(q, &o, &r, &e) == ERR_OK);
        CHECK(r.why[0] == LOC_NO_SITE_IN_REACH && r.n_open == 0);
        loc_result_destroy(&r);
        loc_free(q);
    }
    o.limit = INFINITY;

    /* Whole-unit costs (per_unit_cost = 0): the cost is for all of a unit, times
     * the share served. Unit costs A 300, C 600, E 300; per person A 3, C 3,
     * E 0.75, so 50 persons of A or C (saving 150 either way) are left out:
     * 300 + 600 + 300 - 150 = 1050, plus 10000 x 50. */
    o.per_unit_cost = 0;
    CHECK(capacity_solve(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 1050 + 500000, 1e-4);
    loc_result_destroy(&r);
    o.per_unit_cost = 1;

    /* No capacity limits; fixed costs B, D 400000, C 1000; p = 1. C alone:
     * 100*900 + 300*600 + 0 + 50*600 + 400*900 = 660000, + 1000 = 661000;
     * B alone costs 810000 + 400000. */
    p->fixed_cost[2] = 1000;
    p->fixed_cost[0] = p->fixed_cost[1] = 400000;
    p->capacity[0] = p->capacity[1] = INFINITY;
    CHECK(loc_finish(p, &e) == ERR_OK);
    o.p = 1;
    CHECK(capacity_solve(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 661000, 1e-4);
    CHECK(r.n_open == 1 && r.open[0] == 2);
    CHECK_NEAR(r.fixed_cost_total, 1000, 1e-9);
    loc_result_destroy(&r);
    /* Budget 500 on fixed cost: no site is affordable, so nobody is served
     * (all 1050 persons, reported, not an error). */
    o.p = -1;
    o.budget = 500;
    CHECK(capacity_solve(p, &o, &r, &e) == ERR_OK);
    CHECK(r.n_open == 0);
    CHECK_NEAR(r.unserved_weight, 1050, 1e-6);
    CHECK(r.why[0] == LOC_NOT_CHOSEN);
    loc_result_destroy(&r);
    o.budget = INFINITY;
    /* A fixed-open depot at B stays open whatever its fixed cost. */
    p->state[0] = LOC_FIXED_OPEN;
    CHECK(capacity_solve(p, &o, &r, &e) == ERR_OK);
    CHECK(r.n_open >= 1 && r.open[0] == 0);
    loc_result_destroy(&r);
    p->state[0] = LOC_CANDIDATE;

    /* Zero-weight unit: served nothing, costs nothing, no error. */
    p->weight[3] = 0;
    CHECK(loc_finish(p, &e) == ERR_OK);
    CHECK(capacity_solve(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.total_weight, 1000, 1e-9);
    CHECK_NEAR(r.unserved_weight, 0, 1e-9);
    loc_result_destroy(&r);

    /* Bad options. */
    o.p = 4;
    CHECK(capacity_solve(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "p = 4 is larger than the 3 candidate");
    loc_free(p);
    return CHECK_DONE("test_capacity");
}
