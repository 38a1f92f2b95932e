/* location: problem data shared by the site-selection models (see location.h).
 * Pairs are collected in any order, then loc_finish groups them by unit with a
 * counting sort and orders each unit's pairs by cost, which the covering
 * merge, the heuristics and the sorted-distance median formulation all rely on. */
#include "location.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int loc_new(size_t n_units, size_t n_sites, loc_problem_t **out, err_t *e)
{
    loc_problem_t *p = calloc(1, sizeof *p);
    int rc = ERR_OK;

    *out = NULL;
    if (p == NULL) return err_set(e, ERR_NOMEM, "out of memory creating a location problem");
    p->n_units = n_units;
    p->n_sites = n_sites;
    p->weight = malloc((n_units + 1) * sizeof *p->weight);
    p->unit_id = calloc(n_units + 1, sizeof *p->unit_id);
    p->capacity = malloc((n_sites + 1) * sizeof *p->capacity);
    p->fixed_cost = calloc(n_sites + 1, sizeof *p->fixed_cost);
    p->state = calloc(n_sites + 1, sizeof *p->state);
    p->site_id = calloc(n_sites + 1, sizeof *p->site_id);
    if (!p->weight || !p->unit_id || !p->capacity || !p->fixed_cost || !p->state || !p->site_id) {
        rc = err_set(e, ERR_NOMEM, "out of memory creating a problem of %zu units and %zu sites",
                     n_units, n_sites);
        goto done;
    }
    for (size_t j = 0; j < n_units; j++) p->weight[j] = 1.0;
    for (size_t i = 0; i < n_sites; i++) p->capacity[i] = INFINITY;
    *out = p;
    p = NULL;
done:
    loc_free(p);
    return rc;
}

void loc_free(loc_problem_t *p)
{
    if (p == NULL) return;
    if (p->unit_id)
        for (size_t j = 0; j < p->n_units; j++) free(p->unit_id[j]);
    if (p->site_id)
        for (size_t i = 0; i < p->n_sites; i++) free(p->site_id[i]);
    free(p->unit_id);
    free(p->site_id);
    free(p->weight);
    free(p->capacity);
    free(p->fixed_cost);
    free(p->state);
    free(p->pair_unit);
    free(p->pair_site);
    free(p->pair_cost);
    free(p->unit_start);
    free(p);
}

static int set_name(char **slot, const char *id, err_t *e)
{
    char *s = strdup(id);
    if (s == NULL) return err_set(e, ERR_NOMEM, "out of memory copying id '%s'", id);
    free(*slot);
    *slot = s;
    return ERR_OK;
}

int loc_set_unit_id(loc_problem_t *p, size_t unit, const char *id, err_t *e)
{
    if (unit >= p->n_units)
        return err_set(e, ERR_INTERNAL, "unit %zu out of range (%zu units)", unit, p->n_units);
    return set_name(&p->unit_id[unit], id, e);
}

int loc_set_site_id(loc_problem_t *p, size_t site, const char *id, err_t *e)
{
    if (site >= p->n_sites)
        return err_set(e, ERR_INTERNAL, "site %zu out of range (%zu sites)", site, p->n_sites);
    return set_name(&p->site_id[site], id, e);
}

const char *loc_unit_name(const loc_problem_t *p, size_t unit, char *buf, size_t n)
{
    if (unit < p->n_units && p->unit_id[unit] != NULL) return p->unit_id[unit];
    snprintf(buf, n, "#%zu", unit + 1);
    return buf;
}

const char *loc_site_name(const loc_problem_t *p, size_t site, char *buf, size_t n)
{
    if (site < p->n_sites && p->site_id[site] != NULL) return p->site_id[site];
    snprintf(buf, n, "#%zu", site + 1);
    return buf;
}

int loc_add_pair(loc_problem_t *p, size_t unit, size_t site, double cost, err_t *e)
{
    char b1[32], b2[32];

    if (unit >= p->n_units || site >= p->n_sites)
        return err_set(e, ERR_INTERNAL, "cost pair (unit %zu, site %zu) out of range", unit, site);
    if (!isfinite(cost) || cost < 0)
        return err_set(e, ERR_INPUT, "cost from unit '%s' to site '%s' is %g; costs must be "
                       "finite and >= 0", loc_unit_name(p, unit, b1, sizeof b1),
                       loc_site_name(p, site, b2, sizeof b2), cost);
    if (p->n_pairs == p->cap_pairs) {
        size_t cap = p->cap_pairs ? 2 * p->cap_pairs : 1024;
        int *u = realloc(p->pair_unit, cap * sizeof *u);
        if (u != NULL) p->pair_unit = u;
        int *s = realloc(p->pair_site, cap * sizeof *s);
        if (s != NULL) p->pair_site = s;
        double *c = realloc(p->pair_cost, cap * sizeof *c);
        if (c != NULL) p->pair_cost = c;
        if (u == NULL || s == NULL || c == NULL)
            return err_set(e, ERR_NOMEM, "out of memory storing %zu cost pairs", cap);
        p->cap_pairs = cap;
    }
    p->pair_unit[p->n_pairs] = (int)unit;
    p->pair_site[p->n_pairs] = (int)site;
    p->pair_cost[p->n_pairs] = cost;
    p->n_pairs++;
    p->finished = 0;
    return ERR_OK;
}

typedef struct pair_sort {
    double cost;
    int site;
} pair_sort_t;

static int cmp_pair(const void *a, const void *b)
{
    const pair_sort_t *x = a, *y = b;
    if (x->cost != y->cost) return x->cost < y->cost ? -1 : 1;
    return (x->site > y->site) - (x->site < y->site);
}

int loc_finish(loc_problem_t *p, err_t *e)
{
    char b[32];
    size_t *start = NULL, *fill = NULL;
    pair_sort_t *tmp = NULL;
    int *unit = NULL;
    size_t *seen = NULL;   /* seen[site] = unit + 1 when that site already has a pair */
    int rc = ERR_OK;

    for (size_t j = 0; j < p->n_units; j++)
        if (!isfinite(p->weight[j]) || p->weight[j] < 0)
            return err_set(e, ERR_INPUT, "weight of unit '%s' is %g; weights must be finite "
                           "persons >= 0", loc_unit_name(p, j, b, sizeof b), p->weight[j]);
    for (size_t i = 0; i < p->n_sites; i++) {
        if (isnan(p->capacity[i]) || p->capacity[i] < 0)
            return err_set(e, ERR_INPUT, "capacity of site '%s' is %g; capacities must be >= 0",
                           loc_site_name(p, i, b, sizeof b), p->capacity[i]);
        if (!isfinite(p->fixed_cost[i]) || p->fixed_cost[i] < 0)
            return err_set(e, ERR_INPUT, "fixed cost of site '%s' is %g; it must be finite and "
                           ">= 0", loc_site_name(p, i, b, sizeof b), p->fixed_cost[i]);
        if (p->state[i] < LOC_CANDIDATE || p->state[i] > LOC_MAY_CLOSE)
            return err_set(e, ERR_INPUT, "site '%s' has an unknown state %d",
                           loc_site_name(p, i, b, sizeof b), p->state[i]);
    }
    start = calloc(p->n_units + 1, sizeof *start);
    fill = calloc(p->n_units + 1, sizeof *fill);
    tmp = malloc((p->n_pairs + 1) * sizeof *tmp);
    unit = malloc((p->n_pairs + 1) * sizeof *unit);
    seen = calloc(p->n_sites + 1, sizeof *seen);
    if (!start || !fill || !tmp || !unit || !seen) {
        rc = err_set(e, ERR_NOMEM, "out of memory sorting %zu cost pairs", p->n_pairs);
        goto done;
    }
    for (size_t k = 0; k < p->n_pairs; k++) start[p->pair_unit[k] + 1]++;
    for (size_t j = 0; j < p->n_units; j++) start[j + 1] += start[j];
    for (size_t k = 0; k < p->n_pairs; k++) {
        size_t at = start[p->pair_unit[k]] + fill[p->pair_unit[k]]++;
        tmp[at].cost = p->pair_cost[k];
        tmp[at].site = p->pair_site[k];
    }
    /* Sort each unit's pairs and drop repeated sites, keeping the smaller cost. */
    size_t w = 0;
    for (size_t j = 0; j < p->n_units; j++) {
        size_t a = start[j], z = start[j + 1], first = w;
        qsort(tmp + a, z - a, sizeof *tmp, cmp_pair);
        for (size_t k = a; k < z; k++) {
            if (seen[tmp[k].site] == j + 1) continue;
            seen[tmp[k].site] = j + 1;
            p->pair_site[w] = tmp[k].site;
            p->pair_cost[w] = tmp[k].cost;
            unit[w] = (int)j;
            w++;
        }
        start[j] = first;
    }
    start[p->n_units] = w;
    for (size_t k = 0; k < w; k++) p->pair_unit[k] = unit[k];
    p->n_pairs = w;
    free(p->unit_start);
    p->unit_start = start;
    start = NULL;
    p->finished = 1;
done:
    free(start);
    free(fill);
    free(tmp);
    free(unit);
    free(seen);
    return rc;
}

void loc_opts_default(loc_opts_t *o)
{
    memset(o, 0, sizeof *o);
    solver_opts_default(&o->solver);
    /* Median rows are >= with costs >= 0, so the all-slack basis is dual
     * feasible: the dual simplex was 3-6x faster on the root LP of the
     * OR-Library p-median models (docs/models.md). */
    o->solver.lp_dual = 1;
    o->p = -1;
    o->budget = INFINITY;
    o->limit = INFINITY;
    o->share = 1.0;
    o->penalty = 0;
    o->min_fixed_cost = 0;
    o->single_source = 0;
    o->per_unit_cost = 1;
    o->heuristic = 1;
    o->merge = 1;
    o->reduce = 1;
}

void loc_result_destroy(loc_result_t *r)
{
    if (r == NULL) return;
    free(r->open);
    free(r->assign);
    free(r->served);
    free(r->why);
    r->open = NULL;
    r->assign = NULL;
    r->served = NULL;
    r->why = NULL;
    r->n_open = 0;
}

int loc_check_p(const loc_problem_t *p, int count, err_t *e)
{
    size_t cand = 0;
    for (size_t i = 0; i < p->n_sites; i++) cand += p->state[i] != LOC_FIXED_OPEN;
    if (p->n_sites == 0)
        return err_set(e, ERR_INPUT, "there are no candidate sites; add rows to the site table");
    if (count >= 0 && (size_t)count > cand)
        return err_set(e, ERR_INPUT, "p = %d is larger than the %zu candidate sites that may be "
                       "opened; lower p or add candidates", count, cand);
    return ERR_OK;
}

int loc_plan_nearest(const loc_problem_t *p, const unsigned char *is_open, double limit,
                     loc_result_t *r, err_t *e)
{
    size_t n = 0;

    free(r->open);
    free(r->assign);
    free(r->served);
    free(r->why);
    r->open = malloc((p->n_sites + 1) * sizeof *r->open);
    r->assign = malloc((p->n_units + 1) * sizeof *r->assign);
    r->served = calloc(p->n_units + 1, sizeof *r->served);
    r->why = calloc(p->n_units + 1, sizeof *r->why);
    if (!r->open || !r->assign || !r->served || !r->why)
        return err_set(e, ERR_NOMEM, "out of memory writing a plan for %zu units", p->n_units);
    r->fixed_cost_total = 0;
    for (size_t i = 0; i < p->n_sites; i++)
        if (is_open[i]) {
            r->open[n++] = (int)i;
            r->fixed_cost_total += p->fixed_cost[i];
        }
    r->n_open = n;
    r->total_weight = r->served_weight = r->unserved_weight = 0;
    for (size_t j = 0; j < p->n_units; j++) {
        int any = 0;
        r->assign[j] = -1;
        r->why[j] = LOC_NO_SITE_IN_REACH;
        for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++) {
            if (p->pair_cost[k] > limit) break;
            any = 1;
            if (is_open[p->pair_site[k]]) {
                r->assign[j] = p->pair_site[k];
                r->why[j] = LOC_SERVED;
                r->served[j] = p->weight[j];
                break;
            }
        }
        if (r->assign[j] < 0 && any) r->why[j] = LOC_NOT_CHOSEN;
        r->total_weight += p->weight[j];
        r->served_weight += r->served[j];
    }
    r->unserved_weight = r->total_weight - r->served_weight;
    return ERR_OK;
}

static int cmp_sig(const void *a, const void *b)
{
    const loc_sig_t *x = a, *y = b;
    if (x->n != y->n) return x->n < y->n ? -1 : 1;
    for (size_t k = 0; k < x->n; k++)
        if (x->s[k] != y->s[k]) return x->s[k] < y->s[k] ? -1 : 1;
    return (x->unit > y->unit) - (x->unit < y->unit);
}

size_t loc_merge_sigs(loc_sig_t *us, size_t nu, int merge, const double *weight, double *w,
                      size_t *start, int *out_sig)
{
    size_t n = 0, ns = 0;

    if (merge) qsort(us, nu, sizeof *us, cmp_sig);
    for (size_t q = 0; q < nu; q++) {
        int same = merge && q > 0 && us[q].n == us[q - 1].n &&
                   memcmp(us[q].s, us[q - 1].s, us[q].n * sizeof *us[q].s) == 0;
        if (same) {
            w[n - 1] += weight[us[q].unit];
            continue;
        }
        start[n] = ns;
        memcpy(out_sig + ns, us[q].s, us[q].n * sizeof *out_sig);
        ns += us[q].n;
        w[n++] = weight[us[q].unit];
    }
    start[n] = ns;
    return n;
}
