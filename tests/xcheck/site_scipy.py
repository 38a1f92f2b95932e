"""Cross-check the site stage on the demo district against networkx + scipy.

Usage: site_scipy.py EXPORT_DIR SCENARIO_DIR SITE_SUMMARY_JSON
EXPORT_DIR holds edges.csv and sources.csv written by build/tools/export-graph
(the travel network, weights in seconds). Independently of sitereach's own
searches and models: networkx (Debian python3-networkx) runs a Dijkstra with a
cutoff of the limit from every existing and candidate site's cell (positions
read with GDAL/OGR from the demo's sites.gpkg, people from population.tif);
scipy.optimize.milp (HiGHS, Debian python3-scipy) solves maximal covering with
the existing posts fixed open and p new sites. The optimum and the coverage of
the existing posts alone must match summary.json's 'after' and 'before'.
Prints 'site_scipy: N passed, M failed'.
"""
import json
import os
import sys

import networkx as nx
import numpy as np
from osgeo import gdal, ogr
from scipy.optimize import Bounds, LinearConstraint, milp
from scipy.sparse import csr_matrix

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from travel_networkx import read_edges  # noqa: E402

gdal.UseExceptions()


def cells_of(path, layer, gt, nx_):
    ds = ogr.Open(path)
    lay = ds.GetLayerByName(layer)
    out = []
    for f in lay:
        g = f.GetGeometryRef()
        col = int((g.GetX() - gt[0]) // gt[1])
        row = int((g.GetY() - gt[3]) // gt[5])
        out.append(row * nx_ + col)
    return out


def main():
    d, sdir, summary = sys.argv[1], sys.argv[2], sys.argv[3]
    passed = failed = 0
    scen = json.load(open(os.path.join(sdir, "scenario.json")))
    limit = scen["coverage"]["limit_min"] * 60.0
    p = scen["siting"]["p"]
    ds = gdal.Open(os.path.join(sdir, "population.tif"))
    gt = ds.GetGeoTransform()
    nx_, ny_ = ds.RasterXSize, ds.RasterYSize
    band = ds.GetRasterBand(1)
    people = band.ReadAsArray().astype(float).ravel()
    nd = band.GetNoDataValue()
    if nd is not None:
        people[people == nd] = 0
    people[~np.isfinite(people)] = 0
    existing = cells_of(os.path.join(sdir, "sites.gpkg"), "health_posts", gt, nx_)
    cand = cells_of(os.path.join(sdir, "sites.gpkg"), "candidates", gt, nx_)
    direction = None
    for line in open(os.path.join(d, "sources.csv")):
        k, v = line.strip().split(",")
        if k == "direction":
            direction = v
    g = read_edges(os.path.join(d, "edges.csv"))
    if direction == "to_site":
        g = g.reverse(copy=True)
    n_cells = nx_ * ny_
    sites = existing + cand
    reach = []
    for s in sites:
        dist = nx.single_source_dijkstra_path_length(g, s, cutoff=limit, weight="weight")
        reach.append({v for v, t in dist.items() if v < n_cells and people[v] > 0})
    covered_fixed = set().union(*reach[:len(existing)])
    before = sum(people[v] for v in covered_fixed)
    # Maximal covering over the cells the existing posts leave uncovered.
    units = sorted(set().union(*reach[len(existing):]) - covered_fixed)
    idx = {v: k for k, v in enumerate(units)}
    nc, nu = len(cand), len(units)
    rows, cols = [], []
    for i, r in enumerate(reach[len(existing):]):
        for v in r:
            if v in idx:
                rows.append(idx[v])
                cols.append(i)
    # Variables: y_0..y_{nc-1} (sites), u_0..u_{nu-1} (units covered).
    # u_j - sum_{i covers j} y_i <= 0; sum y <= p.
    a = csr_matrix((-np.ones(len(rows)), (rows, cols)), shape=(nu, nc))
    from scipy.sparse import hstack, identity
    A = hstack([a, identity(nu)]).tocsr()
    Ap = csr_matrix(np.concatenate([np.ones(nc), np.zeros(nu)]).reshape(1, -1))
    c = np.concatenate([np.zeros(nc), -np.array([people[v] for v in units])])
    res = milp(c, constraints=[LinearConstraint(A, -np.inf, 0), LinearConstraint(Ap, 0, p)],
               integrality=np.concatenate([np.ones(nc), np.zeros(nu)]),
               bounds=Bounds(0, 1), options={"mip_rel_gap": 1e-9})
    after = before - res.fun
    s = json.load(open(summary))
    got_before = s["site"]["before"]["people_covered"]
    got_after = s["site"]["after"]["people_covered"]
    tol = 1e-6 * max(1.0, after)
    for name, got, want in (("before (existing posts only)", got_before, before),
                            ("after (max_cover optimum)", got_after, after)):
        if abs(got - want) <= tol:
            passed += 1
        else:
            failed += 1
            print("FAIL: %s: sitereach %.6f, networkx+scipy %.6f" % (name, got, want))
    total = float(people.sum())
    if abs(s["people_covered"] + s["people_unserved"] - total) <= 1e-6 * total:
        passed += 1
    else:
        failed += 1
        print("FAIL: covered + unserved != population total %.3f" % total)
    print("site_scipy: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
