#!/bin/sh
# Benchmarks of the travel stage (prints figures; never part of 'make check').
# Usage: tools/bench.sh BUILD_DIR
# Synthetic grids of 1M and 10M cells with a road lattice and 200 sites: build time,
# nearest-site pass time, peak memory per cell (getrusage), and 1,000 bounded
# 60-minute walking searches on 2 threads. Targets on 2 cores: 10M nearest-site
# pass <= 40 s, peak <= 600 bytes per cell, 1,000 bounded searches <= 20 s.
# Each size runs in its own process so that its peak memory is its own.
# Then the site stage (bench-site): bounded searches from 2,000 candidates over
# 50,000 populated cells in villages and maximal covering with p = 100 (target:
# proved optimal in <= 60 s), also without merging for comparison (time-limited);
# then the hard case with people on every cell (not expected to prove optimality).
set -u
build=${1:-build}
bin="$build/tools/bench-travel"
if [ ! -x "$bin" ]; then
    echo "bench.sh: $bin is not built (run make)" >&2
    exit 1
fi
echo "# machine: $(nproc) cores, $(awk '/MemTotal/ {printf "%.1f GB", $2/1048576}' /proc/meminfo)"
for cells in 1000000 10000000; do
    echo "## travel, $cells cells"
    "$bin" --cells "$cells" --sites 200 --searches 1000 --limit-min 60 --threads 2 || exit 1
done
echo "## site selection, 50,000 populated cells in villages, 2,000 candidates, p = 100"
"$build/tools/bench-site" --cells 50000 --candidates 2000 --p 100 --limit-min 15 --threads 2 \
    --time-limit 300 --clustered --unmerged || exit 1
echo "## site selection, people on every one of 50,176 cells (hard case), 2,000 candidates, p = 100"
"$build/tools/bench-site" --cells 50000 --candidates 2000 --p 100 --limit-min 10 --threads 2 \
    --time-limit 120 || exit 1
echo "## covering model alone (bench-models: straight-line times), 50,176 points, 2,000 sites, p = 100"
"$build/tools/bench-models" 224 2000 100 900 300 || exit 1
# What-if variants and critical links (tools/bench-whatif.c): 100 variants on a
# 1M-cell grid (time per variant and its ratio to a full rebuild), and the ranking
# of about 10,000 road links (time, links skipped by the tree rule).
wbin="$build/tools/bench-whatif"
if [ -x "$wbin" ]; then
    echo "## what-if"
    "$wbin" --cells 1000000 --variants 100 --link-cells 490000 --threads 2 || exit 1
fi
