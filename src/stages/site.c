/* site: the site-selection stage (see include/site.h). The grid path turns
 * populated cells into demand units and bounded searches from every site into
 * the sparse (unit, site, seconds) pairs the models read; the table path hands
 * the CSV files to the tables module. Both then run one model of
 * src/models/ and describe its plan in the same outputs. People are conserved:
 * covered + unserved = total, which the tests check. */
#include "site.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "candidates.h"
#include "capacity.h"
#include "median.h"
#include "output.h"
#include "progress.h"
#include "scen_siting.h"
#include "table.h"
#include "tables.h"
#include "travel.h"

const char *site_model_name(int model)
{
    static const char *const names[] = {"max_cover", "set_cover", "p_median", "capacitated"};
    return model >= 0 && model < 4 ? names[model] : "?";
}

static const char *why_name(int why)
{
    switch (why) {
    case LOC_SERVED: return "served";
    case LOC_NO_SITE_IN_REACH: return "no_site_in_reach";
    case LOC_NOT_CHOSEN: return "not_chosen";
    case LOC_CAPACITY: return "sites_full";
    default: return "?";
    }
}

void site_data_destroy(site_data_t *d)
{
    if (d == NULL) return;
    if (d->site_name != NULL && d->prob != NULL)
        for (size_t i = 0; i < d->prob->n_sites; i++) free(d->site_name[i]);
    free(d->site_name);
    loc_free(d->prob);
    free(d->unit_cell);
    free(d->site_x);
    free(d->site_y);
    free(d->site_cell);
    free(d->origin);
    free(d->existing);
    memset(d, 0, sizeof *d);
}

void site_result_destroy(site_result_t *r)
{
    if (r == NULL) return;
    loc_result_destroy(&r->plan);
    free(r->flow);
    free(r->curve);
    memset(r, 0, sizeof *r);
}

static int cmp_str(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

/* Site ids must be unique over existing, candidate and generated sites alike,
 * since outputs and later commands name sites by id. */
static int check_unique_ids(const points_t *const *layers, const char *const *what, size_t n_layers,
                            err_t *e)
{
    size_t n = 0, k = 0;
    char **ids;
    int rc = ERR_OK;

    for (size_t l = 0; l < n_layers; l++) n += layers[l] ? layers[l]->n : 0;
    ids = malloc((n ? n : 1) * sizeof *ids);
    if (ids == NULL) return err_set(e, ERR_NOMEM, "out of memory checking site ids");
    for (size_t l = 0; l < n_layers; l++)
        for (size_t i = 0; layers[l] && i < layers[l]->n; i++) ids[k++] = layers[l]->id[i];
    qsort(ids, n, sizeof *ids, cmp_str);
    for (size_t i = 1; i < n && rc == ERR_OK; i++)
        if (strcmp(ids[i], ids[i - 1]) == 0) {
            const char *in1 = NULL, *in2 = NULL;
            for (size_t l = 0; l < n_layers; l++)
                for (size_t j = 0; layers[l] && j < layers[l]->n; j++)
                    if (strcmp(layers[l]->id[j], ids[i]) == 0) {
                        if (in1 == NULL) in1 = what[l];
                        else in2 = what[l];
                    }
            rc = err_set(e, ERR_INPUT, "site id '%s' is used in both %s and %s; site ids must be "
                         "unique across existing, candidate and generated sites", ids[i],
                         in1 ? in1 : "?", in2 ? in2 : "?");
        }
    free(ids);
    return rc;
}

int site_prepare_grid(const inputs_t *in, const network_t *net, int n_threads, int quiet,
                      site_data_t *d, err_t *e)
{
    const scen_t *s = in->scen;
    const struct scen_siting *st = s->siting;
    const grid_t *g = in->grid;
    size_t n_cells = (size_t)g->nx * (size_t)g->ny, n_units = 0, n_sites = 0, k = 0, n_free = 0;
    points_t *gen = NULL;
    const points_t *layers[3];
    static const char *const what[3] = {"sites.existing", "sites.candidates",
                                        "the generated candidates"};
    int64_t *nodes = NULL;
    int32_t *cell_unit = NULL;
    travel_reach_t *reach = NULL;
    progress_t pr;
    double t0 = progress_now();
    int rc = ERR_OK;

    memset(d, 0, sizeof *d);
    d->is_grid = 1;
    d->grid = g;
    progress_init(&pr, quiet);
    if (st == NULL)
        return err_set(e, ERR_INPUT, "%s: has no 'siting' section; add one naming the model "
                       "(see docs/siting.md)", s->file);
    if (!isnan(st->limit_cost))
        return err_set(e, ERR_INPUT, "%s: key 'siting.limit' is for table inputs; on a grid "
                       "give 'siting.limit_min' (minutes)", s->file);
    d->cost_scale = st->model == SCEN_SITE_CAPACITATED ? st->cost_rate / 60.0 : 1.0;
    d->limit = (isnan(st->limit_s) ? s->limit_s : st->limit_s);
    d->total_people = g->total_people;

    if (st->generate != SCEN_GEN_NONE) {
        cand_opts_t co = {st->generate == SCEN_GEN_JUNCTIONS ? CAND_JUNCTIONS : CAND_ALONG_ROADS,
                          st->spacing_m, st->min_spacing_m, st->near_m, st->min_people,
                          (size_t)st->gen_max, st->gen_capacity, st->gen_fixed_cost};
        rc = candidates_generate(g, in->roads, in->existing, &co, &gen, e);
        if (rc != ERR_OK) goto done;
    }
    layers[0] = in->existing;
    layers[1] = in->candidates;
    layers[2] = gen;
    rc = check_unique_ids(layers, what, 3, e);
    if (rc != ERR_OK) goto done;
    d->n_existing = in->existing ? in->existing->n : 0;
    d->n_layer = in->candidates ? in->candidates->n : 0;
    d->n_generated = gen ? gen->n : 0;
    n_sites = d->n_existing + d->n_layer + d->n_generated;
    n_free = d->n_layer + d->n_generated + (st->existing == SCEN_EXISTING_MAY_CLOSE ? d->n_existing : 0);
    if (n_free == 0) {
        rc = err_set(e, ERR_INPUT, "%s: there are no candidate sites to choose from; give a "
                     "point layer in 'sites.candidates' or 'siting.candidates.generate'%s",
                     s->file, gen != NULL ? " (generation kept no point: lower "
                     "siting.candidates.min_people or min_spacing_m)" : "");
        goto done;
    }

    cell_unit = malloc(n_cells * sizeof *cell_unit);
    nodes = malloc(n_sites * sizeof *nodes);
    reach = calloc(n_sites, sizeof *reach);
    d->site_x = malloc(n_sites * sizeof *d->site_x);
    d->site_y = malloc(n_sites * sizeof *d->site_y);
    d->site_cell = malloc(n_sites * sizeof *d->site_cell);
    d->site_name = calloc(n_sites, sizeof *d->site_name);
    d->origin = malloc(n_sites * sizeof *d->origin);
    d->existing = malloc(n_sites * sizeof *d->existing);
    if (!cell_unit || !nodes || !reach || !d->site_x || !d->site_y || !d->site_cell ||
        !d->site_name || !d->origin || !d->existing) {
        rc = err_set(e, ERR_NOMEM, "out of memory preparing %zu sites", n_sites);
        goto done;
    }
    for (size_t c = 0; c < n_cells; c++)
        cell_unit[c] = g->people[c] > 0 ? (int32_t)n_units++ : -1;
    d->unit_cell = malloc((n_units ? n_units : 1) * sizeof *d->unit_cell);
    if (d->unit_cell == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory for %zu demand cells", n_units);
        goto done;
    }
    for (size_t c = 0; c < n_cells; c++)
        if (cell_unit[c] >= 0) d->unit_cell[cell_unit[c]] = (int64_t)c;
    rc = loc_new(n_units, n_sites, &d->prob, e);
    if (rc != ERR_OK) goto done;
    for (size_t j = 0; j < n_units; j++) d->prob->weight[j] = g->people[d->unit_cell[j]];
    for (int l = 0; l < 3; l++) {
        const points_t *p = layers[l];
        for (size_t i = 0; p != NULL && i < p->n; i++, k++) {
            d->site_x[k] = p->x[i];
            d->site_y[k] = p->y[i];
            d->site_cell[k] = p->cell[i];
            d->site_name[k] = strdup(p->name[i] ? p->name[i] : "");
            if (d->site_name[k] == NULL) {
                rc = err_set(e, ERR_NOMEM, "out of memory preparing sites");
                goto done;
            }
            d->origin[k] = l;
            d->existing[k] = l == 0;
            d->prob->capacity[k] = p->capacity[i];
            d->prob->fixed_cost[k] = p->cost[i];
            d->prob->state[k] = l > 0 ? LOC_CANDIDATE
                                : st->existing == SCEN_EXISTING_MAY_CLOSE ? LOC_MAY_CLOSE
                                : LOC_FIXED_OPEN;
            if ((rc = loc_set_site_id(d->prob, k, p->id[i], e)) != ERR_OK) goto done;
            nodes[k] = network_cell_node(net, (int)(p->cell[i] % g->nx), (int)(p->cell[i] / g->nx));
        }
    }
    d->seconds_build = progress_now() - t0;

    if (n_threads <= 0) {
        long nc = sysconf(_SC_NPROCESSORS_ONLN);
        n_threads = nc > 0 ? (int)nc : 1;
    }
    progress_start(&pr, "coverage lists (bounded searches)");
    rc = travel_bounded_many(net, nodes, n_sites, d->limit, n_threads, reach, e);
    d->seconds_searches = progress_end(&pr);
    if (rc != ERR_OK) goto done;
    t0 = progress_now();
    for (size_t i = 0; i < n_sites && rc == ERR_OK; i++)
        for (size_t m = 0; m < reach[i].n && rc == ERR_OK; m++) {
            int32_t u = cell_unit[reach[i].cell[m]];
            if (u >= 0)
                rc = loc_add_pair(d->prob, (size_t)u, i, reach[i].time_s[m] * d->cost_scale, e);
        }
    if (rc == ERR_OK) rc = loc_finish(d->prob, e);
    d->limit *= d->cost_scale;
    d->seconds_build += progress_now() - t0;
done:
    if (reach != NULL)
        for (size_t i = 0; i < n_sites; i++) travel_reach_destroy(&reach[i]);
    free(reach);
    free(nodes);
    free(cell_unit);
    points_free(gen);
    if (rc != ERR_OK) site_data_destroy(d);
    return rc;
}

int site_prepare_tables(const scen_t *s, site_data_t *d, err_t *e)
{
    const struct scen_siting *st = s->siting;
    double limit, t0 = progress_now();
    int rc;

    memset(d, 0, sizeof *d);
    if (st == NULL)
        return err_set(e, ERR_INPUT, "%s: has no 'siting' section; add one naming the model "
                       "(see docs/siting.md)", s->file);
    if (!isnan(st->limit_s))
        return err_set(e, ERR_INPUT, "%s: key 'siting.limit_min' is for grids; with table "
                       "inputs give 'siting.limit' in the tables' cost unit", s->file);
    if (st->generate != SCEN_GEN_NONE)
        return err_set(e, ERR_INPUT, "%s: key 'siting.candidates' needs a grid with roads; "
                       "with table inputs list the candidates in the site table", s->file);
    if (st->aggregate_cells > 1)
        return err_set(e, ERR_INPUT, "%s: key 'siting.aggregate_cells' needs a grid", s->file);
    limit = isnan(st->limit_cost) ? INFINITY : st->limit_cost;
    if (isinf(limit) && (st->model == SCEN_SITE_MAX_COVER || st->model == SCEN_SITE_SET_COVER))
        return err_set(e, ERR_INPUT, "%s: model '%s' needs 'siting.limit' (the largest cost that "
                       "counts as covered, in the tables' cost unit)", s->file,
                       site_model_name(st->model));
    if (s->table_edges != NULL)
        rc = tables_load_network(s->table_edges, s->table_directed, s->table_demand,
                                 s->table_sites, limit, &d->prob, e);
    else
        rc = tables_load_matrix(s->table_matrix, s->table_demand, s->table_sites, &d->prob, e);
    if (rc != ERR_OK) return rc;
    d->cost_scale = st->model == SCEN_SITE_CAPACITATED ? st->cost_rate : 1.0;
    d->limit = limit * d->cost_scale;
    for (size_t k = 0; k < d->prob->n_pairs; k++) d->prob->pair_cost[k] *= d->cost_scale;
    d->existing = malloc((d->prob->n_sites ? d->prob->n_sites : 1) * sizeof *d->existing);
    d->origin = malloc((d->prob->n_sites ? d->prob->n_sites : 1) * sizeof *d->origin);
    if (d->existing == NULL || d->origin == NULL) {
        site_data_destroy(d);
        return err_set(e, ERR_NOMEM, "out of memory reading tables");
    }
    for (size_t i = 0; i < d->prob->n_sites; i++) {
        d->existing[i] = d->prob->state[i] != LOC_CANDIDATE;
        d->origin[i] = d->existing[i] ? SITE_EXISTING : SITE_TABLE;
        if (d->prob->state[i] == LOC_FIXED_OPEN && st->existing == SCEN_EXISTING_MAY_CLOSE)
            d->prob->state[i] = LOC_MAY_CLOSE;
        if (d->existing[i]) d->n_existing++;
        else d->n_layer++;
    }
    for (size_t j = 0; j < d->prob->n_units; j++) d->total_people += d->prob->weight[j];
    d->seconds_build = progress_now() - t0;
    return ERR_OK;
}

/* Cost of pair (unit j, site i), or NAN when the pair does not exist. */
static double pair_cost(const loc_problem_t *p, size_t j, int i)
{
    for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++)
        if (p->pair_site[k] == i) return p->pair_cost[k];
    return NAN;
}

/* Blocks of k x k cells as demand units. A block can use a site only when every
 * populated cell of it reaches the site within the limit (so a block never
 * claims coverage one of its cells lacks); its cost is the people-weighted mean
 * of its cells' costs. Sites are copied as they are. */
static int aggregate(const site_data_t *d, int k, loc_problem_t **out, err_t *e)
{
    const loc_problem_t *p = d->prob;
    const grid_t *g = d->grid;
    size_t nbx = ((size_t)g->nx + (size_t)k - 1) / (size_t)k;
    size_t nby = ((size_t)g->ny + (size_t)k - 1) / (size_t)k, nb = nbx * nby, n_agg = 0;
    size_t *start = NULL, *order = NULL, *fill = NULL, *touched = NULL;
    int32_t *block_unit = NULL;
    double *wsum = NULL, *wcost = NULL;
    int *cnt = NULL;
    loc_problem_t *a = NULL;
    int rc = ERR_OK;

    *out = NULL;
    start = calloc(nb + 1, sizeof *start);
    fill = calloc(nb + 1, sizeof *fill);
    order = malloc((p->n_units ? p->n_units : 1) * sizeof *order);
    block_unit = malloc(nb * sizeof *block_unit);
    wsum = calloc(p->n_sites + 1, sizeof *wsum);
    wcost = calloc(p->n_sites + 1, sizeof *wcost);
    cnt = calloc(p->n_sites + 1, sizeof *cnt);
    touched = malloc((p->n_sites + 1) * sizeof *touched);
    if (!start || !fill || !order || !block_unit || !wsum || !wcost || !cnt || !touched) {
        rc = err_set(e, ERR_NOMEM, "out of memory aggregating cells into %dx%d blocks", k, k);
        goto done;
    }
    /* Counting sort of units by block. */
    for (size_t j = 0; j < p->n_units; j++) {
        size_t c = (size_t)d->unit_cell[j], col = c % (size_t)g->nx, row = c / (size_t)g->nx;
        start[(row / (size_t)k) * nbx + col / (size_t)k + 1]++;
    }
    for (size_t b = 0; b < nb; b++) {
        block_unit[b] = start[b + 1] > 0 ? (int32_t)n_agg++ : -1;
        start[b + 1] += start[b];
    }
    for (size_t j = 0; j < p->n_units; j++) {
        size_t c = (size_t)d->unit_cell[j], col = c % (size_t)g->nx, row = c / (size_t)g->nx;
        size_t b = (row / (size_t)k) * nbx + col / (size_t)k;
        order[start[b] + fill[b]++] = j;
    }
    if ((rc = loc_new(n_agg, p->n_sites, &a, e)) != ERR_OK) goto done;
    for (size_t i = 0; i < p->n_sites; i++) {
        a->capacity[i] = p->capacity[i];
        a->fixed_cost[i] = p->fixed_cost[i];
        a->state[i] = p->state[i];
        if (p->site_id[i] && (rc = loc_set_site_id(a, i, p->site_id[i], e)) != ERR_OK) goto done;
    }
    for (size_t b = 0; b < nb && rc == ERR_OK; b++) {
        size_t nt = 0, members = start[b + 1] - start[b];
        int32_t u = block_unit[b];
        if (u < 0) continue;
        a->weight[u] = 0;
        for (size_t m = start[b]; m < start[b + 1]; m++) {
            size_t j = order[m];
            a->weight[u] += p->weight[j];
            for (size_t q = p->unit_start[j]; q < p->unit_start[j + 1]; q++) {
                int i = p->pair_site[q];
                if (cnt[i] == 0) touched[nt++] = (size_t)i;
                cnt[i]++;
                wsum[i] += p->weight[j];
                wcost[i] += p->weight[j] * p->pair_cost[q];
            }
        }
        for (size_t t = 0; t < nt; t++) {
            size_t i = touched[t];
            if (rc == ERR_OK && (size_t)cnt[i] == members)
                rc = loc_add_pair(a, (size_t)u, i, wcost[i] / wsum[i], e);
            cnt[i] = 0;
            wsum[i] = wcost[i] = 0;
        }
    }
    if (rc == ERR_OK) rc = loc_finish(a, e);
    if (rc == ERR_OK) {
        *out = a;
        a = NULL;
    }
done:
    loc_free(a);
    free(start);
    free(fill);
    free(order);
    free(block_unit);
    free(wsum);
    free(wcost);
    free(cnt);
    free(touched);
    return rc;
}

/* Median objective of a plan on 'p': persons x cost of the assigned pair, plus
 * the penalty for every unserved person. */
static double median_value(const loc_problem_t *p, const loc_result_t *r, double penalty)
{
    double v = 0;
    for (size_t j = 0; j < p->n_units; j++) {
        if (r->assign[j] >= 0) v += r->served[j] * pair_cost(p, j, r->assign[j]);
        v += (p->weight[j] - r->served[j]) * penalty;
    }
    return v;
}

/* The capacitated assignment on the cells for the open sites of 'open_plan':
 * a problem holding only those sites, all fixed open, solved exactly; the plan
 * in 'r' is mapped back to the site indices of 'p'. */
static int capacity_on_cells(const loc_problem_t *p, const loc_result_t *open_plan,
                             const loc_opts_t *o, loc_result_t *r, err_t *e)
{
    loc_problem_t *sub = NULL;
    int *map = malloc((p->n_sites + 1) * sizeof *map);
    loc_opts_t so = *o;
    int rc;

    memset(r, 0, sizeof *r);
    if (map == NULL) return err_set(e, ERR_NOMEM, "out of memory");
    for (size_t i = 0; i < p->n_sites; i++) map[i] = -1;
    rc = loc_new(p->n_units, open_plan->n_open, &sub, e);
    if (rc != ERR_OK) goto done;
    for (size_t t = 0; t < open_plan->n_open; t++) {
        int i = open_plan->open[t];
        map[i] = (int)t;
        sub->capacity[t] = p->capacity[i];
        sub->fixed_cost[t] = p->fixed_cost[i];
        sub->state[t] = LOC_FIXED_OPEN;
    }
    for (size_t j = 0; j < p->n_units && rc == ERR_OK; j++) {
        sub->weight[j] = p->weight[j];
        for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1] && rc == ERR_OK; k++)
            if (map[p->pair_site[k]] >= 0)
                rc = loc_add_pair(sub, j, (size_t)map[p->pair_site[k]], p->pair_cost[k], e);
    }
    if (rc == ERR_OK) rc = loc_finish(sub, e);
    so.p = -1;
    so.budget = INFINITY;
    if (rc == ERR_OK) rc = capacity_solve(sub, &so, r, e);
    if (rc != ERR_OK) goto done;
    for (size_t t = 0; t < r->n_open; t++) r->open[t] = open_plan->open[r->open[t]];
    for (size_t j = 0; j < p->n_units; j++)
        if (r->assign[j] >= 0) r->assign[j] = open_plan->open[r->assign[j]];
    /* Reasons as on the full problem: the sub-problem knows only the open sites,
     * so "no site in reach" there may mean "not chosen" here. */
    for (size_t j = 0; j < p->n_units; j++) {
        int any = 0, open_near = 0;
        if (r->served[j] >= p->weight[j]) continue;
        for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++) {
            if (p->pair_cost[k] > o->limit) break;
            any = 1;
            if (map[p->pair_site[k]] >= 0) open_near = 1;
        }
        r->why[j] = open_near ? LOC_CAPACITY : any ? LOC_NOT_CHOSEN : LOC_NO_SITE_IN_REACH;
    }
done:
    loc_free(sub);
    free(map);
    return rc;
}

/* A split plan says how many persons of each unit are served, but not by which
 * open sites. The least-cost split that serves exactly those persons within the
 * capacities is a transportation LP; its cost equals the model's assignment
 * cost, and it gives each site's true load. flow[k] per pair of 'p'. */
static int split_flows(const loc_problem_t *p, const loc_result_t *plan, double limit,
                       double **flow_out, err_t *e)
{
    solver_mip_t *m = NULL;
    solver_opts_t so;
    solver_result_t sr = {0};
    unsigned char *open = calloc(p->n_sites + 1, 1);
    int *col = malloc((p->n_pairs + 1) * sizeof *col), *idx = NULL;
    double *flow = calloc(p->n_pairs + 1, sizeof *flow), *val = NULL;
    size_t n_cols = 0;
    int rc, first = 0, row;

    *flow_out = NULL;
    if (!open || !col || !flow) {
        rc = err_set(e, ERR_NOMEM, "out of memory splitting demand between sites");
        goto done;
    }
    for (size_t t = 0; t < plan->n_open; t++) open[plan->open[t]] = 1;
    for (size_t k = 0; k < p->n_pairs; k++) col[k] = 0;
    rc = solver_mip_new("split of demand between open sites", SOLVER_MIN, &m, e);
    for (size_t j = 0; rc == ERR_OK && j < p->n_units; j++) {
        if (plan->served[j] <= 0) continue;
        for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1] && rc == ERR_OK; k++) {
            if (p->pair_cost[k] > limit || !open[p->pair_site[k]]) continue;
            rc = solver_add_cols(m, 1, SOLVER_CONTINUOUS, 0, INFINITY, &p->pair_cost[k], &first, e);
            col[k] = first;
            n_cols++;
        }
    }
    if (rc != ERR_OK) goto done;
    idx = malloc((n_cols + p->n_pairs + 1) * sizeof *idx);
    val = malloc((n_cols + p->n_pairs + 1) * sizeof *val);
    if (!idx || !val) {
        rc = err_set(e, ERR_NOMEM, "out of memory splitting demand between sites");
        goto done;
    }
    for (size_t j = 0; rc == ERR_OK && j < p->n_units; j++) {
        size_t nnz = 0;
        if (plan->served[j] <= 0) continue;
        for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++)
            if (col[k] > 0) {
                idx[nnz] = col[k];
                val[nnz++] = 1;
            }
        rc = solver_add_row(m, nnz, idx, val, plan->served[j], plan->served[j], &row, e);
    }
    for (size_t i = 0; rc == ERR_OK && i < p->n_sites; i++) {
        size_t nnz = 0;
        if (!open[i] || !isfinite(p->capacity[i])) continue;
        for (size_t k = 0; k < p->n_pairs; k++)
            if (col[k] > 0 && p->pair_site[k] == (int)i) {
                idx[nnz] = col[k];
                val[nnz++] = 1;
            }
        /* A hair of room for rounding in the plan's served amounts. */
        if (nnz > 0)
            rc = solver_add_row(m, nnz, idx, val, -INFINITY, p->capacity[i] * (1 + 1e-9) + 1e-9,
                                &row, e);
    }
    if (rc != ERR_OK) goto done;
    solver_opts_default(&so);
    rc = solver_solve(m, &so, NULL, &sr, e);
    if (rc != ERR_OK) goto done;
    if (sr.status != SOLVER_OPTIMAL) {
        rc = err_set(e, ERR_SOLVER, "splitting the served demand between open sites: %s",
                     solver_status_name(sr.status));
        goto done;
    }
    for (size_t k = 0; k < p->n_pairs; k++)
        if (col[k] > 0) flow[k] = sr.x[col[k]];
    *flow_out = flow;
    flow = NULL;
done:
    solver_result_destroy(&sr);
    solver_mip_free(m);
    free(open);
    free(col);
    free(idx);
    free(val);
    free(flow);
    return rc;
}

static int solve(int model, const loc_problem_t *p, const loc_opts_t *o, loc_result_t *r,
                 err_t *e)
{
    switch (model) {
    case SCEN_SITE_MAX_COVER: return cover_max(p, o, r, e);
    case SCEN_SITE_SET_COVER: return cover_set(p, o, r, e);
    case SCEN_SITE_P_MEDIAN: return median_solve(p, o, r, e);
    default: return capacity_solve(p, o, r, e);
    }
}

int site_run(const scen_t *s, const site_data_t *d, int quiet, site_result_t *r, err_t *e)
{
    const struct scen_siting *st = s->siting;
    const loc_problem_t *p = d->prob;
    loc_problem_t *agg = NULL;
    unsigned char *is_open = NULL;
    loc_result_t before = {0}, mres = {0};
    loc_opts_t o;
    progress_t pr;
    size_t n_free = 0;
    int rc;

    memset(r, 0, sizeof *r);
    r->model = st->model;
    r->k = 1;
    progress_init(&pr, quiet);
    for (size_t i = 0; i < p->n_sites; i++) n_free += p->state[i] != LOC_FIXED_OPEN;
    if (n_free == 0)
        return err_set(e, ERR_INPUT, "%s: there are no candidate sites to choose from (every "
                       "site is an existing one kept open)", s->file);
    loc_opts_default(&o);
    o.solver.time_limit_s = st->time_limit_s;
    o.solver.rel_gap = st->gap;
    o.p = st->p;
    o.budget = st->budget;
    o.limit = d->limit;
    o.share = st->target_share;
    o.min_fixed_cost = st->min_fixed_cost;
    o.single_source = st->single_source;
    o.per_unit_cost = 1;

    /* One penalty per unserved person for the model and for evaluating its plan
     * on the cells, so the two objectives compare: the models' own automatic
     * rules (docs/models.md), taken on the cells. */
    if (st->model == SCEN_SITE_P_MEDIAN || st->model == SCEN_SITE_CAPACITATED) {
        double maxc = 0, sumf = 0, minw = INFINITY;
        for (size_t k = 0; k < p->n_pairs; k++)
            if (p->pair_cost[k] > maxc) maxc = p->pair_cost[k];
        for (size_t i = 0; i < p->n_sites; i++) sumf += p->fixed_cost[i];
        for (size_t j = 0; j < p->n_units; j++)
            if (p->weight[j] > 0 && p->weight[j] < minw) minw = p->weight[j];
        if (st->penalty > 0) r->penalty = st->penalty;
        else if (st->model == SCEN_SITE_P_MEDIAN) r->penalty = 10.0 * maxc + 1.0;
        else r->penalty = 1.0 + 10.0 * maxc + (isfinite(minw) ? sumf / minw : 0);
        o.penalty = r->penalty;
    }

    /* Coverage before: existing sites alone, nearest within the limit. */
    is_open = calloc(p->n_sites + 1, 1);
    if (is_open == NULL) return err_set(e, ERR_NOMEM, "out of memory");
    for (size_t i = 0; i < p->n_sites; i++)
        if (d->existing[i]) {
            is_open[i] = 1;
            r->before_sites++;
        }
    rc = loc_plan_nearest(p, is_open, d->limit, &before, e);
    if (rc != ERR_OK) goto done;
    r->before_covered = before.served_weight;

    progress_start(&pr, "solving the site-selection model");
    if (d->is_grid && st->aggregate_cells > 1) {
        r->k = st->aggregate_cells;
        rc = aggregate(d, r->k, &agg, e);
        if (rc == ERR_OK) rc = solve(st->model, agg, &o, &mres, e);
        if (rc == ERR_OK) {
            r->agg_units = agg->n_units;
            r->objective_agg = mres.objective;
            if (st->model == SCEN_SITE_P_MEDIAN) {
                memset(is_open, 0, p->n_sites);
                for (size_t t = 0; t < mres.n_open; t++) is_open[mres.open[t]] = 1;
                rc = loc_plan_nearest(p, is_open, d->limit, &r->plan, e);
                if (rc == ERR_OK) r->objective_cells = median_value(p, &r->plan, r->penalty);
            } else {
                rc = capacity_on_cells(p, &mres, &o, &r->plan, e);
                if (rc == ERR_OK) r->objective_cells = r->plan.objective;
            }
            /* The model's own figures describe the plan chosen on blocks. */
            r->plan.status = mres.status;
            r->plan.objective = mres.objective;
            r->plan.bound = mres.bound;
            r->plan.gap = mres.gap;
            r->plan.nodes = mres.nodes;
            r->plan.seconds = mres.seconds;
            r->plan.solver_seconds = mres.solver_seconds;
            r->plan.units_before = p->n_units;
            r->plan.units_after = agg->n_units;
            r->plan.n_cols = mres.n_cols;
            r->plan.n_rows = mres.n_rows;
        }
    } else {
        rc = solve(st->model, p, &o, &r->plan, e);
        if (rc == ERR_OK) r->objective_cells = r->plan.objective;
    }
    if (rc == ERR_OK && st->model == SCEN_SITE_CAPACITATED && !st->single_source)
        rc = split_flows(p, &r->plan, d->limit, &r->flow, e);
    r->seconds_model = progress_end(&pr);
    if (rc != ERR_OK) goto done;

    /* The coverage curve: best coverage for p = 1..P at the limit. */
    {
        int P = st->curve_max_p >= 0 ? st->curve_max_p
                : st->model == SCEN_SITE_MAX_COVER && st->p > 0 ? st->p : 0;
        if ((size_t)P > n_free) P = (int)n_free;
        if (P > 0) {
            loc_opts_t co = o;
            co.budget = INFINITY;
            progress_start(&pr, "coverage curve");
            rc = cover_curve(p, &co, P, &r->curve, e);
            r->seconds_curve = progress_end(&pr);
            if (rc != ERR_OK) goto done;
            r->n_curve = P;
        }
    }
done:
    loc_result_destroy(&before);
    loc_result_destroy(&mres);
    loc_free(agg);
    free(is_open);
    if (rc != ERR_OK) site_result_destroy(r);
    return rc;
}

/* ---- outputs ------------------------------------------------------------------ */

typedef struct site_stat {
    double served;        /* persons assigned (main site) */
    double sum_cost;      /* persons x cost, in seconds or table cost units */
    double max_cost;
    int open;
} site_stat_t;

/* Per-site figures from the plan; costs divided back by cost_scale so they read
 * as seconds (grid) or the tables' own unit. */
static site_stat_t *site_stats(const site_data_t *d, const site_result_t *r)
{
    const loc_problem_t *p = d->prob;
    site_stat_t *s = calloc(p->n_sites + 1, sizeof *s);

    if (s == NULL) return NULL;
    for (size_t t = 0; t < r->plan.n_open; t++) s[r->plan.open[t]].open = 1;
    if (r->flow != NULL) {
        for (size_t k = 0; k < p->n_pairs; k++) {
            int i = p->pair_site[k];
            double c = p->pair_cost[k] / (d->cost_scale > 0 ? d->cost_scale : 1);
            if (r->flow[k] <= 1e-9) continue;
            s[i].served += r->flow[k];
            s[i].sum_cost += r->flow[k] * c;
            if (c > s[i].max_cost) s[i].max_cost = c;
        }
        return s;
    }
    for (size_t j = 0; j < p->n_units; j++) {
        int i = r->plan.assign[j];
        double c;
        if (i < 0 || r->plan.served[j] <= 0) continue;
        c = pair_cost(p, j, i) / (d->cost_scale > 0 ? d->cost_scale : 1);
        s[i].served += r->plan.served[j];
        if (isfinite(c)) {
            s[i].sum_cost += r->plan.served[j] * c;
            if (c > s[i].max_cost) s[i].max_cost = c;
        }
    }
    return s;
}

static const char *site_status(const site_data_t *d, const site_stat_t *st, size_t i)
{
    if (d->existing[i]) return st[i].open ? "kept" : "closed";
    return "new";
}

/* Rows: every open site, then existing sites the model closed. row_of[i] gets
 * the row of site i or -1. */
static table_t *sites_table(const site_data_t *d, const site_stat_t *st, int32_t *row_of)
{
    static const char *const names[] = {"index", "id", "name", "status", "origin",
                                        "people_served", "capacity", "load_ratio", "mean",
                                        "max", "fixed_cost"};
    static const int types[] = {TABLE_INT, TABLE_TEXT, TABLE_TEXT, TABLE_TEXT, TABLE_TEXT,
                                TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_REAL,
                                TABLE_REAL};
    static const char *const origin[] = {"existing", "candidate layer", "generated", "table"};
    const loc_problem_t *p = d->prob;
    const char *col_names[11];
    table_t *t;
    char buf[32];
    double to_unit = d->is_grid ? 60.0 : 1.0;   /* grid: minutes */

    memcpy(col_names, names, sizeof names);
    col_names[8] = d->is_grid ? "mean_min" : "mean_cost";
    col_names[9] = d->is_grid ? "max_min" : "max_cost";
    t = table_new(11, col_names, types);
    if (t == NULL) return NULL;
    for (size_t i = 0; i < p->n_sites; i++) row_of[i] = -1;
    for (int pass = 0; pass < 2; pass++)
        for (size_t i = 0; i < p->n_sites; i++) {
            long r;
            if (pass == 0 ? !st[i].open : (st[i].open || !d->existing[i])) continue;
            r = table_add_row(t);
            if (r < 0) {
                table_free(t);
                return NULL;
            }
            row_of[i] = (int32_t)r;
            table_set_num(t, (size_t)r, 0, (double)r);
            table_set_text(t, (size_t)r, 1, loc_site_name(p, i, buf, sizeof buf));
            table_set_text(t, (size_t)r, 2, d->site_name ? d->site_name[i] : "");
            table_set_text(t, (size_t)r, 3, site_status(d, st, i));
            table_set_text(t, (size_t)r, 4, origin[d->origin[i]]);
            table_set_num(t, (size_t)r, 5, st[i].served);
            table_set_num(t, (size_t)r, 6, isfinite(p->capacity[i]) ? p->capacity[i] : NAN);
            table_set_num(t, (size_t)r, 7, isfinite(p->capacity[i]) && p->capacity[i] > 0
                                               ? st[i].served / p->capacity[i] : NAN);
            table_set_num(t, (size_t)r, 8, st[i].served > 0 ? st[i].sum_cost / st[i].served / to_unit : NAN);
            table_set_num(t, (size_t)r, 9, st[i].served > 0 ? st[i].max_cost / to_unit : NAN);
            table_set_num(t, (size_t)r, 10, p->fixed_cost[i]);
        }
    return t;
}

/* Demand units with people left out, and why (grid: one row per cell). */
static table_t *unserved_table(const site_data_t *d, const site_result_t *r)
{
    static const char *const gnames[] = {"col", "row", "x", "y", "people", "unserved", "reason"};
    static const int gtypes[] = {TABLE_INT, TABLE_INT, TABLE_REAL, TABLE_REAL, TABLE_REAL,
                                 TABLE_REAL, TABLE_TEXT};
    static const char *const tnames[] = {"id", "weight", "unserved", "reason"};
    static const int ttypes[] = {TABLE_TEXT, TABLE_REAL, TABLE_REAL, TABLE_TEXT};
    const loc_problem_t *p = d->prob;
    table_t *t = d->is_grid ? table_new(7, gnames, gtypes) : table_new(4, tnames, ttypes);
    char buf[32];

    for (size_t j = 0; t != NULL && j < p->n_units; j++) {
        double un = p->weight[j] - r->plan.served[j];
        long row;
        if (!(un > 1e-9 * (p->weight[j] > 1 ? p->weight[j] : 1))) continue;
        row = table_add_row(t);
        if (row < 0) {
            table_free(t);
            return NULL;
        }
        if (d->is_grid) {
            int col = (int)(d->unit_cell[j] % d->grid->nx), rw = (int)(d->unit_cell[j] / d->grid->nx);
            double x, y;
            grid_cell_center(d->grid, col, rw, &x, &y);
            table_set_num(t, (size_t)row, 0, col);
            table_set_num(t, (size_t)row, 1, rw);
            table_set_num(t, (size_t)row, 2, x);
            table_set_num(t, (size_t)row, 3, y);
            table_set_num(t, (size_t)row, 4, p->weight[j]);
            table_set_num(t, (size_t)row, 5, un);
            table_set_text(t, (size_t)row, 6, why_name(r->plan.why[j]));
        } else {
            table_set_text(t, (size_t)row, 0, loc_unit_name(p, j, buf, sizeof buf));
            table_set_num(t, (size_t)row, 1, p->weight[j]);
            table_set_num(t, (size_t)row, 2, un);
            table_set_text(t, (size_t)row, 3, why_name(r->plan.why[j]));
        }
    }
    return t;
}

/* Tables: every demand unit with its main site, persons served and cost. */
static table_t *assignment_table(const site_data_t *d, const site_result_t *r)
{
    static const char *const names[] = {"demand_id", "weight", "site_id", "served", "cost",
                                        "reason"};
    static const int types[] = {TABLE_TEXT, TABLE_REAL, TABLE_TEXT, TABLE_REAL, TABLE_REAL,
                                TABLE_TEXT};
    const loc_problem_t *p = d->prob;
    table_t *t = table_new(6, names, types);
    char b1[32], b2[32];

    for (size_t j = 0; t != NULL && j < p->n_units; j++) {
        int i = r->plan.assign[j];
        long row = table_add_row(t);
        if (row < 0) {
            table_free(t);
            return NULL;
        }
        table_set_text(t, (size_t)row, 0, loc_unit_name(p, j, b1, sizeof b1));
        table_set_num(t, (size_t)row, 1, p->weight[j]);
        table_set_text(t, (size_t)row, 2, i >= 0 ? loc_site_name(p, (size_t)i, b2, sizeof b2) : "");
        table_set_num(t, (size_t)row, 3, r->plan.served[j]);
        table_set_num(t, (size_t)row, 4, i >= 0 ? pair_cost(p, j, i) / d->cost_scale : NAN);
        table_set_text(t, (size_t)row, 5, why_name(r->plan.why[j]));
    }
    return t;
}

static table_t *curve_table(const site_data_t *d, const site_result_t *r)
{
    static const char *const names[] = {"p", "people_covered", "share", "bound", "status",
                                        "seconds"};
    static const int types[] = {TABLE_INT, TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_TEXT,
                                TABLE_REAL};
    table_t *t = table_new(6, names, types);

    for (int k = 0; t != NULL && k < r->n_curve; k++) {
        const cover_point_t *c = &r->curve[k];
        long row = table_add_row(t);
        if (row < 0) {
            table_free(t);
            return NULL;
        }
        table_set_num(t, (size_t)row, 0, c->p);
        table_set_num(t, (size_t)row, 1, c->covered);
        table_set_num(t, (size_t)row, 2, d->total_people > 0 ? c->covered / d->total_people : 0);
        table_set_num(t, (size_t)row, 3, c->bound);
        table_set_text(t, (size_t)row, 4, solver_status_name(c->status));
        table_set_num(t, (size_t)row, 5, c->seconds);
    }
    return t;
}

static int write_rasters(const char *outdir, const site_data_t *d, const site_result_t *r,
                         const int32_t *row_of, err_t *e)
{
    const grid_t *g = d->grid;
    size_t n_cells = (size_t)g->nx * (size_t)g->ny;
    int32_t *assign = malloc(n_cells * sizeof *assign);
    float *unserved = calloc(n_cells, sizeof *unserved);
    char *p1 = out_join(outdir, "assignment.tif"), *p2 = out_join(outdir, "unserved.tif");
    int rc;

    if (!assign || !unserved || !p1 || !p2) {
        rc = err_set(e, ERR_NOMEM, "out of memory writing site rasters");
        goto done;
    }
    for (size_t c = 0; c < n_cells; c++) assign[c] = -1;
    for (size_t j = 0; j < d->prob->n_units; j++) {
        int i = r->plan.assign[j];
        if (i >= 0 && r->plan.served[j] > 0) assign[d->unit_cell[j]] = row_of[i];
        unserved[d->unit_cell[j]] = (float)(d->prob->weight[j] - r->plan.served[j]);
    }
    rc = out_write_tif_i32(p1, g, assign, -1, "row of the assigned site in sites.csv", e);
    if (rc == ERR_OK)
        rc = out_write_tif_f32(p2, g, unserved, -1.0f, "people not served by the plan", e);
done:
    free(assign);
    free(unserved);
    free(p1);
    free(p2);
    return rc;
}

/* People left out by reason, over all units. */
static void unserved_by_reason(const site_data_t *d, const site_result_t *r, double out[4])
{
    memset(out, 0, 4 * sizeof *out);
    for (size_t j = 0; j < d->prob->n_units; j++) {
        double un = d->prob->weight[j] - r->plan.served[j];
        int w = r->plan.why[j];
        if (un > 0 && w >= 0 && w < 4) out[w] += un;
    }
}

int site_write(const char *outdir, const scen_t *s, const site_data_t *d,
               const site_result_t *r, cJSON *summary, err_t *e)
{
    const loc_problem_t *p = d->prob;
    const loc_result_t *pl = &r->plan;
    site_stat_t *st = site_stats(d, r);
    int32_t *row_of = malloc((p->n_sites + 1) * sizeof *row_of);
    table_t *t = NULL;
    cJSON *sj, *arr;
    double why[4];
    char buf[32];
    int rc = ERR_OK;

    if (st == NULL || row_of == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory writing site outputs");
        goto done;
    }
    t = sites_table(d, st, row_of);
    if (t == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory writing site outputs");
        goto done;
    }
    if ((rc = table_save(t, outdir, "sites.csv", e)) != ERR_OK) goto done;
    if (d->is_grid) {
        double *x = malloc((table_rows(t) + 1) * sizeof *x), *y = malloc((table_rows(t) + 1) * sizeof *y);
        char *path = out_join(outdir, "sites.gpkg");
        if (x == NULL || y == NULL || path == NULL) rc = err_set(e, ERR_NOMEM, "out of memory");
        for (size_t i = 0; rc == ERR_OK && i < p->n_sites; i++)
            if (row_of[i] >= 0) {
                x[row_of[i]] = d->site_x[i];
                y[row_of[i]] = d->site_y[i];
            }
        if (rc == ERR_OK) rc = out_write_points_gpkg(path, "sites", d->grid->wkt, x, y, t, e);
        free(x);
        free(y);
        free(path);
        if (rc == ERR_OK) rc = write_rasters(outdir, d, r, row_of, e);
        if (rc != ERR_OK) goto done;
    } else {
        table_free(t);
        t = assignment_table(d, r);
        if (t == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory writing site outputs");
            goto done;
        }
        if ((rc = table_save(t, outdir, "assignment.csv", e)) != ERR_OK) goto done;
    }
    table_free(t);
    t = unserved_table(d, r);
    if (t == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory writing site outputs");
        goto done;
    }
    if ((rc = table_save(t, outdir, "unserved.csv", e)) != ERR_OK) goto done;
    if (r->n_curve > 0) {
        table_free(t);
        t = curve_table(d, r);
        if (t == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory writing site outputs");
            goto done;
        }
        if ((rc = table_save(t, outdir, "coverage_curve.csv", e)) != ERR_OK) goto done;
    }

    /* summary.json: the "site" section, and its headline keys at the top level. */
    unserved_by_reason(d, r, why);
    for (int top = 0; top < 2; top++) {
        sj = top ? summary : cJSON_AddObjectToObject(summary, "site");
        cJSON_AddStringToObject(sj, "model", site_model_name(r->model));
        cJSON_AddStringToObject(sj, "status", solver_status_name(pl->status));
        cJSON_AddNumberToObject(sj, "objective", pl->objective);
        cJSON_AddNumberToObject(sj, "bound", pl->bound);
        cJSON_AddNumberToObject(sj, "gap", pl->gap);
        arr = cJSON_AddArrayToObject(sj, "open_sites");
        for (size_t t2 = 0; t2 < pl->n_open; t2++)
            cJSON_AddItemToArray(arr, cJSON_CreateString(loc_site_name(p, (size_t)pl->open[t2],
                                                                       buf, sizeof buf)));
        cJSON_AddNumberToObject(sj, "people_total", d->total_people);
        cJSON_AddNumberToObject(sj, "people_covered", pl->served_weight);
        cJSON_AddNumberToObject(sj, "people_unserved", pl->unserved_weight);
        cJSON_AddNumberToObject(sj, "solver_seconds", pl->solver_seconds);
        if (top) break;
        cJSON_AddNumberToObject(sj, "model_seconds", pl->seconds);
        cJSON_AddNumberToObject(sj, "nodes", (double)pl->nodes);
        cJSON_AddStringToObject(sj, "objective_unit",
                                r->model == SCEN_SITE_MAX_COVER ? "persons covered"
                                : r->model == SCEN_SITE_SET_COVER
                                    ? (s->siting->min_fixed_cost ? "fixed cost" : "sites opened")
                                : r->model == SCEN_SITE_P_MEDIAN
                                    ? (d->is_grid ? "person-seconds + penalties" : "persons x cost + penalties")
                                    : "fixed cost + assignment cost + penalties");
        if (d->is_grid) cJSON_AddNumberToObject(sj, "limit_min", d->limit / d->cost_scale / 60.0);
        else if (isfinite(d->limit)) cJSON_AddNumberToObject(sj, "limit", d->limit / d->cost_scale);
        if (r->model == SCEN_SITE_P_MEDIAN || r->model == SCEN_SITE_CAPACITATED)
            cJSON_AddNumberToObject(sj, "penalty_per_person", r->penalty);
        cJSON_AddNumberToObject(sj, "fixed_cost_total", pl->fixed_cost_total);
        cJSON_AddNumberToObject(sj, "sites_existing", (double)d->n_existing);
        cJSON_AddNumberToObject(sj, "sites_candidate_layer", (double)d->n_layer);
        cJSON_AddNumberToObject(sj, "sites_generated", (double)d->n_generated);
        cJSON_AddNumberToObject(sj, "demand_units", (double)p->n_units);
        cJSON_AddNumberToObject(sj, "model_units_before", (double)pl->units_before);
        cJSON_AddNumberToObject(sj, "model_units_after", (double)pl->units_after);
        cJSON_AddNumberToObject(sj, "pairs", (double)p->n_pairs);
        {
            cJSON *b = cJSON_AddObjectToObject(sj, "before");
            cJSON_AddNumberToObject(b, "sites", (double)r->before_sites);
            cJSON_AddNumberToObject(b, "people_covered", r->before_covered);
            cJSON_AddNumberToObject(b, "share", d->total_people > 0 ? r->before_covered / d->total_people : 0);
            b = cJSON_AddObjectToObject(sj, "after");
            cJSON_AddNumberToObject(b, "sites", (double)pl->n_open);
            cJSON_AddNumberToObject(b, "people_covered", pl->served_weight);
            cJSON_AddNumberToObject(b, "share", d->total_people > 0 ? pl->served_weight / d->total_people : 0);
        }
        {
            cJSON *u = cJSON_AddObjectToObject(sj, "unserved_by_reason");
            cJSON_AddNumberToObject(u, "no_site_in_reach", why[LOC_NO_SITE_IN_REACH]);
            cJSON_AddNumberToObject(u, "not_chosen", why[LOC_NOT_CHOSEN]);
            cJSON_AddNumberToObject(u, "sites_full", why[LOC_CAPACITY]);
        }
        if (r->k > 1) {
            cJSON *a = cJSON_AddObjectToObject(sj, "aggregation");
            cJSON_AddNumberToObject(a, "block_cells", r->k);
            cJSON_AddNumberToObject(a, "units_cells", (double)p->n_units);
            cJSON_AddNumberToObject(a, "units_blocks", (double)r->agg_units);
            cJSON_AddNumberToObject(a, "objective_blocks", r->objective_agg);
            cJSON_AddNumberToObject(a, "objective_cells", r->objective_cells);
        }
        if (r->n_curve > 0) {
            cJSON *c = cJSON_AddArrayToObject(sj, "coverage_curve");
            for (int k = 0; k < r->n_curve; k++) {
                cJSON *q = cJSON_CreateObject();
                cJSON_AddNumberToObject(q, "p", r->curve[k].p);
                cJSON_AddNumberToObject(q, "people_covered", r->curve[k].covered);
                cJSON_AddStringToObject(q, "status", solver_status_name(r->curve[k].status));
                cJSON_AddItemToArray(c, q);
            }
        }
        {
            cJSON *f = cJSON_AddObjectToObject(sj, "files");
            cJSON_AddStringToObject(f, "sites", "sites.csv");
            if (d->is_grid) {
                cJSON_AddStringToObject(f, "sites_map", "sites.gpkg");
                cJSON_AddStringToObject(f, "assignment", "assignment.tif");
                cJSON_AddStringToObject(f, "unserved_map", "unserved.tif");
            } else {
                cJSON_AddStringToObject(f, "assignment", "assignment.csv");
            }
            cJSON_AddStringToObject(f, "unserved", "unserved.csv");
            if (r->n_curve > 0) cJSON_AddStringToObject(f, "coverage_curve", "coverage_curve.csv");
        }
    }
done:
    table_free(t);
    free(st);
    free(row_of);
    return rc;
}

void site_print(const scen_t *s, const site_data_t *d, const site_result_t *r)
{
    const struct scen_siting *st = s->siting;
    const loc_problem_t *p = d->prob;
    const loc_result_t *pl = &r->plan;
    site_stat_t *ss = site_stats(d, r);
    double tot = d->total_people, why[4];
    size_t kept = 0, added = 0, closed = 0;
    char lim[64], buf[32];

    if (d->is_grid) snprintf(lim, sizeof lim, "%g min", d->limit / d->cost_scale / 60.0);
    else if (isfinite(d->limit)) snprintf(lim, sizeof lim, "cost %g", d->limit / d->cost_scale);
    else snprintf(lim, sizeof lim, "any cost");
    for (size_t t = 0; t < pl->n_open; t++) {
        if (d->existing[pl->open[t]]) kept++;
        else added++;
    }
    for (size_t i = 0; i < p->n_sites; i++) closed += d->existing[i] && ss && !ss[i].open;
    printf("site selection: %s", site_model_name(r->model));
    if (st->p >= 0) printf(", p = %d", st->p);
    if (isfinite(st->budget)) printf(", budget %g", st->budget);
    printf(", limit %s, existing sites %s\n", lim,
           st->existing == SCEN_EXISTING_KEEP ? "kept open" : "may close");
    printf("sites: %zu existing, %zu candidates%s", d->n_existing, d->n_layer,
           d->is_grid ? " from the layer" : "");
    if (d->n_generated) printf(", %zu generated", d->n_generated);
    printf("; demand units: %zu%s", p->n_units, d->is_grid ? " populated cells" : "");
    if (pl->units_after != pl->units_before && pl->units_after > 0)
        printf(" (%zu in the model after %s)", pl->units_after,
               r->k > 1 ? "aggregation" : "merging identical covering sets");
    printf("\n");
    printf("status: %s; objective %.6g, bound %.6g, gap %.3g%%; solver %.2f s of %.2f s\n",
           solver_status_name(pl->status), pl->objective, pl->bound, 100.0 * pl->gap,
           pl->solver_seconds, pl->seconds);
    if (r->k > 1)
        printf("aggregation %dx%d cells: objective %.6g on %zu blocks, %.6g when the same plan "
               "is evaluated on the %zu cells\n", r->k, r->k, r->objective_agg, r->agg_units,
               r->objective_cells, p->n_units);
    printf("people within %s:\n", lim);
    printf("  before (%zu existing sites)    %12.0f  %5.1f%%\n", r->before_sites, r->before_covered,
           tot > 0 ? 100.0 * r->before_covered / tot : 0.0);
    printf("  after  (%zu kept + %zu new)     %12.0f  %5.1f%%\n", kept, added, pl->served_weight,
           tot > 0 ? 100.0 * pl->served_weight / tot : 0.0);
    if (added > 0) {
        size_t shown = 0;
        printf("new sites:");
        for (size_t t = 0; t < pl->n_open && shown < 20; t++) {
            int i = pl->open[t];
            if (d->existing[i]) continue;
            printf("%s %s (%.0f people)", shown ? "," : "", loc_site_name(p, (size_t)i, buf, sizeof buf),
                   ss ? ss[i].served : 0);
            shown++;
        }
        printf("%s\n", added > shown ? ", ..." : "");
    }
    if (closed > 0) printf("existing sites closed: %zu\n", closed);
    if (ss != NULL) {
        double sv = 0, sc = 0;
        for (size_t i = 0; i < p->n_sites; i++) {
            sv += ss[i].served;
            sc += ss[i].sum_cost;
        }
        if (sv > 0 && d->is_grid)
            printf("mean travel time of the people served: %.1f min\n", sc / sv / 60.0);
        else if (sv > 0)
            printf("mean cost per person served: %.6g\n", sc / sv);
    }
    unserved_by_reason(d, r, why);
    printf("unserved: %.0f people (no site in reach %.0f, sites not chosen %.0f, sites full %.0f)\n",
           pl->unserved_weight, why[LOC_NO_SITE_IN_REACH], why[LOC_NOT_CHOSEN], why[LOC_CAPACITY]);
    if (r->n_curve > 0) {
        printf("coverage curve:");
        for (int k = 0; k < r->n_curve && k < 10; k++)
            printf(" p=%d %.1f%%", r->curve[k].p, tot > 0 ? 100.0 * r->curve[k].covered / tot : 0.0);
        printf("%s\n", r->n_curve > 10 ? " ..." : "");
    }
    free(ss);
}
