"""The trace test at every scale of the witness set (decision 0135): answers and CPU seconds, before and after.

Run:  python benchmarks/bench_trace_scales.py [--checkout ROOT] [--seeds 1 2 3]

Per problem, seed and checkout (this one and ``--checkout``, alternated; each run a child process with one BLAS
thread): CPU seconds of the decomposition, paths tracked (witness sets, loops, trace tests, moves), monodromy loops,
the components found (dimension:degree, ``?`` when the trace test did not confirm the group) against sympy's
factorisation over Q(i) for the hypersurfaces (Meurer et al., "SymPy: symbolic computing in Python", PeerJ
Computer Science, 2017) and the expected components of the others (common practice, no source): the sphere and
the line through two of its points, the twisted cubic, the 2 x 3 matrices of rank <= 1 (degree 3; Harris,
"Algebraic Geometry: A First Course", Springer 1992, Example 19.10, from memory) and a four-bar's configuration
curve in millimetres (the kite four-bar: crank 1 = ground 1, coupler 1000 = rocker 1000).

A silent wrong answer is a row whose components all are confirmed and differ from the reference.
"""

import argparse
import json
import os
import pathlib
import subprocess
import sys

import checkout  # noqa: F401  (this checkout's numag, not an installed one)

PROBLEMS = {
    # name: (equations, variables, expected sorted "dimension:degree" list)
    "near-node cubic": (["y^2 - x^2*(x+1) - 1/10000000000"], ["x", "y"], ["1:3"]),
    "near-node cubic x1000": (["y^2/1000000 - x^2*(x/1000+1)/1000000 - 1/10000000000"], ["x", "y"], ["1:3"]),
    "near-cone surface": (["z^2 - x^2*(x+1) - y^2 - 1/10000000000"], ["x", "y", "z"], ["2:3"]),
    "quintic, nodes 2e-4 apart": (["y^2 - (x^2 - 1/100000000)^2*(x-1)"], ["x", "y"], ["1:5"]),
    "quintic at 1e-3, 1, 1e3": (["y^2 - (x-1/1000)^2*(x-1000)^2*(x-1)"], ["x", "y"], ["1:5"]),
    "sphere and a line": (["(x^2 + y^2 + z^2 - 169)*(x - 3)", "(x^2 + y^2 + z^2 - 169)*(y - 4)"], ["x", "y", "z"],
                          ["1:1", "2:2"]),
    "twisted cubic": (["x*z - y^2", "y - x^2", "z - x*y"], ["x", "y", "z"], ["1:3"]),
    "2x3 rank <= 1": (["a*e - b*d", "a*f - c*d", "b*f - c*e"], ["a", "b", "c", "d", "e", "f"], ["4:3"]),
    "kite four-bar (mm)": (["x1^2 + y1^2 - 1", "(x2 - 1)^2 + y2^2 - 1000000", "(x2 - x1)^2 + (y2 - y1)^2 - 1000000"],
                           ["x1", "y1", "x2", "y2"], None),
}

CHILD = r"""
import json, sys, time
sys.path.insert(0, sys.argv[1])
from numag.system.parse import parse_system
from numag.witness.decompose import decompose
equations, variables, seed = json.loads(sys.argv[2]), json.loads(sys.argv[3]), int(sys.argv[4])
started = time.process_time()
result = decompose(parse_system(equations, variables), seed=seed)
cpu = time.process_time() - started
parts = sorted(f"{c.dimension}:{c.degree}" + ("" if c.confirmed else "?") for c in result.components)
failed = sum(int(v) for k, v in result.paths.items() if k in ("minimum_step", "step_limit", "non_finite",
                                                                 "endgame_unsettled", "batch_failed"))
print(json.dumps({"cpu": cpu, "tracked": int(result.paths.get("tracked", 0)), "failed": failed,
                  "loops": sum(result.loops.values()), "components": parts}))
"""


def run(root, equations, variables, seed):
    env = dict(os.environ, OMP_NUM_THREADS="1", OPENBLAS_NUM_THREADS="1", MKL_NUM_THREADS="1")
    out = subprocess.run([sys.executable, "-c", CHILD, str(root), json.dumps(equations), json.dumps(variables),
                          str(seed)], capture_output=True, text=True, env=env, timeout=900)
    if out.returncode:
        return {"error": out.stderr.strip().splitlines()[-1:]}
    return json.loads(out.stdout.strip().splitlines()[-1])


def verdict(row, expected):
    """right / undecided (a group not confirmed or a path failed) / WRONG (a silent wrong answer) / ? (no reference)."""
    if "error" in row:
        return "error"
    if expected is None:
        return "undecided" if any(c.endswith("?") for c in row["components"]) else "?"
    if row["components"] == sorted(expected):
        return "right"
    if row["failed"] or any(c.endswith("?") for c in row["components"]):
        return "undecided"
    return "WRONG"


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--checkout", type=pathlib.Path, action="append", default=[],
                        help="another checkout to measure beside this one (e.g. the commit before decision 0135)")
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    parser.add_argument("--problems", default="", help="only these problems (comma-separated names)")
    args = parser.parse_args()
    roots = [checkout.ROOT] + [r.resolve() for r in args.checkout]
    chosen = [p for p in PROBLEMS if not args.problems or p in args.problems.split(",")]
    totals = {str(r): [0.0, 0, 0] for r in roots}
    print(f"{'problem':28} {'seed':>4} {'checkout':24} {'cpu s':>6} {'tracked':>7} {'loops':>5}  verdict    components")
    for name in chosen:
        equations, variables, expected = PROBLEMS[name]
        for seed in args.seeds:
            for root in roots:
                row = run(root, equations, variables, seed)
                mark = verdict(row, expected)
                if "error" in row:
                    print(f"{name:28} {seed:>4} {str(root)[-24:]:24} error {row['error']}")
                    continue
                totals[str(root)][0] += row["cpu"]
                totals[str(root)][1] += row["tracked"]
                totals[str(root)][2] += mark == "WRONG"
                print(f"{name:28} {seed:>4} {str(root)[-24:]:24} {row['cpu']:6.2f} {row['tracked']:>7} "
                      f"{row['loops']:>5}  {mark:10} {' '.join(row['components'])}", flush=True)
    for root, (cpu, tracked, wrong) in totals.items():
        print(f"total {root}: {cpu:.1f} CPU s, {tracked} paths, {wrong} silent wrong answers")


if __name__ == "__main__":
    main()
