"""The exact reference: the singular locus from a Groebner basis (sympy, optional), under a time limit.

What it computes, for X = V(F) (projective input: the affine cone cut by a
random rational hyperplane a . x = 1, which meets every projective point once):

1. A Groebner basis (grevlex) of F: the dimension of X from the leading
   monomials (the largest set of variables containing the support of no
   leading monomial), its codimension c, and the degree of its top-dimensional
   part (distinct points of X cut by dim X random rational hyperplanes).
2. A Groebner basis of F plus ALL c x c minors of J: V of that ideal is where
   the rank of J drops below c on X -- the singular locus when X is
   equidimensional and F generates its ideal, together with the generically
   non-reduced components. Its dimension; when it is finite, the number of
   standard monomials (the length of the scheme, with multiplicity), the
   number of distinct points (degree of the square-free part of the
   characteristic polynomial of the multiplication matrix of a random linear
   form), how many are real (Sturm sequences: real values of a real generic
   form come from real points), and, when sympy can solve the basis, exact
   coordinates; when it is positive-dimensional, the degree of its
   top-dimensional part (by slicing). More affine equations than the
   codimension, with that set finite: the equations' ideal saturated by a
   random combination of the minors (its embedded points removed, decision
   0105) and the same counts again, which are then X's singular points;
   that set of positive dimension but below X's: the same saturation
   removes the embedded components of any dimension (decision 0108).
   sympy has no radical, Hilbert polynomial
   or primary decomposition routine; these counts are built on its Groebner
   bases here.

The computation runs in a child process that is terminated at the time limit;
what was finished before (counts first, coordinates last) is kept. The child
receives the system as plain data (exponents and exact coefficients as text)
and builds sympy expressions from them term by term: user input is never
parsed by sympy.

Examples
--------
>>> from numag.system.parse import parse_system
>>> answer = exact_reference(parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"]), seconds=60)
>>> answer.status, answer.singular_dimension, answer.singular_points, answer.scheme_length
('finished', 0, 1, 1)
"""

from dataclasses import dataclass, field
from fractions import Fraction
import itertools
import json
import queue as queue_module
import os
import subprocess
import sys
import tempfile
import threading
import time

from ..kinds import TextEnum

__all__ = ["ReferenceAnswer", "ReferenceStatus", "exact_reference", "system_to_plain", "REFERENCE_SCOPE"]

# What the child runs: this numag, found by the folder given as its first argument.
_CHILD_ENTRY = "import sys; sys.path.insert(0, sys.argv[1]); from numag.app.reference import _main; _main()"

#: What the reference compares (printed with every comparison).
REFERENCE_SCOPE = ("exact reference (sympy Groebner bases): dimension and degree of X and the degrees of its "
                   "top-dimensional irreducible components over Q (one equation: which are repeated factors, "
                   "the non-reduced components); V(F + all c x c minors of J) "
                   "with c the codimension of X -- its dimension, and when finite the distinct points (and "
                   "real ones, length with multiplicity, exact coordinates when sympy solves the basis), "
                   "otherwise the degree of its top-dimensional part; more affine equations than the "
                   "codimension and that set finite: its embedded points saturated away first, so that the "
                   "points compared are X's singular points (and when it has positive dimension below X's, its embedded "
                   "components saturated away likewise: Sing(X) is compared beside it). Affine input: affine points only. "
                   "Assumes X equidimensional; lower-dimensional parts of a positive-dimensional locus are not "
                   "compared.")


class ReferenceStatus(TextEnum):
    """How the exact reference ended."""

    FINISHED = "finished"
    TIMED_OUT = "timed out"
    FAILED = "failed"              # ``message`` says why
    UNAVAILABLE = "unavailable"    # no sympy


@dataclass
class ReferenceAnswer:
    """The exact reference's answer (fields are None where it did not get that far).

    Attributes
    ----------
    status : ReferenceStatus
    seconds : float
        Wall time of the child process (with interpreter start and sympy's import).
    compute_seconds : float or None
        Time of the computation itself, up to the last stage that finished.
    variety_dimension, variety_degree, codimension : int or None
    minors : int or None
        Number of c x c minors added.
    singular_dimension : int or None
        Dimension of V(F + minors); -1 when empty.
    singular_points, real_singular_points, scheme_length : int or None
        When that set is finite.
    singular_degree : int or None
        Degree of its top-dimensional part when it is positive-dimensional.
    component_degrees : list of int or None
        Degrees of the irreducible components over Q of X's top-dimensional part (X of positive
        dimension), ascending.
    non_reduced_degrees : list of int or None
        One equation only: degrees of its irreducible factors over Q that divide it more than once
        (the generically non-reduced components of X, a factor of degree d counted once), ascending;
        None for several equations, where the reference does not know which components are non-reduced.
    rank_drop_points, embedded_points : int or None
        Several affine equations, more than the codimension, with V(F + minors) finite: its distinct points, and
        how many of them are embedded points of the equations, where X is smooth (decision 0105); the singular
        points (and their coordinates) are then those of the saturated ideal. None where not computed.
    rank_drop_dimension, rank_drop_degree : int or None
        Several affine equations, more than the codimension, with V(F + minors) of positive dimension below X's:
        its dimension and top degree; the ``singular_*`` fields are then those of the ideal saturated by a
        combination of the minors, X's ideal: Sing(X) without the equations' embedded components (decision 0108).
        None where not computed.
    points : list of list of complex or None
        Coordinates of the exact points (affine; projective input: in the chart a . x = 1).
    exact_points : list of list of str or None
        Exact coordinates (sympy's text); projective points with their first non-zero coordinate 1.
    chart : list of int or None
        The hyperplane a of the chart (projective input).
    message : str
    """

    status: ReferenceStatus
    seconds: float = 0.0
    compute_seconds: object = None
    variety_dimension: object = None
    variety_degree: object = None
    codimension: object = None
    minors: object = None
    singular_dimension: object = None
    singular_points: object = None
    real_singular_points: object = None
    scheme_length: object = None
    singular_degree: object = None
    component_degrees: object = None
    non_reduced_degrees: object = None
    rank_drop_points: object = None
    embedded_points: object = None
    rank_drop_dimension: object = None
    rank_drop_degree: object = None
    points: object = None
    exact_points: object = None
    chart: object = None
    message: str = ""
    stages: list = field(default_factory=list)


def system_to_plain(system):
    """The system as JSON-safe plain data: variables, per equation a list of [exponents, parts].

    ``parts`` maps a square-free radicand (as text) to [real, imaginary] rationals as text;
    inexact coefficients are written as their exact binary fractions.
    """
    from ..system.exact import ExactCoefficient  # noqa: F401 (documentation of the type used below)
    equations = []
    for p in system.polynomials:
        terms = []
        coefficients = p.coefficients if p.is_exact else [ExactCoefficient.from_complex(c) for c in p.coefficients]
        for row, c in zip(p.exponents, coefficients):
            parts = {str(r): [str(re), str(im)] for r, (re, im) in c.parts.items()}
            terms.append([[int(e) for e in row], parts])
        equations.append(terms)
    return {"variables": list(system.variables), "equations": equations, "projective": bool(system.projective)}


# --- the child ---------------------------------------------------------------------------------------

def _expressions(plain, sympy):
    symbols = sympy.symbols(plain["variables"])
    if not isinstance(symbols, (list, tuple)):
        symbols = (symbols,)
    result = []
    for terms in plain["equations"]:
        total = sympy.Integer(0)
        for exponents, parts in terms:
            value = sympy.Integer(0)
            for radicand, (re, im) in parts.items():
                re, im = Fraction(re), Fraction(im)
                value += (sympy.Rational(re.numerator, re.denominator)
                          + sympy.I * sympy.Rational(im.numerator, im.denominator)) * sympy.sqrt(int(radicand))
            total += value * sympy.Mul(*[s ** e for s, e in zip(symbols, exponents)])
        result.append(sympy.expand(total))
    return list(symbols), result


def _leading_monomials(basis, symbols, sympy):
    from sympy.polys.orderings import grevlex
    return [max(sympy.Poly(g, *symbols).monoms(), key=grevlex) for g in basis.exprs]


def _dimension(leading, n):
    """Krull dimension from the leading monomials: largest S with no leading monomial supported inside S."""
    if any(sum(m) == 0 for m in leading):
        return -1
    supports = [frozenset(j for j, e in enumerate(m) if e) for m in leading]
    for size in range(n, -1, -1):
        for subset in itertools.combinations(range(n), size):
            chosen = set(subset)
            if not any(s <= chosen for s in supports):
                return size
    return 0


def _standard_monomials(leading, n, limit=5000):
    """Monomials divisible by no leading monomial (finite when the ideal is zero-dimensional)."""
    found, frontier = [], [tuple([0] * n)]
    seen = set(frontier)
    while frontier:
        m = frontier.pop()
        if any(all(a >= b for a, b in zip(m, lm)) for lm in leading):
            continue
        found.append(m)
        if len(found) > limit:
            raise RuntimeError(f"more than {limit} standard monomials")
        for j in range(n):
            nxt = tuple(e + (1 if k == j else 0) for k, e in enumerate(m))
            if nxt not in seen:
                seen.add(nxt)
                frontier.append(nxt)
    return found


def _multiplication_matrix(basis, symbols, standard, index, factor, sympy):
    """Matrix of multiplication by ``factor`` on the standard monomials (columns: images)."""
    matrix = sympy.zeros(len(standard), len(standard))
    for col, m in enumerate(standard):
        monomial = sympy.Mul(*[s ** e for s, e in zip(symbols, m)])
        remainder = basis.reduce(sympy.expand(factor * monomial))[1]
        if remainder == 0:
            continue
        for exps, coefficient in sympy.Poly(remainder, *symbols).terms():
            matrix[index[exps], col] = coefficient
    return matrix


def _finite_counts(basis, symbols, rng, sympy):
    """(distinct points, real points, length, square-free eliminants) of a zero-dimensional ideal."""
    n = len(symbols)
    leading = _leading_monomials(basis, symbols, sympy)
    standard = _standard_monomials(leading, n)
    index = {m: k for k, m in enumerate(standard)}
    t = sympy.Symbol("t_")
    best = None
    for _ in range(2):  # two random forms: a collision would only lower the count
        weights = [_random_integer(rng) for _ in range(n)]
        form = sum(w * s for w, s in zip(weights, symbols))
        matrix = _multiplication_matrix(basis, symbols, standard, index, form, sympy)
        square_free = sympy.Poly(sympy.sqf_part(matrix.charpoly(t).as_expr()), t)
        distinct = int(square_free.degree())
        real = None
        if all(c.is_rational for c in square_free.all_coeffs()):
            real = int(square_free.count_roots())  # Sturm sequences over Q
        if best is None or distinct > best[0]:
            best = (distinct, real)
    return best[0], best[1], int(len(standard)), (standard, index)


def _coordinates(basis, symbols, standard, index, rng, sympy, projective=False, digits=40):
    """Coordinates of the distinct points: radical (Seidenberg), shape basis in lex, roots of the eliminant.

    Returns (numeric points as [re, im] pairs, exact texts or None), or (None, None) when the
    random form is not separating.
    """
    import mpmath
    t = sympy.Symbol("t_")
    eliminants = []
    for s in symbols:  # I + (square-free part of each coordinate's eliminant) is the radical
        matrix = _multiplication_matrix(basis, symbols, standard, index, s, sympy)
        eliminants.append(sympy.sqf_part(matrix.charpoly(t).as_expr()).subs(t, s))
    radical = sympy.groebner(list(basis.exprs) + eliminants, *symbols, order="grevlex", extension=True)
    weights = [_random_integer(rng) for _ in symbols]
    shape = sympy.groebner(list(radical.exprs) + [t - sum(w * s for w, s in zip(weights, symbols))],
                           *symbols, t, order="grevlex", extension=True).fglm("lex")
    parametrisation, eliminant = {}, None
    for g in shape.exprs:
        poly = sympy.Poly(g, *symbols, t)
        variables = [s for s in symbols if poly.degree(s) > 0]
        if not variables:
            eliminant = sympy.Poly(g, t)
        elif len(variables) == 1 and poly.degree(variables[0]) == 1:
            s = variables[0]
            coefficient = sympy.Poly(g, s).coeff_monomial(s)
            if coefficient.free_symbols:
                return None, None
            parametrisation[s] = sympy.expand(s - g / coefficient)
        else:
            return None, None
    if eliminant is None or len(parametrisation) != len(symbols):
        return None, None
    def to_mp(c):  # rationals exactly (the shape basis has large ones), others at the working precision
        if c.is_rational:
            c = sympy.Rational(c)
            return mpmath.mpf(c.p) / c.q
        value = c.evalf(digits + 10)
        return mpmath.mpc(str(sympy.re(value)), str(sympy.im(value)))

    with mpmath.workdps(digits):
        coefficients = [to_mp(c) for c in eliminant.all_coeffs()]
        roots = mpmath.polyroots(coefficients, maxsteps=200, extraprec=4 * digits) if len(coefficients) > 1 else []
        numeric = []
        for root in roots:
            point = []
            for s in symbols:
                value = sympy.Poly(parametrisation[s], t)
                total = mpmath.mpc(0)
                for c in value.all_coeffs():
                    total = total * root + to_mp(c)
                point.append([float(total.real), float(total.imag)])
            numeric.append(point)
    exact = None
    if eliminant.degree() <= 64:
        exact = []
        for factor, _ in sympy.factor_list(eliminant.as_expr())[1]:
            if sympy.degree(factor, t) > 2:
                exact = None
                break
            for root in sympy.roots(sympy.Poly(factor, t)):
                values = [sympy.radsimp(sympy.expand(parametrisation[s].subs(t, root))) for s in symbols]
                if projective:  # homogeneous coordinates: the first non-zero one set to 1
                    first = next(v for v in values if v != 0)
                    values = [sympy.radsimp(sympy.expand(v / first)) for v in values]
                exact.append([str(v) for v in values])
    return numeric, exact


def _random_integer(rng):
    """A non-zero integer from -97..97: random enough that special positions are unlikely."""
    return int(rng.integers(1, 98)) * int(rng.choice([-1, 1]))


def _slice_degree(ideal, symbols, dimension, rng, sympy, attempts=2):
    """Distinct points of the ideal cut by ``dimension`` random rational affine hyperplanes (best of two).

    A special slice can only lose points (tangency, points at infinity), so the larger count wins.
    """
    best = None
    for _ in range(attempts):
        hyperplanes = [sum(_random_integer(rng) * s for s in symbols) + _random_integer(rng)
                       for _ in range(dimension)]
        basis = sympy.groebner(list(ideal) + hyperplanes, *symbols, order="grevlex", extension=True)
        if _dimension(_leading_monomials(basis, symbols, sympy), len(symbols)) != 0:
            continue
        count = _finite_counts(basis, symbols, rng, sympy)[0]
        best = count if best is None else max(best, count)
    return best


def _top_components(equations, symbols, dimension, rng, sympy):
    """Degrees of the irreducible components over Q of the top-dimensional part of V(equations).

    One equation: its distinct irreducible factors over Q. Several: a random rational change of
    coordinates, then elimination (lex Groebner basis) down to dimension + 1 coordinates; the
    projection of each top-dimensional component is a hypersurface of the same degree (a generic
    projection is birational onto its image), and the gcd of the elimination ideal's generators is
    the product of their equations. Factors over Q only: a component defined over Q that splits
    over C (x^2 + y^2) counts once here.
    """
    n = len(symbols)
    if len(equations) == 1 or dimension == n - 1:
        generators = equations
        gcd = generators[0]
        for g in generators[1:]:
            gcd = sympy.gcd(gcd, g)
        if len(equations) == 1 or sympy.Poly(gcd, *symbols).total_degree() > 0:
            _, factors = sympy.factor_list(sympy.expand(gcd), *symbols)
            return sorted(sympy.Poly(f, *symbols).total_degree() for f, _ in factors
                          if sympy.Poly(f, *symbols).total_degree() > 0)
    while True:  # a random invertible integer change of coordinates x = M z
        matrix = sympy.Matrix([[int(rng.integers(-3, 4)) for _ in range(n)] for _ in range(n)])
        if matrix.det() != 0:
            break
    new = sympy.symbols(f"z0:{n}")
    substitution = {s: sum(matrix[i, j] * new[j] for j in range(n)) for i, s in enumerate(symbols)}
    moved = [sympy.expand(f.subs(substitution, simultaneous=True)) for f in equations]
    basis = sympy.groebner(moved, *new, order="lex", extension=True)
    kept = new[n - dimension - 1:]
    eliminated = [g for g in basis.exprs if not (g.free_symbols - set(kept))]
    if not eliminated:
        return None
    gcd = eliminated[0]
    for g in eliminated[1:]:
        gcd = sympy.gcd(gcd, g)
    _, factors = sympy.factor_list(sympy.expand(gcd), *kept)
    return sorted(sympy.Poly(f, *kept).total_degree() for f, _ in factors if sympy.Poly(f, *kept).total_degree() > 0)


def _rank_drops(equations, slicing, symbols, codimension, sympy):
    """The c x c minors of the equations' Jacobian, the ideal F + minors (+ the chart), its grevlex basis and the
    dimension of its zero set."""
    n = len(symbols)
    jacobian = sympy.Matrix([[sympy.diff(f, s) for s in symbols] for f in equations])
    minors = []
    if codimension >= 1:
        for rows in itertools.combinations(range(len(equations)), codimension):
            for cols in itertools.combinations(range(n), codimension):
                minor = sympy.expand(jacobian.extract(list(rows), list(cols)).det(method="berkowitz"))
                if minor != 0:
                    minors.append(minor)
    ideal = equations + minors + slicing
    basis = sympy.groebner(ideal, *symbols, order="grevlex", extension=True)
    return minors, ideal, basis, _dimension(_leading_monomials(basis, symbols, sympy), n)


def _without_embedded_points(equations, minors, symbols, rng, sympy):
    """Generators of I : h^oo, h a random integer combination of the minors (I the equations' ideal, V(I + minors)
    finite, X of positive dimension): the ideal without its embedded points (decision 0105).

    The embedded primes of I lie where I's Jacobian drops rank (where R/I is not reduced it is not regular), a
    finite set here, so each is the maximal ideal of a point where h vanishes; h vanishes on no component of X
    (the minors do not all vanish on one: V(I + minors) is finite). Saturating by h removes exactly those points'
    primary components: what is left is unmixed and generically reduced, hence radical -- X's ideal (assumes X
    equidimensional without isolated points where the rank drops). Elimination: (I + (1 - t h)) without t (lex).
    """
    h = sum(int(rng.integers(1, 98)) * (1 if rng.integers(2) else -1) * m for m in minors)
    t = sympy.Dummy("t")
    basis = sympy.groebner(list(equations) + [1 - t * h], t, *symbols, order="lex")
    return [g for g in basis.exprs if t not in g.free_symbols]


def _child(text, seed, channel):
    """Runs in the child process; sends JSON messages (partial results first)."""
    import numpy as np
    try:
        import sympy
    except ImportError:
        channel.put(json.dumps({"status": "unavailable", "message": "sympy is not installed (pip install 'numag[exact]')"}))
        return
    clock = time.perf_counter()  # after sympy's import: the computation alone is timed
    try:
        plain = json.loads(text)
        rng = np.random.default_rng(seed)
        symbols, equations = _expressions(plain, sympy)
        result = {}
        if plain["projective"]:
            chart = [_random_integer(rng) for _ in symbols]  # misses a point only if a . p = 0
            result["chart"] = chart
            slicing = [sum(a * s for a, s in zip(chart, symbols)) - 1]
        else:
            slicing = []
        n = len(symbols)
        basis = sympy.groebner(equations + slicing, *symbols, order="grevlex", extension=True)
        dimension = _dimension(_leading_monomials(basis, symbols, sympy), n)
        result["variety_dimension"] = dimension
        if dimension < 0:
            raise RuntimeError("X is empty")
        # codimension in the ambient space of X (the chart hyperplane is not part of it)
        codimension = n - len(slicing) - dimension
        result["codimension"] = codimension
        result["variety_degree"] = _slice_degree(equations + slicing, symbols, dimension, rng, sympy)
        result["compute_seconds"] = time.perf_counter() - clock
        channel.put(json.dumps({"partial": result}))
        if dimension > 0:
            result["component_degrees"] = _top_components(equations + slicing, symbols, dimension, rng, sympy)
            if len(equations) == 1:  # a factor of multiplicity > 1 is a generically non-reduced component
                _, factors = sympy.factor_list(sympy.expand(equations[0]), *symbols)
                result["non_reduced_degrees"] = sorted(sympy.Poly(f, *symbols).total_degree() for f, power in factors
                                                       if power > 1 and sympy.Poly(f, *symbols).total_degree() > 0)
            result["compute_seconds"] = time.perf_counter() - clock
            channel.put(json.dumps({"partial": result}))
        minors, ideal, singular, singular_dimension = _rank_drops(equations, slicing, symbols, codimension, sympy)
        result["minors"] = len(minors)
        result["singular_dimension"] = singular_dimension
        if singular_dimension == 0:
            distinct, real, length, (standard, index) = _finite_counts(singular, symbols, rng, sympy)
            result.update(singular_points=distinct, real_singular_points=real, scheme_length=length)
            if not plain["projective"] and dimension > 0 and len(equations) > codimension and distinct:
                # Decision 0105: more equations than the codimension may have embedded points where their Jacobian
                # drops rank and X is smooth. Without them (saturated) they generate X's ideal: the singular locus
                # of X is V(J + J's minors). The one of the given equations is kept as rank_drop_points.
                saturated = _without_embedded_points(equations, minors, symbols, rng, sympy)
                _, ideal, singular, singular_dimension = _rank_drops(saturated, [], symbols, codimension, sympy)
                if singular_dimension == 0:
                    kept, real, length, (standard, index) = _finite_counts(singular, symbols, rng, sympy)
                else:  # the saturated locus lies in a finite set: empty
                    kept, real, length = 0, 0, 0
                result.update(rank_drop_points=distinct, embedded_points=distinct - kept, singular_points=kept,
                              real_singular_points=real, scheme_length=length, singular_dimension=singular_dimension)
        elif singular_dimension > 0:
            result["singular_degree"] = _slice_degree(ideal, symbols, singular_dimension, rng, sympy)
            if (not plain["projective"] and len(equations) > codimension
                    and singular_dimension < dimension):
                # Decision 0108: an embedded component of positive dimension lies in V(F + minors) too; saturated
                # away, what is left generates X's ideal (X equidimensional, generically reduced: the minors vanish
                # on no component, V(F + minors) being smaller than X), and V(J + J's minors) is Sing(X).
                result.update(rank_drop_dimension=singular_dimension, rank_drop_degree=result["singular_degree"])
                saturated = _without_embedded_points(equations, minors, symbols, rng, sympy)
                _, ideal, singular, singular_dimension = _rank_drops(saturated, [], symbols, codimension, sympy)
                result.update(singular_dimension=singular_dimension, singular_degree=None)
                if singular_dimension > 0:
                    result["singular_degree"] = _slice_degree(ideal, symbols, singular_dimension, rng, sympy)
                elif singular_dimension == 0:
                    distinct, real, length, (standard, index) = _finite_counts(singular, symbols, rng, sympy)
                    result.update(singular_points=distinct, real_singular_points=real, scheme_length=length)
                else:
                    result.update(singular_points=0, real_singular_points=0, scheme_length=0)
        elif singular_dimension < 0:
            result.update(singular_points=0, real_singular_points=0, scheme_length=0)
        result["compute_seconds"] = time.perf_counter() - clock
        channel.put(json.dumps({"partial": result}))
        if singular_dimension == 0:
            numeric, exact = _coordinates(singular, symbols, standard, index, rng, sympy, plain["projective"])
            if numeric is not None and len(numeric) == result["singular_points"]:
                result["points"] = numeric
                if exact is not None and len(exact) == len(numeric):
                    result["exact_points"] = exact
        elif singular_dimension < 0:
            result["exact_points"], result["points"] = [], []
        result["compute_seconds"] = time.perf_counter() - clock
        channel.put(json.dumps({"final": result}))
    except Exception as err:  # noqa: BLE001 - reported to the parent as a failure with its message
        channel.put(json.dumps({"status": "failed", "message": f"{type(err).__name__}: {err}"}))


class _LineChannel:
    """The child's side: one JSON message per line on standard output."""

    def put(self, text):
        sys.stdout.write(text.replace("\n", " ") + "\n")
        sys.stdout.flush()


def _read_lines(stream, lines):
    for line in stream:
        lines.put(line)
    lines.put(None)


def exact_reference(system, seconds=60.0, seed=0):
    """Run the exact reference on ``system`` in a child process, terminated after ``seconds``.

    The child is a fresh interpreter in isolated mode (``python -I``, in an empty temporary
    folder, importing this numag by its own location) reading the system as JSON on its
    standard input and writing JSON lines; at the time limit it is killed.

    Parameters
    ----------
    system : PolynomialSystem
    seconds : float
        Time limit; on time-out the answer keeps the stages that finished.
    seed : int
        For the random rational forms and hyperplanes.

    Returns
    -------
    ReferenceAnswer
    """
    request = json.dumps({"system": system_to_plain(system), "seed": int(seed)})
    started = time.perf_counter()
    # Isolated: Python's -I keeps the current directory, PYTHONPATH and the user's site-packages off the
    # path, the child runs in an empty temporary folder, and the only path added is the folder holding
    # this very numag package: a `numag/` planted where the user happens to stand is never imported.
    workdir = tempfile.TemporaryDirectory(prefix="numag-reference-")
    package_parent = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
    child = subprocess.Popen([sys.executable, "-I", "-c", _CHILD_ENTRY, package_parent], stdin=subprocess.PIPE,
                             stdout=subprocess.PIPE, stderr=subprocess.DEVNULL, text=True, cwd=workdir.name)
    try:  # the child never outlives this call, whatever happens here
        lines = queue_module.Queue()
        reader = threading.Thread(target=_read_lines, args=(child.stdout, lines), daemon=True)
        reader.start()
        try:
            child.stdin.write(request)
            child.stdin.close()
        except BrokenPipeError:
            pass
        deadline = started + float(seconds)
        messages, finished, ended = [], False, False
        while not finished and not ended:
            remaining = deadline - time.perf_counter()
            if remaining <= 0:
                break
            try:
                line = lines.get(timeout=min(remaining, 0.5))
            except queue_module.Empty:
                continue
            if line is None:
                ended = True
                break
            try:
                message = json.loads(line)
            except json.JSONDecodeError:
                continue
            messages.append(message)
            finished = "final" in message or "status" in message
    finally:
        if child.poll() is None:
            child.kill()
        child.wait()
        workdir.cleanup()
    elapsed = time.perf_counter() - started
    answer = ReferenceAnswer(status=ReferenceStatus.TIMED_OUT, seconds=elapsed)
    for message in messages:
        body = message.get("partial") or message.get("final") or {}
        for key, value in body.items():
            setattr(answer, key, value)
        if "status" in message:
            answer.status = ReferenceStatus.parse(message["status"], "reference status")
            answer.message = message.get("message", "")
    if any("final" in m for m in messages):
        answer.status = ReferenceStatus.FINISHED
    elif answer.status is ReferenceStatus.TIMED_OUT:
        if ended:
            answer.status, answer.message = ReferenceStatus.FAILED, f"the reference process ended early (exit code {child.returncode})"
        else:
            answer.message = f"no answer within {seconds:g} s (child process killed)"
    if answer.points is not None:
        answer.points = [[complex(re, im) for re, im in point] for point in answer.points]
    return answer


def _main():
    request = json.loads(sys.stdin.read())
    _child(json.dumps(request["system"]), int(request["seed"]), _LineChannel())


if __name__ == "__main__":
    _main()
