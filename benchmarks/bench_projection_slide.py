"""check --point-tolerance where Newton slides to a singular point past a nearer smooth one (decision 0141).

Run:  python benchmarks/bench_projection_slide.py [--checkout DIR] [--cases node cone ...] [--seeds 1 2 3]

Each case is a given point g with a smooth point of X at distance at most d (sympy: an exact point of X, or the
nearest point by Lagrange multipliers) and the singular set at distance D > d (exact); the tolerance is (d + D) / 2,
so the verdict must be smooth, about a point within the tolerance. Cases: a node y^2 = x^2 (x + 1) from between its
branches, a cone x^2 + y^2 - z^2 and a Whitney umbrella x^2 - y^2 z (its complex sheet nearer than its singular line),
a cusp y^2 = x^3 from either side, 2 x 3 and 3 x 3 matrices of rank <= 1 (diag(t, t, ...)); each in units x1, x1000,
x1e-3, with and without a rational linear change, the point written exactly and as a 20-digit decimal, 3 seeds.
Tally: right (smooth within the tolerance), flagged (exit 3), WRONG (exit 0, another verdict or a point beyond the
tolerance). Measures this checkout, or another with ``--checkout`` (e.g. the main branch before this decision).
"""

import argparse
import io
import itertools
import json

import checkout

import sympy as sp

def case_list():
    x, y, z = sp.symbols("x y z")
    t = sp.Rational(1, 100)
    cases = []
    # name, vars, equations, given, a smooth point of X (nearest-ish), singular set as list of points or ('line', p, v)
    cases.append(("node", [x, y], [y**2 - x**2*(x+1)], [t, 0], None, [("pt", [0, 0])]))
    cases.append(("cone", [x, y, z], [x**2 + y**2 - z**2], [t, 0, 0], [t/2, 0, t/2], [("pt", [0, 0, 0])]))
    cases.append(("umbrella", [x, y, z], [x**2 - y**2*z], [0, t, -1], [sp.I*t/2, t/2, -1], [("line", [0, 0, 0], [0, 0, 1])]))
    cases.append(("cusp+", [x, y], [y**2 - x**3], [t, 0], None, [("pt", [0, 0])]))
    cases.append(("cusp-", [x, y], [y**2 - x**3], [-t, 0], [-t, sp.I * t * sp.sqrt(t)], [("pt", [0, 0])]))
    a = sp.symbols("a0:6"); M = sp.Matrix(2, 3, a)
    cases.append(("2x3r1", list(a), [M[:, [i, j]].det() for i, j in ((0, 1), (0, 2), (1, 2))],
                  [t, 0, 0, 0, t, 0], [t, 0, 0, 0, 0, 0], [("pt", [0] * 6)]))
    b = sp.symbols("b0:9"); N = sp.Matrix(3, 3, b)
    minors = [N.extract(list(r), list(c)).det() for r in itertools.combinations(range(3), 2) for c in itertools.combinations(range(3), 2)]
    cases.append(("3x3r1", list(b), minors, [t, 0, 0, 0, t, 0, 0, 0, 0], [t] + [0] * 8, [("pt", [0] * 9)]))
    return cases

def nearest_smooth(vars_, eqs, g):
    """An upper bound of the distance to X by a point of X found by mpmath (for the node/cusp: exact param)."""
    # Lagrange: minimise |v-g|^2 over real points; try several starts, keep the nearest converged
    best = None
    f = eqs[0]
    lam = sp.Symbol("lam")
    L = [sp.diff(sum((v - gi)**2 for v, gi in zip(vars_, g)) - lam * f, v) for v in vars_] + [f]
    for s in [(0.01, 0.01), (0.01, -0.01), (0.005, 0.005), (0.012, 0.001), (0.0, 0.01), (-0.005, 0.005)]:
        try:
            sol = sp.nsolve(L, list(vars_) + [lam], list(s) + [0.1], prec=30)
        except Exception:
            continue
        p = [sol[i] for i in range(len(vars_))]
        if all(abs(e) < 1e-25 for e in sp.Matrix([f.diff(v) for v in vars_]).subs(dict(zip(vars_, p)))):
            continue
        dist = sp.sqrt(sum((pi - gi)**2 for pi, gi in zip(p, g)))
        if best is None or dist < best[0]:
            best = (dist, p)
    return best

def transform(vars_, eqs, g, smooth, sing, scale, change):
    """x = A u / scale-coords: new coordinates u with x = A u * (1/scale)... returns new eqs, g', smooth', sing'."""
    n = len(vars_)
    A = sp.eye(n)
    if change:
        for i in range(n - 1):
            A[i, i + 1] = sp.Rational(1, 3)
        A[n - 1, 0] = -sp.Rational(1, 2)
    # u = scale * A^-1 x  <=>  x = A u / scale
    Ainv = A.inv()
    u = sp.symbols(f"u0:{n}")
    sub = dict(zip(vars_, list(A * sp.Matrix(u) / scale)))
    new_eqs = [sp.expand(e.subs(sub, simultaneous=True) * scale**sp.Poly(e, *vars_).total_degree()) for e in eqs]
    fwd = lambda p: list(scale * Ainv * sp.Matrix(p))
    g2 = fwd(g); sm2 = fwd(smooth)
    sing2 = []
    for s in sing:
        if s[0] == "pt":
            sing2.append(("pt", fwd(s[1])))
        else:
            sing2.append(("line", fwd(s[1]), list(Ainv * sp.Matrix(s[2]))))
    return u, new_eqs, g2, sm2, sing2

def dist(p, q):
    return sp.sqrt(sum(sp.Abs(a - b)**2 for a, b in zip(p, q)))

def dist_sing(g, s):
    if s[0] == "pt":
        return dist(g, s[1])
    p, v = sp.Matrix(s[1]), sp.Matrix(s[2])
    w = sp.Matrix(g) - p
    proj = (v.H * w)[0] / (v.H * v)[0]
    return sp.sqrt(sum(sp.Abs(c)**2 for c in (w - proj * v)))

def fmt(v):
    v = sp.nsimplify(v) if not v.is_Rational else v
    return str(v)

def run(name, u, eqs, g, T, seed, decimal, tmp):
    from numag.app.cli import main
    path = f"{tmp}/{name}.toml"
    names = [str(s) for s in u]
    with open(path, "w") as fh:
        fh.write("variables = [" + ", ".join(f'"{s}"' for s in names) + "]\n")
        fh.write("equations = [" + ", ".join('"' + str(e).replace("**", "^").replace("I", "i") + '"' for e in eqs) + "]\n")
    if decimal:
        point = ",".join(f"{s}={sp.N(c, 20)}" for s, c in zip(names, g))
    else:
        point = ",".join(f"{s}={c}" for s, c in zip(names, g))
    out = io.StringIO()
    code = main(["check", path, "--point", point, "--point-tolerance", f"{T:.6g}", "--json", "--seed", str(seed)], out=out)
    return code, json.loads(out.getvalue())["points"][0]

def main_bench():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--checkout", default=None, help="the checkout to measure (default: this one)")
    parser.add_argument("--cases", nargs="*", default=None)
    parser.add_argument("--seeds", nargs="*", type=int, default=[1, 2, 3])
    args = parser.parse_args()
    checkout.measure_other(args.checkout)
    import tempfile
    tmp = tempfile.mkdtemp()
    tally = {}
    for name, vars_, eqs, g, smooth, sing in case_list():
        if args.cases and name not in args.cases:
            continue
        if smooth is None:
            smooth = nearest_smooth(vars_, eqs, g)[1]
        for scale, change, decimal in itertools.product((1, 1000, sp.Rational(1, 1000)), (False, True), (False, True)):
            u, e2, g2, sm2, s2 = transform(vars_, eqs, g, smooth, sing, scale, change)
            d_ub = sp.N(dist(g2, sm2))
            D = min(sp.N(dist_sing(g2, s)) for s in s2)
            assert d_ub < D, (name, d_ub, D)
            size = sp.N(sp.sqrt(1 + sum(sp.Abs(c) ** 2 for c in g2)))
            T = float((d_ub + D) / 2 / size)
            for seed in args.seeds:
                code, v = run(name, u, e2, g2, T, seed, decimal, tmp)
                within = v.get("distance") is not None and v["distance"] <= T * float(size) * (1 + 1e-9)
                outcome = ("right" if v["verdict"] == "smooth" and within and code == 0 else
                           "flagged" if code == 3 else "WRONG")
                tally[(name, outcome)] = tally.get((name, outcome), 0) + 1
                print(name, f"scale={scale}", f"change={change}", f"decimal={decimal}", f"seed={seed}",
                      f"d<={float(d_ub):.3g} D={float(D):.3g} T={T:.3g}", v["verdict"], f"exit {code}",
                      f"distance {v.get('distance')}", outcome, flush=True)
    for key in sorted(tally):
        print(*key, tally[key])


if __name__ == "__main__":
    main_bench()
