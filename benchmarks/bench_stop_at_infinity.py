"""Paths heading to infinity stopped before the endgame where their ends are not wanted (decision 0113, issue 19).

Run:  python benchmarks/bench_stop_at_infinity.py [--seeds 1,2,3] [--problems six-bar,T9=T11,quadrics]

Side by side in one process, per problem and seed: the singular locus with every path through the Cauchy
endgame ("before": :func:`numag.tracking.tracker.heading_to_infinity` answers "no" for every path, which is the
code before the change) and with the early stop ("after"). Printed: CPU seconds, the paths by status (stopped
ones counted under ``stopped_at_infinity``, a part of ``at_infinity``), the pieces, and whether the singular points
are the same (to 1e-6, relative). The goal is issue 19's six-bar under 5 s; times on a shared machine are upper
bounds (the load is printed first).
"""

import argparse
import os
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
import numag.tracking.tracker as tracker
from numag.singular.locus import singular_locus

from bench_scale import chebyshev_curve, pieces_of, six_bar
from families import quadric_union

_STOPPING = tracker.heading_to_infinity


def _never(homotopy, points, radius, ends, opts):
    """Every path goes on to the endgame (the code before decision 0113)."""
    count = len(points)
    return np.zeros(count, dtype=bool), np.full(points.shape, np.nan, dtype=complex), np.zeros(count, dtype=np.int64)


def _points(locus):
    found = [np.asarray(c.points[0], dtype=complex) for c in locus.components if c.dimension == 0]
    return sorted(found, key=lambda p: tuple(np.round(np.concatenate([p.real, p.imag]), 6)))


def _same(first, second):
    return len(first) == len(second) and all(
        np.linalg.norm(a - b) <= 1e-6 * (1 + np.linalg.norm(a)) for a, b in zip(first, second))


def _run(system, seed, stop):
    tracker.heading_to_infinity = _STOPPING if stop else _never
    try:
        cpu = time.process_time()
        locus = singular_locus(system, seed=seed)
        return time.process_time() - cpu, locus
    finally:
        tracker.heading_to_infinity = _STOPPING


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", default="1,2,3")
    parser.add_argument("--problems", default="six-bar")
    args = parser.parse_args()
    problems = {"six-bar": six_bar, "T9=T11": lambda: chebyshev_curve(9, 11),
                "quadrics": lambda: quadric_union(3, np.random.default_rng(11))}
    print(f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores")
    print(f"{'problem':10} {'seed':>4} {'code':7} {'cpu s':>7} {'at_inf':>6} {'stopped':>7} {'failed':>6}  pieces")
    for name in args.problems.split(","):
        system = problems[name]()
        for seed in (int(s) for s in args.seeds.split(",")):
            results = {}
            for code, stop in (("before", False), ("after", True)):
                cpu, locus = _run(system, seed, stop)
                counts = locus.paths
                failed = sum(counts.get(label, 0) for label in tracker.FAILURE_LABELS)
                print(f"{name:10} {seed:4} {code:7} {cpu:7.2f} {counts.get('at_infinity', 0):6} "
                      f"{counts.get('stopped_at_infinity', 0):7} {failed:6}  {pieces_of(locus)}", flush=True)
                results[code] = _points(locus)
            print(f"{'':10} {'':4} singular points the same: {_same(results['before'], results['after'])}")


if __name__ == "__main__":
    main()
