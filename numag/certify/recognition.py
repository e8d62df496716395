"""Exact routes: the exact value of the given point substituted, coordinates recognised as polynomials
in a primitive element by integer relations (PSLQ) and verified by exact reduction modulo its minimal
polynomial with an interval root, and root separation for rational input (Canny's gap bound, from
memory: J. Canny, "Generalized characteristic polynomials", J. Symbolic Comput. 1990).

Examples
--------
>>> from numag.system.parse import parse_system
>>> square, other = parse_system(["x^2 - 2"], ["x"]).polynomials, parse_system(["x - 1"], ["x"]).polynomials[0]
>>> separation_exponent(square, other) < 0  # a value of x - 1 at a root of x^2 - 2 is 0 or above 10^that
True
"""

from dataclasses import dataclass
from fractions import Fraction
import itertools
import math

import mpmath
import numpy as np

from ..errors import LimitError
from ..system.exact import ExactCoefficient, square_free_split
from .intervals import _bounds, _iv_point
from .records import Certificate, Kind, Recognition, Status, _float_up, _guarded, _parse_center, _text, working_digits
from .square import _equilibrated

__all__ = ["separation_exponent"]


#: Exact substitution of a given point is tried for equations with at most this many terms in all.
_SUBSTITUTION_TERMS = 5000


def _exact_box(exact, digits):
    """Centre texts (``digits`` digits) and radii of a box that holds the exact point ``exact``: each radius is
    the rounding of the text, widened by the error of a guarded evaluation of an irrational coordinate."""
    texts, radii = [], []
    with working_digits(_guarded(digits)):
        for q in exact:
            value = q.to_context(mpmath.mp)
            text = _text(value, digits)
            shown = _parse_center(text)
            slack = mpmath.mp.mpf(10) ** (-_guarded(digits) + 3) * (1 + abs(value))
            radii.append(_float_up(max(abs(shown.real - value.real), abs(shown.imag - value.imag)) + slack))
            texts.append(text)
    return texts, radii


def _exact_at_point(required, point, claim, digits, threshold, exact=None):
    """A certificate for the given point itself when every equation vanishes there exactly, else None.

    A double is a dyadic rational, so the given coordinates are exact numbers: when the exact equations
    vanish there (a node given as (0, 0), a linkage's branch point (1, 0, 1, 0)), that point is the
    certified zero, whatever the Jacobian does (also on a positive-dimensional set of zeros). ``exact``:
    other exact coordinates to try instead (``point`` their value in doubles).
    """
    if not all(p.is_exact for p in required) or sum(p.n_terms for p in required) > _SUBSTITUTION_TERMS:
        return None
    values, _, _ = _equilibrated(required, point)
    if not np.all(np.isfinite(values)) or np.linalg.norm(values) > 1e-12:
        return None  # not even nearly a zero in double precision: no exact zero there
    given = exact is None
    exact = [ExactCoefficient.from_complex(v) for v in point] if given else exact
    powers = [[ExactCoefficient.rational(1)] for _ in exact]
    if not all(p.evaluate_exact(exact, powers).is_zero() for p in required):
        return None
    if given:
        texts, radii = [], []
        with working_digits(_guarded(digits)):
            for v in point:
                text = _text(mpmath.mp.mpc(v), 17)
                shown = _parse_center(text)
                # the text rounds the double: the box is widened by that (the exact point stays inside)
                radii.append(_float_up(max(abs(shown.real - mpmath.mp.mpf(v.real)),
                                           abs(shown.imag - mpmath.mp.mpf(v.imag)))))
                texts.append(text)
    else:
        texts, radii = _exact_box(exact, digits)
    certificate = Certificate(status=Status.CERTIFIED, kind=Kind.EXACT, claim=claim,
                              center=np.asarray(point, dtype=complex), center_text=texts,
                              radius=max(radii, default=0.0), digits=digits, method="exact substitution",
                              threshold=threshold,
                              radii=radii, backward_error=0.0, residual_bound=0.0, distance=0.0,
                              exact_method="exact substitution", exact_coordinates=[q.to_text() for q in exact],
                              real=all(q.is_real() for q in exact))
    certificate.notes.append("the given point is an exact zero of every equation of the claim (its coordinates "
                             "are the exact binary values given)" if given else
                             "an exact zero of every equation of the claim (exact arithmetic)")
    return certificate


def _short_rationals(point, reach):
    """Points of Gaussian rationals with denominators up to 10, 100, ..., 10^6 within ``reach`` of ``point``
    (each coordinate's best approximations, continued fractions): candidates for an exact zero where the
    numerical routes failed. Any of them is a certificate only if the exact equations vanish there."""
    seen = []
    for k in range(1, 7):
        bound = 10 ** k
        parts = [(Fraction(v.real).limit_denominator(bound), Fraction(v.imag).limit_denominator(bound))
                 for v in np.asarray(point, dtype=complex)]
        values = np.array([complex(float(re), float(im)) for re, im in parts])
        if np.max(np.abs(values - point), initial=0.0) > reach or parts in seen:
            continue
        seen.append(parts)
        yield [ExactCoefficient.rational(re, im) for re, im in parts], values


def _field_basis(polynomials, complex_values):
    """Q-basis of the field of the coefficients (square roots, and i when needed)."""
    radicands = {1}
    imaginary = complex_values
    for p in polynomials:
        for c in p.coefficients:
            for r, (_, im) in c.parts.items():
                radicands.add(r)
                imaginary = imaginary or im != 0
    closed = set(radicands)
    while True:
        grown = {square_free_split(a * b)[1] for a in closed for b in closed} | closed
        if grown == closed or len(grown) > 16:
            break
        closed = grown
    basis = [ExactCoefficient.square_root(r) for r in sorted(closed)]
    if imaginary:
        basis += [b * ExactCoefficient.imaginary_unit() for b in basis]
    return basis


def _integer_relation(values, digits):
    """An integer relation among complex mp numbers (found by PSLQ on a real projection), or None."""
    mp = mpmath.mp
    weight = mp.sqrt(2) / mp.pi  # real and imaginary parts folded into one real vector
    folded = [v.real + weight * v.imag for v in values]
    scale = max(abs(v) for v in folded)
    if scale == 0:
        return None
    tiny = mp.mpf(10) ** (-(digits * 2 // 3)) * scale
    for k, v in enumerate(values):
        if abs(v) <= tiny:  # PSLQ needs non-zero entries; a vanishing entry is a relation by itself
            return [1 if j == k else 0 for j in range(len(values))]
    try:
        # a relation among k numbers with coefficients up to H exists by chance at a residual near H^-(k-1):
        # H^k is kept well below the tolerance's 10^(2 digits / 3), so what PSLQ finds is not chance
        relation = mpmath.pslq([v / scale for v in folded], tol=mp.mpf(10) ** (-(digits * 2 // 3)),
                               maxcoeff=10 ** max(2, (digits * 11) // (20 * len(values))), maxsteps=20000)
    except (ValueError, ZeroDivisionError):
        return None
    if relation is None:
        return None
    check = abs(mp.fsum(a * v for a, v in zip(relation, values)))
    if check > mp.mpf(10) ** (-(digits * 2 // 3)) * max(abs(v) for v in values) * sum(abs(a) for a in relation):
        return None
    return relation


def _combine(relation, basis):
    total = ExactCoefficient.zero()
    for a, b in zip(relation, basis):
        if a:
            total = total + b * int(a)
    return total


class _Quotient:
    """Arithmetic in K[t]/(p) for monic p over the coefficient field K."""

    def __init__(self, monic):
        self.p = monic  # coefficients c_0..c_{D-1} of t^D + ... (list of ExactCoefficient), low first
        self.degree = len(monic)

    def multiply(self, a, b):
        product = [ExactCoefficient.zero()] * (len(a) + len(b) - 1)
        for i, x in enumerate(a):
            if x.is_zero():
                continue
            for j, y in enumerate(b):
                if not y.is_zero():
                    product[i + j] = product[i + j] + x * y
        return self.reduce(product)

    def reduce(self, values):
        values = list(values)
        d = self.degree
        for k in range(len(values) - 1, d - 1, -1):
            top = values[k]
            if top.is_zero():
                continue
            for i in range(d):  # t^d = -sum p_i t^i
                values[k - d + i] = values[k - d + i] - top * self.p[i]
            values[k] = ExactCoefficient.zero()
        values = values[:d] + [ExactCoefficient.zero()] * max(0, d - len(values))
        return values


@dataclass
class _ExactOutcome:
    outcome: Recognition
    coordinates: object = None
    minimal_polynomial: object = None
    note: str = ""
    failing: object = None       # index (into the claim's equations) of an equation that is not 0


def _exact_route(square, required, chosen, center, radii, options, digits):
    """Recognise the zero exactly: ``_ExactOutcome`` (a common exact zero, a proof of none, or nothing found)."""
    mp = mpmath.mp
    n = len(center)
    complex_values = any(abs(c.imag) > r for c, r in zip(center, radii))
    basis = _field_basis(required + chosen, complex_values)
    top = options.exact_max_degree
    precision = max(digits, 30 + 8 * (top + 1) * len(basis))
    weights = [1, 3, 7, 11, 17, 23, 31, 41]
    with working_digits(precision + 10):
        refined, converged = square.newton(center, precision)
        if not converged:
            return _ExactOutcome(Recognition.NONE, note="exact recognition skipped: high-precision refinement failed")
        # each coordinate in units of its power of ten (exact): a change of units (x -> 1000 x) would
        # otherwise multiply the minimal polynomial's coefficients beyond what PSLQ finds at this precision
        negligible = mp.mpf(10) ** (-(precision // 2)) * max([abs(refined[j]) for j in range(n)] + [mp.mpf(1)])
        powers_of_ten = [int(mp.nint(mp.log10(abs(refined[j])))) if abs(refined[j]) > negligible else 0
                         for j in range(n)]
        x = [refined[j] / mp.mpf(10) ** e for j, e in zip(range(n), powers_of_ten)]
        t = mp.fsum(w * v for w, v in zip(itertools.cycle(weights), x)) if n else mp.mpc(0)
        basis_values = [b.to_context(mp) for b in basis]
        for degree in range(1, top + 1):
            powers = [t ** k for k in range(degree + 1)]
            relation = _integer_relation([b * pk for pk in powers for b in basis_values], precision)
            if relation is None:
                continue
            coefficients = [_combine(relation[k * len(basis):(k + 1) * len(basis)], basis) for k in range(degree + 1)]
            if coefficients[-1].is_zero():
                continue
            lead = coefficients[-1].reciprocal()
            monic = [c * lead for c in coefficients[:-1]]
            expressions = []
            for v in x:
                rel = _integer_relation([v] + [b * pk for pk in powers[:degree] for b in basis_values], precision)
                if rel is None or rel[0] == 0:
                    expressions = None
                    break
                parts = [_combine(rel[1 + k * len(basis):1 + (k + 1) * len(basis)], basis) for k in range(degree)]
                e = powers_of_ten[len(expressions)]
                scale = ExactCoefficient.rational(Fraction(-1, int(rel[0])) * Fraction(10) ** e)
                expressions.append([c * scale for c in parts])
            if expressions is None:
                continue
            verdict = _verify_exact(required, chosen, monic, expressions, t, center, radii)
            if verdict is None:
                continue  # a relation found by chance: its root is not in the box
            required_zero, square_zero = verdict
            texts = [_expression_text(e) for e in expressions]
            minimal = None if degree == 1 else _poly_text(monic)
            radical = _quadratic_root(monic, t) if degree == 2 else None
            if radical is not None:  # t = (-b +- sqrt(b^2 - 4c))/2 written out
                texts = [(e[0] + e[1] * radical).to_text() for e in expressions]
                minimal = None
            form = " + ".join(f"{w}*x{j + 1}" + (f"/10^{e}" if e else "")
                              for j, w, e in zip(range(n), itertools.cycle(weights), powers_of_ten))
            if all(required_zero):
                return _ExactOutcome(Recognition.ZERO, texts, minimal,
                                     "exact: every equation vanishes identically modulo the minimal polynomial of "
                                     f"t = {form}, and its root lies in the box (PSLQ at {precision} digits)")
            if square_zero:
                return _ExactOutcome(Recognition.REFUTED, texts, minimal,
                                     f"the only zero of the square subsystem in the box is exact (t = {form}, PSLQ "
                                     f"at {precision} digits), and an equation of the claim is not 0 there",
                                     required_zero.index(False))
    return _ExactOutcome(Recognition.NONE, note=f"no exact form found (primitive element of degree up to {top} over the "
                                      "coefficient field)")


def _apply_exact(certificate, outcome):
    if outcome.outcome is Recognition.NONE:
        certificate.notes.append(outcome.note)
        return
    certificate.kind = Kind.EXACT
    certificate.exact_method = "recognised"
    certificate.exact_coordinates = outcome.coordinates
    certificate.minimal_polynomial = outcome.minimal_polynomial
    certificate.notes.append(outcome.note)
    if outcome.outcome is Recognition.ZERO:
        certificate.status, certificate.reason = Status.CERTIFIED, ""
        certificate.backward_error = 0.0  # an exact zero of every equation
    else:
        certificate.status = Status.REFUTED
        certificate.reason = (f"the box holds exactly one zero of the square subsystem, the exact point "
                              f"({', '.join(outcome.coordinates)}), and equation {outcome.failing + 1} of the "
                              "claim is not 0 there: the box holds no zero of the claim")


def _quadratic_root(monic, t_value):
    """The root of t^2 + b t + c nearest ``t_value``, with a square root, when b^2 - 4c is rational."""
    c, b = monic
    disc = b * b - c * 4
    if not disc.is_rational():
        return None
    disc = disc.as_fraction()
    try:
        root = ExactCoefficient.square_root(abs(disc))
    except LimitError:  # a radicand too large to split: keep the polynomial in t
        return None
    if disc < 0:
        root = root * ExactCoefficient.imaginary_unit()
    candidates = [(root * sign - b) * ExactCoefficient.rational(Fraction(1, 2)) for sign in (1, -1)]
    return min(candidates, key=lambda v: abs(complex(v) - complex(t_value)))


def _verify_exact(required, chosen, monic, expressions, t_value, center, radii):
    """Whether p's root near t maps into the box (None if not), then which equations vanish exactly there.

    Returns (list of bool per equation of the claim, whether every square-subsystem equation vanishes).
    """
    mp, iv = mpmath.mp, mpmath.iv
    quotient = _Quotient(monic)
    d = quotient.degree
    n = len(expressions)
    coefficients = [c.to_context(iv) for c in monic] + [iv.mpc(1)]
    if d == 1:
        root_box = -coefficients[0]
    else:
        rho = mp.mpf(10) ** (-(mp.dps // 2)) * (1 + abs(t_value))
        spread = iv.mpf([-rho, rho])
        box = iv.mpc(iv.mpf(t_value.real) + spread, iv.mpf(t_value.imag) + spread)
        point = _iv_point(t_value)

        def value(z, k=0):
            total = iv.mpc(0)
            for i in range(len(coefficients) - 1, k - 1, -1):
                factor = math.perm(i, k)
                total = total * z + coefficients[i] * factor
            return total

        highest_first = [c.to_context(mp) for c in reversed(monic + [ExactCoefficient.rational(1)])]
        derivative_mp = mp.polyval(highest_first, t_value, derivative=True)[1]
        if derivative_mp == 0:
            return None
        y = _iv_point(1 / derivative_mp)
        image = point - y * value(point) + (1 - y * value(box, 1)) * (box - point)
        lo_re, hi_re, lo_im, hi_im = _bounds(image)
        if not (lo_re > t_value.real - rho and hi_re < t_value.real + rho
                and lo_im > t_value.imag - rho and hi_im < t_value.imag + rho):
            return None
        root_box = image
    for j in range(n):
        enclosure = iv.mpc(0)
        for coefficient in reversed(expressions[j]):
            enclosure = enclosure * root_box + coefficient.to_context(iv)
        lo_re, hi_re, lo_im, hi_im = _bounds(enclosure)
        c, r = center[j], radii[j]
        if not (lo_re >= c.real - r and hi_re <= c.real + r and lo_im >= c.imag - r and hi_im <= c.imag + r):
            return None
    cache = {}

    def power(j, e):
        if (j, e) not in cache:
            if e == 0:
                cache[(j, e)] = quotient.reduce([ExactCoefficient.rational(1)])
            else:
                cache[(j, e)] = quotient.multiply(power(j, e - 1), expressions[j])
        return cache[(j, e)]

    reduced = {}

    def vanishes(polynomial):
        if id(polynomial) not in reduced:
            total = [ExactCoefficient.zero()] * d
            for row, c in zip(polynomial.exponents, polynomial.coefficients):
                term = quotient.reduce([c])
                for j in range(n):
                    if row[j]:
                        term = quotient.multiply(term, power(j, int(row[j])))
                total = [a + b for a, b in zip(total, term)]
            reduced[id(polynomial)] = all(v.is_zero() for v in total)
        return reduced[id(polynomial)]

    square_zero = all(vanishes(p) for p in chosen)
    return [vanishes(p) for p in required], square_zero


def _poly_text(monic):
    terms = ["t^%d" % len(monic)]
    for k in range(len(monic) - 1, -1, -1):
        c = monic[k]
        if c.is_zero():
            continue
        power = "" if k == 0 else ("*t" if k == 1 else f"*t^{k}")
        terms.append(f"({c.to_text()}){power}")
    return " + ".join(terms)


def _expression_text(values):
    terms = []
    for k, c in enumerate(values):
        if c.is_zero():
            continue
        if k == 0:
            terms.append(c.to_text())
        else:
            terms.append(f"({c.to_text()})*t" + ("" if k == 1 else f"^{k}"))
    return " + ".join(terms) if terms else "0"


def _integer_form(polynomial):
    """(L, largest |integer coefficient|) of L * polynomial with L the lcm of its denominators."""
    fractions = [c.as_fraction() for c in polynomial.coefficients]
    lcm = 1
    for q in fractions:
        lcm = lcm * q.denominator // math.gcd(lcm, q.denominator)
    return lcm, max((abs(q * lcm) for q in fractions), default=0)


def separation_exponent(square, other):
    """log10 of Canny's gap bound for the value of ``other`` at an isolated zero of ``square``.

    For a square system G of n rational polynomials in n unknowns with an isolated zero z and a rational
    polynomial g, (z, L g(z)) is an isolated zero of the integer system (L_i G_i, y - L g(x)) in n + 1
    unknowns (L, L_i clearing denominators). By Canny's gap theorem (J. Canny, "Generalized characteristic
    polynomials", J. Symbolic Comput. 1990 -- from memory) a coordinate of an isolated zero of N integer
    polynomials of degree at most d with coefficients of magnitude below c is 0 or larger than
    (3 d c)^-(N d^N). Returns (log10 of the bound on |g(z)|, so g(z) = 0 when |g(z)| is below 10^that).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> s = parse_system(["x^2 - 2", "y - x"], ["x", "y"]).polynomials
    >>> round(separation_exponent(s, parse_system(["x*y - 2"], ["x", "y"]).polynomials[0]), 1)
    -30.1
    """
    n = len(square)
    forms = [_integer_form(p) for p in square]
    lcm, largest = _integer_form(other)
    d = max([p.degree for p in square] + [other.degree, 1])
    c = max([f[1] for f in forms] + [largest, 1]) + 1
    variables = n + 1
    return -float(variables * d ** variables * math.log10(3 * d * c)) - math.log10(lcm)


def _separation(chosen, rest, accounting):
    """Root separation for every equation outside the square subsystem: (proved, digits needed, note)."""
    exponents = [separation_exponent(chosen, g) for g in rest]
    mp = mpmath.mp
    proved = all(upper == 0 or mp.log10(upper) < e for upper, e in zip(accounting.uppers, exponents))
    worst = min(exponents)
    if proved:
        return True, None, (f"exact: the box holds a regular zero of the rational square subsystem and every other "
                            f"equation stays below its root-separation bound (the smallest 10^{worst:.0f}) over the "
                            "box, so each vanishes there exactly (Canny's gap theorem)")
    # the bounds over a box of radius 10^-(D - 3) shrink like it: D a little past the bound's exponent
    needed = int(math.ceil(-worst)) + 12 if math.isfinite(worst) else None
    return False, needed, (f"root separation would need every other equation below 10^{worst:.0f} over the box "
                           f"(about {needed} digits)")
