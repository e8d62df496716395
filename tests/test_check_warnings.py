"""Every exit 3 of `check` says why in its report's `warnings`, as `singular` does.

The unit circle x^2 + y^2 = 1 (common practice, no source): (3/5, 4/5) lies on it and is a smooth point (the
gradient (6/5, 8/5) is not zero); (2, 0) is at distance 1 from it, far outside any point tolerance.
"""

import io
import json

import pytest

from numag import load, save
from numag.app.cli import EXIT_OK, EXIT_UNDECIDED, main
from numag.singular.smoothness import check_points
from numag.system.parse import parse_system

CIRCLE = 'variables = ["x", "y"]\nequations = ["x^2 + y^2 - 1"]\n'


def run_check(tmp_path, *points, seed="1"):
    path = tmp_path / "circle.toml"
    path.write_text(CIRCLE)
    out = io.StringIO()
    arguments = ["check", str(path), "--json", "--seed", seed]
    for point in points:
        arguments += ["--point", point]
    code = main(arguments, out=out)
    return code, json.loads(out.getvalue())


@pytest.mark.parametrize("seed", ["1", "2", "3"])
def test_a_point_off_x_is_a_warning(tmp_path, seed):
    code, report = run_check(tmp_path, "x=3/5,y=4/5", "x=2,y=0", seed=seed)
    assert [p["verdict"] for p in report["points"]] == ["smooth", "off"]
    assert code == EXIT_UNDECIDED
    assert len(report["warnings"]) == 1 and report["warnings"][0].startswith("point 2 not on X")


def test_a_clean_check_has_no_warning(tmp_path):
    code, report = run_check(tmp_path, "x=3/5,y=4/5")
    assert code == EXIT_OK and report["warnings"] == []


def test_saved_check_has_the_same_warnings(tmp_path):
    report = check_points(parse_system(["x^2 + y^2 - 1"], ["x", "y"]), [[0.6, 0.8], [2.0, 0.0]], seed=1)
    path = tmp_path / "check.json"
    save(report, path)
    data = json.loads(path.read_text())
    assert data["warnings"] and data["warnings"][0].startswith("point 2 not on X")
    assert [p.verdict.value for p in load(path).points] == ["smooth", "off"]


def test_text_output_has_the_warning_line(tmp_path):
    path = tmp_path / "circle.toml"
    path.write_text(CIRCLE)
    out = io.StringIO()
    code = main(["check", str(path), "--point", "x=2,y=0", "--seed", "1"], out=out)
    assert code == EXIT_UNDECIDED
    assert "\nwarning: point 1 not on X" in out.getvalue()


# (p - 1)^2 = 0 and x^2 + y^2 = z^2: the cone {p = 1, x^2 + y^2 = z^2} taken twice (common practice, no source:
# the ideal's radical adds p - 1, of which only the square is given). J has rank 1 everywhere on X, below its
# codimension 2, so the Jacobian criterion cannot decide anywhere: the verdict is "non-reduced", and that is no
# decision about smoothness (the tester's case: exit 0 had been given at the cone's vertex).
DOUBLED_CONE = 'variables = ["p", "x", "y", "z"]\nequations = ["(p - 1)^2", "x^2 + y^2 - z^2"]\n'


@pytest.mark.parametrize("seed", ["1", "2", "3"])
def test_a_non_reduced_verdict_is_undecided_about_smoothness(tmp_path, seed):
    path = tmp_path / "doubled_cone.toml"
    path.write_text(DOUBLED_CONE)
    out = io.StringIO()
    code = main(["check", str(path), "--json", "--seed", seed, "--point", "p=1,x=0,y=0,z=0",
                 "--point", "p=1,x=3,y=4,z=5"], out=out)
    report = json.loads(out.getvalue())
    assert [p["verdict"] for p in report["points"]] == ["non-reduced", "non-reduced"]
    assert code == EXIT_UNDECIDED and any(w.startswith("points 1, 2 non-reduced") for w in report["warnings"])
