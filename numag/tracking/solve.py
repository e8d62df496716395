"""Isolated solutions of a square polynomial system (``numag solve``).

Pipeline: total-degree homotopy in projective coordinates on a random patch
(:mod:`numag.tracking.homotopy`), batched tracking with the Cauchy endgame
(:mod:`numag.tracking.tracker`), endpoints grouped into distinct points
(:mod:`numag.numeric.cluster`), then for every singular group a local test of
isolation: the group is moved a little along the numerical kernel of J and
projected back onto V(F) with Gauss-Newton. Near an isolated (multiple)
solution the projection falls back onto the solution; on a curve or surface of
solutions it stays away, and the endpoint is flagged "not isolated" and never
counted as a solution. Singular isolated solutions are refined at higher
precision (mpmath); the result records the digits.

Examples
--------
>>> from numag.system.parse import parse_system
>>> system = parse_system(["x^2 - 1", "y - x^3"], ["x", "y"])
>>> result = solve_system(system, seed=0)
>>> sorted(round(s.point[0].real) for s in result.solutions)
[-1, 1]
"""

from dataclasses import dataclass, field, replace
import time

import mpmath
import numpy as np
from threadpoolctl import threadpool_limits

from ..errors import InputError
from ..version import __version__
from ..system.polynomial import PolynomialSystem, require_numeric
from ..run.checkpoint import DamagedBatch, RunFolder, manifest_fingerprints
from ..run.executor import InProcess, charge_paths, check_memory, make_executor
from ..numeric.cluster import cluster_labels, groups, normalize_projective, projective_pivot
from ..numeric.evaluate import BatchEvaluator, PrecisionEvaluator, TermSizes
from ..numeric.refine import IsolationTest, mp_gauss_newton
from ..numeric.scaling import Scaling
from ..numeric.seeds import random_state
from .homotopy import ParameterHomotopy, StraightLineHomotopy
from .tracker import FAILURE_LABELS, BatchTracker, PathStatus, StartArray, TrackerOptions, track_paths

__all__ = ["SolveOptions", "Execution", "Solution", "SolveResult", "solve_system", "continue_solutions",
           "path_counts"]


@dataclass(frozen=True)
class SolveOptions:
    """Options of :func:`solve_system` (defaults declared once).

    Attributes
    ----------
    tracker : TrackerOptions
    cluster_tolerance : float
        Relative distance under which endpoints are the same point.
    refine_digits : int
        Digits for refining singular solutions (``--digits``).
    square_up : bool
        Allow more equations than unknowns by replacing them with random combinations
        (this can add spurious solutions; each is then checked against all equations).
    batch_size : int
        Paths tracked together.
    """

    tracker: TrackerOptions = TrackerOptions()
    cluster_tolerance: float = 1e-6
    refine_digits: int = 30
    square_up: bool = False
    batch_size: int = 4096

    def validated(self):
        """Raise InputError naming an invalid option."""
        if not 0 < self.cluster_tolerance < 1:
            raise InputError(f"cluster_tolerance must be in (0, 1), got {self.cluster_tolerance!r}")
        if not 16 <= self.refine_digits <= 10000:
            raise InputError(f"refine_digits (--digits) must be from 16 to 10000, got {self.refine_digits!r}")
        if self.batch_size < 1:
            raise InputError(f"batch_size must be positive, got {self.batch_size!r}")
        return self


@dataclass(frozen=True)
class Execution:
    """Where and how the batches of paths run, and where the run is saved.

    Attributes
    ----------
    workers : int or None
        Worker processes; None: in-process for a run of one batch, else every core.
    scheduler : str or None
        Address of a Dask scheduler (optional extra ``cluster``).
    local_dask : bool
        Start a local Dask cluster instead (testing, Dask's tools on one machine).
    run_folder : str or None
        Folder for the manifest and one file per finished batch (atomic writes).
    resume : bool
        Continue the run in ``run_folder``: finished batches are read, not tracked again.
    executor : Executor or None
        An executor made by the caller (then ``workers`` and ``scheduler`` are ignored and the
        caller closes it).
    """

    workers: object = None
    scheduler: object = None
    local_dask: bool = False
    run_folder: object = None
    resume: bool = False
    executor: object = None


@dataclass
class Solution:
    """One distinct endpoint (a solution, a point at infinity, or a flagged non-isolated point).

    Attributes
    ----------
    point : ndarray of complex
        Affine coordinates; for points at infinity and projective systems, homogeneous
        coordinates (the homogenising one first for affine input) divided by the
        coordinate of largest modulus.
    multiplicity : int
        Number of paths ending here.
    winding : int
        Largest winding number seen by the endgame (a lower bound on the multiplicity).
    at_infinity : bool
    real : bool
        All imaginary parts below 1e-8 relative (only for real coefficients).
    condition : float
        Condition number of the homotopy Jacobian at the endpoint.
    isolated : bool
        False when the local test found a positive-dimensional solution set through it.
    paths : ndarray of int
        Numbers of the paths ending here.
    digits : int
        Precision of the reported coordinates' last refinement (16 = double).
    """

    point: np.ndarray
    multiplicity: int
    winding: int
    at_infinity: bool
    real: bool
    condition: float
    isolated: bool
    paths: np.ndarray
    digits: int = 16


@dataclass
class SolveResult:
    """Everything :func:`solve_system` found.

    Attributes
    ----------
    system : PolynomialSystem
        The system as given.
    solutions : list of Solution
        Finite, isolated solutions.
    at_infinity : list of Solution
        Endpoints at infinity (affine input only).
    not_isolated : list of Solution
        Endpoints on positive-dimensional solution sets (not counted as solutions).
    status : ndarray of int
        Per-path :class:`~numag.tracking.tracker.PathStatus`.
    steps, winding : ndarray
        Per-path step counts and winding numbers.
    retracked : ndarray of bool
        Paths re-tracked after a failure.
    seed : int
    seconds : float
    evaluations : int
    squared_up : bool
        True when random combinations made the system square.
    digits : ndarray of int
        Per path: 16 (double precision) or the digits of the precision rescue it needed.
    discarded : list of Solution
        With ``squared_up``: solutions of the random combinations that fail an original equation.
    scaling : Scaling or None
        The units the computation used (points are reported in the user's units).
    """

    system: PolynomialSystem
    solutions: list
    at_infinity: list
    not_isolated: list
    status: np.ndarray
    steps: np.ndarray
    winding: np.ndarray
    retracked: np.ndarray
    seed: int
    seconds: float
    evaluations: int
    squared_up: bool = False
    digits: np.ndarray = None
    discarded: list = field(default_factory=list)
    extra: dict = field(default_factory=dict)
    scaling: object = None

    def path_counts(self):
        """Counts by status; they add up to the number of tracked paths."""
        return path_counts(self.status, self.retracked, self.digits)


def path_counts(status, retracked=None, digits=None):
    """The ``paths`` block of a report from per-path statuses."""
    status = np.asarray(status)
    by_reason = {label: int(np.sum(status == code)) for code, label in
                 ((s, s.label) for s in PathStatus if s.failed)}
    counts = {
        "tracked": int(len(status)),
        "converged": int(np.sum(status == PathStatus.CONVERGED)),
        "singular_endpoint": int(np.sum(status == PathStatus.SINGULAR_ENDPOINT)),
        "at_infinity": int(np.sum(status == PathStatus.AT_INFINITY)),
        "failed": int(sum(by_reason.values())),
        "failed_by_reason": {label: by_reason[label] for label in FAILURE_LABELS},
    }
    if retracked is not None:
        counts["retracked"] = int(np.sum(retracked))
    if digits is not None:
        counts["rescued_in_high_precision"] = int(np.sum(np.asarray(digits) > 16))
    return counts


def _square_target(system, options, rng):
    expected = system.n_variables - (1 if system.projective else 0)
    if system.n_equations == expected:
        return system, False
    if system.n_equations < expected:
        raise InputError(f"the system has {system.n_equations} equations in {expected} unknowns: its solutions "
                         "are not isolated; 'numag solve' needs a square system")
    if not options.square_up:
        raise InputError(f"the system has {system.n_equations} equations in {expected} unknowns; use "
                         "--square-up to replace them by random combinations (each solution is then checked "
                         "against all equations)")
    return system.random_combinations(expected, rng), True


def _refine_mp(system, point, digits):
    """Gauss-Newton on F at ``digits`` digits (linear convergence at multiple roots is enough here)."""
    evaluator = PrecisionEvaluator(system.polynomials)
    sizes = TermSizes(system.polynomials)
    with mpmath.mp.workdps(digits + 10):
        ctx = mpmath.mp

        def function(z):
            x = [z[j] for j in range(system.n_variables)]
            values, jacobian = evaluator.evaluate(x, ctx)
            scale = sizes.values(np.array([complex(v) for v in x])[None])[0]
            for i in range(system.n_equations):
                values[i] /= scale[i]
                for j in range(system.n_variables):
                    jacobian[i, j] /= scale[i]
            return values, jacobian

        z, _, _, _ = mp_gauss_newton(function, ctx.matrix([ctx.mpc(v) for v in point]), ctx,
                                     tolerance=ctx.mpf(10) ** (-digits), max_iterations=120)
        return np.array([complex(z[j]) for j in range(system.n_variables)])


def solve_system(system, options=None, seed=None, progress=None, execution=None):
    """Isolated solutions of a square system by total-degree homotopy continuation.

    Parameters
    ----------
    system : PolynomialSystem
        n equations in n unknowns (affine), or n equations in n + 1 homogeneous
        coordinates (projective).
    options : SolveOptions, optional
    seed : int, optional
        Seed of the random patch, gamma and tests; drawn and recorded when not given.
    progress : callable, optional
        Called as ``progress(paths_done, paths_total)`` after each batch.
    execution : Execution, optional
        Workers, a Dask scheduler, a run folder to save each batch in, or a run to resume.
        Same seed, same answer, whichever executor runs the batches.

    Returns
    -------
    SolveResult
        ``extra["execution"]`` says which executor ran, with how many workers, batches,
        batches read back from the run folder, retries and failed batches.

    Raises
    ------
    InputError
        For a system that is not square (unless ``square_up``), invalid options, or a run
        folder that does not belong to this run.
    """
    options = (options or SolveOptions()).validated()
    require_numeric(system, allow_zero=False)
    seed, rng = random_state(seed)
    started = time.perf_counter()
    scaling = Scaling.balancing(system)
    computed = scaling.scale_system(system)
    target, squared = _square_target(computed, options, rng)
    homotopy = StraightLineHomotopy.total_degree(target, rng)
    result = _run(computed, homotopy, homotopy.start_solutions, homotopy.start.n_paths, options, rng, seed, progress,
                  started, squared, execution, user_system=system)
    return _in_user_units(result, system, scaling)


def continue_solutions(start_system, start_points, target_system, options=None, seed=None, progress=None):
    """Carry known solutions of one system to a system with other coefficients (parameter homotopy).

    Parameters
    ----------
    start_system : PolynomialSystem
        Square system whose solutions ``start_points`` are known.
    start_points : array_like, shape (P, n)
        Its solutions (affine coordinates, or homogeneous for projective systems).
    target_system : PolynomialSystem
        Same variables and equation degrees, other coefficients.
    options, seed, progress
        As for :func:`solve_system`.

    Returns
    -------
    SolveResult
        For the target system; path k starts at ``start_points[k]``.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> start = parse_system(["x^2 - 1", "y - x"], ["x", "y"])
    >>> target = parse_system(["x^2 - 9", "y - 2*x"], ["x", "y"])
    >>> result = continue_solutions(start, [[1, 1], [-1, -1]], target, seed=0)
    >>> sorted(round(s.point[1].real) for s in result.solutions)
    [-6, 6]
    """
    options = (options or SolveOptions()).validated()
    seed, rng = random_state(seed)
    started = time.perf_counter()
    # one set of units for both ends, so that the homotopy between them stays a straight line
    scaling = Scaling.balancing(target_system)
    if len(scaling.equation_exponents) != start_system.n_equations:
        raise InputError("start and target systems must have the same number of equations")
    homotopy = ParameterHomotopy.from_systems(scaling.scale_system(start_system), scaling.scale_system(target_system),
                                              rng)
    starts = homotopy.start_solutions_from(scaling.to_computed(np.atleast_2d(np.asarray(start_points, complex))),
                                           projective=start_system.projective)
    result = _run(scaling.scale_system(target_system), homotopy, StartArray(starts), len(starts), options, rng, seed,
                  progress, started, False)
    return _in_user_units(result, target_system, scaling)


def _in_user_units(result, system, scaling):
    """The result with its points in the user's units (the computation ran in those of ``scaling``)."""
    def finite(point):
        point = scaling.to_user(point)
        return normalize_projective(point) if system.projective else point

    for solution in result.solutions + result.not_isolated + result.discarded:
        solution.point = finite(solution.point)
    for solution in result.at_infinity:
        solution.point = normalize_projective(scaling.homogeneous_to_user(solution.point))
    result.system = system
    result.scaling = scaling
    return result


def manifest_for(system, options, seed, total):
    """What a run folder's manifest says about a solve run (compared on resume)."""
    return {"kind": "solve", "numag_version": __version__, "seed": int(seed),
            "system": {"variables": list(system.variables), "equations": system.to_texts(),
                       "projective": system.projective, "name": system.name},
            "options": {"batch_size": options.batch_size, "cluster_tolerance": options.cluster_tolerance,
                        "refine_digits": options.refine_digits, "square_up": options.square_up},
            "paths": int(total), "batches": -(-int(total) // options.batch_size)}


def _open_folder(execution, describe):
    """The run folder of ``execution`` (None without one); ``describe()`` gives the run's manifest."""
    if execution.run_folder is None:
        if execution.resume:
            raise InputError("resuming needs the run folder")
        return None
    manifest = describe()
    if not execution.resume:
        return RunFolder.create(execution.run_folder, manifest)
    folder = RunFolder.open(execution.run_folder)  # refuses a manifest changed since the run started
    saved, wanted = manifest_fingerprints(folder.manifest), manifest_fingerprints(manifest)
    if saved != wanted:  # compared by the fingerprints of the system, options and seed given now
        differs = sorted(k for k in set(saved) | set(wanted) if saved.get(k) != wanted.get(k))
        raise InputError(f"the run in {execution.run_folder} is a different run (it differs in: {', '.join(differs)})")
    return folder


def _run(system, homotopy, start_points, total, options, rng, seed, progress, started, squared, execution=None,
         user_system=None):
    """Track all paths in batches (through an executor, saved to a run folder), repair jumps, collect.

    ``system`` is the system in the units of the computation; ``user_system`` (default: the
    same) is the one the run folder's manifest describes.
    """
    execution = execution or Execution()
    user_system = system if user_system is None else user_system
    # the work guard, before anything of the paths' size is allocated
    charge_paths(total, "the total-degree homotopy (its Bezout number)" if isinstance(homotopy, StraightLineHomotopy)
                 else "the parameter homotopy")
    check_memory(total * (homotopy.size * 16 + 80), f"keeping {total} paths")
    endpoints = np.empty((total, homotopy.size), dtype=complex)
    status = np.empty(total, dtype=np.int64)
    steps = np.zeros(total, dtype=np.int64)
    winding = np.ones(total, dtype=np.int64)
    condition = np.full(total, np.inf)
    retracked = np.zeros(total, dtype=bool)
    digits = np.full(total, 16, dtype=np.int64)
    evaluations = 0
    batches = [np.arange(first, min(total, first + options.batch_size)) for first in range(0, total, options.batch_size)]
    folder = _open_folder(execution, lambda: manifest_for(user_system, options, seed, total))

    def store(result):
        nonlocal evaluations
        indices = result["indices"]
        endpoints[indices], status[indices], steps[indices] = result["endpoints"], result["status"], result["steps"]
        winding[indices], condition[indices] = result["winding"], result["condition"]
        retracked[indices], digits[indices] = result["retracked"], result["digits"]
        evaluations += int(result["evaluations"])

    finished, rejected = set(), []
    for k in sorted(folder.finished() if folder is not None and execution.resume else ()):
        if k >= len(batches):
            rejected.append({"index": k, "reason": f"batch {k} is not part of this run"})
            continue
        try:  # saved state is verified, never trusted: a batch that fails is tracked again
            arrays = folder.read_batch(k)
        except DamagedBatch as err:
            rejected.append({"index": k, "reason": str(err)})
            continue
        try:
            store(_verified_batch(arrays, batches[k], homotopy, options.tracker))
            finished.add(k)
        except InputError as err:
            rejected.append({"index": k, "reason": f"{folder.batch_path(k).name}: {err}"})
    todo = [k for k in range(len(batches)) if k not in finished]
    done_paths = sum(len(batches[k]) for k in finished)
    if progress is not None:
        progress(done_paths, total)  # the starting point: paths read back from the run folder
    executor = execution.executor or make_executor(execution.workers, execution.scheduler, execution.local_dask,
                                                   batches=len(todo))
    tracker = BatchTracker(homotopy, start_points, options.tracker)
    if isinstance(executor, InProcess) and progress is not None:
        tracker.progress = lambda done, *_: progress(done_paths + done, total)
    tracking_started = time.perf_counter()
    try:
        for position, result in executor.run(tracker, [batches[k] for k in todo]):
            store(result)
            if folder is not None:
                folder.write_batch(todo[position], result)
            done_paths += len(result["indices"])
            if progress is not None:
                progress(done_paths, total)
        lost = [todo[f.index] for f in executor.failures]
        for k in lost:  # never lost silently: counted as failed paths, named in the report
            status[batches[k]] = PathStatus.FAILED_BATCH
            endpoints[batches[k]] = np.nan
        description = executor.describe()
        for failure, k in zip(description["failed_batches"], lost):
            failure["index"] = k
            failure["paths"] = [int(batches[k][0]), int(batches[k][-1])]
    finally:
        if execution.executor is None:
            executor.close()
    tracking = time.perf_counter() - tracking_started
    description.update(batches=len(batches), batches_resumed=len(finished), batches_rejected=rejected,
                       batch_size=options.batch_size,
                       run_folder=None if folder is None else str(folder.path))
    cautious = options.tracker
    for round_ in range(4):
        crossed = _crossed_paths(system, endpoints, status, options)
        if len(crossed) == 0:
            break
        if round_ == 3:  # still sharing an endpoint: one path each keeps it, the others count as failed
            labels = cluster_labels(_finite_points(system, endpoints, crossed), options.cluster_tolerance,
                                    projective=system.projective)
            for members in groups(labels):
                status[crossed[members[1:]]] = PathStatus.FAILED_JUMP
            break
        # Two paths at one regular solution means a path jumped: track those again, more cautiously
        # each time (smaller steps, three full Newton corrections: a smaller basin to jump into). The
        # caution grows by round: a few paths re-tracked with tiny steps take hundreds of batch
        # iterations of a few rows (2 jumped paths of 4,096 doubled the iterations of the run).
        cautious = replace(cautious, max_step=cautious.max_step / 4, predictor_error=cautious.predictor_error / 10,
                           max_steps=cautious.max_steps * 5,
                           corrector_iterations=3, chord_corrector=False)
        again = time.perf_counter()
        with threadpool_limits(limits=1):
            result = track_paths(homotopy, start_points(crossed), cautious)
        tracking += time.perf_counter() - again
        endpoints[crossed], status[crossed], winding[crossed] = result.endpoints, result.status, result.winding
        condition[crossed], digits[crossed] = result.condition, result.digits
        steps[crossed] += result.steps
        retracked[crossed] = True
        evaluations += result.evaluations
    if system.projective:  # X_0 = 0 is an ordinary point of projective space, not "infinity"
        ends = status == PathStatus.AT_INFINITY
        singular = (winding > 1) | (condition > options.tracker.singular_condition)
        status[ends & singular] = PathStatus.SINGULAR_ENDPOINT
        status[ends & ~singular] = PathStatus.CONVERGED
    solutions, infinite, not_isolated = _collect(system, endpoints, status, winding, condition, options, rng)
    discarded = []
    if squared:  # random combinations have extra solutions: keep only those of every equation
        kept = []
        for solution in solutions:
            (kept if _satisfies(system, solution.point) else discarded).append(solution)
        solutions = kept
    result = SolveResult(system, solutions, infinite, not_isolated, status, steps, winding, retracked, seed,
                         time.perf_counter() - started, evaluations, squared, digits)
    result.discarded = discarded
    description["seconds"] = result.seconds
    description["tracking_seconds"] = tracking  # the batches and the re-tracking of jumped paths
    result.extra["execution"] = description
    return result


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
    ends = np.isin(status, [PathStatus.CONVERGED, PathStatus.SINGULAR_ENDPOINT, PathStatus.AT_INFINITY])
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


def _satisfies(system, point, tolerance=1e-8):
    """Scaled residual of every equation at the point below the tolerance."""
    point = np.asarray(point, dtype=complex)[None, :]
    values = BatchEvaluator(system.polynomials).evaluate(point, jacobian=False)
    scales = TermSizes(system.polynomials, system.projective).values(point)
    return bool(np.max(np.abs(values) / scales) <= tolerance)


def _finite_points(system, endpoints, indices):
    if system.projective:
        return normalize_projective(endpoints[indices]).reshape(len(indices), -1)
    return endpoints[indices, 1:] / endpoints[indices, :1]


def _crossed_paths(system, endpoints, status, options):
    """Paths that share a regular (well-conditioned) endpoint with another path: a sign of path jumping."""
    regular = np.nonzero(status == PathStatus.CONVERGED)[0]
    if len(regular) < 2:
        return np.zeros(0, dtype=np.int64)
    labels = cluster_labels(_finite_points(system, endpoints, regular), options.cluster_tolerance,
                            projective=system.projective)
    counts = np.bincount(labels)
    return regular[counts[labels] > 1]


def _collect(system, endpoints, status, winding, condition, options, rng):
    real_coefficients = system.has_real_coefficients
    finite = np.nonzero((status == PathStatus.CONVERGED) | (status == PathStatus.SINGULAR_ENDPOINT))[0]
    infinite = np.nonzero(status == PathStatus.AT_INFINITY)[0]
    finite_points = _finite_points(system, endpoints, finite)
    affine_system = None if system.projective else system
    solutions, flagged = [], []
    labels = cluster_labels(finite_points, options.cluster_tolerance, projective=system.projective)
    with np.errstate(invalid="ignore"):
        real_points = real_coefficients & np.all(np.abs(finite_points.imag) <= 1e-8 * (1 + np.abs(finite_points)),
                                                 axis=1)
    converged = int(PathStatus.CONVERGED)  # looked up once: enum attributes are slow in a loop of P
    for members in groups(labels):
        paths = finite[members]
        if len(members) == 1 and status[paths[0]] == converged:
            # the common case, a regular endpoint reached by one path: nothing to test or refine
            solutions.append(Solution(finite_points[members[0]], 1, int(winding[paths[0]]), False,
                                      bool(real_points[members[0]]), float(condition[paths[0]]), True, paths, 16))
            continue
        best = members[np.argmin(condition[paths])]
        point = finite_points[best]
        singular = len(members) > 1 or np.any(status[paths] == PathStatus.SINGULAR_ENDPOINT)
        test_system, test_point, pivot = affine_system, point, None
        if system.projective:
            pivot = projective_pivot(point)
            test_system = PolynomialSystem([v for j, v in enumerate(system.variables) if j != pivot],
                                           [p.dehomogenize(pivot) for p in system.polynomials])
            test_point = np.delete(point, pivot)
        digits = 16
        isolated = True
        if singular:
            isolated = IsolationTest(test_system, rng).isolated(test_point)
            if isolated and test_system.n_equations >= test_system.n_variables:
                test_point = _refine_mp(test_system, np.mean(
                    [finite_points[k] if pivot is None else np.delete(finite_points[k] / finite_points[k][pivot],
                                                                         pivot) for k in members], axis=0),
                    options.refine_digits)
                digits = options.refine_digits
                point = test_point if pivot is None else np.insert(test_point, pivot, 1.0)
        real = bool(real_coefficients and np.all(np.abs(point.imag) <= 1e-8 * (1 + np.abs(point))))
        entry = Solution(point, len(members), int(winding[paths].max()), False, real,
                         float(condition[paths].min()), isolated, paths, digits)
        (solutions if isolated else flagged).append(entry)
    at_infinity = []
    if len(infinite):
        points = normalize_projective(endpoints[infinite])
        for members in groups(cluster_labels(points, options.cluster_tolerance, projective=True)):
            paths = infinite[members]
            point = points[members[0]]
            real = bool(real_coefficients and np.all(np.abs(point.imag) <= 1e-8 * (1 + np.abs(point))))
            at_infinity.append(Solution(point, len(members), int(winding[paths].max()), True, real,
                                        float(condition[paths].min()), True, paths, 16))
    return solutions, at_infinity, flagged
