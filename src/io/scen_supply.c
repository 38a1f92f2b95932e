/* scen_supply: reader of the scenario's "supply" section (see include/scen_supply.h
 * and docs/plan.md). Strict like the rest of the scenario: unknown keys are
 * errors, ranges are checked here so that a zero rate, weight, payload or days
 * of cover is refused with the key path before anything is computed. */
#include "scen_supply.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "scen_sections.h"

#define DAY_S 86400.0
#define KMH (1 / 3.6)

static const char *const KEYS[] = {"days_of_cover", "lead_time_days", "buffer", "commodities",
                                   "fleet", "depot_stock", "objective", "shortage_penalty",
                                   "time_limit_min", "gap", "access_kmh", "max_access_m", NULL};
static const char *const COMM_KEYS[] = {"name", "unit", "rate", "quantity", "household_size",
                                        "unit_kg", "unit_m3", "pack_units", "priority", "group",
                                        "share", NULL};
static const char *const TRUCK_KEYS[] = {"name", "payload_kg", "volume_m3", "count",
                                         "cost_per_hour", "cost_per_km", "loading_min",
                                         "hours_available", NULL};
static const char *const RATES[] = {"per_person_day", "per_household_day", "once_per_person",
                                    NULL};
static const char *const OBJECTIVES[] = {"hours", "cost", NULL};
/* Commodities whose keys may be left out (the supply stage fills them from
 * stock_default; values and sources in docs/plan.md). */
static const char *const DEFAULTED[] = {"water", "food", "shelter", NULL};

static int is_defaulted(const char *name)
{
    for (size_t i = 0; DEFAULTED[i] != NULL; i++)
        if (strcmp(name, DEFAULTED[i]) == 0) return 1;
    return 0;
}

/* A number that is required for commodities without defaults, NAN when a
 * defaulted commodity leaves it out. */
static int comm_number(const jsonv_node_t *c, const char *key, int dflt_ok, jsonv_range_t r,
                       double *out, err_t *e)
{
    return jsonv_number(c, key, dflt_ok ? 0 : JSONV_REQUIRED, r, NAN, out, e);
}

static int read_commodity(const jsonv_node_t *c, const scen_t *s, scen_commodity_t *k,
                          err_t *e)
{
    jsonv_node_t sh;
    int rc, d;

    k->rate_kind = -1;
    if ((rc = jsonv_as_object(c, COMM_KEYS, e)) != ERR_OK ||
        (rc = jsonv_string(c, "name", JSONV_REQUIRED, NULL, &k->name, e)) != ERR_OK)
        return rc;
    d = is_defaulted(k->name);
    if ((rc = jsonv_string(c, "unit", d ? 0 : JSONV_REQUIRED, NULL, &k->unit, e)) != ERR_OK ||
        (rc = jsonv_enum(c, "rate", 0, RATES, d ? -1 : SCEN_RATE_PER_PERSON_DAY, &k->rate_kind,
                         e)) != ERR_OK ||
        (rc = comm_number(c, "quantity", d, JSONV_OPEN_CLOSED(0, 1e6), &k->quantity, e)) ||
        (rc = jsonv_number(c, "household_size", 0, JSONV_OPEN_CLOSED(0, 50), NAN,
                           &k->household_size, e)) != ERR_OK ||
        (rc = comm_number(c, "unit_kg", d, JSONV_OPEN_CLOSED(0, 1e6), &k->unit_kg, e)) ||
        (rc = comm_number(c, "unit_m3", d, JSONV_OPEN_CLOSED(0, 1e3), &k->unit_m3, e)) ||
        (rc = comm_number(c, "pack_units", d, JSONV_OPEN_CLOSED(0, 1e7), &k->pack_units, e)) ||
        (rc = jsonv_number(c, "priority", 0, JSONV_OPEN_CLOSED(0, 1e6), d ? NAN : 1,
                           &k->priority, e)) != ERR_OK ||
        (rc = jsonv_number(c, "share", 0, JSONV_OPEN_CLOSED(0, 1), 0, &k->group_share, e)) ||
        (rc = jsonv_string(c, "group", 0, NULL, &k->group, e)) != ERR_OK)
        return rc;
    jsonv_child(c, "share", &sh);
    if (sh.json != NULL && k->group != NULL)
        return err_set(e, ERR_INPUT, "%s: key '%s' gives both 'share' and 'group'; give one",
                       c->file, c->path);
    if (k->group != NULL) {
        size_t g;
        for (g = 0; g < s->n_groups; g++)
            if (strcmp(s->groups[g].name, k->group) == 0) break;
        if (g == s->n_groups)
            return err_set(e, ERR_INPUT, "%s: key '%s.group' names '%s', which is not in "
                           "population_groups", c->file, c->path, k->group);
        if (s->groups[g].raster != NULL)
            return err_set(e, ERR_INPUT, "%s: key '%s.group': group '%s' is given as a raster; "
                           "supply needs a share of each site's people (give 'share' instead)",
                           c->file, c->path, k->group);
        k->group_share = s->groups[g].share;
    }
    if (k->rate_kind == SCEN_RATE_PER_HOUSEHOLD_DAY && !d && isnan(k->household_size))
        k->household_size = 5;   /* documented default; common practice, no source */
    return ERR_OK;
}

static int read_commodities(const jsonv_node_t *o, const scen_t *s, struct scen_supply *x,
                            err_t *e)
{
    jsonv_node_t arr, c;
    const cJSON *it;
    size_t n = 0, i = 0;
    int rc;

    if ((rc = jsonv_array(o, "commodities", 0, 1, 64, &arr, &n, e)) != ERR_OK) return rc;
    if (n == 0) {
        /* Absent: water and food with their defaults. */
        x->comm = calloc(2, sizeof *x->comm);
        if (x->comm == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", o->file);
        for (i = 0; i < 2; i++) {
            scen_commodity_t *k = &x->comm[i];
            k->name = strdup(DEFAULTED[i]);
            if (k->name == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", o->file);
            x->n_comm = i + 1;
            k->rate_kind = -1;
            k->quantity = k->household_size = k->unit_kg = k->unit_m3 = NAN;
            k->pack_units = k->priority = NAN;
        }
        return ERR_OK;
    }
    x->comm = calloc(n, sizeof *x->comm);
    if (x->comm == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", o->file);
    cJSON_ArrayForEach(it, arr.json) {
        jsonv_member(&arr, it, i, &c);
        x->n_comm = ++i;
        if ((rc = read_commodity(&c, s, &x->comm[i - 1], e)) != ERR_OK) return rc;
        for (size_t j = 0; j + 1 < i; j++)
            if (strcmp(x->comm[j].name, x->comm[i - 1].name) == 0)
                return err_set(e, ERR_INPUT, "%s: key '%s.name': commodity '%s' is listed twice",
                               o->file, c.path, x->comm[j].name);
    }
    return ERR_OK;
}

static int read_fleet(const jsonv_node_t *o, struct scen_supply *x, err_t *e)
{
    jsonv_node_t arr, t;
    const cJSON *it;
    size_t n = 0, i = 0;
    int rc;

    if ((rc = jsonv_array(o, "fleet", JSONV_REQUIRED, 1, 64, &arr, &n, e)) != ERR_OK) return rc;
    x->trucks = calloc(n, sizeof *x->trucks);
    if (x->trucks == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", o->file);
    cJSON_ArrayForEach(it, arr.json) {
        scen_truck_t *k = &x->trucks[i];
        double per_km, load_min, hours;
        long count;
        jsonv_member(&arr, it, i, &t);
        x->n_trucks = ++i;
        if ((rc = jsonv_as_object(&t, TRUCK_KEYS, e)) != ERR_OK ||
            (rc = jsonv_string(&t, "name", JSONV_REQUIRED, NULL, &k->name, e)) != ERR_OK ||
            (rc = jsonv_number(&t, "payload_kg", JSONV_REQUIRED, JSONV_OPEN_CLOSED(0, 1e6), 0,
                               &k->payload_kg, e)) != ERR_OK ||
            (rc = jsonv_number(&t, "volume_m3", JSONV_REQUIRED, JSONV_OPEN_CLOSED(0, 1e4), 0,
                               &k->volume_m3, e)) != ERR_OK ||
            (rc = jsonv_int(&t, "count", JSONV_REQUIRED, 0, 100000, 0, &count, e)) != ERR_OK ||
            (rc = jsonv_number(&t, "cost_per_hour", 0, JSONV_CLOSED(0, 1e9), 0,
                               &k->cost_per_hour, e)) != ERR_OK ||
            (rc = jsonv_number(&t, "cost_per_km", 0, JSONV_CLOSED(0, 1e9), 0, &per_km, e)) ||
            (rc = jsonv_number(&t, "loading_min", 0, JSONV_CLOSED(0, 1440), 60, &load_min, e)) ||
            (rc = jsonv_number(&t, "hours_available", 0, JSONV_CLOSED(0, 10000), 40, &hours,
                               e)) != ERR_OK)
            return rc;
        for (size_t j = 0; j + 1 < i; j++)
            if (strcmp(x->trucks[j].name, k->name) == 0)
                return err_set(e, ERR_INPUT, "%s: key '%s.name': truck type '%s' is listed twice",
                               o->file, t.path, k->name);
        k->count = (int)count;
        k->cost_per_m = per_km / 1000.0;
        k->loading_s = load_min * 60.0;
        k->hours_s = hours * 3600.0;
    }
    return ERR_OK;
}

/* "depot_stock": { DEPOT_ID: { COMMODITY: units, ... }, ... }. */
static int read_depot_stock(const jsonv_node_t *o, struct scen_supply *x, err_t *e)
{
    jsonv_node_t ds, m;
    const char **names = NULL;
    size_t n, i = 0;
    int rc = ERR_OK;

    if ((rc = jsonv_object(o, "depot_stock", JSONV_REQUIRED, NULL, &ds, e)) != ERR_OK) return rc;
    n = (size_t)cJSON_GetArraySize(ds.json);
    if (n == 0)
        return err_set(e, ERR_INPUT, "%s: key '%s' must name at least one depot of sites.depots "
                       "with its stock", o->file, ds.path);
    names = calloc(x->n_comm + 1, sizeof *names);
    x->depots = calloc(n, sizeof *x->depots);
    if (names == NULL || x->depots == NULL) {
        rc = err_set(e, ERR_NOMEM, "%s: out of memory", o->file);
        goto done;
    }
    for (size_t c = 0; c < x->n_comm; c++) names[c] = x->comm[c].name;
    for (const cJSON *d = ds.json->child; d != NULL; d = d->next, i++) {
        scen_depot_stock_t *k = &x->depots[i];
        jsonv_member(&ds, d, i, &m);
        x->n_depots = i + 1;
        k->depot_id = strdup(d->string);
        k->units = calloc(x->n_comm ? x->n_comm : 1, sizeof *k->units);
        if (k->depot_id == NULL || k->units == NULL) {
            rc = err_set(e, ERR_NOMEM, "%s: out of memory", o->file);
            goto done;
        }
        /* The commodity names are the allowed keys: a misspelt one gets a hint. */
        if ((rc = jsonv_as_object(&m, names, e)) != ERR_OK) goto done;
        for (size_t c = 0; c < x->n_comm; c++) {
            if ((rc = jsonv_number(&m, names[c], 0, JSONV_CLOSED(0, 1e15), 0, &k->units[c], e)))
                goto done;
        }
    }
done:
    free(names);
    return rc;
}

int scen_supply_read(const jsonv_node_t *root, const scen_t *s, struct scen_supply **out,
                     err_t *e)
{
    jsonv_node_t o;
    struct scen_supply *x;
    double days, lead, minutes, kmh;
    int rc;

    *out = NULL;
    if ((rc = jsonv_object(root, "supply", 0, KEYS, &o, e)) != ERR_OK || o.json == NULL)
        return rc;
    /* Owned by the scenario from here on, so scen_free releases a half-read section. */
    *out = x = calloc(1, sizeof *x);
    if (x == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", root->file);
    x->present = 1;
    if ((rc = jsonv_number(&o, "days_of_cover", 0, JSONV_OPEN_CLOSED(0, 365), 14, &days, e)) ||
        (rc = jsonv_number(&o, "lead_time_days", 0, JSONV_CLOSED(0, 90), 0, &lead, e)) ||
        (rc = jsonv_number(&o, "buffer", 0, JSONV_CLOSED(0, 2), 0.1, &x->buffer, e)) ||
        (rc = read_commodities(&o, s, x, e)) != ERR_OK ||
        (rc = read_fleet(&o, x, e)) != ERR_OK ||
        (rc = read_depot_stock(&o, x, e)) != ERR_OK ||
        (rc = jsonv_enum(&o, "objective", 0, OBJECTIVES, SCEN_SUPPLY_HOURS, &x->objective, e)) ||
        (rc = jsonv_number(&o, "shortage_penalty", 0, JSONV_CLOSED(0, 1e12), 0, &x->penalty,
                           e)) != ERR_OK ||
        (rc = jsonv_number(&o, "time_limit_min", 0, JSONV_OPEN_CLOSED(0, 1440), 2, &minutes,
                           e)) != ERR_OK ||
        (rc = jsonv_number(&o, "gap", 0, JSONV_CLOSED_OPEN(0, 1), 0.01, &x->rel_gap, e)) ||
        (rc = jsonv_number(&o, "access_kmh", 0, JSONV_OPEN_CLOSED(0, 60), 5, &kmh, e)) ||
        (rc = jsonv_number(&o, "max_access_m", 0, JSONV_CLOSED(0, 100000), 2000,
                           &x->max_access_m, e)) != ERR_OK)
        return rc;
    x->cover_s = days * DAY_S;
    x->lead_s = lead * DAY_S;
    x->time_limit_s = minutes * 60.0;
    x->access_mps = kmh * KMH;
    return ERR_OK;
}

void scen_supply_free(struct scen_supply *x)
{
    if (x == NULL) return;
    for (size_t i = 0; i < x->n_comm; i++) {
        free(x->comm[i].name);
        free(x->comm[i].unit);
        free(x->comm[i].group);
    }
    free(x->comm);
    for (size_t i = 0; i < x->n_trucks; i++) free(x->trucks[i].name);
    free(x->trucks);
    for (size_t i = 0; i < x->n_depots; i++) {
        free(x->depots[i].depot_id);
        free(x->depots[i].units);
    }
    free(x->depots);
    free(x);
}
