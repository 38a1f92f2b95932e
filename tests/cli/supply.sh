#!/bin/sh
# sitereach supply on hand-made inputs (tests/cli/supply_fixtures.py): stock per
# site worked by hand, depot -> site vehicle times worked by hand, trips that
# carry the load, shortages with their reasons, and every bad-input case.
NAME=supply
. "$(dirname "$0")/../cli_lib.sh"
$PY tests/cli/supply_fixtures.py "$WORK/fx" || { bad "fixtures"; finish; exit 1; }
F=$WORK/fx O=$WORK/out1

# col FILE KEYCOL KEY... VALCOL: the value of column VALCOL in the CSV row whose
# columns match (pairs of column name and value).
col() {
    $PY - "$@" <<'EOF'
import csv, sys
f, want = sys.argv[1], sys.argv[-1]
pairs = list(zip(sys.argv[2:-1:2], sys.argv[3:-1:2]))
for r in csv.DictReader(open(f)):
    if all(r[k] == v for k, v in pairs):
        print(r[want]); break
else:
    print("none")
EOF
}

expect_ok "$BIN" supply "$F/good.json" -o "$O"
for f in supply_stock.csv supply_shipments.csv supply_unmet.csv supply_depots.csv \
         supply_travel.csv summary.json sites.csv; do
    if [ -s "$O/$f" ]; then ok; else bad "missing output $f"; fi
done
expect_out "shortages: none"
expect_out "check them against local guidance"
if ls -a "$O" | grep -q '\.tmp'; then bad "temporary files left in $O"; else ok; fi

# People: capacities 1,000 and 1,500 are both filled (4,000 people in reach).
check_num "S1 persons" "$(col "$O/supply_stock.csv" site_id S1 commodity water persons)" 1000 1e-9
check_num "S2 persons" "$(col "$O/supply_stock.csv" site_id S2 commodity water persons)" 1500 1e-9
# Water (Sphere 2018: 15 L per person per day): 1,000 x 15 x 2 days x 1.1 = 33,000 L,
# 33 packs of 1,000 L; S2: 1,500 x 15 x 2 x 1.1 = 49,500 L -> 50 packs = 50,000 L.
check_num "S1 water" "$(col "$O/supply_stock.csv" site_id S1 commodity water needed)" 33000 1e-6
check_num "S2 water exact" "$(col "$O/supply_stock.csv" site_id S2 commodity water needed_exact)" 49500 1e-6
check_num "S2 water packs" "$(col "$O/supply_stock.csv" site_id S2 commodity water packs_needed)" 50 0
# A kit once per person, with the buffer: 1,000 x 1.1 = 1,100 kits = 110 packs of 10.
check_num "S1 kits" "$(col "$O/supply_stock.csv" site_id S1 commodity kit needed)" 1100 1e-9
check_num "S1 kit kg" "$(col "$O/supply_stock.csv" site_id S1 commodity kit kg_needed)" 2200 1e-9
check_num "S1 kits delivered" "$(col "$O/supply_stock.csv" site_id S1 commodity kit delivered)" 1100 1e-9

# Vehicle travel: D1 stands on the road's west end (50 m, 1050 m). S1 (250, 250)
# joins the road 800 m away at (250, 1050): 200 m of primary road at 60 km/h = 12 s,
# plus 800 m at 5 km/h = 576 s: 9.8 min over 1.0 km. S2 (1750, 1750) joins it 700 m
# away at (1750, 1050): 1,700 m at 60 km/h = 102 s + 504 s = 10.1 min over 2.4 km.
check_num "D1-S1 min" "$(col "$O/supply_travel.csv" depot_id D1 site_id S1 out_min)" 9.8 1e-9
check_num "D1-S2 min" "$(col "$O/supply_travel.csv" depot_id D1 site_id S2 out_min)" 10.1 1e-9
check_num "D1-S2 km" "$(col "$O/supply_travel.csv" depot_id D1 site_id S2 out_km)" 2.4 1e-9
check_num "D1-S2 back" "$(col "$O/supply_travel.csv" depot_id D1 site_id S2 back_min)" 10.1 1e-9
# D2 holds no stock here: it is left out of routing and said to send nothing.
if [ "$(col "$O/supply_travel.csv" depot_id D2 site_id S1 out_min)" = "none" ]; then ok; else bad "D2 routed without stock"; fi
expect_out "1 depot of sites.depots has no stock in supply.depot_stock and sends nothing: 'D2'"

# Trips: S1 gets 33,000 kg of water + 2,200 kg of kits = 35,200 kg on 5,000 kg
# lorries: at least 8 trips; S2 gets 50,000 + 3,300 = 53,300 kg: at least 11.
check_num "S1 kg shipped" "$(col "$O/supply_shipments.csv" site_id S1 kg)" 35200 1e-6
check_num "S1 trips" "$(col "$O/supply_shipments.csv" site_id S1 trips)" 8 0
check_num "S2 trips" "$(col "$O/supply_shipments.csv" site_id S2 trips)" 11 0
# Truck-hours of S1: 8 x (2 x 588 s + 30 min loading) / 3600 = 6.61333 h.
check_num "S1 truck hours" "$(col "$O/supply_shipments.csv" site_id S1 truck_hours)" 6.613333 1e-5
# Depot balance: shipped + left = on hand.
check_num "D1 water left" "$(col "$O/supply_depots.csv" depot_id D1 commodity water left)" 17000 1e-6
v() { $PY -c "import json; d=json.load(open('$1/summary.json')); print($2)"; }
if [ "$(v "$O" 'd["supply"]["solver"]["status"]')" = "optimal" ]; then ok; else bad "solver status"; fi
check_num "summary delivered" "$(v "$O" 'd["supply"]["totals"]["by_commodity"]["water"]["delivered"]')" 83000 1e-6
check_num "summary D1 trips" "$(v "$O" 'd["supply"]["totals"]["by_depot"]["D1"]["trips"]')" 19 0
check_num "summary days" "$(v "$O" 'd["supply"]["assumptions"]["days_of_cover"]')" 2 1e-9
check_num "summary water rate" "$(v "$O" 'd["supply"]["assumptions"]["commodities"][0]["quantity"]')" 15 1e-9
if v "$O" 'd["supply"]["caution"]' | grep -q "local guidance"; then ok; else bad "summary caution"; fi

# More demand than the depots hold: a plan with shortages, not an error.
# Kits: 2,000 on hand for 1,100 + 1,650 = 2,750 needed: 750 short.
expect_ok "$BIN" supply "$F/short_stock.json" -o "$WORK/o2"
expect_out "shortages:"
check_num "kits short" "$($PY -c "import csv; print(sum(float(r['short']) for r in csv.DictReader(open('$WORK/o2/supply_unmet.csv')) if r['commodity']=='kit'))")" 750 1e-9
if grep -q ',stock,' "$WORK/o2/supply_unmet.csv"; then ok; else bad "reason stock"; fi
check_num "short summary" "$(v "$WORK/o2" 'd["supply"]["totals"]["by_commodity"]["kit"]["short"]')" 750 1e-9

# A depot with no road within reach (D2 is 1,040 m from the road, beyond
# max_access_m = 1,000): everything short, reason 'unreachable'.
expect_ok "$BIN" supply "$F/unreachable_depot.json" -o "$WORK/o3"
if [ "$(col "$WORK/o3/supply_travel.csv" depot_id D2 site_id S1 out_min)" = "" ]; then ok; else bad "D2 should have no road"; fi
check_num "unreachable lines" "$(grep -c ',unreachable,' "$WORK/o3/supply_unmet.csv")" 4 0
expect_out "depot 'D2' is more than 1000 m from any road open to vehicles"

# A site with no storage: nothing delivered there, reason 'storage', a warning.
expect_ok "$BIN" supply "$F/no_storage.json" -o "$WORK/o4"
check_num "S1 storage short" "$(col "$WORK/o4/supply_unmet.csv" site_id S1 commodity water short)" 33000 1e-6
if [ "$(col "$WORK/o4/supply_unmet.csv" site_id S1 commodity kit reason)" = "storage" ]; then ok; else bad "reason storage"; fi
expect_out "site 'S1' has no storage"

# Bad input: one line naming the key, exit 1.
expect_fail 1 "supply.commodities[1].quantity" "$BIN" supply "$F/zero_rate.json" -o "$WORK/o5"
expect_fail 1 "supply.commodities[1].unit_kg" "$BIN" supply "$F/negative_weight.json" -o "$WORK/o5"
expect_fail 1 "supply.fleet[0].payload_kg" "$BIN" supply "$F/zero_payload.json" -o "$WORK/o5"
expect_fail 1 "supply.days_of_cover" "$BIN" supply "$F/zero_days.json" -o "$WORK/o5"
expect_fail 1 "names depot 'D9', which is not in sites.depots" "$BIN" supply "$F/unknown_depot.json" -o "$WORK/o5"
expect_fail 1 "did you mean 'water'" "$BIN" supply "$F/misspelt_commodity.json" -o "$WORK/o5"
expect_fail 1 "missing required key 'supply.fleet'" "$BIN" supply "$F/no_fleet.json" -o "$WORK/o5"
expect_fail 1 "has no 'supply' section" "$BIN" supply "$F/no_supply.json" -o "$WORK/o5"
expect_fail 1 "supply needs depots" "$BIN" supply "$F/no_depots.json" -o "$WORK/o5"
expect_fail 2 "no output folder given" "$BIN" supply "$F/good.json"
finish
