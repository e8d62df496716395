"""Singular points of exact input confirmed beyond its last written digit, in every frame (decision 0109).

The nodal cubic y^2 = x^2 (x + 1) changed by 1e-12 in its constant is smooth; moved away from the origin, double
precision cannot tell the change from the node (1e-12 against terms of about 300) and a rank drop settled in double
was reported as a singular point, exit 0. Exact input's singular points are now confirmed at the digits that
separate them from a change of the coefficients' last written digit, or reported undecided (exit 3). True nodes
with the same shifts are still found, exit 0.
"""

import json
from fractions import Fraction

import numpy as np
import pytest
import sympy

from numag.app.cli import EXIT_OK, main
from numag.numeric.scaling import Scaling
from numag.singular.kinds import CoefficientPrecision
from numag.singular.nearness import coefficient_precision, separation_digits
from numag.system.parse import parse_system

SEEDS = (1, 2, 3)
X, Y = sympy.symbols("X Y")


def nodal_cubic(shift, eps):
    """y^2 - x^2 (x + 1) - eps in x = X - shift[0], y = Y - shift[1], expanded with exact rationals."""
    x, y = X - sympy.Rational(shift[0]), Y - sympy.Rational(shift[1])
    return sympy.expand(y ** 2 - x ** 2 * (x + 1) - sympy.Rational(eps))


def text_of(f):
    return str(f).replace("**", "^")


def run_singular(tmp_path, capsys, f, seed):
    path = tmp_path / "system.toml"
    path.write_text(f'variables = ["X", "Y"]\nequations = [{json.dumps(text_of(f))}]\n')
    code = main(["singular", str(path), "--json", "--seed", str(seed)])
    report = json.loads(capsys.readouterr().out)
    points = [np.array([complex(*c) for c in component["points"][0]]) for component in report["components"]
              if not component["at_infinity"] and component["kind"] == "singular"]
    return code, points, report


def sympy_singular_points(f):
    """sympy as the exact reference: the Groebner basis of (f, f_X, f_Y) and its real solutions."""
    basis = sympy.groebner([f, f.diff(X), f.diff(Y)], X, Y, order="lex")
    if list(basis.exprs) == [1]:
        return []
    return [np.array([complex(s[X]), complex(s[Y])]) for s in sympy.solve(list(basis.exprs), [X, Y], dict=True)]


@pytest.mark.parametrize("seed", SEEDS)
def test_a_node_changed_in_the_last_digit_near_the_origin_is_no_singular_point(tmp_path, capsys, seed):
    # common practice, no source: sympy's Groebner basis of (f, f_X, f_Y) is [1] (the constant 10.999999999999,
    # 14 digits, is exact as written); f(-3, 5) = 1e-12 exactly
    f = nodal_cubic((-3, 5), Fraction(1, 10 ** 12))
    assert sympy_singular_points(f) == []
    code, points, _ = run_singular(tmp_path, capsys, f, seed)
    assert points == []
    assert code == EXIT_OK


@pytest.mark.parametrize("seed", SEEDS)
def test_a_node_changed_in_the_last_digit_far_away_is_never_reported_silently(tmp_path, capsys, seed):
    # common practice, no source: sympy's Groebner basis is [1]; the change 1e-14 among terms of 1e10 is below any
    # double-precision reading, so numag may say "no singular point" or flag its doubt, never a point with exit 0
    f = nodal_cubic((-1234, 2345), Fraction(1, 10 ** 14))
    assert sympy_singular_points(f) == []
    code, points, _ = run_singular(tmp_path, capsys, f, seed)
    assert points == [] or code != EXIT_OK


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("shift", [(-3, 5), (-1234, 2345)])
def test_a_true_node_after_the_same_shift_is_found(tmp_path, capsys, seed, shift):
    # common practice, no source: the nodal cubic's node at the origin, moved by the shift; sympy's reference
    f = nodal_cubic(shift, 0)
    expected = sympy_singular_points(f)
    assert len(expected) == 1
    code, points, _ = run_singular(tmp_path, capsys, f, seed)
    assert code == EXIT_OK
    assert len(points) == 1
    assert np.linalg.norm(points[0] - expected[0]) <= 1e-8 * (1 + np.linalg.norm(expected[0]))


@pytest.mark.parametrize("seed", SEEDS)
def test_a_node_with_irrational_coordinates_is_confirmed(tmp_path, capsys, seed):
    # common practice, no source: (Y - 5)^2 = (X^2 - 2)^2 (X + 7) has nodes at X = +-sqrt(2), Y = 5 (double roots
    # of the right side where X + 7 > 0); sympy's Groebner basis gives them
    f = sympy.expand((Y - 5) ** 2 - (X ** 2 - 2) ** 2 * (X + 7))
    expected = sympy_singular_points(f)
    assert len(expected) == 2
    code, points, _ = run_singular(tmp_path, capsys, f, seed)
    assert code == EXIT_OK
    assert len(points) == 2
    for point in expected:
        assert min(np.linalg.norm(p - point) for p in points) <= 1e-8 * (1 + np.linalg.norm(point))


def test_separation_digits_grow_with_the_digits_written_and_the_distance():
    # from the definition (decision 0109): a constant written with more digits, or far larger terms, need more
    near = parse_system([text_of(nodal_cubic((-3, 5), Fraction(1, 10 ** 12)))], ["X", "Y"])
    node = parse_system([text_of(nodal_cubic((-3, 5), 0))], ["X", "Y"])
    far = parse_system([text_of(nodal_cubic((-1234, 2345), Fraction(1, 10 ** 12)))], ["X", "Y"])
    assert separation_digits(node, [-3, 5]) < separation_digits(near, [-3, 5]) < separation_digits(far, [-1234, 2345])


def test_balanced_units_keep_the_numbers_as_written():
    # common practice, no source: an integer and a rational with 40 digits are exact as written; balancing in powers
    # of ten must not turn their expansion into "printed doubles"
    system = parse_system([text_of(nodal_cubic((-1234, 2345), Fraction(1, 10 ** 30)))], ["X", "Y"])
    assert coefficient_precision(system) is CoefficientPrecision.EXACT
    balanced = Scaling.balancing(system).scale_system(system)
    assert coefficient_precision(balanced) is CoefficientPrecision.EXACT


def linear_far(f):
    """f in x = 3 X - Y/2 + 1234, y = X + Y - 2345 (a rational linear change and a far shift), expanded exactly."""
    x, y = sympy.symbols("x y")
    return sympy.expand(f.subs({x: 3 * X - Y / 2 + 1234, y: X + Y - 2345}, simultaneous=True))


@pytest.mark.parametrize("seed", SEEDS)
def test_after_a_linear_change_and_a_far_shift_a_last_digit_change_is_never_a_silent_point(tmp_path, capsys, seed):
    # common practice, no source: the nodal cubic plus 1e-20, written in other coordinates, is smooth (sympy's
    # Groebner basis is [1]); the control, the same change of the true node, has one node (sympy)
    x, y = sympy.symbols("x y")
    changed = linear_far(y ** 2 - x ** 2 * (x + 1) - sympy.Rational(1, 10 ** 20))
    assert sympy_singular_points(changed) == []
    code, points, _ = run_singular(tmp_path, capsys, changed, seed)
    assert points == [] or code != EXIT_OK
    node = linear_far(y ** 2 - x ** 2 * (x + 1))
    expected = sympy_singular_points(node)
    assert len(expected) == 1
    code, points, _ = run_singular(tmp_path, capsys, node, seed)
    assert code == EXIT_OK
    assert len(points) == 1
    assert np.linalg.norm(points[0] - expected[0]) <= 1e-8 * (1 + np.linalg.norm(expected[0]))

