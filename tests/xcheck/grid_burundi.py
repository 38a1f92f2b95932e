"""Cross-checks for the grid module against GDAL's own tools and pyproj.

Run by tests/xcheck/grid_burundi.sh with /usr/bin/python3 (Debian's python3-gdal,
python3-pyproj, numpy). Works on copies in a temporary folder; never writes beside
the shared inputs. Prints one line per check and a final "grid_burundi: N passed,
M failed" line.
"""
import hashlib
import json
import math
import os
import shutil
import subprocess
import sys
import tempfile

import numpy as np
from osgeo import gdal, osr
from pyproj import Geod, Transformer

gdal.UseExceptions()
SHARED = os.environ.get("SITEREACH_SHARED", "../shared")
BUILD = os.environ.get("SITEREACH_BUILD", "build")
TEST = os.path.join(BUILD, "tests", "test_grid")
SRC = os.path.join(SHARED, "data", "real", "burundi", "ghs_pop_burundi_250m_mollweide.tif")
SHA = "1185a9f3214f86961294804aaaf0b236023a3741274916f998637f4511c0ab7b"  # data README

passed = failed = 0


def check(name, ok, detail=""):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
    print(("ok   " if ok else "FAIL ") + name + (": " + detail if detail else ""))


def rel(a, b):
    return abs(a - b) / max(abs(b), 1e-300)


def run_test(*args):
    out = subprocess.run([TEST] + list(args), capture_output=True, text=True)
    if out.returncode != 0:
        raise RuntimeError("test_grid %s failed: %s" % (" ".join(args), out.stderr.strip()))
    return out.stdout


def sha256(path):
    h = hashlib.sha256()
    with open(path, "rb") as f:
        for block in iter(lambda: f.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def write_tif(path, arr, gt, epsg, nodata=None, dtype=gdal.GDT_Float32):
    ny, nx = arr.shape
    ds = gdal.GetDriverByName("GTiff").Create(path, nx, ny, 1, dtype)
    ds.SetGeoTransform(gt)
    s = osr.SpatialReference()
    s.ImportFromEPSG(epsg)
    ds.SetSpatialRef(s)
    b = ds.GetRasterBand(1)
    if nodata is not None:
        b.SetNoDataValue(nodata)
    b.WriteArray(arr)
    ds = None


def burundi(tmp):
    """Population total, nodata and populated counts against GDAL statistics."""
    before = sha256(SRC)
    check("input sha256 matches the data README", before == SHA, before)
    copy = os.path.join(tmp, "pop.tif")
    shutil.copyfile(SRC, copy)
    mine = dict(kv.split("=") for kv in run_test("--print-burundi-total").split())
    total = float(mine["total"])
    nodata, populated = int(mine["nodata"]), int(mine["populated"])
    nx, ny = int(mine["nx"]), int(mine["ny"])

    # gdalinfo -stats on the copy: GDAL's own mean over valid cells and valid share.
    info = json.loads(subprocess.run(["gdalinfo", "-stats", "-json", copy],
                                     capture_output=True, text=True, check=True).stdout)
    md = info["bands"][0]["metadata"][""]
    gmean = float(md["STATISTICS_MEAN"])
    gvalid_pct = float(md["STATISTICS_VALID_PERCENT"])
    check("valid share vs gdalinfo -stats (54.9% in README)",
          abs(100.0 * (nx * ny - nodata) / (nx * ny) - gvalid_pct) < 0.01,
          "%.4f vs %.4f" % (100.0 * (nx * ny - nodata) / (nx * ny), gvalid_pct))
    gsum = gmean * (nx * ny - nodata)
    check("total vs gdalinfo mean * valid count (1e-6 relative)", rel(total, gsum) < 1e-6,
          "%.6f vs %.6f" % (total, gsum))

    # The same through python3-gdal and numpy in double precision.
    ds = gdal.Open(copy)
    b = ds.GetRasterBand(1)
    a = b.ReadAsArray().astype(np.float64)
    nd = b.GetNoDataValue()
    valid = a != np.float64(np.float32(nd))
    check("nodata count vs numpy", int((~valid).sum()) == nodata,
          "%d vs %d" % (nodata, int((~valid).sum())))
    npsum = math.fsum(a[valid].ravel().tolist())
    check("total vs exact fsum of GDAL-read cells (1e-12 relative)", rel(total, npsum) < 1e-12,
          "%.9f vs %.9f" % (total, npsum))
    check("populated cells vs numpy", int((a[valid] > 0).sum()) == populated,
          "%d vs %d" % (populated, int((a[valid] > 0).sum())))
    check("total vs README 11,131,282 (rounded)", abs(total - 11131282) <= 1.0, "%.3f" % total)

    # Planar-vs-ground distortion: the same 5 x 5 sample and one-cell steps as grid.c,
    # through pyproj's Transformer and Geod.
    gt = ds.GetGeoTransform()
    t = Transformer.from_crs(ds.GetProjection(), "EPSG:4326", always_xy=True)
    geod = Geod(ellps="WGS84")
    worst = 0.0
    for i in range(5):
        for j in range(5):
            fx, fy = nx * (0.5 + i) / 5.0, ny * (0.5 + j) / 5.0
            x0, y0 = gt[0] + fx * gt[1], gt[3] + fy * gt[5]
            lon0, lat0 = t.transform(x0, y0)
            lon1, lat1 = t.transform(x0 + gt[1], y0)
            lon2, lat2 = t.transform(x0, y0 + gt[5])
            sx = geod.inv(lon0, lat0, lon1, lat1)[2]
            sy = geod.inv(lon0, lat0, lon2, lat2)[2]
            worst = max(worst, abs(abs(gt[1]) / sx - 1), abs(abs(gt[5]) / sy - 1))
    se = float(mine["scale_error"])
    check("scale_error vs pyproj Transformer + Geod", abs(worst - se) < 1e-6,
          "%.6f vs %.6f" % (se, worst))
    ds = None
    check("input unchanged, no .aux.xml beside it",
          sha256(SRC) == before and not os.path.exists(SRC + ".aux.xml"))


def geographic_rows(tmp):
    """Per-row cell sizes on three ellipsoids against pyproj.Geod and the closed form."""
    for epsg, ellps in ((4326, "WGS84"), (4269, "GRS80"), (4230, "intl")):
        path = os.path.join(tmp, "geo%d.tif" % epsg)
        gt = (10.0, 0.25, 0.0, 80.0, 0.0, -0.5)
        write_tif(path, np.zeros((320, 3), np.float32), gt, epsg)
        rows = [list(map(float, l.split())) for l in run_test("--print-rows", path).splitlines()]
        g = Geod(ellps=ellps)
        e2 = g.f * (2 - g.f)
        e = math.sqrt(e2)

        def q(lat):
            s = math.sin(math.radians(lat))
            return (1 - e2) * (s / (1 - e2 * s * s) - math.log((1 - e * s) / (1 + e * s)) / (2 * e))

        wdx = wdy = warea = wq = 0.0
        for r, dx, dy, area in rows:
            la, lb = gt[3] + r * gt[5], gt[3] + (r + 1) * gt[5]
            lc = 0.5 * (la + lb)
            wdx = max(wdx, abs(dx - g.inv(gt[0], lc, gt[0] + gt[1], lc)[2]))
            wdy = max(wdy, abs(dy - g.inv(gt[0] + 0.125, la, gt[0] + 0.125, lb)[2]))
            pa = abs(g.polygon_area_perimeter([gt[0], gt[0] + gt[1], gt[0] + gt[1], gt[0]],
                                              [la, la, lb, lb])[0])
            warea = max(warea, rel(area, pa))
            # Parallel-bounded quadrangle (Snyder 1987, eq. 3-12): differs from the
            # geodesic-edged cell by well under 1e-5 for quarter-degree cells.
            qa = abs(g.a ** 2 * math.radians(gt[1]) * (q(la) - q(lb)) / 2)
            wq = max(wq, rel(area, qa))
        check("EPSG:%d row widths vs Geod(%s)" % (epsg, ellps), wdx < 1e-6, "max %.2e m" % wdx)
        check("EPSG:%d row heights vs Geod(%s)" % (epsg, ellps), wdy < 1e-6, "max %.2e m" % wdy)
        check("EPSG:%d row areas vs Geod polygon area" % epsg, warea < 1e-9, "max rel %.2e" % warea)
        check("EPSG:%d row areas vs closed-form quadrangle" % epsg, wq < 1e-5, "max rel %.2e" % wq)


def layers(tmp):
    """Layers warped by grid.c against the gdalwarp command on the same target grid."""
    rng = np.random.default_rng(3)
    pop = os.path.join(tmp, "lpop.tif")
    pgt = (480000.0, 100.0, 0.0, 9010000.0, 0.0, -100.0)   # UTM 36S, 60 x 40 cells
    write_tif(pop, np.ones((40, 60), np.float32), pgt, 32736)
    te = ["-te", "480000", "9006000", "486000", "9010000", "-ts", "60", "40"]
    # Source rasters in lon/lat covering the grid with a margin, finer and coarser.
    lon0, lat0 = 32.80, -8.94
    cases = [
        ("landcover", 0.0007, "near", gdal.GDT_Int16, 0),
        ("barrier", 0.0011, "near", gdal.GDT_Byte, 255),
        ("elevation", 0.003, "bilinear", gdal.GDT_Float32, -9999),
    ]
    for kind, step, alg, dtype, nd in cases:
        n = int(0.08 / step)
        if kind == "landcover":
            arr = rng.integers(0, 9, size=(n, n)).astype(np.float64)
        elif kind == "barrier":
            arr = rng.choice([0, 0, 0, 1, 3, 255], size=(n, n)).astype(np.float64)
        else:
            yy, xx = np.mgrid[0:n, 0:n]
            arr = 1500 + 40 * np.sin(xx / 5.0) + 25 * np.cos(yy / 7.0)
            arr[5:9, 10:14] = nd
        src = os.path.join(tmp, kind + ".tif")
        write_tif(src, arr, (lon0, step, 0, lat0, 0, -step), 4326, nodata=nd, dtype=dtype)
        ref = os.path.join(tmp, kind + "_ref.tif")
        subprocess.run(["gdalwarp", "-q", "-overwrite", "-t_srs", "EPSG:32736"] + te +
                       ["-r", alg, "-ovr", "NONE", "-ot", "Float64", "-dstnodata", "nan",
                        src, ref], check=True)
        want = gdal.Open(ref).ReadAsArray().astype(np.float64).ravel()
        lines = run_test("--print-layer", kind, pop, src).splitlines()
        got = np.array([float(v) for v in lines[:60 * 40]])
        if kind == "landcover":
            exp = np.where(np.isnan(want), -2147483648.0, want)
            bad = int((got != exp).sum())
        elif kind == "barrier":
            exp = np.where(np.isnan(want) | (want == 0), 0.0, 1.0)
            bad = int((got != exp).sum())
            on = float(lines[-1].split("=")[1])
            check("barrier people_on_barrier = barrier cells", on == exp.sum(),
                  "%g vs %g" % (on, exp.sum()))
        else:
            both = np.isnan(got) & np.isnan(want)
            close = np.abs(got - want) <= 1e-3
            bad = int((~(both | close)).sum())
            check("elevation has nodata holes where gdalwarp has them",
                  np.isnan(got).sum() == np.isnan(want).sum() and np.isnan(got).sum() > 0,
                  "%d vs %d" % (np.isnan(got).sum(), np.isnan(want).sum()))
        check("%s from EPSG:4326 (%s) vs gdalwarp, 2400 cells" % (kind, alg), bad == 0,
              "%d cells differ" % bad)


def main():
    tmp = tempfile.mkdtemp(prefix="xcheck_grid.")
    try:
        for step in (burundi, geographic_rows, layers):
            try:
                step(tmp)
            except Exception as ex:  # one broken step must not hide the others
                check(step.__name__, False, str(ex))
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print("grid_burundi: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
