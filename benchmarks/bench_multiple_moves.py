"""Multiple components of a discriminant met on lines: failed deflated moves, points missed in the region, seconds.

Run:  python benchmarks/bench_multiple_moves.py [--seeds 1 2 3] [--trace-lines 40]

The four-bar with two free lengths (ground 4, crank 2, coupler b in [0.5, 8], rocker c in [1, 5]) has the
double lines b = 0 and c = 0 in its discriminant (sympy's eliminant b^2 c^2 prod (b +- c +- 2)(b +- c +- 6);
common practice, no source). The moves of their points onto the trace lines and the cell lines are timed
inside ``numag.families.lines._multiple_components``, and the points reached are checked against the exact
crossings of each line with b = 0 and c = 0 inside the region the trace keeps (the box enlarged by 1.25 of its
size on every side). Results go to benchmarks/results/multiple_moves.json.
"""

import argparse
import json
import pathlib
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
import numag.families.lines as lines_module
from numag.families.discriminant import DiscriminantOptions, discriminant
from numag.system.files import family_from_mapping

FOUR_BAR = {"variables": ["x1", "y1", "x2", "y2"], "parameters": ["b", "c"],
            "equations": ["x1^2 + y1^2 = 4", "(x2 - 4)^2 + y2^2 = c^2", "(x2 - x1)^2 + (y2 - y1)^2 = b^2"],
            "ranges": {"b": [0.5, 8], "c": [1, 5]}}
LOW, HIGH = np.array([0.5, 1.0]), np.array([8.0, 5.0])


def measured(seed, trace_lines):
    rows = {}
    original = lines_module._multiple_components

    def timed(lines_family, swept, values, rng):
        started = time.perf_counter()
        found, degree, failed = original(lines_family, swept, values, rng)
        # the lines are in the computed (balanced) units of the parameters: the region kept in those units
        factor = values[-1, 0] / HIGH[0]  # the last cell line is b = 8
        span = HIGH - LOW
        low, high = (LOW - 1.25 * span) * factor, (HIGH + 1.25 * span) * factor
        expected = missing = 0
        for value, points in zip(values, found):
            o, d = value[:2].real, value[2:].real
            for axis in (0, 1):  # the line meets b = 0 (axis 0) or c = 0 (axis 1)
                if abs(d[axis]) < 1e-12:
                    continue
                t = -o[axis] / d[axis]
                if np.all((o + t * d >= low) & (o + t * d <= high)):
                    expected += 1
                    missing += int(not len(points) or np.min(np.abs(points[:, -1] - t)) > 1e-6)
        rows.update(seconds=round(time.perf_counter() - started, 1), moves=len(swept.start_multiple) * len(values),
                    failed=failed, degree=degree, crossings_in_region=expected, missed=missing)
        return found, degree, failed

    lines_module._multiple_components = timed
    try:
        options = DiscriminantOptions(lines=5, trace_lines=trace_lines, components=False, at_infinity=False)
        started = time.perf_counter()
        discriminant(family_from_mapping(FOUR_BAR), options, seed=seed)
        rows["total_seconds"] = round(time.perf_counter() - started, 1)
    finally:
        lines_module._multiple_components = original
    return {"seed": seed, **rows}


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    parser.add_argument("--trace-lines", type=int, default=40)
    args = parser.parse_args()
    report = []
    for seed in args.seeds:
        row = measured(seed, args.trace_lines)
        report.append(row)
        print(f"seed {seed}: {row['moves']} moves, {row['failed']} failed, {row['missed']} of "
              f"{row['crossings_in_region']} crossings in the region missed, {row['seconds']} s "
              f"(whole discriminant {row['total_seconds']} s)", flush=True)
    out = pathlib.Path(__file__).resolve().parent / "results" / "multiple_moves.json"
    out.parent.mkdir(exist_ok=True)
    out.write_text(json.dumps(report, indent=1) + "\n")


if __name__ == "__main__":
    main()
