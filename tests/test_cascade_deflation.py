"""Regeneration of points on a component along which the equations so far lose rank (decision 0066).

V(x - y^2, y^3) is the z-axis counted three times (x = y^2 and y^3 = 0 near every point of it); its witness
point is regenerated towards z^4 - 1. On the undeflated equations that move is singular all the way and its
paths stopped at the minimum step (seed 1: one of the four points found, three paths failed).
"""

import numpy as np
import pytest

from numag.system.parse import parse_system
from numag.witness.cascade import Slicing, _deflated_rows
from numag.witness.decompose import decompose


@pytest.mark.parametrize("seed", [1, 2, 3, 4])
def test_points_over_a_triple_line_are_all_found(seed):
    system = parse_system(["x - y^2", "y^3", "z^4 - 1"], ["x", "y", "z"])
    found = decompose(system, seed=seed)
    # common practice, no source (worked out by hand): y^3 = 0 gives y = 0, then x = y^2 = 0 and z^4 = 1,
    # the four points (0, 0, i^k)
    points = np.array([c.points[0] for c in found.components if c.dimension == 0])
    assert len(found.components) == len(points) == 4
    assert np.allclose(points[:, :2], 0, atol=1e-6)
    assert np.allclose(points[:, 2] ** 4, 1, atol=1e-6)
    assert len({tuple(np.round(p, 3)) for p in points[:, 2:]}) == 4
    failed = sum(found.paths.get(label, 0) for label in ("minimum_step", "step_limit", "non_finite",
                                                           "endgame_unsettled", "batch_failed"))
    assert failed == 0


def test_only_points_on_the_rank_deficient_component_are_deflated():
    # common practice, no source: the Jacobian of (x - y^2, y^3) has rank 1 on the z-axis, 2 off it
    system = parse_system(["x - y^2", "y^3", "z^4 - 1"], ["x", "y", "z"])
    slicing = Slicing(system, np.random.default_rng(0))
    on_axis, off_axis = [0, 0, 0.3 + 0.1j], [0.04, 0.2, 0.3]
    rows, deficient = _deflated_rows(slicing, [0, 1], 2, np.array([on_axis, off_axis], dtype=complex), 1e-6)
    assert deficient.tolist() == [True, False]
    assert rows is not None and len(rows) == 2
    # the deflated rows keep the axis and have full rank 2 on it
    from numag.numeric.evaluate import BatchEvaluator
    values, jacobian = BatchEvaluator(rows).evaluate(np.array([[1.0, 0, 0, 0.7 - 0.2j]]))
    assert np.allclose(values, 0, atol=1e-12)
    assert np.linalg.matrix_rank(jacobian[0][:, 1:], tol=1e-8) == 2
