"""Independent figures for the Liechtenstein OSM extract: highway class counts
(OGR SQL through python3-gdal) and the total geodesic length of all highway
lines (pyproj.Geod on WGS84), compared with what test_roads prints.
OSM data: (c) OpenStreetMap contributors, ODbL 1.0.
Usage: roads_liechtenstein.py PBF_FILE OUTPUT_OF_test_roads--print-liechtenstein"""
import sys

from osgeo import gdal, ogr
import pyproj

gdal.UseExceptions()


def reference(path):
    ds = gdal.OpenEx(path, gdal.OF_VECTOR)
    counts = {}
    sql = ds.ExecuteSQL("SELECT highway, count(*) AS n FROM lines "
                        "WHERE highway IS NOT NULL GROUP BY highway", dialect="SQLite")
    for f in sql:
        counts[f.GetField(0)] = f.GetField(1)
    ds.ReleaseResultSet(sql)

    geod = pyproj.Geod(ellps="WGS84")
    total = 0.0
    lay = ds.GetLayerByName("lines")
    for f in lay:
        if not f.GetField("highway"):
            continue
        g = f.GetGeometryRef()
        parts = [g] if g.GetGeometryType() in (ogr.wkbLineString, ogr.wkbLineString25D) \
            else [g.GetGeometryRef(i) for i in range(g.GetGeometryCount())]
        for p in parts:
            pts = p.GetPoints()
            if len(pts) < 2:
                continue
            lons = [q[0] for q in pts]
            lats = [q[1] for q in pts]
            total += geod.line_length(lons, lats)
    return counts, total


def ours(path):
    counts, total = {}, None
    with open(path) as fh:
        for line in fh:
            w = line.split()
            if w and w[0] == "class":
                counts[w[1]] = int(w[2])
            elif w and w[0] == "total_length_m":
                total = float(w[1])
    return counts, total


def main():
    ref_counts, ref_total = reference(sys.argv[1])
    got_counts, got_total = ours(sys.argv[2])
    passed = failed = 0

    def check(ok, what):
        nonlocal passed, failed
        if ok:
            passed += 1
        else:
            failed += 1
            print("FAIL: " + what)

    check(sum(ref_counts.values()) == 2751, "reference highway count %d != 2751 (README)"
          % sum(ref_counts.values()))
    check(set(ref_counts) == set(got_counts), "class sets differ: %s vs %s"
          % (sorted(ref_counts), sorted(got_counts)))
    for k, n in sorted(ref_counts.items()):
        check(got_counts.get(k) == n, "class %s: ours %s, ogr %d" % (k, got_counts.get(k), n))
    rel = abs(got_total - ref_total) / ref_total if got_total is not None else 1.0
    print("total length: ours %.1f m, pyproj geodesic %.1f m, difference %.4f%%"
          % (got_total or 0.0, ref_total, 100 * rel))
    check(rel <= 0.005, "total length differs by more than 0.5%")
    print("roads_liechtenstein: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
