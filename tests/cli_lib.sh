# Shared helpers for the command-line tests (sourced by tests/cli/*.sh).
# Each test script sets NAME, calls the checks and ends with `finish`.
: "${SITEREACH_BIN:?run through tests/run.sh}"
BIN=$SITEREACH_BIN
PY=/usr/bin/python3
T_PASS=0
T_FAIL=0
WORK=$(mktemp -d)
trap 'rm -rf "$WORK"' EXIT

ok() { T_PASS=$((T_PASS + 1)); }
bad() { T_FAIL=$((T_FAIL + 1)); echo "FAIL: $*"; }

# run CMD...: runs it, keeping status in $RC, stdout in $WORK/out, stderr in $WORK/err.
run() {
    "$@" >"$WORK/out" 2>"$WORK/err"
    RC=$?
}

# expect_fail CODE TEXT CMD...: exits with CODE, and stderr is ONE line holding TEXT.
expect_fail() {
    code=$1 text=$2
    shift 2
    run "$@"
    if [ "$RC" -ne "$code" ]; then
        bad "$*: exit $RC, expected $code; stderr: $(cat "$WORK/err")"
        return
    fi
    if ! grep -q -F -- "$text" "$WORK/err"; then
        bad "$*: stderr lacks '$text': $(cat "$WORK/err")"
        return
    fi
    if [ "$(wc -l <"$WORK/err")" -ne 1 ]; then
        bad "$*: error is not one line: $(cat "$WORK/err")"
        return
    fi
    ok
}

# expect_ok CMD...: exits 0.
expect_ok() {
    run "$@"
    if [ "$RC" -ne 0 ]; then
        bad "$*: exit $RC; stderr: $(cat "$WORK/err")"
        return
    fi
    ok
}

# expect_out TEXT: the last run's stdout holds TEXT.
expect_out() {
    if grep -q -F -- "$1" "$WORK/out"; then ok; else bad "stdout lacks '$1'"; fi
}

# check_num NAME GOT WANT TOL: |GOT - WANT| <= TOL.
check_num() {
    if awk -v a="$2" -v b="$3" -v t="$4" 'BEGIN { d = a - b; if (d < 0) d = -d; exit !(d <= t) }'; then
        ok
    else
        bad "$1: got $2, expected $3 (tol $4)"
    fi
}

finish() {
    echo "$NAME: $T_PASS passed, $T_FAIL failed"
    [ "$T_FAIL" -eq 0 ]
}
