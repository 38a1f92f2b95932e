/* reach: the travel-time stage (see include/reach.h). */
#include "reach.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "output.h"
#include "progress.h"
#include "table.h"
#include "travel.h"

void reach_result_destroy(reach_result_t *res)
{
    if (res == NULL) return;
    free(res->time_s);
    free(res->site);
    coverage_bands_destroy(&res->bands);
    for (size_t k = 0; k < res->n_groups; k++) coverage_bands_destroy(&res->group_bands[k]);
    free(res->group_bands);
    free(res->loads);
    free(res->capacity);
    free(res->served);
    memset(res, 0, sizeof *res);
}

/* Bounded searches from every site up to the limit, then the assignment that
 * fills the nearest site first and sends overflow onward. */
static int capacity_assignment(const inputs_t *in, const network_t *net, const int64_t *nodes,
                               int n_threads, reach_result_t *res, err_t *e)
{
    travel_reach_t *reach = calloc(res->n_sites, sizeof *reach);
    reach_pair_t *pairs = NULL;
    size_t n_pairs = 0, k = 0;
    int rc;

    if (reach == NULL) return err_set(e, ERR_NOMEM, "out of memory for capacity assignment");
    rc = travel_bounded_many(net, nodes, res->n_sites, in->scen->limit_s, n_threads, reach, e);
    if (rc != ERR_OK) goto done;
    for (size_t s = 0; s < res->n_sites; s++) n_pairs += reach[s].n;
    pairs = malloc((n_pairs ? n_pairs : 1) * sizeof *pairs);
    res->served = calloc(res->n_sites, sizeof *res->served);
    if (pairs == NULL || res->served == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory for capacity assignment");
        goto done;
    }
    for (size_t s = 0; s < res->n_sites; s++)
        for (size_t i = 0; i < reach[s].n; i++) {
            pairs[k].site = (int32_t)s;
            pairs[k].cell = reach[s].cell[i];
            pairs[k].time_s = (float)reach[s].time_s[i];
            k++;
        }
    rc = coverage_assign_capacity(res->n_cells, in->grid->people, pairs, n_pairs, res->n_sites,
                                  res->capacity, res->served, &res->unserved_no_site,
                                  &res->unserved_capacity, e);
done:
    for (size_t s = 0; s < res->n_sites; s++) travel_reach_destroy(&reach[s]);
    free(reach);
    free(pairs);
    return rc;
}

/* People by band for each population group: a share scales every count; a
 * raster of the group's people must lie on the population grid itself
 * (resampling counts would not conserve them). */
static int group_bands(const inputs_t *in, const districts_t *districts, reach_result_t *res,
                       err_t *e)
{
    const scen_t *s = in->scen;
    const grid_t *g = in->grid;
    int rc = ERR_OK;

    res->group_bands = calloc(s->n_groups ? s->n_groups : 1, sizeof *res->group_bands);
    if (res->group_bands == NULL) return err_set(e, ERR_NOMEM, "out of memory");
    for (size_t k = 0; k < s->n_groups && rc == ERR_OK; k++) {
        const scen_group_t *gr = &s->groups[k];
        band_table_t *t = &res->group_bands[k];
        if (gr->raster == NULL) {
            size_t n = (res->bands.n_zones + 1) * BAND_COLS(&res->bands);
            *t = res->bands;
            t->people = malloc(n * sizeof *t->people);
            if (t->people == NULL) return err_set(e, ERR_NOMEM, "out of memory");
            for (size_t i = 0; i < n; i++) t->people[i] = res->bands.people[i] * gr->share;
        } else {
            grid_t *gg = NULL;
            rc = grid_load(gr->raster, &gg, e);
            if (rc == ERR_OK && (gg->nx != g->nx || gg->ny != g->ny ||
                                 memcmp(gg->gt, g->gt, sizeof g->gt) != 0))
                rc = err_set(e, ERR_INPUT, "population group raster '%s' (%s) is not on the population grid; warp it onto '%s' first",
                             gr->raster, gr->name, s->population);
            if (rc == ERR_OK)
                rc = coverage_bands(res->n_cells, gg->people, res->time_s,
                                    districts ? districts->cell : NULL, districts ? districts->n : 0,
                                    s->bands_s, s->n_bands, t, e);
            grid_free(gg);
        }
        res->n_groups = k + 1;
    }
    return rc;
}

int reach_run(const inputs_t *in, network_t *net, const points_t *sites,
              const districts_t *districts, int n_threads, int quiet, reach_result_t *res,
              err_t *e)
{
    const grid_t *g = in->grid;
    travel_result_t *tr = NULL;
    int64_t *nodes = NULL;
    progress_t pr;
    size_t reached_cells = 0;
    int rc = ERR_OK;

    memset(res, 0, sizeof *res);
    progress_init(&pr, quiet);
    if (sites == NULL || sites->n == 0) {
        /* An empty layer is not a missing one: say which of the two it is. */
        if (sites != NULL && sites == in->existing && in->scen->existing.path != NULL)
            return err_set(e, ERR_INPUT, "scenario '%s': the sites.existing layer in '%s' has "
                           "no points; give a layer with at least one site",
                           in->scen->file, in->scen->existing.path);
        return err_set(e, ERR_INPUT, "scenario '%s' names no open sites; give a point layer in sites.existing",
                       in->scen->file);
    }
    res->n_cells = (size_t)g->nx * (size_t)g->ny;
    res->n_sites = sites->n;
    nodes = malloc(sites->n * sizeof *nodes);
    res->time_s = malloc(res->n_cells * sizeof *res->time_s);
    res->site = malloc(res->n_cells * sizeof *res->site);
    res->loads = calloc(sites->n, sizeof *res->loads);
    res->capacity = malloc(sites->n * sizeof *res->capacity);
    if (!nodes || !res->time_s || !res->site || !res->loads || !res->capacity) {
        rc = err_set(e, ERR_NOMEM, "out of memory for travel times of %zu cells", res->n_cells);
        goto done;
    }
    for (size_t i = 0; i < sites->n; i++) {
        nodes[i] = network_cell_node(net, (int)(sites->cell[i] % g->nx),
                                     (int)(sites->cell[i] / g->nx));
        res->capacity[i] = sites->capacity[i];
        if (isfinite(sites->capacity[i])) res->has_capacity = 1;
    }

    progress_start(&pr, "nearest-site travel times");
    rc = travel_nearest(net, nodes, sites->n, &tr, e);
    res->seconds_nearest = progress_end(&pr);
    if (rc != ERR_OK) goto done;
    for (size_t c = 0; c < res->n_cells; c++) {
        res->time_s[c] = tr->time_s[c];
        res->site[c] = tr->site[c];
        if (isfinite(tr->time_s[c]) && tr->time_s[c] > 0) reached_cells++;
        if (tr->time_s[c] <= in->scen->limit_s) res->people_within_limit += g->people[c];
    }
    /* Every site cut off (barriers, impassable land cover): nothing beyond the
     * sites' own cells is reachable. */
    if (reached_cells == 0 && res->n_cells > sites->n) {
        rc = err_set(e, ERR_INPUT, "none of the %zu sites in '%s' can be reached by anyone: check barriers, land-cover factors and site positions",
                     sites->n, in->scen->existing.path ? in->scen->existing.path : "sites");
        goto done;
    }
    rc = coverage_bands(res->n_cells, g->people, res->time_s, districts ? districts->cell : NULL,
                        districts ? districts->n : 0, in->scen->bands_s, in->scen->n_bands,
                        &res->bands, e);
    if (rc != ERR_OK) goto done;
    rc = group_bands(in, districts, res, e);
    if (rc != ERR_OK) goto done;
    rc = coverage_site_loads(res->n_cells, (size_t)g->nx, g->people, res->time_s, res->site,
                             g->row_area_m2, in->scen->limit_s, sites->n, res->loads, e);
    if (rc != ERR_OK) goto done;
    for (size_t i = 0; i < sites->n; i++)
        if (res->loads[i].cells <= 1) res->sites_isolated += 1;

    if (res->has_capacity) {
        progress_start(&pr, "capacity-aware assignment");
        rc = capacity_assignment(in, net, nodes, n_threads, res, e);
        res->seconds_capacity = progress_end(&pr);
    }
done:
    travel_result_free(tr);
    free(nodes);
    if (rc != ERR_OK) reach_result_destroy(res);
    return rc;
}

static table_t *bands_table(const band_table_t *b, const districts_t *d, double total)
{
    static const char *names[] = {"district", "band", "from_min", "to_min", "people", "share"};
    static const int types[] = {TABLE_TEXT, TABLE_TEXT, TABLE_REAL, TABLE_REAL, TABLE_REAL,
                                TABLE_REAL};
    table_t *t = table_new(6, names, types);
    char label[64];

    if (t == NULL) return NULL;
    /* First the whole grid, then each district, then people outside all districts. */
    for (size_t z = 0; z <= (d ? d->n + 1 : 0); z++) {
        const char *zname = z == 0 ? "(all)" : z <= (d ? d->n : 0) ? d->name[z - 1] : "(outside districts)";
        double ztotal = 0;
        for (size_t col = 0; col < BAND_COLS(b); col++)
            ztotal += z == 0 ? coverage_band_total(b, col) : BAND_AT(b, z - 1, col);
        if (z == (d ? d->n + 1 : 0) && z > 0 && ztotal == 0) break;
        for (size_t col = 0; col < BAND_COLS(b); col++) {
            double p = z == 0 ? coverage_band_total(b, col) : BAND_AT(b, z - 1, col);
            long r = table_add_row(t);
            if (r < 0) {
                table_free(t);
                return NULL;
            }
            coverage_band_label(b, col, label, sizeof label);
            table_set_text(t, (size_t)r, 0, zname);
            table_set_text(t, (size_t)r, 1, label);
            table_set_num(t, (size_t)r, 2, col == 0 ? 0 : col <= b->n_bands ? b->limits_s[col - 1] / 60.0 : NAN);
            table_set_num(t, (size_t)r, 3, col < b->n_bands ? b->limits_s[col] / 60.0 : NAN);
            table_set_num(t, (size_t)r, 4, p);
            table_set_num(t, (size_t)r, 5, ztotal > 0 ? p / ztotal : 0);
        }
    }
    (void)total;
    return t;
}

/* The band table of every population group under one header, group first. */
static table_t *groups_table(const scen_t *s, const reach_result_t *res, const districts_t *d)
{
    static const char *names[] = {"group", "district", "band", "from_min", "to_min", "people",
                                  "share"};
    static const int types[] = {TABLE_TEXT, TABLE_TEXT, TABLE_TEXT, TABLE_REAL, TABLE_REAL,
                                TABLE_REAL, TABLE_REAL};
    table_t *t = table_new(7, names, types);

    for (size_t k = 0; t != NULL && k < res->n_groups; k++) {
        table_t *b = bands_table(&res->group_bands[k], d, 0);
        if (b == NULL) {
            table_free(t);
            return NULL;
        }
        for (size_t r = 0; r < table_rows(b); r++) {
            long row = table_add_row(t);
            if (row < 0) {
                table_free(b);
                table_free(t);
                return NULL;
            }
            table_set_text(t, (size_t)row, 0, s->groups[k].name);
            table_set_text(t, (size_t)row, 1, table_text(b, r, 0));
            table_set_text(t, (size_t)row, 2, table_text(b, r, 1));
            for (size_t c = 2; c < 6; c++) table_set_num(t, (size_t)row, c + 1, table_num(b, r, c));
        }
        table_free(b);
    }
    return t;
}

static table_t *sites_table(const points_t *s, const reach_result_t *res)
{
    static const char *names[] = {"index", "id", "name", "people", "capacity", "load_ratio",
                                  "beyond_limit", "mean_min", "max_min", "area_km2",
                                  "served_within_limit", "x", "y"};
    static const int types[] = {TABLE_INT, TABLE_TEXT, TABLE_TEXT, TABLE_REAL, TABLE_REAL,
                                TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_REAL,
                                TABLE_REAL, TABLE_REAL, TABLE_REAL};
    /* x, y: the site's position in the grid CRS, so maps need not reopen the layer. */
    table_t *t = table_new(13, names, types);

    if (t == NULL) return NULL;
    for (size_t i = 0; i < s->n; i++) {
        const site_load_t *l = &res->loads[i];
        long r = table_add_row(t);
        if (r < 0) {
            table_free(t);
            return NULL;
        }
        table_set_num(t, i, 0, (double)i);
        table_set_text(t, i, 1, s->id[i]);
        table_set_text(t, i, 2, s->name[i]);
        table_set_num(t, i, 3, l->people);
        table_set_num(t, i, 4, isfinite(res->capacity[i]) ? res->capacity[i] : NAN);
        table_set_num(t, i, 5, isfinite(res->capacity[i]) && res->capacity[i] > 0
                                   ? l->people / res->capacity[i] : NAN);
        table_set_num(t, i, 6, l->beyond_limit);
        table_set_num(t, i, 7, l->people > 0 ? l->sum_time_people / l->people / 60.0 : NAN);
        table_set_num(t, i, 8, l->people > 0 ? l->max_time_s / 60.0 : NAN);
        table_set_num(t, i, 9, l->area_m2 / 1e6);
        table_set_num(t, i, 10, res->served ? res->served[i] : NAN);
        table_set_num(t, i, 11, s->x[i]);
        table_set_num(t, i, 12, s->y[i]);
    }
    return t;
}

static int write_rasters(const char *outdir, const grid_t *g, const reach_result_t *res,
                         err_t *e)
{
    float *minutes = malloc(res->n_cells * sizeof *minutes);
    char *p1 = out_join(outdir, "travel_time.tif"), *p2 = out_join(outdir, "nearest_site.tif");
    int rc;

    if (minutes == NULL || p1 == NULL || p2 == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory writing travel-time rasters");
        goto done;
    }
    for (size_t c = 0; c < res->n_cells; c++)
        minutes[c] = isfinite(res->time_s[c]) ? (float)(res->time_s[c] / 60.0) : -1.0f;
    rc = out_write_tif_f32(p1, g, minutes, -1.0f, "minutes to the nearest site", e);
    if (rc == ERR_OK)
        rc = out_write_tif_i32(p2, g, res->site, -1, "index of the nearest site (sites.csv)", e);
done:
    free(minutes);
    free(p1);
    free(p2);
    return rc;
}

/* People beyond the limit (or with no path) per district, cell by cell, into
 * over[0..d->n] (over[d->n]: outside all districts); the bands only bracket the
 * limit when it falls inside one. */
static void beyond_by_district(const inputs_t *in, const districts_t *d,
                               const reach_result_t *res, double *over)
{
    for (size_t z = 0; z <= d->n; z++) over[z] = 0;
    for (size_t c = 0; c < res->n_cells; c++) {
        int32_t z = d->cell[c];
        if (!(res->time_s[c] <= in->scen->limit_s))
            over[z < 0 ? d->n : (size_t)z] += in->grid->people[c];
    }
}

static cJSON *bands_json(const band_table_t *b, const districts_t *d)
{
    cJSON *o = cJSON_CreateObject(), *all = cJSON_AddArrayToObject(o, "all");
    char label[64];

    for (size_t col = 0; col < BAND_COLS(b); col++) {
        cJSON *r = cJSON_CreateObject();
        coverage_band_label(b, col, label, sizeof label);
        cJSON_AddStringToObject(r, "band", label);
        cJSON_AddNumberToObject(r, "people", coverage_band_total(b, col));
        cJSON_AddItemToArray(all, r);
    }
    if (d != NULL) {
        cJSON *dj = cJSON_AddObjectToObject(o, "districts");
        for (size_t z = 0; z <= d->n; z++) {
            cJSON *arr = cJSON_CreateArray();
            for (size_t col = 0; col < BAND_COLS(b); col++) {
                cJSON *r = cJSON_CreateObject();
                coverage_band_label(b, col, label, sizeof label);
                cJSON_AddStringToObject(r, "band", label);
                cJSON_AddNumberToObject(r, "people", BAND_AT(b, z, col));
                cJSON_AddItemToArray(arr, r);
            }
            cJSON_AddItemToObject(dj, z < d->n ? d->name[z] : "(outside districts)", arr);
        }
    }
    return o;
}

int reach_write(const char *outdir, const inputs_t *in, const points_t *sites,
                const districts_t *districts, const reach_result_t *res, cJSON *summary,
                err_t *e)
{
    const grid_t *g = in->grid;
    table_t *bt = NULL, *st = NULL;
    int32_t *labels = NULL;
    char *p = NULL;
    cJSON *rj;
    int rc;

    rc = write_rasters(outdir, g, res, e);
    if (rc != ERR_OK) goto done;
    bt = bands_table(&res->bands, districts, g->total_people);
    st = sites_table(sites, res);
    if (bt == NULL || st == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory building reach tables");
        goto done;
    }
    rc = table_save(bt, outdir, "bands.csv", e);
    if (rc != ERR_OK) goto done;
    if (res->n_groups > 0) {
        table_t *gt = groups_table(in->scen, res, districts);
        if (gt == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory building the group table");
            goto done;
        }
        rc = table_save(gt, outdir, "groups.csv", e);
        table_free(gt);
        if (rc != ERR_OK) goto done;
    }
    rc = table_save(st, outdir, "sites.csv", e);
    if (rc != ERR_OK) goto done;
    p = out_join(outdir, "catchments.gpkg");
    rc = out_write_label_polygons(p, "catchments", g, res->site, st, e);
    free(p);
    p = NULL;
    if (rc != ERR_OK) goto done;

    rj = cJSON_AddObjectToObject(summary, "reach");
    cJSON_AddNumberToObject(rj, "limit_min", in->scen->limit_s / 60.0);
    cJSON_AddNumberToObject(rj, "people_total", g->total_people);
    cJSON_AddNumberToObject(rj, "people_within_limit", res->people_within_limit);
    cJSON_AddNumberToObject(rj, "people_beyond_limit", g->total_people - res->people_within_limit);
    cJSON_AddNumberToObject(rj, "sites_isolated", res->sites_isolated);
    cJSON_AddNumberToObject(rj, "people_unreachable",
                            coverage_band_total(&res->bands, res->bands.n_bands + 1));
    cJSON_AddItemToObject(rj, "bands", bands_json(&res->bands, districts));
    if (districts != NULL) {
        double *over = calloc(districts->n + 1, sizeof *over);
        if (over == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory for people beyond the limit by district");
            goto done;
        }
        beyond_by_district(in, districts, res, over);
        {
            cJSON *bd = cJSON_AddObjectToObject(rj, "beyond_limit_by_district");
            for (size_t z = 0; z <= districts->n; z++)
                cJSON_AddNumberToObject(bd, z < districts->n ? districts->name[z]
                                                             : "(outside districts)", over[z]);
        }
        free(over);
    }
    if (res->n_groups > 0) {
        cJSON *gj = cJSON_AddObjectToObject(rj, "groups");
        for (size_t k = 0; k < res->n_groups; k++)
            cJSON_AddItemToObject(gj, in->scen->groups[k].name,
                                  bands_json(&res->group_bands[k], districts));
    }
    cJSON_AddNumberToObject(rj, "sites", (double)res->n_sites);
    if (res->has_capacity) {
        cJSON *cj = cJSON_AddObjectToObject(rj, "capacity_assignment");
        double served = 0;
        for (size_t i = 0; i < res->n_sites; i++) served += res->served[i];
        cJSON_AddNumberToObject(cj, "served_within_limit", served);
        cJSON_AddNumberToObject(cj, "unserved_no_site_within_limit", res->unserved_no_site);
        cJSON_AddNumberToObject(cj, "unserved_sites_full", res->unserved_capacity);
    }
    {
        cJSON *files = cJSON_AddObjectToObject(rj, "files");
        cJSON_AddStringToObject(files, "travel_time", "travel_time.tif");
        cJSON_AddStringToObject(files, "nearest_site", "nearest_site.tif");
        cJSON_AddStringToObject(files, "sites", "sites.csv");
        cJSON_AddStringToObject(files, "bands", "bands.csv");
        cJSON_AddStringToObject(files, "catchments", "catchments.gpkg");
    }
    {
        cJSON *tj = cJSON_AddObjectToObject(rj, "seconds");
        cJSON_AddNumberToObject(tj, "nearest_site_pass", res->seconds_nearest);
        cJSON_AddNumberToObject(tj, "capacity_searches", res->seconds_capacity);
    }
done:
    free(labels);
    table_free(bt);
    table_free(st);
    return rc;
}

void reach_print(const inputs_t *in, const points_t *sites, const districts_t *districts,
                 const reach_result_t *res)
{
    const band_table_t *b = &res->bands;
    double total = in->grid->total_people;
    char label[64];

    printf("people by travel time to the nearest of %zu sites (%s):\n", res->n_sites,
           in->scen->mode == SCEN_MODE_WALK ? "walking" : "by vehicle");
    for (size_t col = 0; col < BAND_COLS(b); col++) {
        double p = coverage_band_total(b, col);
        coverage_band_label(b, col, label, sizeof label);
        printf("  %-16s %12.0f  %5.1f%%\n", label, p, total > 0 ? 100.0 * p / total : 0.0);
    }
    if (districts != NULL) {
        /* Beyond the limit cell by cell: the bands only bracket it, and a limit
         * inside a band (45 min with bands 30/60) would count the whole band. */
        double *over = calloc(districts->n + 1, sizeof *over);
        printf("people beyond %g min by district:\n", in->scen->limit_s / 60.0);
        if (over != NULL) beyond_by_district(in, districts, res, over);
        for (size_t z = 0; z <= districts->n; z++) {
            double beyond = 0, all = 0;
            for (size_t col = 0; col < BAND_COLS(b); col++) {
                all += BAND_AT(b, z, col);
                if (col >= b->n_bands || b->limits_s[col] > in->scen->limit_s) beyond += BAND_AT(b, z, col);
            }
            if (over != NULL) beyond = over[z];
            if (z == districts->n && all == 0) continue;
            printf("  %-24s %10.0f of %10.0f\n", z < districts->n ? districts->name[z] : "(outside districts)",
                   beyond, all);
        }
        free(over);
    }
    printf("sites over capacity:");
    {
        int any = 0;
        for (size_t i = 0; i < res->n_sites; i++)
            if (isfinite(res->capacity[i]) && res->loads[i].people > res->capacity[i]) {
                printf("%s %s (%.0f%%)", any ? "," : "", sites->id[i],
                       100.0 * res->loads[i].people / res->capacity[i]);
                any = 1;
            }
        printf("%s\n", any ? "" : " none");
    }
    if (res->has_capacity)
        printf("with capacities: %.0f people cannot be served within %g min (%.0f have no site in reach, %.0f find sites full)\n",
               res->unserved_no_site + res->unserved_capacity, in->scen->limit_s / 60.0,
               res->unserved_no_site, res->unserved_capacity);
}
