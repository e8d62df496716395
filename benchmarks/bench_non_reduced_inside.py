"""`singular` on hypersurfaces with a non-reduced component: the points inside it, right / flagged / WRONG (0140).

Run:  python benchmarks/bench_non_reduced_inside.py [--quick] [--checkout ROOT]

The cases of tests/test_non_reduced_inside.py (the tester's four of decision 0136 and four of ours), as written, in
units x1000 and x1/1000 and after a rational linear change, seeds 1, 2, 3. The reference is sympy's (factor_list, then solve of
each factor g of multiplicity m > 1 with every partial of order m: the points of V(g) where f vanishes to order > m,
and a curve of them by its points on a rational plane). Per run:

- "right": sympy's points are among numag's singular points, sympy's curve degree is that of numag's singular curves,
  and no completeness warning, no undecided piece (exit 0);
- "flagged": a completeness warning or an undecided piece (exit 3);
- "WRONG": anything else (a silent wrong answer, exit 0);
- CPU seconds of `singular` and tracked paths.

``--checkout`` measures another checkout (before: decision 0136 flags every such component; 0140 searches them).
"""

import argparse
import collections
import os
import time

import checkout  # this checkout's numag, not an installed one


def main():
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--quick", action="store_true", help="as written and the linear change, seed 1")
    parser.add_argument("--checkout", help="the numag checkout to measure (default: this one)")
    args = parser.parse_args()
    checkout.measure_other(args.checkout)
    import numpy as np
    from test_non_reduced_inside import CASES, CHANGES, _changed, _reference  # the cases and their sympy reference
    import numag
    from numag.app.report import completeness_warnings, singular_to_dict
    from numag.singular.kinds import PieceKind
    from numag.singular.locus import SingularOptions, singular_locus
    from numag.system.parse import parse_system
    print(f"numag from {os.path.dirname(numag.__file__)}")
    changes = dict(CHANGES, milli={"x": "(x/1000)", "y": "(y/1000)"})  # the test's, and units x 1/1000
    changes = {k: changes[k] for k in ("as written", "linear")} if args.quick else changes
    seeds = (1,) if args.quick else (1, 2, 3)
    print(f"{'case':32s} {'right':>6s} {'flagged':>8s} {'WRONG':>6s} {'CPU s':>7s} {'paths':>7s}")
    totals = collections.Counter()
    for name, (equations, unknowns) in CASES.items():
        counts, seconds, paths = collections.Counter(), 0.0, 0
        for change in changes:
            changed = _changed(equations, changes[change])
            points, curve_degree = _reference(changed[0], unknowns)
            for seed in seeds:
                started = time.process_time()
                locus = singular_locus(parse_system(changed, unknowns), SingularOptions(), seed=seed)
                seconds += time.process_time() - started
                paths += int(locus.paths.get("tracked", 0))
                warnings = completeness_warnings(singular_to_dict(locus, SingularOptions()))
                affine = [c for c in locus.components if not c.at_infinity]
                if warnings or any(c.kind is PieceKind.UNDECIDED for c in affine):
                    counts["flagged"] += 1
                    continue
                singular = [c for c in affine if c.kind is PieceKind.SINGULAR]
                found = [c.points[0] for c in singular if c.dimension == 0]
                scale = max([max(abs(v) for v in p) for p in points] + [1e-3])
                matched = all(any(np.linalg.norm(q - np.asarray(p)) <= 1e-6 * scale for q in found) for p in points)
                curves = sum(c.degree for c in singular if c.dimension == 1)
                counts["right" if matched and curves == curve_degree else "WRONG"] += 1
        totals.update(counts)
        print(f"{name:32s} {counts['right']:6d} {counts['flagged']:8d} {counts['WRONG']:6d} {seconds:7.1f} {paths:7d}")
    print(f"{'total':32s} {totals['right']:6d} {totals['flagged']:8d} {totals['WRONG']:6d}")


if __name__ == "__main__":
    main()
