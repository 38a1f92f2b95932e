/* fixtures: shared test builders (see fixtures.h). */
#include "fixtures.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cpl_conv.h>
#include <gdal.h>
#include <ogr_srs_api.h>

grid_t *fx_grid(int nx, int ny, double x0, double y0, double cs, int epsg)
{
    grid_t *g = calloc(1, sizeof *g);
    OGRSpatialReferenceH srs = OSRNewSpatialReference(NULL);
    char *wkt = NULL;

    if (g == NULL || srs == NULL) exit(2);
    OSRImportFromEPSG(srs, epsg);
    OSRExportToWkt(srs, &wkt);
    g->wkt = strdup(wkt);
    CPLFree(wkt);
    g->geographic = OSRIsGeographic(srs);
    OSRDestroySpatialReference(srs);
    g->nx = nx;
    g->ny = ny;
    g->gt[0] = x0;
    g->gt[1] = cs;
    g->gt[3] = y0;
    g->gt[5] = -cs;
    g->people = calloc((size_t)nx * (size_t)ny, sizeof *g->people);
    if (g->wkt == NULL || g->people == NULL) exit(2);
    return g;
}

void fx_grid_free(grid_t *g)
{
    if (g == NULL) return;
    free(g->wkt);
    free(g->people);
    free(g->barrier);
    free(g);
}

void fx_write_layer(const char *path, const char *driver, const char *layer, int epsg,
                    OGRwkbGeometryType type, const char *const *fields, const fx_feat_t *fs,
                    size_t n)
{
    GDALDriverH drv = GDALGetDriverByName(driver);
    GDALDatasetH ds;
    OGRSpatialReferenceH srs = NULL;
    OGRLayerH l;
    int nf = 0;

    unlink(path);
    ds = drv ? GDALCreate(drv, path, 0, 0, 0, GDT_Unknown, NULL) : NULL;
    if (ds == NULL) {
        fprintf(stderr, "cannot create %s\n", path);
        exit(2);
    }
    if (epsg > 0) {
        srs = OSRNewSpatialReference(NULL);
        OSRImportFromEPSG(srs, epsg);
    }
    l = GDALDatasetCreateLayer(ds, layer, srs, type, NULL);
    for (; fields && fields[nf] && nf < FX_MAX_FIELDS; nf++) {
        OGRFieldDefnH fd = OGR_Fld_Create(fields[nf], OFTString);
        OGR_L_CreateField(l, fd, 1);
        OGR_Fld_Destroy(fd);
    }
    for (size_t i = 0; i < n; i++) {
        OGRFeatureH f = OGR_F_Create(OGR_L_GetLayerDefn(l));
        OGRGeometryH geom = NULL;
        char *w = (char *)fs[i].wkt;
        OGR_G_CreateFromWkt(&w, srs, &geom);
        OGR_F_SetGeometryDirectly(f, geom);
        for (int k = 0; k < nf; k++)
            if (fs[i].v[k] != NULL) OGR_F_SetFieldString(f, k, fs[i].v[k]);
        if (OGR_L_CreateFeature(l, f) != OGRERR_NONE) {
            fprintf(stderr, "cannot write feature %zu to %s\n", i, path);
            exit(2);
        }
        OGR_F_Destroy(f);
    }
    if (srs) OSRDestroySpatialReference(srs);
    GDALClose(ds);
}

const char *fx_path(const char *dir, const char *name)
{
    static char buf[8][512];
    static int k;
    k = (k + 1) % 8;
    snprintf(buf[k], sizeof buf[k], "%s/%s", dir, name);
    return buf[k];
}
