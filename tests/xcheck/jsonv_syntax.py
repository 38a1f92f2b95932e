"""Cross-check of jsonv's JSON syntax errors against Python's json module.

Mutates a small scenario text at random (fixed seed), and for each mutant
compares with json.loads (Debian python3 3.11, strict mode, NaN/Infinity
refused): both must accept or both refuse, and on refusal the line and column
must agree, except where the two parsers stop at different places by design
(number and \\u escape errors: Python reads the longest valid number and
points at what follows; jsonv points inside the number)."""
import json
import os
import random
import subprocess
import sys
import tempfile

BASE = """{
  "name": "Lowmoor Dístrict — wet season",
  "inputs": {
    "population": "pop.tif",
    "roads": {"path": "roads.gpkg", "class_field": "highway", "access_field": null}
  },
  "travel": {
    "mode": "walk", "neighbours": 16, "walk": {"speed_kmh": 4.5, "slope": true},
    "landcover_factors": {"10": 1.0, "20": 0.5e0, "30": -0}
  },
  "coverage": {"limit_min": 60, "bands_min": [30, 60, 120]}
}
"""
INSERT = list('{}[]:,"\\ \n\t\x01.-+eE0123456789tfnul/\'') + ["true", "null", "é"]


def refuse_constant(name):
    raise ValueError("constant " + name)


def python_verdict(text):
    try:
        json.loads(text, parse_constant=refuse_constant)
        return None
    except json.JSONDecodeError as err:
        return (err.lineno, err.colno)
    except ValueError:
        return "constant"
    except RecursionError:
        return "deep"


def mutate(rng, text):
    for _ in range(rng.randint(1, 2)):
        i = rng.randrange(len(text))
        op = rng.randrange(3)
        if op == 0:
            text = text[:i] + text[i + 1:]
        elif op == 1:
            text = text[:i] + rng.choice(INSERT) + text[i:]
        else:
            text = text[:i] + rng.choice(INSERT) + text[i + 1:]
    return text


def main():
    exe = os.path.join(os.environ["SITEREACH_BUILD"], "tests", "test_jsonv")
    rng = random.Random(20261202)
    passed = failed = 0
    accepted = compared = 0
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "m.json")
        cases = [BASE] + [mutate(rng, BASE) for _ in range(1500)]
        for text in cases:
            with open(path, "w", encoding="utf-8") as f:
                f.write(text)
            run = subprocess.run([exe, "--locate", path], capture_output=True, text=True)
            out = run.stdout.strip()
            if run.returncode != 0 or not out:
                failed += 1
                print("CRASH (exit %d) on: %r\n%s" % (run.returncode, text[:200], run.stderr[-2000:]),
                      file=sys.stderr)
                continue
            ours = None if out == "ok" else tuple(int(x) for x in out.split()[:2])
            msg = "" if out == "ok" else out
            theirs = python_verdict(text)
            if theirs == "constant":
                ok = ours is not None  # NaN, Infinity: Python extensions we refuse
            elif (theirs is None) != (ours is None):
                ok = False
            elif theirs is None:
                ok = True
                accepted += 1
            elif "digit" in msg or "leading zeros" in msg or "\\u" in msg or "is empty" in msg:
                ok = True  # both refuse; positions differ by design (see above)
            else:
                ok = theirs == ours
                compared += 1
            if ok:
                passed += 1
            else:
                failed += 1
                if failed <= 10:
                    print("MISMATCH python %r jsonv %r: %s" % (theirs, out, text[:200]),
                          file=sys.stderr)
    print("%d texts: %d valid, %d positions compared" % (len(cases), accepted, compared))
    print("jsonv_syntax: %d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
