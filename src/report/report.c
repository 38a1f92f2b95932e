/* report: OUTDIR/report.html from OUTDIR/summary.json (see include/report.h).
 * Data-driven: the table 'sections' maps a key of summary.json to a function
 * that adds key figures, body (maps, charts, tables) and assumptions. To add a
 * section (site selection, supply, variants), write one function that draws
 * with render/charts and appends HTML, and add one line to the table. */
#include "report.h"

#include <ctype.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include <cJSON.h>

#include "charts.h"
#include "grid.h"
#include "output.h"
#include "points.h"
#include "render.h"
#include "scenario.h"

/* ---- small helpers ---------------------------------------------------- */

size_t report_escape(const char *text, char *buf, size_t len)
{
    size_t k = 0;

    if (text == NULL) text = "";
    for (const char *p = text; *p; p++) {
        const char *rep = NULL;
        char one[2] = {*p, '\0'};
        switch (*p) {
        case '&': rep = "&amp;"; break;
        case '<': rep = "&lt;"; break;
        case '>': rep = "&gt;"; break;
        case '"': rep = "&quot;"; break;
        case '\'': rep = "&#39;"; break;
        default:
            /* Control characters other than tab/newline are not allowed in XML. */
            rep = ((unsigned char)*p < 0x20 && *p != '\t' && *p != '\n') ? " " : one;
        }
        for (const char *r = rep; *r; r++, k++)
            if (len > 0 && k + 1 < len) buf[k] = *r;
    }
    if (len > 0) buf[k + 1 < len ? k : len - 1] = '\0';
    return k;
}

/* A growing text buffer; 'failed' sticks once memory runs out. */
typedef struct sbuf {
    char *s;
    size_t n, cap;
    int failed;
} sbuf_t;

static void sb_add(sbuf_t *b, const char *text, size_t len)
{
    if (b->failed) return;
    if (b->n + len + 1 > b->cap) {
        size_t cap = b->cap ? b->cap : 4096;
        char *ns;
        while (cap < b->n + len + 1) cap *= 2;
        ns = realloc(b->s, cap);
        if (ns == NULL) {
            b->failed = 1;
            return;
        }
        b->s = ns;
        b->cap = cap;
    }
    memcpy(b->s + b->n, text, len);
    b->n += len;
    b->s[b->n] = '\0';
}

static void sb_str(sbuf_t *b, const char *text)
{
    sb_add(b, text, strlen(text));
}

/* printf for markup and numbers only: text from data goes through sb_esc. */
static void sb_fmt(sbuf_t *b, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void sb_fmt(sbuf_t *b, const char *fmt, ...)
{
    char small[1024];
    va_list ap;
    int n;

    va_start(ap, fmt);
    n = vsnprintf(small, sizeof small, fmt, ap);
    va_end(ap);
    if (n < 0) return;
    if ((size_t)n < sizeof small) {
        sb_add(b, small, (size_t)n);
        return;
    }
    {
        char *big = malloc((size_t)n + 1);
        if (big == NULL) {
            b->failed = 1;
            return;
        }
        va_start(ap, fmt);
        vsnprintf(big, (size_t)n + 1, fmt, ap);
        va_end(ap);
        sb_add(b, big, (size_t)n);
        free(big);
    }
}

static void sb_esc(sbuf_t *b, const char *text)
{
    size_t need = report_escape(text, NULL, 0);
    char *t = malloc(need + 1);

    if (t == NULL) {
        b->failed = 1;
        return;
    }
    report_escape(text, t, need + 1);
    sb_add(b, t, need);
    free(t);
}

/* People with thousands separators (thin spaces would not survive every
 * viewer; commas read well in English). */
static void fmt_people(double v, char *buf, size_t n)
{
    char raw[64], out[96];
    size_t len, k = 0;
    int neg = v < 0;

    snprintf(raw, sizeof raw, "%.0f", fabs(v));
    len = strlen(raw);
    if (neg) out[k++] = '-';
    for (size_t i = 0; i < len; i++) {
        out[k++] = raw[i];
        if ((len - i - 1) % 3 == 0 && i + 1 < len) out[k++] = ',';
    }
    out[k] = '\0';
    snprintf(buf, n, "%s", out);
}

static void sb_people(sbuf_t *b, double v)
{
    char buf[96];
    fmt_people(v, buf, sizeof buf);
    sb_str(b, buf);
}

/* ---- credits ---------------------------------------------------------- */

static int has_osm_word(const char *base)
{
    /* A word of the file name (split on non-letters/digits) that is "osm" or
     * "osm" followed by digits (e.g. "facilities_osm2019.geojson"). */
    const char *p = base;
    while (*p) {
        const char *w;
        while (*p && !isalnum((unsigned char)*p)) p++;
        w = p;
        while (*p && isalnum((unsigned char)*p)) p++;
        if (p - w >= 3 && tolower((unsigned char)w[0]) == 'o' && tolower((unsigned char)w[1]) == 's' &&
            tolower((unsigned char)w[2]) == 'm') {
            const char *q = w + 3;
            while (q < p && isdigit((unsigned char)*q)) q++;
            if (q == p) return 1;
        }
    }
    return 0;
}

void report_credits(const char *const *paths, size_t n, char *buf, size_t len)
{
    /* The one place where data credits are worded. */
    static const char osm[] = "\xc2\xa9 OpenStreetMap contributors";
    static const char ghs[] = "GHS-POP \xc2\xa9 European Union";
    int want_osm = 0, want_ghs = 0;

    if (len == 0) return;
    buf[0] = '\0';
    for (size_t i = 0; i < n; i++) {
        const char *p = paths[i], *base;
        char low[512];
        size_t k;
        if (p == NULL) continue;
        base = strrchr(p, '/');
        base = base ? base + 1 : p;
        for (k = 0; base[k] && k + 1 < sizeof low; k++) low[k] = (char)tolower((unsigned char)base[k]);
        low[k] = '\0';
        if (has_osm_word(low)) want_osm = 1;
        if (strstr(low, "ghs_pop") || strstr(low, "ghs-pop") || strstr(low, "ghspop")) want_ghs = 1;
    }
    snprintf(buf, len, "%s%s%s", want_ghs ? ghs : "", want_ghs && want_osm ? "; " : "",
             want_osm ? osm : "");
}

/* ---- a tiny CSV reader for our own tables ------------------------------ */

typedef struct csv {
    size_t rows, cols;     /* rows without the header */
    char **cell;           /* (rows + 1) * cols, header first */
} csv_t;

static void csv_free(csv_t *c)
{
    if (c == NULL) return;
    if (c->cell)
        for (size_t i = 0; i < (c->rows + 1) * c->cols; i++) free(c->cell[i]);
    free(c->cell);
    free(c);
}

/* RFC 4180: quoted fields with doubled quotes; rows of unequal length are an error. */
static int csv_load(const char *path, csv_t **out, err_t *e)
{
    FILE *f = fopen(path, "rb");
    csv_t *c = NULL;
    sbuf_t field = {0};
    size_t cap = 0, n = 0, col = 0;
    int ch, quoted = 0, rc = ERR_OK, at_start = 1;

    *out = NULL;
    if (f == NULL) return err_set(e, ERR_IO, "cannot open table '%s' for the report", path);
    c = calloc(1, sizeof *c);
    if (c == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory reading '%s'", path);
        goto done;
    }
    for (;;) {
        ch = fgetc(f);
        if (quoted) {
            if (ch == EOF) {
                rc = err_set(e, ERR_INPUT, "table '%s' ends inside a quoted field", path);
                goto done;
            }
            if (ch == '"') {
                int nx = fgetc(f);
                if (nx == '"') sb_add(&field, "\"", 1);
                else {
                    quoted = 0;
                    if (nx != EOF) ungetc(nx, f);
                }
            } else {
                char cc = (char)ch;
                sb_add(&field, &cc, 1);
            }
            continue;
        }
        if (ch == '"' && field.n == 0) {
            quoted = 1;
            at_start = 0;
            continue;
        }
        if (ch == '\r') continue;
        if (ch == ',' || ch == '\n' || ch == EOF) {
            if (ch == EOF && at_start) break;
            if (n == cap) {
                size_t nc = cap ? 2 * cap : 64;
                char **cells = realloc(c->cell, nc * sizeof *cells);
                if (cells == NULL) {
                    rc = err_set(e, ERR_NOMEM, "out of memory reading '%s'", path);
                    goto done;
                }
                c->cell = cells;
                cap = nc;
            }
            c->cell[n] = strdup(field.s ? field.s : "");
            if (c->cell[n] == NULL || field.failed) {
                rc = err_set(e, ERR_NOMEM, "out of memory reading '%s'", path);
                goto done;
            }
            n++;
            col++;
            field.n = 0;
            if (field.s) field.s[0] = '\0';
            if (ch != ',') {
                if (c->cols == 0) c->cols = col;
                else if (col != c->cols) {
                    rc = err_set(e, ERR_INPUT, "table '%s' row %zu has %zu fields, the header %zu",
                                 path, c->rows + 1, col, c->cols);
                    goto done;
                } else c->rows++;
                col = 0;
                at_start = 1;
                if (ch == EOF) break;
            } else at_start = 0;
            continue;
        }
        at_start = 0;
        {
            char cc = (char)ch;
            sb_add(&field, &cc, 1);
        }
    }
    if (c->cols == 0) {
        rc = err_set(e, ERR_INPUT, "table '%s' is empty", path);
        goto done;
    }
    *out = c;
    c = NULL;
done:
    if (c) {
        c->rows = 0;
        /* Free the cells read so far, however many. */
        for (size_t i = 0; i < n; i++) free(c->cell[i]);
        free(c->cell);
        free(c);
    }
    free(field.s);
    fclose(f);
    return rc;
}

static int csv_col(const csv_t *c, const char *name)
{
    for (size_t j = 0; j < c->cols; j++)
        if (strcmp(c->cell[j], name) == 0) return (int)j;
    return -1;
}

static const char *csv_get(const csv_t *c, size_t row, int col)
{
    return col < 0 ? "" : c->cell[(row + 1) * c->cols + (size_t)col];
}

static double csv_num(const csv_t *c, size_t row, int col)
{
    const char *s = csv_get(c, row, col);
    char *end;
    double v;
    if (s[0] == '\0') return NAN;
    v = strtod(s, &end);
    return *end == '\0' ? v : NAN;
}

/* ---- the report context ---------------------------------------------- */

typedef struct rctx {
    const char *outdir;
    char *mapdir;
    cJSON *sum;
    scen_t *scen;             /* NULL when the scenario cannot be read again */
    sbuf_t figures, summary, body, assumptions;   /* summary: under the key figures */
    report_result_t *res;
    char credits[256];
    const char *date;
    const char *crs;
    /* Grid of the run (from travel_time.tif). */
    int nx, ny, geographic;
    double gt[6], m_per_unit;
    char *wkt;
    render_lines_t *roads;     /* NULL when not available */
    render_lines_t *districts; /* NULL when not available */
    int loaded_vectors;
    grid_t *pgrid;             /* population grid for placing points (load_points) */
    points_t *pts[3];          /* existing sites, candidates, depots; NULL when absent */
    int loaded_points;
} rctx_t;

static void note(rctx_t *c, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void note(rctx_t *c, const char *fmt, ...)
{
    char buf[600], **nn, *s;
    va_list ap;

    va_start(ap, fmt);
    vsnprintf(buf, sizeof buf, fmt, ap);
    va_end(ap);
    nn = realloc(c->res->notes, (c->res->n_notes + 1) * sizeof *nn);
    if (nn == NULL) return;
    c->res->notes = nn;
    s = strdup(buf);
    if (s == NULL) return;
    nn[c->res->n_notes++] = s;
}

static int add_image(rctx_t *c, const char *path)
{
    char **ni = realloc(c->res->images, (c->res->n_images + 1) * sizeof *ni), *s;
    if (ni == NULL) return -1;
    c->res->images = ni;
    s = strdup(path);
    if (s == NULL) return -1;
    ni[c->res->n_images++] = s;
    return 0;
}

/* Path of summary input with role 'role', or NULL. */
static const char *input_path(const cJSON *sum, const char *role)
{
    const cJSON *in = cJSON_GetObjectItemCaseSensitive(sum, "inputs"), *it;
    cJSON_ArrayForEach(it, in)
    {
        const cJSON *r = cJSON_GetObjectItemCaseSensitive(it, "role");
        const cJSON *p = cJSON_GetObjectItemCaseSensitive(it, "path");
        if (cJSON_IsString(r) && cJSON_IsString(p) && strcmp(r->valuestring, role) == 0)
            return p->valuestring;
    }
    return NULL;
}

static double num(const cJSON *o, const char *key)
{
    const cJSON *v = cJSON_GetObjectItemCaseSensitive(o, key);
    return cJSON_IsNumber(v) ? v->valuedouble : NAN;
}

static const char *str(const cJSON *o, const char *key)
{
    const cJSON *v = cJSON_GetObjectItemCaseSensitive(o, key);
    return cJSON_IsString(v) ? v->valuestring : NULL;
}

/* Embed image 'path' with its alt text and caption. */
static int embed(rctx_t *c, const char *path, const char *alt, const char *caption, err_t *e)
{
    char *b64 = NULL;
    int rc = render_base64_file(path, &b64, NULL, e);

    if (rc != ERR_OK) return rc;
    sb_str(&c->body, "<figure><img alt=\"");
    sb_esc(&c->body, alt);
    sb_str(&c->body, "\" src=\"data:image/png;base64,");
    sb_str(&c->body, b64);
    sb_str(&c->body, "\"/><figcaption>");
    sb_esc(&c->body, caption);
    sb_str(&c->body, "</figcaption></figure>\n");
    free(b64);
    return add_image(c, path) == 0 ? ERR_OK : err_set(e, ERR_NOMEM, "out of memory");
}

/* Roads and district outlines, read once for all maps; missing ones are noted. */
static void load_vectors(rctx_t *c)
{
    const char *rp = input_path(c->sum, "roads"), *dp = input_path(c->sum, "districts");
    err_t e = {0};

    if (c->loaded_vectors) return;
    c->loaded_vectors = 1;
    if (rp != NULL &&
        render_lines_load(rp, c->scen ? c->scen->roads.layer : NULL,
                          c->scen && c->scen->road_class_field ? c->scen->road_class_field : "highway",
                          NULL, c->wkt, &c->roads, &e) != ERR_OK)
        note(c, "roads left off the maps: %s", e.msg);
    if (dp != NULL &&
        render_lines_load(dp, c->scen ? c->scen->districts.layer : NULL, NULL,
                          c->scen ? c->scen->districts.name_field : NULL, c->wkt, &c->districts,
                          &e) != ERR_OK)
        note(c, "district outlines left off the maps: %s", e.msg);
}

static void map_furniture_legend(rctx_t *c, render_map_t *m)
{
    if (c->roads) {
        render_legend_line(m, (render_rgb_t){0.22, 0.22, 0.24}, 2.2, "main road");
        render_legend_line(m, (render_rgb_t){0.38, 0.38, 0.40}, 1.2, "other road");
        render_legend_line(m, (render_rgb_t){0.50, 0.50, 0.52}, 0.7, "track or path");
    }
    if (c->districts) {
        render_legend_line(m, (render_rgb_t){0.15, 0.12, 0.20}, 1.4, "district boundary (dashed)");
    }
}

static int map_open(rctx_t *c, const char *title, render_map_t **m, int *rw, int *rh, err_t *e)
{
    render_layout_t l;
    int rc = render_map_new(c->gt, c->nx, c->ny, c->geographic, c->m_per_unit, title, m, e);
    if (rc != ERR_OK) return rc;
    render_map_layout(*m, &l);
    /* Read at the map's resolution, never finer than the grid. */
    *rw = l.view.w < c->nx ? l.view.w : c->nx;
    *rh = l.view.h < c->ny ? l.view.h : c->ny;
    return ERR_OK;
}

static int map_close(rctx_t *c, render_map_t *m, const char *file, const char *alt,
                     const char *caption, err_t *e)
{
    char *path = out_join(c->mapdir, file);
    int rc;

    if (path == NULL) return err_set(e, ERR_NOMEM, "out of memory");
    rc = render_map_finish(m, c->crs, c->credits, c->date, path, e);
    if (rc == ERR_OK) rc = embed(c, path, alt, caption, e);
    free(path);
    return rc;
}

/* ---- section: reach --------------------------------------------------- */

typedef struct sites_tab {
    size_t n;
    double *x, *y, *people, *capacity, *ratio;
    const char **label;   /* borrowed from the csv */
    int *over;
} sites_tab_t;

static void sites_tab_free(sites_tab_t *s)
{
    free(s->x);
    free(s->y);
    free(s->people);
    free(s->capacity);
    free(s->ratio);
    free(s->label);
    free(s->over);
}

static int sites_tab_read(const csv_t *t, const char *path, sites_tab_t *s, err_t *e)
{
    int cx = csv_col(t, "x"), cy = csv_col(t, "y"), cp = csv_col(t, "people"),
        cc = csv_col(t, "capacity"), ci = csv_col(t, "id");

    memset(s, 0, sizeof *s);
    if (cx < 0 || cy < 0 || cp < 0 || ci < 0)
        return err_set(e, ERR_INPUT, "'%s' lacks the columns id, people, x, y; run reach again with this version",
                       path);
    s->n = t->rows;
    s->x = calloc(s->n + 1, sizeof *s->x);
    s->y = calloc(s->n + 1, sizeof *s->y);
    s->people = calloc(s->n + 1, sizeof *s->people);
    s->capacity = calloc(s->n + 1, sizeof *s->capacity);
    s->ratio = calloc(s->n + 1, sizeof *s->ratio);
    s->label = calloc(s->n + 1, sizeof *s->label);
    s->over = calloc(s->n + 1, sizeof *s->over);
    if (!s->x || !s->y || !s->people || !s->capacity || !s->ratio || !s->label || !s->over)
        return err_set(e, ERR_NOMEM, "out of memory reading '%s'", path);
    for (size_t i = 0; i < s->n; i++) {
        s->x[i] = csv_num(t, i, cx);
        s->y[i] = csv_num(t, i, cy);
        s->people[i] = csv_num(t, i, cp);
        s->capacity[i] = csv_num(t, i, cc);
        s->ratio[i] = s->capacity[i] > 0 ? s->people[i] / s->capacity[i] : NAN;
        s->over[i] = s->ratio[i] > 1;
        s->label[i] = csv_get(t, i, ci);
        if (!isfinite(s->x[i]) || !isfinite(s->y[i]))
            return err_set(e, ERR_INPUT, "'%s' row %zu (site '%s') has no coordinates", path, i + 1,
                           s->label[i]);
    }
    return ERR_OK;
}

/* Population at the map's resolution as a mask: NaN where the population
 * raster has no data (outside a country, the sea). NULL when unavailable. */
static float *population_mask(rctx_t *c, int rw, int rh)
{
    const char *pop = input_path(c->sum, "population");
    float *mask = NULL;
    err_t e = {0};
    int nx, ny, geo;
    double gt[6], mpu;

    if (pop == NULL || render_raster_info(pop, &nx, &ny, gt, &geo, &mpu, NULL, &e) != ERR_OK ||
        nx != c->nx || ny != c->ny)
        return NULL;
    if (render_read_band(pop, rw, rh, RENDER_AVERAGE, &mask, &e) != ERR_OK) return NULL;
    for (size_t i = 0; i < (size_t)rw * rh; i++)
        if (isnan(mask[i])) return mask;
    free(mask);   /* no gaps: nothing to blank */
    return NULL;
}

static int map_travel_time(rctx_t *c, const char *tt_path, const sites_tab_t *st,
                           const double *bands, size_t n_bands, err_t *e)
{
    render_map_t *m = NULL;
    render_scale_t sc;
    float *v = NULL, *mask = NULL;
    int rw, rh, rc;
    render_rgb_t dark = {0.10, 0.10, 0.12};

    rc = render_scale_bands(&sc, bands, n_bands, e);
    if (rc == ERR_OK) rc = map_open(c, "Travel time to the nearest site", &m, &rw, &rh, e);
    if (rc == ERR_OK) rc = render_read_band(tt_path, rw, rh, RENDER_AVERAGE, &v, e);
    if (rc != ERR_OK) goto done;
    render_map_raster(m, v, rw, rh, &sc);
    mask = population_mask(c, rw, rh);
    if (mask) render_map_blank(m, mask, rw, rh);
    render_map_roads(m, c->roads);
    render_map_outlines(m, c->districts, 0);
    render_map_points(m, st->n, st->x, st->y, NULL, 0, st->n > 200 ? 1.8 : 5, &dark, 1);
    render_map_labels(m, st->n, st->x, st->y, st->label);
    render_legend_title(m, "Minutes to the nearest site");
    render_legend_scale(m, &sc);
    render_legend_title(m, "Features");
    render_legend_point(m, dark, 5, 0, "site");
    map_furniture_legend(c, m);
    render_legend_note(m, "Each pixel: mean time of its cells.");
    if (mask) render_legend_note(m, "Blank: no population data.");
    rc = map_close(c, m, "travel_time.png", "Map of travel time to the nearest site in bands",
                   "Travel time to the nearest site, by band. Grey: no path.", e);
done:
    free(v);
    free(mask);
    render_map_free(m);
    return rc;
}

static int map_catchments(rctx_t *c, const char *ns_path, const sites_tab_t *st, err_t *e)
{
    render_map_t *m = NULL;
    render_rgb_t *fill = NULL;
    float *mask = NULL;
    render_rgb_t ok = render_ramp_cool(0.72), over = render_oklch(0.55, 0.18, 30),
                 none = {0.55, 0.55, 0.58};
    double vmax = 0;
    float *v = NULL;
    int rw, rh, rc, any_cap = 0, any_over = 0;

    fill = malloc((st->n + 1) * sizeof *fill);
    if (fill == NULL) return err_set(e, ERR_NOMEM, "out of memory for the catchment map");
    for (size_t i = 0; i < st->n; i++) {
        fill[i] = isnan(st->ratio[i]) ? none : st->over[i] ? over : ok;
        any_cap |= !isnan(st->ratio[i]);
        any_over |= st->over[i];
        if (st->people[i] > vmax) vmax = st->people[i];
    }
    rc = map_open(c, "Catchments and each site's load", &m, &rw, &rh, e);
    if (rc == ERR_OK) rc = render_read_band(ns_path, rw, rh, RENDER_MODE, &v, e);
    if (rc != ERR_OK) goto done;
    mask = population_mask(c, rw, rh);
    if (mask)   /* no catchment drawn where nobody can live */
        for (size_t i = 0; i < (size_t)rw * rh; i++)
            if (isnan(mask[i])) v[i] = NAN;
    render_map_categories(m, v, rw, rh);
    render_map_roads(m, c->roads);
    render_map_points(m, st->n, st->x, st->y, st->people, vmax, st->n > 200 ? 8 : 22, fill, 0);
    render_map_rings(m, st->n, st->x, st->y, st->over, st->n > 200 ? 10 : 24, over);
    render_map_labels(m, st->n, st->x, st->y, st->label);
    render_legend_title(m, "People whose nearest site it is");
    render_legend_sizes(m, vmax, st->n > 200 ? 8 : 22, "people");
    render_legend_title(m, "Load against capacity");
    if (any_cap) render_legend_point(m, ok, 6, 0, "within capacity");
    if (any_over) render_legend_point(m, over, 6, 1, "over capacity");
    if (!any_cap) render_legend_point(m, none, 6, 0, "no capacity given");
    render_legend_title(m, "Features");
    render_legend_swatch(m, render_category(0), "catchment (tint per site)");
    map_furniture_legend(c, m);
    rc = map_close(c, m, "catchments.png", "Map of catchments with site loads",
                   "Catchment of each site (the cells whose nearest site it is), circles sized by the people in it; ringed sites are over capacity.",
                   e);
done:
    free(v);
    free(mask);
    free(fill);
    render_map_free(m);
    return rc;
}

static int map_beyond(rctx_t *c, const char *tt_path, double limit_min, const sites_tab_t *st,
                      err_t *e)
{
    const char *pop = input_path(c->sum, "population");
    render_map_t *m = NULL;
    render_scale_t sc;
    render_rgb_t dark = {0.10, 0.10, 0.12}, grey = {0.30, 0.30, 0.34};
    float *v = NULL;
    double beyond = 0;
    char title[128], caption[256];
    int rw, rh, rc;

    if (pop == NULL) {
        note(c, "map of people beyond the limit left out: the summary names no population raster");
        return ERR_OK;
    }
    snprintf(title, sizeof title, "People beyond %g minutes", limit_min);
    rc = map_open(c, title, &m, &rw, &rh, e);
    if (rc == ERR_OK) rc = render_density_beyond(pop, tt_path, limit_min, rw, rh, &v, &beyond, e);
    if (rc != ERR_OK) goto done;
    render_scale_density(&sc);
    render_map_raster(m, v, rw, rh, &sc);
    render_map_roads(m, c->roads);
    render_map_outlines(m, c->districts, 1);
    render_map_points(m, st->n, st->x, st->y, NULL, 0, st->n > 200 ? 1.6 : 4.5, &grey, 1);
    snprintf(caption, sizeof caption, "People per km\xc2\xb2 living more than %g minutes from the nearest site", limit_min);
    render_legend_title(m, "People per km\xc2\xb2 beyond the limit");
    render_legend_scale(m, &sc);
    render_legend_title(m, "Features");
    render_legend_point(m, st->n > 200 ? grey : dark, st->n > 200 ? 1.6 : 4.5, 0, "site");
    map_furniture_legend(c, m);
    render_legend_note(m, "Pixel: people beyond / pixel area.");
    rc = map_close(c, m, "beyond_limit.png", "Map of the density of people beyond the limit",
                   caption, e);
done:
    free(v);
    render_map_free(m);
    return rc;
}

/* District rows from bands.csv: names, band labels and people. */
typedef struct dist_bands {
    size_t n_d, n_b;
    const char **name;     /* borrowed from the csv */
    const char **band;     /* borrowed */
    double *people;        /* n_d * n_b */
    double *to_min;        /* n_b: upper limit; INFINITY for "over" and "unreachable" */
} dist_bands_t;

static void dist_bands_free(dist_bands_t *d)
{
    free(d->name);
    free(d->band);
    free(d->people);
    free(d->to_min);
}

static int dist_bands_read(const csv_t *t, const char *path, dist_bands_t *d, err_t *e)
{
    int cd = csv_col(t, "district"), cb = csv_col(t, "band"), cp = csv_col(t, "people"),
        ct = csv_col(t, "to_min");
    size_t k = 0;

    memset(d, 0, sizeof *d);
    if (cd < 0 || cb < 0 || cp < 0 || ct < 0)
        return err_set(e, ERR_INPUT, "'%s' lacks the columns district, band, to_min, people", path);
    /* Band count: the rows of the first zone, "(all)". */
    while (d->n_b < t->rows && strcmp(csv_get(t, d->n_b, cd), csv_get(t, 0, cd)) == 0) d->n_b++;
    if (d->n_b == 0 || t->rows % d->n_b != 0)
        return err_set(e, ERR_INPUT, "'%s' does not hold the same bands for every district", path);
    d->n_d = t->rows / d->n_b;
    d->name = calloc(d->n_d, sizeof *d->name);
    d->band = calloc(d->n_b, sizeof *d->band);
    d->people = calloc(t->rows, sizeof *d->people);
    d->to_min = calloc(d->n_b, sizeof *d->to_min);
    if (!d->name || !d->band || !d->people || !d->to_min)
        return err_set(e, ERR_NOMEM, "out of memory reading '%s'", path);
    for (size_t z = 0; z < d->n_d; z++)
        for (size_t b = 0; b < d->n_b; b++, k++) {
            double tm = csv_num(t, k, ct);
            if (b == 0) d->name[z] = csv_get(t, k, cd);
            if (z == 0) {
                d->band[b] = csv_get(t, k, cb);
                d->to_min[b] = isnan(tm) ? INFINITY : tm;
            }
            d->people[k] = csv_num(t, k, cp);
            if (isnan(d->people[k])) d->people[k] = 0;
        }
    return ERR_OK;
}

static int chart_districts(rctx_t *c, const dist_bands_t *d, const render_scale_t *sc,
                           err_t *e)
{
    charts_stack_t cs = {0};
    char *path = out_join(c->mapdir, "bands_by_district.png");
    size_t first = d->n_d > 1 ? 1 : 0;   /* skip "(all)" when districts follow */
    render_rgb_t col[RENDER_MAX_CLASSES + 1];
    int rc;

    if (path == NULL) return err_set(e, ERR_NOMEM, "out of memory");
    /* The map's band colours, and its "no path" grey for the unreachable. */
    if (d->n_b <= sc->n + 1) {
        for (size_t b = 0; b < d->n_b; b++) col[b] = b < sc->n ? sc->colour[b] : sc->nodata;
        cs.colours = col;
    }
    cs.title = "People by travel time to the nearest site";
    cs.unit = "people";
    cs.n_groups = d->n_d - first;
    cs.groups = d->name + first;
    cs.n_series = d->n_b;
    cs.series = d->band;
    cs.values = d->people + first * d->n_b;
    cs.palette = CHARTS_RAMP;
    rc = charts_stacked_bars(path, &cs, NULL, e);
    if (rc == ERR_OK)
        rc = first ? embed(c, path, "Bar chart of people by travel-time band in each district",
                           "People by travel-time band in each district.", e)
                   : embed(c, path, "Bar chart of people by travel-time band",
                           "People by travel-time band (the scenario names no districts).", e);
    free(path);
    return rc;
}

/* Index order by 'key' descending (small n: insertion sort). */
static void order_desc(const double *key, size_t n, size_t *idx)
{
    for (size_t i = 0; i < n; i++) idx[i] = i;
    for (size_t i = 1; i < n; i++) {
        size_t v = idx[i], j = i;
        while (j > 0 && key[idx[j - 1]] < key[v]) {
            idx[j] = idx[j - 1];
            j--;
        }
        idx[j] = v;
    }
}

static void sites_table_html(rctx_t *c, const csv_t *t, const sites_tab_t *st)
{
    enum { MAX_ROWS = 60 };
    int cn = csv_col(t, "name"), cb = csv_col(t, "beyond_limit"), cm = csv_col(t, "mean_min"),
        cx = csv_col(t, "max_min");
    size_t *idx = malloc((st->n + 1) * sizeof *idx), shown;
    double *key = calloc(st->n + 1, sizeof *key);

    if (idx == NULL || key == NULL) {
        c->body.failed = 1;
        free(idx);
        free(key);
        return;
    }
    /* Most loaded first: overloaded sites by load ratio, then by people. */
    for (size_t i = 0; i < st->n; i++)
        key[i] = isnan(st->ratio[i]) ? st->people[i] * 1e-12 : st->ratio[i] * 1e3 + st->people[i] * 1e-12;
    order_desc(key, st->n, idx);
    shown = st->n < MAX_ROWS ? st->n : MAX_ROWS;
    sb_str(&c->body, "<h3>Sites</h3>\n<div class=\"scroll\"><table>\n<thead><tr><th>site</th><th>name</th>"
                     "<th class=\"n\">people</th><th class=\"n\">capacity</th><th class=\"n\">load</th>"
                     "<th class=\"n\">beyond limit</th><th class=\"n\">mean min</th><th class=\"n\">max min</th></tr></thead>\n<tbody>\n");
    for (size_t r = 0; r < shown; r++) {
        size_t i = idx[r];
        double cap = st->capacity[i], mean = csv_num(t, i, cm), mx = csv_num(t, i, cx);
        sb_str(&c->body, st->over[i] ? "<tr class=\"over\"><td>" : "<tr><td>");
        sb_esc(&c->body, st->label[i]);
        sb_str(&c->body, "</td><td>");
        sb_esc(&c->body, csv_get(t, i, cn));
        sb_str(&c->body, "</td><td class=\"n\">");
        sb_people(&c->body, st->people[i]);
        sb_str(&c->body, "</td><td class=\"n\">");
        if (isnan(cap)) sb_str(&c->body, "\xe2\x80\x94");
        else sb_people(&c->body, cap);
        sb_str(&c->body, "</td><td class=\"n\">");
        if (isnan(st->ratio[i])) sb_str(&c->body, "\xe2\x80\x94");
        else sb_fmt(&c->body, "%.0f%%", 100 * st->ratio[i]);
        sb_str(&c->body, "</td><td class=\"n\">");
        sb_people(&c->body, csv_num(t, i, cb));
        sb_str(&c->body, "</td><td class=\"n\">");
        if (isnan(mean)) sb_str(&c->body, "\xe2\x80\x94");
        else sb_fmt(&c->body, "%.0f", mean);
        sb_str(&c->body, "</td><td class=\"n\">");
        if (isnan(mx)) sb_str(&c->body, "\xe2\x80\x94");
        else sb_fmt(&c->body, "%.0f", mx);
        sb_str(&c->body, "</td></tr>\n");
    }
    sb_str(&c->body, "</tbody></table></div>\n");
    if (shown < st->n)
        sb_fmt(&c->body, "<p class=\"small\">The %zu most loaded of %zu sites; all are in sites.csv.</p>\n",
               shown, st->n);
    free(idx);
    free(key);
}

static void districts_table_html(rctx_t *c, const dist_bands_t *d)
{
    sb_str(&c->body, "<h3>People by travel time and district</h3>\n<div class=\"scroll\"><table>\n<thead><tr><th>district</th>");
    for (size_t b = 0; b < d->n_b; b++) {
        sb_str(&c->body, "<th class=\"n\">");
        sb_esc(&c->body, d->band[b]);
        sb_str(&c->body, "</th>");
    }
    sb_str(&c->body, "</tr></thead>\n<tbody>\n");
    for (size_t z = 0; z < d->n_d; z++) {
        sb_str(&c->body, z == 0 ? "<tr class=\"all\"><td>" : "<tr><td>");
        sb_esc(&c->body, z == 0 && strcmp(d->name[0], "(all)") == 0 ? "all districts" : d->name[z]);
        sb_str(&c->body, "</td>");
        for (size_t b = 0; b < d->n_b; b++) {
            sb_str(&c->body, "<td class=\"n\">");
            sb_people(&c->body, d->people[z * d->n_b + b]);
            sb_str(&c->body, "</td>");
        }
        sb_str(&c->body, "</tr>\n");
    }
    sb_str(&c->body, "</tbody></table></div>\n");
}

static void figure(sbuf_t *b, const char *value_html, const char *label, const char *detail)
{
    sb_str(b, "<div class=\"fig\"><div class=\"val\">");
    sb_str(b, value_html);
    sb_str(b, "</div><div class=\"lab\">");
    sb_esc(b, label);
    sb_str(b, "</div>");
    if (detail && detail[0]) {
        sb_str(b, "<div class=\"det\">");
        sb_esc(b, detail);
        sb_str(b, "</div>");
    }
    sb_str(b, "</div>\n");
}

static int section_reach(rctx_t *c, const cJSON *r, err_t *e)
{
    const cJSON *params = cJSON_GetObjectItemCaseSensitive(c->sum, "parameters");
    const cJSON *files = cJSON_GetObjectItemCaseSensitive(r, "files");
    const cJSON *bj = cJSON_GetObjectItemCaseSensitive(params, "bands_min"), *it;
    double limit = num(r, "limit_min"), total = num(r, "people_total");
    double within = num(r, "people_within_limit"), beyond = num(r, "people_beyond_limit");
    double bands[16];
    size_t n_bands = 0, n_over = 0;
    char *tt = NULL, *ns = NULL, *sp = NULL, *bp = NULL;
    csv_t *sites = NULL, *bt = NULL;
    sites_tab_t st = {0};
    dist_bands_t db = {0};
    render_scale_t sc;
    char val[128], lab[160], det[600];
    int rc = ERR_OK, straddle = 1;

    cJSON_ArrayForEach(it, bj) if (cJSON_IsNumber(it) && n_bands < 16) bands[n_bands++] = it->valuedouble;
    if (n_bands == 0 || !isfinite(limit) || !isfinite(total))
        return err_set(e, ERR_INPUT, "summary.json in '%s': the reach part lacks limit_min, people_total or parameters.bands_min",
                       c->outdir);
    tt = out_join(c->outdir, str(files, "travel_time") ? str(files, "travel_time") : "travel_time.tif");
    ns = out_join(c->outdir, str(files, "nearest_site") ? str(files, "nearest_site") : "nearest_site.tif");
    sp = out_join(c->outdir, str(files, "sites") ? str(files, "sites") : "sites.csv");
    bp = out_join(c->outdir, str(files, "bands") ? str(files, "bands") : "bands.csv");
    if (!tt || !ns || !sp || !bp) {
        rc = err_set(e, ERR_NOMEM, "out of memory");
        goto done;
    }
    if (c->wkt == NULL) {
        rc = render_raster_info(tt, &c->nx, &c->ny, c->gt, &c->geographic, &c->m_per_unit, &c->wkt, e);
        if (rc != ERR_OK) goto done;
    }
    rc = csv_load(sp, &sites, e);
    if (rc == ERR_OK) rc = sites_tab_read(sites, sp, &st, e);
    if (rc == ERR_OK) rc = csv_load(bp, &bt, e);
    if (rc == ERR_OK) rc = dist_bands_read(bt, bp, &db, e);
    if (rc != ERR_OK) goto done;
    for (size_t i = 0; i < n_bands; i++)
        if (fabs(bands[i] - limit) < 1e-9) straddle = 0;

    /* Key figures. */
    snprintf(val, sizeof val, "%.0f%%", total > 0 ? 100 * within / total : 0);
    snprintf(lab, sizeof lab, "of people within %g min of a site", limit);
    fmt_people(within, det, sizeof det);
    {
        char tot[64];
        fmt_people(total, tot, sizeof tot);
        snprintf(det + strlen(det), sizeof det - strlen(det), " of %s people", tot);
    }
    figure(&c->figures, val, lab, det);
    fmt_people(beyond, val, sizeof val);
    snprintf(lab, sizeof lab, "people beyond %g min", limit);
    det[0] = '\0';
    if (db.n_d > 1) {
        /* Worst districts by people beyond the limit (bands above it). */
        double *key = calloc(db.n_d, sizeof *key);
        size_t *idx = calloc(db.n_d, sizeof *idx);
        if (key && idx) {
            /* Exact counts when the run recorded them (cell by cell); else the
             * bands above the limit, which bracket it. */
            const cJSON *bd = cJSON_GetObjectItemCaseSensitive(r, "beyond_limit_by_district");
            for (size_t z = 1; z < db.n_d; z++) {
                const cJSON *v = cJSON_IsObject(bd)
                                     ? cJSON_GetObjectItemCaseSensitive(bd, db.name[z]) : NULL;
                if (cJSON_IsNumber(v)) {
                    key[z] = v->valuedouble;
                    continue;
                }
                for (size_t b = 0; b < db.n_b; b++)
                    if (db.to_min[b] > limit + 1e-9) key[z] += db.people[z * db.n_b + b];
            }
            if (cJSON_IsObject(bd)) straddle = 0;
            key[0] = -1;
            order_desc(key, db.n_d, idx);
            snprintf(det, sizeof det, "most in ");
            for (size_t k = 0; k < 3 && k < db.n_d - 1; k++) {
                char p[64];
                size_t z = idx[k];
                if (key[z] <= 0) break;
                fmt_people(key[z], p, sizeof p);
                snprintf(det + strlen(det), sizeof det - strlen(det), "%s%s (%s)", k ? ", " : "",
                         db.name[z], p);
            }
            if (straddle)
                snprintf(det + strlen(det), sizeof det - strlen(det),
                         "; district counts include the band holding the limit");
        }
        free(key);
        free(idx);
    }
    figure(&c->figures, val, lab, det);
    {
        sbuf_t list = {0};
        for (size_t i = 0; i < st.n; i++) n_over += (size_t)st.over[i];
        snprintf(val, sizeof val, "%zu of %zu", n_over, st.n);
        for (size_t i = 0, k = 0; i < st.n && k < 8; i++)
            if (st.over[i]) {
                char p[64];
                snprintf(p, sizeof p, "%.0f%%", 100 * st.ratio[i]);
                sb_str(&list, k++ ? ", " : "");
                sb_str(&list, st.label[i]);
                sb_str(&list, " ");
                sb_str(&list, p);
            }
        if (n_over > 8) sb_str(&list, ", ...");
        figure(&c->figures, val, "sites over capacity",
               list.s ? list.s : (st.n && !isnan(st.capacity[0]) ? "none" : "no capacities given"));
        free(list.s);
    }

    /* Under the key figures: everyone by band, with shares. */
    sb_str(&c->summary, "<h3>Everyone by travel time to the nearest site</h3>\n<div class=\"scroll\"><table class=\"bands\">\n"
                        "<thead><tr><th>travel time</th><th class=\"n\">people</th><th class=\"n\">share</th></tr></thead>\n<tbody>\n");
    for (size_t b = 0; b < db.n_b; b++) {
        double p = db.people[b];
        sb_str(&c->summary, db.to_min[b] > limit + 1e-9 ? "<tr class=\"beyond\"><td>" : "<tr><td>");
        sb_esc(&c->summary, db.band[b]);
        sb_str(&c->summary, "</td><td class=\"n\">");
        sb_people(&c->summary, p);
        sb_fmt(&c->summary, "</td><td class=\"n\">%.1f%%</td></tr>\n", total > 0 ? 100 * p / total : 0.0);
    }
    sb_str(&c->summary, "</tbody></table></div>\n");
    if (isfinite(num(r, "people_unreachable")) && num(r, "people_unreachable") > 0) {
        sb_str(&c->summary, "<p><strong>");
        sb_people(&c->summary, num(r, "people_unreachable"));
        sb_str(&c->summary, " people have no path to any site</strong> (water, barriers or impassable land cover between them and every site).</p>\n");
    }

    /* Body: maps, chart, tables. */
    load_vectors(c);
    sb_str(&c->body, "<section class=\"page\"><h2>Travel time to the nearest site</h2>\n");
    rc = map_travel_time(c, tt, &st, bands, n_bands, e);
    if (rc == ERR_OK) rc = render_scale_bands(&sc, bands, n_bands, e);
    if (rc == ERR_OK) rc = chart_districts(c, &db, &sc, e);
    sb_str(&c->body, "</section>\n<section class=\"page\"><h2>Catchments and loads</h2>\n");
    if (rc == ERR_OK) rc = map_catchments(c, ns, &st, e);
    sb_str(&c->body, "</section>\n<section class=\"page\"><h2>Who is left beyond the limit</h2>\n");
    if (rc == ERR_OK) rc = map_beyond(c, tt, limit, &st, e);
    if (rc != ERR_OK) goto done;
    sb_str(&c->body, "</section>\n<section class=\"page\"><h2>Tables</h2>\n");
    districts_table_html(c, &db);
    sites_table_html(c, sites, &st);
    sb_str(&c->body, "</section>\n");

    /* Assumptions from the run. */
    sb_fmt(&c->assumptions, "<li>Travel-time limit: %g min; bands:", limit);
    for (size_t i = 0; i < n_bands; i++) sb_fmt(&c->assumptions, "%s %g", i ? "," : "", bands[i]);
    sb_str(&c->assumptions, " min.</li>\n");
    if (cJSON_GetObjectItemCaseSensitive(r, "capacity_assignment")) {
        const cJSON *ca = cJSON_GetObjectItemCaseSensitive(r, "capacity_assignment");
        sb_str(&c->assumptions, "<li>With capacities, filling the nearest site first: ");
        sb_people(&c->assumptions, num(ca, "served_within_limit"));
        sb_str(&c->assumptions, " served within the limit, ");
        sb_people(&c->assumptions, num(ca, "unserved_no_site_within_limit"));
        sb_str(&c->assumptions, " with no site in reach, ");
        sb_people(&c->assumptions, num(ca, "unserved_sites_full"));
        sb_str(&c->assumptions, " finding sites full.</li>\n");
    }
done:
    sites_tab_free(&st);
    dist_bands_free(&db);
    csv_free(sites);
    csv_free(bt);
    free(tt);
    free(ns);
    free(sp);
    free(bp);
    return rc;
}

/* ---- shared by the site, supply and what-if sections ------------------ */

/* The grid of the run for the maps: travel_time.tif when reach ran, else
 * 'raster' (a raster of the section), else the population raster. */
static int ensure_grid(rctx_t *c, const char *raster, err_t *e)
{
    const char *p = raster ? raster : input_path(c->sum, "population");

    if (c->wkt != NULL) return ERR_OK;
    if (p == NULL)
        return err_set(e, ERR_INPUT, "summary.json in '%s' names no raster to draw maps on (no reach part, no population input)",
                       c->outdir);
    return render_raster_info(p, &c->nx, &c->ny, c->gt, &c->geographic, &c->m_per_unit, &c->wkt, e);
}

/* Coordinates of existing sites, candidates and depots, read again from the
 * scenario's point layers (site/sites.csv and the supply tables carry ids, not
 * coordinates). Read once; a layer that cannot be read is noted. */
static void load_points(rctx_t *c)
{
    const char *pop = input_path(c->sum, "population");
    const scen_layer_t *lay[3];
    static const char *what[3] = {"existing sites", "candidate sites", "depots"};
    err_t e = {0};

    if (c->loaded_points) return;
    c->loaded_points = 1;
    if (c->scen == NULL || pop == NULL) {
        note(c, "site and depot positions left off the maps: the scenario or the population raster cannot be read again");
        return;
    }
    if (grid_load(pop, &c->pgrid, &e) != ERR_OK) {
        note(c, "site and depot positions left off the maps: %s", e.msg);
        return;
    }
    lay[0] = &c->scen->existing;
    lay[1] = &c->scen->candidates;
    lay[2] = &c->scen->depots;
    for (int k = 0; k < 3; k++) {
        if (lay[k]->path == NULL) continue;
        if (points_load(lay[k], what[k], c->pgrid, &c->pts[k], &e) != ERR_OK)
            note(c, "%s left off the maps: %s", what[k], e.msg);
    }
}

/* Position of point 'id' in layer k (0 existing, 1 candidates, 2 depots;
 * -1 = sites of either kind). 0 when found. */
static int point_xy(const rctx_t *c, int k, const char *id, double *x, double *y)
{
    for (int l = 0; l < 3; l++) {
        const points_t *p = c->pts[l];
        if (p == NULL || (k >= 0 && l != k) || (k < 0 && l == 2)) continue;
        for (size_t i = 0; i < p->n; i++)
            if (strcmp(p->id[i], id) == 0) {
                *x = p->x[i];
                *y = p->y[i];
                return 0;
            }
    }
    return -1;
}

/* A text list "a, b, c" of at most 'max' items into an sbuf, escaped. */
static void sb_list_item(sbuf_t *b, size_t k, const char *text)
{
    sb_str(b, k ? ", " : "");
    sb_esc(b, text);
}

/* Density of all people (people per km2) under a site map: where people live. */
static int map_people_base(rctx_t *c, render_map_t *m, int rw, int rh, render_scale_t *sc,
                           err_t *e)
{
    const char *pop = input_path(c->sum, "population");
    float *v = NULL;
    double all = 0;
    int rc;

    render_scale_density(sc);
    if (pop == NULL) return ERR_OK;
    /* Every cell's time "exceeds" -inf: the population raster against itself
     * gives the density of everyone. */
    rc = render_density_beyond(pop, pop, -INFINITY, rw, rh, &v, &all, e);
    if (rc == ERR_OK) render_map_raster(m, v, rw, rh, sc);
    free(v);
    return rc;
}

/* ---- section: site selection ------------------------------------------ */

static int section_site(rctx_t *c, const cJSON *s, err_t *e)
{
    const cJSON *files = cJSON_GetObjectItemCaseSensitive(s, "files");
    const cJSON *before = cJSON_GetObjectItemCaseSensitive(s, "before");
    const cJSON *after = cJSON_GetObjectItemCaseSensitive(s, "after");
    const cJSON *curve = cJSON_GetObjectItemCaseSensitive(s, "coverage_curve"), *it;
    const char *folder = str(s, "folder");
    double total = num(s, "people_total"), limit = num(s, "limit_min");
    char *dir = NULL, *sp = NULL, *png = NULL;
    csv_t *t = NULL;
    double *x = NULL, *y = NULL, *served = NULL, *covered = NULL, vmax = 0, base = 0;
    render_rgb_t *fill = NULL;
    const char **lab = NULL;
    int *isnew = NULL;
    size_t n = 0, n_new = 0, n_curve = 0, n_missing = 0;
    sbuf_t list = {0};
    char val[256], det[256], a[64], b[64];
    render_rgb_t kept = {0.17, 0.29, 0.42}, fresh = render_oklch(0.66, 0.15, 150);
    int rc = ERR_OK, cid, cname, cst, cpe;

    dir = folder ? out_join(c->outdir, folder) : strdup(c->outdir);
    if (dir == NULL) return err_set(e, ERR_NOMEM, "out of memory");
    sp = out_join(dir, str(files, "sites") ? str(files, "sites") : "sites.csv");
    if (sp == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory");
        goto done;
    }
    rc = csv_load(sp, &t, e);
    if (rc != ERR_OK) goto done;
    cid = csv_col(t, "id"), cname = csv_col(t, "name"), cst = csv_col(t, "status"),
    cpe = csv_col(t, "people_served");
    if (cid < 0 || cst < 0 || cpe < 0) {
        rc = err_set(e, ERR_INPUT, "'%s' lacks the columns id, status, people_served; run site again with this version",
                     sp);
        goto done;
    }
    rc = ensure_grid(c, NULL, e);
    if (rc != ERR_OK) goto done;
    load_vectors(c);
    load_points(c);
    x = calloc(t->rows + 1, sizeof *x);
    y = calloc(t->rows + 1, sizeof *y);
    served = calloc(t->rows + 1, sizeof *served);
    fill = calloc(t->rows + 1, sizeof *fill);
    lab = calloc(t->rows + 1, sizeof *lab);
    isnew = calloc(t->rows + 1, sizeof *isnew);
    if (!x || !y || !served || !fill || !lab || !isnew) {
        rc = err_set(e, ERR_NOMEM, "out of memory reading '%s'", sp);
        goto done;
    }
    for (size_t i = 0; i < t->rows; i++) {
        const char *st = csv_get(t, i, cst), *id = csv_get(t, i, cid);
        int nw = strcmp(st, "new") == 0;
        if (strcmp(st, "closed") == 0) continue;   /* not open: not on the map */
        if (nw) {
            sb_list_item(&list, n_new, id);
            if (cname >= 0 && csv_get(t, i, cname)[0]) {
                sb_str(&list, " ");
                sb_esc(&list, csv_get(t, i, cname));
            }
            n_new++;
        }
        if (point_xy(c, -1, id, &x[n], &y[n]) != 0) {
            n_missing++;
            continue;
        }
        served[n] = csv_num(t, i, cpe);
        if (!isfinite(served[n])) served[n] = 0;
        if (served[n] > vmax) vmax = served[n];
        fill[n] = nw ? fresh : kept;
        isnew[n] = nw;
        lab[n] = id;
        n++;
    }

    /* Key figures. */
    fmt_people(num(before, "people_covered"), a, sizeof a);
    fmt_people(num(after, "people_covered"), b, sizeof b);
    snprintf(val, sizeof val, "%.0f%% \xe2\x86\x92 %.0f%%", 100 * num(before, "share"), 100 * num(after, "share"));
    snprintf(det, sizeof det, "%s \xe2\x86\x92 %s people within %g min (%g \xe2\x86\x92 %g sites)", a, b, limit,
             num(before, "sites"), num(after, "sites"));
    figure(&c->figures, val, "people covered before \xe2\x86\x92 after the chosen sites", det);
    snprintf(val, sizeof val, "%zu", n_new);
    figure(&c->figures, val, "sites to open", list.s ? list.s : "none: the existing sites are kept as they are");

    /* Body: map of the chosen sites, coverage curve. */
    sb_str(&c->body, "<section class=\"page\"><h2 id=\"site-selection\">Chosen sites</h2>\n");
    sb_str(&c->body, "<p><strong>Sites to open:</strong> ");
    sb_str(&c->body, list.s ? list.s : "none");
    sb_str(&c->body, ".</p>\n");
    {
        render_map_t *m = NULL;
        render_scale_t sc;
        int rw, rh;
        double rmax = n > 200 ? 8 : 22;
        rc = map_open(c, "Chosen sites: kept and new", &m, &rw, &rh, e);
        if (rc == ERR_OK) rc = map_people_base(c, m, rw, rh, &sc, e);
        if (rc == ERR_OK) {
            render_map_roads(m, c->roads);
            render_map_outlines(m, c->districts, 0);
            render_map_points(m, n, x, y, served, vmax, rmax, fill, 0);
            render_map_rings(m, n, x, y, isnew, rmax + 3, fresh);
            render_map_labels(m, n, x, y, lab);
            render_legend_title(m, "Sites");
            render_legend_point(m, kept, 6, 0, "existing site, kept");
            render_legend_point(m, fresh, 6, 0, "new site to open (ringed)");
            render_legend_title(m, "People each site serves");
            render_legend_sizes(m, vmax, rmax, "people");
            render_legend_title(m, "People per km\xc2\xb2 (everyone)");
            render_legend_scale(m, &sc);
            render_legend_title(m, "Features");
            map_furniture_legend(c, m);
            rc = map_close(c, m, "sites_chosen.png", "Map of the chosen sites, kept and new, sized by people served",
                           "Chosen sites: existing sites kept (dark blue) and new sites to open (green, ringed); circle area \xe2\x88\x9d people the site serves within the limit.",
                           e);
        }
        render_map_free(m);
        if (rc != ERR_OK) goto done;
    }
    if (n_missing > 0) note(c, "%zu chosen sites not drawn on the map: their positions were not found in the scenario's site layers", n_missing);
    covered = calloc((size_t)cJSON_GetArraySize(curve) + 1, sizeof *covered);
    if (covered == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory");
        goto done;
    }
    cJSON_ArrayForEach(it, curve) if (isfinite(num(it, "people_covered"))) covered[n_curve++] = num(it, "people_covered");
    /* With existing sites kept, the curve counts new sites on top of them. */
    if (num(s, "sites_existing") > 0 && isfinite(num(before, "people_covered")) && n_curve > 0 &&
        covered[0] >= num(before, "people_covered"))
        base = num(before, "people_covered");
    if (n_curve > 0 && total > 0) {
        png = out_join(c->mapdir, "coverage_curve.png");
        if (png == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory");
            goto done;
        }
        rc = charts_coverage_curve_base(png, "People covered by the number of sites chosen", n_curve, covered,
                                        base, total, NULL, e);
        if (rc == ERR_OK)
            rc = embed(c, png, "Coverage curve: people covered against the number of sites, with each site's gain",
                       "People covered as sites are added one by one (line: share of everyone) and the gain each added site brings (bars).",
                       e);
        if (rc != ERR_OK) goto done;
        sb_fmt(&c->body, "<h3>Gain of each added site</h3>\n<div class=\"scroll\"><table>\n<thead><tr><th class=\"n\">%s</th>"
                         "<th class=\"n\">people covered</th><th class=\"n\">gain</th><th class=\"n\">share</th></tr></thead>\n<tbody>\n",
               base > 0 ? "new sites" : "sites");
        for (size_t k = 0; k < n_curve; k++) {
            sb_fmt(&c->body, "<tr><td class=\"n\">%zu</td><td class=\"n\">", k + 1);
            sb_people(&c->body, covered[k]);
            sb_str(&c->body, "</td><td class=\"n\">");
            sb_people(&c->body, covered[k] - (k ? covered[k - 1] : base));
            sb_fmt(&c->body, "</td><td class=\"n\">%.1f%%</td></tr>\n", 100 * covered[k] / total);
        }
        sb_str(&c->body, "</tbody></table></div>\n");
    }
    sb_str(&c->body, "</section>\n");

    /* Assumptions. */
    sb_str(&c->assumptions, "<li>Site selection: model ");
    sb_esc(&c->assumptions, str(s, "model") ? str(s, "model") : "?");
    sb_str(&c->assumptions, ", solver status ");
    sb_esc(&c->assumptions, str(s, "status") ? str(s, "status") : "?");
    sb_fmt(&c->assumptions, ", gap %.2f%% between the plan and the best possible", 100 * num(s, "gap"));
    if (isfinite(num(s, "solver_seconds"))) sb_fmt(&c->assumptions, " (%.2f s)", num(s, "solver_seconds"));
    sb_str(&c->assumptions, "; existing sites ");
    sb_fmt(&c->assumptions, "%g, candidates %g.</li>\n", num(s, "sites_existing"), num(s, "sites_candidate_layer"));
done:
    free(dir);
    free(sp);
    free(png);
    free(x);
    free(y);
    free(served);
    free(covered);
    free(fill);
    free(lab);
    free(isnew);
    free(list.s);
    csv_free(t);
    return rc;
}

/* ---- section: supply ---------------------------------------------------- */

/* Index of 'key' in names[0..n), appending it when new (n grows). */
static size_t name_index(const char **names, size_t *n, const char *key)
{
    for (size_t i = 0; i < *n; i++)
        if (strcmp(names[i], key) == 0) return i;
    names[*n] = key;
    return (*n)++;
}

static int section_supply(rctx_t *c, const cJSON *s, err_t *e)
{
    const cJSON *files = cJSON_GetObjectItemCaseSensitive(s, "files");
    const cJSON *as = cJSON_GetObjectItemCaseSensitive(s, "assumptions");
    const cJSON *tot = cJSON_GetObjectItemCaseSensitive(s, "totals");
    const cJSON *sol = cJSON_GetObjectItemCaseSensitive(s, "solver");
    const char *folder = str(s, "folder"), *caution = str(s, "caution");
    char *dir = NULL, *shp = NULL, *stp = NULL, *unp = NULL, *png = NULL;
    csv_t *sh = NULL, *stk = NULL, *un = NULL;
    double *x1 = NULL, *y1 = NULL, *x2 = NULL, *y2 = NULL, *trips = NULL, *vals = NULL;
    double *dx = NULL, *dy = NULL, *sx = NULL, *sy = NULL, tmax = 0;
    const char **sites = NULL, **comms = NULL, **depots = NULL;
    size_t nf = 0, ns = 0, nc = 0, nd = 0, nsp = 0, ndp = 0;
    char val[128], det[600];
    sbuf_t list = {0};
    const cJSON *it;
    render_rgb_t flow = render_oklch(0.50, 0.12, 250), depc = render_oklch(0.45, 0.16, 30),
                 sitec = {0.17, 0.29, 0.42};
    int rc = ERR_OK;

    dir = folder ? out_join(c->outdir, folder) : strdup(c->outdir);
    if (dir == NULL) return err_set(e, ERR_NOMEM, "out of memory");
    shp = out_join(dir, str(files, "shipments") ? str(files, "shipments") : "supply_shipments.csv");
    stp = out_join(dir, str(files, "stock") ? str(files, "stock") : "supply_stock.csv");
    unp = out_join(dir, str(files, "unmet") ? str(files, "unmet") : "supply_unmet.csv");
    png = out_join(c->mapdir, "stock_by_site.png");
    if (!shp || !stp || !unp || !png) {
        rc = err_set(e, ERR_NOMEM, "out of memory");
        goto done;
    }
    rc = csv_load(shp, &sh, e);
    if (rc == ERR_OK) rc = csv_load(stp, &stk, e);
    if (rc == ERR_OK) rc = csv_load(unp, &un, e);
    if (rc != ERR_OK) goto done;
    {
        int need[] = {csv_col(sh, "depot_id"), csv_col(sh, "site_id"), csv_col(sh, "trips"),
                      csv_col(stk, "site_id"), csv_col(stk, "commodity"), csv_col(stk, "kg_delivered"),
                      csv_col(un, "site_id"), csv_col(un, "commodity"), csv_col(un, "short"),
                      csv_col(un, "reason")};
        for (size_t k = 0; k < sizeof need / sizeof need[0]; k++)
            if (need[k] < 0) {
                rc = err_set(e, ERR_INPUT, "'%s' lacks a column the report needs (%s); run the command again with this version",
                             k < 3 ? shp : k < 6 ? stp : unp,
                             k < 3 ? "depot_id, site_id, trips" : k < 6 ? "site_id, commodity, kg_delivered"
                                                                        : "site_id, commodity, short, reason");
                goto done;
            }
    }
    rc = ensure_grid(c, NULL, e);
    if (rc != ERR_OK) goto done;
    load_vectors(c);
    load_points(c);

    /* Key figures: stock per site and trips per depot. */
    {
        int cs = csv_col(stk, "site_id"), cc = csv_col(stk, "commodity"), ck = csv_col(stk, "kg_delivered");
        sites = calloc(stk->rows + 1, sizeof *sites);
        comms = calloc(stk->rows + 1, sizeof *comms);
        vals = calloc((stk->rows + 1) * (stk->rows + 1), sizeof *vals);
        if (!sites || !comms || !vals) {
            rc = err_set(e, ERR_NOMEM, "out of memory reading '%s'", stp);
            goto done;
        }
        for (size_t r = 0; r < stk->rows; r++) {
            name_index(sites, &ns, csv_get(stk, r, cs));
            name_index(comms, &nc, csv_get(stk, r, cc));
        }
        for (size_t r = 0; r < stk->rows; r++) {
            size_t i = name_index(sites, &ns, csv_get(stk, r, cs)), j = name_index(comms, &nc, csv_get(stk, r, cc));
            double k = csv_num(stk, r, ck);
            vals[i * nc + j] += isfinite(k) && k > 0 ? k : 0;
        }
    }
    fmt_people(num(tot, "kg_delivered") / 1000, val, sizeof val);   /* tonnes, 1,093 style */
    snprintf(val + strlen(val), sizeof val - strlen(val), " t");
    snprintf(det, sizeof det, "to %g sites for %g days;", num(tot, "sites"), num(as, "days_of_cover"));
    {
        const cJSON *bc = cJSON_GetObjectItemCaseSensitive(tot, "by_commodity");
        cJSON_ArrayForEach(it, bc)
        {
            char d[64], nd_[64];
            fmt_people(num(it, "delivered"), d, sizeof d);
            fmt_people(num(it, "needed"), nd_, sizeof nd_);
            snprintf(det + strlen(det), sizeof det - strlen(det), " %s %s of %s %s;", it->string, d, nd_,
                     str(it, "unit") ? str(it, "unit") : "");
        }
        if (strlen(det) > 0 && det[strlen(det) - 1] == ';') det[strlen(det) - 1] = '\0';
    }
    figure(&c->figures, val, "stock delivered to the sites", det);
    snprintf(val, sizeof val, "%g", num(tot, "trips"));
    {
        const cJSON *bd = cJSON_GetObjectItemCaseSensitive(tot, "by_depot");
        size_t k = 0;
        cJSON_ArrayForEach(it, bd)
        {
            char p[200];
            snprintf(p, sizeof p, "%s %g trips to %g sites (%.0f truck hours)", it->string, num(it, "trips"),
                     num(it, "sites"), num(it, "truck_hours"));
            sb_list_item(&list, k++, p);
        }
    }
    figure(&c->figures, val, "trips per depot", list.s ? list.s : "no trips");
    snprintf(val, sizeof val, "%zu", un->rows);
    {
        const cJSON *bc = cJSON_GetObjectItemCaseSensitive(tot, "by_commodity");
        det[0] = '\0';
        cJSON_ArrayForEach(it, bc) if (num(it, "short") > 0)
        {
            char p[64];
            fmt_people(num(it, "short"), p, sizeof p);
            snprintf(det + strlen(det), sizeof det - strlen(det), "%s%s %s %s short", det[0] ? "; " : "",
                     it->string, p, str(it, "unit") ? str(it, "unit") : "");
        }
    }
    figure(&c->figures, val, "supply lines short (site and commodity)", det[0] ? det : "every site gets all it needs");

    /* Map: depots, sites and shipments weighted by trips. */
    sb_str(&c->body, "<section class=\"page\"><h2 id=\"supply\">Supply: shipments and stock</h2>\n");
    {
        int cd = csv_col(sh, "depot_id"), cs = csv_col(sh, "site_id"), ct = csv_col(sh, "trips");
        size_t miss = 0;
        render_map_t *m = NULL;
        const char **dl = calloc(sh->rows + 1, sizeof *dl), **sl = calloc(sh->rows + 1, sizeof *sl);
        int rw, rh;
        x1 = calloc(sh->rows + 1, sizeof *x1);
        y1 = calloc(sh->rows + 1, sizeof *y1);
        x2 = calloc(sh->rows + 1, sizeof *x2);
        y2 = calloc(sh->rows + 1, sizeof *y2);
        trips = calloc(sh->rows + 1, sizeof *trips);
        dx = calloc(sh->rows + 1, sizeof *dx);
        dy = calloc(sh->rows + 1, sizeof *dy);
        sx = calloc(sh->rows + 1, sizeof *sx);
        sy = calloc(sh->rows + 1, sizeof *sy);
        depots = calloc(sh->rows + 1, sizeof *depots);
        if (!dl || !sl || !x1 || !y1 || !x2 || !y2 || !trips || !dx || !dy || !sx || !sy || !depots) {
            free(dl);
            free(sl);
            rc = err_set(e, ERR_NOMEM, "out of memory reading '%s'", shp);
            goto done;
        }
        for (size_t r = 0; r < sh->rows; r++) {
            const char *d = csv_get(sh, r, cd), *st = csv_get(sh, r, cs);
            double t = csv_num(sh, r, ct);
            if (point_xy(c, 2, d, &x1[nf], &y1[nf]) != 0 || point_xy(c, -1, st, &x2[nf], &y2[nf]) != 0) {
                miss++;
                continue;
            }
            trips[nf] = isfinite(t) ? t : 0;
            if (trips[nf] > tmax) tmax = trips[nf];
            if (name_index(depots, &ndp, d) == ndp - 1 && ndp - 1 == nd) {
                dx[nd] = x1[nf];
                dy[nd] = y1[nf];
                dl[nd++] = d;
            }
            {
                size_t before = nsp;
                sl[nsp] = st;
                for (size_t q = 0; q < before; q++)
                    if (strcmp(sl[q], st) == 0) sl[nsp] = NULL;
                if (sl[nsp]) {
                    sx[nsp] = x2[nf];
                    sy[nsp] = y2[nf];
                    nsp++;
                }
            }
            nf++;
        }
        rc = map_open(c, "Shipments from depots to sites", &m, &rw, &rh, e);
        if (rc == ERR_OK) {
            char note_[96];
            render_map_roads(m, c->roads);
            render_map_outlines(m, c->districts, 0);
            render_map_flows(m, nf, x1, y1, x2, y2, trips, tmax, 12, flow);
            render_map_points(m, nsp, sx, sy, NULL, 0, 5, &sitec, 1);
            render_map_points(m, nd, dx, dy, NULL, 0, 9, &depc, 1);
            render_map_labels(m, nsp, sx, sy, sl);
            render_map_labels(m, nd, dx, dy, dl);
            render_legend_title(m, "Shipments");
            render_legend_line(m, flow, 12, "most trips");
            snprintf(note_, sizeof note_, "Line width \xe2\x88\x9d trips (widest: %g).", tmax);
            render_legend_line(m, flow, 12 * sqrt(0.25), "fewer trips");
            render_legend_note(m, note_);
            render_legend_title(m, "Features");
            render_legend_point(m, depc, 9, 0, "depot");
            render_legend_point(m, sitec, 5, 0, "site supplied");
            map_furniture_legend(c, m);
            rc = map_close(c, m, "supply_shipments.png", "Map of shipments from depots to sites, line width by trips",
                           "Shipments: a straight line from each depot to each site it supplies (road routes differ); width grows with the number of trips.",
                           e);
        }
        render_map_free(m);
        free(dl);
        free(sl);
        if (miss > 0) note(c, "%zu shipments not drawn on the map: their depot or site position was not found in the scenario's layers", miss);
        if (rc != ERR_OK) goto done;
    }

    /* Stacked bars: shipping weight per site by commodity (one unit for all). */
    if (ns > 0 && nc > 0 && nc <= 12) {
        charts_stack_t cs = {0};
        cs.title = "Stock delivered to each site, by commodity";
        cs.unit = "kg (shipping weight)";
        cs.n_groups = ns;
        cs.groups = sites;
        cs.n_series = nc;
        cs.series = comms;
        cs.values = vals;
        cs.palette = CHARTS_CATEGORIES;
        rc = charts_stacked_bars(png, &cs, NULL, e);
        if (rc == ERR_OK)
            rc = embed(c, png, "Bar chart of stock delivered to each site by commodity",
                       "Stock delivered to each site, by commodity, as shipping weight in kg so commodities of different units stack.",
                       e);
        if (rc != ERR_OK) goto done;
    }

    /* Table: stock per site (delivered of needed, each commodity in its unit). */
    {
        int cs = csv_col(stk, "site_id"), cn = csv_col(stk, "site_name"), cc = csv_col(stk, "commodity"),
            cu = csv_col(stk, "unit"), cne = csv_col(stk, "needed"), cde = csv_col(stk, "delivered"),
            csh = csv_col(stk, "short");
        sb_str(&c->body, "<h3>Stock per site</h3>\n<div class=\"scroll\"><table>\n<thead><tr><th>site</th><th>name</th><th>commodity</th>"
                         "<th class=\"n\">needed</th><th class=\"n\">delivered</th><th class=\"n\">short</th><th>unit</th></tr></thead>\n<tbody>\n");
        for (size_t r = 0; r < stk->rows; r++) {
            double shv = csh >= 0 ? csv_num(stk, r, csh) : 0;
            sb_str(&c->body, shv > 0 ? "<tr class=\"over\"><td>" : "<tr><td>");
            sb_esc(&c->body, csv_get(stk, r, cs));
            sb_str(&c->body, "</td><td>");
            if (cn >= 0) sb_esc(&c->body, csv_get(stk, r, cn));
            sb_str(&c->body, "</td><td>");
            sb_esc(&c->body, csv_get(stk, r, cc));
            sb_str(&c->body, "</td><td class=\"n\">");
            sb_people(&c->body, cne >= 0 ? csv_num(stk, r, cne) : NAN);
            sb_str(&c->body, "</td><td class=\"n\">");
            sb_people(&c->body, cde >= 0 ? csv_num(stk, r, cde) : NAN);
            sb_str(&c->body, "</td><td class=\"n\">");
            sb_people(&c->body, shv);
            sb_str(&c->body, "</td><td>");
            if (cu >= 0) sb_esc(&c->body, csv_get(stk, r, cu));
            sb_str(&c->body, "</td></tr>\n");
        }
        sb_str(&c->body, "</tbody></table></div>\n");
    }
    /* Table: shortages with reasons. */
    sb_str(&c->body, "<h3 id=\"shortages\">Shortages</h3>\n");
    if (un->rows == 0) {
        sb_str(&c->body, "<p>None: every site gets all it needs.</p>\n");
    } else {
        int cs = csv_col(un, "site_id"), cn = csv_col(un, "site_name"), cc = csv_col(un, "commodity"),
            cu = csv_col(un, "unit"), csh = csv_col(un, "short"), cp = csv_col(un, "people_short"),
            cr = csv_col(un, "reason"), cw = csv_col(un, "what_to_do");
        sb_str(&c->body, "<div class=\"scroll\"><table>\n<thead><tr><th>site</th><th>name</th><th>commodity</th>"
                         "<th class=\"n\">short</th><th>unit</th><th class=\"n\">people affected</th><th>reason</th><th>what to do</th></tr></thead>\n<tbody>\n");
        for (size_t r = 0; r < un->rows; r++) {
            sb_str(&c->body, "<tr><td>");
            sb_esc(&c->body, csv_get(un, r, cs));
            sb_str(&c->body, "</td><td>");
            if (cn >= 0) sb_esc(&c->body, csv_get(un, r, cn));
            sb_str(&c->body, "</td><td>");
            sb_esc(&c->body, csv_get(un, r, cc));
            sb_str(&c->body, "</td><td class=\"n\">");
            sb_people(&c->body, csv_num(un, r, csh));
            sb_str(&c->body, "</td><td>");
            if (cu >= 0) sb_esc(&c->body, csv_get(un, r, cu));
            sb_str(&c->body, "</td><td class=\"n\">");
            sb_people(&c->body, cp >= 0 ? csv_num(un, r, cp) : NAN);
            sb_str(&c->body, "</td><td>");
            sb_esc(&c->body, csv_get(un, r, cr));
            sb_str(&c->body, "</td><td>");
            if (cw >= 0) sb_esc(&c->body, csv_get(un, r, cw));
            sb_str(&c->body, "</td></tr>\n");
        }
        sb_str(&c->body, "</tbody></table></div>\n");
    }
    sb_str(&c->body, "</section>\n");

    /* Assumptions: rations, days of cover, buffer, the ration caution. */
    sb_str(&c->assumptions, "<li>Supply rations:");
    {
        size_t k = 0;
        cJSON_ArrayForEach(it, cJSON_GetObjectItemCaseSensitive(as, "commodities"))
        {
            sb_str(&c->assumptions, k++ ? "; " : " ");
            sb_esc(&c->assumptions, str(it, "name") ? str(it, "name") : "?");
            sb_fmt(&c->assumptions, " %.4g ", num(it, "quantity"));
            sb_esc(&c->assumptions, str(it, "unit") ? str(it, "unit") : "");
            sb_str(&c->assumptions, " ");
            sb_esc(&c->assumptions, str(it, "rate") ? str(it, "rate") : "");
        }
    }
    sb_fmt(&c->assumptions, ". Days of cover %g, lead time %g days, buffer %.0f%%.</li>\n",
           num(as, "days_of_cover"), num(as, "lead_time_days"), 100 * num(as, "buffer"));
    if (sol) {
        sb_str(&c->assumptions, "<li>Supply plan: solver status ");
        sb_esc(&c->assumptions, str(sol, "status") ? str(sol, "status") : "?");
        sb_fmt(&c->assumptions, ", gap %.2f%% (asked for %.2f%%).</li>\n", 100 * num(sol, "gap"),
               100 * num(sol, "requested_gap"));
    }
    if (caution) {
        sb_str(&c->assumptions, "<li class=\"ration-caution\"><strong>Rations:</strong> ");
        sb_esc(&c->assumptions, caution);
        sb_str(&c->assumptions, "</li>\n");
    }
done:
    free(dir);
    free(shp);
    free(stp);
    free(unp);
    free(png);
    free(x1);
    free(y1);
    free(x2);
    free(y2);
    free(trips);
    free(vals);
    free(dx);
    free(dy);
    free(sx);
    free(sy);
    free(sites);
    free(comms);
    free(depots);
    free(list.s);
    csv_free(sh);
    csv_free(stk);
    csv_free(un);
    return rc;
}


/* ---- section: compare (what-if variants) -------------------------------- */

static int section_compare(rctx_t *c, const cJSON *s, err_t *e)
{
    enum { MAX_MAPS = 8 };
    const cJSON *vars = cJSON_GetObjectItemCaseSensitive(s, "variants"), *it;
    const cJSON *base = cJSON_GetObjectItemCaseSensitive(s, "base");
    double limit = num(s, "limit_min"), total = num(s, "people_total");
    size_t n = (size_t)cJSON_GetArraySize(vars), k = 0, worst = 0, n_maps = 0;
    const char **names = NULL;
    double *pushed = NULL;
    const cJSON **byrank = NULL;
    char *png = NULL, val[128], det[400], lab[160];
    static const double steps[] = {5, 15, 30, 60};
    int rc = ERR_OK;

    if (n == 0 || !isfinite(limit))
        return err_set(e, ERR_INPUT, "summary.json in '%s': the compare part lacks variants or limit_min; run compare again",
                       c->outdir);
    names = calloc(n, sizeof *names);
    pushed = calloc(n, sizeof *pushed);
    byrank = calloc(n, sizeof *byrank);
    png = out_join(c->mapdir, "variants_pushed.png");
    if (!names || !pushed || !byrank || !png) {
        rc = err_set(e, ERR_NOMEM, "out of memory");
        goto done;
    }
    cJSON_ArrayForEach(it, vars)
    {
        names[k] = str(it, "name") ? str(it, "name") : "?";
        pushed[k] = isfinite(num(it, "pushed_beyond_limit")) ? num(it, "pushed_beyond_limit") : 0;
        if (pushed[k] > pushed[worst]) worst = k;
        byrank[k] = it;
        k++;
    }
    /* Ranking order (rank 1 first); variants without a rank keep their order. */
    for (size_t i = 1; i < n; i++)
        for (size_t j = i; j > 0 && num(byrank[j - 1], "rank") > num(byrank[j], "rank"); j--) {
            const cJSON *t = byrank[j];
            byrank[j] = byrank[j - 1];
            byrank[j - 1] = t;
        }

    /* Key figures. */
    if (isfinite(total) && total > 0) {
        snprintf(val, sizeof val, "%.0f%%", 100 * num(base, "people_within_limit") / total);
        snprintf(lab, sizeof lab, "of people within %g min as things are", limit);
        fmt_people(num(base, "people_within_limit"), det, sizeof det);
        snprintf(det + strlen(det), sizeof det - strlen(det), " people, %g sites open", num(base, "sites_open"));
        figure(&c->figures, val, lab, det);
    }
    fmt_people(pushed[worst], val, sizeof val);
    snprintf(lab, sizeof lab, "people pushed beyond %g min in the worst case", limit);
    snprintf(det, sizeof det, "variant '%s'", names[worst]);
    figure(&c->figures, val, lab, det);
    snprintf(val, sizeof val, "%zu", n);
    det[0] = '\0';
    for (size_t i = 0; i < n; i++) {
        char p[64];
        fmt_people(num(byrank[i], "pushed_beyond_limit"), p, sizeof p);
        snprintf(det + strlen(det), sizeof det - strlen(det), "%s%g. %s (%s)", i ? ", " : "", num(byrank[i], "rank"),
                 str(byrank[i], "name") ? str(byrank[i], "name") : "?", p);
    }
    figure(&c->figures, val, "variants compared, worst first", det);

    /* Maps: minutes gained or lost, one per variant. */
    sb_str(&c->body, "<section class=\"page\"><h2 id=\"variants\">What if: variants compared</h2>\n");
    load_points(c);
    for (size_t i = 0; i < n && rc == ERR_OK; i++) {
        const cJSON *v = byrank[i], *files = cJSON_GetObjectItemCaseSensitive(v, "files");
        const char *dm = str(files, "delta_minutes");
        char *tif = NULL, file[96], title[200], caption[300];
        render_map_t *m = NULL;
        render_scale_t sc;
        float *vals = NULL, *mask = NULL;
        int rw, rh;
        if (dm == NULL) continue;
        if (n_maps == MAX_MAPS) {
            note(c, "maps drawn for the first %d variants only; the others are in the ranking table", MAX_MAPS);
            break;
        }
        tif = out_join(c->outdir, dm);
        if (tif == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory");
            break;
        }
        rc = ensure_grid(c, tif, e);
        if (rc == ERR_OK) {
            load_vectors(c);
            rc = render_scale_diverging(&sc, steps, sizeof steps / sizeof steps[0], e);
        }
        snprintf(title, sizeof title, "Minutes gained or lost: %s", str(v, "name") ? str(v, "name") : "?");
        if (rc == ERR_OK) rc = map_open(c, title, &m, &rw, &rh, e);
        if (rc == ERR_OK) rc = render_read_band(tif, rw, rh, RENDER_AVERAGE, &vals, e);
        if (rc == ERR_OK) {
            const points_t *ex = c->pts[0];
            render_rgb_t dark = {0.10, 0.10, 0.12};
            render_map_raster(m, vals, rw, rh, &sc);
            mask = population_mask(c, rw, rh);
            if (mask) render_map_blank(m, mask, rw, rh);
            render_map_roads(m, c->roads);
            render_map_outlines(m, c->districts, 0);
            if (ex) {
                render_map_points(m, ex->n, ex->x, ex->y, NULL, 0, ex->n > 200 ? 1.8 : 5, &dark, 1);
                render_map_labels(m, ex->n, ex->x, ex->y, (const char *const *)ex->id);
            }
            render_legend_title(m, "Change in travel time (min)");
            render_legend_scale(m, &sc);
            render_legend_note(m, "Blue: faster. Brown: slower.");
            render_legend_title(m, "Features");
            if (ex) render_legend_point(m, dark, 5, 0, "site");
            map_furniture_legend(c, m);
            if (mask) render_legend_note(m, "Blank: no population data.");
            snprintf(file, sizeof file, "variant_%zu.png", i + 1);
            snprintf(caption, sizeof caption, "Variant '%s': minutes to the nearest site, variant minus as things are. ",
                     str(v, "name") ? str(v, "name") : "?");
            fmt_people(num(v, "pushed_beyond_limit"), val, sizeof val);
            snprintf(caption + strlen(caption), sizeof caption - strlen(caption),
                     "%s people pushed beyond %g min.", val, limit);
            rc = map_close(c, m, file, "Map of minutes gained or lost in a variant", caption, e);
            n_maps++;
        }
        free(vals);
        free(mask);
        free(tif);
        render_map_free(m);
    }
    if (rc != ERR_OK) goto done;
    rc = charts_bars(png, "People pushed beyond the limit, by variant", "people", n, names, pushed, NULL, e);
    if (rc == ERR_OK)
        rc = embed(c, png, "Bar chart of people pushed beyond the limit in each variant",
                   "People who were within the limit as things are and are beyond it in each variant.", e);
    if (rc != ERR_OK) goto done;
    sb_str(&c->body, "<h3>Ranking</h3>\n<div class=\"scroll\"><table>\n<thead><tr><th class=\"n\">rank</th><th>variant</th>"
                     "<th class=\"n\">within limit</th><th class=\"n\">pushed beyond</th><th class=\"n\">gained</th>"
                     "<th class=\"n\">cut off</th><th class=\"n\">added person-hours</th><th class=\"n\">sites newly over capacity</th></tr></thead>\n<tbody>\n");
    for (size_t i = 0; i < n; i++) {
        const cJSON *v = byrank[i];
        sb_fmt(&c->body, "<tr><td class=\"n\">%g</td><td>", num(v, "rank"));
        sb_esc(&c->body, str(v, "name") ? str(v, "name") : "?");
        sb_str(&c->body, "</td><td class=\"n\">");
        sb_people(&c->body, num(v, "people_within_limit"));
        sb_str(&c->body, "</td><td class=\"n\">");
        sb_people(&c->body, num(v, "pushed_beyond_limit"));
        sb_str(&c->body, "</td><td class=\"n\">");
        sb_people(&c->body, num(v, "gained_within_limit"));
        sb_str(&c->body, "</td><td class=\"n\">");
        sb_people(&c->body, num(v, "cut_off"));
        sb_str(&c->body, "</td><td class=\"n\">");
        sb_people(&c->body, num(v, "added_person_hours"));
        sb_fmt(&c->body, "</td><td class=\"n\">%g</td></tr>\n", num(v, "sites_newly_over_capacity"));
    }
    sb_str(&c->body, "</tbody></table></div>\n</section>\n");
    sb_fmt(&c->assumptions, "<li>Variants: each changes roads, speeds or sites as its scenario entry says; "
                            "the limit is %g min; minutes are variant minus as things are.</li>\n", limit);
done:
    free(names);
    free(pushed);
    free(byrank);
    free(png);
    return rc;
}

/* ---- section: links (critical roads) ------------------------------------ */

static int section_links(rctx_t *c, const cJSON *s, err_t *e)
{
    const cJSON *files = cJSON_GetObjectItemCaseSensitive(s, "files");
    const cJSON *top = cJSON_GetObjectItemCaseSensitive(s, "top"), *it;
    double limit = num(s, "limit_min"), smax = 0;
    char *gp = NULL, val[128], det[600];
    render_lines_t *sc = NULL, *ids = NULL;
    double *score = NULL, *lx = NULL, *ly = NULL;
    const char **lab = NULL;
    size_t *idx = NULL, nl = 0;
    render_map_t *m = NULL;
    int rw, rh, rc = ERR_OK;

    gp = out_join(c->outdir, str(files, "links") ? str(files, "links") : "links.gpkg");
    if (gp == NULL) return err_set(e, ERR_NOMEM, "out of memory");
    rc = ensure_grid(c, NULL, e);
    if (rc != ERR_OK) goto done;
    load_vectors(c);
    /* The score rides in the name slot: the loader keeps one text per line. */
    rc = render_lines_load(gp, "links", "class", "pushed_beyond_limit", c->wkt, &sc, e);
    if (rc == ERR_OK) rc = render_lines_load(gp, "links", "class", "road_id", c->wkt, &ids, e);
    if (rc != ERR_OK) goto done;
    if (sc->n != ids->n) {
        rc = err_set(e, ERR_INPUT, "'%s' changed while it was read; run links again", gp);
        goto done;
    }
    score = calloc(sc->n + 1, sizeof *score);
    idx = calloc(sc->n + 1, sizeof *idx);
    lx = calloc(sc->n + 1, sizeof *lx);
    ly = calloc(sc->n + 1, sizeof *ly);
    lab = calloc(sc->n + 1, sizeof *lab);
    if (!score || !idx || !lx || !ly || !lab) {
        rc = err_set(e, ERR_NOMEM, "out of memory");
        goto done;
    }
    for (size_t i = 0; i < sc->n; i++) {
        score[i] = sc->name[i] ? strtod(sc->name[i], NULL) : 0;
        if (!isfinite(score[i]) || score[i] < 0) score[i] = 0;
        if (score[i] > smax) smax = score[i];
    }
    order_desc(score, sc->n, idx);

    /* Key figures. */
    {
        const cJSON *t0 = cJSON_GetArrayItem(top, 0);
        fmt_people(num(t0, "pushed_beyond_limit"), val, sizeof val);
        snprintf(det, sizeof det, "if road %s (%s%s) is cut; %g links scored", str(t0, "road_id") ? str(t0, "road_id") : "?",
                 str(t0, "class") ? str(t0, "class") : "?", cJSON_IsTrue(cJSON_GetObjectItemCaseSensitive(t0, "bridge")) ? ", bridge" : "",
                 num(s, "links_scored"));
        figure(&c->figures, val, "people pushed beyond the limit by the most critical road", det);
    }

    /* Map: each scored link, width and colour by people pushed beyond. */
    sb_str(&c->body, "<section class=\"page\"><h2 id=\"links\">Critical roads</h2>\n");
    rc = map_open(c, "Critical roads: people pushed beyond the limit if cut", &m, &rw, &rh, e);
    if (rc != ERR_OK) goto done;
    render_map_roads(m, c->roads);
    render_map_outlines(m, c->districts, 0);
    for (size_t r = sc->n; r-- > 0;) {   /* least critical first, the worst on top */
        size_t i = idx[r];
        render_lines_t one = {1, &sc->start[i], sc->x, sc->y, &sc->rank[i], &sc->name[i]};
        double t = smax > 0 ? score[i] / smax : 0;
        if (score[i] <= 0) continue;
        render_map_highlight(m, &one, render_ramp_warm(0.35 + 0.65 * sqrt(t)), 2 + 8 * sqrt(t));
    }
    for (size_t r = 0; r < sc->n && r < 10; r++) {
        size_t i = idx[r], a = sc->start[i], b = sc->start[i + 1];
        if (score[i] <= 0 || b <= a) continue;
        lx[nl] = sc->x[(a + b) / 2];
        ly[nl] = sc->y[(a + b) / 2];
        lab[nl++] = ids->name[i] ? ids->name[i] : "?";
    }
    render_map_labels(m, nl, lx, ly, lab);
    render_legend_title(m, "Pushed beyond the limit if cut");
    {
        char l1[200], l2[200];
        fmt_people(smax, val, sizeof val);
        snprintf(l1, sizeof l1, "%s people (most critical)", val);
        fmt_people(smax / 4, val, sizeof val);
        snprintf(l2, sizeof l2, "%s people", val);
        render_legend_line(m, render_ramp_warm(1.0), 10, l1);
        render_legend_line(m, render_ramp_warm(0.35 + 0.65 * 0.5), 6, l2);
    }
    render_legend_note(m, "Labelled: the ten most critical.");
    render_legend_title(m, "Features");
    map_furniture_legend(c, m);
    rc = map_close(c, m, "critical_roads.png", "Map of critical roads, width and colour by people pushed beyond the limit",
                   "Critical roads: each road link drawn wider and darker the more people would be pushed beyond the limit if it were cut; unmarked roads push nobody beyond it.",
                   e);
    if (rc != ERR_OK) goto done;
    sb_str(&c->body, "<h3>The ten most critical roads</h3>\n<div class=\"scroll\"><table>\n<thead><tr><th class=\"n\">rank</th><th>road</th><th>class</th>"
                     "<th>bridge</th><th class=\"n\">pushed beyond</th><th class=\"n\">cut off</th><th class=\"n\">added person-hours</th></tr></thead>\n<tbody>\n");
    cJSON_ArrayForEach(it, top)
    {
        sb_fmt(&c->body, "<tr><td class=\"n\">%g</td><td>", num(it, "rank"));
        sb_esc(&c->body, str(it, "road_id") ? str(it, "road_id") : "?");
        sb_str(&c->body, "</td><td>");
        sb_esc(&c->body, str(it, "class") ? str(it, "class") : "");
        sb_str(&c->body, cJSON_IsTrue(cJSON_GetObjectItemCaseSensitive(it, "bridge")) ? "</td><td>yes" : "</td><td>no");
        sb_str(&c->body, "</td><td class=\"n\">");
        sb_people(&c->body, num(it, "pushed_beyond_limit"));
        sb_str(&c->body, "</td><td class=\"n\">");
        sb_people(&c->body, num(it, "cut_off"));
        sb_str(&c->body, "</td><td class=\"n\">");
        sb_people(&c->body, num(it, "added_person_hours"));
        sb_str(&c->body, "</td></tr>\n");
    }
    sb_str(&c->body, "</tbody></table></div>\n</section>\n");
    sb_fmt(&c->assumptions, "<li>Critical roads: each road link is cut on its own and people whose time "
                            "to the nearest site passes %g min are counted.</li>\n", limit);
done:
    free(gp);
    free(score);
    free(idx);
    free(lx);
    free(ly);
    free(lab);
    render_lines_free(sc);
    render_lines_free(ids);
    render_map_free(m);
    return rc;
}

/* ---- sections --------------------------------------------------------- */

typedef struct section {
    const char *key;   /* object in summary.json */
    int (*run)(rctx_t *c, const cJSON *part, err_t *e);
} section_t;

/* In report order. Later: {"site", section_site}, {"supply", section_supply},
 * {"compare", section_compare}: each draws with render/charts and appends. */
static const section_t sections[] = {
    {"reach", section_reach},
    {"site", section_site},
    {"supply", section_supply},
    {"compare", section_compare},
    {"links", section_links},
};

static void assumptions_common(rctx_t *c)
{
    const cJSON *p = cJSON_GetObjectItemCaseSensitive(c->sum, "parameters"), *it;
    const char *mode = str(p, "mode"), *dir = str(p, "direction");
    const cJSON *slope = cJSON_GetObjectItemCaseSensitive(p, "slope");
    sbuf_t *a = &c->assumptions;

    if (p == NULL) return;
    sb_str(a, "<li>Travel ");
    sb_esc(a, mode && strcmp(mode, "vehicle") == 0 ? "by vehicle" : "on foot");
    if (isfinite(num(p, "walk_speed_kmh")))
        sb_fmt(a, "; walking speed %g km/h off roads", num(p, "walk_speed_kmh"));
    if (cJSON_IsBool(slope)) sb_str(a, cJSON_IsTrue(slope) ? ", slowed or sped by slope (Tobler)" : ", slope ignored");
    if (isfinite(num(p, "neighbours"))) sb_fmt(a, "; cells joined to %g neighbours", num(p, "neighbours"));
    sb_str(a, "; direction: ");
    sb_esc(a, dir && strcmp(dir, "from_site") == 0 ? "from the site to people" : "people travel to the site");
    sb_str(a, ".</li>\n");
    if (cJSON_GetArraySize(cJSON_GetObjectItemCaseSensitive(p, "road_speeds")) > 0) {
        sb_str(a, "<li>Road speeds (walking / vehicle, km/h): ");
        int k = 0;
        cJSON_ArrayForEach(it, cJSON_GetObjectItemCaseSensitive(p, "road_speeds"))
        {
            sb_str(a, k++ ? "; " : "");
            sb_esc(a, str(it, "class") ? str(it, "class") : "?");
            sb_fmt(a, " %g / %g", num(it, "walk_kmh"), num(it, "vehicle_kmh"));
        }
        sb_str(a, ".</li>\n");
    }
}

static const char css[] =
    "body{font-family:'DejaVu Sans',Verdana,sans-serif;color:#1a1a1f;margin:0 auto;max-width:62rem;"
    "padding:0 1rem 2rem;line-height:1.45}\n"
    "h1{font-size:1.6rem;margin:1.2rem 0 .2rem}h2{font-size:1.25rem;border-bottom:2px solid #2c4a6b;"
    "padding-bottom:.2rem;margin-top:2rem}h3{font-size:1.05rem}\n"
    ".sub{color:#555;margin:0 0 1rem}.figs{display:flex;flex-wrap:wrap;gap:.8rem}\n"
    ".fig{flex:1 1 14rem;border:1px solid #c9ccd3;border-left:6px solid #2c4a6b;padding:.6rem .8rem;"
    "background:#f7f8fa}\n.val{font-size:1.9rem;font-weight:bold}.lab{font-weight:bold}"
    ".det{color:#444;font-size:.9rem}\n"
    "figure{margin:1rem 0}img{max-width:100%;height:auto;border:1px solid #ddd}"
    "figcaption{font-size:.9rem;color:#444}\n"
    ".scroll{overflow-x:auto}table{border-collapse:collapse;font-size:.9rem;min-width:60%}"
    "th,td{border-bottom:1px solid #ddd;padding:.25rem .5rem;text-align:left}"
    "th{background:#eef0f4}.n{text-align:right}tr.over td{background:#fbe9e4}tr.all td{font-weight:bold}"
    "tr.beyond td{background:#fdf1e2}\n"
    ".caution{border:2px solid #a0522d;background:#fdf4ec;padding:.7rem 1rem;margin:1rem 0}"
    ".small{font-size:.85rem;color:#555}\n"
    "@media (max-width:40rem){.val{font-size:1.5rem}body{padding:0 .5rem}}\n"
    "@page{size:A4;margin:14mm}\n"
    "@media print{body{max-width:none;padding:0;font-size:10pt}.page{break-before:page;page-break-before:always}"
    "figure,tr,.fig{break-inside:avoid;page-break-inside:avoid}img{max-height:230mm;border:none}"
    ".scroll{overflow:visible}}\n";

static int write_html(rctx_t *c, err_t *e)
{
    const char *name = str(c->sum, "name"), *caution = str(c->sum, "caution");
    const cJSON *w = cJSON_GetObjectItemCaseSensitive(c->sum, "warnings"), *it;
    sbuf_t h = {0};
    out_file_t of = {0};
    int rc;

    sb_str(&h, "<!DOCTYPE html>\n<html xmlns=\"http://www.w3.org/1999/xhtml\" lang=\"en\">\n<head>\n"
               "<meta charset=\"utf-8\"/>\n"
               "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n<title>");
    sb_esc(&h, name ? name : "sitereach plan");
    sb_str(&h, " \xe2\x80\x94 plan report</title>\n<style>\n");
    sb_str(&h, css);
    sb_str(&h, "</style>\n</head>\n<body>\n<h1>");
    sb_esc(&h, name ? name : "sitereach plan");
    sb_str(&h, "</h1>\n<p class=\"sub\">Plan report \xc2\xb7 run ");
    sb_esc(&h, c->date);
    sb_str(&h, " \xc2\xb7 ");
    sb_esc(&h, str(c->sum, "software") ? str(c->sum, "software") : "sitereach");
    sb_str(&h, "</p>\n<div class=\"caution\" id=\"caution\"><strong>Planning aid.</strong> ");
    sb_esc(&h, caution ? caution : "These results are a planning aid; check them on the ground and against the guidance of local authorities before acting on them.");
    sb_str(&h, "</div>\n<h2 id=\"key-figures\">Key figures</h2>\n<div class=\"figs\">\n");
    sb_str(&h, c->figures.s ? c->figures.s : "");
    sb_str(&h, "</div>\n");
    sb_str(&h, c->summary.s ? c->summary.s : "");
    sb_str(&h, c->body.s ? c->body.s : "");
    sb_str(&h, "<section class=\"page\"><h2 id=\"assumptions\">Assumptions</h2>\n<ul>\n");
    sb_str(&h, c->assumptions.s ? c->assumptions.s : "");
    sb_str(&h, "<li>People come from the population raster as given; travel times are modelled, not measured.</li>\n</ul>\n");
    if (cJSON_GetArraySize(w) > 0 || c->res->n_notes > 0) {
        sb_str(&h, "<h3>Warnings</h3>\n<ul>\n");
        cJSON_ArrayForEach(it, w) if (cJSON_IsString(it))
        {
            sb_str(&h, "<li>");
            sb_esc(&h, it->valuestring);
            sb_str(&h, "</li>\n");
        }
        for (size_t i = 0; i < c->res->n_notes; i++) {
            sb_str(&h, "<li>");
            sb_esc(&h, c->res->notes[i]);
            sb_str(&h, "</li>\n");
        }
        sb_str(&h, "</ul>\n");
    }
    sb_str(&h, "<h3>Inputs</h3>\n<div class=\"scroll\"><table>\n<thead><tr><th>role</th><th>file</th><th>SHA-256 (first 12)</th></tr></thead>\n<tbody>\n");
    cJSON_ArrayForEach(it, cJSON_GetObjectItemCaseSensitive(c->sum, "inputs"))
    {
        const char *sha = str(it, "sha256");
        char s12[13] = "";
        if (sha) snprintf(s12, sizeof s12, "%.12s", sha);
        sb_str(&h, "<tr><td>");
        sb_esc(&h, str(it, "role"));
        sb_str(&h, "</td><td>");
        sb_esc(&h, str(it, "path"));
        sb_str(&h, "</td><td>");
        sb_esc(&h, s12);
        sb_str(&h, "</td></tr>\n");
    }
    sb_str(&h, "</tbody></table></div>\n<p class=\"small\">Data: ");
    sb_esc(&h, c->credits[0] ? c->credits : "as named in the inputs above");
    sb_str(&h, ". Coordinate system: ");
    sb_esc(&h, c->crs);
    sb_str(&h, ".</p>\n</section>\n<div class=\"caution\"><strong>Before acting:</strong> ");
    sb_esc(&h, caution ? caution : "check these results on the ground and against local authorities' guidance.");
    sb_str(&h, "</div>\n</body>\n</html>\n");
    if (h.failed || c->figures.failed || c->summary.failed || c->body.failed || c->assumptions.failed) {
        free(h.s);
        return err_set(e, ERR_NOMEM, "out of memory composing the report in '%s'", c->outdir);
    }
    rc = out_file_open(&of, c->res->html, e);
    if (rc == ERR_OK) {
        if (fwrite(h.s, 1, h.n, of.f) != h.n) {
            out_file_abort(&of);
            rc = err_set(e, ERR_IO, "cannot write '%s' (disk full?)", c->res->html);
        } else {
            rc = out_file_commit(&of, e);
        }
    }
    free(h.s);
    return rc;
}

static int read_summary(const char *path, cJSON **out, err_t *e)
{
    FILE *f = fopen(path, "rb");
    char *text = NULL;
    const char *end = NULL;
    long n;
    int rc = ERR_OK;

    *out = NULL;
    if (f == NULL)
        return err_set(e, ERR_IO, "cannot open '%s'; give a folder written by a sitereach command (reach, site, plan)",
                       path);
    if (fseek(f, 0, SEEK_END) != 0 || (n = ftell(f)) < 0 || fseek(f, 0, SEEK_SET) != 0 ||
        (text = malloc((size_t)n + 1)) == NULL || fread(text, 1, (size_t)n, f) != (size_t)n) {
        rc = err_set(e, ERR_IO, "cannot read '%s'", path);
        goto done;
    }
    text[n] = '\0';
    *out = cJSON_ParseWithOpts(text, &end, 1);
    if (*out == NULL || !cJSON_IsObject(*out)) {
        cJSON_Delete(*out);
        *out = NULL;
        rc = err_set(e, ERR_INPUT, "'%s' is not a JSON object (near byte %ld); run the command again",
                     path, end ? (long)(end - text) : 0L);
    }
done:
    free(text);
    fclose(f);
    return rc;
}

int report_write(const char *outdir, report_result_t *res, err_t *e)
{
    rctx_t c;
    const cJSON *grid;
    const char *paths[8];
    size_t np = 0, n_sections = 0;
    char *sp = NULL;
    int rc;

    memset(res, 0, sizeof *res);
    memset(&c, 0, sizeof c);
    c.outdir = outdir;
    c.res = res;
    sp = out_join(outdir, "summary.json");
    res->html = out_join(outdir, "report.html");
    c.mapdir = out_join(outdir, "maps");
    if (sp == NULL || res->html == NULL || c.mapdir == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory");
        goto done;
    }
    rc = read_summary(sp, &c.sum, e);
    if (rc != ERR_OK) goto done;
    for (size_t i = 0; i < sizeof sections / sizeof sections[0]; i++)
        if (cJSON_IsObject(cJSON_GetObjectItemCaseSensitive(c.sum, sections[i].key))) n_sections++;
    if (n_sections == 0) {
        rc = err_set(e, ERR_INPUT, "'%s' holds no results to report (no reach, site, supply, compare or links part); run 'sitereach reach' or 'plan' into '%s' first",
                     sp, outdir);
        goto done;
    }
    rc = out_mkdir(c.mapdir, e);
    if (rc != ERR_OK) goto done;
    c.date = str(c.sum, "run_at") ? str(c.sum, "run_at") : "unknown";
    grid = cJSON_GetObjectItemCaseSensitive(c.sum, "grid");
    c.crs = str(grid, "crs") ? str(grid, "crs") : "unknown";
    /* The scenario gives layer and field names for roads and districts; when it
     * cannot be read again the maps fall back to defaults. */
    /* The inputs list holds its absolute path, so the report may run from any
     * folder; the top-level "scenario" is as typed (older summaries). */
    if (input_path(c.sum, "scenario") != NULL || str(c.sum, "scenario") != NULL) {
        err_t se = {0};
        const char *sp_in = input_path(c.sum, "scenario") ? input_path(c.sum, "scenario")
                                                          : str(c.sum, "scenario");
        if (scen_load(sp_in, &c.scen, &se) != ERR_OK)
            note(&c, "scenario not read again (%s); map layers use default layer and field names", se.msg);
    }
    {
        static const char *roles[] = {"population", "roads", "existing sites", "candidate sites",
                                      "depots", "districts"};
        for (size_t i = 0; i < sizeof roles / sizeof roles[0]; i++)
            if (input_path(c.sum, roles[i])) paths[np++] = input_path(c.sum, roles[i]);
    }
    report_credits(paths, np, c.credits, sizeof c.credits);
    for (size_t i = 0; i < sizeof sections / sizeof sections[0]; i++) {
        const cJSON *part = cJSON_GetObjectItemCaseSensitive(c.sum, sections[i].key);
        if (!cJSON_IsObject(part)) continue;
        rc = sections[i].run(&c, part, e);
        if (rc != ERR_OK) goto done;
    }
    assumptions_common(&c);
    rc = write_html(&c, e);
done:
    free(sp);
    free(c.mapdir);
    free(c.wkt);
    free(c.figures.s);
    free(c.summary.s);
    free(c.body.s);
    free(c.assumptions.s);
    render_lines_free(c.roads);
    render_lines_free(c.districts);
    for (int k = 0; k < 3; k++) points_free(c.pts[k]);
    grid_free(c.pgrid);
    scen_free(c.scen);
    cJSON_Delete(c.sum);
    return rc;
}

void report_result_destroy(report_result_t *res)
{
    if (res == NULL) return;
    free(res->html);
    for (size_t i = 0; i < res->n_images; i++) free(res->images[i]);
    free(res->images);
    for (size_t i = 0; i < res->n_notes; i++) free(res->notes[i]);
    free(res->notes);
    memset(res, 0, sizeof *res);
}
