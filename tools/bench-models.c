/* bench-models: figures for the covering models on an invented geometric
 * district: demand points on a square grid, candidate sites scattered at
 * random, cost = straight-line distance / speed (seconds), coverage limit T.
 * Prints units before/after merging and solve times with merging on and off.
 * Usage: bench-models [grid_side sites p limit_s [time_limit_s]]
 *   defaults: 150 (22,500 points) 500 sites, p = 40, T = 900 s, 300 s limit. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include "cover.h"

int main(int argc, char **argv)
{
    int side = argc > 1 ? atoi(argv[1]) : 150;
    int ns = argc > 2 ? atoi(argv[2]) : 500;
    int p = argc > 3 ? atoi(argv[3]) : 40;
    double T = argc > 4 ? atof(argv[4]) : 900;
    double tl = argc > 5 ? atof(argv[5]) : 300;
    double cell = 100, speed = 5000.0 / 3600.0;   /* 100 m cells, walking 5 km/h in m/s */
    size_t nu = (size_t)side * (size_t)side;
    loc_problem_t *prob = NULL;
    err_t e = {0};
    unsigned s = 2024;
    double *sx = malloc((size_t)ns * sizeof *sx), *sy = malloc((size_t)ns * sizeof *sy);

    if (loc_new(nu, (size_t)ns, &prob, &e) != ERR_OK || !sx || !sy) return 1;
    for (int i = 0; i < ns; i++) {
        s = s * 1103515245u + 12345u;
        sx[i] = (double)((s >> 8) % 100000) / 100000.0 * side * cell;
        s = s * 1103515245u + 12345u;
        sy[i] = (double)((s >> 8) % 100000) / 100000.0 * side * cell;
    }
    for (size_t j = 0; j < nu; j++) {
        double x = (double)(j % (size_t)side) * cell + cell / 2, y = (double)(j / (size_t)side) * cell + cell / 2;
        s = s * 1103515245u + 12345u;
        prob->weight[j] = (double)((s >> 16) % 200);   /* persons per cell */
        for (int i = 0; i < ns; i++) {
            double t = hypot(x - sx[i], y - sy[i]) / speed;
            if (t <= T && loc_add_pair(prob, j, (size_t)i, t, &e) != ERR_OK) return 1;
        }
    }
    if (loc_finish(prob, &e) != ERR_OK) {
        fprintf(stderr, "%s\n", e.msg);
        return 1;
    }
    printf("district: %zu demand points, %d sites, %zu pairs within %.0f s, p = %d\n", nu, ns,
           prob->n_pairs, T, p);
    for (int merge = 1; merge >= 0; merge--) {
        loc_opts_t o;
        loc_result_t r;
        loc_opts_default(&o);
        o.p = p;
        o.limit = T;
        o.merge = merge;
        o.solver.time_limit_s = tl;
        if (cover_max(prob, &o, &r, &e) != ERR_OK) {
            fprintf(stderr, "%s\n", e.msg);
            return 1;
        }
        printf("merge=%d units %zu -> %zu  covered %.0f (heuristic %.0f) bound %.1f  %s  "
               "nodes %ld  glpk %.2f s  total %.2f s\n", merge, r.units_before, r.units_after,
               r.objective, r.heuristic_objective, r.bound, solver_status_name(r.status), r.nodes,
               r.solver_seconds, r.seconds);
        loc_result_destroy(&r);
    }
    loc_free(prob);
    free(sx);
    free(sy);
    return 0;
}
