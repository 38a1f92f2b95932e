/* stock: stock sizing per site (see include/stock.h).
 * Invariant: a stock line always holds whole packs and never less than the
 * exact need (rounding is up). Rates are per day; time inside is seconds, so
 * days = seconds / 86400. Sources of the defaults are in docs/supply.md. */
#include "stock.h"

#include <math.h>
#include <string.h>

/* Messages name the commodity; an unnamed one is still identifiable. */
static const char *cname(const stock_commodity_t *c)
{
    return (c->name != NULL && c->name[0] != '\0') ? c->name : "(unnamed)";
}

static int positive(const stock_commodity_t *c, const char *field, double v, err_t *e)
{
    if (!(v > 0) || !isfinite(v))
        return err_set(e, ERR_INPUT, "commodity '%s': %s must be a number > 0 (got %g)",
                       cname(c), field, v);
    return ERR_OK;
}

/* Validates one commodity; returns ERR_INPUT naming commodity and field. */
int stock_commodity_check(const stock_commodity_t *c, err_t *e)
{
    if (c->rate_kind != STOCK_PER_PERSON_DAY && c->rate_kind != STOCK_PER_HOUSEHOLD_DAY &&
        c->rate_kind != STOCK_ONCE_PER_PERSON)
        return err_set(e, ERR_INPUT, "commodity '%s': unknown rate kind %d", cname(c),
                       c->rate_kind);
    if (positive(c, "quantity (rate)", c->quantity, e)) return e->code;
    if (c->rate_kind == STOCK_PER_HOUSEHOLD_DAY &&
        positive(c, "household_size", c->household_size, e))
        return e->code;
    if (positive(c, "unit_kg (weight)", c->unit_kg, e)) return e->code;
    if (positive(c, "unit_m3 (volume)", c->unit_m3, e)) return e->code;
    if (positive(c, "pack_units (pack size)", c->pack_units, e)) return e->code;
    if (positive(c, "priority", c->priority, e)) return e->code;
    if (!(c->group_share >= 0 && c->group_share <= 1))
        return err_set(e, ERR_INPUT, "commodity '%s': group_share must be in [0, 1] (got %g; "
                       "0 means everyone)", cname(c), c->group_share);
    return ERR_OK;
}

/* Validates a policy: cover > 0, lead time >= 0, buffer >= 0 (all finite). */
int stock_policy_check(const stock_policy_t *p, err_t *e)
{
    if (!(p->cover_s > 0) || !isfinite(p->cover_s))
        return err_set(e, ERR_INPUT, "stock policy: cover_days must be > 0 (got %g days)",
                       p->cover_s / STOCK_DAY_S);
    if (!(p->lead_s >= 0) || !isfinite(p->lead_s))
        return err_set(e, ERR_INPUT, "stock policy: lead_days must be >= 0 (got %g days)",
                       p->lead_s / STOCK_DAY_S);
    if (!(p->buffer >= 0) || !isfinite(p->buffer))
        return err_set(e, ERR_INPUT, "stock policy: buffer must be >= 0 (got %g)", p->buffer);
    return ERR_OK;
}

/* Whole packs of 'pack_units' needed to hold 'units' (rounded up). */
double stock_packs(double units, double pack_units)
{
    double r = units / pack_units;
    /* 1050000 / 1000 may come out as 1050.0000000001; that is not a 1051st pack. */
    return ceil(r - 1e-9 * fmax(1.0, r));
}

/* Units per person per day (0 for one-off commodities). */
static double daily_per_person(const stock_commodity_t *c)
{
    switch (c->rate_kind) {
    case STOCK_PER_PERSON_DAY: return c->quantity;
    case STOCK_PER_HOUSEHOLD_DAY: return c->quantity / c->household_size;
    default: return 0;
    }
}

/* Stock for 'persons' people: persons x share x rate x (cover + lead) / 86400
 * x (1 + buffer), or persons x share x quantity x (1 + buffer) for one-off
 * items, rounded up to whole packs; kg and m3 of the rounded amount. */
int stock_size(const stock_commodity_t *c, const stock_policy_t *p, double persons,
               stock_line_t *out, err_t *e)
{
    double share, days, lead_days, base;

    memset(out, 0, sizeof *out);
    if (stock_commodity_check(c, e) || stock_policy_check(p, e)) return e->code;
    if (!(persons >= 0) || !isfinite(persons))
        return err_set(e, ERR_INPUT, "commodity '%s': persons must be >= 0 (got %g)", cname(c),
                       persons);
    share = c->group_share > 0 ? c->group_share : 1.0;
    out->persons = persons * share;
    days = (p->cover_s + p->lead_s) / STOCK_DAY_S;
    lead_days = p->lead_s / STOCK_DAY_S;
    if (c->rate_kind == STOCK_ONCE_PER_PERSON) {
        base = out->persons * c->quantity;
        out->reorder_units = 0;  /* a one-off item is not consumed over time */
    } else {
        base = out->persons * daily_per_person(c) * days;
        out->reorder_units = out->persons * daily_per_person(c) * lead_days * (1 + p->buffer);
    }
    out->units_exact = base * (1 + p->buffer);
    out->packs = stock_packs(out->units_exact, c->pack_units);
    out->units = out->packs * c->pack_units;
    out->kg = out->units * c->unit_kg;
    out->m3 = out->units * c->unit_m3;
    return ERR_OK;
}

/* stock_size for each of n commodities; sums packs, kg and m3 into *total. */
int stock_size_site(const stock_commodity_t *c, size_t n, const stock_policy_t *p,
                    double persons, stock_line_t *lines, stock_line_t *total, err_t *e)
{
    if (total != NULL) memset(total, 0, sizeof *total);
    for (size_t i = 0; i < n; i++) {
        if (stock_size(&c[i], p, persons, &lines[i], e)) return e->code;
        if (total != NULL) {
            total->packs += lines[i].packs;
            total->kg += lines[i].kg;
            total->m3 += lines[i].m3;
        }
    }
    if (total != NULL) total->persons = persons;
    return ERR_OK;
}

/* Energy (kcal) and mass (g) per person per day of a basket; ERR_INPUT
 * names an item with negative or non-numeric grams or energy. */
int stock_food_energy(const stock_food_item_t *items, size_t n, double *kcal, double *grams,
                      err_t *e)
{
    double k = 0, g = 0;

    for (size_t i = 0; i < n; i++) {
        const char *nm = items[i].name ? items[i].name : "(unnamed)";
        if (!(items[i].grams >= 0) || !isfinite(items[i].grams))
            return err_set(e, ERR_INPUT, "food item '%s': grams must be >= 0 (got %g)", nm,
                           items[i].grams);
        if (!(items[i].kcal_per_100g >= 0) || !isfinite(items[i].kcal_per_100g))
            return err_set(e, ERR_INPUT, "food item '%s': kcal_per_100g must be >= 0 (got %g)",
                           nm, items[i].kcal_per_100g);
        k += items[i].grams * items[i].kcal_per_100g / 100.0;
        g += items[i].grams;
    }
    *kcal = k;
    *grams = g;
    return ERR_OK;
}

/* Scales the basket proportionally (same composition) to 'kcal' per person
 * per day and returns its mass in kg per person per day. */
int stock_food_kg(const stock_food_item_t *items, size_t n, double kcal, double *kg, err_t *e)
{
    double k, g;

    *kg = 0;
    if (!(kcal > 0) || !isfinite(kcal))
        return err_set(e, ERR_INPUT, "food basket: target energy must be > 0 kcal (got %g)",
                       kcal);
    if (stock_food_energy(items, n, &k, &g, e)) return e->code;
    if (!(k > 0))
        return err_set(e, ERR_INPUT, "food basket: the %zu items give no energy; give grams and "
                       "kcal_per_100g", n);
    *kg = g / 1000.0 * kcal / k;
    return ERR_OK;
}

/* A general ration of 555 g per person per day. Energy per 100 g recalled
 * from memory of the WHO/UNHCR/IFRC/WFP "Food and nutrition needs in
 * emergencies" (2002) composition annex; the basket is the kind of example
 * ration printed in the Sphere Handbook (2011 edition, from memory), which
 * gives about 2,113 kcal. See docs/supply.md. */
static const stock_food_item_t default_basket[] = {
    {"maize meal", 400, 360},
    {"pulses", 60, 335},
    {"vegetable oil", 25, 885},
    {"fortified blended food", 50, 380},
    {"sugar", 15, 400},
    {"iodised salt", 5, 0},
};

/* The default basket above (static, not to be freed); *n gets its length. */
const stock_food_item_t *stock_food_basket_default(size_t *n)
{
    *n = sizeof default_basket / sizeof default_basket[0];
    return default_basket;
}

/* Sphere Handbook (2018): 2,100 kcal per person per day (general food ration). */
#define SPHERE_KCAL 2100.0

/* Fills *out with the default commodity 'name' (water, food, shelter); the
 * values and their sources are in docs/supply.md. Strings are static. */
int stock_default(const char *name, stock_commodity_t *out, err_t *e)
{
    memset(out, 0, sizeof *out);
    out->group_share = 0;
    out->household_size = 5;   /* common practice, no source */
    if (name != NULL && strcmp(name, "water") == 0) {
        /* Sphere Handbook (2018): 15 L per person per day. 1 L = 1 kg = 0.001 m3.
         * Pack: a 1,000 L tank or bladder fill (common practice, no source). */
        out->name = "water";
        out->unit = "L";
        out->rate_kind = STOCK_PER_PERSON_DAY;
        out->quantity = 15;
        out->unit_kg = 1;
        out->unit_m3 = 0.001;
        out->pack_units = 1000;
        out->priority = 3;      /* common practice, no source */
        return ERR_OK;
    }
    if (name != NULL && strcmp(name, "food") == 0) {
        size_t n;
        const stock_food_item_t *b = stock_food_basket_default(&n);
        out->name = "food";
        out->unit = "kg";
        out->rate_kind = STOCK_PER_PERSON_DAY;
        if (stock_food_kg(b, n, SPHERE_KCAL, &out->quantity, e)) return e->code;
        out->unit_kg = 1;
        /* Bagged food stacks at about 2 m3 per tonne; 50 kg bags
         * (common practice, no source). */
        out->unit_m3 = 0.002;
        out->pack_units = 50;
        out->priority = 2;      /* common practice, no source */
        return ERR_OK;
    }
    if (name != NULL && strcmp(name, "shelter") == 0) {
        /* Sphere Handbook (2018): 3.5 m2 covered living space per person, once.
         * Material as plastic sheeting of about 0.19 kg per m2 (from memory of
         * common sheeting specifications), 0.0005 m3 per m2 folded, sold in
         * 4 m x 6 m = 24 m2 sheets (common practice, no source). */
        out->name = "shelter";
        out->unit = "m2";
        out->rate_kind = STOCK_ONCE_PER_PERSON;
        out->quantity = 3.5;
        out->unit_kg = 0.19;
        out->unit_m3 = 0.0005;
        out->pack_units = 24;
        out->priority = 1;      /* common practice, no source */
        return ERR_OK;
    }
    return err_set(e, ERR_INPUT, "no default commodity named '%s' (known: water, food, shelter)",
                   name ? name : "(null)");
}
