"""Minors in mpmath by elimination, and the term bound that keeps sparse minors written out (decision 0067)."""

import itertools

import mpmath
import numpy as np
import pytest

from numag.numeric.minors import _adjugate, _determinant, minor_term_bound, random_minor_weights
from numag.system.parse import parse_system


def _random_matrix(rng, size, rank=None):
    """Random complex entries; with ``rank``, the product of size x rank and rank x size factors formed at the
    working precision (so the rank is exact to it)."""
    def draw(rows, columns):
        values = rng.standard_normal((rows, columns)) + 1j * rng.standard_normal((rows, columns))
        return mpmath.matrix([[mpmath.mpc(complex(v)) for v in row] for row in values])
    matrix = draw(size, size) if rank is None else draw(size, rank) * draw(rank, size)
    return [[matrix[i, j] for j in range(size)] for i in range(size)]


@pytest.mark.parametrize("seed", [0, 1, 2])
@pytest.mark.parametrize("size", [3, 6, 9])
def test_determinant_and_adjugate_against_mpmath(seed, size):
    # reference: mpmath's own det and inverse (adj M = det(M) M^-1 for invertible M; common practice, no source)
    rng = np.random.default_rng(seed)
    with mpmath.mp.workdps(40):
        matrix = _random_matrix(rng, size)
        reference = mpmath.matrix(matrix)
        determinant = _determinant(matrix, mpmath.mp)
        assert abs(determinant - mpmath.det(reference)) <= mpmath.mpf(10) ** -30 * abs(determinant)
        adjugate = mpmath.matrix(_adjugate(matrix, mpmath.mp))
        expected = mpmath.det(reference) * mpmath.inverse(reference)
        assert mpmath.mnorm(adjugate - expected, 1) <= mpmath.mpf(10) ** -30 * mpmath.mnorm(expected, 1)


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_adjugate_of_a_rank_deficient_matrix(seed):
    # M adj(M) = det(M) I = 0 for singular M, and adj(M) has rank 1 when rank M = size - 1 (common practice,
    # no source); the cofactors need no inverse, so the identity holds to working precision
    rng = np.random.default_rng(seed)
    with mpmath.mp.workdps(40):
        matrix = _random_matrix(rng, 7, rank=6)
        adjugate = mpmath.matrix(_adjugate(matrix, mpmath.mp))
        product = mpmath.matrix(matrix) * adjugate
        assert mpmath.mnorm(product, 1) <= mpmath.mpf(10) ** -25 * mpmath.mnorm(adjugate, 1)
        assert mpmath.mnorm(adjugate, 1) > mpmath.mpf(10) ** -3  # not the zero matrix
        assert abs(_determinant(matrix, mpmath.mp)) <= mpmath.mpf(10) ** -25


def test_interval_determinant_encloses_the_point_value():
    # interval elimination encloses mpmath's determinant of the midpoint matrix (reference: mpmath.det)
    rng = np.random.default_rng(5)
    values = rng.standard_normal((6, 6)) + 1j * rng.standard_normal((6, 6))
    boxes = [[mpmath.iv.mpc(v.real, v.imag) for v in row] for row in values]
    enclosure = _determinant(boxes, mpmath.iv)
    exact = mpmath.det(mpmath.matrix([[mpmath.mpc(complex(v)) for v in row] for row in values]))
    assert enclosure.real.a <= exact.real <= enclosure.real.b
    assert enclosure.imag.a <= exact.imag <= enclosure.imag.b


FOUR_BAR = (["ax^2 + ay^2 - 4", "(bx - 4)^2 + by^2 - 9", "(ax - bx)^2 + (ay - by)^2 - 9"], ["ax", "ay", "bx", "by"])


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_term_bound_holds_for_the_written_out_minors(seed):
    # reference: sympy expands each maximal minor of the Jacobian; its term count is at most the bound, and the
    # bound of a sparse Jacobian stays far below C(n + D, n) (common practice, no source)
    import sympy
    system = parse_system(*FOUR_BAR)
    weights = random_minor_weights(3, 4, 3, 24, np.random.default_rng(seed))
    bound = minor_term_bound(system.polynomials, weights)
    symbols = sympy.symbols(FOUR_BAR[1])
    jacobian = sympy.Matrix([[sympy.diff(sympy.sympify(e), s) for s in symbols] for e in FOUR_BAR[0]])
    largest = max(len(sympy.Poly(sympy.expand(jacobian[:, list(c)].det()), *symbols).terms())
                  for c in itertools.combinations(range(4), 3))
    assert largest <= bound < 35  # C(4 + 3, 4) = 35 monomials of degree <= 3 in 4 unknowns
