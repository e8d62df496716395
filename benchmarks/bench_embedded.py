"""Embedded points against singular points (decision 0105): check's verdicts against sympy, and what they cost.

Run:  python benchmarks/bench_embedded.py [--quick] [--checkout ROOT]

The cases of tests/test_check_embedded.py (three embedded points of the equations, where X is smooth, and three
singular points of X cut out by more equations than the codimension: a node, a cusp, a crossing), in units x1, x1000,
x1/1000 and after a rational linear change, each at seeds 1, 2, 3. The expected verdict comes from sympy (the
radical found by hand, checked with Groebner bases; the Jacobian criterion on it). Prints per case the verdicts
counted, the wrong ones, and the CPU seconds of check (decomposition included). ``--checkout`` runs another checkout
(before/after: the code before decision 0105 calls every embedded point "singular").
"""

import argparse
import collections
import os
import time

import checkout  # this checkout's numag, not an installed one


def main():
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--quick", action="store_true", help="units x1 and the linear change only, seed 1")
    parser.add_argument("--checkout", help="the numag checkout to measure (default: this one)")
    args = parser.parse_args()
    checkout.measure_other(args.checkout)
    from test_check_embedded import CASES, CHANGES, changed, radical_by_hand  # the cases and their sympy check
    from test_check_far import exact_text, system_of
    import numag
    from numag.singular.smoothness import check_points
    from numag.witness.decompose import decompose
    print(f"numag from {os.path.dirname(numag.__file__)}")
    changes = ["unit", "linear"] if args.quick else list(CHANGES)
    seeds = (1,) if args.quick else (1, 2, 3)
    print(f"{'case':28s} {'expected':15s} {'verdicts':40s} {'wrong':>5s} {'CPU s':>7s}")
    total_wrong = 0
    for name in CASES:
        verdicts, wrong, seconds = collections.Counter(), 0, 0.0
        for change in changes:
            equations, radical, variables, point, _ = changed(name, change)
            singular = radical_by_hand(equations, radical, variables, point)
            expected = "singular" if singular else "embedded point"
            system = system_of(equations, variables)
            for seed in seeds:
                started = time.process_time()
                (verdict,) = check_points(system, [exact_text(point)], seed=seed,
                                          decomposition=decompose(system, seed=seed)).points
                seconds += time.process_time() - started
                verdicts[str(verdict.verdict)] += 1
                wrong += str(verdict.verdict) != expected
        total_wrong += wrong
        shown = ", ".join(f"{k} {v}" for k, v in sorted(verdicts.items()))
        print(f"{name:28s} {expected:15s} {shown:40s} {wrong:5d} {seconds:7.2f}")
    print(f"wrong verdicts: {total_wrong}")


if __name__ == "__main__":
    main()
