"""A path called infinite on a singular zero set of the target at infinity gets a second look (decision 0121).

The system x y = 1, x z = 2, x y + x z + y = 4 has the one finite solution (1, 1, 2) (by hand: x y + x z = 3, so
y = 1, x = 1, z = 2; common practice, no source), and its top forms x y, x z, x y + x z all vanish on the line
x = 0 at infinity: a set at infinity of dimension 1, where the other paths of the total-degree start end.
"""

import numpy as np
import pytest

import numag.tracking.tracker as tracker
from numag.system.parse import parse_system
from numag.tracking.homotopy import StraightLineHomotopy
from numag.tracking.tracker import PathStatus, TrackerOptions, singular_at_infinity, track_paths

EQUATIONS = ["x*y - 1", "x*z - 2", "x*y + x*z + y - 4"]
FINITE = np.array([1, 1, 2])
OPTIONS = TrackerOptions(infinity_wanted=False)


def _homotopy(seed, unit=1):
    """The system in coordinates x -> unit x (its solution at (1, 1, 2) / unit)."""
    variables = ["x", "y", "z"]
    scaled = [e.replace("x", f"({unit}*x)").replace("y", f"({unit}*y)").replace("z", f"({unit}*z)")
              for e in EQUATIONS]
    return StraightLineHomotopy.total_degree(parse_system(scaled, variables), np.random.default_rng(seed))


def _at_radius(homotopy, starts):
    """The paths' points at s = the endgame radius, and their last samples of the test for heading to infinity."""
    count = len(starts)
    radius = np.full(count, OPTIONS.endgame_radius)
    stepper = tracker.Stepper(homotopy, starts, np.ones(count), radius, tracker._Segment, np.arange(count), OPTIONS)
    stepper.run()
    assert np.all(stepper.status == PathStatus.RUNNING)
    ends = np.full(stepper.points.shape, np.nan, dtype=complex)
    _, deep, _ = tracker.heading_to_infinity(homotopy, stepper.points, radius, ends, OPTIONS)
    return stepper.points, radius, deep


@pytest.mark.parametrize("unit", [1, 1000, 1 / 1000])
@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_finite_end_called_infinite_is_found_again(seed, unit):
    homotopy = _homotopy(seed, unit)
    starts = homotopy.start_solutions()
    result = track_paths(homotopy, starts, OPTIONS)
    finite = np.flatnonzero(result.status == PathStatus.CONVERGED)
    assert len(finite) == 1  # the one finite solution (by hand)
    # the endgame fooled as in decision 0031's lost node: the path's end put on the set at infinity, winding 1; the
    # path's deep sample of the test for heading to infinity brings it back
    wrong = np.array([[0, 0, 1, -1]], dtype=complex)
    wrong /= wrong @ homotopy.projective_patch
    assert singular_at_infinity(homotopy, wrong).tolist() == [True]
    _, _, deep = _at_radius(homotopy, starts[finite])
    endpoints, status = wrong.copy(), np.array([PathStatus.AT_INFINITY])
    steps, condition, winding = np.zeros(1, dtype=np.int64), np.full(1, np.inf), np.ones(1, dtype=np.int64)
    tracker._look_again(homotopy, np.array([0]), deep, OPTIONS, endpoints, status, steps, condition, winding)
    assert status[0] == PathStatus.CONVERGED
    point = endpoints[0, 1:] / endpoints[0, 0]
    assert np.linalg.norm(point - FINITE / unit) <= 1e-8 * np.linalg.norm(FINITE / unit)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_ends_on_the_set_at_infinity_stay_there(seed):
    homotopy = _homotopy(seed)
    starts = homotopy.start_solutions()
    result = track_paths(homotopy, starts, OPTIONS)
    # Bezout: 8 paths, 1 finite end, 7 on the line at infinity (by hand); nothing failed
    assert (result.status == PathStatus.AT_INFINITY).sum() == 7
    assert (result.status == PathStatus.CONVERGED).sum() == 1
    infinite = np.flatnonzero(result.status == PathStatus.AT_INFINITY)
    _, _, deep = _at_radius(homotopy, starts[infinite])
    # their second look (as if the endgame had called them infinite with winding 1) keeps them there
    endpoints, status = result.endpoints[infinite].copy(), result.status[infinite].copy()
    steps, condition = np.zeros(len(infinite), dtype=np.int64), np.full(len(infinite), np.inf)
    winding = np.ones(len(infinite), dtype=np.int64)
    tracker._look_again(homotopy, np.arange(len(infinite)), deep, OPTIONS, endpoints, status, steps, condition,
                        winding)
    assert np.all(status == PathStatus.AT_INFINITY)


def test_a_reduced_point_at_infinity_is_not_singular():
    # x y = 1, x z = 2, x + y + z = 0: the top forms meet at infinity only in (0 : 1 : -1), once (by hand)
    system = parse_system(["x*y - 1", "x*z - 2", "x + y + z"], ["x", "y", "z"])
    homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(0))
    point = np.array([[0, 0, 1, -1]], dtype=complex)
    assert singular_at_infinity(homotopy, point).tolist() == [False]
