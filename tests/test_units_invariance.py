"""Residual tests that do not depend on the unit (decision 0064).

A point is accepted on V(F) by what Newton's method does there (:func:`numag.numeric.refine.newton_zero_test`),
not by a residual bound in units of terms sized at max(|x_j|, 1): a feature much smaller than that unit (the loop
of a node, a small ellipse far from the origin) used to let a stationary point of the residual through as a
point of V(f, f_x, f_y), which the check then refused (a false exit 3). The same geometry in other units (lengths
times 1e-3, 1, 1e3), after a rational linear change of coordinates, and at several seeds gives the same answer.
"""

from fractions import Fraction

import numpy as np
import pytest
import sympy

from numag import check_points, decompose, singular_locus
from numag.app.report import completeness_warnings, singular_to_dict
from numag.numeric.evaluate import BatchEvaluator
from numag.numeric.refine import ZeroKind, newton_zero_test
from numag.singular.kinds import Verdict
from numag.singular.locus import SingularOptions
from numag.system.parse import parse_system
from numag.system.polynomial import PolynomialSystem

UNITS = [Fraction(1, 1000), Fraction(1), Fraction(1000)]
SEEDS = [1, 2, 3]
#: Rational changes of coordinates (u, v) = M (x - p) / unit: a rotation by (3/5, 4/5) and a shear.
CHANGES = {"rotation": ((Fraction(3, 5), Fraction(4, 5)), (Fraction(-4, 5), Fraction(3, 5))),
           "shear": ((Fraction(1), Fraction(1, 3)), (Fraction(0), Fraction(1)))}
CENTRE = (Fraction(1, 7), Fraction(-2, 3))


def _q(value):
    value = Fraction(value)
    return f"({value.numerator}/{value.denominator})"


def _form_system(form, unit, change):
    """``form`` in u, v with (u, v) = M (x - p u) / u_len, exact; returns (system, p u as floats)."""
    (a, b), (c, d) = CHANGES[change]
    p = [coordinate * unit for coordinate in CENTRE]
    u = f"(({_q(a)}*(x - {_q(p[0])}) + {_q(b)}*(y - {_q(p[1])}))/{_q(unit)})"
    v = f"(({_q(c)}*(x - {_q(p[0])}) + {_q(d)}*(y - {_q(p[1])}))/{_q(unit)})"
    return parse_system([form.format(u=u, v=v)], ["x", "y"]), np.array([float(t) for t in p])


def _warnings(locus):
    return completeness_warnings(singular_to_dict(locus, SingularOptions()))


def test_newton_tells_a_stationary_point_of_the_residual_from_a_zero():
    # Construction (common practice, no source): f = x^2 - y^2 + 100 x^3 has f_x = f_y = 0 at the node (0, 0)
    # and at (-1/150, 0), where f = 4/3 * 1/150^2 - ... = 1/67500 != 0 (a stationary point of |F|, F = (f, f_x, f_y)).
    system = parse_system(["x^2 - y^2 + 100*x^3", "2*x + 300*x^2", "-2*y"], ["x", "y"])
    evaluator = BatchEvaluator(system.polynomials)
    rng = np.random.default_rng(7)
    for distance in (1e-9, 1e-6, 1e-4):  # however far the start: the residual of the offset goes, f's value stays
        offsets = distance * (rng.standard_normal((2, 2)) + 1j * rng.standard_normal((2, 2)))
        test = newton_zero_test(system, evaluator, np.array([[-1 / 150, 0], [0, 0]]) + offsets)
        assert test.kinds == [ZeroKind.NOT_A_ZERO, ZeroKind.ZERO]
        assert test.after[0] > 1e-9 and test.after[1] < 1e-11
        assert np.linalg.norm(test.points[1]) < 1e-7  # the node, refined


def test_newton_not_finished_near_a_multiple_zero_is_undecided():
    # Construction: the cusp's system (f, f_x, f_y) = (y^2 - x^3, -3 x^2, 2 y) from (1e-3, 1e-3): Newton converges
    # linearly in x (the residual 3 x^2 falls by 4 per step); after 3 steps it is still 1e-8, far above rounding,
    # and the linear model explains it: undecided, not "not a zero". Given 60 steps it reaches rounding: a zero.
    system = parse_system(["y^2 - x^3", "-3*x^2", "2*y"], ["x", "y"])
    evaluator = BatchEvaluator(system.polynomials)
    start = np.array([[1e-3, 1e-3]])
    assert newton_zero_test(system, evaluator, start, max_iterations=3).kinds == [ZeroKind.UNDECIDED]
    assert newton_zero_test(system, evaluator, start).kinds == [ZeroKind.ZERO]


@pytest.mark.parametrize("seed", SEEDS)
def test_newton_accepts_multiple_zeros(seed):
    # Construction: V(x^2) is the line x = 0 with multiplicity 2; V(y^2 - x^3) a cusp at 0, as a system with
    # its partial derivatives (f, f_x, f_y) the origin with multiplicity > 1. Newton converges only linearly
    # there, but it converges: both are zeros, not "not a zero".
    rng = np.random.default_rng(seed)
    line = parse_system(["x^2"], ["x", "y"])
    cusp = parse_system(["y^2 - x^3", "-3*x^2", "2*y"], ["x", "y"])
    for system, start in ((line, [1e-5, 0.3]), (cusp, [1e-5, 1e-7])):
        point = np.array(start) + 1e-7 * rng.standard_normal(2)
        test = newton_zero_test(system, BatchEvaluator(system.polynomials), point[None, :])
        assert test.kinds == [ZeroKind.ZERO]


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("unit", UNITS, ids=["mm", "m", "km"])
def test_a_small_loop_gives_one_node_in_every_unit(unit, seed):
    # Construction (common practice, no source): u^2 - v^2 + 100 u^3 has one singular point, the node u = v = 0
    # (its loop has size 1/100; the other critical point u = -1/150 is off the curve); moved to p by a rotation.
    # Before decision 0064 the loop's centre was taken as a point of V(f, f_x, f_y) and refused by the check:
    # "not settled on X", exit 3, at every unit and seed.
    system, p = _form_system("{u}^2 - {v}^2 + 100*{u}^3", unit, "rotation")
    locus = singular_locus(system, seed=seed)
    points = [c.points[0] for c in locus.isolated()]
    assert len(points) == 1 and not _warnings(locus)
    assert np.linalg.norm(points[0] - p) <= 1e-8 * float(unit)
    assert "not_settled_on_X" not in locus.discarded


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("change", sorted(CHANGES))
def test_the_critical_points_of_a_small_loop_against_sympy(change, seed):
    # Reference: sympy's Groebner basis of (f, f_x, f_y) over Q is one point, p (the node); V(f, f_x, f_y) as
    # numag decomposes it must have that one point (the loop's centre is a zero of f_x, f_y only).
    system, p = _form_system("{u}^2 - {v}^2 + 1000*{u}^3", Fraction(1), change)
    x, y = sympy.symbols("x y")
    f = sympy.sympify(system.to_texts()[0].replace("^", "**"), locals={"x": x, "y": y})  # our own text
    solutions = sympy.solve([f, sympy.diff(f, x), sympy.diff(f, y)], [x, y], dict=True)
    assert [(s[x], s[y]) for s in solutions] == [CENTRE]
    gradient = [g for g in system.polynomials[0].gradient()]
    augmented = PolynomialSystem(["x", "y"], [system.polynomials[0]] + gradient)
    result = decompose(augmented, seed=seed)
    assert [(c.dimension, c.degree) for c in result.components] == [(0, 1)]
    assert np.linalg.norm(result.components[0].points[0] - p) <= 1e-6


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("unit", UNITS, ids=["mm", "m", "km"])
def test_a_small_ellipse_far_out_is_smooth_in_every_unit(unit, seed):
    # Construction: an ellipse of semi-axes 2e-4 and 4e-4 about (1, 1/2) (lengths times the unit) is smooth; its
    # centre (where f_x = f_y = 0 and f = -1, 1e-8 of its terms) is off the curve and a point on it is smooth.
    a, b = Fraction(2, 10000) * unit, Fraction(4, 10000) * unit
    cx, cy = Fraction(1) * unit, Fraction(1, 2) * unit
    system = parse_system([f"((x - {_q(cx)})/{_q(a)})^2 + ((y - {_q(cy)})/{_q(b)})^2 - 1"], ["x", "y"])
    locus = singular_locus(system, seed=seed)
    assert locus.isolated() == [] and not _warnings(locus)
    on_curve = [float(cx + a * Fraction(3, 5)), float(cy + b * Fraction(4, 5))]
    verdicts = check_points(system, [[float(cx), float(cy)], on_curve], seed=seed).points
    assert [v.verdict for v in verdicts] == [Verdict.OFF, Verdict.SMOOTH]


@pytest.mark.parametrize("unit", [Fraction(1), Fraction(1000)], ids=["m", "mm"])
def test_four_bar_in_metres_and_millimetres(unit):
    # A Grashof equality four-bar (ground 4, crank 2, coupler 3, rocker 3; tests/corpus.py, sympy Groebner basis,
    # common practice, no source): one singular point, the folded configuration A = (-2, 0), B = (1, 0), in the
    # unit of the lengths.
    u = unit
    system = parse_system([f"ax^2 + ay^2 - {_q(4 * u * u)}", f"(bx - {_q(4 * u)})^2 + by^2 - {_q(9 * u * u)}",
                           f"(ax - bx)^2 + (ay - by)^2 - {_q(9 * u * u)}"], ["ax", "ay", "bx", "by"])
    locus = singular_locus(system, seed=2)
    points = [c.points[0] for c in locus.isolated()]
    assert len(points) == 1 and not _warnings(locus)
    assert np.linalg.norm(points[0] - float(u) * np.array([-2, 0, 1, 0])) <= 1e-8 * float(u)
