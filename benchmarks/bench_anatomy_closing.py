"""Issue 21's closing table: every kind of point the anatomy was tested on, what it says, and the time per point.

Run:  python benchmarks/bench_anatomy_closing.py [--seeds 3] [--far with|only|without] [--far-kinds curves,types]

One row per case: the normal forms of the simple plane curve singularities A1..A7, D4, D5, D6, E6, E7, E8 (Arnold
1972) and of surfaces (A1..A3, D4, E6), each at the origin and after ``--seeds`` random changes of coordinates
and units moved to a random point (``bench_anatomy.moved``); the Cayley cubic's four nodes; x^4 + y^5 + x^2 y^3
(mu = 12 != tau = 11, checked with sympy in tests/test_anatomy.py); the branches of a node, a cusp, an ordinary
triple point and an isolated real point; the Whitney umbrella (transversal A1, pinch point A2); space curves
that are complete intersections (Le-Greuel mu, decision 0086); a cusp at infinity. The far rows (decision 0091): the
plane types and the space curves (two parabolas crossing, the complete intersections) after an exact rational linear
change moving them to (1234, -2345[, 3456]) times a unit of 1e-3, 1 or 1e3, seeds 1..``--seeds``. "right" counts
the placements whose reading is the expected one, "undecided" those that did not decide, "wrong" the others (a must:
none).
Seconds are the median per point (for a locus: the anatomy's time over its points), on the machine as loaded.
"""

import argparse
import time
from fractions import Fraction

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
import numag
from bench_anatomy import moved
from numag.anatomy.survey import locus_anatomy, point_anatomy

# equation, variables, expected type (Arnold 1972's normal forms; A_k is y^2 = x^(k+1), common practice)
TYPES = [("x^2 + y^2", "xy", "A1")] + [(f"y^2 - x^{k + 1}", "xy", f"A{k}") for k in range(2, 8)] + [
    ("x^2*y - y^3", "xy", "D4"), ("x^2*y + y^4", "xy", "D5"), ("x^2*y + y^5", "xy", "D6"),
    ("x^3 + y^4", "xy", "E6"), ("x^3 + x*y^3", "xy", "E7"), ("x^3 + y^5", "xy", "E8"),
    ("x^2 + y^2 + z^2", "xyz", "A1"), ("x^2 + y^2 + z^3", "xyz", "A2"), ("x^2 + y^2 + z^4", "xyz", "A3"),
    ("x^2*y - y^3 + z^2", "xyz", "D4"), ("x^3 + y^4 + z^2", "xyz", "E6")]

# the branches at the origin: (sorted branch multiplicities, real branches); node and cusp Arnold 1972's A1 and
# A2, the triple point's tangent cone x (x^2 - 3 y^2) three real lines, x^2 + y^2 two conjugate lines (common
# practice, no source)
BRANCHES = [("node", "y^2 - x^2 - x^3", [1, 1], 2), ("cusp", "y^2 - x^3", [2], 1),
            ("ordinary triple point", "x^3 - 3*x*y^2 + x^4 + y^4", [1, 1, 1], 3),
            ("isolated real point", "x^2 + y^2", [1, 1], 0)]

# complete-intersection space curves at the origin: mu (Giusti 1983's S5, T7, U7 from memory, checked with sympy
# in tests/test_anatomy_intersection.py; the node on a cone mu = 1, Milnor 1968)
INTERSECTIONS = [("node on a cone", ["x^2 + y^2 - z^2", "z - x^3"], 1), ("S5, four lines", ["x^2 + y^2 + z^2", "y*z"], 5),
                 ("T7", ["x^2 + y^3 + z^3", "y*z"], 7), ("U7", ["x^2 + y*z", "x*y + z^3"], 7)]


# Far from the origin after an exact rational linear change (decision 0091): the plane types of TYPES (A1..A7, D4,
# D5, E6, E7, E8), and space curves: two parabolas in two planes crossing transversally (an ordinary double point:
# multiplicity 2, two smooth branches with distinct tangents, mu 1; common practice, no source) and the complete
# intersections of INTERSECTIONS (mu as there).
FAR_TYPES = [t for t in TYPES if len(t[1]) == 2 and t[2] != "D6"]
PARABOLAS = ("two parabolas crossing", ["x*y", "z - x^2 - y^2"], "mult 2, [1, 1], transversal, mu 1")
FAR_CENTRE = (1234, -2345, 3456)
FAR_UNITS = (Fraction(1, 1000), Fraction(1), Fraction(1000))


def far_linear(equations, names, seed, unit):
    """The equations in X_i = sum_j M_ij (x_j / unit - c_j), M a seeded rational matrix (entries k / d, |k| <= 3,
    d <= 3, |det M| >= 1/2), c = FAR_CENTRE: the feature at the origin of the normal form is exactly at c * unit.
    Written as text and expanded by the parser in exact arithmetic. Returns (system, the point as doubles)."""
    rng = np.random.default_rng(700 + seed)
    n = len(names)
    while True:
        matrix = [[Fraction(int(rng.integers(-3, 4)), int(rng.integers(1, 4))) for _ in range(n)] for _ in range(n)]
        if abs(np.linalg.det(np.array(matrix, dtype=float))) >= 0.5:
            break
    shifted = [f"({v}*({unit.denominator}/{unit.numerator}) - ({c}))" for v, c in zip(names, FAR_CENTRE)]
    forms = {v: "(" + " + ".join(f"({m})*{s}" for m, s in zip(row, shifted)) + ")" for v, row in zip(names, matrix)}
    texts = []
    for equation in equations:  # each variable replaced by its form (placeholders first: the forms contain them)
        for v in names:
            equation = equation.replace(v, "{" + v.upper() + "}")
        texts.append(equation.format(**{v.upper(): forms[v] for v in names}))
    point = np.array([float(c * unit) for c in FAR_CENTRE[:n]])
    return numag.parse_system(texts, list(names)), point


def far_rows(args, add):
    """The rows of PARABOLAS, INTERSECTIONS and FAR_TYPES after :func:`far_linear`, seeds 1..args.seeds, each in
    the three units of FAR_UNITS."""
    for kind, equations, expected in [PARABOLAS] + INTERSECTIONS if "curves" in args.far_kinds else []:
        verdicts, seconds, found = [], [], []
        for seed in range(1, args.seeds + 1):
            for unit in FAR_UNITS:
                system, point = far_linear(equations, ["x", "y", "z"], seed, unit)
                started = time.perf_counter()
                anatomy = point_anatomy(system, point, seed=seed)
                seconds.append(time.perf_counter() - started)
                mu = anatomy.intersection.milnor if anatomy.intersection is not None else None
                if isinstance(expected, str):
                    branches = None if anatomy.branches is None else \
                        sorted(b.multiplicity for b in anatomy.branches)
                    reading = (f"mult {anatomy.multiplicity}, {branches}, "
                               f"{'transversal' if anatomy.transversal else 'tangent'}, mu {mu}")
                    if anatomy.multiplicity is None or branches is None or mu is None:
                        reading = "undecided"
                else:
                    reading = mu
                verdicts.append(verdict(reading, expected))
                found.append(reading)
        add(row("space curve, far, linear change", f"{kind}: {', '.join(equations)}", expected, verdicts, seconds,
                found))
    for equation, names, expected in FAR_TYPES if "types" in args.far_kinds else []:
        verdicts, seconds, found = [], [], []
        for seed in range(1, args.seeds + 1):
            for unit in FAR_UNITS:
                system, point = far_linear([equation], list(names), seed, unit)
                started = time.perf_counter()
                label = point_anatomy(system, point, seed=seed).hypersurface.type.label
                seconds.append(time.perf_counter() - started)
                verdicts.append(verdict(label, expected))
                found.append(label)
        add(row("curve, far, linear change", equation, expected, verdicts, seconds, found))


def verdict(found, expected):
    return "right" if found == expected else ("undecided" if found in ("undecided", None) else "wrong")


def row(kind, case, expected, verdicts, seconds, found):
    counts = {k: verdicts.count(k) for k in ("right", "undecided", "wrong")}
    print(f"| {kind} | {case} | {expected} | {counts['right']} / {counts['undecided']} / {counts['wrong']} | "
          f"{', '.join(sorted(set(map(str, found))))} | {np.median(seconds):.2f} |", flush=True)
    return counts


def main():
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--seeds", type=int, default=3, help="random placements per type besides the normal form")
    parser.add_argument("--far", choices=("with", "only", "without"), default="with",
                        help="the rows far from the origin after a linear change (decision 0091)")
    parser.add_argument("--far-kinds", default="curves,types", help="of those: space curves, plane types or both")
    args = parser.parse_args()
    totals = {"right": 0, "undecided": 0, "wrong": 0}

    def add(counts):
        for key in totals:
            totals[key] += counts[key]

    print("| kind | case | expected | right / undecided / wrong | found | s per point |")
    print("| --- | --- | --- | --- | --- | --- |")
    if args.far != "without":
        far_rows(args, add)
    if args.far == "only":
        print(f"\ntotal: {totals['right']} right, {totals['undecided']} undecided, {totals['wrong']} wrong")
        return
    for equation, names, expected in TYPES:
        verdicts, seconds, found = [], [], []
        for seed in range(args.seeds + 1):
            system, point = moved(equation, list(names), seed)
            started = time.perf_counter()
            label = point_anatomy(system, point, seed=seed).hypersurface.type.label
            seconds.append(time.perf_counter() - started)
            verdicts.append(verdict(label, expected))
            found.append(label)
        add(row("curve" if len(names) == 2 else "surface", equation, expected, verdicts, seconds, found))

    cayley = numag.parse_system(["x^2 + y^2 + z^2 + 2*x*y*z - 1"], ["x", "y", "z"])
    anatomy = locus_anatomy(numag.singular_locus(cayley, seed=4), seed=4)
    labels = [a.hypersurface.type.label for a in anatomy.points.values()]
    add(row("surface", "Cayley cubic x^2 + y^2 + z^2 + 2xyz = 1", "4 x A1",
            [verdict(label, "A1") for label in labels] + ["wrong"] * max(0, 4 - len(labels)),
            [anatomy.seconds / max(1, len(labels))], labels))

    verdicts, seconds, found = [], [], []
    for seed in range(args.seeds + 1):
        system, point = moved("x^4 + y^5 + x^2*y^3", ["x", "y"], seed)
        started = time.perf_counter()
        h = point_anatomy(system, point, seed=seed).hypersurface
        seconds.append(time.perf_counter() - started)
        reading = "undecided" if h.milnor is None else f"mu {h.milnor}, tau {h.tjurina}"
        verdicts.append(verdict(reading, "mu 12, tau 11"))
        found.append(reading)
    add(row("mu != tau", "x^4 + y^5 + x^2 y^3", "mu 12, tau 11", verdicts, seconds, found))

    for kind, equation, multiplicities, real in BRANCHES:
        verdicts, seconds, found = [], [], []
        for seed in range(1, args.seeds + 1):
            started = time.perf_counter()
            anatomy = point_anatomy(numag.parse_system([equation], ["x", "y"]), [0, 0], seed=seed)
            seconds.append(time.perf_counter() - started)
            reading = None if anatomy.branches is None else \
                f"{sorted(b.multiplicity for b in anatomy.branches)}, {anatomy.real_branches} real"
            verdicts.append(verdict(reading, f"{multiplicities}, {real} real"))
            found.append(reading)
        add(row(f"branches: {kind}", equation, f"{multiplicities}, {real} real", verdicts, seconds, found))

    umbrella = numag.parse_system(["x^2 - y^2*z"], ["x", "y", "z"])
    verdicts, seconds, found = [], [], []
    for seed in range(1, args.seeds + 1):
        locus = numag.singular_locus(umbrella, seed=seed)
        line = [c for c in locus.components if c.dimension == 1][0]
        started = time.perf_counter()
        along = numag.component_anatomy(umbrella, line, seed=seed)
        seconds.append((time.perf_counter() - started) / (1 + len(along.special_points)))
        special = [p.hypersurface.type.label for p in along.special_points
                   if np.abs(p.point).max() < 1e-8]
        reading = f"{along.transversal.hypersurface.type.label}, pinch {special}"
        verdicts.append(verdict(reading, "A1, pinch ['A2']"))
        found.append(reading)
    add(row("Whitney umbrella", "x^2 = y^2 z", "A1, pinch ['A2']", verdicts, seconds, found))

    for kind, equations, mu in INTERSECTIONS:
        verdicts, seconds, found = [], [], []
        for seed in range(1, args.seeds + 1):
            started = time.perf_counter()
            anatomy = point_anatomy(numag.parse_system(equations, ["x", "y", "z"]), [0, 0, 0], seed=seed)
            seconds.append(time.perf_counter() - started)
            reading = anatomy.intersection.milnor if anatomy.intersection is not None else None
            verdicts.append(verdict(reading, mu))
            found.append(reading)
        add(row("space curve (Le-Greuel mu)", f"{kind}: {', '.join(equations)}", mu, verdicts, seconds, found))

    curve = numag.parse_system(["x^2*y - 1"], ["x", "y"])
    verdicts, seconds, found = [], [], []
    for seed in range(1, args.seeds + 1):
        anatomy = locus_anatomy(numag.singular_locus(curve, seed=seed), seed=seed)
        labels = [a.hypersurface.type.label for a in anatomy.points.values()]
        seconds.append(anatomy.seconds / max(1, len(labels)))
        verdicts.append(verdict(",".join(labels), "A2"))
        found.append(",".join(labels))
    add(row("at infinity", "x^2 y = 1 at (0 : 0 : 1)", "A2", verdicts, seconds, found))
    print(f"\ntotal: {totals['right']} right, {totals['undecided']} undecided, {totals['wrong']} wrong")


if __name__ == "__main__":
    main()
