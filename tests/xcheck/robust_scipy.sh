#!/bin/sh
# Robust covering (src/models/robust.c, through tools/robust-solve) against
# scipy.optimize.milp (HiGHS) on random instances too large to enumerate.
# Prints "robust_scipy: N passed, M failed".
build=${SITEREACH_BUILD:-build}
if [ ! -x "$build/tools/robust-solve" ]; then
    echo "robust_scipy: $build/tools/robust-solve not built (make tests)"
    echo "robust_scipy: 0 passed, 1 failed"
    exit 1
fi
exec /usr/bin/python3 tests/xcheck/robust_scipy.py "$build"
