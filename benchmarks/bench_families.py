"""Families benchmark: the discriminant of a four-bar with a free coupler length, and a 1,000-value sweep.

Run:  python benchmarks/bench_families.py [--quick] [--values 1000] [--workers N] [--seeds 3]

* Discriminant of the four-bar (ground 4, crank 2, rocker 3, coupler b): the real discriminant points
  (expected b = 0, +-1, +-3, +-5, +-9: sympy's elimination gives b^2 (b^2 - 1)(b^2 - 9)(b^2 - 25)(b^2 - 81),
  the nonzero ones being the Grashof equalities; common practice, no source), the real branches per region
  (Grashof: 2, 1, 2, 1, 0 from b = 0 upwards), paths, seconds.
* Sweep of the same linkage at a fixed crank angle (4 assembly positions) over evenly spaced coupler
  lengths: seconds, paths, failed paths, evaluations per path, and the largest distance to a direct
  solve at 20 random values of the grid.

Results are written to benchmarks/results/families.json.
"""

import argparse
import json
import math
import pathlib
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.families.discriminant import DiscriminantOptions, discriminant
from numag.families.sweep import sweep
from numag.system.exact import ExactCoefficient
from numag.system.files import family_from_mapping
from numag.tracking.solve import Execution, solve_system

FOUR_BAR = {"name": "four-bar", "variables": ["x1", "y1", "x2", "y2"], "parameters": ["b"],
            "equations": ["x1^2 + y1^2 = 4", "(x2 - 4)^2 + y2^2 = 9", "(x2 - x1)^2 + (y2 - y1)^2 = b^2"]}
AT_CRANK = dict(FOUR_BAR, equations=FOUR_BAR["equations"] + ["x1 = 1"])
EXPECTED_POINTS = [-9, -5, -3, -1, 0, 1, 3, 5, 9]
EXPECTED_BRANCHES = [2, 1, 2, 1, 0]


def bench_discriminant(seed, regions):
    started = time.perf_counter()
    result = discriminant(family_from_mapping(FOUR_BAR), DiscriminantOptions(regions=regions), seed=seed)
    seconds = time.perf_counter() - started
    points = result.real_points
    match = len(points) == len(EXPECTED_POINTS) and bool(np.allclose(points, EXPECTED_POINTS, atol=1e-8))
    branches = [r.count.branches for r in result.regions if r.low >= -1e-8]
    return {"seed": seed, "seconds": round(seconds, 2), "points": [round(float(p), 10) for p in points],
            "points_match": match, "branches_from_0": branches,
            "branches_match": (branches == EXPECTED_BRANCHES) if regions else None,
            "paths": result.paths.get("tracked", 0), "components": len(result.components)}


def bench_sweep(count, seed, workers):
    family = family_from_mapping(AT_CRANK)
    values = np.linspace(0.0, 10.0, count)[:, None]
    execution = Execution(workers=workers) if workers else None
    started = time.perf_counter()
    result = sweep(family, values, seed=seed, execution=execution)
    seconds = time.perf_counter() - started
    rng = np.random.default_rng(seed)
    critical = np.array([math.sqrt(12) - 3, math.sqrt(12) + 3])
    candidates = np.nonzero(np.min(np.abs(values[:, 0, None] - critical[None, :]), axis=1) > 0.05)[0]
    worst = 0.0
    for k in rng.choice(candidates, min(20, len(candidates)), replace=False):
        direct = np.array([s.point for s in solve_system(family.member(
            [ExactCoefficient.from_complex(values[k, 0])]), seed=int(k)).solutions])
        found = result.values[k].points
        if found.shape != direct.shape:
            worst = math.inf
            continue
        worst = max(worst, float(np.abs(found[:, None, :] - direct[None, :, :]).max(axis=2).min(axis=1).max()))
    paths = result.paths.get("tracked", 0)
    return {"values": count, "seed": seed, "seconds": round(seconds, 2), "paths": paths, "failed": result.failed,
            "retracked": result.paths.get("retracked", 0),
            "tracking_seconds": round(result.execution.get("tracking_seconds", 0.0), 2),
            "largest_distance_to_direct_solve": worst}


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="200 values, one seed, no regions")
    parser.add_argument("--values", type=int, default=1000)
    parser.add_argument("--workers", type=int, default=None)
    parser.add_argument("--seeds", type=int, default=3)
    args = parser.parse_args()
    seeds = [1] if args.quick else list(range(1, args.seeds + 1))
    count = 200 if args.quick else args.values
    report = {"discriminant": [], "sweep": []}
    print("discriminant of the four-bar (coupler b)")
    for seed in seeds:
        row = bench_discriminant(seed, regions=not args.quick)
        report["discriminant"].append(row)
        print(f"  seed {seed}: {row['seconds']:7.2f} s  points match {row['points_match']}  branches "
              f"{row['branches_from_0']}  paths {row['paths']}")
    print(f"sweep of the four-bar at a crank angle, {count} coupler lengths")
    for seed in seeds:
        row = bench_sweep(count, seed, args.workers)
        report["sweep"].append(row)
        print(f"  seed {seed}: {row['seconds']:6.2f} s (tracking {row['tracking_seconds']} s)  paths {row['paths']}  "
              f"failed {row['failed']}  re-tracked {row['retracked']}  largest distance to a direct solve "
              f"{row['largest_distance_to_direct_solve']:.2e}")
    out = pathlib.Path(__file__).resolve().parent / "results" / "families.json"
    out.parent.mkdir(exist_ok=True)
    out.write_text(json.dumps(report, indent=1) + "\n")
    print(f"written to {out}")


if __name__ == "__main__":
    main()
