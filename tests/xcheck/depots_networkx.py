"""Depot -> site times on the demo roads with networkx, compared with sitereach's
supply_travel.csv. Independent of our code: the graph is rebuilt from the road
GeoPackage (vertices keyed by their coordinates, planar UTM lengths), vehicle
speeds from the built-in table of docs/scenario.md (the demo scenario gives no
road_speeds), one-way features only in their digitised direction, classes with
vehicle speed 0 left out. Points join their nearest vehicle node by a straight
leg at 5 km/h (the documented default), up to 2,000 m.
usage: depots_networkx.py DEMO_DIR supply_travel.csv"""
import csv
import math
import sys

import networkx as nx
from osgeo import ogr

demo, travel_csv = sys.argv[1], sys.argv[2]
KMH = {"primary": 60, "secondary": 50, "tertiary": 40, "unclassified": 30, "track": 15,
       "path": 0}
ACCESS = 5 / 3.6
passed = failed = 0


def check(cond, what):
    global passed, failed
    if cond:
        passed += 1
    else:
        failed += 1
        print("FAIL:", what)


g = nx.DiGraph()
ds = ogr.Open(f"{demo}/roads.gpkg")
for f in ds.GetLayerByName("roads"):
    v = KMH[f.GetField("highway")] / 3.6
    if v == 0:
        continue
    geom = f.GetGeometryRef()
    pts = [(round(geom.GetX(i), 3), round(geom.GetY(i), 3)) for i in range(geom.GetPointCount())]
    oneway = f.GetField("oneway") == "yes"
    for a, b in zip(pts, pts[1:]):
        length = math.dist(a, b)
        for u, w in ((a, b),) if oneway else ((a, b), (b, a)):
            # Parallel edges keep the faster one, as a shortest path would.
            if not g.has_edge(u, w) or g[u][w]["t"] > length / v:
                g.add_edge(u, w, t=length / v, m=length)
nodes = list(g.nodes)


def points(layer):
    out = {}
    src = ogr.Open(f"{demo}/sites.gpkg")   # kept alive while its layer is read
    for f in src.GetLayerByName(layer):
        p = f.GetGeometryRef()
        out[f.GetField("id")] = (p.GetX(), p.GetY())
    return out


def snap(p):
    n = min(nodes, key=lambda q: math.dist(p, q))
    d = math.dist(p, n)
    return (n, d) if d <= 2000 else (None, math.inf)


depots, sites = points("depots"), points("health_posts")
got = {(r["depot_id"], r["site_id"]): r for r in csv.DictReader(open(travel_csv))}
check(len(got) == len(depots) * len(sites), f"{len(got)} pairs in {travel_csv}")
rev = g.reverse(copy=True)
for did, dp in depots.items():
    dn, da = snap(dp)
    t_out, _ = nx.single_source_dijkstra(g, dn, weight="t")
    t_back, _ = nx.single_source_dijkstra(rev, dn, weight="t")
    for sid, sp in sites.items():
        sn, sa = snap(sp)
        r = got.get((did, sid))
        if r is None:
            check(False, f"{did}->{sid} missing")
            continue
        legs = (da + sa) / ACCESS
        for key, tt in (("out_min", t_out), ("back_min", t_back)):
            want = (tt[sn] + legs) / 60 if sn in tt else None
            have = float(r[key]) if r[key] != "" else None
            if want is None or have is None:
                check(want is None and have is None, f"{did}->{sid} {key}: {have} vs {want}")
            else:
                check(abs(have - want) <= 1e-6 * max(1, want), f"{did}->{sid} {key}: {have} vs {want}")
        # Distance along the fastest path (ties between equal-time paths aside).
        if sn in t_out and r["out_km"] != "":
            path = nx.dijkstra_path(g, dn, sn, weight="t")
            km = (sum(g[a][b]["m"] for a, b in zip(path, path[1:])) + da + sa) / 1000
            check(abs(float(r["out_km"]) - km) <= 1e-6 * max(1, km), f"{did}->{sid} km: {r['out_km']} vs {km}")
print(f"depots_networkx: {passed} passed, {failed} failed")
sys.exit(1 if failed else 0)
