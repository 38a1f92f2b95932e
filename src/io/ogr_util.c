/* ogr_util: OGR helpers shared by roads and points (see include/ogr_util.h).
 * Keeps GDAL's vector quirks in one place: VSI-aware existence checks for the
 * ERR_IO/ERR_INPUT split, OSM default layers and hstore tags, and the axis
 * order of coordinate transformations (always x = easting/longitude). */
/* VSIStatBufL is struct stat64 on glibc. */
#define _LARGEFILE64_SOURCE 1

#include "ogr_util.h"

#include <math.h>
#include <stdio.h>
#include <string.h>
#include <strings.h>

#include <cpl_conv.h>
#include <cpl_error.h>
#include <cpl_vsi.h>

int ogr_util_open(const char *path, const char *what, GDALDatasetH *out, err_t *e)
{
    VSIStatBufL st;

    *out = NULL;
    if (path == NULL || path[0] == '\0')
        return err_set(e, ERR_INPUT, "no %s file given", what);
    if (VSIStatL(path, &st) != 0)
        return err_set(e, ERR_IO, "cannot open %s file '%s': no such file", what, path);
    CPLErrorReset();
    *out = GDALOpenEx(path, GDAL_OF_VECTOR | GDAL_OF_READONLY, NULL, NULL, NULL);
    if (*out == NULL) {
        const char *m = CPLGetLastErrorMsg();
        return err_set(e, ERR_INPUT, "%s file '%s' is not vector data GDAL can read%s%s", what,
                       path, m[0] ? ": " : "", m);
    }
    return ERR_OK;
}

int ogr_util_is_osm(GDALDatasetH ds)
{
    GDALDriverH d = GDALGetDatasetDriver(ds);
    return d != NULL && strcmp(GDALGetDriverShortName(d), "OSM") == 0;
}

int ogr_util_layer(GDALDatasetH ds, const char *path, const char *name,
                   const char *osm_default, OGRLayerH *out, err_t *e)
{
    char list[400];
    size_t used = 0;
    int n = GDALDatasetGetLayerCount(ds);

    *out = NULL;
    if (name == NULL && osm_default != NULL && ogr_util_is_osm(ds)) name = osm_default;
    if (name != NULL) {
        *out = GDALDatasetGetLayerByName(ds, name);
    } else if (n > 0) {
        *out = GDALDatasetGetLayer(ds, 0);
    }
    if (*out != NULL) return ERR_OK;

    list[0] = '\0';
    for (int i = 0; i < n && used + 4 < sizeof list; i++) {
        const char *ln = OGR_L_GetName(GDALDatasetGetLayer(ds, i));
        int k = snprintf(list + used, sizeof list - used, "%s'%s'", i ? ", " : "", ln);
        if (k < 0 || (size_t)k >= sizeof list - used) {
            snprintf(list + (used < sizeof list - 4 ? used : sizeof list - 4), 4, "...");
            break;
        }
        used += (size_t)k;
    }
    if (name == NULL)
        return err_set(e, ERR_INPUT, "'%s' has no layers", path);
    return err_set(e, ERR_INPUT, "'%s' has no layer '%s'; layers present: %s", path, name,
                   n > 0 ? list : "(none)");
}

void ogr_util_field_list(OGRLayerH l, char *buf, size_t n)
{
    OGRFeatureDefnH fd = OGR_L_GetLayerDefn(l);
    int nf = OGR_FD_GetFieldCount(fd);
    size_t used = 0;

    if (n == 0) return;
    buf[0] = '\0';
    if (nf == 0) {
        snprintf(buf, n, "(none)");
        return;
    }
    for (int i = 0; i < nf; i++) {
        const char *fn = OGR_Fld_GetNameRef(OGR_FD_GetFieldDefn(fd, i));
        int k = snprintf(buf + used, n - used, "%s%s", i ? ", " : "", fn);
        if (k < 0 || (size_t)k >= n - used) {
            if (n >= 4) snprintf(buf + n - 4, 4, "...");
            return;
        }
        used += (size_t)k;
    }
}

int ogr_util_attr_init(ogr_util_attr_t *a, OGRLayerH l, const char *key)
{
    OGRFeatureDefnH fd = OGR_L_GetLayerDefn(l);

    a->key = key;
    a->field = key != NULL ? OGR_FD_GetFieldIndex(fd, key) : -1;
    a->tags = -1;
    if (a->field < 0 && key != NULL) a->tags = OGR_FD_GetFieldIndex(fd, "other_tags");
    return a->field >= 0 || a->tags >= 0;
}

void ogr_util_attr_get(const ogr_util_attr_t *a, OGRFeatureH f, char *buf, size_t n)
{
    if (n == 0) return;
    buf[0] = '\0';
    if (a->field >= 0) {
        if (OGR_F_IsFieldSetAndNotNull(f, a->field))
            snprintf(buf, n, "%s", OGR_F_GetFieldAsString(f, a->field));
    } else if (a->tags >= 0 && OGR_F_IsFieldSetAndNotNull(f, a->tags)) {
        ogr_util_hstore_get(OGR_F_GetFieldAsString(f, a->tags), a->key, buf, n);
    }
}

/* Read one double-quoted hstore token starting at *p (which points at the
 * opening quote), unescaping \" and \\; copies up to n-1 bytes into buf (may
 * be NULL). Leaves *p after the closing quote. Returns 0 on malformed text. */
static int hstore_token(const char **p, char *buf, size_t n)
{
    const char *s = *p;
    size_t k = 0;

    if (*s != '"') return 0;
    s++;
    while (*s && *s != '"') {
        if (*s == '\\' && s[1]) s++;
        if (buf != NULL && k + 1 < n) buf[k++] = *s;
        s++;
    }
    if (*s != '"') return 0;
    if (buf != NULL && n > 0) buf[k] = '\0';
    *p = s + 1;
    return 1;
}

int ogr_util_hstore_get(const char *tags, const char *key, char *buf, size_t n)
{
    const char *p = tags;
    char k[128];

    if (n > 0) buf[0] = '\0';
    if (tags == NULL || key == NULL) return 0;
    for (;;) {
        int match;
        while (*p == ' ' || *p == ',') p++;
        if (*p == '\0') return 0;
        if (!hstore_token(&p, k, sizeof k)) return 0;
        match = strcmp(k, key) == 0;
        while (*p == ' ') p++;
        if (strncmp(p, "=>", 2) != 0) return 0;
        p += 2;
        while (*p == ' ') p++;
        if (strncasecmp(p, "NULL", 4) == 0) {
            p += 4;
            if (match) return 0;
            continue;
        }
        if (!hstore_token(&p, match ? buf : NULL, n)) {
            if (n > 0) buf[0] = '\0';
            return 0;
        }
        if (match) return 1;
    }
}

/* Ellipsoid of 'srs': semi-major axis in metres and flattening (0 = sphere). */
static void srs_ellipsoid(OGRSpatialReferenceH srs, double *a, double *f)
{
    OGRErr err = OGRERR_NONE;
    double invf;

    *a = OSRGetSemiMajor(srs, &err);
    if (err != OGRERR_NONE || !(*a > 0)) *a = 6378137.0;   /* WGS84 */
    invf = OSRGetInvFlattening(srs, &err);
    *f = (err == OGRERR_NONE && invf > 0) ? 1.0 / invf : 0.0;
}

void ogr_util_crs_destroy(ogr_util_crs_t *c)
{
    if (c == NULL) return;
    if (c->ct != NULL) OCTDestroyCoordinateTransformation(c->ct);
    if (c->src != NULL) OSRDestroySpatialReference(c->src);
    if (c->dst != NULL) OSRDestroySpatialReference(c->dst);
    c->ct = NULL;
    c->src = c->dst = NULL;
}

int ogr_util_crs_init(ogr_util_crs_t *c, OGRLayerH l, const char *path,
                      const char *grid_wkt, err_t *e)
{
    OGRSpatialReferenceH lsrs = OGR_L_GetSpatialRef(l);
    int rc = ERR_OK;

    memset(c, 0, sizeof *c);
    /* GeoPackage writes layers without a CRS as "Undefined geographic SRS"
     * (srs_id 0) or "Undefined Cartesian SRS" (srs_id -1): no CRS either. */
    if (lsrs != NULL && OSRGetName(lsrs) != NULL &&
        strncmp(OSRGetName(lsrs), "Undefined ", 10) == 0)
        lsrs = NULL;
    if (grid_wkt == NULL || grid_wkt[0] == '\0') {
        rc = err_set(e, ERR_INPUT, "cannot place '%s' on the population grid: the grid has no CRS",
                     path);
        goto done;
    }
    c->dst = OSRNewSpatialReference(NULL);
    if (c->dst == NULL || OSRSetFromUserInput(c->dst, grid_wkt) != OGRERR_NONE) {
        rc = err_set(e, ERR_INPUT, "cannot place '%s' on the population grid: its CRS is not "
                     "understood by GDAL", path);
        goto done;
    }
    c->layer_has_crs = lsrs != NULL;
    c->src = lsrs != NULL ? OSRClone(lsrs) : OSRClone(c->dst);
    if (c->src == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory reading the CRS of '%s'", path);
        goto done;
    }
    OSRSetAxisMappingStrategy(c->src, OAMS_TRADITIONAL_GIS_ORDER);
    OSRSetAxisMappingStrategy(c->dst, OAMS_TRADITIONAL_GIS_ORDER);
    c->src_geographic = OSRIsGeographic(c->src) != 0;
    c->dst_geographic = OSRIsGeographic(c->dst) != 0;
    /* OSRGetAngularUnits gives radians per unit; OSRGetLinearUnits metres per unit. */
    c->src_deg_per_unit = OSRGetAngularUnits(c->src, NULL) * 180.0 / M_PI;
    c->dst_deg_per_unit = OSRGetAngularUnits(c->dst, NULL) * 180.0 / M_PI;
    c->src_m_per_unit = OSRGetLinearUnits(c->src, NULL);
    c->dst_m_per_unit = OSRGetLinearUnits(c->dst, NULL);
    if (!(c->src_deg_per_unit > 0)) c->src_deg_per_unit = 1.0;
    if (!(c->dst_deg_per_unit > 0)) c->dst_deg_per_unit = 1.0;
    if (!(c->src_m_per_unit > 0)) c->src_m_per_unit = 1.0;
    if (!(c->dst_m_per_unit > 0)) c->dst_m_per_unit = 1.0;
    srs_ellipsoid(c->src, &c->src_a, &c->src_f);
    srs_ellipsoid(c->dst, &c->dst_a, &c->dst_f);
    geod_init(&c->geod, c->src_a, c->src_f);

    if (!OSRIsSame(c->src, c->dst)) {
        CPLErrorReset();
        c->ct = OCTNewCoordinateTransformation(c->src, c->dst);
        if (c->ct == NULL) {
            const char *m = CPLGetLastErrorMsg();
            rc = err_set(e, ERR_INPUT, "cannot reproject '%s' onto the population grid's CRS%s%s",
                         path, m[0] ? ": " : "", m);
            goto done;
        }
    }
done:
    if (rc != ERR_OK) ogr_util_crs_destroy(c);
    return rc;
}

size_t ogr_util_crs_apply(const ogr_util_crs_t *c, size_t n, double *x, double *y)
{
    size_t bad = 0;

    if (c->ct == NULL || n == 0) return 0;
    /* Transform in chunks so the success flags live on the stack. */
    for (size_t off = 0; off < n; off += 256) {
        int ok[256];
        size_t m = n - off < 256 ? n - off : 256;
        if (!OCTTransformEx(c->ct, (int)m, x + off, y + off, NULL, ok)) {
            bad += m;
            continue;
        }
        for (size_t i = 0; i < m; i++)
            if (!ok[i] || !isfinite(x[off + i]) || !isfinite(y[off + i])) bad++;
    }
    return bad;
}

double ogr_util_crs_src_length(const ogr_util_crs_t *c, double x1, double y1,
                               double x2, double y2)
{
    if (c->src_geographic) {
        double s12 = 0.0, k = c->src_deg_per_unit;
        geod_inverse(&c->geod, y1 * k, x1 * k, y2 * k, x2 * k, &s12, NULL, NULL);
        return s12;
    }
    return hypot(x2 - x1, y2 - y1) * c->src_m_per_unit;
}
