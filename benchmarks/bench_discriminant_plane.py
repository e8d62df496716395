"""Two-parameter discriminants: the traced real curve, its cusps and nodes, the regions of the plane.

Run:  python benchmarks/bench_discriminant_plane.py [--seeds 2] [--quartic] [--four-bar] [--components]

* x^3 + p x + q on [-3, 3]^2: the curve 4 p^3 + 27 q^2 = 0 with one cusp at the origin, two regions
  (3 real roots inside the cusp, 1 outside; common practice, no source): seconds, largest |4p^3 + 27q^2|
  on the traced points, the cusp's distance to the origin, the number of regions.
* With ``--quartic``: x^4 + a x^2 + b x + 1 on [-3, -1] x [-1, 1], one node at (-2, 0) where the member is
  (x^2 - 1)^2 (common practice, no source); one to two minutes per seed (the tracer's critical solve).
* With ``--four-bar`` (instead of the cubic): a four-bar with ground 4, crank 2, coupler b in [0.5, 8] and
  rocker c in [1, 5] free (members are curves; the curve is traced across lines, decision 0060): seconds
  (wall and this process's processor time), the traced arcs' largest distance to the Grashof lines
  4 +- 2 +- b +- c = 0 (common practice, no source), the nodes, the cells whose branch count differs from
  Grashof's criterion. ``--components`` also decomposes the incidence set (dimensions and degrees; minutes).

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
FOUR_BAR = {"variables": ["x1", "y1", "x2", "y2"], "parameters": ["b", "c"],
            "equations": ["x1^2 + y1^2 = 4", "(x2 - 4)^2 + y2^2 = c^2", "(x2 - x1)^2 + (y2 - y1)^2 = b^2"],
            "ranges": {"b": [0.5, 8], "c": [1, 5]}}
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


def _grashof_branches(b, c):
    lengths = sorted([4.0, 2.0, abs(b), abs(c)])
    if lengths[3] > sum(lengths[:3]):
        return 0
    return 2 if lengths[0] + lengths[3] < lengths[1] + lengths[2] else 1


def bench_four_bar(seed, components):
    started, processor = time.perf_counter(), time.process_time()
    options = DiscriminantOptions(lines=5, components=components, at_infinity=components)
    result = discriminant(family_from_mapping(FOUR_BAR), options, seed=seed)
    seconds, processor = time.perf_counter() - started, time.process_time() - processor
    points = np.vstack(result.curve.arcs)
    lines = [(1.0, sc, k) for sc in (1.0, -1.0) for k in (2.0, -2.0, 6.0, -6.0)]
    distance = np.min([np.abs(points[:, 0] + sc * points[:, 1] + k) / np.sqrt(2) for _, sc, k in lines], axis=0)
    wrong = [r.sample.tolist() for r in result.regions if r.count.branches != _grashof_branches(*r.sample)]
    return {"seed": seed, "components": components, "seconds": round(seconds, 2),
            "processor_seconds": round(processor, 2), "arcs": len(result.curve.arcs),
            "largest_distance_to_grashof_lines": float(distance.max()),
            "nodes": [s.point.round(9).tolist() for s in result.curve.special],
            "cells": len(result.regions), "cells_off_grashof": wrong, "regions": len(result.plane_regions),
            "discriminant_components": [(c.dimension, c.degree, c.kind.value) for c in result.components],
            "notes": result.notes}


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, default=2)
    parser.add_argument("--quartic", action="store_true", help="also the quartic's node (slow)")
    parser.add_argument("--four-bar", action="store_true", help="also the four-bar with two free lengths")
    parser.add_argument("--components", action="store_true", help="the four-bar's components too (minutes)")
    args = parser.parse_args()
    if args.four_bar:  # instead of the cubic
        results = {"four_bar": [bench_four_bar(seed, args.components) for seed in range(1, args.seeds + 1)]}
    else:
        results = {"cubic": [bench_cubic(seed) for seed in range(1, args.seeds + 1)]}
    if args.quartic:
        results["quartic"] = [bench_quartic(seed) for seed in range(1, args.seeds + 1)]
    print(json.dumps(results, indent=1))
    out = pathlib.Path(__file__).parent / "results" / "discriminant_plane.json"
    out.parent.mkdir(exist_ok=True)
    out.write_text(json.dumps(results, indent=1) + "\n")


if __name__ == "__main__":
    main()
