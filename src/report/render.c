/* render: PNG maps with cairo (see include/render.h). A map is an image of
 * fixed width: a title band, the map area (the grid extent fitted at one scale
 * in x and y), a legend panel on the right and a footer with the scale bar, CRS,
 * credits and date. Rasters are read at the map's resolution with GDAL's
 * resampling (average, mode) and then sampled to image pixels, so memory is
 * bounded by the image, not by the grid. */
#include "render.h"
#include "render_internal.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cairo.h>
#include <fontconfig/fontconfig.h>
#include <gdal.h>
#include <ogr_api.h>
#include <ogr_srs_api.h>
#include <cpl_error.h>

#include "grid.h"
#include "ogr_util.h"
#include "output.h"

#define FONT "DejaVu Sans"
#define TITLE_H 48.0     /* title band, pixels */
#define LEGEND_W 250.0   /* legend panel, pixels */
#define MARGIN 16.0
#define FOOTER_H 78.0    /* scale bar and credit lines under the map */
#define MAX_MAP_H 820    /* tallest map area, pixels */
/* Map background: a very light warm grey, so clear classes and blanked areas
 * still read as "inside the map". */
#define MAP_BACKGROUND ((render_rgb_t){0.965, 0.960, 0.950})

/* ---- colours ---------------------------------------------------------- */

static double srgb_encode(double x)
{
    if (x <= 0.0031308) return 12.92 * x;
    return 1.055 * pow(x, 1.0 / 2.4) - 0.055;
}

static double srgb_decode(double x)
{
    if (x <= 0.04045) return x / 12.92;
    return pow((x + 0.055) / 1.055, 2.4);
}

/* OKLab to linear sRGB (Ottosson's matrices, "A perceptual color space for
 * image processing", 2020). */
static void oklab_to_linear(double L, double a, double b, double rgb[3])
{
    double l_ = L + 0.3963377774 * a + 0.2158037573 * b;
    double m_ = L - 0.1055613458 * a - 0.0638541728 * b;
    double s_ = L - 0.0894841775 * a - 1.2914855480 * b;
    double l = l_ * l_ * l_, m = m_ * m_ * m_, s = s_ * s_ * s_;

    rgb[0] = 4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s;
    rgb[1] = -1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s;
    rgb[2] = -0.0041960863 * l - 0.7034186147 * m + 1.7076147010 * s;
}

void render_rgb_to_oklab(render_rgb_t c, double lab[3])
{
    double r = srgb_decode(c.r), g = srgb_decode(c.g), b = srgb_decode(c.b);
    double l = cbrt(0.4122214708 * r + 0.5363325363 * g + 0.0514459929 * b);
    double m = cbrt(0.2119034982 * r + 0.6806995451 * g + 0.1073969566 * b);
    double s = cbrt(0.0883024619 * r + 0.2817188376 * g + 0.6299787005 * b);

    lab[0] = 0.2104542553 * l + 0.7936177850 * m - 0.0040720468 * s;
    lab[1] = 1.9779984951 * l - 2.4285922050 * m + 0.4505937099 * s;
    lab[2] = 0.0259040371 * l + 0.7827717662 * m - 0.8086757660 * s;
}

static int in_gamut(const double v[3])
{
    for (int k = 0; k < 3; k++)
        if (v[k] < -1e-6 || v[k] > 1 + 1e-6) return 0;
    return 1;
}

render_rgb_t render_oklch(double L, double C, double h_deg)
{
    double h = h_deg * M_PI / 180.0, lin[3], lo = 0, hi = C;
    render_rgb_t out;

    if (L < 0) L = 0;
    if (L > 1) L = 1;
    oklab_to_linear(L, C * cos(h), C * sin(h), lin);
    if (!in_gamut(lin)) {
        /* Bisect on chroma: keeps lightness (the thing the ramps order by). */
        for (int it = 0; it < 40; it++) {
            double mid = 0.5 * (lo + hi);
            oklab_to_linear(L, mid * cos(h), mid * sin(h), lin);
            if (in_gamut(lin)) lo = mid;
            else hi = mid;
        }
        oklab_to_linear(L, lo * cos(h), lo * sin(h), lin);
    }
    for (int k = 0; k < 3; k++) lin[k] = lin[k] < 0 ? 0 : lin[k] > 1 ? 1 : lin[k];
    out.r = srgb_encode(lin[0]);
    out.g = srgb_encode(lin[1]);
    out.b = srgb_encode(lin[2]);
    return out;
}

static double clamp01(double t)
{
    return t < 0 ? 0 : t > 1 ? 1 : t;
}

/* Lightness falls linearly (0.97 -> 0.30) so classes order by brightness for
 * every reader, also in greyscale print; hue turns 105 -> 285 degrees (yellow,
 * green, teal, blue, violet) and chroma swells in the middle where sRGB allows. */
render_rgb_t render_ramp_cool(double t)
{
    t = clamp01(t);
    return render_oklch(0.97 - 0.67 * t, 0.07 + 0.08 * sin(M_PI * t), 105.0 + 180.0 * t);
}

/* Lightness 0.97 -> 0.33; hue 95 -> 25 degrees (cream, orange, brick red). */
render_rgb_t render_ramp_warm(double t)
{
    t = clamp01(t);
    return render_oklch(0.97 - 0.64 * t, 0.05 + 0.13 * sin(0.5 * M_PI * t), 95.0 - 70.0 * t);
}

/* Blue (hue 250) and orange (hue 60) differ for the common red-green colour
 * vision deficiencies; the centre is a near-neutral light grey. */
render_rgb_t render_ramp_diverging(double t)
{
    double a = fabs(t) > 1 ? 1 : fabs(t);
    double L = 0.96 - 0.50 * a, C = 0.15 * a;
    return render_oklch(L, C, t < 0 ? 250.0 : 60.0);
}

render_rgb_t render_category(size_t i)
{
    return render_oklch(0.90, 0.055, fmod(40.0 + 137.508 * (double)i, 360.0));
}

void render_rgb_hex(render_rgb_t c, char buf[8])
{
    snprintf(buf, 8, "#%02x%02x%02x", (int)lround(clamp01(c.r) * 255),
             (int)lround(clamp01(c.g) * 255), (int)lround(clamp01(c.b) * 255));
}

/* ---- classed scales -------------------------------------------------- */

static void fmt_num(char *buf, size_t n, double v)
{
    snprintf(buf, n, "%.6g", v);
}

int render_scale_bands(render_scale_t *s, const double *limits_min, size_t n, err_t *e)
{
    char a[16], b[16];

    memset(s, 0, sizeof *s);
    if (n < 1 || n > 10)
        return err_set(e, ERR_INPUT, "map scale: %zu time bands given; between 1 and 10 can be drawn", n);
    for (size_t k = 0; k < n; k++)
        if (!(limits_min[k] > 0) || !isfinite(limits_min[k]) || (k > 0 && limits_min[k] <= limits_min[k - 1]))
            return err_set(e, ERR_INPUT, "map scale: band limit %zu (%g min) is not positive and increasing",
                           k + 1, limits_min[k]);
    s->n = n + 1;
    s->breaks[0] = 0;
    for (size_t k = 0; k < n; k++) s->breaks[k + 1] = limits_min[k];
    s->breaks[n + 1] = INFINITY;
    for (size_t k = 0; k <= n; k++) {
        s->colour[k] = render_ramp_cool(n == 0 ? 0 : 0.08 + 0.92 * (double)k / (double)n);
        fmt_num(a, sizeof a, s->breaks[k]);
        fmt_num(b, sizeof b, s->breaks[k + 1]);
        if (k < n) snprintf(s->label[k], sizeof s->label[k], "%s to %s min", a, b);
        else snprintf(s->label[k], sizeof s->label[k], "over %s min", a);
    }
    snprintf(s->nodata_label, sizeof s->nodata_label, "no path (water, barrier)");
    s->nodata = (render_rgb_t){0.78, 0.78, 0.78};
    return ERR_OK;
}

void render_scale_density(render_scale_t *s)
{
    static const double br[] = {0, 1, 5, 25, 100, 250, 1000};
    const size_t nb = sizeof br / sizeof br[0];

    memset(s, 0, sizeof *s);
    s->n = nb;
    for (size_t k = 0; k < nb; k++) s->breaks[k] = br[k];
    s->breaks[nb] = INFINITY;
    s->skip_first = 1;   /* under 1 person per km2: leave the map clear */
    for (size_t k = 0; k < nb; k++) {
        s->colour[k] = render_ramp_warm(k == 0 ? 0 : 0.15 + 0.85 * (double)(k - 1) / (double)(nb - 2));
        if (k + 1 < nb) snprintf(s->label[k], sizeof s->label[k], "%g to %g per km\xc2\xb2", br[k], br[k + 1]);
        else snprintf(s->label[k], sizeof s->label[k], "%g or more per km\xc2\xb2", br[k]);
    }
}

int render_scale_diverging(render_scale_t *s, const double *steps_min, size_t n, err_t *e)
{
    size_t k = 0;

    memset(s, 0, sizeof *s);
    if (n < 1 || n > 5)
        return err_set(e, ERR_INPUT, "map scale: %zu diverging steps given; between 1 and 5 can be drawn", n);
    for (size_t i = 0; i < n; i++)
        if (!(steps_min[i] > 0) || !isfinite(steps_min[i]) || (i > 0 && steps_min[i] <= steps_min[i - 1]))
            return err_set(e, ERR_INPUT, "map scale: diverging step %zu (%g min) is not positive and increasing",
                           i + 1, steps_min[i]);
    /* Classes: below -s[n-1], [-s[n-1], -s[n-2]), ..., [-s[0], s[0]), ..., above s[n-1]. */
    s->n = 2 * n + 1;
    s->breaks[k++] = -INFINITY;
    for (size_t i = n; i-- > 0;) s->breaks[k++] = -steps_min[i];
    for (size_t i = 0; i < n; i++) s->breaks[k++] = steps_min[i];
    s->breaks[k] = INFINITY;
    for (size_t c = 0; c < s->n; c++) {
        double t = ((double)c - (double)n) / (double)n;   /* -1 .. 1 */
        s->colour[c] = render_ramp_diverging(t);
        if (c == 0) snprintf(s->label[c], sizeof s->label[c], "%g min or more faster", steps_min[n - 1]);
        else if (c == s->n - 1) snprintf(s->label[c], sizeof s->label[c], "%g min or more slower", steps_min[n - 1]);
        else if (c == n) snprintf(s->label[c], sizeof s->label[c], "within %g min", steps_min[0]);
        else if (c < n) snprintf(s->label[c], sizeof s->label[c], "%g to %g min faster", -s->breaks[c + 1], -s->breaks[c]);
        else snprintf(s->label[c], sizeof s->label[c], "%g to %g min slower", s->breaks[c], s->breaks[c + 1]);
    }
    return ERR_OK;
}

int render_scale_class(const render_scale_t *s, double v)
{
    if (isnan(v) || s->n == 0) return -1;
    for (size_t k = 1; k < s->n; k++)
        if (v < s->breaks[k]) return (int)k - 1;
    return (int)s->n - 1;
}

/* ---- geometry -------------------------------------------------------- */

double render_metres_per_px(const double gt[6], int nx, int ny, int geographic,
                            double m_per_unit, double upp)
{
    if (geographic) {
        double lon0 = gt[0], lon1 = gt[0] + nx * gt[1];
        double latc = gt[3] + 0.5 * ny * gt[5];
        double width_m = grid_geodesic_m(lon0, latc, lon1, latc);
        return width_m / (nx * gt[1]) * upp;
    }
    return upp * m_per_unit;
}

int render_view_fit(const double gt[6], int nx, int ny, int geographic, double m_per_unit,
                    double ox, double oy, int max_w, int max_h, render_view_t *v, err_t *e)
{
    double ew, eh;

    memset(v, 0, sizeof *v);
    if (nx < 1 || ny < 1 || max_w < 1 || max_h < 1 || !(gt[1] > 0) || !(gt[5] < 0))
        return err_set(e, ERR_INPUT, "map: the grid (%d x %d cells, cell %g x %g) is not a north-up raster; cannot draw it",
                       nx, ny, gt[1], gt[5]);
    if (gt[2] != 0 || gt[4] != 0)
        return err_set(e, ERR_INPUT, "map: rotated grids cannot be drawn");
    ew = nx * gt[1];
    eh = ny * -gt[5];
    v->upp = fmax(ew / max_w, eh / max_h);
    v->w = (int)lround(ew / v->upp);
    v->h = (int)lround(eh / v->upp);
    if (v->w < 1) v->w = 1;
    if (v->h < 1) v->h = 1;
    v->x0 = gt[0];
    v->y0 = gt[3];
    v->ox = ox;
    v->oy = oy;
    v->m_per_px = render_metres_per_px(gt, nx, ny, geographic, m_per_unit > 0 ? m_per_unit : 1, v->upp);
    return ERR_OK;
}

void render_scale_bar(double m_per_px, double max_px, double *len_m, double *len_px)
{
    double max_m = m_per_px * max_px, p, best = 0;

    *len_m = 0;
    *len_px = 0;
    if (!(max_m > 0) || !isfinite(max_m)) return;
    p = pow(10.0, floor(log10(max_m)));
    for (int k = 0; k < 3; k++) {
        static const double mult[] = {1, 2, 5};
        if (mult[k] * p <= max_m) best = mult[k] * p;
    }
    if (best == 0) best = p;
    *len_m = best;
    *len_px = best / m_per_px;
}

/* ---- raster input ---------------------------------------------------- */

static int open_raster(const char *path, GDALDatasetH *ds, err_t *e)
{
    FILE *f = fopen(path, "rb");

    *ds = NULL;
    if (f == NULL)
        return err_set(e, ERR_IO, "cannot open raster '%s' for the map: file missing or "
                       "unreadable; run the command that writes it (reach, plan or compare) "
                       "into this folder again", path);
    fclose(f);
    CPLErrorReset();
    *ds = GDALOpen(path, GA_ReadOnly);
    if (*ds == NULL || GDALGetRasterCount(*ds) < 1) {
        int rc = err_set(e, ERR_INPUT, "cannot read '%s' as a raster for the map: %s", path,
                         CPLGetLastErrorMsg()[0] ? CPLGetLastErrorMsg() : "no band");
        if (*ds != NULL) GDALClose(*ds);
        *ds = NULL;
        return rc;
    }
    return ERR_OK;
}

int render_raster_info(const char *path, int *nx, int *ny, double gt[6], int *geographic,
                       double *m_per_unit, char **wkt, err_t *e)
{
    GDALDatasetH ds = NULL;
    OGRSpatialReferenceH srs = NULL;
    const char *w;
    int rc = open_raster(path, &ds, e);

    if (wkt) *wkt = NULL;
    if (rc != ERR_OK) return rc;
    *nx = GDALGetRasterXSize(ds);
    *ny = GDALGetRasterYSize(ds);
    if (GDALGetGeoTransform(ds, gt) != CE_None) {
        rc = err_set(e, ERR_INPUT, "raster '%s' has no geotransform; cannot map it", path);
        goto done;
    }
    w = GDALGetProjectionRef(ds);
    *geographic = 0;
    *m_per_unit = 1;
    if (w != NULL && w[0] != '\0') {
        srs = OSRNewSpatialReference(w);
        if (srs != NULL) {
            *geographic = OSRIsGeographic(srs) ? 1 : 0;
            if (!*geographic) *m_per_unit = OSRGetLinearUnits(srs, NULL);
        }
    }
    if (wkt) {
        *wkt = strdup(w ? w : "");
        if (*wkt == NULL) rc = err_set(e, ERR_NOMEM, "out of memory reading '%s'", path);
    }
done:
    if (srs) OSRDestroySpatialReference(srs);
    GDALClose(ds);
    return rc;
}

int render_read_band(const char *path, int rw, int rh, int how, float **out, err_t *e)
{
    GDALDatasetH ds = NULL;
    GDALRasterBandH b;
    GDALRasterIOExtraArg arg;
    float *v = NULL;
    double nodata;
    int has_nodata = 0, rc;

    *out = NULL;
    if (rw < 1 || rh < 1) return err_set(e, ERR_INTERNAL, "map raster size %d x %d", rw, rh);
    rc = open_raster(path, &ds, e);
    if (rc != ERR_OK) return rc;
    v = malloc((size_t)rw * (size_t)rh * sizeof *v);
    if (v == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory for a %d x %d map of '%s'", rw, rh, path);
        goto done;
    }
    b = GDALGetRasterBand(ds, 1);
    nodata = GDALGetRasterNoDataValue(b, &has_nodata);
    INIT_RASTERIO_EXTRA_ARG(arg);
    /* GDAL's average and mode resamplers skip nodata cells; a pixel whose
     * cells are all nodata stays nodata. */
    arg.eResampleAlg = how == RENDER_AVERAGE ? GRIORA_Average
                     : how == RENDER_MODE ? GRIORA_Mode : GRIORA_NearestNeighbour;
    CPLErrorReset();
    if (GDALRasterIOEx(b, GF_Read, 0, 0, GDALGetRasterXSize(ds), GDALGetRasterYSize(ds), v, rw,
                       rh, GDT_Float32, 0, 0, &arg) != CE_None) {
        rc = err_set(e, ERR_IO, "cannot read raster '%s' for the map: %s", path, CPLGetLastErrorMsg());
        goto done;
    }
    if (has_nodata)
        for (size_t i = 0; i < (size_t)rw * (size_t)rh; i++)
            if (v[i] == (float)nodata) v[i] = NAN;
    *out = v;
    v = NULL;
done:
    free(v);
    GDALClose(ds);
    return rc;
}

/* Area in m2 of one cell in each row of a grid. */
static int row_areas(const double gt[6], int nx, int ny, int geographic, double m_per_unit,
                     double **out, err_t *e)
{
    double *a = malloc((size_t)ny * sizeof *a);

    (void)nx;
    *out = NULL;
    if (a == NULL) return err_set(e, ERR_NOMEM, "out of memory for %d row areas", ny);
    for (int r = 0; r < ny; r++) {
        if (geographic) {
            double lat_top = gt[3] + r * gt[5], lat_bot = lat_top + gt[5];
            double latc = 0.5 * (lat_top + lat_bot);
            double dx = grid_geodesic_m(gt[0], latc, gt[0] + gt[1], latc);
            double dy = grid_geodesic_m(gt[0], lat_top, gt[0], lat_bot);
            a[r] = dx * dy;
        } else {
            a[r] = fabs(gt[1] * gt[5]) * m_per_unit * m_per_unit;
        }
    }
    *out = a;
    return ERR_OK;
}

int render_density_beyond(const char *pop_path, const char *time_path, double limit,
                          int rw, int rh, float **out, double *people_beyond, err_t *e)
{
    enum { STRIP = 64 };   /* rows per read: bounded memory on any grid */
    GDALDatasetH pd = NULL, td = NULL;
    GDALRasterBandH pb, tb;
    double *pop = NULL, *tim = NULL, *sum_p = NULL, *sum_a = NULL, *areas = NULL;
    double gt[6], pnd = 0, tnd = 0, mpu = 1;
    int nx, ny, has_p = 0, has_t = 0, geo = 0, rc;
    float *v = NULL;

    *out = NULL;
    *people_beyond = 0;
    rc = render_raster_info(time_path, &nx, &ny, gt, &geo, &mpu, NULL, e);
    if (rc != ERR_OK) return rc;
    rc = open_raster(pop_path, &pd, e);
    if (rc == ERR_OK) rc = open_raster(time_path, &td, e);
    if (rc != ERR_OK) goto done;
    if (GDALGetRasterXSize(pd) != nx || GDALGetRasterYSize(pd) != ny) {
        rc = err_set(e, ERR_INPUT, "population '%s' is %d x %d cells but travel times '%s' are %d x %d; run reach again with this population",
                     pop_path, GDALGetRasterXSize(pd), GDALGetRasterYSize(pd), time_path, nx, ny);
        goto done;
    }
    if (rw < 1 || rh < 1 || rw > nx || rh > ny) {
        rc = err_set(e, ERR_INTERNAL, "density map size %d x %d for a %d x %d grid", rw, rh, nx, ny);
        goto done;
    }
    rc = row_areas(gt, nx, ny, geo, mpu, &areas, e);
    if (rc != ERR_OK) goto done;
    pb = GDALGetRasterBand(pd, 1);
    tb = GDALGetRasterBand(td, 1);
    pnd = GDALGetRasterNoDataValue(pb, &has_p);
    tnd = GDALGetRasterNoDataValue(tb, &has_t);
    pop = malloc((size_t)nx * STRIP * sizeof *pop);
    tim = malloc((size_t)nx * STRIP * sizeof *tim);
    sum_p = calloc((size_t)rw * rh, sizeof *sum_p);
    sum_a = calloc((size_t)rw * rh, sizeof *sum_a);
    v = malloc((size_t)rw * rh * sizeof *v);
    if (!pop || !tim || !sum_p || !sum_a || !v) {
        rc = err_set(e, ERR_NOMEM, "out of memory for the density map of '%s'", pop_path);
        goto done;
    }
    for (int r0 = 0; r0 < ny; r0 += STRIP) {
        int nr = ny - r0 < STRIP ? ny - r0 : STRIP;
        CPLErrorReset();
        if (GDALRasterIO(pb, GF_Read, 0, r0, nx, nr, pop, nx, nr, GDT_Float64, 0, 0) != CE_None ||
            GDALRasterIO(tb, GF_Read, 0, r0, nx, nr, tim, nx, nr, GDT_Float64, 0, 0) != CE_None) {
            rc = err_set(e, ERR_IO, "cannot read rows %d-%d of '%s' or '%s': %s", r0, r0 + nr - 1,
                         pop_path, time_path, CPLGetLastErrorMsg());
            goto done;
        }
        for (int r = 0; r < nr; r++) {
            int row = r0 + r;
            size_t py = (size_t)((long long)row * rh / ny);
            for (int c = 0; c < nx; c++) {
                double p = pop[(size_t)r * nx + c], t = tim[(size_t)r * nx + c];
                size_t px = (size_t)((long long)c * rw / nx), k = py * (size_t)rw + px;
                int no_path = isnan(t) || (has_t && t == tnd) || t < 0;
                if (isnan(p) || (has_p && p == pnd) || p < 0) p = 0;
                sum_a[k] += areas[row];
                if (no_path || t > limit) {
                    sum_p[k] += p;
                    *people_beyond += p;
                }
            }
        }
    }
    for (size_t k = 0; k < (size_t)rw * rh; k++)
        v[k] = sum_a[k] > 0 ? (float)(sum_p[k] / (sum_a[k] / 1e6)) : NAN;
    *out = v;
    v = NULL;
done:
    free(pop);
    free(tim);
    free(sum_p);
    free(sum_a);
    free(areas);
    free(v);
    if (pd) GDALClose(pd);
    if (td) GDALClose(td);
    return rc;
}

/* ---- vector input ---------------------------------------------------- */

typedef struct line_buf {
    render_lines_t *l;
    size_t cap_pts, cap_lines, n_pts;
} line_buf_t;

static int lb_point(line_buf_t *b, double x, double y)
{
    if (b->n_pts == b->cap_pts) {
        size_t cap = b->cap_pts ? 2 * b->cap_pts : 1024;
        double *nx = realloc(b->l->x, cap * sizeof *nx), *ny;
        if (nx == NULL) return -1;
        b->l->x = nx;
        ny = realloc(b->l->y, cap * sizeof *ny);
        if (ny == NULL) return -1;
        b->l->y = ny;
        b->cap_pts = cap;
    }
    b->l->x[b->n_pts] = x;
    b->l->y[b->n_pts] = y;
    b->n_pts++;
    return 0;
}

/* Close the points added since the last line into line number n. */
static int lb_end_line(line_buf_t *b, int rank, const char *name)
{
    render_lines_t *l = b->l;

    if (l->n + 2 > b->cap_lines) {
        size_t cap = b->cap_lines ? 2 * b->cap_lines : 256;
        size_t *s = realloc(l->start, (cap + 1) * sizeof *s);
        int *rk;
        char **nm;
        if (s == NULL) return -1;
        l->start = s;
        rk = realloc(l->rank, cap * sizeof *rk);
        if (rk == NULL) return -1;
        l->rank = rk;
        nm = realloc(l->name, cap * sizeof *nm);
        if (nm == NULL) return -1;
        l->name = nm;
        b->cap_lines = cap;
    }
    l->rank[l->n] = rank;
    l->name[l->n] = NULL;
    if (name != NULL && name[0] != '\0') {
        l->name[l->n] = strdup(name);
        if (l->name[l->n] == NULL) return -1;
    }
    l->n++;
    l->start[l->n] = b->n_pts;
    return 0;
}

static int road_rank(const char *cls)
{
    static const char *main_roads[] = {"motorway", "trunk", "primary", "secondary"};
    static const char *minor[] = {"track", "path", "footway", "bridleway", "cycleway", "steps",
                                  "pedestrian"};

    for (size_t i = 0; i < sizeof main_roads / sizeof main_roads[0]; i++)
        if (strncmp(cls, main_roads[i], strlen(main_roads[i])) == 0) return 2;
    for (size_t i = 0; i < sizeof minor / sizeof minor[0]; i++)
        if (strcmp(cls, minor[i]) == 0) return 0;
    return 1;
}

/* Add the vertices of a simple line or ring 'g' as one line. */
static int add_simple(line_buf_t *b, OGRGeometryH g, const ogr_util_crs_t *crs, int rank,
                      const char *name)
{
    int np = OGR_G_GetPointCount(g);
    size_t first = b->n_pts;

    if (np < 2) return 0;
    for (int i = 0; i < np; i++)
        if (lb_point(b, OGR_G_GetX(g, i), OGR_G_GetY(g, i)) != 0) return -1;
    ogr_util_crs_apply(crs, (size_t)np, b->l->x + first, b->l->y + first);
    return lb_end_line(b, rank, name);
}

static int add_geometry(line_buf_t *b, OGRGeometryH g, const ogr_util_crs_t *crs, int rank,
                        const char *name)
{
    OGRwkbGeometryType t;

    if (g == NULL) return 0;
    t = wkbFlatten(OGR_G_GetGeometryType(g));
    if (t == wkbLineString) return add_simple(b, g, crs, rank, name);
    if (t == wkbPolygon)   /* exterior ring only: outlines of districts */
        return OGR_G_GetGeometryCount(g) > 0
                   ? add_simple(b, OGR_G_GetGeometryRef(g, 0), crs, rank, name) : 0;
    if (t == wkbMultiLineString || t == wkbMultiPolygon || t == wkbGeometryCollection) {
        for (int i = 0; i < OGR_G_GetGeometryCount(g); i++)
            if (add_geometry(b, OGR_G_GetGeometryRef(g, i), crs, rank, name) != 0) return -1;
    }
    return 0;
}

int render_lines_load(const char *path, const char *layer, const char *class_field,
                      const char *name_field, const char *grid_wkt, render_lines_t **out,
                      err_t *e)
{
    GDALDatasetH ds = NULL;
    OGRLayerH lay = NULL;
    OGRFeatureH f;
    ogr_util_crs_t crs;
    ogr_util_attr_t acls, aname;
    int have_crs = 0, have_cls = 0, have_name = 0, rc;
    line_buf_t b = {0};
    char cls[128], name[256];

    *out = NULL;
    b.l = calloc(1, sizeof *b.l);
    if (b.l == NULL) return err_set(e, ERR_NOMEM, "out of memory reading '%s'", path);
    b.l->start = malloc(sizeof *b.l->start);
    if (b.l->start == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory reading '%s'", path);
        goto done;
    }
    b.l->start[0] = 0;
    b.cap_lines = 0;
    rc = ogr_util_open(path, "map layer", &ds, e);
    if (rc != ERR_OK) goto done;
    rc = ogr_util_layer(ds, path, layer, class_field ? "lines" : "multipolygons", &lay, e);
    if (rc != ERR_OK) goto done;
    rc = ogr_util_crs_init(&crs, lay, path, grid_wkt, e);
    if (rc != ERR_OK) goto done;
    have_crs = 1;
    if (class_field) have_cls = ogr_util_attr_init(&acls, lay, class_field);
    if (name_field) have_name = ogr_util_attr_init(&aname, lay, name_field);
    OGR_L_ResetReading(lay);
    while ((f = OGR_L_GetNextFeature(lay)) != NULL) {
        int rank = 1, bad;
        cls[0] = name[0] = '\0';
        if (have_cls) {
            ogr_util_attr_get(&acls, f, cls, sizeof cls);
            rank = road_rank(cls);
        }
        if (have_name) ogr_util_attr_get(&aname, f, name, sizeof name);
        bad = add_geometry(&b, OGR_F_GetGeometryRef(f), &crs, rank, name);
        OGR_F_Destroy(f);
        if (bad) {
            rc = err_set(e, ERR_NOMEM, "out of memory reading lines of '%s'", path);
            goto done;
        }
    }
    *out = b.l;
    b.l = NULL;
done:
    if (have_crs) ogr_util_crs_destroy(&crs);
    if (ds) GDALClose(ds);
    render_lines_free(b.l);
    return rc;
}

void render_lines_free(render_lines_t *l)
{
    if (l == NULL) return;
    if (l->name)
        for (size_t i = 0; i < l->n; i++) free(l->name[i]);
    free(l->name);
    free(l->rank);
    free(l->start);
    free(l->x);
    free(l->y);
    free(l);
}

/* ---- the map --------------------------------------------------------- */

struct render_map {
    cairo_surface_t *s;
    cairo_t *cr;
    int img_w, img_h;
    render_view_t v;
    double legend_y;         /* next free row in the legend panel */
    render_layout_t lay;
};

static void set_rgb(cairo_t *cr, render_rgb_t c)
{
    cairo_set_source_rgb(cr, c.r, c.g, c.b);
}

static void font(cairo_t *cr, double size, int bold)
{
    cairo_select_font_face(cr, FONT, CAIRO_FONT_SLANT_NORMAL,
                           bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(cr, size);
}

void render_fit_text(cairo_t *cr, const char *s, double max_w, char *buf, size_t size)
{
    cairo_text_extents_t te;
    size_t n;

    snprintf(buf, size, "%s", s);
    n = strlen(buf);
    cairo_text_extents(cr, buf, &te);
    while (te.x_advance > max_w && n > 4) {
        /* Leave room for the ellipsis, then step back over UTF-8 continuation
         * bytes so the cut stays valid. */
        n--;
        if (n + 4 > size) n = size - 4;
        while (n > 0 && ((unsigned char)buf[n] & 0xC0) == 0x80) n--;
        memcpy(buf + n, "\xe2\x80\xa6", 4);   /* ellipsis */
        cairo_text_extents(cr, buf, &te);
    }
}

/* Text at (x, y) baseline, cut with an ellipsis to max_w pixels. */
static void text_fit(cairo_t *cr, double x, double y, const char *s, double max_w)
{
    char buf[512];

    render_fit_text(cr, s, max_w, buf, sizeof buf);
    cairo_move_to(cr, x, y);
    cairo_show_text(cr, buf);
}

static void to_px(const render_view_t *v, double x, double y, double *px, double *py)
{
    *px = v->ox + (x - v->x0) / v->upp;
    *py = v->oy + (v->y0 - y) / v->upp;
}

int render_map_new(const double gt[6], int nx, int ny, int geographic, double m_per_unit,
                   const char *title, render_map_t **out, err_t *e)
{
    render_map_t *m = NULL;
    int rc, max_w = (int)(RENDER_MAP_WIDTH - LEGEND_W - 2 * MARGIN);

    *out = NULL;
    m = calloc(1, sizeof *m);
    if (m == NULL) return err_set(e, ERR_NOMEM, "out of memory for a map");
    rc = render_view_fit(gt, nx, ny, geographic, m_per_unit, MARGIN, TITLE_H, max_w, MAX_MAP_H,
                         &m->v, e);
    if (rc != ERR_OK) goto fail;
    m->img_w = RENDER_MAP_WIDTH;
    /* Room for the map and footer, and at least for a legend of a dozen rows. */
    m->img_h = (int)(TITLE_H + m->v.h + FOOTER_H);
    if (m->img_h < 560) m->img_h = 560;
    m->s = cairo_image_surface_create(CAIRO_FORMAT_RGB24, m->img_w, m->img_h);
    m->cr = cairo_create(m->s);
    if (cairo_status(m->cr) != CAIRO_STATUS_SUCCESS) {
        rc = err_set(e, ERR_NOMEM, "cannot make a %d x %d map image: %s", m->img_w, m->img_h,
                     cairo_status_to_string(cairo_status(m->cr)));
        goto fail;
    }
    cairo_set_source_rgb(m->cr, 1, 1, 1);
    cairo_paint(m->cr);
    set_rgb(m->cr, MAP_BACKGROUND);
    cairo_rectangle(m->cr, m->v.ox, m->v.oy, m->v.w, m->v.h);
    cairo_fill(m->cr);
    cairo_set_source_rgb(m->cr, 0.10, 0.10, 0.12);
    font(m->cr, 20, 1);
    text_fit(m->cr, MARGIN, 31, title ? title : "", RENDER_MAP_WIDTH - 2 * MARGIN);
    m->legend_y = TITLE_H + 6;
    m->lay.img_w = m->img_w;
    m->lay.img_h = m->img_h;
    m->lay.view = m->v;
    m->lay.legend_x = RENDER_MAP_WIDTH - LEGEND_W + 4;
    m->lay.legend_y = TITLE_H;
    *out = m;
    return ERR_OK;
fail:
    render_map_free(m);
    return rc;
}

void render_map_free(render_map_t *m)
{
    if (m == NULL) return;
    if (m->cr) cairo_destroy(m->cr);
    if (m->s) cairo_surface_destroy(m->s);
    free(m);
}

void render_map_layout(const render_map_t *m, render_layout_t *l)
{
    *l = m->lay;
}

/* Paint an ARGB image of the map area's size into the map area. */
static void paint_area(render_map_t *m, cairo_surface_t *img)
{
    cairo_save(m->cr);
    cairo_rectangle(m->cr, m->v.ox, m->v.oy, m->v.w, m->v.h);
    cairo_clip(m->cr);
    cairo_set_source_surface(m->cr, img, m->v.ox, m->v.oy);
    cairo_paint(m->cr);
    cairo_restore(m->cr);
}

static uint32_t argb(render_rgb_t c, double alpha)
{
    /* cairo wants premultiplied alpha. */
    uint32_t a = (uint32_t)lround(alpha * 255);
    uint32_t r = (uint32_t)lround(clamp01(c.r) * alpha * 255);
    uint32_t g = (uint32_t)lround(clamp01(c.g) * alpha * 255);
    uint32_t b = (uint32_t)lround(clamp01(c.b) * alpha * 255);
    return a << 24 | r << 16 | g << 8 | b;
}

/* Value under map pixel (i, j) from a raster of rw x rh over the extent. */
static float sample(const float *v, int rw, int rh, int w, int h, int i, int j)
{
    int c = (int)(((double)i + 0.5) * rw / w), r = (int)(((double)j + 0.5) * rh / h);
    if (c >= rw) c = rw - 1;
    if (r >= rh) r = rh - 1;
    return v[(size_t)r * rw + c];
}

void render_map_raster(render_map_t *m, const float *v, int rw, int rh,
                       const render_scale_t *s)
{
    cairo_surface_t *img = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, m->v.w, m->v.h);
    unsigned char *data;
    int stride;
    uint32_t lut[RENDER_MAX_CLASSES], nod;

    if (cairo_surface_status(img) != CAIRO_STATUS_SUCCESS) {
        cairo_surface_destroy(img);
        return;
    }
    for (size_t k = 0; k < s->n; k++)
        lut[k] = (k == 0 && s->skip_first) ? 0 : argb(s->colour[k], 1.0);
    nod = s->nodata_label[0] ? argb(s->nodata, 1.0) : 0;
    cairo_surface_flush(img);
    data = cairo_image_surface_get_data(img);
    stride = cairo_image_surface_get_stride(img);
    for (int j = 0; j < m->v.h; j++) {
        uint32_t *row = (uint32_t *)(void *)(data + (size_t)j * stride);
        for (int i = 0; i < m->v.w; i++) {
            int k = render_scale_class(s, sample(v, rw, rh, m->v.w, m->v.h, i, j));
            row[i] = k < 0 ? nod : lut[k];
        }
    }
    cairo_surface_mark_dirty(img);
    paint_area(m, img);
    cairo_surface_destroy(img);
}

void render_map_categories(render_map_t *m, const float *v, int rw, int rh)
{
    int w = m->v.w, h = m->v.h, stride;
    cairo_surface_t *img = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, w, h);
    int32_t *lab = malloc((size_t)w * h * sizeof *lab);
    unsigned char *data;
    uint32_t edge = argb((render_rgb_t){0.30, 0.30, 0.32}, 1.0);

    if (lab == NULL || cairo_surface_status(img) != CAIRO_STATUS_SUCCESS) goto done;
    for (int j = 0; j < h; j++)
        for (int i = 0; i < w; i++) {
            float x = sample(v, rw, rh, w, h, i, j);
            lab[(size_t)j * w + i] = isnan(x) || x < 0 ? -1 : (int32_t)lroundf(x);
        }
    cairo_surface_flush(img);
    data = cairo_image_surface_get_data(img);
    stride = cairo_image_surface_get_stride(img);
    for (int j = 0; j < h; j++) {
        uint32_t *row = (uint32_t *)(void *)(data + (size_t)j * stride);
        for (int i = 0; i < w; i++) {
            int32_t a = lab[(size_t)j * w + i];
            int border = (i + 1 < w && lab[(size_t)j * w + i + 1] != a) ||
                         (j + 1 < h && lab[(size_t)(j + 1) * w + i] != a);
            if (border) row[i] = edge;
            else row[i] = a < 0 ? 0 : argb(render_category((size_t)a), 1.0);
        }
    }
    cairo_surface_mark_dirty(img);
    paint_area(m, img);
done:
    free(lab);
    cairo_surface_destroy(img);
}

void render_map_blank(render_map_t *m, const float *mask, int rw, int rh)
{
    cairo_surface_t *img = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, m->v.w, m->v.h);
    uint32_t bg = argb(MAP_BACKGROUND, 1.0);
    unsigned char *data;
    int stride;

    if (cairo_surface_status(img) != CAIRO_STATUS_SUCCESS) {
        cairo_surface_destroy(img);
        return;
    }
    cairo_surface_flush(img);
    data = cairo_image_surface_get_data(img);
    stride = cairo_image_surface_get_stride(img);
    for (int j = 0; j < m->v.h; j++) {
        uint32_t *row = (uint32_t *)(void *)(data + (size_t)j * stride);
        for (int i = 0; i < m->v.w; i++)
            row[i] = isnan(sample(mask, rw, rh, m->v.w, m->v.h, i, j)) ? bg : 0;
    }
    cairo_surface_mark_dirty(img);
    paint_area(m, img);
    cairo_surface_destroy(img);
}

static void path_line(render_map_t *m, const render_lines_t *l, size_t i)
{
    for (size_t k = l->start[i]; k < l->start[i + 1]; k++) {
        double px, py;
        to_px(&m->v, l->x[k], l->y[k], &px, &py);
        if (k == l->start[i]) cairo_move_to(m->cr, px, py);
        else cairo_line_to(m->cr, px, py);
    }
}

void render_map_roads(render_map_t *m, const render_lines_t *l)
{
    static const double width[] = {0.7, 1.2, 2.2};
    static const double grey[] = {0.50, 0.38, 0.22};

    if (l == NULL) return;
    cairo_save(m->cr);
    cairo_rectangle(m->cr, m->v.ox, m->v.oy, m->v.w, m->v.h);
    cairo_clip(m->cr);
    cairo_set_line_cap(m->cr, CAIRO_LINE_CAP_ROUND);
    cairo_set_line_join(m->cr, CAIRO_LINE_JOIN_ROUND);
    for (int rank = 0; rank <= 2; rank++) {
        for (size_t i = 0; i < l->n; i++)
            if (l->rank[i] == rank) path_line(m, l, i);
        cairo_set_source_rgb(m->cr, grey[rank], grey[rank], grey[rank] + 0.02);
        cairo_set_line_width(m->cr, width[rank]);
        cairo_stroke(m->cr);
    }
    cairo_restore(m->cr);
}

void render_map_highlight(render_map_t *m, const render_lines_t *l, render_rgb_t colour,
                          double width_px)
{
    if (l == NULL) return;
    cairo_save(m->cr);
    cairo_rectangle(m->cr, m->v.ox, m->v.oy, m->v.w, m->v.h);
    cairo_clip(m->cr);
    cairo_set_line_cap(m->cr, CAIRO_LINE_CAP_ROUND);
    cairo_set_line_join(m->cr, CAIRO_LINE_JOIN_ROUND);
    for (size_t i = 0; i < l->n; i++) path_line(m, l, i);
    cairo_set_source_rgb(m->cr, 1, 1, 1);   /* halo so it stands out on any fill */
    cairo_set_line_width(m->cr, width_px + 3);
    cairo_stroke_preserve(m->cr);
    set_rgb(m->cr, colour);
    cairo_set_line_width(m->cr, width_px);
    cairo_stroke(m->cr);
    cairo_restore(m->cr);
}

static void halo_text(cairo_t *cr, double x, double y, const char *s)
{
    cairo_move_to(cr, x, y);
    cairo_text_path(cr, s);
    cairo_set_source_rgba(cr, 1, 1, 1, 0.9);
    cairo_set_line_width(cr, 3);
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
    cairo_stroke(cr);
    cairo_set_source_rgb(cr, 0.08, 0.08, 0.10);
    cairo_move_to(cr, x, y);
    cairo_show_text(cr, s);
}

void render_map_outlines(render_map_t *m, const render_lines_t *l, int labels)
{
    static const double dash[] = {6, 3};

    if (l == NULL) return;
    cairo_save(m->cr);
    cairo_rectangle(m->cr, m->v.ox, m->v.oy, m->v.w, m->v.h);
    cairo_clip(m->cr);
    for (size_t i = 0; i < l->n; i++) {
        path_line(m, l, i);
        cairo_close_path(m->cr);
    }
    cairo_set_source_rgba(m->cr, 0.15, 0.12, 0.20, 0.85);
    cairo_set_line_width(m->cr, 1.4);
    cairo_set_dash(m->cr, dash, 2, 0);
    cairo_stroke(m->cr);
    cairo_set_dash(m->cr, NULL, 0, 0);
    if (labels) {
        font(m->cr, 12, 1);
        for (size_t i = 0; i < l->n; i++) {
            double sx = 0, sy = 0, px, py;
            size_t k0 = l->start[i], k1 = l->start[i + 1], best = i;
            cairo_text_extents_t te;
            if (l->name[i] == NULL || k1 - k0 < 3) continue;
            /* Label only the largest ring of each name (multi-part districts). */
            for (size_t j = 0; j < l->n; j++)
                if (j != i && l->name[j] && strcmp(l->name[j], l->name[i]) == 0 &&
                    l->start[j + 1] - l->start[j] > k1 - k0) best = j;
            if (best != i) continue;
            for (size_t k = k0; k < k1; k++) {
                sx += l->x[k];
                sy += l->y[k];
            }
            to_px(&m->v, sx / (double)(k1 - k0), sy / (double)(k1 - k0), &px, &py);
            cairo_text_extents(m->cr, l->name[i], &te);
            halo_text(m->cr, px - te.x_advance / 2, py, l->name[i]);
        }
    }
    cairo_restore(m->cr);
}

void render_map_points(render_map_t *m, size_t n, const double *x, const double *y,
                       const double *value, double vmax, double rmax_px,
                       const render_rgb_t *fill, int one_fill)
{
    cairo_save(m->cr);
    cairo_rectangle(m->cr, m->v.ox, m->v.oy, m->v.w, m->v.h);
    cairo_clip(m->cr);
    for (size_t i = 0; i < n; i++) {
        double px, py, r = rmax_px;
        if (value != NULL && vmax > 0)
            r = rmax_px * sqrt(fmax(0, value[i]) / vmax);
        if (r < fmin(2.5, rmax_px)) r = fmin(2.5, rmax_px);   /* still visible */
        to_px(&m->v, x[i], y[i], &px, &py);
        cairo_new_path(m->cr);
        cairo_arc(m->cr, px, py, r, 0, 2 * M_PI);
        set_rgb(m->cr, fill[one_fill ? 0 : i]);
        if (r < 2.5) {   /* tiny marks: no outline, it would swamp the fill */
            cairo_fill(m->cr);
            continue;
        }
        cairo_fill_preserve(m->cr);
        cairo_set_source_rgb(m->cr, 0.08, 0.08, 0.10);
        cairo_set_line_width(m->cr, 1.0);
        cairo_stroke(m->cr);
    }
    cairo_restore(m->cr);
}

void render_map_rings(render_map_t *m, size_t n, const double *x, const double *y,
                      const int *mark, double r_px, render_rgb_t colour)
{
    cairo_save(m->cr);
    for (size_t i = 0; i < n; i++) {
        double px, py;
        if (mark != NULL && !mark[i]) continue;
        to_px(&m->v, x[i], y[i], &px, &py);
        cairo_new_path(m->cr);
        cairo_arc(m->cr, px, py, r_px, 0, 2 * M_PI);
        cairo_set_source_rgb(m->cr, 1, 1, 1);
        cairo_set_line_width(m->cr, 5);
        cairo_stroke_preserve(m->cr);
        set_rgb(m->cr, colour);
        cairo_set_line_width(m->cr, 2.5);
        cairo_stroke(m->cr);
    }
    cairo_restore(m->cr);
}

void render_map_labels(render_map_t *m, size_t n, const double *x, const double *y,
                       const char *const *text)
{
    if (n > 40) return;
    cairo_save(m->cr);
    font(m->cr, 11, 0);
    for (size_t i = 0; i < n; i++) {
        double px, py;
        if (text[i] == NULL) continue;
        to_px(&m->v, x[i], y[i], &px, &py);
        halo_text(m->cr, px + 7, py - 6, text[i]);
    }
    cairo_restore(m->cr);
}

void render_map_flows(render_map_t *m, size_t n, const double *x1, const double *y1,
                      const double *x2, const double *y2, const double *value, double vmax,
                      double wmax_px, render_rgb_t colour)
{
    cairo_save(m->cr);
    cairo_set_line_cap(m->cr, CAIRO_LINE_CAP_ROUND);
    for (size_t i = 0; i < n; i++) {
        double ax, ay, bx, by, wdt, dx, dy, len, hl;
        if (!(value[i] > 0)) continue;
        wdt = vmax > 0 ? wmax_px * value[i] / vmax : 1;
        if (wdt < 1) wdt = 1;
        to_px(&m->v, x1[i], y1[i], &ax, &ay);
        to_px(&m->v, x2[i], y2[i], &bx, &by);
        dx = bx - ax;
        dy = by - ay;
        len = hypot(dx, dy);
        if (len < 1) continue;
        dx /= len;
        dy /= len;
        hl = 6 + 1.5 * wdt;   /* arrow head length */
        cairo_move_to(m->cr, ax, ay);
        cairo_line_to(m->cr, bx - dx * hl, by - dy * hl);
        cairo_set_source_rgba(m->cr, colour.r, colour.g, colour.b, 0.85);
        cairo_set_line_width(m->cr, wdt);
        cairo_stroke(m->cr);
        cairo_move_to(m->cr, bx, by);
        cairo_line_to(m->cr, bx - dx * hl - dy * (wdt / 2 + 3), by - dy * hl + dx * (wdt / 2 + 3));
        cairo_line_to(m->cr, bx - dx * hl + dy * (wdt / 2 + 3), by - dy * hl - dx * (wdt / 2 + 3));
        cairo_close_path(m->cr);
        cairo_fill(m->cr);
    }
    cairo_restore(m->cr);
}

/* ---- legend ---------------------------------------------------------- */

static double legend_x(void)
{
    return RENDER_MAP_WIDTH - LEGEND_W + 4;
}

void render_legend_title(render_map_t *m, const char *text)
{
    cairo_set_source_rgb(m->cr, 0.10, 0.10, 0.12);
    font(m->cr, 13, 1);
    m->legend_y += 16;
    text_fit(m->cr, legend_x(), m->legend_y, text, LEGEND_W - 12);
    m->legend_y += 6;
}

void render_legend_swatch(render_map_t *m, render_rgb_t fill, const char *label)
{
    double x = legend_x(), y = m->legend_y + 3;

    cairo_rectangle(m->cr, x + 0.5, y + 0.5, 22, 13);
    set_rgb(m->cr, fill);
    cairo_fill_preserve(m->cr);
    cairo_set_source_rgb(m->cr, 0.35, 0.35, 0.38);
    cairo_set_line_width(m->cr, 1);
    cairo_stroke(m->cr);
    cairo_set_source_rgb(m->cr, 0.10, 0.10, 0.12);
    font(m->cr, 12, 0);
    text_fit(m->cr, x + 30, y + 12, label, LEGEND_W - 42);
    m->legend_y += 19;
}

void render_legend_scale(render_map_t *m, const render_scale_t *s)
{
    for (size_t k = 0; k < s->n; k++) {
        if (k == 0 && s->skip_first) continue;
        render_legend_swatch(m, s->colour[k], s->label[k]);
    }
    if (s->nodata_label[0]) render_legend_swatch(m, s->nodata, s->nodata_label);
}

void render_legend_line(render_map_t *m, render_rgb_t colour, double width, const char *label)
{
    double x = legend_x(), y = m->legend_y + 10;

    cairo_move_to(m->cr, x, y);
    cairo_line_to(m->cr, x + 22, y);
    set_rgb(m->cr, colour);
    cairo_set_line_width(m->cr, width);
    cairo_stroke(m->cr);
    cairo_set_source_rgb(m->cr, 0.10, 0.10, 0.12);
    font(m->cr, 12, 0);
    text_fit(m->cr, x + 30, y + 4, label, LEGEND_W - 42);
    m->legend_y += 19;
}

void render_legend_point(render_map_t *m, render_rgb_t fill, double r_px, int ring,
                         const char *label)
{
    double x = legend_x() + 11, y = m->legend_y + (r_px > 8 ? r_px + 4 : 10);

    /* Large reference circles centre on the swatch column's middle. */
    if (r_px > 11) x = legend_x() + r_px;
    cairo_new_path(m->cr);
    cairo_arc(m->cr, x, y, r_px, 0, 2 * M_PI);
    set_rgb(m->cr, fill);
    cairo_fill_preserve(m->cr);
    cairo_set_source_rgb(m->cr, 0.08, 0.08, 0.10);
    cairo_set_line_width(m->cr, 1);
    cairo_stroke(m->cr);
    if (ring) {
        cairo_arc(m->cr, x, y, r_px + 3.5, 0, 2 * M_PI);
        cairo_set_source_rgb(m->cr, 0.80, 0.15, 0.10);
        cairo_set_line_width(m->cr, 2.5);
        cairo_stroke(m->cr);
    }
    cairo_set_source_rgb(m->cr, 0.10, 0.10, 0.12);
    font(m->cr, 12, 0);
    text_fit(m->cr, fmax(legend_x() + 30, x + r_px + 8), y + 4, label, LEGEND_W - 42);
    m->legend_y += r_px > 8 ? 2 * r_px + 8 : 19;
}

void render_legend_sizes(render_map_t *m, double vmax, double rmax_px, const char *unit)
{
    double vals[3], p;
    char buf[64];

    if (!(vmax > 0)) return;
    /* Round reference values: the largest round number below vmax, then a
     * quarter and a twentieth of it. */
    p = pow(10.0, floor(log10(vmax)));
    vals[0] = floor(vmax / p) * p;
    vals[1] = vals[0] / 4;
    vals[2] = vals[0] / 20;
    for (int k = 0; k < 3; k++) {
        double r = rmax_px * sqrt(vals[k] / vmax);
        if (r < 2.5) continue;
        snprintf(buf, sizeof buf, "%.0f %s", vals[k], unit);
        render_legend_point(m, (render_rgb_t){1, 1, 1}, r, 0, buf);
    }
}

void render_legend_note(render_map_t *m, const char *text)
{
    cairo_set_source_rgb(m->cr, 0.30, 0.30, 0.33);
    font(m->cr, 11, 0);
    m->legend_y += 14;
    text_fit(m->cr, legend_x(), m->legend_y, text, LEGEND_W - 12);
    m->legend_y += 4;
}

/* ---- furniture and output -------------------------------------------- */

static void draw_north(render_map_t *m, double cx, double cy)
{
    cairo_t *cr = m->cr;

    cairo_new_path(cr);
    cairo_arc(cr, cx, cy, 19, 0, 2 * M_PI);
    cairo_set_source_rgba(cr, 1, 1, 1, 0.85);
    cairo_fill(cr);
    /* Two-tone arrow pointing up the grid (north-up grids only are drawn). */
    cairo_move_to(cr, cx, cy - 15);
    cairo_line_to(cr, cx - 7, cy + 9);
    cairo_line_to(cr, cx, cy + 4);
    cairo_close_path(cr);
    cairo_set_source_rgb(cr, 0.10, 0.10, 0.12);
    cairo_fill(cr);
    cairo_move_to(cr, cx, cy - 15);
    cairo_line_to(cr, cx + 7, cy + 9);
    cairo_line_to(cr, cx, cy + 4);
    cairo_close_path(cr);
    cairo_set_source_rgb(cr, 0.55, 0.55, 0.58);
    cairo_fill(cr);
    font(cr, 10, 1);
    cairo_set_source_rgb(cr, 0.10, 0.10, 0.12);
    cairo_move_to(cr, cx - 3.5, cy + 18);
    cairo_show_text(cr, "N");
}

static void draw_scale_bar(render_map_t *m, double x, double y)
{
    cairo_t *cr = m->cr;
    double len_m, len_px, max_px = fmin(220.0, 0.4 * m->v.w);
    char buf[48];

    render_scale_bar(m->v.m_per_px, max_px, &len_m, &len_px);
    m->lay.bar_x = x;
    m->lay.bar_y = y;
    m->lay.bar_px = len_px;
    m->lay.bar_m = len_m;
    if (!(len_px > 0)) return;
    /* Left half solid, right half open, outlined; drawn on whole pixels so
     * its ends are crisp (at most half a pixel from the exact length). */
    len_px = round(len_px);
    cairo_set_source_rgb(cr, 0.10, 0.10, 0.12);
    cairo_rectangle(cr, x, y - 7, round(len_px / 2), 7);
    cairo_fill(cr);
    cairo_rectangle(cr, x + 0.5, y - 6.5, len_px - 1, 6);
    cairo_set_line_width(cr, 1);
    cairo_stroke(cr);
    font(cr, 11, 0);
    cairo_move_to(cr, x - 3, y + 13);
    cairo_show_text(cr, "0");
    if (len_m >= 1000) snprintf(buf, sizeof buf, "%g km", len_m / 1000);
    else snprintf(buf, sizeof buf, "%g m", len_m);
    {
        cairo_text_extents_t te;
        cairo_text_extents(cr, buf, &te);
        cairo_move_to(cr, x + len_px - te.x_advance / 2, y + 13);
        cairo_show_text(cr, buf);
    }
}

int render_map_finish(render_map_t *m, const char *crs_name, const char *credits,
                      const char *date, const char *path, err_t *e)
{
    cairo_t *cr = m->cr;
    double fy = m->v.oy + m->v.h, tx = m->v.ox + 250;
    char buf[512], *tmp = NULL;
    cairo_status_t st;
    int rc = ERR_OK;

    /* Frame the map area. */
    cairo_rectangle(cr, m->v.ox - 0.5, m->v.oy - 0.5, m->v.w + 1, m->v.h + 1);
    cairo_set_source_rgb(cr, 0.35, 0.35, 0.38);
    cairo_set_line_width(cr, 1);
    cairo_stroke(cr);
    m->lay.north_x = m->v.ox + m->v.w - 26;
    m->lay.north_y = m->v.oy + 28;
    draw_north(m, m->lay.north_x, m->lay.north_y);
    draw_scale_bar(m, floor(m->v.ox + 10), floor(fy + 28));
    cairo_set_source_rgb(cr, 0.25, 0.25, 0.28);
    font(cr, 11, 0);
    snprintf(buf, sizeof buf, "Coordinate system: %s", crs_name && crs_name[0] ? crs_name : "unknown");
    text_fit(cr, tx, fy + 20, buf, RENDER_MAP_WIDTH - tx - MARGIN);
    snprintf(buf, sizeof buf, "Data: %s", credits && credits[0] ? credits : "as named in the scenario");
    text_fit(cr, tx, fy + 36, buf, RENDER_MAP_WIDTH - tx - MARGIN);
    snprintf(buf, sizeof buf, "Run: %s \xc2\xb7 sitereach %s \xc2\xb7 planning aid, check on the ground",
             date && date[0] ? date : "unknown", SITEREACH_VERSION);
    text_fit(cr, tx, fy + 52, buf, RENDER_MAP_WIDTH - tx - MARGIN);

    cairo_surface_flush(m->s);
    tmp = out_tmp_name(path);
    if (tmp == NULL) return err_set(e, ERR_NOMEM, "out of memory writing map '%s'", path);
    st = cairo_surface_write_to_png(m->s, tmp);
    if (st != CAIRO_STATUS_SUCCESS) {
        remove(tmp);
        rc = err_set(e, ERR_IO, "cannot write map '%s': %s", path, cairo_status_to_string(st));
        goto done;
    }
    rc = out_rename(tmp, path, e);
done:
    free(tmp);
    return rc;
}

void render_shutdown(void)
{
    cairo_debug_reset_static_data();
    FcFini();
}

int render_base64_file(const char *path, char **out, size_t *len, err_t *e)
{
    static const char tab[] = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    FILE *f = fopen(path, "rb");
    unsigned char *buf = NULL;
    char *s = NULL;
    long n;
    size_t k = 0;
    int rc = ERR_OK;

    *out = NULL;
    if (len) *len = 0;
    if (f == NULL) return err_set(e, ERR_IO, "cannot open '%s' to embed it", path);
    if (fseek(f, 0, SEEK_END) != 0 || (n = ftell(f)) < 0 || fseek(f, 0, SEEK_SET) != 0) {
        rc = err_set(e, ERR_IO, "cannot read '%s' to embed it", path);
        goto done;
    }
    buf = malloc((size_t)n + 1);
    s = malloc(((size_t)n + 2) / 3 * 4 + 1);
    if (buf == NULL || s == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory embedding '%s' (%ld bytes)", path, n);
        goto done;
    }
    if (fread(buf, 1, (size_t)n, f) != (size_t)n) {
        rc = err_set(e, ERR_IO, "cannot read '%s' to embed it", path);
        goto done;
    }
    for (size_t i = 0; i < (size_t)n; i += 3) {
        uint32_t v = (uint32_t)buf[i] << 16;
        size_t left = (size_t)n - i;
        if (left > 1) v |= (uint32_t)buf[i + 1] << 8;
        if (left > 2) v |= buf[i + 2];
        s[k++] = tab[(v >> 18) & 63];
        s[k++] = tab[(v >> 12) & 63];
        s[k++] = left > 1 ? tab[(v >> 6) & 63] : '=';
        s[k++] = left > 2 ? tab[v & 63] : '=';
    }
    s[k] = '\0';
    *out = s;
    s = NULL;
    if (len) *len = k;
done:
    free(buf);
    free(s);
    fclose(f);
    return rc;
}
