import numpy as np
import pytest

from numag.homotopy import StraightLineHomotopy
from numag.parse import parse_system
from numag.tracker import PathStatus, track_paths


def dense_system(rng, n, degree):
    names = [f"x{j}" for j in range(n)]
    equations = []
    for _ in range(n):
        # all monomials of degree <= 2 or 3 with random real coefficients (generic)
        terms = ["1"]
        for a in range(n):
            terms.append(names[a])
            for b in range(a, n):
                terms.append(f"{names[a]}*{names[b]}")
                if degree == 3:
                    for c in range(b, n):
                        terms.append(f"{names[a]}*{names[b]}*{names[c]}")
        equations.append(" + ".join(f"({rng.standard_normal():.6f})*{t}" for t in terms))
    return parse_system(equations, names)


def affine_endpoints(result):
    keep = result.status == PathStatus.CONVERGED
    return result.endpoints[keep, 1:] / result.endpoints[keep, :1]


@pytest.mark.parametrize("n, degree", [(2, 2), (3, 2), (2, 3), (4, 2)])
def test_generic_dense_system_has_bezout_many_solutions(n, degree):
    # Bezout's theorem: a generic dense system has prod(d_i) isolated solutions, none at infinity
    rng = np.random.default_rng(n * 10 + degree)
    system = dense_system(rng, n, degree)
    homotopy = StraightLineHomotopy.total_degree(system, rng)
    result = track_paths(homotopy, homotopy.start_solutions())
    counts = result.status_counts()
    assert counts["converged"] == degree ** n
    solutions = affine_endpoints(result)
    residual = np.abs(np.array([[p.evaluate(x) for p in system.polynomials] for x in solutions]))
    assert residual.max() < 1e-9
    distinct = {tuple(np.round(x, 6)) for x in solutions}
    assert len(distinct) == degree ** n
    assert np.median(result.steps) < 100  # tens of steps on benign paths, not hundreds


def test_chebyshev_roots():
    # zeros of T_n are cos((2k - 1) pi / (2 n)) (Abramowitz and Stegun, Handbook of Mathematical
    # Functions, 1964, chapter 22)
    system = parse_system(["16*x^5 - 20*x^3 + 5*x"], ["x"])  # T_5
    homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(5))
    result = track_paths(homotopy, homotopy.start_solutions())
    roots = np.sort(affine_endpoints(result)[:, 0].real)
    expected = np.sort(np.cos((2 * np.arange(1, 6) - 1) * np.pi / 10))
    assert np.abs(roots - expected).max() < 1e-12


def test_path_result_independent_of_batch():
    rng = np.random.default_rng(3)
    system = dense_system(rng, 3, 2)
    homotopy = StraightLineHomotopy.total_degree(system, rng)
    starts = homotopy.start_solutions()
    whole = track_paths(homotopy, starts)
    alone = track_paths(homotopy, starts[5:6])
    assert np.allclose(whole.endpoints[5], alone.endpoints[0], atol=1e-10)
