"""Residual tests that do not depend on the unit (decision 0064): systems x units x seeds.

Run:  python benchmarks/bench_units.py [--quick] [--seeds 1 2 3] [--units 1/1000 1 1000] [--start polyhedral]

Each geometry is written with its lengths multiplied by a unit u (x -> x / u: the same curve in
millimetres, metres, kilometres), exact rational coefficients unless the name says "doubles". Per run:
the singular points found against the number the construction has, the candidates dropped (by reason),
whether the run warns (exit 3 on the command line) and the check's verdicts at known points (the centre
of an ellipse is off the curve; a point of the curve is smooth; a node or cusp is singular). A run is
"right" when the count is the construction's, no warning is raised and every check verdict is the
expected one; "undecided" when it warns and nothing reported is false; "wrong" otherwise. "newton": witness
points a residual bound would have kept that Newton's method refused (not a zero) / kept while still undecided.

Geometries (their singular points by construction; common practice, no source):
- tiny ellipse: ((x - 1/10) / a)^2 + ((y + 1/20) / (2 a))^2 = 1, a = 6/1000: smooth, centre off X.
- tiny ellipse (doubles): the same with coefficients rounded to doubles.
- huge ellipse: a = 6000 about (1/10, -1/20): smooth.
- ellipse 2e-4 at (1, 1/2): radius 2e-4 far from the origin: smooth, centre off X.
- small node: x'^2 - y'^2 + x'^3 / e in rotated coordinates (3/5, 4/5) about p = (1/7, -2/3), e = 1/100:
  one node at p (the loop has size e; the critical point at x' = -2 e / 3 is not on X). Also e = 1e-3, 1e-4.
- moved cusp: y'^2 - x'^3 / e about p, e = 1/100: one cusp at p.
- four-bar: ground pivots (0, 0) and (4, 0), crank 2, coupler 3, rocker 3 (Grashof equality, units of
  the lengths: metres at u = 1, millimetres at u = 1e3): one singular point, the folded configuration
  A = (-2, 0), B = (1, 0) (tests/corpus.py, sympy Groebner basis).
"""

import argparse
import collections
import time
from fractions import Fraction

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag import check_points, singular_locus
from numag.app.report import completeness_warnings, singular_to_dict
from numag.singular.locus import SingularOptions
from numag.system.parse import parse_system
from numag.system.polynomial import PolynomialSystem
from numag.tracking.starts import StartKind


def _q(value):
    """A rational as text the parser reads exactly."""
    value = Fraction(value)
    return f"({value.numerator}/{value.denominator})"


def _ellipse(unit, radius, doubles=False, centre=(Fraction(1, 10), Fraction(-1, 20))):
    centre = (centre[0] * unit, centre[1] * unit)
    a, b = radius * unit, 2 * radius * unit
    text = f"((x - {_q(centre[0])})/{_q(a)})^2 + ((y - {_q(centre[1])})/{_q(b)})^2 - 1"
    system = parse_system([text], ["x", "y"])
    if doubles:
        system = PolynomialSystem(["x", "y"], [p.numeric() for p in system.polynomials])
    on_curve = (float(centre[0] + a * Fraction(3, 5)), float(centre[1] + b * Fraction(4, 5)))
    return system, 0, [(tuple(map(float, centre)), "off"), (on_curve, "smooth")]


def _rotated(unit, form):
    """A plane form in coordinates rotated by (3/5, 4/5) about p = (1/7, -2/3) u; its point p."""
    p = (Fraction(1, 7) * unit, Fraction(-2, 3) * unit)
    u = f"((3/5*(x - {_q(p[0])}) + 4/5*(y - {_q(p[1])}))/{_q(unit)})"
    v = f"((-4/5*(x - {_q(p[0])}) + 3/5*(y - {_q(p[1])}))/{_q(unit)})"
    return parse_system([form.format(u=u, v=v)], ["x", "y"]), tuple(map(float, p))


def _node(unit, loop=Fraction(1, 100)):
    system, p = _rotated(unit, "{u}^2 - {v}^2 + " + _q(1 / loop) + "*{u}^3")
    return system, 1, [(p, "singular")]


def _cusp(unit):
    system, p = _rotated(unit, "{v}^2 - 100*{u}^3")
    return system, 1, [(p, "singular")]


def _four_bar(unit):
    u = Fraction(unit)
    texts = [f"ax^2 + ay^2 - {_q(4 * u * u)}", f"(bx - {_q(4 * u)})^2 + by^2 - {_q(9 * u * u)}",
             f"(ax - bx)^2 + (ay - by)^2 - {_q(9 * u * u)}"]
    folded = tuple(float(c * u) for c in (-2, 0, 1, 0))
    return parse_system(texts, ["ax", "ay", "bx", "by"]), 1, [(folded, "singular")]


GEOMETRIES = {
    "tiny ellipse": lambda u: _ellipse(u, Fraction(6, 1000)),
    "tiny ellipse (doubles)": lambda u: _ellipse(u, Fraction(6, 1000), doubles=True),
    "huge ellipse": lambda u: _ellipse(u, Fraction(6000)),
    "ellipse 2e-4 at (1, 1/2)": lambda u: _ellipse(u, Fraction(2, 10000), centre=(Fraction(1), Fraction(1, 2))),
    "small node": _node,
    "node, loop 1e-3": lambda u: _node(u, Fraction(1, 1000)),
    "node, loop 1e-4": lambda u: _node(u, Fraction(1, 10000)),
    "moved cusp": _cusp,
    "four-bar": _four_bar,
}


def run(name, unit, seed, start="total-degree"):
    """One row of the table (a dict)."""
    system, expected, checks = GEOMETRIES[name](Fraction(unit))
    started = time.perf_counter()
    options = SingularOptions(start=StartKind.parse(start))
    locus = singular_locus(system, options, seed=seed)
    warnings = completeness_warnings(singular_to_dict(locus, options))
    found = len(locus.isolated())
    report = check_points(system, [point for point, _ in checks], seed=seed)
    verdicts = [v.verdict.value for v in report.points]
    checked = all(v == want for v, (_, want) in zip(verdicts, checks))
    if found == expected and not warnings and checked:
        outcome = "right"
    elif warnings and found <= expected and checked:
        outcome = "undecided"
    else:
        outcome = "wrong"
    return {"found": found, "expected": expected, "dropped": dict(locus.discarded), "warnings": len(warnings),
            "checks": "/".join(verdicts), "outcome": outcome, "seconds": time.perf_counter() - started,
            "newton": f"{locus.paths.get('residual_not_explained', 0)}/{locus.paths.get('zero_undecided', 0)}"}


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    parser.add_argument("--units", type=str, nargs="+", default=["1/1000", "1", "1000"])
    parser.add_argument("--quick", action="store_true", help="seed 1 only")
    parser.add_argument("--only", type=str, default=None, help="geometries whose name contains this")
    parser.add_argument("--start", type=str, default="total-degree",
                        help="the singular locus's start (multihomogeneous, polyhedral: square null-vector systems)")
    args = parser.parse_args()
    seeds = args.seeds[:1] if args.quick else args.seeds
    print(f"{'geometry':24s} {'unit':>6s} {'seed':>4s} {'found':>5s} {'exp':>3s} {'warn':>4s} "
          f"{'checks':18s} {'outcome':9s} {'s':>5s} {'newton':>6s}  dropped")
    totals = collections.Counter()
    for name in GEOMETRIES:
        if args.only and args.only not in name:
            continue
        for unit in args.units:
            for seed in seeds:
                row = run(name, unit, seed, args.start)
                totals[row["outcome"]] += 1
                print(f"{name:24s} {float(Fraction(unit)):6.0e} {seed:4d} {row['found']:5d} {row['expected']:3d} "
                      f"{row['warnings']:4d} {row['checks']:18s} {row['outcome']:9s} {row['seconds']:5.1f} {row['newton']:>6s}  "
                      f"{row['dropped'] or ''}", flush=True)
    print("totals:", dict(totals))


if __name__ == "__main__":
    np.seterr(all="ignore")
    main()
