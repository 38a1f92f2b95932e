/* robust-solve: solve a robust covering instance given as text, for the
 * cross-check against scipy.optimize.milp (tests/xcheck/robust_scipy.sh).
 * Usage: robust-solve FILE [TIME_LIMIT_S]. FILE holds whitespace-separated numbers:
 *   n_units n_sites n_scen objective(0 worst, 1 expected) p
 *   n_scen scenario weights, n_units unit weights (persons),
 *   then triples "scenario unit site" (0-based) until the end: site covers unit.
 * Prints "objective X", "bound X", "status S" and "open i j ..." (0-based). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include "robust.h"

int main(int argc, char **argv)
{
    FILE *f;
    robust_problem_t *p = NULL;
    robust_opts_t o;
    robust_result_t r = {0};
    err_t e = {0};
    size_t nu, ns, nv;
    int obj, pp, v, j, i, rc = 1;

    if (argc < 2 || argc > 3 || (f = fopen(argv[1], "r")) == NULL) {
        fprintf(stderr, "usage: robust-solve FILE [TIME_LIMIT_S]\n");
        return 2;
    }
    if (fscanf(f, "%zu %zu %zu %d %d", &nu, &ns, &nv, &obj, &pp) != 5 ||
        robust_new(nu, ns, nv, &p, &e) != ERR_OK)
        goto done;
    for (size_t k = 0; k < nv; k++)
        if (fscanf(f, "%lf", &p->scen_weight[k]) != 1) goto done;
    for (size_t k = 0; k < nu; k++)
        if (fscanf(f, "%lf", &p->weight[k]) != 1) goto done;
    while (fscanf(f, "%d %d %d", &v, &j, &i) == 3)
        if (robust_add_cover(p, (size_t)v, (size_t)j, (size_t)i, &e) != ERR_OK) goto done;
    robust_opts_default(&o);
    o.objective = obj ? ROBUST_EXPECTED : ROBUST_WORST;
    o.p = pp;
    if (argc == 3) o.solver.time_limit_s = atof(argv[2]);
    if (robust_solve(p, &o, &r, &e) != ERR_OK) goto done;
    printf("objective %.10g\nbound %.10g\ngap %.6g\nheuristic %.10g\nseconds %.3f\n"
           "groups %zu of %zu units\nstatus %s\nopen", r.objective, r.bound, r.gap,
           r.heuristic_objective, r.seconds, r.units_after, r.units_before,
           solver_status_name(r.status));
    for (size_t k = 0; k < r.n_open; k++) printf(" %d", r.open[k]);
    printf("\n");
    rc = 0;
done:
    if (rc != 0) fprintf(stderr, "robust-solve: %s\n", e.msg[0] ? e.msg : "bad input file");
    fclose(f);
    robust_result_destroy(&r);
    robust_free(p);
    return rc;
}
