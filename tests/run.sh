#!/bin/sh
# Run every test of sitereach and print one closing line "N passed, N failed".
# Usage: tests/run.sh BUILD_DIR [--no-xcheck]
#   Unit tests:   BUILD_DIR/tests/test_*   (each prints "name: N passed, M failed")
#   CLI tests:    tests/cli/*.sh           (each prints the same kind of line)
#   Cross-checks: tests/xcheck/*.sh        (Debian python3 with scipy/networkx)
# Tests run from the repository root; SITEREACH_SHARED points at ../shared data.
set -u
build=${1:?usage: tests/run.sh BUILD_DIR [--no-xcheck]}
no_xcheck=${2:-}
root=$(cd "$(dirname "$0")/.." && pwd)
cd "$root" || exit 1
: "${SITEREACH_SHARED:=$root/../shared}"
export SITEREACH_SHARED
export SITEREACH_BIN="$root/$build/sitereach"
export SITEREACH_BUILD="$root/$build"
log=$(mktemp -d)
trap 'rm -rf "$log"' EXIT

passed=0
failed=0
broken=""

# Add up the "N passed, M failed" line a test printed; a test that crashed or
# printed no such line counts as one failure.
tally() {
    name=$1 status=$2 out=$3
    line=$(grep -E '[0-9]+ passed, [0-9]+ failed' "$out" | tail -n 1)
    if [ -z "$line" ]; then
        failed=$((failed + 1))
        broken="$broken $name(exit $status, no result line)"
        return
    fi
    p=$(echo " $line" | sed -E 's/.*[^0-9]([0-9]+) passed, ([0-9]+) failed.*/\1/')
    f=$(echo " $line" | sed -E 's/.*[^0-9]([0-9]+) passed, ([0-9]+) failed.*/\2/')
    passed=$((passed + p))
    failed=$((failed + f))
    if [ "$status" -ne 0 ] && [ "$f" -eq 0 ]; then
        failed=$((failed + 1))
        broken="$broken $name(exit $status)"
    fi
}

run_one() {
    name=$1
    shift
    out="$log/$name.out"
    "$@" >"$out" 2>&1
    status=$?
    tally "$name" "$status" "$out"
    result=$(grep -E '[0-9]+ passed, [0-9]+ failed' "$out" | tail -n 1)
    printf '%-28s %s\n' "$name" "${result:-CRASHED (exit $status)}"
    if [ "$status" -ne 0 ]; then
        sed 's/^/    /' "$out" | grep -v -E '^ *$' | tail -n 40
    fi
}

for t in "$build"/tests/test_*; do
    [ -x "$t" ] || continue
    run_one "$(basename "$t")" "$t"
done

for t in tests/cli/*.sh; do
    run_one "$(basename "$t" .sh)" sh "$t"
done
# The cross-checks compare numbers with outside tools; the sanitizer run skips
# them (they test the same code as the plain build, only much slower).
if [ "$no_xcheck" != "--no-xcheck" ]; then
    for t in tests/xcheck/*.sh; do
        run_one "$(basename "$t" .sh)" sh "$t"
    done
fi

[ -n "$broken" ] && echo "broken:$broken"
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
