"""What a certificate says: statuses, kinds, claims, options, claim checks, the certificate record, and
how its numbers are written (centres as decimal text at the certificate's digits, radii rounded up).

Also the working precision: :func:`working_digits` sets mpmath's ``mp`` and ``iv`` contexts together,
and certificates asked at ``digits`` work with guard digits (``_guarded``).

Examples
--------
>>> Status.CERTIFIED == "certified", CertifyOptions(digits=40).digits
(True, 40)
"""

from contextlib import contextmanager
from dataclasses import dataclass, field

import numpy as np

from ..errors import is_integer, is_number, require_option
from ..kinds import TextEnum
from ..system.display import html_table, short_point

__all__ = ["CertifyOptions", "Certificate", "ClaimCheck", "Status", "Kind", "Claim", "ClaimStatus", "Recognition",
           "Enclosure", "CodimensionNeed",
           "ALPHA_ZERO_TEXT", "alpha_zero", "working_digits", "STATUSES"]


class Status(TextEnum):
    """The three answers of a certificate."""

    CERTIFIED = "certified"
    REFUTED = "refuted"
    UNDECIDED = "undecided"


class Kind(TextEnum):
    """What a certificate rests on: interval bounds (numerical) or an exact identity (exact)."""

    NUMERICAL = "numerical"
    EXACT = "exact"


class Claim(TextEnum):
    """What a certificate speaks about."""

    REGULAR_ZERO = "regular zero"
    ZERO = "zero"
    SINGULAR_POINT = "singular point"
    SINGULAR_LOCUS_POINT = "point of the singular locus"
    SMOOTH_POINT = "smooth point"
    RANK = "rank"


class ClaimStatus(TextEnum):
    """How a claim of a report fared against F."""

    PROVED = "proved"
    NUMERICAL = "numerical"          # agrees with a numerical recomputation, not proved
    UNVERIFIED = "not verified"
    CONTRADICTED = "contradicted"    # a numerical recomputation disagrees
    REFUTED = "refuted"              # proved false


class Recognition(TextEnum):
    """What exact recognition found about a point (internal: it decides a certificate's exact part)."""

    ZERO = "zero"          # an exact zero, proved by substitution
    REFUTED = "refuted"    # an exact form found, and an equation is not zero at it
    NONE = "none"          # no exact form (the note says why)


class Enclosure(TextEnum):
    """The Krawczyk test on a box: the image inside it (one zero), outside it (none), or neither."""

    INSIDE = "inside"
    OUTSIDE = "outside"
    UNKNOWN = "unknown"


class CodimensionNeed(TextEnum):
    """What a claim needs of a codimension: a singular point at least c (rank J < c says singular only if
    X has codimension at least c there), a smooth point exactly c."""

    AT_LEAST = "at least"
    EXACTLY = "exactly"


#: The three answers of a certificate, as text.
STATUSES = tuple(s.value for s in Status)


#: Smale's constant, the bound on alpha below which Newton's method provably converges.
ALPHA_ZERO_TEXT = "(13 - 3*sqrt(17))/4"


#: Relative size, in the units of the point's largest coordinate, below which a coordinate is
#: given a box of that size rather than of its own (10^-(digits // 2) times the largest coordinate).
_FLOOR_DIGITS_FRACTION = 2


@contextmanager
def working_digits(digits):
    """Set mpmath's ``mp`` and ``iv`` contexts to ``digits`` decimal digits; restore both afterwards.

    Examples
    --------
    >>> import mpmath
    >>> with working_digits(40):
    ...     mpmath.iv.dps
    40
    """
    import mpmath  # here, not at import: the command line reads these records without computing
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

    def __post_init__(self):
        """Refuse a bad value on construction, naming the option."""
        require_option(is_integer(self.digits) and 16 <= self.digits <= 10000, "digits",
                       "an integer from 16 to 10000", self.digits)
        require_option(self.max_digits is None or (is_integer(self.max_digits)
                                                   and self.digits <= self.max_digits <= 10000),
                       "max_digits", f"an integer from digits ({self.digits}) to 10000", self.max_digits)
        require_option(is_number(self.match_radius) and self.match_radius > 0, "match radius", "positive",
                       self.match_radius)
        require_option(is_integer(self.max_deflations) and self.max_deflations >= 0, "max_deflations", ">= 0",
                       self.max_deflations)
        require_option(is_integer(self.exact_max_degree) and self.exact_max_degree >= 1, "exact_max_degree", ">= 1",
                       self.exact_max_degree)
        require_option(is_integer(self.max_minors) and self.max_minors >= 1, "max_minors", ">= 1", self.max_minors)
        require_option(is_integer(self.guard_digits) and 1 <= self.guard_digits <= self.digits - 8, "guard_digits",
                       "from 1 to digits - 8", self.guard_digits)

    def validated(self):
        """The options (checked on construction); kept so that callers read the same as for the other options."""
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


@dataclass(kw_only=True)
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

    def __repr__(self):
        claim = f" {self.claim}" if self.claim else ""
        box = f", box radius {float(self.radius):.1e}" if self.radius is not None else ""
        why = f": {self.reason[:60]}" if self.reason and self.status != Status.CERTIFIED else ""
        return (f"Certificate({self.status} {self.kind}{claim} at {short_point(self.center)}{box}, "
                f"{self.digits} digits{why})")

    def _repr_html_(self):
        rows = [["status", self.status], ["kind", self.kind], ["claim", self.claim or "-"],
                ["center", short_point(self.center, digits=12)],
                ["exact coordinates", ", ".join(self.exact_coordinates or []) or "-"],
                ["box radius", "-" if self.radius is None else f"{float(self.radius):.2e}"],
                ["digits", self.digits], ["method", self.method or "-"], ["reason", self.reason or "-"]]
        return html_table("Certificate", ["", ""], rows)

    @property
    def certified(self):
        return self.status == Status.CERTIFIED

    @property
    def failed_claims(self):
        """The claim checks that did not hold."""
        return [check for check in self.claim_checks if check.fails]


def _text(value, digits):
    import mpmath
    mp = mpmath.mp
    value = mp.mpc(value)
    if value.imag == 0:
        return mpmath.nstr(value.real, digits)
    return f"{mpmath.nstr(value.real, digits)} {'-' if value.imag < 0 else '+'} {mpmath.nstr(abs(value.imag), digits)}*I"


def _float_up(value):
    """A double at least ``value`` (a non-negative mpf): rounding to nearest can lose half an ulp."""
    result = float(value)
    return result * (1 + 2.0 ** -50) + 5e-324 if result > 0 or value > 0 else 0.0


def _parse_center(text):
    import mpmath
    mp = mpmath.mp
    text = text.replace(" ", "")
    if text.endswith("*I"):
        body = text[:-2]
        cut = max(body.rfind("+", 1), body.rfind("-", 1))
        while cut > 0 and body[cut - 1] in "eE":
            cut = max(body.rfind("+", 1, cut), body.rfind("-", 1, cut))
        return mp.mpc(mp.mpf(body[:cut]), mp.mpf(body[cut:]))
    return mp.mpc(mp.mpf(text), 0)
