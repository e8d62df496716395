"""The verdict at a point: is X smooth there? (the Jacobian criterion, with its evidence).

For a point a of X = V(f_1, ..., f_m) in C^n, the tangent space is the kernel
of the Jacobian J(a) when the f_i generate the ideal of X near a, so
dim T_a X = n - rank J(a) >= dim_a X, with equality exactly at smooth points.
A verdict therefore needs two numbers: the numerical rank of J(a) and the
local dimension dim_a X. This module gets the first from scaled singular
values, tests every small one instead of guessing, and takes the second from
the user or from the complete-intersection assumption (stated in the result).

How a small singular value is tested
------------------------------------
1. The point is moved onto X (minimum-norm Gauss-Newton) in double precision,
   all points in one batch; a point that cannot be moved onto X within the
   point tolerance (relative to the point, in the balanced units of the scaled
   problem) gets the verdict "off", with its residual and the distance Newton
   moved it, and the other points are judged as usual.
2. If the c-th scaled singular value (c = codimension) is clearly above zero,
   the rank is c and the point is smooth.
3. Otherwise, at rising precision (mpmath, up to ``max_digits``): refine on F;
   solve F = 0 together with "rank J <= c - 1" (:class:`~numag.numeric.refine.RankDropSystem`).
   If that converges to x* within the point tolerance, the rank really drops at
   x*: the verdict is "singular" and names x* and its distance. If it
   converges far away, the point is smooth and the nearest rank drop is
   reported. If it does not converge, the small singular value is followed
   across precisions: stable means a true nonzero value (smooth), shrinking
   with the precision means zero (singular); otherwise "undecided".
4. For a singular verdict, nearby points of X are sampled: if the rank drops
   at all of them, X (as given by these equations) is generically non-reduced
   there, and the verdict is "non-reduced" instead of "singular".

Examples
--------
>>> from numag.system.parse import parse_system
>>> system = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
>>> report = check_points(system, [[0, 0], [3, 6]], seed=1)
>>> [v.verdict for v in report.points]
['singular', 'smooth']
"""

from dataclasses import dataclass, field, replace
from fractions import Fraction
import math

import mpmath
import numpy as np

from ..errors import InputError, PointError, is_integer, is_number, require_option
from ..system.display import html_table, short_point
from ..system.exact import ExactCoefficient
from ..system.polynomial import PolynomialSystem, require_numeric
from ..numeric.cluster import line_distance, normalize_projective, projective_pivot
from ..numeric.evaluate import BatchEvaluator, PrecisionEvaluator, TermSizes
from ..numeric.linalg import (DOUBLE_DIGITS, RankEvidence, mp_singular_values, numerical_rank,
                              scaled_singular_values, singular_value_gap, zero_tolerance)
from ..numeric.refine import (RankDropSystem, ZeroKind, mp_gauss_newton, newton_zero_test, project_to_variety,
                              rank_drop_points)
from ..numeric.scaling import Scaling
from ..numeric.seeds import random_state
from ..witness.decompose import components_through_points
from .kinds import LocalDimensionSource, Verdict
from .nearness import backward_error, input_tolerance, nearest_backward_error

__all__ = ["CheckOptions", "PointVerdict", "CheckReport", "check_points",
           "VERDICTS"]

#: The possible verdicts, as text ("off": the point is not on X within the point tolerance, so nothing
#: is judged there).
VERDICTS = Verdict.texts()
_AS_GIVEN = ("The verdict is about the equations as given: it describes the variety only where they "
             "generate its ideal near the point.")


#: How far (relative) an unanchored polish may move a rank-drop point that the anchored solve approached.
_POLISH_DRIFT = 1e-6
#: Decided in double precision (decision 0038): the rank-drop system's scaled residual must reach this
#: (a regular zero gets there in a few Newton steps; a near miss whose c-th singular value never vanishes
#: stalls at that value), ...
_DOUBLE_SETTLED_RESIDUAL = 1e-13
#: ... the singular value just above the dropped one must stay clearly nonzero there (rank exactly c - 1,
#: so the rank-drop system is regular and Newton's answer is trustworthy) ...
_DOUBLE_CLEAR_VALUE = 1e-6
#: ... and the rank-drop point must be within this fraction of the point tolerance (singular) or beyond
#: this multiple of it (smooth, with a c-th singular value above _DOUBLE_CLEAR_SMOOTH). Anything else
#: is in doubt and goes to mpmath at rising precision.
_DOUBLE_NEAR, _DOUBLE_FAR, _DOUBLE_CLEAR_SMOOTH = 0.5, 100.0, 1e-8
#: A rank drop at the point is settled in double only where the rank-drop system's scaled Jacobian has
#: smallest / largest singular value at least this (decision 0074): 0.02-1 at nodes and linkage folds,
#: 1e-7 at a cusp, 1e-10 at a tacnode (where Newton in double stops short of the point).
_DOUBLE_REGULAR = 1e-4


@dataclass(frozen=True)
class CheckOptions:
    """Options of :func:`check_points` (defaults declared once, here).

    Attributes
    ----------
    local_dimension : int or None
        dim_a X, when the user knows it (projective dimension for projective
        systems). None: assume a complete intersection (codimension = number of
        equations) when there are at most as many equations as the ambient
        dimension.
    point_tolerance : float
        How far (relative to ||(1, a)||) the point a verdict speaks about may lie
        from the given point: the given point's accuracy.
    max_digits : int
        Highest precision, in decimal digits, an undecided rank may be escalated to.
    suspect_threshold : float
        Scaled singular values below this are tested rather than trusted.
    neighbour_samples : int
        Nearby points sampled to tell "non-reduced" from "singular" (0 disables).
    neighbour_radius : float
        Relative distance of those samples.
    backward_errors : bool
        For double-precision input (decision 0062), measure at each smooth verdict the backward error: the
        relative change of the coefficients that makes the point singular (the singular locus, which
        measures it for its own candidates, turns this off).
    """

    local_dimension: int | None = None
    point_tolerance: float = 1e-6
    max_digits: int = 50
    suspect_threshold: float = 1e-4
    neighbour_samples: int = 3
    neighbour_radius: float = 1e-2
    backward_errors: bool = True

    def __post_init__(self):
        """Refuse a bad value on construction, naming the option (the system's bounds: :meth:`validated`)."""
        require_option(self.local_dimension is None or is_integer(self.local_dimension), "local_dimension",
                       "an integer", self.local_dimension)
        require_option(is_number(self.point_tolerance) and 0 < self.point_tolerance < 1, "point_tolerance",
                       "in (0, 1)", self.point_tolerance)
        require_option(is_integer(self.max_digits) and DOUBLE_DIGITS <= self.max_digits <= 10000,
                       "max_digits (--digits)", f"an integer from {DOUBLE_DIGITS} to 10000", self.max_digits)
        require_option(is_number(self.suspect_threshold) and 0 < self.suspect_threshold < 1, "suspect_threshold",
                       "in (0, 1)", self.suspect_threshold)
        require_option(is_integer(self.neighbour_samples) and self.neighbour_samples >= 0, "neighbour_samples",
                       "an integer >= 0", self.neighbour_samples)
        require_option(is_number(self.neighbour_radius) and 0 < self.neighbour_radius < 1, "neighbour_radius",
                       "in (0, 1)", self.neighbour_radius)
        require_option(isinstance(self.backward_errors, bool), "backward_errors", "True or False",
                       self.backward_errors)

    def validated(self, system):
        """Check the options against a system; raise InputError naming the bad option."""
        if self.local_dimension is not None and not 0 <= self.local_dimension <= system.ambient_dimension:
            raise InputError(f"local_dimension must be between 0 and {system.ambient_dimension}, "
                             f"got {self.local_dimension}")
        return self


@dataclass(kw_only=True)
class PointVerdict:
    """The verdict at one point, with everything it rests on.

    Attributes
    ----------
    index : int
        1-based position of the point in the input.
    given : ndarray of complex
        The point as given (projective points divided by their largest coordinate).
    point : ndarray of complex
        The point the verdict speaks about (the given point moved onto X, or the
        nearby point where the rank drops).
    distance : float
        Distance from ``given`` to ``point``.
    residual : float
        Largest scaled residual of F at the given point.
    verdict : Verdict
    rank : int or None
        Numerical rank of J at ``point``.
    codimension : int or None
        Rank a smooth point needs (ambient dimension minus local dimension).
    tangent_dimension : int or None
        Dimension of the tangent space (projective dimension for projective systems).
    local_dimension : int or None
        dim_a X used.
    local_dimension_source : LocalDimensionSource
        Given, the components through the point, a complete intersection (of full rank: no
        assumption, the equations are independent at the point; or assumed), an isolated point
        (Jacobian injective) or unknown. :meth:`local_dimension_text` is the text a report shows.
    evidence : RankEvidence
        Singular values, scales, tolerance, gap, digits, escalation.
    nearest_rank_drop : ndarray or None
        A point of X near the given one where the rank drops, when one was found
        (also for smooth verdicts: how close the nearest trouble is).
    nearest_rank_drop_distance : float or None
    notes : list of str
        Assumptions and caveats a reader needs.
    components : list of dict
        The components of X through the point (``id``, ``dimension``, ``degree``), when the
        local dimension came from a decomposition.
    backward_error : float or None
        Smooth verdicts on double-precision input: the relative change of the coefficients that makes
        the point (or one next to it) an exact singular point (:mod:`numag.singular.nearness`).
    backward_tolerance : float or None
        What the input's coefficients cannot resolve (decision 0062); :attr:`near_singular` compares.
    newton : ZeroKind or None
        Verdicts "off": what Newton's method found from the given point (decision 0064): X too far away
        (``zero``), no point of X near at all (``not a zero``: refinement ended at a stationary point of the
        residual, which the linear model does not explain) or ``undecided`` (refinement could not finish).
    """

    index: int
    given: np.ndarray
    point: np.ndarray
    distance: float
    residual: float
    verdict: Verdict
    rank: int | None
    codimension: int | None
    tangent_dimension: int | None
    local_dimension: int | None
    local_dimension_source: LocalDimensionSource
    evidence: RankEvidence
    nearest_rank_drop: np.ndarray | None = None
    nearest_rank_drop_distance: float | None = None
    notes: list[str] = field(default_factory=list)
    components: list[dict] = field(default_factory=list)
    backward_error: float | None = None
    backward_tolerance: float | None = None
    newton: ZeroKind | None = None

    @property
    def near_singular(self):
        """Smooth for the coefficients as written, singular after a change within their precision."""
        return (self.verdict is Verdict.SMOOTH and self.backward_error is not None
                and self.backward_tolerance is not None and self.backward_error <= self.backward_tolerance)

    def local_dimension_text(self):
        """Where the local dimension came from, as a report shows it (with the components through the point)."""
        return self.local_dimension_source.describe(self.components)

    def __repr__(self):
        rank = "" if self.rank is None else f", rank {self.rank} of {self.codimension}"
        return (f"PointVerdict({self.index}: {self.verdict} at {short_point(self.point)}{rank}, "
                f"distance {self.distance:.1e})")


@dataclass(kw_only=True)
class CheckReport:
    """Verdicts for a list of points of one system.

    Attributes
    ----------
    system : PolynomialSystem
    points : list of PointVerdict
    options : CheckOptions
    seed : int
        Seed of the random choices (neighbour samples), so the run can be repeated.
    scaling : Scaling or None
        The units the verdicts were computed in (singular values, tolerances and residuals
        belong to that problem; points are in the user's units).
    """

    system: PolynomialSystem
    points: list[PointVerdict]
    options: CheckOptions
    seed: int
    scaling: Scaling | None = None

    def __repr__(self):
        counts = ", ".join(f"{name} {count}" for name, count in self.counts().items() if count) or "no points"
        return f"CheckReport({self.system.name or 'system'}: {counts}; seed {self.seed})"

    def _repr_html_(self):
        rows = [[v.index, v.verdict, short_point(v.given), short_point(v.point), f"{v.distance:.1e}",
                 f"{v.residual:.1e}", "-" if v.rank is None else v.rank,
                 "-" if v.codimension is None else v.codimension]
                for v in self.points]
        return html_table(repr(self), ["#", "verdict", "given", "speaks about", "distance", "residual", "rank of J",
                                       "rank needed"], rows)

    def counts(self):
        """Number of points per verdict (every verdict listed, zeros included)."""
        return {verdict.value: sum(1 for p in self.points if p.verdict is verdict) for verdict in Verdict}

    @property
    def undecided(self):
        """True when at least one verdict is undecided."""
        return any(p.verdict is Verdict.UNDECIDED for p in self.points)

    @property
    def off(self):
        """True when at least one point is not on X (verdict "off")."""
        return any(p.verdict is Verdict.OFF for p in self.points)

    @property
    def near_singular(self):
        """True when a smooth verdict is singular after a change of the coefficients within their precision."""
        return any(p.near_singular for p in self.points)


@dataclass
class _Decision:
    """What the rank test at one point decided, and what it rests on."""

    outcome: Verdict | None
    point: np.ndarray                 # the point the decision speaks about
    values: object                    # scaled singular values there
    scales: object                    # the row scales used
    digits: int
    drop: np.ndarray | None = None    # a nearby point where the rank drops, when one was found
    drop_distance: float | None = None


@dataclass
class _Judged:
    """A point's rank decision and what :meth:`_Checker.check` builds its verdict from."""

    decision: _Decision
    verdict: Verdict | None
    rank: int
    codim: int | None
    source: LocalDimensionSource
    notes: list
    escalated: bool
    final_values: np.ndarray
    digits: int
    zero: float


def _size(point):
    return math.sqrt(1.0 + float(np.linalg.norm(point)) ** 2)


class _Checker:
    """Carries one system's evaluators and options through the checks of many points."""

    def __init__(self, system, options, rng):
        self.system = system
        self.options = options
        self.rng = rng
        self.settled = {}  # position -> outcome decided in double for a batch (settle_in_double)
        self.judged = {}  # position -> _Judged, decided for a whole batch before its sampling
        self.drops_near = {}  # position -> the non-reduced sampling's answer, for a whole batch at once
        self.batch = BatchEvaluator(system.polynomials)
        self.precise = PrecisionEvaluator(system.polynomials)
        self.m, self.n = system.n_equations, system.n_variables
        self.sizes = TermSizes(system.polynomials, system.projective)

    # -- scaled quantities ----------------------------------------------------------------------
    def scaled_values_double(self, points):
        _, jacobians = self.batch.evaluate(points)
        scales = self.sizes.gradients(points)
        return scaled_singular_values(jacobians, scales), scales

    def scaled_values_mp(self, point, ctx):
        _, jacobian = self.precise.evaluate([ctx.mpc(v) for v in point], ctx)
        scales = self.sizes.gradients(np.array([complex(v) for v in point])[None])[0]
        scaled = ctx.matrix(self.m, self.n)
        for i in range(self.m):
            for j in range(self.n):
                scaled[i, j] = jacobian[i, j] / scales[i]
        return [float(v) for v in mp_singular_values(scaled, ctx)], scales

    def distance(self, a, b):
        """Distance of two points (projective: between their lines, about the angle)."""
        if self.system.projective:
            return float(line_distance(a, b)[0])
        return float(np.linalg.norm(np.asarray(a) - np.asarray(b)))

    def tolerance_for(self, given):
        """How far the point a verdict speaks about may be from the given one."""
        if self.system.projective:
            return self.options.point_tolerance
        return self.options.point_tolerance * _size(given)

    # -- local dimension -------------------------------------------------------------------------
    def codimension(self, rank, through=None):
        ambient = self.system.ambient_dimension
        if self.options.local_dimension is not None:
            return ambient - int(self.options.local_dimension), LocalDimensionSource.GIVEN
        if through:
            return ambient - max(c.dimension for c in through), LocalDimensionSource.COMPONENTS
        if self.m <= ambient:
            if rank == self.m:  # independent equations: a smooth complete intersection, no assumption
                return self.m, LocalDimensionSource.FULL_RANK
            return self.m, LocalDimensionSource.ASSUMED
        if rank == ambient:
            return ambient, LocalDimensionSource.ISOLATED
        return None, LocalDimensionSource.UNKNOWN

    # -- refinement at precision -----------------------------------------------------------------
    def refine_on_f(self, point, ctx, digits):
        def function(z):
            x = [z[j] for j in range(self.n)]
            values, jacobian = self.precise.evaluate(x, ctx)
            scales = self.sizes.values(np.array([complex(v) for v in x])[None])[0]
            for i in range(self.m):
                values[i] /= scales[i]
                for j in range(self.n):
                    jacobian[i, j] /= scales[i]
            return values, jacobian

        start = ctx.matrix([ctx.mpc(v) for v in point])
        z, _, _, _ = mp_gauss_newton(function, start, ctx, tolerance=100 * 10.0 ** (-digits))
        return [z[j] for j in range(self.n)]

    def find_rank_drop(self, point, rank, ctx, digits):
        """Solve F = 0 and rank J <= rank from ``point``; return the point (complex) or None."""
        drop = RankDropSystem(self.system, rank, [complex(v) for v in point], ctx)
        tolerance = zero_tolerance(digits, (self.m, self.n))
        z, converged, _, _ = mp_gauss_newton(drop, drop.initial(point), ctx, tolerance=tolerance, anchored=True)
        if not converged:
            # The anchor keeps Newton from sliding along a set, but at a multiple zero (a tacnode: the
            # Jacobian's weak direction shrinks with the residual) it also holds the iterate above the
            # tolerance. Polished without it, the point may move only a little further.
            polished, converged, _, _ = mp_gauss_newton(drop, z, ctx, tolerance=tolerance)
            moved = float(ctx.norm(polished[:self.n, 0] - z[:self.n, 0])) if converged else float("inf")
            if not converged or moved > _POLISH_DRIFT * (1.0 + float(ctx.norm(z[:self.n, 0]))):
                return None
            z = polished
        self.last_drop_precise = [z[j] for j in range(self.n)]  # the rank is judged here, not at its rounding
        return drop.point_of(z)

    # -- all suspect points at once, in double ---------------------------------------------------
    def settle_in_double(self, given, refined, values, scales, through, positions=None, exact=None):
        """Decide the suspect points whose decision is clear in double precision, all in one batch.

        For each codimension, one batched Gauss-Newton on F = 0, rank J <= c - 1
        (:func:`numag.numeric.refine.rank_drop_points`) from every suspect point. Clear: the rank-drop
        system converged to a regular zero (residual at double rounding, the (c-1)-th singular value
        clearly nonzero there), either at the point (singular, when the rank-drop system's own Jacobian is
        well conditioned there: decision 0074) or far from it with the point's c-th value clearly nonzero
        (smooth). The outcomes go to :attr:`settled`; the other suspect points are escalated in mpmath by
        :meth:`check` as before. ``positions``: each point's position in the batch :meth:`check` is called
        with (default: its own index). ``exact``: the exact coordinates of each point, or None; a point given
        exactly is refined from them at higher precision, so its rank drop is left to the escalation.
        """
        number = list(range(len(refined))) if positions is None else [int(k) for k in positions]
        double_zero = zero_tolerance(DOUBLE_DIGITS, (self.m, self.n))
        suspects = {}
        for position in range(len(refined)):
            codim, _ = self.codimension(numerical_rank(values[position], double_zero), through[position])
            if codim and codim <= len(values[position]) and values[position][codim - 1] <= \
                    self.options.suspect_threshold:
                suspects.setdefault(codim, []).append(position)
        for codim, positions in suspects.items():
            # tolerance 0: Newton goes on while a step reduces the residual, so a regular zero is polished to
            # rounding (quadratic convergence: one or two steps past the settled residual)
            drops = rank_drop_points(self.system, refined[positions], codim - 1, tolerance=0.0)
            at_drop, scales_at_drop = self.scaled_values_double(drops.points)
            for row, position in enumerate(positions):
                regular = (drops.residuals[row] <= _DOUBLE_SETTLED_RESIDUAL and at_drop[row][codim - 1] <= double_zero
                           and (codim == 1 or at_drop[row][codim - 2] >= _DOUBLE_CLEAR_VALUE))
                if not regular:
                    continue
                found = drops.points[row]
                distance = self.distance(given[position], found)
                tolerance = self.tolerance_for(given[position])
                # A rank drop at the point is settled only where the rank-drop system is regular there (its
                # Jacobian well conditioned: a node, a linkage's fold). At a singular point of Milnor number > 1
                # (a tacnode, a cusp) it is not: Gauss-Newton stops 1e-5 away with a tiny residual, and that
                # point split one tacnode into two pieces and lost its realness (tests/test_trust.py, bitangent
                # conics; decision 0038's amendment); those, and points given exactly, go to the escalation.
                if (distance <= _DOUBLE_NEAR * tolerance and drops.conditioning[row] >= _DOUBLE_REGULAR
                        and (exact is None or exact[position] is None)):
                    self.settled[number[position]] = _Decision(
                        outcome=Verdict.SINGULAR, point=found, values=at_drop[row], scales=scales_at_drop[row],
                        digits=DOUBLE_DIGITS, drop=found, drop_distance=distance)
                elif distance >= _DOUBLE_FAR * tolerance and values[position][codim - 1] >= _DOUBLE_CLEAR_SMOOTH:
                    self.settled[number[position]] = _Decision(
                        outcome=Verdict.SMOOTH, point=refined[position], values=values[position],
                        scales=scales[position], digits=DOUBLE_DIGITS, drop=found, drop_distance=distance)

    def rank_drops_near_in_double(self, groups, codim, radii):
        """For each group of samples (of one codimension): True or False when double precision decides
        :meth:`rank_drops_near` clearly, else None. All samples in one batched Gauss-Newton."""
        if not groups:
            return []
        drops = rank_drop_points(self.system, np.concatenate([np.array(g) for g in groups]), codim - 1,
                                 tolerance=0.1 * _DOUBLE_SETTLED_RESIDUAL)
        answers, first = [], 0
        for informative, radius in zip(groups, radii):
            rows = slice(first, first + len(informative))
            first += len(informative)
            settled = drops.residuals[rows] <= _DOUBLE_SETTLED_RESIDUAL
            distances = np.array([self.distance(found, sample)
                                  for found, sample in zip(drops.points[rows], informative)])
            if np.any(settled & (distances > 0.1 * radius)):
                answers.append(False)  # the rank drops only well away from a sample: not at every nearby point
            elif np.all(settled & (distances <= 1e-4 * radius)):
                answers.append(True)
            else:
                answers.append(None)
        return answers

    # -- one point ---------------------------------------------------------------------------------
    def escalate(self, given, exact_given, refined, codim):
        """Decide a suspect rank at rising precision (a :class:`_Decision`)."""
        opts = self.options
        schedule = sorted({d for d in (30, 2 * 30, 4 * 30, 8 * 30) if d < opts.max_digits} | {opts.max_digits})
        schedule = [d for d in schedule if d > DOUBLE_DIGITS] or [opts.max_digits]
        history = []
        tolerance = self.tolerance_for(given)
        current = [complex(v) for v in refined]
        for digits in schedule:
            with mpmath.mp.workdps(digits + 10):
                ctx = mpmath.mp
                start = ([v.to_context(ctx) for v in exact_given] if exact_given is not None
                         else [ctx.mpc(v) for v in current])
                on_x = self.refine_on_f(start, ctx, digits)
                current = [complex(v) for v in on_x]
                values, scales = self.scaled_values_mp(on_x, ctx)
                history.append(values[codim - 1] if codim - 1 < len(values) else 0.0)
                found = self.find_rank_drop(on_x, codim - 1, ctx, digits)
                if found is None or self.distance(given, found) > tolerance:
                    # Where the rank drops further (a cone's vertex, J = 0), "rank <= codim - 1" has a
                    # family of kernels at the point and Newton stalls; "rank <= r" for the lower r the
                    # point has is regular there. Such a point has rank <= codim - 1 as well.
                    for lower in range(codim - 2, -1, -1):
                        deeper = self.find_rank_drop(on_x, lower, ctx, digits)
                        if deeper is not None and self.distance(given, deeper) <= tolerance:
                            found = deeper
                            break
                    else:  # none: judge the first one found (if any) at its own precise point
                        found = self.find_rank_drop(on_x, codim - 1, ctx, digits) if found is not None else None
                if found is not None:
                    distance = self.distance(given, found)
                    at_found, scales_found = self.scaled_values_mp(self.last_drop_precise, ctx)
                    if distance <= tolerance:
                        return _Decision(outcome=Verdict.SINGULAR, point=found, values=at_found, scales=scales_found,
                                         digits=digits, drop=found, drop_distance=distance)
                    return _Decision(outcome=Verdict.SMOOTH, point=np.array(current), values=values, scales=scales,
                                     digits=digits, drop=found, drop_distance=distance)
                zero = zero_tolerance(digits, (self.m, self.n))
                if len(history) >= 2:
                    previous, latest = history[-2], history[-1]
                    if latest > zero and previous > 0 and abs(latest - previous) <= 1e-3 * previous:
                        return _Decision(outcome=Verdict.SMOOTH, point=np.array(current), values=values, scales=scales,
                                         digits=digits, drop=None, drop_distance=None)
                    if latest <= zero and previous <= zero_tolerance(schedule[len(history) - 2], (self.m, self.n)):
                        return _Decision(outcome=Verdict.SINGULAR, point=np.array(current), values=values,
                                         scales=scales, digits=digits, drop=None, drop_distance=None)
        return _Decision(outcome=Verdict.UNDECIDED, point=np.array(current), values=values, scales=scales,
                         digits=schedule[-1], drop=None, drop_distance=None)

    def rank_drops_near(self, point, codim):
        """Sample nearby points of X; True when the rank drops at every one of them.

        Samples that Newton pulls back onto ``point`` itself say nothing and are
        discarded; without enough informative samples the answer is False.
        """
        return self.rank_drops_near_all([(point, codim)])[0]

    def rank_drops_near_all(self, items):
        """:meth:`rank_drops_near` for many ``(point, codim)`` pairs, in shared batches (decision 0074).

        The samples are drawn point by point in order (the random numbers of one call per point), moved onto X
        in one batch and tested in double in one batch per codimension; mpmath only for a point that leaves open.
        """
        count = self.options.neighbour_samples
        if count == 0 or not items:
            return [False] * len(items)
        tries = 4 * count
        starts, radii = [], []
        for point, _ in items:
            radii.append(self.options.neighbour_radius * _size(point))
            directions = self.rng.standard_normal((tries, self.n)) + 1j * self.rng.standard_normal((tries, self.n))
            directions /= np.linalg.norm(directions, axis=1)[:, None]
            starts.append(np.asarray(point)[None, :] + radii[-1] * directions)
        samples = project_to_variety(self.system, self.batch, np.concatenate(starts))
        answers, informative_of = [None] * len(items), [None] * len(items)
        for j, (point, _) in enumerate(items):
            rows = slice(j * tries, (j + 1) * tries)
            informative_of[j] = [sample for sample, ok in zip(samples.points[rows], samples.converged[rows])
                                 if ok and self.distance(sample, point) >= 0.1 * radii[j]][:count]
            if len(informative_of[j]) < count:
                answers[j] = False
        for codim in sorted({codim for _, codim in items}):
            open_items = [j for j, (_, c) in enumerate(items) if c == codim and answers[j] is None]
            decided = self.rank_drops_near_in_double([informative_of[j] for j in open_items], codim,
                                                     [radii[j] for j in open_items])
            for j, answer in zip(open_items, decided or [None] * len(open_items)):
                answers[j] = answer
        for j, (_, codim) in enumerate(items):
            if answers[j] is None:
                answers[j] = self._rank_drops_at_samples_mp(informative_of[j], codim, radii[j])
        return answers

    def _rank_drops_at_samples_mp(self, informative, codim, radius):
        """The sampling test in mpmath (30 digits): True when the rank drops at (next to) every sample."""
        with mpmath.mp.workdps(40):
            for sample in informative:
                found = self.find_rank_drop([mpmath.mpc(v) for v in sample], codim - 1, mpmath.mp, 30)
                if found is None or self.distance(found, sample) > 1e-3 * radius:
                    return False
        return True

    def decide(self, given, exact_given, refined, values, scales, through=None, position=None):
        """The rank decision at one point before the non-reduced sampling (a :class:`_Judged`)."""
        opts = self.options
        double_zero = zero_tolerance(DOUBLE_DIGITS, (self.m, self.n))
        rank = numerical_rank(values, double_zero)
        codim, source = self.codimension(rank, through)
        notes = []
        if through is not None and not through and opts.local_dimension is None:
            notes.append("The decomposition found no component through this point (it may lie below the "
                         "lowest dimension searched); the local dimension falls back to the rule below.")
        if source is LocalDimensionSource.ASSUMED:
            notes.append(f"Local dimension from the assumption that X is a complete intersection at the point "
                         f"(codimension = {self.m} equations); give the local dimension if it is not.")
        decision = _Decision(outcome=None, point=refined, values=values, scales=scales, digits=DOUBLE_DIGITS,
                             drop=None, drop_distance=None)
        escalated = False
        if codim is None:
            decision.outcome = Verdict.UNDECIDED
            notes.append("The local dimension is unknown (more equations than the ambient dimension and a "
                         "rank-deficient Jacobian); give it to decide.")
        elif codim == 0:
            decision.outcome = Verdict.SMOOTH if rank == 0 else Verdict.UNDECIDED
        elif codim <= len(values) and values[codim - 1] > opts.suspect_threshold:
            decision.outcome = Verdict.SMOOTH
        else:
            escalated = True
            decision = self.settled.get(position) or self.escalate(given, exact_given, refined, codim)
        digits = decision.digits
        zero = zero_tolerance(digits, (self.m, self.n))
        final_values = np.array(decision.values, dtype=float)
        rank = numerical_rank(final_values, zero)
        verdict = decision.outcome
        if verdict is Verdict.SMOOTH and codim is not None and rank < codim:
            rank = codim  # a stable small singular value: nonzero, only below the zero rule's reach
        if codim is not None and rank > codim:
            verdict = Verdict.UNDECIDED
            notes.append(f"The Jacobian has rank {rank}, more than the codimension {codim}: the local "
                         f"dimension used ({self.system.ambient_dimension - codim}) is larger than the tangent "
                         "space allows; the local dimension is wrong for this point.")
        return _Judged(decision=decision, verdict=verdict, rank=rank, codim=codim, source=source, notes=notes,
                       escalated=escalated, final_values=final_values, digits=digits, zero=zero)

    def check(self, index, given, exact_given, refined, residual, values, scales, through=None, position=None):
        """The verdict at one point (:meth:`decide`, then the non-reduced sampling), as a :class:`PointVerdict`.

        ``position``: the point's place in a batch whose decisions (:attr:`judged`) and sampling answers
        (:attr:`drops_near`) were worked out together; a point not found there is decided here.
        """
        opts = self.options
        judged = self.judged.pop(position, None) if position is not None else None
        if judged is None:
            judged = self.decide(given, exact_given, refined, values, scales, through, position)
        decision, verdict, rank, codim = judged.decision, judged.verdict, judged.rank, judged.codim
        source, notes, escalated = judged.source, judged.notes, judged.escalated
        final_values, digits, zero = judged.final_values, judged.digits, judged.zero
        if verdict is Verdict.SINGULAR:
            near = self.drops_near.pop(position, None) if position is not None else None
            if near is None:
                near = self.rank_drops_near(np.asarray(decision.point), codim)
        if verdict is Verdict.SINGULAR and near:
            verdict = Verdict.NON_REDUCED
            notes.append("The rank also drops at every sampled nearby point of X: the equations define X "
                         "with multiplicity > 1 here (generically non-reduced), so the Jacobian cannot see "
                         "whether the underlying variety is smooth. This is a sampling test, not a proof.")
        thick = [c for c in (through or []) if not c.reduced]
        if thick and len(through) == 1 and opts.local_dimension is None and verdict is Verdict.SINGULAR:
            verdict = Verdict.NON_REDUCED
        for c in thick:
            paths = f"; {c.multiplicity} paths end at each" if c.multiplicity > 1 else ""
            notes.append(f"Component {c.id} is generically non-reduced (the Jacobian has rank below its codimension "
                         f"at its witness points{paths}): the equations define it with multiplicity > 1.")
        if through and len(through) > 1 and opts.local_dimension is None:
            ids = ", ".join(str(c.id) for c in through)
            if verdict is Verdict.SMOOTH:
                # Full rank c at the point makes X a manifold of dimension n - c there (implicit
                # function theorem): one component only. The membership test's tolerance cannot
                # separate components that are tangent nearby (two conics 6e-5 from their tacnode).
                notes.append(f"Components {ids} pass within the membership test's tolerance of this point, but the "
                             "Jacobian has full rank here, so only one of them passes through it.")
            else:
                verdict = Verdict.SINGULAR
                notes.append(f"The point lies on {len(through)} components of X (ids {ids}): where components "
                             "meet, X is not locally irreducible, so the point is singular whatever the rank.")
        if verdict.is_singular and self.m > 1:
            notes.append(_AS_GIVEN)
        point = np.asarray(decision.point, dtype=complex)
        if self.system.projective:
            point = normalize_projective(point)
        evidence = RankEvidence(rank=int(rank), singular_values=final_values,
                                row_scales=np.asarray(decision.scales, dtype=float), tolerance=zero,
                                gap=singular_value_gap(final_values, int(rank)), digits=int(digits),
                                escalated=escalated, point=point)
        ambient = self.system.ambient_dimension
        local = None if codim is None else ambient - codim
        drop = decision.drop
        return PointVerdict(
            index=index, given=given, point=point, distance=self.distance(given, point), residual=residual,
            verdict=verdict, rank=int(rank), codimension=codim, tangent_dimension=ambient - int(rank),
            local_dimension=local, local_dimension_source=source, evidence=evidence,
            nearest_rank_drop=None if drop is None else (normalize_projective(drop) if self.system.projective
                                                         else np.asarray(drop)),
            nearest_rank_drop_distance=decision.drop_distance, notes=notes,
            components=[{"id": c.id, "dimension": c.dimension, "degree": c.degree} for c in (through or [])])


def _as_points(points, system):
    """Complex array of points and, where given exactly, their exact coordinates."""
    complex_points, exact_points = [], []
    for index, point in enumerate(points, 1):
        coordinates = list(point)
        if len(coordinates) != system.n_variables:
            raise PointError(f"has {len(coordinates)} coordinates, the system has {system.n_variables} variables",
                             index)
        exact = all(isinstance(c, (ExactCoefficient, int)) for c in coordinates)
        try:
            values = np.array([complex(c) for c in coordinates], dtype=complex)
        except (TypeError, ValueError) as err:
            raise PointError(f"coordinates must be numbers ({err})", index) from None
        if not np.all(np.isfinite(values)):
            raise PointError("has a non-finite coordinate", index)
        exact_coordinates = [c if isinstance(c, ExactCoefficient) else ExactCoefficient.rational(c)
                             for c in coordinates] if exact else None
        if system.projective:
            if np.all(values == 0):
                raise PointError("all homogeneous coordinates are zero: not a projective point", index)
            pivot_value = normalize_projective(values)
            if exact_coordinates is not None:
                pivot = projective_pivot(values)
                if exact_coordinates[pivot].is_single_term():
                    inverse = exact_coordinates[pivot].reciprocal()
                    exact_coordinates = [c * inverse for c in exact_coordinates]
                else:
                    exact_coordinates = None
            values = pivot_value
        complex_points.append(values)
        exact_points.append(exact_coordinates)
    return np.array(complex_points, dtype=complex).reshape(len(complex_points), system.n_variables), exact_points


def check_points(system, points, options=None, seed=None, decomposition=None):
    """Smooth or singular? The Jacobian criterion at each point, with its evidence.

    Parameters
    ----------
    system : PolynomialSystem
    points : sequence of sequences
        Coordinates in variable order: numbers, or ``ExactCoefficient`` for
        exact input (then refinement at high precision starts from the exact value).
    options : CheckOptions, optional
    seed : int, optional
        Seed for the random choices; drawn and recorded when not given.
    decomposition : Decomposition, optional
        Components of X (:func:`numag.witness.decompose.decompose`): the local dimension at each
        point is then the largest dimension of the components through it (homotopy
        membership test), and a point on two components is singular. Without it (or with
        ``options.local_dimension``), the rules of :class:`CheckOptions` apply.

    Returns
    -------
    CheckReport

    A point that cannot be moved onto X within the point tolerance gets the verdict "off" (its
    ``residual``, the ``distance`` Newton moved it and a note say how far off it is); the other
    points are judged as usual.

    Raises
    ------
    PointError
        When a point is malformed (wrong number of coordinates, not a number, not finite).
    InputError
        For invalid options.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> cone = parse_system(["x^2 + y^2 - z^2"], ["x", "y", "z"])
    >>> [v.verdict for v in check_points(cone, [[0, 0, 0], [3, 4, 5]], seed=0).points]
    ['singular', 'smooth']
    """
    options = (options or CheckOptions()).validated(system)
    require_numeric(system)
    seed, rng = random_state(seed)
    user_given, user_exact = _as_points(points, system)
    scaling = Scaling.balancing(system)
    if len(user_given) == 0:
        return CheckReport(system=system, points=[], options=options, seed=seed, scaling=scaling)
    given = scaling.to_computed(user_given)
    divisors = [ExactCoefficient.rational(Fraction(10) ** -c) for c in scaling.variable_exponents]
    exact = [None if e is None else [v * d for v, d in zip(e, divisors)] for e in user_exact]
    verdicts = _check_in_units(scaling.scale_system(system), given, exact, options, seed, rng, decomposition,
                               scaling)
    checker = _Checker(system, options, rng)  # distances in the user's units
    for verdict, point in zip(verdicts, user_given):
        _to_user_units(verdict, point, scaling, checker)
    if options.backward_errors:
        _measure_backward_errors(system, scaling, verdicts, options)
    return CheckReport(system=system, points=verdicts, options=options, seed=seed, scaling=scaling)


#: Below this c-th scaled singular value a smooth verdict's backward error is also sought next to the point
#: (a polish of the singular-point system): a given point is known to a few digits, the input's rounding
#: can hide a singular point within that distance.
_POLISH_BELOW = 1e-4


def _measure_backward_errors(system, scaling, verdicts, options):
    """Set the backward error of each smooth verdict of double-precision input (decision 0062), in place.

    Measured in the balanced units of ``scaling`` (verdicts are in the user's units).
    """
    tolerance = input_tolerance(system)
    if tolerance is None:
        return
    balanced = scaling.scale_system(system)
    for verdict in verdicts:
        if verdict.verdict is not Verdict.SMOOTH or not verdict.codimension:
            continue
        values = verdict.evidence.singular_values
        points = [scaling.to_computed(p) for p in (verdict.given, verdict.point)]
        if system.projective:
            points = [normalize_projective(p) for p in points]
        close = len(values) >= verdict.codimension and values[verdict.codimension - 1] <= max(
            _POLISH_BELOW, options.suspect_threshold)
        error = min(backward_error(balanced, p, verdict.codimension) for p in points)
        if close:  # a point next to it where the conditions come closer, if within the given point's accuracy
            nearest, where = nearest_backward_error(balanced, points, verdict.codimension)
            if np.linalg.norm(where - points[0]) <= options.point_tolerance * _size(points[0]):
                error = min(error, nearest)
        verdict.backward_error, verdict.backward_tolerance = float(error), tolerance
        if verdict.near_singular:
            verdict.notes.append(f"Smooth for the coefficients as written, singular after a relative change of at "
                                 f"most {error:.1e} of them, within the {tolerance:.1e} that double-precision "
                                 "coefficients cannot resolve: the input cannot tell which is meant; give exact "
                                 "coefficients to decide.")


def _to_user_units(verdict, given, scaling, checker):
    """Move a verdict's points from the computed units to the user's (in place)."""
    projective = checker.system.projective

    def back(point):
        point = scaling.to_user(point)
        return normalize_projective(point) if projective else point

    verdict.given = given
    verdict.point = back(verdict.point)
    if math.isfinite(verdict.distance):  # infinite: Newton ran away from an "off" point
        verdict.distance = checker.distance(given, verdict.point)
    verdict.evidence = replace(verdict.evidence, point=back(verdict.evidence.point))
    if verdict.nearest_rank_drop is not None:
        verdict.nearest_rank_drop = back(verdict.nearest_rank_drop)
        verdict.nearest_rank_drop_distance = checker.distance(given, verdict.nearest_rank_drop)


def _check_in_units(system, given, exact, options, seed, rng, decomposition, scaling):
    """The verdicts at points of ``system`` (already in computed units; ``decomposition`` in the user's); a
    point that cannot be moved onto X gets the verdict "off"."""
    checker = _Checker(system, options, rng)
    # On X is what Newton's method reaches, not a residual bound (decision 0064): Gauss-Newton aims at a scaled
    # residual of 1e-13 and, at a singular point, can stall just above (rounding, a rank-deficient Jacobian:
    # 1.2e-13 seen at a linkage's branch point, which was then dropped); within rounding it is on X.
    projection = newton_zero_test(system, checker.batch, given, sizes=checker.sizes, max_iterations=30)
    residual_given = np.max(np.abs(checker.batch.evaluate(given, jacobian=False))
                            / checker.sizes.values(given), axis=1)
    refined = projection.points.copy()
    if system.projective:
        refined = normalize_projective(refined)
    on_variety = projection.mask(ZeroKind.ZERO)
    moved = np.array([checker.distance(given[k], refined[k]) for k in range(len(given))])
    tolerances = np.array([checker.tolerance_for(given[k]) for k in range(len(given))])
    off = ~on_variety | (moved > tolerances)
    values, scales = [None] * len(given), [None] * len(given)
    on = np.nonzero(~off)[0]
    if len(on):
        on_values, on_scales = checker.scaled_values_double(refined[on])
        for row, k in enumerate(on):
            values[k], scales[k] = on_values[row], on_scales[row]
    for k in np.nonzero(off)[0]:
        values[k], scales[k] = _values_at_given(checker, given[k])
    through = [None] * len(given)
    if decomposition is not None and options.local_dimension is None:
        on = np.nonzero(~off)[0]  # one shared call: a decomposition of X with one component needs no homotopy
        for k, hits in zip(on, components_through_points(decomposition, [scaling.to_user(refined[k]) for k in on],
                                                         [seed + k for k in on])):
            through[k] = hits
    checker.settle_in_double(given[~off], refined[~off], [values[k] for k in np.nonzero(~off)[0]],
                             [scales[k] for k in np.nonzero(~off)[0]], [through[k] for k in np.nonzero(~off)[0]],
                             positions=np.nonzero(~off)[0], exact=[exact[k] for k in np.nonzero(~off)[0]])
    # decisions first, then the non-reduced sampling of every singular one in shared batches (the same random
    # draws, in the same order, as one sampling per point), then the verdicts
    for k in np.nonzero(~off)[0]:
        checker.judged[k] = checker.decide(given[k], exact[k], refined[k], values[k], scales[k], through[k], position=k)
    singular = [k for k, judged in checker.judged.items() if judged.verdict is Verdict.SINGULAR]
    answers = checker.rank_drops_near_all([(np.asarray(checker.judged[k].decision.point), checker.judged[k].codim)
                                           for k in singular])
    checker.drops_near.update(zip(singular, answers))
    return [_off_verdict(checker, k + 1, given[k], refined[k], float(residual_given[k]), float(moved[k]),
                         float(tolerances[k]), projection.kinds[k], float(projection.after[k]), values[k],
                         scales[k])
            if off[k] else
            checker.check(k + 1, given[k], exact[k], refined[k], float(residual_given[k]), values[k], scales[k],
                          through[k], position=k) for k in range(len(given))]


def _values_at_given(checker, point):
    """Scaled singular values of J at a point off X, kept for the reader; none where J is not finite there."""
    with np.errstate(all="ignore"):
        _, jacobians = checker.batch.evaluate(point[None, :])
        scales = checker.sizes.gradients(point[None, :])
    if not (np.all(np.isfinite(jacobians)) and np.all(np.isfinite(scales)) and np.all(scales > 0)):
        return np.zeros(0), np.zeros(0)
    return scaled_singular_values(jacobians, scales)[0], scales[0]


def _off_verdict(checker, index, given, reached, residual, moved, tolerance, newton, reached_residual, values,
                 scales):
    """The verdict "off" for a point Newton could not bring onto X within the point tolerance.

    Nothing is judged about X there; the evidence is the Jacobian at the given point (in double),
    kept for the reader, and ``point`` is where Newton ended. ``newton`` (a :class:`ZeroKind`) is what
    Newton's method found: X reached (too far), no zero near (the residual not explained), or undecided.
    """
    on_variety = newton is ZeroKind.ZERO
    zero = zero_tolerance(DOUBLE_DIGITS, (checker.m, checker.n))
    rank = numerical_rank(values, zero) if len(values) else 0
    # F overflows at points far out (1e90 on a degree-8 surface): the residual is then beyond any size
    residual = residual if math.isfinite(residual) else math.inf
    reached_residual = reached_residual if math.isfinite(reached_residual) else math.inf
    how = (f"Newton refinement reached a point of X at distance {moved:.3g}, beyond the point tolerance "
           f"{tolerance:.3g}" if on_variety else
           f"Newton refinement did not reach X (scaled residual {reached_residual:.3g} after refinement, "
           f"{moved:.3g} from the given point)" + (
               ": it ended at a stationary point of the residual, which the Jacobian cannot explain, so no point of X "
               "is near"
               if newton is ZeroKind.NOT_A_ZERO else ""))
    note = (f"Not on X: scaled residual {residual:.3g} at the given point; {how} (both in the balanced units "
            "of the scaled problem). Nothing is judged here; raise --point-tolerance if the point is known "
            "to fewer digits.")
    point = np.asarray(reached, dtype=complex)
    if not np.all(np.isfinite(point)):  # Newton ran away: the given point is all there is to show
        point, moved = np.asarray(given, dtype=complex), math.inf
    if checker.system.projective:
        point = normalize_projective(point)
    evidence = RankEvidence(rank=int(rank), singular_values=np.asarray(values, dtype=float),
                            row_scales=np.asarray(scales, dtype=float), tolerance=zero,
                            gap=singular_value_gap(np.asarray(values, dtype=float), int(rank)),
                            digits=DOUBLE_DIGITS, escalated=False, point=np.asarray(given, dtype=complex))
    return PointVerdict(index=index, given=given, point=point, distance=moved, residual=residual,
                        verdict=Verdict.OFF, rank=None, codimension=None, tangent_dimension=None, local_dimension=None,
                        local_dimension_source=LocalDimensionSource.NOT_JUDGED, evidence=evidence,
                        notes=[note], newton=newton)
