"""The regeneration's one-point linear moves solved against the same moves tracked (decisions 0123, 0129)."""

import numpy as np
import pytest

from numag.system.parse import parse_system
from numag.tracking.tracker import TrackerOptions
from numag.witness import cascade
from numag.witness.cascade import _linear_move, linear_form, random_rows, track_moves, witness_supersets

from conftest import load_problems


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("n", [1, 3, 9])
def test_solved_move_ends_where_the_tracked_move_ends_with_the_same_draws(n, seed):
    # n random hyperplanes meet in one point, and the homotopy between two such systems carries the start's point to
    # the target's (a linear homotopy of regular square systems; common practice, no source).
    rng = np.random.default_rng(seed)
    start, target = random_rows(rng, n, n + 1), random_rows(rng, n, n + 1)
    target[1:] = start[1:]  # a move changes one row, as the regeneration's first equation does
    point = np.linalg.solve(start[:, 1:], -start[:, 0])[None, :]
    tracked_rng, solved_rng = np.random.default_rng(seed + 10), np.random.default_rng(seed + 10)
    run = track_moves([linear_form(r) for r in start], [linear_form(r) for r in target], point, tracked_rng,
                      TrackerOptions())
    solved = _linear_move(target[1:], target[0], point, solved_rng)
    exact = np.linalg.solve(target[:, 1:], -target[:, 0])
    assert np.allclose(run.affine_endpoints()[0], exact, rtol=1e-10, atol=1e-10)
    assert np.allclose(solved[0], exact, rtol=1e-12, atol=1e-12)
    assert solved_rng.bit_generator.state == tracked_rng.bit_generator.state  # later homotopies draw the same


def _witness_points(system, seed):
    sets = witness_supersets(system, seed=seed).sets
    return {s.dimension: s.points for s in sets}


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("name", ["chebyshev_T4x_eq_T5y", "two_quadrics_union", "whitney_umbrella"])
def test_solved_moves_give_the_tracked_moves_witness_points(name, seed, monkeypatch):
    # Witness points are the points of X on fixed random slices: however the paths ran, the cascade with the moves
    # solved and with them tracked must end with the same points (the shared problems' degrees are in
    # tests/data/problems.json; here the two runs are compared with each other; common practice, no source).
    entry = load_problems()[name]
    system = parse_system(entry["equations"], entry["variables"], projective=entry["projective"])
    solved = _witness_points(system, seed)
    monkeypatch.setattr(cascade, "_linear_move", lambda *args: None)  # every move tracked, as before 0123
    tracked = _witness_points(system, seed)
    assert sorted(solved) == sorted(tracked)
    for dimension, points in solved.items():
        other = tracked[dimension]
        assert len(points) == len(other)
        if len(points):
            distances = np.abs(points[:, None, :] - other[None, :, :]).max(axis=2)
            assert np.all(distances.min(axis=1) <= 1e-8 * (1 + np.abs(points).max(axis=1)))
