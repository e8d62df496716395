"""Decomposition benchmark: determinantal varieties of growing size, with sympy side by side where it finishes.

Run:  python benchmarks/bench_decompose.py [--quick] [--sympy-seconds 30]
      python benchmarks/bench_decompose.py --four-bar [--checkout ROOT] [--seeds 3 4]

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

``--four-bar``: the decomposition inside ``numag discriminant`` of the four-bar with two free lengths (ground 4,
crank 2, coupler b, rocker c; components only, no curve), in a child process per checkout (this one and
``--checkout``, alternated per seed): CPU seconds, paths tracked, paths through the Cauchy endgame, and the
components' images (dimension:degree) with sympy's eliminant b^2 c^2 prod (b +- c +- 2)(b +- c +- 6) as the
reference: 8 lines and the double lines b = 0, c = 0 (decision 0069; common practice, no source). Decision 0093.
"""

import argparse
import itertools
import json
import math
import pathlib
import subprocess
import sys
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


_FOUR_BAR_CHILD = """
import json, sys, time
sys.path.insert(0, sys.argv[1])
import numpy as np
import numag.tracking.tracker as tracker
from numag.families.discriminant import DiscriminantOptions, discriminant
from numag.system.files import family_from_mapping
endgame = [0, 0]
original = tracker._cauchy_endgame
def counted(homotopy, near, *rest, **keywords):
    endgame[0] += 1
    endgame[1] += len(near)
    return original(homotopy, near, *rest, **keywords)
tracker._cauchy_endgame = counted
family = family_from_mapping({"variables": ["x1", "y1", "x2", "y2"], "parameters": ["b", "c"],
    "equations": ["x1^2 + y1^2 = 4", "(x2 - 4)^2 + y2^2 = c^2", "(x2 - x1)^2 + (y2 - y1)^2 = b^2"],
    "ranges": {"b": [0.5, 8], "c": [1, 5]}})
options = DiscriminantOptions(lines=5, curve=False, regions=False, at_infinity=False)
cpu, wall = time.process_time(), time.perf_counter()
result = discriminant(family, options, seed=int(sys.argv[2]))
images = sorted(f"{c.dimension}:{c.degree}" for c in result.components)
print(json.dumps({"cpu": time.process_time() - cpu, "wall": time.perf_counter() - wall, "images": images,
                  "tracked": result.paths.get("tracked", 0), "failed": result.paths.get("failed", 0),
                  "endgame_calls": endgame[0], "endgame_paths": endgame[1]}))
"""


def four_bar(checkouts, seeds):
    """The four-bar's decomposition in each checkout, alternated per seed (child processes)."""
    print(f"{'checkout':28} {'seed':>4} {'cpu s':>7} {'wall s':>7} {'tracked':>7} {'endgame':>8} {'failed':>6}  images")
    rows = []
    for seed in seeds:
        for root in checkouts:
            out = subprocess.run([sys.executable, "-c", _FOUR_BAR_CHILD, str(root), str(seed)], capture_output=True,
                                 text=True, check=True).stdout.strip().splitlines()[-1]
            row = {"checkout": str(root), "seed": seed, **json.loads(out)}
            rows.append(row)
            images = " ".join(row["images"])
            print(f"{str(root)[-28:]:28} {seed:4d} {row['cpu']:7.1f} {row['wall']:7.1f} {row['tracked']:7d} "
                  f"{row['endgame_paths']:8d} {row['failed']:6d}  {images}", flush=True)
    print("\nexpected images (sympy's eliminant): eight lines 1:1 (b +- c = +-2, +-6) and the double lines b = 0, "
          "c = 0 (1:1 each)")
    out = pathlib.Path(__file__).resolve().parent / "results" / "decompose_four_bar.json"
    out.parent.mkdir(exist_ok=True)
    out.write_text(json.dumps(rows, indent=1) + "\n")


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--quick", action="store_true", help="the small problems only")
    parser.add_argument("--sympy-seconds", type=float, default=30.0)
    parser.add_argument("--four-bar", action="store_true", help="the four-bar with two free lengths only")
    parser.add_argument("--checkout", type=pathlib.Path, action="append", default=[],
                        help="another checkout to measure beside this one (--four-bar)")
    parser.add_argument("--seeds", type=int, nargs="+", default=[3])
    args = parser.parse_args()
    if args.four_bar:
        four_bar([checkout.ROOT] + [root.resolve() for root in args.checkout], args.seeds)
        return
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
