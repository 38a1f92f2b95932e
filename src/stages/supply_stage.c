/* supply_stage: stock and shipments for a set of open sites (see
 * include/supply_stage.h). Scenario values are turned into the plain arrays of
 * the stock and supply models here; the models know nothing of files. */
#include "supply_stage.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "output.h"
#include "progress.h"
#include "scen_supply.h"
#include "table.h"

const char supply_stage_caution[] =
    "Ration and water figures are planning defaults (Sphere Handbook 2018 minimums unless "
    "the scenario says otherwise): check them against local guidance and the affected "
    "population's actual needs (children, the sick, climate, cooking fuel) before ordering "
    "or shipping anything.";

int supply_stage_persons_from_reach(const reach_result_t *r, double *persons)
{
    for (size_t s = 0; s < r->n_sites; s++)
        persons[s] = r->has_capacity && r->served ? r->served[s] : r->loads[s].people;
    return r->has_capacity && r->served ? SUPPLY_STAGE_CAPACITY : SUPPLY_STAGE_NEAREST;
}

void supply_stage_destroy(supply_stage_t *st)
{
    if (st == NULL) return;
    free(st->comm);
    free(st->trucks);
    free(st->persons);
    free(st->stock);
    free(st->need);
    free(st->depot_stock);
    free(st->active);
    free(st->active_stock);
    depots_travel_destroy(&st->travel);
    free(st->time_s);
    free(st->dist_m);
    supply_result_destroy(&st->res);
    warn_destroy(&st->warnings);
    memset(st, 0, sizeof *st);
}

/* Scenario commodity -> model commodity: keys the file left out (NAN, -1,
 * NULL) come from stock_default for water, food and shelter. */
static int fill_commodity(const scen_t *s, size_t i, stock_commodity_t *out, err_t *e)
{
    const scen_commodity_t *k = &s->supply->comm[i];
    stock_commodity_t d;
    err_t ignore = {0};
    int rc;

    if (stock_default(k->name, &d, &ignore) != ERR_OK) {
        memset(&d, 0, sizeof d);
        d.rate_kind = STOCK_PER_PERSON_DAY;
        d.household_size = 5;
        d.priority = 1;
    }
    *out = d;
    out->name = k->name;
    if (k->unit != NULL) out->unit = k->unit;
    if (k->rate_kind >= 0) out->rate_kind = k->rate_kind;   /* SCEN_RATE_* == STOCK_* */
    if (!isnan(k->quantity)) out->quantity = k->quantity;
    if (!isnan(k->household_size)) out->household_size = k->household_size;
    if (!isnan(k->unit_kg)) out->unit_kg = k->unit_kg;
    if (!isnan(k->unit_m3)) out->unit_m3 = k->unit_m3;
    if (!isnan(k->pack_units)) out->pack_units = k->pack_units;
    if (!isnan(k->priority)) out->priority = k->priority;
    out->group_share = k->group_share;
    if (out->unit == NULL) out->unit = "unit";
    rc = stock_commodity_check(out, e);
    if (rc != ERR_OK) err_prefix(e, "%s: supply.commodities[%zu]", s->file, i);
    return rc;
}

static int find_depot(const points_t *p, const char *id)
{
    for (size_t i = 0; i < p->n; i++)
        if (strcmp(p->id[i], id) == 0) return (int)i;
    return -1;
}

/* Scenario settings into the stage: commodities, policy, fleet, depot stock. */
static int setup(const inputs_t *in, supply_stage_t *st, err_t *e)
{
    const scen_t *s = in->scen;
    const struct scen_supply *x = s->supply;
    size_t C, D;
    int rc;

    if (x == NULL)
        return err_set(e, ERR_INPUT, "scenario '%s' has no 'supply' section: add commodities, "
                       "fleet and depot_stock (docs/plan.md)", s->file);
    if (in->depots == NULL || in->depots->n == 0)
        return err_set(e, ERR_INPUT, "scenario '%s': supply needs depots; give a point layer "
                       "in sites.depots", s->file);
    C = st->n_comm = x->n_comm;
    D = st->n_depots = in->depots->n;
    st->n_trucks = x->n_trucks;
    st->comm = calloc(C + 1, sizeof *st->comm);
    st->trucks = calloc(st->n_trucks + 1, sizeof *st->trucks);
    st->depot_stock = calloc(D * C + 1, sizeof *st->depot_stock);
    if (!st->comm || !st->trucks || !st->depot_stock)
        return err_set(e, ERR_NOMEM, "out of memory for the supply stage");
    for (size_t c = 0; c < C; c++)
        if ((rc = fill_commodity(s, c, &st->comm[c], e)) != ERR_OK) return rc;
    st->policy.cover_s = x->cover_s;
    st->policy.lead_s = x->lead_s;
    st->policy.buffer = x->buffer;
    if ((rc = stock_policy_check(&st->policy, e)) != ERR_OK) {
        err_prefix(e, "%s: supply", s->file);
        return rc;
    }
    for (size_t k = 0; k < st->n_trucks; k++) {
        const scen_truck_t *t = &x->trucks[k];
        st->trucks[k] = (supply_truck_t){t->name, t->payload_kg, t->volume_m3, t->count,
                                         t->cost_per_hour, t->cost_per_m, t->loading_s,
                                         t->hours_s};
    }
    for (size_t i = 0; i < x->n_depots; i++) {
        int d = find_depot(in->depots, x->depots[i].depot_id);
        if (d < 0)
            return err_set(e, ERR_INPUT, "%s: supply.depot_stock names depot '%s', which is not "
                           "in sites.depots ('%s', %zu depots, first id '%s')", s->file,
                           x->depots[i].depot_id, s->depots.path, in->depots->n,
                           in->depots->id[0]);
        for (size_t c = 0; c < C; c++)
            st->depot_stock[(size_t)d * C + c] = x->depots[i].units[c];
    }
    /* Depots without any stock take no part in travel or the model. */
    st->active = malloc((D + 1) * sizeof *st->active);
    st->active_stock = malloc((D * C + 1) * sizeof *st->active_stock);
    if (!st->active || !st->active_stock)
        return err_set(e, ERR_NOMEM, "out of memory for the supply stage");
    {
        size_t n_empty = 0;
        char list[256] = "";
        for (size_t d = 0; d < D; d++) {
            double any = 0;
            for (size_t c = 0; c < C; c++) any += st->depot_stock[d * C + c];
            if (any > 0) {
                memcpy(&st->active_stock[st->n_active * C], &st->depot_stock[d * C],
                       C * sizeof *st->active_stock);
                st->active[st->n_active++] = d;
            } else if (n_empty++ < 5) {
                size_t used = strlen(list);
                snprintf(list + used, sizeof list - used, "%s'%s'", used ? ", " : "",
                         in->depots->id[d]);
            }
        }
        if (n_empty > 0)
            warn_add(&st->warnings, "%zu depot%s of sites.depots ha%s no stock in "
                     "supply.depot_stock and send%s nothing: %s%s", n_empty,
                     n_empty > 1 ? "s" : "", n_empty > 1 ? "ve" : "s", n_empty > 1 ? "" : "s",
                     list, n_empty > 5 ? ", ..." : "");
    }
    return ERR_OK;
}

int supply_stage_run(const inputs_t *in, const points_t *sites, const double *persons,
                     int assignment, supply_stage_t *st, err_t *e)
{
    const struct scen_supply *x = in->scen->supply;
    const char **dnames = NULL, **snames = NULL;
    double *dx = NULL, *dy = NULL;
    supply_problem_t p;
    solver_opts_t so;
    progress_t pr;
    size_t S, C, D;
    int rc;

    memset(st, 0, sizeof *st);
    warn_init(&st->warnings);
    st->assignment = assignment;
    progress_init(&pr, 1);
    if ((rc = setup(in, st, e)) != ERR_OK) return rc;
    S = st->n_sites = sites ? sites->n : 0;
    C = st->n_comm;
    D = st->n_active;
    if (S == 0)
        return err_set(e, ERR_INPUT, "scenario '%s': supply has no open sites to serve; give "
                       "sites.existing (or a siting section)", in->scen->file);
    st->persons = malloc(S * sizeof *st->persons);
    st->stock = calloc(S * C + 1, sizeof *st->stock);
    st->need = calloc(S * C + 1, sizeof *st->need);
    st->time_s = malloc((D * S + 1) * sizeof *st->time_s);
    st->dist_m = malloc((D * S + 1) * sizeof *st->dist_m);
    dnames = malloc((D + 1) * sizeof *dnames);
    dx = malloc((D + 1) * sizeof *dx);
    dy = malloc((D + 1) * sizeof *dy);
    snames = malloc((S + 1) * sizeof *snames);
    if (!st->persons || !st->stock || !st->need || !st->time_s || !st->dist_m || !dnames ||
        !snames || !dx || !dy) {
        rc = err_set(e, ERR_NOMEM, "out of memory for the supply stage");
        goto done;
    }
    for (size_t s = 0; s < S; s++) {
        st->persons[s] = persons[s] > 0 ? persons[s] : 0;
        snames[s] = sites->id[s];
        rc = stock_size_site(st->comm, C, &st->policy, st->persons[s], &st->stock[s * C], NULL,
                             e);
        if (rc != ERR_OK) {
            err_prefix(e, "site '%s'", sites->id[s]);
            goto done;
        }
        for (size_t c = 0; c < C; c++) st->need[s * C + c] = st->stock[s * C + c].units;
    }
    for (size_t a = 0; a < D; a++) {
        dnames[a] = in->depots->id[st->active[a]];
        dx[a] = in->depots->x[st->active[a]];
        dy[a] = in->depots->y[st->active[a]];
    }

    /* Depot -> site on the vehicle roads. The model charges 2 x time per trip,
     * so it gets half the round trip: one-way streets make out and back differ. */
    st->seconds_travel = progress_now();
    rc = depots_travel(in->roads, in->grid->geographic, dx, dy, D,
                       sites->x, sites->y, S, x->access_mps, x->max_access_m, &st->travel, e);
    st->seconds_travel = progress_now() - st->seconds_travel;
    if (rc != ERR_OK) goto done;
    for (size_t i = 0; i < D * S; i++) {
        double o = st->travel.out_s[i], b = st->travel.back_s[i];
        int ok = isfinite(o) && isfinite(b);
        st->time_s[i] = ok ? (o + b) / 2 : INFINITY;
        st->dist_m[i] = ok ? (st->travel.out_m[i] + st->travel.back_m[i]) / 2 : 0;
    }
    {
        /* "More than N m from a road" misleads when no road takes vehicles at all. */
        int any_open = 0;
        if (in->roads != NULL)
            for (size_t k = 0; k < in->roads->n_classes; k++)
                if (in->roads->classes[k].n_features > 0 && in->roads->classes[k].vehicle_mps > 0)
                    any_open = 1;
        if (!any_open)
            warn_add(&st->warnings, "no road is open to vehicles (%s), so nothing can be "
                     "trucked; give inputs.roads, or vehicle_kmh above 0 in travel.road_speeds",
                     in->roads == NULL ? "the scenario has no roads"
                                       : "every road class has vehicle speed 0");
    }
    for (size_t a = 0; a < D; a++)
        if (st->travel.from_seg[a] < 0)
            warn_add(&st->warnings, "depot '%s' is more than %g m from any road open to "
                     "vehicles: it cannot send anything (supply.max_access_m)", dnames[a],
                     x->max_access_m);
    {
        /* One warning for all sites off the road, naming the first few. */
        size_t n_off = 0;
        char list[256] = "";
        for (size_t s = 0; s < S; s++)
            if (st->travel.to_seg[s] < 0 && n_off++ < 5) {
                size_t used = strlen(list);
                snprintf(list + used, sizeof list - used, "%s'%s'", used ? ", " : "",
                         sites->id[s]);
            }
        if (n_off > 0)
            warn_add(&st->warnings, "%zu site%s more than %g m from any road open to vehicles, "
                     "so nothing can be trucked there (supply.max_access_m): %s%s", n_off,
                     n_off > 1 ? "s are" : " is", x->max_access_m, list, n_off > 5 ? ", ..." : "");
    }

    memset(&p, 0, sizeof p);
    p.n_comm = C;
    p.n_depots = D;
    p.n_sites = S;
    p.n_trucks = st->n_trucks;
    p.comm = st->comm;
    p.depot_names = dnames;
    p.site_names = snames;
    p.stock = st->active_stock;
    p.need = st->need;
    p.storage_m3 = sites->storage_m3;
    p.time_s = st->time_s;
    p.dist_m = st->dist_m;
    p.trucks = st->trucks;
    p.objective = x->objective == SCEN_SUPPLY_COST ? SUPPLY_MIN_COST : SUPPLY_MIN_HOURS;
    p.penalty = x->penalty;
    solver_opts_default(&so);
    so.time_limit_s = x->time_limit_s;
    so.rel_gap = x->rel_gap;
    st->seconds_solve = progress_now();
    rc = supply_solve(&p, &so, &st->res, e);
    st->seconds_solve = progress_now() - st->seconds_solve;
    if (rc != ERR_OK) goto done;
    for (size_t i = 0; i < st->res.warnings.n; i++)
        warn_add(&st->warnings, "%s", st->res.warnings.items[i]);
done:
    free(dnames);
    free(snames);
    free(dx);
    free(dy);
    return rc;
}

/* ---- outputs ---------------------------------------------------------------- */

static const char *rate_name(int kind)
{
    switch (kind) {
    case STOCK_PER_HOUSEHOLD_DAY: return "per household per day";
    case STOCK_ONCE_PER_PERSON: return "once per person";
    default: return "per person per day";
    }
}

/* What to do about a shortage, by reason. */
static const char *reason_advice(int reason)
{
    switch (reason) {
    case SUPPLY_STOCK: return "depots that reach the site ran out: add stock or a depot";
    case SUPPLY_FLEET: return "no truck hours left: add trucks or hours, or stock a nearer depot";
    case SUPPLY_STORAGE: return "site storage is full or zero: add storage or deliver in rounds";
    case SUPPLY_UNREACHABLE:
        return "no vehicle road from any depot, or no truck can make the round trip in its hours";
    case SUPPLY_PENALTY: return "delivery costs more than the shortage penalty: raise it";
    case SUPPLY_NO_PLAN: return "the solver stopped before any plan: raise time_limit_min";
    default: return "";
    }
}

static double minutes(double s)
{
    return isfinite(s) ? s / 60.0 : NAN;
}

static int write_table(table_t *t, const char *outdir, const char *name, err_t *e)
{
    int rc;

    if (t == NULL) return err_set(e, ERR_NOMEM, "out of memory writing %s", name);
    rc = table_save(t, outdir, name, e);
    table_free(t);
    return rc;
}

static table_t *stock_table(const points_t *sites, const supply_stage_t *st)
{
    static const char *names[] = {"site_id", "site_name", "persons", "commodity", "unit",
                                  "rate", "quantity", "persons_for", "needed_exact", "needed",
                                  "packs_needed", "delivered", "packs_delivered", "short",
                                  "kg_needed", "m3_needed", "kg_delivered", "m3_delivered",
                                  "reorder_at", "storage_m3", "reason"};
    static const int types[] = {TABLE_TEXT, TABLE_TEXT, TABLE_REAL, TABLE_TEXT, TABLE_TEXT,
                                TABLE_TEXT, TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_REAL,
                                TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_REAL,
                                TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_REAL,
                                TABLE_TEXT};
    table_t *t = table_new(21, names, types);
    size_t C = st->n_comm;

    for (size_t s = 0; t != NULL && s < st->n_sites; s++)
        for (size_t c = 0; c < C; c++) {
            const stock_line_t *sl = &st->stock[s * C + c];
            const supply_line_t *l = &st->res.lines[s * C + c];
            const stock_commodity_t *k = &st->comm[c];
            long r = table_add_row(t);
            if (r < 0) {
                table_free(t);
                return NULL;
            }
            table_set_text(t, (size_t)r, 0, sites->id[s]);
            table_set_text(t, (size_t)r, 1, sites->name[s]);
            table_set_num(t, (size_t)r, 2, st->persons[s]);
            table_set_text(t, (size_t)r, 3, k->name);
            table_set_text(t, (size_t)r, 4, k->unit);
            table_set_text(t, (size_t)r, 5, rate_name(k->rate_kind));
            table_set_num(t, (size_t)r, 6, k->quantity);
            table_set_num(t, (size_t)r, 7, sl->persons);
            table_set_num(t, (size_t)r, 8, sl->units_exact);
            table_set_num(t, (size_t)r, 9, l->needed);
            table_set_num(t, (size_t)r, 10, l->packs_needed);
            table_set_num(t, (size_t)r, 11, l->delivered);
            table_set_num(t, (size_t)r, 12, l->packs_delivered);
            table_set_num(t, (size_t)r, 13, l->short_units);
            table_set_num(t, (size_t)r, 14, sl->kg);
            table_set_num(t, (size_t)r, 15, sl->m3);
            table_set_num(t, (size_t)r, 16, l->kg);
            table_set_num(t, (size_t)r, 17, l->m3);
            table_set_num(t, (size_t)r, 18, sl->reorder_units);
            table_set_num(t, (size_t)r, 19, isfinite(sites->storage_m3[s]) ? sites->storage_m3[s]
                                                                           : NAN);
            table_set_text(t, (size_t)r, 20, supply_reason_name(l->reason));
        }
    return t;
}

/* "2 x lorry + 1 x pickup" into buf. */
static void trips_text(const supply_stage_t *st, const supply_route_t *r, char *buf, size_t n)
{
    size_t used = 0;
    buf[0] = '\0';
    for (size_t k = 0; k < st->n_trucks; k++) {
        int w;
        if (r->trips[k] < 0.5) continue;
        w = snprintf(buf + used, n - used, "%s%.0f x %s", used ? " + " : "", r->trips[k],
                     st->trucks[k].name);
        if (w < 0 || (size_t)w >= n - used) break;
        used += (size_t)w;
    }
}

static table_t *shipments_table(const inputs_t *in, const points_t *sites,
                                const supply_stage_t *st)
{
    static const char *fixed[] = {"depot_id", "depot_name", "site_id", "site_name", "out_min",
                                  "back_min", "distance_km", "trips", "trips_by_type", "kg",
                                  "m3", "kg_per_trip", "m3_per_trip", "truck_hours"};
    static const int ftypes[] = {TABLE_TEXT, TABLE_TEXT, TABLE_TEXT, TABLE_TEXT, TABLE_REAL,
                                 TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_TEXT, TABLE_REAL,
                                 TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_REAL};
    size_t nf = 14, nc = nf + st->n_comm;
    const char **names = calloc(nc, sizeof *names);
    char **owned = calloc(st->n_comm + 1, sizeof *owned);
    int *types = calloc(nc, sizeof *types);
    table_t *t = NULL;
    char buf[512];

    if (names == NULL || types == NULL || owned == NULL) goto done;
    for (size_t i = 0; i < nf; i++) {
        names[i] = fixed[i];
        types[i] = ftypes[i];
    }
    for (size_t c = 0; c < st->n_comm; c++) {
        size_t len = strlen(st->comm[c].name) + 8;
        owned[c] = malloc(len);
        if (owned[c] == NULL) goto done;
        snprintf(owned[c], len, "packs_%s", st->comm[c].name);
        names[nf + c] = owned[c];
        types[nf + c] = TABLE_REAL;
    }
    t = table_new(nc, names, types);
    for (size_t i = 0; t != NULL && i < st->res.n_routes; i++) {
        const supply_route_t *r = &st->res.routes[i];
        size_t k = r->depot * st->n_sites + r->site;
        double trips = 0;
        long row = table_add_row(t);
        if (row < 0) {
            table_free(t);
            t = NULL;
            break;
        }
        for (size_t j = 0; j < st->n_trucks; j++) trips += r->trips[j];
        trips_text(st, r, buf, sizeof buf);
        table_set_text(t, (size_t)row, 0, in->depots->id[st->active[r->depot]]);
        table_set_text(t, (size_t)row, 1, in->depots->name[st->active[r->depot]]);
        table_set_text(t, (size_t)row, 2, sites->id[r->site]);
        table_set_text(t, (size_t)row, 3, sites->name[r->site]);
        table_set_num(t, (size_t)row, 4, minutes(st->travel.out_s[k]));
        table_set_num(t, (size_t)row, 5, minutes(st->travel.back_s[k]));
        table_set_num(t, (size_t)row, 6, st->travel.out_m[k] / 1000.0);
        table_set_num(t, (size_t)row, 7, trips);
        table_set_text(t, (size_t)row, 8, buf);
        table_set_num(t, (size_t)row, 9, r->kg);
        table_set_num(t, (size_t)row, 10, r->m3);
        table_set_num(t, (size_t)row, 11, r->kg_per_trip);
        table_set_num(t, (size_t)row, 12, r->m3_per_trip);
        table_set_num(t, (size_t)row, 13, r->truck_hours);
        for (size_t c = 0; c < st->n_comm; c++) table_set_num(t, (size_t)row, nf + c, r->packs[c]);
    }
done:
    for (size_t c = 0; owned != NULL && c < st->n_comm; c++) free(owned[c]);
    free(owned);
    free(names);
    free(types);
    return t;
}

static table_t *unmet_table(const points_t *sites, const supply_stage_t *st)
{
    static const char *names[] = {"site_id", "site_name", "commodity", "unit", "needed",
                                  "short", "short_packs", "share_short", "people_short",
                                  "reason", "what_to_do"};
    static const int types[] = {TABLE_TEXT, TABLE_TEXT, TABLE_TEXT, TABLE_TEXT, TABLE_REAL,
                                TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_REAL, TABLE_TEXT,
                                TABLE_TEXT};
    table_t *t = table_new(11, names, types);
    size_t C = st->n_comm;

    for (size_t i = 0; t != NULL && i < st->res.n_lines; i++) {
        const supply_line_t *l = &st->res.lines[i];
        const stock_commodity_t *k = &st->comm[l->comm];
        double share;
        long r;
        if (!(l->short_units > 0)) continue;
        r = table_add_row(t);
        if (r < 0) {
            table_free(t);
            return NULL;
        }
        share = l->needed > 0 ? l->short_units / l->needed : 0;
        table_set_text(t, (size_t)r, 0, sites->id[l->site]);
        table_set_text(t, (size_t)r, 1, sites->name[l->site]);
        table_set_text(t, (size_t)r, 2, k->name);
        table_set_text(t, (size_t)r, 3, k->unit);
        table_set_num(t, (size_t)r, 4, l->needed);
        table_set_num(t, (size_t)r, 5, l->short_units);
        table_set_num(t, (size_t)r, 6, l->packs_needed - l->packs_delivered);
        table_set_num(t, (size_t)r, 7, share);
        /* People whose share of the stock is missing, at the site's rate. */
        table_set_num(t, (size_t)r, 8, share * st->stock[l->site * C + l->comm].persons);
        table_set_text(t, (size_t)r, 9, supply_reason_name(l->reason));
        table_set_text(t, (size_t)r, 10, reason_advice(l->reason));
    }
    return t;
}

/* Access leg of layer depot d to the road (NAN: no stock, so not routed, or no road). */
static double access_of(const supply_stage_t *st, size_t d)
{
    for (size_t a = 0; a < st->n_active; a++)
        if (st->active[a] == d)
            return isfinite(st->travel.from_access_m[a]) ? st->travel.from_access_m[a] : NAN;
    return NAN;
}

static table_t *depots_table(const inputs_t *in, const supply_stage_t *st)
{
    static const char *names[] = {"depot_id", "depot_name", "commodity", "unit", "on_hand",
                                  "shipped", "left", "road_access_m"};
    static const int types[] = {TABLE_TEXT, TABLE_TEXT, TABLE_TEXT, TABLE_TEXT, TABLE_REAL,
                                TABLE_REAL, TABLE_REAL, TABLE_REAL};
    table_t *t = table_new(8, names, types);
    size_t C = st->n_comm;

    for (size_t d = 0; t != NULL && d < st->n_depots; d++)
        for (size_t c = 0; c < C; c++) {
            double shipped = 0;
            long r = table_add_row(t);
            if (r < 0) {
                table_free(t);
                return NULL;
            }
            for (size_t i = 0; i < st->res.n_routes; i++)
                if (st->active[st->res.routes[i].depot] == d)
                    shipped += st->res.routes[i].packs[c] * st->comm[c].pack_units;
            table_set_text(t, (size_t)r, 0, in->depots->id[d]);
            table_set_text(t, (size_t)r, 1, in->depots->name[d]);
            table_set_text(t, (size_t)r, 2, st->comm[c].name);
            table_set_text(t, (size_t)r, 3, st->comm[c].unit);
            table_set_num(t, (size_t)r, 4, st->depot_stock[d * C + c]);
            table_set_num(t, (size_t)r, 5, shipped);
            table_set_num(t, (size_t)r, 6, st->depot_stock[d * C + c] - shipped);
            table_set_num(t, (size_t)r, 7, access_of(st, d));
        }
    return t;
}

static table_t *travel_table(const inputs_t *in, const points_t *sites, const supply_stage_t *st)
{
    static const char *names[] = {"depot_id", "site_id", "out_min", "back_min", "out_km",
                                  "back_km", "depot_access_m", "site_access_m"};
    static const int types[] = {TABLE_TEXT, TABLE_TEXT, TABLE_REAL, TABLE_REAL, TABLE_REAL,
                                TABLE_REAL, TABLE_REAL, TABLE_REAL};
    table_t *t = table_new(8, names, types);
    const depots_travel_t *tr = &st->travel;

    for (size_t d = 0; t != NULL && d < st->n_active; d++)
        for (size_t s = 0; s < st->n_sites; s++) {
            size_t k = d * st->n_sites + s;
            long r = table_add_row(t);
            if (r < 0) {
                table_free(t);
                return NULL;
            }
            table_set_text(t, (size_t)r, 0, in->depots->id[st->active[d]]);
            table_set_text(t, (size_t)r, 1, sites->id[s]);
            table_set_num(t, (size_t)r, 2, minutes(tr->out_s[k]));
            table_set_num(t, (size_t)r, 3, minutes(tr->back_s[k]));
            table_set_num(t, (size_t)r, 4, isfinite(tr->out_m[k]) ? tr->out_m[k] / 1000 : NAN);
            table_set_num(t, (size_t)r, 5, isfinite(tr->back_m[k]) ? tr->back_m[k] / 1000 : NAN);
            table_set_num(t, (size_t)r, 6, isfinite(tr->from_access_m[d]) ? tr->from_access_m[d]
                                                                          : NAN);
            table_set_num(t, (size_t)r, 7, isfinite(tr->to_access_m[s]) ? tr->to_access_m[s]
                                                                        : NAN);
        }
    return t;
}

static void add_num(cJSON *o, const char *key, double v)
{
    if (isfinite(v)) cJSON_AddNumberToObject(o, key, v);
    else cJSON_AddNullToObject(o, key);
}

static void summary_supply(const inputs_t *in, const supply_stage_t *st, cJSON *summary)
{
    const struct scen_supply *x = in->scen->supply;
    cJSON *sj = cJSON_AddObjectToObject(summary, "supply");
    cJSON *as = cJSON_AddObjectToObject(sj, "assumptions");
    cJSON *arr = cJSON_AddArrayToObject(as, "commodities");
    cJSON *fl, *tot, *sol, *files, *w, *by;
    double persons = 0, kg = 0, m3 = 0, trips = 0, short_lines = 0;
    size_t C = st->n_comm;

    cJSON_AddNumberToObject(as, "days_of_cover", st->policy.cover_s / STOCK_DAY_S);
    cJSON_AddNumberToObject(as, "lead_time_days", st->policy.lead_s / STOCK_DAY_S);
    cJSON_AddNumberToObject(as, "buffer", st->policy.buffer);
    cJSON_AddStringToObject(as, "people_per_site",
                            st->assignment == SUPPLY_STAGE_CAPACITY
                                ? "capacity-aware assignment within the time limit"
                                : st->assignment == SUPPLY_STAGE_NEAREST
                                      ? "everyone whose nearest site it is"
                                      : "people the site stage assigned");
    for (size_t c = 0; c < C; c++) {
        const stock_commodity_t *k = &st->comm[c];
        cJSON *o = cJSON_CreateObject();
        cJSON_AddStringToObject(o, "name", k->name);
        cJSON_AddStringToObject(o, "unit", k->unit);
        cJSON_AddStringToObject(o, "rate", rate_name(k->rate_kind));
        cJSON_AddNumberToObject(o, "quantity", k->quantity);
        if (k->rate_kind == STOCK_PER_HOUSEHOLD_DAY)
            cJSON_AddNumberToObject(o, "household_size", k->household_size);
        cJSON_AddNumberToObject(o, "unit_kg", k->unit_kg);
        cJSON_AddNumberToObject(o, "unit_m3", k->unit_m3);
        cJSON_AddNumberToObject(o, "pack_units", k->pack_units);
        cJSON_AddNumberToObject(o, "priority", k->priority);
        cJSON_AddNumberToObject(o, "share_of_people", k->group_share > 0 ? k->group_share : 1);
        cJSON_AddItemToArray(arr, o);
    }
    fl = cJSON_AddArrayToObject(as, "fleet");
    for (size_t k = 0; k < st->n_trucks; k++) {
        const supply_truck_t *t = &st->trucks[k];
        cJSON *o = cJSON_CreateObject();
        cJSON_AddStringToObject(o, "name", t->name);
        cJSON_AddNumberToObject(o, "payload_kg", t->payload_kg);
        cJSON_AddNumberToObject(o, "volume_m3", t->volume_m3);
        cJSON_AddNumberToObject(o, "count", t->count);
        cJSON_AddNumberToObject(o, "hours_available", t->hours_s / 3600.0);
        cJSON_AddNumberToObject(o, "hours_used", st->res.hours_used_s[k] / 3600.0);
        cJSON_AddNumberToObject(o, "loading_min", t->loading_s / 60.0);
        cJSON_AddItemToArray(fl, o);
    }
    cJSON_AddStringToObject(as, "objective", x->objective == SCEN_SUPPLY_COST ? "cost" : "hours");
    cJSON_AddNumberToObject(as, "access_kmh", x->access_mps * 3.6);
    cJSON_AddNumberToObject(as, "max_access_m", x->max_access_m);

    tot = cJSON_AddObjectToObject(sj, "totals");
    for (size_t s = 0; s < st->n_sites; s++) persons += st->persons[s];
    for (size_t i = 0; i < st->res.n_routes; i++) {
        kg += st->res.routes[i].kg;
        m3 += st->res.routes[i].m3;
        for (size_t k = 0; k < st->n_trucks; k++) trips += st->res.routes[i].trips[k];
    }
    for (size_t i = 0; i < st->res.n_lines; i++) short_lines += st->res.lines[i].short_units > 0;
    cJSON_AddNumberToObject(tot, "sites", (double)st->n_sites);
    cJSON_AddNumberToObject(tot, "depots", (double)st->n_depots);
    cJSON_AddNumberToObject(tot, "depots_with_stock", (double)st->n_active);
    cJSON_AddNumberToObject(tot, "persons", persons);
    cJSON_AddNumberToObject(tot, "trips", trips);
    cJSON_AddNumberToObject(tot, "truck_hours", st->res.truck_hours);
    cJSON_AddNumberToObject(tot, "kg_delivered", kg);
    cJSON_AddNumberToObject(tot, "m3_delivered", m3);
    cJSON_AddNumberToObject(tot, "lines_short", short_lines);
    by = cJSON_AddObjectToObject(tot, "by_commodity");
    for (size_t c = 0; c < C; c++) {
        cJSON *o = cJSON_AddObjectToObject(by, st->comm[c].name);
        double need = 0, del = 0, on_hand = 0;
        for (size_t s = 0; s < st->n_sites; s++) {
            need += st->res.lines[s * C + c].needed;
            del += st->res.lines[s * C + c].delivered;
        }
        for (size_t d = 0; d < st->n_depots; d++) on_hand += st->depot_stock[d * C + c];
        cJSON_AddStringToObject(o, "unit", st->comm[c].unit);
        cJSON_AddNumberToObject(o, "needed", need);
        cJSON_AddNumberToObject(o, "delivered", del);
        cJSON_AddNumberToObject(o, "short", need - del);
        cJSON_AddNumberToObject(o, "depot_stock", on_hand);
    }
    by = cJSON_AddObjectToObject(tot, "by_depot");
    for (size_t a = 0; a < st->n_active; a++) {
        cJSON *o = cJSON_AddObjectToObject(by, in->depots->id[st->active[a]]);
        double dt = 0, dkg = 0, dh = 0, ns = 0;
        for (size_t i = 0; i < st->res.n_routes; i++) {
            const supply_route_t *r = &st->res.routes[i];
            if (r->depot != a) continue;
            for (size_t k = 0; k < st->n_trucks; k++) dt += r->trips[k];
            dkg += r->kg;
            dh += r->truck_hours;
            ns += 1;
        }
        cJSON_AddNumberToObject(o, "trips", dt);
        cJSON_AddNumberToObject(o, "sites", ns);
        cJSON_AddNumberToObject(o, "kg", dkg);
        cJSON_AddNumberToObject(o, "truck_hours", dh);
    }
    sol = cJSON_AddObjectToObject(sj, "solver");
    cJSON_AddStringToObject(sol, "status", solver_status_name(st->res.status));
    add_num(sol, "objective", st->res.objective);
    add_num(sol, "bound", st->res.bound);
    add_num(sol, "gap", st->res.gap);
    cJSON_AddNumberToObject(sol, "nodes", (double)st->res.nodes);
    cJSON_AddNumberToObject(sol, "seconds", st->res.seconds);
    add_num(sol, "shortage_penalty", st->res.penalty);
    cJSON_AddNumberToObject(sol, "time_limit_min", x->time_limit_s / 60.0);
    cJSON_AddNumberToObject(sol, "requested_gap", x->rel_gap);
    w = cJSON_AddArrayToObject(sj, "warnings");
    for (size_t i = 0; i < st->warnings.n; i++)
        cJSON_AddItemToArray(w, cJSON_CreateString(st->warnings.items[i]));
    files = cJSON_AddObjectToObject(sj, "files");
    cJSON_AddStringToObject(files, "stock", "supply_stock.csv");
    cJSON_AddStringToObject(files, "shipments", "supply_shipments.csv");
    cJSON_AddStringToObject(files, "unmet", "supply_unmet.csv");
    cJSON_AddStringToObject(files, "depots", "supply_depots.csv");
    cJSON_AddStringToObject(files, "travel", "supply_travel.csv");
    cJSON_AddStringToObject(sj, "caution", supply_stage_caution);
}

int supply_stage_write(const char *outdir, const inputs_t *in, const points_t *sites,
                       const supply_stage_t *st, cJSON *summary, err_t *e)
{
    int rc;

    if ((rc = write_table(stock_table(sites, st), outdir, "supply_stock.csv", e)) ||
        (rc = write_table(shipments_table(in, sites, st), outdir, "supply_shipments.csv", e)) ||
        (rc = write_table(unmet_table(sites, st), outdir, "supply_unmet.csv", e)) ||
        (rc = write_table(depots_table(in, st), outdir, "supply_depots.csv", e)) ||
        (rc = write_table(travel_table(in, sites, st), outdir, "supply_travel.csv", e)))
        return rc;
    if (summary != NULL) summary_supply(in, st, summary);
    return ERR_OK;
}

/* Lines printed per list before the rest is left to the CSV files. */
#define PRINT_MAX 15

void supply_stage_print(const inputs_t *in, const points_t *sites, const supply_stage_t *st)
{
    size_t C = st->n_comm, n_short = 0;
    double persons = 0;

    for (size_t s = 0; s < st->n_sites; s++) persons += st->persons[s];
    printf("people supplied: %.0f of %.0f (%s)\n", persons, in->grid->total_people,
           st->assignment == SUPPLY_STAGE_CAPACITY
               ? "capacity-aware assignment within the time limit"
               : st->assignment == SUPPLY_STAGE_NEAREST ? "everyone whose nearest site it is"
                                                        : "as the site stage assigned them");
    printf("rates:");
    for (size_t c = 0; c < C; c++)
        printf("%s %s %.4g %s %s%s", c ? ";" : "", st->comm[c].name, st->comm[c].quantity,
               st->comm[c].unit, rate_name(st->comm[c].rate_kind),
               st->comm[c].group_share > 0 ? " (part of the people)" : "");
    printf("\n");
    printf("stock per site for %g days of cover%s, buffer %g%% (delivered/needed, whole packs):\n",
           st->policy.cover_s / STOCK_DAY_S,
           st->policy.lead_s > 0 ? " plus lead time" : "", 100 * st->policy.buffer);
    for (size_t s = 0; s < st->n_sites && s < PRINT_MAX; s++) {
        printf("  %-10s %8.0f people ", sites->id[s], st->persons[s]);
        for (size_t c = 0; c < C; c++) {
            const supply_line_t *l = &st->res.lines[s * C + c];
            /* "+ 0.0" keeps a zero from printing as "-0". */
            printf(" %s %.0f/%.0f %s", st->comm[c].name, l->delivered + 0.0, l->needed + 0.0,
                   st->comm[c].unit);
        }
        printf("\n");
    }
    if (st->n_sites > PRINT_MAX)
        printf("  ... %zu more sites in supply_stock.csv\n", st->n_sites - PRINT_MAX);
    printf("totals:");
    for (size_t c = 0; c < C; c++) {
        double need = 0, del = 0;
        for (size_t s = 0; s < st->n_sites; s++) {
            need += st->res.lines[s * C + c].needed;
            del += st->res.lines[s * C + c].delivered;
        }
        printf("%s %s %.0f of %.0f %s delivered", c ? ";" : "", st->comm[c].name, del + 0.0,
               need + 0.0, st->comm[c].unit);
    }
    printf("\n");
    /* "optimal" from the solver means proven within the requested gap, not
     * exactly best: say how close the plan is proven to be. */
    if (st->res.status == SOLVER_OPTIMAL && (!isfinite(st->res.gap) || st->res.gap <= 0))
        printf("trips per depot (the best possible plan, proven):\n");
    else if (st->res.status == SOLVER_OPTIMAL)
        printf("trips per depot (proven within %.2g%% of the best possible plan):\n",
               100 * st->res.gap);
    else if (isfinite(st->res.gap))
        printf("trips per depot (%s: within %.2g%% of the best possible plan):\n",
               solver_status_name(st->res.status), 100 * st->res.gap);
    else
        printf("trips per depot (%s):\n", solver_status_name(st->res.status));
    for (size_t d = 0; d < st->n_active; d++) {
        double trips = 0, kg = 0, hours = 0;
        size_t n_sites = 0;
        for (size_t i = 0; i < st->res.n_routes; i++) {
            const supply_route_t *r = &st->res.routes[i];
            if (r->depot != d) continue;
            for (size_t k = 0; k < st->n_trucks; k++) trips += r->trips[k];
            kg += r->kg;
            hours += r->truck_hours;
            n_sites++;
        }
        printf("  %-10s %4.0f trips to %zu sites, %.1f t, %.1f truck-hours\n",
               in->depots->id[st->active[d]], trips, n_sites, kg / 1000.0, hours);
    }
    for (size_t i = 0; i < st->res.n_lines; i++) {
        const supply_line_t *l = &st->res.lines[i];
        if (!(l->short_units > 0)) continue;
        if (n_short == 0) printf("shortages:\n");
        if (n_short++ < PRINT_MAX)
            printf("  %-10s %s short %.0f of %.0f %s (%s)\n", sites->id[l->site],
                   st->comm[l->comm].name, l->short_units, l->needed, st->comm[l->comm].unit,
                   supply_reason_name(l->reason));
    }
    if (n_short > PRINT_MAX)
        printf("  ... %zu more lines short in supply_unmet.csv\n", n_short - PRINT_MAX);
    if (n_short == 0) printf("shortages: none\n");
    for (size_t i = 0; i < st->warnings.n && i < PRINT_MAX; i++)
        printf("warning: %s\n", st->warnings.items[i]);
    if (st->warnings.n > PRINT_MAX)
        printf("... %zu more warnings in summary.json (supply.warnings)\n",
               st->warnings.n - PRINT_MAX);
    printf("%s\n", supply_stage_caution);
}
