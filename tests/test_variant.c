/* test_variant: the "variants" scenario section, weight edits on the network,
 * variants applied to in-memory inputs, and the cell-by-cell comparison.
 * Outside references: times worked on paper for a straight row of cells, and
 * hand counts of people for the comparison. The flood's cut roads are checked
 * against GDAL/GEOS in tests/cli/compare.sh. */
#include <igraph.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "check.h"
#include "fixtures.h"
#include "compare.h"
#include "network.h"
#include "scen_variants.h"
#include "scenario.h"
#include "sptree.h"
#include "travel.h"
#include "variant.h"

static const char *HEAD = "{\"inputs\": {\"population\": \"p.tif\", \"roads\": {\"path\": \"r.gpkg\", "
                          "\"class_field\": \"highway\"}}, \"variants\": ";

static int parse(const char *variants, scen_t **s, err_t *e)
{
    char buf[4096];
    snprintf(buf, sizeof buf, "%s%s}", HEAD, variants);
    memset(e, 0, sizeof *e);
    return scen_parse(buf, "/tmp/case/scen.json", s, e);
}

static void test_parse(void)
{
    scen_t *s = NULL;
    err_t e;
    const struct scen_variants *v;

    CHECK(parse("[{\"name\": \"bridge down\", \"close_roads\": {\"ids\": [\"R017\"], "
                "\"where\": {\"bridge\": [\"yes\"], \"highway\": [\"track\", \"path\"]}}},"
                "{\"name\": \"rain\", \"road_speed_factors\": {\"surface\": {\"unpaved\": 0.3, "
                "\"gravel\": 0.6}, \"highway\": {\"track\": 0.5}}},"
                "{\"name\": \"flood\", \"flood\": {\"path\": \"f.gpkg\", \"layer\": \"x\", "
                "\"cells\": 0.25, \"cut_roads\": false}},"
                "{\"name\": \"posts\", \"close_sites\": [\"HP03\"], \"open_sites\": [\"C1\"], "
                "\"capacity\": {\"C1\": 900}}]", &s, &e) == ERR_OK);
    if (s == NULL) {
        fprintf(stderr, "%s\n", e.msg);
        return;
    }
    v = s->variants;
    CHECK(v != NULL && v->n == 4);
    CHECK(strcmp(v->v[0].name, "bridge down") == 0);
    CHECK(v->v[0].n_close_road_ids == 1 && strcmp(v->v[0].close_road_ids[0], "R017") == 0);
    CHECK(v->v[0].n_close_where == 2 && v->v[0].close_where[1].n_values == 2);
    CHECK(v->v[1].n_speed == 3);
    CHECK_NEAR(v->v[1].speed[0].factor, 0.3, 0);
    CHECK(strcmp(v->v[2].flood.path, "/tmp/case/f.gpkg") == 0);   /* relative to the file */
    CHECK_NEAR(v->v[2].flood_cell_factor, 0.25, 0);
    CHECK(v->v[2].flood_cut_roads == 0);
    CHECK(v->v[3].n_close_sites == 1 && v->v[3].n_open_sites == 1 && v->v[3].n_capacity == 1);
    CHECK_NEAR(v->v[3].capacity[0], 900, 0);
    /* Fields kept for the roads: bridge and surface; highway is the class field. */
    CHECK(v->n_road_fields == 2);
    CHECK(strcmp(v->road_fields[0], "bridge") == 0 && strcmp(v->road_fields[1], "surface") == 0);
    CHECK(v->v[0].flood.path == NULL && v->v[0].flood_cut_roads == 1);
    scen_free(s);
    s = NULL;

    /* Defaults: flood cells impassable. */
    CHECK(parse("[{\"name\": \"f\", \"flood\": {\"path\": \"/abs/f.gpkg\"}}]", &s, &e) == ERR_OK);
    if (s) {
        CHECK_NEAR(s->variants->v[0].flood_cell_factor, 0, 0);
        CHECK(strcmp(s->variants->v[0].flood.path, "/abs/f.gpkg") == 0);
    }
    scen_free(s);

    /* Bad input: one message naming the key. */
    struct { const char *json, *has; } bad[] = {
        {"[{\"name\": \"a\", \"road_speed_factors\": {\"surface\": {\"unpaved\": 0}}}]",
         "variants[0].road_speed_factors.surface.unpaved"},
        {"[{\"name\": \"a\", \"road_speed_factors\": {\"surface\": {\"unpaved\": -1}}}]",
         "variants[0].road_speed_factors.surface.unpaved"},
        {"[{\"name\": \"a\", \"close_sites\": [\"X\"]}, {\"name\": \"a\", \"close_sites\": [\"Y\"]}]",
         "both named 'a'"},
        {"[{\"name\": \"a\"}]", "changes nothing"},
        {"[{\"name\": \"a\", \"closed_roads\": {\"ids\": [\"R1\"]}}]", "did you mean 'close_roads'"},
        {"[{\"name\": \"a\", \"flood\": {\"path\": \"f\", \"cells\": \"wet\"}}]", "\"impassable\""},
        {"[{\"name\": \"a\", \"flood\": {\"path\": \"f\", \"cells\": 0}}]", "variants[0].flood.cells"},
        {"[{\"name\": \"a\", \"flood\": {\"path\": \"f\", \"cells\": 1.5}}]", "variants[0].flood.cells"},
        {"[{\"name\": \"a\", \"close_roads\": {}}]", "needs 'ids' or 'where'"},
        {"[{\"name\": \"a\", \"close_roads\": {\"where\": {\"bridge\": []}}}]", "bridge"},
        {"[{\"name\": \"a\", \"close_sites\": [\"X\", \"X\"]}]", "lists 'X' twice"},
        {"[{\"name\": \"base\", \"close_sites\": [\"X\"]}]", "is 'base'"},
        {"[{\"close_sites\": [\"X\"]}]", "variants[0].name"},
        {"[]", "variants"},
        {"[{\"name\": \"a\", \"capacity\": {\"X\": -3}}]", "variants[0].capacity.X"},
    };
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        s = NULL;
        CHECK(parse(bad[i].json, &s, &e) == ERR_INPUT);
        CHECK(s == NULL);
        CHECK_STR_HAS(e.msg, bad[i].has);
        CHECK_STR_HAS(e.msg, "scen.json");
        scen_free(s);
    }
}

/* ---- network edits on a row of cells ---- */

/* Five cells of 100 m in a row, walking at 1 m/s, the site in cell 0: cell 4 is
 * 400 s away. Slowing cells 2 and 3 by half doubles every edge touching them
 * (1-2, 2-3 once, 3-4): 100 + 200 + 200 + 200 = 700 s on paper. Closing them cuts
 * cells 2-4 off. Reset gives back exactly the first times. */
static void test_edit_cells(void)
{
    grid_t *g = fx_lattice(5, 1, 100.0);
    scen_t s;
    network_t *net = NULL;
    travel_result_t *a = NULL, *b = NULL, *c = NULL, *d = NULL;
    uint8_t mask[5] = {0, 0, 1, 1, 0};
    int64_t site = 0;
    size_t n = 0;
    err_t e = {0};

    fx_scen_init(&s);
    CHECK(network_build(g, NULL, &s, &net, &e) == ERR_OK);
    if (net == NULL) goto done;
    CHECK(network_n_segs(net) == 0);
    CHECK(travel_nearest(net, &site, 1, &a, &e) == ERR_OK);
    CHECK_NEAR(a->time_s[4], 400.0, 1e-9);
    CHECK(network_edit_cells(net, mask, 0.5, &n, &e) == ERR_OK);
    CHECK(n == 6);   /* 1->2, 2->1, 2->3, 3->2, 3->4, 4->3 */
    CHECK(travel_nearest(net, &site, 1, &b, &e) == ERR_OK);
    CHECK_NEAR(b->time_s[4], 700.0, 1e-9);
    CHECK_NEAR(b->time_s[2], 300.0, 1e-9);
    network_edit_reset(net);
    CHECK(network_n_edits(net) == 0);
    CHECK(network_edit_cells(net, mask, 0.0, NULL, &e) == ERR_OK);
    CHECK(travel_nearest(net, &site, 1, &c, &e) == ERR_OK);
    CHECK(isinf(c->time_s[2]) && isinf(c->time_s[4]) && c->site[4] == -1);
    CHECK_NEAR(c->time_s[1], 100.0, 1e-9);
    network_edit_reset(net);
    CHECK(travel_nearest(net, &site, 1, &d, &e) == ERR_OK);
    for (int i = 0; i < 5; i++) CHECK(d->time_s[i] == a->time_s[i]);
    /* Bad factor and bad edge ids. */
    {
        err_t e2 = {0};
        CHECK(network_edit_cells(net, mask, 1.5, NULL, &e2) == ERR_INPUT);
        CHECK_STR_HAS(e2.msg, "1.5");
        CHECK(network_edit_edge(net, network_n_edges(net), 1.0, &e2) == ERR_INTERNAL);
        CHECK_STR_HAS(e2.msg, "not a built edge");
    }
done:
    travel_result_free(a);
    travel_result_free(b);
    travel_result_free(c);
    travel_result_free(d);
    network_free(net);
    grid_free(g);
}

/* ---- variants on in-memory inputs ---- */

/* 12 x 3 cells of 100 m; a river in column 6; roads along row 1: R1 (cells 1-5,
 * "primary", paved), the bridge R2 (5-7), R3 (7-11, "track", unpaved). One person
 * per land cell. Existing sites S1 (1,1) and S2 (10,1); candidate C1 (10,0). */
typedef struct world {
    grid_t *g;
    roads_t r;
    road_class_count_t cls[2];
    char *fid[3], *fields[1], *attr[3];
    road_seg_t segs[3];
    double x[6], y[6];
    uint8_t junction[6];
    points_t ex, cand;
    char *ex_id[2], *ex_name[2], *c_id[1], *c_name[1];
    double ex_x[2], ex_y[2], ex_cap[2], ex_cost[2], ex_st[2];
    int64_t ex_cell[2];
    double c_x[1], c_y[1], c_cap[1], c_cost[1], c_st[1];
    int64_t c_cell[1];
    scen_t s;
    inputs_t in;
} world_t;

static void mk_world(world_t *w)
{
    static const int col[6] = {1, 5, 5, 7, 7, 11};
    memset(w, 0, sizeof *w);
    w->g = fx_lattice(12, 3, 100.0);
    w->g->barrier = calloc(36, 1);
    for (int r = 0; r < 3; r++)
        for (int c = 0; c < 12; c++) {
            w->g->barrier[r * 12 + c] = c == 6;
            w->g->people[r * 12 + c] = c == 6 ? 0 : 1;
        }
    w->g->total_people = 33;
    for (int i = 0; i < 6; i++) {
        w->x[i] = (col[i] + 0.5) * 100.0;
        w->y[i] = 300.0 - 150.0;
        w->junction[i] = 1;
    }
    /* Nodes 1 and 2 (and 3 and 4) coincide: separate nodes joined by nothing but the
     * cell they lie in, like two features ending at one spot. */
    w->segs[0] = (road_seg_t){0, 1, 0, 0, 400.0, 0};
    w->segs[1] = (road_seg_t){2, 3, 0, 1, 200.0, ROAD_BRIDGE};
    w->segs[2] = (road_seg_t){4, 5, 1, 2, 400.0, 0};
    w->cls[0] = (road_class_count_t){"primary", 1, 0, 2.0, 20.0, 1};
    w->cls[1] = (road_class_count_t){"track", 1, 0, 2.0, 10.0, 1};
    w->fid[0] = "R1";
    w->fid[1] = "R2";
    w->fid[2] = "R3";
    w->fields[0] = "surface";
    w->attr[0] = "paved";
    w->attr[1] = "paved";
    w->attr[2] = "unpaved";
    w->r.x = w->x;
    w->r.y = w->y;
    w->r.node_junction = w->junction;
    w->r.n_nodes = 6;
    w->r.segs = w->segs;
    w->r.n_segs = 3;
    w->r.feature_ids = w->fid;
    w->r.n_features = 3;
    w->r.classes = w->cls;
    w->r.n_classes = 2;
    w->r.attr_fields = w->fields;
    w->r.n_attr = 1;
    w->r.attr = w->attr;
    w->ex.n = 2;
    w->ex_id[0] = "S1";
    w->ex_id[1] = "S2";
    w->ex_name[0] = w->ex_name[1] = "";
    w->ex_cell[0] = 12 + 1;
    w->ex_cell[1] = 12 + 10;
    w->ex_cap[0] = INFINITY;
    w->ex_cap[1] = 20;
    w->ex.id = w->ex_id;
    w->ex.name = w->ex_name;
    w->ex.x = w->ex_x;
    w->ex.y = w->ex_y;
    w->ex.cell = w->ex_cell;
    w->ex.capacity = w->ex_cap;
    w->ex.cost = w->ex_cost;
    w->ex.storage_m3 = w->ex_st;
    w->cand.n = 1;
    w->c_id[0] = "C1";
    w->c_name[0] = "";
    w->c_cell[0] = 10;
    w->c_cap[0] = 5;
    w->cand.id = w->c_id;
    w->cand.name = w->c_name;
    w->cand.x = w->c_x;
    w->cand.y = w->c_y;
    w->cand.cell = w->c_cell;
    w->cand.capacity = w->c_cap;
    w->cand.cost = w->c_cost;
    w->cand.storage_m3 = w->c_st;
    fx_scen_init(&w->s);
    w->s.road_class_field = "highway";
    w->in.scen = &w->s;
    w->in.grid = w->g;
    w->in.roads = &w->r;
    w->in.existing = &w->ex;
    w->in.candidates = &w->cand;
}

static void test_apply(void)
{
    world_t w;
    network_t *net = NULL;
    variant_applied_t a;
    err_t e = {0};
    char *ids_r2[] = {"R2"}, *ids_bad[] = {"R9"}, *sites_s1[] = {"S1"}, *sites_c1[] = {"C1"};
    char *sites_s9[] = {"S9"}, *cap_ids[] = {"C1"};
    double cap[] = {50};
    scen_road_factor_t rain = {"surface", "unpaved", 0.25};
    char *vals[] = {"primary"};
    scen_road_match_t by_class = {"highway", vals, 1};

    mk_world(&w);
    CHECK(network_build(w.g, &w.r, &w.s, &net, &e) == ERR_OK);
    if (net == NULL) goto done;
    {
        /* Close R2 by id: its road edges (1 piece each way... 2 cells: 2 pieces, 4
         * edges) become infinite, nothing else. */
        scen_variant_t v = {0};
        int64_t first, n;
        v.name = "bridge";
        v.close_road_ids = ids_r2;
        v.n_close_road_ids = 1;
        CHECK(variant_apply(net, &w.in, &v, &a, &e) == ERR_OK);
        CHECK(a.segs_closed == 1 && a.features_closed == 1 && a.segs_slowed == 0);
        CHECK(network_seg_edges(net, 1, &first, &n) == 1);
        CHECK(n == 4 && a.edges_changed == (size_t)n);
        for (int64_t k = first; k < first + n; k++) CHECK(isinf(network_edge_weight(net, k)));
        CHECK(a.sites.n == 2);
        variant_applied_destroy(&a);
        network_edit_reset(net);
        for (int64_t k = first; k < first + n; k++) CHECK(isfinite(network_edge_weight(net, k)));
    }
    {
        /* Rain on the unpaved track: each R3 edge takes 4 times as long. */
        scen_variant_t v = {0};
        int64_t first, n;
        double before;
        CHECK(network_seg_edges(net, 2, &first, &n) == 1);
        before = network_edge_weight(net, first);
        v.name = "rain";
        v.speed = &rain;
        v.n_speed = 1;
        CHECK(variant_apply(net, &w.in, &v, &a, &e) == ERR_OK);
        CHECK(a.segs_slowed == 1 && a.segs_closed == 0);
        CHECK_NEAR(network_edge_weight(net, first), 4 * before, 1e-9);
        variant_applied_destroy(&a);
        network_edit_reset(net);
        CHECK(network_edge_weight(net, first) == before);
    }
    {
        /* By class: the two primary roads (R1, R2). */
        scen_variant_t v = {0};
        v.name = "class";
        v.close_where = &by_class;
        v.n_close_where = 1;
        CHECK(variant_apply(net, &w.in, &v, &a, &e) == ERR_OK);
        CHECK(a.segs_closed == 2 && a.features_closed == 2);
        variant_applied_destroy(&a);
        network_edit_reset(net);
    }
    {
        /* Sites: S1 closed, C1 opened with capacity 50. */
        scen_variant_t v = {0};
        v.name = "sites";
        v.close_sites = sites_s1;
        v.n_close_sites = 1;
        v.open_sites = sites_c1;
        v.n_open_sites = 1;
        v.capacity_ids = cap_ids;
        v.capacity = cap;
        v.n_capacity = 1;
        CHECK(variant_apply(net, &w.in, &v, &a, &e) == ERR_OK);
        CHECK(a.sites.n == 2 && a.sites_closed == 1 && a.sites_opened == 1);
        CHECK(strcmp(a.sites.id[0], "S2") == 0 && strcmp(a.sites.id[1], "C1") == 0);
        CHECK_NEAR(a.sites.capacity[1], 50, 0);
        CHECK_NEAR(a.sites.capacity[0], 20, 0);
        CHECK(network_n_edits(net) == 0);
        variant_applied_destroy(&a);
    }
    /* Failures name the variant and the id; nothing stays edited. */
    {
        scen_variant_t v = {0};
        v.name = "oops";
        v.close_road_ids = ids_bad;
        v.n_close_road_ids = 1;
        CHECK(variant_apply(net, &w.in, &v, &a, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "variant 'oops'");
        CHECK_STR_HAS(e.msg, "road 'R9'");
        CHECK(network_n_edits(net) == 0);
    }
    {
        scen_variant_t v = {0};
        v.name = "oops";
        v.close_sites = sites_s9;
        v.n_close_sites = 1;
        CHECK(variant_validate(&w.in, &v, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "site 'S9' in close_sites");
        v.n_close_sites = 0;
        v.open_sites = sites_s1;
        v.n_open_sites = 1;
        CHECK(variant_validate(&w.in, &v, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "'S1' in open_sites is not a candidate");
        v.n_open_sites = 0;
        v.close_sites = sites_s1;
        v.n_close_sites = 1;
        v.capacity_ids = sites_s1;
        v.capacity = cap;
        v.n_capacity = 1;
        CHECK(variant_validate(&w.in, &v, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "'S1' in capacity is not open");
    }
    {
        /* A flood layer that does not exist: the error names the file. */
        scen_variant_t v = {0};
        v.name = "wet";
        v.flood.path = "/nonexistent/flood.gpkg";
        v.flood_cut_roads = 1;
        CHECK(variant_apply(net, &w.in, &v, &a, &e) != ERR_OK);
        CHECK_STR_HAS(e.msg, "/nonexistent/flood.gpkg");
        CHECK(network_n_edits(net) == 0);
    }
done:
    network_free(net);
    grid_free(w.g);
}

/* The repaired tree against a full igraph search on the edited network, for
 * closures, slower roads, flooded and slowed cells and closed sites, alone and
 * together, in both travel directions. */
static void check_resettle(network_t *net, const sptree_t *t, const int64_t *sites,
                           const uint8_t *closed, size_t n_sites, const char *what)
{
    int64_t n = network_n_nodes(net), open_nodes[4];
    size_t ne = network_n_edits(net), n_open = 0, nres = 0;
    int64_t *ch = malloc((ne + 1) * sizeof *ch);
    double *tv = malloc((size_t)n * sizeof *tv), old;
    int32_t *sv = malloc((size_t)n * sizeof *sv);
    travel_result_t *full = NULL;
    err_t e = {0};
    int bad = 0;

    for (size_t i = 0; i < ne; i++) network_edit_get(net, i, &ch[i], &old);
    for (size_t i = 0; i < n_sites; i++)
        if (closed == NULL || !closed[i]) open_nodes[n_open++] = sites[i];
    CHECK(sptree_resettle(t, net, ch, ne, closed, n_sites, tv, sv, &nres, &e) == ERR_OK);
    CHECK(travel_nearest(net, open_nodes, n_open, &full, &e) == ERR_OK);
    for (int64_t v = 0; full != NULL && v < n; v++) {
        double a = tv[v], b = full->time_s[v];
        if (!((isinf(a) && isinf(b)) || fabs(a - b) <= 1e-9 * fmax(1.0, b))) bad++;
        if ((sv[v] < 0) != isinf(a)) bad++;
        if (sv[v] >= 0 && closed != NULL && closed[sv[v]]) bad++;
    }
    if (bad) fprintf(stderr, "resettle '%s': %d nodes differ\n", what, bad);
    CHECK(bad == 0);
    travel_result_free(full);
    free(ch);
    free(tv);
    free(sv);
}

static void test_resettle(int direction)
{
    world_t w;
    network_t *net = NULL;
    sptree_t t = {0};
    int64_t sites[2] = {12 + 1, 12 + 10}, first, n;
    uint8_t closed[2] = {1, 0}, none[2] = {0, 0};
    uint8_t *mask = calloc(36, 1);
    err_t e = {0};

    mk_world(&w);
    w.s.direction = direction;
    for (int r = 0; r < 3; r++) mask[r * 12 + 8] = mask[r * 12 + 9] = 1;
    CHECK(network_build(w.g, &w.r, &w.s, &net, &e) == ERR_OK);
    if (net == NULL) goto done;
    CHECK(sptree_build(net, sites, 2, &t, &e) == ERR_OK);
    {
        /* The tree's own times equal a full search. */
        travel_result_t *full = NULL;
        int bad = 0;
        CHECK(travel_nearest(net, sites, 2, &full, &e) == ERR_OK);
        for (int64_t v = 0; full && v < t.n; v++) bad += t.time_s[v] != full->time_s[v];
        CHECK(bad == 0);
        travel_result_free(full);
    }
    check_resettle(net, &t, sites, none, 2, "nothing");
    network_seg_edges(net, 1, &first, &n);
    for (int64_t k = first; k < first + n; k++) network_edit_edge(net, k, INFINITY, &e);
    check_resettle(net, &t, sites, none, 2, "bridge closed");
    check_resettle(net, &t, sites, closed, 2, "bridge closed and S1 closed");
    network_edit_reset(net);
    network_seg_edges(net, 2, &first, &n);
    for (int64_t k = first; k < first + n; k++)
        network_edit_edge(net, k, 4 * network_edge_weight(net, k), &e);
    check_resettle(net, &t, sites, none, 2, "track slowed");
    CHECK(network_edit_cells(net, mask, 0.5, NULL, &e) == ERR_OK);
    check_resettle(net, &t, sites, none, 2, "track and cells slowed");
    network_edit_reset(net);
    CHECK(network_edit_cells(net, mask, 0.0, NULL, &e) == ERR_OK);
    check_resettle(net, &t, sites, closed, 2, "flood and S1 closed");
    network_edit_reset(net);
    check_resettle(net, &t, sites, closed, 2, "S1 closed");
done:
    sptree_destroy(&t);
    sptree_destroy(NULL);
    network_free(net);
    grid_free(w.g);
    free(mask);
}

/* compare_cells on five cells worked by hand: limit 60 s, bands 30 and 60 s. */
static void test_compare_cells(void)
{
    const double people[5] = {1, 2, 4, 8, 16};
    const double base[5] = {10, 40, 50, INFINITY, 70};
    const double var[5] = {10, 70, INFINITY, 20, 65};
    const int32_t zone[5] = {0, 0, 1, -1, 1};
    const double limits[2] = {30, 60};
    float delta[5];
    int32_t label[5];
    compare_diff_t d;
    err_t e = {0};

    CHECK(compare_cells(5, people, base, var, 60, limits, 2, zone, 2, &d, delta, label, &e) ==
          ERR_OK);
    /* Within 60 s: base cells 0,1,2 (7 people); variant 0,3 (9): lost 1,2 = 6, gained 3 = 8. */
    CHECK_NEAR(d.pushed_beyond, 6, 0);
    CHECK_NEAR(d.gained_within, 8, 0);
    CHECK_NEAR(d.lost_band[1], 6, 0);
    CHECK_NEAR(d.gained_band[0], 8, 0);     /* cell 3 at 20 s */
    CHECK_NEAR(d.lost_band[0], 0, 0);
    CHECK_NEAR(d.cut_off, 4, 0);            /* cell 2 */
    /* Reached in both: cells 0 (+0), 1 (+30 s x 2), 4 (-5 s x 16): -20 person-s. */
    CHECK_NEAR(d.added_person_h, -20.0 / 3600.0, 1e-12);
    CHECK_NEAR(d.pushed_by_zone[0], 2, 0);
    CHECK_NEAR(d.pushed_by_zone[1], 4, 0);
    CHECK_NEAR(d.pushed_by_zone[2], 0, 0);
    CHECK_NEAR(delta[1], 0.5, 1e-6);
    CHECK(delta[2] == COMPARE_LOST && delta[3] == COMPARE_GAINED);
    CHECK(label[0] == -1 && label[1] == 0 && label[2] == 0 && label[3] == 1 && label[4] == -1);
    compare_diff_destroy(&d);
    compare_diff_destroy(NULL);
}

static void test_slug(void)
{
    char b[64];
    variant_slug("Bridge down (R017)!", b, sizeof b);
    CHECK(strcmp(b, "bridge_down_r017") == 0);
    variant_slug("  ***  ", b, sizeof b);
    CHECK(strcmp(b, "variant") == 0);
}

int main(void)
{
    igraph_set_error_handler(igraph_error_handler_ignore);
    igraph_set_warning_handler(igraph_warning_handler_ignore);
    test_parse();
    test_edit_cells();
    test_apply();
    test_resettle(SCEN_TO_SITE);
    test_resettle(SCEN_FROM_SITE);
    test_compare_cells();
    test_slug();
    return CHECK_DONE("test_variant");
}
