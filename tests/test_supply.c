/* Tests for the shipment model: trucking worked by hand, two textbook
 * transportation problems with published optima, every shortage reason, and
 * bad input. With "--solve FILE" it reads an instance written by
 * tests/xcheck/supply_scipy.py, solves it and prints the objective, so the
 * cross-check compares GLPK's optimum with scipy's (HiGHS). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "check.h"
#include "supply.h"

static stock_commodity_t comm(const char *name, double kg, double m3, double pack, double prio)
{
    stock_commodity_t c;
    memset(&c, 0, sizeof c);
    c.name = name;
    c.unit = "u";
    c.rate_kind = STOCK_PER_PERSON_DAY;
    c.quantity = 1;
    c.unit_kg = kg;
    c.unit_m3 = m3;
    c.pack_units = pack;
    c.priority = prio;
    return c;
}

static supply_truck_t truck(const char *name, double kg, double m3, int count, double hours)
{
    supply_truck_t t;
    memset(&t, 0, sizeof t);
    t.name = name;
    t.payload_kg = kg;
    t.volume_m3 = m3;
    t.count = count;
    t.hours_s = hours * 3600;
    t.loading_s = 3600;
    return t;
}

/* One-depot, one-site problem around a single commodity and truck type. */
static supply_problem_t one_to_one(const stock_commodity_t *c, const double *stock,
                                   const double *need, const double *storage, const double *time,
                                   const supply_truck_t *t)
{
    supply_problem_t p;
    memset(&p, 0, sizeof p);
    p.n_comm = p.n_depots = p.n_sites = p.n_trucks = 1;
    p.comm = c;
    p.stock = stock;
    p.need = need;
    p.storage_m3 = storage;
    p.time_s = time;
    p.trucks = t;
    p.objective = SUPPLY_MIN_HOURS;
    return p;
}

/* A balanced transportation problem: supply a[i], demand b[j], cost c[i][j]
 * per unit. Mapped onto the model with one commodity of 1 kg per unit, packs
 * of 1, trucks of 1 kg payload (so trips = units), ample truck hours, and a
 * distance of 500 x c[i][j] m at 1 per km driven (there and back) so each trip
 * costs c[i][j]; the model's optimum then equals the textbook's. */
static double transport(size_t m, size_t n, const double *a, const double *b, const double *c,
                        int *all_met)
{
    stock_commodity_t k = comm("units", 1, 0.001, 1, 1);
    supply_truck_t t = truck("unit carrier", 1, 1, 1, 1e6);
    double time[16], dist[16];
    supply_problem_t p;
    supply_result_t r;
    solver_opts_t o;
    err_t e = {0};
    double obj = NAN;

    t.loading_s = 0;
    t.cost_per_m = 0.001;
    for (size_t i = 0; i < m * n; i++) {
        time[i] = 1;
        dist[i] = 500 * c[i];
    }
    memset(&p, 0, sizeof p);
    p.n_comm = 1;
    p.n_depots = m;
    p.n_sites = n;
    p.n_trucks = 1;
    p.comm = &k;
    p.stock = a;
    p.need = b;
    p.time_s = time;
    p.dist_m = dist;
    p.trucks = &t;
    p.objective = SUPPLY_MIN_COST;
    solver_opts_default(&o);
    if (supply_solve(&p, &o, &r, &e) != ERR_OK) {
        fprintf(stderr, "transport: %s\n", e.msg);
        return NAN;
    }
    *all_met = 1;
    for (size_t j = 0; j < r.n_lines; j++) *all_met &= r.lines[j].reason == SUPPLY_MET;
    if (r.status == SOLVER_OPTIMAL) obj = r.trip_cost;
    CHECK_NEAR(r.objective, r.trip_cost, 1e-6);   /* nothing short: no penalty part */
    supply_result_destroy(&r);
    return obj;
}

/* Reads an instance in the format of tests/xcheck/supply_scipy.py and prints
 * "objective V status S". */
static int solve_file(const char *path, const solver_opts_t *o)
{
    FILE *f = fopen(path, "r");
    size_t C, D, S, K;
    int objective, rc = 1, ok = 1;
    double penalty;
    stock_commodity_t *cm = NULL;
    supply_truck_t *tr = NULL;
    double *stock = NULL, *need = NULL, *storage = NULL, *time = NULL, *dist = NULL;
    supply_problem_t p;
    supply_result_t r;
    err_t e = {0};

    if (f == NULL) {
        fprintf(stderr, "cannot open %s\n", path);
        return 1;
    }
    if (fscanf(f, "%zu %zu %zu %zu %d %lf", &C, &D, &S, &K, &objective, &penalty) != 6) goto done;
    cm = calloc(C, sizeof *cm);
    tr = calloc(K, sizeof *tr);
    stock = calloc(D * C, sizeof *stock);
    need = calloc(S * C, sizeof *need);
    storage = calloc(S, sizeof *storage);
    time = calloc(D * S, sizeof *time);
    dist = calloc(D * S, sizeof *dist);
    if (!cm || !tr || !stock || !need || !storage || !time || !dist) goto done;
    for (size_t c = 0; c < C && ok; c++) {
        double kg, m3, pack, prio;
        ok = fscanf(f, "%lf %lf %lf %lf", &kg, &m3, &pack, &prio) == 4;
        cm[c] = comm("c", kg, m3, pack, prio);
    }
    for (size_t i = 0; i < D * C && ok; i++) ok = fscanf(f, "%lf", &stock[i]) == 1;
    for (size_t i = 0; i < S * C && ok; i++) ok = fscanf(f, "%lf", &need[i]) == 1;
    for (size_t i = 0; i < S && ok; i++) ok = fscanf(f, "%lf", &storage[i]) == 1;
    for (size_t i = 0; i < D * S && ok; i++) ok = fscanf(f, "%lf", &time[i]) == 1;
    for (size_t i = 0; i < D * S && ok; i++) ok = fscanf(f, "%lf", &dist[i]) == 1;
    for (size_t k = 0; k < K && ok; k++) {
        supply_truck_t *t = &tr[k];
        t->name = "t";
        ok = fscanf(f, "%lf %lf %d %lf %lf %lf %lf", &t->payload_kg, &t->volume_m3, &t->count,
                    &t->cost_per_hour, &t->cost_per_m, &t->loading_s, &t->hours_s) == 7;
    }
    if (!ok) goto done;
    memset(&p, 0, sizeof p);
    p.n_comm = C;
    p.n_depots = D;
    p.n_sites = S;
    p.n_trucks = K;
    p.comm = cm;
    p.stock = stock;
    p.need = need;
    p.storage_m3 = storage;
    p.time_s = time;
    p.dist_m = dist;
    p.trucks = tr;
    p.objective = objective;
    p.penalty = penalty;
    if (supply_solve(&p, o, &r, &e) != ERR_OK) {
        fprintf(stderr, "%s\n", e.msg);
        goto done;
    }
    printf("objective %.10g status %s gap %.3g seconds %.3f nodes %ld penalty %.10g "
           "truck_hours %.10g short_cost %.10g\n",
           r.objective, solver_status_name(r.status), r.gap, r.seconds, r.nodes, r.penalty,
           r.truck_hours, r.short_cost);
    supply_result_destroy(&r);
    rc = 0;
done:
    if (rc != 0 && !ok) fprintf(stderr, "%s: bad instance file\n", path);
    fclose(f);
    free(cm);
    free(tr);
    free(stock);
    free(need);
    free(storage);
    free(time);
    free(dist);
    return rc;
}

/* Deterministic pseudo-random numbers for the larger instance (an LCG). */
static double rnd(unsigned long *state)
{
    *state = *state * 6364136223846793005UL + 1442695040888963407UL;
    return (double)(*state >> 11) / 9007199254740992.0;
}

/* A plan stopped by its time limit is still a plan: every limit holds. The
 * instance (4 commodities, 3 depots, 25 sites, 2 truck types) is too big for
 * GLPK to prove optimal in 2 s, so this checks the greedy start and the
 * incumbent's bookkeeping rather than optimality. */
static void check_time_limited(void)
{
    enum { C = 4, D = 3, S = 25, K = 2 };
    stock_commodity_t cm[C];
    supply_truck_t tr[K];
    double stock[D * C], need[S * C], storage[S], time[D * S], used_stock[D * C];
    double used_m3[S];
    unsigned long st = 7;
    supply_problem_t p;
    supply_result_t r;
    solver_opts_t o;
    err_t e = {0};

    for (int c = 0; c < C; c++)
        cm[c] = comm("c", 0.5 + rnd(&st), 0.001 + 0.01 * rnd(&st), c % 2 ? 10 : 50, 1 + c % 3);
    for (int k = 0; k < K; k++) {
        tr[k] = truck("t", 3000 + 8000 * rnd(&st), 15 + 30 * rnd(&st), 2 + k, 10);
        tr[k].loading_s = 1800;
    }
    for (int i = 0; i < D * C; i++) stock[i] = floor(400 * rnd(&st)) * cm[i % C].pack_units;
    for (int i = 0; i < S * C; i++) need[i] = floor(60 * rnd(&st)) * cm[i % C].pack_units;
    for (int i = 0; i < S; i++) storage[i] = rnd(&st) < 0.5 ? INFINITY : 5 + 35 * rnd(&st);
    for (int i = 0; i < D * S; i++) time[i] = rnd(&st) < 0.1 ? INFINITY : 600 + 13800 * rnd(&st);
    memset(&p, 0, sizeof p);
    p.n_comm = C;
    p.n_depots = D;
    p.n_sites = S;
    p.n_trucks = K;
    p.comm = cm;
    p.stock = stock;
    p.need = need;
    p.storage_m3 = storage;
    p.time_s = time;
    p.trucks = tr;
    solver_opts_default(&o);
    o.time_limit_s = 2;
    CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
    CHECK(r.status == SOLVER_OPTIMAL || r.status == SOLVER_FEASIBLE);
    CHECK(isfinite(r.objective) && r.gap >= 0);
    CHECK_NEAR(r.trip_cost + r.short_cost, r.objective, 1e-6 * r.objective);
    /* The solver keeps the heuristic start or improves on it. */
    CHECK(isfinite(r.start_objective) && r.objective <= r.start_objective * (1 + 1e-9));
    memset(used_stock, 0, sizeof used_stock);
    memset(used_m3, 0, sizeof used_m3);
    for (size_t i = 0; i < r.n_routes; i++) {
        const supply_route_t *ro = &r.routes[i];
        double cap_kg = 0, cap_m3 = 0;
        for (int k = 0; k < K; k++) {
            cap_kg += ro->trips[k] * tr[k].payload_kg;
            cap_m3 += ro->trips[k] * tr[k].volume_m3;
        }
        CHECK(ro->kg <= cap_kg * (1 + 1e-9) && ro->m3 <= cap_m3 * (1 + 1e-9));
        CHECK(isfinite(ro->time_s));
        for (int c = 0; c < C; c++) {
            used_stock[ro->depot * C + c] += ro->packs[c] * cm[c].pack_units;
            used_m3[ro->site] += ro->packs[c] * cm[c].pack_units * cm[c].unit_m3;
        }
    }
    for (int i = 0; i < D * C; i++) CHECK(used_stock[i] <= stock[i] + 1e-9);
    for (int s = 0; s < S; s++) {
        CHECK(used_m3[s] <= storage[s] * (1 + 1e-9));
        CHECK_NEAR(used_m3[s], r.site_m3[s], 1e-6);
    }
    for (int k = 0; k < K; k++) CHECK(r.hours_used_s[k] <= tr[k].hours_s * tr[k].count + 1e-6);
    for (size_t i = 0; i < r.n_lines; i++) {
        const supply_line_t *l = &r.lines[i];
        CHECK_NEAR(l->delivered + l->short_units, l->needed, 1e-9);
        CHECK(l->needed >= need[i] && l->short_units >= 0);
        CHECK((l->reason == SUPPLY_MET) == (l->short_units == 0));
    }
    supply_result_destroy(&r);
}

int main(int argc, char **argv)
{
    err_t e = {0};
    solver_opts_t o;
    supply_result_t r;
    supply_problem_t p;

    solver_opts_default(&o);
    /* Helper mode: --solve FILE [--cuts] [--time SECONDS]. */
    if (argc >= 3 && strcmp(argv[1], "--solve") == 0) {
        for (int i = 3; i < argc; i++) {
            if (strcmp(argv[i], "--cuts") == 0) o.cuts = 1;
            else if (strcmp(argv[i], "--time") == 0 && i + 1 < argc)
                o.time_limit_s = atof(argv[++i]);
        }
        return solve_file(argv[2], &o);
    }

    /* Water by truck, worked by hand. Sphere (2018) 15 L x 10,000 people x
     * 7 days = 1,050,000 L = 1,050 packs of 1,000 L = 1,050,000 kg. Trucks of
     * 10,000 kg and 12 m3: weight binds, 1,050,000 / 10,000 = 105 trips (volume
     * would need 1,050 / 12 = 87.5). One-way 1 h, loading 1 h: 3 h a trip,
     * 105 x 3 = 315 truck-hours, within 10 trucks x 40 h = 400 h. */
    {
        stock_commodity_t w;
        supply_truck_t t = truck("10 t tanker", 10000, 12, 10, 40);
        double stock = 2e6, need = 1050000, time = 3600;
        CHECK(stock_default("water", &w, &e) == ERR_OK);
        p = one_to_one(&w, &stock, &need, NULL, &time, &t);
        CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
        CHECK(r.status == SOLVER_OPTIMAL);
        CHECK_NEAR(r.gap, 0, 1e-9);
        CHECK_NEAR(r.objective, 315, 1e-6);
        CHECK_NEAR(r.truck_hours, 315, 1e-6);
        CHECK(r.n_routes == 1);
        CHECK_NEAR(r.routes[0].trips[0], 105, 0);
        CHECK_NEAR(r.routes[0].kg_per_trip, 10000, 1e-6);
        CHECK_NEAR(r.routes[0].time_s, 3600, 0);
        CHECK_NEAR(r.lines[0].delivered, 1050000, 1e-6);
        CHECK_NEAR(r.lines[0].packs_delivered, 1050, 0);
        CHECK_NEAR(r.lines[0].m3, 1050, 1e-6);
        CHECK(r.lines[0].reason == SUPPLY_MET);
        CHECK(r.warnings.n == 0);
        supply_result_destroy(&r);

        /* Cost objective: 105 trips x 3 h x 50 per hour = 15,750; plus 20 km
         * each way at 2 per km: 105 x 40 km x 2 = 8,400; total 24,150. */
        {
            double dist = 20000;
            t.cost_per_hour = 50;
            t.cost_per_m = 0.002;
            p.objective = SUPPLY_MIN_COST;
            p.dist_m = &dist;
            CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
            CHECK_NEAR(r.objective, 24150, 1e-6);
            CHECK_NEAR(r.trip_cost, 24150, 1e-6);
            CHECK_NEAR(r.truck_hours, 315, 1e-6);
            CHECK_NEAR(r.routes[0].dist_m, 20000, 0);
            supply_result_destroy(&r);
            /* A given penalty lower than driving: 0.001 per L x priority 3 =
             * 3 per 1,000 L pack, while a trip costs 3 h x 50 + 40 km x 2 = 230
             * for 10 packs (23 a pack): nothing moves, and the reason says the
             * penalty chose it. */
            p.penalty = 0.001;
            CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
            CHECK_NEAR(r.lines[0].delivered, 0, 0);
            CHECK(r.lines[0].reason == SUPPLY_PENALTY);
            CHECK_NEAR(r.objective, 1050000 * 3 * 0.001, 1e-6);
            CHECK_NEAR(r.penalty, 0.001, 0);
            supply_result_destroy(&r);
            p.penalty = 0;
            p.objective = SUPPLY_MIN_HOURS;
            p.dist_m = NULL;
            t.cost_per_hour = 0;
            t.cost_per_m = 0;
        }

        /* The same with 5 trucks x 40 h = 200 h: floor(200 / 3) = 66 trips
         * carry 660 packs = 660,000 L; 390,000 L short, reason "fleet". */
        t.count = 5;
        CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
        CHECK_NEAR(r.routes[0].trips[0], 66, 0);
        CHECK_NEAR(r.lines[0].delivered, 660000, 1e-6);
        CHECK_NEAR(r.lines[0].short_units, 390000, 1e-6);
        CHECK(r.lines[0].reason == SUPPLY_FLEET);
        CHECK_STR_HAS(supply_reason_name(r.lines[0].reason), "fleet");
        CHECK_NEAR(r.hours_used_s[0], 198 * 3600.0, 1e-6);
        supply_result_destroy(&r);

        /* Site storage of 500.5 m3: 500 packs of 1 m3 fit; the rest short,
         * reason "storage". */
        t.count = 10;
        {
            double storage = 500.5;
            p.storage_m3 = &storage;
            CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
            CHECK_NEAR(r.lines[0].packs_delivered, 500, 0);
            CHECK(r.lines[0].reason == SUPPLY_STORAGE);
            CHECK_NEAR(r.site_m3[0], 500, 1e-9);
            supply_result_destroy(&r);
            /* No storage at all: nothing delivered, reason "storage", warned. */
            storage = 0;
            CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
            CHECK_NEAR(r.lines[0].delivered, 0, 0);
            CHECK(r.lines[0].reason == SUPPLY_STORAGE);
            CHECK(r.n_routes == 0);
            CHECK(r.warnings.n == 1);
            if (r.warnings.n == 1) CHECK_STR_HAS(r.warnings.items[0], "no storage");
            supply_result_destroy(&r);
            p.storage_m3 = NULL;
        }

        /* Unreachable site: no road from the depot. */
        time = INFINITY;
        CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
        CHECK(r.lines[0].reason == SUPPLY_UNREACHABLE);
        CHECK_STR_HAS(supply_reason_name(r.lines[0].reason), "unreachable");
        CHECK(r.warnings.n == 2);   /* the site and the depot are both cut off */
        if (r.warnings.n == 2) {
            CHECK_STR_HAS(r.warnings.items[0], "cannot be reached");
            CHECK_STR_HAS(r.warnings.items[1], "depot 0");
        }
        supply_result_destroy(&r);

        /* A round trip longer than one truck's working time (2 x 30 h + 1 h
         * > 40 h) is not split between trucks: reason "fleet". */
        time = 30 * 3600.0;
        CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
        CHECK(r.lines[0].reason == SUPPLY_FLEET);
        CHECK(r.n_routes == 0);
        supply_result_destroy(&r);
        time = 3600;

        /* More demand than the depot holds: 300 packs on hand (plus 999 L of
         * loose water that is not a whole pack), reason "stock". */
        stock = 300999;
        CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
        CHECK_NEAR(r.lines[0].delivered, 300000, 1e-6);
        CHECK(r.lines[0].reason == SUPPLY_STOCK);
        CHECK_STR_HAS(supply_reason_name(r.lines[0].reason), "stock");
        /* 30 trips x 3 h = 90 h, plus 750 packs x 1,000 L short at the
         * automatic penalty (10 x 3 h + 1) / (3 x 1000) per L x priority 3. */
        CHECK_NEAR(r.penalty, 31.0 / 3000, 1e-12);
        CHECK_NEAR(r.objective, 90 + 750000 * 3 * 31.0 / 3000, 1e-6);
        CHECK_NEAR(r.short_cost + r.trip_cost, r.objective, 1e-6);
        supply_result_destroy(&r);

        /* With a time limit the all-short start is offered; same optimum. */
        o.time_limit_s = 30;
        CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
        CHECK(r.status == SOLVER_OPTIMAL);
        CHECK_NEAR(r.objective, 90 + 750000 * 3 * 31.0 / 3000, 1e-6);
        supply_result_destroy(&r);
        o.time_limit_s = 0;

        /* Nothing needed: an empty, optimal plan. */
        need = 0;
        CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
        CHECK(r.status == SOLVER_OPTIMAL);
        CHECK_NEAR(r.objective, 0, 0);
        CHECK(r.lines[0].reason == SUPPLY_MET);
        supply_result_destroy(&r);
    }

    /* Food: 773 bags of 50 kg (38,650 kg, 0.1 m3 a bag: 77.3 m3; see
     * test_stock). A 10,000 kg / 12 m3 truck takes 120 bags by volume
     * (6,000 kg), so volume binds: ceil(773 / 120) = 7 trips (weight alone
     * would need 4). */
    {
        stock_commodity_t f;
        supply_truck_t t = truck("10 t box", 10000, 12, 2, 40);
        double stock = 50000, need = 38650, time = 1800;
        CHECK(stock_default("food", &f, &e) == ERR_OK);
        p = one_to_one(&f, &stock, &need, NULL, &time, &t);
        CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
        CHECK(r.n_routes == 1);
        if (r.n_routes == 1) {
            CHECK_NEAR(r.routes[0].trips[0], 7, 0);
            CHECK_NEAR(r.routes[0].m3, 77.3, 1e-9);
            CHECK_NEAR(r.routes[0].m3_per_trip, 77.3 / 7, 1e-9);
        }
        CHECK_NEAR(r.lines[0].packs_delivered, 773, 0);
        /* 7 trips x (2 x 0.5 h + 1 h) = 14 truck-hours. */
        CHECK_NEAR(r.objective, 14, 1e-9);
        supply_result_destroy(&r);
    }

    /* Priority under a fleet limit: one trip (3 h of 3 h available) of
     * 1,000 kg carries one pack; the priority-5 commodity goes, the other is
     * short with reason "fleet". */
    {
        stock_commodity_t c2[2];
        supply_truck_t t = truck("small", 1000, 10, 1, 3);
        double stock[2] = {1000, 1000}, need[2] = {1000, 1000}, time = 3600;
        c2[0] = comm("blankets", 1, 0.001, 1000, 1);
        c2[1] = comm("medicine", 1, 0.001, 1000, 5);
        p = one_to_one(c2, stock, need, NULL, &time, &t);
        p.n_comm = 2;
        CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
        CHECK_NEAR(r.lines[1].delivered, 1000, 0);
        CHECK_NEAR(r.lines[0].delivered, 0, 0);
        CHECK(r.lines[0].reason == SUPPLY_FLEET);
        CHECK(r.lines[1].reason == SUPPLY_MET);
        supply_result_destroy(&r);

        /* No trucks at all: everything short for "fleet", and warned. */
        t.count = 0;
        CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
        CHECK(r.lines[0].reason == SUPPLY_FLEET && r.lines[1].reason == SUPPLY_FLEET);
        CHECK(r.warnings.n == 1);
        supply_result_destroy(&r);
    }

    /* Two depots, two sites: the near depot runs out and the far one fills in;
     * site B can only be reached from depot 2. Depot 1 holds 5 packs, depot 2
     * holds 3; needs are 6 and 4, so 2 packs are short for "stock". */
    {
        stock_commodity_t k = comm("kits", 10, 0.05, 1, 1);
        supply_truck_t t = truck("pickup", 1000, 10, 4, 40);
        const char *dn[2] = {"North store", "South store"}, *sn[2] = {"Site A", "Site B"};
        double stock[2] = {5, 3}, need[2] = {6, 4};
        double time[4] = {1800, INFINITY, 3600, 3600};
        memset(&p, 0, sizeof p);
        p.n_comm = 1;
        p.n_depots = 2;
        p.n_sites = 2;
        p.n_trucks = 1;
        p.comm = &k;
        p.depot_names = dn;
        p.site_names = sn;
        p.stock = stock;
        p.need = need;
        p.time_s = time;
        p.trucks = &t;
        CHECK(supply_solve(&p, &o, &r, &e) == ERR_OK);
        CHECK_NEAR(r.lines[0].delivered + r.lines[1].delivered, 8, 0);
        CHECK(r.lines[0].reason == SUPPLY_STOCK || r.lines[0].reason == SUPPLY_MET);
        CHECK(r.lines[1].reason == SUPPLY_STOCK || r.lines[1].reason == SUPPLY_MET);
        CHECK(r.lines[0].reason == SUPPLY_STOCK || r.lines[1].reason == SUPPLY_STOCK);
        supply_result_destroy(&r);

        /* Bad input, each message naming what is at fault. */
        t.payload_kg = 0;
        CHECK(supply_solve(&p, &o, &r, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "truck type 'pickup': payload_kg");
        t.payload_kg = 1000;
        t.volume_m3 = -1;
        CHECK(supply_check(&p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "volume_m3");
        t.volume_m3 = 10;
        t.count = -1;
        CHECK(supply_check(&p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "count");
        t.count = 4;
        t.loading_s = NAN;
        CHECK(supply_check(&p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "loading");
        t.loading_s = 0;
        stock[1] = -3;
        CHECK(supply_check(&p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "depot 'South store': stock of 'kits'");
        stock[1] = 3;
        need[0] = NAN;
        CHECK(supply_check(&p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "site 'Site A': need of 'kits'");
        need[0] = 6;
        time[2] = -5;
        CHECK(supply_check(&p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "depot 'South store' -> site 'Site A'");
        time[2] = NAN;
        CHECK(supply_check(&p, &e) == ERR_INPUT);
        time[2] = 3600;
        k.unit_kg = 0;
        CHECK(supply_check(&p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "commodity 'kits': unit_kg");
        k.unit_kg = 10;
        k.pack_units = -1;
        CHECK(supply_check(&p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "pack_units");
        k.pack_units = 1;
        {
            double storage[2] = {1, -1};
            p.storage_m3 = storage;
            CHECK(supply_check(&p, &e) == ERR_INPUT);
            CHECK_STR_HAS(e.msg, "site 'Site B': storage");
            p.storage_m3 = NULL;
        }
        p.penalty = -1;
        CHECK(supply_check(&p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "penalty");
        p.penalty = 0;
        p.objective = 7;
        CHECK(supply_check(&p, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "objective");
        p.objective = SUPPLY_MIN_HOURS;
        CHECK(supply_check(&p, &e) == ERR_OK);
    }

    /* Taha, Operations Research: An Introduction, 8th ed. (2007), Example 5.1-1
     * (the car-shipping example, from memory): plants 1000, 1500, 1200 cars;
     * centres 2300, 1400; costs 80 215 / 100 108 / 102 68. Published optimum
     * 313,200 (also checked with scipy.optimize.linprog when this was written). */
    {
        static const double a[3] = {1000, 1500, 1200}, b[2] = {2300, 1400};
        static const double c[6] = {80, 215, 100, 108, 102, 68};
        int met = 0;
        CHECK_NEAR(transport(3, 2, a, b, c, &met), 313200, 1e-6);
        CHECK(met);
    }
    /* Hillier and Lieberman, Introduction to Operations Research, 9th ed.
     * (2010), section 9.1, the cannery-to-warehouse example (from memory):
     * supplies 75, 125, 100; demands 80, 65, 70, 85; costs 464 513 654 867 /
     * 352 416 690 791 / 995 682 388 685. Published optimum 152,535 (also
     * checked with scipy.optimize.linprog). */
    {
        static const double a[3] = {75, 125, 100}, b[4] = {80, 65, 70, 85};
        static const double c[12] = {464, 513, 654, 867, 352, 416, 690, 791,
                                     995, 682, 388, 685};
        int met = 0;
        CHECK_NEAR(transport(3, 4, a, b, c, &met), 152535, 1e-6);
        CHECK(met);
    }
    check_time_limited();
    CHECK_STR_HAS(supply_reason_name(SUPPLY_PENALTY), "penalty");
    supply_result_destroy(NULL);
    return CHECK_DONE("test_supply");
}
