/* test_grid: the population raster and its optional layers.
 * Rasters are written with GDAL's C API into a mkdtemp() folder and removed after.
 * Cell sizes are checked against published WGS84 figures and closed-form formulas,
 * the Burundi extract against the figures in its data README; tests/xcheck/grid_burundi.sh
 * compares the same values with GDAL's own statistics and pyproj.
 * Extra modes for that script (print one line or table and exit):
 *   --print-burundi-total            total, nodata, populated, size, scale error
 *   --print-rows RASTER              per row: dx dy area (metres, m2)
 *   --print-layer KIND POP LAYER     per cell of POP: the loaded layer value
 *                                    (KIND = landcover | elevation | barrier) */
#include <dirent.h>
#include <float.h>
#include <limits.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cpl_conv.h>
#include <cpl_error.h>
#include <gdal.h>
#include <ogr_srs_api.h>

#include "check.h"
#include "grid.h"

static char tmpdir[256];

static const char *tpath(const char *name)
{
    static char buf[4][512];
    static int k;
    k = (k + 1) % 4;
    snprintf(buf[k], sizeof buf[k], "%s/%s", tmpdir, name);
    return buf[k];
}

static void write_text(const char *path, const char *text)
{
    FILE *f = fopen(path, "w");
    if (f == NULL) return;
    fputs(text, f);
    fclose(f);
}

/* Write a one-band GeoTIFF. srs may be NULL (no CRS), gt may be NULL (no geotransform),
 * vals may be NULL (all zero). */
static int make_tif(const char *path, int nx, int ny, const double *gt, const char *srs,
                    GDALDataType dt, const double *vals, int has_nd, double nd)
{
    GDALDriverH drv = GDALGetDriverByName("GTiff");
    GDALDatasetH ds = GDALCreate(drv, path, nx, ny, 1, dt, NULL);
    GDALRasterBandH b;
    int ok = 1;

    if (ds == NULL) return 0;
    if (gt != NULL) {
        double g[6];
        memcpy(g, gt, sizeof g);
        GDALSetGeoTransform(ds, g);
    }
    if (srs != NULL) {
        OGRSpatialReferenceH s = OSRNewSpatialReference(NULL);
        OSRSetFromUserInput(s, srs);
        GDALSetSpatialRef(ds, s);
        OSRDestroySpatialReference(s);
    }
    b = GDALGetRasterBand(ds, 1);
    if (has_nd) GDALSetRasterNoDataValue(b, nd);
    if (vals != NULL) {
        double *v = malloc((size_t)nx * ny * sizeof *v);
        memcpy(v, vals, (size_t)nx * ny * sizeof *v);
        ok = GDALRasterIO(b, GF_Write, 0, 0, nx, ny, v, nx, ny, GDT_Float64, 0, 0) == CE_None;
        free(v);
    }
    GDALClose(ds);
    return ok;
}

static void rm_tmpdir(void)
{
    DIR *d = opendir(tmpdir);
    struct dirent *de;
    if (d != NULL) {
        while ((de = readdir(d)) != NULL) {
            if (strcmp(de->d_name, ".") == 0 || strcmp(de->d_name, "..") == 0) continue;
            unlink(tpath(de->d_name));
        }
        closedir(d);
    }
    rmdir(tmpdir);
}

static const char *shared_dir(void)
{
    const char *s = getenv("SITEREACH_SHARED");
    return s != NULL && s[0] ? s : "../shared";
}

static const char *burundi_path(void)
{
    static char p[1024];
    snprintf(p, sizeof p, "%s/data/real/burundi/ghs_pop_burundi_250m_mollweide.tif",
             shared_dir());
    return p;
}

/* Area of the ellipsoidal quadrangle between two parallels and a longitude span, from
 * the authalic-latitude formula (Snyder 1987, "Map Projections: A Working Manual",
 * USGS PP 1395, eq. 3-12 for q; recalled from memory). Degrees in, square metres out. */
static double quad_area(double a, double f, double lat1, double lat2, double dlon)
{
    double e2 = f * (2 - f), e = sqrt(e2);
    double s1 = sin(lat1 * M_PI / 180), s2 = sin(lat2 * M_PI / 180);
    double q1 = (1 - e2) * (s1 / (1 - e2 * s1 * s1) - log((1 - e * s1) / (1 + e * s1)) / (2 * e));
    double q2 = (1 - e2) * (s2 / (1 - e2 * s2 * s2) - log((1 - e * s2) / (1 + e * s2)) / (2 * e));
    return fabs(a * a * (dlon * M_PI / 180) * (q2 - q1) / 2);
}

/* ---- happy paths ------------------------------------------------------------------ */

static void test_projected(void)
{
    /* 4 x 3 cells of 100 m in UTM 36S; nodata -1, one NaN, people elsewhere. */
    const double gt[6] = {500000, 100, 0, 9000000, 0, -100};
    const double v[12] = {1, 2, -1, 0,
                          NAN, 3.5, 4, -1,
                          0, 0, 10, 0.25};
    grid_t *g = NULL;
    err_t e = {0};
    double x, y;
    int c, r;

    CHECK(make_tif(tpath("utm.tif"), 4, 3, gt, "EPSG:32736", GDT_Float32, v, 1, -1));
    CHECK(grid_load(tpath("utm.tif"), &g, &e) == ERR_OK);
    if (g == NULL) return;
    CHECK(g->nx == 4 && g->ny == 3);
    CHECK(!g->geographic);
    CHECK_STR_HAS(g->crs_name, "UTM zone 36S");
    CHECK(g->wkt != NULL && strstr(g->wkt, "32736") != NULL);
    /* Projected CRS in metres: exactly the geotransform step. */
    for (r = 0; r < 3; r++) {
        CHECK(g->row_dx_m[r] == 100.0);
        CHECK(g->row_dy_m[r] == 100.0);
        CHECK(g->row_area_m2[r] == 10000.0);
    }
    CHECK(g->min_dx_m == 100.0 && g->max_dy_m == 100.0);
    CHECK_NEAR(g->total_people, 1 + 2 + 3.5 + 4 + 10 + 0.25, 1e-12);
    CHECK(g->n_nodata == 2);
    CHECK(g->n_nan == 1);
    CHECK(g->n_populated == 6);
    CHECK(g->people[2] == 0.0 && g->people[4] == 0.0);
    /* Near the central meridian UTM's scale is 0.9996 (the UTM definition). */
    CHECK_NEAR(g->scale_error, 0.0004, 2e-5);
    grid_cell_center(g, 1, 2, &x, &y);
    CHECK(x == 500150.0 && y == 8999750.0);
    CHECK(grid_locate(g, 500150.0, 8999750.0, &c, &r) == 1 && c == 1 && r == 2);
    CHECK(grid_locate(g, 500000.0, 9000000.0, &c, &r) == 1 && c == 0 && r == 0);
    CHECK(grid_locate(g, 500399.999, 8999700.001, &c, &r) == 1 && c == 3 && r == 2);
    CHECK(grid_locate(g, 500400.0, 8999800.0, &c, &r) == 0);   /* right edge: outside */
    CHECK(grid_locate(g, 500100.0, 8999700.0, &c, &r) == 0);   /* bottom edge: outside */
    CHECK(grid_locate(g, 499999.0, 8999800.0, &c, &r) == 0);
    CHECK(grid_locate(g, NAN, 8999800.0, &c, &r) == 0);
    grid_free(g);
    grid_free(NULL);
}

static void test_feet_and_scale(void)
{
    /* EPSG:2263 (NAD83 / New York Long Island, US survey feet): 100 ft cells are
     * 100 * 1200/3937 m = 30.480061 m (the US survey foot's legal definition). */
    const double gt[6] = {1000000, 100, 0, 200000, 0, -100};
    const double v[4] = {1, 2, 3, 4};
    grid_t *g = NULL;
    err_t e = {0};

    CHECK(make_tif(tpath("ft.tif"), 2, 2, gt, "EPSG:2263", GDT_Int16, v, 0, 0));
    CHECK(grid_load(tpath("ft.tif"), &g, &e) == ERR_OK);
    if (g != NULL) {
        CHECK_NEAR(g->row_dx_m[0], 100 * 1200.0 / 3937.0, 1e-6);
        CHECK_NEAR(g->row_area_m2[1], pow(100 * 1200.0 / 3937.0, 2), 1e-3);
        CHECK(g->total_people == 10.0);
        CHECK(g->n_nodata == 0 && g->n_nan == 0);
    }
    grid_free(g);
    g = NULL;

    /* Scale and offset from the band apply: stored 1..4 with scale 2.5 are 2.5..10. */
    {
        GDALDatasetH ds = GDALOpen(tpath("ft.tif"), GA_Update);
        GDALSetRasterScale(GDALGetRasterBand(ds, 1), 2.5);
        GDALClose(ds);
    }
    CHECK(grid_load(tpath("ft.tif"), &g, &e) == ERR_OK);
    if (g != NULL) CHECK(g->total_people == 25.0);
    grid_free(g);
}

static void test_geographic(void)
{
    /* One-degree cells in EPSG:4326: row 0 spans 0.5N..0.5S, row 1 60.5N..59.5N is
     * simulated by a second raster, row 2 touches the north pole. */
    const double gt_eq[6] = {10, 1, 0, 0.5, 0, -1};
    const double gt_60[6] = {10, 1, 0, 60.5, 0, -1};
    const double gt_pole[6] = {-180, 1, 0, 90, 0, -1};
    const double a = 6378137.0, f = 1 / 298.257223563;
    const double one[3] = {1, 1, 1};
    grid_t *g = NULL;
    err_t e = {0};

    CHECK(make_tif(tpath("eq.tif"), 3, 1, gt_eq, "EPSG:4326", GDT_Float32, one, 0, 0));
    CHECK(grid_load(tpath("eq.tif"), &g, &e) == ERR_OK);
    if (g != NULL) {
        CHECK(g->geographic);
        CHECK_STR_HAS(g->crs_name, "WGS 84");
        /* Published WGS84 lengths of a degree (standard geodesy tables, e.g. the
         * "length of a degree" tables in Wikipedia's Latitude and Longitude articles,
         * recalled from memory): latitude at the equator 110.574 km, longitude at the
         * equator 111.320 km. */
        CHECK_NEAR(g->row_dy_m[0], 110574.0, 1.0);
        CHECK_NEAR(g->row_dx_m[0], 111320.0, 1.0);
        /* The same from a*pi/180 (equatorial arc) to a millimetre. */
        CHECK_NEAR(g->row_dx_m[0], a * M_PI / 180, 1e-3);
        CHECK_REL(g->row_area_m2[0], quad_area(a, f, -0.5, 0.5, 1), 1e-4);
        CHECK(g->total_people == 3.0);
    }
    grid_free(g);
    g = NULL;

    CHECK(make_tif(tpath("n60.tif"), 1, 1, gt_60, "EPSG:4326", GDT_Float32, one, 0, 0));
    CHECK(grid_load(tpath("n60.tif"), &g, &e) == ERR_OK);
    if (g != NULL) {
        /* Same tables: at 60 degrees a degree of longitude is 55.800 km and one of
         * latitude 111.412 km. The geodesic between the two edge points is shorter
         * than the arc of the parallel by about 0.5 m, inside the 1 m tolerance. */
        CHECK_NEAR(g->row_dx_m[0], 55800.0, 1.0);
        CHECK_NEAR(g->row_dy_m[0], 111412.0, 1.0);
        /* Parallel arc N cos(phi) dlon with N = a / sqrt(1 - e2 sin^2 phi) (standard
         * radius of curvature in the prime vertical, from memory). */
        {
            double e2 = f * (2 - f), s = sin(60 * M_PI / 180);
            double arc = a / sqrt(1 - e2 * s * s) * cos(60 * M_PI / 180) * M_PI / 180;
            CHECK_NEAR(g->row_dx_m[0], arc, 1.0);
        }
        CHECK_REL(g->row_area_m2[0], quad_area(a, f, 59.5, 60.5, 1), 1e-4);
    }
    grid_free(g);
    g = NULL;

    /* A full column of one-degree rows from the north pole down: every size finite,
     * positive and the widths shrinking poleward. */
    {
        double *vals = calloc(180 * 2, sizeof *vals);
        CHECK(make_tif(tpath("pole.tif"), 2, 180, gt_pole, "EPSG:4326", GDT_Float32, vals, 0,
                       0));
        free(vals);
    }
    CHECK(grid_load(tpath("pole.tif"), &g, &e) == ERR_OK);
    if (g != NULL) {
        int ok = 1;
        for (int r = 0; r < 180; r++)
            ok &= isfinite(g->row_dx_m[r]) && g->row_dx_m[r] > 0 && g->row_dy_m[r] > 0 &&
                  g->row_area_m2[r] > 0;
        CHECK(ok);
        CHECK(g->row_dx_m[0] < 1000.0);          /* centre 89.5N: ~974 m */
        CHECK(g->row_dx_m[0] < g->row_dx_m[1]);
        CHECK_NEAR(g->max_dx_m, g->row_dx_m[89], 1e-9);
        CHECK_NEAR(g->min_dx_m, g->row_dx_m[0], 1e-9);
        CHECK(g->scale_error == 0.0);
        /* One column of one-degree cells from pole to pole is 1/360 of the ellipsoid,
         * whose surface is 510,065,621.7 km2 (WGS84 tables, from memory). Cells with
         * geodesic edges add up to that only approximately, hence 1e-4. */
        {
            double sum = 0;
            for (int r = 0; r < 180; r++) sum += g->row_area_m2[r];
            CHECK_REL(sum * 360, 510065621.7e6, 1e-4);
        }
        CHECK(g->total_people == 0.0 && g->n_populated == 0);
    }
    grid_free(g);
}

static void test_south_up_and_world(void)
{
    /* South-up geographic grid (positive row step): row 0 spans 59.5N..60.5N; sizes
     * are the same as the north-up cell above, people unchanged. */
    const double gt_s[6] = {10, 1, 0, 59.5, 0, 1};
    const double one[1] = {4};
    /* World Mollweide (ESRI:54009) at 100 km: the grid corners lie off the ellipse
     * and cannot be inverted; the distortion is still measured from the inner points
     * and is large (0.495 here; pyproj's get_factors gives a meridional scale of 1.89
     * at 150E 60N). */
    const double gt_w[6] = {-18040000, 100000, 0, 9020000, 0, -100000};
    grid_t *g = NULL;
    err_t e = {0};
    double *w = calloc(361 * 181, sizeof *w);
    int c, r;

    CHECK(make_tif(tpath("sup.tif"), 1, 1, gt_s, "EPSG:4326", GDT_Float32, one, 0, 0));
    CHECK(grid_load(tpath("sup.tif"), &g, &e) == ERR_OK);
    if (g != NULL) {
        CHECK_NEAR(g->row_dx_m[0], 55800.0, 1.0);
        CHECK_NEAR(g->row_dy_m[0], 111412.0, 1.0);
        CHECK(g->total_people == 4.0);
        CHECK(grid_locate(g, 10.5, 60.2, &c, &r) == 1 && c == 0 && r == 0);
        CHECK(grid_locate(g, 10.5, 59.4, &c, &r) == 0);
    }
    grid_free(g);
    g = NULL;
    CHECK(make_tif(tpath("world.tif"), 361, 181, gt_w, "ESRI:54009", GDT_Float32, w, 0, 0));
    CHECK(grid_load(tpath("world.tif"), &g, &e) == ERR_OK);
    if (g != NULL) {
        CHECK(isfinite(g->scale_error) && g->scale_error > 0.3);
        CHECK(g->row_dx_m[0] == 100000.0);
    }
    grid_free(g);
    free(w);
}

static void test_blocks(void)
{
    /* A tiled raster whose size is not a multiple of the 16 x 16 tile, and a strip file:
     * chunked reading must visit every cell once. Cell value = col + 1000 * row. */
    const int nx = 50, ny = 37;
    const double gt[6] = {0, 10, 0, 1000, 0, -10};
    double *v = malloc((size_t)nx * ny * sizeof *v), want = 0;
    char *opts[] = {"TILED=YES", "BLOCKXSIZE=16", "BLOCKYSIZE=16", NULL};
    GDALDatasetH ds, mem;
    grid_t *g = NULL;
    err_t e = {0};

    for (int r = 0; r < ny; r++)
        for (int c = 0; c < nx; c++) {
            v[r * nx + c] = c + 1000.0 * r;
            want += v[r * nx + c];
        }
    CHECK(make_tif(tpath("strip.tif"), nx, ny, gt, "EPSG:32736", GDT_Float64, v, 0, 0));
    ds = GDALOpen(tpath("strip.tif"), GA_ReadOnly);
    mem = GDALCreateCopy(GDALGetDriverByName("GTiff"), tpath("tiled.tif"), ds, 0, opts, NULL,
                         NULL);
    GDALClose(mem);
    GDALClose(ds);
    for (int k = 0; k < 2; k++) {
        CHECK(grid_load(tpath(k ? "tiled.tif" : "strip.tif"), &g, &e) == ERR_OK);
        if (g != NULL) {
            CHECK(g->total_people == want);
            CHECK(g->people[36 * nx + 49] == 49 + 36000.0);
            CHECK(g->people[17 * nx + 3] == 3 + 17000.0);
            CHECK(g->n_populated == (size_t)nx * ny - 1);
        }
        grid_free(g);
        g = NULL;
    }
    free(v);
}

static void test_mask(void)
{
    /* A per-dataset mask (no nodata value): masked cells count as nodata, 0 people. */
    const double gt[6] = {0, 10, 0, 100, 0, -10};
    const double v[4] = {5, 6, 7, 8};
    unsigned char m[4] = {255, 0, 255, 0};
    GDALDatasetH ds;
    GDALRasterBandH b;
    grid_t *g = NULL;
    err_t e = {0};

    CHECK(make_tif(tpath("mask.tif"), 2, 2, gt, "EPSG:32736", GDT_Float32, v, 0, 0));
    ds = GDALOpen(tpath("mask.tif"), GA_Update);
    b = GDALGetRasterBand(ds, 1);
    CHECK(GDALCreateMaskBand(b, GMF_PER_DATASET) == CE_None);
    CHECK(GDALRasterIO(GDALGetMaskBand(b), GF_Write, 0, 0, 2, 2, m, 2, 2, GDT_Byte, 0, 0) ==
          CE_None);
    GDALClose(ds);
    CHECK(grid_load(tpath("mask.tif"), &g, &e) == ERR_OK);
    if (g != NULL) {
        CHECK(g->total_people == 12.0);
        CHECK(g->n_nodata == 2);
        CHECK(g->people[1] == 0.0 && g->people[3] == 0.0);
    }
    grid_free(g);
}

static void test_geodesic(void)
{
    /* Vincenty (1975) test line, Flinders Peak to Buninyong: 54,972.271 m (Geodetic
     * textbooks and Geoscience Australia's worked example, GRS80; from memory). GRS80
     * and WGS84 differ by 0.1 mm in the semi-minor axis, far below the tolerance. */
    double lon1 = 144 + 25 / 60.0 + 29.52440 / 3600, lat1 = -(37 + 57 / 60.0 + 3.72030 / 3600);
    double lon2 = 143 + 55 / 60.0 + 35.38390 / 3600, lat2 = -(37 + 39 / 60.0 + 10.15610 / 3600);
    double s = grid_geodesic_m(lon1, lat1, lon2, lat2);
    CHECK_NEAR(s, 54972.271, 0.002);
    CHECK_NEAR(grid_geodesic_m(0, 0, 1, 0), 111320.0, 1.0);   /* table above */
    CHECK(grid_geodesic_m(30, -3, 30, -3) == 0.0);
}

/* ---- failures --------------------------------------------------------------------- */

static void expect_fail(const char *path, int code, const char *sub1, const char *sub2)
{
    grid_t *g = (grid_t *)1;
    err_t e = {0};
    int rc = grid_load(path, &g, &e);

    CHECK(rc == code);
    CHECK(e.code == code);
    CHECK(g == NULL);
    CHECK_STR_HAS(e.msg, path);
    CHECK_STR_HAS(e.msg, sub1);
    if (sub2 != NULL) CHECK_STR_HAS(e.msg, sub2);
    CHECK(strchr(e.msg, '\n') == NULL);
    if (rc == ERR_OK) grid_free(g);
}

static int make_two_array_netcdf(const char *path)
{
    GDALDriverH drv = GDALGetDriverByName("netCDF");
    GDALDatasetH ds;
    GDALGroupH root;
    GDALDimensionH dims[2];
    GDALExtendedDataTypeH t;
    GDALMDArrayH a, b;

    if (drv == NULL) return 0;
    ds = GDALCreateMultiDimensional(drv, path, NULL, NULL);
    if (ds == NULL) return 0;
    root = GDALDatasetGetRootGroup(ds);
    dims[0] = GDALGroupCreateDimension(root, "y", NULL, NULL, 2, NULL);
    dims[1] = GDALGroupCreateDimension(root, "x", NULL, NULL, 3, NULL);
    t = GDALExtendedDataTypeCreate(GDT_Float32);
    a = GDALGroupCreateMDArray(root, "first", 2, dims, t, NULL);
    b = GDALGroupCreateMDArray(root, "second", 2, dims, t, NULL);
    GDALMDArrayRelease(a);
    GDALMDArrayRelease(b);
    GDALExtendedDataTypeRelease(t);
    GDALDimensionRelease(dims[0]);
    GDALDimensionRelease(dims[1]);
    GDALGroupRelease(root);
    GDALClose(ds);
    return 1;
}

static void test_failures(void)
{
    const double gt[6] = {500000, 100, 0, 9000000, 0, -100};
    const double rot[6] = {500000, 100, 5, 9000000, 5, -100};
    const double neg[6] = {1, -5, 2, -0.5, 3, 4};
    const double inf[2] = {1, INFINITY};
    const double lat_bad[6] = {0, 1, 0, 91, 0, -1};

    expect_fail(tpath("nope.tif"), ERR_IO, "not found", "population raster");
    write_text(tpath("notes.txt"), "these are not cells\n");
    expect_fail(tpath("notes.txt"), ERR_INPUT, "is not a raster GDAL can read", NULL);
    write_text(tpath("pts.geojson"),
               "{\"type\":\"FeatureCollection\",\"features\":[{\"type\":\"Feature\","
               "\"properties\":{},\"geometry\":{\"type\":\"Point\",\"coordinates\":[1,2]}}]}");
    expect_fail(tpath("pts.geojson"), ERR_INPUT, "is not a raster GDAL can read", NULL);
    /* GDAL itself refuses a zero-size raster, so the message carries its reason. */
    write_text(tpath("zero.vrt"),
               "<VRTDataset rasterXSize=\"0\" rasterYSize=\"10\"><SRS>EPSG:4326</SRS>"
               "<GeoTransform>0,1,0,0,0,-1</GeoTransform>"
               "<VRTRasterBand dataType=\"Float32\" band=\"1\"/></VRTDataset>");
    expect_fail(tpath("zero.vrt"), ERR_INPUT, "is not a raster GDAL can read", "0 x 10");
    CHECK(make_tif(tpath("nocrs.tif"), 2, 2, gt, NULL, GDT_Float32, NULL, 0, 0));
    expect_fail(tpath("nocrs.tif"), ERR_INPUT, "has no coordinate reference system",
                "gdal_edit.py -a_srs");
    CHECK(make_tif(tpath("nogt.tif"), 2, 2, NULL, "EPSG:32736", GDT_Float32, NULL, 0, 0));
    expect_fail(tpath("nogt.tif"), ERR_INPUT, "has no geotransform", "-a_ullr");
    CHECK(make_tif(tpath("rot.tif"), 2, 2, rot, "EPSG:32736", GDT_Float32, NULL, 0, 0));
    expect_fail(tpath("rot.tif"), ERR_INPUT, "is rotated", "gdalwarp");
    CHECK(make_two_array_netcdf(tpath("two.nc")));
    expect_fail(tpath("two.nc"), ERR_INPUT, "has no bands", "2 subdatasets");
    CHECK(make_tif(tpath("neg.tif"), 3, 2, gt, "EPSG:32736", GDT_Float32, neg, 0, 0));
    expect_fail(tpath("neg.tif"), ERR_INPUT, "2 negative cells", "(col 1, row 0) = -5");
    CHECK(make_tif(tpath("inf.tif"), 2, 1, gt, "EPSG:32736", GDT_Float32, inf, 0, 0));
    expect_fail(tpath("inf.tif"), ERR_INPUT, "1 infinite cell", "(col 1, row 0)");
    CHECK(make_tif(tpath("cplx.tif"), 2, 1, gt, "EPSG:32736", GDT_CFloat32, NULL, 0, 0));
    expect_fail(tpath("cplx.tif"), ERR_INPUT, "complex", NULL);
    CHECK(make_tif(tpath("lat91.tif"), 2, 2, lat_bad, "EPSG:4326", GDT_Float32, NULL, 0, 0));
    expect_fail(tpath("lat91.tif"), ERR_INPUT, "beyond +-90", "row 0");
    /* A folder is not a raster either. */
    expect_fail(tmpdir, ERR_INPUT, "folder", NULL);
}

/* ---- optional layers --------------------------------------------------------------- */

/* Population grid used by the layer tests: 6 x 4 cells of 100 m in UTM 36S, one
 * person per cell except 5 in cell (0,0) and 7 in cell (5,3). */
static grid_t *layer_pop(void)
{
    const double gt[6] = {499700, 100, 0, 9000200, 0, -100};
    double v[24];
    grid_t *g = NULL;
    err_t e = {0};

    for (int i = 0; i < 24; i++) v[i] = 1;
    v[0] = 5;
    v[23] = 7;
    make_tif(tpath("lpop.tif"), 6, 4, gt, "EPSG:32736", GDT_Float32, v, 0, 0);
    grid_load(tpath("lpop.tif"), &g, &e);
    return g;
}

static void test_landcover(void)
{
    grid_t *g = layer_pop();
    err_t e = {0};
    /* Coarser land cover (200 m) over the same area plus one extra column to the west:
     * 4 x 2 coarse cells, classes 10..17, nodata 0 at coarse (2,0). Each fine cell takes
     * the coarse cell holding its centre (by hand: fine col c -> coarse col c/2 + 1). */
    const double gt_c[6] = {499500, 200, 0, 9000200, 0, -200};
    const double vc[8] = {10, 11, 0, 13,
                          14, 15, 16, 17};
    /* Same grid as the population, read directly; 255 is nodata. */
    const double gt_s[6] = {499700, 100, 0, 9000200, 0, -100};
    double vs[24];

    CHECK(g != NULL);
    if (g == NULL) return;
    CHECK(make_tif(tpath("lc_coarse.tif"), 4, 2, gt_c, "EPSG:32736", GDT_Byte, vc, 1, 0));
    CHECK(grid_load_landcover(g, tpath("lc_coarse.tif"), &e) == ERR_OK);
    if (g->landcover != NULL) {
        int ok = 1;
        for (int r = 0; r < 4; r++)
            for (int c = 0; c < 6; c++) {
                double want = vc[(r / 2) * 4 + c / 2 + 1];
                int32_t got = g->landcover[r * 6 + c];
                ok &= want == 0 ? got == INT32_MIN : got == (int32_t)want;
            }
        CHECK(ok);
        CHECK(g->landcover[0] == 11);        /* fine (0,0) in coarse (1,0) */
        CHECK(g->landcover[2] == INT32_MIN); /* fine (2,0) in coarse (2,0): nodata */
        CHECK(g->landcover[23] == 17);       /* fine (5,3) in coarse (3,1) */
    }
    /* Coarse (2,0) is nodata: fine cols 2-3 of rows 0-1 have no class (by hand). */
    CHECK(g->n_landcover_missing == 4);

    for (int i = 0; i < 24; i++) vs[i] = 100 + i;
    vs[7] = 255;
    CHECK(make_tif(tpath("lc_same.tif"), 6, 4, gt_s, "EPSG:32736", GDT_Int16, vs, 1, 255));
    CHECK(grid_load_landcover(g, tpath("lc_same.tif"), &e) == ERR_OK);
    if (g->landcover != NULL) {
        CHECK(g->landcover[0] == 100 && g->landcover[23] == 123);
        CHECK(g->landcover[7] == INT32_MIN);
    }
    CHECK(g->n_landcover_missing == 1);
    /* A land cover that lies elsewhere entirely: error, and the old layer is kept. */
    {
        const double far[6] = {100000, 100, 0, 8000000, 0, -100};
        CHECK(make_tif(tpath("lc_far.tif"), 2, 2, far, "EPSG:32736", GDT_Byte, vc, 0, 0));
        e.code = 0;
        CHECK(grid_load_landcover(g, tpath("lc_far.tif"), &e) == ERR_INPUT);
        CHECK(e.code == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "land-cover raster");
        CHECK_STR_HAS(e.msg, "no valid cells over the population grid");
        CHECK(g->landcover != NULL && g->landcover[0] == 100);
    }
    /* Non-whole class numbers. */
    vs[7] = 2.5;
    CHECK(make_tif(tpath("lc_frac.tif"), 6, 4, gt_s, "EPSG:32736", GDT_Float32, vs, 0, 0));
    CHECK(grid_load_landcover(g, tpath("lc_frac.tif"), &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "(col 1, row 1)");
    CHECK_STR_HAS(e.msg, "not a whole class number");
    /* Missing and unreadable files name the layer. */
    CHECK(grid_load_landcover(g, tpath("none.tif"), &e) == ERR_IO);
    CHECK(e.code == ERR_IO);
    CHECK_STR_HAS(e.msg, "land-cover raster");
    CHECK_STR_HAS(e.msg, "none.tif");
    write_text(tpath("lc.txt"), "forest\n");
    CHECK(grid_load_landcover(g, tpath("lc.txt"), &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "land-cover raster");
    CHECK_STR_HAS(e.msg, "is not a raster GDAL can read");
    /* A NULL path adds nothing and keeps the layer. */
    CHECK(grid_load_landcover(g, NULL, &e) == ERR_OK);
    CHECK(g->landcover != NULL && g->landcover[0] == 100);
    /* Two-band coarse land cover: band 1 is used, band 2 (all 99) ignored; resampled
     * through the one-band view GDAL 3.6's warper needs. */
    {
        GDALDatasetH ds = GDALCreate(GDALGetDriverByName("GTiff"), tpath("lc_two.tif"), 4, 2,
                                     2, GDT_Int16, NULL);
        OGRSpatialReferenceH sr = OSRNewSpatialReference(NULL);
        double gtc[6], b2[8], b1[8];
        memcpy(gtc, gt_c, sizeof gtc);
        memcpy(b1, vc, sizeof b1);
        for (int i = 0; i < 8; i++) b2[i] = 99;
        OSRImportFromEPSG(sr, 32736);
        GDALSetSpatialRef(ds, sr);
        OSRDestroySpatialReference(sr);
        GDALSetGeoTransform(ds, gtc);
        GDALSetRasterNoDataValue(GDALGetRasterBand(ds, 1), 0);
        CHECK(GDALRasterIO(GDALGetRasterBand(ds, 1), GF_Write, 0, 0, 4, 2, b1, 4, 2,
                           GDT_Float64, 0, 0) == CE_None);
        CHECK(GDALRasterIO(GDALGetRasterBand(ds, 2), GF_Write, 0, 0, 4, 2, b2, 4, 2,
                           GDT_Float64, 0, 0) == CE_None);
        GDALClose(ds);
    }
    CHECK(grid_load_landcover(g, tpath("lc_two.tif"), &e) == ERR_OK);
    if (g->landcover != NULL) {
        CHECK(g->landcover[0] == 11);
        CHECK(g->landcover[2] == INT32_MIN);
        CHECK(g->landcover[23] == 17);
    }
    grid_free(g);
    /* No grid to put it on. */
    CHECK(grid_load_landcover(NULL, tpath("lc_two.tif"), &e) == ERR_INTERNAL);
    CHECK_STR_HAS(e.msg, "no population grid");
}

static void test_elevation(void)
{
    grid_t *g = layer_pop();
    err_t e = {0};
    /* A plane z = 0.01 x' + 0.02 y' + 100 (x', y' metres from the source origin) on
     * 200 m cells reaching one cell beyond the population grid on every side. Bilinear
     * interpolation of a plane gives the plane back wherever the four neighbours are
     * valid, so each fine cell centre gets the plane's value there (by hand). */
    const double gt_c[6] = {499500, 200, 0, 9000400, 0, -200};
    double vc[5 * 4];
    const double gt_s[6] = {499700, 100, 0, 9000200, 0, -100};
    double vs[24];

    CHECK(g != NULL);
    if (g == NULL) return;
    for (int r = 0; r < 4; r++)
        for (int c = 0; c < 5; c++) {
            double x = 499500 + (c + 0.5) * 200, y = 9000400 - (r + 0.5) * 200;
            vc[r * 5 + c] = 0.01 * (x - 499500) + 0.02 * (y - 8999600) + 100;
        }
    CHECK(make_tif(tpath("dem.tif"), 5, 4, gt_c, "EPSG:32736", GDT_Float32, vc, 1, -9999));
    CHECK(grid_load_elevation(g, tpath("dem.tif"), &e) == ERR_OK);
    if (g->elevation != NULL) {
        double worst = 0;
        for (int r = 0; r < 4; r++)
            for (int c = 0; c < 6; c++) {
                double x, y;
                grid_cell_center(g, c, r, &x, &y);
                worst = fmax(worst, fabs(g->elevation[r * 6 + c] -
                                         (0.01 * (x - 499500) + 0.02 * (y - 8999600) + 100)));
            }
        CHECK_NEAR(worst, 0, 1e-4);
    }
    /* It reaches past every edge, so no cell goes without a height. */
    CHECK(g->n_elevation_missing == 0);
    /* Same grid: nodata -> NAN, values as stored. */
    for (int i = 0; i < 24; i++) vs[i] = 1000 + i;
    vs[5] = -9999;
    CHECK(make_tif(tpath("dem_same.tif"), 6, 4, gt_s, "EPSG:32736", GDT_Float32, vs, 1, -9999));
    CHECK(grid_load_elevation(g, tpath("dem_same.tif"), &e) == ERR_OK);
    if (g->elevation != NULL) {
        CHECK(isnan(g->elevation[5]));
        CHECK(g->elevation[6] == 1006.0f);
    }
    /* The one nodata cell is counted, so the caller can say slope is off there. */
    CHECK(g->n_elevation_missing == 1);
    CHECK(g->n_landcover_missing == 0 && g->n_barrier_missing == 0);
    CHECK(make_tif(tpath("dem_nocrs.tif"), 6, 4, gt_s, NULL, GDT_Float32, vs, 0, 0));
    CHECK(grid_load_elevation(g, tpath("dem_nocrs.tif"), &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "elevation raster");
    CHECK_STR_HAS(e.msg, "gdal_edit.py -a_srs");
    grid_free(g);
}

static void test_barriers(void)
{
    grid_t *g = layer_pop();
    err_t e = {0};
    /* Barrier in EPSG:4326, 0.0005 degree cells, lon 32.99..33.01, lat -9.05..-9.03:
     * 1 west of 33E, 0 east of it, nodata 255 on the northernmost 6 rows. The
     * population grid's columns are centred at x = 499750..500250 m in UTM 36S, whose
     * central meridian is 33E at x = 500000 (the UTM definition), so columns 0-2 lie
     * west (barrier) and 3-5 east, whatever the latitude. Rows of the population grid
     * are centred at y = 9000150..8999850, about lat -9.0452..-9.0479: south of the
     * nodata band (-9.032..-9.035). */
    const int nx = 40, ny = 40;
    const double gt_b[6] = {32.99, 0.0005, 0, -9.01, 0, -0.0005};
    double *vb = malloc((size_t)nx * ny * sizeof *vb);
    double want_on = 0;

    CHECK(g != NULL);
    if (g == NULL) {
        free(vb);
        return;
    }
    for (int r = 0; r < ny; r++)
        for (int c = 0; c < nx; c++)
            vb[r * nx + c] = r < 6 ? 255 : (c < 20 ? 1 : 0);
    /* Shift the raster south so that it spans -9.032..-9.052. */
    {
        double gt2[6];
        memcpy(gt2, gt_b, sizeof gt2);
        gt2[3] = -9.032;
        CHECK(make_tif(tpath("bar.tif"), nx, ny, gt2, "EPSG:4326", GDT_Byte, vb, 1, 255));
    }
    CHECK(grid_load_barriers(g, tpath("bar.tif"), &e) == ERR_OK);
    if (g->barrier != NULL) {
        int ok = 1;
        for (int r = 0; r < 4; r++)
            for (int c = 0; c < 6; c++) {
                ok &= g->barrier[r * 6 + c] == (c < 3);
                if (c < 3) want_on += g->people[r * 6 + c];
            }
        CHECK(ok);
        CHECK(want_on == 5 + 11);
        CHECK(g->people_on_barrier == want_on);
    }
    /* Nodata over the whole grid: nothing valid, an error naming the layer. */
    for (int i = 0; i < nx * ny; i++) vb[i] = 255;
    {
        double gt2[6];
        memcpy(gt2, gt_b, sizeof gt2);
        gt2[3] = -9.032;
        CHECK(make_tif(tpath("bar_nd.tif"), nx, ny, gt2, "EPSG:4326", GDT_Byte, vb, 1, 255));
    }
    CHECK(grid_load_barriers(g, tpath("bar_nd.tif"), &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "barrier raster");
    CHECK_STR_HAS(e.msg, "bar_nd.tif");
    CHECK(g->people_on_barrier == want_on);     /* the earlier layer stays */
    /* A barrier raster in the right place but the wrong CRS label misses the grid. */
    CHECK(make_tif(tpath("bar_utm.tif"), nx, ny, gt_b, "EPSG:32736", GDT_Byte, vb, 0, 0));
    CHECK(grid_load_barriers(g, tpath("bar_utm.tif"), &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "no valid cells over the population grid");
    free(vb);
    grid_free(g);
}

/* ---- the Burundi extract -------------------------------------------------------------- */

static void test_burundi(void)
{
    grid_t *g = NULL;
    err_t e = {0};
    size_t n;

    CHECK(grid_load(burundi_path(), &g, &e) == ERR_OK);
    if (g == NULL) {
        fprintf(stderr, "burundi: %s\n", e.msg);
        return;
    }
    n = (size_t)g->nx * g->ny;
    /* Figures from data/real/burundi/README.md: 740 x 1068 cells, 54.9 % valid, 31,316
     * cells above 0, sum 11,131,282 (rounded), pixel 249.93 x 249.92 m, max 23,256.45. */
    CHECK(g->nx == 740 && g->ny == 1068);
    CHECK_NEAR(100.0 * (double)(n - g->n_nodata) / n, 54.9, 0.05);
    CHECK(g->n_nan == 0);
    CHECK(g->n_populated == 31316);
    CHECK_NEAR(g->total_people, 11131282.0, 1.0);
    CHECK_NEAR(g->row_dx_m[0], 249.93, 0.005);
    CHECK_NEAR(g->row_dy_m[500], 249.92, 0.005);
    {
        double mx = 0;
        for (size_t i = 0; i < n; i++) mx = fmax(mx, g->people[i]);
        CHECK_NEAR(mx, 23256.45, 0.01);
    }
    CHECK(!g->geographic);
    CHECK_STR_HAS(g->crs_name, "Mollweide");
    /* Mollweide near 30E, 3S stretches north-south and squeezes east-west by about 10%
     * (pyproj get_factors there: meridional 1.11, parallel 0.90; the xcheck compares). */
    CHECK(g->scale_error > 0.09 && g->scale_error < 0.13);
    grid_free(g);
}

/* ---- modes for tests/xcheck/grid_burundi.sh ------------------------------------------ */

static int print_mode(int argc, char **argv)
{
    grid_t *g = NULL;
    err_t e = {0};
    int rc = 1;

    if (strcmp(argv[1], "--print-burundi-total") == 0) {
        if (grid_load(burundi_path(), &g, &e) != ERR_OK) goto fail;
        printf("total=%.17g nodata=%zu nan=%zu populated=%zu nx=%d ny=%d scale_error=%.9g\n",
               g->total_people, g->n_nodata, g->n_nan, g->n_populated, g->nx, g->ny,
               g->scale_error);
        rc = 0;
    } else if (strcmp(argv[1], "--print-rows") == 0 && argc == 3) {
        if (grid_load(argv[2], &g, &e) != ERR_OK) goto fail;
        for (int r = 0; r < g->ny; r++)
            printf("%d %.17g %.17g %.17g\n", r, g->row_dx_m[r], g->row_dy_m[r],
                   g->row_area_m2[r]);
        rc = 0;
    } else if (strcmp(argv[1], "--print-layer") == 0 && argc == 5) {
        int k;
        if (grid_load(argv[3], &g, &e) != ERR_OK) goto fail;
        if (strcmp(argv[2], "landcover") == 0) k = grid_load_landcover(g, argv[4], &e);
        else if (strcmp(argv[2], "elevation") == 0) k = grid_load_elevation(g, argv[4], &e);
        else k = grid_load_barriers(g, argv[4], &e);
        if (k != ERR_OK) goto fail;
        for (size_t i = 0; i < (size_t)g->nx * g->ny; i++) {
            if (g->landcover != NULL) printf("%ld\n", (long)g->landcover[i]);
            else if (g->elevation != NULL) printf("%.9g\n", (double)g->elevation[i]);
            else printf("%d\n", g->barrier[i]);
        }
        if (g->barrier != NULL) printf("people_on_barrier=%.17g\n", g->people_on_barrier);
        rc = 0;
    } else {
        fprintf(stderr, "test_grid: unknown mode %s\n", argv[1]);
    }
    grid_free(g);
    return rc;
fail:
    fprintf(stderr, "test_grid: %s\n", e.msg);
    grid_free(g);
    return 1;
}

int main(int argc, char **argv)
{
    GDALAllRegister();
    CPLSetErrorHandler(CPLQuietErrorHandler);
    if (argc > 1) {
        int rc = print_mode(argc, argv);
        GDALDestroyDriverManager();
        return rc;
    }
    snprintf(tmpdir, sizeof tmpdir, "/tmp/test_grid.XXXXXX");
    if (mkdtemp(tmpdir) == NULL) {
        perror("mkdtemp");
        return 1;
    }
    test_projected();
    test_feet_and_scale();
    test_geographic();
    test_south_up_and_world();
    test_blocks();
    test_mask();
    test_geodesic();
    test_failures();
    test_landcover();
    test_elevation();
    test_barriers();
    test_burundi();
    rm_tmpdir();
    GDALDestroyDriverManager();
    return CHECK_DONE("test_grid");
}
