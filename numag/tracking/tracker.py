"""The batched path tracker: every path of a batch moves together as numpy arrays.

A path is followed in a real "time" t along a curve s(t) in the complex
parameter plane of the homotopy: a segment of the real axis (s = t) or a
circle around 0 (s = r e^{it}, for the endgame). One step, for all running
paths at once: a fourth-order Runge-Kutta predictor on
dX/dt = -H_X^{-1} H_s ds/dt, then Newton corrections at the new t. A step is
accepted when the corrections contract and end small; the step then changes as the
predictor error measured by the first correction allows, and is halved on
failure. Python loops run over steps, never
over paths.

The whole run (:func:`track_paths`):

1. every path from s = 1 to within the endgame radius (its first point with
   s in [0.025, 0.1] is kept);
2. every path on to s = 0 in the same pass; an endpoint that is well conditioned
   there is done;
3. the others start again from their kept point with the
   Cauchy endgame: loops around s = 0 until the path closes up (the number of
   loops is the winding number c), the endpoint estimated as the mean of the
   loop samples (Cauchy's integral formula), the radius shrunk until two
   estimates agree or one circle's own error estimate (from the means of every
   2nd and 4th sample) is below the tolerance;
4. paths that still failed are re-tracked with a cautious step control and an endgame that goes
   :data:`DEEPER_ENDGAME_ROUNDS` times as many radii deep (and so does the precision rescue's endgame).

Statuses (:class:`PathStatus`): converged, singular endpoint, at infinity,
and the failures (minimum step, step limit, non-finite values, endgame did
not settle).

Examples
--------
>>> import numpy as np
>>> from numag.system.parse import parse_system
>>> from numag.tracking.homotopy import StraightLineHomotopy
>>> system = parse_system(["x^2 - 2", "y^2 - x"], ["x", "y"])
>>> homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(0))
>>> result = track_paths(homotopy, homotopy.start_solutions())
>>> result.status_counts()["converged"]
4
"""

import contextlib
import contextvars
from dataclasses import dataclass, field, replace
import enum

import numpy as np

from ..errors import is_integer, is_number, require_option
from ..kinds import TextEnum
from ..run.executor import check_memory
from ..numeric.cluster import cluster_labels, normalize_projective
from .methods import (ERROR_FLOOR, RK4, STEP_MAX_FACTOR, STEP_MIN_FACTOR, STEP_REJECT_FACTOR, STEP_SAFETY,  # noqa: F401
                      ButcherTableau)
from .rescue import track_segment_precise

__all__ = ["PathStatus", "TrackerOptions", "TrackResult", "track_paths", "projective_condition", "Stepper",
           "ButcherTableau", "RK4", "rescue_budget", "x0_invisible", "confirm_infinity", "InfinityVerdict",
           "heading_to_infinity", "stopped_early", "singular_at_infinity"]


#: Work of the precision rescue (term evaluations in mpmath, about 30 us each at 40 digits) for one path and for
#: all the failed paths of one call of :func:`track_paths`.
RESCUE_WORK_PER_PATH = 1_000_000
RESCUE_WORK_PER_BATCH = 2_000_000
#: Work of the precision rescue for all the calls of :func:`track_paths` inside one :func:`rescue_budget` block
#: (a witness cascade or a decomposition makes hundreds of calls: per call alone, the rescue of the regeneration
#: paths of one system ran for more than ten minutes, decision 0050).
RESCUE_WORK_PER_RUN = 6_000_000
#: The retries (cautious, precision rescue) run the endgame over this many times ``endgame_rounds`` radii. A
#: point of high multiplicity beside a point at infinity along its tangent (a tacnode's rank-drop system after
#: a linear change, decision 0065) has circles that enclose branch points down to r ~ 1e-7, where ten
#: radii end: the next radii settle every path (3 at infinity, winding 4; one at the point, winding 3)
#: instead of three unsettled. Only paths that already failed pay for the deeper rounds.
DEEPER_ENDGAME_ROUNDS = 2

# [remaining work] shared by the track_paths calls of one block; None outside any block (each call alone)
_RESCUE_BUDGET = contextvars.ContextVar("numag_rescue_budget", default=None)


@contextlib.contextmanager
def rescue_budget(work=RESCUE_WORK_PER_RUN):
    """Share one budget of precision-rescue work among every :func:`track_paths` call inside the block.

    A block inside another one draws on the outer budget (it never adds work). Batches sent to worker
    processes keep the per-call budget (``RESCUE_WORK_PER_BATCH``) only.

    Examples
    --------
    >>> with rescue_budget(10) as remaining:
    ...     remaining[0]
    10
    """
    if _RESCUE_BUDGET.get() is not None:
        yield _RESCUE_BUDGET.get()
        return
    token = _RESCUE_BUDGET.set([int(work)])
    try:
        yield _RESCUE_BUDGET.get()
    finally:
        _RESCUE_BUDGET.reset(token)


class PathStatus(enum.IntEnum):
    """How a path ended."""

    RUNNING = 0
    CONVERGED = 1
    SINGULAR_ENDPOINT = 2
    AT_INFINITY = 3
    FAILED_MIN_STEP = 4
    FAILED_STEP_LIMIT = 5
    FAILED_NONFINITE = 6
    FAILED_ENDGAME = 7
    FAILED_BATCH = 8
    FAILED_JUMP = 9

    @property
    def failed(self):
        """True for the failure statuses."""
        return self >= PathStatus.FAILED_MIN_STEP

    @property
    def label(self):
        """Name used in reports."""
        return _LABELS[self]

    @property
    def message(self):
        """One sentence for a reader."""
        return _MESSAGES[self]


_LABELS = {
    PathStatus.RUNNING: "running",
    PathStatus.CONVERGED: "converged",
    PathStatus.SINGULAR_ENDPOINT: "singular_endpoint",
    PathStatus.AT_INFINITY: "at_infinity",
    PathStatus.FAILED_MIN_STEP: "minimum_step",
    PathStatus.FAILED_STEP_LIMIT: "step_limit",
    PathStatus.FAILED_NONFINITE: "non_finite",
    PathStatus.FAILED_ENDGAME: "endgame_unsettled",
    PathStatus.FAILED_BATCH: "batch_failed",
    PathStatus.FAILED_JUMP: "jumped",
}
_MESSAGES = {
    PathStatus.RUNNING: "still being tracked",
    PathStatus.CONVERGED: "reached a regular (well-conditioned) finite endpoint",
    PathStatus.SINGULAR_ENDPOINT: "reached a finite endpoint where the Jacobian is singular",
    PathStatus.AT_INFINITY: "went to infinity (the homogenising coordinate vanished)",
    PathStatus.FAILED_MIN_STEP: "failed: the step size fell below the minimum",
    PathStatus.FAILED_STEP_LIMIT: "failed: the step limit was reached",
    PathStatus.FAILED_NONFINITE: "failed: non-finite values (overflow or a singular linear system)",
    PathStatus.FAILED_ENDGAME: "failed: the endgame estimates did not settle",
    PathStatus.FAILED_BATCH: "failed: its batch failed twice on a worker (error in the report); not tracked",
    PathStatus.FAILED_JUMP: "failed: it kept ending where another path ends (a path jump repair could not undo)",
}
#: Labels of the failure reasons, in order.
FAILURE_LABELS = [s.label for s in PathStatus if s.failed]


@dataclass(frozen=True)
class TrackerOptions:
    """Tracker settings (declared once).

    Attributes
    ----------
    initial_step, max_step, min_step : float
        Step sizes in t (relative to the length of the current piece for circles).
    corrector_tolerance : float
        Relative size of the last Newton correction for a step to be accepted.
    endgame_corrector_tolerance : float
        The same on the endgame's circles, whose samples make the endpoint estimate.
    corrector_iterations : int
        Newton corrections per step.
    max_steps : int
        Step limit per path and piece.
    chord_corrector : bool
        Reuse the first correction's (inverted) Jacobian for the later corrections.
    predictor_error : float
        Relative predictor error the step-size control aims at (the first Newton
        correction measures it; steps change by a factor between 0.5 and 2).
    first_contraction : float
        A step is rejected at once when its second correction exceeds this fraction of the
        first: the corrections would not reach the tolerance in the iterations allowed.
    stage_spread : float
        A step is rejected before its last predictor stage when h ||k3 - k2|| exceeds this
        (relative to 1 + ||x||): the two midpoint slopes disagree, the step is far too long.
    endgame_radius : float
        Where the endgame takes over (s = 0.1).
    endgame_samples : int
        Sample points per loop of the Cauchy endgame.
    endgame_shrink : float
        Factor by which the endgame radius shrinks between estimates.
    endgame_rounds : int
        Largest number of radii tried.
    endgame_tolerance : float
        Relative agreement of two successive endpoint estimates, or the largest error one
        circle may estimate for its own mean.
    max_winding : int
        Largest winding number the endgame looks for.
    endpoint_residual : float
        Largest scaled residual of the target at an endgame estimate.
    rescue_digits : int
        Digits for re-tracking paths that failed twice in double precision (0: no rescue).
    infinity_threshold : float
        |X_0| / ||X|| below this means the endpoint is at infinity.
    singular_condition : float
        Condition number above which an endpoint is singular.
    endgame_if_settled : bool
        Send endpoints that Newton settled at s = 0 (quadratic convergence to 1e-13: a simple root) but whose
        condition is above ``singular_condition`` through the Cauchy endgame as well. Off for callers that only
        match endpoints to known points (moves of witness points between slices, decision 0093): the endgame
        then only confirms winding 1 at the point Newton gave, at the cost of its circles.
    infinity_wanted : bool
        Off for callers that discard endpoints at infinity (a regeneration, a cascade): a path that
        :func:`heading_to_infinity` shows on its way there is stopped before the Cauchy endgame, with status
        at infinity and winding number 0 (decision 0113). On (``numag solve``): every point at infinity is
        located by the endgame.
    """

    initial_step: float = 0.1
    max_step: float = 0.5
    min_step: float = 1e-12
    corrector_tolerance: float = 1e-6
    endgame_corrector_tolerance: float = 1e-10
    corrector_iterations: int = 5
    max_steps: int = 2000
    predictor_error: float = 1e-2
    stage_spread: float = 0.5
    chord_corrector: bool = True
    first_contraction: float = 0.1
    endgame_radius: float = 0.1
    endgame_samples: int = 16
    endgame_shrink: float = 0.25
    endgame_rounds: int = 10
    endgame_tolerance: float = 1e-9
    max_winding: int = 32
    endpoint_residual: float = 1e-8
    rescue_digits: int = 40
    infinity_threshold: float = 1e-7
    singular_condition: float = 1e8
    endgame_if_settled: bool = True
    infinity_wanted: bool = True

    def __post_init__(self):
        """Refuse a bad value on construction, naming the option: every size, tolerance and count is
        positive (the rescue's digits may be 0: no rescue); shrinking and contraction factors are below 1."""
        for name, value in vars(self).items():
            if isinstance(value, bool):
                continue
            if name == "rescue_digits":
                require_option(is_integer(value) and value >= 0, name, "an integer >= 0", value)
            elif isinstance(type(self).__dataclass_fields__[name].default, int):
                require_option(is_integer(value) and value >= 1, name, "a positive integer", value)
            else:
                require_option(is_number(value) and value > 0, name, "positive", value)
        for name in ("endgame_shrink", "first_contraction"):
            require_option(getattr(self, name) < 1, name, "below 1", getattr(self, name))


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
        Steps (accepted and rejected) per path, endgame included.
    condition : ndarray, shape (P,)
        Condition number of H_X at the endpoint (s = 0).
    winding : ndarray of int, shape (P,)
        Winding number from the endgame (1 for paths that did not need it, 0 for failures).
    endgame : ndarray of bool, shape (P,)
        True for paths that went through the Cauchy endgame.
    retracked : ndarray of bool, shape (P,)
        True for paths re-tracked with the cautious step control after a failure.
    digits : ndarray of int, shape (P,)
        Precision of the path's last tracking: 16 (double) or the rescue digits.
    evaluations : int
        Batched evaluations of H made.
    """

    endpoints: np.ndarray
    status: np.ndarray
    steps: np.ndarray
    condition: np.ndarray
    winding: np.ndarray
    endgame: np.ndarray
    retracked: np.ndarray
    evaluations: int = 0
    digits: np.ndarray = None
    extra: dict = field(default_factory=dict)

    def status_counts(self):
        """Number of paths per status label (failures by reason), every label present."""
        return {PathStatus(code).label: int(np.sum(self.status == code)) for code in PathStatus
                if code != PathStatus.RUNNING}


def _solve(jacobian, rhs):
    """Solve for one right-hand side (P, N) per matrix."""
    return _solve_columns(jacobian, rhs[..., None])[..., 0]


def _solve_columns(jacobian, rhs):
    """Solve for several right-hand sides (P, N, k) at once."""
    try:
        return np.linalg.solve(jacobian, rhs)
    except np.linalg.LinAlgError:
        result = np.full(rhs.shape, np.nan, dtype=complex)
        for k in range(len(rhs)):  # only when some matrix is exactly singular: the rare stragglers
            try:
                result[k] = np.linalg.solve(jacobian[k], rhs[k])
            except np.linalg.LinAlgError:
                pass
        return result


class _Segment:
    """s(t) = t on the real axis."""

    @staticmethod
    def s(t, index):
        return t.astype(complex)

    @staticmethod
    def ds(t, index):
        return np.ones(len(t), dtype=complex)


class _Circle:
    """s(t) = r e^{it} with a radius per path."""

    def __init__(self, radius):
        self.radius = radius

    def s(self, t, index):
        return self.radius[index] * np.exp(1j * t)

    def ds(self, t, index):
        return 1j * self.radius[index] * np.exp(1j * t)


def _correct(homotopy, points, s, tolerance, iterations, chord=False, first_contraction=0.5):
    """Newton corrections at fixed s, only on the paths still correcting.

    A path succeeds as soon as a correction is at most ``tolerance`` (relative) and every
    correction so far has at most halved the previous one; it fails when the corrections do
    not contract or ``iterations`` run out. Paths whose prediction was already good cost a
    single evaluation. With ``chord``, the Jacobian of the first correction is inverted once
    and reused (later corrections need only the values of H, a fraction of the cost).

    Returns the corrected points, the success mask, the first correction's size (the
    predictor's error) and H_X^{-1} H_s from an evaluation at the new s (the next step's first
    predictor stage reuses it).
    """
    current = points.copy()
    previous = np.full(len(points), np.inf)
    first = np.full(len(points), np.inf)
    ok = np.zeros(len(points), dtype=bool)
    live = np.arange(len(points))
    tangent = np.full(points.shape, np.nan, dtype=complex) if iterations < 1 else None
    chord = chord and hasattr(homotopy, "evaluate_values")
    inverse = None
    for iteration in range(iterations):
        if chord and iteration > 0:
            values = homotopy.evaluate_values(current[live], s[live])
            # rows of the inverse by position in the first iteration's live set (all rows)
            matrices = inverse if len(live) == len(points) else inverse[live]
            delta = (matrices @ values[:, :, None])[:, :, 0]
        else:
            values, jacobian, derivative = homotopy.evaluate(current[live], s[live])
            if chord:
                inverse = _inverse(jacobian)  # iteration 0: live is every row, in order
                both = inverse @ np.stack([values, derivative], axis=2)
            else:
                both = _solve_columns(jacobian, np.stack([values, derivative], axis=2))
            delta = both[:, :, 0]
            if iteration == 0:
                tangent = both[:, :, 1]  # a view of a fresh array: nothing else writes to it
            else:
                tangent[live] = both[:, :, 1]
        moved = current[live] - delta
        current[live] = moved
        norm = np.linalg.norm(delta, axis=1) / (1 + np.linalg.norm(moved, axis=1))
        if iteration == 0:
            first[live] = norm
        finite = np.isfinite(norm)
        limit = first_contraction if iteration == 1 else 0.5
        contracting = finite & ((norm <= limit * previous[live]) | (norm <= tolerance))
        # Done when the correction just made was small or, once corrections contract, when the
        # error it leaves (about norm * ratio / (1 - ratio)) is: the evaluation that would only
        # confirm it is saved (about one value evaluation in four).
        with np.errstate(all="ignore"):
            ratio = norm / previous[live]
            remaining = np.where((ratio < 0.5) & (iteration > 0), norm * ratio / (1 - ratio), np.inf)
        done = contracting & ((norm <= tolerance) | (remaining <= tolerance))
        ok[live[done]] = True
        previous[live] = norm
        live = live[contracting & ~done]
        if len(live) == 0:
            break
    return current, ok, first, tangent


def _inverse(jacobian):
    try:
        return np.linalg.inv(jacobian)
    except np.linalg.LinAlgError:
        result = np.full(jacobian.shape, np.nan, dtype=complex)
        for k in range(len(jacobian)):  # only when some matrix is exactly singular
            try:
                result[k] = np.linalg.inv(jacobian[k])
            except np.linalg.LinAlgError:
                pass
        return result


class Stepper:
    """Moves a batch of paths from t to t_end along a curve s(t) of the homotopy's parameter.

    The stepper owns the state of every row (point, t, step size, the tangent from the last
    corrector, status) and its counters; :meth:`step` makes one batched step of the rows still
    running, :meth:`run` steps until none is.

    Parameters
    ----------
    homotopy : object
        With ``evaluate(points, s)`` (and optionally ``evaluate_values`` for the chord corrector).
    points : ndarray, shape (P, N)
    t, t_end : ndarray, shape (P,)
    curve : object
        ``s(t, index)`` and ``ds(t, index)`` (:class:`_Segment`, :class:`_Circle`).
    index : ndarray of int, shape (P,)
        Path numbers of the rows (for per-path curve parameters).
    options : TrackerOptions
    step : ndarray, optional
        Step sizes carried over from a previous piece (the endgame's arcs).
    max_step : float, optional
        Overrides ``options.max_step``.
    window : tuple of float, optional
        ``(near, far)``, values of t between t and t_end (``near`` reached first): each row's
        first point at or past ``near`` is kept (:attr:`kept`, :attr:`kept_t`, :attr:`passed`),
        and no step skips past ``far``. One pass instead of two pieces: the step size carries
        over, the slow paths of both pieces share iterations, and a step is shortened only when
        it would skip the whole window (a single stopping point would cost most paths a
        shortened step).
    method : ButcherTableau

    Attributes
    ----------
    points, t, status, step_size, taken
        Per row: where it is, its status (RUNNING while it runs or after it arrived), its next
        step size, the steps taken (accepted and rejected).

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> from numag.tracking.homotopy import StraightLineHomotopy
    >>> system = parse_system(["x^2 - 4"], ["x"])
    >>> homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(0))
    >>> starts = homotopy.start_solutions()
    >>> stepper = Stepper(homotopy, starts, np.ones(2), np.full(2, 0.5), _Segment, np.arange(2), TrackerOptions())
    >>> stepper.run()
    >>> stepper.t.tolist(), int(np.sum(stepper.status == PathStatus.RUNNING))
    ([0.5, 0.5], 2)
    """

    def __init__(self, homotopy, points, t, t_end, curve, index, options, *, step=None, max_step=None, window=None,
                 method=RK4):
        self.homotopy, self.curve, self.index, self.options, self.method = homotopy, curve, index, options, method
        self.points = points.copy()
        self.t = t.astype(float).copy()
        self.t_end = t_end
        self.direction = np.sign(t_end - self.t)
        count = len(self.t)
        self.step_size = np.full(count, options.initial_step) if step is None else np.array(step, dtype=float)
        self.max_step = options.max_step if max_step is None else max_step
        self.tangent = np.full(points.shape, np.nan, dtype=complex)  # H_X^{-1} H_s at each row's current point
        self.has_tangent = np.zeros(count, dtype=bool)
        self.status = np.zeros(count, dtype=np.int64)
        self.taken = np.zeros(count, dtype=np.int64)
        self.held = np.zeros(count, dtype=bool)  # the last step was rejected: no growth on the next
        self.window = window
        self.passed = np.zeros(count, dtype=bool)
        if window is not None:
            self.kept = np.full(points.shape, np.nan, dtype=complex)
            self.kept_t = np.full(count, np.nan)
            self.stop = np.full(count, float(window[1]))
        else:
            self.stop = t_end

    def active(self):
        """Rows still running and not yet at t_end."""
        return np.nonzero((self.status == PathStatus.RUNNING) & (np.abs(self.t_end - self.t) > 0))[0]

    def run(self, on_step=None):
        """Step until no row runs; ``on_step(finished)`` is told after each step how many rows have
        finished (or, with a window, passed into it). Rows with non-finite points then fail."""
        while True:
            active = self.active()
            if on_step is not None:
                on_step(len(self.t) - len(active) if self.window is None
                        else int(np.sum(self.passed | (self.status != 0))))
            if len(active) == 0:
                break
            self.step(active)
        bad = ~np.all(np.isfinite(self.points), axis=1)
        self.status[bad & (self.status == PathStatus.RUNNING)] = PathStatus.FAILED_NONFINITE

    def _velocity(self, y, time, rows):
        _, jacobian, derivative = self.homotopy.evaluate(y, self.curve.s(time, rows))
        return -_solve(jacobian, derivative * self.curve.ds(time, rows)[:, None])

    def _first_stage(self, active, x, tt, rows):
        """The slope at the current points: the corrector's tangent where there is one."""
        curve = self.curve
        known = self.has_tangent[active]
        if np.all(known):
            return -self.tangent[active] * curve.ds(tt, rows)[:, None]
        k1 = np.empty_like(x)
        k1[known] = -self.tangent[active[known]] * curve.ds(tt[known], rows[known])[:, None]
        fresh = ~known
        k1[fresh] = self._velocity(x[fresh], tt[fresh], rows[fresh])
        return k1

    def _stage(self, i, x, tt, h, stages, rows):
        return self._velocity(self.method.stage_point(i, x, h[:, None], stages), self.method.stage_time(i, tt, h), rows)

    def step(self, active=None):
        """One batched step of the ``active`` rows (default: every running row)."""
        opts, method = self.options, self.method
        active = self.active() if active is None else active
        x, tt, rows = self.points[active], self.t[active], self.index[active]
        goal = self.stop[active]
        h = np.minimum(self.step_size[active], np.abs(goal - tt)) * self.direction[active]
        stages = [self._first_stage(active, x, tt, rows)]
        last_checked = max(method.agreeing) if method.agreeing else 0
        for i in range(1, last_checked + 1):
            stages.append(self._stage(i, x, tt, h, stages, rows))
        go = slice(None)  # views, not copies, in the common case
        if method.agreeing:
            # Two stages that both estimate one slope (RK4's midpoint stages): when they disagree by
            # more than half the path's size over the step, the step is far too long (near two
            # paths' close approach the error grows much faster than h^5): reject it now, before the
            # later stages and the corrector are paid for. On 1,024 dense quadrics this catches half
            # the rejected steps and only one accepted step in 250.
            first, second = method.agreeing
            with np.errstate(all="ignore"):
                spread = np.abs(h) * np.linalg.norm(stages[second] - stages[first], axis=1) / (
                    1 + np.linalg.norm(x, axis=1))
            agree = spread <= opts.stage_spread
            if not np.all(agree):
                go = agree
        accepted = np.zeros(len(active), dtype=bool)
        new_t = np.where(np.abs(self.step_size[active]) >= np.abs(goal - tt), goal, tt + h)
        if not isinstance(go, slice):  # rows rejected early keep NaN points and an infinite error
            error = np.full(len(active), np.inf)
            corrected = np.full(x.shape, np.nan, dtype=complex)
            new_tangent = np.full(x.shape, np.nan, dtype=complex)
        if isinstance(go, slice) or np.any(go):
            xs, ts, rs, hs = x[go], tt[go], rows[go], h[go]
            stages = [k[go] for k in stages]
            for i in range(last_checked + 1, len(method.nodes)):
                stages.append(self._stage(i, xs, ts, hs, stages, rs))
            predicted = method.advance(xs, hs[:, None], stages)
            fixed, ok, first_error, slope = _correct(self.homotopy, predicted, self.curve.s(new_t[go], rs),
                                                     opts.corrector_tolerance, opts.corrector_iterations,
                                                     chord=opts.chord_corrector,
                                                     first_contraction=opts.first_contraction)
            if isinstance(go, slice):
                corrected, error, new_tangent = fixed, first_error, slope
            else:
                corrected[go], error[go], new_tangent[go] = fixed, first_error, slope
            accepted[go] = ok & np.all(np.isfinite(fixed), axis=1)
        self.taken[active] += 1
        good = active[accepted]
        self.points[good] = corrected[accepted]
        self.t[good] = new_t[accepted]
        self.tangent[good] = new_tangent[accepted]
        self.has_tangent[good] = np.all(np.isfinite(self.tangent[good]), axis=1)
        if self.window is not None:
            near = self.window[0]
            arrived = good[(self.direction[good] * (self.t[good] - near) >= 0) & ~self.passed[good]]
            self.passed[arrived] = True
            self.kept[arrived] = self.points[arrived]
            self.kept_t[arrived] = self.t[arrived]
            self.stop[arrived] = self.t_end[arrived]
        self._control(active, accepted, good, error)

    def _control(self, active, accepted, good, error):
        """The next step sizes, and the rows that fail by the minimum step or the step limit."""
        opts = self.options
        # the predictor's error scales like h^(order + 1): aim the next step at the error the
        # corrector removes in about two iterations
        with np.errstate(divide="ignore"):
            factor = STEP_SAFETY * (opts.predictor_error / np.maximum(error[accepted], ERROR_FLOOR)) ** (
                1 / (self.method.order + 1))
        # no growth on the step after a rejection (common practice in ODE step control): near a
        # close approach the error rises much faster than h^5 and growing again at once fails again
        factor = np.where(self.held[good], np.minimum(factor, 1.0), factor)
        self.held[good] = False
        self.step_size[good] = np.minimum(self.step_size[good] * np.clip(factor, STEP_MIN_FACTOR, STEP_MAX_FACTOR),
                                          self.max_step)
        rejected = active[~accepted]
        self.held[rejected] = True
        self.step_size[rejected] *= STEP_REJECT_FACTOR
        self.status[rejected[self.step_size[rejected] < opts.min_step]] = PathStatus.FAILED_MIN_STEP
        over = active[(self.taken[active] >= opts.max_steps) & (self.status[active] == PathStatus.RUNNING)]
        self.status[over] = PathStatus.FAILED_STEP_LIMIT


class _Chart:
    """Where the Cauchy endgame averages again a circle whose mean on the patch is off the target: the affine
    chart X_k = 1 of each path's largest coordinate.

    The samples on the circle are analytic in u = s^(1/c), and their mean is the endpoint only when the
    disc |u| < r^(1/c) holds no pole. In the tracker's random patch a . X = 1 a pole is where a . X(u) = 0,
    and for a winding number c of 10 even r = 0.025 gives a disc of radius 0.69 in u that one such pole
    fell inside: the mean, converged to 1e-15 by its own estimate, was another point, and the radius had to
    shrink three times. In the chart of the largest coordinate, X_k(u) stays near its largest value on the
    disc. Only a mean off the target is replaced (a mean on the patch that solves the target stays: on a
    positive-dimensional set at infinity the two paths of one cycle got means 1e-2 apart in the charts, and
    the jump check split the cycle). Homotopies whose points are homogeneous coordinates on one patch say so
    with ``projective_patch``; the others (a sweep's points carry a label) average on the patch alone.
    """

    def __init__(self, homotopy, start):
        patch = getattr(homotopy, "projective_patch", None)
        self.patch = patch if patch is not None and len(patch) == start.shape[1] else None
        self.pivot = np.argmax(np.abs(start), axis=1) if self.patch is not None else None

    def of(self, points, rows):
        """The samples ``points`` of the paths ``rows`` in their charts."""
        if self.patch is None:
            return points
        with np.errstate(all="ignore"):  # a pivot that vanished on the circle: a NaN mean, never settled
            return points / points[np.arange(len(rows)), self.pivot[rows]][:, None]

    def back(self, means):
        """Means in the charts (one row per path) back on the patch."""
        if self.patch is None:
            return means
        with np.errstate(all="ignore"):
            return means / (means @ self.patch)[:, None]


def _cauchy_endgame(homotopy, points, radius, opts, steps):
    """Cauchy endgame for paths standing at s = radius (real, one per path): estimates, winding numbers, status."""
    opts = replace(opts, corrector_tolerance=min(opts.corrector_tolerance, opts.endgame_corrector_tolerance))
    count = len(points)
    index = np.arange(count)
    r = np.broadcast_to(np.asarray(radius, dtype=float), (count,)).copy()
    estimate = np.full(points.shape, np.nan, dtype=complex)
    winding = np.zeros(count, dtype=np.int64)
    status = np.zeros(count, dtype=np.int64)
    settled = np.zeros(count, dtype=bool)
    # sharpen the starting points first: loop closure is judged against them
    x, sharp, _, _ = _correct(homotopy, points, r.astype(complex), opts.corrector_tolerance, 4)
    x = np.where(sharp[:, None] & np.all(np.isfinite(x), axis=1)[:, None], x, points)
    samples = opts.endgame_samples
    angles = 2 * np.pi * np.arange(samples + 1) / samples
    for round_ in range(opts.endgame_rounds):
        live = np.nonzero((status == PathStatus.RUNNING) & ~settled)[0]
        if len(live) == 0:
            break
        circle = _Circle(r)
        start = x[live].copy()
        # a mean off the target on the patch is taken again in the chart of the largest coordinate (_Chart)
        chart = _Chart(homotopy, start)
        current = start.copy()
        # sums of the samples on the patch [0] and in the charts [1]: of all, of every 2nd, of every 4th
        sums = np.zeros((2, 3) + start.shape, dtype=complex)
        loops = np.zeros(len(live), dtype=np.int64)
        open_ = np.ones(len(live), dtype=bool)
        unclosed = np.zeros(len(live), dtype=bool)
        arc = 2 * np.pi / samples
        arc_step = np.full(len(live), arc)
        while np.any(open_):
            rows = np.nonzero(open_)[0]
            for k in range(samples):
                here = current[rows]
                for which, sample in enumerate((here, chart.of(here, rows) if chart.patch is not None else here)):
                    sums[which, 0, rows] += sample
                    if k % 2 == 0:
                        sums[which, 1, rows] += sample
                    if k % 4 == 0:
                        sums[which, 2, rows] += sample
                arc_piece = Stepper(homotopy, current[rows], np.full(len(rows), angles[k]),
                                    np.full(len(rows), angles[k + 1]), circle, live[rows], opts,
                                    step=arc_step[rows], max_step=arc)
                arc_piece.run()
                moved, piece_status, arc_step[rows] = arc_piece.points, arc_piece.status, arc_piece.step_size
                steps[live[rows]] += arc_piece.taken
                current[rows] = moved
                failed = piece_status != PathStatus.RUNNING
                if np.any(failed):
                    status[live[rows[failed]]] = piece_status[failed]
                    open_[rows[failed]] = False
                    rows = rows[~failed]
            loops[rows] += 1
            closed = np.linalg.norm(current[rows] - start[rows], axis=1) <= 1e-6 * (
                1 + np.linalg.norm(start[rows], axis=1))
            open_[rows[closed]] = False
            too_many = rows[~closed & (loops[rows] >= opts.max_winding)]
            unclosed[too_many] = True  # the circle may enclose other branch points: try a smaller one
            open_[too_many] = False
        done = (status[live] == PathStatus.RUNNING) & (loops > 0) & ~unclosed
        counted = np.maximum(loops, 1)[:, None]
        with np.errstate(all="ignore"):
            full, half, quarter = (sums[0, j] / (counted * (samples // parts)) for j, parts in enumerate((1, 2, 4)))
        new_estimate = np.where(done[:, None], full, np.nan)
        previous = estimate[live]
        # Two estimates agreeing is not enough: circles that enclose another branch point besides 0
        # give the same (wrong) mean at every radius. The estimate must also solve the target.
        on_target = np.zeros(len(live), dtype=bool)
        if np.any(done):
            on_target[done] = homotopy.target_residual(new_estimate[done]) <= opts.endpoint_residual
        retry = np.nonzero(done & ~on_target)[0] if chart.patch is not None else np.zeros(0, dtype=np.int64)
        if len(retry):  # off the target on the patch: the means in the charts, where they are on it
            with np.errstate(all="ignore"):
                in_charts = [chart.back(sums[1, j, retry] / (counted[retry] * (samples // parts)))
                             for j, parts in enumerate((1, 2, 4))]
            hit = homotopy.target_residual(in_charts[0]) <= opts.endpoint_residual
            use = retry[hit]
            new_estimate[use], half[use], quarter[use] = (means[hit] for means in in_charts)
            on_target[use] = True
        size = 1 + np.linalg.norm(new_estimate, axis=1)
        agree = done & on_target & (np.linalg.norm(new_estimate - previous, axis=1) <= opts.endgame_tolerance * size)
        # One circle can also vouch for itself. The samples are a periodic analytic function of the
        # angle, and the mean of N of them (the trapezoidal rule) has an error ~ C q^N: the means of
        # N/2 and N/4 samples differ from it by about C q^(N/2) and C q^(N/4), so their ratio gives
        # q^(N/4) and the error of the full mean is about d_half * ratio^2 (Trefethen and Weideman,
        # The exponentially convergent trapezoidal rule, SIAM Review, 2014). This settles paths
        # whose next, smaller circle would be out of reach in double precision (near a singular
        # endpoint the Jacobian's condition grows as the radius shrinks).
        if samples % 4 == 0:
            with np.errstate(all="ignore"):
                d_half = np.linalg.norm(new_estimate - half, axis=1) / size
                d_quarter = np.linalg.norm(new_estimate - quarter, axis=1) / size
                ratio = np.where(d_quarter > 0, d_half / d_quarter, 0.0)
                # Or the means of every 2nd and every 4th sample already agree with the full mean to the
                # tolerance (their ratio is then rounding noise over rounding noise): the full mean, whose
                # error is far smaller than theirs, is settled.
                alone = ((ratio <= 0.5) & (d_half * ratio ** 2 <= opts.endgame_tolerance)) | (
                    np.maximum(d_half, d_quarter) <= opts.endgame_tolerance)
            agree |= done & on_target & alone
        estimate[live[done]] = new_estimate[done]
        winding[live[done]] = loops[done]
        settled[live[agree]] = True
        # shrink the radius for the paths not yet settled, from their point at s = r
        shrink = (done & ~agree) | (unclosed & (status[live] == PathStatus.RUNNING))
        move = live[shrink]
        if len(move) and round_ + 1 < opts.endgame_rounds:
            inward = Stepper(homotopy, start[shrink], r[move], r[move] * opts.endgame_shrink, _Segment, move, opts)
            inward.run()
            moved, piece_status = inward.points, inward.status
            steps[move] += inward.taken
            x[move] = moved
            r[move] *= opts.endgame_shrink
            failed = piece_status != PathStatus.RUNNING
            status[move[failed]] = piece_status[failed]
    unsettled = (status == PathStatus.RUNNING) & ~settled
    status[unsettled] = PathStatus.FAILED_ENDGAME
    return estimate, winding, status


def _classify(homotopy, points, opts, settle=True):
    """Final Newton at s = 0 (when ``settle``), condition numbers, the finite / infinite split, and
    whether Newton settled (converged to 1e-13 within four corrections)."""
    zeros = np.zeros(len(points))
    settled = np.ones(len(points), dtype=bool)
    if settle and len(points):
        refined, settled, _, _ = _correct(homotopy, points, zeros.astype(complex), 1e-13, 4)
        settled &= np.all(np.isfinite(refined), axis=1)
        points = np.where(settled[:, None], refined, points)
    _, jacobian, _ = homotopy.evaluate(points, zeros.astype(complex))
    condition = projective_condition(jacobian, points, homotopy.row_scales(points)) if len(points) \
        else np.zeros(0)
    size = np.linalg.norm(points, axis=1)
    relative_x0 = np.abs(points[:, 0]) / np.maximum(size, np.finfo(float).tiny)
    # A regular endpoint that Newton settled is known to about condition * eps relative: X_0 is
    # then zero (at infinity) only when it is below that accuracy, whatever its size otherwise. A
    # fixed threshold called a finite solution at 1e9 "at infinity". Unsettled or ill-conditioned
    # endpoints (endgame estimates) keep the fixed threshold.
    accuracy = _ACCURACY_SAFETY * np.finfo(float).eps * np.where(np.isfinite(condition), condition, np.inf)
    regular = settled & (condition <= opts.singular_condition)
    at_infinity = np.where(regular, relative_x0 <= accuracy, relative_x0 <= opts.infinity_threshold)
    return points, condition, at_infinity, settled


#: A settled regular endpoint's X_0 is zero when below this many times condition * eps (relative).
_ACCURACY_SAFETY = 100.0


def projective_condition(jacobian, points, row_scales):
    """Condition number of the homotopy's target at endpoints, independent of the patch and of scale.

    The rows of F^h's Jacobian are divided by their natural scales (coefficient norm times
    ||X||^(d - 1)) and the patch row is replaced by X^H / ||X||: the result is the condition of
    F^h on the tangent space of projective space at X (the directions orthogonal to X), plus the
    unit direction along X. A raw condition number grows like ||X||^(d - 1) with the size the
    random patch gives the point (x^100 - 1 had "condition" 3e7 at a simple root).

    Parameters
    ----------
    jacobian : ndarray, shape (P, N, N)
        dH/dX at s = 0 with the patch as the last row.
    points : ndarray, shape (P, N)
    row_scales : ndarray, shape (P, N - 1)

    Returns
    -------
    ndarray, shape (P,)

    Examples
    --------
    >>> import numpy as np
    >>> point = np.array([[1e3, 1e3]])                  # (X_0, X_1), a zero of X_1^2 - X_0^2
    >>> jac = np.array([[[-2e3, 2e3], [1e-4, 9e-4]]])   # its gradient, then some patch row
    >>> scales = np.array([[np.sqrt(2) * np.linalg.norm(point)]])
    >>> round(float(projective_condition(jac, point, scales)[0]), 6)
    1.414214
    """
    size = np.linalg.norm(points, axis=1)
    scaled = np.array(jacobian, dtype=complex, copy=True)
    scaled[:, :-1, :] /= row_scales[:, :, None]
    scaled[:, -1, :] = points.conj() / np.maximum(size, np.finfo(float).tiny)[:, None]
    with np.errstate(all="ignore"):
        condition = np.linalg.cond(scaled)
    return np.where(np.isfinite(condition), condition, np.inf)


def _track(homotopy, start_points, opts, near=None, on_step=None, second_look=True):
    """Track to s = 0 from the start (or, when ``near`` is given, from there at the endgame radius); ends at
    infinity that are dropped and lie on a singular zero set at infinity get a second look unless ``second_look``
    is off (decision 0121)."""
    count = len(start_points) if near is None else len(near)
    index = np.arange(count)
    steps = np.zeros(count, dtype=np.int64)
    status = np.zeros(count, dtype=np.int64)
    radius = np.full(count, opts.endgame_radius)
    if near is None:
        # one pass from s = 1 to 0 that keeps every path's first point within the endgame radius
        # (and not past the next, smaller radius the endgame would try)
        stepper = Stepper(homotopy, start_points, np.ones(count), np.zeros(count), _Segment, index, opts,
                          window=(opts.endgame_radius, opts.endgame_radius * opts.endgame_shrink))
        stepper.run(on_step)
        steps += stepper.taken
        final, status_a, passed, near, reached_at = (stepper.points, stepper.status, stepper.passed, stepper.kept,
                                                     stepper.kept_t)
        radius = np.where(passed, reached_at, radius)
        status[:] = np.where(passed, PathStatus.RUNNING, status_a)  # failed before the radius: final
        running = np.nonzero(passed)[0]
        near = np.where(passed[:, None], near, final)  # where the failed ones stopped
        final = final[running]
        status_b = status_a[running]
    else:
        running = np.arange(count)
        stepper = Stepper(homotopy, near, radius, np.zeros(count), _Segment, running, opts)
        stepper.run()
        steps += stepper.taken
        final, status_b = stepper.points, stepper.status
    endpoints = near.copy()
    condition = np.full(count, np.inf)
    winding = np.zeros(count, dtype=np.int64)
    endgame = np.zeros(count, dtype=bool)
    reached = status_b == PathStatus.RUNNING
    settled_points, cond, infinite, settled = _classify(homotopy, final[reached], opts)
    # regular: Newton at s = 0 converges quadratically there and the Jacobian is well conditioned
    regular = settled & (cond <= opts.singular_condition)
    done = running[reached][regular]
    endpoints[done] = settled_points[regular]
    condition[done] = cond[regular]
    winding[done] = 1
    status[done] = np.where(infinite[regular], PathStatus.AT_INFINITY, PathStatus.CONVERGED)
    # the rest: Cauchy endgame from the state at the endgame radius
    # (running is sorted and distinct, so masking out the regular ones is np.setdiff1d(running, done); the mask
    # avoids np.unique, which imports numpy.ma in every solve process; decision 0067)
    finished = np.zeros(len(running), dtype=bool)
    finished[np.flatnonzero(reached)[regular]] = True
    if not opts.endgame_if_settled:
        # settled but ill-conditioned: a simple root known to condition * eps; no circles around it (decision 0093)
        quiet = settled & ~regular
        kept = running[reached][quiet]
        endpoints[kept] = settled_points[quiet]
        condition[kept] = cond[quiet]
        winding[kept] = 1
        status[kept] = np.where(infinite[quiet], PathStatus.AT_INFINITY, PathStatus.SINGULAR_ENDPOINT)
        finished[np.flatnonzero(reached)[quiet]] = True
    # the paths' last samples on the way to s = 0 of the test for heading to infinity (NaN where not taken)
    deep = np.full((count, near.shape[1]), np.nan, dtype=complex)
    if not opts.infinity_wanted and np.any(~finished):
        # paths heading to infinity stop here, before the endgame's circles, where their ends are not wanted
        # (decision 0113): status at infinity, winding number 0 (not measured), the last sample as endpoint
        position = np.flatnonzero(~finished)
        paths = running[position]
        ends = np.where(reached[position][:, None], final[position], np.nan)
        heading, last, extra = heading_to_infinity(homotopy, near[paths], radius[paths], ends, opts)
        deep[paths] = last
        steps[paths] += extra
        stopped = paths[heading]
        endpoints[stopped] = last[heading]
        status[stopped] = PathStatus.AT_INFINITY
        winding[stopped] = 0
        finished[position[heading]] = True
    rest = running[~finished]
    if len(rest):
        endgame[rest] = True
        estimate, loops, status_c = _cauchy_endgame(homotopy, near[rest], radius[rest], opts,
                                                    steps_c := np.zeros(len(rest), dtype=np.int64))
        steps[rest] += steps_c
        ok = status_c == PathStatus.RUNNING
        status[rest[~ok]] = status_c[~ok]
        if np.any(ok):
            points, cond, infinite, _ = _classify(homotopy, estimate[ok], opts, settle=False)
            target = rest[ok]
            endpoints[target] = points
            condition[target] = cond
            winding[target] = loops[ok]
            singular = (loops[ok] > 1) | (cond > opts.singular_condition)
            status[target] = np.where(infinite, PathStatus.AT_INFINITY,
                                      np.where(singular, PathStatus.SINGULAR_ENDPOINT, PathStatus.CONVERGED))
            # an estimate called infinite is confirmed from the path's own point at s = 0 (decision 0103)
            tracked = final[~finished][ok]
            # (or a singular endpoint that decision 0049's test would send there: solve's plane system after a
            # linear change; such a one changes only to a zero regular by the tracker's own standard, since at a
            # finite point of high multiplicity with X_0 invisible (a cone's vertex) Newton stalls far from it)
            infinite_now = status[target] == PathStatus.AT_INFINITY
            invisible = (status[target] == PathStatus.SINGULAR_ENDPOINT) & x0_invisible(homotopy, points, opts)
            doubt = reached[~finished][ok] & (infinite_now | invisible)
            if np.any(doubt):
                paths = target[doubt]
                verdict, point, cond = confirm_infinity(homotopy, tracked[doubt])
                regular_enough = infinite_now[doubt] | (cond <= opts.singular_condition)
                finite = (verdict == InfinityVerdict.FINITE) & regular_enough
                verdict[~infinite_now[doubt] & ~finite] = InfinityVerdict.AT_INFINITY  # the endgame's verdict stands
                if np.any(finite):
                    # a cycle that held a finite regular zero was not one branch at infinity: the winding numbers
                    # of the paths that shared its estimate are unknown, 1 is all that is sure (decision 0103)
                    labels = cluster_labels(normalize_projective(endpoints[target]), _CYCLE_ESTIMATES,
                                            projective=True)
                    shared = np.isin(labels, labels[doubt][finite])
                    winding[target[shared]] = 1
                endpoints[paths[finite]] = point[finite]
                condition[paths[finite]] = cond[finite]
                winding[paths[finite]] = 1
                status[paths[finite]] = PathStatus.CONVERGED
                status[paths[verdict == InfinityVerdict.UNDECIDED]] = PathStatus.FAILED_ENDGAME
            if not opts.infinity_wanted and second_look:
                # an end at infinity that is dropped, on a singular zero set of the target at infinity: looked at
                # again from deeper on the path, where the test for heading to infinity left it (decision 0121)
                again = target[(status[target] == PathStatus.AT_INFINITY) & (winding[target] == 1)]
                again = again[singular_at_infinity(homotopy, endpoints[again])]
                if len(again):
                    _look_again(homotopy, again, deep[again], opts, endpoints, status, steps, condition, winding)
    return endpoints, status, steps, condition, winding, endgame


#: The top forms' Jacobian at a point at infinity has rank n - 1 there when its (n - 1)-th scaled singular value
#: exceeds this fraction of the largest; below, the point is a multiple zero or on a positive-dimensional set
#: at infinity (decision 0121). Generous on purpose: a point called singular only costs a second look.
SINGULAR_AT_INFINITY = 1e-4


def singular_at_infinity(homotopy, points):
    """Whether the target's zero set at infinity is singular (a multiple point, or a set of positive dimension)
    at each point, by the rank of the top forms' Jacobian there (decision 0121).

    The target's equations at X_0 = 0 are their top-degree forms, n forms on the hyperplane at infinity (a P^(n-1)).
    A reduced isolated zero of theirs has a Jacobian (in x_1 .. x_n, rows in units of their terms) of rank n - 1
    (the kernel is the point's own line); on a zero set of positive dimension the rank is at most n - 2 at every
    point. A path called infinite next to such a set may still be on its way to a finite zero (the target's own
    zeros at infinity attract Newton and the endgame's circles alike), so its verdict is not final there.

    Parameters
    ----------
    homotopy : object
        Points are homogeneous coordinates on a patch, X_0 first.
    points : ndarray, shape (P, N)
        Points at (or next to) infinity.

    Returns
    -------
    ndarray of bool, shape (P,)

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> from numag.tracking.homotopy import StraightLineHomotopy
    >>> # top forms x y, x z, x^2: they vanish on the whole line x = 0 at infinity
    >>> system = parse_system(["x*y - 1", "x*z - 2", "x^2 + x - 3"], ["x", "y", "z"])
    >>> homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(0))
    >>> singular_at_infinity(homotopy, np.array([[0, 0, 1, 1]], dtype=complex)).tolist()
    [True]
    >>> # x y, x z, x + y + z: the one reduced point (0 : 1 : -1) at infinity
    >>> system = parse_system(["x*y - 1", "x*z - 2", "x + y + z"], ["x", "y", "z"])
    >>> homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(0))
    >>> singular_at_infinity(homotopy, np.array([[0, 0, 1, -1]], dtype=complex)).tolist()
    [False]
    """
    if len(points) == 0:
        return np.zeros(0, dtype=bool)
    points = np.array(points, dtype=complex, copy=True)
    points[:, 0] = 0
    n = points.shape[1] - 1
    if n < 2:  # P^0: a point at infinity is always isolated and the rank test has no room
        return np.zeros(len(points), dtype=bool)
    with np.errstate(all="ignore"):
        _, jacobian, _ = homotopy.evaluate(points, np.zeros(len(points), dtype=complex))
        scales = homotopy.row_scales(points)
        forms = jacobian[:, :-1, 1:] / np.where(scales > 0, scales, np.inf)[:, :, None]
        values = np.linalg.svd(forms, compute_uv=False)
    usable = np.all(np.isfinite(values), axis=1) & (values[:, 0] > 0)
    # unusable (overflow, a zero Jacobian): singular, so that the verdict is looked at again
    return ~usable | (values[:, n - 2] <= SINGULAR_AT_INFINITY * values[:, 0])


def _look_again(homotopy, paths, deep, opts, endpoints, status, steps, condition, winding):
    """The second look of decision 0121, in double, at paths ``paths`` whose end at infinity is in doubt.

    ``deep`` holds each path's last sample of :func:`heading_to_infinity` (at s = ``endgame_radius`` *
    ``endgame_shrink`` ^ :data:`INFINITY_SAMPLES`, 4e-9 times the endgame's radius; NaN where double precision could
    not follow the path that deep). A path whose sample is itself at infinity by the standard of the endgame's
    estimates (X_0 / ||X|| at most ``infinity_threshold``) was followed there far below the endgame's circles, where
    a path to a finite zero has long arrived: its verdict stands. So does one without a sample: on a singular set
    at infinity tracking fails where a path to a finite regular zero does not (and mpmath here cost the six-bar 27
    s). The others are tracked again from their sample as in the first pass (the test for heading to infinity, the
    endgame, Newton's confirmation), without a further second look; a finite end replaces the verdict. The arrays
    ``endpoints`` .. ``winding`` are updated in place."""
    with np.errstate(all="ignore"):
        relative_x0 = np.abs(deep[:, 0]) / np.linalg.norm(deep, axis=1)
    again = np.all(np.isfinite(deep), axis=1) & ~(relative_x0 <= opts.infinity_threshold)
    if np.any(again):
        _track_again(homotopy, paths[again], deep[again], opts.endgame_radius * opts.endgame_shrink ** INFINITY_SAMPLES,
                     opts, endpoints, status, steps, condition, winding)


def _track_again(homotopy, paths, points, radius, opts, endpoints, status, steps, condition, winding):
    """Paths ``paths`` tracked again from ``points`` at s = ``radius`` (one for all) by :func:`_track`, without a
    second look; their statuses and ends replaced where they end finite (elsewhere the first verdict stands)."""
    ends, again, extra, cond, loops, _ = _track(homotopy, None, replace(opts, endgame_radius=radius), near=points,
                                                second_look=False)
    steps[paths] += extra
    finite = (again == PathStatus.CONVERGED) | (again == PathStatus.SINGULAR_ENDPOINT)
    status[paths[finite]] = again[finite]
    endpoints[paths[finite]] = ends[finite]
    condition[paths[finite]] = cond[finite]
    winding[paths[finite]] = loops[finite]


def x0_invisible(homotopy, points, opts):
    """Whether the target cannot tell each point's X_0 from 0: with X_0 = 0 its scaled residual is at most
    ``opts.endpoint_residual`` (decision 0049: such an endgame estimate is called a point at infinity).

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> from numag.tracking.homotopy import StraightLineHomotopy
    >>> homotopy = StraightLineHomotopy.total_degree(parse_system(["x*y - 1", "x^2 - 1"], ["x", "y"]),
    ...                                              np.random.default_rng(0))
    >>> x0_invisible(homotopy, np.array([[1e-12, 0, 1], [1, 1, 1]], dtype=complex), TrackerOptions()).tolist()
    [True, False]
    """
    moved = np.array(points, dtype=complex, copy=True)
    moved[:, 0] = 0
    with np.errstate(all="ignore"):
        invisible = homotopy.target_residual(moved) <= opts.endpoint_residual
    # zero alone is not enough: a finite zero whose direction is also a zero at infinity (a block of circles and
    # minors, where every term of the minors holds s_1 or s_2: X_0 = 0.71 at (1, 0, -1, 0)) solves F^h at X_0 = 0 too.
    # X_0 is invisible when F^h(t X_0, X), a polynomial in t of degree at most D, is small at t = 0 and at the
    # other (D + 1)-th roots of unity as well: then none of its terms in t is larger than a few tolerances
    degree = _target_degree(homotopy)
    for k in range(1, degree + 1):
        if not np.any(invisible):
            break
        turned = np.array(points, dtype=complex, copy=True)
        turned[:, 0] *= np.exp(2j * np.pi * k / (degree + 1))
        with np.errstate(all="ignore"):
            invisible &= homotopy.target_residual(turned) <= opts.endpoint_residual
    return invisible


def _target_degree(homotopy):
    """A bound on the degree of the target in X_0 (with evaluated minors: the sum of the equations' degrees)."""
    degrees = [int(p.degree) for p in getattr(homotopy, "target", [])] or [1]
    return sum(degrees) if getattr(homotopy, "minors", None) is not None else max(degrees)


#: Samples of a path on its way to s = 0 at s = endgame_radius * endgame_shrink^k, k = 1 .. this (decision 0113):
#: down to s ~ 4e-10 with the defaults, where X_0 of a branch of winding number 6 follows its power of s to a few
#: per cent.
INFINITY_SAMPLES = 14
#: The local exponents alpha_k = log|X_0(s_k+1) / X_0(s_k)| / log(shrink) of this many last samples must agree ...
INFINITY_STEADY_SAMPLES = 4
#: ... to within this fraction of their mean, which must exceed 1 / (2 max_winding) (a branch to infinity of winding
#: number w has alpha >= 1 / w; a finite limit has alpha_k -> 0, never a steady positive value) ...
INFINITY_STEADY_SPREAD = 0.25
#: ... and Newton on the target from the path's point at s = 0 must take X_0 / ||X|| below the tracker's
#: ``infinity_threshold`` within this many corrections, never rising over the second half of them.
INFINITY_NEWTON = 64


def heading_to_infinity(homotopy, points, radius, ends, opts):
    """Which paths are heading to a point at infinity, decided before the endgame (decision 0113).

    Two tests, both needed. The path is followed on the segment to s_k = ``endgame_radius`` * ``endgame_shrink``^k;
    on a branch to a point at infinity X_0 ~ c s^alpha with alpha = m / w > 0 (w the winding number), so the
    local exponents log|X_0(s_k+1) / X_0(s_k)| / log(shrink) settle at one positive value, while towards a finite
    limit they fall to 0. A steady positive exponent over the last samples is only a trend, since a far finite
    zero with X_0 = b_0 looks the same while |c| s^alpha >> |b_0|. So Newton on the target at s = 0, from the path's
    own point there (or its last sample), must also take X_0 / ||X|| below ``opts.infinity_threshold``, the level
    at which the endgame calls its own estimates infinite. Newton goes to the path's own zero and creeps
    towards a singular one, so it stops at |b_0| for a finite zero and never gets below it. A path that fails either
    test, or whose last sample is shared with another path of the batch (a jump), goes on to the endgame.

    Parameters
    ----------
    homotopy : object
        Points are homogeneous coordinates on a patch, X_0 first.
    points : ndarray, shape (P, N)
        The paths at s = ``radius`` (at most ``endgame_radius``).
    radius : ndarray, shape (P,)
    ends : ndarray, shape (P, N)
        The paths' points at s = 0 (NaN where the tracking did not get there).
    opts : TrackerOptions

    Returns
    -------
    heading : ndarray of bool, shape (P,)
    last : ndarray, shape (P, N)
        The last sample (NaN where the path failed on the way).
    steps : ndarray of int, shape (P,)
        Steps taken.

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> from numag.tracking.homotopy import StraightLineHomotopy
    >>> homotopy = StraightLineHomotopy.total_degree(parse_system(["x*y - 1", "x^2 - 4"], ["x", "y"]),
    ...                                              np.random.default_rng(1))
    >>> result = track_paths(homotopy, homotopy.start_solutions(), TrackerOptions(infinity_wanted=False))
    >>> result.status_counts()["converged"], result.status_counts()["at_infinity"]
    (2, 2)
    """
    count = len(points)
    steps = np.zeros(count, dtype=np.int64)
    grid = opts.endgame_radius * opts.endgame_shrink ** np.arange(1, INFINITY_SAMPLES + 1)
    samples = np.full((len(grid),) + points.shape, np.nan, dtype=complex)
    x = np.array(points, dtype=complex, copy=True)
    t = np.array(radius, dtype=float)  # at least grid[0]: the kept points lie in [endgame_radius * shrink, radius]
    alive = np.ones(count, dtype=bool)
    for k, s in enumerate(grid):
        rows = np.flatnonzero(alive)
        if len(rows) == 0:
            break
        inward = Stepper(homotopy, x[rows], t[rows], np.full(len(rows), s), _Segment, rows, opts)
        inward.run()
        steps[rows] += inward.taken
        ok = inward.status == PathStatus.RUNNING
        x[rows[ok]] = inward.points[ok]
        t[rows[ok]] = s
        samples[k, rows[ok]] = inward.points[ok]
        alive[rows[~ok]] = False
    with np.errstate(all="ignore"):
        x0 = np.abs(samples[:, :, 0]) / np.linalg.norm(samples, axis=2)
        alpha = np.log(x0[1:] / x0[:-1]) / np.log(opts.endgame_shrink)
        recent = alpha[-INFINITY_STEADY_SAMPLES:]
        mean = np.mean(recent, axis=0)
        steady = (np.all(np.isfinite(recent), axis=0) & (mean > 0.5 / opts.max_winding)
                  & (np.max(recent, axis=0) - np.min(recent, axis=0) <= INFINITY_STEADY_SPREAD * mean))
    last = samples[-1]
    heading = np.zeros(count, dtype=bool)
    if not np.any(steady):
        return heading, last, steps
    # Newton at s = 0 from the path's own point there, or from its last sample
    rows = np.flatnonzero(steady)
    start = np.where(np.all(np.isfinite(ends[rows]), axis=1)[:, None], ends[rows], last[rows])
    z = start.copy()
    zeros = np.zeros(len(rows), dtype=complex)
    history = np.full((INFINITY_NEWTON, len(rows)), np.nan, dtype=complex)
    with np.errstate(all="ignore"):
        for k in range(INFINITY_NEWTON):
            values, jacobian, _ = homotopy.evaluate(z, zeros)
            z = z - _solve(jacobian, values)
            history[k] = z[:, 0] / np.linalg.norm(z, axis=1)
        # Aitken's extrapolation of X_0 / ||X|| from three consecutive corrections (common practice, no source):
        # Newton's error shrinks by a steady ratio near a singular zero, so x_k = b_0 + a r^k + O(error^2)
        steps_ = np.diff(history, axis=0)
        limit = history[2:] - steps_[1:] ** 2 / (steps_[1:] - steps_[:-1])
        small = np.abs(limit) <= opts.infinity_threshold  # NaN (no progress at all) is never small
        three = small[:-2] & small[1:-1] & small[2:]
        below = np.any(three, axis=0) & (np.abs(history[-1]) <= x0[-1, rows])
    heading[rows[below]] = True
    # two stopped paths at one point of one s are one path: a jump, which the endgame's cycle counts would see
    chosen = np.flatnonzero(heading)
    if len(chosen) > 1:
        labels = cluster_labels(normalize_projective(last[chosen]), _CYCLE_ESTIMATES ** 1.5, projective=True)
        heading[chosen[np.bincount(labels)[labels] > 1]] = False
    return heading, last, steps


def stopped_early(status, winding):
    """Paths stopped on their way to infinity before the endgame (:func:`heading_to_infinity`): status at infinity
    with winding number 0, the one mark they carry (their endpoint is their last sample, not a point at infinity).

    Examples
    --------
    >>> stopped_early([PathStatus.AT_INFINITY, PathStatus.AT_INFINITY, PathStatus.FAILED_ENDGAME], [0, 2, 0]).tolist()
    [True, False, False]
    """
    return (np.asarray(status) == PathStatus.AT_INFINITY) & (np.asarray(winding) == 0)


class InfinityVerdict(TextEnum):
    """What Newton on the target says of a path the endgame called infinite (:func:`confirm_infinity`)."""

    FINITE = "finite"
    AT_INFINITY = "at_infinity"
    UNDECIDED = "undecided"


#: Endgame estimates this close (relative, as lines) came from one cycle (the loose tolerance of cycle counts).
_CYCLE_ESTIMATES = 1e-4
#: Newton corrections on the target from a path's point at s = 0 when its endgame estimate was called infinite.
#: Enough for a path creeping to a singular point at infinity (halving its distance at a double point) to get
#: far below the accuracy where X_0 could still count as nonzero, while a regular zero stays where it is.
CONFIRM_ITERATIONS = 16
#: X_0 / ||X|| must exceed this many times the point's accuracy for a finite verdict; between 1 and this many
#: times the accuracy the path is undecided.
CONFIRM_MARGIN = 10.0


def confirm_infinity(homotopy, points, iterations=CONFIRM_ITERATIONS):
    """Judge again paths whose endgame estimate was called infinite, from their points at s = 0 (decision 0103).

    The endgame averages over circles, and where finite regular zeros lie within 1e-3 of a multiple point at
    infinity (a finite solution of size 1e3, which no change of units can bring nearer when the coordinates mix
    large and small ones) one circle encloses them all: the estimate is the point at infinity. The path's own
    point at s = 0 is near its own zero. Newton on the target from there stays at a regular zero (its corrections
    fall to its accuracy) and creeps towards a singular one (by a fixed ratio per correction), so after
    ``iterations`` corrections a path to a singular point at infinity has X_0 far below its accuracy. The
    accuracy of X_0 / ||X|| is the larger of the last two corrections and eps times the projective condition:
    above ``CONFIRM_MARGIN`` times it the zero is finite, at most once it the endgame's verdict stands, between
    the two numag cannot tell.

    Parameters
    ----------
    homotopy : Homotopy
        Its points are homogeneous coordinates on a patch, X_0 first.
    points : ndarray, shape (P, N)
        The paths' points at s = 0.
    iterations : int

    Returns
    -------
    verdict : ndarray of InfinityVerdict (object)
    points : ndarray, shape (P, N)
        Where Newton ended.
    condition : ndarray, shape (P,)
        Projective condition there.

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> from numag.tracking.homotopy import StraightLineHomotopy
    >>> system = parse_system(["x - 1000*y", "y^2 - 1"], ["x", "y"])
    >>> homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(0))
    >>> near = np.array([[1e-3, 1, 1e-3]]) * (1 + 1e-6)
    >>> near = near / (near @ homotopy.projective_patch)[:, None]
    >>> verdict, point, _ = confirm_infinity(homotopy, near)
    >>> verdict[0].value, round(float((point[0, 1] / point[0, 0]).real))
    ('finite', 1000)
    """
    x = np.array(points, dtype=complex, copy=True)
    zeros = np.zeros(len(x), dtype=complex)
    last = before = np.full(len(x), np.inf)
    halfway = x
    with np.errstate(all="ignore"):
        for k in range(iterations):
            values, jacobian, _ = homotopy.evaluate(x, zeros)
            delta = _solve(jacobian, values)
            x = x - delta
            before, last = last, np.linalg.norm(delta, axis=1) / np.linalg.norm(x, axis=1)
            if k + 1 == iterations // 2:
                halfway = x
        # a regular zero: Newton has stood still at its rounding over the second half; a singular one: it crept on
        moved = np.linalg.norm(x - halfway, axis=1) / np.linalg.norm(x, axis=1)
        known = np.all(np.isfinite(x), axis=1)  # Newton that left every bound (a singular J) tells nothing
        condition = np.full(len(x), np.inf)
        if np.any(known):
            _, jacobian, _ = homotopy.evaluate(x[known], zeros[known])
            usable = np.all(np.isfinite(jacobian), axis=(1, 2))
            known[known] = usable
            if np.any(usable):
                condition[known] = projective_condition(jacobian[usable], x[known],
                                                        homotopy.row_scales(x[known]))
        relative_x0 = np.abs(x[:, 0]) / np.linalg.norm(x, axis=1)
        accuracy = np.maximum(np.maximum(last, before), np.finfo(float).eps * condition)
        still = moved <= CONFIRM_MARGIN * accuracy
    known &= np.isfinite(accuracy) & np.isfinite(relative_x0)
    finite = known & still & (relative_x0 > CONFIRM_MARGIN * accuracy)
    undecided = known & still & ~finite & (relative_x0 > accuracy)
    verdict = np.full(len(x), InfinityVerdict.AT_INFINITY, dtype=object)
    verdict[finite] = InfinityVerdict.FINITE
    verdict[undecided] = InfinityVerdict.UNDECIDED
    return verdict, x, condition


def track_paths(homotopy, start_points, options=None, progress=None):
    """Track every start point from s = 1 to s = 0 together, with the endgame and a cautious retry.

    Parameters
    ----------
    homotopy : StraightLineHomotopy (or any object with the same ``evaluate`` and ``evaluations``)
    start_points : ndarray, shape (P, N)
    options : TrackerOptions, optional
    progress : Progress, optional
        Told (:mod:`numag.run.progress`) after every step of the bulk of the tracking how many paths
        are past it (s = 0.1): ``done`` of ``total`` = the batch's paths.

    Returns
    -------
    TrackResult
    """
    opts = options or TrackerOptions()
    start_points = np.asarray(start_points, dtype=complex)
    # the batch's working arrays: about a dozen of (P, N, N) complex (Jacobians, stages, inverses)
    check_memory(16 * 12 * len(start_points) * start_points.shape[-1] ** 2 if start_points.ndim == 2 else 0,
                 f"tracking {len(start_points)} paths together")
    before = homotopy.evaluations
    on_step = None if progress is None else (
        lambda finished: progress(f"{finished} of {len(start_points)} paths past the bulk of their tracking",
                                  done=finished, total=len(start_points)))
    endpoints, status, steps, condition, winding, endgame = _track(homotopy, start_points, opts, on_step=on_step)
    retracked = np.zeros(len(status), dtype=bool)
    failed = np.nonzero(status >= PathStatus.FAILED_MIN_STEP)[0]
    if len(failed):
        cautious = replace(opts, initial_step=opts.initial_step / 10, max_step=opts.max_step / 10,
                           corrector_tolerance=opts.corrector_tolerance / 10, max_steps=opts.max_steps * 5,
                           endgame_rounds=opts.endgame_rounds * DEEPER_ENDGAME_ROUNDS)
        again = _track(homotopy, start_points[failed], cautious)
        retracked[failed] = True
        endpoints[failed], status[failed], extra_steps, condition[failed], winding[failed], endgame[failed] = again
        steps[failed] += extra_steps
    digits = np.full(len(status), 16, dtype=np.int64)
    failed = np.nonzero(status >= PathStatus.FAILED_MIN_STEP)[0]
    if len(failed) and opts.rescue_digits and hasattr(homotopy, "evaluate_precise"):
        rescued, nears = [], []
        # The rescue's work is bounded: an mpmath step costs about 7 evaluations of every term and its
        # derivatives, so large systems get fewer steps, and a batch gets a total budget; paths beyond
        # it stay failed (counted and reported), instead of a 1,600-term equation running for ten minutes.
        terms = sum(p.n_terms for p in getattr(homotopy, "target", ())) or 1
        # each of a step's ~7 evaluations also builds and solves the N x N Jacobian in mpmath (N^3 operations):
        # with few terms that dominates (a sweep of one quadratic: 4.6 ms a step, ~55 us per term counted alone,
        # so a batch ran for minutes; decision 0143)
        per_step = 7 * (terms * start_points.shape[1] + start_points.shape[1] ** 3)
        shared = _RESCUE_BUDGET.get()
        budget = RESCUE_WORK_PER_BATCH if shared is None else min(RESCUE_WORK_PER_BATCH, shared[0])
        granted = budget
        for k in failed:  # the few stragglers, one at a time in mpmath
            allowed = min(20000, RESCUE_WORK_PER_PATH // per_step, budget // per_step)
            if allowed < 20:
                break
            near, used = track_segment_precise(homotopy, start_points[k], 1.0, opts.endgame_radius,
                                               opts.rescue_digits, max_steps=allowed)
            budget -= used * per_step
            steps[k] += used
            digits[k] = opts.rescue_digits
            if near is not None:
                rescued.append(k)
                nears.append(near)
        if shared is not None:
            shared[0] -= granted - budget
        if rescued:
            rescued = np.array(rescued)
            deeper = replace(opts, endgame_rounds=opts.endgame_rounds * DEEPER_ENDGAME_ROUNDS)
            again = _track(homotopy, None, deeper, near=np.array(nears))
            endpoints[rescued], status[rescued], extra_steps, condition[rescued], winding[rescued], \
                endgame[rescued] = again
            steps[rescued] += extra_steps
    return TrackResult(endpoints, status, steps, condition, winding, endgame, retracked,
                       homotopy.evaluations - before, digits=digits)


class BatchTracker:
    """Tracks the paths with the given numbers; picklable, so executors can send it to worker processes.

    Parameters
    ----------
    homotopy : object
        As for :func:`track_paths`.
    starts : callable
        ``starts(indices)`` gives the start points of those paths.
    options : TrackerOptions

    Returns (when called)
    ---------------------
    dict of ndarray
        ``indices``, ``endpoints``, ``status``, ``steps``, ``winding``, ``condition``, ``retracked``,
        ``digits``, ``evaluations``: plain arrays, so that a batch can be saved with numpy alone.
    """

    def __init__(self, homotopy, starts, options=None):
        self.homotopy, self.starts, self.options = homotopy, starts, options
        self.progress = None  # only in-process: a callable does not cross processes

    def __call__(self, indices):
        indices = np.asarray(indices)
        starts = self.starts(indices)
        result = track_paths(self.homotopy, starts, self.options, progress=self.progress)
        return {"indices": indices, "endpoints": result.endpoints, "status": result.status,
                "steps": result.steps, "winding": result.winding, "condition": result.condition,
                "retracked": result.retracked, "digits": result.digits,
                "evaluations": np.asarray(result.evaluations)}


class StartArray:
    """Start points given as an array (picklable, unlike a closure)."""

    def __init__(self, points):
        self.points = points

    def __call__(self, indices):
        return self.points[indices]
