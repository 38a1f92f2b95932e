/* Tests for the atomic writers and checksums. */
#define _GNU_SOURCE
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <gdal.h>
#include <ogr_api.h>

#include "check.h"
#include <ogr_srs_api.h>
#include <cpl_conv.h>

#include "output.h"

static int exists(const char *p)
{
    struct stat st;
    return stat(p, &st) == 0;
}

int main(void)
{
    char dir[] = "/tmp/sitereach-test-output-XXXXXX";
    err_t e = {0};
    char hex[65];
    long long size = 0;

    GDALAllRegister();
    CHECK(mkdtemp(dir) != NULL);

    /* Nested folder creation, then a text file that appears only on commit. */
    {
        char *sub = out_join(dir, "a/b");
        char *p = out_join(sub, "abc.txt");
        out_file_t of;
        CHECK(out_mkdir(sub, &e) == ERR_OK);
        CHECK(out_file_open(&of, p, &e) == ERR_OK);
        fputs("abc", of.f);
        fflush(of.f);
        CHECK(!exists(p));            /* not there until complete */
        CHECK(exists(of.tmp));
        CHECK(out_file_commit(&of, &e) == ERR_OK);
        CHECK(exists(p));
        /* FIPS 180-2, appendix B.1: SHA-256("abc"). */
        CHECK(out_sha256_file(p, hex, &size, &e) == ERR_OK);
        CHECK(strcmp(hex, "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad") == 0);
        CHECK(size == 3);
        unlink(p);
        free(p);
        free(sub);
    }
    /* Aborting leaves nothing behind. */
    {
        char *p = out_join(dir, "gone.csv");
        out_file_t of;
        char *tmp;
        CHECK(out_file_open(&of, p, &e) == ERR_OK);
        tmp = strdup(of.tmp);
        out_file_abort(&of);
        CHECK(!exists(p) && !exists(tmp));
        free(tmp);
        free(p);
    }
    /* Failures name the path. */
    CHECK(out_sha256_file("/nonexistent/x.tif", hex, &size, &e) == ERR_IO);
    CHECK_STR_HAS(e.msg, "/nonexistent/x.tif");
    {
        out_file_t of;
        CHECK(out_file_open(&of, "/nonexistent/dir/x.csv", &e) == ERR_IO);
        CHECK_STR_HAS(e.msg, "/nonexistent/dir/x.csv");
    }
    /* A GeoTIFF round trip keeps values, nodata, geotransform and CRS. */
    {
        grid_t g;
        float v[6] = {1.5f, 2.5f, -1, 4, 5, 6};
        char *p = out_join(dir, "t.tif");
        GDALDatasetH ds;
        double gt[6];
        float back[6];
        int ok;
        memset(&g, 0, sizeof g);
        g.nx = 3;
        g.ny = 2;
        g.gt[0] = 500000;
        g.gt[1] = 100;
        g.gt[3] = 9000000;
        g.gt[5] = -100;
        g.wkt = "PROJCS[\"WGS 84 / UTM zone 36S\",GEOGCS[\"WGS 84\",DATUM[\"WGS_1984\","
                "SPHEROID[\"WGS 84\",6378137,298.257223563]],PRIMEM[\"Greenwich\",0],"
                "UNIT[\"degree\",0.0174532925199433]],PROJECTION[\"Transverse_Mercator\"],"
                "PARAMETER[\"latitude_of_origin\",0],PARAMETER[\"central_meridian\",33],"
                "PARAMETER[\"scale_factor\",0.9996],PARAMETER[\"false_easting\",500000],"
                "PARAMETER[\"false_northing\",10000000],UNIT[\"metre\",1],"
                "AUTHORITY[\"EPSG\",\"32736\"]]";
        CHECK(out_write_tif_f32(p, &g, v, -1, "minutes", &e) == ERR_OK);
        ds = GDALOpen(p, GA_ReadOnly);
        CHECK(ds != NULL);
        if (ds != NULL) {
            GDALGetGeoTransform(ds, gt);
            CHECK_NEAR(gt[0], 500000, 0);
            CHECK_NEAR(gt[5], -100, 0);
            CHECK(strstr(GDALGetProjectionRef(ds), "32736") != NULL);
            CHECK_NEAR(GDALGetRasterNoDataValue(GDALGetRasterBand(ds, 1), &ok), -1, 0);
            CHECK(GDALRasterIO(GDALGetRasterBand(ds, 1), GF_Read, 0, 0, 3, 2, back, 3, 2,
                               GDT_Float32, 0, 0) == CE_None);
            CHECK(memcmp(back, v, sizeof v) == 0);
            GDALClose(ds);
        }
        unlink(p);
        free(p);
    }
    /* Tables: CSV quoting, empty cells for NaN; polygons and points in GeoPackage. */
    {
        static const char *names[] = {"id", "people", "note"};
        static const int types[] = {TABLE_TEXT, TABLE_INT, TABLE_TEXT};
        table_t *t = table_new(3, names, types);
        char *csv = out_join(dir, "t.csv"), *gp = out_join(dir, "c.gpkg"), *pp = out_join(dir, "p.gpkg");
        char line[256];
        FILE *f;
        grid_t g;
        int32_t lab[6] = {0, 0, 1, 0, 1, 1};
        double px[2] = {500050, 500250}, py[2] = {8999950, 8999850};
        GDALDatasetH ds;

        CHECK(t != NULL);
        CHECK(table_add_row(t) == 0);
        table_set_text(t, 0, 0, "A,1");
        table_set_num(t, 0, 1, 1200);
        table_set_text(t, 0, 2, "say \"hi\"");
        CHECK(table_add_row(t) == 1);
        table_set_text(t, 1, 0, "B");
        CHECK(table_write_csv(t, csv, 6, &e) == ERR_OK);
        /* table_save writes the same file into a folder by name. */
        CHECK(table_save(t, dir, "saved.csv", &e) == ERR_OK);
        {
            char *sp = out_join(dir, "saved.csv");
            CHECK(exists(sp));
            unlink(sp);
            free(sp);
        }
        CHECK(table_save(t, "/nonexistent/dir", "x.csv", &e) == ERR_IO);
        CHECK_STR_HAS(e.msg, "/nonexistent/dir/x.csv");
        f = fopen(csv, "r");
        CHECK(f != NULL);
        if (f) {
            CHECK(fgets(line, sizeof line, f) && strcmp(line, "id,people,note\n") == 0);
            CHECK(fgets(line, sizeof line, f) && strcmp(line, "\"A,1\",1200,\"say \"\"hi\"\"\"\n") == 0);
            CHECK(fgets(line, sizeof line, f) && strcmp(line, "B,,\n") == 0);
            fclose(f);
        }
        memset(&g, 0, sizeof g);
        g.nx = 3;
        g.ny = 2;
        g.gt[0] = 500000;
        g.gt[1] = 100;
        g.gt[3] = 9000000;
        g.gt[5] = -100;
        g.wkt = "EPSG:32736";
        {
            /* GDAL accepts a WKT; build one from the EPSG code. */
            OGRSpatialReferenceH sr = OSRNewSpatialReference(NULL);
            char *wkt = NULL;
            OSRImportFromEPSG(sr, 32736);
            OSRExportToWkt(sr, &wkt);
            g.wkt = wkt;
            CHECK(out_write_label_polygons(gp, "catchments", &g, lab, t, &e) == ERR_OK);
            CHECK(out_write_points_gpkg(pp, "sites", wkt, px, py, t, &e) == ERR_OK);
            CPLFree(wkt);
            OSRDestroySpatialReference(sr);
        }
        ds = GDALOpenEx(gp, GDAL_OF_VECTOR, NULL, NULL, NULL);
        CHECK(ds != NULL);
        if (ds) {
            OGRLayerH l = GDALDatasetGetLayerByName(ds, "catchments");
            OGRFeatureH ft;
            CHECK(l != NULL && OGR_L_GetFeatureCount(l, 1) == 2);
            /* Label 0 covers 3 cells of 100 m x 100 m = 30,000 m2 (worked by hand). */
            while (l && (ft = OGR_L_GetNextFeature(l)) != NULL) {
                if (strcmp(OGR_F_GetFieldAsString(ft, 0), "A,1") == 0)
                    CHECK_NEAR(OGR_G_Area(OGR_F_GetGeometryRef(ft)), 30000, 1e-6);
                OGR_F_Destroy(ft);
            }
            GDALClose(ds);
        }
        ds = GDALOpenEx(pp, GDAL_OF_VECTOR, NULL, NULL, NULL);
        CHECK(ds != NULL);
        if (ds) {
            CHECK(OGR_L_GetFeatureCount(GDALDatasetGetLayer(ds, 0), 1) == 2);
            GDALClose(ds);
        }
        unlink(csv);
        unlink(gp);
        unlink(pp);
        free(csv);
        free(gp);
        free(pp);
        table_free(t);
    }
    /* JSON. */
    {
        cJSON *j = cJSON_CreateObject();
        char *p = out_join(dir, "s.json");
        cJSON_AddNumberToObject(j, "people", 12.5);
        CHECK(out_write_json(p, j, &e) == ERR_OK);
        CHECK(exists(p));
        unlink(p);
        free(p);
        cJSON_Delete(j);
    }
    /* A folder that cannot be written: the message says what to do. A plain
     * file stands in for it (permissions do not stop root, who runs CI). */
    {
        char *plain = out_join(dir, "plain"), *sub = out_join(plain, "sub");
        char *p = out_join(plain, "x.csv");
        out_file_t of;
        FILE *f;
        if ((f = fopen(plain, "w")) != NULL) fclose(f);
        CHECK(out_file_open(&of, p, &e) == ERR_IO);
        CHECK_STR_HAS(e.msg, "x.csv");
        CHECK_STR_HAS(e.msg, "choose another output folder");
        CHECK(out_mkdir(sub, &e) == ERR_IO);
        CHECK_STR_HAS(e.msg, "plain/sub");
        CHECK_STR_HAS(e.msg, "choose another output folder");
        unlink(plain);
        free(plain);
        free(sub);
        free(p);
    }
    /* An earlier run's index goes before new outputs are written: summary.json
     * and report.html are removed, other files stay, absent ones are fine. */
    {
        char *s = out_join(dir, "summary.json"), *r = out_join(dir, "report.html");
        char *k = out_join(dir, "bands.csv");
        FILE *f;
        if ((f = fopen(s, "w")) != NULL) fclose(f);
        if ((f = fopen(k, "w")) != NULL) fclose(f);
        CHECK(exists(s) && exists(k) && !exists(r));
        CHECK(out_forget_run(dir, &e) == ERR_OK);
        CHECK(!exists(s) && !exists(r) && exists(k));
        CHECK(out_forget_run(dir, &e) == ERR_OK);
        /* One that cannot be removed (a folder in its place) is named. */
        CHECK(mkdir(r, 0700) == 0);
        CHECK(out_forget_run(dir, &e) == ERR_IO);
        CHECK_STR_HAS(e.msg, "report.html");
        CHECK_STR_HAS(e.msg, "choose another output folder");
        rmdir(r);
        unlink(k);
        free(s);
        free(r);
        free(k);
    }
    {
        char *a = out_join(dir, "a/b"), *b = out_join(dir, "a");
        rmdir(a);
        rmdir(b);
        free(a);
        free(b);
    }
    CHECK(rmdir(dir) == 0);
    return CHECK_DONE("test_output");
}
