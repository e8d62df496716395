"""Singular loci of small plane curves as written, in units 1000 times larger and after a rational linear change,
seeds 1-3: this checkout beside another (child processes) and against sympy (decision 0123).

Run:  python benchmarks/bench_curve_invariance.py --checkout /path/to/other/checkout

References: the reduced curves' singular points are sympy's solutions of f = f_x = f_y = 0 (common practice, no
source); T5(x) = T7(y) has (5 - 1)(7 - 1)/2 = 12 nodes (Koseleff and Pecker, "Chebyshev knots", 2011, from memory);
(x - y + 1)^2 (x^2 + y^2 - 4) is non-reduced along its doubled line (common practice, no source).
"""
import argparse

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
import numpy as np
import sympy as sp
from bench_curve_locus import run, chebyshev_text
x, y = sp.symbols("x y")
T5 = sp.sympify(chebyshev_text(5, 'x').replace('^', '**')); T7 = sp.sympify(chebyshev_text(7, 'y').replace('^', '**'))
curves = {"tacnode": y**2 - x**4, "cusp": y**2 - x**3, "lines": (x - y) * (x + 2*y - 1) * (2*x - y + 3),
          "double line": (x - y + 1)**2 * (x**2 + y**2 - 4), "T5=T7": T5 - T7}
changes = {"orig": {x: x, y: y}, "x1000": {x: x / 1000, y: y / 1000},
           "linear": {x: sp.Rational(3, 5) * x + sp.Rational(2, 7) * y + sp.Rational(1, 3),
                      y: sp.Rational(-1, 4) * x + sp.Rational(5, 6) * y - sp.Rational(2, 9)}}
def text(e):
    return str(sp.expand(e)).replace('**', '^')
parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
parser.add_argument("--checkout", required=True, help="the other checkout (before)")
args = parser.parse_args()
root_after, root_before = checkout.ROOT, args.checkout
bad = 0
for cname, f in curves.items():
    for chname, sub in changes.items():
        g = sp.expand(f.xreplace(sub))
        expected = None
        if cname not in ("double line", "T5=T7"):
            sols = sp.solve([g, sp.diff(g, x), sp.diff(g, y)], [x, y], dict=True)
            expected = [np.array([complex(s[x]), complex(s[y])]) for s in sols]
        for seed in (1, 2, 3):
            a = run(root_after, [text(g)], ["x", "y"], seed)
            b = run(root_before, [text(g)], ["x", "y"], seed)
            pts = [np.array([complex(*z) for z in p]) for p in a["points"]]
            same = a["pieces"] == b["pieces"] and len(a["points"]) == len(b["points"])
            ok = True
            if expected is not None:
                ok = len(pts) == len(expected) and all(
                    min(np.linalg.norm(p - q) for q in pts) <= 1e-6 * (1 + np.linalg.norm(p)) for p in expected)
            elif cname == "T5=T7":
                ok = a["pieces"].get("dim 0 deg 1 singular", 0) == 12
            else:
                ok = any(k.startswith("dim 1") and "non-reduced" in k for k in a["pieces"])
            bad += (not ok)
            print(f"{cname:12} {chname:7} seed {seed}: cpu {b['cpu']:.2f} -> {a['cpu']:.2f}, paths {b['paths']}/{a['paths']}, "
                  f"same as before {'yes' if same else 'NO'}, right {'yes' if ok else 'NO'}  {a['pieces']}", flush=True)
print("wrong:", bad)
