"""numag against a plain batched tracker, side by side in one run.

Run:  python benchmarks/bench_yardstick.py [--n 10]

The plain tracker is the yardstick of the tracker issue: an RK4 predictor,
three Newton corrections, step halving and doubling, affine coordinates, no
endgame, one BLAS thread, the same evaluation code. Both track the 2^n paths
of n dense quadrics in n unknowns with real random coefficients. numag does
more (projective coordinates, endgame, classification, clustering) and should
still be at least 3 times faster.
"""

import argparse
import itertools
import time

import numpy as np
from threadpoolctl import threadpool_limits

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.numeric.evaluate import BatchEvaluator
from numag.system.parse import parse_system
from numag.tracking.solve import solve_system


def quadrics(n, seed):
    rng = np.random.default_rng(seed)
    names = [f"x{j}" for j in range(n)]
    monomials = [m for d in range(3) for m in itertools.combinations_with_replacement(names, d)]
    equations = [" + ".join(f"({c:.8f})*{'*'.join(m) or '1'}" for c, m in zip(rng.standard_normal(len(monomials)),
                                                                           monomials)) for _ in range(n)]
    return parse_system(equations, names)


def plain_tracker(system, seed):
    """The yardstick: affine straight-line homotopy, RK4 + 3 Newton steps, halve/double step control."""
    rng = np.random.default_rng(seed)
    n = system.n_variables
    evaluator = BatchEvaluator(system.polynomials)
    gamma = np.exp(2j * np.pi * rng.random())
    roots = np.array(list(itertools.product([1, -1], repeat=n)), dtype=complex)  # x_i^2 - 1 = 0
    x, s = roots.copy(), np.ones(len(roots))
    h = np.full(len(roots), 0.05)
    active = np.ones(len(roots), dtype=bool)
    failed = np.zeros(len(roots), dtype=bool)

    def parts(points, t):
        f, jf = evaluator.evaluate(points)
        g = points ** 2 - 1
        jg = np.zeros_like(jf)
        idx = np.arange(n)
        jg[:, idx, idx] = 2 * points
        t = t[:, None]
        value = (1 - t) * f + t * gamma * g
        jac = (1 - t)[:, :, None] * jf + t[:, :, None] * gamma * jg
        return value, jac, gamma * g - f

    def velocity(points, t):
        _, jac, ds = parts(points, t)
        return -np.linalg.solve(jac, ds[..., None])[..., 0]

    successes = np.zeros(len(roots), dtype=int)
    while np.any(active):
        i = np.nonzero(active)[0]
        hh = np.minimum(h[i], s[i])
        xi, si = x[i], s[i]
        k1 = velocity(xi, si)
        k2 = velocity(xi - hh[:, None] / 2 * k1, si - hh / 2)
        k3 = velocity(xi - hh[:, None] / 2 * k2, si - hh / 2)
        k4 = velocity(xi - hh[:, None] * k3, si - hh)
        y = xi - hh[:, None] / 6 * (k1 + 2 * k2 + 2 * k3 + k4)
        t = si - hh
        for _ in range(3):
            value, jac, _ = parts(y, t)
            delta = np.linalg.solve(jac, value[..., None])[..., 0]
            y = y - delta
        good = np.linalg.norm(delta, axis=1) < 1e-8 * (1 + np.linalg.norm(y, axis=1))
        x[i[good]], s[i[good]] = y[good], t[good]
        successes[i[good]] += 1
        grow = i[good][successes[i[good]] >= 3]
        h[grow] = np.minimum(2 * h[grow], 0.1)
        successes[grow] = 0
        h[i[~good]] /= 2
        failed[i[~good][h[i[~good]] < 1e-10]] = True
        active = (s > 0) & ~failed
    return x, failed


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--n", type=int, default=10)
    args = parser.parse_args()
    system = quadrics(args.n, 7)
    with threadpool_limits(limits=1):
        start = time.perf_counter()
        endpoints, failed = plain_tracker(system, 7)
        plain = time.perf_counter() - start
    start = time.perf_counter()
    result = solve_system(system, seed=7)
    ours = time.perf_counter() - start
    distinct_plain = len({tuple(np.round(p, 6)) for p in endpoints[~failed]})
    print(f"{2 ** args.n} paths, {args.n} dense quadrics in {args.n} unknowns (real random coefficients)")
    print(f"plain tracker: {plain:7.2f} s, {2 ** args.n / plain:7.0f} paths/s, {failed.sum()} failed, "
          f"{distinct_plain} distinct endpoints")
    print(f"numag solve:   {ours:7.2f} s, {2 ** args.n / ours:7.0f} paths/s, {result.path_counts()['failed']} failed, "
          f"{len(result.solutions)} distinct solutions")
    print(f"numag is {plain / ours:.1f} times faster")


if __name__ == "__main__":
    main()
