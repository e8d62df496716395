"""Endpoint grouping without scipy on the common path (issue 19): the sorted sweep and label propagation
give what scipy's k-d tree and connected components give."""

import numpy as np
import pytest
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components
from scipy.spatial import cKDTree

from numag.numeric import cluster
from numag.numeric.cluster import cluster_labels


def _points(rng):
    """Clusters of a few points (spread 1e-9 .. 1e-3) around centres of size 1 or 1000, in 1 to 8 dimensions."""
    count, dimension = int(rng.integers(2, 300)), int(rng.integers(1, 9))
    centres = rng.standard_normal((max(1, count // int(rng.integers(1, 5))), dimension)) * rng.choice([1.0, 1e3])
    spread = rng.choice([1e-9, 1e-7, 1e-6, 1e-3])
    return centres[rng.integers(0, len(centres), count)] + spread * rng.standard_normal((count, dimension))


def _tree_pairs(real, radii):
    # reference: scipy.spatial.cKDTree.query_ball_point, each point's own ball (common practice, no source)
    tree = cKDTree(real)
    return {(i, j) for i, ball in enumerate(tree.query_ball_point(real, r=radii)) for j in ball if i < j}


@pytest.mark.parametrize("seed", range(6))
def test_the_sweep_finds_the_pairs_of_the_k_d_tree(seed):
    rng = np.random.default_rng(seed)
    for _ in range(40):
        real = _points(rng)
        radii = 1e-6 * (1 + np.linalg.norm(real, axis=1))
        assert set(map(tuple, cluster._pairs_within(real, radii).tolist())) == _tree_pairs(real, radii)


def test_crowded_windows_and_infinite_radii_go_to_the_k_d_tree():
    rng = np.random.default_rng(0)
    direction = np.random.default_rng(51).standard_normal(2)
    crowded = np.outer(np.linspace(0, 1, 200), [-direction[1], direction[0]])  # orthogonal to the sweep
    radii = np.full(200, 1e-3)
    assert set(map(tuple, cluster._pairs_within(crowded, radii).tolist())) == _tree_pairs(crowded, radii)
    points = rng.standard_normal((50, 3))
    radii = np.full(50, 1e-6)
    radii[7] = np.inf
    assert set(map(tuple, cluster._pairs_within(points, radii).tolist())) == _tree_pairs(points, radii)


@pytest.mark.parametrize("seed", range(6))
def test_label_propagation_gives_the_connected_components(seed):
    # reference: scipy.sparse.csgraph.connected_components (common practice, no source)
    rng = np.random.default_rng(seed)
    for _ in range(40):
        count = int(rng.integers(2, 400))
        pairs = rng.integers(0, count, (int(rng.integers(1, 2 * count)), 2))
        graph = coo_matrix((np.ones(len(pairs)), (pairs[:, 0], pairs[:, 1])), shape=(count, count))
        _, expected = connected_components(graph, directed=False)
        found = cluster.connected_components(count, pairs)
        assert len(set(zip(expected.tolist(), found.tolist()))) == len(set(expected.tolist())) == found.max() + 1


def test_a_long_chain_is_one_group():
    order = np.random.default_rng(3).permutation(10_000)
    points = np.zeros((10_000, 1))
    points[order, 0] = np.arange(10_000) * 4e-7  # neighbours 4e-7 apart, within 1e-6: one chain (swept)
    assert set(cluster_labels(points, 1e-6).tolist()) == {0}
