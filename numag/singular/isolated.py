"""Isolated singular points of a complete intersection, from a square null-vector system and a chosen start.

For X = V(f_1, ..., f_c) in C^n (c equations, codimension c), a point is singular where the rows of
J have a dependency: lambda^T A J(x) B = 0 for some lambda with b . lambda = 1
(:func:`~numag.singular.locus.null_vector_system`). That system has c + n + 1 equations in n + c
unknowns; here its n Jacobian rows are replaced by n - 1 random combinations of them, which keeps
every equation's multidegree in the groups x and lambda: F has degree (d_i, 0), the combinations
(d - 1, 1), the normalisation (0, 1). The 2-homogeneous start (x and lambda grouped, as
:class:`~numag.tracking.multihomogeneous.GroupSource` ``NULL_VECTOR`` says) then pays for lambda
with degree 1 instead of the full degree the total-degree start charges. Every solution is checked
against all the null-vector equations, and the x parts are grouped into distinct points.

This serves when X's singular points are isolated; positive-dimensional singular loci need
:func:`~numag.singular.locus.singular_locus` (witness sets).

Examples
--------
>>> from numag.system.parse import parse_system
>>> node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
>>> found = isolated_singular_points(node, start="multihomogeneous", seed=1)
>>> bool(np.abs(found.points).max() < 1e-8), len(found.points), found.paths, found.start["paths"]
(True, 1, 6, {'total-degree': 9, 'multihomogeneous': 6})
"""

from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..numeric.cluster import cluster_labels, groups
from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..numeric.seeds import random_state
from ..system.polynomial import PolynomialSystem
from ..tracking.solve import SolveOptions, solve_system
from ..tracking.starts import StartKind
from .locus import null_vector_system

__all__ = ["IsolatedSingularPoints", "square_null_vector_system", "isolated_singular_points"]


@dataclass
class IsolatedSingularPoints:
    """Distinct singular points found, and what finding them cost.

    Attributes
    ----------
    points : ndarray of complex, shape (k, n)
    paths : int
        Paths tracked.
    start : dict
        The solve report's ``start`` block (chosen start, counts, groups).
    failed : int
        Paths that failed (points may be missing when positive).
    seed : int
    """

    points: np.ndarray
    paths: int
    start: dict
    failed: int
    seed: int


def square_null_vector_system(system, rng):
    """The null-vector system of a complete intersection with its n Jacobian rows as n - 1 combinations.

    Returns
    -------
    (PolynomialSystem, PolynomialSystem, list of list of str)
        The square system, the full null-vector system (to check solutions against) and the
        variable groups [x, lambda].
    """
    if system.projective:
        raise InputError("isolated singular points by the null-vector system are for affine systems")
    n, c = system.n_variables, system.n_equations
    if c > n:
        raise InputError(f"{c} equations in {n} unknowns: a complete intersection has at most n equations")
    full = null_vector_system(system, c, rng)
    rows = full.polynomials[c:-1]
    if len(rows) < 2:
        raise InputError("the Jacobian has fewer than two nonzero columns: nothing to combine")
    weights = (rng.standard_normal((len(rows) - 1, len(rows))) + 1j * rng.standard_normal((len(rows) - 1, len(rows))))
    combined = []
    for row_weights in weights:
        total = rows[0] * complex(row_weights[0])
        for weight, row in zip(row_weights[1:], rows[1:]):
            total = total + row * complex(weight)
        combined.append(total * (1.0 / total.coefficient_norm()))
    square = PolynomialSystem(full.variables, list(full.polynomials[:c]) + combined + [full.polynomials[-1]],
                              name=system.name)
    return square, full, [list(full.variables[:n]), list(full.variables[n:])]


def isolated_singular_points(system, start="multihomogeneous", seed=None, options=None, tolerance=1e-8):
    """Singular points of a complete intersection with isolated singularities (see the module docstring).

    Parameters
    ----------
    system : PolynomialSystem
        Affine, c equations in n unknowns, X of codimension c.
    start : str
        "total-degree", "multihomogeneous" (groups x and lambda), "polyhedral" or "auto".
    seed : int, optional
    options : SolveOptions, optional
        The start and groups are set here.
    tolerance : float
        Largest scaled residual of the full null-vector system at a kept regular solution (its square
        root for a multiple one).

    Returns
    -------
    IsolatedSingularPoints
    """
    seed, rng = random_state(seed)
    square, full, groups_of = square_null_vector_system(system, rng)
    kind = StartKind.parse(start)
    options = SolveOptions(**{**(options or SolveOptions()).__dict__, "start": kind.value,
                              "groups": tuple(tuple(g) for g in groups_of)
                              if kind in (StartKind.MULTIHOMOGENEOUS, StartKind.AUTO) else None})
    result = solve_system(square, options, seed=int(rng.integers(2**32)))
    n = system.n_variables
    solutions = np.array([s.point for s in result.solutions], dtype=complex).reshape(-1, full.n_variables)
    if len(solutions):
        values = BatchEvaluator(full.polynomials).evaluate(solutions, jacobian=False)
        sizes = TermSizes(full.polynomials).values(solutions)
        # a multiple solution is known to about the m-th root of the working accuracy (a cusp's triple
        # point to 1e-6 after refinement): it is held to the square root of the tolerance; the extras of
        # the random combinations miss an equation of the full system by far more (order one)
        allowed = np.array([tolerance if s.multiplicity == 1 else np.sqrt(tolerance) for s in result.solutions])
        solutions = solutions[np.max(np.abs(values) / sizes, axis=1) <= allowed]
    x_points = solutions[:, :n]
    distinct = [x_points[members[0]] for members in groups(cluster_labels(x_points, 1e-6))] if len(x_points) else []
    counts = result.path_counts()
    return IsolatedSingularPoints(np.array(distinct, dtype=complex).reshape(-1, n), counts["tracked"],
                                  result.extra.get("start", {}), counts["failed"], seed)
