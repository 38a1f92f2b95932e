#!/bin/sh
# Cross-check depot -> site vehicle times and distances against a plain networkx
# (Debian python3-networkx) computation from the demo's road file, read with
# GDAL's Python bindings. Run from the repository root; prints
# "depots_networkx: N passed, M failed".
set -u
bin=${SITEREACH_BIN:-build/sitereach}
demo=scenarios/demo
work=$(mktemp -d /tmp/depots_networkx.XXXXXX) || exit 1
trap 'rm -rf "$work"' EXIT
if [ ! -f "$demo/scenario.json" ]; then
    echo "depots_networkx: 0 passed, 1 failed (no demo at $demo; make check generates it)"
    exit 1
fi
if ! "$bin" supply "$demo/scenario.json" -o "$work/out" --quiet 2>"$work/err"; then
    echo "depots_networkx: supply failed: $(cat "$work/err")"
    echo "depots_networkx: 0 passed, 1 failed"
    exit 1
fi
/usr/bin/python3 tests/xcheck/depots_networkx.py "$demo" "$work/out/supply_travel.csv"
