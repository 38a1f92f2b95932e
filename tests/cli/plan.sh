#!/bin/sh
# sitereach plan: the whole job on the supply fixture and on the demo district.
# Checks that every stage's files land in one folder, that summary.json links
# them, and that the plan adds up: delivered + short = needed, nothing shipped
# beyond a depot's stock, trips carry their load, people are conserved.
NAME=plan
. "$(dirname "$0")/../cli_lib.sh"
$PY tests/cli/supply_fixtures.py "$WORK/fx" || { bad "fixtures"; finish; exit 1; }
F=$WORK/fx O=$WORK/out1
v() { $PY -c "import json; d=json.load(open('$1/summary.json')); print($2)"; }

expect_ok "$BIN" plan "$F/good.json" -o "$O"
for f in travel_time.tif nearest_site.tif sites.csv bands.csv catchments.gpkg \
         supply_stock.csv supply_shipments.csv supply_unmet.csv supply_depots.csv \
         supply_travel.csv summary.json; do
    if [ -s "$O/$f" ]; then ok; else bad "missing output $f"; fi
done
expect_out "people within 1440 min of a site: before 4000"
expect_out "trips per depot"
if [ "$(v "$O" 'd["command"]')" = "plan" ]; then ok; else bad "command name"; fi
if [ "$(v "$O" 'd["plan"]["sections"]["supply"]')" = "supply" ]; then ok; else bad "supply link"; fi
if [ "$(v "$O" 'd["plan"]["sections"]["site"]')" = "None" ]; then ok; else bad "site link"; fi
if [ "$(v "$O" '"reach" in d and "supply" in d and "check" in d')" = "True" ]; then ok; else bad "sections"; fi
check_num "before = after" "$(v "$O" 'd["plan"]["people_within_limit_after"] - d["plan"]["people_within_limit_before"]')" 0 0
check_num "people total" "$(v "$O" 'd["plan"]["people_total"]')" 4000 1e-6

# --json and --quiet.
expect_ok "$BIN" plan "$F/good.json" -o "$WORK/o2" --json
if $PY -c 'import json,sys; d=json.load(open(sys.argv[1])); assert "plan" in d' "$WORK/out"; then ok; else bad "--json output"; fi
expect_ok "$BIN" plan "$F/good.json" -o "$WORK/o3" --quiet
# summary.json links the report plan wrote.
if [ "$(v "$WORK/o3" 'd["plan"]["sections"]["report"]')" = "report.html" ] && [ -s "$WORK/o3/report.html" ]; then ok; else bad "report not linked"; fi
if [ -s "$WORK/out" ]; then bad "--quiet printed"; else ok; fi

# Without a supply section the plan stops after reach and says so.
expect_ok "$BIN" plan "$F/no_supply.json" -o "$WORK/o4"
expect_out "stock and shipments: skipped"
if [ -e "$WORK/o4/supply_stock.csv" ]; then bad "supply files without supply"; else ok; fi
if [ "$(v "$WORK/o4" 'd["plan"]["sections"]["supply"]')" = "None" ]; then ok; else bad "null supply link"; fi
# With a siting section plan chooses the new site (files in OUTDIR/site) and
# supply serves the existing sites plus the new one.
expect_ok "$BIN" plan "$F/with_siting.json" -o "$WORK/o5"
expect_out "sites opened: 1"
if [ -s "$WORK/o5/site/sites.csv" ]; then ok; else bad "plan wrote no site/sites.csv"; fi
if [ "$(v "$WORK/o5" 'd["plan"]["site_selection_ran"]')" = "True" ]; then ok; else bad "site_selection_ran"; fi
if [ "$(v "$WORK/o5" 'len({r["site_id"] for r in __import__("csv").DictReader(open("'"$WORK/o5"'/supply_stock.csv"))})')" = \
     "$(v "$WORK/o5" 'd["site"]["sites_open"] if "sites_open" in d["site"] else len(d["open_sites"])')" ]; then ok; else bad "supply serves every open site"; fi
# Bad input stops the plan with one line.
expect_fail 1 "supply.fleet[0].payload_kg" "$BIN" plan "$F/zero_payload.json" -o "$WORK/o6"
expect_fail 2 "no output folder given" "$BIN" plan "$F/good.json"

# The demo district (docs/demo.md, seed 7), as 'make demo' runs it.
DEMO=scenarios/demo/scenario.json
if [ ! -f "$DEMO" ]; then
    bad "no demo at $DEMO (make check generates it)"
    finish
    exit 1
fi
D=$WORK/demo
expect_ok "$BIN" plan "$DEMO" -o "$D" --quiet
$PY - "$D" <<'EOF' >"$WORK/demo_checks"
import csv, json, sys
d = sys.argv[1]
rows = lambda n: list(csv.DictReader(open(f"{d}/{n}")))
s = json.load(open(f"{d}/summary.json"))
fails = []
def want(c, what):
    if not c: fails.append(what)
stock, ships, depots = rows("supply_stock.csv"), rows("supply_shipments.csv"), rows("supply_depots.csv")
for r in stock:
    want(abs(float(r["delivered"]) + float(r["short"]) - float(r["needed"])) < 1e-6,
         f"delivered + short = needed at {r['site_id']} {r['commodity']}")
    want(float(r["needed"]) >= float(r["needed_exact"]) - 1e-6, "needed rounds up")
for r in depots:
    want(float(r["shipped"]) <= float(r["on_hand"]) + 1e-6, f"depot {r['depot_id']} ships what it has")
fleet = {t["name"]: t for t in s["supply"]["assumptions"]["fleet"]}
for r in ships:
    cap = 0
    for part in r["trips_by_type"].split(" + "):
        n, name = part.split(" x ", 1)
        cap += int(n) * fleet[name]["payload_kg"]
    want(float(r["kg"]) <= cap + 1e-6, f"trips carry the load {r['depot_id']}->{r['site_id']}")
for t in fleet.values():
    want(t["hours_used"] <= t["count"] * t["hours_available"] + 1e-6, f"fleet hours {t['name']}")
# People per site = those the site stage serves (site/sites.csv), or the
# capacity-aware assignment of reach (sites.csv) when no site stage ran.
if s["plan"]["site_selection_ran"]:
    served = {r["id"]: float(r["people_served"]) for r in rows("site/sites.csv")
              if r["status"] in ("kept", "new")}
else:
    served = {r["id"]: float(r["served_within_limit"]) for r in rows("sites.csv")}
want(set(served) == {r["site_id"] for r in stock}, "supply serves exactly the open sites")
for r in stock:
    want(abs(float(r["persons"]) - served[r["site_id"]]) < 1e-3, "persons per site")
tot = s["supply"]["totals"]["by_commodity"]
for c, t in tot.items():
    want(abs(t["needed"] - t["delivered"] - t["short"]) < 1e-6, f"totals {c}")
# The demo stocks too little soap on purpose: the plan shows it short.
want(tot["soap"]["short"] > 0, "soap short")
want(tot["soap"]["delivered"] <= tot["soap"]["depot_stock"] + 1e-6, "soap within stock")
want(s["supply"]["solver"]["status"] in ("optimal", "feasible (gap)"), "solver status")
bands = sum(b["people"] for b in s["reach"]["bands"]["all"])
want(abs(bands - s["plan"]["people_total"]) < 1e-3, "people conserved in bands")
print("\n".join(fails) if fails else "ALL OK")
EOF
if [ "$(cat "$WORK/demo_checks")" = "ALL OK" ]; then ok; else bad "demo plan: $(cat "$WORK/demo_checks")"; fi
finish
