"""Problem families shared by the benchmarks (Chebyshev polynomials, unions of random quadrics)."""

import itertools

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.system.parse import parse_system
from numag.system.polynomial import Polynomial


def chebyshev(degree, variable_index, n_variables):
    """T_degree in one variable: T_0 = 1, T_1 = x, T_(k+1) = 2 x T_k - T_(k-1) (common practice)."""
    x = Polynomial.variable(variable_index, n_variables)
    previous, current = Polynomial.constant(1, n_variables), x
    if degree == 0:
        return previous
    for _ in range(degree - 1):
        previous, current = current, x * current * 2 - previous
    return current


def quadric_union(k, rng):
    """The product of k random quadrics in x, y, z with small integer coefficients."""
    names = ["x", "y", "z"]
    monomials = [f"{a}*{b}" for a, b in itertools.combinations_with_replacement(names, 2)] + names + ["1"]
    factors = ["(" + " + ".join(f"({int(rng.integers(1, 6)) * int(rng.choice([-1, 1]))})*{m}"
                                for m in monomials) + ")" for _ in range(k)]
    return parse_system(["*".join(factors)], names, name=f"{k} quadrics")


def quadric_unions(counts, seed=11):
    """One union per k in ``counts``, drawn in order from one seeded generator."""
    rng = np.random.default_rng(seed)
    for k in counts:
        yield k, quadric_union(k, rng)
