"""`solve` of solutions close together far from the origin: silent wrong answers against sympy (decision 0081).

Run:  python benchmarks/bench_solve_far.py [--cases cubic ...] [--seeds 1 2 3] [--checkout ROOT]

Each case is written about its features (u, v, w), moved to (1234, -2345, 3456), then given in units x1, x1000 and
x0.001, with and without a rational linear change of coordinates (the grid of tests/test_solve_far.py, which
holds the cases and the exact reference: sympy on the unmoved system, A. Meurer et al., "SymPy: symbolic
computing in Python", PeerJ Computer Science, 2017). Printed per run: solutions found, exact ones matched,
multiplicities, undecided groups, warnings (exit 3), centred runs, seconds, and SILENT for a wrong answer
without a warning; then per case: right, flagged, silent, centred runs. ``--checkout`` measures another checkout
(the cases are read from this one's tests).
"""

import argparse
import pathlib
import time
from fractions import Fraction

parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
parser.add_argument("--cases", nargs="+", default=None)
parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
parser.add_argument("--checkout", type=pathlib.Path, default=None)
args = parser.parse_args()
import checkout  # noqa: E402,F401  (this checkout's numag ...)

checkout.measure_other(args.checkout)  # ... unless --checkout names another
import test_solve_far as far  # noqa: E402

CASES = {"cubic": far.CUBIC, "cubic-small": far.CUBIC_SMALL, "double-and-simple": far.DOUBLE_AND_SIMPLE,
         "circles": far.CIRCLES, "circles-small": far.CIRCLES_SMALL, "tangent": far.TANGENT, "three": far.THREE,
         "three-small": far.THREE_SMALL, "triple-and-infinity": far.TRIPLE_AND_INFINITY,
         "double-point": far.DOUBLE_POINT}
MULTIPLICITIES = {"tangent": [2], "triple-and-infinity": [3], "double-point": [2]}


def main():
    totals = {}
    for name in args.cases or list(CASES):
        for unit in (Fraction(1), Fraction(1000), Fraction(1, 1000)):
            for change in (False, True):
                for seed in args.seeds:
                    started = time.perf_counter()
                    result, warnings, right = far.check(*CASES[name], unit, change, seed, MULTIPLICITIES.get(name))
                    seconds = time.perf_counter() - started
                    silent = not right and not warnings
                    centred = len(result.extra.get("centred") or [])
                    row = totals.setdefault(name, [0, 0, 0, 0])
                    row[0] += right and not warnings
                    row[1] += bool(warnings)
                    row[2] += silent
                    row[3] += centred
                    print(f"{name:18s} unit {str(unit):6s} change {int(change)} seed {seed} found "
                          f"{len(result.solutions)} multiplicities {sorted(s.multiplicity for s in result.solutions)} "
                          f"undecided {len(getattr(result, 'undecided', []))} warnings {len(warnings)} centred "
                          f"{centred} {seconds:.2f}s{'  SILENT' if silent else ''}", flush=True)
    print("| case | right | flagged (exit 3) | silent | centred runs |\n| --- | --- | --- | --- | --- |")
    for name, (right, flagged, silent, centred) in totals.items():
        print(f"| {name} | {right} | {flagged} | {silent} | {centred} |")


if __name__ == "__main__":
    main()
