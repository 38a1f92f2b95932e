/* scen_supply: the scenario's "supply" section (keys, units, defaults and
 * sources in docs/plan.md): commodities with their rates, the stock policy
 * (days of cover, lead time, buffer), stock on hand per depot, the fleet by
 * truck type, and solver limits. Read by src/io/scen_supply.c; reached as
 * scen_t.supply (NULL when absent). Units inside are SI: seconds, metres. */
#ifndef SCEN_SUPPLY_H
#define SCEN_SUPPLY_H

#include <stddef.h>

/* How a commodity's quantity is counted (same values as STOCK_* in stock.h;
 * the io folder does not include model headers). */
enum scen_rate {
    SCEN_RATE_PER_PERSON_DAY = 0,
    SCEN_RATE_PER_HOUSEHOLD_DAY = 1,
    SCEN_RATE_ONCE_PER_PERSON = 2
};
enum scen_supply_objective { SCEN_SUPPLY_HOURS = 0, SCEN_SUPPLY_COST = 1 };

/* Names with built-in defaults (water, food, shelter): their keys may be left
 * out and are then NAN here (rate_kind -1, unit NULL); the supply stage fills
 * them from stock_default. Every other commodity gives every key. */

/* One commodity, with the meaning of stock_commodity_t (include/stock.h). */
typedef struct scen_commodity {
    char *name;             /* unique within the section */
    char *unit;             /* "L", "kg", "m2", "kit" */
    int rate_kind;          /* SCEN_RATE_*, or -1: take the default */
    double quantity;        /* units per person (household) per day, or per person once; > 0 */
    double household_size;  /* persons per household, > 0 */
    double unit_kg;         /* > 0 */
    double unit_m3;         /* > 0 */
    double pack_units;      /* units per pack, > 0 */
    double priority;        /* > 0: weight of one unit short */
    double group_share;     /* (0, 1], or 0 = everyone */
    char *group;            /* population group it is for (a share group), or NULL */
} scen_commodity_t;

/* One truck type, with the meaning of supply_truck_t (include/supply.h). */
typedef struct scen_truck {
    char *name;
    double payload_kg;      /* > 0 */
    double volume_m3;       /* > 0 */
    int count;              /* >= 0 */
    double cost_per_hour;   /* >= 0 */
    double cost_per_m;      /* >= 0 (file: per km) */
    double loading_s;       /* loading plus unloading per trip (file: minutes) */
    double hours_s;         /* working time per truck in the period (file: hours) */
} scen_truck_t;

/* Stock on hand at one depot, by commodity. */
typedef struct scen_depot_stock {
    char *depot_id;         /* an id of the sites.depots layer (checked when it is loaded) */
    double *units;          /* [n_comm] units on hand, >= 0; commodities not named: 0 */
} scen_depot_stock_t;

struct scen_supply {
    int present;            /* 1: the section was given */
    double cover_s;         /* "days_of_cover" (0, 365], default 14 days */
    double lead_s;          /* "lead_time_days" [0, 90], default 0 */
    double buffer;          /* "buffer" [0, 2], default 0.1 */
    scen_commodity_t *comm; /* "commodities"; default: water and food */
    size_t n_comm;
    scen_truck_t *trucks;   /* "fleet", required */
    size_t n_trucks;
    scen_depot_stock_t *depots; /* "depot_stock", by depot id */
    size_t n_depots;
    int objective;          /* "objective": SCEN_SUPPLY_HOURS ("hours", default) or _COST */
    double penalty;         /* "shortage_penalty" >= 0; 0 = automatic */
    double time_limit_s;    /* "time_limit_min" (0, 1440], default 2 min */
    double rel_gap;         /* "gap" [0, 1), default 0.01 */
    double access_mps;      /* "access_kmh" (0, 60], default 5 km/h: point <-> road leg */
    double max_access_m;    /* "max_access_m" [0, 100000], default 2000 m */
};

#endif
