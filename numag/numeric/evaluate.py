"""Evaluation of polynomial systems and their Jacobians.

Two paths:

* :class:`BatchEvaluator` evaluates F and its Jacobian J at P points at once in
  complex double precision. Everything that does not depend on the points is
  precomputed: the union of the monomials of F and of its partial derivatives,
  ordered so that F's monomials and J's monomials are two ranges of columns, and a
  coefficient matrix for each. A call builds a power table per variable, gathers
  the monomial values, and does one matrix product for F and one for J (a
  homogeneous F of degree d needs only the degree-d monomials, J only the degree
  d - 1 ones). There is no Python loop over points, terms or variables.
* :class:`PrecisionEvaluator` evaluates at one point in an mpmath context
  (``mp`` at any number of digits, or ``iv`` for interval enclosures),
  with exact coefficients converted at that precision.

Examples
--------
>>> import numpy as np
>>> from numag.system.parse import parse_system
>>> system = parse_system(["x^2 + y^2 - 1", "x*y"], ["x", "y"])
>>> values, jacobian = BatchEvaluator(system.polynomials).evaluate(np.array([[1.0, 2.0]]))
>>> values.real
array([[4., 2.]])
>>> jacobian[0].real
array([[2., 4.],
       [2., 1.]])
"""

import numpy as np

from ..errors import InputError
from ..system.polynomial import sorted_unique_rows
from ..run.executor import check_memory

__all__ = ["BatchEvaluator", "PrecisionEvaluator", "TermSizes"]

class BatchEvaluator:
    """Evaluate polynomials and their Jacobian at many points at once (complex double).

    Parameters
    ----------
    polynomials : sequence of Polynomial
        All in the same number of variables.
    spare_columns : int, default 0
        Zero columns appended to the output of :meth:`raw`.

    Attributes
    ----------
    n_equations, n_variables : int
    monomials : ndarray, shape (K, n_variables)
        The union of the monomials of the polynomials and of their derivatives.

    Notes
    -----
    Cost per call: building the power table (P n d), gathering the monomials
    (P K s with s the largest number of distinct variables in one monomial) and
    two products, P K_F m for F and P K_J m n for J, with K_F and K_J the monomials
    F and J use. One product over the union (P K m (n + 1)) spent most of its work on
    zero coefficients: for dense quadrics in 11 homogeneous coordinates K = 78, K_F = 66,
    K_J = 11, and the two products take a third of the one (decision 0075).
    """

    def __init__(self, polynomials, spare_columns=0):
        polynomials = list(polynomials)
        if not polynomials:
            raise InputError("nothing to evaluate: no polynomials")
        n = polynomials[0].n_variables
        if any(p.n_variables != n for p in polynomials):
            raise InputError("all polynomials must have the same number of variables")
        self.n_equations, self.n_variables = len(polynomials), n
        # the table below has a column per monomial of F (at least): refuse a hopeless size before building it
        # (rows made distinct by a lexicographic sort, as np.unique's row mode orders them: that mode builds a
        # structured type with a field per column, and its sorts were half of this set-up; decision 0094)
        distinct = len(sorted_unique_rows(np.vstack([p.exponents for p in polynomials]
                                                    + [np.zeros((1, n), dtype=np.int64)]))[0])
        check_memory(2 * 16 * (self.n_equations * (n + 1) + spare_columns) * distinct,
                     f"the evaluation table of {self.n_equations} equations in {n} variables")
        rows = []  # (row of the output, exponents, coefficients)
        for i, p in enumerate(polynomials):
            rows.append((i, p.exponents, p.numeric_coefficients()))
        for i, p in enumerate(polynomials):
            # derivatives straight from the term arrays: lowering e_j by one maps the terms with
            # e_j > 0 one-to-one, so nothing needs merging (building Polynomial objects for the
            # n m derivatives was most of the set-up time of a run)
            coefficients = p.numeric_coefficients()
            for j in range(n):
                powers = p.exponents[:, j]
                has = powers > 0
                lowered = p.exponents[has].copy()
                lowered[:, j] -= 1
                rows.append((self.n_equations + i * n + j, lowered, coefficients[has] * powers[has]))
        all_exponents = np.vstack([e for _, e, _ in rows] + [np.zeros((1, n), dtype=np.int64)])
        self.monomials, inverse = sorted_unique_rows(all_exponents)
        n_rows, n_monomials = self.n_equations * (n + 1), len(self.monomials)
        # dense (F, J) coefficient table and its transposed copy: refused before allocating when too large
        check_memory(2 * 16 * (n_rows + spare_columns) * n_monomials,
                     f"the evaluation table of {self.n_equations} equations in {n} variables")
        matrix = np.zeros((n_rows, n_monomials), dtype=complex)
        start = 0
        for row, exponents, coefficients in rows:
            stop = start + len(exponents)
            np.add.at(matrix[row], inverse[start:stop], coefficients)
            start = stop
        # The monomials in four groups: used by F only, by F and J, by J only, by neither; F then reads one
        # range of columns and J another, each with its own product (no work on the other's zero coefficients).
        in_values = np.any(matrix[:self.n_equations] != 0, axis=0)
        in_jacobian = np.any(matrix[self.n_equations:] != 0, axis=0)
        groups = [np.flatnonzero(in_values & ~in_jacobian), np.flatnonzero(in_values & in_jacobian),
                  np.flatnonzero(~in_values & in_jacobian), np.flatnonzero(~in_values & ~in_jacobian)]
        order = np.concatenate(groups)
        self.monomials, matrix = self.monomials[order], matrix[:, order]
        self._value_columns = slice(0, len(groups[0]) + len(groups[1]))
        self._jacobian_columns = slice(len(groups[0]), len(groups[0]) + len(groups[1]) + len(groups[2]))
        # spare zero columns at the end let a caller complete a Jacobian in place (see :meth:`raw`)
        self.spare_columns = int(spare_columns)
        self._values_t = np.ascontiguousarray(matrix[:self.n_equations, self._value_columns].T)
        self._jacobian_t = np.zeros((self._jacobian_columns.stop - self._jacobian_columns.start,
                                     n_rows - self.n_equations + self.spare_columns), dtype=complex)
        self._jacobian_t[:, :n_rows - self.n_equations] = matrix[self.n_equations:, self._jacobian_columns].T
        self.max_exponent = int(self.monomials.max()) if n and n_monomials else 0
        self._build_gather()

    def _build_gather(self):
        """Per monomial, the flat power-table indices of its variables (padded with x^0)."""
        n, width = self.n_variables, self.max_exponent + 1
        support = (self.monomials > 0).sum(axis=1)
        self.support = max(int(support.max()) if len(support) else 0, 1)
        index = np.zeros((len(self.monomials), self.support), dtype=np.int64)  # 0 -> x_0^0 = 1
        # each monomial's variables in increasing order, left-aligned: the k-th nonzero exponent of a row goes to
        # column k (its rank among the row's nonzeros), one array operation for all rows
        rows, columns = np.nonzero(self.monomials)
        if len(rows):
            rank = np.arange(len(rows)) - np.searchsorted(rows, rows)
            index[rows, rank] = columns * width + self.monomials[rows, columns]
        self._gather_index = index
        self._gathers = {}  # (start, stop, step) of the columns asked for -> contiguous indices per factor

    def power_table(self, points):
        """Powers x_j^e for e = 0..max exponent, shape (P, n * (max_exponent + 1))."""
        count = len(points)
        width = self.max_exponent + 1
        table = np.empty((count, self.n_variables, width), dtype=complex)
        table[:, :, 0] = 1
        if width > 1:
            table[:, :, 1] = points
        # repeated multiplication, one power at a time: the same products in the same order as a cumulative
        # product, without its broadcast set-up (most systems have small exponents: one or two passes)
        for power in range(2, width):
            np.multiply(table[:, :, power - 1], points, out=table[:, :, power])
        return table.reshape(count, self.n_variables * width)

    def monomial_values(self, points, columns=slice(None)):
        """Values of the monomials of :attr:`monomials` (those in ``columns``: all by default), shape (P, K)."""
        table = self.power_table(points)
        key = (columns.start, columns.stop, columns.step)
        gathers = self._gathers.get(key)
        if gathers is None:  # each factor's indices contiguous, for np.take
            index = self._gather_index[columns]
            gathers = self._gathers[key] = [np.ascontiguousarray(index[:, k]) for k in range(self.support)]
        # gathered through the transpose: the result is laid out as ``table[:, index]`` lays it out (Fortran order),
        # so the products below, and the matrix products of the callers, round exactly as they did
        columns_first = table.T
        values = np.take(columns_first, gathers[0], axis=0).T
        for gather in gathers[1:]:  # a loop over the support width (at most the degree), not variables
            values *= np.take(columns_first, gather, axis=0).T
        return values

    def evaluate(self, points, jacobian=True):
        """F and (optionally) J at each point.

        Parameters
        ----------
        points : array_like, shape (P, n_variables)
        jacobian : bool, default True

        Returns
        -------
        values : ndarray, shape (P, n_equations)
        jacobians : ndarray, shape (P, n_equations, n_variables)
            Only when ``jacobian`` is true.
        """
        points = self._check(points)
        if not jacobian:
            return self.monomial_values(points, self._value_columns) @ self._values_t
        m = self.n_equations
        out = self.raw(points)
        return out[:, :m], out[:, m:m + m * self.n_variables].reshape(len(points), m, self.n_variables)

    def raw(self, points, jacobian_weights=None):
        """One array (P, m + m n + spare_columns): the values, the Jacobian rows, then zeros.

        Row-major: ``raw[:, m:m + m n]`` reshaped to (P, m, n) is the Jacobian, as a view,
        so a caller can complete a larger matrix in place without copying. With
        ``jacobian_weights`` (shape (P,)) each point's Jacobian comes multiplied by its weight
        (a homotopy's (1 - s)): the weight scales the few monomials J reads, not J's m n entries.

        Examples
        --------
        >>> import numpy as np
        >>> from numag.system.parse import parse_system
        >>> evaluator = BatchEvaluator(parse_system(["x^2 - y"], ["x", "y"]).polynomials, spare_columns=1)
        >>> evaluator.raw(np.array([[3.0, 1.0]]), jacobian_weights=np.array([0.5])).real
        array([[ 8. ,  3. , -0.5,  0. ]])
        """
        points = self._check(points)
        monomials = self.monomial_values(points, slice(None, self._jacobian_columns.stop))
        m = self.n_equations
        out = np.empty((len(points), m + self._jacobian_t.shape[1]), dtype=complex)
        np.matmul(monomials[:, self._value_columns], self._values_t, out=out[:, :m])
        jacobian_monomials = monomials[:, self._jacobian_columns]
        if jacobian_weights is not None:
            jacobian_monomials = jacobian_monomials * np.asarray(jacobian_weights)[:, None]
        np.matmul(jacobian_monomials, self._jacobian_t, out=out[:, m:])
        return out

    def _check(self, points):
        points = np.asarray(points, dtype=complex)
        if points.ndim == 1:
            points = points[None, :]
        if points.ndim != 2 or points.shape[1] != self.n_variables:
            raise InputError(f"points must have shape (P, {self.n_variables}), got {points.shape}")
        return points


class PrecisionEvaluator:
    """Evaluate polynomials and their Jacobian at one point in an mpmath context.

    Parameters
    ----------
    polynomials : sequence of Polynomial
        Exact coefficients are converted at the context's working precision
        (``iv`` gives enclosures of square roots).

    Examples
    --------
    >>> import mpmath
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x^2 - 2"], ["x"])
    >>> with mpmath.mp.workdps(30):
    ...     values, jac = PrecisionEvaluator(system.polynomials).evaluate([mpmath.sqrt(2)], mpmath.mp)
    ...     print(abs(values[0]) < 1e-29, mpmath.nstr(jac[0, 0].real, 10))
    True 2.828427125
    """

    def __init__(self, polynomials):
        self.polynomials = list(polynomials)
        self.n_equations = len(self.polynomials)
        self.n_variables = self.polynomials[0].n_variables if self.polynomials else 0
        self.derivatives = [[p.derivative(j) for j in range(self.n_variables)] for p in self.polynomials]
        self._cache = {}

    def _terms(self, polynomial, ctx):
        key = (id(polynomial), id(ctx), ctx.prec)
        if key not in self._cache:
            if polynomial.is_exact:
                coefficients = [c.to_context(ctx) for c in polynomial.coefficients]
            else:
                coefficients = [ctx.mpc(c.real, c.imag) for c in polynomial.coefficients]
            exponents = [[(j, int(e)) for j, e in enumerate(row) if e] for row in polynomial.exponents]
            self._cache[key] = list(zip(coefficients, exponents))
        return self._cache[key]

    def _value(self, polynomial, powers, ctx):
        total = ctx.mpc(0)
        for coefficient, factors in self._terms(polynomial, ctx):
            term = coefficient
            for j, e in factors:
                term = term * powers[j][e]
            total += term
        return total

    def evaluate(self, point, ctx, jacobian=True):
        """F and optionally J at ``point`` in context ``ctx``.

        Parameters
        ----------
        point : sequence
            Coordinates (anything ``ctx.mpc`` accepts, or numbers of ``ctx``).
        ctx : mpmath context
            ``mpmath.mp`` or ``mpmath.iv``.
        jacobian : bool, default True

        Returns
        -------
        values : ctx.matrix, shape (m, 1)
        jacobian : ctx.matrix, shape (m, n), only when ``jacobian`` is true
        """
        if len(point) != self.n_variables:
            raise InputError(f"point has {len(point)} coordinates, expected {self.n_variables}")
        coordinates = [value if isinstance(value, (ctx.mpc, ctx.mpf)) else ctx.mpc(value)
                       for value in point]
        top = max((p.degree for p in self.polynomials), default=0)
        powers = []
        for value in coordinates:
            row = [ctx.mpc(1)]
            for _ in range(max(top, 0)):
                row.append(row[-1] * value)
            powers.append(row)
        values = ctx.matrix(self.n_equations, 1)
        for i, p in enumerate(self.polynomials):
            values[i] = self._value(p, powers, ctx)
        if not jacobian:
            return values
        matrix = ctx.matrix(self.n_equations, self.n_variables)
        for i, row in enumerate(self.derivatives):
            for j, d in enumerate(row):
                matrix[i, j] = self._value(d, powers, ctx)
        return values, matrix


class TermSizes:
    """How large each equation's terms are at a point: the measure of residuals and Jacobian rows.

    Rounding errors in evaluating f_i at x are proportional to the sizes of its terms,
    sum_k |c_ik| |x^a_k|, not to f_i(x) itself; a residual or a singular value is
    small only against that. The terms are sized at the reference point rho with
    rho_j = max(|x_j|, 1) (affine: 1 is the unit of the problem, which scaling has made
    the size of its numbers) or rho_j = max_k |X_k| (projective: the chart of the largest
    coordinate). A bound by the coefficient norm times ||(1, x)||^d instead over-states
    terms by up to sqrt(n + 1)^d: 1e15 for x^100 - 1 at a root of unity.

    Homogenised affine equations (``homogenized``: X_0 the homogenising coordinate, first) use
    the affine rule in the chart X_0 = 1: rho_0 = |X_0| and rho_j = max(|X_j|, |X_0|), except
    near infinity (|X_0| below 1e-3 max_k |X_k|), where the chart degenerates and every
    coordinate is sized as the largest. Treating every
    coordinate as the largest one over-states terms in the small ones: a homotopy then accepted
    an endpoint 7e-3 away from a solution as "on the target".

    Parameters
    ----------
    polynomials : sequence of Polynomial
    projective : bool, default False
    homogenized : bool, default False
        The polynomials are homogenised affine equations, X_0 first (implies projective).

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x^100 - 1", "x*y - 2"], ["x", "y"])
    >>> sizes = TermSizes(system.polynomials)
    >>> sizes.values(np.array([[1j, 2.0]])).real
    array([[2., 4.]])
    >>> np.round(sizes.gradients(np.array([[1j, 2.0]])).real, 3)
    array([[100.   ,   2.236]])
    """

    def __init__(self, polynomials, projective=False, homogenized=False):
        self.projective = bool(projective) or bool(homogenized)
        self.homogenized = bool(homogenized)
        self._evaluator = BatchEvaluator([p.absolute() for p in polynomials])

    def reference(self, points):
        """The point rho at which the terms are sized, shape (P, n)."""
        moduli = np.abs(np.atleast_2d(points))
        if self.homogenized:
            top = moduli.max(axis=1, keepdims=True)
            chart = np.maximum(moduli, moduli[:, :1])
            # near infinity the chart X_0 = 1 degenerates: size every coordinate as the largest there
            return np.where(moduli[:, :1] >= _CHART_FLOOR * top, chart, top)
        if self.projective:
            return np.broadcast_to(moduli.max(axis=1, keepdims=True), moduli.shape).copy()
        return np.maximum(moduli, 1.0)

    def both(self, points):
        """Sizes of the values and of the gradient rows (2-norm over the variables), each (P, m)."""
        values, jacobian = self._evaluator.evaluate(self.reference(points))
        return _positive(values.real), _positive(np.linalg.norm(jacobian.real, axis=2))

    def values(self, points):
        """Size of each equation's terms at each point, shape (P, m)."""
        return self.at(self.reference(points))

    def at(self, reference):
        """Size of each equation's terms, sum_k |c_k| prod_j rho_j^a_kj, at reference points rho chosen by
        the caller (shape (P, n), positive), shape (P, m). Certification sizes terms at |x_j| floored
        relative to the largest coordinate (:func:`numag.certify.square._equilibrated`).

        Examples
        --------
        >>> import numpy as np
        >>> from numag.system.parse import parse_system
        >>> TermSizes(parse_system(["x^2 - 3*y"], ["x", "y"]).polynomials).at(np.array([[2.0, 1e-3]]))
        array([[4.003]])
        """
        return _positive(self._evaluator.evaluate(np.asarray(reference, dtype=float), jacobian=False).real)

    def gradients(self, points):
        """Size of each Jacobian row's terms at each point (2-norm over the variables), shape (P, m)."""
        return self.both(points)[1]


#: Below this |X_0| / max |X_k| a homogenised point is sized as a projective one (near infinity).
_CHART_FLOOR = 1e-3


def _positive(sizes):
    """Sizes with zeros (a zero polynomial, a constant's gradient) replaced by 1, so they divide safely."""
    return np.where(sizes > 0, sizes, 1.0)
