"""Grouping endpoints: checked against a brute-force reading of the same rule (common practice, no source)."""

import itertools

import numpy as np

from numag.numeric.cluster import cluster_labels, groups


def brute_force_groups(points, tolerance):
    """Connected components of the 'close' relation by repeated merging over all pairs."""
    owner = list(range(len(points)))

    def root(k):
        while owner[k] != k:
            k = owner[k]
        return k

    for a, b in itertools.combinations(range(len(points)), 2):
        scale = 1 + min(np.linalg.norm(points[a]), np.linalg.norm(points[b]))
        if np.linalg.norm(points[a] - points[b]) <= tolerance * scale:
            owner[root(b)] = root(a)
    found = {}
    for k in range(len(points)):
        found.setdefault(root(k), []).append(k)
    return sorted(found.values())


def test_groups_match_brute_force_on_random_clusters():
    rng = np.random.default_rng(5)
    centres = rng.standard_normal((12, 3)) + 1j * rng.standard_normal((12, 3))
    copies = rng.integers(1, 4, size=12)
    points = np.concatenate([c + 1e-9 * rng.standard_normal((k, 3)) for c, k in zip(centres, copies)])
    points = points[rng.permutation(len(points))]
    labels = cluster_labels(points, 1e-6)
    mine = sorted(g.tolist() for g in groups(labels))
    assert mine == brute_force_groups(points, 1e-6)
    assert len(mine) == 12


def test_a_chain_of_close_points_is_one_group():
    # each point within the tolerance of the next, the ends far apart: one group (transitive closure)
    points = np.array([[0.0], [0.8e-6], [1.6e-6], [2.4e-6], [5.0]])
    labels = cluster_labels(points, 1e-6)
    assert [g.tolist() for g in groups(labels)] == [[0, 1, 2, 3], [4]]


def test_points_all_apart_keep_their_order():
    points = np.array([[3.0], [1.0], [2.0]])
    labels = cluster_labels(points, 1e-6)
    assert labels.tolist() == [0, 1, 2]
    assert [g.tolist() for g in groups(labels)] == [[0], [1], [2]]


def test_tolerance_is_relative_to_the_size_of_the_points():
    # 1e-3 apart: the same point at size 1e4 (relative 1e-7), distinct at size 1 (relative 1e-3)
    big = np.array([[1e4], [1e4 + 1e-3]])
    small = np.array([[1.0], [1.0 + 1e-3]])
    assert len(groups(cluster_labels(big, 1e-6))) == 1
    assert len(groups(cluster_labels(small, 1e-6))) == 2


def test_empty_input():
    assert cluster_labels(np.zeros((0, 2)), 1e-6).shape == (0,)
    assert groups(np.zeros(0, dtype=int)) == []


def test_one_huge_point_does_not_make_the_search_all_pairs():
    # The neighbour search uses each point's own radius: with one point of norm 1e12 among 2,000
    # well separated ones, only the points themselves are found (a radius from the largest norm
    # would have put every pair within reach). Common practice, no source.
    from numag.numeric.cluster import _pairs_within
    rng = np.random.default_rng(3)
    points = rng.standard_normal((2000, 2))
    points[0] = [1e12, 0.0]
    norms = np.linalg.norm(points, axis=1)
    assert len(_pairs_within(points, 1e-6 * (1 + norms))) == 0
    assert len(set(cluster_labels(points, 1e-6).tolist())) == 2000


def test_projective_points_are_compared_as_lines_not_by_normalisation():
    # One projective point whose two largest coordinates differ in the 13th digit, normalised by
    # either of them: the same line, one group; a different line stays apart (common practice, no source).
    rng = np.random.default_rng(11)
    base = np.array([1.0, 1.0 + 1e-13, 0.3 - 0.2j])
    other = np.array([1.0, -1.0, 0.5j])
    points = np.array([base / base[0], base / base[1], 2j * base, other / other[1]])
    points = points[rng.permutation(4)]
    labels = cluster_labels(points, 1e-6, projective=True)
    assert len(set(labels.tolist())) == 2


def test_line_distance_ignores_scale_and_phase():
    # |a/|a| - e^(i phi) b/|b|| at the best phase: 0 for multiples, about the angle otherwise
    # (common practice, no source)
    from numag.numeric.cluster import line_distance
    a = np.array([[1.0, 2.0 - 1j, 0.5]])
    assert line_distance(a, (3 - 4j) * a)[0] < 1e-15
    push = np.array([[0.0, 0.0, 1e-7]])
    across = push - (np.vdot(a[0], push[0]) / np.vdot(a[0], a[0])) * a  # the part orthogonal to a
    tilted = a + push
    angle = np.linalg.norm(across) / np.linalg.norm(a)
    assert abs(line_distance(a, tilted)[0] - angle) < 1e-3 * angle
