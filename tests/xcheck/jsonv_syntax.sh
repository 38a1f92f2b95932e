#!/bin/sh
# jsonv's syntax error positions against python3's json module (see jsonv_syntax.py).
# Run from the repository root by tests/run.sh; needs $SITEREACH_BUILD/tests/test_jsonv.
: "${SITEREACH_BUILD:=build}"
export SITEREACH_BUILD
exec /usr/bin/python3 tests/xcheck/jsonv_syntax.py
