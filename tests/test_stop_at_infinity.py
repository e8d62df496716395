"""Paths heading to infinity are stopped before the endgame only where their ends are not wanted (decision 0113)."""

import numpy as np
import pytest
import sympy

import numag.tracking.tracker as tracker
from numag.system.parse import parse_system
from numag.tracking.homotopy import StraightLineHomotopy
from numag.tracking.service import PathCounts
from numag.tracking.tracker import PathStatus, TrackerOptions, stopped_early, track_paths
from numag.witness.decompose import decompose


def _sympy_points(equations):
    x, y = sympy.symbols("x y")
    found = sympy.solve([sympy.sympify(e) for e in equations], [x, y], dict=True)
    return [np.array([complex(s[x]), complex(s[y])]) for s in found]


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_paths_to_a_point_at_infinity_of_winding_two_are_stopped(seed):
    # x y = 1, x^2 = 4: 2 finite solutions and the point (0 : 0 : 1) at infinity where the top forms x y and x^2
    # meet twice (Bezout: 4 = 2 + 2; common practice, no source); the endgame gives its paths winding number 2
    equations = ["x*y - 1", "x^2 - 4"]
    homotopy = StraightLineHomotopy.total_degree(parse_system(equations, ["x", "y"]), np.random.default_rng(seed))
    starts = homotopy.start_solutions()
    located = track_paths(homotopy, starts)
    stopped = track_paths(homotopy, starts, TrackerOptions(infinity_wanted=False))
    at_infinity = located.status == PathStatus.AT_INFINITY
    assert at_infinity.sum() == 2 and np.all(located.winding[at_infinity] == 2)
    assert np.array_equal(stopped_early(stopped.status, stopped.winding), at_infinity)
    assert not np.any(stopped_early(located.status, located.winding))  # infinity wanted: nothing stopped
    finite = stopped.status == PathStatus.CONVERGED
    ends = stopped.endpoints[finite, 1:] / stopped.endpoints[finite, :1]
    expected = _sympy_points(equations)
    assert len(ends) == len(expected) == 2
    for point in expected:
        assert np.min(np.linalg.norm(ends - point, axis=1)) <= 1e-8


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("equations", [["x*y - 1", "(100000*x - 1)^2"], ["x^2*y - 1/100000", "(100000*x - 1)^2"]])
def test_a_far_double_point_towards_the_point_at_infinity_is_found_not_stopped(equations, seed, monkeypatch):
    # the one solution, (1e-5, 1e5) (a double point), lies 1e-5 from the point (0 : 0 : 1) at infinity, where the
    # regeneration's other paths go; checked against sympy (common practice, no source)
    system = parse_system(equations, ["x", "y"])
    stopping = decompose(system, seed=seed)
    points = [np.asarray(c.points[0], dtype=complex) for c in stopping.components]
    expected = _sympy_points(equations)
    assert len(expected) == 1 and len(points) == 1
    assert np.linalg.norm(points[0] - expected[0]) <= 1e-6 * np.linalg.norm(expected[0])
    assert stopping.paths["stopped_at_infinity"] >= 1
    # the same answer as with every path through the endgame
    monkeypatch.setattr(tracker, "heading_to_infinity", lambda homotopy, p, radius, ends, opts: (
        np.zeros(len(p), dtype=bool), np.full(p.shape, np.nan, dtype=complex), np.zeros(len(p), dtype=np.int64)))
    located = decompose(system, seed=seed)
    assert "stopped_at_infinity" not in located.paths
    assert np.linalg.norm(np.asarray(located.components[0].points[0]) - points[0]) <= 1e-6 * np.linalg.norm(points[0])


def test_stopped_paths_are_counted_and_reported():
    status = [PathStatus.AT_INFINITY, PathStatus.AT_INFINITY, PathStatus.CONVERGED]
    counts = PathCounts.of(status, winding=[0, 3, 1])
    assert (counts.at_infinity, counts.stopped_at_infinity) == (2, 1)
    assert (counts + counts).report()["stopped_at_infinity"] == 2
    assert counts.by_label()["stopped_at_infinity"] == 1
    assert "stopped_at_infinity" not in PathCounts.of(status, winding=[1, 3, 1]).by_label()
