"""Points at infinity located on the top-degree forms and grouped by their accuracy (decision 0106).

An affine system's points at infinity are the common zeros of its equations' top-degree forms, directions d
with f_i^top(d) = 0. A path that goes to infinity stops with X_0 small but not 0, and its direction is then
off by a power of X_0 (X_0 = 1e-8 with the direction 1e-2 off, a point of multiplicity 5 after a linear
change): clustered with a fixed tolerance, the paths of one point made two, both off. Here every such
endpoint's direction is refined by Gauss-Newton on the top-degree forms (in units of their terms, in the
chart normal to the endpoint's own direction). At a multiple zero Newton converges linearly, down to the
accuracy double precision allows (about eps^(1/k)); the accuracy is read from the last corrections. Endpoints
whose refined directions agree within their accuracies are one point; two groups that are neither clearly
apart nor within their accuracies, or a direction that is no zero of the top-degree forms, cannot be
decided: their paths count as failed (exit 3), never printed as points.

Where the top-degree forms vanish on a set of positive dimension (y - x^2, z - x y, z - 3 x^2 + 3 x - 1: the
line x = 0, doubled), the paths end wherever the start sends them on it: :func:`local_dimension_at_infinity`
tells such a direction from an isolated point by random linear slices passing near it (decision 0112).
"""

from dataclasses import dataclass

import numpy as np

from ..kinds import TextEnum

from ..numeric.cluster import close_line_pairs, connected_components, groups, line_distance
from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..numeric.linalg import batched_least_squares
from ..system.polynomial import Polynomial

__all__ = ["InfinityPoints", "InfinityKind", "top_forms", "locate_at_infinity", "local_dimension_at_infinity"]

#: Gauss-Newton corrections at most: at a k-fold zero the distance shrinks by (k - 1) / k per correction, so
#: from an endgame direction 1e-2 off a double zero is reached to rounding in 25, a five-fold one in about 80.
_MAX_CORRECTIONS = 100
#: Corrections over which stagnation is judged and the accuracy read: the largest of the last ones.
_WINDOW = 8
#: The accuracy is this many times the largest of the last corrections: a linear rate up to 0.9 (a ten-fold
#: zero) leaves at most 9 times the last correction, and the largest of 8 at rate 0.9 is twice the last.
_ACCURACY_FACTOR = 10.0
#: A correction this small relative to the direction is rounding.
_ROUNDING_STEP = 1e-15
#: Two refined directions farther apart than their accuracies but within this many times them: undecided.
_AMBIGUOUS_FACTOR = 10.0
#: The local dimension test's slices pass this many times a point's accuracy from it (at a k-fold isolated zero
#: the accuracy is about eps^(1/k), so the top forms are about (10^3 eps^(1/k))^k = 10^(3k) eps there: far above
#: rounding), and within these bounds (below: a regular zero's forms grow like the distance, 1e-3 is 1e8 times
#: rounding; above: the slice stays near the point, away from other points at infinity).
_SLICE_FACTOR = 1e3
_SLICE_DISTANCE = (1e-3, 1e-1)
#: A slice's zero farther than this many times the slice's distance is not the point's neighbourhood.
_NEAR_FACTOR = 100.0
#: A least-squares minimum on a slice whose residual is at least this many times rounding is no zero.
_CLEARLY_NONZERO = 1e3
#: Slices tried per dimension: Gauss-Newton can stall off the zeros where every form vanishes to second order
#: at the point (the embedded point (0 : 0 : 1) of x^2, x y: 13 of 200 single slices); a zero on any slice
#: counts, "none" needs every slice.
_SLICE_TRIES = 3


class InfinityKind(TextEnum):
    """What a point at infinity of an affine system is in the set at infinity (decision 0112)."""

    ISOLATED = "isolated"
    ON_POSITIVE_DIMENSIONAL_SET = "on_positive_dimensional_set"
    UNDECIDED = "undecided"


@dataclass
class InfinityPoints:
    """Endpoints at infinity grouped into points by :func:`locate_at_infinity`.

    Attributes
    ----------
    directions : ndarray, shape (P, n)
        Each endpoint's direction refined on the top-degree forms (unit norm).
    accuracy : ndarray, shape (P,)
        Each refined direction's accuracy as a distance between lines; inf where Gauss-Newton found no zero
        of the top-degree forms.
    groups : list of ndarray of int
        Endpoints (indices into the input) that are one point at infinity.
    undecided : list of ndarray of int
        Endpoints whose point numag cannot tell: no zero of the top-degree forms near them, or groups that
        are neither one point nor clearly two.
    """

    directions: np.ndarray
    accuracy: np.ndarray
    groups: list
    undecided: list

    def point(self, members):
        """The homogeneous point (0, d) of a group: its members' directions averaged as lines."""
        directions = self.directions[members]
        inner = directions.conj() @ directions[0]  # each member turned to the first one's phase
        phases = np.where(np.abs(inner) > 0, inner / np.maximum(np.abs(inner), 1e-300), 1.0)
        mean = (phases[:, None] * directions).mean(axis=0)
        return np.concatenate([[0.0], mean / np.linalg.norm(mean)])


def top_forms(polynomials):
    """Each polynomial's terms of highest degree (F^h at X_0 = 0).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> [p.to_text(["x", "y"]) for p in top_forms(parse_system(["x*y - x + 1", "y^2 + 2*x^2 - 3"], ["x", "y"]).polynomials)]
    ['x*y', '2*x^2 + y^2']
    """
    forms = []
    for p in polynomials:
        degrees = p.exponents.sum(axis=1)
        keep = degrees == degrees.max() if len(degrees) else np.zeros(0, dtype=bool)
        forms.append(Polynomial(p.exponents[keep], p.coefficients[keep], p.n_variables))
    return forms


def _refine(forms, directions, linear=None):
    """Gauss-Newton on the top-degree forms from each direction; returns (directions, accuracy, residual).

    ``linear`` (shape (P, k, n)), when given, adds each direction's own homogeneous linear equations M d = 0 (the
    slices of :func:`local_dimension_at_infinity`), each in units of its terms like the forms.
    """
    evaluator = BatchEvaluator(forms)
    forms_sizes = TermSizes(forms, projective=True)
    if linear is None:
        linear = np.zeros((len(directions), 0, directions.shape[1]), dtype=complex)

    def scales(points, index):  # the forms' term sizes, then the linear rows' (sum of |M_ij d_j|)
        rows = (np.abs(linear[index]) @ np.abs(points)[:, :, None])[:, :, 0]
        return np.concatenate([forms_sizes.values(points), rows], axis=1)

    def evaluate(points, index=slice(None), jacobian=True):
        rows = linear[index]
        if not jacobian:
            return np.concatenate([evaluator.evaluate(points, jacobian=False), (rows @ points[:, :, None])[:, :, 0]],
                                  axis=1)
        values, jacobians = evaluator.evaluate(points)
        return (np.concatenate([values, (rows @ points[:, :, None])[:, :, 0]], axis=1),
                np.concatenate([jacobians, rows], axis=1))

    current = directions / np.linalg.norm(directions, axis=1, keepdims=True)
    normal = current.conj()  # the chart <normal, d> = 1 of each endpoint's own direction: no pivot to flip
    steps = np.full((len(current), _MAX_CORRECTIONS), np.nan)
    active = np.ones(len(current), dtype=bool)
    taken = np.zeros(len(current), dtype=np.int64)
    for k in range(_MAX_CORRECTIONS):
        index = np.nonzero(active)[0]
        if len(index) == 0:
            break
        values, jacobians = evaluate(current[index], index)
        scale = scales(current[index], index)
        matrices = np.concatenate([jacobians / scale[:, :, None], normal[index, None, :]], axis=1)
        rhs = np.concatenate([values / scale, np.zeros((len(index), 1))], axis=1)
        step = batched_least_squares(matrices, rhs, rcond=1e-14)
        with np.errstate(invalid="ignore"):
            current[index] -= step
            steps[index, k] = np.linalg.norm(step, axis=1) / np.linalg.norm(current[index], axis=1)
        taken[index] = k + 1
        # done where a whole window of corrections is at rounding (a regular zero) or where they stopped
        # shrinking over the last window (a multiple zero at the accuracy double precision allows, or no zero)
        last = steps[index, max(0, k - _WINDOW + 1):k + 1]
        rounding = (k + 1 >= _WINDOW) & (np.max(last, axis=1) <= _ROUNDING_STEP)
        if k + 1 >= 2 * _WINDOW:
            before = steps[index, k - 2 * _WINDOW + 1:k - _WINDOW + 1]
            with np.errstate(invalid="ignore"):
                stalled = ~(np.nanmax(last, axis=1) <= 0.5 * np.nanmax(before, axis=1))
        else:
            stalled = np.zeros(len(index), dtype=bool)
        active[index[rounding | stalled | ~np.all(np.isfinite(current[index]), axis=1)]] = False
    accuracy = np.empty(len(current))
    for row in range(len(current)):
        window = steps[row, max(0, taken[row] - _WINDOW):taken[row]]
        accuracy[row] = _ACCURACY_FACTOR * np.max(window) if np.all(np.isfinite(window)) else np.inf
    accuracy = np.maximum(accuracy, _ACCURACY_FACTOR * _ROUNDING_STEP)
    finite = np.all(np.isfinite(current), axis=1)
    residual = np.full(len(current), np.inf)
    if np.any(finite):
        values = evaluate(current[finite], finite, jacobian=False)
        residual[finite] = np.max(np.abs(values) / scales(current[finite], finite), axis=1)
    norms = np.linalg.norm(current, axis=1, keepdims=True)
    with np.errstate(invalid="ignore", divide="ignore"):
        current = np.where(finite[:, None], current / norms, directions)
    return current, accuracy, residual


def locate_at_infinity(polynomials, endpoints, tolerance):
    """Refine endpoints at infinity on the top-degree forms and group them into points by their accuracy.

    Parameters
    ----------
    polynomials : sequence of Polynomial
        The affine equations (n of them in n unknowns), in the units of the computation.
    endpoints : ndarray, shape (P, n + 1)
        Homogeneous endpoints (X_0 first) called at infinity.
    tolerance : float
        Endpoints whose lines are this close as the endgame left them are one point whatever their refined
        directions say (on a set of directions at infinity of positive dimension, Newton from two nearby
        starts stops at two nearby points of the set, both to rounding: cyclic 5, 1e-13 apart).

    Returns
    -------
    InfinityPoints

    Notes
    -----
    A refined direction is a point when the top-degree forms vanish there to rounding in units of their terms
    (:data:`~numag.numeric.refine.ROUNDING_RESIDUAL`); its accuracy is ten times the largest of Gauss-Newton's
    last eight corrections (at a k-fold zero about eps^(1/k)). Two endpoints are one point when their lines are
    within the sum of their accuracies (or were within ``tolerance`` before refinement), and undecided when they
    are apart but within ten times that sum. All
    of it is a statement about lines in projective space: it holds in any linear coordinates, in any units
    in which the endpoints are computed, whatever the seed.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> # x y - 1, x^2 - 1: the direction x = 0, (0 : 0 : 1), is a double zero of the top forms x y, x^2
    >>> system = parse_system(["x*y - 1", "x^2 - 1"], ["x", "y"])
    >>> ends = np.array([[1e-9, 3e-3, 1.0], [1e-9, -2e-3j, 1.0]])
    >>> located = locate_at_infinity(system.polynomials, ends, 1e-6)
    >>> [g.tolist() for g in located.groups], located.undecided
    ([[0, 1]], [])
    >>> bool(abs(located.point(located.groups[0])[1]) < 1e-6)
    True
    """
    # refine (with its mpmath helpers) is loaded only where points at infinity are located: a plain solve of
    # finite solutions imports numpy alone (decision 0051; tests/test_startup.py)
    from ..numeric.refine import ROUNDING_RESIDUAL
    endpoints = np.atleast_2d(np.asarray(endpoints, dtype=complex))
    count = len(endpoints)
    if count == 0:
        return InfinityPoints(np.zeros((0, endpoints.shape[1] - 1), complex), np.zeros(0), [], [])
    directions, accuracy, residual = _refine(top_forms(polynomials), endpoints[:, 1:].copy())
    with np.errstate(invalid="ignore"):
        located = np.isfinite(accuracy) & (residual <= ROUNDING_RESIDUAL)
    accuracy = np.where(located, accuracy, np.inf)
    rows = np.nonzero(located)[0]
    pairs = np.zeros((0, 2), dtype=np.int64)
    ambiguous = np.zeros((0, 2), dtype=np.int64)
    if len(rows) > 1:
        # candidates within the widest ambiguous radius, then each pair judged by its own accuracies
        candidates = close_line_pairs(directions[rows], 2 * _AMBIGUOUS_FACTOR * float(accuracy[rows].max()))
        if len(candidates):
            first, second = rows[candidates[:, 0]], rows[candidates[:, 1]]
            distance = line_distance(directions[first], directions[second])
            joint = accuracy[first] + accuracy[second]
            same = distance <= joint
            pairs = np.column_stack([first[same], second[same]])
            doubt = ~same & (distance <= _AMBIGUOUS_FACTOR * joint)
            ambiguous = np.column_stack([first[doubt], second[doubt]])
    pairs = np.vstack([pairs, close_line_pairs(endpoints, tolerance)])
    components = connected_components(count, pairs)
    doubtful = np.zeros(count, dtype=bool)
    doubtful[~located] = True
    for i, j in ambiguous:  # a pair in doubt (not joined otherwise) leaves both of its groups undecided
        if components[i] == components[j]:
            continue
        doubtful[components == components[i]] = True
        doubtful[components == components[j]] = True
    decided, undecided = [], []
    for members in groups(components):
        (undecided if doubtful[members[0]] else decided).append(np.asarray(members, dtype=np.int64))
    return InfinityPoints(directions, accuracy, decided, undecided)


def local_dimension_at_infinity(polynomials, directions, accuracy, rng):
    """The dimension of the set at infinity (the top-degree forms' zeros) at each located direction.

    Parameters
    ----------
    polynomials : sequence of Polynomial
        The affine equations, in the units of the computation.
    directions : ndarray, shape (P, n)
        Zeros of the top-degree forms (refined by :func:`locate_at_infinity`).
    accuracy : ndarray, shape (P,)
        Their accuracies as distances between lines.
    rng : numpy.random.Generator
        For the slices' directions (the verdicts do not depend on them but with probability zero).

    Returns
    -------
    dimension : ndarray of int, shape (P,)
        0 for an isolated point at infinity, k > 0 on a set at infinity of dimension k there.
    undecided : ndarray of bool, shape (P,)
        Where the test could not tell (the dimension is then a lower bound).

    Notes
    -----
    The dimension at d is at least k when a random linear space of codimension k passing at a distance delta
    from d (in the chart normal to d) meets the top forms' zeros within 100 delta of d: Gauss-Newton on the
    forms and the slice, started at d, ends there on a zero (in units of the forms' terms, to rounding). Where d
    is isolated it ends on a least-squares minimum whose residual is about delta^m at an m-fold point: delta is
    a thousand times d's accuracy, about eps^(1/m) at an m-fold point (decision 0106), and 1e-3 to 0.1, so the
    residual is far above rounding (a thousand times it is required; between the two, undecided). A plain rank
    of the Jacobian would call the line x = 0 of x^2 = 0 isolated; the slice only asks whether zeros are
    there, which a non-reduced set answers as a reduced one does (decision 0112). Everything is a statement
    about lines and ratios of sizes of one point: it holds in any linear coordinates and units.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> # y - x^2, z - x y, z - 3 x^2 + 3 x - 1: the top forms x^2, x y, x^2 vanish on the line x = 0 (doubled)
    >>> system = parse_system(["y - x^2", "z - x*y", "z - 3*x^2 + 3*x - 1"], ["x", "y", "z"])
    >>> dimension, undecided = local_dimension_at_infinity(system.polynomials, np.array([[0, 0.6, 0.8]]),
    ...                                                    np.array([1e-8]), np.random.default_rng(0))
    >>> dimension.tolist(), undecided.tolist()
    ([1], [False])
    """
    from ..numeric.refine import ROUNDING_RESIDUAL
    directions = np.atleast_2d(np.asarray(directions, dtype=complex))
    count, n = directions.shape
    dimension = np.zeros(count, dtype=np.int64)
    undecided = ~np.isfinite(np.asarray(accuracy, dtype=float))
    if count == 0 or n < 3:  # a zero set in P^1 other than all of it is finitely many points
        return dimension, undecided
    forms = top_forms(polynomials)
    d = directions / np.linalg.norm(directions, axis=1, keepdims=True)
    with np.errstate(invalid="ignore"):
        distance = np.clip(_SLICE_FACTOR * np.asarray(accuracy, dtype=float), *_SLICE_DISTANCE)
    active = ~undecided
    for k in range(1, n - 1):  # the zeros of a nonzero form have dimension n - 2 at most in P^(n-1)
        index = np.nonzero(active)[0]
        if len(index) == 0:
            break
        zero = np.zeros(len(index), dtype=bool)
        none = np.ones(len(index), dtype=bool)
        for _ in range(_SLICE_TRIES):
            found_zero, found_none = _sliced(forms, d[index], distance[index], k, rng, ROUNDING_RESIDUAL)
            zero |= found_zero
            none &= found_none
        dimension[index[zero]] = k
        undecided[index[~zero & ~none]] = True  # neither a zero on some slice nor clearly none on all
        active[index[~zero]] = False
    return dimension, undecided


def _sliced(forms, here, distance, k, rng, rounding):
    """One random slice of codimension k at ``distance`` from each direction: (a zero found near, clearly none)."""
    count, n = here.shape
    # k random orthonormal rows a, a random offset b of length delta: the slice a (p - d) = b on the chart
    # <conj(d), p> = 1, written homogeneously as (a - (a d + b) conj(d)^T) p = 0
    gaussian = rng.standard_normal((count, n, k)) + 1j * rng.standard_normal((count, n, k))
    rows = np.conj(np.linalg.qr(gaussian)[0]).transpose(0, 2, 1)
    offset = rng.standard_normal((count, k)) + 1j * rng.standard_normal((count, k))
    offset *= (distance / np.linalg.norm(offset, axis=1))[:, None]
    linear = rows - ((rows @ here[:, :, None])[:, :, 0] + offset)[:, :, None] * here.conj()[:, None, :]
    found, found_accuracy, residual = _refine(forms, here.copy(), linear)
    near = line_distance(found, here) <= _NEAR_FACTOR * distance
    with np.errstate(invalid="ignore"):
        zero = np.isfinite(found_accuracy) & (residual <= rounding) & near
        none = near & (residual >= _CLEARLY_NONZERO * rounding)
    return zero, none
