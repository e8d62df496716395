"""The square subsystem: choosing n equations (rows by pivoted QR of the equilibrated Jacobian, slices
forced in), Newton at high precision, Krawczyk's operator and Smale's alpha test (``_Square``), the
proved box and the box as published, refutation, and accounting for every other equation of the
claim over the box (backward error, or an enclosure that excludes 0).
"""

from dataclasses import dataclass
import math

import mpmath
import numpy as np

from ..errors import InputError
from ..system.display import counted
from ..numeric.evaluate import BatchEvaluator, PrecisionEvaluator, TermSizes
from ..numeric.linalg import pivot_order
from .intervals import (_SINGULAR, _bounds, _excludes_zero, _frobenius_upper, _iv_box, _iv_point, _magnitude_upper,
                        _terms_lower, _to_iv_matrix, _weyl_norm_squared)
from .records import (_FLOOR_DIGITS_FRACTION, Enclosure, _float_up, _guarded, _parse_center, _text, alpha_zero,
                      working_digits)

__all__ = ["alpha_test"]


#: A scaled singular value of the equilibrated Jacobian below this counts as zero when choosing
#: rows and deciding whether to deflate (the point is known to roughly half of double precision).
_DEFLATION_THRESHOLD = 1e-6


#: A point is deflated only when the equations nearly vanish there (equilibrated residual): a failure
#: at a point that is no zero at all is not a singular zero, and deflation would not help.
_NEAR_ZERO = 1e-6


def _coordinate_scales(center, digits):
    """Size of each coordinate for its box: |x_j|, but at least 10^-(digits//2) times the largest."""
    mp = mpmath.mp
    largest = max((abs(c) for c in center), default=mp.mpf(0))
    if largest == 0:
        largest = mp.mpf(1)
    floor = largest * mp.mpf(10) ** (-(digits // _FLOOR_DIGITS_FRACTION))
    return [max(abs(c), floor) for c in center]


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
        """(:class:`Enclosure`, centre used, image) for the box of ``radii`` around ``center``.

        'inside' (the image strictly inside the box) proves exactly one zero in the box, a regular
        one; 'outside' (disjoint in some coordinate) proves none. With ``real`` the centre's
        imaginary parts are dropped, giving a box symmetric under conjugation.
        """
        mp = mpmath.mp
        if real:
            center = [mp.mpc(c.real, 0) for c in center]
        image = self.image(center, _iv_box(center, radii))
        if image is None:
            return Enclosure.UNKNOWN, center, None
        inside, outside = True, False
        for j in range(self.n):
            lo_re, hi_re, lo_im, hi_im = _bounds(image[j])
            c, r = center[j], radii[j]
            if not (lo_re > c.real - r and hi_re < c.real + r and lo_im > c.imag - r and hi_im < c.imag + r):
                inside = False
            if hi_re < c.real - r or lo_re > c.real + r or hi_im < c.imag - r or lo_im > c.imag + r:
                outside = True
        if outside:
            return Enclosure.OUTSIDE, center, image
        return (Enclosure.INSIDE if inside else Enclosure.UNKNOWN), center, image

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
    >>> from numag.system.parse import parse_system
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


def _column_scales(point):
    """|x_j|, at least 1e-8 of the largest coordinate or of 1.

    Only for choices (rows, deflation), never for proofs: a coordinate near 0 has no size of its own,
    and in units of itself x^2 near x = 1e-9 would look like a regular zero (2 x * x / x^2 = 2).
    """
    magnitudes = np.abs(np.asarray(point, dtype=complex))
    return np.maximum(magnitudes, 1e-8 * max(float(magnitudes.max(initial=0.0)), 1.0))


def _equilibrated(polynomials, point, evaluator=None, term_sizes=None):
    """Values and Jacobian in units of each equation's terms (rows) and each coordinate's size (columns).

    Row i is divided by sum |c_k| |x^a_k| (with |x_j| floored, so a vanishing point still has a scale)
    and column j multiplied by |x_j|: the result does not change when a variable or an equation is
    rescaled, so rank decisions on it do not depend on units.
    """
    evaluator = evaluator or BatchEvaluator(polynomials)
    values, jac = evaluator.evaluate(np.asarray(point, dtype=complex)[None, :])
    scales = _column_scales(point)
    sizes = (term_sizes or TermSizes(polynomials)).at(scales[None, :])[0]  # terms sized at |x_j|, floored
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
    evaluator, term_sizes = BatchEvaluator(polynomials), TermSizes(polynomials)
    x = np.array(point, dtype=complex)
    best, best_residual = x.copy(), np.inf
    for _ in range(iterations):
        values, jac, scales = _equilibrated(polynomials, x, evaluator, term_sizes)
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
        raise _Undecided(f"{counted(len(equations), 'equation')} cannot pin a point in "
                         f"{counted(wanted, 'free direction')}")
    pivots = pivot_order(projected.T)
    return sorted(int(k) for k in pivots[:wanted]), rank


class _Undecided(Exception):
    pass


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
            if outcome is not Enclosure.INSIDE:
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
        if outcome is Enclosure.INSIDE:
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
