from fractions import Fraction

import mpmath
import pytest

from numag.errors import InputError, LimitError
from numag.system.exact import ExactCoefficient, square_free_split


def test_square_free_split_identity():
    # common practice, no source: n = s^2 * f with f square-free
    for n in [1, 2, 4, 12, 72, 97 * 97 * 3, 2**40 * 5, 999_983 * 999_983]:
        s, f = square_free_split(n)
        assert s * s * f == n
        assert all(f % (p * p) for p in range(2, 1000))


def test_square_free_split_limit():
    with pytest.raises(LimitError):
        square_free_split(10**19)


def test_golden_ratio_identity():
    # phi^2 = phi + 1 for phi = (1 + sqrt(5))/2 (common practice, no source)
    phi = (ExactCoefficient.rational(1) + ExactCoefficient.square_root(5)) / 2
    assert phi * phi == phi + 1


def test_products_of_roots_reduce():
    assert ExactCoefficient.square_root(2) * ExactCoefficient.square_root(8) == ExactCoefficient.rational(4)
    assert ExactCoefficient.square_root(Fraction(1, 2)) * ExactCoefficient.square_root(2) == 1
    assert (ExactCoefficient.square_root(6) * ExactCoefficient.square_root(10)
            == 2 * ExactCoefficient.square_root(15))


def test_imaginary_unit_and_reciprocal():
    i = ExactCoefficient.imaginary_unit()
    assert i * i == -1
    z = ExactCoefficient.rational(3, 4) * ExactCoefficient.square_root(7)
    assert z * z.reciprocal() == 1
    with pytest.raises(InputError):
        ExactCoefficient.zero().reciprocal()


def test_reciprocal_of_sums_of_roots():
    # rationalising denominators by conjugates: common practice, no source
    root2, root3 = ExactCoefficient.square_root(2), ExactCoefficient.square_root(3)
    i = ExactCoefficient.imaginary_unit()
    for value in (1 + root2, root2 + root3 + 5, (2 - i) * root3 + root2 * root3 - 7 * i):
        assert value * value.reciprocal() == 1
    assert (1 + root2).reciprocal() == root2 - 1


def test_context_evaluation_matches_mpmath():
    value = ExactCoefficient.rational(Fraction(1, 3), 2) * ExactCoefficient.square_root(5) + 1
    with mpmath.mp.workdps(50):
        expected = mpmath.mpc(1 + mpmath.sqrt(5) / 3, 2 * mpmath.sqrt(5))
        assert abs(value.to_context(mpmath.mp) - expected) < mpmath.mpf(10) ** -48
    enclosure = value.to_context(mpmath.iv)
    assert float(value.to_context(mpmath.mp).real) in enclosure.real


def test_conversion_to_complex_is_correctly_rounded():
    value = ExactCoefficient.square_root(2) / 2
    assert complex(value) == complex(2 ** 0.5 / 2)


def test_numbers_beyond_python_string_limits_are_written_so_that_they_read_back():
    # 3^9000 has 4,295 digits, 99999999999999999999^200 about 4,000: the text is chunked (common practice, no source)
    from numag.system.parse import parse_polynomial
    for text in ["(3^1000)^9*x - 1", "99999999999999999999^200*x + 1/7^1000/7^1000", "(1 + sqrt(2))^300*x"]:
        polynomial = parse_polynomial(text, ["x"])
        assert parse_polynomial(polynomial.to_text(["x"]), ["x"]) == polynomial


def test_square_root_work_is_limited_as_it_grows():
    from numag.errors import LimitError
    from numag.system.exact import MAX_RADICAL_TERMS
    primes = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43]
    total = sum((ExactCoefficient.square_root(p) for p in primes), ExactCoefficient.zero())
    with pytest.raises(LimitError, match="square-root terms"):
        total.reciprocal()
    product = ExactCoefficient.rational(1)
    with pytest.raises(LimitError, match=str(MAX_RADICAL_TERMS)):
        for p in primes:  # (1 + sqrt(2))(1 + sqrt(3))... has 2^k terms
            product = product * (ExactCoefficient.rational(1) + ExactCoefficient.square_root(p))
    # a few primes stay exact: 1/(sqrt(2) + sqrt(3)) = sqrt(3) - sqrt(2) (common practice, no source)
    assert (ExactCoefficient.square_root(2) + ExactCoefficient.square_root(3)).reciprocal() == \
        ExactCoefficient.square_root(3) - ExactCoefficient.square_root(2)
