/* render: PNG maps drawn with cairo. A map shows one grid extent fitted into a
 * fixed-width image: a raster layer read at the image's resolution (GDAL block
 * averaging, never the full raster), vector layers reprojected to the grid CRS
 * (roads, district outlines, sites, flows), a legend panel, a scale bar in km,
 * a north arrow, the CRS name, data credits and the run date. Colour scales are
 * our own, computed in OKLab with monotonic lightness (docs/palette.md).
 * Wraps cairo; reads rasters and vectors through GDAL/OGR. */
#ifndef RENDER_H
#define RENDER_H

#include <stddef.h>
#include <stdint.h>

#include "err.h"

/* ---- colours ---------------------------------------------------------- */

typedef struct render_rgb {
    double r, g, b;   /* sRGB, 0..1 */
} render_rgb_t;

/* OKLCh (lightness 0..1, chroma, hue in degrees) to sRGB; chroma is reduced
 * until the colour fits the sRGB gamut, lightness and hue are kept. */
render_rgb_t render_oklch(double L, double C, double h_deg);
/* sRGB (0..1) to OKLab L, a, b. */
void render_rgb_to_oklab(render_rgb_t c, double lab[3]);
/* Our sequential ramps, t in [0,1] from light to dark: "cool" (travel time:
 * pale yellow -> green -> blue -> violet) and "warm" (density of people left
 * out: pale cream -> orange -> deep red-brown). */
render_rgb_t render_ramp_cool(double t);
render_rgb_t render_ramp_warm(double t);
/* Diverging ramp, t in [-1,1]: negative = blue (minutes gained), 0 = near
 * white, positive = orange-brown (minutes lost). Lightness falls with |t|. */
render_rgb_t render_ramp_diverging(double t);
/* Pale categorical tint number i (catchments): equal lightness, hues spaced by
 * the golden angle so neighbouring indices differ. */
render_rgb_t render_category(size_t i);
/* "#rrggbb" into buf[8]. */
void render_rgb_hex(render_rgb_t c, char buf[8]);

/* ---- classed colour scales ------------------------------------------- */

#define RENDER_MAX_CLASSES 12

typedef struct render_scale {
    size_t n;                                /* classes, 1..RENDER_MAX_CLASSES */
    double breaks[RENDER_MAX_CLASSES + 1];   /* class k holds [breaks[k], breaks[k+1]) */
    render_rgb_t colour[RENDER_MAX_CLASSES];
    char label[RENDER_MAX_CLASSES][64];
    int skip_first;          /* 1: the first class is left transparent (e.g. 0 people) */
    char nodata_label[48];   /* "" = nodata cells are transparent and not in the legend */
    render_rgb_t nodata;
} render_scale_t;

/* Travel-time bands in minutes: limits_min strictly increasing, n in 1..10;
 * classes 0-l1, l1-l2, ..., over ln, plus "no path" for nodata. */
int render_scale_bands(render_scale_t *s, const double *limits_min, size_t n, err_t *e);
/* Density of people per km2 on fixed breaks (1, 5, 25, 100, 250, 1000). */
void render_scale_density(render_scale_t *s);
/* Diverging steps in minutes (n in 1..5, strictly increasing, > 0): classes
 * below -steps[n-1] ... between -steps[0] and steps[0] ... above steps[n-1]. */
int render_scale_diverging(render_scale_t *s, const double *steps_min, size_t n, err_t *e);
/* Class of value v, or -1 for NaN. Values below breaks[0] fall in class 0,
 * above the last break in the last class. */
int render_scale_class(const render_scale_t *s, double v);

/* ---- map geometry ---------------------------------------------------- */

/* Where a grid lands in the image. Image pixel (px, py) of CRS point (x, y):
 * px = ox + (x - x0) / upp, py = oy + (y0 - y) / upp. */
typedef struct render_view {
    double x0, y0;        /* CRS coordinates of the grid's top-left corner */
    double upp;           /* CRS units per image pixel (same in x and y) */
    double ox, oy;        /* image pixel of the grid's top-left corner */
    int w, h;             /* map area in image pixels */
    double m_per_px;      /* ground metres per pixel along the map's centre row */
} render_view_t;

/* Fit a north-up grid (GDAL geotransform gt, nx by ny cells) into a box of at
 * most max_w by max_h pixels at (ox, oy). Geographic grids (degrees) are drawn
 * as plate carree; their metres per pixel are measured on the WGS84 ellipsoid
 * along the centre row. ERR_INPUT for a rotated or empty geotransform. */
int render_view_fit(const double gt[6], int nx, int ny, int geographic, double m_per_unit,
                    double ox, double oy, int max_w, int max_h, render_view_t *v, err_t *e);
/* Ground metres per image pixel for that fit, computed from the geotransform
 * alone (the test recomputes it independently). */
double render_metres_per_px(const double gt[6], int nx, int ny, int geographic,
                            double m_per_unit, double upp);
/* A scale bar of a round length (1, 2 or 5 times a power of ten metres) no
 * longer than max_px: its length in metres and in pixels. */
void render_scale_bar(double m_per_px, double max_px, double *len_m, double *len_px);

/* ---- raster input ---------------------------------------------------- */

enum { RENDER_AVERAGE = 0, RENDER_MODE = 1, RENDER_NEAREST = 2 };

/* Read band 1 of 'path' at rw by rh pixels covering the whole raster, with
 * GDAL's resampling 'how' (RENDER_AVERAGE / _MODE / _NEAREST). Nodata cells
 * come back as NAN. *out is a new array (caller frees with free()).
 * ERR_IO when the file is missing or unreadable. */
int render_read_band(const char *path, int rw, int rh, int how, float **out, err_t *e);
/* Size, geotransform and CRS facts of a raster: geographic = 1 for lon/lat,
 * m_per_unit = metres per CRS unit (1 for geographic). *wkt is a new string
 * (free()); pass NULL to skip it. */
int render_raster_info(const char *path, int *nx, int *ny, double gt[6], int *geographic,
                       double *m_per_unit, char **wkt, err_t *e);
/* People per km2 living in cells whose value in 'time_path' is above 'limit'
 * or nodata (no path), from 'pop_path' on the same grid, binned to rw by rh
 * pixels: each pixel = people beyond / area of all its cells (km2). Streams
 * strips of rows, never the whole raster. *people_beyond gets the total. */
int render_density_beyond(const char *pop_path, const char *time_path, double limit,
                          int rw, int rh, float **out, double *people_beyond, err_t *e);

/* ---- vector input ---------------------------------------------------- */

/* Polylines or polygon rings in the grid CRS. */
typedef struct render_lines {
    size_t n;              /* lines */
    size_t *start;         /* n+1 offsets into x, y */
    double *x, *y;
    int *rank;             /* n: 0 minor (track/path), 1 local, 2 main road */
    char **name;           /* n: name attribute or NULL (polygons: district names) */
} render_lines_t;

/* Read line or polygon features of layer 'layer' (NULL = first / OSM "lines")
 * in 'path', reprojected onto the CRS 'grid_wkt'. For lines, 'class_field'
 * (e.g. "highway") sets the rank; for polygons the exterior rings are read and
 * 'name_field' names them. Caller frees with render_lines_free. */
int render_lines_load(const char *path, const char *layer, const char *class_field,
                      const char *name_field, const char *grid_wkt, render_lines_t **out,
                      err_t *e);
void render_lines_free(render_lines_t *l);   /* NULL-safe */

/* ---- a map ----------------------------------------------------------- */

typedef struct render_map render_map_t;

/* Pixel boxes of the drawn parts, for tests and for callers placing things. */
typedef struct render_layout {
    int img_w, img_h;
    render_view_t view;
    double legend_x, legend_y;   /* top-left of the legend panel */
    double bar_x, bar_y;         /* left end of the scale bar's baseline */
    double bar_px, bar_m;        /* its length in pixels and metres */
    double north_x, north_y;     /* centre of the north arrow */
} render_layout_t;

/* A new map image for the grid (gt, nx, ny) titled 'title' (the title band is
 * drawn at once). Width is RENDER_MAP_WIDTH; height follows the grid's shape.
 * Caller frees with render_map_free. */
#define RENDER_MAP_WIDTH 1000
int render_map_new(const double gt[6], int nx, int ny, int geographic, double m_per_unit,
                   const char *title, render_map_t **out, err_t *e);
void render_map_free(render_map_t *m);   /* NULL-safe */
void render_map_layout(const render_map_t *m, render_layout_t *l);

/* Raster values v[rw*rh] over the whole grid extent, coloured by s (NaN =
 * nodata). Upsampled pixels stay crisp (nearest). */
void render_map_raster(render_map_t *m, const float *v, int rw, int rh,
                       const render_scale_t *s);
/* Category raster (value = index, NaN or < 0 = none): pale tints and dark
 * boundaries where neighbouring pixels differ. */
void render_map_categories(render_map_t *m, const float *v, int rw, int rh);
/* Blank out (map background) the pixels where mask[rw*rh] is NaN, e.g. cells
 * outside the population data, so nobody reads colours there as results. */
void render_map_blank(render_map_t *m, const float *mask, int rw, int rh);
/* Lines: roads by rank in greys, or 'highlight' (thick, coloured, haloed) for
 * closed or changed links. */
void render_map_roads(render_map_t *m, const render_lines_t *l);
void render_map_highlight(render_map_t *m, const render_lines_t *l, render_rgb_t colour,
                          double width_px);
/* Closed rings drawn as dashed outlines, with names at their centres when given. */
void render_map_outlines(render_map_t *m, const render_lines_t *l, int labels);
/* Points with area proportional to value (radius = rmax_px * sqrt(v / vmax),
 * at least 2.5 px or rmax_px if smaller); value NULL = all of radius rmax_px.
 * fill[i] per point (or fill[0] for all when one_fill). */
void render_map_points(render_map_t *m, size_t n, const double *x, const double *y,
                       const double *value, double vmax, double rmax_px,
                       const render_rgb_t *fill, int one_fill);
/* Marks ring around points (e.g. overloaded sites). */
void render_map_rings(render_map_t *m, size_t n, const double *x, const double *y,
                      const int *mark, double r_px, render_rgb_t colour);
/* Text labels beside points (skipped when more than 40, to stay legible). */
void render_map_labels(render_map_t *m, size_t n, const double *x, const double *y,
                       const char *const *text);
/* Flows between two points, width proportional to value (wmax_px at vmax),
 * with an arrow head at the destination. */
void render_map_flows(render_map_t *m, size_t n, const double *x1, const double *y1,
                      const double *x2, const double *y2, const double *value, double vmax,
                      double wmax_px, render_rgb_t colour);

/* Legend entries, stacked down the legend panel in call order. */
void render_legend_title(render_map_t *m, const char *text);
void render_legend_scale(render_map_t *m, const render_scale_t *s);
void render_legend_swatch(render_map_t *m, render_rgb_t fill, const char *label);
void render_legend_line(render_map_t *m, render_rgb_t colour, double width, const char *label);
void render_legend_point(render_map_t *m, render_rgb_t fill, double r_px, int ring,
                         const char *label);
/* Two or three reference circles for a sized-point layer. */
void render_legend_sizes(render_map_t *m, double vmax, double rmax_px, const char *unit);
void render_legend_note(render_map_t *m, const char *text);

/* Scale bar, north arrow, CRS name, credits and date; then write the PNG at
 * 'path' (temporary name + rename). */
int render_map_finish(render_map_t *m, const char *crs_name, const char *credits,
                      const char *date, const char *path, err_t *e);

/* Release cairo's and fontconfig's process-wide font caches (for leak
 * checkers). Call once at the very end of a process that drew text; no render
 * call may follow. */
void render_shutdown(void);

/* Base64 of a file's bytes as a new NUL-terminated string (caller frees). */
int render_base64_file(const char *path, char **out, size_t *len, err_t *e);

#endif
