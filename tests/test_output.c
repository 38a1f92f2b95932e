/* Tests for the atomic writers and checksums. */
#define _GNU_SOURCE
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <gdal.h>

#include "check.h"
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
