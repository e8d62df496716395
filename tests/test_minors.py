"""Evaluated minors (numag.numeric.minors) against sympy's expanded determinants and their gradients."""

import mpmath
from numag.numeric.evaluate import BatchEvaluator
import numpy as np
import pytest

sympy = pytest.importorskip("sympy")

from numag.numeric.minors import (AugmentedEvaluator, EvaluatedMinors, expanded_minors,  # noqa: E402
                                  random_minor_weights)
from numag.system.parse import parse_system  # noqa: E402

NAMES = ["x", "y", "z", "w"]
EQUATIONS = ["x^3*y - 2*z*w + 1", "x*y*z - w^2 + 3*x", "y^4 - x*z^2 + w"]
CONE = ["x^2 + y^2 - z^2", "x + 2*y + 3*z"]
SYMPY_FORMS = {
    tuple(EQUATIONS): lambda x, y, z, w: [x**3 * y - 2 * z * w + 1, x * y * z - w**2 + 3 * x, y**4 - x * z**2 + w],
    tuple(CONE): lambda x, y, z: [x**2 + y**2 - z**2, x + 2 * y + 3 * z],
}


def _reference(equations, names, left, right, point):
    """det(A J B) and its gradient by sympy (exact expansion, then differentiation)."""
    symbols = sympy.symbols(names)
    polys = SYMPY_FORMS[tuple(equations)](*symbols)  # written by hand: no parsing of text by sympy
    jacobian = sympy.Matrix([[sympy.diff(f, v) for v in symbols] for f in polys])
    a = sympy.Matrix(left.tolist())
    b = sympy.Matrix(right.tolist())
    g = sympy.expand((a * jacobian * b).det())
    at = dict(zip(symbols, point))
    value = complex(g.subs(at).evalf(30))
    gradient = np.array([complex(sympy.diff(g, v).subs(at).evalf(30)) for v in symbols])
    return value, gradient, sympy.Poly(g, *symbols).total_degree()


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_value_gradient_and_degree_match_sympy(seed):
    # Reference: sympy's determinant of the symbolic matrix A J B, expanded and differentiated (a
    # general-purpose computer algebra library, used as an exact reference only).
    rng = np.random.default_rng(seed)
    system = parse_system(EQUATIONS, NAMES)
    size = 2
    left = rng.integers(-3, 4, size=(size, 3))
    right = rng.integers(-3, 4, size=(4, size))
    point = rng.integers(-2, 3, size=4).astype(float) + 0.5
    minors = EvaluatedMinors(system.polynomials, [left], [right])
    values, gradients = minors.evaluate(point[None, :])
    value, gradient, degree = _reference(EQUATIONS, NAMES, left, right, [sympy.Rational(v) for v in point])
    assert abs(values[0, 0] - value) <= 1e-10 * max(1.0, abs(value))
    assert np.allclose(gradients[0, 0], gradient, rtol=1e-10, atol=1e-10 * max(1.0, np.abs(gradient).max()))
    assert minors.degrees[0] >= degree  # a bound for the start system, exact for generic weights
    assert minors.degrees[0] == 2 * 3  # both rows of A mix all equations: 2 x (4 - 1)


def test_gradient_at_a_singular_matrix():
    # At a node of a surface all first partials vanish and the 1 x 1 minors are its partials; for the
    # 2 x 2 minors of (F, linear form) at the node, M = A J B has rank one there: the adjugate form of
    # Jacobi's formula must still give the exact gradient (reference: sympy, as above).
    equations = CONE
    system = parse_system(equations, ["x", "y", "z"])
    left, right = np.array([[1, 0], [0, 1]]), np.array([[1, 2], [0, 1], [1, 1]])
    point = np.array([0.0, 0.0, 0.0])
    minors = EvaluatedMinors(system.polynomials, [left], [right])
    values, gradients = minors.evaluate(point[None, :])
    value, gradient, _ = _reference(equations, ["x", "y", "z"], left, right, [0, 0, 0])
    assert abs(values[0, 0] - value) < 1e-14
    assert np.allclose(gradients[0, 0], gradient, atol=1e-13)
    assert np.abs(gradient).max() > 0.5  # the check is not vacuous: the gradient of the minor is not zero


@pytest.mark.parametrize("seed", [3, 4])
def test_homogenised_form_is_the_homogenised_minor(seed):
    # X_0^d g(X / X_0) = g^h(X): the defining property of homogenisation (common practice, no source).
    rng = np.random.default_rng(seed)
    system = parse_system(EQUATIONS, NAMES)
    weights = random_minor_weights(3, 4, 2, 0, rng)  # random combinations
    affine = EvaluatedMinors.from_weights(system.polynomials, weights)
    projective = EvaluatedMinors.from_weights(system.polynomials, weights, homogenized=True)
    points = rng.standard_normal((5, 5)) + 1j * rng.standard_normal((5, 5))
    inside = projective.evaluate(points, jacobian=False)
    outside = affine.evaluate(points[:, 1:] / points[:, :1], jacobian=False)
    degrees = np.array(projective.degrees)
    assert np.allclose(inside, points[:, :1] ** degrees * outside, rtol=1e-9)
    # Euler's relation sum_j X_j dG/dX_j = d G for the homogenised minor's gradient
    values, gradients = projective.evaluate(points)
    assert np.allclose(np.einsum("pkj,pj->pk", gradients, points), degrees * values, rtol=1e-9)


def test_mpmath_and_interval_forms_agree_with_double():
    # The mpmath form at 40 digits against the double one; the interval form encloses the mp value.
    rng = np.random.default_rng(5)
    system = parse_system(EQUATIONS, NAMES)
    weights = random_minor_weights(3, 4, 3, 0, rng)
    minors = EvaluatedMinors.from_weights(system.polynomials, weights)
    point = [0.3, -1.1, 0.7, 0.25]
    values, gradients = minors.evaluate(np.array([point]))
    with mpmath.workdps(40):
        mp_values, mp_gradients = minors.evaluate_precise([mpmath.mpf(v) for v in point], mpmath.mp)
        for k in range(minors.count):
            assert abs(complex(mp_values[k]) - values[0, k]) <= 1e-10 * abs(values[0, k])
            for j in range(4):
                assert abs(complex(mp_gradients[k, j]) - gradients[0, k, j]) <= 1e-10 * np.abs(gradients[0, k]).max()
    saved = mpmath.iv.dps
    try:
        mpmath.iv.dps = 30
        iv_values = minors.evaluate_precise([mpmath.iv.mpf(v) for v in point], mpmath.iv, jacobian=False)
    finally:
        mpmath.iv.dps = saved
    with mpmath.workdps(40):
        mp_values = minors.evaluate_precise([mpmath.mpf(v) for v in point], mpmath.mp, jacobian=False)
    for k in range(minors.count):
        assert mp_values[k].real in iv_values[k].real and mp_values[k].imag in iv_values[k].imag


def test_expanded_and_evaluated_minors_agree():
    # The one symbolic builder against the evaluated form (same weights): two computations of det(A J B).
    rng = np.random.default_rng(6)
    system = parse_system(EQUATIONS, NAMES)
    for weights in (random_minor_weights(3, 4, 2, 100, rng), random_minor_weights(3, 4, 2, 0, rng, exact=True)):
        expanded = expanded_minors(system.polynomials, weights)
        evaluated = EvaluatedMinors.from_weights(system.polynomials, weights)
        points = rng.standard_normal((4, 4)) + 1j * rng.standard_normal((4, 4))
        reference = BatchEvaluator(expanded).evaluate(points, jacobian=False)
        mine = evaluated.evaluate(points, jacobian=False)
        nonzero = np.abs(mine).max(axis=0) > 1e-9 * np.abs(mine).max()
        assert np.allclose(mine[:, nonzero], reference, rtol=1e-9)


def test_augmented_evaluator_stacks_rows():
    # F's rows, then the minors' rows: the Jacobian of the stack by finite differences (common practice).
    rng = np.random.default_rng(7)
    system = parse_system(EQUATIONS, NAMES)
    minors = EvaluatedMinors.from_weights(system.polynomials, random_minor_weights(3, 4, 2, 0, rng))
    both = AugmentedEvaluator(system.polynomials, minors)
    point = rng.standard_normal(4) + 1j * rng.standard_normal(4)
    values, jacobian = both.evaluate(point[None, :])
    assert values.shape == (1, 3 + minors.count) and jacobian.shape == (1, 3 + minors.count, 4)
    step = 1e-6
    for j in range(4):
        moved = point.copy()
        moved[j] += step
        back = point.copy()
        back[j] -= step
        difference = (both.evaluate(moved[None, :], False) - both.evaluate(back[None, :], False)) / (2 * step)
        assert np.allclose(difference[0], jacobian[0, :, j], rtol=1e-6, atol=1e-6)
    raw = both.raw(point[None, :])
    assert np.allclose(raw[0, :values.shape[1]], values[0])
    sizes = both.values(point[None, :])
    assert np.all(sizes >= np.abs(values) * (1 - 1e-12))  # term sizes bound the values


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_homotopy_with_evaluated_minors_finds_the_singular_points(seed):
    # Cayley's cubic surface 4(x^2 + y^2 + z^2) + 16xyz - 1 = 0 (the affine form of the projective
    # Cayley cubic, w = 1/2) has four nodes, at (1/2, 1/2, -1/2) and its images under an even number of
    # sign changes (A. Cayley, "A memoir on cubic surfaces", Phil. Trans. R. Soc. 159 (1869) 231-326).
    # The square system F + two random evaluated minors (combinations of the partials) is tracked;
    # the endpoints where the gradient vanishes are the nodes, and the same homotopy with the minors
    # expanded reaches the same endpoints.
    from numag.numeric.cluster import cluster_labels, groups
    from numag.system.polynomial import PolynomialSystem
    from numag.tracking.homotopy import StraightLineHomotopy
    from numag.tracking.service import track

    system = parse_system(["4*x^2 + 4*y^2 + 4*z^2 + 16*x*y*z - 1"], ["x", "y", "z"])
    rng = np.random.default_rng(seed)
    weights = random_minor_weights(1, 3, 1, 0, rng, count=2)
    found = []
    for expand in (False, True):
        generator = np.random.default_rng(seed + 100)
        if expand:
            target = PolynomialSystem(system.variables, list(system.polynomials)
                                      + expanded_minors(system.polynomials, weights, normalize=True))
            homotopy = StraightLineHomotopy.total_degree(target, generator)
        else:
            homotopy = StraightLineHomotopy.total_degree(system, generator, weights)
        assert homotopy.start.degrees.tolist() == [3, 2, 2]
        run = track(homotopy, homotopy.start_solutions())
        ends = run.endpoints
        finite = np.abs(ends[:, 0]) > 1e-6 * np.abs(ends).max(axis=1)
        points = ends[finite, 1:] / ends[finite, :1]
        _, jacobian = BatchEvaluator(system.polynomials).evaluate(points)
        nodes = points[np.linalg.norm(jacobian[:, 0, :], axis=1) < 1e-5]
        representatives = np.array([nodes[g[0]] for g in groups(cluster_labels(nodes, 1e-5))])
        found.append(np.array(sorted(map(tuple, np.round(representatives.real, 6)))))
    expected = np.array(sorted([(0.5, 0.5, -0.5), (0.5, -0.5, 0.5), (-0.5, 0.5, 0.5), (-0.5, -0.5, -0.5)]))
    for nodes in found:
        assert nodes.shape == (4, 3) and np.allclose(nodes, expected, atol=1e-5)


def test_homotopy_precise_form_matches_double():
    # The precision rescue re-tracks with evaluate_precise: at 30 digits it must agree with the batched
    # double evaluation of H, dH/dX and dH/ds (two computations of the same quantities; common practice).
    from numag.tracking.homotopy import StraightLineHomotopy

    system = parse_system(["x^2*y + z^3 - 2", "x*y*z - 1"], ["x", "y", "z"])
    rng = np.random.default_rng(8)
    homotopy = StraightLineHomotopy.total_degree(system, rng, random_minor_weights(2, 3, 2, 0, rng, count=1,
                                                                                   keep_rows=True))
    point = rng.standard_normal(4) + 1j * rng.standard_normal(4)
    values, jacobian, derivative = (a.copy() for a in homotopy.evaluate(point[None, :], np.array([0.4])))
    with mpmath.workdps(30):
        precise = homotopy.evaluate_precise([mpmath.mpc(complex(v)) for v in point], mpmath.mpf("0.4"), mpmath.mp)
    size = homotopy.size
    assert np.allclose([complex(precise[0][i]) for i in range(size)], values[0], rtol=1e-10, atol=1e-12)
    assert np.allclose([[complex(precise[1][i, j]) for j in range(size)] for i in range(size)], jacobian[0],
                       rtol=1e-10, atol=1e-12)
    assert np.allclose([complex(precise[2][i]) for i in range(size - 1)], derivative[0, :-1], rtol=1e-10,
                       atol=1e-12)


@pytest.mark.parametrize("equations", [["x^2", "y^2"], ["x*y", "x^2 - y^3"]])
@pytest.mark.parametrize("seed", [0, 1, 2])
def test_kernel_deflation_makes_the_origin_a_regular_zero(equations, seed):
    # Isolated zeros at the origin with J(0) = 0 (multiplicities 4 and 5): one step of deflation in the
    # kernel form (Leykin, Verschelde and Zhao, Theoret. Comput. Sci. 359 (2006) 111-122) gives a system in
    # (x, y, lambda) with (0, 0, lambda*) a zero of full column rank, i.e. a regular zero.
    from numag.numeric.minors import kernel_deflation

    system = parse_system(equations, ["x", "y"])
    rng = np.random.default_rng(seed)
    _, jacobian = BatchEvaluator(system.polynomials).evaluate(np.zeros((1, 2)))
    assert np.linalg.matrix_rank(jacobian[0]) == 0  # not regular before
    deflated = kernel_deflation(system.polynomials, 0, rng)
    evaluator = BatchEvaluator(deflated)
    # lambda* from h . lambda = 1 (J(0) B = 0): the last equation is linear in lambda alone
    h = evaluator.evaluate(np.array([[0.0, 0.0, 1.0]]), jacobian=True)[1][0, -1, 2]
    point = np.array([[0.0, 0.0, 1.0 / h]])
    values, jacobian = evaluator.evaluate(point)
    assert np.max(np.abs(values)) < 1e-12
    singular_values = np.linalg.svd(jacobian[0], compute_uv=False)
    assert singular_values[-1] > 1e-3 * singular_values[0]  # full column rank 3: regular


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_combined_rows_match_sympy(seed):
    # Reference: sympy, a general-purpose computer algebra library used as an exact reference only. The rows
    # sum_j W_ij X0^(D - d_j) e_j(X) with e = (homogenised F, homogenised det(A J B)) are written out by sympy
    # and differentiated; CombinedRows gets them from evaluated values and gradients (product rule for X0).
    from numag.numeric.minors import CombinedRows
    rng = np.random.default_rng(seed)
    system = parse_system(EQUATIONS, NAMES)
    weights = random_minor_weights(3, 4, 2, 0, rng, count=1)
    minors = EvaluatedMinors.from_weights(system.polynomials, weights, homogenized=True)
    homogeneous = [p.numeric().homogenize(0) for p in system.polynomials]
    combination = rng.standard_normal((2, 4)) + 1j * rng.standard_normal((2, 4))
    rows = CombinedRows(homogeneous, minors, combination)
    symbols = sympy.symbols(["X0"] + NAMES)
    x0, affine = symbols[0], symbols[1:]
    polys = SYMPY_FORMS[tuple(EQUATIONS)](*affine)
    jacobian = sympy.Matrix([[sympy.diff(f, v) for v in affine] for f in polys])
    minor = sympy.expand((sympy.Matrix(weights.left[0].tolist()) * jacobian * sympy.Matrix(weights.right[0].tolist()))
                         .det())
    base = polys + [minor]

    def homogenised(f):
        degree = sympy.Poly(f, *affine).total_degree()
        return sympy.expand(x0 ** degree * f.subs({v: v / x0 for v in affine}, simultaneous=True)), degree

    parts = [homogenised(f) for f in base]
    top = max(d for _, d in parts)
    assert rows.degree == top == minors.degrees[0]
    point = rng.standard_normal(5) + 1j * rng.standard_normal(5)
    values, gradients = rows.evaluate(point[None, :])
    at = dict(zip(symbols, point))
    for i in range(2):
        row = sum(complex(combination[i, j]) * x0 ** (top - d) * h for j, (h, d) in enumerate(parts))
        expected = complex(row.subs(at).evalf(30))
        scale = 1 + abs(expected)
        assert abs(values[0, i] - expected) <= 1e-9 * scale
        for k, v in enumerate(symbols):
            derivative = complex(sympy.diff(row, v).subs(at).evalf(30))
            assert abs(gradients[0, i, k] - derivative) <= 1e-9 * (1 + abs(derivative))
    # the mpmath form agrees with the double one
    with mpmath.workdps(30):
        precise_values, precise_gradients = rows.evaluate_precise([mpmath.mpc(v) for v in point], mpmath.mp)
    assert np.allclose([complex(precise_values[i]) for i in range(2)], values[0], rtol=1e-10)
    assert np.allclose([[complex(precise_gradients[i, k]) for k in range(5)] for i in range(2)], gradients[0],
                       rtol=1e-10)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_generic_gradients_span_the_partials_and_keep_the_lowering_direction(seed):
    # The derivatives along the chosen directions span exactly what the partial derivatives span (an invertible
    # change of the directions; linear algebra, common practice, no source), the partials taken by sympy as an
    # exact reference; the direction along which x + 2y is constant lowers the degree (decision 0063).
    import sympy

    from numag.numeric.minors import generic_gradients
    system = parse_system(["(x + 2*y)^3 - x*y + 3*y"], ["x", "y"])
    rows = generic_gradients(system.polynomials, rng=np.random.default_rng(seed))
    x, y = sympy.symbols("x y")
    f = (x + 2 * y) ** 3 - x * y + 3 * y
    monomials = sorted({m for g in (sympy.diff(f, x), sympy.diff(f, y))
                        for m in sympy.Poly(g, x, y).monoms()})

    def vector(coefficients_of):
        return np.array([complex(coefficients_of.get(m, 0)) for m in monomials])

    partials = [vector(dict(sympy.Poly(sympy.diff(f, s), x, y).terms())) for s in (x, y)]
    ours = []
    for g in rows[0]:
        terms = {tuple(int(e) for e in row): c for row, c in zip(g.exponents, g.numeric_coefficients())}
        assert set(terms) <= set(monomials)
        ours.append(vector(terms))
    assert np.linalg.matrix_rank(np.array(partials), tol=1e-9) == 2
    assert np.linalg.matrix_rank(np.array(ours + partials), tol=1e-9) == 2
    assert np.linalg.matrix_rank(np.array(ours), tol=1e-9) == 2
    assert sorted(g.degree for g in rows[0]) == [1, 2]
