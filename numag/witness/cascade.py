"""Witness supersets of X = V(f_1, ..., f_m) in C^n by a regenerative cascade, and membership tests.

A component Z of X of codimension c (dimension n - c) meets n - c generic
hyperplanes in deg Z points, its witness points. All dimensions are found in
one sweep over the equations (regeneration, after Hauenstein, Sommese and
Wampler, "Regeneration homotopies for solving polynomial systems", Math. Comp.
2011), so that the number of paths follows the sizes of the witness sets met on
the way instead of a Bezout number per dimension:

* fixed random hyperplanes l_1, ..., l_n; the codimension-c witness points of
  V(f_1, ..., f_i) are its points on l_{c+1} = ... = l_n = 0;
* before any equation, the one point of l_1 = ... = l_n = 0 witnesses C^n;
* equation f = f_{i+1} of degree d, for each codimension-c witness point w:
  if f(w) = 0, w's component lies in V(f) and w stays a codimension-c point;
  otherwise the component meets V(f) in codimension c + 1: the hyperplane
  l_{c+1} through w is moved to d other random hyperplanes (d paths), and
  their product is deformed into f (d paths again), with c random combinations
  of f_1..f_i holding the path on w's component;
* endpoints that do not satisfy f_1..f_{i+1}, or that lie at infinity, are
  dropped (counted); endpoints on a component of smaller codimension are junk,
  removed by a rank test of the Jacobian (full rank c + 1 means the point cannot
  lie on a larger component) and otherwise by a homotopy membership test.

Examples
--------
>>> from numag.system.parse import parse_system
>>> system = parse_system(["x*z", "y*z"], ["x", "y", "z"])   # plane z = 0 and line x = y = 0
>>> sets = witness_supersets(system, seed=1)
>>> sorted((s.dimension, len(s.points)) for s in sets.sets if len(s.points))
[(1, 1), (2, 1)]
"""

from dataclasses import dataclass, field, replace
import math

import numpy as np

from ..kinds import TextEnum
from ..errors import InputError, LimitError, is_integer, is_number, require_option
from ..system.centred import CENTRED_BALANCING_FLOOR, CENTRING_TERMS, CentredTerms, centre_near, translated_terms
from ..system.polynomial import Polynomial, PolynomialSystem
from ..run.executor import ambient_executor, charge_paths
from ..numeric.cluster import cluster_labels, groups
from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..numeric.linalg import scaled_singular_values
from ..numeric.minors import (AugmentedEvaluator, CombinedRows, LinearFormProduct, MinorsSystem, equation_evaluator,
                              expanded_minors, random_minor_weights, split_equations)
from ..numeric.scaling import Scaling
from ..numeric.refine import ROUNDING_RESIDUAL, IsolationTest, ZeroKind, largest_scaled_residual, newton_zero_test
from ..numeric.seeds import random_state
from ..tracking.homotopy import ParameterHomotopy, random_unit_complex
from ..tracking.multihomogeneous import GroupSource
from ..tracking.service import PathCounts, TrackRun, track
from ..tracking.starts import StartKind, choose_witness_start
from ..tracking.tracker import FAILURE_LABELS, PathStatus, TrackerOptions, rescue_budget

__all__ = ["WitnessOptions", "WitnessSet", "WitnessSupersets", "witness_supersets", "Slicing", "track_moves",
           "membership", "held_parts", "combine_equations", "random_rows", "linear_form", "jacobian_rank"]


@dataclass(frozen=True)
class WitnessOptions:
    """Options of the witness computations (defaults declared once).

    Attributes
    ----------
    lowest_dimension : int or None
        Components of smaller dimension are not searched (None: down to points).
    tracker : TrackerOptions
    residual_tolerance : float
        Largest scaled residual of an original equation at a witness point.
    cluster_tolerance : float
        Relative distance under which endpoints are the same point.
    rank_threshold : float
        Scaled singular values above this count towards the rank of J.
    batch_size : int
    start : StartKind or str
        The regeneration's factors: total degree, or products of linear forms in variable groups
        ("multihomogeneous"; "auto" and "polyhedral" choose, see
        :func:`~numag.tracking.starts.choose_witness_start`).
    groups : tuple of tuple of str, optional
        Variable names per group for a start other than total degree (default: the best grouping found).
    group_source : GroupSource
        Where ``groups`` come from (reported).
    moved_endgame_radius : float, optional
        Where the Cauchy endgame of the regeneration's moves from a product of linear forms to an equation
        starts, when smaller than the tracker's ``endgame_radius`` (None: the tracker's). The singular locus
        decomposes its candidate systems with 1e-2: their multiple endpoints (the singular points, and X's
        points at infinity, where the minors vanish to high order) settled only at radii of 1e-3 to 1e-5,
        after rounds of up to six loops at every larger radius (decision 0085).
    """

    lowest_dimension: int | None = None
    tracker: TrackerOptions = TrackerOptions()
    residual_tolerance: float = 1e-7
    cluster_tolerance: float = 1e-6
    rank_threshold: float = 1e-6
    batch_size: int = 4096
    start: StartKind = StartKind.TOTAL_DEGREE
    groups: tuple | None = None
    group_source: GroupSource = GroupSource.FILE
    moved_endgame_radius: float | None = None

    def __post_init__(self):
        """Refuse a bad value on construction, naming the option (the system's bounds: :meth:`validated`)."""
        object.__setattr__(self, "start", self.start if isinstance(self.start, StartKind)
                           else StartKind.parse(self.start))
        if self.groups is not None:
            object.__setattr__(self, "groups", tuple(tuple(str(name) for name in g) for g in self.groups))
        require_option(self.lowest_dimension is None or is_integer(self.lowest_dimension),
                       "the lowest dimension to search", "an integer", self.lowest_dimension)
        require_option(is_number(self.cluster_tolerance) and 0 < self.cluster_tolerance < 1, "cluster_tolerance",
                       "in (0, 1)", self.cluster_tolerance)
        for name in ("residual_tolerance", "rank_threshold"):
            value = getattr(self, name)
            require_option(is_number(value) and 0 < value < 1, name, "in (0, 1)", value)
        require_option(is_integer(self.batch_size) and self.batch_size >= 1, "batch_size", "positive",
                       self.batch_size)
        require_option(self.moved_endgame_radius is None or (is_number(self.moved_endgame_radius)
                                                             and 0 < self.moved_endgame_radius <= 1),
                       "moved_endgame_radius", "in (0, 1]", self.moved_endgame_radius)

    def validated(self, n_variables):
        """Check the options against the number of variables; raise InputError naming the bad option."""
        if self.lowest_dimension is not None and not 0 <= self.lowest_dimension <= n_variables:
            raise InputError(f"the lowest dimension to search must be from 0 to {n_variables}, "
                             f"got {self.lowest_dimension!r}")
        return self


@dataclass
class WitnessSet:
    """The witness points of the union of the components of one dimension.

    Attributes
    ----------
    dimension : int
    points : ndarray, shape (K, n)
        Distinct points of X on the slice.
    multiplicity : ndarray of int, shape (K,)
        Paths that ended at each point (above 1 on a non-reduced component).
    slice_rows : ndarray, shape (dimension, n + 1)
        The hyperplanes a . (1, x) = 0 cutting the points out (constant first).
    """

    dimension: int
    points: np.ndarray
    multiplicity: np.ndarray
    slice_rows: np.ndarray


@dataclass
class WitnessSupersets:
    """Result of :func:`witness_supersets`.

    Attributes
    ----------
    sets : list of WitnessSet
        One per dimension searched, from the top down (empty ones included).
    dimensions_searched : list of int
    slicing : Slicing
        The random data (hyperplanes, combinations) used, for later homotopies.
    paths : dict
        Tracked paths by status label, plus what happened to their endpoints.
    start : dict
        The regeneration's start block (:meth:`~numag.tracking.starts.StartChoice.report`).
    unexplained : ndarray, shape (K, n)
        The endpoints counted ``residual_not_explained`` (dropped: Newton ended at a stationary point of the
        residual), for callers that look again where they were (the singular candidates, decision 0090).
    """

    sets: list
    dimensions_searched: list
    slicing: "Slicing"
    paths: dict = field(default_factory=dict)
    start: dict = field(default_factory=dict)
    unexplained: np.ndarray = None

    def of_dimension(self, dimension):
        """The witness set of that dimension (None when it was not searched)."""
        for witness in self.sets:
            if witness.dimension == dimension:
                return witness
        return None


class Slicing:
    """The random hyperplanes and combinations of one computation.

    Parameters
    ----------
    system : PolynomialSystem
        Affine system.
    rng : numpy.random.Generator
    groups : VariableGroups, optional
        Variable groups of the regeneration's factors (None: total-degree factors).
    """

    def __init__(self, system, rng, groups=None):
        self.system = system
        self.groups = groups
        self.n = system.n_variables
        self.rng = rng
        # unit-norm complex rows; hyperplane j is rows[j] . (1, x) = 0. Complex, also for real
        # equations: a real slice can be nearly parallel to a real component (seen: a line at 0.2
        # degrees from six vertical lines put their witness points 500 away and lost five of them);
        # real witness points come afterwards (numag.witness.decompose moves witness sets to a real slice).
        rows = random_rows(rng, self.n, self.n + 1)
        center = (rng.standard_normal(self.n) + 1j * rng.standard_normal(self.n)) / np.sqrt(2)
        # All n hyperplanes pass through a random point of moderate size (the start point of the sweep):
        # random constants could put it far out, where scaled residuals say little.
        center *= 1.0 / np.sqrt(self.n)
        rows[:, 0] = -(rows[:, 1:] @ center)
        self.rows = (rows / np.linalg.norm(rows, axis=1, keepdims=True)).astype(complex)
        # each equation divided by its coefficient norm: comparable sizes keep the homotopies well scaled
        # (Chebyshev curves of degree 11 have coefficients up to 1024); the zero sets are unchanged
        self.homogeneous = [p.numeric().homogenize(0) * (1.0 / max(p.coefficient_norm(), 1e-300))
                            for p in system.polynomials]
        # evaluated minors (a MinorsSystem): homogenised, divided by the size of their terms at (1, ..., 1)
        self.minors = system.evaluated(homogenized=True).scaled_to_unit(np.ones((1, self.n + 1))) \
            if isinstance(system, MinorsSystem) else None
        self._factors = {}

    def evaluated(self, index):
        """Is equation ``index`` an evaluated minor (not one of the polynomials)?"""
        return index >= len(self.homogeneous)

    def slice_rows(self, codimension):
        """The hyperplanes of the codimension-c witness points: l_{c+1}, ..., l_n."""
        return self.rows[codimension:]

    def factor_rows(self, position, degree):
        """The d random hyperplanes that replace l_position in a regeneration (fixed per position)."""
        have = self._factors.get(position, np.zeros((0, self.n + 1), dtype=complex))
        if len(have) < degree:
            have = np.vstack([have, random_rows(self.rng, degree - len(have), self.n + 1)])
            self._factors[position] = have
        return have[:degree]

    def moved_rows(self, position, index):
        """The factors (rows over (X_0, x)) that replace l_position when equation ``index`` is regenerated.

        Total-degree factors (:meth:`factor_rows`) without groups and for evaluated minors; with groups,
        d_j random rows with zeros outside X_0 and group j for the equation's degree d_j in group j
        (fixed per position and group, like :meth:`factor_rows`).
        """
        if self.groups is None or self.evaluated(index):
            return self.factor_rows(position, self.system.degrees[index])
        degrees = self.groups.degree_matrix([self.system.polynomials[index]])[0]
        rows = []
        for group, degree in zip(self.groups.groups, degrees):
            key = (position, group)
            have = self._factors.get(key, np.zeros((0, self.n + 1), dtype=complex))
            if len(have) < degree:
                drawn = np.zeros((degree - len(have), self.n + 1), dtype=complex)
                drawn[:, [0] + [j + 1 for j in group]] = random_rows(self.rng, degree - len(have), len(group) + 1)
                have = np.vstack([have, drawn])
                self._factors[key] = have
            rows.append(have[:degree])
        return np.vstack(rows)

    def combinations(self, equations, count):
        """``count`` random combinations of homogeneous equations (see :func:`combine_equations`)."""
        return combine_equations(equations, count, self.rng)

    def held_rows(self, indices, count, moving=None):
        """``count`` random combinations of the equations ``indices`` (homogeneous), polynomials or evaluated rows.

        Without evaluated minors this is :meth:`combinations` of those equations (the same draws). With
        them (among ``indices``, or ``moving`` one), the combinations are a :class:`CombinedRows`.

        Parameters
        ----------
        indices : list of int
            Equation numbers (those from ``len(system.polynomials)`` on are evaluated minors).
        count : int
        moving : int, optional
            An evaluated equation to append as one more row by itself (the target of a regeneration).

        Returns
        -------
        held : list of Polynomial or CombinedRows
            The combinations.
        with_moving : CombinedRows or None
            The same combinations (same weights) and the row of ``moving`` last; None without ``moving``.
        """
        m = len(self.homogeneous)
        minors = [k - m for k in indices if k >= m]
        if not minors and (moving is None or moving < m):
            return combine_equations([self.homogeneous[k] for k in indices], count, self.rng), None
        polynomials = [self.homogeneous[k] for k in indices if k < m]
        # columns: the polynomials, then the minors (random weights: the order is immaterial)
        weights = random_rows(self.rng, count, len(indices)) if count and indices \
            else np.zeros((count, len(indices)), dtype=complex)
        if minors:
            held = CombinedRows(polynomials, self.minors.subset(minors), weights)
        else:
            held = _combine_with(polynomials, weights)
        if moving is None:
            return held, None
        last = np.zeros((1, len(indices) + 1), dtype=complex)
        last[0, -1] = 1.0
        rows = np.vstack([np.hstack([weights, np.zeros((count, 1))]), last])
        return held, CombinedRows(polynomials, self.minors.subset(minors + [moving - m]), rows)


def combine_equations(equations, count, rng):
    """``count`` random combinations of homogeneous equations in (X_0, x), raised to one degree by X_0 powers.

    Parameters
    ----------
    equations : list of Polynomial
        Homogeneous, in the same n + 1 variables (X_0 first).
    count : int
    rng : numpy.random.Generator

    Returns
    -------
    list of Polynomial
    """
    if count == 0 or not equations:
        return []
    return _combine_with(equations, random_rows(rng, count, len(equations)))


def _combine_with(equations, weights):
    """The combinations ``weights`` (rows) of homogeneous equations, raised to one degree by X_0 powers."""
    if len(weights) == 0 or not equations:
        return []
    top = max(p.degree for p in equations)
    x0 = Polynomial.variable(0, equations[0].n_variables).numeric()
    raised = [p * x0.power(top - p.degree) if p.degree < top else p for p in equations]
    combined = []
    for row in weights:
        total = Polynomial.zero(equations[0].n_variables)
        for w, p in zip(row, raised):
            total = total + p * complex(w)
        combined.append(total)
    return combined


def random_rows(rng, count, size):
    """Random complex rows of unit norm, shape (count, size)."""
    rows = rng.standard_normal((count, size)) + 1j * rng.standard_normal((count, size))
    return rows / np.linalg.norm(rows, axis=1, keepdims=True)


def linear_form(row):
    """The homogeneous linear polynomial row . (X_0, x)."""
    return Polynomial.linear(row)


def track_moves(start, target, points, rng, options, batch_size=4096, whole_cycles=False, held=None,
                held_start=None):
    """Track affine points from the square homogeneous system ``start`` to ``target`` (parameter homotopy).

    Parameters
    ----------
    start, target : list of Polynomial
        n homogeneous polynomials each, in (X_0, x_1, ..., x_n), equal degrees row by row.
    points : ndarray, shape (P, n)
        Solutions of ``start`` (affine).
    rng : numpy.random.Generator
    options : TrackerOptions
    batch_size : int
    whole_cycles : bool
        ``points`` are every solution of ``start`` that moves (see :func:`~numag.tracking.service.track`).
    held : CombinedRows, optional
        Evaluated rows common to start and target, before them (then ``start`` and ``target`` have
        n - held.count polynomials each).
    held_start : list of (Polynomial or None), optional
        Held rows that move: the polynomial each starts from (see :class:`ParameterHomotopy`).

    Returns
    -------
    TrackRun
        ``affine_endpoints()`` gives the endpoints (NaN where the path failed or went to
        infinity), ``counts`` the paths by status.
    """
    n = len(start) + (0 if held is None else held.count)
    points = np.asarray(points, dtype=complex).reshape(-1, n)
    count = len(points)
    if count == 0:  # nothing drawn from rng: the random data of later homotopies stays the same
        return TrackRun.empty(n + 1)
    charge_paths(count, f"a homotopy of {n} equations")  # the work guard, before any tracking
    size = n + 1

    def homotopy_with_fresh_gamma():
        patch = (rng.standard_normal(size) + 1j * rng.standard_normal(size)) / np.sqrt(2 * size)
        made = ParameterHomotopy(start, target, patch, random_unit_complex(rng), held=held, held_start=held_start)
        return made, made.start_solutions_from(points)

    homotopy, starts = homotopy_with_fresh_gamma()
    # endpoints at infinity are dropped here: paths heading there stop before the endgame (decision 0113)
    options = replace(options or TrackerOptions(), infinity_wanted=False)
    return track(homotopy, starts, options, executor=ambient_executor(-(-count // batch_size)),
                 batch_size=batch_size, fresh_homotopy=homotopy_with_fresh_gamma, whole_cycles=whole_cycles)


#: Endpoints with a scaled residual between the tolerance and this are refined before they are judged.
_DOUBTFUL_RESIDUAL = 1e-3

def jacobian_rank(evaluator, sizes, points, threshold):
    """Numerical rank of the row-scaled Jacobian at each point (rows divided by their terms' size)."""
    points = np.atleast_2d(points)
    if len(points) == 0:
        return np.zeros(0, dtype=np.int64)
    _, jacobian = evaluator.evaluate(points)
    values = scaled_singular_values(jacobian, sizes.gradients(points))
    return np.sum(values > threshold, axis=1)


def held_parts(held):
    """Held equations as (polynomials, evaluated block): a list of polynomials, or one :class:`CombinedRows`.

    Examples
    --------
    >>> held_parts([])
    ([], None)
    """
    if isinstance(held, CombinedRows):
        return [], held
    return list(held), None


def membership(held, slice_rows, witness_points, point, rng, options):
    """Which witness points lie on a component through ``point`` (the homotopy membership test).

    The slice of the witness points is moved to a random slice through the point; the
    component of a witness point passes through the point exactly when its path ends there.

    Parameters
    ----------
    held : list of Polynomial or CombinedRows
        c homogeneous equations vanishing on the components, of full rank c at their witness points.
    slice_rows : ndarray, shape (n - c, n + 1)
        The hyperplanes of the witness points.
    witness_points : ndarray, shape (K, n)
    point : ndarray, shape (n,)
    rng : numpy.random.Generator
    options : WitnessOptions

    Returns
    -------
    hits : ndarray of bool, shape (K,)
        True for the witness points whose path ended at ``point``.
    paths : PathCounts
        The paths tracked.
    """
    witness_points = np.atleast_2d(witness_points)
    n = witness_points.shape[1]
    if len(witness_points) == 0:
        return np.zeros(0, dtype=bool), PathCounts()
    if len(slice_rows) == 0:  # isolated points: the component is the point itself
        return np.linalg.norm(witness_points - point[None, :], axis=1) <= 1e-6 * (1 + np.linalg.norm(point)), \
            PathCounts()
    through = random_rows(rng, len(slice_rows), n + 1)
    through[:, 0] = -(through[:, 1:] @ point)  # each hyperplane passes through the point
    held, block = held_parts(held)
    start = held + [linear_form(r) for r in slice_rows]
    target = held + [linear_form(r) for r in through]
    run = track_moves(start, target, witness_points, rng, options.tracker, options.batch_size, held=block)
    distance = np.nan_to_num(np.linalg.norm(run.affine_endpoints() - point[None, :], axis=1), nan=np.inf)
    return distance <= 1e-5 * (1 + np.linalg.norm(point)), run.counts


def witness_supersets(system, options=None, seed=None, progress=None):
    """Witness points of every dimension of X = V(F) (affine), junk removed.

    Parameters
    ----------
    system : PolynomialSystem
        Affine equations in n unknowns (any number of equations).
    options : WitnessOptions, optional
    seed : int, optional
    progress : Progress, optional
        Told a message after each equation (:mod:`numag.run.progress`).

    Returns
    -------
    WitnessSupersets

    Raises
    ------
    InputError
        For projective input or invalid options.
    """
    if system.projective:
        raise InputError("witness sets are computed for affine systems; give the projective system in an "
                         "affine chart (set one coordinate to 1)")
    # One budget of precision rescue for the whole cascade: its hundreds of homotopies each allowed the
    # per-call budget, which let the rescue of failing regeneration paths run for many minutes (decision 0050).
    with rescue_budget():
        return _witness_supersets(system, options, seed, progress)


def _witness_supersets(system, options, seed, progress):
    """:func:`witness_supersets` inside its rescue budget."""
    n = system.n_variables
    options = (options or WitnessOptions()).validated(n)
    _, rng = random_state(seed)
    choice = choose_witness_start(system, options.start, options.groups, options.group_source)
    slicing = Slicing(system, rng, choice.groups if choice.kind is StartKind.MULTIHOMOGENEOUS else None)
    lowest = 0 if options.lowest_dimension is None else options.lowest_dimension
    deepest = n - lowest  # largest codimension searched
    counts = {"tracked": 0, "not_on_X": 0, "at_infinity_or_failed": 0, "on_larger_component": 0,
              "membership_paths": 0}
    track_counts = PathCounts()
    unexplained = []  # where the endpoints dropped as residual_not_explained were
    # codimension -> (points (K, n), multiplicity (K,)); the start: C^n is witnessed by one point
    start_point = np.linalg.solve(slicing.rows[:, 1:], -slicing.rows[:, 0])
    current = {0: (start_point[None, :], np.ones(1, dtype=np.int64))}
    degrees = system.degrees  # F's equations, then any evaluated minors (a MinorsSystem)
    order = sorted(range(system.n_equations), key=lambda k: degrees[k])
    used = []
    for step, index in enumerate(order):
        if not slicing.evaluated(index):
            f = slicing.homogeneous[index]
            if f.is_zero():
                continue
            if f.degree == 0:  # a nonzero constant: no point satisfies it, X is empty in every dimension
                current = {}
                counts["constant_equation"] = 1
                break
        before = used.copy()
        used.append(index)
        evaluator, sizes = equation_evaluator(system, used)
        if slicing.evaluated(index):
            single, single_sizes = equation_evaluator(system, [index])
        else:
            single = BatchEvaluator([system.polynomials[index].numeric()])
            single_sizes = TermSizes([system.polynomials[index]])
        following = {}
        for codim in sorted(current):
            points, multiplicity = current[codim]
            residual = largest_scaled_residual(single_sizes, single, points)
            # A point on a multiple component is known only to about the square root of the precision, and a
            # point where f is small only against terms sized in the unit (decision 0064) is no point of V(f):
            # Newton on the equations so far plus f and its slice decides both.
            points, on = _settle_on(system, used, slicing.slice_rows(codim), points, residual, options, counts,
                                    "refined_to_stay", unexplained)
            stay_points, stay_mult = following.get(codim, (np.zeros((0, n), complex), np.zeros(0, np.int64)))
            following[codim] = (np.vstack([stay_points, points[on]]), np.concatenate([stay_mult, multiplicity[on]]))
            regenerate = points[~on]
            if codim >= deepest or len(regenerate) == 0:
                continue
            candidates, lost, moved, status, weight = _regenerate(slicing, before, index, codim, regenerate, options,
                                                                  multiplicity=multiplicity[~on])
            counts["product_paths"] = counts.get("product_paths", 0) + len(candidates)  # what a start's groups save
            counts["at_infinity_or_failed"] += lost
            track_counts += moved
            if len(candidates) == 0:
                continue
            residual = largest_scaled_residual(sizes, evaluator, candidates)
            # An endpoint known only to 1e-6 (ill-conditioned, or a path that barely settled) can miss the
            # residual test by a hair (a node of a conic and a cubic was lost at 1.09e-7), and a stationary
            # point of the residual can pass it (decision 0064): Newton on the equations and the slice decides.
            candidates, good = _settle_on(system, used, slicing.slice_rows(codim + 1), candidates, residual,
                                          options, counts, "refined_to_keep", unexplained)
            finite = np.all(np.isfinite(candidates), axis=1)
            # A path the endgame called settled on the target, ending where the target is far from zero (no bound
            # of any unit keeps it, no refinement reaches V(f_used)), did not settle: its limit is unknown and what
            # it led to may be lost (two nodes 1e-3 apart at (3, 9): four paths averaged two nodes with two paths
            # to infinity). Counted as failed (decision 0071), not as an endpoint off X.
            off_target = finite & ~good & ~(residual <= _DOUBTFUL_RESIDUAL) & np.isin(
                status, [PathStatus.CONVERGED, PathStatus.SINGULAR_ENDPOINT])
            if np.any(off_target):
                track_counts += _not_settled(status[off_target])
            counts["not_on_X"] += int(np.sum(~good & finite & ~off_target))
            counts["at_infinity_or_failed"] += int(np.sum(~np.all(np.isfinite(candidates), axis=1)))
            candidates, status, weight = candidates[good], status[good], weight[good]
            if len(candidates) == 0:
                continue
            labels = cluster_labels(candidates, options.cluster_tolerance)
            members = groups(labels)
            distinct = np.array([candidates[m[0]] for m in members])
            # A path leaving a point of multiplicity m (a component of V(f_before) counted m times, moved once on
            # deflated rows) stands for m paths: the intersection with V(f) of a component counted m times is
            # counted m times (a complete intersection is Cohen-Macaulay: multiplicities multiply; Fulton,
            # "Intersection Theory", Springer 1984, Prop. 7.1, from memory). Without it the doubled conic
            # (x - y)^2 = z - x^2 = 0 came out as two simple points, "reduced", and its moves failed.
            paths = np.array([int(weight[m].sum()) for m in members], dtype=np.int64)
            keep, local_junk, tested, unsettled = _not_junk(slicing, used, evaluator, sizes, codim + 1, distinct,
                                                            following, options)
            if local_junk:
                counts["junk_by_local_test"] = counts.get("junk_by_local_test", 0) + local_junk
            counts["membership_paths"] += tested.runs  # re-tracks of jumped paths included
            track_counts += tested
            if len(unsettled):  # endpoints Newton does not settle in centred coordinates (decision 0097)
                track_counts += _not_settled(status[np.concatenate([members[k] for k in unsettled])])
                counts["not_settled_centred"] = counts.get("not_settled_centred", 0) + len(unsettled)
            counts["on_larger_component"] += int(np.sum(~keep)) - len(unsettled)
            have_points, have_mult = following.get(codim + 1, (np.zeros((0, n), complex),
                                                               np.zeros(0, np.int64)))
            following[codim + 1] = (np.vstack([have_points, distinct[keep]]),
                                    np.concatenate([have_mult, paths[keep]]))
        current = following
        if progress is not None:
            sizes = ", ".join(f"dim {n - c}: {len(current[c][0])}" for c in sorted(current) if len(current[c][0]))
            progress(f"equation {step + 1} of {system.n_equations} done; witness points so far: {sizes or 'none'}")
    counts["tracked"] = track_counts.tracked
    counts.update(track_counts.by_label())
    sets = []
    for codim in range(0, deepest + 1):
        points, multiplicity = current.get(codim, (np.zeros((0, n), complex), np.zeros(0, np.int64)))
        sets.append(WitnessSet(n - codim, points, multiplicity, slicing.slice_rows(codim).copy()))
    return WitnessSupersets(sets, list(range(n, lowest - 1, -1)), slicing, counts, choice.report(),
                            np.vstack(unexplained) if unexplained else np.zeros((0, n), dtype=complex))


def _not_settled(status):
    """The path counts moved from converged (or singular endpoint) to failed in the endgame, for paths ``status``
    whose endpoint turned out not to be settled on the target (jumped paths already count as failed)."""
    status = np.asarray(status)
    converged = int(np.sum(status == PathStatus.CONVERGED))
    singular = int(np.sum(status == PathStatus.SINGULAR_ENDPOINT))
    return PathCounts(converged=-converged, singular_endpoint=-singular,
                      failed_by_reason={label: converged + singular if label == PathStatus.FAILED_ENDGAME.label
                                        else 0 for label in FAILURE_LABELS})


def _settle_on(system, used, slice_rows, points, residual, options, counts, label, unexplained=None):
    """Which points lie on V(f_used) and the slice: (points, refined where Newton settled them; mask).

    A point within rounding is on. Between rounding and :data:`_DOUBTFUL_RESIDUAL` Newton decides
    (:func:`~numag.numeric.refine.newton_zero_test`, decision 0064): a zero it reaches nearby is on (refined,
    and counted under ``label``, when the residual tolerance would have dropped it); a point where refinement ends at a
    stationary point of the residual is not (counted as ``residual_not_explained`` when the tolerance would have
    kept it: the centre of a loop much smaller than the unit); any other point keeps the tolerance's answer
    (counted as ``zero_undecided`` when kept while the linear model explained the residual Newton left).
    """
    on = residual <= ROUNDING_RESIDUAL
    asked = np.nonzero(~on & (residual <= _DOUBTFUL_RESIDUAL))[0]
    if len(asked) == 0:
        return points, on
    test, near = _refine_on(system, used, slice_rows, points[asked])
    within = residual[asked] <= options.residual_tolerance
    zero = test.mask(ZeroKind.ZERO) & near
    not_a_zero = test.mask(ZeroKind.NOT_A_ZERO)
    points = points.copy()
    points[asked[zero & ~within]] = test.points[zero & ~within]
    # within the tolerance a point stays where it is, as before (refined, two endpoints of one multiple point 5e-6
    # apart no longer clustered: an A4 point came out twice); only "not a zero" overrules the tolerance
    on[asked[zero | (within & ~not_a_zero)]] = True
    if unexplained is not None and np.any(not_a_zero & within):  # where they were (``unexplained``: appended)
        unexplained.append(points[asked[not_a_zero & within]])
    for key, mask in ((label, zero & ~within), ("residual_not_explained", not_a_zero & within),
                      ("zero_undecided", test.mask(ZeroKind.UNDECIDED) & within)):
        if np.any(mask):
            counts[key] = counts.get(key, 0) + int(np.sum(mask))
    return points, on


def _refine_on(system, used, slice_rows, points):
    """Newton's test on f_used = 0 and the slice: (:class:`~numag.numeric.refine.ZeroTest`, mask of the points
    it moved only a little)."""
    n = system.n_variables
    polynomials, minors = split_equations(system, used)
    equations = polynomials + [Polynomial.linear(r[1:], r[0]) for r in slice_rows]
    augmented = PolynomialSystem([f"x{j}" for j in range(n)], equations)
    if minors is None:
        test = newton_zero_test(augmented, BatchEvaluator(augmented.polynomials), points)
    else:
        both = AugmentedEvaluator(equations, minors)
        test = newton_zero_test(augmented, both, points, sizes=both)
    near = test.distances <= 1e-5 * (1 + np.linalg.norm(points, axis=1))
    return test, near


def _regenerate(slicing, before, index, codim, points, options, deflate=True, multiplicity=None):
    """Endpoints on V(held, f) of the codimension-(codim + 1) slice, from codim-c points not on V(f).

    ``before`` are the equations so far (numbers), ``index`` the number of f (a polynomial, or an evaluated
    minor: then the moving row goes from the product of linear forms to the evaluated f). ``multiplicity``
    (default 1) is the number of paths each point stands for.

    Returns the endpoints, the number of linear-move paths lost (failed or at infinity), the
    paths tracked (:class:`~numag.tracking.service.PathCounts`), their statuses and the multiplicity of the
    point each endpoint's path started from.
    """
    n = slicing.n
    multiplicity = np.ones(len(points), np.int64) if multiplicity is None else np.asarray(multiplicity, np.int64)
    evaluated = slicing.evaluated(index)
    deficient = np.zeros(len(points), dtype=bool)
    if deflate and before and not evaluated and not any(slicing.evaluated(k) for k in before):
        deflated, deficient = _deflated_rows(slicing, before, codim, points, options.rank_threshold)
        if deflated is not None:  # points on a component along which the held rows lose rank (decision 0066)
            ends, lost, paths, status, weight = _regenerate_on(slicing, deflated, index, codim, points[deficient],
                                                               options, multiplicity[deficient])
            if np.all(deficient):
                return ends, lost, paths, status, weight
            regular = _regenerate(slicing, before, index, codim, points[~deficient], options, deflate=False,
                                  multiplicity=multiplicity[~deficient])
            return (np.vstack([regular[0], ends]), regular[1] + lost, regular[2] + paths,
                    np.concatenate([regular[3], status]), np.concatenate([regular[4], weight]))
    held, with_f = slicing.held_rows(before, codim, moving=index if evaluated else None) if before or evaluated \
        else ([], None)
    held, block = held_parts(held)
    rest = [linear_form(r) for r in slicing.rows[codim + 1:]]
    # drawn after the combinations, as before groups existed: the same seed gives the total-degree run it gave
    moved_rows = slicing.moved_rows(codim, index)  # one factor per degree (per group's degree with groups)
    degree = len(moved_rows)
    starts, weights, paths = [], [], PathCounts()
    base = held + [linear_form(slicing.rows[codim])] + rest
    for row in moved_rows:  # move l_{c+1} to each factor hyperplane: d linear moves
        ends = _linear_move(slicing.rows[codim + 1:], row, points, slicing.rng) if not held and block is None \
            else None
        if ends is None:
            target = held + [linear_form(row)] + rest
            run = track_moves(base, target, points, slicing.rng, options.tracker, options.batch_size, held=block)
            ends = run.affine_endpoints()
            paths += run.counts
        finite = np.all(np.isfinite(ends), axis=1)
        starts.append(ends[finite])
        weights.append(multiplicity[finite])
    starts = np.vstack(starts) if starts else np.zeros((0, n), complex)
    weights = np.concatenate(weights) if weights else np.zeros(0, np.int64)
    lost = len(points) * degree - len(starts)
    # every solution of the product system off V(held, f) moves: cycles at infinity are whole
    # the product of deg f linear forms is evaluated as a product: written out it has up to C(n + deg f, n) terms
    # (3,003 for five forms in eleven coordinates cost 20 times the target's rows)
    product = LinearFormProduct(moved_rows)
    tracker = options.tracker if options.moved_endgame_radius is None else replace(
        options.tracker, endgame_radius=min(options.tracker.endgame_radius, options.moved_endgame_radius))
    if evaluated:  # the combinations (same weights) and then f are the held rows, f starting from the product
        run = track_moves(rest, rest, starts, slicing.rng, tracker, options.batch_size,
                          whole_cycles=True, held=with_f, held_start=[None] * (with_f.count - 1) + [product])
    else:
        f = slicing.homogeneous[index]
        if degree > f.degree:  # group degrees adding up to more than f's: raised to the product's degree
            f = f * Polynomial.variable(0, n + 1).numeric().power(degree - f.degree)
        run = track_moves(held + [product] + rest, held + [f] + rest, starts, slicing.rng, tracker,
                          options.batch_size, whole_cycles=True, held=block)
        if tracker is not options.tracker:
            run = _failed_again_at_full_radius(run, held + [product] + rest, held + [f] + rest, starts, slicing,
                                               options, block)
    # a point reached only by a broken cycle is still a point of V(held, f): kept (its paths counted as jumped)
    return run.affine_endpoints(jumped_limits=True), lost, paths + run.counts, run.status, weights


def _failed_again_at_full_radius(run, start, target, starts, slicing, options, block):
    """The paths of ``run`` that failed with the lowered endgame radius, tracked again with the tracker's own.

    The candidates' regeneration lowers the endgame radius for speed (decision 0085); near a cluster of
    endpoints the smaller circle can leave a path at the minimum step that the tracker's own radius settles
    (``rank1_3x3_matrices`` failed 0-8 paths by seed with it, 0 with the full radius; decision 0129). Only the
    failed paths are tracked again, each as a path of its own (not a whole cycle); a jumped path is a matter of
    cycles and stays as it was. The run's arrays are spliced; the paths count as re-tracked.
    """
    again = np.nonzero((run.status >= PathStatus.FAILED_MIN_STEP) & (run.status != PathStatus.FAILED_JUMP))[0]
    if len(again) == 0:
        return run
    second = track_moves(start, target, starts[again], slicing.rng, options.tracker, options.batch_size,
                         held=block)
    spliced = {name: getattr(run, name).copy() for name in ("endpoints", "status", "steps", "winding", "condition",
                                                             "retracked", "digits")}
    for name, array in spliced.items():
        array[again] = True if name == "retracked" else getattr(second, name)
    return replace(run, evaluations=run.evaluations + second.evaluations, **spliced)


def _linear_move(rest, row, points, rng):
    """Where a move with no held equation takes ``points``: the one solution of the hyperplanes ``row`` and
    ``rest``, solved (decision 0123); None when that system is not clearly regular (then the move is tracked).

    With nothing held (the first equation of the cascade) every row of the move is linear, so every start and
    every target has exactly one solution and the path from a start point ends at the target's: T9(x) = T11(y)
    tracked 91 such one-path moves (0.5 of 2.2 CPU s), 11 for X and 10 for each fibre of its candidates. The
    patch and gamma a tracked move draws are drawn all the same, so that a seed gives the run it gave.

    Examples
    --------
    >>> ends = _linear_move(np.array([[1.0, 0.0, 1.0]]), np.array([-2.0, 1.0, 0.0]), np.zeros((1, 2)),
    ...                     np.random.default_rng(0))
    >>> ends.real.round(12).tolist()
    [[2.0, -1.0]]
    """
    rows = np.vstack([np.asarray(row, dtype=complex)[None, :], np.asarray(rest, dtype=complex)])
    matrix = rows[:, 1:]
    # a well-posed move: the solution moves by at most ~cond x rounding (random complex rows: cond ~ n)
    if len(points) == 0 or matrix.shape[0] != matrix.shape[1] or not np.linalg.cond(matrix) <= 1e8:
        return None
    solution = np.linalg.solve(matrix, -rows[:, 0])
    if not np.all(np.isfinite(solution)):
        return None
    size = rows.shape[1]
    rng.standard_normal(size), rng.standard_normal(size), random_unit_complex(rng)  # a tracked move's draws
    return np.tile(solution, (len(points), 1))


#: Deflation minors of the regeneration are written out only while they can have at most this many monomials
#: (C(n + 1 + D, n + 1) for degree D in the homogeneous unknowns); beyond, the paths are tracked as before.
_DEFLATION_MONOMIALS = 5000
#: Scaled singular values above this count for the rank of deflated equations (see :func:`_deflated_rows`).
_DEFLATED_RANK_THRESHOLD = 1e-10


def _deflated_rows(slicing, before, codim, points, threshold, max_rounds=3):
    """Held rows that keep full rank on a component of V(f_before) along which its Jacobian loses rank.

    A point to regenerate can lie on a component Z of V(f_before) of codimension ``codim`` along which
    rank J_before < codim (Z counted more than once, or an embedded structure): moved on the held
    combinations, its path is singular all the way and stops at the minimum step (the swallowtail's
    partials hold the line a = b = 0 that way). Random size-(r + 1) minors of J_before (r its rank on Z)
    are added, round by round as in deflation (Leykin, Verschelde and Zhao 2006), until the rank is
    ``codim`` at every such point; Z is a component of the deflated equations, where it is reduced.

    Returns
    -------
    rows : list of Polynomial or None
        ``codim`` random combinations of the deflated homogeneous equations; None when no point needs them
        or deflation did not reach the rank within the rounds and the expansion bound.
    deficient : ndarray of bool
        The points that need them.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> double_line = parse_system(["y^2", "z"], ["x", "y", "z"])   # the x-axis, counted twice
    >>> slicing = Slicing(double_line, np.random.default_rng(0))
    >>> rows, deficient = _deflated_rows(slicing, [0, 1], 2, np.array([[0.5, 0, 0], [0.1, 0.2, 0.3]]), 1e-8)
    >>> len(rows), deficient.tolist()
    (2, [True, False])
    """
    equations = [slicing.homogeneous[k] for k in before]
    homogeneous = np.hstack([np.ones((len(points), 1), dtype=complex), np.asarray(points, dtype=complex)])
    ranks = jacobian_rank(BatchEvaluator(equations), TermSizes(equations), homogeneous, threshold)
    deficient = ranks < codim
    if not np.any(deficient):
        return None, deficient
    at = homogeneous[deficient]
    size = slicing.n + 1
    for _ in range(max_rounds):
        # The gradients a deflation minor adds are first order in the point's error on a multiple component (known
        # to about the cube root of the precision on a triple line): the swallowtail's second round gave 2e-7 of the
        # terms' size beside 6e-15 for the zero ones; a line between the two (decision 0066)
        low = int(jacobian_rank(BatchEvaluator(equations), TermSizes(equations), at, _DEFLATED_RANK_THRESHOLD).min())
        if low >= codim:
            return combine_equations(equations, codim, slicing.rng), deficient
        top = max(p.degree - 1 for p in equations)
        if math.comb(size + (low + 1) * top, size) > _DEFLATION_MONOMIALS:
            break
        # J in all n + 1 homogeneous columns: on V(f) Euler's relation makes the X_0 column a combination of the
        # others, so the rank is the affine one, and the minors are homogeneous
        weights = random_minor_weights(len(equations), size, low + 1, 0, slicing.rng, count=codim - low)
        try:
            minors = expanded_minors(equations, weights, normalize=True)
        except LimitError:
            break
        if not minors:
            break
        equations = equations + minors
    return None, deficient


def _regenerate_on(slicing, held, index, codim, points, options, multiplicity):
    """:func:`_regenerate` of polynomial f on given (deflated) held rows; the points are a subset of the moving ones."""
    degree = slicing.system.degrees[index]
    rest = [linear_form(r) for r in slicing.rows[codim + 1:]]
    base = held + [linear_form(slicing.rows[codim])] + rest
    starts, weights, paths = [], [], PathCounts()
    for row in slicing.factor_rows(codim, degree):
        run = track_moves(base, held + [linear_form(row)] + rest, points, slicing.rng, options.tracker,
                          options.batch_size)
        paths += run.counts
        ends = run.affine_endpoints()
        finite = np.all(np.isfinite(ends), axis=1)
        starts.append(ends[finite])
        weights.append(multiplicity[finite])
    starts = np.vstack(starts) if starts else np.zeros((0, slicing.n), complex)
    weights = np.concatenate(weights) if weights else np.zeros(0, np.int64)
    lost = len(points) * degree - len(starts)
    product = LinearFormProduct(slicing.factor_rows(codim, degree))
    # a subset of the start solutions (those on the deflated component): its cycles at infinity may be partial
    run = track_moves(held + [product] + rest, held + [slicing.homogeneous[index]] + rest, starts, slicing.rng,
                      options.tracker, options.batch_size)
    return run.affine_endpoints(), lost, paths + run.counts, run.status, weights


class _Centred(TextEnum):
    """What the centred look at a junk candidate says (:func:`_judged_centred`, decision 0097)."""

    FULL_RANK = "full rank"
    RANK_DEFICIENT = "rank deficient"
    NOT_SETTLED = "not settled"
    NOT_JUDGED = "not judged"


def _judged_centred(system, used, slice_rows, points, codim, threshold):
    """Junk candidates of codimension ``codim`` judged again in coordinates centred exactly at each (decision 0097).

    The exact bound (common practice): the tangent space of X_used at p has dimension n - rank J(p), at least the
    dimension of every component through p, so rank J(p) = codim puts p on no component of smaller codimension.
    Judged in the system's own coordinates, J's rows and F are measured against term sizes that grow with |p|: at
    a point 2000 units out whose features are of size 1 those terms cancel down to J and F, and two simple roots
    0.2 apart (an isolated point and a hyperplane beside it, after a linear change) ended as one "double" endpoint
    at their midpoint, rank 3 of 4 and residual within rounding there. In coordinates y = x - s centred exactly
    at the point and balanced anew (decision 0084's centring) the terms are of the features' own size: Newton on
    f_used and the slice settles a true endpoint where it is, and the rank is the one seen at the origin.

    Parameters
    ----------
    system : PolynomialSystem or MinorsSystem
        The cascade's system (its computed units).
    used : list of int
        The equations so far.
    slice_rows : ndarray, shape (n - codim, n + 1)
    points : ndarray, shape (K, n)
    codim : int
    threshold : float
        The rank threshold (:attr:`WitnessOptions.rank_threshold`).

    Returns
    -------
    list of _Centred
        Per point: full rank (no larger component passes through it), rank deficient, not settled (Newton does
        not leave a zero next to it: the endpoint is not a point of X_used and its paths did not settle), not
        judged (evaluated minors among the equations, a translation too large to write out, a point not finite,
        Newton undecided or reaching a zero only farther away).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> far = parse_system(["(x - 3000)*(y - 2000)", "(y - 2000)*(y - 2001)"], ["x", "y"])
    >>> at = np.array([[3000.0, 2001.0], [5.0, 2000.0], [3000.0, 2000.5]])
    >>> [str(v) for v in _judged_centred(far, [0, 1], np.zeros((0, 3)), at, 2, 1e-6)]
    ['full rank', 'rank deficient', 'not settled']
    """
    verdicts = [_Centred.NOT_JUDGED] * len(points)
    polynomials, minors = split_equations(system, used)
    equations = polynomials + [Polynomial.linear(r[1:], r[0]) for r in slice_rows]
    augmented = PolynomialSystem(list(system.variables), equations)
    if minors is not None or system.projective or translated_terms(augmented) > CENTRING_TERMS:
        return verdicts
    centred_at = CentredTerms.about(augmented)  # its coefficients read once for every point
    for k, point in enumerate(points):
        if not np.all(np.isfinite(point)):
            continue
        centring = centre_near(point, radius=0.0)
        # the judgement is made in double: the centred system's coefficients rounded once from their exact values,
        # the same numbers the exact system scaled by the balancing rounds to (decision 0138)
        terms = centred_at(centring)
        scaling = Scaling.balancing(terms.rounded(), CENTRED_BALANCING_FLOOR)
        scaled = terms.rounded(scaling.variable_exponents, scaling.equation_exponents)
        at = scaling.to_computed(point - centring.point)[None, :]
        test = newton_zero_test(scaled, BatchEvaluator([p.numeric() for p in scaled.polynomials]), at)
        if test.mask(ZeroKind.ZERO)[0] and test.distances[0] <= 1e-5 * (1 + np.linalg.norm(at)):
            own = scaled.polynomials[:len(polynomials)]  # f_used alone: the slice adds no rank to X_used
            rank = jacobian_rank(BatchEvaluator([p.numeric() for p in own]), TermSizes(own), test.points, threshold)
            verdicts[k] = _Centred.FULL_RANK if rank[0] >= codim else _Centred.RANK_DEFICIENT
        elif test.mask(ZeroKind.NOT_A_ZERO)[0] or not test.after[0] <= _DOUBTFUL_RESIDUAL:
            # not a zero, or a residual no endpoint on X has (the bound the cascade uses in its own units for
            # endpoints off the target): two simple roots' midpoint left 4e-2 where Newton stalled on its
            # singular J. A zero Newton reached only farther away (a point of a hyperplane without its slice:
            # the step runs along the hyperplane) is left to the tests below, not judged here.
            verdicts[k] = _Centred.NOT_SETTLED
    return verdicts


def _not_junk(slicing, used, evaluator, sizes, codim, points, found, options):
    """Which points of a codimension-``codim`` candidate set do not lie on a larger component.

    Returns the mask, the number of points the local test found junk, the paths the membership
    tests tracked (:class:`~numag.tracking.service.PathCounts`), and the indices of the points that, judged
    centred, are no endpoints of settled paths (left out of the mask; their paths count as failed).
    """
    keep = np.ones(len(points), dtype=bool)
    paths, local_junk = PathCounts(), 0
    larger = [(c, found[c][0]) for c in sorted(found) if c < codim and len(found[c][0])]
    unsettled = np.zeros(0, dtype=np.int64)
    if not larger or len(points) == 0:
        return keep, local_junk, paths, unsettled
    # Full rank codim: the tangent space is too small for a larger component through the point.
    ranks = jacobian_rank(evaluator, sizes, points, options.rank_threshold)
    suspects = np.nonzero(ranks < codim)[0]
    if len(suspects) == 0:
        return keep, local_junk, paths, unsettled
    # Far from the origin the rank above is judged against term sizes that grow with |x| (decision 0097).
    verdicts = _judged_centred(slicing.system, used, slicing.slice_rows(codim), points[suspects], codim,
                               options.rank_threshold)
    unsettled = suspects[[v is _Centred.NOT_SETTLED for v in verdicts]].astype(np.int64)
    keep[unsettled] = False
    suspects = suspects[[v in (_Centred.RANK_DEFICIENT, _Centred.NOT_JUDGED) for v in verdicts]].astype(np.int64)
    if len(suspects) == 0:
        return keep, local_junk, paths, unsettled
    # A witness point of codimension codim is an isolated point of X_i on its slice; a point of a
    # larger component is not. The local test finds the curve through a junk point cheaply
    # (positive evidence); only the points it calls isolated need the homotopy membership test.
    n = slicing.n
    _, minors = split_equations(slicing.system, used)
    sliced = PolynomialSystem([f"x{j}" for j in range(n)],
                              [slicing.homogeneous[k].dehomogenize(0) for k in used if not slicing.evaluated(k)]
                              + [Polynomial.linear(r[1:], r[0]) for r in slicing.slice_rows(codim)])
    local = IsolationTest(sliced, slicing.rng, minors=minors)
    for k in suspects:
        if not local.isolated(points[k]):
            keep[k] = False
            local_junk += 1
            continue
        for c, witness_points in larger:
            held, _ = slicing.held_rows(used, c)
            hits, tracked = membership(held, slicing.slice_rows(c), witness_points, points[k], slicing.rng, options)
            paths += tracked
            if np.any(hits):
                keep[k] = False
                break
    return keep, local_junk, paths, unsettled
