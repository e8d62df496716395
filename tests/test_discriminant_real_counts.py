"""Real counts of a family's members: never a wrong count with nothing flagged (decision 0104).

Two circles x^2 + y^2 = r^2 and (x - d)^2 + y^2 = q^2 (r = 1/1000, d = p/10^6) meet in two real points when
|r - |q|| < d < r + |q| and in none when d or |q| lies outside (elementary geometry: common practice, no
source); every member has the circular points (1 : +-i : 0) at infinity (common practice, no source). A path that
jumped onto one of them had lost a real solution, and a lone non-real point was called real: "1 real solution"
on p = 5000, q in (-0.004, 0.004), exit 0.
"""

import numpy as np
import pytest

from numag.families.discriminant import DiscriminantOptions, discriminant
from numag.families.sweep import SweepHomotopy, judge_real, sweep
from numag.system.exact import ExactCoefficient
from numag.system.files import family_from_mapping


def _square(unit):
    """unit^2 written exactly in the grammar (units 10^k)."""
    return f"{int(unit) ** 2}" if unit >= 1 else f"1/{int(round(1 / unit)) ** 2}"


def circles(unit, p=None):
    """The family with x, y, p, q measured in ``unit`` (ranges scaled too); with ``p`` given, its line p = p * unit."""
    equations = [f"x^2 + y^2 - ({_square(unit)})/10^6", "(x - p/10^6)^2 + y^2 - q^2"]
    family = family_from_mapping({"variables": ["x", "y"], "parameters": ["p", "q"], "equations": equations,
                                  "ranges": {"p": [0, 5000 * unit], "q": [0, 0.005 * unit]}})
    return family if p is None else family.restricted(0, ExactCoefficient.from_complex(float(p * unit)))


def exact_count(p, q, unit):
    """Real meeting points of the two circles (closed form above; p, q in the family's units)."""
    r, d, q = 1e-3 * unit, p / 1e6, abs(q)
    return 2 if abs(r - q) < d < r + q else 0


def assert_right_or_flagged(count, expected, where):
    assert not count.sure or count.solutions == expected, f"{where}: {count.solutions} real, true {expected}"


@pytest.mark.parametrize("unit", [1, 1000, 0.001])
@pytest.mark.parametrize("seed", [1, 2, 3])
def test_the_regions_of_the_line_p_5000_have_the_real_counts_of_the_circles(unit, seed):
    result = discriminant(circles(unit, p=5000), seed=seed)
    # the circles touch where |q| = 6/1000 or 4/1000 (closed form above)
    assert np.allclose(np.sort(result.real_points), np.array([-6, -4, 4, 6]) * 1e-3 * unit, rtol=1e-6, atol=0)
    assert len(result.regions) == 5
    for region in result.regions:
        assert_right_or_flagged(region.count, exact_count(5000 * unit, region.sample[0], unit),
                                f"q in ({region.low}, {region.high})")


def test_every_cell_of_the_two_parameter_family_has_the_real_count_of_the_circles():
    result = discriminant(circles(1), DiscriminantOptions(curve=False), seed=1)
    assert len(result.regions) >= 5 * 6 + 3
    for region in result.regions:
        p, q = region.sample
        assert_right_or_flagged(region.count, exact_count(p, q, 1), f"p = {p}, q = {q}")


# seeds 13 and 14 (unit 1): before decision 0104 one path of a member here jumped onto a circular point
@pytest.mark.parametrize("unit, seed", [(1, 1), (1000, 2), (0.001, 3), (1, 13), (1, 14)])
def test_a_sweep_along_the_line_never_miscounts_without_a_flag(unit, seed):
    # q off the tangencies +-0.004, +-0.006 (and the member q = 0, where the second circle is a point)
    values = np.array([-0.0065, -0.005, 5.55e-19, 0.001, 0.003, 0.005, 0.0065, 0.0])[:, None] * unit
    result = sweep(circles(unit, p=5000), values, seed=seed)
    for member, value in zip(result.values, values[:, 0]):
        sure = member.failed == 0 and member.undecided == 0
        assert not sure or member.real_count == exact_count(5000 * unit, value, unit), f"q = {value}"


def test_a_lone_non_real_point_is_undecided_and_a_conjugate_pair_is_not_real():
    pair = np.array([[2.6 + 0j, -2.4j], [2.6 + 0j, 2.4j]])
    real, undecided = judge_real(pair, complete=True)
    assert not real.any() and not undecided.any()
    real, undecided = judge_real(pair[:1], complete=False)
    assert not real.any() and undecided.all()
    # a real solution near a fold is computed to about the square root of the precision: real by separation
    near_fold = np.array([[1 + 1e-7j], [1.001 - 1e-7j], [5 + 2j], [5 - 2j]])
    real, undecided = judge_real(near_fold, complete=True)
    assert real.tolist() == [True, True, False, False] and not undecided.any()
    # the same with a path lost: the two near the fold are neither real for sure nor a pair
    real, undecided = judge_real(near_fold, complete=False)
    assert real.tolist() == [False, False, False, False] and undecided.tolist() == [True, True, False, False]


def test_the_circular_points_are_stationary_points_of_a_sweep_and_a_meeting_point_is_not():
    # millimetres: numbers of order one, as in the balanced units a sweep tracks in (decision 0002)
    unit = 1000
    family = circles(unit, p=5000)
    homotopy = SweepHomotopy(family, np.array([0.3 + 0.7j]) * 1e-3 * unit, np.array([[0.005 * unit]]),
                             np.ones(3) / 3, 1.0)
    label = 1e-9  # the first value's label (LABEL_UNIT)
    circular = np.array([[0, 1, 1j, label], [0, 1, -1j, label]], dtype=complex)
    # the circles meet at x = 1/10^4, y = +-sqrt(99)/10^4 (times the unit) at q = 5/1000: a point of one member
    meeting = np.array([[1, 1e-4 * unit, np.sqrt(99) * 1e-4 * unit, label]], dtype=complex)
    assert homotopy.stationary(circular).tolist() == [True, True]
    assert homotopy.stationary(meeting).tolist() == [False]
    assert homotopy.target_residual(meeting)[0] < 1e-12


def test_an_undecided_count_is_saved_and_printed_as_undecided():
    from numag.app.commands.discriminant import _unsure_text
    from numag.families.branches import RealCount
    from numag.families.discriminant import Region

    region = Region(-0.004, 0.004, np.array([0.0]), RealCount(solutions=1, undecided=1))
    again = Region.from_dict(region.to_dict())
    assert again.count.undecided == 1 and not again.count.sure
    assert "undecided" in _unsure_text(again.count) and _unsure_text(RealCount(solutions=0)) == ""


def test_a_doubtful_branch_count_is_counted_again_and_only_a_lasting_doubt_is_undecided(monkeypatch):
    # x^2 + y^2 = r: one real branch (a circle) for r > 0, none for r < 0 (common practice, no source). The first
    # count of the sample r = 1 is made doubtful the way a missed arc makes it (3 branches, an arc end failed).
    import numag.families.branches as branches

    family = family_from_mapping({"variables": ["x", "y"], "parameters": ["r"], "equations": ["x^2 + y^2 - r"]})
    honest = branches._branches
    calls = []

    def first_run_misses(family, samples, rng, spoil=1):
        counts = honest(family, samples, rng)
        calls.append(len(samples))
        if len(calls) <= spoil:
            counts[0] = branches.RealCount(branches=3, failed=1)
        return counts

    for seed in (1, 2, 3):
        calls.clear()
        monkeypatch.setattr(branches, "_branches", first_run_misses)
        counts = branches.real_counts(family, [[1.0], [-1.0], [4.0]], seed=seed)
        assert [c.branches for c in counts] == [1, 0, 1] and all(c.sure for c in counts)
        assert calls == [3, 1]  # only the doubtful sample is counted again
        calls.clear()
        monkeypatch.setattr(branches, "_branches", lambda f, s, g: first_run_misses(f, s, g, spoil=2))
        counts = branches.real_counts(family, [[1.0], [-1.0]], seed=seed)
        assert not counts[0].sure and counts[1].branches == 0 and counts[1].sure
