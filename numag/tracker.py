"""The batched path tracker: every path of a batch moves together as numpy arrays.

Each path carries its own parameter value s (from 1 down to 0) and step size.
One step: a fourth-order Runge-Kutta predictor on dX/ds = -H_X^{-1} H_s,
then up to three Newton corrections at the new s. The step is accepted when the
corrections contract and end small; it then grows after a run of successes,
and is halved on failure. Python loops run over steps, never over paths.

Statuses (:class:`PathStatus`): converged, singular endpoint, at infinity,
and three kinds of failure (minimum step, step limit, non-finite values).

Examples
--------
>>> import numpy as np
>>> from numag.parse import parse_system
>>> from numag.homotopy import StraightLineHomotopy
>>> system = parse_system(["x^2 - 2", "y^2 - x"], ["x", "y"])
>>> homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(0))
>>> result = track_paths(homotopy, homotopy.start_solutions())
>>> sorted(result.status_counts().items())[:2]
[('at_infinity', 0), ('converged', 4)]
"""

from dataclasses import dataclass, field
import enum

import numpy as np

__all__ = ["PathStatus", "TrackerOptions", "TrackResult", "track_paths"]


class PathStatus(enum.IntEnum):
    """How a path ended."""

    RUNNING = 0
    CONVERGED = 1
    SINGULAR_ENDPOINT = 2
    AT_INFINITY = 3
    FAILED_MIN_STEP = 4
    FAILED_STEP_LIMIT = 5
    FAILED_NONFINITE = 6

    @property
    def failed(self):
        """True for the failure statuses."""
        return self >= PathStatus.FAILED_MIN_STEP

    @property
    def label(self):
        """Name used in reports."""
        return _LABELS[self]


_LABELS = {
    PathStatus.RUNNING: "running",
    PathStatus.CONVERGED: "converged",
    PathStatus.SINGULAR_ENDPOINT: "singular_endpoint",
    PathStatus.AT_INFINITY: "at_infinity",
    PathStatus.FAILED_MIN_STEP: "minimum_step",
    PathStatus.FAILED_STEP_LIMIT: "step_limit",
    PathStatus.FAILED_NONFINITE: "non_finite",
}


@dataclass(frozen=True)
class TrackerOptions:
    """Tracker settings (declared once).

    Attributes
    ----------
    initial_step, max_step, min_step : float
        Step sizes in s.
    corrector_tolerance : float
        Relative size of the last Newton correction for a step to be accepted.
    max_steps : int
        Step limit per path.
    growth_after : int
        Consecutive successes before the step doubles.
    infinity_threshold : float
        |X_0| / ||X|| below this at s = 0 means the endpoint is at infinity.
    singular_condition : float
        Condition number above which a finite endpoint is singular.
    """

    initial_step: float = 0.05
    max_step: float = 0.2
    min_step: float = 1e-12
    corrector_tolerance: float = 1e-9
    max_steps: int = 2000
    growth_after: int = 3
    infinity_threshold: float = 1e-8
    singular_condition: float = 1e8


@dataclass
class TrackResult:
    """Endpoints and statuses of a batch of paths.

    Attributes
    ----------
    endpoints : ndarray, shape (P, n + 1)
        Homogeneous endpoints on the patch.
    status : ndarray of int, shape (P,)
        :class:`PathStatus` values.
    steps : ndarray of int, shape (P,)
        Accepted plus rejected steps per path.
    condition : ndarray, shape (P,)
        Condition number of H_X at the endpoint (s = 0).
    s_final : ndarray, shape (P,)
        Parameter value where each path stopped (0 unless it failed).
    evaluations : int
        Batched evaluations of H made.
    """

    endpoints: np.ndarray
    status: np.ndarray
    steps: np.ndarray
    condition: np.ndarray
    s_final: np.ndarray
    evaluations: int = 0
    extra: dict = field(default_factory=dict)

    def status_counts(self):
        """Number of paths per status label (failures by reason), every label present."""
        return {PathStatus(code).label: int(np.sum(self.status == code)) for code in PathStatus
                if code != PathStatus.RUNNING}


def _solve(jacobian, rhs):
    try:
        return np.linalg.solve(jacobian, rhs[..., None])[..., 0]
    except np.linalg.LinAlgError:
        result = np.full(rhs.shape, np.nan, dtype=complex)
        for k in range(len(rhs)):  # only when some matrix is exactly singular: the rare stragglers
            try:
                result[k] = np.linalg.solve(jacobian[k], rhs[k])
            except np.linalg.LinAlgError:
                pass
        return result


def _velocity(homotopy, points, s):
    _, jacobian, derivative = homotopy.evaluate(points, s)
    return -_solve(jacobian, derivative)


def track_paths(homotopy, start_points, options=None):
    """Track every start point from s = 1 to s = 0 together.

    Parameters
    ----------
    homotopy : StraightLineHomotopy (or any object with the same ``evaluate``)
    start_points : ndarray, shape (P, N)
    options : TrackerOptions, optional

    Returns
    -------
    TrackResult
    """
    opts = options or TrackerOptions()
    points = np.array(start_points, dtype=complex, copy=True)
    count = len(points)
    s = np.ones(count)
    step = np.full(count, opts.initial_step)
    successes = np.zeros(count, dtype=np.int64)
    steps = np.zeros(count, dtype=np.int64)
    status = np.zeros(count, dtype=np.int64)
    evaluations_before = homotopy.evaluations
    while True:
        active = np.nonzero((status == PathStatus.RUNNING) & (s > 0))[0]
        if len(active) == 0:
            break
        x, t = points[active], s[active]
        h = np.minimum(step[active], t)
        # fourth-order Runge-Kutta predictor in s (moving towards 0)
        k1 = _velocity(homotopy, x, t)
        k2 = _velocity(homotopy, x - 0.5 * h[:, None] * k1, t - 0.5 * h)
        k3 = _velocity(homotopy, x - 0.5 * h[:, None] * k2, t - 0.5 * h)
        k4 = _velocity(homotopy, x - h[:, None] * k3, t - h)
        predicted = x - (h[:, None] / 6.0) * (k1 + 2 * k2 + 2 * k3 + k4)
        target = np.maximum(t - h, 0.0)
        corrected, ok = _correct(homotopy, predicted, target, opts.corrector_tolerance)
        steps[active] += 1
        accepted = ok & np.all(np.isfinite(corrected), axis=1)
        index = active[accepted]
        points[index] = corrected[accepted]
        s[index] = target[accepted]
        successes[index] += 1
        grow = index[successes[index] >= opts.growth_after]
        step[grow] = np.minimum(2 * step[grow], opts.max_step)
        successes[grow] = 0
        rejected = active[~accepted]
        step[rejected] *= 0.5
        successes[rejected] = 0
        status[rejected[step[rejected] < opts.min_step]] = PathStatus.FAILED_MIN_STEP
        over = active[(steps[active] >= opts.max_steps) & (status[active] == PathStatus.RUNNING)]
        status[over] = PathStatus.FAILED_STEP_LIMIT
        bad = active[~np.all(np.isfinite(points[active]), axis=1)]
        status[bad] = PathStatus.FAILED_NONFINITE
    finished = np.nonzero(status == PathStatus.RUNNING)[0]
    condition = np.full(count, np.inf)
    if len(finished):
        refined, _ = _correct(homotopy, points[finished], np.zeros(len(finished)), 1e-14, iterations=3)
        good = np.all(np.isfinite(refined), axis=1)
        points[finished[good]] = refined[good]
        _, jacobian, _ = homotopy.evaluate(points[finished], np.zeros(len(finished)))
        condition[finished] = np.linalg.cond(jacobian)
        size = np.linalg.norm(points[finished], axis=1)
        at_infinity = np.abs(points[finished, 0]) <= opts.infinity_threshold * size
        singular = condition[finished] > opts.singular_condition
        status[finished] = np.where(at_infinity, PathStatus.AT_INFINITY,
                                    np.where(singular, PathStatus.SINGULAR_ENDPOINT, PathStatus.CONVERGED))
    return TrackResult(points, status, steps, condition, s, homotopy.evaluations - evaluations_before)


def _correct(homotopy, points, s, tolerance, iterations=3):
    """Newton corrections at fixed s; success when the last correction is small and they contract."""
    current = points.copy()
    previous_norm = np.full(len(points), np.inf)
    ok = np.ones(len(points), dtype=bool)
    for _ in range(iterations):
        values, jacobian, _ = homotopy.evaluate(current, s)
        delta = _solve(jacobian, values)
        current = current - delta
        norm = np.linalg.norm(delta, axis=1) / (1 + np.linalg.norm(current, axis=1))
        ok &= np.isfinite(norm) & ((norm <= 0.5 * previous_norm) | (norm <= tolerance))
        previous_norm = norm
    ok &= previous_norm <= tolerance
    return current, ok
