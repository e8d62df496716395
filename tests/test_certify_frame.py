"""Certificates of singular points whose coordinates are rounding of exact zeros, and the codimension claim
checked by samples in a frame at the point (decision 0098).

A singular point at the origin that a linear change of coordinates brings back as (1e-49, ...) had been
"refuted" in a box of 1e-55 around it; samples 1e-3 from a crossing at the origin passed the unit's residual
test while 1e-6 off X and contradicted a true codimension claim.
"""

from fractions import Fraction

import numpy as np
import pytest

from numag.certify.certificates import certify_singular_point
from numag.certify.records import CertifyOptions
from numag.system.parse import parse_system

sympy = pytest.importorskip("sympy")

# a rational change of coordinates x_old = M x_new (invertible: its determinant is checked below)
M = [[2, 2, Fraction(1, 2), 1], [Fraction(-1, 3), 3, 2, Fraction(1, 2)], [1, Fraction(-1, 3), 4, 2],
     [Fraction(1, 2), 1, Fraction(-1, 3), 5]]


def _changed(equations, names, shift=(0, 0, 0, 0)):
    """The equations in new coordinates: old = M (new - shift), expanded by sympy; also the exact new point of 0."""
    symbols = sympy.symbols(names)
    matrix = sympy.Matrix([[sympy.Rational(v) for v in row] for row in M])
    assert matrix.det() != 0
    shift = sympy.Matrix([sympy.Rational(v) for v in shift])
    old = matrix * (sympy.Matrix(symbols) - shift)
    rules = dict(zip(symbols, list(old)))
    changed = [sympy.expand(sympy.sympify(e, locals=dict(zip(names, symbols))).subs(rules, simultaneous=True))
               for e in equations]
    return [str(e).replace("**", "^") for e in changed], symbols, changed, list(shift)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_two_planes_through_a_point_certified_from_rounding_of_the_origin(seed):
    # two planes of C^4 meeting at one point: X = {x = y = 0} u {z = w = 0}, codimension 2, singular at
    # the meeting point only (common practice, no source); sympy gives the rank of J on X and at the point
    text, symbols, exact, _ = _changed(["x*z", "x*w", "y*z", "y*w"], ["x", "y", "z", "w"])
    jacobian = sympy.Matrix(exact).jacobian(symbols)
    assert jacobian.subs(dict.fromkeys(symbols, 0)).rank() == 0
    system = parse_system(text, ["x", "y", "z", "w"])
    rng = np.random.default_rng(seed)
    rounding = 1e-49 * rng.standard_normal(4)  # what a computation returns for the exact zero
    certificate = certify_singular_point(system, rounding, codimension=2, options=CertifyOptions(seed=seed))
    assert certificate.status == "certified"
    assert certificate.kind == "exact"
    (check,) = [c for c in certificate.claim_checks if c.name == "codimension"]
    assert check.found == 2


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_rank_one_two_by_three_matrices_vertex_certified_after_a_change(seed):
    # 2 x 2 minors of a 2 x 3 matrix: the matrices of rank <= 1, codimension 2, singular only at 0 (common
    # practice, no source); here in six unknowns after a rational change of the first four
    names = ["a", "b", "c", "d", "e", "f"]
    minors = ["a*e - b*d", "a*f - c*d", "b*f - c*e"]
    text, symbols, exact, _ = _changed(minors, names[:4])
    # _changed maps only a..d; e and f stay
    system = parse_system(text, names)
    rng = np.random.default_rng(seed)
    certificate = certify_singular_point(system, 1e-49 * rng.standard_normal(6), codimension=2,
                                         options=CertifyOptions(seed=seed))
    assert certificate.status == "certified", certificate.reason


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_two_planes_far_from_the_origin_codimension_claim_holds(seed):
    # the same two planes meeting at a point far from the origin; the sampled codimension is 2 (sympy: rank J
    # at a generic point of X is 2), not 3 as samples 1e-3 of the distance away had made it
    shift = (1234, -2345, 3456, -4567)
    text, symbols, exact, exact_shift = _changed(["x*z", "x*w", "y*z", "y*w"], ["x", "y", "z", "w"], shift)
    jacobian = sympy.Matrix(exact).jacobian(symbols)
    on_plane = dict(zip(symbols, list(sympy.Matrix([[sympy.Rational(v) for v in row] for row in M]).inv()
                                       * sympy.Matrix([0, 0, 3, 7]) + sympy.Matrix(exact_shift))))
    assert all(e.subs(on_plane) == 0 for e in exact) and jacobian.subs(on_plane).rank() == 2
    system = parse_system(text, ["x", "y", "z", "w"])
    point = np.array([float(v) for v in exact_shift])
    certificate = certify_singular_point(system, point, codimension=2, options=CertifyOptions(seed=seed))
    assert certificate.status == "certified", certificate.reason
    (check,) = [c for c in certificate.claim_checks if c.name == "codimension"]
    assert check.found == 2


def test_a_point_that_is_no_zero_is_still_refuted():
    # the guard keeps refutations where the point is no zero: (1e-49, 1) on the node y^2 = x^2 (x + 1) (from memory)
    system = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    assert certify_singular_point(system, [1e-49, 1.0]).status == "refuted"
