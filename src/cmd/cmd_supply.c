/* supply: stock and truck trips for the existing sites only, for logisticians who
 * do not need new sites: inputs -> reach (people per site) -> supply. The same
 * script as 'plan' without the site step and the report (cmd_plan_job). */
#include "cli.h"

const char cmd_supply_usage[] =
    "usage: sitereach supply SCENARIO.json -o OUTDIR [--json] [--quiet] [--threads N]\n"
    "\n"
    "Stock and shipments for the existing sites (sites.existing): the people of each\n"
    "site come from the travel-time stage (capacity-aware when sites have capacities,\n"
    "else everyone whose nearest site it is); the stock from the scenario's 'supply'\n"
    "section (commodities, days of cover, buffer); the trips from the depots\n"
    "(sites.depots, supply.depot_stock) and the fleet (supply.fleet) on the vehicle\n"
    "roads. See docs/plan.md. Writes into OUTDIR the travel-time files of 'reach' and:\n"
    "  supply_stock.csv     stock per site and commodity: needed, delivered, short, packs\n"
    "  supply_shipments.csv truck trips per depot and site, load per trip, travel time\n"
    "  supply_unmet.csv     what is short where, why, and what to do about it\n"
    "  supply_depots.csv    stock on hand, shipped and left per depot\n"
    "  supply_travel.csv    depot -> site times and distances on the vehicle roads\n"
    "  summary.json         assumptions, totals, solver status and gap\n"
    "\n"
    "  --json        print summary.json on stdout instead of the human summary\n"
    "  --quiet       no progress lines and no human summary\n"
    "  --threads N   threads for the bounded searches (default: all cores)\n";

int cmd_supply(const cli_options_t *o, err_t *e)
{
    return cmd_plan_job(o, 0, e);
}
