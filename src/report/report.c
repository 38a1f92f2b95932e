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
#include "output.h"
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

/* ---- sections --------------------------------------------------------- */

typedef struct section {
    const char *key;   /* object in summary.json */
    int (*run)(rctx_t *c, const cJSON *part, err_t *e);
} section_t;

/* In report order. Later: {"site", section_site}, {"supply", section_supply},
 * {"compare", section_compare}: each draws with render/charts and appends. */
static const section_t sections[] = {
    {"reach", section_reach},
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
        rc = err_set(e, ERR_INPUT, "'%s' holds no results to report (no reach part); run 'sitereach reach' into '%s' first",
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
