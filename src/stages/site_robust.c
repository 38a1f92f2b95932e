/* site_robust: robust siting over the base and the variants (see site_robust.h). */
#include "site_robust.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "output.h"
#include "progress.h"
#include "scen_siting.h"
#include "scen_variants.h"
#include "table.h"
#include "travel.h"
#include "variant.h"

void site_robust_destroy(site_robust_t *r)
{
    if (r == NULL) return;
    robust_free(r->prob);
    free(r->scen_name);
    free(r->sites_closed);
    robust_result_destroy(&r->plan);
    free(r->base_plan_cov);
    memset(r, 0, sizeof *r);
}

/* Is base site i (an existing one) among the variant's open sites? */
static int still_open(const loc_problem_t *p, size_t i, const points_t *vs)
{
    const char *id = p->site_id[i];
    for (size_t k = 0; id != NULL && k < vs->n; k++)
        if (strcmp(vs->id[k], id) == 0) return 1;
    return 0;
}

/* Coverage pairs of one variant: searches from every site not closed in it. */
static int variant_pairs(const inputs_t *in, network_t *net, const site_data_t *d,
                         const scen_variant_t *v, size_t scen, const int32_t *cell_unit,
                         int n_threads, site_robust_t *r, err_t *e)
{
    const loc_problem_t *p = d->prob;
    const grid_t *g = d->grid;
    variant_applied_t a;
    int64_t *nodes = NULL;
    unsigned char *closed = NULL;
    travel_reach_t *reach = NULL;
    size_t n = p->n_sites;
    int rc;

    memset(&a, 0, sizeof a);
    if ((rc = variant_apply(net, in, v, &a, e)) != ERR_OK) return rc;
    nodes = malloc((n + 1) * sizeof *nodes);
    closed = calloc(n + 1, 1);
    reach = calloc(n + 1, sizeof *reach);
    if (!nodes || !closed || !reach) {
        rc = err_set(e, ERR_NOMEM, "variant '%s': out of memory for %zu site searches", v->name, n);
        goto done;
    }
    for (size_t i = 0; i < n; i++) {
        closed[i] = d->existing[i] && !still_open(p, i, &a.sites);
        r->sites_closed[scen] += closed[i];
        nodes[i] = network_cell_node(net, (int)(d->site_cell[i] % g->nx),
                                     (int)(d->site_cell[i] / g->nx));
    }
    /* Closed sites are searched too (a simpler call); their pairs are dropped. */
    if ((rc = travel_bounded_many(net, nodes, n, d->limit / d->cost_scale, n_threads, reach, e)))
        goto done;
    for (size_t i = 0; i < n && rc == ERR_OK; i++)
        for (size_t m = 0; !closed[i] && m < reach[i].n && rc == ERR_OK; m++) {
            int32_t u = cell_unit[reach[i].cell[m]];
            if (u >= 0) rc = robust_add_cover(r->prob, scen, (size_t)u, i, e);
        }
done:
    if (reach != NULL)
        for (size_t i = 0; i < n; i++) travel_reach_destroy(&reach[i]);
    free(reach);
    free(nodes);
    free(closed);
    variant_applied_destroy(&a);
    network_edit_reset(net);
    if (rc != ERR_OK) err_prefix(e, "robust siting, variant '%s'", v->name);
    return rc;
}

int site_robust_prepare(const inputs_t *in, network_t *net, const site_data_t *d, int n_threads,
                        int quiet, site_robust_t *r, err_t *e)
{
    const scen_t *s = in->scen;
    const struct scen_variants *vs = s->variants;
    const struct scen_siting *st = s->siting;
    const loc_problem_t *p = d->prob;
    size_t n_cells = (size_t)d->grid->nx * (size_t)d->grid->ny, n_scen;
    int32_t *cell_unit = NULL;
    progress_t pr;
    int rc;

    memset(r, 0, sizeof *r);
    progress_init(&pr, quiet);
    if (vs == NULL || vs->n == 0)
        return err_set(e, ERR_INPUT, "%s: key 'siting.robust' needs the 'variants' section",
                       s->file);
    if (!d->is_grid)
        return err_set(e, ERR_INPUT, "%s: key 'siting.robust' works on grids only (variants "
                       "edit the road network)", s->file);
    n_scen = 1 + vs->n;
    if ((rc = robust_new(p->n_units, p->n_sites, n_scen, &r->prob, e)) != ERR_OK) return rc;
    r->scen_name = calloc(n_scen, sizeof *r->scen_name);
    r->sites_closed = calloc(n_scen, sizeof *r->sites_closed);
    cell_unit = malloc((n_cells + 1) * sizeof *cell_unit);
    if (!r->scen_name || !r->sites_closed || !cell_unit) {
        rc = err_set(e, ERR_NOMEM, "robust siting: out of memory for %zu scenarios", n_scen);
        goto done;
    }
    for (size_t c = 0; c < n_cells; c++) cell_unit[c] = -1;
    for (size_t j = 0; j < p->n_units; j++) {
        cell_unit[d->unit_cell[j]] = (int32_t)j;
        r->prob->weight[j] = p->weight[j];
    }
    for (size_t i = 0; i < p->n_sites; i++) {
        /* As in maximal covering: kept existing sites stay open; may_close ones
         * are candidates. */
        r->prob->state[i] = p->state[i] == LOC_FIXED_OPEN ? LOC_FIXED_OPEN : LOC_CANDIDATE;
        r->prob->fixed_cost[i] = p->fixed_cost[i];
    }
    r->scen_name[0] = "base";
    r->prob->scen_weight[0] = st->robust_objective == 1 ? st->robust_base_weight : 1.0;
    /* Base pairs: the base problem's coverage lists within the limit. */
    for (size_t k = 0; k < p->n_pairs && rc == ERR_OK; k++)
        if (p->pair_cost[k] <= d->limit)
            rc = robust_add_cover(r->prob, 0, (size_t)p->pair_unit[k], (size_t)p->pair_site[k], e);
    if (rc != ERR_OK) goto done;
    if (n_threads <= 0) {
        long nc = sysconf(_SC_NPROCESSORS_ONLN);
        n_threads = nc > 0 ? (int)nc : 1;
    }
    progress_start(&pr, "robust siting: coverage lists of each variant");
    for (size_t v = 0; v < vs->n && rc == ERR_OK; v++) {
        r->scen_name[1 + v] = vs->v[v].name;
        r->prob->scen_weight[1 + v] = st->robust_objective == 1
                                          ? scen_siting_robust_weight(st, vs->v[v].name) : 1.0;
        rc = variant_pairs(in, net, d, &vs->v[v], 1 + v, cell_unit, n_threads, r, e);
    }
    r->seconds_searches = progress_end(&pr);
done:
    free(cell_unit);
    if (rc != ERR_OK) site_robust_destroy(r);
    return rc;
}

int site_robust_solve(const scen_t *s, const site_data_t *d, const site_result_t *base,
                      site_robust_t *r, err_t *e)
{
    const struct scen_siting *st = s->siting;
    robust_opts_t o;
    unsigned char *is_open = NULL;
    int rc;

    robust_opts_default(&o);
    o.objective = st->robust_objective == 1 ? ROBUST_EXPECTED : ROBUST_WORST;
    o.p = st->p;
    o.budget = st->budget;
    o.solver.time_limit_s = st->time_limit_s;
    o.solver.rel_gap = st->gap;
    if ((rc = robust_solve(r->prob, &o, &r->plan, e)) != ERR_OK) return rc;
    r->seconds_model = r->plan.seconds;
    is_open = calloc(d->prob->n_sites + 1, 1);
    r->base_plan_cov = calloc(r->prob->n_scen, sizeof *r->base_plan_cov);
    if (!is_open || !r->base_plan_cov) {
        free(is_open);
        return err_set(e, ERR_NOMEM, "robust siting: out of memory evaluating the base plan");
    }
    for (size_t k = 0; k < base->plan.n_open; k++) is_open[base->plan.open[k]] = 1;
    rc = robust_evaluate(r->prob, is_open, r->base_plan_cov, e);
    free(is_open);
    return rc;
}

static double worst_of(const double *c, size_t n)
{
    double z = INFINITY;
    for (size_t v = 0; v < n; v++) z = fmin(z, c[v]);
    return z;
}

static double weighted_of(const robust_problem_t *p, const double *c)
{
    double z = 0;
    for (size_t v = 0; v < p->n_scen; v++) z += p->scen_weight[v] * c[v];
    return z;
}

int site_robust_write(const char *outdir, const scen_t *s, const site_data_t *d,
                      const site_robust_t *r, cJSON *summary, err_t *e)
{
    static const char *const names[] = {"scenario", "weight", "sites_closed",
                                        "people_covered_robust", "share_robust",
                                        "people_covered_base_plan", "share_base_plan",
                                        "difference"};
    static const int types[] = {TABLE_TEXT, TABLE_REAL, TABLE_INT, TABLE_REAL, TABLE_REAL,
                                TABLE_REAL, TABLE_REAL, TABLE_REAL};
    static const char *const snames[] = {"site_id", "name", "status", "x", "y"};
    static const int stypes[] = {TABLE_TEXT, TABLE_TEXT, TABLE_TEXT, TABLE_REAL, TABLE_REAL};
    const robust_problem_t *p = r->prob;
    const robust_result_t *pl = &r->plan;
    double tot = d->total_people;
    table_t *t = table_new(8, names, types), *ts = table_new(5, snames, stypes);
    cJSON *sj, *rj, *arr;
    char buf[32];
    int rc = ERR_OK;

    if (t == NULL || ts == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory writing robust.csv");
        goto done;
    }
    for (size_t v = 0; v < p->n_scen; v++) {
        long row = table_add_row(t);
        if (row < 0) {
            rc = err_set(e, ERR_NOMEM, "out of memory writing robust.csv");
            goto done;
        }
        table_set_text(t, (size_t)row, 0, r->scen_name[v]);
        table_set_num(t, (size_t)row, 1, p->scen_weight[v]);
        table_set_num(t, (size_t)row, 2, (double)r->sites_closed[v]);
        table_set_num(t, (size_t)row, 3, pl->covered[v]);
        table_set_num(t, (size_t)row, 4, tot > 0 ? pl->covered[v] / tot : 0);
        table_set_num(t, (size_t)row, 5, r->base_plan_cov[v]);
        table_set_num(t, (size_t)row, 6, tot > 0 ? r->base_plan_cov[v] / tot : 0);
        table_set_num(t, (size_t)row, 7, pl->covered[v] - r->base_plan_cov[v]);
    }
    for (size_t k = 0; k < pl->n_open; k++) {
        int i = pl->open[k];
        long row = table_add_row(ts);
        if (row < 0) {
            rc = err_set(e, ERR_NOMEM, "out of memory writing robust_sites.csv");
            goto done;
        }
        table_set_text(ts, (size_t)row, 0, loc_site_name(d->prob, (size_t)i, buf, sizeof buf));
        table_set_text(ts, (size_t)row, 1, d->site_name[i]);
        table_set_text(ts, (size_t)row, 2, d->existing[i] ? "kept" : "new");
        table_set_num(ts, (size_t)row, 3, d->site_x[i]);
        table_set_num(ts, (size_t)row, 4, d->site_y[i]);
    }
    if ((rc = table_save(t, outdir, "robust.csv", e)) != ERR_OK ||
        (rc = table_save(ts, outdir, "robust_sites.csv", e)) != ERR_OK)
        goto done;
    sj = cJSON_GetObjectItemCaseSensitive(summary, "site");
    if (sj == NULL) sj = summary;
    rj = cJSON_AddObjectToObject(sj, "robust");
    if (rj == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory writing summary.json");
        goto done;
    }
    cJSON_AddStringToObject(rj, "objective_kind",
                            s->siting->robust_objective == 1 ? "expected" : "worst");
    cJSON_AddStringToObject(rj, "status", solver_status_name(pl->status));
    cJSON_AddNumberToObject(rj, "objective", pl->objective);
    cJSON_AddNumberToObject(rj, "bound", pl->bound);
    cJSON_AddNumberToObject(rj, "gap", pl->gap);
    if (isfinite(pl->heuristic_objective))
        cJSON_AddNumberToObject(rj, "heuristic_objective", pl->heuristic_objective);
    cJSON_AddNumberToObject(rj, "objective_base_plan",
                            s->siting->robust_objective == 1 ? weighted_of(p, r->base_plan_cov)
                                                             : worst_of(r->base_plan_cov, p->n_scen));
    arr = cJSON_AddArrayToObject(rj, "open_sites");
    for (size_t k = 0; arr != NULL && k < pl->n_open; k++)
        cJSON_AddItemToArray(arr, cJSON_CreateString(loc_site_name(d->prob, (size_t)pl->open[k],
                                                                   buf, sizeof buf)));
    arr = cJSON_AddArrayToObject(rj, "scenarios");
    for (size_t v = 0; arr != NULL && v < p->n_scen; v++) {
        cJSON *o = cJSON_CreateObject();
        if (o == NULL) break;
        cJSON_AddStringToObject(o, "name", r->scen_name[v]);
        cJSON_AddNumberToObject(o, "weight", p->scen_weight[v]);
        cJSON_AddNumberToObject(o, "sites_closed", (double)r->sites_closed[v]);
        cJSON_AddNumberToObject(o, "people_covered_robust", pl->covered[v]);
        cJSON_AddNumberToObject(o, "people_covered_base_plan", r->base_plan_cov[v]);
        cJSON_AddItemToArray(arr, o);
    }
    cJSON_AddNumberToObject(rj, "units_in_model", (double)pl->units_after);
    cJSON_AddNumberToObject(rj, "units_before_merging", (double)pl->units_before);
    cJSON_AddNumberToObject(rj, "search_seconds", r->seconds_searches);
    cJSON_AddNumberToObject(rj, "model_seconds", r->seconds_model);
done:
    table_free(t);
    table_free(ts);
    return rc;
}

void site_robust_print(const scen_t *s, const site_data_t *d, const site_robust_t *r)
{
    const robust_problem_t *p = r->prob;
    const robust_result_t *pl = &r->plan;
    double tot = d->total_people;
    int expected = s->siting->robust_objective == 1;
    char buf[32];

    printf("robust siting (%s over base + %zu variants): %s; %s covered %.0f people "
           "(base-only plan %.0f), bound %.6g, gap %.3g%%\n",
           expected ? "weighted" : "worst case", p->n_scen - 1, solver_status_name(pl->status),
           expected ? "weighted" : "worst scenario", pl->objective,
           expected ? weighted_of(p, r->base_plan_cov) : worst_of(r->base_plan_cov, p->n_scen),
           pl->bound, 100.0 * pl->gap);
    printf("robust plan:");
    for (size_t k = 0; k < pl->n_open && k < 20; k++)
        if (!d->existing[pl->open[k]])
            printf(" %s", loc_site_name(d->prob, (size_t)pl->open[k], buf, sizeof buf));
    printf("%s\n", pl->n_open > 20 ? " ..." : "");
    printf("  %-24s %14s %14s\n", "scenario", "robust plan", "base-only plan");
    for (size_t v = 0; v < p->n_scen; v++)
        printf("  %-24.24s %8.0f %5.1f%% %8.0f %5.1f%%\n", r->scen_name[v], pl->covered[v],
               tot > 0 ? 100.0 * pl->covered[v] / tot : 0.0, r->base_plan_cov[v],
               tot > 0 ? 100.0 * r->base_plan_cov[v] / tot : 0.0);
}
