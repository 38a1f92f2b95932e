#!/bin/sh
# Cross-check the grid module against GDAL's own tools and pyproj: the Burundi
# population total against gdalinfo -stats and numpy, the Mollweide distortion
# figure, geographic cell sizes on three ellipsoids, and warped layers against the
# gdalwarp command. Run from the repository root (tests/run.sh does).
: "${SITEREACH_BUILD:=build}"
: "${SITEREACH_SHARED:=../shared}"
export SITEREACH_BUILD SITEREACH_SHARED
if [ ! -x "$SITEREACH_BUILD/tests/test_grid" ]; then
    echo "grid_burundi: $SITEREACH_BUILD/tests/test_grid is missing; run make tests"
    echo "grid_burundi: 0 passed, 1 failed"
    exit 1
fi
exec /usr/bin/python3 tests/xcheck/grid_burundi.py
