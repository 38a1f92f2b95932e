/* median: p-median as an exact MIP (see median.h).
 *
 * Formulation (closest assignment with sorted distances; Cornuejols, Nemhauser
 * and Wolsey 1980, Elloumi 2010): for unit j let D_1 < D_2 < ... < D_K be the
 * distinct costs of its pairs within the limit; z_k = 1 when no open site lies
 * within D_k. Cost of j = w_j (D_1 + sum_{k<K} (D_{k+1} - D_k) z_k + (P - D_K) z_K),
 * P the penalty per unserved person. Rows, in the incremental form whose LP
 * equals the cumulative one but has one entry per (unit, site):
 *   z_1 + sum_{d_ij = D_1} y_i >= 1,   z_k - z_{k-1} + sum_{d_ij = D_k} y_i >= 0.
 * Reductions, all exact:
 *   - pigeonhole: any p of the N free sites meet every set of N - p + 1 of them,
 *     so z_k = 0 once N - p + 1 free sites (or one fixed-open site) lie within D_k;
 *   - Lagrangian: relaxing "each unit served once" gives a lower bound L(lambda)
 *     (subgradient search); forcing z_k = 1 closes the sites within D_k, and if
 *     the bound of that restricted problem exceeds the heuristic's value UB, no
 *     plan better than UB has z_k = 1, so z_k and all later levels are dropped;
 *     the same test on single sites fixes y_i (reduced-cost fixing).
 * A dropped z_k turns its row into  sum_{d_ij = D_k} y_i >= z_{k-1}. */
#include "median.h"

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

typedef struct keyed {
    double key;
    int site;
} keyed_t;

static int cmp_keyed(const void *a, const void *b)
{
    const keyed_t *x = a, *y = b;
    if (x->key != y->key) return x->key < y->key ? -1 : 1;
    return (x->site > y->site) - (x->site < y->site);
}

typedef struct lagr {
    double *lambda;    /* per unit */
    double *c;         /* per site: sum_j min(0, w_j d_ij - lambda_j) */
    int *order;        /* free sites by increasing c */
    int *rank;         /* rank of a free site in order, -1 for fixed-open */
    keyed_t *tmp;      /* sort buffer, n_sites */
    size_t n_free;
    double base;       /* sum lambda + sum min(0, w P - lambda) + c of fixed-open sites */
    double bound;      /* base + the p smallest c */
} lagr_t;

/* Evaluate L(lambda): fills c, order, rank, base and bound. */
static void lagr_eval(const loc_problem_t *p, double lim, double pen, int count, lagr_t *g)
{
    g->base = 0;
    memset(g->c, 0, p->n_sites * sizeof *g->c);
    for (size_t j = 0; j < p->n_units; j++) {
        double w = p->weight[j], lam = g->lambda[j];
        if (w <= 0) continue;
        g->base += lam + fmin(0.0, w * pen - lam);
        for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++) {
            double d = p->pair_cost[k];
            if (d > lim || w * d >= lam) break;
            g->c[p->pair_site[k]] += w * d - lam;
        }
    }
    g->n_free = 0;
    for (size_t i = 0; i < p->n_sites; i++) {
        if (p->state[i] == LOC_FIXED_OPEN) {
            g->base += g->c[i];
            g->rank[i] = -1;
        } else {
            g->tmp[g->n_free].key = g->c[i];
            g->tmp[g->n_free++].site = (int)i;
        }
    }
    qsort(g->tmp, g->n_free, sizeof *g->tmp, cmp_keyed);
    for (size_t r = 0; r < g->n_free; r++) g->order[r] = g->tmp[r].site;
    g->bound = g->base;
    for (size_t r = 0; r < g->n_free; r++) {
        g->rank[g->order[r]] = (int)r;
        if (r < (size_t)count) g->bound += g->c[g->order[r]];
    }
}

/* Subgradient search for a good lambda; keeps the best one in g->lambda. */
static int lagr_search(const loc_problem_t *p, double lim, double pen, int count, double ub,
                       const double *start_cost, lagr_t *g, err_t *e)
{
    double *best = malloc((p->n_units + 1) * sizeof *best);
    double *sg = malloc((p->n_units + 1) * sizeof *sg);
    unsigned char *open = calloc(p->n_sites + 1, 1);
    double best_bound = -INFINITY, theta = 2.0;
    int stall = 0, rc = ERR_OK;

    if (!best || !sg || !open) {
        rc = err_set(e, ERR_NOMEM, "out of memory in the median Lagrangian bound");
        goto done;
    }
    for (size_t j = 0; j < p->n_units; j++) g->lambda[j] = p->weight[j] * start_cost[j];
    for (int it = 0; it < 5000 && theta > 1e-5; it++) {
        lagr_eval(p, lim, pen, count, g);
        if (g->bound > best_bound + 1e-9 * fmax(1.0, fabs(best_bound))) {
            best_bound = g->bound;
            memcpy(best, g->lambda, p->n_units * sizeof *best);
            stall = 0;
        } else if (++stall >= 50) {
            theta /= 2;
            stall = 0;
        }
        if (ub - best_bound <= 1e-9 * fmax(1.0, fabs(ub))) break;
        memset(open, 0, p->n_sites);
        for (size_t i = 0; i < p->n_sites; i++)
            if (p->state[i] == LOC_FIXED_OPEN) open[i] = 1;
        for (size_t r = 0; r < g->n_free && r < (size_t)count; r++) open[g->order[r]] = 1;
        double norm = 0;
        for (size_t j = 0; j < p->n_units; j++) {
            double w = p->weight[j], lam = g->lambda[j];
            sg[j] = 0;
            if (w <= 0) continue;
            sg[j] = 1.0 - (w * pen < lam ? 1.0 : 0.0);
            for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++) {
                double d = p->pair_cost[k];
                if (d > lim || w * d >= lam) break;
                if (open[p->pair_site[k]]) sg[j] -= 1.0;
            }
            norm += sg[j] * sg[j];
        }
        if (norm <= 0) break;   /* lambda is optimal: the relaxed plan is feasible */
        double step = theta * (ub - g->bound) / norm;
        if (step <= 0) step = theta * 1e-3 * fmax(1.0, fabs(ub)) / norm;
        for (size_t j = 0; j < p->n_units; j++) g->lambda[j] += step * sg[j];
    }
    if (best_bound > -INFINITY) memcpy(g->lambda, best, p->n_units * sizeof *best);
    lagr_eval(p, lim, pen, count, g);
done:
    free(best);
    free(sg);
    free(open);
    return rc;
}

int median_solve(const loc_problem_t *p, const loc_opts_t *o, loc_result_t *r, err_t *e)
{
    double t0 = now_s();
    solver_mip_t *m = NULL;
    solver_result_t sr;
    lagr_t g;
    unsigned char *is_open = NULL;
    double *unit_cost = NULL, *start = NULL, *val = NULL;
    int *ycol = NULL, *fix = NULL, *idx = NULL, *stamp = NULL, *eff = NULL, *lsite = NULL;
    double *lcost = NULL;
    size_t n_left = 0;      /* sites still free after fixing */
    int n_forced = 0;       /* free sites fixed open by the bounds */
    size_t n_free = 0, n_fixed_open = 0;
    double pen, lim, ub = INFINITY, constant = 0, maxc = 0, eps;
    int count = o->p, rc = ERR_OK, first;
    /* Start values for z columns are collected as they are made. */
    size_t zcap = 0, nz = 0;
    double *zstart = NULL;

    memset(&sr, 0, sizeof sr);
    memset(&g, 0, sizeof g);
    memset(r, 0, sizeof *r);
    r->heuristic_objective = r->lagrange_bound = NAN;
    if (!p->finished)
        return err_set(e, ERR_INTERNAL, "median: problem data not finished (call loc_finish)");
    if (count < 0)
        return err_set(e, ERR_INPUT, "median: p must be given (got %d); set how many sites to open",
                       count);
    if ((rc = loc_check_p(p, count, e)) != ERR_OK) return rc;

    lim = o->limit;
    for (size_t k = 0; k < p->n_pairs; k++)
        if (p->pair_cost[k] <= lim) maxc = fmax(maxc, p->pair_cost[k]);
    pen = o->penalty > 0 ? o->penalty : 10.0 * maxc + 1.0;
    /* A pair costing the penalty or more is never worth using. */
    lim = fmin(lim, nextafter(pen, 0));
    for (size_t i = 0; i < p->n_sites; i++) {
        if (p->state[i] == LOC_FIXED_OPEN) n_fixed_open++;
        else n_free++;
    }

    is_open = calloc(p->n_sites + 1, 1);
    unit_cost = malloc((p->n_units + 1) * sizeof *unit_cost);
    ycol = malloc((p->n_sites + 1) * sizeof *ycol);
    fix = malloc((p->n_sites + 1) * sizeof *fix);
    idx = malloc((p->n_sites + 2) * sizeof *idx);
    val = malloc((p->n_sites + 2) * sizeof *val);
    stamp = malloc((p->n_sites + 1) * sizeof *stamp);
    eff = malloc((p->n_sites + 1) * sizeof *eff);
    lsite = malloc((p->n_sites + 1) * sizeof *lsite);
    lcost = malloc((p->n_sites + 1) * sizeof *lcost);
    if (!is_open || !unit_cost || !ycol || !fix || !idx || !val || !stamp || !eff ||
        !lsite || !lcost) {
        rc = err_set(e, ERR_NOMEM, "median: out of memory for %zu sites", p->n_sites);
        goto done;
    }
    for (size_t i = 0; i < p->n_sites; i++) fix[i] = -1;

    if (o->heuristic || o->reduce) {
        rc = heuristic_median(p, count, lim, pen, is_open, &ub, e);
        if (rc != ERR_OK) goto done;
        r->heuristic_objective = ub;
    }
    eps = 1e-7 * fmax(1.0, fabs(ub));

    if (o->reduce && isfinite(ub)) {
        g.lambda = malloc((p->n_units + 1) * sizeof *g.lambda);
        g.c = malloc((p->n_sites + 1) * sizeof *g.c);
        g.order = malloc((p->n_sites + 1) * sizeof *g.order);
        g.rank = malloc((p->n_sites + 1) * sizeof *g.rank);
        g.tmp = malloc((p->n_sites + 1) * sizeof *g.tmp);
        if (!g.lambda || !g.c || !g.order || !g.rank || !g.tmp) {
            rc = err_set(e, ERR_NOMEM, "median: out of memory for the Lagrangian bound");
            goto done;
        }
        /* Start lambda at each unit's cost in the heuristic plan. */
        for (size_t j = 0; j < p->n_units; j++) {
            unit_cost[j] = pen;
            for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++) {
                if (p->pair_cost[k] > lim) break;
                if (is_open[p->pair_site[k]]) {
                    unit_cost[j] = p->pair_cost[k];
                    break;
                }
            }
        }
        if ((rc = lagr_search(p, lim, pen, count, ub, unit_cost, &g, e)) != ERR_OK) goto done;
        /* Lagrangian heuristic: the p sites the relaxation picks, improved by
         * swaps, often beat the greedy start; a lower UB fixes more. */
        {
            unsigned char *alt = calloc(p->n_sites + 1, 1);
            double v = INFINITY;
            if (alt == NULL) {
                rc = err_set(e, ERR_NOMEM, "median: out of memory for the Lagrangian plan");
                goto done;
            }
            for (size_t q = 0; q < g.n_free && q < (size_t)count; q++) alt[g.order[q]] = 1;
            rc = heuristic_median(p, count, lim, pen, alt, &v, e);
            if (rc == ERR_OK && v < ub - eps) {
                memcpy(is_open, alt, p->n_sites);
                ub = v;
                r->heuristic_objective = v;
                eps = 1e-7 * fmax(1.0, fabs(ub));
            }
            free(alt);
            if (rc != ERR_OK) goto done;
        }
        r->lagrange_bound = g.bound;
        /* Reduced-cost fixing of site variables. */
        if ((size_t)count < g.n_free && count > 0) {
            double c_last = g.c[g.order[count - 1]], c_next = g.c[g.order[count]];
            for (size_t q = 0; q < g.n_free; q++) {
                int i = g.order[q];
                if (q >= (size_t)count && g.bound + g.c[i] - c_last > ub + eps) fix[i] = 0;
                if (q < (size_t)count && g.bound - g.c[i] + c_next > ub + eps) fix[i] = 1;
                r->n_fixed += fix[i] >= 0;
            }
        }
    }

    if ((rc = solver_mip_new("p-median", SOLVER_MIN, &m, e)) != ERR_OK) goto done;
    if ((rc = solver_add_cols(m, p->n_sites, SOLVER_BINARY, 0, 1, NULL, &first, e)) != ERR_OK)
        goto done;
    for (size_t i = 0; i < p->n_sites; i++) {
        ycol[i] = first + (int)i;
        double v = p->state[i] == LOC_FIXED_OPEN ? 1 : fix[i];
        if (v >= 0 && (rc = solver_set_col_bounds(m, ycol[i], v, v, e)) != ERR_OK) goto done;
        idx[i] = ycol[i];
        val[i] = 1.0;
    }
    if ((rc = solver_add_row(m, p->n_sites, idx, val, (double)(count + (int)n_fixed_open),
                             (double)(count + (int)n_fixed_open), NULL, e)) != ERR_OK)
        goto done;
    r->n_rows = 1;
    r->n_nonzeros = p->n_sites;

    /* Effective state after fixing: 1 open, -1 closed, 0 free. */
    for (size_t i = 0; i < p->n_sites; i++) {
        eff[i] = p->state[i] == LOC_FIXED_OPEN ? 1 : fix[i] == 1 ? 1 : fix[i] == 0 ? -1 : 0;
        if (fix[i] == 1) n_forced++;
        if (eff[i] == 0) n_left++;
        stamp[i] = -1;
    }
    for (size_t j = 0; j < p->n_units; j++) {
        double w = p->weight[j];
        size_t a = p->unit_start[j], z = p->unit_start[j + 1], nl = 0;
        size_t within = 0;      /* free sites within the current level */
        int prev = 0;           /* column of z_{k-1}, 0 for none */
        int cut = 0, any_open = 0;
        double s_bound = 0;
        size_t ptr = 0;
        if (w <= 0) continue;
        /* The unit's usable pairs: within the limit, site not fixed closed. */
        for (size_t k = a; k < z && p->pair_cost[k] <= lim; k++)
            if (eff[p->pair_site[k]] >= 0) {
                lsite[nl] = p->pair_site[k];
                lcost[nl++] = p->pair_cost[k];
            }
        if (nl == 0) {
            constant += w * pen;    /* no site within reach: unserved whatever happens */
            continue;
        }
        constant += w * lcost[0];
        double jterm = 0;       /* unit j's own share of the Lagrangian base */
        if (g.lambda != NULL) {
            jterm = g.lambda[j] + fmin(0.0, w * pen - g.lambda[j]);
            ptr = (size_t)count < g.n_free ? (size_t)count : g.n_free;
            for (size_t q = 0; q < ptr; q++) s_bound += g.c[g.order[q]];
        }
        for (size_t k = 0; k < nl && !cut;) {
            double d = lcost[k];
            size_t nnz = 0, k2 = k;
            int open_here = 0;
            /* Sites at exactly this level. */
            for (; k2 < nl && lcost[k2] == d; k2++) {
                int i = lsite[k2];
                if (is_open[i]) any_open = 1;
                if (eff[i] == 1) {
                    open_here = 1;
                    continue;
                }
                idx[nnz] = ycol[i];
                val[nnz] = 1.0;
                nnz++;
                within++;
                if (g.lambda != NULL && !cut) {
                    /* Close site i in the restricted Lagrangian problem. */
                    stamp[i] = (int)j;
                    if (g.rank[i] < (int)ptr) {
                        s_bound -= g.c[i];
                        while (ptr < g.n_free && stamp[g.order[ptr]] == (int)j) ptr++;
                        if (ptr < g.n_free) s_bound += g.c[g.order[ptr++]];
                        else s_bound = INFINITY;
                    }
                }
            }
            /* An open site at this level: z_k = 0 and the row holds trivially. */
            if (open_here) break;
            if (within >= n_left - (size_t)(count - n_forced) + 1) cut = 1;
            double next = k2 < nl ? lcost[k2] : pen;
            /* Restricted bound: sites within D_k closed, and unit j kept out of
             * the relaxation: it pays at least w D_{k+1} (or the penalty). */
            if (g.lambda != NULL &&
                g.base - jterm + w * fmin(next, pen) + s_bound > ub + eps)
                cut = 1;
            int zc = 0;
            if (!cut) {
                double c = w * (next - d);
                if ((rc = solver_add_cols(m, 1, SOLVER_CONTINUOUS, 0, 1, &c, &zc, e)) != ERR_OK)
                    goto done;
                idx[nnz] = zc;
                val[nnz] = 1.0;
                nnz++;
                if (nz == zcap) {
                    zcap = zcap ? 2 * zcap : 4096;
                    double *t = realloc(zstart, zcap * sizeof *t);
                    if (t == NULL) {
                        rc = err_set(e, ERR_NOMEM, "median: out of memory building the model");
                        goto done;
                    }
                    zstart = t;
                }
                zstart[nz++] = any_open ? 0.0 : 1.0;
            }
            if (prev != 0) {
                idx[nnz] = prev;
                val[nnz] = -1.0;
                nnz++;
            }
            if ((rc = solver_add_row(m, nnz, idx, val, prev != 0 ? 0.0 : 1.0, INFINITY, NULL,
                                     e)) != ERR_OK)
                goto done;
            r->n_rows++;
            r->n_nonzeros += nnz;
            prev = zc;
            k = k2;
        }
    }
    r->n_cols = p->n_sites + nz;

    if (o->heuristic && isfinite(ub)) {
        start = calloc(r->n_cols + 1, sizeof *start);
        if (start == NULL) {
            rc = err_set(e, ERR_NOMEM, "median: out of memory for the start plan");
            goto done;
        }
        for (size_t i = 0; i < p->n_sites; i++) start[ycol[i]] = is_open[i] ? 1.0 : 0.0;
        for (size_t q = 0; q < nz; q++) start[p->n_sites + 1 + q] = zstart[q];
    }
    if ((rc = solver_solve(m, &o->solver, start, &sr, e)) != ERR_OK) goto done;
    r->status = sr.status;
    r->nodes = sr.nodes;
    r->solver_seconds = sr.seconds;
    r->objective = sr.objective + constant;
    r->bound = sr.bound + constant;
    if (sr.x != NULL) {
        for (size_t i = 0; i < p->n_sites; i++) is_open[i] = sr.x[ycol[i]] > 0.5;
        r->gap = fabs(r->objective - r->bound) / fmax(fabs(r->objective), 1e-9);
        if ((rc = loc_plan_nearest(p, is_open, lim, r, e)) != ERR_OK) goto done;
    } else if (isfinite(ub) && (sr.status == SOLVER_NO_PLAN || sr.status == SOLVER_FEASIBLE)) {
        /* Stopped before GLPK held a plan: hand back the heuristic plan (is_open
         * still holds it) with the best bound known. */
        double lb = sr.bound + constant;
        if (!isfinite(lb) || (isfinite(r->lagrange_bound) && r->lagrange_bound > lb))
            lb = isfinite(r->lagrange_bound) ? r->lagrange_bound : 0.0;
        r->status = SOLVER_FEASIBLE;
        r->objective = ub;
        r->bound = fmin(lb, ub);
        r->gap = fabs(r->objective - r->bound) / fmax(fabs(r->objective), 1e-9);
        if ((rc = loc_plan_nearest(p, is_open, lim, r, e)) != ERR_OK) goto done;
    } else {
        r->gap = INFINITY;
    }
done:
    r->seconds = now_s() - t0;
    solver_result_destroy(&sr);
    solver_mip_free(m);
    free(g.lambda);
    free(g.c);
    free(g.order);
    free(g.rank);
    free(g.tmp);
    free(is_open);
    free(unit_cost);
    free(start);
    free(val);
    free(ycol);
    free(fix);
    free(idx);
    free(stamp);
    free(eff);
    free(lsite);
    free(lcost);
    free(zstart);
    return rc;
}
