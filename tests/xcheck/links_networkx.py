"""Brute-force check of critical-link scores against networkx.

Usage: links_networkx.py EXPORT_DIR NAME
EXPORT_DIR is written by `test_links --export`: edges.csv (eid,from,to,weight in
seconds), meta.csv (direction, n_nodes, n_cells, limit_s, one "site,NODE" line
per site), people.csv (cell,people) and links.csv (our scores for some links and
the edge ids of each). For every listed link, networkx (Debian python3-networkx)
removes the link's edges, runs its own multi-source Dijkstra from all sites, and
recomputes from scratch the people pushed beyond the limit, the people cut off
and the added person-hours. They must match ours (people to 1e-6, hours to 1e-6
relative). Links skipped by our tree rule must change nothing at all.
Prints 'NAME: N passed, M failed'.
"""
import csv
import math
import os
import sys

import networkx as nx


def main():
    d, name = sys.argv[1], sys.argv[2]
    meta, sites = {}, []
    with open(os.path.join(d, "meta.csv")) as f:
        for k, v in csv.reader(f):
            if k == "site":
                sites.append(int(v))
            else:
                meta[k] = v
    limit = float(meta["limit_s"])
    people = {}
    with open(os.path.join(d, "people.csv")) as f:
        for c, p in csv.reader(f):
            people[int(c)] = float(p)
    g = nx.MultiDiGraph()
    g.add_nodes_from(range(int(meta["n_nodes"])))
    ends = {}
    with open(os.path.join(d, "edges.csv")) as f:
        r = csv.reader(f)
        next(r)
        for eid, a, b, w in r:
            eid, a, b = int(eid), int(a), int(b)
            # Searching from the sites: to_site times follow the edges backwards.
            if meta["direction"] == "to_site":
                a, b = b, a
            g.add_edge(a, b, key=eid, weight=float(w))
            ends[eid] = (a, b)

    def times():
        return nx.multi_source_dijkstra_path_length(g, set(sites), weight="weight")

    base = times()
    passed = failed = 0
    with open(os.path.join(d, "links.csv")) as f:
        rows = list(csv.DictReader(f))
    for row in rows:
        eids = [int(x) for x in row["eids"].split(";") if x]
        removed = []
        for e in eids:
            if e in ends:
                a, b = ends[e]
                removed.append((a, b, e, g.edges[a, b, e]["weight"]))
                g.remove_edge(a, b, key=e)
        var = times()
        for a, b, e, w in removed:
            g.add_edge(a, b, key=e, weight=w)
        pushed = cut = hours = 0.0
        for c, p in people.items():
            tb, tv = base.get(c, math.inf), var.get(c, math.inf)
            if tb <= limit and not tv <= limit:
                pushed += p
            if math.isfinite(tb) and not math.isfinite(tv):
                cut += p
            if math.isfinite(tb) and math.isfinite(tv):
                hours += p * (tv - tb) / 3600.0
        ours = (float(row["pushed_beyond"]), float(row["cut_off"]), float(row["added_person_h"]))
        ok = (abs(ours[0] - pushed) <= 1e-6 * max(1.0, pushed) and
              abs(ours[1] - cut) <= 1e-6 * max(1.0, cut) and
              abs(ours[2] - hours) <= 1e-6 * max(1.0, abs(hours)))
        if row["on_tree"] == "0":
            ok = ok and pushed == 0 and cut == 0 and abs(hours) <= 1e-9
        if ok:
            passed += 1
        else:
            failed += 1
            print("  link %s (on tree %s): ours %s, networkx %s" %
                  (row["link"], row["on_tree"], ours, (pushed, cut, hours)))
    if not rows:
        failed += 1
        print("  no links exported")
    print("%s: %d passed, %d failed" % (name, passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
