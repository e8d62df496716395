"""Simple points about 1e-6 apart are not one singular point (decision 0146).

Two circles 1e-12 from tangency meet in two simple points 3.1e-6 apart; a four-bar member 1e-12 from its branch
value is smooth. Both had been answered with a singular point, exit 0: a multiple endpoint's midpoint refined in
mpmath stalled where J has the rank of the drop (no point of X), and a member's exact coefficients were read as a
printed double. Exact input is now answered right, or undecided (exit 3), never singular with exit 0.
"""

import io
import json
from fractions import Fraction

import pytest
import sympy

from numag.app.cli import main
from numag.singular.kinds import CoefficientPrecision
from numag.singular.nearness import coefficient_precision
from numag.system.family import Family
from numag.system.parse import parse_system

SEEDS = (1, 2, 3)
x, y = sympy.symbols("x y")


def circles(frame):
    """x^2 + y^2 - 4, (x - 5)^2 + y^2 - (3 + 1/10^12)^2 in a frame: as written, units x1000, a rational change."""
    eps = sympy.Rational(1, 10 ** 12)
    f = [x ** 2 + y ** 2 - 4, (x - 5) ** 2 + y ** 2 - (3 + eps) ** 2]
    if frame == "x1000":
        f = [g.subs({x: x / 1000, y: y / 1000}, simultaneous=True) for g in f]
    elif frame == "linear":
        f = [g.subs({x: x + sympy.Rational(2, 7) * y, y: sympy.Rational(-1, 3) * x + y}, simultaneous=True) for g in f]
    return [sympy.expand(g) for g in f]


def _run(tmp_path, variables, equations, seed, extra=()):
    path = tmp_path / "system.toml"
    path.write_text(f"variables = {json.dumps(variables)}\n"
                    f"equations = {json.dumps([str(e).replace('**', '^') for e in equations])}\n"
                    + ("parameters = [\"b\"]\n" if extra else ""))
    out = io.StringIO()
    code = main(["singular", str(path), "--json", "--seed", str(seed), *extra], out=out)
    report = json.loads(out.getvalue())
    return code, [c for c in report["components"] if c["dimension"] == 0 and c["kind"] == "singular"]


@pytest.mark.parametrize("frame", ["as written", "x1000", "linear"])
@pytest.mark.parametrize("seed", SEEDS)
def test_two_close_simple_points_are_no_singular_point(tmp_path, frame, seed):
    f = circles(frame)
    # Reference: sympy, exact -- F and det J have no common zero (the two points are simple).
    # Source: common practice, no source (the Jacobian criterion in exact arithmetic).
    jac = sympy.Matrix(f).jacobian([x, y]).det()
    assert sympy.groebner(f + [jac], x, y, order="grevlex").exprs == [1]
    code, singular = _run(tmp_path, ["x", "y"], f, seed)
    assert code in (0, 3)
    assert not (code == 0 and singular)  # never a singular point with exit 0


@pytest.mark.parametrize("seed", SEEDS)
def test_four_bar_member_off_its_branch_value_is_no_singular_point(tmp_path, seed):
    x1, y1, x2, y2, b = sympy.symbols("x1 y1 x2 y2 b")
    family = [x1 ** 2 + y1 ** 2 - 4, (x2 - 4) ** 2 + y2 ** 2 - 9, (x2 - x1) ** 2 + (y2 - y1) ** 2 - b ** 2]
    member = [sympy.expand(g.subs(b, 5 + sympy.Rational(1, 10 ** 12))) for g in family]
    minors = sympy.Matrix(member).jacobian([x1, y1, x2, y2])
    conditions = member + [minors.extract([0, 1, 2], list(cols)).det()
                           for cols in ([0, 1, 2], [0, 1, 3], [0, 2, 3], [1, 2, 3])]
    # Reference: sympy, exact -- F and its 3 x 3 minors generate (1): the member is smooth.
    # Source: common practice, no source (the Jacobian criterion in exact arithmetic).
    assert sympy.groebner(conditions, x1, y1, x2, y2, order="grevlex").exprs == [1]
    code, singular = _run(tmp_path, ["x1", "y1", "x2", "y2"], [str(g) for g in family], seed,
                          extra=("--at", "b=5+1/10^12"))
    assert code in (0, 3)
    assert not (code == 0 and singular)


def test_written_values_keep_a_member_exact():
    # a member's expanded coefficient 25000000000010000000000001/10^24 is what 5 + 1/10^12 was written as, not a
    # printed double (decision 0146); a value written with 16 digits still is one (decision 0062)
    family = Family(parse_system(["x^2 + y^2 - b^2"], ["x", "y", "b"]), ("b",))
    assert coefficient_precision(family.member(family.values_from_text("b=5+1/10^12"))) is CoefficientPrecision.EXACT
    assert coefficient_precision(family.member(family.values_from_text("b=5.000000000000001"))) \
        is CoefficientPrecision.DOUBLE


def test_a_decimal_longer_than_a_double_prints_is_exact(tmp_path):
    # Reference: exact arithmetic by hand -- at (2, 0, 7, 0) the third equation is 25 - 5.000...01^2 != 0, so the
    # exact point is off X. Source: from memory (README's rule for exact data).
    b = Fraction("5.000000000000000000000000000001")
    assert (7 - 2) ** 2 - b ** 2 != 0
    system = ["x1^2 + y1^2 = 4", "(x2 - 4)^2 + y2^2 = 9",
              "(x2 - x1)^2 + (y2 - y1)^2 = 5.000000000000000000000000000001^2"]
    assert coefficient_precision(parse_system([e.replace("=", "-(") + ")" for e in system],
                                              ["x1", "y1", "x2", "y2"])) is CoefficientPrecision.EXACT
    path = tmp_path / "fb31.toml"
    path.write_text(f'variables = ["x1", "y1", "x2", "y2"]\nequations = {json.dumps(system)}\n')
    out = io.StringIO()
    main(["check", str(path), "--point", "x1=2,y1=0,x2=7,y2=0", "--json", "--seed", "1"], out=out)
    assert json.loads(out.getvalue())["points"][0]["verdict"] == "off"
