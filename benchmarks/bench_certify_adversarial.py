"""Adversarial certification corpus: every certificate numag issues, checked independently.

Run:  python benchmarks/bench_certify_adversarial.py [--quick] [--digits D] [--seed S] [--workers N] [--json FILE]

Families (each instance a system, a point and a claim; the truth of each instance is exact):

* ``badly scaled``: square systems with known solutions, variables rescaled by 10^-6 .. 10^6 (mm and km)
  and equations by 10^-12 .. 10^12; points given to 1e-14 .. 1e-7, and some 1e-2 off (no zero there);
* ``multiple roots``: double and triple roots (tangencies, x^2 = y^2 = 0, the 1e-8 x^2 + 1e8 y^2 = 2,
  x y = 1 family), rescaled, with their multiplicity reported wrong half of the time;
* ``at infinity``: points of the hyperplane at infinity of affine square systems, true ones and
  fake ones (the top-degree forms do not vanish there);
* ``near misses``: singular points of plane curves moved by 1e-6, 1e-10, 1e-14; smooth points within
  1e-12 of a node; singular points claimed for a nearby system whose coefficients differ in the 15th
  digit (and the other way round);
* ``clusters``: roots 1e-2 .. 1e-8 apart (Wilkinson-like products) and Wilkinson's polynomial of degree 20;
* ``changed units``: the singular points (and smooth points, and the rank of J) of the shared problems
  after x_j -> 10^k_j x_j;
* ``wrong claims``: smooth claimed at singular points, singular at smooth points, codimension 0 or 2 on
  curves (what a tampered report would say).

The truth: solutions and singular points from sympy's exact solver on the (unscaled) systems, moved
exactly by the change of units; for the perturbed Wilkinson polynomial, its roots by mpmath at the
checking precision. Each certificate is checked at twice its digits (+10) with mpmath, never with
numag's arithmetic. A certificate is false when

* certified (exact): no exact point of the claim lies in the box;
* certified (numerical): no exact point lies in the box and Gauss-Newton at twice the digits finds no
  point of the box where every equation of the claim is below the certificate's threshold relative to
  the size of its terms;
* certified smooth: the box holds a singular point, or no point of X where rank J >= c;
* certified rank: the exact point has another rank (rank_upper), or sigma_rank_lower(J) = 0 there;
* refuted: an exact point of the claim lies in the refuted box (for smooth claims: the refutation
  names a codimension that is the true one, or Gauss-Newton finds a point of X in the box);
* a claim check says "proved" or "numerical" while the truth differs (counted apart: claim errors).

Printed per family: certificates issued, certified (exact), refuted, undecided, false, claim errors,
seconds per certificate; then the reasons of the undecided ones. Goal (issue 16): 0 false over at
least 10,000 certificates (the full run).
"""

import argparse
import collections
from dataclasses import dataclass, field
import itertools
import json
import pathlib
import sys
import time

import mpmath
import numpy as np
import sympy

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.certify.certificates import (certify_rank, certify_regular_zero, certify_singular_point,
                                        certify_smooth_point)
from numag.certify.records import CertifyOptions
from numag.system.display import counted
from numag.system.parse import parse_polynomial, parse_system

PROBLEMS = pathlib.Path(__file__).resolve().parent.parent / "tests" / "data" / "problems.json"
FAMILIES = ("badly scaled", "multiple roots", "at infinity", "near misses", "clusters", "changed units",
            "wrong claims")


# --- exact polynomials for the checker (sympy built term by term; numag never evaluates them) -----------

def to_sympy(polynomial, symbols):
    """A numag polynomial as a sympy expression, term by term from its exact coefficients."""
    total = sympy.Integer(0)
    for row, c in zip(polynomial.exponents, polynomial.coefficients):
        value = sum((sympy.Rational(re.numerator, re.denominator) + sympy.I * sympy.Rational(im.numerator,
                                                                                             im.denominator))
                    * sympy.sqrt(r) for r, (re, im) in c.parts.items())
        total += value * sympy.Mul(*[s ** int(e) for s, e in zip(symbols, row)])
    return total


def to_text(expression, symbols):
    """A polynomial sympy expression as text of numag's grammar (exact coefficients)."""
    poly = sympy.Poly(sympy.expand(expression), *symbols)
    terms = []
    for monomial, coefficient in poly.terms():
        factors = [f"{s}^{e}" if e > 1 else str(s) for s, e in zip(symbols, monomial) if e]
        terms.append(f"({sympy.sstr(coefficient)})" + "".join("*" + f for f in factors))
    return " + ".join(terms) if terms else "0"


class MPoly:
    """A polynomial evaluated in mpmath (value, and the size of its terms sum |c| |x^a|)."""

    def __init__(self, expression, symbols):
        poly = sympy.Poly(sympy.expand(expression), *symbols)
        self.terms = [(tuple(int(e) for e in monomial), coefficient) for monomial, coefficient in poly.terms()]
        self.cache = {}

    def _coefficients(self):
        key = mpmath.mp.prec
        if key not in self.cache:
            self.cache[key] = [(e, mpmath.mpc(complex_parts(c))) for e, c in self.terms]
        return self.cache[key]

    def value(self, x):
        return mpmath.fsum(c * _monomial(x, e) for e, c in self._coefficients())

    def size(self, x):
        return mpmath.fsum(abs(c) * abs(_monomial(x, e)) for e, c in self._coefficients())


def complex_parts(value):
    value = sympy.N(value, mpmath.mp.dps + 5)
    return mpmath.mpc(mpmath.mpf(str(sympy.re(value))), mpmath.mpf(str(sympy.im(value))))


def _monomial(x, exponents):
    result = mpmath.mpc(1)
    for v, e in zip(x, exponents):
        if e:
            result *= v ** e
    return result


def jacobian(polys, symbols):
    return [[MPoly(sympy.diff(p, s), symbols) for s in symbols] for p in polys]


def evaluate_jacobian(rows, x):
    return mpmath.matrix([[entry.value(x) for entry in row] for row in rows])


def gauss_newton(polys, rows, x, iterations=40):
    """Gauss-Newton (minimum-norm steps when underdetermined) in the current mpmath precision."""
    x = list(x)
    tolerance = mpmath.mpf(10) ** (-(mpmath.mp.dps - 8))
    for _ in range(iterations):
        values = mpmath.matrix([p.value(x) for p in polys])
        jac = evaluate_jacobian(rows, x)
        step = minimum_norm_solution(jac, values)
        if step is None:
            break
        x = [a - b for a, b in zip(x, step)]
        if mpmath.norm(step) <= tolerance * (1 + mpmath.norm(mpmath.matrix(x))):
            break
    return x


def minimum_norm_solution(matrix, values):
    """The least-squares step of least norm, by the SVD (singular values below 10^-(dps/2) of the largest
    dropped: Gauss-Newton at a singular zero of an overdetermined system)."""
    try:
        u, s, v = mpmath.svd_c(matrix)
    except (ZeroDivisionError, ValueError):
        return None
    largest = max([abs(x) for x in s] + [mpmath.mpf(0)])
    if largest == 0:
        return None
    cut = largest * mpmath.mpf(10) ** (-(mpmath.mp.dps // 2))
    coefficients = u.H * values
    step = mpmath.matrix(matrix.cols, 1)
    for k in range(len(s)):
        if abs(s[k]) > cut:
            step += v.H[:, k] * (coefficients[k] / s[k])
    return step


def singular_values(matrix):
    if matrix.rows == 0 or matrix.cols == 0:
        return []
    return list(mpmath.svd_c(matrix, compute_uv=False))


# --- cases and their truth ----------------------------------------------------------------------

@dataclass
class Truth:
    """The exact answer of one instance, in its coordinates (homogeneous ones for projective points).

    ``points``: every point where the claim's equations vanish (complete: a certified box without one
    of them is false), as mpmath values at the checking precision; None where sympy cannot give them
    (Barth's sextic, a union of quadrics): then Gauss-Newton at twice the digits on the claim's equations
    must find a zero of all of them in the box. ``singular``: singular points of X
    (smooth claims). ``codimension``: that of X. ``multiplicity``: per point (regular-zero claims).
    ``line``: for a positive-dimensional truth set, a test whether a box meets it.
    """

    points: list = field(default_factory=list)
    singular: list = field(default_factory=list)
    codimension: object = None
    multiplicities: list = field(default_factory=list)
    line: object = None


@dataclass
class Case:
    family: str
    label: str
    claim: str                  # "regular", "infinity", "singular", "smooth" or "rank"
    system: object
    symbols: list
    polys: list                 # sympy expressions of F in ``symbols``
    point: np.ndarray
    truth: Truth
    codimension: object = None
    multiplicity: object = None
    moved_from: object = None   # a point a certified box must not hold (the moved place of a near miss)
    slices: int = 0             # a witness point of a positive-dimensional singular component


def certify(case, options):
    if case.claim in ("regular", "infinity"):
        return certify_regular_zero(case.system, case.point, options, at_infinity=case.claim == "infinity",
                                    multiplicity=case.multiplicity)
    if case.claim == "singular":
        return certify_singular_point(case.system, case.point, case.codimension, options, slices=case.slices)
    if case.claim == "smooth":
        return certify_smooth_point(case.system, case.point, case.codimension, options)
    return certify_rank(case.system, case.point, options)


def claim_equations(case, certificate):
    """The claim's equations as sympy expressions, and the symbols they are in (homogeneous for charts)."""
    symbols, polys = list(case.symbols), list(case.polys)
    if case.claim == "infinity":
        w = sympy.Symbol("w_")
        symbols = [w] + symbols
        polys = [sympy.expand(w ** sympy.Poly(p, *case.symbols).total_degree()
                              * p.subs({s: s / w for s in case.symbols}, simultaneous=True)) for p in polys]
    size = None
    if case.claim == "singular":
        size = case.codimension
    elif case.claim == "rank" and certificate.rank_upper is not None:
        size = certificate.rank_upper + 1
    if size:
        affine_symbols = symbols
        matrix = sympy.Matrix([[sympy.diff(p, s) for s in affine_symbols] for p in polys])
        minors = []
        if size <= min(matrix.shape):
            for r in itertools.combinations(range(matrix.rows), size):
                for c in itertools.combinations(range(matrix.cols), size):
                    minors.append(sympy.expand(matrix.extract(list(r), list(c)).det()))
        polys = polys + [m for m in minors if m != 0]
    return symbols, polys


# --- the checker ------------------------------------------------------------------------------------

def box_of(certificate, digits):
    with mpmath.workdps(digits):
        center = [parse_center(t) for t in certificate.center_text]
    return center, [mpmath.mpf(r) for r in certificate.radii]


def parse_center(text):
    text = text.replace(" ", "")
    if text.endswith("*I"):
        body = text[:-2]
        cut = max(body.rfind("+", 1), body.rfind("-", 1))
        while cut > 0 and body[cut - 1] in "eE":
            cut = max(body.rfind("+", 1, cut), body.rfind("-", 1, cut))
        return mpmath.mpc(mpmath.mpf(body[:cut]), mpmath.mpf(body[cut:]))
    return mpmath.mpc(mpmath.mpf(text), 0)


def normalised(point, chart):
    if chart is None:
        return list(point)
    if abs(point[chart]) < mpmath.mpf(10) ** (-(mpmath.mp.dps - 10)):
        return None
    return [v / point[chart] for v in point]


def inside(point, center, radii):
    if point is None or len(point) != len(center):
        return False
    slack = mpmath.mpf(10) ** (-(mpmath.mp.dps - 10))
    for v, c, r in zip(point, center, radii):
        pad = r + slack * (1 + abs(v))
        if abs(v.real - c.real) > pad or abs(v.imag - c.imag) > pad:
            return False
    return True


def truth_in_box(case, certificate, center, radii, points):
    return [p for p in points if inside(normalised(p, certificate.chart), center, radii)]


def chart_functions(case, certificate, polys, symbols):
    """The polynomials with the exact coordinates of the box (chart = 1, proved zeros = 0) substituted."""
    fixed = {}
    if certificate.chart is not None:
        fixed[symbols[certificate.chart]] = 1
    for j in certificate.zero_coordinates:
        fixed[symbols[j]] = 0
    free = [s for s in symbols if s not in fixed]
    substituted = [sympy.expand(p.subs(fixed)) for p in polys]
    return [p for p in substituted if p != 0], free, [j for j, s in enumerate(symbols) if s not in fixed]


def backward_holds(case, certificate, center, radii, threshold=None):
    """A point of the box where every equation of the claim is below the threshold (the certificate's, by
    default), relative to the size of its terms."""
    symbols, polys = claim_equations(case, certificate)
    functions, free, positions = chart_functions(case, certificate, polys, symbols)
    if any(sympy.Poly(p, *free).is_ground for p in functions):  # a nonzero constant: nothing vanishes
        return False
    mpolys = [MPoly(p, free) for p in functions]
    threshold = mpmath.mpf(certificate.threshold if threshold is None else threshold) * (1 + mpmath.mpf("1e-6"))

    def below(x):
        return all(p.size(x) == 0 and p.value(x) == 0 or abs(p.value(x)) <= threshold * p.size(x) for p in mpolys)

    start = [center[j] for j in positions]
    if below(start):  # the centre is a point of the box
        return True
    x = gauss_newton(mpolys, jacobian(functions, free), start) if free else []
    full = list(center)
    for j, v in zip(positions, x):
        full[j] = v
    return inside(full, center, radii) and below(x)


def exact_point_holds(case, certificate, center, radii):
    """For recognised coordinates in the coefficient field: whether every equation of the claim vanishes there
    (sympy, exactly) and the point lies in the box; None when there are none to check this way."""
    if certificate.exact_coordinates is None or certificate.minimal_polynomial is not None:
        return None
    values = [to_sympy(parse_polynomial(text, []), []) for text in certificate.exact_coordinates]
    point = [mpmath.mpc(complex_parts(v)) for v in values]
    if not inside(point, center, radii):
        return False
    symbols, polys = claim_equations(case, certificate)
    substitution = dict(zip(symbols, values))
    return all(sympy.simplify(sympy.expand(p.subs(substitution))) == 0 for p in polys)


def normwise_zero_in_box(case, certificate, center, radii):
    """Gauss-Newton at twice the digits from the centre: a point of the box where every equation of the claim
    is below 10^-(digits - 20) of its coefficients' size times max(1, |x|)^degree."""
    symbols, polys = claim_equations(case, certificate)
    functions, free, positions = chart_functions(case, certificate, polys, symbols)
    mpolys = [MPoly(p, free) for p in functions]
    x = gauss_newton(mpolys, jacobian(functions, free), [center[j] for j in positions]) if free else []
    full = list(center)
    for j, v in zip(positions, x):
        full[j] = v
    if not inside(full, center, radii):
        return False
    tiny = mpmath.mpf(10) ** (-(mpmath.mp.dps - 20))
    size = max([abs(v) for v in x] + [mpmath.mpf(1)])
    for p in mpolys:
        natural = mpmath.fsum(abs(c) for _, c in p._coefficients()) * size ** max((sum(e) for e, _ in p.terms),
                                                                                 default=0)
        if abs(p.value(x)) > tiny * natural:
            return False
    return True


def point_of_x_in_box(case, certificate, center, radii):
    """A point of X in the box, by Newton at twice the digits (or None).

    First Newton in the m widest coordinates of the box with the others held at the centre (a box may be a
    thin slab, which a least-norm step would leave), then least-norm Gauss-Newton in all of them.
    """
    symbols = list(case.symbols)
    functions, free, positions = chart_functions(case, certificate, list(case.polys), symbols)
    if not free:
        return None
    mpolys = [MPoly(p, free) for p in functions]
    rows = jacobian(functions, free)
    start = [center[j] for j in positions]
    tries = []
    if len(functions) < len(free):
        widest = sorted(range(len(free)), key=lambda k: -radii[positions[k]])[:len(functions)]
        held = {free[k]: start[k] for k in range(len(free)) if k not in widest}
        moving = [free[k] for k in widest]
        reduced = [MPoly(sympy.expand(p.subs(held)), moving) if held else MPoly(p, moving) for p in functions]
        solved = gauss_newton(reduced, jacobian([sympy.expand(p.subs(held)) for p in functions], moving),
                              [start[k] for k in widest])
        x = list(start)
        for k, v in zip(widest, solved):
            x[k] = v
        tries.append(x)
    tries.append(gauss_newton(mpolys, rows, start))
    for x in tries:
        full = list(center)
        for j, v in zip(positions, x):
            full[j] = v
        if not inside(full, center, radii):
            continue
        if any(abs(p.value(x)) > mpmath.mpf(10) ** (-(mpmath.mp.dps // 2)) * (1 + p.size(x)) for p in mpolys):
            continue
        return x, rows
    return None


def rank_at(rows, x, c):
    values = singular_values(evaluate_jacobian(rows, x))
    scale = max([abs(v) for v in values] + [mpmath.mpf(1)])
    tiny = mpmath.mpf(10) ** (-(mpmath.mp.dps // 2)) * scale
    return sum(1 for v in values if abs(v) > tiny)


def check(case, certificate):
    """('true' | 'false' | 'open', why, claim errors) for one certificate."""
    errors = claim_errors(case, certificate)
    if certificate.status == "undecided":
        return "open", certificate.reason, errors
    digits = 2 * certificate.digits + 10
    with mpmath.workdps(digits):
        if certificate.radii is None:  # a refutation of a claim, without a box
            if certificate.status == "refuted" and any(k.status == "refuted" for k in certificate.claim_checks):
                return check_refuted(case, certificate, None, None) + (errors,)
            return "false", "a certificate without a box", errors
        center, radii = box_of(certificate, digits)
        if certificate.status == "refuted":
            return check_refuted(case, certificate, center, radii) + (errors,)
        if case.moved_from is not None and inside([mpmath.mpc(complex(v)) for v in case.moved_from],
                                                  center, radii):
            return "false", "the certified box holds the moved point", errors
        if case.claim == "smooth":
            return check_smooth(case, certificate, center, radii) + (errors,)
        if case.claim == "rank":
            return check_rank(case, certificate, center, radii) + (errors,)
        if case.truth.points is None:  # no exact truth: the exact coordinates by sympy, or mpmath
            exact = exact_point_holds(case, certificate, center, radii)
            if exact is not None:
                return ("true", "exact coordinates checked by sympy", errors) if exact else \
                    ("false", "the exact coordinates are no zero of the claim (sympy)", errors)
            if normwise_zero_in_box(case, certificate, center, radii):
                return "true", "a zero of every equation to twice the digits (no exact truth)", errors
            return "false", "Gauss-Newton at twice the digits finds no zero of the claim in the box", errors
        if truth_in_box(case, certificate, center, radii, case.truth.points) or (
                case.truth.line is not None and case.truth.line(center, radii)):
            return "true", "", errors
        if certificate.kind == "exact":
            return "false", "an exact certificate without an exact point in its box", errors
        if backward_holds(case, certificate, center, radii):
            return "true", "backward error only (no exact point in the box)", errors
        return "false", "no point of the box has every equation below the threshold", errors


def check_refuted(case, certificate, center, radii):
    if case.claim in ("smooth", "singular") and any(k.name == "codimension" and k.status == "refuted"
                                                     for k in certificate.claim_checks):
        truth = case.truth.codimension
        reported = case.codimension
        return ("false", "refuted a true codimension") if truth == reported else ("true", "")
    if case.claim == "smooth":
        found = point_of_x_in_box(case, certificate, center, radii)
        if found is not None and not any(inside(normalised(s, certificate.chart), center, radii)
                                         for s in case.truth.singular):
            return "false", "refuted, but the box holds a smooth point of X"
        return "true", ""
    if case.truth.points is None:
        if backward_holds(case, certificate, center, radii, mpmath.mpf(10) ** (-(mpmath.mp.dps - 20))):
            return "false", "refuted, but Gauss-Newton at twice the digits finds a zero in the box"
        return "true", ""
    if truth_in_box(case, certificate, center, radii, case.truth.points):
        return "false", "refuted, but an exact point of the claim lies in the box"
    if case.truth.line is not None and case.truth.line(center, radii):
        return "false", "refuted, but the truth set meets the box"
    return "true", ""


def check_smooth(case, certificate, center, radii):
    if any(inside(normalised(s, certificate.chart), center, radii) for s in case.truth.singular):
        return "false", "a smooth certificate whose box holds a singular point"
    if case.truth.codimension is not None and case.truth.codimension != case.codimension:
        return "false", "a smooth certificate for a wrong codimension"
    found = point_of_x_in_box(case, certificate, center, radii)
    if found is None:
        return "false", "no point of X found in the box"
    x, rows = found
    if rank_at(rows, x, case.codimension) < case.codimension:
        return "false", "rank J below the codimension at the point of X in the box"
    return "true", ""


def check_rank(case, certificate, center, radii):
    found = truth_in_box(case, certificate, center, radii, case.truth.singular)
    rows_polys = list(case.polys)
    if certificate.rank_upper is not None and certificate.rank_upper < min(len(rows_polys), len(case.symbols)):
        if not found:
            return "false", "a rank drop certified without a singular point in the box"
        point = found[0]
        symbols, _ = claim_equations(case, certificate)
        functions, free, positions = chart_functions(case, certificate, list(case.polys), list(case.symbols))
        rows = jacobian(functions, free)
        x = [normalised(point, certificate.chart)[j] for j in positions]
        if rank_at(rows, x, certificate.rank_upper) != certificate.rank_upper:
            return "false", "the exact point has another rank"
        return "true", ""
    located = point_of_x_in_box(case, certificate, center, radii)
    if located is None:
        return "false", "no point of X in the box of a rank certificate"
    x, rows = located
    if rank_at(rows, x, certificate.rank_lower) < (certificate.rank_lower or 0):
        return "false", "rank below the proved lower bound"
    return "true", ""


def claim_errors(case, certificate):
    errors = []
    for k in certificate.claim_checks:
        if k.name == "multiplicity" and k.status in ("proved", "numerical"):
            true = case.truth.multiplicities[0] if case.truth.multiplicities else None
            if true is not None and k.found != true:
                errors.append(f"multiplicity {k.found} said {k.status}, truth {true}")
        if k.name == "codimension" and k.status in ("proved", "numerical") and case.truth.codimension is not None:
            if k.reported != case.truth.codimension:
                errors.append(f"codimension {k.reported} said {k.status}, truth {case.truth.codimension}")
    return errors


# --- building the corpus -------------------------------------------------------------------------

def mp_of(value, digits):
    with mpmath.workdps(digits):
        return complex_parts(value)


class Base:
    """A system given by sympy expressions, with its exact solutions (and what else a family needs)."""

    def __init__(self, texts, names, digits, projective=False):
        self.names = list(names)
        self.symbols = sympy.symbols(names)
        self.digits = digits
        system = parse_system(texts, names, projective=projective)
        self.polys = [to_sympy(p, self.symbols) for p in system.polynomials]
        self.projective = projective

    def solutions(self, polys=None):
        polys = self.polys if polys is None else polys
        found = sympy.solve(polys, self.symbols, dict=True)
        return [tuple(mp_of(s[v] if v in s else v, self.digits) for v in self.symbols) for s in found
                if all(v in s for v in self.symbols)]

    def singular_points(self):
        partials = [sympy.diff(self.polys[0], s) for s in self.symbols]
        return self.solutions(self.polys + partials)


def scaled_case_system(polys, symbols, exponents, factors, names):
    """F_i(10^k * u) * 10^r_i as a numag system in u (exact), with the sympy expressions in u."""
    substitution = {s: sympy.Integer(10) ** k * s for s, k in zip(symbols, exponents)}
    scaled = [sympy.expand(p.subs(substitution, simultaneous=True) * sympy.Integer(10) ** r)
              for p, r in zip(polys, factors)]
    return parse_system([to_text(p, symbols) for p in scaled], names), scaled


def scale_point(point, exponents, digits, homogeneous_offset=0):
    with mpmath.workdps(digits):
        return tuple(v / mpmath.mpf(10) ** exponents[j - homogeneous_offset] if j >= homogeneous_offset else v
                     for j, v in enumerate(point))


def given(point, noise, rng):
    """The point in double precision, each coordinate moved by a relative ``noise`` (of its own size, at least
    1e-6 of the largest) in a random complex direction."""
    z = np.array([complex(v) for v in point])
    direction = rng.standard_normal(len(z)) + 1j * rng.standard_normal(len(z))
    size = np.maximum(np.abs(z), 1e-6 * np.abs(z).max())
    return z + noise * size * direction / np.abs(direction)


def moved(point, delta, rng):
    """The point in double precision moved by ``delta`` (1 + its size) in a random complex direction."""
    z = np.array([complex(v) for v in point])
    direction = rng.standard_normal(len(z)) + 1j * rng.standard_normal(len(z))
    return z + delta * (1 + np.abs(z).max()) * direction / np.linalg.norm(direction)


def badly_scaled(count, digits, rng):
    bases = [(["x^2 + y^2 - 5", "x*y - 2"], ["x", "y"]), (["x^2 - 2", "y^2 - 3"], ["x", "y"]),
             (["x^2 - 1", "y^2 - 4", "z - x*y"], ["x", "y", "z"]), (["x^2 + y^2 + 1", "x - 2*y"], ["x", "y"]),
             (["x^2 - x*y + 1/3", "y^2 - 7/4"], ["x", "y"])]
    prepared = [(Base(t, n, digits), t, n) for t, n in bases]
    prepared = [(b, b.solutions()) for b, _, _ in prepared]
    cases = []
    for turn in itertools.count():  # every base in turn, until there are enough cases
        if len(cases) >= count:
            break
        base, solutions = prepared[turn % len(prepared)]
        exponents = [int(k) for k in rng.integers(-6, 7, size=len(base.symbols))]
        factors = [int(r) for r in rng.integers(-12, 13, size=len(base.polys))]
        system, polys = scaled_case_system(base.polys, base.symbols, exponents, factors, base.names)
        truth = Truth([scale_point(s, exponents, digits) for s in solutions], multiplicities=[1])
        for s in truth.points:
            noise = float(rng.choice([0.0, 1e-14, 1e-10, 1e-7, 1e-2]))
            label = f"10^{exponents} eq 10^{factors}, noise {noise:g}"
            cases.append(Case("badly scaled", label, "regular", system, base.symbols, polys, given(s, noise, rng),
                              truth, multiplicity=1))
    return cases[:count]


def multiple_roots(count, digits, rng):
    bases = [(["y - x^2", "y - 2*x + 1"], [2]), (["x^2 + y^2 - 1", "y - 1"], [2]), (["y - x^3", "y"], [3]),
             (["y - (x - 1)^3", "y"], [3]), (["x^2 - 2*x*y + y^2", "x + y - 2"], [2]), (["x^2", "y^2"], [4]),
             (["(x - 1)^2*(x + 2)", "y - x"], None)]
    for k in (1, 2, 4):
        a = 10 ** k
        bases.append(([f"1/{a * a}*x^2 + {a * a}*y^2 - 2", "x*y - 1"], [2]))
    prepared = []
    for texts, multiplicities in bases:
        base = Base(texts, ["x", "y"], digits)
        solutions = base.solutions()
        if multiplicities is None:  # (x - 1)^2 (x + 2): double at (1, 1), simple at (-2, -2)
            multiplicities = [2 if abs(s[0] - 1) < 1e-9 else 1 for s in solutions]
        else:
            multiplicities = multiplicities * len(solutions)
        prepared.append((base, solutions, multiplicities))
    cases = []
    for turn in itertools.count():  # every base in turn, until there are enough cases
        if len(cases) >= count:
            break
        base, solutions, multiplicities = prepared[turn % len(prepared)]
        exponents = [int(k) for k in rng.integers(-4, 5, size=2)]
        factors = [int(r) for r in rng.integers(-8, 9, size=len(base.polys))]
        system, polys = scaled_case_system(base.polys, base.symbols, exponents, factors, base.names)
        points = [scale_point(s, exponents, digits) for s in solutions]
        for s, m in zip(points, multiplicities):
            reported = m if rng.random() < 0.5 else int(rng.integers(1, 5))
            noise = float(rng.choice([0.0, 1e-14, 1e-9]))
            truth = Truth(points, multiplicities=[m])
            cases.append(Case("multiple roots", f"multiplicity {m}, reported {reported}, 10^{exponents}", "regular",
                              system, base.symbols, polys, given(s, noise, rng), truth, multiplicity=reported))
    return cases[:count]


def _projective_zeros(polys, symbols, digits):
    """Zeros of homogeneous polynomials in projective space (each chart solved by sympy), deduplicated."""
    found = []
    for k in range(len(symbols)):
        fixed = {symbols[k]: 1}
        for j in range(k):
            fixed[symbols[j]] = 0  # points with an earlier nonzero coordinate were found in that chart
        rest = [s for s in symbols if s not in fixed]
        equations = [sympy.expand(p.subs(fixed)) for p in polys]
        if any(e.is_number and e != 0 for e in equations):
            continue
        equations = [e for e in equations if e != 0]
        solutions = sympy.solve(equations, rest, dict=True) if equations else [{}]
        for s in solutions:
            if all(v in s for v in rest) or not rest:
                found.append(tuple(mp_of(fixed.get(v, s.get(v)), digits) for v in symbols))
    return found


def at_infinity(count, digits, rng):
    bases = [(["x^2 - y^2 - 1", "x - y - 1"], ["x", "y"]), (["x*y - 1", "x*y - x + 1"], ["x", "y"]),
             (["x^2 + 2*x*y + y^2 + x", "x + y + 3"], ["x", "y"]),
             (["1/100000000*x^2 + 100000000*y^2 - 2", "x*y - 1"], ["x", "y"]),
             (["x*y - z", "x*z - 1", "y - 1"], ["x", "y", "z"])]
    prepared = []
    for texts, names in bases:
        base = Base(texts, names, digits)
        top = [sympy.Poly(p, *base.symbols) for p in base.polys]
        forms = [sum((c * sympy.Mul(*[s ** e for s, e in zip(base.symbols, m)])
                      for m, c in t.terms() if sum(m) == t.total_degree()), sympy.Integer(0)) for t in top]
        zeros = [(mpmath.mpc(0),) + z for z in _projective_zeros(forms, list(base.symbols), digits)]
        prepared.append((base, zeros))
    cases = []
    for turn in itertools.count():  # every base in turn, until there are enough cases
        if len(cases) >= count:
            break
        base, zeros = prepared[turn % len(prepared)]
        exponents = [int(k) for k in rng.integers(-3, 4, size=len(base.symbols))]
        factors = [int(r) for r in rng.integers(-6, 7, size=len(base.polys))]
        system, polys = scaled_case_system(base.polys, base.symbols, exponents, factors, base.names)
        points = [scale_point(z, exponents, digits, homogeneous_offset=1) for z in zeros]
        truth = Truth(points)
        for z in points:
            start = given(z, float(rng.choice([0.0, 1e-12, 1e-8])), rng)
            cases.append(Case("at infinity", f"true point, 10^{exponents}", "infinity", system, base.symbols, polys,
                              start, truth))
        fake = np.concatenate([[0.0], rng.integers(-3, 4, size=len(base.symbols)).astype(float)])
        if np.any(fake[1:]):
            cases.append(Case("at infinity", "fake point", "infinity", system, base.symbols, polys,
                              fake.astype(complex), truth))
    return cases[:count]


CURVES = ["node", "cusp", "tacnode", "four_generic_lines", "chebyshev_T4x_eq_T5y", "trifolium_triple_point"]


def load_problems():
    return {p["name"]: p for p in json.loads(PROBLEMS.read_text())}


def near_misses(count, digits, rng):
    problems = load_problems()
    curves = []
    for name in CURVES:
        base = Base(problems[name]["equations"], problems[name]["variables"], digits)
        curves.append((name, base, base.singular_points()))
    # smooth points within 1e-12 of the node of y^2 = x^2 (x + 1): x = t^2 - 1, y = t (t^2 - 1), t = 1 + eps
    node = Base(["y^2 - x^2*(x + 1)"], ["x", "y"], digits)
    # nearby systems: a coefficient changed in the 15th digit
    nearby = []
    for name in ("node", "four_generic_lines", "chebyshev_T4x_eq_T5y"):
        base = Base(problems[name]["equations"], problems[name]["variables"], digits)
        poly = sympy.Poly(base.polys[0], *base.symbols)
        terms = poly.terms()
        for index in range(min(3, len(terms))):
            monomial, coefficient = terms[index]
            shifted = base.polys[0] + coefficient * sympy.Rational(1, 10 ** 15) * sympy.Mul(
                *[s ** e for s, e in zip(base.symbols, monomial)])
            texts = [to_text(shifted, base.symbols)]
            other = Base(texts, base.names, digits)
            nearby.append((name, base, other, base.singular_points(), other.singular_points()))
    cases = []
    kind = 0
    while len(cases) < count:
        kind += 1
        if kind % 3 == 1:
            name, base, singular = curves[(kind // 3) % len(curves)]
            exponents = [int(k) for k in rng.integers(-3, 4, size=2)]
            system, polys = scaled_case_system(base.polys, base.symbols, exponents, [0], base.names)
            points = [scale_point(s, exponents, digits) for s in singular]
            for s in points:
                for delta in (1e-6, 1e-10, 1e-14):
                    start = moved(s, delta, rng)
                    cases.append(Case("near misses", f"{name} singular point moved {delta:g}", "singular", system,
                                      base.symbols, polys, start, Truth(points, codimension=1), codimension=1,
                                      moved_from=start))
        elif kind % 3 == 2:
            eps = sympy.Rational(int(rng.integers(1, 10)), 10 ** 12) * int(rng.choice([-1, 1]))
            t = 1 + eps if rng.random() < 0.5 else -1 + eps
            exact = (t ** 2 - 1, t * (t ** 2 - 1))
            point = tuple(mp_of(v, digits) for v in exact)
            origin = (mpmath.mpc(0), mpmath.mpc(0))
            cases.append(Case("near misses", "smooth point 1e-12 from a node", "smooth", system_of(node),
                              node.symbols, node.polys, np.array([complex(v) for v in point]),
                              Truth(singular=[origin], codimension=1), codimension=1))
            cases.append(Case("near misses", "rank 1e-12 from a node", "rank", system_of(node), node.symbols,
                              node.polys, np.array([complex(v) for v in point]),
                              Truth(singular=[origin], codimension=1)))
        else:
            name, base, other, singular, singular_other = nearby[(kind // 3) % len(nearby)]
            for s in singular:  # F's singular points claimed for the nearby system
                cases.append(Case("near misses", f"{name}: singular point of F claimed for F + 1e-15",
                                  "singular", system_of(other), other.symbols, other.polys,
                                  given(s, 0.0, rng), Truth(singular_other, codimension=1), codimension=1))
            for s in singular_other:  # and the other way round
                cases.append(Case("near misses", f"{name}: singular point of F + 1e-15 claimed for F",
                                  "singular", system_of(base), base.symbols, base.polys, given(s, 0.0, rng),
                                  Truth(singular, codimension=1), codimension=1))
    return cases[:count]


_SYSTEMS = {}


def system_of(base):
    if id(base) not in _SYSTEMS:
        _SYSTEMS[id(base)] = (base, parse_system([to_text(p, base.symbols) for p in base.polys], base.names,
                                                 projective=base.projective))
    return _SYSTEMS[id(base)][1]


def clusters(count, digits, rng):
    groups = []
    for gap in ("1/100", "1/10000", "1/1000000", "1/100000000"):
        for size in (3, 5, 8):
            factors = "*".join(f"(x - 1 - {k}*{gap})" for k in range(size))
            groups.append(([factors, "y - x"], f"{size} roots {gap} apart"))
    wilkinson = "*".join(f"(x - {k})" for k in range(1, 21))
    groups.append(([wilkinson, "y - x"], "Wilkinson, degree 20"))
    # Wilkinson's perturbation: the coefficient of x^19 lowered by 2^-23 (ten roots turn complex)
    groups.append(([wilkinson + " - 1/8388608*x^19", "y - x"], "Wilkinson, x^19 - 2^-23"))
    prepared = []
    for texts, label in groups:
        base = Base(texts, ["x", "y"], digits)
        x = base.symbols[0]
        univariate = sympy.Poly(base.polys[0], x)
        if "2^-23" in label:  # no closed form: mpmath's polynomial roots at the checking precision
            with mpmath.workdps(digits):
                coefficients = [complex_parts(c) for c in univariate.all_coeffs()]
                roots = mpmath.polyroots(coefficients, maxsteps=400, extraprec=4 * digits)
            points = [(r, r) for r in roots]
        else:
            points = [(mp_of(r, digits), mp_of(r, digits)) for r in univariate.all_roots()]
        prepared.append((base, points, label))
    cases = []
    for turn in itertools.count():  # every base in turn, until there are enough cases
        if len(cases) >= count:
            break
        base, points, label = prepared[turn % len(prepared)]
        system = system_of(base)
        for s in points:
            noise = float(rng.choice([0.0, 1e-15, 1e-12]))
            cases.append(Case("clusters", label, "regular", system, base.symbols, base.polys, given(s, noise, rng),
                              Truth(points, multiplicities=[1]), multiplicity=1))
    return cases[:count]


def changed_units(count, digits, rng, names=None):
    problems = load_problems()
    names = names or ["cusp", "node", "tacnode", "four_generic_lines", "chebyshev_T4x_eq_T5y",
                      "trifolium_triple_point", "cone_over_smooth_plane_cubic", "cayley_cubic",
                      "affine_cone_over_twisted_cubic", "whitney_umbrella", "kummer_quartic_mu2_eq_2",
                      "smooth_conic", "barth_sextic_exact", "two_quadrics_union"]
    prepared, found = [], {}
    for name in names:
        entry = problems[name]
        base = Base(entry["equations"], entry["variables"], digits, projective=entry["projective"])
        codimension = entry.get("codim", 1) if len(base.polys) > 1 else 1
        if name in ("barth_sextic_exact", "two_quadrics_union"):
            found[name] = numag_singular_points(system_of(base))
        if name == "affine_cone_over_twisted_cubic":
            singular = [tuple(mpmath.mpc(0) for _ in base.symbols)]
        elif name in ("whitney_umbrella", "smooth_conic"):
            singular = []
        elif name in ("barth_sextic_exact", "two_quadrics_union"):
            singular = None  # no exact truth (sympy does not finish): checked at twice the digits instead
        elif entry["projective"]:
            partials = [sympy.diff(base.polys[0], s) for s in base.symbols]
            singular = _projective_zeros(partials, list(base.symbols), digits)
        else:
            singular = base.singular_points()
        smooth = smooth_points(base, rng, digits) if len(base.polys) == 1 and singular is not None else []
        prepared.append((name, base, codimension, singular, smooth))
    cases = []
    for turn in itertools.count():  # every base in turn, until there are enough cases
        if len(cases) >= count:
            break
        name, base, codimension, singular, smooth = prepared[turn % len(prepared)]
        exponents = [int(k) for k in rng.integers(-3, 4, size=len(base.symbols))]
        system, polys = scaled_case_system(base.polys, base.symbols, exponents, [0] * len(base.polys), base.names)
        if base.projective:
            system = parse_system([to_text(p, base.symbols) for p in polys], base.names, projective=True)
        if singular is None:  # the points to certify from numag itself; the check does not use numag
            cases.extend(found_by_numag(name, system, base, polys, exponents, found[name]))
            continue
        points = [scale_point(s, exponents, digits) for s in singular]
        line = None
        if name == "whitney_umbrella":  # x^2 = y^2 z: singular along the line x = y = 0
            line = (lambda center, radii: all(abs(center[j].real) <= radii[j] and abs(center[j].imag) <= radii[j]
                                              for j in (0, 1)))
            z = float(rng.uniform(0.5, 2.0)) / 10 ** exponents[2]
            cases.append(Case("changed units", f"{name} 10^{exponents}", "singular", system, base.symbols, polys,
                              np.array([0, 0, z], dtype=complex), Truth([], codimension=1, line=line),
                              codimension=1))
        for s in points:
            cases.append(Case("changed units", f"{name} 10^{exponents}", "singular", system, base.symbols, polys,
                              given(s, 1e-13, rng), Truth(points, codimension=codimension), codimension=codimension))
            if len(base.polys) == 1 and not base.projective:
                cases.append(Case("changed units", f"{name} rank at a singular point", "rank", system, base.symbols,
                                  polys, given(s, 0.0, rng), Truth(singular=points, codimension=1)))
        for s in smooth[:2]:
            p = scale_point(s, exponents, digits)
            cases.append(Case("changed units", f"{name} smooth point 10^{exponents}", "smooth", system,
                              base.symbols, polys, given(p, 0.0, rng), Truth(singular=points, codimension=1),
                              codimension=1))
    return cases[:count]


def numag_singular_points(system):
    """(point, dimension, codimension) of the singular locus numag finds (in the original units)."""
    from numag.singular.locus import singular_locus
    locus = singular_locus(system, seed=1)
    return [(np.asarray(point, dtype=complex), c.dimension, c.codimension) for c in locus.components
            if c.kind == "singular" and not c.at_infinity for point in c.points[:2]]


def found_by_numag(name, system, base, polys, exponents, points):
    """Singular points of a problem without exact truth, as numag's singular locus finds them in the original
    units, moved to the new ones (the given points); each certificate is checked by Gauss-Newton at twice
    the digits on the claim's equations, without numag."""
    cases = []
    for point, dimension, codimension in points:
        scaled = point / 10.0 ** np.asarray(exponents, dtype=float)
        cases.append(Case("changed units", f"{name} 10^{exponents} (dimension {dimension})", "singular", system,
                          base.symbols, polys, scaled, Truth(None, codimension=codimension),
                          codimension=codimension, slices=dimension))
    return cases


def smooth_points(base, rng, digits, count=4):
    """Points of a hypersurface: a random rational value for all coordinates but the last, roots in it."""
    found = []
    symbols = base.symbols
    for _ in range(count):
        values = {s: sympy.Rational(int(rng.integers(-9, 10)), 7) for s in symbols[:-1]}
        if base.projective:
            values[symbols[0]] = sympy.Integer(1)
        univariate = sympy.Poly(base.polys[0].subs(values), symbols[-1])
        if univariate.degree() < 1:
            continue
        with mpmath.workdps(digits):  # exact root objects evaluate far too slowly: Newton in mpmath
            coefficients = [complex_parts(c) for c in univariate.all_coeffs()]
            roots = polished_roots(coefficients)
        for root in roots:
            found.append(tuple(mp_of(values[s], digits) for s in symbols[:-1]) + (root,))
    return found


def polished_roots(coefficients):
    """Simple roots of a univariate polynomial (highest coefficient first): numpy's roots, then Newton in
    mpmath at the current precision; roots where Newton does not settle (multiple ones) are left out."""
    approximate = np.roots([complex(c) for c in coefficients])
    roots = []
    tolerance = mpmath.mpf(10) ** (-(mpmath.mp.dps - 5))
    for z in approximate:
        z = mpmath.mpc(z)
        for _ in range(200):
            value, slope = mpmath.polyval(coefficients, z, derivative=True)
            if slope == 0:
                break
            step = value / slope
            z -= step
            if abs(step) <= tolerance * (1 + abs(z)):
                roots.append(z)
                break
    return roots


def wrong_claims(count, digits, rng):
    problems = load_problems()
    cases = []
    prepared = []
    for name in ("node", "four_generic_lines", "cusp", "chebyshev_T4x_eq_T5y"):
        base = Base(problems[name]["equations"], problems[name]["variables"], digits)
        prepared.append((name, base, base.singular_points(), smooth_points(base, rng, digits)))
    for turn in itertools.count():  # every base in turn, until there are enough cases
        if len(cases) >= count:
            break
        name, base, singular, smooth = prepared[turn % len(prepared)]
        system = system_of(base)
        for s in singular:
            for codimension in (0, 1, 2):
                cases.append(Case("wrong claims", f"{name}: smooth claimed at a singular point, codim {codimension}",
                                  "smooth", system, base.symbols, base.polys, given(s, 0.0, rng),
                                  Truth(singular=singular, codimension=1), codimension=codimension))
        for s in smooth[:3]:
            cases.append(Case("wrong claims", f"{name}: singular claimed at a smooth point", "singular", system,
                              base.symbols, base.polys, given(s, 0.0, rng), Truth(singular, codimension=1),
                              codimension=1))
            cases.append(Case("wrong claims", f"{name}: smooth, codimension 2 claimed", "smooth", system,
                              base.symbols, base.polys, given(s, 0.0, rng), Truth(singular=singular, codimension=1),
                              codimension=2))
            cases.append(Case("wrong claims", f"{name}: off the curve", "smooth", system, base.symbols, base.polys,
                              given(s, 1e-3, rng), Truth(singular=singular, codimension=1), codimension=1))
    return cases[:count]


BUILDERS = {"badly scaled": badly_scaled, "multiple roots": multiple_roots, "at infinity": at_infinity,
            "near misses": near_misses, "clusters": clusters, "changed units": changed_units,
            "wrong claims": wrong_claims}
#: Certificates per family in the full run (the quick run takes a tenth).
SIZES = {"badly scaled": 3000, "multiple roots": 1200, "at infinity": 800, "near misses": 1600, "clusters": 1200,
         "changed units": 1600, "wrong claims": 800}


def build(family, count, digits, seed):
    rng = np.random.default_rng([seed, FAMILIES.index(family)])
    return BUILDERS[family](count, 2 * digits + 40, rng)


@dataclass
class Tally:
    issued: int = 0
    certified: int = 0
    exact: int = 0
    refuted: int = 0
    undecided: int = 0
    false: int = 0
    claim_errors: int = 0
    seconds: float = 0.0
    falsehoods: list = field(default_factory=list)
    reasons: collections.Counter = field(default_factory=collections.Counter)
    digits: collections.Counter = field(default_factory=collections.Counter)


#: What a worker process certifies and checks (set before the pool forks, so cases are never pickled).
_WORK = {}


def _work(indices):
    cases, options = _WORK["cases"], _WORK["options"]
    results = []
    for k in indices:
        started = time.perf_counter()
        certificate = certify(cases[k], options)
        seconds = time.perf_counter() - started
        verdict, why, errors = check(cases[k], certificate)
        results.append((k, str(certificate.status), str(certificate.kind), certificate.digits, certificate.reason,
                        verdict, why, errors, seconds))
    return results


def run_family(family, count, options, seed, progress=None, workers=1):
    cases = build(family, count, options.limit, seed)  # the truth to twice the highest precision used
    tally = Tally()
    _WORK.update(cases=cases, options=options)
    chunks = [list(range(k, min(k + 20, len(cases)))) for k in range(0, len(cases), 20)]
    if workers > 1:
        import multiprocessing
        pool = multiprocessing.get_context("fork").Pool(workers)
        batches = pool.imap_unordered(_work, chunks)
    else:
        pool, batches = None, map(_work, chunks)
    try:
        for batch in batches:
            for k, status, kind, digits, reason, verdict, why, errors, seconds in batch:
                case = cases[k]
                tally.seconds += seconds
                tally.issued += 1
                tally.digits[digits] += 1
                if status == "certified":
                    tally.certified += 1
                    tally.exact += kind == "exact"
                elif status == "refuted":
                    tally.refuted += 1
                else:
                    tally.undecided += 1
                    tally.reasons[short_reason(reason)] += 1
                if verdict == "false":
                    tally.false += 1
                    tally.falsehoods.append(f"{case.label} at {case.point}: {status} {kind}: {why}")
                tally.claim_errors += len(errors)
                tally.falsehoods.extend(f"{case.label}: claim error: {e}" for e in errors)
            if progress is not None:
                progress(f"{family}: {tally.issued} of {len(cases)}")
    finally:
        if pool is not None:
            pool.close()
            pool.join()
    return tally


def short_reason(reason):
    """The reason without its numbers and details, so that alike reasons are counted together."""
    import re
    for marker in (" (", ":", ";"):
        if marker in reason[20:]:
            reason = reason[:20 + reason[20:].index(marker)]
    return re.sub(r"[-+]?\d[\d.e+-]*", "#", reason)[:110]


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="a tenth of the corpus")
    parser.add_argument("--digits", type=int, default=30)
    parser.add_argument("--max-digits", type=int, default=None)
    parser.add_argument("--seed", type=int, default=0)
    parser.add_argument("--families", nargs="*", default=list(FAMILIES))
    parser.add_argument("--workers", type=int, default=1, help="processes certifying in parallel (default 1)")
    parser.add_argument("--json", metavar="FILE", help="write the table and the undecided reasons here")
    args = parser.parse_args(argv)
    options = CertifyOptions(digits=args.digits, max_digits=args.max_digits)
    share = 0.1 if args.quick else 1.0
    print(f"certificates at {args.digits} digits (up to {options.limit}); each checked at twice the digits + 10")
    header = (f"{'family':16s} {'issued':>7s} {'certified':>9s} {'(exact)':>8s} {'refuted':>8s} {'undecided':>9s} "
              f"{'false':>6s} {'claim err':>9s} {'ms/cert':>8s}")
    print(header)
    totals, table = Tally(), {}
    started = time.perf_counter()
    for family in args.families:
        count = max(10, int(SIZES[family] * share))
        tally = run_family(family, count, options, args.seed,
                           progress=lambda text: print(f"  ... {text}", file=sys.stderr), workers=args.workers)
        table[family] = tally
        print(f"{family:16s} {tally.issued:7d} {tally.certified:9d} {tally.exact:8d} {tally.refuted:8d} "
              f"{tally.undecided:9d} {tally.false:6d} {tally.claim_errors:9d} "
              f"{1000 * tally.seconds / max(tally.issued, 1):8.1f}", flush=True)
        for name in ("issued", "certified", "exact", "refuted", "undecided", "false", "claim_errors", "seconds"):
            setattr(totals, name, getattr(totals, name) + getattr(tally, name))
    print(f"{'all':16s} {totals.issued:7d} {totals.certified:9d} {totals.exact:8d} {totals.refuted:8d} "
          f"{totals.undecided:9d} {totals.false:6d} {totals.claim_errors:9d} "
          f"{1000 * totals.seconds / max(totals.issued, 1):8.1f}")
    print(f"wall time {time.perf_counter() - started:.0f} s on {counted(args.workers, 'process', 'processes')} (certification "
          f"{totals.seconds:.0f} s of process time; the rest is building the truth and checking)")
    for family, tally in table.items():
        used = ", ".join(f"{d} digits: {n}" for d, n in sorted(tally.digits.items()))
        print(f"precision in {family}: {used}")
    for family, tally in table.items():
        for line in tally.falsehoods[:20]:
            print(f"FALSE [{family}] {line}")
        if tally.reasons:
            print(f"undecided in {family}: " + "; ".join(f"{n} x {r}" for r, n in tally.reasons.most_common(6)))
    if args.json:
        pathlib.Path(args.json).parent.mkdir(parents=True, exist_ok=True)
        pathlib.Path(args.json).write_text(json.dumps({
            "digits": args.digits, "max_digits": options.limit, "seed": args.seed, "quick": args.quick,
            "families": {f: {k: getattr(t, k) for k in ("issued", "certified", "exact", "refuted", "undecided",
                                                         "false", "claim_errors", "seconds")}
                         | {"undecided_reasons": dict(t.reasons), "falsehoods": t.falsehoods,
                            "digits_used": {str(d): n for d, n in t.digits.items()}}
                         for f, t in table.items()}}, indent=2))
    return 1 if totals.false else 0


if __name__ == "__main__":
    sys.exit(main())
