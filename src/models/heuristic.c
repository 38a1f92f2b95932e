/* heuristic: greedy add + one-swap interchange for covering and median plans
 * (see heuristic.h). Both work on per-site lists of (unit, cost) within the
 * limit, the transpose of the problem's per-unit lists, so a move costs time in
 * proportion to the units a site reaches, not to all units. */
#include "heuristic.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Per-site transpose of the pairs within a limit. */
typedef struct site_lists {
    size_t *start;   /* n_sites + 1 */
    int *unit;
    double *cost;
} site_lists_t;

static void lists_destroy(site_lists_t *l)
{
    free(l->start);
    free(l->unit);
    free(l->cost);
}

static int lists_build(const loc_problem_t *p, double limit, site_lists_t *l, err_t *e)
{
    size_t *fill = NULL;
    size_t n = 0;

    memset(l, 0, sizeof *l);
    for (size_t k = 0; k < p->n_pairs; k++) n += p->pair_cost[k] <= limit;
    l->start = calloc(p->n_sites + 1, sizeof *l->start);
    l->unit = malloc((n + 1) * sizeof *l->unit);
    l->cost = malloc((n + 1) * sizeof *l->cost);
    fill = calloc(p->n_sites + 1, sizeof *fill);
    if (!l->start || !l->unit || !l->cost || !fill) {
        free(fill);
        lists_destroy(l);
        return err_set(e, ERR_NOMEM, "out of memory building site lists (%zu pairs)", n);
    }
    for (size_t k = 0; k < p->n_pairs; k++)
        if (p->pair_cost[k] <= limit) l->start[p->pair_site[k] + 1]++;
    for (size_t i = 0; i < p->n_sites; i++) l->start[i + 1] += l->start[i];
    for (size_t k = 0; k < p->n_pairs; k++) {
        if (p->pair_cost[k] > limit) continue;
        size_t at = l->start[p->pair_site[k]] + fill[p->pair_site[k]]++;
        l->unit[at] = p->pair_unit[k];
        l->cost[at] = p->pair_cost[k];
    }
    free(fill);
    return ERR_OK;
}

static size_t count_new(const loc_problem_t *p, const unsigned char *is_open, double *spent)
{
    size_t n = 0;
    *spent = 0;
    for (size_t i = 0; i < p->n_sites; i++)
        if (is_open[i] && p->state[i] != LOC_FIXED_OPEN) {
            n++;
            *spent += p->fixed_cost[i];
        }
    return n;
}

int heuristic_cover(const loc_problem_t *p, double limit, int count, double budget,
                    unsigned char *is_open, double *covered, err_t *e)
{
    site_lists_t l;
    int *cnt = NULL;
    unsigned char *mark = NULL;
    double spent, total = 0;
    size_t nnew;
    int rc;

    if ((rc = lists_build(p, limit, &l, e)) != ERR_OK) return rc;
    cnt = calloc(p->n_units + 1, sizeof *cnt);
    mark = calloc(p->n_units + 1, 1);
    if (!cnt || !mark) {
        rc = err_set(e, ERR_NOMEM, "out of memory in the covering heuristic");
        goto done;
    }
    for (size_t i = 0; i < p->n_sites; i++) {
        if (p->state[i] == LOC_FIXED_OPEN) is_open[i] = 1;
        if (is_open[i])
            for (size_t k = l.start[i]; k < l.start[i + 1]; k++) cnt[l.unit[k]]++;
    }
    nnew = count_new(p, is_open, &spent);

    /* Greedy: add the site with the largest new coverage (per unit of fixed cost
     * when a budget binds) until the count or the budget is used up. */
    for (;;) {
        if (count >= 0 && nnew >= (size_t)count) break;
        int best = -1;
        double best_score = -1, best_gain = 0;
        for (size_t i = 0; i < p->n_sites; i++) {
            if (is_open[i] || spent + p->fixed_cost[i] > budget) continue;
            double g = 0;
            for (size_t k = l.start[i]; k < l.start[i + 1]; k++)
                if (cnt[l.unit[k]] == 0) g += p->weight[l.unit[k]];
            /* Gain per unit of fixed cost when a budget binds; a free site with a
             * gain comes first; a site that gains nothing only fills a count. */
            double score = isfinite(budget) && p->fixed_cost[i] > 0 ? g / p->fixed_cost[i] : g;
            if (isfinite(budget) && p->fixed_cost[i] <= 0 && g > 0) score = INFINITY;
            if (g <= 0) score = 0;
            if (score > best_score) {
                best_score = score;
                best = (int)i;
                best_gain = g;
            }
        }
        /* With no count limit, stop when nothing more is gained. */
        if (best < 0 || (count < 0 && best_gain <= 0)) break;
        is_open[best] = 1;
        nnew++;
        spent += p->fixed_cost[best];
        for (size_t k = l.start[best]; k < l.start[best + 1]; k++) cnt[l.unit[k]]++;
    }

    /* Interchange: for each open site r, find the closed site c whose swap gains
     * most; apply it when it gains; repeat until a whole pass gains nothing. */
    for (int improved = 1, pass = 0; improved && pass < 100; pass++) {
        improved = 0;
        for (size_t r = 0; r < p->n_sites; r++) {
            if (!is_open[r] || p->state[r] == LOC_FIXED_OPEN) continue;
            double loss = 0;
            for (size_t k = l.start[r]; k < l.start[r + 1]; k++)
                if (cnt[l.unit[k]] == 1) {
                    mark[l.unit[k]] = 1;
                    loss += p->weight[l.unit[k]];
                }
            int best = -1;
            double best_delta = 1e-9 * fmax(1.0, loss);
            for (size_t c = 0; c < p->n_sites; c++) {
                if (is_open[c] || spent - p->fixed_cost[r] + p->fixed_cost[c] > budget) continue;
                double g = 0;
                for (size_t k = l.start[c]; k < l.start[c + 1]; k++) {
                    int j = l.unit[k];
                    if (cnt[j] == 0 || mark[j]) g += p->weight[j];
                }
                if (g - loss > best_delta) {
                    best_delta = g - loss;
                    best = (int)c;
                }
            }
            for (size_t k = l.start[r]; k < l.start[r + 1]; k++) mark[l.unit[k]] = 0;
            if (best < 0) continue;
            is_open[r] = 0;
            is_open[best] = 1;
            spent += p->fixed_cost[best] - p->fixed_cost[r];
            for (size_t k = l.start[r]; k < l.start[r + 1]; k++) cnt[l.unit[k]]--;
            for (size_t k = l.start[best]; k < l.start[best + 1]; k++) cnt[l.unit[k]]++;
            improved = 1;
        }
    }
    for (size_t j = 0; j < p->n_units; j++)
        if (cnt[j] > 0) total += p->weight[j];
    *covered = total;
done:
    free(cnt);
    free(mark);
    lists_destroy(&l);
    return rc;
}

/* Nearest and second-nearest open site of every unit within the limit. */
static void median_state(const loc_problem_t *p, double limit, double penalty,
                         const unsigned char *is_open, int *near, double *c1, double *c2)
{
    for (size_t j = 0; j < p->n_units; j++) {
        int found = 0;
        near[j] = -1;
        c1[j] = c2[j] = penalty;
        for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1] && found < 2; k++) {
            double d = p->pair_cost[k];
            if (d > limit || d >= penalty) break;
            if (!is_open[p->pair_site[k]]) continue;
            if (found == 0) {
                near[j] = p->pair_site[k];
                c1[j] = d;
            } else {
                c2[j] = d;
            }
            found++;
        }
    }
}

int heuristic_median(const loc_problem_t *p, int count, double limit, double penalty,
                     unsigned char *is_open, double *cost, err_t *e)
{
    site_lists_t l;
    int *near = NULL;
    double *c1 = NULL, *c2 = NULL;
    double spent, total = 0;   /* fixed cost is not part of the median objective */
    size_t nnew;
    int rc;

    if ((rc = lists_build(p, fmin(limit, penalty), &l, e)) != ERR_OK) return rc;
    near = malloc((p->n_units + 1) * sizeof *near);
    c1 = malloc((p->n_units + 1) * sizeof *c1);
    c2 = malloc((p->n_units + 1) * sizeof *c2);
    if (!near || !c1 || !c2) {
        rc = err_set(e, ERR_NOMEM, "out of memory in the median heuristic");
        goto done;
    }
    for (size_t i = 0; i < p->n_sites; i++)
        if (p->state[i] == LOC_FIXED_OPEN) is_open[i] = 1;
    nnew = count_new(p, is_open, &spent);
    median_state(p, limit, penalty, is_open, near, c1, c2);

    /* Greedy add: largest drop in total weighted cost. */
    while (count >= 0 && nnew < (size_t)count) {
        int best = -1;
        double best_gain = -1;
        for (size_t i = 0; i < p->n_sites; i++) {
            if (is_open[i]) continue;
            double g = 0;
            for (size_t k = l.start[i]; k < l.start[i + 1]; k++)
                if (l.cost[k] < c1[l.unit[k]]) g += p->weight[l.unit[k]] * (c1[l.unit[k]] - l.cost[k]);
            if (g > best_gain) {
                best_gain = g;
                best = (int)i;
            }
        }
        if (best < 0) break;
        is_open[best] = 1;
        nnew++;
        median_state(p, limit, penalty, is_open, near, c1, c2);
    }

    /* Interchange: for each open r, the best closed c to take its place. Units
     * served by r fall back to their second-nearest site (c2) unless c is nearer. */
    for (int improved = 1, pass = 0; improved && pass < 200; pass++) {
        improved = 0;
        for (size_t r = 0; r < p->n_sites; r++) {
            if (!is_open[r] || p->state[r] == LOC_FIXED_OPEN) continue;
            double loss = 0, scale = 0;
            for (size_t j = 0; j < p->n_units; j++) {
                if (near[j] == (int)r) loss += p->weight[j] * (c2[j] - c1[j]);
                scale += p->weight[j] * c1[j];
            }
            int best = -1;
            double best_delta = -1e-9 * fmax(1.0, scale);
            for (size_t c = 0; c < p->n_sites; c++) {
                if (is_open[c]) continue;
                double g = 0;
                for (size_t k = l.start[c]; k < l.start[c + 1]; k++) {
                    int j = l.unit[k];
                    double cur = near[j] == (int)r ? c2[j] : c1[j];
                    if (l.cost[k] < cur) g += p->weight[j] * (cur - l.cost[k]);
                }
                if (loss - g < best_delta) {
                    best_delta = loss - g;
                    best = (int)c;
                }
            }
            if (best < 0) continue;
            is_open[r] = 0;
            is_open[best] = 1;
            median_state(p, limit, penalty, is_open, near, c1, c2);
            improved = 1;
        }
    }
    for (size_t j = 0; j < p->n_units; j++) total += p->weight[j] * c1[j];
    *cost = total;
done:
    free(near);
    free(c1);
    free(c2);
    lists_destroy(&l);
    return rc;
}
