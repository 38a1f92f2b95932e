/* Tests for band tables, site loads and the capacity-aware assignment.
 * All values are worked by hand in the comments. */
#include <math.h>

#include "check.h"
#include "coverage.h"

int main(void)
{
    err_t e = {0};
    /* Six cells: times 10, 40, 70, 130 minutes, unreachable, and 0 people. */
    double people[6] = {100, 200, 300, 400, 500, 0};
    double t[6] = {600, 2400, 4200, 7800, INFINITY, 60};
    int32_t zone[6] = {0, 0, 1, 1, -1, 0};
    double lim[3] = {1800, 3600, 7200};
    band_table_t b;

    CHECK(coverage_bands(6, people, t, zone, 2, lim, 3, &b, &e) == ERR_OK);
    CHECK(BAND_COLS(&b) == 5);
    CHECK_NEAR(BAND_AT(&b, 0, 0), 100, 0);   /* zone 0, <= 30 min */
    CHECK_NEAR(BAND_AT(&b, 0, 1), 200, 0);   /* zone 0, 30-60 */
    CHECK_NEAR(BAND_AT(&b, 1, 2), 300, 0);   /* zone 1, 60-120 */
    CHECK_NEAR(BAND_AT(&b, 1, 3), 400, 0);   /* zone 1, beyond 120 */
    CHECK_NEAR(BAND_AT(&b, 2, 4), 500, 0);   /* outside zones, unreachable */
    {
        /* Conservation: every column over every row adds up to the total 1500. */
        double s = 0;
        for (size_t c = 0; c < BAND_COLS(&b); c++) s += coverage_band_total(&b, c);
        CHECK_NEAR(s, 1500, 0);
    }
    {
        char lab[32];
        coverage_band_label(&b, 0, lab, sizeof lab);
        CHECK(strcmp(lab, "0-30 min") == 0);
        coverage_band_label(&b, 2, lab, sizeof lab);
        CHECK(strcmp(lab, "60-120 min") == 0);
        coverage_band_label(&b, 3, lab, sizeof lab);
        CHECK(strcmp(lab, "over 120 min") == 0);
        coverage_band_label(&b, 4, lab, sizeof lab);
        CHECK(strcmp(lab, "unreachable") == 0);
    }
    coverage_bands_destroy(&b);

    /* A time exactly on a limit belongs to that band (<= limit). */
    {
        double t2[1] = {1800};
        double p2[1] = {7};
        CHECK(coverage_bands(1, p2, t2, NULL, 0, lim, 3, &b, &e) == ERR_OK);
        CHECK_NEAR(BAND_AT(&b, 0, 0), 7, 0);
        coverage_bands_destroy(&b);
    }
    /* Limits must increase. */
    {
        double bad[2] = {3600, 1800};
        CHECK(coverage_bands(6, people, t, NULL, 0, bad, 2, &b, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "increasing");
    }

    /* Site loads: cells 0,1 to site 0, cells 2,3 to site 1, cell 4 unreachable. */
    {
        int32_t near[6] = {0, 0, 1, 1, -1, 0};
        double area[2] = {10000, 20000};     /* nx = 3: rows 0 and 1 */
        site_load_t l[2];
        CHECK(coverage_site_loads(6, 3, people, t, near, area, 3600, 2, l, &e) == ERR_OK);
        CHECK_NEAR(l[0].people, 300, 0);
        CHECK_NEAR(l[1].people, 700, 0);
        CHECK_NEAR(l[1].beyond_limit, 700, 0);  /* 70 and 130 minutes > 60 */
        CHECK_NEAR(l[0].beyond_limit, 0, 0);
        CHECK_NEAR(l[0].max_time_s, 2400, 0);
        CHECK_NEAR(l[0].cells, 3, 0);            /* cells 0, 1, 5 */
        CHECK_NEAR(l[0].area_m2, 10000 + 10000 + 20000, 0);
        /* mean time of site 0 = (100*600 + 200*2400) / 300 = 1800 s */
        CHECK_NEAR(l[0].sum_time_people / l[0].people, 1800, 1e-9);
    }

    /* Capacity: two sites of 250 and 1000 people. Cell 0 (100) is 5 min from
     * site 0 and 20 from site 1; cell 1 (200) is 10 min from site 0 and 15
     * from site 1; cell 2 (300) 30 min from site 1 only; cell 3 (400) is
     * reached by nobody. Order: c0-s0 (100 -> s0, room 150), c1-s0 (150 -> s0,
     * full; 50 left), c1-s1 (50 -> s1), c0-s1 (nothing left), c2-s1 (300).
     * Served: s0 250, s1 350. Unserved: 400 with no site + cell 4's 500. */
    {
        reach_pair_t pr[5] = {{1, 0, 1200}, {0, 1, 600}, {1, 1, 900}, {0, 0, 300}, {1, 2, 1800}};
        double cap[2] = {250, 1000}, served[2], none, full;
        CHECK(coverage_assign_capacity(6, people, pr, 5, 2, cap, served, &none, &full, &e) ==
              ERR_OK);
        CHECK_NEAR(served[0], 250, 0);
        CHECK_NEAR(served[1], 350, 0);
        CHECK_NEAR(none, 900, 0);
        CHECK_NEAR(full, 0, 0);
        CHECK_NEAR(served[0] + served[1] + none + full, 1500, 0);
    }
    /* Everyone reached but too little room: the rest is unserved for capacity. */
    {
        double p1[2] = {100, 100};
        reach_pair_t pr[2] = {{0, 0, 10}, {0, 1, 20}};
        double cap[1] = {150}, served[1], none, full;
        CHECK(coverage_assign_capacity(2, p1, pr, 2, 1, cap, served, &none, &full, &e) == ERR_OK);
        CHECK_NEAR(served[0], 150, 0);
        CHECK_NEAR(full, 50, 0);
        CHECK_NEAR(none, 0, 0);
    }
    return CHECK_DONE("test_coverage");
}
