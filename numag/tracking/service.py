"""The one place where batches of paths are tracked: :func:`track`.

Every stage that moves points along a homotopy (``solve``, the witness
regeneration, membership tests, monodromy moves, the null-vector projection)
calls :func:`track`. It cuts the paths into batches whose boundaries depend on
the batch size only (decision 0006), runs them here or through an executor,
saves each finished batch to a run folder and reads verified batches back on
resume, turns lost batches into failed paths, and repairs jumped paths with one
rule (decision 0034): two paths at one regular endpoint mean one of them
jumped, so those paths are tracked again, more cautiously each round, then
every path with a fresh gamma, and whatever still shares an endpoint is counted
as failed. The result is a :class:`TrackRun`: per-path arrays, typed
:class:`PathCounts` and the execution summary.

Examples
--------
>>> import numpy as np
>>> from numag.system.parse import parse_system
>>> from numag.tracking.homotopy import StraightLineHomotopy
>>> circle_and_line = parse_system(["x^2 + y^2 - 5", "x - y - 1"], ["x", "y"])
>>> homotopy = StraightLineHomotopy.total_degree(circle_and_line, np.random.default_rng(1))
>>> run = track(homotopy, homotopy.start_solutions(), batch_size=1)
>>> run.counts.converged, run.execution["batches"], np.round(np.sort(run.affine_endpoints()[:, 0].real), 6)
(2, 2, array([-1.,  2.]))
"""

from dataclasses import dataclass, field, replace
import time

import numpy as np
from threadpoolctl import threadpool_limits

from ..errors import InputError
from ..run.checkpoint import DamagedBatch
from ..run.executor import InProcess
from ..run.progress import tell_paths
from ..numeric.cluster import cluster_labels, groups, normalize_projective
from .tracker import FAILURE_LABELS, BatchTracker, PathStatus, StartArray, TrackerOptions, stopped_early

__all__ = ["PathCounts", "add_path_counts", "TrackRun", "track", "JUMP_ROUNDS", "FRESH_GAMMA_ROUND", "JUMP_STEP_DIVISOR",
           "JUMP_PREDICTOR_ERROR_DIVISOR", "JUMP_TOLERANCE"]

#: The jump-repair rule (decision 0034). Rounds of repair before the paths still sharing a regular
#: endpoint are counted as failed.
JUMP_ROUNDS = 5
#: The round in which every path is tracked again with a fresh gamma (a new pairing of starts and ends).
FRESH_GAMMA_ROUND = 2
#: Each other round re-tracks the crossed paths with the largest step divided by this ...
JUMP_STEP_DIVISOR = 4.0
#: ... and the predictor error the step control aims at divided by this (cumulative over rounds).
JUMP_PREDICTOR_ERROR_DIVISOR = 10.0
#: Two regular endpoints closer than this (relative) are one point: the paths that share it jumped.
JUMP_TOLERANCE = 1e-6
#: Singular endpoints (and points at infinity) reached by a cycle of winding number w are one point to
#: about eps^(1/w) at best; endpoints this close (relative, as lines) are taken as one point when the
#: paths of each cycle are counted. Merging two true points never hides a count that is not a multiple
#: of w, so the tolerance errs on the loose side.
CYCLE_TOLERANCE = 1e-4


@dataclass(frozen=True, kw_only=True)
class PathCounts:
    """Tracked paths by how they ended; the statuses add up to ``tracked``.

    Attributes
    ----------
    tracked, converged, singular_endpoint, at_infinity : int
    failed_by_reason : dict
        Failure label -> number of paths, every label of
        :data:`~numag.tracking.tracker.FAILURE_LABELS` present.
    retracked : int
        Paths tracked again (after a failure, or after a jump).
    retracked_after_jump : int
        Re-tracks of paths that shared a regular endpoint, summed over the repair rounds.
    rescued_in_high_precision : int
        Paths whose last tracking ran in mpmath.
    stopped_at_infinity : int
        Of the paths at infinity, those stopped on their way there before the endgame, where the caller did not
        want their ends (:func:`~numag.tracking.tracker.heading_to_infinity`, decision 0113).

    Examples
    --------
    >>> counts = PathCounts.of([1, 1, 4])
    >>> counts.tracked, counts.converged, counts.failed
    (3, 2, 1)
    >>> (counts + counts).failed_by_reason["minimum_step"]
    2
    """

    tracked: int = 0
    converged: int = 0
    singular_endpoint: int = 0
    at_infinity: int = 0
    failed_by_reason: dict = field(default_factory=lambda: {label: 0 for label in FAILURE_LABELS})
    retracked: int = 0
    retracked_after_jump: int = 0
    rescued_in_high_precision: int = 0
    stopped_at_infinity: int = 0

    @classmethod
    def of(cls, status, retracked=None, digits=None, retracked_after_jump=0, winding=None):
        """Counts from per-path statuses (and, optionally, the re-tracked flags, digits and winding numbers per
        path)."""
        status = np.asarray(status)
        return cls(tracked=int(len(status)),
                   converged=int(np.sum(status == PathStatus.CONVERGED)),
                   singular_endpoint=int(np.sum(status == PathStatus.SINGULAR_ENDPOINT)),
                   at_infinity=int(np.sum(status == PathStatus.AT_INFINITY)),
                   failed_by_reason={code.label: int(np.sum(status == code)) for code in PathStatus if code.failed},
                   retracked=0 if retracked is None else int(np.sum(retracked)),
                   retracked_after_jump=int(retracked_after_jump),
                   rescued_in_high_precision=0 if digits is None else int(np.sum(np.asarray(digits) > 16)),
                   stopped_at_infinity=0 if winding is None else int(np.sum(stopped_early(status, winding))))

    @property
    def failed(self):
        """Paths that failed, whatever the reason."""
        return sum(self.failed_by_reason.values())

    @property
    def runs(self):
        """Paths tracked, the re-tracks of jumped paths included (what a membership test costs)."""
        return self.tracked + self.retracked_after_jump

    def __add__(self, other):
        return PathCounts(tracked=self.tracked + other.tracked, converged=self.converged + other.converged,
                          singular_endpoint=self.singular_endpoint + other.singular_endpoint,
                          at_infinity=self.at_infinity + other.at_infinity,
                          failed_by_reason={label: self.failed_by_reason[label] + other.failed_by_reason[label]
                                            for label in FAILURE_LABELS},
                          retracked=self.retracked + other.retracked,
                          retracked_after_jump=self.retracked_after_jump + other.retracked_after_jump,
                          rescued_in_high_precision=self.rescued_in_high_precision
                          + other.rescued_in_high_precision,
                          stopped_at_infinity=self.stopped_at_infinity + other.stopped_at_infinity)

    def by_label(self):
        """Paths per status label (failures by reason), plus ``retracked_after_jump`` and ``stopped_at_infinity``
        (a part of ``at_infinity``) when there were any."""
        labels = {"converged": self.converged, "singular_endpoint": self.singular_endpoint,
                  "at_infinity": self.at_infinity, **self.failed_by_reason}
        if self.retracked_after_jump:
            labels["retracked_after_jump"] = self.retracked_after_jump
        if self.stopped_at_infinity:
            labels["stopped_at_infinity"] = self.stopped_at_infinity
        return labels

    def add_to(self, counts):
        """Add these paths into ``counts``, a dict by label (decompositions and singular loci keep theirs so).

        ``tracked`` grows by the paths, each counted once, so that the statuses still add up to it; the
        re-tracks of jumped paths go under ``retracked_after_jump`` (what the repair cost, not more paths).

        Examples
        --------
        >>> counts = PathCounts.of([1, 1, 4], retracked_after_jump=2).add_to({"tracked": 5, "converged": 5})
        >>> counts["tracked"], counts["converged"], counts["minimum_step"], counts["retracked_after_jump"]
        (8, 7, 1, 2)
        """
        counts["tracked"] = counts.get("tracked", 0) + self.tracked
        for label, value in self.by_label().items():
            counts[label] = counts.get(label, 0) + value
        return counts

    def report(self):
        """The ``paths`` block of a solve report."""
        return {"tracked": self.tracked, "converged": self.converged, "singular_endpoint": self.singular_endpoint,
                "at_infinity": self.at_infinity, "failed": self.failed,
                "failed_by_reason": dict(self.failed_by_reason), "retracked": self.retracked,
                "rescued_in_high_precision": self.rescued_in_high_precision,
                "stopped_at_infinity": self.stopped_at_infinity}


def add_path_counts(total, counts):
    """Add a ``paths`` block into ``total`` (in place), the labels of nested blocks at the top level.

    The failures by reason of a nested block (``solve``'s report) are counted under their labels: a nested
    block skipped made failed paths vanish from a singular-locus report.

    Examples
    --------
    >>> total = {"tracked": 2}
    >>> add_path_counts(total, {"tracked": 3, "failed_by_reason": {"minimum_step": 1}})
    >>> total
    {'tracked': 5, 'minimum_step': 1}
    """
    for key, value in counts.items():
        if isinstance(value, dict):
            add_path_counts(total, value)
        elif isinstance(value, (int, np.integer)):
            total[key] = total.get(key, 0) + int(value)


@dataclass(kw_only=True)
class TrackRun:
    """What :func:`track` returns: per-path arrays, their counts and where the batches ran.

    Attributes
    ----------
    homotopy : object
        The homotopy the endpoints belong to (a fresh-gamma round replaces the one given).
    endpoints : ndarray, shape (P, N)
        Homogeneous endpoints on the patch (NaN for paths of lost batches).
    status : ndarray of int, shape (P,)
        :class:`~numag.tracking.tracker.PathStatus` values.
    steps, winding : ndarray of int, shape (P,)
    condition : ndarray, shape (P,)
    retracked : ndarray of bool, shape (P,)
        Paths tracked again after a failure or a jump.
    digits : ndarray of int, shape (P,)
        16 (double precision) or the digits of the precision rescue the path needed.
    evaluations : int
        Batched evaluations of H, re-tracks included.
    jump_retracks : int
        Re-tracks of jumped paths, summed over the repair rounds.
    execution : dict
        The executor's summary (``executor``, ``workers``, ``retries``, ``failed_batches``) with
        ``batches``, ``batches_resumed``, ``batches_rejected``, ``batch_size``, ``run_folder`` and
        ``tracking_seconds`` (the batches and the repairs).
    """

    homotopy: object
    endpoints: np.ndarray
    status: np.ndarray
    steps: np.ndarray
    winding: np.ndarray
    condition: np.ndarray
    retracked: np.ndarray
    digits: np.ndarray
    evaluations: int = 0
    jump_retracks: int = 0
    execution: dict = field(default_factory=dict)

    @classmethod
    def empty(cls, size, homotopy=None):
        """A run of no paths, with endpoints of ``size`` homogeneous coordinates."""
        none = np.zeros(0, dtype=np.int64)
        return cls(homotopy=homotopy, endpoints=np.zeros((0, size), dtype=complex), status=none, steps=none.copy(),
                   winding=none.copy(), condition=np.zeros(0), retracked=np.zeros(0, dtype=bool), digits=none.copy())

    @property
    def counts(self):
        """The paths by status, as :class:`PathCounts`."""
        return PathCounts.of(self.status, self.retracked, self.digits, self.jump_retracks, self.winding)

    def affine_endpoints(self, jumped_limits=False):
        """Endpoints divided by X_0 (NaN where the path failed or went to infinity).

        With ``jumped_limits``, also the singular endpoints that the jump repair could not fit into whole
        cycles (:func:`track` with ``whole_cycles``): counted as jumped paths, but their points are limits
        the endgame settled on the target (a search for points takes them; a count of paths must not).
        """
        finite = (self.status == PathStatus.CONVERGED) | (self.status == PathStatus.SINGULAR_ENDPOINT)
        if jumped_limits:
            finite |= (self.status == PathStatus.FAILED_JUMP) & np.all(np.isfinite(self.endpoints), axis=1)
        with np.errstate(all="ignore"):
            ends = self.endpoints[:, 1:] / self.endpoints[:, :1]
        return np.where(finite[:, None], ends, np.nan)


def track(homotopy, starts, options=None, *, count=None, executor=None, run_folder=None, batch_size=4096,
          progress=None, projective=False, jump_tolerance=JUMP_TOLERANCE, fresh_homotopy=None, whole_cycles=False):
    """Track every path of a homotopy in batches, repair jumped paths, and count how they ended.

    Parameters
    ----------
    homotopy : object
        Anything :func:`~numag.tracking.tracker.track_paths` tracks.
    starts : ndarray, shape (P, N), or callable
        The start points on the patch, or ``starts(indices)`` giving those of some paths.
    options : TrackerOptions, optional
    count : int, optional
        The number of paths (needed when ``starts`` is a callable).
    executor : Executor, callable or None
        Runs the batches: an executor (the caller closes it), a function of the number of batches
        left to run that makes one (closed here), or None (every batch runs here and an error
        raised while tracking propagates).
    run_folder : RunFolder, optional
        Each finished batch is written there; batches already there are read back, verified
        and not tracked again (a batch that fails the check is tracked again and named in
        ``execution["batches_rejected"]``).
    batch_size : int
    progress : Progress, optional
        Told (:mod:`numag.run.progress`) the paths done and in all before the first batch
        and after each one (and after every step when the batches run in this process).
    projective : bool
        Compare endpoints as projective points (lines) when looking for jumped paths; else as
        affine points X / X_0.
    jump_tolerance : float
        Relative distance under which two regular endpoints are one point.
    fresh_homotopy : callable, optional
        ``fresh_homotopy()`` gives ``(homotopy, starts)`` with a fresh gamma (and patch) for the
        same paths, for the round of the repair that tracks every path again.
    whole_cycles : bool
        The starts are every solution of a generic start system (a total-degree start, a
        regeneration's), so the paths of winding number w at one singular endpoint or point at
        infinity come in whole cycles of w: a count that is not is repaired as a jump. Not for a
        subset of the solutions (moving some points, a parameter sweep), whose cycles may be partial.

    Returns
    -------
    TrackRun
    """
    options = options or TrackerOptions()
    if not callable(starts):
        starts = StartArray(np.asarray(starts, dtype=complex))
        count = len(starts.points) if count is None else count
    total = int(count)
    run = TrackRun(homotopy=homotopy, endpoints=np.full((total, homotopy.size), np.nan, dtype=complex),
                   status=np.zeros(total, dtype=np.int64), steps=np.zeros(total, dtype=np.int64),
                   winding=np.ones(total, dtype=np.int64), condition=np.full(total, np.inf),
                   retracked=np.zeros(total, dtype=bool), digits=np.full(total, 16, dtype=np.int64))
    batches = [np.arange(first, min(total, first + batch_size)) for first in range(0, total, batch_size)]
    finished, rejected = _read_back(run, batches, run_folder, options)
    todo = [k for k in range(len(batches)) if k not in finished]
    made_here = callable(executor) and not hasattr(executor, "run")
    if made_here:
        executor = executor(len(todo))
    try:
        started = time.perf_counter()
        description = _track_batches(run, homotopy, starts, options, [batches[k] for k in todo], executor,
                                     run_folder=run_folder, numbers=todo, progress=progress,
                                     done=sum(len(batches[k]) for k in finished), total=total)
        _repair_jumps(run, starts, options, batch_size, executor, projective, jump_tolerance, fresh_homotopy,
                      whole_cycles)
        description.update(batches=len(batches), batches_resumed=len(finished), batches_rejected=rejected,
                           batch_size=batch_size, run_folder=None if run_folder is None else str(run_folder.path),
                           tracking_seconds=time.perf_counter() - started)
    finally:
        if made_here:
            executor.close()
    run.execution = description
    return run


def _store(run, indices, result):
    """One batch's result into the run's arrays."""
    run.endpoints[indices], run.status[indices], run.steps[indices] = \
        result["endpoints"], result["status"], result["steps"]
    run.winding[indices], run.condition[indices] = result["winding"], result["condition"]
    run.retracked[indices], run.digits[indices] = result["retracked"], result["digits"]
    run.evaluations += int(result["evaluations"])


def _read_back(run, batches, folder, options):
    """Store the verified batches of a run folder; (their numbers, the rejected ones with the reason)."""
    finished, rejected = set(), []
    for k in sorted(folder.finished() if folder is not None else ()):
        if k >= len(batches):
            rejected.append({"index": k, "reason": f"batch {k} is not part of this run"})
            continue
        try:  # saved state is verified, never trusted: a batch that fails is tracked again
            arrays = folder.read_batch(k)
        except DamagedBatch as err:
            rejected.append({"index": k, "reason": str(err)})
            continue
        try:
            _store(run, batches[k], _verified_batch(arrays, batches[k], run.homotopy, options))
            finished.add(k)
        except InputError as err:
            rejected.append({"index": k, "reason": f"{folder.batch_path(k).name}: {err}"})
    return finished, rejected


def _track_batches(run, homotopy, starts, options, batches, executor, *, run_folder=None, numbers=None,
                   progress=None, done=0, total=0):
    """Track the batches (here when ``executor`` is None) into ``run``; the executor's summary.

    Paths of a batch that failed twice on the executor become failed paths (never lost silently),
    and the summary names the batch (``numbers`` maps positions to batch numbers).
    """
    numbers = list(range(len(batches))) if numbers is None else numbers
    tracker = BatchTracker(homotopy, starts, options)
    if progress is not None:
        tell_paths(progress, done, total)  # the starting point: paths read back from the run folder
        if executor is None or isinstance(executor, InProcess):
            # a step of the running batch: its paths past the bulk, on top of the batches finished so far
            tracker.progress = lambda message, **counts: tell_paths(progress, done + (counts["done"] or 0), total)
    if executor is None:
        for position, rows in enumerate(batches):
            with threadpool_limits(limits=1):
                result = tracker(rows)
            _store(run, rows, result)
            done += len(rows)
            if run_folder is not None:
                run_folder.write_batch(numbers[position], result)
            tell_paths(progress, done, total)
        return InProcess().describe()
    for position, result in executor.run(tracker, batches):
        _store(run, batches[position], result)
        if run_folder is not None:
            run_folder.write_batch(numbers[position], result)
        done += len(result["indices"])
        tell_paths(progress, done, total)
    description = executor.describe()
    for failure, info in zip(executor.failures, description["failed_batches"]):
        rows = batches[failure.index]
        run.status[rows] = PathStatus.FAILED_BATCH
        run.endpoints[rows] = np.nan
        info["index"] = numbers[failure.index]
        info["paths"] = [int(rows[0]), int(rows[-1])]
    return description


def _repair_jumps(run, starts, options, batch_size, executor, projective, tolerance, fresh_homotopy,
                  whole_cycles=False):
    """The jump-repair rule (decision 0034), in place on ``run``.

    Two paths at one regular endpoint mean one of them jumped (a regular solution has one path).
    Round after round the paths that share a regular endpoint are tracked again with the largest
    step divided by :data:`JUMP_STEP_DIVISOR` and the aimed predictor error by
    :data:`JUMP_PREDICTOR_ERROR_DIVISOR` (cumulative), with three full Newton corrections (a smaller
    basin to jump into); in round :data:`FRESH_GAMMA_ROUND` every path is tracked again with a
    fresh gamma instead (the pairing of starts and ends depends on gamma, so a subset is never
    re-tracked with another one). After :data:`JUMP_ROUNDS` rounds one path of each group keeps the
    endpoint and the others count as failed (``jumped``).
    """
    cautious = options
    for round_ in range(JUMP_ROUNDS + 1):
        crossed = _crossed(run, projective, tolerance)
        broken = _broken_cycles(run) if whole_cycles else []
        stationary = _on_stationary_points(run, options.singular_condition)
        if len(crossed) == 0 and len(broken) == 0 and len(stationary) == 0:
            return
        if round_ == JUMP_ROUNDS:
            run.status[stationary] = PathStatus.FAILED_JUMP
            run.endpoints[stationary] = np.nan
            labels = _same_endpoint_labels(run.homotopy, run.endpoints[crossed], projective, tolerance)
            for members in groups(labels):
                run.status[crossed[members[1:]]] = PathStatus.FAILED_JUMP
                run.endpoints[crossed[members[1:]]] = np.nan
            for group in broken:  # the paths beyond whole cycles: which of them jumped is unknown
                excess = group[len(group) - len(group) % int(run.winding[group[0]]):]
                # A group of fewer paths than one cycle is all excess, yet its point is a limit the endgame
                # settled on the target: the point exists whichever path jumped. One path keeps it (still
                # counted as jumped) for callers that ask for such limits (decision 0065); a tacnode's
                # rank-drop system lost its only singular point here.
                keep = len(excess) == len(group) and run.status[group[0]] == PathStatus.SINGULAR_ENDPOINT
                run.status[excess] = PathStatus.FAILED_JUMP
                run.endpoints[excess[1:] if keep else excess] = np.nan
            return
        crossed = np.union1d(crossed, np.concatenate(broken)) if broken else crossed
        crossed = np.union1d(crossed, stationary).astype(np.int64)
        run.jump_retracks += len(crossed)
        if round_ == FRESH_GAMMA_ROUND and fresh_homotopy is not None:
            run.homotopy, starts = fresh_homotopy()
            starts = starts if callable(starts) else StartArray(np.asarray(starts, dtype=complex))
            paths = np.arange(len(run.status))
            retrack = [paths[first:first + batch_size] for first in range(0, len(paths), batch_size)]
            steps = run.steps.copy()
            _track_batches(run, run.homotopy, starts, cautious, retrack,
                           executor if executor is not None and len(retrack) > 1 else None)
            run.steps += steps
            run.retracked[:] = True
            continue
        cautious = replace(cautious, max_step=cautious.max_step / JUMP_STEP_DIVISOR,
                           predictor_error=cautious.predictor_error / JUMP_PREDICTOR_ERROR_DIVISOR,
                           max_steps=cautious.max_steps * 5, corrector_iterations=3, chord_corrector=False)
        # the few crossed paths run here: sending them to workers costs more than tracking them
        steps = run.steps[crossed]
        retrack = [crossed[first:first + batch_size] for first in range(0, len(crossed), batch_size)]
        _track_batches(run, run.homotopy, starts, cautious, retrack, None)
        run.steps[crossed] += steps
        run.retracked[crossed] = True


def _coordinates(homotopy, endpoints):
    """The columns of endpoints that are coordinates: a homotopy whose points carry a label (the cell of a
    polyhedral path) names them with ``point_columns()``, and labels never keep two endpoints apart."""
    return endpoints[:, homotopy.point_columns()] if hasattr(homotopy, "point_columns") else endpoints


def _comparable(endpoints, projective):
    """Endpoints as affine points X / X_0, or normalised homogeneous ones for projective systems.

    No endpoints give no rows (the last repair round may find no crossed paths beside broken cycles or
    stationary ends; reshaping an empty array to (0, -1) is an error).
    """
    if projective:
        if len(endpoints) == 0:
            return np.zeros((0,) + np.shape(endpoints)[1:], dtype=complex)
        return normalize_projective(endpoints).reshape(len(endpoints), -1)
    with np.errstate(all="ignore"):
        return endpoints[:, 1:] / endpoints[:, :1]


def _crossed(run, projective, tolerance):
    """Paths that share a regular (well-conditioned) endpoint with another path: a sign of path jumping."""
    regular = np.nonzero(run.status == PathStatus.CONVERGED)[0]
    if len(regular) < 2:
        return np.zeros(0, dtype=np.int64)
    points = _comparable(_coordinates(run.homotopy, run.endpoints[regular]), projective)
    finite = np.all(np.isfinite(points), axis=1)
    regular, points = regular[finite], points[finite]
    if len(regular) < 2:
        return np.zeros(0, dtype=np.int64)
    labels = _same_endpoint_labels(run.homotopy, run.endpoints[regular], projective, tolerance, points)
    return regular[np.bincount(labels)[labels] > 1]


def _on_stationary_points(run, singular_condition):
    """Paths that ended regularly at a point at infinity that the homotopy has at every s: they jumped.

    Through a regular solution of H(X, s) = 0 passes one solution curve; at a point that solves H for every s
    that curve is the constant one, so a path from a finite start cannot end there with winding number 1
    (two circles share the circular points at infinity in every member of a family, and a sweep's path that
    jumped onto one lost a real solution without a trace; decision 0104). A homotopy says which of its points
    are such points with ``stationary(points)``; others have none.
    """
    if not hasattr(run.homotopy, "stationary"):
        return np.zeros(0, dtype=np.int64)
    # regular: winding number 1 and a well-conditioned endpoint (where a finite solution runs into such a point at a
    # special member the endpoint is singular, and the argument says nothing)
    ends = np.nonzero((run.status == PathStatus.AT_INFINITY) & (run.winding == 1)
                      & (run.condition <= singular_condition))[0]
    ends = ends[np.all(np.isfinite(run.endpoints[ends]), axis=1)]
    if len(ends) == 0:
        return ends
    return ends[np.asarray(run.homotopy.stationary(run.endpoints[ends]), dtype=bool)]


def _broken_cycles(run):
    """Groups of paths at one singular endpoint (or point at infinity) whose count is not a whole number
    of cycles: a sign of path jumping.

    The Cauchy endgame gives each path the winding number w of its cycle, and the w paths of a cycle
    end at one point; so the paths with winding number w at one endpoint come in multiples of w. A path
    that jumped onto another one's way to infinity (where the regular-endpoint test cannot see it:
    points at infinity are shared by many paths) leaves a count that is not (decision 0034).

    Returns
    -------
    list of ndarray
        Path indices of each group whose count is not a multiple of its winding number.
    """
    # once paths were stopped on their way to infinity (decision 0113), the paths at a point at infinity are no
    # longer whole cycles: only singular endpoints are counted (two stopped paths on one track were caught there)
    kinds = [PathStatus.SINGULAR_ENDPOINT] if np.any(stopped_early(run.status, run.winding)) \
        else [PathStatus.SINGULAR_ENDPOINT, PathStatus.AT_INFINITY]
    ends = np.nonzero(np.isin(run.status, kinds) & (run.winding >= 2))[0]
    if len(ends) == 0:
        return []
    points = run.endpoints[ends]
    finite = np.all(np.isfinite(points), axis=1)
    ends, points = ends[finite], points[finite]
    if len(ends) == 0:
        return []
    labels = cluster_labels(normalize_projective(_coordinates(run.homotopy, points)), CYCLE_TOLERANCE,
                            projective=True)
    keys = [labels, run.winding[ends]]
    if hasattr(run.homotopy, "system_of"):
        keys.append(np.asarray(run.homotopy.system_of(points), dtype=np.int64))
    _, labels = np.unique(np.column_stack(keys), axis=0, return_inverse=True)
    return [ends[m] for m in groups(labels.reshape(-1)) if len(m) % int(run.winding[ends[m[0]]])]


def _same_endpoint_labels(homotopy, endpoints, projective, tolerance, points=None):
    """Labels of equal endpoints. A homotopy that tracks several systems at once (a sweep over parameter
    values) says which system each endpoint belongs to with ``system_of(endpoints)``: endpoints of
    different systems are never one point, however close."""
    points = _comparable(_coordinates(homotopy, endpoints), projective) if points is None else points
    labels = cluster_labels(points, tolerance, projective=projective)
    if hasattr(homotopy, "system_of") and len(labels):
        systems = np.asarray(homotopy.system_of(endpoints), dtype=np.int64)
        _, labels = np.unique(np.column_stack([labels, systems]), axis=0, return_inverse=True)
        labels = labels.reshape(-1)
    return labels


def _verified_batch(arrays, indices, homotopy, tracker_options):
    """A batch read back from a run folder, checked against the run before it counts.

    The paths must be the batch's own, the statuses known, and every endpoint said to be a
    solution (or a point at infinity) must be one: the target's scaled residual at most 1e-6
    (the tracker settles at 1e-8), on the patch, and at infinity exactly when it says so.

    Raises
    ------
    InputError
        Naming what does not match (the caller tracks the batch again).
    """
    expected = {"indices", "endpoints", "status", "steps", "winding", "condition", "retracked", "digits",
                "evaluations"}
    if set(arrays) != expected:
        raise InputError("its arrays are not those of a batch of paths")
    if not np.array_equal(arrays["indices"], indices):
        raise InputError("it holds other paths than the batch's")
    count, size = len(indices), homotopy.size
    endpoints, status = arrays["endpoints"], arrays["status"]
    if endpoints.shape != (count, size) or any(arrays[k].shape != (count,) for k in expected - {"endpoints", "evaluations"}):
        raise InputError("its arrays do not have the batch's shape")
    if not np.isin(status, [int(code) for code in PathStatus if code != PathStatus.RUNNING]).all():
        raise InputError("it holds unknown path statuses")
    # a path stopped on its way to infinity ends at its last sample, which solves no target (decision 0113)
    ends = np.isin(status, [PathStatus.CONVERGED, PathStatus.SINGULAR_ENDPOINT, PathStatus.AT_INFINITY]) \
        & ~stopped_early(status, arrays["winding"])
    points = endpoints[ends]
    if len(points):
        if not np.all(np.isfinite(points)):
            raise InputError("it holds non-finite endpoints")
        with np.errstate(all="ignore"):
            residual = homotopy.target_residual(points)
            patch = np.abs(points @ homotopy.patch - 1)
            infinite = np.abs(points[:, 0]) <= tracker_options.infinity_threshold * np.linalg.norm(points, axis=1)
        said_infinite = status[ends] == PathStatus.AT_INFINITY
        if not (np.all(residual <= 1e-6) and np.all(patch <= 1e-6)):
            raise InputError(f"{int(np.sum((residual > 1e-6) | (patch > 1e-6)))} of its endpoints do not solve the system")
        # at infinity needs X_0 ~ 0; a finite regular endpoint may have a small X_0 (a solution at 1e9)
        if np.any(said_infinite & ~infinite):
            raise InputError("its statuses do not match its endpoints (finite or at infinity)")
    return arrays
