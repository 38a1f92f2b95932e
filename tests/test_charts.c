/* Tests for charts and the report's own helpers: stacked bars, bars with
 * negatives and the coverage curve drawn from arrays (sizes and pixel probes
 * at positions computed from the returned plot box), refusals of bad input,
 * HTML escaping, data credits, and report_write's failure paths. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cairo.h>

#include "charts.h"
#include "check.h"
#include "render.h"
#include "report.h"

static char dir[64];

static uint32_t pixel(cairo_surface_t *s, int x, int y)
{
    unsigned char *d = cairo_image_surface_get_data(s);
    return ((uint32_t *)(void *)(d + (size_t)y * cairo_image_surface_get_stride(s)))[x];
}

static int near_rgb(uint32_t px, render_rgb_t c, int tol)
{
    int r = (int)(px >> 16 & 255), g = (int)(px >> 8 & 255), b = (int)(px & 255);
    return abs(r - (int)lround(c.r * 255)) <= tol && abs(g - (int)lround(c.g * 255)) <= tol &&
           abs(b - (int)lround(c.b * 255)) <= tol;
}

static int white(uint32_t px)
{
    return (px & 0xffffff) == 0xffffff;
}

static void test_stacked(void)
{
    const char *groups[] = {"North Ward", "South Ward", "A very long district name that will not fit"};
    const char *series[] = {"0-30 min", "30-60 min", "over 60 min"};
    double v[] = {100, 50, 25, 0, 10, 300, 40, 40, 40};
    charts_stack_t c = {"People by band", "people", 3, groups, 3, series, v, CHARTS_RAMP, NULL};
    charts_box_t b;
    char png[128];
    err_t e = {0};
    cairo_surface_t *img;

    snprintf(png, sizeof png, "%s/stack.png", dir);
    CHECK(charts_stacked_bars(png, &c, &b, &e) == ERR_OK);
    img = cairo_image_surface_create_from_png(png);
    CHECK(cairo_surface_status(img) == CAIRO_STATUS_SUCCESS);
    CHECK(cairo_image_surface_get_width(img) == CHARTS_WIDTH);
    CHECK(cairo_image_surface_get_height(img) == b.img_h);
    /* Largest stack 310 people fills 1/1.05 of the plot width. */
    CHECK_NEAR(b.scale, (b.x1 - b.x0) / (310 * 1.05), 1e-9);
    {
        /* Row 0: 100 people of band 0 from x0, then 50 of band 1, 25 of band 2. */
        int y = (int)(b.y0 + b.row_h / 2);
        render_rgb_t c0 = render_ramp_cool(0.08), c1 = render_ramp_cool(0.54),
                     c2 = render_ramp_cool(1.0);
        CHECK(near_rgb(pixel(img, (int)(b.x0 + 50 * b.scale), y), c0, 2));
        CHECK(near_rgb(pixel(img, (int)(b.x0 + 125 * b.scale), y), c1, 2));
        CHECK(near_rgb(pixel(img, (int)(b.x0 + 162 * b.scale), y), c2, 2));
        CHECK(white(pixel(img, (int)(b.x0 + 180 * b.scale), y)));
        /* Row 1 starts with band 1 (band 0 is empty). */
        y = (int)(b.y0 + 1.5 * b.row_h);
        CHECK(near_rgb(pixel(img, (int)(b.x0 + 5 * b.scale), y), c1, 2));
        CHECK(near_rgb(pixel(img, (int)(b.x0 + 200 * b.scale), y), c2, 2));
    }
    cairo_surface_destroy(img);
    remove(png);

    v[4] = -1;
    CHECK(charts_stacked_bars(png, &c, NULL, &e) == ERR_INPUT);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "'South Ward', '30-60 min' is -1");
    v[4] = NAN;
    CHECK(charts_stacked_bars(png, &c, NULL, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "finite");
    v[4] = 10;
    c.n_groups = 0;
    CHECK(charts_stacked_bars(png, &c, NULL, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "0 bars");
    c.n_groups = 3;
    CHECK(charts_stacked_bars("/nonexistent/dir/x.png", &c, NULL, &e) == ERR_IO);
    CHECK(e.code == ERR_IO);
    CHECK_STR_HAS(e.msg, "/nonexistent/dir/x.png");
    /* Commodity stock per site uses the categorical palette: also drawn. */
    c.palette = CHARTS_CATEGORIES;
    CHECK(charts_stacked_bars(png, &c, NULL, &e) == ERR_OK);
    remove(png);
    /* Colours given by the caller (a map's scale) win over the palette. */
    {
        render_rgb_t own[3] = {{1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
        c.colours = own;
        CHECK(charts_stacked_bars(png, &c, &b, &e) == ERR_OK);
        img = cairo_image_surface_create_from_png(png);
        CHECK(near_rgb(pixel(img, (int)(b.x0 + 50 * b.scale), (int)(b.y0 + b.row_h / 2)), own[0], 0));
        CHECK(near_rgb(pixel(img, (int)(b.x0 + 200 * b.scale), (int)(b.y0 + 1.5 * b.row_h)), own[2], 0));
        cairo_surface_destroy(img);
        remove(png);
    }
}

static void test_bars(void)
{
    const char *names[] = {"baseline", "bridge closed", "rainy season"};
    double v[] = {0, -1200, 350};
    charts_box_t b;
    char png[128];
    err_t e = {0};
    cairo_surface_t *img;

    snprintf(png, sizeof png, "%s/bars.png", dir);
    CHECK(charts_bars(png, "Change in people within the limit", "people", 3, names, v, &b, &e) == ERR_OK);
    img = cairo_image_surface_create_from_png(png);
    CHECK(cairo_image_surface_get_width(img) == CHARTS_WIDTH);
    /* Zero line inside the plot; negative bar to its left in blue, positive right in orange. */
    CHECK(b.zero > b.x0 && b.zero < b.x1);
    CHECK_NEAR(b.zero, b.x0 + 1200 * 1.05 * b.scale, 1e-6);
    CHECK(near_rgb(pixel(img, (int)(b.zero - 600 * b.scale), (int)(b.y0 + 1.5 * b.row_h)),
                   render_ramp_diverging(-0.8), 2));
    CHECK(near_rgb(pixel(img, (int)(b.zero + 175 * b.scale), (int)(b.y0 + 2.5 * b.row_h)),
                   render_ramp_diverging(0.8), 2));
    cairo_surface_destroy(img);
    remove(png);
    v[2] = INFINITY;
    CHECK(charts_bars(png, "x", "people", 3, names, v, NULL, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "'rainy season' is not a finite number");
    CHECK(charts_bars(png, "x", "people", 0, names, v, NULL, &e) == ERR_INPUT);
}

static void test_curve(void)
{
    double cov[] = {40000, 65000, 80000, 88000, 92000};
    charts_box_t b;
    char png[128];
    err_t e = {0};
    cairo_surface_t *img;
    render_rgb_t bar = render_ramp_cool(0.25);

    snprintf(png, sizeof png, "%s/curve.png", dir);
    CHECK(charts_coverage_curve(png, "Coverage", 5, cov, 100000, &b, &e) == ERR_OK);
    img = cairo_image_surface_create_from_png(png);
    CHECK(cairo_image_surface_get_width(img) == CHARTS_WIDTH);
    CHECK(cairo_image_surface_get_height(img) == 440);
    {
        /* Marginal gain bars: site 2 adds 25,000; its bar's middle is that colour,
         * above it (the gain of site 2 ends at 25,000) is not. */
        double colw = (b.x1 - b.x0) / 5;
        int x = (int)(b.x0 + colw * 1.3);
        CHECK(near_rgb(pixel(img, x, (int)(b.y1 - 12000 * b.scale)), bar, 2));
        CHECK(!near_rgb(pixel(img, x, (int)(b.y1 - 30000 * b.scale)), bar, 2));
        /* Site 5 adds 4,000. */
        x = (int)(b.x0 + colw * 4.3);
        CHECK(near_rgb(pixel(img, x, (int)(b.y1 - 2000 * b.scale)), bar, 2));
        CHECK(!near_rgb(pixel(img, x, (int)(b.y1 - 6000 * b.scale)), bar, 2));
    }
    cairo_surface_destroy(img);
    remove(png);
    CHECK(charts_coverage_curve(png, "Coverage", 5, cov, 0, NULL, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "total people is 0");
    cov[2] = 200000;
    CHECK(charts_coverage_curve(png, "Coverage", 5, cov, 100000, NULL, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "with 3 sites is 200000");
    cov[2] = 80000;
    /* Sites added to existing ones covering 30,000: the first bar is the gain
     * over that floor (10,000), not all 40,000 covered. Hand-computed values. */
    CHECK(charts_coverage_curve_base(png, "Coverage", 5, cov, 30000, 100000, &b, &e) == ERR_OK);
    img = cairo_image_surface_create_from_png(png);
    {
        double colw = (b.x1 - b.x0) / 5;
        int x = (int)(b.x0 + colw * 0.3);
        CHECK(near_rgb(pixel(img, x, (int)(b.y1 - 5000 * b.scale)), bar, 2));
        CHECK(!near_rgb(pixel(img, x, (int)(b.y1 - 20000 * b.scale)), bar, 2));
        /* Site 2 still adds 25,000 over site 1. */
        x = (int)(b.x0 + colw * 1.3);
        CHECK(near_rgb(pixel(img, x, (int)(b.y1 - 12000 * b.scale)), bar, 2));
    }
    cairo_surface_destroy(img);
    remove(png);
    CHECK(charts_coverage_curve_base(png, "Coverage", 5, cov, 150000, 100000, NULL, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "covered before adding sites is 150000");
    CHECK(charts_coverage_curve_base(png, "Coverage", 5, cov, NAN, 100000, NULL, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "covered before adding sites is nan");
}

static void test_short(void)
{
    char buf[32];
    charts_fmt_short(950, buf, sizeof buf);
    CHECK(strcmp(buf, "950") == 0);
    charts_fmt_short(12500, buf, sizeof buf);
    CHECK(strcmp(buf, "12.5k") == 0);
    charts_fmt_short(3200000, buf, sizeof buf);
    CHECK(strcmp(buf, "3.2M") == 0);
    charts_fmt_short(0, buf, sizeof buf);
    CHECK(strcmp(buf, "0") == 0);
}

static void test_escape_credits(void)
{
    char buf[128];
    const char *osm[] = {"a/roads.osm.pbf"}, *osm2[] = {"x/burundi_health_facilities_osm2019.geojson"};
    const char *ghs[] = {"d/ghs_pop_burundi_250m_mollweide.tif", "d/central_burundi_roads_osm.geojson",
                         "d/more_osm.gpkg"};
    const char *none[] = {"scenarios/demo/roads.gpkg", "cosmos.tif", NULL};

    CHECK(report_escape("a<b & \"c\" 'd'>", buf, sizeof buf) == 42);
    CHECK(strcmp(buf, "a&lt;b &amp; &quot;c&quot; &#39;d&#39;&gt;") == 0);
    CHECK(report_escape("tab\there\x01", buf, sizeof buf) == 9);
    CHECK(strcmp(buf, "tab\there ") == 0);
    /* Truncation keeps a terminated string and reports the full need. */
    CHECK(report_escape("<<<<", buf, 6) == 16);
    CHECK(strlen(buf) == 5);

    report_credits(osm, 1, buf, sizeof buf);
    CHECK(strcmp(buf, "\xc2\xa9 OpenStreetMap contributors") == 0);
    report_credits(osm2, 1, buf, sizeof buf);
    CHECK_STR_HAS(buf, "OpenStreetMap");
    report_credits(ghs, 3, buf, sizeof buf);
    CHECK(strcmp(buf, "GHS-POP \xc2\xa9 European Union; \xc2\xa9 OpenStreetMap contributors") == 0);
    report_credits(none, 3, buf, sizeof buf);
    CHECK(strcmp(buf, "") == 0);
}

static void test_report_errors(void)
{
    report_result_t r;
    char sub[128], p[160];
    err_t e = {0};
    FILE *f;

    CHECK(report_write("/nonexistent/out", &r, &e) == ERR_IO);
    CHECK(e.code == ERR_IO);
    CHECK_STR_HAS(e.msg, "/nonexistent/out/summary.json");
    report_result_destroy(&r);

    snprintf(sub, sizeof sub, "%s/run", dir);
    if (mkdir(sub, 0755) != 0) {
        CHECK(0);
        return;
    }
    snprintf(p, sizeof p, "%s/summary.json", sub);
    f = fopen(p, "w");
    fputs("{\"command\": \"check\"}", f);
    fclose(f);
    CHECK(report_write(sub, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "no results to report");
    report_result_destroy(&r);

    f = fopen(p, "w");
    fputs("{\"reach\": {\"limit_min\": 60", f);
    fclose(f);
    CHECK(report_write(sub, &r, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "is not a JSON object");
    report_result_destroy(&r);

    /* A reach part whose rasters are gone. */
    f = fopen(p, "w");
    fputs("{\"reach\": {\"limit_min\": 60, \"people_total\": 10}, \"parameters\": {\"bands_min\": [30, 60]}}", f);
    fclose(f);
    CHECK(report_write(sub, &r, &e) == ERR_IO);
    CHECK_STR_HAS(e.msg, "travel_time.tif");
    report_result_destroy(&r);
    report_result_destroy(NULL);
    {
        char m[160];
        snprintf(m, sizeof m, "%s/maps", sub);
        rmdir(m);
    }
    remove(p);
    rmdir(sub);
}

int main(void)
{
    snprintf(dir, sizeof dir, "/tmp/test_charts_XXXXXX");
    if (mkdtemp(dir) == NULL) return 1;
    test_stacked();
    test_bars();
    test_curve();
    test_short();
    test_escape_credits();
    test_report_errors();
    rmdir(dir);
    render_shutdown();   /* font caches, so LeakSanitizer sees none */
    return CHECK_DONE("test_charts");
}
