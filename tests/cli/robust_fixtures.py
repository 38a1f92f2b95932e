"""Hand-made inputs for the robust siting command-line test (/usr/bin/python3).

Writes into argv[1] a 20 x 5 grid of 100 m cells in UTM zone 36S with a river
(barrier) in column 10 and people in two cells only: the town T in cell (3,2)
with 300 people and the village V in cell (16,2) with 400. Roads along row 2:
R1 from cell 1 to cell 9 (paved), the bridge R2 from cell 9 to cell 11, R3 from
cell 11 to cell 19 (unpaved track). Walking 2.5 km/h off the road, 5 km/h on it
(1.2 min per 100 m); the limit is 12 min. Candidates: M in (9,2) at the bridge,
E in (16,2) in the village. Worked on paper (p = 1):
  M reaches T in 6 x 1.2 = 7.2 min and V over the bridge in 2.4 + 5 x 1.2 =
  8.4 min: 700 people in the base. E reaches V (0 min) but T only in 15.6 min:
  400. The base-only plan is M.
  "bridge down" (R2 closed): M covers T only (300), E still 400.
  "rainy season" (unpaved at half speed): M reaches V in 2.4 + 5 x 2.4 = 14.4
  min > 12, so 300; E still 400.
  Worst case: M min(700, 300, 300) = 300 < E min(400, 400, 400) = 400: the
  robust plan is E, the site that keeps its cover when the bridge is cut.
  Expected with base weight 1 and variant weights 0.1: M 700 + 30 + 30 = 760 >
  E 400 + 40 + 40 = 480: M.
closure.json adds an existing post S1 in (3,2) (kept open) and a variant that
closes it: S1 covers T (300) except in "post closed". M: base 700, bridge down
300, post closed 700 -> worst 300; E: base 700, bridge down 700, post closed 400
-> worst 400: E again, and its "post closed" row counts 400 with 1 site closed.
"""

import os
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import fxgrid  # noqa: E402
from fxgrid import CELL, NX, NY, X0, Y0, centre, line, point, srs  # noqa: E402,F401
from osgeo import gdal, ogr, osr  # noqa: E402,F401

D = sys.argv[1]
os.makedirs(D, exist_ok=True)


def raster(name, values, dtype=gdal.GDT_Float32):
    fxgrid.raster(D, name, values, dtype)


def layer(name, gtype, feats, fields, epsg=32736):
    fxgrid.layer(D, name, gtype, feats, fields, epsg)


pop = [0.0] * (NX * NY)
pop[2 * NX + 3] = 300.0
pop[2 * NX + 16] = 400.0
raster("pop.tif", pop)
raster("barriers.tif", [1 if c % NX == 10 else 0 for c in range(NX * NY)], gdal.GDT_Byte)
layer("roads.geojson", ogr.wkbLineString, [
    (line(1, 9), {"id": "R1", "highway": "primary", "bridge": "no", "surface": "paved"}),
    (line(9, 11), {"id": "R2", "highway": "primary", "bridge": "yes", "surface": "paved"}),
    (line(11, 19), {"id": "R3", "highway": "track", "bridge": "no", "surface": "unpaved"}),
], ("id", "highway", "bridge", "surface"))
layer("candidates.geojson", ogr.wkbPoint, [(point(9, 2), {"id": "M"}), (point(16, 2), {"id": "E"})],
      ("id",))
layer("sites.geojson", ogr.wkbPoint, [(point(3, 2), {"id": "S1"})], ("id",))

base = {
    "inputs": {"population": "pop.tif", "barriers": "barriers.tif",
               "roads": {"path": "roads.geojson", "id_field": "id", "class_field": "highway",
                         "bridge_field": "bridge"}},
    "sites": {"candidates": {"path": "candidates.geojson", "id_field": "id"}},
    "travel": {"mode": "walk", "walk": {"speed_kmh": 2.5, "slope": False},
               "road_speeds": {"primary": {"walk_kmh": 5, "vehicle_kmh": 50},
                               "track": {"walk_kmh": 5, "vehicle_kmh": 20}}},
    "coverage": {"limit_min": 12},
    "siting": {"model": "max_cover", "p": 1, "curve_max_p": 0, "robust": {}},
    "variants": [
        {"name": "bridge down", "close_roads": {"ids": ["R2"]}},
        {"name": "rainy season", "road_speed_factors": {"surface": {"unpaved": 0.5}}},
    ],
}


def write(name, changes):
    fxgrid.write(D, base, name, changes)


siting = base["siting"]
write("worst.json", {})
write("expected.json", {"siting": dict(siting, robust={
    "objective": "expected", "base_weight": 1,
    "weights": {"bridge down": 0.1, "rainy season": 0.1}})})
write("closure.json", {
    "sites": {"existing": {"path": "sites.geojson", "id_field": "id"},
              "candidates": {"path": "candidates.geojson", "id_field": "id"}},
    "variants": [{"name": "bridge down", "close_roads": {"ids": ["R2"]}},
                 {"name": "post closed", "close_sites": ["S1"]}]})
write("unknown_weight.json", {"siting": dict(siting, robust={
    "objective": "expected", "weights": {"bridge": 1}})})
write("negative_weight.json", {"siting": dict(siting, robust={
    "objective": "expected", "weights": {"bridge down": -1}})})
write("no_variants.json", {"variants": None})
write("p_too_big.json", {"siting": dict(siting, p=3)})
