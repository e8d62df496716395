"""Grouping points that are the same point: a KD-tree for neighbours, graph components for groups.

Endpoints of several paths that reach one singular solution, or the samples of
one cluster, must be counted once with a multiplicity. Two points are
neighbours when ``|a - b| <= tolerance * (1 + min(|a|, |b|))``; groups are the
connected components of the neighbour graph (networkx), so a chain of close
points is one group.

Examples
--------
>>> import numpy as np
>>> cluster_labels(np.array([[1.0], [1.0 + 1e-9], [2.0]]), 1e-6).tolist()
[0, 0, 1]
"""

import networkx as nx
import numpy as np
from scipy.spatial import cKDTree

__all__ = ["cluster_labels", "groups"]


def cluster_labels(points, tolerance):
    """Label each point with its group number (groups numbered by first appearance).

    Parameters
    ----------
    points : ndarray, shape (P, n), complex or real
    tolerance : float
        Relative distance under which two points are the same.

    Returns
    -------
    ndarray of int, shape (P,)

    Notes
    -----
    Cost: building the tree O(P log P); neighbour pairs within the largest
    absolute radius, then filtered by the relative rule.
    """
    points = np.asarray(points)
    count = len(points)
    if count == 0:
        return np.zeros(0, dtype=np.int64)
    real = np.column_stack([points.real, points.imag]) if np.iscomplexobj(points) else points
    real = np.asarray(real, dtype=float).reshape(count, -1)
    norms = np.linalg.norm(real, axis=1)
    radius = tolerance * (1 + float(norms.max()))
    pairs = cKDTree(real).query_pairs(radius, output_type="ndarray")
    if len(pairs):
        close = np.linalg.norm(real[pairs[:, 0]] - real[pairs[:, 1]], axis=1) <= tolerance * (
            1 + np.minimum(norms[pairs[:, 0]], norms[pairs[:, 1]]))
        pairs = pairs[close]
    if len(pairs) == 0:  # every point alone (a regular run): each is its own group, in order
        return np.arange(count, dtype=np.int64)
    graph = nx.Graph()
    graph.add_nodes_from(range(count))
    graph.add_edges_from(pairs.tolist())
    labels = np.empty(count, dtype=np.int64)
    components = sorted((min(c), sorted(c)) for c in nx.connected_components(graph))
    for label, (_, members) in enumerate(components):
        labels[members] = label
    return labels


def groups(labels):
    """The member indices of each label, in label order."""
    labels = np.asarray(labels)
    if len(labels) == 0:
        return []
    order = np.argsort(labels, kind="stable")  # stable: members stay in increasing order
    bounds = np.searchsorted(labels[order], np.arange(1, int(labels.max()) + 1))
    return np.split(order, bounds)
