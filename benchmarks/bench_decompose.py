"""Decomposition benchmark: determinantal varieties of growing size, with sympy side by side where it finishes.

Run:  python benchmarks/bench_decompose.py [--quick] [--sympy-seconds 30]

Per problem: unknowns, equations, the components found (dimension:degree)
against the expected ones, paths tracked (and of them the homotopy membership
tests that remove junk), junk points removed by the local isolation test
instead, failed paths, monodromy loops, seconds. The expected answers:
the m x n matrices of rank <= r form one irreducible variety of codimension
(m - r)(n - r) and degree prod_{i=0}^{n-r-1} (m+i)! i! / ((r+i)! (m-r+i)!)
(Harris, "Algebraic Geometry: A First Course", Springer 1992, Example 19.10;
from memory). Where sympy's Groebner basis of the minors finishes within the
time limit (child process, terminated on time-out), its time goes in the same
row with the ratio.
"""

import argparse
import itertools
import math
import time

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from reference_timing import run_with_time_limit
from numag.witness.decompose import decompose
from numag.system.polynomial import Polynomial, PolynomialSystem


def determinantal_system(rows, cols, rank):
    """The (rank + 1)-minors of a rows x cols matrix of unknowns, built with numag's own arithmetic."""
    names = [f"a{i}{j}" for i in range(rows) for j in range(cols)]
    count = len(names)

    def entry(i, j):
        return Polynomial.variable(i * cols + j, count)

    size = rank + 1
    minors = []
    for chosen_rows in itertools.combinations(range(rows), size):
        for chosen_cols in itertools.combinations(range(cols), size):
            total = Polynomial.zero(count)
            for perm in itertools.permutations(range(size)):
                inversions = sum(perm[a] > perm[b] for a in range(size) for b in range(a + 1, size))
                term = Polynomial.constant(-1 if inversions % 2 else 1, count)
                for a in range(size):
                    term = term * entry(chosen_rows[a], chosen_cols[perm[a]])
                total = total + term
            minors.append(total)
    return PolynomialSystem(names, minors, name=f"{rows}x{cols} rank<={rank}")


def expected(rows, cols, rank):
    """(dimension, degree) of the rows x cols matrices of rank <= rank."""
    m, n, r = max(rows, cols), min(rows, cols), rank
    degree = 1
    for i in range(n - r):
        degree *= math.factorial(m + i) * math.factorial(i) / (math.factorial(r + i) * math.factorial(m - r + i))
    return rows * cols - (rows - r) * (cols - r), round(degree)


def _sympy_groebner(texts, names, queue):
    import sympy
    symbols = sympy.symbols(names)
    polys = [sympy.sympify(t.replace("^", "**"), locals=dict(zip(names, symbols))) for t in texts]
    start = time.perf_counter()
    sympy.groebner(polys, *symbols, order="grevlex")
    queue.put(time.perf_counter() - start)


def sympy_seconds(system, limit):
    """Seconds sympy's Groebner basis takes, or None when it does not finish in time."""
    return run_with_time_limit(_sympy_groebner, (system.to_texts(), system.variables), limit)


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--quick", action="store_true", help="the small problems only")
    parser.add_argument("--sympy-seconds", type=float, default=30.0)
    args = parser.parse_args()
    shapes = [(2, 3, 1), (3, 3, 1), (3, 4, 2)] + ([] if args.quick else [(3, 4, 1), (4, 4, 2)])
    header = (f"{'problem':16} {'unk':>4} {'eqs':>4} {'found':>12} {'expected':>10} {'paths':>7} {'member':>7} "
              f"{'local':>6} {'failed':>6} {'loops':>5} {'seconds':>8} {'sympy s':>8} {'ratio':>7}")
    print(header)
    print("-" * len(header))
    for rows, cols, rank in shapes:
        system = determinantal_system(rows, cols, rank)
        result = decompose(system, seed=1)
        paths = result.paths
        failed = sum(paths.get(k, 0) for k in ("minimum_step", "step_limit", "non_finite", "endgame_unsettled"))
        found = " ".join(f"{c.dimension}:{c.degree}" for c in result.components)
        dimension, degree = expected(rows, cols, rank)
        reference = sympy_seconds(system, args.sympy_seconds)
        ratio = f"{reference / result.seconds:7.2f}" if reference else "      -"
        print(f"{system.name:16} {system.n_variables:4d} {system.n_equations:4d} {found:>12} "
              f"{f'{dimension}:{degree}':>10} {paths['tracked']:7d} {paths.get('membership_paths', 0):7d} "
              f"{paths.get('junk_by_local_test', 0):6d} {failed:6d} {sum(result.loops.values()):5d} {result.seconds:8.2f} "
              f"{('%8.2f' % reference) if reference else ' timeout':>8} {ratio}", flush=True)
    print("\nfound/expected: dimension:degree of each component. ratio = sympy seconds / numag seconds "
          "(sympy computes only the Groebner basis, not the decomposition).")


if __name__ == "__main__":
    main()
