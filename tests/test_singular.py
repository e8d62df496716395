"""The singular locus (numag.singular.locus) against independently verified answers and sympy."""

import itertools
import json
import pathlib

import numpy as np
import pytest

from numag.system.parse import parse_system
from numag.app.report import dumps, singular_from_dict, singular_to_dict
from numag.singular.locus import SingularOptions, singular_locus

from conftest import load_problems

PROBLEMS = list(load_problems().values())


def affine_points(locus):
    return [c for c in locus.components if c.dimension == 0 and c.kind == "singular" and not c.at_infinity]


@pytest.mark.parametrize("entry", PROBLEMS, ids=[p["name"] for p in PROBLEMS])
def test_every_shared_problem(entry):
    # Expected answers and their sources are in tests/data/problems.json (a copy of the shared problem
    # set; each entry names its source and how it was verified: sympy Groebner bases with exact
    # arithmetic). Counts, dimensions and degrees are compared exactly.
    system = parse_system(entry["equations"], entry["variables"], projective=entry["projective"])
    locus = singular_locus(system, seed=3)
    expected = entry["expected"]
    points = affine_points(locus)
    assert locus.paths.get("minimum_step", 0) + locus.paths.get("step_limit", 0) == 0
    if "singular_points" in expected:
        assert len(points) == expected["singular_points"]
        assert not [c for c in locus.components if c.dimension > 0 and not c.at_infinity]
    if "real_singular_points" in expected:
        assert sum(bool(c.real[0]) for c in points) == expected["real_singular_points"]
    if "components" in expected:
        found = sorted((c.dimension, c.degree) for c in locus.components if not c.at_infinity)
        assert found == sorted((c["dim"], c["degree"]) for c in expected["components"])
        assert all(c.kind == "singular" for c in locus.components)
    if "variety" in expected:
        assert [(c.dimension, c.degree) for c in locus.variety.components] == [
            (expected["variety"]["dim"], expected["variety"]["degree"])]
    if "at_infinity_w0" in expected:  # projective: the points with w = 0 (w is the last variable)
        at_w0 = [c for c in points if abs(c.points[0][-1]) <= 1e-8]
        assert len(at_w0) == expected["at_infinity_w0"]
        assert len(points) - len(at_w0) == expected["affine_chart_w1"]


def test_double_line_is_non_reduced_not_singular():
    # f = x^2 in C^2: the line x = 0 with multiplicity 2 (common practice, no source).
    locus = singular_locus(parse_system(["x^2"], ["x", "y"]), seed=1)
    assert [(c.dimension, c.degree, c.kind) for c in locus.components] == [(1, 1, "non-reduced")]


def test_whitney_umbrella_is_singular_along_one_line():
    # x^2 = y^2 z: singular exactly along the z-axis (common practice, no source; also the shared file).
    locus = singular_locus(parse_system(["x^2 - y^2*z"], ["x", "y", "z"]), seed=2)
    (line,) = [c for c in locus.components if not c.at_infinity]
    assert (line.dimension, line.degree, line.kind) == (1, 1, "singular")
    assert np.allclose(line.points[:, :2], 0, atol=1e-8)


def test_union_of_two_generic_quadrics_is_singular_along_a_quartic_curve():
    # Two quadric surfaces meet in a curve of degree 2 * 2 = 4 (Bezout's theorem); their union is
    # singular exactly there.
    rng = np.random.default_rng(7)
    names = ["x", "y", "z"]

    def quadric():
        monomials = [f"{a}*{b}" for a, b in itertools.combinations_with_replacement(names, 2)] + names + ["1"]
        return " + ".join(f"({int(rng.integers(1, 6)) * int(rng.choice([-1, 1]))})*{m}" for m in monomials)

    locus = singular_locus(parse_system([f"({quadric()})*({quadric()})"], names), seed=4)
    curves = [c for c in locus.components if not c.at_infinity]
    assert [(c.dimension, c.degree, c.kind) for c in curves] == [(1, 4, "singular")]


def test_formulations_agree_on_the_cone_over_the_twisted_cubic():
    # The affine cone over the twisted cubic is singular only at its vertex (shared problem file).
    entry = next(p for p in PROBLEMS if p["name"] == "affine_cone_over_twisted_cubic")
    system = parse_system(entry["equations"], entry["variables"])
    for formulation in ("minors", "null vector"):
        locus = singular_locus(system, SingularOptions(formulation=formulation), seed=5)
        points = affine_points(locus)
        assert len(points) == 1 and np.allclose(points[0].points[0], 0, atol=1e-8), formulation


def test_report_round_trip():
    system = parse_system(["x*z", "y*z"], ["x", "y", "z"])
    options = SingularOptions()
    locus = singular_locus(system, options, seed=6)
    data = singular_to_dict(locus, options)
    again, again_options = singular_from_dict(json.loads(dumps(data)))
    assert singular_to_dict(again, again_options) == data
    # the plane z = 0 and the line x = y = 0 meet at the origin: singular there
    assert [c.dimension for c in again.components] == [0]


# --- small random nodal curves against sympy --------------------------------------------------------

sympy = pytest.importorskip("sympy")


def standard_monomial_count(equations, names):
    """Number of standard monomials of the grevlex Groebner basis (the length of the zero-dimensional
    scheme): for curves whose singular points are all nodes, the number of singular points."""
    symbols = sympy.symbols(names)
    polys = [sympy.sympify(e.replace("^", "**"), locals=dict(zip(names, symbols))) for e in equations]
    basis = sympy.groebner(polys, *symbols, order="grevlex")
    lead = [sympy.Poly(g, *symbols).monoms(order="grevlex")[0] for g in basis.exprs]
    bound = max(max(m) for m in lead) + 1
    return sum(1 for e in itertools.product(range(bound), repeat=len(symbols))
               if not any(all(a >= b for a, b in zip(e, m)) for m in lead))


@pytest.mark.parametrize("case", range(3))
def test_random_nodal_curves_agree_with_sympy(case):
    # Reference library: sympy's Groebner basis of (f, f_x, f_y). Products of random curves meet
    # transversally in nodes (Tjurina number 1 each), so the scheme length is the number of nodes.
    rng = np.random.default_rng(50 + case)

    def curve(degree):
        terms = [f"({int(rng.integers(-6, 7)) or 1})*x^{i}*y^{j}" for i in range(degree + 1)
                 for j in range(degree + 1 - i)]
        return " + ".join(terms)

    factors = [curve(1), curve(2)] if case == 0 else [curve(2), curve(2)] if case == 1 else [curve(1), curve(1),
                                                                                             curve(2)]
    f = "*".join(f"({g})" for g in factors)
    expression = sympy.sympify(f.replace("^", "**"))
    expected = standard_monomial_count([f, str(sympy.diff(expression, "x")), str(sympy.diff(expression, "y"))],
                                       ["x", "y"])
    locus = singular_locus(parse_system([f], ["x", "y"]), seed=case)
    assert len(affine_points(locus)) == expected


@pytest.mark.parametrize("seed", [1, 5, 7, 11])
def test_null_vector_form_finds_the_branch_points_of_the_demo_linkage(seed):
    # The parallelogram four-bar at its change point crosses branches where crank and rocker are both
    # at 0 or both at 180 degrees (common practice, no source). J's sine columns vanish there: the
    # null-vector rows must mix the columns, or a whole lambda plane over those points spoils the sweep.
    # Seeds 5, 7 and 11 once lost the point (1, 0, 1, 0): its endgame estimate had a scaled residual of
    # 1.1e-13, Gauss-Newton stalled at 1.2e-13 (a singular point) and the check refused it as off X.
    from numag.system.files import load_system
    system = load_system(pathlib.Path(__file__).parent.parent / "numag" / "examples" / "parallel_linkage.toml")
    locus = singular_locus(system, SingularOptions(formulation="null vector"), seed=seed)
    points = sorted(np.round(c.points[0].real, 8).tolist() for c in affine_points(locus))
    assert points == [[-1.0, 0.0, -1.0, 0.0], [1.0, 0.0, 1.0, 0.0]]
    assert sum(locus.paths.get(label, 0) for label in ("minimum_step", "step_limit", "non_finite",
                                                       "endgame_unsettled")) == 0


def test_failed_paths_of_a_projective_gradient_system_reach_the_report(monkeypatch):
    # The projective gradient route solves with `solve`, whose counts hold failures in a nested block:
    # they must reach the report's paths (and so its warnings and exit code 3). A failure is injected
    # into a real solve of the Cayley-like cubic's gradient (common practice: the counts must add up).
    import importlib
    locus_module = importlib.import_module("numag.singular.locus")
    real_solve = locus_module.solve_system

    class Failing:
        def __init__(self, result):
            self._result = result

        def __getattr__(self, name):
            return getattr(self._result, name)

        def path_counts(self):
            counts = dict(self._result.path_counts())
            reasons = dict(counts.get("failed_by_reason", {}))
            reasons["endgame_unsettled"] = reasons.get("endgame_unsettled", 0) + 2
            counts["failed_by_reason"], counts["failed"] = reasons, counts.get("failed", 0) + 2
            return counts

    monkeypatch.setattr(locus_module, "solve_system", lambda *a, **k: Failing(real_solve(*a, **k)))
    system = parse_system(["x*y*z + y*z*w + z*w*x + w*x*y"], ["x", "y", "z", "w"], projective=True)
    report = singular_to_dict(singular_locus(system, seed=1), SingularOptions())
    assert report["paths"]["failed_by_reason"]["endgame_unsettled"] >= 2
    from numag.app.report import completeness_warnings
    assert any("failed" in w for w in completeness_warnings(report))


def _chebyshev_nodal_surface(degree):
    """T_d(x) + T_d(x + y) + T_d(x + y + z) + 1: in these coordinates d/dz is a product of d - 1 planes and
    two partials meet in d - 1 copies of one plane curve through common points at infinity."""
    def chebyshev(u):  # T_0 = 1, T_1 = u, T_(k+1) = 2 u T_k - T_(k-1) (common practice)
        previous, current = "1", u
        for _ in range(degree - 1):
            previous, current = current, f"(2*{u}*({current}) - ({previous}))"
        return current

    return parse_system([f"{chebyshev('x')} + {chebyshev('(x + y)')} + {chebyshev('(x + y + z)')} + 1"],
                        ["x", "y", "z"])


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_nodal_surface_whose_partials_factor_in_its_coordinates(seed):
    # T_5(u) + T_5(v) + T_5(w) + 1 with u = x, v = x + y, w = x + y + z: the gradient in (u, v, w) vanishes where
    # each coordinate is one of the 4 simple critical points cos(k pi / 5) of T_5 (values (-1)^k); the sum is -1
    # for one value +1 and two values -1: 3 * 2 * 2^2 = 24 nodes, all real (Chebyshev construction of nodal
    # surfaces after S. V. Chmutov 1992, "Examples of projective surfaces with many singularities", J.
    # Algebraic Geom. 1, from memory; the count worked out by hand). The candidate system's partials are taken
    # along random directions (decision 0119): no path may fail, every node found.
    locus = singular_locus(_chebyshev_nodal_surface(5), seed=seed)
    points = affine_points(locus)
    assert len(points) == 24 and all(bool(c.real[0]) for c in points)
    assert not [c for c in locus.components if c.dimension > 0]
    assert sum(locus.paths.get(label, 0) for label in ("minimum_step", "step_limit", "failed")) == 0


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_singular_set_of_dimension_two_reaches_infinity_without_a_search_there(seed):
    # (x^2 + y^2 + z^2) w = 0 in C^4 (worked out by hand; common practice, no source): singular where its two
    # components meet, the surface w = 0 = x^2 + y^2 + z^2 (dimension 2, degree 2), and along the vertex line
    # x = y = z = 0 of the cone (dimension 1, degree 1). The closure of the surface meets the hyperplane at
    # infinity in a conic, where the closure is singular: said so in a note, and no point at infinity is listed
    # (decision 0119).
    system = parse_system(["(x^2 + y^2 + z^2)*w"], ["x", "y", "z", "w"])
    locus = singular_locus(system, seed=seed)
    found = sorted((c.dimension, c.degree, str(c.kind)) for c in locus.components)
    assert found == [(1, 1, "singular"), (2, 2, "singular")]
    assert any("positive-dimensional set inside the hyperplane at infinity" in note and "in dimension 1" in note
               for note in locus.notes)
