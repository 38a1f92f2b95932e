/* test_network: building the travel graph by hand-made grids, roads and scenarios
 * (the structs are the contract; no loader is used). Checks Tobler's function
 * against the published formula, edge counts and weights against hand computation,
 * and every error path. */
#include <igraph.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "check.h"
#include "fixtures.h"
#include "network.h"
#include "tobler.h"

/* Roads with one class (walk and vehicle speeds given) and room for the nodes/segs. */
static roads_t *mk_roads(size_t n_nodes, size_t n_segs, double walk, double veh)
{
    roads_t *r = fx_roads(n_nodes, n_segs, 1);
    r->classes[0].walk_mps = walk;
    r->classes[0].vehicle_mps = veh;
    return r;
}

/* Weight of edge from->to, or -1 when there is none. */
static double weight_of(const network_t *net, int64_t from, int64_t to)
{
    igraph_integer_t eid = -1;
    igraph_get_eid(network_graph(net), &eid, from, to, IGRAPH_DIRECTED, 0);
    return eid < 0 ? -1.0 : VECTOR(*network_weights(net))[eid];
}

static void test_tobler(void)
{
    /* Tobler (1993), NCGIA TR 93-1: W = 6 exp(-3.5 |S + 0.05|) km/h; top speed 6 km/h
     * at S = -0.05 and about 5 km/h on the flat (6 e^-0.175 = 5.0367 km/h). */
    CHECK_NEAR(tobler_kmh(-0.05), 6.0, 1e-12);
    CHECK_NEAR(tobler_kmh(0.0), 5.0367, 1e-4);
    CHECK_NEAR(tobler_kmh(0.1), 6.0 * exp(-3.5 * 0.15), 1e-12);
    CHECK_NEAR(tobler_factor(0.0), 1.0, 0.0);
    CHECK_NEAR(tobler_factor(-0.05), exp(0.175), 1e-12);
    /* The function is symmetric about S = -0.05, so S = -0.1 walks like the flat. */
    CHECK_NEAR(tobler_factor(-0.1), 1.0, 1e-12);
    CHECK(tobler_factor(0.2) < tobler_factor(-0.2));
}

static void test_slope_edges(void)
{
    grid_t *g = fx_lattice(2, 1, 100.0);
    scen_t s;
    network_t *net = NULL;
    err_t e = {0, ""};

    fx_scen_init(&s);
    g->elevation = malloc(2 * sizeof(float));
    g->elevation[0] = 0.0f;
    g->elevation[1] = 10.0f;   /* S = +0.1 uphill from cell 0 to cell 1 */
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    /* Uphill: W(0.1)/W(0) = exp(-3.5 * 0.1); downhill S = -0.1 is as fast as the flat. */
    CHECK_REL(weight_of(net, 0, 1), 100.0 / exp(-0.35), 1e-12);
    CHECK_REL(weight_of(net, 1, 0), 100.0, 1e-12);
    network_free(net);

    /* Slope switched off: both ways 100 s. */
    s.use_slope = 0;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    CHECK_REL(weight_of(net, 0, 1), 100.0, 1e-12);
    CHECK_REL(weight_of(net, 1, 0), 100.0, 1e-12);
    network_free(net);

    /* Nodata elevation: flat. */
    s.use_slope = 1;
    g->elevation[1] = NAN;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    CHECK_REL(weight_of(net, 0, 1), 100.0, 1e-12);
    network_free(net);
    grid_free(g);
}

static void test_counts_and_mapping(void)
{
    grid_t *g = fx_lattice(3, 3, 10.0);
    scen_t s;
    network_t *net = NULL;
    network_stats_t st;
    err_t e = {0, ""};
    double x, y;
    int col, row;

    fx_scen_init(&s);
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    network_get_stats(net, &st);
    /* 3x3, 8 neighbours: 6 horizontal + 6 vertical + 8 diagonal pairs = 20, x2 directed. */
    CHECK(st.n_walk_edges == 40);
    CHECK(network_n_nodes(net) == 9);
    CHECK(network_virtual_node(net) == 9);
    CHECK(igraph_vcount(network_graph(net)) == 10);
    CHECK(network_cell_node(net, 2, 1) == 5);
    CHECK(network_cell_node(net, 3, 0) == -1);
    CHECK(network_node_cell(net, 7, &col, &row) == 1 && col == 1 && row == 2);
    CHECK(network_node_cell(net, 9, &col, &row) == 0);
    CHECK(network_node_is_cell(net, 8) && !network_node_is_cell(net, 9));
    CHECK(network_node_xy(net, 5, &x, &y) == 1);
    CHECK_NEAR(x, 25.0, 1e-12);
    CHECK_NEAR(y, 15.0, 1e-12);
    CHECK(network_node_xy(net, 9, &x, &y) == 0);
    CHECK(network_search_mode(net) == IGRAPH_IN);
    /* Diagonal of a 10 m square at 1 m/s: 10 sqrt 2 s. */
    CHECK_REL(weight_of(net, 0, 4), 10.0 * sqrt(2.0), 1e-12);
    network_free(net);

    /* 16 neighbours add 4 + 4 knight pairs. */
    s.neighbours = 16;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    network_get_stats(net, &st);
    CHECK(st.n_walk_edges == 56);
    CHECK_REL(weight_of(net, 0, 5), 10.0 * sqrt(5.0), 1e-12);  /* (0,0)->(2,1) */
    network_free(net);

    /* A barrier in the middle removes its 8 pairs; no diagonal squeezes past it
     * because each diagonal around it has one passable corner cell. */
    s.neighbours = 8;
    g->barrier = calloc(9, 1);
    g->barrier[4] = 1;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    network_get_stats(net, &st);
    CHECK(st.n_walk_edges == 24);
    CHECK(st.n_cells_blocked == 1);
    CHECK(weight_of(net, 1, 3) > 0.0);
    network_free(net);

    /* Barriers at (1,0) and (0,1): the diagonal (0,0)-(1,1) squeezes between them. */
    memset(g->barrier, 0, 9);
    g->barrier[1] = 1;
    g->barrier[3] = 1;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    CHECK(weight_of(net, 0, 4) < 0.0);
    CHECK(weight_of(net, 4, 0) < 0.0);
    CHECK(weight_of(net, 4, 8) > 0.0);
    network_free(net);
    grid_free(g);
}

static void test_landcover_and_rows(void)
{
    grid_t *g = fx_lattice(3, 3, 10.0);
    scen_t s;
    scen_cover_factor_t cf[2] = {{5, 0.5}, {7, 0.0}};
    network_t *net = NULL;
    err_t e = {0, ""};

    fx_scen_init(&s);
    s.cover_factors = cf;
    s.n_cover_factors = 2;
    s.cover_default_factor = 0.8;
    g->landcover = malloc(9 * sizeof(int32_t));
    for (int i = 0; i < 9; i++) g->landcover[i] = 5;
    g->landcover[1] = INT32_MIN;  /* nodata: default 0.8 */
    g->landcover[8] = 7;          /* impassable class */
    g->landcover[2] = 99;         /* not in the table: default 0.8 */
    s.neighbours = 16;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    /* 0 -> 1: mean factor (0.5 + 0.8)/2 = 0.65. */
    CHECK_REL(weight_of(net, 0, 1), 10.0 / 0.65, 1e-12);
    /* Knight (0,0)->(1,2) touches cells 0,1,4,5: factors 0.5,0.8,0.5,0.5 -> 0.575. */
    CHECK_REL(weight_of(net, 0, 5), 10.0 * sqrt(5.0) / 0.575, 1e-12);
    CHECK(weight_of(net, 5, 8) < 0.0);
    CHECK(weight_of(net, 7, 8) < 0.0);
    network_free(net);
    grid_free(g);

    /* Rows of different size, as on a lon/lat grid: between rows the mean is used. */
    g = fx_lattice(2, 2, 10.0);
    g->row_dx_m[0] = 8.0;
    g->row_dx_m[1] = 12.0;
    g->row_dy_m[0] = 10.0;
    g->row_dy_m[1] = 14.0;
    fx_scen_init(&s);
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    CHECK_REL(weight_of(net, 0, 1), 8.0, 1e-12);
    CHECK_REL(weight_of(net, 2, 3), 12.0, 1e-12);
    CHECK_REL(weight_of(net, 0, 2), 12.0, 1e-12);
    CHECK_REL(weight_of(net, 0, 3), hypot(10.0, 12.0), 1e-12);
    network_free(net);
    grid_free(g);
}

static void test_roads(void)
{
    /* 5 x 1 cells of 100 m; a road from the centre of cell 0 to that of cell 4. */
    grid_t *g = fx_lattice(5, 1, 100.0);
    roads_t *r = mk_roads(2, 1, 2.0, 10.0);
    scen_t s;
    network_t *net = NULL;
    network_stats_t st;
    err_t e = {0, ""};
    int64_t a, b;

    fx_scen_init(&s);
    r->x[0] = 50.0;
    r->y[0] = 50.0;
    r->x[1] = 450.0;
    r->y[1] = 50.0;
    r->node_junction[0] = r->node_junction[1] = 1;
    r->segs[0] = (road_seg_t){0, 1, 0, 0, 400.0, 0};
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    network_get_stats(net, &st);
    CHECK(st.n_road_orig == 2);
    CHECK(st.n_road_extra == 3);        /* 4 cells crossed: 4 pieces */
    CHECK(st.n_road_edges == 8);
    CHECK(st.n_connector_edges == 10);  /* 5 road nodes, each to its cell, both ways */
    a = network_road_node(net, 0);
    b = network_road_node(net, 1);
    CHECK(a == 5 && b == 6);
    CHECK(network_road_node(net, 2) == -1);
    {
        int64_t ri = 99;
        CHECK(network_node_road(net, 7, &ri) == 1 && ri == -1);  /* an extra node */
        CHECK(network_node_road(net, 6, &ri) == 1 && ri == 1);
        CHECK(network_node_road(net, 3, &ri) == 0);
    }
    /* The first extra node sits at x = 150, centre of cell 1: connector weight 0. */
    CHECK_NEAR(weight_of(net, 7, 1), 0.0, 1e-12);
    CHECK_REL(weight_of(net, a, 7), 100.0 / 2.0, 1e-12);   /* walk class speed 2 m/s */
    CHECK_REL(weight_of(net, 7, a), 50.0, 1e-12);
    {
        double x, y;
        CHECK(network_node_xy(net, 8, &x, &y) == 1);
        CHECK_NEAR(x, 250.0, 1e-9);
    }
    network_free(net);

    /* A road node off the cell centre: connector = distance / walking speed. */
    r->x[0] = 20.0;
    r->y[0] = 90.0;     /* 30 m west, 40 m north of the centre (50,50) -> 50 m */
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    CHECK_REL(weight_of(net, network_road_node(net, 0), 0), 50.0, 1e-12);
    network_free(net);
    r->x[0] = 50.0;
    r->y[0] = 50.0;

    /* Vehicle mode: class vehicle speed; one-way only a->b; walking stays walking. */
    s.mode = SCEN_MODE_VEHICLE;
    r->segs[0].flags = ROAD_ONEWAY;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    network_get_stats(net, &st);
    CHECK(st.n_road_edges == 4);
    CHECK_REL(weight_of(net, 5, 7), 10.0, 1e-12);
    CHECK(weight_of(net, 7, 5) < 0.0);
    CHECK_REL(weight_of(net, 0, 1), 100.0, 1e-12);
    network_free(net);
    /* One-way means nothing to walkers. */
    s.mode = SCEN_MODE_WALK;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    network_get_stats(net, &st);
    CHECK(st.n_road_edges == 8);
    network_free(net);
    /* Vehicle speed 0 (a footpath): no road edges in vehicle mode. */
    s.mode = SCEN_MODE_VEHICLE;
    r->segs[0].flags = 0;
    r->classes[0].vehicle_mps = 0.0;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    network_get_stats(net, &st);
    CHECK(st.n_road_edges == 0);
    CHECK(st.n_connector_edges == 10);
    network_free(net);
    s.mode = SCEN_MODE_WALK;

    /* A bridge: connectors only at its two end nodes. */
    r->segs[0].flags = ROAD_BRIDGE;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    network_get_stats(net, &st);
    CHECK(st.n_connector_edges == 4);
    CHECK(weight_of(net, 7, 1) < 0.0);
    network_free(net);
    /* Limited access: connectors only at junctions (node 1 is not one here). */
    r->segs[0].flags = ROAD_LIMITED;
    r->node_junction[1] = 0;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    network_get_stats(net, &st);
    CHECK(st.n_connector_edges == 2);
    CHECK(weight_of(net, network_road_node(net, 0), 0) >= 0.0);
    CHECK(weight_of(net, network_road_node(net, 1), 4) < 0.0);
    network_free(net);
    /* A road end on a barrier cell joins the nearest passable neighbour cell (here
     * cell 3, 100 m away); an extra node on a barrier cell gets no connector. */
    r->segs[0].flags = 0;
    g->barrier = calloc(5, 1);
    g->barrier[4] = 1;
    g->barrier[2] = 1;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    CHECK(weight_of(net, network_road_node(net, 1), 4) < 0.0);
    CHECK_REL(weight_of(net, network_road_node(net, 1), 3), 100.0, 1e-12);
    CHECK_REL(weight_of(net, 3, network_road_node(net, 1)), 100.0, 1e-12);
    CHECK(weight_of(net, 8, 2) < 0.0);
    CHECK(weight_of(net, 8, 1) < 0.0 && weight_of(net, 8, 3) < 0.0);
    network_get_stats(net, &st);
    CHECK(st.n_connector_edges == 8);
    network_free(net);
    /* A road node outside the grid: counted, no connector. */
    free(g->barrier);
    g->barrier = NULL;
    r->x[1] = 650.0;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    network_get_stats(net, &st);
    CHECK(st.n_road_off_grid >= 1);
    network_free(net);
    roads_free(r);
    grid_free(g);
}

static void test_sources(void)
{
    grid_t *g = fx_lattice(3, 1, 10.0);
    scen_t s;
    network_t *net = NULL;
    err_t e = {0, ""};
    int64_t sites[3] = {0, 2, 0};
    igraph_integer_t ec;

    fx_scen_init(&s);
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    ec = igraph_ecount(network_graph(net));
    CHECK(network_attach_sources(net, sites, 3, &e) == ERR_OK);
    /* Duplicates get one edge; to_site edges run site -> virtual. */
    CHECK(igraph_ecount(network_graph(net)) == ec + 2);
    CHECK_NEAR(weight_of(net, 0, 3), 0.0, 0.0);
    CHECK_NEAR(weight_of(net, 2, 3), 0.0, 0.0);
    network_detach_sources(net);
    CHECK(isinf(weight_of(net, 0, 3)));
    /* Reattaching reuses the edges. */
    CHECK(network_attach_sources(net, sites + 1, 1, &e) == ERR_OK);
    CHECK(igraph_ecount(network_graph(net)) == ec + 2);
    CHECK_NEAR(weight_of(net, 2, 3), 0.0, 0.0);
    CHECK(isinf(weight_of(net, 0, 3)));
    /* Out of range. */
    sites[1] = 3;
    e.code = 0;
    CHECK(network_attach_sources(net, sites, 3, &e) == ERR_INPUT);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "site 1 is node 3");
    network_free(net);

    s.direction = SCEN_FROM_SITE;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    CHECK(network_search_mode(net) == IGRAPH_OUT);
    CHECK(network_direction(net) == SCEN_FROM_SITE);
    sites[0] = 1;
    CHECK(network_attach_sources(net, sites, 1, &e) == ERR_OK);
    CHECK_NEAR(weight_of(net, 3, 1), 0.0, 0.0);
    network_free(net);
    grid_free(g);
}

static void test_errors(void)
{
    grid_t *g = fx_lattice(2, 2, 10.0);
    roads_t *r = mk_roads(2, 1, 1.0, 1.0);
    scen_t s;
    scen_cover_factor_t cf = {3, -1.0};
    network_t *net = (network_t *)&s;   /* must be reset to NULL on failure */
    err_t e;

    fx_scen_init(&s);
    r->segs[0] = (road_seg_t){0, 1, 0, 0, 10.0, 0};

    g->nx = 0;
    e.code = 0;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_INPUT);
    CHECK(net == NULL);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "grid is empty");
    g->nx = 2;

    s.neighbours = 6;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "travel.neighbours is 6");
    s.neighbours = 8;

    s.walk_mps = 0.0;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "travel.walk.speed_kmh");
    s.walk_mps = 1.0;

    s.mode = 5;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "travel.mode");
    s.mode = SCEN_MODE_WALK;
    s.direction = 9;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "travel.direction");
    s.direction = SCEN_TO_SITE;

    s.cover_factors = &cf;
    s.n_cover_factors = 1;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "class 3 has factor -1");
    s.n_cover_factors = 0;

    g->row_dx_m[1] = 0.0;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "grid row 1 has cell size 0");
    g->row_dx_m[1] = 10.0;

    g->gt[1] = 0.0;
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "geotransform");
    g->gt[1] = 10.0;

    r->segs[0].b = 2;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_INPUT);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "road segment 0 joins node 0 and 2");
    r->segs[0].b = 1;

    r->segs[0].cls = 1;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "class index 1");
    r->segs[0].cls = 0;

    r->segs[0].length_m = 0.0;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "road segment 0 has length 0");
    r->segs[0].length_m = 10.0;

    r->x[1] = 1e9;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "road segment 0 spans");
    CHECK_STR_HAS(e.msg, "clipped");
    r->x[1] = NAN;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "road node 1 has a non-finite position");
    r->x[1] = 0.0;

    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    network_free(net);
    network_free(NULL);
    roads_free(r);
    grid_free(g);
}

int main(void)
{
    igraph_set_error_handler(igraph_error_handler_ignore);
    igraph_set_warning_handler(igraph_warning_handler_ignore);
    test_tobler();
    test_slope_edges();
    test_counts_and_mapping();
    test_landcover_and_rows();
    test_roads();
    test_sources();
    test_errors();
    return CHECK_DONE("test_network");
}
