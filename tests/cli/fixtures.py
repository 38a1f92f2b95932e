"""Small hand-made inputs for the command-line tests (run with /usr/bin/python3).

Writes into the folder given as argv[1]: a 20 x 20 grid of 100 m cells in UTM
zone 36S with 10 people per cell (4,000 people), a straight road, two sites,
and scenario files, one good and one per bad-input case. Every value is chosen
so results can be worked out by hand.
"""
import json
import os
import sys

from osgeo import gdal, ogr, osr

gdal.UseExceptions()
D = sys.argv[1]
os.makedirs(D, exist_ok=True)
X0, Y0, CELL, N = 500000.0, 9000000.0, 100.0, 20


def srs(epsg):
    s = osr.SpatialReference()
    s.ImportFromEPSG(epsg)
    return s


def raster(name, values, epsg=32736, dtype=gdal.GDT_Float32, nodata=None, x0=X0):
    ds = gdal.GetDriverByName("GTiff").Create(os.path.join(D, name), N, N, 1, dtype)
    ds.SetGeoTransform((x0, CELL, 0, Y0, 0, -CELL))
    if epsg:
        ds.SetProjection(srs(epsg).ExportToWkt())
    b = ds.GetRasterBand(1)
    if nodata is not None:
        b.SetNoDataValue(nodata)
    import array
    b.WriteRaster(0, 0, N, N, array.array("f" if dtype == gdal.GDT_Float32 else "B", values).tobytes())
    ds = None


def layer(name, gtype, feats, epsg=32736, fields=()):
    path = os.path.join(D, name)
    if os.path.exists(path):
        os.remove(path)
    ds = ogr.GetDriverByName("GeoJSON").CreateDataSource(path)
    lay = ds.CreateLayer("layer", srs(epsg), gtype)
    for f in fields:
        lay.CreateField(ogr.FieldDefn(f, ogr.OFTString))
    for wkt, attrs in feats:
        ft = ogr.Feature(lay.GetLayerDefn())
        ft.SetGeometry(ogr.CreateGeometryFromWkt(wkt))
        for k, v in attrs.items():
            ft.SetField(k, v)
        lay.CreateFeature(ft)
    ds = None


people = [10.0] * (N * N)
raster("pop.tif", people)
raster("nocrs.tif", people, epsg=None)
neg = list(people)
neg[3 * N + 4] = -5.0          # first negative cell: column 4, row 3
neg[7 * N + 1] = -1.0
raster("negative.tif", neg)
nan = list(people)
nan[0] = float("nan")
nan[1] = -9999.0               # nodata
raster("nan.tif", nan, nodata=-9999.0)
with open(os.path.join(D, "notraster.tif"), "w") as f:
    f.write("this is not a raster\n")
with open(os.path.join(D, "zerosize.vrt"), "w") as f:
    f.write('<VRTDataset rasterXSize="0" rasterYSize="0">'
            '<SRS>EPSG:32736</SRS><GeoTransform>500000,100,0,9000000,0,-100</GeoTransform>'
            '<VRTRasterBand dataType="Float32" band="1"/></VRTDataset>\n')

ymid = Y0 - 10.5 * CELL
layer("roads.geojson", ogr.wkbLineString,
      [("LINESTRING (%f %f, %f %f)" % (X0 + 50, ymid, X0 + 1950, ymid), {"highway": "primary"})],
      fields=("highway",))
layer("empty_roads.geojson", ogr.wkbLineString, [], fields=("highway",))
layer("roads_points.geojson", ogr.wkbPoint,
      [("POINT (%f %f)" % (X0 + 50, ymid), {"highway": "primary"})], fields=("highway",))
layer("sites.geojson", ogr.wkbPoint,
      [("POINT (%f %f)" % (X0 + 250, Y0 - 250), {"id": "S1", "name": "North post"}),
       ("POINT (%f %f)" % (X0 + 1750, Y0 - 1750), {"id": "S2", "name": "South post"})],
      fields=("id", "name"))
layer("sites_outside.geojson", ogr.wkbPoint,
      [("POINT (%f %f)" % (X0 + 250, Y0 - 250), {"id": "S1"}),
       ("POINT (%f %f)" % (X0 - 5000, Y0 - 250), {"id": "FAR1"}),
       ("POINT (%f %f)" % (X0 + 250, Y0 + 9000), {"id": "FAR2"})],
      fields=("id",))

GOOD = {
    "name": "cli fixture",
    "inputs": {"population": "pop.tif",
               "roads": {"path": "roads.geojson", "class_field": "highway"}},
    "sites": {"existing": {"path": "sites.geojson", "id_field": "id", "name_field": "name"}},
    "travel": {"mode": "walk", "walk": {"speed_kmh": 5.0}},
    "coverage": {"limit_min": 60, "bands_min": [30, 60, 120]},
}


def scenario(name, change=None, text=None):
    path = os.path.join(D, name)
    if text is not None:
        with open(path, "w") as f:
            f.write(text)
        return
    s = json.loads(json.dumps(GOOD))
    if change:
        change(s)
    with open(path, "w") as f:
        json.dump(s, f, indent=2)


def setp(*keys, value):
    def f(s):
        o = s
        for k in keys[:-1]:
            o = o.setdefault(k, {})
        o[keys[-1]] = value
    return f


scenario("good.json")
scenario("missing_file.json", setp("inputs", "population", value="nope.tif"))
scenario("not_raster.json", setp("inputs", "population", value="notraster.tif"))
scenario("no_crs.json", setp("inputs", "population", value="nocrs.tif"))
scenario("zero_size.json", setp("inputs", "population", value="zerosize.vrt"))
scenario("negative.json", setp("inputs", "population", value="negative.tif"))
scenario("nan.json", setp("inputs", "population", value="nan.tif"))
scenario("unknown_key.json", setp("travel", "walk", "sped_kmh", value=5))
scenario("wrong_type.json", setp("travel", "walk", "speed_kmh", value="fast"))
scenario("out_of_range.json", setp("travel", "walk", "speed_kmh", value=0))
scenario("bands_order.json", setp("coverage", "bands_min", value=[60, 30]))
scenario("syntax.json", text='{\n  "name": "x",\n  "inputs": {\n    "population": "pop.tif",,\n  }\n}\n')
scenario("roads_points.json", setp("inputs", "roads", "path", value="roads_points.geojson"))
scenario("point_outside.json", setp("sites", "existing", value={"path": "sites_outside.geojson", "id_field": "id"}))
scenario("empty_roads.json", setp("inputs", "roads", "path", value="empty_roads.geojson"))

# Barriers: a ring around each site's cell cuts both sites off from everyone;
# a barrier on S1's own cell makes the site layer invalid.
ring = [0] * (N * N)
for (c0, r0) in ((2, 2), (17, 17)):
    for dc in (-1, 0, 1):
        for dr in (-1, 0, 1):
            if dc or dr:
                ring[(r0 + dr) * N + (c0 + dc)] = 1
raster("ring.tif", ring, dtype=gdal.GDT_Byte)
on_site = [0] * (N * N)
on_site[2 * N + 2] = 1
raster("on_site.tif", on_site, dtype=gdal.GDT_Byte)
raster("empty_pop.tif", [0.0] * (N * N))
scenario("cut_off.json", setp("inputs", "barriers", value="ring.tif"))
scenario("site_on_barrier.json", setp("inputs", "barriers", value="on_site.tif"))
scenario("no_people.json", setp("inputs", "population", value="empty_pop.tif"))
scenario("zero_speed.json", setp("travel", "road_speeds",
                                 value={"primary": {"walk_kmh": 0, "vehicle_kmh": 60}}))
scenario("no_sites.json", lambda s: s.pop("sites"))

# A road island: a short road with three vertices in cells (1..3, 15), away from
# the main road on row 10 (given five vertices so it is the larger network):
# 3 cells x 10 people = 30 people reported.
yi = Y0 - 15.5 * CELL
main = ", ".join("%f %f" % (X0 + 50 + 475 * k, ymid) for k in range(5))
layer("roads_island.geojson", ogr.wkbLineString,
      [("LINESTRING (%s)" % main, {"highway": "primary"}),
       ("LINESTRING (%f %f, %f %f, %f %f)" % (X0 + 150, yi, X0 + 250, yi, X0 + 350, yi),
        {"highway": "track"})], fields=("highway",))
scenario("island.json", setp("inputs", "roads", "path", value="roads_island.geojson"))

# Population groups: a share (20% of 4,000 = 800) and a raster of 1 person per
# cell (400), and the same raster shifted off the grid (refused).
raster("group.tif", [1.0] * (N * N))
raster("group_shifted.tif", [1.0] * (N * N), x0=X0 + 50)
scenario("groups.json", setp("population_groups", value=[
    {"name": "under five", "share": 0.2}, {"name": "pregnant women", "raster": "group.tif"}]))
scenario("groups_bad.json", setp("population_groups", value=[
    {"name": "pregnant women", "raster": "group_shifted.tif"}]))
