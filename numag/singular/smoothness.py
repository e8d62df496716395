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
   moved it, and the other points are judged as usual. Without a point
   tolerance the data sets it (decision 0072): exact data is on X only when F
   vanishes there in exact arithmetic, and then the rank of J at the point,
   also exact, decides; rounded data reaches as far as its last digit, and a
   rank drop within that reach makes the verdict "singular", about that point.
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
5. For a singular verdict at a point of one reduced component, with more equations than
   its codimension: the component's multiplicity at the point (its local witness set,
   :func:`numag.witness.local.component_multiplicity`). 1 means X is smooth there and the
   equations have an embedded point (verdict "embedded point", decision 0105); 2 or more
   keeps "singular"; no clear count makes it "undecided".

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

from ..kinds import TextEnum
from ..errors import InputError, ParseError, PointError, is_integer, is_number, require_option
from ..system.display import html_table, short_point
from ..system.centred import CENTRED_BALANCING_FLOOR, centre_near, centred_system, translated_terms
from ..system.exact import ExactCoefficient, exact_rank
from ..system.parse import parse_constant
from ..system.polynomial import PolynomialSystem, require_numeric
from ..numeric.cluster import line_distance, normalize_projective, projective_pivot
from ..numeric.evaluate import BatchEvaluator, PrecisionEvaluator, TermSizes
from ..numeric.linalg import (DOUBLE_DIGITS, RankEvidence, mp_least_squares, mp_singular_values, numerical_rank,
                              scaled_singular_values, singular_value_gap, zero_tolerance)
from ..numeric.refine import (SLID_RATIO, IsolationTest, RankDropSystem, ZeroKind, mp_gauss_newton,
                              mp_scaled_equations, newton_zero_test, project_to_variety, rank_drop_points)
from ..numeric.scaling import Scaling
from ..numeric.seeds import random_state
from ..witness.decompose import CENTRING_TERMS, components_through_points
from ..witness.local import component_multiplicity
from .kinds import CoefficientPrecision, JudgedPoint, LocalDimensionSource, Verdict
from .nearness import (backward_error, coefficient_precision, input_tolerance, nearest_backward_error,
                       point_precision, separation_digits)

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
#: Exact input (decision 0109): a rank drop settled in double (scaled residual 1e-13, Gauss-Newton's acceptance at
#: about 17 digits) already separates it from a change of the coefficients' last written digit when the separation
#: digits are at most this (integer Chebyshev curves: 14, the six-bar: 12); beyond, it is confirmed in mpmath.
_DOUBLE_SEPARATES = DOUBLE_DIGITS + 1
#: Rounded data without a point tolerance (decision 0072): the nearest point of X must be within this many data
#: radii of the given point (else "off"), and a rank drop within as many radii leaves the verdict undecided.
DATA_MARGIN = 10.0
#: Decision 0110: rounded data's smooth verdict needs the nearest rank drop found beyond this many times the
#: reach of its digits (an estimate: computed digits overstate their accuracy); between the two it is undecided.
SMOOTH_MARGIN = 10.0
#: Exact data: equations with at most this many terms in all are evaluated in exact arithmetic at the point;
#: larger ones in mpmath at the check's highest precision.
_EXACT_TERMS = 5000
#: Digits of the mpmath Gauss-Newton that finds the nearest point of X to exact or rounded data.
_NEAREST_DIGITS = 30
#: Extra working digits tried in turn: an expanded polynomial far from the origin cancels many digits (a quartic
#: moved to 3456 loses 13 of them), and Gauss-Newton then stalls above its tolerance at the first precision.
_NEAREST_EXTRA_DIGITS = (10, 40)
#: Decision 0132: rounded data finer than double precision (a decimal of 30 digits) is measured in mpmath at this many
#: digits beyond its relative radius, so that the floor of its reach is the working precision's, not double's.
_FINE_EXTRA_DIGITS = 10
#: A rank drop at the point is settled in double only where the rank-drop system's scaled Jacobian has
#: smallest / largest singular value at least this (decision 0074): 0.02-1 at nodes and linkage folds,
#: 1e-7 at a cusp, 1e-10 at a tacnode (where Newton in double stops short of the point).
_DOUBLE_REGULAR = 1e-4
#: The test of :meth:`_Checker.larger_dimension_at`: steps of this fraction of the sampling radius along the kernel
#: of J, in this many random directions per sample; a sample is on a manifold of the kernel's dimension when Newton
#: moves every step back by at most this fraction of it (1e-5 seen on a sphere; the part of a random direction
#: normal to a non-reduced component is below 1e-2 with probability 1e-4 per direction).
_KERNEL_STEP = 1e-3
_KERNEL_DIRECTIONS = 3
_KERNEL_STAYS = 1e-2
#: The non-reduced sampling asks whether the rank drops within this fraction of the sampling radius of each sample
#: (:meth:`_Checker._rank_drops_at_samples_mp`); decided in double where J clearly has full rank on that whole ball
#: (:meth:`_Checker.full_rank_around`, decision 0117): the c-th scaled singular value at the sample above this
#: multiple of the estimated most it can fall over the ball (the margin covers the estimate's higher orders, which
#: are 1e-3 of the sampling radius smaller, and the Schur complement's factor (1 + |E| / (sigma_(c-1) - |E|))^2), ...
_SAMPLE_DROP_REACH = 1e-3
_FULL_RANK_MARGIN = 10.0
#: ... and above this multiple of sqrt(scaled residual) (a sample d off a k-fold component: residual d^k, c-th value
#: about d^(k - 1) <= sqrt(residual); on a reduced component the residual is at rounding, 1e-13 at most: 3e-5).
_OFF_NON_REDUCED_MARGIN = 100.0


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
    point_tolerance : float or None
        How far (relative to ||(1, a)||, both in the user's units: decision 0120) the point a verdict speaks
        about may lie from the given point: the given point's accuracy. None (the default): from the data
        (decision 0072). Exact data (exact coefficients, a point of integers, rationals or decimals
        of under 15 significant digits) is judged exactly: on X only when F vanishes there in exact
        arithmetic (else "off", with the distance to the nearest point of X found), and the rank of
        J at the point itself. Rounded data (decimals of 15 or more digits, as printed doubles, or
        double-precision coefficients) is judged within :data:`DATA_MARGIN` radii of what its digits
        allow: "off" beyond, "undecided" when a rank drop is within that reach.
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
    point_tolerance: float | None = None
    max_digits: int = 50
    suspect_threshold: float = 1e-4
    neighbour_samples: int = 3
    neighbour_radius: float = 1e-2
    backward_errors: bool = True

    def __post_init__(self):
        """Refuse a bad value on construction, naming the option (the system's bounds: :meth:`validated`)."""
        require_option(self.local_dimension is None or is_integer(self.local_dimension), "local_dimension",
                       "an integer", self.local_dimension)
        require_option(self.point_tolerance is None or (is_number(self.point_tolerance)
                                                        and 0 < self.point_tolerance < 1),
                       "point_tolerance (--point-tolerance)", "None or in (0, 1)", self.point_tolerance)
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
        if self.local_dimension is None:
            return self
        ambient = system.ambient_dimension
        if not 0 <= self.local_dimension <= ambient:
            raise InputError(f"local_dimension (--local-dimension) must be between 0 and {ambient}, the "
                             f"space's dimension, got {self.local_dimension}")
        # No point decides what the equations alone rule out (a verdict there would rest on a dimension no
        # component has): m nonzero equations leave every component of X of dimension >= n - m (Krull's height
        # theorem), and one nonzero equation vanishes on no open set, so every component has dimension < n
        nonzero = sum(1 for p in system.polynomials if not p.is_zero())
        low, high = max(0, ambient - nonzero), ambient - 1 if nonzero else ambient
        if not low <= self.local_dimension <= high:
            why = (f"a nonzero equation vanishes on no open set, so no component of X has dimension {ambient}"
                   if self.local_dimension > high else
                   f"{nonzero} nonzero equation{'s leave' if nonzero > 1 else ' leaves'} every component of X of "
                   f"dimension at least {ambient} - {nonzero} = {low} (Krull's height theorem)")
            allowed = f"{low}" if low == high else f"between {low} and {high}"
            raise InputError(f"local_dimension (--local-dimension) must be {allowed} for these equations, got "
                             f"{self.local_dimension}: {why}")
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
    judged : JudgedPoint or None
        Which point the verdict is about (decision 0072): the given point itself, the nearest point of X
        found, a point where the rank drops within the point tolerance, or none.
    on_x_exactly : bool or None
        Exact data: whether F vanishes at the given point in exact arithmetic (None: not decided so).
    data_radius : float or None
        How far the digits given let the point be off (user's units; 0 for exact data); None when a point
        tolerance was given.
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
    judged: JudgedPoint | None = None
    on_x_exactly: bool | None = None
    data_radius: float | None = None

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
class _Nearby:
    """What the sampling next to a point found (:meth:`_Checker.rank_drops_near`).

    Attributes
    ----------
    drops : bool
        The rank drops at every informative sample (the "non-reduced" evidence).
    larger : int or None
        A dimension of X at a sample larger than the local dimension used (decision 0084): the rank drops there
        because the samples lie on a larger component, so ``drops`` is False.
    """

    drops: bool
    larger: int | None = None


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
    #: exact input whose rank drop here needs more digits than max_digits to be told from one of the equations
    #: changed in their last written digit (decision 0109): no other evidence makes it singular (decision 0111)
    beyond_digits: bool = False


def _size(point):
    return math.sqrt(1.0 + float(np.linalg.norm(point)) ** 2)


def _foot_on_x(function, z, start, ctx, tolerance, rounds=20):
    """From a point ``z`` of X, the foot of the perpendicular from ``start`` on X near it (decision 0141).

    Each round moves z by the part of ``start - z`` tangent to X at z (the kernel of J), halved where that
    overshoots, and brings it back to X by Gauss-Newton; a round is kept only when it brings z nearer to ``start``. A restart around the start lands on X
    anywhere within its radius of the nearest points; this walks it along X to a point where ``start - z`` is
    normal to X, a nearest point locally, so the distance kept does not depend on where the restart landed.
    """
    distance = ctx.norm(z - start)
    rcond = ctx.mpf(10) ** (-(ctx.dps * 3) // 4)
    for _ in range(rounds):
        _, jacobian = function(z)
        offset = start - z
        tangent = offset - mp_least_squares(jacobian, jacobian * offset, ctx, rcond=rcond)
        if ctx.norm(tangent) <= ctx.mpf(10) ** (-(ctx.dps // 2)) * (distance + ctx.norm(z)):
            break
        for damping in (1.0, 0.5, 0.25, 0.125):  # X curves away from its tangent: a shorter move where the full one overshoots
            moved, converged, _, _ = mp_gauss_newton(function, z + tangent * damping, ctx, tolerance=tolerance,
                                                     max_iterations=40)
            if converged and ctx.norm(moved - start) < distance:
                break
        else:
            break
        z, distance = moved, ctx.norm(moved - start)
    return z


class _Checker:
    """Carries one system's evaluators and options through the checks of many points."""

    def __init__(self, system, options, rng):
        self.system = system
        self.options = options
        self.rng = rng
        self.settled = {}  # position -> outcome decided in double for a batch (settle_in_double)
        self.tolerances = {}  # position -> absolute point tolerance (computed units) when set per point
        self.inferred = set()  # positions whose tolerance is inferred from their digits (decision 0110)
        self.data_reach = set()  # positions whose tolerance is DATA_MARGIN times their data radius (decision 0147)
        # decision 0132: rounded data finer than double, position -> (exact decimal, working digits); their distances
        # are measured from the exact decimal in mpmath, not between doubles
        self.fine = {}
        self.last_nearest_slid = False  # decision 0141: the last nearest point was found by a restart, Newton slid
        self.judged = {}  # position -> _Judged, decided for a whole batch before its sampling
        self.drops_near = {}  # position -> the non-reduced sampling's answer, for a whole batch at once
        self.batch = BatchEvaluator(system.polynomials)
        self.precise = PrecisionEvaluator(system.polynomials)
        self._drop_evaluators = None  # (F, its first derivatives) in mpmath, made at the first rank drop sought
        self.m, self.n = system.n_equations, system.n_variables
        self.sizes = TermSizes(system.polynomials, system.projective)
        # the decomposition (user's units) and the units of this checker, when the local multiplicity of a
        # component can be measured (decision 0105)
        self.decomposition, self.user_scaling = None, None
        # exact coefficients: a singular point is confirmed at the digits that tell it from one of the equations
        # changed in their last written digit (decision 0109)
        self.exact_input = False

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

    @property
    def in_user_units(self):
        """Whether distances from the given point are measured in the user's units: the user gave the point
        tolerance, relative to the point as given (decision 0120; projective points keep the distance of lines)."""
        return (self.options.point_tolerance is not None and not self.system.projective
                and getattr(self, "user_scaling", None) is not None)

    def from_given(self, given, point):
        """Distance of ``point`` from the given one as the point tolerance measures it (computed-unit points):
        in the user's units when the user's tolerance applies, else in the computed units."""
        if self.in_user_units:
            given, point = self.user_scaling.to_user(np.array([given, point], dtype=complex))
        return self.distance(given, point)

    def from_given_precise(self, given, point, position):
        """:meth:`from_given` of a point found in mpmath (its coordinates in :attr:`last_drop_precise`); for rounded
        data finer than double (decision 0132) measured from the exact decimal in mpmath, at the working precision."""
        if position not in self.fine or self.system.projective:
            return self.from_given(given, point)
        decimal, _ = self.fine[position]
        ctx = mpmath.mp
        return float(ctx.norm(ctx.matrix([p - c.to_context(ctx) for p, c in zip(self.last_drop_precise, decimal)])))

    def tolerance_for(self, given, position=None):
        """How far the point a verdict speaks about may be from the given one (the point's own, when set), in the
        units of :meth:`from_given`."""
        if position in self.tolerances:
            return self.tolerances[position]
        if self.system.projective:
            return self.options.point_tolerance
        if self.in_user_units:
            return self.options.point_tolerance * _size(self.user_scaling.to_user(np.asarray(given)[None, :])[0])
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
            if self.m == 1:  # every component of a hypersurface has codimension 1 (Krull's principal ideal theorem)
                return 1, LocalDimensionSource.HYPERSURFACE
            if through is not None:
                # X was decomposed and no component passes through this point of X: the decomposition missed
                # what is here (a sphere far from the origin whose membership test failed), and assuming a
                # complete intersection would guess the verdict
                return None, LocalDimensionSource.UNKNOWN
            return self.m, LocalDimensionSource.ASSUMED
        if rank == ambient:
            return ambient, LocalDimensionSource.ISOLATED
        return None, LocalDimensionSource.UNKNOWN

    # -- refinement at precision -----------------------------------------------------------------
    def scaled_equations(self, ctx):
        """F and J at the precision of ``ctx``, rows in units of their terms (the function Gauss-Newton takes)."""
        return mp_scaled_equations(self.precise, self.sizes, ctx)

    def refine_on_f(self, point, ctx, digits):
        """Gauss-Newton on F from ``point`` at ``digits``: (the point reached, whether F vanishes there at them)."""
        start = ctx.matrix([ctx.mpc(v) for v in point])
        z, converged, _, _ = mp_gauss_newton(self.scaled_equations(ctx), start, ctx,
                                             tolerance=100 * 10.0 ** (-digits))
        return [z[j] for j in range(self.n)], bool(converged)

    # -- exact data (decision 0072) -----------------------------------------------------------------
    def exact_small_enough(self):
        """True when the equations are exact and small enough to be evaluated in exact arithmetic."""
        return (all(p.is_exact for p in self.system.polynomials)
                and sum(p.n_terms for p in self.system.polynomials) <= _EXACT_TERMS)

    def vanishes_exactly(self, exact_point):
        """Whether F is zero at an exact point: in exact arithmetic, or in mpmath at the highest precision
        (scaled residual at most 10^(5 - digits)) when the equations are too large for it."""
        if self.exact_small_enough():
            powers = [[ExactCoefficient.rational(1)] for _ in exact_point]
            return all(p.evaluate_exact(exact_point, powers).is_zero() for p in self.system.polynomials)
        digits = self.options.max_digits
        with mpmath.mp.workdps(digits + 10):
            values, _ = self.scaled_equations(mpmath.mp)(mpmath.mp.matrix([c.to_context(mpmath.mp)
                                                                          for c in exact_point]))
            return bool(mpmath.mp.norm(values) <= mpmath.mp.mpf(10) ** (5 - digits))

    def exact_rank(self, exact_point):
        """The rank of J at an exact point in exact arithmetic; None when the equations are too large."""
        if not self.exact_small_enough():
            return None
        powers = [[ExactCoefficient.rational(1)] for _ in exact_point]
        return exact_rank([[d.evaluate_exact(exact_point, powers) for d in row]
                           for row in self.system.jacobian_polynomials()])

    def nearest_on_x(self, start, goal=_NEAREST_DIGITS):
        """The nearest point of X found from ``start`` (exact or complex coordinates) by Gauss-Newton in mpmath.

        Returns (point as complex ndarray, converged). Minimum-norm steps go to a nearby point of X; where
        J vanishes at the start (a saddle of f between two branches) no step moves it, so Gauss-Newton
        also starts from a few points around it at the distance the residual suggests (sqrt of the
        scaled residual, the reach of a quadratic), and the nearest point reached is kept. ``goal``: the digits
        Gauss-Newton aims at. The offset of the point found from ``start``, measured in mpmath, is left in
        :attr:`last_nearest_offset` (complex; decision 0132: doubles cannot show it for data finer than theirs).
        """
        for extra in _NEAREST_EXTRA_DIGITS:
            found, converged = self._nearest_on_x_at(start, goal + extra, goal)
            if converged:
                break
        return found, converged

    def _nearest_on_x_at(self, start, digits, goal=_NEAREST_DIGITS):
        """:meth:`nearest_on_x` at ``digits`` working digits."""
        with mpmath.mp.workdps(digits):
            ctx = mpmath.mp
            x0 = [c.to_context(ctx) if isinstance(c, ExactCoefficient) else ctx.mpc(c) for c in start]
            function = self.scaled_equations(ctx)
            factors = None
            if self.in_user_units:
                # nearest in the user's units, where the user's tolerance measures (decision 0120): Gauss-Newton's
                # minimum-norm steps taken in the user's coordinates w = factor * y (a node's smooth neighbour
                # 3.6e-6 away in those units was 3.6e-5 away in the computed ones' nearest point)
                factors = [ctx.mpf(float(f)) for f in self.user_scaling.variable_factors]
                computed = function
                x0 = [v * f for v, f in zip(x0, factors)]

                def function(w):
                    values, jacobian = computed(ctx.matrix([w[j] / factors[j] for j in range(w.rows)]))
                    for i in range(jacobian.rows):
                        for j in range(jacobian.cols):
                            jacobian[i, j] /= factors[j]
                    return values, jacobian
            tolerance = 100 * ctx.mpf(10) ** (-goal)
            residual, jacobian = function(ctx.matrix(x0))
            z, converged, _, _ = mp_gauss_newton(function, ctx.matrix(x0), ctx, tolerance=tolerance,
                                                 max_iterations=40)
            best, best_distance = (z, float(ctx.norm(z - ctx.matrix(x0)))) if converged else (None, math.inf)
            stuck = min(self.n, self.m) and mp_singular_values(jacobian, ctx)[min(self.n, self.m) - 1] <= ctx.mpf(
                10) ** (-DOUBLE_DIGITS) * max(ctx.norm(residual), 1e-300) ** 0.5
            reach = float(ctx.norm(residual)) ** 0.5 * _size(np.array([complex(v) for v in x0]))
            self.last_nearest_slid = False
            # Decision 0141: Newton went farther than its first step says X is (SLID_RATIO): it slid to a zero of
            # higher order past smooth points of X nearer the start
            first = float(ctx.norm(mp_least_squares(jacobian, residual, ctx,
                                                    rcond=ctx.mpf(10) ** (-(ctx.dps * 3) // 4))))
            # converged or not: at a node Newton converges linearly and may stop above the tolerance, still sliding
            slid = first > 0 and float(ctx.norm(z - ctx.matrix(x0))) > SLID_RATIO * first
            # farther than the reach of a quadratic: J was nearly blind to the direction of the nearest points (a
            # node's neighbour, J parallel to the branch through the node), and Newton slid to a farther one
            if slid and not (stuck or best_distance > 2 * reach):
                reach = first  # restarts around the start at the distance the linear model gives
            if stuck or not converged or slid or best_distance > 2 * reach:
                real = all(ctx.im(v) == 0 for v in x0)
                # a real start keeps real points real; but the nearest points of X can be complex (beside a cusp,
                # on the side where the real curve has no points, real Gauss-Newton stalls at the residual's
                # stationary point), so complex directions follow where no real one converged (decision 0120)
                restarted = False
                for attempt in range(8 if reach > 0 and real else 4 if reach > 0 else 0):
                    # a point as far as a slide is no reason to stop: the nearer ones can be complex (real restarts
                    # beside a Whitney umbrella's handle slide to its singular line again)
                    if attempt == 4 and best is not None and (not slid or best_distance <= SLID_RATIO * first):
                        break
                    direction = self.rng.standard_normal(self.n) + (
                        0 if real and attempt < 4 else 1j * self.rng.standard_normal(self.n))
                    direction *= reach / np.linalg.norm(direction)
                    begin = ctx.matrix([v + ctx.mpc(d) for v, d in zip(x0, direction)])
                    z, converged, _, _ = mp_gauss_newton(function, begin, ctx, tolerance=tolerance, max_iterations=40)
                    if converged:  # landed anywhere within the restart's radius: walked to the nearest point there
                        z = _foot_on_x(function, z, ctx.matrix(x0), ctx, tolerance)
                    distance = float(ctx.norm(z - ctx.matrix(x0)))
                    if converged and distance < best_distance:
                        best, best_distance, restarted = z, distance, True
                self.last_nearest_slid = slid and restarted
            back = [1] * self.n if factors is None else factors
            self.last_nearest_offset = None
            if best is None:
                return np.array([complex(v / f) for v, f in zip(x0, back)]), False
            self.last_nearest_offset = np.array([complex((best[j] - x0[j]) / back[j]) for j in range(self.n)])
            return np.array([complex(best[j] / back[j]) for j in range(self.n)]), True

    def find_rank_drop(self, point, rank, ctx, digits):
        """Solve F = 0 and rank J <= rank from ``point``; return the point (complex) or None."""
        if self._drop_evaluators is None:  # shared by every point judged: derivatives and coefficients made once
            self._drop_evaluators = RankDropSystem.evaluators_of(self.system, self.precise)
        drop = RankDropSystem(self.system, rank, [complex(v) for v in point], ctx, self._drop_evaluators)
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

    def separation(self, point):
        """Exact input: the digits a singular point at ``point`` is confirmed at (decision 0109); else None."""
        return separation_digits(self.system, point) if self.exact_input else None

    def confirmed_in_exact_input(self, point, codim, given, tolerance):
        """Exact input: the rank drop found in double at ``point``, polished at :meth:`separation` digits (a
        :class:`_Decision`), or None when it is no zero there or those digits exceed ``max_digits``.

        Double precision cannot tell a singular point of the equations as written from one of the equations
        changed in their last written digit (a node's constant 10.999999999999 for 11 among terms of 300): both
        settle at double rounding. At the separation digits only the first is a zero of the rank-drop system.
        """
        digits = self.separation(point)
        if digits is None or digits > self.options.max_digits:
            return None
        digits = max(digits, 30)
        with mpmath.mp.workdps(digits + 10):
            ctx = mpmath.mp
            found = self.find_rank_drop([ctx.mpc(v) for v in point], codim - 1, ctx, digits)
            if found is None or self.from_given(given, found) > tolerance:
                return None
            values, scales = self.scaled_values_mp(self.last_drop_precise, ctx)
        return _Decision(outcome=Verdict.SINGULAR, point=found, values=values, scales=scales, digits=digits,
                         drop=found, drop_distance=self.from_given(given, found))

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
                distance = self.from_given(given[position], found)
                tolerance = self.tolerance_for(given[position], number[position])
                # A rank drop at the point is settled only where the rank-drop system is regular there (its
                # Jacobian well conditioned: a node, a linkage's fold). At a singular point of Milnor number > 1
                # (a tacnode, a cusp) it is not: Gauss-Newton stops 1e-5 away with a tiny residual, and that
                # point split one tacnode into two pieces and lost its realness (tests/test_trust.py, bitangent
                # conics; decision 0038's amendment); those, and points given exactly, go to the escalation.
                if (distance <= _DOUBLE_NEAR * tolerance and drops.conditioning[row] >= _DOUBLE_REGULAR
                        and (exact is None or exact[position] is None)):
                    if self.exact_input and self.separation(found) > _DOUBLE_SEPARATES:
                        # confirmed beyond the input's last digit, else escalated (decision 0109)
                        confirmed = self.confirmed_in_exact_input(found, codim, given[position], tolerance)
                        if confirmed is not None:
                            self.settled[number[position]] = confirmed
                        continue
                    self.settled[number[position]] = _Decision(
                        outcome=Verdict.SINGULAR, point=found, values=at_drop[row], scales=scales_at_drop[row],
                        digits=DOUBLE_DIGITS, drop=found, drop_distance=distance)
                elif distance >= _DOUBLE_FAR * tolerance and values[position][codim - 1] >= _DOUBLE_CLEAR_SMOOTH:
                    self.settled[number[position]] = _Decision(
                        outcome=Verdict.SMOOTH, point=refined[position], values=values[position],
                        scales=scales[position], digits=DOUBLE_DIGITS, drop=found, drop_distance=distance)

    def rank_drops_near_in_double(self, groups, codim, radii):
        """For each group of samples (of one codimension): True or False when double precision decides
        :meth:`rank_drops_near` clearly, else None.

        False when J has full rank c clearly on the whole ball of radius 1e-3 of the sampling radius around one of
        the group's samples (:meth:`full_rank_around`, decision 0117): no rank drop is that near it, which is what
        the test in mpmath asks. True when a batched Gauss-Newton on the rank-drop system reaches a regular zero at
        every sample. All samples in one batch each.
        """
        if not groups:
            return []
        sizes = [len(g) for g in groups]
        samples = np.concatenate([np.array(g) for g in groups])
        reach = np.repeat(_SAMPLE_DROP_REACH * np.asarray(radii, dtype=float), sizes)
        clear = self.full_rank_around(samples, codim, reach)
        answers, first, open_rows, open_groups = [], 0, [], []
        for j, size in enumerate(sizes):
            rows = np.arange(first, first + size)
            first += size
            if np.any(clear[rows]):
                answers.append(False)
            else:
                answers.append(None)
                open_rows.append(rows)
                open_groups.append(j)
        if not open_groups:
            return answers
        drops = rank_drop_points(self.system, samples[np.concatenate(open_rows)], codim - 1,
                                 tolerance=0.1 * _DOUBLE_SETTLED_RESIDUAL)
        first = 0
        for j, rows in zip(open_groups, open_rows):
            mine = slice(first, first + len(rows))
            first += len(rows)
            settled = drops.residuals[mine] <= _DOUBLE_SETTLED_RESIDUAL
            distances = np.array([self.distance(found, sample)
                                  for found, sample in zip(drops.points[mine], samples[rows])])
            # A drop found well away from a sample is no proof of full rank there: on a doubled component
            # (x^2 (z - 1)) Gauss-Newton on (F, J V) halves x while the linear rows pull along z, and it ends where
            # the doubled component meets another one (z = 1), a unit away. Full rank is shown by
            # full_rank_around above; what neither settles, the anchored search in mpmath decides.
            if np.all(settled & (distances <= 1e-4 * radii[j])):
                answers[j] = True
        return answers

    def full_rank_around(self, samples, codim, reach):
        """Whether J has rank ``codim`` at every point within ``reach`` (one per sample) of each sample, clearly,
        in double precision (decision 0117). Boolean array, one per sample.

        In the checker's coordinates (balanced, and centred at the point sampled around where that applies), with
        A = J(s) in units of its rows' terms, sigma_1 >= ... its singular values, u, v the c-th singular vectors
        (c = ``codim``) and E = A(y) - A(s) for |y - s| <= reach (the same row units): restricted to the first c
        right and left singular vectors, A + E is diag(sigma_1..sigma_c) + U^H E V, so (Courant-Fischer, and the
        Schur complement of its leading (c-1) block) sigma_c(A + E) stays positive when

            sigma_c > |u^H E v| + |E|^2 / (sigma_(c-1) - |E|)   and   sigma_(c-1) > |E|.

        Estimated from J at s +- reach e_j (one batch): |u^H E v| by the first-order term (the norm of the vector
        u^H (J(s + reach e_j) - J(s - reach e_j)) v / 2 over j, exact for all directions by Cauchy-Schwarz) plus n
        times the largest second difference along an axis; |E| by the spectral norm of the stacked differences
        J(s +- reach e_j) - J(s) (a bound for every direction to first order). Both are coordinate-free to first order
        (unitary invariant). Clear when both inequalities hold with the margin :data:`_FULL_RANK_MARGIN`, and sigma_c
        is above :data:`_OFF_NON_REDUCED_MARGIN` times sqrt(residual) (F in units of its terms): a sample that Newton
        left at distance d off a k-fold component (x^k = 0) has residual d^k and sigma_c about d^(k - 1), at most
        sqrt(residual), while a sample of a reduced component has its residual at rounding.

        Examples
        --------
        >>> from numag.system.parse import parse_system
        >>> checker = _Checker(parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"]), CheckOptions(), None)
        >>> sample = np.array([[0.01, 0.01 * np.sqrt(1.01)]])  # on a branch of the node, 0.01 from it
        >>> checker.full_rank_around(sample, 1, np.array([1e-5])).tolist()  # no rank drop within 1e-5 of it
        [True]
        >>> checker.full_rank_around(sample, 1, np.array([1e-2])).tolist()  # within 1e-2: the node
        [False]
        """
        samples = np.atleast_2d(np.asarray(samples, dtype=complex))
        count, n = samples.shape
        if count == 0 or not 1 <= codim <= min(self.m, n):
            return np.zeros(count, dtype=bool)
        reach = np.asarray(reach, dtype=float)
        if self.system.projective:  # a line within angle `reach` has a representative within reach |s| of s
            reach = reach * np.linalg.norm(samples, axis=1)
        values, jacobians = self.batch.evaluate(samples)
        row_scales = self.sizes.gradients(samples)
        scaled = jacobians / row_scales[:, :, None]
        left, sigmas, right = np.linalg.svd(scaled)
        sigma = sigmas[:, codim - 1]
        u, v = left[:, :, codim - 1], right[:, codim - 1, :].conj()
        residual = np.linalg.norm(values / self.sizes.values(samples), axis=1)
        steps = reach[:, None, None] * np.eye(n)[None]  # (count, n, n): row j is the step along e_j
        shifted = np.concatenate([samples[:, None, :] + steps, samples[:, None, :] - steps], axis=1)
        _, moved = self.batch.evaluate(shifted.reshape(-1, n))
        moved = moved.reshape(count, 2, n, self.m, n) / row_scales[:, None, None, :, None] - scaled[:, None, None]
        first, second = (moved[:, 0] - moved[:, 1]) / 2, (moved[:, 0] + moved[:, 1]) / 2  # (count, n, m, n)
        along = np.linalg.norm(np.einsum("pi,pjik,pk->pj", u.conj(), first, v), axis=1)
        along = along + n * np.linalg.norm(second, ord=2, axis=(2, 3)).max(axis=1)
        # |E| for every direction: the spectral norm of the differences stacked (m n x n), either side
        change = np.maximum(*(np.linalg.norm(moved[:, side].reshape(count, n * self.m, n), ord=2, axis=(1, 2))
                              for side in (0, 1)))
        if codim > 1:
            above = sigmas[:, codim - 2]
            coupled = change ** 2 / np.maximum(above - change, np.finfo(float).tiny)
            apart = above > _FULL_RANK_MARGIN * change
        else:
            coupled, apart = np.zeros(count), np.ones(count, dtype=bool)
        clear = (apart & (sigma > _FULL_RANK_MARGIN * (along + coupled))
                 & (sigma > _OFF_NON_REDUCED_MARGIN * np.sqrt(residual)))
        finite = np.isfinite(sigma) & np.isfinite(residual) & np.isfinite(along) & np.isfinite(change)
        return clear & finite

    # -- one point ---------------------------------------------------------------------------------
    def escalate(self, given, exact_given, refined, codim, position=None):
        """Decide a suspect rank at rising precision (a :class:`_Decision`)."""
        opts = self.options
        schedule = sorted({d for d in (30, 2 * 30, 4 * 30, 8 * 30) if d < opts.max_digits} | {opts.max_digits})
        schedule = [d for d in schedule if d > DOUBLE_DIGITS] or [opts.max_digits]
        # exact input: a rank drop below the separation digits may be one of the equations changed in their last
        # written digit (decision 0109), so "singular" is taken at those digits only; "smooth" (a drop found far
        # away, a stable c-th value) is a fact of the equations as written at any precision, and needs the lower
        # steps of the schedule (two steps to be seen stable: a schedule started at max_digits had one, and left a
        # smooth point undecided, decision 0111)
        needed = self.separation(refined)
        if needed is not None and needed < opts.max_digits:
            schedule = sorted(set(schedule) | {max(needed, 30)})
        if position in self.fine:  # decision 0132: below the data's own digits a distance says nothing
            finest = self.fine[position][1]
            schedule = sorted({d for d in schedule if d >= finest} | {finest})
        history = []
        tolerance = self.tolerance_for(given, position)
        current = [complex(v) for v in refined]
        for digits in schedule:
            with mpmath.mp.workdps(digits + 10):
                ctx = mpmath.mp
                start = ([v.to_context(ctx) for v in exact_given] if exact_given is not None
                         else [ctx.mpc(v) for v in current])
                on_x, settled = self.refine_on_f(start, ctx, digits)
                current = [complex(v) for v in on_x]
                values, scales = self.scaled_values_mp(on_x, ctx)
                history.append(values[codim - 1] if codim - 1 < len(values) else 0.0)
                found = self.find_rank_drop(on_x, codim - 1, ctx, digits)
                found_precise = self.last_drop_precise if found is not None else None
                if found is None or self.from_given_precise(given, found, position) > tolerance:
                    # Where the rank drops further (a cone's vertex, J = 0), "rank <= codim - 1" has a
                    # family of kernels at the point and Newton stalls; "rank <= r" for the lower r the
                    # point has is regular there. Such a point has rank <= codim - 1 as well.
                    for lower in range(codim - 2, -1, -1):
                        deeper = self.find_rank_drop(on_x, lower, ctx, digits)
                        if deeper is not None and self.from_given_precise(given, deeper, position) <= tolerance:
                            found = deeper
                            break
                    else:  # none: judge the first one found (if any) at its own precise point
                        self.last_drop_precise = found_precise
                # below the separation digits a drop at the point may be one of the equations changed in their last
                # digit: more digits decide, or the c-th value's stability (smooth)
                too_few = needed is not None and digits < needed
                if found is not None and not (too_few and self.from_given_precise(given, found, position) <= tolerance):
                    distance = self.from_given_precise(given, found, position)
                    at_found, scales_found = self.scaled_values_mp(self.last_drop_precise, ctx)
                    if distance <= tolerance:
                        return _Decision(outcome=Verdict.SINGULAR, point=found, values=at_found, scales=scales_found,
                                         digits=digits, drop=found, drop_distance=distance)
                    if position in self.inferred and distance <= SMOOTH_MARGIN * tolerance:
                        # Decision 0110: a rank drop beyond the point's uncertainty but not clearly so; the
                        # uncertainty is itself an estimate (the digits of a computed point overstate its accuracy)
                        return _Decision(outcome=Verdict.UNDECIDED, point=np.array(current), values=values,
                                         scales=scales, digits=digits, drop=found, drop_distance=distance)
                    return _Decision(outcome=Verdict.SMOOTH, point=np.array(current), values=values, scales=scales,
                                     digits=digits, drop=found, drop_distance=distance)
                zero = zero_tolerance(digits, (self.m, self.n))
                if len(history) >= 2:
                    previous, latest = history[-2], history[-1]
                    if latest > zero and previous > 0 and abs(latest - previous) <= 1e-3 * previous:
                        return _Decision(outcome=Verdict.SMOOTH, point=np.array(current), values=values, scales=scales,
                                         digits=digits, drop=None, drop_distance=None)
                    # only where F vanishes at these digits: Gauss-Newton stalls at a least-squares point where J
                    # has the rank of the drop (two simple points 1.5e-6 apart refined from their midpoint: y = 0,
                    # and J's column along y stays exactly zero), and that point is no point of X (decision 0146)
                    if (latest <= zero and previous <= zero_tolerance(schedule[len(history) - 2], (self.m, self.n))
                            and not too_few and settled):
                        return _Decision(outcome=Verdict.SINGULAR, point=np.array(current), values=values,
                                         scales=scales, digits=digits, drop=None, drop_distance=None)
        return _Decision(outcome=Verdict.UNDECIDED, point=np.array(current), values=values, scales=scales,
                         digits=schedule[-1], drop=None, drop_distance=None)

    def rank_drops_near(self, point, codim):
        """Sample nearby points of X: does the rank drop at every one of them? (a :class:`_Nearby`)

        Samples that Newton pulls back onto ``point`` itself say nothing and are
        discarded; without enough informative samples the answer is no.
        """
        return self.rank_drops_near_all([(point, codim)])[0]

    def rank_drops_near_all(self, items):
        """:meth:`rank_drops_near` for many ``(point, codim)`` pairs (a list of :class:`_Nearby`).

        Decision 0084: each point is sampled in coordinates centred exactly at it and balanced anew
        (:meth:`centred_at`), so that the sampling radius and the term sizes are those of the features around it,
        not of its distance from the origin (a doubled sphere at (1234, -2345, 3456) showed "full rank" at its
        samples, 40 units away across a sphere of radius 13). Points that cannot be centred (projective systems,
        systems too large to translate) share batches as before (decision 0074).
        """
        if self.options.neighbour_samples == 0 or not items:
            return [_Nearby(drops=False) for _ in items]
        results, plain = [None] * len(items), []
        for j, (point, codim) in enumerate(items):
            centred = self.centred_at(point)
            if centred is None:
                plain.append(j)
                continue
            checker, here = centred
            results[j] = checker._sampled([(here, codim)])[0]
        for j, result in zip(plain, self._sampled([items[j] for j in plain])):
            results[j] = result
        return results

    def _sampled(self, items):
        """:meth:`rank_drops_near_all` in this checker's units, in shared batches."""
        if not items:
            return []
        count = self.options.neighbour_samples
        informative_of, radii = self.samples_near([point for point, _ in items])
        answers = [False if len(informative) < count else None for informative in informative_of]
        for codim in sorted({codim for _, codim in items}):
            open_items = [j for j, (_, c) in enumerate(items) if c == codim and answers[j] is None]
            decided = self.rank_drops_near_in_double([informative_of[j] for j in open_items], codim,
                                                     [radii[j] for j in open_items])
            for j, answer in zip(open_items, decided or [None] * len(open_items)):
                answers[j] = answer
        results = []
        for j, (_, codim) in enumerate(items):
            if answers[j] is None:
                answers[j] = self._rank_drops_at_samples_mp(informative_of[j], codim, radii[j])
            larger = self.larger_dimension_at(informative_of[j], codim, radii[j]) if answers[j] else None
            if larger is not None and larger > self.system.ambient_dimension - codim:
                results.append(_Nearby(drops=False, larger=larger))
            else:
                results.append(_Nearby(drops=bool(answers[j])))
        return results

    def samples_near(self, points):
        """Points of X next to each of ``points`` (Newton from random points at :attr:`CheckOptions.neighbour_radius`,
        relative), the ones Newton did not pull back onto the point itself, at most ``neighbour_samples`` each.

        Returns (list of lists of samples, list of radii). The random numbers are drawn point by point in order;
        the projection is one batch.
        """
        count = self.options.neighbour_samples
        tries = 4 * count
        starts, radii = [], []
        for point in points:
            radii.append(self.options.neighbour_radius * _size(point))
            directions = self.rng.standard_normal((tries, self.n)) + 1j * self.rng.standard_normal((tries, self.n))
            directions /= np.linalg.norm(directions, axis=1)[:, None]
            starts.append(np.asarray(point)[None, :] + radii[-1] * directions)
        samples = project_to_variety(self.system, self.batch, np.concatenate(starts))
        informative_of = []
        for j, point in enumerate(points):
            rows = slice(j * tries, (j + 1) * tries)
            informative_of.append([sample for sample, ok in zip(samples.points[rows], samples.converged[rows])
                                   if ok and self.distance(sample, point) >= 0.1 * radii[j]][:count])
        # Polished with tolerance 0 (Newton on while a step lowers the residual; a few steps at a regular point): on a
        # k-fold component Newton converges only linearly, and the projection's residual 1e-13 leaves a sample
        # 1e-13^(1/k) off it -- 5e-5 for x^3 (y - 1), beyond the 1e-5 the sampling test looks for a rank drop in, so
        # the tripled line's points were "singular" (decision 0117).
        chosen = [sample for informative in informative_of for sample in informative]
        if chosen:
            polished = iter(project_to_variety(self.system, self.batch, np.array(chosen), tolerance=0.0).points)
            informative_of = [[next(polished) for _ in informative] for informative in informative_of]
        return informative_of, radii

    # -- the non-reduced claim, looked at again where the features are (decision 0084) -------------------
    def centred_at(self, point):
        """A checker of the same equations in coordinates centred exactly at ``point`` and balanced anew, and the
        point in its units; None where centring does not apply (projective or too large to translate)."""
        if (self.system.projective or type(self.system) is not PolynomialSystem
                or translated_terms(self.system) > CENTRING_TERMS or not np.all(np.isfinite(point))):
            return None
        centring = centre_near(point, 0.0)
        centred = centred_system(self.system, centring)
        scaling = Scaling.balancing(centred, CENTRED_BALANCING_FLOOR)
        here = scaling.to_computed((np.asarray(point, dtype=complex) - centring.point)[None, :])[0]
        return _Checker(scaling.scale_system(centred), self.options, self.rng), here

    def larger_dimension_at(self, samples, codim, radius):
        """The dimension n - r of X at a sample where J has rank r < ``codim`` and X is a manifold of that dimension
        (steps along the kernel of J stay on X to second order); None when no sample shows one.

        A rank drop at the samples says "non-reduced" only when they lie on the component of codimension
        ``codim``; on a component of larger dimension (a sphere through a point of a line) the rank drops there
        for that reason. Scale-free: steps of :data:`_KERNEL_STEP` of the sampling radius in random directions of
        the kernel; on a manifold with that tangent space Newton moves them back by about step^2 / feature (1e-5
        of a step here), on a non-reduced component by the step's part normal to it (of the order of the step).
        """
        samples = np.atleast_2d(np.asarray(samples, dtype=complex))
        if len(samples) == 0:
            return None
        values, scales = self.scaled_values_double(samples)
        _, jacobians = self.batch.evaluate(samples)
        zero = zero_tolerance(DOUBLE_DIGITS, (self.m, self.n))
        step = _KERNEL_STEP * radius
        starts, owners = [], []
        for row, (sample, jacobian, row_scales, sample_values) in enumerate(zip(samples, jacobians, scales, values)):
            rank = numerical_rank(sample_values, zero)
            if rank >= codim:
                continue
            kernel = np.linalg.svd(jacobian / row_scales[:, None])[2][rank:].conj().T  # n x (n - rank)
            for _ in range(_KERNEL_DIRECTIONS):
                mix = self.rng.standard_normal(self.n - rank) + 1j * self.rng.standard_normal(self.n - rank)
                direction = kernel @ mix
                starts.append(sample + step * direction / np.linalg.norm(direction))
                owners.append((row, self.n - rank))
        if not starts:
            return None
        starts = np.array(starts)
        # tolerance 0: Newton goes on while a step lowers the residual, so a point off a non-reduced component is
        # pulled back even where its residual (the step to a power) is already tiny
        back = project_to_variety(self.system, self.batch, starts, tolerance=0.0).points
        moved = np.nan_to_num(np.linalg.norm(back - starts, axis=1), nan=np.inf) / step
        found = None
        for row in sorted({row for row, _ in owners}):
            mine = [k for k, (owner, _) in enumerate(owners) if owner == row]
            if np.all(moved[mine] <= _KERNEL_STAYS):
                found = max(found or 0, owners[mine[0]][1])
        return found

    def _rank_drops_at_samples_mp(self, informative, codim, radius):
        """The sampling test in mpmath (30 digits): True when the rank drops at (next to) every sample."""
        with mpmath.mp.workdps(40):
            for sample in informative:
                found = self.find_rank_drop([mpmath.mpc(v) for v in sample], codim - 1, mpmath.mp, 30)
                if found is None or self.distance(found, sample) > _SAMPLE_DROP_REACH * radius:
                    return False
        return True

    def embedded_or_singular(self, point, component, notes, moved=False):
        """At a rank drop on one reduced component, with more equations than the codimension: the component's
        multiplicity at the point decides between a singular point of X and an embedded point of the equations
        (decision 0105). Notes are added in place; returns the verdict and the components through the point.

        The Jacobian criterion is about the ideal of X; more equations than the codimension need not generate it
        near the point ({x^2, x y} cut out the line x = 0 with an embedded point at the origin: rank J drops
        there, the line is smooth). A point of one reduced component where that component has multiplicity 1 is
        a smooth point of X (an unmixed local ring of multiplicity 1 is regular: Nagata). The multiplicity is the
        local witness set's count (:func:`numag.witness.local.component_multiplicity`); a complete intersection
        (as many equations as the codimension) is unmixed and needs none.

        ``moved``: the point is a rank drop found away from the point whose components were tested. "One
        component" must then be shown at this point itself (decision 0150): the membership test spoke about the
        other point, and a component tangent to this one there passes too close to it to be seen from 1e-5 away
        (the plane w = 0 and the curve {w = u^2, v = 0} shifted to (1234, -567, 89)).
        """
        if self.decomposition is None:
            return Verdict.SINGULAR, [component]
        user_point = self.user_scaling.to_user(point[None, :])[0] if self.user_scaling is not None else point
        if moved:
            here = components_through_points(self.decomposition, [user_point], [int(self.rng.integers(2**31))])[0]
            if len(here) > 1:
                ids = ", ".join(str(c.id) for c in here)
                notes.append(f"The point lies on {len(here)} components of X (ids {ids}): where components meet, X "
                             "is not locally irreducible, so the point is singular whatever the rank.")
                return Verdict.SINGULAR, here
            if [c.id for c in here] != [component.id]:
                notes.append(f"The Jacobian drops rank here, next to component {component.id}, but the membership "
                             "test at this point itself does not show that one component alone passes through it: "
                             "whether it is a singular point of X or an embedded point of the equations is "
                             "undecided.")
                return Verdict.UNDECIDED, here
        picture = component_multiplicity(self.decomposition, component, user_point,
                                         seed=int(self.rng.integers(2**31)))
        count = picture.multiplicity
        if count == 1:
            notes.append(f"X is smooth here: the point lies on one component of X (component {component.id}, "
                         "generically reduced), which has multiplicity 1 at it (one of its points on a generic slice "
                         "next to the point converges to it), so X is a manifold of the component's dimension "
                         f"here. The Jacobian of the {self.m} equations drops rank only because they do not cut X "
                         "out reduced at this point (an embedded point of the equations, not a singular point of X).")
            return Verdict.EMBEDDED, [component]
        if count is not None and count > 1:
            notes.append(f"Component {component.id} has multiplicity {count} at the point ({count} of its points on a "
                         "generic slice next to the point converge to it): a singular point of X, whatever "
                         "equations cut X out.")
            return Verdict.SINGULAR, [component]
        why = "; ".join(picture.notes) or "no local point converged to it"
        notes.append(f"The Jacobian drops rank here, but {self.m} equations for codimension "
                     f"{self.system.ambient_dimension - component.dimension} need not cut X out reduced: whether this "
                     "is a singular point of X or an embedded point of the equations (X smooth) rests on the local "
                     f"multiplicity of component {component.id}, which was not counted ({why}).")
        return Verdict.UNDECIDED, [component]

    def full_rank_within_tolerance(self, given, refined, codim, position):
        """Whether J clearly keeps rank ``codim`` on the ball of the point tolerance around ``refined`` (decision
        0117's test), so that no rank drop is within it; True without a tolerance (exact data).

        A c-th scaled singular value above the suspect threshold says the point is not at a rank drop, not that
        none is within a tolerance the user gave: a node 1.4e-3 from a point of X judged with tolerance 1e-2
        (decision 0132). Where the test is not clear, the escalation looks for the drop.
        """
        tolerance = self.tolerance_for(given, position)
        if not tolerance:
            return True
        reach = tolerance + self.from_given(given, refined)
        if self.in_user_units:  # a ball in the user's units lies within this one in the computed units
            reach = reach / float(np.min(self.user_scaling.variable_factors))
        return bool(self.full_rank_around(np.asarray(refined)[None, :], codim, np.array([reach]))[0])

    def not_separated(self, given, decision, position):
        """The note of an undecided escalation: what separates the point from a rank drop (decision 0110)."""
        tolerance = self.tolerance_for(given, position)
        if decision.drop is not None and tolerance > 0 and position in self.data_reach:
            # the tolerance is DATA_MARGIN data radii (_DataRule.reach); the report states the radius ("the digits
            # given allow it to be off by ..."), so the note counts in radii too (decision 0147)
            radii = decision.drop_distance / (tolerance / DATA_MARGIN)
            return (f"A point where the rank drops was found {radii:.3g} times the point's uncertainty away (the "
                    "radius its digits allow, plus what rounded coefficients can move X and the precision distances are "
                    "measured at): "
                    f"beyond the {DATA_MARGIN:g} times within which it would be singular but within "
                    f"{DATA_MARGIN * SMOOTH_MARGIN:g} times, so the given point cannot be told apart from a singular "
                    "point; give the point exactly or to more accurate digits, or --point-tolerance, to decide.")
        if decision.drop is not None and tolerance > 0:
            return (f"A point where the rank drops was found {decision.drop_distance / tolerance:.3g} times the "
                    f"point's uncertainty away: beyond it but within {SMOOTH_MARGIN:g} times it, so the "
                    "given point cannot be told apart from a singular point; give the point exactly or to more "
                    "accurate digits, or --point-tolerance, to decide.")
        return ("The rank decision did not settle at the highest precision (--digits): the small singular value "
                "neither stayed put nor shrank to zero.")

    def decide(self, given, exact_given, refined, values, scales, through=None, position=None, exact_rank=None):
        """The rank decision at one point before the non-reduced sampling (a :class:`_Judged`); ``exact_rank``:
        the rank of J at an exact point of X (exact data), which then decides."""
        opts = self.options
        double_zero = zero_tolerance(DOUBLE_DIGITS, (self.m, self.n))
        # exact data on X: the exact rank is the rank, before any numerical one (decision 0122)
        rank = exact_rank if exact_rank is not None else numerical_rank(values, double_zero)
        codim, source = self.codimension(rank, through)
        # decision 0132: rounded data finer than double, its decimal exactly on X with J of full rank there: the
        # given point is smooth, but the data stand for every point within their reach, so a rank drop within it
        # is sought in mpmath (distances from the exact decimal) as for other rounded data
        fine_full = position in self.fine and exact_rank is not None and bool(codim) and exact_rank >= codim
        notes = []
        if through is not None and not through and opts.local_dimension is None:
            notes.append("The decomposition found no component through this point (it may lie below the "
                         "lowest dimension searched); the local dimension falls back to the rule below.")
        if source is LocalDimensionSource.ASSUMED:
            notes.append(f"Local dimension from the assumption that X is a complete intersection at the point "
                         f"(codimension = {self.m} equations); give the local dimension if it is not.")
        decision = _Decision(outcome=None, point=refined, values=values, scales=scales, digits=DOUBLE_DIGITS,
                             drop=None, drop_distance=None)
        escalated = beyond_digits = False
        if codim is None:
            decision.outcome = Verdict.UNDECIDED
            notes.append("The local dimension is unknown (no component of the decomposition passes through the "
                         "point, and the Jacobian's rank does not settle it); give it to decide."
                         if through is not None and not through else
                         "The local dimension is unknown (more equations than the ambient dimension and a "
                         "rank-deficient Jacobian); give it to decide.")
        elif codim == 0:
            decision.outcome = Verdict.SMOOTH if rank == 0 else Verdict.UNDECIDED
        elif exact_rank is not None and not fine_full:
            # Decision 0122: F(p) = 0 and rank J(p) are exact, and decide below; the escalation in mpmath has
            # nothing to add to the verdict (it took > 300 s at a node, and at a smooth point, of 14 unknowns); a
            # rank drop nearby that the batch in double found is kept for the report
            decision = self.settled.get(position) or decision
        elif (codim <= len(values) and values[codim - 1] > opts.suspect_threshold
              and self.full_rank_within_tolerance(given, refined, codim, position)):
            decision.outcome = Verdict.SMOOTH
        else:
            escalated = True
            decision = self.settled.get(position) or self.escalate(given, exact_given, refined, codim, position)
            if decision.outcome is Verdict.UNDECIDED:
                needed = self.separation(refined)
                beyond_digits = needed is not None and needed > opts.max_digits
                if beyond_digits:
                    notes.append(f"The coefficients are exact, and a change in their last written digit would need "
                                 f"{needed} digits to be told from a singular point here, more than max_digits = "
                                 f"{opts.max_digits} (--digits): undecided (decision 0109).")
                else:
                    notes.append(self.not_separated(given, decision, position))
        if exact_rank is not None and codim and not fine_full:  # F(p) = 0 exactly: the exact rank at p decides
            decision.outcome = Verdict.SMOOTH if exact_rank >= codim else Verdict.SINGULAR
            if decision.outcome is Verdict.SINGULAR:
                decision.point, decision.drop, decision.drop_distance = refined, refined, 0.0
            notes.append(f"Decided exactly: F vanishes at the given point and J has rank {exact_rank} there in "
                         "exact arithmetic.")
        digits = decision.digits
        zero = zero_tolerance(digits, (self.m, self.n))
        final_values = np.array(decision.values, dtype=float)
        rank = exact_rank if exact_rank is not None and codim and not fine_full else numerical_rank(final_values, zero)
        verdict = decision.outcome
        if verdict is Verdict.SMOOTH and codim is not None and rank < codim:
            rank = codim  # a stable small singular value: nonzero, only below the zero rule's reach
        if codim is not None and rank > codim:
            verdict = Verdict.UNDECIDED
            notes.append(f"The Jacobian has rank {rank}, more than the codimension {codim}: the local "
                         f"dimension used ({self.system.ambient_dimension - codim}) is larger than the tangent "
                         "space allows; the local dimension is wrong for this point.")
        return _Judged(decision=decision, verdict=verdict, rank=rank, codim=codim, source=source, notes=notes,
                       escalated=escalated, final_values=final_values, digits=digits, zero=zero,
                       beyond_digits=beyond_digits and verdict is Verdict.UNDECIDED)

    def isolated_here(self, codim, source, through):
        """Why X has local dimension 0 at the point (a text), or None when that is not established.

        Established by the user (``--local-dimension 0``), by the one component through the point (of dimension
        0), or by Krull's principal ideal theorem for one equation on a line (affine or projective). Never by the
        complete-intersection assumption, which a curve through the point would break ((x y, x y) at the origin).
        """
        if codim is None or codim != self.system.ambient_dimension or codim == 0:
            return None
        if source is LocalDimensionSource.GIVEN:
            return "local dimension 0, as given"
        if source is LocalDimensionSource.COMPONENTS and through and len(through) == 1 and through[0].dimension == 0:
            return f"component {through[0].id} has dimension 0"
        if source is LocalDimensionSource.HYPERSURFACE:
            return "one equation on a line: every component of X is a point"
        return None

    def check(self, index, given, exact_given, refined, residual, values, scales, through=None, position=None,
              exact_rank=None):
        """The verdict at one point (:meth:`decide`, then the non-reduced sampling), as a :class:`PointVerdict`.

        ``position``: the point's place in a batch whose decisions (:attr:`judged`) and sampling answers
        (:attr:`drops_near`) were worked out together; a point not found there is decided here.
        """
        opts = self.options
        judged = self.judged.pop(position, None) if position is not None else None
        if judged is None:
            judged = self.decide(given, exact_given, refined, values, scales, through, position, exact_rank)
        decision, verdict, rank, codim = judged.decision, judged.verdict, judged.rank, judged.codim
        source, notes, escalated = judged.source, judged.notes, judged.escalated
        final_values, digits, zero = judged.final_values, judged.digits, judged.zero
        isolated = verdict is Verdict.SINGULAR and self.isolated_here(codim, source, through)
        if (isolated and source is LocalDimensionSource.GIVEN and not self.system.projective
                and not IsolationTest(self.system, self.rng).isolated(np.asarray(decision.point))):
            # a given dimension 0 is trusted, unless points of X off this one were found next to it (positive
            # evidence: (x y, x y) at the origin is a node of two lines, not a double point)
            isolated, verdict = None, Verdict.UNDECIDED
            notes.append("Local dimension 0 was given, but points of X were found next to this one along the "
                         "Jacobian's kernel: X has positive dimension here; the local dimension is wrong for this "
                         "point.")
        if isolated:
            # An isolated point of X where J has rank < n is a zero of multiplicity > 1 (a regular zero is one
            # of multiplicity 1): a component of dimension 0 that the equations define non-reduced, whose
            # reduced structure, a point, is smooth; no point of X is next to it to sample
            verdict = Verdict.NON_REDUCED
            notes.append(f"X is a single point here ({isolated}), and the Jacobian has rank {rank} < "
                         f"{self.system.ambient_dimension}: the equations define this point with multiplicity > 1, "
                         "a non-reduced component of dimension 0 (its reduced structure, a point, is smooth).")
        if verdict is Verdict.SINGULAR:
            near = self.drops_near.pop(position, None) if position is not None else None
            if near is None:
                near = self.rank_drops_near(np.asarray(decision.point), codim)
        if verdict is Verdict.SINGULAR and near.larger is not None:
            verdict = Verdict.UNDECIDED
            # a sampling conclusion, not a fact: (a - 1)^2 - b, b^2 stays on X to fourth order along a, and looked
            # like a manifold of one dimension more than X has
            notes.append(f"The rank also drops at sampled points of X next to this one, but X looks like a manifold "
                         f"of dimension {near.larger} there (steps along the Jacobian's kernel stay on X to second "
                         "order; equations of multiplicity > 1 can look the same), more than the local dimension used "
                         f"({self.system.ambient_dimension - codim}): they may lie on a larger component, and whether "
                         "it passes through this point is not settled; give the local dimension to decide.")
        near = near.drops if verdict is Verdict.SINGULAR else None
        # Only with more equations than the codimension: a complete intersection's ideal is unmixed (no embedded
        # set for the samples to fall onto), and there the samples keep overruling a "reduced" that rounding gave
        # the decomposition (a doubled plane shifted to (1234, -2345, 3456): its witness point looked regular)
        reduced_here = bool(through and len(through) == 1 and opts.local_dimension is None and through[0].reduced
                            and codim is not None and self.m > codim)
        if verdict is Verdict.SINGULAR and near and reduced_here:
            # The decomposition found the Jacobian of full rank at the component's witness points, generic points
            # of it: it is generically reduced, whatever the samples say. Newton's projection onto V(F) follows
            # the equations' non-reduced structure into a lower-dimensional set where the rank drops ((x^2, x y):
            # each step halves y with x, so every sample lands on the embedded line x = y = 0). The point is
            # judged as on a reduced component (X's local multiplicity, decision 0105, when there are more
            # equations than the codimension).
            notes.append(f"The rank also drops at the sampled points of X next to this one, but component "
                         f"{through[0].id} has full rank at its witness points (generically reduced): the samples "
                         "lie where the equations are not reduced, not on generic points of X.")
        elif verdict is Verdict.SINGULAR and near:
            verdict = Verdict.NON_REDUCED
            notes.append("The rank also drops at every sampled nearby point of X: the equations define X "
                         "with multiplicity > 1 here (generically non-reduced), so the Jacobian cannot see "
                         "whether the underlying variety is smooth. This is a sampling test, not a proof.")
        thick = [c for c in (through or []) if not c.reduced]
        if isolated:
            thick = []  # said above, once
        if thick and len(through) == 1 and opts.local_dimension is None and verdict is Verdict.SINGULAR:
            if near is False:
                # the rank is full at sampled points of X next to this one: X is not generically non-reduced
                # here, whatever the decomposition's witness points said (rounding far from the origin made 8
                # distinct witness points of a reduced curve look like one point of multiplicity 8)
                notes.append(f"The decomposition calls component {thick[0].id} non-reduced, but the Jacobian has "
                             "full rank at sampled points of X next to this one: that claim is contradicted here, "
                             "and the point is reported singular.")
            else:
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
            elif judged.beyond_digits:
                # the membership test's tolerance is no finer than the rank's: two components 5e-9 apart at
                # (100, -50) (a node pair 1e-4 apart) both "pass" through the point between them (decision 0111)
                notes.append(f"Components {ids} pass within the membership test's tolerance of this point, which "
                             "cannot tell them meeting here from passing within the input's last digit: undecided.")
            else:
                verdict = Verdict.SINGULAR
                notes.append(f"The point lies on {len(through)} components of X (ids {ids}): where components "
                             "meet, X is not locally irreducible, so the point is singular whatever the rank.")
        if (verdict is Verdict.SINGULAR and through and len(through) == 1 and opts.local_dimension is None
                and self.m > codim and through[0].reduced):
            verdict, through = self.embedded_or_singular(np.asarray(decision.point), through[0], notes,
                                                         moved=self.distance(refined, decision.point) > 0)
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
        at = self.distance(refined, point)
        judged = (JudgedPoint.RANK_DROP if (verdict.is_singular or verdict is Verdict.EMBEDDED) and drop is not None
                  and at > 0 else
                  JudgedPoint.GIVEN if self.distance(given, point) == 0 else JudgedPoint.NEAREST_ON_X)
        return PointVerdict(
            index=index, given=given, point=point, distance=self.distance(given, point), residual=residual,
            verdict=verdict, rank=int(rank), codimension=codim, tangent_dimension=ambient - int(rank),
            local_dimension=local, local_dimension_source=source, evidence=evidence,
            nearest_rank_drop=None if drop is None else (normalize_projective(drop) if self.system.projective
                                                         else np.asarray(drop)),
            nearest_rank_drop_distance=decision.drop_distance, notes=notes, judged=judged,
            components=[{"id": c.id, "dimension": c.dimension, "degree": c.degree} for c in (through or [])])


def _as_points(points, system):
    """Complex array of points, their exact coordinates (the digits as written) and each coordinate's radius."""
    complex_points, exact_points, radii = [], [], []
    for index, point in enumerate(points, 1):
        coordinates = list(point)
        if len(coordinates) != system.n_variables:
            raise PointError(f"has {len(coordinates)} coordinates, the system has {system.n_variables} variables",
                             index)
        try:  # text is read as the command line reads a coordinate (decision 0132)
            read = [parse_constant(c.strip()) if isinstance(c, str) else c for c in coordinates]
            values = np.array([complex(c) for c in read], dtype=complex)
        except ParseError as err:
            raise PointError(f"a coordinate is not a number: {err.reason} (column {err.column})", index) from None
        except (TypeError, ValueError, OverflowError) as err:
            raise PointError(f"coordinates must be numbers ({err})", index) from None
        if not np.all(np.isfinite(values)):
            raise PointError("has a non-finite coordinate", index)
        # decisions 0072 and 0132: exact, or rounded data as far as the digits written say
        exact_coordinates, point_radii = point_precision(read)
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
            point_radii = point_radii / abs(values[projective_pivot(values)])
            values = pivot_value
        complex_points.append(values)
        exact_points.append(exact_coordinates)
        radii.append(point_radii)
    return (np.array(complex_points, dtype=complex).reshape(len(complex_points), system.n_variables), exact_points,
            radii)


def check_points(system, points, options=None, seed=None, decomposition=None, accuracies=None):
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
    accuracies : sequence of float or None, optional
        Each point's stated relative accuracy (None: from its digits), used as its point tolerance when
        ``options.point_tolerance`` is not given: a saved report of ``singular`` states the tolerance its points
        were judged singular at (decision 0110).

    Returns
    -------
    CheckReport

    A point that cannot be moved onto X within the point tolerance gets the verdict "off" (its
    ``residual``, the ``distance`` Newton moved it and a note say how far off it is); the other
    points are judged as usual. Without ``options.point_tolerance`` the data decides (decision 0072):
    exact data is on X only when F vanishes there in exact arithmetic and is judged at the point itself;
    rounded data (decimals of 15 or more digits, computed floats) is undecided when a rank drop is within
    the reach of its last digit. Each verdict's ``judged`` names the point it is about.

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
    user_given, user_exact, user_radii = _as_points(points, system)
    scaling = Scaling.balancing(system)
    if len(user_given) == 0:
        return CheckReport(system=system, points=[], options=options, seed=seed, scaling=scaling)
    given = scaling.to_computed(user_given)
    divisors = [ExactCoefficient.rational(Fraction(10) ** -c) for c in scaling.variable_exponents]
    exact = [None if e is None else [v * d for v, d in zip(e, divisors)] for e in user_exact]
    exact_coefficients = coefficient_precision(system) is CoefficientPrecision.EXACT
    stated = list(accuracies) if accuracies is not None else [None] * len(user_given)
    if len(stated) != len(user_given) or not all(a is None or (is_number(a) and 0 < a < 1) for a in stated):
        raise InputError("accuracies: one relative accuracy in (0, 1) or None per point")
    if options.point_tolerance is not None:
        stated = [None] * len(user_given)  # the user's tolerance applies to every point
    data = [_PointData.TOLERANCE if a is not None else
            _PointData.of(options, exact_coefficients, e is not None and not np.any(r > 0))
            for a, e, r in zip(stated, exact, user_radii)]
    radii = [float(np.linalg.norm(scaling.to_computed(r[None, :].astype(complex))[0])) if not system.projective
             else float(np.linalg.norm(r)) for r in user_radii]
    fine = {}  # decision 0132: rounded data finer than double, with exact coefficients, is measured in mpmath
    for k, (kind, radius) in enumerate(zip(data, radii)):
        relative = radius / _size(given[k])
        if kind is _PointData.ROUNDED and exact_coefficients and not system.projective and 0 < relative < 2.0 ** -52:
            fine[k] = min(options.max_digits, math.ceil(-math.log10(relative)) + _FINE_EXTRA_DIGITS)
    rule = _DataRule(data=data, radii=radii, coefficient_tolerance=input_tolerance(system) or 0.0, stated=stated,
                     fine=fine)
    verdicts = _check_in_units(scaling.scale_system(system), given, exact, options, seed, rng, decomposition,
                               scaling, rule)
    checker = _Checker(system, options, rng)  # distances in the user's units
    for verdict, point in zip(verdicts, user_given):
        _to_user_units(verdict, point, scaling, checker)
    for k, offset in rule.offsets.items():  # decision 0132: doubles cannot show a distance finer than theirs
        if verdicts[k].judged is not JudgedPoint.GIVEN and math.isfinite(verdicts[k].distance):
            verdicts[k].distance = float(np.linalg.norm(np.asarray(offset) * scaling.variable_factors))
    for verdict, kind, point_radii in zip(verdicts, data, user_radii):
        _state_what_the_data_says(verdict, kind, float(np.linalg.norm(point_radii)))
    for verdict, accuracy in zip(verdicts, stated):
        if accuracy is not None:  # decision 0110: the report's stated accuracy, not the digits printed
            verdict.notes.insert(0, f"Judged within the accuracy stated with the point (relative {accuracy:.3g}, "
                                    "the tolerance its report judged it at), not the digits it is printed with.")
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
            if options.point_tolerance is not None:
                accuracy = options.point_tolerance
            else:  # the data's own reach (decision 0072), relative
                accuracy = DATA_MARGIN * ((verdict.data_radius or 0.0) / _size(verdict.given) + 2.0 ** -52)
            if np.linalg.norm(where - points[0]) <= accuracy * _size(points[0]):
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


class _PointData(TextEnum):
    """How a point's verdict is reached (decision 0072)."""

    TOLERANCE = "point tolerance given"     # the user's tolerance; exact data still gets exact membership
    EXACT = "exact data"                    # exact coefficients and point: judged exactly where given
    ROUNDED = "rounded data"                # the digits given (and the coefficients' rounding) set the reach

    @classmethod
    def of(cls, options, exact_coefficients, exact_point):
        """The rule for a point: the options' tolerance when given, else what the data is."""
        if options.point_tolerance is not None:
            return cls.TOLERANCE
        return cls.EXACT if exact_coefficients and exact_point else cls.ROUNDED


@dataclass(frozen=True)
class _DataRule:
    """Each point's :class:`_PointData`, its data radius (computed units) and the coefficients' share."""

    data: list
    radii: list
    coefficient_tolerance: float  # what the coefficients cannot resolve (decision 0062's input tolerance), 0 exact
    stated: list = None  # each point's stated relative accuracy (a saved singular report's), or None
    fine: dict = None  # decision 0132: position -> working digits of rounded data finer than double
    #: ... -> the offset of the nearest point of X found from the exact decimal (mpmath, computed units)
    offsets: dict = field(default_factory=dict)

    def floor(self, k):
        """Relative: how finely distances from the point are measured -- between doubles (2^-52 of the point), or
        in mpmath from the exact decimal for data finer than double (decision 0132)."""
        return 10.0 ** -self.fine[k] if self.fine and k in self.fine else 2.0 ** -52

    @property
    def coefficient_radius(self):
        """Relative: how far rounded coefficients can move X near a singular point (sqrt of their tolerance,
        the reach of a node; 0 for exact coefficients)."""
        return math.sqrt(self.coefficient_tolerance)

    def exact_data(self, k):
        """Exact coefficients and an exact point (with or without a tolerance)."""
        return self.data[k] is _PointData.EXACT or (self.data[k] is _PointData.TOLERANCE and self.radii[k] == 0
                                                    and self.coefficient_radius == 0)

    def reach(self, k, given, coefficients=True):
        """Rounded data: how far the point a verdict speaks about may be from the given one (with or without
        what the coefficients' rounding can move X)."""
        # distances are measured between doubles (2^-52 of the point), or in mpmath for data finer than that: the
        # precision they are measured at is a floor of the radius
        share = self.coefficient_radius if coefficients else 0.0
        return DATA_MARGIN * (self.radii[k] + (self.floor(k) + share) * _size(given))

    def on_within_coefficients(self, residual):
        """Rounded coefficients: a scaled residual they explain (a relative change of them within their
        tolerance makes F vanish at the point) is on X as far as the data can say."""
        return residual <= DATA_MARGIN * self.coefficient_tolerance


def _check_in_units(system, given, exact, options, seed, rng, decomposition, scaling, rule):
    """The verdicts at points of ``system`` (already in computed units; ``decomposition`` in the user's); a
    point that cannot be moved onto X gets the verdict "off". ``rule``: a :class:`_DataRule`."""
    checker = _Checker(system, options, rng)
    checker.decomposition, checker.user_scaling = decomposition, scaling
    checker.exact_input = rule.coefficient_tolerance == 0 and all(p.is_exact for p in system.polynomials)
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
    moved = np.array([checker.from_given(given[k], refined[k]) for k in range(len(given))])
    exact_ranks, on_exactly = [None] * len(given), [None] * len(given)
    fine = rule.fine or {}
    for k, digits in fine.items():
        checker.fine[k] = (exact[k], digits)
    unreached = set()  # F not zero exactly, zero in double, and extended precision reached no point of X
    # decision 0141: Newton from the given point slid past nearer points of X; the escalation's refinement starts from
    # the nearest point found, not from the given digits (from there it slides again: a node called smooth 10 away)
    slid = set()
    for k in range(len(given)):
        kind = rule.data[k]
        if kind is not _PointData.TOLERANCE:
            checker.tolerances[k] = 0.0 if kind is _PointData.EXACT else rule.reach(k, given[k])
            if kind is not _PointData.EXACT:
                checker.data_reach.add(k)
        if kind is _PointData.ROUNDED:
            checker.inferred.add(k)
        if rule.stated and rule.stated[k] is not None:
            checker.tolerances[k] = rule.stated[k] * (1.0 if system.projective else _size(given[k]))
            checker.data_reach.discard(k)
        if (rule.exact_data(k) or k in fine) and exact[k] is not None:
            # Decision 0072: membership of exact data in exact arithmetic, not by a residual in double; decision
            # 0132: also of the decimal given, when it is finer than double (its exact rank first)
            on_exactly[k] = checker.vanishes_exactly(exact[k])
            if on_exactly[k]:
                refined[k], on_variety[k], moved[k] = given[k], True, 0.0
                if kind is _PointData.EXACT or k in fine:
                    exact_ranks[k] = checker.exact_rank(exact[k])
                    # too large for exact arithmetic: a rank drop at mpmath's reach
                    if exact_ranks[k] is None and k not in fine:
                        checker.tolerances[k] = 10.0 ** -DOUBLE_DIGITS * _size(given[k])
                continue
        # decision 0141: with a tolerance, also where Newton in double slid past nearer points of X (to a node)
        if kind is not _PointData.TOLERANCE or on_exactly[k] is False or projection.slid[k]:
            # the nearest point of X to the data itself (exact decimals or the rounded digits), in mpmath: in
            # double the rounding of F near a singular point moves Newton's point by more than the data's radius
            found, converged = checker.nearest_on_x(exact[k] if exact[k] is not None else given[k],
                                                    fine.get(k, _NEAREST_DIGITS))
            if converged:  # else double precision's answer stands (slow convergence at a cusp, say)
                refined[k] = normalize_projective(found) if system.projective else found
                if checker.last_nearest_slid:
                    slid.add(k)
                on_variety[k], moved[k] = True, checker.from_given(given[k], refined[k])
                if k in fine:  # decision 0132: the distance from the exact decimal, measured in mpmath
                    moved[k] = float(np.linalg.norm(checker.last_nearest_offset))
                    rule.offsets[k] = checker.last_nearest_offset
            elif on_exactly[k] is False and moved[k] == 0:
                # ... but not where double accepted the given point itself, which exact arithmetic refutes (the
                # rounding of an expanded polynomial far from the origin hides F there). Nor is it off X: no
                # point of X was reached, and double cannot tell F there from zero -- undecided (decision 0120)
                on_variety[k] = False
                if kind is _PointData.TOLERANCE:  # exact data without a tolerance is off X (decision 0110)
                    unreached.add(k)
    tolerances = np.array([checker.tolerance_for(given[k], k) for k in range(len(given))])
    off = ~on_variety | (moved > tolerances)
    for k in range(len(given)):
        if rule.data[k] is _PointData.EXACT and on_exactly[k] is False:
            # Decision 0110: exact data has no uncertainty, so a point where F does not vanish is off X however
            # close Newton's point of X is (it can round to the given doubles: 1e-13 from a point 1e3 out)
            off[k] = True
        if rule.data[k] is _PointData.ROUNDED:
            # on X when Newton's point is within the digits' reach, or the coefficients' rounding explains F there
            # (data finer than double: F exactly zero at the decimal; a residual in double says nothing there)
            explained = on_exactly[k] if k in fine else rule.on_within_coefficients(float(residual_given[k]))
            off[k] = not explained and (not on_variety[k] or moved[k] > rule.reach(k, given[k], coefficients=False))
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
    # The tangent space at p has dimension n - rank J(p), at least the dimension of every component of X through
    # p: with the rank exact, a component of larger dimension does not pass through p, however close the
    # membership test put it (a point 1e-9 off a plane, on a line through it, had been "on both")
    excluded = {}
    for k in range(len(given)):
        if exact_ranks[k] is not None and through[k] and not system.projective:
            room = system.ambient_dimension - exact_ranks[k]
            excluded[k] = [c for c in through[k] if c.dimension > room]
            through[k] = [c for c in through[k] if c.dimension <= room]
    checker.settle_in_double(given[~off], refined[~off], [values[k] for k in np.nonzero(~off)[0]],
                             [scales[k] for k in np.nonzero(~off)[0]], [through[k] for k in np.nonzero(~off)[0]],
                             positions=np.nonzero(~off)[0],
                             exact=[exact[k] if (rule.data[k] is _PointData.EXACT and on_exactly[k] is not False)
                                    or k in fine else None for k in np.nonzero(~off)[0]])
    # exact data: left to exact ranks; data finer than double: to mpmath (decision 0132)
    # decisions first, then the non-reduced sampling of every singular one in shared batches (the same random
    # draws, in the same order, as one sampling per point), then the verdicts
    for k in np.nonzero(~off)[0]:
        checker.judged[k] = checker.decide(given[k], None if (on_exactly[k] is False or k in slid) and k not in fine
                                           else exact[k],
                                           refined[k], values[k], scales[k], through[k], position=k,
                                           exact_rank=exact_ranks[k])
    singular = [k for k, judged in checker.judged.items() if judged.verdict is Verdict.SINGULAR
                and not checker.isolated_here(judged.codim, judged.source, through[k])]  # nothing next to sample
    answers = checker.rank_drops_near_all([(np.asarray(checker.judged[k].decision.point), checker.judged[k].codim)
                                           for k in singular])
    checker.drops_near.update(zip(singular, answers))
    verdicts = [_off_verdict(checker, k + 1, given[k], refined[k], float(residual_given[k]), float(moved[k]),
                             float(tolerances[k]), ZeroKind.ZERO if on_variety[k] else
                             ZeroKind.UNDECIDED if k in unreached else projection.kinds[k],
                             float(projection.after[k]), values[k], scales[k], unreached=k in unreached)
                if off[k] else
                checker.check(k + 1, given[k], None if (on_exactly[k] is False or k in slid) and k not in fine else exact[k],
                              refined[k],
                              float(residual_given[k]), values[k], scales[k], through[k], position=k,
                              exact_rank=exact_ranks[k]) for k in range(len(given))]
    for k, verdict in enumerate(verdicts):
        verdict.on_x_exactly = on_exactly[k]
        if excluded.get(k):
            ids = ", ".join(str(c.id) for c in excluded[k])
            verdict.notes.append(f"The membership test put component(s) {ids} through this point, but J has rank "
                                 f"{exact_ranks[k]} here in exact arithmetic, so no component of dimension above "
                                 f"{system.ambient_dimension - exact_ranks[k]} passes through it: left out.")
        if rule.data[k] is _PointData.ROUNDED and verdict.verdict.is_singular:
            # the nearest point of X found, kept beside the rank drop the verdict speaks about (decision 0072)
            verdict.point, verdict.distance = refined[k], float(moved[k])
        if k in fine and on_exactly[k] and verdict.verdict is Verdict.SMOOTH:
            # decision 0132: the decimal given is on X exactly, J has full rank there and no rank drop is within the
            # data's reach: the verdict holds of the given point itself
            verdict.judged, verdict.point, verdict.distance = JudgedPoint.GIVEN, given[k], 0.0
    return verdicts


def _away(distance):
    """A distance between two points stored as doubles, as a note says it (0: they round to the same doubles)."""
    return f"{distance:.3g} away" if distance > 0 else "within double rounding of it"


def _state_what_the_data_says(verdict, kind, radius):
    """Decision 0072, in the user's units (in place): rounded data near a rank drop is undecided, and the notes
    say which point was judged and why."""
    if kind is not _PointData.TOLERANCE:
        verdict.data_radius = radius
    if verdict.judged is JudgedPoint.GIVEN:  # the given point itself, not its round trip through the balanced units
        verdict.point, verdict.distance = np.asarray(verdict.given, dtype=complex), 0.0
    if verdict.verdict is Verdict.UNDECIDED and verdict.judged is JudgedPoint.NONE and verdict.rank is None:
        return  # no point of X reached, none judged: its note says why (decision 0120)
    if verdict.verdict is Verdict.OFF:
        verdict.judged = JudgedPoint.NONE
        if kind is _PointData.EXACT:
            size = _size(verdict.given)
            near = (f"is at distance {verdict.distance:.3g} (relative {verdict.distance / size:.3g}); give "
                    "--point-tolerance (relative) above that" if verdict.distance > 0 else
                    "rounds to the same doubles as the given point (closer than double precision can show); give "
                    "--point-tolerance (relative, at least the given digits' accuracy)")
            verdict.notes = [f"Not on X: F does not vanish at the given point in exact arithmetic. The nearest "
                             f"point of X found {near} to judge that point instead (decision 0110)."
                             if math.isfinite(verdict.distance) and verdict.newton is ZeroKind.ZERO else
                             "Not on X: F does not vanish at the given point in exact arithmetic, and Newton's method "
                             "found no point of X near it."]
        elif kind is _PointData.ROUNDED:
            verdict.notes.insert(0, f"The digits given (and the coefficients' rounding) let the point be off by about "
                                    f"{radius:.3g}; the nearest point of X found is farther than {DATA_MARGIN:g} times "
                                    "that.")
        return
    if verdict.on_x_exactly is False and kind is not _PointData.ROUNDED:  # a tolerance given: the nearest point judged
        verdict.notes.insert(0, f"The given point is not on X (F does not vanish there in exact arithmetic); the "
                                f"verdict is about {verdict.judged.value if verdict.judged else 'the nearest point'}, "
                                f"within the point tolerance (that point is {verdict.distance:.3g} away).")
    if kind is _PointData.ROUNDED and verdict.judged is JudgedPoint.GIVEN and not verdict.on_x_exactly:
        verdict.judged = JudgedPoint.NEAREST_ON_X  # rounded data: the point of X it stands for, at double's reach
    if kind is _PointData.ROUNDED and verdict.verdict.is_singular:
        # Rounded data stand for every point within their reach: a rank drop there is what the data say (the
        # point a user pastes from a computed singular point is singular), and the verdict names that point.
        drop = verdict.nearest_rank_drop_distance
        verdict.judged = JudgedPoint.RANK_DROP
        verdict.notes.insert(0, f"Singular within the data's precision: the digits given let the point be off by "
                                f"about {radius:.3g}, and a point where the rank drops is "
                                f"{'within that reach' if drop is None else _away(drop)}; the verdict is about that "
                                "point (smooth points of X are as close: give the point exactly to judge the given "
                                "point itself).")


def _values_at_given(checker, point):
    """Scaled singular values of J at a point off X, kept for the reader; none where J is not finite there."""
    with np.errstate(all="ignore"):
        _, jacobians = checker.batch.evaluate(point[None, :])
        scales = checker.sizes.gradients(point[None, :])
    if not (np.all(np.isfinite(jacobians)) and np.all(np.isfinite(scales)) and np.all(scales > 0)):
        return np.zeros(0), np.zeros(0)
    return scaled_singular_values(jacobians, scales)[0], scales[0]


def _off_verdict(checker, index, given, reached, residual, moved, tolerance, newton, reached_residual, values,
                 scales, unreached=False):
    """The verdict "off" for a point Newton could not bring onto X within the point tolerance.

    Nothing is judged about X there; the evidence is the Jacobian at the given point (in double),
    kept for the reader, and ``point`` is where Newton ended. ``newton`` (a :class:`ZeroKind`) is what
    Newton's method found: X reached (too far), no zero near (the residual not explained), or undecided.
    With ``unreached`` (F is not zero there in exact arithmetic, double cannot tell it from zero, and Newton
    in extended precision reached no point of X) neither on X nor off it is shown: the verdict is undecided.
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
    units = ("the distances in the given units, the residual in units of F's terms" if checker.in_user_units
             else "both in the balanced units of the scaled problem")
    note = (f"Not on X: scaled residual {residual:.3g} at the given point; {how} ({units}). Nothing is judged "
            "here; raise --point-tolerance if the point is known to fewer digits.")
    if unreached:
        note = (f"On X or not within the point tolerance is undecided: F does not vanish at the given point in exact "
                f"arithmetic, its scaled residual {residual:.3g} there is within double precision's rounding, and "
                "Newton's method in extended precision reached no point of X from it. Nothing is judged here.")
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
                        verdict=Verdict.UNDECIDED if unreached else Verdict.OFF, rank=None, codimension=None,
                        tangent_dimension=None, local_dimension=None,
                        local_dimension_source=LocalDimensionSource.NOT_REACHED if unreached else
                        LocalDimensionSource.NOT_JUDGED, evidence=evidence,
                        notes=[note], newton=newton, judged=JudgedPoint.NONE if unreached else None)
