"""Moving a point given near an isolated hypersurface singularity onto it, by deflation.

A computed singular point is off by more than rounding: a zero of multiplicity mu of the gradient is known
to about eps^(1/mu), and a point typed in by hand is off by its printed digits. Read at such a point, the
Taylor coefficients of f are those of a neighbouring function (the cusp y^2 - x^3 read at x = d has a
term 3 d x^2: a node), so the type and the local picture must be read at the singular point itself.

The singular point p* is a zero of F = (f, grad f), isolated but multiple, where Newton's method converges
only linearly and stalls at about eps^(1/mu). Deflation (Leykin, Verschelde and Zhao 2006, "Newton's method
with deflation for isolated singularities of polynomial systems", Theoret. Comput. Sci. 359) turns it into a
regular zero of a larger system: while the Jacobian J of the current system G(z) has numerical rank
r < dim z at the current point, G is replaced by

    (G(z), J(z) B lam, h . lam - 1),  lam in C^(r + 1),

with B and h random (real at a real point, so that the deflated point stays real); lam is unique, and the
multiplicity of the zero drops with each step. Once J has full column rank, Gauss-Newton on the
(overdetermined) system converges quadratically to the point that the rounded coefficients of f define.

The work is done on f(p + u) in the computed (balanced) units, kept whole: its terms of degree 0 and 1 are
what tells where p* lies. Ranks are read at the widest gap of the Jacobian's singular values with each row
divided by its term sizes (as for the Hessian); a point is kept, with the reason, when a rank is unclear,
the zero is not regular after three steps, or the end point is far, no better, or not singular.

Examples
--------
>>> from numag.system.parse import parse_system
>>> cusp = parse_system(["y^2 - x^3"], ["x", "y"]).polynomials[0].numeric()
>>> moved = onto_singular_point(cusp, np.array([1e-7, -2e-7]))
>>> moved.outcome.name, bool(np.abs(moved.point).max() < 1e-14)
('MOVED', True)
"""

import enum
from dataclasses import dataclass

import numpy as np

from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..numeric.refine import project_to_variety
from ..system.polynomial import Polynomial, PolynomialSystem
from .hypersurface import HESSIAN_ZERO, morse_alpha, taylor_at

__all__ = ["Deflation", "DeflationOutcome", "onto_singular_point", "deflated_system", "ROUNDING_RESIDUAL",
           "ROUNDING_MOVE"]

#: A value of the current system's Jacobian (rows divided by their term sizes) above HESSIAN_ZERO but below this
#: many times it leaves the rank unclear: the point is left where it was given.
_CLEAR = 100.0
#: At most this many deflation steps (LVZ 2006 bound them by the multiplicity). Each about doubles the unknowns
#: and the equations: 3 steps took 2-4 s, 4 steps (A5) 55 s; random combinations of the equations, tried to
#: keep them few, left the tacnode's rank unclear after 3 steps where 2 sufficed without them.
_MAX_STEPS = 3
#: Gauss-Newton iterations per stage (a multiple zero converges linearly before its deflation).
_ITERATIONS = 40
#: A point moved further than this (relative to 1 + |p|, computed units) went to another point: it is kept.
_FARTHEST = 1e-3
#: The largest scaled residual of (f, grad f) a singular point may have: rounding leaves 1e-16..1e-13, a point
#: that is not singular leaves at least the size of its own distance from one.
_SINGULAR = 1e-8
#: A move of at most this (relative to 1 + |p|) is rounding: the given point is kept as the singular point.
ROUNDING_MOVE = 1e-14
#: A deflation end further than this many Newton steps of grad f (Smale's beta at the start, where the Hessian is
#: invertible beyond its rounding) went to another critical point: off an A_k the step is 1/k of the offset
#: (k <= 8 is read), off a node 2e-4 from another one after a linear change the end was 500 steps away.
_NEWTON_STEPS = 50.0
#: Residuals of (f, grad f) below this are rounding: the moved point is not judged worse by them.
ROUNDING_RESIDUAL = 1e-12


class DeflationOutcome(enum.Enum):
    """What became of the given point."""

    MOVED = "moved onto the singular point"
    ALREADY_THERE = "the point is the singular point to rounding"
    REGULAR_START = "the Hessian has full rank: Newton on the gradient converges quadratically"
    RANK_UNCLEAR = "a Jacobian rank of the deflation could not be told: the point was kept"
    NOT_REGULAR = "deflation did not reach a regular zero within its steps: the point was kept"
    TOO_FAR = "deflation ended far from the point: the point was kept"
    NO_BETTER = "the moved point is no closer to being singular: the point was kept"
    NOT_SINGULAR = "no singular point near the point: it was kept"
    BEYOND_NEWTON = ("deflation ended many Newton steps of grad f away from a point whose Hessian is invertible "
                     "(another critical point): the point was kept")
    ANOTHER_POINT = ("deflation ended at a Morse point that the given point is not close to by Smale's alpha "
                     "(another critical point): the point was kept")


@dataclass
class Deflation:
    """The point moved onto the singular point, with the evidence.

    Attributes
    ----------
    point : ndarray of complex, shape (n,)
        The singular point (same units as the given one), or the given point when it was kept.
    outcome : DeflationOutcome
    steps : int
        Deflation steps taken (0: the zero was regular already).
    distance : float
        How far the point moved, relative to 1 + |p| (computed units); for a kept point, how far the deflation's
        stages had moved it when they stopped (more than rounding: the given point is off the singular point).
    residual_before, residual_after : float
        Largest scaled residual of (f, grad f) at the given and at the returned point (term sizes).
    reached : ndarray of complex, shape (n,), optional
        For a kept point, where the deflation's stages had taken it when they stopped (same units; closer to
        the singular point than the given one when that is off it); None otherwise.
    """

    point: np.ndarray
    outcome: DeflationOutcome
    steps: int
    distance: float
    residual_before: float
    residual_after: float
    reached: np.ndarray = None

    @property
    def moved(self):
        return self.outcome in (DeflationOutcome.MOVED, DeflationOutcome.REGULAR_START)

    @property
    def kept_off(self):
        """The point was kept although it is not the singular point to rounding (its scaled residual of
        (f, grad f) is above rounding): the Taylor coefficients there are those of a neighbouring function."""
        return not self.moved and self.outcome is not DeflationOutcome.ALREADY_THERE \
            and self.residual_before > ROUNDING_RESIDUAL


def _padded(polynomial, n_variables):
    """The same polynomial in more variables (the new ones last)."""
    exponents = np.zeros((polynomial.n_terms, n_variables), dtype=polynomial.exponents.dtype)
    exponents[:, :polynomial.n_variables] = polynomial.exponents
    return Polynomial(exponents, polynomial.numeric_coefficients(), n_variables)


def _jacobian_at(polynomials, point):
    """The Jacobian at a point with each row divided by its term sizes (how rounding sees the rows)."""
    _, jacobian = BatchEvaluator(polynomials).evaluate(point[None, :])
    sizes = TermSizes(polynomials).gradients(point[None, :])[0]
    return jacobian[0], jacobian[0] / np.where(sizes > 0, sizes, 1.0)[:, None]


def deflated_system(polynomials, jacobian, rank, rng, real):
    """One deflation step: (G, J B lam, h . lam - 1) and the unknown vector's start value for lam.

    Parameters
    ----------
    polynomials : list of Polynomial
        G in N variables.
    jacobian : ndarray, shape (len(G), N)
        J at the current point (lam's start value solves [J B; h] lam = [0; 1] in least squares).
    rank : int
        Numerical rank of J there.
    rng : numpy.random.Generator
    real : bool
        Real B and h.

    Returns
    -------
    list of Polynomial
        In N + rank + 1 variables.
    ndarray
        lam's start value.

    Examples
    --------
    >>> g = [Polynomial(np.array([[2]]), np.array([1.0]), 1), Polynomial(np.array([[1]]), np.array([2.0]), 1)]
    >>> system, lam = deflated_system(g, np.array([[0.0], [2.0]]), 1, np.random.default_rng(0), True)
    >>> len(system), system[0].n_variables, lam.shape
    (5, 3, (2,))
    """
    n = polynomials[0].n_variables
    columns = rank + 1
    total = n + columns

    def draw(*shape):
        values = rng.standard_normal(shape)
        return values if real else values + 1j * rng.standard_normal(shape)

    mixing, normal = draw(n, columns), draw(columns)
    normal = normal / np.linalg.norm(normal)
    padded = [_padded(p.numeric(), total) for p in polynomials]
    # v = B lam, one linear polynomial per coordinate of z
    directions = [Polynomial.linear(np.concatenate([np.zeros(n), mixing[j]]), 0.0) for j in range(n)]
    added = []
    for p in padded:
        row = Polynomial.zero(total)
        for j in range(n):
            derivative = p.derivative(j)
            if not derivative.is_zero():
                row = row + derivative * directions[j]
        added.append(row)
    added.append(Polynomial.linear(np.concatenate([np.zeros(n), normal]), -1.0))
    stacked = np.vstack([jacobian @ mixing, normal[None, :]])
    rhs = np.zeros(len(stacked), dtype=complex)
    rhs[-1] = 1.0
    lam = np.linalg.lstsq(stacked, rhs, rcond=None)[0]
    return padded + [a for a in added if not a.is_zero()], lam


def _singular_residual(polynomial, point):
    """Largest scaled residual of (f, grad f) at a point (term sizes)."""
    equations = [polynomial] + [q for q in polynomial.gradient() if not q.is_zero()]
    values, _ = BatchEvaluator(equations).evaluate(point[None, :])
    sizes = TermSizes(equations).values(point[None, :])
    return float(np.max(np.abs(values[0]) / np.where(sizes[0] > 0, sizes[0], 1.0)))


def _gauss_newton(polynomials, start):
    system = PolynomialSystem([f"z{j}" for j in range(len(start))], polynomials)
    result = project_to_variety(system, BatchEvaluator(polynomials), start[None, :], tolerance=0.0,
                                max_iterations=_ITERATIONS)
    return result.points[0]


def onto_singular_point(polynomial, point, seed=0):
    """Move a point near an isolated singular point of f = 0 onto it (deflation in the local frame).

    Parameters
    ----------
    polynomial : Polynomial
        Numeric, in computed (balanced) units.
    point : array_like of complex
    seed : int
        Of the random matrices of the deflation steps.

    Returns
    -------
    Deflation
        The point is kept (and the outcome says why) when a rank is unclear, the zero is not regular after
        the allowed steps, the end point lies further than 1e-2 in frame units, or it is no closer to being
        singular than the given one.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> tacnode = parse_system(["y^2 - x^4"], ["x", "y"]).polynomials[0].numeric()
    >>> moved = onto_singular_point(tacnode, np.array([3e-6, 1e-9]))
    >>> moved.outcome.name, moved.steps >= 1, bool(np.abs(moved.point).max() < 1e-12)
    ('MOVED', True, True)
    """
    f = polynomial.numeric()
    point = np.asarray(point, dtype=complex).reshape(-1)
    n = f.n_variables
    real = bool(np.all(f.numeric_coefficients().imag == 0) and np.all(point.imag == 0))
    before = _singular_residual(f, point)
    rng = np.random.default_rng(seed)
    morse = morse_alpha(f, point)
    if morse.morse:
        # a regular zero of grad f within 2 beta (Smale's alpha: no threshold in units or residuals); one Newton
        # step lands on it to about beta^2 gamma. Deflating instead at a small Hessian value (4e-8 at a node whose
        # neighbour lies 2e-4 away) moved such a node 4e-5 onto a neighbouring critical point, typed A2.
        u = morse.step.real.astype(complex) if real else morse.step
        distance = float(np.linalg.norm(u) / (1.0 + np.linalg.norm(point)))
        if distance <= ROUNDING_MOVE:
            return Deflation(point, DeflationOutcome.ALREADY_THERE, 0, distance, before, before)
        after = _singular_residual(f, point + u)
        if after > _SINGULAR:
            return Deflation(point, DeflationOutcome.NOT_SINGULAR, 0, distance, before, before)
        return Deflation(point + u, DeflationOutcome.REGULAR_START, 0, distance, before, after)

    current = np.zeros(n, dtype=complex)

    def kept(outcome, steps):
        # how far the stages that ran moved the point (a deflation short of regular still moves it towards p*)
        shift = current[:n].real.astype(complex) if real else current[:n]
        reached = point + shift if np.all(np.isfinite(shift)) else None
        return Deflation(point, outcome, steps, float(np.linalg.norm(current[:n]) / (1.0 + np.linalg.norm(point))),
                         before, before, reached)

    # f(p + u) whole, in the computed units: its constant and linear terms say where the singular point lies.
    # (Not in the local frame: built at a point off the singular point it is distorted by the offset -- a
    # tacnode read 3e-6 off got a unit of 1e-4 along its kernel from a Hessian value of 1e-10 -- and the
    # ranks below were misread.)
    whole = taylor_at(f, point)
    # Smale's alpha on the expansion at the start (u = 0): its Newton step beta is what the point is off a
    # critical point whose Hessian is the start's (scale-free)
    start = morse_alpha(whole, np.zeros(n, dtype=complex))
    high = whole.exponents.sum(axis=1) >= 2
    largest = float(np.max(np.abs(whole.numeric_coefficients()[high]), initial=0.0)) or 1.0
    whole = whole.scaled(1.0 / largest)
    equations = [whole] + [q for q in whole.gradient() if not q.is_zero()]
    steps = 0
    while True:
        current = _gauss_newton(equations, current)
        if not np.all(np.isfinite(current)):
            return kept(DeflationOutcome.NOT_REGULAR, steps)
        jacobian, scaled = _jacobian_at(equations, current)
        values = np.linalg.svd(scaled, compute_uv=False)
        # near a multiple zero the values that vanish there are about powers of the point's offset (1e-11 at
        # D4 1e-10 off, beside others of 1e-16): no gap is clear, so every value at most HESSIAN_ZERO counts as
        # zero; a rank read too low gives a deflated system without a zero nearby, which the checks below catch
        rank = int(np.sum(values > HESSIAN_ZERO))
        if rank == len(current):
            break
        if np.any((values > HESSIAN_ZERO) & (values < _CLEAR * HESSIAN_ZERO)):
            return kept(DeflationOutcome.RANK_UNCLEAR, steps)
        if steps == _MAX_STEPS:
            return kept(DeflationOutcome.NOT_REGULAR, steps)
        equations, lam = deflated_system(equations, jacobian, rank, rng, real)
        current = np.concatenate([current, lam])
        steps += 1
    u = current[:n].real.astype(complex) if real else current[:n]
    distance = float(np.linalg.norm(u) / (1.0 + np.linalg.norm(point)))
    if distance > _FARTHEST:
        return kept(DeflationOutcome.TOO_FAR, steps)
    if distance <= ROUNDING_MOVE:
        # the given point is the singular point to rounding: a move of 1e-31 at an exact origin only made the
        # point inexact (E6's local picture was then not resolved)
        return kept(DeflationOutcome.ALREADY_THERE, steps)
    found = point + u
    if start.hessian_regular and np.linalg.norm(u) > _NEWTON_STEPS * start.beta:
        # the start's Hessian is invertible beyond its rounding, and the end lies many of its Newton steps away:
        # off an A_k (or D, E) point the Newton step of grad f is a fixed share of the offset (1/2 off A2, 1/k
        # off A_k), whereas a node after X = 2x + y, Y = x + y went 500 steps onto the critical point between it
        # and its neighbour (residuals at rounding at both ends: nothing else objects). Lengths compared with
        # lengths at the same point: no unit enters.
        return kept(DeflationOutcome.BEYOND_NEWTON, steps)
    if morse_alpha(f, found).hessian_regular:
        # the end's Hessian is invertible beyond its rounding: no degenerate point, and the start was not within
        # its alpha-basin (else the test at the start would have found it): the stages went to another critical
        # point (the middle one of two nodes 2e-4 apart, 4.2e-5 away, reached from a Hessian value read as zero,
        # at a residual that rounding cannot tell from the start's); no length threshold decides this
        return kept(DeflationOutcome.ANOTHER_POINT, steps)
    after = _singular_residual(f, found)
    if after > max(before, ROUNDING_RESIDUAL):
        # both at rounding level (1e-17..1e-15) is no evidence either way: comparing them flipped D6 and E7
        return kept(DeflationOutcome.NO_BETTER, steps)
    if after > _SINGULAR:
        # a least-squares point of (f, grad f) that is no zero of it (near a smooth point, say)
        return kept(DeflationOutcome.NOT_SINGULAR, steps)
    return Deflation(found, DeflationOutcome.MOVED if steps else DeflationOutcome.REGULAR_START, steps, distance,
                     before, after)
