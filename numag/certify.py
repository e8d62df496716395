"""Certificates: boxes that provably hold one zero, rank bounds, exact recognition.

What can be proved, and how (each certificate says which kind it is):

* **A regular zero of a square system** S(x) = 0. Krawczyk's operator in
  interval arithmetic (Krawczyk, Computing 1969; Moore, "Interval Analysis",
  1966): for a box X around x~ and Y close to J_S(x~)^-1,
  K(X) = x~ - Y S(x~) + (I - Y J_S(X)) (X - x~). K(X) inside X proves exactly
  one zero in X; K(X) disjoint from X proves none. Complex boxes are
  rectangles in each coordinate (convex, so the mean-value form holds). A box
  symmetric under conjugation proves, for real S, that the zero is real.
  Independently, Smale's alpha test: alpha = beta * gamma with
  beta = |J^-1 S(x)| and gamma bounded from the Bombieri-Weyl norm of S;
  alpha < (13 - 3 sqrt(17))/4 proves that Newton's method converges
  quadratically from x to a zero within 2 beta (Blum, Cucker, Shub, Smale,
  "Complexity and Real Computation", Springer 1998; the gamma bound from the
  Bombieri-Weyl norm: Shub & Smale, "Complexity of Bezout's theorem I",
  J. AMS 1993 -- from memory).
* **A zero of an overdetermined system** (a singular point is a zero of F and
  the c x c minors of J): a square subsystem is chosen where its Jacobian is
  best conditioned; if even the full Jacobian drops rank, isosingular
  deflation adds the (r + 1)-minors of the Jacobian until the zero is regular
  (Hauenstein & Wampler, "Isosingular sets and deflation", Found. Comput.
  Math. 2013). The square subsystem is certified as above and the remaining
  equations are bounded over the box: the backward error. Being singular is
  not an open condition, so this is a *numerical* certificate: the point is
  exactly singular for equations within that distance.
* **Exact** (rational or sqrt-rational coefficients): the coordinates are
  recognised as polynomials in a primitive element t = sum c_j x_j over the
  coefficient field K, t a root of a polynomial p over K (integer relations
  found by mpmath's PSLQ), and every equation is reduced exactly modulo p to
  zero. A root of p is enclosed by the interval Newton test and its image lies
  in the certified box; so the box's unique zero of the square subsystem IS
  that exact common zero of all the equations.
* **A smooth point**: a box that holds exactly one point of V(F) cut by slices
  through the point, and an interval lower bound on sigma_c(J) over the whole
  box (sigma_c(J) >= sigma_min of a c x c submatrix, bounded below by the
  Neumann series of its approximate inverse). Smoothness is an open
  condition, so this is a proof about the exact variety when the number of
  equations equals the codimension; with more equations it rests on the local
  dimension (the certificate says so).

Examples
--------
>>> from numag.parse import parse_system
>>> system = parse_system(["x^2 - 2", "y - x"], ["x", "y"])
>>> certificate = certify_regular_zero(system, [1.41421356, 1.41421356], CertifyOptions(digits=30))
>>> certificate.status, certificate.real, certificate.radius < 1e-25
('certified', True, True)
"""

from contextlib import contextmanager
from dataclasses import dataclass, field
from fractions import Fraction
import itertools
import math
import weakref

import mpmath
import numpy as np
import scipy.linalg

from .errors import InputError
from .evaluate import BatchEvaluator, PrecisionEvaluator
from .exact import ExactCoefficient, square_free_split
from .evaluate import TermSizes
from .polynomial import Polynomial, combined_minor, determinant

__all__ = ["CertifyOptions", "Certificate", "certify_regular_zero", "certify_singular_point",
           "certify_smooth_point", "singularity_equations", "overlapping_pairs", "ALPHA_ZERO_TEXT",
           "alpha_zero", "alpha_test", "working_digits", "STATUSES"]

#: The three answers of a certificate.
STATUSES = ("certified", "refuted", "undecided")
#: Smale's constant, the bound on alpha below which Newton's method provably converges.
ALPHA_ZERO_TEXT = "(13 - 3*sqrt(17))/4"
#: Relative size below which a scaled singular value of the (augmented) Jacobian counts as zero
#: when deciding whether to deflate (the point is known to roughly half of double precision).
_DEFLATION_THRESHOLD = 1e-6


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


def alpha_zero(ctx):
    """(13 - 3 sqrt(17))/4 in the context ``ctx`` (an enclosure in ``mpmath.iv``)."""
    return (13 - 3 * ctx.sqrt(ctx.mpf(17))) / 4


@dataclass(frozen=True)
class CertifyOptions:
    """Options of the certifiers (defaults declared once).

    Attributes
    ----------
    digits : int
        Decimal digits of the refinement and of the interval arithmetic; the boxes
        have radii near 10^-(digits - 3).
    exact : bool
        Try an exact certificate where the coefficients are exact (rational or
        sqrt-rational).
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
    seed : int
        For the random integer weights and slices.
    """

    digits: int = 30
    exact: bool = True
    match_radius: float = 1e-6
    max_deflations: int = 3
    exact_max_degree: int = 8
    max_minors: int = 60
    seed: int = 0

    def validated(self):
        """A copy checked for sense; raises InputError naming the bad option."""
        if not isinstance(self.digits, int) or not 16 <= self.digits <= 2000:
            raise InputError(f"digits must be an integer from 16 to 2000, got {self.digits!r}")
        if not self.match_radius > 0:
            raise InputError(f"match radius must be positive, got {self.match_radius!r}")
        if self.max_deflations < 0 or self.exact_max_degree < 1 or self.max_minors < 1:
            raise InputError("max_deflations must be >= 0, exact_max_degree and max_minors >= 1")
        return self


@dataclass
class Certificate:
    """What was proved about one point.

    Attributes
    ----------
    status : str
        "certified", "refuted" (a box around the given point provably holds no zero) or
        "undecided" (``reason`` says why).
    kind : str
        "numerical" (a unique zero of a square subsystem, the other equations bounded
        by the backward error) or "exact" (a proof about the exact equations).
    claim : str
        What is certified: "regular zero", "zero", "singular point", "point of the
        singular locus" or "smooth point".
    center : ndarray of complex
        Centre of the box, rounded to double (``center_text`` has every digit).
    center_text : list of str
        Centre coordinates at the working precision.
    radius : float
        Half-width of the box: every coordinate's real and imaginary part lies within it
        (coordinates of a chart are exact: ``chart``).
    digits : int
    method : str
        "Krawczyk", "alpha" (ball of radius 2 beta), "interval exclusion" or "".
    real : bool or None
        True when the zero is proved real (real coefficients, conjugation-symmetric box).
    backward_error : float or None
        For overdetermined systems: the largest value of a remaining equation over the box,
        relative to the size of its terms at the centre (a relative perturbation of
        that size of the equations' coefficients makes the point an exact zero).
    residual_bound : float or None
        The same without the relative scaling.
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
        Which of the equations (numbered from 0, deflation minors after the given ones) form
        the square subsystem.
    chart : int or None
        For projective points: the coordinate set to 1.
    exact_coordinates : list of str or None
        Exact coordinates (kind "exact"): elements of the coefficient field, or polynomials
        in ``t`` with ``minimal_polynomial(t) = 0``.
    minimal_polynomial : str or None
    lower_singular_value : float or None
        Smooth points: a lower bound on sigma_c(J) over the whole box.
    distinct : bool or None
        Set by :func:`overlapping_pairs` users: False when the box meets another certified box.
    reason : str
    notes : list of str
    """

    status: str
    kind: str
    claim: str
    center: np.ndarray
    center_text: list
    radius: object
    digits: int
    method: str = ""
    real: object = None
    backward_error: object = None
    residual_bound: object = None
    alpha: object = None
    alpha_certified: bool = False
    alpha_radius: object = None
    deflations: int = 0
    square_equations: list = field(default_factory=list)
    chart: object = None
    exact_coordinates: object = None
    minimal_polynomial: object = None
    lower_singular_value: object = None
    distinct: object = None
    reason: str = ""
    notes: list = field(default_factory=list)

    @property
    def certified(self):
        return self.status == "certified"


# --- equations -------------------------------------------------------------------------------------

def _integer_weights(rng, shape):
    """Small non-zero integer weights: random combinations that stay exact."""
    values = rng.integers(1, 6, size=shape) * rng.choice([-1, 1], size=shape)
    return values.astype(np.int64)


def _minor_equations(polynomials, size, n, max_minors, rng):
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
                minor = determinant([[gradients[i][j] for j in cols] for i in rows])
                if not minor.is_zero():
                    result.append(minor)
        return result, True
    result = []
    for _ in range(n - size + 1):
        a = _integer_weights(rng, (size, m))
        b = _integer_weights(rng, (n, size))
        result.append(combined_minor(gradients, a, b))
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


# --- interval helpers ---------------------------------------------------------------------------------

def _iv_point(value):
    """An mp number (or Python number) as a point interval of ``mpmath.iv``."""
    value = mpmath.mp.mpc(value)
    return mpmath.iv.mpc(value.real, value.imag)


def _iv_box(center, radius):
    """The box center_j + [-r, r] + i[-r, r]."""
    iv = mpmath.iv
    spread = iv.mpf([-radius, radius])
    return [iv.mpc(iv.mpf(c.real) + spread, iv.mpf(c.imag) + spread) for c in center]


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


def _excludes_zero(value):
    lo_re, hi_re, lo_im, hi_im = _bounds(value)
    return lo_re > 0 or hi_re < 0 or lo_im > 0 or hi_im < 0


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


# --- the square part ---------------------------------------------------------------------------------

class _Square:
    """A square subsystem, evaluated in double, mp and iv."""

    def __init__(self, polynomials):
        self.polynomials = list(polynomials)
        self.n = self.polynomials[0].n_variables
        self.precise = PrecisionEvaluator(self.polynomials)

    def newton(self, start, digits, max_iterations=60):
        """Newton's method at ``digits`` (+ guard digits) from ``start``; (point, converged, last step)."""
        mp = mpmath.mp
        x = mp.matrix([mp.mpc(v) for v in start])
        target = mp.mpf(10) ** (-(digits + 3))
        last = mp.inf
        for _ in range(max_iterations):
            values, jac = self.precise.evaluate(list(x), mp)
            try:
                step = mp.lu_solve(jac, values)
            except ZeroDivisionError:
                return x, False, last
            x = x - step
            size = mp.norm(step, mp.inf)
            if not mp.isfinite(size):
                return x, False, last
            if size <= target * (1 + mp.norm(x, mp.inf)):
                return x, True, size
            if size > 4 * last and last < 1e-3:  # diverging after having been close
                return x, False, size
            last = size
        return x, False, last

    def krawczyk(self, center, radius, real=False):
        """'inside' (one zero), 'outside' (none) or 'unknown' for the box of ``radius`` around ``center``.

        With ``real`` the centre's imaginary parts are dropped, giving a box symmetric under
        conjugation.
        """
        mp, iv = mpmath.mp, mpmath.iv
        if real:
            center = [mp.mpc(c.real, 0) for c in center]
        point = [_iv_point(c) for c in center]
        box = _iv_box(center, radius)
        values = self.precise.evaluate(point, iv, jacobian=False)
        _, jac_box = self.precise.evaluate(box, iv)
        _, jac_center = self.precise.evaluate(list(center), mp)
        try:
            inverse = mp.inverse(jac_center)
        except ZeroDivisionError:
            return "unknown", None
        y = _to_iv_matrix(inverse)
        n = self.n
        identity = iv.eye(n)
        spread = iv.matrix(n, 1)
        for j in range(n):
            spread[j] = box[j] - point[j]
        image = iv.matrix(point) - y * values + (identity - y * jac_box) * spread
        inside, outside = True, False
        for j in range(n):
            lo_re, hi_re, lo_im, hi_im = _bounds(image[j])
            c = center[j]
            if not (lo_re > c.real - radius and hi_re < c.real + radius
                    and lo_im > c.imag - radius and hi_im < c.imag + radius):
                inside = False
            if hi_re < c.real - radius or lo_re > c.real + radius or hi_im < c.imag - radius or lo_im > c.imag + radius:
                outside = True
        if outside:
            return "outside", center
        return ("inside" if inside else "unknown"), center

    def alpha(self, center):
        """(alpha upper bound, beta upper bound) at ``center`` in interval arithmetic, or (None, None)."""
        mp, iv = mpmath.mp, mpmath.iv
        point = [_iv_point(c) for c in center]
        values, jac = self.precise.evaluate(point, iv)
        _, jac_mp = self.precise.evaluate(list(center), mp)
        try:
            y = _to_iv_matrix(mp.inverse(jac_mp))
        except ZeroDivisionError:
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


# --- choosing a square subsystem, deflating -------------------------------------------------------

def _scaled_jacobian(polynomials, point):
    evaluator = BatchEvaluator(polynomials)
    values, jac = evaluator.evaluate(point[None, :])
    scales = TermSizes(polynomials).gradients(point[None, :])[0]
    return values[0], jac[0] / scales[:, None], scales


def _gauss_newton_double(polynomials, point, iterations=40):
    """Least-squares Newton in double precision; returns the best point seen (by residual)."""
    evaluator = BatchEvaluator(polynomials)
    x = np.array(point, dtype=complex)
    best, best_residual = x.copy(), np.inf
    for _ in range(iterations):
        values, jac = evaluator.evaluate(x[None, :])
        residual = np.linalg.norm(values[0])
        if not np.isfinite(residual):
            break
        if residual < best_residual:
            best, best_residual = x.copy(), residual
        step = np.linalg.lstsq(jac[0], values[0], rcond=1e-10)[0]
        x = x - step
        if np.linalg.norm(step) <= 1e-15 * (1 + np.linalg.norm(x)):
            break
    return best


def _square_subsystem(polynomials, point, options, rng):
    """Deflate until the Jacobian has full column rank at ``point``; pick n well-conditioned rows.

    Returns (equations, rows, deflations, point) or raises _Undecided.
    """
    n = polynomials[0].n_variables
    equations = list(polynomials)
    x = np.array(point, dtype=complex)
    for deflations in range(options.max_deflations + 1):
        x = _gauss_newton_double(equations, x)
        _, scaled, _ = _scaled_jacobian(equations, x)
        if not np.all(np.isfinite(scaled)):
            raise _Undecided("the equations do not evaluate to finite numbers near the point")
        # rows are divided by their natural size at the point, so singular values compare with 1
        values = np.linalg.svd(scaled, compute_uv=False)
        rank = int(np.sum(values > _DEFLATION_THRESHOLD))
        if rank == n:
            _, _, pivots = scipy.linalg.qr(scaled.T, pivoting=True)
            rows = sorted(int(k) for k in pivots[:n])
            return equations, rows, deflations, x
        if deflations == options.max_deflations:
            break
        minors, _ = _minor_equations(equations, rank + 1, n, options.max_minors, rng)
        if not minors:
            break
        equations = equations + minors
    raise _Undecided(f"the Jacobian of the equations stays rank deficient after {options.max_deflations} "
                     "rounds of deflation (the point may lie on a positive-dimensional solution set)")


class _Undecided(Exception):
    pass


# --- the driver -----------------------------------------------------------------------------------

def _text(value, digits):
    mp = mpmath.mp
    value = mp.mpc(value)
    if value.imag == 0:
        return mpmath.nstr(value.real, digits)
    return f"{mpmath.nstr(value.real, digits)} {'-' if value.imag < 0 else '+'} {mpmath.nstr(abs(value.imag), digits)}*I"


def _relative_size(polynomial, center):
    """sum |c| max(1, |x|_inf)^|a| at the centre: the natural size of the equation's values there."""
    size = max(1.0, max(abs(complex(c)) for c in center))
    values = np.abs(polynomial.numeric_coefficients()) * size ** polynomial.exponents.sum(axis=1)
    return float(values.sum())


def _refute(polynomials, point, radius, digits):
    """True when some equation provably has no zero in the box of ``radius`` around ``point``."""
    with working_digits(digits):
        box = _iv_box([mpmath.mp.mpc(complex(v)) for v in point], mpmath.mp.mpf(radius))
        values = PrecisionEvaluator(polynomials).evaluate(box, mpmath.iv, jacobian=False)
        return any(_excludes_zero(values[i]) for i in range(values.rows))


def _is_real(polynomials):
    for p in polynomials:
        if p.is_exact:
            if not all(c.is_real() for c in p.coefficients):
                return False
        elif np.any(np.abs(p.numeric_coefficients().imag) > 0):
            return False
    return True


def _certify_zero(polynomials, point, options, claim, exact_check=True, squares=None):
    """Certify a zero of ``polynomials`` (square or overdetermined) near ``point`` (affine coordinates).

    ``squares`` caches square subsystems (and their evaluators' converted coefficients) across the
    points of one system; keys are the identities of the chosen polynomials.
    """
    options = options.validated()
    digits = options.digits
    point = np.asarray(point, dtype=complex)
    n = polynomials[0].n_variables
    if point.shape != (n,):
        raise InputError(f"the point has {point.shape[0] if point.ndim == 1 else point.shape} "
                         f"coordinates, the equations {n} variables")
    if not np.all(np.isfinite(point)):
        raise InputError("the point has non-finite coordinates")
    rng = np.random.default_rng(options.seed)
    reach = options.match_radius * (1 + float(np.max(np.abs(point), initial=0.0)))

    def failed(reason, **extra):
        refuted = _refute(polynomials, point, reach, max(digits, 20))
        if refuted:
            return Certificate("refuted", "numerical", claim, point, [_text(v, 17) for v in point], reach, digits,
                               method="interval exclusion",
                               reason=f"no zero within {reach:.3g} of the point (an equation's interval "
                                      f"excludes 0 over the box); before that: {reason}", **extra)
        return Certificate("undecided", "numerical", claim, point, [_text(v, 17) for v in point], None, digits,
                           reason=reason, **extra)

    try:
        equations, rows, deflations, start = _square_subsystem(polynomials, point, options, rng)
    except _Undecided as err:
        return failed(str(err))
    chosen = [equations[k] for k in rows]
    key = tuple(id(p) for p in chosen)
    if squares is not None and not deflations and key in squares:
        square = squares[key]
    else:
        square = _Square(chosen)
        if squares is not None and not deflations:
            squares[key] = square
    mp, iv = mpmath.mp, mpmath.iv
    with working_digits(digits + 8):
        center, converged, _ = square.newton(start, digits)
        center = [center[j] for j in range(n)]
        moved = float(max(abs(complex(center[j]) - point[j]) for j in range(n)))
        if not converged:
            return failed("Newton's method on the square subsystem did not converge", deflations=deflations)
        if moved > reach:
            return failed(f"the zero of the square subsystem near the point lies {moved:.3g} away "
                          f"(more than {reach:.3g})", deflations=deflations)
        size = 1 + max(abs(c) for c in center)
        real_coefficients = _is_real(equations)
        outcome, box_center, radius = "unknown", center, None
        for exponent in (digits - 3, digits - 6, digits // 2, 8):
            radius = mp.mpf(10) ** (-exponent) * size
            if real_coefficients and max(abs(c.imag) for c in center) < radius / 4:
                outcome, box_center = square.krawczyk(center, radius, real=True)
                if outcome == "inside":
                    break
            outcome, box_center = square.krawczyk(center, radius)
            if outcome == "inside":
                break
        real = None
        if outcome == "inside" and real_coefficients:
            if all(c.imag == 0 for c in box_center):
                real = True  # one zero in a box symmetric under conjugation: its conjugate is itself
            elif any(abs(c.imag) > radius for c in box_center):
                real = False  # the box, holding the zero, misses the real points
        alpha, beta = square.alpha(center)
        alpha_ok = alpha is not None and alpha < mp.mpf(alpha_zero(iv).a)
        common = dict(deflations=deflations, square_equations=list(rows),
                      alpha=None if alpha is None else float(alpha), alpha_certified=bool(alpha_ok),
                      alpha_radius=None if beta is None else float(2 * beta))
        if outcome != "inside" and alpha_ok:
            box_center, radius, method = center, 2 * beta, "alpha"
        elif outcome == "inside":
            method = "Krawczyk"
        else:
            return failed("neither Krawczyk's test nor the alpha test succeeded at "
                          f"{digits} digits (ill-conditioned; try more digits)", **common)
        rest = [equations[k] for k in range(len(equations)) if k not in rows]
        backward, residual = None, None
        if rest:
            box = _iv_box(box_center, radius)
            values = PrecisionEvaluator(rest).evaluate(box, iv, jacobian=False)
            residual = max(float(_magnitude_upper(values[i])) for i in range(values.rows))
            scales = [_relative_size(p, box_center) for p in rest]
            backward = max(float(_magnitude_upper(values[i])) / max(scales[i], 1e-300) for i in range(values.rows))
        certificate = Certificate(
            "certified", "numerical", claim, np.array([complex(c) for c in box_center]),
            [_text(c, digits) for c in box_center], float(radius), digits, method=method, real=real,
            backward_error=backward, residual_bound=residual, **common)
        if deflations:
            certificate.notes.append(f"{deflations} round(s) of isosingular deflation made the zero regular")
        if exact_check and options.exact and all(p.is_exact for p in polynomials):
            _exact_certificate(certificate, square, polynomials, box_center, radius, options)
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
        relation = mpmath.pslq([v / scale for v in folded], tol=mp.mpf(10) ** (-(digits * 2 // 3)),
                               maxcoeff=10 ** (digits // 4), maxsteps=20000)
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


def _exact_certificate(certificate, square, equations, center, radius, options):
    """Upgrade a numerical certificate to an exact one when the algebraic coordinates can be recognised."""
    mp, iv = mpmath.mp, mpmath.iv
    n = len(center)
    complex_values = any(abs(c.imag) > radius for c in center)
    basis = _field_basis(equations, complex_values)
    top = options.exact_max_degree
    digits = max(options.digits, 30 + 8 * (top + 1) * len(basis))
    with working_digits(digits + 10):
        refined, converged, _ = square.newton(center, digits)
        if not converged:
            certificate.notes.append("exact recognition skipped: high-precision refinement failed")
            return
        x = [refined[j] for j in range(n)]
        weights = [1, 3, 7, 11, 17, 23, 31, 41]
        t = mp.fsum(w * v for w, v in zip(itertools.cycle(weights), x)) if n else mp.mpc(0)
        basis_values = [b.to_context(mp) for b in basis]
        for degree in range(1, top + 1):
            powers = [t ** k for k in range(degree + 1)]
            relation = _integer_relation([b * pk for pk in powers for b in basis_values], digits)
            if relation is None:
                continue
            coefficients = [_combine(relation[k * len(basis):(k + 1) * len(basis)], basis) for k in range(degree + 1)]
            if coefficients[-1].is_zero():
                continue
            lead = coefficients[-1].reciprocal()
            monic = [c * lead for c in coefficients[:-1]]
            expressions = []
            for v in x:
                rel = _integer_relation([v] + [b * pk for pk in powers[:degree] for b in basis_values], digits)
                if rel is None or rel[0] == 0:
                    expressions = None
                    break
                parts = [_combine(rel[1 + k * len(basis):1 + (k + 1) * len(basis)], basis) for k in range(degree)]
                scale = ExactCoefficient.rational(Fraction(-1, int(rel[0])))
                expressions.append([c * scale for c in parts])
            if expressions is None:
                continue
            if _verify_exact(equations, monic, expressions, t, center, radius):
                certificate.kind = "exact"
                certificate.minimal_polynomial = None if degree == 1 else _poly_text(monic)
                certificate.exact_coordinates = [_expression_text(e) for e in expressions]
                radical = _quadratic_root(monic, t) if degree == 2 else None
                if radical is not None:  # t = (-b +- sqrt(b^2 - 4c))/2 written out
                    certificate.exact_coordinates = [(e[0] + e[1] * radical).to_text() for e in expressions]
                    certificate.minimal_polynomial = None
                certificate.notes.append(
                    "exact: every equation vanishes identically modulo the minimal polynomial of "
                    "t = " + " + ".join(f"{w}*x{j + 1}" for j, w in zip(range(n), itertools.cycle(weights)))
                    + f", and its root lies in the box (PSLQ at {digits} digits)")
                return
            break
    certificate.notes.append(f"no exact form found (primitive element of degree up to {top} over the "
                             "coefficient field): the certificate stays numerical")


def _quadratic_root(monic, t_value):
    """The root of t^2 + b t + c nearest ``t_value``, with a square root, when b^2 - 4c is rational."""
    c, b = monic
    disc = b * b - c * 4
    if not disc.is_rational():
        return None
    disc = disc.as_fraction()
    root = ExactCoefficient.square_root(abs(disc))
    if disc < 0:
        root = root * ExactCoefficient.imaginary_unit()
    candidates = [(root * sign - b) * ExactCoefficient.rational(Fraction(1, 2)) for sign in (1, -1)]
    return min(candidates, key=lambda v: abs(complex(v) - complex(t_value)))


def _verify_exact(equations, monic, expressions, t_value, center, radius):
    """Check every equation modulo p, and that p's root near t maps into the box."""
    quotient = _Quotient(monic)
    d = quotient.degree
    n = len(expressions)
    cache = {}

    def power(j, e):
        if (j, e) not in cache:
            if e == 0:
                cache[(j, e)] = quotient.reduce([ExactCoefficient.rational(1)])
            else:
                cache[(j, e)] = quotient.multiply(power(j, e - 1), expressions[j])
        return cache[(j, e)]

    for polynomial in equations:
        total = [ExactCoefficient.zero()] * d
        for row, c in zip(polynomial.exponents, polynomial.coefficients):
            term = quotient.reduce([c])
            for j in range(n):
                if row[j]:
                    term = quotient.multiply(term, power(j, int(row[j])))
            total = [a + b for a, b in zip(total, term)]
        if not all(v.is_zero() for v in total):
            return False
    # a root of p: interval Newton on p around t (or t itself, exactly, when d = 1)
    mp, iv = mpmath.mp, mpmath.iv
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
            return False
        y = _iv_point(1 / derivative_mp)
        image = point - y * value(point) + (1 - y * value(box, 1)) * (box - point)
        lo_re, hi_re, lo_im, hi_im = _bounds(image)
        if not (lo_re > t_value.real - rho and hi_re < t_value.real + rho
                and lo_im > t_value.imag - rho and hi_im < t_value.imag + rho):
            return False
        root_box = image
    for j in range(n):
        enclosure = iv.mpc(0)
        for coefficient in reversed(expressions[j]):
            enclosure = enclosure * root_box + coefficient.to_context(iv)
        lo_re, hi_re, lo_im, hi_im = _bounds(enclosure)
        c = center[j]
        if not (lo_re >= c.real - radius and hi_re <= c.real + radius
                and lo_im >= c.imag - radius and hi_im <= c.imag + radius):
            return False
    return True


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


# --- public entry points ----------------------------------------------------------------------------

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


def certify_regular_zero(system, point, options=None, projective=None):
    """Certify a solution of ``system`` near ``point`` (square, or overdetermined with a backward error).

    Parameters
    ----------
    system : PolynomialSystem
    point : array_like of complex
        Affine coordinates, or homogeneous ones for a projective system (certified in the chart
        of the largest coordinate).
    options : CertifyOptions, optional
    projective : bool, optional
        Defaults to ``system.projective``.

    Returns
    -------
    Certificate
        Claim "regular zero" (a singular zero is deflated first and then claimed as "zero").

    Examples
    --------
    >>> from numag.parse import parse_system
    >>> c = certify_regular_zero(parse_system(["x^2 + 1"], ["x"]), [1j], CertifyOptions(digits=20))
    >>> c.status, c.kind, c.exact_coordinates
    ('certified', 'exact', ['I'])
    """
    options = (options or CertifyOptions()).validated()
    projective = system.projective if projective is None else projective

    def run(polynomials, affine):
        certificate = _certify_zero(polynomials, affine, options, "regular zero")
        if certificate.deflations:
            certificate.claim = "zero"
        return certificate

    return _in_chart(system.polynomials, point, projective, run)


def certify_singular_point(system, point, codimension=None, options=None, projective=None, slices=0):
    """Certify that X = V(F) is singular at a point near ``point``: a zero of F and the c x c minors of J.

    Parameters
    ----------
    system : PolynomialSystem
    point : array_like of complex
    codimension : int, optional
        The rank a smooth point would need (the codimension of X's components through the
        point); defaults to the number of equations for a hypersurface, else required.
    options : CertifyOptions, optional
    projective : bool, optional
    slices : int, default 0
        For a witness point of a positive-dimensional singular component: that many random
        linear equations through the point are added (kind stays numerical).

    Returns
    -------
    Certificate
        Claim "singular point" (or "point of the singular locus" with slices). Kind "exact"
        only when the exact coordinates were recognised and every equation and every minor
        vanishes exactly.

    Examples
    --------
    >>> from numag.parse import parse_system
    >>> c = certify_singular_point(parse_system(["y^2 - x^3"], ["x", "y"]), [1e-9, 0.0])
    >>> c.status, c.kind, c.deflations >= 1
    ('certified', 'exact', True)
    """
    options = (options or CertifyOptions()).validated()
    projective = system.projective if projective is None else projective
    if codimension is None:
        if system.n_equations != 1:
            raise InputError("the codimension is needed for a system of several equations")
        codimension = 1
    cache = _SYSTEM_CACHE.setdefault(system, {})
    key = (int(codimension), options.max_minors, options.seed)
    if key not in cache:  # the minors, their charts and square subsystems serve every point of the system
        cache[key] = singularity_equations(system, int(codimension), options.max_minors, options.seed) + ({}, {})
    equations, complete, charts, squares = cache[key]
    claim = "singular point" if not slices else "point of the singular locus"

    def run(polynomials, affine):
        extra = list(polynomials)
        if slices:
            rng = np.random.default_rng(options.seed + 1)
            n = len(affine)
            for _ in range(slices):
                weights = rng.standard_normal(n) + 1j * rng.standard_normal(n)
                extra.append(Polynomial.linear(weights, -complex(weights @ affine)))
        certificate = _certify_zero(extra, affine, options, claim, exact_check=not slices,
                                    squares=None if slices else squares)
        if certificate.kind == "exact" and not complete:
            certificate.kind = "numerical"
            certificate.notes.append("the exact check covered random combinations of the minors, not every "
                                     "minor: kind stays numerical")
        return certificate

    return _in_chart(equations, point, projective, run, charts)


def certify_smooth_point(system, point, codimension, options=None, projective=None):
    """Prove that X is smooth at a point near ``point``: one point of X in a box, rank J >= c over the box.

    Parameters
    ----------
    system : PolynomialSystem
    point : array_like of complex
    codimension : int
        The codimension of X at the point (n minus the local dimension).
    options : CertifyOptions, optional
    projective : bool, optional

    Returns
    -------
    Certificate
        Claim "smooth point", with ``lower_singular_value`` the interval lower bound on
        sigma_c(J) over the box. Kind "exact" when the number of equations equals the
        codimension (then the box provably holds a point of X where X is smooth);
        otherwise "numerical" (the box holds a zero of c combinations of the equations;
        smoothness of X there rests on the local dimension).

    Examples
    --------
    >>> from numag.parse import parse_system
    >>> c = certify_smooth_point(parse_system(["x^2 + y^2 - 1"], ["x", "y"]), [0.6, 0.8], 1)
    >>> c.status, c.kind, c.lower_singular_value > 1
    ('certified', 'exact', True)
    """
    options = (options or CertifyOptions()).validated()
    projective = system.projective if projective is None else projective
    c = int(codimension)
    if not 0 <= c <= min(system.n_equations, system.n_variables - (1 if projective else 0)):
        raise InputError(f"codimension {c} is impossible for {system.n_equations} equations "
                         f"in {system.n_variables} variables")

    def run(polynomials, affine):
        n = len(affine)
        rng = np.random.default_rng(options.seed + 2)
        if len(polynomials) == c:
            held = list(polynomials)
        else:
            weights = rng.standard_normal((c, len(polynomials))) + 1j * rng.standard_normal((c, len(polynomials)))
            held = []
            for row in weights:
                total = Polynomial.zero(n)
                for w, p in zip(row, polynomials):
                    total = total + p * complex(w)
                held.append(total)
        slices = []
        for _ in range(n - c):
            weights = rng.standard_normal(n) + 1j * rng.standard_normal(n)
            slices.append(Polynomial.linear(weights, -complex(weights @ affine)))
        certificate = _certify_zero(held + slices, affine, options, "smooth point", exact_check=False)
        if certificate.status != "certified":
            return certificate
        bound = _rank_lower_bound(polynomials, certificate, c)
        certificate.lower_singular_value = None if bound is None else float(bound)
        if bound is None or not bound > 0:
            certificate.status = "undecided"
            certificate.reason = (f"the box holds a point, but sigma_{c}(J) could not be bounded away from 0 "
                                  f"over it at {options.digits} digits")
            return certificate
        if len(polynomials) == c:
            certificate.kind = "exact"
            certificate.notes.append(f"proved: the box holds exactly one point of X on the slices, and "
                                     f"rank J >= {c} = codimension over the whole box")
        else:
            certificate.notes.append(f"rank J >= {c} over the box is proved; the box holds a zero of {c} random "
                                     f"combinations of the equations; that X is smooth there rests on its "
                                     f"local dimension {n - c} (numerical)")
        certificate.backward_error = None
        certificate.residual_bound = None
        return certificate

    return _in_chart(system.polynomials, point, projective, run)


def _rank_lower_bound(polynomials, certificate, c):
    """Interval lower bound on sigma_c(J) over the certificate's box (None when it fails)."""
    if c == 0:
        return mpmath.mp.inf
    mp, iv = mpmath.mp, mpmath.iv
    digits = certificate.digits
    with working_digits(digits + 8):
        center = [_parse_center(v) for v in certificate.center_text]
        evaluator = PrecisionEvaluator(polynomials)
        _, jac_center = evaluator.evaluate(center, mp)
        jac = np.array([[complex(jac_center[i, j]) for j in range(jac_center.cols)] for i in range(jac_center.rows)])
        _, _, row_pivots = scipy.linalg.qr(jac.T, pivoting=True)
        rows = sorted(int(k) for k in row_pivots[:c])
        _, _, col_pivots = scipy.linalg.qr(jac[rows], pivoting=True)
        cols = sorted(int(k) for k in col_pivots[:c])
        sub = mp.matrix(c, c)
        for a, i in enumerate(rows):
            for b, j in enumerate(cols):
                sub[a, b] = jac_center[i, j]
        try:
            y = _to_iv_matrix(mp.inverse(sub))
        except ZeroDivisionError:
            return None
        box = _iv_box(center, mp.mpf(certificate.radius))
        _, jac_box = evaluator.evaluate(box, iv)
        sub_box = iv.matrix(c, c)
        for a, i in enumerate(rows):
            for b, j in enumerate(cols):
                sub_box[a, b] = jac_box[i, j]
        defect = _frobenius_upper(iv.eye(c) - y * sub_box)
        if not defect < 1:
            return None
        # sigma_min(M) >= (1 - |I - Y M|) / |Y| for every M in the box; sigma_c(J) >= sigma_min(M)
        return (1 - defect) / _frobenius_upper(y) * (1 - 8 * mp.eps)


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


def _box_meets(a, b):
    """Whether the certified boxes of a and b (same chart) can share a point."""
    gap = np.maximum(np.abs(a.center.real - b.center.real), np.abs(a.center.imag - b.center.imag))
    # rounding the centres to double costs up to 1e-16 relative: pad before comparing
    slack = 1e-15 * (1 + np.maximum(np.abs(a.center), np.abs(b.center)))
    return bool(np.all(gap <= a.radius + b.radius + slack))


def _meets_across_charts(a, b):
    """Whether boxes in two charts of projective space can hold the same point (interval test).

    A common point, written x in a's chart (x in A, x_ka = 1), has x_kb != 0 and x / x_kb
    in B; so every x_j lies in A_j and in B_j * A_kb. An empty intersection for some j
    proves the boxes disjoint.
    """
    iv = mpmath.iv
    with working_digits(30):
        def box_of(c):
            pad = 1e-15 * (1 + float(np.max(np.abs(c.center))))
            box = _iv_box([mpmath.mp.mpc(v) for v in c.center], mpmath.mp.mpf(c.radius + pad))
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
