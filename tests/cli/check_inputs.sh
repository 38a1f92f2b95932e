#!/bin/sh
# sitereach check on hand-made inputs: the good case's report, and the
# bad-input catalogue (each a one-line error naming what is at fault, exit 1).
NAME=check_inputs
. "$(dirname "$0")/../cli_lib.sh"
$PY tests/cli/fixtures.py "$WORK/fx" || { bad "fixtures"; finish; exit 1; }
F=$WORK/fx

# The good case: 20 x 20 cells of 10 people = 4,000 people (worked by hand).
expect_ok "$BIN" check "$F/good.json"
expect_out "20 x 20 cells"
expect_out "people     4000"
expect_ok "$BIN" check "$F/good.json" --json
if $PY -c 'import json,sys; d=json.load(open(sys.argv[1])); assert d["grid"]["people"] == 4000 and d["grid"]["columns"] == 20' "$WORK/out"; then ok; else bad "--json report"; fi

# Usage errors exit 2.
expect_fail 2 "no scenario file given" "$BIN" check
expect_fail 2 "unknown option '--frobnicate'" "$BIN" check "$F/good.json" --frobnicate
expect_fail 2 "unknown command 'chek'" "$BIN" chek "$F/good.json"
expect_fail 2 "writes no output folder" "$BIN" check "$F/good.json" -o "$WORK/x"
expect_fail 2 "has no option '--threads'" "$BIN" check "$F/good.json" --threads 2
expect_fail 2 "needs a folder name" "$BIN" reach "$F/good.json" -o ""
expect_fail 2 "given twice" "$BIN" reach "$F/good.json" -o "$WORK/a" -o "$WORK/b"
expect_fail 2 "takes no argument" "$BIN" --version extra
# '--' ends the options: a file name may then start with '-'.
expect_ok "$BIN" check -- "$F/good.json"
expect_ok "$BIN" --version
expect_out "GLPK 5"

# Bad inputs exit 1 with the file, key or feature named.
expect_fail 1 "nope.tif" "$BIN" check "$F/missing_file.json"
expect_fail 1 "notraster.tif" "$BIN" check "$F/not_raster.json"
expect_fail 1 "coordinate reference system" "$BIN" check "$F/no_crs.json"
expect_fail 1 "zerosize.vrt" "$BIN" check "$F/zero_size.json"
expect_fail 1 "negative" "$BIN" check "$F/negative.json"
expect_fail 1 "col 4, row 3" "$BIN" check "$F/negative.json"
expect_fail 1 "did you mean 'speed_kmh'" "$BIN" check "$F/unknown_key.json"
expect_fail 1 "travel.walk.speed_kmh" "$BIN" check "$F/wrong_type.json"
expect_fail 1 "travel.walk.speed_kmh" "$BIN" check "$F/out_of_range.json"
expect_fail 1 "coverage.bands_min" "$BIN" check "$F/bands_order.json"
expect_fail 1 "line 4, column" "$BIN" check "$F/syntax.json"
expect_fail 1 "lines" "$BIN" check "$F/roads_points.json"
expect_fail 1 "FAR1" "$BIN" check "$F/point_outside.json"
expect_fail 1 "FAR2" "$BIN" check "$F/point_outside.json"
expect_fail 1 "missing.json" "$BIN" check "$F/missing.json"

# NaN and nodata cells are 0 people, counted, not an error: 4,000 - 2 x 10.
expect_ok "$BIN" check "$F/nan.json"
expect_out "people     3980"
expect_out "1 cells (counted as 0 people), 1 NaN cells"
# An empty road layer is a warning, not an error.
expect_ok "$BIN" check "$F/empty_roads.json"
expect_out "warning:"
expect_out "empty"
# A road island is reported with the people around it (worked in fixtures.py).
expect_ok "$BIN" check "$F/island.json"
expect_out "1 road islands are not joined to the main road network; 30 people"
finish
