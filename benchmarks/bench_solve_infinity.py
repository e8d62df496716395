"""`solve`'s points at infinity of several paths, with and without a rational linear change (decision 0106).

Run:  python benchmarks/bench_solve_infinity.py [--seeds 1 2 3] [--checkout ROOT] [--systems NAME ...]

The systems of tests/test_solve_infinity_points.py (which holds them and the exact reference: the common zeros
of the top-degree forms solved by sympy in each chart; Bezout's count less the finite solutions of the lex
Groebner basis; common practice, no source), each in its original coordinates, after a rational linear change
and after the change in units 10^3. Per run: the points at infinity printed, and the verdict: right (every exact
point once, multiplicities adding up, exit 0), wrong (a printed point that is no common zero of the top forms or
the same one printed twice, or counts that do not add up, with or without a warning) or undecided (exit 3, no
wrong point printed). ``--checkout`` measures another checkout (the cases are read from this one's tests).
"""

import argparse
import itertools
import pathlib
import time

parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
parser.add_argument("--checkout", type=pathlib.Path, default=None)
parser.add_argument("--systems", nargs="+", default=None, help="names of the test module's SYSTEMS (default all)")
args = parser.parse_args()
import checkout  # noqa: E402,F401  (this checkout's numag ...)

checkout.measure_other(args.checkout)  # ... unless --checkout names another
import numpy as np  # noqa: E402
import test_solve_infinity_points as cases  # noqa: E402
from numag.tracking.solve import solve_system  # noqa: E402


def main():
    totals = {"right": 0, "wrong": 0, "undecided": 0}
    for name, variant in itertools.product(args.systems or cases.SYSTEMS, cases.VARIANTS):
        system, directions, finite, bezout = cases.case(name, variant)
        for seed in args.seeds:
            started = time.perf_counter()
            result = solve_system(system, seed=seed)
            seconds = time.perf_counter() - started
            flagged, wrong, missing = cases.judge(result, directions, finite, bezout)
            verdict = "wrong" if wrong or missing else ("undecided" if flagged else "right")
            totals[verdict] += 1
            printed = ", ".join(f"{s.multiplicity}x" for s in result.at_infinity)
            print(f"{name:30s} {variant:20s} seed {seed}: at infinity [{printed}] (exact: {len(directions)} points, "
                  f"{bezout - finite} paths) failed {result.path_counts()['failed']} {seconds:.1f}s  "
                  f"{verdict.upper()}{'  SILENT' if verdict == 'wrong' and not flagged else ''}", flush=True)
    print(f"right {totals['right']}, wrong {totals['wrong']}, undecided (exit 3) {totals['undecided']}")


if __name__ == "__main__":
    np.seterr(all="ignore")
    main()
