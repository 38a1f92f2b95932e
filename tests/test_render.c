/* Tests for render: colours against published OKLab values, ramps with
 * monotonic lightness, classed scales, map geometry and the scale bar (probed
 * in the PNG and recomputed from the geotransform), raster reading with block
 * averaging, the density of people beyond a limit, vector reading, base64,
 * and the failure paths. Maps are drawn for a made grid and for the Burundi
 * population grid (GHS-POP © European Union) from SITEREACH_SHARED. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cairo.h>
#include <cpl_conv.h>
#include <cpl_error.h>
#include <gdal.h>
#include <ogr_srs_api.h>

#include "check.h"
#include "render.h"

static char dir[64];

static void path_in(char *buf, size_t n, const char *name)
{
    snprintf(buf, n, "%s/%s", dir, name);
}

/* A float32 GeoTIFF in UTM 36S (EPSG:32736) with cells of 'cell' metres. */
static void write_tif(const char *path, int nx, int ny, double cell, const float *v, double nodata)
{
    GDALDriverH drv = GDALGetDriverByName("GTiff");
    GDALDatasetH ds = GDALCreate(drv, path, nx, ny, 1, GDT_Float32, NULL);
    OGRSpatialReferenceH srs = OSRNewSpatialReference(NULL);
    double gt[6] = {400000, cell, 0, 9700000, 0, -cell};
    char *wkt = NULL;

    OSRImportFromEPSG(srs, 32736);
    OSRExportToWkt(srs, &wkt);
    GDALSetProjection(ds, wkt);
    GDALSetGeoTransform(ds, gt);
    GDALSetRasterNoDataValue(GDALGetRasterBand(ds, 1), nodata);
    if (GDALRasterIO(GDALGetRasterBand(ds, 1), GF_Write, 0, 0, nx, ny, (void *)v, nx, ny,
                     GDT_Float32, 0, 0) != CE_None)
        fprintf(stderr, "cannot write %s\n", path);
    GDALClose(ds);
    CPLFree(wkt);
    OSRDestroySpatialReference(srs);
}

static int near_rgb(uint32_t px, render_rgb_t c, int tol)
{
    int r = (int)(px >> 16 & 255), g = (int)(px >> 8 & 255), b = (int)(px & 255);
    return abs(r - (int)lround(c.r * 255)) <= tol && abs(g - (int)lround(c.g * 255)) <= tol &&
           abs(b - (int)lround(c.b * 255)) <= tol;
}

static uint32_t pixel(cairo_surface_t *s, int x, int y)
{
    unsigned char *d = cairo_image_surface_get_data(s);
    return ((uint32_t *)(void *)(d + (size_t)y * cairo_image_surface_get_stride(s)))[x];
}

static int dark(uint32_t px)
{
    return (int)(px >> 16 & 255) < 80 && (int)(px >> 8 & 255) < 80 && (int)(px & 255) < 80;
}

static void test_colours(void)
{
    double lab[3], prev;
    render_rgb_t c;
    char hex[8];

    /* Published: sRGB white is L=1, a=b=0; sRGB red is (0.627955, 0.224863,
     * 0.125846) in Ottosson's OKLab (values from memory of his post). */
    render_rgb_to_oklab((render_rgb_t){1, 1, 1}, lab);
    CHECK_NEAR(lab[0], 1.0, 1e-4);
    CHECK_NEAR(lab[1], 0.0, 1e-4);
    CHECK_NEAR(lab[2], 0.0, 1e-4);
    render_rgb_to_oklab((render_rgb_t){1, 0, 0}, lab);
    CHECK_NEAR(lab[0], 0.627955, 1e-3);
    CHECK_NEAR(lab[1], 0.224863, 1e-3);
    CHECK_NEAR(lab[2], 0.125846, 1e-3);
    /* Round trip of an in-gamut OKLCh colour. */
    c = render_oklch(0.7, 0.08, 200);
    render_rgb_to_oklab(c, lab);
    CHECK_NEAR(lab[0], 0.7, 2e-3);
    CHECK_NEAR(hypot(lab[1], lab[2]), 0.08, 2e-3);
    CHECK_NEAR(fmod(atan2(lab[2], lab[1]) * 180 / M_PI + 360, 360), 200, 1.0);
    /* Out of gamut: chroma shrinks, lightness stays. */
    c = render_oklch(0.9, 0.4, 30);
    render_rgb_to_oklab(c, lab);
    CHECK_NEAR(lab[0], 0.9, 3e-3);
    CHECK(c.r >= 0 && c.r <= 1 && c.g >= 0 && c.g <= 1 && c.b >= 0 && c.b <= 1);
    render_rgb_hex((render_rgb_t){1, 0.5, 0}, hex);
    CHECK(strcmp(hex, "#ff8000") == 0);

    /* Every ramp's lightness falls strictly from light to dark. */
    for (int ramp = 0; ramp < 2; ramp++) {
        int mono = 1;
        prev = 2;
        for (int k = 0; k <= 20; k++) {
            render_rgb_t x = ramp ? render_ramp_warm(k / 20.0) : render_ramp_cool(k / 20.0);
            render_rgb_to_oklab(x, lab);
            if (!(lab[0] < prev - 0.01)) mono = 0;
            prev = lab[0];
        }
        CHECK(mono);
    }
    /* Diverging: lightness falls with |t| on both sides; the two sides differ in hue. */
    {
        double l0[3], lneg[3], lpos[3];
        render_rgb_to_oklab(render_ramp_diverging(0), l0);
        render_rgb_to_oklab(render_ramp_diverging(-1), lneg);
        render_rgb_to_oklab(render_ramp_diverging(1), lpos);
        CHECK(l0[0] > lneg[0] + 0.3 && l0[0] > lpos[0] + 0.3);
        CHECK(lneg[2] < 0 && lpos[2] > 0);   /* blue side b < 0, orange side b > 0 */
        CHECK_NEAR(lneg[0], lpos[0], 0.02);  /* symmetric lightness */
    }
    /* Catchment tints: equal lightness, neighbours differ. */
    render_rgb_to_oklab(render_category(0), lab);
    prev = lab[0];
    render_rgb_to_oklab(render_category(1), lab);
    CHECK_NEAR(lab[0], prev, 0.01);
}

static void test_scales(void)
{
    render_scale_t s;
    err_t e = {0};
    double b3[] = {30, 60, 120}, bad[] = {30, 30}, st[] = {5, 15, 30};

    CHECK(render_scale_bands(&s, b3, 3, &e) == ERR_OK);
    CHECK(s.n == 4);
    CHECK(strcmp(s.label[0], "0 to 30 min") == 0);
    CHECK(strcmp(s.label[3], "over 120 min") == 0);
    CHECK(render_scale_class(&s, 0) == 0);
    CHECK(render_scale_class(&s, 29.99) == 0);
    CHECK(render_scale_class(&s, 30) == 1);
    CHECK(render_scale_class(&s, 119.9) == 2);
    CHECK(render_scale_class(&s, 5000) == 3);
    CHECK(render_scale_class(&s, NAN) == -1);
    CHECK(s.nodata_label[0] != '\0');
    CHECK(render_scale_bands(&s, bad, 2, &e) == ERR_INPUT);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "band limit 2 (30 min)");
    CHECK(render_scale_bands(&s, b3, 0, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "0 time bands");

    CHECK(render_scale_diverging(&s, st, 3, &e) == ERR_OK);
    CHECK(s.n == 7);
    CHECK(render_scale_class(&s, -100) == 0);
    CHECK(render_scale_class(&s, -20) == 1);
    CHECK(render_scale_class(&s, 0) == 3);
    CHECK(render_scale_class(&s, 4.9) == 3);
    CHECK(render_scale_class(&s, 5) == 4);
    CHECK(render_scale_class(&s, 31) == 6);
    CHECK_STR_HAS(s.label[0], "30 min or more faster");
    CHECK_STR_HAS(s.label[3], "within 5 min");
    CHECK_STR_HAS(s.label[5], "15 to 30 min slower");
    CHECK(render_scale_diverging(&s, st, 0, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "0 diverging steps");
    {
        double neg[] = {-5};
        CHECK(render_scale_diverging(&s, neg, 1, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "step 1 (-5 min)");
    }
    render_scale_density(&s);
    CHECK(s.skip_first == 1);
    CHECK(render_scale_class(&s, 0.5) == 0);
    CHECK(render_scale_class(&s, 3000) == (int)s.n - 1);
}

static void test_geometry(void)
{
    double len_m, len_px;
    render_view_t v;
    err_t e = {0};
    double gt_south[6] = {0, 100, 0, 0, 0, 100}, gt_rot[6] = {0, 100, 1, 0, 0, -100};
    double gt_geo[6] = {30, 0.01, 0, 1, 0, -0.01};

    /* Round lengths: 1, 2 or 5 times a power of ten, never longer than allowed. */
    render_scale_bar(25, 200, &len_m, &len_px);
    CHECK_NEAR(len_m, 5000, 1e-9);
    CHECK_NEAR(len_px, 200, 1e-9);
    render_scale_bar(13.7, 220, &len_m, &len_px);
    CHECK_NEAR(len_m, 2000, 1e-9);
    CHECK_NEAR(len_px, 2000 / 13.7, 1e-9);
    render_scale_bar(1, 99, &len_m, &len_px);
    CHECK_NEAR(len_m, 50, 1e-9);
    render_scale_bar(0, 99, &len_m, &len_px);
    CHECK(len_m == 0 && len_px == 0);

    CHECK(render_view_fit(gt_south, 10, 10, 0, 1, 0, 0, 100, 100, &v, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "not a north-up raster");
    CHECK(render_view_fit(gt_rot, 10, 10, 0, 1, 0, 0, 100, 100, &v, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "rotated");
    /* Geographic: 100 columns of 0.01 degree near the equator. The length of
     * one degree of longitude on the WGS84 equator is 111,319.49 m (published
     * ellipsoid figure, from memory); at 0.5 degrees north it is cos-scaled
     * by the ellipsoid, within 0.01%. */
    CHECK(render_view_fit(gt_geo, 100, 100, 1, 1, 0, 0, 500, 500, &v, &e) == ERR_OK);
    CHECK(v.w == 500 && v.h == 500);
    CHECK_REL(v.m_per_px, 111319.49 * cos(0.5 * M_PI / 180) / 500, 2e-4);
}

/* Draw a map of a made 240 x 120 grid of 100 m cells and probe its PNG. */
static void test_map_made(void)
{
    enum { NX = 240, NY = 120 };
    float *v = malloc(NX * NY * sizeof *v), *pop = malloc(NX * NY * sizeof *pop), *rd = NULL;
    char tt[128], pp[128], png[128];
    render_map_t *m = NULL;
    render_layout_t l;
    render_scale_t s;
    double bands[] = {30, 60, 120}, gt[6], mpu, beyond = 0;
    int nx, ny, geo;
    err_t e = {0};
    cairo_surface_t *img;

    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            v[r * NX + c] = (float)c;        /* minutes grow eastwards */
            pop[r * NX + c] = 1.0f;          /* one person per 100 m cell */
        }
    v[0] = -1;   /* one cell without a path (nodata) */
    path_in(tt, sizeof tt, "tt.tif");
    path_in(pp, sizeof pp, "pop.tif");
    path_in(png, sizeof png, "map.png");
    write_tif(tt, NX, NY, 100, v, -1);
    write_tif(pp, NX, NY, 100, pop, -9999);

    CHECK(render_raster_info(tt, &nx, &ny, gt, &geo, &mpu, NULL, &e) == ERR_OK);
    CHECK(nx == NX && ny == NY && geo == 0);
    CHECK_NEAR(mpu, 1, 0);
    /* Block averaging: 2 x 2 cells per pixel; pixel (c, r) holds the mean of
     * columns 2c and 2c+1 = 2c + 0.5; the nodata cell is skipped. */
    CHECK(render_read_band(tt, NX / 2, NY / 2, RENDER_AVERAGE, &rd, &e) == ERR_OK);
    if (rd) {
        CHECK_NEAR(rd[5], 10.5, 1e-4);
        CHECK_NEAR(rd[NX / 2 + 7], 14.5, 1e-4);
        CHECK_NEAR(rd[0], 2.0 / 3.0, 1e-4);   /* (1 + 0 + 1) / 3 with cell 0 nodata */
    }
    free(rd);
    rd = NULL;

    /* Density beyond 100 min: columns > 100 and the nodata cell; 1 person per
     * 0.01 km2 = 100 per km2. Pixels of 4 x 4 cells. */
    CHECK(render_density_beyond(pp, tt, 100, NX / 4, NY / 4, &rd, &beyond, &e) == ERR_OK);
    if (rd) {
        CHECK_NEAR(beyond, (double)(NX - 101) * NY + 1, 1e-6);
        CHECK_NEAR(rd[(NY / 4 - 1) * (NX / 4) + NX / 4 - 1], 100, 1e-3);  /* far east */
        CHECK_NEAR(rd[1], 0, 1e-9);                                        /* near, west */
        CHECK_NEAR(rd[0], 100.0 / 16, 1e-3);                               /* 1 of 16 cells */
        CHECK_NEAR(rd[25], 100.0 * 3 / 4, 1e-3);  /* columns 100..103: 101, 102, 103 beyond */
    }
    free(rd);
    rd = NULL;

    CHECK(render_map_new(gt, NX, NY, 0, 1, "Made grid", &m, &e) == ERR_OK);
    if (m == NULL) goto done;
    render_map_layout(m, &l);
    CHECK(render_scale_bands(&s, bands, 3, &e) == ERR_OK);
    CHECK(render_read_band(tt, l.view.w < NX ? l.view.w : NX, l.view.h < NY ? l.view.h : NY,
                           RENDER_AVERAGE, &rd, &e) == ERR_OK);
    if (rd) render_map_raster(m, rd, l.view.w < NX ? l.view.w : NX, l.view.h < NY ? l.view.h : NY, &s);
    render_legend_title(m, "Minutes");
    render_legend_scale(m, &s);
    CHECK(render_map_finish(m, "WGS 84 / UTM zone 36S", "test", "2026-01-01", png, &e) == ERR_OK);
    render_map_layout(m, &l);

    img = cairo_image_surface_create_from_png(png);
    CHECK(cairo_surface_status(img) == CAIRO_STATUS_SUCCESS);
    if (cairo_surface_status(img) == CAIRO_STATUS_SUCCESS) {
        /* Size: fixed width; map area from the geotransform (24 km x 12 km into
         * at most 718 x 820 px: 718 px wide, 359 high). */
        double upp = fmax(NX * 100.0 / (RENDER_MAP_WIDTH - 250 - 32), NY * 100.0 / 820);
        double want_m, want_px;
        int left = -1, right = -1, y = (int)l.bar_y - 3, found = 0;
        CHECK(cairo_image_surface_get_width(img) == RENDER_MAP_WIDTH);
        CHECK(l.view.w == 718 && l.view.h == 359);
        CHECK(cairo_image_surface_get_height(img) == l.img_h);
        /* Scale bar: recomputed from the geotransform alone, then measured. */
        render_scale_bar(upp, fmin(220.0, 0.4 * l.view.w), &want_m, &want_px);
        CHECK_NEAR(l.bar_m, want_m, 1e-9);
        CHECK_NEAR(l.bar_px, want_px, 1e-9);
        for (int x = (int)l.bar_x - 5; x < (int)(l.bar_x + l.bar_px) + 5; x++)
            if (dark(pixel(img, x, y))) {
                if (left < 0) left = x;
                right = x;
            }
        CHECK_NEAR(right - left + 1, want_px, 1.0);
        CHECK_NEAR(left, l.bar_x, 1.0);
        /* Legend: the first class's swatch is in the legend column. */
        for (int yy = (int)l.legend_y; yy < (int)l.legend_y + 120; yy++)
            if (near_rgb(pixel(img, (int)l.legend_x + 11, yy), s.colour[0], 2)) found = 1;
        CHECK(found);
        /* North arrow: dark at its left half. */
        CHECK(dark(pixel(img, (int)l.north_x - 2, (int)l.north_y)));
        /* Raster: the west edge (under 30 min) and the east (over 120 min). */
        CHECK(near_rgb(pixel(img, (int)l.view.ox + 40, (int)l.view.oy + 100), s.colour[0], 2));
        CHECK(near_rgb(pixel(img, (int)l.view.ox + l.view.w - 60, (int)l.view.oy + 300), s.colour[3], 2));
    }
    cairo_surface_destroy(img);
done:
    free(rd);
    render_map_free(m);
    free(v);
    free(pop);
    remove(tt);
    remove(pp);
    remove(png);
}

/* Burundi: a Mollweide grid of 250 m cells; map size and scale bar. */
static void test_map_burundi(void)
{
    const char *sh = getenv("SITEREACH_SHARED");
    char pop[512], png[128];
    double gt[6], mpu, len_m, len_px, upp;
    int nx, ny, geo, rw, rh;
    render_map_t *m = NULL;
    render_layout_t l;
    render_scale_t s;
    float *v = NULL;
    err_t e = {0};

    snprintf(pop, sizeof pop, "%s/data/real/burundi/ghs_pop_burundi_250m_mollweide.tif",
             sh ? sh : "../shared");
    path_in(png, sizeof png, "bdi.png");
    if (render_raster_info(pop, &nx, &ny, gt, &geo, &mpu, NULL, &e) != ERR_OK) {
        fprintf(stderr, "Burundi data missing: %s\n", e.msg);
        CHECK(0);
        return;
    }
    CHECK(geo == 0);
    CHECK(render_map_new(gt, nx, ny, 0, mpu, "Burundi", &m, &e) == ERR_OK);
    if (m == NULL) return;
    render_map_layout(m, &l);
    rw = l.view.w < nx ? l.view.w : nx;
    rh = l.view.h < ny ? l.view.h : ny;
    CHECK(rw < nx || rh < ny);   /* the grid is larger than the map: averaged */
    CHECK(render_read_band(pop, rw, rh, RENDER_AVERAGE, &v, &e) == ERR_OK);
    render_scale_density(&s);
    if (v) {
        /* People per pixel-average cell -> per km2 of a 250 m cell (16 per km2). */
        for (size_t i = 0; i < (size_t)rw * rh; i++) v[i] *= 16.0f;
        render_map_raster(m, v, rw, rh, &s);
    }
    render_legend_scale(m, &s);
    CHECK(render_map_finish(m, "Mollweide", "GHS-POP \xc2\xa9 European Union", "today", png, &e) == ERR_OK);
    render_map_layout(m, &l);
    upp = fmax(nx * gt[1] / (RENDER_MAP_WIDTH - 250 - 32), ny * -gt[5] / 820);
    render_scale_bar(upp * mpu, fmin(220.0, 0.4 * l.view.w), &len_m, &len_px);
    CHECK_NEAR(l.bar_px, len_px, 1e-9);
    CHECK_NEAR(l.bar_m, len_m, 1e-9);
    CHECK(l.img_w == RENDER_MAP_WIDTH && l.view.h <= 820 && l.view.w <= 718);
    {
        cairo_surface_t *img = cairo_image_surface_create_from_png(png);
        CHECK(cairo_image_surface_get_width(img) == l.img_w);
        CHECK(cairo_image_surface_get_height(img) == l.img_h);
        cairo_surface_destroy(img);
    }
    free(v);
    render_map_free(m);
    remove(png);
}

/* The primitives later sections use: a diverging raster (minutes gained or
 * lost), flows weighted by a value, highlighted roads, sized points, rings. */
static void test_primitives(void)
{
    enum { NX = 100, NY = 100 };
    double gt[6] = {0, 100, 0, 10000, 0, -100};   /* 10 km square, 100 m cells */
    float *v = malloc(NX * NY * sizeof *v);
    render_map_t *m = NULL;
    render_layout_t l;
    render_scale_t s;
    render_lines_t road = {0};
    double steps[] = {5, 15, 30};
    double fx1[] = {1000, 1000}, fy1[] = {9000, 5000}, fx2[] = {9000, 9000}, fy2[] = {9000, 5000};
    double fv[] = {400, 100}, px[] = {5000, 2000}, py[] = {2000, 2000}, pv[] = {900, 100};
    double rx[] = {0, 10000}, ry[] = {7000, 7000};
    size_t rstart[] = {0, 2};
    int rrank[] = {1}, mark[] = {1, 0};
    char *rname[] = {NULL};
    render_rgb_t flow = {0.1, 0.2, 0.8}, hl = {0.9, 0.1, 0.6}, pf = {0.2, 0.7, 0.3};
    char png[128];
    err_t e = {0};
    cairo_surface_t *img;

    /* West half 20 min faster, east half 40 min slower. */
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) v[r * NX + c] = c < NX / 2 ? -20.0f : 40.0f;
    road.n = 1;
    road.start = rstart;
    road.x = rx;
    road.y = ry;
    road.rank = rrank;
    road.name = rname;
    path_in(png, sizeof png, "prim.png");
    CHECK(render_scale_diverging(&s, steps, 3, &e) == ERR_OK);
    CHECK(render_map_new(gt, NX, NY, 0, 1, "Primitives", &m, &e) == ERR_OK);
    if (m == NULL) goto done;
    render_map_raster(m, v, NX, NY, &s);
    {
        /* Blank the westmost 5 columns (500 m), as outside the population data. */
        float *mask = calloc(NX * NY, sizeof *mask);
        for (int r = 0; r < NY; r++)
            for (int c = 0; c < 5; c++) mask[r * NX + c] = NAN;
        render_map_blank(m, mask, NX, NY);
        free(mask);
    }
    render_map_highlight(m, &road, hl, 4);
    render_map_flows(m, 2, fx1, fy1, fx2, fy2, fv, 400, 12, flow);
    render_map_points(m, 2, px, py, pv, 900, 20, &pf, 1);
    render_map_rings(m, 2, px, py, mark, 24, hl);
    render_legend_scale(m, &s);
    render_legend_sizes(m, 900, 20, "people");
    CHECK(render_map_finish(m, "local metres", "", "", png, &e) == ERR_OK);
    render_map_layout(m, &l);
    img = cairo_image_surface_create_from_png(png);
    if (cairo_surface_status(img) == CAIRO_STATUS_SUCCESS) {
        double k = 1.0 / l.view.upp;   /* pixels per metre */
        int ox = (int)l.view.ox, oy = (int)l.view.oy;
        /* Blanked strip: the map background, not a class colour. */
        CHECK(near_rgb(pixel(img, ox + (int)(250 * k), oy + (int)(6000 * k)),
                       ((render_rgb_t){0.965, 0.960, 0.950}), 1));
        CHECK(near_rgb(pixel(img, ox + (int)(700 * k), oy + (int)(6000 * k)), s.colour[1], 2));
        /* Diverging classes: 15-30 faster (class 1) west, 30+ slower (class 6) east. */
        CHECK(near_rgb(pixel(img, ox + (int)(1500 * k), oy + (int)(6000 * k)), s.colour[1], 2));
        CHECK(near_rgb(pixel(img, ox + (int)(8500 * k), oy + (int)(6000 * k)), s.colour[6], 2));
        /* Highlighted road along y = 7000 m (3000 m from the top). */
        CHECK(near_rgb(pixel(img, ox + (int)(3000 * k), oy + (int)(3000 * k)), hl, 2));
        /* Flow of 400 (full width 12 px) at y = 9000 m, its middle; the thinner
         * flow of 100 is 3 px wide: its centre line still carries the colour
         * (drawn at 85% over the raster, so compare loosely). */
        {
            uint32_t p1 = pixel(img, ox + (int)(5000 * k), oy + (int)(1000 * k));
            uint32_t p2 = pixel(img, ox + (int)(5000 * k), oy + (int)(1000 * k) + 5);
            uint32_t p3 = pixel(img, ox + (int)(5000 * k), oy + (int)(1000 * k) + 9);
            CHECK((p1 & 255) > 150 && (p1 >> 16 & 255) < 80);
            CHECK((p2 & 255) > 150 && (p2 >> 16 & 255) < 80);   /* within 6 px of centre */
            CHECK(!((p3 & 255) > 150 && (p3 >> 16 & 255) < 80)); /* beyond it */
        }
        /* Sized points: area by value; 900 -> radius 20 px, 100 -> 6.7 px. */
        CHECK(near_rgb(pixel(img, ox + (int)(5000 * k) + 15, oy + (int)(8000 * k)), pf, 2));
        CHECK(near_rgb(pixel(img, ox + (int)(2000 * k) + 5, oy + (int)(8000 * k)), pf, 2));
        CHECK(!near_rgb(pixel(img, ox + (int)(2000 * k) + 9, oy + (int)(8000 * k)), pf, 2));
        /* Ring of radius 24 around the marked point only. */
        CHECK(near_rgb(pixel(img, ox + (int)(5000 * k) + 24, oy + (int)(8000 * k)), hl, 40));
        CHECK(!near_rgb(pixel(img, ox + (int)(2000 * k) + 24, oy + (int)(8000 * k)), hl, 40));
    } else {
        CHECK(0);
    }
    cairo_surface_destroy(img);
done:
    render_map_free(m);
    free(v);
    if (getenv("KEEP_PNG") == NULL) remove(png);
    else printf("kept %s\n", png);
}

static void test_vectors(void)
{
    char gj[128], poly[128];
    FILE *f;
    render_lines_t *l = NULL;
    OGRSpatialReferenceH srs = OSRNewSpatialReference(NULL);
    char *wkt = NULL;
    err_t e = {0};

    OSRImportFromEPSG(srs, 32736);
    OSRExportToWkt(srs, &wkt);
    path_in(gj, sizeof gj, "roads.geojson");
    path_in(poly, sizeof poly, "wards.geojson");
    f = fopen(gj, "w");
    fputs("{\"type\":\"FeatureCollection\",\"features\":["
          "{\"type\":\"Feature\",\"properties\":{\"highway\":\"primary\"},\"geometry\":{\"type\":\"LineString\",\"coordinates\":[[33,-3],[33.01,-3.01]]}},"
          "{\"type\":\"Feature\",\"properties\":{\"highway\":\"track\"},\"geometry\":{\"type\":\"MultiLineString\",\"coordinates\":[[[33,-3],[33,-3.02]],[[33.1,-3],[33.1,-3.1],[33.2,-3.1]]]}},"
          "{\"type\":\"Feature\",\"properties\":{\"highway\":\"residential\"},\"geometry\":null}]}", f);
    fclose(f);
    f = fopen(poly, "w");
    fputs("{\"type\":\"FeatureCollection\",\"features\":["
          "{\"type\":\"Feature\",\"properties\":{\"name\":\"North <Ward>\"},\"geometry\":{\"type\":\"Polygon\",\"coordinates\":[[[33,-3],[33.1,-3],[33.1,-3.1],[33,-3]]]}}]}", f);
    fclose(f);

    CHECK(render_lines_load(gj, NULL, "highway", NULL, wkt, &l, &e) == ERR_OK);
    if (l) {
        CHECK(l->n == 3);   /* one line + two parts; the null geometry adds none */
        CHECK(l->rank[0] == 2 && l->rank[1] == 0 && l->rank[2] == 0);
        CHECK(l->start[3] == 7);
        /* Longitude 33 E is UTM zone 36's central meridian: easting 500,000 m
         * exactly (false easting of every UTM zone). */
        CHECK_NEAR(l->x[0], 500000, 1e-3);
        CHECK(l->y[0] > 9.6e6 && l->y[0] < 9.7e6);
    }
    render_lines_free(l);
    l = NULL;
    CHECK(render_lines_load(poly, NULL, NULL, "name", wkt, &l, &e) == ERR_OK);
    if (l) {
        CHECK(l->n == 1);
        CHECK(l->name[0] && strcmp(l->name[0], "North <Ward>") == 0);
        CHECK(l->start[1] == 4);
    }
    render_lines_free(l);
    l = NULL;
    CHECK(render_lines_load("/nonexistent/roads.gpkg", NULL, "highway", NULL, wkt, &l, &e) == ERR_IO);
    CHECK(e.code == ERR_IO);
    CHECK_STR_HAS(e.msg, "/nonexistent/roads.gpkg");
    CHECK(l == NULL);
    CHECK(render_lines_load(gj, "no_such_layer", "highway", NULL, wkt, &l, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "no_such_layer");
    render_lines_free(NULL);
    remove(gj);
    remove(poly);
    CPLFree(wkt);
    OSRDestroySpatialReference(srs);
}

static void test_io_errors(void)
{
    float *v = NULL;
    double beyond;
    char small[128], big[128], txt[128];
    float a[4] = {1, 2, 3, 4}, b[9] = {0};
    int nx, ny, geo;
    double gt[6], mpu;
    err_t e = {0};
    FILE *f;

    CHECK(render_read_band("/nonexistent/tt.tif", 10, 10, RENDER_AVERAGE, &v, &e) == ERR_IO);
    CHECK_STR_HAS(e.msg, "/nonexistent/tt.tif");
    CHECK(v == NULL);
    path_in(txt, sizeof txt, "notes.txt");
    f = fopen(txt, "w");
    fputs("not a raster\n", f);
    fclose(f);
    CHECK(render_raster_info(txt, &nx, &ny, gt, &geo, &mpu, NULL, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "notes.txt");
    path_in(small, sizeof small, "a.tif");
    path_in(big, sizeof big, "b.tif");
    write_tif(small, 2, 2, 100, a, -1);
    write_tif(big, 3, 3, 100, b, -1);
    CHECK(render_density_beyond(big, small, 10, 1, 1, &v, &beyond, &e) == ERR_INPUT);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "is 3 x 3 cells but travel times");
    CHECK(v == NULL);
    remove(small);
    remove(big);
    remove(txt);
}

static void test_base64(void)
{
    /* RFC 4648 section 10 test vectors. */
    static const char *in[] = {"", "f", "fo", "foo", "foob", "fooba", "foobar"};
    static const char *out[] = {"", "Zg==", "Zm8=", "Zm9v", "Zm9vYg==", "Zm9vYmE=", "Zm9vYmFy"};
    char p[128];
    err_t e = {0};

    path_in(p, sizeof p, "b64.bin");
    for (size_t i = 0; i < 7; i++) {
        FILE *f = fopen(p, "wb");
        char *s = NULL;
        size_t n = 0;
        fputs(in[i], f);
        fclose(f);
        CHECK(render_base64_file(p, &s, &n, &e) == ERR_OK);
        CHECK(s != NULL && strcmp(s, out[i]) == 0);
        CHECK(n == strlen(out[i]));
        free(s);
    }
    remove(p);
    {
        char *s = NULL;
        CHECK(render_base64_file("/nonexistent/x.png", &s, NULL, &e) == ERR_IO);
        CHECK_STR_HAS(e.msg, "/nonexistent/x.png");
    }
}

int main(void)
{
    snprintf(dir, sizeof dir, "/tmp/test_render_XXXXXX");
    if (mkdtemp(dir) == NULL) return 1;
    GDALAllRegister();
    CPLSetErrorHandler(CPLQuietErrorHandler);
    test_colours();
    test_scales();
    test_geometry();
    test_map_made();
    test_map_burundi();
    test_primitives();
    test_vectors();
    test_io_errors();
    test_base64();
    rmdir(dir);
    GDALDestroyDriverManager();
    render_shutdown();   /* font caches, so LeakSanitizer sees none */
    return CHECK_DONE("test_render");
}
