"""The singular locus of plane curves and a surface, two checkouts side by side (decision 0118, issue 19).

Run:  python benchmarks/bench_curve_locus.py --checkout /path/to/other/checkout [--seeds 1] [--quick]

Each (problem, seed) is computed by this checkout and by the other one, each in a child process of its own
(alternated, so that the machine's load falls on both), with ``OMP_NUM_THREADS=1``. Printed: CPU seconds of
``singular_locus`` in the child, the paths tracked, the monodromy loops of X's decomposition, the pieces, and
whether the two checkouts found the same isolated singular points (to 1e-6, relative). Expected pieces:

* T9(x) = T11(y): 40 real nodes and (0 : 1 : 0) at infinity; T7(x) = T8(y): 21 real nodes ((a-1)(b-1)/2 for
  coprime a, b: Koseleff and Pecker, "Chebyshev knots", J. Knot Theory Ramif. 2011, from memory);
* four random conics (degree 8): 24 nodes, 4 for each pair (Bezout; common practice, no source);
* two spheres of radius 2 with centres 1 apart: singular along their circle of intersection (dimension 1,
  degree 2; common practice, no source);
* (x^2 + y^2 - 1)^2 (y - x^2): the circle non-reduced, and the 2 real points where the parabola crosses it (a
  point on a non-reduced component lies on a larger piece; common practice, no source).
"""

import argparse
import json
import os
import subprocess
import sys

import checkout  # noqa: F401  (this checkout's numag, not an installed one)

_CHILD = r"""
import json, sys, time
import numpy as np
from numag.system.parse import parse_system
from numag.singular.locus import singular_locus
texts, names, seed = json.loads(sys.argv[1])
system = parse_system(texts, names)
cpu = time.process_time()
locus = singular_locus(system, seed=seed)
cpu = time.process_time() - cpu
pieces = {}
for c in locus.components:
    key = f"dim {c.dimension} deg {c.degree}" + (" at infinity" if c.at_infinity else "") + f" {c.kind}"
    pieces[key] = pieces.get(key, 0) + 1
points = [[[z.real, z.imag] for z in c.points[0]] for c in locus.isolated() if not c.at_infinity]
loops = sum(locus.variety.loops.values()) if locus.variety is not None else 0
print(json.dumps({"cpu": cpu, "paths": locus.paths.get("tracked", 0), "loops": loops, "pieces": pieces,
                  "points": points, "discarded": locus.discarded}))
"""


def chebyshev_text(degree, name):
    """T_degree(name) written out (T_0 = 1, T_1 = u, T_(k+1) = 2 u T_k - T_(k-1); common practice)."""
    previous, current = {0: 1}, {1: 1}
    for _ in range(degree - 1):
        following = {}
        for power, value in current.items():
            following[power + 1] = following.get(power + 1, 0) + 2 * value
        for power, value in previous.items():
            following[power] = following.get(power, 0) - value
        previous, current = current, following
    return " + ".join(f"({value})*{name}^{power}" for power, value in sorted(current.items()) if value)


def problems(quick):
    import numpy as np
    rng = np.random.default_rng(7)
    conics = []
    for _ in range(4):
        c = rng.integers(-5, 6, size=6)
        conics.append(f"({c[0]}*x^2 + {c[1]}*x*y + {c[2]}*y^2 + {c[3]}*x + {c[4]}*y + {c[5]})")
    cases = [("T9=T11", [f"{chebyshev_text(9, 'x')} - ({chebyshev_text(11, 'y')})"], ["x", "y"]),
             ("T7=T8", [f"{chebyshev_text(7, 'x')} - ({chebyshev_text(8, 'y')})"], ["x", "y"]),
             ("4 conics", ["*".join(conics)], ["x", "y"]),
             ("2 spheres", ["(x^2 + y^2 + z^2 - 4)*((x - 1)^2 + y^2 + z^2 - 4)"], ["x", "y", "z"]),
             ("double circle", ["(x^2 + y^2 - 1)^2*(y - x^2)"], ["x", "y"])]
    return cases[:2] if quick else cases


def run(root, texts, names, seed):
    env = dict(os.environ, OMP_NUM_THREADS="1", PYTHONPATH=str(root))
    out = subprocess.run([sys.executable, "-c", _CHILD, json.dumps([texts, names, seed])], env=env, cwd=str(root),
                         capture_output=True, text=True, check=True)
    return json.loads(out.stdout.strip().splitlines()[-1])


def same_points(first, second):
    import numpy as np
    a = [np.array([complex(*z) for z in p]) for p in first["points"]]
    b = [np.array([complex(*z) for z in p]) for p in second["points"]]
    return len(a) == len(b) and all(min(np.linalg.norm(p - q) for q in b) <= 1e-6 * (1 + np.linalg.norm(p))
                                    for p in a)


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--checkout", required=True, help="the other checkout (before)")
    parser.add_argument("--seeds", default="1")
    parser.add_argument("--quick", action="store_true", help="the two Chebyshev curves only")
    args = parser.parse_args()
    here = checkout.ROOT
    print(f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores; before = {args.checkout}")
    print(f"{'problem':14} {'seed':>4} {'cpu before':>10} {'cpu after':>9} {'paths':>11} {'loops':>7} same  pieces (after)")
    for name, texts, names in problems(args.quick):
        for seed in (int(s) for s in args.seeds.split(",")):
            before = run(args.checkout, texts, names, seed)
            after = run(here, texts, names, seed)
            same = same_points(before, after) and before["pieces"] == after["pieces"]
            pieces = "; ".join(f"{v} x {k}" for k, v in sorted(after["pieces"].items()))
            print(f"{name:14} {seed:4} {before['cpu']:10.2f} {after['cpu']:9.2f} {before['paths']:5}/{after['paths']:<5} "
                  f"{before['loops']:3}/{after['loops']:<3} {'yes' if same else 'NO ':4} {pieces}", flush=True)
            if after["discarded"] or before["discarded"]:
                print(f"{'':19} discarded before {before['discarded']} after {after['discarded']}")


if __name__ == "__main__":
    main()
