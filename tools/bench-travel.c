/* bench-travel: time and memory of the travel stage on a synthetic grid.
 * Usage: bench-travel [--cells N] [--sites K] [--searches M] [--limit-min T] [--threads P]
 *                     [--neighbours 8|16]
 * Builds a square grid of about N cells of 100 m with rolling hills (slope on), a
 * people layer, and a road lattice every 50 cells (junctions at crossings), then
 * runs one nearest-site pass from K sites and M bounded searches of T minutes'
 * walk on P threads. Prints one "key: value" line per figure; the process's peak
 * resident size (getrusage ru_maxrss) is reported per cell. Not a test. */
#include <igraph.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <time.h>

#include "network.h"
#include "travel.h"
#include "synth.h"

/* The tool's own random sequence (seeded as it always was, for comparable runs). */
static synth_rng_t rng = {12345};

int main(int argc, char **argv)
{
    long cells = 1000000, n_sites = 200, n_search = 1000;
    double limit_min = 60.0;
    int threads = 2, neighbours = 8;
    err_t e = {0, ""};
    scen_t s;
    network_t *net = NULL;
    travel_result_t *res = NULL;
    network_stats_t st;

    for (int i = 1; i + 1 < argc; i += 2) {
        if (strcmp(argv[i], "--cells") == 0) cells = atol(argv[i + 1]);
        else if (strcmp(argv[i], "--sites") == 0) n_sites = atol(argv[i + 1]);
        else if (strcmp(argv[i], "--searches") == 0) n_search = atol(argv[i + 1]);
        else if (strcmp(argv[i], "--limit-min") == 0) limit_min = atof(argv[i + 1]);
        else if (strcmp(argv[i], "--threads") == 0) threads = atoi(argv[i + 1]);
        else if (strcmp(argv[i], "--neighbours") == 0) neighbours = atoi(argv[i + 1]);
        else {
            fprintf(stderr, "bench-travel: unknown option '%s'\n", argv[i]);
            return 2;
        }
    }
    setvbuf(stdout, NULL, _IOLBF, 0);
    igraph_set_error_handler(igraph_error_handler_ignore);
    igraph_set_warning_handler(igraph_warning_handler_ignore);

    int n = (int)ceil(sqrt((double)cells));
    grid_t *g = synth_grid(n, 100.0, &rng);
    roads_t *r = g ? synth_roads(g, 50) : NULL;
    if (g == NULL || r == NULL) {
        fprintf(stderr, "bench-travel: out of memory for the synthetic grid\n");
        return 1;
    }
    memset(&s, 0, sizeof s);
    s.neighbours = neighbours;
    s.walk_mps = 5.0 / 3.6;
    s.use_slope = 1;
    s.cover_default_factor = 1.0;
    double nc = (double)n * n;
    printf("grid: %d x %d = %.0f cells of 100 m, %d neighbours, %zu road nodes, %zu segments\n",
           n, n, nc, neighbours, r->n_nodes, r->n_segs);

    double t0 = synth_now_s(), c0 = synth_cpu_s();
    if (network_build(g, r, &s, &net, &e) != ERR_OK) {
        fprintf(stderr, "bench-travel: %s\n", e.msg);
        return 1;
    }
    double t_build = synth_now_s() - t0, c_build = synth_cpu_s() - c0;
    network_get_stats(net, &st);
    printf("edges: %ld (walk %zu, road %zu, connectors %zu), nodes %ld\n",
           (long)igraph_ecount(network_graph(net)), st.n_walk_edges, st.n_road_edges,
           st.n_connector_edges, (long)network_n_nodes(net));
    printf("build_s: %.2f (cpu %.2f)\n", t_build, c_build);
    printf("peak_after_build_bytes_per_cell: %.0f\n", synth_peak_bytes() / nc);

    int64_t *sites = malloc((size_t)n_sites * sizeof *sites);
    for (long i = 0; i < n_sites; i++) sites[i] = (int64_t)(synth_rnd(&rng) % (uint64_t)(n * (int64_t)n));
    t0 = synth_now_s();
    c0 = synth_cpu_s();
    if (travel_nearest(net, sites, (size_t)n_sites, &res, &e) != ERR_OK) {
        fprintf(stderr, "bench-travel: %s\n", e.msg);
        return 1;
    }
    double t_near = synth_now_s() - t0, c_near = synth_cpu_s() - c0;
    double worst = 0.0;
    for (int64_t c = 0; c < res->n_cells; c++)
        if (isfinite(res->time_s[c]) && res->time_s[c] > worst) worst = res->time_s[c];
    printf("nearest_sites: %ld\n", n_sites);
    printf("nearest_s: %.2f (cpu %.2f)\n", t_near, c_near);
    printf("nearest_max_time_min: %.1f\n", worst / 60.0);
    printf("peak_after_nearest_bytes_per_cell: %.0f\n", synth_peak_bytes() / nc);
    travel_result_free(res);
    /* Again with the same sites: the virtual edges exist now, so no re-index. */
    t0 = synth_now_s();
    c0 = synth_cpu_s();
    if (travel_nearest(net, sites, (size_t)n_sites, &res, &e) != ERR_OK) {
        fprintf(stderr, "bench-travel: %s\n", e.msg);
        return 1;
    }
    printf("nearest_again_s: %.2f (cpu %.2f)\n", synth_now_s() - t0, synth_cpu_s() - c0);
    travel_result_free(res);

    int64_t *src = malloc((size_t)n_search * sizeof *src);
    travel_reach_t *out = calloc((size_t)n_search, sizeof *out);
    for (long i = 0; i < n_search; i++) src[i] = (int64_t)(synth_rnd(&rng) % (uint64_t)(n * (int64_t)n));
    t0 = synth_now_s();
    c0 = synth_cpu_s();
    if (travel_bounded_many(net, src, (size_t)n_search, limit_min * 60.0, threads, out, &e)
        != ERR_OK) {
        fprintf(stderr, "bench-travel: %s\n", e.msg);
        return 1;
    }
    double t_bound = synth_now_s() - t0, c_bound = synth_cpu_s() - c0;
    double reached = 0.0;
    for (long i = 0; i < n_search; i++) {
        reached += (double)out[i].n;
        travel_reach_destroy(&out[i]);
    }
    printf("bounded_searches: %ld of %.0f min on %d threads\n", n_search, limit_min, threads);
    printf("bounded_total_s: %.2f (cpu %.2f over all threads)\n", t_bound, c_bound);
    printf("bounded_mean_cells_reached: %.0f\n", reached / (double)(n_search ? n_search : 1));
    printf("peak_bytes_per_cell: %.0f\n", synth_peak_bytes() / nc);

    free(out);
    free(src);
    free(sites);
    network_free(net);
    free(r->x);
    free(r->y);
    free(r->node_junction);
    free(r->segs);
    free(r->classes);
    free(r);
    free(g->row_dx_m);
    free(g->row_dy_m);
    free(g->people);
    free(g->elevation);
    free(g);
    return 0;
}
