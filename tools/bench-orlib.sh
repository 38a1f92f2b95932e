#!/bin/sh
# OR-Library benchmark: all 40 p-median instances (edge list -> igraph shortest
# paths -> p-median MIP) and the 37 capacitated instances cap41..cap134, then
# the large capa/capb/capc sets (12 problems). Prints objective, published
# optimum, difference and time per instance. Never part of 'make check'.
# Usage: tools/bench-orlib.sh BUILD_DIR [pmed|cap|capabc|all]   (CAPABC_LIMIT=seconds)
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
    # 120 s per instance: the few small-p instances with a wide LP gap stop there
    # and print their bound ("lim").
    "$bin" pmed 1 40 1 1 120 || status=1
    echo "pmed total: $(echo "$(now) $t0" | awk '{printf "%.1f", $1 - $2}') s"
fi
if [ "$which" = cap ] || [ "$which" = all ]; then
    echo "== capacitated cap41..cap134, split demand (published optimum: OR-Library capopt, Beasley 1988)"
    "$bin" cap || status=1
fi
if [ "$which" = capabc ] || [ "$which" = all ]; then
    limit=${CAPABC_LIMIT:-300}
    echo "== capa/capb/capc (100 x 1000), split demand; $limit s limit per problem"
    "$bin" capabc 0 11 "$limit" || status=1
fi
exit $status
