"""A region where X provably has no point (a bound on the Taylor coefficients at its centre) needs no second
singular-locus computation in centred coordinates (decision 0124)."""

import sys
from pathlib import Path

import numpy as np
import pytest

from numag.singular.locus import singular_locus
from numag.system.centred import centre_near, centred_system, has_no_zero_near_origin
from numag.system.parse import parse_system

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "benchmarks"))


def _circle_has_zero_in_polydisc(d, r, samples=4001):
    """Brute force: a complex zero of x^2 + y^2 - 1 with |x - d| <= r and |y| <= r (y on a fine grid of the
    disc, x = +-sqrt(1 - y^2); common practice, no source)."""
    radii = np.linspace(0, r, 61)[:, None]
    angles = np.linspace(0, 2 * np.pi, samples // 60)[None, :]
    y = (radii * np.exp(1j * angles)).ravel()
    x = np.sqrt(1 - y ** 2 + 0j)
    return bool(np.any(np.abs(x - d) <= r * (1 + 1e-9)) or np.any(np.abs(-x - d) <= r * (1 + 1e-9)))


@pytest.mark.parametrize("d", [0.0, 0.3, 0.9, 1.0, 1.1, 1.5, 3.0, 30.0])
@pytest.mark.parametrize("r", [1e-3, 0.05, 0.3, 1.0])
def test_a_region_called_empty_holds_no_zero(d, r):
    # x^2 + y^2 = 1 centred exactly at (d, 0): whenever the bound calls the polydisc of radius r empty, a brute
    # force over it finds no complex zero (the converse need not hold: the bound is sufficient only)
    centred = centred_system(parse_system(["x^2 + y^2 - 1"], ["x", "y"]), centre_near(np.array([d, 0.0]), r))
    if has_no_zero_near_origin(centred, r):
        assert not _circle_has_zero_in_polydisc(d, r)


def test_the_bound_is_not_empty_handed():
    # far from the circle relative to the radius the bound does prove the region empty (else the rule is useless)
    for d, r in ((0.0, 0.3), (3.0, 0.05), (30.0, 1.0)):
        centred = centred_system(parse_system(["x^2 + y^2 - 1"], ["x", "y"]), centre_near(np.array([d, 0.0]), r))
        assert has_no_zero_near_origin(centred, r)


@pytest.mark.parametrize("units", [1.0, 1000.0])
def test_a_far_tacnode_is_never_excluded(units):
    # the tacnode y^2 = x^4 moved to (1234, -2345) (in units of 1/1000 too): a region about a centre 1e-4 of its
    # radius away from it contains X, and the bound must not say otherwise (by hand, common practice, no source)
    text = [f"(y/{units} + 2345)^2 - (x/{units} - 1234)^4"]
    system = parse_system(text, ["x", "y"])
    tacnode = np.array([1234.0 * units, -2345.0 * units])
    radius = 1e-3 * (1 + np.linalg.norm(tacnode))
    centred = centred_system(system, centre_near(tacnode + 1e-4 * radius, radius))
    assert not has_no_zero_near_origin(centred, 2 * radius)


def test_a_nodal_octic_keeps_every_node_without_a_second_run():
    # T_8(x) + T_8(x + y) + T_8(x + y + z) + 1 = 0 has 3 * 3 * 4^2 = 144 nodes (Chebyshev construction after
    # S. V. Chmutov 1992, "Examples of projective surfaces with many singularities", J. Algebraic Geom. 1, from
    # memory; the count is worked out in benchmarks/bench_scale.py). Endpoints Newton leaves at critical points of
    # f off X (f = -2 there) are settled by the Taylor bound, not by the singular locus computed again.
    from bench_scale import nodal_surface
    system, expected = nodal_surface(8)
    locus = singular_locus(system, seed=1)
    nodes = [c for c in locus.components if c.dimension == 0 and not c.at_infinity]
    assert len(nodes) == expected
    assert not any("did not settle" in note for note in locus.notes)
    assert not locus.discarded
