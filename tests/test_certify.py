"""Certificates checked against published counts, exact coordinates from sympy, and the alpha theory."""

import math

import mpmath
import numpy as np
import pytest

from numag.certify.certificates import (certify_regular_zero, certify_singular_point, certify_smooth_point,
                                        overlapping_pairs)

from numag.certify.equations import singularity_equations

from numag.certify.records import Certificate, CertifyOptions, _parse_center, alpha_zero, working_digits

from numag.certify.square import alpha_test
from numag.errors import InputError
from numag.system.parse import parse_system
from numag.singular.locus import singular_locus
from numag.tracking.solve import solve_system


def _system(problem):
    return parse_system(problem["equations"], problem["variables"], projective=problem["projective"])


def _certify_locus(system, options, seed=1):
    locus = singular_locus(system, seed=seed)
    return locus, [certify_singular_point(system, c.points[0], c.codimension, options) for c in locus.components]


def test_kummer_nodes_certified_exactly_and_disjoint(problems):
    # 16 nodes: Kummer's quartic, count as published (source named in the problem file)
    problem = problems["kummer_quartic_mu2_eq_2"]
    locus, certificates = _certify_locus(_system(problem), CertifyOptions(digits=30))
    assert len(certificates) == problem["expected"]["singular_points"]
    assert all(c.status == "certified" and c.kind == "exact" for c in certificates)
    assert overlapping_pairs(certificates) == []
    assert all(c.distinct for c in certificates)
    assert sum(bool(c.real) for c in certificates) == problem["expected"]["real_singular_points"]
    for c in certificates:
        assert c.exact_coordinates is not None and c.exact_coordinates[c.chart] == "1"


def test_barth_sextic_nodes_numerical_certificates(problems):
    # 65 nodes: W. Barth, J. Algebraic Geom. 1996 (named in the problem file)
    problem = problems["barth_sextic_exact"]
    locus, certificates = _certify_locus(_system(problem), CertifyOptions(digits=30, exact=False))
    assert len(certificates) == problem["expected"]["singular_points"]
    assert all(c.status == "certified" for c in certificates)
    assert overlapping_pairs(certificates) == []
    for c in certificates:
        if c.kind == "numerical":
            assert c.backward_error is not None and 0 <= c.backward_error < c.threshold <= 1e-20
        else:  # nodes at coordinate points: every equation vanishes identically where the other coordinates do
            assert c.exact_method == "identically zero" and len(c.zero_coordinates) == 3
        assert c.radius < 1e-20


def test_cusp_certified_through_deflation_and_smooth_point_never_certified_singular(problems):
    # y^2 = x^3: A2 cusp at the origin only (problem file: common practice, no source)
    system = _system(problems["cusp"])
    certificate = certify_singular_point(system, [2e-9, -1e-9], options=CertifyOptions(digits=30))
    assert certificate.status == "certified" and certificate.deflations >= 1
    assert np.all(np.abs(certificate.center.real) <= certificate.radius)
    assert np.all(np.abs(certificate.center.imag) <= certificate.radius)
    assert certificate.exact_coordinates == ["0", "0"] and certificate.kind == "exact"
    smooth = certify_singular_point(system, [1.0, 1.0], options=CertifyOptions(digits=30))
    assert smooth.status in ("refuted", "undecided")


def test_cone_smooth_point_and_vertex(problems):
    # affine cone over a smooth plane cubic: singular only at the vertex (problem file)
    system = _system(problems["cone_over_smooth_plane_cubic"])
    smooth = certify_smooth_point(system, [0.0, 1.0, 1.0], codimension=1)  # 1*1 - 0 - 0 - 1 = 0
    assert smooth.status == "certified" and smooth.kind == "exact"
    assert smooth.lower_singular_value > 0
    vertex = certify_singular_point(system, [1e-10, -2e-10, 1e-10])
    assert vertex.status == "certified" and vertex.kind == "exact"
    assert vertex.exact_coordinates == ["0", "0", "0"]
    # the smoothness certificate is never granted at the vertex
    assert certify_smooth_point(system, [0.0, 0.0, 0.0], codimension=1).status != "certified"


def test_cone_over_twisted_cubic_vertex_and_smooth_point(problems):
    # affine cone over the twisted cubic: a surface in C^4 singular only at 0 (problem file)
    system = _system(problems["affine_cone_over_twisted_cubic"])
    vertex = certify_singular_point(system, [1e-9, 0, 0, -1e-9], codimension=2)
    assert vertex.status == "certified" and vertex.kind == "exact"
    smooth = certify_smooth_point(system, [1.0, 2.0, 4.0, 8.0], codimension=2)
    assert smooth.status == "certified" and smooth.kind == "numerical"  # 3 equations, codimension 2
    assert any("local dimension" in note for note in smooth.notes)
    assert certify_singular_point(system, [1.0, 2.0, 4.0, 8.0], codimension=2).status == "refuted"


def _to_sympy(polynomial, symbols):
    """Our exact polynomial as a sympy expression (built term by term, no parsing)."""
    sympy = pytest.importorskip("sympy")
    total = 0
    for row, c in zip(polynomial.exponents, polynomial.coefficients):
        value = sum((sympy.Rational(re.numerator, re.denominator) + sympy.I * sympy.Rational(im.numerator, im.denominator))
                    * sympy.sqrt(r) for r, (re, im) in c.parts.items())
        total += value * sympy.Mul(*[s ** int(e) for s, e in zip(symbols, row)])
    return total


@pytest.mark.parametrize("name", ["four_generic_lines", "kummer_affine_chart", "node"])
def test_fifty_digit_coordinates_agree_with_sympy(problems, name):
    # exact algebraic coordinates of the singular points from sympy (reference library)
    sympy = pytest.importorskip("sympy")
    if name == "kummer_affine_chart":
        equations = ["(x^2 + y^2 + z^2 - 2)^2 - 5*((1 - z)^2 - 2*x^2)*((1 + z)^2 - 2*y^2)"]
        names = ["x", "y", "z"]
    else:
        equations, names = problems[name]["equations"], problems[name]["variables"]
    system = parse_system(equations, names)
    symbols = sympy.symbols(names)
    f = _to_sympy(system.polynomials[0], symbols)
    solutions = sympy.solve([f] + [f.diff(s) for s in symbols], symbols, dict=True)
    assert solutions
    options = CertifyOptions(digits=50)
    for solution in solutions:
        with working_digits(70):
            exact = [mpmath.mpc(mpmath.mpf(str(sympy.re(solution[s]).evalf(70))),
                                mpmath.mpf(str(sympy.im(solution[s]).evalf(70)))) for s in symbols]
        start = np.array([complex(v) for v in exact]) + 1e-10
        certificate = certify_singular_point(system, start, options=options)
        assert certificate.status == "certified"
        assert certificate.radius < 1e-45
        with working_digits(70):
            for text, value in zip(certificate.center_text, exact):
                center = _parse_center(text)
                assert abs(center.real - value.real) <= certificate.radius
                assert abs(center.imag - value.imag) <= certificate.radius


def test_alpha_constant_and_alpha_against_krawczyk():
    # alpha_0 = (13 - 3 sqrt 17)/4: Blum, Cucker, Shub, Smale, "Complexity and Real Computation", 1998
    with working_digits(30):
        enclosure = alpha_zero(mpmath.iv)
        assert enclosure.a <= (13 - 3 * math.sqrt(17)) / 4 + 1e-15
        assert float(enclosure.b) == pytest.approx(0.15767078078675, abs=1e-12)
    # x^2 + y^2 = 5, x y = 2 has the four real solutions (+-1, +-2), (+-2, +-1) (worked by hand)
    system = parse_system(["x^2 + y^2 - 5", "x*y - 2"], ["x", "y"])
    for root in ([1, 2], [2, 1], [-1, -2], [-2, -1]):
        nearby = np.array(root, dtype=complex) + np.array([3e-4, -2e-4])
        alpha, beta, ok = alpha_test(system.polynomials, nearby)
        assert ok and alpha < 0.1577
        certificate = certify_regular_zero(system, nearby, CertifyOptions(digits=30, match_radius=1e-2))
        assert certificate.status == "certified" and certificate.method == "Krawczyk" and certificate.real
        # the alpha theory's zero lies within 2 beta of the start: it is the Krawczyk box's unique zero
        assert np.max(np.abs(certificate.center - nearby)) <= 2 * beta + certificate.radius
        assert certificate.alpha_certified and certificate.alpha_radius <= certificate.radius
    far = np.array([1.5, 1.5], dtype=complex)  # between two solutions: alpha must not certify
    assert not alpha_test(system.polynomials, far)[2]


def test_gamma_bound_exceeds_second_derivative_term():
    # gamma >= |J^-1 D^2 f(x)(v, v)|/2 for unit v (definition of gamma; Shub & Smale 1993): the bound
    # used in the alpha test must dominate this lower estimate (common practice, no source)
    system = parse_system(["x^3 - 2*x*y + 1", "y^2 - x + 3*y"], ["x", "y"])
    rng = np.random.default_rng(4)
    x = np.array([0.3 + 0.2j, -0.7 + 0.1j])
    alpha, beta, _ = alpha_test(system.polynomials, x)
    gamma_bound = alpha / beta
    jac = np.array([[3 * x[0] ** 2 - 2 * x[1], -2 * x[0]], [-1, 2 * x[1] + 3]])
    for _ in range(20):
        v = rng.standard_normal(2) + 1j * rng.standard_normal(2)
        v /= np.linalg.norm(v)
        second = np.array([6 * x[0] * v[0] ** 2 - 4 * v[0] * v[1], 2 * v[1] ** 2])
        assert np.linalg.norm(np.linalg.solve(jac, second)) / 2 <= gamma_bound


def test_regular_solutions_certified_real_and_distinct():
    # x^2 + 1 = 0, y^2 - 2 = 0: four solutions (+-i, +-sqrt 2), none real (worked by hand)
    system = parse_system(["x^2 + 1", "y^2 - 2"], ["x", "y"])
    result = solve_system(system, seed=2)
    certificates = [certify_regular_zero(system, s.point, CertifyOptions(digits=25)) for s in result.solutions]
    assert len(certificates) == 4 and all(c.status == "certified" for c in certificates)
    assert overlapping_pairs(certificates) == []
    assert all(c.real is False for c in certificates)
    assert all(c.kind == "exact" for c in certificates)
    assert {tuple(c.exact_coordinates) for c in certificates} == {
        ("I", "sqrt(2)"), ("-I", "sqrt(2)"), ("I", "-sqrt(2)"), ("-I", "-sqrt(2)")}


def test_non_isolated_zero_is_undecided_and_far_point_refuted():
    # x(x - y) = x(x + y) = 0 is the line x = 0 with an embedded point: not an isolated zero
    system = parse_system(["x*(x - y)", "x*(x + y)"], ["x", "y"])
    near = certify_regular_zero(system, [1e-12, 0.5])
    # not certified as a regular zero; a refutation speaks of a box too small to reach the line (each
    # coordinate's own size); or the exact zero (0, 1/2) 1e-12 away, x snapped to 0 (decision 0098)
    assert (near.status == "undecided" or (near.status == "refuted" and near.radii[0] < 1e-12)
            or (near.status == "certified" and near.exact_coordinates == ["0", "1/2"]
                and near.method == "exact substitution" and near.multiplicity is None))
    # the point (0, 1/2) itself is an exact zero (not an isolated one: no multiplicity)
    given = certify_regular_zero(system, [0.0, 0.5])
    assert given.status == "certified" and given.claim == "zero" and given.method == "exact substitution"
    assert given.exact_coordinates == ["0", "1/2"] and given.multiplicity is None
    assert certify_regular_zero(system, [3.0, 0.5]).status == "refuted"


def test_overlap_detected_across_charts():
    # one projective point written in two charts must count as one box (common practice, no source)
    system = parse_system(["x^2 - y*z", "y - 2*z"], ["x", "y", "z"], projective=True)
    point = np.array([math.sqrt(2), 2.0, 1.0])
    a = certify_regular_zero(system, point)
    assert a.status == "certified" and a.chart == 1
    b = Certificate(**{**a.__dict__})
    b.chart, b.center = 2, a.center / a.center[2]
    assert overlapping_pairs([a, b]) == [(0, 1)]
    assert a.distinct is False


def test_options_and_input_are_checked():
    system = parse_system(["x^2 - y"], ["x", "y"])
    with pytest.raises(InputError, match="digits"):
        certify_regular_zero(system, [1, 1], CertifyOptions(digits=5))
    with pytest.raises(InputError, match="coordinates"):
        certify_singular_point(system, [1, 1, 1])
    with pytest.raises(InputError, match="codimension"):
        singularity_equations(system, 3)
    with pytest.raises(InputError, match="codimension is needed"):
        certify_singular_point(parse_system(["x", "y"], ["x", "y"]), [0, 0])


def test_root_separation_proves_an_exact_zero_when_recognition_is_not_tried():
    # x^2 = 2, y = x, x y = 2: the common zeros are (+-sqrt 2, +-sqrt 2) (worked by hand). With recognition
    # limited to rational points, exactness comes from root separation (Canny's gap theorem, J. Canny,
    # "Generalized characteristic polynomials", 1990 -- from memory): the bound for x y - 2 at a zero of the
    # first two is 10^-30.1, reached by raising the precision
    system = parse_system(["x^2 - 2", "y - x", "x*y - 2"], ["x", "y"])
    options = CertifyOptions(digits=30, max_digits=80, exact_max_degree=1)
    certificate = certify_regular_zero(system, [1.41421356, 1.41421356], options)
    assert certificate.status == "certified" and certificate.kind == "exact"
    assert certificate.exact_method == "root separation" and certificate.exact_coordinates is None
    assert certificate.digits_tried[0] == 30 and certificate.digits > 30
    with working_digits(certificate.digits * 2):
        for text, radius in zip(certificate.center_text, certificate.radii):
            assert abs(_parse_center(text) - mpmath.sqrt(2)) <= radius


def test_a_nearby_system_is_never_proved_exact():
    # x y = 2 + 10^-40 has no common zero with x^2 = 2, y = x (2 != 2 + 10^-40; worked by hand): numerically
    # the point is within the backward error at 30 digits, never exact; at 60 digits the box excludes it
    system = parse_system(["x^2 - 2", "y - x", "x*y - 2 - 1/10^40"], ["x", "y"])
    low = certify_regular_zero(system, [1.41421356, 1.41421356],
                               CertifyOptions(digits=30, max_digits=120, exact_max_degree=1))
    assert low.kind != "exact"
    assert low.status != "certified" or low.backward_error <= low.threshold
    high = certify_regular_zero(system, [1.41421356, 1.41421356], CertifyOptions(digits=60))
    assert high.status == "refuted"


def test_exact_refutation_where_intervals_cannot_decide():
    # y^2 - x^2 - x^3 + 10^-90: its partials vanish only at (0, 0) and (-2/3, 0), where the polynomial is
    # 10^-90 and 4/27 + 10^-90, so it has no singular point (worked by hand); at 30 digits the box around
    # the origin is too wide for intervals, the exact value at the recognised point is not
    system = parse_system(["y^2 - x^2 - x^3 + 1/10^90"], ["x", "y"])
    certificate = certify_singular_point(system, [1e-12, 0.0])
    assert certificate.status == "refuted" and certificate.kind == "exact"
    numerical = certify_singular_point(system, [1e-12, 0.0], options=CertifyOptions(exact=False))
    assert numerical.status != "certified"


def test_point_at_infinity_certified_with_its_chart_and_w_exactly_zero():
    # x^2 - y^2 = 1, x - y = 1: the top-degree forms x^2 - y^2 and x - y meet only at (x : y) = (1 : 1), so
    # (w : x : y) = (0 : 1 : 1) is the one point at infinity (worked by hand)
    system = parse_system(["x^2 - y^2 - 1", "x - y - 1"], ["x", "y"])
    certificate = certify_regular_zero(system, [1e-9, 1.0, 1.0 + 1e-9], at_infinity=True)
    assert certificate.status == "certified" and certificate.at_infinity
    assert 0 in certificate.zero_coordinates and certificate.radii[0] == 0.0
    assert certificate.chart in (1, 2) and certificate.center_text[certificate.chart] == "1"
    assert any(check.name == "at infinity" and check.status == "proved" for check in certificate.claim_checks)
    fake = certify_regular_zero(system, [0.0, 1.0, 2.0], at_infinity=True)
    assert fake.status == "refuted"


def test_reported_multiplicity_is_checked():
    # x^2 + y^2 = 5, x y = 2 has four simple solutions (worked by hand): a reported multiplicity 2 is refuted
    system = parse_system(["x^2 + y^2 - 5", "x*y - 2"], ["x", "y"])
    certificate = certify_regular_zero(system, [1.0, 2.0], multiplicity=2)
    assert certificate.status == "certified" and certificate.multiplicity == 1
    check = certificate.claim_checks[0]
    assert check.name == "multiplicity" and check.status == "refuted" and check.fails
    # y = x^2, y = 2 x - 1 are tangent at (1, 1): a double root (worked by hand)
    tangent = parse_system(["y - x^2", "y - 2*x + 1"], ["x", "y"])
    double = certify_regular_zero(tangent, [1 + 1e-9, 1.0], multiplicity=2)
    assert double.status == "certified" and double.multiplicity == 2 and double.claim == "zero"
    assert double.claim_checks[0].status == "numerical"


@pytest.mark.parametrize("units", [(-6, 6), (6, -6), (3, -4)])
def test_certificates_do_not_depend_on_units(units):
    # x^2 + y^2 = 5, x y = 2 at (1, 2) with x in units of 10^a and y of 10^b (exact rescaling): the same point,
    # certified with a box of each coordinate's own size (common practice, no source)
    a, b = units
    system = parse_system([f"(1e{a}*x)^2 + (1e{b}*y)^2 - 5", f"(1e{a}*x)*(1e{b}*y) - 2"], ["x", "y"])
    point = np.array([1.0 / 10.0 ** a, 2.0 / 10.0 ** b])
    certificate = certify_regular_zero(system, point * (1 + 1e-12))
    assert certificate.status == "certified" and certificate.kind == "exact"
    relative = np.asarray(certificate.radii) / np.abs(point)
    assert np.all(relative < 1e-20)


def test_no_refutation_from_a_deflated_subsystem():
    # x^2 = 10^-90, y = 0 has the two zeros (+-10^-45, 0) (worked by hand); around the origin, between them,
    # the deflated square subsystem (2 x, y) has its zero at the origin where x^2 - 10^-90 is not 0, yet the
    # box there holds both zeros of the claim: the answer must not be "refuted"
    system = parse_system(["x^2 - 1/10^90", "y"], ["x", "y"])
    between = certify_regular_zero(system, [0.0, 0.0])
    assert between.status == "undecided"
    near = certify_regular_zero(system, [3e-45, 0.0])
    assert near.status == "certified" and near.kind == "exact"
    with working_digits(100):
        assert abs(_parse_center(near.center_text[0]) - mpmath.mpf(10) ** -45) <= near.radii[0]


_SLIDER_UNITS = {
    # lengths in mm (native), in m, in micrometres, and mm with the frame's origin moved (translation)
    "mm": (["x1^2 + y1^2 - 900", "(s - x1)^2 + (20 - y1)^2 - 2500"], (0, -30, 0)),
    "m": (["x1^2 + y1^2 - 9/10000", "(s - x1)^2 + (1/50 - y1)^2 - 1/400"], (0, -3 / 100, 0)),
    "um": (["x1^2 + y1^2 - 900000000", "(s - x1)^2 + (20000 - y1)^2 - 2500000000"], (0, -30000, 0)),
    "moved": (["(x1 - 1234)^2 + (y1 + 2345)^2 - 900", "((s - 3456) - (x1 - 1234))^2 + (20 - (y1 + 2345))^2 - 2500"],
              (1234, -2375, 3456)),
}


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("units", sorted(_SLIDER_UNITS))
def test_offset_slider_codimension_claim_holds_in_every_unit(units, seed):
    # Offset slider-crank (crank 30, coupler 50, offset 20): X is a curve in C^3, codimension 2. By hand, the
    # crank pointing straight down (x1 = s = 0, y1 = -30 in mm) puts the coupler along the slider's normal:
    # J = [[0, -60, 0], [0, -100, 0]] has rank 1 there, a singular point; at points of X nearby J has rank 2
    # (sympy's rank of J at an exact point of X beside it). Common practice, no source: the answer must not
    # depend on the units of the lengths nor on where the frame's origin is.
    sympy = pytest.importorskip("sympy")
    equations, singular = _SLIDER_UNITS[units]
    system = parse_system(equations, ["x1", "y1", "s"])
    x1, y1, s = sympy.symbols("x1 y1 s")
    exact = [sympy.sympify(e.replace("^", "**")) for e in equations]  # the test's own equations, not user input
    jacobian = sympy.Matrix(exact).jacobian([x1, y1, s])
    at_singular = dict(zip((x1, y1, s), (sympy.nsimplify(v) for v in singular)))
    assert jacobian.subs(at_singular).rank() == 1
    crank = sympy.sqrt(sympy.nsimplify(equations[0].split(" - ")[-1]))  # 30 in the system's units
    centre_x, centre_y = at_singular[x1], at_singular[y1] + crank  # the crank's pivot
    beside = {x1: centre_x + crank * sympy.Rational(3, 5), y1: centre_y - crank * sympy.Rational(4, 5)}
    coupler_end = sympy.solve(exact[1].subs(beside), s)  # a point of X with the crank turned a little
    assert all(e.subs({**beside, s: coupler_end[0]}).equals(0) for e in exact)
    assert jacobian.subs({**beside, s: coupler_end[0]}).rank() == 2

    locus = singular_locus(system, seed=seed)
    found = [c for c in locus.components
             if np.allclose(np.asarray(c.points[0], dtype=complex), singular, rtol=1e-8, atol=1e-8 * float(crank))]
    assert len(found) == 1 and found[0].codimension == 2
    certificate = certify_singular_point(system, found[0].points[0], 2, CertifyOptions(digits=30, seed=seed))
    codimension_checks = [c for c in certificate.claim_checks if c.name == "codimension"]
    assert certificate.status == "certified", certificate.reason
    assert [(c.found, str(c.status)) for c in codimension_checks] in ([(2, "numerical")], [(2, "proved")])
