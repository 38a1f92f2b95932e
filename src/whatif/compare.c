/* compare: base and variants side by side (see include/compare.h). One network
 * serves every run: each variant edits edge weights in place (variant_apply),
 * the reach stage runs on the edited network, the differences with the base are
 * counted and written, and network_edit_reset restores the base weights. Only
 * the base result and the current variant's are held in memory. */
#include "compare.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "coverage.h"
#include "output.h"
#include "progress.h"
#include "scen_variants.h"
#include "sptree.h"
#include "table.h"
#include "travel.h"
#include "variant.h"

void compare_diff_destroy(compare_diff_t *d)
{
    if (d == NULL) return;
    free(d->pushed_by_zone);
    d->pushed_by_zone = NULL;
}

int compare_cells(size_t n_cells, const double *people, const double *base_s,
                  const double *var_s, double limit_s, const double *limits_s, size_t n_bands,
                  const int32_t *zone, size_t n_zones, compare_diff_t *out, float *delta_min,
                  int32_t *label, err_t *e)
{
    memset(out, 0, sizeof *out);
    if (n_bands > SCEN_MAX_BANDS)
        return err_set(e, ERR_INTERNAL, "compare: %zu bands, at most %d", n_bands,
                       SCEN_MAX_BANDS);
    out->n_bands = n_bands;
    out->n_zones = zone != NULL ? n_zones : 0;
    out->pushed_by_zone = calloc(out->n_zones + 1, sizeof *out->pushed_by_zone);
    if (out->pushed_by_zone == NULL) return err_set(e, ERR_NOMEM, "out of memory comparing runs");
    for (size_t c = 0; c < n_cells; c++) {
        double p = people[c], tb = base_s[c], tv = var_s[c];
        int fb = isfinite(tb), fv = isfinite(tv);
        size_t z = zone != NULL && zone[c] >= 0 && (size_t)zone[c] < n_zones ? (size_t)zone[c]
                                                                            : out->n_zones;
        for (size_t k = 0; k < n_bands; k++) {
            int in_b = tb <= limits_s[k], in_v = tv <= limits_s[k];
            if (in_b && !in_v) out->lost_band[k] += p;
            if (!in_b && in_v) out->gained_band[k] += p;
        }
        if (tb <= limit_s && !(tv <= limit_s)) {
            out->pushed_beyond += p;
            out->pushed_by_zone[z] += p;
        }
        if (!(tb <= limit_s) && tv <= limit_s) out->gained_within += p;
        if (fb && !fv) out->cut_off += p;
        if (fb && fv) out->added_person_h += p * (tv - tb) / 3600.0;
        if (delta_min != NULL)
            delta_min[c] = fb && fv ? (float)((tv - tb) / 60.0)
                         : fb       ? COMPARE_LOST
                         : fv       ? COMPARE_GAINED
                                    : COMPARE_NODATA;
        if (label != NULL)
            label[c] = tb <= limit_s && !(tv <= limit_s) ? 0
                     : !(tb <= limit_s) && tv <= limit_s ? 1
                                                         : -1;
    }
    return ERR_OK;
}

void compare_result_destroy(compare_result_t *res)
{
    if (res == NULL) return;
    for (size_t i = 0; i < res->n; i++) {
        free(res->v[i].name);
        free(res->v[i].newly_over);
        compare_diff_destroy(&res->v[i].diff);
    }
    free(res->v);
    free(res->rank);
    memset(res, 0, sizeof *res);
}

/* Bands and loads of one run. Times and labels per node come from 'pre_time' and
 * 'pre_site' when given (a repaired search tree), else from a full nearest-site
 * search. The capacity-aware assignment of the reach stage is not run: compare
 * reports nearest-site loads. */
static int plain_run(const inputs_t *in, network_t *net, const points_t *sites,
                     const districts_t *d, const double *pre_time, const int32_t *pre_site,
                     reach_result_t *res, err_t *e)
{
    const grid_t *g = in->grid;
    travel_result_t *tr = NULL;
    int64_t *nodes = NULL;
    int rc = ERR_OK;

    memset(res, 0, sizeof *res);
    res->n_cells = (size_t)g->nx * (size_t)g->ny;
    res->n_sites = sites->n;
    res->time_s = malloc(res->n_cells * sizeof *res->time_s);
    res->site = malloc(res->n_cells * sizeof *res->site);
    res->loads = calloc(sites->n ? sites->n : 1, sizeof *res->loads);
    res->capacity = malloc((sites->n ? sites->n : 1) * sizeof *res->capacity);
    nodes = malloc((sites->n ? sites->n : 1) * sizeof *nodes);
    if (!res->time_s || !res->site || !res->loads || !res->capacity || !nodes) {
        rc = err_set(e, ERR_NOMEM, "out of memory for travel times of %zu cells", res->n_cells);
        goto done;
    }
    for (size_t i = 0; i < sites->n; i++) {
        nodes[i] = network_cell_node(net, (int)(sites->cell[i] % g->nx),
                                     (int)(sites->cell[i] / g->nx));
        res->capacity[i] = sites->capacity[i];
    }
    if (pre_time == NULL) {
        if ((rc = travel_nearest(net, nodes, sites->n, &tr, e)) != ERR_OK) goto done;
        pre_time = tr->time_s;
        pre_site = tr->site;
    }
    for (size_t c = 0; c < res->n_cells; c++) {
        res->time_s[c] = pre_time[c];
        res->site[c] = pre_site[c];
        if (pre_time[c] <= in->scen->limit_s) res->people_within_limit += g->people[c];
    }
    rc = coverage_bands(res->n_cells, g->people, res->time_s, d ? d->cell : NULL, d ? d->n : 0,
                        in->scen->bands_s, in->scen->n_bands, &res->bands, e);
    if (rc == ERR_OK)
        rc = coverage_site_loads(res->n_cells, (size_t)g->nx, g->people, res->time_s, res->site,
                                 g->row_area_m2, in->scen->limit_s, sites->n, res->loads, e);
done:
    travel_result_free(tr);
    free(nodes);
    if (rc != ERR_OK) reach_result_destroy(res);
    return rc;
}

/* 1 when every edit since the last reset made its edge slower or closed it. */
static int edits_only_slow(const network_t *net)
{
    for (size_t i = 0; i < network_n_edits(net); i++) {
        int64_t eid;
        double old;
        network_edit_get(net, i, &eid, &old);
        if (!(network_edge_weight(net, eid) >= old)) return 0;
    }
    return 1;
}

/* One variant's times and labels (cells and road nodes) into tv/sv, by repairing
 * the base tree when the variant only slows or closes edges and closes sites (the
 * usual case: closures, rain, floods), else by a full search (sites opened, faster
 * roads). Labels are indices into the variant's site list 'vs', which is the base
 * list 'bs' minus closed sites, then opened ones. *incremental says which ran. */
static int variant_times(const inputs_t *in, network_t *net, const sptree_t *base,
                         const points_t *bs, const points_t *vs, size_t n_opened, double *tv,
                         int32_t *sv, int *incremental, size_t *n_resettled, err_t *e)
{
    uint8_t *closed = NULL;
    int32_t *map = NULL;
    int64_t n = network_n_nodes(net);
    int64_t *changed = NULL;
    size_t ne = network_n_edits(net), k = 0;
    int rc = ERR_OK;

    (void)in;
    *incremental = 0;
    *n_resettled = 0;
    if (n_opened > 0 || !edits_only_slow(net)) return ERR_OK;
    closed = calloc(bs->n ? bs->n : 1, 1);
    map = malloc((bs->n ? bs->n : 1) * sizeof *map);
    changed = malloc((ne ? ne : 1) * sizeof *changed);
    if (closed == NULL || map == NULL || changed == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory comparing variants");
        goto done;
    }
    /* vs holds the open base sites in base order: walk both lists together. */
    for (size_t i = 0, j = 0; i < bs->n; i++) {
        if (j < vs->n && strcmp(bs->id[i], vs->id[j]) == 0) {
            map[i] = (int32_t)j++;
        } else {
            map[i] = -1;
            closed[i] = 1;
        }
    }
    for (size_t i = 0; i < ne; i++) {
        double old;
        network_edit_get(net, i, &changed[k], &old);
        k++;
    }
    rc = sptree_resettle(base, net, changed, k, closed, bs->n, tv, sv, n_resettled, e);
    if (rc != ERR_OK) goto done;
    for (int64_t v = 0; v < n; v++)
        if (sv[v] >= 0) sv[v] = (size_t)sv[v] < bs->n ? map[sv[v]] : -1;
    *incremental = 1;
done:
    free(closed);
    free(map);
    free(changed);
    return rc;
}

/* Rows of compare_bands.csv for one run (base: base == NULL, change 0). */
static int add_band_rows(table_t *t, const char *name, const band_table_t *b,
                         const band_table_t *base, const districts_t *d)
{
    char label[64];
    size_t nz = d ? d->n : 0;
    for (size_t z = 0; z <= (d ? nz + 1 : 0); z++) {
        const char *zn = z == 0 ? "(all)" : z <= nz ? d->name[z - 1] : "(outside districts)";
        for (size_t col = 0; col < BAND_COLS(b); col++) {
            size_t cc = col;
            double p = z == 0 ? coverage_band_total(b, cc) : BAND_AT(b, z - 1, cc);
            double pb = base == NULL ? p
                      : z == 0      ? coverage_band_total(base, cc)
                                    : BAND_AT(base, z - 1, cc);
            long r = table_add_row(t);
            if (r < 0) return ERR_NOMEM;
            coverage_band_label(b, col, label, sizeof label);
            table_set_text(t, (size_t)r, 0, name);
            table_set_text(t, (size_t)r, 1, zn);
            table_set_text(t, (size_t)r, 2, label);
            table_set_num(t, (size_t)r, 3, p);
            table_set_num(t, (size_t)r, 4, p - pb);
        }
    }
    return ERR_OK;
}

/* Rows of compare_sites.csv; counts sites over capacity in the variant that were
 * not over in the base (or not open there) into cv. */
static int add_site_rows(table_t *t, const char *name, const points_t *s,
                         const reach_result_t *r, const points_t *bs, const reach_result_t *br,
                         compare_variant_t *cv)
{
    size_t len = 0;
    for (size_t i = 0; i < s->n; i++) {
        double cap = r->capacity[i], load = r->loads[i].people, bload = NAN;
        int over = isfinite(cap) && load > cap, bover = 0;
        long row = table_add_row(t);
        if (row < 0) return ERR_NOMEM;
        for (size_t j = 0; bs != NULL && j < bs->n; j++)
            if (strcmp(bs->id[j], s->id[i]) == 0) {
                bload = br->loads[j].people;
                bover = isfinite(br->capacity[j]) && bload > br->capacity[j];
            }
        table_set_text(t, (size_t)row, 0, name);
        table_set_text(t, (size_t)row, 1, s->id[i]);
        table_set_text(t, (size_t)row, 2, s->name[i]);
        table_set_num(t, (size_t)row, 3, load);
        table_set_num(t, (size_t)row, 4, isfinite(cap) ? cap : NAN);
        table_set_num(t, (size_t)row, 5, isfinite(cap) && cap > 0 ? load / cap : NAN);
        table_set_num(t, (size_t)row, 6, bload);
        table_set_num(t, (size_t)row, 7, over);
        table_set_num(t, (size_t)row, 8, cv != NULL && over && !bover);
        if (cv != NULL && over && !bover) {
            size_t add = strlen(s->id[i]) + 2;
            char *p = realloc(cv->newly_over, len + add + 1);
            if (p == NULL) return ERR_NOMEM;
            cv->newly_over = p;
            snprintf(p + len, add + 1, "%s%s", len ? ", " : "", s->id[i]);
            len = strlen(p);
            cv->sites_newly_over++;
        }
    }
    return ERR_OK;
}

static int write_variant_files(const char *outdir, const inputs_t *in, const compare_variant_t *cv,
                               const float *delta, const int32_t *label, err_t *e)
{
    static const char *names[] = {"change", "limit_min", "people", "cells"};
    static const int types[] = {TABLE_TEXT, TABLE_REAL, TABLE_REAL, TABLE_INT};
    const grid_t *g = in->grid;
    size_t n = (size_t)g->nx * (size_t)g->ny;
    double ppl[2] = {0, 0}, cells[2] = {0, 0};
    char fname[128], desc[160];
    char *p = NULL;
    table_t *t = NULL;
    int rc;

    snprintf(fname, sizeof fname, "delta_%s.tif", cv->slug);
    snprintf(desc, sizeof desc, "minutes gained (-) or lost (+) in variant '%s' (9999 = cut off, "
             "-9999 = newly reached)", cv->name);
    if ((p = out_join(outdir, fname)) == NULL) return err_set(e, ERR_NOMEM, "out of memory");
    rc = out_write_tif_f32(p, g, delta, COMPARE_NODATA, desc, e);
    free(p);
    if (rc != ERR_OK) return rc;
    for (size_t c = 0; c < n; c++)
        if (label[c] >= 0) {
            ppl[label[c]] += g->people[c];
            cells[label[c]] += 1;
        }
    t = table_new(4, names, types);
    if (t == NULL || table_add_row(t) < 0 || table_add_row(t) < 0) {
        table_free(t);
        return err_set(e, ERR_NOMEM, "out of memory");
    }
    table_set_text(t, 0, 0, "lost access within the limit");
    table_set_text(t, 1, 0, "gained access within the limit");
    for (size_t r = 0; r < 2; r++) {
        table_set_num(t, r, 1, in->scen->limit_s / 60.0);
        table_set_num(t, r, 2, ppl[r]);
        table_set_num(t, r, 3, cells[r]);
    }
    snprintf(fname, sizeof fname, "affected_%s.gpkg", cv->slug);
    if ((p = out_join(outdir, fname)) == NULL) {
        table_free(t);
        return err_set(e, ERR_NOMEM, "out of memory");
    }
    rc = out_write_label_polygons(p, "affected", g, label, t, e);
    free(p);
    table_free(t);
    return rc;
}

/* Ranking keys copied out of the results, so qsort needs no outside state. */
typedef struct rank_key {
    double pushed, hours;
    size_t idx;
} rank_key_t;

static int cmp_rank(const void *a, const void *b)
{
    const rank_key_t *x = a, *y = b;
    if (x->pushed != y->pushed) return x->pushed < y->pushed ? 1 : -1;
    if (x->hours != y->hours) return x->hours < y->hours ? 1 : -1;
    return (x->idx > y->idx) - (x->idx < y->idx);
}

static table_t *ranking_table(const inputs_t *in, const compare_result_t *res)
{
    const scen_t *s = in->scen;
    const char *base_names[] = {"rank", "variant", "sites_open", "people_within_limit",
                                "pushed_beyond_limit", "gained_within_limit", "net_change",
                                "cut_off", "unreachable", "added_person_hours",
                                "sites_newly_over_capacity", "roads_closed_segments",
                                "roads_slowed_segments", "roads_flooded_segments",
                                "cells_flooded", "people_in_flood"};
    const size_t nb = sizeof base_names / sizeof base_names[0];
    char bufs[SCEN_MAX_BANDS][40];
    const char *names[sizeof base_names / sizeof base_names[0] + SCEN_MAX_BANDS];
    int types[sizeof base_names / sizeof base_names[0] + SCEN_MAX_BANDS];
    table_t *t;

    for (size_t k = 0; k < nb; k++) {
        names[k] = base_names[k];
        types[k] = k == 1 ? TABLE_TEXT : TABLE_REAL;
    }
    for (size_t k = 0; k < s->n_bands; k++) {
        snprintf(bufs[k], sizeof bufs[k], "lost_within_%g_min", s->bands_s[k] / 60.0);
        names[nb + k] = bufs[k];
        types[nb + k] = TABLE_REAL;
    }
    t = table_new(nb + s->n_bands, names, types);
    for (size_t q = 0; t != NULL && q < res->n; q++) {
        const compare_variant_t *v = &res->v[res->rank[q]];
        long r = table_add_row(t);
        if (r < 0) {
            table_free(t);
            return NULL;
        }
        double vals[] = {(double)(q + 1), 0, (double)v->n_sites, v->within_limit,
                         v->diff.pushed_beyond, v->diff.gained_within,
                         v->within_limit - res->base_within_limit, v->diff.cut_off,
                         v->unreachable, v->diff.added_person_h, (double)v->sites_newly_over,
                         (double)v->segs_closed, (double)v->segs_slowed,
                         (double)v->segs_flooded, (double)v->cells_flooded, v->people_flooded};
        for (size_t k = 0; k < nb; k++)
            if (k == 1) table_set_text(t, (size_t)r, k, v->name);
            else table_set_num(t, (size_t)r, k, vals[k]);
        for (size_t k = 0; k < s->n_bands; k++)
            table_set_num(t, (size_t)r, nb + k, v->diff.lost_band[k]);
    }
    return t;
}

static cJSON *variant_json(const inputs_t *in, const districts_t *d, const compare_variant_t *v,
                           const reach_result_t *r, size_t rank)
{
    cJSON *o = cJSON_CreateObject(), *arr, *files;
    char label[64];
    cJSON_AddStringToObject(o, "name", v->name);
    cJSON_AddNumberToObject(o, "rank", (double)rank);
    cJSON_AddNumberToObject(o, "sites_open", (double)v->n_sites);
    if (v->no_site) cJSON_AddStringToObject(o, "note", "no open site can be reached");
    cJSON_AddNumberToObject(o, "people_within_limit", v->within_limit);
    cJSON_AddNumberToObject(o, "pushed_beyond_limit", v->diff.pushed_beyond);
    cJSON_AddNumberToObject(o, "gained_within_limit", v->diff.gained_within);
    cJSON_AddNumberToObject(o, "cut_off", v->diff.cut_off);
    cJSON_AddNumberToObject(o, "people_unreachable", v->unreachable);
    cJSON_AddNumberToObject(o, "added_person_hours", v->diff.added_person_h);
    arr = cJSON_AddArrayToObject(o, "bands");
    for (size_t col = 0; col < BAND_COLS(&r->bands); col++) {
        cJSON *b = cJSON_CreateObject();
        coverage_band_label(&r->bands, col, label, sizeof label);
        cJSON_AddStringToObject(b, "band", label);
        cJSON_AddNumberToObject(b, "people", coverage_band_total(&r->bands, col));
        if (col < in->scen->n_bands) {
            cJSON_AddNumberToObject(b, "lost_within", v->diff.lost_band[col]);
            cJSON_AddNumberToObject(b, "gained_within", v->diff.gained_band[col]);
        }
        cJSON_AddItemToArray(arr, b);
    }
    if (d != NULL) {
        cJSON *dz = cJSON_AddObjectToObject(o, "pushed_beyond_by_district");
        for (size_t z = 0; z <= d->n; z++)
            if (z < d->n || v->diff.pushed_by_zone[z] > 0)
                cJSON_AddNumberToObject(dz, z < d->n ? d->name[z] : "(outside districts)",
                                        v->diff.pushed_by_zone[z]);
    }
    cJSON_AddNumberToObject(o, "sites_newly_over_capacity", (double)v->sites_newly_over);
    cJSON_AddStringToObject(o, "sites_newly_over_capacity_ids", v->newly_over ? v->newly_over : "");
    {
        cJSON *ch = cJSON_AddObjectToObject(o, "changes");
        cJSON_AddNumberToObject(ch, "road_segments_closed", (double)v->segs_closed);
        cJSON_AddNumberToObject(ch, "road_segments_slowed", (double)v->segs_slowed);
        cJSON_AddNumberToObject(ch, "road_segments_flooded", (double)v->segs_flooded);
        cJSON_AddNumberToObject(ch, "cells_flooded", (double)v->cells_flooded);
        cJSON_AddNumberToObject(ch, "people_in_flood", v->people_flooded);
        cJSON_AddNumberToObject(ch, "edges_changed", (double)v->edges_changed);
        cJSON_AddStringToObject(ch, "search", v->incremental ? "repaired base tree" : "full");
        if (v->incremental)
            cJSON_AddNumberToObject(ch, "nodes_searched_again", (double)v->nodes_resettled);
    }
    files = cJSON_AddObjectToObject(o, "files");
    {
        char f[128];
        snprintf(f, sizeof f, "delta_%s.tif", v->slug);
        cJSON_AddStringToObject(files, "delta_minutes", f);
        snprintf(f, sizeof f, "affected_%s.gpkg", v->slug);
        cJSON_AddStringToObject(files, "affected_areas", f);
    }
    cJSON_AddNumberToObject(o, "seconds", v->seconds);
    return o;
}

int compare_run(const inputs_t *in, network_t *net, const districts_t *districts,
                const char *outdir, int n_threads, int quiet, cJSON *summary,
                compare_result_t *res, err_t *e)
{
    static const char *bnames[] = {"variant", "district", "band", "people", "change"};
    static const int btypes[] = {TABLE_TEXT, TABLE_TEXT, TABLE_TEXT, TABLE_REAL, TABLE_REAL};
    static const char *snames[] = {"variant", "id", "name", "people", "capacity", "load_ratio",
                                   "base_people", "over_capacity", "newly_over_capacity"};
    static const int stypes[] = {TABLE_TEXT, TABLE_TEXT, TABLE_TEXT, TABLE_REAL, TABLE_REAL,
                                 TABLE_REAL, TABLE_REAL, TABLE_INT, TABLE_INT};
    const scen_t *s = in->scen;
    const struct scen_variants *sv = s->variants;
    const grid_t *g = in->grid;
    size_t n_cells = (size_t)g->nx * (size_t)g->ny;
    reach_result_t base = {0}, cur = {0};
    sptree_t tree = {0};
    double *vtime = NULL;
    int32_t *vsite = NULL;
    variant_applied_t va = {0};
    points_t empty = {0};
    const points_t *bsites = in->existing != NULL ? in->existing : &empty;
    table_t *bt = NULL, *st = NULL, *rt = NULL;
    float *delta = NULL;
    int32_t *label = NULL;
    cJSON *cj, *varr;
    progress_t pr;
    char *p = NULL;
    int rc = ERR_OK;

    /* Each run is one search (or a tree repair) on this thread; no bounded searches. */
    (void)n_threads;
    memset(res, 0, sizeof *res);
    progress_init(&pr, quiet);
    if (sv == NULL || sv->n == 0)
        return err_set(e, ERR_INPUT, "scenario '%s' has no variants to compare; add a "
                       "\"variants\" list (see docs/whatif.md)", s->file);
    /* Every variant is checked before any search runs. */
    for (size_t i = 0; i < sv->n; i++)
        if ((rc = variant_validate(in, &sv->v[i], e)) != ERR_OK) return rc;
    res->v = calloc(sv->n, sizeof *res->v);
    res->rank = calloc(sv->n, sizeof *res->rank);
    delta = malloc(n_cells * sizeof *delta);
    label = malloc(n_cells * sizeof *label);
    bt = table_new(5, bnames, btypes);
    st = table_new(9, snames, stypes);
    if (!res->v || !res->rank || !delta || !label || !bt || !st) {
        rc = err_set(e, ERR_NOMEM, "out of memory comparing %zu variants", sv->n);
        goto done;
    }
    res->total_people = g->total_people;

    if (bsites->n == 0) {
        rc = err_set(e, ERR_INPUT, "scenario '%s' names no open sites; give a point layer in "
                     "sites.existing", s->file);
        goto done;
    }
    progress_start(&pr, "base scenario");
    {
        int64_t *nodes = malloc(bsites->n * sizeof *nodes);
        if (nodes == NULL) goto nomem;
        for (size_t i = 0; i < bsites->n; i++)
            nodes[i] = network_cell_node(net, (int)(bsites->cell[i] % g->nx),
                                         (int)(bsites->cell[i] / g->nx));
        rc = sptree_build(net, nodes, bsites->n, &tree, e);
        free(nodes);
    }
    if (rc == ERR_OK)
        rc = plain_run(in, net, bsites, districts, tree.time_s, tree.site, &base, e);
    res->seconds_base = progress_end(&pr);
    if (rc != ERR_OK) goto done;
    vtime = malloc((size_t)network_n_nodes(net) * sizeof *vtime);
    vsite = malloc((size_t)network_n_nodes(net) * sizeof *vsite);
    if (vtime == NULL || vsite == NULL) goto nomem;
    res->base_within_limit = base.people_within_limit;
    res->base_unreachable = coverage_band_total(&base.bands, base.bands.n_bands + 1);
    res->base_sites = bsites->n;
    if (add_band_rows(bt, "base", &base.bands, NULL, districts) != ERR_OK ||
        add_site_rows(st, "base", bsites, &base, NULL, NULL, NULL) != ERR_OK)
        goto nomem;

    cj = cJSON_AddObjectToObject(summary, "compare");
    cJSON_AddNumberToObject(cj, "limit_min", s->limit_s / 60.0);
    cJSON_AddNumberToObject(cj, "people_total", g->total_people);
    {
        cJSON *bj = cJSON_AddObjectToObject(cj, "base");
        cJSON_AddNumberToObject(bj, "sites_open", (double)bsites->n);
        cJSON_AddNumberToObject(bj, "people_within_limit", base.people_within_limit);
        cJSON_AddNumberToObject(bj, "people_unreachable", res->base_unreachable);
        cJSON_AddNumberToObject(bj, "seconds", res->seconds_base);
    }
    varr = cJSON_AddArrayToObject(cj, "variants");

    for (size_t i = 0; i < sv->n; i++) {
        const scen_variant_t *v = &sv->v[i];
        compare_variant_t *cv = &res->v[i];
        double t0 = progress_now();
        char stage[96];

        snprintf(stage, sizeof stage, "variant %zu of %zu", i + 1, sv->n);
        progress_start(&pr, stage);
        progress_update(&pr, (double)i, (double)sv->n);
        res->n = i + 1;
        if ((cv->name = strdup(v->name)) == NULL) goto nomem;
        {
            /* Two names with the same slug would overwrite each other's files. */
            char tmp[48];
            int dup = 0;
            variant_slug(v->name, tmp, sizeof tmp);
            for (size_t j = 0; j < i; j++) dup |= strncmp(res->v[j].slug, tmp, sizeof tmp) == 0;
            if (dup) snprintf(cv->slug, sizeof cv->slug, "%s_%u", tmp, (unsigned)(i + 1) % 1000u);
            else snprintf(cv->slug, sizeof cv->slug, "%s", tmp);
        }
        rc = variant_apply(net, in, v, &va, e);
        if (rc != ERR_OK) goto done;
        cv->segs_closed = va.segs_closed;
        cv->segs_slowed = va.segs_slowed;
        cv->segs_flooded = va.segs_flooded;
        cv->cells_flooded = va.cells_flooded;
        cv->people_flooded = va.people_flooded;
        cv->edges_changed = va.edges_changed;
        cv->n_sites = va.sites.n;
        rc = variant_times(in, net, &tree, bsites, &va.sites, va.sites_opened, vtime, vsite,
                           &cv->incremental, &cv->nodes_resettled, e);
        if (rc == ERR_OK)
            rc = plain_run(in, net, &va.sites, districts, cv->incremental ? vtime : NULL,
                           cv->incremental ? vsite : NULL, &cur, e);
        network_edit_reset(net);
        if (rc != ERR_OK) {
            err_prefix(e, "variant '%s': ", v->name);
            goto done;
        }
        {
            /* No open site, or none that reaches anyone beyond its own cell. */
            size_t reached = 0;
            for (size_t c = 0; c < n_cells; c++)
                reached += isfinite(cur.time_s[c]) && cur.time_s[c] > 0;
            cv->no_site = va.sites.n == 0 || reached == 0;
        }
        cv->within_limit = cur.people_within_limit;
        cv->unreachable = coverage_band_total(&cur.bands, cur.bands.n_bands + 1);
        rc = compare_cells(n_cells, g->people, base.time_s, cur.time_s, s->limit_s, s->bands_s,
                           s->n_bands, districts ? districts->cell : NULL,
                           districts ? districts->n : 0, &cv->diff, delta, label, e);
        if (rc != ERR_OK) goto done;
        if (add_band_rows(bt, v->name, &cur.bands, &base.bands, districts) != ERR_OK ||
            add_site_rows(st, v->name, &va.sites, &cur, bsites, &base, cv) != ERR_OK)
            goto nomem;
        rc = write_variant_files(outdir, in, cv, delta, label, e);
        if (rc != ERR_OK) goto done;
        cv->seconds = progress_now() - t0;
        cJSON_AddItemToArray(varr, variant_json(in, districts, cv, &cur, 0));
        reach_result_destroy(&cur);
        variant_applied_destroy(&va);
        progress_end(&pr);
    }

    {
        rank_key_t *keys = malloc((res->n ? res->n : 1) * sizeof *keys);
        if (keys == NULL) goto nomem;
        for (size_t i = 0; i < res->n; i++)
            keys[i] = (rank_key_t){res->v[i].diff.pushed_beyond, res->v[i].diff.added_person_h, i};
        qsort(keys, res->n, sizeof *keys, cmp_rank);
        for (size_t i = 0; i < res->n; i++) res->rank[i] = keys[i].idx;
        free(keys);
    }
    for (size_t q = 0; q < res->n; q++)
        cJSON_SetNumberValue(cJSON_GetObjectItem(cJSON_GetArrayItem(varr, (int)res->rank[q]),
                                                 "rank"), (double)(q + 1));
    {
        cJSON *files = cJSON_AddObjectToObject(cj, "files");
        cJSON_AddStringToObject(files, "ranking", "compare.csv");
        cJSON_AddStringToObject(files, "bands", "compare_bands.csv");
        cJSON_AddStringToObject(files, "sites", "compare_sites.csv");
    }
    if ((rt = ranking_table(in, res)) == NULL) goto nomem;
    if ((rc = table_save(rt, outdir, "compare.csv", e)) != ERR_OK ||
        (rc = table_save(bt, outdir, "compare_bands.csv", e)) != ERR_OK)
        goto done;
    rc = table_save(st, outdir, "compare_sites.csv", e);
    goto done;
nomem:
    rc = err_set(e, ERR_NOMEM, "out of memory comparing variants");
done:
    network_edit_reset(net);
    free(p);
    free(delta);
    free(label);
    table_free(bt);
    table_free(st);
    table_free(rt);
    reach_result_destroy(&base);
    reach_result_destroy(&cur);
    sptree_destroy(&tree);
    free(vtime);
    free(vsite);
    variant_applied_destroy(&va);
    if (rc != ERR_OK) compare_result_destroy(res);
    return rc;
}

void compare_print(const inputs_t *in, const compare_result_t *res)
{
    double lim = in->scen->limit_s / 60.0, tot = res->total_people;
    printf("base: %.0f of %.0f people (%.1f%%) within %g min of %zu sites; %.0f unreachable\n",
           res->base_within_limit, tot, tot > 0 ? 100.0 * res->base_within_limit / tot : 0.0,
           lim, res->base_sites, res->base_unreachable);
    printf("variants ranked by people pushed beyond %g min:\n", lim);
    printf("  %-4s %-22s %12s %12s %10s %12s %14s  %s\n", "rank", "variant", "pushed out",
           "brought in", "cut off", "within", "+person-hours", "sites newly over capacity");
    for (size_t q = 0; q < res->n; q++) {
        const compare_variant_t *v = &res->v[res->rank[q]];
        printf("  %-4zu %-22.22s %12.0f %12.0f %10.0f %11.1f%% %14.0f  %s%s\n", q + 1, v->name,
               v->diff.pushed_beyond, v->diff.gained_within, v->diff.cut_off,
               tot > 0 ? 100.0 * v->within_limit / tot : 0.0, v->diff.added_person_h,
               v->sites_newly_over ? v->newly_over : "none",
               v->no_site ? "  (no open site can be reached)" : "");
    }
}
