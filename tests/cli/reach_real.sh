#!/bin/sh
# Conservation of people through the reach stage on the demo district and on the
# real Burundi data (GHS-POP © European Union / JRC; OSM © OpenStreetMap
# contributors, ODbL 1.0): people summed over bands + unreachable equal the grid
# total to 1e-9 relative, overall and summed over districts.
NAME=reach_real
. "$(dirname "$0")/../cli_lib.sh"
B=${SITEREACH_SHARED:?}/data/real/burundi

conserved() {   # conserved LABEL SUMMARY
    $PY - "$2" <<'PYEOF' && ok || bad "$1: people not conserved"
import json, sys
d = json.load(open(sys.argv[1]))
r = d["reach"]
total = d["grid"]["people"]
assert abs(r["people_total"] - total) <= 1e-9 * total
s = sum(b["people"] for b in r["bands"]["all"])
assert abs(s - total) <= 1e-9 * total, (s, total)
if "districts" in r["bands"]:
    s = sum(b["people"] for rows in r["bands"]["districts"].values() for b in rows)
    assert abs(s - total) <= 1e-9 * total, (s, total)
w = r["people_within_limit"] + r["people_beyond_limit"]
assert abs(w - total) <= 1e-9 * total
PYEOF
}

if [ -f scenarios/demo/scenario.json ]; then
    expect_ok "$BIN" reach scenarios/demo/scenario.json -o "$WORK/demo" --quiet
    conserved demo "$WORK/demo/summary.json"
    # The demo's four wards cover the district: nobody falls outside them.
    check_num "demo outside wards" "$($PY -c "import json; d=json.load(open('$WORK/demo/summary.json')); print(sum(b['people'] for b in d['reach']['bands']['districts']['(outside districts)']))")" 0 0
else
    bad "demo not generated (run make check, which generates it)"
fi

cat >"$WORK/burundi.json" <<JSON
{ "name": "Burundi (real test data)",
  "inputs": { "population": "$B/ghs_pop_burundi_250m_mollweide.tif",
              "roads": { "path": "$B/central_burundi_roads_osm.geojson" } },
  "sites": { "existing": { "path": "$B/burundi_health_facilities_osm2019.geojson",
                           "id_field": "osm_node_id", "name_field": "name" } } }
JSON
expect_ok "$BIN" reach "$WORK/burundi.json" -o "$WORK/bdi" --quiet
conserved burundi "$WORK/bdi/summary.json"
# Mollweide stretches distances here by about 11% (see the grid module): warned.
if grep -q "distorts distances" "$WORK/bdi/summary.json"; then ok; else bad "no Mollweide warning"; fi
finish
