#!/bin/sh
# sitereach reach on hand-made inputs: outputs, hand-worked values, conservation
# of people, and the bad-input cases of the travel-time stage.
NAME=reach
. "$(dirname "$0")/../cli_lib.sh"
$PY tests/cli/fixtures.py "$WORK/fx" || { bad "fixtures"; # Population groups (fixtures.py): 20% of 4,000 and a raster of 400 people.
expect_ok "$BIN" reach "$F/groups.json" -o "$WORK/o10" --quiet
g() { $PY -c "import json; d=json.load(open('$WORK/o10/summary.json')); print(sum(b['people'] for b in d['reach']['groups']['$1']['all']))"; }
check_num "group share" "$(g 'under five')" 800 1e-9
check_num "group raster" "$(g 'pregnant women')" 400 1e-9
if [ "$(grep -c 'under five' "$WORK/o10/groups.csv")" -eq 5 ]; then ok; else bad "groups.csv rows"; fi
expect_fail 1 "is not on the population grid" "$BIN" reach "$F/groups_bad.json" -o "$WORK/o11"
finish; exit 1; }
F=$WORK/fx O=$WORK/out1

expect_ok "$BIN" reach "$F/good.json" -o "$O"
for f in travel_time.tif nearest_site.tif sites.csv bands.csv catchments.gpkg summary.json; do
    if [ -s "$O/$f" ]; then ok; else bad "missing output $f"; fi
done
# No temporary files are left behind.
if ls -a "$O" | grep -q '\.tmp'; then bad "temporary files left in $O"; else ok; fi
# Outputs open in GDAL with the grid's CRS (EPSG:32736).
if gdalsrsinfo -o epsg "$O/travel_time.tif" 2>/dev/null | grep -q 32736; then ok; else bad "travel_time.tif CRS"; fi
if ogrinfo -so "$O/catchments.gpkg" catchments 2>/dev/null | grep -q 'Feature Count: 2'; then ok; else bad "catchments.gpkg features"; fi
# Cell (col 19, row 1): nearest is S2 at (17, 17): 14 straight steps of 100 m and
# 2 diagonal ones (141.42 m) at 5 km/h = 14*72 + 2*101.8234 s = 20.1941 min.
check_num "time at (19,1)" "$(gdallocationinfo -valonly "$O/travel_time.tif" 19 1)" 20.1941 0.001
check_num "site at (19,1)" "$(gdallocationinfo -valonly "$O/nearest_site.tif" 19 1)" 1 0
# Conservation: bands + unreachable = 4,000 people; site loads add up too.
v() { $PY -c "import json; d=json.load(open('$O/summary.json')); print($1)"; }
check_num "bands total" "$(v 'sum(b["people"] for b in d["reach"]["bands"]["all"])')" 4000 1e-6
check_num "sites total" "$($PY -c "import csv; print(sum(float(r['people']) for r in csv.DictReader(open('$O/sites.csv'))))")" 4000 1e-6
check_num "checksum recorded" "$(v 'len([i for i in d["inputs"] if len(i.get("sha256",""))==64])')" 4 0

# --json prints the summary; --quiet prints nothing.
expect_ok "$BIN" reach "$F/good.json" -o "$WORK/out2" --json
if $PY -c 'import json,sys; json.load(open(sys.argv[1]))' "$WORK/out"; then ok; else bad "--json output"; fi
expect_ok "$BIN" reach "$F/good.json" -o "$WORK/out3" --quiet
if [ -s "$WORK/out" ]; then bad "--quiet printed"; else ok; fi

# Bad input.
expect_fail 2 "no output folder given" "$BIN" reach "$F/good.json"
expect_fail 1 "can be reached by anyone" "$BIN" reach "$F/cut_off.json" -o "$WORK/o4"
expect_fail 1 "barrier" "$BIN" reach "$F/site_on_barrier.json" -o "$WORK/o5"
expect_fail 1 "travel.road_speeds.primary.walk_kmh" "$BIN" reach "$F/zero_speed.json" -o "$WORK/o6"
expect_fail 1 "coverage.bands_min" "$BIN" reach "$F/bands_order.json" -o "$WORK/o7"
expect_fail 1 "no open sites" "$BIN" reach "$F/no_sites.json" -o "$WORK/o8"
# A grid with no people is a warning, and every band is empty.
expect_ok "$BIN" reach "$F/no_people.json" -o "$WORK/o9"
expect_out "holds no people"
# An unwritable output folder is an error naming it.
expect_fail 1 "/proc/sitereach" "$BIN" reach "$F/good.json" -o /proc/sitereach
# Population groups (fixtures.py): 20% of 4,000 and a raster of 400 people.
expect_ok "$BIN" reach "$F/groups.json" -o "$WORK/o10" --quiet
g() { $PY -c "import json; d=json.load(open('$WORK/o10/summary.json')); print(sum(b['people'] for b in d['reach']['groups']['$1']['all']))"; }
check_num "group share" "$(g 'under five')" 800 1e-9
check_num "group raster" "$(g 'pregnant women')" 400 1e-9
if [ "$(grep -c 'under five' "$WORK/o10/groups.csv")" -eq 5 ]; then ok; else bad "groups.csv rows"; fi
expect_fail 1 "is not on the population grid" "$BIN" reach "$F/groups_bad.json" -o "$WORK/o11"
finish
