"""The centred system written out directly (Gaussian integers on one denominator) against sympy's expansion.

Reference: sympy's ``expand`` of p(y + s), exact (the binomial theorem; common practice, no source).
"""

from fractions import Fraction

import numpy as np
import pytest
import sympy

from numag.system.centred import CentredTerms, centre_near, centred_system
from numag.system.exact import ExactCoefficient
from numag.system.polynomial import Polynomial, PolynomialSystem


def _sympy_number(value):
    if isinstance(value, ExactCoefficient):
        return sum((sympy.Rational(re.numerator, re.denominator) + sympy.I * sympy.Rational(im.numerator, im.denominator))
                   * sympy.sqrt(r) for r, (re, im) in value.parts.items())
    value = complex(value)
    re, im = Fraction(value.real), Fraction(value.imag)
    return sympy.Rational(re.numerator, re.denominator) + sympy.I * sympy.Rational(im.numerator, im.denominator)


def _sympy_polynomial(polynomial, symbols):
    return sum(_sympy_number(c) * sympy.Mul(*(s ** int(e) for s, e in zip(symbols, row)))
               for c, row in zip(polynomial.coefficients, polynomial.exponents))


def _random_polynomial(rng, n, degree, terms, kind):
    exponents = rng.integers(0, degree + 1, size=(terms, n))
    exponents = exponents[exponents.sum(axis=1) <= degree]
    if kind == "double":  # a double coefficient is translated as the dyadic rational it is
        return Polynomial(exponents, rng.standard_normal(len(exponents)) * 10.0 ** rng.integers(-3, 4, len(exponents))
                          + 1j * rng.standard_normal(len(exponents)), n)
    numbers = [ExactCoefficient.rational(Fraction(int(a), int(b)), Fraction(int(c), int(b)))
               for a, b, c in zip(rng.integers(-99, 100, len(exponents)), rng.integers(1, 30, len(exponents)),
                                  rng.integers(-5, 6, len(exponents)))]
    if kind == "root":  # a square root: the general substitution is used, with the same result
        numbers[0] = numbers[0] + ExactCoefficient.square_root(2)
    return Polynomial(exponents, np.array(numbers, dtype=object), n)


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("kind", ["exact", "double", "root"])
def test_centred_system_is_the_exact_translation(seed, kind):
    rng = np.random.default_rng(seed)
    n = 3
    polynomials = [_random_polynomial(rng, n, 5, 12, kind) for _ in range(2)]
    system = PolynomialSystem(["x", "y", "z"], polynomials)
    point = rng.standard_normal(n) * 10.0 ** rng.integers(-2, 4) + 1j * rng.standard_normal(n)
    centring = centre_near(point, 1e-3)
    centred = centred_system(system, centring)
    symbols = sympy.symbols("x y z")
    shift = {s: s + _sympy_number(c) for s, c in zip(symbols, centring.centre)}
    for original, ours in zip(system.polynomials, centred.polynomials):
        expected = sympy.expand(_sympy_polynomial(original, symbols).xreplace(shift))
        assert ours.is_exact
        assert sympy.expand(_sympy_polynomial(ours, symbols) - expected) == 0


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("kind", ["exact", "double", "root"])
def test_rounded_centred_coefficients_are_the_exact_ones_rounded_once(seed, kind):
    # Reference: sympy's exact expansion of 10^r p(s + 10^c y), each coefficient rounded once to the nearest double
    # (Python's integer quotient is correctly rounded; common practice, no source). A judgement in double then sees
    # exactly the numbers the exact centred system, scaled, rounds to.
    rng = np.random.default_rng(seed)
    n = 3
    system = PolynomialSystem(["x", "y", "z"], [_random_polynomial(rng, n, 5, 12, kind) for _ in range(2)])
    point = rng.standard_normal(n) * 10.0 ** rng.integers(-2, 4) + 1j * rng.standard_normal(n)
    centring = centre_near(point, 1e-3)
    powers, rows = rng.integers(-20, 21, n), rng.integers(-20, 21, 2)
    rounded = CentredTerms(system, centring).rounded(powers, rows)
    symbols = sympy.symbols("x y z")
    shift = {s: _sympy_number(c) + sympy.Integer(10) ** int(k) * s for s, c, k in zip(symbols, centring.centre, powers)}
    for original, ours, r in zip(system.polynomials, rounded.polynomials, rows):
        expected = sympy.Poly(sympy.expand(sympy.Integer(10) ** int(r) * _sympy_polynomial(original, symbols)
                                           .xreplace(shift)), *symbols)
        assert not ours.is_exact
        assert len(expected.terms()) == ours.n_terms
        coefficients = dict(zip(map(tuple, ours.exponents.tolist()), ours.numeric_coefficients()))
        for monomial, value in expected.terms():
            if kind == "root":  # a square root: sympy's value at 40 digits, rounded
                exact = complex(sympy.N(value, 40))
            else:
                re, im = (Fraction(int(sympy.numer(v)), int(sympy.denom(v))) for v in value.as_real_imag())
                exact = complex(re.numerator / re.denominator, im.numerator / im.denominator)
            assert coefficients[monomial] == exact
