"""Near-singular points (decision 0062): simple plane curve singularities moved with doubles.

Run:  python benchmarks/bench_near_singular.py [--seeds 1 2 3]

Each normal form (A2 cusp, D4, three lines x^2 y - y^3, E7, the node x^2 + y^2; Arnold 1972, "Normal forms
of functions near degenerate critical points", the same forms as tests/test_anatomy.py) is moved by a random
linear change of coordinates and units with double-precision numbers (``moved`` of tests/test_anatomy.py);
the coefficients, as doubles, no longer define a singular curve. Printed per run: singular points found,
candidates dropped, and the near-singular points with their backward error against the input's tolerance
(the margin is tolerance / backward error), and the seconds of the run.
"""

import argparse
import pathlib
import sys
import time

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag import singular_locus

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent.parent / "tests"))
from test_anatomy import moved  # noqa: E402  (the tests' change of coordinates)

FORMS = [("A2", "y^2 - x^3"), ("D4", "x^3 + y^3"), ("D4 lines", "x^2*y - y^3"), ("E7", "x^3 + x*y^3"),
         ("A1", "x^2 + y^2")]


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    args = parser.parse_args()
    print(f"{'form':9s} {'seed':>4s} {'singular':>8s} {'dropped':>8s} {'near':>4s} {'backward error':>14s} "
          f"{'tolerance':>10s} {'margin':>8s} {'seconds':>7s}")
    for label, equation in FORMS:
        for seed in args.seeds:
            system, _ = moved(equation, ["x", "y"], seed)
            started = time.perf_counter()
            locus = singular_locus(system, seed=seed)
            seconds = time.perf_counter() - started
            near = locus.near_singular
            error = min((p.backward_error for p in near), default=float("nan"))
            tolerance = near[0].tolerance if near else float("nan")
            print(f"{label:9s} {seed:4d} {len(locus.isolated()):8d} {sum(locus.discarded.values()):8d} "
                  f"{len(near):4d} {error:14.2e} {tolerance:10.2e} {tolerance / error:8.0f} {seconds:7.2f}")


if __name__ == "__main__":
    main()
