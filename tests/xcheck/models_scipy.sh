#!/bin/sh
# Cross-check: random covering, median and capacitated instances solved by our
# models (through the cost-matrix table loader) and by scipy.optimize.milp
# (HiGHS, Debian python3-scipy) must reach the same optimal objective; the
# edge-list loader's igraph shortest paths must equal networkx Dijkstra.
# Run from the repository root; SITEREACH_BUILD is the build directory.
build=${SITEREACH_BUILD:-build}
if [ ! -x "$build/tests/test_tables" ]; then
    echo "models_scipy: 0 passed, 1 failed ($build/tests/test_tables not built)"
    exit 1
fi
exec /usr/bin/python3 tests/xcheck/models_scipy.py "$build" 8
