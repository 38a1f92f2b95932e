#!/bin/sh
# sitereach site on a hand-made grid whose best sites can be worked out by hand:
# a single row of 21 cells of 100 m (UTM 36S), walking 5 km/h without roads, so
# one step between cell centres takes 100 m / (5000/3600 m/s) = 72 s.
#   cells 0,1,2: 100 persons each      existing post E1 at cell 1
#   cell 5:      50 persons            candidate C3 at cell 5
#   cells 9-11:  200 persons each      candidate C1 at cell 10
#   cells 18-20: 100 persons each      candidate C2 at cell 19
# Total 1,250 persons. Within 2 minutes (120 s) a site reaches its own cell and
# the next one on each side (72 s) but not two away (144 s).
NAME=site
. "$(dirname "$0")/../cli_lib.sh"
D=$WORK/g
$PY - "$D" <<'X' || { bad "fixtures"; finish; exit 1; }
import array, json, os, sys
from osgeo import gdal, ogr, osr
gdal.UseExceptions()
D = sys.argv[1]
os.makedirs(D)
X0, Y0, N = 500000.0, 9000000.0, 21
s = osr.SpatialReference(); s.ImportFromEPSG(32736)
pop = [0.0] * N
for c in (0, 1, 2): pop[c] = 100
pop[5] = 50
for c in (9, 10, 11): pop[c] = 200
for c in (18, 19, 20): pop[c] = 100
ds = gdal.GetDriverByName("GTiff").Create(D + "/pop.tif", N, 1, 1, gdal.GDT_Float32)
ds.SetGeoTransform((X0, 100, 0, Y0, 0, -100)); ds.SetProjection(s.ExportToWkt())
ds.GetRasterBand(1).WriteRaster(0, 0, N, 1, array.array("f", pop).tobytes()); ds = None

def points(name, rows):
    p = ogr.GetDriverByName("GeoJSON").CreateDataSource(D + "/" + name)
    l = p.CreateLayer("l", s, ogr.wkbPoint)
    for f in ("id", "name"): l.CreateField(ogr.FieldDefn(f, ogr.OFTString))
    for f in ("cap", "cost"): l.CreateField(ogr.FieldDefn(f, ogr.OFTReal))
    for (id_, cell, cap, cost) in rows:
        ft = ogr.Feature(l.GetLayerDefn())
        ft.SetGeometry(ogr.CreateGeometryFromWkt("POINT (%f %f)" % (X0 + 100 * cell + 50, Y0 - 50)))
        ft.SetField("id", id_); ft.SetField("name", "post " + id_)
        ft.SetField("cap", cap); ft.SetField("cost", cost)
        l.CreateFeature(ft)
    p = None

points("existing.geojson", [("E1", 1, 200, 0)])
points("cand.geojson", [("C1", 10, 500, 0), ("C2", 19, 500, 0), ("C3", 5, 100, 0)])
points("cand_dup.geojson", [("C1", 10, 500, 0), ("E1", 19, 500, 0)])
r = ogr.GetDriverByName("GeoJSON").CreateDataSource(D + "/road.geojson")
l = r.CreateLayer("l", s, ogr.wkbLineString); l.CreateField(ogr.FieldDefn("highway", ogr.OFTString))
for (a, b) in ((0, 10), (10, 21)):
    ft = ogr.Feature(l.GetLayerDefn())
    ft.SetGeometry(ogr.CreateGeometryFromWkt("LINESTRING (%f %f, %f %f)" % (X0 + 100 * a + 10, Y0 - 50, X0 + 100 * b - 10, Y0 - 50)))
    ft.SetField("highway", "track"); l.CreateFeature(ft)
r = None

base = {"inputs": {"population": "pop.tif"},
        "sites": {"existing": {"path": "existing.geojson", "id_field": "id", "name_field": "name",
                               "capacity_field": "cap", "cost_field": "cost"},
                  "candidates": {"path": "cand.geojson", "id_field": "id", "name_field": "name",
                                 "capacity_field": "cap", "cost_field": "cost"}},
        "travel": {"mode": "walk", "walk": {"speed_kmh": 5.0, "slope": False}},
        "coverage": {"limit_min": 2, "bands_min": [1, 2]}}

def scen(name, siting, change=None):
    s2 = json.loads(json.dumps(base))
    if siting is not None: s2["siting"] = siting
    if change: change(s2)
    json.dump(s2, open(D + "/" + name + ".json", "w"), indent=1)

scen("mc1", {"model": "max_cover", "p": 1})
scen("mc2", {"model": "max_cover", "p": 2, "curve_max_p": 3})
scen("pm1", {"model": "p_median", "p": 1, "limit_min": 60})
scen("pm1agg", {"model": "p_median", "p": 1, "limit_min": 60, "aggregate_cells": 3})
scen("sc", {"model": "set_cover"})
scen("cap", {"model": "capacitated"})
scen("close", {"model": "max_cover", "p": 1, "existing": "may_close"})
scen("bigp", {"model": "max_cover", "p": 4})
scen("nocand", {"model": "max_cover", "p": 1}, lambda s: s["sites"].pop("candidates"))
scen("dup", {"model": "max_cover", "p": 1}, lambda s: s["sites"]["candidates"].update(path="cand_dup.geojson"))
scen("nositing", None)
scen("tablelimit", {"model": "max_cover", "p": 1, "limit": 5})
scen("aggcover", {"model": "max_cover", "p": 1, "aggregate_cells": 2})
scen("gen_noroads", {"model": "max_cover", "p": 1, "candidates": {"generate": "junctions"}})
def road(s): s["inputs"]["roads"] = {"path": "road.geojson"}
scen("gen_along", {"model": "max_cover", "p": 1, "candidates": {"generate": "along_roads", "spacing_m": 300, "min_spacing_m": 250, "near_m": 100}}, road)
scen("gen_badkey", {"model": "max_cover", "p": 1, "candidates": {"generate": "everywhere"}}, road)
X
j() { $PY -c "import json,sys; d=json.load(open(sys.argv[1])); print($2)" "$1"; }

# Maximal covering, p = 1, limit 2 min: before = E1's 300; adding C1 covers the
# 600 around cell 10 (C2: 300, C3: 50), so after = 900 and 350 are unserved.
O=$WORK/o1
expect_ok "$BIN" site "$D/mc1.json" -o "$O"
for f in sites.csv sites.gpkg assignment.tif unserved.csv unserved.tif coverage_curve.csv summary.json; do
    if [ -s "$O/$f" ]; then ok; else bad "missing output $f"; fi
done
if ls -a "$O" | grep -q '\.tmp'; then bad "temporary files left in $O"; else ok; fi
expect_out "before (1 existing sites)"
expect_out "after  (1 kept + 1 new)"
expect_out "new sites: C1"
expect_out "planning aid"
check_num "before" "$(j "$O/summary.json" 'd["site"]["before"]["people_covered"]')" 300 1e-9
check_num "after" "$(j "$O/summary.json" 'd["people_covered"]')" 900 1e-9
check_num "unserved" "$(j "$O/summary.json" 'd["people_unserved"]')" 350 1e-9
check_num "not chosen" "$(j "$O/summary.json" 'd["site"]["unserved_by_reason"]["not_chosen"]')" 350 1e-9
# Conservation: covered + unserved = the grid's 1,250 persons.
check_num "conservation" "$(j "$O/summary.json" 'd["site"]["people_covered"]+d["site"]["people_unserved"]')" 1250 1e-9
if [ "$(j "$O/summary.json" 'sorted(d["open_sites"])')" = "['C1', 'E1']" ]; then ok; else bad "open sites $(j "$O/summary.json" 'd["open_sites"]')"; fi
for k in model status objective bound gap open_sites people_covered people_unserved solver_seconds; do
    if [ "$(j "$O/summary.json" "'$k' in d and '$k' in d['site']")" = True ]; then ok; else bad "summary key $k"; fi
done
# Rasters: cell 10 is served by C1 (row 1 of sites.csv: open sites E1, C1 in
# index order); cell 19's 100 persons are unserved; cell 6 has nobody.
check_num "assignment cell 10" "$(gdallocationinfo -valonly "$O/assignment.tif" 10 0)" 1 0
check_num "assignment cell 0" "$(gdallocationinfo -valonly "$O/assignment.tif" 0 0)" 0 0
check_num "unserved cell 19" "$(gdallocationinfo -valonly "$O/unserved.tif" 19 0)" 100 1e-6
check_num "unserved total" "$($PY -c "
from osgeo import gdal; import array
ds = gdal.Open('$O/unserved.tif'); b = ds.GetRasterBand(1).ReadRaster()
print(sum(array.array('f', b)))")" 350 1e-3
if grep -q '^1,C1,post C1,new,candidate layer,600,500,1.2,0.8,1.2,0$' "$O/sites.csv"; then ok; else bad "sites.csv C1 row: $(cat "$O/sites.csv")"; fi
if ogrinfo -so "$O/sites.gpkg" sites 2>/dev/null | grep -q 'Feature Count: 2'; then ok; else bad "sites.gpkg features"; fi
if gdalsrsinfo -o epsg "$O/assignment.tif" 2>/dev/null | grep -q 32736; then ok; else bad "assignment.tif CRS"; fi
check_num "unserved.csv rows" "$(($(wc -l <"$O/unserved.csv") - 1))" 4 0

# p = 2: C1 + C2 cover 1,200; the curve gives 900, 1200, 1250 for p = 1, 2, 3.
expect_ok "$BIN" site "$D/mc2.json" -o "$WORK/o2"
check_num "p=2 covered" "$(j "$WORK/o2/summary.json" 'd["people_covered"]')" 1200 1e-9
check_num "curve p=1" "$(sed -n 2p "$WORK/o2/coverage_curve.csv" | cut -d, -f2)" 900 1e-9
check_num "curve p=2" "$(sed -n 3p "$WORK/o2/coverage_curve.csv" | cut -d, -f2)" 1200 1e-9
check_num "curve p=3" "$(sed -n 4p "$WORK/o2/coverage_curve.csv" | cut -d, -f2)" 1250 1e-9

# p-median, p = 1, max time 60 min, E1 kept: adding C1 costs
#   cells 0-2 -> E1: 100 x (1 + 0 + 1) steps = 200; cell 5 -> E1: 50 x 4 = 200;
#   cells 9-11 -> C1: 200 x 2 = 400; cells 18-20 -> C1: 100 x (8+9+10) = 2700;
#   3,500 person-steps x 72 s = 252,000 person-seconds.
# Adding C2 costs 5,600 steps and C3 7,400 (same arithmetic), so C1 is best.
expect_ok "$BIN" site "$D/pm1.json" -o "$WORK/o3"
check_num "p_median objective" "$(j "$WORK/o3/summary.json" 'd["objective"]')" 252000 0.5
if [ "$(j "$WORK/o3/summary.json" 'sorted(d["open_sites"])')" = "['C1', 'E1']" ]; then ok; else bad "p_median open sites"; fi
# Aggregated into 3 x 3 blocks (here 3 x 1: one row): the blocks are cells
# 0-2, 3-5, 9-11 and 18-20 with weighted mean costs; the same plan (C1)
# evaluated on the cells costs the 252,000 above, reported beside the block value.
expect_ok "$BIN" site "$D/pm1agg.json" -o "$WORK/o4"
check_num "aggregated: blocks" "$(j "$WORK/o4/summary.json" 'd["site"]["aggregation"]["units_blocks"]')" 4 0
check_num "aggregated: cells objective" "$(j "$WORK/o4/summary.json" 'd["site"]["aggregation"]["objective_cells"]')" 252000 0.5
expect_out "when the same plan is evaluated on the"

# Set covering, everybody within 2 min: C1, C2 and C3 are all needed (E1 kept).
expect_ok "$BIN" site "$D/sc.json" -o "$WORK/o5"
check_num "set_cover sites" "$(j "$WORK/o5/summary.json" 'd["objective"]')" 3 0

# Capacitated, limit 2 min: E1 holds 200 of its 300, C1 500 of 600, C2 and C3
# serve their 300 and 50: 1,050 served, 200 left out because sites are full.
# Capacities summing below demand give a plan with unmet demand, not an error.
expect_ok "$BIN" site "$D/cap.json" -o "$WORK/o6"
check_num "capacitated served" "$(j "$WORK/o6/summary.json" 'd["people_covered"]')" 1050 1e-6
check_num "capacitated sites full" "$(j "$WORK/o6/summary.json" 'd["site"]["unserved_by_reason"]["sites_full"]')" 200 1e-6
check_num "capacitated conservation" "$(j "$WORK/o6/summary.json" 'd["people_covered"]+d["people_unserved"]')" 1250 1e-6
expect_out "sites full 200"

# Existing sites may close: the best single site is then C1 alone (600).
expect_ok "$BIN" site "$D/close.json" -o "$WORK/o7"
check_num "may_close covered" "$(j "$WORK/o7/summary.json" 'd["people_covered"]')" 600 1e-9
if grep -q ',E1,post E1,closed,' "$WORK/o7/sites.csv"; then ok; else bad "closed E1 in sites.csv"; fi

# --json prints the summary; --quiet prints nothing.
expect_ok "$BIN" site "$D/mc1.json" -o "$WORK/o8" --json
if $PY -c 'import json,sys; json.load(open(sys.argv[1]))' "$WORK/out"; then ok; else bad "--json output"; fi
expect_ok "$BIN" site "$D/mc1.json" -o "$WORK/o9" --quiet
if [ -s "$WORK/out" ]; then bad "--quiet printed"; else ok; fi

# Generated candidates along a road (every 300 m, at least 250 m apart).
expect_ok "$BIN" site "$D/gen_along.json" -o "$WORK/o10"
if [ "$(j "$WORK/o10/summary.json" 'd["site"]["sites_generated"] > 0')" = True ]; then ok; else bad "no generated sites"; fi
# The best generated point lies within 1 cell of cell 10, so with E1 the plan
# covers at least the 600 around C1 (C1 itself is a candidate too) + E1's 300.
if [ "$(j "$WORK/o10/summary.json" 'd["people_covered"] >= 900')" = True ]; then ok; else bad "generated run coverage"; fi

# Bad input.
expect_fail 1 "p = 4 is larger than the 3 candidate sites" "$BIN" site "$D/bigp.json" -o "$WORK/b1"
expect_fail 1 "no candidate sites to choose from" "$BIN" site "$D/nocand.json" -o "$WORK/b2"
expect_fail 1 "site id 'E1' is used in both sites.existing and sites.candidates" "$BIN" site "$D/dup.json" -o "$WORK/b3"
expect_fail 1 "has no 'siting' section" "$BIN" site "$D/nositing.json" -o "$WORK/b4"
expect_fail 1 "'siting.limit' is for table inputs" "$BIN" site "$D/tablelimit.json" -o "$WORK/b5"
expect_fail 1 "'siting.aggregate_cells' applies to 'p_median' and 'capacitated' only" "$BIN" site "$D/aggcover.json" -o "$WORK/b6"
expect_fail 1 "has no roads" "$BIN" site "$D/gen_noroads.json" -o "$WORK/b7"
expect_fail 1 "siting.candidates.generate" "$BIN" site "$D/gen_badkey.json" -o "$WORK/b8"
expect_fail 2 "no output folder given" "$BIN" site "$D/mc1.json"
finish
