#!/bin/sh
# The report command on the demo district and on real Burundi data (GHS-POP ©
# European Union; OSM © OpenStreetMap contributors): report.html parses as XML
# (XHTML-compatible, every text escaped), carries the key figures of
# summary.json, embeds the maps as PNG data URIs of the expected sizes, credits
# the data, and refuses bad folders with one-line errors.
NAME=report
. "$(dirname "$0")/../cli_lib.sh"
B=${SITEREACH_SHARED:?}/data/real/burundi

# check_html DIR LABEL: well-formed, key figures present, images embedded and sized.
check_html() {
    $PY - "$1" <<'PYEOF' && ok || bad "$2: report.html checks failed"
import json, sys, os, struct, base64, re
import xml.etree.ElementTree as ET
d = sys.argv[1]
s = json.load(open(os.path.join(d, "summary.json")))
text = open(os.path.join(d, "report.html"), encoding="utf-8").read()
body = text.split("\n", 1)[1]          # past <!DOCTYPE html>
root = ET.fromstring(body)             # raises on malformed XHTML
ns = {"h": "http://www.w3.org/1999/xhtml"}
alltext = " ".join(root.itertext())
r = s["reach"]
pct = "%.0f%%" % (100 * r["people_within_limit"] / r["people_total"])
assert pct in alltext, pct
beyond = "{:,.0f}".format(r["people_beyond_limit"])
assert beyond in alltext, beyond
assert "people beyond %g min" % r["limit_min"] in alltext
assert s["caution"] in alltext
assert s["name"] in alltext, s["name"]
# key figures come before the first map
assert alltext.index("Key figures") < alltext.index("Travel time to the nearest site")
imgs = root.findall(".//h:img", ns)
assert len(imgs) == 4, len(imgs)
for im in imgs:
    src = im.get("src")
    assert src.startswith("data:image/png;base64,")
    png = base64.b64decode(src.split(",", 1)[1])
    assert png[:8] == b"\x89PNG\r\n\x1a\n"
    w, h = struct.unpack(">II", png[16:24])
    assert (w == 1000 and 500 < h < 1000) or (w == 900 and 100 < h < 6000), (w, h)
    assert im.get("alt")
# no temporary files left behind
left = [f for f in os.listdir(d) + os.listdir(os.path.join(d, "maps")) if f.startswith(".")]
assert not left, left
# print styles and a phone viewport
assert "@media print" in text and "width=device-width" in text
PYEOF
}

if [ -f scenarios/demo/scenario.json ]; then
    expect_ok "$BIN" reach scenarios/demo/scenario.json -o "$WORK/demo" --quiet
    expect_ok "$BIN" report "$WORK/demo"
    expect_out "report written: $WORK/demo/report.html"
    check_html "$WORK/demo" demo
    # Overloaded demo sites are named among the key figures.
    n_over=$($PY -c "import csv; print(sum(1 for r in csv.DictReader(open('$WORK/demo/sites.csv')) if r['load_ratio'] and float(r['load_ratio']) > 1))")
    n_all=$($PY -c "import csv; print(sum(1 for r in csv.DictReader(open('$WORK/demo/sites.csv'))))")
    if grep -q "$n_over of $n_all" "$WORK/demo/report.html"; then ok; else bad "demo: '$n_over of $n_all' sites over capacity missing"; fi
    # sites.csv has the site coordinates in the grid CRS (UTM metres).
    check_num "demo site x column" "$($PY -c "import csv; print(min(float(r['x']) for r in csv.DictReader(open('$WORK/demo/sites.csv'))))")" 4e5 4e5
    expect_ok "$BIN" report "$WORK/demo" --json
    $PY - "$WORK/out" "$WORK/demo" <<'PYEOF' && ok || bad "report --json"
import json, sys, os
j = json.load(open(sys.argv[1]))
assert j["report"] == os.path.join(sys.argv[2], "report.html")
assert len(j["images"]) == 4 and all(os.path.isfile(p) for p in j["images"])
assert j["notes"] == []
PYEOF
    expect_ok "$BIN" report "$WORK/demo" --quiet
    if [ -s "$WORK/out" ]; then bad "report --quiet printed: $(cat "$WORK/out")"; else ok; fi

    # The plan report: site selection and supply sections with their key
    # figures (from summary.json and the CSVs beside it), maps and charts.
    expect_ok "$BIN" plan scenarios/demo/scenario.json -o "$WORK/plan" --quiet
    expect_ok "$BIN" report "$WORK/plan" --json
    $PY - "$WORK/plan" "$WORK/out" <<'PYEOF' && ok || bad "plan: site and supply sections"
import json, sys, os, csv, base64, struct
import xml.etree.ElementTree as ET
d = sys.argv[1]
j = json.load(open(sys.argv[2]))
s = json.load(open(os.path.join(d, "summary.json")))
text = open(os.path.join(d, "report.html"), encoding="utf-8").read()
root = ET.fromstring(text.split("\n", 1)[1])
ns = {"h": "http://www.w3.org/1999/xhtml"}
alltext = " ".join(root.itertext())
site = s["site"]
# people covered before -> after, as shares and as people
for v in (site["before"]["share"], site["after"]["share"]):
    assert "%.0f%%" % (100 * v) in alltext, v
for v in (site["before"]["people_covered"], site["after"]["people_covered"]):
    assert "{:,.0f}".format(v) in alltext, v
# every new site to open is named with its id and name
new = [r for r in csv.DictReader(open(os.path.join(d, site["folder"], "sites.csv"))) if r["status"] == "new"]
assert new
for r in new:
    assert r["id"] + " " + r["name"] in alltext, r["id"]
assert "sites to open" in alltext
assert "gap" in alltext and site["status"] in alltext
# supply: tonnes delivered, trips per depot, shortage reasons, ration caution
sup = s["supply"]
assert "{:,.0f} t".format(sup["totals"]["kg_delivered"] / 1000) in alltext
for dep, v in sup["totals"]["by_depot"].items():
    assert "%s %g trips" % (dep, v["trips"]) in alltext, dep
assert "trips per depot" in alltext
unmet = list(csv.DictReader(open(os.path.join(d, "supply_unmet.csv"))))
assert len(unmet) > 0
for r in unmet:
    assert r["what_to_do"] in alltext
assert sup["caution"] in alltext
assert "Days of cover %g" % sup["assumptions"]["days_of_cover"] in alltext
assert "buffer %.0f%%" % (100 * sup["assumptions"]["buffer"]) in alltext
# stock per site: every site of the stock table appears in the stock table rows
for r in csv.DictReader(open(os.path.join(d, "supply_stock.csv"))):
    assert r["site_id"] in alltext
# images: 4 reach + chosen sites, coverage curve, shipments, stock chart
names = [os.path.basename(p) for p in j["images"]]
for want in ("sites_chosen.png", "coverage_curve.png", "supply_shipments.png", "stock_by_site.png"):
    assert want in names, names
imgs = root.findall(".//h:img", ns)
assert len(imgs) == 8, len(imgs)
for im in imgs:
    png = base64.b64decode(im.get("src").split(",", 1)[1])
    assert png[:8] == b"\x89PNG\r\n\x1a\n"
assert j["notes"] == [], j["notes"]
# section order: key figures, reach, chosen sites, supply, assumptions
assert alltext.index("Key figures") < alltext.index("Chosen sites") < alltext.index("Supply: shipments") < alltext.index("Assumptions")
PYEOF

    # What-if reports on the compare and links folders (those commands do not
    # write a report themselves): variants ranked with their minutes maps, the
    # critical roads with their top-10 table.
    expect_ok "$BIN" compare scenarios/demo/scenario.json -o "$WORK/cmp" --quiet
    expect_ok "$BIN" report "$WORK/cmp" --json
    $PY - "$WORK/cmp" "$WORK/out" <<'PYEOF' && ok || bad "compare report"
import json, sys, os, csv
import xml.etree.ElementTree as ET
d = sys.argv[1]
j = json.load(open(sys.argv[2]))
s = json.load(open(os.path.join(d, "summary.json")))
text = open(os.path.join(d, "report.html"), encoding="utf-8").read()
alltext = " ".join(ET.fromstring(text.split("\n", 1)[1]).itertext())
vs = s["compare"]["variants"]
worst = max(vs, key=lambda v: v["pushed_beyond_limit"])
assert "{:,.0f}".format(worst["pushed_beyond_limit"]) in alltext
assert "variant '%s'" % worst["name"] in alltext
for v in vs:
    assert "Variant '%s': minutes to the nearest site" % v["name"] in alltext, v["name"]
rows = list(csv.DictReader(open(os.path.join(d, "compare.csv"))))
assert "Ranking" in alltext
names = [os.path.basename(p) for p in j["images"]]
assert names == ["variant_%d.png" % (i + 1) for i in range(len(vs))] + ["variants_pushed.png"], names
assert text.count("data:image/png;base64,") == len(vs) + 1
assert j["notes"] == [], j["notes"]
assert len(rows) == len(vs)
PYEOF
    expect_ok "$BIN" links scenarios/demo/scenario.json -o "$WORK/lnk" --quiet
    expect_ok "$BIN" report "$WORK/lnk" --json
    $PY - "$WORK/lnk" "$WORK/out" <<'PYEOF' && ok || bad "links report"
import json, sys, os
import xml.etree.ElementTree as ET
d = sys.argv[1]
j = json.load(open(sys.argv[2]))
s = json.load(open(os.path.join(d, "summary.json")))
text = open(os.path.join(d, "report.html"), encoding="utf-8").read()
alltext = " ".join(ET.fromstring(text.split("\n", 1)[1]).itertext())
top = s["links"]["top"]
assert len(top) == 10
for t in top:
    assert t["road_id"] in alltext, t["road_id"]
assert "{:,.0f}".format(top[0]["pushed_beyond_limit"]) in alltext
assert "The ten most critical roads" in alltext
assert [os.path.basename(p) for p in j["images"]] == ["critical_roads.png"]
assert j["notes"] == [], j["notes"]
PYEOF

    # Refusals of the new sections: tables from an older version, an empty
    # compare part; a missing depot layer is noted and the map drawn without it.
    cp -r "$WORK/plan" "$WORK/plan2"
    cut -d, -f1-3 "$WORK/plan/site/sites.csv" >"$WORK/plan2/site/sites.csv"
    expect_fail 1 "lacks the columns id, status, people_served" "$BIN" report "$WORK/plan2"
    cp "$WORK/plan/site/sites.csv" "$WORK/plan2/site/sites.csv"
    cut -d, -f1-3 "$WORK/plan/supply_shipments.csv" >"$WORK/plan2/supply_shipments.csv"
    expect_fail 1 "supply_shipments.csv' lacks a column the report needs (depot_id, site_id, trips)" "$BIN" report "$WORK/plan2"
    rm "$WORK/plan2/supply_unmet.csv"
    cp "$WORK/plan/supply_shipments.csv" "$WORK/plan2/supply_shipments.csv"
    expect_fail 1 "supply_unmet.csv" "$BIN" report "$WORK/plan2"
    cp -r "$WORK/cmp" "$WORK/cmp2"
    $PY - "$WORK/cmp2/summary.json" <<'PYEOF'
import json, sys
p = sys.argv[1]
s = json.load(open(p))
s["compare"]["variants"] = []
json.dump(s, open(p, "w"))
PYEOF
    expect_fail 1 "the compare part lacks variants or limit_min" "$BIN" report "$WORK/cmp2"
    cp -r "$WORK/plan" "$WORK/plan3"
    $PY - "$WORK/plan3/summary.json" <<'PYEOF'
import json, sys
p = sys.argv[1]
s = json.load(open(p))
s["scenario"] = "/nonexistent/scenario.json"
for i in s["inputs"]:
    if i["role"] == "scenario":
        i["path"] = "/nonexistent/scenario.json"
json.dump(s, open(p, "w"))
PYEOF
    expect_ok "$BIN" report "$WORK/plan3"
    expect_out "site and depot positions left off the maps"

    # A road layer that has gone missing is left off the maps and noted, not fatal;
    # sites.csv from before the x, y columns is refused with advice.
    cp -r "$WORK/demo" "$WORK/moved"
    $PY - "$WORK/moved/summary.json" <<'PYEOF'
import json, sys
p = sys.argv[1]
s = json.load(open(p))
for i in s["inputs"]:
    if i["role"] == "roads":
        i["path"] = "/nonexistent/roads.gpkg"
json.dump(s, open(p, "w"))
PYEOF
    expect_ok "$BIN" report "$WORK/moved"
    expect_out "note: roads left off the maps"
    expect_out "/nonexistent/roads.gpkg"
    if grep -q "roads left off the maps" "$WORK/moved/report.html"; then ok; else bad "note missing from report.html"; fi
    cut -d, -f1-11 "$WORK/demo/sites.csv" >"$WORK/moved/sites.csv"
    expect_fail 1 "lacks the columns id, people, x, y" "$BIN" report "$WORK/moved"
    if [ -f "$WORK/moved/report.html" ] && grep -q "roads left off" "$WORK/moved/report.html"; then ok
    else bad "a failed report replaced the earlier report.html"; fi

    # Text from the data is escaped: a scenario name with markup characters.
    cp -r scenarios/demo "$WORK/esc"
    $PY - "$WORK/esc/scenario.json" <<'PYEOF'
import json, sys
p = sys.argv[1]
s = json.load(open(p))
s["name"] = "Ward <A> & 'B' \"C\""
json.dump(s, open(p, "w"))
PYEOF
    expect_ok "$BIN" reach "$WORK/esc/scenario.json" -o "$WORK/esc/out" --quiet
    expect_ok "$BIN" report "$WORK/esc/out" --quiet
    check_html "$WORK/esc/out" escaped
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
expect_ok "$BIN" report "$WORK/bdi" --quiet
check_html "$WORK/bdi" burundi
if grep -q "GHS-POP © European Union; © OpenStreetMap contributors" "$WORK/bdi/report.html"; then ok
else bad "burundi: data credits missing"; fi

# Refusals: one line, the right exit status, the folder named.
expect_fail 1 "$WORK/none/summary.json" "$BIN" report "$WORK/none"
expect_fail 2 "no OUTDIR given" "$BIN" report
expect_fail 2 "unknown option '--bogus'" "$BIN" report "$WORK/demo" --bogus
mkdir -p "$WORK/chk"
echo '{"command": "check"}' >"$WORK/chk/summary.json"
expect_fail 1 "no results to report" "$BIN" report "$WORK/chk"
expect_ok "$BIN" report --help
expect_out "usage: sitereach report OUTDIR"

# make install puts the man page and the bash completion in place.
# (-o: install the binary under test as it is, never rebuild it with other flags)
bd=${SITEREACH_BUILD:-build}
expect_ok make -s -o "$bd/sitereach" install BUILD="$bd" PREFIX="$WORK/prefix"
for f in bin/sitereach share/man/man1/sitereach.1 share/bash-completion/completions/sitereach; do
    if [ -f "$WORK/prefix/$f" ]; then ok; else bad "make install did not install $f"; fi
done
# The man page renders without warnings where a formatter is present.
if command -v groff >/dev/null 2>&1; then
    run groff -man -Tutf8 -ww -z docs/sitereach.1
    if [ "$RC" -eq 0 ] && [ ! -s "$WORK/err" ]; then ok; else bad "groff: $(cat "$WORK/err")"; fi
elif command -v mandoc >/dev/null 2>&1; then
    expect_ok mandoc -T lint -W warning docs/sitereach.1
fi
# Completion: commands, per-command options, scenario files.
touch "$WORK/a.json" "$WORK/b.txt"
comp() {   # comp WORD... : the completions of the last word
    bash -c '. tools/sitereach.bash; COMP_WORDS=("$@"); COMP_CWORD=$(($# - 1)); _sitereach; echo "${COMPREPLY[*]}"' x "$@"
}
case " $(comp sitereach re) " in *" reach report "*) ok ;; *) bad "completion of 're': $(comp sitereach re)" ;; esac
case " $(comp sitereach reach x.json --th) " in *" --threads "*) ok ;; *) bad "completion of --th" ;; esac
case " $(comp sitereach check "$WORK/") " in *"a.json"*) case " $(comp sitereach check "$WORK/") " in *"b.txt"*) bad "completion offers b.txt" ;; *) ok ;; esac ;; *) bad "completion lacks a.json" ;; esac
# A raster the maps need is missing: one line saying what to do, exit 1.
if [ -d "$WORK/demo" ]; then
    cp -r "$WORK/demo" "$WORK/demo_broken" && rm "$WORK/demo_broken/travel_time.tif"
    expect_fail 1 "run the command that writes it" "$BIN" report "$WORK/demo_broken"
fi
finish
