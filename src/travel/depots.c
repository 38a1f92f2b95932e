/* depots: depot <-> site travel on the vehicle road network (see include/depots.h).
 * The graph holds road nodes only (no cells: trucks do not drive across fields),
 * so it is small next to the travel network; it is built once per call. Each
 * depot and site gets its own vertex at the nearest point of the nearest
 * segment open to vehicles, which splits that segment. A path is found by
 * igraph's Dijkstra on time, then walked back through the inbound edge of each
 * vertex to add up both its time and its length. */
#include "depots.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <igraph.h>

#include "grid.h"

void depots_travel_destroy(depots_travel_t *t)
{
    if (t == NULL) return;
    free(t->out_s);
    free(t->back_s);
    free(t->out_m);
    free(t->back_m);
    free(t->from_seg);
    free(t->to_seg);
    free(t->from_access_m);
    free(t->to_access_m);
    memset(t, 0, sizeof *t);
}

/* Distance in metres between two points of the roads' CRS. */
static double dist_m(int geographic, double x1, double y1, double x2, double y2)
{
    if (geographic) return grid_geodesic_m(x1, y1, x2, y2);
    return hypot(x2 - x1, y2 - y1);
}

/* Open segments bucketed on a grid of cells at least the longest access leg
 * wide, so the segments within reach of a point are those listed in the cells
 * its reach box overlaps (each segment is listed in every cell its bounding
 * box overlaps). Compressed rows: cell c holds ids[start[c] .. start[c+1]). */
typedef struct seg_index {
    double x0, y0, bx, by;  /* origin (minimum corner) and cell size, CRS units */
    double rx, ry;          /* reach box half-sizes, CRS units */
    size_t nx, ny;
    size_t *start;          /* nx * ny + 1 */
    size_t *ids;            /* segment indices */
} seg_index_t;

static void seg_index_destroy(seg_index_t *ix)
{
    free(ix->start);
    free(ix->ids);
    memset(ix, 0, sizeof *ix);
}

/* Cells [*c0, *c1] overlapping [lo, hi] along one axis (0 = x, 1 = y);
 * *c0 > *c1 when none does. */
static void cell_range(const seg_index_t *ix, double lo, double hi, int axis, size_t *c0,
                       size_t *c1)
{
    double o = axis ? ix->y0 : ix->x0, w = axis ? ix->by : ix->bx;
    double n = (double)(axis ? ix->ny : ix->nx);
    double a = floor((lo - o) / w), b = floor((hi - o) / w);

    if (a < 0) a = 0;
    if (b > n - 1) b = n - 1;
    if (!(a <= b)) {   /* also NaN */
        *c0 = 1;
        *c1 = 0;
        return;
    }
    *c0 = (size_t)a;
    *c1 = (size_t)b;
}

/* Build the index over open segments for reach 'max_m' metres. */
static int seg_index_build(const roads_t *r, const uint8_t *open, int geographic, double max_m,
                           seg_index_t *ix, err_t *e)
{
    double xmin = INFINITY, xmax = -INFINITY, ymin = INFINITY, ymax = -INFINITY;
    size_t n_open = 0, cells, total = 0;
    size_t *fill = NULL;

    memset(ix, 0, sizeof *ix);
    for (size_t i = 0; i < r->n_segs; i++) {
        const road_seg_t *s = &r->segs[i];
        if (!open[i]) continue;
        n_open++;
        xmin = fmin(xmin, fmin(r->x[s->a], r->x[s->b]));
        xmax = fmax(xmax, fmax(r->x[s->a], r->x[s->b]));
        ymin = fmin(ymin, fmin(r->y[s->a], r->y[s->b]));
        ymax = fmax(ymax, fmax(r->y[s->a], r->y[s->b]));
    }
    if (n_open == 0) return ERR_OK;
    if (geographic) {
        /* A degree of latitude is at least 110,574 m (WGS84, at the equator): use a
         * slightly smaller figure so the box errs on the large side; a degree of
         * longitude shrinks with the cosine of the largest latitude. */
        double c = cos(fmin(89.0, fmax(fabs(ymin), fabs(ymax))) * M_PI / 180.0);
        ix->ry = max_m / 110000.0;
        ix->rx = ix->ry / c;
    } else {
        ix->rx = ix->ry = max_m;
    }
    ix->x0 = xmin;
    ix->y0 = ymin;
    ix->bx = fmax(ix->rx, 1e-9 * fmax(1, xmax - xmin));
    ix->by = fmax(ix->ry, 1e-9 * fmax(1, ymax - ymin));
    /* At most about four cells per open segment: widen the cells when needed. */
    for (;;) {
        double nxd = floor((xmax - xmin) / ix->bx) + 1, nyd = floor((ymax - ymin) / ix->by) + 1;
        if (nxd * nyd <= 4.0 * (double)n_open + 16) {
            ix->nx = (size_t)nxd;
            ix->ny = (size_t)nyd;
            break;
        }
        ix->bx *= 2;
        ix->by *= 2;
    }
    cells = ix->nx * ix->ny;
    ix->start = calloc(cells + 1, sizeof *ix->start);
    fill = calloc(cells + 1, sizeof *fill);
    if (ix->start == NULL || fill == NULL) goto nomem;
    for (int pass = 0; pass < 2; pass++) {
        for (size_t i = 0; i < r->n_segs; i++) {
            const road_seg_t *s = &r->segs[i];
            size_t cx0, cx1, cy0, cy1;
            if (!open[i]) continue;
            cell_range(ix, fmin(r->x[s->a], r->x[s->b]), fmax(r->x[s->a], r->x[s->b]), 0, &cx0,
                       &cx1);
            cell_range(ix, fmin(r->y[s->a], r->y[s->b]), fmax(r->y[s->a], r->y[s->b]), 1, &cy0,
                       &cy1);
            for (size_t cy = cy0; cy <= cy1; cy++)
                for (size_t cx = cx0; cx <= cx1; cx++) {
                    size_t c = cy * ix->nx + cx;
                    if (pass == 0) ix->start[c + 1]++;
                    else ix->ids[ix->start[c] + fill[c]++] = i;
                }
        }
        if (pass == 0) {
            for (size_t c = 0; c < cells; c++) ix->start[c + 1] += ix->start[c];
            total = ix->start[cells];
            ix->ids = malloc((total + 1) * sizeof *ix->ids);
            if (ix->ids == NULL) goto nomem;
        }
    }
    free(fill);
    return ERR_OK;
nomem:
    free(fill);
    seg_index_destroy(ix);
    return err_set(e, ERR_NOMEM, "out of memory indexing the vehicle roads");
}

/* The nearest point to (x, y) on an open segment within max_m: planar search
 * (lon/lat: x scaled by the cosine of the latitude, good enough to rank
 * neighbours) over the index cells the reach box overlaps, ties to the lower
 * segment index; then the true distance (geodesic on lon/lat) to that point.
 * *seg = -1 when no open segment lies within max_m. */
static void snap(const roads_t *r, const seg_index_t *ix, int geographic, double x, double y,
                 double max_m, int64_t *seg, double *frac, double *access_m)
{
    double best = INFINITY, bpx = 0, bpy = 0, bf = 0;
    double kx = geographic ? cos(y * M_PI / 180.0) : 1.0;
    int64_t bi = -1;
    size_t cx0, cx1, cy0, cy1;

    *seg = -1;
    *frac = 0;
    *access_m = INFINITY;
    if (ix->start == NULL) return;
    cell_range(ix, x - ix->rx, x + ix->rx, 0, &cx0, &cx1);
    cell_range(ix, y - ix->ry, y + ix->ry, 1, &cy0, &cy1);
    for (size_t cy = cy0; cy <= cy1 && cx0 <= cx1; cy++)
        for (size_t cx = cx0; cx <= cx1; cx++) {
            size_t c = cy * ix->nx + cx;
            for (size_t k = ix->start[c]; k < ix->start[c + 1]; k++) {
                size_t i = ix->ids[k];
                const road_seg_t *s = &r->segs[i];
                double ax, ay, dx, dy, l2, t, px, py, d2;
                ax = (r->x[s->a] - x) * kx;
                ay = r->y[s->a] - y;
                dx = (r->x[s->b] - x) * kx - ax;
                dy = r->y[s->b] - y - ay;
                l2 = dx * dx + dy * dy;
                t = l2 > 0 ? -(ax * dx + ay * dy) / l2 : 0;
                t = t < 0 ? 0 : t > 1 ? 1 : t;
                px = ax + t * dx;
                py = ay + t * dy;
                d2 = px * px + py * py;
                if (d2 < best || (d2 == best && (int64_t)i < bi)) {
                    best = d2;
                    bi = (int64_t)i;
                    bf = t;
                    bpx = px;
                    bpy = py;
                }
            }
        }
    if (bi < 0) return;
    best = dist_m(geographic, x, y, x + bpx / kx, y + bpy);
    if (best > max_m) return;
    *seg = bi;
    *frac = bf;
    *access_m = best;
}

/* A point joined to the road network: its own vertex on segment 'seg' at
 * fraction 'f' from node a to node b. */
typedef struct joint {
    int64_t seg;
    double f;
    igraph_integer_t vertex;
} joint_t;

static int joint_cmp(const void *pa, const void *pb)
{
    const joint_t *a = pa, *b = pb;
    if (a->seg != b->seg) return a->seg < b->seg ? -1 : 1;
    if (a->f != b->f) return a->f < b->f ? -1 : 1;
    return a->vertex < b->vertex ? -1 : a->vertex > b->vertex;
}

typedef struct vgraph {
    igraph_t g;
    int have_g;
    igraph_vector_t w;      /* seconds per edge */
    int have_w;
    double *len;            /* metres per edge */
    size_t n_len, cap_len;
} vgraph_t;

static void vgraph_destroy(vgraph_t *v)
{
    if (v->have_g) igraph_destroy(&v->g);
    if (v->have_w) igraph_vector_destroy(&v->w);
    free(v->len);
}

static int add_edge(vgraph_t *v, igraph_vector_int_t *el, igraph_integer_t a, igraph_integer_t b,
                    double t, double m)
{
    if (v->n_len == v->cap_len) {
        size_t cap = v->cap_len ? 2 * v->cap_len : 64;
        double *p = realloc(v->len, cap * sizeof *p);
        if (p == NULL) return ERR_NOMEM;
        v->len = p;
        v->cap_len = cap;
    }
    if (igraph_vector_int_push_back(el, a) || igraph_vector_int_push_back(el, b) ||
        igraph_vector_push_back(&v->w, t))
        return ERR_NOMEM;
    v->len[v->n_len++] = m;
    return ERR_OK;
}

/* The graph: road nodes 0..n_nodes-1, then one vertex per point (n_pts).
 * A segment holding joints (j, sorted by segment and fraction) becomes a chain
 * a -> joints by fraction -> b, so two points on one segment reach each other
 * along it; 'ends' are points joined at a node. */
static int vgraph_build(const roads_t *r, const uint8_t *open, const joint_t *j, size_t n_j,
                        const joint_t *ends, size_t n_ends, size_t n_pts, vgraph_t *v, err_t *e)
{
    igraph_vector_int_t el;
    int have_el = 0, rc = ERR_OK;
    size_t k = 0;
    igraph_error_t ie;

    if (igraph_vector_int_init(&el, 0) != IGRAPH_SUCCESS)
        return err_set(e, ERR_NOMEM, "out of memory for the vehicle road graph");
    have_el = 1;
    if (igraph_vector_init(&v->w, 0) != IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_NOMEM, "out of memory for the vehicle road graph");
        goto done;
    }
    v->have_w = 1;
    for (size_t i = 0; i < r->n_segs; i++) {
        const road_seg_t *s = &r->segs[i];
        double mps = r->classes[s->cls].vehicle_mps, fu = 0;
        igraph_integer_t u = s->a;
        if (!open[i]) continue;
        /* Walk the chain; the last link ends at node b (fraction 1). */
        for (;;) {
            int last = !(k < n_j && j[k].seg == (int64_t)i);
            igraph_integer_t w = last ? s->b : j[k].vertex;
            double fw = last ? 1 : j[k].f, m = (fw - fu) * s->length_m;
            if (add_edge(v, &el, u, w, m / mps, m) != ERR_OK ||
                (!(s->flags & ROAD_ONEWAY) && add_edge(v, &el, w, u, m / mps, m) != ERR_OK)) {
                rc = err_set(e, ERR_NOMEM, "out of memory for the vehicle road graph");
                goto done;
            }
            if (last) break;
            u = w;
            fu = fw;
            k++;
        }
    }
    /* A point whose nearest road point is a node joins that node itself, in
     * both directions: every road into the node reaches it. 'seg' holds the node. */
    for (size_t i = 0; i < n_ends; i++)
        if (add_edge(v, &el, ends[i].vertex, (igraph_integer_t)ends[i].seg, 0, 0) != ERR_OK ||
            add_edge(v, &el, (igraph_integer_t)ends[i].seg, ends[i].vertex, 0, 0) != ERR_OK) {
            rc = err_set(e, ERR_NOMEM, "out of memory for the vehicle road graph");
            goto done;
        }
    ie = igraph_create(&v->g, &el, (igraph_integer_t)(r->n_nodes + n_pts), IGRAPH_DIRECTED);
    if (ie != IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_GRAPH, "building the vehicle road graph: %s", igraph_strerror(ie));
        goto done;
    }
    v->have_g = 1;
done:
    if (have_el) igraph_vector_int_destroy(&el);
    return rc;
}

/* One Dijkstra from vertex 'src' ('mode' OUT: from src to every vertex; IN:
 * from every vertex to src); for each target vertex to[t] (-1 = none) the
 * path's time and length into time[t], len[t] (access legs not included). */
static int from_one(const vgraph_t *v, igraph_integer_t src, igraph_neimode_t mode,
                    const igraph_integer_t *to, size_t n_to, double *time, double *len,
                    err_t *e)
{
    igraph_vector_int_t inb;
    igraph_error_t ie;
    igraph_integer_t n = igraph_vcount(&v->g);

    if (igraph_vector_int_init(&inb, 0) != IGRAPH_SUCCESS)
        return err_set(e, ERR_NOMEM, "out of memory for vehicle routes");
    ie = igraph_get_shortest_paths_dijkstra(&v->g, NULL, NULL, src, igraph_vss_all(), &v->w,
                                            mode, NULL, &inb);
    if (ie != IGRAPH_SUCCESS) {
        igraph_vector_int_destroy(&inb);
        return err_set(e, ERR_GRAPH, "vehicle routes from graph vertex %lld: %s",
                       (long long)src, igraph_strerror(ie));
    }
    for (size_t t = 0; t < n_to; t++) {
        igraph_integer_t u = to[t], steps = 0;
        double ts = 0, lm = 0;
        time[t] = len[t] = INFINITY;
        if (u < 0) continue;
        /* Walk back to the source; a path has fewer than n edges. */
        while (u != src && steps <= n) {
            igraph_integer_t eid = VECTOR(inb)[u];
            if (eid < 0) break;
            ts += VECTOR(v->w)[eid];
            lm += v->len[eid];
            u = IGRAPH_OTHER(&v->g, eid, u);
            steps++;
        }
        if (u == src) {
            time[t] = ts;
            len[t] = lm;
        }
    }
    igraph_vector_int_destroy(&inb);
    return ERR_OK;
}

int depots_travel(const roads_t *r, int geographic, const double *fx, const double *fy,
                  size_t n_from, const double *tx, const double *ty, size_t n_to,
                  double access_mps, double max_access_m, depots_travel_t *out, err_t *e)
{
    vgraph_t v;
    seg_index_t ix;
    size_t nm = n_from * n_to, n_pts = n_from + n_to, n_j = 0, n_ends = 0;
    double *ot = NULL, *om = NULL, *bt = NULL, *bm = NULL, *frac = NULL;
    uint8_t *open = NULL;
    joint_t *j = NULL, *ends = NULL;
    igraph_integer_t *to_v = NULL;
    int rc = ERR_OK;

    memset(out, 0, sizeof *out);
    memset(&v, 0, sizeof v);
    memset(&ix, 0, sizeof ix);
    if (!(access_mps > 0) || !isfinite(access_mps))
        return err_set(e, ERR_INPUT, "depot travel: access speed must be > 0 m/s (got %g)",
                       access_mps);
    if (!(max_access_m >= 0))
        return err_set(e, ERR_INPUT, "depot travel: longest access leg must be >= 0 m (got %g)",
                       max_access_m);
    out->n_from = n_from;
    out->n_to = n_to;
    out->out_s = malloc((nm + 1) * sizeof *out->out_s);
    out->back_s = malloc((nm + 1) * sizeof *out->back_s);
    out->out_m = malloc((nm + 1) * sizeof *out->out_m);
    out->back_m = malloc((nm + 1) * sizeof *out->back_m);
    out->from_seg = malloc((n_from + 1) * sizeof *out->from_seg);
    out->to_seg = malloc((n_to + 1) * sizeof *out->to_seg);
    out->from_access_m = malloc((n_from + 1) * sizeof *out->from_access_m);
    out->to_access_m = malloc((n_to + 1) * sizeof *out->to_access_m);
    ot = malloc((n_to + 1) * sizeof *ot);
    om = malloc((n_to + 1) * sizeof *om);
    bt = malloc((n_to + 1) * sizeof *bt);
    bm = malloc((n_to + 1) * sizeof *bm);
    frac = malloc((n_pts + 1) * sizeof *frac);
    j = malloc((n_pts + 1) * sizeof *j);
    ends = malloc((n_pts + 1) * sizeof *ends);
    to_v = malloc((n_to + 1) * sizeof *to_v);
    if (!out->out_s || !out->back_s || !out->out_m || !out->back_m || !out->from_seg ||
        !out->to_seg || !out->from_access_m || !out->to_access_m || !ot || !om || !bt || !bm ||
        !frac || !j || !ends || !to_v) {
        rc = err_set(e, ERR_NOMEM, "out of memory for depot travel times");
        goto done;
    }
    for (size_t i = 0; i < nm; i++)
        out->out_s[i] = out->back_s[i] = out->out_m[i] = out->back_m[i] = INFINITY;
    for (size_t f = 0; f < n_from; f++) {
        out->from_seg[f] = -1;
        out->from_access_m[f] = INFINITY;
    }
    for (size_t t = 0; t < n_to; t++) {
        out->to_seg[t] = -1;
        out->to_access_m[t] = INFINITY;
    }
    if (r == NULL || r->n_segs == 0 || nm == 0) goto done;

    /* Segments open to vehicles; a bad segment is refused before it is read. */
    open = calloc(r->n_segs, 1);
    if (open == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory for the vehicle road graph");
        goto done;
    }
    for (size_t i = 0; i < r->n_segs; i++) {
        const road_seg_t *s = &r->segs[i];
        if (s->a < 0 || s->b < 0 || (size_t)s->a >= r->n_nodes || (size_t)s->b >= r->n_nodes ||
            s->cls < 0 || (size_t)s->cls >= r->n_classes) {
            rc = err_set(e, ERR_INPUT, "road segment %zu names a node or class that does not "
                         "exist", i);
            goto done;
        }
        open[i] = r->classes[s->cls].vehicle_mps > 0 && s->length_m > 0;
    }
    if ((rc = seg_index_build(r, open, geographic, max_access_m, &ix, e)) != ERR_OK) goto done;
    for (size_t k = 0; k < n_pts; k++) {
        int is_from = k < n_from;
        size_t i = is_from ? k : k - n_from;
        int64_t *seg = is_from ? &out->from_seg[i] : &out->to_seg[i];
        double *acc = is_from ? &out->from_access_m[i] : &out->to_access_m[i];
        snap(r, &ix, geographic, is_from ? fx[i] : tx[i], is_from ? fy[i] : ty[i],
             max_access_m, seg, &frac[k], acc);
        if (*seg < 0) continue;
        /* At a segment's end (to 1e-9 of its length): join the node, not the segment. */
        if (frac[k] <= 1e-9 || frac[k] >= 1 - 1e-9)
            ends[n_ends++] = (joint_t){frac[k] <= 1e-9 ? r->segs[*seg].a : r->segs[*seg].b, 0,
                                       (igraph_integer_t)(r->n_nodes + k)};
        else
            j[n_j++] = (joint_t){*seg, frac[k], (igraph_integer_t)(r->n_nodes + k)};
    }
    seg_index_destroy(&ix);
    qsort(j, n_j, sizeof *j, joint_cmp);
    if ((rc = vgraph_build(r, open, j, n_j, ends, n_ends, n_pts, &v, e)) != ERR_OK) goto done;
    for (size_t t = 0; t < n_to; t++)
        to_v[t] = out->to_seg[t] >= 0 ? (igraph_integer_t)(r->n_nodes + n_from + t) : -1;
    for (size_t f = 0; f < n_from; f++) {
        igraph_integer_t src = (igraph_integer_t)(r->n_nodes + f);
        double af = out->from_access_m[f];
        if (out->from_seg[f] < 0) continue;
        if ((rc = from_one(&v, src, IGRAPH_OUT, to_v, n_to, ot, om, e)) ||
            (rc = from_one(&v, src, IGRAPH_IN, to_v, n_to, bt, bm, e)))
            goto done;
        for (size_t t = 0; t < n_to; t++) {
            double legs = af + out->to_access_m[t];
            size_t k = f * n_to + t;
            if (isfinite(ot[t])) {
                out->out_s[k] = ot[t] + legs / access_mps;
                out->out_m[k] = om[t] + legs;
            }
            if (isfinite(bt[t])) {
                out->back_s[k] = bt[t] + legs / access_mps;
                out->back_m[k] = bm[t] + legs;
            }
        }
    }
done:
    seg_index_destroy(&ix);
    vgraph_destroy(&v);
    free(ot);
    free(om);
    free(bt);
    free(bm);
    free(frac);
    free(j);
    free(ends);
    free(to_v);
    free(open);
    if (rc != ERR_OK) depots_travel_destroy(out);
    return rc;
}
