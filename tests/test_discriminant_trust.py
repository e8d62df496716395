"""Discriminants that were silently wrong: a far multiple point located to 1e-7, and an arc covered twice by S.

Decision 0092. The references are sympy's discriminants, resultants and real roots of the same polynomials
(discriminants of these forms: common practice, no source; sympy: Meurer et al., "SymPy: symbolic computing in
Python", PeerJ Computer Science 3:e103, 2017); sympy is the test's reference only.
"""

from fractions import Fraction

import numpy as np
import pytest
import sympy

from numag.families.centring import centred_family, locate
from numag.families.discriminant import DiscriminantOptions, discriminant
from numag.families.plane import CurvePointKind
from numag.system.files import family_from_mapping

x, y, p, a, b = sympy.symbols("x y p a b")

QUARTIC = x ** 4 - 5 * x ** 2 + 4 - p
#: sympy: the discriminant of x^4 - 5x^2 + 4 - p in x vanishes at p = -9/4 and p = 4 (real roots, sorted)
QUARTIC_POINTS = sorted({float(r) for r in sympy.real_roots(sympy.discriminant(QUARTIC, x))})


def _unit_text(unit, name="x"):
    """A coordinate measured in ``unit``: the true value is name / unit, written in the grammar."""
    return f"{name}/{int(unit)}" if unit >= 1 else f"{int(round(1 / unit))}*{name}"


def quartic_family(shift, unit=1):
    """(x - shift)^4 - 5 (x - shift)^2 + 4 - p with x in ``unit``, p in [-5, 8]."""
    t = f"({_unit_text(unit)} - {shift})"
    return family_from_mapping({"variables": ["x"], "parameters": ["p"], "equations": [f"{t}^4 - 5*{t}^2 + 4 - p"],
                                "ranges": {"p": [-5, 8]}})


# shifts x units x seeds 1-3 were all run once (decision 0092); kept: each unit and seed once, far out, and the origin
@pytest.mark.parametrize("shift, unit, seed", [(1234, 1, 1), (1234, 1000, 2), (1234, 0.001, 3), (0, 1, 2)])
def test_the_quartic_far_out_keeps_both_discriminant_points_and_its_four_real_roots(shift, unit, seed):
    result = discriminant(quartic_family(shift, unit), DiscriminantOptions(at_infinity=False), seed=seed)
    # sympy's discriminant: p = -9/4 and 4 (before: none or one of them at shift 1234, exit 0)
    assert np.allclose(result.real_points, QUARTIC_POINTS, atol=1e-6)
    # sympy's real roots at each region's sample (0, 4, 2: the samples are well inside their intervals)
    counts = []
    for region in result.regions:
        value = Fraction(float(region.sample[0])).limit_denominator(10 ** 6)
        counts.append(len(sympy.real_roots(QUARTIC.subs(p, sympy.Rational(value.numerator, value.denominator)))))
        assert region.count.solutions == counts[-1] and region.count.failed == 0
    assert counts == [0, 4, 2]


# units x seeds 1-3 were all run once (decision 0092); kept: each unit and each seed once
@pytest.mark.parametrize("unit, seed", [(1, 1), (1000, 2), (0.001, 3)])
def test_a_curve_family_far_out_is_centred_exactly_where_it_is(unit, seed):
    # (y + 2345)^2 - (x - 1234)^4 + a (x - 1234)^2 - b: before, one singular point located at 1233.9999998 and a
    # centre of that noise; the centred family had terms of 1e-12 and the balancing put the samples at 1e6, 1e12
    tx, ty = f"({_unit_text(unit)} - 1234)", f"({_unit_text(unit, 'y')} + 2345)"
    family = family_from_mapping({"variables": ["x", "y"], "parameters": ["a", "b"],
                                  "equations": [f"{ty}^2 - {tx}^4 + a*{tx}^2 - b"],
                                  "ranges": {"a": [-3, 3], "b": [-3, 3]}})
    found = locate(family, 1, seed=seed)
    assert found.centring is not None
    centred = centred_family(family, found.centring).system.to_texts()[0]
    # sympy: centred at the true centre, the family is the unshifted one in the user's units (exactly)
    u = sympy.nsimplify(unit)
    expected = sympy.expand((y / u) ** 2 - (x / u) ** 4 + a * (x / u) ** 2 - b)
    assert sympy.expand(sympy.sympify(centred.replace("^", "**")) - expected) == 0


def circle_parabola(unit=1):
    """x^2 + y^2 = a, y = x^2 + b with x, y in ``unit`` (members: points; two parameters)."""
    tx, ty = _unit_text(unit), _unit_text(unit, "y")
    return family_from_mapping({"variables": ["x", "y"], "parameters": ["a", "b"],
                                "equations": [f"({tx})^2 + ({ty})^2 - a", f"{ty} - ({tx})^2 - b"],
                                "ranges": {"a": [-1, 3], "b": [-2, 2]}})


def _sympy_discriminant():
    """The discriminant of the circle and parabola: the resultant of F and det J_x eliminated (sympy)."""
    f, g = x ** 2 + y ** 2 - a, y - x ** 2 - b
    jacobian = sympy.Matrix([f, g]).jacobian([x, y]).det()
    # y = x^2 + b into the circle and the determinant, then x eliminated
    circle = sympy.expand(f.subs(y, x ** 2 + b))
    det = sympy.expand(jacobian.subs(y, x ** 2 + b))
    return sympy.factor(sympy.resultant(circle, det, x))


# units x seeds 1-3 were all run once (decision 0092); kept: each unit and each seed once
@pytest.mark.parametrize("unit, seed", [(1, 1), (1000, 2), (0.001, 3)])
def test_an_arc_covered_twice_gives_no_nodes(unit, seed):
    # along a + b = -1/4 every member has two singular points (x, -1/2) and (-x, -1/2): the two lifts of one arc
    # crossed "anywhere" and gave 11-62 false refined nodes (exit 0)
    result = discriminant(circle_parabola(unit), DiscriminantOptions(at_infinity=False, components=False), seed=seed)
    disc = _sympy_discriminant()
    # sympy: (a - b^2)^2 (4a + 4b + 1)^2 up to a constant; its singular points where both factors vanish: the
    # tangency (1/4, -1/2) only, so no node
    factors = [f for f, _ in sympy.factor_list(disc)[1]]
    assert sorted(sympy.Poly(f, a, b).total_degree() for f in factors) == [1, 2]
    kinds = [point.kind for point in result.curve.special]
    assert CurvePointKind.NODE not in kinds and CurvePointKind.UNDECIDED not in kinds
    for point in result.curve.special:
        # every special point reported is on sympy's discriminant, on both factors (their meeting)
        for f in factors:
            assert abs(float(f.subs({a: point.point[0], b: point.point[1]}))) < 1e-6
