/* Tests for robust siting over scenarios: small random instances checked against
 * a brute-force enumeration of every site set (the outside reference here is
 * plain enumeration, independent of GLPK and of the model's merging), a
 * hand-checkable bridge case, fixed-open sites, a budget, and bad input. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "check.h"
#include "robust.h"
#include "scen_siting.h"
#include "scenario.h"

/* Tiny deterministic generator (xorshift32) so the instances repeat. */
static unsigned rng_state = 2463534242u;
static unsigned rnd(void)
{
    rng_state ^= rng_state << 13;
    rng_state ^= rng_state >> 17;
    rng_state ^= rng_state << 5;
    return rng_state;
}

/* covers[v][j][i]: site i covers unit j in scenario v. */
enum { MAXS = 4, MAXU = 12, MAXI = 8 };
static unsigned char covers[MAXS][MAXU][MAXI];

/* Best objective over all sets of at most 'pmax' candidates (fixed-open always
 * in) within 'budget', by enumeration of all 2^n subsets. */
static double brute(const robust_problem_t *p, int objective, int pmax, double budget)
{
    double best = -1;
    size_t n = p->n_sites;
    for (unsigned mask = 0; mask < (1u << n); mask++) {
        int cnt = 0;
        double cost = 0, z = objective == ROBUST_WORST ? INFINITY : 0;
        for (size_t i = 0; i < n; i++)
            if (mask & (1u << i)) {
                if (p->state[i] == LOC_FIXED_OPEN) continue;
                cnt++;
                cost += p->fixed_cost[i];
            }
        if (pmax >= 0 && cnt > pmax) continue;
        if (isfinite(budget) && cost > budget + 1e-9) continue;
        for (size_t v = 0; v < p->n_scen; v++) {
            double c = 0;
            for (size_t j = 0; j < p->n_units; j++)
                for (size_t i = 0; i < n; i++)
                    if (covers[v][j][i] &&
                        ((mask & (1u << i)) || p->state[i] == LOC_FIXED_OPEN)) {
                        c += p->weight[j];
                        break;
                    }
            if (objective == ROBUST_WORST) z = fmin(z, c);
            else z += p->scen_weight[v] * c;
        }
        if (z > best) best = z;
    }
    return best;
}

static robust_problem_t *random_instance(size_t nu, size_t ns, size_t nv, int with_fixed)
{
    robust_problem_t *p = NULL;
    err_t e = {0};
    if (robust_new(nu, ns, nv, &p, &e) != ERR_OK) return NULL;
    memset(covers, 0, sizeof covers);
    for (size_t j = 0; j < nu; j++) p->weight[j] = (double)(1 + rnd() % 5) * 10;
    for (size_t i = 0; i < ns; i++) p->fixed_cost[i] = (double)(1 + rnd() % 4);
    if (with_fixed) p->state[rnd() % ns] = LOC_FIXED_OPEN;
    for (size_t v = 0; v < nv; v++) p->scen_weight[v] = (double)(1 + rnd() % 3) / 4.0;
    for (size_t v = 0; v < nv; v++)
        for (size_t j = 0; j < nu; j++)
            for (size_t i = 0; i < ns; i++) {
                /* A variant loses some of the base pairs and rarely gains one. */
                int base = v == 0 ? rnd() % 3 == 0 : covers[0][j][i];
                int c = v == 0 ? base : base ? rnd() % 3 != 0 : rnd() % 10 == 0;
                if (c) {
                    covers[v][j][i] = 1;
                    robust_add_cover(p, v, j, i, &e);
                    if (rnd() % 4 == 0) robust_add_cover(p, v, j, i, &e);  /* repeats harmless */
                }
            }
    return p;
}

static int plan_ok(const robust_problem_t *p, const robust_result_t *r, int pmax, double budget)
{
    int cnt = 0;
    double cost = 0;
    for (size_t k = 0; k < r->n_open; k++) {
        int i = r->open[k];
        if (p->state[i] == LOC_FIXED_OPEN) continue;
        cnt++;
        cost += p->fixed_cost[i];
    }
    for (size_t i = 0; i < p->n_sites; i++)
        if (p->state[i] == LOC_FIXED_OPEN) {
            int in = 0;
            for (size_t k = 0; k < r->n_open; k++) in |= r->open[k] == (int)i;
            if (!in) return 0;
        }
    return (pmax < 0 || cnt <= pmax) && (!isfinite(budget) || cost <= budget + 1e-9);
}

static void random_tests(void)
{
    err_t e = {0};
    int trials = 0;
    for (int t = 0; t < 60; t++) {
        size_t nu = 4 + rnd() % 8, ns = 5 + rnd() % 4, nv = 2 + rnd() % 3;
        int pp = 2 + (int)(rnd() % 2), obj = t % 2 ? ROBUST_EXPECTED : ROBUST_WORST;
        int use_budget = t % 5 == 4;
        robust_problem_t *p = random_instance(nu, ns, nv, t % 3 == 2);
        robust_opts_t o;
        robust_result_t r;
        CHECK(p != NULL);
        if (p == NULL) continue;
        robust_opts_default(&o);
        o.objective = obj;
        o.p = use_budget ? -1 : pp;
        o.budget = use_budget ? 4.0 : INFINITY;
        o.heuristic = t % 4 != 3;
        o.merge = t % 7 != 6;
        double want = brute(p, obj, o.p, o.budget);
        int rc = robust_solve(p, &o, &r, &e);
        CHECK(rc == ERR_OK);
        if (rc == ERR_OK) {
            CHECK(r.status == SOLVER_OPTIMAL);
            CHECK_NEAR(r.objective, want, 1e-6);
            CHECK_NEAR(r.bound, want, 1e-6 * fmax(1, want));
            CHECK(plan_ok(p, &r, o.p, o.budget));
            /* The greedy start is a feasible plan, never better than optimal. */
            if (o.heuristic) CHECK(r.heuristic_objective <= want + 1e-9);
            CHECK(r.units_after <= r.units_before);
            /* Per-scenario coverage agrees with robust_evaluate of the plan. */
            unsigned char is_open[MAXI] = {0};
            double cov[MAXS];
            for (size_t k = 0; k < r.n_open; k++) is_open[r.open[k]] = 1;
            CHECK(robust_evaluate(p, is_open, cov, &e) == ERR_OK);
            for (size_t v = 0; v < nv; v++) CHECK_NEAR(cov[v], r.covered[v], 1e-9);
            trials++;
        }
        robust_result_destroy(&r);
        robust_free(p);
    }
    CHECK(trials == 60);
}

/* Hand-checkable bridge case. Two candidates, one to open (p = 1):
 *   site N (0) north of the river, site S (1) south of it.
 *   units: town T (500 persons) north, village V (300 persons) south.
 *   base:    N covers T and V (the bridge is up), S covers V only.
 *   variant "bridge down": N covers T only, S covers V only.
 * Base alone: N covers 800 > S 300, so the base-only plan is N; under the
 * variant N then covers 500. Worst case: N -> min(800, 500) = 500, S -> min(300,
 * 300) = 300, so the robust plan is N too... Make the town smaller to see the
 * switch: T = 200. Then base: N 500 > S 300 (base picks N); worst: N ->
 * min(500, 200) = 200, S -> min(300, 300) = 300, so the robust plan picks S, the
 * site that keeps its cover when the bridge is cut. */
static void bridge_case(void)
{
    robust_problem_t *p = NULL;
    robust_opts_t o;
    robust_result_t r;
    err_t e = {0};

    CHECK(robust_new(2, 2, 2, &p, &e) == ERR_OK);
    p->weight[0] = 200;   /* T */
    p->weight[1] = 300;   /* V */
    robust_add_cover(p, 0, 0, 0, &e);
    robust_add_cover(p, 0, 1, 0, &e);
    robust_add_cover(p, 0, 1, 1, &e);
    robust_add_cover(p, 1, 0, 0, &e);
    robust_add_cover(p, 1, 1, 1, &e);
    robust_opts_default(&o);
    o.p = 1;
    CHECK(robust_solve(p, &o, &r, &e) == ERR_OK);
    CHECK(r.n_open == 1 && r.open[0] == 1);
    CHECK_NEAR(r.objective, 300, 1e-9);
    CHECK_NEAR(r.heuristic_objective, 300, 1e-9);   /* greedy: S (300) beats N (200) */
    CHECK_NEAR(r.covered[0], 300, 1e-9);
    CHECK_NEAR(r.covered[1], 300, 1e-9);
    CHECK_NEAR(r.total_weight, 500, 1e-9);
    robust_result_destroy(&r);
    /* Base weight only (variant weight 0): expected = base coverage, picks N (500). */
    o.objective = ROBUST_EXPECTED;
    p->scen_weight[1] = 0;
    CHECK(robust_solve(p, &o, &r, &e) == ERR_OK);
    CHECK(r.n_open == 1 && r.open[0] == 0);
    CHECK_NEAR(r.objective, 500, 1e-9);
    CHECK_NEAR(r.covered[1], 200, 1e-9);
    robust_result_destroy(&r);
    /* Equal weights 0.5: N 0.5*500 + 0.5*200 = 350 > S 300. */
    p->scen_weight[0] = p->scen_weight[1] = 0.5;
    CHECK(robust_solve(p, &o, &r, &e) == ERR_OK);
    CHECK(r.n_open == 1 && r.open[0] == 0);
    CHECK_NEAR(r.objective, 350, 1e-9);
    robust_result_destroy(&r);
    /* S kept open as an existing site; p = 1 more: N adds T in both -> worst 500. */
    p->state[1] = LOC_FIXED_OPEN;
    o.objective = ROBUST_WORST;
    CHECK(robust_solve(p, &o, &r, &e) == ERR_OK);
    CHECK(r.n_open == 2);
    CHECK_NEAR(r.objective, 500, 1e-9);
    robust_result_destroy(&r);
    robust_free(p);
}

static void bad_input(void)
{
    robust_problem_t *p = NULL;
    robust_opts_t o;
    robust_result_t r;
    err_t e = {0};

    CHECK(robust_new(2, 2, 0, &p, &e) == ERR_INPUT);
    CHECK(p == NULL);
    CHECK_STR_HAS(e.msg, "at least one scenario");

    CHECK(robust_new(2, 2, 2, &p, &e) == ERR_OK);
    CHECK(robust_add_cover(p, 2, 0, 0, &e) == ERR_INTERNAL);
    CHECK_STR_HAS(e.msg, "out of range");
    robust_opts_default(&o);
    CHECK(robust_solve(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "needs p or a budget");
    o.p = 3;
    CHECK(robust_solve(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "only 2 candidate sites");
    o.p = 1;
    p->scen_weight[1] = -1;
    CHECK(robust_solve(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "scenario 2 has weight -1");
    p->scen_weight[0] = p->scen_weight[1] = 0;
    o.objective = ROBUST_EXPECTED;
    CHECK(robust_solve(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "every scenario weight is 0");
    p->scen_weight[0] = 1;
    p->weight[1] = NAN;
    CHECK(robust_solve(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "unit 2 has weight");
    p->weight[1] = 1;
    p->fixed_cost[0] = -2;
    CHECK(robust_solve(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "site 1 has fixed cost -2");
    p->fixed_cost[0] = 0;
    p->state[0] = p->state[1] = LOC_FIXED_OPEN;
    o.p = 0;
    CHECK(robust_solve(p, &o, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "no candidate site");
    /* No pairs at all: a valid, empty plan. */
    p->state[0] = p->state[1] = LOC_CANDIDATE;
    o.p = 1;
    CHECK(robust_solve(p, &o, &r, &e) == ERR_OK);
    CHECK_NEAR(r.objective, 0, 1e-12);
    robust_result_destroy(&r);
    robust_free(p);
    robust_free(NULL);
    robust_result_destroy(NULL);
}

/* The "siting.robust" key: defaults, weights, and every refusal. */
#define HEAD "{\"inputs\": {\"population\": \"p.tif\", \"roads\": {\"path\": \"r.gpkg\", " \
             "\"class_field\": \"highway\"}}, \"variants\": [{\"name\": \"bridge down\", " \
             "\"close_roads\": {\"ids\": [\"7\"]}}, {\"name\": \"rain\", \"close_roads\": " \
             "{\"ids\": [\"8\"]}}], \"siting\": {\"p\": 2, "

static void refuse(const char *json, const char *sub)
{
    scen_t *s = (scen_t *)1;
    err_t e = {0, ""};
    CHECK(scen_parse(json, "case/bad.json", &s, &e) == ERR_INPUT);
    CHECK(e.code == ERR_INPUT);
    CHECK(s == NULL);
    CHECK_STR_HAS(e.msg, sub);
    CHECK_STR_HAS(e.msg, "case/bad.json");
}

static void scenario_keys(void)
{
    scen_t *s = NULL;
    err_t e = {0, ""};

    CHECK(scen_parse(HEAD "\"robust\": {}}}", "d/x.json", &s, &e) == ERR_OK);
    if (s != NULL) {
        CHECK(s->siting->robust == 1 && s->siting->robust_objective == 0);
        CHECK_NEAR(s->siting->robust_base_weight, 1, 0);
        CHECK_NEAR(scen_siting_robust_weight(s->siting, "rain"), 1, 0);
    }
    scen_free(s);
    s = NULL;
    CHECK(scen_parse(HEAD "\"robust\": {\"objective\": \"expected\", \"base_weight\": 0.5, "
                     "\"weights\": {\"bridge down\": 0.2, \"rain\": 0}}}}", "d/x.json", &s, &e) == ERR_OK);
    if (s != NULL) {
        CHECK(s->siting->robust_objective == 1);
        CHECK_NEAR(s->siting->robust_base_weight, 0.5, 0);
        CHECK_NEAR(scen_siting_robust_weight(s->siting, "bridge down"), 0.2, 0);
        CHECK_NEAR(scen_siting_robust_weight(s->siting, "rain"), 0, 0);
    }
    scen_free(s);
    s = NULL;
    CHECK(scen_parse(HEAD "\"model\": \"set_cover\"}}", "d/x.json", &s, &e) == ERR_OK);
    CHECK(s != NULL && s->siting->robust == 0);
    scen_free(s);

    refuse(HEAD "\"robust\": {\"objective\": \"expected\", \"weights\": {\"bridge\": 1}}}}",
           "key 'siting.robust.weights.bridge' names no variant");
    refuse(HEAD "\"robust\": {\"objective\": \"expected\", \"weights\": {\"rain\": -1}}}}",
           "siting.robust.weights.rain");
    refuse(HEAD "\"robust\": {\"objective\": \"expected\", \"base_weight\": -0.1}}}",
           "siting.robust.base_weight");
    refuse(HEAD "\"robust\": {\"objective\": \"expected\", \"base_weight\": 0, "
           "\"weights\": {\"rain\": 0, \"bridge down\": 0}}}}", "every weight in 'siting.robust' is 0");
    refuse(HEAD "\"robust\": {\"weights\": {\"rain\": 2}}}}", "apply to objective 'expected' only");
    refuse(HEAD "\"robust\": {\"objective\": \"best\"}}}", "siting.robust.objective");
    refuse(HEAD "\"robust\": {\"objectve\": \"worst\"}}}", "did you mean 'objective'");
    refuse(HEAD "\"model\": \"p_median\", \"robust\": {}}}", "model 'max_cover' only");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"siting\": {\"p\": 1, "
           "\"robust\": {}}}", "has no 'variants' section");
}

int main(void)
{
    scenario_keys();
    random_tests();
    bridge_case();
    bad_input();
    return CHECK_DONE("test_robust");
}
