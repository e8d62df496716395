"""Isolated solutions of a square polynomial system (``numag solve``).

Pipeline: a homotopy from a start system (total degree, multihomogeneous or polyhedral:
:mod:`numag.tracking.starts`) in projective coordinates on a random patch
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

from dataclasses import dataclass, field
import copy
import time

import numpy as np
from threadpoolctl import threadpool_limits

from ..errors import InputError, LimitError, is_integer, is_number, require_option
from ..version import __version__
from ..system.display import counted, html_table, short_point
from ..system.centred import centre_near, centred_system
from ..system.polynomial import PolynomialSystem, require_numeric
from ..run.checkpoint import RunFolder, manifest_fingerprints
from ..run.executor import ambient_executor, charge_paths, check_memory, current_executor, make_executor
from ..numeric.cluster import (REAL_TOLERANCE, cluster_labels, groups, normalize_projective, projective_pivot, reality,
                               root_accuracy)
from ..numeric.evaluate import BatchEvaluator, PrecisionEvaluator, TermSizes
from ..numeric.linalg import batched_least_squares
from ..numeric.scaling import Scaling
from ..numeric.seeds import random_state
from .homotopy import ParameterHomotopy, StraightLineHomotopy
from .infinity import local_dimension_at_infinity, locate_at_infinity
from .starts import StartKind, choose_start
from .service import PathCounts, track
from .tracker import PathStatus, StartArray, TrackerOptions, x0_invisible

__all__ = ["SolveOptions", "Execution", "Solution", "SolveResult", "solve_system", "continue_solutions",
           "lost_first_stage_paths"]


def lost_first_stage_paths(start_block):
    """Paths of the polyhedral first stage that reached no regular solution of the random system.

    Each starts no path of the second stage, so what it would have led to may be missing: a failure to
    count, like a failed path (the report warns, the square null-vector route does not call Sing(X) complete).

    Parameters
    ----------
    start_block : dict or None
        A report's ``start`` block (:meth:`~numag.tracking.starts.StartChoice.report` and the first stage's
        ``random_system_paths``).

    Returns
    -------
    int

    Examples
    --------
    >>> lost_first_stage_paths({"random_system_paths": {"tracked": 12, "converged": 11, "at_infinity": 1}})
    1
    >>> lost_first_stage_paths({"chosen": "total-degree"})
    0
    """
    first_stage = (start_block.get("random_system_paths") or {}) if isinstance(start_block, dict) else {}
    return max(int(first_stage.get("tracked", 0)) - int(first_stage.get("converged", 0))
               - int(first_stage.get("singular_endpoint", 0)), 0)


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
    start : str
        The start system (``--start``): "total-degree", "multihomogeneous", "polyhedral" or
        "auto" (see :mod:`numag.tracking.starts`).
    groups : tuple of tuple of str, optional
        Variable groups of the multihomogeneous start (default: the grouping with the smallest count).
    second_look : bool
        Solve again in centred coordinates where a multiple group lies away from the origin (decision 0081).
        Off inside the singular locus's square null-vector route, whose candidates are all multiple and are
        judged there in centred coordinates already (decision 0071).
    """

    tracker: TrackerOptions = TrackerOptions()
    cluster_tolerance: float = 1e-6
    refine_digits: int = 30
    square_up: bool = False
    batch_size: int = 4096
    start: str = "total-degree"
    groups: tuple = None
    second_look: bool = True

    def __post_init__(self):
        """Refuse a bad value on construction, naming the option."""
        StartKind.parse(self.start)  # an unknown start is refused naming the choices
        require_option(is_number(self.cluster_tolerance) and 0 < self.cluster_tolerance < 1, "cluster_tolerance",
                       "in (0, 1)", self.cluster_tolerance)
        require_option(is_integer(self.refine_digits) and 16 <= self.refine_digits <= 10000,
                       "refine_digits (--digits)", "from 16 to 10000", self.refine_digits)
        require_option(is_integer(self.batch_size) and self.batch_size >= 1, "batch_size", "positive",
                       self.batch_size)

    def validated(self):
        """The options (checked on construction); kept so that callers read the same as for the other options."""
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


@dataclass(kw_only=True)
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
    real : bool or None
        Real coefficients only: imaginary parts within the point's accuracy (1e-8 relative for a regular root,
        about residual^(1/m) for a root of multiplicity m); None where they are beyond it but not clearly
        (:func:`numag.numeric.cluster.reality`, decision 0120): the reality is undecided (a warning, exit 3).
    condition : float
        Condition number of the homotopy Jacobian at the endpoint.
    isolated : bool
        False when the local test found a positive-dimensional solution set through it.
    paths : ndarray of int
        Numbers of the paths ending here.
    digits : int
        Precision of the reported coordinates' last refinement (16 = double).
    set_dimension : int
        For an endpoint group at infinity: the dimension of the set at infinity (the top-degree forms' zeros)
        through it, 0 where it is an isolated point at infinity (decision 0112).
    dimension_at_least : bool
        ``set_dimension`` is a lower bound: the group is on a set at infinity of positive dimension, and whether
        that set is larger there was not decided.
    """

    point: np.ndarray
    multiplicity: int
    winding: int
    at_infinity: bool
    real: bool | None
    condition: float
    isolated: bool
    paths: np.ndarray
    digits: int = 16
    set_dimension: int = 0
    dimension_at_least: bool = False

    def __repr__(self):
        where = "at infinity" if self.at_infinity else {True: "real", False: "complex", None: "reality undecided"}[
            self.real]
        return (f"Solution({short_point(self.point)}, {where}, multiplicity {self.multiplicity}, "
                f"condition {self.condition:.2g})")


@dataclass(kw_only=True)
class SolveResult:
    """Everything :func:`solve_system` found.

    Attributes
    ----------
    system : PolynomialSystem
        The system as given.
    solutions : list of Solution
        Finite, isolated solutions.
    at_infinity : list of Solution
        Points at infinity (affine input only): isolated, or of undecided isolation (``dimension_at_least``).
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
    undecided : list of Solution
        Endpoint groups judged multiple away from the origin that a run in coordinates centred at them did not
        confirm (the two runs disagree on how many paths end near them, decision 0081): neither counted as
        solutions nor dropped; the report counts them and warns (exit 3).
    unverified : list of Solution
        Isolated singular endpoint groups whose refined point does not satisfy F in units of its
        terms (to the tracker's ``endpoint_residual``), though the tracker accepted the endpoint on
        F^h: neither counted as solutions nor dropped; the report counts them and warns (exit 3).
        Endgame estimates near infinity can pass the homogeneous test and fail this one (decision 0049).
    scaling : Scaling or None
        The units the computation used (points are reported in the user's units).
    options : SolveOptions or None
        The options of the run (recorded when the result is saved; None for a result built by hand).
    sets_at_infinity : list of Solution
        Endpoint groups at infinity on a set at infinity of positive dimension (``set_dimension``), not points:
        where such a group ends depends on the start (decision 0112).
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
    unverified: list = field(default_factory=list)
    options: SolveOptions | None = None
    sets_at_infinity: list = field(default_factory=list)
    undecided: list = field(default_factory=list)

    def __repr__(self):
        counts = self.path_counts()
        return (f"SolveResult({self.system.name or 'system'}: {counted(len(self.solutions), 'solution')} "
                f"({sum(s.real is True for s in self.solutions)} real), {len(self.at_infinity)} at infinity, "
                f"{counts['failed']} of {counts['tracked']} paths failed; seed {self.seed})")

    def _repr_html_(self):
        rows = [[k, short_point(s.point), s.multiplicity, {True: "yes", False: "no", None: "undecided"}[s.real],
                 f"{s.condition:.2g}"] for k, s in enumerate(self.solutions, 1)]
        return html_table(repr(self), ["#", "solution", "multiplicity", "real", "condition"], rows)

    def path_counts(self):
        """The ``paths`` block of a report: counts by status; they add up to the number of tracked paths."""
        return PathCounts.of(self.status, self.retracked, self.digits).report()


def _square_target(system, options, rng):
    expected = system.n_variables - (1 if system.projective else 0)
    if system.n_equations == expected:
        return system, False
    if system.n_equations < expected:
        raise InputError(f"the system has {counted(system.n_equations, 'equation')} in {counted(expected, 'unknown')}: its solutions "
                         "are not isolated; 'numag solve' needs a square system")
    if not options.square_up:
        raise InputError(f"the system has {counted(system.n_equations, 'equation')} in {counted(expected, 'unknown')}; use "
                         "--square-up to replace them by random combinations (each solution is then checked "
                         "against all equations)")
    return system.random_combinations(expected, rng), True


def _refine_mp(system, point, digits, anchored=False, converged=False, residual=False):
    """Gauss-Newton on F at ``digits`` digits (linear convergence at multiple roots is enough here).

    With ``converged``, returns (point, whether the scaled residual reached 10^-digits) instead of the point;
    with ``residual``, (point, the scaled residual's norm at it).
    """
    import mpmath  # here, not at import: only singular endpoints are refined in mpmath
    from ..numeric.refine import mp_gauss_newton, mp_scaled_equations
    with mpmath.mp.workdps(digits + 10):
        ctx = mpmath.mp
        equations = mp_scaled_equations(PrecisionEvaluator(system.polynomials), TermSizes(system.polynomials), ctx)
        z, reached, norm, _ = mp_gauss_newton(equations, ctx.matrix([ctx.mpc(v) for v in point]), ctx,
                                              tolerance=ctx.mpf(10) ** (-digits), max_iterations=120,
                                              anchored=anchored)
        refined = np.array([complex(z[j]) for j in range(system.n_variables)])
        if residual:
            return refined, float(norm)
        return (refined, bool(reached)) if converged else refined


def solve_system(system, options=None, seed=None, progress=None, execution=None):
    """Isolated solutions of a square system by homotopy continuation from the start of ``options.start``.

    Parameters
    ----------
    system : PolynomialSystem
        n equations in n unknowns (affine), or n equations in n + 1 homogeneous
        coordinates (projective).
    options : SolveOptions, optional
    seed : int, optional
        Seed of the random patch, gamma and tests; drawn and recorded when not given.
    progress : Progress, optional
        Told (:mod:`numag.run.progress`) the paths done and in all after each batch.
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

    Notes
    -----
    An endpoint group judged multiple away from the origin is solved again in coordinates centred at it
    (decision 0081): several simple roots close together far from the origin can end as one multiple group.
    ``extra["centred"]`` describes each such run; a region the two runs disagree on is ``undecided``.
    """
    options = (options or SolveOptions()).validated()
    result = _solve(system, options, seed, progress, execution, ignore_tiny=True)
    if options.second_look and not system.projective:
        _multiple_groups_centred(result, options, progress, execution or Execution())
    return result


def _solve(system, options, seed, progress, execution, ignore_tiny=False):
    """:func:`solve_system` without the centred second look.

    ``ignore_tiny``: units fitted without tiny terms (decision 0102): the first run's. A centred run's small terms
    are its centre's rounding, balanced as decisions 0081 and 0084 say.
    """
    require_numeric(system, allow_zero=False)
    seed, rng = random_state(seed)
    started = time.perf_counter()
    scaling = Scaling.balancing(system, ignore_tiny=ignore_tiny)
    computed = scaling.scale_system(system)
    target, squared = _square_target(computed, options, rng)
    choice = choose_start(target, StartKind.parse(options.start), options.groups, rng)
    stage_one = None
    if choice.kind == StartKind.POLYHEDRAL:
        # the random system on the supports, solved through the mixed cells, then moved to the target
        # (both stages count against the work limit: every path is tracked twice)
        charge_paths(choice.n_paths, "the polyhedral homotopy's first stage (the mixed volume)")
        stage_one_started = time.perf_counter()
        if progress is not None:
            progress(f"the polyhedral first stage: {counted(len(choice.polyhedral.cells), 'mixed cell')}, "
                     f"{counted(choice.n_paths, 'path')} to the random system")
        from .polyhedral import track_cells  # here: a total-degree start never needs it (decision 0067)
        points, stage_one = track_cells(choice.polyhedral, rng, options.tracker, options.batch_size,
                                        executor=_executor_of(execution or Execution(),
                                                              -(-choice.n_paths // options.batch_size)),
                                        progress=progress)
        if progress is not None:
            progress("the polyhedral second stage: from the random system to the system's own coefficients")
        stage_one_seconds = time.perf_counter() - stage_one_started
        random_system = PolynomialSystem(target.variables, choice.polyhedral.random_polynomials())

        def fresh_homotopy():  # another gamma and patch for every path (one round of the jump repair)
            made = ParameterHomotopy.from_systems(random_system, target, rng, shared_evaluator=True)
            return made, made.start_solutions_from(points)

        homotopy, starts = fresh_homotopy()
        starts, total = StartArray(starts), len(starts)
    else:
        def fresh_homotopy():  # another gamma and patch for every path (one round of the jump repair)
            made = (StraightLineHomotopy.multihomogeneous(target, choice.groups, rng)
                    if choice.kind == StartKind.MULTIHOMOGENEOUS else StraightLineHomotopy.total_degree(target, rng))
            return made, made.start_solutions

        homotopy, starts = fresh_homotopy()
        total = homotopy.start.n_paths
    result = _run(computed, homotopy, starts, total, options, rng, seed, progress,
                  started, squared, execution, user_system=system, fresh_homotopy=fresh_homotopy,
                  what=f"the {choice.kind.value} homotopy")
    block = choice.report()
    if stage_one is not None:
        block["random_system_paths"] = stage_one.report()
        block["random_system_seconds"] = round(stage_one_seconds, 4)
    result.extra["start"] = block
    return _in_user_units(result, system, scaling)


#: Centred runs one solve may start (each solves the whole system again); further groups are left as found.
_MAX_CENTRED_RUNS = 8
#: A region's radius is halved from half the group's distance to the origin until no point of either run lies
#: within this factor of it (a point on the border would be in one run's region and out of the other's).
_BORDER_FACTOR = 1.5
_RADIUS_HALVINGS = 16
#: A Newton step on F longer than this (relative to the point, computed units) at a regular endpoint: no root.
_NEWTON_STEP = 1e-8


def _multiple_groups_centred(result, options, progress, execution):
    """Solve again in coordinates centred at each multiple group away from the origin (decision 0081), in place.

    Several simple roots close together far from the origin can end as one group of winding number > 1: the
    start system's term is of the size of the coordinates' powers while F varies by the features' own sizes, so
    the paths come together long before t = 0 and the endgame's cycle encloses the branch points. Centred at the
    group, y = x - s with s an exact rational near it (:mod:`numag.system.centred`), the features sit at the
    origin of a system balanced anew. Both runs track the same number of paths of the same system, so in any
    region they must count the same paths: where they do, the centred run's points there replace the first
    run's (a genuine multiple root stays multiple, measured where it is seen best); where they do not, the
    first run's multiple groups there become ``undecided`` (warning, exit 3).

    The region (in the computed units of the first run) is a ball about s of radius at most half the group's
    distance to the origin -- beyond that the centred coordinates see no better -- halved until no point of
    either run lies near its border. A group within the cluster tolerance of the origin is not centred: it
    already sits where the centring would put it.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> # three simple roots 1234 and 1234 +- sqrt 3: the first run can end them as one triple group
    >>> result = solve_system(parse_system(["(x - 1234)^3 - 3*(x - 1234)"], ["x"]), seed=1)
    >>> sorted(round(float(s.point[0].real), 4) for s in result.solutions), result.undecided
    ([1232.2679, 1234.0, 1235.7321], [])
    """
    scaling = result.scaling
    system = result.system
    kinds = ("solutions", "unverified", "not_isolated", "discarded")
    # failed paths counted before any region is left undecided (whose paths are then counted failed too)
    failed_first = result.path_counts()["failed"]
    misplaced = _not_zeros(result, options)
    triggers = [s for s in result.solutions + result.unverified if s.multiplicity > 1 or s.winding > 1]
    triggers += _not_converged(result)
    triggers += [s for s in result.not_isolated if id(s) in misplaced]
    records = []
    adopted = False
    for group in triggers:
        if adopted:
            break
        if not any(group is s for s in result.solutions + result.unverified + result.not_isolated):
            continue  # replaced by an earlier centred run's region
        here = scaling.to_computed(np.asarray(group.point, dtype=complex)[None, :])[0]
        distance = float(np.linalg.norm(here))
        if not np.isfinite(distance) or distance <= options.cluster_tolerance:
            continue
        if len(records) >= _MAX_CENTRED_RUNS:
            records.append({"centre": short_point(group.point), "settled": False, "reason": "too many centred runs"})
            result.undecided.append(group)
            _remove(result, [group], kinds)
            continue
        # a group that is no zero is centred at the zero Gauss-Newton reaches from it (decision 0089)
        point = np.asarray(misplaced[id(group)][0] if id(group) in misplaced else group.point, dtype=complex)
        if system.has_real_coefficients and np.linalg.norm(scaling.to_computed(point.imag[None, :])) <= distance / 4:
            point = point.real.astype(complex)  # a real centre keeps real equations real (conjugate pairs)
        centring = centre_near(point, 0.0, digits=_centre_digits(group))
        if progress is not None:
            progress(f"a group of {counted(group.multiplicity, 'path')} judged again in coordinates centred at "
                     f"{short_point(centring.point)}")
        try:
            local = _solve(centred_system(system, centring), options, result.seed, None,
                           Execution(executor=execution.executor))
        except LimitError as err:  # the centred polynomial is too large to write: the group stays undecided
            records.append({"centre": short_point(centring.point), "settled": False, "reason": str(err)})
            result.undecided.append(group)
            _remove(result, [group], kinds)
            continue
        whole = _whole(local, options)
        # the zero a misplaced group was drawn to, found again at the centred origin (judged before moving back)
        confirmed = id(group) in misplaced and misplaced[id(group)][1] and _found_at_origin(local, options)
        _moved_back(local, centring, kinds)
        result.evaluations += local.evaluations
        centre = scaling.to_computed(centring.point[None, :])[0]
        first = [s for kind in kinds for s in getattr(result, kind)]
        second = [s for kind in kinds for s in getattr(local, kind)]
        radius = _region_radius(scaling, centre, max(distance, float(np.linalg.norm(centre))) / 2, first + second)
        first_in = [s for s in first if radius is not None and _within(scaling, centre, radius, s)]
        second_in = [s for s in second if radius is not None and _within(scaling, centre, radius, s)]
        first_paths = sum(s.multiplicity for s in first_in)
        settled = (radius is not None and any(group is s for s in first_in)
                   and first_paths == sum(s.multiplicity for s in second_in))
        accounted = (not settled and confirmed and radius is not None and any(group is s for s in first_in)
                     and _accounted(result, local, group, first_in, second_in, first + second))
        whole = whole or accounted
        record = {"centre": short_point(centring.point), "radius_computed_units": radius,
                  "paths_first_run": first_paths, "paths_centred_run": sum(s.multiplicity for s in second_in),
                  "centred_run_failed_paths": local.path_counts()["failed"], "settled": settled or whole}
        records.append(record)
        if not settled and whole:
            # the regions disagree, but the centred run accounts for every path by itself: it replaces the first
            record["adopted"] = True
            _adopt(result, local)
            adopted = True
            continue
        if not settled:
            doubtful = [s for s in first_in if (s.multiplicity > 1 or s.winding > 1) and s is not group
                        and any(s is t for t in result.solutions)]
            doubtful = [s for s in [group] + doubtful if any(s is t for kind in kinds for t in getattr(result, kind))]
            _remove(result, doubtful, kinds)
            result.undecided.extend(doubtful)
            continue
        # the first run's paths that ended in the region, shared out in order (the centred run numbers its own)
        pooled = np.sort(np.concatenate([np.asarray(s.paths, dtype=np.int64) for s in first_in]))
        _remove(result, first_in, kinds)
        start = 0
        for kind in kinds:
            for solution in getattr(local, kind):
                if any(solution is s for s in second_in):
                    solution.paths = pooled[start:start + solution.multiplicity]
                    start += solution.multiplicity
                    getattr(result, kind).append(solution)
    if not adopted and failed_first and len(records) < _MAX_CENTRED_RUNS:
        record = _failed_paths_centred(result, options, execution, kinds)
        if record is not None:
            records.append(record)
    if misplaced:
        result.extra["not_zeros"] = len(misplaced)
    if records:  # absent when nothing was centred, as in a saved result read back
        result.extra["centred"] = records
    for group in result.undecided:
        # the two runs disagree there: the first run's endgame did not settle the region. Counted as failed
        # paths, so that every caller (singular loci, witness sets, families) reports the gap, not only `solve`
        result.status[np.asarray(group.paths, dtype=np.int64)] = PathStatus.FAILED_ENDGAME


def _failed_paths_centred(result, options, execution, kinds):
    """After failed paths: one centred run at the finite endpoints' mean, adopted only when it is whole.

    Paths that failed (jumped, stalled) near features far from the origin have no endpoint to centre at; the
    groups that were found are the best guess of where the features are. A region count cannot settle paths
    without endpoints, so the centred run is taken only when it accounts for every path by itself
    (:func:`_whole`); else the first run stands, its failed paths reported as before. Returns the record, or None
    when the finite endpoints are not away from the origin (their spread reaches it: centring would not help).
    """
    found = [s for kind in ("solutions", "unverified", "not_isolated") for s in getattr(result, kind)]
    if not found:
        return None
    points = result.scaling.to_computed(np.array([np.asarray(s.point, complex) for s in found]))
    weights = np.array([s.multiplicity for s in found], dtype=float)
    middle = weights @ points / weights.sum()
    distance = float(np.linalg.norm(middle))
    spread = float(np.max(np.linalg.norm(points - middle[None, :], axis=1)))
    if not np.isfinite(distance) or distance <= max(spread, options.cluster_tolerance):
        return None
    point = result.scaling.to_user(middle[None, :])[0]
    if result.system.has_real_coefficients:
        point = point.real.astype(complex)
    centring = centre_near(point, 0.0, digits=6)
    try:
        local = _solve(centred_system(result.system, centring), options, result.seed, None,
                       Execution(executor=execution.executor))
    except LimitError as err:
        return {"centre": short_point(centring.point), "settled": False, "reason": str(err)}
    whole = _whole(local, options)
    result.evaluations += local.evaluations
    record = {"centre": short_point(centring.point), "after_failed_paths": result.path_counts()["failed"],
              "centred_run_failed_paths": local.path_counts()["failed"], "settled": whole}
    if whole:
        _moved_back(local, centring, kinds)
        _adopt(result, local)
        record["adopted"] = True
    return record


def _moved_back(local, centring, kinds):
    """A centred run's points in the user's coordinates: finite points moved by s, points at infinity as lines.

    x = y + s: the homogeneous point (y_0 : y) is (y_0 : y + s y_0); at infinity (y_0 = 0) it is the same.
    """
    for kind in kinds:
        for solution in getattr(local, kind):
            solution.point = solution.point + centring.point
    for solution in local.at_infinity + local.sets_at_infinity:
        point = np.asarray(solution.point, dtype=complex).copy()
        point[1:] = point[1:] + centring.point * point[0]
        solution.point = normalize_projective(point[None, :])[0]


def _whole(local, options):
    """Whether a centred run accounts for every path by itself, as any run numag reports with exit 0 must.

    No failed or lost path, nothing unverified, not isolated or discarded; every regular endpoint converged
    (one Newton step moves it by rounding only, :func:`_not_converged`); every multiple group at the centred
    origin, where the centring put the feature and the run sees it best (one far from it could be several roots
    merged, decision 0081). Then the run passes every test a first run is held to, in coordinates centred at the
    features. With no path at infinity, the Bezout number of distinct regular roots, it is complete outright
    (refined Bezout theorem: the isolated solutions' multiplicities add up to at most the product of the degrees,
    W. Fulton, "Intersection Theory", 1984, ch. 12, from memory). Judged before the points are moved back.
    """
    if (local.path_counts()["failed"] or lost_first_stage_paths(local.extra.get("start"))
            or local.unverified or local.not_isolated or local.discarded or local.undecided or local.at_infinity
            or local.sets_at_infinity):
        return False
    if any(s.multiplicity > 1 or s.winding > 1 for s in local.solutions):
        return False
    return len(local.solutions) == len(local.status) and not _not_converged(local)


def _adopt(result, local):
    """The first run's answer replaced by a whole centred run's (its points already moved back)."""
    for kind in ("solutions", "unverified", "not_isolated", "discarded", "at_infinity", "undecided",
                 "sets_at_infinity"):
        setattr(result, kind, list(getattr(local, kind)))
    result.status, result.steps, result.winding = local.status, local.steps, local.winding
    result.retracked, result.digits = local.retracked, local.digits
    result.extra["start"] = local.extra.get("start")


def _found_at_origin(local, options):
    """Whether a centred run (points not yet moved back) has a solution group at its origin and no failed path."""
    if local.path_counts()["failed"] or lost_first_stage_paths(local.extra.get("start")):
        return False
    return any(float(np.linalg.norm(local.scaling.to_computed(np.asarray(s.point, complex)[None, :])[0]))
               <= options.cluster_tolerance for s in local.solutions)


def _accounted(result, local, group, first_in, second_in, every):
    """Whether a centred run accounts for a misplaced group's paths (decision 0089).

    The group is no zero: its paths ended nowhere the equations say, like failed paths. The centred run, whose
    origin is the zero the group was drawn to and which found a solution there, must then agree with the first
    run everywhere else -- in the region less the group, outside it, at infinity -- and place the group's paths
    in the region or at infinity: as many more there as the group had.
    """
    others_in = sum(s.multiplicity for s in first_in if s is not group)
    extra_in = sum(s.multiplicity for s in second_in) - others_in
    extra_infinity = (sum(s.multiplicity for s in local.at_infinity + local.sets_at_infinity)
                      - sum(s.multiplicity for s in result.at_infinity + result.sets_at_infinity))
    inside = {id(s) for s in first_in + second_in}
    first_out = sum(s.multiplicity for kind in ("solutions", "unverified", "not_isolated", "discarded")
                    for s in getattr(result, kind) if id(s) not in inside)
    second_out = sum(s.multiplicity for kind in ("solutions", "unverified", "not_isolated", "discarded")
                     for s in getattr(local, kind) if id(s) not in inside)
    return (extra_in >= 0 and extra_infinity >= 0 and extra_in + extra_infinity == group.multiplicity
            and first_out == second_out and result.path_counts()["failed"] == 0
            and len(result.status) == len(local.status))


#: Not-isolated groups checked in extended precision per solve for being zeros at all (the largest residuals first).
_MAX_ZERO_CHECKS = 32


def _not_zeros(result, options):
    """Not-isolated groups away from the origin that are no zeros of F: {id(group): where to centre}.

    A cycle of the endgame can enclose a multiple root far from the origin and paths going to infinity: its mean
    lies on the line between them, nowhere near a zero, and the paths form one group. In double precision far from
    the origin such a point can look like a zero on a curve: F is known there only to rounding of terms of the
    size of the coordinates' powers, and a flat equation ((x - 1234)^3) is within that of zero over a whole
    strip; the isolation test then meets that strip (decision 0089). Gauss-Newton on the system's own
    coefficients in extended precision (the refinement digits), anchored at the point, settles it: on a
    positive-dimensional set the point is a zero up to the endgame's error and the residual vanishes in at most
    a few steps, moving it less than the cluster tolerance; off one there is no zero near the point to reach. The centre is where Gauss-Newton unanchored
    goes from there (the zero the group was drawn to) when it lies within half the group's distance to the
    origin, else the point itself. Values: (centre, whether it is such a zero).
    """
    system, scaling = result.system, result.scaling
    if not result.not_isolated or system.n_equations != system.n_variables:
        return {}
    far = [s for s in result.not_isolated
           if float(np.linalg.norm(scaling.to_computed(np.asarray(s.point, complex)[None, :])[0]))
           > options.cluster_tolerance]
    if not far:
        return {}
    points = np.array([np.asarray(s.point, complex) for s in far])
    values = BatchEvaluator(system.polynomials).evaluate(points, jacobian=False)
    with np.errstate(all="ignore"):
        residuals = np.max(np.abs(values) / TermSizes(system.polynomials).values(points), axis=1)
    order = np.argsort(-np.nan_to_num(residuals, nan=np.inf))
    if len(order) > _MAX_ZERO_CHECKS:
        result.extra["not_isolated_unchecked"] = int(len(order) - _MAX_ZERO_CHECKS)
    misplaced = {}
    for index in order[:_MAX_ZERO_CHECKS]:
        group = far[index]
        point = np.asarray(group.point, dtype=complex)
        anchored, reached = _refine_mp(system, point, options.refine_digits, anchored=True, converged=True)
        here, there = scaling.to_computed(np.array([point, anchored]))
        # a zero on a set through the point: reached without moving farther than endpoints of one point differ
        if reached and np.linalg.norm(there - here) <= options.cluster_tolerance * (1 + np.linalg.norm(here)):
            continue
        zero, reached = _refine_mp(system, point, options.refine_digits, converged=True)
        here, there = scaling.to_computed(np.array([point, zero]))
        # a zero beyond half the group's distance is not where the centred run could speak for the group
        near = reached and bool(np.all(np.isfinite(zero))) and np.linalg.norm(there - here) <= np.linalg.norm(here) / 2
        misplaced[id(group)] = (zero, True) if near else (point, False)
    return misplaced


def _centre_digits(group):
    """Digits of the centre of a group of multiplicity m: about what the group's point is known to, 16 / m.

    A coordinate that is zero up to the group's error (6e-11 beside 0.86 in a cusp's null-vector endpoint) is
    then exactly zero in the centre: its powers would otherwise be terms of that size in the centred system, and
    the balancing would take them for the features' size (every centred path went to infinity). Never fewer
    than 6 digits: a coarser centre would leave the features far from the centred origin again (roots 1e-6 apart
    at 1234: centred at 1234.000, they are found; at 1230, they would merge as before).
    """
    return max(6, min(12, 16 // max(1, int(group.multiplicity), int(group.winding))))


def _newton_steps(system, scaling, points):
    """The length of one Newton step on F at each point, relative to the point's size (both in computed units)."""
    values, jacobians = BatchEvaluator(system.polynomials).evaluate(points)
    with np.errstate(all="ignore"):
        try:  # square and regular at regular endpoints: a batched solve (a tenth of the least squares' time)
            steps = np.linalg.solve(jacobians, values[:, :, None])[:, :, 0]
        except np.linalg.LinAlgError:
            steps = batched_least_squares(jacobians, values)
        moved = scaling.to_computed(points - steps) - scaling.to_computed(points)
        size = 1 + np.linalg.norm(scaling.to_computed(points), axis=1)
        return np.linalg.norm(moved, axis=1) / size


def _not_converged(result):
    """Regular endpoints (one path each) where one Newton step on F moves the point farther than a root's own error.

    A Cauchy endgame whose circle encloses the branch points of two close roots far from the origin averages
    them; the mean passes the residual test in units of the terms (F cancels there from terms of the size of the
    coordinates' powers) without being a root (decision 0081). At a root the step is rounding.
    """
    single = [s for s in result.solutions if s.multiplicity == 1 and s.winding <= 1]
    if not single or result.system.n_equations != result.system.n_variables:
        return []
    points = np.array([np.asarray(s.point, dtype=complex) for s in single])
    steps = _newton_steps(result.system, result.scaling, points)
    digits = (result.options or SolveOptions()).refine_digits
    return [s for s, step in zip(single, steps)
            if not step <= _NEWTON_STEP and not _rounded_root(result.system, result.scaling, s, digits)]


#: Newton's second step at most this fraction of its first (extended precision): the point lies where Newton
#: converges quadratically to one root, no other root within about 1 / this many times its error (decision 0103).
_CONTRACTION = 1e-2


def _rounded_root(system, scaling, solution, digits):
    """Whether a regular endpoint that one Newton step in double precision moves too far is a root known to rounding.

    A regular root whose unknowns mix large and small sizes (a finite solution of size 1e3 after a linear change of
    coordinates, decision 0103) is known in double precision only to condition * eps, and one Newton step there is
    that rounding, above ``_NEWTON_STEP``. A mean of two close roots (the case :func:`_not_converged` is for) is
    as far from both as they are from each other. Newton in extended precision tells them apart by its rate: from
    a root's rounded point the second step is the square of the first (relative to the distance to other roots),
    from the mean of two it is about half the first. When the second step is at most ``_CONTRACTION`` of the first,
    the solution's point becomes the refined one (its rounding removed; the real test is taken again).
    """
    import mpmath  # here, not at import: only regular endpoints Newton moves too far are looked at
    from ..numeric.refine import mp_scaled_equations
    point = np.asarray(solution.point, dtype=complex)
    with mpmath.mp.workdps(digits + 10):
        ctx = mpmath.mp
        equations = mp_scaled_equations(PrecisionEvaluator(system.polynomials), TermSizes(system.polynomials), ctx)
        z = ctx.matrix([ctx.mpc(v) for v in point])
        sizes = []
        try:
            for _ in range(3):
                values, jacobian = equations(z)
                step = ctx.lu_solve(jacobian, values)
                z = z - step
                moved = scaling.to_computed(np.array([[complex(z[j]) for j in range(z.rows)],
                                                      [complex(z[j] + step[j]) for j in range(z.rows)]]))
                sizes.append(float(np.linalg.norm(moved[0] - moved[1]) / (1 + np.linalg.norm(moved[0]))))
        except (ZeroDivisionError, ValueError):  # a singular Jacobian on the way: no root known to rounding
            return False
    refined = np.array([complex(z[j]) for j in range(z.rows)])
    if not (np.all(np.isfinite(refined)) and sizes[1] <= _CONTRACTION * sizes[0]):
        return False
    solution.point = refined
    solution.real = bool(system.has_real_coefficients
                         and np.all(np.abs(refined.imag) <= REAL_TOLERANCE * (1 + np.abs(refined))))
    return True


def _within(scaling, centre, radius, solution):
    """Whether ``solution`` lies within ``radius`` of ``centre`` (both in computed units)."""
    return float(np.linalg.norm(scaling.to_computed(np.asarray(solution.point, complex)[None, :])[0] - centre)) \
        <= radius


def _region_radius(scaling, centre, largest, solutions):
    """A radius at most ``largest`` with no solution within ``_BORDER_FACTOR`` of it (None: none found)."""
    if not solutions:
        return largest
    points = scaling.to_computed(np.array([np.asarray(s.point, complex) for s in solutions]))
    distances = np.linalg.norm(points - centre[None, :], axis=1)
    radius = largest
    for _ in range(_RADIUS_HALVINGS):
        if not np.any((distances >= radius / _BORDER_FACTOR) & (distances <= radius * _BORDER_FACTOR)):
            return radius
        radius /= 2
    return None


def _remove(result, solutions, kinds):
    """Take ``solutions`` out of the result's lists named by ``kinds`` (compared by identity)."""
    for kind in kinds:
        setattr(result, kind, [s for s in getattr(result, kind) if not any(s is t for t in solutions)])


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
    known = scaling.to_computed(np.atleast_2d(np.asarray(start_points, complex)))

    def fresh_homotopy():  # another gamma and patch for every path (one round of the jump repair)
        made = ParameterHomotopy.from_systems(scaling.scale_system(start_system), scaling.scale_system(target_system),
                                              rng)
        return made, made.start_solutions_from(known, projective=start_system.projective)

    homotopy, starts = fresh_homotopy()
    result = _run(scaling.scale_system(target_system), homotopy, StartArray(starts), len(starts), options, rng, seed,
                  progress, started, False, fresh_homotopy=fresh_homotopy)
    return _in_user_units(result, target_system, scaling)


def _in_user_units(result, system, scaling):
    """The result with its points in the user's units (the computation ran in those of ``scaling``)."""
    def finite(point):
        point = scaling.to_user(point)
        return normalize_projective(point) if system.projective else point

    for solution in result.solutions + result.not_isolated + result.discarded + result.unverified:
        solution.point = finite(solution.point)
    for solution in result.at_infinity + result.sets_at_infinity:
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
                        "refine_digits": options.refine_digits, "square_up": options.square_up,
                        "start": options.start, "groups": None if options.groups is None else
                        [list(g) for g in options.groups]},
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


def _executor_of(execution, batches):
    """Who runs solve's ``batches`` batches.

    An executor named by ``execution`` (``executor``, or ``workers`` / ``scheduler`` / ``local_dask`` to
    start one for this call) comes first; otherwise the ambient one of :func:`~numag.run.executor.using`
    by :func:`~numag.run.executor.ambient_executor`, the rule of every other stage (witness sweeps,
    monodromy, membership, the singular locus); without either, one chosen by the number of batches
    (in-process for one batch).
    """
    if execution.executor is not None:
        return execution.executor
    named = execution.workers is not None or execution.scheduler is not None or execution.local_dask
    if not named and current_executor() is not None:
        return ambient_executor(batches)
    return lambda batches: make_executor(execution.workers, execution.scheduler, execution.local_dask,
                                         batches=batches)


def _run(system, homotopy, start_points, total, options, rng, seed, progress, started, squared, execution=None,
         user_system=None, fresh_homotopy=None, what="the parameter homotopy"):
    """Track all paths (:func:`~numag.tracking.service.track`), then group the endpoints into solutions.

    ``system`` is the system in the units of the computation; ``user_system`` (default: the
    same) is the one the run folder's manifest describes.
    """
    execution = execution or Execution()
    user_system = system if user_system is None else user_system
    # the work guard, before anything of the paths' size is allocated
    charge_paths(total, what)
    check_memory(total * (homotopy.size * 16 + 80), f"keeping {total} paths")
    folder = _open_folder(execution, lambda: manifest_for(user_system, options, seed, total))
    executor = _executor_of(execution, -(-total // options.batch_size))
    run = track(homotopy, start_points, options.tracker, count=total, executor=executor, run_folder=folder,
                batch_size=options.batch_size, progress=progress, projective=system.projective,
                jump_tolerance=options.cluster_tolerance, fresh_homotopy=fresh_homotopy,
                whole_cycles=isinstance(homotopy, StraightLineHomotopy))  # every start of a total-degree start
    status, winding, condition = run.status, run.winding, run.condition
    if system.projective:  # X_0 = 0 is an ordinary point of projective space, not "infinity"
        ends = status == PathStatus.AT_INFINITY
        singular = (winding > 1) | (condition > options.tracker.singular_condition)
        status[ends & singular] = PathStatus.SINGULAR_ENDPOINT
        status[ends & ~singular] = PathStatus.CONVERGED
    else:
        status[_unresolved_infinity(run.homotopy, run.endpoints, status, options.tracker)] = PathStatus.AT_INFINITY
    # one BLAS thread, as for the tracking (service.track): the endpoints are judged one point at a time, and
    # a multithreaded product of a 1 x 158 row (cyclic 8) took 5-30 ms on a loaded machine against 0.3 ms
    # (cyclic 8: 230 of 323 s in the isolation tests; decision 0077)
    with threadpool_limits(limits=1):
        solutions, infinite, not_isolated, unverified, unsettled = _collect(
            system, run.endpoints, status, winding, condition, options, rng,
            forms=None if squared or system.projective else system.polynomials)
    # a point at infinity that cannot be told from another, or no zero of the top-degree forms: failed paths
    status[unsettled] = PathStatus.FAILED_ENDGAME
    discarded = []
    if squared:  # random combinations have extra solutions: keep only those of every equation
        # (a singular group that fails them is one of those extras, discarded like the regular ones)
        discarded, unverified = unverified, []
        kept = []
        for solution in solutions:
            (kept if _satisfies(system, solution.point) else discarded).append(solution)
        solutions = kept
    result = SolveResult(system=system, solutions=solutions, at_infinity=[s for s in infinite if s.set_dimension == 0],
                         not_isolated=not_isolated, status=status, steps=run.steps, winding=winding,
                         retracked=run.retracked, seed=seed, seconds=time.perf_counter() - started,
                         evaluations=run.evaluations, squared_up=squared, digits=run.digits,
                         sets_at_infinity=[s for s in infinite if s.set_dimension > 0])
    result.discarded = discarded
    result.unverified = unverified
    if len(unsettled):
        result.extra["undecided_at_infinity"] = int(len(unsettled))
    description = dict(run.execution)
    tracking = description.pop("tracking_seconds")  # the batches and the re-tracking of jumped paths
    description["seconds"] = result.seconds
    description["tracking_seconds"] = tracking
    result.extra["execution"] = description
    result.options = options
    return result


def _unresolved_infinity(homotopy, endpoints, status, tracker):
    """Singular endpoints whose X_0 the target cannot tell from 0: paths at infinity (decision 0049).

    An endgame estimate is called finite when |X_0| / ||X|| exceeds a fixed threshold; but where the
    target's terms in X_0 all carry a high power of it, X_0 is known only to about eps^(1/power) (cyclic 6,
    towards (0 : 0, a, 0, b, 0, c), a + b + c = 0: only -X_0^6 is left, and X_0 came out 4.5e-4). Such an
    endpoint solves F^h just as well with X_0 = 0, within the tolerance every endpoint is held to, so
    nothing in the equations says that it is finite.

    Returns
    -------
    ndarray of int
        Paths with status singular endpoint whose endpoint with X_0 = 0 has a scaled target residual at
        or below ``tracker.endpoint_residual``.
    """
    singular = np.nonzero(status == PathStatus.SINGULAR_ENDPOINT)[0]
    if len(singular) == 0:
        return singular
    return singular[x0_invisible(homotopy, endpoints[singular], tracker)]


def _satisfies(system, point, tolerance=1e-8):
    """Scaled residual of every equation at the point below the tolerance."""
    point = np.asarray(point, dtype=complex)[None, :]
    values = BatchEvaluator(system.polynomials).evaluate(point, jacobian=False)
    scales = TermSizes(system.polynomials, system.projective).values(point)
    return bool(np.max(np.abs(values) / scales) <= tolerance)


def _finite_points(system, endpoints, indices):
    if system.projective:
        # the column count given: no finite endpoints give no rows (reshape(0, -1) is an error)
        return normalize_projective(endpoints[indices]).reshape(len(indices), endpoints.shape[1])
    return endpoints[indices, 1:] / endpoints[indices, :1]


def _collect(system, endpoints, status, winding, condition, options, rng, forms=None):
    """Group the endpoints into solutions, points at infinity, flagged and unverified groups.

    ``forms``: the affine target's equations, whose top-degree forms locate the points at infinity (decision
    0106); None for random combinations, whose endpoints at infinity are clustered as they are. The last
    value returned holds the paths at infinity whose point could not be decided.
    """
    real_coefficients = system.has_real_coefficients
    finite = np.nonzero((status == PathStatus.CONVERGED) | (status == PathStatus.SINGULAR_ENDPOINT))[0]
    infinite = np.nonzero(status == PathStatus.AT_INFINITY)[0]
    finite_points = _finite_points(system, endpoints, finite)
    affine_system = None if system.projective else system
    solutions, flagged, unverified = [], [], []
    labels = cluster_labels(finite_points, options.cluster_tolerance, projective=system.projective)
    with np.errstate(invalid="ignore"):
        real_points = real_coefficients & np.all(
            np.abs(finite_points.imag) <= REAL_TOLERANCE * (1 + np.abs(finite_points)), axis=1)
    converged = int(PathStatus.CONVERGED)  # looked up once: enum attributes are slow in a loop of P
    testers = {}  # chart pivot (None: affine) -> IsolationTest
    for members in groups(labels):
        paths = finite[members]
        if len(members) == 1 and status[paths[0]] == converged:
            # the common case, a regular endpoint reached by one path: nothing to test or refine
            solutions.append(Solution(point=finite_points[members[0]], multiplicity=1,
                                      winding=int(winding[paths[0]]), at_infinity=False,
                                      real=bool(real_points[members[0]]), condition=float(condition[paths[0]]),
                                      isolated=True, paths=paths, digits=16))
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
        isolated = settled = True
        accuracy = REAL_TOLERANCE
        if singular:
            from ..numeric.refine import IsolationTest  # here: a run of regular endpoints never needs it
            if pivot not in testers:  # one test per chart (its evaluators are built once, not per point)
                testers[pivot] = IsolationTest(test_system, rng)
            tester = testers[pivot]
            isolated = tester.isolated(test_point)
            if isolated and test_system.n_equations >= test_system.n_variables:
                test_point, residual = _refine_mp(test_system, np.mean(
                    [finite_points[k] if pivot is None else np.delete(finite_points[k] / finite_points[k][pivot],
                                                                         pivot) for k in members], axis=0),
                    options.refine_digits, residual=True)
                # a root of multiplicity m is known to about residual^(1/m) (scaled F, computed units)
                accuracy = root_accuracy(residual, max(len(members), int(winding[paths].max())))
                digits = options.refine_digits
                point = test_point if pivot is None else np.insert(test_point, pivot, 1.0)
                # the test saw an endgame estimate: on a positive-dimensional set such a point can pass for
                # isolated (cyclic 8: 2 of 599 points of its curves, reported as isolated double points);
                # the refined point is tested once more
                isolated = tester.isolated(test_point)
            # what is counted as a solution satisfies F in units of its terms as every endpoint must; an
            # estimate near infinity can pass the homogeneous test and fail this one (decision 0049)
            settled = _satisfies(test_system, test_point, options.tracker.endpoint_residual)
        real = reality(point, accuracy) if real_coefficients else False
        entry = Solution(point=point, multiplicity=len(members), winding=int(winding[paths].max()),
                         at_infinity=False, real=real, condition=float(condition[paths].min()), isolated=isolated,
                         paths=paths, digits=digits)
        # an isolated group that does not satisfy F is no solution numag can vouch for (decision 0049)
        ((solutions if settled else unverified) if isolated else flagged).append(entry)
    at_infinity, unsettled = [], np.zeros(0, dtype=np.int64)
    if len(infinite):
        if forms is None:  # the paths of random combinations: their points at infinity are the combinations'
            points = normalize_projective(endpoints[infinite])
            found = [(members, points[members[0]], 1e-8, 0, False) for members in
                     groups(cluster_labels(points, options.cluster_tolerance, projective=True))]
        else:
            # located on the top-degree forms and grouped by their accuracy; what cannot be decided is failed
            # (decision 0106)
            located = locate_at_infinity(forms, endpoints[infinite], options.cluster_tolerance)
            # each located endpoint's point is isolated in the set at infinity, or on a part of positive
            # dimension (then where it ends depends on the start): the local dimension by slices (decision
            # 0112), drawn from a copy of the generator, so that the draws after it do not depend on whether it
            # ran (a copy, not Generator.spawn: numpy 1.23 has none)
            grouped = np.concatenate(located.groups) if located.groups else np.zeros(0, dtype=np.int64)
            dimension = np.zeros(len(infinite), dtype=np.int64)
            doubt = np.zeros(len(infinite), dtype=bool)
            dimension[grouped], doubt[grouped] = local_dimension_at_infinity(
                forms, located.directions[grouped], located.accuracy[grouped], copy.deepcopy(rng))
            undecided = list(located.undecided)
            found = []
            for members in located.groups:
                # where every endpoint found the same dimension without doubt, it is decided. Otherwise the lowest
                # dimension found is a lower bound (a slice met zeros next to the point: the set is at least that
                # large there): >= 1 is on a positive-dimensional set; 0 leaves the group's isolation undecided (a
                # warning of the command, exit 3). The paths reached infinity either way and are not failures:
                # callers that want the finite solutions (the square null-vector system, the families' tracers)
                # must not lose them to a question about the set at infinity
                lowest, highest = int(dimension[members].min()), int(dimension[members].max())
                at_least = bool(np.any(doubt[members])) or lowest != highest
                # a multiple point is known to its refinement's accuracy (1e-8 at a double one): below it, an
                # imaginary part does not make the point complex
                found.append((members, normalize_projective(located.point(members)),
                              max(1e-8, float(located.accuracy[members].max())), lowest, at_least))
            if undecided:
                unsettled = infinite[np.concatenate(undecided)]
        for members, point, accuracy, set_dimension, at_least in found:
            paths = infinite[members]
            real = bool(real_coefficients and np.all(np.abs(point.imag) <= accuracy * (1 + np.abs(point))))
            at_infinity.append(Solution(point=point, multiplicity=len(members), winding=int(winding[paths].max()),
                                        at_infinity=True, real=real, condition=float(condition[paths].min()),
                                        isolated=set_dimension == 0 and not at_least, paths=paths, digits=16,
                                        set_dimension=set_dimension, dimension_at_least=at_least))
    return solutions, at_infinity, flagged, unverified, unsettled
