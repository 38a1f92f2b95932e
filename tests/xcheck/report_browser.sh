#!/bin/sh
# Headless Chromium (Debian's) opens report.html of the demo district (reach,
# plan with site selection and supply, compare, links) and of
# real Burundi data (GHS-POP © European Union; OSM © OpenStreetMap
# contributors): the DOM holds the key figures of summary.json, a phone-sized
# screenshot is not blank, and the A4 PDF has the pages the print styles ask
# for. Prints "report_browser: N passed, M failed".
set -u
bin=${SITEREACH_BIN:-build/sitereach}
B=${SITEREACH_SHARED:-../shared}/data/real/burundi
if [ ! -x /usr/bin/chromium ]; then
    ./tools/install-deps.sh --with-browser >/dev/null 2>&1 || true
fi
if [ ! -x /usr/bin/chromium ]; then
    echo "report_browser: skipped: chromium could not be installed (tools/install-deps.sh --with-browser)"
    echo "report_browser: 0 passed, 0 failed"
    exit 0
fi
work=$(mktemp -d /tmp/report_browser.XXXXXX) || exit 1
trap 'rm -rf "$work"' EXIT
fail=0
if [ -f scenarios/demo/scenario.json ]; then
    "$bin" reach scenarios/demo/scenario.json -o "$work/demo" --quiet && "$bin" report "$work/demo" --quiet || fail=1
    # The plan report (reach, site selection, supply) and the what-if reports.
    "$bin" plan scenarios/demo/scenario.json -o "$work/plan" --quiet || fail=1
    "$bin" compare scenarios/demo/scenario.json -o "$work/compare" --quiet && "$bin" report "$work/compare" --quiet || fail=1
    "$bin" links scenarios/demo/scenario.json -o "$work/links" --quiet && "$bin" report "$work/links" --quiet || fail=1
else
    echo "demo not generated (make check generates it)"
    fail=1
fi
cat >"$work/burundi.json" <<JSON
{ "name": "Burundi (real test data)",
  "inputs": { "population": "$B/ghs_pop_burundi_250m_mollweide.tif",
              "roads": { "path": "$B/central_burundi_roads_osm.geojson" } },
  "sites": { "existing": { "path": "$B/burundi_health_facilities_osm2019.geojson",
                           "id_field": "osm_node_id", "name_field": "name" } } }
JSON
"$bin" reach "$work/burundi.json" -o "$work/bdi" --quiet && "$bin" report "$work/bdi" --quiet || fail=1
/usr/bin/python3 tests/xcheck/report_browser.py "$work" "$work/demo" "$work/plan" "$work/compare" "$work/links" "$work/bdi"
rc=$?
[ "$fail" -eq 0 ] && exit $rc
echo "report_browser: 0 passed, 1 failed"
exit 1
