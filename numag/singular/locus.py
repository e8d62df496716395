"""The singular locus of X = V(F) (``numag singular``): singular points and components, with evidence.

Pipeline:

1. **Components of X first** (:func:`numag.witness.decompose.decompose`), so that a
   point is judged against the codimension of the component it lies on.
2. **Candidates.** For each codimension c of a component of X, the augmented
   system F together with the c x c minors of J (all of them when they are
   few, otherwise n - c + 1 random combinations det(A J B): at a point of X where
   rank J = c each generic combination is one more independent condition, so
   n - c + 1 of them leave no such point on X of dimension at most n) is
   decomposed into witness sets: isolated candidates and candidate components of
   every dimension, each with its degree.
3. **Verdicts.** A witness point of each candidate set is checked with the
   ORIGINAL Jacobian (:func:`numag.singular.smoothness.check_points`, with escalation in
   precision and the components of X through the point): singular points of X
   (rank below the codimension, or a point where components meet) are kept;
   a candidate that is a whole generically non-reduced component of X is
   reported as non-reduced, not as singular; candidates the check calls smooth
   are spurious (a whole larger component swept into V(F, minors), or a residual
   of the randomisation) and are counted, never reported.
4. **Projective hypersurfaces** take the shortcut of the gradient system: the
   n + 1 partials (Euler's formula makes F = 0 automatic), solved as a square
   system after random combination. Other projective systems are moved to a
   random affine chart (an invertible change of coordinates with small integers
   keeps exact equations exact and real points real) and mapped back.
5. **At infinity** (affine hypersurfaces): the singular points of the closure
   V(F^h) with X_0 = 0 are reported apart, in homogeneous coordinates.

Examples
--------
>>> from numag.system.parse import parse_system
>>> locus = singular_locus(parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"]), seed=1)
>>> [(c.dimension, c.degree, c.kind) for c in locus.components]
[(0, 1, 'singular')]
"""

from dataclasses import dataclass, field, replace
import math
import time

import numpy as np

from ..errors import InputError, LimitError
from ..system.display import counted, html_table, short_point
from ..system.polynomial import Polynomial, PolynomialSystem, linear_space, require_numeric
from ..numeric.cluster import cluster_labels, groups, normalize_projective
from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..numeric.minors import (MinorsSystem, degree_lowering_directions, directional_gradients, equation_evaluator,
                              generic_gradients,
                              expanded_minors,
                              minor_term_bound,
                              random_minor_weights)
from ..numeric.refine import IsolationTest, ZeroKind, largest_scaled_residual, project_to_variety
from ..numeric.scaling import Scaling
from ..numeric.seeds import resolved_seed
from ..tracking.solve import SolveOptions, solve_system
from ..tracking.multihomogeneous import GroupSource
from ..tracking.starts import StartKind, estimated_cost
from ..tracking.service import add_path_counts
from ..tracking.tracker import FAILURE_LABELS
from ..witness.cascade import held_parts, linear_form, random_rows, track_moves
from ..witness.fibres import finite_block
from ..witness.decompose import (EXPANSION_MONOMIALS, DecomposeOptions, Decomposition, components_through, decompose,
                                 expansion_bound, holding_rows)
from .inside import search_inside
from .isolated import finite_singular_points, null_vector_groups, null_vector_system, square_route_paths
from .kinds import CandidateSystem, Formulation, PieceKind, Verdict
from ..system.centred import (centre_in_region, centre_near, centred_system, has_no_zero_near_origin, subleading_centre,
                              within)
from .nearness import NearSingularPoint, input_tolerance, nearest_backward_error
from .smoothness import CheckOptions, check_points

__all__ = ["SingularOptions", "SingularComponent", "SingularLocus", "singular_locus", "FORMULATIONS"]

#: Ways of writing "rank J < c" as equations, as text (the choices of ``--formulation``).
FORMULATIONS = Formulation.texts()

#: ``singular --start auto``: one path of the square null-vector route costs about this many paths of the
#: witness sets: a 2-homogeneous path that ends at a singular endpoint (F's Jacobian rows are dependent on
#: Sing(X), so it goes through the endgame), by the one cost rule of the starts
#: (:func:`~numag.tracking.starts.estimated_cost`); the witness sets' paths end at regular points. Measured
#: per path after X's decomposition (decision 0077, seed 1): about 8 and 9 times (four lines, trifolium), 19
#: (cone over a plane cubic), 27 (Kummer's quartic); at 15, a wrong choice costs at most about twice the
#: witness sets' time.
SQUARE_ROUTE_PATH_COST = int(estimated_cost(StartKind.MULTIHOMOGENEOUS, 1, singular_endpoints=1))
#: Where the endgame of the candidate systems' regeneration moves (product of linear forms -> equation) starts:
#: the six-bar's minors settled their 64 paths to X's points at infinity and 12 to its folds only at radii 4e-4 to
#: 6e-6, after 5 to 7 rounds of up to six loops each from 0.1. Not smaller: from 5e-3 down, paths into the
#: rank <= 1 3 x 3 matrices' point of multiplicity 146 stopped at the minimum step on the way (decision 0085).
CANDIDATE_ENDGAME_RADIUS = 1e-2


@dataclass(frozen=True)
class SingularOptions:
    """Options of :func:`singular_locus` (defaults declared once).

    Attributes
    ----------
    formulation : Formulation or str
        "auto" (the gradient system for projective hypersurfaces; otherwise per codimension the
        minors when they are few, else the cheaper by a path estimate of random minors and the
        null-vector form), "minors", "null vector" or "gradient" (hypersurfaces only).
    decompose : DecomposeOptions
    max_exact_minors : int
        All c x c minors are used when there are at most this many; otherwise random
        combinations of them.
    digits : int
        Highest precision for escalated rank decisions.
    infinity_for_systems : bool
        Also search singular points at infinity for affine input of several equations (those of
        V(F^h) on the hyperplane at infinity, in a random chart: a second computation of the same
        size). Hypersurfaces always get them (cheap: solved on the hyperplane).
    start : StartKind or str
        "total-degree" (witness sets of the chosen formulation), or "multihomogeneous", "polyhedral",
        "auto": for each codimension c where X is a reduced complete intersection (c equations, every
        component of dimension n - c, generically reduced), the singular points come from the square
        null-vector system with that start (x and lambda grouped), proven to be all of Sing(X) by
        slices (:func:`~numag.singular.isolated.finite_singular_points`); elsewhere, and when Sing(X)
        turns out positive-dimensional, the witness sets are used, with a note. ``auto`` takes that
        route only where its estimated cost is below the witness sets' (:func:`_square_route_pays`: paths
        times a cost per path; the estimates are in the route's block). The start also chooses
        the factors of the regenerations (X's, and the null-vector system's with x and lambda grouped;
        :func:`~numag.tracking.starts.choose_witness_start`); their blocks are in the report's ``start``.
    """

    formulation: Formulation = Formulation.AUTO
    decompose: DecomposeOptions = DecomposeOptions()
    max_exact_minors: int = 24
    digits: int = 50
    infinity_for_systems: bool = False
    start: StartKind = StartKind.TOTAL_DEGREE

    def __post_init__(self):
        # Text from the command line or a report becomes a member here (InputError naming the option).
        object.__setattr__(self, "formulation", Formulation.parse(self.formulation, "formulation"))
        object.__setattr__(self, "start", self.start if isinstance(self.start, StartKind)
                           else StartKind.parse(self.start))

    def validated(self, system):
        if self.formulation is Formulation.GRADIENT and system.n_equations != 1:
            raise InputError("the gradient formulation is for hypersurfaces (one equation); use 'minors'")
        if self.formulation is Formulation.MINORS and self.start is not StartKind.TOTAL_DEGREE:
            raise InputError(f"the {self.start.value} start is used with the null-vector system; with the "
                             "minors formulation use the total-degree start (or --formulation auto)")
        return self


@dataclass(kw_only=True)
class SingularComponent:
    """One piece of the singular locus.

    Attributes
    ----------
    id : int
    dimension, degree : int
    points : ndarray, shape (degree, n)
        Witness points (the point itself for dimension 0; for a real linear piece of positive
        dimension, a real point of it: decision 0155). Affine coordinates for affine
        input; homogeneous coordinates (divided by the largest) for projective input and
        for points at infinity (the homogenising coordinate first).
    real : ndarray of bool
    multiplicity : int or None
        Paths of the formulation that ended at the point (isolated points), else None.
    at_infinity : bool
    formulation : CandidateSystem
        The system the piece came from: minors, random minors, null vector, gradient system
        (at infinity).
    kind : PieceKind
        Singular, or non-reduced (a whole component of X of multiplicity > 1: the
        equations cannot tell whether the variety is smooth there), or undecided.
    on_components : list of int
        Ids of the components of X through the witness point.
    rank, codimension : int or None
        Rank of the original Jacobian at the (first) witness point, and the rank a smooth
        point would need.
    notes : list of str
    """

    id: int
    dimension: int
    degree: int
    points: np.ndarray
    real: np.ndarray
    multiplicity: int | None
    at_infinity: bool
    formulation: CandidateSystem
    kind: PieceKind
    on_components: list[int] = field(default_factory=list)
    rank: int | None = None
    codimension: int | None = None
    notes: list[str] = field(default_factory=list)

    def __repr__(self):
        where = " at infinity" if self.at_infinity else ""
        at = f" at {short_point(self.points[0])}" if self.dimension == 0 and len(self.points) else ""
        return (f"SingularComponent({self.id}: {self.kind}{where}, dimension {self.dimension}, degree {self.degree}"
                f"{at})")


@dataclass(kw_only=True)
class SingularLocus:
    """Result of :func:`singular_locus`.

    Attributes
    ----------
    system : PolynomialSystem
    components : list of SingularComponent
        Singular (and non-reduced) pieces, affine first, then those at infinity.
    variety : Decomposition or None
        The components of X (None on the gradient shortcut).
    paths : dict
        Tracked paths by status, over every homotopy run.
    discarded : dict
        Candidates dropped, by reason.
    seed : int
    seconds : float
    notes : list of str
    scaling : Scaling or None
        The units the computation used (points are in the user's units).
    near_singular : list of NearSingularPoint
        Candidates the check called smooth for the coefficients as written, which a relative change of the
        coefficients within the input's precision makes singular points (decision 0062): undecided which the
        user means, never dropped silently.
    start : dict
        The report's ``start`` block: the start asked for, and per codimension the route taken
        (``searches`` with each square system's start block, or the witness sets and why).
    options : SingularOptions or None
        The options of the run (recorded when the result is saved; None for a result built by hand).
    embedded : list of ndarray
        Points where the given equations' Jacobian drops rank and X is smooth (one reduced component of
        multiplicity 1 there): embedded points of the equations, listed apart, not pieces (decision 0105).
    embedded_components : list of SingularComponent
        Sets of positive dimension where the equations' Jacobian drops rank and X is smooth at a generic point
        (kind ``embedded``, with witness points): embedded components of the equations, listed apart, not pieces
        (decision 0108). Singular points of X inside one are searched only where that is decided
        (``discarded["embedded_component_unsearched"]`` counts the others: a completeness warning).
    """

    system: PolynomialSystem
    components: list[SingularComponent]
    variety: Decomposition | None
    paths: dict[str, int]
    discarded: dict[str, int]
    seed: int
    seconds: float
    notes: list[str] = field(default_factory=list)
    scaling: Scaling | None = None
    start: dict = field(default_factory=dict)
    near_singular: list[NearSingularPoint] = field(default_factory=list)
    options: SingularOptions | None = None
    embedded: list = field(default_factory=list)
    embedded_components: list[SingularComponent] = field(default_factory=list)

    def __repr__(self):
        affine = [c for c in self.components if not c.at_infinity]
        points = [c for c in affine if c.dimension == 0 and c.kind == "singular"]
        infinite = len(self.components) - len(affine)
        return (f"SingularLocus({self.system.name or 'system'}: {counted(len(points), 'singular point')} "
                f"({sum(bool(c.real[0]) for c in points)} real), {counted(len(affine) - len(points), 'other piece')}, "
                f"{infinite} at infinity; seed {self.seed})")

    def _repr_html_(self):
        rows = [[c.id, c.kind, c.dimension, c.degree, "yes" if c.at_infinity else "no",
                 ", ".join(map(str, c.on_components)), short_point(c.points[0]) if len(c.points) else ""]
                for c in self.components]
        return html_table(repr(self), ["id", "kind", "dimension", "degree", "at infinity", "on components of X",
                                       "a point"], rows)

    def isolated(self):
        """The singular points (dimension 0, kind singular)."""
        return [c for c in self.components if c.dimension == 0 and c.kind is PieceKind.SINGULAR]


def _real_flags(system, points):
    real_coefficients = system.has_real_coefficients
    if not real_coefficients or len(points) == 0:
        return np.zeros(len(points), dtype=bool)
    return np.all(np.abs(points.imag) <= 1e-8 * (1 + np.abs(points)), axis=1)


def minors_system(system, codimension, rng, max_exact, n_columns=None, evaluate_large=False):
    """F together with equations for "rank J < codimension" (all minors, or random combinations).

    With ``n_columns``, J is taken in the first ``n_columns`` variables only (a family's x, its
    parameters last: the incidence system of the discriminant).

    With ``evaluate_large``, minors of size 2 or more whose expansion could have more than
    ``EXPANSION_MONOMIALS`` monomials are not written out: the result is a
    :class:`~numag.numeric.minors.MinorsSystem` (F, and the minors evaluated from J), which the witness
    cascade and the decomposition take as they take polynomials. The random weights are the same draws
    either way, so small cases get the same equations as before.

    Returns
    -------
    PolynomialSystem
    CandidateSystem
        MINORS or RANDOM_MINORS.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x^2 + y^2 - z^2"], ["x", "y", "z"])   # a cone
    >>> augmented, kind = minors_system(system, 1, np.random.default_rng(0), 24)
    >>> augmented.n_equations, kind.value
    (4, 'minors')
    """
    equations = [p.numeric() for p in system.polynomials]
    n = system.n_variables if n_columns is None else int(n_columns)
    weights = random_minor_weights(system.n_equations, n, codimension, max_exact, rng)
    # a closed block of equations (an auxiliary algebraic number) is split root by root, which needs the
    # minors as polynomials (decision 0061); too large to expand, they go to the null-vector form instead
    if evaluate_large and n_columns is None and codimension >= 2 and finite_block(system) is None \
            and expansion_bound(equations, codimension, n) > EXPANSION_MONOMIALS \
            and minor_term_bound(equations, weights) > EXPANSION_MONOMIALS:
        # a c x c determinant of polynomials multiplies c of them: written out it can have C(n + D, n) terms,
        # and perm(term counts) before cancellation; sparse Jacobians (mechanisms) stay small and exact
        kind = CandidateSystem.MINORS if weights.complete else CandidateSystem.RANDOM_MINORS
        return MinorsSystem(system.variables, equations, weights, name=system.name), kind
    # The Jacobian along the directions where F's derivatives lose degree (the same minors' span, fewer
    # paths to infinity: a linear change of coordinates must not cost the singular points; decision 0063).
    if codimension == 1 and weights.complete and n_columns is None:
        # every partial: along random directions (and the lowering ones), so that the sets the regeneration
        # passes through belong to X, not to the coordinates (decision 0119)
        gradients = generic_gradients(system.polynomials, n, rng)
    else:
        directions, _ = degree_lowering_directions(system.polynomials, n)
        gradients = None if directions is None else directional_gradients(system.polynomials, directions)
    minors = expanded_minors(equations, weights, normalize=True, gradients=gradients)
    kind = CandidateSystem.MINORS if weights.complete else CandidateSystem.RANDOM_MINORS
    return PolynomialSystem(system.variables, equations + minors, name=system.name), kind


def _estimated_paths(system, variety, codimension, kind):
    """Rough path counts of the two formulations (MINORS, NULL_VECTOR) on the components of codimension c
    (for AUTO)."""
    n = system.n_variables
    degree = sum(c.degree for c in variety.components if n - c.dimension == codimension) or 1
    top = max(system.degrees)
    if kind is Formulation.MINORS:
        return degree * float(codimension * max(top - 1, 1)) ** (n - codimension + 1)
    return degree * float(top) ** n


def _tangent_dimension(augmented, component, rng):
    """Dimension of the tangent space of a candidate component at its first witness point (deflated system)."""
    codim = augmented.n_variables - component.dimension
    evaluator, _ = holding_rows(augmented, codim, component.points, rng).evaluator()
    _, jacobian = evaluator.evaluate(component.points[:1])
    values = np.linalg.svd(jacobian[0], compute_uv=False)
    rank = int(np.sum(values > 1e-8 * max(values.max(initial=0), 1)))
    return augmented.n_variables - rank


def _membership_oracle(candidates, component, seed, lift=None):
    """``contains(x)``: does the point x lie on this candidate component? (a homotopy membership test)

    ``lift`` maps a point of x-space into the candidates' space (the null-vector system's (x, lambda));
    it returns None when no lift exists (then the point is not on the component).
    """
    single = replace(candidates, components=[component])

    def contains(x_point):
        point = x_point if lift is None else lift(x_point)
        return point is not None and bool(components_through(single, point, seed=seed))

    return contains


def _null_vector_lift(null_system, n):
    """Lift x to (x, lambda) on the null-vector system: its equations are linear in lambda for fixed x."""
    evaluator = BatchEvaluator(null_system.polynomials)
    extra = null_system.n_variables - n

    def lift(x_point):
        start = np.concatenate([np.asarray(x_point, dtype=complex), np.zeros(extra, dtype=complex)])
        values, jacobian = evaluator.evaluate(start[None, :])
        lam = np.linalg.lstsq(jacobian[0][:, n:], -values[0], rcond=None)[0]
        lifted = np.concatenate([start[:n], lam])
        refined = project_to_variety(null_system, evaluator, lifted[None, :])
        if not refined.converged[0]:
            return None
        return refined.points[0]

    return lift


def _projected_candidates(system, null_system, candidates, rng, options, paths):
    """Project the components of the null-vector system to x: (dimension, x points, multiplicity, oracle)."""
    n = system.n_variables
    result = []
    lift = _null_vector_lift(null_system, n)
    for component in candidates.components:
        x_points = component.points[:, :n]
        oracle = _membership_oracle(candidates, component, int(rng.integers(2**31)), lift)
        if component.dimension == 0:
            result.append((0, x_points[:1], component.multiplicity, None))
            continue
        codim = null_system.n_variables - component.dimension
        equations = holding_rows(null_system, codim, component.points, rng)
        _, jacobian = equations.evaluator()[0].evaluate(component.points[:1])
        _, values, vh = np.linalg.svd(jacobian[0])
        rank = int(np.sum(values > 1e-8 * max(values.max(initial=0), 1)))
        tangent = vh[rank:].conj().T  # kernel basis, (n + c) x dim
        projected = int(np.linalg.matrix_rank(tangent[:n], tol=1e-6)) if tangent.size else 0
        if projected == 0:
            result.append((0, x_points[:1], None, None))
            continue
        # Degree of the projection: slices in x only (projected of them) and in lambda only (the rest).
        fibre = component.dimension - projected
        x_rows = random_rows(rng, projected, null_system.n_variables + 1)
        x_rows[:, 1 + n:] = 0
        l_rows = random_rows(rng, fibre, null_system.n_variables + 1)
        l_rows[:, 1:1 + n] = 0
        target_rows = np.vstack([x_rows, l_rows])
        held, block = held_parts(equations.combined(codim, rng))
        run = track_moves(held + [linear_form(r) for r in component.slice_rows],
                          held + [linear_form(r) for r in target_rows], component.points, rng,
                          options.decompose.witness.tracker, held=block)
        run.counts.add_to(paths)
        ends = run.affine_endpoints()
        ends = ends[np.all(np.isfinite(ends), axis=1)][:, :n]
        if len(ends) == 0:
            continue
        labels = cluster_labels(ends, 1e-6)
        distinct = np.array([ends[g[0]] for g in groups(labels)])
        result.append((projected, distinct, None, oracle))
    return result


def singular_locus(system, options=None, seed=None, progress=None):
    """Every singular point and singular component of X = V(F), with dimension, degree and evidence.

    Parameters
    ----------
    system : PolynomialSystem
        Affine or projective.
    options : SingularOptions, optional
    seed : int, optional
        Drawn and recorded when not given.
    progress : Progress, optional
        Told a message as each stage starts (:mod:`numag.run.progress`).

    Returns
    -------
    SingularLocus
    """
    options = (options or SingularOptions()).validated(system)
    require_numeric(system)
    seed = resolved_seed(seed)
    if system.projective:
        return _in_user_units(system, options, seed, progress)[0]
    started = time.perf_counter()
    try:
        locus, dropped = _in_user_units(system, options, seed, progress, stop_when_far=True)
    except _FarCandidates as far:  # the candidates sit far from the origin relative to their spread (decision 0083)
        whole = _computed_centred(system, options, seed, progress, far.centring, far.paths)
        if whole is not None:
            whole.seconds = time.perf_counter() - started  # both runs
            return whole
        locus, dropped = _in_user_units(system, options, seed, progress)
    if _left_doubt(locus):  # a second look centred where the equations' subleading forms vanish (decision 0083)
        centring = _subleading_centring(system)
        whole = None if centring is None else _computed_centred(system, options, seed, progress, centring,
                                                                locus.paths, first=locus)
        if whole is not None:
            return whole
    _judged_centred(system, options, seed, progress, locus, dropped)
    return locus


def _in_user_units(system, options, seed, progress, stop_when_far=False):
    """:func:`singular_locus` without the centred second look: (locus, dropped candidates in the user's units).

    ``stop_when_far``: raise :class:`_FarCandidates` as soon as a codimension's isolated candidates sit far from the
    origin relative to their spread (:func:`_far_centring`), before they are judged (decision 0083).
    """
    scaling = Scaling.balancing(system)
    def stop_if_far(points, paths):  # points in the computed units
        centring = _far_centring(scaling.to_user(points)) if len(points) > 1 else None
        if centring is not None:
            raise _FarCandidates(centring, dict(paths))

    stop = stop_if_far if stop_when_far else None
    locus, dropped = _singular_locus(scaling.scale_system(system), options, seed, progress, stop)
    for component in locus.components:
        if component.at_infinity:
            component.points = normalize_projective(scaling.homogeneous_to_user(component.points))
        elif system.projective:
            component.points = normalize_projective(scaling.to_user(component.points))
        else:
            component.points = scaling.to_user(component.points)
    if locus.variety is not None and not system.projective:
        locus.variety = locus.variety.in_units(scaling, system, to_user=True)
    locus.embedded = [scaling.to_user(point) for point in locus.embedded]  # affine points only (_affine)
    for component in locus.embedded_components:  # affine only (_affine)
        component.points = scaling.to_user(component.points)
    locus.system, locus.scaling = system, scaling
    locus.near_singular = _near_singular(system, scaling, dropped, locus.discarded)
    _vanishing_jacobians(dropped, locus.discarded)
    if not system.projective:
        for candidate in dropped:
            candidate.candidate, candidate.refined = scaling.to_user(np.array([candidate.candidate,
                                                                                candidate.refined]))
    locus.options = options
    return locus, dropped


#: The first run's singular candidates whose centre lies farther from the origin than this many times their spread
#: are computed again, all of them, in coordinates centred there (decision 0083). Ratios met: two circles of radius
#: 5 about (c, -2c), (c + 6, -2c) give about 0.5 at c = 0, 5 at c = 12, 46 at c = 123, 460 at c = 1234.
_FAR_RATIO = 10


class _FarCandidates(Exception):
    """The first run's isolated candidates sit far from the origin relative to their spread: where to centre, and
    the paths tracked so far (for the note)."""

    def __init__(self, centring, paths):
        super().__init__("singular candidates far from the origin")
        self.centring, self.paths = centring, paths


def _far_centring(points):
    """Where to centre the whole computation when singular candidates sit far from the origin, or None.

    The isolated candidates of a codimension (endpoints of the minors or null-vector system, before they are
    judged) mark where X's singular features are; their bounding box says how large that region is. When its
    centre lies more than ``_FAR_RATIO`` times the region's radius from the origin, double precision sees the
    features through cancellations of terms of the size of the distance (two circles of radius 5 about
    (1234, -2468): both nodes lost to failed paths, or silently in units of 1000). The centre is an exact decimal
    on a grid a tenth of the region's radius, so the centred coefficients stay short (integers for the circles).
    The rule is translation- and scale-free: only the ratio of the distance to the spread counts. Fewer than two
    distinct candidates tell no spread: None.

    Parameters
    ----------
    points : ndarray, shape (K, n)
        Candidates in the user's coordinates (non-finite rows are ignored).

    Returns
    -------
    Centring or None

    Examples
    --------
    >>> points = np.array([[1231.17, -2468.0], [1242.83, -2468.0], [1237.0, -2468.0]])
    >>> [c.to_text() for c in _far_centring(points).centre]
    ['1237', '-2468']
    >>> _far_centring(points - points[2]) is None  # the same geometry at the origin
    True
    """
    points = np.asarray(points, dtype=complex)
    points = points[np.all(np.isfinite(points), axis=1)]
    if len(points) < 2:
        return None
    centre = (points.real.min(0) + points.real.max(0)) / 2 + 1j * (points.imag.min(0) + points.imag.max(0)) / 2
    spread = float(np.max(np.linalg.norm(points - centre[None, :], axis=1)))
    distance = float(np.linalg.norm(centre))
    if spread <= _DUPLICATE_RADIUS * (1 + distance) or distance <= _FAR_RATIO * spread:
        return None
    if np.linalg.norm(centre.imag) <= spread:  # a real centre keeps real equations real (conjugate pairs)
        centre = centre.real.astype(complex)
    # on a grid a tenth of the spread (short decimals); the whole computation is centred: no region
    return replace(centre_in_region(centre, spread), radius=np.inf)


#: A point whose largest scaled residual is above this is off X (no refinement is tried from there; the cascade's
#: bound for endpoints alike).
_OFF_X_RESIDUAL = 1e-3

#: Counts of a run that leave doubt whether every singular point was found (each is a completeness warning).
_DOUBT_COUNTS = ("not_settled_on_X", "smooth_with_vanishing_jacobian", "merged_on_refinement",
                 "unresolved_multiple_endpoint", "tangent_dimension_mismatch", "missed_in_centred_coordinates",
                 "found_beyond_centred_region",
                 "unexplained_endpoint")


def _left_doubt(locus):
    """Whether a run left doubt that every singular point was found (failed paths, unsettled candidates, ...)."""
    return bool(sum(locus.paths.get(label, 0) for label in FAILURE_LABELS)
                or any(locus.discarded.get(key, 0) for key in _DOUBT_COUNTS) or locus.near_singular
                or (locus.variety is not None and locus.variety.unconfirmed))


def _doubt_beyond_regions(locus):
    """Whether a run left doubt that no regional look (:func:`_judged_centred`) withdraws: failed paths, an
    unconfirmed decomposition, or counts other than the doubtful candidates' own."""
    withdrawn = ("smooth_with_vanishing_jacobian", "merged_on_refinement")
    return bool(sum(locus.paths.get(label, 0) for label in FAILURE_LABELS)
                or any(locus.discarded.get(key, 0) for key in _DOUBT_COUNTS if key not in withdrawn)
                or (locus.variety is not None and locus.variety.unconfirmed))


def _subleading_centring(system):
    """An exact centre where every equation's subleading form vanishes (:func:`subleading_centre`), or None.

    None too when that centre is the origin (nothing to move) or the leading forms do not determine it.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> surface = parse_system(["(x - 1234)^4 - (x - 1234)^2 + (y + 2345)^4 - (y + 2345)^2 - 1/4"], ["x", "y"])
    >>> [c.to_text() for c in _subleading_centring(surface).centre]
    ['1234', '-2345']
    """
    centre = subleading_centre(system)
    if centre is None:
        return None
    if np.linalg.norm(centre.imag) <= 1e-12 * (1 + np.linalg.norm(centre)) and system.has_real_coefficients:
        centre = centre.real.astype(complex)  # rounding only: real equations keep a real centre
    centring = centre_near(centre, np.inf)
    return None if not np.any(centring.point) else centring


def _computed_centred(system, options, seed, progress, centring, first_paths, first=None):
    """The whole singular locus computed in coordinates centred at ``centring``, moved back (decision 0083).

    The centred run (with its own look at doubtful candidates, decision 0071) is the answer: it is what the same
    geometry gets at the origin. ``first_paths``: the paths the first run tracked (for the note). ``first``: the
    first run when it was completed and left doubt (the subleading centre); then a singular point of it the
    centred run lacks is kept (it passed the Jacobian check; judged again in the centred coordinates, it is dropped
    there when off X or smooth) and counted ``missed_in_centred_coordinates`` (the
    two runs disagree: exit 3), and a centred run that left doubt itself does not replace it (None). None too
    when the centred system is too large to write.
    """
    if progress is not None:
        progress(f"computing the singular locus again in coordinates centred at {short_point(centring.point)}")
    try:
        centred = centred_system(system, centring)
    except LimitError:  # the first run (again, in full) is the answer
        return None
    locus, dropped = _in_user_units(centred, options, seed, progress)
    if first is None or not _doubt_beyond_regions(locus):
        # (the regional looks withdraw only their candidates' counts: a centred run with other doubt is not taken
        # after them either, and they would repeat the regional looks the first run gets next)
        _judged_centred(centred, options, seed, progress, locus, dropped)
    if first is not None and _left_doubt(locus):
        first.notes.append(f"Coordinates centred at {short_point(centring.point)} (where the equations' subleading "
                           "forms vanish) left doubt too: the first run's answer is kept (decision 0083).")
        return None
    shift = centring.point
    kept = [] if first is None else [
        c for c in first.components if not c.at_infinity and c.dimension == 0 and c.kind is PieceKind.SINGULAR
        and not any(_same_point(c, other) for other in _centred_points(system, centring, replace(
            centring, point=np.zeros_like(shift)), locus))]
    kept = _judged_again(centred, shift, kept, locus, locus.notes, options, seed, "decision 0083")
    for component in locus.components:
        if not component.at_infinity:  # points at infinity do not move under a translation
            component.points = component.points + shift[None, :]
            component.real = _real_flags(system, component.points)
    for point in locus.near_singular:
        point.point = point.point + shift
    locus.embedded = [point + shift for point in locus.embedded]
    for component in locus.embedded_components:
        component.points = component.points + shift[None, :]
        component.real = _real_flags(system, component.points)
    if locus.variety is not None:
        locus.variety = _translated(locus.variety, system, shift)
    if kept:
        locus.discarded["missed_in_centred_coordinates"] = len(kept)
        _set_components(locus, locus.components + kept)
    failed = sum(first_paths.get(label, 0) for label in FAILURE_LABELS)
    why = ("the first run left doubt; the equations' subleading forms vanish there" if first is not None
           else "the singular candidates lie far from the origin relative to their spread")
    locus.notes.append(f"Computed in coordinates centred at {short_point(shift)} ({why}; decision 0083); the first "
                       f"run in the user's coordinates ({counted(first_paths.get('tracked', 0), 'path')}, {failed} "
                       "failed) was replaced.")
    locus.system = system
    if first is not None:
        locus.seconds += first.seconds
    return locus


def _judged_again(centred, shift, pieces, local, notes, options, seed, why):
    """The first run's singular points that a centred run lacks, judged again in its coordinates: those to keep.

    Judged where the features have their own sizes, a point off X or smooth there was no singular point (dropped,
    with a note); one that refines onto a point the centred run found is that point (dropped). The others passed
    the Jacobian check in both coordinates and the centred run missed them: they are returned (the caller keeps
    them and counts ``missed_in_centred_coordinates``, exit 3), so the two runs' disagreement is never silent.

    Parameters
    ----------
    centred : PolynomialSystem
        The system in y = x - ``shift``.
    shift : ndarray
    pieces : list of SingularComponent
        Isolated affine singular points of the first run, in the original coordinates.
    local : SingularLocus
        The centred run (its points in the centred coordinates).
    notes : list of str
        Where the note on refuted points goes.
    options : SingularOptions
    seed : int
    why : str
        The decision the note names.

    Returns
    -------
    list of SingularComponent
    """
    if not pieces:
        return []
    check_options = CheckOptions(max_digits=options.digits, backward_errors=False, point_tolerance=POINT_TOLERANCE)
    moved = np.array([c.points[0] - shift for c in pieces])
    verdicts = _judge_all(centred, list(moved), check_options, seed, local.variety)
    # Newton cannot settle a point where f is far from zero and J vanishes (the quartic's centre, f = 4 there,
    # taken for a node in the first run's units): off X when its residual is far above any tolerance
    evaluator, sizes = equation_evaluator(centred)
    off = largest_scaled_residual(sizes, evaluator, moved) > _OFF_X_RESIDUAL
    refuted = [(v is None and far_off) or (v is not None and v.verdict in (Verdict.OFF, Verdict.SMOOTH,
                                                                           Verdict.EMBEDDED))
               for v, far_off in zip(verdicts, off)]
    found = [c.points[0] for c in local.components if not c.at_infinity and c.dimension == 0]
    same = [v is not None and v.verdict is Verdict.SINGULAR and any(
        np.linalg.norm(np.asarray(v.point) - f) <= _DUPLICATE_RADIUS * (1 + np.linalg.norm(f + shift))
        for f in found) for v in verdicts]
    if sum(refuted):
        notes.append(f"{counted(sum(refuted), 'singular point')} of the first run judged again in the centred "
                     f"coordinates: not singular points of X there ({why}).")
    return [c for c, no, known in zip(pieces, refuted, same) if not (no or known)]


def _translated(variety, system, shift):
    """A decomposition computed in y = x - s moved to x: points + s, slices a0 + a.y = 0 -> (a0 - a.s) + a.x = 0."""
    moved = []
    for component in variety.components:
        rows = np.asarray(component.slice_rows, dtype=complex)
        if len(rows):
            rows = np.concatenate([rows[:, :1] - rows[:, 1:] @ shift[:, None], rows[:, 1:]], axis=1)
            rows = rows / np.linalg.norm(rows, axis=1, keepdims=True)  # unit rows, as everywhere else
        moved.append(replace(component, points=component.points + shift[None, :], slice_rows=rows))
    return replace(variety, system=system, components=moved)


def _doubtful(candidate):
    """Whether a dropped isolated candidate left a doubt that a centred second look may settle."""
    if candidate.dimension != 0:
        return False
    if candidate.unexplained:
        # not where its region's centre rounds to the origin: there Newton judged it in its own units (decision
        # 0064: a loop's centre, a stationary point of f off X), and centring would change nothing (decision 0090)
        point = np.asarray(candidate.candidate, dtype=complex)
        return bool(np.all(np.isfinite(point))) and bool(np.any(centre_in_region(
            point, _CANDIDATE_TOLERANCE * (1 + float(np.linalg.norm(point))), grid=_REGION_GRID).point))
    return candidate.merged or candidate.unresolved or (
        candidate.smallest is not None and candidate.smallest < _VANISHING_JACOBIAN)


#: A doubtful candidate's region is centred on a decimal grid this fraction of its radius (decision 0090): coarse
#: enough that an endpoint's error (1e-9 relative) leaves no terms in the centred system, fine enough for the
#: smallest features decision 0071 settles (a loop of 1e-5 in a region of 3e-3).
_REGION_GRID = 1e-3


def _judged_centred(system, options, seed, progress, locus, dropped):
    """Settle doubtful candidates by solving again in coordinates centred at them (decision 0071), in place.

    A candidate judged smooth where J nearly vanishes, one refined onto a point found before, or a multiple
    endpoint that refinement moved farther than two points are told apart is what features far smaller than
    their distance from the origin look like: double precision cannot see them in the expanded polynomial.
    Around each such candidate (``_CANDIDATE_TOLERANCE`` relative, and at least twice the way refinement moved
    it) the system is written exactly in y = x - s (:mod:`numag.system.centred`) and its singular locus
    computed; when that run is clean in the region, its isolated points there replace the first run's and the
    warnings it settles are withdrawn. Otherwise the warnings stay (exit 3); a multiple endpoint had none.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> # two nodes 2e-3 apart at (1, 2): the first run's only candidate is the stationary point between them
    >>> locus = singular_locus(parse_system(["(y - 2)^2 - ((x - 1)^2 - 1/1000000)^2"], ["x", "y"]), seed=1)
    >>> sorted(float(round(c.points[0][0].real, 6)) for c in locus.isolated() if not c.at_infinity)
    [0.999, 1.001]
    """
    doubts = [candidate for candidate in dropped if _doubtful(candidate)]
    centrings, members = [], []
    for candidate in doubts:
        point = np.asarray(candidate.candidate, dtype=complex)
        if not np.all(np.isfinite(point)):
            continue
        # the region a candidate speaks for, and at least twice the way refinement moved it (the points it may
        # have stood for lie around where it was, up to there)
        moved = float(np.linalg.norm(np.asarray(candidate.refined, dtype=complex) - point))
        radius = max(_CANDIDATE_TOLERANCE * (1 + float(np.linalg.norm(point))), 2 * moved if np.isfinite(moved) else 0)
        if np.linalg.norm(point.imag) <= radius:  # a real centre keeps real equations real (conjugate pairs)
            point = point.real.astype(complex)
        home = next((k for k, c in enumerate(centrings) if within(point[None, :], c)[0]), None)
        if home is None:
            # a short decimal, no terms of the endpoint's error; fine enough for features 1e-3 of the region
            # (a loop of 1e-5 in a region of 3e-3: a grid of radius / 10 moved the centre 5 times the loop)
            centrings.append(centre_in_region(point, radius, grid=_REGION_GRID))
            members.append([])
            home = len(centrings) - 1
        members[home].append(candidate)
    for centring, settled in zip(centrings, members):
        if progress is not None:
            progress(f"judging {counted(len(settled), 'doubtful candidate')} again in coordinates centred at "
                     f"{short_point(centring.point)}")
        try:
            centred = centred_system(system, centring)
            # endpoints Newton left at a stationary point of the residual: where an equation's Taylor coefficients
            # there prove that X has no point in the region (twice it, as a drifted candidate is counted), there
            # is nothing to find, and the whole singular locus is not computed again (a critical point of a
            # nodal surface off X took minutes in centred coordinates)
            if all(candidate.unexplained for candidate in settled) and has_no_zero_near_origin(
                    centred, 2 * centring.radius):
                locus.notes.append(f"{counted(len(settled), 'endpoint')} Newton left near "
                                   f"{short_point(centring.point)} lie where X has no point within "
                                   f"{2 * centring.radius:.1e} (a bound on the equations' Taylor coefficients "
                                   "there): no singular point is missing there.")
                continue
            local, local_dropped = _in_user_units(centred, options, seed, None)
        except LimitError as err:  # the centred polynomial is too large to write: the warnings stay
            locus.notes.append(f"Centred coordinates at {short_point(centring.point)} not tried ({err}).")
            continue
        add_path_counts(locus.paths, {key: value for key, value in local.paths.items()
                                      if key not in ("degree_check_failed",)})
        here = replace(centring, point=np.zeros_like(centring.point))  # the region in the centred coordinates
        # a candidate the centred run could not settle counts where it was (twice the region: it may have drifted)
        near = replace(here, radius=2 * here.radius)
        doubt = (sum(local.paths.get(label, 0) for label in FAILURE_LABELS)
                 or any(local.discarded.get(key, 0) for key in _GLOBAL_DOUBTS)
                 or any(d.unsettled and not (np.all(np.isfinite(d.candidate)) and not within(d.candidate[None, :],
                                                                                             near)[0])
                        for d in local_dropped)
                 or any(_doubtful(d) and within(d.candidate[None, :], here)[0] for d in local_dropped)
                 or any(within(p.point[None, :], here)[0] for p in local.near_singular)
                 or any(not c.at_infinity and c.dimension > 0 for c in local.components))
        if doubt:
            # Not settled, but what the centred run found is found: its singular points in the region join the
            # first run's (the cusp at (7, 7): the first run's two multiple endpoints refined onto 2 of the 4
            # points, the centred run found all 4 and one candidate it could not settle on X). A multiple endpoint
            # kept as a singular point had no warning of its own: it is counted now, so that a point it stood for
            # and that neither run found is never lost silently (decision 0071, addendum).
            # (not where the centred run found a singular curve, or doubts its own decomposition: isolated
            # points there may lie on a piece it missed)
            if not (any(not c.at_infinity and c.dimension > 0 for c in local.components)
                    or any(local.discarded.get(key, 0) for key in _GLOBAL_DOUBTS)):
                # one point found by both runs is taken from the centred one (computed in the features' own units:
                # a multiple endpoint of the first run can refine to within 1e-6 of the point only)
                centred = _centred_points(system, centring, here, local)
                _set_components(locus, [c for c in locus.components if not any(_same_point(d, c) for d in centred)]
                                + centred)
            unresolved = sum(1 for candidate in settled if candidate.unresolved)
            if unresolved:
                locus.discarded["unresolved_multiple_endpoint"] = \
                    locus.discarded.get("unresolved_multiple_endpoint", 0) + unresolved
            unexplained = sum(1 for candidate in settled if candidate.unexplained)
            if unexplained:  # where they ended nothing is settled: a point they stood for may be missing
                locus.discarded["unexplained_endpoint"] = locus.discarded.get("unexplained_endpoint", 0) + unexplained
            locus.notes.append(f"Coordinates centred at {short_point(centring.point)} did not settle "
                               f"{counted(len(settled), 'doubtful candidate')} there either.")
            continue
        found = _centred_points(system, centring, here, local)
        replaced = [c for c in locus.components if not (c.at_infinity or c.dimension > 0)
                    and within(c.points[:1], centring)[0]]
        # a singular point of the first run the centred run lacks is judged again there, never dropped unseen
        # (a centred run that decomposed X wrong had found nothing and lost a node: decision 0090)
        missed = _judged_again(centred, centring.point, [c for c in replaced if not any(
            _same_point(c, d) for d in found)], local, locus.notes, options, seed, "decision 0090")
        # the centred run is a whole singular locus: a point it found outside the region that the first run lacks
        # (a doubtful candidate that stood for a node 1.6 radii away) is listed and flagged, never dropped unseen:
        # the two runs disagree there (decision 0071 amendment)
        beyond = [c for c in _centred_points(system, centring, replace(here, radius=np.inf), local)
                  if not within(c.points[:1], centring)[0] and not any(_same_point(c, d) for d in locus.components)]
        _set_components(locus, [c for c in locus.components if not any(c is r for r in replaced)] + found + missed
                        + beyond)
        if beyond:
            locus.discarded["found_beyond_centred_region"] = \
                locus.discarded.get("found_beyond_centred_region", 0) + len(beyond)
        if missed:
            locus.discarded["missed_in_centred_coordinates"] = \
                locus.discarded.get("missed_in_centred_coordinates", 0) + len(missed)
        inside = [c for c in locus.components if not c.at_infinity and c.dimension == 0
                  and within(c.points[:1], centring)[0]]
        if inside:  # singular as written: a near-singular report there (smooth as written) is withdrawn
            locus.near_singular = [p for p in locus.near_singular if not within(p.point[None, :], centring)[0]]
        for candidate in settled:
            if candidate.unresolved or candidate.near_singular or candidate.unexplained:  # no count to withdraw
                continue
            key = "merged_on_refinement" if candidate.merged else "smooth_with_vanishing_jacobian"
            locus.discarded[key] -= 1
            if locus.discarded[key] == 0:
                del locus.discarded[key]
            locus.discarded["settled_in_centred_coordinates"] = \
                locus.discarded.get("settled_in_centred_coordinates", 0) + 1
        locus.notes.append(f"{counted(len(settled), 'doubtful candidate')} near {short_point(centring.point)} "
                           "judged again in coordinates centred there (features far smaller than their distance "
                           "from the origin; decision 0071).")


def _centred_points(system, centring, here, local):
    """The centred run's isolated singular points in the region, moved back to the original coordinates."""
    moved = []
    for component in local.components:
        if component.at_infinity or component.dimension > 0 or not within(component.points[:1], here)[0]:
            continue
        points = component.points + centring.point[None, :]
        moved.append(replace(component, points=points, real=_real_flags(system, points),
                             notes=component.notes + ["Found in coordinates centred nearby (decision 0071)."]))
    return moved


def _same_point(piece, other):
    """Whether two isolated affine pieces are one point (within ``_DUPLICATE_RADIUS``, relative)."""
    if piece.at_infinity or other.at_infinity or piece.dimension > 0 or other.dimension > 0:
        return False
    point = piece.points[0]
    return bool(np.linalg.norm(other.points[0] - point) <= _DUPLICATE_RADIUS * (1 + np.linalg.norm(point)))


def _set_components(locus, components):
    """Replace the locus' pieces, in the report's order and numbered from 1."""
    locus.components = sorted(components, key=lambda c: (c.at_infinity, -c.dimension, -c.degree))
    for k, component in enumerate(locus.components, 1):
        component.id = k


#: Counts of a centred run that leave doubt anywhere, so also in the region it was asked about.
_GLOBAL_DOUBTS = ("tangent_dimension_mismatch",)


def _near_singular(system, scaling, dropped, discarded):
    """The dropped candidates the input's precision cannot tell from singular points (decision 0062).

    Each candidate's backward error (:func:`~numag.singular.nearness.backward_error`) is measured for the
    coefficients as written (in the balanced units) at the candidate itself, at the point of X the check
    refined it to and where the singular-point system settles from it; the smallest counts. Those within :func:`~numag.singular.nearness.input_tolerance` are
    returned and no longer counted as dropped.
    """
    tolerance = input_tolerance(system)
    if tolerance is None or not dropped:
        return []
    near, balanced = [], scaling.scale_system(system)  # measured in the balanced units (1: the numbers' size)
    for candidate in (d for d in dropped if d.judged_smooth):
        error, point = nearest_backward_error(balanced, [candidate.candidate, candidate.refined],
                                              candidate.codimension)
        point = normalize_projective(scaling.to_user(point)) if system.projective else scaling.to_user(point)
        if error <= tolerance:
            near.append(NearSingularPoint(point=point, backward_error=error, tolerance=tolerance,
                                          codimension=candidate.codimension,
                                          real=bool(_real_flags(system, point[None, :])[0])))
            discarded["smooth_on_check"] -= 1
            candidate.near_singular = True
    if discarded.get("smooth_on_check") == 0:
        del discarded["smooth_on_check"]
    return near


def _singular_locus(system, options, seed, progress, stop=None):
    """:func:`singular_locus` in the units of ``system`` (already scaled); ``stop`` as in :func:`_affine`."""
    started = time.perf_counter()
    rng = np.random.default_rng(seed)
    paths, discarded, notes, routes = {}, {}, [], []
    dropped = []  # isolated candidates the check called smooth: their backward errors are measured
    embedded = []  # candidates the check called embedded points of the equations (decision 0105)
    embedded_components = []  # ... and candidate sets of positive dimension so called at a witness point (0108)
    start = {"asked": options.start.value, "codimensions": routes}
    if linear_space(system) is not None:  # J is constant of full rank on X: no singular point, no homotopy
        variety = decompose(system, options.decompose, seed=int(rng.integers(2**32)), progress=progress)
        return SingularLocus(system=system, components=[], variety=variety, paths=paths, discarded=discarded,
                             seed=seed, seconds=time.perf_counter() - started,
                             notes=["every equation is linear: X is a linear space (or empty), smooth at every "
                                    "point, with no singular point"]), dropped
    if system.projective:
        if system.n_equations == 1 and options.formulation in (Formulation.AUTO, Formulation.GRADIENT):
            if options.start is not StartKind.TOTAL_DEGREE:
                routes.append({"codimension": 1, "route": "gradient system (total degree)",
                               "why": "a projective hypersurface: the zeros of its partials form a projective "
                                      "system, which has the total-degree start only"})
                notes.append(f"The {options.start.value} start was not used: {routes[-1]['why']}.")
            try:
                components, variety = _projective_gradient(system, rng, paths, discarded, progress, dropped), None
            except _NotIsolated as reason:
                if options.formulation is Formulation.GRADIENT:  # asked for by name: say why it cannot serve
                    raise InputError(f"{reason}; use the minors formulation (--formulation minors)") from None
                # the gradient's zeros are not isolated (a singular curve, or a cone): the chart route with its
                # minors finds sets of every dimension; the gradient paths tracked stay counted
                discarded.clear()
                dropped.clear()
                routes.append({"codimension": 1, "route": "minors in a random chart",
                               "why": f"{reason}: the gradient system finds isolated points only"})
                components, variety = _projective_chart(system, options, rng, paths, discarded, notes, progress,
                                                        routes, dropped)
        else:
            components, variety = _projective_chart(system, options, rng, paths, discarded, notes, progress, routes,
                                                    dropped)
    else:
        components, variety = _affine(system, options, rng, paths, discarded, progress, notes, routes, dropped,
                                      stop, embedded, embedded_components)
        _real_samples_of_linear_pieces(system, components, variety, seed)
        if options.start is not StartKind.TOTAL_DEGREE and variety is not None and variety.extra.get("start"):
            start["regeneration_of_X"] = variety.extra["start"]
        if system.n_equations == 1:
            listed, note = _at_infinity(system, rng, paths, progress, any(c.dimension > 0 for c in components),
                                        max((c.dimension for c in components if not c.at_infinity and c.kind in (
                                            PieceKind.SINGULAR, PieceKind.NON_REDUCED)), default=-1))
            components += listed
            if note is not None:  # why some points at infinity are not listed (true for its case)
                notes.append(note)
        elif options.infinity_for_systems:
            components += _at_infinity_of_homogenized(system, options, rng, paths, discarded, notes, progress)
        else:
            notes.append("Singular points at infinity are not searched for systems of several equations unless "
                         "asked for (--at-infinity): it is a second computation of the same size, on V(F^h), "
                         "which can be larger than the closure of X.")
    components.sort(key=lambda c: (c.at_infinity, -c.dimension, -c.degree))
    for k, component in enumerate(components, 1):
        component.id = k
    if system.n_equations == 1 and system.polynomials[0].degree >= 2:
        # The gradient of a degree-d hypersurface has at most (d - 1)^n isolated zeros (Bezout), so no
        # more singular points can exist; more found means one was counted twice.
        isolated = sum(1 for c in components if c.dimension == 0 and not c.at_infinity)
        bound = (system.polynomials[0].degree - 1) ** system.ambient_dimension
        if isolated > bound:
            paths["degree_check_failed"] = paths.get("degree_check_failed", 0) + 1
            notes.append(f"{isolated} isolated singular points found, more than the (d - 1)^n = {bound} a "
                         "hypersurface of this degree can have: some point was counted twice.")
    return SingularLocus(system=system, components=components, variety=variety, paths=paths, discarded=discarded,
                         seed=seed, seconds=time.perf_counter() - started, notes=notes, start=start,
                         embedded=embedded, embedded_components=embedded_components), dropped


def _structured_start(system, variety, codimension, options, rng, paths, progress):
    """Sing(X) for one codimension from the square null-vector system with ``options.start``, where it applies.

    Returns ``(search, route)``: the :class:`~numag.singular.isolated.FiniteSingularSearch` when it
    proved Sing(X) finite (else None: the caller takes the witness sets), and the route's block of
    the report (``codimension``, ``route``, ``why``, and ``searches`` when any square system was solved).
    """
    n = system.n_variables
    route = {"codimension": codimension, "route": "witness sets"}
    lowest = options.decompose.witness.lowest_dimension
    if system.n_equations != codimension:
        route["why"] = (f"{system.n_equations} equations for codimension {codimension}: X is no complete "
                        "intersection there")
    elif any(c.dimension != n - codimension for c in variety.components):
        route["why"] = "X has components of several dimensions"
    elif not all(c.reduced for c in variety.components):
        route["why"] = "X has a non-reduced component (singular along all of it)"
    elif lowest is not None and lowest > 0:
        route["why"] = "--lowest-dimension leaves out the singular points"
    elif options.start is StartKind.AUTO and not _square_route_pays(system, variety, codimension, options, route):
        route["why"] = (f"the witness sets cost less (an estimated {route['estimates']['witness sets']} paths, against "
                        f"{sum(route['estimates']['square null-vector system'])} of the square null-vector system at "
                        f"{SQUARE_ROUTE_PATH_COST} times the cost of each, their endpoints on Sing(X) being singular)")
    else:
        if progress is not None:
            progress(f"codimension {codimension}: the square null-vector system, {options.start.value} start")
        try:
            search = finite_singular_points(system, options.start.value, rng)
        except InputError as err:  # a start that does not apply to this system (named in the message)
            route["why"] = str(err)
            return None, route
        add_path_counts(paths, search.path_counts)
        route.update(why=search.reason, searches=search.searches)
        if search.finite:
            route["route"] = "square null-vector system"
            return search, route
    return None, route


def _witness_formulation(system, variety, codimension, options):
    """The formulation of the witness sets for this codimension (AUTO and GRADIENT resolved by estimated paths)."""
    formulation = options.formulation
    if formulation in (Formulation.AUTO, Formulation.GRADIENT):
        n = system.n_variables
        exact = math.comb(system.n_equations, codimension) * math.comb(n, codimension) <= options.max_exact_minors
        formulation = Formulation.MINORS if exact or (
            _estimated_paths(system, variety, codimension, Formulation.MINORS)
            <= _estimated_paths(system, variety, codimension, Formulation.NULL_VECTOR)) \
            else Formulation.NULL_VECTOR
    return formulation


def _square_route_pays(system, variety, codimension, options, route):
    """``auto``: is the square null-vector route estimated to cost less than the witness sets?

    Both estimates are counts (the same choice on every machine): the 2-homogeneous Bezout numbers of the
    square solves (:func:`~numag.singular.isolated.square_route_paths`), each path weighted by
    :data:`SQUARE_ROUTE_PATH_COST`, against the witness sets' estimated paths (:func:`_estimated_paths`
    of the formulation they would use). Both go to ``route["estimates"]``.
    """
    square = square_route_paths(system)
    formulation = _witness_formulation(system, variety, codimension, options)
    witness = int(math.ceil(_estimated_paths(system, variety, codimension, formulation)))
    route["estimates"] = {"square null-vector system": square, "witness sets": witness,
                          "witness formulation": formulation.value, "square path cost": SQUARE_ROUTE_PATH_COST}
    return estimated_cost(StartKind.MULTIHOMOGENEOUS, sum(square), singular_endpoints=sum(square)) < \
        estimated_cost(StartKind.TOTAL_DEGREE, witness)


#: What an embedded point of the equations is (decision 0105), said with the points a locus lists apart.
EMBEDDED_EXPLANATION = ("the Jacobian of the given equations drops rank there, but each lies on one reduced component "
                        "of X with multiplicity 1 at it, so X is smooth there: the equations do not cut X out "
                        "reduced at these points (embedded points), which are not singular points of X")


def _affine(system, options, rng, paths, discarded, progress, notes_out=None, routes=None, dropped=None,
            stop=None, embedded=None, embedded_components=None):
    """Singular pieces of an affine X by decomposing F + minors for each codimension of X.

    ``routes`` (a list) receives the route of each codimension when a start other than total degree is
    asked for (:func:`_structured_start`); ``dropped`` (a list) the isolated candidates the check called
    smooth (:class:`_Dropped`), for their backward errors. ``stop(points, paths)`` (optional) is shown each
    codimension's isolated candidates before they are judged, and may raise to end the run (decision 0083).
    """
    if progress is not None:
        progress("decomposing X")
    notes_out = [] if notes_out is None else notes_out
    routes = [] if routes is None else routes
    # the start asked for serves X's regeneration too (the file's groups, or the best found)
    variety = decompose(system, options.decompose.with_start(options.start), seed=int(rng.integers(2**32)),
                        progress=progress)
    add_path_counts(paths, variety.paths)
    n = system.n_variables
    found, oracles = [], []  # the pieces kept, and for each positive-dimensional one its membership test
    codimensions = sorted({n - c.dimension for c in variety.components})
    check_options = CheckOptions(max_digits=options.digits, backward_errors=False,  # measured in _near_singular
                                 point_tolerance=POINT_TOLERANCE)
    formulations = {}  # codimension -> the formulation asked for after the minors' witness sets split (0115)
    minors_tried = {}  # codimensions computed again in the minors formulation (decision 0150): once each
    inside = []  # ids of the non-reduced components whose inside is searched (decision 0140)
    queue = list(codimensions)
    while queue:
        codimension = queue.pop(0)
        if codimension == 0:
            continue
        # what this codimension adds, forgotten when it is computed again in another formulation (0115)
        before = (len(found), len(notes_out), len(routes), dict(discarded),
                  *(len(out) if out is not None else 0 for out in (dropped, embedded, embedded_components)))
        search = None
        if options.start is not StartKind.TOTAL_DEGREE:
            search, route = _structured_start(system, variety, codimension, options, rng, paths, progress)
            routes.append(route)
            if search is None:
                notes_out.append(f"codimension {codimension}: the {options.start.value} start was not used "
                                 f"({route['why']}); witness sets instead.")
        if search is not None:  # Sing(X) proven finite: its points, with the paths ending there
            kind = CandidateSystem.NULL_VECTOR
            projected = [(0, point[None, :], int(multiplicity), None)
                         for point, multiplicity in zip(search.points, search.multiplicities)]
        else:
            formulation = formulations.get(codimension) or _witness_formulation(system, variety, codimension,
                                                                                options)
            augmented = None
            if formulation is not Formulation.NULL_VECTOR:
                try:
                    augmented, kind = minors_system(system, codimension, rng, options.max_exact_minors,
                                                    evaluate_large=True)
                except LimitError as err:  # the expanded minors are too large: the null-vector form has no minors
                    notes_out.append(f"codimension {codimension}: the minors are too large to expand ({err}); the "
                                     "null-vector formulation was used instead.")
            if augmented is None:
                augmented, kind = null_vector_system(system, codimension, rng), CandidateSystem.NULL_VECTOR
            if progress is not None:
                progress(f"codimension {codimension}: decomposing the {kind} system ({augmented.n_equations} equations "
                         f"in {augmented.n_variables} unknowns)")
            # the null-vector system's regeneration groups x and lambda (bilinear equations: decision 0070)
            decompose_options = options.decompose.with_start(
                options.start, null_vector_groups(augmented, n), GroupSource.NULL_VECTOR) \
                if kind is CandidateSystem.NULL_VECTOR else options.decompose
            # the candidates' multiple endpoints settle only at small radii (decision 0085)
            decompose_options = replace(decompose_options, witness=replace(
                decompose_options.witness, moved_endgame_radius=CANDIDATE_ENDGAME_RADIUS))
            candidates = decompose(augmented, decompose_options, seed=int(rng.integers(2**32)), progress=progress)
            if routes and routes[-1]["codimension"] == codimension:
                routes[-1]["regeneration"] = candidates.extra.get("start")
            add_path_counts(paths, candidates.paths)
            unexplained = candidates.extra.get("unexplained")
            if dropped is not None and unexplained is not None:
                # endpoints dropped where Newton stalled: a stationary point of the residual, or a singular point
                # too degenerate for Newton in these units (a tacnode at (1234, -2345): every path to it dropped,
                # no candidate left, exit 0): looked at again in centred coordinates (decision 0090)
                dropped.extend(_Dropped(point, point, codimension, None, unexplained=True)
                               for point in np.asarray(unexplained)[:, :n])
            failed = sum(candidates.paths.get(label, 0) for label in FAILURE_LABELS)
            if failed:
                notes_out.append(f"{counted(failed, 'path')} of the {kind} system for codimension {codimension} "
                                 "failed: singular points there may be missing (a singular endpoint the endgame could "
                                 "not settle). Run again with another --seed or --formulation to compare.")
            if kind is CandidateSystem.NULL_VECTOR:
                projected = _projected_candidates(system, augmented, candidates, rng, options, paths)
            else:
                projected = [(c.dimension, c.points, c.multiplicity if c.dimension == 0 else None,
                              _membership_oracle(candidates, c, int(rng.integers(2**31))) if c.dimension else None)
                             for c in candidates.components]
                for c in candidates.components:  # cross-check the slicing dimension by the tangent space
                    if c.dimension > 0 and _tangent_dimension(augmented, c, rng) != c.dimension:
                        discarded["tangent_dimension_mismatch"] = discarded.get("tangent_dimension_mismatch", 0) + 1
        if stop is not None:  # candidates far from the origin relative to their spread: judged in centred coordinates
            stop(np.array([points[0] for dimension, points, _, _ in projected if dimension == 0],
                          dtype=complex).reshape(-1, n), paths)
        if progress is not None and projected:
            progress(f"codimension {codimension}: judging {counted(len(projected), 'candidate set')} by the Jacobian "
                     "criterion")
        fresh = []
        for dimension, points, multiplicity, oracle in projected:
            seen = _already(found, oracles, _Candidate(dimension, len(points), points), points[0])
            if seen is not None:
                discarded[seen] = discarded.get(seen, 0) + 1
            else:
                fresh.append((dimension, points, multiplicity, oracle))
        # every new candidate of this codimension judged in one batched check (decision 0038)
        loose = []
        verdicts = _judge_all(system, [points[0] for _, points, _, _ in fresh], check_options,
                              int(rng.integers(2**31)), variety, loose)
        loosely = []  # the positive-dimensional pieces kept whose witness point is no singular point itself
        hiding = 0  # null-vector candidate sets of this codimension judged smooth: their inside unsearched (0150)
        for (dimension, points, multiplicity, oracle), verdict, settled_loosely in zip(fresh, verdicts, loose):
            candidate = _Candidate(dimension, len(points), points)
            point = points[0]
            seen = _already(found, oracles, candidate, point)  # two candidates of this codimension, one piece
            if seen is not None:
                discarded[seen] = discarded.get(seen, 0) + 1
                continue
            if verdict is None:  # Newton cannot settle the point (a singular curve can make it drift)
                discarded["not_settled_on_X"] = discarded.get("not_settled_on_X", 0) + 1
                if dropped is not None:  # where: a centred look asks whether it lies in its region
                    dropped.append(_Dropped(point, point, codimension, None, unsettled=True,
                                            dimension=candidate.dimension))
                continue
            if verdict.verdict is Verdict.OFF:  # refinement ends at a stationary point of |F|: no point of X is near
                discarded["not_on_X"] = discarded.get("not_on_X", 0) + 1
                continue
            if verdict.verdict is Verdict.EMBEDDED and candidate.dimension > 0:  # decision 0108
                discarded["embedded_component"] = discarded.get("embedded_component", 0) + 1
                if not _smooth_along(verdict, variety):
                    discarded["embedded_component_unsearched"] = discarded.get(
                        "embedded_component_unsearched", 0) + 1
                piece = SingularComponent(
                    id=0, dimension=candidate.dimension, degree=candidate.degree, points=candidate.points,
                    real=_real_flags(system, candidate.points), multiplicity=None, at_infinity=False,
                    formulation=kind, kind=PieceKind.EMBEDDED, on_components=[c["id"] for c in verdict.components],
                    rank=verdict.rank, codimension=verdict.codimension, notes=list(verdict.notes))
                if embedded_components is not None:  # listed apart (never a piece, never hiding a candidate)
                    embedded_components.append(piece)
                else:
                    notes_out.append(f"A candidate (dimension {candidate.dimension}) is no singular set of X: "
                                     f"{EMBEDDED_EXPLANATION} (decision 0108).")
                continue
            if verdict.verdict is Verdict.EMBEDDED:  # X smooth there, listed apart (decision 0105)
                discarded["embedded_point"] = discarded.get("embedded_point", 0) + 1
                if embedded is not None:  # its point, moved to the user's units with the pieces
                    embedded.append(np.asarray(verdict.point, dtype=complex))
                else:
                    notes_out.append(f"A candidate (dimension {candidate.dimension}) is no singular point of X: "
                                     f"{EMBEDDED_EXPLANATION} (decision 0105).")
                continue
            if verdict.verdict is Verdict.SMOOTH:
                discarded["smooth_on_check"] = discarded.get("smooth_on_check", 0) + 1
                if (kind is CandidateSystem.NULL_VECTOR and candidate.dimension > 0
                        and system.n_equations > codimension and verdict.codimension == codimension):
                    hiding += 1
                if dropped is not None and verdict.codimension is not None:
                    # a candidate curve too: two circles of radius 7e-5 at (100, -50) look like two double lines
                    dropped.append(_Dropped(point, np.asarray(verdict.point, dtype=complex), verdict.codimension,
                                            _smallest_value(verdict), dimension=candidate.dimension))
                continue
            through = [c["id"] for c in verdict.components]
            piece_kind = PieceKind.of_verdict(verdict.verdict)
            notes = []
            if piece_kind is PieceKind.NON_REDUCED:
                whole = [c for c in verdict.components if c["dimension"] == candidate.dimension]
                if not whole:
                    notes.append("A proper subset of a non-reduced component of X: the Jacobian cannot decide "
                                 "whether the variety is singular here.")
                    piece_kind = PieceKind.UNDECIDED
                elif candidate.dimension > 0 and not _reduced_structure_smooth(whole, variety):
                    # J vanishes all along the component, so where another component meets it, or where it is
                    # singular itself, no candidate of its own shows (decision 0136): searched by the order of f
                    # after this codimension's pieces (decision 0140)
                    inside.extend(c["id"] for c in whole)
            points = candidate.points
            if candidate.dimension == 0 and np.linalg.norm(verdict.point - point) <= _CANDIDATE_TOLERANCE * (
                    1 + np.linalg.norm(point)):
                points = np.asarray(verdict.point, dtype=complex)[None, :]  # refined at higher precision
                if _already(found, oracles, candidate, points[0]) is not None:
                    # Two candidates apart before refinement, one point after: a double endpoint the endgame left
                    # in two pieces, or two features closer than the unit lets double precision see, one of them
                    # lost (an ellipse of 2e-5 cut by a line far from the origin: both crossings refined to one).
                    # Judged again in coordinates centred there (decision 0071); a warning if that cannot decide.
                    discarded["merged_on_refinement"] = discarded.get("merged_on_refinement", 0) + 1
                    if dropped is not None:
                        dropped.append(_Dropped(point, points[0], verdict.codimension, None, merged=True))
                    continue
            if (dropped is not None and candidate.dimension == 0 and (multiplicity or 1) > 1
                    and np.linalg.norm(points[0] - point) > _DUPLICATE_RADIUS * (1 + np.linalg.norm(point))):
                # Several paths ended together and refinement moved their endpoint farther than two points are
                # told apart: the endgame may have taken a cluster of nearby singular points for one multiple
                # point (a cusp with three crossings within 2e-3 at (7, 7)); a centred second look (decision 0071)
                dropped.append(_Dropped(point, points[0], verdict.codimension, None, unresolved=True))
            found.append(SingularComponent(
                id=0, dimension=candidate.dimension, degree=candidate.degree, points=points,
                real=_real_flags(system, points), multiplicity=multiplicity, at_infinity=False, formulation=kind,
                kind=piece_kind, on_components=through, rank=verdict.rank, codimension=verdict.codimension,
                notes=notes + list(verdict.notes)))
            oracles.append(oracle)
            if settled_loosely and candidate.dimension > 0:
                loosely.append(found[-1])
        # only where the null-vector formulation was asked for: chosen by `auto`, the minors of a large non-complete
        # intersection cost far more (3 x 3 rank <= 1: 28,544 paths, 10,219 failed, against 16 s; two components
        # meeting in C^5: 4 minutes, 1,140 failed, the point still missing), so there the sets stay unsearched and
        # counted below (a completeness warning, exit 3: decision 0153)
        if hiding and search is None and minors_tried.get(codimension) is None \
                and options.formulation is Formulation.NULL_VECTOR:
            # Decision 0150: with more equations than the codimension, lambda^T A J = 0 (A random, c x m) holds on a
            # hypersurface of a component of this codimension besides its rank drops, a candidate set whose generic
            # point is smooth; a point of X where components meet lies on it, not apart ({z x, z y}: the line
            # a1 x + a2 y = 0 of the plane passes through the origin). The minors (rank J < c) hold only at rank drops.
            minors_tried[codimension] = True
            _forget(before, found, oracles, notes_out, routes, discarded, (dropped, embedded, embedded_components))
            formulations[codimension] = Formulation.MINORS
            notes_out.append(f"codimension {codimension}: {counted(hiding, 'candidate set')} of the null-vector "
                             "formulation lay on X's smooth points of this codimension, where a point of X that "
                             "components share is not found apart; computed again in the minors formulation "
                             "(decision 0150).")
            queue.insert(0, codimension)
            continue
        if hiding:  # the minors could not be used, or cost too much: unsearched, never silent (decision 0153)
            discarded["null_vector_inside_unsearched"] = discarded.get("null_vector_inside_unsearched", 0) + hiding
        split = _split_pieces(loosely)
        if split and kind is not CandidateSystem.NULL_VECTOR and options.formulation is not Formulation.MINORS:
            # one multiple component of the minors' equations may have split into several false ones: this
            # codimension again in the null-vector formulation, its pieces judged afresh
            _forget(before, found, oracles, notes_out, routes, discarded, (dropped, embedded, embedded_components))
            formulations[codimension] = Formulation.NULL_VECTOR
            notes_out.append(f"codimension {codimension}: {counted(len(split), 'piece')} of the minors' witness sets "
                             "lay near a singular set without being singular points themselves (a multiple component "
                             "split by rounding); computed again in the null-vector formulation (decision 0115).")
            queue.insert(0, codimension)
            continue
        for piece in split:  # cannot be told from one component split by rounding: undecided, never silent
            piece.kind = PieceKind.UNDECIDED
            piece.notes.append(_SPLIT_NOTE)
    for component_id in dict.fromkeys(inside):  # each non-reduced component once
        _inside_non_reduced(system, variety, component_id, options, rng, paths, discarded, notes_out, found, oracles)
    return found, variety


def _forget(before, found, oracles, notes_out, routes, discarded, outs):
    """Undo what one codimension added (``before``: the lengths and counts taken before it), to compute it again
    in another formulation (decisions 0115, 0150)."""
    del found[before[0]:], oracles[before[0]:], notes_out[before[1]:], routes[before[2]:]
    discarded.clear()
    discarded.update(before[3])
    for out, length in zip(outs, before[4:]):
        if out is not None:
            del out[length:]


def _inside_non_reduced(system, variety, component_id, options, rng, paths, discarded, notes, found, oracles):
    """The singular points of X_red inside a non-reduced component (:func:`~numag.singular.inside.search_inside`):
    its pieces appended to ``found`` as singular pieces, or ``non_reduced_inside_unsearched`` counted where the
    search gives no answer (decision 0140; a completeness warning, exit 3, as in decision 0136)."""
    component = next(c for c in variety.components if c.id == component_id)
    # its points are multiple zeros of the search system: the candidates' endgame radius (decision 0085)
    search_options = replace(options.decompose, witness=replace(options.decompose.witness,
                                                                 moved_endgame_radius=CANDIDATE_ENDGAME_RADIUS))
    search = search_inside(system, variety, component, search_options, seed=int(rng.integers(2**31)))
    add_path_counts(paths, search.paths)
    if search.undecided is not None:
        discarded["non_reduced_inside_unsearched"] = discarded.get("non_reduced_inside_unsearched", 0) + 1
        notes.append(f"Inside the non-reduced component {component_id} of X: not searched ({search.undecided}).")
        return
    for piece in search.pieces:
        candidate = _Candidate(piece.dimension, piece.degree, piece.points)
        # met by another component's search, or inside a larger singular piece (not inside a non-reduced one: the
        # search is for the points inside those)
        kept = [k for k, other in enumerate(found) if other.kind is not PieceKind.NON_REDUCED]
        seen = _already([found[k] for k in kept], [oracles[k] for k in kept], candidate, piece.points[0])
        if seen is not None:
            discarded[seen] = discarded.get(seen, 0) + 1
            continue
        found.append(SingularComponent(
            id=0, dimension=piece.dimension, degree=piece.degree, points=np.asarray(piece.points, dtype=complex),
            real=_real_flags(system, piece.points), multiplicity=None, at_infinity=False,
            formulation=CandidateSystem.HIGHER_PARTIALS, kind=PieceKind.SINGULAR, on_components=piece.through,
            rank=0, codimension=1,
            notes=[f"Inside the non-reduced component {component_id} (multiplicity {search.order}): f vanishes to "
                   f"order > {search.order} here, so X's reduced structure is singular (decision 0140)."
                   if component_id in piece.through else
                   f"Found by the search inside the non-reduced component {component_id} (multiplicity "
                   f"{search.order}), on X's components {piece.through}: f vanishes to order > {search.order} here "
                   f"and none of them has a larger multiplicity, so X's reduced structure is singular (decision "
                   f"0140)."]))
        oracles.append(_membership_oracle(search.decomposition, piece.component, int(rng.integers(2**31)))
                       if piece.dimension else None)
    if not search.pieces:
        notes.append(f"Inside the non-reduced component {component_id} of X (multiplicity {search.order}): f vanishes "
                     f"to order {search.order} everywhere, so X's reduced structure is smooth along it (decision 0140).")


#: Why a piece of :func:`_split_pieces` is undecided.
_SPLIT_NOTE = ("Its witness points are no singular points of X themselves, only near them, as are another piece's: "
               "these pieces may be one multiple component split by rounding (decision 0115).")


def _split_pieces(loosely):
    """The positive-dimensional pieces of one codimension that may be one multiple component split in several.

    A component of multiplicity m in the candidates' equations has witness points accurate to about
    eps^(1/m) of the coordinates' size only: far from the origin, where that is larger than the check's point
    tolerance, each witness point is a singular point only at the looser candidate tolerance (a rank drop near
    it), and the decomposition may split the m points of each witness point's cluster into m false components
    (a triple line 25 from the origin reported as three lines, decision 0115). Two or more pieces of one
    dimension kept that way are returned; one alone is no split.

    Examples
    --------
    >>> _split_pieces([])
    []
    """
    by_dimension = {}
    for piece in loosely:
        by_dimension.setdefault(piece.dimension, []).append(piece)
    return [piece for pieces in by_dimension.values() if len(pieces) > 1 for piece in pieces]


def _smooth_along(verdict, variety):
    """Whether X is known smooth at every point of an embedded component whose generic point got ``verdict``.

    The minors vanish all along the set, so a singular point of X inside it is no component of V(F, minors) of
    its own and no candidate shows it (an embedded line through a cone's vertex: {x (x y - z^2), z (x y - z^2)}).
    X is singular at a point of the set only where the component C through it is singular or meets another
    component (decision 0108). Decided here only when C is a linear space (degree 1: smooth everywhere) and X has
    no other component; otherwise the set is counted ``embedded_component_unsearched`` (a completeness warning).
    """
    if variety is None or len(verdict.components) != 1 or verdict.components[0]["degree"] != 1:
        return False
    return len(variety.components) == 1


def _reduced_structure_smooth(whole, variety):
    """Whether a non-reduced component of X (``whole``: the check's components of its dimension through its witness
    point) is known to hold no singular point of X's reduced structure.

    The Jacobian of F vanishes all along a component of multiplicity m > 1, so the points where X_red is singular
    inside it -- where another component meets it ((x - y)^2 (x + y) at the origin), or where the component is
    singular itself ((y^2 - x^3)^2 at the cusp) -- are no candidates of their own. Known smooth only when the
    component is a linear space (degree 1) and X has no other component; otherwise the component is searched by
    the order of f (:func:`_inside_non_reduced`, decision 0140), or counted ``non_reduced_inside_unsearched`` where
    that search gives no answer (a completeness warning, exit 3; decision 0136).

    Examples
    --------
    >>> _reduced_structure_smooth([{"degree": 1}], None)
    False
    """
    if variety is None or len(whole) != 1 or whole[0]["degree"] != 1:
        return False
    return len(variety.components) == 1


def _judge_all(system, points, options, seed, variety, loose=None):
    """:func:`_judge` for many candidates: one batched check, then :func:`_judge` for the few it leaves open.

    ``loose`` (a list, optional) receives for each candidate whether its verdict is not the batched check's at
    ``options``' point tolerance (the candidate settled only at the looser one, or at a rank drop near it).

    The check decides the clear cases of all points together in double precision and escalates only the
    doubtful ones; one call per candidate repeated the set-up and the escalation for each. A candidate
    the check finds off X (one that drifts) or smooth with a rank drop close by gets the rule of
    :func:`_judge` (the looser tolerance, the verdict at the drop).
    """
    verdicts = [None] * len(points)
    finite = [k for k, point in enumerate(points) if np.all(np.isfinite(point))]
    if finite:
        batch = check_points(system, [points[k] for k in finite], options, seed=seed, decomposition=variety).points
        for k, verdict in zip(finite, batch):
            verdicts[k] = verdict
    judged = []
    for k, (point, verdict) in enumerate(zip(points, verdicts)):
        drop = None if verdict is None else verdict.nearest_rank_drop
        if verdict is not None and (verdict.verdict is Verdict.OFF or (
                verdict.verdict is Verdict.SMOOTH and drop is not None
                and verdict.nearest_rank_drop_distance <= _CANDIDATE_TOLERANCE * (1 + np.linalg.norm(point)))):
            verdict = _judge(system, point, options, seed + k, variety, first=verdict)
        judged.append(verdict)
        if loose is not None:
            loose.append(verdict is not verdicts[k])
    return judged


def _judge(system, point, options, seed, variety, first=None):
    """The check's verdict at a candidate; None if the candidate cannot be settled on X, "off" when refinement
    ends at a stationary point of F's residual (no point of X near, decision 0064).

    ``first``: the check's verdict at ``options``' own point tolerance when the caller has it already (a batched
    check): not computed again.

    A looser point tolerance is tried when refinement drifts. A candidate is an approximation of a
    singular point whose accuracy the endgame limits (1e-4 at a tacnode, where three paths meet):
    when the check finds the rank dropping within 1e-3 of it, the verdict is taken at that point.
    """
    if not np.all(np.isfinite(point)):  # no verdict can speak about it (a malformed point, never settled)
        return None
    for tolerance in (options.point_tolerance, _CANDIDATE_TOLERANCE):
        if first is not None and tolerance == options.point_tolerance:
            verdict = first
        else:
            verdict = check_points(system, [point], replace(options, point_tolerance=tolerance), seed=seed,
                                   decomposition=variety).points[0]
        if verdict.verdict is Verdict.OFF and verdict.newton is ZeroKind.NOT_A_ZERO:
            return verdict  # no point of X near at all, at any tolerance (decision 0064)
        if verdict.verdict is Verdict.OFF:  # not settled on X at this tolerance: try the looser one
            continue
        drop = verdict.nearest_rank_drop
        if (verdict.verdict is Verdict.SMOOTH and drop is not None
                and verdict.nearest_rank_drop_distance <= _CANDIDATE_TOLERANCE * (1 + np.linalg.norm(point))):
            at_drop = check_points(system, [drop], options, seed=seed, decomposition=variety).points[0]
            return verdict if at_drop.verdict is Verdict.OFF else at_drop
        return verdict
    return None


#: How far (relative) a singular candidate may lie from the singular point it approximates.
_CANDIDATE_TOLERANCE = 1e-3
#: The check's point tolerance for candidates first (relative): computed points, whose accuracy the endgame sets,
#: not their digits (decision 0072 judges user data by its digits; candidates keep the check's former default).
#: Saved with each piece as its points' stated accuracy, which `check --points-file` uses (decision 0110).
POINT_TOLERANCE = 1e-6
#: Isolated singular points closer than this (relative) are one point.
_DUPLICATE_RADIUS = 1e-6


@dataclass
class _Dropped:
    """An isolated candidate the check called smooth: the candidate point, where the check refined it (both in
    the computed units, homogeneous for projective input) and the codimension it was judged against."""

    candidate: np.ndarray
    refined: np.ndarray
    codimension: int
    #: the check's c-th scaled singular value of J there (None when not known)
    smallest: float | None = None
    #: measured within the input's precision of a singular point (decision 0062)
    near_singular: bool = False
    #: not judged smooth: refined onto a singular point found before (decision 0071)
    merged: bool = False
    #: not dropped: a multiple endpoint kept as a singular point after refinement moved it (decision 0071)
    unresolved: bool = False
    #: of the candidate set (0: a point; a candidate curve's witness point otherwise)
    dimension: int = 0
    #: not judged: Newton could not settle it on X (counted ``not_settled_on_X``)
    unsettled: bool = False
    #: not judged: an endpoint of the candidates' system that Newton dropped (``residual_not_explained``, 0090)
    unexplained: bool = False

    @property
    def judged_smooth(self):
        """An isolated candidate the check called smooth (the ones whose backward errors are measured)."""
        return self.dimension == 0 and not (self.merged or self.unresolved or self.unsettled or self.unexplained)


def _smallest_value(verdict):
    """The c-th scaled singular value of J behind a smooth verdict (None when the evidence lacks it)."""
    values = verdict.evidence.singular_values if verdict.evidence is not None else None
    if values is None or verdict.codimension is None or len(values) < verdict.codimension:
        return None
    return float(values[verdict.codimension - 1])


#: A candidate called smooth with J's c-th scaled singular value below this (in units of its terms) is not
#: dropped silently: J nearly vanishes there relative to its terms, which is what features far smaller than
#: the coordinates' unit look like (two nodes 2e-3 apart at (1, 2): the centre between them, a stationary point
#: of f with f at 1e-12 of its terms, was the only candidate, at 5e-14). Typical smooth candidates are 1e-3..1.
_VANISHING_JACOBIAN = 1e-8


def _vanishing_jacobians(dropped, discarded):
    """Move the dropped candidates whose Jacobian nearly vanishes from "smooth_on_check" to
    "smooth_with_vanishing_jacobian" (a completeness warning: singular points nearby may be missing)."""
    for candidate in dropped:
        if (candidate.merged or candidate.unresolved or candidate.unsettled or candidate.near_singular
                or candidate.smallest is None or candidate.smallest >= _VANISHING_JACOBIAN):
            continue
        if discarded.get("smooth_on_check", 0) > 0:
            discarded["smooth_on_check"] -= 1
            discarded["smooth_with_vanishing_jacobian"] = discarded.get("smooth_with_vanishing_jacobian", 0) + 1
    if discarded.get("smooth_on_check") == 0:
        del discarded["smooth_on_check"]


@dataclass
class _Candidate:
    dimension: int
    degree: int
    points: np.ndarray


def _already(found, oracles, candidate, point):
    """Why the candidate is not new (a key of ``discarded``), or None when it is.

    The same point (isolated pieces, by distance); a positive-dimensional candidate whose
    witness point lies on a piece of the same dimension found before (the same irreducible set:
    a homotopy membership test on the whole point, never a comparison of one coordinate); or any
    candidate lying on a larger piece found before.
    """
    for piece, contains in zip(found, oracles):
        if piece.dimension == 0:
            if candidate.dimension == 0 and np.linalg.norm(piece.points[0] - point) <= _DUPLICATE_RADIUS * (
                    1 + np.linalg.norm(point)):
                return "duplicate"
        elif piece.dimension >= candidate.dimension and contains is not None and contains(point):
            return "duplicate" if piece.dimension == candidate.dimension else "on_larger_singular_piece"
    return None


#: Largest value of F or a partial derivative (in units of its terms) at a singular point of a projective
#: hypersurface; the points themselves are accurate to about 1e-14, or 1e-8 where the zero is double.
_GRADIENT_RESIDUAL = 1e-7
#: Below this the point is a zero to working accuracy (a node: about 1e-16); between the two it is
#: judged by the Jacobian criterion at higher precision (a double zero, or a near miss).
_SETTLED_RESIDUAL = 1e-12


def _projective_gradient(system, rng, paths, discarded, progress, dropped=None):
    """Singular points of a projective hypersurface: the zeros of its gradient (Euler: then F = 0 too)."""
    f = system.polynomials[0].numeric()
    gradient = PolynomialSystem(system.variables, [g for g in f.gradient() if not g.is_zero()], projective=True)
    if progress is not None:
        progress(f"gradient system: {gradient.n_equations} partial derivatives")
    pieces = []
    if gradient.n_equations == 0:
        return pieces
    if gradient.n_equations < system.n_variables - 1:
        raise _NotIsolated("the hypersurface is a cone over a lower-dimensional one")
    result = solve_system(gradient, SolveOptions(square_up=gradient.n_equations > system.n_variables - 1),
                          seed=int(rng.integers(2**32)))
    add_path_counts(paths, result.path_counts())
    # Every partial derivative (not only the random combinations tracked) and F itself must vanish,
    # each in units of its own terms: a zero of the combinations alone is no singular point (a pair of
    # conics once got a fifth "node", a complex point where one partial was far from 0).
    every = [f] + list(gradient.polynomials)
    doubtful = []
    # on P^1 every point of V(f) is a component of X (Krull): a common zero of f and its gradient is a multiple
    # one, a non-reduced point, as check_points calls it; elsewhere an isolated singular point
    on_a_line = PieceKind.NON_REDUCED if system.ambient_dimension == 1 else PieceKind.SINGULAR
    sizes = TermSizes(every, projective=True)
    evaluator = BatchEvaluator(every)
    for solution in result.solutions:
        point = solution.point
        values = evaluator.evaluate(point[None, :], jacobian=False)
        residual = np.max(np.abs(values[0]) / sizes.values(point[None, :])[0])
        if residual > _GRADIENT_RESIDUAL:
            discarded["not_on_X"] = discarded.get("not_on_X", 0) + 1
            continue
        piece = SingularComponent(id=0, dimension=0, degree=1, points=point[None, :],
                                  real=_real_flags(system, point[None, :]), multiplicity=solution.multiplicity,
                                  at_infinity=False, formulation=CandidateSystem.GRADIENT, kind=on_a_line,
                                  on_components=[], rank=None, codimension=1)
        (doubtful if residual > _SETTLED_RESIDUAL else pieces).append(piece)
    pieces += _confirmed_by_check(system, doubtful, rng, discarded, dropped)
    if result.not_isolated:
        raise _NotIsolated("the singular locus of this hypersurface is positive-dimensional")
    return pieces


class _NotIsolated(Exception):
    """The gradient system of a projective hypersurface has zeros that are not isolated (the message says why)."""


def _real_samples_of_linear_pieces(system, pieces, variety, seed):
    """A real sample point for each real linear piece shown with a non-real witness point (decision 0155).

    A piece of degree 1 and positive dimension is an affine space C. When C is a real set (X real, C equal to its
    conjugate), the real part of any of its points, (p + conj p) / 2, lies on C: a real point of the piece, where
    the witness point on a complex slice is not (the candidates' systems of random complex minors cannot be moved to
    a real slice along a non-reduced component). When C is not real, the real part lies off X for a generic slice.
    The real part replaces the witness point only when the Jacobian criterion gives it the piece's own kind
    (singular or non-reduced), judged with X's components ``variety``; otherwise the piece stays as it was. The
    run's seed is used, not its generator: the later stages draw the same numbers whether or not a piece was
    looked at.

    Examples
    --------
    >>> from types import SimpleNamespace as Piece
    >>> from numag.system.parse import parse_system
    >>> line = Piece(dimension=1, degree=1, at_infinity=False, kind=PieceKind.SINGULAR, real=np.array([False]),
    ...              points=np.array([[0.3 + 0.7j, 0.0, 0.0]]))
    >>> _real_samples_of_linear_pieces(parse_system(["y^2 - z^2*x"], ["x", "y", "z"]), [line], None, seed=1)
    >>> line.points.tolist(), line.real.tolist()
    ([[(0.3+0j), 0j, 0j]], [True])
    """
    if not system.has_real_coefficients:
        return
    chosen = [piece for piece in pieces if piece.dimension > 0 and piece.degree == 1 and not piece.at_infinity
              and piece.kind in (PieceKind.SINGULAR, PieceKind.NON_REDUCED) and not np.any(piece.real)]
    if not chosen:
        return
    parts = [piece.points[0].real.astype(complex) for piece in chosen]
    # judged against X's components (a point of several equations needs its local dimension from them)
    verdicts = check_points(system, parts, CheckOptions(backward_errors=False, point_tolerance=POINT_TOLERANCE),
                            seed=seed, decomposition=variety).points
    for piece, part, verdict in zip(chosen, parts, verdicts):
        if PieceKind.of_verdict(verdict.verdict) is piece.kind:
            piece.points = part[None, :]
            piece.real = np.array([True])


def _confirmed_by_check(system, pieces, rng, discarded, dropped=None):
    """The candidate points the Jacobian criterion (with its escalation in precision) calls singular.

    A zero of the partial derivatives in double precision can be a near miss: two conics nearly
    tangent at a complex point leave F and its partials near 1e-8 of their terms there, where no
    threshold separates it from a double zero. At higher precision the rank of J stays full there.
    """
    if not pieces:
        return pieces
    seed = int(rng.integers(2**32))
    points = [piece.points[0] for piece in pieces]
    # a point that cannot be settled on X comes back "off" (each point is judged on its own)
    verdicts = check_points(system, points, CheckOptions(backward_errors=False, point_tolerance=POINT_TOLERANCE),
                            seed=seed).points
    kept = []
    for piece, verdict in zip(pieces, verdicts):
        if verdict.verdict is Verdict.OFF:  # no point of X near (decision 0064), or Newton drifted
            reason = "not_on_X" if verdict.newton is ZeroKind.NOT_A_ZERO else "not_settled_on_X"
            discarded[reason] = discarded.get(reason, 0) + 1
        elif verdict.verdict.is_singular:
            piece.kind = PieceKind.of_verdict(verdict.verdict)
            kept.append(piece)
        elif verdict.verdict is Verdict.EMBEDDED:  # X smooth there (decision 0105)
            discarded["embedded_point"] = discarded.get("embedded_point", 0) + 1
        elif verdict.verdict is Verdict.SMOOTH:
            discarded["smooth_on_check"] = discarded.get("smooth_on_check", 0) + 1
            if dropped is not None and verdict.codimension is not None:
                dropped.append(_Dropped(piece.points[0], np.asarray(verdict.point, dtype=complex),
                                        verdict.codimension, _smallest_value(verdict)))
        else:
            piece.kind = PieceKind.UNDECIDED
            kept.append(piece)
    return kept


def _chart(system, rng):
    """A random invertible change of coordinates X = Q Y with small integers; the system in the chart Y_0 = 1.

    Integers keep exact equations exact: a floating-point change of coordinates perturbs the
    coefficients by rounding, and a perturbed node is no longer singular (the check at higher
    precision then rightly finds a smooth point of the perturbed system). Real entries keep real
    points real; the condition number is kept moderate so that the chart does not distort scales.
    """
    size = system.n_variables
    while True:
        q = rng.integers(-3, 4, size=(size, size))
        if abs(np.linalg.det(q)) >= 0.5 and np.linalg.cond(q) <= 20 * size:
            break
    moved = [p.substitute_linear(q) for p in system.polynomials]
    names = [f"y{j}" for j in range(1, size)]
    affine = PolynomialSystem(names, [p.dehomogenize(0) for p in moved], name=system.name)
    return affine, q


def _projective_chart(system, options, rng, paths, discarded, notes, progress, routes=None, dropped=None):
    affine, q = _chart(system, rng)
    in_chart = []
    pieces, variety = _affine(affine, options, rng, paths, discarded, progress, notes, routes, in_chart)
    if dropped is not None:  # back to homogeneous coordinates, like the pieces
        dropped += [_Dropped(*(normalize_projective(np.concatenate([[1.0], p]) @ q.T)
                               for p in (d.candidate, d.refined)), d.codimension, d.smallest, merged=d.merged,
                             unresolved=d.unresolved, dimension=d.dimension, unsettled=d.unsettled)
                    for d in in_chart]
    for piece in pieces:
        homogeneous = np.column_stack([np.ones(len(piece.points)), piece.points]) @ q.T
        piece.points = normalize_projective(homogeneous)
        piece.real = _real_flags(system, piece.points)
    notes.append("Projective input: computed in a random affine chart (an invertible change of coordinates with "
                 "small integers); points are homogeneous, divided by their largest coordinate.")
    return pieces, variety


def _at_infinity(system, rng, paths, progress, affine_curves=True, singular_dimension=-1):
    """Singular points of the closure V(F^h) of an affine hypersurface on the hyperplane X_0 = 0.

    Solved on the hyperplane itself: the n + 1 partials of F^h with X_0 set to 0, in the n
    homogeneous coordinates left (random combinations to square, every solution rechecked).
    Tracking the whole closure instead sends paths to these points, often very singular ones. A plane curve's
    zeros at the coordinate points are read from the exponents when a restricted partial is a monomial
    (:func:`_coordinate_zeros`, no path).
    ``affine_curves``: the affine singular locus has a positive-dimensional piece (then each point is
    tested for lying on a singular set that leaves the hyperplane). ``singular_dimension``: the largest
    dimension of an affine singular (or non-reduced) piece found, -1 for none.

    Returns
    -------
    pieces : list of SingularComponent
        The isolated singular points at infinity.
    note : str or None
        When the closure is singular (or non-reduced) along a positive-dimensional set at infinity, the
        sentence saying which case it is (that set's points are not listed; the caller puts the sentence in the
        notes). Isolated points off that set are listed all the same: (p - 2)(x^2 + y^2 - 1) has its
        cylinder's vertex (0 : 1 : 0 : 0) at infinity beside the circle where its plane meets the cylinder,
        which reaches infinity; the vertex had been dropped with the circle's points (decision 0156).
    """
    f = system.polynomials[0].numeric().homogenize(0)
    restricted = []
    for partial in f.gradient():
        keep = partial.exponents[:, 0] == 0
        if np.any(keep):
            restricted.append(Polynomial(partial.exponents[keep][:, 1:], partial.coefficients[keep],
                                         system.n_variables))
    restricted = [p for p in restricted if not p.is_zero()]
    if any(p.degree == 0 for p in restricted):  # a partial that is a nonzero constant there: no singular point
        return [], None
    if not restricted:
        return [], ("The closure of X is singular along the whole hyperplane at infinity; its points at "
                    "infinity are not listed.")
    if system.n_variables == 1:
        return [], None
    hyperplane = PolynomialSystem(list(system.variables), restricted, projective=True)
    within = ("The closure of X is singular along a positive-dimensional set inside the hyperplane at infinity "
              "({}); its points at infinity are not listed, and isolated singular points at infinity off it were "
              "not searched for.")
    if hyperplane.n_equations < system.n_variables - 1:
        return [], within.format("fewer conditions there than its dimension")
    if singular_dimension >= 2:
        # Sing of the closure is closed, so it holds the closure of the affine singular set, and the closure of an
        # affine set of dimension k >= 1 meets the hyperplane in dimension exactly k - 1: the answer is known, and
        # solving the hyperplane's gradient would send every path to that set, each endpoint then refined in
        # extended precision to be found not isolated (det of 3 x 3 matrices: 256 paths, about 20 of its 23 CPU
        # seconds; decision 0119)
        return [], within.format(f"where the closure of the singular set of dimension {singular_dimension} listed "
                                 f"above meets it, in dimension {singular_dimension - 1}")
    if progress is not None:
        progress("singular points at infinity")
    zeros, note = _coordinate_zeros(restricted), None
    if zeros is None:
        result = solve_system(hyperplane, SolveOptions(square_up=hyperplane.n_equations > system.n_variables - 1),
                              seed=int(rng.integers(2**32)))
        add_path_counts(paths, result.path_counts())
        if result.not_isolated:  # that set is said in a note; the isolated solutions are listed all the same
            note = (f"The closure of X is singular along a positive-dimensional set inside the hyperplane at infinity "
                    f"({counted(len(result.not_isolated), 'solution')} there are not isolated); the points of that set "
                    "are not listed, the isolated singular points at infinity are.")
        zeros = [(solution.point, solution.multiplicity) for solution in result.solutions]
    pieces = []
    gradient = [g for g in f.gradient() if not g.is_zero()]
    for zero, multiplicity in zeros:
        point = np.concatenate([[0.0], zero])
        # Isolated among the zeros of the whole gradient of F^h? Otherwise the point lies on a
        # positive-dimensional singular or non-reduced set reaching infinity (x^2 = 0: the double line).
        # Isolated within the hyperplane (solve found it so); a singular set leaving the hyperplane would
        # have an affine part of positive dimension, so without one the point is isolated. (The local test
        # cannot tell a point of multiplicity 16, whose residual at distance r is r^16, from a curve.)
        if not affine_curves:
            isolated = True
        else:
            pivot = int(np.argmax(np.abs(point)))
            chart = PolynomialSystem([f"u{j}" for j in range(system.n_variables)],
                                     [g.dehomogenize(pivot) for g in gradient])
            isolated = IsolationTest(chart, rng).isolated(np.delete(point / point[pivot], pivot))
        if not isolated:  # on that set's closure: said once in a note, the other points still listed
            note = note or ("A singular or non-reduced set of positive dimension of X (listed above) reaches "
                            "infinity: the closure is singular where it arrives there, and its points at infinity "
                            "are not listed apart (isolated singular points at infinity are).")
            continue
        pieces.append(SingularComponent(
            id=0, dimension=0, degree=1, points=point[None, :], real=_real_flags(system, zero[None, :]),
            multiplicity=multiplicity, at_infinity=True, formulation=CandidateSystem.GRADIENT_AT_INFINITY,
            kind=PieceKind.SINGULAR, on_components=[], rank=None, codimension=1))
    return pieces, note


def _coordinate_zeros(forms):
    """The common zeros on the line at infinity of a plane curve's restricted partials, read from their exponents
    when one of them is a monomial x^a y^b; None otherwise (they are solved).

    A monomial vanishes on P^1 only at (1 : 0) (when b > 0) and (0 : 1) (when a > 0), and a binary form vanishes
    at (1 : 0) exactly when it has no x^e term (at (0 : 1): no y^e term): exact for the equations as written, no
    tolerance, no path. The multiplicity is the smallest order of vanishing of the forms there (the ideal they
    generate in the local ring of P^1), which is what the solve's paths counted: a generic combination of the forms
    vanishes to that order. The top form y^11 of T9(x) = T11(y) sent 10 paths into one point through the endgame
    (0.6 s of its 3 s; decision 0118).

    Parameters
    ----------
    forms : list of Polynomial
        Nonzero binary forms of degree at least 1 (the partials of F^h at X_0 = 0, in the two coordinates left).

    Returns
    -------
    list of (ndarray, int) or None
        Each zero (homogeneous, the largest coordinate 1) with its multiplicity.

    Examples
    --------
    >>> y10 = Polynomial(np.array([[0, 10]]), np.array([3.0]), 2)
    >>> [(z.real.tolist(), m) for z, m in _coordinate_zeros([y10])]
    [([1.0, 0.0], 10)]
    >>> _coordinate_zeros([Polynomial(np.array([[1, 1], [2, 0]]), np.array([1.0, 1.0]), 2)]) is None
    True
    """
    if not forms or any(p.n_variables != 2 for p in forms) or not any(p.n_terms == 1 for p in forms):
        return None
    zeros = []
    for column, point in ((1, np.array([1.0, 0.0], dtype=complex)), (0, np.array([0.0, 1.0], dtype=complex))):
        # the order of vanishing at the point where coordinate `column` is 0: the smallest power of that coordinate
        order = min(int(p.exponents[:, column].min()) for p in forms)
        if order > 0:
            zeros.append((point, order))
    return zeros


def _at_infinity_of_homogenized(system, options, rng, paths, discarded, notes, progress):
    """Singular pieces of V(F^h) inside the hyperplane at infinity (several equations), with the warning."""
    if progress is not None:
        progress("singular points at infinity (V(F^h) in a random chart)")
    homogenized = PolynomialSystem(["w"] + list(system.variables),
                                   [p.homogenize(0) for p in system.polynomials], projective=True,
                                   name=system.name)
    try:
        pieces, _ = _projective_chart(homogenized, options, rng, paths, {}, [], None)
    except InputError as err:
        notes.append(f"Singular points at infinity could not be searched: {err}")
        return []
    kept = []
    for piece in pieces:
        at_w0 = np.abs(piece.points[:, 0]) <= 1e-8 * np.linalg.norm(piece.points, axis=1)
        if np.all(at_w0):
            piece.points = piece.points.copy()
            piece.points[:, 0] = 0
            piece.at_infinity = True
            piece.on_components = []
            piece.real = _real_flags(system, piece.points)
            kept.append(piece)
    notes.append("Singular points at infinity are those of V(F^h), the zero set of the homogenised equations, on "
                 "the hyperplane w = 0. With several equations V(F^h) can be larger than the closure of X (the "
                 "extra part lies at infinity), so a point listed at infinity may lie on that extra part only.")
    return kept
