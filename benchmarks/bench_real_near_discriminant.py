"""Real counts next to the discriminant: x^3 - 3x + q swept at q = +-(2 - 10^-k), with and without the realness
test by separation (decision 0076) and the clusters of endpoints split at 40 digits (decision 0087).

Run:  python benchmarks/bench_real_near_discriminant.py [--seeds 10]

x^3 - 3x + q has 3 real roots for |q| < 2 (the discriminant 108 - 27 q^2; common practice, no source). Printed per
k and per realness rule: the real counts over the seeds. Results go to benchmarks/results/real_near_discriminant.json.
"""

import argparse
import json
import pathlib

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.families.sweep import SweepOptions, sweep
from numag.system.files import family_from_mapping

CUBIC = {"variables": ["x"], "parameters": ["q"], "equations": ["x^3 - 3*x + q"]}
POWERS = list(range(6, 15))


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, default=10)
    args = parser.parse_args()
    family = family_from_mapping(CUBIC)
    values = np.array([2 - 10.0 ** -k for k in POWERS] + [-2 + 10.0 ** -k for k in POWERS])
    report = {}
    for name, options in (("fixed tolerance", SweepOptions(real_separation=0.0, split_clusters=False)),
                          ("with separation", SweepOptions(split_clusters=False)),
                          ("separation and clusters split (default)", SweepOptions())):
        counts = np.array([sweep(family, values[:, None], options, seed=seed).real_counts()
                           for seed in range(1, args.seeds + 1)])
        report[name] = {f"{sign}(2 - 1e-{k})": counts[:, j + offset].tolist()
                        for offset, sign in ((0, "+"), (len(POWERS), "-")) for j, k in enumerate(POWERS)}
        print(f"{name}: {int(np.sum(counts != 3))} of {counts.size} counts other than 3")
        for j, k in enumerate(POWERS):
            print(f"  1e-{k:<2d} from q = +-2: {sorted(set(counts[:, j].tolist() + counts[:, j + len(POWERS)].tolist()))}")
    out = pathlib.Path(__file__).resolve().parent / "results" / "real_near_discriminant.json"
    out.parent.mkdir(exist_ok=True)
    out.write_text(json.dumps(report, indent=1) + "\n")


if __name__ == "__main__":
    main()
