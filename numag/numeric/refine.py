"""Newton-type refinement: onto X in double precision (batched) and onto rank-drop points at any precision.

* :func:`project_to_variety` moves many points onto X = V(F) at once with the
  minimum-norm Gauss-Newton step (J may be wide, tall or rank deficient).
* :func:`mp_gauss_newton` is the same iteration at any precision, for a
  residual function supplied by the caller.
* :class:`RankDropSystem` is F together with the condition "rank J(x) <= r",
  written with an unknown kernel basis V = N0 + Nc W of dimension n - r:
  F(x) = 0 and J(x) V = 0. N0 spans the numerical kernel at the start point and
  Nc its complement, so V always has full column rank and no normalising
  equation is needed. A solution is a point of X where the rank really drops.

Examples
--------
>>> import numpy as np
>>> from numag.system.parse import parse_system
>>> from numag.numeric.evaluate import BatchEvaluator
>>> system = parse_system(["x^2 + y^2 - 1"], ["x", "y"])
>>> result = project_to_variety(system, BatchEvaluator(system.polynomials), np.array([[0.8, 0.61]]))
>>> bool(result.converged[0]), round(float(np.abs(result.points[0, 0]) ** 2 + np.abs(result.points[0, 1]) ** 2), 12)
(True, 1.0)
"""

from dataclasses import dataclass

import numpy as np

from ..kinds import TextEnum
from ..system.polynomial import Polynomial, PolynomialSystem
from .evaluate import BatchEvaluator, PrecisionEvaluator, TermSizes
from .minors import AugmentedEvaluator
from .linalg import batched_least_squares, mp_least_squares, mp_right_singular_vectors, scaled_singular_values

__all__ = ["SLID_RATIO", "ProjectionResult", "project_to_variety", "ZeroKind", "ZeroTest", "newton_zero_test", "explained_share", "mp_gauss_newton", "mp_scaled_equations", "RankDropSystem", "IsolationTest",
           "scaled_residual_norm", "largest_scaled_residual", "RankDropResult", "rank_drop_points"]

#: Decision 0141: Gauss-Newton that moved more than this many times its first minimum-norm step has slid to a zero
#: where F vanishes to higher order (twice its first step at a node or a cone's vertex from the saddle between the
#: branches, three times at a cusp): near a regular zero the two agree to first order. Smooth points of X can be
#: nearer the start. A ratio of lengths, so scale-free.
SLID_RATIO = 1.5
#: Step fractions a precision Gauss-Newton step tries before it stops for lack of progress.
_DAMPING = (1.0, 0.5, 0.25, 0.125, 1 / 16, 1 / 32)


@dataclass
class ProjectionResult:
    """Result of :func:`project_to_variety` (one entry per point).

    Attributes
    ----------
    points : ndarray, shape (P, n)
        Refined points.
    converged : ndarray of bool, shape (P,)
        Scaled residual at or below the tolerance.
    residuals : ndarray, shape (P,)
        Euclidean norm of the scaled residuals (f_i over the size of its terms, :class:`TermSizes`)
        at the refined point.
    distances : ndarray, shape (P,)
        Distance moved from the start point.
    iterations : int
        Iterations of the whole batch.
    first_steps : ndarray, shape (P,), optional
        Length of the first minimum-norm step (0 where the start was already within the tolerance): the linear
        model's distance to X.
    """

    points: np.ndarray
    converged: np.ndarray
    residuals: np.ndarray
    distances: np.ndarray
    iterations: int
    first_steps: np.ndarray = None

    @property
    def slid(self):
        """Points Newton moved more than :data:`SLID_RATIO` times their first step (decision 0141)."""
        if self.first_steps is None:
            return np.zeros(len(self.points), dtype=bool)
        with np.errstate(invalid="ignore"):
            return (self.first_steps > 0) & (self.distances > SLID_RATIO * self.first_steps)


def scaled_residual_norm(sizes, evaluator, points):
    """Euclidean norm of the scaled residuals of F at each point, and the values and Jacobians.

    The Euclidean norm (not the largest entry) is what a Gauss-Newton step decreases,
    so it is the measure steps are accepted by.

    Parameters
    ----------
    sizes : TermSizes
        Of the system's polynomials.
    evaluator : BatchEvaluator
        Of the same polynomials.
    points : ndarray, shape (P, n)
    """
    values, jacobians = evaluator.evaluate(points)
    return np.linalg.norm(values / sizes.values(points), axis=1), values, jacobians


def largest_scaled_residual(sizes, evaluator, points):
    """Largest scaled residual (max norm) of the equations at each affine point (inf for NaN points).

    Beside :func:`scaled_residual_norm` (the Euclidean norm, which Gauss-Newton decreases): the max norm
    says whether every equation holds to a tolerance.

    Parameters
    ----------
    sizes : TermSizes
        Of the polynomials: each value is divided by the size of its terms.
    evaluator : BatchEvaluator
        Of the same polynomials.
    points : ndarray, shape (P, n)

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x - 1", "y - 3"], ["x", "y"])
    >>> sizes, evaluator = TermSizes(system.polynomials), BatchEvaluator(system.polynomials)
    >>> largest_scaled_residual(sizes, evaluator, [[1.0, 3.0], [np.nan, 0]])
    array([ 0., inf])
    """
    points = np.atleast_2d(points)
    result = np.full(len(points), np.inf)
    good = np.all(np.isfinite(points), axis=1)
    if np.any(good):
        values = evaluator.evaluate(points[good], jacobian=False)
        result[good] = np.max(np.abs(values) / sizes.values(points[good]), axis=1)
    return result


def project_to_variety(system, evaluator, points, tolerance=1e-13, max_iterations=30, sizes=None):
    """Move points onto X with minimum-norm Gauss-Newton steps, all points at once.

    Parameters
    ----------
    system : PolynomialSystem
    evaluator : BatchEvaluator
        Evaluator of ``system.polynomials``.
    points : ndarray, shape (P, n)
    tolerance : float
        Target for the scaled residual.
    max_iterations : int
    sizes : TermSizes, optional
        Term sizes of the equations ``evaluator`` evaluates (default those of ``system.polynomials``; give
        them when the evaluator has more rows, e.g. evaluated minors).

    Returns
    -------
    ProjectionResult
    """
    start = np.array(points, dtype=complex, copy=True)
    current = start.copy()
    sizes = TermSizes(system.polynomials, system.projective) if sizes is None else sizes
    residual, values, jacobians = scaled_residual_norm(sizes, evaluator, current)
    active = residual > tolerance
    first_steps = np.zeros(len(current))
    iterations = 0
    while np.any(active) and iterations < max_iterations:
        iterations += 1
        index = np.nonzero(active)[0]
        step = batched_least_squares(jacobians[index], values[index], rcond=1e-13)
        if iterations == 1:
            first_steps[index] = np.linalg.norm(step, axis=1)
        better = np.zeros(len(index), dtype=bool)
        # Accept a step only where it does not make things worse, halving it a few times first
        # (at non-reduced solution sets the full step can overshoot); stop points that stall.
        for damping in (1.0, 0.5, 0.25, 0.125):
            trying = np.nonzero(~better)[0]
            if len(trying) == 0:
                break
            rows = index[trying]
            trial = current[rows] - damping * step[trying]
            trial_residual, trial_values, trial_jacobians = scaled_residual_norm(sizes, evaluator, trial)
            improved = np.isfinite(trial_residual) & (trial_residual < residual[rows])
            accept = rows[improved]
            current[accept] = trial[improved]
            residual[accept] = trial_residual[improved]
            values[accept] = trial_values[improved]
            jacobians[accept] = trial_jacobians[improved]
            better[trying[improved]] = True
        tiny_step = np.linalg.norm(step, axis=1) <= 1e-15 * (1 + np.linalg.norm(current[index], axis=1))
        active[index] = better & (residual[index] > tolerance) & ~tiny_step
    distances = np.linalg.norm(current - start, axis=1)
    return ProjectionResult(current, residual <= tolerance, residual, distances, iterations, first_steps)


#: Scaled residual within the rounding of double-precision evaluation (with a margin): a point Newton leaves
#: there is a zero as far as double precision can tell.
ROUNDING_RESIDUAL = 1e-11
#: A Gauss-Newton run that ends above :data:`ROUNDING_RESIDUAL` with less than this share of the residual in the
#: range of the Jacobian has not been explained by the linear model: no zero is near (decision 0064). Measured:
#: stationary points of |F| 1e-15 to 1e-10, points near zeros (a tacnode's stalled ones included) 1.0.
_EXPLAINED_SHARE = 1e-2
#: Singular values of J below this fraction of the largest span no direction of the range (rounding).
_RANGE_RCOND = 1e-13


def explained_share(jacobians, values):
    """The share |P F| / |F| of each residual in the range of its Jacobian (P the orthogonal projection).

    Parameters
    ----------
    jacobians : ndarray, shape (P, m, n)
    values : ndarray, shape (P, m)

    Returns
    -------
    ndarray, shape (P,)
        1 where the linear model can explain the whole residual, 0 at a stationary point of |F|
        (J^H F = 0); 1 where F is 0.

    Examples
    --------
    >>> jacobians = np.array([[[0.0, 0.0], [2.0, 0.0], [0.0, 2.0]], [[1.0, 0.0], [0.0, 1.0], [0.0, 0.0]]])
    >>> explained_share(jacobians, np.array([[1e-5, 0, 0], [1.0, 1.0, 0.0]])).round(12).tolist()
    [0.0, 1.0]
    """
    jacobians, values = np.asarray(jacobians), np.asarray(values)
    left, singular, _ = np.linalg.svd(jacobians, full_matrices=False)
    keep = singular > _RANGE_RCOND * singular[:, :1]
    coefficients = np.einsum("pmk,pm->pk", left.conj(), values) * keep
    norms = np.linalg.norm(values, axis=1)
    with np.errstate(invalid="ignore", divide="ignore"):
        share = np.linalg.norm(coefficients, axis=1) / norms
    return np.where(norms > 0, share, 1.0)


class ZeroKind(TextEnum):
    """What Newton's method says about a point as a zero of a system (decision 0064)."""

    ZERO = "zero"                  # refined to the rounding of double precision
    NOT_A_ZERO = "not a zero"      # refinement ends at a stationary point of |F| off V(F): the residual unexplained
    UNDECIDED = "undecided"        # explained by the linear model, not brought to rounding (a multiple zero)


@dataclass
class ZeroTest:
    """Result of :func:`newton_zero_test` (one entry per point).

    Attributes
    ----------
    points : ndarray, shape (P, n)
        The refined points.
    kinds : list of ZeroKind
    before, after : ndarray, shape (P,)
        Scaled residuals (Euclidean norm, :func:`scaled_residual_norm`) at the given and at the refined points.
    distances : ndarray, shape (P,)
        How far refinement moved each point.
    slid : ndarray of bool, shape (P,), optional
        :attr:`ProjectionResult.slid`: refinement went more than :data:`SLID_RATIO` times its first step.
    """

    points: np.ndarray
    kinds: list
    before: np.ndarray
    after: np.ndarray
    distances: np.ndarray
    slid: np.ndarray = None

    def mask(self, kind):
        """Boolean mask of the points of one :class:`ZeroKind`."""
        return np.array([k is kind for k in self.kinds], dtype=bool)


def newton_zero_test(system, evaluator, points, sizes=None, max_iterations=60):
    """Whether each point is a zero of the system, by what Newton's method does there, not by a residual bound.

    A residual bound needs a unit: terms are sized at max(|x_j|, 1) (:class:`TermSizes`), and a feature much
    smaller than that unit (a loop of size 1e-2 whose centre is a zero of F's derivatives, where F is a few
    1e-8 of its terms) passes any bound that lets through the endpoints of tracked paths. What Newton does does
    not depend on the unit: near a zero, regular or multiple, the linear model explains the residual and
    Gauss-Newton drives it down to rounding; at a stationary point of |F| off V(F) the step vanishes and the
    residual stays. A point is a :attr:`ZeroKind.ZERO` when refinement leaves its scaled residual within
    rounding (:data:`ROUNDING_RESIDUAL`), :attr:`ZeroKind.NOT_A_ZERO` when refinement ends above rounding with
    almost none of the residual in the range of the Jacobian (:func:`explained_share`: Gauss-Newton has found
    a stationary point of |F|), and :attr:`ZeroKind.UNDECIDED` otherwise (the linear model explains the
    residual but refinement could not finish: a multiple zero where the step overshoots). Below rounding double
    precision cannot tell a zero from a feature smaller than about the square root of the rounding (relative to
    the unit): such points count as zeros.

    Parameters
    ----------
    system : PolynomialSystem
    evaluator : BatchEvaluator
        Of ``system.polynomials`` (or with more rows, then give ``sizes``).
    points : ndarray, shape (P, n)
    sizes : TermSizes, optional
        As in :func:`project_to_variety`.
    max_iterations : int

    Returns
    -------
    ZeroTest

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> # the critical point (-1/150, 0) of a small loop: f_x = f_y = 0 there, f is 1.5e-5 (a few 1e-7 of its terms)
    >>> system = parse_system(["x^2 - y^2 + 100*x^3", "2*x + 300*x^2", "-2*y"], ["x", "y"])
    >>> test = newton_zero_test(system, BatchEvaluator(system.polynomials), np.array([[-1 / 150, 1e-9], [1e-9, 0]]))
    >>> [str(kind) for kind in test.kinds]
    ['not a zero', 'zero']
    """
    points = np.atleast_2d(np.asarray(points, dtype=complex))
    sizes = TermSizes(system.polynomials, system.projective) if sizes is None else sizes
    before, _, _ = scaled_residual_norm(sizes, evaluator, points)
    result = project_to_variety(system, evaluator, points, max_iterations=max_iterations, sizes=sizes)
    after = result.residuals
    with np.errstate(invalid="ignore"):
        zero = np.isfinite(after) & (after <= ROUNDING_RESIDUAL)
    # Where refinement ended above rounding: how much of the residual does the linear model explain (the share
    # of F(x) in the range of J(x), the directions Gauss-Newton can move it in)? At a stationary point of |F|
    # off V(F), J^H F = 0: none (1e-10 and less measured). Near a zero, regular or multiple, almost all of it
    # (1.0 where a tacnode's ill-conditioned step overshoots and refinement stalls at 1e-9).
    unexplained = np.zeros(len(points), dtype=bool)
    open_rows = np.nonzero(~zero & np.all(np.isfinite(result.points), axis=1))[0]
    if len(open_rows):
        _, values, jacobians = scaled_residual_norm(sizes, evaluator, result.points[open_rows])
        # F or J overflowing at a finite point (|x| = 1e90 in a quartic): no zero there, and no SVD of infinities
        finite = np.all(np.isfinite(values), axis=1) & np.all(np.isfinite(jacobians), axis=(1, 2))
        unexplained[open_rows[~finite]] = True
        if np.any(finite):
            unexplained[open_rows[finite]] = explained_share(jacobians[finite], values[finite]) < _EXPLAINED_SHARE
    unexplained |= ~zero & ~np.all(np.isfinite(result.points), axis=1)
    kinds = [ZeroKind.ZERO if z else ZeroKind.NOT_A_ZERO if u else ZeroKind.UNDECIDED
             for z, u in zip(zero, unexplained)]
    return ZeroTest(result.points, kinds, before, after, result.distances, result.slid)


def mp_scaled_equations(evaluator, sizes, ctx):
    """F and J at the precision of ``ctx``, each equation in units of its terms at the point: the function
    :func:`mp_gauss_newton` takes.

    Parameters
    ----------
    evaluator : PrecisionEvaluator
        Of the system's polynomials.
    sizes : TermSizes
        Of the same polynomials (the units of each equation at a point).
    ctx : mpmath context

    Examples
    --------
    >>> import mpmath
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x^2 - 4", "x*y - 2"], ["x", "y"])
    >>> function = mp_scaled_equations(PrecisionEvaluator(system.polynomials), TermSizes(system.polynomials), mpmath.mp)
    >>> z, reached, _, _ = mp_gauss_newton(function, mpmath.matrix([2.1, 0.9]), mpmath.mp, tolerance=1e-12)
    >>> reached, round(float(z[0].real), 12), round(float(z[1].real), 12)
    (True, 2.0, 1.0)
    """
    def function(z):
        n = z.rows
        x = [z[j] for j in range(n)]
        values, jacobian = evaluator.evaluate(x, ctx)
        scales = sizes.values(np.array([complex(v) for v in x])[None])[0]
        for i in range(len(scales)):
            values[i] /= scales[i]
            for j in range(n):
                jacobian[i, j] /= scales[i]
        return values, jacobian

    return function


def mp_gauss_newton(function, start, ctx, tolerance, max_iterations=80, anchored=False):
    """Minimum-norm Gauss-Newton at the precision of ``ctx``.

    Parameters
    ----------
    function : callable
        ``function(z) -> (residual, jacobian)``, both ``ctx.matrix``; the residual
        should already be scaled.
    start : ctx.matrix, shape (N, 1)
    ctx : mpmath context
    tolerance : float
        Stop when the residual norm is at or below it.
    max_iterations : int
    anchored : bool, default False
        Penalise the distance from ``start`` with a weight equal to the current
        residual norm. On solution sets where the equations are not reduced
        (the partials of x^2 - y^2 z along the z-axis) plain Gauss-Newton
        converges linearly and can slide along the set, far from the start;
        the anchor keeps it near the start and fades as the residual vanishes.

    Returns
    -------
    (ctx.matrix, bool, mpf, int)
        Final point, whether the residual reached the tolerance, the residual norm
        and the number of iterations.
    """
    current = start.copy()
    residual, jacobian = function(current)
    norm = ctx.norm(residual)
    iterations = 0
    rcond = ctx.mpf(10) ** (-(ctx.dps * 3) // 4)
    size = start.rows
    while norm > tolerance and iterations < max_iterations:
        iterations += 1
        if anchored:
            weight = norm
            rows = residual.rows
            matrix = ctx.matrix(rows + size, size)
            rhs = ctx.matrix(rows + size, 1)
            for i in range(rows):
                rhs[i] = residual[i]
                for j in range(size):
                    matrix[i, j] = jacobian[i, j]
            for j in range(size):
                matrix[rows + j, j] = weight
                rhs[rows + j] = weight * (current[j] - start[j])
            step = mp_least_squares(matrix, rhs, ctx, rcond=rcond)
        else:
            step = mp_least_squares(jacobian, residual, ctx, rcond=rcond)
        # Near a multiple solution the Jacobian is nearly rank deficient and a full step can
        # overshoot (a tacnode's rank-drop system stalled 2.6e-7 away): halve it before giving up.
        for damping in _DAMPING:
            trial = current - step * damping
            trial_residual, trial_jacobian = function(trial)
            trial_norm = ctx.norm(trial_residual)
            if trial_norm < norm:  # progress (this also rejects non-finite values)
                break
        else:
            break
        current, residual, jacobian, norm = trial, trial_residual, trial_jacobian, trial_norm
        if ctx.norm(step) <= ctx.eps * (1 + ctx.norm(current)):
            break
    return current, bool(norm <= tolerance), norm, iterations


class RankDropSystem:
    """F(x) = 0 together with rank J(x) <= ``rank``, as a least-squares system in (x, W).

    Parameters
    ----------
    system : PolynomialSystem
    rank : int
        The largest rank allowed; the kernel basis has ``n - rank`` columns.
    start : sequence of complex
        The point whose numerical kernel gives N0 and whose scales fix the row weights.
    ctx : mpmath context
        Context the system is evaluated in (its precision may rise between calls).
    evaluators : tuple, optional
        ``(PrecisionEvaluator(system.polynomials), PrecisionEvaluator(first derivatives flattened))``, as
        :meth:`evaluators_of` makes them: a caller looking at several points shares their derivatives and
        converted coefficients (the same numbers).

    Notes
    -----
    Unknowns: n coordinates and (n - k) k entries of W, with k = n - rank.
    Equations: m values and m k entries of J(x) V. The derivative of J(x) V with
    respect to x needs the second derivatives of F, which come from evaluating
    the Jacobian of the flattened first derivatives.
    """

    def __init__(self, system, rank, start, ctx, evaluators=None):
        self.system = system
        self.ctx = ctx
        n, m = system.n_variables, system.n_equations
        self.n, self.m = n, m
        self.kernel_dimension = n - rank
        self.values, self.first_derivatives = self.evaluators_of(system) if evaluators is None else evaluators
        start_array = np.array([complex(v) for v in start])
        value_sizes, row_sizes = TermSizes(system.polynomials, system.projective).both(start_array[None, :])
        self.value_weights, self.row_weights = 1.0 / value_sizes[0], 1.0 / row_sizes[0]
        point = [ctx.mpc(v) for v in start]
        _, jacobian = self.values.evaluate(point, ctx)
        scaled = ctx.matrix(m, n)
        for i in range(m):
            for j in range(n):
                scaled[i, j] = jacobian[i, j] * self.row_weights[i]
        basis = mp_right_singular_vectors(scaled, ctx)
        k = self.kernel_dimension
        self.kernel_start = basis[:, n - k:n] if k else ctx.matrix(n, 0)
        self.complement = basis[:, 0:n - k] if n - k else ctx.matrix(n, 0)

    @staticmethod
    def evaluators_of(system, values=None):
        """The evaluators of F (``values`` if given) and of its first derivatives, flattened."""
        flat = [d for row in system.jacobian_polynomials() for d in row]
        return (PrecisionEvaluator(system.polynomials) if values is None else values), PrecisionEvaluator(flat)

    @property
    def n_unknowns(self):
        """Coordinates plus the free entries of W."""
        return self.n + (self.n - self.kernel_dimension) * self.kernel_dimension

    def initial(self, point):
        """Unknown vector (x, W = 0) for a point."""
        z = self.ctx.matrix(self.n_unknowns, 1)
        for j, v in enumerate(point):
            z[j] = self.ctx.mpc(v)
        return z

    def kernel_basis(self, z):
        """V = N0 + Nc W for the unknown vector ``z``."""
        ctx, n, k = self.ctx, self.n, self.kernel_dimension
        basis = self.kernel_start.copy() if k else ctx.matrix(n, 0)
        if k and n - k:
            w = ctx.matrix(n - k, k)
            for a in range(n - k):
                for b in range(k):
                    w[a, b] = z[n + a * k + b]
            basis = basis + self.complement * w
        return basis

    def __call__(self, z):
        """Scaled residual and its Jacobian at the unknown vector ``z``."""
        ctx, n, m, k = self.ctx, self.n, self.m, self.kernel_dimension
        x = [z[j] for j in range(n)]
        values, jacobian = self.values.evaluate(x, ctx)
        _, second = self.first_derivatives.evaluate(x, ctx)  # rows (i, j), columns l: d2 f_i / dx_j dx_l
        basis = self.kernel_basis(z)
        rows = m + m * k
        residual = ctx.matrix(rows, 1)
        derivative = ctx.matrix(rows, self.n_unknowns)
        for i in range(m):
            residual[i] = values[i] * self.value_weights[i]
            for j in range(n):
                derivative[i, j] = jacobian[i, j] * self.value_weights[i]
        if k:
            product = jacobian * basis
            jacobian_complement = jacobian * self.complement if n - k else None
            for i in range(m):
                weight = self.row_weights[i]
                for q in range(k):
                    row = m + i * k + q
                    residual[row] = product[i, q] * weight
                    for l in range(n):
                        total = ctx.mpc(0)
                        for j in range(n):
                            total += second[i * n + j, l] * basis[j, q]
                        derivative[row, l] = total * weight
                    for a in range(n - k):
                        derivative[row, n + a * k + q] = jacobian_complement[i, a] * weight
        return residual, derivative

    def point_of(self, z):
        """The coordinates part of an unknown vector, as complex numbers."""
        return np.array([complex(z[j]) for j in range(self.n)])


class _WithSlice:
    """F's evaluator and term sizes with one hyperplane row ``normal . x - offset`` appended.

    Evaluates as a ``BatchEvaluator`` of F and the hyperplane would, and sizes the row's terms as
    ``TermSizes`` would (sum_j |normal_j| max(|x_j|, 1) + |offset|), without building either.
    """

    def __init__(self, evaluator, sizes, normal, offset):
        self.evaluator, self.sizes = evaluator, sizes
        self.normal, self.offset = np.asarray(normal, dtype=complex), complex(offset)

    def evaluate(self, points, jacobian=True):
        points = np.atleast_2d(np.asarray(points, dtype=complex))
        row = (points @ self.normal - self.offset)[:, None]
        if not jacobian:
            return np.hstack([self.evaluator.evaluate(points, jacobian=False), row])
        values, jacobians = self.evaluator.evaluate(points)
        gradient = np.broadcast_to(self.normal, (len(points), 1, len(self.normal)))
        return np.hstack([values, row]), np.concatenate([jacobians, gradient], axis=1)

    def values(self, points):
        points = np.atleast_2d(points)
        row = np.maximum(np.abs(points), 1.0) @ np.abs(self.normal) + abs(self.offset)
        return np.hstack([self.sizes.values(points), row[:, None]])


class IsolationTest:
    """Is a singular endpoint isolated? Slice through a point moved along the kernel of J.

    The point is moved by a small distance along a random direction d of the
    numerical kernel of J, and F is solved together with the hyperplane through
    the moved point orthogonal to d. A positive-dimensional solution set through
    the point (tangent to the kernel) crosses that hyperplane nearby, so Gauss-Newton
    converges; at an isolated solution, however multiple, the hyperplane misses it
    and the residual stays of the order of a power of the distance. "Not isolated" is
    positive evidence (a nearby solution off the point was found at two distances);
    "isolated" means eight tries found none. The second, larger distance (a tenth of the
    point's size) is what tells a point of high multiplicity mu from a curve: at distance r its
    residual is about r^mu, below double precision for r = 1e-3 once mu >= 5.

    Parameters
    ----------
    system : PolynomialSystem
        Affine, at least as many equations as unknowns near the point.
    rng : numpy.random.Generator
    minors : EvaluatedMinors, optional
        Further equations, evaluated minors in the same variables (never expanded).

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> rng = np.random.default_rng(0)
    >>> IsolationTest(parse_system(["x*y", "x*z"], ["x", "y", "z"]), rng).isolated(np.zeros(3))
    False
    >>> IsolationTest(parse_system(["x^2", "y", "z"], ["x", "y", "z"]), rng).isolated(np.zeros(3))
    True
    """

    def __init__(self, system, rng, minors=None):
        self.system = system
        self.rng = rng
        self.minors = minors  # EvaluatedMinors that are equations too (after the polynomials), or None
        self.evaluator = BatchEvaluator(system.polynomials) if minors is None \
            else AugmentedEvaluator(system.polynomials, minors)
        # F's term sizes, built once: the slices of every try reuse F's evaluator and these (a sliced system's
        # own evaluator per try was 5,337 evaluators for cyclic 8's 601 tested points; decision 0077)
        self.sizes = TermSizes(system.polynomials) if minors is None else self.evaluator

    def isolated(self, point):
        _, jacobian = self.evaluator.evaluate(point[None, :])
        scales = self.sizes.gradients(point[None, :])
        values = scaled_singular_values(jacobian, scales)[0]
        small = self.system.n_variables - int(np.sum(values > 1e-6))
        if small == 0:
            return True
        _, _, vh = np.linalg.svd(jacobian[0] / scales[0][:, None])
        kernel = vh[len(vh) - small:].conj().T
        for _ in range(8):  # a direction nearly across the set can miss it; eight random tries
            weights = self.rng.standard_normal(small) + 1j * self.rng.standard_normal(small)
            direction = kernel @ weights
            direction /= np.linalg.norm(direction)
            if all(self._meets(point, direction, relative) for relative in (1e-3, 1e-1)):
                return False
        return True

    def _meets(self, point, direction, relative):
        """Does X meet the hyperplane orthogonal to ``direction`` at ``relative`` distance, near the point?"""
        radius = relative * (1 + np.linalg.norm(point))
        moved = point + radius * direction
        normal = direction.conj()  # hyperplane conj(d) . x = conj(d) . moved
        sliced = PolynomialSystem(self.system.variables, [p.numeric() for p in self.system.polynomials]
                                  + [Polynomial.linear(normal, -complex(normal @ moved))])
        if self.minors is None:
            with_slice = _WithSlice(self.evaluator, self.sizes, normal, complex(normal @ moved))
            result = project_to_variety(sliced, with_slice, moved[None, :], max_iterations=60, sizes=with_slice)
        else:
            both = AugmentedEvaluator(sliced.polynomials, self.minors)
            result = project_to_variety(sliced, both, moved[None, :], max_iterations=60, sizes=both)
        return bool(result.converged[0] and np.linalg.norm(result.points[0] - point) <= 10 * radius)


@dataclass
class RankDropResult:
    """Result of :func:`rank_drop_points` (one entry per start point).

    Attributes
    ----------
    points : ndarray, shape (P, n)
        Where Newton ended: the nearby point where F = 0 and rank J <= rank, when converged.
    converged : ndarray of bool, shape (P,)
        Scaled residual of the whole rank-drop system at or below the tolerance.
    residuals : ndarray, shape (P,)
        Euclidean norm of that scaled residual.
    conditioning : ndarray, shape (P,)
        Smallest over largest singular value of the rank-drop system's scaled Jacobian in (x, W) where
        Newton ended (0 when it has fewer rows than unknowns): clearly above 0 at a regular zero (a node,
        a fold of a linkage), where Newton's answer is accurate to rounding times its inverse; about 0 where
        the zero is not regular (a cusp, a tacnode: Milnor number > 1), where Newton stalls short of it.
    """

    points: np.ndarray
    converged: np.ndarray
    residuals: np.ndarray
    conditioning: np.ndarray


def rank_drop_points(system, points, rank, tolerance=None, max_iterations=25):
    """F = 0 and rank J <= ``rank`` near each point: the double-precision form of :class:`RankDropSystem`.

    All points in one batch: the same unknowns (x and the kernel coordinates W of V = N0 + Nc W) and the
    same scaled equations (F, J V) as the mpmath system, Gauss-Newton with numpy's batched pseudo-inverse.
    Judging candidates one at a time with mpmath's pure-Python SVD took 90 % of a six-bar linkage's
    singular locus; this settles the clear cases in double and leaves the doubtful ones to it
    (decision 0038).

    Parameters
    ----------
    system : PolynomialSystem
        With numeric or exact coefficients (evaluated in double).
    points : ndarray, shape (P, n)
    rank : int
        Largest rank allowed (the kernel has ``n - rank`` columns).
    tolerance : float, optional
        Residual norm counted as converged; default 1000 * max(rows, unknowns) * eps.
    max_iterations : int

    Returns
    -------
    RankDropResult

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    >>> found = rank_drop_points(node, np.array([[1e-3, -2e-3]], dtype=complex), rank=0)
    >>> bool(found.converged[0]), bool(np.abs(found.points[0]).max() < 1e-12)
    (True, True)
    """
    points = np.array(points, dtype=complex).reshape(-1, system.n_variables)
    count, n, m = len(points), system.n_variables, system.n_equations
    k = n - rank
    if count == 0:
        return RankDropResult(points, np.zeros(0, dtype=bool), np.zeros(0), np.zeros(0))
    values_evaluator = BatchEvaluator(system.polynomials)
    second_evaluator = BatchEvaluator([d for row in system.jacobian_polynomials() for d in row])
    value_sizes, row_sizes = TermSizes(system.polynomials, system.projective).both(points)
    value_weights, row_weights = 1.0 / value_sizes, 1.0 / row_sizes
    _, start_jacobians = values_evaluator.evaluate(points)
    _, _, right = np.linalg.svd(start_jacobians * row_weights[:, :, None])
    basis = np.conj(np.swapaxes(right, 1, 2))  # columns: right singular vectors, the kernel last
    kernel_start, complement = basis[:, :, n - k:], basis[:, :, :n - k]
    unknowns = n + (n - k) * k
    # A projective system's rank drops on whole lines, and at 0 for any degree above 1: one more
    # row keeps x on the affine patch through its start point (conj(p0).x = |p0|^2).
    patch = np.conj(points) / np.sum(np.abs(points) ** 2, axis=1, keepdims=True) if system.projective else None
    rows = m + m * k + (1 if system.projective else 0)
    if tolerance is None:
        tolerance = 1000.0 * max(rows, unknowns) * np.finfo(float).eps

    def residual_and_jacobian(chosen, x, w):
        """The scaled residual and its Jacobian for the start points ``chosen`` at (x, W)."""
        values, jacobians = values_evaluator.evaluate(x)
        value_weight, row_weight = value_weights[chosen], row_weights[chosen]
        kernel = kernel_start[chosen] + complement[chosen] @ w
        parts = [values * value_weight, ((jacobians @ kernel) * row_weight[:, :, None]).reshape(len(x), m * k)]
        if patch is not None:
            parts.append(np.sum(patch[chosen] * x, axis=1, keepdims=True) - 1.0)
        residual = np.concatenate(parts, axis=1)
        _, second = second_evaluator.evaluate(x)  # [p, i*n + j, l] = d2 f_i / dx_j dx_l
        second = second.reshape(len(x), m, n, n)
        derivative = np.zeros((len(x), rows, unknowns), dtype=complex)
        derivative[:, :m, :n] = jacobians * value_weight[:, :, None]
        weighted = row_weight[:, :, None, None]
        derivative[:, m:m + m * k, :n] = (np.einsum("pijl,pjq->piql", second, kernel) * weighted).reshape(
            len(x), m * k, n)
        if patch is not None:
            derivative[:, -1, :n] = patch[chosen]
        if n - k:
            # d(J Nc W)[i, q] / dW[a, b] = (J Nc)[i, a] when q == b: one block per kernel column
            reduced = (jacobians @ complement[chosen]) * row_weight[:, :, None]  # (p, m, n - k)
            block = np.einsum("pia,qb->piqab", reduced, np.eye(k)).reshape(len(x), m * k, (n - k) * k)
            derivative[:, m:m + m * k, n:] = block
        return residual, derivative

    x, w = points.copy(), np.zeros((count, n - k, k), dtype=complex)
    residual, derivative = residual_and_jacobian(np.arange(count), x, w)
    norms = np.linalg.norm(residual, axis=1)
    active = np.isfinite(norms) & (norms > tolerance)
    for _ in range(max_iterations):
        if not np.any(active):
            break
        index = np.nonzero(active)[0]
        step = batched_least_squares(derivative[index], residual[index], rcond=1e-13)
        improved = np.zeros(len(index), dtype=bool)
        for damping in (1.0, 0.5, 0.25):  # near a multiple solution a full step can overshoot
            pending = ~improved
            if not np.any(pending):
                break
            chosen = index[pending]
            trial_x = x[chosen] - damping * step[pending, :n]
            trial_w = w[chosen] - damping * step[pending, n:].reshape(len(chosen), n - k, k)
            trial_residual, trial_derivative = residual_and_jacobian(chosen, trial_x, trial_w)
            trial_norms = np.linalg.norm(trial_residual, axis=1)
            better = trial_norms < norms[chosen]  # also rejects non-finite values
            accepted = chosen[better]
            x[accepted], w[accepted] = trial_x[better], trial_w[better]
            residual[accepted], derivative[accepted], norms[accepted] = (trial_residual[better],
                                                                         trial_derivative[better], trial_norms[better])
            improved[np.nonzero(pending)[0][better]] = True
        active[index[~improved]] = False  # stalled: no damped step reduced the residual
        active &= norms > tolerance
    return RankDropResult(x, norms <= tolerance, norms, _conditioning(derivative))


def _conditioning(matrices):
    """Smallest over largest singular value of each matrix of a stack (0: fewer rows than columns, or not
    finite), by one batched SVD."""
    count, rows, columns = matrices.shape
    conditioning = np.zeros(count)
    finite = np.all(np.isfinite(matrices.reshape(count, -1)), axis=1)
    if rows < columns or not np.any(finite):
        return conditioning
    values = np.linalg.svd(matrices[finite], compute_uv=False)
    largest = values[:, 0]
    conditioning[finite] = np.where(largest > 0, values[:, -1] / np.where(largest > 0, largest, 1.0), 0.0)
    return conditioning
