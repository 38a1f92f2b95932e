/* districts: polygons burnt onto the grid (see include/districts.h). */
#include "districts.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gdal.h>
#include <gdal_alg.h>
#include <ogr_api.h>
#include <ogr_srs_api.h>
#include <cpl_error.h>
#include <cpl_string.h>

void districts_free(districts_t *d)
{
    if (d == NULL) return;
    for (size_t i = 0; i < d->n; i++) free(d->name[i]);
    free(d->name);
    free(d->cell);
    free(d);
}

int districts_load(const scen_layer_t *l, const grid_t *g, districts_t **out, err_t *e)
{
    GDALDatasetH src = NULL, mem = NULL;
    OGRLayerH lay;
    OGRFeatureDefnH defn;
    districts_t *d = NULL;
    char **opts = NULL;
    OGRSpatialReferenceH dst = NULL;
    OGRCoordinateTransformationH ct = NULL;
    int name_idx = -1, rc = ERR_OK;
    size_t cap = 0;

    *out = NULL;
    src = GDALOpenEx(l->path, GDAL_OF_VECTOR | GDAL_OF_READONLY, NULL, NULL, NULL);
    if (src == NULL) {
        rc = err_set(e, ERR_IO, "cannot open district layer '%s': %s", l->path,
                     CPLGetLastErrorMsg());
        goto done;
    }
    lay = l->layer ? GDALDatasetGetLayerByName(src, l->layer) : GDALDatasetGetLayer(src, 0);
    if (lay == NULL) {
        rc = err_set(e, ERR_INPUT, "district file '%s' has no layer '%s'", l->path,
                     l->layer ? l->layer : "(first)");
        goto done;
    }
    defn = OGR_L_GetLayerDefn(lay);
    {
        OGRwkbGeometryType t = wkbFlatten(OGR_FD_GetGeomType(defn));
        if (t != wkbPolygon && t != wkbMultiPolygon && t != wkbUnknown) {
            rc = err_set(e, ERR_INPUT, "district layer '%s' in '%s' has %s geometries; districts must be polygons",
                         OGR_L_GetName(lay), l->path, OGRGeometryTypeToName(t));
            goto done;
        }
    }
    if (l->name_field != NULL) {
        name_idx = OGR_FD_GetFieldIndex(defn, l->name_field);
        if (name_idx < 0) {
            rc = err_set(e, ERR_INPUT, "district layer '%s' in '%s' has no field '%s'",
                         OGR_L_GetName(lay), l->path, l->name_field);
            goto done;
        }
    }
    d = calloc(1, sizeof *d);
    if (d == NULL) goto nomem;
    d->cell = malloc((size_t)g->nx * (size_t)g->ny * sizeof *d->cell);
    if (d->cell == NULL) goto nomem;

    /* Burn district k + 1 (0 = outside) into an Int32 MEM raster on g's grid.
     * The rasterizer reprojects the polygons into the grid's CRS itself. */
    mem = GDALCreate(GDALGetDriverByName("MEM"), "", g->nx, g->ny, 1, GDT_Int32, NULL);
    if (mem == NULL) goto nomem;
    GDALSetGeoTransform(mem, (double *)g->gt);
    GDALSetProjection(mem, g->wkt);
    /* Polygons in another CRS are reprojected onto the grid, never rejected. */
    if (OGR_L_GetSpatialRef(lay) != NULL) {
        dst = OSRNewSpatialReference(g->wkt);
        OSRSetAxisMappingStrategy(dst, OAMS_TRADITIONAL_GIS_ORDER);
        if (!OSRIsSame(OGR_L_GetSpatialRef(lay), dst)) {
            ct = OCTNewCoordinateTransformation(OGR_L_GetSpatialRef(lay), dst);
            if (ct == NULL) {
                rc = err_set(e, ERR_INPUT, "cannot reproject district layer '%s' onto the grid's CRS: %s",
                             l->path, CPLGetLastErrorMsg());
                goto done;
            }
        }
    }
    OGR_L_ResetReading(lay);
    {
        OGRFeatureH f;
        while ((f = OGR_L_GetNextFeature(lay)) != NULL) {
            OGRGeometryH geom = OGR_F_GetGeometryRef(f);
            char buf[64];
            const char *nm;
            if (geom == NULL) {
                OGR_F_Destroy(f);
                continue;
            }
            if (d->n == cap) {
                size_t nc = cap ? cap * 2 : 16;
                char **nn = realloc(d->name, nc * sizeof *nn);
                if (nn == NULL) {
                    OGR_F_Destroy(f);
                    goto nomem;
                }
                d->name = nn;
                cap = nc;
            }
            snprintf(buf, sizeof buf, "%lld", (long long)OGR_F_GetFID(f));
            nm = name_idx >= 0 && OGR_F_IsFieldSetAndNotNull(f, name_idx)
                     ? OGR_F_GetFieldAsString(f, name_idx) : buf;
            d->name[d->n] = strdup(nm);
            if (d->name[d->n] == NULL) {
                OGR_F_Destroy(f);
                goto nomem;
            }
            {
                int band = 1;
                double burn = (double)(d->n + 1);
                OGRGeometryH gc = OGR_G_Clone(geom);
                CPLErr err;
                if (ct != NULL && OGR_G_Transform(gc, ct) != OGRERR_NONE) {
                    OGR_G_DestroyGeometry(gc);
                    rc = err_set(e, ERR_INPUT, "cannot reproject district '%s' from '%s'",
                                 d->name[d->n], l->path);
                    OGR_F_Destroy(f);
                    d->n++;
                    goto done;
                }
                err = GDALRasterizeGeometries(mem, 1, &band, 1, &gc, NULL, NULL, &burn,
                                                     opts, NULL, NULL);
                OGR_G_DestroyGeometry(gc);
                if (err != CE_None) {
                    rc = err_set(e, ERR_INPUT, "cannot burn district '%s' from '%s': %s",
                                 d->name[d->n], l->path, CPLGetLastErrorMsg());
                    OGR_F_Destroy(f);
                    d->n++;
                    goto done;
                }
            }
            d->n++;
            OGR_F_Destroy(f);
        }
    }
    if (GDALRasterIO(GDALGetRasterBand(mem, 1), GF_Read, 0, 0, g->nx, g->ny, d->cell, g->nx,
                     g->ny, GDT_Int32, 0, 0) != CE_None) {
        rc = err_set(e, ERR_INTERNAL, "cannot read burnt districts: %s", CPLGetLastErrorMsg());
        goto done;
    }
    for (size_t c = 0; c < (size_t)g->nx * (size_t)g->ny; c++) d->cell[c] -= 1;
    *out = d;
    d = NULL;
    goto done;
nomem:
    rc = err_set(e, ERR_NOMEM, "out of memory reading districts from '%s'", l->path);
done:
    CSLDestroy(opts);
    if (ct != NULL) OCTDestroyCoordinateTransformation(ct);
    if (dst != NULL) OSRDestroySpatialReference(dst);
    if (mem != NULL) GDALClose(mem);
    if (src != NULL) GDALClose(src);
    districts_free(d);
    return rc;
}
