"""numag.save / numag.load: a JSON round trip for every result type.

Each result is computed on a problem whose answer is known, saved, loaded and saved again: the
second file must equal the first, and the loaded result must still hold the known answer.
"""

import json

import numpy as np
import pytest

import numag
from numag.app.saved import from_dict, to_dict
from numag.errors import InputError

NODAL = numag.parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])


def round_trip(result, tmp_path, options=None):
    first, second = tmp_path / "first.json", tmp_path / "second.json"
    numag.save(result, first, options)
    loaded = numag.load(first)
    numag.save(loaded, second, options)
    assert json.loads(first.read_text()) == json.loads(second.read_text())
    assert type(loaded) is type(result)
    return loaded


def test_check_report(tmp_path):
    # y^2 = x^2 (x + 1): singular at its node (0, 0), smooth at (3, 6) (common practice, no source)
    report = numag.check_points(NODAL, [[0, 0], [3, 6], [0.5, 0.5]], seed=2)
    loaded = round_trip(report, tmp_path)
    assert [v.verdict for v in loaded.points] == ["singular", "smooth", "off"]
    assert loaded.seed == 2 and np.array_equal(loaded.points[1].point, report.points[1].point)
    assert json.loads((tmp_path / "first.json").read_text())["counts"]["non_reduced"] == 0


def test_solve_result(tmp_path):
    # x^2 + y^2 = 1, x = y: the two points +-(1/sqrt 2, 1/sqrt 2) (common practice, no source)
    system = numag.parse_system(["x^2 + y^2 - 1", "x - y"], ["x", "y"])
    options = numag.SolveOptions()
    result = numag.solve_system(system, options, seed=3)
    loaded = round_trip(result, tmp_path, options)
    points = sorted(s.point[0].real for s in loaded.solutions)
    assert points == pytest.approx([-0.5 ** 0.5, 0.5 ** 0.5], abs=1e-12)
    back, recorded = numag.load(tmp_path / "first.json", with_options=True)
    assert recorded.refine_digits == options.refine_digits and back.seed == 3


def test_decomposition(tmp_path):
    # V(xy, xz, yz, xyz): the three coordinate axes, lines of degree 1 (common practice, no source)
    system = numag.parse_system(["x*y", "x*z", "y*z", "x*y*z"], ["x", "y", "z"])
    result = numag.decompose(system, seed=5)
    loaded = round_trip(result, tmp_path)
    assert sorted((c.dimension, c.degree) for c in loaded.components) == [(1, 1)] * 3
    assert "notes" not in json.loads((tmp_path / "first.json").read_text())  # the run's options are recorded
    result.options = None  # a result that does not know its options: the defaults are recorded, and said so
    numag.save(result, tmp_path / "unknown.json")
    notes = json.loads((tmp_path / "unknown.json").read_text())["notes"]
    assert sum("defaults" in note for note in notes) == 1
    numag.save(numag.load(tmp_path / "unknown.json"), tmp_path / "again.json")
    assert (tmp_path / "again.json").read_text() == (tmp_path / "unknown.json").read_text()


def test_singular_locus(tmp_path):
    # The node of y^2 = x^2 (x + 1) is the origin (common practice, no source)
    locus = numag.singular_locus(NODAL, seed=1)
    loaded = round_trip(locus, tmp_path, numag.SingularOptions())
    points = [c.points[0] for c in loaded.components if c.kind == "singular" and not c.at_infinity]
    assert len(points) == 1 and np.abs(points[0]).max() < 1e-10


def test_certificate(tmp_path):
    # The cusp (0, 0) of y^2 = x^3 is singular; certified exactly (common practice, no source)
    cusp = numag.parse_system(["y^2 - x^3"], ["x", "y"])
    certificate = numag.certify_singular_point(cusp, [1e-9, 0.0], options=numag.CertifyOptions(digits=20))
    loaded = round_trip(certificate, tmp_path)
    assert loaded.status == "certified" and loaded.exact_coordinates == ["0", "0"]


def test_comparison(tmp_path):
    # numag beside sympy's exact answer (a general-purpose reference library): they agree on the nodal cubic
    pytest.importorskip("sympy")
    from numag.app.compare import compare_system
    comparison = compare_system(NODAL, seconds=120, seed=1)
    loaded = round_trip(comparison, tmp_path)
    assert loaded.verdict == comparison.verdict == "agree"
    assert [row.agree for row in loaded.rows] == [row.agree for row in comparison.rows]


SQUARE_ROOT = {"variables": ["x"], "parameters": ["p"], "equations": ["x^2 - p"]}


def test_discriminant(tmp_path):
    # x^2 = p: the members are singular at p = 0 only, with no real root below and two above (common
    # practice, no source)
    from numag.system.files import family_from_mapping
    result = numag.discriminant(family_from_mapping(SQUARE_ROOT), seed=2)
    loaded = round_trip(result, tmp_path)
    assert loaded.to_dict() == result.to_dict()
    assert np.abs(loaded.real_points).max() < 1e-8 and [r.count.solutions for r in loaded.regions] == [0, 2]
    saved = json.loads((tmp_path / "first.json").read_text())
    assert saved["command"] == saved["kind"] == "discriminant" and "caution" in saved


def test_sweep(tmp_path):
    # x^2 = p at p = -1 and p = 4: no real root, then the real roots +-2 (common practice, no source)
    from numag.system.files import family_from_mapping
    result = numag.sweep(family_from_mapping(SQUARE_ROOT), [[-1.0], [4.0]], seed=2)
    loaded = round_trip(result, tmp_path)
    assert loaded.to_dict() == result.to_dict()
    assert loaded.real_counts().tolist() == [0, 2]
    assert sorted(loaded.values[1].points[:, 0].real) == pytest.approx([-2.0, 2.0], abs=1e-10)


def test_families_results_written_without_the_envelope_load_too(tmp_path):
    # --json and the --output files of earlier versions hold the result's own dictionary (a "kind", no
    # "command"): numag.load reads them as the same result
    from numag.system.files import family_from_mapping
    result = numag.sweep(family_from_mapping(SQUARE_ROOT), [[1.0]], seed=5)
    bare = tmp_path / "bare.json"
    bare.write_text(json.dumps(result.to_dict()))
    assert numag.load(bare).to_dict() == result.to_dict()
    damaged = tmp_path / "damaged.json"
    damaged.write_text(json.dumps({"kind": "sweep", "variables": ["x"]}))
    with pytest.raises(InputError, match="damaged.json: the report of 'numag sweep' is damaged"):
        numag.load(damaged)


def test_what_cannot_be_saved_or_loaded_is_one_clear_error(tmp_path):
    with pytest.raises(InputError, match="cannot save a list"):
        to_dict([1, 2])
    with pytest.raises(InputError, match="not a saved numag result"):
        from_dict({"command": "plot"})
    damaged = tmp_path / "damaged.json"
    damaged.write_text(json.dumps({"numag_version": "0", "command": "decompose",
                                   "system": {"variables": ["x"], "equations": ["x"]}}))
    with pytest.raises(InputError, match="damaged.json: the report of 'numag decompose' is damaged"):
        numag.load(damaged)


def test_every_result_shows_itself_in_a_line_or_two_and_as_an_html_table(tmp_path):
    # Reprs stay short whatever the size of the result (common practice, no source)
    report = numag.check_points(NODAL, [[0, 0], [3, 6], [0.5, 0.5]], seed=2)
    locus = numag.singular_locus(NODAL, seed=1)
    results = [report, report.points[0], locus, locus.components[0], numag.decompose(NODAL, seed=1),
               numag.solve_system(numag.parse_system(["x^2 + y^2 - 1", "x - y"], ["x", "y"]), seed=3),
               numag.certify_singular_point(numag.parse_system(["y^2 - x^3"], ["x", "y"]), [1e-9, 0.0])]
    results += [results[4].components[0], results[5].solutions[0]]
    for result in results:
        text = repr(result)
        assert text.count("\n") <= 1 and len(text) < 240 and text.startswith(type(result).__name__ + "(")
    assert repr(report) == "CheckReport(system: smooth 1, singular 1, off 1; seed 2)"
    for result in (report, locus, results[4], results[5], results[6]):
        table = result._repr_html_()
        assert table.startswith("<table>") and table.count("<tr>") >= 2 and "<script" not in table
    assert report._repr_html_().count("<tr>") == 1 + 3  # a header and one row per point


def test_old_reports_keys_are_read_in_todays_style(tmp_path):
    # reports written before the keys were unified said "non-reduced" (common practice, no source)
    from numag.app.report import read_report
    old = tmp_path / "old.json"
    old.write_text(json.dumps({"numag_version": "0", "command": "check", "counts": {"smooth": 1, "non-reduced": 2}}))
    assert read_report(old)["counts"] == {"smooth": 1, "non_reduced": 2}


def _same(a, b, where="result"):
    """Field by field equality of two results (dataclasses, arrays, enums, nested lists and dicts)."""
    import dataclasses
    import enum
    if isinstance(a, numag.PolynomialSystem):
        from numag.app.report import system_to_dict
        assert isinstance(b, numag.PolynomialSystem) and system_to_dict(a) == system_to_dict(b), where
    elif dataclasses.is_dataclass(a) and not isinstance(a, type):
        assert type(a) is type(b), where
        for f in dataclasses.fields(a):
            _same(getattr(a, f.name), getattr(b, f.name), f"{where}.{f.name}")
    elif isinstance(a, np.ndarray) or isinstance(b, np.ndarray):
        a, b = np.asarray(a), np.asarray(b)
        assert a.shape == b.shape and np.array_equal(a, b, equal_nan=a.dtype.kind in "fc"), where
    elif isinstance(a, (list, tuple)):
        assert isinstance(b, (list, tuple)) and len(a) == len(b), where
        for k, (x, y) in enumerate(zip(a, b)):
            _same(x, y, f"{where}[{k}]")
    elif isinstance(a, dict):
        assert isinstance(b, dict) and set(a) == set(b), f"{where}: keys {sorted(map(str, set(a) ^ set(b)))}"
        for key in a:
            _same(a[key], b[key], f"{where}[{key!r}]")
    elif isinstance(a, float) and isinstance(b, float) and np.isnan(a):
        assert np.isnan(b), where
    elif isinstance(a, enum.Enum) or isinstance(b, enum.Enum):
        assert str(a) == str(b), where
    else:
        assert a == b, f"{where}: {a!r} != {b!r}"


def _failing_solve():
    # a tracker too impatient to finish: paths fail, the report warns
    from numag.tracking.tracker import TrackerOptions
    system = numag.parse_system(["x^3 - 2*x*y + 1", "y^3 - x - 3"], ["x", "y"])
    return numag.solve_system(system, numag.SolveOptions(tracker=TrackerOptions(max_steps=3)), seed=4)


def _run(kind, seed):
    from numag.system.files import family_from_mapping
    if kind == "check":
        return numag.check_points(NODAL, [[0, 0], [3, 6]], seed=seed)
    if kind == "solve":
        return numag.solve_system(numag.parse_system(["x^2 + y^2 - 1", "x - y"], ["x", "y"]),
                                  numag.SolveOptions(start="polyhedral"), seed=seed)
    if kind == "solve with failures":
        return _failing_solve()
    if kind == "decompose":
        return numag.decompose(numag.parse_system(["x*y", "x*z"], ["x", "y", "z"]), seed=seed)
    if kind == "singular":
        return numag.singular_locus(NODAL, numag.SingularOptions(start="polyhedral"), seed=seed)
    if kind == "certificate":
        return numag.certify_singular_point(numag.parse_system(["y^2 - x^3"], ["x", "y"]), [1e-9, 0.0],
                                            options=numag.CertifyOptions(digits=20, seed=seed))
    if kind == "compare":
        pytest.importorskip("sympy")
        from numag.app.compare import compare_system
        return compare_system(NODAL, seconds=120, seed=seed)
    if kind == "sweep":
        return numag.sweep(family_from_mapping(SQUARE_ROOT), [[-1.0], [4.0]], seed=seed)
    return numag.discriminant(family_from_mapping(SQUARE_ROOT), seed=seed)


_KINDS = ["check", "solve", "solve with failures", "decompose", "singular", "certificate", "compare", "sweep",
          "discriminant"]


@pytest.mark.parametrize("seed", [1, 2])
@pytest.mark.parametrize("kind", _KINDS)
def test_every_result_round_trips_whole(kind, seed, tmp_path):
    # save, load, save again (common practice, no source): the same text, and the loaded result equal to the
    # run's field by field; the options of the run and the warnings are kept without being passed again
    result = _run(kind, seed)
    first, second = tmp_path / "first.json", tmp_path / "second.json"
    numag.save(result, first)
    loaded = numag.load(first)
    _same(result, loaded)
    numag.save(loaded, second)
    assert second.read_text() == first.read_text()
    saved = json.loads(first.read_text())
    if kind in ("solve", "singular"):
        assert saved["options"]["start"] == "polyhedral"
        assert not any("defaults" in note for note in saved.get("notes", []))
    if kind == "solve with failures":
        assert saved["paths"]["failed"] > 0 and any("failed" in w for w in saved["warnings"])
