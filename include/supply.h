/* supply: which depot sends how much of what to which site, by how many
 * truck trips (a MIP solved through the solver module, i.e. GLPK). Quantities
 * are whole packs; trips are integers per depot, site and truck type; unmet
 * need is a penalised slack, so the model always has a plan, and every short
 * line carries a reason: stock, fleet, storage or unreachable (how reasons are
 * found: docs/supply.md). Inputs are plain arrays; nothing here reads files. */
#ifndef SUPPLY_H
#define SUPPLY_H

#include <stddef.h>

#include "err.h"
#include "solver.h"
#include "stock.h"

/* One truck type of the fleet. */
typedef struct supply_truck {
    const char *name;       /* borrowed; names the type in messages and reports */
    double payload_kg;      /* per trip, > 0 */
    double volume_m3;       /* per trip, > 0 */
    int count;              /* trucks of this type available, >= 0 */
    double cost_per_hour;   /* cost per truck-hour (objective SUPPLY_MIN_COST), >= 0 */
    double cost_per_m;      /* cost per metre driven (file: per km), >= 0 */
    double loading_s;       /* loading plus unloading time per trip, seconds, >= 0 */
    double hours_s;         /* working time per truck in the period, seconds, >= 0 */
} supply_truck_t;

enum supply_objective {
    SUPPLY_MIN_HOURS = 0,   /* minimise truck-hours: a trip costs (2 x travel + loading) / 3600 */
    SUPPLY_MIN_COST = 1     /* a trip costs cost_per_hour x hours + cost_per_m x 2 x distance */
};

/* The instance. Arrays are borrowed; d = depot, s = site, c = commodity. */
typedef struct supply_problem {
    size_t n_comm, n_depots, n_sites, n_trucks;
    const stock_commodity_t *comm;   /* [c]: name, unit_kg, unit_m3, pack_units, priority */
    const char *const *depot_names;  /* [d]; NULL = "depot <d>" */
    const char *const *site_names;   /* [s]; NULL = "site <s>" */
    const double *stock;             /* [d * n_comm + c] units on hand, >= 0 (whole packs used) */
    const double *need;              /* [s * n_comm + c] units needed, >= 0 (rounded up to packs) */
    const double *storage_m3;        /* [s] free storage, >= 0, INFINITY = unlimited; NULL = all */
    const double *time_s;            /* [d * n_sites + s] one-way travel time; INFINITY = no road */
    const double *dist_m;            /* [d * n_sites + s] one-way distance; NULL = 0 everywhere */
    const supply_truck_t *trucks;    /* [k] */
    int objective;                   /* SUPPLY_MIN_* */
    double penalty;                  /* cost per unit short x priority; 0 = automatic (docs) */
} supply_problem_t;

enum supply_reason {
    SUPPLY_MET = 0,         /* nothing short */
    SUPPLY_STOCK,           /* every depot that reaches the site ran out of the commodity */
    SUPPLY_FLEET,           /* no truck hours left for one more trip that could carry it */
    SUPPLY_STORAGE,         /* the site's storage is full (or zero) */
    SUPPLY_UNREACHABLE,     /* no road from any depot, or no truck can make the round trip */
    SUPPLY_PENALTY,         /* delivery would cost more than the shortage penalty */
    SUPPLY_NO_PLAN          /* the solver stopped before it found any plan */
};

/* One site and commodity. */
typedef struct supply_line {
    size_t site, comm;
    double needed;          /* units (whole packs) */
    double delivered;       /* units */
    double short_units;     /* needed - delivered */
    double packs_needed, packs_delivered;
    double kg, m3;          /* delivered */
    int reason;             /* SUPPLY_* (SUPPLY_MET when nothing is short) */
} supply_line_t;

/* One depot->site pair used by the plan. */
typedef struct supply_route {
    size_t depot, site;
    double time_s, dist_m;  /* one way */
    double *trips;          /* [k] whole trips per truck type (owned, n_trucks) */
    double *packs;          /* [c] packs shipped (owned, n_comm) */
    double kg, m3;          /* total load */
    double kg_per_trip, m3_per_trip;   /* total / trips */
    double truck_hours;     /* sum over types of trips x (2 x time + loading), hours */
} supply_route_t;

typedef struct supply_result {
    int status;             /* SOLVER_* */
    double objective, bound, gap;
    long nodes;
    double seconds;         /* solver wall-clock time (LP relaxation for the start + MIP) */
    double penalty;         /* the penalty used (given or automatic) */
    double start_objective; /* objective of the heuristic plan handed to the solver */
    double truck_hours;     /* all trips, hours */
    double trip_cost;       /* objective part of trips */
    double short_cost;      /* objective part of shortages */
    supply_line_t *lines;   /* [s * n_comm + c] */
    size_t n_lines;
    supply_route_t *routes; /* pairs with at least one trip */
    size_t n_routes;
    double *hours_used_s;   /* [k] fleet seconds used per truck type */
    double *site_m3;        /* [s] volume delivered per site */
    warn_list_t warnings;   /* zero storage, unreachable depots or sites, idle types */
} supply_result_t;

/* Checks the instance; the message names the depot, site, truck or commodity. */
int supply_check(const supply_problem_t *p, err_t *e);
/* Builds and solves the MIP. On success 'res' is filled (caller frees with
 * supply_result_destroy), also when the solver stops at its time limit. */
int supply_solve(const supply_problem_t *p, const solver_opts_t *o, supply_result_t *res,
                 err_t *e);
void supply_result_destroy(supply_result_t *r);   /* NULL-safe */

/* "met", "stock", "fleet", "storage", "unreachable", "penalty", "no plan". */
const char *supply_reason_name(int reason);

#endif
