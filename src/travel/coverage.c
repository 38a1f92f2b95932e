/* coverage: band tables, site loads, capacity-aware assignment
 * (see include/coverage.h). Sums run in long double so that the conservation
 * check (bands + unreachable = total) holds to far better than 1e-9. */
#include "coverage.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int coverage_bands(size_t n_cells, const double *people, const double *time_s,
                   const int32_t *zone, size_t n_zones, const double *limits_s,
                   size_t n_bands, band_table_t *out, err_t *e)
{
    long double *acc = NULL;
    size_t cols = n_bands + 2, rows = n_zones + 1;

    memset(out, 0, sizeof *out);
    if (n_bands == 0 || n_bands > 16)
        return err_set(e, ERR_INPUT, "between 1 and 16 band limits are needed, got %zu", n_bands);
    for (size_t k = 0; k < n_bands; k++) {
        if (!(limits_s[k] > 0) || (k > 0 && !(limits_s[k] > limits_s[k - 1])))
            return err_set(e, ERR_INPUT, "band limits must be positive and increasing (limit %zu is %g min)",
                           k + 1, limits_s[k] / 60.0);
        out->limits_s[k] = limits_s[k];
    }
    acc = calloc(rows * cols, sizeof *acc);
    out->people = calloc(rows * cols, sizeof *out->people);
    if (acc == NULL || out->people == NULL) {
        free(acc);
        coverage_bands_destroy(out);
        return err_set(e, ERR_NOMEM, "out of memory counting people by band");
    }
    out->n_zones = n_zones;
    out->n_bands = n_bands;
    for (size_t c = 0; c < n_cells; c++) {
        double p = people[c];
        size_t col, row;
        double t;
        if (p == 0) continue;
        t = time_s[c];
        if (!isfinite(t)) {
            col = n_bands + 1;
        } else {
            col = n_bands;
            for (size_t k = 0; k < n_bands; k++)
                if (t <= limits_s[k]) {
                    col = k;
                    break;
                }
        }
        row = (zone != NULL && zone[c] >= 0 && (size_t)zone[c] < n_zones) ? (size_t)zone[c]
                                                                           : n_zones;
        acc[row * cols + col] += p;
    }
    for (size_t i = 0; i < rows * cols; i++) out->people[i] = (double)acc[i];
    free(acc);
    return ERR_OK;
}

void coverage_bands_destroy(band_table_t *t)
{
    if (t == NULL) return;
    free(t->people);
    t->people = NULL;
}

void coverage_band_label(const band_table_t *t, size_t col, char *buf, size_t n)
{
    if (col < t->n_bands)
        snprintf(buf, n, "%g-%g min", col ? t->limits_s[col - 1] / 60.0 : 0.0,
                 t->limits_s[col] / 60.0);
    else if (col == t->n_bands)
        snprintf(buf, n, "over %g min", t->limits_s[t->n_bands - 1] / 60.0);
    else
        snprintf(buf, n, "unreachable");
}

double coverage_band_total(const band_table_t *t, size_t col)
{
    long double s = 0;
    for (size_t r = 0; r <= t->n_zones; r++) s += BAND_AT(t, r, col);
    return (double)s;
}

int coverage_site_loads(size_t n_cells, size_t nx, const double *people, const double *time_s,
                        const int32_t *nearest, const double *row_area_m2, double limit_s,
                        size_t n_sites, site_load_t *loads, err_t *e)
{
    memset(loads, 0, n_sites * sizeof *loads);
    for (size_t c = 0; c < n_cells; c++) {
        int32_t s = nearest[c];
        site_load_t *l;
        if (s < 0) continue;
        if ((size_t)s >= n_sites)
            return err_set(e, ERR_INTERNAL, "cell %zu names site %d of %zu", c, s, n_sites);
        l = &loads[s];
        l->cells += 1;
        l->area_m2 += row_area_m2[c / nx];
        if (people[c] == 0) continue;
        l->people += people[c];
        l->sum_time_people += people[c] * time_s[c];
        if (time_s[c] > l->max_time_s) l->max_time_s = time_s[c];
        if (time_s[c] > limit_s) l->beyond_limit += people[c];
    }
    return ERR_OK;
}

static int cmp_pair(const void *a, const void *b)
{
    const reach_pair_t *p = a, *q = b;
    if (p->time_s != q->time_s) return p->time_s < q->time_s ? -1 : 1;
    if (p->site != q->site) return p->site < q->site ? -1 : 1;
    return (p->cell > q->cell) - (p->cell < q->cell);
}

int coverage_assign_capacity(size_t n_cells, const double *people, reach_pair_t *pairs,
                             size_t n_pairs, size_t n_sites, const double *capacity,
                             double *served, double *unserved_no_site,
                             double *unserved_capacity, err_t *e)
{
    double *left = NULL, *room = NULL;
    unsigned char *reached = NULL;
    long double no_site = 0, full = 0;

    left = malloc(n_cells * sizeof *left);
    room = malloc(n_sites * sizeof *room);
    reached = calloc(n_cells, 1);
    if ((n_cells && (left == NULL || reached == NULL)) || (n_sites && room == NULL)) {
        free(left);
        free(room);
        free(reached);
        return err_set(e, ERR_NOMEM, "out of memory assigning people to sites");
    }
    memcpy(left, people, n_cells * sizeof *left);
    for (size_t s = 0; s < n_sites; s++) {
        room[s] = capacity[s];
        served[s] = 0;
    }
    qsort(pairs, n_pairs, sizeof *pairs, cmp_pair);
    for (size_t k = 0; k < n_pairs; k++) {
        reach_pair_t *p = &pairs[k];
        double take;
        if (p->cell < 0 || (size_t)p->cell >= n_cells || p->site < 0 || (size_t)p->site >= n_sites) {
            free(left);
            free(room);
            free(reached);
            return err_set(e, ERR_INTERNAL, "reach pair %zu out of range", k);
        }
        reached[p->cell] = 1;
        if (left[p->cell] <= 0 || room[p->site] <= 0) continue;
        take = fmin(left[p->cell], room[p->site]);
        left[p->cell] -= take;
        room[p->site] -= take;
        served[p->site] += take;
    }
    for (size_t c = 0; c < n_cells; c++) {
        if (left[c] <= 0) continue;
        if (reached[c]) full += left[c];
        else no_site += left[c];
    }
    *unserved_no_site = (double)no_site;
    *unserved_capacity = (double)full;
    free(left);
    free(room);
    free(reached);
    return ERR_OK;
}
