/* robust: maximal covering over several scenarios (see robust.h).
 * Each unit's covering sets, one per scenario, form its signature: the sets in
 * scenario order, sites ascending, each closed by -1. Units with equal signatures
 * are merged (weights summed); exact because the model sees a unit only through
 * its signature. The MIP has one y per site, one u per (group, scenario) with a
 * non-empty set, u_qv <= sum_{i in S_qv} y_i, u_qv <= 1, and
 *   worst:    max z, z <= sum_q w_q u_qv for every scenario v;
 *   expected: max sum_v c_v sum_q w_q u_qv  (c_v the scenario weight).
 * Fixed-open sites have y fixed at 1 and count against neither p nor budget. */
#include "robust.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

static double now_s(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

int robust_new(size_t n_units, size_t n_sites, size_t n_scen, robust_problem_t **out, err_t *e)
{
    robust_problem_t *p;

    *out = NULL;
    if (n_scen < 1)
        return err_set(e, ERR_INPUT, "robust siting: needs at least one scenario (got 0)");
    p = calloc(1, sizeof *p);
    if (p == NULL) return err_set(e, ERR_NOMEM, "robust siting: out of memory");
    p->n_units = n_units;
    p->n_sites = n_sites;
    p->n_scen = n_scen;
    p->weight = malloc((n_units + 1) * sizeof *p->weight);
    p->state = calloc(n_sites + 1, sizeof *p->state);
    p->fixed_cost = calloc(n_sites + 1, sizeof *p->fixed_cost);
    p->scen_weight = malloc(n_scen * sizeof *p->scen_weight);
    if (!p->weight || !p->state || !p->fixed_cost || !p->scen_weight) {
        robust_free(p);
        return err_set(e, ERR_NOMEM, "robust siting: out of memory for %zu units, %zu sites",
                       n_units, n_sites);
    }
    for (size_t j = 0; j < n_units; j++) p->weight[j] = 1.0;
    for (size_t v = 0; v < n_scen; v++) p->scen_weight[v] = 1.0;
    *out = p;
    return ERR_OK;
}

void robust_free(robust_problem_t *p)
{
    if (p == NULL) return;
    free(p->weight);
    free(p->state);
    free(p->fixed_cost);
    free(p->scen_weight);
    free(p->pair_scen);
    free(p->pair_unit);
    free(p->pair_site);
    free(p);
}

int robust_add_cover(robust_problem_t *p, size_t scen, size_t unit, size_t site, err_t *e)
{
    if (scen >= p->n_scen || unit >= p->n_units || site >= p->n_sites)
        return err_set(e, ERR_INTERNAL, "robust siting: pair (scenario %zu, unit %zu, site %zu) "
                       "out of range", scen, unit, site);
    if (p->n_pairs == p->cap_pairs) {
        size_t cap = p->cap_pairs ? 2 * p->cap_pairs : 64;
        int *a = realloc(p->pair_scen, cap * sizeof *a);
        if (a) p->pair_scen = a;
        int *b = realloc(p->pair_unit, cap * sizeof *b);
        if (b) p->pair_unit = b;
        int *c = realloc(p->pair_site, cap * sizeof *c);
        if (c) p->pair_site = c;
        if (!a || !b || !c)
            return err_set(e, ERR_NOMEM, "robust siting: out of memory for %zu pairs", cap);
        p->cap_pairs = cap;
    }
    p->pair_scen[p->n_pairs] = (int)scen;
    p->pair_unit[p->n_pairs] = (int)unit;
    p->pair_site[p->n_pairs] = (int)site;
    p->n_pairs++;
    return ERR_OK;
}

void robust_opts_default(robust_opts_t *o)
{
    memset(o, 0, sizeof *o);
    solver_opts_default(&o->solver);
    o->objective = ROBUST_WORST;
    o->p = -1;
    o->budget = INFINITY;
    o->heuristic = 1;
    o->merge = 1;
    /* As for the other covering models (location.c): the all-slack basis is
     * dual feasible, so the root LP goes much faster by the dual simplex. */
    o->solver.lp_dual = 1;
}

void robust_result_destroy(robust_result_t *r)
{
    if (r == NULL) return;
    free(r->open);
    free(r->covered);
    r->open = NULL;
    r->covered = NULL;
}

/* Groups: signature of group q is sig[start[q] .. start[q+1]), n_scen runs each
 * closed by -1; w[q] persons. */
typedef struct groups {
    size_t n, n_scen;
    size_t *start;
    int *sig;
    double *w;
    size_t units_in;
} groups_t;

static void groups_destroy(groups_t *g)
{
    free(g->start);
    free(g->sig);
    free(g->w);
}

typedef struct triple {
    int unit, scen, site;
} triple_t;

static int cmp_triple(const void *a, const void *b)
{
    const triple_t *x = a, *y = b;
    if (x->unit != y->unit) return x->unit < y->unit ? -1 : 1;
    if (x->scen != y->scen) return x->scen < y->scen ? -1 : 1;
    return (x->site > y->site) - (x->site < y->site);
}

static int groups_build(const robust_problem_t *p, int merge, groups_t *g, err_t *e)
{
    triple_t *t = NULL;
    int *sig = NULL;
    loc_sig_t *us = NULL;
    size_t nt = 0, ns = 0, nu = 0, k = 0;
    /* Each unit with pairs writes its pairs plus n_scen separators. */
    size_t sig_cap = p->n_pairs + p->n_units * p->n_scen + 1;
    int rc = ERR_OK;

    memset(g, 0, sizeof *g);
    g->n_scen = p->n_scen;
    t = malloc((p->n_pairs + 1) * sizeof *t);
    sig = malloc(sig_cap * sizeof *sig);
    us = malloc((p->n_units + 1) * sizeof *us);
    g->start = malloc((p->n_units + 1) * sizeof *g->start);
    g->w = malloc((p->n_units + 1) * sizeof *g->w);
    g->sig = malloc(sig_cap * sizeof *g->sig);
    if (!t || !sig || !us || !g->start || !g->w || !g->sig) {
        rc = err_set(e, ERR_NOMEM, "robust siting: out of memory grouping %zu units", p->n_units);
        goto done;
    }
    for (size_t q = 0; q < p->n_pairs; q++) {
        t[q].unit = p->pair_unit[q];
        t[q].scen = p->pair_scen[q];
        t[q].site = p->pair_site[q];
    }
    nt = p->n_pairs;
    qsort(t, nt, sizeof *t, cmp_triple);
    while (k < nt) {
        size_t unit = (size_t)t[k].unit, a = ns;
        for (size_t v = 0; v < p->n_scen; v++) {
            int last = -1;
            while (k < nt && (size_t)t[k].unit == unit && (size_t)t[k].scen == v) {
                if (t[k].site != last) sig[ns++] = last = t[k].site;
                k++;
            }
            sig[ns++] = -1;
        }
        if (p->weight[unit] <= 0) {
            ns = a;
            continue;
        }
        us[nu].s = sig + a;
        us[nu].n = ns - a;
        us[nu].unit = unit;
        nu++;
    }
    g->units_in = nu;
    g->n = loc_merge_sigs(us, nu, merge, p->weight, g->w, g->start, g->sig);
done:
    free(t);
    free(sig);
    free(us);
    if (rc != ERR_OK) groups_destroy(g);
    return rc;
}

/* Persons covered per scenario by the plan, over the groups. */
static void groups_eval(const groups_t *g, const unsigned char *is_open, double *cov)
{
    for (size_t v = 0; v < g->n_scen; v++) cov[v] = 0;
    for (size_t q = 0; q < g->n; q++) {
        size_t v = 0;
        int hit = 0;
        for (size_t k = g->start[q]; k < g->start[q + 1]; k++) {
            if (g->sig[k] < 0) {
                if (hit) cov[v] += g->w[q];
                v++;
                hit = 0;
            } else if (is_open[g->sig[k]]) {
                hit = 1;
            }
        }
    }
}

static double objective_of(const robust_problem_t *p, int objective, const double *cov)
{
    double z = objective == ROBUST_WORST ? INFINITY : 0.0;
    for (size_t v = 0; v < p->n_scen; v++) {
        if (objective == ROBUST_WORST) z = fmin(z, cov[v]);
        else z += p->scen_weight[v] * cov[v];
    }
    return z;
}

/* Greedy: from the fixed-open sites, add the site that raises the objective most
 * (ties: the larger plain sum over scenarios, then the lower index) while p and
 * the budget allow and some scenario gains. The sum tie-break matters for the
 * worst case, where one site alone often leaves the worst scenario unchanged.
 * An index site -> (group, scenario) entries makes each round one pass over the
 * pairs instead of one evaluation of every group per candidate. */
static int greedy(const robust_problem_t *p, const robust_opts_t *o, const groups_t *g,
                  unsigned char *is_open, double *value, err_t *e)
{
    size_t nv = p->n_scen, n_ent = 0;
    size_t *first = calloc(p->n_sites + 2, sizeof *first), *fill = NULL;
    size_t *ent = NULL;                       /* q * nv + v, grouped by site */
    unsigned char *done = calloc(g->n * nv + 1, 1);   /* (group, scenario) covered */
    double *cov = calloc(nv + 1, sizeof *cov), *gain = calloc(nv + 1, sizeof *gain);
    double spent = 0, cur_obj, cur_sum = 0;
    int count = 0, rc = ERR_OK;

    if (!first || !done || !cov || !gain) goto nomem;
    for (size_t q = 0; q < g->n; q++)
        for (size_t k = g->start[q]; k < g->start[q + 1]; k++)
            if (g->sig[k] >= 0) {
                first[g->sig[k] + 1]++;
                n_ent++;
            }
    for (size_t i = 0; i < p->n_sites; i++) first[i + 1] += first[i];
    ent = malloc((n_ent + 1) * sizeof *ent);
    fill = malloc((p->n_sites + 1) * sizeof *fill);
    if (!ent || !fill) goto nomem;
    memcpy(fill, first, p->n_sites * sizeof *fill);
    for (size_t q = 0; q < g->n; q++) {
        size_t v = 0;
        for (size_t k = g->start[q]; k < g->start[q + 1]; k++) {
            if (g->sig[k] < 0) v++;
            else ent[fill[g->sig[k]]++] = q * nv + v;
        }
    }
    for (size_t i = 0; i < p->n_sites; i++) {
        is_open[i] = p->state[i] == LOC_FIXED_OPEN;
        if (!is_open[i]) continue;
        for (size_t k = first[i]; k < first[i + 1]; k++)
            if (!done[ent[k]]) {
                done[ent[k]] = 1;
                cov[ent[k] % nv] += g->w[ent[k] / nv];
            }
    }
    cur_obj = objective_of(p, o->objective, cov);
    for (size_t v = 0; v < nv; v++) cur_sum += cov[v];
    while (o->p < 0 || count < o->p) {
        int best = -1;
        double best_obj = cur_obj, best_sum = cur_sum;
        for (size_t i = 0; i < p->n_sites; i++) {
            if (is_open[i]) continue;
            if (isfinite(o->budget) && spent + p->fixed_cost[i] > o->budget * (1 + 1e-12)) continue;
            double s = 0, z;
            for (size_t v = 0; v < nv; v++) gain[v] = cov[v];
            for (size_t k = first[i]; k < first[i + 1]; k++)
                if (!done[ent[k]]) gain[ent[k] % nv] += g->w[ent[k] / nv];
            z = objective_of(p, o->objective, gain);
            for (size_t v = 0; v < nv; v++) s += gain[v];
            if (z > best_obj + 1e-9 || (z >= best_obj - 1e-9 && s > best_sum + 1e-9)) {
                best = (int)i;
                best_obj = z;
                best_sum = s;
            }
        }
        if (best < 0) break;
        is_open[best] = 1;
        spent += p->fixed_cost[best];
        count++;
        for (size_t k = first[best]; k < first[best + 1]; k++)
            if (!done[ent[k]]) {
                done[ent[k]] = 1;
                cov[ent[k] % nv] += g->w[ent[k] / nv];
            }
        cur_obj = objective_of(p, o->objective, cov);
        cur_sum = 0;
        for (size_t v = 0; v < nv; v++) cur_sum += cov[v];
    }
    *value = cur_obj;
    goto out;
nomem:
    rc = err_set(e, ERR_NOMEM, "robust siting: out of memory in the greedy start");
out:
    free(first);
    free(fill);
    free(ent);
    free(done);
    free(cov);
    free(gain);
    return rc;
}

static int check_problem(const robust_problem_t *p, const robust_opts_t *o, err_t *e)
{
    int cand = 0;
    double sw = 0;

    for (size_t j = 0; j < p->n_units; j++)
        if (!(p->weight[j] >= 0 && isfinite(p->weight[j])))
            return err_set(e, ERR_INPUT, "robust siting: unit %zu has weight %g; persons must be "
                           "finite and >= 0", j + 1, p->weight[j]);
    for (size_t i = 0; i < p->n_sites; i++) {
        if (!(p->fixed_cost[i] >= 0 && isfinite(p->fixed_cost[i])))
            return err_set(e, ERR_INPUT, "robust siting: site %zu has fixed cost %g; it must be "
                           "finite and >= 0", i + 1, p->fixed_cost[i]);
        if (p->state[i] != LOC_FIXED_OPEN) cand++;
    }
    for (size_t v = 0; v < p->n_scen; v++) {
        if (!(p->scen_weight[v] >= 0 && isfinite(p->scen_weight[v])))
            return err_set(e, ERR_INPUT, "robust siting: scenario %zu has weight %g; scenario "
                           "weights must be finite and >= 0", v + 1, p->scen_weight[v]);
        sw += p->scen_weight[v];
    }
    if (o->objective == ROBUST_EXPECTED && !(sw > 0))
        return err_set(e, ERR_INPUT, "robust siting: every scenario weight is 0; give the base "
                       "or a variant a positive weight for the expected objective");
    if (o->objective != ROBUST_WORST && o->objective != ROBUST_EXPECTED)
        return err_set(e, ERR_INTERNAL, "robust siting: unknown objective %d", o->objective);
    if (o->p < 0 && !isfinite(o->budget))
        return err_set(e, ERR_INPUT, "robust siting needs p or a budget; set one of them");
    if (o->p > cand)
        return err_set(e, ERR_INPUT, "robust siting: p = %d but only %d candidate sites; lower p "
                       "or add candidates", o->p, cand);
    if (cand == 0)
        return err_set(e, ERR_INPUT, "robust siting: no candidate site to choose from");
    return ERR_OK;
}

static int solve_mip(const robust_problem_t *p, const robust_opts_t *o, const groups_t *g,
                     const unsigned char *start_open, unsigned char *is_open,
                     robust_result_t *r, int *have, err_t *e)
{
    solver_mip_t *m = NULL;
    solver_result_t sr;
    size_t nsv = g->n * p->n_scen, n_u = 0;
    int *ucol = NULL, *idx = NULL, first_y = 0, zcol = 0;
    double *val = NULL, *start = NULL;
    size_t row_cap = p->n_sites + g->n + 2;
    int rc;

    memset(&sr, 0, sizeof sr);
    *have = 0;
    ucol = calloc(nsv + 1, sizeof *ucol);  /* column of u_qv at q * n_scen + v, 0 = none */
    if (row_cap < p->n_sites + 2) row_cap = p->n_sites + 2;
    idx = malloc(row_cap * sizeof *idx);
    val = malloc(row_cap * sizeof *val);
    if (!ucol || !idx || !val) {
        rc = err_set(e, ERR_NOMEM, "robust siting: out of memory building the model");
        goto done;
    }
    if ((rc = solver_mip_new("robust covering", SOLVER_MAX, &m, e))) goto done;
    if ((rc = solver_add_cols(m, p->n_sites, SOLVER_BINARY, 0, 1, NULL, &first_y, e))) goto done;
    for (size_t i = 0; i < p->n_sites; i++)
        if (p->state[i] == LOC_FIXED_OPEN && (rc = solver_set_col_bounds(m, first_y + (int)i, 1, 1, e)))
            goto done;
    if (o->objective == ROBUST_WORST) {
        double one = 1.0;
        if ((rc = solver_add_cols(m, 1, SOLVER_CONTINUOUS, 0, INFINITY, &one, &zcol, e))) goto done;
    }
    /* u columns and their linking rows. */
    for (size_t q = 0; q < g->n; q++) {
        size_t v = 0, nnz = 0;
        for (size_t k = g->start[q]; k < g->start[q + 1]; k++) {
            if (g->sig[k] >= 0) {
                idx[nnz] = first_y + g->sig[k];
                val[nnz++] = 1.0;
                continue;
            }
            if (nnz > 0) {
                double c = o->objective == ROBUST_EXPECTED ? p->scen_weight[v] * g->w[q] : 0.0;
                int col;
                if ((rc = solver_add_cols(m, 1, SOLVER_CONTINUOUS, 0, 1, &c, &col, e))) goto done;
                ucol[q * p->n_scen + v] = col;
                idx[nnz] = col;
                val[nnz++] = -1.0;
                if ((rc = solver_add_row(m, nnz, idx, val, 0.0, INFINITY, NULL, e))) goto done;
                r->n_rows++;
                n_u++;
            }
            nnz = 0;
            v++;
        }
    }
    if (o->objective == ROBUST_WORST) {
        /* z <= covered persons of scenario v, for every v. */
        int *ri = malloc((g->n + 2) * sizeof *ri);
        double *rv = malloc((g->n + 2) * sizeof *rv);
        if (!ri || !rv) {
            free(ri);
            free(rv);
            rc = err_set(e, ERR_NOMEM, "robust siting: out of memory building the model");
            goto done;
        }
        for (size_t v = 0; v < p->n_scen && rc == ERR_OK; v++) {
            size_t nnz = 0;
            for (size_t q = 0; q < g->n; q++)
                if (ucol[q * p->n_scen + v]) {
                    ri[nnz] = ucol[q * p->n_scen + v];
                    rv[nnz++] = g->w[q];
                }
            ri[nnz] = zcol;
            rv[nnz++] = -1.0;
            rc = solver_add_row(m, nnz, ri, rv, 0.0, INFINITY, NULL, e);
            r->n_rows++;
        }
        free(ri);
        free(rv);
        if (rc) goto done;
    }
    {
        size_t nnz = 0;
        for (size_t i = 0; i < p->n_sites; i++)
            if (p->state[i] != LOC_FIXED_OPEN) idx[nnz++] = first_y + (int)i;
        for (size_t k = 0; k < nnz; k++) val[k] = 1.0;
        if (o->p >= 0) {
            if ((rc = solver_add_row(m, nnz, idx, val, -INFINITY, o->p, NULL, e))) goto done;
            r->n_rows++;
        }
        for (size_t k = 0; k < nnz; k++) val[k] = p->fixed_cost[idx[k] - first_y];
        if (isfinite(o->budget)) {
            if ((rc = solver_add_row(m, nnz, idx, val, -INFINITY, o->budget, NULL, e))) goto done;
            r->n_rows++;
        }
    }
    r->n_cols = p->n_sites + (o->objective == ROBUST_WORST) + n_u;
    if (start_open != NULL) {
        double *cov = malloc((p->n_scen + 1) * sizeof *cov);
        start = calloc(r->n_cols + 1, sizeof *start);
        if (!cov || !start) {
            free(cov);
            rc = err_set(e, ERR_NOMEM, "robust siting: out of memory for the start plan");
            goto done;
        }
        for (size_t i = 0; i < p->n_sites; i++) start[first_y + (int)i] = start_open[i] ? 1.0 : 0.0;
        for (size_t q = 0; q < g->n; q++) {
            size_t v = 0;
            int hit = 0;
            for (size_t k = g->start[q]; k < g->start[q + 1]; k++) {
                if (g->sig[k] >= 0) {
                    hit |= start_open[g->sig[k]];
                    continue;
                }
                if (ucol[q * p->n_scen + v]) start[ucol[q * p->n_scen + v]] = hit ? 1.0 : 0.0;
                hit = 0;
                v++;
            }
        }
        groups_eval(g, start_open, cov);
        if (zcol) start[zcol] = objective_of(p, ROBUST_WORST, cov);
        free(cov);
    }
    if ((rc = solver_solve(m, &o->solver, start, &sr, e))) goto done;
    r->status = sr.status;
    r->objective = sr.objective;
    r->bound = sr.bound;
    r->nodes = sr.nodes;
    if (sr.x != NULL) {
        for (size_t i = 0; i < p->n_sites; i++)
            is_open[i] = p->state[i] == LOC_FIXED_OPEN || sr.x[first_y + (int)i] > 0.5;
        *have = 1;
    }
done:
    solver_result_destroy(&sr);
    solver_mip_free(m);
    free(ucol);
    free(idx);
    free(val);
    free(start);
    return rc;
}

int robust_solve(const robust_problem_t *p, const robust_opts_t *o, robust_result_t *r, err_t *e)
{
    double t0 = now_s();
    groups_t g;
    unsigned char *is_open = NULL, *start = NULL;
    int rc, have = 0;

    memset(r, 0, sizeof *r);
    memset(&g, 0, sizeof g);
    r->heuristic_objective = NAN;
    r->objective = r->bound = NAN;
    if ((rc = check_problem(p, o, e)) != ERR_OK) return rc;
    if ((rc = groups_build(p, o->merge, &g, e)) != ERR_OK) return rc;
    r->units_before = g.units_in;
    r->units_after = g.n;
    for (size_t j = 0; j < p->n_units; j++) r->total_weight += p->weight[j];
    is_open = calloc(p->n_sites + 1, 1);
    start = calloc(p->n_sites + 1, 1);
    r->covered = calloc(p->n_scen, sizeof *r->covered);
    r->open = malloc((p->n_sites + 1) * sizeof *r->open);
    if (!is_open || !start || !r->covered || !r->open) {
        rc = err_set(e, ERR_NOMEM, "robust siting: out of memory for %zu sites", p->n_sites);
        goto done;
    }
    if (o->heuristic) {
        double v = NAN;
        if ((rc = greedy(p, o, &g, start, &v, e))) goto done;
        r->heuristic_objective = v;
    }
    if ((rc = solve_mip(p, o, &g, o->heuristic ? start : NULL, is_open, r, &have, e))) goto done;
    if (!have && o->heuristic) {
        /* Stopped before GLPK held a plan: hand back the greedy plan. */
        memcpy(is_open, start, p->n_sites);
        r->status = SOLVER_FEASIBLE;
        have = 1;
    }
    if (have) {
        /* Objective recomputed from the plan itself (exact, no solver tolerance). */
        groups_eval(&g, is_open, r->covered);
        r->objective = objective_of(p, o->objective, r->covered);
        if (!isfinite(r->bound)) {
            /* GLPK stopped before proving a bound: every coverable person in
             * every scenario is one. */
            double *all = malloc((p->n_scen + 1) * sizeof *all);
            unsigned char *every = malloc(p->n_sites + 1);
            if (!all || !every) {
                free(all);
                free(every);
                rc = err_set(e, ERR_NOMEM, "robust siting: out of memory for the bound");
                goto done;
            }
            memset(every, 1, p->n_sites);
            groups_eval(&g, every, all);
            r->bound = objective_of(p, o->objective, all);
            free(all);
            free(every);
        }
        if (r->bound < r->objective) r->bound = r->objective;
        r->gap = fabs(r->bound - r->objective) / fmax(fabs(r->objective), 1e-9);
        if (r->status == SOLVER_OPTIMAL && r->gap > 1e-6 + o->solver.rel_gap)
            r->status = SOLVER_FEASIBLE;
        for (size_t i = 0; i < p->n_sites; i++)
            if (is_open[i]) r->open[r->n_open++] = (int)i;
    }
done:
    r->seconds = now_s() - t0;
    groups_destroy(&g);
    free(is_open);
    free(start);
    if (rc != ERR_OK) robust_result_destroy(r);
    return rc;
}

int robust_evaluate(const robust_problem_t *p, const unsigned char *is_open, double *covered,
                    err_t *e)
{
    groups_t g;
    unsigned char *o = NULL;
    int rc;

    if ((rc = groups_build(p, 0, &g, e)) != ERR_OK) return rc;
    o = malloc(p->n_sites + 1);
    if (o == NULL) {
        groups_destroy(&g);
        return err_set(e, ERR_NOMEM, "robust siting: out of memory evaluating a plan");
    }
    for (size_t i = 0; i < p->n_sites; i++) o[i] = is_open[i] || p->state[i] == LOC_FIXED_OPEN;
    groups_eval(&g, o, covered);
    free(o);
    groups_destroy(&g);
    return ERR_OK;
}
