"""Types and local pictures read at a point given off the singular point (decisions 0056, 0068).

Run:  python benchmarks/bench_anatomy_off.py [--seeds 8] [--off 1e-10] [--condition K]
      python benchmarks/bench_anatomy_off.py --far [--exact] [--seeds 3] [--off 1e-10]    (decisions 0073, 0086)

The twelve simple plane curve normal forms of Arnold 1972 (A1..A6, D4..D6, E6..E8) and x^3 + y^3 (D4), each
after ``--seeds`` random changes of coordinates and units moved to a random point (``bench_anatomy.moved``,
condition <= 4; or ``bench_anatomy.gaussian`` with ``--condition``); the point handed to
``numag.point_anatomy`` is the singular point plus ``off`` |p| N(0, 1) per coordinate
(``default_rng(seed + 77)``). Prints per case the type verdicts and the picture verdicts (right / undecided /
wrong), the totals, and the median time per point.

``--far``: the simple types A1..A7, D4..D6, E6..E8 with the singular point moved far from the origin, to
(100, -30) times a unit of 1e-3, 1 or 1e3, after a random rotation and stretch by 2^U(-1, 1) per seed
(``far_placement``); one row per type and unit. Far out the expanded coefficients' rounding (|p|^degree times
1e-16) reaches the features of the high types: undecided is then the right answer, wrong never is. With
``--exact`` the placement is written exactly (``far_placement_exact``): the singularity is then exactly there.
"""

import argparse
import time
from fractions import Fraction

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
import numag
from bench_anatomy import gaussian, moved, picture_verdict
from numag.anatomy.survey import AnatomyOptions
from numag.system.parse import parse_system
from numag.system.polynomial import PolynomialSystem

# Arnold 1972's normal forms and their types; x^3 + y^3 is three distinct lines, D4 (common practice).
CASES = [("x^2 + y^2", "A1"), ("y^2 - x^3", "A2"), ("y^2 - x^4", "A3"), ("y^2 - x^5", "A4"), ("y^2 - x^6", "A5"),
         ("y^2 - x^7", "A6"), ("x^2*y - y^3", "D4"), ("x^2*y + y^4", "D5"), ("x^2*y + y^5", "D6"),
         ("x^3 + y^4", "E6"), ("x^3 + x*y^3", "E7"), ("x^3 + y^5", "E8"), ("x^3 + y^3", "D4")]


# The simple plane types of Arnold 1972 (normal forms) for the far table.
FAR_CASES = [("x^2 + y^2", "A1"), ("y^2 - x^3", "A2"), ("y^2 - x^4", "A3"), ("y^2 - x^5", "A4"),
             ("y^2 - x^6", "A5"), ("y^2 - x^7", "A6"), ("y^2 - x^8", "A7"), ("x^2*y - y^3", "D4"),
             ("x^2*y + y^4", "D5"), ("x^2*y + y^5", "D6"), ("x^3 + y^4", "E6"), ("x^3 + x*y^3", "E7"),
             ("x^3 + y^5", "E8")]
FAR_UNITS = (1e-3, 1.0, 1e3)


def far_placement(equation, seed, unit, centre=(100.0, -30.0)):
    """The normal form after a rotation and stretch (seeded) in units of ``unit``, its singular point at
    ``centre`` times ``unit``: f(R S (x - c) / unit), expanded in double. Returns (system, singular point)."""
    f = parse_system([equation], ["x", "y"]).polynomials[0]
    rng = np.random.default_rng(900 + seed)
    rotation, _ = np.linalg.qr(rng.standard_normal((2, 2)))
    matrix = rotation @ np.diag(2.0 ** rng.uniform(-1, 1, 2)) / unit
    point = np.array(centre) * unit
    return PolynomialSystem(["x", "y"], [f.numeric().substitute_linear(matrix, -matrix @ point)]), point


def far_placement_exact(equation, seed, unit, centre=(100, -30)):
    """As :func:`far_placement`, exact: the rotation and stretch rounded to 4 decimals and written as rationals,
    the centre and the unit exact, and the equation expanded by the parser in exact arithmetic. The singular
    point is then exactly at ``centre`` times ``unit`` (the double placement's coefficients are rounded at
    |p|^d eps, which far out changes the singularity itself). Returns (system, singular point)."""
    rng = np.random.default_rng(900 + seed)
    rotation, _ = np.linalg.qr(rng.standard_normal((2, 2)))
    matrix = rotation @ np.diag(2.0 ** rng.uniform(-1, 1, 2))
    scale = Fraction(1) / Fraction(unit).limit_denominator(10**6)
    point = [Fraction(c) * Fraction(unit).limit_denominator(10**6) for c in centre]
    entries = [[Fraction(round(v * 10**4), 10**4) * scale for v in row] for row in matrix]
    shifted = [f"(x - ({point[0]}))", f"(y - ({point[1]}))"]
    forms = [f"(({row[0]})*{shifted[0]} + ({row[1]})*{shifted[1]})" for row in entries]
    # x and y of the normal form replaced by the two forms (placeholders first: the forms contain x and y)
    text = equation.replace("x", "{X}").replace("y", "{Y}").format(X=forms[0], Y=forms[1])
    return parse_system([text], ["x", "y"]), np.array([float(v) for v in point])


def far_table(args):
    """One row per type and unit: the type verdicts of seeds 1..args.seeds."""
    totals = {"right": 0, "undecided": 0, "wrong": 0}
    times = []
    for equation, label in FAR_CASES:
        for unit in FAR_UNITS:
            verdicts = []
            for seed in range(1, args.seeds + 1):
                system, point = (far_placement_exact if args.exact else far_placement)(equation, seed, unit)
                off = point + args.off * np.abs(point) * np.random.default_rng(seed + 77).standard_normal(2)
                started = time.perf_counter()
                anatomy = numag.point_anatomy(system, off, seed=seed)
                times.append(time.perf_counter() - started)
                found = anatomy.hypersurface.type.label
                verdict = "right" if found == label else ("undecided" if found == "undecided" else "wrong")
                totals[verdict] += 1
                verdicts.append(verdict[0] if verdict != "wrong" else f"W:{found}")
            print(f"{equation:14s} {label:3s} unit {unit:6g}  {' '.join(verdicts)}", flush=True)
    print(f"types: {totals['right']} right, {totals['undecided']} undecided, {totals['wrong']} wrong")
    print(f"median time per point {np.median(times):.3f} s, max {np.max(times):.3f} s")


def main():
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--seeds", type=int, default=8)
    parser.add_argument("--off", type=float, default=1e-10)
    parser.add_argument("--condition", type=float, default=None)
    parser.add_argument("--keep-point", action="store_true",
                        help="read the type where the point is given (no deflation onto the singular point)")
    parser.add_argument("--cases", default=None, help="comma-separated indices of CASES to run")
    parser.add_argument("--far", action="store_true",
                        help="the table of the simple types moved to (100, -30) in units 1e-3, 1, 1e3 (decision 0073)")
    parser.add_argument("--exact", action="store_true",
                        help="with --far: the placement written exactly (rational coefficients; decision 0086)")
    args = parser.parse_args()
    if args.far:
        far_table(args)
        return
    types = {"right": 0, "undecided": 0, "wrong": 0}
    pictures = {"right": 0, "undecided": 0, "wrong": 0}
    times = []
    options = AnatomyOptions(onto_singular_point=not args.keep_point)
    chosen = CASES if args.cases is None else [CASES[int(k)] for k in args.cases.split(",")]
    for equation, label in chosen:
        case_types, case_pictures = [], []
        for seed in range(1, args.seeds + 1):
            system, point = moved(equation, ["x", "y"], seed) if args.condition is None else \
                gaussian(equation, ["x", "y"], seed, args.condition)
            off = point + args.off * np.abs(point) * np.random.default_rng(seed + 77).standard_normal(2)
            started = time.perf_counter()
            anatomy = numag.point_anatomy(system, off, seed=seed, options=options)
            times.append(time.perf_counter() - started)
            found = anatomy.hypersurface.type.label
            verdict = "right" if found == label else ("undecided" if found == "undecided" else "wrong")
            types[verdict] += 1
            case_types.append(verdict[0] if verdict != "wrong" else f"W:{found}")
            picture = picture_verdict(anatomy, equation, "xy", label)
            pictures[picture] += 1
            case_pictures.append(picture[0])
        print(f"{equation:16s} {label:4s} types {' '.join(case_types):40s} pictures {''.join(case_pictures)}",
              flush=True)
    print(f"types: {types['right']} right, {types['undecided']} undecided, {types['wrong']} wrong")
    print(f"pictures: {pictures['right']} right, {pictures['undecided']} undecided, {pictures['wrong']} wrong")
    print(f"median time per point {np.median(times):.3f} s, max {np.max(times):.3f} s")


if __name__ == "__main__":
    main()
