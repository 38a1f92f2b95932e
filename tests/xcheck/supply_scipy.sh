#!/bin/sh
# Cross-check the shipment model against scipy.optimize.milp (HiGHS) on random
# small instances: same optimal objective. Run from the repository root.
build=${SITEREACH_BUILD:-build}
bin="$build/tests/test_supply"
if [ ! -x "$bin" ]; then
    echo "supply_scipy: $bin is missing; run make tests first"
    echo "supply_scipy: 0 passed, 1 failed"
    exit 1
fi
exec /usr/bin/python3 tests/xcheck/supply_scipy.py "$bin" 40
