"""`solve` of finite solutions of size 1e3..1e7 beside points at infinity after a linear change (decision 0103).

Run:  python benchmarks/bench_solve_linear_change.py [--seeds 1 2 3] [--checkout ROOT]

The three systems of tests/test_solve_linear_change.py (which holds them and the exact reference: sympy's lex
Groebner basis, common practice, no source), each in its original coordinates, after a rational linear change and
after the change in units 10^3. Printed per run: solutions found of the exact count, those missing, paths at
infinity, failed paths, undecided groups, centred runs, seconds, and SILENT for a missing solution without a
warning (exit 0). ``--checkout`` measures another checkout (the cases are read from this one's tests).
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
import test_solve_linear_change as cases  # noqa: E402
from numag.tracking.solve import solve_system  # noqa: E402


def main():
    right = flagged = silent = 0
    for name, variant in itertools.product(cases.SYSTEMS, cases.VARIANTS):
        system, truth, _, _ = cases._case(name, variant)
        for seed in args.seeds:
            started = time.perf_counter()
            result = solve_system(system, seed=seed)
            seconds = time.perf_counter() - started
            counts = result.path_counts()
            warned = bool(counts["failed"] or result.undecided or result.unverified)
            found = np.array([s.point for s in result.solutions]).reshape(-1, truth.shape[1])
            missing = sum(1 for e in truth if not len(found) or np.max(np.abs(found - e[None, :]), axis=1).min()
                          > 1e-6 * (1 + np.abs(e).max()))
            right += not missing and not warned
            flagged += warned
            silent += bool(missing) and not warned
            print(f"{name:26s} {variant:20s} seed {seed}: found {len(result.solutions)}/{len(truth)} missing {missing} "
                  f"at infinity {sum(s.multiplicity for s in result.at_infinity)} failed {counts['failed']} "
                  f"undecided {len(result.undecided)} centred {len(result.extra.get('centred') or [])} "
                  f"{seconds:.2f}s{'  SILENT' if missing and not warned else ''}", flush=True)
    print(f"right {right}, flagged (exit 3) {flagged}, silent {silent}")


if __name__ == "__main__":
    main()
