/* cover: maximal and set covering (see cover.h).
 * Units are first reduced to groups: a unit's covering set is the sorted list of
 * sites within the limit; units covered by a fixed-open site are covered whatever
 * the plan, units with an empty set can never be, and units with equal sets are
 * merged by sorting (weights summed). The MIP has one y per site and one u per
 * group: u_g <= sum_{i in S_g} y_i. Merging is exact because the model depends
 * on a unit only through its set. */
#include "cover.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "heuristic.h"

static double now_s(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

typedef struct groups {
    size_t n;           /* groups in the model */
    size_t *start;      /* n + 1 offsets into site */
    int *site;          /* covering sites of each group, ascending */
    double *w;          /* persons per group */
    double fixed_covered;   /* persons covered by fixed-open sites */
    double uncoverable;     /* persons no site can cover */
    double total;           /* all persons */
    size_t units_in;        /* units entering the model before merging */
} groups_t;

static void groups_destroy(groups_t *g)
{
    free(g->start);
    free(g->site);
    free(g->w);
}

/* Per-unit covering set, sorted by site, for the sort comparator. */
static int cmp_int(const void *a, const void *b)
{
    int x = *(const int *)a, y = *(const int *)b;
    return (x > y) - (x < y);
}

static int groups_build(const loc_problem_t *p, double limit, int merge, groups_t *g, err_t *e)
{
    int *sets = NULL;
    loc_sig_t *us = NULL;
    size_t nu = 0, ns = 0;
    int rc = ERR_OK;

    memset(g, 0, sizeof *g);
    sets = malloc((p->n_pairs + 1) * sizeof *sets);
    us = malloc((p->n_units + 1) * sizeof *us);
    g->start = malloc((p->n_units + 1) * sizeof *g->start);
    g->w = malloc((p->n_units + 1) * sizeof *g->w);
    g->site = malloc((p->n_pairs + 1) * sizeof *g->site);
    if (!sets || !us || !g->start || !g->w || !g->site) {
        rc = err_set(e, ERR_NOMEM, "covering: out of memory grouping %zu units", p->n_units);
        goto done;
    }
    for (size_t j = 0; j < p->n_units; j++) {
        size_t a = ns;
        int fixed = 0;
        g->total += p->weight[j];
        for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++) {
            if (p->pair_cost[k] > limit) break;
            if (p->state[p->pair_site[k]] == LOC_FIXED_OPEN) fixed = 1;
            sets[ns++] = p->pair_site[k];
        }
        if (fixed) {
            g->fixed_covered += p->weight[j];
            ns = a;
        } else if (ns == a) {
            g->uncoverable += p->weight[j];
        } else if (p->weight[j] <= 0) {
            ns = a;
        } else {
            qsort(sets + a, ns - a, sizeof *sets, cmp_int);
            us[nu].s = sets + a;
            us[nu].n = ns - a;
            us[nu].unit = j;
            nu++;
        }
    }
    g->units_in = nu;
    g->n = loc_merge_sigs(us, nu, merge, p->weight, g->w, g->start, g->site);
done:
    free(sets);
    free(us);
    if (rc != ERR_OK) groups_destroy(g);
    return rc;
}

/* Build and solve. kind 0: max cover; 1: set cover. 'start_open' (may be NULL) is
 * a feasible plan to offer. Fills is_open with the plan when there is one. */
static int solve_groups(const loc_problem_t *p, const loc_opts_t *o, const groups_t *g, int kind,
                        const unsigned char *start_open, unsigned char *is_open,
                        loc_result_t *r, int *have_plan, err_t *e)
{
    solver_mip_t *m = NULL;
    solver_result_t sr;
    int *idx = NULL, first_y, first_u = 0;
    double *val = NULL, *obj = NULL, *start = NULL;
    int rc;
    double target = 0;

    memset(&sr, 0, sizeof sr);
    *have_plan = 0;
    idx = malloc((p->n_sites + 2) * sizeof *idx);
    val = malloc((p->n_sites + 2) * sizeof *val);
    obj = malloc((p->n_sites + g->n + 1) * sizeof *obj);
    if (!idx || !val || !obj) {
        rc = err_set(e, ERR_NOMEM, "covering: out of memory building the model");
        goto done;
    }
    if ((rc = solver_mip_new(kind == 0 ? "maximal covering" : "set covering",
                             kind == 0 ? SOLVER_MAX : SOLVER_MIN, &m, e)))
        goto done;
    for (size_t i = 0; i < p->n_sites; i++)
        obj[i] = kind == 0 ? 0.0 : o->min_fixed_cost ? p->fixed_cost[i] : 1.0;
    if ((rc = solver_add_cols(m, p->n_sites, SOLVER_BINARY, 0, 1, obj, &first_y, e))) goto done;
    /* Fixed-open sites: their groups were removed; keep y at 0 so they do not
     * count against p, budget or the set-cover objective. */
    for (size_t i = 0; i < p->n_sites; i++)
        if (p->state[i] == LOC_FIXED_OPEN && (rc = solver_set_col_bounds(m, first_y + (int)i, 0, 0, e)))
            goto done;
    target = o->share * (g->total - g->uncoverable) - g->fixed_covered;
    int need_u = kind == 0 || o->share < 1.0;
    if (need_u && g->n > 0) {
        for (size_t q = 0; q < g->n; q++) obj[q] = kind == 0 ? g->w[q] : 0.0;
        if ((rc = solver_add_cols(m, g->n, SOLVER_CONTINUOUS, 0, 1, obj, &first_u, e))) goto done;
    }
    for (size_t q = 0; q < g->n; q++) {
        size_t nnz = 0;
        for (size_t k = g->start[q]; k < g->start[q + 1]; k++) {
            idx[nnz] = first_y + g->site[k];
            val[nnz++] = 1.0;
        }
        r->n_nonzeros += nnz;
        if (need_u) {
            idx[nnz] = first_u + (int)q;
            val[nnz++] = -1.0;
            rc = solver_add_row(m, nnz, idx, val, 0.0, INFINITY, NULL, e);
        } else {
            rc = solver_add_row(m, nnz, idx, val, 1.0, INFINITY, NULL, e);
        }
        if (rc) goto done;
        r->n_rows++;
    }
    if (kind == 1 && need_u && target > 0) {
        /* Covered persons of the groups reach the target share. */
        int *ui = malloc((g->n + 1) * sizeof *ui);
        if (ui == NULL) {
            rc = err_set(e, ERR_NOMEM, "covering: out of memory building the model");
            goto done;
        }
        for (size_t q = 0; q < g->n; q++) ui[q] = first_u + (int)q;
        rc = solver_add_row(m, g->n, ui, g->w, target * (1 - 1e-12), INFINITY, NULL, e);
        free(ui);
        if (rc) goto done;
        r->n_rows++;
    }
    if (kind == 0 && (o->p >= 0 || isfinite(o->budget))) {
        size_t nnz = 0;
        for (size_t i = 0; i < p->n_sites; i++)
            if (p->state[i] != LOC_FIXED_OPEN) idx[nnz++] = first_y + (int)i;
        for (size_t k = 0; k < nnz; k++) val[k] = 1.0;
        if (o->p >= 0 && (rc = solver_add_row(m, nnz, idx, val, -INFINITY, o->p, NULL, e)))
            goto done;
        for (size_t k = 0; k < nnz; k++) val[k] = p->fixed_cost[idx[k] - first_y];
        if (isfinite(o->budget) &&
            (rc = solver_add_row(m, nnz, idx, val, -INFINITY, o->budget, NULL, e)))
            goto done;
    }
    r->n_cols = p->n_sites + (need_u ? g->n : 0);
    if (start_open != NULL) {
        start = calloc(r->n_cols + 1, sizeof *start);
        if (start == NULL) {
            rc = err_set(e, ERR_NOMEM, "covering: out of memory for the start plan");
            goto done;
        }
        for (size_t i = 0; i < p->n_sites; i++)
            start[first_y + (int)i] = start_open[i] && p->state[i] != LOC_FIXED_OPEN;
        for (size_t q = 0; need_u && q < g->n; q++)
            for (size_t k = g->start[q]; k < g->start[q + 1]; k++)
                if (start_open[g->site[k]]) start[first_u + (int)q] = 1.0;
    }
    if ((rc = solver_solve(m, &o->solver, start, &sr, e))) goto done;
    r->status = sr.status;
    r->objective = sr.objective + (kind == 0 ? g->fixed_covered : 0);
    r->bound = sr.bound + (kind == 0 ? g->fixed_covered : 0);
    r->gap = sr.gap;
    r->nodes = sr.nodes;
    r->solver_seconds += sr.seconds;
    if (sr.x != NULL) {
        for (size_t i = 0; i < p->n_sites; i++)
            is_open[i] = p->state[i] == LOC_FIXED_OPEN || sr.x[first_y + (int)i] > 0.5;
        *have_plan = 1;
    }
done:
    solver_result_destroy(&sr);
    solver_mip_free(m);
    free(idx);
    free(val);
    free(obj);
    free(start);
    return rc;
}

/* Greedy for set covering: add the site with the most new persons (per unit of
 * fixed cost when minimising cost) until the target is met. Each round scans
 * the uncovered groups once, so it costs time in proportion to their set sizes. */
static int greedy_set(const loc_problem_t *p, const loc_opts_t *o, const groups_t *g,
                      unsigned char *is_open, unsigned char *gcov, err_t *e)
{
    double target = o->share * (g->total - g->uncoverable) - g->fixed_covered, got = 0;
    double *gain = malloc((p->n_sites + 1) * sizeof *gain);
    if (gain == NULL) return err_set(e, ERR_NOMEM, "covering: out of memory in the greedy start");
    for (size_t q = 0; q < g->n; q++) gcov[q] = 0;
    while (got < target * (1 - 1e-12)) {
        int best = -1;
        double best_s = 0;
        memset(gain, 0, p->n_sites * sizeof *gain);
        for (size_t q = 0; q < g->n; q++)
            if (!gcov[q])
                for (size_t k = g->start[q]; k < g->start[q + 1]; k++) gain[g->site[k]] += g->w[q];
        for (size_t i = 0; i < p->n_sites; i++) {
            if (is_open[i] || gain[i] <= 0) continue;
            double s = gain[i];
            if (o->min_fixed_cost) s = p->fixed_cost[i] > 0 ? s / p->fixed_cost[i] : INFINITY;
            if (s > best_s) {
                best_s = s;
                best = (int)i;
            }
        }
        if (best < 0) break;
        is_open[best] = 1;
        for (size_t q = 0; q < g->n; q++) {
            if (gcov[q]) continue;
            for (size_t k = g->start[q]; k < g->start[q + 1]; k++)
                if (g->site[k] == best) {
                    gcov[q] = 1;
                    got += g->w[q];
                    break;
                }
        }
    }
    free(gain);
    return ERR_OK;
}

static int cover_run(const loc_problem_t *p, const loc_opts_t *o, int kind, loc_result_t *r,
                     err_t *e)
{
    double t0 = now_s();
    groups_t g;
    unsigned char *is_open = NULL, *start = NULL, *gcov = NULL;
    int rc, have = 0;

    memset(r, 0, sizeof *r);
    r->heuristic_objective = r->lagrange_bound = NAN;
    if (!p->finished)
        return err_set(e, ERR_INTERNAL, "covering: problem data not finished (call loc_finish)");
    if (!(o->limit >= 0))
        return err_set(e, ERR_INPUT, "covering: the coverage limit must be >= 0 (got %g)", o->limit);
    if ((rc = loc_check_p(p, o->p, e)) != ERR_OK) return rc;
    if (kind == 0 && o->p < 0 && !isfinite(o->budget))
        return err_set(e, ERR_INPUT, "maximal covering needs p or a budget; set one of them");
    if (kind == 1 && !(o->share > 0 && o->share <= 1))
        return err_set(e, ERR_INPUT, "set covering: target share %g must be in (0, 1]", o->share);
    if ((rc = groups_build(p, o->limit, o->merge, &g, e)) != ERR_OK) return rc;
    r->units_before = g.units_in;
    r->units_after = g.n;
    is_open = calloc(p->n_sites + 1, 1);
    start = calloc(p->n_sites + 1, 1);
    gcov = calloc(g.n + 1, 1);
    if (!is_open || !start || !gcov) {
        rc = err_set(e, ERR_NOMEM, "covering: out of memory for %zu sites", p->n_sites);
        goto done;
    }
    if (o->heuristic) {
        double v;
        if (kind == 0) {
            if ((rc = heuristic_cover(p, o->limit, o->p, o->budget, start, &v, e))) goto done;
            r->heuristic_objective = v;
        } else {
            if ((rc = greedy_set(p, o, &g, start, gcov, e))) goto done;
            v = 0;
            for (size_t i = 0; i < p->n_sites; i++)
                if (start[i] && p->state[i] != LOC_FIXED_OPEN)
                    v += o->min_fixed_cost ? p->fixed_cost[i] : 1.0;
            r->heuristic_objective = v;
        }
    }
    rc = solve_groups(p, o, &g, kind, o->heuristic ? start : NULL, is_open, r, &have, e);
    if (rc != ERR_OK) goto done;
    if (!have && o->heuristic && r->status == SOLVER_NO_PLAN) {
        /* Stopped before GLPK held a plan: hand back the heuristic plan with the
         * best bound known (all coverable persons, or no sites, when none). */
        double trivial = kind == 0 ? g.total - g.uncoverable : 0.0;
        memcpy(is_open, start, p->n_sites);
        for (size_t i = 0; i < p->n_sites; i++)
            if (p->state[i] == LOC_FIXED_OPEN) is_open[i] = 1;
        r->status = SOLVER_FEASIBLE;
        r->objective = r->heuristic_objective;
        if (!isfinite(r->bound)) r->bound = trivial;
        r->bound = kind == 0 ? fmax(r->bound, r->objective) : fmin(r->bound, r->objective);
        have = 1;
    }
    if (have && (rc = loc_plan_nearest(p, is_open, o->limit, r, e))) goto done;
    if (have) {
        /* Fixed cost of the plan excludes nothing: it is what the open sites cost. */
        r->gap = fabs(r->objective - r->bound) / fmax(fabs(r->objective), 1e-9);
    }
done:
    r->seconds = now_s() - t0;
    groups_destroy(&g);
    free(is_open);
    free(start);
    free(gcov);
    return rc;
}

int cover_max(const loc_problem_t *p, const loc_opts_t *o, loc_result_t *r, err_t *e)
{
    return cover_run(p, o, 0, r, e);
}

int cover_set(const loc_problem_t *p, const loc_opts_t *o, loc_result_t *r, err_t *e)
{
    return cover_run(p, o, 1, r, e);
}

int cover_curve(const loc_problem_t *p, const loc_opts_t *o, int p_max, cover_point_t **out,
                err_t *e)
{
    cover_point_t *pts = NULL;
    groups_t g;
    unsigned char *is_open = NULL, *start = NULL;
    loc_opts_t q = *o;
    loc_result_t r;
    int rc;

    *out = NULL;
    if (!p->finished)
        return err_set(e, ERR_INTERNAL, "covering: problem data not finished (call loc_finish)");
    if (p_max < 1) return err_set(e, ERR_INPUT, "coverage curve: P must be >= 1 (got %d)", p_max);
    if ((rc = loc_check_p(p, p_max, e)) != ERR_OK) return rc;
    if ((rc = groups_build(p, o->limit, o->merge, &g, e)) != ERR_OK) return rc;
    pts = calloc((size_t)p_max, sizeof *pts);
    is_open = calloc(p->n_sites + 1, 1);
    start = calloc(p->n_sites + 1, 1);
    if (!pts || !is_open || !start) {
        rc = err_set(e, ERR_NOMEM, "coverage curve: out of memory for %d points", p_max);
        goto done;
    }
    q.budget = INFINITY;
    for (int k = 1; k <= p_max; k++) {
        double t0 = now_s(), v;
        int have = 0;
        q.p = k;
        /* Warm start: the previous optimal plan plus the best greedy addition,
         * then swaps; always feasible for k sites. */
        memcpy(start, is_open, p->n_sites);
        if ((rc = heuristic_cover(p, q.limit, k, INFINITY, start, &v, e))) goto done;
        memset(&r, 0, sizeof r);
        rc = solve_groups(p, &q, &g, 0, start, is_open, &r, &have, e);
        if (rc != ERR_OK) goto done;
        if (!have) memcpy(is_open, start, p->n_sites);
        pts[k - 1].p = k;
        pts[k - 1].covered = have ? r.objective : v;
        pts[k - 1].bound = r.bound;
        pts[k - 1].status = r.status;
        pts[k - 1].seconds = now_s() - t0;
    }
    *out = pts;
    pts = NULL;
done:
    groups_destroy(&g);
    free(pts);
    free(is_open);
    free(start);
    return rc;
}
