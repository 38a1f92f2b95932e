"""Cross-check of the site-selection models against scipy.optimize.milp (HiGHS),
and of the edge-list loader's shortest paths against networkx.

Small random instances are written as CSV tables (cost matrix, demand, sites),
solved by our solver through the table loader (test_tables --solve) and by an
independent textbook formulation in scipy; the optimal objectives must agree.
Usage: models_scipy.py BUILD_DIR [N_PER_KIND]
"""
import os
import subprocess
import sys
import tempfile

import networkx as nx
import numpy as np
from scipy.optimize import Bounds, LinearConstraint, milp
from scipy.sparse import lil_matrix


def instance(rng, nu, ns, density):
    """Random units, sites and a sparse cost matrix (integer seconds)."""
    w = rng.integers(1, 100, nu).astype(float)
    pairs = {}
    for j in range(nu):
        for i in range(ns):
            if rng.random() < density:
                pairs[(j, i)] = float(rng.integers(0, 1000))
    cap = rng.integers(100, 800, ns).astype(float)
    fix = rng.integers(0, 5000, ns).astype(float)
    return w, pairs, cap, fix


def write(d, w, pairs, cap, fix):
    with open(os.path.join(d, "demand.csv"), "w") as f:
        f.write("id,weight\n")
        for j, x in enumerate(w):
            f.write(f"u{j},{x:.17g}\n")
    with open(os.path.join(d, "sites.csv"), "w") as f:
        f.write("id,capacity,fixed_cost\n")
        for i in range(len(cap)):
            f.write(f"s{i},{cap[i]:.17g},{fix[i]:.17g}\n")
    with open(os.path.join(d, "matrix.csv"), "w") as f:
        f.write("demand_id,site_id,cost\n")
        for (j, i), c in pairs.items():
            f.write(f"u{j},s{i},{c:.17g}\n")


def ours(build, d, kind, p, limit, penalty, share):
    out = subprocess.run(
        [os.path.join(build, "tests", "test_tables"), "--solve", kind,
         os.path.join(d, "matrix.csv"), os.path.join(d, "demand.csv"),
         os.path.join(d, "sites.csv"), str(p), repr(limit), repr(penalty), repr(share)],
        capture_output=True, text=True, check=False)
    if out.returncode != 0:
        raise RuntimeError(out.stderr.strip())
    return float(out.stdout.split()[1])


def solve(c, A_rows, integrality, lo, hi):
    """milp with rows given as (dict col->coef, lb, ub)."""
    n = len(c)
    A = lil_matrix((len(A_rows), n))
    lb = np.empty(len(A_rows))
    ub = np.empty(len(A_rows))
    for r, (coefs, a, b) in enumerate(A_rows):
        for k, v in coefs.items():
            A[r, k] = v
        lb[r], ub[r] = a, b
    res = milp(c=np.array(c), constraints=[LinearConstraint(A.tocsr(), lb, ub)],
               integrality=np.array(integrality), bounds=Bounds(np.array(lo), np.array(hi)))
    if res.status != 0:
        raise RuntimeError("scipy milp: " + res.message)
    return res.fun


def ref_maxcover(w, pairs, ns, p, limit):
    nu = len(w)
    cov = [[i for i in range(ns) if pairs.get((j, i), np.inf) <= limit] for j in range(nu)]
    c = [0.0] * ns + [-x for x in w]
    rows = [({**{i: -1.0 for i in cov[j]}, ns + j: 1.0}, -np.inf, 0.0) for j in range(nu)]
    rows.append(({i: 1.0 for i in range(ns)}, -np.inf, p))
    return -solve(c, rows, [1] * ns + [0] * nu, [0] * (ns + nu), [1] * (ns + nu))


def ref_setcover(w, pairs, ns, limit):
    nu = len(w)
    cov = [[i for i in range(ns) if pairs.get((j, i), np.inf) <= limit] for j in range(nu)]
    rows = [({i: 1.0 for i in cov[j]}, 1.0, np.inf) for j in range(nu) if cov[j]]
    return solve([1.0] * ns, rows, [1] * ns, [0] * ns, [1] * ns)


def ref_setshare(w, pairs, ns, limit, share):
    """Fewest sites covering 'share' of the coverable persons."""
    nu = len(w)
    cov = [[i for i in range(ns) if pairs.get((j, i), np.inf) <= limit] for j in range(nu)]
    ok = [j for j in range(nu) if cov[j]]
    target = share * sum(w[j] for j in ok)
    rows = [({**{i: -1.0 for i in cov[j]}, ns + j: 1.0}, -np.inf, 0.0) for j in ok]
    rows.append(({ns + j: w[j] for j in ok}, target * (1 - 1e-12), np.inf))
    return solve([1.0] * ns + [0.0] * nu, rows, [1] * ns + [0] * nu, [0] * (ns + nu),
                 [1] * ns + [1 if cov[j] else 0 for j in range(nu)])


def ref_assign(w, pairs, cap, fix, p, limit, penalty, kind):
    """Classical formulation with x_ij, y_i and unserved u_j.
    kind 'median': sum y = p, cost w c x + P w u, no capacity, no fixed cost.
    kind 'capacity'/'capacity1': fixed costs, capacities, per-person cost."""
    nu, ns = len(w), len(cap)
    use = [(j, i, c) for (j, i), c in pairs.items() if c <= limit]
    if kind == "median":
        penalty = min(penalty, np.inf)
        use = [(j, i, c) for (j, i, c) in use if c < penalty]
    nx = len(use)
    c = ([0.0 if kind == "median" else fix[i] for i in range(ns)]
         + [w[j] * cc for (j, i, cc) in use] + [penalty * w[j] for j in range(nu)])
    rows = []
    for j in range(nu):
        coefs = {ns + k: 1.0 for k, (jj, i, cc) in enumerate(use) if jj == j}
        coefs[ns + nx + j] = 1.0
        rows.append((coefs, 1.0, 1.0))
    for k, (j, i, cc) in enumerate(use):
        rows.append(({ns + k: 1.0, i: -1.0}, -np.inf, 0.0))
    if kind == "median":
        rows.append(({i: 1.0 for i in range(ns)}, p, p))
    else:
        for i in range(ns):
            coefs = {ns + k: w[j] for k, (j, ii, cc) in enumerate(use) if ii == i}
            coefs[i] = -cap[i]
            rows.append((coefs, -np.inf, 0.0))
        if p >= 0:
            rows.append(({i: 1.0 for i in range(ns)}, -np.inf, p))
    xint = 1 if kind == "capacity1" else 0
    integ = [1] * ns + [xint] * nx + [0] * nu
    return solve(c, rows, integ, [0] * (ns + nx + nu), [1] * (ns + nx + nu))


def check_network(build, d, rng, directed):
    """Shortest-path costs from the edge-list loader (igraph) against networkx
    Dijkstra on a random graph with repeated edges. Returns (passed, failed)."""
    n = int(rng.integers(20, 60))
    g = nx.DiGraph() if directed else nx.Graph()
    g.add_nodes_from(range(n))
    edges = []
    for _ in range(3 * n):
        a, b = int(rng.integers(0, n)), int(rng.integers(0, n))
        c = float(rng.integers(1, 100)) + 0.5 * float(rng.integers(0, 2))
        edges.append((a, b, c))
        # Parallel edges: the cheaper one counts on the road.
        if g.has_edge(a, b):
            c = min(c, g[a][b]["weight"])
        g.add_edge(a, b, weight=c)
    units = sorted(set(int(x) for x in rng.integers(0, n, 12)))
    sites = sorted(set(int(x) for x in rng.integers(0, n, 5)))
    with open(os.path.join(d, "edges.csv"), "w") as f:
        f.write("from,to,cost\n")
        for a, b, c in edges:
            f.write(f"n{a},n{b},{c}\n")
    # Every node must appear in the edge list for the loader; isolated ones
    # are dropped from the unit/site lists.
    used = {a for a, b, c in edges} | {b for a, b, c in edges}
    units = [u for u in units if u in used]
    sites = [s for s in sites if s in used]
    with open(os.path.join(d, "ndemand.csv"), "w") as f:
        f.write("id,weight\n" + "".join(f"n{u},1\n" for u in units))
    with open(os.path.join(d, "nsites.csv"), "w") as f:
        f.write("id\n" + "".join(f"n{s}\n" for s in sites))
    out = subprocess.run(
        [os.path.join(build, "tests", "test_tables"), "--network-costs",
         os.path.join(d, "edges.csv"), os.path.join(d, "ndemand.csv"),
         os.path.join(d, "nsites.csv"), "1" if directed else "0"],
        capture_output=True, text=True, check=False)
    if out.returncode != 0:
        print("network costs failed:", out.stderr.strip())
        return 0, 1
    got = {}
    for line in out.stdout.splitlines():
        u, s, c = line.split()
        got[(int(u[1:]), int(s[1:]))] = float(c)
    want = {}
    for u in units:
        dist = nx.single_source_dijkstra_path_length(g, u, weight="weight")
        for s in sites:
            if s in dist:
                want[(u, s)] = dist[s]
    ok = set(got) == set(want) and all(abs(got[k] - want[k]) <= 1e-9 for k in want)
    if not ok:
        print(f"network costs differ (directed={directed}): {len(got)} vs {len(want)} pairs")
    return (1, 0) if ok else (0, 1)


def main():
    build = sys.argv[1]
    n = int(sys.argv[2]) if len(sys.argv) > 2 else 8
    rng = np.random.default_rng(20260)
    passed = failed = 0
    with tempfile.TemporaryDirectory(prefix="sitereach-xcheck-") as d:
        for t in range(n):
            nu, ns = int(rng.integers(15, 40)), int(rng.integers(5, 14))
            w, pairs, cap, fix = instance(rng, nu, ns, 0.6)
            write(d, w, pairs, cap, fix)
            p = int(rng.integers(1, ns))
            limit = float(rng.integers(200, 700))
            cases = [
                ("maxcover", p, limit, 0.0, 1.0, ref_maxcover(w, pairs, ns, p, limit)),
                ("setcover", -1, limit, 0.0, 1.0, ref_setcover(w, pairs, ns, limit)),
                ("setcover", -1, limit, 0.0, 0.7, ref_setshare(w, pairs, ns, limit, 0.7)),
                ("median", p, limit, 1500.0, 1.0,
                 ref_assign(w, pairs, cap, fix, p, limit, 1500.0, "median")),
                ("median", p, float("inf"), 5000.0, 1.0,
                 ref_assign(w, pairs, cap, fix, p, np.inf, 5000.0, "median")),
                ("capacity", -1, limit, 3000.0, 1.0,
                 ref_assign(w, pairs, cap, fix, -1, limit, 3000.0, "capacity")),
                ("capacity1", p, float("inf"), 3000.0, 1.0,
                 ref_assign(w, pairs, cap, fix, p, np.inf, 3000.0, "capacity1")),
            ]
            for kind, pp, lim, pen, share, want in cases:
                try:
                    got = ours(build, d, kind, pp, lim, pen, share)
                except RuntimeError as exc:
                    print(f"instance {t} {kind}: our solver failed: {exc}")
                    failed += 1
                    continue
                if abs(got - want) <= 1e-6 * max(1.0, abs(want)):
                    passed += 1
                else:
                    failed += 1
                    print(f"instance {t} {kind} p={pp} limit={lim}: ours {got} scipy {want}")
        for directed in (False, True, False, True):
            p_, f_ = check_network(build, d, rng, directed)
            passed += p_
            failed += f_
    print(f"models_scipy: {passed} passed, {failed} failed")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
