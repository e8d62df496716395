"""Certificates state the claim they prove about the point the claim names (decision 0133).

A box that proves something about a nearby point is no certificate for the given one, and an exactly
given point is decided in exact arithmetic (F at it, the rank of J there). The exact answers below are
sympy's, computed in the tests themselves.
"""

from fractions import Fraction

import pytest
import sympy

from numag.app.report import certify_report, check_report_to_dict
from numag.certify.certificates import certify_rank, certify_singular_point, certify_smooth_point
from numag.certify.records import CertifyOptions
from numag.singular.smoothness import CheckOptions, check_points
from numag.system.parse import parse_system

UMBRELLA = "(x+y/2-3)^2 - (y-2*z+1/5)^2*(x-y+z-7/3)"


def _sympy_rank(equation, variables, point):
    """F at the point and the rank of J there, exactly (sympy)."""
    symbols = sympy.symbols(variables)
    f = sympy.Matrix([sympy.sympify(equation.replace("^", "**"))])
    at = dict(zip(symbols, [sympy.Rational(str(c)) for c in point]))
    return sympy.simplify(f.subs(at)[0]), f.jacobian(symbols).subs(at).rank()


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("unit", [Fraction(1), Fraction(1000), Fraction(1, 1000)])
def test_rank_at_an_exact_point_of_a_singular_line_is_exact(seed, unit):
    # a Whitney-umbrella-like surface, singular along u = v = 0 (u = x + y/2 - 3, v = y - 2z + 1/5); the point
    # (37/60, 143/30, 149/60) lies on that line; sympy: F = 0 and rank J = 0 there. In other units the
    # equation is written in x/unit etc. and the point scaled by unit.
    variables = ["x", "y", "z"]
    equation = UMBRELLA.replace("x", f"(x/({unit}))").replace("y", f"(y/({unit}))").replace("z", f"(z/({unit}))")
    point = [Fraction(37, 60) * unit, Fraction(143, 30) * unit, Fraction(149, 60) * unit]
    value, rank = _sympy_rank(equation, variables, point)
    assert value == 0 and rank == 0  # the exact reference (sympy)
    system = parse_system([equation], variables)
    options = CertifyOptions(digits=30, seed=seed)
    certificate = certify_rank(system, point, options)
    assert certificate.status == "certified" and certificate.kind == "exact"
    assert certificate.rank_lower == certificate.rank_upper == rank
    singular = certify_singular_point(system, [str(c) for c in point], 1, options)
    assert singular.status == "certified" and singular.rank_upper == 0
    assert certify_smooth_point(system, point, 1, options).status == "refuted"


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_rank_at_doubles_beside_a_singular_line_is_not_certified_as_full(seed):
    # the doubles nearest (37/60, 143/30, 149/60) are within 1e-16 of the line of rank 0 (sympy above): a box
    # of rank 1 centred at a smooth point 2e-16 away says nothing about them
    system = parse_system([UMBRELLA], ["x", "y", "z"])
    certificate = certify_rank(system, [37 / 60, 143 / 30, 149 / 60], CertifyOptions(digits=30, seed=seed))
    assert not (certificate.status == "certified" and certificate.rank_lower == 1)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_point_off_x_is_refuted_exactly(seed):
    # sympy: F(1, 2, 3) = 436/75 != 0 for the umbrella above
    value, _ = _sympy_rank(UMBRELLA, ["x", "y", "z"], [1, 2, 3])
    assert value != 0
    certificate = certify_rank(parse_system([UMBRELLA], ["x", "y", "z"]), ["1", "2", "3"],
                               CertifyOptions(digits=30, seed=seed))
    assert certificate.status == "refuted" and certificate.kind == "exact"


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_false_singular_verdict_beside_a_node_is_not_certified(seed):
    # y^2 = x^2 (x + 1) is parametrised by x = t^2 - 1, y = t (t^2 - 1) (hand computation); t = 1 + 4e-7 gives a
    # point 8e-7 from the node where sympy finds rank J = 1: smooth. A report edited to call it singular must not
    # come back certified (the node's certificate is about another point).
    system = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    t = Fraction(1) + Fraction(4, 10 ** 7)
    point = [t * t - 1, t * (t * t - 1)]
    _, rank = _sympy_rank("y^2 - x^2*(x + 1)", ["x", "y"], point)
    assert rank == 1
    report = check_report_to_dict(check_points(system, [[float(c) for c in point]], CheckOptions(), seed=seed))
    report["points"][0]["verdict"] = "singular"  # the edit
    certified = certify_report(report, CertifyOptions(digits=30, seed=seed))
    certificate = certified["points"][0]["certificate"]
    assert certificate["status"] != "certified"
    assert certified["certification"]["counts"]["certified"] == 0


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_check_report_of_an_exact_point_is_certified_exactly(seed):
    # (x^2 + y^2 - 1)^2 (x - 3) at (3/5, 4/5): sympy gives F = 0 and rank J = 0 (the circle is doubled); the
    # report's exact coordinates decide it without Newton
    equation = "(x^2+y^2-1)^2*(x-3)"
    value, rank = _sympy_rank(equation, ["x", "y"], [Fraction(3, 5), Fraction(4, 5)])
    assert value == 0 and rank == 0
    report = check_report_to_dict(check_points(parse_system([equation], ["x", "y"]), [[0.6, 0.8]],
                                               CheckOptions(local_dimension=1), seed=seed))
    entry = report["points"][0]
    entry["given_exact"] = ["3/5", "4/5"]
    entry["data_radius"], entry["given"], entry["point"] = 0.0, entry["point"], entry["point"]
    certificate = certify_report(report, CertifyOptions(digits=30, seed=seed))["points"][0]["certificate"]
    assert certificate["status"] != "undecided" and certificate["kind"] == "exact"
    assert certificate["exact_coordinates"] == ["3/5", "4/5"]
    assert certificate["rank_upper"] == rank


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_rank_at_an_exact_point_after_a_rational_linear_change(seed):
    # the umbrella above in coordinates x = X + Y/3, y = Y - 2Z/7, z = Z + X/5; the point of its singular line
    # mapped back exactly by sympy, which also gives F = 0 and rank J = 0 there
    X, Y, Z = sympy.symbols("X Y Z")
    change = {"x": "(X + Y/3)", "y": "(Y - 2*Z/7)", "z": "(Z + X/5)"}
    equation = "".join(change.get(ch, ch) for ch in UMBRELLA)
    solution = sympy.solve([sympy.sympify(change[v].replace("^", "**")) - value for v, value in
                            zip("xyz", [sympy.Rational(37, 60), sympy.Rational(143, 30), sympy.Rational(149, 60)])],
                           [X, Y, Z], dict=True)[0]
    point = [str(solution[s]) for s in (X, Y, Z)]
    value, rank = _sympy_rank(equation, ["X", "Y", "Z"], point)
    assert value == 0 and rank == 0
    system = parse_system([equation], ["X", "Y", "Z"])
    options = CertifyOptions(digits=30, seed=seed)
    certificate = certify_rank(system, point, options)
    assert certificate.status == "certified" and certificate.rank_upper == rank
    doubles = certify_rank(system, [float(sympy.Rational(p)) for p in point], options)
    assert not (doubles.status == "certified" and doubles.rank_lower == 1)


def test_exact_coordinates_of_another_point_are_refused():
    # a report whose exact coordinates are not those its doubles round names two points: refused, one line
    from numag.errors import InputError
    system = parse_system(["(x^2+y^2-1)^2*(x-3)"], ["x", "y"])
    report = check_report_to_dict(check_points(system, [[0.6, 0.8]], CheckOptions(local_dimension=1), seed=1))
    report["points"][0]["given_exact"] = ["5", "7"]
    report["points"][0]["data_radius"] = 0.0
    with pytest.raises(InputError, match="given_exact"):
        certify_report(report, CertifyOptions(digits=20))


E6 = "((x+2*y)/1000-1/3)^3 + ((y-3*z)/1000+5/7)^4 + ((x-z)/1000+2)^2"


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("unit", [Fraction(1), Fraction(1000), Fraction(1, 1000)])
def test_a_triple_point_given_numerically_is_certified_at_its_rational_value(seed, unit):
    # u^3 + v^4 + w^2 with u, v, w rational linear forms (an E6 point where u = v = w = 0); sympy solves the
    # linear system and finds F = 0 and rank J = 0 at the rational point. A point computed 1e-15 off it
    # (relative), as the singular locus returns it, is certified at the exact point in every unit.
    variables = ["x", "y", "z"]
    equation = "".join(f"({ch}/({unit}))" if ch in variables else ch for ch in E6)
    x, y, z = sympy.symbols(variables)
    exact = sympy.solve([(x + 2 * y) / 1000 - sympy.Rational(1, 3), (y - 3 * z) / 1000 + sympy.Rational(5, 7),
                         (x - z) / 1000 + 2], [x, y, z], dict=True)[0]
    point = [exact[s] * sympy.Rational(str(unit)) for s in (x, y, z)]
    value, rank = _sympy_rank(equation, variables, point)
    assert value == 0 and rank == 0
    given = [complex(float(c) * (1 + 2e-15), 1e-15 * abs(float(c))) for c in point]
    certificate = certify_singular_point(parse_system([equation], variables), given, 1,
                                         CertifyOptions(digits=30, max_digits=50, seed=seed))
    assert certificate.status == "certified" and certificate.kind == "exact"
    assert certificate.exact_coordinates == [str(c) for c in point] and certificate.rank_upper == rank
