/* capacity: capacitated location as a MIP (see capacity.h).
 * Variables: y_i open (binary), x_ij share of unit j served by site i (continuous,
 * or binary for single-source), u_j unserved share. Rows:
 *   sum_i x_ij + u_j = 1                 (each unit served or counted unserved)
 *   sum_j w_j x_ij <= cap_i y_i          (capacity, persons)
 *   x_ij <= y_i                          (strong linking: a much tighter LP)
 *   sum y_i <= p, sum f_i y_i <= budget  (optional, sites besides fixed-open ones) */
#include "capacity.h"

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

int capacity_solve(const loc_problem_t *p, const loc_opts_t *o, loc_result_t *r, err_t *e)
{
    double t0 = now_s();
    solver_mip_t *m = NULL;
    solver_result_t sr;
    int *ycol = NULL, *xcol = NULL, *ucol = NULL, *idx = NULL;
    double *val = NULL, *obj = NULL;
    size_t *site_n = NULL;
    double pen, maxc = 0, minw = INFINITY, sumf = 0;
    int rc = ERR_OK, first;
    size_t n_x = 0, width;

    memset(&sr, 0, sizeof sr);
    memset(r, 0, sizeof *r);
    r->heuristic_objective = r->lagrange_bound = NAN;
    if (!p->finished)
        return err_set(e, ERR_INTERNAL, "capacity: problem data not finished (call loc_finish)");
    if ((rc = loc_check_p(p, o->p, e)) != ERR_OK) return rc;

    for (size_t j = 0; j < p->n_units; j++) {
        if (p->weight[j] > 0) minw = fmin(minw, p->weight[j]);
        for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++) {
            double c = p->pair_cost[k];
            if (c > o->limit) break;
            n_x++;
            if (p->weight[j] > 0) maxc = fmax(maxc, o->per_unit_cost ? c : c / p->weight[j]);
        }
    }
    for (size_t i = 0; i < p->n_sites; i++) sumf += p->fixed_cost[i];
    pen = o->penalty > 0 ? o->penalty : 1.0 + 10.0 * maxc + (isfinite(minw) ? sumf / minw : 0);

    width = (p->n_sites > p->n_units ? p->n_sites : p->n_units) + 2;
    ycol = malloc((p->n_sites + 1) * sizeof *ycol);
    xcol = malloc((n_x + 1) * sizeof *xcol);
    ucol = malloc((p->n_units + 1) * sizeof *ucol);
    idx = malloc(width * sizeof *idx);
    val = malloc(width * sizeof *val);
    obj = malloc((p->n_sites + 1) * sizeof *obj);
    site_n = calloc(p->n_sites + 1, sizeof *site_n);
    if (!ycol || !xcol || !ucol || !idx || !val || !obj || !site_n) {
        rc = err_set(e, ERR_NOMEM, "capacity: out of memory for %zu pairs", n_x);
        goto done;
    }

    if ((rc = solver_mip_new("capacitated location", SOLVER_MIN, &m, e)) != ERR_OK) goto done;
    for (size_t i = 0; i < p->n_sites; i++) obj[i] = p->fixed_cost[i];
    if ((rc = solver_add_cols(m, p->n_sites, SOLVER_BINARY, 0, 1, obj, &first, e))) goto done;
    for (size_t i = 0; i < p->n_sites; i++) {
        ycol[i] = first + (int)i;
        if (p->state[i] == LOC_FIXED_OPEN && (rc = solver_set_col_bounds(m, ycol[i], 1, 1, e)))
            goto done;
    }
    /* x and u columns, unit by unit, then the assignment row of each unit. */
    size_t q = 0;
    for (size_t j = 0; j < p->n_units; j++) {
        double w = p->weight[j];
        size_t nnz = 0;
        ucol[j] = 0;
        for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++) {
            double c = p->pair_cost[k];
            if (c > o->limit) break;
            double oc = o->per_unit_cost ? w * c : c;
            if ((rc = solver_add_cols(m, 1, o->single_source ? SOLVER_BINARY : SOLVER_CONTINUOUS,
                                      0, 1, &oc, &xcol[q], e)))
                goto done;
            if (w > 0) site_n[p->pair_site[k]]++;
            idx[nnz] = xcol[q];
            val[nnz] = 1.0;
            nnz++;
            q++;
        }
        if (w <= 0) continue;    /* nobody to serve: no row, its x stay free at cost >= 0 */
        double uc = pen * w;
        if ((rc = solver_add_cols(m, 1, SOLVER_CONTINUOUS, 0, 1, &uc, &ucol[j], e))) goto done;
        idx[nnz] = ucol[j];
        val[nnz] = 1.0;
        nnz++;
        if ((rc = solver_add_row(m, nnz, idx, val, 1.0, 1.0, NULL, e))) goto done;
        r->n_rows++;
        r->n_nonzeros += nnz;
    }
    /* Capacity rows (site by site) and strong linking rows. */
    {
        int **rows = calloc(p->n_sites + 1, sizeof *rows);
        double **vals = calloc(p->n_sites + 1, sizeof *vals);
        size_t *fill = calloc(p->n_sites + 1, sizeof *fill);
        int ok = rows && vals && fill;
        for (size_t i = 0; ok && i < p->n_sites; i++) {
            rows[i] = malloc((site_n[i] + 1) * sizeof **rows);
            vals[i] = malloc((site_n[i] + 1) * sizeof **vals);
            ok = rows[i] && vals[i];
        }
        q = 0;
        for (size_t j = 0; ok && j < p->n_units; j++)
            for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++) {
                if (p->pair_cost[k] > o->limit) break;
                int i = p->pair_site[k];
                if (p->weight[j] > 0) {
                    rows[i][fill[i]] = xcol[q];
                    vals[i][fill[i]++] = p->weight[j];
                    int li[2] = {xcol[q], ycol[i]};
                    double lv[2] = {1.0, -1.0};
                    if ((rc = solver_add_row(m, 2, li, lv, -INFINITY, 0.0, NULL, e))) break;
                    r->n_rows++;
                    r->n_nonzeros += 2;
                }
                q++;
            }
        for (size_t i = 0; ok && rc == ERR_OK && i < p->n_sites; i++) {
            if (!isfinite(p->capacity[i]) || fill[i] == 0) continue;
            rows[i][fill[i]] = ycol[i];
            vals[i][fill[i]] = -p->capacity[i];
            rc = solver_add_row(m, fill[i] + 1, rows[i], vals[i], -INFINITY, 0.0, NULL, e);
            r->n_rows++;
            r->n_nonzeros += fill[i] + 1;
        }
        for (size_t i = 0; rows && vals && i < p->n_sites; i++) {
            free(rows[i]);
            free(vals[i]);
        }
        free(rows);
        free(vals);
        free(fill);
        if (!ok) rc = err_set(e, ERR_NOMEM, "capacity: out of memory for capacity rows");
        if (rc != ERR_OK) goto done;
    }
    /* Count and budget rows over the sites that are not fixed open. */
    if (o->p >= 0 || isfinite(o->budget)) {
        size_t nnz = 0;
        for (size_t i = 0; i < p->n_sites; i++)
            if (p->state[i] != LOC_FIXED_OPEN) idx[nnz++] = ycol[i];
        for (size_t k = 0; k < nnz; k++) val[k] = 1.0;
        if (o->p >= 0 && (rc = solver_add_row(m, nnz, idx, val, -INFINITY, o->p, NULL, e)))
            goto done;
        for (size_t k = 0; k < nnz; k++) val[k] = p->fixed_cost[idx[k] - ycol[0]];
        if (isfinite(o->budget) &&
            (rc = solver_add_row(m, nnz, idx, val, -INFINITY, o->budget, NULL, e)))
            goto done;
    }
    r->n_cols = p->n_sites + n_x;
    for (size_t j = 0; j < p->n_units; j++) r->n_cols += ucol[j] != 0;

    if ((rc = solver_solve(m, &o->solver, NULL, &sr, e)) != ERR_OK) goto done;
    r->status = sr.status;
    r->objective = sr.objective;
    r->bound = sr.bound;
    r->gap = sr.gap;
    r->nodes = sr.nodes;
    r->solver_seconds = sr.seconds;
    if (sr.x == NULL) goto done;

    /* The plan: open sites, main site per unit, served persons, why not served. */
    r->open = malloc((p->n_sites + 1) * sizeof *r->open);
    r->assign = malloc((p->n_units + 1) * sizeof *r->assign);
    r->served = calloc(p->n_units + 1, sizeof *r->served);
    r->why = calloc(p->n_units + 1, sizeof *r->why);
    if (!r->open || !r->assign || !r->served || !r->why) {
        rc = err_set(e, ERR_NOMEM, "capacity: out of memory writing the plan");
        goto done;
    }
    for (size_t i = 0; i < p->n_sites; i++)
        if (sr.x[ycol[i]] > 0.5) {
            r->open[r->n_open++] = (int)i;
            r->fixed_cost_total += p->fixed_cost[i];
        }
    q = 0;
    for (size_t j = 0; j < p->n_units; j++) {
        double w = p->weight[j], best = 0, share = 0;
        int any_reach = 0, any_open = 0;
        r->assign[j] = -1;
        for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++) {
            if (p->pair_cost[k] > o->limit) break;
            double x = sr.x[xcol[q++]];
            int i = p->pair_site[k];
            any_reach = 1;
            if (sr.x[ycol[i]] > 0.5) any_open = 1;
            if (x > 1e-9) {
                share += x;
                if (x > best) {
                    best = x;
                    r->assign[j] = i;
                }
            }
        }
        if (w > 0) share = 1.0 - sr.x[ucol[j]];
        if (share < 1e-9) share = 0;
        r->served[j] = w * fmin(1.0, share);
        r->total_weight += w;
        r->served_weight += r->served[j];
        if (w > 0 && sr.x[ucol[j]] > 1e-9)
            r->why[j] = !any_reach ? LOC_NO_SITE_IN_REACH : any_open ? LOC_CAPACITY : LOC_NOT_CHOSEN;
    }
    r->unserved_weight = r->total_weight - r->served_weight;
    if (r->unserved_weight < 1e-9 * fmax(1.0, r->total_weight)) r->unserved_weight = 0;
done:
    r->seconds = now_s() - t0;
    solver_result_destroy(&sr);
    solver_mip_free(m);
    free(ycol);
    free(xcol);
    free(ucol);
    free(idx);
    free(val);
    free(obj);
    free(site_n);
    return rc;
}
