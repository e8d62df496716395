"""The equations of a claim: F with the c x c minors of its Jacobian (the singularity equations),
restriction to a coordinate subspace, the top-degree forms (points at infinity), and the tests for real
and rational coefficients that decide which proofs apply.

Examples
--------
>>> from numag.system.parse import parse_system
>>> _is_real(parse_system(["x^2 - 2"], ["x"]).polynomials), _is_real(parse_system(["x - I"], ["x"]).polynomials)
(True, False)
"""

import numpy as np

from ..errors import InputError
from ..numeric.minors import expanded_minors, random_minor_weights
from ..system.polynomial import DEFAULT_LIMITS, Polynomial

__all__ = ["singularity_equations"]


def _minor_equations(polynomials, size, n, max_minors, rng, limits=DEFAULT_LIMITS):
    """The size x size minors of the Jacobian of ``polynomials``: all, or random integer combinations.

    Returns (equations, all_minors) where all_minors says whether every minor is among them.
    """
    weights = random_minor_weights(len(polynomials), n, size, max_minors, rng, exact=True)
    return expanded_minors(polynomials, weights, limits), weights.complete


def singularity_equations(system, codimension, max_minors=60, seed=0):
    """F together with the c x c minors of its Jacobian (c = ``codimension``): zero exactly at rank J < c.

    Parameters
    ----------
    system : PolynomialSystem
    codimension : int
    max_minors : int
        Beyond this many minors, n - c + 1 random integer combinations of them.
    seed : int

    Returns
    -------
    (list of Polynomial, bool)
        The equations and whether every minor is among them.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> equations, complete = singularity_equations(parse_system(["y^2 - x^3"], ["x", "y"]), 1)
    >>> [p.to_text(["x", "y"]) for p in equations], complete
    (['-x^3 + y^2', '-3*x^2', '2*y'], True)
    """
    if not 1 <= codimension <= min(system.n_equations, system.n_variables):
        raise InputError(f"codimension {codimension} is impossible for {system.n_equations} equations "
                         f"in {system.n_variables} variables")
    rng = np.random.default_rng(seed)
    minors, complete = _minor_equations(system.polynomials, codimension, system.n_variables, max_minors, rng)
    return list(system.polynomials) + minors, complete


def _restrict(polynomial, indices):
    """The polynomial with the variables ``indices`` set to 0 (and dropped): exact, term by term."""
    indices = sorted(indices)
    if not indices:
        return polynomial
    keep = np.all(polynomial.exponents[:, indices] == 0, axis=1)
    exponents = np.delete(polynomial.exponents[keep], indices, axis=1)
    return Polynomial(exponents, polynomial.coefficients[keep], polynomial.n_variables - len(indices))


def _is_constant(polynomial):
    return polynomial.n_terms == 0 or (polynomial.n_terms == 1 and not polynomial.exponents.any())


def _is_real(polynomials):
    for p in polynomials:
        if p.is_exact:
            if not all(c.is_real() for c in p.coefficients):
                return False
        elif np.any(np.abs(p.numeric_coefficients().imag) > 0):
            return False
    return True


def _is_rational(polynomials):
    return all(p.is_exact and all(c.is_rational() for c in p.coefficients) for p in polynomials)
