"""How close a smooth verdict is to a singular one: the backward error of a point as a singular point.

A point x is a singular point of X = V(f_1, ..., f_m) of codimension c when F(x) = 0 and
rank J(x) < c. Both conditions are linear in the coefficients for a fixed x, so the smallest change
of the equations that makes x an exact singular point is a linear problem. The Jacobian, its rows in
units of their terms, loses its singular values from the c-th on (the nearest matrix of rank c - 1);
each equation then changes by the minimum-norm polynomial of its degree that cancels F(x) and moves
its row there, each coefficient's change counted in units of the equation's terms (the scaled
residuals' measure, :class:`~numag.numeric.evaluate.TermSizes`). The largest such change is the
**backward error**: a change of each coefficient by at most that much of the equation's scale makes
x an exact singular point (an upper bound of the smallest; the largest scaled residual of the
conditions is a lower one).

Whether that is "within what the input can carry" depends on how the coefficients were written
(decision 0062): exact integers, rationals and short decimals are exact, and the exact verdict
stands; a decimal with 15 or more significant digits is taken for a double-precision number, known
only to about 2^-53 of the equation's scale, so a backward error below :func:`input_tolerance` means
the input cannot tell the point from a singular one.

Examples
--------
>>> from numag.system.parse import parse_system
>>> cusp = parse_system(["y^2 - x^3 + 1/1000000"], ["x", "y"])
>>> coefficient_precision(cusp) is CoefficientPrecision.EXACT
True
>>> print(f"{backward_error(cusp, [0, 0], 1):.1e}")
5.0e-07
>>> near = parse_system(["y^2 - x^3 + 0.1000000000000000055511151231257827*x"], ["x", "y"])
>>> coefficient_precision(near) is CoefficientPrecision.DOUBLE
True
"""

from dataclasses import dataclass
from fractions import Fraction
import itertools
import math
import numbers

import mpmath
import numpy as np

from ..system.exact import ExactCoefficient
from ..numeric.evaluate import TermSizes
from ..numeric.refine import RankDropSystem
from .kinds import CoefficientPrecision, PieceKind

__all__ = ["NearSingularPoint", "coefficient_precision", "point_precision", "input_tolerance", "backward_error",
           "nearest_backward_error", "separation_digits", "DOUBLE_SIGNIFICANT_DIGITS", "SEPARATION_MARGIN"]

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
#: Beyond this many monomials of an equation's degree only its own monomials may change (the linear problem
#: stays small; a change of the existing coefficients is still one the input's rounding can make).
_MAX_MONOMIALS = 4000


@dataclass(kw_only=True)
class NearSingularPoint:
    """A candidate the check called smooth, which a change of the coefficients within the input's precision
    makes an exact singular point.

    Attributes
    ----------
    point : ndarray of complex
        Where the backward error was smallest (the candidate itself, or the point of X it was refined to),
        in the user's units.
    backward_error : float
        The largest change of a coefficient, in units of its equation's terms
        (:func:`backward_error`), that makes ``point`` an exact singular point.
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
                f"{self.backward_error:.1e} of them, in units of each equation's terms (within the "
                f"{self.tolerance:.1e} that {self.precision} coefficients cannot resolve)")

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


def _last_digit_unit(value):
    """The unit of the last digit of a terminating decimal (``Fraction``): 10^-k for k decimal places."""
    denominator, twos, fives = value.denominator, 0, 0
    while denominator % 2 == 0:
        denominator, twos = denominator // 2, twos + 1
    while denominator % 5 == 0:
        denominator, fives = denominator // 5, fives + 1
    return 10.0 ** -max(twos, fives)


def point_precision(coordinates):
    """A point's coordinates as exact numbers, and how far the digits given let each one be off.

    The rule of :func:`coefficient_precision`, for a point (decisions 0072 and 0132), by what was written,
    not by the value: a decimal literal of :data:`DOUBLE_SIGNIFICANT_DIGITS` or more significant digits as
    written (trailing zeros count: ``0.6000000000000000000100000`` is known to 5e-26) is rounded data, known
    to half a unit of its last digit; integers, rationals (``Fraction``), square roots and shorter decimals
    are exact, however long their decimal expansion (``200000000000000000001/10^40`` is exact). Text is read
    by :func:`numag.system.parse.parse_constant`, which keeps the digits written. A float is read as the
    shortest decimal that gives it back (``repr``): 0.5 is exactly 1/2, a computed 0.30000000000000004 is
    rounded data. The radius is in the point's own units, so it follows a change of units.

    Parameters
    ----------
    coordinates : sequence of int, Fraction, float, complex or ExactCoefficient (a WrittenConstant: as written,
        any other: exact)

    Returns
    -------
    (list of ExactCoefficient, ndarray of float)
        The coordinates as exact numbers (the decimals as written) and each one's radius (0 when exact).

    Examples
    --------
    >>> from numag.system.parse import parse_constant
    >>> exact, radii = point_precision([1, 0.5, 0.1 + 0.2, Fraction(1, 3), parse_constant("0.60000000000000000001")])
    >>> [c.to_text() for c in exact[:2]], [float(r) for r in radii]
    (['1', '1/2'], [0.0, 0.0, 2.7755575615628914e-17, 0.0, 5e-21])
    """
    exact, radii = [], []
    for coordinate in coordinates:
        if isinstance(coordinate, ExactCoefficient):
            # the decimals written decide (WrittenConstant: each literal's digits and what its last digit moves)
            exact.append(coordinate)
            radii.append(sum(coordinate.moved_by(column, unit / 2) for column, digits, unit
                             in getattr(coordinate, "decimals", ()) if digits >= DOUBLE_SIGNIFICANT_DIGITS))
            continue
        if isinstance(coordinate, numbers.Rational) and not isinstance(coordinate, bool):
            exact.append(ExactCoefficient.rational(Fraction(int(coordinate.numerator), int(coordinate.denominator))))
            radii.append(0.0)
            continue
        z = complex(coordinate)
        value = ExactCoefficient.rational(Fraction(repr(float(z.real))), Fraction(repr(float(z.imag))))
        # a stored double is known to half its spacing, which its shortest decimal can undercut
        spacing = 0.5 * math.ulp(abs(z))
        squares = 0.0
        for radicand, (re, im) in value.parts.items():
            for part in (Fraction(re), Fraction(im)):
                if radicand == 1 and _significant_digits(part) >= DOUBLE_SIGNIFICANT_DIGITS:
                    squares += max(0.5 * _last_digit_unit(part), spacing) ** 2
        exact.append(value)
        radii.append(math.sqrt(squares))
    return exact, np.array(radii, dtype=float)


def coefficient_precision(system):
    """How precisely the system's coefficients are known: exact, or double precision.

    Double precision when a coefficient is stored as a floating-point number (a system built from
    numbers, not parsed text), or when a number the user wrote is a decimal fraction with at least
    :data:`DOUBLE_SIGNIFICANT_DIGITS` significant digits (what printing a double gives). Integers,
    rationals and shorter decimals are exact, and so are the long decimals their exact expansion makes
    (``(x - 1234.5)^4``). Systems not read from text are judged by their coefficients.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> coefficient_precision(parse_system(["0.25*x^2 - 2/3*y"], ["x", "y"])).value
    'exact'
    """
    if any(not polynomial.is_exact for polynomial in system.polynomials):
        return CoefficientPrecision.DOUBLE
    written = getattr(system, "literal_digits", None)
    if written is not None:  # read from text: the numbers as written decide, not their exact expansion
        return CoefficientPrecision.DOUBLE if written >= DOUBLE_SIGNIFICANT_DIGITS else CoefficientPrecision.EXACT
    for polynomial in system.polynomials:
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


#: Decimal digits a singular point of exact input is confirmed at beyond the finest change its coefficients can
#: write (decision 0109): Gauss-Newton accepts a residual of about 10^(4 - digits), and the rank-drop system's
#: conditioning can shrink a perturbation's residual by a few more decades.
SEPARATION_MARGIN = 10


def _written_digits(part):
    """Significant digits an exact rational carries: a terminating decimal's mantissa, an integer's digits
    without trailing zeros, numerator and denominator of any other fraction (its height)."""
    if part == 0:
        return 0
    if part.denominator == 1:
        return len(str(abs(part.numerator)).rstrip("0"))
    return _significant_digits(part) or len(str(abs(part.numerator))) + len(str(part.denominator))


def separation_digits(system, point):
    """Digits at which a singular point of exact equations is told from one of equations changed in their last
    written digit; None when a coefficient is not exact.

    A coefficient written with D significant digits can be changed by 10^(1 - D) of itself and still be written
    with as many (10.999999999999 against 11: the curve smooth as written, a node after the change). At ``point``
    that change moves an equation by the term's size times 10^(1 - D), relative to the size of the equation's
    terms (:class:`~numag.numeric.evaluate.TermSizes`, the scaled residuals' measure); the smallest such move over
    all terms is the finest the input can write. A singular point confirmed at ``-log10`` of it plus
    :data:`SEPARATION_MARGIN` digits is one of the equations as written, not of a change of their last digit. The
    digits do not change with the units (powers of ten) nor with where the point is: far from the origin the
    terms grow, and so do the digits needed.

    Parameters
    ----------
    system : PolynomialSystem
    point : array_like of complex

    Returns
    -------
    int or None

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> near = parse_system(["y^2 - x^3 - x^2 - 1/1000000000000"], ["x", "y"])
    >>> separation_digits(near, [0, 0])  # one digit, but 1e-12 of terms of size 3
    23
    >>> shifted = parse_system(["Y^2 - 10*Y - X^3 - 10*X^2 - 33*X - 10.999999999999"], ["X", "Y"])
    >>> separation_digits(shifted, [-3, 5])  # 14 digits of 11 among terms of about 300
    25
    """
    if any(not p.is_exact for p in system.polynomials):
        return None
    rho = TermSizes(system.polynomials, system.projective).reference(np.asarray(point, dtype=complex)[None, :])[0]
    finest = 0.0
    for polynomial in system.polynomials:
        if polynomial.is_zero():
            continue
        with np.errstate(divide="ignore"):
            logs = polynomial.exponents @ np.log10(rho)
        sizes = [math.log10(abs(complex(c))) + t for c, t in zip(polynomial.coefficients, logs)]
        digits = [max(_written_digits(Fraction(part)) for parts in c.parts.values() for part in parts)
                  for c in polynomial.coefficients]
        top = max(sizes)
        total = top + math.log10(sum(10.0 ** (v - top) for v in sizes))
        finest = max(finest, max(total - v + d - 1 for v, d in zip(sizes, digits)))
    return int(math.ceil(finest)) + SEPARATION_MARGIN


def _mp_coefficient(coefficient, ctx):
    if isinstance(coefficient, ExactCoefficient):
        return coefficient.to_context(ctx)
    return ctx.mpc(complex(coefficient))


def backward_error(system, point, codimension):
    """The smallest change of the equations, in units of their terms, that makes ``point`` an exact singular point.

    Each equation f_i may change by any polynomial of its degree, sum_b e_b x^b; the change of monomial b
    counts as |e_b| rho^b / S_i, with rho the :class:`~numag.numeric.evaluate.TermSizes` reference point
    (rho_j = max(|x_j|, 1), affine; the largest coordinate, projective) and S_i = sum_k |c_ik| rho^a_k the
    size of f_i's terms there: a change of each coefficient relative to the whole equation's scale, the
    measure of the scaled residuals. Rounding a coefficient to double precision changes it by 2^-53 of itself,
    at most 2^-53 in these units; rounding a coefficient that is the sum of larger terms (a change of
    coordinates) by 2^-53 of those terms, also a few units. Give the system in balanced units (the
    computation's units, :class:`~numag.numeric.scaling.Scaling`): 1 is then the size of its numbers.

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
        The largest change of a coefficient of the minimum-norm change, in those units.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> cusp = parse_system(["y^2 - x^3 + 1/1000000"], ["x", "y"])
    >>> print(f"{backward_error(cusp, [0, 0], 1):.1e}")
    5.0e-07
    """
    ctx = mpmath.mp
    n = system.n_variables
    x = np.asarray(point, dtype=complex)
    sizes = TermSizes(system.polynomials, system.projective)
    rho = sizes.reference(x[None, :])[0]
    value_sizes, row_sizes = sizes.both(x[None, :])
    with ctx.workdps(_DIGITS):
        xs = [ctx.mpc(v) for v in x]
        values, jacobian = [], []
        for polynomial in system.polynomials:
            value, gradient = ctx.mpc(0), [ctx.mpc(0)] * n
            for exponent, coefficient in zip(polynomial.exponents, polynomial.coefficients):
                c = _mp_coefficient(coefficient, ctx)
                value += c * _monomial_without(xs, exponent, None, ctx)
                gradient = [g + (c * int(exponent[j]) * _monomial_without(xs, exponent, j, ctx) if exponent[j] else 0)
                            for j, g in enumerate(gradient)]
            values.append(value)
            jacobian.append(gradient)
        m = len(values)
        wanted = [[ctx.mpc(0)] * n for _ in range(m)]
        if codimension > 0:
            scaled = ctx.matrix([[jacobian[i][j] / row_sizes[0, i] for j in range(n)] for i in range(m)])
            u, singular, v = ctx.svd_c(scaled)
            for k in range(min(codimension - 1, len(singular)), len(singular)):  # the nearest rank c - 1
                for i in range(m):
                    for j in range(n):
                        wanted[i][j] -= singular[k] * u[i, k] * v[k, j] * row_sizes[0, i]
        targets = [np.array([complex(-values[i])] + [complex(wanted[i][j]) for j in range(n)], dtype=complex)
                   for i in range(m)]
    worst = 0.0
    for i, polynomial in enumerate(system.polynomials):
        exponents = _monomials(polynomial, n, system.projective)
        # monomials in units of the reference point: x^b / rho^b and the derivatives' b_j x^(b - e_j) / rho^b
        scale = np.prod(rho[None, :] ** exponents, axis=1)
        with np.errstate(divide="ignore", invalid="ignore"):
            lowered = [np.where(exponents[:, j] > 0, exponents[:, j] * np.prod(
                x[None, :] ** np.maximum(exponents - np.eye(n, dtype=int)[j], 0), axis=1), 0) for j in range(n)]
        matrix = value_sizes[0, i] * np.vstack([np.prod(x[None, :] ** exponents, axis=1)] + lowered) / scale
        delta = np.linalg.lstsq(matrix, targets[i], rcond=None)[0]
        worst = max(worst, float(np.max(np.abs(delta), initial=0.0)))
    return worst


def _monomials(polynomial, n, homogeneous):
    """Exponents of every monomial of the polynomial's degree (homogeneous) or up to it, shape (K, n); the
    polynomial's own monomials when there are more than :data:`_MAX_MONOMIALS` of those."""
    degree = polynomial.degree
    lowest = degree if homogeneous else 0
    if sum(math.comb(n + k - 1, k) for k in range(lowest, degree + 1)) > _MAX_MONOMIALS:
        return np.asarray(polynomial.exponents, dtype=int)
    rows = []
    for k in range(lowest, degree + 1):  # a monomial of degree k: a multiset of k variables
        for chosen in itertools.combinations_with_replacement(range(n), k):
            rows.append(np.bincount(np.array(chosen, dtype=int), minlength=n))
    return np.array(rows, dtype=int).reshape(len(rows), n)


def _monomial_without(xs, exponent, j, ctx):
    """x^(a - e_j) (a_j >= 1; x^a for j None), computed without dividing by x_j."""
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
            candidates += _polished(system, candidates[0], codimension, ctx)
        except (ZeroDivisionError, ValueError, ArithmeticError):  # a degenerate start: the given points only
            pass
    if system.has_real_coefficients:  # a nearly real point of a real system: its real part is a candidate too
        candidates += [p.real.astype(complex) for p in candidates
                       if np.linalg.norm(p.imag) <= 1e-6 * (1 + np.linalg.norm(p))]
    measured = [(backward_error(system, p, codimension), p) for p in candidates]
    return min(measured, key=lambda pair: pair[0])


def _polished(system, start, codimension, ctx):
    """Gauss-Newton iterates of F = 0, rank J <= c - 1 from ``start`` (each a point to measure).

    The steps use the pseudo-inverse truncated at a relative 1e-8: at a degenerate singular point (a cusp)
    the system's Jacobian is nearly rank deficient, a plain step overshoots along the weak direction and no
    damping helps, while the residual along that direction grows only quadratically and can be left alone.
    """
    drop = RankDropSystem(system, codimension - 1, start, ctx)
    z = drop.initial(start)
    points = []
    for _ in range(_POLISH_STEPS):
        residual, derivative = drop(z)
        u, values, v = ctx.svd_c(derivative)
        top = max((abs(values[k]) for k in range(len(values))), default=0)
        if top == 0:
            break
        step = ctx.matrix(derivative.cols, 1)
        for k in range(len(values)):
            if values[k] > top * ctx.mpf("1e-8"):
                coefficient = sum(ctx.conj(u[i, k]) * residual[i] for i in range(residual.rows)) / values[k]
                for j in range(derivative.cols):
                    step[j] += ctx.conj(v[k, j]) * coefficient
        z = z - step
        point = drop.point_of(z)
        if not np.all(np.isfinite(point)):
            break
        points.append(point)
        if ctx.norm(step) <= ctx.mpf(10) ** (-_DIGITS + 5) * (1 + ctx.norm(z)):
            break
    return points
