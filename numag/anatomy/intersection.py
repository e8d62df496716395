"""The Milnor number of an isolated complete-intersection singularity (ICIS), by the Le-Greuel formula.

X = V(f_1, ..., f_k) in C^n of dimension n - k >= 1 with an isolated singular point p. For a generic choice of
the equations (g = A f, A a random invertible k x k matrix) every partial intersection V(g_1, ..., g_j) is an
ICIS at p, and the Le-Greuel formula (Le 1974, "Calculation of Milnor number of isolated singularity of complete
intersection", Funct. Anal. Appl. 8; Greuel 1975, "Der Gauss-Manin-Zusammenhang isolierter Singularitaeten von
vollstaendigen Durchschnitten", Math. Ann. 214) says

    mu(g_1, ..., g_j) + mu(g_1, ..., g_(j-1)) = dim O_p / (g_1, ..., g_(j-1), the j x j minors of d(g_1..g_j)),

with mu(g_1) = dim O_p / (grad g_1) (0 where g_1 is smooth) and mu() = 0. So mu(X) is an alternating sum of
lengths of zero-dimensional local algebras, each the dimension of a local dual space (Dayton and Zeng 2005, the
Macaulay matrices of :func:`numag.certify.rank.local_dual_evidence`). The sum is computed for two random choices
of A: mu(X) does not depend on it, the lengths do, so two agreeing sums are two readings from different data.

For a curve (n - k = 1) with r local branches the Milnor number is mu = 2 delta - r + 1 (Milnor 1968 for plane
curves; Buchweitz and Greuel 1980, "The Milnor number and deformations of complex curve singularities",
Invent. Math. 58, for any curve): delta = (mu + r - 1) / 2 must be a non-negative integer, a third check
against the branches counted by the local monodromy.

Examples
--------
>>> from numag.system.parse import parse_system
>>> four_lines = parse_system(["x^2 + y^2 + z^2", "y*z"], ["x", "y", "z"])   # Giusti's S5
>>> reading = complete_intersection_milnor([p.numeric() for p in four_lines.polynomials], [0, 0, 0], seed=1)
>>> reading.milnor, reading.decided
(5, True)
"""

import itertools
import numpy as np

from ..certify.rank import local_dual_evidence
from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..numeric.refine import largest_scaled_residual
from ..system.polynomial import determinant
from .hypersurface import max_dual_order
from .records import IntersectionMilnor

__all__ = ["complete_intersection_milnor", "curve_delta"]

#: A generator of one of the ideals whose scaled residual (value over the size of its terms) at the point is at
#: least this does not vanish there: the local algebra is 0. Rounding leaves 1e-16..1e-13 at a computed point, a
#: genuine value (a smooth first equation's gradient) is of the size of its terms.
_NONZERO = 1e-8
#: A Macaulay matrix's rank gap narrower than this many decades leaves a length, and mu, undecided.
_CLEAR_DECADES = 3.0
#: Two random choices of the generic equations: mu must come out the same for both.
_CHOICES = 2


def _vanishes_at(polynomials, point):
    """Whether every polynomial vanishes at the point to rounding (scaled residual below ``_NONZERO``)."""
    if not polynomials:
        return True
    residual = largest_scaled_residual(TermSizes(polynomials), BatchEvaluator(polynomials), point[None, :])[0]
    return bool(residual < _NONZERO)


def _le_greuel_ideals(equations, n):
    """The k ideals of the Le-Greuel chain: (g_1..g_(j-1), the j x j minors of the Jacobian of g_1..g_j)."""
    jacobian = [[g.derivative(v) for v in range(n)] for g in equations]
    ideals = []
    for j in range(1, len(equations) + 1):
        minors = [determinant([[jacobian[r][c] for c in columns] for r in range(j)])
                  for columns in itertools.combinations(range(n), j)]
        ideals.append(list(equations[:j - 1]) + [m for m in minors if not m.is_zero()])
    return ideals


def complete_intersection_milnor(polynomials, point, seed=0):
    """mu of X = V(f_1..f_k) at an isolated singular point, X of dimension n - k >= 1 (the Le-Greuel formula).

    Parameters
    ----------
    polynomials : list of Polynomial
        k numeric equations in n > k variables (balanced units: the dual spaces' Taylor variables are units of
        one).
    point : array_like of complex
        The singular point (same units).
    seed : int
        Of the random combinations of the equations.

    Returns
    -------
    IntersectionMilnor

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> node = parse_system(["x^2 + y^2 - z^2", "z - x^3"], ["x", "y", "z"])   # the node x^2 + y^2 = x^6
    >>> complete_intersection_milnor([p.numeric() for p in node.polynomials], [0, 0, 0]).milnor
    1
    """
    polynomials = [p.numeric() for p in polynomials]
    k, n = len(polynomials), polynomials[0].n_variables
    if not k < n:
        raise ValueError("the Le-Greuel formula needs fewer equations than variables (X of positive dimension)")
    point = np.asarray(point, dtype=complex).reshape(-1)
    real = bool(np.all(point.imag == 0) and all(np.all(p.numeric_coefficients().imag == 0) for p in polynomials))
    rng = np.random.default_rng(seed)
    # each equation in units of its largest coefficient, so that a combination weighs them alike
    polynomials = [p.scaled(1.0 / float(np.max(np.abs(p.numeric_coefficients())))) for p in polynomials]
    readings, all_lengths, gaps, notes = [], [], [], []
    for _ in range(_CHOICES):
        mixing = rng.standard_normal((k, k)) if real else rng.standard_normal((k, k)) + 1j * rng.standard_normal((k, k))
        equations = [sum((polynomials[i].scaled(mixing[j, i]) for i in range(1, k)), polynomials[0].scaled(mixing[j, 0]))
                     for j in range(k)]
        lengths = []
        for ideal in _le_greuel_ideals(equations, n):
            if not _vanishes_at(ideal, point):  # the point is not a zero of this ideal: its local algebra is 0
                lengths.append(0)
                continue
            length, width = local_dual_evidence(ideal, point, max_dual_order(n))
            gaps.append(width)
            lengths.append(length)
        all_lengths.append(lengths)
        if any(length is None for length in lengths):
            if not notes:
                notes.append("a local algebra of the Le-Greuel formula is not finite-dimensional: the point is not an "
                             "isolated singularity of a complete intersection (or its equations are not generic)")
            readings.append(None)
            continue
        # mu_j = length_j - mu_(j-1), mu_0 = 0: the alternating sum from the top
        readings.append(int(sum((-1) ** (k - j) * lengths[j - 1] for j in range(1, k + 1))))
    narrowest = min(gaps, default=float("inf"))
    milnor = readings[0]
    if narrowest < _CLEAR_DECADES:
        notes.append(f"a Macaulay matrix's rank gap is only {narrowest:.1f} decades: mu undecided")
        milnor = None
    elif any(r != milnor for r in readings):
        notes.append(f"two generic choices of the equations give mu = {readings}: undecided")
        milnor = None
    elif milnor is not None and milnor < 0:
        notes.append(f"the Le-Greuel sum is negative ({milnor}): inconsistent, undecided")
        milnor = None
    return IntersectionMilnor(milnor, [[-1 if v is None else v for v in c] for c in all_lengths], narrowest, notes)


def curve_delta(milnor, branches):
    """delta of a curve singularity from mu and the number of branches r (mu = 2 delta - r + 1), or None when the
    two do not fit (odd mu + r - 1, or a negative delta).

    Examples
    --------
    >>> curve_delta(5, 4), curve_delta(1, 2), curve_delta(2, 2)
    (4, 1, None)
    """
    twice = milnor + branches - 1
    if twice < 0 or twice % 2:
        return None
    return twice // 2
