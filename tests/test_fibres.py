"""X as a family over the roots of equations in a few unknowns (numag.witness.fibres, decompose, singular)."""

import numpy as np
import pytest
import sympy

from numag.system.parse import parse_system
from numag.system.polynomial import Polynomial
from numag.singular.locus import singular_locus
from numag.witness.decompose import components_through, decompose
from numag.witness.fibres import EMPTY_FIBRE, FiniteBlock, fibre_system, finite_block, solve_block

# A quintic surface with coefficients in Q(sqrt 2), sqrt 2 given as an unknown p with p^2 - 2 = 0: over
# p = sqrt 2 real nodes (x^2 = p, y^2 = 1, z = 0), over p = -sqrt 2 non-real ones, the fibres different
# (p x (x^2 - p)(y^2 - 1) is odd in x). Made up for this test; its answer is computed below with sympy.
AUXILIARY = (["(x^2 - p)^2 + (y^2 - 1)^2 + z^2 + p*x*(x^2 - p)*(y^2 - 1)", "p^2 - 2"], ["x", "y", "z", "p"])


def sympy_singular_points():
    """Sing X by sympy: F together with all 2 x 2 minors of its Jacobian (X has codimension 2), solved exactly."""
    x, y, z, p = symbols = sympy.symbols("x y z p")
    polynomials = [(x**2 - p)**2 + (y**2 - 1)**2 + z**2 + p*x*(x**2 - p)*(y**2 - 1), p**2 - 2]  # the same as AUXILIARY
    jacobian = sympy.Matrix([[sympy.diff(f, s) for s in symbols] for f in polynomials])
    minors = [jacobian.extract([0, 1], [i, j]).det() for i in range(4) for j in range(i + 1, 4)]
    solutions = sympy.solve(polynomials + [sympy.expand(m) for m in minors if m != 0], symbols, dict=True)
    return np.array([[complex(sympy.N(s[v], 30)) for v in symbols] for s in solutions])


def test_fix_variables_agrees_with_evaluation():
    # common practice, no source: f(r, q) evaluated directly equals the substituted polynomial at q
    rng = np.random.default_rng(4)
    system = parse_system(AUXILIARY[0], AUXILIARY[1])
    point = rng.standard_normal(4) + 1j * rng.standard_normal(4)
    for polynomial in system.polynomials:
        fixed = polynomial.fix_variables([3, 1], point[[3, 1]])
        assert fixed.n_variables == 2
        assert abs(fixed.evaluate(point[[0, 2]]) - polynomial.evaluate(point)) <= 1e-12 * (1 + abs(polynomial.evaluate(point)))


def test_block_is_found_only_when_closed():
    system = parse_system(["x*y - p", "p^2 - p - 1"], ["x", "y", "p"])
    assert finite_block(system) == FiniteBlock(equations=(1,), variables=(2,))
    # two equations in {x, y} close a block of two unknowns; x*y - p alone closes none
    assert finite_block(parse_system(["x^2 + y^2 - 1", "x - y", "z^2 - x"], ["x", "y", "z"])) == \
        FiniteBlock(equations=(0, 1), variables=(0, 1))
    assert finite_block(parse_system(["x*y - p", "x + y - p"], ["x", "y", "p"])) is None


def test_multiple_root_is_not_split():
    # (p - 1)^2 = 0: the Jacobian of F drops rank on the whole fibre, so X is not split there
    system = parse_system(["x*y - p", "p^2 - 2*p + 1"], ["x", "y", "p"])
    assert solve_block(system, finite_block(system), seed=2) is None


def test_empty_fibre_and_vanishing_equation():
    # over p = 1 the equation p - 1 vanishes and is dropped; p*(p - 1)*x^0 + ... : a constant over p = 2
    system = parse_system(["(p - 1)*x + y", "(p - 1)*(p - 2) + 0*x", "p^2 - 3*p + 2"], ["x", "y", "p"])
    block = finite_block(system)
    assert set(block.equations) == {1, 2}
    one = fibre_system(system, block, np.array([1.0]))
    assert one.n_equations == 1 and one.variables == ["x", "y"]
    constant = parse_system(["x + y", "p - 1 + 0*x"], ["x", "y", "p"])
    assert fibre_system(constant, FiniteBlock(equations=(), variables=(2,)), np.array([2.0])) is EMPTY_FIBRE


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_two_circles_over_the_roots(seed):
    # common practice, no source: x^2 + y^2 = p with p in {1, 2} is two circles, each of degree 2
    system = parse_system(["x^2 + y^2 - p", "p^2 - 3*p + 2"], ["x", "y", "p"])
    result = decompose(system, seed=seed)
    assert result.fibred_over is not None
    assert sorted((c.dimension, c.degree) for c in result.components) == [(1, 2), (1, 2)]
    levels = sorted(round(float(c.points[0, 2].real), 9) for c in result.components)
    assert levels == [1.0, 2.0]
    for c in result.components:
        residuals = np.abs(c.points[:, 0] ** 2 + c.points[:, 1] ** 2 - c.points[:, 2])
        assert np.all(residuals <= 1e-8)
    on_second = np.array([np.sqrt(2), 0, 2], dtype=complex)
    through = components_through(result, on_second, seed=seed)
    assert [round(float(c.points[0, 2].real)) for c in through] == [2]


@pytest.mark.parametrize("seed", [1, 2, 3, 4])
def test_singular_points_with_an_auxiliary_unknown_match_sympy(seed):
    # reference: sympy (solve_poly_system on F and the 2 x 2 minors of its Jacobian, exact arithmetic)
    expected = sympy_singular_points()
    system = parse_system(*AUXILIARY)
    locus = singular_locus(system, seed=seed)
    assert locus.variety.fibred_over is not None
    points = [c for c in locus.components if c.dimension == 0 and not c.at_infinity]
    assert all(c.kind == "singular" for c in points)
    assert not [c for c in locus.components if c.dimension > 0]
    found = np.array([c.points[0] for c in points])
    assert len(found) == len(expected)
    for point in expected:  # each exact point found once, to 1e-8
        assert np.sum(np.linalg.norm(found - point, axis=1) <= 1e-8) == 1
    real = [bool(c.real[0]) for c in points]
    assert sum(real) == sum(bool(np.all(np.abs(p.imag) < 1e-12)) for p in expected)


def test_whole_fibre_is_one_linear_component():
    # common practice, no source: over z = 0 the first equation vanishes (the plane z = 0); over z = 1 a
    # circle and a line; a point is on the component of its own fibre only
    system = parse_system(["(x^2 + y^2 - 1)*(x - y)*z", "z^2 - z"], ["x", "y", "z"])
    result = decompose(system, seed=6)
    assert result.extra["fibres"]["whole"] == 1
    by_kind = {(c.dimension, c.degree): c for c in result.components}
    assert sorted(by_kind) == [(1, 1), (1, 2), (2, 1)]
    assert components_through(result, [0.3, 0.7, 0], seed=1) == [by_kind[(2, 1)]]
    assert components_through(result, [0.6, 0.8, 1], seed=1) == [by_kind[(1, 2)]]
    assert components_through(result, [0.6, 0.6, 1], seed=1) == [by_kind[(1, 1)]]
    assert components_through(result, [0.6, 0.6, 2], seed=1) == []


@pytest.mark.parametrize("seed", range(6))
def test_root_zero_with_rounding(seed):
    # common practice, no source: the node y^2 = x^2 (x + 1) with its partials has the one point (0, 0);
    # the block -3x^2 - 2x = 0 gives x = 0 up to rounding, which must not leave a constant 1e-34 over it
    system = parse_system(["y^2 - x^2*(x + 1)", "-3*x^2 - 2*x", "2*y"], ["x", "y"])
    result = decompose(system, seed=seed)
    assert result.fibred_over is not None
    assert [(c.dimension, c.degree) for c in result.components] == [(0, 1)]
    assert np.linalg.norm(result.components[0].points[0]) <= 1e-12


def test_evaluated_minors_are_never_split_by_fibres():
    # common practice, no source: a fibre of F alone is X's fibre, not the rank-drop locus; a system whose minors
    # are evaluated from the whole Jacobian must be decomposed whole (split, it gave X's surfaces as candidates)
    from numag.numeric.minors import MinorsSystem, random_minor_weights
    system = parse_system(*AUXILIARY)
    equations = [p.numeric() for p in system.polynomials]
    weights = random_minor_weights(2, 4, 2, 24, np.random.default_rng(0))
    evaluated = MinorsSystem(system.variables, equations, weights)
    assert finite_block(system) is not None
    assert decompose(evaluated, seed=3).fibred_over is None


def test_a_mismatched_tangent_dimension_is_a_warning():
    # a rank-drop component whose tangent space disagrees with its slicing makes the run undecided (exit 3)
    from numag.app.report import completeness_warnings
    assert not completeness_warnings({"discarded": {"smooth_on_check": 2}})
    assert any("tangent space" in w for w in completeness_warnings({"discarded": {"tangent_dimension_mismatch": 1}}))


# Blocks whose zeros are one line counted several times (what the minors of a surface singular along a line give
# once the unknowns are changed linearly): on a random plane the line is one multiple point, which the square-up
# solve reaches only through failed or singular endpoints. The line's equations are by construction; that the
# zeros are exactly that line is common practice, no source (each ideal contains a power of y - 3x/2 and of
# z - 3x/2, and all of them vanish on the line).
MULTIPLE_LINES = {
    "double": ["(y - 3*x/2)^2", "(z - 3*x/2)^2", "(y - 3*x/2)*(z - 3*x/2)", "(y - z)^3"],
    "triple": ["(y - 3*x/2)^3", "(z - 3*x/2)^3", "(y - 3*x/2)^2*(z - 3*x/2)", "(y - z)^4", "x*(y - z)^3"],
    "quadruple": ["(y - 3*x/2)^4", "(z - 3*x/2)^4", "(y - 3*x/2)^2*(z - 3*x/2)^2", "(y - z)^4 + (y - 3*x/2)^3*x"],
}


@pytest.mark.parametrize("name", sorted(MULTIPLE_LINES))
@pytest.mark.parametrize("seed", [0, 1, 2])
def test_a_multiple_line_meets_the_hyperplane(name, seed):
    from numag.witness.fibres import _zeros_meet_a_hyperplane
    block = parse_system(MULTIPLE_LINES[name], ["x", "y", "z"])
    # before decision 0154 a hyperplane solve without a solution proved "finitely many" even when its paths
    # failed: False at every seed for all three blocks, and X was then decomposed over the block's "no roots"
    assert _zeros_meet_a_hyperplane(block, np.random.default_rng(seed))
    system = parse_system(MULTIPLE_LINES[name] + ["w^2 - x"], ["x", "y", "z", "w"])
    assert finite_block(system) is not None
    assert solve_block(system, finite_block(system), seed=seed) is None
