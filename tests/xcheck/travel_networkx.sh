#!/bin/sh
# Cross-check travel times against networkx (Debian python3-networkx): synthetic
# networks exported by test_travel, and the DIMACS Rome99 graph through igraph.
# Run from the repository root; prints "travel_networkx: N passed, M failed".
set -u
build=${SITEREACH_BUILD:-build}
shared=${SITEREACH_SHARED:-../shared}
work=$(mktemp -d /tmp/travel_networkx.XXXXXX) || exit 1
trap 'rm -rf "$work"' EXIT
if [ ! -x "$build/tests/test_travel" ]; then
    echo "travel_networkx: 0 passed, 1 failed ($build/tests/test_travel not built)"
    exit 1
fi
/usr/bin/python3 tests/xcheck/travel_networkx.py "$build/tests/test_travel" "$work" \
    "$shared/data/real/dimacs-rome99/rome99.gr"
