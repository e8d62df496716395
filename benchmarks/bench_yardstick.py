"""numag against a plain batched tracker, side by side in one run.

Run:  python benchmarks/bench_yardstick.py [--n 10]

The plain tracker is the yardstick of issue 19: an RK4 predictor, three Newton corrections, step halving and
doubling, affine coordinates, no endgame, one BLAS thread, and its own straightforward numpy evaluation of the
dense quadrics (:class:`PlainQuadrics`: f_i(x) = c_i + b_i . x + x^T A_i x and its Jacobian from the coefficient
arrays, written here; it does not use numag's evaluator, so a faster numag evaluator shows in the ratio; decision
0085). Both track the 2^n paths of n dense quadrics in n unknowns with real random coefficients. numag does more
(projective coordinates, endgame, classification, clustering).
"""

import argparse
import itertools
import time

import numpy as np
from threadpoolctl import threadpool_limits

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.system.parse import parse_system
from numag.tracking.solve import solve_system


def quadrics(n, seed):
    rng = np.random.default_rng(seed)
    names = [f"x{j}" for j in range(n)]
    monomials = [m for d in range(3) for m in itertools.combinations_with_replacement(names, d)]
    equations = [" + ".join(f"({c:.8f})*{'*'.join(m) or '1'}" for c, m in zip(rng.standard_normal(len(monomials)),
                                                                           monomials)) for _ in range(n)]
    return parse_system(equations, names)


class PlainQuadrics:
    """Dense quadrics f_i(x) = c_i + b_i . x + x^T A_i x evaluated by two numpy products (the yardstick's own).

    The coefficients are read once from the system's terms (degree <= 2); values and the Jacobian
    (J_i = b_i + x^T (A_i + A_i^T)) are then plain array arithmetic, nothing of numag's.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> quadric = PlainQuadrics(parse_system(["1 + 2*x + 3*x*y - y^2"], ["x", "y"]))
    >>> values, jacobian = quadric.evaluate(np.array([[1.0 + 0j, 2.0]]))
    >>> values.real.tolist(), jacobian.real.tolist()
    ([[5.0]], [[[8.0, -1.0]]])
    """

    def __init__(self, system):
        n = system.n_variables
        count = len(system.polynomials)
        self.constant = np.zeros(count, dtype=complex)
        self.linear = np.zeros((count, n), dtype=complex)
        self.quadratic = np.zeros((count, n, n), dtype=complex)
        for i, polynomial in enumerate(system.polynomials):
            polynomial = polynomial.numeric()
            for exponent, coefficient in zip(polynomial.exponents, polynomial.coefficients):
                places = np.repeat(np.arange(n), exponent)  # the variables of the monomial, with repeats
                if len(places) == 0:
                    self.constant[i] += coefficient
                elif len(places) == 1:
                    self.linear[i, places[0]] += coefficient
                elif len(places) == 2:
                    self.quadratic[i, places[0], places[1]] += coefficient
                else:
                    raise ValueError(f"equation {i + 1} is not a quadric")
        # x^T A_i for every i in one product: the matrices side by side, (n, m n)
        self.left = self.quadratic.transpose(1, 0, 2).reshape(n, count * n)
        symmetric = self.quadratic + self.quadratic.transpose(0, 2, 1)  # d(x^T A x)/dx = x^T (A + A^T)
        self.symmetric = symmetric.transpose(1, 0, 2).reshape(n, count * n)
        self.shape = (count, n)
        self.rows = 0  # points evaluated (the profile's count of evaluation rows)

    def evaluate(self, points):
        """Values (P, m) and Jacobians (P, m, n) at ``points`` (P, n)."""
        self.rows += len(points)
        count = len(points)
        gradients = self.linear + (points @ self.symmetric).reshape((count,) + self.shape)
        # x^T A x + b . x + c = (b + x^T A) . x + c
        half = self.linear + (points @ self.left).reshape((count,) + self.shape)
        values = self.constant + (half @ points[:, :, None])[:, :, 0]
        return values, gradients


def plain_tracker(system, seed, evaluator=None):
    """The yardstick: affine straight-line homotopy, RK4 + 3 Newton steps, halve/double step control.

    ``evaluator``: a :class:`PlainQuadrics` of ``system`` (made here when not given; a caller passes its own to
    count the evaluation rows).
    """
    rng = np.random.default_rng(seed)
    n = system.n_variables
    evaluator = PlainQuadrics(system) if evaluator is None else evaluator
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
