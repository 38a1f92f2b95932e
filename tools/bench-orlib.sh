#!/bin/sh
# OR-Library benchmark: all 40 p-median instances (edge list -> igraph shortest
# paths -> p-median MIP) and the 37 capacitated instances cap41..cap134, then
# the large capa/capb/capc sets (12 problems). Prints objective, published
# optimum, difference and time per instance. Never part of 'make check'.
# Usage: tools/bench-orlib.sh BUILD_DIR [pmed|cap|capabc|all]
set -u
build=${1:-build}
which=${2:-all}
root=$(cd "$(dirname "$0")/.." && pwd)
cd "$root" || exit 1
: "${SITEREACH_SHARED:=$root/../shared}"
export SITEREACH_SHARED
bin="$build/tests/test_orlib"
[ -x "$bin" ] || { echo "bench-orlib: $bin not built (make tests)" >&2; exit 1; }

now() { date +%s.%N; }
status=0
if [ "$which" = pmed ] || [ "$which" = all ]; then
    echo "== p-median pmed1..pmed40 (published optimum: OR-Library pmedopt, Beasley 1985)"
    t0=$(now)
    "$bin" pmed 1 40 || status=1
    echo "pmed total: $(echo "$(now) - $t0" | bc) s"
fi
if [ "$which" = cap ] || [ "$which" = all ]; then
    echo "== capacitated cap41..cap134, split demand (published optimum: OR-Library capopt, Beasley 1988)"
    "$bin" cap || status=1
fi
if [ "$which" = capabc ] || [ "$which" = all ]; then
    echo "== capa/capb/capc (100 x 1000), split demand; 10 min limit per problem"
    "$bin" capabc 0 11 || status=1
fi
exit $status
