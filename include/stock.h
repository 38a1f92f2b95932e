/* stock: how much of each commodity a site needs. A commodity has a rate
 * (per person per day, per household per day, or once per person), a unit
 * weight and volume and a pack size; a policy gives days of cover, lead time
 * and a safety buffer. Stock = persons x rate x days x (1 + buffer), rounded
 * UP to whole packs, with weight and volume. Defaults and their sources are in
 * docs/supply.md. Plain arithmetic: no foreign library. */
#ifndef STOCK_H
#define STOCK_H

#include <stddef.h>

#include "err.h"

#define STOCK_DAY_S 86400.0

enum stock_rate {
    STOCK_PER_PERSON_DAY = 0,    /* e.g. water, L per person per day */
    STOCK_PER_HOUSEHOLD_DAY = 1, /* e.g. fuel, kg per household per day */
    STOCK_ONCE_PER_PERSON = 2    /* e.g. a hygiene kit, once per person whatever the days */
};

/* One commodity. Callers fill it (the scenario reader, or stock_default). */
typedef struct stock_commodity {
    const char *name;       /* borrowed; names the commodity in messages */
    const char *unit;       /* borrowed; "L", "kg", "m2", "kit" */
    int rate_kind;          /* STOCK_* */
    double quantity;        /* units per person (or household) per day, or per person once; > 0 */
    double household_size;  /* persons per household, > 0; read for STOCK_PER_HOUSEHOLD_DAY */
    double unit_kg;         /* kg per unit, > 0 */
    double unit_m3;         /* m3 per unit, > 0 */
    double pack_units;      /* units per pack (bag, carton, kit, tank), > 0 */
    double priority;        /* weight of one unit short in the shipment model, > 0 */
    double group_share;     /* share of persons it is for, (0, 1] (0.16 = under-fives); 0 = all */
} stock_commodity_t;

typedef struct stock_policy {
    double cover_s;         /* days of cover, in seconds; > 0 */
    double lead_s;          /* resupply lead time, seconds; >= 0; added to the cover */
    double buffer;          /* safety buffer, fraction >= 0 (0.1 = 10 %) */
} stock_policy_t;

/* Stock of one commodity at one site. */
typedef struct stock_line {
    double persons;         /* persons it is for, after the group share */
    double units_exact;     /* persons x rate x days x (1 + buffer), before rounding */
    double packs;           /* whole packs (an integer held in a double) */
    double units;           /* packs x pack_units (>= units_exact) */
    double kg;              /* units x unit_kg */
    double m3;              /* units x unit_m3 */
    double reorder_units;   /* units used during the lead time x (1 + buffer): order again here */
} stock_line_t;

/* One item of a food basket, per person per day. */
typedef struct stock_food_item {
    const char *name;       /* borrowed */
    double grams;           /* g per person per day, >= 0 */
    double kcal_per_100g;   /* energy, kcal per 100 g, >= 0 */
} stock_food_item_t;

/* Check a commodity or a policy; the message names the commodity and field. */
int stock_commodity_check(const stock_commodity_t *c, err_t *e);
int stock_policy_check(const stock_policy_t *p, err_t *e);

/* Stock of commodity 'c' for 'persons' people under policy 'p' into *out. */
int stock_size(const stock_commodity_t *c, const stock_policy_t *p, double persons,
               stock_line_t *out, err_t *e);
/* The same for n commodities into lines[0..n-1]; *total (may be NULL) gets the
 * sums of packs, kg and m3 (units fields are 0: units differ by commodity). */
int stock_size_site(const stock_commodity_t *c, size_t n, const stock_policy_t *p,
                    double persons, stock_line_t *lines, stock_line_t *total, err_t *e);

/* Whole packs holding 'units' (rounded up; a relative 1e-9 absorbs float noise). */
double stock_packs(double units, double pack_units);

/* Energy (kcal) and mass (g) of a basket per person per day. */
int stock_food_energy(const stock_food_item_t *items, size_t n, double *kcal, double *grams,
                      err_t *e);
/* kg per person per day of the basket scaled to give 'kcal' per person per day. */
int stock_food_kg(const stock_food_item_t *items, size_t n, double kcal, double *kg, err_t *e);
/* The default general-ration basket (static table; sources in docs/supply.md). */
const stock_food_item_t *stock_food_basket_default(size_t *n);

/* Default commodity "water", "food" or "shelter" into *out (see docs/supply.md);
 * ERR_INPUT for another name. Name and unit point at static strings. */
int stock_default(const char *name, stock_commodity_t *out, err_t *e);

#endif
