"""Shared builders for the command-line test fixtures (run with /usr/bin/python3).

A 20 x 5 grid of 100 m cells in UTM zone 36S whose cells are addressed by
(col, row); rasters, GeoJSON layers, straight roads between cell centres, points
at cell centres, and scenario files written from a base dictionary.
"""
import array
import json
import os

from osgeo import gdal, ogr, osr

gdal.UseExceptions()
X0, Y0, CELL, NX, NY = 500000.0, 9000000.0, 100.0, 20, 5


def srs(epsg):
    s = osr.SpatialReference()
    s.ImportFromEPSG(epsg)
    s.SetAxisMappingStrategy(osr.OAMS_TRADITIONAL_GIS_ORDER)
    return s


def raster(folder, name, values, dtype=gdal.GDT_Float32):
    ds = gdal.GetDriverByName("GTiff").Create(os.path.join(folder, name), NX, NY, 1, dtype)
    ds.SetGeoTransform((X0, CELL, 0, Y0, 0, -CELL))
    ds.SetProjection(srs(32736).ExportToWkt())
    ds.GetRasterBand(1).WriteRaster(0, 0, NX, NY, array.array(
        "f" if dtype == gdal.GDT_Float32 else "B", values).tobytes())
    ds = None


def centre(col, row):
    return X0 + (col + 0.5) * CELL, Y0 - (row + 0.5) * CELL


def layer(folder, name, gtype, feats, fields, epsg=32736):
    path = os.path.join(folder, name)
    if os.path.exists(path):
        os.remove(path)
    ds = ogr.GetDriverByName("GeoJSON").CreateDataSource(path)
    lay = ds.CreateLayer("layer", srs(epsg), gtype)
    for f in fields:
        lay.CreateField(ogr.FieldDefn(f, ogr.OFTString))
    for geom, attrs in feats:
        ft = ogr.Feature(lay.GetLayerDefn())
        ft.SetGeometry(geom)
        for k, v in attrs.items():
            ft.SetField(k, v)
        lay.CreateFeature(ft)
    ds = None


def line(c0, c1, row=2):
    g = ogr.Geometry(ogr.wkbLineString)
    g.AddPoint_2D(*centre(c0, row))
    g.AddPoint_2D(*centre(c1, row))
    return g


def point(col, row):
    g = ogr.Geometry(ogr.wkbPoint)
    g.AddPoint_2D(*centre(col, row))
    return g


def write(folder, base, name, changes):
    """Scenario 'name': a copy of 'base' with top-level keys replaced (None deletes)."""
    s = json.loads(json.dumps(base))
    for k, v in changes.items():
        if v is None:
            del s[k]
        else:
            s[k] = v
    with open(os.path.join(folder, name), "w") as f:
        json.dump(s, f, indent=1)
