/* output: atomic writers (see include/output.h). */
#include "output.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <gdal.h>
#include <gdal_alg.h>
#include <ogr_api.h>
#include <ogr_srs_api.h>
#include <cpl_error.h>
#include <cpl_string.h>
#include <openssl/evp.h>

int out_mkdir(const char *dir, err_t *e)
{
    char buf[4096];
    size_t n = strlen(dir);

    if (n == 0 || n >= sizeof buf) return err_set(e, ERR_IO, "bad output folder name '%s'", dir);
    memcpy(buf, dir, n + 1);
    for (size_t i = 1; i <= n; i++) {
        if (buf[i] == '/' || buf[i] == '\0') {
            char c = buf[i];
            buf[i] = '\0';
            if (mkdir(buf, 0777) != 0 && errno != EEXIST)
                return err_set(e, ERR_IO, "cannot create output folder '%s': %s; check the "
                               "permissions of the folder above it or choose another output "
                               "folder", buf, strerror(errno));
            buf[i] = c;
        }
    }
    {
        struct stat st;
        if (stat(dir, &st) != 0 || !S_ISDIR(st.st_mode))
            return err_set(e, ERR_IO, "output path '%s' exists and is not a folder", dir);
    }
    return ERR_OK;
}

int out_forget_run(const char *dir, err_t *e)
{
    static const char *const index_files[] = {"summary.json", "report.html"};

    for (size_t i = 0; i < sizeof index_files / sizeof index_files[0]; i++) {
        char *p = out_join(dir, index_files[i]);
        if (p == NULL) return err_set(e, ERR_NOMEM, "out of memory");
        if (unlink(p) != 0 && errno != ENOENT) {
            int err = errno;
            int rc = err_set(e, ERR_IO, "cannot remove the previous run's '%s' before writing "
                             "new outputs: %s; remove it or choose another output folder", p,
                             strerror(err));
            free(p);
            return rc;
        }
        free(p);
    }
    return ERR_OK;
}

char *out_join(const char *dir, const char *name)
{
    size_t a = strlen(dir), b = strlen(name);
    char *s = malloc(a + b + 2);
    if (s == NULL) return NULL;
    memcpy(s, dir, a);
    s[a] = '/';
    memcpy(s + a + 1, name, b + 1);
    return s;
}

char *out_tmp_name(const char *path)
{
    const char *slash = strrchr(path, '/');
    const char *base = slash ? slash + 1 : path;
    size_t dl = slash ? (size_t)(slash - path) + 1 : 0;
    size_t n = strlen(path) + 32;
    char *s = malloc(n);
    if (s == NULL) return NULL;
    /* ".NAME.tmp-PID.EXT" keeps the extension last. */
    {
        const char *dot = strrchr(base, '.');
        size_t stem = dot ? (size_t)(dot - base) : strlen(base);
        snprintf(s, n, "%.*s.%.*s.tmp%ld%s", (int)dl, path, (int)stem, base, (long)getpid(),
                 dot ? dot : "");
    }
    return s;
}

int out_rename(const char *tmp, const char *final, err_t *e)
{
    if (rename(tmp, final) != 0) {
        int er = errno;
        unlink(tmp);
        return err_set(e, ERR_IO, "cannot move finished output into place as '%s': %s", final,
                       strerror(er));
    }
    return ERR_OK;
}

int out_file_open(out_file_t *of, const char *path, err_t *e)
{
    of->f = NULL;
    of->final = strdup(path);
    of->tmp = out_tmp_name(path);
    if (of->final == NULL || of->tmp == NULL) {
        out_file_abort(of);
        return err_set(e, ERR_NOMEM, "out of memory opening '%s'", path);
    }
    of->f = fopen(of->tmp, "w");
    if (of->f == NULL) {
        int er = errno;
        out_file_abort(of);
        return err_set(e, ERR_IO, "cannot write '%s': %s; check the folder's permissions or "
                       "choose another output folder", path, strerror(er));
    }
    return ERR_OK;
}

int out_file_commit(out_file_t *of, err_t *e)
{
    int bad = ferror(of->f);
    int rc;

    bad |= fclose(of->f) != 0;
    of->f = NULL;
    if (bad) {
        rc = err_set(e, ERR_IO, "error while writing '%s' (disk full?)", of->final);
        out_file_abort(of);
        return rc;
    }
    rc = out_rename(of->tmp, of->final, e);
    free(of->tmp);
    free(of->final);
    of->tmp = of->final = NULL;
    return rc;
}

void out_file_abort(out_file_t *of)
{
    if (of == NULL) return;
    if (of->f != NULL) fclose(of->f);
    if (of->tmp != NULL) unlink(of->tmp);
    free(of->tmp);
    free(of->final);
    of->f = NULL;
    of->tmp = of->final = NULL;
}

int out_write_json(const char *path, const cJSON *j, err_t *e)
{
    out_file_t of;
    char *text = cJSON_Print(j);
    int rc;

    if (text == NULL) return err_set(e, ERR_NOMEM, "out of memory printing '%s'", path);
    rc = out_file_open(&of, path, e);
    if (rc == ERR_OK) {
        fputs(text, of.f);
        fputc('\n', of.f);
        rc = out_file_commit(&of, e);
    }
    cJSON_free(text);
    return rc;
}

static int write_tif(const char *path, const grid_t *g, GDALDataType type, const void *v,
                     double nodata, const char *description, err_t *e)
{
    GDALDriverH drv = GDALGetDriverByName("GTiff");
    GDALDatasetH ds = NULL;
    GDALRasterBandH b;
    char **opts = NULL;
    char *tmp = out_tmp_name(path);
    int rc = ERR_OK;

    if (tmp == NULL) return err_set(e, ERR_NOMEM, "out of memory writing '%s'", path);
    if (drv == NULL) {
        rc = err_set(e, ERR_INTERNAL, "GDAL has no GTiff driver");
        goto done;
    }
    opts = CSLSetNameValue(opts, "COMPRESS", "DEFLATE");
    opts = CSLSetNameValue(opts, "TILED", "YES");
    opts = CSLSetNameValue(opts, "BIGTIFF", "IF_SAFER");
    ds = GDALCreate(drv, tmp, g->nx, g->ny, 1, type, opts);
    if (ds == NULL) {
        rc = err_set(e, ERR_IO, "cannot create '%s': %s; check the folder's permissions or "
                     "choose another output folder", path, CPLGetLastErrorMsg());
        goto done;
    }
    GDALSetGeoTransform(ds, (double *)g->gt);
    GDALSetProjection(ds, g->wkt);
    b = GDALGetRasterBand(ds, 1);
    GDALSetRasterNoDataValue(b, nodata);
    if (description != NULL) GDALSetDescription(b, description);
    if (GDALRasterIO(b, GF_Write, 0, 0, g->nx, g->ny, (void *)v, g->nx, g->ny, type, 0, 0) !=
        CE_None) {
        rc = err_set(e, ERR_IO, "cannot write '%s': %s", path, CPLGetLastErrorMsg());
        goto done;
    }
    GDALClose(ds);
    ds = NULL;
    if (CPLGetLastErrorType() == CE_Failure) {
        rc = err_set(e, ERR_IO, "cannot finish '%s': %s", path, CPLGetLastErrorMsg());
        goto done;
    }
    rc = out_rename(tmp, path, e);
done:
    if (ds != NULL) GDALClose(ds);
    if (rc != ERR_OK) unlink(tmp);
    CSLDestroy(opts);
    free(tmp);
    return rc;
}

int out_write_tif_f32(const char *path, const grid_t *g, const float *v, float nodata,
                      const char *description, err_t *e)
{
    CPLErrorReset();
    return write_tif(path, g, GDT_Float32, v, nodata, description, e);
}

int out_write_tif_i32(const char *path, const grid_t *g, const int32_t *v, int32_t nodata,
                      const char *description, err_t *e)
{
    CPLErrorReset();
    return write_tif(path, g, GDT_Int32, v, nodata, description, e);
}

int out_sha256_file(const char *path, char hex[65], long long *size, err_t *e)
{
    unsigned char buf[1 << 16], md[EVP_MAX_MD_SIZE];
    unsigned int mdlen = 0;
    EVP_MD_CTX *ctx = NULL;
    FILE *f = fopen(path, "rb");
    long long total = 0;
    size_t n;
    int rc = ERR_OK;

    if (f == NULL) return err_set(e, ERR_IO, "cannot read '%s': %s", path, strerror(errno));
    ctx = EVP_MD_CTX_new();
    if (ctx == NULL || EVP_DigestInit_ex(ctx, EVP_sha256(), NULL) != 1) {
        rc = err_set(e, ERR_INTERNAL, "cannot start SHA-256 for '%s'", path);
        goto done;
    }
    while ((n = fread(buf, 1, sizeof buf, f)) > 0) {
        EVP_DigestUpdate(ctx, buf, n);
        total += (long long)n;
    }
    if (ferror(f)) {
        rc = err_set(e, ERR_IO, "error reading '%s'", path);
        goto done;
    }
    EVP_DigestFinal_ex(ctx, md, &mdlen);
    for (unsigned int i = 0; i < mdlen && i < 32; i++) snprintf(hex + 2 * i, 3, "%02x", md[i]);
    hex[64] = '\0';
    if (size != NULL) *size = total;
done:
    EVP_MD_CTX_free(ctx);
    fclose(f);
    return rc;
}

/* Create a GPKG file at tmp with one layer and the fields of 't'. */
static int gpkg_create(const char *tmp, const char *path, const char *layer, const char *wkt,
                       OGRwkbGeometryType gtype, const table_t *t, GDALDatasetH *ds_out,
                       OGRLayerH *lay_out, err_t *e)
{
    GDALDriverH drv = GDALGetDriverByName("GPKG");
    OGRSpatialReferenceH srs = NULL;
    GDALDatasetH ds;
    OGRLayerH lay;

    *ds_out = NULL;
    if (drv == NULL) return err_set(e, ERR_INTERNAL, "GDAL has no GPKG driver");
    unlink(tmp);
    ds = GDALCreate(drv, tmp, 0, 0, 0, GDT_Unknown, NULL);
    if (ds == NULL)
        return err_set(e, ERR_IO, "cannot create '%s': %s; check the folder's permissions or "
                       "choose another output folder", path, CPLGetLastErrorMsg());
    srs = OSRNewSpatialReference(wkt);
    lay = GDALDatasetCreateLayer(ds, layer, srs, gtype, NULL);
    OSRDestroySpatialReference(srs);
    if (lay == NULL) {
        GDALClose(ds);
        return err_set(e, ERR_IO, "cannot create layer '%s' in '%s': %s", layer, path,
                       CPLGetLastErrorMsg());
    }
    for (size_t c = 0; c < table_cols(t); c++) {
        int ty = table_col_type(t, c);
        OGRFieldDefnH fd = OGR_Fld_Create(table_col_name(t, c),
                                          ty == TABLE_TEXT ? OFTString
                                          : ty == TABLE_INT ? OFTInteger64 : OFTReal);
        OGRErr err = OGR_L_CreateField(lay, fd, TRUE);
        OGR_Fld_Destroy(fd);
        if (err != OGRERR_NONE) {
            GDALClose(ds);
            return err_set(e, ERR_IO, "cannot add field '%s' to '%s'", table_col_name(t, c), path);
        }
    }
    *ds_out = ds;
    *lay_out = lay;
    return ERR_OK;
}

static void set_fields(OGRFeatureH f, const table_t *t, size_t row)
{
    for (size_t c = 0; c < table_cols(t); c++) {
        double v = table_num(t, row, c);
        if (table_col_type(t, c) == TABLE_TEXT) OGR_F_SetFieldString(f, (int)c, table_text(t, row, c));
        else if (isnan(v)) OGR_F_SetFieldNull(f, (int)c);
        else if (table_col_type(t, c) == TABLE_INT) OGR_F_SetFieldInteger64(f, (int)c, (GIntBig)v);
        else OGR_F_SetFieldDouble(f, (int)c, v);
    }
}

/* Geometry of row i of a feature table; NULL = no feature for that row. The
 * writer takes ownership of what it returns. */
typedef OGRGeometryH (*geom_fn)(const void *ctx, size_t i);

/* One GeoPackage layer, a feature per table row with the geometry geom(ctx, i),
 * written in one transaction to a temporary name and renamed when complete. */
static int write_features(const char *path, const char *layer, const char *wkt,
                          OGRwkbGeometryType gtype, const table_t *t, geom_fn geom,
                          const void *ctx, err_t *e)
{
    GDALDatasetH ds = NULL;
    OGRLayerH lay = NULL;
    char *tmp = out_tmp_name(path);
    int rc;

    if (tmp == NULL) return err_set(e, ERR_NOMEM, "out of memory writing '%s'", path);
    CPLErrorReset();
    rc = gpkg_create(tmp, path, layer, wkt, gtype, t, &ds, &lay, e);
    if (rc != ERR_OK) goto done;
    if (OGR_L_StartTransaction(lay) != OGRERR_NONE) {
        rc = err_set(e, ERR_IO, "cannot start writing '%s'", path);
        goto done;
    }
    for (size_t i = 0; i < table_rows(t); i++) {
        OGRGeometryH g = geom(ctx, i);
        OGRFeatureH f;
        if (g == NULL) continue;
        f = OGR_F_Create(OGR_L_GetLayerDefn(lay));
        OGR_F_SetGeometryDirectly(f, g);
        set_fields(f, t, i);
        if (OGR_L_CreateFeature(lay, f) != OGRERR_NONE) {
            OGR_F_Destroy(f);
            rc = err_set(e, ERR_IO, "cannot write feature %zu to '%s': %s", i, path,
                         CPLGetLastErrorMsg());
            goto done;
        }
        OGR_F_Destroy(f);
    }
    if (OGR_L_CommitTransaction(lay) != OGRERR_NONE) {
        rc = err_set(e, ERR_IO, "cannot finish writing '%s': %s", path, CPLGetLastErrorMsg());
        goto done;
    }
    GDALClose(ds);
    ds = NULL;
    rc = out_rename(tmp, path, e);
done:
    if (ds != NULL) GDALClose(ds);
    if (rc != ERR_OK) unlink(tmp);
    free(tmp);
    return rc;
}

typedef struct coords {
    const double *x, *y;
    const size_t *start;   /* lines: points of line i are [start[i], start[i+1]) */
} coords_t;

static OGRGeometryH point_geom(const void *ctx, size_t i)
{
    const coords_t *c = ctx;
    OGRGeometryH pt = OGR_G_CreateGeometry(wkbPoint);
    OGR_G_SetPoint_2D(pt, 0, c->x[i], c->y[i]);
    return pt;
}

static OGRGeometryH line_geom(const void *ctx, size_t i)
{
    const coords_t *c = ctx;
    OGRGeometryH ln = OGR_G_CreateGeometry(wkbLineString);
    for (size_t k = c->start[i]; k < c->start[i + 1]; k++) OGR_G_AddPoint_2D(ln, c->x[k], c->y[k]);
    return ln;
}

int out_write_points_gpkg(const char *path, const char *layer, const char *wkt,
                          const double *x, const double *y, const table_t *t, err_t *e)
{
    coords_t c = {x, y, NULL};
    return write_features(path, layer, wkt, wkbPoint, t, point_geom, &c, e);
}

int out_write_lines_gpkg(const char *path, const char *layer, const char *wkt,
                         const double *x, const double *y, const size_t *start,
                         const table_t *t, err_t *e)
{
    coords_t c = {x, y, start};
    return write_features(path, layer, wkt, wkbLineString, t, line_geom, &c, e);
}

/* Polygons collected per label, handed over one by one. */
static OGRGeometryH take_part(const void *ctx, size_t i)
{
    OGRGeometryH *parts = *(OGRGeometryH *const *)ctx;
    OGRGeometryH g = parts[i];
    parts[i] = NULL;
    return g;
}

int out_write_label_polygons(const char *path, const char *layer, const grid_t *g,
                             const int32_t *label, const table_t *t, err_t *e)
{
    GDALDatasetH mem = NULL, vmem = NULL;
    OGRLayerH plays;
    OGRGeometryH *parts = NULL;
    size_t n_rows = table_rows(t);
    int rc = ERR_OK;

    CPLErrorReset();
    parts = calloc(n_rows ? n_rows : 1, sizeof *parts);
    if (parts == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory writing '%s'", path);
        goto done;
    }
    /* Labels into a MEM raster; -1 is nodata so it makes no polygon. */
    mem = GDALCreate(GDALGetDriverByName("MEM"), "", g->nx, g->ny, 1, GDT_Int32, NULL);
    vmem = GDALCreate(GDALGetDriverByName("Memory"), "", 0, 0, 0, GDT_Unknown, NULL);
    if (mem == NULL || vmem == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory polygonizing '%s'", path);
        goto done;
    }
    GDALSetGeoTransform(mem, (double *)g->gt);
    GDALSetProjection(mem, g->wkt);
    GDALSetRasterNoDataValue(GDALGetRasterBand(mem, 1), -1);
    if (GDALRasterIO(GDALGetRasterBand(mem, 1), GF_Write, 0, 0, g->nx, g->ny, (void *)label,
                     g->nx, g->ny, GDT_Int32, 0, 0) != CE_None) {
        rc = err_set(e, ERR_INTERNAL, "cannot fill label raster for '%s'", path);
        goto done;
    }
    plays = GDALDatasetCreateLayer(vmem, "p", NULL, wkbPolygon, NULL);
    {
        OGRFieldDefnH fd = OGR_Fld_Create("label", OFTInteger);
        OGR_L_CreateField(plays, fd, TRUE);
        OGR_Fld_Destroy(fd);
    }
    if (GDALPolygonize(GDALGetRasterBand(mem, 1), GDALGetMaskBand(GDALGetRasterBand(mem, 1)),
                       plays, 0, NULL, NULL, NULL) != CE_None) {
        rc = err_set(e, ERR_INTERNAL, "GDAL could not polygonize '%s': %s", path,
                     CPLGetLastErrorMsg());
        goto done;
    }
    /* Regions of one label are disjoint, so a multipolygon holds them all. */
    {
        OGRFeatureH f;
        OGR_L_ResetReading(plays);
        while ((f = OGR_L_GetNextFeature(plays)) != NULL) {
            int lab = OGR_F_GetFieldAsInteger(f, 0);
            if (lab >= 0 && (size_t)lab < n_rows) {
                if (parts[lab] == NULL) parts[lab] = OGR_G_CreateGeometry(wkbMultiPolygon);
                OGR_G_AddGeometry(parts[lab], OGR_F_GetGeometryRef(f));
            }
            OGR_F_Destroy(f);
        }
    }
    rc = write_features(path, layer, g->wkt, wkbMultiPolygon, t, take_part, &parts, e);
done:
    if (parts != NULL)
        for (size_t i = 0; i < n_rows; i++)
            if (parts[i] != NULL) OGR_G_DestroyGeometry(parts[i]);
    free(parts);
    if (mem != NULL) GDALClose(mem);
    if (vmem != NULL) GDALClose(vmem);
    return rc;
}
