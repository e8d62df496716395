"""Real points of real curves traced between critical points (numag.witness.realcurve)."""

import numpy as np
import pytest

from numag.errors import InputError
from numag.system.files import load_system
from numag.system.parse import parse_system
from numag.witness.realcurve import RealCurveOptions, VertexKind, trace_real_curve

LINKAGE = "numag/examples/parallel_linkage.toml"


def nodal_cubic_residual(points):
    """|y^2 - x^2 (x + 1)| over the size of its terms, written out here (not numag's evaluator)."""
    x, y = points[:, 0], points[:, 1]
    terms = np.abs(y) ** 2 + np.abs(x) ** 3 + np.abs(x) ** 2
    return np.abs(y ** 2 - x ** 2 * (x + 1)) / np.maximum(terms, 1.0)


@pytest.mark.parametrize("seed", [1, 2, 3, 7])
def test_nodal_cubic_has_a_loop_and_two_unbounded_branches_at_its_node(seed):
    # y^2 = x^2 (x + 1): a node at the origin, a loop over -1 <= x <= 0 from the node back to it, and two
    # branches from the node to infinity over x > 0 (common practice, no source)
    curve = trace_real_curve(parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"]),
                             RealCurveOptions(box=((-2, -2), (2, 2))), seed=seed)
    branches = curve.branches()
    assert sorted(b.ends for b in branches) == [("box exit", "singular"), ("box exit", "singular"),
                                                ("singular", "singular")]
    singular = [v for v, kind in enumerate(curve.vertex_kinds) if kind == VertexKind.SINGULAR]
    assert len(singular) == 1 and np.allclose(curve.vertices[singular[0]], 0, atol=1e-8)
    assert curve.failed_arcs == 0
    # the loop reaches x = -1 (where it is vertical) and stays in -1 <= x <= 0
    loop = next(b for b in branches if b.ends == ("singular", "singular"))
    assert loop.points[:, 0].min() == pytest.approx(-1, abs=1e-3)
    assert loop.points[:, 0].max() <= 1e-9


@pytest.mark.parametrize("seed", [1, 4])
def test_traced_points_satisfy_the_equation_to_the_stated_tolerance(seed):
    curve = trace_real_curve(parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"]), seed=seed)
    points = curve.points()
    assert len(points) > 100
    assert nodal_cubic_residual(points).max() <= curve.tolerance


def test_circle_is_one_closed_branch():
    # x^2 + y^2 = 1: one closed real branch, no singular point (common practice, no source)
    curve = trace_real_curve(parse_system(["x^2 + y^2 - 1"], ["x", "y"]), seed=5)
    branches = curve.branches()
    assert len(branches) == 1 and branches[0].ends == ()
    assert np.abs(np.linalg.norm(curve.points(), axis=1) - 1).max() <= 1e-9
    angles = np.sort(np.arctan2(curve.points()[:, 1], curve.points()[:, 0]))
    assert np.diff(angles).max() < 0.1  # the whole circle, no gap


def test_two_ovals_are_two_branches():
    # (x^2 + y^2 - 1)(x^2 + y^2 - 4) = 0 is two concentric circles: two closed branches, disjoint
    curve = trace_real_curve(parse_system(["(x^2 + y^2 - 1)*(x^2 + y^2 - 4)"], ["x", "y"]), seed=3)
    branches = curve.branches()
    assert len(branches) == 2
    radii = sorted(float(np.mean(np.linalg.norm(b.points, axis=1))) for b in branches)
    assert radii == pytest.approx([1, 2], abs=1e-9)


@pytest.mark.parametrize("seed", [1, 2])
def test_parallelogram_linkage_has_four_branches_between_its_two_branch_points(seed):
    # the parallelogram four-bar's configuration curve is two closed curves (parallelogram and crossed
    # motion) meeting at two configurations, crank = rocker = 0 and 180 degrees: four branches between
    # them (the example's own description; Hessian check in test_plot)
    system = load_system(LINKAGE)
    curve = trace_real_curve(system, seed=seed)
    assert sorted(b.ends for b in curve.branches()) == [("singular", "singular")] * 4
    singular = curve.vertices[[k == VertexKind.SINGULAR for k in curve.vertex_kinds]]
    assert sorted(np.round(singular[:, 0], 8).tolist()) == [-1.0, 1.0]
    points = curve.points()
    c1, s1, c2, s2 = points.T
    assert np.abs(c1 ** 2 + s1 ** 2 - 1).max() <= 1e-9
    assert np.abs(c2 ** 2 + s2 ** 2 - 1).max() <= 1e-9
    assert np.abs((4 + c2 - c1) ** 2 + (s2 - s1) ** 2 - 16).max() <= 1e-8


def test_more_equations_than_a_curve_needs_keep_only_the_curve():
    # the z-axis as V(x, y, x*z): three equations for a curve in three unknowns
    curve = trace_real_curve(parse_system(["x", "y", "x*z"], ["x", "y", "z"]),
                             RealCurveOptions(box=((-1, -1, -1), (1, 1, 1))), seed=2)
    points = curve.points()
    assert len(points) > 10 and np.abs(points[:, :2]).max() <= 1e-10
    assert points[:, 2].min() <= -1 and points[:, 2].max() >= 1


@pytest.mark.parametrize("equations, variables, message", [
    (["x^2 + y^2 + z^2 - 1"], ["x", "y", "z"], "do not cut out a curve"),
    (["x^2 + y^2 - z^2"], ["x", "y", "z"], "do not cut out a curve"),
    (["x^2 - I*y"], ["x", "y"], "real coefficients"),
])
def test_what_is_not_a_real_curve_is_refused_in_one_line(equations, variables, message):
    with pytest.raises(InputError, match=message):
        trace_real_curve(parse_system(equations, variables), seed=1)


def test_a_line_has_no_critical_point_and_crosses_the_box():
    curve = trace_real_curve(parse_system(["x - 2*y"], ["x", "y"]), RealCurveOptions(box=((-1, -1), (1, 1))), seed=1)
    (branch,) = curve.branches()
    assert branch.ends == ("box exit", "box exit") and len(curve.critical_values) == 0
    assert np.abs(branch.points[:, 0] - 2 * branch.points[:, 1]).max() <= 1e-12
    assert branch.points[:, 0].min() == pytest.approx(-1, abs=0.02) and branch.points[:, 0].max() == pytest.approx(1, abs=0.02)


def test_bad_box_is_refused():
    with pytest.raises(InputError, match="lower bound"):
        trace_real_curve(parse_system(["x - y"], ["x", "y"]), RealCurveOptions(box=((1, 0), (0, 1))))
