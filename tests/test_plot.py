"""Pictures of reports (numag.app.plot, ``numag plot``, ``--plot``), rendered headless on Agg."""

import io
import json
import math

import numpy as np
import pytest

pytest.importorskip("matplotlib")

from numag.app.cli import main  # noqa: E402
from numag.app.commands.plot import with_angles  # noqa: E402
from numag.app.plot import PlotKind, PlotOptions, plot_report  # noqa: E402
from numag.app.report import decode_point, singular_to_dict  # noqa: E402
from numag.errors import InputError  # noqa: E402
from numag.system.files import load_system  # noqa: E402
from numag.system.parse import parse_system  # noqa: E402
from numag.singular.locus import SingularOptions, singular_locus  # noqa: E402

LINKAGE = "numag/examples/parallel_linkage.toml"


def singular_report(system, seed=1):
    return singular_to_dict(singular_locus(system, seed=seed), SingularOptions())


def report_points(data):
    """The report's real singular points (dimension 0, affine)."""
    return [decode_point(c["points"][0]).real for c in data["components"]
            if c["dimension"] == 0 and not c["at_infinity"]]


@pytest.fixture(scope="module")
def linkage_report():
    data = singular_report(load_system(LINKAGE))
    return with_angles(data, LINKAGE)


def test_nodal_cubic_picture_marks_the_reports_node(tmp_path):
    data = singular_report(parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"]))
    result = plot_report(data, tmp_path / "nodal.png", PlotOptions(box=(-2, 2, -2, 2), seed=3))
    assert (tmp_path / "nodal.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert result.kind == PlotKind.PLANE
    (node,) = report_points(data)
    assert [m.coordinates for m in result.marked] == [tuple(node)]
    # the drawn curve: the loop and two branches from the node (common practice, no source)
    assert sorted(b.ends for b in result.curves[0].branches()) == [
        ("box exit", "singular"), ("box exit", "singular"), ("singular", "singular")]
    assert "seed 3" in result.caption and "x in [-2, 2]" in result.caption
    assert "Numerical results" in result.caption


def test_marked_points_are_labelled_by_their_anatomy(tmp_path):
    # the node of y^2 = x^2 (x + 1) is of type A1 (Arnold 1972; common practice)
    from numag.anatomy.survey import locus_anatomy
    from numag.app.anatomy_text import attach_to_singular
    system = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    locus = singular_locus(system, seed=2)
    data = attach_to_singular(singular_to_dict(locus, SingularOptions()), locus_anatomy(locus))
    result = plot_report(data, tmp_path / "nodal.svg", PlotOptions(box=(-2, 2, -2, 2), seed=3))
    assert [m.label.split()[-1] for m in result.marked] == ["A1"]


@pytest.mark.parametrize("seed", [1, 5])
def test_linkage_picture_on_the_torus_of_joint_angles(tmp_path, linkage_report, seed):
    result = plot_report(linkage_report, tmp_path / "linkage.svg", PlotOptions(seed=seed))
    assert (tmp_path / "linkage.svg").read_text().lstrip().startswith("<?xml")
    assert result.kind == PlotKind.ANGLES
    # marked points: the report's singular points, as crank and rocker angles (atan2 of sine and cosine)
    expected = sorted((math.degrees(math.atan2(p[1], p[0])), math.degrees(math.atan2(p[3], p[2])))
                      for p in report_points(linkage_report))
    found = sorted(m.coordinates for m in result.marked)
    assert np.allclose(np.array(found), np.array(expected), rtol=0, atol=1e-9) and len(found) == len(expected)
    # branch directions: the tangent cone of g(a, b) = (4 + cos b - cos a)^2 + (sin b - sin a)^2 - 16 at the
    # branch points; its Hessian is [[10, -2], [-2, -6]] at (0, 0) and [[-6, -2], [-2, 10]] at (180, 180)
    # (worked out with sympy's hessian), slopes db/da of 1 and -5/3, and of 1 and -3/5
    slopes = {}
    for label, (da, db) in result.directions:
        slopes.setdefault(label, set()).add(round(math.degrees(math.atan(db / da)), 0))
    by_position = {m.label: m.coordinates for m in result.marked}
    for label, found in slopes.items():
        at_origin = abs(by_position[label][0]) < 1
        exact = (1, -5 / 3) if at_origin else (1, -3 / 5)
        assert found == {round(math.degrees(math.atan(s)), 0) for s in exact}
    assert sum(len(v) for v in slopes.values()) == 4 and len(result.directions) == 8


def test_whitney_umbrella_surface_with_its_singular_line(tmp_path):
    pytest.importorskip("skimage")
    # x^2 = y^2 z: singular exactly along the z-axis (common practice, no source)
    data = singular_report(parse_system(["x^2 - y^2*z"], ["x", "y", "z"]))
    result = plot_report(data, tmp_path / "umbrella.pdf", PlotOptions(resolution=30, seed=2))
    assert (tmp_path / "umbrella.pdf").read_bytes()[:5] == b"%PDF-"
    assert result.kind == PlotKind.SURFACE and result.triangles > 100
    (line,) = result.curves
    points = line.points()
    assert len(points) > 10
    assert np.abs(points[:, :2]).max() <= 1e-9
    assert points[:, 2].min() < -1 and points[:, 2].max() > 1  # the handle (z < 0) is drawn too


def test_check_points_are_marked_by_verdict(tmp_path):
    out = io.StringIO()
    code = main(["check", LINKAGE, "--points-file", "numag/examples/checkpoints_linkage.json", "--seed", "1",
                 "--plot", str(tmp_path / "check.png")], out=out)
    assert code == 0, out.getvalue()
    text = out.getvalue()
    assert "picture: " in text and "joint angles" in text
    # the example's points: the two branch points (singular) and two points of the parallelogram motion
    assert text.count(": singular (check) at") == 2 and text.count(": smooth at") == 2


def test_numag_plot_reads_a_saved_report(tmp_path, linkage_report):
    report = tmp_path / "linkage.json"
    report.write_text(json.dumps(linkage_report))
    out = io.StringIO()
    code = main(["plot", str(report), "-o", str(tmp_path / "projection.png"), "--axes", "c1,c2", "--seed", "2"],
                out=out)
    assert code == 0
    assert "projection" in out.getvalue() and "4 branches" in out.getvalue()
    assert (tmp_path / "projection.png").stat().st_size > 1000


@pytest.mark.parametrize("arguments, message", [
    (["-o", "picture.jpg"], "must end in .png, .svg, .pdf"),
    (["-o", "picture.png", "--axes", "c1,q"], "'q', which is not an unknown"),
    (["-o", "picture.png", "--angles", "crank,elbow"], "'elbow', which is not in the angles table"),
    (["-o", "picture.png", "--box=1,0,0,1"], "lower bound must be below"),
])
def test_bad_picture_options_are_one_line_errors(tmp_path, linkage_report, capsys, arguments, message):
    report = tmp_path / "linkage.json"
    report.write_text(json.dumps(linkage_report))
    arguments = [a if not a.startswith("picture") else str(tmp_path / a) for a in arguments]
    assert main(["plot", str(report)] + arguments, out=io.StringIO()) == 2
    error = capsys.readouterr().err
    assert message in error and error.count("\n") == 1


def test_one_unknown_is_refused(tmp_path):
    data = singular_report(parse_system(["x^2*(x - 1)"], ["x"]))
    with pytest.raises(InputError, match="two or more unknowns"):
        plot_report(data, tmp_path / "x.png")


def test_more_unknowns_need_axes_or_angles(tmp_path):
    data = singular_report(load_system(LINKAGE))  # without the angles table
    with pytest.raises(InputError, match="--axes"):
        plot_report(data, tmp_path / "x.png")
