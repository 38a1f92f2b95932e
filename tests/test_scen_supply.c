/* test_scen_supply: the scenario's "supply" section: defaults, units turned into
 * seconds and metres, commodities left to their defaults, groups, and every
 * refusal with its key path. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include "check.h"
#include "scen_supply.h"
#include "scenario.h"

#define HEAD "{\"inputs\": {\"population\": \"p.tif\"}, "
#define FLEET "\"fleet\": [{\"name\": \"lorry\", \"payload_kg\": 8000, \"volume_m3\": 30, \"count\": 2}]"
#define STOCK "\"depot_stock\": {\"D1\": {\"water\": 1000}}"

static scen_t *parse(const char *json, err_t *e)
{
    scen_t *s = NULL;
    if (scen_parse(json, "/tmp/t.json", &s, e) != ERR_OK) return NULL;
    return s;
}

static void test_defaults(void)
{
    err_t e = {0};
    scen_t *s = parse(HEAD "\"supply\": {" FLEET ", " STOCK "}}", &e);
    const struct scen_supply *x;

    CHECK(s != NULL);
    if (s == NULL) return;
    x = s->supply;
    CHECK(x != NULL && x->present);
    CHECK_NEAR(x->cover_s, 14 * 86400.0, 0);
    CHECK_NEAR(x->lead_s, 0, 0);
    CHECK_NEAR(x->buffer, 0.1, 1e-12);
    /* Without a commodity list: water and food, every value left to the defaults. */
    CHECK(x->n_comm == 2);
    CHECK_STR_HAS(x->comm[0].name, "water");
    CHECK_STR_HAS(x->comm[1].name, "food");
    CHECK(isnan(x->comm[0].quantity) && x->comm[0].rate_kind == -1 && x->comm[0].unit == NULL);
    /* Fleet: loading 60 min and 40 h by default; cost per km into cost per metre. */
    CHECK(x->n_trucks == 1 && x->trucks[0].count == 2);
    CHECK_NEAR(x->trucks[0].loading_s, 3600, 0);
    CHECK_NEAR(x->trucks[0].hours_s, 40 * 3600.0, 0);
    CHECK(x->n_depots == 1);
    CHECK_STR_HAS(x->depots[0].depot_id, "D1");
    CHECK_NEAR(x->depots[0].units[0], 1000, 0);
    CHECK_NEAR(x->depots[0].units[1], 0, 0);
    CHECK(x->objective == SCEN_SUPPLY_HOURS);
    CHECK_NEAR(x->time_limit_s, 120, 0);
    CHECK_NEAR(x->rel_gap, 0.01, 1e-12);
    CHECK_NEAR(x->access_mps, 5 / 3.6, 1e-12);
    CHECK_NEAR(x->max_access_m, 2000, 0);
    scen_free(s);

    /* No section at all: NULL. */
    s = parse(HEAD "\"name\": \"x\"}", &e);
    CHECK(s != NULL && s->supply == NULL);
    scen_free(s);
}

static void test_full(void)
{
    err_t e = {0};
    scen_t *s = parse(
        HEAD "\"population_groups\": [{\"name\": \"under five\", \"share\": 0.16}], "
        "\"supply\": {\"days_of_cover\": 7, \"lead_time_days\": 2, \"buffer\": 0, "
        "\"objective\": \"cost\", \"time_limit_min\": 0.5, \"gap\": 0, \"access_kmh\": 10, "
        "\"max_access_m\": 300, \"shortage_penalty\": 50, "
        "\"commodities\": [{\"name\": \"water\", \"quantity\": 20}, "
        "{\"name\": \"fuel\", \"unit\": \"kg\", \"rate\": \"per_household_day\", \"quantity\": 1.5, "
        "\"unit_kg\": 1, \"unit_m3\": 0.0015, \"pack_units\": 25}, "
        "{\"name\": \"porridge\", \"unit\": \"kg\", \"quantity\": 0.2, \"unit_kg\": 1, "
        "\"unit_m3\": 0.002, \"pack_units\": 25, \"group\": \"under five\", \"priority\": 4}], "
        "\"fleet\": [{\"name\": \"lorry\", \"payload_kg\": 8000, \"volume_m3\": 30, \"count\": 2, "
        "\"cost_per_km\": 1.5, \"cost_per_hour\": 20, \"loading_min\": 45, \"hours_available\": 10}], "
        "\"depot_stock\": {\"D1\": {\"water\": 1000, \"porridge\": 5}, \"D2\": {}}}}",
        &e);
    const struct scen_supply *x;

    CHECK(s != NULL);
    if (s == NULL) {
        fprintf(stderr, "%s\n", e.msg);
        return;
    }
    x = s->supply;
    CHECK_NEAR(x->cover_s, 7 * 86400.0, 0);
    CHECK_NEAR(x->lead_s, 2 * 86400.0, 0);
    CHECK(x->objective == SCEN_SUPPLY_COST);
    CHECK_NEAR(x->time_limit_s, 30, 1e-12);
    CHECK_NEAR(x->access_mps, 10 / 3.6, 1e-12);
    CHECK_NEAR(x->penalty, 50, 0);
    CHECK(x->n_comm == 3);
    CHECK_NEAR(x->comm[0].quantity, 20, 0);   /* the rest of water stays default */
    CHECK(isnan(x->comm[0].unit_kg));
    CHECK(x->comm[1].rate_kind == SCEN_RATE_PER_HOUSEHOLD_DAY);
    CHECK_NEAR(x->comm[1].household_size, 5, 0);   /* documented default */
    CHECK_NEAR(x->comm[1].priority, 1, 0);
    CHECK_NEAR(x->comm[2].group_share, 0.16, 1e-12);   /* from population_groups */
    CHECK_NEAR(x->comm[2].priority, 4, 0);
    CHECK_NEAR(x->trucks[0].cost_per_m, 0.0015, 1e-15);
    CHECK_NEAR(x->trucks[0].loading_s, 2700, 0);
    CHECK_NEAR(x->trucks[0].hours_s, 36000, 0);
    CHECK(x->n_depots == 2);
    CHECK_NEAR(x->depots[0].units[2], 5, 0);
    CHECK_NEAR(x->depots[1].units[0], 0, 0);
    scen_free(s);
}

/* Each bad section: exit code and the key path in the message. */
static void bad(const char *supply, const char *want)
{
    char buf[2048];
    err_t e = {0};
    scen_t *s;

    snprintf(buf, sizeof buf, HEAD "\"population_groups\": [{\"name\": \"pw\", \"raster\": "
             "\"pw.tif\"}, {\"name\": \"u5\", \"share\": 0.2}], \"supply\": %s}", supply);
    s = parse(buf, &e);
    CHECK(s == NULL);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, want);
    scen_free(s);
}

static void test_refusals(void)
{
    bad("{" STOCK "}", "missing required key 'supply.fleet'");
    bad("{" FLEET "}", "missing required key 'supply.depot_stock'");
    bad("{" FLEET ", \"depot_stock\": {}}", "at least one depot");
    bad("{\"days_of_cover\": 0, " FLEET ", " STOCK "}", "supply.days_of_cover");
    bad("{\"days_of_cover\": -3, " FLEET ", " STOCK "}", "supply.days_of_cover");
    bad("{\"buffer\": -0.1, " FLEET ", " STOCK "}", "supply.buffer");
    bad("{\"dayz_of_cover\": 3, " FLEET ", " STOCK "}", "did you mean 'days_of_cover'");
    bad("{\"objective\": \"speed\", " FLEET ", " STOCK "}", "supply.objective");
    bad("{\"commodities\": [{\"name\": \"water\", \"quantity\": 0}], " FLEET ", " STOCK "}",
        "supply.commodities[0].quantity");
    bad("{\"commodities\": [{\"name\": \"water\", \"quantity\": -1}], " FLEET ", " STOCK "}",
        "supply.commodities[0].quantity");
    bad("{\"commodities\": [{\"name\": \"water\", \"unit_kg\": 0}], " FLEET ", " STOCK "}",
        "supply.commodities[0].unit_kg");
    bad("{\"commodities\": [{\"name\": \"tarp\", \"unit\": \"m2\", \"quantity\": 1}], " FLEET
        ", " STOCK "}", "missing required key 'supply.commodities[0].unit_kg'");
    bad("{\"commodities\": [{\"name\": \"water\"}, {\"name\": \"water\"}], " FLEET ", " STOCK "}",
        "listed twice");
    bad("{\"commodities\": [{\"name\": \"water\", \"rate\": \"weekly\"}], " FLEET ", " STOCK "}",
        "supply.commodities[0].rate");
    bad("{\"commodities\": [{\"name\": \"water\", \"group\": \"elders\"}], " FLEET ", " STOCK "}",
        "not in population_groups");
    bad("{\"commodities\": [{\"name\": \"water\", \"group\": \"pw\"}], " FLEET ", " STOCK "}",
        "given as a raster");
    bad("{\"commodities\": [{\"name\": \"water\", \"group\": \"u5\", \"share\": 0.2}], " FLEET
        ", " STOCK "}", "both 'share' and 'group'");
    bad("{\"fleet\": [{\"name\": \"x\", \"payload_kg\": 0, \"volume_m3\": 1, \"count\": 1}], "
        STOCK "}", "supply.fleet[0].payload_kg");
    bad("{\"fleet\": [{\"name\": \"x\", \"payload_kg\": 10, \"volume_m3\": 1, \"count\": 1.5}], "
        STOCK "}", "supply.fleet[0].count");
    bad("{\"fleet\": [{\"name\": \"x\", \"payload_kg\": 10, \"volume_m3\": 1, \"count\": 1}, "
        "{\"name\": \"x\", \"payload_kg\": 10, \"volume_m3\": 1, \"count\": 1}], " STOCK "}",
        "listed twice");
    bad("{\"fleet\": [], " STOCK "}", "supply.fleet");
    bad("{" FLEET ", \"depot_stock\": {\"D1\": {\"watr\": 5}}}", "did you mean 'water'");
    bad("{" FLEET ", \"depot_stock\": {\"D1\": {\"water\": -5}}}", "supply.depot_stock.D1.water");
}

int main(void)
{
    test_defaults();
    test_full();
    test_refusals();
    return CHECK_DONE("test_scen_supply");
}
