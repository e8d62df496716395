"""Numerical irreducible decomposition of X = V(F) (``numag decompose``) and components through a point.

Per dimension, the witness points from :func:`numag.witness.cascade.witness_supersets`
are split into irreducible components:

* **monodromy**: the slice is moved around a random loop (to a random slice and
  back, each leg with its own gamma); witness points that swap lie on the same
  component; the swaps are edges of a graph whose connected components
  are the candidate groups;
* **trace test** (Sommese, Verschelde, Wampler, "Symmetric functions applied to
  decomposing solution sets of polynomial systems", SIAM J. Numer. Anal. 2002):
  the slice is translated, x -> tr(x) = u . x summed over a complete component is
  linear in the translation, so the defect tr(+1) + tr(-1) - 2 tr(0) of a group
  vanishes exactly when the group is a union of components. Defects are
  computed once per point and add up over groups, so the loops stop as soon as
  every group is confirmed, and groups that monodromy has not yet joined can be
  joined by the test alone.
* **non-reduced components** (rank J below the codimension at their witness
  points) are deflated first: random minors of J of the size rank + 1 are added
  to the equations (isosingular deflation, Hauenstein and Wampler, "Isosingular
  sets and deflation", Found. Comput. Math. 2013) until the Jacobian has full
  rank there, so that the witness points can be moved.
* **fibres**: equations that involve only a few unknowns and fix them to finitely
  many simple roots (an auxiliary algebraic number) are solved first, and X is
  decomposed over each root in the other unknowns (:mod:`numag.witness.fibres`;
  decision 0061).

Examples
--------
>>> from numag.system.parse import parse_system
>>> system = parse_system(["x*z", "y*z"], ["x", "y", "z"])
>>> result = decompose(system, seed=1)
>>> [(c.dimension, c.degree) for c in result.components]
[(2, 1), (1, 1)]
"""

from dataclasses import dataclass, field, replace
import itertools
import math
import time

import numpy as np

from ..errors import InputError, LimitError, is_integer, is_number, require_option
from ..system.display import counted, html_table, short_point
from ..system.centred import CENTRED_BALANCING_FLOOR, CENTRING_TERMS, CentredTerms, centre_near, translated_terms
from ..system.polynomial import Polynomial, PolynomialSystem, linear_space, require_numeric
from ..system.univariate import multiplicity_profile
from ..numeric.cluster import cluster_labels, connected_components, groups as label_groups
from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..numeric.minors import (CombinedRows, EvaluatedMinors, AugmentedEvaluator, MinorsSystem, MinorWeights,
                              equation_evaluator, expanded_minors, random_minor_weights)
from ..numeric.scaling import Scaling
from ..numeric.seeds import random_state, resolved_seed
from ..tracking.service import PathCounts, add_path_counts
from ..tracking.tracker import FAILURE_LABELS, PathStatus, rescue_budget
from .cascade import (WitnessOptions, combine_equations, held_parts, jacobian_rank, linear_form, membership, random_rows,
                      track_moves, witness_supersets)
from .fibres import EMPTY_FIBRE, WHOLE_FIBRE, FiniteBlock, fibre_system, finite_block, solve_block
from .precise_trace import PRECISE_TRACE_DEGREE, precise_digits, precise_verdicts

__all__ = ["Component", "Decomposition", "DecomposeOptions", "decompose", "components_through", "exact_profile",
           "profile_of", "centred_decomposition"]


@dataclass(frozen=True)
class DecomposeOptions:
    """Options of :func:`decompose` (defaults declared once).

    Attributes
    ----------
    witness : WitnessOptions
    max_loops : int
        Monodromy loops per dimension before the unconfirmed groups are reported as such.
    stall_loops : int
        Loops without a new swap after which groups are joined by the trace test alone.
    trace_tolerance : float
        Relative size of a trace defect that counts as zero.
    """

    witness: WitnessOptions = WitnessOptions()
    max_loops: int = 60
    stall_loops: int = 6
    trace_tolerance: float = 1e-10

    def __post_init__(self):
        """Refuse a bad value on construction, naming the option."""
        require_option(is_integer(self.max_loops) and self.max_loops >= 1, "max_loops (--max-loops)", "positive",
                       self.max_loops)
        require_option(is_integer(self.stall_loops) and self.stall_loops >= 1, "stall_loops", "positive",
                       self.stall_loops)
        require_option(is_number(self.trace_tolerance) and 0 < self.trace_tolerance < 1, "trace_tolerance",
                       "in (0, 1)", self.trace_tolerance)

    def with_start(self, start, groups=None, source=None):
        """These options with the regeneration's start (and groups, kept when None) replaced.

        Examples
        --------
        >>> DecomposeOptions().with_start("auto", [["x"], ["l"]]).witness.groups
        (('x',), ('l',))
        """
        witness = self.witness
        changes = {"start": start}
        if groups is not None:
            changes.update(groups=groups, group_source=source or witness.group_source)
        return replace(self, witness=replace(witness, **changes))


@dataclass(kw_only=True)
class Component:
    """One irreducible component of X.

    Attributes
    ----------
    id : int
        1, 2, ... from the top dimension down.
    dimension, degree : int
    points : ndarray, shape (degree, n)
        Witness points on :attr:`slice_rows` (for dimension 0: the point itself).
    real : ndarray of bool, shape (degree,)
        Witness points with negligible imaginary parts (real coefficients only). For a
        positive-dimensional component, False everywhere means no real witness point was
        found on this slice, not that the component has no real points.
    multiplicity : int
        Paths that ended at each witness point (1 for a generically reduced component).
    reduced : bool
        True when rank J = n - dimension at the witness points.
    slice_rows : ndarray, shape (dimension, n + 1)
        Hyperplanes a . (1, x) = 0 of the witness points.
    confirmed : bool
        The trace test confirmed the group complete (always true for degree 1).
    trace_defect : float
        Relative trace defect of the group (0 for degree 1).
    """

    id: int
    dimension: int
    degree: int
    points: np.ndarray
    real: np.ndarray
    multiplicity: int
    reduced: bool
    slice_rows: np.ndarray
    confirmed: bool = True
    trace_defect: float = 0.0

    def __repr__(self):
        kind = "reduced" if self.reduced else "non-reduced" + (f" (multiplicity {self.multiplicity})"
                                                               if self.multiplicity > 1 else "")
        sure = "confirmed" if self.confirmed else "not confirmed"
        return (f"Component({self.id}: dimension {self.dimension}, degree {self.degree}, {kind}, {sure}, "
                f"{int(np.sum(self.real))} real witness points)")


@dataclass
class Decomposition:
    """Result of :func:`decompose`.

    Attributes
    ----------
    system : PolynomialSystem
    components : list of Component
    dimensions_searched : list of int
    paths : dict
        Tracked paths by status, and what became of their endpoints.
    loops : dict
        Monodromy loops run per dimension.
    seed : int
    seconds : float
    scaling : Scaling or None
        The units the computation used; points and slices are in the user's units.
    fibred_over : FiniteBlock or None
        Set when X was decomposed root by root of a block of equations in a few unknowns (module
        :mod:`~numag.witness.fibres`): each component lies in one fibre, its slices have zero
        coefficients on the block's unknowns.
    options : DecomposeOptions or None
        The options of the run (recorded when the result is saved; None for a result built by hand).
    """

    system: object
    components: list
    dimensions_searched: list
    paths: dict
    loops: dict
    seed: int
    seconds: float
    extra: dict = field(default_factory=dict)
    scaling: object = None
    fibred_over: FiniteBlock | None = None
    options: DecomposeOptions | None = None

    def __repr__(self):
        parts = ", ".join(f"dimension {c.dimension} degree {c.degree}" for c in self.components) or "empty"
        return (f"Decomposition({self.system.name or 'system'}: {counted(len(self.components), 'component')}: {parts}; "
                f"seed {self.seed})")

    def _repr_html_(self):
        rows = [[c.id, c.dimension, c.degree, "yes" if c.reduced else f"no ({c.multiplicity} paths)",
                 "yes" if c.confirmed else "no", int(np.sum(c.real)), short_point(c.points[0])]
                for c in self.components]
        return html_table(repr(self), ["id", "dimension", "degree", "reduced", "confirmed", "real witness points",
                                       "a witness point"], rows)

    def in_units(self, scaling, system, to_user):
        """The same decomposition with points and slices moved to other units (a new object).

        Parameters
        ----------
        scaling : Scaling
        system : PolynomialSystem
            The system in the target units.
        to_user : bool
            True: from the computed units of ``scaling`` to the user's; False: back.
        """
        moved = []
        for c in self.components:
            points = scaling.to_user(c.points) if to_user else scaling.to_computed(c.points)
            rows = (scaling.hyperplanes_to_user(c.slice_rows) if to_user
                    else scaling.hyperplanes_to_computed(c.slice_rows)) if len(c.slice_rows) else c.slice_rows
            moved.append(replace(c, points=points, slice_rows=rows))
        extra = dict(self.extra)
        if extra.get("unexplained") is not None and len(extra["unexplained"]):  # points too (decision 0090)
            lost = extra["unexplained"]
            extra["unexplained"] = scaling.to_user(lost) if to_user else scaling.to_computed(lost)
        return replace(self, system=system, components=moved, scaling=scaling if to_user else None, extra=extra)

    @property
    def unconfirmed(self):
        """Components the trace test did not confirm."""
        return [c for c in self.components if not c.confirmed]

    def dimension(self):
        """Dimension of X (-1 when X is empty on the dimensions searched)."""
        return max((c.dimension for c in self.components), default=-1)


def random_minor(polynomials, size, rng, n):
    """det(A J B) for random A (size x m), B (n x size): a random combination of the size-minors of J."""
    weights = random_minor_weights(len(polynomials), n, size, 0, rng, count=1)
    minors = expanded_minors(polynomials, weights)
    return minors[0] if minors else Polynomial.zero(n)


#: A deflation minor whose expansion could have more monomials than this is evaluated, never expanded. Below it
#: the expanded polynomial is as fast to evaluate (decisions 0039 and 0050: 238 terms, expanded 2 times as fast;
#: 877 terms, evaluated 12 times as fast); the bound C(n + D, n) over-states the terms 2 to 5 times.
EXPANSION_MONOMIALS = 1000


def expansion_bound(polynomials, size, n):
    """Monomials a random size x size minor of the Jacobian of ``polynomials`` can have: C(n + D, n), D its degree.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> expansion_bound(parse_system(["x^3 + y^3", "x*y"], ["x", "y"]).polynomials, 2, 2)  # degree 2 + 2
    15
    """
    top = max((p.degree - 1 for p in polynomials), default=0)
    return math.comb(n + size * max(top, 0), n)


@dataclass
class HeldEquations:
    """Affine equations holding X's components through some points, of full rank there (see :func:`holding_rows`).

    Attributes
    ----------
    polynomials : list of Polynomial
        Affine numeric polynomials: F, and deflation minors that were small enough to expand.
    minors : MinorWeights or None
        Deflation minors of ``polynomials`` evaluated from the Jacobian (never expanded), when large.
    deflated : bool
    """

    polynomials: list
    minors: MinorWeights | None = None
    deflated: bool = False

    def evaluator(self):
        """Values and Jacobian of every equation, with their term sizes: (evaluator, sizes)."""
        if self.minors is None:
            return BatchEvaluator(self.polynomials), TermSizes(self.polynomials)
        both = AugmentedEvaluator(self.polynomials, EvaluatedMinors.from_weights(self.polynomials, self.minors))
        return both, both

    def combined(self, count, rng):
        """``count`` random combinations of the homogenised equations: polynomials, or :class:`CombinedRows`.

        Without evaluated minors this is :func:`combine_equations` (the same draws of ``rng``).
        """
        homogeneous = [p.homogenize(0) for p in self.polynomials]
        if self.minors is None:
            return combine_equations(homogeneous, count, rng)
        minors = EvaluatedMinors.from_weights(self.polynomials, self.minors, homogenized=True)
        minors = minors.scaled_to_unit(np.ones((1, minors.n_variables)))
        return CombinedRows(homogeneous, minors, random_rows(rng, count, len(homogeneous) + minors.count))


def holding_equations(system, codimension, points, rng, threshold=1e-6, max_rounds=4, simple=False):
    """Affine equations with X's components through ``points`` among their solutions, of full rank there.

    The system itself when rank J = codimension at every point (or the points are ``simple``: each
    the end of one path, a simple root of a square subsystem, so the rank is full whatever the size of
    its singular values); otherwise random minors of J (size rank + 1) are added until it is
    (isosingular deflation). Every minor is expanded (exact work and callers that need polynomials);
    :func:`holding_rows` evaluates the large ones instead.

    Returns
    -------
    list of Polynomial
        Affine numeric polynomials.
    bool
        True when deflation was needed.
    """
    held = holding_rows(system, codimension, points, rng, threshold, max_rounds, simple, evaluate_large=False)
    return held.polynomials, held.deflated


def holding_rows(system, codimension, points, rng, threshold=1e-6, max_rounds=4, simple=False, evaluate_large=True):
    """:func:`holding_equations` with the deflation minors that would expand large evaluated instead.

    A minor whose expansion could exceed :data:`EXPANSION_MONOMIALS` monomials is appended as an evaluated
    minor (:class:`~numag.numeric.minors.EvaluatedMinors`); evaluated minors are minors of polynomials, so
    deflation stops after the round that adds them (as it stopped where an expansion was refused).

    Returns
    -------
    HeldEquations

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> double_plane = parse_system(["z^2"], ["x", "y", "z"])   # the plane z = 0, counted twice
    >>> held = holding_rows(double_plane, 1, np.array([[0.3, 0.2, 0.0]]), np.random.default_rng(0))
    >>> held.deflated, [p.degree for p in held.polynomials]
    (True, [2, 1])
    """
    n = system.n_variables
    equations = [p.numeric() for p in system.polynomials]
    deflated = False
    points = np.atleast_2d(points)
    if isinstance(system, MinorsSystem):
        # F and evaluated minors: deflating would need minors of minors (third derivatives of F), so the
        # equations stay as they are; paths on a rank-deficient component may fail and are counted.
        return HeldEquations(equations, system.minors, False)
    for _ in range(0 if simple else max_rounds):
        evaluator = BatchEvaluator(equations)
        ranks = jacobian_rank(evaluator, TermSizes(equations), points, threshold) if len(points) \
            else np.array([codimension])
        low = int(ranks.min())
        if low >= codimension:
            break
        deflated = True
        if evaluate_large and expansion_bound(equations, low + 1, n) > EXPANSION_MONOMIALS:
            # one random pair (A, B) per missing rank, minors of the equations of this round
            weights = [random_minor_weights(len(equations), n, low + 1, 0, rng, count=1)
                       for _ in range(codimension - low)]
            minors = MinorWeights(np.concatenate([w.left for w in weights]),
                                  np.concatenate([w.right for w in weights]), False)
            return HeldEquations(equations, minors, True)
        try:
            for _ in range(codimension - low):
                minor = random_minor(equations, low + 1, rng, n)
                if not minor.is_zero():
                    equations.append(minor * (1.0 / minor.coefficient_norm()))
        except LimitError:
            # The expanded minor is too large to build: stop deflating. Paths on the undeflated
            # equations may fail; they are counted, and their groups reported as unconfirmed.
            break
    return HeldEquations(equations, None, deflated)


#: Path statuses of a failure (a detour may undo them).
_FAILED_STATUSES = [int(code) for code in PathStatus if code.failed]


class _Mover:
    """Moves the witness points of one dimension between slices, on the held equations."""

    def __init__(self, system, codimension, points, slice_rows, rng, options, simple=False):
        self.n = system.n_variables
        self.codimension = codimension
        self.rng = rng
        self.options = options
        self.paths = PathCounts()  # every path this mover tracked
        equations = holding_rows(system, codimension, points, rng, options.witness.rank_threshold, simple=simple)
        self.deflated = equations.deflated
        self.held = equations.combined(codimension, rng)
        self.slice_rows = slice_rows

    def move(self, points, from_rows, to_rows, detour=False):
        """The points moved from the slice ``from_rows`` to ``to_rows`` (NaN rows where a path failed).

        With ``detour``, for callers that need the set of endpoints and not which point went where (a
        monodromy loop: any closed loop gives a valid permutation; a move to a real slice): a failed path is
        tracked again through a random slice between the two, and counted as re-tracked when it arrives.
        """
        # No high-precision rescue here: a loop or trace path that fails only costs another loop or
        # translation, while re-tracking it in mpmath can take minutes (seen on three quadrics).
        # The endpoints are only matched to witness points (within 1e-6): a settled ill-conditioned endpoint (the
        # points of a double component, e.g. a linkage's length 0) needs no Cauchy endgame (decision 0093).
        tracker = replace(self.options.witness.tracker, rescue_digits=0, endgame_if_settled=False)
        run = self._track(points, from_rows, to_rows, tracker)
        failed = np.nonzero(np.isin(run.status, _FAILED_STATUSES))[0]
        if detour and len(failed):
            # The pencil between two slices holds a slice through each singular point of X's closure; a path
            # whose slice passes near one meets clustered sheets and stops at the minimum step (decision
            # 0065). Another pencil, through a random slice, passes near none of them.
            middle = random_rows(self.rng, len(from_rows), self.n + 1)
            halfway = self._track(points[failed], from_rows, middle, tracker).affine_endpoints()
            arrived = np.all(np.isfinite(halfway), axis=1)
            if np.any(arrived):
                last = self._track(halfway[arrived], middle, to_rows, tracker)
                ends = np.isin(last.status, [PathStatus.CONVERGED, PathStatus.SINGULAR_ENDPOINT])
                rows = failed[arrived][ends]
                run.endpoints[rows], run.status[rows] = last.endpoints[ends], last.status[ends]
                run.winding[rows], run.condition[rows] = last.winding[ends], last.condition[ends]
                run.retracked[rows] = True
        self.paths += run.counts
        return run.affine_endpoints()

    def _track(self, points, from_rows, to_rows, tracker):
        held, block = held_parts(self.held)
        start = held + [linear_form(r) for r in from_rows]
        target = held + [linear_form(r) for r in to_rows]
        return track_moves(start, target, points, self.rng, tracker, self.options.witness.batch_size, held=block)


def _refined(mover, points):
    """``points`` refined on the mover's held rows and slice; a point whose path failed or went far stays as it was."""
    ends = mover.move(points, mover.slice_rows, mover.slice_rows)
    scale = 1 + np.linalg.norm(points, axis=1)
    kept = np.all(np.isfinite(ends), axis=1) & (np.linalg.norm(ends - points, axis=1) <= 1e-5 * scale)
    return np.where(kept[:, None], ends, points)


def _match(ends, points, tolerance):
    """Index of the point each endpoint landed on (-1: none within the tolerance).

    Witness sets are small (a few hundred points at most in the usual run): the nearest point is found from all
    the distances, in blocks, without scipy, whose k-d tree cost a fifth of a second of import in every
    decomposition (decision 0085); many points and endpoints together still go to the k-d tree.

    Examples
    --------
    >>> points = np.array([[0.0 + 0j, 1.0], [2.0, 0.0]])
    >>> _match(np.array([[2.0 + 1e-9j, 0.0], [5.0, 5.0], [np.nan, 0.0]]), points, 1e-6).tolist()
    [1, -1, -1]
    """
    result = np.full(len(ends), -1, dtype=np.int64)
    good = np.all(np.isfinite(ends), axis=1)
    if not np.any(good) or len(points) == 0:
        return result
    stacked = np.column_stack([points.real, points.imag])
    query = ends[good]
    query = np.column_stack([query.real, query.imag])
    if len(query) * len(stacked) <= _MATCH_PAIRS:
        index = np.empty(len(query), dtype=np.int64)
        block = max(1, _MATCH_BLOCK // len(stacked))
        for first in range(0, len(query), block):
            here = query[first:first + block]
            index[first:first + block] = np.argmin(
                np.sum((here[:, None, :] - stacked[None, :, :]) ** 2, axis=2), axis=1)
        distance = np.linalg.norm(query - stacked[index], axis=1)
    else:
        from scipy.spatial import cKDTree  # imported where used: `import numag` stays fast

        distance, index = cKDTree(stacked).query(query)
    scale = 1 + np.linalg.norm(points[index], axis=1)
    result[np.nonzero(good)[0]] = np.where(distance <= tolerance * scale, index, -1)
    return result


#: Up to this many (endpoint, witness point) pairs :func:`_match` compares all distances (numpy, no scipy), in
#: blocks of about :data:`_MATCH_BLOCK` pairs.
_MATCH_PAIRS = 4_000_000
_MATCH_BLOCK = 65_536


class _Swaps:
    """Witness points joined by monodromy (a swap seen on a loop) or by the trace test: the edges, and the groups
    they make (connected components, in the order of their smallest points, members increasing).

    numpy's label propagation (:func:`~numag.numeric.cluster.connected_components`) instead of a networkx graph,
    whose import cost 0.07 s of every decomposition (decision 0085).

    Examples
    --------
    >>> swaps = _Swaps(4)
    >>> swaps.add_edge(3, 1)
    >>> swaps.groups(), swaps.count()
    ([[0], [1, 3], [2]], 3)
    """

    def __init__(self, size):
        self.size = size
        self.edges = []

    def add_edge(self, a, b):
        self.edges.append((int(a), int(b)))

    def groups(self):
        """The groups, each a sorted list of point indices."""
        return [m.tolist() for m in label_groups(connected_components(self.size, self.edges))]

    def count(self):
        """The number of groups."""
        return len(self.groups())


#: Shift of the slice for the trace test at the smallest scale, in the computed (balanced) units.
_TRACE_SHIFT = 0.5
#: Largest ratio between consecutive shifts of the trace test (decision 0135). A proper part of a component whose
#: points leave it only at slices a distance R away has a trace analytic for shifts below R: its defect at a shift
#: s < R is about (s / R)^2 of its traces, 1e-4 at one ratio below R, far above the tolerance (1e-10).
_TRACE_SCALE_RATIO = 100.0


def _trace_scales(points):
    """Shifts of the slice for the trace test: :data:`_TRACE_SHIFT` up to the spread of the witness points.

    A witness set whose points lie at several scales (a near-node 1e-5 across next to a branch at distance 1) can
    hold a proper part whose trace is linear to within any tolerance at the smaller scale (the near-node is an
    exact hyperbola there); its points leave it only at slices as far as the other points. The shifts climb from
    :data:`_TRACE_SHIFT` to the largest distance between two witness points in steps of at most
    :data:`_TRACE_SCALE_RATIO` (decision 0135). The distance is translation-invariant: the origin's place does not
    change the shifts.

    Examples
    --------
    >>> _trace_scales(np.array([[0.0], [1e5]])).round(1).tolist()
    [0.5, 29.2, 1710.0, 100000.0]
    >>> _trace_scales(np.array([[0.0], [0.1]])).tolist()
    [0.5]
    """
    points = np.atleast_2d(points)
    spread = 0.0
    if len(points) > 1 and np.all(np.isfinite(points)):
        spread = float(np.max(np.linalg.norm(points[:, None, :] - points[None, :, :], axis=2)))
    top = spread
    if top <= _TRACE_SHIFT:
        return np.array([_TRACE_SHIFT])
    steps = int(math.ceil(math.log(top / _TRACE_SHIFT) / math.log(_TRACE_SCALE_RATIO)))
    return _TRACE_SHIFT * (top / _TRACE_SHIFT) ** (np.arange(steps + 1) / steps)


#: A group passes the trace test at a scale when its relative defect is at most this many times the defect of all
#: the witness points together (decision 0135), and at most the tolerance. All the points are a union of complete
#: components, so their defect is what the paths' accuracy leaves at that scale (its norm over all coordinates: the
#: noise of n coordinates does not cancel at once); a proper part of a component 1e3 times above it is not noise.
_NOISE_MARGIN = 1e3


def _trace_defects(mover, points, rng, tolerance):
    """Per-point trace defects tr(+s) + tr(-s) - 2 tr(0) for a random translation of the slice at each scale s of
    :func:`_trace_scales`, the size each is measured against, and the relative defect each scale accepts.

    Returns
    -------
    defects : ndarray, shape (scales, points), or None
        None when a path failed at some scale on every one of three translations.
    sizes : ndarray, shape (scales,), or None
        1 + the sum of the absolute traces at that scale.
    limits : ndarray, shape (scales,), or None
        The tolerance, or :data:`_NOISE_MARGIN` times the relative defect of all the points (at least the machine
        epsilon) when smaller.
    """
    rows = mover.slice_rows
    defects, sizes, noises = [], [], []
    # The larger scales draw from a stream of their own, so that the smallest scale's translation, and all that
    # follows it, is drawn as before they were added.
    wide = np.random.default_rng(rng.bit_generator.seed_seq.spawn(1)[0])
    own = mover.rng
    for scale in _trace_scales(points):
        if scale > _TRACE_SHIFT:
            rng = mover.rng = wide
        try:
            arrived = _trace_at(mover, points, rows, scale, rng, defects, sizes, noises,
                                count_discarded=scale <= _TRACE_SHIFT)
        finally:
            mover.rng = own
        if not arrived:
            return None, None, None
    sizes = np.array(sizes)
    # the whole set's defect is at least the rounding of the traces' sum (an exact zero at a scale would refuse
    # every proper group)
    limits = np.minimum(tolerance, _NOISE_MARGIN * np.maximum(np.array(noises) / sizes, np.finfo(float).eps))
    return np.array(defects), sizes, limits


def _trace_at(mover, points, rows, scale, rng, defects, sizes, noises, count_discarded=True):
    """Appends the per-point defects at one scale, their size and the norm of their sum over all coordinates (times
    the projection's); False when paths failed on three translations.

    Without ``count_discarded`` the paths of a translation whose defects are thrown away (a path failed) are not
    added to the mover's counts: they lose no point of X (the translation is tried again, and when every try fails
    the groups stay unconfirmed), and the larger scales' failures near far singular slices are not failed paths of
    the run (decision 0135).
    """
    for _ in range(3):  # a failed path spoils the defects: try another translation
        counted = mover.paths
        shift = scale * np.exp(2j * np.pi * rng.random(len(rows)))
        projection = rng.standard_normal(mover.n) + 1j * rng.standard_normal(mover.n)
        plus, minus = rows.copy(), rows.copy()
        plus[:, 0] += shift
        minus[:, 0] -= shift
        up = mover.move(points, rows, plus)
        down = mover.move(points, rows, minus)
        if np.all(np.isfinite(up)) and np.all(np.isfinite(down)):
            traces = np.column_stack([up @ projection, down @ projection, points @ projection])
            defects.append(traces[:, 0] + traces[:, 1] - 2 * traces[:, 2])
            sizes.append(1 + np.sum(np.abs(traces)))
            noises.append(np.linalg.norm(np.sum(up + down - 2 * points, axis=0)) * np.linalg.norm(projection))
            return True
        if not count_discarded:
            mover.paths = counted
    return False


def _group_defect(defects, sizes, group):
    """Relative trace defect of a group: the largest over the scales of |its summed defects| / size."""
    return float(np.max(np.abs(np.sum(defects[:, group], axis=1)) / sizes))


def _group_passes(defects, sizes, limits, group):
    """Whether a group's relative trace defect is within the limit at every scale."""
    return bool(np.all(np.abs(np.sum(defects[:, group], axis=1)) / sizes <= limits))


def _split(mover, points, rng, options, loops_run):
    """Groups of witness point indices, each confirmed or not, and their relative defects."""
    count = len(points)
    graph = _Swaps(count)
    if count == 1:
        return [([0], True, 0.0)]
    defects, sizes, limits = _trace_defects(mover, points, rng, options.trace_tolerance)
    # Loops to random slices at every scale of the trace test: the points of a part that passes at the smaller
    # scales swap with the others only around slices as far away as those (decision 0135).
    scales = _trace_scales(points) / _TRACE_SHIFT

    def status():
        result = []
        for group in graph.groups():
            if defects is None:
                result.append((group, False, float("nan")))
            else:
                result.append((group, _group_passes(defects, sizes, limits, group),
                               _group_defect(defects, sizes, group)))
        return result

    quiet = 0
    loops = 0
    while loops < options.max_loops:
        groups = status()
        if all(done for _, done, _ in groups):
            break
        open_points = sorted(i for group, done, _ in groups if not done for i in group)
        away = random_rows(rng, len(mover.slice_rows), mover.n + 1)
        scale = scales[quiet % len(scales)]
        away[:, 0] *= scale  # after a loop without a new swap, the next scale
        counted = mover.paths
        there = mover.move(points[open_points], mover.slice_rows, away, detour=True)
        good = np.all(np.isfinite(there), axis=1)
        back = np.full(there.shape, np.nan, dtype=complex)
        if np.any(good):
            back[good] = mover.move(there[good], away, mover.slice_rows, detour=True)
        if scale > 1 and not np.all(np.isfinite(back)):
            # A loop at a larger scale whose path failed (near a far singular slice) loses no witness point, only a
            # swap, and groups it leaves apart stay unconfirmed: its paths are not failed paths of the run.
            mover.paths = counted
        landed = _match(back, points, 1e-6)
        loops += 1
        before = graph.count()
        for source, target in zip(open_points, landed):
            if target >= 0:
                graph.add_edge(int(source), int(target))
        quiet = quiet + 1 if graph.count() == before else 0
        if quiet >= options.stall_loops and defects is not None:
            quiet = 0
            _join_by_trace(graph, status(), defects, sizes, limits)
    loops_run.append(loops)
    if defects is None:
        return status()
    result = []
    for group, done, defect in status():
        if done and len(group) > 1:
            result.extend(_complete_parts(group, defects, sizes, limits))
        else:
            result.append((group, done, defect))
    return result


#: Largest confirmed group whose parts are all tried by the trace test (2^(k-1) sums).
_PARTS_LIMIT = 16


def _complete_parts(group, defects, sizes, limits):
    """A confirmed group split where a proper part of it also passes the trace test (at every scale).

    The traces of an irreducible component's points sum to a linear function only over the whole
    component (for a generic projection and translation): a proper part that passes means the
    monodromy joined two components (a path jumped where they meet), and the union of complete
    components passes the test as well. Parts are tried smallest first; both sides are split again.
    Groups larger than ``_PARTS_LIMIT`` are kept as they are.

    Parameters
    ----------
    group : list of int
    defects : ndarray, shape (scales, points)
    sizes, limits : ndarray, shape (scales,)

    Examples
    --------
    >>> _complete_parts([0, 1, 2], np.array([[1.0, -1.0, 0.0]]), np.array([1.0]), np.array([1e-10]))
    [([0, 1], True, 0.0), ([2], True, 0.0)]
    >>> two_scales = np.array([[1.0, -1.0, 0.0], [1.0, 0.0, -1.0]])  # {0, 1} cancels at one scale only
    >>> _complete_parts([0, 1, 2], two_scales, np.array([1.0, 1.0]), np.array([1e-10, 1e-10]))
    [([0, 1, 2], True, 0.0)]
    """
    group = list(group)
    k = len(group)
    values = defects[:, group]
    if 1 < k <= _PARTS_LIMIT:
        masks = np.arange(1, 2 ** (k - 1), dtype=np.int64)  # each part or its complement, once
        members = (masks[:, None] >> np.arange(k)) & 1
        passes = np.all(np.abs(members @ values.T) / sizes[None, :] <= limits[None, :], axis=1)
        sizes_of = members.sum(axis=1)
        passing = np.nonzero(passes)[0]
        if len(passing):
            best = passing[np.argmin(sizes_of[passing])]
            part = [g for g, inside in zip(group, members[best]) if inside]
            rest = [g for g, inside in zip(group, members[best]) if not inside]
            return (_complete_parts(part, defects, sizes, limits)
                    + _complete_parts(rest, defects, sizes, limits))
    return [(group, True, _group_defect(defects, sizes, group))]


def _join_by_trace(graph, groups, defects, sizes, limits):
    """Join open groups whose defects cancel at every scale (a union of groups that is a complete component)."""
    open_groups = [group for group, done, _ in groups if not done]
    for size in range(2, min(4, len(open_groups)) + 1):
        for chosen in itertools.combinations(range(len(open_groups)), size):
            members = [i for k in chosen for i in open_groups[k]]
            if _group_passes(defects, sizes, limits, members):
                for a, b in zip(members, members[1:]):
                    graph.add_edge(a, b)
                return


def _to_real_slice(system, mover, points, rows, rng):
    """Witness points on a random real slice (real points of the component appear where there are any).

    The computation itself uses complex slices (a real slice can be nearly parallel to a real
    component); the points are moved afterwards. Kept only when every path arrives at a distinct
    point; otherwise the complex slice stays.
    """
    n = points.shape[1]
    real_rows = rng.standard_normal((len(rows), n + 1))
    center = rng.standard_normal(n) / np.sqrt(n)
    real_rows[:, 0] = -(real_rows[:, 1:] @ center)
    real_rows = (real_rows / np.linalg.norm(real_rows, axis=1, keepdims=True)).astype(complex)
    counted = mover.paths
    moved = mover.move(points, rows, real_rows, detour=True)
    # a path may jump to another component of the held combination (the line a x + b y = 0 of (y - x^2) x and
    # (y - x^2) y combined): its end is finite and distinct but no point of X, and it was kept as a witness point
    # of the parabola (a sample point off X; every later move from it went astray). All of F must vanish there.
    if not np.all(np.isfinite(moved)) or len(points) != len(set(cluster_labels(moved, 1e-6))) \
            or not np.all(_on_x(system, moved)):
        # the points stay where they were: a failed path of this move loses nothing (decision 0135)
        mover.paths = counted
        return points, rows
    return moved, real_rows


def decompose(system, options=None, seed=None, progress=None):
    """Irreducible components of X = V(F) with dimension, degree and witness points.

    Parameters
    ----------
    system : PolynomialSystem
        Affine system (any number of equations).
    options : DecomposeOptions, optional
    seed : int, optional
        Drawn and recorded when not given.
    progress : Progress, optional
        Told a message as each stage starts (:mod:`numag.run.progress`).

    Returns
    -------
    Decomposition
    """
    options = options or DecomposeOptions()
    require_numeric(system)
    seed = resolved_seed(seed)
    scaling = Scaling.balancing(_polynomial_part(system))
    with rescue_budget():  # the cascade, the loops and the membership tests share one rescue budget
        result = _decompose(_scaled(scaling, system), options, seed, progress, _precise_digits_of(system))
    result.options = options
    result = result.in_units(scaling, system, to_user=True)
    profile = exact_profile(system, seed)
    if profile is not None:  # decided exactly: the singular locus reads a component's multiplicity by it (0140)
        result.extra["exact_profile"] = profile
    result.paths.update(_exact_profile_check(system, result.components, profile))
    return result


#: Above this degree or number of terms the exact restriction to lines is not computed: the Fractions of Euclid grow
#: (measured per line: degree 16 in 3 unknowns, 962 terms, 0.9 CPU s; degree 24, 2.4 s; degree 40, 30 s).
_EXACT_PROFILE_DEGREE, _EXACT_PROFILE_TERMS = 16, 600


def profile_of(components, top):
    """{multiplicity: sum of degrees} of the components of dimension ``top`` (what :func:`exact_profile` decides).

    Examples
    --------
    >>> from types import SimpleNamespace as C
    >>> profile_of([C(dimension=1, degree=1, multiplicity=2), C(dimension=1, degree=3, multiplicity=1)], 1)
    {2: 1, 1: 3}
    """
    found = {}
    for c in components:
        if c.dimension == top:
            found[int(c.multiplicity)] = found.get(int(c.multiplicity), 0) + int(c.degree)
    return found


def exact_profile(system, seed):
    """One equation with rational coefficients: its exact multiplicity profile, or None where it is not decided.

    On a rational line in general position f restricts to g(t), and the square-free factorisation of g gives,
    for each multiplicity m, the number of distinct points of multiplicity m (:mod:`numag.system.univariate`):
    the degrees of X's components of multiplicity m add up to exactly that. Two random integer lines that agree
    give the profile (a line tangent to X or through a singular point shows more multiplicity; two such lines
    agreeing by chance is not expected, and a third is drawn where they differ). None for several equations,
    projective input, inexact or non-rational coefficients, degrees or sizes beyond the exact limits, or six
    lines without two that agree. Exact, so scale-, coordinate- and seed-free (decision 0128).

    Returns
    -------
    dict or None
        {multiplicity: sum of the degrees of X's components of that multiplicity}.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> exact_profile(parse_system(["(x - y)^2*(x + y)"], ["x", "y"]), seed=1)
    {1: 1, 2: 1}
    """
    if len(system.polynomials) != 1 or getattr(system, "projective", False):
        return None
    f = system.polynomials[0]
    if (not f.is_exact or f.degree < 1 or f.degree > _EXACT_PROFILE_DEGREE or f.n_terms > _EXACT_PROFILE_TERMS
            or not all(c.is_rational() for c in f.coefficients)):
        return None
    rng = np.random.default_rng([int(seed) % 2**32, 128])
    profiles = []
    for _ in range(6):
        profile = multiplicity_profile(f, rng.integers(-97, 98, system.n_variables),
                                       rng.integers(-97, 98, system.n_variables))
        if profile is None:  # the line lost degree (its direction at infinity on X): another
            continue
        if profile in profiles:
            return profile
        profiles.append(profile)
    return None


def _exact_profile_check(system, components, profile):
    """X's components held against the equation's exact multiplicity profile (:func:`exact_profile`; None: not
    decided, nothing said). A decomposition that disagrees (five witness points merged into one of multiplicity 5
    in expanded terms of 1e16) is counted ``exact_profile_differs``: a warning, exit 3 (decision 0128). No
    component of top dimension is wrong too: a non-constant f vanishes on a hypersurface of C^n, whose profile is
    never empty (a tracker change once lost a far doubled conic entirely, and the check stood aside).
    """
    if profile is None:
        return {}
    return {} if profile == profile_of(components, system.n_variables - 1) else {"exact_profile_differs": 1}


def _polynomial_part(system):
    """F alone of a :class:`MinorsSystem` (whose minors follow F's scaling), else the system."""
    if isinstance(system, MinorsSystem):
        return PolynomialSystem(system.variables, system.polynomials, name=system.name)
    return system


def _scaled(scaling, system):
    """The system in the computed units; a :class:`MinorsSystem` keeps its minors, of the rescaled F."""
    if isinstance(system, MinorsSystem):
        return system.with_polynomials(scaling.scale_system(_polynomial_part(system)).polynomials)
    return scaling.scale_system(system)


def _decompose(system, options, seed, progress, digits=None):
    """:func:`decompose` in the units of ``system`` (already scaled); ``digits``: those of the precise trace test of
    one exact equation (:func:`_precise_digits_of`, from the user's coefficients)."""
    started = time.perf_counter()
    rng = np.random.default_rng(seed)
    linear = None if isinstance(system, MinorsSystem) else _linear_decomposition(system, options, rng, seed, started)
    if linear is not None:  # linear equations: the exact answer, no homotopy
        return linear
    fibred = _fibred_decomposition(system, options, rng, seed, started, progress)
    if fibred is not None:  # equations that fix some unknowns to finitely many simple roots: per root
        return fibred
    supersets = witness_supersets(system, options.witness, seed=int(rng.integers(2**32)), progress=progress)
    counts = dict(supersets.paths)
    movers_made = []  # each counts the paths it tracks (loops, trace tests, moves to real slices)
    n = system.n_variables
    real_coefficients = system.has_real_coefficients
    components, loops = [], {}
    for witness in supersets.sets:
        if len(witness.points) == 0:
            continue
        codimension = n - witness.dimension
        if progress is not None:
            progress(f"dimension {witness.dimension}: splitting {len(witness.points)} witness points")
        if isinstance(system, MinorsSystem):
            evaluator, sizes = equation_evaluator(system)
        else:
            evaluator, sizes = BatchEvaluator([p.numeric() for p in system.polynomials]), TermSizes(system.polynomials)
        ranks = jacobian_rank(evaluator, sizes, witness.points, options.witness.rank_threshold)
        # A witness point at the end of exactly one path is a simple root of a square subsystem and
        # the slice, so J has full rank there however small its scaled singular values (a reduced
        # quintic whose far branches nearly cancel: 1e-7). Only multiple ends can be rank-deficient.
        simple = witness.multiplicity == 1
        ranks = np.where(simple, np.maximum(ranks, codimension), ranks)
        groups, movers = [], []
        if witness.dimension == 0:
            groups = [([k], True, 0.0) for k in range(len(witness.points))]
            movers = [None] * len(groups)
        else:
            # The rank of J and the number of paths are the same at every generic point of a
            # component, so witness points that differ in either lie on different components. Each
            # such class is split on its own, with equations deflated for it alone: a double line's
            # deflation minors do not vanish on a reduced curve beside it, whose moves then failed.
            run = 0
            signature = ranks * (int(witness.multiplicity.max()) + 1) + witness.multiplicity
            for value in np.unique(signature):
                members = np.nonzero(signature == value)[0]
                mover = _Mover(system, codimension, witness.points[members], witness.slice_rows, rng, options,
                               simple=bool(np.all(simple[members])))
                if mover.deflated:
                    # A point of a multiple component is known to about the square root of the precision (decision
                    # 0064); on the deflated rows it is a simple root: refined there (a move to the same slice), so
                    # that its trace is not off by that error (a doubled twisted cubic in millimetres: 4e-9).
                    witness.points[members] = _refined(mover, witness.points[members])
                counted = []
                for group, confirmed, defect in _split(mover, witness.points[members], rng, options, counted):
                    groups.append((members[group].tolist(), confirmed, defect))
                    movers.append(mover)
                movers_made.append(mover)
                run += counted[0] if counted else 0
            loops[witness.dimension] = run
            groups = _precise_groups(system, witness, groups, seed, digits, counts)
        for (group, confirmed, defect), mover in zip(groups, movers):
            points, rows = witness.points[group], witness.slice_rows.copy()
            real = np.zeros(len(group), dtype=bool)
            if real_coefficients:
                if witness.dimension > 0:
                    points, rows = _to_real_slice(system, mover, points, rows, rng)
                real = np.all(np.abs(points.imag) <= 1e-8 * (1 + np.abs(points)), axis=1)
            components.append(Component(id=0, dimension=witness.dimension, degree=len(group), points=points,
                                        real=real, multiplicity=int(np.max(witness.multiplicity[group])),
                                        reduced=bool(np.all(ranks[group] >= codimension)), slice_rows=rows,
                                        confirmed=bool(confirmed),
                                        trace_defect=0.0 if defect != defect else float(defect)))
    components.sort(key=lambda c: (-c.dimension, -c.degree))
    for k, component in enumerate(components, 1):
        component.id = k
    counts.update(_degree_checks(system, components))
    sum((mover.paths for mover in movers_made), PathCounts()).add_to(counts)
    return Decomposition(system, components, supersets.dimensions_searched, counts, loops, seed,
                         time.perf_counter() - started,
                         extra={"start": supersets.start, "unexplained": supersets.unexplained})


def _precise_digits_of(system):
    """Digits of the precise trace test (decision 0144) of one exact equation of degree at most
    :data:`PRECISE_TRACE_DEGREE`, from its coefficients as written (the same in any units); None otherwise."""
    if len(system.polynomials) != 1 or getattr(system, "projective", False) or isinstance(system, MinorsSystem):
        return None
    f = system.polynomials[0]
    if not f.is_exact or not 2 <= f.degree <= PRECISE_TRACE_DEGREE:
        return None
    return precise_digits(f)


def _precise_groups(system, witness, groups, seed, digits, counts):
    """Confirmed proper groups of a hypersurface's simple witness points held against the trace test in ``digits``
    digits (decision 0144): a group whose trace is not linear there, or that it cannot decide, is not confirmed.

    The double-precision test cannot see a trace that is linear to the paths' accuracy (two circles plus x/10^6:
    1e-27); the roots of f on the slice and on its translations can be computed to any precision. Only for one exact
    equation (``digits`` given), on the complex slice of the split, when every witness point is simple (multiple
    roots are known to P/m digits only): otherwise the groups are as they were.
    """
    if digits is None or witness.dimension != system.n_variables - 1 or np.any(witness.multiplicity != 1):
        return groups
    proper = [k for k, (group, confirmed, _) in enumerate(groups) if confirmed and len(group) < len(witness.points)]
    if not proper:
        return groups
    verdicts = precise_verdicts(system.polynomials[0], witness.slice_rows, witness.points,
                                [groups[k][0] for k in proper], seed=seed, digits=digits)
    groups = list(groups)
    for k, verdict in zip(proper, verdicts):
        if not verdict:
            group, _, defect = groups[k]
            groups[k] = (group, False, defect)
            key = "precise_trace_not_linear" if verdict is False else "precise_trace_undecided"
            counts[key] = counts.get(key, 0) + 1
    return groups


# A closed block is solved first only when its start system is small (decision 0067): the split is meant for
# a few auxiliary unknowns (an algebraic number's generator); a six-bar's F plus its maximal minors closes a
# block of 17 equations in 8 of its 10 unknowns, squared up to 5^8 = 390,625 paths, where the cascade of the
# whole system tracks a few hundred.
BLOCK_PATHS = 10_000


def _block_paths(system, block):
    """Total-degree paths of the block's own solve (squared up to random combinations of the top degree).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x*y - 1", "x^2 - 2"], ["x", "y"])
    >>> _block_paths(system, finite_block(system))
    2
    """
    degrees = sorted((system.polynomials[k].degree for k in block.equations), reverse=True)
    size = len(block.variables)
    if len(degrees) > size:
        return degrees[0] ** size
    return math.prod(degrees)


def _fibred_decomposition(system, options, rng, seed, started, progress):
    """X as the union of {r} x X_r over the simple roots r of a closed block of equations, or None.

    The block (:func:`~numag.witness.fibres.finite_block`) is solved first; each fibre X_r is decomposed
    in the other unknowns and its components are lifted: the block's coordinates inserted in the
    witness points, zero coefficients for them in the slices (the same hyperplanes on {r} x C^m).
    Ranks and codimensions both grow by the block's size k there (module :mod:`~numag.witness.fibres`),
    so ``reduced`` and the multiplicities carry over. None (no draw of ``rng``) when there is no block;
    None after solving when the roots are not all simple or a fibre cannot be written (decision 0061).
    """
    if isinstance(system, MinorsSystem):
        # its minors are evaluated from the whole Jacobian, not polynomials a fibre could carry: splitting F
        # alone would decompose X instead of F plus minors
        return None
    block = finite_block(system)
    if block is None or _block_paths(system, block) > BLOCK_PATHS:
        return None
    split = solve_block(system, block, seed=int(rng.integers(2**32)))
    if split is None:
        return None
    fibres = [fibre_system(system, block, root) for root in split.roots]
    if any(fibre is None for fibre in fibres):
        return None
    n, columns = system.n_variables, list(block.variables)
    others = [j for j in range(n) if j not in set(columns)]
    lowest = options.witness.lowest_dimension or 0
    counts = {"tracked": 0, "not_on_X": 0, "at_infinity_or_failed": 0, "on_larger_component": 0,
              "membership_paths": 0}
    add_path_counts(counts, split.paths)
    components, loops, start, unexplained = [], {}, None, []
    real_coefficients = system.has_real_coefficients
    m = n - len(columns)
    for root, root_real, fibre in zip(split.roots, split.real, fibres):
        if fibre is EMPTY_FIBRE or lowest > m:  # no point over this root (or none searched)
            continue
        if fibre is WHOLE_FIBRE:  # X_r is all of C^m: one linear component, its witness point on m random slices
            rows = np.zeros((m, n + 1))
            rows[:, [0] + [j + 1 for j in others]] = rng.standard_normal((m, m + 1))
            point = np.empty(n, dtype=complex)
            point[others], point[columns] = np.linalg.solve(rows[:, [j + 1 for j in others]], -rows[:, 0]), root
            components.append(Component(id=0, dimension=m, degree=1, points=point[None, :],
                                        real=np.array([bool(root_real) and real_coefficients]), multiplicity=1,
                                        reduced=True, slice_rows=rows))
            continue
        if progress is not None:
            progress(f"the fibre over {short_point(root)} of the block in "
                     f"{', '.join(system.variables[j] for j in columns)}")
        part = decompose(fibre, options, seed=int(rng.integers(2**32)), progress=progress)
        add_path_counts(counts, part.paths)
        lost = part.extra.get("unexplained")
        if lost is not None and len(lost):  # lifted like the witness points
            lifted = np.empty((len(lost), n), dtype=complex)
            lifted[:, others], lifted[:, columns] = lost, root
            unexplained.append(lifted)
        start = start or part.extra.get("start")  # the same options for every fibre: the first fibre's block
        for dimension, run in part.loops.items():
            loops[dimension] = loops.get(dimension, 0) + run
        for c in part.components:
            points = np.empty((len(c.points), n), dtype=complex)
            points[:, others], points[:, columns] = c.points, root
            rows = np.zeros((len(c.slice_rows), n + 1), dtype=c.slice_rows.dtype if len(c.slice_rows) else complex)
            if len(c.slice_rows):
                rows[:, [0] + [j + 1 for j in others]] = c.slice_rows
            real = np.asarray(c.real, dtype=bool) & bool(root_real) & real_coefficients
            components.append(replace(c, id=0, points=points, slice_rows=rows, real=real))
    components.sort(key=lambda c: (-c.dimension, -c.degree))
    for k, component in enumerate(components, 1):
        component.id = k
    counts.update(_degree_checks(system, components))
    searched = list(range(m, lowest - 1, -1))
    extra = {"fibres": {"unknowns": [system.variables[j] for j in columns], "equations": list(block.equations),
                        "roots": len(split.roots), "empty": sum(f is EMPTY_FIBRE for f in fibres),
                        "whole": sum(f is WHOLE_FIBRE for f in fibres)}}
    if start:
        extra["start"] = start
    if unexplained:
        extra["unexplained"] = np.vstack(unexplained)
    return Decomposition(system, components, searched, counts, loops, seed, time.perf_counter() - started,
                         extra=extra, fibred_over=block)


def _degree_checks(system, components):
    """Bezout's theorem against the components found: ``{"degree_check_failed": 1}`` on a violation.

    A hypersurface V(f) is pure: its components' degrees times multiplicities add up to deg f
    exactly (fewer: a component was lost; more: one was counted twice). For several equations
    the degrees of all irreducible components add up to at most d_1 ... d_m (the refined Bezout
    theorem; Fulton, "Intersection Theory", Springer 1984, Example 8.4.6).
    """
    degrees = [p.degree for p in system.polynomials if not p.is_zero()]
    if isinstance(system, MinorsSystem):
        degrees += system.evaluated().degrees
    if not degrees or min(degrees) < 1 or not components:
        return {}
    if len(degrees) == 1:
        top = system.n_variables - 1
        violated = sum(c.degree * c.multiplicity for c in components if c.dimension == top) != degrees[0]
    else:
        violated = sum(c.degree for c in components) > math.prod(degrees)
    return {"degree_check_failed": 1} if violated else {}


def _linear_decomposition(system, options, rng, seed, started):
    """X of linear equations, exactly: empty, or one linear space (degree 1) with a witness point."""
    space = linear_space(system)
    if space is None:
        return None
    n = system.n_variables
    lowest = options.witness.validated(n).lowest_dimension or 0
    counts = {"tracked": 0, "not_on_X": 0, "at_infinity_or_failed": 0, "on_larger_component": 0,
              "membership_paths": 0}
    components = []
    if not space.empty and space.dimension >= lowest:
        # the witness point: the space met by `dimension` random real hyperplanes a . (1, x) = 0
        slice_rows = rng.standard_normal((space.dimension, n + 1))
        matrix = np.zeros((n, n), dtype=complex)
        right = np.zeros(n, dtype=complex)
        for k, row in enumerate(space.pivots.values()):
            for column, value in row.items():
                if column < 0:
                    right[k] = -complex(value)
                else:
                    matrix[k, column] = complex(value)
        matrix[len(space.pivots):] = slice_rows[:, 1:]
        right[len(space.pivots):] = -slice_rows[:, 0]
        point = np.linalg.solve(matrix, right)
        real = system.has_real_coefficients
        components.append(Component(id=1, dimension=space.dimension, degree=1, points=point[None, :],
                                    real=np.array([real]), multiplicity=1, reduced=True, slice_rows=slice_rows,
                                    confirmed=True, trace_defect=0.0))
    return Decomposition(system, components, list(range(n, lowest - 1, -1)), counts, {}, seed,
                         time.perf_counter() - started)


def components_through(decomposition, point, seed=0, options=None):
    """The components of a decomposition that pass through a point (homotopy membership test).

    Parameters
    ----------
    decomposition : Decomposition
    point : array_like, shape (n,)
        A point of X (affine).
    seed : int
    options : DecomposeOptions, optional

    Returns
    -------
    list of Component
        Highest dimension first; the local dimension of X at the point is the first one's.
    """
    options = options or DecomposeOptions()
    point = np.asarray(point, dtype=complex).reshape(-1)
    if len(point) != decomposition.system.n_variables:
        raise InputError(f"the point has {len(point)} coordinates, the system "
                         f"{decomposition.system.n_variables} variables")
    centred = _centred_parts(decomposition, point)
    if centred is None:
        return _components_through_here(decomposition, point, seed, options)
    # Decision 0084: membership in coordinates centred exactly at the point and balanced anew. In the
    # decomposition's own units the paths' accuracy and the test's tolerance (1e-5 of 1 + |point|) are set by
    # where the point sits, not by the features around it: a sphere of radius 13 through (1237, -2341, 3468) was
    # missed at 11 seeds of 12 (the endgame ended 1e-3 of those units off the crossing), and in units 1000 times
    # smaller the whole sphere lay within the tolerance of a point of the line. A hit is kept only when a path
    # aimed next to the point ends on X next to it (:func:`_lands_on_x_next_to`): centred at a point of the line
    # far from the sphere, the balancing crushes the sphere onto the plane of its test system, and paths jumped to
    # the point at 4 seeds of 30 without that test.
    moved, centring, terms, scaling = centred
    # in the balanced units at once: the centred coefficients rounded once from their exact values, the numbers the
    # exact centred system scaled by the balancing rounds to (decision 0138)
    computed = moved.in_units(scaling, terms.rounded(scaling.variable_exponents, scaling.equation_exponents),
                              to_user=False)
    hits = {id(c) for c in _components_through_here(computed, scaling.to_computed(point - centring.point), seed,
                                                    options, verify=True)}
    return [c for c, m in zip(decomposition.components, computed.components) if id(m) in hits]


def centred_decomposition(decomposition, point):
    """The decomposition written in coordinates y = x - s centred (exactly) at ``point``, balanced anew.

    Returns ``(decomposition, centring)``, or None where centring does not apply: a decomposition made fibre by
    fibre (its blocks belong to the original equations), a system with evaluated minors, a point that is not
    finite, or a system whose translation would be too large (:data:`CENTRING_TERMS`).
    """
    parts = _centred_parts(decomposition, point)
    if parts is None:
        return None
    moved, centring, terms, scaling = parts
    return replace(moved, system=terms.exact(), scaling=scaling), centring


def _centred_parts(decomposition, point):
    """:func:`centred_decomposition` before its system is written: (the decomposition with moved points and slices,
    the centring, the :class:`~numag.system.centred.CentredTerms`, the balancing), or None."""
    system = decomposition.system
    if (decomposition.fibred_over is not None or type(system) is not PolynomialSystem or system.projective
            or not np.all(np.isfinite(point)) or not decomposition.components):
        return None
    if translated_terms(system) > CENTRING_TERMS:
        return None
    centring = centre_near(point, radius=0.0)
    terms = CentredTerms(system, centring)
    shift = np.concatenate([[1.0], centring.point])
    components = []
    for c in decomposition.components:
        rows = np.asarray(c.slice_rows, dtype=complex)
        if len(rows):
            # a0 + a . x = 0 with x = y + s is (a0 + a . s) + a . y = 0
            rows = rows.copy()
            rows[:, 0] = rows @ shift
            rows /= np.linalg.norm(rows, axis=1)[:, None]
        components.append(replace(c, points=np.asarray(c.points) - centring.point[None, :], slice_rows=rows))
    # the balancing reads the coefficients in double: the exact ones rounded once (decision 0138)
    scaling = Scaling.balancing(terms.rounded(), CENTRED_BALANCING_FLOOR)
    return replace(decomposition, components=components), centring, terms, scaling


def _components_through_here(decomposition, point, seed, options, verify=False):
    """:func:`components_through` in the decomposition's own coordinates.

    ``verify``: a hit whose test system combines more equations than the codimension must also
    pass :func:`_lands_on_x_next_to`.
    """
    if decomposition.scaling is not None:  # membership is decided in the units the components were found in
        scaling = decomposition.scaling
        computed = decomposition.in_units(scaling, _scaled(scaling, decomposition.system), to_user=False)
        found = {id(c): k for k, c in enumerate(computed.components)}
        hits = _components_through_here(replace(computed, scaling=None), scaling.to_computed(point), seed, options,
                                        verify)
        return [decomposition.components[found[id(c)]] for c in hits]
    if decomposition.fibred_over is not None:
        return _components_through_fibre(decomposition, point, seed, options)
    system = decomposition.system
    components = decomposition.components
    if system.n_equations == 1 and len(components) == 1 and components[0].confirmed \
            and components[0].dimension == system.n_variables - 1:
        # V(f) is the union of its components, all of dimension n - 1: when there is one, every point
        # of X lies on it (the homotopy test can lose its paths at a singular point of high multiplicity).
        return list(components)
    _, rng = random_state(seed)
    n = system.n_variables
    found = []
    for component in decomposition.components:  # highest dimension first
        codimension = n - component.dimension
        hits = _member(system, component, codimension, point, rng, options)
        if np.any(hits) and system.n_equations > codimension and component.reduced and component.multiplicity == 1:
            # Random combinations of more equations than the codimension vanish on spurious components of the
            # same dimension too ((s - r) * (a (x - 3) + b (y - 4)) for a sphere s = r met by the line x = 3,
            # y = 4: the plane a (x - 3) + b (y - 4) = 0 holds the whole line), and a path that jumps there ends
            # at any point of the line: a far point of the line was put on the sphere at one seed in twelve.
            # A hit on a reduced component is kept when an independent combination and slice confirm it, or a
            # third decides between the two. Not on non-reduced components: held on deflated rows, their membership
            # paths miss more often, and a second test there turned true hits into misses (a doubled sphere).
            second = _member(system, component, codimension, point, rng, options)
            if not np.any(second):
                hits = _member(system, component, codimension, point, rng, options)
            if verify and np.any(hits):
                hits = _lands_on_x_next_to(system, component, codimension, point, rng, options)
        if np.any(hits):
            found.append(component)
    return found


#: :func:`_lands_on_x_next_to` aims at a point this far from the given one (relative to 1 + its norm, in units
#: where the features near it have size about 1: centred and balanced), and accepts endpoints within
#: :data:`_NEXT_TO_REACH` times that distance whose scaled residual of F is at most :data:`_ON_X_RESIDUAL`.
_NEXT_TO_OFFSET = 1e-3
_NEXT_TO_REACH = 100.0
#: An endpoint on the component has F at rounding (1e-14); one on a spurious component of the combined test system
#: next to a point of X has F of the offset's size (1e-3 where the component does not pass, 1e-6 at a crossing).
_ON_X_RESIDUAL = 1e-9


def _lands_on_x_next_to(system, component, codimension, point, rng, options):
    """Whether ``component`` has a point next to ``point``, reached on the component itself (not on a spurious
    component of its test system).

    The witness points are moved, on a fresh random combination, to a random slice through a point at
    :data:`_NEXT_TO_OFFSET` from ``point`` in a random direction. A component through ``point`` meets that slice
    next to it; an endpoint counts when it is near (:data:`_NEXT_TO_REACH` offsets) and on X for all the
    equations, not only the combination: a path that jumped to the plane a (x - 3) + b (y - 4) = 0 of the
    sphere's combined test system ends on the plane, where F is of the offset's size.

    Returns
    -------
    ndarray of bool, shape (degree,)
        The witness points whose paths pass the test.
    """
    n = system.n_variables
    size = 1.0 + float(np.linalg.norm(point))
    direction = rng.standard_normal(n) + 1j * rng.standard_normal(n)
    aim = point + _NEXT_TO_OFFSET * size * direction / np.linalg.norm(direction)
    held = holding_rows(system, codimension, component.points, rng, options.witness.rank_threshold,
                        simple=True).combined(codimension, rng)
    through = random_rows(rng, len(component.slice_rows), n + 1)
    through[:, 0] = -(through[:, 1:] @ aim)
    held, block = held_parts(held)
    run = track_moves(held + [linear_form(r) for r in component.slice_rows], held + [linear_form(r) for r in through],
                      component.points, rng, options.witness.tracker, options.witness.batch_size, held=block)
    ends = run.affine_endpoints()
    finite = np.all(np.isfinite(ends), axis=1)
    near = np.zeros(len(ends), dtype=bool)
    near[finite] = np.linalg.norm(ends[finite] - point[None, :], axis=1) <= _NEXT_TO_REACH * _NEXT_TO_OFFSET * size
    if not np.any(near):
        return near
    near[np.nonzero(near)[0]] = _on_x(system, ends[near])
    return near


def _on_x(system, points):
    """Whether every equation of F vanishes at each point to :data:`_ON_X_RESIDUAL` of the size of its terms (not
    only the random combination a move held: a path that jumped to another component of it ends off X).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["(y - x^2) * x", "(y - x^2) * y"], ["x", "y"])
    >>> _on_x(system, np.array([[2.0, 4.0], [1.0, -1.0]])).tolist()   # on the parabola; on the line x + y = 0 only
    [True, False]
    """
    polynomials = _polynomial_part(system).polynomials
    values = BatchEvaluator(polynomials).evaluate(points, jacobian=False)
    residuals = np.max(np.abs(values) / TermSizes(polynomials, False).values(points), axis=1)
    return residuals <= _ON_X_RESIDUAL


def _member(system, component, codimension, point, rng, options):
    """One homotopy membership test of ``point`` on ``component`` with fresh random combinations."""
    held = holding_rows(system, codimension, component.points, rng, options.witness.rank_threshold,
                        simple=component.reduced and component.multiplicity == 1).combined(codimension, rng)
    hits, _ = membership(held, component.slice_rows, component.points, point, rng, options.witness)
    return hits


def components_through_points(decomposition, points, seeds, options=None):
    """:func:`components_through` for many points of X, sharing what they can.

    When the decomposition is the whole of X and X has one component -- it searched every dimension down to
    0, no path failed, and it found one confirmed component -- every point of X lies on that component and
    no membership homotopy is tracked (a six-bar linkage's 4 singular points: 0.6 of its 8 CPU s; decision
    0074). Otherwise each point is tested by :func:`components_through`.

    Parameters
    ----------
    decomposition : Decomposition
        As :func:`decompose` returned it (all of X's components, not a chosen subset).
    points : sequence of array_like, shape (n,)
        Points of X (affine), e.g. refined onto X by Newton's method.
    seeds : sequence of int
        One per point, as for :func:`components_through`.
    options : DecomposeOptions, optional

    Returns
    -------
    list of list of Component

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> circle = decompose(parse_system(["x^2 + y^2 - 1", "z"], ["x", "y", "z"]), seed=1)
    >>> [[c.degree for c in through] for through in components_through_points(circle, [[0.6, 0.8, 0]], [0])]
    [[2]]
    """
    components = decomposition.components
    complete = (min(decomposition.dimensions_searched, default=1) == 0
                and not any(decomposition.paths.get(label, 0) for label in FAILURE_LABELS))
    if len(components) == 1 and components[0].confirmed and complete:
        return [list(components) for _ in points]
    return [components_through(decomposition, point, seed, options) for point, seed in zip(points, seeds)]


def _components_through_fibre(decomposition, point, seed, options):
    """:func:`components_through` for a decomposition made root by root: tested in the point's fibre only.

    A point lies only on components of its own fibre (the block's coordinates equal there); those are
    tested in the fibre's unknowns, where a fibre that is one hypersurface needs no homotopy. Membership
    homotopies in the whole space cost 100 times more on Barth's sextic with the golden ratio as an
    unknown (a rescue per singular candidate; decision 0061).
    """
    block = decomposition.fibred_over
    columns = list(block.variables)
    others = [j for j in range(decomposition.system.n_variables) if j not in set(columns)]
    where = point[columns]
    same = [c for c in decomposition.components
            if np.linalg.norm(c.points[0, columns] - where) <= 1e-6 * (1 + np.linalg.norm(where))]
    if not same:  # the point is in no fibre of X
        return []
    fibre = fibre_system(decomposition.system, block, same[0].points[0, columns])
    if fibre is WHOLE_FIBRE:  # X_r is the whole space: its one component holds every point of the fibre
        return same
    if fibre is None or fibre is EMPTY_FIBRE:  # not expected for a fibre with components: test in the whole space
        return components_through(replace(decomposition, components=same, fibred_over=None), point, seed, options)
    inner = [replace(c, points=c.points[:, others], slice_rows=c.slice_rows[:, [0] + [j + 1 for j in others]])
             for c in same]
    part = Decomposition(fibre, inner, [], {}, {}, decomposition.seed, 0.0)
    hits = {id(c) for c in components_through(part, point[others], seed, options)}
    return [outer for outer, c in zip(same, inner) if id(c) in hits]
