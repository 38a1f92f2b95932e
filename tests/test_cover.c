/* Tests for maximal covering, set covering and the coverage curve: a line of
 * five villages worked out on paper, merging of identical covering sets,
 * fixed-open sites, units nobody can reach, a time limit, and bad options. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "check.h"
#include "cover.h"
#include "heuristic.h"

/* Five villages on a road, 600 s apart (10 minutes):
 *   village   A    B    C    D    E
 *   position  0    600  1200 1800 2400 (seconds along the road)
 *   persons   100  300  200  50   400   (total 1050)
 * Every village is a candidate site; cost = |position difference|. Extra units
 * (not sites) can be appended at given positions. */
static const double pos5[5] = {0, 600, 1200, 1800, 2400};
static const double pop5[5] = {100, 300, 200, 50, 400};

static loc_problem_t *line(size_t n_extra, const double *xpos, const double *xpop)
{
    loc_problem_t *p = NULL;
    err_t e = {0};
    if (loc_new(5 + n_extra, 5, &p, &e) != ERR_OK) return NULL;
    for (size_t j = 0; j < 5 + n_extra; j++) {
        double x = j < 5 ? pos5[j] : xpos[j - 5];
        p->weight[j] = j < 5 ? pop5[j] : xpop[j - 5];
        for (size_t i = 0; i < 5; i++) loc_add_pair(p, j, i, fabs(x - pos5[i]), &e);
    }
    if (loc_finish(p, &e) != ERR_OK) {
        loc_free(p);
        return NULL;
    }
    return p;
}

static int is_open(const loc_result_t *r, int site)
{
    for (size_t k = 0; k < r->n_open; k++)
        if (r->open[k] == site) return 1;
    return 0;
}

int main(void)
{
    loc_problem_t *p = line(0, NULL, NULL);
    loc_opts_t o;
    loc_result_t r;
    err_t e = {0};

    CHECK(p != NULL);
    /* Limit 600 s: each site covers itself and its neighbours:
     *   A {A,B} 400, B {A,B,C} 600, C {B,C,D} 550, D {C,D,E} 650, E {D,E} 450.
     * p = 1: D covers most (650). p = 2: B + D (or B + E, A + D) cover all 1050. */
    loc_opts_default(&o);
    o.limit = 600;
    o.p = 1;
    CHECK(cover_max(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 650, 1e-9);
    CHECK(r.n_open == 1 && is_open(&r, 3));
    CHECK(r.status == SOLVER_OPTIMAL);
    CHECK_NEAR(r.served_weight, 650, 1e-9);
    CHECK_NEAR(r.unserved_weight, 400, 1e-9);
    CHECK(r.assign[0] == -1 && r.why[0] == LOC_NOT_CHOSEN);
    CHECK(r.assign[4] == 3 && r.why[4] == LOC_SERVED);
    CHECK(r.units_before == 5 && r.units_after == 5);
    loc_result_destroy(&r);

    o.p = 2;
    CHECK(cover_max(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 1050, 1e-9);
    CHECK(r.n_open == 2);    /* B+D, B+E or A+D all cover everybody */
    loc_result_destroy(&r);

    /* Without the heuristic start the answer is the same. */
    o.heuristic = 0;
    o.p = 1;
    CHECK(cover_max(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 650, 1e-9);
    loc_result_destroy(&r);
    o.heuristic = 1;

    /* Budget instead of p: fixed costs A..E = 5, 10, 10, 10, 5; budget 10.
     * Single sites within 10: D 650 best; pairs within 10: A+E covers
     * {A,B,D,E} = 850, which beats D alone. */
    {
        static const double f[5] = {5, 10, 10, 10, 5};
        for (int i = 0; i < 5; i++) p->fixed_cost[i] = f[i];
        o.p = -1;
        o.budget = 10;
        CHECK(cover_max(p, &o, &r, &e) == ERR_OK);
        CHECK_NEAR(r.objective, 850, 1e-9);
        CHECK(r.n_open == 2 && is_open(&r, 0) && is_open(&r, 4));
        CHECK_NEAR(r.fixed_cost_total, 10, 1e-9);
        loc_result_destroy(&r);
        for (int i = 0; i < 5; i++) p->fixed_cost[i] = 0;
        o.budget = INFINITY;
    }

    /* Set covering, limit 600: everybody needs 2 sites; 60% (630 persons) needs
     * only D (650). */
    loc_opts_default(&o);
    o.limit = 600;
    CHECK(cover_set(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 2, 1e-9);
    CHECK_NEAR(r.served_weight, 1050, 1e-9);
    loc_result_destroy(&r);
    o.share = 0.6;
    CHECK(cover_set(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 1, 1e-9);
    CHECK(is_open(&r, 3));
    loc_result_destroy(&r);
    /* Least fixed cost: A..E cost 1, 1, 1, 9, 1: covering all with B + E
     * (cost 2) beats anything using D. */
    {
        static const double f[5] = {1, 1, 1, 9, 1};
        for (int i = 0; i < 5; i++) p->fixed_cost[i] = f[i];
        o.share = 1;
        o.min_fixed_cost = 1;
        CHECK(cover_set(p, &o, &r, &e) == ERR_OK);
        CHECK_NEAR(r.objective, 2, 1e-9);
        CHECK(is_open(&r, 1) && is_open(&r, 4));
        loc_result_destroy(&r);
        for (int i = 0; i < 5; i++) p->fixed_cost[i] = 0;
    }

    /* Fixed-open E covers D and E (450) for free; p = 1 adds B (A, B, C: 600). */
    p->state[4] = LOC_FIXED_OPEN;
    loc_opts_default(&o);
    o.limit = 600;
    o.p = 1;
    CHECK(cover_max(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 1050, 1e-9);
    CHECK(r.n_open == 2 && is_open(&r, 1) && is_open(&r, 4));
    CHECK(r.units_before == 3);     /* D and E are covered before the model */
    loc_result_destroy(&r);
    /* Set covering counts only the sites it adds. */
    CHECK(cover_set(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 1, 1e-9);
    loc_result_destroy(&r);
    p->state[4] = LOC_CANDIDATE;
    /* p larger than the candidates that may be opened. */
    o.p = 5;
    p->state[0] = LOC_FIXED_OPEN;
    CHECK(cover_max(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "p = 5 is larger than the 4 candidate");
    p->state[0] = LOC_CANDIDATE;
    loc_free(p);

    /* Merging: F sits with A (same covering set {A,B}), G sits 5000 s out where
     * no site reaches within 600. Units before merging 6 (G excluded), after 5. */
    {
        static const double xp[2] = {0, 5000}, xw[2] = {70, 30};
        p = line(2, xp, xw);
        loc_opts_default(&o);
        o.limit = 600;
        o.p = 1;
        CHECK(cover_max(p, &o, &r, &e) == ERR_OK);
        CHECK(r.units_before == 6 && r.units_after == 5);
        /* B now covers 100 + 70 + 300 + 200 = 670 > D's 650. */
        CHECK_NEAR(r.objective, 670, 1e-9);
        CHECK(is_open(&r, 1));
        CHECK(r.why[6] == LOC_NO_SITE_IN_REACH);
        loc_result_destroy(&r);
        /* Without merging: same answer, 6 groups. */
        o.merge = 0;
        CHECK(cover_max(p, &o, &r, &e) == ERR_OK);
        CHECK_NEAR(r.objective, 670, 1e-9);
        CHECK(r.units_after == 6);
        loc_result_destroy(&r);
        /* Set cover with share 1: G cannot be covered; it is excluded from the
         * target (not an infeasible model) and reported. */
        o.merge = 1;
        CHECK(cover_set(p, &o, &r, &e) == ERR_OK);
        CHECK(r.status == SOLVER_OPTIMAL);
        CHECK_NEAR(r.objective, 2, 1e-9);
        CHECK_NEAR(r.unserved_weight, 30, 1e-9);
        CHECK(r.why[6] == LOC_NO_SITE_IN_REACH);
        loc_result_destroy(&r);

        /* Coverage curve p = 1..3: 670, 1120 (all coverable), 1120. */
        cover_point_t *c = NULL;
        CHECK(cover_curve(p, &o, 3, &c, &e) == ERR_OK);
        if (c != NULL) {
            CHECK_NEAR(c[0].covered, 670, 1e-9);
            CHECK_NEAR(c[1].covered, 1120, 1e-9);
            CHECK_NEAR(c[2].covered, 1120, 1e-9);
            CHECK(c[2].status == SOLVER_OPTIMAL && c[2].p == 3);
        }
        free(c);
        CHECK(cover_curve(p, &o, 0, &c, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "P must be >= 1");
        CHECK(cover_curve(p, &o, 9, &c, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "p = 9 is larger");
        loc_free(p);
    }

    /* Greedy with a budget: a free site that covers nobody must not stop the
     * search before a paid site that covers someone. */
    {
        unsigned char open2[2] = {0, 0};
        double v = -1;
        CHECK(loc_new(1, 2, &p, &e) == ERR_OK);
        p->weight[0] = 10;
        p->fixed_cost[1] = 5;
        CHECK(loc_add_pair(p, 0, 1, 100, &e) == ERR_OK);
        CHECK(loc_finish(p, &e) == ERR_OK);
        CHECK(heuristic_cover(p, 600, -1, 5, open2, &v, &e) == ERR_OK);
        CHECK_NEAR(v, 10, 0);
        CHECK(open2[1] == 1);
        loc_free(p);
    }

    /* Bad options. */
    p = line(0, NULL, NULL);
    loc_opts_default(&o);
    o.limit = 600;
    CHECK(cover_max(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "needs p or a budget");
    o.share = 1.5;
    CHECK(cover_set(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "target share 1.5");
    o.share = 1;
    o.limit = -1;
    o.p = 1;
    CHECK(cover_max(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "limit must be >= 0");
    loc_free(p);

    /* A time limit: a random instance too big to finish in 1 ms still gives
     * the heuristic plan, status "feasible (gap)" and a bound above it. */
    {
        size_t nu = 3000, ns = 300;
        unsigned s = 12345;
        CHECK(loc_new(nu, ns, &p, &e) == ERR_OK);
        for (size_t j = 0; j < nu; j++) {
            s = s * 1103515245u + 12345u;
            p->weight[j] = 1 + (s >> 16) % 100;
            for (int k = 0; k < 6; k++) {
                s = s * 1103515245u + 12345u;
                loc_add_pair(p, j, (s >> 8) % ns, (double)((s >> 4) % 900), &e);
            }
        }
        CHECK(loc_finish(p, &e) == ERR_OK);
        loc_opts_default(&o);
        o.limit = 600;
        o.p = 20;
        o.solver.time_limit_s = 1e-3;
        CHECK(cover_max(p, &o, &r, &e) == ERR_OK);
        CHECK(r.status == SOLVER_FEASIBLE || r.status == SOLVER_OPTIMAL);
        CHECK_STR_HAS(solver_status_name(r.status), r.status == SOLVER_FEASIBLE ? "feasible (gap)"
                                                                              : "optimal");
        CHECK(r.bound >= r.objective - 1e-6);
        CHECK(r.n_open == 20);
        CHECK_NEAR(r.served_weight, r.objective, 1e-6);
        printf("time limit: status %s, covered %.0f, bound %.1f, gap %.2e\n",
               solver_status_name(r.status), r.objective, r.bound, r.gap);
        loc_result_destroy(&r);
        loc_free(p);
    }
    return CHECK_DONE("test_cover");
}
