#!/bin/sh
# Install the Debian packages sitereach needs, only those that are missing.
# Idempotent: a second run installs nothing and exits 0.
# Usage: tools/install-deps.sh [--with-browser]
#   --with-browser  also install Chromium (used by the report's browser test).
set -eu

# Build and run-time libraries (headers + pkg-config files), and the font the
# maps and charts are drawn with.
BUILD="pkg-config make gcc libglpk-dev libgdal-dev libigraph-dev libcjson-dev \
libproj-dev libcairo2-dev libfontconfig-dev libssl-dev fonts-dejavu-core"
# Tools used by the tests and cross-checks: GDAL command-line programs,
# Debian's Python with scipy (HiGHS), networkx, pyproj and GDAL bindings.
TEST="gdal-bin python3 python3-scipy python3-networkx python3-pyproj python3-gdal"
BROWSER="chromium"

want="$BUILD $TEST"
if [ "${1:-}" = "--with-browser" ]; then
    want="$want $BROWSER"
fi

missing=""
for p in $want; do
    if ! dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed"; then
        missing="$missing $p"
    fi
done

if [ -z "$missing" ]; then
    echo "install-deps: all packages present"
    exit 0
fi

echo "install-deps: installing:$missing"
SUDO=""
if [ "$(id -u)" != "0" ]; then
    SUDO="sudo"
fi
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -qq
# shellcheck disable=SC2086
$SUDO apt-get install -y -qq --no-install-recommends $missing >/dev/null
echo "install-deps: done"
