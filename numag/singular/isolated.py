"""Isolated singular points of a complete intersection, from a square null-vector system and a chosen start.

For X = V(f_1, ..., f_c) in C^n (c equations, codimension c), a point is singular where the rows of
J have a dependency: lambda^T A J(x) B = 0 for some lambda with b . lambda = 1
(:func:`null_vector_system`). That system has c + n + 1 equations in n + c
unknowns; here its n Jacobian rows are replaced by n - 1 random combinations of them, which keeps
every equation's multidegree in the groups x and lambda: F has degree (d_i, 0), the combinations
(d - 1, 1), the normalisation (0, 1). The 2-homogeneous start (x and lambda grouped, as
:class:`~numag.tracking.multihomogeneous.GroupSource` ``NULL_VECTOR`` says) then pays for lambda
with degree 1 instead of the full degree the total-degree start charges. Every solution is checked
against all the null-vector equations, and the x parts are grouped into distinct points.

This serves when X's singular points are isolated. :func:`finite_singular_points` also proves that
they are (Bertini: for a generic hyperplane H, Sing(X cut by H) = Sing(X) cut by H, so the singular set
of a reduced complete intersection of dimension d is finite exactly when the curve X cut by d - 1
random hyperplanes has no singular point, and a reduced curve's singular set is finite); it is the
route :func:`~numag.singular.locus.singular_locus` takes with a start other than total degree, and
it falls back to witness sets when the proof fails.

Examples
--------
>>> from numag.system.parse import parse_system
>>> node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
>>> found = isolated_singular_points(node, start="multihomogeneous", seed=1)
>>> bool(np.abs(found.points).max() < 1e-8), len(found.points), found.paths, found.start["paths"]
(True, 1, 6, {'total-degree': 9, 'multihomogeneous': 6})
"""

from dataclasses import dataclass, field
import math

import numpy as np

from ..errors import InputError
from ..numeric.cluster import cluster_labels, groups
from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..numeric.refine import ZeroKind, newton_zero_test
from ..numeric.seeds import random_state
from ..system.display import counted
from ..system.polynomial import Polynomial, PolynomialSystem
from ..tracking.multihomogeneous import multihomogeneous_bezout
from ..tracking.solve import SolveOptions, lost_first_stage_paths, solve_system
from ..tracking.starts import StartKind

__all__ = ["IsolatedSingularPoints", "null_vector_system", "null_vector_groups", "square_null_vector_system", "isolated_singular_points",
           "FiniteSingularSearch", "finite_singular_points", "square_route_paths"]


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
        Paths that failed, and polyhedral first-stage paths lost (points may be missing when positive).
    seed : int
    multiplicities : ndarray of int, shape (k,)
        Paths of the square system ending at each point (the largest over its (x, lambda) solutions).
    path_counts : dict
        The solve's ``paths`` block (counts by status).
    not_isolated : int
        Endpoints the solve found on a positive-dimensional solution set (then points may be missing).
    """

    points: np.ndarray
    paths: int
    start: dict
    failed: int
    seed: int
    multiplicities: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=int))
    path_counts: dict = field(default_factory=dict)
    not_isolated: int = 0


def null_vector_system(system, codimension, rng, n_columns=None):
    """F(x) = 0, lambda^T A J(x) B = 0 and b . lambda = 1 in the unknowns (x, lambda), lambda in C^c.

    A (c x m), B (n x n) and b are random. Over a point x of X where rank J = c there is no lambda; over a
    point of corank r the lambdas form an affine space of dimension r - 1 (a positive-dimensional
    fibre when r >= 2): callers project to x and measure the dimension there. b is complex on purpose:
    with a real b, b . lambda = 0 at isolated real points of a real curve of rank drops, and lambda runs
    off to infinity there (measured: arcs of a traced discriminant broke at such points).

    Parameters
    ----------
    system : PolynomialSystem
    codimension : int
    rng : numpy.random.Generator
    n_columns : int, optional
        Only the first ``n_columns`` columns of J (the x of a family F(x, p), whose parameters follow
        x): the rank in x alone. All columns when omitted.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> family = parse_system(["x^2 + y^2 - r"], ["x", "y", "r"])
    >>> null_vector_system(family, 1, np.random.default_rng(1), n_columns=2).n_equations
    4
    """
    n, m = system.n_variables, system.n_equations
    columns = n if n_columns is None else int(n_columns)
    total = n + codimension
    a = (rng.standard_normal((codimension, m)) + 1j * rng.standard_normal((codimension, m))) / math.sqrt(2 * m)
    b = rng.standard_normal(codimension) + 1j * rng.standard_normal(codimension)
    lifted = []
    for p in system.polynomials:  # the same polynomial in (x, lambda)
        exponents = np.hstack([p.exponents, np.zeros((p.n_terms, codimension), dtype=np.int64)])
        lifted.append(Polynomial(exponents, p.numeric_coefficients(), total))
    lambdas = [Polynomial.variable(n + i, total).numeric() for i in range(codimension)]
    # The columns are random combinations too (lambda^T A J B = 0 with B invertible, the same set):
    # with J's own columns, one that vanishes at a special point (the linkage's sine columns at its
    # branch points) puts a whole lambda plane over that point into the intermediate sets of the
    # witness sweep, and paths must start from singular points there.
    b_matrix = (rng.standard_normal((columns, columns)) + 1j * rng.standard_normal((columns, columns))) \
        / math.sqrt(2 * columns)
    gradients = [[lifted[k].derivative(l) for l in range(columns)] for k in range(m)]
    equations = list(lifted)
    for j in range(columns):
        row = Polynomial.zero(total)
        for i in range(codimension):
            combined = Polynomial.zero(total)
            for k in range(m):
                for l in range(columns):
                    if not gradients[k][l].is_zero():
                        combined = combined + gradients[k][l] * complex(a[i, k] * b_matrix[l, j])
            row = row + lambdas[i] * combined
        if not row.is_zero():
            equations.append(row * (1.0 / row.coefficient_norm()))
    equations.append(Polynomial.linear(np.concatenate([np.zeros(n), b]), -1.0))
    names = list(system.variables) + [f"lambda{i + 1}" for i in range(codimension)]
    return PolynomialSystem(names, equations, name=system.name)


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
        raise InputError(f"{counted(c, 'equation')} in {counted(n, 'unknown')}: a complete intersection has at most n equations")
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
    return square, full, null_vector_groups(full, n)


def null_vector_groups(null_system, n):
    """The variable groups of a null-vector system in n unknowns x: [x names, lambda names].

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    >>> null_vector_groups(null_vector_system(node, 1, np.random.default_rng(1)), 2)
    [['x', 'y'], ['lambda1']]
    """
    return [list(null_system.variables[:n]), list(null_system.variables[n:])]


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
    # no second look of solve's own (decision 0081): every candidate here is a multiple endpoint, judged by the
    # locus in centred coordinates where in doubt (decision 0071)
    options = SolveOptions(**{**(options or SolveOptions()).__dict__, "start": kind.value, "second_look": False,
                              "groups": tuple(tuple(g) for g in groups_of)
                              if kind in (StartKind.MULTIHOMOGENEOUS, StartKind.AUTO) else None})
    result = solve_system(square, options, seed=int(rng.integers(2**32)))
    n = system.n_variables
    keep = np.zeros(0, dtype=bool)
    solutions = np.array([s.point for s in result.solutions], dtype=complex).reshape(-1, full.n_variables)
    if len(solutions):
        values = BatchEvaluator(full.polynomials).evaluate(solutions, jacobian=False)
        sizes = TermSizes(full.polynomials).values(solutions)
        # a multiple solution is known to about the m-th root of the working accuracy (a cusp's triple
        # point to 1e-6 after refinement): it is held to the square root of the tolerance; the extras of
        # the random combinations miss an equation of the full system by far more (order one)
        allowed = np.array([tolerance if s.multiplicity == 1 else np.sqrt(tolerance) for s in result.solutions])
        keep = np.max(np.abs(values) / sizes, axis=1) <= allowed
        # ... and a residual bound in units of terms sized at max(|x_j|, 1) lets through a stationary point
        # of the residual much smaller than the unit (decision 0064): refinement on the full system must not end
        # at a stationary point of its residual ("not a zero").
        newton = newton_zero_test(full, BatchEvaluator(full.polynomials), solutions)
        keep &= ~newton.mask(ZeroKind.NOT_A_ZERO)
        solutions = solutions[keep]
    x_points = solutions[:, :n]
    kept = [s for s, ok in zip(result.solutions, keep) if ok]
    members_of = groups(cluster_labels(x_points, 1e-6)) if len(x_points) else []
    distinct = [x_points[members[0]] for members in members_of]
    multiplicities = np.array([max(kept[k].multiplicity for k in members) for members in members_of], dtype=int)
    counts = result.path_counts()
    # a polyhedral first-stage path lost (to infinity or failed) starts nothing: points may be missing, as
    # with a failed path (the cone over a plane cubic, seed 3: 11 of the mixed volume's 12 paths went on)
    failed = counts["failed"] + lost_first_stage_paths(result.extra.get("start"))
    return IsolatedSingularPoints(np.array(distinct, dtype=complex).reshape(-1, n), counts["tracked"],
                                  result.extra.get("start", {}), failed, seed, multiplicities, counts,
                                  len(result.not_isolated))


@dataclass
class FiniteSingularSearch:
    """The singular points of a reduced complete intersection, and whether they are proven to be all of Sing(X).

    Attributes
    ----------
    points : ndarray of complex, shape (k, n)
    multiplicities : ndarray of int, shape (k,)
    finite : bool
        True when the slices proved Sing(X) finite (then ``points`` is all of it); False when the
        search failed or found Sing(X) positive-dimensional (then ``reason`` says which).
    reason : str
    path_counts : dict
        Paths by status over every solve (the points' and the slices').
    searches : list of dict
        One per square system solved: what was cut (``hyperplanes``), its ``start`` block, paths tracked.
    """

    points: np.ndarray
    multiplicities: np.ndarray
    finite: bool
    reason: str
    path_counts: dict
    searches: list


def _added_counts(total, counts):
    for key, value in counts.items():
        if isinstance(value, dict):
            _added_counts(total.setdefault(key, {}), value)
        elif isinstance(value, (int, np.integer)):
            total[key] = total.get(key, 0) + int(value)


def finite_singular_points(system, start, rng, options=None):
    """Singular points of a reduced complete intersection X, with the proof that there are no others.

    The square null-vector system (:func:`isolated_singular_points`) with ``start`` finds the isolated
    singular points. For X of dimension d >= 2 the singular set is finite exactly when X cut by k
    random hyperplanes has no singular point for k = 1, ..., d - 1 (Bertini's theorem: for generic H,
    Sing(X cut by H) = Sing(X) cut by H, one dimension lower; the last cut is a reduced curve, whose
    singular set is finite, so its search is complete). Each cut is one more square solve, smaller
    than the first (its lambda has one more entry, its x the same unknowns).

    Parameters
    ----------
    system : PolynomialSystem
        Affine, c equations in n unknowns, every component of X = V(F) of dimension n - c and
        generically reduced (the caller knows it from X's decomposition).
    start : str
        A start of :class:`~numag.tracking.starts.StartKind`.
    rng : numpy.random.Generator
    options : SolveOptions, optional

    Returns
    -------
    FiniteSingularSearch

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> cone = parse_system(["y^2*z - x^3 - x*z^2 - z^3"], ["x", "y", "z"])
    >>> found = finite_singular_points(cone, "multihomogeneous", np.random.default_rng(3))
    >>> found.finite, len(found.points), [s["hyperplanes"] for s in found.searches]
    (True, 1, [0, 1])
    >>> umbrella = parse_system(["x^2 - y^2*z"], ["x", "y", "z"])
    >>> finite_singular_points(umbrella, "multihomogeneous", np.random.default_rng(3)).finite
    False
    """
    n, c = system.n_variables, system.n_equations
    total, searches = {}, []

    def search(cut, hyperplanes):
        found = isolated_singular_points(cut, start, seed=int(rng.integers(2**32)), options=options)
        _added_counts(total, found.path_counts)
        searches.append({"hyperplanes": hyperplanes, "start": found.start, "tracked": found.paths})
        if found.failed or found.not_isolated:
            return found, (f"{counted(found.failed, 'failed path')} and {counted(found.not_isolated, 'endpoint')} "
                           "on a positive-dimensional set of the null-vector system cut by "
                           f"{counted(hyperplanes, 'hyperplane')}")
        return found, None

    found, trouble = search(system, 0)
    if trouble:
        return FiniteSingularSearch(found.points, found.multiplicities, False, trouble, total, searches)
    cut = system
    for hyperplanes in range(1, n - c):
        # a random complex hyperplane: generic, so the cut meets Sing(X) exactly where Sing(X) has
        # dimension at least this number of cuts
        normal = (rng.standard_normal(n) + 1j * rng.standard_normal(n)) / math.sqrt(2 * n)
        offset = complex(rng.standard_normal() + 1j * rng.standard_normal())
        cut = PolynomialSystem(cut.variables, list(cut.polynomials) + [Polynomial.linear(normal, offset)],
                               name=system.name)
        probe, trouble = search(cut, hyperplanes)
        if trouble is None and len(probe.points):
            trouble = (f"X cut by {counted(hyperplanes, 'random hyperplane')} has "
                       f"{counted(len(probe.points), 'singular point')}: "
                       f"the singular set has dimension at least {hyperplanes}")
        if trouble:
            return FiniteSingularSearch(found.points, found.multiplicities, False, trouble, total, searches)
    return FiniteSingularSearch(found.points, found.multiplicities, True,
                                "finite: " + ("X is a curve" if n - c <= 1 else
                                              f"no singular point on X cut by 1 to {n - c - 1} random hyperplanes"),
                                total, searches)


def square_route_paths(system):
    """Paths of each square solve :func:`finite_singular_points` would make with x and lambda grouped (a bound).

    The square null-vector system of X cut by k hyperplanes (k = 0, ..., dim X - 1) has F (degree
    (d_i, 0) in the groups x and lambda), the k hyperplanes ((1, 0)), n - 1 combinations of Jacobian
    rows (at most (max d_i - 1, 1)) and the normalisation ((0, 1)), with c + k entries in lambda; its
    2-homogeneous Bezout number bounds the paths of its multihomogeneous start (and of the polyhedral
    one, which is never larger). Counted from the degrees alone: nothing is built or tracked.

    Parameters
    ----------
    system : PolynomialSystem
        Affine, c equations in n unknowns (c < n).

    Returns
    -------
    list of int
        One count per search, the uncut X first.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> quartic = parse_system(["x^4 + y^4 + z^4 - 1"], ["x", "y", "z"])
    >>> square_route_paths(quartic)   # d (d - 1)^(n - 1), then d (n - 1) (d - 1)^(n - 2)
    [36, 24]
    """
    n, c = system.n_variables, system.n_equations
    top = max(system.degrees)
    counts = []
    for cuts in range(max(n - c, 1)):
        rows = [[d, 0] for d in system.degrees] + [[1, 0]] * cuts + [[max(top - 1, 0), 1]] * (n - 1) + [[0, 1]]
        counts.append(multihomogeneous_bezout(rows, [n, c + cuts]))
    return counts
