#!/bin/sh
# sitereach check on real open data (../shared/data/real; see its README for sources):
#  - Burundi: GHS-POP 250 m (© European Union / JRC), OSM roads and health
#    facilities (© OpenStreetMap contributors, ODbL 1.0).
#  - Liechtenstein: OSM extract of 2013-08-03 (© OpenStreetMap contributors, ODbL 1.0).
# Expected figures are the counts the data README states (taken there with
# gdalinfo / ogrinfo), so this checks our reading against GDAL's own tools.
NAME=check_real
. "$(dirname "$0")/../cli_lib.sh"
S=${SITEREACH_SHARED:?}/data/real

# Burundi: GHS-POP grid, OSM roads, OSM health facilities as existing sites.
B=$S/burundi
cat >"$WORK/burundi.json" <<JSON
{ "name": "Burundi (real test data)",
  "inputs": { "population": "$B/ghs_pop_burundi_250m_mollweide.tif",
              "roads": { "path": "$B/central_burundi_roads_osm.geojson", "class_field": "highway" } },
  "sites": { "existing": { "path": "$B/burundi_health_facilities_osm2019.geojson",
                           "id_field": "osm_node_id", "name_field": "name" } },
  "travel": { "mode": "walk", "walk": { "speed_kmh": 5.0, "slope": false } },
  "coverage": { "limit_min": 60, "bands_min": [30, 60, 120] } }
JSON
expect_ok "$BIN" check "$WORK/burundi.json" --json
J=$WORK/out
v() { $PY -c "import json,sys; d=json.load(open('$J')); print($1)" 2>/dev/null; }
check_num "Burundi columns" "$(v 'd["grid"]["columns"]')" 740 0
check_num "Burundi rows" "$(v 'd["grid"]["rows"]')" 1068 0
check_num "Burundi populated cells" "$(v 'd["grid"]["populated_cells"]')" 31316 0
# README: sum 11,131,282 (rounded); the exact GDAL comparison is in xcheck/grid_burundi.
check_num "Burundi people" "$(v 'round(d["grid"]["people"])')" 11131282 1
check_num "Burundi cell width" "$(v 'd["grid"]["cell_width_min_m"]')" 249.93 0.01
check_num "Burundi road features" "$(v 'd["roads"]["features"]')" 1497 0
check_num "Burundi road km" "$(v 'd["roads"]["length_km"]')" 1823 1
for pair in unclassified:733 path:183 tertiary:180 secondary:130 residential:125 \
            track:121 primary:18 service:7; do
    cls=${pair%%:*} n=${pair##*:}
    check_num "Burundi $cls" "$(v "[c['features'] for c in d['roads']['classes'] if c['class']=='$cls'][0]")" "$n" 0
done
check_num "Burundi facilities" "$(v '[p["count"] for p in d["points"] if p["layer"]=="existing sites"][0]')" 1361 0

# Liechtenstein has no population raster (see its README): a zero-people
# placeholder grid of 0.001 degree cells over the extract lets us check roads.
$PY - "$WORK/li_pop.tif" <<'PYEOF'
import sys
from osgeo import gdal, osr
gdal.UseExceptions()
nx, ny = 200, 260
ds = gdal.GetDriverByName("GTiff").Create(sys.argv[1], nx, ny, 1, gdal.GDT_Float32)
ds.SetGeoTransform((9.46, 0.001, 0, 47.28, 0, -0.001))
s = osr.SpatialReference(); s.ImportFromEPSG(4326)
ds.SetProjection(s.ExportToWkt())
ds.GetRasterBand(1).Fill(0)
ds = None
PYEOF
cat >"$WORK/li.json" <<JSON
{ "name": "Liechtenstein roads (placeholder population)",
  "inputs": { "population": "li_pop.tif",
              "roads": { "path": "$S/liechtenstein/liechtenstein-2013-08-03.osm.pbf" } } }
JSON
expect_ok "$BIN" check "$WORK/li.json" --json
check_num "Liechtenstein highway features" "$(v 'd["roads"]["features"]')" 2751 0
for pair in residential:841 track:597 service:352 footway:249 path:171 unclassified:164 \
            cycleway:96 secondary:90 primary:81 steps:34 tertiary:33; do
    cls=${pair%%:*} n=${pair##*:}
    check_num "Liechtenstein $cls" "$(v "[c['features'] for c in d['roads']['classes'] if c['class']=='$cls'][0]")" "$n" 0
done
# README: about 967 km; the 0.5% geodesic check is in xcheck/roads_liechtenstein.
check_num "Liechtenstein km" "$(v 'd["roads"]["length_km"]')" 967 5
check_num "Liechtenstein cell width at 47N (m)" "$(v 'round(d["grid"]["cell_width_min_m"])')" 76 1
expect_ok "$BIN" check "$WORK/li.json"
expect_out "holds no people"
finish
