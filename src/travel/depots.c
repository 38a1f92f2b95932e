/* depots: depot <-> site travel on the vehicle road network (see include/depots.h).
 * The graph holds road nodes only (no cells: trucks do not drive across fields),
 * so it is small next to the travel network; it is built once per call. A path
 * is found by igraph's Dijkstra on time, then walked back through the inbound
 * edge of each node to add up both its time and its length. */
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
    free(t->from_node);
    free(t->to_node);
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

/* Nearest node with usable[] set; planar search (lon/lat scaled by the cosine
 * of the latitude, good enough to rank neighbours), true distance after. */
static void snap(const roads_t *r, const uint8_t *usable, int geographic, double x, double y,
                 double max_m, int64_t *node, double *access_m)
{
    double best = INFINITY, kx = geographic ? cos(y * M_PI / 180.0) : 1.0;
    int64_t bi = -1;

    for (size_t i = 0; i < r->n_nodes; i++) {
        double dx, dy, d2;
        if (!usable[i]) continue;
        dx = (r->x[i] - x) * kx;
        dy = r->y[i] - y;
        d2 = dx * dx + dy * dy;
        if (d2 < best) {
            best = d2;
            bi = (int64_t)i;
        }
    }
    *node = -1;
    *access_m = INFINITY;
    if (bi < 0) return;
    best = dist_m(geographic, x, y, r->x[bi], r->y[bi]);
    if (best > max_m) return;
    *node = bi;
    *access_m = best;
}

typedef struct vgraph {
    igraph_t g;
    int have_g;
    igraph_vector_t w;      /* seconds per edge */
    int have_w;
    double *len;            /* metres per edge */
    uint8_t *usable;        /* per road node: touched by a vehicle edge */
} vgraph_t;

static void vgraph_destroy(vgraph_t *v)
{
    if (v->have_g) igraph_destroy(&v->g);
    if (v->have_w) igraph_vector_destroy(&v->w);
    free(v->len);
    free(v->usable);
}

static int vgraph_build(const roads_t *r, vgraph_t *v, err_t *e)
{
    igraph_vector_int_t el;
    size_t n_e = 0;
    int have_el = 0, rc = ERR_OK;
    igraph_error_t ie;

    v->usable = calloc(r->n_nodes ? r->n_nodes : 1, 1);
    v->len = malloc((2 * r->n_segs + 1) * sizeof *v->len);
    if (v->usable == NULL || v->len == NULL)
        return err_set(e, ERR_NOMEM, "out of memory for the vehicle road graph");
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
        double mps, t;
        if (s->a < 0 || s->b < 0 || (size_t)s->a >= r->n_nodes || (size_t)s->b >= r->n_nodes ||
            s->cls < 0 || (size_t)s->cls >= r->n_classes) {
            rc = err_set(e, ERR_INPUT, "road segment %zu names a node or class that does not "
                         "exist", i);
            goto done;
        }
        mps = r->classes[s->cls].vehicle_mps;
        if (!(mps > 0) || !(s->length_m > 0)) continue;   /* closed to vehicles */
        t = s->length_m / mps;
        for (int dir = 0; dir < 2; dir++) {
            int32_t a = dir ? s->b : s->a, b = dir ? s->a : s->b;
            if (dir && (s->flags & ROAD_ONEWAY)) break;   /* one way: a -> b only */
            if (igraph_vector_int_push_back(&el, a) || igraph_vector_int_push_back(&el, b) ||
                igraph_vector_push_back(&v->w, t)) {
                rc = err_set(e, ERR_NOMEM, "out of memory for the vehicle road graph");
                goto done;
            }
            v->len[n_e++] = s->length_m;
        }
        v->usable[s->a] = v->usable[s->b] = 1;
    }
    ie = igraph_create(&v->g, &el, (igraph_integer_t)r->n_nodes, IGRAPH_DIRECTED);
    if (ie != IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_GRAPH, "building the vehicle road graph: %s", igraph_strerror(ie));
        goto done;
    }
    v->have_g = 1;
done:
    if (have_el) igraph_vector_int_destroy(&el);
    return rc;
}

/* One Dijkstra from road node 'src' ('mode' OUT: from src to every node; IN:
 * from every node to src); for each target t with a node, the path's time and
 * length into time[t], len[t] (access legs not included). */
static int from_one(const vgraph_t *v, int64_t src, igraph_neimode_t mode,
                    const int64_t *to_node, size_t n_to, double *time, double *len, err_t *e)
{
    igraph_vector_int_t inb;
    igraph_error_t ie;
    igraph_integer_t n = igraph_vcount(&v->g);

    if (igraph_vector_int_init(&inb, 0) != IGRAPH_SUCCESS)
        return err_set(e, ERR_NOMEM, "out of memory for vehicle routes");
    ie = igraph_get_shortest_paths_dijkstra(&v->g, NULL, NULL, (igraph_integer_t)src,
                                            igraph_vss_all(), &v->w, mode, NULL, &inb);
    if (ie != IGRAPH_SUCCESS) {
        igraph_vector_int_destroy(&inb);
        return err_set(e, ERR_GRAPH, "vehicle routes from road node %lld: %s", (long long)src,
                       igraph_strerror(ie));
    }
    for (size_t t = 0; t < n_to; t++) {
        igraph_integer_t u = (igraph_integer_t)to_node[t], steps = 0;
        double ts = 0, lm = 0;
        time[t] = len[t] = INFINITY;
        if (to_node[t] < 0) continue;
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
    size_t nm = n_from * n_to;
    double *ot = NULL, *om = NULL, *bt = NULL, *bm = NULL;
    int rc = ERR_OK;

    memset(out, 0, sizeof *out);
    memset(&v, 0, sizeof v);
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
    out->from_node = malloc((n_from + 1) * sizeof *out->from_node);
    out->to_node = malloc((n_to + 1) * sizeof *out->to_node);
    out->from_access_m = malloc((n_from + 1) * sizeof *out->from_access_m);
    out->to_access_m = malloc((n_to + 1) * sizeof *out->to_access_m);
    ot = malloc((n_to + 1) * sizeof *ot);
    om = malloc((n_to + 1) * sizeof *om);
    bt = malloc((n_to + 1) * sizeof *bt);
    bm = malloc((n_to + 1) * sizeof *bm);
    if (!out->out_s || !out->back_s || !out->out_m || !out->back_m || !out->from_node ||
        !out->to_node || !out->from_access_m || !out->to_access_m || !ot || !om || !bt || !bm) {
        rc = err_set(e, ERR_NOMEM, "out of memory for depot travel times");
        goto done;
    }
    for (size_t i = 0; i < nm; i++)
        out->out_s[i] = out->back_s[i] = out->out_m[i] = out->back_m[i] = INFINITY;
    for (size_t f = 0; f < n_from; f++) {
        out->from_node[f] = -1;
        out->from_access_m[f] = INFINITY;
    }
    for (size_t t = 0; t < n_to; t++) {
        out->to_node[t] = -1;
        out->to_access_m[t] = INFINITY;
    }
    if (r == NULL || r->n_nodes == 0 || nm == 0) goto done;
    if ((rc = vgraph_build(r, &v, e)) != ERR_OK) goto done;
    for (size_t f = 0; f < n_from; f++)
        snap(r, v.usable, geographic, fx[f], fy[f], max_access_m, &out->from_node[f],
             &out->from_access_m[f]);
    for (size_t t = 0; t < n_to; t++)
        snap(r, v.usable, geographic, tx[t], ty[t], max_access_m, &out->to_node[t],
             &out->to_access_m[t]);
    for (size_t f = 0; f < n_from; f++) {
        double af = out->from_access_m[f];
        if (out->from_node[f] < 0) continue;
        if ((rc = from_one(&v, out->from_node[f], IGRAPH_OUT, out->to_node, n_to, ot, om, e)) ||
            (rc = from_one(&v, out->from_node[f], IGRAPH_IN, out->to_node, n_to, bt, bm, e)))
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
    vgraph_destroy(&v);
    free(ot);
    free(om);
    free(bt);
    free(bm);
    if (rc != ERR_OK) depots_travel_destroy(out);
    return rc;
}
