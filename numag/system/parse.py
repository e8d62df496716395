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
import re

from ..errors import InputError, LimitError, ParseError
from .exact import ExactCoefficient
from .polynomial import DEFAULT_LIMITS, RESERVED_NAMES, Polynomial, PolynomialSystem

__all__ = ["parse_polynomial", "parse_system", "parse_constant", "is_valid_name", "MAX_EQUATION_LENGTH",
           "MAX_NESTING", "MAX_TOKENS"]

#: Longest equation text accepted (characters).
MAX_EQUATION_LENGTH = 1_000_000
#: Most tokens (numbers, names, operators) in one equation: each costs a polynomial operation (tens of
#: microseconds), so this bounds the reading time to seconds.
MAX_TOKENS = 100_000
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


def _tokenize(text):
    tokens, i, length = [], 0, len(text)
    while i < length:
        ch = text[i]
        if ch in " \t\r\n":
            i += 1
            continue
        if ch.isascii() and (ch.isdigit() or (ch == "." and i + 1 < length and text[i + 1].isascii()
                                                and text[i + 1].isdigit())):
            match = _NUMBER.match(text, i)
            tokens.append(_Token("number", match.group(0), i + 1))
            i = match.end()
            continue
        if ch.isascii() and (ch.isalpha() or ch == "_"):
            match = _NAME_PREFIX.match(text, i)
            tokens.append(_Token("name", match.group(0), i + 1))
            i = match.end()
            continue
        for op in _OPERATORS:
            if text.startswith(op, i):
                tokens.append(_Token("op", "^" if op == "**" else op, i + 1))
                i += len(op)
                break
        else:
            raise ParseError(f"unexpected character {ch!r}", column=i + 1, text=text)
    tokens.append(_Token("end", "", length + 1))
    return tokens


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
        if len(text) > MAX_EQUATION_LENGTH:
            raise ParseError(f"text longer than {MAX_EQUATION_LENGTH} characters", column=1)
        self.tokens = _tokenize(text)
        if len(self.tokens) > MAX_TOKENS:
            raise ParseError(f"more than {MAX_TOKENS} numbers, names and operators in one equation (expand "
                             "less, or write products and powers)", column=1)
        self.position = 0
        self.depth = 0

    # -- helpers ------------------------------------------------------------------------------
    @property
    def current(self):
        return self.tokens[self.position]

    def advance(self):
        token = self.tokens[self.position]
        self.position += 1
        return token

    def fail(self, expected, token=None, hint=""):
        token = token or self.current
        raise ParseError(f"found {token.describe()} where {expected} was expected{hint}",
                         column=token.column, text=self.text)

    def is_op(self, symbol):
        return self.current.kind == "op" and self.current.text == symbol

    def guarded(self, token, operation):
        try:
            return operation()
        except LimitError as err:
            raise ParseError(str(err), column=token.column, text=self.text) from None
        except InputError as err:
            raise ParseError(str(err), column=token.column, text=self.text) from None

    # -- grammar ------------------------------------------------------------------------------
    def equation(self):
        left = self.expr()
        if self.is_op("="):
            self.advance()
            right = self.expr()
            if self.is_op("="):
                self.fail("the end of the equation (only one '=' is allowed)")
            left = left - right
        if self.current.kind != "end":
            if self.is_op(")"):
                self.fail("an operator or the end of the equation", hint=" (unbalanced ')')")
            self.fail("an operator (+ - * / ^) or the end of the equation")
        return left

    def expr(self):
        result = self.term()
        while self.current.kind == "op" and self.current.text in "+-":
            sign = self.advance()
            right = self.term()
            result = result + right if sign.text == "+" else result - right
            self.check_terms(result, sign)
        return result

    def term(self):
        result = self.unary()
        while self.current.kind == "op" and self.current.text in "*/":
            operator = self.advance()
            start = self.current
            right = self.unary()
            if operator.text == "*":
                result = self.guarded(operator, lambda: result.multiply(right, self.limits))
            else:
                if right.degree > 0:
                    raise ParseError("division by a polynomial is not allowed; divide only by a "
                                     "nonzero constant", column=start.column, text=self.text)
                divisor = right.coefficients[0] if right.n_terms else ExactCoefficient.zero()
                inverse = self.guarded(start, divisor.reciprocal)
                result = self.guarded(operator, lambda: result.multiply(
                    Polynomial.constant(inverse, self.n), self.limits))
        return result

    def unary(self):
        negative = False
        while self.current.kind == "op" and self.current.text in "+-":  # a loop: any number of signs
            negative ^= self.advance().text == "-"
        operand = self.power()
        return -operand if negative else operand

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
            base = self.guarded(operator, lambda: base.power(exponent, self.limits))
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
            return Polynomial.constant(ExactCoefficient.rational(value), self.n)
        if token.kind == "name":
            self.advance()
            if token.text == "I":
                return Polynomial.constant(ExactCoefficient.imaginary_unit(), self.n)
            if token.text == "sqrt":
                return self.square_root(token)
            if token.text in self.index:
                return Polynomial.variable(self.index[token.text], self.n)
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
        if argument.degree > 0:
            raise ParseError("sqrt takes a constant, not a polynomial", column=token.column, text=self.text)
        value = argument.coefficients[0] if argument.n_terms else ExactCoefficient.zero()
        if not value.is_rational():
            raise ParseError(f"sqrt takes a rational constant, got {value.to_text()}",
                             column=token.column, text=self.text)
        if value.as_fraction() < 0:
            raise ParseError(f"sqrt of the negative number {value.to_text()}; write I*sqrt(...) "
                             "for an imaginary root", column=token.column, text=self.text)
        root = self.guarded(token, lambda: ExactCoefficient.square_root(value.as_fraction()))
        return Polynomial.constant(root, self.n)

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
    if not isinstance(text, str):
        raise ParseError(f"an equation must be text, got {type(text).__name__}")
    return _Parser(text, variables, limits).equation()


def parse_constant(text):
    """Read a constant in the equation grammar, e.g. ``"1+2*I"`` or ``"sqrt(2)/2"``.

    Returns
    -------
    ExactCoefficient

    Examples
    --------
    >>> complex(parse_constant("1/2 - 3*I"))
    (0.5-3j)
    """
    try:
        polynomial = parse_polynomial(text, [])
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
    polynomials = []
    for number, text in enumerate(equations, 1):
        try:
            polynomials.append(parse_polynomial(text, variables, limits))
        except ParseError as err:
            raise err.located(equation=number) from None
    return PolynomialSystem(variables, polynomials, projective=projective, name=name, limits=limits)
