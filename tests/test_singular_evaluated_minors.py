"""The singular locus with its Jacobian minors evaluated, never expanded (decision 0058).

The expansion limit is forced to 0 so that small problems, whose answers are known, take the evaluated path
(a ``MinorsSystem`` through the witness cascade, junk removal, monodromy and membership).
"""

import numpy as np
import pytest

from numag.numeric.minors import CombinedRows, MinorsSystem, degree_lowering_directions
from numag.singular import locus
from numag.singular.locus import minors_system, singular_locus
from numag.system.parse import parse_system
from numag.system.polynomial import Polynomial
from numag.witness.decompose import decompose


@pytest.fixture
def evaluate_all(monkeypatch):
    """Every minor of size 2 or more evaluated (the bound of any expansion is above 0)."""
    monkeypatch.setattr(locus, "EXPANSION_MONOMIALS", 0)


def test_large_minors_become_a_minors_system_with_the_same_draws(evaluate_all):
    # The random weights are drawn before the choice, so both forms have the same minors (common practice,
    # no source: the same generator stream gives the same combinations).
    # top forms with no direction along which every derivative loses degree: the expanded minors are then
    # those of J itself (decision 0063 takes them along such directions where there are some)
    system = parse_system(["x^3 + y^3 + z^3 + w^3 - x*y", "x^2 + y^2 + z^2 + w^2 - 1"], ["x", "y", "z", "w"])
    assert degree_lowering_directions(system.polynomials, 4)[0] is None
    evaluated, kind = minors_system(system, 2, np.random.default_rng(5), 0, evaluate_large=True)
    expanded, same_kind = minors_system(system, 2, np.random.default_rng(5), 0)
    assert isinstance(evaluated, MinorsSystem) and not isinstance(expanded, MinorsSystem)
    assert kind is same_kind and evaluated.n_equations == expanded.n_equations
    assert evaluated.degrees == expanded.degrees
    # zero sets agree: each evaluated minor is a fixed multiple of the expanded (normalised) one
    rng = np.random.default_rng(0)
    points = rng.standard_normal((6, 4)) + 1j * rng.standard_normal((6, 4))
    values = evaluated.evaluated().evaluate(points, jacobian=False)
    reference = np.column_stack([np.array([p.evaluate(point) for point in points])
                                 for p in expanded.polynomials[2:]])
    ratios = values / reference
    assert np.allclose(ratios, ratios[:1], rtol=1e-9)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_cusp_in_a_plane_singular_at_the_origin(evaluate_all, seed):
    # y^2 = x^3 in the plane z = x + 2y: a cuspidal cubic, singular only at the origin (common practice,
    # no source).
    system = parse_system(["y^2 - x^3", "z - x - 2*y"], ["x", "y", "z"])
    result = singular_locus(system, seed=seed)
    assert [(c.dimension, c.degree) for c in result.components] == [(0, 1)]
    assert np.linalg.norm(result.components[0].points[0]) < 1e-6


@pytest.mark.parametrize("seed", [1, 2])
def test_umbrella_times_a_line_singular_along_a_line(evaluate_all, seed):
    # The Whitney umbrella x^2 = y^2 z is singular along the line x = y = 0 (common practice, no source);
    # the graph w = x + 2y - z over it is singular along the lifted line {x = y = 0, w = -z}.
    system = parse_system(["x^2 - y^2*z", "w - x - 2*y + z"], ["x", "y", "z", "w"])
    result = singular_locus(system, seed=seed)
    assert [(c.dimension, c.degree) for c in result.components] == [(1, 1)]
    point = result.components[0].points[0]
    assert abs(point[0]) < 1e-6 and abs(point[1]) < 1e-6 and abs(point[3] + point[2]) < 1e-6


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_cone_whose_vertex_is_the_unit_point(evaluate_all, seed):
    # Two quadric cones with vertex (1, 1, 1, 1) meet in the cone over a quartic space curve; the curve is
    # smooth when det(s Q1 + Q2) has four distinct roots (common practice, no source), checked with sympy
    # below, so J drops rank at the vertex only. There J = 0: the evaluated minors, scaled by their size at the
    # point (1, ..., 1), were scaled by 1e300 and every path towards them failed (no point, 8 failed paths;
    # decision 0131).
    sympy = pytest.importorskip("sympy")
    s = sympy.symbols("s")
    q1 = sympy.diag(1, 2, -1, -3)
    q2 = sympy.Matrix([[0, 0, sympy.Rational(1, 2), 0], [0, 0, 0, -1], [sympy.Rational(1, 2), 0, 0, 0],
                       [0, -1, 0, 1]])
    pencil = sympy.Poly((s * q1 + q2).det(), s)
    assert pencil.degree() == 4 and sympy.discriminant(pencil) != 0
    u, v, w, t = "(x - 1)", "(y - 1)", "(z - 1)", "(r - 1)"
    system = parse_system([f"{u}^2 + 2*{v}^2 - {w}^2 - 3*{t}^2", f"{u}*{w} - 2*{v}*{t} + {t}^2"],
                          ["x", "y", "z", "r"])
    # random minors (none written out): the candidates' system of the minors formulation
    augmented, _ = minors_system(system, 2, np.random.default_rng(seed), 0, evaluate_large=True)
    assert isinstance(augmented, MinorsSystem)
    candidates = decompose(augmented, seed=seed)
    assert [(c.dimension, c.degree) for c in candidates.components] == [(0, 1)]
    assert np.linalg.norm(candidates.components[0].points[0] - 1) < 1e-6


def test_combined_row_of_one_equation_keeps_its_degree():
    # A row that is one equation is that equation (no X_0 power), the others are raised to the largest
    # degree they combine (homogenisation, common practice, no source).
    names = ["X0", "x", "y"]
    quadric = parse_system(["x^2 + X0*y"], names).polynomials[0]
    line = Polynomial.linear([1.0, 2.0, 0.0])   # X0 + 2x
    rows = CombinedRows([quadric, line], None, [[0.5, 1.0], [0.0, 1.0]])
    assert rows.degrees == [2, 1]
    point = np.array([[2.0, 3.0, 5.0]])
    values, gradients = rows.evaluate(point)
    x0, x, y = point[0]
    assert np.allclose(values[0], [0.5 * (x * x + x0 * y) + x0 * (x0 + 2 * x), x0 + 2 * x])
    assert np.allclose(gradients[0, 0], [0.5 * y + 2 * x0 + 2 * x, x + 2 * x0, 0.5 * x0])
    assert np.allclose(gradients[0, 1], [1.0, 2.0, 0.0])


@pytest.mark.parametrize("seed", [0, 1])
def test_product_of_linear_forms_value_gradient_and_precise(seed):
    # Value against the product computed form by form, gradient against central differences (common
    # practice, no source), the mpmath form against the double one.
    import mpmath

    from numag.numeric.minors import LinearFormProduct
    rng = np.random.default_rng(seed)
    rows = rng.standard_normal((6, 4)) + 1j * rng.standard_normal((6, 4))
    point = rng.standard_normal(4) + 1j * rng.standard_normal(4)
    product = LinearFormProduct(rows)
    values, gradients = product.evaluate(point[None, :])
    assert np.isclose(values[0, 0], np.prod([row @ point for row in rows]), rtol=1e-12)
    step = 1e-6
    differences = [(product.evaluate((point + step * e)[None, :], False)[0, 0]
                    - product.evaluate((point - step * e)[None, :], False)[0, 0]) / (2 * step) for e in np.eye(4)]
    assert np.allclose(gradients[0, 0], differences, rtol=1e-6, atol=1e-6 * np.abs(values[0, 0]))
    precise_value, precise_gradient = product.evaluate_precise([mpmath.mpc(z.real, z.imag) for z in point], mpmath.mp)
    assert np.isclose(complex(precise_value[0]), values[0, 0], rtol=1e-12)
    assert np.allclose([complex(precise_gradient[0, j]) for j in range(4)], gradients[0, 0], rtol=1e-12)
