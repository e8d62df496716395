"""The candidate systems' regeneration moves start their endgame at a smaller radius (decision 0085).

The singular locus decomposes its candidate system (F and the minors) with ``moved_endgame_radius``
(:data:`numag.singular.locus.CANDIDATE_ENDGAME_RADIUS`): the same singular points as with the tracker's own
radius, found with fewer endgame loops.
"""

import math

import numpy as np
import pytest

from numag.errors import InputError
from numag.singular import locus
from numag.singular.locus import singular_locus
from numag.system.parse import parse_system
from numag.witness.cascade import WitnessOptions


def two_change_point_loops():
    """A crank A (|A| = 2) driving two four-bars, the second through A turned by 90 degrees, C = (-ay, ax).

    Each loop has ground 4, coupler 3, rocker 3 (pivot (4, 0)): crank + ground = coupler + rocker, a Grashof
    change point (common practice, no source), so a loop folds where its crank tip is at (-2, 0), its rocker
    tip then at (1, 0), while the other loop has its two assembly positions.
    """
    equations = ["ax^2 + ay^2 - 4", "(bx - 4)^2 + by^2 - 9", "(ax - bx)^2 + (ay - by)^2 - 9",
                 "(dx - 4)^2 + dy^2 - 9", "(-ay - dx)^2 + (ax - dy)^2 - 9"]
    return parse_system(equations, ["ax", "ay", "bx", "by", "dx", "dy"], name="two loops")


def _assembly(tip):
    """The two points at distance 3 from both the pivot (4, 0) and ``tip`` (worked out by hand: on the
    perpendicular bisector, at height sqrt(9 - d^2 / 4) over the midpoint)."""
    pivot = np.array([4.0, 0.0])
    middle, along = (pivot + tip) / 2, tip - pivot
    half = np.linalg.norm(along) / 2
    normal = np.array([-along[1], along[0]]) / np.linalg.norm(along)
    height = math.sqrt(9 - half ** 2)
    return [middle + height * normal, middle - height * normal]


def expected_folds():
    """The 4 singular configurations (ax, ay, bx, by, dx, dy) by construction."""
    folds = []
    for b in _assembly(np.array([0.0, -2.0])):  # loop 1 folded: A = (-2, 0), C = (0, -2)
        folds.append([-2.0, 0.0, 1.0, 0.0, b[0], b[1]])
    for b in _assembly(np.array([0.0, 2.0])):  # loop 2 folded: C = (-2, 0), so A = (0, 2)
        folds.append([0.0, 2.0, b[0], b[1], 1.0, 0.0])
    return np.array(folds)


def _points(found):
    return sorted([tuple(np.round(np.asarray(c.points[0]).real, 6) + 0.0) for c in found.components
                   if c.dimension == 0 and not c.at_infinity])


@pytest.mark.parametrize("seed", [1, 2])
def test_candidates_with_the_smaller_endgame_radius_give_the_folds(seed, monkeypatch):
    system = two_change_point_loops()
    found = singular_locus(system, seed=seed)
    expected = expected_folds()
    points = np.array(_points(found))
    assert points.shape == expected.shape
    for point in expected:  # each fold found, to 1e-6 (by construction, worked out by hand)
        assert np.min(np.linalg.norm(points - point, axis=1)) <= 1e-6
    assert not any(found.paths.get(label, 0) for label in ("minimum_step", "step_limit", "endgame_unsettled"))
    # the tracker's own radius (0.1) for the candidates gives the same points
    monkeypatch.setattr(locus, "CANDIDATE_ENDGAME_RADIUS", 0.1)
    assert _points(singular_locus(system, seed=seed)) == _points(found)


def test_moved_endgame_radius_is_checked():
    with pytest.raises(InputError, match="moved_endgame_radius"):
        WitnessOptions(moved_endgame_radius=0.0)
    with pytest.raises(InputError, match="moved_endgame_radius"):
        WitnessOptions(moved_endgame_radius=2.0)
    assert WitnessOptions(moved_endgame_radius=1e-3).moved_endgame_radius == 1e-3
