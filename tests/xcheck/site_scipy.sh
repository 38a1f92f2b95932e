#!/bin/sh
# Cross-check of the site stage on the demo district (when generated; make
# check generates it): coverage lists by networkx's Dijkstra on the exported
# travel network and maximal covering by scipy.optimize.milp (HiGHS) must give
# the same people covered before and after as 'sitereach site'.
# Prints "site_scipy: N passed, M failed".
set -u
build=${SITEREACH_BUILD:-build}
bin=${SITEREACH_BIN:-$build/sitereach}
work=$(mktemp -d /tmp/site_scipy.XXXXXX) || exit 1
trap 'rm -rf "$work"' EXIT
if [ ! -f scenarios/demo/scenario.json ]; then
    echo "site_scipy: no demo district (run make demo); nothing checked"
    echo "site_scipy: 0 passed, 1 failed"
    exit 1
fi
if ! "$build/tools/export-graph" scenarios/demo/scenario.json "$work/g" 2>"$work/err"; then
    cat "$work/err"; echo "site_scipy: 0 passed, 1 failed"; exit 1
fi
if ! "$bin" site scenarios/demo/scenario.json -o "$work/o" --quiet 2>"$work/err"; then
    cat "$work/err"; echo "site_scipy: 0 passed, 1 failed"; exit 1
fi
/usr/bin/python3 tests/xcheck/site_scipy.py "$work/g" scenarios/demo "$work/o/summary.json"
