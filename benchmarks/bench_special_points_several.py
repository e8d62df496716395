"""Special points of a singular curve of several equations (decision 0114): found / undecided / wrong, seconds.

Run:  python benchmarks/bench_special_points_several.py [--seeds 1 2 3]

The Whitney umbrella x^2 = y^2 z carried onto the graph w = z^2 + x y in C^4 (singular curve a conic; its one
special point the pinch point, the image of the origin; common practice, no source), in the identity frame, in
units x1000 and after a rational linear change with a shift, each at the given seeds. Per run: "found" (the pinch
point within 1e-6 of its exact place, nothing else, nothing undecided), "undecided" (no false point, but undecided
candidates: exit 3), "wrong" (a false or missing point with nothing undecided: silent); seconds of `singular_locus`
and of `component_anatomy`.
"""

import argparse
import time

import checkout  # this checkout's numag, not an installed one
import numpy as np

import numag
from numag.anatomy.survey import component_anatomy


def main():
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    args = parser.parse_args()
    checkout.measure_other(None)  # the cases are the tests'
    from test_anatomy_jumps import _carried_umbrella as carried
    for frame in ["identity", "units", "linear"]:
        for seed in args.seeds:
            system, pinch = carried(frame)
            started = time.perf_counter()
            locus = numag.singular_locus(system, seed=seed)
            curves = [c for c in locus.components if c.dimension == 1]
            located = time.perf_counter()
            anatomy = component_anatomy(system, curves[0], seed=seed)
            done = time.perf_counter()
            scale = 1 + np.linalg.norm(pinch)
            near = [bool(np.linalg.norm(p.point - pinch) < 1e-6 * scale) for p in anatomy.special_points]
            if near == [True] and not anatomy.undecided_candidates:
                verdict = "found"
            elif anatomy.undecided_candidates and all(near):
                verdict = "undecided"
            else:
                verdict = "wrong"
            print(f"{frame:8s} seed {seed}: {verdict:9s} locus {located - started:5.1f} s, anatomy {done - located:5.1f} s",
                  flush=True)


if __name__ == "__main__":
    main()
