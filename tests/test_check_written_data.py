"""Decision 0132: a point's coordinates are exact or rounded data by what was written, not by their value, and
rounded data finer than double is judged at its own radius.

Every verdict is checked against sympy: F and the rank of J evaluated exactly at the exact point (or at the exact
decimal given), and distances to the node worked out by hand from the parametrisation.
"""

from fractions import Fraction
import io

import pytest
import sympy

from numag.app.cli import EXIT_OK, main
from numag.singular.kinds import JudgedPoint, Verdict
from numag.singular.nearness import point_precision
from numag.singular.smoothness import check_points
from numag.system.parse import parse_constant, parse_system

SEEDS = [1, 2, 3]
X, Y = sympy.symbols("x y")
#: the nodal cubic y^2 = x^2 (x + 1), parametrised by x = t^2 - 1, y = t x (common practice, no source)
NODE = Y ** 2 - X ** 2 * (X + 1)
#: the same node moved to (1, 1)
NODE_11 = (Y - 1) ** 2 - (X - 1) ** 2 * X


def _text(expression):
    return str(expression).replace("**", "^")


def _exact_facts(expression, point):
    """F at the exact point and the rank of J there, by sympy (the exact reference)."""
    at = dict(zip((X, Y), point))
    value = sympy.expand(expression.subs(at))
    gradient = sympy.Matrix([[expression.diff(v).subs(at) for v in (X, Y)]])
    return value, gradient.rank()


def _check(expression, point, seed, names=("x", "y")):
    system = parse_system([_text(expression)], list(names))
    return check_points(system, [point], seed=seed).points[0]


def _node_point(t):
    """The point of the node at parameter t, exactly (sympy Rational)."""
    x = t * t - 1
    return x, t * x


@pytest.mark.parametrize("seed", SEEDS)
def test_exact_rationals_with_long_expansions_are_exact_data(seed):
    """Finding 1: t = 1 + 1e-20 on the node, written as integers and rationals (21 and 41 digits)."""
    t = 1 + sympy.Rational(1, 10 ** 20)
    point = _node_point(t)
    value, rank = _exact_facts(NODE, point)
    assert value == 0 and rank == 1  # sympy: on X, J of full rank: smooth
    texts = [f"{sympy.fraction(c)[0]}/10^{sympy.log(sympy.fraction(c)[1], 10)}" for c in point]
    verdict = _check(NODE, [parse_constant(c) for c in texts], seed)
    assert verdict.verdict is Verdict.SMOOTH and verdict.judged is JudgedPoint.GIVEN and verdict.on_x_exactly


@pytest.mark.parametrize("seed", SEEDS)
def test_fractions_in_the_api_stay_exact(seed):
    """Finding 7: Fractions are exact (no float conversion), and text is read as the command line reads it."""
    t = 1 + Fraction(1, 10 ** 20)
    x = t * t - 1
    value, rank = _exact_facts(NODE, (sympy.Rational(x.numerator, x.denominator),
                                      sympy.Rational((t * x).numerator, (t * x).denominator)))
    assert value == 0 and rank == 1
    for point in ([x, t * x], [str(x), str(t * x)]):
        verdict = _check(NODE, point, seed)
        assert verdict.verdict is Verdict.SMOOTH and verdict.judged is JudgedPoint.GIVEN and verdict.on_x_exactly
        assert verdict.data_radius == 0


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("factor", [1, 1000, Fraction(1, 1000)])
def test_units_and_a_linear_change_keep_the_exact_verdict(seed, factor):
    """Finding 1 in units x1000 and x1e-3 (x = X / factor), and after x = u + 2 v, y = u - v."""
    t = 1 + sympy.Rational(1, 10 ** 20)
    x, y = _node_point(t)
    f = sympy.Rational(factor.numerator, factor.denominator) if isinstance(factor, Fraction) else factor
    scaled = sympy.expand(NODE.subs({X: X / f, Y: Y / f}) * f ** 3)
    assert _exact_facts(scaled, (x * f, y * f)) == (0, 1)
    verdict = _check(scaled, [str(x * f), str(y * f)], seed)
    assert verdict.verdict is Verdict.SMOOTH and verdict.judged is JudgedPoint.GIVEN
    if factor == 1:
        u, v = (x + 2 * y) / 3, (x - y) / 3  # x = u + 2 v, y = u - v
        changed = sympy.expand(NODE.subs({X: X + 2 * Y, Y: X - Y}, simultaneous=True))
        assert _exact_facts(changed, (u, v)) == (0, 1)
        verdict = _check(changed, [str(u), str(v)], seed)
        assert verdict.verdict is Verdict.SMOOTH and verdict.judged is JudgedPoint.GIVEN


@pytest.mark.parametrize("seed", SEEDS)
def test_square_root_expressions_are_exact(seed):
    """Finding 1b: the node moved to (sqrt 2, sqrt 3), a point of it 2e-20 away written with square roots."""
    s2, s3 = sympy.sqrt(2), sympy.sqrt(3)
    curve = (Y - s3) ** 2 - (X - s2) ** 2 * (X - s2 + 1)
    d = sympy.Rational(2, 10 ** 20) + sympy.Rational(1, 10 ** 40)
    point = (s2 + d, s3 + (1 + sympy.Rational(1, 10 ** 20)) * d)
    assert _exact_facts(curve, point) == (0, 1)
    system = parse_system(["(y-sqrt(3))^2 - (x-sqrt(2))^2*(x-sqrt(2)+1)"], ["x", "y"])
    texts = ["sqrt(2)+2/10^20+1/10^40", "sqrt(3)+(1+1/10^20)*(2/10^20+1/10^40)"]
    verdict = check_points(system, [texts], seed=seed).points[0]
    assert verdict.verdict is Verdict.SMOOTH and verdict.judged is JudgedPoint.GIVEN and verdict.on_x_exactly


@pytest.mark.parametrize("seed", SEEDS)
def test_long_decimals_finer_than_double_judged_at_their_radius(seed):
    """Findings 1b and 13: decimals of 30 to 50 digits near the node at (1, 1), 2e-14 and 2e-16 from it."""
    cases = [("1.0000000000000200000000000001", "1.000000000000020000000000000300000000000001"),
             ("1.000000000000000200000000000000010", "1.00000000000000020000000000000003000000000000000001")]
    for texts in cases:
        point = [sympy.Rational(c) for c in texts]
        value, _ = _exact_facts(NODE_11, point)
        radius = max(sympy.Rational(1, 2) * sympy.Rational(10) ** -len(c.split(".")[1]) for c in texts)
        # the node (1, 1) is farther than 1e10 radii: no singular point within the data's reach
        assert sympy.sqrt((point[0] - 1) ** 2 + (point[1] - 1) ** 2) > 10 ** 10 * radius
        verdict = _check(NODE_11, texts, seed)
        assert verdict.verdict is Verdict.SMOOTH
        if value == 0:  # sympy: the decimal is on X exactly (the 30-digit one)
            assert verdict.judged is JudgedPoint.GIVEN


@pytest.mark.parametrize("seed", SEEDS)
def test_approximations_of_a_singular_point_are_never_smooth(seed):
    """A 30-digit approximation of the node (F not zero there) is singular or undecided; the node written with
    trailing zeros (F zero exactly, J = 0) is singular."""
    s2, s3 = sympy.sqrt(2), sympy.sqrt(3)
    curve = (Y - s3) ** 2 - (X - s2) ** 2 * (X - s2 + 1)
    texts = [str(sympy.N(s2, 32)), str(sympy.N(s3, 32))]
    value, _ = _exact_facts(curve, [sympy.Rational(c) for c in texts])
    assert value != 0
    system = parse_system(["(y-sqrt(3))^2 - (x-sqrt(2))^2*(x-sqrt(2)+1)"], ["x", "y"])
    verdict = check_points(system, [texts], seed=seed).points[0]
    assert verdict.verdict in (Verdict.SINGULAR, Verdict.UNDECIDED)
    near = ["1.000000000000000000000000000001", "0.999999999999999999999999999999"]
    assert _exact_facts(NODE_11, [sympy.Rational(c) for c in near])[0] != 0
    assert _check(NODE_11, near, seed).verdict in (Verdict.SINGULAR, Verdict.UNDECIDED)
    at = ["1.00000000000000000000000000000", "1.00000000000000000000000000000"]
    assert _exact_facts(NODE_11, [sympy.Rational(c) for c in at]) == (0, 0)
    assert _check(NODE_11, at, seed).verdict is Verdict.SINGULAR


@pytest.mark.parametrize("seed", SEEDS)
def test_a_point_off_x_in_exact_arithmetic_is_off(seed):
    """Finding 2: (3/5 + 1e-20, 4/5) is off the circle (F = 1.2e-20 exactly); so is the decimal written with
    trailing zeros (known to 5e-26, the circle 1e-20 away), with its distance shown."""
    circle = X ** 2 + Y ** 2 - 1
    assert _exact_facts(circle, (sympy.Rational(3, 5) + sympy.Rational(1, 10 ** 20), sympy.Rational(4, 5)))[0] != 0
    assert _check(circle, ["3/5+1/10^20", "4/5"], seed).verdict is Verdict.OFF
    verdict = _check(circle, [parse_constant("0.6000000000000000000100000"), "0.8"], seed)
    assert verdict.verdict is Verdict.OFF
    assert verdict.data_radius == pytest.approx(5e-26)  # half a unit of the 25th decimal (hand computation)
    assert verdict.distance == pytest.approx(6e-21, rel=1e-3)  # 1e-20 * 3/5 along the normal (hand computation)


@pytest.mark.parametrize("seed", SEEDS)
def test_short_decimals_and_rationals_keep_their_verdicts(seed):
    """Short data are unchanged: the node itself singular, (3/5, 4/5) and (0.6, 0.8) smooth on the circle, a
    short rational off X off (sympy decides each)."""
    circle = X ** 2 + Y ** 2 - 1
    assert _check(NODE, ["0", "0"], seed).verdict is Verdict.SINGULAR
    for point in (["3/5", "4/5"], ["0.6", "0.8"], [Fraction(3, 5), Fraction(4, 5)], [0.6, 0.8]):
        assert _exact_facts(circle, (sympy.Rational(3, 5), sympy.Rational(4, 5))) == (0, 1)
        verdict = _check(circle, point, seed)
        assert verdict.verdict is Verdict.SMOOTH and verdict.judged is JudgedPoint.GIVEN
    assert _check(circle, ["3/5", "81/100"], seed).verdict is Verdict.OFF


def test_what_the_digits_say():
    """The radius of a written decimal is half a unit of its last written digit (hand computation)."""
    _, radii = point_precision([parse_constant(t) for t in
                                ("0.6000000000000000000100000", "0.12345678901234567*1000", "3/5+1/10^20",
                                 "0.60000000000001")])
    assert radii[0] == pytest.approx(5e-26) and radii[1] == pytest.approx(5e-15)
    assert radii[2] == 0 and radii[3] == 0  # exact: an expression of integers, a 14-digit decimal


@pytest.mark.parametrize("seed", SEEDS)
def test_certify_does_not_certify_a_false_verdict(tmp_path, capsys, seed):
    """Finding 1 through the command line with --certify: the verdict is smooth (sympy), never a certified
    singular point."""
    import json
    path = tmp_path / "node.toml"
    path.write_text(f'variables = ["x", "y"]\nequations = ["{_text(NODE)}"]\n')
    x, y = _node_point(1 + sympy.Rational(1, 10 ** 20))
    code = main(["check", str(path), "--json", "--without-components", "--certify", "--seed", str(seed),
                 "--point", f"x={x},y={y}"])
    (point,) = json.loads(capsys.readouterr().out)["points"]
    assert point["verdict"] == "smooth" and code == EXIT_OK
    assert point["certificate"]["claim"] != "singular point"


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("factor", [1, sympy.Rational(1, 1000)])
def test_a_rank_drop_within_the_point_tolerance_is_sought(seed, factor):
    """Finding 9: with --point-tolerance 1e-2 the node (0, 0) is within the tolerance of both (1e-3, 0) and
    (1e-3, 1e-3) (1e-3 and 1.4e-3 from it, by hand): both singular, about the node; in units x1e-3 too (the
    tolerance is relative to sqrt(1 + |p|^2), so units x1000 put the node beyond it: not a case of this)."""
    from numag.singular.smoothness import CheckOptions
    scaled = sympy.expand(NODE.subs({X: X / factor, Y: Y / factor}) * factor ** 3)
    for point in ((sympy.Rational(1, 1000), 0), (sympy.Rational(1, 1000), sympy.Rational(1, 1000))):
        assert _exact_facts(NODE, point)[0] != 0  # off X: the nearest point of X is judged
        assert sympy.sqrt(point[0] ** 2 + point[1] ** 2) < sympy.Rational(1, 100)
    system = parse_system([_text(scaled)], ["x", "y"])
    points = [[str(factor * sympy.Rational(c)) for c in p] for p in (("1/1000", "0"), ("1/1000", "1/1000"))]
    report = check_points(system, points, options=CheckOptions(point_tolerance=1e-2), seed=seed)
    for verdict in report.points:
        assert verdict.verdict is Verdict.SINGULAR and verdict.judged is JudgedPoint.RANK_DROP


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("equation, point", [
    ("(y-2000)^2 - (x-1000)^2*(x-999)", "x=1000.00000000000000010,y=2000.00000000000000010"),
    ("(y-2000000)^2 - (x-1000000)^2*(x-999000)/1000", "x=1000000.00000000000010,y=2000000.00000000000010"),  # x1000
    ("(y-2)^2 - 1000*(x-1)^2*(x-999/1000)", "x=1.00000000000000000010,y=2.00000000000000000010"),  # x1e-3
])
def test_the_note_counts_a_rank_drop_in_the_radii_the_report_states(tmp_path, seed, equation, point):
    # A node at (1000, 2000) in three units (x - 999 > 0 there: a real node, common practice, no source). Hand
    # derivation (decision 0132's rule, checked with mpmath at 40 digits): each coordinate is written with 17 (x1000:
    # 14, x1e-3: 20) decimal places, the trailing zero included, so it is known to half a unit of its last digit,
    # 5e-18 (5e-15, 5e-21); the radius of the point is sqrt(2) * 5e-18 = 7.07e-18. The node is 1e-16 (1e-13, 1e-19) away in each
    # coordinate: sqrt(2) * 1e-16, i.e. exactly 20 radii in every unit -- beyond the 10 radii of the data's reach,
    # within 100: undecided. The note must say 20 times the uncertainty the report states, not 2.
    import mpmath
    with mpmath.workdps(40):
        scale = {"x=1000.": mpmath.mpf(1), "x=100000": mpmath.mpf(1000), "x=1.000": mpmath.mpf("0.001")}
        unit = next(v for k, v in scale.items() if point.startswith(k))
        places = len(point.split(",")[0].split(".")[1])
        radius = mpmath.sqrt(2) * mpmath.mpf(10) ** -places / 2
        distance = mpmath.sqrt(2) * mpmath.mpf("1e-16") * unit
        expected = float(distance / radius)
    assert abs(expected - 20.0) < 1e-9
    path = tmp_path / "node.toml"
    path.write_text(f'variables = ["x","y"]\nequations = ["{equation}"]\n')
    out = io.StringIO()
    assert main(["check", str(path), "--point", point, "--seed", str(seed)], out=out) == 3
    text = out.getvalue()
    stated = float(text.split("allow it to be off by ")[1].split(")")[0])
    assert abs(stated - float(radius)) <= 1e-3 * float(radius)
    ratio = float(text.split("A point where the rank drops was found ")[1].split(" times")[0])
    assert abs(ratio - expected) <= 1e-2 * expected


def test_the_radius_counts_decimal_places_not_digits():
    # "1000.00000100000025": 18 significant digits, 14 decimal places, so half a unit of 1e-14 (hand count)
    _, radii = point_precision([parse_constant("1000.00000100000025")])
    assert radii[0] == pytest.approx(5e-15, rel=1e-12)
