/* coverage: people counted by travel-time band, by zone (district) and by site,
 * and the capacity-aware assignment that sends overflow to the next nearest
 * site with room. Pure arithmetic on arrays; every person is counted exactly
 * once (bands + unreachable = grid total), which the tests check. */
#ifndef COVERAGE_H
#define COVERAGE_H

#include <stddef.h>
#include <stdint.h>

#include "err.h"

/* People by band. Rows: zone 0..n_zones-1 then "outside zones" (row n_zones);
 * columns: band 0..n_bands-1 (time <= limit k, above limit k-1), then "beyond
 * the last limit" (n_bands), then "unreachable" (n_bands + 1). */
typedef struct band_table {
    size_t n_zones;
    size_t n_bands;
    double limits_s[16];
    double *people;        /* (n_zones + 1) x (n_bands + 2) */
} band_table_t;

#define BAND_COLS(t) ((t)->n_bands + 2)
#define BAND_AT(t, zone, col) ((t)->people[(size_t)(zone) * BAND_COLS(t) + (col)])

/* Count people[c] into bands by time_s[c] (INFINITY = unreachable). zone may be
 * NULL (one zone row, all cells in "outside" row 0 counts as zone 0 then); zone[c]
 * is -1 outside every zone. limits must increase. Caller destroys with
 * coverage_bands_destroy. */
int coverage_bands(size_t n_cells, const double *people, const double *time_s,
                   const int32_t *zone, size_t n_zones, const double *limits_s,
                   size_t n_bands, band_table_t *out, err_t *e);
void coverage_bands_destroy(band_table_t *t);
/* Label of column 'col' of t into buf: "0-30 min", "over 120 min", "unreachable". */
void coverage_band_label(const band_table_t *t, size_t col, char *buf, size_t n);
/* Total of one column over all rows (zones + outside). */
double coverage_band_total(const band_table_t *t, size_t col);

/* Per-site facts from the nearest-site labels. */
typedef struct site_load {
    double people;         /* people whose nearest site this is */
    double beyond_limit;   /* of those, people farther than the limit */
    double sum_time_people;/* person-seconds, for the mean time */
    double max_time_s;     /* farthest person's time */
    double cells;          /* cells in the catchment */
    double area_m2;        /* catchment area */
} site_load_t;

/* Fill loads[0..n_sites-1] from nearest[c] (-1 = unreachable) and time_s[c].
 * area_m2 per cell from row_area_m2[c / nx]. */
int coverage_site_loads(size_t n_cells, size_t nx, const double *people, const double *time_s,
                        const int32_t *nearest, const double *row_area_m2, double limit_s,
                        size_t n_sites, site_load_t *loads, err_t *e);

/* One (site, cell, time) pair within the limit, from bounded searches. */
typedef struct reach_pair {
    int32_t site;
    int64_t cell;
    float time_s;
} reach_pair_t;

/* Capacity-aware assignment: pairs are taken in increasing time (ties: lower site
 * index), and each cell's remaining people go to the site while it has room
 * (splitting a cell when a site fills up). capacity[s] = INFINITY for unlimited.
 * Output: served[s] people per site, and *unserved the people not served within
 * the limit (no site within reach, or every site in reach full), split into
 * *unserved_no_site and *unserved_capacity. 'pairs' is sorted in place. */
int coverage_assign_capacity(size_t n_cells, const double *people, reach_pair_t *pairs,
                             size_t n_pairs, size_t n_sites, const double *capacity,
                             double *served, double *unserved_no_site,
                             double *unserved_capacity, err_t *e);

#endif
