"""The points where a curve meets a hypersurface, by the evaluated eliminant along a generic projection
(numag.witness.eliminant, decision 0114), against exact solutions from sympy."""

import numpy as np
import pytest

from numag.system.parse import parse_system
from numag.witness.eliminant import MatrixDeterminant, curve_meets_hypersurface


def _numeric(texts, names):
    return [p.numeric() for p in parse_system(texts, names).polynomials]


def _exact_points(sympy, equations, names):
    symbols = sympy.symbols(names)
    found = sympy.solve([sympy.sympify(e.replace("^", "**"), locals=dict(zip(names, symbols))) for e in equations],
                        symbols, dict=True)
    return np.array([[complex(s[v]) for v in symbols] for s in found])


def _matched(found, exact):
    return len(found) == len(exact) and all(np.min(np.linalg.norm(found - p, axis=1)) < 1e-7 * (1 + np.linalg.norm(p))
                                            for p in exact)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_twisted_cubic_meets_a_quadric_in_six_points(seed):
    # The twisted cubic (t, t^2, t^3) meets a quadric in 2 * 3 = 6 points (Bezout; common practice, no source),
    # here x^2 + y^2 + z^2 - 2 x - 3 = 0 at the six roots of t^6 + t^4 + t^2 - 2 t - 3; exact reference: sympy.
    # Its witness points on the plane x + y + z = 1 are the cubic's values at the roots of t^3 + t^2 + t - 1.
    sympy = pytest.importorskip("sympy")
    names = ["x", "y", "z"]
    curve = _numeric(["y - x^2", "z - x*y"], names)
    roots = np.roots([1, 1, 1, -1])
    witness = np.array([[t, t ** 2, t ** 3] for t in roots])
    g = _numeric(["x^2 + y^2 + z^2 - 2*x - 3"], names)[0]
    meeting = curve_meets_hypersurface(curve, witness, g, np.random.default_rng(seed))
    t = sympy.symbols("t")
    sextic = sympy.Poly(sympy.expand((t**2 + t**4 + t**6) - 2 * t - 3), t)   # g on the cubic
    assert sympy.degree(sympy.gcd(sextic, sextic.diff(t)), t) == 0           # six distinct points
    exact = np.array([[complex(r), complex(r**2), complex(r**3)] for r in sextic.nroots(n=30)])
    assert meeting.undecided == 0 and _matched(meeting.points, exact)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_meeting_at_infinity_is_no_point_and_is_said(seed):
    # The hyperbola x y = 1 (in the plane z = 2) meets the line x = 2 at (2, 1/2) and at the hyperbola's point at
    # infinity in the y direction (common practice, no source): one finite point, the other said in a note.
    sympy = pytest.importorskip("sympy")
    names = ["x", "y", "z"]
    curve = _numeric(["x*y - 1", "z - 2"], names)
    witness = np.array([[t, 1 / t, 2.0] for t in np.roots([1, -3, 1])])   # on x + y = 3
    g = _numeric(["x - 2"], names)[0]
    meeting = curve_meets_hypersurface(curve, witness, g, np.random.default_rng(seed))
    exact = _exact_points(sympy, ["x*y - 1", "z - 2", "x - 2"], names)
    assert meeting.undecided == 0 and _matched(meeting.points, exact)
    assert any("at infinity" in note for note in meeting.notes)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_determinant_evaluated_unexpanded_and_a_double_meeting(seed):
    # g = det [[x, y], [y, x]] = x^2 - y^2 on the parabola y = x^2 + z, z = 0: x^2 = x^4 at x = 0 (twice: g vanishes
    # to order 2 along the curve there) and x = 1, x = -1 (common practice, no source; exact reference: sympy).
    sympy = pytest.importorskip("sympy")
    names = ["x", "y", "z"]
    curve = _numeric(["y - x^2 - z", "z"], names)
    witness = np.array([[t, t ** 2, 0.0] for t in np.roots([1, 1, -1.5])])   # on x + y = 1.5
    x, y = _numeric(["x", "y"], names)
    meeting = curve_meets_hypersurface(curve, witness, MatrixDeterminant([[x, y], [y, x]]), np.random.default_rng(seed))
    exact = _exact_points(sympy, ["y - x^2 - z", "z", "x^2 - y^2"], names)
    assert len(exact) == 3
    assert meeting.undecided == 0 and _matched(meeting.points, exact)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_three_meetings_close_together_far_from_the_witness_points(seed):
    # The parabola y = x^2 (z = 1) meets (x - 3)(x - 2.99)(x - 3.01) = 0 in three points 0.01 apart (hand
    # computation), read from witness points at x = +-20, 400 times farther: each meeting is a point of its own, or
    # the reading is undecided; never one point where three are (read as one triple root before, exit 0; decision 0123).
    names = ["x", "y", "z"]
    curve = _numeric(["y - x^2", "z - 1"], names)
    witness = np.array([[20.0, 400.0, 1.0], [-20.0, 400.0, 1.0]])
    g = _numeric(["(x - 3)*(x - 299/100)*(x - 301/100)"], names)[0]
    meeting = curve_meets_hypersurface(curve, witness, g, np.random.default_rng(seed))
    exact = np.array([[x, x * x, 1.0] for x in (2.99, 3.0, 3.01)])
    assert meeting.undecided == 0 and _matched(meeting.points, exact)
