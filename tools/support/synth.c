/* synth: synthetic benchmark inputs and clocks (see synth.h). */
#include "synth.h"

#include <math.h>
#include <stdlib.h>
#include <sys/resource.h>
#include <time.h>

uint64_t synth_rnd(synth_rng_t *r)
{
    r->state = r->state * 6364136223846793005ULL + 1442695040888963407ULL;
    return r->state >> 33;
}

double synth_now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec + ts.tv_nsec * 1e-9;
}

/* On a shared machine the wall clock also counts time spent waiting for a core,
 * so the tools print both. */
double synth_cpu_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &ts);
    return ts.tv_sec + ts.tv_nsec * 1e-9;
}

double synth_peak_bytes(void)
{
    struct rusage ru;
    getrusage(RUSAGE_SELF, &ru);
    return (double)ru.ru_maxrss * 1024.0;   /* Linux reports kilobytes */
}

grid_t *synth_grid(int n, double cell, synth_rng_t *rng)
{
    grid_t *g = calloc(1, sizeof *g);
    size_t nc = (size_t)n * n;

    if (g == NULL) return NULL;
    g->nx = g->ny = n;
    g->gt[1] = cell;
    g->gt[3] = n * cell;
    g->gt[5] = -cell;
    g->row_dx_m = malloc((size_t)n * sizeof(double));
    g->row_dy_m = malloc((size_t)n * sizeof(double));
    g->people = malloc(nc * sizeof(double));
    g->elevation = malloc(nc * sizeof(float));
    if (!g->row_dx_m || !g->row_dy_m || !g->people || !g->elevation) {
        grid_free(g);
        return NULL;
    }
    for (int r = 0; r < n; r++) g->row_dx_m[r] = g->row_dy_m[r] = cell;
    for (int r = 0; r < n; r++)
        for (int c = 0; c < n; c++) {
            size_t i = (size_t)r * n + c;
            g->people[i] = (double)(synth_rnd(rng) % 40);
            g->elevation[i] = (float)(20.0 * sin(c / 3.2) + 20.0 * cos(r / 4.1));
        }
    return g;
}

roads_t *synth_roads(const grid_t *g, int step)
{
    roads_t *r = calloc(1, sizeof *r);
    int k = (g->nx - 1) / step + 1;   /* lines each way */
    size_t nn = (size_t)k * k, ns = 2 * (size_t)k * (k - 1);

    if (r == NULL) return NULL;
    r->n_nodes = nn;
    r->x = malloc(nn * sizeof(double));
    r->y = malloc(nn * sizeof(double));
    r->node_junction = malloc(nn);
    r->segs = calloc(ns ? ns : 1, sizeof *r->segs);
    r->classes = calloc(1, sizeof *r->classes);
    if (!r->x || !r->y || !r->node_junction || !r->segs || !r->classes) {
        roads_free(r);
        return NULL;
    }
    r->n_classes = 1;
    r->classes[0].walk_mps = 5.0 / 3.6;
    r->classes[0].vehicle_mps = 40.0 / 3.6;
    for (int i = 0; i < k; i++)
        for (int j = 0; j < k; j++) {
            size_t id = (size_t)i * k + j;
            r->x[id] = g->gt[0] + (j * step + 0.5) * g->gt[1];
            r->y[id] = g->gt[3] + (i * step + 0.5) * g->gt[5];
            r->node_junction[id] = 1;
        }
    for (int i = 0; i < k; i++)
        for (int j = 0; j < k; j++) {
            int32_t id = i * k + j;
            if (j + 1 < k) r->segs[r->n_segs++] = (road_seg_t){id, id + 1, 0, 0, step * g->gt[1], 0};
            if (i + 1 < k) r->segs[r->n_segs++] = (road_seg_t){id, id + k, 0, 0, step * g->gt[1], 0};
        }
    return r;
}

