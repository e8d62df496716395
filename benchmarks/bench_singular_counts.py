"""Deterministic counts behind the `singular` speed goals of issue 19 (decision 0059), with CPU seconds.

Run:  python benchmarks/bench_singular_counts.py [--quick] [--sections six,cheb,quad] [--seeds 1 2]

For each problem of ``bench_scale.py``'s "singular" section (the six-bar linkage in 10 unknowns, the curve
T9(x) = T11(y), the union of three quadrics) and each seed: ``singular_locus(system, seed=seed)`` in this
process, with every ``track_paths`` call counted -- paths, batched evaluations of H, path steps (accepted
and rejected) and the steps spent in the Cauchy endgame -- beside the CPU and wall seconds and the pieces
found. The counts do not depend on the machine's load; decide by them first (decision 0022).

To measure an earlier commit the same way: ``git archive COMMIT | tar -x -C /tmp/before``, copy this file to
``/tmp/before/benchmarks/`` and run it there (``checkout.py`` makes it measure that tree).
"""

import argparse
import os
import sys
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.singular.locus import singular_locus
from numag.tracking import tracker

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from bench_scale import chebyshev_curve, pieces_of, six_bar  # noqa: E402
from families import quadric_union  # noqa: E402

PROBLEMS = {
    "six": (six_bar, "4 singular points (construction)"),
    "cheb": (lambda: chebyshev_curve(9, 11), "40 affine nodes (Koseleff-Pecker) + (1:0:0) at infinity"),
    "quad": (lambda: quadric_union(3, np.random.default_rng(11)), "3 curves of degree 4 (common practice)"),
}


class CountedTracking:
    """Wraps ``tracker.track_paths`` (which ``BatchTracker`` calls) and adds up what each call did."""

    def __init__(self):
        self.rows = []
        self.original = tracker.track_paths

    def __enter__(self):
        def counted(homotopy, start_points, options=None, progress=None):
            result = self.original(homotopy, start_points, options, progress)
            self.rows.append((len(start_points), result.evaluations, int(result.steps.sum()),
                              int(result.steps[result.endgame].sum())))
            return result
        tracker.track_paths = counted
        return self

    def __exit__(self, *exc):
        tracker.track_paths = self.original

    def totals(self):
        return np.array(self.rows, dtype=np.int64).reshape(-1, 4).sum(axis=0)


def measure(name, seed):
    build, expected = PROBLEMS[name]
    system = build()
    with CountedTracking() as counts:
        wall, cpu = time.perf_counter(), time.process_time()
        locus = singular_locus(system, seed=seed)
        wall, cpu = time.perf_counter() - wall, time.process_time() - cpu
    paths, evaluations, steps, endgame = counts.totals()
    print(f"{system.name:<18} {seed:>4} {cpu:>7.2f} {wall:>7.2f} {paths:>6} {evaluations:>11,} {steps:>9,} "
          f"{endgame:>9,}  {pieces_of(locus)} ({expected})", flush=True)


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="T9 = T11 alone, one seed")
    parser.add_argument("--sections", default="six,cheb,quad", help="which problems: six, cheb, quad")
    parser.add_argument("--seeds", type=int, nargs="+", default=[1])
    arguments = parser.parse_args()
    names = ["cheb"] if arguments.quick else [s for s in arguments.sections.split(",") if s]
    for name in names:
        if name not in PROBLEMS:
            raise SystemExit(f"unknown section {name!r}: choose from {', '.join(PROBLEMS)}")
    seeds = arguments.seeds[:1] if arguments.quick else arguments.seeds
    print(f"load average {os.getloadavg()[0]:.1f} (2 cores): CPU seconds are the figures to compare")
    print(f"{'problem':<18} {'seed':>4} {'cpu s':>7} {'wall s':>7} {'paths':>6} {'evaluations':>11} "
          f"{'steps':>9} {'endgame':>9}  pieces (expected)")
    for name in names:
        for seed in seeds:
            measure(name, seed)


if __name__ == "__main__":
    main()
