"""Homotopies between a start system and a target, in projective coordinates on a random affine patch.

The target F (n equations in n affine unknowns, or homogeneous in n + 1) is
homogenised to F^h in X = (X_0, ..., X_n), X_0 the homogenising coordinate
first. A random linear equation a . X = 1 (the patch) makes the system square
in n + 1 unknowns and keeps paths that go to infinity (X_0 -> 0) finite.

The total-degree start system is G_i = X_i^d_i - X_0^d_i with the Bezout
number prod d_i of known solutions. The straight-line homotopy with the
gamma trick is

    H(X, s) = (1 - s) F^h(X) + s gamma G(X),   s from 1 to 0,

with gamma a random unit complex number. Start systems are classes with
``degrees``, ``evaluate`` and ``solutions`` so that multihomogeneous or
polyhedral starts can be added without touching the tracker.

Examples
--------
>>> import numpy as np
>>> from numag.system.parse import parse_system
>>> system = parse_system(["x^2 - 2", "y - x"], ["x", "y"])
>>> homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(0))
>>> homotopy.start_solutions().shape
(2, 3)
"""

import numpy as np

from ..system.display import counted
from ..system.polynomial import Polynomial
from ..errors import InputError
from ..numeric.evaluate import BatchEvaluator, PrecisionEvaluator, TermSizes
from .multihomogeneous import MultihomogeneousStart, homogenized_to
from ..numeric.minors import AugmentedEvaluator, EvaluatedMinors

__all__ = ["TotalDegreeStart", "StraightLineHomotopy", "ParameterHomotopy", "random_unit_complex"]


def random_unit_complex(rng, size=None):
    """Random complex numbers of modulus one (uniform angle)."""
    return np.exp(2j * np.pi * rng.random(size))


class TotalDegreeStart:
    """G_i = X_i^d_i - X_0^d_i in homogeneous coordinates (X_0 first).

    Parameters
    ----------
    degrees : sequence of int
        d_1, ..., d_n (each at least 1).
    """

    def __init__(self, degrees):
        self.degrees = np.array(degrees, dtype=np.int64)
        if np.any(self.degrees < 1):
            raise InputError("every equation must have degree at least 1 for a total-degree start")

    @property
    def n_paths(self):
        """The Bezout number prod d_i."""
        return int(np.prod(self.degrees))

    def evaluate(self, points):
        """G and its Jacobian at points of shape (P, n + 1)."""
        x0 = points[:, :1]
        rest = points[:, 1:]
        d = self.degrees[None, :]
        values = rest ** d - x0 ** d
        count, n = rest.shape
        jacobian = np.zeros((count, n, n + 1), dtype=complex)
        jacobian[:, :, 0] = -d * x0 ** (d - 1)
        index = np.arange(n)
        jacobian[:, index, index + 1] = d * rest ** (d - 1)
        return values, jacobian

    def evaluate_parts(self, points):
        """G, the diagonal dG_i/dX_i and the column dG_i/dX_0 (the only nonzero Jacobian entries)."""
        x0 = points[:, :1]
        rest = points[:, 1:]
        d = self.degrees[None, :]
        if np.all(self.degrees == self.degrees[0]):  # one degree: powers of a scalar (an array of exponents
            lower = int(self.degrees[0]) - 1       # takes numpy's general complex power, several times slower)
            rest_power, x0_power = rest ** lower, x0 ** lower
        else:
            rest_power, x0_power = rest ** (d - 1), x0 ** (d - 1)
        return rest_power * rest - x0_power * x0, d * rest_power, -d * x0_power

    def values(self, points):
        """G alone (what a corrector reusing an earlier Jacobian needs)."""
        x0 = points[:, :1]
        rest = points[:, 1:]
        if np.all(self.degrees == self.degrees[0]):  # one degree: integer powers of a scalar (cheaper)
            d = int(self.degrees[0])
            return rest ** d - x0 ** d
        return rest ** self.degrees[None, :] - x0 ** self.degrees[None, :]

    def evaluate_precise(self, point, ctx):
        """G and its Jacobian at one point in an mpmath context (lists of rows)."""
        x0 = point[0]
        size = len(self.degrees) + 1
        values, jacobian = [], []
        for i, d in enumerate(int(d) for d in self.degrees):
            values.append(point[i + 1] ** d - x0 ** d)
            row = [ctx.mpf(0)] * size
            row[0] = -d * x0 ** (d - 1)
            row[i + 1] = d * point[i + 1] ** (d - 1)
            jacobian.append(row)
        return values, jacobian

    def solutions(self, path_indices=None):
        """Start solutions with X_0 = 1, in a fixed order (path k is the same whatever the batch)."""
        total = self.n_paths
        indices = np.arange(total) if path_indices is None else np.asarray(path_indices)
        digits = np.empty((len(indices), len(self.degrees)), dtype=np.int64)
        rest = indices.copy()
        for j in range(len(self.degrees) - 1, -1, -1):  # mixed-radix digits of the path number
            digits[:, j] = rest % self.degrees[j]
            rest //= self.degrees[j]
        roots = np.exp(2j * np.pi * digits / self.degrees[None, :])
        return np.column_stack([np.ones(len(indices), dtype=complex), roots])


class _PatchedHomotopy:
    """What every homotopy on a random affine patch shares: the patch row and the endpoint test."""

    def _precise_patch_row(self, values, jacobian, point, ctx):
        size = self.size
        patch = [ctx.mpc(a.real, a.imag) for a in self.patch]
        values[size - 1] = sum(a * x for a, x in zip(patch, point)) - 1
        for j in range(size):
            jacobian[size - 1, j] = patch[j]

    @property
    def projective_patch(self):
        """The patch a (points are homogeneous coordinates X with a . X = 1): the endgame may average in
        another chart and come back."""
        return self.patch

    def row_scales(self, points):
        """Size of each target row's gradient terms at points (P, n + 1) (see :class:`TermSizes`)."""
        return self._sizes.gradients(points)

    def target_residual(self, points):
        """Norm of the scaled residuals of the target F^h at points (P, n + 1): is X an endpoint?"""
        values = self.evaluator.evaluate(points, jacobian=False)
        scales = self._sizes.values(points)
        return np.linalg.norm(values / scales, axis=1)


class StraightLineHomotopy(_PatchedHomotopy):
    """H(X, s) = (1 - s) F^h(X) + s gamma G(X) together with the patch a . X = 1.

    Parameters
    ----------
    target : list of Polynomial
        Homogeneous polynomials in n + 1 variables (homogenising coordinate first).
    start : start system object (see :class:`TotalDegreeStart`)
    patch : ndarray, shape (n + 1,)
    gamma : complex
    homogenized : bool, default True
        The target is homogenised affine equations (X_0 the homogenising coordinate): residuals
        and row scales size the terms in the chart X_0 = 1 (see :class:`~numag.numeric.evaluate.TermSizes`).
    minors : EvaluatedMinors, optional
        Equations evaluated from the Jacobian (homogeneous, in the same n + 1 variables), appended to the
        target after ``target``: F plus minors that are never expanded.
    """

    def __init__(self, target, start, patch, gamma, homogenized=True, minors=None):
        self.target = list(target)
        self.start = start
        self.patch = np.asarray(patch, dtype=complex)
        self.gamma = complex(gamma)
        self.size = len(self.patch)
        self.minors = minors
        rows = len(self.target) + (0 if minors is None else minors.count)
        if rows + 1 != self.size:
            raise InputError(f"a square system is needed: {counted(rows, 'equation')} in {counted(self.size - 1, 'unknown')}")
        if minors is None:
            self.evaluator = BatchEvaluator(self.target, spare_columns=self.size)  # room for the patch row
            self._sizes = TermSizes(self.target, projective=True, homogenized=homogenized)
        else:  # the same interface: values, Jacobian rows, spare columns; term sizes; mpmath
            self.evaluator = AugmentedEvaluator(self.target, minors, spare_columns=self.size, projective=True,
                                                homogenized=homogenized)
            self._sizes = self.evaluator
        self.evaluations = 0
        self.value_evaluations = 0
        self._precise = None

    @classmethod
    def total_degree(cls, system, rng, minors=None):
        """Total-degree homotopy for a square affine system (or a projective one with n equations in n + 1).

        Parameters
        ----------
        system : PolynomialSystem
        rng : numpy.random.Generator
        minors : MinorWeights, optional
            Minors det(A_k J B_k) of the system's Jacobian appended as evaluated equations (affine systems):
            the system's equations and these minors together must be square.

        Examples
        --------
        >>> from numag.numeric.minors import random_minor_weights
        >>> from numag.system.parse import parse_system
        >>> surface = parse_system(["x^2 + y^2 - z^2 - 1"], ["x", "y", "z"])
        >>> rng = np.random.default_rng(1)
        >>> homotopy = StraightLineHomotopy.total_degree(surface, rng, random_minor_weights(1, 3, 1, 0, rng, count=2))
        >>> homotopy.start.degrees.tolist()
        [2, 1, 1]
        """
        extra = 0 if minors is None else minors.count
        expected = system.n_variables - (1 if system.projective else 0)
        if system.n_equations + extra != expected:
            raise InputError(f"the system is not square: {system.n_equations + extra} equations, {expected} unknowns")
        if minors is not None and system.projective:
            raise InputError("evaluated minors are appended to affine systems only")
        # Each equation divided by its coefficient norm: F and G then have comparable size, so the
        # paths do not rush away from the start points (fewer steps near s = 1); zeros are unchanged.
        if system.projective:
            target = [p.scaled(1.0 / p.coefficient_norm()) for p in system.polynomials]
        else:
            target = [p.numeric().homogenize(0).scaled(1.0 / p.coefficient_norm()) for p in system.polynomials]
        size = expected + 1
        degrees = list(system.degrees)
        evaluated = None
        if minors is not None:
            # the minors of the normalised equations, divided by the size of their terms at X = (1, ..., 1)
            normalised = [p.numeric().scaled(1.0 / p.coefficient_norm()) for p in system.polynomials]
            evaluated = EvaluatedMinors.from_weights(normalised, minors, homogenized=True)
            evaluated = evaluated.scaled_to_unit(np.ones((1, size)))
            degrees += evaluated.degrees
        patch = (rng.standard_normal(size) + 1j * rng.standard_normal(size)) / np.sqrt(2 * size)
        return cls(target, TotalDegreeStart(degrees), patch, random_unit_complex(rng),
                   homogenized=not system.projective, minors=evaluated)

    @classmethod
    def multihomogeneous(cls, system, groups, rng):
        """Homotopy from a product of random linear forms respecting ``groups`` (an affine square system).

        Each target equation is homogenised to the total degree of its start equation (see
        :mod:`numag.tracking.multihomogeneous`), then divided by its coefficient norm.
        """
        if system.projective or system.n_equations != system.n_variables:
            raise InputError("a multihomogeneous start needs a square affine system")
        start = MultihomogeneousStart.random(system.polynomials, groups, rng)
        target = [homogenized_to(p, int(d)).scaled(1.0 / p.coefficient_norm())
                  for p, d in zip(system.polynomials, start.degrees)]
        size = len(target) + 1
        patch = (rng.standard_normal(size) + 1j * rng.standard_normal(size)) / np.sqrt(2 * size)
        return cls(target, start, patch, random_unit_complex(rng))

    def start_solutions(self, path_indices=None):
        """Start solutions scaled onto the patch."""
        points = self.start.solutions(path_indices)
        return points / (points @ self.patch)[:, None]

    def evaluate_precise(self, point, s, ctx):
        """H, dH/dX and dH/ds at one point in an mpmath context (for re-tracking in high precision).

        Returns ctx matrices of shapes (N, 1), (N, N) and (N, 1).
        """
        if self._precise is None:
            self._precise = PrecisionEvaluator(self.target) if self.minors is None else self.evaluator
        size = self.size
        f_values, f_jac = (self._precise.evaluate(point, ctx) if self.minors is None
                           else self._precise.evaluate_precise(point, ctx))
        g_values, g_jac = self.start.evaluate_precise(point, ctx)
        gamma = ctx.mpc(self.gamma.real, self.gamma.imag)
        values, jacobian, derivative = ctx.matrix(size, 1), ctx.matrix(size, size), ctx.matrix(size, 1)
        for i in range(size - 1):
            values[i] = (1 - s) * f_values[i] + s * gamma * g_values[i]
            derivative[i] = gamma * g_values[i] - f_values[i]
            for j in range(size):
                jacobian[i, j] = (1 - s) * f_jac[i, j] + s * gamma * g_jac[i][j]
        self._precise_patch_row(values, jacobian, point, ctx)
        return values, jacobian, derivative

    def evaluate_values(self, points, s):
        """H alone (with the patch row): what a corrector reusing an earlier Jacobian needs."""
        self.value_evaluations += 1
        g_values = self.start.values(points) if hasattr(self.start, "values") else \
            self.start.evaluate_parts(points)[0]
        values = np.empty((len(points), self.size), dtype=complex)
        values[:, :-1] = (1 - s)[:, None] * self.evaluator.evaluate(points, jacobian=False) \
            + (s * self.gamma)[:, None] * g_values
        values[:, -1] = points @ self.patch - 1
        return values

    def evaluate(self, points, s):
        """H, dH/dX (with the patch row) and dH/ds at points (P, n + 1) and parameters s (P,)."""
        self.evaluations += 1
        count, size = len(points), self.size
        n = size - 1
        weight_f = (1 - s)[:, None]
        # [F | rows of (1 - s) J_F | zeros for the patch row]: the evaluator weights J's few monomials
        raw = self.evaluator.raw(points, jacobian_weights=weight_f[:, 0])
        f_values = raw[:, :n]
        sparse = hasattr(self.start, "evaluate_parts")
        if sparse:
            g_values, g_diagonal, g_first = self.start.evaluate_parts(points)
        else:  # a start with a dense Jacobian (products of linear forms)
            g_values, g_jacobian = self.start.evaluate(points)
        weight_g = (s * self.gamma)[:, None]
        values = np.empty((count, size), dtype=complex)
        values[:, :-1] = weight_f * f_values + weight_g * g_values
        values[:, -1] = points @ self.patch - 1
        jacobian = raw[:, n:].reshape(count, size, size)  # a view: (1 - s) J_F, then G, then the patch
        if sparse:  # the total-degree G's Jacobian: a diagonal (in X_1..X_n) and the column of X_0
            index = np.arange(size - 1)
            jacobian[:, index, index + 1] += weight_g * g_diagonal
            jacobian[:, :-1, 0] += weight_g * g_first
        else:
            jacobian[:, :-1, :] += weight_g[:, :, None] * g_jacobian
        jacobian[:, -1, :] = self.patch
        derivative = np.zeros((count, size), dtype=complex)
        derivative[:, :-1] = self.gamma * g_values - f_values
        return values, jacobian, derivative


class ParameterHomotopy(_PatchedHomotopy):
    """Move the coefficients of one system to those of another with the same variables.

    H(X, s) = (1 - tau(s)) F_target^h(X) + tau(s) F_start^h(X), together with the patch, where
    tau(s) = gamma s / (1 + (gamma - 1) s) runs from 0 (s = 0) to 1 (s = 1) along a complex
    path (the gamma trick for parameter homotopies: for all but finitely many gamma the
    path avoids the systems where solutions collide). The start solutions are known
    solutions of the start system, e.g. from an earlier run; this is what witness sets
    and monodromy loops need.

    Parameters
    ----------
    start, target : list of Polynomial
        Homogeneous polynomials in the same n + 1 variables (homogenising coordinate first). A start row
        may be a :class:`~numag.numeric.minors.LinearFormProduct` (evaluated as a product, never expanded).
    patch : ndarray, shape (n + 1,)
    gamma : complex
    homogenized : bool, default True
        As for :class:`StraightLineHomotopy`.
    held : CombinedRows, optional
        Rows equal in start and target, evaluated rather than written out (random combinations of F and
        evaluated minors, :class:`~numag.numeric.minors.CombinedRows`): the first rows of H, before ``start``
        and ``target``.
    held_start : list of (Polynomial or None), optional
        One entry per held row: None where the row is the same in start and target, else the homogeneous
        polynomial (or evaluated row, e.g. :class:`~numag.numeric.minors.LinearFormProduct`) it starts from (a
        regeneration moves a product of linear forms to an evaluated minor).

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> start = parse_system(["x^2 - 1"], ["x"])
    >>> target = parse_system(["x^2 - 4"], ["x"])
    >>> homotopy = ParameterHomotopy.from_systems(start, target, np.random.default_rng(0))
    >>> homotopy.start_solutions_from([[1.0], [-1.0]]).shape
    (2, 2)
    """

    def __init__(self, start, target, patch, gamma, homogenized=True, held=None, held_start=None,
                 shared_evaluator=False):
        self.start_polynomials = list(start)
        self.target = list(target)
        self.patch = np.asarray(patch, dtype=complex)
        self.gamma = complex(gamma)
        self.size = len(self.patch)
        self.held = held
        first = 0 if held is None else held.count  # the held rows come first
        if first + len(self.target) + 1 != self.size or len(self.start_polynomials) != len(self.target):
            raise InputError("start and target must be square systems of the same size")
        self.evaluator = BatchEvaluator(self.target) if held is None else _HeldThenPolynomials(held, self.target)
        # Rows equal in start and target (equations held fixed while slices move) are evaluated once.
        held_start = [None] * first if held_start is None else list(held_start)
        if len(held_start) != first:
            raise InputError(f"{len(held_start)} start rows given for {first} held rows")
        self._held_moving = [k for k, p in enumerate(held_start) if p is not None]
        self._held_start = [held_start[k] for k in self._held_moving]
        self._moving = np.array(self._held_moving + [first + k for k, (a, b) in enumerate(zip(self.start_polynomials,
                                                                                               self.target))
                                                     if not (a is b or a == b)], dtype=np.int64)
        moving_start = self._held_start + [self.start_polynomials[k - first] for k in self._moving[len(self._held_moving):]]
        # consecutive moving rows (the slices of a witness move, usually) are read and written as a slice: a view,
        # where an index array copies (the same numbers; a few microseconds of every evaluation)
        if len(self._moving) and np.array_equal(self._moving, np.arange(self._moving[0], self._moving[-1] + 1)):
            self._moving_rows = slice(int(self._moving[0]), int(self._moving[-1]) + 1)
        else:
            self._moving_rows = self._moving
        # ``shared_evaluator``: start rows that are polynomials on (nearly) the target's monomials (the polyhedral
        # second stage: the same supports, random coefficients) share one table of monomial values with the
        # target: one evaluator for both halves instead of two, which computed every monomial twice (decision
        # 0077). Asked for, not automatic: its sums round differently in the last bits, and other callers'
        # decisions (a local anatomy's deflation) were seen to flip on such bits.
        self._joint = None
        if shared_evaluator and held is None and len(self._moving) and \
                all(isinstance(p, Polynomial) for p in moving_start):
            target_monomials = {tuple(e) for p in self.target for e in p.exponents}
            extra = {tuple(e) for p in moving_start for e in p.exponents} - target_monomials
            if len(extra) <= len(target_monomials) // 4:
                self._joint = BatchEvaluator(self.target + moving_start)
        self.start_evaluator = _StartRows(moving_start) if len(self._moving) and self._joint is None else None
        self.evaluations = 0
        self.value_evaluations = 0
        self._precise = None
        self._precise_start = None
        self._sizes = TermSizes(self.target, projective=True, homogenized=homogenized) if held is None \
            else self.evaluator

    @classmethod
    def from_systems(cls, start_system, target_system, rng, shared_evaluator=False):
        """Parameter homotopy between two square systems in the same variables (affine or projective).

        ``shared_evaluator``: evaluate both systems with one evaluator when their monomials nearly agree.
        """
        if start_system.variables != target_system.variables or start_system.projective != target_system.projective:
            raise InputError("start and target systems must have the same variables and kind")
        expected = target_system.n_variables - (1 if target_system.projective else 0)
        if target_system.n_equations != expected or start_system.n_equations != expected:
            raise InputError(f"the systems are not square: {target_system.n_equations} equations, {expected} unknowns")

        def homogeneous(system):
            if system.projective:
                return [p.numeric() for p in system.polynomials]
            # both homogenised to the target's degrees, so that the sum stays homogeneous
            return [p.numeric().homogenize(0) for p in system.polynomials]

        start, target = homogeneous(start_system), homogeneous(target_system)
        for k, (a, b) in enumerate(zip(start, target), 1):
            if a.degree != b.degree:
                raise InputError(f"equation {k} has degree {a.degree} in the start system and {b.degree} in the "
                                 "target; a parameter homotopy needs the same degrees")
        size = len(target) + 1
        patch = (rng.standard_normal(size) + 1j * rng.standard_normal(size)) / np.sqrt(2 * size)
        return cls(start, target, patch, random_unit_complex(rng), homogenized=not target_system.projective,
                   shared_evaluator=shared_evaluator)

    def start_solutions_from(self, points, projective=False):
        """Known solutions of the start system (affine, or homogeneous when ``projective``) on the patch."""
        points = np.atleast_2d(np.asarray(points, dtype=complex))
        if not projective:
            points = np.column_stack([np.ones(len(points), dtype=complex), points])
        return points / (points @ self.patch)[:, None]

    def _tau(self, s):
        denominator = 1 + (self.gamma - 1) * s
        return self.gamma * s / denominator, self.gamma / denominator ** 2

    def evaluate(self, points, s):
        """H, dH/dX (with the patch row) and dH/ds at points (P, n + 1) and parameters s (P,)."""
        self.evaluations += 1
        count, size = len(points), self.size
        m = len(self.target)
        if self._joint is not None:
            joint_values, joint_jac = self._joint.evaluate(points)
            f_values, f_jac = joint_values[:, :m], joint_jac[:, :m]
        else:
            f_values, f_jac = self.evaluator.evaluate(points)
        tau, dtau = self._tau(np.asarray(s, dtype=complex))
        values = np.empty((count, size), dtype=complex)
        values[:, :-1] = f_values
        values[:, -1] = points @ self.patch - 1
        jacobian = np.empty((count, size, size), dtype=complex)
        jacobian[:, :-1, :] = f_jac
        jacobian[:, -1, :] = self.patch
        derivative = np.zeros((count, size), dtype=complex)
        moving = self._moving_rows
        if len(self._moving):
            g_values, g_jac = (joint_values[:, m:], joint_jac[:, m:]) if self._joint is not None \
                else self.start_evaluator.evaluate(points)
            values[:, moving] = (1 - tau)[:, None] * f_values[:, moving] + tau[:, None] * g_values
            jacobian[:, moving, :] = (1 - tau)[:, None, None] * f_jac[:, moving, :] + tau[:, None, None] * g_jac
            derivative[:, moving] = (g_values - f_values[:, moving]) * dtau[:, None]
        return values, jacobian, derivative

    def evaluate_values(self, points, s):
        """H alone (with the patch row)."""
        self.value_evaluations += 1
        tau, _ = self._tau(np.asarray(s, dtype=complex))
        values = np.empty((len(points), self.size), dtype=complex)
        m = len(self.target)
        joint = self._joint.evaluate(points, jacobian=False) if self._joint is not None else None
        values[:, :-1] = joint[:, :m] if joint is not None else self.evaluator.evaluate(points, jacobian=False)
        moving = self._moving_rows
        if len(self._moving):
            values[:, moving] = (1 - tau)[:, None] * values[:, moving] \
                + tau[:, None] * (joint[:, m:] if joint is not None else self.start_evaluator.evaluate(points,
                                                                                                      jacobian=False))
        values[:, -1] = points @ self.patch - 1
        return values

    def evaluate_precise(self, point, s, ctx):
        """H, dH/dX and dH/ds at one point in an mpmath context (see StraightLineHomotopy)."""
        if self._precise is None:
            self._precise = PrecisionEvaluator(self.target) if self.held is None else self.evaluator
            # start rows may be evaluated products of linear forms: the same row-by-row evaluation as in double
            self._precise_start = _StartRows(self.start_polynomials) if self.start_polynomials else None
        size = self.size
        f_values, f_jac = self._precise.evaluate(point, ctx) if self.held is None \
            else self.evaluator.evaluate_mp(point, ctx)
        g_values, g_jac = self._precise_start.evaluate_precise(point, ctx) if self._precise_start is not None \
            else ([], [])
        first = 0 if self.held is None else self.held.count
        if first:  # held rows: the same in start and target, except those that move from a polynomial
            moved = dict(zip(self._held_moving, range(len(self._held_moving))))
            start_values, start_jac = _StartRows(self._held_start).evaluate_precise(point, ctx) if moved else (None, None)
            g_values = [start_values[moved[i]] if i in moved else f_values[i] for i in range(first)] + \
                [g_values[i] for i in range(size - 1 - first)]
            g_jac = [[start_jac[moved[i], j] if i in moved else f_jac[i, j] for j in range(size)]
                     for i in range(first)] + [[g_jac[i, j] for j in range(size)] for i in range(size - 1 - first)]
        gamma = ctx.mpc(self.gamma.real, self.gamma.imag)
        denominator = 1 + (gamma - 1) * s
        tau, dtau = gamma * s / denominator, gamma / denominator ** 2
        values, jacobian, derivative = ctx.matrix(size, 1), ctx.matrix(size, size), ctx.matrix(size, 1)
        for i in range(size - 1):
            values[i] = (1 - tau) * f_values[i] + tau * g_values[i]
            derivative[i] = (g_values[i] - f_values[i]) * dtau
            for j in range(size):
                jacobian[i, j] = (1 - tau) * f_jac[i, j] + tau * (g_jac[i][j] if first else g_jac[i, j])
        self._precise_patch_row(values, jacobian, point, ctx)
        return values, jacobian, derivative


class _StartRows:
    """The start rows of moving equations: polynomials (one batched evaluator) and evaluated rows (objects with
    ``evaluate`` and ``evaluate_precise``, such as :class:`~numag.numeric.minors.LinearFormProduct`), in order."""

    def __init__(self, rows):
        self.rows = list(rows)
        self._polynomial_at = [k for k, row in enumerate(self.rows) if isinstance(row, Polynomial)]
        self._evaluated_at = [k for k, row in enumerate(self.rows) if not isinstance(row, Polynomial)]
        polynomials = [self.rows[k] for k in self._polynomial_at]
        self._evaluator = BatchEvaluator(polynomials) if polynomials else None
        self._precise = None

    def evaluate(self, points, jacobian=True):
        if not self._evaluated_at:  # polynomials only: the evaluator's own arrays, the same numbers
            return self._evaluator.evaluate(points, jacobian)
        count, size = len(points), len(self.rows)
        values = np.empty((count, size), dtype=complex)
        gradients = np.empty((count, size, points.shape[1]), dtype=complex) if jacobian else None
        if self._evaluator is not None:
            result = self._evaluator.evaluate(points, jacobian)
            values[:, self._polynomial_at] = result[0] if jacobian else result
            if jacobian:
                gradients[:, self._polynomial_at] = result[1]
        for k in self._evaluated_at:
            result = self.rows[k].evaluate(points, jacobian)
            values[:, k] = (result[0] if jacobian else result)[:, 0]
            if jacobian:
                gradients[:, k] = result[1][:, 0]
        return (values, gradients) if jacobian else values

    def evaluate_precise(self, point, ctx):
        """Values (M, 1) and Jacobian (M, N) in an mpmath context."""
        size, n = len(self.rows), len(point)
        values, jacobian = ctx.matrix(size, 1), ctx.matrix(size, n)
        if self._polynomial_at:
            if self._precise is None:
                self._precise = PrecisionEvaluator([self.rows[k] for k in self._polynomial_at])
            part_values, part_jacobian = self._precise.evaluate(point, ctx)
            for i, k in enumerate(self._polynomial_at):
                values[k] = part_values[i]
                for j in range(n):
                    jacobian[k, j] = part_jacobian[i, j]
        for k in self._evaluated_at:
            row_value, row_gradient = self.rows[k].evaluate_precise(point, ctx)
            values[k] = row_value[0]
            for j in range(n):
                jacobian[k, j] = row_gradient[0, j]
        return values, jacobian


class _HeldThenPolynomials:
    """Evaluated held rows (:class:`~numag.numeric.minors.CombinedRows`) then polynomials, behind the interface
    of :class:`BatchEvaluator` (``evaluate``, ``evaluate`` in mpmath) and of :class:`TermSizes` (``both``,
    ``values``, ``gradients``)."""

    def __init__(self, held, polynomials):
        self.held = held
        self.polynomials = list(polynomials)
        # every row can be held (a regeneration's last step moves an evaluated row with no slice left)
        self._evaluator = BatchEvaluator(self.polynomials) if self.polynomials else None
        self._sizes = TermSizes(self.polynomials, homogenized=True) if self.polynomials else None
        self._precise = None

    def evaluate(self, points, jacobian=True):
        if self._evaluator is None:
            return self.held.evaluate(points, jacobian)
        if not jacobian:
            return np.hstack([self.held.evaluate(points, False), self._evaluator.evaluate(points, jacobian=False)])
        held_values, held_jacobian = self.held.evaluate(points)
        values, jacobian_rows = self._evaluator.evaluate(points)
        return np.hstack([held_values, values]), np.concatenate([held_jacobian, jacobian_rows], axis=1)

    def both(self, points):
        held_values, held_gradients = self.held.both(points)
        if self._sizes is None:
            return held_values, held_gradients
        values, gradients = self._sizes.both(points)
        return np.hstack([held_values, values]), np.hstack([held_gradients, gradients])

    def values(self, points):
        return self.both(points)[0]

    def gradients(self, points):
        return self.both(points)[1]

    def evaluate_mp(self, point, ctx):
        """Values (M, 1) and Jacobian (M, N) in an mpmath context."""
        held_values, held_jacobian = self.held.evaluate_precise(point, ctx)
        if not self.polynomials:
            return held_values, held_jacobian
        if self._precise is None:
            self._precise = PrecisionEvaluator(self.polynomials)
        values, jacobian = self._precise.evaluate(point, ctx)
        first, rest, n = self.held.count, len(self.polynomials), len(point)
        out_values, out_jacobian = ctx.matrix(first + rest, 1), ctx.matrix(first + rest, n)
        for i in range(first + rest):
            out_values[i] = held_values[i] if i < first else values[i - first]
            for j in range(n):
                out_jacobian[i, j] = held_jacobian[i, j] if i < first else jacobian[i - first, j]
        return out_values, out_jacobian
