"""The trace test of a hypersurface's proper groups again in high precision (decision 0144).

A double-precision trace test cannot see a trace that is not linear by less than the paths' accuracy: an
irreducible curve that is a union of two conics to 1e-6 (x/10^6 added to two circles) has a trace whose second
difference is 1e-27 of its size. For one exact equation the witness points of a translated line are the roots of f
restricted to it, a univariate polynomial of degree d: its coefficients in mpmath at P digits (d + 1 values on a
circle), its roots by mpmath, followed from the slice to the translated lines in small steps. A group whose trace
is not linear at P digits is not a component.
"""

import math
from fractions import Fraction

import mpmath
import numpy as np

#: Above this degree the check is not made (the groups keep the double-precision verdict): measured per group at
#: degree 12 and 150 digits, about 0.3 CPU s.
PRECISE_TRACE_DEGREE = 12
#: Digits at least, and at most; between them 40 + 2 d H, H the most decimal digits of a coefficient's numerator or
#: denominator (a perturbation of size 10^-H moves a trace by about a power of it up to d).
_MIN_DIGITS, _MAX_DIGITS = 60, 1200


def precise_digits(polynomial):
    """Working digits for the precise trace test of one exact polynomial.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> precise_digits(parse_system(["x^2 + y^2 - 1"], ["x", "y"]).polynomials[0])
    60
    >>> precise_digits(parse_system(["(x^2+y^2-1)*(x^2+y^2-4) + x/10^6"], ["x", "y"]).polynomials[0])
    88
    """
    height = 0
    for c in polynomial.coefficients:
        for radicand, pair in c.parts.items():
            for q in pair:
                q = Fraction(q)
                for value in (q.numerator, q.denominator, radicand):
                    if value:
                        height = max(height, len(str(abs(value))))
    # the 1 of a coefficient 1 is one digit: heights below 2 add nothing
    height = max(height - 1, 0)
    return int(min(_MAX_DIGITS, max(_MIN_DIGITS, 40 + 2 * polynomial.degree * height)))


def _line(rows):
    """A point and a direction of the line cut by ``rows`` (shape (n - 1, n + 1); row . (1, x) = 0)."""
    a, b = rows[:, 1:], -rows[:, 0]
    p0 = np.linalg.lstsq(a, b, rcond=None)[0]
    v = np.linalg.svd(a)[2][-1].conj()
    return p0, v


def _restricted_roots(evaluate, base, v, degree, radius):
    """The roots in t of f(base + t v), coefficients from d + 1 values on the circle |t| = radius."""
    coefficients = _circle_coefficients([evaluate([base[j] + t * v[j] for j in range(len(v))])
                                         for t in _circle(degree, radius)], radius)
    return _roots(coefficients, degree)


def _circle(degree, radius):
    """The d + 1 nodes on the circle |t| = radius that give a polynomial of degree d its coefficients."""
    count = degree + 1
    return [radius * mpmath.expjpi(mpmath.mpf(2 * k) / count) for k in range(count)]


def _circle_coefficients(values, radius):
    """Coefficients (lowest first) of the polynomial of degree len(values) - 1 with these values at
    :func:`_circle` (a discrete Fourier transform)."""
    count = len(values)
    coefficients = []
    for power in range(count):
        total = mpmath.fsum(values[k] * mpmath.expjpi(-mpmath.mpf(2 * k * power) / count) for k in range(count))
        coefficients.append(total / count / radius ** power)
    return coefficients


def _restriction(evaluate, base, v, w, degree, radius):
    """Coefficients c[j][i] of s^i t^j in f(base + s w + t v) (total degree d: i <= d - j), from values on the
    torus |s| = 1, |t| = radius, computed once for every translation s w of the line (decision 0148): a translated
    line's restriction is then a few products, not d + 1 evaluations of f."""
    nodes_s, nodes_t = _circle(degree, mpmath.mpf(1)), _circle(degree, radius)
    n = len(v)
    # per s, the coefficients in t; then per power of t, the coefficients in s
    in_t = [_circle_coefficients([evaluate([base[j] + s * w[j] + t * v[j] for j in range(n)]) for t in nodes_t],
                                 radius) for s in nodes_s]
    return [_circle_coefficients([row[power] for row in in_t], mpmath.mpf(1))[:degree - power + 1]
            for power in range(degree + 1)]


def _restricted_at(restriction, s):
    """Coefficients (lowest first) in t of f(base + s w + t v), from :func:`_restriction` (Horner in s)."""
    coefficients = []
    for row in restriction:
        total = mpmath.mpc(0)
        for c in reversed(row):
            total = total * s + c
        coefficients.append(total)
    return coefficients


def _roots(coefficients, degree, guesses=None, polish=True):
    """The roots of the polynomial (coefficients lowest first), or None (it lost degree, or they were not found).

    With ``guesses`` (the roots of a nearby polynomial) by the Weierstrass iteration from them, in double first and
    then (``polish``) in the working precision, kept only when the discs |z - z_i| <= d |W_i| about the roots
    found, W_i their corrections, are pairwise disjoint: each then holds exactly one root (the inclusion theorem of
    the Weierstrass corrections), so the list is the whole set of roots whatever the guesses were; otherwise None.
    Not polished (the steps between the slice and its translations, where the roots only tell which root went
    where), the roots are the doubles and their discs at most a 64th of their least distance. Without guesses, by
    ``mpmath.polyroots``.
    """
    coefficients = list(coefficients)
    while len(coefficients) > 1 and coefficients[-1] == 0:
        coefficients.pop()
    if len(coefficients) - 1 < degree:
        return None  # the line lost degree (a direction at infinity on X)
    if guesses is None:
        try:
            return list(mpmath.polyroots(coefficients[::-1], maxsteps=400, extraprec=mpmath.mp.prec))
        except mpmath.libmp.libhyper.NoConvergence:
            return None
    monic = [c / coefficients[-1] for c in coefficients[:-1]]
    z = _in_double(monic, guesses)
    if not polish:
        with mpmath.mp.workprec(_CHECK_BITS):
            z = [mpmath.mpc(a) for a in z]
            corrections = _corrections([+c for c in monic], z)
            if corrections is None:
                return None
            radii = [64 * degree * abs(c) for c in corrections]
            return z if _disjoint(z, radii) else None
    with mpmath.mp.workprec(mpmath.mp.prec + 32):
        z = [mpmath.mpc(a) for a in z]
        tolerance = mpmath.mpf(2) ** (24 - mpmath.mp.prec)
        for _ in range(_WEIERSTRASS_STEPS):
            corrections = _corrections(monic, z)
            if corrections is None:
                return None
            z = [a - c for a, c in zip(z, corrections)]
            if max(abs(c) for c in corrections) <= tolerance * max(abs(a) for a in z):
                break
        corrections = _corrections(monic, z)
        if corrections is None or not _disjoint(z, [degree * abs(c) for c in corrections]):
            return None
    return [+a for a in z]


def _disjoint(z, radii):
    """Whether the discs about ``z`` of these radii are pairwise disjoint."""
    return all(abs(z[i] - z[j]) > radii[i] + radii[j] for i in range(len(z)) for j in range(i + 1, len(z)))


#: Bits of the check of roots in double (their corrections are about 1e-13 of them: far above this precision's
#: rounding of the polynomial).
_CHECK_BITS = 128
#: Weierstrass iterations at most from a nearby polynomial's roots (quadratic convergence: a few suffice when the
#: guesses are close; when they are not, the step is halved).
_WEIERSTRASS_STEPS = 40


def _in_double(monic, guesses):
    """The Weierstrass iteration in double first (cheap: the digits are doubled at each step once close, so the
    work in P digits is a few steps); its last iterate when it does not settle (the check decides), the guesses as
    they were when it leaves the doubles."""
    a = np.array([complex(c) for c in monic])
    z = np.array([complex(g) for g in guesses])
    if not (np.all(np.isfinite(a)) and np.all(np.isfinite(z))):
        return guesses
    off = ~np.eye(len(z), dtype=bool)
    with np.errstate(all="ignore"):
        for _ in range(_WEIERSTRASS_STEPS):
            values = np.polyval(np.concatenate([[1.0], a[::-1]]), z)
            differences = z[:, None] - z[None, :]
            corrections = values / np.prod(np.where(off, differences, 1.0), axis=1)
            if not np.all(np.isfinite(corrections)):
                return guesses
            z = z - corrections
            if np.max(np.abs(corrections)) <= 1e-13 * np.max(np.abs(z)):
                break
    return z.tolist()


def _corrections(monic, z):
    """Weierstrass corrections p(z_i) / prod_{j != i} (z_i - z_j) of a monic polynomial (``monic``: its lower
    coefficients, lowest first), or None when two of ``z`` are equal."""
    corrections = []
    for i, a in enumerate(z):
        value = mpmath.mpc(1)
        for c in reversed(monic):
            value = value * a + c
        denominator = mpmath.mpc(1)
        for j, b in enumerate(z):
            if j != i:
                denominator *= a - b
        if denominator == 0:
            return None
        corrections.append(value / denominator)
    return corrections


def _nearest(old, new):
    """For each of ``old`` the index of the nearest of ``new``, or None when some match is not clear."""
    gaps = [abs(a - b) for i, a in enumerate(new) for b in new[i + 1:]]
    separation = min(gaps) if gaps else mpmath.inf
    order = []
    for a in old:
        distances = [abs(a - b) for b in new]
        k = min(range(len(new)), key=lambda j: distances[j])
        if distances[k] > separation / 4:
            return None
        order.append(k)
    if len(set(order)) != len(order):
        return None
    return order


def _followed(restriction, roots, direction, degree, steps=16):
    """The roots at the line translated by ``direction`` (+1 or -1) times the translation of ``restriction``,
    followed from shift 0 in steps that keep every match clear."""
    done, step, current = mpmath.mpf(0), mpmath.mpf(1) / steps, roots
    while done < 1:
        size = min(step, 1 - done)
        new = _roots(_restricted_at(restriction, direction * (done + size)), degree, guesses=current,
                     polish=done + size >= 1)
        order = None if new is None else _nearest(current, new)
        if order is None:
            step = size / 2
            if step < mpmath.mpf(1) / 2 ** 40:
                return None
            continue
        current = [new[k] for k in order]
        done += size
        step = min(2 * size, mpmath.mpf(1) / 4)
    return current


def precise_trace_defects(polynomial, rows, groups, seed=0, digits=None):
    """Relative trace defects of groups of witness points of one exact equation, at ``digits`` digits.

    Parameters
    ----------
    polynomial : Polynomial
        Exact coefficients.
    rows : ndarray, shape (n - 1, n + 1)
        The slice (a line) the points lie on.
    groups : list of ndarray, shape (k, n)
        Points of the slice, each group one candidate component.
    seed : int
    digits : int, optional
        :func:`precise_digits` when not given.

    Returns
    -------
    defects : list of float, or None
        Per group |sum of its points' second differences along the line| / the translation, which moves the line
        by the closest two roots' distance; None when the roots could not be computed or followed.
    noise : float
        The same for all the roots together (zero up to the working precision when the roots are right).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["(y - x^2) * (y + 1)"], ["x", "y"]).polynomials[0]
    >>> rows = np.array([[-0.5 + 0.2j, 0.3 - 0.1j, 1.0]])  # y = 0.5 - 0.2i - (0.3 - 0.1i) x
    >>> t = np.roots([1, 0.3 - 0.1j, -0.5 + 0.2j])
    >>> parabola = np.column_stack([t, 0.5 - 0.2j - (0.3 - 0.1j) * t])
    >>> defects, noise = precise_trace_defects(f, rows, [parabola[:1], parabola], seed=1)
    >>> defects[0] > 1e-3, defects[1] < 1e-40, noise < 1e-40
    (True, True, True)
    """
    from numag.numeric.evaluate import PrecisionEvaluator

    degree = polynomial.degree
    digits = digits or precise_digits(polynomial)
    rng = np.random.default_rng([int(seed) % 2**32, 144])
    evaluator = PrecisionEvaluator([polynomial])
    p0d, vd = _line(np.asarray(rows, dtype=complex))
    n = len(vd)
    with mpmath.mp.workdps(digits):
        def evaluate(point):
            return evaluator.evaluate(point, mpmath.mp, jacobian=False)[0]

        p0 = [mpmath.mpc(complex(z)) for z in p0d]
        v = [mpmath.mpc(complex(z)) for z in vd]
        radius_t = [complex(np.vdot(vd, g - p0d)) for g in np.concatenate(groups)] if groups else [0j]
        radius = mpmath.mpf(1 + max(abs(t) for t in radius_t))
        roots = _restricted_roots(evaluate, p0, v, degree, radius)
        if roots is None:
            return None, math.inf
        # the translation moves the line by about the closest two roots' distance: every root moves less than
        # that, so a few steps follow them (the whole spread, 1e5 times more beside two near-nodes, took 1e5 steps);
        # at P digits a defect (s / R)^2 of the traces' non-linearity is still far above the roots' accuracy
        spread = min((abs(a - b) for i, a in enumerate(roots) for b in roots[i + 1:]), default=mpmath.mpf(0))
        if spread == 0:
            return None, math.inf
        wd = rng.standard_normal(n) + 1j * rng.standard_normal(n)
        wd = wd - np.vdot(vd, wd) * vd
        wd = wd / np.linalg.norm(wd)
        w = [mpmath.mpc(complex(z)) for z in wd]
        shift = spread * mpmath.expjpi(2 * mpmath.mpf(float(rng.random())))
        restriction = _restriction(evaluate, p0, v, [shift * z for z in w], degree, radius)
        up = _followed(restriction, roots, 1, degree)
        down = _followed(restriction, roots, -1, degree)
        if up is None or down is None:
            return None, math.inf
        second = [up[k] + down[k] - 2 * roots[k] for k in range(len(roots))]
        noise = float(abs(mpmath.fsum(second)) / spread)
        defects = []
        for g in groups:
            ts = [mpmath.mpc(complex(np.vdot(vd, point - p0d))) for point in g]
            order = _nearest(ts, roots)
            if order is None:
                return None, noise
            defects.append(float(abs(mpmath.fsum(second[k] for k in order)) / spread))
    return defects, noise


#: A group's trace is linear at P digits when its relative defect is below 10^(-P/2) (the roots are right to about
#: 10^-P; the heuristic floor of a real defect, 10^-(2 d H) of a coefficient height H, stays above it).
def precise_verdicts(polynomial, rows, points, groups, seed=0, digits=None):
    """Per group True (its trace is linear at P digits), False (it is not) or None (not decided).

    Parameters
    ----------
    polynomial : Polynomial
        One exact equation.
    rows : ndarray, shape (n - 1, n + 1)
    points : ndarray, shape (m, n)
        The witness points on ``rows``.
    groups : list of list of int
    seed : int
    digits : int, optional

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["(y - x^2) * (y + 1)"], ["x", "y"]).polynomials[0]
    >>> rows = np.array([[-0.5 + 0.2j, 0.3 - 0.1j, 1.0]])
    >>> t = np.roots([1, 0.3 - 0.1j, -0.5 + 0.2j])
    >>> points = np.column_stack([t, 0.5 - 0.2j - (0.3 - 0.1j) * t])
    >>> precise_verdicts(f, rows, points, [[0], [0, 1]], seed=2)
    [False, True]
    """
    digits = digits or precise_digits(polynomial)
    defects, noise = precise_trace_defects(polynomial, rows, [points[g] for g in groups], seed=seed, digits=digits)
    floor = 10.0 ** (-digits / 2)
    if defects is None or not noise <= floor:
        return [None] * len(groups)
    return [bool(d <= floor) for d in defects]
