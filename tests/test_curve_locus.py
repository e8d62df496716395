"""The singular locus of a plane curve without repeated work (decision 0118): small witness sets split by the trace
test alone, coordinate points at infinity read from the exponents."""

import numpy as np
import pytest
import sympy

from corpus import chebyshev, plane_curve_singular_points_at_infinity
from numag.system.parse import parse_system
from numag.system.polynomial import Polynomial
from numag.singular.locus import _coordinate_zeros, singular_locus
from numag.witness.decompose import decompose

X, Y = sympy.symbols("x y")


def _factor_degrees(f):
    """The degrees of f's irreducible factors over Q (each once), by sympy's factorisation."""
    return sorted(sympy.Poly(g, X, Y).total_degree() for g, _ in sympy.factor_list(f)[1])


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_reducible_curve_is_split_into_its_factors(seed):
    # components of a union: sympy's factorisation over Q; each factor below is absolutely irreducible (a circle, a
    # line, a nodal cubic, a smooth cubic: common practice, no source)
    f = (X**2 + Y**2 - 2) * (X - 2*Y + 1) * (Y**2 - X**2 * (X + 1)) * (X**3 + Y**3 - 3*X*Y + Y - 5)
    system = parse_system([str(sympy.expand(f)).replace("**", "^")], ["x", "y"])
    result = decompose(system, seed=seed)
    assert sorted(c.degree for c in result.components) == _factor_degrees(f)
    assert all(c.confirmed and c.dimension == 1 for c in result.components)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_an_irreducible_curve_of_degree_twelve_is_one_component(seed):
    # T_a(x) - T_b(y) is irreducible for coprime a, b (its components for gcd(a, b) > 1 are read from sympy's
    # factorisation in tests/corpus.py); checked here with sympy's factorisation over Q, and a component over C
    # would pass the trace test on its own
    f = chebyshev(7, X) - chebyshev(12, Y)
    assert _factor_degrees(f) == [12]
    system = parse_system([str(sympy.expand(f)).replace("**", "^")], ["x", "y"])
    result = decompose(system, seed=seed)
    assert [(c.dimension, c.degree, c.confirmed) for c in result.components] == [(1, 12, True)]


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("a, b", [(5, 7), (4, 7)])
def test_chebyshev_curves_nodes_and_points_at_infinity(a, b, seed):
    # (a - 1)(b - 1)/2 real nodes for coprime a, b, at x = cos(i pi / a), y = cos(j pi / b) with i = j mod 2
    # (Koseleff and Pecker, "Chebyshev knots", J. Knot Theory Ramifications, 2011, from memory; tests/corpus.py);
    # the points at infinity by sympy (corpus.plane_curve_singular_points_at_infinity).
    f = chebyshev(a, X) - chebyshev(b, Y)
    system = parse_system([str(sympy.expand(f)).replace("**", "^")], ["x", "y"])
    locus = singular_locus(system, seed=seed)
    expected = sorted((np.cos(np.pi * i / a), np.cos(np.pi * j / b)) for i in range(1, a) for j in range(1, b)
                      if (i - j) % 2 == 0)
    found = np.array([c.points[0] for c in locus.isolated() if not c.at_infinity])
    assert len(found) == len(expected) == (a - 1) * (b - 1) // 2
    assert all(np.min(np.linalg.norm(found - np.array(p)[None, :], axis=1)) < 1e-8 for p in expected)
    at_infinity = [c for c in locus.components if c.at_infinity]
    assert len(at_infinity) == plane_curve_singular_points_at_infinity(f, X, Y)
    assert not locus.discarded and not any(locus.paths.get(k, 0) for k in ("minimum_step", "step_limit"))


def test_coordinate_zeros_of_the_restricted_partials():
    # a form vanishes at (1 : 0) exactly when it has no x^e term, to the order of the smallest power of y
    # (common practice, no source); sympy's gcd of the forms says the same of the three cases
    def form(terms):
        return Polynomial(np.array([e for e, _ in terms]), np.array([c for _, c in terms], dtype=complex), 2)

    y10 = form([((0, 10), 3.0)])
    assert [(z.tolist(), m) for z, m in _coordinate_zeros([y10])] == [([1, 0], 10)]
    both = [form([((2, 3), 1.0)]), form([((1, 4), 2.0), ((3, 2), 1.0)])]  # x^2 y^3 and x y^2 (y^2 + x^2)
    assert [(z.tolist(), m) for z, m in _coordinate_zeros(both)] == [([1, 0], 2), ([0, 1], 1)]
    assert _coordinate_zeros([y10, form([((5, 0), 1.0), ((0, 5), 1.0)])]) == []  # x^5 + y^5: no common zero
    assert sympy.gcd(Y**10, X**5 + Y**5) == 1
    assert _coordinate_zeros([form([((1, 1), 1.0), ((2, 0), 1.0)])]) is None  # no monomial: solved
