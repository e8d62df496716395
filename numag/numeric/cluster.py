"""Grouping points that are the same point: neighbour search, then connected components.

Endpoints of several paths that reach one singular solution, or the samples of
one cluster, must be counted once with a multiplicity. Two affine points are
neighbours when ``|a - b| <= tolerance * (1 + min(|a|, |b|))``: the radius is
relative to each point, never to the largest one (one huge endpoint must not
turn the neighbour search into all pairs). Two points of projective space are
neighbours when their lines are close: ``|a/|a| - e^(i phi) b/|b||`` with the
best phase, about the angle between the lines, is at most ``tolerance``. They
are never compared through a normalisation by their largest coordinate, which
flips between coordinates of nearly equal modulus and would count one point
twice. Groups are the connected components of the neighbour graph, so a chain
of close points is one group.

Examples
--------
>>> import numpy as np
>>> cluster_labels(np.array([[1.0], [1.0 + 1e-9], [2.0]]), 1e-6).tolist()
[0, 0, 1]
>>> a = np.array([1.0, 1.0 + 1e-13])       # one projective point, written two ways
>>> cluster_labels(np.array([a / a[0], a / a[1]]), 1e-6, projective=True).tolist()
[0, 0]
"""

import numpy as np

__all__ = ["cluster_labels", "groups", "normalize_projective", "projective_pivot", "line_distance", "close_line_pairs",
           "REAL_TOLERANCE", "root_accuracy", "reality"]

#: A fixed chart for the neighbour search of projective points (any generic vector will do; the
#: decision itself compares lines, so the answer does not depend on it).
_CHART = np.random.default_rng(70_423).standard_normal(64) + 1j * np.random.default_rng(9_211).standard_normal(64)


def cluster_labels(points, tolerance, projective=False):
    """Label each point with its group number (groups numbered by first appearance).

    Parameters
    ----------
    points : ndarray, shape (P, n), complex or real
        Finite values only.
    tolerance : float
        Relative distance (affine) or distance between lines (projective) under which two
        points are the same.
    projective : bool, default False
        Compare the rows as points of projective space (lines through 0).

    Returns
    -------
    ndarray of int, shape (P,)

    Notes
    -----
    Cost: building the tree O(P log P); each point's neighbours within its own radius, so
    the work follows the number of close pairs.
    """
    points = np.asarray(points)
    count = len(points)
    if count == 0:
        return np.zeros(0, dtype=np.int64)
    points = points.reshape(count, -1)
    if projective:
        pairs = _close_lines(points.astype(complex), tolerance)
    else:
        pairs = _close_points(points, tolerance)
    if len(pairs) == 0:  # every point alone (a regular run): each is its own group, in order
        return np.arange(count, dtype=np.int64)
    components = connected_components(count, pairs)
    # number the groups by their first member, so labels follow the input order
    _, first = np.unique(components, return_index=True)
    order = np.argsort(first, kind="stable")
    renumber = np.empty(len(order), dtype=np.int64)
    renumber[order] = np.arange(len(order))
    return renumber[components]


def _as_real(points):
    if np.iscomplexobj(points):
        return np.column_stack([points.real, points.imag]).astype(float)
    return np.asarray(points, dtype=float)


def connected_components(count, pairs):
    """Connected components of the graph on ``count`` nodes with edges ``pairs``: each node's component
    number (0, 1, ... in the order of their smallest nodes), by label propagation along the edges and pointer
    jumping (no scipy).

    Each round halves the distance to a component's smallest node or more, so the rounds are about the
    logarithm of the longest chain; each is vectorised over the edges.

    Examples
    --------
    >>> connected_components(5, [(3, 1), (4, 0)]).tolist()
    [0, 1, 2, 1, 0]
    """
    pairs = np.asarray(pairs, dtype=np.int64).reshape(-1, 2)
    labels = np.arange(count, dtype=np.int64)
    first, second = pairs[:, 0], pairs[:, 1]
    while True:
        lowest = np.minimum(labels[first], labels[second])
        updated = labels.copy()
        np.minimum.at(updated, first, lowest)
        np.minimum.at(updated, second, lowest)
        while True:  # pointer jumping: follow labels to their own label
            jumped = updated[updated]
            if np.array_equal(jumped, updated):
                break
            updated = jumped
        if np.array_equal(updated, labels):
            return np.unique(labels, return_inverse=True)[1].reshape(-1)  # components numbered 0, 1, ...
        labels = updated


#: Candidate pairs the sorted sweep of :func:`_pairs_within` may check, per point, before the k-d tree
#: takes over (points with large balls, or many points close together along the sweep's direction).
_SWEEP_PAIRS_PER_POINT = 8


def _pairs_within(real, radii):
    """Index pairs (i < j) with |p_i - p_j| <= radius_i, from each point's own ball.

    A sweep along one fixed direction first: |u.(p_i - p_j)| <= |p_i - p_j|, so the points of i's
    ball lie in the window u.p_i +- radius_i of the sorted projections. Distinct endpoints (the usual
    run) have almost nothing in their windows, and this needs no scipy (whose import was a third of a
    small ``numag solve``; decision 0051). When the windows hold more than a few points each, scipy's
    k-d tree answers as before. Both give the pairs of the same rule.
    """
    count = len(real)
    if count < 2:
        return np.zeros((0, 2), dtype=np.int64)
    direction = np.random.default_rng(51).standard_normal(real.shape[1])
    direction /= np.linalg.norm(direction)
    projection = real @ direction
    order = np.argsort(projection, kind="stable")
    ordered = projection[order]
    window = radii * (1 + 1e-9)  # a little wider than the balls: rounding of the projections loses no pair
    with np.errstate(invalid="ignore"):
        low = np.searchsorted(ordered, projection - window, side="left")
        high = np.searchsorted(ordered, projection + window, side="right")
    if np.all(np.isfinite(radii)) and np.isfinite(projection).all():
        sizes = high - low
        if sizes.sum() <= _SWEEP_PAIRS_PER_POINT * count + 64:
            first = np.repeat(np.arange(count), sizes)
            second = order[np.arange(int(sizes.sum())) - np.repeat(np.cumsum(sizes) - sizes - low, sizes)]
            keep = first < second
            first, second = first[keep], second[keep]
            close = np.sum((real[first] - real[second]) ** 2, axis=1) <= radii[first] ** 2
            pairs = np.column_stack([first[close], second[close]])
            return pairs[np.lexsort((pairs[:, 1], pairs[:, 0]))]
    return _tree_pairs_within(real, radii)


def _tree_pairs_within(real, radii):
    """:func:`_pairs_within` by scipy's k-d tree (any radii, infinite too)."""
    from scipy.spatial import cKDTree  # imported where used: `import numag` stays fast

    tree = cKDTree(real)
    neighbours = tree.query_ball_point(real, r=radii, return_sorted=False)
    sizes = np.fromiter((len(n) for n in neighbours), dtype=np.int64, count=len(neighbours))
    if sizes.sum() <= len(real):  # only the points themselves
        return np.zeros((0, 2), dtype=np.int64)
    first = np.repeat(np.arange(len(real)), sizes)
    second = np.fromiter((j for n in neighbours for j in n), dtype=np.int64, count=int(sizes.sum()))
    keep = first < second
    return np.column_stack([first[keep], second[keep]])


def _close_points(points, tolerance):
    real = _as_real(points)
    norms = np.linalg.norm(real, axis=1)
    pairs = _pairs_within(real, tolerance * (1 + norms))
    if len(pairs):
        close = np.linalg.norm(real[pairs[:, 0]] - real[pairs[:, 1]], axis=1) <= tolerance * (
            1 + np.minimum(norms[pairs[:, 0]], norms[pairs[:, 1]]))
        pairs = pairs[close]
    return pairs


def _close_lines(points, tolerance):
    size = points.shape[1]
    chart = _CHART[:size] if size <= len(_CHART) else np.random.default_rng(size).standard_normal(size) + 0j
    with np.errstate(all="ignore"):
        charted = points / (points @ chart)[:, None]
    finite = np.all(np.isfinite(charted), axis=1)
    charted[~finite] = 0.0  # a point on the chart's hyperplane: compared with everyone below
    norms = np.linalg.norm(charted, axis=1)
    # Within angle theta of a line, chart points move by at most about 2 theta (1 + |y|)^2 |chart|.
    radii = 4 * tolerance * np.linalg.norm(chart) * (1 + norms) ** 2
    radii[~finite] = np.inf
    pairs = _pairs_within(_as_real(charted), radii)
    if len(pairs):
        distance = line_distance(points[pairs[:, 0]], points[pairs[:, 1]])
        pairs = pairs[distance <= tolerance]
    return pairs


def close_line_pairs(points, tolerance):
    """Index pairs (i < j) of homogeneous points whose lines are within ``tolerance`` (:func:`line_distance`).

    The neighbour search of :func:`cluster_labels` for a caller that judges each pair by its own rule.

    Examples
    --------
    >>> close_line_pairs(np.array([[1.0, 2.0], [2.0, 4.0 + 1e-9], [1.0, 0.0]]), 1e-6).tolist()
    [[0, 1]]
    """
    points = np.asarray(points, dtype=complex)
    if len(points) < 2:
        return np.zeros((0, 2), dtype=np.int64)
    return _close_lines(points.reshape(len(points), -1), tolerance)


def line_distance(a, b):
    """Distance between the lines through rows of ``a`` and ``b``: min over phases of |a/|a| - e^(i phi) b/|b||.

    About the angle between the lines when it is small; 0 for the same line, at most sqrt(2).

    Examples
    --------
    >>> float(line_distance(np.array([[1.0, 2.0]]), np.array([[-3j, -6j]]))[0]) < 1e-15
    True
    """
    a = np.atleast_2d(np.asarray(a, dtype=complex))
    b = np.atleast_2d(np.asarray(b, dtype=complex))
    a = a / np.linalg.norm(a, axis=1, keepdims=True)
    b = b / np.linalg.norm(b, axis=1, keepdims=True)
    inner = np.sum(a.conj() * b, axis=1)
    phase = np.where(np.abs(inner) > 0, inner.conj() / np.maximum(np.abs(inner), 1e-300), 1.0)
    return np.linalg.norm(a - phase[:, None] * b, axis=1)


def projective_pivot(points):
    """The coordinate of largest modulus of each homogeneous point, the lowest index on near-ties (within
    1e-12 relative): the chart a projective point is written in.

    Parameters
    ----------
    points : array_like, shape (n,) or (P, n)

    Returns
    -------
    int or ndarray of int, shape (P,)

    Examples
    --------
    >>> projective_pivot([1.0, -2.0, 2.0]), projective_pivot([[3.0, 1.0], [0.0, 1j]]).tolist()
    (1, [0, 1])
    """
    moduli = np.abs(np.asarray(points, dtype=complex))
    if moduli.ndim == 1:
        return int(np.argmax(moduli >= moduli.max() * (1 - 1e-12)))
    return np.argmax(moduli >= moduli.max(axis=1, keepdims=True) * (1 - 1e-12), axis=1)


def normalize_projective(points):
    """Divide homogeneous points by their coordinate of largest modulus (lowest index on near-ties).

    For display only: two points are compared as lines (:func:`line_distance`), never
    through this normalisation, which flips between coordinates of nearly equal modulus.

    Parameters
    ----------
    points : array_like, shape (n,) or (P, n)

    Examples
    --------
    >>> normalize_projective(np.array([1.0, -2.0, 2.0]))
    array([-0.5+0.j,  1. -0.j, -1. +0.j])
    """
    points = np.asarray(points, dtype=complex)
    single = points.ndim == 1
    points = np.atleast_2d(points)
    pivot = projective_pivot(points)
    result = points / points[np.arange(len(points)), pivot][:, None]
    return result[0] if single else result


def groups(labels):
    """The member indices of each label, in label order."""
    labels = np.asarray(labels)
    if len(labels) == 0:
        return []
    order = np.argsort(labels, kind="stable")  # stable: members stay in increasing order
    bounds = np.searchsorted(labels[order], np.arange(1, int(labels.max()) + 1))
    return np.split(order, bounds)


#: The relative accuracy taken for a regular point (a simple root refined by Newton): imaginary parts below it
#: make the point real.
REAL_TOLERANCE = 1e-8
#: The constant of the accuracy of a multiple root, residual^(1/m) times this: the scaled equations' local
#: coefficients are of size one, not exactly one (decision 0120).
_ROOT_ACCURACY_FACTOR = 100.0
#: An imaginary part beyond this many times the point's accuracy is clearly not rounding: the point is complex.
#: Between the accuracy and this the point's reality is undecided (decision 0120).
CLEARLY_COMPLEX = 100.0


def root_accuracy(residual, multiplicity):
    """Relative accuracy of a root of multiplicity ``multiplicity`` at which the scaled residual is ``residual``.

    An isolated root of multiplicity m moves by about r^(1/m) when the equations change by r (a triple root of
    (x - 1)^3 at a residual of 1e-24 is known to 1e-8), so an endgame's or refinement's point is known to that,
    not to the 1e-8 of a simple root. Scale-free: the residual is in units of the equations' terms and the point
    in the computed units.

    Examples
    --------
    >>> float(f"{root_accuracy(1e-24, 3):.1g}"), root_accuracy(1e-40, 1) == REAL_TOLERANCE
    (1e-06, True)
    """
    if not np.isfinite(residual):
        return np.inf
    return max(REAL_TOLERANCE, _ROOT_ACCURACY_FACTOR * float(residual) ** (1.0 / max(int(multiplicity), 1)))


def reality(point, accuracy):
    """Whether a root of real equations is real (True), complex (False) or undecided (None) at its accuracy.

    A root of real equations whose conjugate is the same point within its accuracy is real: its conjugate is a
    root of the same multiplicity, and the point stands for one root (for an odd multiplicity the group holds a
    real root in any case: non-real roots come in pairs). An imaginary part beyond ``CLEARLY_COMPLEX`` times the
    accuracy is complex; between the two the point's reality is not decided. Relative to ``1 + |coordinate|``.

    Examples
    --------
    >>> reality(np.array([1 + 1e-9j]), 1e-8), reality(np.array([1 + 1j]), 1e-6), reality(np.array([1 + 1e-7j]), 1e-8)
    (True, False, None)
    """
    point = np.asarray(point, dtype=complex)
    with np.errstate(invalid="ignore"):
        relative = np.abs(point.imag) / (1 + np.abs(point))
    if not np.all(np.isfinite(relative)):
        return None
    largest = float(relative.max()) if relative.size else 0.0
    if largest <= accuracy:
        return True
    if largest > CLEARLY_COMPLEX * accuracy:
        return False
    return None
