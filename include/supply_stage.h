/* supply_stage: the stock and shipment stage. For a set of open sites and the
 * people assigned to each, it sizes the stock of every commodity (stock module:
 * persons x rate x days x (1 + buffer), whole packs), finds depot -> site
 * vehicle travel (depots module), solves the shipment MIP (supply module) and
 * writes the stock table, the shipment manifest, the unmet-need table, depot
 * balances and travel, plus the "supply" part of summary.json. Settings come
 * from the scenario's "supply" section (docs/plan.md). */
#ifndef SUPPLY_STAGE_H
#define SUPPLY_STAGE_H

#include <stddef.h>

#include <cJSON.h>

#include "depots.h"
#include "err.h"
#include "inputs.h"
#include "points.h"
#include "reach.h"
#include "stock.h"
#include "supply.h"

typedef struct supply_stage {
    size_t n_sites, n_depots, n_comm, n_trucks;
    stock_commodity_t *comm;   /* [c] scenario values, defaults filled in */
    stock_policy_t policy;
    supply_truck_t *trucks;    /* [k] */
    double *persons;           /* [s] people assigned to each site */
    stock_line_t *stock;       /* [s * n_comm + c] stock each site needs */
    double *need;              /* [s * n_comm + c] units needed (whole packs) */
    double *depot_stock;       /* [d * n_comm + c] units on hand, d = index in the depot layer */
    size_t n_active;           /* depots with any stock: only these enter travel and the model */
    size_t *active;            /* [a] layer index of active depot a */
    double *active_stock;      /* [a * n_comm + c] */
    depots_travel_t travel;    /* active depots (from) -> sites (to) */
    double *time_s, *dist_m;   /* [a * n_sites + s] half the round trip; INFINITY = no road */
    supply_result_t res;       /* the shipment plan; route depots are active indices */
    int assignment;            /* how persons were found: SUPPLY_STAGE_* */
    warn_list_t warnings;      /* depots without stock, unreachable pairs, model warnings */
    double seconds_travel, seconds_solve;
} supply_stage_t;

enum { SUPPLY_STAGE_GIVEN = 0, SUPPLY_STAGE_CAPACITY = 1, SUPPLY_STAGE_NEAREST = 2 };

/* People per site from a reach result into persons[0..n_sites): the
 * capacity-aware assignment when any site has a capacity, else every person
 * whose nearest site it is (people beyond the time limit included: they need
 * supplies too). Returns SUPPLY_STAGE_CAPACITY or SUPPLY_STAGE_NEAREST. */
int supply_stage_persons_from_reach(const reach_result_t *r, double *persons);

/* Run the stage for 'sites' with persons[s] people each ('assignment' says how
 * they were found, for the outputs). Needs in->scen->supply and in->depots.
 * Errors: no supply section or no depots layer, a depot id in
 * supply.depot_stock missing from the layer, a bad commodity or policy
 * (ERR_INPUT); igraph (ERR_GRAPH) and solver (ERR_SOLVER) failures. Shortages
 * are not errors: they are in the result with their reasons. Caller destroys
 * 'st' with supply_stage_destroy (also after an error). */
int supply_stage_run(const inputs_t *in, const points_t *sites, const double *persons,
                     int assignment, supply_stage_t *st, err_t *e);
void supply_stage_destroy(supply_stage_t *st);   /* NULL-safe */

/* Write supply_stock.csv, supply_shipments.csv, supply_unmet.csv,
 * supply_depots.csv and supply_travel.csv into 'outdir', and add a "supply"
 * object to 'summary' (assumptions, totals, solver status and gap, files). */
int supply_stage_write(const char *outdir, const inputs_t *in, const points_t *sites,
                       const supply_stage_t *st, cJSON *summary, err_t *e);

/* The human summary on stdout: stock per site, trips per depot, shortages. */
void supply_stage_print(const inputs_t *in, const points_t *sites, const supply_stage_t *st);

/* The caution every supply plan carries (also in summary.json). */
extern const char supply_stage_caution[];

#endif
