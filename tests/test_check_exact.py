"""The check decides membership and smoothness by what the data can say (decision 0072).

Exact data (exact coefficients, a point of rationals) is judged exactly: on X only when F vanishes there in
exact arithmetic, and the rank of J at the point itself. Rounded data (17-digit decimals, floats) is judged
within the reach of its last digit: off beyond it, undecided when a rank drop is within it. Every case is
also run in other units (lengths times 1000 and 1/1000) and after a rational linear change of coordinates.

The exact reference is sympy (Meurer et al., "SymPy: symbolic computing in Python", PeerJ Computer Science,
2017): F and its gradient evaluated at the exact points.
"""

import json
from fractions import Fraction

import pytest
import sympy

from numag.app.cli import EXIT_OK, EXIT_UNDECIDED, main
from numag.singular.kinds import JudgedPoint, Verdict
from numag.singular.smoothness import CheckOptions, check_points
from numag.system.parse import parse_constant, parse_system

SEEDS = (1, 2, 3)

X, Y, Z = sympy.symbols("x y z")
#: Two nodes 2e-3 apart at (1 +- 1e-3, 2); the point (1, 2) between them is a saddle of f with f = -1e-12
#: (common practice, no source; the numbers are checked by sympy below).
TWO_NODES = (Y - 2) ** 2 - ((X - 1) ** 2 - sympy.Rational(1, 10 ** 6)) ** 2
#: Cayley's nodal cubic surface, nodes at (1, 1, 1), (1, -1, -1), (-1, 1, -1), (-1, -1, 1), containing the
#: line (t, t, 1) through the first (from memory; checked by sympy below).
CAYLEY = X ** 2 + Y ** 2 + Z ** 2 - 2 * X * Y * Z - 1

#: The changes of coordinates x = A u: lengths in other units, and a rational linear change (invertible).
CHANGES = {
    "unit": sympy.eye(3),
    "times 1000": sympy.eye(3) / 1000,           # the user's lengths are 1000 times larger
    "times 1/1000": sympy.eye(3) * 1000,
    "linear": sympy.Matrix([[1, sympy.Rational(1, 3), 0], [sympy.Rational(2, 5), 1, 0], [0, sympy.Rational(-1, 7), 1]]),
}


def changed(expression, point, change, n):
    """The equation and the point in the coordinates u with x = A u (exact rationals)."""
    a = CHANGES[change][:n, :n]
    old, new = (X, Y, Z)[:n], sympy.symbols("u v w")[:n]
    substituted = sympy.expand(expression.subs(dict(zip(old, a * sympy.Matrix(new))), simultaneous=True))
    point = a.inv() * sympy.Matrix([sympy.Rational(p) for p in point])
    return substituted, [str(s) for s in new], list(point)


def system_of(expression, names):
    return parse_system([str(expression).replace("**", "^")], names)


def exact_text(point):
    """The point's coordinates read by numag's own parser, exactly as a user would write them."""
    return [parse_constant(str(p)) for p in point]


def test_the_reference_numbers():
    # sympy: the saddle between the nodes is off X; its nearest points on the line x = 1 are (1, 2 +- 1e-6), smooth
    assert TWO_NODES.subs({X: 1, Y: 2}) == sympy.Rational(-1, 10 ** 12)
    assert sympy.solve(TWO_NODES.subs(X, 1), Y) == [2 - sympy.Rational(1, 10 ** 6), 2 + sympy.Rational(1, 10 ** 6)]
    gradient = [TWO_NODES.diff(v) for v in (X, Y)]
    assert [g.subs({X: 1, Y: 2 + sympy.Rational(1, 10 ** 6)}) for g in gradient] == [0, sympy.Rational(2, 10 ** 6)]
    assert all(g.subs({X: 1 + sympy.Rational(s, 1000), Y: 2}) == 0 for g in gradient for s in (1, -1))
    # sympy: Cayley's cubic vanishes with its gradient at the node, and the point 1.4e-6 from it is smooth
    near = {X: 1 + sympy.Rational(1, 10 ** 6), Y: 1 + sympy.Rational(1, 10 ** 6), Z: 1}
    assert CAYLEY.subs({X: 1, Y: 1, Z: 1}) == 0 and all(CAYLEY.diff(v).subs({X: 1, Y: 1, Z: 1}) == 0 for v in (X, Y, Z))
    assert CAYLEY.subs(near) == 0 and any(CAYLEY.diff(v).subs(near) != 0 for v in (X, Y, Z))


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("change", CHANGES)
def test_exact_point_off_the_curve_is_off_with_the_distance_to_it(change, seed):
    expression, names, point = changed(TWO_NODES, [1, 2], change, 2)
    assert expression.subs(dict(zip(sympy.symbols("u v"), point))) != 0  # sympy: F(p) != 0 exactly
    system = system_of(expression, names)
    (verdict,) = check_points(system, [exact_text(point)], seed=seed).points
    assert verdict.verdict is Verdict.OFF and verdict.on_x_exactly is False and verdict.judged is JudgedPoint.NONE
    # the nearest point of X is 1e-6 away in the original units (x = 1, y = 2 +- 1e-6): what Newton finds
    # is a point of X, so no nearer than that after the change, and not far beyond it
    stretch = {"unit": 1, "times 1000": 1000, "times 1/1000": 1e-3, "linear": 1}[change]
    assert 0.3e-6 * stretch <= verdict.distance <= 1e-5 * stretch
    assert "does not vanish" in verdict.notes[0]


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("change", CHANGES)
def test_with_a_tolerance_the_nearest_point_of_the_curve_is_judged(change, seed):
    expression, names, point = changed(TWO_NODES, [1, 2], change, 2)
    system = system_of(expression, names)
    options = CheckOptions(point_tolerance=1e-5)  # the nodes, 1e-3 away, are far beyond it
    (verdict,) = check_points(system, [exact_text(point)], options, seed=seed).points
    assert verdict.verdict is Verdict.SMOOTH and verdict.judged is JudgedPoint.NEAREST_ON_X
    assert verdict.on_x_exactly is False and "not on X" in verdict.notes[0]
    # the point judged is on X (sympy's value there is rounding of the exact zero) and is not a node
    judged = dict(zip(sympy.symbols("u v"), [sympy.nsimplify(complex(c).real, rational=True) for c in verdict.point]))
    assert abs(float(expression.subs(judged))) < 1e-12 * float(max(abs(c) for c in sympy.Poly(expression).coeffs()))


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("change", CHANGES)
def test_exact_smooth_point_next_to_a_node_is_judged_where_given(change, seed):
    near = [1 + Fraction(1, 10 ** 6), 1 + Fraction(1, 10 ** 6), 1]
    expression, names, point = changed(CAYLEY, near, change, 3)
    _, _, node = changed(CAYLEY, [1, 1, 1], change, 3)
    system = system_of(expression, names)
    report = check_points(system, [exact_text(point), exact_text(node)], seed=seed)
    smooth, singular = report.points
    assert smooth.verdict is Verdict.SMOOTH and smooth.judged is JudgedPoint.GIVEN and smooth.on_x_exactly
    assert smooth.distance == 0 and smooth.rank == 1
    assert singular.verdict is Verdict.SINGULAR and singular.judged is JudgedPoint.GIVEN and singular.on_x_exactly
    # with a tolerance given (twenty times the node's distance), the node is what is judged, as before
    options = CheckOptions(point_tolerance=2e-5)
    (within,) = check_points(system, [exact_text(point)], options, seed=seed).points
    assert within.verdict is Verdict.SINGULAR and within.judged is JudgedPoint.RANK_DROP


def rounded(point, factor=1):
    return [float(Fraction(p) * factor) for p in point]


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("factor", [1, 1000, Fraction(1, 1000)])
def test_rounded_points_are_judged_to_their_last_digit(factor, seed):
    # Cayley's cubic moved so that its node (1, 1, 1) is at (1/3, 2/7, 8/9): its coordinates are rounded as doubles
    shift = [Fraction(1, 3) - 1, Fraction(2, 7) - 1, Fraction(8, 9) - 1]
    f = Fraction(factor)
    s = sympy.Rational(f.numerator, f.denominator)
    moved = sympy.expand(CAYLEY.subs({X: X / s - sympy.Rational(shift[0]), Y: Y / s - sympy.Rational(shift[1]),
                                      Z: Z / s - sympy.Rational(shift[2])}, simultaneous=True))
    system = system_of(moved, ["x", "y", "z"])
    node = [1 + shift[0], 1 + shift[1], 1 + shift[2]]
    near = [node[0] + Fraction(1, 10 ** 6), node[1] + Fraction(1, 10 ** 6), node[2]]   # on the line, 1.4e-6 away
    off = [node[0], node[1], node[2] + Fraction(1, 10 ** 9)]                          # sympy: f = 1e-18 there
    assert CAYLEY.subs({X: 1, Y: 1, Z: 1 + sympy.Rational(1, 10 ** 9)}) != 0
    points = [rounded(p, f) for p in (node, near, off)]
    at_node, smooth, not_on = check_points(system, points, seed=seed).points
    assert at_node.verdict is Verdict.SINGULAR and at_node.judged is JudgedPoint.RANK_DROP
    assert at_node.nearest_rank_drop_distance is not None and at_node.data_radius > 0
    assert "within the data's precision" in at_node.notes[0]
    assert smooth.verdict is Verdict.SMOOTH and smooth.judged is JudgedPoint.NEAREST_ON_X
    assert not_on.verdict is Verdict.OFF


def run_cli(tmp_path, capsys, expression, names, *extra):
    path = tmp_path / "system.toml"
    equation = json.dumps(str(expression).replace("**", "^"))
    path.write_text(f'variables = {json.dumps(names)}\nequations = [{equation}]\n')
    code = main(["check", str(path), "--json", "--without-components", *extra])
    return code, json.loads(capsys.readouterr().out)


def test_command_line_exact_point_off_then_judged_with_a_tolerance(tmp_path, capsys):
    code, report = run_cli(tmp_path, capsys, TWO_NODES, ["x", "y"], "--point", "x=1,y=2", "--seed", "1")
    (point,) = report["points"]
    assert code == EXIT_UNDECIDED and point["verdict"] == "off" and point["on_x_exactly"] is False
    assert point["judged"] == "none" and report["options"]["point_tolerance"] is None
    code, report = run_cli(tmp_path, capsys, TWO_NODES, ["x", "y"], "--point", "x=1,y=2", "--seed", "1",
                           "--point-tolerance", "1e-5")
    (point,) = report["points"]
    assert code == EXIT_OK and point["verdict"] == "smooth" and point["judged"] == "the nearest point of X found"


def test_command_line_decimals_of_seventeen_digits_are_rounded_data(tmp_path, capsys):
    # the node (1/3, 2/7, 8/9) of the moved Cayley cubic, written as a double prints it: singular about the rank
    # drop within the digits' reach; written exactly: singular at the given point (exit 0 both)
    moved = sympy.expand(CAYLEY.subs({X: X + sympy.Rational(2, 3), Y: Y + sympy.Rational(5, 7),
                                      Z: Z + sympy.Rational(1, 9)}, simultaneous=True))
    printed = ",".join(f"{n}={float(Fraction(v))!r}" for n, v in zip("xyz", ("1/3", "2/7", "8/9")))
    code, report = run_cli(tmp_path, capsys, moved, ["x", "y", "z"], "--point", printed, "--seed", "2")
    assert code == EXIT_OK and report["points"][0]["verdict"] == "singular"
    assert report["points"][0]["judged"] == "a point where the rank drops" and report["points"][0]["data_radius"] > 0
    code, report = run_cli(tmp_path, capsys, moved, ["x", "y", "z"], "--point", "x=1/3,y=2/7,z=8/9", "--seed", "2")
    assert code == EXIT_OK and report["points"][0]["verdict"] == "singular"
    assert report["points"][0]["judged"] == "the given point" and report["points"][0]["on_x_exactly"] is True


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_reduced_curve_far_from_the_origin_is_never_called_non_reduced(tmp_path, capsys, seed):
    # An E6 point u^3 + v^4 (v = -2/5 u + w + u^2: an analytic change; Arnold 1972, normal forms) moved to
    # (1234, -2345): f is squarefree (sympy's factorization below), so X is reduced and the point is singular
    # (J = 0 there, exactly). Decomposing X so far from the origin may be unsure; what it may have missed is
    # warned (exit 3), and it must never turn the verdict into "non-reduced".
    u, w = X - 1234, Y + 2345
    f = sympy.expand((u + w / 3) ** 3 + (-sympy.Rational(2, 5) * u + w + u ** 2) ** 4)
    assert all(multiplicity == 1 for _, multiplicity in sympy.factor_list(f)[1])
    assert all(sympy.diff(f, s).subs({X: 1234, Y: -2345}) == 0 for s in (X, Y))
    equation = "((x-1234)+1/3*(y+2345))^3+(-2/5*(x-1234)+(y+2345)+(x-1234)^2)^4"
    path = tmp_path / "system.toml"
    path.write_text(f'variables = ["x", "y"]\nequations = ["{equation}"]\n')
    code = main(["check", str(path), "--json", "--point", "x=1234,y=-2345", "--seed", str(seed)])
    report = json.loads(capsys.readouterr().out)
    assert report["points"][0]["verdict"] == "singular"
    if report.get("decomposition_warnings"):  # said, and reflected in the exit code
        assert code == EXIT_UNDECIDED


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_nodes_of_a_plane_curve_far_from_the_origin_are_singular_whatever_the_membership(tmp_path, capsys, seed):
    # Two circles of radius 5 about (1234, -2345) and (1240, -2345) cross at (1237, -2341) and (1237, -2349)
    # (3-4-5 triangles; common practice, no source). One equation: every component of X has dimension 1
    # (Krull's principal ideal theorem), so the verdict never waits for the membership test to find a component.
    f = ((X - 1234) ** 2 + (Y + 2345) ** 2 - 25) * ((X - 1240) ** 2 + (Y + 2345) ** 2 - 25)
    for node in ((1237, -2341), (1237, -2349)):
        assert all(g.subs({X: node[0], Y: node[1]}) == 0 for g in (f, sympy.diff(f, X), sympy.diff(f, Y)))
    path = tmp_path / "system.toml"
    path.write_text('variables = ["x", "y"]\nequations = ["((x-1234)^2+(y+2345)^2-25)*((x-1240)^2+(y+2345)^2-25)"]\n')
    main(["check", str(path), "--json", "--point", "x=1237,y=-2341", "--point", "x=1237,y=-2349", "--seed", str(seed)])
    report = json.loads(capsys.readouterr().out)
    assert [p["verdict"] for p in report["points"]] == ["singular", "singular"]
