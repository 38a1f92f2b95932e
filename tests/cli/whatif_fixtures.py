"""Hand-made inputs for the compare and links command-line tests (/usr/bin/python3).

Writes into argv[1] a 20 x 5 grid of 100 m cells in UTM zone 36S with 10 people
per cell, a river (barrier) in column 10 with no people, and three roads along
row 2: R1 from cell 1 to cell 9 (primary, paved), the bridge R2 from cell 9 to
cell 11, and R3 from cell 11 to cell 19 (track, unpaved). The one site S1 is in
cell (1,2); a candidate C1 in cell (18,2). Walking is 2.5 km/h off the road and
5 km/h on it; the limit is 30 min. A flood extent covers columns 14-16 in every
row and is stored in lon/lat (EPSG:4326) so it must be reprojected.
Worked on paper: 950 people; the bridge carries everyone east of the river (9 x 5
cells = 450 people, all within 30 min in the base: at most 12 min to the bridge
end, 9.6 min along R3 and 4.8 min off the road); the flood makes 15 cells (150
people) impassable and cuts the 15 cells east of it off as well (300 in all).
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


raster("pop.tif", [0.0 if c % NX == 10 else 10.0 for c in range(NX * NY)])
raster("barriers.tif", [1 if c % NX == 10 else 0 for c in range(NX * NY)], gdal.GDT_Byte)
F = ("id", "highway", "bridge", "surface")
layer("roads.geojson", ogr.wkbLineString, [
    (line(1, 9), {"id": "R1", "highway": "primary", "bridge": "no", "surface": "paved"}),
    (line(9, 11), {"id": "R2", "highway": "primary", "bridge": "yes", "surface": "paved"}),
    (line(11, 19), {"id": "R3", "highway": "track", "bridge": "no", "surface": "unpaved"}),
], F)
layer("sites.geojson", ogr.wkbPoint, [(point(1, 2), {"id": "S1", "capacity": "2000"})],
      ("id", "capacity"))
layer("candidates.geojson", ogr.wkbPoint, [(point(18, 2), {"id": "C1", "capacity": "500"})],
      ("id", "capacity"))
# Flood: columns 14-16 (x from X0+1400 to X0+1700) with 10 m to spare inside,
# rows beyond the grid; built in UTM, stored in lon/lat.
ring = ogr.Geometry(ogr.wkbLinearRing)
for x, y in ((1410, 100), (1690, 100), (1690, -600), (1410, -600), (1410, 100)):
    ring.AddPoint_2D(X0 + x, Y0 + y)
poly = ogr.Geometry(ogr.wkbPolygon)
poly.AddGeometry(ring)
poly.Transform(osr.CoordinateTransformation(srs(32736), srs(4326)))
layer("flood.geojson", ogr.wkbPolygon, [(poly, {"name": "flood"})], ("name",), epsg=4326)

base = {
    "inputs": {"population": "pop.tif", "barriers": "barriers.tif",
               "roads": {"path": "roads.geojson", "id_field": "id", "class_field": "highway",
                         "bridge_field": "bridge"}},
    "sites": {"existing": {"path": "sites.geojson", "id_field": "id",
                           "capacity_field": "capacity"},
              "candidates": {"path": "candidates.geojson", "id_field": "id",
                             "capacity_field": "capacity"}},
    "travel": {"mode": "walk", "walk": {"speed_kmh": 2.5, "slope": False},
               "road_speeds": {"primary": {"walk_kmh": 5, "vehicle_kmh": 50},
                               "track": {"walk_kmh": 5, "vehicle_kmh": 20}}},
    "coverage": {"limit_min": 30, "bands_min": [10, 30]},
    "variants": [
        {"name": "bridge down", "close_roads": {"ids": ["R2"]}},
        {"name": "rainy season", "road_speed_factors": {"surface": {"unpaved": 0.5}}},
        {"name": "flood", "flood": {"path": "flood.geojson", "cells": "impassable"}},
        {"name": "post moved", "close_sites": ["S1"], "open_sites": ["C1"],
         "capacity": {"C1": 100}},
        {"name": "all closed", "close_sites": ["S1"]},
        {"name": "bridges by attribute", "close_roads": {"where": {"bridge": ["yes"]}}},
    ],
}


def write(name, changes):
    fxgrid.write(D, base, name, changes)


write("good.json", {})
write("no_variants.json", {"variants": None})
write("bad_road.json", {"variants": [{"name": "x", "close_roads": {"ids": ["R9"]}}]})
write("bad_site.json", {"variants": [{"name": "x", "close_sites": ["S9"]}]})
write("bad_open.json", {"variants": [{"name": "x", "open_sites": ["S1"]}]})
write("zero_factor.json", {"variants": [{"name": "x",
                                         "road_speed_factors": {"surface": {"unpaved": 0}}}]})
write("bad_field.json", {"variants": [{"name": "x",
                                       "road_speed_factors": {"lanes": {"2": 0.5}}}]})
write("no_flood.json", {"variants": [{"name": "x", "flood": {"path": "missing.geojson"}}]})
write("flood_points.json", {"variants": [{"name": "x", "flood": {"path": "sites.geojson"}}]})
write("same_name.json", {"variants": [{"name": "x", "close_sites": ["S1"]},
                                      {"name": "x", "close_sites": ["S1"]}]})
write("no_roads.json", {"inputs": {"population": "pop.tif"}})
