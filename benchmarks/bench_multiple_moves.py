"""Multiple components of a discriminant met on lines: failed deflated moves, points missed in the region, seconds.

Run:  python benchmarks/bench_multiple_moves.py [--seeds 1 2 3] [--trace-lines 40] [--units 1 1000] [--no-cells]

The four-bar with two free lengths (ground 4, crank 2, coupler b in [0.5, 8], rocker c in [1, 5]) has the
double lines b = 0 and c = 0 in its discriminant (sympy's eliminant b^2 c^2 prod (b +- c +- 2)(b +- c +- 6);
common practice, no source). The moves of their points onto the trace lines and the cell lines are timed
inside ``numag.families.lines._multiple_components``, and the points reached are checked against the exact
crossings of each line with b = 0 and c = 0 inside the region the trace keeps (the box enlarged by 1.25 of its
size on every side). "flagged" is what numag counts as missed (decision 0107: failures, exit 3); a silent miss is
an exact crossing in the region missed on a line that numag did not flag. ``--units`` writes every length in
that unit (1000: millimetres). Results go to benchmarks/results/multiple_moves.json.
"""

import argparse
import json
import pathlib
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
import numag.families.lines as lines_module
import numag.families.discriminant as discriminant_module
from numag.families.discriminant import DiscriminantOptions, discriminant
from numag.families.records import MISSED_ON_LINES
from numag.system.files import family_from_mapping

LOW, HIGH = np.array([0.5, 1.0]), np.array([8.0, 5.0])


def four_bar(unit):
    return {"variables": ["x1", "y1", "x2", "y2"], "parameters": ["b", "c"],
            "equations": [f"x1^2 + y1^2 = {2 * unit!r}^2", f"(x2 - {4 * unit!r})^2 + y2^2 = c^2",
                          "(x2 - x1)^2 + (y2 - y1)^2 = b^2"],
            "ranges": {"b": [0.5 * unit, 8 * unit], "c": [1 * unit, 5 * unit]}}


def measured(seed, trace_lines, unit=1, cells=True):
    rows = {}
    original = lines_module._multiple_components

    def timed(lines_family, swept, values, rng, region):
        started = time.perf_counter()
        found, degree, failed, flagged = original(lines_family, swept, values, rng, region)
        # the lines are in the computed (balanced) units of the parameters: the region kept in those units
        factor = values[-1, 0] / HIGH[0]  # the last cell line is b = 8
        span = HIGH - LOW
        low, high = (LOW - 1.25 * span) * factor, (HIGH + 1.25 * span) * factor
        expected = missing = silent = 0
        for value, points, flags in zip(values, found, flagged):
            o, d = value[:2].real, value[2:].real
            for axis in (0, 1):  # the line meets b = 0 (axis 0) or c = 0 (axis 1)
                if abs(d[axis]) < 1e-12:
                    continue
                t = -o[axis] / d[axis]
                if np.all((o + t * d >= low) & (o + t * d <= high)):
                    expected += 1
                    miss = not len(points) or np.min(np.abs(points[:, -1] - t)) > 1e-6 * (1 + abs(t))
                    missing += int(miss)
                    silent += int(miss and not flags)
        rows.update(seconds=round(time.perf_counter() - started, 1), moves=len(swept.start_multiple) * len(values),
                    failed=failed, degree=degree, crossings_in_region=expected, missed=missing,
                    flagged=int(flagged.sum()), silent=silent)
        return found, degree, failed, flagged

    lines_module._multiple_components = timed
    cells_before = discriminant_module._cells
    if not cells:  # the cells' branch counts do not read the multiple moves: skipped for speed
        discriminant_module._cells = lambda family, cuts, rng: []
    try:
        options = DiscriminantOptions(lines=5, trace_lines=trace_lines, components=False, at_infinity=False)
        started = time.perf_counter()
        result = discriminant(family_from_mapping(four_bar(unit)), options, seed=seed)
        rows["missed_on_lines"] = int(result.paths.get(MISSED_ON_LINES, 0))
        rows["total_seconds"] = round(time.perf_counter() - started, 1)
    finally:
        lines_module._multiple_components = original
        discriminant_module._cells = cells_before
    return {"seed": seed, "unit": unit, **rows}


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    parser.add_argument("--trace-lines", type=int, default=40)
    parser.add_argument("--units", type=float, nargs="+", default=[1.0])
    parser.add_argument("--no-cells", action="store_true")
    args = parser.parse_args()
    report = []
    for unit in args.units:
        for seed in args.seeds:
            row = measured(seed, args.trace_lines, unit, cells=not args.no_cells)
            report.append(row)
            print(f"unit {unit:g} seed {seed}: {row['moves']} moves, {row['failed']} failed, {row['missed']} of "
                  f"{row['crossings_in_region']} crossings in the region missed, {row['flagged']} flagged, "
                  f"{row['silent']} silent; {row['seconds']} s (whole discriminant {row['total_seconds']} s)",
                  flush=True)
    out = pathlib.Path(__file__).resolve().parent / "results" / "multiple_moves.json"
    out.parent.mkdir(exist_ok=True)
    out.write_text(json.dumps(report, indent=1) + "\n")


if __name__ == "__main__":
    main()
