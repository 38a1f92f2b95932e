#!/bin/sh
# networkx cross-check of nearest-site times on real and demo inputs:
#  - Burundi: a window of the GHS-POP grid (© European Union / JRC) over the OSM
#    road block (© OpenStreetMap contributors, ODbL 1.0), with the OSM health
#    facilities inside it as sites; walking with 8 neighbours.
#  - the demo district, when it has been generated (make check generates it).
# Prints "travel_real: N passed, M failed".
set -u
build=${SITEREACH_BUILD:-build}
work=$(mktemp -d /tmp/travel_real.XXXXXX) || exit 1
trap 'rm -rf "$work"' EXIT
passed=0 failed=0
. tests/xcheck/common.inc

burundi_window "$work"
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
