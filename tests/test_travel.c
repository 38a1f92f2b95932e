/* test_travel: nearest-site pass and bounded searches on hand-made networks.
 * Outside references: lattice geometry (octile distance; the worst direction error of
 * 8- and 16-neighbour lattices, derived in the comments), igraph's own
 * igraph_distances_dijkstra on the full graph, and Tobler (1993).
 * Helper modes for tests/xcheck/travel_networkx.sh:
 *   test_travel --export DIR        write edges/sources/results of two synthetic
 *                                   networks into DIR/walk_to and DIR/vehicle_from
 *   test_travel --csv-distances FILE SRC...   read a "from,to,weight" CSV edge list
 *                                   into igraph; print "src,node,dist" per node. */
#include <igraph.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "check.h"
#include "fixtures.h"
#include "network.h"
#include "travel.h"

/* ---- hand-made inputs (see test_network.c for the same layout) ---- */

/* Put road node i at the centre of cell (col,row) of grid g, shifted by (ox,oy) m. */
static void road_at(roads_t *r, const grid_t *g, size_t i, int col, int row, double ox,
                    double oy)
{
    r->x[i] = g->gt[0] + (col + 0.5) * g->gt[1] + ox;
    r->y[i] = g->gt[3] + (row + 0.5) * g->gt[5] + oy;
}

static void seg(roads_t *r, size_t i, int a, int b, int cls, uint8_t flags)
{
    r->segs[i].a = a;
    r->segs[i].b = b;
    r->segs[i].cls = cls;
    r->segs[i].length_m = hypot(r->x[b] - r->x[a], r->y[b] - r->y[a]);
    r->segs[i].flags = flags;
}

/* A synthetic district: hills, three land-cover classes and an impassable patch, a
 * river (barrier column) crossed by a bridge, a one-way path and a limited-access
 * road that has a junction only at its west end. 50 m cells. */
static void mk_world(int nx, int ny, grid_t **gout, roads_t **rout, scen_t *s,
                     scen_cover_factor_t *cf)
{
    grid_t *g = fx_lattice(nx, ny, 50.0);
    roads_t *r = fx_roads(8, 5, 3);
    int river = nx / 2;

    g->elevation = malloc((size_t)nx * ny * sizeof(float));
    g->landcover = malloc((size_t)nx * ny * sizeof(int32_t));
    g->barrier = calloc((size_t)nx * ny, 1);
    for (int row = 0; row < ny; row++) {
        for (int col = 0; col < nx; col++) {
            size_t c = (size_t)row * nx + col;
            g->elevation[c] = (float)(30.0 * sin(col / 7.0) + 20.0 * cos(row / 5.0)
                                      + (double)((col * 31 + row * 17) % 7));
            g->landcover[c] = (col / 8 + row / 6) % 3;
            if (col >= 3 && col <= 5 && row >= ny - 7 && row <= ny - 6) g->landcover[c] = 3;
            if (col == river) g->barrier[c] = 1;
        }
    }
    g->elevation[5] = NAN;   /* one nodata elevation */
    cf[0] = (scen_cover_factor_t){0, 1.0};
    cf[1] = (scen_cover_factor_t){1, 0.6};
    cf[2] = (scen_cover_factor_t){2, 0.35};
    cf[3] = (scen_cover_factor_t){3, 0.0};
    fx_scen_init(s);
    s->walk_mps = 5.0 / 3.6;
    s->cover_factors = cf;
    s->n_cover_factors = 4;

    r->classes[0] = (road_class_count_t){NULL, 0, 0.0, 1.5, 15.0, 1};
    r->classes[1] = (road_class_count_t){NULL, 0, 0.0, 1.2, 0.0, 1};
    r->classes[2] = (road_class_count_t){NULL, 0, 0.0, 1.4, 25.0, 1};
    road_at(r, g, 0, 2, 2, 13.0, -7.0);
    road_at(r, g, 1, nx - 3, 2, -5.0, 11.0);
    road_at(r, g, 2, river - 2, 3, 0.0, 0.0);
    road_at(r, g, 3, river + 2, 3, 4.0, 0.0);
    road_at(r, g, 4, 1, ny - 2, 0.0, 0.0);
    road_at(r, g, 5, river - 3, ny / 2, 20.0, 20.0);
    road_at(r, g, 6, 3, ny - 4, 0.0, 0.0);
    road_at(r, g, 7, river - 2, ny - 4, 0.0, 0.0);
    seg(r, 0, 0, 2, 0, 0);
    seg(r, 1, 2, 3, 0, ROAD_BRIDGE);
    seg(r, 2, 3, 1, 0, ROAD_ONEWAY);
    seg(r, 3, 4, 5, 1, ROAD_ONEWAY);
    seg(r, 4, 6, 7, 2, ROAD_LIMITED);
    for (int i = 0; i < 7; i++) r->node_junction[i] = 1;
    r->node_junction[2] = r->node_junction[3] = 0;   /* bridge ends met by one feature */
    *gout = g;
    *rout = r;
}

/* Distances from one source by igraph on the full graph, in the network's search
 * mode (virtual edges are disabled by +inf weights, which igraph ignores). */
static void igraph_from(const network_t *net, int64_t src, igraph_matrix_t *m)
{
    igraph_distances_dijkstra(network_graph(net), m, igraph_vss_1(src), igraph_vss_all(),
                              network_weights(net), network_search_mode(net));
}

/* ---- lattice geometry ---- */

static double max_dir_error(int neighbours, int n)
{
    grid_t *g = fx_lattice(n, n, 100.0);
    scen_t s;
    network_t *net = NULL;
    travel_result_t *res = NULL;
    err_t e = {0, ""};
    int64_t site;
    double worst = 0.0;

    fx_scen_init(&s);
    s.neighbours = neighbours;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    site = network_cell_node(net, n / 2, n / 2);
    CHECK(travel_nearest(net, &site, 1, &res, &e) == ERR_OK);
    for (int row = 0; row < n && res; row++) {
        for (int col = 0; col < n; col++) {
            double dx = col - n / 2, dy = row - n / 2, d = 100.0 * hypot(dx, dy);
            if (d == 0.0) continue;
            double err = res->time_s[network_cell_node(net, col, row)] / d - 1.0;
            if (err > worst) worst = err;
        }
    }
    travel_result_free(res);
    network_free(net);
    grid_free(g);
    return worst;
}

static void test_lattice(void)
{
    grid_t *g = fx_lattice(21, 21, 100.0);
    scen_t s;
    network_t *net = NULL;
    travel_result_t *res = NULL;
    err_t e = {0, ""};
    int64_t site;
    double worst = 0.0;

    fx_scen_init(&s);
    s.walk_mps = 1.25;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    site = network_cell_node(net, 10, 10);
    CHECK(travel_nearest(net, &site, 1, &res, &e) == ERR_OK);
    /* Octile distance, the exact shortest path on an 8-neighbour lattice:
     * max(dx,dy) + (sqrt 2 - 1) min(dx,dy) cells (lattice geometry). */
    for (int row = 0; row < 21; row++) {
        for (int col = 0; col < 21; col++) {
            double dx = fabs(col - 10.0), dy = fabs(row - 10.0);
            double oct = 100.0 * (fmax(dx, dy) + (sqrt(2.0) - 1.0) * fmin(dx, dy)) / 1.25;
            double t = res->time_s[network_cell_node(net, col, row)];
            double err = fabs(t - oct) / fmax(oct, 1.0);
            if (err > worst) worst = err;
            if (res->site[network_cell_node(net, col, row)] != 0) worst = 1.0;
        }
    }
    CHECK(worst < 1e-12);
    travel_result_free(res);
    network_free(net);
    grid_free(g);

    /* Worst direction error against the straight line, from lattice geometry:
     * 8 neighbours: sqrt(1 + (sqrt2 - 1)^2) - 1 = 8.24%, at slope tan 22.5 deg;
     * 16 neighbours: sqrt(1 + (sqrt5 - 2)^2) - 1 = 2.75%, at slope sqrt5 - 2. */
    double w8 = max_dir_error(8, 61), w16 = max_dir_error(16, 61);
    CHECK(w8 > 0.080 && w8 <= sqrt(1.0 + pow(sqrt(2.0) - 1.0, 2.0)) - 1.0 + 1e-12);
    CHECK(w16 > 0.025 && w16 < 0.03);
    CHECK(w16 <= sqrt(1.0 + pow(sqrt(5.0) - 2.0, 2.0)) - 1.0 + 1e-12);
}

/* ---- roads, bridges, one-ways, barriers, direction ---- */

static void test_road_shortcut(void)
{
    grid_t *g = fx_lattice(60, 3, 100.0);
    roads_t *r = fx_roads(2, 1, 1);
    scen_t s;
    network_t *net = NULL;
    travel_result_t *res = NULL;
    err_t e = {0, ""};
    int64_t site;

    fx_scen_init(&s);
    r->classes[0].walk_mps = 10.0;
    r->classes[0].vehicle_mps = 10.0;
    road_at(r, g, 0, 1, 1, 0.0, 0.0);
    road_at(r, g, 1, 58, 1, 0.0, 0.0);
    r->node_junction[0] = r->node_junction[1] = 1;
    seg(r, 0, 0, 1, 0, 0);
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    site = network_cell_node(net, 0, 1);
    CHECK(travel_nearest(net, &site, 1, &res, &e) == ERR_OK);
    /* 100 m walk + 5700 m of road at 10 m/s + 100 m walk (connectors at centres: 0). */
    CHECK_REL(res->time_s[network_cell_node(net, 59, 1)], 770.0, 1e-12);
    CHECK_REL(res->time_s[network_road_node(net, 1)], 670.0, 1e-12);
    travel_result_free(res);
    network_free(net);
    /* Without the road: 59 cells of walking. */
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    CHECK(travel_nearest(net, &site, 1, &res, &e) == ERR_OK);
    CHECK_REL(res->time_s[network_cell_node(net, 59, 1)], 5900.0, 1e-12);
    travel_result_free(res);
    network_free(net);
    roads_free(r);
    grid_free(g);
}

static void test_bridge(void)
{
    grid_t *g = fx_lattice(11, 3, 100.0);
    roads_t *r = fx_roads(2, 1, 1);
    scen_t s;
    network_t *net = NULL;
    travel_result_t *res = NULL;
    err_t e = {0, ""};
    int64_t site;
    uint8_t kinds[2] = {ROAD_BRIDGE, ROAD_TUNNEL};

    fx_scen_init(&s);
    g->barrier = calloc(33, 1);
    for (int row = 0; row < 3; row++) g->barrier[row * 11 + 5] = 1;
    r->classes[0].walk_mps = 1.0;
    road_at(r, g, 0, 2, 1, 0.0, 0.0);
    road_at(r, g, 1, 8, 1, 0.0, 0.0);
    r->node_junction[0] = r->node_junction[1] = 1;
    for (int k = 0; k < 2; k++) {
        seg(r, 0, 0, 1, 0, kinds[k]);
        CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
        site = network_cell_node(net, 0, 1);
        CHECK(travel_nearest(net, &site, 1, &res, &e) == ERR_OK);
        /* 200 m to the bridge, 600 m over it, then walk back from its far end. */
        CHECK_REL(res->time_s[network_cell_node(net, 8, 1)], 800.0, 1e-12);
        CHECK_REL(res->time_s[network_cell_node(net, 6, 1)], 1000.0, 1e-12);
        CHECK(isinf(res->time_s[network_cell_node(net, 5, 1)]));
        CHECK(res->site[network_cell_node(net, 5, 1)] == -1);
        travel_result_free(res);
        network_free(net);
    }
    /* The river cuts the east bank off without the bridge: INFINITY, never a big number. */
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    CHECK(travel_nearest(net, &site, 1, &res, &e) == ERR_OK);
    CHECK(isinf(res->time_s[network_cell_node(net, 8, 1)]) && res->time_s[8] > 0);
    CHECK(res->site[network_cell_node(net, 8, 1)] == -1);
    CHECK(res->site[network_cell_node(net, 4, 1)] == 0);
    travel_result_free(res);
    network_free(net);
    roads_free(r);
    grid_free(g);
}

static void test_oneway(void)
{
    grid_t *g = fx_lattice(30, 1, 100.0);
    roads_t *r = fx_roads(2, 1, 1);
    scen_t s;
    network_t *net = NULL;
    travel_result_t *res = NULL;
    err_t e = {0, ""};
    int64_t west, east;

    fx_scen_init(&s);
    s.mode = SCEN_MODE_VEHICLE;
    r->classes[0].walk_mps = 1.0;
    r->classes[0].vehicle_mps = 20.0;
    road_at(r, g, 0, 1, 0, 0.0, 0.0);
    road_at(r, g, 1, 28, 0, 0.0, 0.0);
    r->node_junction[0] = r->node_junction[1] = 1;
    seg(r, 0, 0, 1, 0, ROAD_ONEWAY);
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    west = network_cell_node(net, 0, 0);
    east = network_cell_node(net, 29, 0);
    /* To a site in the east: west to east is the road's way: 100 + 2700/20 + 100 s. */
    CHECK(travel_nearest(net, &east, 1, &res, &e) == ERR_OK);
    CHECK_REL(res->time_s[west], 335.0, 1e-12);
    travel_result_free(res);
    /* To a site in the west: against the one-way, so walk all 29 cells. */
    CHECK(travel_nearest(net, &west, 1, &res, &e) == ERR_OK);
    CHECK_REL(res->time_s[east], 2900.0, 1e-12);
    travel_result_free(res);
    network_free(net);
    /* From a site in the west (the site reaches people): with the one-way again. */
    s.direction = SCEN_FROM_SITE;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    CHECK(travel_nearest(net, &west, 1, &res, &e) == ERR_OK);
    CHECK_REL(res->time_s[east], 335.0, 1e-12);
    travel_result_free(res);
    network_free(net);
    /* Walking ignores one-way: 100 + 2700 + 100 at 1 m/s either way. */
    s.mode = SCEN_MODE_WALK;
    s.direction = SCEN_TO_SITE;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    CHECK(travel_nearest(net, &west, 1, &res, &e) == ERR_OK);
    CHECK_REL(res->time_s[east], 2900.0, 1e-12);
    travel_result_free(res);
    network_free(net);
    roads_free(r);
    grid_free(g);
}

static void test_barrier_ring(void)
{
    grid_t *g = fx_lattice(5, 5, 10.0);
    scen_t s;
    network_t *net = NULL;
    travel_result_t *res = NULL;
    err_t e = {0, ""};
    int64_t site = 0;

    fx_scen_init(&s);
    g->barrier = calloc(25, 1);
    for (int row = 1; row <= 3; row++)
        for (int col = 1; col <= 3; col++) g->barrier[row * 5 + col] = (row != 2 || col != 2);
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    CHECK(travel_nearest(net, &site, 1, &res, &e) == ERR_OK);
    CHECK(isinf(res->time_s[12]) && res->site[12] == -1);   /* enclosed */
    CHECK(isinf(res->time_s[6]) && res->site[6] == -1);     /* a barrier cell */
    CHECK(isfinite(res->time_s[24]) && res->site[24] == 0);
    travel_result_free(res);
    /* A site standing on the enclosed cell reaches only itself. */
    site = 12;
    CHECK(travel_nearest(net, &site, 1, &res, &e) == ERR_OK);
    CHECK_NEAR(res->time_s[12], 0.0, 0.0);
    CHECK(isinf(res->time_s[0]));
    travel_result_free(res);
    network_free(net);
    grid_free(g);
}

static void test_direction_slope(void)
{
    grid_t *g = fx_lattice(5, 1, 100.0);
    scen_t s;
    network_t *to = NULL, *from = NULL;
    travel_result_t *a = NULL, *b = NULL, *c = NULL;
    err_t e = {0, ""};
    int64_t bottom = 0, top = 4;

    fx_scen_init(&s);
    g->elevation = malloc(5 * sizeof(float));
    for (int i = 0; i < 5; i++) g->elevation[i] = (float)(10.0 * i);   /* S = 0.1 */
    CHECK(network_build(g, NULL, &s, &to, &e) == ERR_OK);
    s.direction = SCEN_FROM_SITE;
    CHECK(network_build(g, NULL, &s, &from, &e) == ERR_OK);
    /* People at the top walk down to a site at the bottom: S = -0.1, which Tobler
     * (1993) walks at the flat-ground pace: 400 s at 1 m/s. */
    CHECK(travel_nearest(to, &bottom, 1, &a, &e) == ERR_OK);
    CHECK_REL(a->time_s[top], 400.0, 1e-12);
    /* The site at the bottom reaches the top uphill: 400 / exp(-3.5 * 0.1). */
    CHECK(travel_nearest(from, &bottom, 1, &b, &e) == ERR_OK);
    CHECK_REL(b->time_s[top], 400.0 / exp(-0.35), 1e-12);
    CHECK(fabs(a->time_s[top] - b->time_s[top]) > 100.0);
    /* Reciprocity: from_site with the site at the top equals to_site with it at the
     * bottom read at the top (the same walk, top to bottom). */
    CHECK(travel_nearest(from, &top, 1, &c, &e) == ERR_OK);
    CHECK_REL(c->time_s[bottom], a->time_s[top], 1e-12);
    travel_result_free(a);
    travel_result_free(b);
    travel_result_free(c);
    network_free(to);
    network_free(from);
    grid_free(g);
}

/* ---- against igraph on the full graph ---- */

static void compare_nearest(network_t *net, const int64_t *sites, size_t n_sites)
{
    travel_result_t *res = NULL;
    err_t e = {0, ""};
    int64_t n = network_n_nodes(net);
    igraph_matrix_t m;
    size_t bad_t = 0, bad_s = 0, n_inf = 0;
    double *best = malloc((size_t)n * sizeof *best);

    CHECK(travel_nearest(net, sites, n_sites, &res, &e) == ERR_OK);
    if (res == NULL) {
        free(best);
        return;
    }
    igraph_matrix_init(&m, 0, 0);
    {
        /* One row per site. */
        igraph_vector_int_t from;
        igraph_vector_int_init(&from, (igraph_integer_t)n_sites);
        for (size_t i = 0; i < n_sites; i++) VECTOR(from)[i] = sites[i];
        igraph_distances_dijkstra(network_graph(net), &m, igraph_vss_vector(&from),
                                  igraph_vss_all(), network_weights(net),
                                  network_search_mode(net));
        igraph_vector_int_destroy(&from);
    }
    for (int64_t v = 0; v < n; v++) {
        best[v] = INFINITY;
        for (size_t i = 0; i < n_sites; i++) best[v] = fmin(best[v], MATRIX(m, i, v));
    }
    for (int64_t v = 0; v < n; v++) {
        double t = res->time_s[v];
        if (isinf(best[v])) {
            n_inf++;
            if (!isinf(t) || res->site[v] != -1) bad_t++;
            continue;
        }
        if (!(fabs(t - best[v]) <= 1e-12 * fmax(best[v], 1.0))) bad_t++;
        if (res->site[v] < 0 || (size_t)res->site[v] >= n_sites) {
            bad_s++;
            continue;
        }
        /* The labelled site must itself reach v in that time. */
        if (!(fabs(MATRIX(m, res->site[v], v) - t) <= 1e-12 * fmax(t, 1.0))) bad_s++;
    }
    CHECK(bad_t == 0);
    CHECK(bad_s == 0);
    CHECK(n_inf > 0);   /* the impassable patch and the river are unreachable */
    igraph_matrix_destroy(&m);
    travel_result_free(res);
    free(best);
}

static void compare_bounded(const network_t *net, const int64_t *src, size_t n_src,
                            double limit)
{
    travel_ws_t *ws = NULL;
    travel_reach_t rr, *many = calloc(n_src, sizeof *many);
    err_t e = {0, ""};
    igraph_matrix_t m;
    size_t bad = 0;
    int64_t n_cells = network_n_cells(net);

    CHECK(travel_ws_new(net, &ws, &e) == ERR_OK);
    CHECK(travel_bounded_many(net, src, n_src, limit, 2, many, &e) == ERR_OK);
    igraph_matrix_init(&m, 0, 0);
    for (size_t i = 0; i < n_src; i++) {
        CHECK(travel_bounded(net, ws, src[i], limit, &rr, &e) == ERR_OK);
        igraph_from(net, src[i], &m);
        size_t expect = 0;
        for (int64_t c = 0; c < n_cells; c++) expect += MATRIX(m, 0, c) <= limit;
        if (rr.n != expect || many[i].n != expect) bad++;
        for (size_t k = 0; k < rr.n; k++) {
            double t = MATRIX(m, 0, rr.cell[k]);
            if (!(fabs(rr.time_s[k] - t) <= 1e-12 * fmax(t, 1.0)) || rr.time_s[k] > limit) bad++;
            if (k > 0 && rr.time_s[k] < rr.time_s[k - 1]) bad++;   /* in order of time */
            if (k < many[i].n && (many[i].cell[k] != rr.cell[k]
                                  || many[i].time_s[k] != rr.time_s[k])) bad++;
        }
        travel_reach_destroy(&rr);
        travel_reach_destroy(&many[i]);
    }
    CHECK(bad == 0);
    igraph_matrix_destroy(&m);
    travel_ws_free(ws);
    free(many);
}

static void test_against_igraph(void)
{
    scen_cover_factor_t cf[4];
    grid_t *g = NULL;
    roads_t *r = NULL;
    scen_t s;
    network_t *net = NULL;
    err_t e = {0, ""};
    int64_t sites[6], src[12];

    for (int variant = 0; variant < 4; variant++) {
        mk_world(41, 29, &g, &r, &s, cf);
        s.neighbours = (variant & 1) ? 16 : 8;
        s.mode = (variant & 2) ? SCEN_MODE_VEHICLE : SCEN_MODE_WALK;
        s.direction = (variant & 2) ? SCEN_FROM_SITE : SCEN_TO_SITE;
        CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
        sites[0] = network_cell_node(net, 1, 1);
        sites[1] = network_cell_node(net, 35, 20);
        sites[2] = network_cell_node(net, 12, 25);
        sites[3] = network_road_node(net, 5);
        sites[4] = network_cell_node(net, 1, 1);   /* listed twice */
        sites[5] = network_cell_node(net, 30, 5);
        compare_nearest(net, sites, 6);
        /* Again with a subset: earlier virtual edges must be inactive now. */
        compare_nearest(net, sites + 1, 2);
        for (int i = 0; i < 12; i++) src[i] = (int64_t)(i * 97 + 13) % network_n_nodes(net);
        src[11] = network_road_node(net, 0);
        compare_bounded(net, src, 12, 300.0);
        compare_bounded(net, src, 12, 900.0);
        compare_bounded(net, src, 3, 0.0);
        network_free(net);
        roads_free(r);
        grid_free(g);
    }
}

/* ---- edge cases and failures ---- */

static void test_errors(void)
{
    grid_t *g = fx_lattice(4, 3, 10.0), *g2 = fx_lattice(2, 2, 10.0);
    scen_t s;
    network_t *net = NULL, *net2 = NULL;
    travel_result_t *res = (travel_result_t *)&s;
    travel_ws_t *ws = NULL, *ws2 = NULL;
    travel_reach_t rr;
    err_t e;
    int64_t sites[2] = {0, 12};

    fx_scen_init(&s);
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    CHECK(network_build(g2, NULL, &s, &net2, &e) == ERR_OK);

    e.code = 0;
    CHECK(travel_nearest(net, sites, 2, &res, &e) == ERR_INPUT);
    CHECK(res == NULL);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "site 1 is node 12");
    sites[1] = -3;
    CHECK(travel_nearest(net, sites, 2, &res, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "site 1 is node -3");

    /* No sites: everything unreachable, no error. */
    CHECK(travel_nearest(net, sites, 0, &res, &e) == ERR_OK);
    CHECK(res != NULL && isinf(res->time_s[0]) && res->site[11] == -1);
    travel_result_free(res);
    travel_result_free(NULL);

    CHECK(travel_ws_new(net, &ws, &e) == ERR_OK);
    CHECK(travel_ws_new(net2, &ws2, &e) == ERR_OK);
    e.code = 0;
    CHECK(travel_bounded(net, ws, 0, -1.0, &rr, &e) == ERR_INPUT);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "time limit -1 s");
    CHECK(travel_bounded(net, ws, 0, NAN, &rr, &e) == ERR_INPUT);
    CHECK(travel_bounded(net, ws, 12, 10.0, &rr, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "source node 12 is outside 0..11");
    CHECK(travel_bounded(net, ws2, 0, 10.0, &rr, &e) == ERR_INTERNAL);
    CHECK_STR_HAS(e.msg, "workspace made for 4 nodes");
    CHECK(rr.n == 0 && rr.cell == NULL);
    {
        int64_t src[3] = {0, 5, 40};
        travel_reach_t out[3];
        e.code = 0;
        CHECK(travel_bounded_many(net, src, 3, 60.0, 2, out, &e) == ERR_INPUT);
        CHECK(e.code == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "source node 40");
        CHECK(out[0].n == 0 && out[1].cell == NULL);
        CHECK(travel_bounded_many(net, src, 0, 60.0, 2, out, &e) == ERR_OK);
        /* Limit 0 reaches the source only; 10 s at 1 m/s over 10 m cells: + 4-neighbours. */
        CHECK(travel_bounded_many(net, src, 2, 0.0, 8, out, &e) == ERR_OK);
        CHECK(out[0].n == 1 && out[0].cell[0] == 0 && out[0].time_s[0] == 0.0);
        travel_reach_destroy(&out[0]);
        travel_reach_destroy(&out[1]);
        CHECK(travel_bounded(net, ws, 5, 10.0, &rr, &e) == ERR_OK);
        CHECK(rr.n == 5);
        travel_reach_destroy(&rr);
        travel_reach_destroy(NULL);
    }
    travel_ws_free(ws);
    travel_ws_free(ws2);
    travel_ws_free(NULL);
    network_free(net);
    network_free(net2);
    grid_free(g);
    grid_free(g2);

    /* A single cell: no edges at all; its own site reaches it in 0 s. */
    g = fx_lattice(1, 1, 10.0);
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    sites[0] = 0;
    CHECK(travel_nearest(net, sites, 1, &res, &e) == ERR_OK);
    CHECK(res != NULL && res->time_s[0] == 0.0 && res->site[0] == 0);
    travel_result_free(res);
    network_free(net);
    grid_free(g);
}

/* ---- helper modes for the networkx cross-check ---- */

static int export_one(const char *dir, int vehicle_from, err_t *e)
{
    scen_cover_factor_t cf[4];
    grid_t *g = NULL;
    roads_t *r = NULL;
    scen_t s;
    network_t *net = NULL;
    travel_result_t *res = NULL;
    FILE *f = NULL;
    char path[4096];
    int rc;
    int64_t sites[5];

    mk_world(41, 29, &g, &r, &s, cf);
    if (vehicle_from) {
        s.mode = SCEN_MODE_VEHICLE;
        s.direction = SCEN_FROM_SITE;
        s.neighbours = 16;
    }
    rc = network_build(g, r, &s, &net, e);
    if (rc != ERR_OK) goto done;
    sites[0] = network_cell_node(net, 1, 1);
    sites[1] = network_cell_node(net, 35, 20);
    sites[2] = network_cell_node(net, 12, 25);
    sites[3] = network_road_node(net, 5);
    sites[4] = network_cell_node(net, 30, 5);
    rc = travel_nearest(net, sites, 5, &res, e);
    if (rc != ERR_OK) goto done;
    mkdir(dir, 0755);
    snprintf(path, sizeof path, "%s/edges.csv", dir);
    if ((f = fopen(path, "w")) == NULL) {
        rc = err_set(e, ERR_IO, "cannot write '%s'", path);
        goto done;
    }
    fprintf(f, "from,to,weight\n");
    {
        const igraph_t *gr = network_graph(net);
        const igraph_vector_t *w = network_weights(net);
        for (igraph_integer_t k = 0; k < igraph_ecount(gr); k++) {
            if (isinf(VECTOR(*w)[k])) continue;   /* disabled virtual edges */
            fprintf(f, "%ld,%ld,%.17g\n", (long)IGRAPH_FROM(gr, k), (long)IGRAPH_TO(gr, k),
                    VECTOR(*w)[k]);
        }
    }
    fclose(f);
    snprintf(path, sizeof path, "%s/sources.csv", dir);
    if ((f = fopen(path, "w")) == NULL) {
        rc = err_set(e, ERR_IO, "cannot write '%s'", path);
        goto done;
    }
    fprintf(f, "direction,%s\nn_nodes,%ld\n", vehicle_from ? "from_site" : "to_site",
            (long)network_n_nodes(net));
    for (int i = 0; i < 5; i++) fprintf(f, "site,%ld\n", (long)sites[i]);
    fclose(f);
    snprintf(path, sizeof path, "%s/result.csv", dir);
    if ((f = fopen(path, "w")) == NULL) {
        rc = err_set(e, ERR_IO, "cannot write '%s'", path);
        goto done;
    }
    fprintf(f, "node,time_s,site\n");
    for (int64_t v = 0; v < res->n_nodes; v++)
        fprintf(f, "%ld,%.17g,%d\n", (long)v, res->time_s[v], (int)res->site[v]);
    fclose(f);
done:
    travel_result_free(res);
    network_free(net);
    roads_free(r);
    grid_free(g);
    return rc;
}

static int export_mode(const char *dir)
{
    char sub[4096];
    err_t e = {0, ""};
    mkdir(dir, 0755);
    snprintf(sub, sizeof sub, "%s/walk_to", dir);
    if (export_one(sub, 0, &e) == ERR_OK) {
        snprintf(sub, sizeof sub, "%s/vehicle_from", dir);
        export_one(sub, 1, &e);
    }
    if (e.code != ERR_OK) {
        fprintf(stderr, "test_travel --export: %s\n", e.msg);
        return 1;
    }
    return 0;
}

/* Read "from,to,weight" (first line a header) into igraph; print distances. */
static int csv_mode(const char *file, int n_src, char **src)
{
    FILE *f = fopen(file, "r");
    igraph_vector_int_t ed;
    igraph_vector_t w;
    igraph_t g;
    igraph_matrix_t m;
    char line[256];
    long a, b, maxv = -1;
    double wt;

    if (f == NULL) {
        fprintf(stderr, "test_travel --csv-distances: cannot open '%s'\n", file);
        return 1;
    }
    igraph_vector_int_init(&ed, 0);
    igraph_vector_init(&w, 0);
    if (fgets(line, sizeof line, f) == NULL) line[0] = '\0';
    while (fgets(line, sizeof line, f) != NULL) {
        if (sscanf(line, "%ld,%ld,%lf", &a, &b, &wt) != 3) continue;
        igraph_vector_int_push_back(&ed, a);
        igraph_vector_int_push_back(&ed, b);
        igraph_vector_push_back(&w, wt);
        if (a > maxv) maxv = a;
        if (b > maxv) maxv = b;
    }
    fclose(f);
    igraph_create(&g, &ed, maxv + 1, IGRAPH_DIRECTED);
    igraph_matrix_init(&m, 0, 0);
    printf("src,node,dist\n");
    for (int i = 0; i < n_src; i++) {
        long s0 = atol(src[i]);
        igraph_distances_dijkstra(&g, &m, igraph_vss_1(s0), igraph_vss_all(), &w, IGRAPH_OUT);
        for (long v = 0; v <= maxv; v++) printf("%ld,%ld,%.17g\n", s0, v, MATRIX(m, 0, v));
    }
    igraph_matrix_destroy(&m);
    igraph_destroy(&g);
    igraph_vector_int_destroy(&ed);
    igraph_vector_destroy(&w);
    return 0;
}

int main(int argc, char **argv)
{
    igraph_set_error_handler(igraph_error_handler_ignore);
    igraph_set_warning_handler(igraph_warning_handler_ignore);
    if (argc == 3 && strcmp(argv[1], "--export") == 0) return export_mode(argv[2]);
    if (argc >= 4 && strcmp(argv[1], "--csv-distances") == 0)
        return csv_mode(argv[2], argc - 3, argv + 3);

    test_lattice();
    test_road_shortcut();
    test_bridge();
    test_oneway();
    test_barrier_ring();
    test_direction_slope();
    test_against_igraph();
    test_errors();
    return CHECK_DONE("test_travel");
}
