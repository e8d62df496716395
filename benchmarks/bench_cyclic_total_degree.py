"""Cyclic 6-roots from the total-degree start: does solve report the 156 roots, and nothing it cannot vouch for?

Run:  python benchmarks/bench_cyclic_total_degree.py [--seeds 0 1] [--workers 1]

Cyclic 6 has 156 isolated roots (Bjorck and Froberg 1991, from memory); the total-degree start tracks
720 paths, 564 of which go to infinity, some of them in cycles of winding number 4 towards the points
(0 : 0, a, 0, b, 0, c), a + b + c = 0, where the last homogenised equation is -X_0^6 and X_0 is known only
to about eps^(1/6) (decision 0049). Each seed takes a few minutes on one core. The table: solutions
reported, groups that refinement could not settle (``unverified``), failed paths, points at infinity,
and whether the solutions number 156 with none unverified. Results go to
benchmarks/results/bench_cyclic_total_degree.md.
"""

import argparse
import os
import pathlib
import time

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.system.parse import parse_system
from numag.tracking.solve import Execution, SolveOptions, solve_system

KNOWN_ROOTS = 156  # Bjorck and Froberg 1991, from memory


def cyclic(n):
    names = [f"z{i}" for i in range(n)]
    equations = [" + ".join("*".join(names[(i + j) % n] for j in range(k)) for i in range(n)) for k in range(1, n)]
    equations.append("*".join(names) + " - 1")
    return parse_system(equations, names, name=f"cyclic {n}")


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, nargs="+", default=[0, 1])
    parser.add_argument("--workers", type=int, default=1)
    args = parser.parse_args()
    lines = ["| seed | paths | solutions | unverified (paths) | failed | at infinity | 156 and none unverified | s |",
             "|---|---|---|---|---|---|---|---|"]
    for seed in args.seeds:
        started = time.perf_counter()
        result = solve_system(cyclic(6), SolveOptions(start="total-degree"), seed=seed,
                              execution=Execution(workers=args.workers))
        counts = result.path_counts()
        unverified_paths = sum(group.multiplicity for group in result.unverified)
        exact = len(result.solutions) == KNOWN_ROOTS and not result.unverified
        lines.append(f"| {seed} | {counts['tracked']} | {len(result.solutions)} | {len(result.unverified)} "
                     f"({unverified_paths}) | {counts['failed']} | {len(result.at_infinity)} | {exact} | "
                     f"{time.perf_counter() - started:.0f} |")
        print(lines[-1], flush=True)
    table = "\n".join(lines)
    print(table)
    out = pathlib.Path(__file__).resolve().parent / "results"
    os.makedirs(out, exist_ok=True)
    (out / "bench_cyclic_total_degree.md").write_text(
        f"python benchmarks/bench_cyclic_total_degree.py --seeds {' '.join(map(str, args.seeds))}\n\n{table}\n")


if __name__ == "__main__":
    main()
