/* Tests for the GLPK wrapper: a hand-checkable MIP, limits, infeasibility,
 * a heuristic start, and survival of a GLPK internal error. */
#include <math.h>

#include "check.h"
#include "solver.h"

/* max 5a + 4b + 3c  s.t. 2a + 3b + c <= 5, 4a + b + 2c <= 11, 3a + 4b + 2c <= 8,
 * a, b, c integer >= 0: the opening simplex example of Chvatal, Linear Programming
 * (1983), ch. 2, whose LP optimum a=2, b=0, c=1 (value 13) is integral. The
 * numbers are recalled from memory, so the test also enumerates every integer point. */
static double brute_force(void)
{
    double best = -1;
    for (int a = 0; a <= 5; a++)
        for (int b = 0; b <= 5; b++)
            for (int c = 0; c <= 11; c++)
                if (2 * a + 3 * b + c <= 5 && 4 * a + b + 2 * c <= 11 && 3 * a + 4 * b + 2 * c <= 8)
                    best = fmax(best, 5 * a + 4 * b + 3 * c);
    return best;
}

static int build(solver_mip_t **m, err_t *e)
{
    static const double obj[] = {5, 4, 3};
    static const int idx[] = {1, 2, 3};
    static const double r1[] = {2, 3, 1}, r2[] = {4, 1, 2}, r3[] = {3, 4, 2};
    int first;
    if (solver_mip_new("chvatal", SOLVER_MAX, m, e)) return e->code;
    if (solver_add_cols(*m, 3, SOLVER_INTEGER, 0, INFINITY, obj, &first, e)) return e->code;
    if (solver_add_row(*m, 3, idx, r1, -INFINITY, 5, NULL, e)) return e->code;
    if (solver_add_row(*m, 3, idx, r2, -INFINITY, 11, NULL, e)) return e->code;
    if (solver_add_row(*m, 3, idx, r3, -INFINITY, 8, NULL, e)) return e->code;
    return ERR_OK;
}

int main(void)
{
    err_t e = {0};
    solver_mip_t *m = NULL;
    solver_opts_t o;
    solver_result_t r;

    solver_opts_default(&o);
    /* Plain solve equals enumeration. */
    CHECK(build(&m, &e) == ERR_OK);
    CHECK(solver_solve(m, &o, NULL, &r, &e) == ERR_OK);
    CHECK(r.status == SOLVER_OPTIMAL);
    CHECK_NEAR(r.objective, brute_force(), 1e-9);
    CHECK_NEAR(r.objective, 13, 1e-9);
    CHECK_NEAR(r.gap, 0, 1e-12);
    CHECK(r.n_cols == 3);
    CHECK_NEAR(5 * r.x[1] + 4 * r.x[2] + 3 * r.x[3], 13, 1e-9);
    solver_result_destroy(&r);
    solver_mip_free(m);

    /* With a feasible start (a=1, b=1, c=0: value 9) the optimum is the same. */
    {
        double start[4] = {0, 1, 1, 0};
        CHECK(build(&m, &e) == ERR_OK);
        CHECK(solver_solve(m, &o, start, &r, &e) == ERR_OK);
        CHECK(r.status == SOLVER_OPTIMAL);
        CHECK_NEAR(r.objective, 13, 1e-9);
        solver_result_destroy(&r);
        solver_mip_free(m);
    }

    /* An infeasible start (a=2, b=1: row 1 gives 7 > 5; or a fraction) is
     * refused: GLPK would take it on trust and report a wrong optimum. */
    {
        double bad[4] = {0, 2, 1, 0}, frac[4] = {0, 0.5, 0, 0};
        CHECK(build(&m, &e) == ERR_OK);
        CHECK(solver_solve(m, &o, bad, &r, &e) == ERR_INTERNAL);
        CHECK_STR_HAS(e.msg, "starting plan is not feasible (row 1 = 7");
        CHECK(solver_solve(m, &o, frac, &r, &e) == ERR_INTERNAL);
        CHECK_STR_HAS(e.msg, "column 1 = 0.5 is outside its bounds or not integral");
        solver_result_destroy(&r);
        solver_mip_free(m);
    }

    /* Infeasible: x >= 2 and x <= 1. */
    {
        int first, one = 1;
        double v = 1;
        CHECK(solver_mip_new("infeasible", SOLVER_MIN, &m, &e) == ERR_OK);
        CHECK(solver_add_cols(m, 1, SOLVER_INTEGER, 2, 10, NULL, &first, &e) == ERR_OK);
        CHECK(solver_add_row(m, 1, &one, &v, -INFINITY, 1, NULL, &e) == ERR_OK);
        CHECK(solver_solve(m, &o, NULL, &r, &e) == ERR_OK);
        CHECK(r.status == SOLVER_INFEASIBLE);
        CHECK(r.x == NULL);
        solver_result_destroy(&r);
        solver_mip_free(m);
    }

    /* A GLPK internal error (a row naming the same column twice) must not end
     * the process: it comes back as ERR_SOLVER and GLPK works again after. */
    {
        int first, idx[2] = {1, 1};
        double v[2] = {1, 1};
        CHECK(solver_mip_new("broken", SOLVER_MIN, &m, &e) == ERR_OK);
        CHECK(solver_add_cols(m, 1, SOLVER_CONTINUOUS, 0, 1, NULL, &first, &e) == ERR_OK);
        CHECK(solver_add_row(m, 2, idx, v, 0, 1, NULL, &e) == ERR_SOLVER);
        CHECK_STR_HAS(e.msg, "broken");
        CHECK(solver_solve(m, &o, NULL, &r, &e) == ERR_SOLVER);
        solver_mip_free(m);
        CHECK(build(&m, &e) == ERR_OK);
        CHECK(solver_solve(m, &o, NULL, &r, &e) == ERR_OK);
        CHECK_NEAR(r.objective, 13, 1e-9);
        solver_result_destroy(&r);
        solver_mip_free(m);
    }

    /* Bad bounds are a programming error reported, not a crash. */
    {
        int first;
        CHECK(solver_mip_new("bounds", SOLVER_MIN, &m, &e) == ERR_OK);
        CHECK(solver_add_cols(m, 1, SOLVER_CONTINUOUS, 2, 1, NULL, &first, &e) == ERR_INTERNAL);
        CHECK_STR_HAS(e.msg, "bad column bounds");
        solver_mip_free(m);
    }
    CHECK(solver_status_name(SOLVER_FEASIBLE)[0] == 'f');
    return CHECK_DONE("test_solver");
}
