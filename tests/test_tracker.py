import numpy as np
import pytest

from numag.tracking.homotopy import StraightLineHomotopy
from numag.system.parse import parse_system
from numag.errors import InputError
from numag.tracking.tracker import PathStatus, track_paths


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


class _HoleInDouble(StraightLineHomotopy):
    """A homotopy whose double-precision evaluation breaks for s in (0.4, 0.6): only the rescue can pass."""

    def evaluate(self, points, s):
        values, jacobian, derivative = super().evaluate(points, s)
        hole = (np.real(s) > 0.4) & (np.real(s) < 0.6)
        values[hole] = np.nan
        jacobian[hole] = np.nan
        return values, jacobian, derivative


def test_precision_rescue_tracks_paths_double_precision_cannot():
    system = parse_system(["x^2 - 2", "y^2 - 3"], ["x", "y"])
    plain = StraightLineHomotopy.total_degree(system, np.random.default_rng(4))
    broken = _HoleInDouble(plain.target, plain.start, plain.patch, plain.gamma)
    result = track_paths(broken, broken.start_solutions())
    assert result.status_counts()["converged"] == 4
    assert np.all(result.retracked) and np.all(result.digits == 40)
    solutions = result.endpoints[:, 1:] / result.endpoints[:, :1]
    # the roots of x^2 = 2, y^2 = 3 (common practice, no source)
    assert np.allclose(np.abs(solutions), [[2 ** 0.5, 3 ** 0.5]] * 4, rtol=1e-12, atol=0)


def test_precise_segment_agrees_with_double():
    system = parse_system(["x^2 + x*y - 1", "y^2 - x - 2"], ["x", "y"])
    homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(6))
    from numag.tracking.rescue import track_segment_precise
    from numag.tracking.tracker import Stepper, TrackerOptions, _Segment
    start = homotopy.start_solutions()[:1]
    stepper = Stepper(homotopy, start, np.ones(1), np.full(1, 0.1), _Segment, np.arange(1), TrackerOptions())
    stepper.run()
    double, status = stepper.points, stepper.status
    precise, _ = track_segment_precise(homotopy, start[0], 1.0, 0.1, 30)
    assert status[0] == 0 and np.abs(precise - double[0]).max() < 1e-8


def test_one_pass_keeps_each_path_within_the_endgame_radius():
    # The single pass from s = 1 to 0 keeps each path's first point with s in [0.025, 0.1] (the endgame
    # radius and the next one it would try): that point solves H(X, s) = 0 at its own s, and tracking on
    # from it alone reaches the same endpoint (common practice, no source).
    from numag.tracking.tracker import Stepper, TrackerOptions, _Segment
    system = dense_system(np.random.default_rng(4), 3, 2)
    homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(4))
    starts = homotopy.start_solutions()
    count, options = len(starts), TrackerOptions()
    window = (options.endgame_radius, options.endgame_radius * options.endgame_shrink)
    stepper = Stepper(homotopy, starts, np.ones(count), np.zeros(count), _Segment, np.arange(count), options,
                      window=window)
    stepper.run()
    final, t, status, passed, near, near_t = (stepper.points, stepper.t, stepper.status, stepper.passed,
                                              stepper.kept, stepper.kept_t)
    assert passed.all() and (status == PathStatus.RUNNING).all() and (t == 0).all()
    assert np.all((near_t <= window[0]) & (near_t >= window[1]))
    assert len(np.unique(near_t)) > 1  # the steps were not all cut to land on one radius
    values = homotopy.evaluate_values(near, near_t.astype(complex))
    assert np.abs(values).max() < 1e-5
    again_stepper = Stepper(homotopy, near, near_t, np.zeros(count), _Segment, np.arange(count), options)
    again_stepper.run()
    again, status_again = again_stepper.points, again_stepper.status
    assert (status_again == PathStatus.RUNNING).all()
    assert np.abs(again - final).max() < 1e-5 * (1 + np.abs(final).max())


def test_one_circle_vouches_for_its_own_endgame_estimate():
    # y = x^2 and y = x^3 - x^2 meet where x^2 (2 - x) = 0: the origin with multiplicity 2 and (2, 4);
    # the other three of the 2 x 3 total-degree paths go to infinity (worked by hand). The Cauchy endgame's mean of N samples on a circle has an error ~ q^N, so the
    # means of N/2 and N/4 samples tell how good it is (trapezoidal rule on a periodic analytic
    # function: Trefethen and Weideman, SIAM Review, 2014): the endgame settles after fewer circles
    # than when it must wait for two radii to agree, and ends at the same point.
    from dataclasses import replace
    from numag.tracking.tracker import TrackerOptions
    system = parse_system(["y - x^2", "y + x^2 - x^3"], ["x", "y"])
    homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(2))
    starts = homotopy.start_solutions()
    with_check = track_paths(homotopy, starts, TrackerOptions())
    # 18 samples per loop: not a multiple of 4, so only the agreement of two radii settles a path
    radii_only = track_paths(homotopy, starts, replace(TrackerOptions(), endgame_samples=18))
    singular = with_check.status == PathStatus.SINGULAR_ENDPOINT
    assert singular.sum() == 2 and (radii_only.status[singular] == PathStatus.SINGULAR_ENDPOINT).all()
    for result in (with_check, radii_only):
        ends = result.endpoints[singular]
        affine = ends[:, 1:] / ends[:, :1]
        assert np.abs(affine).max() < 1e-8
    assert with_check.steps[singular].sum() < radii_only.steps[singular].sum()


def test_the_rescue_predicts_with_the_steppers_tableau():
    # The rescue takes its predictor from the tableau it is given: with the explicit Euler method (order 1,
    # common practice, no source) it still reaches the same point as the batched stepper with RK4, in more steps.
    from numag.tracking.methods import ButcherTableau, HalvingStepRule
    from numag.tracking.rescue import track_segment_precise
    from numag.tracking.tracker import Stepper, TrackerOptions, _Segment
    system = parse_system(["x^2 + x*y - 1", "y^2 - x - 2"], ["x", "y"])
    homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(6))
    start = homotopy.start_solutions()[:1]
    stepper = Stepper(homotopy, start, np.ones(1), np.full(1, 0.1), _Segment, np.arange(1), TrackerOptions())
    stepper.run()
    euler = ButcherTableau(nodes=(0.0,), coupling=((),), weights=(1.0,), denominator=1.0, order=1)
    rk4_point, rk4_steps = track_segment_precise(homotopy, start[0], 1.0, 0.1, 30)
    euler_point, euler_steps = track_segment_precise(homotopy, start[0], 1.0, 0.1, 30, method=euler)
    # both corrected to 10^-20 at 30 digits; the batched stepper's corrector stops at 1e-6 relative
    assert np.abs(rk4_point - euler_point).max() < 1e-12 and np.abs(euler_point - stepper.points[0]).max() < 1e-5
    assert euler_steps > rk4_steps
    with pytest.raises(InputError, match="contraction"):
        HalvingStepRule(contraction=1.0)



@pytest.mark.parametrize("seed", range(4))
def test_a_tenfold_point_of_a_binary_form_is_found_with_winding_number_ten(seed):
    # 11264 y^10 on the projective line (the partials of T9(x) - T11(y) on the line at infinity) has the one
    # zero (1:0), of multiplicity 10 (worked by hand): all 10 paths end there in one cycle of winding number
    # 10. The endgame's first circles have |u| = r^(1/10) near 0.7, where a pole of the random patch can lie:
    # a mean off the target is taken again in the chart of the largest coordinate.
    from numag.system.polynomial import PolynomialSystem
    system = parse_system(["11264*y^10"], ["x", "y"])
    projective = PolynomialSystem(["x", "y"], system.polynomials, projective=True)
    homotopy = StraightLineHomotopy.total_degree(projective, np.random.default_rng(seed))
    result = track_paths(homotopy, homotopy.start_solutions())
    assert (result.status == PathStatus.SINGULAR_ENDPOINT).all()
    assert (result.winding == 10).all()
    lines = result.endpoints / result.endpoints[:, :1]
    assert np.abs(lines[:, 1]).max() < 1e-8
