"""How many points per second the batched verdict handles (``numag check`` without the CLI).

Run:  python benchmarks/bench_check.py [--points N]

Prints, side by side in one run: the batched verdict on N smooth points of a
surface, the same verdict called one point at a time, and the ratio; then the
cost of an escalated (singular) point, which goes through the arbitrary-precision path.
"""

import argparse
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.system.parse import parse_system
from numag.singular.smoothness import check_points


def surface_points(count, rng):
    """Points of the surface z = x^2 y - y^3 + x (a graph, smooth everywhere)."""
    xy = rng.standard_normal((count, 2)) + 1j * rng.standard_normal((count, 2))
    z = xy[:, 0] ** 2 * xy[:, 1] - xy[:, 1] ** 3 + xy[:, 0]
    return np.column_stack([xy, z])


def main():
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--points", type=int, default=20000)
    args = parser.parse_args()
    rng = np.random.default_rng(0)
    system = parse_system(["z - x^2*y + y^3 - x"], ["x", "y", "z"])
    points = surface_points(args.points, rng)

    start = time.perf_counter()
    report = check_points(system, points, seed=0)
    batched = time.perf_counter() - start
    assert all(v.verdict == "smooth" for v in report.points)

    single_count = min(500, args.points)
    start = time.perf_counter()
    for point in points[:single_count]:
        check_points(system, [point], seed=0)
    single = (time.perf_counter() - start) / single_count * args.points

    cone = parse_system(["x^2 + y^2 - z^2"], ["x", "y", "z"])
    start = time.perf_counter()
    repeats = 20
    for _ in range(repeats):
        check_points(cone, [[0, 0, 0]], seed=0)
    escalated = (time.perf_counter() - start) / repeats

    print(f"smooth points, batched:        {args.points:8d} points in {batched:7.3f} s "
          f"= {args.points / batched:10.0f} points/s")
    print(f"smooth points, one at a time:  {args.points:8d} points in {single:7.3f} s (extrapolated from "
          f"{single_count}) = {args.points / single:10.0f} points/s")
    print(f"ratio batched / one at a time: {single / batched:8.1f}x")
    print(f"escalated singular point (cone vertex, 30 digits + neighbour test): {escalated * 1000:7.1f} ms/point")


if __name__ == "__main__":
    main()
