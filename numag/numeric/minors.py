"""Minors of the Jacobian: evaluated (never expanded) for numerical work, expanded only when exact input needs it.

The equations "rank J(x) < c" are c x c minors of J, or random combinations of them written
g(x) = det(A J(x) B) with A (c x m) and B (n x c). Expanding such a determinant into a polynomial multiplies
polynomials c times: a random 4 x 4 minor of a modest system has hundreds of thousands of terms. Numerical
work needs only values and gradients, and both come from the evaluated Jacobian:

* the value is det(M) with M = A J(x) B, a c x c matrix of numbers;
* the gradient is Jacobi's formula, d det M / dx_l = tr(adj(M) A (dJ/dx_l) B), with dJ/dx_l from the
  second derivatives of F (sparse polynomials, evaluated in one batch) and the adjugate taken from the
  singular value decomposition, so that a singular M (on the very set the minors describe) is fine.

:class:`EvaluatedMinors` does this in double precision over many points at once and in an mpmath context at
one point (precision rescue, intervals for certification). :class:`AugmentedEvaluator` puts F and evaluated
minors side by side behind the interface of :class:`~numag.numeric.evaluate.BatchEvaluator`, so that a
homotopy can target "F plus evaluated minors". :func:`expanded_minors` is the one symbolic builder, used where
exact input needs exact equations (certificates) and where the expansion is small.

Examples
--------
>>> import numpy as np
>>> from numag.system.parse import parse_system
>>> system = parse_system(["x^2*y - z^3", "x + y + z"], ["x", "y", "z"])
>>> minors = EvaluatedMinors(system.polynomials, left=[np.eye(2)], right=[np.eye(3)[:, :2]])
>>> point = np.array([[1.0, 2.0, 3.0]])
>>> values, gradients = minors.evaluate(point)
>>> float(values[0, 0].real)      # det [[2xy, x^2], [1, 1]] = 2xy - x^2
3.0
>>> gradients[0, 0].real          # (2y - 2x, 2x, 0)
array([2., 2., 0.])
>>> minors.degrees
[2]
"""

import copy
import itertools
import math

import numpy as np

from ..errors import InputError
from ..system.exact import ExactCoefficient
from ..system.polynomial import DEFAULT_LIMITS, Polynomial, PolynomialSystem, combined_minor, determinant
from .evaluate import BatchEvaluator, PrecisionEvaluator, TermSizes

__all__ = ["generic_gradients", "AugmentedEvaluator", "CombinedRows", "EvaluatedMinors", "LinearFormProduct", "MinorWeights", "MinorsSystem",
           "degree_lowering_directions", "directional_gradients", "equation_evaluator", "expanded_minors",
           "kernel_deflation", "random_minor_weights", "split_equations"]


class MinorWeights:
    """How the minors of a Jacobian are combined: the pairs (A_k, B_k) of g_k = det(A_k J B_k).

    Parameters
    ----------
    left : array_like, shape (K, c, m)
    right : array_like, shape (K, n, c)
    complete : bool
        True when the pairs select every c x c minor (0/1 rows and columns), False for random combinations.
    """

    def __init__(self, left, right, complete):
        self.left = np.asarray(left)
        self.right = np.asarray(right)
        if self.left.ndim != 3 or self.right.ndim != 3 or len(self.left) != len(self.right) \
                or self.left.shape[1] != self.right.shape[2]:
            raise InputError(f"minor weights of shapes {self.left.shape} and {self.right.shape} do not match")
        self.complete = bool(complete)

    @property
    def count(self):
        """Number of minors K."""
        return len(self.left)

    @property
    def size(self):
        """Size c of the minors."""
        return self.left.shape[1]


def random_minor_weights(m, n, size, max_minors, rng, exact=False, count=None, keep_rows=False):
    """Every size x size minor of an m x n Jacobian when there are at most ``max_minors``, else random ones.

    Parameters
    ----------
    m, n : int
        Rows (equations) and columns (variables) of J.
    size : int
    max_minors : int
        All minors up to this many; beyond, ``count`` (default n - size + 1) random combinations.
    rng : numpy.random.Generator
    exact : bool, default False
        Small non-zero integer weights (combinations of exact polynomials stay exact) instead of complex
        Gaussian ones.
    count : int, optional
    keep_rows : bool, default False
        When size = m, take A = identity: det(A J B) = det(A) det(J B) has the same zeros, and its degree is
        the sum of the row degrees instead of size times the largest one (fewer paths).

    Returns
    -------
    MinorWeights

    Examples
    --------
    >>> weights = random_minor_weights(2, 3, 2, 10, np.random.default_rng(0))
    >>> weights.count, weights.complete, weights.left.shape, weights.right.shape
    (3, True, (3, 2, 2), (3, 3, 2))
    """
    if not 1 <= size <= min(m, n):
        raise InputError(f"minors of size {size} do not exist in a {m} x {n} Jacobian")
    if math.comb(m, size) * math.comb(n, size) <= max_minors:
        rows, cols = np.eye(m, dtype=np.int64), np.eye(n, dtype=np.int64)
        pairs = [(rows[list(r)], cols[:, list(c)]) for r in itertools.combinations(range(m), size)
                 for c in itertools.combinations(range(n), size)]
        return MinorWeights([a for a, _ in pairs], [b for _, b in pairs], True)
    count = n - size + 1 if count is None else count
    left, right = [], []
    for _ in range(count):  # drawn pair by pair: the stream of the generator does not depend on ``count``
        if keep_rows and size == m:
            left.append(np.eye(m, dtype=np.int64))
            right.append(_integer_weights(rng, (n, size)) if exact else
                         rng.standard_normal((n, size)) + 1j * rng.standard_normal((n, size)))
        elif exact:
            left.append(_integer_weights(rng, (size, m)))
            right.append(_integer_weights(rng, (n, size)))
        else:
            left.append(rng.standard_normal((size, m)) + 1j * rng.standard_normal((size, m)))
            right.append(rng.standard_normal((n, size)) + 1j * rng.standard_normal((n, size)))
    return MinorWeights(left, right, False)


def _integer_weights(rng, shape):
    """Small non-zero integer weights: random combinations that stay exact."""
    values = rng.integers(1, 6, size=shape) * rng.choice([-1, 1], size=shape)
    return values.astype(np.int64)


def _derivative_rows(polynomial, n, depth):
    """For each t < depth, the exact matrix v -> coefficients of d/dv of the degree (d - t) part of ``polynomial``.

    Rows are the monomials of the derivative (lists of ``ExactCoefficient``), columns the first ``n`` variables.
    """
    zero = ExactCoefficient.zero()
    degrees = polynomial.exponents.sum(axis=1)
    matrices = []
    for t in range(depth):
        part = degrees == polynomial.degree - t
        rows = {}
        for exponent, coefficient in zip(polynomial.exponents[part], polynomial.coefficients[part]):
            for j in range(n):
                if exponent[j] == 0:
                    continue
                lowered = exponent.copy()
                lowered[j] -= 1
                row = rows.setdefault(tuple(lowered), [zero] * n)
                row[j] = row[j] + coefficient * ExactCoefficient.rational(int(exponent[j]))
        matrices.append(list(rows.values()))
    return matrices


def _echelon(rows, n):
    """Reduced row echelon form over the exact numbers: (rows, pivot columns)."""
    rows = [list(r) for r in rows]
    pivots = []
    for column in range(n):
        top = len(pivots)
        found = next((k for k in range(top, len(rows)) if not rows[k][column].is_zero()), None)
        if found is None:
            continue
        rows[top], rows[found] = rows[found], rows[top]
        inverse = rows[top][column].reciprocal()
        rows[top] = [value * inverse for value in rows[top]]
        for k in range(len(rows)):
            if k != top and not rows[k][column].is_zero():
                factor = rows[k][column]
                rows[k] = [a - factor * b for a, b in zip(rows[k], rows[top])]
        pivots.append(column)
    return rows[:len(pivots)], pivots


def _exact_kernel(rows, n):
    """A basis (exact vectors) of the directions every row annihilates."""
    reduced, pivots = _echelon(rows, n)
    one, zero = ExactCoefficient.rational(1), ExactCoefficient.zero()
    basis = []
    for free in (c for c in range(n) if c not in pivots):
        vector = [zero] * n
        vector[free] = one
        for row, pivot in zip(reduced, pivots):
            vector[pivot] = -row[free]
        basis.append(vector)
    return basis


def degree_lowering_directions(polynomials, n=None):
    """Directions v along which the derivatives of F lose the most degree, as the columns of an invertible matrix.

    The derivative of f along v drops below degree d - 1 exactly when v annihilates f's top homogeneous
    part, and further when it annihilates the next parts too. These directions belong to X, not to the
    coordinates: a curve whose top part is a power of a linear form has them whatever linear change of
    coordinates the user applied. Taking the Jacobian along them (J B instead of J; the minors of J B
    span the same equations as those of J, B being invertible) keeps the low degrees that good
    coordinates happen to give, and so keeps paths away from infinity: in general coordinates the minors
    of a curve with a very singular point at infinity send most paths there, with winding numbers of 6 to
    30 that double precision cannot resolve, and the affine singular points were lost (decision 0063).

    Exact input only (the kernels are computed exactly, so a derivative's vanishing parts are exactly
    zero and no threshold decides them). Directions are taken deepest first: those annihilating the most
    parts of every equation, then, for each equation, those annihilating the most of its own parts, then
    unit vectors to complete the basis.

    Parameters
    ----------
    polynomials : sequence of Polynomial
    n : int, optional
        Directions in the first ``n`` variables (all by default).

    Returns
    -------
    B : list of list of ExactCoefficient, or None
        The directions (each a list of n coordinates); None when no direction lowers a degree or the
        input is not exact (then the Jacobian itself is used).
    levels : ndarray of int, shape (len(polynomials), n), or None
        For each equation and direction, how many top parts the direction annihilates: the derivative
        along it has degree at most d - 1 - level.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["(x + 2*y)^3 - x"], ["x", "y"])     # top part a cube of x + 2y
    >>> B, levels = degree_lowering_directions(system.polynomials)
    >>> [complex(c).real for c in B[0]], levels[0].tolist()       # along (-2, 1): x + 2y is constant
    ([-2.0, 1.0], [2, 0])
    """
    polynomials = [p for p in polynomials if not p.is_zero()]
    if not polynomials or not all(p.is_exact for p in polynomials):
        return None, None
    n = polynomials[0].n_variables if n is None else int(n)
    rows = [_derivative_rows(p, n, p.degree) for p in polynomials]
    chosen = []

    def add(vectors):
        for vector in vectors:
            if len(_echelon(chosen + [vector], n)[1]) > len(chosen):
                chosen.append(vector)

    kernels = {}

    def kernel(equations, level):
        # The rows of a level hold those of every shallower level, so its kernel lies in theirs: where a shallower
        # kernel is empty, so is this one, and the same rows (one equation alone, or an equation met twice) give the
        # same kernel. Both only spare work: the directions are those of every kernel computed in full.
        key = (tuple(equations), level)
        if key not in kernels:
            shallower = kernels.get((key[0], level - 1))
            kernels[key] = [] if shallower is not None and not shallower else _exact_kernel(
                [r for k in equations for m in rows[k][:level] for r in m], n)
        return kernels[key]

    def deepest_first(equations, depth):
        for level in range(1, depth + 1):  # shallowest first, so that an empty kernel spares the deeper ones
            kernel(equations, level)
        for level in range(depth, 0, -1):
            add(kernel(equations, level))

    deepest_first(tuple(range(len(polynomials))), max(p.degree for p in polynomials))  # common to every equation
    for k, p in enumerate(polynomials):  # then each equation's own
        deepest_first((k,), p.degree)
    if not chosen:
        return None, None
    one, zero = ExactCoefficient.rational(1), ExactCoefficient.zero()
    add([[one if i == j else zero for i in range(n)] for j in range(n)])
    levels = np.zeros((len(polynomials), n), dtype=np.int64)
    for k, matrices in enumerate(rows):
        for column, vector in enumerate(chosen):
            for matrix in matrices:  # the top parts, without a gap
                if any(not sum((a * b for a, b in zip(row, vector)), zero).is_zero() for row in matrix):
                    break
                levels[k, column] += 1
    return chosen, levels


def directional_gradients(polynomials, directions):
    """The derivatives of each (exact) polynomial along each direction, exactly, then as numeric polynomials.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["(x + 2*y)^3 - x"], ["x", "y"])
    >>> B, levels = degree_lowering_directions(system.polynomials)
    >>> [g.degree for g in directional_gradients(system.polynomials, B)[0]]
    [0, 2]
    """
    result = []
    for p in polynomials:
        partials = [p.derivative(j) for j in range(len(directions[0]))]
        row = []
        for vector in directions:
            combined = Polynomial.zero(p.n_variables)
            for partial, weight in zip(partials, vector):
                if not weight.is_zero() and not partial.is_zero():
                    combined = combined + partial * Polynomial.constant(weight, p.n_variables)
            row.append(combined.numeric())
        result.append(row)
    return result


def generic_gradients(polynomials, n=None, rng=None):
    """The Jacobian along directions free of the coordinates: those that lower degrees, then random ones.

    All first partials of F (the complete 1 x 1 minors) span what the gradient along any basis spans, but
    the equation-by-equation regeneration meets them one after the other, and the sets it passes through,
    V(f, df/dx_1, ..., df/dx_k), belong to the coordinates. Coordinates in which the partials factor or
    share points at infinity (T_7(x) + T_7(x + y) + T_7(x + y + z) + 1: d/dz is a product of six planes, and
    the curve of two partials is six copies of one plane curve through six common points at infinity)
    make those sets singular, and regeneration paths stalled there at the minimum step (decision 0119).
    Along random directions the intermediate sets are generic polar sets, smooth away from the zeros of
    the whole gradient (Bertini). The directions that lower degrees (:func:`degree_lowering_directions`,
    decision 0063) are kept: they belong to X, not to the coordinates; only the unit vectors that complete
    them are replaced by random complex directions (independent of them with probability 1).

    Parameters
    ----------
    polynomials : sequence of Polynomial
    n : int, optional
        Directions in the first ``n`` variables (all by default).
    rng : numpy.random.Generator

    Returns
    -------
    list of list of Polynomial
        Per equation, its (numeric) derivatives along the n directions, for ``expanded_minors(gradients=...)``.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["(x + 2*y)^3 - x"], ["x", "y"])
    >>> rows = generic_gradients(system.polynomials, rng=np.random.default_rng(0))
    >>> sorted(g.degree for g in rows[0])      # the lowering direction (-2, 1) kept, one random direction
    [0, 2]
    """
    polynomials = list(polynomials)
    n = polynomials[0].n_variables if n is None else int(n)
    directions, levels = degree_lowering_directions(polynomials, n)
    kept = [] if directions is None else [v for column, v in enumerate(directions) if np.any(levels[:, column] > 0)]
    exact = directional_gradients(polynomials, kept) if kept else [[] for _ in polynomials]
    weights = rng.standard_normal((n - len(kept), n)) + 1j * rng.standard_normal((n - len(kept), n))
    result = []
    for p, row in zip(polynomials, exact):
        partials = [p.derivative(j).numeric() for j in range(n)]
        for vector in weights:
            combined = Polynomial.zero(p.n_variables)
            for partial, weight in zip(partials, vector):
                if not partial.is_zero():
                    combined = combined + partial * Polynomial.constant(complex(weight), p.n_variables)
            row = row + [combined]
        result.append(row)
    return result


def expanded_minors(polynomials, weights, limits=DEFAULT_LIMITS, normalize=False, gradients=None):
    """The minors det(A_k J B_k) written out as polynomials (exact weights keep exact input exact).

    Use it where exact equations are needed (exact certificates) or the expansion is small; numerical work
    takes :class:`EvaluatedMinors`. Zero minors are left out. The expansion is refused with ``LimitError``
    beyond ``limits``.

    Parameters
    ----------
    polynomials : sequence of Polynomial
        F, m polynomials in n variables.
    weights : MinorWeights
    limits : Limits
    normalize : bool, default False
        Divide each minor by its coefficient norm (numeric polynomials).
    gradients : list of list of Polynomial, optional
        The Jacobian's entries to use instead of the partial derivatives (m x n: derivatives along other
        directions, :func:`directional_gradients`).

    Returns
    -------
    list of Polynomial

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["y^2 - x^3"], ["x", "y"])
    >>> weights = random_minor_weights(1, 2, 1, 10, np.random.default_rng(0))
    >>> [p.to_text(["x", "y"]) for p in expanded_minors(system.polynomials, weights)]
    ['-3*x^2', '2*y']
    """
    polynomials = list(polynomials)
    n = weights.right.shape[1]  # J in the first n variables (all of them, or a family's x before its parameters)
    if gradients is None:
        gradients = [[p.derivative(j) for j in range(n)] for p in polynomials]
    result = []
    for a, b in zip(weights.left, weights.right):
        if weights.complete:  # 0/1 selections: the minor itself, without combining
            rows, cols = np.nonzero(a)[1], np.nonzero(b)[0]
            minor = determinant([[gradients[i][j] for j in cols] for i in rows], limits)
        else:
            minor = combined_minor(gradients, a, b, limits)
        if minor.is_zero():
            continue
        result.append(minor * (1.0 / minor.coefficient_norm()) if normalize else minor)
    return result


def minor_term_bound(polynomials, weights, n=None):
    """An upper bound on the terms of any minor det(A_k J B_k) written out: the permanent of the term counts.

    Entry (r, s) of A J B has at most T[r][s] = sum of the term counts of the J[i][j] it combines (A[r, i] and
    B[j, s] non-zero); the Laplace expansion of the determinant has at most perm(T) terms before
    cancellation. Sparse Jacobians (mechanisms: linear entries in a few unknowns) get a bound far below
    the degree bound C(n + D, n), dense ones about c! times the entries' size. Computed over subsets of
    columns (2^c c steps); c above 16 gives infinity.

    Parameters
    ----------
    polynomials : sequence of Polynomial
        F, m polynomials in n variables.
    weights : MinorWeights
    n : int, optional
        J in the first ``n`` variables (default: all of them).

    Returns
    -------
    float
        The largest bound over the minors (``inf`` when c > 16).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x^2 + y^2 - 1", "x*y - z"], ["x", "y", "z"])
    >>> weights = random_minor_weights(2, 3, 2, 10, np.random.default_rng(0))   # the 3 maximal minors
    >>> minor_term_bound(system.polynomials, weights)   # e.g. det [[2x, 2y], [y, x]] = 2x^2 - 2y^2
    2.0
    """
    size = weights.left.shape[1]
    if size > 16:
        return float("inf")
    n = weights.right.shape[1] if n is None else n
    counts = np.array([[p.derivative(j).n_terms for j in range(n)] for p in polynomials], dtype=float)
    largest = 0.0
    for a, b in zip(weights.left, weights.right):
        table = (np.asarray(a) != 0).astype(float) @ counts @ (np.asarray(b)[:n] != 0).astype(float)
        partial = {0: 1.0}  # columns used by the first rows -> sum of the products of their counts
        for r in range(size):
            grown = {}
            for used, value in partial.items():
                for s in range(size):
                    if not used >> s & 1 and table[r, s]:
                        grown[used | 1 << s] = grown.get(used | 1 << s, 0.0) + value * table[r, s]
            partial = grown
        largest = max(largest, float(partial.get((1 << size) - 1, 0.0)))
    return largest


class EvaluatedMinors:
    """Equations g_k(x) = s_k det(A_k J(x) B_k), evaluated from J and its derivatives, never expanded.

    J is the Jacobian of ``polynomials`` with respect to the variables ``columns`` (all by default); the
    gradient of g_k is with respect to every variable (Jacobi's formula, adjugate by SVD).

    Parameters
    ----------
    polynomials : sequence of Polynomial
        F, m numeric (or exact, converted) polynomials in N variables.
    left : array_like, shape (K, c, m)
    right : array_like, shape (K, len(columns), c)
    columns : sequence of int, optional
        The variables J differentiates by (default all). The homogenised form differentiates by X_1..X_n
        and not by X_0: det(A J^h B) = X_0^d det(A J B)(X / X_0), the homogenised minor.
    scales : array_like, shape (K,), optional
        Factors s_k (default 1).

    Attributes
    ----------
    degrees : list of int
        The degree of each g_k: the sum over the rows of A_k J of the largest degree of the derivatives
        they combine. This is the degree of the homogenised form, the one a total-degree start needs.

    Notes
    -----
    Cost per batch of P points: one evaluation of the m |columns| first derivatives and their gradients
    (the second derivatives of F) and P K SVDs of c x c matrices; nothing grows with the number of terms
    that an expansion would have.
    """

    def __init__(self, polynomials, left, right, columns=None, scales=None):
        self.polynomials = [p.numeric() for p in polynomials]
        if not self.polynomials:
            raise InputError("minors of an empty system")
        self.n_variables = self.polynomials[0].n_variables
        self.columns = list(range(self.n_variables)) if columns is None else [int(j) for j in columns]
        self.left = np.asarray(left, dtype=complex)
        self.right = np.asarray(right, dtype=complex)
        m, width = len(self.polynomials), len(self.columns)
        if self.left.ndim != 3 or self.right.ndim != 3 or self.left.shape[2] != m or self.right.shape[1] != width \
                or self.left.shape[:2] != (len(self.right), self.right.shape[2]):
            raise InputError(f"minor weights of shapes {self.left.shape} and {self.right.shape} do not fit "
                             f"a {m} x {width} Jacobian")
        self.count, self.size = self.left.shape[0], self.left.shape[1]
        self.scales = np.ones(self.count) if scales is None else np.asarray(scales, dtype=float)
        # J's entries as polynomials (first derivatives), flattened row-major (i, j)
        self.derivatives = [p.derivative(j) for p in self.polynomials for j in self.columns]
        self._evaluator = BatchEvaluator(self.derivatives)
        self._precise = None
        self._sizes = {}
        row_degrees = np.array([max(p.degree - 1, 0) for p in self.polynomials])
        used = np.abs(self.left) > 0  # (K, c, m): which equations each row of A J combines
        self.degrees = [int(sum(row_degrees[row].max(initial=0) for row in used[k])) for k in range(self.count)]

    @classmethod
    def from_weights(cls, polynomials, weights, homogenized=False):
        """The minors ``weights`` of ``polynomials`` (affine), in the affine or homogenised form.

        In the homogenised form each polynomial is homogenised to the degree of the largest one that shares
        a row of A with it (all to the largest when A mixes rows), so that every row of A J^h B is
        homogeneous and the determinant is the homogenised minor.

        Examples
        --------
        >>> from numag.system.parse import parse_system
        >>> system = parse_system(["x^3 + y", "x*y - 1"], ["x", "y"])
        >>> weights = random_minor_weights(2, 2, 2, 10, np.random.default_rng(0))
        >>> minors = EvaluatedMinors.from_weights(system.polynomials, weights, homogenized=True)
        >>> minors.n_variables, minors.columns, minors.degrees
        (3, [1, 2], [3])
        """
        polynomials = [p.numeric() for p in polynomials]
        left = np.asarray(weights.left, dtype=complex)
        if not homogenized:
            return cls(polynomials, left, weights.right)
        degrees = np.array([p.degree for p in polynomials])
        mixed = np.abs(left).sum(axis=(0, 1)) > 0
        top = int(degrees[mixed].max(initial=0))
        # rows of A that combine equations of different degrees need a common degree; 0/1 selections do not
        combines = bool(np.any((np.abs(left) > 0).sum(axis=2) > 1))
        x0 = Polynomial.variable(0, polynomials[0].n_variables + 1).numeric()
        lifted = []
        for p, d in zip(polynomials, degrees):
            h = p.homogenize(0)
            lifted.append(h * x0.power(top - int(d)) if combines and d < top else h)
        return cls(lifted, left, weights.right, columns=range(1, polynomials[0].n_variables + 1))

    def scaled_to_unit(self, points):
        """A copy whose minors are divided by the size of their terms at ``points[0]`` (the homotopy's norm).

        Examples
        --------
        >>> from numag.system.parse import parse_system
        >>> f = parse_system(["100*x^2 + 100*y^2"], ["x", "y"]).polynomials
        >>> minors = EvaluatedMinors(f, [[[1]]], [[[1], [0]]]).scaled_to_unit(np.ones((1, 2)))
        >>> float(minors.evaluate(np.array([[1.0, 0.0]]), jacobian=False)[0, 0].real)
        1.0
        """
        # The terms' bound alone, not its product with the distance from the singular matrices (see
        # :meth:`sizes`): the unit point can lie where the minors vanish (the all-ones 4 x 4 matrix has rank 1,
        # where every 3 x 3 minor of rank <= 2 matrices has a zero Jacobian), and that factor, 0 there and
        # floored at 1e-300, scaled each minor by 1e300: its values overflowed and every regeneration path
        # towards it failed (decision 0131).
        sizes = self.sizes(np.atleast_2d(points)[:1], projective=False, distance=False)[0][0]
        return EvaluatedMinors(self.polynomials, self.left, self.right, self.columns, self.scales / sizes)

    def subset(self, indices):
        """The minors ``indices`` only (the evaluator of J and its term sizes shared, nothing rebuilt).

        Examples
        --------
        >>> from numag.system.parse import parse_system
        >>> f = parse_system(["x^2*y", "x + y^3"], ["x", "y"]).polynomials
        >>> minors = EvaluatedMinors(f, [[[1, 0]], [[0, 1]]], [[[1], [0]], [[0], [1]]])
        >>> minors.subset([1]).count, minors.subset([1]).degrees
        (1, [2])
        """
        indices = np.asarray(indices, dtype=np.int64).reshape(-1)
        part = copy.copy(self)
        part.left, part.right, part.scales = self.left[indices], self.right[indices], self.scales[indices]
        part.count = len(indices)
        part.degrees = [self.degrees[k] for k in indices]
        return part

    # -- double precision, batched over points -------------------------------------------------------

    def _matrices(self, points, second=True):
        """M_k = A_k J B_k (P, K, c, c) and, with ``second``, dM_k/dx_l (P, K, c, c, N)."""
        count, m, width = len(points), len(self.polynomials), len(self.columns)
        if second:
            entries, hessian = self._evaluator.evaluate(points)
            hessian = hessian.reshape(count, m, width, self.n_variables)
        else:
            entries, hessian = self._evaluator.evaluate(points, jacobian=False), None
        jacobian = entries.reshape(count, m, width)
        matrices = np.einsum("kam,pmj,kjb->pkab", self.left, jacobian, self.right, optimize=True)
        if not second:
            return matrices, None
        derivatives = np.einsum("kam,pmjl,kjb->pkabl", self.left, hessian, self.right, optimize=True)
        return matrices, derivatives

    def evaluate(self, points, jacobian=True):
        """Values g_k and (optionally) gradients at many points.

        Parameters
        ----------
        points : array_like, shape (P, N)
        jacobian : bool, default True

        Returns
        -------
        values : ndarray, shape (P, K)
        gradients : ndarray, shape (P, K, N), only when ``jacobian`` is true
        """
        points = self._evaluator._check(points)
        matrices, derivatives = self._matrices(points, second=jacobian)
        if not jacobian:
            return np.linalg.det(matrices) * self.scales
        values, adjugates = _determinant_and_adjugate(matrices)
        # Jacobi's formula: d det M = tr(adj(M) dM)
        gradients = np.einsum("pkba,pkabl->pkl", adjugates, derivatives, optimize=True)
        return values * self.scales, gradients * self.scales[None, :, None]

    def sizes(self, points, projective=False, homogenized=False, distance=True):
        """Sizes of the terms of each g_k and of its gradient (2-norm over the variables), each (P, K).

        The entries of J are sized as in :class:`~numag.numeric.evaluate.TermSizes`; a determinant of
        c x c entries of sizes S has terms no larger than the product over its rows of the row sums of
        |A| S |B|, and its gradient than the product rule applied to those bounds. With ``distance`` (the
        default, for residual tests) that bound is multiplied by the product of all but the smallest
        singular value of the row-scaled matrix (below); without it, the terms' bound alone.
        """
        key = (bool(projective), bool(homogenized))
        if key not in self._sizes:
            self._sizes[key] = TermSizes(self.derivatives, projective=projective, homogenized=homogenized)
        value_sizes, gradient_sizes = self._sizes[key].both(np.atleast_2d(points))
        count, m, width = len(value_sizes), len(self.polynomials), len(self.columns)
        left, right = np.abs(self.left), np.abs(self.right)
        rows = np.einsum("kam,pmj,kjb->pkab", left, value_sizes.reshape(count, m, width), right).sum(axis=3)
        slopes = np.einsum("kam,pmj,kjb->pkab", left, gradient_sizes.reshape(count, m, width), right).sum(axis=3)
        values = np.prod(rows, axis=2)
        others = _products_of_others(rows)  # (P, K, c): product of the other rows' sizes
        gradients = np.sum(others * slopes, axis=2)
        if self.size > 1 and distance:
            # The product of row bounds compounds their slack c times: at generic points of a 4 x 4 random minor of
            # sixteen cubics it was 1e7 to 1e8 times |det M|, so a minor that does not vanish passed a 1e-7
            # residual test. With N = M / rows (rows of 2-norm <= 1), |det M| = prod(rows) prod sigma_i(N), so
            # prod(rows) prod_{i < c} sigma_i(N) is still >= |det M| and the scaled value is sigma_min(N): the
            # row-scaled distance of M from the singular matrices, first order in the distance to the minor's zeros.
            matrices, _ = self._matrices(np.atleast_2d(points), second=False)
            safe_rows = np.where(rows > 0, rows, 1.0)
            scaled = matrices / safe_rows[..., :, None]
            singular = np.full(scaled.shape[:-1], np.nan)
            finite = np.all(np.isfinite(scaled), axis=(-2, -1))  # NaN sizes for a diverging path, as its values
            singular[finite] = np.linalg.svd(scaled[finite], compute_uv=False)  # (P, K, c), descending
            factor = np.maximum(np.prod(singular[..., :-1], axis=-1), 1e-300)
            values, gradients = values * factor, gradients * factor
        return values * self.scales, gradients * self.scales

    # -- mpmath, one point --------------------------------------------------------------------------

    def evaluate_precise(self, point, ctx, jacobian=True):
        """Values and gradients at one point in an mpmath context (``mp``, or ``iv`` for enclosures).

        The determinant and the adjugate are Laplace expansions (c is a codimension: small), which need no
        pivoting and so enclose correctly in interval arithmetic.

        Returns
        -------
        values : ctx.matrix, shape (K, 1)
        gradients : ctx.matrix, shape (K, N), only when ``jacobian`` is true

        Examples
        --------
        >>> import mpmath
        >>> from numag.system.parse import parse_system
        >>> f = parse_system(["x^2*y - z^3", "x + y + z"], ["x", "y", "z"]).polynomials
        >>> minors = EvaluatedMinors(f, [np.eye(2)], [np.eye(3)[:, :2]])
        >>> values, gradients = minors.evaluate_precise([1, 2, 3], mpmath.mp)
        >>> mpmath.nstr(values[0].real, 5), mpmath.nstr(gradients[0, 0].real, 5)
        ('3.0', '2.0')
        """
        if self._precise is None:
            self._precise = PrecisionEvaluator(self.derivatives)
        m, width, c, n = len(self.polynomials), len(self.columns), self.size, self.n_variables
        result = self._precise.evaluate(point, ctx, jacobian=jacobian)
        entries, hessian = (result[0], result[1]) if jacobian else (result, None)

        def weight(value):
            return ctx.mpc(float(value.real), float(value.imag))

        values = ctx.matrix(self.count, 1)
        gradients = ctx.matrix(self.count, n) if jacobian else None
        zero = ctx.mpc(0)
        for k in range(self.count):
            a = [[(i, weight(self.left[k, r, i])) for i in range(m) if self.left[k, r, i] != 0] for r in range(c)]
            b = [[weight(self.right[k, j, s]) for s in range(c)] for j in range(width)]
            # J B first (m x c), then A (J B): m w c + c c m products instead of c c m w
            jb = [[sum((entries[i * width + j] * b[j][s] for j in range(width)), zero) for s in range(c)]
                  for i in range(m)]
            matrix = [[sum((weight_ri * jb[i][s] for i, weight_ri in a[r]), zero) for s in range(c)] for r in range(c)]
            scale = ctx.mpf(float(self.scales[k]))
            values[k] = scale * _determinant(matrix, ctx)
            if not jacobian:
                continue
            adjugate = _adjugate(matrix, ctx)
            # d det(A J B)/dx_l = tr(adj (A dJ_l B)) = sum_ij dJ_l[i, j] W[j][i] with W = B adj A (width x m),
            # formed once for all l instead of one c x c product per unknown
            by_row = [dict(row) for row in a]
            adjugate_a = [[sum((adjugate[s][r] * by_row[r][i] for r in range(c) if i in by_row[r]), zero)
                           for i in range(m)] for s in range(c)]
            w = [[sum((b[j][s] * adjugate_a[s][i] for s in range(c)), zero) for i in range(m)] for j in range(width)]
            for l in range(n):
                gradients[k, l] = scale * sum((hessian[i * width + j, l] * w[j][i] for i in range(m)
                                               for j in range(width)), zero)
        return (values, gradients) if jacobian else values


def _products_of_others(values):
    """For each i along the last axis, the product of the other entries (no division: zeros are fine).

    Prefix times suffix products (2 cumulative products instead of size^2 array passes; decision 0067).

    Examples
    --------
    >>> _products_of_others(np.array([[2.0, 3.0, 0.0, 5.0]]))
    array([[ 0.,  0., 30.,  0.]])
    """
    ones = np.ones(values.shape[:-1] + (1,), dtype=values.dtype)
    before = np.cumprod(np.concatenate([ones, values[..., :-1]], axis=-1), axis=-1)
    after = np.cumprod(np.concatenate([ones, values[..., :0:-1]], axis=-1), axis=-1)[..., ::-1]
    return before * after


def _determinant_and_adjugate(matrices):
    """det(M) and adj(M) of a stack of square matrices, singular ones included.

    With M = U diag(s) V^H, det M = det(U) conj(det V) prod(s) and adj(M) = det(U) conj(det V) V diag(t) U^H,
    t_i the product of the singular values other than s_i: no inverse, so rank-deficient M (where the minors
    vanish and their gradients matter most) is as accurate as any other.
    """
    finite = np.all(np.isfinite(matrices), axis=(-2, -1))
    if not np.all(finite):  # a diverging path: NaN there (LAPACK's SVD does not converge on it), the rest as usual
        values = np.full(matrices.shape[:-2], np.nan, dtype=complex)
        adjugates = np.full(matrices.shape, np.nan, dtype=complex)
        if np.any(finite):
            values[finite], adjugates[finite] = _determinant_and_adjugate(matrices[finite])
        return values, adjugates
    u, s, vh = np.linalg.svd(matrices)
    phase = np.linalg.det(u) * np.linalg.det(vh)
    values = phase * np.prod(s, axis=-1)
    others = _products_of_others(s)
    adjugates = phase[..., None, None] * np.einsum("...ji,...j,...kj->...ik", vh.conj(), others, u.conj(),
                                                   optimize=True)
    return values, adjugates


def _laplace(matrix, ctx):
    """Determinant by Laplace expansion along the first row (small matrices, any mpmath context)."""
    size = len(matrix)
    if size == 0:
        return ctx.mpc(1)
    if size == 1:
        return matrix[0][0]
    total = ctx.mpc(0)
    for j in range(size):
        rest = [row[:j] + row[j + 1:] for row in matrix[1:]]
        term = matrix[0][j] * _laplace(rest, ctx)
        total = total - term if j % 2 else total + term
    return total


# Up to this size the Laplace expansion (size! products) is kept: it needs no pivoting and encloses tightly in
# interval arithmetic; beyond it, elimination (size^3 / 3 products; 9 x 9: 243 against 362,880)
_LAPLACE_SIZE = 4


def _magnitude(value):
    """|value| as a float, for choosing pivots (the midpoint of an interval)."""
    size = abs(value)
    return float(getattr(size, "mid", size))


def _eliminated(matrix, ctx):
    """Determinant by Gaussian elimination with partial pivoting (a copy is reduced; any mpmath context).

    In interval arithmetic every step encloses: a pivot interval containing 0 gives an unbounded (still
    valid) result. An exact zero column gives det 0.
    """
    rows = [list(row) for row in matrix]
    size, determinant = len(rows), ctx.mpc(1)
    interval = type(ctx).__name__ == "MPIntervalContext"
    for column in range(size):
        pivot = max(range(column, size), key=lambda r: _magnitude(rows[r][column]))
        if _magnitude(rows[pivot][column]) == 0 and not interval:
            return ctx.mpc(0)
        if pivot != column:
            rows[column], rows[pivot] = rows[pivot], rows[column]
            determinant = -determinant
        head = rows[column]
        determinant = determinant * head[column]
        for r in range(column + 1, size):
            factor = rows[r][column] / head[column]
            rows[r] = [rows[r][j] - factor * head[j] if j > column else rows[r][j] for j in range(size)]
    return determinant


def _determinant(matrix, ctx):
    """det of a small square matrix of mpmath numbers: Laplace up to :data:`_LAPLACE_SIZE`, else elimination.

    Examples
    --------
    >>> import mpmath
    >>> m = [[mpmath.mpc(v) for v in row] for row in ([2, 0, 0, 0, 1], [0, 3, 0, 0, 0], [0, 0, 1, 0, 0],
    ...                                               [0, 0, 0, 1, 0], [1, 0, 0, 0, 1])]
    >>> mpmath.nstr(_determinant(m, mpmath.mp).real, 5)
    '3.0'
    """
    return _laplace(matrix, ctx) if len(matrix) <= _LAPLACE_SIZE else _eliminated(matrix, ctx)


def _adjugate(matrix, ctx):
    """adj(M)[j][i] = (-1)^(i+j) det(M without row i and column j): cofactors, so singular M is fine."""
    size = len(matrix)
    if size == 1:
        return [[ctx.mpc(1)]]
    adjugate = [[None] * size for _ in range(size)]
    for i in range(size):
        for j in range(size):
            rest = [row[:j] + row[j + 1:] for r, row in enumerate(matrix) if r != i]
            cofactor = _determinant(rest, ctx)
            adjugate[j][i] = -cofactor if (i + j) % 2 else cofactor
    return adjugate


class AugmentedEvaluator:
    """F and evaluated minors behind the interface of :class:`~numag.numeric.evaluate.BatchEvaluator`.

    The rows are F's equations first, then the minors. ``evaluate``, ``raw`` (with spare zero columns for a
    caller's extra rows), ``sizes`` (:class:`TermSizes`' ``values``, ``gradients`` and ``both``) and
    ``evaluate_precise`` are what a homotopy needs of its target.

    Parameters
    ----------
    polynomials : sequence of Polynomial
    minors : EvaluatedMinors
        In the same variables.
    spare_columns : int, default 0
    projective, homogenized : bool
        Passed to the term sizes (see :class:`TermSizes`).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["x^2 + y^2 - 1"], ["x", "y"]).polynomials
    >>> both = AugmentedEvaluator(f, EvaluatedMinors(f, [[[1]]], [[[1], [0]]]))
    >>> values, jacobian = both.evaluate(np.array([[1.0, 1.0]]))
    >>> values.real, jacobian[0].real
    (array([[1., 2.]]), array([[2., 2.],
           [2., 0.]]))
    """

    def __init__(self, polynomials, minors, spare_columns=0, projective=False, homogenized=False):
        self.polynomials = list(polynomials)
        self.minors = minors
        self.n_variables = minors.n_variables
        if any(p.n_variables != self.n_variables for p in self.polynomials):
            raise InputError("the minors and the polynomials must have the same variables")
        self.n_equations = len(self.polynomials) + minors.count
        self.spare_columns = int(spare_columns)
        self._polynomial_evaluator = BatchEvaluator(self.polynomials) if self.polynomials else None
        self._polynomial_sizes = TermSizes(self.polynomials, projective, homogenized) if self.polynomials else None
        self._precise = None
        self.projective, self.homogenized = bool(projective), bool(homogenized)

    def evaluate(self, points, jacobian=True):
        """F and the minors, and optionally their Jacobian: (P, m + K) and (P, m + K, N)."""
        points = self.minors._evaluator._check(points)
        parts = [] if self._polynomial_evaluator is None else [self._polynomial_evaluator.evaluate(points, jacobian)]
        parts.append(self.minors.evaluate(points, jacobian))
        if not jacobian:
            return np.hstack(parts)
        return np.hstack([v for v, _ in parts]), np.concatenate([j for _, j in parts], axis=1)

    def raw(self, points, jacobian_weights=None):
        """One array (P, M + M N + spare): values, Jacobian rows (row-major, times ``jacobian_weights`` (P,) when
        given), zeros, as ``BatchEvaluator.raw``."""
        values, jacobian = self.evaluate(points)
        count, size = values.shape
        out = np.zeros((count, size + size * self.n_variables + self.spare_columns), dtype=complex)
        out[:, :size] = values
        out[:, size:size + size * self.n_variables] = jacobian.reshape(count, -1)
        if jacobian_weights is not None:
            out[:, size:size + size * self.n_variables] *= np.asarray(jacobian_weights)[:, None]
        return out

    def both(self, points):
        """Term sizes of the values and of the gradient rows, each (P, m + K)."""
        minor_values, minor_gradients = self.minors.sizes(points, self.projective, self.homogenized)
        if self._polynomial_sizes is None:
            return minor_values, minor_gradients
        values, gradients = self._polynomial_sizes.both(points)
        return np.hstack([values, minor_values]), np.hstack([gradients, minor_gradients])

    def values(self, points):
        """Term sizes of the values (P, m + K)."""
        return self.both(points)[0]

    def gradients(self, points):
        """Term sizes of the gradient rows (P, m + K)."""
        return self.both(points)[1]

    def evaluate_precise(self, point, ctx, jacobian=True):
        """F and the minors at one point in an mpmath context: ctx matrices (M, 1) and (M, N)."""
        if self._precise is None and self.polynomials:
            self._precise = PrecisionEvaluator(self.polynomials)
        m, size, n = len(self.polynomials), self.n_equations, self.n_variables
        values = ctx.matrix(size, 1)
        matrix = ctx.matrix(size, n) if jacobian else None
        if m:
            result = self._precise.evaluate(point, ctx, jacobian)
            f_values, f_jacobian = (result[0], result[1]) if jacobian else (result, None)
            for i in range(m):
                values[i] = f_values[i]
                for j in range(n if jacobian else 0):
                    matrix[i, j] = f_jacobian[i, j]
        result = self.minors.evaluate_precise(point, ctx, jacobian)
        g_values, g_gradients = (result[0], result[1]) if jacobian else (result, None)
        for k in range(self.minors.count):
            values[m + k] = g_values[k]
            for j in range(n if jacobian else 0):
                matrix[m + k, j] = g_gradients[k, j]
        return (values, matrix) if jacobian else values


class MinorsSystem(PolynomialSystem):
    """F together with minors det(A_k J_F B_k) that are evaluated, never expanded: the equations of "rank J < c".

    ``polynomials`` are F's equations only; the minors are always those of the Jacobian of the current
    ``polynomials`` (in their first ``weights.right.shape[1]`` variables), so that rescaling F's equations and
    unknowns (:class:`~numag.numeric.scaling.Scaling`) rescales the minors with them: det(A S J D B) is another
    random combination of the same minors, with the same common zeros with F. ``n_equations`` and ``degrees``
    count F and the minors (equation k >= len(polynomials) is minor k - len(polynomials)); code that walks
    ``polynomials`` alone must ask :attr:`minors` too (the witness cascade, :func:`holding_rows`).

    Parameters
    ----------
    variables : sequence of str
    polynomials : sequence of Polynomial
        F (numeric).
    minors : MinorWeights
    name : str, optional

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["x^2 + y^2 + z^2 - 1"], ["x", "y", "z"])
    >>> weights = random_minor_weights(1, 3, 1, 0, np.random.default_rng(0), count=3)
    >>> system = MinorsSystem(f.variables, f.polynomials, weights)
    >>> system.n_equations, system.degrees, system.has_real_coefficients
    (4, [2, 1, 1, 1], False)
    """

    def __init__(self, variables, polynomials, minors, name=None):
        super().__init__(variables, [p.numeric() for p in polynomials], name=name)
        if minors.left.shape[2] != len(self.polynomials) or minors.right.shape[1] > len(self.variables):
            raise InputError(f"minor weights of shapes {minors.left.shape} and {minors.right.shape} do not fit "
                             f"{len(self.polynomials)} equations in {len(self.variables)} unknowns")
        self.minors = minors
        self._affine = None

    @property
    def n_equations(self):
        """F's equations and the minors."""
        return len(self.polynomials) + self.minors.count

    @property
    def degrees(self):
        """Degrees of F's equations, then of the minors."""
        return [p.degree for p in self.polynomials] + list(self.evaluated().degrees)

    @property
    def has_real_coefficients(self):
        """Real only when F and the weights of the minors are real."""
        return super().has_real_coefficients and not np.iscomplexobj(self.minors.left) \
            and not np.iscomplexobj(self.minors.right)

    def evaluated(self, homogenized=False):
        """The minors as :class:`EvaluatedMinors` (affine; or homogenised, in (X_0, x))."""
        if homogenized:
            return EvaluatedMinors.from_weights(self.polynomials, self.minors, homogenized=True)
        if self._affine is None:
            self._affine = EvaluatedMinors.from_weights(self.polynomials, self.minors)
        return self._affine

    def with_polynomials(self, polynomials):
        """The same minors of other equations F' (F rescaled), as a new system."""
        return MinorsSystem(self.variables, polynomials, self.minors, self.name)


def split_equations(system, indices):
    """Equations ``indices`` of a system, F's and evaluated minors apart: (polynomials, EvaluatedMinors or None).

    Parameters
    ----------
    system : PolynomialSystem or MinorsSystem
    indices : sequence of int
        Equation numbers; in a :class:`MinorsSystem` those from ``len(system.polynomials)`` on are minors.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> split_equations(parse_system(["x", "y^2"], ["x", "y"]), [1])[0][0].degree
    2
    """
    m = len(system.polynomials)
    polynomials = [system.polynomials[k].numeric() for k in indices if k < m]
    minors = [k - m for k in indices if k >= m]
    if not minors:
        return polynomials, None
    return polynomials, system.evaluated().subset(minors)


def equation_evaluator(system, indices=None):
    """Values, Jacobians and term sizes of equations ``indices`` (default all) of a system: (evaluator, sizes).

    A :class:`~numag.numeric.evaluate.BatchEvaluator` and :class:`~numag.numeric.evaluate.TermSizes` for
    polynomials; an :class:`AugmentedEvaluator` (both roles) when evaluated minors are among them.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> evaluator, sizes = equation_evaluator(parse_system(["x^2 - y"], ["x", "y"]))
    >>> evaluator.evaluate(np.array([[2.0, 1.0]]), jacobian=False).real
    array([[3.]])
    """
    indices = range(system.n_equations) if indices is None else indices
    polynomials, minors = split_equations(system, indices)
    if minors is None:
        return BatchEvaluator(polynomials), TermSizes(polynomials)
    both = AugmentedEvaluator(polynomials, minors)
    return both, both


class CombinedRows:
    """Random combinations of homogeneous equations, some of them evaluated minors, applied to values and gradients.

    Row i is r_i(X) = sum_j W_ij X_0^(D - d_j) e_j(X), where e_1..e_m are homogeneous polynomials and
    e_(m+1)..e_(m+K) homogenised :class:`EvaluatedMinors` (never expanded), d_j their degrees and D the largest:
    what :func:`~numag.witness.cascade.combine_equations` builds by polynomial arithmetic, here from the
    evaluated values and gradients (product rule for the X_0 powers). Such rows can hold a homotopy on a
    component (see ``ParameterHomotopy(..., held=...)``) with deflation minors that were never written out.

    Parameters
    ----------
    polynomials : sequence of Polynomial
        Homogeneous, in n + 1 variables (X_0 first).
    minors : EvaluatedMinors or None
        Homogenised (``EvaluatedMinors.from_weights(..., homogenized=True)``), in the same variables.
    weights : array_like, shape (c, m + K)

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = [p.homogenize(0) for p in parse_system(["x^2 + y^2 - 1"], ["x", "y"]).polynomials]
    >>> rows = CombinedRows(f, None, [[2.0]])
    >>> values, jacobian = rows.evaluate(np.array([[1.0, 1.0, 1.0]]))
    >>> values.real, jacobian[0].real
    (array([[2.]]), array([[-4.,  4.,  4.]]))
    """

    def __init__(self, polynomials, minors, weights):
        self.polynomials = [p.numeric() for p in polynomials]
        self.minors = minors
        self.weights = np.atleast_2d(np.asarray(weights, dtype=complex))
        self.n_variables = minors.n_variables if minors is not None else self.polynomials[0].n_variables
        base_degrees = [p.degree for p in self.polynomials] + ([] if minors is None else list(minors.degrees))
        if self.weights.shape[1] != len(base_degrees):
            raise InputError(f"{self.weights.shape[1]} weights per row for {len(base_degrees)} equations")
        self.base_degrees = np.array(base_degrees, dtype=np.int64)
        # each row raised to the largest degree among the equations it combines (a row that is one equation,
        # the moving row of a regeneration, keeps that equation's degree); rows of random weights combine all
        used = np.abs(self.weights) > 0
        self.row_degrees = np.array([int(self.base_degrees[row].max(initial=0)) for row in used], dtype=np.int64)
        self.degree = int(self.row_degrees.max(initial=0))
        self.raise_by = np.where(used, self.row_degrees[:, None] - self.base_degrees[None, :], 0)  # X_0 powers (c, m + K)
        self.count = len(self.weights)
        self._evaluator = AugmentedEvaluator(self.polynomials, minors, projective=True, homogenized=True) \
            if minors is not None else None
        self._polynomial_evaluator = BatchEvaluator(self.polynomials) if minors is None else None
        self._polynomial_sizes = TermSizes(self.polynomials, homogenized=True) if minors is None else None
        # only its reference point (the chart X_0 = 1 rule) is used, for the sizes of the X_0 powers
        self._reference = TermSizes([Polynomial.variable(0, self.n_variables)], homogenized=True)

    @property
    def degrees(self):
        """The degree of every row."""
        return [int(d) for d in self.row_degrees]

    def _base(self, points, jacobian=True):
        source = self._evaluator if self._evaluator is not None else self._polynomial_evaluator
        return source.evaluate(points, jacobian)

    def evaluate(self, points, jacobian=True):
        """Rows (P, c) and, with ``jacobian``, their gradients (P, c, n + 1)."""
        points = np.atleast_2d(np.asarray(points, dtype=complex))
        result = self._base(points, jacobian)
        values, gradients = (result[0], result[1]) if jacobian else (result, None)
        x0 = points[:, :1, None]
        power = x0 ** self.raise_by[None, :, :]  # (P, c, m + K)
        weighted = self.weights[None, :, :] * power
        rows = np.einsum("pij,pj->pi", weighted, values)
        if not jacobian:
            return rows
        lower = np.where(self.raise_by > 0, self.raise_by * x0 ** np.maximum(self.raise_by - 1, 0), 0)
        row_gradients = np.einsum("pij,pjl->pil", weighted, gradients)
        row_gradients[:, :, 0] += np.einsum("pij,pj->pi", self.weights[None, :, :] * lower, values)  # product rule
        return rows, row_gradients

    def both(self, points):
        """Term sizes of the rows and of their gradients, each (P, c) (as :class:`TermSizes`)."""
        points = np.atleast_2d(points)
        if self._evaluator is not None:
            values, gradients = self._evaluator.both(points)
        else:
            values, gradients = self._polynomial_sizes.both(points)
        rho0 = self._reference.reference(points)[:, :1, None]
        power = rho0 ** self.raise_by[None, :, :]  # (P, c, m + K)
        lower = np.where(self.raise_by > 0, self.raise_by * rho0 ** np.maximum(self.raise_by - 1, 0), 0)
        weights = np.abs(self.weights)[None, :, :]
        return np.einsum("pij,pj->pi", weights * power, values), \
            np.einsum("pij,pj->pi", weights * power, gradients) + np.einsum("pij,pj->pi", weights * lower, values)

    def values(self, points):
        """Term sizes of the rows (P, c)."""
        return self.both(points)[0]

    def gradients(self, points):
        """Term sizes of the gradient rows (P, c)."""
        return self.both(points)[1]

    def evaluate_precise(self, point, ctx, jacobian=True):
        """Rows and gradients at one point in an mpmath context: ctx matrices (c, 1) and (c, n + 1)."""
        if self._evaluator is not None:
            result = self._evaluator.evaluate_precise(point, ctx, jacobian)
        else:
            result = PrecisionEvaluator(self.polynomials).evaluate(point, ctx, jacobian)
        values, gradients = (result[0], result[1]) if jacobian else (result, None)
        size, n = len(self.base_degrees), self.n_variables
        x0 = point[0]
        out_values = ctx.matrix(self.count, 1)
        out_gradients = ctx.matrix(self.count, n) if jacobian else None
        for i in range(self.count):
            for j in range(size):
                w = self.weights[i, j]
                if w == 0:
                    continue
                w = ctx.mpc(float(w.real), float(w.imag))
                e = int(self.raise_by[i, j])
                out_values[i] += w * x0 ** e * values[j]
                if jacobian:
                    for l in range(n):
                        out_gradients[i, l] += w * x0 ** e * gradients[j, l]
                    if e:
                        out_gradients[i, 0] += w * e * x0 ** (e - 1) * values[j]
        return (out_values, out_gradients) if jacobian else out_values


class LinearFormProduct:
    """The product of linear forms prod_k (r_k . X), evaluated (never expanded), with its gradient.

    The start row of a regeneration towards an evaluated minor of degree D is a product of D linear forms in
    n + 1 homogeneous variables; written out it has up to C(n + D, n) terms (245,157 refused for D = 8,
    n = 16).

    Parameters
    ----------
    rows : array_like, shape (D, N)

    Examples
    --------
    >>> product = LinearFormProduct([[1.0, 2.0], [0.0, 1.0]])   # (X0 + 2 x) x
    >>> values, gradients = product.evaluate(np.array([[1.0, 3.0]]))
    >>> values.real, gradients[0].real
    (array([[21.]]), array([[ 3., 13.]]))
    """

    def __init__(self, rows):
        self.rows = np.atleast_2d(np.asarray(rows, dtype=complex))
        self.degree = len(self.rows)
        self.n_variables = self.rows.shape[1]
        self.count = 1

    def evaluate(self, points, jacobian=True):
        """Values (P, 1) and, with ``jacobian``, gradients (P, 1, N)."""
        forms = np.atleast_2d(points) @ self.rows.T  # (P, D)
        values = np.prod(forms, axis=1, keepdims=True)
        if not jacobian:
            return values
        others = _products_of_others(forms[:, None, :])[:, 0, :]  # (P, D): the product of the other forms
        return values, (others @ self.rows)[:, None, :]

    def evaluate_precise(self, point, ctx, jacobian=True):
        """Value (1, 1) and gradient (1, N) at one point in an mpmath context."""
        rows = [[ctx.mpc(complex(a).real, complex(a).imag) for a in row] for row in self.rows]
        forms = [ctx.fsum(a * x for a, x in zip(row, point)) for row in rows]
        value = ctx.matrix(1, 1)
        value[0] = ctx.fprod(forms)
        if not jacobian:
            return value
        gradient = ctx.matrix(1, self.n_variables)
        for k, row in enumerate(rows):
            others = ctx.fprod(forms[:k] + forms[k + 1:])
            for j in range(self.n_variables):
                gradient[0, j] += others * row[j]
        return value, gradient


def kernel_deflation(polynomials, rank, rng):
    """One deflation step in the kernel form: F(x) = 0, J(x) B lambda = 0, h . lambda = 1 in (x, lambda).

    At a zero x* of F where J has rank ``rank`` (r), a random B (n x (r + 1)) makes J(x*) B of rank r with
    a one-dimensional kernel, so exactly one lambda in C^(r + 1) with h . lambda = 1 completes x*; the
    deflated system has (x*, lambda*) as a zero of lower multiplicity (Leykin, Verschelde and Zhao,
    "Newton's method with deflation for isolated singularities of polynomial systems", Theoret. Comput.
    Sci. 359 (2006) 111-122), regular after finitely many steps. The new equations are bilinear in the
    entries of J and lambda: m (r + 1) times the terms of J in all, where an (r + 1)-minor has up to
    (r + 1)! times the products of r + 1 entries.

    Parameters
    ----------
    polynomials : sequence of Polynomial
        F, m polynomials in n variables (numeric).
    rank : int
        The numerical rank of J at the point (0 <= rank < n).
    rng : numpy.random.Generator

    Returns
    -------
    list of Polynomial
        F lifted to the n + r + 1 variables (x, lambda), the m rows of J B lambda (each divided by its
        coefficient norm), and h . lambda - 1.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["x^2", "y^2"], ["x", "y"]).polynomials
    >>> deflated = kernel_deflation(f, 0, np.random.default_rng(0))
    >>> len(deflated), deflated[0].n_variables
    (5, 3)
    """
    polynomials = [p.numeric() for p in polynomials]
    n = polynomials[0].n_variables
    if not 0 <= rank < n:
        raise InputError(f"a kernel deflation needs 0 <= rank < {n}, not {rank}")
    width = rank + 1
    total = n + width
    b = (rng.standard_normal((n, width)) + 1j * rng.standard_normal((n, width))) / math.sqrt(2 * n)
    h = rng.standard_normal(width) + 1j * rng.standard_normal(width)
    lifted = [Polynomial(np.hstack([p.exponents, np.zeros((p.n_terms, width), dtype=np.int64)]),
                         p.numeric_coefficients(), total) for p in polynomials]
    lambdas = [Polynomial.variable(n + k, total).numeric() for k in range(width)]
    equations = list(lifted)
    for p in lifted:
        row = Polynomial.zero(total)
        for k in range(width):
            combined = Polynomial.zero(total)  # (J B)_{i k} = sum_j df_i/dx_j B_{j k}
            for j in range(n):
                derivative = p.derivative(j)
                if not derivative.is_zero():
                    combined = combined + derivative * complex(b[j, k])
            row = row + lambdas[k] * combined
        if not row.is_zero():
            equations.append(row * (1.0 / row.coefficient_norm()))
    equations.append(Polynomial.linear(np.concatenate([np.zeros(n), h]), -1.0))
    return equations
