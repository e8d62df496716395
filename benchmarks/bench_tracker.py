"""Tracker benchmark: families of growing size, numag and sympy's Groebner basis side by side.

Run:  python benchmarks/bench_tracker.py [--quick | --large] [--sympy-seconds 20] [--repeats 3]

Per problem: paths, distinct solutions found against the expected count,
failed paths, median and max steps per path, paths per second, and the cost
per path in units. One unit is the time of one batched evaluation of H and its
Jacobian plus one batched linear solve for all P paths of the run, divided by
P, measured in the same run (the mean over a second of repeated calls, taken
before and after every solve), so the figure means the same on any machine. Families with at least
1,000 paths are solved three times and the median kept. Two figures: the whole
solve, and the tracking alone.
Where sympy's Groebner basis finishes within the time limit on the same
system (in a child process that is terminated on time-out), its time and
count go in the same row, with the ratio.
"""

import argparse
import os
import itertools
import time

import numpy as np
from threadpoolctl import threadpool_limits

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from reference_timing import run_with_time_limit
import numag
from numag.tracking.homotopy import StraightLineHomotopy
from numag.system.parse import parse_system
from numag.tracking.solve import SolveOptions, solve_system


def dense_system(n, degree, seed):
    """n dense equations of the given degree with random integer coefficients (generic: Bezout count)."""
    rng = np.random.default_rng(seed)
    names = [f"x{j}" for j in range(n)]
    monomials = [m for d in range(degree + 1) for m in itertools.combinations_with_replacement(names, d)]
    equations = []
    for _ in range(n):
        coefficients = rng.integers(-9, 10, size=len(monomials))
        coefficients[coefficients == 0] = 1
        equations.append(" + ".join(f"({c})*{'*'.join(m) or '1'}" for c, m in zip(coefficients, monomials)))
    return parse_system(equations, names, name=f"dense d={degree} n={n}"), degree ** n


def chain_system(n):
    """x_i x_(i+1) = 1 (i < n), x_n = 2: one solution, 2^(n-1) - 1 paths to singular points at infinity."""
    names = [f"x{j}" for j in range(n)]
    equations = [f"{names[i]}*{names[i + 1]} - 1" for i in range(n - 1)] + [f"{names[-1]} - 2"]
    return parse_system(equations, names, name=f"chain n={n}"), 1


def unit_seconds(system, seed, seconds=1.0):
    """One batched evaluation of H and J plus one batched solve for all P start points.

    Repeated for at least ``seconds`` (and 15 times) and averaged: the run it is compared with is a
    long measurement that averages a shared machine's noise too; a few 5 ms calls would catch only
    a moment of it (their medians drift by 30 % between blocks on the 2-core machine).
    """
    homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(seed))
    points = homotopy.start_solutions()
    s = np.full(len(points), 0.5 + 0.0j)
    with threadpool_limits(limits=1):
        homotopy.evaluate(points, s)  # warm up
        calls, start = 0, time.perf_counter()
        while calls < 15 or time.perf_counter() - start < seconds:
            values, jacobian, derivative = homotopy.evaluate(points, s)
            np.linalg.solve(jacobian, derivative[..., None])
            calls += 1
        return (time.perf_counter() - start) / calls


def _sympy_count(equations, variables, queue):
    import sympy
    symbols = sympy.symbols(variables)
    polys = [sympy.sympify(e.replace("^", "**"), locals=dict(zip(variables, symbols))) for e in equations]
    start = time.perf_counter()
    basis = sympy.groebner(polys, *symbols, order="grevlex")
    leading = [sympy.Poly(g, *symbols).monoms(order="grevlex")[0] for g in basis.exprs]
    bound = max(max(m) for m in leading) + 1
    count = sum(1 for e in itertools.product(range(bound), repeat=len(symbols))
                if not any(all(a >= b for a, b in zip(e, m)) for m in leading))
    queue.put((time.perf_counter() - start, count))


def sympy_reference(system, seconds):
    """(seconds, count) from sympy, or (None, None) when it does not finish in time."""
    found = run_with_time_limit(_sympy_count, (system.to_texts(), system.variables), seconds)
    return found if found is not None else (None, None)


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--quick", action="store_true", help="small problems only")
    parser.add_argument("--sympy-seconds", type=float, default=20.0)
    parser.add_argument("--repeats", type=int, default=3, help="runs of the families with >= 1,000 paths")
    parser.add_argument("--large", action="store_true", help="only the dense families with >= 1,000 paths")
    args = parser.parse_args()
    problems = [dense_system(n, 2, n) for n in ([2, 4, 6] if args.quick else [2, 4, 6, 8, 10, 12])]
    problems += [dense_system(n, 3, 100 + n) for n in ([2, 3] if args.quick else [2, 3, 4, 5, 6])]
    problems += [chain_system(n) for n in ([4, 6] if args.quick else [4, 6, 8, 10])]
    if args.large:
        problems = [(system, expected) for system, expected in problems
                    if expected >= 1000 and system.name.startswith("dense")]
    print(f"numag measured: {os.path.dirname(numag.__file__)}")
    header = (f"{'problem':18} {'paths':>6} {'found':>6} {'expect':>6} {'failed':>6} {'med st':>6} {'max st':>6} "
              f"{'paths/s':>8} {'units/path':>10} {'tracking':>8} {'sympy s':>8} {'sympy #':>7} {'ratio':>7}")
    print(header)
    print("-" * len(header))
    total_paths = total_failed = 0
    for system, expected in problems:
        # One BLAS thread for the run and for the unit alike. On the families with at least 1,000
        # paths (where the issue states its goal) the median of three runs is kept: the same seed gives
        # the same paths, so the runs differ only by the noise of a shared machine.
        runs = args.repeats if int(np.prod(system.degrees)) >= 1000 else 1
        # The unit is measured right before and right after every run and the run is divided by
        # their mean: on a shared machine the speed drifts over seconds, and a unit taken once
        # would compare the run with a different moment. The median over the runs is kept.
        whole, tracking, results = [], [], []
        with threadpool_limits(limits=1):
            before = unit_seconds(system, 1)
            for _ in range(runs):
                result = solve_system(system, SolveOptions(), seed=1)
                after = unit_seconds(system, 1)
                unit = 0.5 * (before + after)
                whole.append(result.seconds / unit)
                tracking.append(result.extra["execution"]["tracking_seconds"] / unit)
                results.append(result)
                before = after
        result = results[int(np.argsort(whole)[len(whole) // 2])]
        counts = result.path_counts()
        found = sum(s.multiplicity for s in result.solutions)
        paths = counts["tracked"]
        per_path_units = float(np.median(whole))
        track_units = float(np.median(tracking))
        total_paths += paths
        total_failed += counts["failed"]
        sympy_time, sympy_count = (None, None)
        if paths <= 256:
            sympy_time, sympy_count = sympy_reference(system, args.sympy_seconds)
        ratio = f"{sympy_time / result.seconds:7.2f}" if sympy_time else "      -"
        print(f"{system.name:18} {paths:6d} {found:6d} {expected:6d} {counts['failed']:6d} "
              f"{np.median(result.steps):6.0f} {result.steps.max():6d} {paths / result.seconds:8.0f} "
              f"{per_path_units:10.1f} {track_units:8.1f} {('%8.2f' % sympy_time) if sympy_time else ' timeout' if paths <= 256 else '       -':>8} "
              f"{sympy_count if sympy_count is not None else '-':>7} {ratio}", flush=True)
    print(f"\nfailed paths: {total_failed} of {total_paths} ({total_failed / max(total_paths, 1) * 1e4:.2f} per 10,000)")
    print("ratio = sympy seconds / numag seconds (above 1: numag faster). 'found' counts solutions with "
          "multiplicity; 'expect' is the Bezout number (dense) or the known count (chain).")
    print("units/path = the whole solve (set-up, tracking, classification, clustering) in units; 'tracking' = "
          "the tracking alone (the batches and the re-tracking of jumped paths), in the same units.")


if __name__ == "__main__":
    main()
