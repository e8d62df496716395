import json

import pytest

from numag.errors import PointError, SystemFileError
from numag.system.files import load_points, load_system, parse_point_assignment, points_from_json


def write(tmp_path, text, name="system.toml"):
    path = tmp_path / name
    path.write_text(text)
    return path


def test_bundled_example_loads():
    import numag, pathlib
    example = pathlib.Path(numag.__file__).parent / "examples" / "parallel_linkage.toml"
    system = load_system(example)
    assert system.n_variables == 4 and system.n_equations == 3 and not system.projective


@pytest.mark.parametrize("text, fragment", [
    ("", "is empty"),
    ("variables = ['x']\nequations = ['x']\ncolour = 'red'\n", "unknown key 'colour'"),
    ("equations = ['x']\n", "missing key 'variables'"),
    ("variables = ['x']\n", "missing key 'equations'"),
    ("variables = ['x']\nequations = []\n", "'equations' is empty"),
    ("variables = 'x'\nequations = ['x']\n", "'variables' must be a list of strings"),
    ("variables = ['x']\nequations = ['x + y']\n", "unknown variable 'y'"),
    ("variables = ['x', 'y']\nequations = ['x^2 + y']\nprojective = true\n", "not homogeneous"),
    ("variables = ['x']\nequations = ['x']\nprojective = 'yes'\n", "'projective' must be true or false"),
    ("variables = ['x', 'I']\nequations = ['x']\n", "reserved"),
    ("variables = ['x'\nequations = ['x']\n", "not valid TOML"),
    ("variables = ['x']\nequations = ['x +* 1']\n", "equation 1, column 4"),
])
def test_bad_system_files_name_the_problem(tmp_path, text, fragment):
    with pytest.raises(SystemFileError) as info:
        load_system(write(tmp_path, text))
    assert fragment in str(info.value)
    assert str(tmp_path) in str(info.value)


def test_missing_file_is_a_clear_error(tmp_path):
    with pytest.raises(SystemFileError, match="no such system file"):
        load_system(tmp_path / "absent.toml")


def test_point_assignments():
    names = ["x", "y"]
    point = parse_point_assignment("y = 1+2*I, x=sqrt(2)/2", names)
    assert complex(point[1]) == 1 + 2j and abs(complex(point[0]) - 2**0.5 / 2) < 1e-16
    for bad, fragment in [("x=1", "no value for y"), ("x=1,y=2,z=3", "'z' is not a variable"),
                          ("x=1,x=2,y=0", "given twice"), ("x=1,y", "not of the form"),
                          ("x=1,y=2x", "implicit multiplication")]:
        with pytest.raises(PointError, match=fragment):
            parse_point_assignment(bad, names)


def test_points_json_shapes(tmp_path):
    names = ["x", "y"]
    data = [{"x": "1/2", "y": 3}, [[1.0, 2.0], [0.0, -1.0]], ["I", 2.5]]
    points = points_from_json(data, names)
    assert [complex(c) for c in points[1]] == [1 + 2j, -1j]
    assert complex(points[2][0]) == 1j
    path = tmp_path / "points.json"
    path.write_text(json.dumps({"points": [{"point": [[1, 0], [2, 0]], "verdict": "smooth"}]}))
    assert [complex(c) for c in load_points(path, names)[0]] == [1, 2]
    with pytest.raises(PointError, match="point 1"):
        points_from_json([{"x": 1}], names)
    with pytest.raises(PointError, match="point 1: has 3 coordinates"):
        points_from_json([[1, 2, 3]], names)


@pytest.mark.parametrize("stated", [5, -1e-6, "1e-6", True, [1e-6]])
def test_a_singular_reports_stated_accuracy_is_checked(stated):
    # decision 0110: a saved singular report's `point_tolerance` is read as each point's accuracy, a number in (0, 1)
    # (common practice, no source)
    report = {"command": "singular", "numag_version": "0", "system": {"variables": ["x", "y"]},
              "components": [{"at_infinity": False, "points": [[[0.5, 0.0], [1.5, 0.0]]], "point_tolerance": 1e-6}]}
    accuracies = []
    assert [[complex(c) for c in p] for p in points_from_json(report, ["x", "y"], accuracies)] == [[0.5, 1.5]]
    assert accuracies == [1e-6]
    report["components"][0]["point_tolerance"] = stated
    with pytest.raises(PointError, match="point_tolerance"):
        points_from_json(report, ["x", "y"], [])
