"""4 x 4 matrices of rank <= 2: the random-minors cascade, minor by minor (decision 0131).

X is given by its 16 3 x 3 minors (dimension 12, degree 20); Sing X is the rank <= 1 matrices (dimension 7,
degree 20). The minors formulation adds K = dim X + 1 = 13 random minors det(A_k J B_k) of degree 8. This
benchmark regenerates X and then only the first ``--minors`` of them, and prints per equation the CPU seconds,
the witness points by dimension, and at the end the paths tracked and failed, and the scale the first evaluated
minor got at the unit point (1, ..., 1) (the rank-1 all-ones matrix, where J = 0). Each checkout runs in a child
process, so ``--checkout DIR`` puts another checkout beside this one in one run.

Run:  python benchmarks/bench_rank_drop.py [--minors 2] [--seeds 1,2] [--checkout DIR] [--limit 900]
"""

import argparse
import json
import os
import subprocess
import sys
import time

import checkout  # noqa: F401  (this checkout's numag first)


def child(minors, seed, root):
    """One run in this process (the numag of checkout ``root``): per-equation lines, then a JSON line of totals."""
    checkout.measure_other(None if os.path.samefile(root, checkout.ROOT) else root)
    import numpy as np

    from bench_scale import matrix_minors_system
    from numag.numeric.minors import MinorsSystem, random_minor_weights
    from numag.witness.cascade import WitnessOptions, witness_supersets
    system = matrix_minors_system(4, 2, "4 x 4 rank <= 2")
    equations = [p.numeric() for p in system.polynomials]
    # the same draws as the singular locus's minors (drawn pair by pair: the first K do not depend on the count)
    weights = random_minor_weights(16, 16, 4, 24, np.random.default_rng(seed), count=minors)
    augmented = MinorsSystem(system.variables, equations, weights, name=system.name)
    scale = float(augmented.evaluated(homogenized=True).scaled_to_unit(np.ones((1, 17))).scales[0])
    start = time.process_time()

    def progress(message):
        print(f"  {time.process_time() - start:8.1f} cpu s  {message}", flush=True)

    supersets = witness_supersets(augmented, WitnessOptions(), seed=seed, progress=progress)
    counts = supersets.paths
    failed = sum(counts.get(label, 0) for label in ("minimum_step", "step_limit", "non_finite", "endgame_unsettled",
                                                     "batch_failed", "failed"))
    print(json.dumps({"cpu": time.process_time() - start, "tracked": counts.get("tracked", 0), "failed": failed,
                      "scale": scale}), flush=True)


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--minors", type=int, default=2, help="random minors after F (default 2; 13 in the locus)")
    parser.add_argument("--seeds", default="1,2")
    parser.add_argument("--checkout", default=None, help="another checkout measured beside this one")
    parser.add_argument("--limit", type=float, default=900, help="wall seconds per child (default 900)")
    parser.add_argument("--child", nargs=3, help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.child:
        child(int(args.child[0]), int(args.child[1]), args.child[2])
        return
    here = str(checkout.ROOT)
    roots = [("this", here)] + ([("other", os.path.abspath(args.checkout))] if args.checkout else [])
    print(f"4 x 4 rank <= 2: F then {args.minors} random minors of degree 8 (the locus adds 13); child processes, "
          f"wall limit {args.limit:g} s")
    for seed in [int(s) for s in args.seeds.split(",")]:
        for name, root in roots:
            print(f"seed {seed}, {name} checkout ({root}):", flush=True)
            env = dict(os.environ, OMP_NUM_THREADS="1")
            try:
                subprocess.run([sys.executable, __file__, "--child", str(args.minors), str(seed), root], env=env,
                               timeout=args.limit, check=False)
            except subprocess.TimeoutExpired:
                print(f"  stopped at the wall limit of {args.limit:g} s", flush=True)


if __name__ == "__main__":
    main()
