/* charts: bar charts and the coverage curve with cairo (see include/charts.h).
 * Every chart is CHARTS_WIDTH pixels wide; its height follows the number of
 * rows. Colours come from render's palettes so maps and charts agree. */
#include "charts.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cairo.h>

#include "output.h"
#include "render.h"
#include "render_internal.h"

#define FONT "DejaVu Sans"
#define LABEL_W 210.0   /* room for group names left of the bars */
#define RIGHT 40.0
#define ROW_H 26.0
#define TITLE_H 40.0

void charts_fmt_short(double v, char *buf, size_t n)
{
    double a = fabs(v);

    if (a >= 1e6) snprintf(buf, n, "%.3gM", v / 1e6);
    else if (a >= 1e4) snprintf(buf, n, "%.3gk", v / 1e3);
    else if (a >= 100 || a == 0) snprintf(buf, n, "%.0f", v);
    else snprintf(buf, n, "%.3g", v);
}

/* A round tick step giving about 'want' ticks up to 'max'. */
static double nice_step(double max, int want)
{
    double raw = max / want, p = pow(10.0, floor(log10(raw))), f = raw / p;

    if (f <= 1) return p;
    if (f <= 2) return 2 * p;
    if (f <= 5) return 5 * p;
    return 10 * p;
}

static void font(cairo_t *cr, double size, int bold)
{
    cairo_select_font_face(cr, FONT, CAIRO_FONT_SLANT_NORMAL,
                           bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(cr, size);
}

static void ink(cairo_t *cr)
{
    cairo_set_source_rgb(cr, 0.10, 0.10, 0.12);
}

static void text_right(cairo_t *cr, double x, double y, const char *s, double max_w)
{
    cairo_text_extents_t te;
    char buf[256];

    render_fit_text(cr, s, max_w, buf, sizeof buf);
    cairo_text_extents(cr, buf, &te);
    cairo_move_to(cr, x - te.x_advance, y);
    cairo_show_text(cr, buf);
}

static void text_center(cairo_t *cr, double x, double y, const char *s)
{
    cairo_text_extents_t te;
    cairo_text_extents(cr, s, &te);
    cairo_move_to(cr, x - te.x_advance / 2, y);
    cairo_show_text(cr, s);
}

typedef struct canvas {
    cairo_surface_t *s;
    cairo_t *cr;
    int w, h;
} canvas_t;

static int canvas_open(canvas_t *c, int h, const char *title, err_t *e)
{
    c->w = CHARTS_WIDTH;
    c->h = h;
    c->s = cairo_image_surface_create(CAIRO_FORMAT_RGB24, c->w, c->h);
    c->cr = cairo_create(c->s);
    if (cairo_status(c->cr) != CAIRO_STATUS_SUCCESS)
        return err_set(e, ERR_NOMEM, "cannot make a %d x %d chart image", c->w, c->h);
    cairo_set_source_rgb(c->cr, 1, 1, 1);
    cairo_paint(c->cr);
    ink(c->cr);
    font(c->cr, 17, 1);
    cairo_move_to(c->cr, 16, 27);
    cairo_show_text(c->cr, title ? title : "");
    return ERR_OK;
}

static int canvas_save(canvas_t *c, const char *png, err_t *e)
{
    char *tmp = out_tmp_name(png);
    cairo_status_t st;
    int rc;

    if (tmp == NULL) return err_set(e, ERR_NOMEM, "out of memory writing chart '%s'", png);
    cairo_surface_flush(c->s);
    st = cairo_surface_write_to_png(c->s, tmp);
    if (st != CAIRO_STATUS_SUCCESS) {
        remove(tmp);
        rc = err_set(e, ERR_IO, "cannot write chart '%s': %s", png, cairo_status_to_string(st));
    } else {
        rc = out_rename(tmp, png, e);
    }
    free(tmp);
    return rc;
}

static void canvas_close(canvas_t *c)
{
    if (c->cr) cairo_destroy(c->cr);
    if (c->s) cairo_surface_destroy(c->s);
}

/* Value axis along the bottom of a horizontal-bar plot, from vmin to vmax. */
static void value_axis(cairo_t *cr, const charts_box_t *b, double vmin, double vmax,
                       const char *unit)
{
    double step = nice_step(fmax(vmax - vmin, 1e-9), 5);
    char buf[32];

    font(cr, 11, 0);
    for (double v = ceil(vmin / step) * step; v <= vmax + 1e-9 * step; v += step) {
        double x = b->zero + v * b->scale;
        cairo_move_to(cr, floor(x) + 0.5, b->y0);
        cairo_line_to(cr, floor(x) + 0.5, b->y1);
        cairo_set_source_rgb(cr, 0.88, 0.88, 0.90);
        cairo_set_line_width(cr, 1);
        cairo_stroke(cr);
        charts_fmt_short(fabs(v) < 1e-9 * step ? 0 : v, buf, sizeof buf);
        ink(cr);
        text_center(cr, x, b->y1 + 15, buf);
    }
    font(cr, 11, 0);
    text_center(cr, 0.5 * (b->x0 + b->x1), b->y1 + 31, unit ? unit : "");
}

static render_rgb_t series_colour(int palette, size_t k, size_t n)
{
    if (palette == CHARTS_CATEGORIES)
        return render_oklch(0.72 - 0.18 * (double)(k % 2), 0.12, fmod(40.0 + 137.508 * (double)k, 360.0));
    return render_ramp_cool(n <= 1 ? 0.5 : 0.08 + 0.92 * (double)k / (double)(n - 1));
}

int charts_stacked_bars(const char *png, const charts_stack_t *c, charts_box_t *box, err_t *e)
{
    canvas_t cv = {0};
    charts_box_t b = {0};
    double vmax = 0, lx, ly;
    int rc, h;

    if (c->n_groups < 1 || c->n_groups > 200 || c->n_series < 1 || c->n_series > 12)
        return err_set(e, ERR_INPUT, "chart '%s': %zu bars of %zu parts; between 1 and 200 bars of 1 to 12 parts can be drawn",
                       c->title ? c->title : "", c->n_groups, c->n_series);
    for (size_t g = 0; g < c->n_groups; g++) {
        double sum = 0;
        for (size_t s = 0; s < c->n_series; s++) {
            double v = c->values[g * c->n_series + s];
            if (!isfinite(v) || v < 0)
                return err_set(e, ERR_INPUT, "chart '%s': value for '%s', '%s' is %g; values must be finite and not negative",
                               c->title ? c->title : "", c->groups[g], c->series[s], v);
            sum += v;
        }
        vmax = fmax(vmax, sum);
    }
    if (vmax <= 0) vmax = 1;
    /* Legend rows: up to three series per row above the plot. */
    h = (int)(TITLE_H + 22.0 * (double)((c->n_series + 2) / 3) + ROW_H * (double)c->n_groups + 50);
    rc = canvas_open(&cv, h, c->title, e);
    if (rc != ERR_OK) goto done;
    ly = TITLE_H;
    lx = 16;
    font(cv.cr, 12, 0);
    for (size_t s = 0; s < c->n_series; s++) {
        render_rgb_t col = c->colours ? c->colours[s] : series_colour(c->palette, s, c->n_series);
        if (s > 0 && s % 3 == 0) {
            ly += 22;
            lx = 16;
        }
        cairo_rectangle(cv.cr, lx, ly, 16, 12);
        cairo_set_source_rgb(cv.cr, col.r, col.g, col.b);
        cairo_fill(cv.cr);
        ink(cv.cr);
        cairo_move_to(cv.cr, lx + 22, ly + 11);
        cairo_show_text(cv.cr, c->series[s]);
        lx += (CHARTS_WIDTH - 32) / 3.0;
    }
    b.img_w = cv.w;
    b.img_h = cv.h;
    b.x0 = LABEL_W;
    b.x1 = CHARTS_WIDTH - RIGHT;
    b.y0 = ly + 26;
    b.y1 = b.y0 + ROW_H * (double)c->n_groups;
    b.row_h = ROW_H;
    b.zero = b.x0;
    b.scale = (b.x1 - b.x0) / (vmax * 1.05);
    value_axis(cv.cr, &b, 0, vmax * 1.05, c->unit);
    for (size_t g = 0; g < c->n_groups; g++) {
        double x = b.x0, y = b.y0 + ROW_H * (double)g;
        font(cv.cr, 12, 0);
        ink(cv.cr);
        text_right(cv.cr, b.x0 - 8, y + ROW_H / 2 + 4, c->groups[g], LABEL_W - 24);
        for (size_t s = 0; s < c->n_series; s++) {
            double wdt = c->values[g * c->n_series + s] * b.scale;
            render_rgb_t col = c->colours ? c->colours[s] : series_colour(c->palette, s, c->n_series);
            cairo_rectangle(cv.cr, x, y + 4, wdt, ROW_H - 8);
            cairo_set_source_rgb(cv.cr, col.r, col.g, col.b);
            cairo_fill(cv.cr);
            x += wdt;
        }
    }
    cairo_move_to(cv.cr, b.x0 + 0.5, b.y0);
    cairo_line_to(cv.cr, b.x0 + 0.5, b.y1);
    ink(cv.cr);
    cairo_set_line_width(cv.cr, 1);
    cairo_stroke(cv.cr);
    rc = canvas_save(&cv, png, e);
    if (rc == ERR_OK && box) *box = b;
done:
    canvas_close(&cv);
    return rc;
}

int charts_bars(const char *png, const char *title, const char *unit, size_t n,
                const char *const *names, const double *values, charts_box_t *box, err_t *e)
{
    canvas_t cv = {0};
    charts_box_t b = {0};
    double vmin = 0, vmax = 0, span;
    render_rgb_t neg = render_ramp_diverging(-0.8), pos = render_ramp_diverging(0.8);
    char buf[32];
    int rc;

    if (n < 1 || n > 200)
        return err_set(e, ERR_INPUT, "chart '%s': %zu bars; between 1 and 200 can be drawn",
                       title ? title : "", n);
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(values[i]))
            return err_set(e, ERR_INPUT, "chart '%s': value for '%s' is not a finite number",
                           title ? title : "", names[i]);
        vmin = fmin(vmin, values[i]);
        vmax = fmax(vmax, values[i]);
    }
    span = vmax - vmin;
    if (span <= 0) span = 1;
    rc = canvas_open(&cv, (int)(TITLE_H + 10 + ROW_H * (double)n + 50), title, e);
    if (rc != ERR_OK) goto done;
    b.img_w = cv.w;
    b.img_h = cv.h;
    b.x0 = LABEL_W;
    b.x1 = CHARTS_WIDTH - RIGHT - 40;   /* room for value labels */
    b.y0 = TITLE_H + 10;
    b.y1 = b.y0 + ROW_H * (double)n;
    b.row_h = ROW_H;
    b.scale = (b.x1 - b.x0) / (span * 1.05);
    b.zero = b.x0 - (vmin < 0 ? vmin * 1.05 : 0) * b.scale;
    value_axis(cv.cr, &b, vmin < 0 ? vmin * 1.05 : 0, vmax > 0 ? vmax * 1.05 : 0, unit);
    for (size_t i = 0; i < n; i++) {
        double y = b.y0 + ROW_H * (double)i, w = values[i] * b.scale;
        render_rgb_t col = values[i] < 0 ? neg : pos;
        font(cv.cr, 12, 0);
        ink(cv.cr);
        text_right(cv.cr, b.x0 - 8, y + ROW_H / 2 + 4, names[i], LABEL_W - 24);
        cairo_rectangle(cv.cr, w < 0 ? b.zero + w : b.zero, y + 4, fabs(w), ROW_H - 8);
        cairo_set_source_rgb(cv.cr, col.r, col.g, col.b);
        cairo_fill(cv.cr);
        charts_fmt_short(values[i], buf, sizeof buf);
        ink(cv.cr);
        font(cv.cr, 11, 0);
        cairo_move_to(cv.cr, (w < 0 ? b.zero : b.zero + w) + 4, y + ROW_H / 2 + 4);
        cairo_show_text(cv.cr, buf);
    }
    cairo_move_to(cv.cr, floor(b.zero) + 0.5, b.y0);
    cairo_line_to(cv.cr, floor(b.zero) + 0.5, b.y1);
    ink(cv.cr);
    cairo_set_line_width(cv.cr, 1);
    cairo_stroke(cv.cr);
    rc = canvas_save(&cv, png, e);
    if (rc == ERR_OK && box) *box = b;
done:
    canvas_close(&cv);
    return rc;
}

int charts_coverage_curve(const char *png, const char *title, size_t n, const double *covered,
                          double total, charts_box_t *box, err_t *e)
{
    return charts_coverage_curve_base(png, title, n, covered, 0, total, box, e);
}

int charts_coverage_curve_base(const char *png, const char *title, size_t n, const double *covered,
                               double base, double total, charts_box_t *box, err_t *e)
{
    canvas_t cv = {0};
    charts_box_t b = {0};
    render_rgb_t bar = render_ramp_cool(0.25), line = render_ramp_cool(0.85);
    double step, colw;
    char buf[32];
    int rc;

    if (n < 1 || n > 2000)
        return err_set(e, ERR_INPUT, "coverage curve '%s': %zu points; between 1 and 2000 can be drawn",
                       title ? title : "", n);
    if (!(total > 0) || !isfinite(total))
        return err_set(e, ERR_INPUT, "coverage curve '%s': total people is %g; it must be positive",
                       title ? title : "", total);
    for (size_t k = 0; k < n; k++)
        if (!isfinite(covered[k]) || covered[k] < 0 || covered[k] > total * (1 + 1e-9))
            return err_set(e, ERR_INPUT, "coverage curve '%s': people covered with %zu sites is %g; it must lie between 0 and the total %g",
                           title ? title : "", k + 1, covered[k], total);
    if (!isfinite(base) || base < 0 || base > total * (1 + 1e-9))
        return err_set(e, ERR_INPUT, "coverage curve '%s': people covered before adding sites is %g; it must lie between 0 and the total %g",
                       title ? title : "", base, total);
    rc = canvas_open(&cv, 440, title, e);
    if (rc != ERR_OK) goto done;
    b.img_w = cv.w;
    b.img_h = cv.h;
    b.x0 = 80;
    b.x1 = CHARTS_WIDTH - 70;
    b.y0 = TITLE_H + 24;
    b.y1 = cv.h - 56;
    b.scale = (b.y1 - b.y0) / total;   /* people -> pixels, upward */
    b.zero = b.y1;
    colw = (b.x1 - b.x0) / (double)n;
    /* Left axis in people, right axis in share of all people. */
    step = nice_step(total, 5);
    font(cv.cr, 11, 0);
    for (double v = 0; v <= total * (1 + 1e-9); v += step) {
        double y = floor(b.y1 - v * b.scale) + 0.5;
        cairo_move_to(cv.cr, b.x0, y);
        cairo_line_to(cv.cr, b.x1, y);
        cairo_set_source_rgb(cv.cr, 0.88, 0.88, 0.90);
        cairo_set_line_width(cv.cr, 1);
        cairo_stroke(cv.cr);
        charts_fmt_short(v, buf, sizeof buf);
        ink(cv.cr);
        text_right(cv.cr, b.x0 - 6, y + 4, buf, 70);
    }
    for (int pct = 0; pct <= 100; pct += 25) {
        snprintf(buf, sizeof buf, "%d%%", pct);
        ink(cv.cr);
        cairo_move_to(cv.cr, b.x1 + 6, b.y1 - pct / 100.0 * total * b.scale + 4);
        cairo_show_text(cv.cr, buf);
    }
    /* Marginal gain of each added site (bars), then the cumulative line. */
    for (size_t k = 0; k < n; k++) {
        double gain = covered[k] - (k ? covered[k - 1] : base);
        double x = b.x0 + colw * (double)k, hgt = gain * b.scale;
        cairo_rectangle(cv.cr, x + colw * 0.15, hgt >= 0 ? b.y1 - hgt : b.y1, colw * 0.7, fabs(hgt));
        cairo_set_source_rgb(cv.cr, bar.r, bar.g, bar.b);
        cairo_fill(cv.cr);
    }
    for (size_t k = 0; k < n; k++) {
        double x = b.x0 + colw * ((double)k + 0.5), y = b.y1 - covered[k] * b.scale;
        if (k == 0) cairo_move_to(cv.cr, x, y);
        else cairo_line_to(cv.cr, x, y);
    }
    cairo_set_source_rgb(cv.cr, line.r, line.g, line.b);
    cairo_set_line_width(cv.cr, 2.5);
    cairo_stroke(cv.cr);
    if (n <= 60)
        for (size_t k = 0; k < n; k++) {
            double x = b.x0 + colw * ((double)k + 0.5), y = b.y1 - covered[k] * b.scale;
            cairo_arc(cv.cr, x, y, 3.5, 0, 2 * M_PI);
            cairo_fill(cv.cr);
        }
    /* Site-count ticks: about ten labels whatever n is. */
    {
        size_t every = n <= 12 ? 1 : (size_t)ceil((double)n / 10.0);
        ink(cv.cr);
        for (size_t k = 0; k < n; k += every) {
            snprintf(buf, sizeof buf, "%zu", k + 1);
            text_center(cv.cr, b.x0 + colw * ((double)k + 0.5), b.y1 + 15, buf);
        }
    }
    cairo_move_to(cv.cr, b.x0, b.y1 + 0.5);
    cairo_line_to(cv.cr, b.x1, b.y1 + 0.5);
    cairo_set_line_width(cv.cr, 1);
    cairo_stroke(cv.cr);
    if (base > 0) {
        /* Existing sites kept: their coverage as a dashed floor under the gains. */
        double y = floor(b.y1 - base * b.scale) + 0.5, dash[] = {6, 4};
        cairo_set_dash(cv.cr, dash, 2, 0);
        cairo_move_to(cv.cr, b.x0, y);
        cairo_line_to(cv.cr, b.x1, y);
        cairo_set_source_rgb(cv.cr, 0.35, 0.35, 0.40);
        cairo_set_line_width(cv.cr, 1.5);
        cairo_stroke(cv.cr);
        cairo_set_dash(cv.cr, NULL, 0, 0);
        ink(cv.cr);
        cairo_move_to(cv.cr, b.x0 + 6, y - 5);
        cairo_show_text(cv.cr, "covered by the existing sites");
    }
    text_center(cv.cr, 0.5 * (b.x0 + b.x1), b.y1 + 33,
                base > 0 ? "number of new sites added to the existing ones" : "number of sites open");
    /* Key: what bars and line mean. */
    font(cv.cr, 12, 0);
    cairo_rectangle(cv.cr, b.x0, TITLE_H, 16, 12);
    cairo_set_source_rgb(cv.cr, bar.r, bar.g, bar.b);
    cairo_fill(cv.cr);
    ink(cv.cr);
    cairo_move_to(cv.cr, b.x0 + 22, TITLE_H + 11);
    cairo_show_text(cv.cr, "people added by that site");
    cairo_move_to(cv.cr, b.x0 + 260, TITLE_H + 6);
    cairo_line_to(cv.cr, b.x0 + 276, TITLE_H + 6);
    cairo_set_source_rgb(cv.cr, line.r, line.g, line.b);
    cairo_set_line_width(cv.cr, 2.5);
    cairo_stroke(cv.cr);
    ink(cv.cr);
    cairo_move_to(cv.cr, b.x0 + 282, TITLE_H + 11);
    cairo_show_text(cv.cr, "people covered in all");
    rc = canvas_save(&cv, png, e);
    if (rc == ERR_OK && box) *box = b;
done:
    canvas_close(&cv);
    return rc;
}
