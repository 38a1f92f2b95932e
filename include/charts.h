/* charts: PNG charts for the report, drawn with cairo like the maps (one
 * library for all pictures, same fonts and palettes): stacked bars (people by
 * time band per district, stock per site by commodity), plain bars with
 * negatives (variant comparison) and the coverage curve (people covered against
 * the number of sites, with each site's marginal gain). Inputs are plain
 * arrays so every chart is testable without running a model. */
#ifndef CHARTS_H
#define CHARTS_H

#include <stddef.h>

#include "err.h"
#include "render.h"

#define CHARTS_WIDTH 900

enum { CHARTS_RAMP = 0, CHARTS_CATEGORIES = 1 };

/* Where the plot landed, for tests and callers: pixel box of the plot area
 * and the value -> pixel mapping along the value axis (px = x0 + v * scale
 * for horizontal bars; py = y1 - v * scale for the coverage curve). */
typedef struct charts_box {
    int img_w, img_h;
    double x0, y0, x1, y1;   /* plot area */
    double scale;            /* pixels per unit of value */
    double zero;             /* pixel of value 0 along the value axis */
    double row_h;            /* bar rows: pixels per group */
} charts_box_t;

typedef struct charts_stack {
    const char *title;
    const char *unit;              /* value axis label, e.g. "people" */
    size_t n_groups;               /* bars (rows), 1..200 */
    const char *const *groups;     /* n_groups labels */
    size_t n_series;               /* segments per bar, 1..12 */
    const char *const *series;     /* n_series labels (legend) */
    const double *values;          /* n_groups * n_series, by group; finite, >= 0 */
    int palette;                   /* CHARTS_RAMP (ordered, e.g. time bands) or _CATEGORIES */
    const render_rgb_t *colours;   /* n_series colours (e.g. a map's scale), or NULL for 'palette' */
} charts_stack_t;

/* Horizontal stacked bars, one row per group. Writes the PNG at 'png'
 * (temporary name + rename). 'box' may be NULL. ERR_INPUT on empty or
 * negative/non-finite values (naming group and series), ERR_IO on writing. */
int charts_stacked_bars(const char *png, const charts_stack_t *c, charts_box_t *box, err_t *e);

/* Horizontal bars, one per name; values may be negative (drawn left of a zero
 * line, in the diverging palette's blue; positive in its orange). */
int charts_bars(const char *png, const char *title, const char *unit, size_t n,
                const char *const *names, const double *values, charts_box_t *box, err_t *e);

/* Coverage curve: covered[k] = people covered with k+1 sites (non-decreasing
 * is not required: a curve that falls is drawn as it is), total = all people
 * (> 0). Bars show each added site's marginal gain, the line the share covered. */
int charts_coverage_curve(const char *png, const char *title, size_t n, const double *covered,
                          double total, charts_box_t *box, err_t *e);

/* The same when sites are added to existing ones: 'base' = people the
 * existing sites cover (0..total), drawn as a dashed floor; the first bar is
 * the gain over it and the axis counts new sites. */
int charts_coverage_curve_base(const char *png, const char *title, size_t n, const double *covered,
                               double base, double total, charts_box_t *box, err_t *e);

/* Short number for axes and labels: 950, 12.5k, 3.2M. */
void charts_fmt_short(double v, char *buf, size_t n);

#endif
