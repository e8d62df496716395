"""An exact point on X is judged by the exact rank of J there, before any numerical escalation (decision 0122).

A curve of 14 unknowns, the graph over the nodal cubic y1^2 = y0^2 (y0 + 1) of y_k = y_{k-1} y0 + y_{k-2}^2 y1 + k
(k = 2..13; y_2 = y0^2 y1 + y0 y1 + 2): the escalation in mpmath took more than 300 s at its node. By hand: X is
isomorphic to the plane nodal cubic (the other coordinates are polynomials in y0, y1), so it is singular exactly at
the point over the node, (0, 0, 2, 3, ..., 13), and smooth over t = 0 and t = 2 of y0 = t^2 - 1, y1 = t (t^2 - 1).
The exact reference is sympy's Matrix.rank at the exact point (Meurer et al., "SymPy: symbolic computing in
Python", PeerJ Computer Science, 2017) and F evaluated there by sympy.
"""

from fractions import Fraction

import pytest
import sympy

from numag.singular.kinds import JudgedPoint, Verdict
from numag.singular.smoothness import CheckOptions, check_points
from numag.system.parse import parse_constant, parse_system

SEEDS = (1, 2, 3)
Y = sympy.symbols("y0:14")


def chain():
    """The 13 equations in y0..y13 (by hand, from the definition above)."""
    y = Y
    equations = [y[1] ** 2 - y[0] ** 2 * (y[0] + 1), y[2] - y[0] ** 2 * y[1] - y[0] * y[1] - 2]
    equations += [y[k] - y[0] * y[k - 1] - y[1] * y[k - 2] ** 2 - k for k in range(3, 14)]
    return equations


def over(t):
    """The point of X over the parameter t of the nodal cubic (t = 1 and t = -1 both give the node)."""
    point = [t * t - 1, t * (t * t - 1)]
    point.append(point[0] ** 2 * point[1] + point[0] * point[1] + 2)
    for k in range(3, 14):
        point.append(point[0] * point[k - 1] + point[1] * point[k - 2] ** 2 + k)
    return point


def in_units(factor):
    """The system and its points in lengths ``factor`` times the given ones (u = factor y), exactly."""
    equations = [sympy.expand(e.subs({y: y / factor for y in Y}, simultaneous=True)) for e in chain()]
    system = parse_system([str(e).replace("**", "^") for e in equations], [str(y) for y in Y])
    return equations, system


def reference(equations, point):
    """(F vanishes at the point, rank of J there), both by sympy in exact arithmetic."""
    values = dict(zip(Y, [sympy.Rational(p.numerator, p.denominator) for p in point]))
    jacobian = sympy.Matrix(equations).jacobian(Y).subs(values)
    return all(sympy.expand(e.subs(values)) == 0 for e in equations), jacobian.rank()


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("factor, t, expected", [
    (Fraction(1), Fraction(1), Verdict.SINGULAR),          # the node
    (Fraction(1, 1000), Fraction(-1), Verdict.SINGULAR),   # the node, in lengths times 1/1000
    (Fraction(1), Fraction(0), Verdict.SMOOTH),
    (Fraction(1000), Fraction(2), Verdict.SMOOTH),         # integers up to 2e112 (a decimal of 15 or more
])                                                         # digits would be rounded data: decision 0072
def test_exact_point_is_judged_by_its_exact_rank_first(factor, t, expected, seed):
    equations, system = in_units(factor)
    point = [factor * p for p in over(t)]
    on_x, rank = reference(equations, point)
    assert on_x and (rank < 13) == (expected is Verdict.SINGULAR)  # the reference agrees with the hand count
    (verdict,) = check_points(system, [[parse_constant(str(p)) for p in point]], seed=seed).points
    assert verdict.verdict is expected and verdict.rank == rank and verdict.codimension == 13
    assert verdict.judged is JudgedPoint.GIVEN and verdict.on_x_exactly
    assert not verdict.evidence.escalated  # the exact rank decided, no numerical escalation ran
    assert any("Decided exactly" in note for note in verdict.notes)


@pytest.mark.parametrize("seed", SEEDS)
def test_an_exact_rank_drop_on_a_doubled_curve_is_still_asked_whether_it_is_non_reduced(seed):
    # F = (y - x^2)^2: J = 2 (y - x^2) grad(y - x^2) is zero on all of X, so the exact rank drop at (2, 4) is the
    # equation's multiplicity, not a singular point of the parabola (by hand; decision 0096)
    x, y = sympy.symbols("x y")
    assert sympy.Matrix([(y - x ** 2) ** 2]).jacobian([x, y]).subs({x: 2, y: 4}).rank() == 0
    system = parse_system(["(y - x^2)^2"], ["x", "y"])
    (verdict,) = check_points(system, [[parse_constant("2"), parse_constant("4")]], seed=seed).points
    assert verdict.verdict is Verdict.NON_REDUCED and verdict.rank == 0


@pytest.mark.parametrize("seed", SEEDS)
def test_a_point_with_a_tolerance_keeps_the_numerical_route(seed):
    # the plane node y^2 = x^2 (x + 1) at the origin (by hand), given with a tolerance: not exact data, so the
    # rank is decided numerically (the escalation, or its batch in double precision)
    system = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    options = CheckOptions(point_tolerance=1e-8)
    (verdict,) = check_points(system, [[1e-12, -1e-12]], options, seed=seed).points
    assert verdict.verdict is Verdict.SINGULAR and verdict.evidence.escalated
    assert not any("Decided exactly" in note for note in verdict.notes)
