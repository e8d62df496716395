import mpmath
import numpy as np

from numag.numeric.evaluate import TermSizes
from numag.numeric.linalg import (mp_least_squares, mp_right_singular_vectors, mp_singular_values,
                          numerical_rank, scaled_singular_values, singular_value_gap, zero_tolerance)


def test_scaled_values_ignore_coefficient_size():
    # A row with tiny coefficients is not "nearly zero" once scaled (common practice, no source)
    from numag.system.parse import parse_system
    system = parse_system(["1e-12*x^2 + 1e-12*y^2 - 1e-12"], ["x", "y"])
    points = np.array([[0.6, 0.8]])
    jac = 1e-12 * np.array([[[1.2, 1.6]]])
    values = scaled_singular_values(jac, TermSizes(system.polynomials).gradients(points))
    assert values[0, 0] > 0.1


def test_term_sizes_do_not_grow_with_the_degree():
    # x^100 - 1 at a root of unity: the gradient 100 x^99 has modulus 100 and its terms size 100;
    # a bound by ||(1, x)||^99 would call it 1e15 times smaller (common practice, no source)
    from numag.system.parse import parse_system
    system = parse_system(["x^100 - 1"], ["x"])
    root = np.exp(2j * np.pi * 3 / 100)
    jac = np.array([[[100 * root ** 99]]])
    values = scaled_singular_values(jac, TermSizes(system.polynomials).gradients(np.array([[root]])))
    assert abs(values[0, 0] - 1.0) < 1e-12


def test_rank_and_gap():
    values = np.array([2.0, 1.0, 1e-14])
    rank = numerical_rank(values, zero_tolerance(16, (3, 3)))
    assert rank == 2
    assert singular_value_gap(values, rank) == 1e14
    assert singular_value_gap(values, 0) is None
    assert singular_value_gap(np.array([1.0, 0.0]), 1) == float("inf")


def test_numpy_and_mpmath_singular_values_agree():
    # numpy's LAPACK SVD as the reference library for the mpmath path
    rng = np.random.default_rng(0)
    a = rng.standard_normal((3, 4)) + 1j * rng.standard_normal((3, 4))
    with mpmath.mp.workdps(30):
        values = mp_singular_values(mpmath.matrix(a.tolist()), mpmath.mp)
    assert np.allclose([float(v) for v in values], np.linalg.svd(a, compute_uv=False), rtol=1e-12)


def test_mp_least_squares_minimum_norm_and_kernel():
    with mpmath.mp.workdps(40):
        a = mpmath.matrix([[1, 2, 3], [2, 4, 6]]) * mpmath.mpc(1)
        b = mpmath.matrix([1, 2])
        x = mp_least_squares(a, b, mpmath.mp, rcond=mpmath.mpf(10) ** -30)
        assert mpmath.norm(a * x - b) < mpmath.mpf(10) ** -35
        # minimum norm: x is parallel to the row (1, 2, 3)
        assert mpmath.norm(x - mpmath.matrix([1, 2, 3]) / 14) < mpmath.mpf(10) ** -35
        basis = mp_right_singular_vectors(a, mpmath.mp)
        assert mpmath.norm(a * basis[:, 1:3]) < mpmath.mpf(10) ** -35


def test_mp_least_squares_double_route_agrees_with_mpmath_at_full_precision():
    # Reference: mpmath's Householder least squares (qr_solve) at twice the digits, a general-purpose
    # reference library; inconsistent overdetermined systems of moderate condition take the refined route.
    import numag.numeric.linalg as linalg
    for seed in range(3):
        rng = np.random.default_rng(seed)
        a = rng.standard_normal((9, 6)) + 1j * rng.standard_normal((9, 6))
        a[:, 0] *= 1e-4  # condition about 1e4: still the double route
        b = rng.standard_normal(9) + 1j * rng.standard_normal(9)
        with mpmath.mp.workdps(50):
            a_mp, b_mp = mpmath.matrix(a.tolist()), mpmath.matrix(b.tolist())
            assert linalg._refined_least_squares(a_mp, b_mp, mpmath.mp, mpmath.mpf(10) ** -37) is not None
            x = mp_least_squares(a_mp, b_mp, mpmath.mp, rcond=mpmath.mpf(10) ** -37)
            with mpmath.mp.workdps(100):
                # normal equations at 100 digits lose at most 2 x 4 digits of the 100
                reference = mpmath.lu_solve(a_mp.H * a_mp, a_mp.H * b_mp)
            assert mpmath.norm(x - reference) <= mpmath.mpf(10) ** -40 * mpmath.norm(reference)


def test_mp_least_squares_near_rank_deficient_keeps_the_mpmath_route():
    import numag.numeric.linalg as linalg
    with mpmath.mp.workdps(40):
        a = mpmath.matrix([[1, 0], [0, mpmath.mpf(10) ** -20], [0, 0]]) * mpmath.mpc(1)
        assert linalg._refined_least_squares(a, mpmath.matrix([1, 1, 1]), mpmath.mp, mpmath.mpf(10) ** -30) is None
        x = mp_least_squares(a, mpmath.matrix([1, 1, 1]), mpmath.mp, rcond=mpmath.mpf(10) ** -30)
        assert mpmath.norm(x - mpmath.matrix([1, mpmath.mpf(10) ** 20])) <= mpmath.mpf(10) ** -15


def test_mp_least_squares_double_route_minimum_norm_for_wide_matrices():
    # Reference: the minimum-norm solution A^H (A A^H)^-1 b by mpmath's LU at 100 digits (common practice,
    # no source: the normal equations of the row space).
    import numag.numeric.linalg as linalg
    for seed in range(3):
        rng = np.random.default_rng(seed)
        a = rng.standard_normal((5, 8)) + 1j * rng.standard_normal((5, 8))
        b = rng.standard_normal(5) + 1j * rng.standard_normal(5)
        with mpmath.mp.workdps(50):
            a_mp, b_mp = mpmath.matrix(a.tolist()), mpmath.matrix(b.tolist())
            assert linalg._refined_least_squares(a_mp, b_mp, mpmath.mp, mpmath.mpf(10) ** -37) is not None
            x = mp_least_squares(a_mp, b_mp, mpmath.mp, rcond=mpmath.mpf(10) ** -37)
            with mpmath.mp.workdps(100):
                reference = a_mp.H * mpmath.lu_solve(a_mp * a_mp.H, b_mp)
            assert mpmath.norm(x - reference) <= mpmath.mpf(10) ** -45 * mpmath.norm(reference)


def test_mp_least_squares_double_route_below_double_range():
    # A right-hand side of size 1e-400 (a Gauss-Newton residual at 400 digits) must not round to zero.
    # Reference: the same system solved by mpmath's LU at 500 digits (a general-purpose reference library).
    rng = np.random.default_rng(5)
    a = rng.standard_normal((6, 4)) + 1j * rng.standard_normal((6, 4))
    with mpmath.mp.workdps(420):
        a_mp = mpmath.matrix(a.tolist())
        b_mp = a_mp * mpmath.matrix([1, 2, 3, 4]) * mpmath.mpf(10) ** -400
        x = mp_least_squares(a_mp, b_mp, mpmath.mp, rcond=mpmath.mpf(10) ** -300)
        reference = mpmath.lu_solve(a_mp.H * a_mp, a_mp.H * b_mp)
        assert mpmath.norm(x - reference) <= mpmath.mpf(10) ** -410 * mpmath.norm(reference)
