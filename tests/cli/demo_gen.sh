#!/bin/sh
# demo_gen: the invented demo district from build/tools/gen-demo, checked with
# GDAL's own command-line tools (gdalinfo, ogrinfo, ogr2ogr, gdal_translate,
# gdal_rasterize, gdal_polygonize.py, gdallocationinfo) rather than our code.
# Run from the repository root; prints "demo_gen: N passed, M failed".
set -u
gen=${SITEREACH_BUILD:-build}/tools/gen-demo
tmp=$(mktemp -d /tmp/demo_gen.XXXXXX) || exit 1
trap 'rm -rf "$tmp"' EXIT
passed=0
failed=0

ok() { passed=$((passed + 1)); }
bad() { failed=$((failed + 1)); echo "FAIL: $*" >&2; }
check() {   # check DESCRIPTION COMMAND...: pass when the command succeeds
    what=$1
    shift
    if "$@" >/dev/null 2>&1; then ok; else bad "$what"; fi
}
# The grid of the demo, as gen-demo documents it (docs/demo.md).
NX=400 NY=400 XMIN=512000 XMAX=552000 YMIN=9003000 YMAX=9043000

if [ ! -x "$gen" ]; then
    echo "FAIL: $gen is not built (make tests)" >&2
    echo "demo_gen: 0 passed, 1 failed"
    exit 1
fi

# --- same seed, same files ------------------------------------------------------
"$gen" --seed 7 --out "$tmp/a/demo" >"$tmp/a.out" 2>"$tmp/a.err"
check "first run exits 0" test $? -eq 0
"$gen" --seed 7 --out "$tmp/b" >"$tmp/b.out" 2>"$tmp/b.err"
check "second run exits 0" test $? -eq 0
a=$tmp/a/demo
for f in population.tif landcover.tif elevation.tif barriers.tif; do
    check "$f identical for the same seed" cmp "$a/$f" "$tmp/b/$f"
done
# GeoPackages too: gen-demo pins the change date GDAL records in them.
for f in roads.gpkg sites.gpkg districts.gpkg scenario.json; do
    check "$f identical for the same seed" cmp "$a/$f" "$tmp/b/$f"
done
check "summary is one line" test "$(wc -l <"$tmp/a.out")" -eq 1
check "summary names the district" grep -q "Orvanne District (seed 7): 400 x 400 cells" "$tmp/a.out"
check "no leftover temporary files" test -z "$(ls -A "$a" | grep tmp)"
"$gen" --seed 8 --out "$tmp/c" >/dev/null 2>&1
if cmp -s "$a/population.tif" "$tmp/c/population.tif"; then bad "seed 8 differs from seed 7"; else ok; fi

# --- rasters: one grid, CRS, types ---------------------------------------------------
for f in population.tif landcover.tif elevation.tif barriers.tif; do
    gdalinfo "$a/$f" >"$tmp/info" 2>&1
    check "$f opens in gdalinfo" grep -q "Size is $NX, $NY" "$tmp/info"
    check "$f is in UTM zone 36S" grep -q 'ID\["EPSG",32736\]' "$tmp/info"
    check "$f has 100 m cells at ($XMIN, $YMAX)" \
        grep -q "Origin = ($XMIN.000000000000000,$YMAX.000000000000000)" "$tmp/info"
done
gdalinfo "$a/population.tif" >"$tmp/pi" 2>&1
check "population is Float32" grep -q "Type=Float32" "$tmp/pi"
check "population nodata is -9999" grep -q "NoData Value=-9999" "$tmp/pi"
check "elevation is Float32" sh -c "gdalinfo '$a/elevation.tif' | grep -q Type=Float32"
check "barriers are Byte" sh -c "gdalinfo '$a/barriers.tif' | grep -q Type=Byte"

# --- population total, from gdalinfo's statistics on a copy ---------------------------
cp "$a/population.tif" "$tmp/pop.tif"
gdalinfo -stats "$tmp/pop.tif" >"$tmp/stats" 2>&1
total=$(awk -F= -v n=$((NX * NY)) '
    /STATISTICS_MEAN=/ { m = $2 }
    /STATISTICS_VALID_PERCENT=/ { p = $2 }
    END { if (m == "" || p == "") print -1; else printf "%.0f\n", m * n * p / 100 }' "$tmp/stats")
check "population total $total is within 150000..300000" \
    test "$total" -ge 150000 -a "$total" -le 300000
# gdalinfo rounds the valid percentage to 0.01%, so its total is good to ~0.01%;
# GDAL's ASCII grid export gives every cell, for an exact sum.
said=$(sed -E 's/.* ([0-9]+) people.*/\1/' "$tmp/a.out")
check "summary total $said matches gdalinfo's $total (within 0.02%)" \
    awk -v a="$said" -v b="$total" 'BEGIN { d = a - b; if (d < 0) d = -d; exit !(d <= 2e-4 * b) }'
gdal_translate -q -of AAIGrid "$a/population.tif" "$tmp/pop.asc"
grep -v '^[a-zA-Z]' "$tmp/pop.asc" | awk '
    { for (i = 1; i <= NF; i++) if ($i == -9999) nd++; else { s += $i; if ($i < 0) neg++ } }
    END { printf "%.0f %d %d\n", s, nd, neg }' >"$tmp/popsum"
read exact nodata neg <"$tmp/popsum"
check "summary total $said equals the cell sum $exact (within 1 person)" \
    test $((said - exact)) -le 1 -a $((exact - said)) -le 1
check "a few nodata cells ($nodata)" test "$nodata" -ge 1 -a "$nodata" -le 20
check "no negative people ($neg cells)" test "$neg" -eq 0
check "gdalinfo: valid cells below 100%" grep -q "STATISTICS_VALID_PERCENT=99.9" "$tmp/stats"
check "gdalinfo: minimum is 0 people" grep -q "STATISTICS_MINIMUM=0$" "$tmp/stats"

# --- water: land cover 60 exactly where the barrier is 1; the river crosses ---------
gdal_translate -q -of AAIGrid "$a/barriers.tif" "$tmp/bar.asc"
gdal_translate -q -of AAIGrid "$a/landcover.tif" "$tmp/lc.asc"
# AAIGrid: a few header lines (words), then one line of NX values per row, north first.
grep -v '^[a-zA-Z]' "$tmp/bar.asc" >"$tmp/bar.txt"
grep -v '^[a-zA-Z]' "$tmp/lc.asc" >"$tmp/lc.txt"
check "barrier raster has $NY rows" test "$(wc -l <"$tmp/bar.txt")" -eq $NY
mismatch=$(paste -d' ' "$tmp/bar.txt" "$tmp/lc.txt" | awk -v nx=$NX '
    { for (i = 1; i <= nx; i++) if (($i == 1) != ($(i + nx) == 60)) bad++ }
    END { print bad + 0 }')
check "water land cover and barrier cells agree ($mismatch cells differ)" test "$mismatch" -eq 0
classes=$(awk '{ for (i = 1; i <= NF; i++) seen[$i] = 1 }
    END { for (k in seen) printf "%s ", k }' "$tmp/lc.txt" | tr ' ' '\n' | sort -n | tr '\n' ' ')
check "land cover classes are 10..60 ($classes)" test "$classes" = "10 20 30 40 50 60 "
rows=$(awk '{ for (i = 1; i <= NF; i++) if ($i == 1) { n++; break } } END { print n + 0 }' \
    "$tmp/bar.txt")
check "every row has river cells ($rows of $NY)" test "$rows" -eq $NY
# The largest 4-connected barrier patch (GDAL's polygonizer) runs edge to edge.
gdal_polygonize.py -q "$a/barriers.tif" -f GPKG "$tmp/water.gpkg" water DN >/dev/null 2>&1
ogr2ogr -f GPKG "$tmp/river.gpkg" "$tmp/water.gpkg" -dialect OGRSQL -nln river \
    -sql "SELECT * FROM water WHERE DN = 1 ORDER BY OGR_GEOM_AREA DESC LIMIT 1" 2>/dev/null
check "the river runs from the north edge to the south edge" \
    sh -c "ogrinfo -so '$tmp/river.gpkg' river | grep -q 'Extent: (.*, $YMIN.000000) - (.*, $YMAX.000000)'"
npatch=$(ogrinfo -q -dialect OGRSQL -sql "SELECT COUNT(*) AS n FROM water WHERE DN = 1" \
    "$tmp/water.gpkg" | sed -n 's/.*n (Integer) = //p')
check "water is the river and one lake ($npatch patches)" test "$npatch" = 2

# --- roads ------------------------------------------------------------------------------
r=$a/roads.gpkg
ogrinfo -so "$r" roads >"$tmp/rinfo" 2>&1
check "roads layer opens" grep -q "Geometry: Line String" "$tmp/rinfo"
for fld in "id: String" "highway: String" "bridge: String" "oneway: String" "surface: String"; do
    check "roads has field $fld" grep -q "^$fld" "$tmp/rinfo"
done
count() {   # count FILE SQL: the single integer the OGR SQL query returns
    ogrinfo -q -dialect OGRSQL -sql "$2" "$1" | sed -n 's/.*(Integer) = //p' | head -n 1
}
nb=$(count "$r" "SELECT COUNT(*) AS n FROM roads WHERE bridge = 'yes'")
check "two bridges ($nb)" test "$nb" = 2
no=$(count "$r" "SELECT COUNT(*) AS n FROM roads WHERE oneway = 'yes'")
check "two one-way streets ($no)" test "$no" = 2
cls=$(ogrinfo -q -dialect OGRSQL -sql "SELECT DISTINCT highway FROM roads ORDER BY highway" "$r" |
    sed -n 's/.*highway (String) = //p' | tr '\n' ' ')
check "six road classes ($cls)" test "$cls" = "path primary secondary tertiary track unclassified "
nid=$(count "$r" "SELECT COUNT(DISTINCT id) AS n FROM roads")
nr=$(count "$r" "SELECT COUNT(*) AS n FROM roads")
check "road ids are unique ($nid of $nr)" test "$nid" = "$nr"
check "road ids look like R001" sh -c "ogrinfo -q -al '$r' | grep -q 'id (String) = R001'"
# Roads other than bridges touch no water cell, even drawn with every touched cell.
gdal_rasterize -q -at -burn 1 -ot Byte -init 0 -te $XMIN $YMIN $XMAX $YMAX -ts $NX $NY \
    -where "bridge <> 'yes'" -l roads "$r" "$tmp/land_roads.tif"
gdal_rasterize -q -burn 1 -ot Byte -init 0 -te $XMIN $YMIN $XMAX $YMAX -ts $NX $NY \
    -where "bridge = 'yes'" -l roads "$r" "$tmp/bridges.tif"
gdal_translate -q -of AAIGrid "$tmp/land_roads.tif" "$tmp/lr.asc"
gdal_translate -q -of AAIGrid "$tmp/bridges.tif" "$tmp/br.asc"
grep -v '^[a-zA-Z]' "$tmp/lr.asc" >"$tmp/lr.txt"
grep -v '^[a-zA-Z]' "$tmp/br.asc" >"$tmp/br.txt"
wet=$(paste -d' ' "$tmp/bar.txt" "$tmp/lr.txt" | awk -v nx=$NX '
    { for (i = 1; i <= nx; i++) if ($i == 1 && $(i + nx) == 1) n++ } END { print n + 0 }')
check "no road but a bridge touches water ($wet cells)" test "$wet" -eq 0
over=$(paste -d' ' "$tmp/bar.txt" "$tmp/br.txt" | awk -v nx=$NX '
    { for (i = 1; i <= nx; i++) if ($i == 1 && $(i + nx) == 1) n++ } END { print n + 0 }')
check "the bridges span water ($over cells)" test "$over" -ge 4
# Topology from the coordinates as GDAL prints them: every feature is joined to
# every other through shared end points, and each bridge end meets a road.
ogr2ogr -f CSV "$tmp/roads.csv" "$r" roads -lco GEOMETRY=AS_WKT 2>/dev/null
awk -F'"' 'NR > 1 {
        split($2, a, /[(),]/); first = a[2]; n = 0
        for (i = 2; i in a; i++) if (a[i] ~ /[0-9]/) last = a[i]
        gsub(/^ +| +$/, "", first); gsub(/^ +| +$/, "", last)
        split($3, f, ","); nf++; A[nf] = first; B[nf] = last; bridge[nf] = (f[4] == "yes")
        ends[first]++; ends[last]++
    }
    function find(x) { while (parent[x] != x) x = parent[x]; return x }
    END {
        for (k in ends) parent[k] = k
        for (i = 1; i <= nf; i++) { p = find(A[i]); q = find(B[i]); if (p != q) parent[p] = q }
        comps = 0
        for (k in ends) if (find(k) == k) comps++
        loose = 0
        for (i = 1; i <= nf; i++) if (bridge[i] && (ends[A[i]] < 2 || ends[B[i]] < 2)) loose++
        print comps, loose, nf
    }' "$tmp/roads.csv" >"$tmp/topo"
read comps loose nf <"$tmp/topo"
check "the road network is one piece ($comps pieces, $nf features)" test "$comps" = 1
check "both ends of each bridge meet another road ($loose loose ends)" test "$loose" = 0

# --- sites ------------------------------------------------------------------------------
s=$a/sites.gpkg
for spec in health_posts:6:10 candidates:40:80 depots:2:2; do
    layer=${spec%%:*}
    lo=$(echo "$spec" | cut -d: -f2)
    hi=$(echo "$spec" | cut -d: -f3)
    n=$(ogrinfo -so "$s" "$layer" 2>/dev/null | sed -n 's/^Feature Count: //p')
    check "$layer opens, $lo..$hi points ($n)" test "${n:-0}" -ge "$lo" -a "${n:-0}" -le "$hi"
    # Each point lies inside the grid and off the barrier cells (gdallocationinfo).
    ogr2ogr -f CSV "$tmp/$layer.csv" "$s" "$layer" -lco GEOMETRY=AS_XY 2>/dev/null
    vals=$(awk -F, 'NR > 1 { print $1, $2 }' "$tmp/$layer.csv" |
        gdallocationinfo -valonly -geoloc "$a/barriers.tif" 2>/dev/null | tr '\n' ' ')
    zeros=$(echo "$vals" | tr ' ' '\n' | grep -c '^0$')
    check "$layer: all $n points inside the grid and off water ($zeros)" test "$zeros" = "$n"
done
check "health posts carry a capacity" sh -c "ogrinfo -so '$s' health_posts | grep -q '^capacity: Integer'"
check "candidates carry a cost" sh -c "ogrinfo -so '$s' candidates | grep -q '^cost: Real'"
check "depots carry a name" sh -c "ogrinfo -so '$s' depots | grep -q '^name: String'"

# --- wards ------------------------------------------------------------------------------
dd=$a/districts.gpkg
nd=$(ogrinfo -so "$dd" districts 2>/dev/null | sed -n 's/^Feature Count: //p')
check "districts opens, 3..4 polygons ($nd)" test "${nd:-0}" -ge 3 -a "${nd:-0}" -le 4
area=$(ogrinfo -q -dialect OGRSQL -sql "SELECT SUM(OGR_GEOM_AREA) AS a FROM districts" "$dd" |
    sed -n 's/.*a (Real) = //p')
check "wards tile the 40 x 40 km grid (area $area m2)" \
    awk -v a="$area" 'BEGIN { exit !(a > 1599999000 && a < 1600001000) }'
check "wards cover the grid's extent" \
    sh -c "ogrinfo -so '$dd' districts | grep -q 'Extent: ($XMIN.000000, $YMIN.000000) - ($XMAX.000000, $YMAX.000000)'"

# --- scenario.json ------------------------------------------------------------------------
check "scenario.json is JSON" /usr/bin/python3 -m json.tool "$a/scenario.json"
for f in $(grep -o '"[a-z]*\.\(tif\|gpkg\)"' "$a/scenario.json" | tr -d '"' | sort -u); do
    check "scenario names $f, which exists" test -f "$a/$f"
done
check "scenario keys as the brief" grep -q '"landcover_factors": { "10": 1.0' "$a/scenario.json"

# --- refusals ------------------------------------------------------------------------------
"$gen" >/dev/null 2>"$tmp/err"
check "no arguments: exit 2" test $? -eq 2
check "no arguments: says --seed is required" grep -q -- "--seed N is required" "$tmp/err"
"$gen" --seed seven --out "$tmp/x" >/dev/null 2>"$tmp/err"
check "bad seed: exit 2" test $? -eq 2
check "bad seed: names the value" grep -q "'seven' is not a whole number" "$tmp/err"
check "bad seed: writes nothing" test ! -e "$tmp/x"
check "bad seed: one line" test "$(wc -l <"$tmp/err")" -eq 1
"$gen" --seed 7 --out "$tmp/x" --colour blue >/dev/null 2>"$tmp/err"
check "unknown option: exit 2" test $? -eq 2
check "unknown option: names it" grep -q "unknown argument '--colour'" "$tmp/err"
"$gen" --seed 7 >/dev/null 2>"$tmp/err"
check "missing --out: exit 2" test $? -eq 2
"$gen" --seed 7 --out >/dev/null 2>"$tmp/err"
check "--out without value: exit 2" test $? -eq 2
check "--out without value: says so" grep -q -- "--out needs a value" "$tmp/err"
: >"$tmp/plainfile"
"$gen" --seed 7 --out "$tmp/plainfile/demo" >/dev/null 2>"$tmp/err"
check "unwritable folder: exit 1" test $? -eq 1
check "unwritable folder: names it" grep -q "cannot create folder '$tmp/plainfile/demo'" "$tmp/err"
check "unwritable folder: one line" test "$(wc -l <"$tmp/err")" -eq 1
"$gen" --help >"$tmp/help" 2>&1
check "--help: exit 0 and usage" grep -q "usage: gen-demo --seed N --out DIR" "$tmp/help"

echo "demo_gen: $passed passed, $failed failed"
[ "$failed" -eq 0 ]
