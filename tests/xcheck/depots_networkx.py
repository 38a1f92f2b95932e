"""Depot -> site times on the demo roads with networkx, compared with sitereach's
supply_travel.csv. Independent of our code: the graph is rebuilt from the road
GeoPackage (vertices keyed by their coordinates, planar UTM lengths), vehicle
speeds from the built-in table of docs/scenario.md (the demo scenario gives no
road_speeds), one-way features only in their digitised direction, classes with
vehicle speed 0 left out. Each point joins the nearest point of the nearest
vehicle segment by a straight leg at 5 km/h (the documented default), up to
2,000 m; the segment is split there (or the node joined when that point is an
end), as docs/plan.md describes.
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
segs = []   # (a, b, seconds per metre, oneway)
ds = ogr.Open(f"{demo}/roads.gpkg")
for f in ds.GetLayerByName("roads"):
    v = KMH[f.GetField("highway")] / 3.6
    if v == 0:
        continue
    geom = f.GetGeometryRef()
    pts = [(round(geom.GetX(i), 3), round(geom.GetY(i), 3)) for i in range(geom.GetPointCount())]
    oneway = f.GetField("oneway") == "yes"
    for a, b in zip(pts, pts[1:]):
        segs.append((a, b, 1 / v, oneway))


def add(u, w, spm, length):
    # Parallel edges keep the faster one, as a shortest path would.
    if not g.has_edge(u, w) or g[u][w]["t"] > length * spm:
        g.add_edge(u, w, t=length * spm, m=length)


def points(layer):
    out = {}
    src = ogr.Open(f"{demo}/sites.gpkg")   # kept alive while its layer is read
    for f in src.GetLayerByName(layer):
        p = f.GetGeometryRef()
        out[f.GetField("id")] = (p.GetX(), p.GetY())
    return out


def project(p):
    """(distance, segment index, fraction) of the nearest point on a segment."""
    best = (math.inf, -1, 0.0)
    for i, (a, b, _, _) in enumerate(segs):
        dx, dy = b[0] - a[0], b[1] - a[1]
        l2 = dx * dx + dy * dy
        t = 0.0 if l2 == 0 else max(0.0, min(1.0, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / l2))
        d = math.dist(p, (a[0] + t * dx, a[1] + t * dy))
        if d < best[0]:
            best = (d, i, t)
    return best


depots, sites = points("depots"), points("health_posts")
joint = {}   # point key -> (vertex, access metres)
on_seg = {}  # segment -> [(fraction, vertex)]
for kind, pts in (("d", depots), ("s", sites)):
    for pid, p in pts.items():
        d, i, t = project(p)
        if d > 2000:
            joint[(kind, pid)] = (None, math.inf)
            continue
        vx = ("point", kind, pid)
        joint[(kind, pid)] = (vx, d)
        a, b, _, _ = segs[i]
        if t <= 1e-9 or t >= 1 - 1e-9:
            node = a if t <= 1e-9 else b
            g.add_edge(vx, node, t=0, m=0)
            g.add_edge(node, vx, t=0, m=0)
        else:
            on_seg.setdefault(i, []).append((t, vx))
for i, (a, b, spm, oneway) in enumerate(segs):
    L = math.dist(a, b)
    chain = [(0.0, a)] + sorted(on_seg.get(i, [])) + [(1.0, b)]
    for (fu, u), (fw, w) in zip(chain, chain[1:]):
        add(u, w, spm, (fw - fu) * L)
        if not oneway:
            add(w, u, spm, (fw - fu) * L)
got = {(r["depot_id"], r["site_id"]): r for r in csv.DictReader(open(travel_csv))}
check(len(got) == len(depots) * len(sites), f"{len(got)} pairs in {travel_csv}")
rev = g.reverse(copy=True)
for did, dp in depots.items():
    dn, da = joint[("d", did)]
    if dn is None:
        for sid in sites:
            r = got.get((did, sid), {})
            check(r.get("out_min") == "", f"{did} has no road, yet {sid} has a time")
        continue
    t_out, _ = nx.single_source_dijkstra(g, dn, weight="t")
    t_back, _ = nx.single_source_dijkstra(rev, dn, weight="t")
    for sid, sp in sites.items():
        sn, sa = joint[("s", sid)]
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
