"""Sweeps in high precision (the mpmath rescue) and in balanced units.

The checks against something outside numag name their source beside them.
"""

import mpmath
import numpy as np
import pytest

from numag.families.sweep import LABEL_UNIT, SweepHomotopy, move_points, sweep
from numag.system.files import family_from_mapping
from numag.system.family import Family
from numag.system.parse import parse_system
from numag.tracking.rescue import track_segment_precise


def _tau(gamma, s):
    return gamma * s / (1 + (gamma - 1) * s)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_sweep_path_tracked_in_mpmath_follows_the_square_root(seed):
    # Along p(s) = tau p* + (1 - tau) q the solutions of x^2 - b are +-sqrt(p(s)) (common practice, no source);
    # the rescue tracks the path at 30 digits from s = 1 to s = 0.05 with the homotopy's evaluate_precise.
    rng = np.random.default_rng(seed)
    family = Family(parse_system(["x^2 - b"], ["x", "b"]), ("b",))
    start, targets = np.array([0.7 + 0.4j]), np.array([[4.0], [9.0]])
    patch = rng.standard_normal(2) + 1j * rng.standard_normal(2)
    gamma = np.exp(1j * rng.uniform(0.5, 2.5))
    homotopy = SweepHomotopy(family, start, targets, patch, gamma)
    root = np.sqrt(start[0])
    points = homotopy.start_points(np.array([[root]]))
    for k, point in enumerate(points):
        near, steps = track_segment_precise(homotopy, point, 1.0, 0.05, 30)
        assert near is not None and steps > 0
        assert round(near[-1].real / LABEL_UNIT) - 1 == k  # the label stays the value's number
        value = _tau(gamma, 0.05) * start[0] + (1 - _tau(gamma, 0.05)) * targets[k, 0]
        x = near[1] / near[0]
        assert abs(x ** 2 - value) <= 1e-12 * abs(value)
        # the branch followed is the one continuing +sqrt(p*) (closest to the principal root's continuation)
        assert abs(x - np.sqrt(value)) < abs(x + np.sqrt(value)) or abs(x + np.sqrt(value)) < 1e-3


def test_evaluate_precise_agrees_with_double():
    # mpmath at 30 digits is the reference for the double-precision rows (common practice, no source).
    rng = np.random.default_rng(0)
    family = Family(parse_system(["x^2 + b*y - 3", "x*y - b^2 + 1"], ["x", "y", "b"]), ("b",))
    homotopy = SweepHomotopy(family, np.array([0.3 + 0.2j]), np.array([[1.5], [2.5], [-0.7]]),
                             rng.standard_normal(3) + 1j * rng.standard_normal(3), np.exp(0.7j))
    points = rng.standard_normal((3, 4)) + 1j * rng.standard_normal((3, 4))
    points[:, -1] = (np.arange(3) + 1) * LABEL_UNIT
    s = np.array([0.3, 0.6, 0.9])
    values, jacobians, derivatives = homotopy.evaluate(points, s)
    for k in range(3):
        with mpmath.mp.workdps(30):
            precise = homotopy.evaluate_precise([mpmath.mpc(z.real, z.imag) for z in points[k]], mpmath.mpf(s[k]),
                                                mpmath.mp)
        got = [np.array(m.tolist(), dtype=complex) for m in precise]
        assert np.allclose(got[0].ravel(), values[k], atol=1e-13)
        assert np.allclose(got[1], jacobians[k], atol=1e-13)
        assert np.allclose(got[2].ravel(), derivatives[k], atol=1e-13)


def _four_bar_at_crank(scale):
    # ground (0, 0)-(4, 0), crank 2 held at x1 = 1, rocker 3, coupler b: all lengths times ``scale``
    s = scale
    return family_from_mapping({"variables": ["x1", "y1", "x2", "y2"], "parameters": ["b"],
                                "equations": [f"x1^2 + y1^2 = {4 * s * s}", f"(x2 - {4 * s})^2 + y2^2 = {9 * s * s}",
                                              "(x2 - x1)^2 + (y2 - y1)^2 = b^2", f"x1 = {s}"]})


@pytest.mark.parametrize("seed", [4, 5])
def test_a_sweep_in_millimetres_is_the_sweep_in_metres(seed):
    # A change of units multiplies every position by the same factor (common practice, no source): the real
    # assembly counts are equal and the positions are 1000 times larger.
    lengths = np.array([1.5, 2.5, 3.7, 4.5, 6.0])
    metres = sweep(_four_bar_at_crank(1), lengths[:, None], seed=seed)
    millimetres = sweep(_four_bar_at_crank(1000), 1000 * lengths[:, None], seed=seed)
    assert metres.failed == 0 and millimetres.failed == 0
    assert millimetres.real_counts().tolist() == metres.real_counts().tolist()
    for small, large in zip(metres.values, millimetres.values):
        assert np.allclose(large.parameters, 1000 * small.parameters)
        a = sorted(np.round(small.points, 6).tolist(), key=lambda p: [(z.real, z.imag) for z in p])
        b = sorted(np.round(large.points / 1000, 6).tolist(), key=lambda p: [(z.real, z.imag) for z in p])
        assert np.allclose(np.array(a), np.array(b), atol=1e-6)


def test_moved_points_come_back_in_the_users_units():
    # x^2 = b: moving x = 1000 from b = 10^6 to b = 4 10^6 along the real segment gives x = 2000 (common practice).
    family = Family(parse_system(["x^2 - b"], ["x", "b"]), ("b",))
    ends, failed = move_points(family, [[1e6]], [[1000.0]], [[4e6]], real_segment=True, seed=2)
    assert failed == 0 and abs(ends[0, 0] - 2000) <= 1e-8 * 2000


def _four_bar(scale):
    s = scale
    return family_from_mapping({"variables": ["x1", "y1", "x2", "y2"], "parameters": ["b"],
                                "equations": [f"x1^2 + y1^2 = {4 * s * s}", f"(x2 - {4 * s})^2 + y2^2 = {9 * s * s}",
                                              "(x2 - x1)^2 + (y2 - y1)^2 = b^2"],
                                "ranges": {"b": [0, 12 * s]}})


def test_the_four_bar_in_millimetres_has_the_discriminant_in_metres_times_1000():
    # Ground 4, crank 2, rocker 3: real discriminant points b = 0, +-1, +-3, +-5, +-9 (the Grashof equalities and
    # the collapsed coupler, common practice, no source); a change of units multiplies them by 1000 and keeps the
    # number of real assembly branches of every region.
    from numag.families.discriminant import discriminant
    metres = discriminant(_four_bar(1), seed=7)
    millimetres = discriminant(_four_bar(1000), seed=7)
    expected = np.array([-9, -5, -3, -1, 0, 1, 3, 5, 9], dtype=float)
    assert np.allclose(metres.real_points, expected, atol=1e-8)
    assert np.allclose(millimetres.real_points, 1000 * expected, atol=1e-5)
    assert [r.count.branches for r in millimetres.regions] == [r.count.branches for r in metres.regions]
    assert all(r.count.failed == 0 for r in millimetres.regions)
    for small, large in zip(metres.regions, millimetres.regions):
        assert np.allclose(large.sample, 1000 * small.sample)


class _HoleInDouble(SweepHomotopy):
    """A sweep homotopy whose double-precision rows break for s in (0.4, 0.6): only the mpmath rescue passes."""

    precise_calls = 0

    def evaluate(self, points, s):
        values, jacobian, derivative = super().evaluate(points, s)
        hole = _in_hole(s, len(points))
        values[hole] = np.nan
        jacobian[hole] = np.nan
        return values, jacobian, derivative

    def evaluate_values(self, points, s):
        values = super().evaluate_values(points, s)
        values[_in_hole(s, len(points))] = np.nan
        return values

    def evaluate_precise(self, point, s, ctx):
        type(self).precise_calls += 1
        return super().evaluate_precise(point, s, ctx)


def _in_hole(s, count):
    real = np.broadcast_to(np.real(np.asarray(s)), (count,))
    return (real > 0.4) & (real < 0.6)


@pytest.fixture
def double_with_a_hole(monkeypatch):
    import numag.families.sweep as sweep_module
    monkeypatch.setattr(sweep_module, "SweepHomotopy", _HoleInDouble)
    _HoleInDouble.precise_calls = 0
    return _HoleInDouble


@pytest.mark.parametrize("seed", [4, 9])
def test_a_sweep_that_double_precision_cannot_finish_is_finished_by_the_rescue(double_with_a_hole, seed):
    # Every path of the sweep meets the hole: each is re-tracked in mpmath and must reach +-sqrt(b) (common
    # practice, no source).
    family = Family(parse_system(["x^2 - b"], ["x", "b"]), ("b",))
    result = sweep(family, [[4.0], [9.0], [2.0]], seed=seed)
    assert result.paths["rescued_in_high_precision"] == 6 and result.failed == 0
    assert double_with_a_hole.precise_calls > 0
    for member, b in zip(result.values, (4.0, 9.0, 2.0)):
        assert np.allclose(np.sort(member.points[:, 0].real), [-b ** 0.5, b ** 0.5], atol=1e-10)
        assert member.real_count == 2


def test_a_discriminant_whose_regions_need_the_rescue(double_with_a_hole):
    # x^2 + y^2 = r: singular (at the origin) only for r = 0; one real branch (a circle) for r > 0, none for
    # r < 0 (common practice, no source). The regions' counts are three sweeps and a move of arcs, all through
    # the broken double precision: the rescue carries them.
    from numag.families.discriminant import DiscriminantOptions, discriminant
    family = Family(parse_system(["x^2 + y^2 - r"], ["x", "y", "r"]), ("r",))
    result = discriminant(family, DiscriminantOptions(at_infinity=False), seed=6)  # seed 11 alike
    assert np.allclose(result.real_points, [0.0], atol=1e-10)
    assert [(r.count.branches, r.count.failed) for r in result.regions] == [(0, 0), (1, 0)]
    assert double_with_a_hole.precise_calls > 0
