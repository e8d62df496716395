"""Near-singular points: smooth for the coefficients as written, singular within their precision (decision 0062).

A singular curve moved by a linear change with floating-point numbers and printed at full double precision
is, for the decimals exactly as written, a smooth curve: rounding removed its singular point. The run must
say so (near-singular, exit 3), while exact input keeps its exact verdict and a truly smooth curve written
with the same precision gets no such report.
"""

import json

import numpy as np
import pytest
import sympy

from numag.app.cli import EXIT_OK, EXIT_UNDECIDED, main
from numag.app.report import singular_from_dict
from numag.singular.kinds import CoefficientPrecision, PieceKind
from numag.singular.nearness import backward_error, coefficient_precision, input_tolerance
from numag.system.parse import parse_system

SEEDS = (1, 2, 3)


def moved_text(equation, seed):
    """f(A (x - p), ...) expanded with doubles, each coefficient printed as Python prints a double (up to 17
    significant digits: the shortest text that reads back to the same double). Returns (text, p)."""
    x, y = sympy.symbols("x y")
    rng = np.random.default_rng(500 + seed)
    rotation, _ = np.linalg.qr(rng.standard_normal((2, 2)))
    matrix = rotation @ np.diag(2.0 ** rng.uniform(-1, 1, 2))
    point = rng.standard_normal(2)
    u = matrix[0, 0] * (x - point[0]) + matrix[0, 1] * (y - point[1])
    v = matrix[1, 0] * (x - point[0]) + matrix[1, 1] * (y - point[1])
    f = sympy.Poly(sympy.sympify(equation, locals={"x": x, "y": y}).subs({x: u, y: v}, simultaneous=True), x, y)
    terms = [f"({float(c)!r})*x^{i}*y^{j}" for (i, j), c in f.terms() if float(c) != 0.0]
    return " + ".join(terms), point


def run_cli(tmp_path, capsys, command, equation, *extra):
    path = tmp_path / "system.toml"
    path.write_text(f'variables = ["x", "y"]\nequations = [{json.dumps(equation)}]\n')
    code = main([command, str(path), "--json", *extra])
    return code, json.loads(capsys.readouterr().out)


def exact_singular_points(text):
    """sympy's Groebner basis of (f, f_x, f_y) with the coefficients as exact rationals (the decimals as written)."""
    x, y = sympy.symbols("x y")
    f = sympy.sympify(text.replace("^", "**"), rational=True)
    return sympy.groebner([f, f.diff(x), f.diff(y)], x, y, order="grevlex").exprs


@pytest.mark.parametrize("seed", SEEDS)
def test_moved_cusp_is_reported_near_singular(tmp_path, capsys, seed):
    # The cusp y^2 = x^3 is singular at the origin (common practice, no source); after the double-precision
    # change of coordinates the decimals as written define a smooth curve: sympy's Groebner basis of
    # (f, f_x, f_y) over the rationals is [1] (sympy as the exact reference).
    text, cusp = moved_text("y**2 - x**3", seed)
    assert exact_singular_points(text) == [1]
    code, report = run_cli(tmp_path, capsys, "singular", text, "--seed", str(seed))
    assert code == EXIT_UNDECIDED
    assert [c for c in report["components"] if not c["at_infinity"]] == []
    (near,) = report["near_singular"]
    assert near["kind"] == PieceKind.NEAR_SINGULAR and near["precision"] == CoefficientPrecision.DOUBLE
    assert near["backward_error"] <= near["tolerance"]
    point = np.array([complex(*c) for c in near["point"]])
    # the rounding moves the cusp by about the square root of the unit roundoff at most (a double zero)
    assert np.linalg.norm(point - cusp) <= 1e-5 * (1 + np.linalg.norm(cusp))
    assert any("near-singular" in w for w in report["warnings"])
    locus, _ = singular_from_dict(report)  # a saved report keeps them
    assert [p.backward_error for p in locus.near_singular] == [near["backward_error"]]


@pytest.mark.parametrize("seed", SEEDS)
def test_exact_cusp_stays_singular(tmp_path, capsys, seed):
    # y^2 = x^3 with integer coefficients: exact, singular at the origin only (common practice, no source)
    code, report = run_cli(tmp_path, capsys, "singular", "y^2 - x^3", "--seed", str(seed))
    assert code == EXIT_OK
    points = [c for c in report["components"] if not c["at_infinity"]]
    assert [(c["kind"], c["dimension"]) for c in points] == [("singular", 0)]
    assert np.allclose([complex(*c) for c in points[0]["points"][0]], [0, 0], atol=1e-8)
    assert report["near_singular"] == []


#: Smooth curves (common practice, no source): a circle, an ellipse, the graph of a cubic. The moved circle keeps
#: a candidate that cannot be settled on X (a rounding-sized x*y coefficient; a separate warning and exit 3,
#: not about near-singular points), so its exit code is not asserted here.
SMOOTH_CURVES = [("x**2 + y**2 - 1", None), ("x**2 + 2*y**2 - 1", EXIT_OK), ("y - x**3 + x - 1", EXIT_OK)]


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("equation, exit_code", SMOOTH_CURVES, ids=["circle", "ellipse", "cubic graph"])
def test_moved_smooth_curve_has_no_near_singular_point(tmp_path, capsys, seed, equation, exit_code):
    # smooth also after a change of coordinates written in doubles: sympy's Groebner basis of (f, f_x, f_y)
    # is [1], and nothing may be reported near-singular
    text, _ = moved_text(equation, seed)
    assert exact_singular_points(text) == [1]
    assert coefficient_precision(parse_system([text], ["x", "y"])) is CoefficientPrecision.DOUBLE
    code, report = run_cli(tmp_path, capsys, "singular", text, "--seed", str(seed))
    assert report["near_singular"] == [] and not any("near-singular" in w for w in report["warnings"])
    assert [c for c in report["components"] if not c["at_infinity"]] == []
    if exit_code is not None:
        assert code == exit_code


@pytest.mark.parametrize("seed", SEEDS)
def test_check_at_the_moved_cusp_adds_the_backward_error(tmp_path, capsys, seed):
    text, cusp = moved_text("y**2 - x**3", seed)
    code, report = run_cli(tmp_path, capsys, "singular", text, "--seed", str(seed))
    point = [complex(*c) for c in report["near_singular"][0]["point"]]
    assignment = ",".join(f"{name}={value.real!r}" for name, value in zip("xy", point))
    code, report = run_cli(tmp_path, capsys, "check", text, "--point", assignment, "--seed", str(seed))
    (verdict,) = report["points"]
    if verdict["verdict"] == "smooth":  # smooth as written (the exact verdict): near-singular, exit 3
        assert verdict["near_singular"] and verdict["backward_error"] <= verdict["backward_tolerance"]
        assert code == EXIT_UNDECIDED
        assert any("singular after a relative change" in w for w in report["warnings"])  # exit 3 says why
    else:  # a singular verdict would be one for a point within the point tolerance: never silently smooth
        assert verdict["verdict"] in ("singular", "undecided")


def test_check_on_exact_input_has_no_backward_error(tmp_path, capsys):
    # the cusp as written in integers: the origin is singular, (1, 1) smooth (common practice, no source)
    code, report = run_cli(tmp_path, capsys, "check", "y^2 - x^3", "--point", "x=1,y=1", "--seed", "1")
    assert code == EXIT_OK
    (verdict,) = report["points"]
    assert verdict["verdict"] == "smooth" and verdict["backward_error"] is None and not verdict["near_singular"]


def test_coefficient_precision_rule():
    # decision 0062: integers, rationals and decimals of fewer than 15 significant digits are exact
    exact = ["3*x^2 - 2/7*y", "0.125*x^2 + 123456.78901234*y - 1", "12345678901234567890*x - y"]
    double = ["0.1000000000000000055511151231257827*x - y", "1.2345678901234567e-5*x^2 + y - 1",
              "3*x + 2.000000000000001*y"]
    for text in exact:
        assert coefficient_precision(parse_system([text], ["x", "y"])) is CoefficientPrecision.EXACT, text
        assert input_tolerance(parse_system([text], ["x", "y"])) is None
    for text in double:
        assert coefficient_precision(parse_system([text], ["x", "y"])) is CoefficientPrecision.DOUBLE, text


def test_backward_error_by_hand():
    # Worked by hand (common practice, no source: a minimum-norm solution of linear conditions). In units of the
    # terms at rho = (1, 1) (S = 3 for x^2 + y^2 - 1), changes e_1, e_x, e_xx of the monomials 1, x, x^2 (the others
    # are not needed) must keep F(1, 0) = 0, e_1 + e_x + e_xx = 0, and cancel the gradient (2, 0), 3 (e_x + 2 e_xx)
    # = -2; the minimum-norm solution is (1/3, 0, -1/3): backward error 1/3.
    circle = parse_system(["x^2 + y^2 - 1"], ["x", "y"])
    assert backward_error(circle, [1, 0], 1) == pytest.approx(1 / 3, rel=1e-12)
    # x^2 - y^2 + 1/1000 at the origin: the gradient vanishes there; only F(0) = 1/1000 must go, by the constant
    # alone (the other monomials vanish there), in units of S = 2.001
    node = parse_system(["x^2 - y^2 + 1/1000"], ["x", "y"])
    assert backward_error(node, [0, 0], 1) == pytest.approx(0.001 / 2.001, rel=1e-12)
    # y^2 - x^3 at its cusp: already singular, backward error 0
    assert backward_error(parse_system(["y^2 - x^3"], ["x", "y"]), [0, 0], 1) == 0.0


def test_backward_errors_option_is_checked():
    from numag.errors import InputError
    from numag.singular.smoothness import CheckOptions
    with pytest.raises(InputError, match="backward_errors"):
        CheckOptions(backward_errors="yes")


def test_exact_input_far_from_the_origin_stays_exact_after_expansion():
    # (x - 1234.5)^4 expands to exact decimals of 17 and more digits (1234.5^4 = 2322432610.0625 ... ): the
    # numbers as written are short, so the input is exact (decision 0062 reads printed doubles by the digits
    # the user wrote; common practice, no source). A long literal is still read as a printed double.
    from numag.singular.nearness import coefficient_precision
    from numag.system.parse import parse_system
    far = parse_system(["(x - 1234.5)^4*(2/5) + (y + 2345.25)^3 - 1"], ["x", "y"])
    assert far.literal_digits == 6
    assert coefficient_precision(far).value == "exact"
    printed = parse_system(["x^2 + 0.30000000000000004*y - 1"], ["x", "y"])
    assert coefficient_precision(printed).value == "double precision"
