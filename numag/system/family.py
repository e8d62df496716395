"""Families of systems: equations in variables x and parameters p, and their members at given values.

A system file may declare ``parameters = ["b", "c"]`` beside ``variables``; its equations then use
both. The file describes the *family* F(x; p) = 0; the *member* at p = v is the system in x alone
with the values substituted exactly (exact coefficients times exact powers of the values), so that
a member at rational values is as exact as a system written out by hand. A ``[ranges]`` table gives
parameters a real interval (``b = [0, 10]``) for pictures and sweeps.

Examples
--------
>>> from numag.system.parse import parse_system
>>> family = Family(parse_system(["x^2 - b", "y - c*x"], ["x", "y", "b", "c"]), ("b", "c"))
>>> family.variables, family.parameters
(('x', 'y'), ('b', 'c'))
>>> family.member(family.values_from_text("b=4, c=1/2")).to_texts()
['x^2 - 4', '-1/2*x + y']
"""

from dataclasses import dataclass, field
import math

import numpy as np

from ..errors import InputError, PointError
from .exact import ExactCoefficient
from .parse import PRINTED_DOUBLE_DIGITS, WrittenConstant
from .polynomial import Polynomial, PolynomialSystem

__all__ = ["Family", "ParameterRange", "substitute_values"]


@dataclass(frozen=True)
class ParameterRange:
    """A real interval of one parameter (from the ``[ranges]`` table).

    Examples
    --------
    >>> ParameterRange("b", 0.0, 10.0).contains(3.0)
    True
    """

    name: str
    low: float
    high: float

    def contains(self, value):
        """Whether a real value lies in the closed interval."""
        return self.low <= value <= self.high


def substitute_values(polynomial, indices, values):
    """The polynomial with the variables at ``indices`` set to ``values`` and dropped.

    Exact polynomials at exact values stay exact (the coefficient of each term is multiplied by the
    exact powers of the values); otherwise the coefficients become complex doubles.

    Parameters
    ----------
    polynomial : Polynomial
    indices : sequence of int
        Positions of the substituted variables.
    values : sequence of ExactCoefficient or complex
        One value per position.

    Returns
    -------
    Polynomial
        In the remaining variables, in their order.

    Examples
    --------
    >>> from numag.system.parse import parse_polynomial
    >>> p = parse_polynomial("x^2 + b^3*x - b", ["x", "b"])
    >>> substitute_values(p, [1], [ExactCoefficient.rational(2)]).to_text(["x"])
    'x^2 + 8*x - 2'
    """
    indices = [int(k) for k in indices]
    keep = [j for j in range(polynomial.n_variables) if j not in indices]
    exact = polynomial.is_exact and all(isinstance(v, ExactCoefficient) for v in values)
    if exact:
        coefficients = []
        for row, coefficient in zip(polynomial.exponents, polynomial.coefficients):
            for k, value in zip(indices, values):
                if row[k]:
                    coefficient = coefficient * value ** int(row[k])
            coefficients.append(coefficient)
        coefficients = np.array(coefficients, dtype=object)
    else:
        numeric = np.array([complex(v) for v in values])
        powers = np.prod(numeric[None, :] ** polynomial.exponents[:, indices], axis=1) if indices else 1.0
        coefficients = polynomial.numeric_coefficients() * powers
    return Polynomial(polynomial.exponents[:, keep], coefficients, len(keep))


@dataclass
class Family:
    """Equations F(x; p) in variables x and parameters p (the parameters last in ``system``).

    Attributes
    ----------
    system : PolynomialSystem
        The equations in the unknowns (x, p): the *incidence system* of the family.
    parameters : tuple of str
        The names of p (the last ``len(parameters)`` variables of ``system``).
    ranges : dict of str to ParameterRange
        Real intervals from the ``[ranges]`` table.
    """

    system: PolynomialSystem
    parameters: tuple
    ranges: dict = field(default_factory=dict)

    def __post_init__(self):
        self.parameters = tuple(self.parameters)
        if tuple(self.system.variables[-len(self.parameters):] if self.parameters else ()) != self.parameters:
            raise InputError("the parameters must be the last variables of the family's system")
        if len(self.parameters) >= self.system.n_variables:
            raise InputError("a family needs at least one variable besides its parameters")

    @property
    def variables(self):
        """The names of x."""
        return tuple(self.system.variables[:self.n_variables])

    @property
    def n_variables(self):
        return self.system.n_variables - len(self.parameters)

    @property
    def n_parameters(self):
        return len(self.parameters)

    @property
    def parameter_indices(self):
        return list(range(self.n_variables, self.system.n_variables))

    def values_from_text(self, text):
        """Read ``"b=3, c=1/2"`` (every parameter, values in the equation grammar) into exact values.

        Raises
        ------
        PointError
            Naming the malformed, unknown, repeated or missing parameter.
        """
        return self._read_values(text, partial=False)

    def _read_values(self, text, partial):
        from .files import parse_point_assignment  # files builds families: imported here, not at the top

        try:
            return parse_point_assignment(text, list(self.parameters), partial=partial)
        except PointError as err:
            raise PointError(f"--at: {err}".replace("is not a variable of the system", "is not a parameter of "
                                                    "the family")) from None

    def fixing(self, text):
        """The family with the parameters ``text`` names fixed (``"c=4"``, exactly substituted); the others stay.

        Raises
        ------
        PointError
            Naming a malformed, unknown or repeated parameter, or when no parameter would be left free.

        Examples
        --------
        >>> from numag.system.parse import parse_system
        >>> family = Family(parse_system(["x^3 + p*x + q"], ["x", "p", "q"]), ("p", "q"))
        >>> line = family.fixing("p=-3")
        >>> line.parameters, line.system.to_texts()
        (('q',), ['x^3 - 3*x + q'])
        """
        given = self._read_values(text, partial=True)
        if len(given) == len(self.parameters):
            raise PointError(f"--at: fixes every parameter ({', '.join(self.parameters)}); leave at least one free "
                             "(one member is solved by solve, singular or check with --at)")
        family = self
        for name, value in given.items():
            family = family.restricted(family.parameters.index(name), value)
        return family

    def restricted(self, index, value):
        """The family with parameter ``index`` fixed at ``value`` (exactly substituted; one parameter fewer).

        Examples
        --------
        >>> from numag.system.parse import parse_system
        >>> family = Family(parse_system(["x^3 + p*x + q"], ["x", "p", "q"]), ("p", "q"))
        >>> line = family.restricted(0, ExactCoefficient.rational(-3))
        >>> line.parameters, line.system.to_texts()
        (('q',), ['x^3 - 3*x + q'])
        """
        position = self.n_variables + int(index)
        polynomials = [substitute_values(p, [position], [value]) for p in self.system.polynomials]
        names = [v for k, v in enumerate(self.system.variables) if k != position]
        parameters = tuple(p for k, p in enumerate(self.parameters) if k != int(index))
        system = PolynomialSystem(names, polynomials, name=f"{self.system.name or 'family'} at "
                                  f"{self.parameters[int(index)]}={_text(value)}")
        system.literal_digits = _member_digits(self.system, [value])
        return Family(system, parameters, {k: v for k, v in self.ranges.items() if k in parameters})

    def member(self, values, name=None):
        """The system in x at p = ``values`` (exactly substituted when the values are exact).

        Parameters
        ----------
        values : sequence of ExactCoefficient or complex
            One value per parameter, in order.
        name : str, optional

        Returns
        -------
        PolynomialSystem
        """
        if len(values) != self.n_parameters:
            raise InputError(f"{len(values)} values given for {self.n_parameters} parameters")
        for value, parameter in zip(values, self.parameters):
            size = abs(complex(value))
            if not math.isfinite(size):
                raise InputError(f"the value of {parameter} is not finite")
        polynomials = [substitute_values(p, self.parameter_indices, values) for p in self.system.polynomials]
        label = ", ".join(f"{n}={_text(v)}" for n, v in zip(self.parameters, values))
        system = PolynomialSystem(self.variables, polynomials, projective=self.system.projective,
                                  name=name or f"{self.system.name or 'member'} at {label}")
        system.literal_digits = _member_digits(self.system, values)
        return system


def _member_digits(system, values):
    """The most significant digits of a decimal written in a member's equations or in its values (decision 0146),
    as :func:`numag.system.parse.parse_system` records them; None (the coefficients judge, decision 0062) unless the
    family was read from text and every value was written (``--at b=5+1/10^12``).

    Without it, a member's expanded coefficient 25000000000010000000000001/10^24 read as a printed double, and a
    smooth member 1e-12 from a singular one was called singular (decision 0146).
    """
    written = getattr(system, "literal_digits", None)
    if written is None or not all(isinstance(v, WrittenConstant) for v in values):
        return None
    digits = [d for v in values for _, d, _ in v.decimals if d <= PRINTED_DOUBLE_DIGITS]
    return max([written] + digits)


def _text(value):
    if isinstance(value, ExactCoefficient):
        return value.to_text()
    z = complex(value)
    return f"{z.real:.10g}" if z.imag == 0 else f"{z:.10g}"
