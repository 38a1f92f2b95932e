#!/bin/sh
# networkx brute force of critical-link scores (tests/xcheck/links_networkx.py):
#  - Burundi: a window of the GHS-POP grid (© European Union / JRC) over the OSM
#    road block (© OpenStreetMap contributors, ODbL 1.0), with the OSM health
#    facilities inside it as sites; walking, 60 min limit (as travel_real.sh).
#  - the demo district, when it has been generated (make check generates it).
# Each top-ranked link (and a few more, and two skipped by the tree rule) is
# closed alone and recomputed from scratch by networkx.
# Prints "links_networkx: N passed, M failed".
set -u
build=${SITEREACH_BUILD:-build}
B=${SITEREACH_SHARED:-../shared}/data/real/burundi
work=$(mktemp -d /tmp/links_networkx.XXXXXX) || exit 1
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
one() {   # one SCENARIO NAME
    if "$build/tests/test_links" --export "$1" "$work/$2" 2>"$work/err"; then
        /usr/bin/python3 tests/xcheck/links_networkx.py "$work/$2" "$2" >"$work/out" 2>&1
        tally "$work/out"
    else
        failed=$((failed + 1)); cat "$work/err"
    fi
}

gdal_translate -q -projwin_srs EPSG:4326 -projwin 29.70 -2.90 30.08 -3.27 \
    "$B/ghs_pop_burundi_250m_mollweide.tif" "$work/pop.tif" || failed=$((failed + 1))
ogr2ogr -q -spat 29.72 -3.25 30.06 -2.92 "$work/sites.geojson" \
    "$B/burundi_health_facilities_osm2019.geojson" || failed=$((failed + 1))
cat >"$work/burundi.json" <<JSON
{ "name": "Burundi road block",
  "inputs": { "population": "pop.tif",
              "roads": { "path": "$B/central_burundi_roads_osm.geojson" } },
  "sites": { "existing": { "path": "sites.geojson", "id_field": "osm_node_id" } },
  "travel": { "mode": "walk", "walk": { "speed_kmh": 5.0 } },
  "coverage": { "limit_min": 60 } }
JSON
one "$work/burundi.json" burundi
[ -f scenarios/demo/scenario.json ] && one scenarios/demo/scenario.json demo
echo "links_networkx: $passed passed, $failed failed"
[ "$failed" -eq 0 ]
