"""Features far smaller than the coordinates' unit: no silent wrong answer (decision 0064, addendum).

The curve (y - 2)^2 = ((x - 1)^2 - 10^-6)^2 is two parabolas crossing at two nodes, (1 - 10^-3, 2) and
(1 + 10^-3, 2) (worked by hand: y - 2 = +-((x - 1)^2 - 10^-6) meet where (x - 1)^2 = 10^-6; common practice,
no source). Translated to (1, 2), far from its features, numag may miss the nodes; it must then say so.
"""

import numpy as np
import pytest

from numag import singular_locus
from numag.app.report import completeness_warnings
from numag.system.parse import parse_system

NODES = np.array([[0.999, 2.0], [1.001, 2.0]])


def affine_points(locus):
    """The affine singular points of a locus, one row each."""
    rows = [c.points[0] for c in locus.isolated() if not c.at_infinity]
    return np.array(rows) if rows else np.zeros((0, locus.system.n_variables), dtype=complex)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_two_nodes_far_from_the_origin_are_found_or_flagged(seed):
    system = parse_system(["(y - 2)^2 - ((x - 1)^2 - 1/1000000)^2"], ["x", "y"])
    locus = singular_locus(system, seed=seed)
    points = affine_points(locus)
    found = sum(bool(np.any(np.linalg.norm(points - node, axis=1) < 1e-8)) for node in NODES)
    flagged = completeness_warnings({"discarded": locus.discarded, "paths": locus.paths})
    assert found == 2 or flagged, (found, locus.discarded, locus.paths)
    # nothing else is reported as a singular point
    assert len(points) <= 2


@pytest.mark.parametrize("seed", [1, 2])
def test_the_same_nodes_at_the_origin_are_found(seed):
    # y^2 = (x^2 - 10^-6)^2: the nodes (+-10^-3, 0), the features where the balancing can see them
    system = parse_system(["y^2 - (x^2 - 1/1000000)^2"], ["x", "y"])
    points = affine_points(singular_locus(system, seed=seed))
    assert len(points) == 2
    assert np.allclose(np.sort(points[:, 0].real), [-1e-3, 1e-3], atol=1e-12, rtol=0)
