"""Hand-made inputs for tests/cli/supply.sh and plan.sh (run with /usr/bin/python3).

Writes into argv[1]: the 20 x 20 grid of 100 m cells of fixtures.py (10 people per
cell, 4,000 people, UTM zone 36S), one primary road along the centres of row 10
from x = 50 m to x = 1950 m (two road nodes), sites S1 (capacity 1,000) and S2
(capacity 1,500), depot D1 on the road's west end and depot D2 far from it, and
one scenario per case. The coverage limit is a whole day, so the capacity-aware
assignment gives each site exactly its capacity (4,000 people want 2,500 places).
"""
import array
import json
import os
import sys

from osgeo import gdal, ogr, osr

gdal.UseExceptions()
D = sys.argv[1]
os.makedirs(D, exist_ok=True)
X0, Y0, CELL, N = 500000.0, 9000000.0, 100.0, 20


def srs():
    s = osr.SpatialReference()
    s.ImportFromEPSG(32736)
    return s


ds = gdal.GetDriverByName("GTiff").Create(os.path.join(D, "pop.tif"), N, N, 1, gdal.GDT_Float32)
ds.SetGeoTransform((X0, CELL, 0, Y0, 0, -CELL))
ds.SetProjection(srs().ExportToWkt())
ds.GetRasterBand(1).WriteRaster(0, 0, N, N, array.array("f", [10.0] * (N * N)).tobytes())
ds = None


def layer(name, gtype, feats, fields):
    path = os.path.join(D, name)
    if os.path.exists(path):
        os.remove(path)
    src = ogr.GetDriverByName("GeoJSON").CreateDataSource(path)
    lay = src.CreateLayer("layer", srs(), gtype)
    for f, t in fields:
        lay.CreateField(ogr.FieldDefn(f, t))
    for wkt, attrs in feats:
        ft = ogr.Feature(lay.GetLayerDefn())
        ft.SetGeometry(ogr.CreateGeometryFromWkt(wkt))
        for k, v in attrs.items():
            ft.SetField(k, v)
        lay.CreateFeature(ft)
    src = None


def pt(x, y):
    return "POINT (%f %f)" % (X0 + x, Y0 - y)


S = ogr.OFTString
R = ogr.OFTReal
layer("roads.geojson", ogr.wkbLineString,
      [("LINESTRING (%f %f, %f %f)" % (X0 + 50, Y0 - 1050, X0 + 1950, Y0 - 1050),
        {"highway": "primary"})], [("highway", S)])
layer("sites.geojson", ogr.wkbPoint,
      [(pt(250, 250), {"id": "S1", "name": "North post", "cap": 1000, "store": 1000}),
       (pt(1750, 1750), {"id": "S2", "name": "South post", "cap": 1500, "store": 1000})],
      [("id", S), ("name", S), ("cap", R), ("store", R)])
layer("sites_nostore.geojson", ogr.wkbPoint,
      [(pt(250, 250), {"id": "S1", "name": "North post", "cap": 1000, "store": 0}),
       (pt(1750, 1750), {"id": "S2", "name": "South post", "cap": 1500, "store": 1000})],
      [("id", S), ("name", S), ("cap", R), ("store", R)])
# D1 stands on the road's west end; D2 is 1,040 m from the road.
layer("depots.geojson", ogr.wkbPoint,
      [(pt(50, 1050), {"id": "D1", "name": "West depot"}),
       (pt(1000, 10), {"id": "D2", "name": "Field store"})], [("id", S), ("name", S)])
layer("depots_far.geojson", ogr.wkbPoint,
      [(pt(1000, 10), {"id": "D2", "name": "Field store"})], [("id", S), ("name", S)])

GOOD = {
    "name": "supply fixture",
    "inputs": {"population": "pop.tif",
               "roads": {"path": "roads.geojson", "class_field": "highway"}},
    "sites": {"existing": {"path": "sites.geojson", "id_field": "id", "name_field": "name",
                           "capacity_field": "cap", "storage_field": "store"},
              "depots": {"path": "depots.geojson", "id_field": "id", "name_field": "name"}},
    "travel": {"mode": "walk", "walk": {"speed_kmh": 5.0}},
    "coverage": {"limit_min": 1440, "bands_min": [60, 1440]},
    "supply": {
        "days_of_cover": 2, "lead_time_days": 0, "buffer": 0.1, "max_access_m": 1000,
        "commodities": [
            {"name": "water"},
            {"name": "kit", "unit": "kit", "rate": "once_per_person", "quantity": 1,
             "unit_kg": 2, "unit_m3": 0.01, "pack_units": 10, "priority": 1}],
        "fleet": [{"name": "lorry", "payload_kg": 5000, "volume_m3": 20, "count": 1,
                   "loading_min": 30, "hours_available": 100}],
        "depot_stock": {"D1": {"water": 100000, "kit": 3000}},
    },
}


def scenario(name, change=None):
    s = json.loads(json.dumps(GOOD))
    if change:
        change(s)
    with open(os.path.join(D, name), "w") as f:
        json.dump(s, f, indent=2)


def sup(**kv):
    def f(s):
        s["supply"].update(kv)
    return f


def comm(i, **kv):
    def f(s):
        s["supply"]["commodities"][i].update(kv)
    return f


def truck(**kv):
    def f(s):
        s["supply"]["fleet"][0].update(kv)
    return f


scenario("good.json")
scenario("short_stock.json", sup(depot_stock={"D1": {"water": 100000, "kit": 2000}}))
scenario("only_far_depot.json", sup(depot_stock={"D2": {"water": 100000, "kit": 3000}}))
scenario("unreachable_depot.json", lambda s: (
    s["sites"]["depots"].update(path="depots_far.geojson"),
    s["supply"].update(depot_stock={"D2": {"water": 100000, "kit": 3000}})))
scenario("no_storage.json",
         lambda s: s["sites"]["existing"].update(path="sites_nostore.geojson"))
scenario("zero_rate.json", comm(1, quantity=0))
scenario("negative_weight.json", comm(1, unit_kg=-2))
scenario("zero_payload.json", truck(payload_kg=0))
scenario("zero_days.json", sup(days_of_cover=0))
scenario("unknown_depot.json", sup(depot_stock={"D9": {"water": 1}}))
scenario("misspelt_commodity.json", sup(depot_stock={"D1": {"watr": 1}}))
scenario("no_fleet.json", lambda s: s["supply"].pop("fleet"))
scenario("no_supply.json", lambda s: s.pop("supply"))
scenario("no_depots.json", lambda s: s["sites"].pop("depots"))
scenario("with_siting.json", lambda s: s.update(siting={}))
