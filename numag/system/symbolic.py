"""sympy interoperability of the Python API: systems from sympy expressions and back, coefficients exact.

numag's exact coefficients are the numbers ``sum_k (a_k + b_k i) sqrt(r_k)`` with rational ``a_k, b_k``
and ``r_k`` (:class:`~numag.system.exact.ExactCoefficient`). A sympy coefficient built from
rationals, ``I`` and square roots of rationals with ``+``, ``*`` and integer powers is read exactly;
sympy ``Float`` coefficients are read as the decimal they print (``0.1`` is ``1/10``); anything else
(``pi``, a cube root, a symbol that is not a variable) is refused, naming the equation.

sympy is optional (``pip install sympy``) and only ever meets sympy objects a Python caller built:
files and command-line input are read by numag's own parser, never by sympy.

Examples
--------
>>> import sympy
>>> x, y = sympy.symbols("x y")
>>> system = system_from_sympy([y**2 - x**3 + sympy.sqrt(2) * x / 3 - sympy.I], [x, y])
>>> system.to_texts()
['-x^3 + y^2 + 1/3*sqrt(2)*x - I']
>>> system_to_sympy(system)[0][0] == y**2 - x**3 + sympy.sqrt(2) * x / 3 - sympy.I
True
"""

from fractions import Fraction

import numpy as np

from ..errors import InputError, LimitError
from .exact import ExactCoefficient
from .parse import is_valid_name
from .polynomial import DEFAULT_LIMITS, Polynomial, PolynomialSystem

__all__ = ["system_from_sympy", "system_to_sympy"]


def _sympy():
    try:
        import sympy
    except ImportError:
        raise InputError("sympy is not installed: pip install sympy (it is optional; numag's own parser reads "
                         "equations as text)") from None
    return sympy


def _exact(value, sympy, where):
    """An exact coefficient from a sympy number built of rationals, I and square roots of rationals."""
    if value.is_Rational:
        return ExactCoefficient.rational(Fraction(int(value.p), int(value.q)))
    if value is sympy.I:
        return ExactCoefficient.imaginary_unit()
    if value.is_Float:
        return ExactCoefficient.rational(Fraction(str(value)))
    if value.is_Add:
        total = ExactCoefficient.zero()
        for term in value.args:
            total = total + _exact(term, sympy, where)
        return total
    if value.is_Mul:
        product = ExactCoefficient.rational(1)
        for factor in value.args:
            product = product * _exact(factor, sympy, where)
        return product
    if value.is_Pow and value.exp.is_Rational:
        exponent = Fraction(int(value.exp.p), int(value.exp.q))
        if exponent.denominator == 1:
            base = _exact(value.base, sympy, where)
            return base ** int(exponent) if exponent >= 0 else base.reciprocal() ** int(-exponent)
        if exponent.denominator == 2 and value.base.is_Rational and value.base >= 0:
            root = ExactCoefficient.square_root(Fraction(int(value.base.p), int(value.base.q)))
            power = root ** abs(exponent.numerator)
            return power if exponent > 0 else power.reciprocal()
    raise InputError(f"{where}: the coefficient {str(value)[:60]} is not a number numag keeps exactly "
                     "(rationals, I and square roots of rationals)")


def system_from_sympy(expressions, symbols, projective=False, name=None, limits=DEFAULT_LIMITS):
    """A :class:`~numag.system.polynomial.PolynomialSystem` from sympy expressions, coefficients exact.

    Also available as ``numag.System.from_sympy``.

    Parameters
    ----------
    expressions : sequence of sympy expressions or equations
        Polynomials in ``symbols`` (``sympy.Eq(lhs, rhs)`` means ``lhs - rhs = 0``).
    symbols : sequence of sympy.Symbol
        The variables, in order; their names must be valid in numag's grammar.
    projective : bool, default False
    name : str, optional
    limits : Limits, optional

    Returns
    -------
    PolynomialSystem

    Raises
    ------
    InputError
        Naming the equation: not a polynomial in the symbols, another symbol in it, a coefficient
        that is not exact in numag's sense, a size beyond ``limits``; or sympy missing.

    Examples
    --------
    >>> import sympy
    >>> x, y = sympy.symbols("x y")
    >>> system_from_sympy([sympy.Eq(y**2, x**2 * (x + 1))], [x, y]).to_texts()
    ['-x^3 - x^2 + y^2']
    """
    sympy = _sympy()
    symbols = list(symbols)
    for position, symbol in enumerate(symbols, 1):
        if not isinstance(symbol, sympy.Symbol):
            raise InputError(f"variable {position}: {str(symbol)[:40]!r} is not a sympy Symbol")
        if not is_valid_name(symbol.name):
            raise InputError(f"variable {position}: {symbol.name[:40]!r} is not a valid name in numag's grammar "
                             "(letters, digits and '_', not starting with a digit; not I or sqrt)")
    n = len(symbols)
    polynomials = []
    for number, expression in enumerate(expressions, 1):
        where = f"equation {number}"
        if isinstance(expression, (int, Fraction)) and not isinstance(expression, bool):
            expression = sympy.Rational(expression.numerator, expression.denominator)
        if not isinstance(expression, sympy.Basic):  # text is never handed to sympy: numag's parser reads it
            raise InputError(f"{where}: expected a sympy expression, got {type(expression).__name__} (for text "
                             "use numag.parse_system)")
        if isinstance(expression, sympy.Equality):
            expression = expression.lhs - expression.rhs
        others = sorted(str(s) for s in expression.free_symbols - set(symbols))
        if others:
            raise InputError(f"{where}: {', '.join(others)[:60]} is not among the variables")
        try:
            terms = sympy.Poly(sympy.expand(expression), *symbols).as_dict(native=False) if n else {}
        except sympy.PolynomialError as err:
            raise InputError(f"{where}: not a polynomial in the variables ({str(err)[:60]})") from None
        if len(terms) > limits.max_terms:
            raise LimitError(f"{where}: {len(terms)} terms exceed the limit of {limits.max_terms}", "max_terms",
                             limits.max_terms)
        exponents = np.array([list(monomial) for monomial in terms], dtype=np.int64).reshape(len(terms), n)
        if len(terms) and exponents.sum(axis=1).max() > limits.max_degree:
            raise LimitError(f"{where}: degree {exponents.sum(axis=1).max()} exceeds the limit of "
                             f"{limits.max_degree}", "max_degree", limits.max_degree)
        coefficients = np.empty(len(terms), dtype=object)
        coefficients[:] = [_exact(coefficient, sympy, where) for coefficient in terms.values()]
        polynomials.append(Polynomial(exponents, coefficients, n))
    return PolynomialSystem([s.name for s in symbols], polynomials, projective=projective, name=name, limits=limits)


def _to_sympy_number(coefficient, sympy):
    if isinstance(coefficient, ExactCoefficient):
        total = sympy.Integer(0)
        for radicand, (real, imaginary) in coefficient.parts.items():
            value = (sympy.Rational(real.numerator, real.denominator)
                     + sympy.I * sympy.Rational(imaginary.numerator, imaginary.denominator))
            total += value * sympy.sqrt(sympy.Integer(radicand))
        return total
    value = complex(coefficient)  # an inexact coefficient stays inexact
    return sympy.Float(value.real) + (sympy.I * sympy.Float(value.imag) if value.imag else 0)


def system_to_sympy(system):
    """The system as sympy expressions and symbols, exact coefficients exact.

    Also available as ``system.to_sympy()``.

    Returns
    -------
    (list of sympy.Expr, list of sympy.Symbol)
        The left-hand sides (each ``= 0``) and the variables in order.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> expressions, symbols = system_to_sympy(parse_system(["x^2 - 1/2*sqrt(3)*I"], ["x"]))
    >>> expressions[0], symbols
    (x**2 - sqrt(3)*I/2, [x])
    """
    sympy = _sympy()
    symbols = [sympy.Symbol(name) for name in system.variables]
    expressions = []
    for polynomial in system.polynomials:
        total = sympy.Integer(0)
        for exponents, coefficient in zip(polynomial.exponents, polynomial.coefficients):
            monomial = sympy.Mul(*[s ** int(e) for s, e in zip(symbols, exponents) if e])
            total += _to_sympy_number(coefficient, sympy) * monomial
        expressions.append(sympy.expand(total))
    return expressions, symbols
