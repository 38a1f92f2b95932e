"""Cross-check of sitereach's travel times against networkx (Debian python3-networkx).

Usage: travel_networkx.py TEST_TRAVEL_BINARY WORKDIR [ROME99_GR]
1. TEST_TRAVEL --export WORKDIR/export writes two synthetic networks (walking to
   sites, 8 neighbours; vehicles from sites, 16 neighbours; both with hills, land
   cover, a river, a bridge, one-way and limited-access roads) with our nearest-site
   times; networkx's multi-source Dijkstra must give the same time for every node
   (1e-6 relative) and the same nearest site wherever there is no tie.
2. The DIMACS Rome99 road graph (.gr, arc weights in metres) is converted to a CSV
   edge list; igraph's distances (TEST_TRAVEL --csv-distances) from a few sources
   must equal networkx's single-source Dijkstra.
3. The same Rome99 edge list through the plain table input of the command line
   ('sitereach site' with inputs.tables.edges, directed, every node a demand
   unit, one candidate site): the cost of each node in assignment.csv is its
   shortest path TO the site, which must equal networkx's Dijkstra on the
   reversed graph. Needs SITEREACH_BIN (tests/run.sh sets it).
Prints 'travel_networkx: N passed, M failed' last; exits 1 on any failure.
"""
import csv
import math
import os
import subprocess
import sys

import networkx as nx

passed = 0
failed = 0


def check(ok, what):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL:", what)


def close(a, b, rel=1e-6):
    if math.isinf(a) or math.isinf(b):
        return a == b
    return abs(a - b) <= rel * max(abs(b), 1e-9)


def read_edges(path):
    g = nx.MultiDiGraph()
    with open(path) as f:
        r = csv.reader(f)
        next(r)
        for a, b, w in r:
            g.add_edge(int(a), int(b), weight=float(w))
    return g


def read_sources(d):
    """direction, node count and site nodes from an exported sources.csv."""
    direction, n_nodes, sites = None, 0, []
    with open(os.path.join(d, "sources.csv")) as f:
        for key, val in csv.reader(f):
            if key == "direction":
                direction = val
            elif key == "n_nodes":
                n_nodes = int(val)
            elif key == "site":
                sites.append(int(val))
    return direction, n_nodes, sites


def check_export(d):
    direction, n_nodes, sites = read_sources(d)
    g = read_edges(os.path.join(d, "edges.csv"))
    g.add_nodes_from(range(n_nodes))
    # to_site: people travel to the site, so search the reversed graph from the sites.
    if direction == "to_site":
        g = g.reverse(copy=True)
    multi = nx.multi_source_dijkstra_path_length(g, set(sites), weight="weight")
    single = [nx.single_source_dijkstra_path_length(g, s, weight="weight") for s in sites]
    bad_t = bad_s = ties = labelled = 0
    with open(os.path.join(d, "result.csv")) as f:
        r = csv.reader(f)
        next(r)
        for node, t, site in r:
            v, t, site = int(node), float(t), int(site)
            ref = multi.get(v, math.inf)
            if not close(t, ref):
                bad_t += 1
                if bad_t <= 5:
                    print("  %s node %d: ours %.17g, networkx %.17g" % (d, v, t, ref))
            if math.isinf(ref):
                if site != -1:
                    bad_s += 1
                continue
            ds = sorted((single[i].get(v, math.inf), i) for i in range(len(sites)))
            if len(ds) > 1 and ds[1][0] - ds[0][0] <= 1e-9 * max(ds[0][0], 1.0):
                ties += 1
                continue
            labelled += 1
            if site != ds[0][1]:
                bad_s += 1
                if bad_s <= 5:
                    print("  %s node %d: our site %d, networkx %d" % (d, v, site, ds[0][1]))
    name = os.path.basename(d)
    check(bad_t == 0, "%s: %d nodes with a different time" % (name, bad_t))
    check(bad_s == 0, "%s: %d nodes with a different nearest site" % (name, bad_s))
    check(labelled > n_nodes // 2, "%s: only %d of %d nodes compared for the nearest site"
          % (name, labelled, n_nodes))
    print("%s: %d nodes, %d compared by site, %d ties skipped" % (name, n_nodes, labelled, ties))


def check_rome(binary, gr, work):
    csv_path = os.path.join(work, "rome99.csv")
    n_arcs = 0
    with open(gr) as f, open(csv_path, "w") as out:
        out.write("from,to,weight\n")
        for line in f:
            if line.startswith("a "):
                _, u, v, w = line.split()
                out.write("%d,%d,%s\n" % (int(u) - 1, int(v) - 1, w))
                n_arcs += 1
    check(n_arcs == 8870, "rome99: %d arcs read, the header says 8870" % n_arcs)
    g = read_edges(csv_path)
    sources = [0, 1000, 3352]
    out = subprocess.run([binary, "--csv-distances", csv_path] + [str(s) for s in sources],
                         check=True, capture_output=True, text=True).stdout.splitlines()
    ours = {}
    for line in out[1:]:
        s, v, dd = line.split(",")
        ours[(int(s), int(v))] = float(dd)
    for s in sources:
        ref = nx.single_source_dijkstra_path_length(g, s, weight="weight")
        bad = sum(1 for v in range(3353) if not close(ours.get((s, v), -1.0),
                                                      ref.get(v, math.inf), 1e-12))
        check(bad == 0, "rome99 from node %d: %d distances differ" % (s, bad))


def check_rome_tables(gr_csv, work):
    """Rome99 through 'sitereach site' on an edge-list table (from,to,cost)."""
    binary = os.environ.get("SITEREACH_BIN")
    if not binary or not os.path.exists(binary):
        check(False, "rome99 tables: SITEREACH_BIN not set or not built")
        return
    edges = os.path.join(work, "rome99_edges.csv")
    with open(gr_csv) as f, open(edges, "w") as out:
        next(f)
        out.write("from,to,cost\n")
        for line in f:
            out.write(line)
    with open(os.path.join(work, "rome99_demand.csv"), "w") as f:
        f.write("id,weight\n" + "".join("%d,1\n" % v for v in range(3353)))
    g = read_edges(gr_csv).reverse(copy=True)
    for s in (0, 1000, 3352):
        with open(os.path.join(work, "rome99_site.csv"), "w") as f:
            f.write("id\n%d\n" % s)
        scen = os.path.join(work, "rome99_%d.json" % s)
        with open(scen, "w") as f:
            f.write('{"inputs": {"tables": {"edges": "rome99_edges.csv", "directed": true, '
                    '"demand": "rome99_demand.csv", "sites": "rome99_site.csv"}}, '
                    '"siting": {"model": "p_median", "p": 1}}')
        outdir = os.path.join(work, "rome99_out_%d" % s)
        subprocess.run([binary, "site", scen, "-o", outdir, "--quiet"], check=True)
        ours = {}
        with open(os.path.join(outdir, "assignment.csv")) as f:
            for row in csv.DictReader(f):
                ours[int(row["demand_id"])] = float(row["cost"]) if row["site_id"] else math.inf
        ref = nx.single_source_dijkstra_path_length(g, s, weight="weight")
        bad = sum(1 for v in range(3353) if not close(ours.get(v, -1.0), ref.get(v, math.inf),
                                                      1e-12))
        check(bad == 0, "rome99 through the edge-list table, to node %d: %d costs differ"
              % (s, bad))


def main():
    binary, work = sys.argv[1], sys.argv[2]
    exp = os.path.join(work, "export")
    subprocess.run([binary, "--export", exp], check=True)
    for sub in ("walk_to", "vehicle_from"):
        check_export(os.path.join(exp, sub))
    if len(sys.argv) > 3 and os.path.exists(sys.argv[3]):
        check_rome(binary, sys.argv[3], work)
        check_rome_tables(os.path.join(work, "rome99.csv"), work)
    else:
        check(False, "rome99.gr not found")
    print("travel_networkx: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
