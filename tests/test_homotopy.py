"""Start systems and homotopies (numag.tracking.homotopy)."""

import numpy as np
import pytest

from numag.tracking.homotopy import ParameterHomotopy, StraightLineHomotopy, TotalDegreeStart
from numag.system.parse import parse_system


@pytest.mark.parametrize("degrees", [[2, 2, 2], [3, 3], [2, 3, 4]])
def test_start_values_are_the_powers_minus_the_homogenising_powers(degrees):
    # G_i = X_i^d_i - X_0^d_i, compared with the formula written out term by term (common practice, no source)
    rng = np.random.default_rng(1)
    start = TotalDegreeStart(degrees)
    points = rng.standard_normal((20, len(degrees) + 1)) + 1j * rng.standard_normal((20, len(degrees) + 1))
    expected = np.array([[p[i + 1] ** d - p[0] ** d for i, d in enumerate(degrees)] for p in points])
    assert np.allclose(start.values(points), expected, rtol=1e-13, atol=0)
    assert np.allclose(start.evaluate_parts(points)[0], expected, rtol=1e-13, atol=0)


def test_start_solutions_solve_the_start_system():
    # the prod d_i solutions X_0 = 1, X_i a d_i-th root of unity (Bezout count of paths; common practice)
    start = TotalDegreeStart([2, 3])
    solutions = start.solutions()
    assert solutions.shape == (6, 3)
    assert np.abs(start.values(solutions)).max() < 1e-14
    assert len({tuple(np.round(s, 9)) for s in solutions}) == 6


def test_value_evaluation_matches_the_full_evaluation():
    # H from the value-only path (used by the chord corrector) equals H from the full evaluation
    system = parse_system(["x^2 + y^2 - 1", "x^3 - y + 2"], ["x", "y"])
    homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(3))
    rng = np.random.default_rng(4)
    points = rng.standard_normal((10, 3)) + 1j * rng.standard_normal((10, 3))
    s = rng.random(10) + 0j
    full, _, _ = homotopy.evaluate(points, s)
    assert np.allclose(homotopy.evaluate_values(points, s), full, rtol=1e-13, atol=1e-14)


@pytest.mark.parametrize("seed", [5, 12])
def test_parameter_homotopy_on_shared_monomials_is_the_convex_combination(seed):
    # the polyhedral second stage's homotopy (start and target on the same monomials, one evaluator for
    # both): H = (1 - tau) F^h + tau G^h with tau = gamma s / (1 + (gamma - 1) s), written out from the two
    # systems' own evaluations (the gamma trick as usually stated; common practice, no source)
    rng = np.random.default_rng(seed)
    target = parse_system(["x^2*y + 3*y - 1", "x*y^2 - 2*x + 5"], ["x", "y"])
    a, b, c = rng.uniform(0.5, 2.0, 3)
    start = parse_system([f"{a:.6f}*x^2*y - {b:.6f}*y - 1", f"x*y^2 + {c:.6f}*x + 2"], ["x", "y"])
    homotopy = ParameterHomotopy.from_systems(start, target, rng, shared_evaluator=True)
    assert homotopy._joint is not None  # the shared evaluator is the one under test
    points = rng.standard_normal((8, 3)) + 1j * rng.standard_normal((8, 3))
    s = rng.random(8) + 0j
    values, jacobian, derivative = homotopy.evaluate(points, s)
    tau = homotopy.gamma * s / (1 + (homotopy.gamma - 1) * s)

    def homogeneous_values(system, point):
        x, y = point[1] / point[0], point[2] / point[0]
        return np.array([p.numeric().evaluate([x, y]) for p in system.polynomials]) * point[0] ** 3

    for k, point in enumerate(points):
        f, g = homogeneous_values(target, point), homogeneous_values(start, point)
        assert np.allclose(values[k, :2], (1 - tau[k]) * f + tau[k] * g, rtol=1e-12, atol=1e-12)
        step = 1e-6
        ahead = ParameterHomotopy.evaluate(homotopy, points[k:k + 1], s[k:k + 1] + step)[0][0, :2]
        behind = ParameterHomotopy.evaluate(homotopy, points[k:k + 1], s[k:k + 1] - step)[0][0, :2]
        assert np.allclose(derivative[k, :2], (ahead - behind) / (2 * step), rtol=1e-6, atol=1e-6)
    assert np.allclose(homotopy.evaluate_values(points, s), values, rtol=1e-13, atol=1e-14)
