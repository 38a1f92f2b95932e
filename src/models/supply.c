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

static int pos_finite(double v)
{
    return v > 0 && isfinite(v);
}

/* Validates the instance: sizes and arrays, commodity weights, volumes, packs
 * and priorities, stocks, needs, storage, travel times and distances, truck
 * types and the penalty. ERR_INPUT names the depot, site, truck or commodity. */
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
        if (!pos_finite(k->unit_kg)) field = "unit_kg (weight)", v = k->unit_kg;
        else if (!pos_finite(k->unit_m3)) field = "unit_m3 (volume)", v = k->unit_m3;
        else if (!pos_finite(k->pack_units)) field = "pack_units (pack size)", v = k->pack_units;
        else if (!pos_finite(k->priority)) field = "priority", v = k->priority;
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
        if (!pos_finite(t->payload_kg)) field = "payload_kg", v = t->payload_kg;
        else if (!pos_finite(t->volume_m3)) field = "volume_m3", v = t->volume_m3;
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
 * shortage cost per unit before the priority. 'relax' = 1 builds the LP
 * relaxation (every column continuous) with the same columns and rows. */
static int build_mip(const supply_problem_t *p, build_t *b, solver_mip_t *m, int relax,
                     double *penalty, err_t *e)
{
    size_t C = b->C, K = b->K, R = b->R, S = b->S, D = b->D;
    size_t nmax = (R + 1) * (C + K + 1) + S * C + 1;
    int *idx = NULL, first, rc = ERR_OK;
    double *val = NULL, max_trip = 0, min_pp = INFINITY;
    size_t n;
    int kind = relax ? SOLVER_CONTINUOUS : SOLVER_INTEGER;

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
        double max_kg = 0, max_m3 = 0;
        /* The most this route could ever carry bounds its trips (tighter LP). */
        for (size_t c = 0; c < C; c++) {
            double most = fmin(b->need_p[b->rs[r] * C + c], b->stock_p[b->rd[r] * C + c]);
            max_kg += most * p->comm[c].pack_units * p->comm[c].unit_kg;
            max_m3 += most * p->comm[c].pack_units * p->comm[c].unit_m3;
        }
        max_m3 = fmin(max_m3, storage_of(p, b->rs[r]));
        for (size_t k = 0; k < K; k++) {
            const supply_truck_t *tk = &p->trucks[k];
            double cost, hi;
            if (!truck_fits(tk, t)) continue;
            cost = trip_cost(p, tk, t, dm);
            max_trip = fmax(max_trip, cost);
            hi = fmin(floor(tk->hours_s * tk->count / trip_s(tk, t) + 1e-9),
                      ceil(fmax(max_kg / tk->payload_kg, max_m3 / tk->volume_m3) - 1e-9));
            if ((rc = solver_add_cols(m, 1, kind, 0, fmax(hi, 0), &cost, &first, e)))
                goto done;
            b->tcol[r * K + k] = b->ncols = first;
        }
        for (size_t c = 0; c < C; c++) {
            double hi = fmin(b->need_p[b->rs[r] * C + c], b->stock_p[b->rd[r] * C + c]);
            if (!(hi > 0)) continue;
            if ((rc = solver_add_cols(m, 1, kind, 0, hi, NULL, &first, e))) goto done;
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

/* A starting plan under construction; all arrays owned. */
typedef struct draft {
    double *q, *t;                 /* [r*C+c] packs, [r*K+k] trips */
    double *stock, *hours, *room;  /* left: [d*C+c] packs, [k] seconds, [s] m3 */
    size_t *order;                 /* commodities by priority, highest first */
    size_t *scratch;               /* routes or truck types being sorted */
    double *scratch_q;             /* [r*C+c] packs being moved */
} draft_t;

static void draft_free(draft_t *f)
{
    free(f->q);
    free(f->t);
    free(f->stock);
    free(f->hours);
    free(f->room);
    free(f->order);
    free(f->scratch);
    free(f->scratch_q);
    memset(f, 0, sizeof *f);
}

static int draft_init(const supply_problem_t *p, const build_t *b, draft_t *f, err_t *e)
{
    size_t C = b->C, K = b->K, R = b->R;

    memset(f, 0, sizeof *f);
    f->q = calloc(R * C + 1, sizeof *f->q);
    f->t = calloc(R * K + 1, sizeof *f->t);
    f->stock = malloc((b->D * C + 1) * sizeof *f->stock);
    f->hours = malloc((K + 1) * sizeof *f->hours);
    f->room = malloc((b->S + 1) * sizeof *f->room);
    f->order = malloc((C + 1) * sizeof *f->order);
    f->scratch = malloc((R + K + 1) * sizeof *f->scratch);
    f->scratch_q = calloc(R * C + 1, sizeof *f->scratch_q);
    if (!f->q || !f->t || !f->stock || !f->hours || !f->room || !f->order || !f->scratch ||
        !f->scratch_q) {
        draft_free(f);
        return err_set(e, ERR_NOMEM, "out of memory building the supply start plan");
    }
    memcpy(f->stock, b->stock_p, b->D * C * sizeof *f->stock);
    for (size_t k = 0; k < K; k++) f->hours[k] = p->trucks[k].hours_s * p->trucks[k].count;
    for (size_t s = 0; s < b->S; s++) f->room[s] = storage_of(p, s);
    /* Insertion sort: C is small. */
    for (size_t i = 0; i < C; i++) {
        size_t j = i;
        for (; j > 0 && p->comm[f->order[j - 1]].priority < p->comm[i].priority; j--)
            f->order[j] = f->order[j - 1];
        f->order[j] = i;
    }
    return ERR_OK;
}

static double pack_kg(const supply_problem_t *p, size_t c)
{
    return p->comm[c].pack_units * p->comm[c].unit_kg;
}

static double pack_m3(const supply_problem_t *p, size_t c)
{
    return p->comm[c].pack_units * p->comm[c].unit_m3;
}

/* Puts up to 'n' packs of c on route r, within stock and storage left. */
static void draft_take(const supply_problem_t *p, const build_t *b, draft_t *f, size_t r,
                       size_t c, double n)
{
    size_t dc = b->rd[r] * b->C + c, s = b->rs[r];

    n = fmin(n, f->stock[dc]);
    if (isfinite(f->room[s])) n = fmin(n, floor(f->room[s] / pack_m3(p, c) + 1e-9));
    if (!(n > 0) || !b->qcol[r * b->C + c]) return;
    f->q[r * b->C + c] += n;
    f->stock[dc] -= n;
    f->room[s] -= n * pack_m3(p, c);
}

static double draft_got(const build_t *b, const draft_t *f, size_t s, size_t c)
{
    double got = 0;
    for (size_t r = 0; r < b->R; r++)
        if (b->rs[r] == s) got += f->q[r * b->C + c];
    return got;
}

/* Allocation by hand: sites in order, commodities by priority, nearest
 * depot first, within stock and storage. */
static void alloc_nearest(const supply_problem_t *p, const build_t *b, draft_t *f)
{
    size_t S = b->S, *rord = f->scratch;

    for (size_t s = 0; s < S; s++) {
        size_t nr = 0;
        for (size_t r = 0; r < b->R; r++) {
            size_t j;
            if (b->rs[r] != s) continue;
            for (j = nr++; j > 0 && p->time_s[b->rd[rord[j - 1]] * S + s] >
                                        p->time_s[b->rd[r] * S + s]; j--)
                rord[j] = rord[j - 1];
            rord[j] = r;
        }
        for (size_t i = 0; i < b->C; i++) {
            size_t c = f->order[i];
            for (size_t j = 0; j < nr; j++)
                draft_take(p, b, f, rord[j], c, b->need_p[s * b->C + c] - draft_got(b, f, s, c));
        }
    }
}

/* Allocation from the LP relaxation: its packs rounded down (which keeps
 * need, stock and storage rows satisfied). */
static void alloc_from_lp(const supply_problem_t *p, const build_t *b, draft_t *f,
                          const double *x)
{
    for (size_t r = 0; r < b->R; r++)
        for (size_t c = 0; c < b->C; c++)
            if (b->qcol[r * b->C + c])
                draft_take(p, b, f, r, c, floor(x[b->qcol[r * b->C + c]] + 1e-6));
}

/* Load (kg, m3) and capacity (kg, m3) of route r in a draft. */
static void route_load(const supply_problem_t *p, const build_t *b, const draft_t *f, size_t r,
                       double *kg, double *m3, double *cap_kg, double *cap_m3)
{
    *kg = *m3 = *cap_kg = *cap_m3 = 0;
    for (size_t c = 0; c < b->C; c++) {
        *kg += f->q[r * b->C + c] * pack_kg(p, c);
        *m3 += f->q[r * b->C + c] * pack_m3(p, c);
    }
    for (size_t k = 0; k < b->K; k++) {
        *cap_kg += f->t[r * b->K + k] * p->trucks[k].payload_kg;
        *cap_m3 += f->t[r * b->K + k] * p->trucks[k].volume_m3;
    }
}

/* Trips for the allocated loads: per route, the truck type cheapest per kg
 * first, within the hours left; a load the trips cannot take is trimmed,
 * lowest priority first; then spare room on the trips is filled. Trips
 * already in the draft stay, so a second call only adds what is missing. */
static void plan_trips(const supply_problem_t *p, const build_t *b, draft_t *f)
{
    size_t C = b->C, K = b->K, S = b->S, *kord = f->scratch;

    for (size_t r = 0; r < b->R; r++) {
        size_t s = b->rs[r], nk = 0;
        double tt = p->time_s[b->rd[r] * S + s];
        double kg, m3, kg_left, m3_left, cap_kg, cap_m3;
        route_load(p, b, f, r, &kg, &m3, &cap_kg, &cap_m3);
        for (size_t k = 0; k < K; k++) {
            size_t j;
            double ck;
            if (!b->tcol[r * K + k]) continue;
            ck = trip_cost(p, &p->trucks[k], tt, 0) / p->trucks[k].payload_kg;
            for (j = nk++; j > 0 && trip_cost(p, &p->trucks[kord[j - 1]], tt, 0) /
                                        p->trucks[kord[j - 1]].payload_kg > ck; j--)
                kord[j] = kord[j - 1];
            kord[j] = k;
        }
        /* Only what the trips already planned cannot carry needs new trips. */
        kg_left = kg - cap_kg;
        m3_left = m3 - cap_m3;
        for (size_t j = 0; j < nk && (kg_left > 0 || m3_left > 0); j++) {
            const supply_truck_t *tk = &p->trucks[kord[j]];
            double want = ceil(fmax(kg_left / tk->payload_kg, m3_left / tk->volume_m3) - 1e-9);
            double n = fmax(0, fmin(want, floor(f->hours[kord[j]] / trip_s(tk, tt) + 1e-9)));
            f->t[r * K + kord[j]] += n;
            f->hours[kord[j]] -= n * trip_s(tk, tt);
            kg_left -= n * tk->payload_kg;
            m3_left -= n * tk->volume_m3;
            cap_kg += n * tk->payload_kg;
            cap_m3 += n * tk->volume_m3;
        }
        for (size_t i = C; i-- > 0 && (kg > cap_kg * (1 + 1e-12) || m3 > cap_m3 * (1 + 1e-12));) {
            size_t c = f->order[i];
            double drop = ceil(fmax((kg - cap_kg) / pack_kg(p, c), (m3 - cap_m3) / pack_m3(p, c))
                               - 1e-9);
            drop = fmax(0, fmin(drop, f->q[r * C + c]));
            f->q[r * C + c] -= drop;
            kg -= drop * pack_kg(p, c);
            m3 -= drop * pack_m3(p, c);
            f->stock[b->rd[r] * C + c] += drop;
            f->room[s] += drop * pack_m3(p, c);
        }
        for (size_t i = 0; i < C; i++) {
            size_t c = f->order[i];
            double add = b->need_p[s * C + c] - draft_got(b, f, s, c);
            add = fmin(add, floor((cap_kg - kg) / pack_kg(p, c) + 1e-9));
            add = fmin(add, floor((cap_m3 - m3) / pack_m3(p, c) + 1e-9));
            if (!(add > 0)) continue;
            double before = f->q[r * C + c];
            draft_take(p, b, f, r, c, add);
            kg += (f->q[r * C + c] - before) * pack_kg(p, c);
            m3 += (f->q[r * C + c] - before) * pack_m3(p, c);
        }
    }
}

/* Local search on a draft: a route whose whole load fits in the spare room
 * of other routes into the same site (from depots with stock left) is closed
 * and its trips go back to the fleet. One pass in route order; that is enough
 * to undo most of the splits that rounding the LP leaves. */
static void merge_routes(const supply_problem_t *p, const build_t *b, draft_t *f)
{
    size_t C = b->C, K = b->K, S = b->S;

    for (size_t r = 0; r < b->R; r++) {
        size_t s = b->rs[r];
        double trips = 0;
        double *moved = f->scratch_q;
        int ok = 1;
        for (size_t k = 0; k < K; k++) trips += f->t[r * K + k];
        if (trips < 0.5) continue;
        memset(moved, 0, b->R * C * sizeof *moved);
        for (size_t c = 0; c < C && ok; c++) {
            double left = f->q[r * C + c];
            for (size_t r2 = 0; r2 < b->R && left > 0; r2++) {
                double kg2, m32, ck2, cm2, n;
                if (r2 == r || b->rs[r2] != s || !b->qcol[r2 * C + c]) continue;
                route_load(p, b, f, r2, &kg2, &m32, &ck2, &cm2);
                for (size_t cc = 0; cc < C; cc++) {
                    kg2 += moved[r2 * C + cc] * pack_kg(p, cc);
                    m32 += moved[r2 * C + cc] * pack_m3(p, cc);
                }
                /* Each depot appears once among the routes into s. */
                n = fmin(left, f->stock[b->rd[r2] * C + c]);
                n = fmin(n, floor((ck2 - kg2) / pack_kg(p, c) + 1e-9));
                n = fmin(n, floor((cm2 - m32) / pack_m3(p, c) + 1e-9));
                if (!(n > 0)) continue;
                moved[r2 * C + c] += n;
                left -= n;
            }
            ok = !(left > 0);
        }
        if (!ok) continue;
        /* Commit: stock moves between depots; the site's volume is unchanged. */
        for (size_t r2 = 0; r2 < b->R; r2++)
            for (size_t c = 0; c < C; c++) {
                double n = moved[r2 * C + c];
                if (!(n > 0)) continue;
                f->q[r2 * C + c] += n;
                f->stock[b->rd[r2] * C + c] -= n;
            }
        for (size_t c = 0; c < C; c++) {
            f->stock[b->rd[r] * C + c] += f->q[r * C + c];
            f->q[r * C + c] = 0;
        }
        for (size_t k = 0; k < K; k++) {
            double tt = p->time_s[b->rd[r] * S + s];
            f->hours[k] += f->t[r * K + k] * trip_s(&p->trucks[k], tt);
            f->t[r * K + k] = 0;
        }
    }
}

/* Objective of a draft, and its start vector x[1..ncols] when x is not NULL. */
static double draft_cost(const supply_problem_t *p, const build_t *b, const draft_t *f,
                         double penalty, double *x)
{
    size_t C = b->C, K = b->K, S = b->S;
    double cost = 0;

    if (x != NULL) memset(x, 0, ((size_t)b->ncols + 1) * sizeof *x);
    for (size_t r = 0; r < b->R; r++) {
        size_t ds = b->rd[r] * S + b->rs[r];
        for (size_t k = 0; k < K; k++) {
            if (!b->tcol[r * K + k]) continue;
            cost += f->t[r * K + k] *
                    trip_cost(p, &p->trucks[k], p->time_s[ds], p->dist_m ? p->dist_m[ds] : 0);
            if (x != NULL) x[b->tcol[r * K + k]] = f->t[r * K + k];
        }
        for (size_t c = 0; c < C; c++)
            if (x != NULL && b->qcol[r * C + c]) x[b->qcol[r * C + c]] = f->q[r * C + c];
    }
    for (size_t s = 0; s < S; s++)
        for (size_t c = 0; c < C; c++) {
            double u;
            if (!b->ucol[s * C + c]) continue;
            u = b->need_p[s * C + c] - draft_got(b, f, s, c);
            cost += u * penalty * p->comm[c].priority * p->comm[c].pack_units;
            if (x != NULL) x[b->ucol[s * C + c]] = u;
        }
    return cost;
}

/* The starting plan handed to GLPK: the better of two drafts, one allocated
 * nearest-depot-first, one from the LP relaxation rounded down; both get
 * their trips from plan_trips, so both keep every row. 'o' limits the LP. */
static int make_start(const supply_problem_t *p, const build_t *b, const solver_opts_t *o,
                      double penalty, double *x, double *cost, double *lp_s, err_t *e)
{
    draft_t f;
    build_t bl;
    solver_mip_t *lp = NULL;
    solver_result_t lr;
    double pen_lp, c2;
    int rc;

    memset(&bl, 0, sizeof bl);
    memset(&lr, 0, sizeof lr);
    if ((rc = draft_init(p, b, &f, e))) return rc;
    alloc_nearest(p, b, &f);
    plan_trips(p, b, &f);
    merge_routes(p, b, &f);
    alloc_nearest(p, b, &f);   /* hours freed by merging may carry more */
    plan_trips(p, b, &f);
    *cost = draft_cost(p, b, &f, penalty, x);
    draft_free(&f);

    /* The relaxation is built by the same code, so its columns match b's. */
    if ((rc = find_routes(p, &bl, e))) goto done;
    if ((rc = solver_mip_new("supply LP relaxation", SOLVER_MIN, &lp, e))) goto done;
    if ((rc = build_mip(p, &bl, lp, 1, &pen_lp, e))) goto done;
    if ((rc = solver_solve(lp, o, NULL, &lr, e))) goto done;
    *lp_s = lr.seconds;
    if (lr.x == NULL || bl.ncols != b->ncols) goto done;   /* no LP plan: keep the first */
    if ((rc = draft_init(p, b, &f, e))) goto done;
    alloc_from_lp(p, b, &f, lr.x);
    plan_trips(p, b, &f);
    merge_routes(p, b, &f);
    alloc_nearest(p, b, &f);   /* hours freed by merging may carry more */
    plan_trips(p, b, &f);
    c2 = draft_cost(p, b, &f, penalty, NULL);
    if (c2 < *cost) *cost = draft_cost(p, b, &f, penalty, x);
    draft_free(&f);
done:
    solver_result_destroy(&lr);
    solver_mip_free(lp);
    build_free(&bl);
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
        if (!o->trips || !o->packs)
            return err_set(e, ERR_NOMEM, "out of memory reading the supply plan");
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
    solver_opts_t mo;
    double *start = NULL, penalty = 0, lp_s = 0;
    int rc = ERR_OK;

    memset(&b, 0, sizeof b);
    memset(&sr, 0, sizeof sr);
    memset(res, 0, sizeof *res);
    warn_init(&res->warnings);
    res->objective = res->bound = res->gap = NAN;
    if ((rc = supply_check(p, e))) goto done;
    if ((rc = find_routes(p, &b, e))) goto done;
    if ((rc = solver_mip_new("supply", SOLVER_MIN, &m, e))) goto done;
    if ((rc = build_mip(p, &b, m, 0, &penalty, e))) goto done;
    res->penalty = penalty;
    add_warnings(p, &b, res);

    if (b.ncols == 0) {
        /* Nothing needed at all: an empty plan, trivially optimal. */
        res->status = SOLVER_OPTIMAL;
        res->objective = res->bound = res->gap = 0;
        rc = read_plan(p, &b, NULL, penalty, res, e);
        goto done;
    }
    start = calloc((size_t)b.ncols + 1, sizeof *start);
    if (start == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory building the supply model");
        goto done;
    }
    if ((rc = make_start(p, &b, o, penalty, start, &res->start_objective, &lp_s, e))) goto done;
    /* The time limit covers the relaxation and the MIP together. */
    mo = *o;
    if (mo.time_limit_s > 0) mo.time_limit_s = fmax(1.0, mo.time_limit_s - lp_s);
    if ((rc = solver_solve(m, &mo, start, &sr, e))) goto done;
    res->status = sr.status;
    res->objective = sr.objective;
    res->bound = sr.bound;
    res->gap = sr.gap;
    res->nodes = sr.nodes;
    res->seconds = sr.seconds + lp_s;   /* the relaxation for the start counts too */
    if (sr.status == SOLVER_INFEASIBLE || sr.status == SOLVER_UNBOUNDED) {
        /* Shortage columns make every instance feasible and costs are >= 0. */
        rc = err_set(e, ERR_INTERNAL, "supply model came back %s; this is a bug",
                     solver_status_name(sr.status));
        goto done;
    }
    if (sr.status == SOLVER_NO_PLAN) {
        /* Stopped before GLPK took the start: the start is the plan. */
        res->status = SOLVER_FEASIBLE;
        res->objective = res->start_objective;
        res->gap = isfinite(sr.bound) ? fabs(res->objective - sr.bound) /
                                            fmax(fabs(res->objective), 1e-9) : INFINITY;
        warn_add(&res->warnings, "the solver stopped at its time limit before improving the "
                 "starting plan; the plan is the heuristic one");
        rc = read_plan(p, &b, start, penalty, res, e);
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

/* Frees what a result owns and leaves it empty; NULL-safe, may run twice. */
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

/* Short name of a shortage reason, as used in reports and docs/supply.md. */
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
