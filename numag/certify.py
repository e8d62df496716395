"""Certificates: boxes that provably hold one zero, every equation accounted for, rank bounds, exactness.

What can be proved, and how (each certificate says which kind it is):

* **A regular zero of a square system** S(x) = 0. Krawczyk's operator in
  interval arithmetic (Krawczyk, Computing 1969; Moore, "Interval Analysis",
  1966): for a box X around x~ and Y close to J_S(x~)^-1,
  K(X) = x~ - Y S(x~) + (I - Y J_S(X)) (X - x~). K(X) inside X proves exactly
  one zero in X, and that it is regular; K(X) disjoint from X proves none.
  Complex boxes are rectangles in each coordinate (convex, so the mean-value
  form holds), with one half-width per coordinate (``radii``: a coordinate of
  size 1e-4 beside one of size 1e4 gets a box of its own size). A box symmetric
  under conjugation proves, for real S, that the zero is real. Beside it,
  Smale's alpha test: alpha = beta * gamma with beta = |J^-1 S(x)| and gamma
  bounded from the Bombieri-Weyl norm of S; alpha < (13 - 3 sqrt(17))/4 proves
  that Newton's method converges quadratically from x to a zero within 2 beta
  (Blum, Cucker, Shub, Smale, "Complexity and Real Computation", Springer 1998;
  the gamma bound from the Bombieri-Weyl norm: Shub & Smale, "Complexity of
  Bezout's theorem I", J. AMS 1993 -- from memory).
* **Every equation is accounted for.** The square subsystem is chosen from the
  equations of the claim (F, F with the c x c minors of J for a singular point,
  F^h with the homogenising coordinate 0 for a point at infinity); a zero that
  even these leave singular is first made regular by isosingular deflation,
  which adds minors (Hauenstein & Wampler, "Isosingular sets and deflation",
  Found. Comput. Math. 2013) and never removes an equation. Every equation of
  the claim outside the square subsystem is then evaluated over the box in
  interval arithmetic: if an enclosure excludes 0 the box holds no zero of the
  claim (``refuted``); the largest enclosure, divided by a lower bound of the
  size of that equation's terms over the box (sum |c_k| |x^a_k|), is the
  ``backward_error``: the zero in the box is an exact zero of equations whose
  coefficients differ from the given ones by at most that much, relatively,
  coefficient by coefficient. Only when it is below 10^-(digits - guard) is the
  certificate ``certified``; otherwise ``undecided`` with the reason (a near
  miss looks like this). Coordinates whose box holds 0 are tried once more
  inside the subspace where they vanish exactly (the origin of a cusp, the
  hyperplane at infinity), where the terms that vanish there are gone.
* **Exact** (rational or sqrt-rational coefficients), two routes. (1) The
  coordinates are recognised as polynomials in a primitive element
  t = sum c_j x_j over the coefficient field K, t a root of a polynomial p over
  K (integer relations found by mpmath's PSLQ), every equation is reduced
  exactly modulo p, and a root of p is enclosed by the interval Newton test and
  mapped into the box: the box holds that exact common zero (or, when the
  square subsystem vanishes there and another equation does not, provably no
  zero of the claim). (2) Root separation, for rational coefficients: the
  unique zero z of the square subsystem G in the box is a regular, hence
  isolated, zero, so for every other equation g, (z, g(z)) is an isolated zero
  of the square integer system (G, y - g(x)) in n + 1 unknowns, and by Canny's
  gap theorem either g(z) = 0 or |g(z)| > (3 d c)^-((n+1) d^(n+1)) (d the
  largest degree, c above the largest integer coefficient; J. Canny,
  "Generalized characteristic polynomials", J. Symbolic Comput. 1990 -- from
  memory; the route is that of Akoglu, Hauenstein and Szanto, "Certifying
  solutions to overdetermined and singular polynomial systems over Q",
  J. Symbolic Comput. 2018). A box over which every |g| stays below that bound
  holds an exact zero of the whole system.
* **Rank of J.** Over a box, rank J >= r is proved by an interval lower bound
  on sigma_r (sigma_r(J) >= sigma_min of an r x r submatrix M, and
  sigma_min(M) >= (1 - |I - Y M|) / |Y| for every M in the box). That the rank
  drops to r at the exact point is proved by an exact certificate (either
  route) of a zero of F and every (r + 1)-minor of J.
* **A smooth point**: a box that holds exactly one point of V(F) cut by slices
  through the point (c equations of F in the square subsystem, the others
  accounted for as above) and rank J >= c over the whole box. Smoothness is an
  open condition, so this is a proof about the exact variety when F has c
  equations (Krull: every component of V(F) has codimension at most c, and
  the tangent space has dimension at most n - c); with more equations it rests
  on the local dimension (the certificate says so, and checks it against
  sampled points of X).

A report's claims (codimension, multiplicity, a point being at infinity) are
hypotheses: each is checked against F and the outcome is listed in
``claim_checks`` (:class:`ClaimCheck`). Precision is raised from
``digits`` up to ``max_digits`` while a decision stays open for lack of it;
``digits_tried`` lists what was used.

Examples
--------
>>> from numag.parse import parse_system
>>> system = parse_system(["x^2 - 2", "y - x"], ["x", "y"])
>>> certificate = certify_regular_zero(system, [1.41421356, 1.41421356], CertifyOptions(digits=30))
>>> certificate.status, certificate.real, certificate.radius < 1e-25, certificate.multiplicity
('certified', True, True, 1)
"""

from contextlib import contextmanager
from dataclasses import dataclass, field, replace
from enum import Enum
from fractions import Fraction
import itertools
import math
import weakref

import mpmath
import numpy as np
import scipy.linalg

from .errors import InputError, LimitError
from .evaluate import BatchEvaluator, PrecisionEvaluator
from .exact import ExactCoefficient, square_free_split
from .polynomial import DEFAULT_LIMITS, Limits, Polynomial, PolynomialSystem, combined_minor, determinant
from .refine import project_to_variety

__all__ = ["CertifyOptions", "Certificate", "ClaimCheck", "Status", "Kind", "Claim", "ClaimStatus",
           "certify_regular_zero", "certify_singular_point", "certify_smooth_point", "certify_rank",
           "singularity_equations", "overlapping_pairs", "ALPHA_ZERO_TEXT", "alpha_zero", "alpha_test",
           "working_digits", "separation_exponent", "STATUSES"]


class _TextEnum(str, Enum):
    """An enum whose members are their text (JSON and f-strings print the value)."""

    __str__ = str.__str__
    __format__ = str.__format__

    def __repr__(self):
        return repr(self.value)


class Status(_TextEnum):
    """The three answers of a certificate."""

    CERTIFIED = "certified"
    REFUTED = "refuted"
    UNDECIDED = "undecided"


class Kind(_TextEnum):
    """What a certificate rests on: interval bounds (numerical) or an exact identity (exact)."""

    NUMERICAL = "numerical"
    EXACT = "exact"


class Claim(_TextEnum):
    """What a certificate speaks about."""

    REGULAR_ZERO = "regular zero"
    ZERO = "zero"
    SINGULAR_POINT = "singular point"
    SINGULAR_LOCUS_POINT = "point of the singular locus"
    SMOOTH_POINT = "smooth point"
    RANK = "rank"


class ClaimStatus(_TextEnum):
    """How a claim of a report fared against F."""

    PROVED = "proved"
    NUMERICAL = "numerical"          # agrees with a numerical recomputation, not proved
    UNVERIFIED = "not verified"
    CONTRADICTED = "contradicted"    # a numerical recomputation disagrees
    REFUTED = "refuted"              # proved false


#: The three answers of a certificate, as text.
STATUSES = tuple(s.value for s in Status)
#: Smale's constant, the bound on alpha below which Newton's method provably converges.
ALPHA_ZERO_TEXT = "(13 - 3*sqrt(17))/4"
#: A scaled singular value of the equilibrated Jacobian below this counts as zero when choosing
#: rows and deciding whether to deflate (the point is known to roughly half of double precision).
_DEFLATION_THRESHOLD = 1e-6
#: Deflation minors are expanded polynomials: beyond these sizes deflation stops (undecided) rather than
#: spending minutes on a point that lies on a positive-dimensional solution set.
_DEFLATION_LIMITS = Limits(max_terms=20_000, max_term_products=200_000)
#: Deflation is not tried when the equations have more terms (times unknowns) than this.
_DEFLATION_TERMS = 4000
#: A point is deflated only when the equations nearly vanish there (equilibrated residual): a failure
#: at a point that is no zero at all is not a singular zero, and deflation would not help.
_NEAR_ZERO = 1e-6
#: Relative size, in the units of the point's largest coordinate, below which a coordinate is
#: given a box of that size rather than of its own (10^-(digits // 2) times the largest coordinate).
_FLOOR_DIGITS_FRACTION = 2


@contextmanager
def working_digits(digits):
    """Set mpmath's ``mp`` and ``iv`` contexts to ``digits`` decimal digits; restore both afterwards.

    Examples
    --------
    >>> with working_digits(40):
    ...     mpmath.iv.dps
    40
    """
    saved = mpmath.mp.prec, mpmath.iv.prec
    try:
        mpmath.mp.dps = digits
        mpmath.iv.dps = digits
        yield
    finally:
        mpmath.mp.prec, mpmath.iv.prec = saved


def _guarded(digits):
    """Working precision behind a certificate asked at ``digits``: Newton and intervals run with guard
    digits, so that coordinates 10^(digits/2) times smaller than the largest one still get boxes of
    their own size."""
    return digits + 8 + digits // _FLOOR_DIGITS_FRACTION


def alpha_zero(ctx):
    """(13 - 3 sqrt(17))/4 in the context ``ctx`` (an enclosure in ``mpmath.iv``)."""
    return (13 - 3 * ctx.sqrt(ctx.mpf(17))) / 4


@dataclass(frozen=True)
class CertifyOptions:
    """Options of the certifiers (defaults declared once).

    Attributes
    ----------
    digits : int
        Decimal digits of the first attempt; the boxes have radii near 10^-(digits - 3) times each
        coordinate's size, and the backward error must be below 10^-(digits - guard_digits).
    max_digits : int or None
        Highest precision an undecided certificate is retried at (doubling, or straight to the
        precision a separation bound needs); None: ``digits`` (no retry).
    exact : bool
        Try an exact certificate where the coefficients are exact (rational or sqrt-rational):
        recognition of the coordinates, then root separation (rational coefficients).
    match_radius : float
        A certified zero must lie within ``match_radius * (1 + |p|)`` of the given
        point p; otherwise the certifier tries to refute the point (a box of that
        radius without zeros) and says undecided if it cannot.
    max_deflations : int
        Rounds of isosingular deflation before giving up (undecided).
    exact_max_degree : int
        Largest degree of the primitive element tried by the exact recognition.
    max_minors : int
        All c x c minors of J are used when there are at most this many; beyond, random
        combinations with small integer weights (still exact, but then the exact check
        speaks about those combinations and the certificate stays numerical).
    guard_digits : int
        The backward error of a certified point is below 10^-(digits - guard_digits).
    seed : int
        For the random integer weights and slices.
    """

    digits: int = 30
    max_digits: object = None
    exact: bool = True
    match_radius: float = 1e-6
    max_deflations: int = 3
    exact_max_degree: int = 8
    max_minors: int = 60
    guard_digits: int = 6
    seed: int = 0

    @property
    def limit(self):
        """The highest precision tried."""
        return self.digits if self.max_digits is None else int(self.max_digits)

    @property
    def threshold(self):
        """The backward error a certified point must stay below."""
        return 10.0 ** (-(self.digits - self.guard_digits))

    def validated(self):
        """A copy checked for sense; raises InputError naming the bad option."""
        if not isinstance(self.digits, int) or isinstance(self.digits, bool) or not 16 <= self.digits <= 10000:
            raise InputError(f"digits must be an integer from 16 to 10000, got {self.digits!r}")
        if self.max_digits is not None and (not isinstance(self.max_digits, int) or isinstance(self.max_digits, bool)
                                            or not self.digits <= self.max_digits <= 10000):
            raise InputError(f"max_digits must be an integer from digits ({self.digits}) to 10000, "
                             f"got {self.max_digits!r}")
        if not self.match_radius > 0:
            raise InputError(f"match radius must be positive, got {self.match_radius!r}")
        if self.max_deflations < 0 or self.exact_max_degree < 1 or self.max_minors < 1:
            raise InputError("max_deflations must be >= 0, exact_max_degree and max_minors >= 1")
        if not 1 <= self.guard_digits <= self.digits - 8:
            raise InputError(f"guard_digits must be from 1 to digits - 8, got {self.guard_digits!r}")
        return self


@dataclass
class ClaimCheck:
    """One claim of a report (or of the caller) held against F.

    Attributes
    ----------
    name : str
        "codimension", "multiplicity", "at infinity" or "on X".
    reported : object
        What the report said.
    found : object
        What F gives (None when it could not be determined).
    status : ClaimStatus
    how : str
        How it was checked.
    """

    name: str
    reported: object
    found: object
    status: ClaimStatus
    how: str = ""

    @property
    def fails(self):
        """True when the claim is refuted or contradicted."""
        return self.status in (ClaimStatus.REFUTED, ClaimStatus.CONTRADICTED)


@dataclass
class Certificate:
    """What was proved about one point.

    Attributes
    ----------
    status : Status
        "certified", "refuted" (a box near the given point provably holds no zero of the claim) or
        "undecided" (``reason`` says why).
    kind : Kind
        "numerical" (a unique zero of a square subsystem, every other equation bounded over the box:
        ``backward_error``) or "exact" (a proof about the exact equations: ``exact_method``).
    claim : Claim
        What is certified: "regular zero", "zero", "singular point", "point of the singular locus",
        "smooth point" or "rank".
    center : ndarray of complex
        Centre of the box, rounded to double (``center_text`` has every digit).
    center_text : list of str
        Centre coordinates at the working precision.
    radius : float
        The largest half-width of the box (``radii`` has one per coordinate).
    digits : int
        The precision the decision was reached at (``digits_tried``: every precision used).
    method : str
        "Krawczyk", "alpha" (ball of radius 2 beta), "interval exclusion", "exact substitution" or "".
    real : bool or None
        True when the zero is proved real (real coefficients, conjugation-symmetric box).
    backward_error : float or None
        Over the box, the largest |f| divided by a lower bound of the size of f's terms, among the
        equations outside the square subsystem (None when there are none: the box then holds an exact
        zero of every equation). Below ``threshold`` for a certified point.
    residual_bound : float or None
        The largest |f| over the box, without the relative scaling.
    threshold : float or None
        10^-(digits - guard digits): what the backward error had to be below.
    alpha : float or None
        Upper bound on Smale's alpha at the centre; ``alpha_certified`` when below
        the constant ALPHA_ZERO_TEXT.
    alpha_certified : bool
    alpha_radius : float or None
        2 beta: the alpha test puts the zero Newton's method converges to within this
        distance of the centre.
    deflations : int
        Rounds of isosingular deflation that were needed.
    square_equations : list of int
        Which of the equations (numbered from 0, deflation minors after the claim's own) form
        the square subsystem (slices through the point are not numbered).
    chart : int or None
        For projective points: the coordinate set to 1.
    radii : list of float
        Half-width of the box in each coordinate (0 where the coordinate is exact: a chart
        coordinate, or one proved to be 0).
    zero_coordinates : list of int
        Coordinates proved to be exactly 0 (the certificate was made in the subspace where they
        vanish: the hyperplane at infinity, the origin of a cusp).
    at_infinity : bool
        The point is a zero of the homogenised system with the homogenising coordinate (first) 0.
    exact_coordinates : list of str or None
        Exact coordinates (kind "exact", route "recognised"): elements of the coefficient field, or
        polynomials in ``t`` with ``minimal_polynomial(t) = 0``.
    minimal_polynomial : str or None
    exact_method : str or None
        "recognised" (PSLQ and exact reduction), "root separation" (Canny's gap bound) or
        "identically zero" (every equation vanishes identically in the subspace of the box).
    multiplicity : int or None
        Multiplicity of the zero (``multiplicity_method`` says how it is known).
    multiplicity_method : str
    lower_singular_value : float or None
        A lower bound on sigma_r(J) over the whole box, r = ``rank_lower``.
    rank_lower : int or None
        rank J >= rank_lower at every point of the box (proved).
    rank_upper : int or None
        rank J <= rank_upper at the exact point of the box (proved by an exact certificate of the
        zero of F and the (rank_upper + 1)-minors), or None.
    distance : float or None
        Largest coordinate difference between the given point and the centre.
    distinct : bool or None
        Set by :func:`overlapping_pairs` users: False when the box meets another certified box.
    claim_checks : list of ClaimCheck
    digits_tried : list of int
    reason : str
    notes : list of str
    """

    status: Status
    kind: Kind
    claim: Claim
    center: np.ndarray
    center_text: list
    radius: object
    digits: int
    method: str = ""
    real: object = None
    backward_error: object = None
    residual_bound: object = None
    threshold: object = None
    alpha: object = None
    alpha_certified: bool = False
    alpha_radius: object = None
    deflations: int = 0
    square_equations: list = field(default_factory=list)
    chart: object = None
    radii: object = None
    zero_coordinates: list = field(default_factory=list)
    at_infinity: bool = False
    exact_coordinates: object = None
    minimal_polynomial: object = None
    exact_method: object = None
    multiplicity: object = None
    multiplicity_method: str = ""
    lower_singular_value: object = None
    rank_lower: object = None
    rank_upper: object = None
    distance: object = None
    distinct: object = None
    claim_checks: list = field(default_factory=list)
    digits_tried: list = field(default_factory=list)
    reason: str = ""
    notes: list = field(default_factory=list)

    def __post_init__(self):
        if self.radii is None and self.radius is not None:
            self.radii = [float(self.radius)] * len(self.center)

    @property
    def certified(self):
        return self.status == Status.CERTIFIED

    @property
    def failed_claims(self):
        """The claim checks that did not hold."""
        return [check for check in self.claim_checks if check.fails]


# --- equations -------------------------------------------------------------------------------------

def _integer_weights(rng, shape):
    """Small non-zero integer weights: random combinations that stay exact."""
    values = rng.integers(1, 6, size=shape) * rng.choice([-1, 1], size=shape)
    return values.astype(np.int64)


def _minor_equations(polynomials, size, n, max_minors, rng, limits=DEFAULT_LIMITS):
    """The size x size minors of the Jacobian of ``polynomials``: all, or random integer combinations.

    Returns (equations, all_minors) where all_minors says whether every minor is among them.
    """
    m = len(polynomials)
    gradients = [[p.derivative(j) for j in range(n)] for p in polynomials]
    count = math.comb(m, size) * math.comb(n, size)
    if count <= max_minors:
        result = []
        for rows in itertools.combinations(range(m), size):
            for cols in itertools.combinations(range(n), size):
                minor = determinant([[gradients[i][j] for j in cols] for i in rows], limits)
                if not minor.is_zero():
                    result.append(minor)
        return result, True
    result = []
    for _ in range(n - size + 1):
        a = _integer_weights(rng, (size, m))
        b = _integer_weights(rng, (n, size))
        result.append(combined_minor(gradients, a, b, limits))
    return result, False


def singularity_equations(system, codimension, max_minors=60, seed=0):
    """F together with the c x c minors of its Jacobian (c = ``codimension``): zero exactly at rank J < c.

    Parameters
    ----------
    system : PolynomialSystem
    codimension : int
    max_minors : int
        Beyond this many minors, n - c + 1 random integer combinations of them.
    seed : int

    Returns
    -------
    (list of Polynomial, bool)
        The equations and whether every minor is among them.

    Examples
    --------
    >>> from numag.parse import parse_system
    >>> equations, complete = singularity_equations(parse_system(["y^2 - x^3"], ["x", "y"]), 1)
    >>> [p.to_text(["x", "y"]) for p in equations], complete
    (['-x^3 + y^2', '-3*x^2', '2*y'], True)
    """
    if not 1 <= codimension <= min(system.n_equations, system.n_variables):
        raise InputError(f"codimension {codimension} is impossible for {system.n_equations} equations "
                         f"in {system.n_variables} variables")
    rng = np.random.default_rng(seed)
    minors, complete = _minor_equations(system.polynomials, codimension, system.n_variables, max_minors, rng)
    return list(system.polynomials) + minors, complete


def _restrict(polynomial, indices):
    """The polynomial with the variables ``indices`` set to 0 (and dropped): exact, term by term."""
    indices = sorted(indices)
    if not indices:
        return polynomial
    keep = np.all(polynomial.exponents[:, indices] == 0, axis=1)
    exponents = np.delete(polynomial.exponents[keep], indices, axis=1)
    return Polynomial(exponents, polynomial.coefficients[keep], polynomial.n_variables - len(indices))


def _top_form(polynomial):
    """The terms of highest degree: F^h with the homogenising coordinate set to 0."""
    return _restrict(polynomial.homogenize(0), [0])


def _is_constant(polynomial):
    return polynomial.n_terms == 0 or (polynomial.n_terms == 1 and not polynomial.exponents.any())


# --- interval helpers ---------------------------------------------------------------------------------

def _iv_point(value):
    """An mp number (or Python number) as a point interval of ``mpmath.iv``."""
    value = mpmath.mp.mpc(value)
    return mpmath.iv.mpc(value.real, value.imag)


def _iv_box(center, radii):
    """The box center_j + [-r_j, r_j] + i[-r_j, r_j]."""
    iv = mpmath.iv
    box = []
    for c, r in zip(center, radii):
        spread = iv.mpf([-r, r])
        box.append(iv.mpc(iv.mpf(c.real) + spread, iv.mpf(c.imag) + spread))
    return box


def _bounds(value):
    """(re_lo, re_hi, im_lo, im_hi) as mpf of an iv complex (or real) interval."""
    mp = mpmath.mp
    if isinstance(value, mpmath.iv.mpf):
        return mp.mpf(value.a), mp.mpf(value.b), mp.mpf(0), mp.mpf(0)
    return mp.mpf(value.real.a), mp.mpf(value.real.b), mp.mpf(value.imag.a), mp.mpf(value.imag.b)


def _magnitude_upper(value):
    """An upper bound on |z| over an iv complex interval."""
    lo_re, hi_re, lo_im, hi_im = _bounds(value)
    re = max(abs(lo_re), abs(hi_re))
    im = max(abs(lo_im), abs(hi_im))
    return mpmath.mp.sqrt(re * re + im * im) * (1 + mpmath.mp.eps * 4)


def _magnitude_lower(value):
    """A lower bound on |z| over an iv complex interval (its mignitude; 0 when it holds 0)."""
    lo_re, hi_re, lo_im, hi_im = _bounds(value)
    re = mpmath.mp.mpf(0) if lo_re <= 0 <= hi_re else min(abs(lo_re), abs(hi_re))
    im = mpmath.mp.mpf(0) if lo_im <= 0 <= hi_im else min(abs(lo_im), abs(hi_im))
    return mpmath.mp.sqrt(re * re + im * im) * (1 - mpmath.mp.eps * 4)


def _excludes_zero(value):
    lo_re, hi_re, lo_im, hi_im = _bounds(value)
    return lo_re > 0 or hi_re < 0 or lo_im > 0 or hi_im < 0


def _holds_zero(value):
    lo_re, hi_re, lo_im, hi_im = _bounds(value)
    return lo_re <= 0 <= hi_re and lo_im <= 0 <= hi_im


def _frobenius_upper(matrix):
    mp = mpmath.mp
    total = mp.mpf(0)
    for i in range(matrix.rows):
        for j in range(matrix.cols):
            total += _magnitude_upper(matrix[i, j]) ** 2
    return mp.sqrt(total) * (1 + mp.eps * 4)


def _to_iv_matrix(matrix):
    iv = mpmath.iv
    result = iv.matrix(matrix.rows, matrix.cols)
    for i in range(matrix.rows):
        for j in range(matrix.cols):
            result[i, j] = _iv_point(matrix[i, j])
    return result


def _coefficient_magnitude_lower(coefficient):
    """A lower bound on |c| for an exact or a complex double coefficient (at the iv precision)."""
    if isinstance(coefficient, ExactCoefficient):
        return _magnitude_lower(coefficient.to_context(mpmath.iv))
    return _magnitude_lower(_iv_point(complex(coefficient)))


def _terms_lower(polynomial, box):
    """A lower bound, over the box, of sum_k |c_k| |x^a_k|: the size of the polynomial's terms."""
    mp = mpmath.mp
    smallest = [_magnitude_lower(b) for b in box]
    total = mp.mpf(0)
    for row, c in zip(polynomial.exponents, polynomial.coefficients):
        term = _coefficient_magnitude_lower(c)
        for j, e in enumerate(row):
            if e:
                term *= smallest[j] ** int(e)
        total += term
    # each product and sum rounds by at most eps/2: a margin of a few eps per operation
    operations = polynomial.n_terms * (1 + int(polynomial.degree if polynomial.degree > 0 else 0)) + 8
    return total * (1 - 4 * operations * mp.eps)


# --- the square part ---------------------------------------------------------------------------------

def _coordinate_scales(center, digits):
    """Size of each coordinate for its box: |x_j|, but at least 10^-(digits//2) times the largest."""
    mp = mpmath.mp
    largest = max((abs(c) for c in center), default=mp.mpf(0))
    if largest == 0:
        largest = mp.mpf(1)
    floor = largest * mp.mpf(10) ** (-(digits // _FLOOR_DIGITS_FRACTION))
    return [max(abs(c), floor) for c in center]


#: What mpmath's LU decomposition raises on a singular matrix (a zero pivot column ends in a TypeError).
_SINGULAR = (ZeroDivisionError, TypeError)


class _Square:
    """A square subsystem, evaluated in double, mp and iv."""

    def __init__(self, polynomials):
        self.polynomials = list(polynomials)
        self.n = self.polynomials[0].n_variables
        self.precise = PrecisionEvaluator(self.polynomials)

    def newton(self, start, digits, max_iterations=80):
        """Newton's method from ``start`` until every coordinate's step is below 10^-(digits + 3) of its size.

        Runs in the current mp precision (the caller adds guard digits). Returns (point, converged).
        """
        mp = mpmath.mp
        x = mp.matrix([mp.mpc(v) for v in start])
        target = mp.mpf(10) ** (-(digits + 3))
        last = mp.inf
        slow = 0  # steps in a row that shrank by less than a factor 3: linear convergence, a singular zero
        for _ in range(max_iterations):
            values, jac = self.precise.evaluate(list(x), mp)
            try:
                step = mp.lu_solve(jac, values)
            except _SINGULAR:
                return x, False
            x = x - step
            size = mp.norm(step, mp.inf)
            if not mp.isfinite(size):
                return x, False
            scales = _coordinate_scales([x[j] for j in range(self.n)], digits)
            if all(abs(step[j]) <= target * scales[j] for j in range(self.n)):
                return x, True
            if size > 4 * last and last < 1e-3 * (1 + mp.norm(x, mp.inf)):  # diverging after having been close
                return x, False
            slow = slow + 1 if size > last / 3 else 0
            if slow >= 12:
                return x, False
            last = size
        return x, False

    def image(self, center, box):
        """Krawczyk's image K(box) = c - Y S(c) + (I - Y J(box)) (box - c), or None (J(c) singular)."""
        mp, iv = mpmath.mp, mpmath.iv
        point = [_iv_point(c) for c in center]
        values = self.precise.evaluate(point, iv, jacobian=False)
        _, jac_box = self.precise.evaluate(box, iv)
        _, jac_center = self.precise.evaluate(list(center), mp)
        try:
            inverse = mp.inverse(jac_center)
        except _SINGULAR:
            return None
        y = _to_iv_matrix(inverse)
        n = self.n
        spread = iv.matrix(n, 1)
        for j in range(n):
            spread[j] = box[j] - point[j]
        image = iv.matrix(point) - y * values + (iv.eye(n) - y * jac_box) * spread
        return [image[j] for j in range(n)]

    def krawczyk(self, center, radii, real=False):
        """('inside' | 'outside' | 'unknown', centre used, image) for the box of ``radii`` around ``center``.

        'inside' (the image strictly inside the box) proves exactly one zero in the box, a regular
        one; 'outside' (disjoint in some coordinate) proves none. With ``real`` the centre's
        imaginary parts are dropped, giving a box symmetric under conjugation.
        """
        mp = mpmath.mp
        if real:
            center = [mp.mpc(c.real, 0) for c in center]
        image = self.image(center, _iv_box(center, radii))
        if image is None:
            return "unknown", center, None
        inside, outside = True, False
        for j in range(self.n):
            lo_re, hi_re, lo_im, hi_im = _bounds(image[j])
            c, r = center[j], radii[j]
            if not (lo_re > c.real - r and hi_re < c.real + r and lo_im > c.imag - r and hi_im < c.imag + r):
                inside = False
            if hi_re < c.real - r or lo_re > c.real + r or hi_im < c.imag - r or lo_im > c.imag + r:
                outside = True
        if outside:
            return "outside", center, image
        return ("inside" if inside else "unknown"), center, image

    def alpha(self, center):
        """(alpha upper bound, beta upper bound) at ``center`` in interval arithmetic, or (None, None)."""
        mp, iv = mpmath.mp, mpmath.iv
        point = [_iv_point(c) for c in center]
        values, jac = self.precise.evaluate(point, iv)
        _, jac_mp = self.precise.evaluate(list(center), mp)
        try:
            y = _to_iv_matrix(mp.inverse(jac_mp))
        except _SINGULAR:
            return None, None
        n = self.n
        defect = _frobenius_upper(iv.eye(n) - y * jac)
        if not defect < 1:
            return None, None
        shrink = 1 / (1 - defect)
        beta = _frobenius_upper(y * values) * shrink
        norm1 = iv.sqrt(1 + sum((abs(p) ** 2 for p in point), iv.mpf(0)))
        degrees = [p.degree for p in self.polynomials]
        delta = iv.matrix(n, n)
        for i, d in enumerate(degrees):
            delta[i, i] = iv.sqrt(iv.mpf(d)) * norm1 ** (d - 1)
        condition = _frobenius_upper(y * delta) * shrink
        weyl = mp.sqrt(sum((_weyl_norm_squared(p) for p in self.polynomials), mp.mpf(0)))
        mu = max(mp.mpf(1), weyl * condition)
        top = max(degrees)
        gamma = mu * mp.mpf(top) ** mp.mpf(1.5) / (2 * mp.mpf(norm1.a))
        return beta * gamma * (1 + 16 * mp.eps), beta


def alpha_test(polynomials, point, digits=30):
    """Smale's alpha test for a square system at ``point``, in interval arithmetic.

    Parameters
    ----------
    polynomials : sequence of Polynomial
        n polynomials in n variables.
    point : array_like of complex
    digits : int

    Returns
    -------
    (alpha, beta, certified)
        Upper bounds on alpha and beta (floats, None when J is not invertible there) and whether
        alpha < (13 - 3 sqrt(17))/4: then Newton's method from ``point`` converges quadratically
        to a zero within 2 beta.

    Examples
    --------
    >>> from numag.parse import parse_system
    >>> alpha, beta, ok = alpha_test(parse_system(["x^2 - 2"], ["x"]).polynomials, [1.4142])
    >>> ok, round(beta, 6)
    (True, 1.4e-05)
    """
    polynomials = list(polynomials)
    if not polynomials or len(polynomials) != polynomials[0].n_variables:
        raise InputError("the alpha test needs a square system")
    with working_digits(digits):
        center = [mpmath.mp.mpc(complex(v)) for v in np.asarray(point, dtype=complex)]
        alpha, beta = _Square(polynomials).alpha(center)
        if alpha is None:
            return None, None, False
        return float(alpha), float(beta), bool(alpha < mpmath.mp.mpf(alpha_zero(mpmath.iv).a))


def _weyl_norm_squared(polynomial):
    """Upper bound on the squared Bombieri-Weyl norm of the homogenised polynomial."""
    mp = mpmath.mp
    d = polynomial.degree
    total = mp.mpf(0)
    coefficients = polynomial.coefficients
    for row, c in zip(polynomial.exponents, coefficients):
        value = c.to_context(mpmath.iv) if isinstance(c, ExactCoefficient) else _iv_point(c)
        weight = math.factorial(d - int(row.sum()))
        for e in row:
            weight *= math.factorial(int(e))
        total += _magnitude_upper(value) ** 2 * weight / math.factorial(d)
    return total * (1 + mp.eps * 8)


# --- equilibrated Jacobians, choosing a square subsystem ---------------------------------------------

def _column_scales(point):
    """|x_j|, at least 1e-8 of the largest coordinate or of 1.

    Only for choices (rows, deflation), never for proofs: a coordinate near 0 has no size of its own,
    and in units of itself x^2 near x = 1e-9 would look like a regular zero (2 x * x / x^2 = 2).
    """
    magnitudes = np.abs(np.asarray(point, dtype=complex))
    return np.maximum(magnitudes, 1e-8 * max(float(magnitudes.max(initial=0.0)), 1.0))


def _term_sizes(polynomials, scales):
    """sum_k |c_k| prod_j s_j^a_kj per polynomial: the size of its terms with |x_j| replaced by s_j."""
    logs = np.log(scales)
    sizes = np.empty(len(polynomials))
    for i, p in enumerate(polynomials):
        if p.n_terms == 0:
            sizes[i] = 1.0
            continue
        sizes[i] = float(np.sum(np.abs(p.numeric_coefficients()) * np.exp(p.exponents @ logs)))
    return np.where(sizes > 0, sizes, 1.0)


def _equilibrated(polynomials, point, evaluator=None):
    """Values and Jacobian in units of each equation's terms (rows) and each coordinate's size (columns).

    Row i is divided by sum |c_k| |x^a_k| (with |x_j| floored, so a vanishing point still has a scale)
    and column j multiplied by |x_j|: the result does not change when a variable or an equation is
    rescaled, so rank decisions on it do not depend on units.
    """
    evaluator = evaluator or BatchEvaluator(polynomials)
    values, jac = evaluator.evaluate(np.asarray(point, dtype=complex)[None, :])
    scales = _column_scales(point)
    sizes = _term_sizes(polynomials, scales)
    return values[0] / sizes, jac[0] * scales[None, :] / sizes[:, None], scales


def _absolute_jacobian(polynomials, point):
    """J with row i divided by ||c_i||_1 ||(1, x)||^(d_i - 1): the units the equations were written in."""
    _, jac = BatchEvaluator(polynomials).evaluate(np.asarray(point, dtype=complex)[None, :])
    size = math.sqrt(1.0 + float(np.linalg.norm(point)) ** 2)
    scales = np.array([max(float(np.abs(p.numeric_coefficients()).sum()), 1e-300) * size ** max(p.degree - 1, 0)
                       for p in polynomials])
    return jac[0] / scales[:, None]


def _near_zero(polynomials, point):
    """Whether the equations nearly vanish at the point (in the units of their terms, or absolutely)."""
    values, _, _ = _equilibrated(polynomials, point)
    if np.linalg.norm(values) <= _NEAR_ZERO:
        return True
    raw = BatchEvaluator(polynomials).evaluate(np.asarray(point, dtype=complex)[None, :], jacobian=False)[0]
    size = math.sqrt(1.0 + float(np.linalg.norm(point)) ** 2)
    scales = np.array([max(float(np.abs(p.numeric_coefficients()).sum()), 1e-300) * size ** max(p.degree, 0)
                       for p in polynomials])
    return bool(np.linalg.norm(raw / scales) <= _NEAR_ZERO * 1e-2)


def _gauss_newton_double(polynomials, point, iterations=40):
    """Least-squares Newton in double precision on the equilibrated system; the best point seen."""
    evaluator = BatchEvaluator(polynomials)
    x = np.array(point, dtype=complex)
    best, best_residual = x.copy(), np.inf
    for _ in range(iterations):
        values, jac, scales = _equilibrated(polynomials, x, evaluator)
        residual = np.linalg.norm(values)
        if not np.isfinite(residual) or not np.all(np.isfinite(jac)):
            break
        if residual < best_residual:
            best, best_residual = x.copy(), residual
        step = scales * np.linalg.lstsq(jac, values, rcond=1e-10)[0]
        x = x - step
        if np.all(np.abs(step) <= 1e-15 * scales):
            break
    return best


def _null_space(matrix):
    """Orthonormal basis (columns) of the kernel of a full-row-rank matrix."""
    _, _, vh = np.linalg.svd(matrix)
    return vh[matrix.shape[0]:].conj().T


def _choose_rows(equations, pinned, point):
    """Rows of ``equations`` that, with every pinned equation, give the best-conditioned square system.

    Returns (rows, rank) where rank is the numerical rank of the equations' own equilibrated Jacobian
    (what a deflation step needs).
    """
    n = len(point)
    _, jac, _ = _equilibrated(equations, point)
    if not np.all(np.isfinite(jac)):
        raise _Undecided("the equations do not evaluate to finite numbers near the point")
    rank = int(np.sum(np.linalg.svd(jac, compute_uv=False) > _DEFLATION_THRESHOLD))
    projected = jac
    if pinned:
        _, pinned_jac, _ = _equilibrated(pinned, point)
        projected = jac @ _null_space(pinned_jac)
    wanted = n - len(pinned)
    if wanted == 0:
        return [], rank
    if len(equations) < wanted:
        raise _Undecided(f"{len(equations)} equation(s) cannot pin a point in {wanted} free direction(s)")
    _, _, pivots = scipy.linalg.qr(projected.T, pivoting=True)
    return sorted(int(k) for k in pivots[:wanted]), rank


class _Undecided(Exception):
    pass


# --- boxes ----------------------------------------------------------------------------------------

def _text(value, digits):
    mp = mpmath.mp
    value = mp.mpc(value)
    if value.imag == 0:
        return mpmath.nstr(value.real, digits)
    return f"{mpmath.nstr(value.real, digits)} {'-' if value.imag < 0 else '+'} {mpmath.nstr(abs(value.imag), digits)}*I"


def _float_up(value):
    """A double at least ``value`` (a non-negative mpf): rounding to nearest can lose half an ulp."""
    result = float(value)
    return result * (1 + 2.0 ** -50) + 5e-324 if result > 0 or value > 0 else 0.0


def _tighten(square, center, radii, image, iterations=4):
    """Intersect the box with Krawczyk images a few times; returns the rectangles (re_lo, re_hi, im_lo, im_hi).

    The unique zero of the first box lies in every image of a box that holds it, so each
    intersection still holds it.
    """
    mp, iv = mpmath.mp, mpmath.iv
    rect = [(c.real - r, c.real + r, c.imag - r, c.imag + r) for c, r in zip(center, radii)]
    for _ in range(iterations):
        tighter = []
        for (a, b, c, d), value in zip(rect, image):
            lo_re, hi_re, lo_im, hi_im = _bounds(value)
            tighter.append((max(a, lo_re), min(b, hi_re), max(c, lo_im), min(d, hi_im)))
        if any(a > b or c > d for a, b, c, d in tighter):
            break  # cannot happen for a box holding the zero; keep what is proved
        rect = tighter
        middle = [mp.mpc((a + b) / 2, (c + d) / 2) for a, b, c, d in rect]
        box = [iv.mpc(iv.mpf([a, b]), iv.mpf([c, d])) for a, b, c, d in rect]
        image = square.image(middle, box)
        if image is None:
            break
    return rect


def _fit(rect, center, radii, targets, real):
    """A centre and radii (equal in real and imaginary part) around the rectangles, at least ``targets``,
    inside the proved box (``center`` +- ``radii``); the proved box itself when it does not fit."""
    mp = mpmath.mp
    middle, fitted = [], []
    for (a, b, c, d), c0, r0, target in zip(rect, center, radii, targets):
        m = mp.mpc((a + b) / 2, 0 if real else (c + d) / 2)
        half = max((b - a) / 2, (d - c) / 2, abs(c) if real else 0, abs(d) if real else 0)
        r = max(half * (1 + 16 * mp.eps), target)
        if abs(m.real - c0.real) + r > r0 * (1 - 16 * mp.eps) or abs(m.imag - c0.imag) + r > r0 * (1 - 16 * mp.eps):
            return list(center), list(radii)
        middle.append(m)
        fitted.append(r)
    return middle, fitted


@dataclass
class _Box:
    center: list
    radii: list
    method: str
    real: object


def _proved_box(square, center, digits, real_coefficients):
    """A box that provably holds exactly one zero of the square subsystem near ``center``, or None.

    Krawczyk's test on boxes of radius 10^-e times each coordinate's size, e = digits - 3 first
    (then wider); a success on a wider box is tightened by Krawczyk images back to the first size.
    The alpha test (a ball of radius 2 beta) when every Krawczyk attempt fails.
    """
    mp, iv = mpmath.mp, mpmath.iv
    scales = _coordinate_scales(center, digits)
    targets = [mp.mpf(10) ** (-(digits - 3)) * s for s in scales]
    for first, exponent in enumerate((digits - 3, digits - 6, digits // 2, 8)):
        radii = [mp.mpf(10) ** (-exponent) * s for s in scales]
        attempts = [True] if real_coefficients and all(abs(c.imag) < r / 4 for c, r in zip(center, radii)) else []
        for real in attempts + [False]:
            outcome, used, image = square.krawczyk(center, radii, real=real)
            if outcome != "inside":
                continue
            if real:
                realness = True  # one zero in a box symmetric under conjugation: its conjugate is itself
            elif real_coefficients and any(abs(c.imag) > r for c, r in zip(used, radii)):
                realness = False  # the box, holding the zero, misses the real points
            else:
                realness = None
            if first == 0:
                return _Box(list(used), radii, "Krawczyk", realness)
            rect = _tighten(square, used, radii, image)
            middle, fitted = _fit(rect, used, radii, targets, real)
            return _Box(middle, fitted, "Krawczyk", realness)
    alpha, beta = square.alpha(center)
    if alpha is not None and alpha < mp.mpf(alpha_zero(iv).a):
        return _Box(list(center), [2 * beta] * len(center), "alpha", None)
    return None


def _publish(square, box, digits):
    """Centre texts and radii (doubles) of the box as written in the certificate.

    The texts round the centre, so the written box is widened by that rounding (it holds the proved
    one) and, for a Krawczyk box, Krawczyk's test is run once more on the written box itself, so that
    what the certificate states (exactly one zero in centre_text +- radii) is what was proved. Should
    that test fail, the centre is written with more digits.
    """
    mp = mpmath.mp
    for shown in (digits, _guarded(digits), 2 * _guarded(digits)):
        texts = [_text(c, shown) for c in box.center]
        parsed = [_parse_center(t) for t in texts]
        radii = [_float_up(r + max(abs(q.real - c.real), abs(q.imag - c.imag)))
                 for r, q, c in zip(box.radii, parsed, box.center)]
        if box.method != "Krawczyk":
            return texts, radii
        outcome, _, _ = square.krawczyk(parsed, [mp.mpf(r) for r in radii])
        if outcome == "inside":
            return texts, radii
    # not seen in practice: the written box holds the proved one (so the zero), uniqueness was shown for
    # the proved box only
    box.method = "Krawczyk (unique in the box before rounding its centre)"
    return texts, radii


def _refute(polynomials, point, radius, digits):
    """The index of an equation that provably has no zero in the box around ``point`` (``radius``: one for
    every coordinate, or a list of them), or None."""
    radii = radius if isinstance(radius, (list, tuple)) else [radius] * len(point)
    with working_digits(digits):
        box = _iv_box([mpmath.mp.mpc(complex(v)) for v in point], [mpmath.mp.mpf(r) for r in radii])
        values = PrecisionEvaluator(polynomials).evaluate(box, mpmath.iv, jacobian=False)
        for i in range(values.rows):
            if _excludes_zero(values[i]):
                return i
        return None


def _is_real(polynomials):
    for p in polynomials:
        if p.is_exact:
            if not all(c.is_real() for c in p.coefficients):
                return False
        elif np.any(np.abs(p.numeric_coefficients().imag) > 0):
            return False
    return True


def _is_rational(polynomials):
    return all(p.is_exact and all(c.is_rational() for c in p.coefficients) for p in polynomials)


@dataclass
class _Accounting:
    """Interval bounds of the equations outside the square subsystem over the box."""

    excluded: list          # indices (into the list given) whose enclosure excludes 0
    backward: object        # largest |f| / terms' size (mpf, may be inf), None without equations
    residual: object        # largest |f|
    uppers: list            # |f| upper bound per equation
    ratios: list            # per equation
    worst: object           # index of the largest ratio


def _account(rest, box):
    if not rest:
        return _Accounting([], None, None, [], [], None)
    mp = mpmath.mp
    values = PrecisionEvaluator(rest).evaluate(box, mpmath.iv, jacobian=False)
    excluded, uppers, ratios = [], [], []
    for i, p in enumerate(rest):
        if _excludes_zero(values[i]):
            excluded.append(i)
        upper = _magnitude_upper(values[i])
        terms = _terms_lower(p, box)
        uppers.append(upper)
        ratios.append(upper / terms * (1 + 4 * mp.eps) if terms > 0 else (mp.mpf(0) if upper == 0 else mp.inf))
    worst = max(range(len(rest)), key=lambda i: ratios[i])
    return _Accounting(excluded, ratios[worst], max(uppers), uppers, ratios, worst)


# --- the driver -----------------------------------------------------------------------------------

def _undecided(claim, point, digits, reason, **extra):
    return Certificate(Status.UNDECIDED, Kind.NUMERICAL, claim, np.asarray(point, dtype=complex),
                       [_text(v, 17) for v in point], None, digits, reason=reason, **extra)


def _certify_zero(required, point, options, claim, pinned=(), exact_check=True, squares=None, want_exact=None):
    """Certify a zero of ``required`` near ``point`` (affine coordinates), raising the precision while needed.

    ``pinned`` equations (slices through the point) are always in the square subsystem and are no part
    of the claim. ``squares`` caches square subsystems across the points of one system. With
    ``want_exact`` a numerical certificate with equations outside its square subsystem (only a backward
    error for them) is retried at higher precision for an exact one; by default whenever ``max_digits``
    is above ``digits`` (the caller asked for the decision to be proved).
    """
    if want_exact is None:
        want_exact = options.limit > options.digits
    options = options.validated()
    point = np.asarray(point, dtype=complex)
    n = required[0].n_variables if required else len(point)
    if point.shape != (n,):
        raise InputError(f"the point has {point.shape[0] if point.ndim == 1 else point.shape} "
                         f"coordinates, the equations {n} variables")
    if not np.all(np.isfinite(point)):
        raise InputError("the point has non-finite coordinates")
    digits, tried = options.digits, []
    while True:
        certificate, wanted = _certify_zero_at(required, point, options, claim, digits, tuple(pinned),
                                               exact_check, squares)
        tried.append(digits)
        inexact = (want_exact and certificate.certified and certificate.kind != Kind.EXACT
                   and certificate.backward_error is not None and exact_check)
        if inexact and wanted is None:
            wanted = 2 * digits
        open_question = certificate.status == Status.UNDECIDED or inexact
        if not open_question or wanted is None or digits >= options.limit:
            break
        digits = min(options.limit, max(int(wanted), 2 * digits))
    certificate.digits_tried = tried
    if certificate.status == Status.UNDECIDED and wanted is not None:
        if options.limit > options.digits:
            certificate.reason += f" (still undecided at the limit of {options.limit} digits)"
        else:
            certificate.reason += (f" (at {digits} digits; more precision may decide it: "
                                   f"{'max_digits' if options.max_digits is not None else 'raise max_digits'} "
                                   f"{max(int(wanted), 2 * digits)})")
    return certificate


def _certify_zero_at(required, point, options, claim, digits, pinned, exact_check, squares,
                     allow_restriction=True):
    """One attempt at ``digits``. Returns (certificate, digits that might decide it or None)."""
    reach = options.match_radius * (1 + float(np.max(np.abs(point), initial=0.0)))
    threshold = 10.0 ** (-(digits - options.guard_digits))

    def failed(reason, wanted=None, **extra):
        # a box of the reach around the point, or one of the match radius relative to each coordinate
        # (a coordinate of size 1e-4 beside one of 1e4 would otherwise get a box that holds 0)
        magnitudes = np.abs(point)
        relative = [float(options.match_radius * max(a, 1e-8 * magnitudes.max(initial=0.0), 1e-300))
                    for a in magnitudes]
        for radii in ([reach] * len(point), relative):
            refuting = _refute(required, point, radii, max(digits, 20))
            if refuting is not None:
                size = "{:.3g}".format(reach) if radii[0] == reach and len(set(radii)) == 1 else \
                    f"{options.match_radius:.3g} of each coordinate's size"
                return Certificate(Status.REFUTED, Kind.NUMERICAL, claim, point, [_text(v, 17) for v in point],
                                   max(radii), digits, method="interval exclusion", threshold=threshold,
                                   radii=list(radii), reason=f"no zero within {size} of the point: equation "
                                   f"{refuting + 1} of the claim is nonzero over that box; before that: {reason}",
                                   **extra), None
        return _undecided(claim, point, digits, reason, threshold=threshold, **extra), wanted

    if exact_check and options.exact and not pinned:
        exact = _exact_at_point(required, point, claim, digits, threshold)
        if exact is not None:
            return exact, None
    found, problem, wanted, deflations = _locate(required, pinned, point, options, digits, squares, reach, False)
    if found is None and deflations:
        # the deflations used the rank in units of the point; try again with the rank in absolute units,
        # which sees a zero at the origin that the other one cannot
        again = _locate(required, pinned, point, options, digits, None, reach, True)
        if again[0] is not None:
            found, problem, wanted, deflations = again
    if found is None:
        if deflations and problem:
            problem += f" (after {deflations} round(s) of isosingular deflation)"
        return failed(problem, wanted, deflations=deflations)
    box, rows, deflations, square, chosen = found
    return _settle(required, point, options, claim, digits, pinned, exact_check, box, rows, deflations, square,
                   chosen, reach, threshold, allow_restriction)


#: Exact substitution of a given point is tried for equations with at most this many terms in all.
_SUBSTITUTION_TERMS = 5000


def _exact_at_point(required, point, claim, digits, threshold):
    """A certificate for the given point itself when every equation vanishes there exactly, else None.

    A double is a dyadic rational, so the given coordinates are exact numbers: when the exact equations
    vanish there (a node given as (0, 0), a linkage's branch point (1, 0, 1, 0)), that point is the
    certified zero, whatever the Jacobian does (also on a positive-dimensional set of zeros).
    """
    if not all(p.is_exact for p in required) or sum(p.n_terms for p in required) > _SUBSTITUTION_TERMS:
        return None
    values, _, _ = _equilibrated(required, point)
    if not np.all(np.isfinite(values)) or np.linalg.norm(values) > 1e-12:
        return None  # not even nearly a zero in double precision: no exact zero there
    exact = [ExactCoefficient.from_complex(v) for v in point]
    powers = [[ExactCoefficient.rational(1)] for _ in exact]
    for p in required:
        total = ExactCoefficient.zero()
        for row, c in zip(p.exponents, p.coefficients):
            term = c
            for j, e in enumerate(row):
                if e:
                    while len(powers[j]) <= e:
                        powers[j].append(powers[j][-1] * exact[j])
                    term = term * powers[j][int(e)]
            total = total + term
        if not total.is_zero():
            return None
    texts, radii = [], []
    with working_digits(_guarded(digits)):
        for v, q in zip(point, exact):
            text = _text(mpmath.mp.mpc(v), 17)
            shown = _parse_center(text)
            # the text rounds the double: the box is widened by that (the exact point stays inside)
            radii.append(_float_up(max(abs(shown.real - mpmath.mp.mpf(v.real)),
                                       abs(shown.imag - mpmath.mp.mpf(v.imag)))))
            texts.append(text)
    certificate = Certificate(Status.CERTIFIED, Kind.EXACT, claim, np.asarray(point, dtype=complex), texts,
                              max(radii, default=0.0), digits, method="exact substitution", threshold=threshold,
                              radii=radii, backward_error=0.0, residual_bound=0.0, distance=0.0,
                              exact_method="exact substitution", exact_coordinates=[q.to_text() for q in exact],
                              real=bool(np.all(np.asarray(point, dtype=complex).imag == 0)))
    certificate.notes.append("the given point is an exact zero of every equation of the claim (its coordinates "
                             "are the exact binary values given)")
    return certificate


def _locate(required, pinned, point, options, digits, squares, reach, absolute):
    """Newton and Krawczyk on a square subsystem, deflating after each failure at a near zero.

    Returns (found, problem, digits that might help, deflations); found is (box, rows, deflations, square,
    chosen) or None. The deflation minors have size r + 1 with r the numerical rank of J (at most n - 1),
    in units of the point's coordinates, or with ``absolute`` the smaller of that and the absolute rank.
    """
    n = len(point)
    rng = np.random.default_rng(options.seed)
    equations = list(required)
    x = _gauss_newton_double(equations + list(pinned), point)
    w = _guarded(digits)
    problem, wanted, deflations = "", None, 0
    for deflations in range(options.max_deflations + 1):
        try:
            rows, rank = _choose_rows(equations, list(pinned), x)
        except _Undecided as err:
            return None, str(err), None, deflations
        chosen = list(pinned) + [equations[k] for k in rows]
        key = tuple(id(p) for p in chosen)
        if squares is not None and key in squares:
            square = squares[key]
        else:
            square = _Square(chosen)
            if squares is not None and not deflations:
                squares[key] = square
        with working_digits(w):
            center, converged = square.newton(x, digits)
            center = [center[j] for j in range(n)]
            moved = float(max((abs(complex(center[j]) - point[j]) for j in range(n)), default=0.0))
            if not converged:  # a multiple zero, or a cluster that more digits may separate
                problem, wanted = "Newton's method on the square subsystem did not converge", 2 * digits
            elif moved > reach:
                problem, wanted = (f"the zero of the square subsystem near the point lies {moved:.3g} away "
                                   f"(more than {reach:.3g})"), None
            else:
                box = _proved_box(square, center, digits, _is_real(chosen))
                if box is not None:
                    return (box, rows, deflations, square, chosen), "", None, deflations
                problem, wanted = (f"neither Krawczyk's test nor the alpha test succeeded at {digits} digits "
                                   "(ill-conditioned)"), 2 * digits
                if digits < options.limit:
                    # Newton converged, Krawczyk could not enclose: a regular zero too ill-conditioned for these
                    # digits (roots 1e-8 apart at 30 digits) looks just like a multiple one; deflation would
                    # certify the multiple zero of a nearby system instead, so more digits come first and
                    # deflation only at the last precision allowed
                    break
        if deflations == options.max_deflations or not _near_zero(equations, x):
            break
        if float(np.max(np.abs(x - point))) > reach:
            problem += (f" (the equations' nearest near zero, {float(np.max(np.abs(x - point))):.3g} away, is out "
                        "of reach)")
            break
        if sum(p.n_terms for p in equations) * n > _DEFLATION_TERMS:
            problem += "; the deflation minors would be too large to write out"
            break
        if absolute:
            rank = min(rank, int(np.sum(np.linalg.svd(_absolute_jacobian(equations, x), compute_uv=False)
                                        > _DEFLATION_THRESHOLD)))
        # Newton or Krawczyk failed at a near zero: deflate, by the n x n minors at least
        try:
            minors, _ = _minor_equations(equations, min(rank, n - 1) + 1, n, options.max_minors, rng,
                                         _DEFLATION_LIMITS)
        except LimitError as err:
            problem += f"; deflation stopped: {err}"
            break
        if not minors:
            break
        equations = equations + minors
        x = _gauss_newton_double(equations + list(pinned), x)
    return None, problem, wanted, deflations


def _settle(required, point, options, claim, digits, pinned, exact_check, box, rows, deflations, square, chosen,
            reach, threshold, allow_restriction):
    """Account for every equation of the claim over the proved box; exact routes; the certificate."""
    mp, iv = mpmath.mp, mpmath.iv
    n = len(point)
    w = _guarded(digits)
    with working_digits(w):
        alpha, beta = square.alpha(box.center)
        alpha_ok = alpha is not None and alpha < mp.mpf(alpha_zero(iv).a)
        rest_index = [k for k in range(len(required)) if k not in rows]
        rest = [required[k] for k in rest_index]
        interval_box = _iv_box(box.center, box.radii)
        accounting = _account(rest, interval_box)
        distance = float(max((abs(complex(c) - p) for c, p in zip(box.center, point)), default=0.0))
        texts, radii = _publish(square, box, digits)
        common = dict(deflations=deflations, square_equations=[int(k) for k in rows],
                      alpha=None if alpha is None else float(alpha), alpha_certified=bool(alpha_ok),
                      alpha_radius=None if beta is None else float(2 * beta), threshold=threshold,
                      radii=radii, distance=distance)
        certificate = Certificate(
            Status.CERTIFIED, Kind.NUMERICAL, claim, np.array([complex(c) for c in box.center]),
            texts, max(radii, default=0.0), digits,
            method=box.method, real=box.real,
            backward_error=None if accounting.backward is None else _float_up(accounting.backward),
            residual_bound=None if accounting.residual is None else _float_up(accounting.residual), **common)
        if deflations:
            certificate.notes.append(f"{deflations} round(s) of isosingular deflation made the zero regular; "
                                     "every equation of the claim is still accounted for; numerically, this is an "
                                     "exact multiple zero of equations within the backward error, and the given "
                                     "ones may have a cluster of simple zeros here instead (more digits, or an "
                                     "exact certificate, tell them apart)")
        # Only when the square subsystem consists of equations of the claim is every zero of the claim in
        # the box a zero of it, so that its unique zero speaks for the whole box; deflation minors and
        # slices through the point are not met by every zero of the claim.
        pure = not pinned and all(k < len(required) for k in rows)
        if accounting.excluded:
            k = rest_index[accounting.excluded[0]]
            refuting = _refute(required, point, reach, max(digits, 20))
            if pure or refuting is not None:
                certificate.status = Status.REFUTED
                certificate.reason = (f"the box holds exactly one zero of the square subsystem, and equation "
                                      f"{k + 1} of the claim does not vanish anywhere on it: the box holds no zero "
                                      "of the claim" if pure else
                                      f"equation {refuting + 1} of the claim does not vanish anywhere within "
                                      f"{reach:.3g} of the given point")
                if pure and refuting is not None:
                    certificate.reason += f"; nor does any point within {reach:.3g} of the given point"
                if not pure:  # the box written is the one around the given point
                    certificate.center_text = [_text(v, 17) for v in point]
                    certificate.center = np.asarray(point, dtype=complex)
                    certificate.radii, certificate.radius = [reach] * n, reach
                    certificate.method = "interval exclusion"
                return certificate, None
            certificate.status = Status.UNDECIDED
            certificate.reason = (f"equation {k + 1} of the claim does not vanish at the zero of the square "
                                  "subsystem (which has deflation minors or slices through the point, so other "
                                  "zeros of the claim may lie in the box)")
            return certificate, 2 * digits
        wanted = None
        if accounting.backward is not None and not accounting.backward <= threshold:
            k = rest_index[accounting.worst]
            certificate.status = Status.UNDECIDED
            if accounting.backward == mp.inf:
                certificate.reason = (f"equation {k + 1} of the claim: its terms can all vanish in the box, so its "
                                      f"bound {float(accounting.uppers[accounting.worst]):.2g} over the box cannot "
                                      "be compared with their size")
            else:
                certificate.reason = (f"equation {k + 1} of the claim is bounded by "
                                      f"{float(accounting.uppers[accounting.worst]):.2g} over the box, "
                                      f"{float(accounting.backward):.2g} of the size of its terms: not below "
                                      f"10^-{digits - options.guard_digits} (a near miss, or too few digits)")
            wanted = 2 * digits
        exact_allowed = exact_check and options.exact and all(p.is_exact for p in required + list(chosen))
        if exact_allowed:
            outcome = _exact_route(square, required, list(chosen), box.center, box.radii, options, digits)
            if outcome.outcome == "refuted" and not pure:
                outcome = _ExactOutcome("none", note="the exact zero of the deflated square subsystem is not a zero "
                                                     "of the claim (other zeros of the claim may lie in the box)")
            _apply_exact(certificate, outcome)
            if outcome.outcome != "none":
                return certificate, None
        if exact_allowed and rest and _is_rational(required + list(chosen)):
            proved, needed, note = _separation(list(chosen), rest, accounting)
            certificate.notes.append(note)
            if proved:
                certificate.status, certificate.kind = Status.CERTIFIED, Kind.EXACT
                certificate.exact_method, certificate.reason = "root separation", ""
                certificate.backward_error = 0.0  # an exact zero of every equation
                return certificate, None
            if certificate.status == Status.UNDECIDED and needed is not None:
                wanted = max(wanted or 0, needed)
            elif certificate.certified and needed is not None:
                wanted = needed  # a caller that wants exactness may raise the precision
        if certificate.status == Status.UNDECIDED and allow_restriction:
            zero = [j for j in range(n) if _holds_zero(interval_box[j])]
            if zero:
                restricted = _restricted(required, point, zero, options, claim, digits, exact_check, pinned)
                if restricted is not None:
                    return restricted, None
        return certificate, wanted


def _restricted(required, point, zero, options, claim, digits, exact_check, pinned=()):
    """Certify inside the subspace where the coordinates ``zero`` vanish exactly; the certificate lifted
    back (those coordinates exactly 0), or None. Slices through the point are restricted too."""
    n = len(point)
    reach = options.match_radius * (1 + float(np.max(np.abs(point), initial=0.0)))
    if any(abs(point[j]) > reach for j in zero):
        return None
    restricted = [_restrict(p, zero) for p in required]
    if any(_is_constant(p) and not p.is_zero() for p in restricted):
        return None  # the zero (if any) is not in that subspace
    live = [k for k, p in enumerate(restricted) if not p.is_zero()]
    keep = [j for j in range(n) if j not in zero]
    threshold = 10.0 ** (-(digits - options.guard_digits))
    if not live:
        with working_digits(_guarded(digits)):
            center = [mpmath.mp.mpc(0) if j in zero else mpmath.mp.mpc(point[j]) for j in range(n)]
        certificate = Certificate(
            Status.CERTIFIED, Kind.EXACT, claim, np.array([complex(c) for c in center]),
            ["0" if j in zero else _text(center[j], 17) for j in range(n)], 0.0, digits,
            method="exact substitution", threshold=threshold, radii=[0.0] * n, zero_coordinates=list(zero),
            backward_error=0.0, residual_bound=0.0,
            exact_method="identically zero", distance=float(np.max(np.abs(point - np.array(
                [complex(c) for c in center])), initial=0.0)),
            exact_coordinates=None if keep else ["0"] * n)
        certificate.notes.append("every equation of the claim vanishes identically where coordinates "
                                 f"{', '.join(str(j + 1) for j in zero)} are 0"
                                 + ("" if not keep else ": the point lies on a set of such zeros (not isolated)"))
        return certificate
    sub_point = point[keep]
    slices = tuple(_restrict(s, zero) for s in pinned)
    if len(slices) >= len(keep) or any(_is_constant(s) for s in slices):
        return None
    sub, _ = _certify_zero_at([restricted[k] for k in live], sub_point, options, claim, digits, slices,
                              exact_check, None, allow_restriction=False)
    if sub.status != Status.CERTIFIED:
        return None
    lifted = _insert_zeros(sub, zero, n, live)
    lifted.distance = max(lifted.distance or 0.0, float(max(abs(point[j]) for j in zero)))
    return lifted


def _insert_zeros(certificate, zero, n, numbering=None):
    """Put coordinates that are exactly 0 back into a certificate made in the subspace where they vanish."""
    keep = [j for j in range(n) if j not in zero]
    center = np.zeros(n, dtype=complex)
    center[keep] = certificate.center
    texts = ["0"] * n
    for position, j in enumerate(keep):
        texts[j] = certificate.center_text[position] if position < len(certificate.center_text) else ""
    certificate.center, certificate.center_text = center, texts
    if certificate.radii is not None:
        radii = [0.0] * n
        for position, j in enumerate(keep):
            radii[j] = certificate.radii[position]
        certificate.radii = radii
        certificate.radius = max(radii, default=0.0)
    if certificate.exact_coordinates is not None:
        coordinates = ["0"] * n
        for position, j in enumerate(keep):
            coordinates[j] = certificate.exact_coordinates[position]
        certificate.exact_coordinates = coordinates
    if numbering is not None:
        certificate.square_equations = [numbering[k] for k in certificate.square_equations]
    certificate.zero_coordinates = sorted(set(certificate.zero_coordinates) | set(zero))
    certificate.notes.append(f"certified where coordinates {', '.join(str(j + 1) for j in sorted(zero))} are "
                             "exactly 0: the equations restricted there have the certified zero")
    return certificate


# --- exact recognition ----------------------------------------------------------------------------------

def _field_basis(polynomials, complex_values):
    """Q-basis of the field of the coefficients (square roots, and i when needed)."""
    radicands = {1}
    imaginary = complex_values
    for p in polynomials:
        for c in p.coefficients:
            for r, (_, im) in c.parts.items():
                radicands.add(r)
                imaginary = imaginary or im != 0
    closed = set(radicands)
    while True:
        grown = {square_free_split(a * b)[1] for a in closed for b in closed} | closed
        if grown == closed or len(grown) > 16:
            break
        closed = grown
    basis = [ExactCoefficient.square_root(r) for r in sorted(closed)]
    if imaginary:
        basis += [b * ExactCoefficient.imaginary_unit() for b in basis]
    return basis


def _integer_relation(values, digits):
    """An integer relation among complex mp numbers (found by PSLQ on a real projection), or None."""
    mp = mpmath.mp
    weight = mp.sqrt(2) / mp.pi  # real and imaginary parts folded into one real vector
    folded = [v.real + weight * v.imag for v in values]
    scale = max(abs(v) for v in folded)
    if scale == 0:
        return None
    tiny = mp.mpf(10) ** (-(digits * 2 // 3)) * scale
    for k, v in enumerate(values):
        if abs(v) <= tiny:  # PSLQ needs non-zero entries; a vanishing entry is a relation by itself
            return [1 if j == k else 0 for j in range(len(values))]
    try:
        # a relation among k numbers with coefficients up to H exists by chance at a residual near H^-(k-1):
        # H^k is kept well below the tolerance's 10^(2 digits / 3), so what PSLQ finds is not chance
        relation = mpmath.pslq([v / scale for v in folded], tol=mp.mpf(10) ** (-(digits * 2 // 3)),
                               maxcoeff=10 ** max(2, (digits * 11) // (20 * len(values))), maxsteps=20000)
    except (ValueError, ZeroDivisionError):
        return None
    if relation is None:
        return None
    check = abs(mp.fsum(a * v for a, v in zip(relation, values)))
    if check > mp.mpf(10) ** (-(digits * 2 // 3)) * max(abs(v) for v in values) * sum(abs(a) for a in relation):
        return None
    return relation


def _combine(relation, basis):
    total = ExactCoefficient.zero()
    for a, b in zip(relation, basis):
        if a:
            total = total + b * int(a)
    return total


class _Quotient:
    """Arithmetic in K[t]/(p) for monic p over the coefficient field K."""

    def __init__(self, monic):
        self.p = monic  # coefficients c_0..c_{D-1} of t^D + ... (list of ExactCoefficient), low first
        self.degree = len(monic)

    def multiply(self, a, b):
        product = [ExactCoefficient.zero()] * (len(a) + len(b) - 1)
        for i, x in enumerate(a):
            if x.is_zero():
                continue
            for j, y in enumerate(b):
                if not y.is_zero():
                    product[i + j] = product[i + j] + x * y
        return self.reduce(product)

    def reduce(self, values):
        values = list(values)
        d = self.degree
        for k in range(len(values) - 1, d - 1, -1):
            top = values[k]
            if top.is_zero():
                continue
            for i in range(d):  # t^d = -sum p_i t^i
                values[k - d + i] = values[k - d + i] - top * self.p[i]
            values[k] = ExactCoefficient.zero()
        values = values[:d] + [ExactCoefficient.zero()] * max(0, d - len(values))
        return values


@dataclass
class _ExactOutcome:
    outcome: str                 # "zero", "refuted" or "none"
    coordinates: object = None
    minimal_polynomial: object = None
    note: str = ""
    failing: object = None       # index (into the claim's equations) of an equation that is not 0


def _exact_route(square, required, chosen, center, radii, options, digits):
    """Recognise the zero exactly: ``_ExactOutcome`` (a common exact zero, a proof of none, or nothing found)."""
    mp = mpmath.mp
    n = len(center)
    complex_values = any(abs(c.imag) > r for c, r in zip(center, radii))
    basis = _field_basis(required + chosen, complex_values)
    top = options.exact_max_degree
    precision = max(digits, 30 + 8 * (top + 1) * len(basis))
    weights = [1, 3, 7, 11, 17, 23, 31, 41]
    with working_digits(precision + 10):
        refined, converged = square.newton(center, precision)
        if not converged:
            return _ExactOutcome("none", note="exact recognition skipped: high-precision refinement failed")
        # each coordinate in units of its power of ten (exact): a change of units (x -> 1000 x) would
        # otherwise multiply the minimal polynomial's coefficients beyond what PSLQ finds at this precision
        negligible = mp.mpf(10) ** (-(precision // 2)) * max([abs(refined[j]) for j in range(n)] + [mp.mpf(1)])
        powers_of_ten = [int(mp.nint(mp.log10(abs(refined[j])))) if abs(refined[j]) > negligible else 0
                         for j in range(n)]
        x = [refined[j] / mp.mpf(10) ** e for j, e in zip(range(n), powers_of_ten)]
        t = mp.fsum(w * v for w, v in zip(itertools.cycle(weights), x)) if n else mp.mpc(0)
        basis_values = [b.to_context(mp) for b in basis]
        for degree in range(1, top + 1):
            powers = [t ** k for k in range(degree + 1)]
            relation = _integer_relation([b * pk for pk in powers for b in basis_values], precision)
            if relation is None:
                continue
            coefficients = [_combine(relation[k * len(basis):(k + 1) * len(basis)], basis) for k in range(degree + 1)]
            if coefficients[-1].is_zero():
                continue
            lead = coefficients[-1].reciprocal()
            monic = [c * lead for c in coefficients[:-1]]
            expressions = []
            for v in x:
                rel = _integer_relation([v] + [b * pk for pk in powers[:degree] for b in basis_values], precision)
                if rel is None or rel[0] == 0:
                    expressions = None
                    break
                parts = [_combine(rel[1 + k * len(basis):1 + (k + 1) * len(basis)], basis) for k in range(degree)]
                e = powers_of_ten[len(expressions)]
                scale = ExactCoefficient.rational(Fraction(-1, int(rel[0])) * Fraction(10) ** e)
                expressions.append([c * scale for c in parts])
            if expressions is None:
                continue
            verdict = _verify_exact(required, chosen, monic, expressions, t, center, radii)
            if verdict is None:
                continue  # a relation found by chance: its root is not in the box
            required_zero, square_zero = verdict
            texts = [_expression_text(e) for e in expressions]
            minimal = None if degree == 1 else _poly_text(monic)
            radical = _quadratic_root(monic, t) if degree == 2 else None
            if radical is not None:  # t = (-b +- sqrt(b^2 - 4c))/2 written out
                texts = [(e[0] + e[1] * radical).to_text() for e in expressions]
                minimal = None
            form = " + ".join(f"{w}*x{j + 1}" + (f"/10^{e}" if e else "")
                              for j, w, e in zip(range(n), itertools.cycle(weights), powers_of_ten))
            if all(required_zero):
                return _ExactOutcome("zero", texts, minimal,
                                     "exact: every equation vanishes identically modulo the minimal polynomial of "
                                     f"t = {form}, and its root lies in the box (PSLQ at {precision} digits)")
            if square_zero:
                return _ExactOutcome("refuted", texts, minimal,
                                     f"the only zero of the square subsystem in the box is exact (t = {form}, PSLQ "
                                     f"at {precision} digits), and an equation of the claim is not 0 there",
                                     required_zero.index(False))
    return _ExactOutcome("none", note=f"no exact form found (primitive element of degree up to {top} over the "
                                      "coefficient field)")


def _apply_exact(certificate, outcome):
    if outcome.outcome == "none":
        certificate.notes.append(outcome.note)
        return
    certificate.kind = Kind.EXACT
    certificate.exact_method = "recognised"
    certificate.exact_coordinates = outcome.coordinates
    certificate.minimal_polynomial = outcome.minimal_polynomial
    certificate.notes.append(outcome.note)
    if outcome.outcome == "zero":
        certificate.status, certificate.reason = Status.CERTIFIED, ""
        certificate.backward_error = 0.0  # an exact zero of every equation
    else:
        certificate.status = Status.REFUTED
        certificate.reason = (f"the box holds exactly one zero of the square subsystem, the exact point "
                              f"({', '.join(outcome.coordinates)}), and equation {outcome.failing + 1} of the "
                              "claim is not 0 there: the box holds no zero of the claim")


def _quadratic_root(monic, t_value):
    """The root of t^2 + b t + c nearest ``t_value``, with a square root, when b^2 - 4c is rational."""
    c, b = monic
    disc = b * b - c * 4
    if not disc.is_rational():
        return None
    disc = disc.as_fraction()
    try:
        root = ExactCoefficient.square_root(abs(disc))
    except LimitError:  # a radicand too large to split: keep the polynomial in t
        return None
    if disc < 0:
        root = root * ExactCoefficient.imaginary_unit()
    candidates = [(root * sign - b) * ExactCoefficient.rational(Fraction(1, 2)) for sign in (1, -1)]
    return min(candidates, key=lambda v: abs(complex(v) - complex(t_value)))


def _verify_exact(required, chosen, monic, expressions, t_value, center, radii):
    """Whether p's root near t maps into the box (None if not), then which equations vanish exactly there.

    Returns (list of bool per equation of the claim, whether every square-subsystem equation vanishes).
    """
    mp, iv = mpmath.mp, mpmath.iv
    quotient = _Quotient(monic)
    d = quotient.degree
    n = len(expressions)
    coefficients = [c.to_context(iv) for c in monic] + [iv.mpc(1)]
    if d == 1:
        root_box = -coefficients[0]
    else:
        rho = mp.mpf(10) ** (-(mp.dps // 2)) * (1 + abs(t_value))
        spread = iv.mpf([-rho, rho])
        box = iv.mpc(iv.mpf(t_value.real) + spread, iv.mpf(t_value.imag) + spread)
        point = _iv_point(t_value)

        def value(z, k=0):
            total = iv.mpc(0)
            for i in range(len(coefficients) - 1, k - 1, -1):
                factor = math.perm(i, k)
                total = total * z + coefficients[i] * factor
            return total

        highest_first = [c.to_context(mp) for c in reversed(monic + [ExactCoefficient.rational(1)])]
        derivative_mp = mp.polyval(highest_first, t_value, derivative=True)[1]
        if derivative_mp == 0:
            return None
        y = _iv_point(1 / derivative_mp)
        image = point - y * value(point) + (1 - y * value(box, 1)) * (box - point)
        lo_re, hi_re, lo_im, hi_im = _bounds(image)
        if not (lo_re > t_value.real - rho and hi_re < t_value.real + rho
                and lo_im > t_value.imag - rho and hi_im < t_value.imag + rho):
            return None
        root_box = image
    for j in range(n):
        enclosure = iv.mpc(0)
        for coefficient in reversed(expressions[j]):
            enclosure = enclosure * root_box + coefficient.to_context(iv)
        lo_re, hi_re, lo_im, hi_im = _bounds(enclosure)
        c, r = center[j], radii[j]
        if not (lo_re >= c.real - r and hi_re <= c.real + r and lo_im >= c.imag - r and hi_im <= c.imag + r):
            return None
    cache = {}

    def power(j, e):
        if (j, e) not in cache:
            if e == 0:
                cache[(j, e)] = quotient.reduce([ExactCoefficient.rational(1)])
            else:
                cache[(j, e)] = quotient.multiply(power(j, e - 1), expressions[j])
        return cache[(j, e)]

    reduced = {}

    def vanishes(polynomial):
        if id(polynomial) not in reduced:
            total = [ExactCoefficient.zero()] * d
            for row, c in zip(polynomial.exponents, polynomial.coefficients):
                term = quotient.reduce([c])
                for j in range(n):
                    if row[j]:
                        term = quotient.multiply(term, power(j, int(row[j])))
                total = [a + b for a, b in zip(total, term)]
            reduced[id(polynomial)] = all(v.is_zero() for v in total)
        return reduced[id(polynomial)]

    square_zero = all(vanishes(p) for p in chosen)
    return [vanishes(p) for p in required], square_zero


def _poly_text(monic):
    terms = ["t^%d" % len(monic)]
    for k in range(len(monic) - 1, -1, -1):
        c = monic[k]
        if c.is_zero():
            continue
        power = "" if k == 0 else ("*t" if k == 1 else f"*t^{k}")
        terms.append(f"({c.to_text()}){power}")
    return " + ".join(terms)


def _expression_text(values):
    terms = []
    for k, c in enumerate(values):
        if c.is_zero():
            continue
        if k == 0:
            terms.append(c.to_text())
        else:
            terms.append(f"({c.to_text()})*t" + ("" if k == 1 else f"^{k}"))
    return " + ".join(terms) if terms else "0"


# --- root separation ----------------------------------------------------------------------------------

def _integer_form(polynomial):
    """(L, largest |integer coefficient|) of L * polynomial with L the lcm of its denominators."""
    fractions = [c.as_fraction() for c in polynomial.coefficients]
    lcm = 1
    for q in fractions:
        lcm = lcm * q.denominator // math.gcd(lcm, q.denominator)
    return lcm, max((abs(q * lcm) for q in fractions), default=0)


def separation_exponent(square, other):
    """log10 of Canny's gap bound for the value of ``other`` at an isolated zero of ``square``.

    For a square system G of n rational polynomials in n unknowns with an isolated zero z and a rational
    polynomial g, (z, L g(z)) is an isolated zero of the integer system (L_i G_i, y - L g(x)) in n + 1
    unknowns (L, L_i clearing denominators). By Canny's gap theorem (J. Canny, "Generalized characteristic
    polynomials", J. Symbolic Comput. 1990 -- from memory) a coordinate of an isolated zero of N integer
    polynomials of degree at most d with coefficients of magnitude below c is 0 or larger than
    (3 d c)^-(N d^N). Returns (log10 of the bound on |g(z)|, so g(z) = 0 when |g(z)| is below 10^that).

    Examples
    --------
    >>> from numag.parse import parse_system
    >>> s = parse_system(["x^2 - 2", "y - x"], ["x", "y"]).polynomials
    >>> round(separation_exponent(s, parse_system(["x*y - 2"], ["x", "y"]).polynomials[0]), 1)
    -30.1
    """
    n = len(square)
    forms = [_integer_form(p) for p in square]
    lcm, largest = _integer_form(other)
    d = max([p.degree for p in square] + [other.degree, 1])
    c = max([f[1] for f in forms] + [largest, 1]) + 1
    variables = n + 1
    return -float(variables * d ** variables * math.log10(3 * d * c)) - math.log10(lcm)


def _separation(chosen, rest, accounting):
    """Root separation for every equation outside the square subsystem: (proved, digits needed, note)."""
    exponents = [separation_exponent(chosen, g) for g in rest]
    mp = mpmath.mp
    proved = all(upper == 0 or mp.log10(upper) < e for upper, e in zip(accounting.uppers, exponents))
    worst = min(exponents)
    if proved:
        return True, None, (f"exact: the box holds a regular zero of the rational square subsystem and every other "
                            f"equation stays below its root-separation bound (the smallest 10^{worst:.0f}) over the "
                            "box, so each vanishes there exactly (Canny's gap theorem)")
    # the bounds over a box of radius 10^-(D - 3) shrink like it: D a little past the bound's exponent
    needed = int(math.ceil(-worst)) + 12 if math.isfinite(worst) else None
    return False, needed, (f"root separation would need every other equation below 10^{worst:.0f} over the box "
                           f"(about {needed} digits)")


# --- multiplicity ----------------------------------------------------------------------------------

def _taylor(polynomial, center, scales):
    """Taylor coefficients of the polynomial at ``center`` in u (x = center + scales * u), as {exponent: mpc}."""
    mp = mpmath.mp
    result = {}
    for row, c in zip(polynomial.exponents, polynomial.coefficients):
        value = c.to_context(mp) if isinstance(c, ExactCoefficient) else mp.mpc(complex(c))
        factors = []
        for j, a in enumerate(row):
            a = int(a)
            factors.append([(g, math.comb(a, g) * center[j] ** (a - g) * scales[j] ** g) for g in range(a + 1)])
        for combination in itertools.product(*factors):
            key = tuple(g for g, _ in combination)
            term = value
            for _, factor in combination:
                term *= factor
            result[key] = result.get(key, mp.mpc(0)) + term
    return result


def _dual_multiplicity(polynomials, center, max_order=12, max_columns=4000):
    """Multiplicity of an isolated zero: dimension of the local dual space (Macaulay matrices).

    Dayton and Zeng, "Computing the multiplicity structure in solving polynomial systems", ISSAC 2005:
    the functionals sum c_a d^a/a! at the zero that vanish on every (x - z)^b f_i with |b| < k form the
    dual space of order k; its dimension stops growing exactly at the multiplicity. Ranks in double
    precision of the matrices built from Taylor coefficients at the working precision; numerical.
    """
    n = len(center)
    if n == 0:
        return 1
    scales = _coordinate_scales(center, 16)
    taylors = []
    for p in polynomials:
        coefficients = _taylor(p, center, scales)
        largest = max((abs(v) for v in coefficients.values()), default=0)
        if largest == 0:
            continue
        taylors.append({k: complex(v / largest) for k, v in coefficients.items()})
    previous = None
    for order in range(1, max_order + 1):
        columns = [e for total in range(order + 1) for e in _exponents_of_degree(n, total)]
        if len(columns) > max_columns:
            return None
        index = {e: k for k, e in enumerate(columns)}
        rows = []
        for taylor in taylors:
            for total in range(order):
                for shift in _exponents_of_degree(n, total):
                    row = np.zeros(len(columns), dtype=complex)
                    for e, v in taylor.items():
                        target = tuple(a + b for a, b in zip(e, shift))
                        if sum(target) <= order:
                            row[index[target]] = v
                    rows.append(row)
        matrix = np.array(rows) if rows else np.zeros((0, len(columns)))
        values = np.linalg.svd(matrix, compute_uv=False) if len(rows) else np.zeros(0)
        rank = int(np.sum(values > 1e-8 * (values[0] if len(values) else 1.0)))
        nullity = len(columns) - rank
        if previous is not None and nullity == previous:
            return nullity
        previous = nullity
    return None


def _exponents_of_degree(n, total):
    if n == 1:
        return [(total,)]
    return [(first,) + rest for first in range(total, -1, -1) for rest in _exponents_of_degree(n - 1, total - first)]


# --- rank of J over a box, and the local codimension ---------------------------------------------------

def _rank_lower_bound(polynomials, center, radii, r):
    """Interval lower bound on sigma_r(J) over the box (None when the Neumann bound fails)."""
    if r == 0:
        return mpmath.mp.inf
    mp, iv = mpmath.mp, mpmath.iv
    evaluator = PrecisionEvaluator(polynomials)
    _, jac_center = evaluator.evaluate(center, mp)
    point = np.array([complex(c) for c in center])
    _, scaled, _ = _equilibrated(polynomials, point)
    if not np.all(np.isfinite(scaled)):
        return None
    _, _, row_pivots = scipy.linalg.qr(scaled.T, pivoting=True)
    rows = sorted(int(k) for k in row_pivots[:r])
    _, _, col_pivots = scipy.linalg.qr(scaled[rows], pivoting=True)
    cols = sorted(int(k) for k in col_pivots[:r])
    sub = mp.matrix(r, r)
    for a, i in enumerate(rows):
        for b, j in enumerate(cols):
            sub[a, b] = jac_center[i, j]
    try:
        y = _to_iv_matrix(mp.inverse(sub))
    except _SINGULAR:
        return None
    _, jac_box = evaluator.evaluate(_iv_box(center, radii), iv)
    sub_box = iv.matrix(r, r)
    for a, i in enumerate(rows):
        for b, j in enumerate(cols):
            sub_box[a, b] = jac_box[i, j]
    defect = _frobenius_upper(iv.eye(r) - y * sub_box)
    if not defect < 1:
        return None
    # sigma_min(M) >= (1 - |I - Y M|) / |Y| for every M in the box; sigma_r(J) >= sigma_min(M)
    return (1 - defect) / _frobenius_upper(y) * (1 - 8 * mp.eps)


def _numerical_ranks(polynomials, point):
    """Numerical ranks of J in two units: columns by each coordinate's size (blind where a coordinate is
    near 0 but its natural unit is not: sin of a small angle) and columns by 1 (blind to badly scaled
    variables). (smaller, larger): a rank seen in either is there; a drop must show in one of them."""
    point = np.asarray(point, dtype=complex)
    _, scaled, _ = _equilibrated(polynomials, point)
    absolute = _absolute_jacobian(polynomials, point)
    if not (np.all(np.isfinite(scaled)) and np.all(np.isfinite(absolute))):
        return 0, 0
    ranks = [int(np.sum(np.linalg.svd(a, compute_uv=False) > _DEFLATION_THRESHOLD)) for a in (scaled, absolute)]
    return min(ranks), max(ranks)


def _proved_rank(polynomials, certificate, start):
    """Largest r <= start with sigma_r(J) > 0 proved over the certificate's box: (r, bound)."""
    with working_digits(_guarded(certificate.digits)):
        center = [_parse_center(v) for v in certificate.center_text]
        radii = [mpmath.mp.mpf(r) for r in certificate.radii]
        for r in range(start, 0, -1):
            bound = _rank_lower_bound(polynomials, center, radii, r)
            if bound is not None and bound > 0:
                return r, bound
    return 0, None


def _sampled_codimension(polynomials, point, seed, samples=8):
    """The codimension of X near a point, numerically: points of X sampled nearby, least rank of J there.

    Random points at a relative distance 1e-3 are moved onto X; the rank of J at a generic point of a
    reduced component equals its codimension, and the least one among the samples is that of the
    largest component through the point. None when fewer than three samples reach X away from the point.
    """
    point = np.asarray(point, dtype=complex)
    n = len(point)
    rng = np.random.default_rng(seed)
    radius = 1e-3 * (1 + float(np.max(np.abs(point), initial=0.0)))
    directions = rng.standard_normal((samples, n)) + 1j * rng.standard_normal((samples, n))
    directions /= np.linalg.norm(directions, axis=1)[:, None]
    numeric = [p.numeric() if p.is_exact else p for p in polynomials]
    system = PolynomialSystem([f"x{j}" for j in range(n)], numeric)
    projected = project_to_variety(system, BatchEvaluator(numeric), point[None, :] + radius * directions)
    ranks = [_numerical_ranks(numeric, q)[1] for q, ok in zip(projected.points, projected.converged)
             if ok and np.linalg.norm(q - point) >= 0.1 * radius]
    if len(ranks) < 3:
        return None
    return min(ranks)


# --- charts, points at infinity ------------------------------------------------------------------------

def _chart(polynomials, point, charts=None):
    """Dehomogenise at the coordinate of largest modulus; returns (polynomials, affine point, index)."""
    point = np.asarray(point, dtype=complex)
    k = int(np.argmax(np.abs(point)))
    if abs(point[k]) == 0:
        raise InputError("the zero vector is not a projective point")
    affine = np.delete(point / point[k], k)
    if charts is None:
        return [p.dehomogenize(k) for p in polynomials], affine, k
    if k not in charts:
        charts[k] = [p.dehomogenize(k) for p in polynomials]
    return charts[k], affine, k


def _lift(certificate, k):
    """Put the chart coordinate (exactly 1) back into the certificate's centre and coordinates."""
    certificate.chart = k
    certificate.center = np.insert(np.asarray(certificate.center, dtype=complex), k, 1.0)
    certificate.center_text = list(certificate.center_text[:k]) + ["1"] + list(certificate.center_text[k:])
    if certificate.radii is not None:
        certificate.radii = list(certificate.radii[:k]) + [0.0] + list(certificate.radii[k:])
    certificate.zero_coordinates = [j + (j >= k) for j in certificate.zero_coordinates]
    if certificate.exact_coordinates is not None:
        certificate.exact_coordinates = (list(certificate.exact_coordinates[:k]) + ["1"]
                                         + list(certificate.exact_coordinates[k:]))
    return certificate


#: Per system: the singularity equations, their charts and square subsystems (dropped with the system).
_SYSTEM_CACHE = weakref.WeakKeyDictionary()


def _in_chart(polynomials, point, projective, run, charts=None):
    if not projective:
        return run(list(polynomials), np.asarray(point, dtype=complex))
    chart_polys, affine, k = _chart(polynomials, point, charts)
    return _lift(run(chart_polys, affine), k)


def _at_infinity(polynomials, point, run, charts=None, reach=1e-6):
    """Certify at a point (w : x) of the hyperplane at infinity: in the chart of x's largest coordinate,
    with w = 0 exactly (``polynomials`` are already restricted to w = 0, homogeneous in x)."""
    point = np.asarray(point, dtype=complex)
    given_w = point[0]
    certificate = _in_chart(polynomials, point[1:], True, run, charts)
    certificate = _insert_zeros(certificate, [0], len(point))
    certificate.chart = None if certificate.chart is None else certificate.chart + 1
    certificate.at_infinity = True
    scale = abs(point[1:][certificate.chart - 1]) if certificate.chart is not None else 1.0
    w = abs(given_w) / scale if scale else float("inf")
    certificate.distance = max(certificate.distance or 0.0, w)
    status = {Status.CERTIFIED: ClaimStatus.PROVED, Status.REFUTED: ClaimStatus.REFUTED}.get(
        certificate.status, ClaimStatus.UNVERIFIED)
    if w > reach:
        status = ClaimStatus.CONTRADICTED
        if certificate.certified:
            certificate.status = Status.UNDECIDED
            certificate.reason = (f"the given point has w = {w:.3g} in the chart, not 0: it is not the point at "
                                  "infinity certified here")
    found = {ClaimStatus.PROVED: True, ClaimStatus.REFUTED: False}.get(status)
    certificate.claim_checks.append(ClaimCheck("at infinity", True, found, status,
                                               "a zero of the top-degree forms (F^h with w = 0) in the chart"))
    return certificate


# --- public entry points ----------------------------------------------------------------------------

def _regular(certificate):
    """Whether the certificate proves a regular zero (Krawczyk or alpha on the claim's own equations)."""
    return (certificate.method in ("Krawczyk", "alpha") and certificate.deflations == 0
            and not certificate.zero_coordinates)


def _check_multiplicity(certificate, polynomials, reported):
    """Multiplicity of a certified zero: 1 when regular (proved), else the dual space (numerical)."""
    if not certificate.certified:
        return
    if _regular(certificate):
        certificate.multiplicity, certificate.multiplicity_method = 1, "regular zero (proved)"
    else:
        with working_digits(_guarded(certificate.digits)):
            center = [_parse_center(v) for v in certificate.center_text]
            found = _dual_multiplicity(polynomials, center)
        certificate.multiplicity = found
        certificate.multiplicity_method = "dual space (numerical)" if found is not None else "unknown"
    if reported is None:
        return
    found = certificate.multiplicity
    if found is None:
        status = ClaimStatus.UNVERIFIED
    elif found == reported:
        status = ClaimStatus.PROVED if found == 1 and certificate.deflations == 0 else ClaimStatus.NUMERICAL
    elif certificate.deflations == 0:
        status = ClaimStatus.REFUTED
    else:
        status = ClaimStatus.CONTRADICTED
    certificate.claim_checks.append(ClaimCheck("multiplicity", int(reported), found, status,
                                               certificate.multiplicity_method))


def certify_regular_zero(system, point, options=None, projective=None, at_infinity=False, multiplicity=None):
    """Certify a solution of ``system`` near ``point`` (square, or overdetermined: every equation accounted for).

    Parameters
    ----------
    system : PolynomialSystem
    point : array_like of complex
        Affine coordinates, or homogeneous ones for a projective system (certified in the chart
        of the largest coordinate); with ``at_infinity``, (w, x) for an affine system.
    options : CertifyOptions, optional
    projective : bool, optional
        Defaults to ``system.projective``.
    at_infinity : bool, default False
        The point is claimed to lie at infinity (w = 0): certified as a zero of F^h with w = 0
        exactly (the top-degree forms of F), in the chart of x's largest coordinate.
    multiplicity : int, optional
        A reported multiplicity, checked (``claim_checks``).

    Returns
    -------
    Certificate
        Claim "regular zero" (a singular zero is deflated first and then claimed as "zero"), with
        ``multiplicity``.

    Examples
    --------
    >>> from numag.parse import parse_system
    >>> c = certify_regular_zero(parse_system(["x^2 + 1"], ["x"]), [1j], CertifyOptions(digits=20))
    >>> c.status, c.kind, c.exact_coordinates
    ('certified', 'exact', ['I'])
    >>> c = certify_regular_zero(parse_system(["x^2"], ["x"]), [1e-9], CertifyOptions(digits=20))
    >>> c.status, c.claim, c.multiplicity
    ('certified', 'zero', 2)
    """
    options = (options or CertifyOptions()).validated()
    projective = system.projective if projective is None else projective

    def run(polynomials, affine):
        certificate = _certify_zero(polynomials, affine, options, Claim.REGULAR_ZERO)
        if certificate.certified and not _regular(certificate):
            certificate.claim = Claim.ZERO
        if not at_infinity:
            _check_multiplicity(certificate, polynomials, multiplicity)
        return certificate

    if at_infinity:
        if projective:
            raise InputError("points at infinity belong to affine systems (a projective system has none)")
        point = np.asarray(point, dtype=complex)
        if point.shape != (system.n_variables + 1,):
            raise InputError(f"a point at infinity has {system.n_variables + 1} homogeneous coordinates (w first)")
        top = [_top_form(p) for p in system.polynomials]
        return _at_infinity(top, point, run, reach=2 * options.match_radius)
    return _in_chart(system.polynomials, point, projective, run)


def _codimension_check(polynomials, certificate, codimension, claim_needs):
    """Hold a claimed codimension against what is proved (None when nothing proved settles it)."""
    m = len(polynomials)
    nonzero = any(not p.is_zero() for p in polynomials)
    if codimension == 0 and nonzero:
        return ClaimCheck("codimension", 0, None, ClaimStatus.REFUTED,
                          "F has a nonzero equation, so X has codimension at least 1 at every point")
    if codimension > m:
        return ClaimCheck("codimension", codimension, None, ClaimStatus.REFUTED,
                          f"Krull's principal ideal theorem: every component of V(F) has codimension at most {m}")
    if certificate.rank_lower is not None and certificate.rank_lower > codimension:
        return ClaimCheck("codimension", codimension, None, ClaimStatus.REFUTED,
                          f"rank J >= {certificate.rank_lower} is proved on the box, so X has codimension at least "
                          f"{certificate.rank_lower} there")
    if claim_needs == "at least" and codimension == 1 and nonzero:
        return ClaimCheck("codimension", 1, 1, ClaimStatus.PROVED,
                          "F has a nonzero equation: codimension at least 1")
    if claim_needs == "exactly" and codimension == m and certificate.rank_lower is not None \
            and certificate.rank_lower >= m:
        return ClaimCheck("codimension", codimension, m, ClaimStatus.PROVED,
                          f"rank J >= {m} on the box and Krull's theorem (at most {m})")
    return None


def _sampled_check(polynomials, affine_center, codimension, seed):
    found = _sampled_codimension(polynomials, affine_center, seed)
    if found is None:
        return ClaimCheck("codimension", codimension, None, ClaimStatus.UNVERIFIED,
                          "sampled points of X near the point did not settle it")
    status = ClaimStatus.NUMERICAL if found == codimension else ClaimStatus.CONTRADICTED
    return ClaimCheck("codimension", codimension, found, status,
                      "least rank of J at points of X sampled near the point (numerical)")


def _chart_center(certificate, chart):
    center = np.asarray(certificate.center, dtype=complex)
    return center if chart is None else np.delete(center, chart)


def certify_singular_point(system, point, codimension=None, options=None, projective=None, slices=0,
                           at_infinity=False):
    """Certify that X = V(F) is singular at a point near ``point``: a zero of F and the c x c minors of J.

    Parameters
    ----------
    system : PolynomialSystem
    point : array_like of complex
    codimension : int, optional
        The rank a smooth point would need (the codimension of X's components through the
        point); defaults to 1 for a hypersurface, else required. A claim: checked against F.
    options : CertifyOptions, optional
    projective : bool, optional
    slices : int, default 0
        For a witness point of a positive-dimensional singular component: that many random
        linear equations through the point are added (kind stays numerical).
    at_infinity : bool, default False
        For an affine system and a point (w, x) at infinity: a singular point of the projective
        closure V(F^h) with w = 0 exactly.

    Returns
    -------
    Certificate
        Claim "singular point" (or "point of the singular locus" with slices), with ``rank_upper``
        = c - 1 when the zero of the minors is exact, ``rank_lower`` the rank proved over the box,
        and the codimension's check in ``claim_checks`` (proved for c = 1; for c >= 2 against
        sampled points of X).

    Examples
    --------
    >>> from numag.parse import parse_system
    >>> c = certify_singular_point(parse_system(["y^2 - x^3"], ["x", "y"]), [1e-9, 0.0])
    >>> c.status, c.kind, c.rank_upper
    ('certified', 'exact', 0)
    """
    options = (options or CertifyOptions()).validated()
    projective = system.projective if projective is None else projective
    if codimension is None:
        if system.n_equations != 1:
            raise InputError("the codimension is needed for a system of several equations")
        codimension = 1
    codimension = int(codimension)
    claim = Claim.SINGULAR_POINT if not slices else Claim.SINGULAR_LOCUS_POINT
    ambient = system.n_variables - (1 if projective else 0)
    point = np.asarray(point, dtype=complex)
    if codimension < 1 or codimension > min(system.n_equations, ambient):
        reason = (f"the claimed codimension {codimension} is impossible here: a singular point needs rank J < c "
                  f"with 1 <= c <= {min(system.n_equations, ambient)} (c <= the number of equations by Krull's "
                  "theorem)")
        certificate = Certificate(Status.REFUTED, Kind.NUMERICAL, claim, point, [_text(v, 17) for v in point],
                                  None, options.digits, reason=reason)
        certificate.claim_checks.append(ClaimCheck("codimension", codimension, None, ClaimStatus.REFUTED, reason))
        return certificate
    target = system
    if at_infinity:
        if projective:
            raise InputError("points at infinity belong to affine systems (a projective system has none)")
        target = PolynomialSystem(["(w)"] + list(system.variables), [p.homogenize(0) for p in system.polynomials],
                                  projective=True)
    cache = _SYSTEM_CACHE.setdefault(system, {})
    key = (codimension, options.max_minors, options.seed, bool(at_infinity))
    if key not in cache:  # the minors, their charts and square subsystems serve every point of the system
        equations, complete = singularity_equations(target, codimension, options.max_minors, options.seed)
        if at_infinity:
            equations = [q for q in (_restrict(p, [0]) for p in equations) if not q.is_zero()]
        cache[key] = (equations, complete, {}, {})
    equations, complete, charts, squares = cache[key]
    polynomials = list(system.polynomials)

    def run(chart_polynomials, affine):
        pinned = []
        if slices:
            rng = np.random.default_rng(options.seed + 1)
            n = len(affine)
            for _ in range(slices):
                weights = rng.standard_normal(n) + 1j * rng.standard_normal(n)
                pinned.append(Polynomial.linear(weights, -complex(weights @ affine)))
        certificate = _certify_zero(chart_polynomials, affine, options, claim, pinned=pinned,
                                    exact_check=not slices, squares=None if slices else squares)
        if certificate.kind == Kind.EXACT and not complete:
            certificate.kind = Kind.NUMERICAL
            certificate.notes.append("the exact check covered random combinations of the minors, not every "
                                     "minor: kind stays numerical")
        return certificate

    if at_infinity:
        certificate = _at_infinity(equations, point, run, charts, reach=2 * options.match_radius)
    else:
        certificate = _in_chart(equations, point, projective, run, charts)
    if not certificate.certified:
        return certificate
    # the rank of J: proved below on the box, dropping below c at the exact point when the zero is exact
    jacobian_polys, chart = _rank_polynomials(system, certificate, projective, at_infinity)
    certificate.rank_lower, bound = _proved_rank(jacobian_polys, _chart_view(certificate, chart),
                                                 min(codimension - 1, _numerical_ranks(
                                                     jacobian_polys, _chart_center(certificate, chart))[1]))
    certificate.lower_singular_value = None if bound is None or bound == mpmath.mp.inf else _float_up(bound)
    if certificate.kind == Kind.EXACT:
        certificate.rank_upper = codimension - 1
    check = _codimension_check(polynomials, certificate, codimension, "at least")
    if check is None and at_infinity:
        check = ClaimCheck("codimension", codimension, None, ClaimStatus.UNVERIFIED,
                           "points at infinity: no points of the closure are sampled")
    elif check is None:
        check = _sampled_check(jacobian_polys, _chart_center(certificate, chart), codimension, options.seed)
    certificate.claim_checks.append(check)
    if check.status == ClaimStatus.REFUTED:
        certificate.status, certificate.reason = Status.REFUTED, f"the codimension claim fails: {check.how}"
    elif check.status == ClaimStatus.CONTRADICTED:
        certificate.status = Status.UNDECIDED
        certificate.reason = (f"rank J < {codimension} holds at the point, but X seems to have codimension "
                              f"{check.found} there ({check.how}): the singular claim rests on codimension "
                              f"{codimension}")
    elif codimension >= 2:
        certificate.notes.append(f"rank J <= {codimension - 1} is what is proved; X is singular there because its "
                                 f"codimension there is {codimension} ({check.status}: {check.how})")
    return certificate


def _rank_polynomials(system, certificate, projective, at_infinity):
    """F in the coordinates of the certificate's box (the chart for projective points), and the chart."""
    if at_infinity:
        homogenized = [p.homogenize(0) for p in system.polynomials]
        return [p.dehomogenize(certificate.chart) for p in homogenized], certificate.chart
    if projective:
        return [p.dehomogenize(certificate.chart) for p in system.polynomials], certificate.chart
    return list(system.polynomials), None


class _BoxView:
    """A box as ``_proved_rank`` reads it: centre texts, radii and the digits they were made at."""

    def __init__(self, center_text, radii, digits):
        self.center_text, self.radii, self.digits = list(center_text), list(radii), digits


def _chart_view(certificate, chart):
    """The certificate's box without its chart coordinate."""
    keep = [j for j in range(len(certificate.center_text)) if j != chart]
    return _BoxView([certificate.center_text[j] for j in keep], [certificate.radii[j] for j in keep],
                    certificate.digits)


def _box_around(point, digits):
    """A box of radius 10^-(digits - 3) times each coordinate's size around a point (no claim about it)."""
    with working_digits(_guarded(digits)):
        center = [mpmath.mp.mpc(v) for v in point]
        scales = _coordinate_scales(center, digits)
        radii = [_float_up(mpmath.mp.mpf(10) ** (-(digits - 3)) * s) for s in scales]
        return _BoxView([_text(c, digits) for c in center], radii, digits)


#: At most this many (r + 1)-minors are written out to prove that the rank drops to r.
_MAX_RANK_MINORS = 2000


def _with_rising_precision(attempt, options):
    """Run ``attempt(options)`` -> (certificate, more digits might help) from ``options.digits``, doubling up
    to ``options.limit`` while it is undecided for a reason precision can fix; ``digits_tried`` lists all."""
    digits, tried = options.digits, []
    while True:
        current = replace(options, digits=digits, max_digits=max(options.limit, digits))
        certificate, more = attempt(current)
        tried.extend(d for d in (certificate.digits_tried or [digits]) if d not in tried)
        if certificate.status != Status.UNDECIDED or not more or digits >= options.limit:
            break
        digits = min(options.limit, 2 * max(digits, certificate.digits))
    certificate.digits_tried = sorted(tried)
    if certificate.status == Status.UNDECIDED and more and options.limit > options.digits:
        certificate.reason += f" (still undecided at the limit of {options.limit} digits)"
    return certificate


def certify_smooth_point(system, point, codimension, options=None, projective=None):
    """Prove that X is smooth at a point near ``point``: one point of X in a box, rank J >= c over the box.

    Parameters
    ----------
    system : PolynomialSystem
    point : array_like of complex
    codimension : int
        The codimension of X at the point (n minus the local dimension): a claim, checked
        against F (0 is refuted for a nonzero F; more than the number of equations by Krull's
        theorem; less than a rank proved on the box).
    options : CertifyOptions, optional
    projective : bool, optional

    Returns
    -------
    Certificate
        Claim "smooth point", with ``rank_lower`` = c and ``lower_singular_value`` the interval
        lower bound on sigma_c(J) over the box. Kind "exact" when F has c equations (then the box
        provably holds a point of X where X is smooth); otherwise "numerical": the box holds a zero
        of c equations of F with the others accounted for, and that X has codimension c there is
        checked against sampled points of X.

    Examples
    --------
    >>> from numag.parse import parse_system
    >>> c = certify_smooth_point(parse_system(["x^2 + y^2 - 1"], ["x", "y"]), [0.6, 0.8], 1)
    >>> c.status, c.kind, c.lower_singular_value > 1, c.rank_lower
    ('certified', 'exact', True, 1)
    """
    options = (options or CertifyOptions()).validated()
    projective = system.projective if projective is None else projective
    c = int(codimension)
    ambient = system.n_variables - (1 if projective else 0)
    point = np.asarray(point, dtype=complex)
    polynomials = list(system.polynomials)
    m = len(polynomials)
    refusal = None
    if not 0 <= c <= ambient:
        refusal = f"a codimension is between 0 and the dimension {ambient}"
    elif c == 0 and any(not p.is_zero() for p in polynomials):
        refusal = "F has a nonzero equation, so X has codimension at least 1 at every point"
    elif c > m:
        refusal = f"Krull's principal ideal theorem: every component of V(F) has codimension at most {m}"
    if refusal is not None:
        certificate = Certificate(Status.REFUTED, Kind.NUMERICAL, Claim.SMOOTH_POINT, point,
                                  [_text(v, 17) for v in point], None, options.digits,
                                  reason=f"the claimed codimension {c} does not hold: {refusal}")
        certificate.claim_checks.append(ClaimCheck("codimension", c, None, ClaimStatus.REFUTED, refusal))
        return certificate

    def run(chart_polynomials, affine):
        n = len(affine)
        rng = np.random.default_rng(options.seed + 2)
        slices = []
        for _ in range(n - c):
            weights = rng.standard_normal(n) + 1j * rng.standard_normal(n)
            slices.append(Polynomial.linear(weights, -complex(weights @ affine)))
        # no deflation: a point where F and the slices meet singularly is no point to prove smooth, and a
        # deflated subsystem would put the box at a zero of a nearby system, beside X (a node's neighbour)
        certificate = _certify_zero(chart_polynomials, affine, replace(options, max_deflations=0),
                                    Claim.SMOOTH_POINT, pinned=slices, exact_check=False)
        if not certificate.certified or c == 0:
            return certificate
        certificate.rank_lower, bound = _proved_rank(chart_polynomials, certificate,
                                                     min(c + 1, len(chart_polynomials), n))
        certificate.lower_singular_value = None if bound is None else _float_up(bound)
        return certificate

    def attempt(current):
        nonlocal options
        saved, options = options, current
        try:
            certificate = _in_chart(polynomials, point, projective, run)
        finally:
            options = saved
        if certificate.certified and c > 0 and (certificate.rank_lower is None or certificate.rank_lower < c):
            certificate.status = Status.UNDECIDED
            certificate.reason = (f"the box holds a point of X, but sigma_{c}(J) could not be bounded away from 0 "
                                  f"over it at {certificate.digits} digits")
            return certificate, True
        return certificate, False

    certificate = _with_rising_precision(attempt, options)
    if not certificate.certified:
        return certificate
    check = _codimension_check(polynomials, certificate, c, "exactly")
    if check is None:
        check = _sampled_check(_rank_polynomials(system, certificate, projective, False)[0],
                               _chart_center(certificate, certificate.chart), c, options.seed)
    certificate.claim_checks.append(check)
    if check.status == ClaimStatus.REFUTED:
        certificate.status = Status.REFUTED
        certificate.reason = f"the claimed codimension {c} does not hold: {check.how}"
        return certificate
    if check.status == ClaimStatus.CONTRADICTED:
        certificate.status = Status.UNDECIDED
        certificate.reason = (f"rank J >= {c} is proved on the box, but X seems to have codimension {check.found} "
                              f"there ({check.how})")
        return certificate
    certificate.rank_lower = min(certificate.rank_lower, c) if c else 0
    if check.status == ClaimStatus.PROVED and m == c and certificate.backward_error is None:
        certificate.kind = Kind.EXACT
        certificate.exact_method = "implicit function theorem"
        certificate.notes.append(f"proved: the box holds exactly one point of X on the slices, and rank J >= {c} = "
                                 "codimension over the whole box")
    else:
        certificate.notes.append(f"rank J >= {c} over the box is proved and the box holds a point of X (every "
                                 f"equation accounted for); that X is smooth there rests on its local dimension "
                                 f"{ambient - c} (codimension {c}), {check.status}: {check.how}")
    return certificate


def certify_rank(system, point, options=None, projective=None):
    """Prove the rank of J at a point of X near ``point``: rank >= r over a box, and = r at the exact point.

    Parameters
    ----------
    system : PolynomialSystem
    point : array_like of complex
    options : CertifyOptions, optional
        ``max_digits`` above ``digits`` lets the precision rise until the rank is proved.
    projective : bool, optional

    Returns
    -------
    Certificate
        Claim "rank": ``rank_lower`` (rank J >= it at every point of the box, proved by an interval
        bound ``lower_singular_value`` on that singular value) and ``rank_upper`` (rank J <= it at the
        exact point of X in the box, proved by an exact certificate of the zero of F and the minors of
        one size more; None when only numerical). Certified when the two meet (or the rank is full,
        with the point on X); otherwise undecided with what was proved.

    Examples
    --------
    >>> from numag.parse import parse_system
    >>> node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    >>> c = certify_rank(node, [1e-12, 0.0])
    >>> c.status, c.rank_lower, c.rank_upper, c.kind
    ('certified', 0, 0, 'exact')
    >>> c = certify_rank(node, [3.0, 6.0])
    >>> c.status, c.rank_lower, c.rank_upper
    ('certified', 1, 1)
    """
    options = (options or CertifyOptions()).validated()
    projective = system.projective if projective is None else projective
    polynomials = list(system.polynomials)
    point = np.asarray(point, dtype=complex)

    def run(chart_polynomials, affine, current):
        n = len(affine)
        located = _gauss_newton_double(chart_polynomials, affine)
        full = min(len(chart_polynomials), n)
        low, high = (min(r, full) for r in _numerical_ranks(chart_polynomials, located))
        # the point a rank certificate speaks about is the most special one near the given point: a drop
        # of the rank is tried first, from the lowest rank the numbers allow
        certificate = None
        for r in range(low, high + 1):
            certificate = _rank_at(chart_polynomials, affine, r, full, current)
            if certificate.certified or r == high:
                break
        return certificate

    def attempt(current):
        certificate = _in_chart(polynomials, point, projective, lambda f, a: run(f, a, current))
        return certificate, certificate.status == Status.UNDECIDED and certificate.rank_lower is not None

    return _with_rising_precision(attempt, options)


def _rank_at(chart_polynomials, affine, r, full, options):
    """The rank certificate for rank r (see :func:`certify_rank`)."""
    n = len(affine)
    notes = []
    if r < full and math.comb(len(chart_polynomials), r + 1) * math.comb(n, r + 1) <= _MAX_RANK_MINORS:
        minors, _ = _minor_equations(chart_polynomials, r + 1, n, _MAX_RANK_MINORS, np.random.default_rng(0))
        certificate = _certify_zero(chart_polynomials + minors, affine, options, Claim.RANK, want_exact=True)
    else:
        if r < full:
            notes.append(f"the ({r + 1})-minors are too many to write out: the drop of the rank is not proved")
        rng = np.random.default_rng(options.seed + 3)
        slices = []
        for _ in range(n - r):
            weights = rng.standard_normal(n) + 1j * rng.standard_normal(n)
            slices.append(Polynomial.linear(weights, -complex(weights @ affine)))
        certificate = _certify_zero(chart_polynomials, affine, replace(options, max_deflations=0), Claim.RANK,
                                    pinned=slices, exact_check=False)
    certificate.claim = Claim.RANK
    certificate.notes.extend(notes)
    if certificate.status == Status.REFUTED:
        certificate.reason = f"no point of X with rank J <= {r} near the point: {certificate.reason}"
        return certificate
    on_x = certificate.certified
    box = certificate if on_x else _box_around(affine, certificate.digits)
    certificate.rank_lower, bound = _proved_rank(chart_polynomials, box, r)
    certificate.lower_singular_value = None if bound is None or bound == mpmath.mp.inf else _float_up(bound)
    if not on_x:
        certificate.status = Status.UNDECIDED
        certificate.center_text, certificate.radii = box.center_text, box.radii
        certificate.radius = max(box.radii, default=0.0)
        certificate.reason = (f"rank J >= {certificate.rank_lower} is proved on a box around the given point; "
                              f"no point of X with rank J <= {r} could be certified there: {certificate.reason}")
        return certificate
    if r == full:
        certificate.rank_upper = r  # no larger rank exists
    elif certificate.kind == Kind.EXACT:
        certificate.rank_upper = r
    if certificate.rank_lower == r and certificate.rank_upper == r:
        if r < full or certificate.backward_error is None:
            certificate.kind = Kind.EXACT
        return certificate
    certificate.status = Status.UNDECIDED
    certificate.reason = (f"rank J >= {certificate.rank_lower} is proved on the box; rank {r} "
                          + ("could not be bounded below" if certificate.rank_lower < r else
                             "is not proved exact at the point (no exact certificate of the minors)")
                          + f" at {certificate.digits} digits")
    return certificate


def _parse_center(text):
    mp = mpmath.mp
    text = text.replace(" ", "")
    if text.endswith("*I"):
        body = text[:-2]
        cut = max(body.rfind("+", 1), body.rfind("-", 1))
        while cut > 0 and body[cut - 1] in "eE":
            cut = max(body.rfind("+", 1, cut), body.rfind("-", 1, cut))
        return mp.mpc(mp.mpf(body[:cut]), mp.mpf(body[cut:]))
    return mp.mpc(mp.mpf(text), 0)


def _radii(certificate):
    radii = certificate.radii if certificate.radii is not None else [certificate.radius] * len(certificate.center)
    return np.asarray(radii, dtype=float)


def _box_meets(a, b):
    """Whether the certified boxes of a and b (same chart) can share a point."""
    gap = np.maximum(np.abs(a.center.real - b.center.real), np.abs(a.center.imag - b.center.imag))
    # rounding the centres to double costs up to 1e-16 relative: pad before comparing
    slack = 1e-15 * np.maximum(np.abs(a.center), np.abs(b.center)) + 1e-300
    return bool(np.all(gap <= _radii(a) + _radii(b) + slack))


def _meets_across_charts(a, b):
    """Whether boxes in two charts of projective space can hold the same point (interval test).

    A common point, written x in a's chart (x in A, x_ka = 1), has x_kb != 0 and x / x_kb
    in B; so every x_j lies in A_j and in B_j * A_kb. An empty intersection for some j
    proves the boxes disjoint.
    """
    iv = mpmath.iv
    with working_digits(30):
        def box_of(c):
            pads = 1e-15 * np.abs(c.center) + 1e-300
            box = _iv_box([mpmath.mp.mpc(v) for v in c.center], [mpmath.mp.mpf(r) for r in _radii(c) + pads])
            box[c.chart] = iv.mpc(1)
            return box

        box_a, box_b = box_of(a), box_of(b)
        scale = box_a[b.chart]
        for j in range(len(box_a)):
            re_lo, re_hi, im_lo, im_hi = _bounds(box_b[j] * scale)
            a_lo, a_hi, ai_lo, ai_hi = _bounds(box_a[j])
            if re_hi < a_lo or re_lo > a_hi or im_hi < ai_lo or im_lo > ai_hi:
                return False
        return True


def overlapping_pairs(certificates):
    """Pairs (i, j) of certified boxes that may share a point; sets ``distinct`` on each certified one.

    Two certified boxes that do not meet hold different zeros, so a list without
    overlapping pairs proves that its certified points are pairwise distinct. Boxes in
    different charts of projective space are compared after mapping one into the other's
    chart in interval arithmetic.

    Examples
    --------
    >>> a = Certificate("certified", "numerical", "zero", np.array([0j]), ["0"], 1e-3, 20)
    >>> b = Certificate("certified", "numerical", "zero", np.array([1 + 0j]), ["1"], 1e-3, 20)
    >>> overlapping_pairs([a, b]), a.distinct
    ([], True)
    """
    boxes = [(k, c) for k, c in enumerate(certificates) if c is not None and c.certified]
    pairs = []
    for (i, a), (j, b) in itertools.combinations(boxes, 2):
        if len(a.center) != len(b.center):
            continue
        if a.chart == b.chart:
            meets = _box_meets(a, b)
        else:
            meets = _meets_across_charts(a, b) and _meets_across_charts(b, a)
        if meets:
            pairs.append((i, j))
    touched = {k for pair in pairs for k in pair}
    for k, c in boxes:
        c.distinct = k not in touched
    return pairs
