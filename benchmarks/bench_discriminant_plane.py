"""Two-parameter discriminants: the traced real curve, its cusps and nodes, the regions of the plane.

Run:  python benchmarks/bench_discriminant_plane.py [--seeds 2] [--quartic]

* x^3 + p x + q on [-3, 3]^2: the curve 4 p^3 + 27 q^2 = 0 with one cusp at the origin, two regions
  (3 real roots inside the cusp, 1 outside; common practice, no source): seconds, largest |4p^3 + 27q^2|
  on the traced points, the cusp's distance to the origin, the number of regions.
* With ``--quartic``: x^4 + a x^2 + b x + 1 on [-3, -1] x [-1, 1], one node at (-2, 0) where the member is
  (x^2 - 1)^2 (common practice, no source); one to two minutes per seed (the tracer's critical solve).

Results are written to benchmarks/results/discriminant_plane.json.
"""

import argparse
import json
import pathlib
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.families.discriminant import DiscriminantOptions, discriminant
from numag.families.plane import trace_discriminant_curve
from numag.system.files import family_from_mapping

CUBIC = {"variables": ["x"], "parameters": ["p", "q"], "equations": ["x^3 + p*x + q"],
         "ranges": {"p": [-3, 3], "q": [-3, 3]}}
QUARTIC = {"variables": ["x"], "parameters": ["a", "b"], "equations": ["x^4 + a*x^2 + b*x + 1"],
           "ranges": {"a": [-3, -1], "b": [-1, 1]}}


def bench_cubic(seed):
    started = time.perf_counter()
    result = discriminant(family_from_mapping(CUBIC), DiscriminantOptions(lines=7), seed=seed)
    seconds = time.perf_counter() - started
    points = np.vstack(result.curve.arcs)
    cusps = [s.point for s in result.curve.special if s.kind.value == "cusp"]
    return {"seed": seed, "seconds": round(seconds, 2),
            "largest_residual": float(np.max(np.abs(4 * points[:, 0] ** 3 + 27 * points[:, 1] ** 2))),
            "cusps": len(cusps), "cusp_distance": float(np.linalg.norm(cusps[0])) if cusps else None,
            "nodes": sum(s.kind.value == "node" for s in result.curve.special),
            "regions": [r.count.solutions for r in result.plane_regions], "cells": len(result.regions),
            "notes": result.notes}


def bench_quartic(seed):
    started = time.perf_counter()
    curve = trace_discriminant_curve(family_from_mapping(QUARTIC), 1, 24, 5, np.random.default_rng(seed))
    nodes = [s.point.tolist() for s in curve.special if s.kind.value == "node"]
    return {"seed": seed, "seconds": round(time.perf_counter() - started, 2), "nodes": nodes,
            "cusps": sum(s.kind.value == "cusp" for s in curve.special), "failed_arcs": curve.failed_arcs}


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, default=2)
    parser.add_argument("--quartic", action="store_true", help="also the quartic's node (slow)")
    args = parser.parse_args()
    results = {"cubic": [bench_cubic(seed) for seed in range(1, args.seeds + 1)]}
    if args.quartic:
        results["quartic"] = [bench_quartic(seed) for seed in range(1, args.seeds + 1)]
    print(json.dumps(results, indent=1))
    out = pathlib.Path(__file__).parent / "results" / "discriminant_plane.json"
    out.parent.mkdir(exist_ok=True)
    out.write_text(json.dumps(results, indent=1) + "\n")


if __name__ == "__main__":
    main()
