#!/bin/sh
# Cross-check roads_load on the Liechtenstein OSM extract against OGR's own SQL
# counts and an independent pyproj geodesic length sum (Debian python3-gdal,
# python3-pyproj). OSM data: (c) OpenStreetMap contributors, ODbL 1.0.
set -u
: "${SITEREACH_SHARED:=../shared}"
: "${SITEREACH_BUILD:=build}"
pbf="$SITEREACH_SHARED/data/real/liechtenstein/liechtenstein-2013-08-03.osm.pbf"
if [ ! -r "$pbf" ]; then
    echo "roads_liechtenstein: extract not found at $pbf; skipped"
    echo "roads_liechtenstein: 0 passed, 0 failed"
    exit 0
fi
out=$(mktemp)
trap 'rm -f "$out"' EXIT
if ! SITEREACH_SHARED="$SITEREACH_SHARED" "$SITEREACH_BUILD/tests/test_roads" \
        --print-liechtenstein >"$out"; then
    echo "roads_liechtenstein: test_roads --print-liechtenstein failed"
    echo "roads_liechtenstein: 0 passed, 1 failed"
    exit 1
fi
/usr/bin/python3 "$(dirname "$0")/roads_liechtenstein.py" "$pbf" "$out"
