"""Full rank at the samples of the non-reduced test decided in double precision (decision 0117), before and after.

Run:  python benchmarks/bench_full_rank_double.py [--repeats 2] [--seed 1]

The singular loci of the six-bar linkage in 10 unknowns (goal < 5 CPU s) and of T9(x) = T11(y) (goal < 2 CPU s),
both from ``bench_scale.py``, each computed with the double-precision full-rank test switched off ("before": every
singular point's samples go to Gauss-Newton in mpmath unless the rank drops at all of them, the code path before
decision 0117) and on ("after"), alternately in one process, ``--repeats`` times. Printed per row: median CPU
seconds, the number of runs of the mpmath sampling test (one per singular point whose samples double precision
left open), and the pieces found; the last column says whether the pieces and every point's verdict agree with the
"before" run at the same repetition. One BLAS thread.
"""

import argparse
import os
import statistics
import sys
import time

os.environ.setdefault("OMP_NUM_THREADS", "1")
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

import numpy as np  # noqa: E402

import checkout  # noqa: E402,F401  (this checkout's numag, not an installed one)
from numag.singular import smoothness  # noqa: E402
from numag.singular.locus import singular_locus  # noqa: E402

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from bench_scale import chebyshev_curve, pieces_of, six_bar  # noqa: E402


def _answer(locus):
    """The pieces and each piece's points (rounded) and kind: what must not change."""
    return pieces_of(locus), sorted((c.kind, tuple(np.round(np.asarray(p, dtype=complex), 6)))
                                    for c in locus.components for p in getattr(c, "points", [])[:1])


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=2)
    parser.add_argument("--seed", type=int, default=1)
    args = parser.parse_args()
    print(f"load average {os.getloadavg()[0]:.2f} (CPU seconds are the figures), seed {args.seed}")
    checker = smoothness._Checker
    full_rank, sampled_mp = checker.full_rank_around, checker._rank_drops_at_samples_mp
    runs = []
    checker._rank_drops_at_samples_mp = lambda self, *a: runs.append(1) or sampled_mp(self, *a)
    off = (lambda self, samples, codim, reach: np.zeros(len(np.atleast_2d(samples)), dtype=bool))
    print(f"{'problem':<20}{'route':<10}{'CPU s (median)':>16}{'mpmath runs':>13}{'goal s':>8}  pieces; same answer")
    try:
        for system, goal in ((six_bar(), 5), (chebyshev_curve(9, 11), 2)):
            times, counts, answers = {"before": [], "after": []}, {}, {"before": [], "after": []}
            for _ in range(args.repeats):
                for route, test in (("before", off), ("after", full_rank)):
                    checker.full_rank_around = test
                    runs.clear()
                    start = time.process_time()
                    locus = singular_locus(system, seed=args.seed)
                    times[route].append(time.process_time() - start)
                    counts[route] = len(runs)
                    answers[route].append(_answer(locus))
            same = answers["before"] == answers["after"]
            for route in ("before", "after"):
                print(f"{system.name:<20}{route:<10}{statistics.median(times[route]):>16.2f}{counts[route]:>13}"
                      f"{goal:>8}  {answers[route][0][0]}; {'yes' if same else 'NO'}")
    finally:
        checker.full_rank_around, checker._rank_drops_at_samples_mp = full_rank, sampled_mp


if __name__ == "__main__":
    main()
