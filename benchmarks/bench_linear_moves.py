"""The regeneration's one-point linear moves solved against the same moves tracked (decision 0129).

Run:  python benchmarks/bench_linear_moves.py --checkout DIR [--problems rank1_3x3_matrices] [--seeds 1,2,3]
      python benchmarks/bench_linear_moves.py --checkout DIR --sweep rank1_3x3_matrices --seeds 1-10

DIR is a checkout whose ``numag.witness.cascade`` has ``_linear_move`` (commit fc0837a, kept on the branch
``t9fast-solved-move``); without ``--checkout`` this checkout is measured (it must have it too).

Default mode, for each shared problem of ``tests/data/problems.json`` and each seed: ``singular_locus`` runs with
every move tracked (as without the solved moves), and each one-point linear move of the regeneration is also solved
from a copy of the random generator's state. Printed: the moves, the largest distance between the tracked and the
solved endpoint (relative to 1 + |point|), and whether the generator ended in the same state after both.

``--sweep``: one shared problem over the seeds, each run twice in this process (moves solved, moves tracked):
the paths that ended at the minimum step or the step limit, the paths tracked and the pieces. Shown for
rank1_3x3_matrices in decision 0129: the assertion of ``tests/test_singular.py::test_every_shared_problem`` that no
path fails holds at some seeds only, with either kind of move.
"""

import argparse
import copy
import json
import sys
import time

import checkout  # noqa: F401  (this checkout's numag, not an installed one)


def _seeds(text):
    if "-" in text:
        low, high = map(int, text.split("-"))
        return list(range(low, high + 1))
    return [int(s) for s in text.split(",")]


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--checkout", default=None, help="measure the numag of this checkout")
    parser.add_argument("--problems", default=None, help="comma-separated shared problem names (default: all)")
    parser.add_argument("--seeds", default="3")
    parser.add_argument("--sweep", default=None, help="one shared problem: failed paths over the seeds")
    args = parser.parse_args()
    checkout.measure_other(args.checkout)
    import numpy as np
    from conftest import load_problems
    from numag.singular.locus import singular_locus
    from numag.system.parse import parse_system
    from numag.witness import cascade

    if not hasattr(cascade, "_linear_move"):
        sys.exit("this numag has no solved linear moves (cascade._linear_move): give --checkout")
    solved_move = cascade._linear_move
    problems = load_problems()

    def system_of(name):
        entry = problems[name]
        return parse_system(entry["equations"], entry["variables"], projective=entry["projective"])

    if args.sweep:
        system = system_of(args.sweep)
        for seed in _seeds(args.seeds):
            for mode in ("solved", "tracked"):
                cascade._linear_move = solved_move if mode == "solved" else (lambda *a: None)
                cpu = time.process_time()
                locus = singular_locus(system, seed=seed)
                cpu = time.process_time() - cpu
                pieces = sorted((c.dimension, c.degree, c.kind) for c in locus.components if not c.at_infinity)
                print(json.dumps({"problem": args.sweep, "seed": seed, "moves": mode,
                                  "minimum_step": locus.paths.get("minimum_step", 0),
                                  "step_limit": locus.paths.get("step_limit", 0),
                                  "tracked": locus.paths.get("tracked", 0), "pieces": pieces,
                                  "cpu": round(cpu, 2)}), flush=True)
        return

    record = []
    tracked_move = cascade.track_moves

    def row_of(form):  # a homogeneous linear form's coefficients on (X_0, x_1, ..., x_n)
        row = np.zeros(form.n_variables, complex)
        for exponents, value in zip(form.exponents, form.numeric_coefficients()):
            row[int(np.argmax(exponents))] += value
        return row

    def compared(start, target, points, rng, *args, **kwargs):
        """The move tracked as the regeneration tracks it, and solved from the same generator state."""
        linear = kwargs.get("held") is None and all(p.degree == 1 for p in list(start) + list(target))
        if not linear or sys._getframe(1).f_code.co_name != "_regenerate" or len(points) == 0:
            return tracked_move(start, target, points, rng, *args, **kwargs)
        twin = np.random.default_rng()
        twin.bit_generator.state = copy.deepcopy(rng.bit_generator.state)
        run = tracked_move(start, target, points, rng, *args, **kwargs)
        rows = [row_of(form) for form in target]
        ends = solved_move(np.array(rows[1:]).reshape(-1, len(rows[0])), rows[0], points, twin)
        if ends is not None:
            tracked = run.affine_endpoints()
            record.append((float(np.max(np.abs(tracked - ends) / (1 + np.abs(ends)))),
                           twin.bit_generator.state == rng.bit_generator.state))
        return run

    cascade._linear_move = lambda *a: None  # every move tracked, as on main; each compared with its solution
    cascade.track_moves = compared
    names = args.problems.split(",") if args.problems else list(problems)
    for name in names:
        for seed in _seeds(args.seeds):
            del record[:]
            locus = singular_locus(system_of(name), seed=seed)
            print(json.dumps({"problem": name, "seed": seed, "solved_moves": len(record),
                              "largest_distance": float("%.1e" % max((r[0] for r in record), default=0.0)),
                              "same_draws": all(r[1] for r in record),
                              "minimum_step": locus.paths.get("minimum_step", 0)}), flush=True)


if __name__ == "__main__":
    main()
