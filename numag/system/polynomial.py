"""Sparse polynomials and polynomial systems.

A :class:`Polynomial` is an integer exponent array (one row per term, one
column per variable) and a coefficient array. Coefficients are either exact
(:class:`~numag.system.exact.ExactCoefficient`, an object array: parsed input stays
exact so that it can be evaluated at any precision) or complex doubles (what
random combinations and linear changes of coordinates produce). Mixing the
two gives complex doubles.

A :class:`PolynomialSystem` is a list of polynomials over named variables,
affine or projective.

Examples
--------
>>> x, y = Polynomial.variable(0, 2), Polynomial.variable(1, 2)
>>> f = x * x - y ** 3
>>> f.to_text(["x", "y"])
'-y^3 + x^2'
>>> f.derivative(1).to_text(["x", "y"])
'-3*y^2'
"""

from dataclasses import dataclass
from fractions import Fraction
import math

import numpy as np

from ..errors import InputError, LimitError
from .exact import ExactCoefficient

__all__ = ["Limits", "DEFAULT_LIMITS", "Polynomial", "PolynomialSystem", "RESERVED_NAMES", "determinant",
           "prepared_for_numerics", "MAX_COEFFICIENT_SPREAD", "regeneration_bound",
           "require_numeric", "LinearSpace", "linear_space", "sorted_unique_rows"]

#: Names the grammar reserves; no variable may use them.
RESERVED_NAMES = frozenset({"I", "sqrt"})


@dataclass(frozen=True)
class Limits:
    """Size limits that keep hostile or mistaken input from exhausting the machine.

    Attributes
    ----------
    max_degree : int
        Largest total degree of a polynomial.
    max_terms : int
        Largest number of terms of one polynomial.
    max_variables : int
        Largest number of variables of a system.
    max_equations : int
        Largest number of equations of a system.
    max_term_products : int
        Largest number of term-by-term products one multiplication may form.
    """

    max_degree: int = 1000
    max_terms: int = 200_000
    max_variables: int = 1000
    max_equations: int = 10_000
    max_term_products: int = 2_000_000


DEFAULT_LIMITS = Limits()
_ZERO = ExactCoefficient.zero()
_ONE = ExactCoefficient.rational(1)


def _is_exact_array(coefficients):
    return coefficients.dtype == object


def _as_numeric(coefficients):
    if _is_exact_array(coefficients):
        return np.array([complex(c) for c in coefficients], dtype=complex)
    return coefficients


class Polynomial:
    """A sparse polynomial in ``n_variables`` variables.

    Parameters
    ----------
    exponents : array_like of int, shape (terms, n_variables)
        Exponent of each variable in each term.
    coefficients : array_like, shape (terms,)
        ``ExactCoefficient`` objects (exact polynomial) or complex numbers.
    n_variables : int, optional
        Needed only when there are no terms.

    Notes
    -----
    The constructor merges equal monomials, drops zero coefficients and
    sorts the terms (ascending lexicographic exponent order), so equal
    polynomials have equal arrays.
    """

    __slots__ = ("exponents", "coefficients", "n_variables", "_numeric")

    def __init__(self, exponents, coefficients, n_variables=None):
        exponents = np.asarray(exponents, dtype=np.int64)
        if n_variables is None:
            if exponents.ndim != 2:
                raise InputError("n_variables is needed for a polynomial without terms")
            n_variables = exponents.shape[1]
        if exponents.ndim != 2 or exponents.shape[1] != n_variables:
            exponents = exponents.reshape(len(np.ravel(coefficients)), n_variables)
        if isinstance(coefficients, np.ndarray) and coefficients.dtype == object:
            coefficients = coefficients.copy()
        elif any(isinstance(c, ExactCoefficient) for c in np.ravel(np.asarray(coefficients, dtype=object))):
            coefficients = np.array(list(coefficients), dtype=object)
        else:
            coefficients = np.asarray(coefficients, dtype=complex).reshape(-1)
        if len(coefficients) != len(exponents):
            raise InputError("exponents and coefficients must have the same number of terms")
        if np.any(exponents < 0):
            raise InputError("exponents must be non-negative")
        self.n_variables = int(n_variables)
        self.exponents, self.coefficients = _merge_terms(exponents, coefficients)
        self.exponents.setflags(write=False)
        self.coefficients.setflags(write=False)
        self._numeric = None

    # -- constructors ---------------------------------------------------------------------------
    @classmethod
    def zero(cls, n_variables):
        """The zero polynomial."""
        return cls(np.zeros((0, n_variables), dtype=np.int64), np.zeros(0, dtype=object), n_variables)

    @classmethod
    def constant(cls, value, n_variables):
        """A constant polynomial; ``value`` is an ``ExactCoefficient`` or a number."""
        if isinstance(value, (int, Fraction)):
            value = ExactCoefficient.rational(value)
        coefficients = np.array([value], dtype=object if isinstance(value, ExactCoefficient) else complex)
        return cls(np.zeros((1, n_variables), dtype=np.int64), coefficients, n_variables)

    @classmethod
    def variable(cls, index, n_variables):
        """The polynomial ``x_index`` (exact coefficient 1)."""
        if not 0 <= index < n_variables:
            raise InputError(f"variable index {index} out of range for {n_variables} variables")
        exponents = np.zeros((1, n_variables), dtype=np.int64)
        exponents[0, index] = 1
        return cls(exponents, np.array([_ONE], dtype=object), n_variables)

    @classmethod
    def linear(cls, coefficients, constant=0.0):
        """The affine-linear polynomial ``sum_j a_j x_j + constant`` with complex coefficients."""
        coefficients = np.asarray(coefficients, dtype=complex).reshape(-1)
        n = len(coefficients)
        exponents = np.vstack([np.eye(n, dtype=np.int64), np.zeros((1, n), dtype=np.int64)])
        return cls(exponents, np.append(coefficients, complex(constant)), n)

    # -- queries --------------------------------------------------------------------------------
    @property
    def n_terms(self):
        """Number of terms with a nonzero coefficient."""
        return len(self.coefficients)

    @property
    def is_exact(self):
        """True when the coefficients are exact numbers."""
        return _is_exact_array(self.coefficients)

    @property
    def degree(self):
        """Total degree (-1 for the zero polynomial, so that a constant has degree 0)."""
        return int(self.exponents.sum(axis=1).max()) if self.n_terms else -1

    def is_zero(self):
        """True for the zero polynomial."""
        return self.n_terms == 0

    def is_homogeneous(self):
        """True when every term has the same total degree (the zero polynomial counts)."""
        if self.n_terms == 0:
            return True
        degrees = self.exponents.sum(axis=1)
        return bool(np.all(degrees == degrees[0]))

    def numeric_coefficients(self):
        """The coefficients as a complex array (exact ones rounded once, then cached)."""
        if self._numeric is None:
            self._numeric = _as_numeric(self.coefficients)
            self._numeric.setflags(write=False)
        return self._numeric

    def coefficient_norm(self):
        """Euclidean norm of the coefficient vector."""
        return float(np.linalg.norm(self.numeric_coefficients()))

    def _with_coefficients(self, coefficients):
        """These terms with other (complex) coefficients, a fresh array the new polynomial keeps: exactly what the
        constructor gives (zero terms dropped), without sorting and merging terms that are sorted and distinct
        already (a numeric copy of every equation is made for each evaluator; decision 0138)."""
        coefficients = np.asarray(coefficients, dtype=complex).reshape(-1)
        keep = coefficients != 0
        made = object.__new__(Polynomial)
        made.n_variables = self.n_variables
        if np.all(keep):
            made.exponents, made.coefficients = self.exponents, coefficients
        else:
            made.exponents, made.coefficients = self.exponents[keep], coefficients[keep]
        made.exponents.setflags(write=False)
        made.coefficients.setflags(write=False)
        made._numeric = None
        return made

    def numeric(self):
        """The same polynomial with complex double coefficients."""
        return self._with_coefficients(np.array(self.numeric_coefficients()))

    def absolute(self):
        """The polynomial whose coefficients are the moduli of these (real doubles, as complex).

        Evaluated at the moduli of a point's coordinates it bounds the terms' sizes there.

        Examples
        --------
        >>> x = Polynomial.variable(0, 1)
        >>> (x * x - 3).absolute().to_text(["x"])
        '1.0*x^2 + 3.0'
        """
        return self._with_coefficients(np.abs(self.numeric_coefficients()).astype(complex))

    def scaled(self, factor):
        """The polynomial times a number, with complex double coefficients (one construction, no product).

        Examples
        --------
        >>> x = Polynomial.variable(0, 1)
        >>> (x * x + 1).scaled(0.5).to_text(["x"])
        '0.5*x^2 + 0.5'
        """
        return self._with_coefficients(np.array(self.numeric_coefficients()) * factor)

    def __eq__(self, other):
        if not isinstance(other, Polynomial) or other.n_variables != self.n_variables:
            return NotImplemented if not isinstance(other, Polynomial) else False
        if self.is_exact != other.is_exact:
            return False
        return (self.exponents.shape == other.exponents.shape
                and bool(np.all(self.exponents == other.exponents))
                and all(a == b for a, b in zip(self.coefficients, other.coefficients)))

    __hash__ = None

    def __repr__(self):
        names = [f"x{j}" for j in range(self.n_variables)]
        return f"Polynomial({self.to_text(names)!r})"

    # -- arithmetic -----------------------------------------------------------------------------
    def _coerce(self, other):
        if isinstance(other, Polynomial):
            if other.n_variables != self.n_variables:
                raise InputError(f"polynomials in {self.n_variables} and {other.n_variables} "
                                 "variables cannot be combined")
            return other
        if isinstance(other, (int, Fraction, ExactCoefficient)):
            return Polynomial.constant(other, self.n_variables)
        if isinstance(other, (float, complex, np.number)):
            return Polynomial.constant(complex(other), self.n_variables)
        return NotImplemented

    @staticmethod
    def _pair_coefficients(a, b):
        if _is_exact_array(a.coefficients) and _is_exact_array(b.coefficients):
            return a.coefficients, b.coefficients
        return a.numeric_coefficients(), b.numeric_coefficients()

    def __add__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return other
        ca, cb = self._pair_coefficients(self, other)
        return Polynomial(np.vstack([self.exponents, other.exponents]),
                          np.concatenate([ca, cb]), self.n_variables)

    __radd__ = __add__

    def __neg__(self):
        return Polynomial(self.exponents, -self.coefficients, self.n_variables)

    def __sub__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return other
        return self + (-other)

    def __rsub__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return other
        return other + (-self)

    def multiply(self, other, limits=DEFAULT_LIMITS):
        """Product with a size check against ``limits``.

        Raises
        ------
        LimitError
            When the product would exceed the degree, term or work limits.
        """
        other = self._coerce(other)
        if self.n_terms == 0 or other.n_terms == 0:
            return Polynomial.zero(self.n_variables)
        degree = self.degree + other.degree
        if degree > limits.max_degree:
            raise LimitError(f"degree {degree} exceeds the limit of {limits.max_degree}",
                             "max_degree", limits.max_degree)
        pairs = self.n_terms * other.n_terms
        if pairs > limits.max_term_products:
            raise LimitError(f"a product of {self.n_terms} by {other.n_terms} terms exceeds the "
                             f"limit of {limits.max_term_products} term products",
                             "max_term_products", limits.max_term_products)
        exponents = (self.exponents[:, None, :] + other.exponents[None, :, :]).reshape(
            pairs, self.n_variables)
        integral_a, integral_b = _gaussian_integers(self), _gaussian_integers(other)
        if integral_a is not None and integral_b is not None:
            product = _from_gaussian(_gaussian_product(integral_a, integral_b), self.n_variables)
        else:
            ca, cb = self._pair_coefficients(self, other)
            if ca.dtype == object:  # square roots: each coefficient product costs (terms a) x (terms b)
                work = pairs * max(len(c.parts) for c in ca) * max(len(c.parts) for c in cb)
                if work > limits.max_term_products:
                    raise LimitError(f"a product of {self.n_terms} by {other.n_terms} terms with square roots "
                                     f"is {work} exact multiplications, over the limit of "
                                     f"{limits.max_term_products}", "max_term_products", limits.max_term_products)
            coefficients = np.multiply.outer(ca, cb).reshape(-1)
            product = Polynomial(exponents, coefficients, self.n_variables)
        if product.n_terms > limits.max_terms:
            raise LimitError(f"{product.n_terms} terms exceed the limit of {limits.max_terms}",
                             "max_terms", limits.max_terms)
        return product

    def __mul__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return other
        return self.multiply(other)

    __rmul__ = __mul__

    def power(self, exponent, limits=DEFAULT_LIMITS):
        """``self ** exponent`` for a non-negative integer, with size checks before expanding.

        Raises
        ------
        LimitError
            When the result's degree would exceed ``limits.max_degree`` (checked before any
            work, so ``x^1000000000`` fails at once) or its size the term limits.
        """
        if not isinstance(exponent, (int, np.integer)) or exponent < 0:
            raise InputError(f"exponent must be a non-negative integer, got {exponent!r}")
        exponent = int(exponent)
        if self.degree > 0 and self.degree * exponent > limits.max_degree:
            raise LimitError(f"degree {self.degree}*{exponent} = {self.degree * exponent} exceeds the "
                             f"limit of {limits.max_degree}", "max_degree", limits.max_degree)
        if self.degree <= 0:
            if self.n_terms == 0:
                return Polynomial.constant(1, self.n_variables) if exponent == 0 else self
            return Polynomial.constant(self.coefficients[0] ** exponent if self.is_exact
                                       else complex(self.coefficients[0]) ** exponent, self.n_variables)
        involved = int(np.count_nonzero(self.exponents.any(axis=0)))
        bound = min(math.comb(self.n_terms + exponent - 1, exponent),
                    math.comb(involved + self.degree * exponent, involved))
        if bound > limits.max_terms and bound * self.n_terms * exponent > limits.max_term_products:
            raise LimitError(f"expanding a {self.n_terms}-term polynomial to the power {exponent} may give "
                             f"{bound} terms, more than the limit of {limits.max_terms}",
                             "max_terms", limits.max_terms)
        if exponent == 0:
            return Polynomial.constant(1, self.n_variables)
        if self.n_terms == 1:  # a monomial: x^1000 is one term, not a thousand products
            coefficient = self.coefficients[0] ** exponent if self.is_exact else complex(self.coefficients[0]) ** exponent
            return Polynomial(self.exponents * exponent, np.array([coefficient], dtype=self.coefficients.dtype),
                              self.n_variables)
        integral = _gaussian_integers(self)
        if integral is not None:  # stay in integer arithmetic for the whole expansion
            accumulated = integral
            for _ in range(exponent - 1):
                accumulated = _gaussian_product(accumulated, integral)
                if len(accumulated[0]) > limits.max_terms:
                    raise LimitError(f"{len(accumulated[0])} terms exceed the limit of {limits.max_terms}",
                                     "max_terms", limits.max_terms)
            return _from_gaussian(accumulated, self.n_variables)
        result = Polynomial.constant(1, self.n_variables)
        for _ in range(exponent):  # repeated multiplication keeps intermediate sizes smallest
            result = result.multiply(self, limits)
        return result

    def __pow__(self, exponent):
        return self.power(exponent)

    def derivative(self, index):
        """Partial derivative with respect to variable ``index``."""
        powers = self.exponents[:, index]
        keep = powers > 0
        exponents = self.exponents[keep].copy()
        exponents[:, index] -= 1
        if self.is_exact:
            coefficients = np.array([c.times_integer(int(k)) if isinstance(c, ExactCoefficient) else c * int(k)
                                     for c, k in zip(self.coefficients[keep], powers[keep])], dtype=object)
        else:
            coefficients = self.coefficients[keep] * powers[keep]
        return Polynomial(exponents, coefficients, self.n_variables)

    def gradient(self):
        """List of the partial derivatives."""
        return [self.derivative(j) for j in range(self.n_variables)]

    def homogenize(self, position=0):
        """Homogenise with a new variable inserted at ``position`` (degree kept).

        Examples
        --------
        >>> x = Polynomial.variable(0, 1)
        >>> (x * x + 1).homogenize(0).to_text(["w", "x"])
        'w^2 + x^2'
        """
        degrees = self.exponents.sum(axis=1)
        top = self.degree if self.n_terms else 0
        exponents = np.insert(self.exponents, position, top - degrees, axis=1)
        return Polynomial(exponents, self.coefficients, self.n_variables + 1)

    def dehomogenize(self, position=0):
        """Set variable ``position`` to 1 and drop it."""
        exponents = np.delete(self.exponents, position, axis=1)
        return Polynomial(exponents, self.coefficients, self.n_variables - 1)

    def substitute_linear(self, matrix, offset=None, limits=DEFAULT_LIMITS):
        """Compose with the affine map ``x = matrix @ y + offset``.

        Parameters
        ----------
        matrix : array_like, shape (n_variables, k)
            Coefficients of the new variables ``y`` in each old variable.
        offset : array_like, shape (n_variables,), optional

        Returns
        -------
        Polynomial
            In ``k`` variables: exact when the polynomial is exact, ``matrix`` holds integers and ``offset``
            integers, fractions or exact numbers (a centring shift, decision 0071), otherwise with complex
            coefficients.

        Examples
        --------
        >>> x, y = Polynomial.variable(0, 2), Polynomial.variable(1, 2)
        >>> (x * y).substitute_linear(np.array([[1, 1], [1, -1]])).to_text(["u", "v"])
        'u^2 - v^2'
        """
        exact_offset = offset is None or np.asarray(offset).dtype.kind in "iu" or all(
            isinstance(value, (int, Fraction, ExactCoefficient))
            for value in np.ravel(np.asarray(offset, dtype=object)))
        exact = self.is_exact and np.asarray(matrix).dtype.kind in "iu" and exact_offset
        matrix = np.asarray(matrix, dtype=np.int64 if exact else complex)
        if matrix.ndim != 2 or matrix.shape[0] != self.n_variables:
            raise InputError(f"matrix must have shape ({self.n_variables}, k), got {matrix.shape}")
        k = matrix.shape[1]
        if exact:  # integer weights keep exact coefficients exact (a singular point stays exactly singular)
            offset = [0] * self.n_variables if offset is None else [
                value if isinstance(value, (Fraction, ExactCoefficient)) else int(value) for value in offset]
            forms = []
            for j in range(self.n_variables):
                form = Polynomial.constant(offset[j], k)
                for col in np.nonzero(matrix[j])[0]:
                    form = form + Polynomial.variable(int(col), k) * int(matrix[j, col])
                forms.append(form)
        else:
            offset = np.zeros(self.n_variables, dtype=complex) if offset is None else np.asarray(offset, complex)
            forms = [Polynomial.linear(matrix[j], offset[j]) for j in range(self.n_variables)]
        cache = {}

        def form_power(j, e):
            if (j, e) not in cache:
                cache[(j, e)] = forms[j].power(int(e), limits)
            return cache[(j, e)]

        result = Polynomial.zero(k)
        for exponent_row, coefficient in zip(self.exponents, self.coefficients if exact else
                                             self.numeric_coefficients()):
            term = Polynomial.constant(coefficient if exact else complex(coefficient), k)
            for j in np.nonzero(exponent_row)[0]:
                term = term.multiply(form_power(j, exponent_row[j]), limits)
            result = result + term
        return result

    def fix_variables(self, indices, values):
        """The polynomial in the other variables after setting variables ``indices`` to ``values``.

        Parameters
        ----------
        indices : sequence of int
            Variables to fix (they are removed; the others keep their order).
        values : array_like of complex
            One value per index.

        Returns
        -------
        Polynomial
            In ``n_variables - len(indices)`` variables, with complex coefficients (equal monomials merged).

        Examples
        --------
        >>> x, p = Polynomial.variable(0, 2), Polynomial.variable(1, 2)
        >>> (p * x * x - p - 1).fix_variables([1], [2.0]).to_text(["x"])
        '2.0*x^2 - 3.0'
        """
        indices = [int(k) for k in indices]
        values = np.asarray(values, dtype=complex).reshape(-1)
        if len(values) != len(indices) or len(set(indices)) != len(indices) or not all(
                0 <= k < self.n_variables for k in indices):
            raise InputError(f"fix_variables needs distinct variable indices below {self.n_variables} and one value "
                             f"each, got {indices} and {len(values)} values")
        kept = [k for k in range(self.n_variables) if k not in set(indices)]
        factors = np.prod(values[None, :] ** self.exponents[:, indices], axis=1) if indices else 1.0
        return Polynomial(self.exponents[:, kept], self.numeric_coefficients() * factors, len(kept))

    def evaluate(self, point):
        """Value at one point in complex double precision (the slow, simple path; see ``numag.numeric.evaluate``)."""
        point = np.asarray(point, dtype=complex)
        return complex(np.sum(self.numeric_coefficients() * np.prod(point ** self.exponents, axis=1)))

    def evaluate_exact(self, point, powers=None):
        """Value at a point of exact coordinates, in exact arithmetic (an exact polynomial only).

        Parameters
        ----------
        point : sequence of ExactCoefficient
        powers : list of lists, optional
            A cache of the coordinates' powers (``powers[j][e]`` is ``point[j] ** e``), shared by the
            polynomials of one system at one point; filled as needed.

        Examples
        --------
        >>> from numag.system.parse import parse_polynomial
        >>> f = parse_polynomial("(y - 2)^2 - ((x - 1)^2 - 1/1000000)^2", ["x", "y"])
        >>> f.evaluate_exact([ExactCoefficient.rational(1), ExactCoefficient.rational(2)]).to_text()
        '-1/1000000000000'
        """
        if not self.is_exact:
            raise ValueError("evaluate_exact needs exact coefficients")
        powers = [[ExactCoefficient.rational(1)] for _ in point] if powers is None else powers
        total = ExactCoefficient.zero()
        for row, coefficient in zip(self.exponents, self.coefficients):
            term = coefficient
            for j, e in enumerate(row):
                if e:
                    while len(powers[j]) <= e:
                        powers[j].append(powers[j][-1] * point[j])
                    term = term * powers[j][int(e)]
            total = total + term
        return total

    # -- text -----------------------------------------------------------------------------------
    def to_text(self, names):
        """Text in the equation grammar; :func:`numag.system.parse.parse_polynomial` reads it back exactly.

        Terms are written by descending total degree.
        """
        if len(names) != self.n_variables:
            raise InputError(f"{len(names)} names given for {self.n_variables} variables")
        if self.n_terms == 0:
            return "0"
        degrees = self.exponents.sum(axis=1)
        order = np.lexsort(tuple(-self.exponents.T[::-1]) + (-degrees,))
        text = ""
        for t in order:
            monomial = "*".join(names[j] if e == 1 else f"{names[j]}^{e}"
                                for j, e in enumerate(self.exponents[t]) if e)
            negative, magnitude = _coefficient_text(self.coefficients[t])
            if monomial:
                body = monomial if magnitude == "1" else f"{magnitude}*{monomial}"
            else:
                body = magnitude
            if not text:
                text = f"-{body}" if negative else body
            else:
                text += f" - {body}" if negative else f" + {body}"
        return text


def _coefficient_text(coefficient):
    """Split a coefficient into (negative sign?, text of the rest) for a readable sum."""
    if isinstance(coefficient, ExactCoefficient):
        text = coefficient.to_text()
        if coefficient.is_single_term() and text.startswith("-") and " " not in text:
            return True, text[1:]
        return False, text if " " not in text else f"({text})"
    value = complex(coefficient)
    if not (math.isfinite(value.real) and math.isfinite(value.imag)):
        raise InputError(f"cannot write the non-finite coefficient {value}")
    if value.imag == 0:
        return (value.real < 0 or math.copysign(1, value.real) < 0), repr(abs(value.real))
    if value.real == 0:
        return value.imag < 0, f"{repr(abs(value.imag))}*I"
    sign = "-" if value.imag < 0 else "+"
    return False, f"({repr(value.real)} {sign} {repr(abs(value.imag))}*I)"


def _gaussian_integers(polynomial):
    """Exact Gaussian-rational coefficients as (real numerators, imaginary numerators, denominator).

    Returns None for numeric polynomials or coefficients with square roots. Python
    integers in object arrays multiply some fifty times faster than exact numbers,
    which is what makes expanding powers of exact polynomials affordable.
    """
    if not polynomial.is_exact:
        return None
    pairs = []
    for c in polynomial.coefficients:
        parts = c.parts
        if set(parts) - {1}:
            return None
        pairs.append(parts.get(1, (Fraction(0), Fraction(0))))
    denominator = 1
    for re, im in pairs:
        denominator = math.lcm(denominator, re.denominator, im.denominator)
    real = np.array([int(re * denominator) for re, _ in pairs], dtype=object)
    imag = np.array([int(im * denominator) for _, im in pairs], dtype=object)
    return polynomial.exponents, real, imag, denominator


def _unique_rows(exponents):
    """``np.unique(rows, return_inverse=True)`` through one integer key per row when it fits in int64."""
    if len(exponents) == 0:
        return exponents, np.zeros(0, dtype=np.int64)
    if exponents.shape[1] == 0:  # constants: every row is the same monomial
        return exponents[:1], np.zeros(len(exponents), dtype=np.int64)
    base = int(exponents.max()) + 1
    if exponents.shape[1] and base ** exponents.shape[1] < 2**62:
        keys = exponents @ (base ** np.arange(exponents.shape[1], dtype=np.int64))
        unique_keys, first, inverse = np.unique(keys, return_index=True, return_inverse=True)
        return exponents[first], inverse.reshape(-1)
    unique, inverse = np.unique(exponents, axis=0, return_inverse=True)
    return unique, inverse.reshape(-1)


def _gaussian_product(a, b):
    """Product of two polynomials given as (exponents, real numerators, imaginary numerators, denominator)."""
    (ea, ra, ia, da), (eb, rb, ib, db) = a, b
    exponents = (ea[:, None, :] + eb[None, :, :]).reshape(len(ea) * len(eb), ea.shape[1])
    real = (np.multiply.outer(ra, rb) - np.multiply.outer(ia, ib)).reshape(-1)
    imag = (np.multiply.outer(ra, ib) + np.multiply.outer(ia, rb)).reshape(-1)
    unique, inverse = _unique_rows(exponents)
    merged_real = np.zeros(len(unique), dtype=object)
    merged_imag = np.zeros(len(unique), dtype=object)
    np.add.at(merged_real, inverse, real)
    np.add.at(merged_imag, inverse, imag)
    keep = (merged_real != 0) | (merged_imag != 0)
    return unique[keep], merged_real[keep], merged_imag[keep], da * db


def _from_gaussian(data, n_variables):
    exponents, real, imag, denominator = data
    coefficients = np.array([ExactCoefficient.rational(Fraction(int(r), denominator), Fraction(int(i), denominator))
                             for r, i in zip(real, imag)], dtype=object)
    return Polynomial(exponents.reshape(len(coefficients), n_variables), coefficients, n_variables)


def sorted_unique_rows(exponents):
    """``np.unique(rows, axis=0, return_inverse=True)`` by a lexicographic sort of the columns.

    The same sorted rows and inverse; np.unique's row mode builds a structured type with a field per
    column, which took 8 ms for a two-term equation in 1,000 variables (a system of 1,000 linear
    equations spent half a minute here; the evaluator's monomial table, 5-10 ms of every `numag solve`).

    Examples
    --------
    >>> rows, inverse = sorted_unique_rows(np.array([[1, 0], [0, 2], [1, 0]]))
    >>> rows.tolist(), inverse.tolist()
    ([[0, 2], [1, 0]], [1, 0, 1])
    """
    if exponents.shape[1] == 0:
        return exponents[:1], np.zeros(len(exponents), dtype=np.int64)
    order = np.lexsort(exponents.T[::-1])  # the first column is the primary key
    ordered = exponents[order]
    starts = np.ones(len(ordered), dtype=bool)
    starts[1:] = np.any(ordered[1:] != ordered[:-1], axis=1)
    inverse = np.empty(len(ordered), dtype=np.int64)
    inverse[order] = np.cumsum(starts) - 1
    return ordered[starts], inverse


def _merge_terms(exponents, coefficients):
    """Merge equal monomials, drop zero coefficients, sort lexicographically."""
    n = exponents.shape[1]
    if len(exponents) == 0:
        return exponents.reshape(0, n), coefficients[:0]
    unique, inverse = sorted_unique_rows(exponents)
    if len(unique) == len(exponents):
        merged = np.empty_like(coefficients)
        merged[inverse] = coefficients
    elif _is_exact_array(coefficients):
        merged = np.array([_ZERO] * len(unique), dtype=object)
        np.add.at(merged, inverse, coefficients)
    else:
        merged = np.zeros(len(unique), dtype=complex)
        np.add.at(merged, inverse, coefficients)
    if _is_exact_array(merged):
        keep = np.array([not c.is_zero() for c in merged], dtype=bool)
    else:
        keep = merged != 0
    return unique[keep], merged[keep]


class PolynomialSystem:
    """Polynomial equations ``f_1 = ... = f_m = 0`` in named variables.

    Parameters
    ----------
    variables : sequence of str
        Variable names, in order.
    polynomials : sequence of Polynomial
        The equations' left-hand sides.
    projective : bool, default False
        True when the (homogeneous) equations are meant in projective space.
    name : str, optional
        A label for reports.

    Raises
    ------
    InputError
        When the system is empty, names repeat or are reserved, or a projective
        system has a non-homogeneous equation.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x^2 + y^2 - 1"], ["x", "y"])
    >>> system.n_equations, system.n_variables, system.degrees
    (1, 2, [2])
    """

    def __init__(self, variables, polynomials, projective=False, name=None, limits=DEFAULT_LIMITS):
        variables = [str(v) for v in variables]
        polynomials = list(polynomials)
        if not variables:
            raise InputError("the system has no variables")
        if not polynomials:
            raise InputError("the system has no equations")
        if len(variables) > limits.max_variables:
            raise LimitError(f"{len(variables)} variables exceed the limit of {limits.max_variables}",
                             "max_variables", limits.max_variables)
        if len(polynomials) > limits.max_equations:
            raise LimitError(f"{len(polynomials)} equations exceed the limit of {limits.max_equations}",
                             "max_equations", limits.max_equations)
        seen = set()
        for name_ in variables:
            if name_ in RESERVED_NAMES:
                raise InputError(f"'{name_}' is reserved and cannot name a variable")
            if name_ in seen:
                raise InputError(f"variable '{name_}' is declared twice")
            seen.add(name_)
        for i, p in enumerate(polynomials, 1):
            if p.n_variables != len(variables):
                raise InputError(f"equation {i} has {p.n_variables} variables, the system {len(variables)}")
            if projective and not p.is_homogeneous():
                raise InputError(f"equation {i} is not homogeneous, but the system is marked projective")
        self.variables = variables
        self.polynomials = polynomials
        self.projective = bool(projective)
        self.name = name
        #: The most significant digits of a non-integer number the user wrote (decision 0062), when the system
        #: was read from text; None for systems built otherwise (their coefficients are judged instead).
        self.literal_digits = None
        self._jacobian = None

    @property
    def n_variables(self):
        """Number of variables (homogeneous coordinates for a projective system)."""
        return len(self.variables)

    @property
    def n_equations(self):
        """Number of equations."""
        return len(self.polynomials)

    @property
    def degrees(self):
        """Total degree of each equation."""
        return [p.degree for p in self.polynomials]

    @property
    def ambient_dimension(self):
        """Dimension of the ambient space: n (affine) or n - 1 (projective)."""
        return self.n_variables - (1 if self.projective else 0)

    @property
    def is_exact(self):
        """True when every coefficient is exact."""
        return all(p.is_exact for p in self.polynomials)

    @property
    def has_real_coefficients(self):
        """True when every coefficient, rounded to double, has imaginary part 0 (real points may be real
        solutions; witness slices and real flags depend on it). The exact test for proofs is
        :func:`numag.certify.equations._is_real`.

        Examples
        --------
        >>> from numag.system.parse import parse_system
        >>> [parse_system([f], ["x"]).has_real_coefficients for f in ("x^2 - 2", "x - I")]
        [True, False]
        """
        return all(np.all(np.abs(p.numeric_coefficients().imag) == 0) for p in self.polynomials)

    def jacobian_polynomials(self):
        """The Jacobian as a list of rows of partial derivatives (cached)."""
        if self._jacobian is None:
            self._jacobian = [p.gradient() for p in self.polynomials]
        return self._jacobian

    def coefficient_norms(self):
        """Euclidean norm of each equation's coefficients."""
        return np.array([p.coefficient_norm() for p in self.polynomials])

    def random_combinations(self, count, rng):
        """``count`` random complex linear combinations of the equations.

        Parameters
        ----------
        count : int
        rng : numpy.random.Generator

        Returns
        -------
        PolynomialSystem
            Same variables, complex coefficients.
        """
        weights = (rng.standard_normal((count, self.n_equations))
                   + 1j * rng.standard_normal((count, self.n_equations))) / math.sqrt(2)
        combined = []
        for row in weights:
            total = Polynomial.zero(self.n_variables)
            for w, p in zip(row, self.polynomials):
                total = total + p.numeric() * complex(w)
            combined.append(total)
        return PolynomialSystem(self.variables, combined, self.projective, self.name)

    def to_texts(self):
        """The equations as text in the grammar."""
        return [p.to_text(self.variables) for p in self.polynomials]

    @classmethod
    def from_sympy(cls, expressions, symbols, projective=False, name=None, limits=DEFAULT_LIMITS):
        """A system from sympy expressions, coefficients kept exact (see :mod:`numag.system.symbolic`).

        Examples
        --------
        >>> import sympy
        >>> x, y = sympy.symbols("x y")
        >>> PolynomialSystem.from_sympy([x**2 + y**2 - sympy.Rational(1, 3)], [x, y]).to_texts()
        ['x^2 + y^2 - 1/3']
        """
        from .symbolic import system_from_sympy  # sympy is optional: imported only when asked for
        return system_from_sympy(expressions, symbols, projective=projective, name=name, limits=limits)

    def to_sympy(self):
        """The equations as sympy expressions and the variables as symbols (see :mod:`numag.system.symbolic`).

        Examples
        --------
        >>> from numag.system.parse import parse_system
        >>> parse_system(["x^2 - 2*I"], ["x"]).to_sympy()
        ([x**2 - 2*I], [x])
        """
        from .symbolic import system_to_sympy
        return system_to_sympy(self)

    def __repr__(self):
        kind = "projective" if self.projective else "affine"
        return (f"PolynomialSystem({self.n_equations} equations in {self.variables}, {kind}, "
                f"degrees {self.degrees})")


#: Orders of magnitude that the coefficients of one equation may span in numerical work: after an
#: exact rescaling by a power of ten they lie within 10^-100 .. 10^100, so squares and products of a
#: few of them stay inside the double range (about 10^-308 .. 10^308).
MAX_COEFFICIENT_SPREAD = 200


def _log10_size(coefficient):
    """log10 of |coefficient| without overflow (exact coefficients may be far beyond double range)."""
    if isinstance(coefficient, ExactCoefficient):
        import mpmath  # mpmath numbers have unbounded exponents
        with mpmath.mp.workdps(15):
            return float(mpmath.log10(abs(coefficient.to_context(mpmath.mp))))
    return math.log10(abs(complex(coefficient)))


#: Sizes (log10) within +-99 leave an equation unchanged whatever their last bits (the limits are +-100 and
#: a spread of 200), so the rough sizes of :func:`_rough_log10_sizes` decide it without mpmath.
_SURELY_INSIDE = MAX_COEFFICIENT_SPREAD / 2 - 1


def _rough_log10_sizes(polynomial):
    """log10 |c| of each coefficient in double precision when all are rational or numeric, else None.

    ``math.log10`` takes integers of any size, so p/q needs no mpmath: the exact sizes (mpmath,
    :func:`_log10_size`) cost a tenth of a small ``numag solve`` and are needed only near the limits.
    """
    sizes = []
    for coefficient in polynomial.coefficients:
        if isinstance(coefficient, ExactCoefficient):
            if not coefficient.is_rational():
                return None
            value = coefficient.as_fraction()
            if value == 0:
                return None
            sizes.append(math.log10(abs(value.numerator)) - math.log10(value.denominator))
        else:
            sizes.append(_log10_size(coefficient))
    return np.array(sizes)


def prepared_for_numerics(system):
    """The system as numerical work needs it, and notes saying what was changed.

    A zero equation (it holds everywhere) is dropped. An equation whose coefficients
    lie outside 10^-100 .. 10^100 is divided exactly by a power of ten (its zeros
    are unchanged); when they span more than :data:`MAX_COEFFICIENT_SPREAD` orders
    of magnitude no double-precision computation can use them and the equation is
    refused, naming the coefficient.

    Parameters
    ----------
    system : PolynomialSystem

    Returns
    -------
    (PolynomialSystem, list of str)
        The system (the same object when nothing changed) and the notes.

    Raises
    ------
    InputError
        When every equation is zero, or an equation's coefficients are beyond double precision.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> prepared, notes = prepared_for_numerics(parse_system(["x - x", "1e400*y^2 - 1e400"], ["x", "y"]))
    >>> prepared.to_texts(), notes[0]
    (['y^2 - 1'], 'equation 1 is zero (it holds everywhere) and was dropped')
    """
    kept, notes = [], []
    for number, polynomial in enumerate(system.polynomials, 1):
        if polynomial.is_zero():
            notes.append(f"equation {number} is zero (it holds everywhere) and was dropped")
            continue
        sizes = _rough_log10_sizes(polynomial)
        if sizes is None or not (sizes.max() < _SURELY_INSIDE and sizes.min() > -_SURELY_INSIDE):
            sizes = np.array([_log10_size(c) for c in polynomial.coefficients])
        high, low = int(np.argmax(sizes)), int(np.argmin(sizes))
        if sizes[high] - sizes[low] > MAX_COEFFICIENT_SPREAD:
            def term(k):
                monomial = Polynomial(polynomial.exponents[k:k + 1], [ExactCoefficient.rational(1)]
                                      if polynomial.is_exact else [1.0]).to_text(system.variables)
                return f"{'constant term' if monomial == '1' else 'coefficient of ' + monomial} " \
                       f"(about 1e{sizes[k]:.0f})"
            raise InputError(f"equation {number}: the {term(high)} and the {term(low)} are more than "
                             f"{MAX_COEFFICIENT_SPREAD} orders of magnitude apart: beyond double precision "
                             "numbers (rescale the variables)")
        middle = (sizes[high] + sizes[low]) / 2
        if (sizes[high] > MAX_COEFFICIENT_SPREAD / 2 or sizes[low] < -MAX_COEFFICIENT_SPREAD / 2) and polynomial.is_exact:
            power = int(round(middle))
            factor = ExactCoefficient.rational(Fraction(1, 10 ** power) if power > 0 else Fraction(10 ** -power))
            polynomial = polynomial.multiply(Polynomial.constant(factor, polynomial.n_variables))
            notes.append(f"equation {number} was divided by 1e{power} (its coefficients reach about "
                         f"1e{sizes[high]:.0f}); its zeros are unchanged")
        kept.append(polynomial)
    if not kept:
        raise InputError("every equation is zero: X is the whole space, there is nothing to compute")
    if not notes:
        return system, []
    return PolynomialSystem(system.variables, kept, projective=system.projective, name=system.name), notes


def require_numeric(system, allow_zero=True):
    """Refuse (InputError) a system that numerical work cannot use as it is: the library's entry check.

    The command line prepares the system itself (:func:`prepared_for_numerics`, with notes); a
    library caller gets a clear refusal instead of an overflow deep inside.

    Raises
    ------
    InputError
        Naming the equation: coefficients beyond double precision, coefficients to be rescaled, or
        (unless ``allow_zero``) a zero equation.
    """
    _, notes = prepared_for_numerics(system)
    for note in notes:
        if allow_zero and "is zero" in note:
            continue
        raise InputError(f"{note.replace(' and was dropped', '').replace(' was divided', ' must be divided')}: "
                         "prepare the system with numag.system.polynomial.prepared_for_numerics (the command line does)")


@dataclass
class LinearSpace:
    """The solutions of linear equations, found exactly: empty, or ``pivots`` in echelon form.

    Attributes
    ----------
    empty : bool
        True when the equations contradict each other (X is empty).
    pivots : dict
        Pivot column -> row ``{column: coefficient, -1: constant}`` (exact), one per independent equation.
    dimension : int
        Dimension of the space (-1 when empty).
    """

    empty: bool
    pivots: dict
    dimension: int


def linear_space(system, max_operations=2_000_000):
    """Row-reduce a system of equations of degree at most 1 exactly (sparse rows, exact coefficients).

    Parameters
    ----------
    system : PolynomialSystem
        Affine, every equation of degree <= 1, exact coefficients.
    max_operations : int
        Exact multiply-adds allowed; None is returned beyond them (dense large systems).

    Returns
    -------
    LinearSpace or None

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> linear_space(parse_system(["x + y - 1", "2*x + 2*y - 2"], ["x", "y"])).dimension
    1
    >>> linear_space(parse_system(["x - 1", "x - 2"], ["x"])).empty
    True
    """
    if system.projective or not system.is_exact or any(d > 1 for d in system.degrees):
        return None
    pivots, operations = {}, 0
    for polynomial in system.polynomials:
        row = {}
        for exponents, coefficient in zip(polynomial.exponents, polynomial.coefficients):
            nonzero = np.nonzero(exponents)[0]
            row[int(nonzero[0]) if len(nonzero) else -1] = coefficient
        while True:
            shared = [column for column in row if column in pivots]
            if not shared:
                break
            column = shared[0]
            pivot = pivots[column]
            factor = row[column] * pivot[column].reciprocal()
            operations += len(pivot)
            if operations > max_operations:
                return None
            for key, value in pivot.items():
                updated = row.get(key, ExactCoefficient.zero()) - factor * value
                if updated.is_zero():
                    row.pop(key, None)
                else:
                    row[key] = updated
        variables = [column for column in row if column >= 0]
        if variables:
            pivots[min(variables)] = row
        elif row:  # 0 = a nonzero constant
            return LinearSpace(True, {}, -1)
    return LinearSpace(False, pivots, system.n_variables - len(pivots))


def regeneration_bound(degrees, n):
    """Paths a regenerative cascade tracks at most when no equation vanishes on earlier witness points.

    Equations are taken lowest degree first (as :func:`numag.witness.cascade.witness_supersets` does): stage i
    regenerates at most d_1 ... d_(i-1) witness points into d_i paths each, and no stage goes beyond
    codimension n. Structured systems (determinantal ones, say) often need far fewer; generic ones
    need about this many. Constant equations add nothing.

    Examples
    --------
    >>> regeneration_bound([2, 2, 2], 3), regeneration_bound([2] * 50, 50) > 10**15
    (14, True)
    """
    total, product = 0, 1
    for stage, degree in enumerate(sorted(d for d in degrees if d > 0)):
        if stage >= n:
            break
        product *= degree
        total += product
    return total


def determinant(entries, limits=DEFAULT_LIMITS):
    """Determinant of a small square matrix of polynomials (Laplace expansion along the first row).

    Parameters
    ----------
    entries : list of list of Polynomial
        k rows of k polynomials in the same variables (k >= 1).

    Returns
    -------
    Polynomial

    Examples
    --------
    >>> x, y = Polynomial.variable(0, 2), Polynomial.variable(1, 2)
    >>> determinant([[x, y], [y, x]]).to_text(["x", "y"])
    'x^2 - y^2'
    """
    size = len(entries)
    if size == 1:
        return entries[0][0]
    total = Polynomial.zero(entries[0][0].n_variables)
    for j in range(size):
        if entries[0][j].is_zero():
            continue
        rest = [row[:j] + row[j + 1:] for row in entries[1:]]
        term = entries[0][j].multiply(determinant(rest, limits), limits)
        total = total - term if j % 2 else total + term
    return total


def combined_minor(gradients, left, right, limits=DEFAULT_LIMITS):
    """det(A J B): a combination of the k x k minors of J with weights from ``left`` (A) and ``right`` (B).

    Parameters
    ----------
    gradients : list of list of Polynomial
        J as m rows of n partial derivatives.
    left : array_like, shape (k, m)
    right : array_like, shape (n, k)
        Integer weights keep exact polynomials exact; complex ones give numeric polynomials.

    Returns
    -------
    Polynomial

    Examples
    --------
    >>> x, y = Polynomial.variable(0, 2), Polynomial.variable(1, 2)
    >>> f = x * x + y * y
    >>> combined_minor([[f.derivative(0), f.derivative(1)]], [[1]], [[1], [1]]).to_text(["x", "y"])
    '2*x + 2*y'
    """
    left, right = np.asarray(left), np.asarray(right)
    exact = left.dtype.kind in "iu" and right.dtype.kind in "iu"
    size, m = left.shape
    n = right.shape[0]
    entries = []
    for r in range(size):
        row = []
        for s in range(size):
            total = Polynomial.zero(n)
            for i in range(m):
                for j in range(n):
                    if not gradients[i][j].is_zero():
                        weight = int(left[r, i] * right[j, s]) if exact else complex(left[r, i] * right[j, s])
                        total = total + gradients[i][j] * weight
            row.append(total)
        entries.append(row)
    return determinant(entries, limits)
