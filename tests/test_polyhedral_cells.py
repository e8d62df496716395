"""The mixed-cell search's own simplex against scipy's linprog (HiGHS), program by program and cell by cell."""

import numpy as np
import pytest
from scipy.optimize import linprog

from numag.numeric.feasibility import feasible, feasible_batch
from numag.tracking.polyhedral import LinearProgramSolver, mixed_cells


def _linprog_feasible(equalities, equality_rhs, inequalities, inequality_rhs):
    n = inequalities.shape[1]
    outcome = linprog(np.zeros(n), A_ub=inequalities, b_ub=inequality_rhs,
                      A_eq=equalities if len(equalities) else None, b_eq=equality_rhs if len(equalities) else None,
                      bounds=(None, None), method="highs")
    return outcome.status == 0


@pytest.mark.parametrize("n, k, m, seed", [(3, 0, 10, 0), (4, 1, 12, 1), (6, 2, 20, 2), (8, 3, 30, 3),
                                           (5, 4, 9, 4), (7, 5, 25, 5), (8, 7, 30, 6)])
def test_batched_feasibility_agrees_with_linprog(n, k, m, seed):
    # reference: scipy's linprog with HiGHS, a general-purpose library (common practice, no source);
    # small integer rows make parallel and zero rows (dependent equalities) common; the first half of the
    # programs are feasible by construction (right-hand sides from a point, with slack), the rest have
    # right-hand sides drawn around 0 (mostly infeasible)
    rng = np.random.default_rng(seed)
    count = 150
    equalities = rng.integers(-2, 3, size=(count, k, n)).astype(float)
    equality_rhs = rng.random((count, k))
    inequalities = rng.integers(-2, 3, size=(count, m, n)).astype(float)
    inequality_rhs = rng.random((count, m)) - 0.2
    points = rng.standard_normal((count // 2, n))
    equality_rhs[:count // 2] = np.einsum("bkn,bn->bk", equalities[:count // 2], points)
    inequality_rhs[:count // 2] = np.einsum("bmn,bn->bm", inequalities[:count // 2], points) + rng.random((count // 2, m))
    ours = feasible_batch(equalities, equality_rhs, inequalities, inequality_rhs)
    reference = np.array([_linprog_feasible(equalities[b], equality_rhs[b], inequalities[b], inequality_rhs[b])
                          for b in range(count)])
    assert np.array_equal(ours, reference)
    assert ours[:count // 2].all() and not ours[count // 2:].all()


def test_single_programs_with_dependent_equalities():
    # x + y = 1 twice is one line; x + y = 1 and x + y = 2 is empty; both with x, y >= 0 (by hand)
    nonnegative = -np.eye(2)
    twice = np.array([[1.0, 1.0], [2.0, 2.0]])
    assert feasible(twice, np.array([1.0, 2.0]), nonnegative, np.zeros(2))
    assert not feasible(twice, np.array([1.0, 4.0]), nonnegative, np.zeros(2))
    assert not feasible(np.array([[1.0, 1.0]]), np.array([-1.0]), nonnegative, np.zeros(2))


@pytest.mark.parametrize("n, seed", [(2, 0), (3, 1), (3, 2), (4, 3), (4, 4)])
def test_mixed_cells_of_the_own_simplex_equal_those_of_linprog(n, seed):
    # the same lifting must give the same cells (edges, volumes, normals) whichever solver decides the
    # programs; reference: scipy's linprog with HiGHS (common practice, no source)
    rng = np.random.default_rng(seed)
    supports = []
    while len(supports) < n:
        support = np.unique(rng.integers(0, 4, size=(rng.integers(3, 7), n)), axis=0)
        if len(support) >= 2:
            supports.append(support)
    liftings = [rng.random(len(s)) for s in supports]
    ours, ours_programs = mixed_cells(supports, liftings, LinearProgramSolver.SIMPLEX)
    reference, reference_programs = mixed_cells(supports, liftings, LinearProgramSolver.HIGHS)
    assert ours_programs == reference_programs
    assert sorted((c.pairs, c.volume) for c in ours) == sorted((c.pairs, c.volume) for c in reference)
    assert sum(c.volume for c in ours) == sum(c.volume for c in reference)
    normals = {c.pairs: c.normal for c in reference}
    for cell in ours:
        assert np.allclose(cell.normal, normals[cell.pairs], atol=1e-9)
