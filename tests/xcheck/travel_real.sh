#!/bin/sh
# networkx cross-check of nearest-site times on real and demo inputs:
#  - Burundi: a window of the GHS-POP grid (© European Union / JRC) over the OSM
#    road block (© OpenStreetMap contributors, ODbL 1.0), with the OSM health
#    facilities inside it as sites; walking with 8 neighbours.
#  - the demo district, when it has been generated (make check generates it).
# Prints "travel_real: N passed, M failed".
set -u
build=${SITEREACH_BUILD:-build}
B=${SITEREACH_SHARED:-../shared}/data/real/burundi
work=$(mktemp -d /tmp/travel_real.XXXXXX) || exit 1
trap 'rm -rf "$work"' EXIT
passed=0 failed=0
tally() {
    line=$(tail -n 1 "$1")
    p=$(echo "$line" | sed -E 's/.*: ([0-9]+) passed, ([0-9]+) failed/\1/')
    f=$(echo "$line" | sed -E 's/.*: ([0-9]+) passed, ([0-9]+) failed/\2/')
    case "$p$f" in *[!0-9]*|"") failed=$((failed + 1)); cat "$1"; return;; esac
    passed=$((passed + p)); failed=$((failed + f))
    grep -v "passed, " "$1"
}

# Burundi window: roads span lon 29.715-30.066, lat -3.260 to -2.914.
gdal_translate -q -projwin_srs EPSG:4326 -projwin 29.70 -2.90 30.08 -3.27 \
    "$B/ghs_pop_burundi_250m_mollweide.tif" "$work/pop.tif" || failed=$((failed + 1))
ogr2ogr -q -spat 29.72 -3.25 30.06 -2.92 "$work/sites.geojson" \
    "$B/burundi_health_facilities_osm2019.geojson" || failed=$((failed + 1))
cat >"$work/burundi.json" <<JSON
{ "name": "Burundi road block",
  "inputs": { "population": "pop.tif",
              "roads": { "path": "$B/central_burundi_roads_osm.geojson" } },
  "sites": { "existing": { "path": "sites.geojson", "id_field": "osm_node_id" } },
  "travel": { "mode": "walk", "walk": { "speed_kmh": 5.0 } } }
JSON
if "$build/tools/export-graph" "$work/burundi.json" "$work/bdi" 2>"$work/err"; then
    /usr/bin/python3 tests/xcheck/travel_real.py "$work/bdi" burundi >"$work/out" 2>&1
    tally "$work/out"
else
    failed=$((failed + 1)); cat "$work/err"
fi

if [ -f scenarios/demo/scenario.json ]; then
    if "$build/tools/export-graph" scenarios/demo/scenario.json "$work/demo" 2>"$work/err"; then
        /usr/bin/python3 tests/xcheck/travel_real.py "$work/demo" demo >"$work/out" 2>&1
        tally "$work/out"
    else
        failed=$((failed + 1)); cat "$work/err"
    fi
fi
echo "travel_real: $passed passed, $failed failed"
[ "$failed" -eq 0 ]
