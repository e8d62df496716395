"""numag's own reader for polynomial equations (no ``eval``, no computer algebra parser).

Grammar (whitespace is ignored)::

    equation := expr [ '=' expr ]          # "a = b" means a - b = 0
    expr     := term { ('+' | '-') term }
    term     := unary { ('*' | '/') unary }  # division only by a nonzero constant
    unary    := ('-' | '+') unary | power
    power    := atom [ ('^' | '**') exponent ]
    exponent := INTEGER | '(' INTEGER ')'
    atom     := NUMBER | VARIABLE | 'I' | 'sqrt' '(' expr ')' | '(' expr ')'

``NUMBER`` is an integer, a decimal (``2.5``, ``.5``) or scientific
(``1.5e-3``) literal, read exactly as a rational. ``I`` is the imaginary
unit; ``sqrt`` takes a non-negative rational constant and stays exact.
Implicit multiplication (``2x``) is refused, as are chained powers
(``x^2^3``): both are common typos whose meaning is not obvious. Parentheses
(and ``sqrt(``) may nest at most :data:`MAX_NESTING` (100) levels deep; signs
may repeat any number of times (``--x`` is ``x``).

Examples
--------
>>> p = parse_polynomial("(1 + sqrt(5))/2*x^2 - 3/4*I*y", ["x", "y"])
>>> p.to_text(["x", "y"])
'(1/2 + 1/2*sqrt(5))*x^2 - 3/4*I*y'
>>> parse_polynomial("2x", ["x"])
Traceback (most recent call last):
...
numag.errors.ParseError: column 2: found 'x' where an operator (+ - * / ^) was expected; implicit multiplication is not allowed, insert '*'
    2x
     ^
"""

from fractions import Fraction
import gc
import itertools
import math
import re

import numpy as np

from ..errors import InputError, LimitError, ParseError
from .exact import MAX_COEFFICIENT_BITS, ExactCoefficient, _check_size
from .polynomial import DEFAULT_LIMITS, RESERVED_NAMES, Polynomial, PolynomialSystem

__all__ = ["parse_polynomial", "parse_system", "parse_constant", "WrittenConstant",
           "literal_precision", "is_valid_name", "MAX_EQUATION_LENGTH",
           "MAX_NESTING", "MAX_TOKENS"]

#: Longest equation text accepted (characters): room for some 500,000 written-out terms.
MAX_EQUATION_LENGTH = 16_000_000
#: Most tokens (numbers, names, operators) in one equation. Reading is linear in the tokens (about a
#: microsecond each, decision 0037), so this bounds the reading time to seconds.
MAX_TOKENS = 4_000_000
#: Deepest nesting of parentheses (and ``sqrt(``) accepted: the reader is recursive in the nesting
#: only (five Python frames a level), so this keeps it far from Python's recursion limit.
MAX_NESTING = 100
_MAX_LITERAL_DIGITS = 1000
_MAX_LITERAL_EXPONENT = 1000
_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_]*\Z")
_NUMBER = re.compile(r"([0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE]([+-]?[0-9]+))?")
_NAME_PREFIX = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")
_OPERATORS = ("**", "+", "-", "*", "/", "^", "(", ")", "=")


def is_valid_name(name):
    """True when ``name`` can be a variable: an ASCII identifier that the grammar does not reserve."""
    return isinstance(name, str) and bool(_NAME.match(name)) and name not in RESERVED_NAMES


class _Token:
    __slots__ = ("kind", "text", "column")

    def __init__(self, kind, text, column):
        self.kind, self.text, self.column = kind, text, column

    def describe(self):
        if self.kind == "end":
            return "the end of the text"
        shown = self.text if len(self.text) <= 20 else self.text[:17] + "..."
        return f"'{shown}'"


#: One token after optional blanks; the group names its kind, ``bad`` a character no token starts with.
#: ASCII only: ``[0-9]`` and ``[A-Za-z_]`` are literal ranges.
_TOKEN = re.compile(r"[ \t\r\n]*(?:(?P<number>(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?)"
                    r"|(?P<name>[A-Za-z_][A-Za-z0-9_]*)|(?P<op>\*\*|[-+*/^()=])|(?P<bad>[^ \t\r\n]))")


def _tokenize(text):
    """The tokens of ``text`` and an end token: one regular-expression scan (linear time)."""
    tokens = []
    append = tokens.append
    for found in itertools.islice(_TOKEN.finditer(text), MAX_TOKENS + 1):
        kind = found.lastgroup
        value = found.group(kind)
        if kind == "bad":
            raise ParseError(f"unexpected character {value!r}", column=found.start(kind) + 1, text=text)
        append(_Token(kind, "^" if value == "**" else value, found.start(kind) + 1))
    if len(tokens) > MAX_TOKENS:  # refused before the rest is even split into tokens
        raise ParseError(f"more than {MAX_TOKENS} numbers, names and operators in one equation (expand "
                         "less, or write products and powers)", column=1)
    tokens.append(_Token("end", "", len(text) + 1))
    return tokens


#: The most significant digits printing a double gives (its shortest round-trip decimal): a decimal literal with
#: more was not printed from a double (decision 0146).
PRINTED_DOUBLE_DIGITS = 17


def printed_double(literal, value):
    """Whether a decimal literal may be a printed double (decision 0146): up to 17 significant digits, or more
    that are a double's exact value cut at the last written digit (within one unit of it).

    5.000000000000000000000000000001 is no double (5.0 cut there is 5.000...000): exact as written;
    0.1000000000000000055511151231257827 is the double 0.1 printed to 34 digits.

    Examples
    --------
    >>> printed_double("5.000000000000000000000000000001", Fraction("5.000000000000000000000000000001"))
    False
    >>> printed_double("0.1000000000000000055511151231257827", Fraction("0.1000000000000000055511151231257827"))
    True
    """
    if literal_digits(literal) <= PRINTED_DOUBLE_DIGITS:
        return True
    precision = literal_precision(literal)
    if precision is None:
        return True
    double = float(value)
    return math.isfinite(double) and abs(Fraction(double) - value) < precision[1]


def literal_digits(literal):
    """Significant digits of a number literal that is not an integer as written (``0.30000000000000004``: 17);
    0 for an integer value. Decision 0062 reads 17 or more as a printed double: the digits the user wrote, not
    those of the expanded coefficients (an exact ``(x - 1234.5)^4`` expands to long exact decimals).

    Examples
    --------
    >>> literal_digits("2.5"), literal_digits("120"), literal_digits("1.50e-3"), literal_digits("3e2")
    (2, 0, 2, 0)
    """
    match = _NUMBER.fullmatch(literal)
    if match is None:
        return 0
    mantissa, exponent = match.group(1), int(match.group(2) or 0)
    whole, _, fraction = mantissa.partition(".")
    digits = (whole + fraction).lstrip("0").rstrip("0")
    places = len(fraction.rstrip("0")) - exponent  # decimal places of the value
    return len(digits) if places > 0 else 0


def literal_precision(literal):
    """A number literal written with decimal places: its significant digits as written, trailing zeros included
    (``0.500`` states three digits, ``1.000`` four), and the unit of its last written digit; None for a literal
    written as an integer (``120``, ``1.5e3``).

    What a point's coordinate written as a decimal says about its accuracy (decision 0132):
    ``0.6000000000000000000100000`` is known to half of 1e-25, whatever its value's shortest decimal.

    Examples
    --------
    >>> literal_precision("0.500"), literal_precision("1.50e-3"), literal_precision("120")
    ((3, Fraction(1, 1000)), (3, Fraction(1, 100000)), None)
    """
    match = _NUMBER.fullmatch(literal)
    if match is None:
        return None
    mantissa, exponent = match.group(1), int(match.group(2) or 0)
    whole, _, fraction = mantissa.partition(".")
    places = len(fraction) - exponent  # decimal places as written
    if places <= 0:  # written as an integer
        return None
    return len((whole + fraction).lstrip("0")), Fraction(1, 10 ** places)


def _number_value(token, text):
    match = _NUMBER.fullmatch(token.text)
    mantissa, exponent = match.group(1), match.group(2)
    if len(mantissa) > _MAX_LITERAL_DIGITS:
        raise ParseError(f"number literal longer than {_MAX_LITERAL_DIGITS} digits",
                         column=token.column, text=text)
    whole, _, fraction_digits = mantissa.partition(".")
    value = Fraction(int(whole or "0") * 10 ** len(fraction_digits) + int(fraction_digits or "0"),
                     10 ** len(fraction_digits))
    if exponent is not None:
        if len(exponent.lstrip("+-")) > 6 or abs(int(exponent)) > _MAX_LITERAL_EXPONENT:
            raise ParseError(f"decimal exponent {exponent} is outside +-{_MAX_LITERAL_EXPONENT}",
                             column=token.column, text=text)
        value *= Fraction(10) ** int(exponent)
    return value


class _Parser:
    def __init__(self, text, variables, limits):
        self.text = text
        self.index = {name: j for j, name in enumerate(variables)}
        self.variables = list(variables)
        self.n = len(variables)
        self.limits = limits
        self.literal_digits = 0  # the most significant digits of a non-integer literal read (decision 0062)
        self.decimals = []  # (column, text) of each literal not written as digits alone (decision 0132)
        self.shifts = {}  # column -> a change of that literal's value (decision 0132: what its last digit moves)
        if len(text) > MAX_EQUATION_LENGTH:
            raise ParseError(f"text longer than {MAX_EQUATION_LENGTH} characters", column=1)
        self.tokens = _tokenize(text)
        self.position = 0
        self.current = self.tokens[0]  # an attribute, not a property: it is read several times a token
        self.depth = 0

    # -- helpers ------------------------------------------------------------------------------
    def advance(self):
        token = self.current
        if token.kind != "end":
            self.position += 1
            self.current = self.tokens[self.position]
        return token

    def fail(self, expected, token=None, hint=""):
        token = token or self.current
        raise ParseError(f"found {token.describe()} where {expected} was expected{hint}",
                         column=token.column, text=self.text)

    def is_op(self, symbol):
        return self.current.text == symbol and self.current.kind == "op"

    def guarded(self, token, operation):
        try:
            return operation()
        except LimitError as err:
            raise ParseError(str(err), column=token.column, text=self.text) from None
        except InputError as err:
            raise ParseError(str(err), column=token.column, text=self.text) from None

    # -- values while reading: a _Monomial or a Polynomial ---------------------------------------
    def as_polynomial(self, value):
        """``value`` as a Polynomial (a monomial becomes a one-term polynomial)."""
        return value if isinstance(value, Polynomial) else self.sum_of([value])

    def sum_of(self, parts):
        """One Polynomial from monomials and polynomials: all terms gathered, equal monomials merged once.

        Merging once (a sort of the exponent rows) is what makes a long sum linear; adding term after
        term merged the growing sum every time, quadratic in its length (decision 0037).
        """
        monomials = [part for part in parts if isinstance(part, _Monomial)]
        exponents = [part.exponents for part in parts if isinstance(part, Polynomial)]
        coefficients = [part.coefficients for part in parts if isinstance(part, Polynomial)]
        if monomials:
            rows, columns, powers = [], [], []
            for row, monomial in enumerate(monomials):
                for column, power in monomial.powers.items():
                    rows.append(row)
                    columns.append(column)
                    powers.append(power)
            table = np.zeros((len(monomials), self.n), dtype=np.int64)
            table[rows, columns] = powers
            values = np.empty(len(monomials), dtype=object)
            exact = {}  # one ExactCoefficient per distinct rational: most sums repeat a few numbers
            values[:] = [_exact(monomial.coefficient, exact) for monomial in monomials]
            exponents.append(table)
            coefficients.append(values)
        return Polynomial(np.vstack(exponents), np.concatenate(coefficients), self.n)

    def negated(self, value):
        if isinstance(value, _Monomial):
            return _Monomial(-value.coefficient, value.powers, value.degree)
        return -value

    def product(self, left, right):
        """``left * right``; two monomials stay a monomial (no Polynomial is built)."""
        if isinstance(left, _Monomial) and isinstance(right, _Monomial):
            degree = left.degree + right.degree
            if degree > self.limits.max_degree:
                raise LimitError(f"degree {degree} exceeds the limit of {self.limits.max_degree}",
                                 "max_degree", self.limits.max_degree)
            coefficient = left.coefficient * right.coefficient
            if type(coefficient) is int:  # exact coefficients check their own size
                if coefficient.bit_length() > MAX_COEFFICIENT_BITS:
                    _check_size(Fraction(coefficient))
            elif type(coefficient) is Fraction:
                _check_size(coefficient)
            powers = dict(left.powers)
            for variable, power in right.powers.items():
                powers[variable] = powers.get(variable, 0) + power
            return _Monomial(coefficient, powers, degree)
        return self.as_polynomial(left).multiply(self.as_polynomial(right), self.limits)

    def raised(self, base, exponent):
        """``base ** exponent`` (the exponent already checked against the degree limit)."""
        if isinstance(base, Polynomial):
            return base.power(exponent, self.limits)
        degree = base.degree * exponent
        if degree > self.limits.max_degree:
            raise LimitError(f"degree {base.degree}*{exponent} = {degree} exceeds the limit of "
                             f"{self.limits.max_degree}", "max_degree", self.limits.max_degree)
        coefficient = base.coefficient
        if coefficient != 1:  # powers of numbers are rare in long sums: the exact type checks their size
            coefficient = _exact(coefficient) ** exponent
        return _Monomial(coefficient, {variable: power * exponent for variable, power in base.powers.items()},
                         degree)

    @staticmethod
    def degree_of(value):
        """Total degree; -1 for zero, as :attr:`Polynomial.degree`."""
        if isinstance(value, _Monomial):
            return -1 if value.coefficient == 0 else value.degree
        return value.degree

    @staticmethod
    def constant_of(value):
        """The value of a constant (degree <= 0)."""
        if isinstance(value, _Monomial):
            return _exact(value.coefficient)
        return value.coefficients[0] if value.n_terms else ExactCoefficient.zero()

    # -- grammar ------------------------------------------------------------------------------
    def equation(self):
        left = self.expr()
        if self.is_op("="):
            self.advance()
            right = self.expr()
            if self.is_op("="):
                self.fail("the end of the equation (only one '=' is allowed)")
            left = self.sum_of([left, self.negated(right)])
        if self.current.kind != "end":
            if self.is_op(")"):
                self.fail("an operator or the end of the equation", hint=" (unbalanced ')')")
            self.fail("an operator (+ - * / ^) or the end of the equation")
        return self.as_polynomial(left)

    def expr(self):
        parts = [self.term()]
        gathered = _size(parts[0])
        merge_at = self.limits.max_terms
        sign = None
        while self.current.kind == "op" and self.current.text in "+-":
            sign = self.advance()
            right = self.term()
            parts.append(right if sign.text == "+" else self.negated(right))
            gathered += _size(right)
            if gathered > merge_at:  # merge now and then so that a cancelling sum stays bounded in memory
                parts = [self.sum_of(parts)]
                self.check_terms(parts[0], sign)
                gathered = parts[0].n_terms
                merge_at = max(self.limits.max_terms, 2 * gathered)  # doubling: merges stay linear in total
        if len(parts) == 1:
            return parts[0]
        result = self.sum_of(parts)
        self.check_terms(result, sign)
        return result

    def term(self):
        result = self.unary()
        while self.current.kind == "op" and self.current.text in "*/":
            operator = self.advance()
            start = self.current
            right = self.unary()
            if operator.text == "*":
                try:  # not self.guarded: a closure per product is a tenth of the reading time
                    result = self.product(result, right)
                except (LimitError, InputError) as err:
                    raise ParseError(str(err), column=operator.column, text=self.text) from None
            else:
                if self.degree_of(right) > 0:
                    raise ParseError("division by a polynomial is not allowed; divide only by a "
                                     "nonzero constant", column=start.column, text=self.text)
                if (isinstance(right, _Monomial) and type(right.coefficient) in (int, Fraction)
                        and right.coefficient != 0):
                    # a rational divisor (c/100000000*x*y) keeps the quotient a Fraction: the exact type's
                    # arithmetic cost half the reading time of decimal-fraction input
                    inverse = Fraction(1, 1) / right.coefficient
                else:
                    inverse = self.guarded(start, self.constant_of(right).reciprocal)
                result = self.guarded(operator, lambda: self.product(result, _Monomial(inverse, {}, 0)))
        return result

    def unary(self):
        negative = False
        while self.current.kind == "op" and self.current.text in "+-":  # a loop: any number of signs
            negative ^= self.advance().text == "-"
        operand = self.power()
        return self.negated(operand) if negative else operand

    def power(self):
        base = self.atom()
        if self.is_op("^"):
            operator = self.advance()
            exponent = self.exponent()
            if self.is_op("^"):
                self.fail("an operator other than '^'", hint="; chained powers are ambiguous, "
                          "use parentheses such as (x^2)^3")
            if exponent > self.limits.max_degree:
                raise ParseError(f"exponent {exponent} exceeds the degree limit of "
                                 f"{self.limits.max_degree}", column=operator.column, text=self.text)
            try:
                base = self.raised(base, exponent)
            except (LimitError, InputError) as err:
                raise ParseError(str(err), column=operator.column, text=self.text) from None
        if self.current.kind in ("number", "name") or self.is_op("("):
            self.fail("an operator (+ - * / ^)",
                      hint="; implicit multiplication is not allowed, insert '*'")
        return base

    def exponent(self):
        parenthesised = self.is_op("(")
        if parenthesised:
            self.advance()
        token = self.current
        if token.kind != "number" or not token.text.isdigit():
            self.fail("a non-negative integer exponent")
        self.advance()
        if len(token.text) > 9:
            raise ParseError(f"exponent {token.text} exceeds the degree limit of {self.limits.max_degree}",
                             column=token.column, text=self.text)
        if parenthesised:
            if not self.is_op(")"):
                self.fail("')' closing the exponent")
            self.advance()
        return int(token.text)

    def atom(self):
        token = self.current
        if token.kind == "number":
            self.advance()
            value = _number_value(token, self.text)
            if value.denominator != 1 and printed_double(token.text, value):
                self.literal_digits = max(self.literal_digits, literal_digits(token.text))
            if not token.text.isdigit():  # maybe decimal places written (decision 0132: literal_precision)
                self.decimals.append((token.column, token.text))
                value += self.shifts.get(token.column, 0)
            return _Monomial(value.numerator if value.denominator == 1 else value, {}, 0)
        if token.kind == "name":
            self.advance()
            if token.text in self.index:
                return _Monomial(1, {self.index[token.text]: 1}, 1)
            if token.text == "I":
                return _Monomial(ExactCoefficient.imaginary_unit(), {}, 0)
            if token.text == "sqrt":
                return self.square_root(token)
            declared = ", ".join(self.variables) if self.variables else "none"
            if len(declared) > 120:
                declared = declared[:117] + "..."
            raise ParseError(f"unknown variable '{token.text}' (declared: {declared})",
                             column=token.column, text=self.text)
        if self.is_op("("):
            self.advance()
            inner = self.nested(token, self.expr)
            if not self.is_op(")"):
                self.fail("')'", hint=f" to close the '(' at column {token.column}")
            self.advance()
            return inner
        self.fail("a number, a variable or '('")

    def square_root(self, token):
        if not self.is_op("("):
            self.fail("'(' after sqrt")
        self.advance()
        argument = self.nested(token, self.expr)
        if not self.is_op(")"):
            self.fail("')' closing sqrt(")
        self.advance()
        if self.degree_of(argument) > 0:
            raise ParseError("sqrt takes a constant, not a polynomial", column=token.column, text=self.text)
        value = self.constant_of(argument)
        if not value.is_rational():
            raise ParseError(f"sqrt takes a rational constant, got {value.to_text()}",
                             column=token.column, text=self.text)
        if value.as_fraction() < 0:
            raise ParseError(f"sqrt of the negative number {value.to_text()}; write I*sqrt(...) "
                             "for an imaginary root", column=token.column, text=self.text)
        root = self.guarded(token, lambda: ExactCoefficient.square_root(value.as_fraction()))
        return _Monomial(root, {}, 0)

    def nested(self, token, read):
        """Read a parenthesised part one level deeper; refuse nesting beyond :data:`MAX_NESTING`."""
        self.depth += 1
        if self.depth > MAX_NESTING:
            raise ParseError(f"parentheses nested more than {MAX_NESTING} levels deep", column=token.column,
                             text=self.text)
        result = read()
        self.depth -= 1
        return result

    def check_terms(self, result, token):
        if result.n_terms > self.limits.max_terms:
            raise ParseError(f"{result.n_terms} terms exceed the limit of {self.limits.max_terms}",
                             column=token.column, text=self.text)


class _Monomial:
    """One term while reading: a coefficient times powers of variables ``{index: power}``.

    Most of a written-out equation is such terms. Keeping them this way until a sum is complete
    costs about a microsecond a token; building a Polynomial for every number, variable and product
    cost tens of microseconds (decision 0037). The coefficient is a Python ``int`` or ``Fraction``
    while it is rational (their arithmetic is ten times cheaper), an ``ExactCoefficient`` otherwise.
    """

    __slots__ = ("coefficient", "powers", "degree")

    def __init__(self, coefficient, powers, degree):
        self.coefficient, self.powers, self.degree = coefficient, powers, degree


def _size(value):
    """Terms a value adds to a sum (before merging)."""
    return 1 if isinstance(value, _Monomial) else value.n_terms


def _exact(value, cache=None):
    """``value`` (an int, a Fraction or an ExactCoefficient) as an ExactCoefficient, through ``cache``."""
    if isinstance(value, ExactCoefficient):
        return value
    if cache is None:
        return ExactCoefficient.rational(value)
    known = cache.get(value)
    if known is None:
        known = cache[value] = ExactCoefficient.rational(value)
    return known


def parse_polynomial(text, variables, limits=DEFAULT_LIMITS):
    """Read one polynomial (or one equation ``lhs = rhs``, giving ``lhs - rhs``).

    Parameters
    ----------
    text : str
        The equation in numag's grammar (see the module documentation).
    variables : sequence of str
        Declared variable names, in order.
    limits : Limits, optional
        Size limits.

    Returns
    -------
    Polynomial
        With exact coefficients.

    Raises
    ------
    ParseError
        Naming the column, what was found and what was expected.

    Examples
    --------
    >>> parse_polynomial("x**2 = y^3", ["x", "y"]).to_text(["x", "y"])
    '-y^3 + x^2'
    """
    return _parse(text, variables, limits)[0]


def _parse(text, variables, limits, shifts=None, decimals=None):
    """:func:`parse_polynomial`, and the most significant digits of a non-integer literal in the text.

    ``shifts``: column -> a change of the value of the non-integer literal there; ``decimals``: a list to which
    the (column, text) of each non-integer literal is appended."""
    if not isinstance(text, str):
        raise ParseError(f"an equation must be text, got {type(text).__name__}")
    # Reading creates a million small objects and no reference cycle: the cycle collector, triggered
    # by the allocations alone, would walk the growing token list again and again (half the time).
    collecting = gc.isenabled()
    gc.disable()
    try:
        parser = _Parser(text, variables, limits)
        parser.shifts = shifts or {}
        result = parser.equation(), parser.literal_digits
        if decimals is not None:
            decimals.extend(parser.decimals)
        return result
    finally:
        if collecting:
            gc.enable()


def parse_constant(text):
    """Read a constant in the equation grammar, e.g. ``"1+2*I"`` or ``"sqrt(2)/2"``.

    Returns
    -------
    WrittenConstant
        The exact value, with the decimal literals as written (an :class:`ExactCoefficient`).

    Examples
    --------
    >>> complex(parse_constant("1/2 - 3*I"))
    (0.5-3j)
    >>> [(digits, float(unit)) for _, digits, unit in parse_constant("0.6000000000000000000100000 + 1/3").decimals]
    [(25, 1e-25)]
    >>> parse_constant("3/5 + 1/10^20").decimals
    ()
    """
    found = []
    value = _constant(text, decimals=found)
    written = WrittenConstant(value.parts)
    written.text = text
    written.decimals = tuple((column, *literal_precision(literal)) for column, literal in found
                             if literal_precision(literal) is not None)
    return written


class WrittenConstant(ExactCoefficient):
    """A constant as read from text: its exact value, and the decimal literals written in it.

    ``decimals`` holds, for each literal that is not an integer, its column, its significant digits as written
    (trailing zeros included) and the unit of its last written digit. Whether such a decimal is rounded data is
    the reader's rule (decision 0132: :func:`numag.singular.nearness.point_precision`); integers, rationals and
    square roots are exact. Arithmetic gives plain :class:`ExactCoefficient`.
    """

    __slots__ = ("text", "decimals")

    def moved_by(self, column, change):
        """How far the constant moves when the literal at ``column`` changes by ``change`` (exactly, then as a
        float): ``0.12345678901234567*1000`` moves 1000 times its literal.

        Examples
        --------
        >>> c = parse_constant("0.12345678901234567*1000")
        >>> c.moved_by(c.decimals[0][0], Fraction(1, 10 ** 17))
        1e-14
        """
        return abs(complex(_constant(self.text, shifts={column: change}) - self))


def _constant(text, shifts=None, decimals=None):
    try:
        polynomial = _parse(text, [], DEFAULT_LIMITS, shifts, decimals)[0]
    except ParseError as err:
        if err.reason.startswith("unknown variable"):
            raise ParseError(f"found {err.reason.split()[2]} where a number was expected (a value cannot "
                             "contain a variable)", column=err.column, text=err.text) from None
        raise
    return polynomial.coefficients[0] if polynomial.n_terms else ExactCoefficient.zero()


def parse_system(equations, variables, projective=False, name=None, limits=DEFAULT_LIMITS):
    """Read a system of equations.

    Parameters
    ----------
    equations : sequence of str
    variables : sequence of str
    projective : bool, default False
        The equations are homogeneous and meant in projective space.
    name : str, optional
    limits : Limits, optional

    Returns
    -------
    PolynomialSystem

    Raises
    ------
    ParseError
        Naming the equation (1-based) and the column.
    InputError
        For invalid variable names, an empty system, or a non-homogeneous equation
        in a projective system.

    Examples
    --------
    >>> parse_system(["x^2 + y^2 - z^2"], ["x", "y", "z"], projective=True).ambient_dimension
    2
    """
    variables = list(variables)
    for position, variable in enumerate(variables, 1):
        if not is_valid_name(variable):
            if isinstance(variable, str) and variable in RESERVED_NAMES:
                raise InputError(f"variable {position}: '{variable}' is reserved by the grammar")
            raise InputError(f"variable {position}: {variable!r} is not a valid name "
                             "(letters, digits and '_', not starting with a digit)")
    polynomials, digits = [], 0
    for number, text in enumerate(equations, 1):
        try:
            polynomial, written = _parse(text, variables, limits)
        except ParseError as err:
            raise err.located(equation=number) from None
        polynomials.append(polynomial)
        digits = max(digits, written)
    system = PolynomialSystem(variables, polynomials, projective=projective, name=name, limits=limits)
    system.literal_digits = digits
    return system
