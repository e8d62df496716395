"""Real counts of two circles' members: silent wrong counts and flagged ones, any checkout (decision 0104).

Run:  python benchmarks/bench_real_counts.py [--checkout DIR] [--sweep-seeds 40]

The family x^2 + y^2 - unit^2/10^6, (x - p/10^6)^2 + y^2 - q^2 (p in [0, 5000 unit], q in [0, 0.005 unit]):
the circles meet in two real points when |r - |q|| < d < r + |q| (r = unit/1000, d = p/10^6), else none
(elementary geometry: common practice, no source). Rows: the regions of `discriminant` on the line p = 5000 unit
(units 1, 10^3, 10^-3; seeds 1-3) and the members of sweeps of that line at 8 values of q (unit 1, seeds 0..N-1).
A count is SILENT when it is wrong and neither failed nor undecided.
"""

import argparse
import pathlib
import sys

import numpy as np

import checkout  # noqa: F401  (this checkout's numag unless --checkout names another)

parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
parser.add_argument("--checkout", default=str(pathlib.Path(__file__).resolve().parent.parent),
                    help="the numag checkout to measure (default: this one)")
parser.add_argument("--sweep-seeds", type=int, default=40)
args = parser.parse_args()
sys.path.insert(0, str(pathlib.Path(args.checkout).resolve()))

from numag.families.discriminant import discriminant  # noqa: E402
from numag.families.sweep import sweep  # noqa: E402
from numag.system.exact import ExactCoefficient  # noqa: E402
from numag.system.files import family_from_mapping  # noqa: E402


def circles(unit, p):
    square = f"{int(unit) ** 2}" if unit >= 1 else f"1/{int(round(1 / unit)) ** 2}"
    family = family_from_mapping({"variables": ["x", "y"], "parameters": ["p", "q"],
                                  "equations": [f"x^2 + y^2 - ({square})/10^6", "(x - p/10^6)^2 + y^2 - q^2"],
                                  "ranges": {"p": [0, 5000 * unit], "q": [0, 0.005 * unit]}})
    return family.restricted(0, ExactCoefficient.from_complex(float(p * unit)))


def exact(p, q, unit):
    r, d, q = 1e-3 * unit, p / 1e6, abs(q)
    return 2 if abs(r - q) < d < r + q else 0


def tally(rows):
    """rows of (right, sure): (total, silent, flagged)."""
    return len(rows), sum(1 for right, sure in rows if sure and not right), sum(1 for _, sure in rows if not sure)


rows = []
for unit in (1, 1000, 0.001):
    for seed in (1, 2, 3):
        for region in discriminant(circles(unit, 5000), seed=seed).regions:
            count = region.count
            rows.append((count.solutions == exact(5000 * unit, region.sample[0], unit),
                         count.failed == 0 and getattr(count, "undecided", 0) == 0))
print("line p = 5000 regions: %d, silent %d, flagged %d" % tally(rows))
rows = []
values = np.array([-0.0065, -0.005, 5.55e-19, 0.001, 0.003, 0.005, 0.0065, 0.0])[:, None]
for seed in range(args.sweep_seeds):
    for member, value in zip(sweep(circles(1, 5000), values, seed=seed).values, values[:, 0]):
        rows.append((member.real_count == exact(5000, value, 1),
                     member.failed == 0 and getattr(member, "undecided", 0) == 0))
print("sweep members: %d, silent %d, flagged %d" % tally(rows))
