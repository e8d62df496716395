"""Exact coefficients: Gaussian rationals extended by square roots of rationals.

A coefficient such as ``(1 + sqrt(5))/2`` or ``3/4 - 2*I`` must stay exact: it
is evaluated at whatever precision the caller works in (double precision for
tracking, 60 digits for refinement, intervals for certification). The numbers
used here are finite sums ``sum_k q_k * sqrt(r_k)`` with ``q_k`` in Q(i) and
distinct square-free positive integers ``r_k`` (``r = 1`` is the rational
part). That set is closed under +, -, * and under division by a single such
term, which is all the polynomial grammar needs.

Examples
--------
>>> from fractions import Fraction
>>> golden = (ExactCoefficient.rational(1) + ExactCoefficient.square_root(Fraction(5))) / 2
>>> golden * golden - golden - 1 == ExactCoefficient.zero()
True
>>> golden.to_text()
'1/2 + 1/2*sqrt(5)'
"""

from fractions import Fraction
import math

from ..errors import InputError, LimitError

__all__ = ["ExactCoefficient", "exact_rank", "square_free_split", "MAX_RADICAND", "MAX_COEFFICIENT_BITS",
           "MAX_RADICAL_TERMS"]

#: Largest numerator * denominator accepted under ``sqrt``; above it the
#: square-free split could need more than trial division up to 10^6.
MAX_RADICAND = 10**18
#: Largest bit length of a numerator or denominator kept exact.
MAX_COEFFICIENT_BITS = 100_000
#: Most square-root terms one exact number may have. Products of sums of square roots of k primes
#: have up to 2^k terms (and inverting such a sum multiplies by its k conjugates), so the work grows
#: exponentially; the limit is checked as every number is built, so a hostile coefficient such as
#: 1/(sqrt(2) + sqrt(3) + ... + sqrt(43)) is refused within a second instead of taking minutes.
MAX_RADICAL_TERMS = 256


def square_free_split(value):
    """Split a positive integer as ``value = square**2 * free`` with ``free`` square-free.

    Parameters
    ----------
    value : int
        Positive integer, at most :data:`MAX_RADICAND`.

    Returns
    -------
    (int, int)
        ``(square, free)``.

    Examples
    --------
    >>> square_free_split(72)
    (6, 2)
    """
    if value < 1:
        raise InputError(f"square_free_split needs a positive integer, got {value}")
    if value > MAX_RADICAND:
        raise LimitError(f"radicand {value} is larger than {MAX_RADICAND}",
                         "max_radicand", MAX_RADICAND)
    square, free, rest = 1, 1, value
    divisor = 2
    # After trial division up to 10^6 the cofactor (<= 10^18) has no factor
    # below 10^6, so it is 1, a prime, a product of two primes, or a square.
    while divisor * divisor <= rest and divisor <= 10**6:
        if rest % divisor == 0:
            power = 0
            while rest % divisor == 0:
                rest //= divisor
                power += 1
            square *= divisor ** (power // 2)
            if power % 2:
                free *= divisor
        divisor += 1 if divisor == 2 else 2
    root = math.isqrt(rest)
    if root * root == rest:
        square *= root
    else:
        free *= rest
    return square, free


def _primes_under_roots(parts):
    """The primes dividing some radicand (radicands are square-free and, in practice, small)."""
    primes = set()
    for r in parts:
        rest, divisor = r, 2
        while divisor * divisor <= rest:
            while rest % divisor == 0:
                primes.add(divisor)
                rest //= divisor
            divisor += 1
        if rest > 1:
            primes.add(rest)
    return sorted(primes)


def _check_size(q):
    if q.numerator.bit_length() > MAX_COEFFICIENT_BITS or q.denominator.bit_length() > MAX_COEFFICIENT_BITS:
        raise LimitError(f"an exact coefficient exceeds {MAX_COEFFICIENT_BITS} bits",
                         "max_coefficient_bits", MAX_COEFFICIENT_BITS)
    return q


class ExactCoefficient:
    """An exact number ``sum_k (a_k + b_k i) * sqrt(r_k)``.

    Parameters
    ----------
    parts : dict
        Maps a square-free positive ``int`` radicand to a pair of
        :class:`fractions.Fraction` ``(real, imaginary)``. Zero pairs are
        dropped. Use the constructors :meth:`rational`, :meth:`imaginary_unit`
        and :meth:`square_root` rather than building parts by hand.

    Examples
    --------
    >>> half = ExactCoefficient.rational(Fraction(1, 2))
    >>> complex(half * ExactCoefficient.imaginary_unit())
    0.5j
    """

    __slots__ = ("_parts", "_hash")

    def __init__(self, parts=None):
        cleaned = {}
        for radicand, (re, im) in (parts or {}).items():
            if re != 0 or im != 0:
                cleaned[int(radicand)] = (_check_size(Fraction(re)), _check_size(Fraction(im)))
        if len(cleaned) > MAX_RADICAL_TERMS:
            raise LimitError(f"an exact coefficient would have {len(cleaned)} square-root terms, more than the "
                             f"limit of {MAX_RADICAL_TERMS}", "max_radical_terms", MAX_RADICAL_TERMS)
        self._parts = dict(sorted(cleaned.items()))
        self._hash = None

    # -- constructors -----------------------------------------------------------------
    @classmethod
    def zero(cls):
        """The number 0."""
        return cls()

    @classmethod
    def rational(cls, value, imaginary=0):
        """The Gaussian rational ``value + imaginary*i``."""
        return cls({1: (Fraction(value), Fraction(imaginary))})

    @classmethod
    def imaginary_unit(cls):
        """The imaginary unit ``i``."""
        return cls({1: (Fraction(0), Fraction(1))})

    @classmethod
    def square_root(cls, value):
        """The non-negative square root of a non-negative rational.

        Raises
        ------
        InputError
            If ``value`` is negative.
        """
        value = Fraction(value)
        if value < 0:
            raise InputError(f"sqrt needs a non-negative rational, got {value}")
        if value == 0:
            return cls()
        # sqrt(p/q) = sqrt(p*q)/q
        square, free = square_free_split(value.numerator * value.denominator)
        return cls({free: (Fraction(square, value.denominator), Fraction(0))})

    @classmethod
    def from_complex(cls, value):
        """The exact value of a double-precision complex number (every double is a dyadic rational)."""
        value = complex(value)
        if not (math.isfinite(value.real) and math.isfinite(value.imag)):
            raise InputError(f"cannot represent the non-finite number {value} exactly")
        return cls.rational(Fraction(value.real), Fraction(value.imag))

    # -- queries ------------------------------------------------------------------------
    @property
    def parts(self):
        """Dictionary radicand -> (real, imaginary) Fractions (a copy)."""
        return dict(self._parts)

    def is_zero(self):
        """True when the number is exactly zero."""
        return not self._parts

    def is_rational(self):
        """True when the number is a (real) rational."""
        return all(r == 1 and im == 0 for r, (re, im) in self._parts.items())

    def is_real(self):
        """True when the imaginary part is exactly zero."""
        return all(im == 0 for re, im in self._parts.values())

    def is_single_term(self):
        """True for zero or a number ``q*sqrt(r)`` with a single radicand."""
        return len(self._parts) <= 1

    def as_fraction(self):
        """The value as a Fraction; only for rational numbers."""
        if not self.is_rational():
            raise InputError(f"{self.to_text()} is not a rational number")
        return self._parts.get(1, (Fraction(0), Fraction(0)))[0]

    def conjugate(self):
        """Complex conjugate."""
        return ExactCoefficient({r: (re, -im) for r, (re, im) in self._parts.items()})

    # -- arithmetic ---------------------------------------------------------------------
    @staticmethod
    def _coerce(other):
        if isinstance(other, ExactCoefficient):
            return other
        if isinstance(other, (int, Fraction)):
            return ExactCoefficient.rational(other)
        return NotImplemented

    def __add__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return other
        parts = dict(self._parts)
        for r, (re, im) in other._parts.items():
            a, b = parts.get(r, (0, 0))
            parts[r] = (a + re, b + im)
        return ExactCoefficient(parts)

    __radd__ = __add__

    def __neg__(self):
        return ExactCoefficient({r: (-re, -im) for r, (re, im) in self._parts.items()})

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

    def __mul__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return other
        if len(self._parts) > len(other._parts) or (len(self._parts) == len(other._parts) == 1 and 1 in other._parts):
            self, other = other, self  # a real rational, if there is one, is ``self`` below
        if len(self._parts) == 1 and self._parts.get(1, (0, 1))[1] == 0:
            # a real rational factor scales every part: two Fraction products a part instead of eight
            # operations (units and powers of ten in the balancing, coefficients while reading)
            factor = self._parts[1][0]
            return ExactCoefficient({r: (a * factor, b * factor) for r, (a, b) in other._parts.items()})
        if len(self._parts) * len(other._parts) > 4 * MAX_RADICAL_TERMS ** 2:  # work checked before it is done
            raise LimitError(f"a product of exact numbers with {len(self._parts)} and {len(other._parts)} "
                             "square-root terms is too much work", "max_radical_terms", MAX_RADICAL_TERMS)
        parts = {}
        for r1, (a1, b1) in self._parts.items():
            for r2, (a2, b2) in other._parts.items():
                # sqrt(r1)*sqrt(r2) = g*sqrt((r1/g)*(r2/g)), g = gcd: square-free stays square-free
                g = math.gcd(r1, r2)
                radicand = (r1 // g) * (r2 // g)
                re = (a1 * a2 - b1 * b2) * g
                im = (a1 * b2 + a2 * b1) * g
                x, y = parts.get(radicand, (0, 0))
                parts[radicand] = (x + re, y + im)
        return ExactCoefficient(parts)

    __rmul__ = __mul__

    def times_integer(self, k):
        """``self * k`` for a Python integer ``k``: two Fraction products a part, no coercion (derivatives).

        Examples
        --------
        >>> ExactCoefficient.rational(Fraction(3, 4), 1).times_integer(2).to_text()
        '(3/2 + 2*I)'
        """
        if k == 0:
            return ExactCoefficient()
        scaled = object.__new__(ExactCoefficient)
        scaled._parts = {r: (_check_size(a * k), _check_size(b * k)) for r, (a, b) in self._parts.items()}
        scaled._hash = None
        return scaled

    def reciprocal(self):
        """``1/self`` for a nonzero number.

        A sum of several square-root terms is made rational by multiplying with its
        conjugates: for each prime p under a square root, negating every sqrt(r) with p | r
        gives a conjugate whose product with the number has no sqrt of a multiple of p.

        Raises
        ------
        InputError
            For zero.

        Examples
        --------
        >>> golden = (ExactCoefficient.rational(1) + ExactCoefficient.square_root(5)) / 2
        >>> golden.reciprocal().to_text()
        '-1/2 + 1/2*sqrt(5)'
        """
        if self.is_zero():
            raise InputError("division by zero")
        if not self.is_single_term():
            numerator, denominator = ExactCoefficient.rational(1), self
            for prime in _primes_under_roots(self._parts):
                conjugate = ExactCoefficient({r: ((-re, -im) if r % prime == 0 else (re, im))
                                              for r, (re, im) in denominator._parts.items()})
                numerator, denominator = numerator * conjugate, denominator * conjugate
            return numerator * denominator.reciprocal()
        (r, (a, b)), = self._parts.items()
        # 1/((a+bi) sqrt r) = (a-bi) sqrt(r) / ((a^2+b^2) r)
        norm = (a * a + b * b) * r
        return ExactCoefficient({r: (a / norm, -b / norm)})

    def __truediv__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return other
        return self * other.reciprocal()

    def __pow__(self, exponent):
        if not isinstance(exponent, int) or exponent < 0:
            raise InputError(f"exponent must be a non-negative integer, got {exponent!r}")
        result, base = ExactCoefficient.rational(1), self
        while exponent:
            if exponent & 1:
                result = result * base
            exponent >>= 1
            if exponent:
                base = base * base
        return result

    def __eq__(self, other):
        other = self._coerce(other)
        if other is NotImplemented:
            return False
        return self._parts == other._parts

    def __hash__(self):
        if self._hash is None:
            self._hash = hash(tuple(self._parts.items()))
        return self._hash

    # -- conversion ----------------------------------------------------------------------
    def to_context(self, ctx):
        """The value as a number of an mpmath context (``mp`` or ``iv``) at its precision.

        Parameters
        ----------
        ctx : mpmath context
            ``mpmath.mp`` gives an ``mpc``; ``mpmath.iv`` gives an enclosing interval
            (real part and imaginary part as intervals).

        Returns
        -------
        number of ``ctx``
        """
        total = ctx.mpc(0) if hasattr(ctx, "mpc") else 0
        for r, (re, im) in self._parts.items():
            root = ctx.mpf(1) if r == 1 else ctx.sqrt(ctx.mpf(r))
            real = ctx.mpf(re.numerator) / re.denominator
            imag = ctx.mpf(im.numerator) / im.denominator
            total += ctx.mpc(real, imag) * root
        return total

    def __complex__(self):
        if all(r == 1 for r in self._parts):
            re, im = self._parts.get(1, (Fraction(0), Fraction(0)))
            return complex(float(re), float(im))
        import mpmath  # only for numbers with square roots: round the exact value once
        with mpmath.mp.workdps(40):
            value = self.to_context(mpmath.mp)
            return complex(value)

    def to_text(self):
        """Text in the equation grammar that reads back to the same number."""
        if not self._parts:
            return "0"
        pieces = []
        for r, (re, im) in self._parts.items():
            if im == 0:
                value = _fraction_text(re)
                scalar_negative = re < 0
            elif re == 0:
                value = "I" if im == 1 else ("-I" if im == -1 else f"{_fraction_text(im)}*I")
                scalar_negative = im < 0
            else:
                value = f"({_fraction_text(re)} + {_fraction_text(im)}*I)"
                scalar_negative = False
            if r != 1:
                value = f"sqrt({r})" if value == "1" else (
                    "-sqrt({})".format(r) if value == "-1" else f"{value}*sqrt({r})")
            pieces.append((value, scalar_negative))
        text = pieces[0][0]
        for value, negative in pieces[1:]:
            text += f" - {value[1:]}" if negative else f" + {value}"
        return text

    def __repr__(self):
        return f"ExactCoefficient({self.to_text()!r})"


_CHUNK_DIGITS = 999  # the grammar reads literals of up to 1000 digits and decimal exponents up to 1000


def exact_rank(rows):
    """The rank of a matrix of exact numbers, by Gaussian elimination (a zero test on them is exact).

    Parameters
    ----------
    rows : list of list of ExactCoefficient

    Returns
    -------
    int

    Examples
    --------
    >>> q = ExactCoefficient.rational
    >>> exact_rank([[q(1), q(2)], [q(2), q(4)]]), exact_rank([[q(0), q(0)]]), exact_rank([[q(1), q(0)], [q(0), q(1)]])
    (1, 0, 2)
    """
    rows = [list(row) for row in rows]
    columns = len(rows[0]) if rows else 0
    rank = 0
    for column in range(columns):
        pivot = next((i for i in range(rank, len(rows)) if not rows[i][column].is_zero()), None)
        if pivot is None:
            continue
        rows[rank], rows[pivot] = rows[pivot], rows[rank]
        inverse = rows[rank][column].reciprocal()
        for i in range(rank + 1, len(rows)):
            if not rows[i][column].is_zero():
                factor = rows[i][column] * inverse
                rows[i] = [a - factor * b for a, b in zip(rows[i], rows[rank])]
        rank += 1
    return rank


def _integer_text(value):
    """A non-negative integer as text the grammar reads back, however long it is.

    Up to 999 digits as they are; longer ones in chunks, ``(c0 + c1*1e999 + c2*1e999*1e999 + ...)``, so that
    every number an exact coefficient may hold (:data:`MAX_COEFFICIENT_BITS`) can be written and read again
    (Python itself refuses ``str`` of integers beyond 4,300 digits).

    Examples
    --------
    >>> _integer_text(12), _integer_text(10**1000 + 7)
    ('12', '(7 + 10*1e999)')
    """
    base = 10 ** _CHUNK_DIGITS
    if value < base:
        return str(value)
    pieces, power = [], 0
    while value:
        value, chunk = divmod(value, base)
        if chunk:
            pieces.append(str(chunk) + "*1e999" * power)
        power += 1
    return "(" + " + ".join(pieces) + ")"


def _fraction_text(q):
    numerator = ("-" if q.numerator < 0 else "") + _integer_text(abs(q.numerator))
    return numerator if q.denominator == 1 else f"{numerator}/{_integer_text(q.denominator)}"
