"""The anatomy of curves given by several equations far from the origin, after a linear change of coordinates and
units (decision 0091): the local slices are drawn in coordinates centred exactly at the point, so their radius is
set by the features around it, not by where it sits."""

from fractions import Fraction

import numpy as np
import pytest

from numag.anatomy.records import Motion
from numag.anatomy.survey import point_anatomy
from numag.system.parse import parse_system

NAMES = ["x", "y", "z"]
#: One unit per seed: the same curve in units 1e-3, 1 and 1e3 (x_user = unit * x).
UNITS = {1: Fraction(1, 1000), 2: Fraction(1), 3: Fraction(1000)}


def _parabolas(unit):
    """Two parabolas in two planes crossing transversally at one point: L1 L2 = 0, M = L1^2 + L2^2 with L1, L2, M
    rational linear forms of (x, y, z) / unit whose common zero is far from the origin (about 3500 units out)."""
    u = f"({unit.denominator}/{unit.numerator})"
    l1 = f"(2*x*{u} - y*{u} + z*{u}/3 - 1234)"
    l2 = f"(x*{u} + y*{u} - 2*z*{u} + 2345)"
    m = f"(x*{u}/2 + z*{u} - 3456)"
    return parse_system([f"{l1}*{l2}", f"{m} - {l1}^2 - {l2}^2"], NAMES)


def _sympy_reference(unit):
    """The exact crossing point and the two tangent directions (sympy): component i is {L_i = 0, M = L_j^2}, whose
    tangent at the point, where L_j = 0, is the kernel of (dL_i, dM)."""
    import sympy
    x, y, z = sympy.symbols("x y z")
    s = 1 / sympy.Rational(unit.numerator, unit.denominator)
    l1 = 2 * x * s - y * s + z * s / 3 - 1234
    l2 = x * s + y * s - 2 * z * s + 2345
    m = x * s / 2 + z * s - 3456
    point = sympy.solve([l1, l2, m], [x, y, z], dict=True)[0]
    tangents = []
    for first, second in ((l1, l2), (l2, l1)):
        jacobian = sympy.Matrix([first, m - second ** 2]).jacobian([x, y, z]).subs(point)
        kernel = jacobian.nullspace()
        assert len(kernel) == 1
        tangents.append(np.array([float(v) for v in kernel[0]]))
    return np.array([float(point[v]) for v in (x, y, z)]), tangents


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_two_parabolas_crossing_far_after_a_linear_change(seed):
    # An ordinary double point of a curve has multiplicity 2 and two smooth branches with distinct tangents, and
    # Milnor number 1 (common practice, no source; Milnor 1968 for mu = 1 of a node). The point and the tangents
    # are sympy's, exact. Before decision 0091 the local slices were 1e-3 (1 + |p|) out in balanced units, beyond
    # the parabolas' own size: multiplicity 4, two branches of multiplicity 2 "with a common tangent".
    unit = UNITS[seed]
    point, tangents = _sympy_reference(unit)
    anatomy = point_anatomy(_parabolas(unit), point, seed=seed)
    assert anatomy.multiplicity == 2
    assert sorted(b.multiplicity for b in anatomy.branches) == [1, 1]
    assert all(b.real for b in anatomy.branches)
    found = [np.real(b.tangent) / np.linalg.norm(b.tangent) for b in anatomy.branches]
    for tangent in tangents:
        cosines = [abs(tangent @ f) / np.linalg.norm(tangent) for f in found]
        assert max(cosines) > 1 - 1e-6
    assert anatomy.motion is Motion.SWITCH and anatomy.transversal
    assert anatomy.intersection is not None and anatomy.intersection.milnor == 1


def _d5_far(unit):
    """D5's normal form x^2 y + y^4 (Arnold 1972) in X = 2x - y/3 - 1234, Y = x + y + 2345 of (x, y) / unit: the
    singular point at (1357/7, -17772/7) times the unit, about 2500 units out."""
    u = f"({unit.denominator}/{unit.numerator})"
    big_x = f"(2*x*{u} - y*{u}/3 - 1234)"
    big_y = f"(x*{u} + y*{u} + 2345)"
    point = np.array([float(Fraction(1357, 7) * unit), float(Fraction(-17772, 7) * unit)])
    return parse_system([f"{big_x}^2*{big_y} + {big_y}^4"], NAMES[:2]), point


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_d5_far_after_a_rational_linear_change(seed):
    # D5 (Arnold 1972: corank 2, mu = tau = 5, three branches through the point, one of them singular (multiplicity
    # 2): x^2 y + y^4 = y (x^2 + y^3)). Exact input read in exact centred coordinates (decision 0091); expanded about
    # the origin in double, its coefficients' rounding (2500^4 eps) is larger than the features: mu was counted 4
    # by the gradient's paths and the type left undecided.
    unit = UNITS[seed]
    system, point = _d5_far(unit)
    anatomy = point_anatomy(system, point, seed=seed)
    h = anatomy.hypersurface
    assert (h.type.label, h.milnor, h.tjurina, h.corank) == ("D5", 5, 5, 2)
    assert anatomy.multiplicity == 3 and sorted(b.multiplicity for b in anatomy.branches) == [1, 2]


def test_d5_far_mu_against_sympy():
    # mu of the placed D5 is the length of (f_x, f_y): it has no other critical point (an affine change of the
    # weighted-homogeneous normal form), so sympy's Groebner basis counts the local length globally (common practice,
    # no source)
    import sympy
    x, y = sympy.symbols("x y")
    f = (2 * x - y / 3 - 1234) ** 2 * (x + y + 2345) + (x + y + 2345) ** 4
    basis = sympy.groebner([sympy.diff(f, x), sympy.diff(f, y)], x, y, order="grevlex")
    assert basis.is_zero_dimensional
    leading = [sympy.Poly(q, x, y).monoms(order="grevlex")[0] for q in basis.exprs]
    bound = 1 + max(sum(m) for m in leading)  # the standard monomials: divisible by no leading monomial
    length = sum(1 for a in range(bound) for b in range(bound) if not any(a >= m[0] and b >= m[1] for m in leading))
    system, point = _d5_far(Fraction(1))
    assert point_anatomy(system, point, seed=1).hypersurface.milnor == length == 5


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_point_far_below_rounding_off_an_exact_singular_point_is_read_there(seed):
    # A singular point computed at the origin came out 1e-25 off it (complex rounding): exact f read at the offset
    # itself has the Taylor terms of a smooth point next to a D5 (Hessian of size 1e-25): type undecided. The offset
    # is below deflation's rounding move, so the point is read at the exact centre (decision 0091); D5 (Arnold 1972).
    system = parse_system(["(2*x - y/3)^2*(x + y) + (x + y)^4"], NAMES[:2])
    rng = np.random.default_rng(seed)
    point = 1e-25 * (rng.standard_normal(2) + 1j * rng.standard_normal(2))
    h = point_anatomy(system, point, seed=seed).hypersurface
    assert (h.type.label, h.milnor) == ("D5", 5)
