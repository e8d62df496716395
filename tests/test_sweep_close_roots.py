"""Sweeps near the discriminant: two close simple roots are two roots whichever values share the batch
(decision 0134), and grid and CSV values are read exactly."""

import fractions

import mpmath
import numpy as np
import pytest
import sympy

from numag.errors import InputError
from numag.families.records import PointKind
from numag.families.sweep import parse_grid, parse_value, sweep
from numag.system.family import Family
from numag.system.parse import parse_system

X, P = sympy.symbols("x p")
CUBIC = X ** 3 - 3 * X + P
NEAR_FOLD = 1.9999999999  # 1e-10 below the fold p = 2 of the cubic, where x = 1 is a double root
# the cubic in other units and after a rational linear change x -> (2x + 1)/3, with the map of its roots
FORMS = {
    "plain": (CUBIC, lambda r: r),
    "x1000": (sympy.expand(CUBIC.subs(X, X / 1000) * 10 ** 9), lambda r: r * 1000),
    "x1e-3": (sympy.expand(CUBIC.subs(X, X * 1000) / 10 ** 9), lambda r: r / 1000),
    "linear": (sympy.expand(CUBIC.subs(X, (2 * X + 1) / 3) * 27), lambda r: (3 * r - 1) / 2),
}


def _family(expression):
    return Family(parse_system([str(expression).replace("**", "^")], ["x", "p"]), ("p",))


def _cubic_roots(p):
    """The three roots of x^3 - 3x + p at the double p, by mpmath at 40 digits."""
    with mpmath.workdps(40):
        roots = mpmath.polyroots([1, 0, -3, mpmath.mpf(p)], maxsteps=200, extraprec=200)
    return sorted(float(mpmath.re(r)) for r in roots)


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("form", sorted(FORMS))
@pytest.mark.parametrize("other", [-2.0, -3.0, 0.5])
def test_close_simple_roots_are_two_roots_in_any_batch(seed, form, other):
    # Reference: mpmath's polynomial roots at 40 digits (the roots are 1 -+ 5.77e-6 and -2, all simple:
    # the discriminant 108 - 27 p^2 is not 0). Rule: a root of multiplicity mu is the end of mu paths of a
    # parameter homotopy (Morgan and Sommese, "Coefficient-parameter polynomial continuation", 1989), so a
    # single path is never a rank drop.
    expression, to_form = FORMS[form]
    result = sweep(_family(expression), [[NEAR_FOLD], [other]], seed=seed)
    member = result.values[0]
    want = sorted(to_form(r) for r in _cubic_roots(NEAR_FOLD))
    got = sorted(member.points[:, 0].real)
    assert member.undecided == 0 and member.failed == 0
    assert len(got) == 3 and member.real_count == 3
    assert all(kind == PointKind.REGULAR for kind in member.kinds)
    np.testing.assert_allclose(got, want, rtol=1e-9, atol=0)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_double_root_stays_one_rank_drop(seed):
    # Hand computation: x^3 - 3x + 2 = (x - 1)^2 (x + 2) and x^3 - 3x - 2 = (x + 1)^2 (x - 2).
    result = sweep(_family(CUBIC), [[NEAR_FOLD], [2.0], [-2.0]], seed=seed)
    for member, double, simple in zip(result.values[1:], (1.0, -1.0), (-2.0, 2.0)):
        assert member.undecided == 0 and member.real_count == 2
        drops = member.rank_drops[:, 0].real
        assert len(drops) == 1 and abs(drops[0] - double) < 1e-6
        regular = [p for p, k in zip(member.points[:, 0].real, member.kinds) if k == PointKind.REGULAR]
        assert len(regular) == 1 and abs(regular[0] - simple) < 1e-12
        assert list(member.paths[[k == PointKind.RANK_DROP for k in member.kinds]]) == [2]


def _four_bar_points(b):
    """The four solutions of the four-bar below, by circle intersection at 50 digits (hand derivation)."""
    points = []
    with mpmath.workdps(50):
        b = mpmath.mpf(b)
        for y1 in (mpmath.sqrt(3000000), -mpmath.sqrt(3000000)):
            # circles about (4000, 0) of radius 3000 and about (1000, y1) of radius b
            c0, c1 = mpmath.matrix([4000, 0]), mpmath.matrix([1000, y1])
            d = mpmath.norm(c1 - c0)
            along = (3000 ** 2 - b ** 2 + d ** 2) / (2 * d)
            height = mpmath.sqrt(3000 ** 2 - along ** 2)
            unit = (c1 - c0) / d
            foot = c0 + along * unit
            for sign in (1, -1):
                points.append([float(y1), float(foot[0] - sign * height * unit[1]),
                               float(foot[1] + sign * height * unit[0])])
    return np.array(points)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_four_bar_in_millimetres_just_above_a_branch_value(seed):
    # Reference: the two circles meet in two real points when b exceeds 2000 sqrt(3) - 3000 = 464.10161513...
    # (hand derivation: the centres are sqrt(12) * 1000 apart); b here is 6e-8 above it, so 4 real solutions.
    equations = ["1000^2 + y1^2 - 4000000", "(x2 - 4000)^2 + y2^2 - 9000000", "(x2 - 1000)^2 + (y2 - y1)^2 - b^2"]
    family = Family(parse_system(equations, ["y1", "x2", "y2", "b"]), ("b",))
    b = 464.1016152
    result = sweep(family, [[b], [6464.1016151]], seed=seed)
    member = result.values[0]
    want = _four_bar_points(b)
    assert member.undecided == 0 and member.real_count == 4
    assert all(kind == PointKind.REGULAR for kind in member.kinds)
    got = member.points.real
    for point in want:  # each reference solution found once, to 1e-9 of the mechanism's size
        distance = np.linalg.norm(got - point, axis=1)
        assert np.sum(distance < 1e-9 * 3000) == 1


def test_grid_values_are_exact_rationals_rounded_once():
    # Hand computation: 0.2 + k (2.6 - 0.2) / 4 for k = 0..4 is 1/5, 4/5, 7/5, 2, 13/5.
    values = parse_grid("p=0.2:2.6:5", ["p"])[:, 0]
    expected = [float(fractions.Fraction(n, 5)) for n in (1, 4, 7, 10, 13)]
    assert values.tolist() == expected
    assert values[3] == 2.0
    assert parse_grid("p=4/2:1e1:1", ["p"])[:, 0].tolist() == [2.0]


@pytest.mark.parametrize("text, value", [("4/2", fractions.Fraction(2)), ("-0.5", fractions.Fraction(-1, 2)),
                                         ("1e-3", fractions.Fraction(1, 1000)),
                                         ("1.99999999999999999999", fractions.Fraction(199999999999999999999,
                                                                                       10 ** 20))])
def test_values_are_read_as_rationals(text, value):
    # Hand computation of each rational.
    assert parse_value(text) == value


@pytest.mark.parametrize("text", ["sqrt(2)", "1+I", "__import__('os')", "inf", "nan", "1e400", "x", ""])
def test_values_that_are_no_rational_number_are_refused(text):
    # Common practice, no source: values are read by the equation grammar, never evaluated as code.
    with pytest.raises(InputError):
        parse_value(text)
