"""The precision rescue's work is bounded per computation (numag.tracking.tracker.rescue_budget), not per call.

Common practice, no source: a bounded budget shared by many calls spends no more than its total.
"""

import numpy as np

from numag.system.parse import parse_system
from numag.tracking import tracker


class _FailingHomotopy:
    """Every path fails in double precision; the rescue is what is counted."""

    def __init__(self):
        self.target = parse_system(["x^2 - 2"], ["x"]).polynomials  # 2 terms
        self.evaluations = 0

    def evaluate_precise(self, point, s, ctx):  # never reached: the rescue itself is replaced below
        raise AssertionError


def _failing_track(homotopy, start_points, opts, near=None, on_step=None):
    count = len(start_points)
    status = np.full(count, tracker.PathStatus.FAILED_MIN_STEP)
    return (np.full((count, 2), np.nan, complex), status, np.zeros(count, np.int64), np.full(count, np.inf),
            np.zeros(count, np.int64), np.zeros(count, bool))


def test_calls_inside_one_block_share_the_budget(monkeypatch):
    steps_per_rescue = 10**6  # each rescue takes every step it is allowed
    rescues = []

    def fake_rescue(homotopy, start, s_start, s_end, digits, max_steps):
        rescues.append(max_steps)
        return None, min(steps_per_rescue, max_steps)

    monkeypatch.setattr(tracker, "_track", _failing_track)
    monkeypatch.setattr(tracker, "track_segment_precise", fake_rescue)
    homotopy, starts = _FailingHomotopy(), np.ones((50, 2), complex)
    # the tracker's estimate: 7 evaluations of every term and its derivatives, and of the N x N solve
    per_step = 7 * (2 * 2 + 2 ** 3)

    def work():
        return sum(min(steps_per_rescue, m) for m in rescues) * per_step

    for _ in range(3):  # alone, each call may spend up to the per-call budget
        tracker.track_paths(homotopy, starts)
    alone = work()
    assert alone >= 2.9 * tracker.RESCUE_WORK_PER_BATCH
    rescues.clear()
    total = tracker.RESCUE_WORK_PER_BATCH // 2
    with tracker.rescue_budget(total) as remaining:
        for _ in range(3):
            tracker.track_paths(homotopy, starts)
        with tracker.rescue_budget(10 * total) as inner:  # a nested block adds nothing
            assert inner is remaining
            tracker.track_paths(homotopy, starts)
    assert work() <= total
    assert remaining[0] == total - work()
