/* bench-site: the site stage end to end on a synthetic district: a square grid
 * of about N populated cells of 100 m with random people, a road lattice, C
 * candidate sites at random cells; bounded walking searches on T threads build
 * the coverage lists, then maximal covering with p sites (merging on) is solved
 * to optimality. Prints the figures; with --unmerged also the same model
 * without merging (time-limited), for comparison. Target (issue 4): 2,000
 * candidates, 50,000 cells, p = 100 proved optimal in <= 60 s.
 * Usage: bench-site [--cells N] [--candidates C] [--p P] [--limit-min M]
 *                   [--threads T] [--time-limit S] [--unmerged] [--clustered]
 * --clustered puts the people in villages on a grid three times the area. */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <igraph.h>

#include "cover.h"
#include "inputs.h"
#include "network.h"
#include "synth.h"
#include "progress.h"
#include "scen_siting.h"
#include "site.h"

static uint64_t rng_state = 4242;
static uint64_t rnd(void)
{
    /* 64-bit LCG (Knuth's MMIX constants), deterministic across runs. */
    rng_state = rng_state * 6364136223846793005ULL + 1442695040888963407ULL;
    return rng_state >> 33;
}

/* Clustered variant: villages (discs of 300-1,500 m) placed at random on a
 * grid three times the area until 'target' cells are populated, as in a rural
 * district where most land is empty. */
static void cluster_people(grid_t *g, long target)
{
    long populated = 0;
    g->total_people = 0;
    for (size_t i = 0; i < (size_t)g->nx * g->ny; i++) g->people[i] = 0;
    while (populated < target) {
        int cx = (int)(rnd() % (uint64_t)g->nx), cy = (int)(rnd() % (uint64_t)g->ny);
        int rad = 3 + (int)(rnd() % 13);   /* cells of 100 m */
        for (int r = cy - rad; r <= cy + rad; r++)
            for (int c = cx - rad; c <= cx + rad; c++) {
                size_t i;
                if (r < 0 || c < 0 || r >= g->ny || c >= g->nx) continue;
                if ((r - cy) * (r - cy) + (c - cx) * (c - cx) > rad * rad) continue;
                i = (size_t)r * g->nx + c;
                if (g->people[i] == 0 && populated < target) {
                    g->people[i] = (double)(1 + rnd() % 40);
                    g->total_people += g->people[i];
                    populated++;
                }
            }
    }
}

static grid_t *make_grid(int n)
{
    grid_t *g = calloc(1, sizeof *g);
    size_t nc = (size_t)n * n;
    if (g == NULL) return NULL;
    g->nx = g->ny = n;
    g->gt[1] = 100;
    g->gt[3] = n * 100.0;
    g->gt[5] = -100;
    g->row_dx_m = malloc((size_t)n * sizeof(double));
    g->row_dy_m = malloc((size_t)n * sizeof(double));
    g->row_area_m2 = malloc((size_t)n * sizeof(double));
    g->people = malloc(nc * sizeof(double));
    if (!g->row_dx_m || !g->row_dy_m || !g->row_area_m2 || !g->people) return NULL;
    for (int r = 0; r < n; r++) {
        g->row_dx_m[r] = g->row_dy_m[r] = 100;
        g->row_area_m2[r] = 1e4;
    }
    for (size_t i = 0; i < nc; i++) {
        g->people[i] = (double)(1 + rnd() % 40);
        g->total_people += g->people[i];
    }
    return g;
}

/* Tracks along every 'step'-th row and column, joined at the crossings. */
static roads_t *make_roads(const grid_t *g, int step)
{
    roads_t *r = synth_roads(g, step);
    if (r == NULL) return NULL;
    r->classes[0].name = strdup("track");
    r->classes[0].vehicle_mps = 15.0 / 3.6;
    return r;
}

static points_t *make_candidates(const grid_t *g, size_t n)
{
    points_t *p = calloc(1, sizeof *p);
    if (p == NULL) return NULL;
    p->id = calloc(n, sizeof *p->id);
    p->name = calloc(n, sizeof *p->name);
    p->x = malloc(n * sizeof *p->x);
    p->y = malloc(n * sizeof *p->y);
    p->cell = malloc(n * sizeof *p->cell);
    p->capacity = malloc(n * sizeof *p->capacity);
    p->cost = malloc(n * sizeof *p->cost);
    p->storage_m3 = malloc(n * sizeof *p->storage_m3);
    if (!p->id || !p->name || !p->x || !p->y || !p->cell || !p->capacity || !p->cost ||
        !p->storage_m3)
        return NULL;
    for (size_t i = 0; i < n; i++) {
        char id[32];
        int col = (int)(rnd() % (uint64_t)g->nx), row = (int)(rnd() % (uint64_t)g->ny);
        snprintf(id, sizeof id, "C%05zu", i + 1);
        p->id[i] = strdup(id);
        p->name[i] = strdup("");
        p->n = i + 1;
        grid_cell_center(g, col, row, &p->x[i], &p->y[i]);
        p->cell[i] = (int64_t)row * g->nx + col;
        p->capacity[i] = INFINITY;
        p->cost[i] = 0;
        p->storage_m3[i] = INFINITY;
    }
    return p;
}

int main(int argc, char **argv)
{
    long cells = 50000, n_cand = 2000, p = 100, threads = 2;
    double limit_min = 30, time_limit = 300;
    int unmerged = 0, clustered = 0;
    char json[512];
    inputs_t in = {0};
    network_t *net = NULL;
    site_data_t d;
    site_result_t r;
    err_t e = {0, ""};
    double t0;

    for (int i = 1; i < argc; i++) {
        if (strcmp(argv[i], "--unmerged") == 0) unmerged = 1;
        else if (strcmp(argv[i], "--clustered") == 0) clustered = 1;
        else if (i + 1 < argc && strcmp(argv[i], "--cells") == 0) cells = atol(argv[++i]);
        else if (i + 1 < argc && strcmp(argv[i], "--candidates") == 0) n_cand = atol(argv[++i]);
        else if (i + 1 < argc && strcmp(argv[i], "--p") == 0) p = atol(argv[++i]);
        else if (i + 1 < argc && strcmp(argv[i], "--limit-min") == 0) limit_min = atof(argv[++i]);
        else if (i + 1 < argc && strcmp(argv[i], "--threads") == 0) threads = atol(argv[++i]);
        else if (i + 1 < argc && strcmp(argv[i], "--time-limit") == 0) time_limit = atof(argv[++i]);
        else {
            fprintf(stderr, "bench-site: unknown option '%s'\n", argv[i]);
            return 2;
        }
    }
    setvbuf(stdout, NULL, _IOLBF, 0);
    igraph_set_error_handler(igraph_error_handler_ignore);
    igraph_set_warning_handler(igraph_warning_handler_ignore);

    snprintf(json, sizeof json,
             "{\"inputs\": {\"population\": \"synthetic.tif\"}, \"travel\": {\"walk\": "
             "{\"slope\": false}}, \"siting\": {\"model\": \"max_cover\", \"p\": %ld, "
             "\"limit_min\": %g, \"curve_max_p\": 0, \"time_limit_s\": %g}}",
             p, limit_min, time_limit);
    if (scen_parse(json, "bench-site.json", &in.scen, &e) != ERR_OK) {
        fprintf(stderr, "bench-site: %s\n", e.msg);
        return 1;
    }
    {
        int n = (int)ceil(sqrt((double)cells * (clustered ? 3 : 1)));
        in.grid = make_grid(n);
        if (in.grid != NULL && clustered) cluster_people(in.grid, cells);
        in.roads = in.grid ? make_roads(in.grid, 50) : NULL;
        in.candidates = in.grid ? make_candidates(in.grid, (size_t)n_cand) : NULL;
        if (!in.grid || !in.roads || !in.candidates) {
            fprintf(stderr, "bench-site: out of memory for the synthetic district\n");
            return 1;
        }
        printf("district: %d x %d = %d cells of 100 m (%s), %ld candidates, p = %ld, walking "
               "limit %g min, %ld threads\n", n, n, n * n,
               clustered ? "people in villages" : "people on every cell", n_cand, p, limit_min,
               threads);
    }
    t0 = progress_now();
    if (network_build(in.grid, in.roads, in.scen, &net, &e) != ERR_OK) {
        fprintf(stderr, "bench-site: %s\n", e.msg);
        return 1;
    }
    printf("network_s: %.2f\n", progress_now() - t0);
    if (site_prepare_grid(&in, net, (int)threads, 1, &d, &e) != ERR_OK) {
        fprintf(stderr, "bench-site: %s\n", e.msg);
        return 1;
    }
    printf("searches_s: %.2f  build_problem_s: %.2f  pairs: %zu  demand_cells: %zu\n",
           d.seconds_searches, d.seconds_build, d.prob->n_pairs, d.prob->n_units);
    if (site_run(in.scen, &d, 1, &r, &e) != ERR_OK) {
        fprintf(stderr, "bench-site: %s\n", e.msg);
        return 1;
    }
    printf("merged: units %zu -> %zu  covered %.0f of %.0f  bound %.1f  gap %.2g  %s  "
           "nodes %ld  glpk_s %.2f  model_s %.2f\n", r.plan.units_before, r.plan.units_after,
           r.plan.objective, d.total_people, r.plan.bound, r.plan.gap,
           solver_status_name(r.plan.status), r.plan.nodes, r.plan.solver_seconds,
           r.plan.seconds);
    printf("site_total_s: %.2f (searches + problem + model)\n",
           d.seconds_searches + d.seconds_build + r.seconds_model);
    if (unmerged) {
        loc_opts_t o;
        loc_result_t u;
        loc_opts_default(&o);
        o.p = (int)p;
        o.limit = d.limit;
        o.merge = 0;
        o.solver.time_limit_s = time_limit;
        if (cover_max(d.prob, &o, &u, &e) != ERR_OK) {
            fprintf(stderr, "bench-site: %s\n", e.msg);
            return 1;
        }
        printf("unmerged: units %zu  covered %.0f  bound %.1f  %s  glpk_s %.2f  model_s %.2f\n",
               u.units_after, u.objective, u.bound, solver_status_name(u.status),
               u.solver_seconds, u.seconds);
        loc_result_destroy(&u);
    }
    site_result_destroy(&r);
    site_data_destroy(&d);
    network_free(net);
    points_free(in.candidates);
    roads_free(in.roads);
    grid_free(in.grid);
    scen_free(in.scen);
    return 0;
}
