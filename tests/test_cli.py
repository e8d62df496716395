import io
import json
import os
import pathlib
import subprocess
import sys

import pytest

import numag
from numag.app.cli import EXIT_INPUT, EXIT_OK, EXIT_UNDECIDED, main

EXAMPLES = pathlib.Path(numag.__file__).parent / "examples"


def run(argv):
    out = io.StringIO()
    code = main(argv, out=out)
    return code, out.getvalue()


def test_check_example_human_output():
    code, text = run(["check", str(EXAMPLES / "parallel_linkage.toml"), "--point", "c1=1,s1=0,c2=1,s2=0",
                      "--point", "c1=3/5,s1=4/5,c2=3/5,s2=4/5", "--seed", "1"])
    assert code == EXIT_OK
    assert "verdict: SINGULAR" in text and "verdict: SMOOTH" in text
    assert "certification" in text and "engineering practice" in text


def test_check_json_output_and_points_file():
    code, text = run(["check", str(EXAMPLES / "parallel_linkage.toml"), "--points-file",
                      str(EXAMPLES / "checkpoints_linkage.json"), "--json", "--seed", "2"])
    data = json.loads(text)
    assert code == EXIT_OK and data["seed"] == 2
    assert [p["verdict"] for p in data["points"]] == ["singular", "singular", "smooth", "smooth"]


def test_undecided_exit_code(tmp_path):
    path = tmp_path / "axes.toml"
    path.write_text('variables = ["x", "y", "z"]\nequations = ["x*y", "x*z", "y*z", "x*y*z"]\n')
    code, _ = run(["check", str(path), "--point", "x=0,y=0,z=1", "--without-components"])
    assert code == EXIT_UNDECIDED


def test_check_finds_the_local_dimension_itself(tmp_path):
    # The three coordinate axes: a point of one axis is smooth, the origin where they meet is
    # singular (common practice, no source). More equations than dimensions: without the
    # components the local dimension is unknown (previous test).
    path = tmp_path / "axes.toml"
    path.write_text('variables = ["x", "y", "z"]\nequations = ["x*y", "x*z", "y*z", "x*y*z"]\n')
    code, text = run(["check", str(path), "--point", "x=0,y=0,z=1", "--point", "x=0,y=0,z=0", "--json",
                      "--seed", "4"])
    data = json.loads(text)
    assert code == EXIT_OK
    assert [p["verdict"] for p in data["points"]] == ["smooth", "singular"]
    assert [c["dimension"] for c in data["points"][0]["components"]] == [1]
    assert len(data["points"][1]["components"]) == 3


def test_decompose_command(tmp_path):
    # A plane and a line through it (the example; common practice, no source).
    path = tmp_path / "plane_line.toml"
    path.write_text('variables = ["x", "y", "z"]\nequations = ["x*z", "y*z"]\n')
    code, text = run(["decompose", str(path), "--json", "--seed", "3"])
    data = json.loads(text)
    assert code == EXIT_OK and data["seed"] == 3 and data["command"] == "decompose"
    assert [(c["dimension"], c["degree"]) for c in data["components"]] == [(2, 1), (1, 1)]
    assert data["paths"]["failed"] == 0 and data["dimensions_searched"] == [3, 2, 1, 0]
    code, text = run(["decompose", str(path), "--seed", "3"])
    assert code == EXIT_OK and "2 irreducible components" in text and "dimension 2  degree 1" in text
    code, _ = run(["decompose", str(path), "--lowest-dimension", "7"])
    assert code == EXIT_INPUT


@pytest.mark.parametrize("argv, fragment", [
    (["check", "missing.toml", "--point", "x=0"], "no such system file"),
    (["check", "{example}"], "no points to check"),
    (["check", "{example}", "--point", "c1=1"], "no value for s1, c2, s2"),
    (["check", "{example}", "--point", "c1=1,s1=0,c2=1,s2=0", "--digits", "3"], "--digits"),
    (["check", "{example}", "--point", "c1=1,s1=0,c2=1,s2=0", "--local-dimension", "9"], "local_dimension"),
    (["frobnicate"], "invalid choice"),
])
def test_bad_input_is_one_clear_line(argv, fragment, capsys):
    argv = [a.replace("{example}", str(EXAMPLES / "parallel_linkage.toml")) for a in argv]
    code, _ = run(argv)  # usage errors too: main returns the exit code
    assert code == EXIT_INPUT
    err = capsys.readouterr().err
    assert fragment in err and "Traceback" not in err
    assert err.startswith("numag: error:") and err.count("\n") == 1


def test_module_entry_point_runs():
    result = subprocess.run([sys.executable, "-m", "numag", "check", str(EXAMPLES / "parallel_linkage.toml"),
                             "--point", "c1=-1,s1=0,c2=-1,s2=0", "--json"], capture_output=True, text=True,
                            cwd=pathlib.Path(numag.__file__).parent.parent)
    assert result.returncode == 0, result.stderr
    assert json.loads(result.stdout)["points"][0]["verdict"] == "singular"


def test_solve_example_table_and_json():
    code, text = run(["solve", str(EXAMPLES / "mechanism_positions.toml"), "--seed", "3"])
    assert code == EXIT_OK
    assert "4 isolated solutions, 2 real" in text and "at infinity (homogeneous" in text
    code, text = run(["solve", str(EXAMPLES / "mechanism_positions.toml"), "--seed", "3", "--json"])
    data = json.loads(text)
    assert data["seed"] == 3 and data["command"] == "solve"
    paths = data["paths"]
    assert paths["tracked"] == 8
    assert paths["converged"] + paths["singular_endpoint"] + paths["at_infinity"] + paths["failed"] == 8
    assert all(len(s["point"]) == 3 for s in data["solutions"])
    assert all(len(s["point"]) == 4 and s["at_infinity"] for s in data["at_infinity"])


def test_solve_refuses_non_square_input(tmp_path, capsys):
    path = tmp_path / "under.toml"
    path.write_text('variables = ["x", "y"]\nequations = ["x - y"]\n')
    code, _ = run(["solve", str(path)])
    assert code == EXIT_INPUT
    assert "need" in capsys.readouterr().err


def test_singular_command_on_the_demo_linkage():
    # The parallelogram four-bar (crank 1, coupler 4, rocker 1, ground 4) is at a change point: its
    # configuration curve's two branches cross where all four pivots are collinear, crank and rocker
    # both at 0 or both at 180 degrees (common practice, no source: a Grashof change-point linkage).
    code, text = run(["singular", str(EXAMPLES / "parallel_linkage.toml"), "--seed", "1"])
    assert code == EXIT_OK
    assert "2 singular points, 2 real" in text
    assert "crank 0.0000 deg, rocker 0.0000 deg" in text and "crank 180.0000 deg, rocker 180.0000 deg" in text
    assert "licensed engineering practice" in text
    code, text = run(["singular", str(EXAMPLES / "parallel_linkage.toml"), "--seed", "1", "--json"])
    data = json.loads(text)
    assert code == EXIT_OK and data["command"] == "singular" and data["seed"] == 1
    affine = [c for c in data["components"] if not c["at_infinity"]]
    assert [(c["dimension"], c["degree"], c["kind"]) for c in affine] == [(0, 1, "singular")] * 2
    code, text = run(["singular", str(EXAMPLES / "parallel_linkage.toml"), "--seed", "1", "--json",
                      "--at-infinity"])
    data = json.loads(text)
    infinite = [c for c in data["components"] if c["at_infinity"]]
    assert code == EXIT_OK and infinite and all(c["points"][0][0] == [0.0, 0.0] for c in infinite)
    assert data["paths"]["tracked"] == data["paths"]["converged"] + data["paths"]["singular_endpoint"] + \
        data["paths"]["at_infinity"] + data["paths"]["failed"]


def test_singular_command_refuses_bad_options(tmp_path):
    path = tmp_path / "conic.toml"
    path.write_text('variables = ["x", "y"]\nequations = ["x^2 + y^2 - 1", "x - y"]\n')
    code, _ = run(["singular", str(path), "--formulation", "gradient"])
    assert code == EXIT_INPUT
    code, _ = run(["singular", str(path), "--lowest-dimension", "9"])
    assert code == EXIT_INPUT


def test_certify_a_saved_singular_report_in_place_and_to_a_new_file(tmp_path):
    # the demo linkage's branch points are (1,0,1,0) and (-1,0,-1,0) (crank and rocker aligned; worked by hand)
    report = tmp_path / "locus.json"
    code, text = run(["singular", str(EXAMPLES / "parallel_linkage.toml"), "--json", "--seed", "3"])
    report.write_text(text)
    code, text = run(["certify", str(report), "-o", str(tmp_path / "certified.json"), "--digits", "40"])
    assert code == EXIT_OK and "2 certified (2 exact" in text and "pairwise disjoint" in text
    assert "certificate" not in report.read_text()  # -o leaves the original alone
    data = json.loads((tmp_path / "certified.json").read_text())
    points = {tuple(c["certificates"][0]["exact_coordinates"]) for c in data["components"]}
    assert points == {("1", "0", "1", "0"), ("-1", "0", "-1", "0")}
    for component in data["components"]:
        assert len(component["certificates"]) == len(component["points"])
        certificate = component["certificates"][0]
        assert certificate["status"] == "certified" and certificate["kind"] == "exact"
        assert certificate["radius"] < 1e-35 and certificate["backward_error"] < 1e-30 and certificate["digits"] == 40
    code, text = run(["certify", str(report), "--json", "--numerical-only"])
    assert code == EXIT_OK
    replaced = json.loads(report.read_text())  # replaced atomically, same content as printed
    assert replaced == json.loads(text)
    assert replaced["certification"]["certified_by_kind"] == {"numerical": 2, "exact": 0}
    assert not list(tmp_path.glob(".numag-*"))  # no temporary file left behind


def test_solve_and_check_with_certify_switch(tmp_path):
    # x^2 + y^2 = 5, x y = 2: four real solutions (+-1, +-2), (+-2, +-1) (worked by hand)
    path = tmp_path / "circle.toml"
    path.write_text('variables = ["x", "y"]\nequations = ["x^2 + y^2 - 5", "x*y - 2"]\n')
    code, text = run(["solve", str(path), "--certify", "--json", "--seed", "1", "--digits", "30"])
    data = json.loads(text)
    assert code == EXIT_OK and data["certification"]["counts"]["certified"] == 4
    assert all(s["certificate"]["real"] is True for s in data["solutions"])
    # (1, 2) is given exactly: F = 0 there and J = [[2, 4], [2, 1]] has rank 2 (det -6), decided exactly
    code, text = run(["check", str(path), "--point", "x=1,y=2", "--certify"])
    assert code == EXIT_OK and "certified (exact, exact substitution, smooth point)" in text
    assert "rank J = 2: >= 2 on the box" in text
    code, text = run(["check", str(EXAMPLES / "parallel_linkage.toml"), "--point", "c1=1,s1=0,c2=1,s2=0",
                      "--certify", "--seed", "1"])
    assert code == EXIT_OK and "certified (exact, exact substitution, singular point)" in text
    assert "rank J = 2: >= 2 on the box, <= 2 at the exact point" in text


def test_certify_refuses_what_it_cannot_read(tmp_path, capsys):
    assert run(["certify", str(tmp_path / "missing.json")])[0] == EXIT_INPUT
    assert "not found" in capsys.readouterr().err
    (tmp_path / "bad.json").write_text("{not json")
    assert run(["certify", str(tmp_path / "bad.json")])[0] == EXIT_INPUT
    assert "not valid JSON (line 1" in capsys.readouterr().err
    code, text = run(["decompose", str(EXAMPLES / "parallel_linkage.toml"), "--json", "--seed", "1"])
    (tmp_path / "parts.json").write_text(text)
    assert run(["certify", str(tmp_path / "parts.json")])[0] == EXIT_INPUT
    assert "certify needs a report" in capsys.readouterr().err
    assert run(["certify", str(tmp_path / "parts.json"), "--digits", "4"])[0] == EXIT_INPUT


def test_readme_python_block_runs():
    # the README's Python example must stay true (common practice, no source)
    readme = (pathlib.Path(numag.__file__).parent.parent / "README.md")
    if not readme.exists():
        pytest.skip("README.md is not next to the package (installed copy)")
    text = readme.read_text()
    block = text.split("## Python", 1)[1].split("```python", 1)[1].split("```", 1)[0]
    env = dict(os.environ, PYTHONPATH=str(readme.parent))
    done = subprocess.run([sys.executable, "-"], input=block, text=True, capture_output=True, cwd=readme.parent,
                          env=env, timeout=600)
    assert done.returncode == 0, done.stderr[-2000:]


def test_compare_command(tmp_path):
    # cusp y^2 = x^3: one singular point, length 2 (problem file: common practice, no source)
    pytest.importorskip("sympy")
    path = tmp_path / "cusp.toml"
    path.write_text('name = "cusp"\nvariables = ["x", "y"]\nequations = ["y^2 - x^3"]\n')
    code, text = run(["compare", str(path), "--seed", "1", "--time-limit", "60"])
    assert code == EXIT_OK and "verdict: AGREE" in text and "singular points" in text
    code, text = run(["compare", str(path), "--seed", "1", "--json"])
    data = json.loads(text)
    assert code == EXIT_OK and data["command"] == "compare" and data["verdict"] == "agree"
    assert data["reference"]["scheme_length"] == 2 and data["reference"]["exact_points"] == [["0", "0"]]
    assert run(["compare", str(path), "--time-limit", "0"])[0] == EXIT_INPUT


def test_singular_and_decompose_report_their_executor():
    code, text = run(["singular", str(EXAMPLES / "parallel_linkage.toml"), "--json", "--seed", "3", "--workers", "2"])
    data = json.loads(text)
    assert code == EXIT_OK and data["execution"]["executor"] == "process pool" and data["execution"]["workers"] == 2
    assert len(data["components"]) == 2
    code, text = run(["decompose", str(EXAMPLES / "parallel_linkage.toml"), "--json", "--seed", "1", "--workers", "1"])
    assert code == EXIT_OK and json.loads(text)["execution"]["executor"] == "in-process"
    assert run(["singular", str(EXAMPLES / "parallel_linkage.toml"), "--workers", "0"])[0] == EXIT_INPUT


def test_progress_rate_counts_only_paths_tracked_in_this_run(capsys):
    # after a resume, paths read back from the run folder are not part of the rate (common practice)
    from numag.app.progress import Reporter
    import time as _time
    progress = Reporter(quiet=False, terminal=False)
    progress.started = _time.perf_counter() - 10.0
    progress("500 of 1000 paths tracked", done=500, total=1000)  # the starting point: 500 paths read back
    progress.last = -10.0
    progress("600 of 1000 paths tracked", done=600, total=1000)
    line = capsys.readouterr().err.strip().splitlines()[-1]
    assert "600/1000 paths (60%)" in line and " 10 paths/s" in line and "about 40 s left" in line
