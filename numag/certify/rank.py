"""Rank and multiplicity: an interval lower bound on sigma_r of the Jacobian over a box (rank J >= r),
numerical ranks in units of the point and in absolute units, the codimension sampled at points of X
near a point, and the dimension of the local dual space (Macaulay matrices; Dayton and Zeng 2005) as
the multiplicity of a zero.
"""

import itertools
import math

import mpmath
import numpy as np

from ..system.exact import ExactCoefficient
from ..system.centred import centre_near, centred_system, translated_terms
from ..system.polynomial import PolynomialSystem
from ..numeric.evaluate import BatchEvaluator, PrecisionEvaluator
from ..numeric.linalg import pivot_order
from ..numeric.refine import project_to_variety
from ..numeric.linalg import widest_gap_rank, zero_tolerance
from .intervals import _SINGULAR, _frobenius_upper, _iv_box, _to_iv_matrix
from .records import _float_up, _guarded, _parse_center, _text, working_digits
from .square import _DEFLATION_THRESHOLD, _absolute_jacobian, _coordinate_scales, _equilibrated


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


def _dual_multiplicity(polynomials, center, max_order=12, max_columns=4000, scales=None, by_gap=False, widths=None):
    """Multiplicity of an isolated zero: dimension of the local dual space (Macaulay matrices).

    Dayton and Zeng, "Computing the multiplicity structure in solving polynomial systems", ISSAC 2005:
    the functionals sum c_a d^a/a! at the zero that vanish on every (x - z)^b f_i with |b| < k form the
    dual space of order k; its dimension stops growing exactly at the multiplicity. Ranks in double
    precision of the matrices built from Taylor coefficients at the working precision; numerical.
    """
    n = len(center)
    if n == 0:
        return 1
    # Units of the Taylor variables: the box scales by default; callers with balanced units pass ones
    # (box scales of coordinates at 0 are 1e-8, which would drown every term of degree 2 and more).
    scales = _coordinate_scales(center, 16) if scales is None else list(scales)
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
        if by_gap:
            # absolute values: each polynomial's row is divided by its largest Taylor coefficient, and at a
            # point where every low-order coefficient vanishes the largest singular value is noise itself
            rank, width = widest_gap_rank(values, _GAP_ZERO, _GAP_KEPT) if len(values) else (0, float("inf"))
            if widths is not None:
                widths.append(width)
        else:
            rank = int(np.sum(values > 1e-8 * (values[0] if len(values) else 1.0)))
        nullity = len(columns) - rank
        if previous is not None and nullity == previous:
            return nullity
        previous = nullity
    return None


#: Macaulay matrices (rows in units of each polynomial's largest Taylor coefficient): zero singular values
#: are at most 1e-6, kept ones at least 1e-11 (rounding in the point and the coefficients puts about 1e-13
#: on the zero ones).
_GAP_ZERO, _GAP_KEPT = 1e-6, 1e-11


def local_dual_dimension(polynomials, point, max_order=12):
    """Dimension of the local dual space of the ideal of ``polynomials`` at ``point`` (its multiplicity there).

    The public face of the Macaulay-matrix count above (Dayton and Zeng 2005), for other packages: the
    Milnor number is this for the gradient, the Tjurina number for f and its gradient. Taylor variables
    in the units of the polynomials (balance them first, :class:`numag.numeric.scaling.Scaling`).

    Parameters
    ----------
    polynomials : list of Polynomial
    point : array_like of complex
    max_order : int
        Highest order of differential functionals tried.

    Returns
    -------
    int or None
        None when the dimension still grows at ``max_order`` (the zero is not isolated, or deeper).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["y^2 - x^3"], ["x", "y"]).polynomials[0]
    >>> local_dual_dimension(f.gradient(), [0, 0])
    2
    """
    return local_dual_evidence(polynomials, point, max_order)[0]


def local_dual_evidence(polynomials, point, max_order=12):
    """:func:`local_dual_dimension` and the narrowest of the rank gaps it rests on (in decades).

    Returns
    -------
    dimension : int or None
    width : float
        The narrowest widest-gap width over the orders tried (inf when no order had a zero value to tell
        apart); below about 3 decades a count is not to be trusted.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["y^2 - x^3"], ["x", "y"]).polynomials[0]
    >>> dimension, width = local_dual_evidence(f.gradient(), [0, 0])
    >>> dimension, width > 3
    (2, True)
    """
    center = [mpmath.mp.mpc(complex(v)) for v in point]
    widths = []
    dimension = _dual_multiplicity(list(polynomials), center, max_order=max_order, scales=[1] * len(center),
                                   by_gap=True, widths=widths)
    return dimension, min(widths, default=float("inf"))


def _exponents_of_degree(n, total):
    if n == 1:
        return [(total,)]
    return [(first,) + rest for first in range(total, -1, -1) for rest in _exponents_of_degree(n - 1, total - first)]


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
    row_pivots = pivot_order(scaled.T)
    rows = sorted(int(k) for k in row_pivots[:r])
    col_pivots = pivot_order(scaled[rows])
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


#: At a sampled point of X a singular value of J relative to the largest counts as nonzero above this. A sample
#: sits at a relative distance 1e-4 to 1e-3 from the point, so a value the point's singularity makes small is
#: there of that order (1e-4), or its square (1e-8) where a column is scaled by a coordinate that is small at
#: the point; values that vanish on X are at rounding level (below ``zero_tolerance``, about 1e-12).
_SAMPLED_NONZERO = 1e-10


def _sampled_rank_bounds(polynomials, point):
    """(low, high): ranks of J at a sampled point of X that are surely reached and possibly reached.

    A singular value relative to the largest counts (low) when it clears :data:`_SAMPLED_NONZERO` in either
    unit of :func:`_numerical_ranks`, and is ruled out (high) only when it is at rounding level in both.
    Ratios, not a fixed threshold on the values: they do not change when an equation or a variable is
    rescaled (decision 0078).
    """
    point = np.asarray(point, dtype=complex)
    _, scaled, _ = _equilibrated(polynomials, point)
    absolute = _absolute_jacobian(polynomials, point)
    if not (np.all(np.isfinite(scaled)) and np.all(np.isfinite(absolute))):
        return 0, min(scaled.shape)
    zero = zero_tolerance(16, scaled.shape)
    ratios = []
    for matrix in (scaled, absolute):
        values = np.linalg.svd(matrix, compute_uv=False)
        ratios.append(values / values[0] if values[0] > 0 else np.zeros_like(values))
    low = max(int(np.sum(r > _SAMPLED_NONZERO)) for r in ratios)
    high = max(int(np.sum(r > zero)) for r in ratios)
    return low, high


def _sampled_codimension(polynomials, point, seed, samples=8):
    """The codimension of X near a point, numerically: points of X sampled nearby, least rank of J there.

    Random points at a relative distance 1e-3 are moved onto X; the rank of J at a generic point of a
    reduced component equals its codimension, and the least one among the samples is that of the
    largest component through the point. None when fewer than three samples reach X away from the point,
    or when the least rank is not clear (a singular value between rounding level and a clear size).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> circle_and_line = parse_system(["x^2 + y^2 - 1", "z"], ["x", "y", "z"])
    >>> _sampled_codimension(circle_and_line.polynomials, [1.0, 0.0, 0.0], seed=1)
    2
    """
    point = np.asarray(point, dtype=complex)
    n = len(point)
    rng = np.random.default_rng(seed)
    radius = 1e-3 * (1 + float(np.max(np.abs(point), initial=0.0)))
    directions = rng.standard_normal((samples, n)) + 1j * rng.standard_normal((samples, n))
    directions /= np.linalg.norm(directions, axis=1)[:, None]
    framed = _sampling_frame(polynomials, point, radius)
    if framed is not None:
        # x = s + radius * u: residuals and ranks relative to the sampling radius, not to the unit 1 (samples at
        # 1e-3 of a crossing at the origin passed the unit's residual test while 1e-6 off X; decision 0098)
        point, radius = np.zeros(n, dtype=complex), 1.0
        numeric = framed
    else:
        numeric = [p.numeric() if p.is_exact else p for p in polynomials]
    system = PolynomialSystem([f"x{j}" for j in range(n)], numeric)
    projected = project_to_variety(system, BatchEvaluator(numeric), point[None, :] + radius * directions)
    bounds = [_sampled_rank_bounds(numeric, q) for q, ok in zip(projected.points, projected.converged)
              if ok and np.linalg.norm(q - point) >= 0.1 * radius]
    if len(bounds) < 3:
        return None
    least_sure, least_possible = min(low for low, _ in bounds), min(high for _, high in bounds)
    # A sample whose rank could be lower than the least clear one leaves the codimension open.
    return least_sure if least_sure == least_possible else None


#: Systems whose translation to the point would have more terms than this are sampled in the given coordinates.
_FRAME_TERMS = 20000


def _sampling_frame(polynomials, point, radius):
    """The polynomials in u with x = s + radius * u (s an exact centre at ``point``), numeric; None when too large.

    The translation is exact, so no cancellation of large terms hides the local geometry far from the origin;
    the scaling by ``radius`` then makes the sampling ball the unit ball.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> framed = _sampling_frame(parse_system(["x*y"], ["x", "y"]).polynomials, np.array([0.0, 5.0]), 1e-3)
    >>> framed[0].evaluate([1.0, 0.0])  # (0 + 1e-3 u)(5 + 1e-3 v) at u = 1, v = 0
    (0.005+0j)
    """
    n = len(point)
    system = PolynomialSystem([f"x{j}" for j in range(n)], list(polynomials))
    if translated_terms(system) > _FRAME_TERMS or not np.all(np.isfinite(point)):
        return None
    centred = centred_system(system, centre_near(point, radius))
    scale = radius * np.eye(n)
    return [p.numeric().substitute_linear(scale) for p in centred.polynomials]


class _BoxView:
    """A box as ``_proved_rank`` reads it: centre texts, radii and the digits they were made at."""

    def __init__(self, center_text, radii, digits):
        self.center_text, self.radii, self.digits = list(center_text), list(radii), digits


def _chart_view(certificate, chart):
    """The certificate's box without its chart coordinate."""
    keep = [j for j in range(len(certificate.center_text)) if j != chart]
    return _BoxView([certificate.center_text[j] for j in keep], [certificate.radii[j] for j in keep],
                    certificate.digits)


#: A point given in doubles stands for any number its rounding covers: this many units of 2^-52 of each
#: coordinate's modulus (a double's own rounding is half a unit; the rest is room for its decimal text).
_DOUBLE_ROUNDING = 2.0 ** -50


def _hull_view(box, point):
    """(a box with ``box``'s centre that also holds ``point`` and its double rounding, whether ``box`` holds them).

    A rank proved on the first box holds at the given point as well as at the point of X in ``box``.
    """
    with working_digits(_guarded(box.digits)):
        center = [_parse_center(v) for v in box.center_text]
        radii, holds = [], True
        for c, r, p in zip(center, box.radii, point):
            p = mpmath.mp.mpc(p)
            gap = max(abs(c.real - p.real), abs(c.imag - p.imag))
            slack = mpmath.mp.mpf(_DOUBLE_ROUNDING) * abs(p)
            holds = holds and gap <= mpmath.mp.mpf(r) + slack
            radii.append(_float_up(max(mpmath.mp.mpf(r), gap + slack)))
    return _BoxView(list(box.center_text), radii, box.digits), holds


def _box_around(point, digits):
    """A box of radius 10^-(digits - 3) times each coordinate's size around a point (no claim about it)."""
    with working_digits(_guarded(digits)):
        center = [mpmath.mp.mpc(v) for v in point]
        scales = _coordinate_scales(center, digits)
        radii = [_float_up(mpmath.mp.mpf(10) ** (-(digits - 3)) * s) for s in scales]
        return _BoxView([_text(c, digits) for c in center], radii, digits)
