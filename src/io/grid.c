/* grid: the population surface and optional layers on one grid (see include/grid.h).
 * Invariant: people[] holds finite, non-negative persons per cell and total_people is
 * their compensated sum, so later stages can check that no person is lost or made up.
 * Cell sizes are metres: planar (times the CRS linear unit) for projected grids, and
 * geodesic on the CRS's ellipsoid for geographic grids, per row because a cell's width
 * shrinks with latitude. Wraps GDAL raster I/O and warping, and PROJ's geodesic code;
 * GDAL messages are silenced here and copied into err_t instead. */
/* VSIStatBufL is struct stat64, which glibc declares only with this. */
#define _LARGEFILE64_SOURCE 1

#include "grid.h"

#include <float.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cpl_conv.h>
#include <cpl_error.h>
#include <cpl_string.h>
#include <cpl_vsi.h>
#include <gdal.h>
#include <gdal_utils.h>
#include <geodesic.h>
#include <ogr_srs_api.h>

/* WGS84 defining constants (NIMA TR8350.2): semi-major axis in metres, flattening. */
#define WGS84_A 6378137.0
#define WGS84_F (1.0 / 298.257223563)

/* Which optional layer is being read; decides resampling and value mapping. */
typedef enum { LAYER_LANDCOVER, LAYER_ELEVATION, LAYER_BARRIER } layer_kind_t;

static const char *const layer_names[] = {"land-cover raster", "elevation raster",
                                          "barrier raster"};

/* Neumaier's compensated sum: keeps the population total exact to about one unit in
 * the last place however many cells are added (plain summation of 10^7 cells can
 * drift by whole persons). */
typedef struct {
    double sum, comp;
} ksum_t;

static void ksum_add(ksum_t *k, double v)
{
    double t = k->sum + v;
    if (fabs(k->sum) >= fabs(v))
        k->comp += (k->sum - t) + v;
    else
        k->comp += (v - t) + k->sum;
    k->sum = t;
}

static double ksum_value(const ksum_t *k)
{
    return k->sum + k->comp;
}

/* Open 'path' read-only as a raster. 'what' names the layer in messages ("population
 * raster"). A missing file is ERR_IO; anything GDAL cannot read as a raster (text,
 * vector-only GeoJSON, a raster of zero size) is ERR_INPUT with GDAL's reason. */
static int open_raster(const char *path, const char *what, GDALDatasetH *out, err_t *e)
{
    VSIStatBufL st;
    VSILFILE *f;
    GDALDatasetH ds;
    char gdal_msg[256];

    *out = NULL;
    if (path == NULL || path[0] == '\0')
        return err_set(e, ERR_INPUT, "%s: no file name given", what);
    if (GDALGetDriverCount() == 0)
        return err_set(e, ERR_INTERNAL, "%s '%s': no GDAL drivers registered "
                       "(GDALAllRegister must run once at start-up)", what, path);
    CPLErrorReset();
    ds = GDALOpenEx(path, GDAL_OF_RASTER | GDAL_OF_READONLY, NULL, NULL, NULL);
    if (ds != NULL) {
        *out = ds;
        return ERR_OK;
    }
    snprintf(gdal_msg, sizeof gdal_msg, "%s", CPLGetLastErrorMsg());
    if (VSIStatL(path, &st) != 0)
        return err_set(e, ERR_IO, "%s '%s' not found (no such file); check the path", what,
                       path);
    if (VSI_ISDIR(st.st_mode))
        return err_set(e, ERR_INPUT, "%s '%s' is a folder, not a raster GDAL can read", what,
                       path);
    f = VSIFOpenL(path, "rb");
    if (f == NULL)
        return err_set(e, ERR_IO, "%s '%s' cannot be read (permission denied?)", what, path);
    VSIFCloseL(f);
    return err_set(e, ERR_INPUT, "%s '%s' is not a raster GDAL can read (GDAL: %s)", what,
                   path, gdal_msg[0] ? gdal_msg : "no driver recognised it");
}

/* Check what every raster we use needs: at least one band that is not complex, a CRS,
 * and a geotransform. 'north_up' also rejects rotation terms (the population grid
 * defines cell geometry; other layers are warped, which copes with rotation). On
 * success *srs is a clone the caller releases with OSRDestroySpatialReference. */
static int check_raster(GDALDatasetH ds, const char *path, const char *what, int north_up,
                        double gt[6], OGRSpatialReferenceH *srs, err_t *e)
{
    OGRSpatialReferenceH s;
    GDALRasterBandH band;
    char **subs;

    *srs = NULL;
    if (GDALGetRasterXSize(ds) < 1 || GDALGetRasterYSize(ds) < 1)
        return err_set(e, ERR_INPUT, "%s '%s' has zero size (%d x %d cells)", what, path,
                       GDALGetRasterXSize(ds), GDALGetRasterYSize(ds));
    if (GDALGetRasterCount(ds) < 1) {
        /* netCDF/HDF files with several variables open as containers of subdatasets. */
        subs = GDALGetMetadata(ds, "SUBDATASETS");
        if (CSLCount(subs) > 0)
            return err_set(e, ERR_INPUT, "%s '%s' has no bands; it holds %d subdatasets, "
                           "name one instead, e.g. %s", what, path, CSLCount(subs) / 2,
                           CPLParseNameValue(subs[0], NULL));
        return err_set(e, ERR_INPUT, "%s '%s' has no bands", what, path);
    }
    band = GDALGetRasterBand(ds, 1);
    if (GDALDataTypeIsComplex(GDALGetRasterDataType(band)))
        return err_set(e, ERR_INPUT, "%s '%s': band 1 holds complex numbers (%s), not "
                       "real values", what, path,
                       GDALGetDataTypeName(GDALGetRasterDataType(band)));
    s = GDALGetSpatialRef(ds);
    if (s == NULL)
        return err_set(e, ERR_INPUT, "%s '%s' has no coordinate reference system; assign "
                       "one with gdal_edit.py -a_srs", what, path);
    if (GDALGetGeoTransform(ds, gt) != CE_None)
        return err_set(e, ERR_INPUT, "%s '%s' has no geotransform (cell size and origin); "
                       "assign one with gdal_edit.py -a_ullr", what, path);
    for (int i = 0; i < 6; i++)
        if (!isfinite(gt[i]))
            return err_set(e, ERR_INPUT, "%s '%s' has a geotransform that is not finite",
                           what, path);
    if (north_up && (gt[2] != 0.0 || gt[4] != 0.0))
        return err_set(e, ERR_INPUT, "%s '%s' is rotated (geotransform rotation terms %g "
                       "and %g); make it north-up with gdalwarp", what, path, gt[2], gt[4]);
    if ((north_up && (gt[1] == 0.0 || gt[5] == 0.0)) ||
        gt[1] * gt[5] - gt[2] * gt[4] == 0.0)
        return err_set(e, ERR_INPUT, "%s '%s' has a zero cell size in its geotransform",
                       what, path);
    *srs = OSRClone(s);
    if (*srs == NULL)
        return err_set(e, ERR_NOMEM, "%s '%s': out of memory copying its CRS", what, path);
    return ERR_OK;
}

/* Cell sizes for a projected (or local) grid: the geotransform steps times the CRS
 * linear unit, the same for every row. */
static int sizes_planar(grid_t *g, OGRSpatialReferenceH srs, const char *path, err_t *e)
{
    double unit = OSRGetLinearUnits(srs, NULL);   /* metres per CRS unit */
    double dx, dy;

    if (!(unit > 0.0) || !isfinite(unit))
        return err_set(e, ERR_INPUT, "population raster '%s': its CRS has no usable linear "
                       "unit", path);
    dx = fabs(g->gt[1]) * unit;
    dy = fabs(g->gt[5]) * unit;
    for (int r = 0; r < g->ny; r++) {
        g->row_dx_m[r] = dx;
        g->row_dy_m[r] = dy;
        g->row_area_m2[r] = dx * dy;
    }
    return ERR_OK;
}

/* Cell sizes for a geographic grid, per row, on the CRS's ellipsoid: width = geodesic
 * between the left and right edges of one cell at the row's centre latitude, height =
 * geodesic between its top and bottom edges along a meridian, area = geodesic polygon
 * of the cell's four corners (the polygon's edges are geodesics, not parallels; for
 * cells under 1 degree the difference is below 3e-5 of the area). */
static int sizes_geodesic(grid_t *g, OGRSpatialReferenceH srs, const char *path, err_t *e)
{
    struct geod_geodesic geod;
    OGRErr oe_a = OGRERR_NONE, oe_f = OGRERR_NONE;
    double a = OSRGetSemiMajor(srs, &oe_a);
    double invf = OSRGetInvFlattening(srs, &oe_f);
    /* Degrees per CRS unit: GDAL gives radians per unit (0.01745... for degrees). */
    double dpu = OSRGetAngularUnits(srs, NULL) * 180.0 / M_PI;
    double lon0, dlon, lonc;

    if (oe_a != OGRERR_NONE || oe_f != OGRERR_NONE || !(a > 0.0) || !(invf >= 0.0)) {
        a = WGS84_A;
        invf = 1.0 / WGS84_F;
    }
    if (!(dpu > 0.0) || !isfinite(dpu))
        return err_set(e, ERR_INPUT, "population raster '%s': its geographic CRS has no "
                       "usable angular unit", path);
    if (fabs(dpu - 1.0) < 1e-12) dpu = 1.0;
    geod_init(&geod, a, invf > 0.0 ? 1.0 / invf : 0.0);
    lon0 = g->gt[0] * dpu;
    dlon = g->gt[1] * dpu;
    lonc = lon0 + 0.5 * dlon;
    if (fabs(dlon) > 180.0 || fabs(g->gt[5] * dpu) > 180.0)
        return err_set(e, ERR_INPUT, "population raster '%s': cells of %g x %g degrees are "
                       "not a usable geographic grid", path, fabs(dlon), fabs(g->gt[5] * dpu));
    for (int r = 0; r < g->ny; r++) {
        double lat_a = (g->gt[3] + r * g->gt[5]) * dpu;
        double lat_b = (g->gt[3] + (r + 1) * g->gt[5]) * dpu;
        double lat_c, s12, area, lats[4], lons[4];

        /* Allow rounding noise at the poles, nothing more. */
        if (fabs(lat_a) > 90.0 + 1e-9 || fabs(lat_b) > 90.0 + 1e-9)
            return err_set(e, ERR_INPUT, "population raster '%s': row %d reaches latitude "
                           "%g, beyond +-90 degrees; is the CRS right?", path, r,
                           fabs(lat_a) > fabs(lat_b) ? lat_a : lat_b);
        lat_a = fmax(-90.0, fmin(90.0, lat_a));
        lat_b = fmax(-90.0, fmin(90.0, lat_b));
        lat_c = 0.5 * (lat_a + lat_b);
        geod_inverse(&geod, lat_c, lon0, lat_c, lon0 + dlon, &s12, NULL, NULL);
        g->row_dx_m[r] = s12;
        geod_inverse(&geod, lat_a, lonc, lat_b, lonc, &s12, NULL, NULL);
        g->row_dy_m[r] = s12;
        lats[0] = lat_a; lons[0] = lon0;
        lats[1] = lat_a; lons[1] = lon0 + dlon;
        lats[2] = lat_b; lons[2] = lon0 + dlon;
        lats[3] = lat_b; lons[3] = lon0;
        geod_polygonarea(&geod, lats, lons, 4, &area, NULL);
        g->row_area_m2[r] = fabs(area);
    }
    return ERR_OK;
}

/* For projected grids, sample how far planar cell sizes are from ground distances:
 * at 5 x 5 points over the grid, project the ends of a one-cell step east and north
 * back to lon/lat and compare the geodesic length with the planar one. Equal-area
 * world projections (Mollweide) stretch cells by 10% or more far from their central
 * meridian, which travel times would inherit. Returns NAN when no sample point could
 * be taken back to lon/lat. */
static double measure_scale_error(const grid_t *g, OGRSpatialReferenceH srs)
{
    OGRSpatialReferenceH geo = NULL;
    OGRCoordinateTransformationH ct = NULL;
    struct geod_geodesic geod;
    double unit = OSRGetLinearUnits(srs, NULL), worst = 0.0;
    int n_ok = 0;

    geo = OSRCloneGeogCS(srs);
    if (geo == NULL) return NAN;
    OSRSetAxisMappingStrategy(geo, OAMS_TRADITIONAL_GIS_ORDER);
    ct = OCTNewCoordinateTransformation(srs, geo);
    if (ct == NULL) {
        OSRDestroySpatialReference(geo);
        return NAN;
    }
    {
        OGRErr oe_a = OGRERR_NONE, oe_f = OGRERR_NONE;
        double a = OSRGetSemiMajor(srs, &oe_a), invf = OSRGetInvFlattening(srs, &oe_f);
        if (oe_a != OGRERR_NONE || oe_f != OGRERR_NONE || !(a > 0.0) || !(invf >= 0.0)) {
            a = WGS84_A;
            invf = 1.0 / WGS84_F;
        }
        geod_init(&geod, a, invf > 0.0 ? 1.0 / invf : 0.0);
    }
    for (int i = 0; i < 5; i++) {
        for (int j = 0; j < 5; j++) {
            double fx = g->nx * (0.5 + i) / 5.0, fy = g->ny * (0.5 + j) / 5.0;
            double x0 = g->gt[0] + fx * g->gt[1], y0 = g->gt[3] + fy * g->gt[5];
            double xs[3] = {x0, x0 + g->gt[1], x0}, ys[3] = {y0, y0, y0 + g->gt[5]};
            int ok[3] = {0, 0, 0};
            double sx, sy;

            /* Points off the projection's domain (corners of a world Mollweide grid)
             * are skipped, not fatal. */
            if (!OCTTransformEx(ct, 3, xs, ys, NULL, ok) || !ok[0] || !ok[1] || !ok[2])
                continue;
            geod_inverse(&geod, ys[0], xs[0], ys[1], xs[1], &sx, NULL, NULL);
            geod_inverse(&geod, ys[0], xs[0], ys[2], xs[2], &sy, NULL, NULL);
            if (!(sx > 0.0) || !(sy > 0.0)) continue;
            n_ok++;
            worst = fmax(worst, fabs(fabs(g->gt[1]) * unit / sx - 1.0));
            worst = fmax(worst, fabs(fabs(g->gt[5]) * unit / sy - 1.0));
        }
    }
    OCTDestroyCoordinateTransformation(ct);
    OSRDestroySpatialReference(geo);
    return n_ok > 0 ? worst : NAN;
}

/* Does v equal the band's nodata value? Float32 bands store nodata rounded to float,
 * so compare against that rounding too. A NaN nodata value matches NaN cells. */
static int is_nodata(double v, int has_nd, double nd, GDALDataType dt)
{
    if (!has_nd) return 0;
    if (isnan(nd)) return isnan(v);
    if (v == nd) return 1;
    return dt == GDT_Float32 && fabs(nd) <= FLT_MAX && v == (double)(float)nd;
}

/* Read band 1 into g->people in chunks of whole block rows (reads go straight into the
 * output array; the only extra memory is one chunk of mask bytes when the band has a
 * real mask), turning nodata and NaN into 0 people and counting them. */
static int read_people(grid_t *g, GDALDatasetH ds, const char *path, err_t *e)
{
    GDALRasterBandH band = GDALGetRasterBand(ds, 1), mband = NULL;
    GDALDataType dt = GDALGetRasterDataType(band);
    int has_nd = 0, has_scale = 0, has_off = 0, bx = 0, by = 0, chunk;
    double nd = GDALGetRasterNoDataValue(band, &has_nd);
    double scale = GDALGetRasterScale(band, &has_scale);
    double offset = GDALGetRasterOffset(band, &has_off);
    int mflags = GDALGetMaskFlags(band);
    unsigned char *mask = NULL;
    size_t n_neg = 0, n_inf = 0;
    int neg_c = -1, neg_r = -1, inf_c = -1, inf_r = -1;
    double neg_v = 0.0;
    ksum_t tot = {0.0, 0.0};
    int rc = ERR_OK;

    if (!has_scale) scale = 1.0;
    if (!has_off) offset = 0.0;
    GDALGetBlockSize(band, &bx, &by);
    /* At least 64 rows per read keeps the call count low for strip-per-row files. */
    chunk = by < 1 ? 64 : (by < 64 ? (64 / by) * by : by);
    if (chunk > g->ny) chunk = g->ny;
    /* A real mask (alpha band or .msk), as opposed to "all valid" or "from nodata". */
    if (!(mflags & (GMF_ALL_VALID | GMF_NODATA))) {
        mband = GDALGetMaskBand(band);
        mask = malloc((size_t)g->nx * (size_t)chunk);
        if (mask == NULL) {
            rc = err_set(e, ERR_NOMEM, "population raster '%s': out of memory for its mask",
                         path);
            goto done;
        }
    }
    for (int r0 = 0; r0 < g->ny; r0 += chunk) {
        int nr = g->ny - r0 < chunk ? g->ny - r0 : chunk;
        double *row = g->people + (size_t)r0 * (size_t)g->nx;

        CPLErrorReset();
        if (GDALRasterIO(band, GF_Read, 0, r0, g->nx, nr, row, g->nx, nr, GDT_Float64, 0, 0)
            != CE_None) {
            rc = err_set(e, ERR_IO, "population raster '%s': cannot read rows %d-%d: %s", path,
                         r0, r0 + nr - 1, CPLGetLastErrorMsg());
            goto done;
        }
        if (mband != NULL &&
            GDALRasterIO(mband, GF_Read, 0, r0, g->nx, nr, mask, g->nx, nr, GDT_Byte, 0, 0)
            != CE_None) {
            rc = err_set(e, ERR_IO, "population raster '%s': cannot read its mask at rows "
                         "%d-%d: %s", path, r0, r0 + nr - 1, CPLGetLastErrorMsg());
            goto done;
        }
        /* Rows are read once: drop their blocks from GDAL's cache (up to 5% of RAM by
         * default) so peak memory stays near the output array. */
        GDALFlushRasterCache(band);
        if (mband != NULL) GDALFlushRasterCache(mband);
        for (size_t i = 0; i < (size_t)nr * (size_t)g->nx; i++) {
            double v = row[i];
            int c = (int)(i % (size_t)g->nx), r = r0 + (int)(i / (size_t)g->nx);

            if (is_nodata(v, has_nd, nd, dt) || (mask != NULL && mask[i] == 0)) {
                g->n_nodata++;
                row[i] = 0.0;
                continue;
            }
            if (isnan(v)) {
                g->n_nan++;
                row[i] = 0.0;
                continue;
            }
            v = v * scale + offset;
            if (v < 0.0) {
                if (n_neg++ == 0) {
                    neg_c = c;
                    neg_r = r;
                    neg_v = v;
                }
                v = 0.0;
            } else if (!isfinite(v)) {
                if (n_inf++ == 0) {
                    inf_c = c;
                    inf_r = r;
                }
                v = 0.0;
            }
            row[i] = v;
            if (v > 0.0) g->n_populated++;
            ksum_add(&tot, v);
        }
    }
    if (n_neg > 0) {
        rc = err_set(e, ERR_INPUT, "population raster '%s' has %zu negative cell%s; the "
                     "first is (col %d, row %d) = %g; people per cell must be >= 0 (set "
                     "a nodata value if these mark missing data)", path, n_neg,
                     n_neg == 1 ? "" : "s", neg_c, neg_r, neg_v);
        goto done;
    }
    if (n_inf > 0) {
        rc = err_set(e, ERR_INPUT, "population raster '%s' has %zu infinite cell%s; the "
                     "first is (col %d, row %d)", path, n_inf, n_inf == 1 ? "" : "s", inf_c,
                     inf_r);
        goto done;
    }
    g->total_people = ksum_value(&tot);
done:
    free(mask);
    return rc;
}

/* Read the population raster at 'path' (band 1, persons per cell) into a new grid.
 * Nodata, masked and NaN cells hold 0 people and are counted. Returns ERR_OK with
 * *out owned by the caller (free with grid_free); on error *out is NULL and 'e' names
 * the file: ERR_IO missing or unreadable, ERR_INPUT not a raster, no bands, no CRS,
 * no or rotated geotransform, latitudes beyond the poles, negative or infinite values;
 * ERR_NOMEM when the arrays do not fit. */
int grid_load(const char *path, grid_t **out, err_t *e)
{
    const char *what = "population raster";
    GDALDatasetH ds = NULL;
    OGRSpatialReferenceH srs = NULL;
    grid_t *g = NULL;
    char *wkt = NULL;
    size_t ncell;
    int rc;

    *out = NULL;
    CPLPushErrorHandler(CPLQuietErrorHandler);
    rc = open_raster(path, what, &ds, e);
    if (rc != ERR_OK) goto done;
    g = calloc(1, sizeof *g);
    if (g == NULL) {
        rc = err_set(e, ERR_NOMEM, "%s '%s': out of memory", what, path);
        goto done;
    }
    rc = check_raster(ds, path, what, 1, g->gt, &srs, e);
    if (rc != ERR_OK) goto done;
    g->nx = GDALGetRasterXSize(ds);
    g->ny = GDALGetRasterYSize(ds);
    ncell = (size_t)g->nx * (size_t)g->ny;
    if (ncell / (size_t)g->nx != (size_t)g->ny || ncell > SIZE_MAX / sizeof(double)) {
        rc = err_set(e, ERR_NOMEM, "%s '%s': %d x %d cells is too large to address", what,
                     path, g->nx, g->ny);
        goto done;
    }
    if (OSRExportToWkt(srs, &wkt) != OGRERR_NONE || wkt == NULL || wkt[0] == '\0') {
        rc = err_set(e, ERR_INPUT, "%s '%s' has no coordinate reference system; assign one "
                     "with gdal_edit.py -a_srs", what, path);
        goto done;
    }
    g->wkt = strdup(wkt);
    g->crs_name = strdup(OSRGetName(srs) ? OSRGetName(srs) : "unnamed CRS");
    g->people = malloc(ncell * sizeof *g->people);
    g->row_dx_m = malloc((size_t)g->ny * sizeof *g->row_dx_m);
    g->row_dy_m = malloc((size_t)g->ny * sizeof *g->row_dy_m);
    g->row_area_m2 = malloc((size_t)g->ny * sizeof *g->row_area_m2);
    if (!g->wkt || !g->crs_name || !g->people || !g->row_dx_m || !g->row_dy_m ||
        !g->row_area_m2) {
        rc = err_set(e, ERR_NOMEM, "%s '%s': out of memory for %d x %d cells (%.0f MB)", what,
                     path, g->nx, g->ny, ncell * 8.0 / 1e6);
        goto done;
    }
    g->geographic = OSRIsGeographic(srs) ? 1 : 0;
    if (g->geographic) {
        rc = sizes_geodesic(g, srs, path, e);
        g->scale_error = 0.0;
    } else if (OSRIsProjected(srs) || OSRIsLocal(srs)) {
        rc = sizes_planar(g, srs, path, e);
        g->scale_error = OSRIsProjected(srs) ? measure_scale_error(g, srs) : NAN;
    } else {
        rc = err_set(e, ERR_INPUT, "%s '%s': CRS '%s' is neither geographic nor projected; "
                     "reproject it with gdalwarp -t_srs", what, path, g->crs_name);
    }
    if (rc != ERR_OK) goto done;
    g->min_dx_m = g->max_dx_m = g->row_dx_m[0];
    g->min_dy_m = g->max_dy_m = g->row_dy_m[0];
    for (int r = 1; r < g->ny; r++) {
        g->min_dx_m = fmin(g->min_dx_m, g->row_dx_m[r]);
        g->max_dx_m = fmax(g->max_dx_m, g->row_dx_m[r]);
        g->min_dy_m = fmin(g->min_dy_m, g->row_dy_m[r]);
        g->max_dy_m = fmax(g->max_dy_m, g->row_dy_m[r]);
    }
    rc = read_people(g, ds, path, e);
    if (rc != ERR_OK) goto done;
    *out = g;
    g = NULL;
done:
    CPLPopErrorHandler();
    CPLFree(wkt);
    if (srs != NULL) OSRDestroySpatialReference(srs);
    if (ds != NULL) GDALClose(ds);
    grid_free(g);
    return rc;
}

/* Same grid as g: size, geotransform (to a millionth of a cell) and CRS. */
static int same_grid(const grid_t *g, GDALDatasetH ds, const double gt[6],
                     OGRSpatialReferenceH srs)
{
    OGRSpatialReferenceH gs;
    double cell = fmin(fabs(g->gt[1]), fabs(g->gt[5]));
    int same;

    if (GDALGetRasterXSize(ds) != g->nx || GDALGetRasterYSize(ds) != g->ny) return 0;
    for (int i = 0; i < 6; i++) {
        /* Origins may drift by a millionth of a cell, steps by a billionth. */
        double tol = (i == 0 || i == 3) ? 1e-6 * cell : 1e-9 * cell;
        if (fabs(gt[i] - g->gt[i]) > tol) return 0;
    }
    gs = OSRNewSpatialReference(g->wkt);
    if (gs == NULL) return 0;
    same = OSRIsSame(gs, srs) ? 1 : 0;
    OSRDestroySpatialReference(gs);
    return same;
}

/* Resample band 1 of 'ds' onto g's grid with GDAL's warper into a Float64 MEM dataset
 * whose nodata is NaN (cells outside the layer or on its nodata stay NaN). Nearest
 * neighbour for classes and masks, bilinear for elevation; no overviews, so results do
 * not depend on pyramids present beside the file. Caller closes *out. */
static int warp_onto(const grid_t *g, GDALDatasetH ds, layer_kind_t kind, const char *path,
                     GDALDatasetH *out, err_t *e)
{
    const char *what = layer_names[kind];
    GDALDriverH mem = GDALGetDriverByName("MEM");
    GDALDatasetH dst = NULL, res, band1 = NULL, src = ds;
    GDALWarpAppOptions *wo = NULL;
    char **argv = NULL;
    double gt[6];
    int usage = 0, rc = ERR_OK;

    *out = NULL;
    if (mem == NULL) {
        rc = err_set(e, ERR_INTERNAL, "%s '%s': GDAL's MEM driver is missing", what, path);
        goto done;
    }
    dst = GDALCreate(mem, "", g->nx, g->ny, 1, GDT_Float64, NULL);
    if (dst == NULL) {
        rc = err_set(e, ERR_NOMEM, "%s '%s': cannot make a %d x %d resampling buffer: %s",
                     what, path, g->nx, g->ny, CPLGetLastErrorMsg());
        goto done;
    }
    memcpy(gt, g->gt, sizeof gt);
    GDALSetGeoTransform(dst, gt);
    GDALSetProjection(dst, g->wkt);
    GDALSetRasterNoDataValue(GDALGetRasterBand(dst, 1), NAN);
    /* The warper skips a destination it does not overlap, leaving MEM's zeros: start
     * from all-nodata so "not covered" never reads as class 0 or "no barrier". */
    GDALFillRaster(GDALGetRasterBand(dst, 1), NAN, 0);
    argv = CSLAddString(argv, "-r");
    argv = CSLAddString(argv, kind == LAYER_ELEVATION ? "bilinear" : "near");
    argv = CSLAddString(argv, "-ovr");
    argv = CSLAddString(argv, "NONE");
    argv = CSLAddString(argv, "-dstnodata");
    argv = CSLAddString(argv, "nan");
    argv = CSLAddString(argv, "-wo");
    argv = CSLAddString(argv, "INIT_DEST=NO_DATA");
    /* GDAL's own worker threads compute each cell independently: same result, faster. */
    argv = CSLAddString(argv, "-wo");
    argv = CSLAddString(argv, "NUM_THREADS=ALL_CPUS");
    wo = GDALWarpAppOptionsNew(argv, NULL);
    if (wo == NULL) {
        rc = err_set(e, ERR_INTERNAL, "%s '%s': bad warp options: %s", what, path,
                     CPLGetLastErrorMsg());
        goto done;
    }
    /* GDAL 3.6's warper has no band choice: hand it a virtual one-band view. */
    if (GDALGetRasterCount(ds) > 1) {
        char *targv[] = {"-of", "VRT", "-b", "1", NULL};
        GDALTranslateOptions *to = GDALTranslateOptionsNew(targv, NULL);
        if (to == NULL) {
            rc = err_set(e, ERR_INTERNAL, "%s '%s': bad band options: %s", what, path,
                         CPLGetLastErrorMsg());
            goto done;
        }
        band1 = GDALTranslate("", ds, to, &usage);
        GDALTranslateOptionsFree(to);
        if (band1 == NULL) {
            rc = err_set(e, ERR_INPUT, "%s '%s': cannot take band 1: %s", what, path,
                         CPLGetLastErrorMsg());
            goto done;
        }
        src = band1;
    }
    CPLErrorReset();
    res = GDALWarp(NULL, dst, 1, &src, wo, &usage);
    if (res == NULL) {
        rc = err_set(e, ERR_INPUT, "%s '%s': cannot resample it onto the population grid: %s",
                     what, path, CPLGetLastErrorMsg());
        goto done;
    }
    *out = dst;
    dst = NULL;
done:
    GDALWarpAppOptionsFree(wo);
    CSLDestroy(argv);
    if (band1 != NULL) GDALClose(band1);
    if (dst != NULL) GDALClose(dst);
    return rc;
}

/* Read band 1 of an optional layer onto g's grid (directly, row by row, when the grids
 * match, else warped through a Float64 buffer of 8 bytes per cell) and store it as the
 * layer 'kind', replacing an earlier one; on error g is unchanged. Values get the
 * source band's scale and offset. A NULL path adds nothing. Errors name the file and
 * the layer: ERR_IO missing, ERR_INPUT not a raster, no CRS or geotransform, no valid
 * cell over the grid, land-cover values that are not whole numbers. */
static int load_layer(grid_t *g, const char *path, layer_kind_t kind, err_t *e)
{
    const char *what = layer_names[kind];
    GDALDatasetH ds = NULL, warped = NULL;
    OGRSpatialReferenceH srs = NULL;
    GDALRasterBandH band, src_band;
    GDALDataType dt = GDT_Float64;
    double gt[6], nd = 0.0, scale, offset, *row = NULL;
    int has_nd = 0, has_scale = 0, has_off = 0, bx = 0, by = 0, rc;
    size_t ncell, n_valid = 0;
    int32_t *lc = NULL;
    float *el = NULL;
    uint8_t *ba = NULL;

    if (path == NULL) return ERR_OK;   /* the layer was not given */
    CPLPushErrorHandler(CPLQuietErrorHandler);
    if (g == NULL) {
        rc = err_set(e, ERR_INTERNAL, "%s '%s': no population grid to put it on", what,
                     path);
        goto done;
    }
    rc = open_raster(path, what, &ds, e);
    if (rc != ERR_OK) goto done;
    rc = check_raster(ds, path, what, 0, gt, &srs, e);
    if (rc != ERR_OK) goto done;
    ncell = (size_t)g->nx * (size_t)g->ny;
    src_band = GDALGetRasterBand(ds, 1);
    scale = GDALGetRasterScale(src_band, &has_scale);
    offset = GDALGetRasterOffset(src_band, &has_off);
    if (!has_scale) scale = 1.0;
    if (!has_off) offset = 0.0;
    if (same_grid(g, ds, gt, srs)) {
        band = src_band;
        dt = GDALGetRasterDataType(band);
        nd = GDALGetRasterNoDataValue(band, &has_nd);
    } else {
        rc = warp_onto(g, ds, kind, path, &warped, e);
        if (rc != ERR_OK) goto done;
        band = GDALGetRasterBand(warped, 1);
        has_nd = 0;   /* the warp turned nodata into NaN */
    }
    GDALGetBlockSize(band, &bx, &by);
    row = malloc((size_t)g->nx * sizeof *row);
    if (kind == LAYER_LANDCOVER) lc = malloc(ncell * sizeof *lc);
    if (kind == LAYER_ELEVATION) el = malloc(ncell * sizeof *el);
    if (kind == LAYER_BARRIER) ba = malloc(ncell * sizeof *ba);
    if (row == NULL || (lc == NULL && el == NULL && ba == NULL)) {
        rc = err_set(e, ERR_NOMEM, "%s '%s': out of memory for %d x %d cells", what, path,
                     g->nx, g->ny);
        goto done;
    }
    for (int r = 0; r < g->ny; r++) {
        CPLErrorReset();
        if (GDALRasterIO(band, GF_Read, 0, r, g->nx, 1, row, g->nx, 1, GDT_Float64, 0, 0)
            != CE_None) {
            rc = err_set(e, ERR_IO, "%s '%s': cannot read row %d: %s", what, path, r,
                         CPLGetLastErrorMsg());
            goto done;
        }
        /* Drop each finished block row from GDAL's cache (see read_people). */
        if (by > 0 && (r + 1) % by == 0) GDALFlushRasterCache(band);
        for (int c = 0; c < g->nx; c++) {
            size_t i = (size_t)r * (size_t)g->nx + (size_t)c;
            double v = row[c];
            int missing = isnan(v) || is_nodata(v, has_nd, nd, dt);

            if (!missing) {
                v = v * scale + offset;
                n_valid++;
            }
            if (kind == LAYER_LANDCOVER) {
                if (missing) {
                    lc[i] = INT32_MIN;
                } else if (v != floor(v) || v <= (double)INT32_MIN || v > (double)INT32_MAX) {
                    rc = err_set(e, ERR_INPUT, "%s '%s': cell (col %d, row %d) of the "
                                 "population grid gets %g, not a whole class number", what,
                                 path, c, r, v);
                    goto done;
                } else {
                    lc[i] = (int32_t)v;
                }
            } else if (kind == LAYER_ELEVATION) {
                el[i] = (missing || !isfinite(v)) ? NAN : (float)v;
            } else {
                ba[i] = (!missing && v != 0.0) ? 1 : 0;
            }
        }
    }
    if (n_valid == 0) {
        rc = err_set(e, ERR_INPUT, "%s '%s' has no valid cells over the population grid "
                     "(does it cover the same area? its CRS is '%s')", what, path,
                     OSRGetName(srs) ? OSRGetName(srs) : "unnamed");
        goto done;
    }
    if (kind == LAYER_LANDCOVER) {
        free(g->landcover);
        g->landcover = lc;
        lc = NULL;
        g->n_landcover_missing = ncell - n_valid;
    } else if (kind == LAYER_ELEVATION) {
        free(g->elevation);
        g->elevation = el;
        el = NULL;
        g->n_elevation_missing = ncell - n_valid;
    } else {
        g->n_barrier_missing = ncell - n_valid;
        ksum_t on = {0.0, 0.0};
        free(g->barrier);
        g->barrier = ba;
        ba = NULL;
        for (size_t i = 0; i < ncell; i++)
            if (g->barrier[i]) ksum_add(&on, g->people[i]);
        g->people_on_barrier = ksum_value(&on);
    }
done:
    CPLPopErrorHandler();
    free(row);
    free(lc);
    free(el);
    free(ba);
    if (warped != NULL) GDALClose(warped);
    if (srs != NULL) OSRDestroySpatialReference(srs);
    if (ds != NULL) GDALClose(ds);
    return rc;
}

/* Land cover onto g (nearest neighbour when resampled): class numbers, INT32_MIN where
 * the raster has nodata or does not reach. Replaces an earlier land-cover layer. */
int grid_load_landcover(grid_t *g, const char *path, err_t *e)
{
    return load_layer(g, path, LAYER_LANDCOVER, e);
}

/* Elevation in metres onto g (bilinear when resampled): NAN where nodata or not
 * covered. Replaces an earlier elevation layer. */
int grid_load_elevation(grid_t *g, const char *path, err_t *e)
{
    return load_layer(g, path, LAYER_ELEVATION, e);
}

/* Barriers onto g (nearest neighbour when resampled): 1 where the raster is nonzero
 * and not nodata, else 0; then people_on_barrier = persons on barrier cells. */
int grid_load_barriers(grid_t *g, const char *path, err_t *e)
{
    return load_layer(g, path, LAYER_BARRIER, e);
}

/* Release a grid and every layer it holds; NULL does nothing. */
void grid_free(grid_t *g)
{
    if (g == NULL) return;
    free(g->wkt);
    free(g->crs_name);
    free(g->people);
    free(g->row_dx_m);
    free(g->row_dy_m);
    free(g->row_area_m2);
    free(g->landcover);
    free(g->elevation);
    free(g->barrier);
    free(g);
}

/* Centre of cell (col, row) in the grid's CRS units. */
void grid_cell_center(const grid_t *g, int col, int row, double *x, double *y)
{
    *x = g->gt[0] + (col + 0.5) * g->gt[1] + (row + 0.5) * g->gt[2];
    *y = g->gt[3] + (col + 0.5) * g->gt[4] + (row + 0.5) * g->gt[5];
}

/* Cell holding (x, y) in CRS units. Cells are half-open: the left/top edge belongs to
 * the cell, the right/bottom edge to the next one, so a point on the grid's outer
 * right or bottom edge is outside. Returns 1 and sets col, row when inside, else 0. */
int grid_locate(const grid_t *g, double x, double y, int *col, int *row)
{
    double fc = (x - g->gt[0]) / g->gt[1], fr = (y - g->gt[3]) / g->gt[5];

    if (!(fc >= 0.0 && fc < g->nx && fr >= 0.0 && fr < g->ny)) return 0;
    *col = (int)floor(fc);
    *row = (int)floor(fr);
    /* fc just below nx can round up to nx in the floor of a near-integer quotient. */
    if (*col >= g->nx) *col = g->nx - 1;
    if (*row >= g->ny) *row = g->ny - 1;
    return 1;
}

/* Geodesic distance in metres between (lon1, lat1) and (lon2, lat2), degrees, on the
 * WGS84 ellipsoid (Karney's algorithm in PROJ, accurate to about 15 nm). */
double grid_geodesic_m(double lon1, double lat1, double lon2, double lat2)
{
    struct geod_geodesic geod;
    double s12 = NAN;

    geod_init(&geod, WGS84_A, WGS84_F);
    geod_inverse(&geod, lat1, lon1, lat2, lon2, &s12, NULL, NULL);
    return s12;
}
