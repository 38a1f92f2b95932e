#!/bin/sh
# sitereach site with siting.robust on hand-made inputs (tests/cli/robust_fixtures.py):
# a town and a village on two banks of a river joined by one bridge; figures
# worked on paper in the fixtures' docstring. Bad input: unknown variant in the
# weights, a negative weight, robust without variants, p above the candidates.
NAME=robust
. "$(dirname "$0")/../cli_lib.sh"
$PY tests/cli/robust_fixtures.py "$WORK/fx" || { bad "fixtures"; finish; exit 1; }
F=$WORK/fx

# Worst case: the base-only plan is M (700 in the base, 300 in either variant);
# the robust plan is E (400 in every scenario).
O=$WORK/worst
expect_ok "$BIN" site "$F/worst.json" -o "$O"
expect_out "robust siting (worst case over base + 2 variants): optimal"
expect_out "robust plan: E"
for f in robust.csv robust_sites.csv sites.csv summary.json; do
    if [ -s "$O/$f" ]; then ok; else bad "missing output $f"; fi
done
r() { $PY -c "import json; d=json.load(open('$1/summary.json'))['site']; rb=d['robust']; s={x['name']: x for x in rb['scenarios']}; print($2)"; }
check_num "worst objective" "$(r "$O" 'rb["objective"]')" 400 1e-9
check_num "worst bound" "$(r "$O" 'rb["bound"]')" 400 1e-9
check_num "worst base-plan objective" "$(r "$O" 'rb["objective_base_plan"]')" 300 1e-9
check_num "base plan base" "$(r "$O" 's["base"]["people_covered_base_plan"]')" 700 1e-9
check_num "base plan bridge" "$(r "$O" 's["bridge down"]["people_covered_base_plan"]')" 300 1e-9
check_num "base plan rain" "$(r "$O" 's["rainy season"]["people_covered_base_plan"]')" 300 1e-9
check_num "robust base" "$(r "$O" 's["base"]["people_covered_robust"]')" 400 1e-9
check_num "robust bridge" "$(r "$O" 's["bridge down"]["people_covered_robust"]')" 400 1e-9
if [ "$(r "$O" '",".join(rb["open_sites"])')" = "E" ]; then ok; else bad "robust open sites"; fi
if [ "$(r "$O" '",".join(d["open_sites"])')" = "M" ]; then ok; else bad "base-only open sites"; fi
if [ "$(r "$O" 'rb["objective_kind"]')" = "worst" ]; then ok; else bad "objective kind"; fi
# robust.csv: one row per scenario, base first; the robust_sites.csv row is E, new.
if [ "$(sed -n 3p "$O/robust.csv")" = "bridge down,1,0,400,0.5714285714,300,0.4285714286,100" ]; then
    ok; else bad "robust.csv row: $(sed -n 3p "$O/robust.csv")"; fi
if [ "$(wc -l <"$O/robust.csv")" -eq 4 ]; then ok; else bad "robust.csv rows"; fi
if grep -q '^E,,new,' "$O/robust_sites.csv"; then ok; else bad "robust_sites.csv: $(cat "$O/robust_sites.csv")"; fi

# Expected, variants weighing 0.1: M 700 + 30 + 30 = 760 beats E 480.
O=$WORK/expected
expect_ok "$BIN" site "$F/expected.json" -o "$O"
expect_out "robust plan: M"
check_num "expected objective" "$(r "$O" 'rb["objective"]')" 760 1e-9
check_num "expected weight" "$(r "$O" 's["bridge down"]["weight"]')" 0.1 1e-12

# An existing post kept open, and a variant that closes it: E again (worst 400),
# and in "post closed" the robust plan covers only the village.
O=$WORK/closure
expect_ok "$BIN" site "$F/closure.json" -o "$O" --json
check_num "closure objective" "$(r "$O" 'rb["objective"]')" 400 1e-9
check_num "closure post closed" "$(r "$O" 's["post closed"]["people_covered_robust"]')" 400 1e-9
check_num "closure sites closed" "$(r "$O" 's["post closed"]["sites_closed"]')" 1 0
check_num "closure bridge" "$(r "$O" 's["bridge down"]["people_covered_robust"]')" 700 1e-9
if [ "$(r "$O" '",".join(rb["open_sites"])')" = "E,S1" ] || \
   [ "$(r "$O" '",".join(sorted(rb["open_sites"]))')" = "E,S1" ]; then ok; else bad "closure open sites"; fi

expect_fail 1 "key 'siting.robust.weights.bridge' names no variant" \
    "$BIN" site "$F/unknown_weight.json" -o "$WORK/x1"
expect_fail 1 "siting.robust.weights[\"bridge down\"]" \
    "$BIN" site "$F/negative_weight.json" -o "$WORK/x2"
expect_fail 1 "has no 'variants' section" "$BIN" site "$F/no_variants.json" -o "$WORK/x3"
expect_fail 1 "p = 3 is larger than the 2 candidate sites" "$BIN" site "$F/p_too_big.json" -o "$WORK/x4"
finish
