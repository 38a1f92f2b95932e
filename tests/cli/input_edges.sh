#!/bin/sh
# Edge cases of the inputs, as a newcomer meets them: an empty site layer, no
# roads, an elevation raster covering half the grid, a supply section whose
# depots do not match the depot layer, a report made from another folder.
# 'check' must say what 'reach', 'supply' and 'plan' would refuse, and those
# must refuse it before writing anything.
NAME=input_edges
. "$(dirname "$0")/../cli_lib.sh"
$PY tests/cli/fixtures.py "$WORK/fx" >/dev/null || { bad "fixtures"; finish; exit 1; }
$PY tests/cli/supply_fixtures.py "$WORK/sfx" >/dev/null || { bad "supply fixtures"; finish; exit 1; }
F=$WORK/fx S=$WORK/sfx
# edit IN OUT PYTHON: a copy of scenario IN with the Python statement applied to 'd'.
edit() {
    $PY -c "import json,sys; d=json.load(open(sys.argv[1])); $3; json.dump(d, open(sys.argv[2], 'w'))" "$1" "$2"
}
# no_files DIR: DIR is absent or holds no file at all (no partial outputs, no temporaries).
no_files() {
    if [ ! -d "$1" ] || [ -z "$(ls -A "$1")" ]; then ok; else bad "$1 holds $(ls -A "$1" | tr '\n' ' ')"; fi
}

# An existing-sites layer with no features: check warns, reach names the layer.
# (GDAL's ogr2ogr keeps the fields and drops every feature.)
ogr2ogr -where "1 = 0" "$F/no_points.gpkg" "$F/sites.geojson" 2>/dev/null
edit "$F/good.json" "$F/empty_sites.json" 'd["sites"]["existing"]["path"] = "no_points.gpkg"'
expect_ok "$BIN" check "$F/empty_sites.json"
expect_out "existing sites layer in '$F/no_points.gpkg' has no points"
expect_fail 1 "the sites.existing layer in '$F/no_points.gpkg' has no points" \
    "$BIN" reach "$F/empty_sites.json" -o "$WORK/o_empty"

# Without roads there is no distance to a road to report (it used to say 0 m).
expect_ok "$BIN" check "$F/empty_roads.json"
expect_out "points, no roads to measure from"
if grep -q "farthest 0 m" "$WORK/out"; then bad "check claims 0 m to a road without roads"; else ok; fi
expect_ok "$BIN" check "$F/empty_roads.json" --json
if $PY -c 'import json,sys; d=json.load(open(sys.argv[1])); assert all(p["max_road_distance_m"] is None for p in d["points"])' "$WORK/out"; then ok; else bad "--json max_road_distance_m not null without roads"; fi

# An elevation raster over the west half of the 20 x 20 grid (GDAL's own
# gdal_translate cuts it): 10 x 20 = 200 of 400 cells get no height, by hand.
gdal_translate -q -srcwin 0 0 10 20 "$F/pop.tif" "$F/west_half.tif"
edit "$F/good.json" "$F/half_dem.json" 'd["inputs"]["elevation"] = "west_half.tif"'
expect_ok "$BIN" check "$F/half_dem.json"
expect_out "gives no height for 200 of 400 grid cells"
# The same raster as land cover: the other 200 cells take landcover_default.
edit "$F/good.json" "$F/half_lc.json" 'd["inputs"]["landcover"] = "west_half.tif"'
expect_ok "$BIN" check "$F/half_lc.json"
expect_out "gives no class for 200 of 400 grid cells"

# supply.depot_stock naming a depot the layer lacks: check refuses it, and
# supply and plan refuse it before writing any file.
edit "$S/good.json" "$S/d9.json" 'd["supply"]["depot_stock"]["D9"] = {"water": 1}'
expect_fail 1 "supply.depot_stock names depot 'D9'" "$BIN" check "$S/d9.json"
expect_fail 1 "supply.depot_stock names depot 'D9'" "$BIN" supply "$S/d9.json" -o "$WORK/o_d9"
no_files "$WORK/o_d9"
expect_fail 1 "supply.depot_stock names depot 'D9'" "$BIN" plan "$S/d9.json" -o "$WORK/o_d9p"
no_files "$WORK/o_d9p"
# A supply section without a depot layer: the same, with what to add.
edit "$S/good.json" "$S/nodep.json" 'del d["sites"]["depots"]'
expect_fail 1 "supply needs depots, but sites.depots is not given" "$BIN" check "$S/nodep.json"
expect_fail 1 "give a point layer of depots in sites.depots" "$BIN" supply "$S/nodep.json" -o "$WORK/o_nodep"
no_files "$WORK/o_nodep"

# A scenario given by a relative path, and the report made from another folder:
# the report finds the scenario again (its field names) instead of a note.
case $BIN in /*) abs_bin=$BIN ;; *) abs_bin=$(pwd)/$BIN ;; esac
(cd "$F" && "$abs_bin" reach good.json -o "$WORK/o_rel" --quiet) || bad "reach from the fixture folder"
(cd / && "$abs_bin" report "$WORK/o_rel") >"$WORK/out" 2>&1 || bad "report from /"
if grep -q "scenario not read again" "$WORK/out"; then bad "report lost the scenario: $(cat "$WORK/out")"; else ok; fi
# Without districts the chart caption does not speak of districts.
if grep -q "band in each district" "$WORK/o_rel/report.html"; then bad "caption names districts that do not exist"; else ok; fi
if grep -q "the scenario names no districts" "$WORK/o_rel/report.html"; then ok; else bad "caption without districts"; fi

# A run that fails half-way into the folder of an earlier run leaves no
# summary.json or report.html describing a mix of old and new files.
expect_ok "$BIN" plan "$S/good.json" -o "$WORK/o_mix" --quiet
rm -f "$WORK/o_mix/sites.csv" && mkdir -p "$WORK/o_mix/sites.csv/x"
expect_fail 1 "o_mix/sites.csv" "$BIN" plan "$S/good.json" -o "$WORK/o_mix" --quiet
if [ ! -e "$WORK/o_mix/summary.json" ] && [ ! -e "$WORK/o_mix/report.html" ]; then ok; else bad "a failed plan left the old summary.json or report.html"; fi
if ls -A "$WORK/o_mix" | grep -q tmp; then bad "temporary files left: $(ls -A "$WORK/o_mix")"; else ok; fi
expect_ok "$BIN" reach "$F/good.json" -o "$WORK/o_mix2" --quiet
rm -f "$WORK/o_mix2/bands.csv" && mkdir -p "$WORK/o_mix2/bands.csv/x"
expect_fail 1 "o_mix2/bands.csv" "$BIN" reach "$F/good.json" -o "$WORK/o_mix2" --quiet
if [ ! -e "$WORK/o_mix2/summary.json" ]; then ok; else bad "a failed reach left the old summary.json"; fi

# Progress on a terminal (script(1) gives the command one): each stage is named
# as it starts; in a pipe stderr stays empty; an error on a terminal still
# reads as one line starting with the command's name.
if [ -x /usr/bin/script ]; then
    env -u CI /usr/bin/script -qc "'$abs_bin' reach '$F/good.json' -o '$WORK/o_tty'" /dev/null >"$WORK/tty" 2>&1
    if grep -q "building travel network" "$WORK/tty"; then ok; else bad "no progress line on a terminal: $(cat -A "$WORK/tty" | head -3)"; fi
    env -u CI /usr/bin/script -qc "'$abs_bin' check '$F/missing_file.json'" /dev/null >"$WORK/tty" 2>&1
    if tr '\r' '\n' <"$WORK/tty" | sed 's/\x1b\[K//g' | grep -q "^sitereach check: error: .*nope.tif"; then ok; else bad "error on a terminal: $(cat -A "$WORK/tty")"; fi
fi
env -u CI "$BIN" reach "$F/good.json" -o "$WORK/o_pipe" 2>"$WORK/err_pipe" | cat >/dev/null
if [ ! -s "$WORK/err_pipe" ]; then ok; else bad "stderr in a pipe: $(cat "$WORK/err_pipe")"; fi

# People beyond the limit by district when the limit falls inside a band (200 min
# with bands 30/60/120): counted cell by cell, not the whole over-120 band. The
# districts add up to the people GDAL's Python bindings find on cells of
# travel_time.tif over 200 min or unreachable (-1), weighted by population.tif.
if [ -f scenarios/demo/scenario.json ]; then
    D=$(cd scenarios/demo && pwd)
    edit "$D/scenario.json" "$WORK/lim200.json" "d['coverage']['limit_min'] = 200; d.pop('supply', None); [d['inputs'].__setitem__(k, '$D/' + d['inputs'][k]) for k in ('population', 'landcover', 'elevation', 'barriers')]; [v.__setitem__('path', '$D/' + v['path']) for v in [d['inputs']['roads'], d['inputs']['districts']] + list(d['sites'].values())]"
    expect_ok "$BIN" reach "$WORK/lim200.json" -o "$WORK/o_lim"
    got=$(sed -n '/^people beyond 200 min by district:/,/^sites over/p' "$WORK/out" | awk '/ of /{s += $(NF-2)} END {print s}')
    want=$($PY -c "
from osgeo import gdal
import numpy as np
t = gdal.Open('$WORK/o_lim/travel_time.tif').ReadAsArray()
p = gdal.Open('$D/population.tif').ReadAsArray().astype(float)
p[p < 0] = 0
print(p[(t > 200) | (t == -1)].sum())")
    check_num "people beyond 200 min over districts" "$got" "$want" 4
    # summary.json has them per district: against GDAL's RasterizeLayer of the
    # ward polygons (cell centres, as GDAL burns by default) over the same cells.
    if $PY -c "
from osgeo import gdal, ogr
import json
pds = gdal.Open('$D/population.tif'); p = pds.ReadAsArray().astype(float); p[p < 0] = 0
t = gdal.Open('$WORK/o_lim/travel_time.tif').ReadAsArray()
m = gdal.GetDriverByName('MEM').Create('', pds.RasterXSize, pds.RasterYSize, 1, gdal.GDT_Int32)
m.SetGeoTransform(pds.GetGeoTransform()); m.SetProjection(pds.GetProjection()); m.GetRasterBand(1).Fill(-1)
ds = ogr.Open('$D/districts.gpkg'); sql = ds.ExecuteSQL('select fid + 0 as idx, name, geom from districts')
names = {f.GetField('idx'): f.GetField('name') for f in sql}; sql.ResetReading()
gdal.RasterizeLayer(m, [1], sql, options=['ATTRIBUTE=idx'])
z = m.GetRasterBand(1).ReadAsArray(); over = (t > 200) | (t == -1)
got = json.load(open('$WORK/o_lim/summary.json'))['reach']['beyond_limit_by_district']
assert all(abs(p[over & (z == i)].sum() - got[n]) < 0.5 for i, n in names.items()), (got, names)
"; then ok; else bad "beyond_limit_by_district against GDAL"; fi
    # The report's key figure uses them, without the bands caveat.
    expect_ok "$BIN" report "$WORK/o_lim" --quiet
    if grep -q "district counts include the band holding the limit" "$WORK/o_lim/report.html"; then bad "report still brackets districts by bands"; else ok; fi
fi

# Every road closed to vehicles: the supply warnings say so, not only "too far".
edit "$S/good.json" "$S/closed.json" 'd.setdefault("travel", {})["road_speeds"] = {"primary": {"walk_kmh": 5, "vehicle_kmh": 0}}; d["travel"]["unknown_class"] = {"walk_kmh": 4, "vehicle_kmh": 0}'
expect_ok "$BIN" supply "$S/closed.json" -o "$WORK/o_closed"
expect_out "no road is open to vehicles (every road class has vehicle speed 0)"

# Vehicle mode without roads: a warning, since everyone would walk.
edit "$F/good.json" "$F/vehicle_noroads.json" 'd["travel"]["mode"] = "vehicle"; del d["inputs"]["roads"]'
expect_ok "$BIN" check "$F/vehicle_noroads.json"
expect_out 'travel.mode is "vehicle" but the scenario has no roads'

# Help lists every file the command writes.
expect_ok "$BIN" reach --help
expect_out "groups.csv"
expect_ok "$BIN" plan --help
expect_out "report.html"

# The shipment plan says how close to the best it is proven, not "optimal, gap x%".
expect_ok "$BIN" supply "$S/good.json" -o "$WORK/o_good"
if grep -q "^trips per depot (.*best possible plan" "$WORK/out" && ! grep -q "optimal, gap" "$WORK/out"; then ok; else bad "trips line: $(grep 'trips per depot' "$WORK/out")"; fi
finish
