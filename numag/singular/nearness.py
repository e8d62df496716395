"""How close a smooth verdict is to a singular one: the backward error of a point as a singular point.

A point x is a singular point of X = V(f_1, ..., f_m) of codimension c when F(x) = 0 and
rank J(x) < c. Both conditions are linear in the coefficients for a fixed x, so the smallest
relative change of the coefficients that makes x an exact singular point is a linear problem:
write each coefficient as c_ik (1 + delta_ik); then f_i(x) + sum_k delta_ik t_ik = 0 (t_ik the
terms c_ik x^a_k at x) and the Jacobian moves by sum_k delta_ik dt_ik/dx. The Jacobian, its rows
in units of their terms (the :class:`~numag.numeric.evaluate.TermSizes` rule, sized at x itself),
loses its singular values from the c-th on (the nearest matrix of rank c - 1); each equation's
coefficients then solve their own n + 1 linear conditions, the least-squares (minimum-norm)
solution. The largest |delta_ik| is the **backward error**: a change of at most that size of each
coefficient, relative to itself, makes x an exact singular point (an upper bound of the smallest
such change; the largest scaled residual of the conditions is a lower one).

Whether that is "within what the input can carry" depends on how the coefficients were written
(decision 0062): exact integers, rationals and short decimals are exact, and the exact verdict
stands; a decimal with 15 or more significant digits is taken for a double-precision number, which
is only known to a relative 2^-53, so a backward error below :func:`input_tolerance` means the
input cannot tell the point from a singular one.

Examples
--------
>>> from numag.system.parse import parse_system
>>> cusp = parse_system(["y^2 - x^3 + 1e-12*x"], ["x", "y"])
>>> coefficient_precision(cusp) is CoefficientPrecision.EXACT
True
>>> print(f"{backward_error(cusp, [0, 0], 1):.0e}")
1e+00
>>> near = parse_system(["y^2 - x^3 + 0.1000000000000000055511151231257827*x"], ["x", "y"])
>>> coefficient_precision(near) is CoefficientPrecision.DOUBLE
True
"""

from dataclasses import dataclass
from fractions import Fraction
import math

import mpmath
import numpy as np

from ..system.exact import ExactCoefficient
from ..numeric.refine import RankDropSystem, mp_gauss_newton
from .kinds import CoefficientPrecision, PieceKind

__all__ = ["NearSingularPoint", "coefficient_precision", "input_tolerance", "backward_error",
           "nearest_backward_error", "DOUBLE_SIGNIFICANT_DIGITS"]

#: A decimal coefficient with this many significant digits or more is read as a double-precision number
#: (17 digits identify a double; 15 are what a double is trusted to carry, so printed doubles have 15-17).
DOUBLE_SIGNIFICANT_DIGITS = 15
#: The unit roundoff of double precision: a double-precision coefficient is known to this relative accuracy.
_UNIT_ROUNDOFF = 2.0 ** -53
#: The modest factor of the tolerance, times the degree: the rounding of each coefficient (up to 1 unit),
#: the double-precision point at which the conditions are evaluated (a relative 2^-53 in each coordinate
#: moves a term of degree d by up to d units) and the minimum-norm solution standing in for the smallest
#: largest entry (at most a factor sqrt(terms)).
_TOLERANCE_FACTOR = 16.0
#: Working precision (decimal digits) of the residuals: far below the rounding they measure.
_DIGITS = 40
#: Gauss-Newton steps of the polish (:func:`nearest_backward_error`): near a degenerate singular point the
#: singular-point system is rank deficient and converges linearly, a few digits a step.
_POLISH_STEPS = 12


@dataclass(kw_only=True)
class NearSingularPoint:
    """A candidate the check called smooth, which a relative change of the coefficients within the
    input's precision makes an exact singular point.

    Attributes
    ----------
    point : ndarray of complex
        Where the backward error was smallest (the candidate itself, or the point of X it was refined to),
        in the user's units.
    backward_error : float
        The largest relative change of a coefficient that makes ``point`` an exact singular point.
    tolerance : float
        What the input's coefficients can carry (:func:`input_tolerance`).
    codimension : int
        The rank a smooth point needs.
    real : bool
    precision : CoefficientPrecision
    kind : PieceKind
        Always :attr:`PieceKind.NEAR_SINGULAR`.
    """

    point: np.ndarray
    backward_error: float
    tolerance: float
    codimension: int
    real: bool
    precision: CoefficientPrecision = CoefficientPrecision.DOUBLE
    kind: PieceKind = PieceKind.NEAR_SINGULAR

    def to_dict(self, encode):
        """The report's entry (``encode`` writes a point as JSON)."""
        return {"kind": self.kind, "point": encode(self.point), "real": self.real,
                "backward_error": self.backward_error, "tolerance": self.tolerance,
                "codimension": self.codimension, "precision": self.precision}

    @classmethod
    def from_dict(cls, data, decode):
        """The entry of :meth:`to_dict` read back (``decode`` reads a point)."""
        return cls(point=np.asarray(decode(data["point"]), dtype=complex), backward_error=float(data["backward_error"]),
                   tolerance=float(data["tolerance"]), codimension=int(data["codimension"]), real=bool(data["real"]),
                   precision=CoefficientPrecision.parse(data["precision"], "precision"),
                   kind=PieceKind.parse(data["kind"], "kind"))

    def explanation(self):
        """The sentence a report prints beside the point."""
        return (f"smooth for the coefficients as written, singular after a relative change of at most "
                f"{self.backward_error:.1e} of them (within the {self.tolerance:.1e} that {self.precision} "
                "coefficients cannot resolve)")

    def __repr__(self):
        return f"NearSingularPoint(backward error {self.backward_error:.1e} <= {self.tolerance:.1e})"


def _significant_digits(value):
    """Significant digits of a terminating decimal that is not an integer; 0 for anything else."""
    if value.denominator == 1:
        return 0
    denominator, twos, fives = value.denominator, 0, 0
    while denominator % 2 == 0:
        denominator, twos = denominator // 2, twos + 1
    while denominator % 5 == 0:
        denominator, fives = denominator // 5, fives + 1
    if denominator != 1:  # 1/3 and the like: a rational, exact as written
        return 0
    mantissa = abs(value * 10 ** max(twos, fives)).numerator
    while mantissa % 10 == 0:
        mantissa //= 10
    return len(str(mantissa))


def coefficient_precision(system):
    """How precisely the system's coefficients are known: exact, or double precision.

    Double precision when a coefficient is stored as a floating-point number (a system built from
    numbers, not parsed text), or when one is a decimal fraction with at least
    :data:`DOUBLE_SIGNIFICANT_DIGITS` significant digits (what printing a double gives). Integers,
    rationals and shorter decimals are exact.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> coefficient_precision(parse_system(["0.25*x^2 - 2/3*y"], ["x", "y"])).value
    'exact'
    """
    for polynomial in system.polynomials:
        if not polynomial.is_exact:
            return CoefficientPrecision.DOUBLE
        for coefficient in polynomial.coefficients:
            for re, im in coefficient.parts.values():
                if max(_significant_digits(Fraction(re)), _significant_digits(Fraction(im))) \
                        >= DOUBLE_SIGNIFICANT_DIGITS:
                    return CoefficientPrecision.DOUBLE
    return CoefficientPrecision.EXACT


def input_tolerance(system):
    """The backward error the input's coefficients cannot resolve; None when they are exact.

    2^-53 (each coefficient rounded to double) times a modest factor times the largest degree (the
    evaluation at a double-precision point): 5.3e-15 for a cubic.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> input_tolerance(parse_system(["x^2 + y^2 - 1"], ["x", "y"])) is None
    True
    """
    if coefficient_precision(system) is CoefficientPrecision.EXACT:
        return None
    return _TOLERANCE_FACTOR * max(max(system.degrees), 1) * _UNIT_ROUNDOFF


def _mp_coefficient(coefficient, ctx):
    if isinstance(coefficient, ExactCoefficient):
        return coefficient.to_context(ctx)
    return ctx.mpc(complex(coefficient))


def backward_error(system, point, codimension):
    """The largest relative change of a coefficient that makes ``point`` an exact singular point.

    Parameters
    ----------
    system : PolynomialSystem
        Affine (``point`` has n coordinates) or projective (n + 1 homogeneous coordinates).
    point : sequence of complex
    codimension : int
        The rank a smooth point needs: the Jacobian must fall below it.

    Returns
    -------
    float
        ``inf`` when no change of the existing coefficients does it (too few terms to move).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> circle = parse_system(["x^2 + y^2 - 1"], ["x", "y"])
    >>> round(backward_error(circle, [1, 0], 1), 3)
    1.0
    """
    ctx = mpmath.mp
    n = system.n_variables
    x = np.asarray(point, dtype=complex)
    with ctx.workdps(_DIGITS):
        xs = [ctx.mpc(v) for v in x]
        rows = []  # per equation: terms (K,), derivative terms (n, K), as complex after the mp sums
        values, jacobian, scales = [], [], []
        for polynomial in system.polynomials:
            terms, derivatives = [], [[] for _ in range(n)]
            for exponent, coefficient in zip(polynomial.exponents, polynomial.coefficients):
                c = _mp_coefficient(coefficient, ctx)
                monomial = ctx.mpf(1)
                for v, e in zip(xs, exponent):
                    monomial *= v ** int(e)
                terms.append(c * monomial)
                for j in range(n):
                    e = int(exponent[j])
                    partial = c * e * _monomial_without(xs, exponent, j, ctx) if e else ctx.mpf(0)
                    derivatives[j].append(partial)
            value = ctx.fsum(terms)
            gradient = [ctx.fsum(d) for d in derivatives]
            # the row's unit: the size of its derivative terms at the point (TermSizes, sized at x itself)
            scale = math.sqrt(sum(float(ctx.fsum(abs(t) for t in d)) ** 2 for d in derivatives)) or 1.0
            rows.append((terms, derivatives))
            values.append(value)
            jacobian.append(gradient)
            scales.append(scale)
        m = len(values)
        wanted = [[ctx.mpc(0)] * n for _ in range(m)]
        if codimension > 0:
            scaled = ctx.matrix([[jacobian[i][j] / scales[i] for j in range(n)] for i in range(m)])
            u, s, v = ctx.svd_c(scaled)
            kept = min(codimension - 1, len(s))
            for k in range(kept, len(s)):  # remove the singular values from the c-th on: rank < c
                for i in range(m):
                    for j in range(n):
                        wanted[i][j] -= s[k] * u[i, k] * v[k, j] * scales[i]
        worst = 0.0
        for i, (terms, derivatives) in enumerate(rows):
            matrix = np.array([[complex(t) for t in terms]]
                              + [[complex(t) for t in derivatives[j]] for j in range(n)], dtype=complex)
            target = np.array([complex(-values[i])] + [complex(wanted[i][j]) for j in range(n)], dtype=complex)
            norms = np.linalg.norm(matrix, axis=1)
            live = norms > 0
            if np.any(np.abs(target[~live]) > 0):  # a condition no coefficient can move (its terms vanish)
                return math.inf
            if not np.any(live):
                continue
            a, b = matrix[live] / norms[live, None], target[live] / norms[live]
            delta = np.linalg.lstsq(a, b, rcond=None)[0]
            if np.linalg.norm(a @ delta - b) > 1e-6 * max(np.linalg.norm(b), 1e-300):
                return math.inf
            worst = max(worst, float(np.max(np.abs(delta), initial=0.0)))
    return worst


def _monomial_without(xs, exponent, j, ctx):
    """x^(a - e_j) (a_j >= 1), computed without dividing by x_j."""
    monomial = ctx.mpf(1)
    for k, (v, e) in enumerate(zip(xs, exponent)):
        monomial *= v ** (int(e) - (1 if k == j else 0))
    return monomial


def nearest_backward_error(system, points, codimension):
    """The smallest backward error near some points: at each of them, and where the singular-point system
    settles from the first.

    A candidate from a homotopy is accurate only to what its endgame reached (1e-11 at a cusp): the
    conditions are then off by that much, not by the input's rounding. Least-squares Gauss-Newton on
    F = 0 and rank J <= c - 1 (:class:`~numag.numeric.refine.RankDropSystem`, anchored at the first point)
    polishes it to the point where the conditions come closest to holding.

    Parameters
    ----------
    system : PolynomialSystem
    points : sequence of points
        The candidate first (the polish starts there).
    codimension : int

    Returns
    -------
    (float, ndarray)
        The smallest backward error and the point where it was measured.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    >>> error, point = nearest_backward_error(node, [[1e-9, 0]], 1)
    >>> error < 1e-20, bool(abs(point[0]) < 1e-20)
    (True, True)
    """
    candidates = [np.asarray(p, dtype=complex) for p in points]
    ctx = mpmath.mp
    with ctx.workdps(_DIGITS):
        try:
            drop = RankDropSystem(system, codimension - 1, candidates[0], ctx)
            polished, _, _, _ = mp_gauss_newton(drop, drop.initial(candidates[0]), ctx, tolerance=0,
                                                max_iterations=_POLISH_STEPS, anchored=True)
            point = drop.point_of(polished)
            if np.all(np.isfinite(point)):
                candidates.append(point)
        except (ZeroDivisionError, ValueError, ArithmeticError):  # a degenerate start: the given points only
            pass
    if system.has_real_coefficients:  # a nearly real point of a real system: its real part is a candidate too
        candidates += [p.real.astype(complex) for p in candidates
                       if np.linalg.norm(p.imag) <= 1e-6 * (1 + np.linalg.norm(p))]
    measured = [(backward_error(system, p, codimension), p) for p in candidates]
    return min(measured, key=lambda pair: pair[0])
