"""Invariants of an isolated hypersurface singularity: Hessian corank, Milnor and Tjurina numbers, type.

* The Hessian's rank: singular values of the Hessian with each row divided by the size of its terms at
  the point (the gradient's :class:`~numag.numeric.evaluate.TermSizes`), as for the Jacobian, split into
  kept and zero ones at their widest gap (:func:`~numag.numeric.linalg.widest_gap_rank`); a gap narrower
  than 3 decades leaves the rank unclear (no decision at the edge).
* mu = dim of the local dual space of (grad f) at the point, tau the same for (f, grad f) (Dayton and
  Zeng 2005, the Macaulay matrices of :func:`numag.certify.rank.local_dual_dimension`); mu = tau exactly
  when f is quasi-homogeneous in suitable local coordinates (Saito 1971).
* The type by Arnold's determinator of the simple singularities (Arnold 1972): corank 0 is A1; corank 1
  is A_mu; corank 2 is decided by the cubic term on the Hessian's kernel (the 3-jet of the residual
  function of the splitting lemma): three distinct roots D4 (mu = 4), a double root D_mu, a cube E6,
  E7, E8 by mu (mu > 8: not simple, J10 and beyond), a vanishing cubic not simple; corank 3 or more is
  not simple. mu enters as an integer, so no decision rests on a threshold except the two below.
"""

import numpy as np

from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..numeric.linalg import singular_value_gap, widest_gap_rank
from ..certify.rank import local_dual_evidence
from .frame import cubic_degeneracy, cubic_root_spread, kernel_cubic, local_frame
from .records import Family, HessianEvidence, HypersurfaceAnatomy, SingularityType, TypeTest

__all__ = ["hessian_evidence", "kernel_cubic", "hypersurface_anatomy", "anatomy_in_frame", "HESSIAN_ZERO", "max_dual_order"]

#: Scaled Hessian singular values: zero ones at most 1e-7 (points good to about 13 digits), kept ones at
#: least 1e-11 (in random coordinates the terms of f at the point cancel: a genuine value of 1e-8 is seen),
#: split at the widest gap, which must span 3 decades or the rank is unclear (type undecided).
HESSIAN_ZERO = 1e-7
_KEPT = 1e-11
_CLEAR_DECADES = 3.0
#: |covariant| / |cubic|^2 at or below this: the cubic is a cube (0 exactly for a cube, 1/9 or more
#: after normalisation for a double root; rounding puts about 1e-12 on a cube).
_CUBE = 1e-6
#: Terms of f's Taylor expansion in the frame at most these times their term sizes are dropped as rounding:
#: mu and tau are counted at both levels and must agree (about 450 and 4.5 units of rounding).
_ROUNDING_LEVELS = (1e-13, 1e-15)
#: The frame's rounding level (relative to its largest Taylor coefficient) below which an infinite mu is
#: reported as a non-isolated singularity rather than undecided.
_NOISE_FOR_INFINITE = 1e-8
#: D4 is reported when the kernel cubic's unit root directions are at least this far apart (|det|) in the frame.
_DISTINCT_ROOTS = 1e-2
#: The cubic counts as vanishing when its coefficients are this small against the restricted f's.
_CUBIC_ZERO = 1e-8


def _real_at(polynomial, point):
    """f has real coefficients and the point is real (the frame can be real)."""
    return bool(np.all(np.asarray(polynomial.numeric_coefficients()).imag == 0)
                and np.all(np.asarray(point, dtype=complex).imag == 0))


def max_dual_order(n):
    """Highest order of the local dual spaces tried in n variables (14 in the plane, 10 in space, then 8):
    A_k needs order k; the Macaulay matrices grow like order^n."""
    return 14 if n <= 2 else (10 if n == 3 else 8)


def hessian_evidence(polynomial, point):
    """Scaled singular values of the Hessian of f at a point, its numerical rank and the kernel.

    Returns
    -------
    HessianEvidence
    kernel : ndarray, shape (n, corank)
        Right singular vectors of the zero values (orthonormal columns).
    unclear : bool
        A value lies in the band where zero and non-zero cannot be told apart.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["x^2 + y^3"], ["x", "y"]).polynomials[0]
    >>> evidence, kernel, unclear = hessian_evidence(f, np.zeros(2))
    >>> evidence.rank, kernel.shape, unclear
    (1, (2, 1), False)
    """
    gradient = [g.numeric() for g in polynomial.gradient()]
    n = polynomial.n_variables
    nonzero = [g for g in gradient if not g.is_zero()]
    point = np.asarray(point, dtype=complex)[None, :]
    if not nonzero:
        evidence = HessianEvidence(0, [0.0] * n, HESSIAN_ZERO, None)
        return evidence, np.eye(n, dtype=complex), False
    hessian = np.zeros((n, n), dtype=complex)
    scales = np.ones(n)
    rows = [k for k, g in enumerate(gradient) if not g.is_zero()]
    _, jacobian = BatchEvaluator(nonzero).evaluate(point)
    sizes = TermSizes(nonzero).gradients(point)[0]
    hessian[rows] = jacobian[0]
    scales[rows] = np.where(sizes > 0, sizes, 1.0)
    _, values, right = np.linalg.svd(hessian / scales[:, None])
    rank, width = widest_gap_rank(values, HESSIAN_ZERO, _KEPT)
    unclear = width < _CLEAR_DECADES
    evidence = HessianEvidence(rank, [float(v) for v in values], HESSIAN_ZERO, singular_value_gap(values, rank))
    return evidence, right[rank:].conj().T, unclear


def hypersurface_anatomy(polynomial, point):
    """Corank, mu, tau and Arnold's type of f = 0 at a singular point (balanced units).

    See :func:`anatomy_in_frame`, which also returns the local frame.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["x^3 + y^4"], ["x", "y"]).polynomials[0]
    >>> result = hypersurface_anatomy(f, [0, 0])
    >>> result.type.label, result.milnor, result.tjurina, result.decided_by.name
    ('E6', 6, 6, 'CUBIC_TRIPLE_ROOT')
    """
    return anatomy_in_frame(polynomial, point)[0]


def anatomy_in_frame(polynomial, point):
    """Corank, mu, tau and Arnold's type of f = 0 at a singular point (balanced units).

    Parameters
    ----------
    polynomial : Polynomial
    point : array_like of complex

    Returns
    -------
    HypersurfaceAnatomy
    LocalFrame
        The frame the invariants were computed in (the local picture uses it too).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["x^3 + y^4"], ["x", "y"]).polynomials[0]
    >>> result, frame = anatomy_in_frame(f, [0, 0])
    >>> result.type.label, frame.polynomial.n_variables
    ('E6', 2)
    """
    point = np.asarray(point, dtype=complex)
    n = polynomial.n_variables
    evidence, kernel, unclear = hessian_evidence(polynomial, point)
    corank = n - evidence.rank
    # mu, tau and the kernel cubic in the local frame (invariant under the linear change, and in units of
    # the singularity's own scale); u = 0 is an exact zero of g and its gradient there. Twice: with the
    # terms near rounding level dropped and kept; a count that differs rests on rounding (out of reach).
    real = _real_at(polynomial, point)
    counts = []
    for level in _ROUNDING_LEVELS:
        frame = local_frame(polynomial, point, evidence.rank, real=real, rounding_level=level)
        g = frame.polynomial
        origin = np.zeros(n, dtype=complex)
        gradient = [q.numeric() for q in g.gradient()]
        mu, mu_width = local_dual_evidence(gradient, origin, max_dual_order(n))
        tau, tau_width = local_dual_evidence([g] + gradient, origin, max_dual_order(n))
        counts.append((mu, tau, min(mu_width, tau_width)))
        if level == _ROUNDING_LEVELS[0]:
            primary = frame
    frame = primary
    g = frame.polynomial
    mu, tau, width = counts[0]
    stable = all(c[:2] == (mu, tau) for c in counts)
    width = min(c[2] for c in counts)
    quasi = None if mu is None or tau is None else mu == tau
    degeneracy = None

    def result(family, index, test):
        return HypersurfaceAnatomy(corank, evidence, mu, tau, quasi, SingularityType(family, index), test,
                                   degeneracy, frame.condition, frame.noise_up_to((mu or 0) + 1)), frame

    if unclear:
        return result(Family.UNDECIDED, None, TypeTest.UNCLEAR_RANK)
    if not stable:
        return result(Family.UNDECIDED, None, TypeTest.BEYOND_PRECISION)
    if width < _CLEAR_DECADES:
        # a Macaulay matrix without a clear gap: its count, and "infinite", cannot be trusted
        return result(Family.UNDECIDED, None, TypeTest.UNCLEAR_DUAL)
    if mu is None:
        # an infinite count is also what a genuine term dropped as rounding leaves behind (y^2 - x^7 after a
        # change of condition 1e3): claimed only when the frame's rounding level is far below every term
        if frame.noise > _NOISE_FOR_INFINITE:
            return result(Family.UNDECIDED, None, TypeTest.BEYOND_PRECISION)
        return result(Family.NOT_ISOLATED, None, TypeTest.MILNOR_INFINITE)
    if mu < 2 ** corank:  # the Milnor number of a corank-c point is at least 2^c
        return result(Family.UNDECIDED, None, TypeTest.INCONSISTENT)
    if corank == 0:
        return result(Family.A, 1, TypeTest.HESSIAN_FULL_RANK)
    if corank == 1:
        # f ~ Q(u - r(v)) + phi(v) with ord phi = mu + 1 and ord Q(r(v)) >= 4: the restriction to the kernel
        # axis has order at most mu + 1 unless two leading terms cancel. None at all: a genuine kernel term
        # was dropped as rounding (y^2 - x^6 after a change of condition 1e3 read as A9), out of reach.
        pure = [int(e[-1]) for e, c in zip(g.exponents, g.numeric_coefficients()) if not np.any(e[:-1]) and c != 0]
        if not pure or min(pure) > mu + 1:
            return result(Family.UNDECIDED, None, TypeTest.BEYOND_PRECISION)
        return result(Family.A, mu, TypeTest.CORANK_ONE)
    if corank >= 3:
        return result(Family.NOT_SIMPLE, None, TypeTest.CORANK_THREE_OR_MORE)
    cubic, size = kernel_cubic(g, origin, np.eye(n)[:, evidence.rank:])
    if np.linalg.norm(cubic) <= _CUBIC_ZERO * max(size, 1e-300):
        return result(Family.NOT_SIMPLE, None, TypeTest.CUBIC_VANISHES)
    degeneracy = cubic_degeneracy(cubic)
    if degeneracy <= _CUBE:
        if mu in (6, 7, 8):
            return result(Family.E, mu, TypeTest.CUBIC_TRIPLE_ROOT)
        if mu > 8:
            return result(Family.NOT_SIMPLE, None, TypeTest.CUBIC_TRIPLE_ROOT_LARGE_MU)
        return result(Family.UNDECIDED, None, TypeTest.INCONSISTENT)
    if mu == 4:
        # three distinct roots must be seen as such: a double root split by rounding (D6 after a change of
        # condition 1e3) also gives three roots and a small count; in the frame D4's roots are far apart
        if cubic_root_spread(cubic) < _DISTINCT_ROOTS:
            return result(Family.UNDECIDED, None, TypeTest.CUBIC_ROOTS_CLOSE)
        return result(Family.D, 4, TypeTest.CUBIC_THREE_ROOTS)
    return result(Family.D, mu, TypeTest.CUBIC_DOUBLE_ROOT)
