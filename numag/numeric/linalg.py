"""Numerical linear algebra: scaled singular values, numerical rank, least squares at any precision.

A rank decision compares singular values with the *system's own scale at the
point*, not with the largest singular value: a hypersurface's Jacobian has a
single singular value, the very one being tested, so a rule relative to
sigma_1 could never call it zero. Row i of J is divided by the size of its
terms at the point (:class:`numag.numeric.evaluate.TermSizes`), which is what rounding
errors in it are proportional to. Columns are left alone: a column scale would
have to come from the point itself, and a column of J that vanishes exactly
(the thing being tested) has no scale; the units of the variables are set
beforehand, once per problem (:mod:`numag.numeric.scaling`).

Examples
--------
>>> import numpy as np
>>> jac = np.array([[[1e-12, 0.0]]])          # one point, one tiny row
>>> scales = np.array([[1e-12]])               # ... of an equation with tiny coefficients
>>> scaled_singular_values(jac, scales)
array([[1.]])
"""

from dataclasses import dataclass, field

import numpy as np

from ..errors import LimitError

__all__ = [
    "DOUBLE_DIGITS",
    "RankEvidence",
    "working_epsilon",
    "zero_tolerance",
    "scaled_singular_values",
    "numerical_rank",
    "singular_value_gap",
    "widest_gap_rank",
    "mp_singular_values",
    "mp_right_singular_vectors",
    "mp_least_squares",
    "batched_least_squares",
    "pivot_order",
]

#: Digits reported for IEEE double precision (53 bits is 15.95 decimal digits).
DOUBLE_DIGITS = 16
#: Tolerance factor: singular values below SAFETY * max(m, n) * eps count as zero.
_ZERO_SAFETY = 1000.0


def working_epsilon(digits):
    """Unit roundoff for ``digits`` decimal digits (the double value when ``digits`` is 16)."""
    if digits <= DOUBLE_DIGITS:
        return float(np.finfo(float).eps)
    return 10.0 ** (-digits)


def zero_tolerance(digits, shape):
    """Scaled singular values at or below this are zero at ``digits`` digits.

    Parameters
    ----------
    digits : int
        Working precision.
    shape : tuple of int
        Shape (m, n) of the Jacobian.

    Examples
    --------
    >>> zero_tolerance(16, (2, 3)) < 1e-11
    True
    """
    return _ZERO_SAFETY * max(shape) * working_epsilon(digits)


def scaled_singular_values(jacobians, row_scales):
    """Singular values of ``diag(1/row_scales) @ J`` for a stack of Jacobians.

    Parameters
    ----------
    jacobians : ndarray, shape (P, m, n)
    row_scales : ndarray, shape (P, m)

    Returns
    -------
    ndarray, shape (P, min(m, n)), descending.
    """
    scaled = jacobians / row_scales[:, :, None]
    return np.linalg.svd(scaled, compute_uv=False)


def numerical_rank(singular_values, tolerance):
    """Number of singular values above ``tolerance`` (last axis).

    Examples
    --------
    >>> numerical_rank(np.array([1.0, 0.5, 1e-15]), 1e-12)
    2
    """
    counts = np.sum(np.asarray(singular_values) > tolerance, axis=-1)
    return int(counts) if np.ndim(counts) == 0 else counts


def singular_value_gap(singular_values, rank):
    """``sigma_rank / sigma_(rank+1)`` (1-based): how clearly the kept values stand above the dropped.

    Returns ``inf`` when nothing was dropped or the first dropped value is 0,
    and ``None`` when nothing was kept (rank 0: there is no kept value to compare).
    """
    values = [float(v) for v in singular_values]
    if rank == 0:
        return None
    if rank >= len(values) or values[rank] == 0.0:
        return float("inf")
    return values[rank - 1] / values[rank]


def widest_gap_rank(values, zero, kept):
    """Numerical rank at the widest gap between a kept value (>= ``kept``) and a zero one (<= ``zero``).

    For values where genuine small ones (1e-8, from random coordinates) sit beside rounding-level ones
    (1e-13 and below): a fixed threshold between them would sit at an edge, the widest gap does not.
    With no such pair, the values above ``zero`` are kept.

    Returns
    -------
    rank : int
    width : float
        The gap's width in decades (inf when no value is zero or all are below ``kept``; 0 when no pair
        was found otherwise: the rank is unclear).

    Examples
    --------
    >>> widest_gap_rank(np.array([1.0, 1e-4, 7e-9, 1e-15, 1e-26]), 1e-6, 1e-11)
    (3, 6.845098040014257)
    """
    values = np.asarray(values, dtype=float)
    best, rank = 0.0, int(np.sum(values > zero))
    if rank == len(values):
        return rank, float("inf")
    for k in range(1, len(values)):
        if values[k] <= zero and values[k - 1] >= kept:
            width = float(np.log10(values[k - 1] / max(values[k], 1e-300)))
            if width > best:
                best, rank = width, k
    if best == 0.0 and np.all(values < kept):
        return 0, float("inf")  # every value at rounding level: all zero
    return rank, best


@dataclass
class RankEvidence:
    """Everything a rank decision rests on.

    Attributes
    ----------
    rank : int
        Numerical rank of the Jacobian.
    singular_values : ndarray of float
        Singular values of the row-scaled Jacobian, descending.
    row_scales : ndarray of float
        The scale each row was divided by.
    tolerance : float
        Scaled singular values at or below it count as zero.
    gap : float or None
        ``sigma_rank / sigma_(rank+1)`` (see :func:`singular_value_gap`).
    digits : int
        Decimal digits of the arithmetic that produced the values.
    escalated : bool
        True when the decision needed more than double precision or a refinement test.
    point : ndarray of complex
        The point the decision speaks about.
    """

    rank: int
    singular_values: np.ndarray
    row_scales: np.ndarray
    tolerance: float
    gap: object
    digits: int
    escalated: bool
    point: np.ndarray = field(repr=False)


# --- arbitrary precision ------------------------------------------------------------------------

def _svd(ctx, matrix, **options):
    """``ctx.svd_c`` that retries at higher working precision when its QR iteration does not converge.

    mpmath's iteration has a fixed count; on matrices with entries of very different sizes (a
    rank-drop system near a point where the rank drops further) it can run out. More digits
    separate the values; the results are returned at the caller's precision.
    """
    for extra in (0, 1, 2):
        try:
            if extra == 0:
                return ctx.svd_c(matrix, **options)
            with ctx.extradps(ctx.dps * extra):
                result = ctx.svd_c(matrix, **options)
            return tuple(+part for part in result) if isinstance(result, tuple) else +result
        except RuntimeError as error:
            last = error
    raise LimitError(f"the singular value decomposition did not converge at {3 * ctx.dps} digits ({last})")


def mp_singular_values(matrix, ctx):
    """Singular values (descending, as mpf) of an mpmath matrix."""
    if matrix.rows == 0 or matrix.cols == 0:
        return []
    values = _svd(ctx, matrix, compute_uv=False)
    return sorted((values[k] for k in range(values.rows)), reverse=True)


def mp_right_singular_vectors(matrix, ctx):
    """All right singular vectors of an mpmath matrix, as columns of an n x n matrix.

    Columns are ordered by descending singular value; the columns beyond
    min(m, n) span the kernel's complement-free part (singular value 0).
    """
    rows, cols = matrix.rows, matrix.cols
    if rows < cols:  # pad with zero rows so that the decomposition returns a full V
        padded = ctx.matrix(cols, cols)
        for i in range(rows):
            for j in range(cols):
                padded[i, j] = matrix[i, j]
        matrix = padded
    _, values, vh = _svd(ctx, matrix, full_matrices=True)
    order = sorted(range(values.rows), key=lambda k: -values[k])
    basis = ctx.matrix(cols, cols)
    for new, old in enumerate(order):
        for i in range(cols):
            basis[i, new] = ctx.conj(vh[old, i])
    return basis


#: The double-precision route of :func:`mp_least_squares` is taken when the smallest singular value (in
#: double) is at least this fraction of the largest: then no value is near the cut-off ``rcond`` (which
#: double precision could not place), and each refinement step gains about 10 digits (condition x 1e-16).
_DOUBLE_ROUTE_CONDITION = 1e-6


def _to_double(matrix):
    return np.array([[complex(matrix[i, j]) for j in range(matrix.cols)] for i in range(matrix.rows)],
                    dtype=complex)


def _refined_least_squares(matrix, rhs, ctx, rcond):
    """The minimum-norm least-squares solution at the precision of ``ctx`` from a double-precision SVD,
    or None where that route does not apply.

    Iterative refinement of the augmented system [I M; M^H 0] [r; z] = [c; d] (Bjorck 1967, "Iterative
    refinement of linear least squares solutions I", BIT 7): residuals in ``ctx``, corrections from the
    double SVD of M. With more rows than columns M = A, c = b, d = 0 and the answer is z (least squares);
    with fewer, M = A^H, c = 0, d = b and the answer is r (A r = b with r in the row space of A: the
    minimum-norm solution). For a matrix of full rank whose condition is below 1 / _DOUBLE_ROUTE_CONDITION
    both converge at the working precision to the solution :func:`mp_least_squares` defines (no singular
    value is cut off). Anything else (values near the cut-off, entries beyond double range, no
    convergence) returns None.
    """
    rows, cols = matrix.rows, matrix.cols
    if rows == 0 or cols == 0:
        return None
    tall = rows >= cols
    tall_matrix = matrix if tall else matrix.H
    dense = _to_double(tall_matrix)
    if not np.all(np.isfinite(dense)):
        return None
    u, values, vh = np.linalg.svd(dense, full_matrices=False)
    if values[0] == 0 or values[-1] < max(_DOUBLE_ROUTE_CONDITION, 1e3 * float(rcond)) * values[0]:
        return None
    v, uh = vh.conj().T, u.conj().T
    long_side, short_side = dense.shape

    def correction(f, g):
        # dr + M dz = f, M^H dr = g, with M = U S V^H: U^H dr = S^-1 V^H g, the rest of dr is f's part
        # outside range(U), and S V^H dz = U^H f - U^H dr.
        inside = (vh @ g) / values
        along = uh @ f
        return f - u @ along + u @ inside, v @ ((along - inside) / values)

    def to_ctx(vector):
        return ctx.matrix([ctx.mpc(complex(entry)) for entry in vector])

    adjoint = tall_matrix.H
    c = rhs if tall else ctx.matrix(long_side, 1)
    d = ctx.matrix(short_side, 1) if tall else rhs
    r, z = ctx.matrix(long_side, 1), ctx.matrix(short_side, 1)
    # Each pass gains about -log10(condition * 1e-16) >= 10 digits; a few spare passes.
    for _ in range(int(ctx.dps) // 8 + 4):
        f = c - r - tall_matrix * z
        g = d - adjoint * r
        # scaled to about 1 before rounding: residuals at 100 digits lie far below double's range
        scale = max(ctx.norm(f), ctx.norm(g))
        if scale == 0:
            return z if tall else r
        f_double = np.array([complex(f[i] / scale) for i in range(long_side)])
        g_double = np.array([complex(g[j] / scale) for j in range(short_side)])
        dr, dz = correction(f_double, g_double)
        dr, dz = to_ctx(dr) * scale, to_ctx(dz) * scale
        r += dr
        z += dz
        answer, change = (z, dz) if tall else (r, dr)
        if ctx.norm(change) <= 4 * ctx.eps * ctx.norm(answer):
            return answer
    return None


def mp_least_squares(matrix, rhs, ctx, rcond):
    """Minimum-norm least-squares solution of ``matrix @ x = rhs`` through the SVD.

    Singular values below ``rcond * sigma_1`` are treated as zero, so the step
    stays finite at rank-deficient points (where refinement near singular
    points happens). A well-conditioned matrix of full column rank is solved from numpy's SVD with
    refinement at the working precision (:func:`_refined_least_squares`; the same solution, some hundred
    times faster than mpmath's pure-Python SVD); the others through mpmath's SVD.

    Examples
    --------
    >>> import mpmath
    >>> with mpmath.mp.workdps(40):
    ...     x = mp_least_squares(mpmath.matrix([[1, 0], [0, 3], [0, 0]]), mpmath.matrix([1, 1, 1]),
    ...                          mpmath.mp, rcond=mpmath.mpf(10) ** -30)
    ...     print(mpmath.nstr(x[1].real, 35))
    0.33333333333333333333333333333333333
    """
    refined = _refined_least_squares(matrix, rhs, ctx, rcond)
    if refined is not None:
        return refined
    rows, cols = matrix.rows, matrix.cols
    u, values, vh = _svd(ctx, matrix, full_matrices=False)
    top = max((values[k] for k in range(values.rows)), default=ctx.mpf(0))
    solution = ctx.matrix(cols, 1)
    if top == 0:
        return solution
    for k in range(values.rows):
        if values[k] <= rcond * top:
            continue
        coefficient = ctx.mpc(0)
        for i in range(rows):
            coefficient += ctx.conj(u[i, k]) * rhs[i]
        coefficient /= values[k]
        for j in range(cols):
            solution[j] += ctx.conj(vh[k, j]) * coefficient
    return solution


def batched_least_squares(matrices, rhs, rcond=1e-12):
    """Minimum-norm least-squares solutions for a stack of systems (double precision).

    Parameters
    ----------
    matrices : ndarray, shape (P, m, n)
    rhs : ndarray, shape (P, m)
    rcond : float
        Relative cut-off for small singular values.

    Returns
    -------
    ndarray, shape (P, n)
    """
    pseudo_inverse = np.linalg.pinv(matrices, rcond=rcond)
    return np.einsum("pnm,pm->pn", pseudo_inverse, rhs)


def pivot_order(matrix):
    """Column order of a QR factorisation with column pivoting: the most independent columns first.

    Parameters
    ----------
    matrix : ndarray, shape (m, n)

    Returns
    -------
    ndarray of int, shape (n,)

    Examples
    --------
    >>> pivot_order(np.array([[0.0, 1.0, 0.0], [0.0, 0.0, 2.0]])).tolist()
    [2, 1, 0]
    """
    import scipy.linalg  # imported where used: `import numag` and `numag --help` stay fast

    return scipy.linalg.qr(matrix, pivoting=True, mode="r")[1]
