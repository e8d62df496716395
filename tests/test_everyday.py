"""Everyday use: saved work reused (points and decompositions from reports), each point judged on its own."""

import io
import json

import pytest

from numag.app.cli import EXIT_INPUT, EXIT_OK, EXIT_UNDECIDED, main
from numag.errors import PointError
from numag.system.files import points_from_json

NODAL = 'name = "nodal"\nvariables = ["x", "y"]\nequations = ["y^2 - x^2*(x + 1)"]\n'
AXES = 'variables = ["x", "y", "z"]\nequations = ["x*y", "x*z", "y*z", "x*y*z"]\n'


def run(argv):
    out = io.StringIO()
    code = main(argv, out=out)
    return code, out.getvalue()


def write(tmp_path, name, text):
    path = tmp_path / name
    path.write_text(text)
    return str(path)


@pytest.mark.parametrize("seed", [1, 7, 23])
def test_one_off_point_among_good_ones_is_off_and_the_others_are_judged(tmp_path, seed):
    # The nodal cubic y^2 = x^2 (x + 1): the origin is its only singular point, (3, 6) lies on it and is
    # smooth, (1/2, 1/2) is off it (F = 1/4 - 3/8) (common practice, no source).
    system = write(tmp_path, "nodal.toml", NODAL)
    points = write(tmp_path, "points.json", json.dumps([{"x": 0, "y": 0}, {"x": 0.5, "y": 0.5}, {"x": 3, "y": 6}]))
    code, text = run(["check", system, "--points-file", points, "--json", "--seed", str(seed)])
    data = json.loads(text)
    assert code == EXIT_UNDECIDED
    assert [p["verdict"] for p in data["points"]] == ["singular", "off", "smooth"]
    off = data["points"][1]
    assert off["residual"] > 0.01 and off["distance"] > 1e-3 and off["rank"] is None
    assert data["counts"]["off"] == 1
    code, text = run(["check", system, "--points-file", points, "--seed", str(seed)])
    assert code == EXIT_UNDECIDED and "verdict: OFF" in text and "Newton moved it" in text


def test_points_of_saved_reports_and_single_objects(tmp_path):
    # The node of y^2 = x^2 (x + 1) is the origin (common practice, no source); the solutions of
    # x^2 + y^2 = 1, x = y are +-(1/sqrt 2, 1/sqrt 2) (common practice, no source).
    nodal = write(tmp_path, "nodal.toml", NODAL)
    square = write(tmp_path, "square.toml", 'variables = ["x", "y"]\nequations = ["x^2 + y^2 - 1", "x - y"]\n')
    code, singular = run(["singular", nodal, "--json", "--seed", "3"])
    assert code == EXIT_OK
    singular_path = write(tmp_path, "singular.json", singular)
    code, text = run(["check", nodal, "--points-file", singular_path, "--json", "--seed", "3"])
    data = json.loads(text)
    assert code == EXIT_OK and [p["verdict"] for p in data["points"]] == ["singular"]
    assert max(abs(v) for pair in data["points"][0]["point"] for v in pair) < 1e-8

    code, solved = run(["solve", square, "--json", "--seed", "3"])
    assert code == EXIT_OK
    solve_path = write(tmp_path, "solve.json", solved)
    code, text = run(["check", square, "--points-file", solve_path, "--json", "--seed", "3"])
    data = json.loads(text)
    assert code == EXIT_OK and [p["verdict"] for p in data["points"]] == ["smooth", "smooth"]
    assert sorted(round(p["point"][0][0] ** 2, 12) for p in data["points"]) == [0.5, 0.5]

    check_path = write(tmp_path, "check.json", text)  # a check report's points read back
    code, again = run(["check", square, "--points-file", check_path, "--json", "--seed", "3"])
    assert code == EXIT_OK and [p["verdict"] for p in json.loads(again)["points"]] == ["smooth", "smooth"]

    single = write(tmp_path, "single.json", '{"x": 0, "y": 0}')
    code, text = run(["check", nodal, "--points-file", single, "--json", "--seed", "3"])
    assert code == EXIT_OK and [p["verdict"] for p in json.loads(text)["points"]] == ["singular"]


def test_points_of_a_report_of_another_system_are_refused():
    report = {"numag_version": "0", "command": "solve", "system": {"variables": ["u", "v"]}, "solutions": []}
    with pytest.raises(PointError, match="variables"):
        points_from_json(report, ["x", "y"])
    with pytest.raises(PointError, match="holds no points"):
        points_from_json({"numag_version": "0", "command": "decompose"}, ["x", "y"])
    with pytest.raises(PointError, match="neither a point"):
        points_from_json({"x": 1, "w": 2}, ["x", "y"])


@pytest.mark.parametrize("seed", [4, 11])
def test_check_with_a_saved_decomposition_gives_the_same_verdicts(tmp_path, seed):
    # The three coordinate axes: a point of one axis is smooth, the origin where they meet is singular
    # (common practice, no source); the saved decomposition must give the same verdicts and components.
    axes = write(tmp_path, "axes.toml", AXES)
    code, parts = run(["decompose", axes, "--json", "--seed", str(seed)])
    assert code == EXIT_OK
    parts_path = write(tmp_path, "parts.json", parts)
    points = ["--point", "x=0,y=0,z=1", "--point", "x=0,y=0,z=0", "--point", "x=2,y=0,z=0", "--seed", str(seed)]
    code_fresh, fresh = run(["check", axes, "--json"] + points)
    code_saved, saved = run(["check", axes, "--json", "--decomposition", parts_path] + points)
    fresh, saved = json.loads(fresh), json.loads(saved)
    assert code_fresh == code_saved == EXIT_OK
    assert [p["verdict"] for p in saved["points"]] == [p["verdict"] for p in fresh["points"]] == \
        ["smooth", "singular", "smooth"]
    assert [len(p["components"]) for p in saved["points"]] == [len(p["components"]) for p in fresh["points"]]


def test_a_decomposition_of_another_system_or_command_is_refused(tmp_path, capsys):
    axes = write(tmp_path, "axes.toml", AXES)
    nodal = write(tmp_path, "nodal.toml", NODAL)
    code, parts = run(["decompose", nodal, "--json", "--seed", "1"])
    parts_path = write(tmp_path, "parts.json", parts)
    code, _ = run(["check", axes, "--point", "x=0,y=0,z=0", "--decomposition", parts_path])
    assert code == EXIT_INPUT and "another system" in capsys.readouterr().err
    code, _ = run(["check", nodal, "--point", "x=0,y=0", "--decomposition", parts_path, "--without-components"])
    assert code == EXIT_INPUT and "excludes" in capsys.readouterr().err
    code, _ = run(["check", nodal, "--point", "x=0,y=0", "--decomposition", nodal])
    assert code == EXIT_INPUT and capsys.readouterr().err.count("\n") == 1


@pytest.mark.parametrize("where", ["before", "after"])
def test_debug_shows_the_traceback_of_an_internal_error(tmp_path, monkeypatch, capsys, where):
    from numag.app.commands import check

    def broken(args, out):
        raise ZeroDivisionError("a bug")
    monkeypatch.setattr(check, "run", broken)
    argv = ["check", write(tmp_path, "nodal.toml", NODAL), "--point", "x=0,y=0"]
    assert run(argv)[0] == 1
    quiet = capsys.readouterr().err
    assert "internal error: ZeroDivisionError: a bug" in quiet and "Traceback" not in quiet
    assert run(["--debug"] + argv if where == "before" else argv + ["--debug"])[0] == 1
    loud = capsys.readouterr().err
    assert "Traceback (most recent call last)" in loud and "internal error: ZeroDivisionError" in loud


def test_a_point_where_f_overflows_is_off_and_the_report_stays_valid_json(tmp_path):
    # x^4 y^4 = 1 holds at (1, 1) (smooth: the gradient (4, 4) is not zero); at (1e90, 1e90) F overflows
    # double precision (common practice, no source)
    system = write(tmp_path, "quartic.toml", 'variables = ["x", "y"]\nequations = ["x^4*y^4 - 1"]\n')
    code, text = run(["check", system, "--point", "x=1,y=1", "--point", "x=1e90,y=1e90", "--without-components",
                      "--json", "--seed", "1"])
    data = json.loads(text)
    assert code == EXIT_UNDECIDED and [p["verdict"] for p in data["points"]] == ["smooth", "off"]
    assert data["points"][1]["residual"] == "infinity"


def test_check_certify_leaves_an_off_point_uncertified(tmp_path):
    # The node of y^2 = x^2 (x + 1) is certified singular exactly; (1/2, 1/2) is off the curve and gets no
    # certificate (common practice, no source)
    system = write(tmp_path, "nodal.toml", NODAL)
    code, text = run(["check", system, "--point", "x=0,y=0", "--point", "x=1/2,y=1/2", "--certify", "--json",
                      "--seed", "1"])
    data = json.loads(text)
    assert code == EXIT_UNDECIDED
    assert [p["verdict"] for p in data["points"]] == ["singular", "off"]
    assert data["points"][0]["certificate"]["status"] == "certified"
    assert data["points"][1]["certificate"]["status"] == "undecided"
    assert "not on X" in data["points"][1]["certificate"]["reason"]
