"""A point is called smooth only when no singular point of X lies within its own uncertainty (decision 0110).

The surface f = (x^2 + y^2 - 1)^2 - z^2 (z + 1) is singular exactly along the circle x^2 + y^2 = 1, z = 0
(common practice, no source; checked by sympy below), written after rational linear changes of coordinates, one
of them shifted far from the origin. The exact reference is sympy (Meurer et al., "SymPy: symbolic computing in
Python", PeerJ Computer Science, 2017).
"""

import pytest
import sympy

from numag.app.report import certify_report
from numag.app.saved import to_dict
from numag.singular.kinds import JudgedPoint, Verdict
from numag.singular.smoothness import CheckOptions, check_points
from numag.system.files import points_from_json
from numag.system.parse import parse_constant, parse_system

SEEDS = (1, 2, 3)
x, y, z = sympy.symbols("x y z")
X, Y, Z = sympy.symbols("X Y Z")
F = (x ** 2 + y ** 2 - 1) ** 2 - z ** 2 * (z + 1)
#: x = A (X, Y, Z) + b: the linear change, without and with a shift far from the origin.
A = sympy.Matrix([[2, -1, sympy.Rational(1, 3)], [1, 1, -2], [sympy.Rational(1, 2), 0, 1]])
SHIFTS = {"linear": sympy.Matrix([0, 0, 0]), "linear and far": sympy.Matrix([1234, -2345, 777])}


def changed(shift):
    """The equation in (X, Y, Z), and the map from a point (x, y, z) to its (X, Y, Z), exactly."""
    new = A * sympy.Matrix([X, Y, Z]) + SHIFTS[shift]
    expression = sympy.expand(F.subs(dict(zip((x, y, z), new)), simultaneous=True))
    inverse = A.inv()
    return expression, lambda point: list(inverse * (sympy.Matrix(point) - SHIFTS[shift]))


def system_of(expression):
    return parse_system([str(expression).replace("**", "^")], ["X", "Y", "Z"])


def rounded(point, digits):
    """Each coordinate as a decimal of ``digits`` significant digits (what a user pastes)."""
    return [sympy.Float(sympy.N(c, 40), digits) for c in point]


def test_the_reference_numbers():
    # sympy: f and its gradient vanish on the circle; (3, 4, 8) is a point of X where the gradient does not vanish
    on_circle = {x: sympy.Rational(3, 5), y: sympy.Rational(4, 5), z: 0}
    assert F.subs(on_circle) == 0 and all(F.diff(v).subs(on_circle) == 0 for v in (x, y, z))
    assert sympy.solve([F.diff(v) for v in (x, y, z)] + [F], [x, y, z], dict=True) != []
    smooth = {x: 3, y: 4, z: 8}
    assert F.subs(smooth) == 0 and any(F.diff(v).subs(smooth) != 0 for v in (x, y, z))


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("shift", SHIFTS)
@pytest.mark.parametrize("where", ["3/5, 4/5", "cos 1, sin 1"])
def test_a_singular_point_rounded_to_ten_digits_is_off_not_smooth(where, shift, seed):
    expression, to_new = changed(shift)
    circle = ([sympy.Rational(3, 5), sympy.Rational(4, 5), 0] if where == "3/5, 4/5"
              else [sympy.cos(1), sympy.sin(1), 0])
    point = rounded(to_new(circle), 10)
    exact = [sympy.Rational(str(c)) for c in point]
    assert expression.subs(dict(zip((X, Y, Z), exact))) != 0  # sympy: F does not vanish at the rounded point
    given = [parse_constant(str(sympy.Rational(str(c)))) for c in point]
    system = system_of(expression)
    (verdict,) = check_points(system, [given], seed=seed).points
    # exact data has no uncertainty: not on X, however close the nearest point of X is (it rounds to the same doubles
    # far from the origin); never "smooth"
    assert verdict.verdict is Verdict.OFF and verdict.on_x_exactly is False and verdict.judged is JudgedPoint.NONE
    # with the digits' accuracy as the tolerance, the singular circle (within 1e-9 of it) is what is judged
    options = CheckOptions(point_tolerance=1e-7)
    (verdict,) = check_points(system, [given], options, seed=seed).points
    assert verdict.verdict is Verdict.SINGULAR


def near_circle(distance, shift):
    """A point of X about ``distance`` from the singular circle (r^2 - 1 = d, z the real root of z^2 (z + 1) = d^2
    near d), in the changed coordinates as doubles."""
    d = sympy.Rational(distance)
    r = sympy.sqrt(1 + d)
    height = sympy.nsolve(z ** 2 * (z + 1) - d ** 2, z, sympy.N(d, 50), prec=60)
    point = [r * sympy.Rational(3, 5), r * sympy.Rational(4, 5), height]
    _, to_new = changed(shift)
    return [float(sympy.N(c, 30)) for c in to_new(point)]


@pytest.mark.parametrize("seed", SEEDS)
def test_a_computed_point_just_off_the_circle_is_not_smooth_and_singular_within_its_stated_accuracy(seed):
    # 1e-14 from the circle, a few times what 17 printed digits claim: the digits cannot separate it from the
    # circle (before decision 0110: "smooth", with an exact smooth certificate)
    expression, _ = changed("linear")
    system = system_of(expression)
    point = near_circle("1e-14", "linear")
    (verdict,) = check_points(system, [point], seed=seed).points
    assert verdict.verdict in (Verdict.SINGULAR, Verdict.UNDECIDED)
    # a saved singular report states the accuracy its points were judged at; pasted back, the point is singular
    report = {"command": "singular", "numag_version": "0", "system": {"variables": ["X", "Y", "Z"]},
              "components": [{"at_infinity": False, "points": [[[c, 0.0] for c in point]], "point_tolerance": 1e-6}]}
    accuracies = []
    points = points_from_json(report, ["X", "Y", "Z"], accuracies)
    assert accuracies == [1e-6]
    (verdict,) = check_points(system, points, seed=seed, accuracies=accuracies).points
    assert verdict.verdict is Verdict.SINGULAR and verdict.judged is JudgedPoint.RANK_DROP
    assert any("accuracy stated" in note for note in verdict.notes)
    # a report written before reports stated it: its points are computed all the same, and `check` reads them with
    # the tolerance singular judges at (before: taken as exact 17-digit data)
    del report["components"][0]["point_tolerance"]
    accuracies = []
    points = points_from_json(report, ["X", "Y", "Z"], accuracies, unstated_tolerance=1e-6)
    assert accuracies == [1e-6]
    (verdict,) = check_points(system, points, seed=seed, accuracies=accuracies).points
    assert verdict.verdict is Verdict.SINGULAR and verdict.judged is JudgedPoint.RANK_DROP
    accuracies = []
    points_from_json(report, ["X", "Y", "Z"], accuracies)  # a reader that supplies none: the point is data
    assert accuracies == [None]


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("shift", SHIFTS)
def test_smooth_points_near_but_clearly_off_the_circle_stay_smooth(shift, seed):
    expression, to_new = changed(shift)
    system = system_of(expression)
    # rounded data 1e-3 from the circle (far beyond its digits' reach), and the exact point (3, 4, 8) of X
    exact = [parse_constant(str(c)) for c in to_new([3, 4, 8])]
    assert expression.subs(dict(zip((X, Y, Z), to_new([3, 4, 8])))) == 0  # sympy: on X exactly
    report = check_points(system, [near_circle("1e-3", shift), exact], seed=seed)
    assert [v.verdict for v in report.points] == [Verdict.SMOOTH, Verdict.SMOOTH]
    assert report.points[1].judged is JudgedPoint.GIVEN


def test_a_certificate_whose_box_misses_the_judged_point_says_so():
    # the exact smooth point (3, 4, 8) (sympy above): its certificate's box holds it; moved 1e-6 in the report, the
    # same box is no proof for the point the verdict names, and the certificate says so: it is not "certified"
    # (decision 0133)
    expression, to_new = changed("linear")
    system = system_of(expression)
    exact = [parse_constant(str(c)) for c in to_new([3, 4, 8])]
    data = to_dict(check_points(system, [exact, exact], seed=1))
    data["points"][1]["point"][0][0] += 1e-6
    first, second = (p["certificate"] for p in certify_report(data)["points"])
    assert first["status"] == "certified" and second["status"] == "undecided"
    assert first["holds_judged_point"] is True and second["holds_judged_point"] is False
