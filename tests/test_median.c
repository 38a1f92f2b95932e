/* Tests for the p-median model and the median heuristic: the line of five
 * villages worked out on paper, a max cost with penalised unserved persons,
 * fixed-open sites, the reductions on and off, a time limit, bad options. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "check.h"
#include "heuristic.h"
#include "median.h"

/* Five villages on a road, 600 s apart:
 *   village   A    B    C    D    E
 *   position  0    600  1200 1800 2400 (s)
 *   persons   100  300  200  50   400   (total 1050)
 * p = 1: the weighted median village is C (cumulative 100, 400, 600 >= 525):
 *   C: 100*1200 + 300*600 + 0 + 50*600 + 400*1200 = 810000
 *   (B: 960000, D: 900000, E: 1050000, A larger still).
 * p = 2: {B, E}: A->B 60000, C->B 120000, D->E 30000 = 210000, the best pair
 *   ({C, E} 330000, {B, D} 420000, {A, E} 450000; the rest are worse). */
static const double pos5[5] = {0, 600, 1200, 1800, 2400};
static const double pop5[5] = {100, 300, 200, 50, 400};

static loc_problem_t *line(void)
{
    loc_problem_t *p = NULL;
    err_t e = {0};
    if (loc_new(5, 5, &p, &e) != ERR_OK) return NULL;
    for (size_t j = 0; j < 5; j++) {
        p->weight[j] = pop5[j];
        for (size_t i = 0; i < 5; i++) loc_add_pair(p, j, i, fabs(pos5[j] - pos5[i]), &e);
    }
    if (loc_finish(p, &e) != ERR_OK) {
        loc_free(p);
        return NULL;
    }
    return p;
}

/* Brute force over all pairs of sites of a random instance (dense costs). */
static double brute2(const loc_problem_t *p, const double *cost)
{
    double best = INFINITY;
    for (size_t a = 0; a < p->n_sites; a++)
        for (size_t b = a + 1; b < p->n_sites; b++) {
            double s = 0;
            for (size_t j = 0; j < p->n_units; j++)
                s += p->weight[j] * fmin(cost[j * p->n_sites + a], cost[j * p->n_sites + b]);
            best = fmin(best, s);
        }
    return best;
}

int main(void)
{
    loc_problem_t *p = line();
    loc_opts_t o;
    loc_result_t r;
    err_t e = {0};

    CHECK(p != NULL);
    loc_opts_default(&o);
    o.p = 1;
    CHECK(median_solve(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 810000, 1e-6);
    CHECK(r.n_open == 1 && r.open[0] == 2);
    CHECK(r.status == SOLVER_OPTIMAL);
    CHECK_STR_HAS(solver_status_name(r.status), "optimal");
    CHECK(r.assign[0] == 2 && r.assign[4] == 2);
    CHECK_NEAR(r.served_weight, 1050, 1e-9);
    loc_result_destroy(&r);

    o.p = 2;
    for (int reduce = 0; reduce <= 1; reduce++)
        for (int heur = 0; heur <= 1; heur++) {
            o.reduce = reduce;
            o.heuristic = heur;
            CHECK(median_solve(p, &o, &r, &e) == ERR_OK);
            CHECK_NEAR(r.objective, 210000, 1e-6);
            CHECK(r.n_open == 2 && r.open[0] == 1 && r.open[1] == 4);
            CHECK(r.assign[2] == 1 && r.assign[3] == 4);
            loc_result_destroy(&r);
        }
    o.reduce = o.heuristic = 1;

    /* The heuristic alone on the same case. */
    {
        unsigned char open[5] = {0};
        double v;
        CHECK(heuristic_median(p, 2, INFINITY, 1e9, open, &v, &e) == ERR_OK);
        CHECK_NEAR(v, 210000, 1e-6);
        CHECK(open[1] && open[4]);
    }

    /* Max cost 600 s with p = 1 and penalty 1100 per person:
     *   A: B 300*600 = 180000 + (C, D, E) 650*1100 = 895000
     *   B: A 100*600 + C 200*600 = 180000 + (D, E) 450*1100 = 675000 (best)
     *   C: B 180000 + D 30000 = 210000 + (A, E) 500*1100 = 760000
     *   D: C 120000 + E 240000 = 360000 + (A, B) 400*1100 = 800000
     *   E: D 30000 + (A, B, C) 600*1100 = 690000
     * (with penalty 1000, B and E tie at 630000). */
    o.p = 1;
    o.limit = 600;
    o.penalty = 1100;
    CHECK(median_solve(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 675000, 1e-6);
    CHECK(r.n_open == 1 && r.open[0] == 1);
    CHECK_NEAR(r.unserved_weight, 450, 1e-9);
    CHECK(r.why[3] == LOC_NOT_CHOSEN && r.why[4] == LOC_NOT_CHOSEN && r.assign[4] == -1);
    loc_result_destroy(&r);
    /* A penalty below the costs: nobody is worth serving beyond it. Penalty 500
     * per person makes 600 s trips pointless: only the opened village is served;
     * E (400 persons) pays nothing, the other 650 pay 500 each = 325000. */
    o.penalty = 500;
    CHECK(median_solve(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 325000, 1e-6);
    CHECK(r.n_open == 1 && r.open[0] == 4);
    loc_result_destroy(&r);
    o.penalty = 0;
    o.limit = INFINITY;

    /* Fixed-open E with p = 1: the best partner is B (the p = 2 optimum). */
    p->state[4] = LOC_FIXED_OPEN;
    CHECK(median_solve(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 210000, 1e-6);
    CHECK(r.n_open == 2 && r.open[0] == 1 && r.open[1] == 4);
    loc_result_destroy(&r);
    /* p = 0: only E: 100*2400 + 300*1800 + 200*1200 + 50*600 = 1050000. */
    o.p = 0;
    CHECK(median_solve(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 1050000, 1e-6);
    loc_result_destroy(&r);
    p->state[4] = LOC_CANDIDATE;

    /* Bad options. */
    o.p = -1;
    CHECK(median_solve(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "p must be given");
    o.p = 6;
    CHECK(median_solve(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "p = 6 is larger than the 5 candidate");
    loc_free(p);
    CHECK(loc_new(3, 0, &p, &e) == ERR_OK);
    CHECK(loc_finish(p, &e) == ERR_OK);
    o.p = 1;
    CHECK(median_solve(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "no candidate sites");
    loc_free(p);
    CHECK(loc_new(3, 2, &p, &e) == ERR_OK);
    CHECK(loc_add_pair(p, 0, 1, -3, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "cost from unit '#1' to site '#2' is -3");
    CHECK(loc_add_pair(p, 0, 1, NAN, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "must be finite");
    p->weight[2] = -1;
    CHECK(loc_finish(p, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "weight of unit '#3' is -1");
    p->weight[2] = 1;
    loc_set_site_id(p, 0, "depot", &e);
    p->capacity[0] = -5;
    CHECK(loc_finish(p, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "capacity of site 'depot' is -5");
    p->capacity[0] = INFINITY;
    o.p = 1;
    CHECK(median_solve(p, &o, &r, &e) == ERR_INTERNAL);
    CHECK_STR_HAS(e.msg, "not finished");
    loc_free(p);

    /* Random instances, p = 2: exact against brute force, reductions on/off. */
    for (int t = 0; t < 5; t++) {
        size_t nu = 40, ns = 12;
        unsigned s = 777u + (unsigned)t;
        double *cost = malloc(nu * ns * sizeof *cost);
        CHECK(loc_new(nu, ns, &p, &e) == ERR_OK);
        for (size_t j = 0; j < nu; j++) {
            s = s * 1103515245u + 12345u;
            p->weight[j] = 1 + (s >> 16) % 50;
            for (size_t i = 0; i < ns; i++) {
                s = s * 1103515245u + 12345u;
                cost[j * ns + i] = (double)((s >> 16) % 1000);
                loc_add_pair(p, j, i, cost[j * ns + i], &e);
            }
        }
        CHECK(loc_finish(p, &e) == ERR_OK);
        double want = brute2(p, cost);
        loc_opts_default(&o);
        o.p = 2;
        CHECK(median_solve(p, &o, &r, &e) == ERR_OK);
        CHECK_NEAR(r.objective, want, 1e-6);
        loc_result_destroy(&r);
        o.reduce = 0;
        CHECK(median_solve(p, &o, &r, &e) == ERR_OK);
        CHECK_NEAR(r.objective, want, 1e-6);
        loc_result_destroy(&r);
        free(cost);
        loc_free(p);
    }

    /* Time limit: status "feasible (gap)" with a bound below the plan. */
    {
        size_t n = 300;
        unsigned s = 99;
        double *x = malloc(n * sizeof *x), *y = malloc(n * sizeof *y);
        CHECK(loc_new(n, n, &p, &e) == ERR_OK);
        for (size_t j = 0; j < n; j++) {
            s = s * 1103515245u + 12345u;
            x[j] = (s >> 16) % 10000;
            s = s * 1103515245u + 12345u;
            y[j] = (s >> 16) % 10000;
        }
        for (size_t j = 0; j < n; j++)
            for (size_t i = 0; i < n; i++)
                loc_add_pair(p, j, i, hypot(x[j] - x[i], y[j] - y[i]), &e);
        CHECK(loc_finish(p, &e) == ERR_OK);
        loc_opts_default(&o);
        o.p = 15;
        o.reduce = 0;
        o.solver.time_limit_s = 1e-3;
        CHECK(median_solve(p, &o, &r, &e) == ERR_OK);
        CHECK(r.status == SOLVER_FEASIBLE);
        CHECK_STR_HAS(solver_status_name(r.status), "feasible (gap)");
        CHECK(r.bound <= r.objective + 1e-6 && r.gap > 0);
        CHECK(r.n_open == 15);
        printf("time limit: %s, objective %.1f, bound %.1f, gap %.3f\n",
               solver_status_name(r.status), r.objective, r.bound, r.gap);
        loc_result_destroy(&r);
        loc_free(p);
        free(x);
        free(y);
    }
    return CHECK_DONE("test_median");
}
