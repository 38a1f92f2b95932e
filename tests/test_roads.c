/* test_roads: road layers written with OGR into a temporary folder, read back
 * with roads_load. Grids and scenarios are built by hand in memory so this test
 * does not depend on the grid and scenario modules.
 * With --print-liechtenstein it instead prints class counts and total length
 * for the OSM extract (used by tests/xcheck/roads_liechtenstein.sh).
 * OSM data: © OpenStreetMap contributors, ODbL 1.0. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cpl_conv.h>
#include <cpl_error.h>
#include <gdal.h>
#include <igraph.h>
#include <ogr_api.h>
#include <ogr_srs_api.h>

#include "check.h"
#include "fixtures.h"
#include "roads.h"


static char tmpdir[64];



/* Sorted by name, as scen_load leaves it (scen_road_speed searches it by halves). */
static scen_road_class_t speed_table[] = {
    {"footway", 5.0 / 3.6, 0.0},
    {"primary", 5.0 / 3.6, 80.0 / 3.6},
    {"residential", 5.0 / 3.6, 30.0 / 3.6},
};

static scen_t *mk_scen(const char *roads_path, double tol)
{
    scen_t *s = calloc(1, sizeof *s);
    s->roads.path = roads_path ? strdup(roads_path) : NULL;
    s->road_class_field = "highway";
    s->road_bridge_field = "bridge";
    s->road_tunnel_field = "tunnel";
    s->road_oneway_field = "oneway";
    s->snap_tolerance_m = tol;
    s->road_classes = speed_table;
    s->n_road_classes = sizeof speed_table / sizeof speed_table[0];
    s->unknown_walk_mps = 4.0 / 3.6;
    s->unknown_vehicle_mps = 20.0 / 3.6;
    return s;
}

static void free_scen(scen_t *s)
{
    if (s == NULL) return;
    free(s->roads.path);
    free(s);
}




/* Load roads from path with tolerance tol on grid g; returns NULL on error (e filled). */
static roads_t *load(const char *path, double tol, const grid_t *g, warn_list_t *w, err_t *e)
{
    scen_t *s = mk_scen(path, tol);
    roads_t *r = NULL;
    memset(e, 0, sizeof *e);
    roads_load(s, g, &r, w, e);
    free_scen(s);
    return r;
}

static int warn_has(const warn_list_t *w, const char *sub)
{
    for (size_t i = 0; i < w->n; i++)
        if (strstr(w->items[i], sub) != NULL) return 1;
    return 0;
}

static int count_junction_flags(const roads_t *r)
{
    int n = 0;
    for (size_t i = 0; i < r->n_nodes; i++) n += r->node_junction[i];
    return n;
}

static const char *const F_BASIC[] = {"highway", "bridge", "oneway", "code", NULL};

/* Projected test grid: 100 x 100 cells of 10 m, extent 0..1000 m (UTM 36S). */
#define UTM 32736

static void test_cross(void)
{
    grid_t *g = fx_grid(100, 100, 0, 1000, 10, UTM);
    fx_feat_t fs[] = {
        {"LINESTRING (100 500,500 500,900 500)", {"residential", NULL, NULL, "r-1"}},
        {"LINESTRING (500 100,500 500,500 900)", {"primary", NULL, NULL, "r-2"}},
    };
    warn_list_t w;
    err_t e;
    roads_t *r;
    size_t nc = 0, big = 0;

    fx_write_layer(fx_path(tmpdir, "cross.geojson"), "GeoJSON", "roads", UTM, wkbLineString, F_BASIC, fs, 2);
    warn_init(&w);
    r = load(fx_path(tmpdir, "cross.geojson"), 1.0, g, &w, &e);
    CHECK(r != NULL);
    if (r != NULL) {
        /* Hand count: 4 ends + 1 shared middle vertex; 4 steps of 400 m. */
        CHECK(r->n_nodes == 5);
        CHECK(r->n_segs == 4);
        CHECK(r->n_junctions == 1);
        CHECK(count_junction_flags(r) == 5);
        CHECK_NEAR(r->total_length_m, 1600.0, 1e-9);
        CHECK(r->n_features == 2 && r->n_features_read == 2 && r->n_features_clipped == 0);
        CHECK(r->n_classes == 2);
        CHECK(r->classes[0].known == 1 && r->classes[1].known == 1);
        CHECK_STR_HAS(r->classes[1].name, "primary");
        CHECK_NEAR(r->classes[1].vehicle_mps, 80.0 / 3.6, 1e-12);
        CHECK_NEAR(r->classes[1].length_m, 800.0, 1e-9);
        /* GeoJSON without an id field named: FIDs, which GDAL numbers from 0. */
        CHECK_STR_HAS(r->feature_ids[0], "0");
        CHECK(w.n == 0);
        CHECK(roads_components(r, &nc, &big, NULL, &e) == ERR_OK);
        CHECK(nc == 1 && big == 5);
    }
    roads_free(r);
    warn_destroy(&w);

    /* The same file with an id field named. */
    {
        scen_t *s = mk_scen(fx_path(tmpdir, "cross.geojson"), 1.0);
        s->roads.id_field = "code";
        warn_init(&w);
        r = NULL;
        CHECK(roads_load(s, g, &r, &w, &e) == ERR_OK);
        if (r) CHECK(strcmp(r->feature_ids[1], "r-2") == 0);
        roads_free(r);
        /* A named id field that is missing. */
        s->roads.id_field = "ref";
        r = NULL;
        e.code = 0;
        CHECK(roads_load(s, g, &r, &w, &e) == ERR_INPUT && r == NULL);
        CHECK(e.code == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "no road id field 'ref'");
        /* GeoJSON keeps only fields that some feature sets. */
        CHECK_STR_HAS(e.msg, "fields present: highway, code");
        /* A named class field that is missing. */
        s->roads.id_field = NULL;
        s->road_class_field = "kind";
        CHECK(roads_load(s, g, &r, &w, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "no road class field 'kind'");
        free_scen(s);
        warn_destroy(&w);
    }
    grid_free(g);
}

static void test_bridge(void)
{
    grid_t *g = fx_grid(100, 100, 0, 1000, 10, UTM);
    /* The bridge passes over the road's middle vertex exactly, with a vertex there. */
    fx_feat_t fs[] = {
        {"LINESTRING (100 500,500 500,900 500)", {"residential", NULL, NULL, NULL}},
        {"LINESTRING (500 100,500 500,500 900)", {"primary", "yes", NULL, NULL}},
    };
    fx_feat_t fs2[] = {
        {"LINESTRING (100 500,500 500,900 500)", {"residential", NULL, NULL, NULL}},
        {"LINESTRING (500 500,500 700,500 900)", {"primary", "viaduct", NULL, NULL}},
    };
    warn_list_t w;
    err_t e;
    roads_t *r;
    size_t nc = 0, big = 0;

    fx_write_layer(fx_path(tmpdir, "bridge.geojson"), "GeoJSON", "roads", UTM, wkbLineString, F_BASIC, fs, 2);
    warn_init(&w);
    r = load(fx_path(tmpdir, "bridge.geojson"), 1.0, g, &w, &e);
    CHECK(r != NULL);
    if (r != NULL) {
        CHECK(r->n_junctions == 0);
        CHECK(r->n_nodes == 6);
        CHECK(r->segs[2].flags == ROAD_BRIDGE && r->segs[3].flags == ROAD_BRIDGE);
        CHECK(r->segs[0].flags == 0);
        CHECK(roads_components(r, &nc, &big, NULL, &e) == ERR_OK);
        CHECK(nc == 2 && big == 3);
    }
    roads_free(r);

    /* A bridge whose end vertex is the road's middle vertex: one junction. */
    fx_write_layer(fx_path(tmpdir, "bridge2.geojson"), "GeoJSON", "roads", UTM, wkbLineString, F_BASIC, fs2, 2);
    r = load(fx_path(tmpdir, "bridge2.geojson"), 1.0, g, &w, &e);
    CHECK(r != NULL);
    if (r != NULL) {
        CHECK(r->n_junctions == 1);
        CHECK(r->n_nodes == 5);
        CHECK(roads_components(r, &nc, &big, NULL, &e) == ERR_OK);
        CHECK(nc == 1 && big == 5);
    }
    roads_free(r);

    /* A tunnel (from other_tags) under the road's middle vertex: no junction either. */
    {
        static const char *const F_OSM[] = {"highway", "other_tags", NULL};
        fx_feat_t ft[] = {
            {"LINESTRING (100 500,500 500,900 500)", {"residential", NULL, NULL, NULL}},
            {"LINESTRING (500 100,500 500,500 900)", {"primary", "\"tunnel\"=>\"yes\"", NULL,
                                                      NULL}},
        };
        fx_write_layer(fx_path(tmpdir, "tunnel.geojson"), "GeoJSON", "roads", UTM, wkbLineString, F_OSM, ft, 2);
        r = load(fx_path(tmpdir, "tunnel.geojson"), 1.0, g, &w, &e);
        CHECK(r != NULL && r->n_junctions == 0 && r->n_nodes == 6);
        if (r) CHECK(r->segs[2].flags == ROAD_TUNNEL);
        roads_free(r);
    }
    CHECK(w.n == 0);
    warn_destroy(&w);
    grid_free(g);
}

static void test_snap(void)
{
    grid_t *g = fx_grid(100, 100, 0, 1000, 10, UTM);
    /* Two ends 0.5 m apart. */
    fx_feat_t fs[] = {
        {"LINESTRING (100 500,500 500)", {"residential", NULL, NULL, NULL}},
        {"LINESTRING (500.5 500,900 500)", {"residential", NULL, NULL, NULL}},
    };
    warn_list_t w;
    err_t e;
    roads_t *r;

    fx_write_layer(fx_path(tmpdir, "snap.gpkg"), "GPKG", "roads", UTM, wkbLineString, F_BASIC, fs, 2);
    warn_init(&w);
    r = load(fx_path(tmpdir, "snap.gpkg"), 1.0, g, &w, &e);
    CHECK(r != NULL);
    if (r != NULL) {
        CHECK(r->n_nodes == 3);
        CHECK(r->n_junctions == 1);
        CHECK(r->segs[0].b == r->segs[1].a);
        /* Lengths stay those of the source geometry: 400 + 399.5 m. */
        CHECK_NEAR(r->total_length_m, 799.5, 1e-9);
        /* GeoPackage FIDs start at 1. */
        CHECK(strcmp(r->feature_ids[0], "1") == 0);
    }
    roads_free(r);
    r = load(fx_path(tmpdir, "snap.gpkg"), 0.1, g, &w, &e);
    CHECK(r != NULL);
    if (r != NULL) {
        CHECK(r->n_nodes == 4);
        CHECK(r->n_junctions == 0);
    }
    roads_free(r);
    /* Zero tolerance: identical points only. */
    r = load(fx_path(tmpdir, "snap.gpkg"), 0.0, g, &w, &e);
    CHECK(r != NULL && r->n_nodes == 4);
    roads_free(r);
    CHECK(w.n == 0);
    warn_destroy(&w);
    grid_free(g);
}

static void test_snap_geographic(void)
{
    /* 0.001-degree grid over lon 30..31, lat 46.5..47.5. Two ends 0.5 m apart
     * east-west at latitude 47: 0.5 m / (111,412.9 m/deg * cos 47 deg) ...
     * computed here with the WGS84 prime-vertical radius: 1 deg of longitude
     * at 47 deg N is 76,055 m (textbook value from memory), so 0.5 m is
     * 6.574e-6 deg. */
    grid_t *g = fx_grid(1000, 1000, 30.0, 47.5, 0.001, 4326);
    fx_feat_t fs[] = {
        {"LINESTRING (30.1 47.0,30.2 47.0)", {"residential", NULL, NULL, NULL}},
        {"LINESTRING (30.200006574 47.0,30.3 47.0)", {"residential", NULL, NULL, NULL}},
    };
    warn_list_t w;
    err_t e;
    roads_t *r;

    fx_write_layer(fx_path(tmpdir, "geo.geojson"), "GeoJSON", "roads", 4326, wkbLineString, F_BASIC, fs, 2);
    warn_init(&w);
    r = load(fx_path(tmpdir, "geo.geojson"), 1.0, g, &w, &e);
    CHECK(r != NULL && r->n_nodes == 3 && r->n_junctions == 1);
    roads_free(r);
    r = load(fx_path(tmpdir, "geo.geojson"), 0.3, g, &w, &e);
    CHECK(r != NULL && r->n_nodes == 4 && r->n_junctions == 0);
    roads_free(r);
    r = load(fx_path(tmpdir, "geo.geojson"), 0.7, g, &w, &e);
    CHECK(r != NULL && r->n_nodes == 3);
    roads_free(r);
    warn_destroy(&w);
    grid_free(g);
}

static void test_oneway(void)
{
    grid_t *g = fx_grid(100, 100, 0, 1000, 10, UTM);
    fx_feat_t fs[] = {
        {"LINESTRING (100 100,200 100)", {"residential", NULL, "yes", NULL}},
        {"LINESTRING (100 300,200 300)", {"residential", NULL, "-1", NULL}},
        {"LINESTRING (100 500,200 500)", {"residential", NULL, "no", NULL}},
        {"LINESTRING (100 700,200 700)", {"residential", NULL, "true", NULL}},
    };
    /* OSM style: no oneway or bridge column, tags in other_tags. */
    static const char *const F_OSM[] = {"highway", "other_tags", NULL};
    fx_feat_t fo[] = {
        {"LINESTRING (100 100,200 100,300 100)",
         {"primary", "\"bridge\"=>\"yes\",\"oneway\"=>\"-1\",\"surface\"=>\"asphalt\"", NULL,
          NULL}},
        {"LINESTRING (100 300,200 300)", {"primary", "\"oneway\"=>\"yes\"", NULL, NULL}},
        {"LINESTRING (100 500,200 500)", {"primary", "\"tunnel\"=>\"yes\"", NULL, NULL}},
    };
    warn_list_t w;
    err_t e;
    roads_t *r;

    warn_init(&w);
    fx_write_layer(fx_path(tmpdir, "oneway.geojson"), "GeoJSON", "roads", UTM, wkbLineString, F_BASIC, fs, 4);
    r = load(fx_path(tmpdir, "oneway.geojson"), 1.0, g, &w, &e);
    CHECK(r != NULL && r->n_segs == 4);
    if (r != NULL && r->n_segs == 4) {
        const road_seg_t *s0 = &r->segs[0], *s1 = &r->segs[1];
        CHECK(s0->flags == ROAD_ONEWAY);
        CHECK(r->x[s0->a] == 100.0 && r->x[s0->b] == 200.0);
        /* "-1": stored reversed, so a -> b is the allowed direction. */
        CHECK(s1->flags == ROAD_ONEWAY);
        CHECK(r->x[s1->a] == 200.0 && r->x[s1->b] == 100.0);
        CHECK(r->segs[2].flags == 0);
        CHECK(r->segs[3].flags == ROAD_ONEWAY);
    }
    roads_free(r);

    fx_write_layer(fx_path(tmpdir, "osmstyle.geojson"), "GeoJSON", "roads", UTM, wkbLineString, F_OSM, fo, 3);
    r = load(fx_path(tmpdir, "osmstyle.geojson"), 1.0, g, &w, &e);
    CHECK(r != NULL && r->n_segs == 4);
    if (r != NULL && r->n_segs == 4) {
        /* Reversed: the first stored step runs from x=300 to x=200. */
        CHECK(r->segs[0].flags == (ROAD_ONEWAY | ROAD_BRIDGE));
        CHECK(r->x[r->segs[0].a] == 300.0 && r->x[r->segs[0].b] == 200.0);
        CHECK(r->segs[2].flags == ROAD_ONEWAY);
        CHECK(r->segs[3].flags == ROAD_TUNNEL);
    }
    roads_free(r);

    /* Limited access, only when the scenario names the field. */
    {
        static const char *const F_ACC[] = {"highway", "ctrl", NULL};
        fx_feat_t fa[] = {
            {"LINESTRING (100 100,200 100)", {"primary", "yes", NULL, NULL}},
            {"LINESTRING (100 300,200 300)", {"primary", "no", NULL, NULL}},
        };
        scen_t *s = mk_scen(fx_path(tmpdir, "access.geojson"), 1.0);
        fx_write_layer(fx_path(tmpdir, "access.geojson"), "GeoJSON", "roads", UTM, wkbLineString, F_ACC, fa, 2);
        r = NULL;
        CHECK(roads_load(s, g, &r, &w, &e) == ERR_OK);
        if (r) CHECK(r->segs[0].flags == 0);
        roads_free(r);
        s->road_access_field = "ctrl";
        r = NULL;
        CHECK(roads_load(s, g, &r, &w, &e) == ERR_OK);
        if (r) CHECK(r->segs[0].flags == ROAD_LIMITED && r->segs[1].flags == 0);
        roads_free(r);
        s->road_access_field = "access";
        CHECK(roads_load(s, g, &r, &w, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "no road access field 'access'; fields present: highway, ctrl");
        free_scen(s);
    }
    CHECK(w.n == 0);
    warn_destroy(&w);
    grid_free(g);
}

static void test_reproject(void)
{
    /* UTM 36S grid 165,000..169,000 E, 9,888,000..9,890,000 N (100 m cells);
     * the road is given in EPSG:4326. */
    grid_t *g = fx_grid(40, 20, 165000, 9890000, 100, UTM);
    fx_feat_t fs[] = {
        {"LINESTRING (30.0 -1.0,30.01 -1.005,30.02 -1.0)", {"primary", NULL, NULL, NULL}},
    };
    warn_list_t w;
    err_t e;
    roads_t *r;

    fx_write_layer(fx_path(tmpdir, "ll.geojson"), "GeoJSON", "roads", 4326, wkbLineString, F_BASIC, fs, 1);
    warn_init(&w);
    r = load(fx_path(tmpdir, "ll.geojson"), 1.0, g, &w, &e);
    CHECK(r != NULL && r->n_nodes == 3 && r->n_segs == 2);
    if (r != NULL && r->n_nodes == 3) {
        /* Reference values from /usr/bin/python3 with pyproj 3 on this machine:
         * pyproj.Geod(ellps='WGS84').inv per step -> 1242.777031 m each,
         * 2485.554061 m in all; Transformer.from_crs(4326, 32736, always_xy=True)
         * -> (166072.0629, 9889317.1622), (167186.6810, 9888764.7696),
         * (168300.2775, 9889319.1935). */
        CHECK_NEAR(r->segs[0].length_m, 1242.777031, 1e-5);
        CHECK_NEAR(r->total_length_m, 2485.554061, 1e-5);
        CHECK_NEAR(r->x[0], 166072.0629, 1e-3);
        CHECK_NEAR(r->y[0], 9889317.1622, 1e-3);
        CHECK_NEAR(r->x[1], 167186.6810, 1e-3);
        CHECK_NEAR(r->y[1], 9888764.7696, 1e-3);
        CHECK_NEAR(r->x[2], 168300.2775, 1e-3);
        CHECK_NEAR(r->y[2], 9889319.1935, 1e-3);
        /* The planar UTM length differs by the scale factor, about 1.001 here
         * (k = 0.9996 (1 + (dlon cos lat)^2 / 2) with dlon = 3 deg; textbook
         * formula from memory): the geodesic length is the one kept. */
        CHECK(fabs(hypot(r->x[1] - r->x[0], r->y[1] - r->y[0]) - r->segs[0].length_m) > 0.01);
    }
    roads_free(r);
    warn_destroy(&w);
    grid_free(g);
}

static void test_clip(void)
{
    grid_t *g = fx_grid(100, 100, 0, 1000, 10, UTM);
    fx_feat_t fs[] = {
        {"LINESTRING (100 100,300 100)", {"residential", NULL, NULL, NULL}},
        {"LINESTRING (800 200,1200 200)", {"residential", NULL, NULL, NULL}},
        {"LINESTRING (1100 100,1300 100)", {"residential", NULL, NULL, NULL}},
        {"LINESTRING (900 700,1100 700,1100 800,900 800)", {"primary", NULL, NULL, NULL}},
    };
    warn_list_t w;
    err_t e;
    roads_t *r;

    fx_write_layer(fx_path(tmpdir, "clip.geojson"), "GeoJSON", "roads", UTM, wkbLineString, F_BASIC, fs, 4);
    warn_init(&w);
    r = load(fx_path(tmpdir, "clip.geojson"), 1.0, g, &w, &e);
    CHECK(r != NULL);
    if (r != NULL) {
        /* Hand count: 200 m inside, 200 of 400 m, nothing, 100 + 100 m. */
        CHECK(r->n_features_read == 4);
        CHECK(r->n_features == 3);
        CHECK(r->n_features_clipped == 3);
        CHECK_NEAR(r->total_length_m, 600.0, 1e-9);
        CHECK(r->n_segs == 4);
        CHECK_NEAR(r->classes[0].length_m, 400.0, 1e-9);
        /* The cut ends sit on the grid edge at x = 1000. */
        CHECK(r->x[r->segs[1].b] == 1000.0);
        CHECK(w.n == 1);
        CHECK(warn_has(&w, "3 road features cross or lie outside the population grid; clipped"));
    }
    roads_free(r);
    warn_destroy(&w);
    grid_free(g);
}

static void test_classes_and_shapes(void)
{
    grid_t *g = fx_grid(100, 100, 0, 1000, 10, UTM);
    fx_feat_t fs[] = {
        {"LINESTRING (100 100,200 100)", {"dirt_lane", NULL, NULL, NULL}},
        {"LINESTRING (100 300,200 300)", {"dirt_lane", NULL, NULL, NULL}},
        {"LINESTRING (100 500,200 500)", {NULL, NULL, NULL, NULL}},
        /* A two-part feature whose parts touch, and a closed loop. */
        {"MULTILINESTRING ((300 100,400 100),(400 100,400 200))", {"footway", NULL, NULL, NULL}},
        {"LINESTRING (600 600,700 600,700 700,600 600)", {"residential", NULL, NULL, NULL}},
    };
    warn_list_t w;
    err_t e;
    roads_t *r;

    fx_write_layer(fx_path(tmpdir, "cls.geojson"), "GeoJSON", "roads", UTM, wkbUnknown, F_BASIC, fs, 5);
    warn_init(&w);
    r = load(fx_path(tmpdir, "cls.geojson"), 1.0, g, &w, &e);
    CHECK(r != NULL);
    if (r != NULL) {
        CHECK(r->n_classes == 4);
        CHECK(strcmp(r->classes[0].name, "dirt_lane") == 0);
        CHECK(r->classes[0].n_features == 2 && r->classes[0].known == 0);
        CHECK_NEAR(r->classes[0].walk_mps, 4.0 / 3.6, 1e-12);
        CHECK(strcmp(r->classes[1].name, "(none)") == 0);
        CHECK(r->classes[2].known == 1 && r->classes[2].vehicle_mps == 0.0);
        CHECK(warn_has(&w, "road class 'dirt_lane' (2 features) not in travel.road_speeds; "
                           "using 4 km/h walking, 20 km/h by vehicle"));
        CHECK(warn_has(&w, "road class '(none)' (1 features)"));
        CHECK(w.n == 2);
        /* Nodes: 2+2+2 for the short roads, 3 for the two-part feature (its
         * parts share (400,100)), 3 for the loop (it closes on itself). */
        CHECK(r->n_nodes == 12);
        CHECK(r->n_segs == 3 + 2 + 3);
        CHECK(r->n_junctions == 0);
    }
    roads_free(r);
    warn_destroy(&w);
    grid_free(g);
}

static void test_empty_and_errors(void)
{
    grid_t *g = fx_grid(100, 100, 0, 1000, 10, UTM);
    fx_feat_t poly[] = {{"POLYGON ((0 0,10 0,10 10,0 0))", {NULL, NULL, NULL, NULL}}};
    fx_feat_t pts[] = {{"POINT (5 5)", {"primary", NULL, NULL, NULL}}};
    fx_feat_t outside[] = {{"LINESTRING (2000 2000,3000 3000)", {"primary", NULL, NULL, NULL}}};
    warn_list_t w;
    err_t e;
    roads_t *r;

    warn_init(&w);
    fx_write_layer(fx_path(tmpdir, "empty.gpkg"), "GPKG", "roads", UTM, wkbLineString, F_BASIC, NULL, 0);
    r = load(fx_path(tmpdir, "empty.gpkg"), 1.0, g, &w, &e);
    CHECK(r != NULL && r->n_nodes == 0 && r->n_segs == 0 && r->n_features == 0);
    CHECK(warn_has(&w, "road layer 'roads' is empty; travel is walking only"));
    if (r) {
        size_t nc = 7, big = 7;
        CHECK(roads_components(r, &nc, &big, NULL, &e) == ERR_OK && nc == 0 && big == 0);
    }
    roads_free(r);
    warn_destroy(&w);

    /* Everything outside: clipped away, then empty. */
    warn_init(&w);
    fx_write_layer(fx_path(tmpdir, "outside.gpkg"), "GPKG", "roads", UTM, wkbLineString, F_BASIC, outside, 1);
    r = load(fx_path(tmpdir, "outside.gpkg"), 1.0, g, &w, &e);
    CHECK(r != NULL && r->n_segs == 0 && r->n_features_clipped == 1);
    CHECK(warn_has(&w, "1 road features cross or lie outside"));
    CHECK(warn_has(&w, "is empty; travel is walking only"));
    roads_free(r);
    warn_destroy(&w);

    warn_init(&w);
    fx_write_layer(fx_path(tmpdir, "poly.gpkg"), "GPKG", "roads", UTM, wkbPolygon, F_BASIC, poly, 1);
    r = load(fx_path(tmpdir, "poly.gpkg"), 1.0, g, &w, &e);
    CHECK(r == NULL && e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "poly.gpkg' layer 'roads' has Polygon geometries; roads must be lines");

    fx_write_layer(fx_path(tmpdir, "pts.geojson"), "GeoJSON", "roads", UTM, wkbPoint, F_BASIC, pts, 1);
    r = load(fx_path(tmpdir, "pts.geojson"), 1.0, g, &w, &e);
    CHECK(r == NULL && e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "has Point geometries; roads must be lines");

    r = load(fx_path(tmpdir, "nothere.gpkg"), 1.0, g, &w, &e);
    CHECK(r == NULL && e.code == ERR_IO);
    CHECK_STR_HAS(e.msg, "nothere.gpkg");
    CHECK_STR_HAS(e.msg, "no such file");

    {
        FILE *fp = fopen(fx_path(tmpdir, "junk.geojson"), "w");
        fputs("this is not json", fp);
        fclose(fp);
        r = load(fx_path(tmpdir, "junk.geojson"), 1.0, g, &w, &e);
        CHECK(r == NULL && e.code == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "junk.geojson' is not vector data GDAL can read");
    }
    {
        scen_t *s = mk_scen(fx_path(tmpdir, "snap.gpkg"), 1.0);
        s->roads.layer = "streets";
        r = NULL;
        CHECK(roads_load(s, g, &r, &w, &e) == ERR_INPUT && r == NULL);
        CHECK_STR_HAS(e.msg, "has no layer 'streets'; layers present: 'roads'");
        free_scen(s);
    }
    /* A grid without a CRS cannot take reprojected roads. */
    {
        char *wkt = g->wkt;
        g->wkt = NULL;
        r = load(fx_path(tmpdir, "snap.gpkg"), 1.0, g, &w, &e);
        CHECK(r == NULL && e.code == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "the grid has no CRS");
        g->wkt = wkt;
    }
    /* A layer without a CRS is taken to be in the grid's CRS, with a warning. */
    {
        fx_feat_t fn[] = {{"LINESTRING (100 100,200 100)", {"primary", NULL, NULL, NULL}}};
        warn_list_t w2;
        warn_init(&w2);
        /* GeoPackage's "Undefined geographic SRS" and a shapefile without .prj. */
        fx_write_layer(fx_path(tmpdir, "nocrs.gpkg"), "GPKG", "roads", 0, wkbLineString, F_BASIC, fn, 1);
        r = load(fx_path(tmpdir, "nocrs.gpkg"), 1.0, g, &w2, &e);
        CHECK(r != NULL && r->n_segs == 1);
        if (r) CHECK_NEAR(r->total_length_m, 100.0, 1e-9);
        CHECK(warn_has(&w2, "has no CRS; taken to be the population grid's"));
        roads_free(r);
        fx_write_layer(fx_path(tmpdir, "nocrs.shp"), "ESRI Shapefile", "roads", 0, wkbLineString, F_BASIC, fn, 1);
        r = load(fx_path(tmpdir, "nocrs.shp"), 1.0, g, &w2, &e);
        CHECK(r != NULL && r->n_segs == 1);
        if (r) CHECK_NEAR(r->total_length_m, 100.0, 1e-9);
        CHECK(warn_has(&w2, "has no CRS; taken to be the population grid's"));
        roads_free(r);
        warn_destroy(&w2);
    }
    /* Latitudes beyond 90 degrees cannot be reprojected: skipped and counted. */
    {
        fx_feat_t fb[] = {{"LINESTRING (30 95,30 96)", {"primary", NULL, NULL, NULL}},
                       {"LINESTRING (30 -1,30.001 -1)", {"primary", NULL, NULL, NULL}}};
        warn_list_t w2;
        warn_init(&w2);
        fx_write_layer(fx_path(tmpdir, "badlat.geojson"), "GeoJSON", "roads", 4326, wkbLineString, F_BASIC, fb, 2);
        r = load(fx_path(tmpdir, "badlat.geojson"), 1.0, g, &w2, &e);
        CHECK(r != NULL && r->n_features_skipped == 1 && r->n_features_read == 2);
        CHECK(warn_has(&w2, "1 road features in '"));
        CHECK(warn_has(&w2, "could not be reprojected onto the population grid's CRS; skipped"));
        roads_free(r);
        warn_destroy(&w2);
    }
    /* No road layer at all: walking only. */
    r = load(NULL, 1.0, g, &w, &e);
    CHECK(r != NULL && r->n_segs == 0);
    CHECK(warn_has(&w, "no road layer given"));
    roads_free(r);
    warn_destroy(&w);
    grid_free(g);
}

/* Liechtenstein OSM extract on a 0.001-degree grid covering all its highways. Returns NULL
 * when the shared data folder is absent. OSM data © OpenStreetMap
 * contributors, ODbL 1.0. */
static roads_t *load_liechtenstein(warn_list_t *w, err_t *e)
{
    const char *shared = getenv("SITEREACH_SHARED");
    char path[512];
    grid_t *g;
    scen_t *s;
    roads_t *r = NULL;

    snprintf(path, sizeof path, "%s/data/real/liechtenstein/liechtenstein-2013-08-03.osm.pbf",
             shared ? shared : "../shared");
    if (access(path, R_OK) != 0) return NULL;
    /* lon 9.46..9.66, lat 47.02..47.28: the highway lines reach lon 9.6468 and
     * lat 47.0269 (ogrinfo ST_MinX/ST_MaxY... over lines with highway set). */
    g = fx_grid(200, 260, 9.46, 47.28, 0.001, 4326);
    s = mk_scen(path, 1.0);
    roads_load(s, g, &r, w, e);
    free_scen(s);
    grid_free(g);
    return r;
}

static void test_liechtenstein(void)
{
    /* Counts from `ogrinfo -dialect SQLite -sql "SELECT highway, count(*) FROM
     * lines WHERE highway IS NOT NULL GROUP BY highway"` (GDAL 3.6), as listed
     * in the data folder's README. */
    static const struct { const char *cls; size_t n; } want[] = {
        {"residential", 841}, {"track", 597}, {"service", 352}, {"footway", 249},
        {"path", 171}, {"unclassified", 164}, {"cycleway", 96}, {"secondary", 90},
        {"primary", 81}, {"steps", 34}, {"tertiary", 33}, {"living_street", 18},
        {"bridleway", 13}, {"pedestrian", 5}, {"road", 3}, {"construction", 3},
        {"secondary_link", 1},
    };
    warn_list_t w;
    err_t e = {0};
    roads_t *r;
    size_t nc = 0, big = 0;

    warn_init(&w);
    r = load_liechtenstein(&w, &e);
    if (r == NULL && e.code == 0) {
        printf("test_roads: Liechtenstein extract not found; skipped\n");
        warn_destroy(&w);
        return;
    }
    CHECK(r != NULL);
    if (r != NULL) {
        size_t sum = 0;
        CHECK(r->n_features == 2751);
        CHECK(r->n_features_read == 2751);
        CHECK(r->n_features_clipped == 0);
        CHECK(r->n_classes == sizeof want / sizeof want[0]);
        for (size_t k = 0; k < sizeof want / sizeof want[0]; k++) {
            size_t got = 0;
            for (size_t i = 0; i < r->n_classes; i++)
                if (strcmp(r->classes[i].name, want[k].cls) == 0) got = r->classes[i].n_features;
            CHECK(got == want[k].n);
            sum += got;
        }
        CHECK(sum == 2751);
        /* README: "about 967 km"; the exact geodesic comparison is in
         * tests/xcheck/roads_liechtenstein.sh. */
        CHECK_REL(r->total_length_m, 967e3, 0.01);
        /* feature ids are OSM ids. */
        CHECK(strtoll(r->feature_ids[0], NULL, 10) > 0);
        CHECK(roads_components(r, &nc, &big, NULL, &e) == ERR_OK);
        CHECK(nc >= 1 && big > r->n_nodes / 2);
    }
    roads_free(r);
    warn_destroy(&w);
}

static int print_liechtenstein(void)
{
    warn_list_t w;
    err_t e = {0};
    roads_t *r;

    warn_init(&w);
    r = load_liechtenstein(&w, &e);
    if (r == NULL) {
        fprintf(stderr, "test_roads: %s\n", e.code ? e.msg : "Liechtenstein extract not found");
        warn_destroy(&w);
        return 1;
    }
    for (size_t i = 0; i < r->n_classes; i++)
        printf("class %s %zu %.3f\n", r->classes[i].name, r->classes[i].n_features,
               r->classes[i].length_m);
    printf("features %zu\n", r->n_features);
    printf("segments %zu\n", r->n_segs);
    printf("nodes %zu\n", r->n_nodes);
    printf("junctions %zu\n", r->n_junctions);
    printf("total_length_m %.3f\n", r->total_length_m);
    roads_free(r);
    warn_destroy(&w);
    return 0;
}

int main(int argc, char **argv)
{
    int rc;

    GDALAllRegister();
    CPLSetErrorHandler(CPLQuietErrorHandler);
    igraph_set_error_handler(igraph_error_handler_ignore);
    if (argc > 1 && strcmp(argv[1], "--print-liechtenstein") == 0) {
        rc = print_liechtenstein();
        GDALDestroyDriverManager();
        return rc;
    }
    snprintf(tmpdir, sizeof tmpdir, "/tmp/test_roads.XXXXXX");
    if (mkdtemp(tmpdir) == NULL) {
        perror("mkdtemp");
        return 2;
    }
    test_cross();
    test_bridge();
    test_snap();
    test_snap_geographic();
    test_oneway();
    test_reproject();
    test_clip();
    test_classes_and_shapes();
    test_empty_and_errors();
    test_liechtenstein();
    {
        char cmd[128];
        snprintf(cmd, sizeof cmd, "rm -rf '%s'", tmpdir);
        if (system(cmd) != 0) fprintf(stderr, "could not remove %s\n", tmpdir);
    }
    GDALDestroyDriverManager();
    OSRCleanup();
    return CHECK_DONE("test_roads");
}
