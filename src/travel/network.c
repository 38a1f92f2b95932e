/* network: builds the travel graph (see include/network.h for node numbering).
 * The whole edge list is written once into a reserved igraph_vector_int_t, with the
 * weight vector filled in the same order, and handed to igraph_create; every
 * temporary is freed before that call, because igraph_create itself needs about
 * 40 bytes per edge on top of the 16 of the list (dependency-facts.md) and the
 * build is the memory peak of a run.
 * Edge ids come in blocks: walking edges, road edges, connectors, then the virtual
 * source's edges, which are added on demand and later disabled by an infinite weight
 * rather than deleted (igraph_delete_edges would copy the whole graph). */
#include "network.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "tobler.h"

/* A virtual edge made by network_attach_sources: the node it joins and its edge id. */
typedef struct virt_edge {
    int64_t node;
    igraph_integer_t eid;
} virt_edge_t;

struct network {
    igraph_t graph;
    igraph_vector_t weights;   /* seconds per edge, +inf for disabled virtual edges */
    int graph_ok, weights_ok;  /* which of the two are initialised */
    int nx, ny;
    double gt[6];              /* the grid's geotransform */
    int direction, mode, neighbours;
    int64_t n_cells, n_road_orig, n_road_extra;
    double *rx, *ry;           /* n_road_orig + n_road_extra road node positions */
    virt_edge_t *virt;         /* sorted by node */
    size_t n_virt, cap_virt;
    network_stats_t st;
    int64_t n_edges;           /* built edges (virtual ones excluded) */
    int64_t *seg_e0;           /* n_segs + 1: road edges of segment i are [seg_e0[i], seg_e0[i+1]) */
    size_t n_segs;
    struct edit { int64_t eid; double old; } *edits;  /* undo log of what-if edits */
    size_t n_edits, cap_edits;
};

/* The edge list under construction, with its weights in the same order. Both
 * vectors are sized to an exact upper bound up front and written through plain
 * pointers (80M edges make per-call overhead count); trimmed to n at the end. */
typedef struct edge_buf {
    igraph_vector_int_t ends;  /* from,to pairs */
    igraph_vector_t w;         /* seconds */
    size_t n, cap;             /* edges written, room */
} edge_buf_t;

static int push_edge(edge_buf_t *b, int64_t from, int64_t to, double w, err_t *e)
{
    if (b->n == b->cap)
        return err_set(e, ERR_INTERNAL, "travel network: more edges than the %zu counted "
                       "in advance", b->cap);
    VECTOR(b->ends)[2 * b->n] = from;
    VECTOR(b->ends)[2 * b->n + 1] = to;
    VECTOR(b->w)[b->n] = w;
    b->n++;
    return ERR_OK;
}

/* Walking-speed factor of one cell from barriers and land cover: 0 = impassable.
 * Without a land-cover layer every passable cell has factor 1 (no information, so
 * no change); cover_default_factor applies to classes missing from the table and
 * to land-cover nodata. */
static double cell_factor(const grid_t *g, const scen_t *s, size_t c)
{
    if (g->barrier != NULL && g->barrier[c] != 0) return 0.0;
    if (g->landcover == NULL) return 1.0;
    int32_t v = g->landcover[c];
    if (v != INT32_MIN) {
        for (size_t i = 0; i < s->n_cover_factors; i++)
            if (s->cover_factors[i].value == v) return s->cover_factors[i].factor;
    }
    return s->cover_default_factor;
}

/* Neighbour offsets (row, col), only the forward half: each pair of cells is visited
 * once and gets both directed edges. The first four make the 8-neighbourhood, the
 * last four are the knight moves of the 16-neighbourhood. */
static const int OFFS[8][2] = {
    {0, 1}, {1, -1}, {1, 0}, {1, 1}, {1, -2}, {1, 2}, {2, -1}, {2, 1}
};

/* Add the walking edges between cells. Length: horizontal part |dc| times the mean
 * cell width of the two end rows, vertical part the centre-to-centre height (the mean
 * of two adjacent rows' heights); diagonal and knight moves take the hypotenuse.
 * Speed: walk_mps x the mean land-cover factor of the cells the straight move
 * touches (2 cells for orthogonal and diagonal moves, 4 for knight moves) x Tobler's
 * slope factor from the two end cells' elevations. A move is dropped when an end
 * cell is impassable, when a diagonal squeezes between two impassable cells (it
 * would cross a one-cell barrier line at its corner; common practice, no source),
 * or when a knight move touches an impassable cell. */
static int add_walk_edges(const grid_t *g, const scen_t *s, const double *fac, edge_buf_t *b,
                          size_t *n_added, err_t *e)
{
    const int nx = g->nx, ny = g->ny;
    const int n_offs = s->neighbours == 16 ? 8 : 4;
    const int slope = s->use_slope && g->elevation != NULL;
    size_t n0 = b->n;

    for (int row = 0; row < ny; row++) {
        for (int col = 0; col < nx; col++) {
            size_t u = (size_t)row * (size_t)nx + (size_t)col;
            double fu = fac[u];
            if (fu <= 0.0) continue;
            for (int k = 0; k < n_offs; k++) {
                int dr = OFFS[k][0], dc = OFFS[k][1];
                int r2 = row + dr, c2 = col + dc;
                if (r2 >= ny || c2 < 0 || c2 >= nx) continue;
                size_t v = (size_t)r2 * (size_t)nx + (size_t)c2;
                double fv = fac[v], fsum = fu + fv, nf = 2.0;
                if (fv <= 0.0) continue;
                int adc = dc < 0 ? -dc : dc, sc = dc < 0 ? -1 : 1;
                if (dr == 1 && adc == 1) {
                    double fa = fac[(size_t)row * nx + c2], fb = fac[(size_t)r2 * nx + col];
                    if (fa <= 0.0 && fb <= 0.0) continue;
                } else if (dr == 1 && adc == 2) {
                    /* (0,0)->(1,2) crosses cells (0,1) and (1,1). */
                    double fa = fac[(size_t)row * nx + col + sc];
                    double fb = fac[(size_t)r2 * nx + col + sc];
                    if (fa <= 0.0 || fb <= 0.0) continue;
                    fsum += fa + fb;
                    nf = 4.0;
                } else if (dr == 2) {
                    /* (0,0)->(2,1) crosses cells (1,0) and (1,1). */
                    double fa = fac[(size_t)(row + 1) * nx + col];
                    double fb = fac[(size_t)(row + 1) * nx + col + sc];
                    if (fa <= 0.0 || fb <= 0.0) continue;
                    fsum += fa + fb;
                    nf = 4.0;
                }
                double lx = adc * 0.5 * (g->row_dx_m[row] + g->row_dx_m[r2]);
                double ly = 0.0;
                if (dr == 1) ly = 0.5 * (g->row_dy_m[row] + g->row_dy_m[r2]);
                else if (dr == 2)
                    ly = 0.5 * g->row_dy_m[row] + g->row_dy_m[row + 1] + 0.5 * g->row_dy_m[r2];
                double len = hypot(lx, ly);
                double speed = s->walk_mps * (fsum / nf);
                double suv = 1.0, svu = 1.0;
                if (slope) {
                    double hu = g->elevation[u], hv = g->elevation[v];
                    /* Nodata elevation at either end: treat as flat. */
                    if (isfinite(hu) && isfinite(hv)) {
                        double S = (hv - hu) / len;
                        suv = tobler_factor(S);
                        svu = tobler_factor(-S);
                    }
                }
                int rc = push_edge(b, (int64_t)u, (int64_t)v, len / (speed * suv), e);
                if (rc == ERR_OK) rc = push_edge(b, (int64_t)v, (int64_t)u, len / (speed * svu), e);
                if (rc != ERR_OK) return rc;
            }
        }
    }
    *n_added = b->n - n0;
    return ERR_OK;
}

/* Fractional cell coordinates (u = column, v = row, cell (0,0) spans [0,1)) of a
 * point in the grid CRS. */
static void to_cell_uv(const double *gt, double x, double y, double *u, double *v)
{
    *u = (x - gt[0]) / gt[1];
    *v = (y - gt[3]) / gt[5];
}

/* Number of pieces a segment is cut into so that each piece moves at most one cell
 * width along either axis; consecutive nodes then lie in the same or adjacent cells. */
static int64_t seg_pieces(const double *gt, double xa, double ya, double xb, double yb)
{
    double ua, va, ub, vb;
    to_cell_uv(gt, xa, ya, &ua, &va);
    to_cell_uv(gt, xb, yb, &ub, &vb);
    double m = fmax(fabs(ub - ua), fabs(vb - va));
    int64_t k = (int64_t)ceil(m);
    return k < 1 ? 1 : k;
}

/* Cell holding point (x,y), or -1 when it lies outside the grid. Points on the far
 * edge (clipped road ends) belong to the last row or column. */
static int64_t cell_of_point(const network_t *net, double x, double y, int *col, int *row)
{
    double u, v;
    to_cell_uv(net->gt, x, y, &u, &v);
    const double tol = 1e-9;
    if (!(u >= -tol && v >= -tol && u <= net->nx + tol && v <= net->ny + tol)) return -1;
    int c = (int)floor(u), r = (int)floor(v);
    if (c < 0) c = 0;
    if (r < 0) r = 0;
    if (c >= net->nx) c = net->nx - 1;
    if (r >= net->ny) r = net->ny - 1;
    *col = c;
    *row = r;
    return (int64_t)r * net->nx + c;
}

/* Distance in metres from (x,y) to the centre of cell (col,row), using that row's
 * cell size in metres, so it also holds on lon/lat grids. */
static double dist_to_centre(const network_t *net, const grid_t *g, double x, double y,
                             int col, int row)
{
    double cx = net->gt[0] + (col + 0.5) * net->gt[1];
    double cy = net->gt[3] + (row + 0.5) * net->gt[5];
    double dxm = (x - cx) / fabs(net->gt[1]) * g->row_dx_m[row];
    double dym = (y - cy) / fabs(net->gt[5]) * g->row_dy_m[row];
    return hypot(dxm, dym);
}

/* Connector pair between road node 'node' at (x,y) and the cell containing it.
 * Weight = straight distance from the node to the cell centre at the off-road
 * walking speed of that cell: walk_mps x its land-cover factor (slope is left out
 * over this hop of at most a cell diagonal). None when the node is off the grid.
 * When the cell is impassable (a bridge end that falls in a river cell of a coarse
 * grid, say) and 'fallback' is set, the node joins the nearest passable of the 8
 * surrounding cells instead, so the road still meets the land; otherwise none. */
static int add_connector(network_t *net, const grid_t *g, const scen_t *s, const double *fac,
                         int64_t node, double x, double y, int fallback, edge_buf_t *b,
                         err_t *e)
{
    int col = 0, row = 0;
    int64_t c = cell_of_point(net, x, y, &col, &row);
    double d;
    if (c < 0) {
        net->st.n_road_off_grid++;
        return ERR_OK;
    }
    d = dist_to_centre(net, g, x, y, col, row);
    if (fac[c] <= 0.0) {
        int64_t best = -1;
        double bd = INFINITY;
        for (int dr = -1; fallback && dr <= 1; dr++) {
            for (int dc = -1; dc <= 1; dc++) {
                int r2 = row + dr, c2 = col + dc;
                if (r2 < 0 || c2 < 0 || r2 >= net->ny || c2 >= net->nx) continue;
                int64_t c3 = (int64_t)r2 * net->nx + c2;
                double d3 = dist_to_centre(net, g, x, y, c2, r2);
                if (fac[c3] > 0.0 && d3 < bd) {
                    bd = d3;
                    best = c3;
                }
            }
        }
        if (best < 0) return ERR_OK;
        c = best;
        d = bd;
    }
    double w = d / (s->walk_mps * fac[c]);
    int rc = push_edge(b, node, c, w, e);
    if (rc == ERR_OK) rc = push_edge(b, c, node, w, e);
    if (rc == ERR_OK) net->st.n_connector_edges += 2;
    return rc;
}

/* Check the road layer against itself before using any index from it. */
static int check_roads(const roads_t *r, err_t *e)
{
    for (size_t i = 0; i < r->n_nodes; i++) {
        if (!isfinite(r->x[i]) || !isfinite(r->y[i]))
            return err_set(e, ERR_INPUT, "road node %zu has a non-finite position", i);
    }
    for (size_t i = 0; i < r->n_segs; i++) {
        const road_seg_t *sg = &r->segs[i];
        if (sg->a < 0 || (size_t)sg->a >= r->n_nodes || sg->b < 0 || (size_t)sg->b >= r->n_nodes)
            return err_set(e, ERR_INPUT, "road segment %zu joins node %ld and %ld, but the road "
                           "layer has %zu nodes", i, (long)sg->a, (long)sg->b, r->n_nodes);
        if (sg->cls < 0 || (size_t)sg->cls >= r->n_classes)
            return err_set(e, ERR_INPUT, "road segment %zu has class index %ld, but there are "
                           "%zu classes", i, (long)sg->cls, r->n_classes);
        if (!(sg->length_m > 0.0) || !isfinite(sg->length_m))
            return err_set(e, ERR_INPUT, "road segment %zu has length %g m; lengths must be "
                           "positive", i, sg->length_m);
    }
    return ERR_OK;
}

/* Road nodes, road edges and connectors. Each segment a->b is cut into k pieces of
 * length length_m / k with k-1 extra nodes (see seg_pieces). Road edges run both ways
 * at the class speed of the mode; in vehicle mode a class with vehicle speed 0 has no
 * road edges and one-way segments only run a->b. Connectors: every extra node of an
 * ordinary segment, every original node with at least one ordinary segment, and
 * original nodes marked as junctions (which include line ends, so bridge and tunnel
 * ends and limited-access junctions get theirs); a segment is not ordinary when it is
 * a bridge, a tunnel or limited access. Original nodes on an impassable cell join a
 * passable neighbour cell (see add_connector); extra nodes there get none. */
static int add_roads(network_t *net, const grid_t *g, const roads_t *r, const scen_t *s,
                     const double *fac, edge_buf_t *b, err_t *e)
{
    const uint8_t NOT_PLAIN = ROAD_BRIDGE | ROAD_TUNNEL | ROAD_LIMITED;
    uint8_t *plain = NULL;     /* per original node: 1 has an ordinary segment, 2 any */
    int64_t base = net->n_cells, extra = base + net->n_road_orig;
    int64_t next = 0;          /* extra nodes made so far */
    int rc = ERR_OK;

    plain = calloc(r->n_nodes ? r->n_nodes : 1, 1);
    if (plain == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory for %zu road nodes", r->n_nodes);
        goto done;
    }
    for (size_t i = 0; i < r->n_nodes; i++) {
        net->rx[i] = r->x[i];
        net->ry[i] = r->y[i];
    }
    for (size_t i = 0; i < r->n_segs; i++) {
        const road_seg_t *sg = &r->segs[i];
        uint8_t f = (sg->flags & NOT_PLAIN) ? 2 : 3;
        plain[sg->a] |= f;
        plain[sg->b] |= f;
    }

    for (size_t i = 0; i < r->n_segs; i++) {
        const road_seg_t *sg = &r->segs[i];
        const road_class_count_t *cl = &r->classes[sg->cls];
        double xa = r->x[sg->a], ya = r->y[sg->a], xb = r->x[sg->b], yb = r->y[sg->b];
        int64_t k = seg_pieces(net->gt, xa, ya, xb, yb);
        double speed = net->mode == SCEN_MODE_VEHICLE ? cl->vehicle_mps : cl->walk_mps;
        int usable = speed > 0.0 && isfinite(speed);
        int both = !(net->mode == SCEN_MODE_VEHICLE && (sg->flags & ROAD_ONEWAY));
        int plain_seg = (sg->flags & NOT_PLAIN) == 0;
        double w = sg->length_m / (double)k / speed;
        int64_t prev = base + sg->a;

        net->seg_e0[i] = (int64_t)b->n;

        for (int64_t j = 1; j <= k; j++) {
            int64_t cur;
            if (j == k) {
                cur = base + sg->b;
            } else {
                double t = (double)j / (double)k;
                int64_t idx = net->n_road_orig + next;
                cur = extra + next++;
                net->rx[idx] = xa + t * (xb - xa);
                net->ry[idx] = ya + t * (yb - ya);
                if (plain_seg) {
                    rc = add_connector(net, g, s, fac, cur, net->rx[idx], net->ry[idx], 0, b, e);
                    if (rc != ERR_OK) goto done;
                }
            }
            if (usable) {
                rc = push_edge(b, prev, cur, w, e);
                if (rc == ERR_OK && both) rc = push_edge(b, cur, prev, w, e);
                if (rc != ERR_OK) goto done;
                net->st.n_road_edges += both ? 2 : 1;
            }
            prev = cur;
        }
    }
    net->seg_e0[r->n_segs] = (int64_t)b->n;
    for (size_t i = 0; i < r->n_nodes; i++) {
        int junction = r->node_junction != NULL && r->node_junction[i] != 0;
        /* Isolated nodes (no segment) keep a connector: harmless and visible. */
        if ((plain[i] & 1) || junction || plain[i] == 0) {
            rc = add_connector(net, g, s, fac, base + (int64_t)i, r->x[i], r->y[i], 1, b, e);
            if (rc != ERR_OK) goto done;
        }
    }
done:
    free(plain);
    return rc;
}

static int check_inputs(const grid_t *g, const scen_t *s, err_t *e)
{
    if (g == NULL || g->nx < 1 || g->ny < 1)
        return err_set(e, ERR_INPUT, "travel network: the grid is empty (%d x %d cells)",
                       g ? g->nx : 0, g ? g->ny : 0);
    if (g->row_dx_m == NULL || g->row_dy_m == NULL)
        return err_set(e, ERR_INPUT, "travel network: the grid has no cell sizes in metres");
    if (!(g->gt[1] != 0.0) || !(g->gt[5] != 0.0) || !isfinite(g->gt[1]) || !isfinite(g->gt[5]))
        return err_set(e, ERR_INPUT, "travel network: the grid's geotransform has pixel size "
                       "%g x %g", g->gt[1], g->gt[5]);
    for (int r = 0; r < g->ny; r++) {
        if (!(g->row_dx_m[r] > 0.0) || !(g->row_dy_m[r] > 0.0)
            || !isfinite(g->row_dx_m[r]) || !isfinite(g->row_dy_m[r]))
            return err_set(e, ERR_INPUT, "travel network: grid row %d has cell size %g x %g m; "
                           "sizes must be positive", r, g->row_dx_m[r], g->row_dy_m[r]);
    }
    if (s->neighbours != 8 && s->neighbours != 16)
        return err_set(e, ERR_INPUT, "travel.neighbours is %d; use 8 or 16", s->neighbours);
    if (!(s->walk_mps > 0.0) || !isfinite(s->walk_mps))
        return err_set(e, ERR_INPUT, "travel.walk.speed_kmh gives %g m/s; it must be positive",
                       s->walk_mps);
    if (s->mode != SCEN_MODE_WALK && s->mode != SCEN_MODE_VEHICLE)
        return err_set(e, ERR_INPUT, "travel.mode has unknown value %d", s->mode);
    if (s->direction != SCEN_TO_SITE && s->direction != SCEN_FROM_SITE)
        return err_set(e, ERR_INPUT, "travel.direction has unknown value %d", s->direction);
    for (size_t i = 0; i < s->n_cover_factors; i++) {
        double f = s->cover_factors[i].factor;
        if (!(f >= 0.0) || !isfinite(f))
            return err_set(e, ERR_INPUT, "travel.landcover_factors: class %d has factor %g; "
                           "factors must be >= 0", s->cover_factors[i].value, f);
    }
    if (!(s->cover_default_factor >= 0.0) || !isfinite(s->cover_default_factor))
        return err_set(e, ERR_INPUT, "travel.landcover_default is %g; it must be >= 0",
                       s->cover_default_factor);
    return ERR_OK;
}

int network_build(const grid_t *g, const roads_t *r, const scen_t *s, network_t **out,
                  err_t *e)
{
    network_t *net = NULL;
    double *fac = NULL;
    edge_buf_t b;
    int b_ends = 0, b_w = 0;
    int rc = ERR_OK;
    size_t n_walk = 0;

    *out = NULL;
    rc = check_inputs(g, s, e);
    if (rc == ERR_OK && r != NULL) rc = check_roads(r, e);
    if (rc != ERR_OK) goto done;

    net = calloc(1, sizeof *net);
    if (net == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory for the travel network");
        goto done;
    }
    net->nx = g->nx;
    net->ny = g->ny;
    memcpy(net->gt, g->gt, sizeof net->gt);
    net->direction = s->direction;
    net->mode = s->mode;
    net->neighbours = s->neighbours;
    net->n_cells = (int64_t)g->nx * g->ny;
    net->n_road_orig = r != NULL ? (int64_t)r->n_nodes : 0;
    if (r != NULL) {
        /* A segment can cross at most nx + ny cells inside the grid; a longer one
         * was not clipped and would blow up the densification. */
        int64_t most = (int64_t)g->nx + g->ny + 2;
        for (size_t i = 0; i < r->n_segs; i++) {
            const road_seg_t *sg = &r->segs[i];
            int64_t k = seg_pieces(g->gt, r->x[sg->a], r->y[sg->a], r->x[sg->b], r->y[sg->b]);
            if (k > most) {
                rc = err_set(e, ERR_INPUT, "road segment %zu spans %ld cells, more than the "
                             "grid's %d x %d; roads must be clipped to the grid", i, (long)k,
                             g->nx, g->ny);
                goto done;
            }
            net->n_road_extra += k - 1;
        }
    }
    /* travel keeps node ids in int32 arrays to halve its memory. */
    if (net->n_cells + net->n_road_orig + net->n_road_extra + 1 > INT32_MAX) {
        rc = err_set(e, ERR_INPUT, "travel network: %ld cells and %ld road nodes exceed the "
                     "limit of %d nodes; use a coarser grid or split the area into tiles",
                     (long)net->n_cells, (long)(net->n_road_orig + net->n_road_extra),
                     INT32_MAX - 1);
        goto done;
    }
    net->st.n_cells = (size_t)net->n_cells;
    net->st.n_road_orig = (size_t)net->n_road_orig;
    net->st.n_road_extra = (size_t)net->n_road_extra;
    {
        size_t nr = (size_t)(net->n_road_orig + net->n_road_extra);
        net->rx = malloc((nr ? nr : 1) * sizeof *net->rx);
        net->ry = malloc((nr ? nr : 1) * sizeof *net->ry);
        fac = malloc((size_t)net->n_cells * sizeof *fac);
        net->n_segs = r != NULL ? r->n_segs : 0;
        net->seg_e0 = calloc(net->n_segs + 1, sizeof *net->seg_e0);
        if (net->rx == NULL || net->ry == NULL || fac == NULL || net->seg_e0 == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory for %ld cells", (long)net->n_cells);
            goto done;
        }
    }
    for (int64_t c = 0; c < net->n_cells; c++) {
        fac[c] = cell_factor(g, s, (size_t)c);
        if (fac[c] <= 0.0) net->st.n_cells_blocked++;
    }

    /* Reserve the whole list once: at most neighbours directed edges per cell, two
     * per road piece, two connectors per road node. Pages never written are never
     * resident, so the small excess costs no memory. */
    {
        size_t cap = (size_t)net->n_cells * (size_t)s->neighbours;
        if (r != NULL)
            cap += 2 * (r->n_segs + (size_t)net->n_road_extra)
                 + 2 * (size_t)(net->n_road_orig + net->n_road_extra);
        if (igraph_vector_int_init(&b.ends, 0) != IGRAPH_SUCCESS) goto nomem;
        b_ends = 1;
        if (igraph_vector_init(&b.w, 0) != IGRAPH_SUCCESS) goto nomem;
        b_w = 1;
        /* resize leaves the memory unwritten, so it is not yet resident. */
        if (igraph_vector_int_resize(&b.ends, 2 * (igraph_integer_t)cap) != IGRAPH_SUCCESS
            || igraph_vector_resize(&b.w, (igraph_integer_t)cap) != IGRAPH_SUCCESS)
            goto nomem;
        b.n = 0;
        b.cap = cap;
    }
    rc = add_walk_edges(g, s, fac, &b, &n_walk, e);
    if (rc != ERR_OK) goto done;
    net->st.n_walk_edges = n_walk;
    if (r != NULL) {
        rc = add_roads(net, g, r, s, fac, &b, e);
        if (rc != ERR_OK) goto done;
    }
    free(fac);
    fac = NULL;
    /* Shrinking never reallocates or fails. */
    igraph_vector_int_resize(&b.ends, 2 * (igraph_integer_t)b.n);
    igraph_vector_resize(&b.w, (igraph_integer_t)b.n);

    {
        igraph_integer_t nv = (igraph_integer_t)(net->n_cells + net->n_road_orig
                                                 + net->n_road_extra + 1);
        igraph_error_t ie = igraph_create(&net->graph, &b.ends, nv, IGRAPH_DIRECTED);
        if (ie != IGRAPH_SUCCESS) {
            rc = err_set(e, ie == IGRAPH_ENOMEM ? ERR_NOMEM : ERR_GRAPH,
                         "igraph could not build the travel network of %ld nodes and %ld "
                         "edges: %s", (long)nv, (long)b.n,
                         igraph_strerror(ie));
            goto done;
        }
        net->graph_ok = 1;
    }
    igraph_vector_int_destroy(&b.ends);
    b_ends = 0;
    net->n_edges = (int64_t)b.n;
    net->weights = b.w;        /* ownership moves to the network */
    b_w = 0;
    net->weights_ok = 1;

    *out = net;
    net = NULL;
    goto done;
nomem:
    rc = err_set(e, ERR_NOMEM, "out of memory reserving the edge list for %ld cells",
                 (long)net->n_cells);
done:
    if (b_ends) igraph_vector_int_destroy(&b.ends);
    if (b_w) igraph_vector_destroy(&b.w);
    free(fac);
    network_free(net);
    return rc;
}

void network_free(network_t *net)
{
    if (net == NULL) return;
    if (net->graph_ok) igraph_destroy(&net->graph);
    if (net->weights_ok) igraph_vector_destroy(&net->weights);
    free(net->rx);
    free(net->ry);
    free(net->virt);
    free(net->seg_e0);
    free(net->edits);
    free(net);
}

void network_get_stats(const network_t *net, network_stats_t *st)
{
    *st = net->st;
}

int64_t network_n_nodes(const network_t *net)
{
    return net->n_cells + net->n_road_orig + net->n_road_extra;
}

int64_t network_n_cells(const network_t *net) { return net->n_cells; }
int network_nx(const network_t *net) { return net->nx; }
int network_ny(const network_t *net) { return net->ny; }

int64_t network_cell_node(const network_t *net, int col, int row)
{
    if (col < 0 || row < 0 || col >= net->nx || row >= net->ny) return -1;
    return (int64_t)row * net->nx + col;
}

int network_node_cell(const network_t *net, int64_t node, int *col, int *row)
{
    if (node < 0 || node >= net->n_cells) return 0;
    if (col != NULL) *col = (int)(node % net->nx);
    if (row != NULL) *row = (int)(node / net->nx);
    return 1;
}

int64_t network_road_node(const network_t *net, int64_t road_node)
{
    if (road_node < 0 || road_node >= net->n_road_orig) return -1;
    return net->n_cells + road_node;
}

int network_node_road(const network_t *net, int64_t node, int64_t *road_node)
{
    int64_t i = node - net->n_cells;
    if (node < net->n_cells || i >= net->n_road_orig + net->n_road_extra) return 0;
    if (road_node != NULL) *road_node = i < net->n_road_orig ? i : -1;
    return 1;
}

int network_node_is_cell(const network_t *net, int64_t node)
{
    return node >= 0 && node < net->n_cells;
}

int network_node_xy(const network_t *net, int64_t node, double *x, double *y)
{
    int col, row;
    if (network_node_cell(net, node, &col, &row)) {
        *x = net->gt[0] + (col + 0.5) * net->gt[1];
        *y = net->gt[3] + (row + 0.5) * net->gt[5];
        return 1;
    }
    if (network_node_road(net, node, NULL)) {
        *x = net->rx[node - net->n_cells];
        *y = net->ry[node - net->n_cells];
        return 1;
    }
    return 0;
}

const igraph_t *network_graph(const network_t *net) { return &net->graph; }
const igraph_vector_t *network_weights(const network_t *net) { return &net->weights; }
int64_t network_virtual_node(const network_t *net) { return network_n_nodes(net); }
int network_direction(const network_t *net) { return net->direction; }

igraph_neimode_t network_search_mode(const network_t *net)
{
    return net->direction == SCEN_FROM_SITE ? IGRAPH_OUT : IGRAPH_IN;
}

static int cmp_virt(const void *a, const void *b)
{
    int64_t x = ((const virt_edge_t *)a)->node, y = ((const virt_edge_t *)b)->node;
    return (x > y) - (x < y);
}

static virt_edge_t *find_virt(const network_t *net, int64_t node)
{
    virt_edge_t key = {node, 0};
    if (net->n_virt == 0) return NULL;
    return bsearch(&key, net->virt, net->n_virt, sizeof key, cmp_virt);
}

/* New virtual edges are added in one igraph_add_edges call, which re-indexes the
 * graph once (about 24 bytes per edge of temporaries, below the build's peak). */
int network_attach_sources(network_t *net, const int64_t *nodes, size_t n, err_t *e)
{
    igraph_vector_int_t add;
    int add_ok = 0, rc = ERR_OK;
    int64_t virt = network_virtual_node(net);
    size_t n_new = 0;

    network_detach_sources(net);
    for (size_t i = 0; i < n; i++) {
        if (nodes[i] < 0 || nodes[i] >= virt)
            return err_set(e, ERR_INPUT, "site %zu is node %ld, but the travel network has "
                           "nodes 0..%ld", i, (long)nodes[i], (long)virt - 1);
    }
    if (igraph_vector_int_init(&add, 0) != IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_NOMEM, "out of memory attaching %zu sites", n);
        goto done;
    }
    add_ok = 1;
    for (size_t i = 0; i < n; i++) {
        virt_edge_t *ve = find_virt(net, nodes[i]);
        if (ve != NULL) {
            VECTOR(net->weights)[ve->eid] = 0.0;
            continue;
        }
        if (net->n_virt + n_new + 1 > net->cap_virt) {
            size_t cap = net->cap_virt ? 2 * net->cap_virt : 64;
            while (cap < net->n_virt + n_new + 1) cap *= 2;
            virt_edge_t *p = realloc(net->virt, cap * sizeof *p);
            if (p == NULL) {
                rc = err_set(e, ERR_NOMEM, "out of memory attaching %zu sites", n);
                goto done;
            }
            net->virt = p;
            net->cap_virt = cap;
        }
        net->virt[net->n_virt + n_new].node = nodes[i];
        net->virt[net->n_virt + n_new].eid = -1;
        n_new++;
    }
    if (n_new > 0) {
        /* A node listed twice gets one edge. */
        virt_edge_t *nw = net->virt + net->n_virt;
        qsort(nw, n_new, sizeof *nw, cmp_virt);
        size_t m = 0;
        for (size_t i = 0; i < n_new; i++)
            if (m == 0 || nw[m - 1].node != nw[i].node) nw[m++] = nw[i];
        n_new = m;
        igraph_integer_t e0 = igraph_ecount(&net->graph);
        for (size_t i = 0; i < n_new; i++) {
            int64_t a = net->direction == SCEN_FROM_SITE ? virt : nw[i].node;
            int64_t b2 = net->direction == SCEN_FROM_SITE ? nw[i].node : virt;
            if (igraph_vector_int_push_back(&add, a) != IGRAPH_SUCCESS
                || igraph_vector_int_push_back(&add, b2) != IGRAPH_SUCCESS) {
                rc = err_set(e, ERR_NOMEM, "out of memory attaching %zu sites", n);
                goto done;
            }
            nw[i].eid = e0 + (igraph_integer_t)i;
        }
        if (igraph_vector_resize(&net->weights, e0 + (igraph_integer_t)n_new) != IGRAPH_SUCCESS) {
            rc = err_set(e, ERR_NOMEM, "out of memory attaching %zu sites", n);
            goto done;
        }
        for (size_t i = 0; i < n_new; i++) VECTOR(net->weights)[e0 + (igraph_integer_t)i] = 0.0;
        igraph_error_t ie = igraph_add_edges(&net->graph, &add, NULL);
        if (ie != IGRAPH_SUCCESS) {
            igraph_vector_resize(&net->weights, e0); /* shrinking cannot fail */
            rc = err_set(e, ie == IGRAPH_ENOMEM ? ERR_NOMEM : ERR_GRAPH,
                         "igraph could not join %zu sites to the virtual source: %s", n_new,
                         igraph_strerror(ie));
            goto done;
        }
        net->n_virt += n_new;
        qsort(net->virt, net->n_virt, sizeof *net->virt, cmp_virt);
    }
done:
    if (add_ok) igraph_vector_int_destroy(&add);
    return rc;
}

void network_detach_sources(network_t *net)
{
    for (size_t i = 0; i < net->n_virt; i++) VECTOR(net->weights)[net->virt[i].eid] = INFINITY;
}

/* ---- what-if edits ---- */

int64_t network_n_edges(const network_t *net) { return net->n_edges; }
size_t network_n_segs(const network_t *net) { return net->n_segs; }
size_t network_n_edits(const network_t *net) { return net->n_edits; }

void network_edit_get(const network_t *net, size_t i, int64_t *eid, double *old_w)
{
    *eid = net->edits[i].eid;
    *old_w = net->edits[i].old;
}

int network_seg_edges(const network_t *net, size_t seg, int64_t *first, int64_t *n)
{
    if (seg >= net->n_segs) return 0;
    *first = net->seg_e0[seg];
    *n = net->seg_e0[seg + 1] - net->seg_e0[seg];
    return 1;
}

double network_edge_weight(const network_t *net, int64_t eid)
{
    return VECTOR(net->weights)[eid];
}

int network_edit_edge(network_t *net, int64_t eid, double w, err_t *e)
{
    if (eid < 0 || eid >= net->n_edges)
        return err_set(e, ERR_INTERNAL, "edge %ld is not a built edge (0..%ld)", (long)eid,
                       (long)net->n_edges - 1);
    if (net->n_edits == net->cap_edits) {
        size_t cap = net->cap_edits ? 2 * net->cap_edits : 1024;
        struct edit *p = realloc(net->edits, cap * sizeof *p);
        if (p == NULL) return err_set(e, ERR_NOMEM, "out of memory editing edge weights");
        net->edits = p;
        net->cap_edits = cap;
    }
    net->edits[net->n_edits].eid = eid;
    net->edits[net->n_edits].old = VECTOR(net->weights)[eid];
    net->n_edits++;
    VECTOR(net->weights)[eid] = w;
    return ERR_OK;
}

/* The incidence arrays of igraph_t are read directly, as travel.c does: the
 * out-edges of v are oi[os[v] .. os[v+1]-1], its in-edges ii[is[v] .. is[v+1]-1]. */
int network_edit_cells(network_t *net, const uint8_t *mask, double factor, size_t *n_edges,
                       err_t *e)
{
    const igraph_t *g = &net->graph;
    const igraph_integer_t *os = VECTOR(g->os), *oi = VECTOR(g->oi);
    const igraph_integer_t *is = VECTOR(g->is), *ii = VECTOR(g->ii);
    const igraph_integer_t *from = VECTOR(g->from);
    size_t n = 0;
    int rc;

    if (n_edges != NULL) *n_edges = 0;
    if (!(factor >= 0.0) || !(factor <= 1.0))
        return err_set(e, ERR_INPUT, "flood cell speed factor %g is outside [0, 1]", factor);
    for (int64_t c = 0; c < net->n_cells; c++) {
        if (!mask[c]) continue;
        for (int pass = 0; pass < 2; pass++) {
            const igraph_integer_t *st = pass ? is : os, *ix = pass ? ii : oi;
            for (igraph_integer_t k = st[c]; k < st[c + 1]; k++) {
                igraph_integer_t eid = ix[k];
                double w = VECTOR(net->weights)[eid];
                if (eid >= net->n_edges || !isfinite(w)) continue;
                /* An in-edge from another masked cell is that cell's out-edge: once only. */
                if (pass && factor > 0.0 && from[eid] < net->n_cells && mask[from[eid]]) continue;
                if ((rc = network_edit_edge(net, eid, factor > 0.0 ? w / factor : INFINITY, e))
                    != ERR_OK)
                    return rc;
                n++;
            }
        }
    }
    if (n_edges != NULL) *n_edges = n;
    return ERR_OK;
}

void network_edit_reset(network_t *net)
{
    while (net->n_edits > 0) {
        net->n_edits--;
        VECTOR(net->weights)[net->edits[net->n_edits].eid] = net->edits[net->n_edits].old;
    }
}

int network_search_tree(network_t *net, const int64_t *site_nodes, size_t n_sites,
                        int64_t *inbound, err_t *e)
{
    igraph_vector_int_t parents, inb;
    int par_ok = 0, inb_ok = 0, rc;
    int64_t virt = network_virtual_node(net), n = network_n_nodes(net);

    if ((rc = network_attach_sources(net, site_nodes, n_sites, e)) != ERR_OK) return rc;
    if (igraph_vector_int_init(&parents, 0) != IGRAPH_SUCCESS) goto nomem;
    par_ok = 1;
    if (igraph_vector_int_init(&inb, 0) != IGRAPH_SUCCESS) goto nomem;
    inb_ok = 1;
    {
        igraph_error_t ie = igraph_get_shortest_paths_dijkstra(
            &net->graph, NULL, NULL, virt, igraph_vss_all(), &net->weights,
            network_search_mode(net), &parents, &inb);
        if (ie != IGRAPH_SUCCESS) {
            rc = err_set(e, ie == IGRAPH_ENOMEM ? ERR_NOMEM : ERR_GRAPH,
                         "shortest-path tree from %zu sites failed in igraph: %s", n_sites,
                         igraph_strerror(ie));
            goto done;
        }
    }
    for (int64_t v = 0; v < n; v++) {
        igraph_integer_t p = VECTOR(parents)[v];
        /* igraph also settles nodes through +inf edges (at infinite distance). */
        if (p < 0 || !isfinite(VECTOR(net->weights)[VECTOR(inb)[v]])) inbound[v] = -2;
        else inbound[v] = p == virt ? -1 : VECTOR(inb)[v];
    }
    goto done;
nomem:
    rc = err_set(e, ERR_NOMEM, "out of memory for the shortest-path tree of %ld nodes", (long)n);
done:
    network_detach_sources(net);
    if (par_ok) igraph_vector_int_destroy(&parents);
    if (inb_ok) igraph_vector_int_destroy(&inb);
    return rc;
}
