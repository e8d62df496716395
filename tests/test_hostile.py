"""The standing hostile-input suite, fast sample (the full run is benchmarks/bench_hostile.py).

Every input here is something a careless or hostile user could give. The property checked is the
project's rule for bad input (common practice, no source): numag answers, or refuses with exit code 2
and one line naming the problem; it never ends in an internal error (exit 1), a traceback, or a hang.
"""

import io
import json
import os

from hypothesis import HealthCheck, given, settings, strategies as st
import numpy as np
import pytest

import numag
from numag.app.cli import EXIT_INPUT, main
from numag.errors import InputError
from numag.system.files import load_points, load_system
from numag.system.parse import MAX_NESTING, parse_polynomial

_FAST = settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
_TOKENS = ["x", "y", "I", "sqrt", "(", ")", "+", "-", "*", "/", "^", "**", "=", "0", "2", "1.5e3", "3/4",
           "1e400", "1e-400", " ", "2x", ".", "e", "$", "\u00e9", "\n", "((", "))", "99999999999", "sqrt(2)"]


def run(argv):
    out = io.StringIO()
    return main(argv, out=out), out.getvalue()


def assert_clear_refusal_or_answer(code, err):
    assert code in (0, 2, 3), err
    assert "Traceback" not in err and "internal error" not in err
    if code == EXIT_INPUT:
        assert err.startswith("numag: error:") and err.count("\n") == 1, err


# --- the grammar ---------------------------------------------------------------------------------------

@_FAST
@given(st.lists(st.sampled_from(_TOKENS), max_size=40).map("".join) | st.text(max_size=60))
def test_the_parser_answers_or_names_the_problem(text):
    try:
        polynomial = parse_polynomial(text, ["x", "y"])
    except InputError:
        return
    # what it read, it writes back as text that reads back to the same polynomial
    assert parse_polynomial(polynomial.to_text(["x", "y"]), ["x", "y"]) == polynomial


@pytest.mark.parametrize("text", ["(" * 200 + "x" + ")" * 200, "-" * 979 + "x", "sqrt(" * 150 + "2" + ")" * 150,
                                  "(" * MAX_NESTING + "x" + ")" * MAX_NESTING, "+-" * 5000 + "x"])
def test_deep_nesting_and_long_sign_chains(text):
    try:
        polynomial = parse_polynomial(text, ["x"])
    except InputError as err:
        assert "nested more than" in str(err)
        return
    assert polynomial.degree == 1


# --- system files (TOML) ---------------------------------------------------------------------------

_JSON = st.recursive(st.none() | st.booleans() | st.integers() | st.floats() | st.text(max_size=20),
                     lambda inner: st.lists(inner, max_size=4) | st.dictionaries(st.text(max_size=8), inner, max_size=4),
                     max_leaves=12)


@_FAST
@given(variables=_JSON, equations=_JSON | st.lists(st.lists(st.sampled_from(_TOKENS), max_size=12).map("".join),
                                                   min_size=1, max_size=3),
       extra=st.text(max_size=30))
def test_system_files_load_or_are_refused(tmp_path, variables, equations, extra):
    path = tmp_path / "system.toml"
    path.write_text(f"variables = {json.dumps(variables)}\nequations = {json.dumps(equations)}\n{extra}\n")
    try:
        load_system(path)
    except InputError:
        pass


@_FAST
@given(groups=_JSON)
def test_variable_groups_load_or_are_refused(tmp_path, groups):
    path = tmp_path / "system.toml"
    path.write_text(f'variables = ["x", "y"]\nequations = ["x*y - 1", "x + y"]\ngroups = {json.dumps(groups)}\n')
    try:
        load_system(path)
    except InputError:
        pass


# --- points files (JSON) -----------------------------------------------------------------------------

@_FAST
@given(_JSON | st.lists(st.fixed_dictionaries({"x": _JSON, "y": _JSON}), max_size=3))
def test_points_files_load_or_are_refused(tmp_path, data):
    path = tmp_path / "points.json"
    try:
        path.write_text(json.dumps(data))
    except ValueError:  # NaN cannot be written strictly; the reader refuses such files anyway
        path.write_text(json.dumps(data, allow_nan=True))
    try:
        points = load_points(path, ["x", "y"])
    except InputError:
        return
    assert all(len(point) == 2 for point in points)


# --- reports -----------------------------------------------------------------------------------------

@pytest.fixture(scope="module")
def saved_reports(tmp_path_factory):
    folder = tmp_path_factory.mktemp("reports")
    examples = os.path.join(os.path.dirname(numag.__file__), "examples")
    reports = {}
    for name, argv in {"check": ["check", os.path.join(examples, "parallel_linkage.toml"), "--point",
                                 "c1=1,s1=0,c2=1,s2=0", "--without-components"],
                       "solve": ["solve", os.path.join(examples, "mechanism_positions.toml")]}.items():
        code, text = run(argv + ["--json", "--seed", "1"])
        assert code == 0
        reports[name] = json.loads(text)
    return folder, reports


def _paths(value, prefix=()):
    yield prefix
    if isinstance(value, dict):
        for key, item in value.items():
            yield from _paths(item, prefix + (key,))
    elif isinstance(value, list):
        for index, item in enumerate(value[:3]):
            yield from _paths(item, prefix + (index,))


def _write_tampered(report, data, choice, replacement):
    """Replace the value at one place of a saved report (chosen by ``choice``) and write it to ``report``."""
    data = json.loads(json.dumps(data))
    paths = list(_paths(data))
    path = paths[choice % len(paths)]
    if not path:
        data = replacement
    else:
        parent = data
        for key in path[:-1]:
            parent = parent[key]
        parent[path[-1]] = replacement
    try:
        report.write_text(json.dumps(data))
    except ValueError:
        report.write_text(json.dumps(data, allow_nan=True))


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(which=st.sampled_from(["check", "solve"]), choice=st.integers(0, 10**6), replacement=_JSON)
def test_tampered_reports_are_certified_or_refused(saved_reports, capsys, which, choice, replacement):
    folder, reports = saved_reports
    report = folder / f"tampered-{which}.json"
    _write_tampered(report, reports[which], choice, replacement)
    capsys.readouterr()
    code, _ = run(["certify", str(report), "-o", str(folder / "out.json"), "--digits", "20", "--numerical-only"])
    assert_clear_refusal_or_answer(code, capsys.readouterr().err)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(choice=st.integers(0, 10**6), replacement=_JSON)
def test_tampered_reports_are_drawn_or_refused(saved_reports, capsys, choice, replacement):
    pytest.importorskip("matplotlib")
    folder, reports = saved_reports
    report = folder / "tampered-plot.json"
    _write_tampered(report, reports["solve"], choice, replacement)
    capsys.readouterr()
    code, _ = run(["plot", str(report), "-o", str(folder / "picture.png"), "--axes", "x,y"])
    assert_clear_refusal_or_answer(code, capsys.readouterr().err)


# --- the command line on the red team's inputs -------------------------------------------------------

_QUADRICS = [f"x{i}^2 - 1" for i in range(50)]


@pytest.mark.parametrize("variables, equations, argv, fragment", [
    (["x"], ["(" * 200 + "x" + ")" * 200], ["solve"], "nested more than 100 levels"),
    (["x"], ["3^1000*x - 1"], ["solve"], "beyond double precision"),
    (["x"], ["1" * 1000 + "*x - 1"], ["solve"], "beyond double precision"),
    (["x"], ["1e308*x^2 - 1"], ["solve"], "orders of magnitude apart"),
    (["x", "y"], ["x - x", "y - 1"], ["solve"], "1 equation in 2 unknowns"),
    (["x"], ["0"], ["singular"], "every equation is zero"),
    (["x", "y"], ["x^2 + y^2 - 1"], ["solve", "--seed", "-1"], "--seed"),
    (["x", "y"], ["x^2 + y^2 - 1"], ["solve", "--scheduler", "file:///etc/passwd"], "scheduler address"),
    (["x", "y"], ["x^2 + y^2 - 1"], ["compare", "--tolerance", "inf"], "finite positive"),
    (["x", "y"], ["x^2 + y^2 - 1"], ["check", "--point", "x=1e1000,y=0"], "beyond the range"),
    ([f"x{i}" for i in range(50)], _QUADRICS, ["solve"], "--max-paths"),
    ([f"x{i}" for i in range(50)], _QUADRICS, ["decompose", "--max-paths", "2000"], "--max-paths"),
    ([f"x{i}" for i in range(50)], _QUADRICS, ["singular", "--max-paths", "2000"], "--max-paths"),
    (["x"], ["x/(" + " + ".join(f"sqrt({p})" for p in (2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43))
             + ") - 1"], ["solve"], "square-root terms"),
    ([f"x{i}" for i in range(300)], [f"x{i} - {i}" for i in range(300)], ["solve", "--max-memory", "0.5"],
     "--max-memory"),
])
def test_bad_command_lines_get_one_clear_line(tmp_path, capsys, variables, equations, argv, fragment):
    path = tmp_path / "system.toml"
    path.write_text(f"variables = {json.dumps(variables)}\nequations = {json.dumps(equations)}\n")
    code, _ = run([argv[0], str(path)] + argv[1:])
    err = capsys.readouterr().err
    assert code == EXIT_INPUT and fragment in err, err
    assert_clear_refusal_or_answer(code, err)


@pytest.mark.parametrize("equations, variables, dimensions", [
    (["x - 1"], ["x"], [0]), (["x - 1", "y + x"], ["x", "y"], [0]), (["x - 1", "x - 2"], ["x", "y"], []),
    (["x + y + z - 1", "2*x + 2*y + 2*z - 2"], ["x", "y", "z"], [2]), (["x - y", "y - z"], ["x", "y", "z"], [1]),
    ([f"x{i} - {i}" for i in range(300)], [f"x{i}" for i in range(300)], [0])])
def test_linear_systems_get_their_answer(tmp_path, equations, variables, dimensions):
    # a linear space of dimension n - rank, degree 1, smooth everywhere: no singular point (common
    # practice, no source); found exactly, without a homotopy
    path = tmp_path / "linear.toml"
    path.write_text(f"variables = {json.dumps(variables)}\nequations = {json.dumps(equations)}\n")
    code, text = run(["singular", str(path), "--json", "--seed", "2"])
    data = json.loads(text)
    assert code == 0 and data["components"] == [] and any("linear" in note for note in data["notes"])
    assert [(c["dimension"], c["degree"]) for c in data["variety"]] == [(d, 1) for d in dimensions]
    assert data["paths"]["tracked"] == 0
    code, text = run(["decompose", str(path), "--json", "--seed", "2"])
    assert code == 0 and [c["dimension"] for c in json.loads(text)["components"]] == dimensions


def test_a_zero_equation_is_dropped_with_a_note(tmp_path):
    path = tmp_path / "zero.toml"
    path.write_text('variables = ["x"]\nequations = ["x - x", "x^2 - 4"]\n')
    code, text = run(["solve", str(path), "--json", "--seed", "1"])
    data = json.loads(text)
    # the roots of x^2 - 4 are -2 and 2 (common practice, no source)
    assert code == 0 and sorted(round(s["point"][0][0], 9) for s in data["solutions"]) == [-2.0, 2.0]
    assert data["notes"][0].startswith("equation 1 is zero")


def test_numbers_beyond_double_range_that_exact_arithmetic_keeps(tmp_path):
    path = tmp_path / "huge.toml"
    path.write_text('variables = ["x"]\nequations = ["1e400*x^2 - 1e400"]\n')
    code, text = run(["solve", str(path), "--json", "--seed", "1"])
    data = json.loads(text)
    assert code == 0 and sorted(round(s["point"][0][0], 9) for s in data["solutions"]) == [-1.0, 1.0]
    assert "divided by 1e400" in data["notes"][0]


# --- families: parameters, ranges, --at values, --grid specifications ------------------------------------

@_FAST
@given(parameters=_JSON, low=_JSON, high=_JSON)
def test_family_files_load_or_are_refused(tmp_path, parameters, low, high):
    from numag.system.files import load_family

    path = tmp_path / "family.toml"
    path.write_text(f'variables = ["x"]\nequations = ["x^2 - b"]\nparameters = {json.dumps(parameters)}\n'
                    f"[ranges]\nb = [{json.dumps(low)}, {json.dumps(high)}]\n")
    try:
        family = load_family(path)
    except InputError:
        return
    assert family.parameters == ("b",) and family.ranges["b"].low < family.ranges["b"].high


@_FAST
@given(at=st.text(max_size=40) | st.lists(st.sampled_from(["b", "c", "=", ",", "1", "1e400", "I", "sqrt(2)", " ",
                                                            "x", "(", "/0"]), max_size=10).map("".join),
       grid=st.lists(st.sampled_from(["b", "c", "=", ":", ";", "0", "10", "1001", "-1", "inf", "nan", "1e9", " "]),
                     max_size=12).map("".join))
def test_family_values_are_read_or_refused(at, grid):
    from numag.families.sweep import parse_grid
    from numag.system.files import family_from_mapping

    family = family_from_mapping({"variables": ["x"], "parameters": ["b"], "equations": ["x^2 - b"]})
    try:
        family.member(family.values_from_text(at))
    except InputError:
        pass
    try:
        values = parse_grid(grid, ["b"])
    except InputError:
        return
    assert values.shape[1] == 1 and np.all(np.isfinite(values))


# --- saved work reused: reports as points files and as decompositions (issue 20) -------------------------

@pytest.fixture(scope="module")
def reusable_reports(tmp_path_factory):
    folder = tmp_path_factory.mktemp("reused")
    system = folder / "axes.toml"
    system.write_text('variables = ["x", "y", "z"]\nequations = ["x*y", "x*z", "y*z", "x*y*z"]\n')
    reports = {}
    for name, argv in {"decompose": ["decompose", str(system)],
                       "check": ["check", str(system), "--point", "x=0,y=0,z=1", "--without-components",
                                 "--local-dimension", "1"]}.items():
        code, text = run(argv + ["--json", "--seed", "1"])
        assert code == 0
        reports[name] = json.loads(text)
    return folder, system, reports


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(which=st.sampled_from(["decompose", "check"]), choice=st.integers(0, 10**6), replacement=_JSON)
def test_tampered_reports_reused_by_check_are_used_or_refused(reusable_reports, capsys, which, choice, replacement):
    folder, system, reports = reusable_reports
    data = json.loads(json.dumps(reports[which]))
    paths = list(_paths(data))
    path = paths[choice % len(paths)]
    if not path:
        data = replacement
    else:
        parent = data
        for key in path[:-1]:
            parent = parent[key]
        parent[path[-1]] = replacement
    report = folder / f"tampered-{which}.json"
    try:
        report.write_text(json.dumps(data))
    except ValueError:
        report.write_text(json.dumps(data, allow_nan=True))
    option = "--decomposition" if which == "decompose" else "--points-file"
    argv = ["check", str(system), option, str(report), "--seed", "2"]
    if which == "decompose":
        argv += ["--point", "x=0,y=0,z=0"]
    else:
        argv += ["--local-dimension", "1"]
    capsys.readouterr()
    code, _ = run(argv)
    assert_clear_refusal_or_answer(code, capsys.readouterr().err)


@pytest.mark.parametrize("key", ["dimensions_searched", "monodromy_loops", "seed"])
def test_saved_decomposition_with_null_fields_is_refused_or_used(reusable_reports, capsys, key):
    """A null where a saved decomposition keeps integers is a clear refusal, never an internal error.

    Found by the property test above on CI: ``dimensions_searched: [null, 2, 1, 0]`` crashed the comparison of
    dimensions inside ``check --decomposition``.  Common practice, no source.
    """
    folder, system, reports = reusable_reports
    data = json.loads(json.dumps(reports["decompose"]))
    if isinstance(data[key], list):
        data[key] = [None] + data[key][1:]
    elif isinstance(data[key], dict):
        data[key] = {k: None for k in data[key]}
    else:
        data[key] = None
    report = folder / f"null-{key}.json"
    report.write_text(json.dumps(data))
    capsys.readouterr()
    code, _ = run(["check", str(system), "--decomposition", str(report), "--seed", "2", "--point", "x=0,y=0,z=0"])
    assert_clear_refusal_or_answer(code, capsys.readouterr().err)
