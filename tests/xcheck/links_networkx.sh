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
work=$(mktemp -d /tmp/links_networkx.XXXXXX) || exit 1
trap 'rm -rf "$work"' EXIT
passed=0 failed=0
. tests/xcheck/common.inc
one() {   # one SCENARIO NAME
    if "$build/tests/test_links" --export "$1" "$work/$2" 2>"$work/err"; then
        /usr/bin/python3 tests/xcheck/links_networkx.py "$work/$2" "$2" >"$work/out" 2>&1
        tally "$work/out"
    else
        failed=$((failed + 1)); cat "$work/err"
    fi
}

burundi_window "$work"
one "$work/burundi.json" burundi
[ -f scenarios/demo/scenario.json ] && one scenarios/demo/scenario.json demo
echo "links_networkx: $passed passed, $failed failed"
[ "$failed" -eq 0 ]
