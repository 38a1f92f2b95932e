/* candidates: generated candidate sites (see include/candidates.h). A raw point
 * list (junction nodes, or points every spacing_m along the segments) is scored
 * by the people living within near_m, then thinned greedily: best score first,
 * dropped when closer than min_spacing_m to one already kept or to a site that
 * is already there. Distances are planar in projected grids and on the
 * ellipsoid for lon/lat grids. */
#include "candidates.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

typedef struct raw {
    double x, y;
    int64_t cell;
    double people;     /* persons within near_m */
    size_t order;      /* tie-break: order of discovery */
    int junction;      /* 1 = a road junction, 0 = a point along a road */
} raw_t;

static int cmp_raw(const void *a, const void *b)
{
    const raw_t *p = a, *q = b;
    if (p->people != q->people) return p->people < q->people ? 1 : -1;
    return (p->order > q->order) - (p->order < q->order);
}

static double dist_m(const grid_t *g, double x1, double y1, double x2, double y2)
{
    if (g->geographic) return grid_geodesic_m(x1, y1, x2, y2);
    return hypot(x2 - x1, y2 - y1);
}

/* Persons in the cells whose centres lie within a square window of half-width
 * near_m around (col,row); a square keeps it cheap, and the score only ranks. */
static double people_near(const grid_t *g, int col, int row, double near_m)
{
    int ky = (int)ceil(near_m / g->row_dy_m[row]), kx = (int)ceil(near_m / g->row_dx_m[row]);
    double sum = 0;

    if (kx > g->nx) kx = g->nx;
    if (ky > g->ny) ky = g->ny;
    for (int r = row - ky; r <= row + ky; r++) {
        if (r < 0 || r >= g->ny) continue;
        for (int c = col - kx; c <= col + kx; c++)
            if (c >= 0 && c < g->nx) sum += g->people[(size_t)r * g->nx + c];
    }
    return sum;
}

/* Append (x, y) if it lies on a passable cell of the grid. */
static int add_raw(const grid_t *g, const cand_opts_t *o, double x, double y, int junction,
                   raw_t **v, size_t *n, size_t *cap)
{
    int col, row;
    int64_t cell;

    if (!grid_locate(g, x, y, &col, &row)) return ERR_OK;
    cell = (int64_t)row * g->nx + col;
    if (g->barrier != NULL && g->barrier[cell]) return ERR_OK;
    if (*n == *cap) {
        size_t nc = *cap ? 2 * *cap : 256;
        raw_t *grown = realloc(*v, nc * sizeof *grown);
        if (grown == NULL) return ERR_NOMEM;
        *v = grown;
        *cap = nc;
    }
    (*v)[*n] = (raw_t){x, y, cell, people_near(g, col, row, o->near_m), *n, junction};
    (*n)++;
    return ERR_OK;
}

int candidates_generate(const grid_t *g, const roads_t *r, const points_t *avoid,
                        const cand_opts_t *o, points_t **out, err_t *e)
{
    raw_t *raw = NULL;
    size_t n_raw = 0, cap = 0, *kept = NULL, n_kept = 0;
    points_t *p = NULL;
    int rc = ERR_OK;

    *out = NULL;
    if (r == NULL || r->n_segs == 0)
        return err_set(e, ERR_INPUT, "cannot generate candidate sites (siting.candidates): the "
                       "scenario has no roads; give inputs.roads or a sites.candidates layer");
    if (o->generate != CAND_JUNCTIONS && o->generate != CAND_ALONG_ROADS)
        return err_set(e, ERR_INTERNAL, "candidates: unknown generation method %d", o->generate);
    if (o->generate == CAND_ALONG_ROADS && !(o->spacing_m > 0))
        return err_set(e, ERR_INPUT, "candidates: spacing_m must be above 0, got %g",
                       o->spacing_m);

    if (o->generate == CAND_JUNCTIONS) {
        for (size_t i = 0; i < r->n_nodes && rc == ERR_OK; i++)
            if (r->node_junction[i]) rc = add_raw(g, o, r->x[i], r->y[i], 1, &raw, &n_raw, &cap);
    } else {
        /* A running distance over all segments in their order (a feature's
         * segments follow each other), one point each time it passes a
         * multiple of spacing_m; thinning removes near-duplicates where
         * features meet. */
        double run = 0;
        for (size_t s = 0; s < r->n_segs && rc == ERR_OK; s++) {
            const road_seg_t *sg = &r->segs[s];
            double next = (floor(run / o->spacing_m) + 1) * o->spacing_m;
            while (next <= run + sg->length_m && rc == ERR_OK) {
                double t = (next - run) / sg->length_m;
                double x = r->x[sg->a] + t * (r->x[sg->b] - r->x[sg->a]);
                double y = r->y[sg->a] + t * (r->y[sg->b] - r->y[sg->a]);
                rc = add_raw(g, o, x, y, 0, &raw, &n_raw, &cap);
                next += o->spacing_m;
            }
            run += sg->length_m;
        }
    }
    if (rc != ERR_OK) {
        rc = err_set(e, ERR_NOMEM, "out of memory generating candidate sites");
        goto done;
    }
    qsort(raw, n_raw, sizeof *raw, cmp_raw);
    kept = malloc((n_raw ? n_raw : 1) * sizeof *kept);
    if (kept == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory generating candidate sites");
        goto done;
    }
    for (size_t i = 0; i < n_raw && n_kept < o->max; i++) {
        int ok = raw[i].people >= o->min_people && raw[i].people > 0;
        for (size_t k = 0; ok && k < n_kept; k++)
            if (dist_m(g, raw[i].x, raw[i].y, raw[kept[k]].x, raw[kept[k]].y) < o->min_spacing_m)
                ok = 0;
        for (size_t k = 0; ok && avoid != NULL && k < avoid->n; k++)
            if (dist_m(g, raw[i].x, raw[i].y, avoid->x[k], avoid->y[k]) < o->min_spacing_m)
                ok = 0;
        if (ok) kept[n_kept++] = i;
    }

    p = calloc(1, sizeof *p);
    if (p == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory generating candidate sites");
        goto done;
    }
    {
        size_t m = n_kept ? n_kept : 1;
        p->id = calloc(m, sizeof *p->id);
        p->name = calloc(m, sizeof *p->name);
        p->x = malloc(m * sizeof *p->x);
        p->y = malloc(m * sizeof *p->y);
        p->cell = malloc(m * sizeof *p->cell);
        p->capacity = malloc(m * sizeof *p->capacity);
        p->cost = malloc(m * sizeof *p->cost);
        p->storage_m3 = malloc(m * sizeof *p->storage_m3);
    }
    if (!p->id || !p->name || !p->x || !p->y || !p->cell || !p->capacity || !p->cost ||
        !p->storage_m3) {
        rc = err_set(e, ERR_NOMEM, "out of memory generating candidate sites");
        goto done;
    }
    for (size_t k = 0; k < n_kept; k++) {
        const raw_t *q = &raw[kept[k]];
        char id[32], name[64];
        snprintf(id, sizeof id, "G%04zu", k + 1);
        snprintf(name, sizeof name, "%s, %.0f people within %.0f m",
                 q->junction ? "road junction" : "along road", q->people, o->near_m);
        p->id[k] = strdup(id);
        p->name[k] = strdup(name);
        p->n = k + 1;
        if (p->id[k] == NULL || p->name[k] == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory generating candidate sites");
            goto done;
        }
        p->x[k] = q->x;
        p->y[k] = q->y;
        p->cell[k] = q->cell;
        p->capacity[k] = o->capacity;
        p->cost[k] = o->fixed_cost;
        p->storage_m3[k] = INFINITY;
    }
    *out = p;
    p = NULL;
done:
    points_free(p);
    free(raw);
    free(kept);
    return rc;
}
