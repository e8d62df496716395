"""`solve`'s endpoint groups at infinity: isolated points or on a set at infinity of positive dimension (0112).

Run:  python benchmarks/bench_solve_infinity_sets.py [--seeds 1 2 3] [--checkout ROOT]

The systems of tests/test_solve_infinity_sets.py (which holds them and the exact reference: sympy's solution of
the top-degree forms in the chart of each printed group's largest coordinate gives the dimension of their zero
set there; common practice, no source), each original, after a rational linear change and after the change in
units 10^3. Per run: the groups at infinity (paths, the dimension numag gives, sympy's) and the verdict: right
(every group's kind and dimension as sympy's, exit 0), wrong (a group on a set printed as an isolated point, or
the wrong dimension; SILENT without a warning) or undecided (exit 3, nothing wrong printed). ``--checkout``
measures another checkout (the cases are read from this one's tests).
"""

import argparse
import itertools
import pathlib
import time

parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
parser.add_argument("--checkout", type=pathlib.Path, default=None)
args = parser.parse_args()
import checkout  # noqa: E402,F401  (this checkout's numag ...)

checkout.measure_other(args.checkout)  # ... unless --checkout names another
import numpy as np  # noqa: E402
import test_solve_infinity_sets as cases  # noqa: E402
from numag.tracking.solve import solve_system  # noqa: E402


def main():
    totals = {"right": 0, "wrong": 0, "undecided": 0}
    for name, variant in itertools.product(cases.SYSTEMS, cases.VARIANTS):
        system, unknowns, tops, finite = cases.case(name, variant)
        for seed in args.seeds:
            started = time.perf_counter()
            result = solve_system(system, seed=seed)
            seconds = time.perf_counter() - started
            flagged = bool(result.path_counts()["failed"] or result.undecided or result.unverified)
            groups = [(s.multiplicity, getattr(s, "set_dimension", 0),
                       cases.exact_dimension_at(tops, unknowns, s.point[1:]))
                      for s in result.at_infinity + getattr(result, "sets_at_infinity", [])]
            wrong = sum(1 for _, found, exact in groups if found != exact)
            verdict = "wrong" if wrong else ("undecided" if flagged else "right")
            totals[verdict] += 1
            printed = ", ".join(f"{paths} paths dim {found} (exact {exact})" for paths, found, exact in groups)
            print(f"{name:22s} {variant:20s} seed {seed}: [{printed}] finite {sum(s.multiplicity for s in result.solutions)}"
                  f" failed {result.path_counts()['failed']} {seconds:.1f}s  "
                  f"{verdict.upper()}{'  SILENT' if verdict == 'wrong' and not flagged else ''}", flush=True)
    print(f"right {totals['right']}, wrong {totals['wrong']}, undecided (exit 3) {totals['undecided']}")


if __name__ == "__main__":
    np.seterr(all="ignore")
    main()
