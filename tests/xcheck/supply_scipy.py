"""Cross-check of the shipment model: random small instances are written as
text, solved by the model (GLPK, through "test_supply --solve FILE") and by an
independent formulation of the same MIP in scipy.optimize.milp (HiGHS); the
optimal objectives must agree. Usage: supply_scipy.py TEST_SUPPLY_BINARY [N]."""
import math
import os
import random
import subprocess
import sys
import tempfile

import numpy as np
from scipy.optimize import Bounds, LinearConstraint, milp

INF = math.inf


def random_instance(rng):
    C, D, S, K = rng.randint(1, 3), rng.randint(1, 3), rng.randint(1, 4), rng.randint(1, 2)
    comm = [(rng.choice([0.5, 1, 2]), rng.choice([0.001, 0.002, 0.01]),
             rng.choice([1, 10, 50]), rng.choice([1, 2, 3])) for _ in range(C)]
    # Stocks and needs in whole packs, so both sides read the same pack counts.
    stock = [[rng.randint(0, 30) * comm[c][2] for c in range(C)] for _ in range(D)]
    need = [[rng.randint(0, 25) * comm[c][2] for c in range(C)] for _ in range(S)]
    storage = [rng.choice([INF, INF, 0.0, round(rng.uniform(0.5, 8), 3)]) for _ in range(S)]
    time = [[INF if rng.random() < 0.15 else float(rng.randint(600, 7200)) for _ in range(S)]
            for _ in range(D)]
    dist = [[0.0 if time[d][s] == INF else time[d][s] * rng.uniform(5, 15) for s in range(S)]
            for d in range(D)]
    trucks = [(rng.choice([500.0, 1000.0, 3000.0]), rng.choice([2.0, 5.0, 10.0]),
               rng.randint(0, 3), rng.uniform(10, 50), rng.uniform(0.001, 0.002),
               float(rng.randint(600, 3600)), rng.randint(4, 20) * 3600.0) for _ in range(K)]
    objective = rng.randint(0, 1)
    penalty = rng.choice([0.05, 0.5, 5.0])
    return dict(C=C, D=D, S=S, K=K, comm=comm, stock=stock, need=need, storage=storage,
                time=time, dist=dist, trucks=trucks, objective=objective, penalty=penalty)


def fmt(v):
    return "inf" if v == INF else repr(float(v))


def write(inst, path):
    with open(path, "w") as f:
        f.write("%d %d %d %d %d %r\n" % (inst["C"], inst["D"], inst["S"], inst["K"],
                                         inst["objective"], inst["penalty"]))
        for c in inst["comm"]:
            f.write(" ".join(fmt(v) for v in c) + "\n")
        for row in inst["stock"]:
            f.write(" ".join(fmt(v) for v in row) + "\n")
        for row in inst["need"]:
            f.write(" ".join(fmt(v) for v in row) + "\n")
        f.write(" ".join(fmt(v) for v in inst["storage"]) + "\n")
        for row in inst["time"]:
            f.write(" ".join(fmt(v) for v in row) + "\n")
        for row in inst["dist"]:
            f.write(" ".join(fmt(v) for v in row) + "\n")
        for t in inst["trucks"]:
            f.write("%r %r %d %r %r %r %r\n" % t)


def solve_scipy(inst):
    """The model as written in docs/supply.md, on every reachable pair.
    HiGHS's presolve (scipy 1.10) called a plan worse than "everything short"
    optimal on one instance (generator seed 122: 479.32 against 262.40, which
    GLPK found), so the reference is solved without presolve."""
    C, D, S, K = inst["C"], inst["D"], inst["S"], inst["K"]
    comm, trucks, time = inst["comm"], inst["trucks"], inst["time"]
    pairs = [(d, s) for d in range(D) for s in range(S) if time[d][s] != INF]
    need_p = [[round(inst["need"][s][c] / comm[c][2]) for c in range(C)] for s in range(S)]
    stock_p = [[round(inst["stock"][d][c] / comm[c][2]) for c in range(C)] for d in range(D)]
    cols, cost, integ, lo, hi = {}, [], [], [], []

    def col(key, c_, i_, l_, h_):
        cols[key] = len(cost)
        cost.append(c_)
        integ.append(i_)
        lo.append(l_)
        hi.append(h_)

    for (d, s) in pairs:
        for c in range(C):
            col(("q", c, d, s), 0.0, 1, 0, INF)
        for k, tk in enumerate(trucks):
            trip = 2 * time[d][s] + tk[5]
            if tk[2] <= 0 or tk[6] <= 0 or trip > tk[6]:
                continue  # one truck cannot do this round trip in its hours
            h = trip / 3600.0
            cst = h if inst["objective"] == 0 else tk[3] * h + tk[4] * 2 * inst["dist"][d][s]
            col(("t", d, s, k), cst, 1, 0, INF)
    for s in range(S):
        for c in range(C):
            col(("u", c, s), inst["penalty"] * comm[c][3] * comm[c][2], 0, 0, INF)
    n = len(cost)
    rows, rlo, rhi = [], [], []

    def row(entries, l_, h_):
        r = np.zeros(n)
        for key, v in entries:
            if key in cols:
                r[cols[key]] += v
        rows.append(r)
        rlo.append(l_)
        rhi.append(h_)

    for s in range(S):
        for c in range(C):
            row([(("q", c, d, s), 1) for d in range(D)] + [(("u", c, s), 1)],
                need_p[s][c], need_p[s][c])
    for d in range(D):
        for c in range(C):
            row([(("q", c, d, s), 1) for s in range(S)], -INF, stock_p[d][c])
    for (d, s) in pairs:
        for j, cap in ((0, 0), (1, 1)):  # weight (kg), then volume (m3)
            row([(("q", c, d, s), comm[c][2] * comm[c][j]) for c in range(C)] +
                [(("t", d, s, k), -trucks[k][cap]) for k in range(K)], -INF, 0)
    for k, tk in enumerate(trucks):
        row([(("t", d, s, k), (2 * time[d][s] + tk[5]) / 3600.0) for (d, s) in pairs],
            -INF, tk[6] / 3600.0 * tk[2])
    for s in range(S):
        if inst["storage"][s] != INF:
            row([(("q", c, d, s), comm[c][2] * comm[c][1]) for d in range(D) for c in range(C)],
                -INF, inst["storage"][s])
    res = milp(np.array(cost), integrality=np.array(integ), bounds=Bounds(lo, hi),
               constraints=LinearConstraint(np.array(rows), rlo, rhi),
               options={"mip_rel_gap": 0, "presolve": False})
    if res.status != 0:
        raise RuntimeError("scipy milp: " + res.message)
    return res.fun


def main():
    binary = sys.argv[1]
    count = int(sys.argv[2]) if len(sys.argv) > 2 else 40
    rng = random.Random(20240611)
    passed = failed = 0
    with tempfile.TemporaryDirectory(prefix="supply_xcheck_") as tmp:
        for i in range(count):
            inst = random_instance(rng)
            path = os.path.join(tmp, "inst%d.txt" % i)
            write(inst, path)
            out = subprocess.run([binary, "--solve", path], capture_output=True, text=True)
            ref = solve_scipy(inst)
            words = out.stdout.split()
            if out.returncode != 0 or len(words) < 4 or words[3] != "optimal":
                failed += 1
                print("instance %d: model failed: %s %s" % (i, out.stdout, out.stderr))
                continue
            got = float(words[1])
            if abs(got - ref) <= 1e-6 * max(1.0, abs(ref)):
                passed += 1
            else:
                failed += 1
                print("instance %d: GLPK %.10g, scipy/HiGHS %.10g" % (i, got, ref))
    print("supply_scipy: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
