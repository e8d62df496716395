"""The singular points of X's reduced structure inside a non-reduced component of a hypersurface (decision 0140).

For f = g^m h with g reduced and irreducible, V(g) is a component C of X of multiplicity m, and the Jacobian of f
vanishes all along C: a point of C where another component meets it, or where C is singular itself, is no
candidate of its own (decision 0136). At a point p of C, ord_p f = m ord_p g + ord_p h, and ord_p g >= 2 exactly
where C is singular, ord_p h >= 1 exactly where another component (or C counted again in h) passes: the special set

    S_C = {p in C : ord_p f > m} = C n V(every partial of f of order <= m)

is where X_red is singular on C. On C the partials of order < m vanish anyway, so S_C = C n V(order-m partials).

The search decomposes V(f, the partials of orders 1..m) with numag's witness machinery and keeps the pieces whose
witness point lies on C. The partials of order k are C(n + k - 1, k); where they are more than n + 1, n + 1 random
complex combinations of them are used: a linear system of polynomials on an irreducible variety Y of dimension d
has the same common zeros (its base locus) as d + 1 general members of it (Bertini: each general member cuts every
component of the previous intersection that is not inside the base locus in a set of one dimension less). With
Y = C^n, n + 1 general combinations of the order-k partials vanish exactly where they all do. Every witness point
of a kept piece is verified against every partial of order <= m, in units of its terms (scale-free).

The order m is not guessed: it is the multiplicity of C in X's decomposition, used only where the equation's exact
multiplicity profile (decision 0128) is decided and agrees with the decomposition.

Examples
--------
>>> from numag.system.parse import parse_system
>>> from numag.witness.decompose import decompose
>>> system = parse_system(["(x - y)^2*(x + y)"], ["x", "y"])
>>> variety = decompose(system, seed=1)
>>> double = [c for c in variety.components if c.multiplicity == 2][0]
>>> inside = search_inside(system, variety, double, seed=1)
>>> inside.undecided, [(p.dimension, p.degree) for p in inside.pieces], bool(abs(inside.pieces[0].points[0]).max() < 1e-8)
(None, [(0, 1)], True)
"""

from dataclasses import dataclass, field
import math

import numpy as np

from ..errors import LimitError
from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..numeric.refine import largest_scaled_residual
from ..system.polynomial import PolynomialSystem
from ..tracking.tracker import FAILURE_LABELS
from ..witness.decompose import DecomposeOptions, components_through_points, decompose, profile_of

__all__ = ["InsidePiece", "InsideSearch", "search_inside", "partials_up_to"]

#: Largest value of a partial of order <= m (in units of its terms) at a verified point of the special set: the
#: search's points are refined on the whole overdetermined system (about 1e-14; 1e-8 where the zero is double),
#: the tolerance of a projective hypersurface's gradient zeros (decision 0140; locus's ``_GRADIENT_RESIDUAL``).
INSIDE_RESIDUAL = 1e-7
#: More partials of order <= m than this are not written out (their number is C(n + m, m)): undecided instead.
MAX_PARTIALS = 2000


@dataclass
class InsidePiece:
    """One irreducible piece of a non-reduced component's special set S_C.

    Attributes
    ----------
    dimension, degree : int
    points : ndarray, shape (degree, n)
        Witness points (the point itself for dimension 0), in the units of the system searched.
    through : list of int
        Ids of X's components through the first point.
    component : Component
        The piece as a component of the search's decomposition (for membership tests).
    """

    dimension: int
    degree: int
    points: np.ndarray
    through: list
    component: object


@dataclass
class InsideSearch:
    """Result of :func:`search_inside`.

    Attributes
    ----------
    order : int or None
        m, the decided multiplicity of the component (None where it is not decided).
    pieces : list of InsidePiece
        The pieces of S_C (empty: X_red is smooth all along the component).
    undecided : str or None
        Why the search gave no answer (then ``pieces`` says nothing); None when it completed.
    paths : dict
        The search's path counts.
    decomposition : Decomposition or None
        The search system's decomposition (the pieces' membership tests use it).
    """

    order: int | None
    pieces: list = field(default_factory=list)
    undecided: str | None = None
    paths: dict = field(default_factory=dict)
    decomposition: object = None


def partials_up_to(polynomial, order):
    """The partial derivatives of ``polynomial`` of orders 0..``order``, by order (zero ones left out).

    Exact input gives exact partials. Each mixed partial is taken once (the multi-index in sorted order).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["x^2*y"], ["x", "y"]).polynomials[0]
    >>> [len(level) for level in partials_up_to(f, 3)]     # f; 2xy, x^2; 2y, 2x, 0; 2, 0, 0, 0
    [1, 2, 2, 1]
    """
    n = polynomial.n_variables
    levels, level = [[polynomial]], {(0,) * n: polynomial}
    for _ in range(order):
        following = {}
        for alpha, p in level.items():
            for j in range(n):
                beta = tuple(a + (i == j) for i, a in enumerate(alpha))
                if beta not in following:
                    following[beta] = p.derivative(j)
        level = {beta: p for beta, p in following.items() if not p.is_zero()}
        levels.append(list(level.values()))
    return levels


def _decided_order(system, variety, component):
    """m where it is decided: the component's multiplicity, with the exact profile deciding and agreeing."""
    profile = variety.extra.get("exact_profile")
    if profile is None:
        return None, ("the multiplicity of the component is not decided exactly (the equation's exact multiplicity "
                      "profile is not computed for it: several equations, inexact or irrational coefficients, or "
                      "too large a degree)")
    if profile != profile_of(variety.components, system.n_variables - 1):
        return None, "X's components do not match the equation's exact multiplicity profile"
    return int(component.multiplicity), None


def _through(variety, component, point, seed):
    """X's components through a point of X (one of the search's, on f to its terms' accuracy).

    Where C is X's only component, every point of X lies on it and no membership homotopy is tracked: the exact
    profile agreed with the decomposition (:func:`_decided_order`), so C's witness points are all of X's on a general
    line, and a hypersurface has no component of lower dimension -- X_red = C as sets, whether or not the trace test
    confirmed C irreducible. The membership homotopy is not reliable there: at the cusp of a doubled cuspidal cubic
    (f of order 4, C of multiplicity 2) its paths need not settle, and it placed the cusp on no component.
    """
    if [c.id for c in variety.components] == [component.id]:
        return [component]
    [through] = components_through_points(variety, [point], [seed])
    return through


def search_inside(system, variety, component, options=None, seed=0):
    """The special set S_C = {p in C : ord_p f > m} of a non-reduced component C of a hypersurface.

    Parameters
    ----------
    system : PolynomialSystem
        One affine equation f.
    variety : Decomposition
        X = V(f), decomposed (``extra["exact_profile"]`` decides the multiplicity).
    component : Component
        C, of dimension n - 1 and multiplicity m > 1.
    options : DecomposeOptions, optional
        For the search system's decomposition.
    seed : int

    Returns
    -------
    InsideSearch
        The pieces of S_C, or why it is undecided (failed paths, an order not decided, a piece not verified).
    """
    n = system.n_variables
    if system.n_equations != 1 or system.projective or component.dimension != n - 1:
        return InsideSearch(None, undecided="not one component of an affine hypersurface")
    m, why = _decided_order(system, variety, component)
    if m is None:
        return InsideSearch(None, undecided=why)
    if m < 2:
        return InsideSearch(m, undecided="the component is reduced")
    if math.comb(n + m, m) > MAX_PARTIALS:
        return InsideSearch(m, undecided=f"the partials of order <= {m} are too many to verify ({math.comb(n + m, m)})")
    rng = np.random.default_rng([int(seed) % 2**32, 140])
    levels = partials_up_to(system.polynomials[0], m)
    equations = list(levels[0])
    for level in levels[1:]:
        # n + 1 general combinations vanish exactly where every partial of the order does (the module's note)
        equations += level if len(level) <= n + 1 else PolynomialSystem(system.variables, level).random_combinations(
            n + 1, rng).polynomials
    try:
        search = decompose(PolynomialSystem(system.variables, equations), options or DecomposeOptions(),
                           seed=int(rng.integers(2**31)))
    except LimitError as err:
        return InsideSearch(m, undecided=f"the search system is too large ({err})")
    result = InsideSearch(m, paths=dict(search.paths), decomposition=search)
    failed = sum(search.paths.get(label, 0) for label in FAILURE_LABELS)
    unexplained = search.extra.get("unexplained")
    if failed:
        result.undecided = f"{failed} paths of the search failed"
        return result
    if unexplained is not None and len(unexplained):
        result.undecided = "endpoints of the search stalled off its zeros (unexplained)"
        return result
    if search.unconfirmed:
        result.undecided = "pieces of the search were not confirmed complete by the trace test"
        return result
    every = [p.numeric() for level in levels for p in level]
    sizes, evaluator = TermSizes(every), BatchEvaluator(every)
    below = [p.numeric() for level in levels[:-1] for p in level]
    if np.min(largest_scaled_residual(TermSizes(below), BatchEvaluator(below), component.points)) > INSIDE_RESIDUAL:
        # a second guard beside the exact profile: f vanishes to order >= m on C (an m too large would miss the
        # points of order m + 1 .. the true order; too small shows as C in the search, below). At one witness point
        # at least: those of a multiple component far out are accurate to about eps^(1/m) of their size only
        result.undecided = "the partials of order < m vanish at none of the component's witness points"
        return result
    for piece in search.components:
        # every witness point meets every partial of order <= m, in units of its terms (scale-free)
        if np.any(largest_scaled_residual(sizes, evaluator, piece.points) > INSIDE_RESIDUAL):
            result.undecided = "a point of the search does not meet every partial of order <= m"
            return result
        through = _through(variety, component, piece.points[0], int(rng.integers(2**31)))
        if not through:
            # the point meets f (verified above), so it lies on a component of X: the membership test lost it. At a
            # point of high multiplicity of C (the cusp of a doubled cuspidal cubic) its paths may not settle; the
            # piece is then neither kept nor explained as off C, and dropping it would be a silent miss
            result.undecided = "the membership test placed a point of the search on no component of X"
            return result
        ids = [c.id for c in through]
        if piece.dimension == n - 1:
            # a whole component of X of larger multiplicity (its own search covers where it meets C); anything
            # else (C itself: its order would be larger than m) leaves S_C unknown
            if not any(c.dimension == n - 1 and c.multiplicity > m and c.id != component.id for c in through):
                result.undecided = "the search found a set of the component's dimension that is no component of X " \
                                   "of larger multiplicity"
                return result
            continue
        if component.id not in ids and any(c.multiplicity > m for c in through):
            # inside a component D of larger multiplicity, where ord_p f >= m_D > m holds without X_red being
            # singular: D's own search covers D n C (ord > m_D there)
            continue
        # Kept whatever else the membership test says: ord_p f > m at a point of X on no component of multiplicity
        # > m makes X_red singular there (on C, or on other components only: ord_p of their product > m >= their
        # multiplicities), so a false "not on C" cannot lose a point of S_C; the locus lists a point it already has
        # once. Every verified point of the search is listed, explained (above) or leaves the search undecided.
        result.pieces.append(InsidePiece(piece.dimension, piece.degree, piece.points, ids, piece))
    return result
