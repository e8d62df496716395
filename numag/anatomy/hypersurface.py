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
from ..certify.rank import local_dual_dimension
from .records import Family, HessianEvidence, HypersurfaceAnatomy, SingularityType, TypeTest

__all__ = ["hessian_evidence", "kernel_cubic", "hypersurface_anatomy", "HESSIAN_ZERO", "max_dual_order"]

#: Scaled Hessian singular values: zero ones at most 1e-7 (points good to about 13 digits), kept ones at
#: least 1e-11 (in random coordinates the terms of f at the point cancel: a genuine value of 1e-8 is seen),
#: split at the widest gap, which must span 3 decades or the rank is unclear (type undecided).
HESSIAN_ZERO = 1e-7
_KEPT = 1e-11
_CLEAR_DECADES = 3.0
#: |covariant| / |cubic|^2 at or below this: the cubic is a cube (0 exactly for a cube, 1/9 or more
#: after normalisation for a double root; rounding puts about 1e-12 on a cube).
_CUBE = 1e-6
#: The cubic counts as vanishing when its coefficients are this small against the restricted f's.
_CUBIC_ZERO = 1e-8


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


def kernel_cubic(polynomial, point, kernel):
    """The cubic term of f at the point along the kernel: coefficients of u^3, u^2 v, u v^2, v^3.

    Returns
    -------
    cubic : ndarray, shape (4,)
    size : float
        The largest coefficient of f restricted to the kernel plane (the cubic's yardstick).
    """
    restricted = polynomial.numeric().substitute_linear(kernel, point)
    cubic = np.zeros(4, dtype=complex)
    for exponent, value in zip(restricted.exponents, restricted.numeric_coefficients()):
        if exponent[0] + exponent[1] == 3:
            cubic[int(exponent[1])] += value
    size = float(np.max(np.abs(restricted.numeric_coefficients()), initial=0.0))
    return cubic, size


def cubic_degeneracy(cubic):
    """|Hessian covariant| / |cubic|^2 of a binary cubic: 0 exactly when it is the cube of a linear form.

    Examples
    --------
    >>> round(cubic_degeneracy(np.array([1, 0, 0, 0])), 12)    # u^3
    0.0
    >>> cubic_degeneracy(np.array([0, 1, 0, 0])) > 0.1        # u^2 v (a double root)
    True
    """
    a, b, c, d = cubic
    covariant = np.array([3 * a * c - b * b, 9 * a * d - b * c, 3 * b * d - c * c])
    return float(np.linalg.norm(covariant) / np.linalg.norm(cubic) ** 2)


def hypersurface_anatomy(polynomial, point):
    """Corank, mu, tau and Arnold's type of f = 0 at a singular point (balanced units).

    Parameters
    ----------
    polynomial : Polynomial
    point : array_like of complex

    Returns
    -------
    HypersurfaceAnatomy

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["x^3 + y^4"], ["x", "y"]).polynomials[0]
    >>> result = hypersurface_anatomy(f, [0, 0])
    >>> result.type.label, result.milnor, result.tjurina, result.decided_by.name
    ('E6', 6, 6, 'CUBIC_TRIPLE_ROOT')
    """
    point = np.asarray(point, dtype=complex)
    n = polynomial.n_variables
    evidence, kernel, unclear = hessian_evidence(polynomial, point)
    corank = n - evidence.rank
    # f and grad f vanish at the point; their rounding-size values there are removed, so that the
    # point is an exact zero of the ideals whose local dual spaces are counted
    vanishing = [q.numeric() - complex(q.numeric().evaluate(point)) for q in [polynomial] + polynomial.gradient()]
    order = max_dual_order(n)
    mu = local_dual_dimension(vanishing[1:], point, order)
    tau = local_dual_dimension(vanishing, point, order)
    quasi = None if mu is None or tau is None else mu == tau
    degeneracy = None

    def result(family, index, test):
        return HypersurfaceAnatomy(corank, evidence, mu, tau, quasi, SingularityType(family, index), test,
                                   degeneracy)

    if unclear:
        return result(Family.UNDECIDED, None, TypeTest.UNCLEAR_RANK)
    if mu is None:
        return result(Family.NOT_ISOLATED, None, TypeTest.MILNOR_INFINITE)
    if mu < 2 ** corank:  # the Milnor number of a corank-c point is at least 2^c
        return result(Family.UNDECIDED, None, TypeTest.INCONSISTENT)
    if corank == 0:
        return result(Family.A, 1, TypeTest.HESSIAN_FULL_RANK)
    if corank == 1:
        return result(Family.A, mu, TypeTest.CORANK_ONE)
    if corank >= 3:
        return result(Family.NOT_SIMPLE, None, TypeTest.CORANK_THREE_OR_MORE)
    cubic, size = kernel_cubic(polynomial, point, kernel)
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
        return result(Family.D, 4, TypeTest.CUBIC_THREE_ROOTS)
    return result(Family.D, mu, TypeTest.CUBIC_DOUBLE_ROOT)
