"""Types and local pictures read at a point given off the singular point (decisions 0056, 0068).

Run:  python benchmarks/bench_anatomy_off.py [--seeds 8] [--off 1e-10] [--condition K]

The twelve simple plane curve normal forms of Arnold 1972 (A1..A6, D4..D6, E6..E8) and x^3 + y^3 (D4), each
after ``--seeds`` random changes of coordinates and units moved to a random point (``bench_anatomy.moved``,
condition <= 4; or ``bench_anatomy.gaussian`` with ``--condition``); the point handed to
``numag.point_anatomy`` is the singular point plus ``off`` |p| N(0, 1) per coordinate
(``default_rng(seed + 77)``). Prints per case the type verdicts and the picture verdicts (right / undecided /
wrong), the totals, and the median time per point.
"""

import argparse
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
import numag
from bench_anatomy import gaussian, moved, picture_verdict
from numag.anatomy.survey import AnatomyOptions

# Arnold 1972's normal forms and their types; x^3 + y^3 is three distinct lines, D4 (common practice).
CASES = [("x^2 + y^2", "A1"), ("y^2 - x^3", "A2"), ("y^2 - x^4", "A3"), ("y^2 - x^5", "A4"), ("y^2 - x^6", "A5"),
         ("y^2 - x^7", "A6"), ("x^2*y - y^3", "D4"), ("x^2*y + y^4", "D5"), ("x^2*y + y^5", "D6"),
         ("x^3 + y^4", "E6"), ("x^3 + x*y^3", "E7"), ("x^3 + y^5", "E8"), ("x^3 + y^3", "D4")]


def main():
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--seeds", type=int, default=8)
    parser.add_argument("--off", type=float, default=1e-10)
    parser.add_argument("--condition", type=float, default=None)
    parser.add_argument("--keep-point", action="store_true",
                        help="read the type where the point is given (no deflation onto the singular point)")
    parser.add_argument("--cases", default=None, help="comma-separated indices of CASES to run")
    args = parser.parse_args()
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
