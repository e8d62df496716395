"""Interval helpers on mpmath's ``iv`` context: points and boxes as intervals, bounds of complex
intervals, magnitudes, enclosures of matrices and of the size of a polynomial's terms over a box.

Complex boxes are rectangles (an interval for the real and one for the imaginary part of each
coordinate), so every helper here reads and writes ``mpmath.iv.mpc`` values.

Examples
--------
>>> import mpmath
>>> _excludes_zero(mpmath.iv.mpc(mpmath.iv.mpf([1, 2]), 0)), _holds_zero(mpmath.iv.mpc(mpmath.iv.mpf([-1, 2]), 0))
(True, True)
"""

import math

import mpmath

from ..system.exact import ExactCoefficient


def _iv_point(value):
    """An mp number (or Python number) as a point interval of ``mpmath.iv``."""
    value = mpmath.mp.mpc(value)
    return mpmath.iv.mpc(value.real, value.imag)


def _iv_box(center, radii):
    """The box center_j + [-r_j, r_j] + i[-r_j, r_j]."""
    iv = mpmath.iv
    box = []
    for c, r in zip(center, radii):
        spread = iv.mpf([-r, r])
        box.append(iv.mpc(iv.mpf(c.real) + spread, iv.mpf(c.imag) + spread))
    return box


def _bounds(value):
    """(re_lo, re_hi, im_lo, im_hi) as mpf of an iv complex (or real) interval."""
    mp = mpmath.mp
    if isinstance(value, mpmath.iv.mpf):
        return mp.mpf(value.a), mp.mpf(value.b), mp.mpf(0), mp.mpf(0)
    return mp.mpf(value.real.a), mp.mpf(value.real.b), mp.mpf(value.imag.a), mp.mpf(value.imag.b)


def _magnitude_upper(value):
    """An upper bound on |z| over an iv complex interval."""
    lo_re, hi_re, lo_im, hi_im = _bounds(value)
    re = max(abs(lo_re), abs(hi_re))
    im = max(abs(lo_im), abs(hi_im))
    return mpmath.mp.sqrt(re * re + im * im) * (1 + mpmath.mp.eps * 4)


def _magnitude_lower(value):
    """A lower bound on |z| over an iv complex interval (its mignitude; 0 when it holds 0)."""
    lo_re, hi_re, lo_im, hi_im = _bounds(value)
    re = mpmath.mp.mpf(0) if lo_re <= 0 <= hi_re else min(abs(lo_re), abs(hi_re))
    im = mpmath.mp.mpf(0) if lo_im <= 0 <= hi_im else min(abs(lo_im), abs(hi_im))
    return mpmath.mp.sqrt(re * re + im * im) * (1 - mpmath.mp.eps * 4)


def _excludes_zero(value):
    lo_re, hi_re, lo_im, hi_im = _bounds(value)
    return lo_re > 0 or hi_re < 0 or lo_im > 0 or hi_im < 0


def _holds_zero(value):
    lo_re, hi_re, lo_im, hi_im = _bounds(value)
    return lo_re <= 0 <= hi_re and lo_im <= 0 <= hi_im


def _frobenius_upper(matrix):
    mp = mpmath.mp
    total = mp.mpf(0)
    for i in range(matrix.rows):
        for j in range(matrix.cols):
            total += _magnitude_upper(matrix[i, j]) ** 2
    return mp.sqrt(total) * (1 + mp.eps * 4)


def _to_iv_matrix(matrix):
    iv = mpmath.iv
    result = iv.matrix(matrix.rows, matrix.cols)
    for i in range(matrix.rows):
        for j in range(matrix.cols):
            result[i, j] = _iv_point(matrix[i, j])
    return result


def _coefficient_magnitude_lower(coefficient):
    """A lower bound on |c| for an exact or a complex double coefficient (at the iv precision)."""
    if isinstance(coefficient, ExactCoefficient):
        return _magnitude_lower(coefficient.to_context(mpmath.iv))
    return _magnitude_lower(_iv_point(complex(coefficient)))


def _terms_lower(polynomial, box):
    """A lower bound, over the box, of sum_k |c_k| |x^a_k|: the size of the polynomial's terms."""
    mp = mpmath.mp
    smallest = [_magnitude_lower(b) for b in box]
    total = mp.mpf(0)
    for row, c in zip(polynomial.exponents, polynomial.coefficients):
        term = _coefficient_magnitude_lower(c)
        for j, e in enumerate(row):
            if e:
                term *= smallest[j] ** int(e)
        total += term
    # each product and sum rounds by at most eps/2: a margin of a few eps per operation
    operations = polynomial.n_terms * (1 + int(polynomial.degree if polynomial.degree > 0 else 0)) + 8
    return total * (1 - 4 * operations * mp.eps)


#: What mpmath's LU decomposition raises on a singular matrix (a zero pivot column ends in a TypeError).
_SINGULAR = (ZeroDivisionError, TypeError)


def _weyl_norm_squared(polynomial):
    """Upper bound on the squared Bombieri-Weyl norm of the homogenised polynomial."""
    mp = mpmath.mp
    d = polynomial.degree
    total = mp.mpf(0)
    coefficients = polynomial.coefficients
    for row, c in zip(polynomial.exponents, coefficients):
        value = c.to_context(mpmath.iv) if isinstance(c, ExactCoefficient) else _iv_point(c)
        weight = math.factorial(d - int(row.sum()))
        for e in row:
            weight *= math.factorial(int(e))
        total += _magnitude_upper(value) ** 2 * weight / math.factorial(d)
    return total * (1 + mp.eps * 8)
