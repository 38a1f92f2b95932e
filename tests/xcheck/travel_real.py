"""Cross-check nearest-site travel times on real inputs against networkx.

Usage: travel_real.py EXPORT_DIR NAME
EXPORT_DIR holds edges.csv, sources.csv and result.csv written by
build/tools/export-graph. networkx (Debian python3-networkx) runs its own
multi-source Dijkstra from a virtual node joined to every site; every node's time
must match ours to 1e-6 relative, and our nearest site must be one of the sites
that reach the node in that shortest time (networkx's predecessor lists keep every
tie, so ties are judged exactly rather than skipped).
Prints 'NAME: N passed, M failed'.
"""
import csv
import math
import os
import sys

import networkx as nx

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from travel_networkx import close, read_edges, read_sources  # noqa: E402


def main():
    d, name = sys.argv[1], sys.argv[2]
    passed = failed = 0
    direction, n_nodes, sites = read_sources(d)
    g = read_edges(os.path.join(d, "edges.csv"))
    g.add_nodes_from(range(n_nodes))
    if direction == "to_site":
        g = g.reverse(copy=True)
    V = -1
    for i, s in enumerate(sites):
        g.add_edge(V, s, weight=0.0)
    pred, dist = nx.dijkstra_predecessor_and_distance(g, V, weight="weight")
    # Which sites reach each node in the shortest time: propagate along every
    # shortest-path predecessor, nodes in order of distance.
    first = {}
    for i, s in enumerate(sites):
        first.setdefault(s, i)
    best = {}
    for v in sorted(dist, key=dist.get):
        if v == V:
            continue
        if v in first and dist[v] == 0:
            best[v] = {first[v]} | ({i for i, s in enumerate(sites) if s == v})
            continue
        acc = set()
        for u in pred[v]:
            if u != V:
                acc |= best.get(u, set())
        best[v] = acc
    bad_t = bad_s = 0
    with open(os.path.join(d, "result.csv")) as f:
        r = csv.reader(f)
        next(r)
        for node, t, site in r:
            v, t, site = int(node), float(t), int(site)
            ref = dist.get(v, math.inf)
            if not close(t, ref):
                bad_t += 1
                if bad_t <= 5:
                    print("  node %d: ours %.17g, networkx %.17g" % (v, t, ref))
            if math.isinf(ref):
                ok = site == -1
            else:
                ok = site in best.get(v, set())
            if not ok:
                bad_s += 1
                if bad_s <= 5:
                    print("  node %d: our site %d, networkx's shortest: %s" % (v, site, sorted(best.get(v, set()))[:5]))
    for ok, what in ((bad_t == 0, "%d nodes with a different time" % bad_t),
                     (bad_s == 0, "%d nodes with a nearest site networkx does not confirm" % bad_s),
                     (n_nodes > 1000, "only %d nodes" % n_nodes)):
        if ok:
            passed += 1
        else:
            failed += 1
            print("FAIL: %s: %s" % (name, what))
    print("%s: %d nodes, %d sites, %d reachable" % (name, n_nodes, len(sites), len(dist) - 1))
    print("%s: %d passed, %d failed" % (name, passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
