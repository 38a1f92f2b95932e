#!/bin/sh
# sitereach links on hand-made inputs (tests/cli/whatif_fixtures.py): the bridge
# is the one link whose closure cuts the village off (worked on paper: 450
# people), the outputs open in GDAL, and the bad-input cases.
NAME=links
. "$(dirname "$0")/../cli_lib.sh"
$PY tests/cli/whatif_fixtures.py "$WORK/fx" || { bad "fixtures"; finish; exit 1; }
F=$WORK/fx O=$WORK/out1

expect_ok "$BIN" links "$F/good.json" -o "$O" --threads 2
expect_out "most critical links"
expect_out "bridges: R2 rank 1 (450 pushed out, 450 cut off)"
for f in links.csv links.gpkg summary.json; do
    if [ -s "$O/$f" ]; then ok; else bad "missing output $f"; fi
done
# Three roads, each its own feature between junctions: three links.
check_num "links" "$(($(wc -l <"$O/links.csv") - 1))" 3 0
# Rank 1 is the bridge R2: 450 people pushed beyond 30 min and cut off.
row1=$(sed -n 2p "$O/links.csv")
if [ "$(echo "$row1" | cut -d, -f3)" = R2 ]; then ok; else bad "rank 1 is not R2: $row1"; fi
check_num "R2 bridge flag" "$(echo "$row1" | cut -d, -f5)" 1 0
check_num "R2 pushed" "$(echo "$row1" | cut -d, -f9)" 450 1e-6
check_num "R2 cut off" "$(echo "$row1" | cut -d, -f10)" 450 1e-6
# The same figure as compare's "bridge down" variant (a full search on the
# edited network).
expect_ok "$BIN" compare "$F/good.json" -o "$WORK/c" --quiet
check_num "links = compare" "$($PY -c "import json; d=json.load(open('$WORK/c/summary.json'))['compare']; print([x for x in d['variants'] if x['name']=='bridge down'][0]['added_person_hours'])")" \
    "$(echo "$row1" | cut -d, -f11)" 1e-6
# Line geometries in the grid's CRS, one per link, the bridge 200 m long.
if ogrinfo -ro -so "$O/links.gpkg" links | grep -q 'Geometry: Line String'; then ok; else bad "links.gpkg geometry"; fi
if ogrinfo -ro -so "$O/links.gpkg" links | grep -q 'Feature Count: 3'; then ok; else bad "links.gpkg count"; fi
got=$(ogrinfo -ro -q -dialect SQLite -sql "SELECT ST_Length(geom) AS len FROM links WHERE road_id = 'R2'" \
      "$O/links.gpkg" | sed -n 's/.*len (Real) = //p')
check_num "bridge length (SpatiaLite)" "$got" 200 1e-6
check_num "summary skipped" "$($PY -c "import json; print(json.load(open('$O/summary.json'))['links']['links_skipped_by_tree_rule'])")" 0 0
expect_ok "$BIN" links "$F/good.json" -o "$WORK/o2" --json
if $PY -c 'import json,sys; json.load(open(sys.argv[1]))["links"]' "$WORK/out"; then ok; else bad "--json output"; fi
expect_ok "$BIN" links "$F/good.json" -o "$WORK/o3" --quiet
if [ -s "$WORK/out" ]; then bad "--quiet printed"; else ok; fi

expect_fail 1 "has no roads to rank" "$BIN" links "$F/no_roads.json" -o "$WORK/o4"
expect_fail 2 "no output folder given" "$BIN" links "$F/good.json"
finish
