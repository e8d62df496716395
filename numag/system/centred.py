"""Singular features far smaller than their distance from the origin, judged again in centred coordinates.

Term sizes and the balancing (decisions 0002, 0003) take rho_j = max(|x_j|, 1): the unit a decision sees is
set by where a feature sits, not by its size. Two nodes 1e-4 apart at (100, -50) are, in the expanded
polynomial, a cancellation of terms of size 100^d down to values of size 1e-8 and less: double precision
cannot see them there, whatever the scale (decision 0071). The same curve written in coordinates centred at
the features, y = x - s with s an exact rational near them, has coefficients of the features' own sizes, and
the balancing then sees them as it sees features at the origin.

This module writes that centred system exactly (double coefficients are dyadic rationals, so they are
translated exactly too) and says which points a region around the centre holds. The caller
(:func:`numag.singular.locus.singular_locus`, the solver) decides where to centre and merges the results.

Examples
--------
>>> from numag.system.parse import parse_system
>>> system = parse_system(["(y - 2)^2 - ((x - 1)^2 - 1/1000000)^2"], ["x", "y"])
>>> centred_system(system, centre_near(np.array([1.0, 2.0]), 1e-2)).to_texts()  # the nodes at (+-1/1000, 0)
['-x^4 + 1/500000*x^2 + y^2 - 1/1000000000000']
"""

from dataclasses import dataclass
from fractions import Fraction
import math

import numpy as np

from .exact import MAX_COEFFICIENT_BITS, ExactCoefficient
from .polynomial import Polynomial, PolynomialSystem

__all__ = ["CENTRED_BALANCING_FLOOR", "CENTRING_TERMS", "CentredTerms", "Centring", "centre_in_region", "centre_near",
           "centred_system", "subleading_centre", "translated_terms", "within"]

#: The balancing of a centred system leaves out terms below this fraction of the largest of their polynomial
#: (:meth:`~numag.numeric.scaling.Scaling.balancing`): the centre is rounded to 12 digits of the point, and a
#: coordinate that is zero up to rounding (1e-11) leaves terms of that size, which must not set the units
#: (decisions 0081, 0084).
CENTRED_BALANCING_FLOOR = 1e-8

#: Centring expands each term (y + s)^e into prod(e_j + 1) terms: above this many in all, the centred system is
#: too large to write out, and membership (and the non-reduced sampling of :mod:`numag.singular.smoothness`, the
#: cascade's rank test of junk candidates: decision 0097) run in the system's own units as before decision 0084.
CENTRING_TERMS = 20000


@dataclass(frozen=True)
class Centring:
    """A translation x = s + y, with s exact (Gaussian rationals), and the region it speaks for.

    Attributes
    ----------
    centre : tuple of ExactCoefficient
        s, exact.
    point : ndarray, shape (n,)
        s as complex numbers.
    radius : float
        Points within this distance of s are taken from the centred run, the others from the first one.
    """

    centre: tuple
    point: np.ndarray
    radius: float


def centre_near(point, radius, digits=12):
    """An exact rational centre within 10^-digits (relative to 1 + |point|) of ``point``.

    Rounding to a decimal grid keeps the numbers short (denominators 10^k); the offset it adds is far below
    any feature the centred run is asked about (``radius``).

    Parameters
    ----------
    point : array_like, shape (n,)
        Complex; an imaginary part below the grid is dropped, so real features keep a real centre.
    radius : float
        The region the centring speaks for (recorded).
    digits : int

    Returns
    -------
    Centring

    Examples
    --------
    >>> centre_near(np.array([0.1 + 0j, 2.5]), 1e-3).centre[0].to_text()
    '1/10'
    """
    point = np.asarray(point, dtype=complex)
    # the grid is a power of ten below the point's size (relative), so the exact numbers stay short
    exponent = int(np.ceil(np.log10(1 + float(np.linalg.norm(point))))) - digits
    grid = Fraction(10) ** exponent
    centre = tuple(ExactCoefficient.rational(Fraction(round(Fraction(z.real) / grid)) * grid,
                                             Fraction(round(Fraction(z.imag) / grid)) * grid) for z in point)
    return Centring(centre=centre, point=np.array([complex(c) for c in centre]), radius=float(radius))


def centre_in_region(point, radius, grid=0.1):
    """An exact decimal centre on a grid of at most a tenth of ``radius``, near ``point``, speaking for ``radius``.

    A region is centred where its features lie, not where one approximation of them sits: an endpoint known to
    1e-9 (relative) written as the centre leaves terms of that size in the centred system (a linear term 5e-6 in
    y and a constant 6e-12 for a node's neighbour at (1233.33, -2345.0000026, 3455.33)), and the balancing, which
    fits every term, then chose units of 1e-2, 1e-3 and 1e-7 for x, y, z, in which the curve of degree 6
    decomposed as six lines, each confirmed (decision 0090). On a grid of radius / 10 and coarser the centre is
    a short decimal (1233.3, -2345, 3455.3), so the centred coefficients are the geometry's own; it moves the
    region by at most 5% of its radius. The rule is translation- and scale-free: the grid follows the radius.

    Parameters
    ----------
    point : array_like, shape (n,)
        Complex; an imaginary part below the grid is dropped (real features keep a real centre).
    radius : float
        Positive: the region the centring speaks for.
    grid : float
        The grid's spacing at most, relative to ``radius``.

    Returns
    -------
    Centring

    Examples
    --------
    >>> [c.to_text() for c in centre_in_region(np.array([1233.3333333, -2345.0000026, 3455.3333333]), 4.4).centre]
    ['12333/10', '-2345', '34553/10']
    >>> [c.to_text() for c in centre_in_region(np.array([1.2333333, -2.3450000026]), 4.4e-3).centre]
    ['12333/10000', '-469/200']
    """
    point = np.asarray(point, dtype=complex)
    # centre_near's digits count from the point's size: 10^(ceil(log10(1 + |p|)) - digits) <= grid * radius
    digits = int(np.ceil(np.log10(1 + float(np.linalg.norm(point))))) - int(np.floor(np.log10(grid * radius)))
    return centre_near(point, radius, digits=max(digits, 1))


def centred_system(system, centring):
    """The system in the coordinates y = x - s, exact (a double coefficient is translated as the rational it is).

    Parameters
    ----------
    system : PolynomialSystem
        Affine.
    centring : Centring

    Returns
    -------
    PolynomialSystem
        Same variable names and equations, exact coefficients.
    """
    return CentredTerms(system, centring).exact()


class CentredTerms:
    """A system translated to y = x - s, held as Gaussian integers over one denominator per equation.

    :meth:`exact` writes the centred system exactly (:func:`centred_system`); :meth:`rounded` gives the numbers
    a judgement in double uses -- the centred system in units of powers of ten, each coefficient rounded once
    from its exact value -- without writing an exact number: those are the same doubles as
    ``Scaling(c, r).scale_system(centred_system(system, centring))`` rounds to (an integer quotient is correctly
    rounded, as a Fraction's is), so every decision made in double is the same, at a fraction of the cost
    (the cascade judges each junk candidate centred, decision 0097; decision 0138).

    Parameters
    ----------
    system : PolynomialSystem
        Affine.
    centring : Centring

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> terms = CentredTerms(parse_system(["x^2 - 1/3"], ["x"]), centre_near(np.array([2.0]), 0.0))
    >>> terms.exact().to_texts(), terms.rounded((0,), (1,)).polynomials[0].numeric_coefficients().real.tolist()
    (['x^2 + 4*x + 11/3'], [36.66666666666667, 40.0, 10.0])
    """

    def __init__(self, system, centring, _forms=None):
        self.system = system
        self.centring = centring
        forms = [_integer_form(p) for p in system.polynomials] if _forms is None else _forms
        # per equation: (exponents, real numerators, imaginary numerators, denominator), or the exact polynomial
        # where the direct translation does not apply (square roots, too many terms)
        self._terms = []
        for polynomial, form in zip(system.polynomials, forms):
            integers = None if form is None else _translated_integers(form, centring.centre)
            self._terms.append(integers if integers is not None else _substituted(polynomial, centring))

    @classmethod
    def about(cls, system):
        """centring -> ``CentredTerms(system, centring)``, the coefficients read once (a system centred at many
        points, one after the other).

        Examples
        --------
        >>> from numag.system.parse import parse_system
        >>> at = CentredTerms.about(parse_system(["x^2 - 1/3"], ["x"]))
        >>> [at(centre_near(np.array([c]), 0.0)).exact().to_texts()[0] for c in (1.0, 2.0)]
        ['x^2 + 2*x + 2/3', 'x^2 + 4*x + 11/3']
        """
        forms = [_integer_form(p) for p in system.polynomials]
        return lambda centring: cls(system, centring, forms)

    def exact(self):
        """The centred system with exact coefficients (:func:`centred_system`)."""
        n = self.system.n_variables
        polynomials = [_exact_polynomial(terms, n) if isinstance(terms, tuple) else terms for terms in self._terms]
        return self._written(polynomials)

    def rounded(self, variable_exponents=None, equation_exponents=None):
        """The centred system g_i(y) = 10^r_i f_i(s + 10^c y) with complex double coefficients, each the exact
        value rounded once.

        Parameters
        ----------
        variable_exponents, equation_exponents : sequence of int, optional
            c and r (:class:`~numag.numeric.scaling.Scaling`); default 0.

        Returns
        -------
        PolynomialSystem
        """
        n = self.system.n_variables
        c = np.zeros(n, dtype=np.int64) if variable_exponents is None else np.asarray(variable_exponents, np.int64)
        rows = [0] * len(self._terms) if equation_exponents is None else list(equation_exponents)
        polynomials = []
        for terms, r in zip(self._terms, rows):
            if isinstance(terms, tuple):
                exponents, real, imaginary, whole = terms
                powers = (exponents @ c + int(r)).tolist() if len(exponents) else []
                values = _rounded_quotients(real, imaginary, whole, powers)
                if values is not None:
                    polynomials.append(Polynomial(exponents, values, n))
                    continue
                terms = _exact_polynomial(terms, n)  # beyond the exact size limit: raised as the exact route does
            powers = (terms.exponents @ c + int(r)).tolist()
            polynomials.append(Polynomial(terms.exponents, np.array(
                [complex(a * ExactCoefficient.rational(Fraction(10) ** k)) if k else complex(a)
                 for a, k in zip(terms.coefficients, powers)], dtype=complex), n))
        return self._written(polynomials)

    def _written(self, polynomials):
        centred = PolynomialSystem(list(self.system.variables), polynomials, name=self.system.name)
        centred.literal_digits = self.system.literal_digits  # the same numbers, written about another origin
        return centred


def _substituted(polynomial, centring):
    """p(y + s) by the general substitution (exact; a double coefficient read as the dyadic rational it is)."""
    n = polynomial.n_variables
    if not polynomial.is_exact:  # every double is a dyadic rational: the translation stays exact
        polynomial = Polynomial(polynomial.exponents,
                                np.array([ExactCoefficient.from_complex(c) for c in polynomial.coefficients],
                                         dtype=object), n)
    return polynomial.substitute_linear(np.eye(n, dtype=np.int64), list(centring.centre))


def _exact_polynomial(terms, n):
    """The exact polynomial of :func:`_translated_integers`' terms."""
    exponents, real, imaginary, whole = terms
    if not len(exponents):
        return Polynomial.zero(n)
    return Polynomial(exponents, np.array([ExactCoefficient.rational(Fraction(re, whole), Fraction(im, whole))
                                           for re, im in zip(real, imaginary)], dtype=object), n)


def _rounded_quotients(real, imaginary, whole, powers):
    """(re + i im) 10^k / whole rounded once per part (Python's integer quotient is correctly rounded, as
    ``float(Fraction)`` is); None where the exact route would meet its size limit (it raises there)."""
    bits = whole.bit_length() + max((abs(k) for k in powers), default=0) * 4 \
        + max((abs(v).bit_length() for v in real + imaginary), default=0)
    if bits > MAX_COEFFICIENT_BITS:
        return None
    tens = {}
    values = np.empty(len(real), dtype=complex)
    for t, (re, im, k) in enumerate(zip(real, imaginary, powers)):
        if k not in tens:
            tens[k] = 10 ** abs(k)
        if k >= 0:
            values[t] = complex(re * tens[k] / whole, im * tens[k] / whole)
        else:
            below = whole * tens[k]
            values[t] = complex(re / below, im / below)
    return values


#: The direct translation (:func:`_translated_integers`) applies to polynomials with at most this many (term,
#: shifted term) pairs; beyond, the general substitution with its size limits is used.
_DIRECT_TRANSLATION_PAIRS = 200_000


def _gaussian_parts(value):
    """(real, imaginary) Fractions of a Gaussian rational (exact, or a double read as the dyadic rational it is);
    None for a number with a square root."""
    if isinstance(value, ExactCoefficient):
        parts = value.parts
        if any(radicand != 1 for radicand in parts):
            return None
        return parts.get(1, (Fraction(0), Fraction(0)))
    value = complex(value)
    if not (np.isfinite(value.real) and np.isfinite(value.imag)):
        return None
    return Fraction(value.real), Fraction(value.imag)


def _integer_form(polynomial):
    """A polynomial's side of :func:`_translated_integers`: (exponents, Gaussian integer numerators, their
    denominator), or None where the direct translation does not apply (a square root, too many pairs)."""
    exponents = np.asarray(polynomial.exponents, dtype=np.int64)
    if len(exponents) == 0:
        return None
    if int(np.sum(np.prod(exponents + 1, axis=1))) > _DIRECT_TRANSLATION_PAIRS:
        return None
    coefficients = [_gaussian_parts(c) for c in polynomial.coefficients]
    if any(c is None for c in coefficients):
        return None
    denominator = math.lcm(*(q.denominator for pair in coefficients for q in pair))
    numerators = [(re.numerator * (denominator // re.denominator), im.numerator * (denominator // im.denominator))
                  for re, im in coefficients]
    return exponents, numerators, denominator


def _translated_integers(form, centre):
    """p(y + s) as Gaussian integers over one common denominator: (exponents, real numerators, imaginary
    numerators, denominator), the zero terms left out, for the polynomial of ``form`` (:func:`_integer_form`); None
    where the centre has a square root.

    With the coefficients (a + b i) / D and the centre (A_j + B_j i) / Q, D Q^deg p(y + s) is
    sum_e (a_e + b_e i) Q^(deg - |e|) prod_j (A_j + B_j i + Q y_j)^(e_j): every product is of Python integers (the
    general substitution multiplies sums of exact numbers and spent 0.1 s per point on a sextic surface; the
    non-reduced sampling centres every candidate, decision 0084). The translation is made one coordinate at a
    time, (A + Q y)^e = sum_k C(e, k) A^(e - k) Q^k y^k (the binomial theorem), merging equal monomials after
    each coordinate, so the work is that of the terms the translation has, not of every pair of a term and a
    shifted term (decision 0138). Applies to Gaussian rational coefficients and centres (every double is one)
    up to :data:`_DIRECT_TRANSLATION_PAIRS` pairs; exactly the polynomial :meth:`Polynomial.substitute_linear`
    gives.
    """
    exponents, numerators, denominator = form
    n = exponents.shape[1]
    shift = [_gaussian_parts(c) for c in centre]
    if any(c is None for c in shift) or len(shift) != n:
        return None
    common = math.lcm(*(q.denominator for pair in shift for q in pair))
    centre_integers = [(re.numerator * (common // re.denominator), im.numerator * (common // im.denominator))
                       for re, im in shift]
    degree = int(exponents.sum(axis=1).max())
    common_powers = [common ** m for m in range(degree + 1)]
    # a monomial's key is its exponent written in base degree + 1: translating coordinate j moves the key by a
    # multiple of place[j] (integer keys: no tuples built per product)
    base = degree + 1
    place = [base ** j for j in range(n)]
    keys = (exponents @ np.array(place, dtype=object)).tolist() if n else [0] * len(exponents)
    terms = {}  # key -> (real, imaginary) of D Q^deg p, coordinates before j translated
    for (re, im), key, total in zip(numerators, keys, exponents.sum(axis=1).tolist()):
        scale = common_powers[degree - total]
        terms[key] = (re * scale, im * scale)
    top = exponents.max(axis=0).tolist()
    for j in range(n):
        if top[j] == 0:
            continue
        a, b = centre_integers[j]
        powers = [(1, 0)]  # (A_j + B_j i)^m
        for _ in range(top[j]):
            re, im = powers[-1]
            powers.append((re * a - im * b, re * b + im * a))
        # weights[e][k] = C(e, k) (A_j + B_j i)^(e - k) Q^k, with k's step of the key
        p = place[j]
        weights = [[(k * p, math.comb(e, k) * common_powers[k] * powers[e - k][0],
                     math.comb(e, k) * common_powers[k] * powers[e - k][1]) for k in range(e + 1)]
                   for e in range(top[j] + 1)]
        grown = {}
        get = grown.get
        for key, (re, im) in terms.items():
            e = (key // p) % base
            lowest = key - e * p
            for step, wa, wb in weights[e]:
                target = lowest + step
                total = get(target)
                if total is None:
                    grown[target] = (re * wa - im * wb, re * wb + im * wa)
                else:
                    grown[target] = (total[0] + re * wa - im * wb, total[1] + re * wb + im * wa)
        terms = grown
    kept = [(key, re, im) for key, (re, im) in terms.items() if re or im]
    whole = denominator * common_powers[degree]
    rows = [[(key // p) % base for p in place] for key, _, _ in kept]
    return (np.array(rows, dtype=np.int64).reshape(len(kept), n), [re for _, re, _ in kept],
            [im for _, _, im in kept], whole)


def has_no_zero_near_origin(system, radius):
    """Whether some equation of ``system`` provably has no zero with every |y_j| <= ``radius`` (so none in the
    ball of that radius about the origin).

    For f(y) = c_0 + sum_(a != 0) c_a y^a and |y_j| <= r, |f(y) - c_0| <= sum_(a != 0) |c_a| r^|a|; where that
    sum is below |c_0| the equation cannot vanish there. Applied to a centred system (:func:`centred_system`,
    exact coefficients) it proves that X has no point in a region, without a homotopy; the factor 2 covers the
    rounding of the coefficients and the sum in double. The test is scale- and translation-free: it compares
    the equation's own Taylor coefficients at the centre.

    Parameters
    ----------
    system : PolynomialSystem
    radius : float

    Returns
    -------
    bool

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> circle = parse_system(["x^2 + y^2 - 1"], ["x", "y"])  # about its centre: no zero within 0.4
    >>> has_no_zero_near_origin(circle, 0.4), has_no_zero_near_origin(circle, 0.8)
    (True, False)
    """
    for polynomial in system.polynomials:
        if polynomial.n_terms == 0:
            continue
        degrees = polynomial.exponents.sum(axis=1)
        sizes = np.abs(polynomial.numeric_coefficients())
        constant = float(sizes[degrees == 0].sum())
        rest = float(np.sum(sizes[degrees > 0] * float(radius) ** degrees[degrees > 0]))
        if constant > 2 * rest:
            return True
    return False


def within(points, centring):
    """Which rows of ``points`` (in the original coordinates) lie in the centring's region."""
    points = np.atleast_2d(np.asarray(points, dtype=complex))
    if points.shape[0] == 0:
        return np.zeros(0, dtype=bool)
    return np.linalg.norm(points - centring.point[None, :], axis=1) <= centring.radius


def translated_terms(system):
    """How many terms the centred system can have at most: each term x^e becomes prod(e_j + 1) terms.

    Callers that centre for every point (membership, the non-reduced sampling: decision 0084) skip systems above
    a bound, where writing the translation out would cost more than the test.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> translated_terms(parse_system(["x^2*y - 1"], ["x", "y"]))  # x^2 y -> 3 * 2 terms, 1 -> 1
    7
    """
    return sum(int(np.sum(np.prod(np.asarray(p.exponents, dtype=np.int64) + 1, axis=1))) if p.n_terms else 0
               for p in system.polynomials)


def subleading_centre(system):
    """The translation that clears every equation's subleading form, when the leading forms determine it; else None.

    Writing F(x) = G(x - c) with each g of degree d having no terms of degree d - 1 gives, per equation,
    f_{d-1}(x) + grad f_d(x) . c = 0: linear in c, one row per monomial of degree d - 1. Solved by least
    squares over all equations (each equation's rows scaled to its largest, so units do not weigh), it moves with
    the input: translating F by t moves the result by t exactly, so a run centred there does not depend on where
    the user put the origin. It locates the centre of symmetric features (a Chebyshev-type surface, circles); it
    says nothing in directions the leading forms do not see (x^5 + y: no row for y), and then None is returned.

    Parameters
    ----------
    system : PolynomialSystem
        Affine.

    Returns
    -------
    ndarray, shape (n,), or None
        c (complex doubles); None when the rows do not determine every coordinate (scaled singular values
        below 1e-8) or no equation has degree 1 or more.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> surface = parse_system(["(x - 1234)^4 - (x - 1234)^2 + (y + 2345)^4 - (y + 2345)^2 - 1/4"], ["x", "y"])
    >>> np.round(subleading_centre(surface).real, 9).tolist()
    [1234.0, -2345.0]
    >>> subleading_centre(parse_system(["x^5 + y"], ["x", "y"])) is None
    True
    """
    n = system.n_variables
    blocks, right = [], []
    for polynomial in system.polynomials:
        polynomial = polynomial.numeric()
        d = polynomial.degree
        if d < 1:
            continue
        degrees = polynomial.exponents.sum(axis=1)
        leading = Polynomial(polynomial.exponents[degrees == d], polynomial.coefficients[degrees == d], n)
        below = {tuple(e): c for e, c in zip(polynomial.exponents[degrees == d - 1],
                                               polynomial.coefficients[degrees == d - 1])}
        partials = [{tuple(e): c for e, c in zip(p.exponents, p.coefficients)} for p in leading.gradient()]
        monomials = sorted(set(below).union(*partials))
        block = np.array([[partial.get(m, 0) for partial in partials] for m in monomials], dtype=complex)
        column = -np.array([below.get(m, 0) for m in monomials], dtype=complex)
        size = np.max(np.abs(block)) if block.size else 0.0
        if size > 0:
            blocks.append(block / size)
            right.append(column / size)
    if not blocks:
        return None
    rows, values = np.vstack(blocks), np.concatenate(right)
    if rows.shape[0] < n:
        return None
    singular_values = np.linalg.svd(rows, compute_uv=False)
    if singular_values[-1] <= 1e-8 * singular_values[0]:
        return None
    return np.linalg.lstsq(rows, values, rcond=None)[0]
