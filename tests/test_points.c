/* test_points: point layers written with OGR into a temporary folder, read back
 * with points_load onto grids built by hand in memory (no grid module needed).
 * The Liechtenstein OSM extract (© OpenStreetMap contributors, ODbL 1.0)
 * checks the OSM "points" default layer against ogrinfo's own counts. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cpl_conv.h>
#include <cpl_error.h>
#include <gdal.h>
#include <ogr_api.h>
#include <ogr_srs_api.h>

#include "check.h"
#include "fixtures.h"
#include "points.h"

static char tmpdir[64];






static const char *const FIELDS[] = {"code", "label", "cap", "cost", "stor", NULL};

/* A layer reference naming all five fields of FIELDS. */
static scen_layer_t full_layer(const char *path)
{
    scen_layer_t l = {0};
    l.path = (char *)path;
    l.id_field = "code";
    l.name_field = "label";
    l.capacity_field = "cap";
    l.cost_field = "cost";
    l.storage_field = "stor";
    return l;
}

#define UTM 32736

static void test_happy(void)
{
    /* 100 x 100 cells of 10 m; extent 0..1000 m both ways. */
    grid_t *g = fx_grid(100, 100, 0, 1000, 10, UTM);
    fx_feat_t fs[] = {
        {"POINT (5 995)", {"s-1", "Upper well", "1500", "200.5", "40"}},
        {"POINT (999.5 0.5)", {"s-2", NULL, "0", "0", "0"}},
        {"MULTIPOINT ((505 505))", {"s-3", "Market", "inf", "1", "inf"}},
    };
    scen_layer_t l = full_layer(fx_path(tmpdir, "sites.gpkg"));
    points_t *p = NULL;
    err_t e = {0};

    fx_write_layer(l.path, "GPKG", "sites", UTM, wkbUnknown, FIELDS, fs, 3);
    CHECK(points_load(&l, "existing sites", g, &p, &e) == ERR_OK);
    CHECK(p != NULL && p->n == 3);
    if (p != NULL && p->n == 3) {
        CHECK(strcmp(p->id[0], "s-1") == 0 && strcmp(p->name[0], "Upper well") == 0);
        CHECK(strcmp(p->name[1], "") == 0);
        /* Hand count: cell = row * nx + col with row from the top. */
        CHECK(p->cell[0] == 0);
        CHECK(p->cell[1] == 99 * 100 + 99);
        CHECK(p->cell[2] == 49 * 100 + 50);
        CHECK(p->capacity[0] == 1500.0 && p->cost[0] == 200.5 && p->storage_m3[0] == 40.0);
        CHECK(p->capacity[1] == 0.0);
        CHECK(isinf(p->capacity[2]) && isinf(p->storage_m3[2]));
        CHECK(p->x[2] == 505.0 && p->y[2] == 505.0);
    }
    points_free(p);

    /* No fields named: FIDs as ids (GeoPackage counts from 1), unlimited capacity. */
    {
        scen_layer_t l0 = {0};
        l0.path = l.path;
        p = NULL;
        CHECK(points_load(&l0, "candidate sites", g, &p, &e) == ERR_OK);
        if (p != NULL && p->n == 3) {
            CHECK(strcmp(p->id[0], "1") == 0 && strcmp(p->id[2], "3") == 0);
            CHECK(isinf(p->capacity[0]) && p->cost[0] == 0.0 && isinf(p->storage_m3[0]));
            CHECK(strcmp(p->name[0], "") == 0);
        }
        points_free(p);
    }
    /* An empty layer gives no points. */
    {
        scen_layer_t le = full_layer(fx_path(tmpdir, "none.gpkg"));
        fx_write_layer(le.path, "GPKG", "sites", UTM, wkbPoint, FIELDS, NULL, 0);
        p = NULL;
        CHECK(points_load(&le, "depots", g, &p, &e) == ERR_OK);
        CHECK(p != NULL && p->n == 0);
        points_free(p);
    }
    grid_free(g);
}

static void test_reproject(void)
{
    /* UTM 36S grid 165,000..169,000 E, 9,888,000..9,890,000 N, 100 m cells. */
    grid_t *g = fx_grid(40, 20, 165000, 9890000, 100, UTM);
    fx_feat_t fs[] = {
        {"POINT (30.0 -1.0)", {"a", NULL, NULL, NULL, NULL}},
        {"POINT (30.01 -1.005)", {"b", NULL, NULL, NULL, NULL}},
    };
    scen_layer_t l = {0};
    points_t *p = NULL;
    err_t e = {0};

    l.path = (char *)fx_path(tmpdir, "ll.geojson");
    l.id_field = "code";
    fx_write_layer(l.path, "GeoJSON", "sites", 4326, wkbPoint, FIELDS, fs, 2);
    CHECK(points_load(&l, "candidate sites", g, &p, &e) == ERR_OK);
    CHECK(p != NULL && p->n == 2);
    if (p != NULL && p->n == 2) {
        /* pyproj on this machine: Transformer.from_crs(4326, 32736, always_xy=True)
         * gives (166072.0629, 9889317.1622) and (167186.6810, 9888764.7696),
         * i.e. col 10 row 6 (cell 250) and col 21 row 12 (cell 501). */
        CHECK_NEAR(p->x[0], 166072.0629, 1e-3);
        CHECK_NEAR(p->y[0], 9889317.1622, 1e-3);
        CHECK_NEAR(p->x[1], 167186.6810, 1e-3);
        CHECK_NEAR(p->y[1], 9888764.7696, 1e-3);
        CHECK(p->cell[0] == 250);
        CHECK(p->cell[1] == 501);
    }
    points_free(p);
    grid_free(g);
}

static void test_outside_and_barrier(void)
{
    grid_t *g = fx_grid(100, 100, 0, 1000, 10, UTM);
    fx_feat_t fs[13];
    char wkt[13][64], id[13][16];
    scen_layer_t l = full_layer(NULL);
    points_t *p = NULL;
    err_t e = {0};

    l.capacity_field = l.cost_field = l.storage_field = l.name_field = NULL;
    /* Point 0 inside; points 1..12 outside (x beyond 1000, or on the edge x = 1000). */
    for (int i = 0; i < 13; i++) {
        snprintf(wkt[i], sizeof wkt[i], "POINT (%d 500)", i == 0 ? 500 : 1000 + 10 * (i - 1));
        snprintf(id[i], sizeof id[i], "p%d", i);
        fs[i].wkt = wkt[i];
        memset(fs[i].v, 0, sizeof fs[i].v);
        fs[i].v[0] = id[i];
    }
    l.path = (char *)fx_path(tmpdir, "out.geojson");
    fx_write_layer(l.path, "GeoJSON", "sites", UTM, wkbPoint, FIELDS, fs, 13);
    CHECK(points_load(&l, "candidate sites", g, &p, &e) == ERR_INPUT && p == NULL);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "candidate sites: 12 points in '");
    CHECK_STR_HAS(e.msg, "lie outside the population grid: p1, p2, p3, p4, p5, p6, p7, p8, "
                         "p9, p10 and 2 more");

    /* One outside point: singular wording, no "more". */
    l.path = (char *)fx_path(tmpdir, "out1.geojson");
    fx_write_layer(l.path, "GeoJSON", "sites", UTM, wkbPoint, FIELDS, fs, 2);
    CHECK(points_load(&l, "depots", g, &p, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "depots: 1 point in");
    CHECK_STR_HAS(e.msg, "lies outside the population grid: p1");

    /* Barrier: point p0 at (500, 500) is in col 50, row 50. */
    g->barrier = calloc(100 * 100, 1);
    g->barrier[50 * 100 + 50] = 1;
    l.path = (char *)fx_path(tmpdir, "bar.geojson");
    fx_write_layer(l.path, "GeoJSON", "sites", UTM, wkbPoint, FIELDS, fs, 1);
    CHECK(points_load(&l, "existing sites", g, &p, &e) == ERR_INPUT && p == NULL);
    CHECK_STR_HAS(e.msg, "existing sites: 1 point in");
    CHECK_STR_HAS(e.msg, "lies on barrier cells (impassable): p0; move it onto passable ground");
    g->barrier[50 * 100 + 50] = 0;
    CHECK(points_load(&l, "existing sites", g, &p, &e) == ERR_OK && p != NULL && p->n == 1);
    points_free(p);
    grid_free(g);
}

static void test_bad_values(void)
{
    grid_t *g = fx_grid(100, 100, 0, 1000, 10, UTM);
    scen_layer_t l = full_layer(NULL);
    points_t *p = NULL;
    err_t e = {0};
    struct {
        fx_feat_t f;
        const char *msg;
    } cases[] = {
        {{"POINT (5 5)", {"s-9", "x", "-5", "1", "1"}},
         "existing sites 's-9' in '"},
        {{"POINT (5 5)", {"s-9", "x", "-5", "1", "1"}},
         "has a negative capacity (-5) in field 'cap'"},
        {{"POINT (5 5)", {"s-8", "x", "abc", "1", "1"}},
         "capacity field 'cap' holds 'abc', not a number"},
        {{"POINT (5 5)", {"s-7", "x", "nan", "1", "1"}},
         "'s-7' in '"},
        {{"POINT (5 5)", {"s-7", "x", "NaN", "1", "1"}},
         "holds 'NaN', not a number"},
        {{"POINT (5 5)", {"s-6", "x", "10", "-0.5", "1"}},
         "has a negative cost (-0.5) in field 'cost'"},
        {{"POINT (5 5)", {"s-5", "x", "10", "inf", "1"}},
         "'s-5' in '"},
        {{"POINT (5 5)", {"s-5", "x", "10", "inf", "1"}},
         "has an infinite cost in field 'cost'"},
        {{"POINT (5 5)", {"s-4", "x", "10", "1", "-1"}},
         "has a negative storage (-1) in field 'stor'"},
        {{"POINT (5 5)", {"s-3", "x", NULL, "1", "1"}},
         "existing sites 's-3' in '"},
        {{"POINT (5 5)", {"s-3", "x", NULL, "1", "1"}},
         "has no value in capacity field 'cap'"},
        {{"POINT (5 5)", {NULL, "x", "1", "1", "1"}},
         "has no value in id field 'code'"},
        {{"MULTIPOINT ((5 5),(6 6))", {"s-2", "x", "1", "1", "1"}},
         "existing sites 's-2' in '"},
        {{"MULTIPOINT ((5 5),(6 6))", {"s-2", "x", "1", "1", "1"}},
         "is a MultiPoint of 2 points; give one point per site"},
        {{"LINESTRING (5 5,6 6)", {"s-1", "x", "1", "1", "1"}},
         "'s-1' in '"},
        {{"LINESTRING (5 5,6 6)", {"s-1", "x", "1", "1", "1"}},
         "is a Line String; existing sites must be points"},
    };

    l.path = (char *)fx_path(tmpdir, "bad.gpkg");
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        fx_write_layer(l.path, "GPKG", "sites", UTM, wkbUnknown, FIELDS, &cases[k].f, 1);
        e.code = 0;
        e.msg[0] = '\0';
        p = NULL;
        CHECK(points_load(&l, "existing sites", g, &p, &e) == ERR_INPUT && p == NULL);
        CHECK(e.code == ERR_INPUT);
        CHECK_STR_HAS(e.msg, cases[k].msg);
    }

    /* Duplicate ids. */
    {
        fx_feat_t fs[] = {
            {"POINT (5 5)", {"a", NULL, "1", "1", "1"}},
            {"POINT (15 5)", {"b", NULL, "1", "1", "1"}},
            {"POINT (25 5)", {"a", NULL, "1", "1", "1"}},
        };
        fx_write_layer(l.path, "GPKG", "sites", UTM, wkbPoint, FIELDS, fs, 3);
        CHECK(points_load(&l, "depots", g, &p, &e) == ERR_INPUT && p == NULL);
        CHECK_STR_HAS(e.msg, "depots: id 'a' appears more than once in '");
    }
    /* A named field that the layer lacks. */
    {
        fx_feat_t fs[] = {{"POINT (5 5)", {"a", NULL, "1", "1", "1"}}};
        scen_layer_t lb = l;
        lb.capacity_field = "beds";
        fx_write_layer(l.path, "GPKG", "sites", UTM, wkbPoint, FIELDS, fs, 1);
        CHECK(points_load(&lb, "existing sites", g, &p, &e) == ERR_INPUT && p == NULL);
        CHECK_STR_HAS(e.msg, "bad.gpkg' layer 'sites' has no field 'beds'; fields present: "
                             "code, label, cap, cost, stor");
        lb = l;
        lb.layer = "clinics";
        CHECK(points_load(&lb, "existing sites", g, &p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "has no layer 'clinics'; layers present: 'sites'");
    }
    /* A polygon layer, a missing file. */
    {
        fx_feat_t fs[] = {{"POLYGON ((0 0,10 0,10 10,0 0))", {"a", NULL, "1", "1", "1"}}};
        fx_write_layer(fx_path(tmpdir, "poly.gpkg"), "GPKG", "sites", UTM, wkbPolygon, FIELDS, fs, 1);
        l.path = (char *)fx_path(tmpdir, "poly.gpkg");
        CHECK(points_load(&l, "candidate sites", g, &p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "layer 'sites' has Polygon geometries; candidate sites must be "
                             "points");
        l.path = (char *)fx_path(tmpdir, "gone.gpkg");
        CHECK(points_load(&l, "candidate sites", g, &p, &e) == ERR_IO && p == NULL);
        CHECK_STR_HAS(e.msg, "cannot open candidate sites file '");
        CHECK_STR_HAS(e.msg, "gone.gpkg': no such file");
        l.path = NULL;
        CHECK(points_load(&l, "depots", g, &p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "no depots file given");
    }
    grid_free(g);
}

static void test_osm_points(void)
{
    const char *shared = getenv("SITEREACH_SHARED");
    char path[512];
    scen_layer_t l = {0};
    points_t *p = NULL;
    err_t e = {0};
    grid_t *g;

    snprintf(path, sizeof path, "%s/data/real/liechtenstein/liechtenstein-2013-08-03.osm.pbf",
             shared ? shared : "../shared");
    if (access(path, R_OK) != 0) {
        printf("test_points: Liechtenstein extract not found; skipped\n");
        return;
    }
    l.path = path;
    l.id_field = "osm_id";
    l.name_field = "name";
    /* lon 9.39..9.64, lat 46.78..47.44 covers every point (ogrinfo: x 9.3999..9.6271,
     * y 46.7863..47.4349). */
    g = fx_grid(250, 660, 9.39, 47.44, 0.001, 4326);
    CHECK(points_load(&l, "existing sites", g, &p, &e) == ERR_OK);
    if (p != NULL) {
        /* ogrinfo -dialect SQLite -sql "SELECT count(*) FROM points": 1359. */
        CHECK(p->n == 1359);
        for (size_t i = 0; i < p->n; i++) {
            if (strcmp(p->id[i], "6245") != 0) continue;
            /* The hospital point, ogrinfo: (9.5224777, 47.1343767) ->
             * col floor(132.48) = 132, row floor(305.62) = 305. */
            CHECK_STR_HAS(p->name[i], "Landesspital");
            CHECK(p->cell[i] == 305 * 250 + 132);
        }
    }
    points_free(p);
    grid_free(g);

    /* The roads grid (lon 9.46..9.66, lat 47.02..47.28) leaves 156 points out
     * (ogrinfo SQL count of points outside those bounds). */
    g = fx_grid(200, 260, 9.46, 47.28, 0.001, 4326);
    p = NULL;
    CHECK(points_load(&l, "existing sites", g, &p, &e) == ERR_INPUT && p == NULL);
    CHECK_STR_HAS(e.msg, "existing sites: 156 points in '");
    CHECK_STR_HAS(e.msg, " and 146 more");
    grid_free(g);
}

int main(void)
{
    GDALAllRegister();
    CPLSetErrorHandler(CPLQuietErrorHandler);
    snprintf(tmpdir, sizeof tmpdir, "/tmp/test_points.XXXXXX");
    if (mkdtemp(tmpdir) == NULL) {
        perror("mkdtemp");
        return 2;
    }
    test_happy();
    test_reproject();
    test_outside_and_barrier();
    test_bad_values();
    test_osm_points();
    {
        char cmd[128];
        snprintf(cmd, sizeof cmd, "rm -rf '%s'", tmpdir);
        if (system(cmd) != 0) fprintf(stderr, "could not remove %s\n", tmpdir);
    }
    GDALDestroyDriverManager();
    OSRCleanup();
    return CHECK_DONE("test_points");
}
