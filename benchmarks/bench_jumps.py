"""The jump-repair rule: answers, repair rounds and their cost, for a choice of the rule's divisors.

Run:  python benchmarks/bench_jumps.py [--divisors 4 10] [--seeds 8] [--quick]

Cases where paths jump: the singular locus of Chebyshev curves T_a(x) = T_b(y)
(their regenerations and monodromy moves meet near-collisions) for several
seeds, and ``solve`` of six random quadrics with reckless tracker settings (so
that paths jump often). Each repair of :func:`numag.tracking.service.track` is
counted: runs that repaired, rounds, batched evaluations spent in the repairs,
fresh-gamma rounds and paths left as jumped. Run it with two pairs of
divisors to compare rules (decision 0034): the answers (singular points,
solutions) must not change, the cost may.

The Chebyshev curve T_a(x) = T_b(y) with gcd(a, b) = 1 has (a - 1)(b - 1) / 2 nodes
(common practice, no source); the counts printed include singular points at infinity.
"""

import argparse
import itertools
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
import numag.tracking.service as service
from numag import singular_locus, solve_system
from numag.system.parse import parse_system
from numag.tracking.solve import SolveOptions
from numag.tracking.tracker import PathStatus, TrackerOptions


class RepairCounter:
    """Wraps the service's repair to count what it does (the rule itself is not changed)."""

    def __init__(self):
        self.runs = self.rounds = self.evaluations = self.fresh = self.jumped = 0
        self._repair, self._crossed = service._repair_jumps, service._crossed
        service._repair_jumps, service._crossed = self.repair, self.crossed

    def crossed(self, run, projective, tolerance):
        found = self._crossed(run, projective, tolerance)
        self.rounds += bool(len(found))
        return found

    def repair(self, run, *args):
        evaluations, homotopy, retracks = run.evaluations, run.homotopy, run.jump_retracks
        self._repair(run, *args)
        self.runs += run.jump_retracks > retracks
        self.evaluations += run.evaluations - evaluations
        self.fresh += run.homotopy is not homotopy
        self.jumped += int(np.sum(run.status == PathStatus.FAILED_JUMP))


def chebyshev_text(degree, name):
    """T_degree(name) expanded, by the three-term recurrence T_{k+1} = 2 x T_k - T_{k-1}."""
    previous, current = np.array([1]), np.array([0, 1])
    for _ in range(degree - 1):
        previous, current = current, np.concatenate([[0], 2 * current]) - np.pad(previous, (0, len(current) + 1
                                                                                              - len(previous)))
    return " + ".join(f"({int(c)})*{name}^{k}" for k, c in enumerate(current) if c)


def reckless_quadrics(seed):
    rng = np.random.default_rng(seed + 3)
    names = [f"x{j}" for j in range(6)]
    monomials = [m for d in range(3) for m in itertools.combinations_with_replacement(names, d)]
    equations = [" + ".join(f"({c:.8f})*{'*'.join(m) or '1'}" for c, m in zip(rng.standard_normal(len(monomials)),
                                                                           monomials)) for _ in range(6)]
    return parse_system(equations, names)


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--divisors", nargs=2, type=float, default=None, metavar=("STEP", "PREDICTOR_ERROR"),
                        help="per-round divisors of the largest step and the aimed predictor error "
                             f"(default: the service's, {service.JUMP_STEP_DIVISOR:g} and "
                             f"{service.JUMP_PREDICTOR_ERROR_DIVISOR:g})")
    parser.add_argument("--seeds", type=int, default=8)
    parser.add_argument("--quick", action="store_true", help="two curves, four seeds, eight solves")
    args = parser.parse_args()
    if args.divisors:
        service.JUMP_STEP_DIVISOR, service.JUMP_PREDICTOR_ERROR_DIVISOR = args.divisors
    seeds = 4 if args.quick else args.seeds
    curves = [(7, 9), (4, 5)] if args.quick else [(7, 9), (4, 5), (5, 8), (6, 7)]
    counter = RepairCounter()
    started = time.perf_counter()
    print(f"divisors: step {service.JUMP_STEP_DIVISOR:g}, predictor error {service.JUMP_PREDICTOR_ERROR_DIVISOR:g}")
    for a, b in curves:
        system = parse_system([f"{chebyshev_text(a, 'x')} - ({chebyshev_text(b, 'y')})"], ["x", "y"])
        found = [sum(1 for c in singular_locus(system, seed=seed).components if c.dimension == 0)
                 for seed in range(seeds)]
        print(f"T{a}(x) = T{b}(y): {(a - 1) * (b - 1) // 2} nodes; singular points by seed {found}")
    solves = 8 if args.quick else 20
    reckless = TrackerOptions(corrector_iterations=8, predictor_error=0.5, max_step=1.0, chord_corrector=False,
                              first_contraction=0.5)
    found = []
    for seed in range(solves):
        result = solve_system(reckless_quadrics(seed), SolveOptions(tracker=reckless), seed=seed)
        found.append(len(result.solutions) if all(s.multiplicity == 1 for s in result.solutions) else -1)
    print(f"6 reckless quadrics (Bezout: 64 simple solutions); solutions by seed {found}")
    print(f"repairs: {counter.runs} runs, {counter.rounds} rounds, {counter.evaluations} batched evaluations, "
          f"{counter.fresh} fresh-gamma rounds, {counter.jumped} paths left jumped; "
          f"{time.perf_counter() - started:.1f} s")


if __name__ == "__main__":
    main()
