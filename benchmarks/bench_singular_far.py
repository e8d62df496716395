"""Singular points of features far from the origin relative to their size, in several units (decision 0083).

Run:  python benchmarks/bench_singular_far.py [--seeds 1 2 3] [--quick]
      (PYTHONPATH=OTHER_CHECKOUT python benchmarks/bench_singular_far.py measures another checkout's numag)

Cases (the geometry does not depend on where it sits; the exact answers come from sympy, the reference only):
- two circles of radius 5 about (c, -2c), (c + 6, -2c), one equation (their product), at c = 0, 123, 1234 and at
  1234 in units x1000 and x0.001: two nodes (sympy's solution of f = grad f = 0);
- a Chebyshev-type quartic surface 8 (u^4 - u^2 + v^4 - v^2 + w^4 - w^2) + 4 at (1234, -2345, 3456): 12 nodes
  (two of u, v, w at +-1/sqrt 2, one at 0; worked by hand, common practice, no source); skipped with --quick;
- an E6 curve (u + v/3)^3 + (u^2 + v - 2u/5)^4 at (1234, -2345): one singular point (its centre); skipped with
  --quick;
- curves with one singular point (decision 0090; ``--curves`` for these only): a node v^2 = u^2 (u + 1), a cusp
  v^2 = u^3 and a tacnode v^2 = u^4 in the plane, and the same in space (w = u + v^2; the tacnode's w = u + v),
  moved to (1234, -2345[, 3456]) in units x0.001, x1, x1000 (u = (x - 1234 unit) / unit, ...) and after a rational
  linear change (u, v, w) = A (x - 1234, y + 2345, z - 3456): one singular point (sympy's solution of F and the
  Jacobian's minors).

Printed per case and seed: found / expected, points reported, the exit code the command line would give (3 when a
completeness warning or an undecided piece is left), seconds, and SILENT for a wrong answer with exit 0; at the end
the rows right (all found, nothing more, exit 0), flagged (exit 3) and silent.
"""

import argparse
import itertools
import pathlib
import sys
import time
from fractions import Fraction

import checkout  # noqa: F401  (this checkout's numag first)
import numpy as np

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent.parent / "tests"))
from test_singular_far import affine_points, sympy_singular_points, two_circles, warnings_of  # noqa: E402

from numag import singular_locus  # noqa: E402
from numag.system.parse import parse_system  # noqa: E402

CENTRE = (1234, -2345, 3456)
QUARTIC = ("+".join(f"8*({v}-({c}))^4-8*({v}-({c}))^2" for v, c in zip("xyz", CENTRE)) + "+4", ["x", "y", "z"])
E6 = ("((x-(1234))+1/3*(y-(-2345)))^3+(-2/5*(x-(1234))+(y-(-2345))+(x-(1234))^2)^4", ["x", "y"])


#: Curves with one singular point at the origin of (u, v[, w]) (decision 0090).
CURVES = {
    "plane node": ["{v}^2 - {u}^2*({u} + 1)"],
    "plane cusp": ["{v}^2 - {u}^3"],
    "plane tacnode": ["{v}^2 - {u}^4"],
    "space node": ["{v}^2 - {u}^2*({u} + 1)", "{w} - {u} - {v}^2"],
    "space cusp": ["{v}^2 - {u}^3", "{w} - {u} - {v}^2"],
    "space tacnode": ["{v}^2 - {u}^4", "{w} - {u} - {v}"],
}
#: The rational linear changes (determinants 13/6 and 13/3: invertible).
CHANGES = {2: [[2, Fraction(1, 3)], [Fraction(-1, 2), 1]],
           3: [[2, Fraction(1, 3), -1], [Fraction(-1, 2), 1, Fraction(1, 4)], [1, Fraction(-2, 3), Fraction(3, 2)]]}


def moved_curve(templates, unit=1, change=False):
    """``templates`` in (u, v[, w]) written in x, y[, z]: moved to CENTRE (in ``unit``), or changed linearly there."""
    n = 3 if any("{w}" in t for t in templates) else 2
    names = ["x", "y", "z"][:n]
    offsets = [f"({name} - ({Fraction(c) * Fraction(unit)}))" for name, c in zip(names, CENTRE)]
    if change:
        forms = ["(" + " + ".join(f"({a})*{o}" for a, o in zip(row, offsets)) + ")" for row in CHANGES[n]]
    else:
        forms = [f"(({Fraction(1) / Fraction(unit)})*{o})" for o in offsets]
    return [t.format(**dict(zip("uvw", forms))) for t in templates], names


def quartic_nodes():
    nodes = []
    for zero in range(3):
        for signs in itertools.product([-1, 1], repeat=2):
            point = [s / np.sqrt(2) for s in signs]
            point.insert(zero, 0.0)
            nodes.append(np.array(point) + CENTRE)
    return np.array(nodes)


def matched(points, reference):
    return sum(bool(len(points)) and bool(np.any(np.linalg.norm(points - r, axis=1) <= 1e-7 * (1 + np.linalg.norm(r))))
               for r in reference)


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    parser.add_argument("--quick", action="store_true", help="the circles only")
    parser.add_argument("--curves", nargs="*", metavar="NAME",
                        help="the curves with one singular point only (all, or those named: 'space node', ...)")
    args = parser.parse_args()
    cases = [(f"circles at {c} x{unit}", *two_circles(c, unit), None)
             for c, unit in [(0, 1), (123, 1), (1234, 1), (1234, 1000), (1234, Fraction(1, 1000))]]
    if not args.quick:
        cases += [("quartic surface far", [QUARTIC[0]], QUARTIC[1], quartic_nodes()),
                  ("E6 curve far", [E6[0]], E6[1], np.array([[1234.0, -2345.0]]))]
    if args.curves is not None:
        cases = []
        for name in args.curves or list(CURVES):
            for unit, change in [(Fraction(1, 1000), False), (1, False), (1000, False), (1, True)]:
                cases.append((f"{name} {'lin' if change else 'x' + str(unit)}", *moved_curve(CURVES[name], unit, change),
                              None))
    silent = right = flagged = 0
    for label, equations, names, reference in cases:
        if reference is None:
            reference = sympy_singular_points(equations, names, len(equations))
        system = parse_system(equations, names)
        for seed in args.seeds:
            started = time.perf_counter()
            locus = singular_locus(system, seed=seed)
            seconds = time.perf_counter() - started
            points = affine_points(locus)
            found, code = matched(points, reference), 3 if warnings_of(locus) else 0
            wrong = (found != len(reference) or len(points) != len(reference)) and code == 0
            silent += wrong
            flagged += code == 3
            right += code == 0 and not wrong
            print(f"{label:26s} seed {seed}  found {found}/{len(reference)}  reported {len(points)}  exit {code}  "
                  f"{seconds:6.1f} s{'  SILENT' if wrong else ''}", flush=True)
    print(f"right {right}, flagged {flagged}, silent wrong answers: {silent}")


if __name__ == "__main__":
    main()
