/* supply: the depot->site shipment MIP (see include/supply.h, docs/supply.md).
 * Columns: q[c][r] whole packs of commodity c on route r (a reachable depot->
 * site pair), t[r][k] whole trips of truck type k on route r, u[c][s] packs
 * short. Rows: need (delivered + short = need), depot stock, weight and volume
 * per route, fleet hours per truck type, site storage. Routes that cannot
 * carry anything (no road, nothing to send, no storage, no truck that can
 * make the round trip) get no columns at all, which keeps the MIP small.
 * Reasons for shortages are read afterwards from which rows have no room. */
#include "supply.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

typedef struct names {
    char a[48], b[48];
} names_t;

static const char *depot_name(const supply_problem_t *p, size_t d, char *buf, size_t n)
{
    if (p->depot_names != NULL && p->depot_names[d] != NULL) return p->depot_names[d];
    snprintf(buf, n, "depot %zu", d);
    return buf;
}

static const char *site_name(const supply_problem_t *p, size_t s, char *buf, size_t n)
{
    if (p->site_names != NULL && p->site_names[s] != NULL) return p->site_names[s];
    snprintf(buf, n, "site %zu", s);
    return buf;
}

static const char *comm_name(const stock_commodity_t *c)
{
    return (c->name != NULL && c->name[0] != '\0') ? c->name : "(unnamed)";
}

static const char *truck_name(const supply_truck_t *t)
{
    return (t->name != NULL && t->name[0] != '\0') ? t->name : "(unnamed)";
}

/* NaN fails every comparison, so "!(v >= 0)" also rejects it. */
static int nonneg_finite(double v)
{
    return v >= 0 && isfinite(v);
}

int supply_check(const supply_problem_t *p, err_t *e)
{
    names_t nm;

    if (p->n_comm > 0 && p->comm == NULL)
        return err_set(e, ERR_INTERNAL, "supply model: no commodity table");
    if ((p->n_depots * p->n_comm > 0 && p->stock == NULL) ||
        (p->n_sites * p->n_comm > 0 && p->need == NULL) ||
        (p->n_depots * p->n_sites > 0 && p->time_s == NULL) ||
        (p->n_trucks > 0 && p->trucks == NULL))
        return err_set(e, ERR_INTERNAL, "supply model: an input array is missing");
    if (p->objective != SUPPLY_MIN_HOURS && p->objective != SUPPLY_MIN_COST)
        return err_set(e, ERR_INPUT, "supply model: unknown objective %d (hours or cost)",
                       p->objective);
    if (!nonneg_finite(p->penalty))
        return err_set(e, ERR_INPUT, "supply model: shortage penalty must be >= 0 (got %g; 0 = "
                       "automatic)", p->penalty);
    for (size_t c = 0; c < p->n_comm; c++) {
        const stock_commodity_t *k = &p->comm[c];
        const char *field = NULL;
        double v = 0;
        if (!(k->unit_kg > 0) || !isfinite(k->unit_kg)) field = "unit_kg (weight)", v = k->unit_kg;
        else if (!(k->unit_m3 > 0) || !isfinite(k->unit_m3)) field = "unit_m3 (volume)", v = k->unit_m3;
        else if (!(k->pack_units > 0) || !isfinite(k->pack_units))
            field = "pack_units (pack size)", v = k->pack_units;
        else if (!(k->priority > 0) || !isfinite(k->priority)) field = "priority", v = k->priority;
        if (field != NULL)
            return err_set(e, ERR_INPUT, "commodity '%s': %s must be a number > 0 (got %g)",
                           comm_name(k), field, v);
    }
    for (size_t d = 0; d < p->n_depots; d++)
        for (size_t c = 0; c < p->n_comm; c++)
            if (!nonneg_finite(p->stock[d * p->n_comm + c]))
                return err_set(e, ERR_INPUT, "depot '%s': stock of '%s' must be >= 0 (got %g)",
                               depot_name(p, d, nm.a, sizeof nm.a), comm_name(&p->comm[c]),
                               p->stock[d * p->n_comm + c]);
    for (size_t s = 0; s < p->n_sites; s++) {
        for (size_t c = 0; c < p->n_comm; c++)
            if (!nonneg_finite(p->need[s * p->n_comm + c]))
                return err_set(e, ERR_INPUT, "site '%s': need of '%s' must be >= 0 (got %g)",
                               site_name(p, s, nm.a, sizeof nm.a), comm_name(&p->comm[c]),
                               p->need[s * p->n_comm + c]);
        if (p->storage_m3 != NULL && !(p->storage_m3[s] >= 0))
            return err_set(e, ERR_INPUT, "site '%s': storage must be >= 0 m3 or unlimited (got %g)",
                           site_name(p, s, nm.a, sizeof nm.a), p->storage_m3[s]);
    }
    for (size_t d = 0; d < p->n_depots; d++)
        for (size_t s = 0; s < p->n_sites; s++) {
            double t = p->time_s[d * p->n_sites + s];
            double m = p->dist_m != NULL ? p->dist_m[d * p->n_sites + s] : 0;
            if (!(t >= 0))
                return err_set(e, ERR_INPUT, "depot '%s' -> site '%s': travel time must be >= 0 s "
                               "or INFINITY for no road (got %g)",
                               depot_name(p, d, nm.a, sizeof nm.a),
                               site_name(p, s, nm.b, sizeof nm.b), t);
            if (isfinite(t) && !nonneg_finite(m))
                return err_set(e, ERR_INPUT, "depot '%s' -> site '%s': distance must be >= 0 m "
                               "(got %g)", depot_name(p, d, nm.a, sizeof nm.a),
                               site_name(p, s, nm.b, sizeof nm.b), m);
        }
    for (size_t k = 0; k < p->n_trucks; k++) {
        const supply_truck_t *t = &p->trucks[k];
        const char *field = NULL;
        double v = 0;
        if (!(t->payload_kg > 0) || !isfinite(t->payload_kg)) field = "payload_kg", v = t->payload_kg;
        else if (!(t->volume_m3 > 0) || !isfinite(t->volume_m3)) field = "volume_m3", v = t->volume_m3;
        if (field != NULL)
            return err_set(e, ERR_INPUT, "truck type '%s': %s must be > 0 (got %g)",
                           truck_name(t), field, v);
        if (t->count < 0)
            return err_set(e, ERR_INPUT, "truck type '%s': count must be >= 0 (got %d)",
                           truck_name(t), t->count);
        if (!nonneg_finite(t->cost_per_hour)) field = "cost_per_hour", v = t->cost_per_hour;
        else if (!nonneg_finite(t->cost_per_m)) field = "cost_per_km", v = t->cost_per_m * 1000;
        else if (!nonneg_finite(t->loading_s)) field = "loading_min", v = t->loading_s / 60;
        else if (!nonneg_finite(t->hours_s)) field = "hours", v = t->hours_s / 3600;
        if (field != NULL)
            return err_set(e, ERR_INPUT, "truck type '%s': %s must be >= 0 (got %g)",
                           truck_name(t), field, v);
    }
    return ERR_OK;
}

/* Whole packs on hand: loose units short of a pack cannot be shipped as one. */
static double packs_on_hand(double units, double pack)
{
    double r = units / pack;
    return floor(r + 1e-9 * fmax(1.0, r));
}

/* Seconds of one round trip of type k on a pair with one-way time t. */
static double trip_s(const supply_truck_t *k, double t)
{
    return 2 * t + k->loading_s;
}

/* A truck type can serve a pair when it exists and one truck can do the round
 * trip within its own working time (a trip is not split between trucks). */
static int truck_fits(const supply_truck_t *k, double t)
{
    return k->count > 0 && k->hours_s > 0 && isfinite(t) && trip_s(k, t) <= k->hours_s;
}

static double trip_cost(const supply_problem_t *p, const supply_truck_t *k, double t, double m)
{
    double h = trip_s(k, t) / 3600.0;
    if (p->objective == SUPPLY_MIN_HOURS) return h;
    return k->cost_per_hour * h + k->cost_per_m * 2 * m;
}

/* Working data for one solve; all arrays owned. */
typedef struct build {
    size_t C, D, S, K, R;
    double *need_p, *stock_p;   /* [s*C+c], [d*C+c] packs */
    size_t *rd, *rs;            /* [r] depot and site of route r */
    int *qcol, *tcol, *ucol;    /* [r*C+c], [r*K+k], [s*C+c]; 0 = no column */
    int ncols;
} build_t;

static void build_free(build_t *b)
{
    free(b->need_p);
    free(b->stock_p);
    free(b->rd);
    free(b->rs);
    free(b->qcol);
    free(b->tcol);
    free(b->ucol);
}

static double storage_of(const supply_problem_t *p, size_t s)
{
    return p->storage_m3 != NULL ? p->storage_m3[s] : INFINITY;
}

/* Finds the routes worth columns: reachable, storage > 0, a truck that fits,
 * and at least one commodity both needed at the site and held at the depot. */
static int find_routes(const supply_problem_t *p, build_t *b, err_t *e)
{
    size_t C = p->n_comm, cap = p->n_depots * p->n_sites;

    b->C = C;
    b->D = p->n_depots;
    b->S = p->n_sites;
    b->K = p->n_trucks;
    b->need_p = calloc(p->n_sites * C + 1, sizeof *b->need_p);
    b->stock_p = calloc(p->n_depots * C + 1, sizeof *b->stock_p);
    b->rd = calloc(cap + 1, sizeof *b->rd);
    b->rs = calloc(cap + 1, sizeof *b->rs);
    if (!b->need_p || !b->stock_p || !b->rd || !b->rs)
        return err_set(e, ERR_NOMEM, "out of memory building the supply model");
    for (size_t s = 0; s < p->n_sites; s++)
        for (size_t c = 0; c < C; c++)
            b->need_p[s * C + c] = stock_packs(p->need[s * C + c], p->comm[c].pack_units);
    for (size_t d = 0; d < p->n_depots; d++)
        for (size_t c = 0; c < C; c++)
            b->stock_p[d * C + c] = packs_on_hand(p->stock[d * C + c], p->comm[c].pack_units);
    for (size_t d = 0; d < p->n_depots; d++)
        for (size_t s = 0; s < p->n_sites; s++) {
            double t = p->time_s[d * p->n_sites + s];
            int any_truck = 0, any_comm = 0;
            if (!isfinite(t) || !(storage_of(p, s) > 0)) continue;
            for (size_t k = 0; k < p->n_trucks; k++) any_truck |= truck_fits(&p->trucks[k], t);
            for (size_t c = 0; c < C; c++)
                any_comm |= b->need_p[s * C + c] > 0 && b->stock_p[d * C + c] > 0;
            if (!any_truck || !any_comm) continue;
            b->rd[b->R] = d;
            b->rs[b->R] = s;
            b->R++;
        }
    return ERR_OK;
}

static int add_row(solver_mip_t *m, size_t nnz, const int *idx, const double *val, double lo,
                   double hi, err_t *e)
{
    if (nnz == 0) return ERR_OK;
    return solver_add_row(m, nnz, idx, val, lo, hi, NULL, e);
}

/* Builds the MIP into 'm' and the column maps into 'b'; *penalty gets the
 * shortage cost per unit before the priority. */
static int build_mip(const supply_problem_t *p, build_t *b, solver_mip_t *m, double *penalty,
                     err_t *e)
{
    size_t C = b->C, K = b->K, R = b->R, S = b->S, D = b->D;
    size_t nmax = (R + 1) * (C + K + 1) + S * C + 1;
    int *idx = NULL, first, rc = ERR_OK;
    double *val = NULL, max_trip = 0, min_pp = INFINITY;
    size_t n;

    b->qcol = calloc(R * C + 1, sizeof *b->qcol);
    b->tcol = calloc(R * K + 1, sizeof *b->tcol);
    b->ucol = calloc(S * C + 1, sizeof *b->ucol);
    idx = malloc(nmax * sizeof *idx);
    val = malloc(nmax * sizeof *val);
    if (!b->qcol || !b->tcol || !b->ucol || !idx || !val) {
        rc = err_set(e, ERR_NOMEM, "out of memory building the supply model");
        goto done;
    }

    /* Trips first: their costs set the automatic penalty. */
    for (size_t r = 0; r < R; r++) {
        size_t ds = b->rd[r] * S + b->rs[r];
        double t = p->time_s[ds], dm = p->dist_m ? p->dist_m[ds] : 0;
        for (size_t k = 0; k < K; k++) {
            double cost;
            if (!truck_fits(&p->trucks[k], t)) continue;
            cost = trip_cost(p, &p->trucks[k], t, dm);
            max_trip = fmax(max_trip, cost);
            if ((rc = solver_add_cols(m, 1, SOLVER_INTEGER, 0, INFINITY, &cost, &first, e)))
                goto done;
            b->tcol[r * K + k] = b->ncols = first;
        }
        for (size_t c = 0; c < C; c++) {
            double hi = fmin(b->need_p[b->rs[r] * C + c], b->stock_p[b->rd[r] * C + c]);
            if (!(hi > 0)) continue;
            if ((rc = solver_add_cols(m, 1, SOLVER_INTEGER, 0, hi, NULL, &first, e))) goto done;
            b->qcol[r * C + c] = b->ncols = first;
        }
    }
    for (size_t c = 0; c < C; c++)
        min_pp = fmin(min_pp, p->comm[c].priority * p->comm[c].pack_units);
    /* Automatic: one pack short costs at least ten of the dearest trips, so any
     * pack that one more trip could carry is carried (docs/supply.md). */
    *penalty = p->penalty > 0 ? p->penalty : (10 * max_trip + 1) / (isfinite(min_pp) ? min_pp : 1);
    for (size_t s = 0; s < S; s++)
        for (size_t c = 0; c < C; c++) {
            double np = b->need_p[s * C + c];
            double cost = *penalty * p->comm[c].priority * p->comm[c].pack_units;
            if (!(np > 0)) continue;
            if ((rc = solver_add_cols(m, 1, SOLVER_CONTINUOUS, 0, np, &cost, &first, e)))
                goto done;
            b->ucol[s * C + c] = b->ncols = first;
        }

    /* need: sum_r q[c][r] + u[c][s] = need packs. */
    for (size_t s = 0; s < S; s++)
        for (size_t c = 0; c < C; c++) {
            if (b->ucol[s * C + c] == 0) continue;
            n = 0;
            for (size_t r = 0; r < R; r++)
                if (b->rs[r] == s && b->qcol[r * C + c]) {
                    idx[n] = b->qcol[r * C + c];
                    val[n++] = 1;
                }
            idx[n] = b->ucol[s * C + c];
            val[n++] = 1;
            if ((rc = add_row(m, n, idx, val, b->need_p[s * C + c], b->need_p[s * C + c], e)))
                goto done;
        }
    /* depot stock: sum_r q[c][r] <= stock packs. */
    for (size_t d = 0; d < D; d++)
        for (size_t c = 0; c < C; c++) {
            n = 0;
            for (size_t r = 0; r < R; r++)
                if (b->rd[r] == d && b->qcol[r * C + c]) {
                    idx[n] = b->qcol[r * C + c];
                    val[n++] = 1;
                }
            if ((rc = add_row(m, n, idx, val, -INFINITY, b->stock_p[d * C + c], e))) goto done;
        }
    /* weight and volume per route: load <= sum_k capacity_k x trips_k. */
    for (int vol = 0; vol < 2; vol++)
        for (size_t r = 0; r < R; r++) {
            n = 0;
            for (size_t c = 0; c < C; c++)
                if (b->qcol[r * C + c]) {
                    const stock_commodity_t *k = &p->comm[c];
                    idx[n] = b->qcol[r * C + c];
                    val[n++] = k->pack_units * (vol ? k->unit_m3 : k->unit_kg);
                }
            for (size_t k = 0; k < K; k++)
                if (b->tcol[r * K + k]) {
                    idx[n] = b->tcol[r * K + k];
                    val[n++] = -(vol ? p->trucks[k].volume_m3 : p->trucks[k].payload_kg);
                }
            if ((rc = add_row(m, n, idx, val, -INFINITY, 0, e))) goto done;
        }
    /* fleet hours per type: sum_r trips x (2 x time + loading) <= hours x count. */
    for (size_t k = 0; k < K; k++) {
        const supply_truck_t *tk = &p->trucks[k];
        n = 0;
        for (size_t r = 0; r < R; r++)
            if (b->tcol[r * K + k]) {
                idx[n] = b->tcol[r * K + k];
                val[n++] = trip_s(tk, p->time_s[b->rd[r] * S + b->rs[r]]) / 3600.0;
            }
        if ((rc = add_row(m, n, idx, val, -INFINITY, tk->hours_s / 3600.0 * tk->count, e)))
            goto done;
    }
    /* site storage: sum volume delivered <= storage (m3). */
    for (size_t s = 0; s < S; s++) {
        if (!isfinite(storage_of(p, s))) continue;
        n = 0;
        for (size_t r = 0; r < R; r++)
            if (b->rs[r] == s)
                for (size_t c = 0; c < C; c++)
                    if (b->qcol[r * C + c]) {
                        idx[n] = b->qcol[r * C + c];
                        val[n++] = p->comm[c].pack_units * p->comm[c].unit_m3;
                    }
        if ((rc = add_row(m, n, idx, val, -INFINITY, storage_of(p, s), e))) goto done;
    }
done:
    free(idx);
    free(val);
    return rc;
}

static double whole(double x)
{
    return floor(x + 0.5);
}

/* Why is commodity c short at site s? Checks, in this order, which limit
 * leaves no room for one more pack (docs/supply.md, "Reasons"). */
static int find_reason(const supply_problem_t *p, const build_t *b, const double *x,
                       const double *used_s, const double *site_m3, size_t s, size_t c)
{
    size_t C = b->C, S = b->S;
    const stock_commodity_t *k = &p->comm[c];
    double pack_kg = k->pack_units * k->unit_kg, pack_m3 = k->pack_units * k->unit_m3;
    int any_road = 0, any_stock = 0;

    for (size_t d = 0; d < b->D; d++) any_road |= isfinite(p->time_s[d * S + s]);
    if (!any_road) return SUPPLY_UNREACHABLE;
    if (site_m3[s] + pack_m3 > storage_of(p, s) * (1 + 1e-9) + 1e-9) return SUPPLY_STORAGE;
    for (size_t d = 0; d < b->D; d++) {
        double t = p->time_s[d * S + s], left = b->stock_p[d * C + c];
        if (!isfinite(t)) continue;
        for (size_t r = 0; r < b->R; r++)
            if (b->rd[r] == d && b->qcol[r * C + c]) left -= whole(x[b->qcol[r * C + c]]);
        if (left < 0.5) continue;
        any_stock = 1;
        /* Room on this pair: a type with hours left for one more round trip,
         * or spare capacity on the trips already planned. */
        for (size_t kk = 0; kk < b->K; kk++) {
            const supply_truck_t *tk = &p->trucks[kk];
            if (truck_fits(tk, t) &&
                used_s[kk] + trip_s(tk, t) <= tk->hours_s * tk->count * (1 + 1e-9))
                return SUPPLY_PENALTY;
        }
        for (size_t r = 0; r < b->R; r++) {
            double kg = 0, m3 = 0, cap_kg = 0, cap_m3 = 0;
            if (b->rd[r] != d || b->rs[r] != s) continue;
            for (size_t cc = 0; cc < C; cc++)
                if (b->qcol[r * C + cc]) {
                    double q = whole(x[b->qcol[r * C + cc]]);
                    kg += q * p->comm[cc].pack_units * p->comm[cc].unit_kg;
                    m3 += q * p->comm[cc].pack_units * p->comm[cc].unit_m3;
                }
            for (size_t kk = 0; kk < b->K; kk++)
                if (b->tcol[r * b->K + kk]) {
                    double t_ = whole(x[b->tcol[r * b->K + kk]]);
                    cap_kg += t_ * p->trucks[kk].payload_kg;
                    cap_m3 += t_ * p->trucks[kk].volume_m3;
                }
            if (kg + pack_kg <= cap_kg * (1 + 1e-9) && m3 + pack_m3 <= cap_m3 * (1 + 1e-9))
                return SUPPLY_PENALTY;
        }
    }
    if (!any_stock) return SUPPLY_STOCK;
    return SUPPLY_FLEET;
}

static void add_warnings(const supply_problem_t *p, const build_t *b, supply_result_t *res)
{
    names_t nm;
    size_t C = b->C, S = b->S;

    for (size_t s = 0; s < S; s++) {
        double needs = 0;
        int road = 0;
        for (size_t c = 0; c < C; c++) needs += b->need_p[s * C + c];
        for (size_t d = 0; d < b->D; d++) road |= isfinite(p->time_s[d * S + s]);
        if (needs > 0 && storage_of(p, s) == 0)
            warn_add(&res->warnings, "site '%s' has no storage (0 m3): nothing can be delivered "
                     "there", site_name(p, s, nm.a, sizeof nm.a));
        if (needs > 0 && !road)
            warn_add(&res->warnings, "site '%s' cannot be reached by road from any depot",
                     site_name(p, s, nm.a, sizeof nm.a));
    }
    for (size_t d = 0; d < b->D; d++) {
        int road = 0;
        for (size_t s = 0; s < S; s++) road |= isfinite(p->time_s[d * S + s]);
        if (!road && S > 0)
            warn_add(&res->warnings, "depot '%s' is not reachable from any site (no road): its "
                     "stock is unused", depot_name(p, d, nm.a, sizeof nm.a));
    }
    for (size_t k = 0; k < b->K; k++)
        if (p->trucks[k].count == 0 || p->trucks[k].hours_s == 0)
            warn_add(&res->warnings, "truck type '%s' has no trucks or no working hours",
                     truck_name(&p->trucks[k]));
}

/* Reads the plan in x into the result (x may be NULL: nothing delivered). */
static int read_plan(const supply_problem_t *p, const build_t *b, const double *x,
                     double penalty, supply_result_t *res, err_t *e)
{
    size_t C = b->C, S = b->S, K = b->K, R = b->R, nr = 0;

    res->n_lines = S * C;
    res->lines = calloc(S * C + 1, sizeof *res->lines);
    res->hours_used_s = calloc(K + 1, sizeof *res->hours_used_s);
    res->site_m3 = calloc(S + 1, sizeof *res->site_m3);
    res->routes = calloc(R + 1, sizeof *res->routes);
    if (!res->lines || !res->hours_used_s || !res->site_m3 || !res->routes)
        return err_set(e, ERR_NOMEM, "out of memory reading the supply plan");

    for (size_t r = 0; r < R && x != NULL; r++) {
        size_t ds = b->rd[r] * S + b->rs[r];
        double trips = 0, tt = p->time_s[ds];
        supply_route_t *o = &res->routes[nr];
        for (size_t k = 0; k < K; k++)
            if (b->tcol[r * K + k]) trips += whole(x[b->tcol[r * K + k]]);
        if (trips < 0.5) continue;
        o->depot = b->rd[r];
        o->site = b->rs[r];
        o->time_s = tt;
        o->dist_m = p->dist_m ? p->dist_m[ds] : 0;
        o->trips = calloc(K + 1, sizeof *o->trips);
        o->packs = calloc(C + 1, sizeof *o->packs);
        nr++;
        res->n_routes = nr;
        if (!o->trips || !o->packs) return err_set(e, ERR_NOMEM, "out of memory reading the supply plan");
        for (size_t k = 0; k < K; k++) {
            double n = b->tcol[r * K + k] ? whole(x[b->tcol[r * K + k]]) : 0;
            o->trips[k] = n;
            o->truck_hours += n * trip_s(&p->trucks[k], tt) / 3600.0;
            res->hours_used_s[k] += n * trip_s(&p->trucks[k], tt);
            res->trip_cost += n * trip_cost(p, &p->trucks[k], tt, o->dist_m);
        }
        for (size_t c = 0; c < C; c++) {
            double q = b->qcol[r * C + c] ? whole(x[b->qcol[r * C + c]]) : 0;
            o->packs[c] = q;
            o->kg += q * p->comm[c].pack_units * p->comm[c].unit_kg;
            o->m3 += q * p->comm[c].pack_units * p->comm[c].unit_m3;
        }
        o->kg_per_trip = o->kg / trips;
        o->m3_per_trip = o->m3 / trips;
        res->truck_hours += o->truck_hours;
    }
    for (size_t s = 0; s < S; s++)
        for (size_t c = 0; c < C; c++) {
            supply_line_t *l = &res->lines[s * C + c];
            const stock_commodity_t *k = &p->comm[c];
            double got = 0;
            for (size_t r = 0; r < R && x != NULL; r++)
                if (b->rs[r] == s && b->qcol[r * C + c]) got += whole(x[b->qcol[r * C + c]]);
            l->site = s;
            l->comm = c;
            l->packs_needed = b->need_p[s * C + c];
            l->packs_delivered = got;
            l->needed = l->packs_needed * k->pack_units;
            l->delivered = got * k->pack_units;
            l->short_units = l->needed - l->delivered;
            l->kg = l->delivered * k->unit_kg;
            l->m3 = l->delivered * k->unit_m3;
            res->site_m3[s] += l->m3;
            res->short_cost += penalty * k->priority * l->short_units;
        }
    for (size_t s = 0; s < S; s++)
        for (size_t c = 0; c < C; c++) {
            supply_line_t *l = &res->lines[s * C + c];
            if (l->packs_needed - l->packs_delivered < 0.5) l->reason = SUPPLY_MET;
            else if (x == NULL) l->reason = SUPPLY_NO_PLAN;
            else l->reason = find_reason(p, b, x, res->hours_used_s, res->site_m3, s, c);
        }
    return ERR_OK;
}

/* Builds and solves the shipment MIP (see the file comment and docs/supply.md).
 * With a time limit the all-short plan is offered as a start, so a plan is
 * always found; without one GLPK's presolver stays on. */
int supply_solve(const supply_problem_t *p, const solver_opts_t *o, supply_result_t *res,
                 err_t *e)
{
    build_t b;
    solver_mip_t *m = NULL;
    solver_result_t sr;
    double *start = NULL, penalty = 0;
    int rc = ERR_OK;

    memset(&b, 0, sizeof b);
    memset(&sr, 0, sizeof sr);
    memset(res, 0, sizeof *res);
    warn_init(&res->warnings);
    res->objective = res->bound = res->gap = NAN;
    if ((rc = supply_check(p, e))) goto done;
    if ((rc = find_routes(p, &b, e))) goto done;
    if ((rc = solver_mip_new("supply", SOLVER_MIN, &m, e))) goto done;
    if ((rc = build_mip(p, &b, m, &penalty, e))) goto done;
    res->penalty = penalty;
    add_warnings(p, &b, res);

    if (b.ncols == 0) {
        /* Nothing needed at all: an empty plan, trivially optimal. */
        res->status = SOLVER_OPTIMAL;
        res->objective = res->bound = res->gap = 0;
        rc = read_plan(p, &b, NULL, penalty, res, e);
        goto done;
    }
    if (o->time_limit_s > 0) {
        start = calloc((size_t)b.ncols + 1, sizeof *start);
        if (start == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory building the supply model");
            goto done;
        }
        for (size_t i = 0; i < b.S * b.C; i++)
            if (b.ucol[i]) start[b.ucol[i]] = b.need_p[i];
    }
    if ((rc = solver_solve(m, o, start, &sr, e))) goto done;
    res->status = sr.status;
    res->objective = sr.objective;
    res->bound = sr.bound;
    res->gap = sr.gap;
    res->nodes = sr.nodes;
    res->seconds = sr.seconds;
    if (sr.status == SOLVER_INFEASIBLE || sr.status == SOLVER_UNBOUNDED) {
        /* Shortage columns make every instance feasible and costs are >= 0. */
        rc = err_set(e, ERR_INTERNAL, "supply model came back %s; this is a bug",
                     solver_status_name(sr.status));
        goto done;
    }
    rc = read_plan(p, &b, sr.x, penalty, res, e);
done:
    if (rc != ERR_OK) supply_result_destroy(res);
    solver_result_destroy(&sr);
    solver_mip_free(m);
    build_free(&b);
    free(start);
    return rc;
}

void supply_result_destroy(supply_result_t *r)
{
    if (r == NULL) return;
    for (size_t i = 0; i < r->n_routes; i++) {
        free(r->routes[i].trips);
        free(r->routes[i].packs);
    }
    free(r->routes);
    free(r->lines);
    free(r->hours_used_s);
    free(r->site_m3);
    warn_destroy(&r->warnings);
    r->routes = NULL;
    r->lines = NULL;
    r->hours_used_s = NULL;
    r->site_m3 = NULL;
    r->n_routes = r->n_lines = 0;
}

const char *supply_reason_name(int reason)
{
    switch (reason) {
    case SUPPLY_MET: return "met";
    case SUPPLY_STOCK: return "stock";
    case SUPPLY_FLEET: return "fleet";
    case SUPPLY_STORAGE: return "storage";
    case SUPPLY_UNREACHABLE: return "unreachable";
    case SUPPLY_PENALTY: return "penalty";
    case SUPPLY_NO_PLAN: return "no plan";
    default: return "unknown";
    }
}
