"""Certificates that cannot lie: the cases of issue 16 and a sample of the adversarial corpus.

The corpus and its independent checker live in ``benchmarks/bench_certify_adversarial.py`` (one place for
the logic): the truth of every instance comes from sympy's exact solver, the check runs in mpmath at twice
the certificate's digits, never in numag's arithmetic.
"""

import json
import pathlib
import sys

import mpmath
import numpy as np
import pytest

from numag.certify.certificates import certify_rank, certify_regular_zero, certify_singular_point

from numag.certify.records import CertifyOptions
from numag.app.cli import EXIT_UNDECIDED, main
from numag.system.parse import parse_system
from numag.app.report import certify_report, check_report_to_dict, solve_report_to_dict
from numag.singular.smoothness import check_points
from numag.tracking.solve import solve_system

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent.parent / "benchmarks"))
import bench_certify_adversarial as corpus  # noqa: E402

SCALED = ["1e-8*x^2 + 1e8*y^2 - 2", "x*y - 1"]


def test_badly_scaled_double_roots_certified_and_the_false_point_at_infinity_refuted():
    # 1e-8 x^2 + 1e8 y^2 = 2, x y = 1: with u = x^2, 1e-8 u^2 - 2 u + 1e8 = 0 has the double root u = 1e8,
    # so x = +-1e4, y = 1/x, each a double root; (0 : 1 : 0) is no zero of the top-degree forms
    # 1e-8 x^2 + 1e8 y^2 and x y (worked by hand; common practice, no source)
    system = parse_system(SCALED, ["x", "y"])
    at_infinity = certify_regular_zero(system, [6e-9 + 9e-9j, 1, 1e-8], at_infinity=True)
    assert at_infinity.status == "refuted"
    for x in (1e4, -1e4):
        certificate = certify_regular_zero(system, [x * (1 + 3e-10), 1 / x], CertifyOptions(digits=30))
        assert certificate.status == "certified" and certificate.deflations >= 1
        assert certificate.multiplicity == 2
        with mpmath.workdps(60):
            center = mpmath.mpf(certificate.center_text[0])
            assert abs(center - x) <= certificate.radii[0]
            assert abs(mpmath.mpf(certificate.center_text[1]) - mpmath.mpf(1) / x) <= certificate.radii[1]
        # the box is the size of each coordinate: 1e-4 gets a box 1e8 times smaller than 1e4
        assert certificate.radii[1] < 1e-6 * certificate.radii[0]


def test_solve_certify_gives_no_certificate_at_infinity_for_the_scaled_system(tmp_path):
    # the same system from the command line: whatever the tracker finds, nothing false is certified
    path = tmp_path / "scaled.toml"
    path.write_text('variables = ["x", "y"]\nequations = ["1e-8*x^2 + 1e8*y^2 - 2", "x*y - 1"]\n')
    out = _Capture()
    code = main(["solve", str(path), "--certify", "--json", "--seed", "1"], out=out)
    data = json.loads(out.text)
    for entry in data["at_infinity"]:
        assert entry["certificate"]["status"] != "certified"
    for entry in data["solutions"]:  # true solutions (x = +-1e4) may be found after scaling
        certificate = entry["certificate"]
        if certificate["status"] == "certified":
            assert abs(abs(complex(*entry["point"][0])) - 1e4) <= 1e-6 * 1e4
    assert code == EXIT_UNDECIDED or not data["at_infinity"]


class _Capture:
    def __init__(self):
        self.text = ""

    def write(self, text):
        self.text += text


def _solve_report(equations):
    system = parse_system(equations, ["x", "y"])
    from numag.tracking.solve import SolveOptions
    return solve_report_to_dict(solve_system(system, seed=1), SolveOptions())


def test_tampered_reports_are_never_certified():
    # x y = 0 and x y = 1 have no common point, finite or at infinity where x y = 0 alone remains: (0, 0)
    # is no solution and (0 : 1 : 1) makes x y = 1 (worked by hand)
    data = _solve_report(["x*y", "x*y - 1"])
    template = {"point": [[0.0, 0.0], [0.0, 0.0]], "multiplicity": 1, "winding": 1, "at_infinity": False,
                "real": True, "condition": 1.0, "isolated": True, "digits": 16, "paths": [0]}
    data["solutions"] = [template]
    data["at_infinity"] = [dict(template, point=[[0.0, 0.0], [1.0, 0.0], [1.0, 0.0]], at_infinity=True)]
    certified = certify_report(data)
    for entry in certified["solutions"] + certified["at_infinity"]:
        assert entry["certificate"]["status"] in ("refuted", "undecided") and entry["certificate"]["reason"]
    # the node (0, 0) of y^2 = x^2 (x + 1), and (5, 5) which is not on the curve, reported smooth with
    # codimension 0 (a curve has codimension 1 everywhere: worked by hand)
    node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    report = check_report_to_dict(check_points(node, [[0, 0], [3, 6]], seed=1))
    for verdict, point in zip(report["points"], ([[0.0, 0.0], [0.0, 0.0]], [[5.0, 0.0], [5.0, 0.0]])):
        verdict.update(verdict="smooth", codimension=0, point=point)
    certified = certify_report(report)
    for verdict in certified["points"]:
        certificate = verdict["certificate"]
        assert certificate["status"] == "refuted" and "codimension" in certificate["reason"]
        assert any(check["name"] == "codimension" and check["status"] == "refuted"
                   for check in certificate["claim_checks"])
    assert certified["certification"]["claims_failed"] == 2
    # the same with codimension 1: (5, 5) is off the curve (25 - 150 = -125), the node is not smooth
    for verdict in report["points"]:
        verdict["codimension"] = 1
    for verdict in certify_report(report)["points"]:
        assert verdict["certificate"]["status"] in ("refuted", "undecided")
    # the origin reported singular on x^2 + y^2 = 1e-24, which does not pass through it
    circle = parse_system(["x^2 + y^2 - 1e-24"], ["x", "y"])
    report = check_report_to_dict(check_points(circle, [[1e-12, 0]], seed=1))
    report["points"][0].update(verdict="singular", codimension=1, point=[[0.0, 0.0], [0.0, 0.0]])
    certificate = certify_report(report)["points"][0]["certificate"]
    assert certificate["status"] == "refuted"


@pytest.mark.parametrize("seed", [0, 1, 2, 3])
def test_a_node_moved_by_1e_10_is_never_certified_at_the_moved_place(seed):
    # y^2 = x^2 (x + 1) is singular only at the origin (the partials -3 x^2 - 2 x and 2 y vanish together
    # only at (0, 0) and (-2/3, 0), which is off the curve; worked by hand)
    rng = np.random.default_rng(seed)
    node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    direction = rng.standard_normal(2) + 1j * rng.standard_normal(2)
    moved = 1e-10 * direction / np.linalg.norm(direction)
    certificate = certify_singular_point(node, moved)
    if certificate.status == "certified":
        radii = np.asarray(certificate.radii)
        assert np.all(np.abs(certificate.center.real) <= radii) and np.all(np.abs(certificate.center.imag) <= radii)
        assert np.any(np.abs(moved.real - certificate.center.real) > radii)
        assert certificate.distance == pytest.approx(float(np.max(np.abs(moved))), rel=1e-6)


def test_rank_bounds_at_a_node_and_at_a_smooth_point():
    # the node of y^2 = x^2 (x + 1): J = (-3 x^2 - 2 x, 2 y) vanishes at (0, 0), rank 0 exactly; at (3, 6) on
    # the curve J = (-33, 12), rank 1 (worked by hand)
    node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    at_node = certify_rank(node, [0.0, 0.0])
    assert at_node.status == "certified" and at_node.kind == "exact"
    assert at_node.rank_lower == 0 and at_node.rank_upper == 0
    assert at_node.exact_coordinates == ["0", "0"]
    # 2e-13 from the node J = (-2e-13, -4e-13) has rank 1: the node's rank 0 is no statement about this point
    # (decision 0133), so it is not what gets certified there
    beside = certify_rank(node, [1e-13, -2e-13])
    assert not (beside.status == "certified" and beside.rank_upper == 0)
    assert beside.status != "certified" or beside.rank_lower == 1
    smooth = certify_rank(node, [3.0, 6.0])
    assert smooth.status == "certified" and smooth.rank_lower == 1 and smooth.lower_singular_value > 0
    assert smooth.radius < 1e-20


CORPUS_SAMPLE = {"badly scaled": 24, "multiple roots": 12, "at infinity": 16, "near misses": 30, "clusters": 20,
                 "wrong claims": 16}


@pytest.mark.parametrize("seed", [0, 1])
def test_corpus_sample_has_no_false_certificate(seed):
    # every certificate checked independently (sympy's exact truth, mpmath at twice the digits): none false
    options = CertifyOptions(digits=30)
    issued = 0
    for family, count in CORPUS_SAMPLE.items():
        tally = corpus.run_family(family, count, options, seed)
        issued += tally.issued
        assert tally.false == 0, tally.falsehoods
        assert tally.claim_errors == 0, tally.falsehoods
        if family in ("badly scaled", "clusters", "multiple roots"):
            assert tally.certified >= tally.issued // 2  # the corpus is not passed by saying "undecided"
    assert issued >= 100


def test_corpus_sample_changed_units():
    # the shared problems after a change of units (truth: their exact singular points, from sympy)
    options = CertifyOptions(digits=30)
    rng = np.random.default_rng(5)
    cases = corpus.changed_units(24, 2 * 30 + 40, rng, names=["node", "four_generic_lines", "cusp",
                                                               "cone_over_smooth_plane_cubic"])
    certified = 0
    for case in cases:
        certificate = corpus.certify(case, options)
        verdict, why, errors = corpus.check(case, certificate)
        assert verdict != "false", (case.label, why)
        assert not errors
        certified += certificate.status == "certified"
    assert certified >= len(cases) // 2
