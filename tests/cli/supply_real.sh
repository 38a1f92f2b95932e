#!/bin/sh
# sitereach supply on real data: central Burundi roads and health facilities
# (OSM © OpenStreetMap contributors, ODbL 1.0) and GHS-POP 250 m (© European
# Union / JRC). Three facilities near the middle of the road extract hold the
# stock. Checks that people are conserved (every reachable person is supplied
# at exactly one site), that the plan adds up, and that sites beyond the road
# extract are reported unreachable rather than supplied.
NAME=supply_real
. "$(dirname "$0")/../cli_lib.sh"
B=${SITEREACH_SHARED:?}/data/real/burundi
if [ ! -f "$B/central_burundi_roads_osm.geojson" ]; then
    bad "no Burundi data in $B"
    finish
    exit 1
fi

# The three facilities nearest the centre of the road extract (ids fixed by the data).
cat >"$WORK/bdi.json" <<JSON
{ "name": "Burundi supply (real test data)",
  "inputs": { "population": "$B/ghs_pop_burundi_250m_mollweide.tif",
              "roads": { "path": "$B/central_burundi_roads_osm.geojson" } },
  "sites": { "existing": { "path": "$B/burundi_health_facilities_osm2019.geojson",
                           "id_field": "osm_node_id", "name_field": "name" },
             "depots": { "path": "$B/burundi_health_facilities_osm2019.geojson",
                         "id_field": "osm_node_id", "name_field": "name" } },
  "supply": { "days_of_cover": 7, "commodities": [{ "name": "food" }],
              "fleet": [{ "name": "lorry", "payload_kg": 10000, "volume_m3": 40, "count": 50,
                          "hours_available": 60 }],
              "depot_stock": { "5277795447": { "food": 20000000 },
                               "5277793985": { "food": 20000000 },
                               "5277795448": { "food": 20000000 } } } }
JSON
expect_ok "$BIN" supply "$WORK/bdi.json" -o "$WORK/o" --quiet
$PY - "$WORK/o" <<'EOF' >"$WORK/checks"
import csv, json, sys
d = sys.argv[1]
s = json.load(open(f"{d}/summary.json"))
stock = list(csv.DictReader(open(f"{d}/supply_stock.csv")))
travel = list(csv.DictReader(open(f"{d}/supply_travel.csv")))
fails = []
def want(c, what):
    if not c: fails.append(what)
total = s["grid"]["people"]
unreachable = s["reach"]["people_unreachable"]
persons = sum(float(r["persons"]) for r in stock)
want(abs(persons - (total - unreachable)) <= 1e-6 * total, f"persons {persons} vs {total - unreachable}")
for r in stock:
    want(abs(float(r["delivered"]) + float(r["short"]) - float(r["needed"])) < 1e-6, "balance")
t = s["supply"]["totals"]
want(t["depots_with_stock"] == 3, "three depots with stock")
want(t["trips"] > 0 and t["kg_delivered"] > 0, "something is delivered")
food = t["by_commodity"]["food"]
want(food["delivered"] <= food["depot_stock"], "within stock")
want(len(travel) == 3 * t["sites"], "travel rows for the three depots only")
# Sites with no road within 2 km are never supplied.
off = {r["site_id"] for r in travel if r["out_min"] == ""}
for r in stock:
    if r["site_id"] in off and float(r["needed"]) > 0 and all(
            x["out_min"] == "" for x in travel if x["site_id"] == r["site_id"]):
        want(r["reason"] == "unreachable" and float(r["delivered"]) == 0, f"{r['site_id']} off road")
want(s["supply"]["solver"]["status"] in ("optimal", "feasible (gap)"), "solver status")
print("\n".join(fails[:10]) if fails else "ALL OK")
EOF
if [ "$(cat "$WORK/checks")" = "ALL OK" ]; then ok; else bad "burundi supply: $(cat "$WORK/checks")"; fi
finish
