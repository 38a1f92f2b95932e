/* Tests for stock sizing: worked examples by hand against the Sphere Handbook
 * (2018) rates, the food basket through its cited energy values, rounding to
 * whole packs, and every bad-input path. */
#include <math.h>
#include <string.h>

#include "check.h"
#include "stock.h"

static stock_policy_t week(void)
{
    stock_policy_t p = {7 * STOCK_DAY_S, 0, 0};
    return p;
}

int main(void)
{
    err_t e = {0};
    stock_commodity_t water, food, shelter, c;
    stock_policy_t p = week();
    stock_line_t l, lines[3], tot;

    CHECK(stock_default("water", &water, &e) == ERR_OK);
    CHECK(stock_default("food", &food, &e) == ERR_OK);
    CHECK(stock_default("shelter", &shelter, &e) == ERR_OK);
    CHECK(stock_commodity_check(&water, &e) == ERR_OK);
    CHECK(stock_commodity_check(&food, &e) == ERR_OK);
    CHECK(stock_commodity_check(&shelter, &e) == ERR_OK);

    /* Water, Sphere Handbook (2018) rate of 15 L per person per day:
     * 10,000 people x 15 L x 7 days = 1,050,000 L = 1,050 m3 = 1,050,000 kg,
     * exactly 1,050 packs of 1,000 L (no extra pack from float noise). */
    CHECK(stock_size(&water, &p, 10000, &l, &e) == ERR_OK);
    CHECK_NEAR(l.units_exact, 1050000, 1e-6);
    CHECK_NEAR(l.packs, 1050, 0);
    CHECK_NEAR(l.units, 1050000, 1e-6);
    CHECK_NEAR(l.m3, 1050, 1e-9);
    CHECK_NEAR(l.kg, 1050000, 1e-6);
    CHECK_NEAR(l.reorder_units, 0, 0);

    /* Food for 2,100 kcal per person per day (Sphere 2018). The basket of
     * 400 g maize meal (360 kcal/100 g), 60 g pulses (335), 25 g oil (885),
     * 50 g fortified blended food (380), 15 g sugar (400), 5 g salt (0):
     * energy values recalled from memory of the WHO/UNHCR/IFRC/WFP (2002)
     * composition annex, the basket from memory of Sphere (2011) example ration 1.
     * 1440 + 201 + 221.25 + 190 + 60 + 0 = 2112.25 kcal in 555 g. */
    {
        size_t n;
        double kcal, g, kg;
        const stock_food_item_t *b = stock_food_basket_default(&n);
        CHECK(n == 6);
        CHECK(stock_food_energy(b, n, &kcal, &g, &e) == ERR_OK);
        CHECK_NEAR(kcal, 2112.25, 1e-9);
        CHECK_NEAR(g, 555, 1e-9);
        /* Scaled to 2,100 kcal: 555 g x 2100 / 2112.25 = 551.7813 g. */
        CHECK(stock_food_kg(b, n, 2100, &kg, &e) == ERR_OK);
        CHECK_NEAR(kg, 0.555 * 2100 / 2112.25, 1e-12);
        CHECK_NEAR(kg, 0.5517813, 1e-7);
        CHECK_NEAR(food.quantity, kg, 1e-12);
    }
    /* 10,000 people x 0.5517813 kg x 7 days = 38,624.69 kg = 772.49 bags of
     * 50 kg, rounded up to 773 bags = 38,650 kg = 77.3 m3 at 0.002 m3/kg. */
    CHECK(stock_size(&food, &p, 10000, &l, &e) == ERR_OK);
    CHECK_NEAR(l.units_exact, 38624.69, 0.01);
    CHECK_NEAR(l.packs, 773, 0);
    CHECK_NEAR(l.kg, 38650, 1e-6);
    CHECK_NEAR(l.m3, 77.3, 1e-9);

    /* Shelter, Sphere (2018) 3.5 m2 per person, once: 35,000 m2, whatever the
     * days; 35,000 / 24 = 1,458.33 -> 1,459 sheets = 35,016 m2 x 0.19 kg. */
    {
        stock_policy_t longer = {30 * STOCK_DAY_S, 0, 0};
        CHECK(stock_size(&shelter, &longer, 10000, &l, &e) == ERR_OK);
        CHECK_NEAR(l.units_exact, 35000, 1e-6);
        CHECK_NEAR(l.packs, 1459, 0);
        CHECK_NEAR(l.kg, 35016 * 0.19, 1e-6);
    }

    /* Buffer and lead time: 10 % buffer, 2 days lead, 7 days cover:
     * 10,000 x 15 x (7 + 2) x 1.1 = 1,485,000 L = 1,485 packs; reorder level
     * = 10,000 x 15 x 2 x 1.1 = 330,000 L. */
    {
        stock_policy_t q = {7 * STOCK_DAY_S, 2 * STOCK_DAY_S, 0.10};
        CHECK(stock_size(&water, &q, 10000, &l, &e) == ERR_OK);
        CHECK_NEAR(l.units_exact, 1485000, 1e-4);
        CHECK_NEAR(l.packs, 1485, 0);
        CHECK_NEAR(l.reorder_units, 330000, 1e-4);
    }

    /* A group share: supplementary food for under-fives, 16 % of 10,000 =
     * 1,600 children x 0.2 kg x 7 days = 2,240 kg = 89.6 -> 90 bags of 25 kg
     * (rate and share illustrative, common practice, no source). */
    c = food;
    c.name = "supplementary";
    c.quantity = 0.2;
    c.pack_units = 25;
    c.group_share = 0.16;
    CHECK(stock_size(&c, &p, 10000, &l, &e) == ERR_OK);
    CHECK_NEAR(l.persons, 1600, 1e-9);
    CHECK_NEAR(l.units_exact, 2240, 1e-9);
    CHECK_NEAR(l.packs, 90, 0);

    /* Per household: 10,000 / 5 = 2,000 households x 2 kg x 7 days = 28,000 kg. */
    c = food;
    c.name = "fuel";
    c.rate_kind = STOCK_PER_HOUSEHOLD_DAY;
    c.quantity = 2;
    c.household_size = 5;
    CHECK(stock_size(&c, &p, 10000, &l, &e) == ERR_OK);
    CHECK_NEAR(l.units_exact, 28000, 1e-9);
    CHECK_NEAR(l.packs, 560, 0);

    /* Whole packs: never fewer units than needed; one unit over opens a pack. */
    CHECK_NEAR(stock_packs(100, 50), 2, 0);
    CHECK_NEAR(stock_packs(100.5, 50), 3, 0);
    CHECK_NEAR(stock_packs(0, 50), 0, 0);
    CHECK_NEAR(stock_packs(0.3, 0.1), 3, 0);   /* 0.3 / 0.1 = 2.9999999999999996 */

    /* A site: totals over commodities (m3: 1,050 water + 77.3 food + 1,459 x
     * 24 x 0.0005 shelter = 17.508). Zero persons gives zero stock. */
    {
        stock_commodity_t all[3];
        all[0] = water;
        all[1] = food;
        all[2] = shelter;
        CHECK(stock_size_site(all, 3, &p, 10000, lines, &tot, &e) == ERR_OK);
        CHECK_NEAR(tot.packs, 1050 + 773 + 1459, 0);
        CHECK_NEAR(tot.m3, 1050 + 77.3 + 17.508, 1e-9);
        CHECK(stock_size_site(all, 3, &p, 0, lines, &tot, &e) == ERR_OK);
        CHECK_NEAR(tot.kg, 0, 0);
    }

    /* Bad input: each error names the commodity and the field. */
    c = water;
    c.quantity = 0;
    CHECK(stock_size(&c, &p, 100, &l, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "'water'");
    CHECK_STR_HAS(e.msg, "quantity");
    c.quantity = -15;
    CHECK(stock_commodity_check(&c, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "got -15");
    c = water;
    c.unit_kg = 0;
    CHECK(stock_commodity_check(&c, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "'water': unit_kg");
    c = water;
    c.unit_kg = -1;
    CHECK(stock_commodity_check(&c, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "unit_kg");
    c = water;
    c.unit_m3 = NAN;
    CHECK(stock_commodity_check(&c, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "unit_m3");
    c = food;
    c.pack_units = 0;
    CHECK(stock_commodity_check(&c, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "'food': pack_units");
    c = food;
    c.priority = 0;
    CHECK(stock_commodity_check(&c, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "priority");
    c = food;
    c.group_share = 1.5;
    CHECK(stock_commodity_check(&c, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "group_share");
    c = food;
    c.rate_kind = STOCK_PER_HOUSEHOLD_DAY;
    c.household_size = 0;
    CHECK(stock_commodity_check(&c, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "household_size");
    c = food;
    c.rate_kind = 9;
    CHECK(stock_commodity_check(&c, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "rate kind");
    c = food;
    c.name = NULL;
    c.unit_kg = 0;
    CHECK(stock_commodity_check(&c, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "(unnamed)");
    {
        stock_policy_t q = {0, 0, 0};
        CHECK(stock_size(&water, &q, 100, &l, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "cover_days");
        q.cover_s = STOCK_DAY_S;
        q.lead_s = -1;
        CHECK(stock_policy_check(&q, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "lead_days");
        q.lead_s = 0;
        q.buffer = -0.1;
        CHECK(stock_policy_check(&q, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "buffer");
    }
    CHECK(stock_size(&water, &p, -5, &l, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "persons");
    CHECK(stock_size_site(&c, 1, &p, 10, lines, &tot, &e) == ERR_INPUT);
    {
        stock_food_item_t bad[2] = {{"rice", 100, 360}, {"oil", -1, 885}};
        double kcal, g, kg;
        CHECK(stock_food_energy(bad, 2, &kcal, &g, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "'oil'");
        bad[1].grams = 10;
        bad[1].kcal_per_100g = NAN;
        CHECK(stock_food_energy(bad, 2, &kcal, &g, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "kcal_per_100g");
        bad[0].kcal_per_100g = 0;
        bad[1].kcal_per_100g = 0;
        CHECK(stock_food_kg(bad, 2, 2100, &kg, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "no energy");
        CHECK(stock_food_kg(bad, 2, 0, &kg, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "target energy");
    }
    CHECK(stock_default("soap", &c, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "'soap'");
    return CHECK_DONE("test_stock");
}
