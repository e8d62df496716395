"""Singular-locus benchmark: many-nodal surfaces, Chebyshev curves, unions of surfaces; sympy beside numag.

Run:  python benchmarks/bench_singular.py [--quick] [--sympy-seconds 60]

Per problem: the singular pieces found (dimension:degree, count of isolated
points and how many are real) against the published or constructed answer,
paths tracked, failed paths, numag's seconds, and sympy's Groebner basis of the
singular-locus ideal (F and its partial derivatives) in a child process with a
time limit, with the ratio. Expected answers:

* Cayley's cubic surface: 4 nodes (Cayley 1869); the Kummer quartic with mu^2 = 2:
  16 nodes; Barth's sextic: 65 nodes (W. Barth, J. Algebraic Geom. 1996) -- the
  exact forms of the shared problem file;
* Chebyshev curves T_a(x) = T_b(y), a and b coprime: (a - 1)(b - 1)/2 nodes, all
  real (Koseleff and Pecker, "Chebyshev knots", J. Knot Theory Ramif. 2011; from
  memory);
* the union of k generic quadric surfaces in C^3: singular along the k(k - 1)/2
  pairwise intersection curves of degree 4 (Bezout), which meet in the triple
  points (singular points on those curves, not separate pieces).
"""

import argparse
import json
import math
import pathlib
import time


import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from families import chebyshev, quadric_unions as shared_quadric_unions
from reference_timing import run_with_time_limit
from numag.system.parse import parse_system
from numag.system.polynomial import PolynomialSystem
from numag.singular.locus import singular_locus

PROBLEMS = pathlib.Path(__file__).resolve().parent.parent / "tests" / "data" / "problems.json"


def surfaces():
    entries = {p["name"]: p for p in json.loads(PROBLEMS.read_text())}
    for name, nodes in (("cayley_cubic", 4), ("kummer_quartic_mu2_eq_2", 16), ("barth_sextic_exact", 65)):
        entry = entries[name]
        system = parse_system(entry["equations"], entry["variables"], projective=entry["projective"], name=name)
        yield system, f"{nodes} pts"


def chebyshev_curves(pairs):
    for a, b in pairs:
        f = chebyshev(a, 0, 2) - chebyshev(b, 1, 2)
        yield PolynomialSystem(["x", "y"], [f], name=f"T{a}(x)=T{b}(y)"), f"{(a - 1) * (b - 1) // 2} pts"


def quadric_unions(counts, seed=11):
    for k, system in shared_quadric_unions(counts, seed):
        yield system, f"{k * (k - 1) // 2}x 1:4"


def _sympy_singular(texts, names, projective, queue):
    import sympy
    symbols = sympy.symbols(names)
    f = sympy.sympify(texts[0].replace("^", "**"), locals=dict(zip(names, symbols)))
    ideal = [sympy.diff(f, s) for s in symbols] + ([] if projective else [f])
    if projective:  # a chart is enough for the timing: w = 1 (last variable)
        ideal = [g.subs(symbols[-1], 1) for g in ideal]
        symbols = symbols[:-1]
    start = time.perf_counter()
    sympy.groebner(ideal, *symbols, order="grevlex")
    queue.put(time.perf_counter() - start)


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--quick", action="store_true", help="the small problems only")
    parser.add_argument("--sympy-seconds", type=float, default=60.0)
    args = parser.parse_args()
    problems = list(surfaces())
    problems += list(chebyshev_curves([(3, 4), (5, 7)] if args.quick else [(3, 4), (5, 7), (7, 9), (9, 11)]))
    problems += list(quadric_unions([2] if args.quick else [2, 3]))
    header = (f"{'problem':22} {'expected':>9} {'found':>16} {'real':>5} {'paths':>7} {'failed':>6} {'seconds':>8} "
              f"{'sympy s':>8} {'ratio':>7}")
    print(header)
    print("-" * len(header))
    for system, expected in problems:
        locus = singular_locus(system, seed=1)
        affine = [c for c in locus.components if not c.at_infinity]
        points = [c for c in affine if c.dimension == 0 and c.kind == "singular"]
        curves = [f"{c.dimension}:{c.degree}" for c in affine if c.dimension > 0]
        found = (f"{len(points)} pts" + (" " + " ".join(curves) if curves else "")) if points or not curves \
            else " ".join(curves)
        real = sum(bool(c.real[0]) for c in points)
        failed = sum(locus.paths.get(k, 0) for k in ("minimum_step", "step_limit", "non_finite", "endgame_unsettled"))
        reference = run_with_time_limit(_sympy_singular, (system.to_texts(), system.variables, system.projective),
                                        args.sympy_seconds)
        ratio = f"{reference / locus.seconds:7.2f}" if reference else "      -"
        print(f"{system.name:22} {expected:>9} {found:>16} {real:5d} {locus.paths.get('tracked', 0):7d} {failed:6d} "
              f"{locus.seconds:8.2f} {('%8.2f' % reference) if reference else ' timeout':>8} {ratio}", flush=True)
    print(f"\nratio = sympy seconds / numag seconds (above 1: numag faster); sympy computes only the Groebner "
          f"basis of F and its partials (time limit {args.sympy_seconds:.0f} s), numag the whole locus with "
          "its evidence. 'k x 1:4' = k curves of dimension 1 and degree 4.")


if __name__ == "__main__":
    main()
