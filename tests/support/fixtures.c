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

grid_t *fx_lattice(int nx, int ny, double cell)
{
    grid_t *g = calloc(1, sizeof *g);
    size_t rows = (size_t)(ny > 0 ? ny : 1), cells = (size_t)nx * (size_t)(ny > 0 ? ny : 0);

    if (g == NULL) exit(2);
    g->nx = nx;
    g->ny = ny;
    g->gt[1] = cell;
    g->gt[3] = ny * cell;
    g->gt[5] = -cell;
    g->row_dx_m = malloc(rows * sizeof(double));
    g->row_dy_m = malloc(rows * sizeof(double));
    g->row_area_m2 = malloc(rows * sizeof(double));
    g->people = calloc(cells ? cells : 1, sizeof(double));
    if (!g->row_dx_m || !g->row_dy_m || !g->row_area_m2 || !g->people) exit(2);
    for (int r = 0; r < ny; r++) {
        g->row_dx_m[r] = g->row_dy_m[r] = cell;
        g->row_area_m2[r] = cell * cell;
    }
    return g;
}

void fx_scen_init(scen_t *s)
{
    memset(s, 0, sizeof *s);
    s->neighbours = 8;
    s->walk_mps = 1.0;
    s->use_slope = 1;
    s->cover_default_factor = 1.0;
    s->mode = SCEN_MODE_WALK;
    s->direction = SCEN_TO_SITE;
    s->limit_s = 3600;
    s->n_bands = 2;
    s->bands_s[0] = 600;
    s->bands_s[1] = 3600;
}

roads_t *fx_roads(size_t n_nodes, size_t n_segs, size_t n_classes)
{
    roads_t *r = calloc(1, sizeof *r);
    if (r == NULL) exit(2);
    r->n_nodes = n_nodes;
    r->n_segs = n_segs;
    r->x = calloc(n_nodes ? n_nodes : 1, sizeof *r->x);
    r->y = calloc(n_nodes ? n_nodes : 1, sizeof *r->y);
    r->node_junction = calloc(n_nodes ? n_nodes : 1, 1);
    r->segs = calloc(n_segs ? n_segs : 1, sizeof *r->segs);
    r->n_classes = n_classes;
    r->classes = calloc(n_classes ? n_classes : 1, sizeof *r->classes);
    if (!r->x || !r->y || !r->node_junction || !r->segs || !r->classes) exit(2);
    return r;
}

