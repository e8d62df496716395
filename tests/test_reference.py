"""The exact reference against the problem file's verified answers, and its time limit."""

from fractions import Fraction
import itertools
import time

import pytest

from numag.system.parse import parse_system
from numag.app.reference import exact_reference, system_to_plain

pytest.importorskip("sympy")


def _system(problem):
    return parse_system(problem["equations"], problem["variables"], projective=problem["projective"])


@pytest.mark.parametrize("name", ["cusp", "trifolium_triple_point", "cone_over_smooth_plane_cubic",
                                  "twisted_cubic_projective", "whitney_umbrella"])
def test_reference_counts_match_the_problem_file(problems, name):
    # expected answers and their sources are in tests/data/problems.json (each entry names its source)
    problem = problems[name]
    expected = problem["expected"]
    answer = exact_reference(_system(problem), seconds=60, seed=3)
    assert answer.status == "finished", answer.message
    assert answer.codimension == int(problem["codim"])
    if "singular_points" in expected:
        assert answer.singular_points == expected["singular_points"]
        if expected["singular_points"] == 0:
            assert answer.singular_dimension == -1
    if "real_singular_points" in expected:
        assert answer.real_singular_points == expected["real_singular_points"]
    if "jacobian_scheme_length" in expected:
        assert answer.scheme_length == expected["jacobian_scheme_length"]
    if "variety" in expected:
        assert (answer.variety_dimension, answer.variety_degree) == (expected["variety"]["dim"],
                                                                      expected["variety"]["degree"])
    if "components" in expected:
        assert answer.singular_dimension == expected["components"][0]["dim"]
        assert answer.singular_degree == expected["components"][0]["degree"]


def test_exact_coordinates_of_the_four_lines(problems):
    # the six pairwise intersections of the four lines of the problem file, by Cramer's rule
    lines = [(1, -1, 1), (2, 1, -3), (1, 3, 2), (3, -2, -7)]  # a x + b y + c = 0, the file's factors
    expected = set()
    for (a1, b1, c1), (a2, b2, c2) in itertools.combinations(lines, 2):
        det = a1 * b2 - a2 * b1
        x, y = Fraction(b1 * c2 - b2 * c1, det), Fraction(c1 * a2 - c2 * a1, det)
        expected.add((str(x), str(y)))
    answer = exact_reference(_system(problems["four_generic_lines"]), seconds=60, seed=1)
    assert {tuple(p) for p in answer.exact_points} == expected
    assert len(answer.points) == 6


def test_time_limit_is_honoured(problems):
    # Barth's sextic: sympy's Groebner basis does not finish in minutes (problem file: OK_PEER_TIMEOUT)
    started = time.perf_counter()
    answer = exact_reference(_system(problems["barth_sextic_exact"]), seconds=3)
    assert answer.status == "timed out"
    assert time.perf_counter() - started < 3 + 5
    assert "3 s" in answer.message


def test_the_child_gets_plain_data_not_text_to_parse():
    plain = system_to_plain(parse_system(["(1 + sqrt(5))/2*x^2 - I*y"], ["x", "y"]))
    assert plain["variables"] == ["x", "y"]
    terms = {tuple(e): parts for e, parts in plain["equations"][0]}
    assert terms[(2, 0)] == {"1": ["1/2", "0"], "5": ["1/2", "0"]}
    assert terms[(0, 1)] == {"1": ["0", "-1"]}


def test_the_child_does_not_import_a_package_planted_in_the_working_directory(tmp_path, monkeypatch):
    # A folder holding a planted `numag/` package: an ordinary `python -c "import numag"` started there
    # runs it (the negative control, so that this test can fail); the exact reference's child must not.
    marker = tmp_path / "planted-code-ran"
    planted = tmp_path / "numag"
    planted.mkdir()
    payload = f"open({str(marker)!r}, 'w').write('ran')\n"
    (planted / "__init__.py").write_text(payload)
    (planted / "reference.py").write_text(payload)
    import subprocess
    import sys
    subprocess.run([sys.executable, "-c", "import numag"], cwd=tmp_path, check=True)
    assert marker.exists()
    marker.unlink()
    monkeypatch.chdir(tmp_path)
    monkeypatch.setenv("PYTHONPATH", str(tmp_path))  # isolated mode ignores it too
    answer = exact_reference(parse_system(["y^2 - x^3"], ["x", "y"]), seconds=60, seed=1)
    assert answer.status == "finished", answer.message
    assert answer.singular_points == 1  # the cusp's one singular point: common practice, no source
    assert not marker.exists()
