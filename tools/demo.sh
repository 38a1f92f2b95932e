#!/bin/sh
# Run the main job of sitereach on the invented demo district (see docs/demo.md).
# Usage: tools/demo.sh BIN DEMO_DIR OUTDIR
#   BIN       the sitereach executable (make demo passes build/sitereach)
#   DEMO_DIR  folder written by build/tools/gen-demo (holds scenario.json)
#   OUTDIR    folder for the results (created when missing)
# Each step is one 'step' line below; the script stops at the first step that
# fails and exits with that step's status.
set -u

if [ $# -ne 3 ]; then
    echo "usage: tools/demo.sh BIN DEMO_DIR OUTDIR" >&2
    exit 2
fi
bin=$1
demo=$2
out=$3
scenario=$demo/scenario.json

if [ ! -x "$bin" ]; then
    echo "demo: '$bin' is not an executable; run 'make' first" >&2
    exit 2
fi
if [ ! -f "$scenario" ]; then
    echo "demo: no scenario at '$scenario'; run 'make demo' or build/tools/gen-demo --seed 7 --out $demo" >&2
    exit 1
fi
mkdir -p "$out" || { echo "demo: cannot create the output folder '$out'" >&2; exit 1; }

n=0
# step NAME COMMAND...: run one stage, say what ran, stop the demo if it fails.
step() {
    name=$1
    shift
    n=$((n + 1))
    echo "demo: step $n: $name: $*"
    "$@"
    status=$?
    if [ "$status" -ne 0 ]; then
        echo "demo: step $n ($name) failed with exit status $status" >&2
        exit "$status"
    fi
}

step check "$bin" check "$scenario"
step reach "$bin" reach "$scenario" -o "$out/reach"
step report "$bin" report "$out/reach"
step site "$bin" site "$scenario" -o "$out/site"
step compare "$bin" compare "$scenario" -o "$out/compare"
step report-compare "$bin" report "$out/compare"
step links "$bin" links "$scenario" -o "$out/links"
step report-links "$bin" report "$out/links"
# The whole job (docs/plan.md): reach, site selection, stock and shipments, report.
step plan "$bin" plan "$scenario" -o "$out"

if [ -f "$out/report.html" ]; then
    echo "demo: all $n steps done; open the plan report: $out/report.html"
else
    echo "demo: all $n steps done; results in $out"
fi
