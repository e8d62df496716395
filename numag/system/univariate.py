"""Exact univariate restrictions: how a hypersurface with rational coefficients meets a rational line.

On a line x = a + t b in general position, f restricts to g(t) of degree deg f, and the square-free
factorisation of g (Yun's algorithm over the rationals, exact) gives, for each multiplicity m, how many
distinct points of multiplicity m the line meets: the degrees of X's components of multiplicity m add up to
that number. It is an exact invariant of the equation to hold a numerical decomposition against (decision
0128): it does not depend on units, coordinates or the decomposition's seed.

Examples
--------
>>> from numag.system.parse import parse_system
>>> f = parse_system(["x^2*(y - x^2)"], ["x", "y"]).polynomials[0]  # a double line and a parabola
>>> multiplicity_profile(f, [1, 2], [3, 5])
{1: 2, 2: 1}
"""

from fractions import Fraction

import numpy as np

__all__ = ["multiplicity_profile", "restricted_to_line"]


def restricted_to_line(polynomial, offset, direction):
    """The coefficients of g(t) = f(offset + t direction), lowest degree first, exact (Fractions).

    Parameters
    ----------
    polynomial : Polynomial
        Exact, with rational coefficients.
    offset, direction : sequence of int
        The line, with integer entries (the restriction stays exact and short).

    Returns
    -------
    list of Fraction
        Trailing zeros removed ([] for g = 0).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> restricted_to_line(parse_system(["x*y - 1"], ["x", "y"]).polynomials[0], [1, 0], [1, 1])
    [Fraction(-1, 1), Fraction(1, 1), Fraction(1, 1)]
    """
    n = polynomial.n_variables
    matrix = np.asarray(direction, dtype=np.int64).reshape(n, 1)
    line = polynomial.substitute_linear(matrix, np.asarray(offset, dtype=np.int64))
    coefficients = [Fraction(0)] * (int(line.exponents.max()) + 1 if line.n_terms else 0)
    for exponent, value in zip(line.exponents[:, 0], line.coefficients):
        coefficients[int(exponent)] += value.as_fraction()
    while coefficients and coefficients[-1] == 0:
        coefficients.pop()
    return coefficients


def _trim(p):
    while p and p[-1] == 0:
        p.pop()
    return p


def _divmod(a, b):
    """Quotient and remainder of a by b (coefficient lists, lowest degree first, b nonzero)."""
    a, quotient = list(a), [Fraction(0)] * max(len(a) - len(b) + 1, 1)
    while len(_trim(a)) >= len(b):
        shift, factor = len(a) - len(b), a[-1] / b[-1]
        quotient[shift] = factor
        for k, value in enumerate(b):
            a[k + shift] -= factor * value
    return _trim(quotient), a


def _gcd(a, b):
    """The monic greatest common divisor of two coefficient lists (Euclid over the rationals)."""
    a, b = _trim(list(a)), _trim(list(b))
    while b:
        a, b = b, _divmod(a, b)[1]
    return [value / a[-1] for value in a] if a else a


def _derivative(p):
    return _trim([k * value for k, value in enumerate(p)][1:])


def _subtract(a, b):
    """a - b (coefficient lists, lowest degree first)."""
    width = max(len(a), len(b))
    return _trim([(a[k] if k < len(a) else 0) - (b[k] if k < len(b) else 0) for k in range(width)])


def _square_free_degrees(g):
    """{m: degree of the product of g's irreducible factors of multiplicity m} by Yun's algorithm (exact)."""
    degrees, m = {}, 1
    a = _gcd(g, _derivative(g))
    b = _divmod(g, a)[0]
    c = _divmod(_derivative(g), a)[0]
    d = _subtract(c, _derivative(b))
    while len(b) > 1:
        factor = _gcd(b, d)
        if len(factor) > 1:
            degrees[m] = len(factor) - 1
        b = _divmod(b, factor)[0]
        c = _divmod(d, factor)[0]
        d = _subtract(c, _derivative(b))
        m += 1
    return degrees


def multiplicity_profile(polynomial, offset, direction):
    """How many distinct points of each multiplicity the line offset + t direction meets V(f) in, exactly.

    Parameters
    ----------
    polynomial : Polynomial
        Exact, rational coefficients.
    offset, direction : sequence of int

    Returns
    -------
    dict or None
        {multiplicity: number of distinct points}; None where the line meets fewer than deg f points
        counted with multiplicity (the restriction loses degree: points at infinity on the line).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> multiplicity_profile(parse_system(["(x - y)^3*(x + y + 1)"], ["x", "y"]).polynomials[0], [0, 1], [2, 5])
    {1: 1, 3: 1}
    """
    g = restricted_to_line(polynomial, offset, direction)
    if len(g) - 1 != polynomial.degree:
        return None
    return _square_free_degrees(g)
