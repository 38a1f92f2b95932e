"""Robust covering cross-check: random instances too large to enumerate
(120-200 units, 25-40 candidate sites, 3-5 scenarios, p = 4-8), solved by
tools/robust-solve (GLPK through src/models/robust.c) and by
scipy.optimize.milp (HiGHS) on the same model written out here from its
definition (no merging); the objectives must agree, and the plan robust-solve
returns must reach its objective when evaluated here.
Usage: robust_scipy.py BUILD_DIR"""
import os
import random
import subprocess
import sys
import tempfile

import numpy as np
from scipy.optimize import Bounds, LinearConstraint, milp
from scipy.sparse import lil_matrix

build = sys.argv[1]
passed = failed = 0


def check(cond, what):
    global passed, failed
    if cond:
        passed += 1
    else:
        failed += 1
        print("FAIL:", what)


def instance(rng):
    nu, ns, nv = rng.randint(120, 200), rng.randint(25, 40), rng.randint(3, 5)
    w = [rng.randint(1, 50) for _ in range(nu)]
    sw = [rng.choice([0.5, 1.0, 2.0]) for _ in range(nv)]
    # Sites and units on a plane; a scenario removes some pairs (closures).
    su = [(rng.random(), rng.random()) for _ in range(nu)]
    ss = [(rng.random(), rng.random()) for _ in range(ns)]
    cov = set()
    for v in range(nv):
        for j in range(nu):
            for i in range(ns):
                d = ((su[j][0] - ss[i][0]) ** 2 + (su[j][1] - ss[i][1]) ** 2) ** 0.5
                if d < 0.2 and (v == 0 or rng.random() > 0.35):
                    cov.add((v, j, i))
    return nu, ns, nv, w, sw, sorted(cov)


def scipy_solve(nu, ns, nv, w, sw, cov, obj, p):
    # Columns: y (ns), u (nv * nu), z (1, worst only).
    n = ns + nv * nu + 1
    c = np.zeros(n)
    if obj == 0:
        c[-1] = -1.0
    else:
        for v in range(nv):
            for j in range(nu):
                c[ns + v * nu + j] = -sw[v] * w[j]
    rows = nv * nu + nv + 1
    a = lil_matrix((rows, n))
    lo, hi = np.full(rows, -np.inf), np.zeros(rows)
    for v in range(nv):
        for j in range(nu):
            a[v * nu + j, ns + v * nu + j] = 1.0      # u_jv - sum y <= 0
    for (v, j, i) in cov:
        a[v * nu + j, i] = -1.0
    for v in range(nv):                                # z - sum w u_v <= 0
        r = nv * nu + v
        for j in range(nu):
            a[r, ns + v * nu + j] = -w[j]
        a[r, n - 1] = 1.0 if obj == 0 else 0.0
    for i in range(ns):                                # sum y <= p
        a[rows - 1, i] = 1.0
    hi[rows - 1] = p
    integrality = np.zeros(n)
    integrality[:ns] = 1
    ub = np.ones(n)
    ub[-1] = np.inf
    res = milp(c, constraints=LinearConstraint(a.tocsr(), lo, hi), integrality=integrality,
               bounds=Bounds(np.zeros(n), ub), options={"mip_rel_gap": 0})
    return -res.fun


def evaluate(nu, nv, w, sw, cov, open_sites, obj):
    per = [0.0] * nv
    hit = set((v, j) for (v, j, i) in cov if i in open_sites)
    for (v, j) in hit:
        per[v] += w[j]
    return min(per) if obj == 0 else sum(sw[v] * per[v] for v in range(nv))


rng = random.Random(20261202)
with tempfile.TemporaryDirectory() as tmp:
    for t in range(8):
        nu, ns, nv, w, sw, cov = instance(rng)
        obj, p = t % 2, rng.randint(4, 8)
        path = os.path.join(tmp, "inst.txt")
        with open(path, "w") as f:
            f.write(f"{nu} {ns} {nv} {obj} {p}\n")
            f.write(" ".join(str(x) for x in sw) + "\n")
            f.write(" ".join(str(x) for x in w) + "\n")
            for (v, j, i) in cov:
                f.write(f"{v} {j} {i}\n")
        out = subprocess.run([os.path.join(build, "tools", "robust-solve"), path],
                             capture_output=True, text=True)
        check(out.returncode == 0, f"instance {t}: robust-solve failed: {out.stderr.strip()}")
        if out.returncode != 0:
            continue
        got = {}
        for line in out.stdout.splitlines():
            k, _, rest = line.partition(" ")
            got[k] = rest
        mine = float(got["objective"])
        ref = scipy_solve(nu, ns, nv, w, sw, cov, obj, p)
        if os.environ.get("ROBUST_XCHECK_VERBOSE"):
            print(f"instance {t}: {nu} units, {ns} sites, {nv} scenarios, p={p}, GLPK {mine}, HiGHS {ref}, total {sum(w)}")
        check(abs(mine - ref) <= 1e-6 * max(1.0, abs(ref)),
              f"instance {t} ({'worst' if obj == 0 else 'expected'}, p={p}): GLPK {mine}, HiGHS {ref}")
        check(got["status"] == "optimal", f"instance {t}: status {got['status']}")
        opened = set(int(x) for x in got["open"].split())
        check(len(opened) <= p, f"instance {t}: {len(opened)} sites open, p = {p}")
        check(abs(evaluate(nu, nv, w, sw, cov, opened, obj) - mine) <= 1e-6 * max(1.0, mine),
              f"instance {t}: plan does not reach its objective")
print(f"robust_scipy: {passed} passed, {failed} failed")
sys.exit(1 if failed else 0)
