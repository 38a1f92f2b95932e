#!/bin/sh
# sitereach compare on hand-made inputs (tests/cli/whatif_fixtures.py): figures
# worked on paper, the flood's cut roads counted independently by GDAL/GEOS
# (python3-gdal Intersects on the same geometries), conservation of people in
# every variant, and the bad-input cases.
NAME=compare
. "$(dirname "$0")/../cli_lib.sh"
$PY tests/cli/whatif_fixtures.py "$WORK/fx" || { bad "fixtures"; finish; exit 1; }
F=$WORK/fx O=$WORK/out1

expect_ok "$BIN" compare "$F/good.json" -o "$O"
expect_out "variants ranked by people pushed beyond 30 min"
for f in compare.csv compare_bands.csv compare_sites.csv summary.json \
         delta_bridge_down.tif affected_bridge_down.gpkg delta_flood.tif affected_flood.gpkg \
         delta_rainy_season.tif delta_post_moved.tif delta_all_closed.tif; do
    if [ -s "$O/$f" ]; then ok; else bad "missing output $f"; fi
done
if ls -a "$O" | grep -q '\.tmp'; then bad "temporary files left in $O"; else ok; fi
v() { $PY -c "import json; d=json.load(open('$O/summary.json'))['compare']; vs={x['name']: x for x in d['variants']}; print($1)"; }
# Base: 950 people, all within 30 min (fixtures.py works the times out).
check_num "base total" "$(v 'd["people_total"]')" 950 1e-9
check_num "base within" "$(v 'd["base"]["people_within_limit"]')" 950 1e-9
# Bridge down: the 450 people east of the river are cut off (on paper).
check_num "bridge pushed" "$(v 'vs["bridge down"]["pushed_beyond_limit"]')" 450 1e-9
check_num "bridge cut off" "$(v 'vs["bridge down"]["cut_off"]')" 450 1e-9
check_num "bridge segments" "$(v 'vs["bridge down"]["changes"]["road_segments_closed"]')" 1 0
# The same bridge closed by its attribute gives the same figures.
check_num "bridge by attribute" "$(v 'vs["bridges by attribute"]["pushed_beyond_limit"]')" 450 1e-9
# Minutes raster: 9999 where reach was lost (cell 15,2), 0 on the west bank.
check_num "delta east" "$(gdallocationinfo -valonly "$O/delta_bridge_down.tif" 15 2)" 9999 0
check_num "delta west" "$(gdallocationinfo -valonly "$O/delta_bridge_down.tif" 5 2)" 0 1e-6
# Affected areas: one polygon of the 450 who lost access.
got=$(ogrinfo -ro -q -sql "SELECT SUM(people) AS p FROM affected WHERE change LIKE 'lost%'" \
      "$O/affected_bridge_down.gpkg" | sed -n 's/.*p (Real) = //p')
check_num "affected people" "$got" 450 1e-6
# Flood: cells whose centre is inside (15 cells, 150 people) and everyone east of it
# (150 more) are cut off. The flood layer is in lon/lat and was reprojected.
check_num "flood cells" "$(v 'vs["flood"]["changes"]["cells_flooded"]')" 15 0
check_num "flood people" "$(v 'vs["flood"]["changes"]["people_in_flood"]')" 150 1e-9
check_num "flood cut off" "$(v 'vs["flood"]["cut_off"]')" 300 1e-9
# Road segments cut by the flood, counted by GDAL/GEOS on the same geometries.
n_geos=$($PY - "$F" <<'PY'
import sys
from osgeo import ogr, osr
d = sys.argv[1]
# Keep the datasets referenced: their layers die with them.
fds, rds = ogr.Open(d + "/flood.geojson"), ogr.Open(d + "/roads.geojson")
fl, rd = fds.GetLayer(0), rds.GetLayer(0)
t = osr.CoordinateTransformation(fl.GetSpatialRef(), rd.GetSpatialRef())
polys = []
for f in fl:
    g = f.GetGeometryRef().Clone()
    g.Transform(t)
    polys.append(g)
n = 0
for f in rd:
    g = f.GetGeometryRef()
    # Each road here is one straight segment (two vertices), so features = segments.
    assert g.GetPointCount() == 2
    n += any(p.Intersects(g) for p in polys)
print(n)
PY
)
check_num "flood segments vs GEOS" "$(v 'vs["flood"]["changes"]["road_segments_flooded"]')" "$n_geos" 0
check_num "flood segments on paper" "$n_geos" 1 0
# Rainy season: R3 at 2.5 km/h is no faster than walking beside it, so the far
# east end (about 33 min, see fixtures.py) drops out; nobody is cut off.
check_num "rain slowed" "$(v 'vs["rainy season"]["changes"]["road_segments_slowed"]')" 1 0
if [ "$(v 'int(vs["rainy season"]["pushed_beyond_limit"] > 0)')" = 1 ]; then ok; else bad "rain pushed nobody"; fi
check_num "rain cut off" "$(v 'vs["rainy season"]["cut_off"]')" 0 1e-9
# A site moved east: C1 with capacity 100 rises past it.
check_num "moved sites" "$(v 'vs["post moved"]["sites_open"]')" 1 0
check_num "moved over" "$(v 'vs["post moved"]["sites_newly_over_capacity"]')" 1 0
# Every site closed: reported, not a crash; everyone unreachable.
check_num "all closed unreachable" "$(v 'vs["all closed"]["people_unreachable"]')" 950 1e-9
if [ "$(v 'vs["all closed"].get("note", "")')" = "no open site can be reached" ]; then ok; else bad "all-closed note"; fi
expect_ok "$BIN" compare "$F/good.json" -o "$WORK/o1b"
expect_out "(no open site can be reached)"
# Conservation in every variant: bands + unreachable = 950.
for name in "bridge down" "rainy season" "flood" "post moved" "all closed"; do
    check_num "conservation $name" "$(v "sum(b['people'] for b in vs['$name']['bands'])")" 950 1e-6
done
check_num "bands.csv conservation" "$($PY -c "
import csv
print(sum(float(r['people']) for r in csv.DictReader(open('$O/compare_bands.csv'))
          if r['variant'] == 'flood' and r['district'] == '(all)'))")" 950 1e-6
# Ranking: bridge down, bridges by attribute and all closed push 450-950 out.
if [ "$(sed -n 2p "$O/compare.csv" | cut -d, -f2)" = "all closed" ]; then ok; else bad "rank 1 is not 'all closed'"; fi

# --json and --quiet.
expect_ok "$BIN" compare "$F/good.json" -o "$WORK/o2" --json
if $PY -c 'import json,sys; json.load(open(sys.argv[1]))["compare"]' "$WORK/out"; then ok; else bad "--json output"; fi
expect_ok "$BIN" compare "$F/good.json" -o "$WORK/o3" --quiet
if [ -s "$WORK/out" ]; then bad "--quiet printed"; else ok; fi

# Bad input: one line naming what is wrong.
expect_fail 1 "no variants to compare" "$BIN" compare "$F/no_variants.json" -o "$WORK/o4"
expect_fail 1 "road 'R9' is not in the road layer" "$BIN" compare "$F/bad_road.json" -o "$WORK/o5"
expect_fail 1 "site 'S9' in close_sites" "$BIN" compare "$F/bad_site.json" -o "$WORK/o6"
expect_fail 1 "not a candidate site" "$BIN" compare "$F/bad_open.json" -o "$WORK/o7"
expect_fail 1 "variants[0].road_speed_factors.surface.unpaved" "$BIN" compare "$F/zero_factor.json" -o "$WORK/o8"
expect_fail 1 "has no field 'lanes'" "$BIN" compare "$F/bad_field.json" -o "$WORK/o9"
expect_fail 1 "missing.geojson" "$BIN" compare "$F/no_flood.json" -o "$WORK/o10"
expect_fail 1 "a flood extent must be polygons" "$BIN" compare "$F/flood_points.json" -o "$WORK/o12"
expect_fail 1 "both named 'x'" "$BIN" compare "$F/same_name.json" -o "$WORK/o11"
expect_fail 2 "no output folder given" "$BIN" compare "$F/good.json"

# The demo district (when generated): both variants conserve its people, and the
# bridge closed in "bridge down" scores the same in links.
if [ -f scenarios/demo/scenario.json ]; then
    expect_ok "$BIN" compare scenarios/demo/scenario.json -o "$WORK/demo" --quiet
    O=$WORK/demo
    tot=$(v 'd["people_total"]')
    for name in "bridge down" "rainy season"; do
        check_num "demo conservation $name" "$(v "sum(b['people'] for b in vs['$name']['bands'])")" "$tot" 1e-6
    done
    expect_ok "$BIN" links scenarios/demo/scenario.json -o "$WORK/demol" --quiet
    br=$($PY -c "import json; print(json.load(open('scenarios/demo/scenario.json'))['variants'][0]['close_roads']['ids'][0])")
    check_num "demo bridge links = compare" \
        "$($PY -c "import csv; print([r for r in csv.DictReader(open('$WORK/demol/links.csv')) if r['road_id'] == '$br'][0]['pushed_beyond_limit'])")" \
        "$(v 'vs["bridge down"]["pushed_beyond_limit"]')" 1e-6
fi
finish
