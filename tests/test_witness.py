"""Witness supersets by the regenerative cascade (numag.witness.cascade)."""

import numpy as np
import pytest

from numag.errors import InputError
from numag.system.parse import parse_system
from numag.witness.cascade import WitnessOptions, witness_supersets


def sizes(result):
    return {s.dimension: len(s.points) for s in result.sets if len(s.points)}


def test_plane_and_line_each_get_their_witness_point():
    # z = 0 and x = y = 0: a plane and a line through it, degree 1 each (common practice, no source).
    # The regeneration also ends on the plane's points of the curve slice: junk, removed by membership.
    result = witness_supersets(parse_system(["x*z", "y*z"], ["x", "y", "z"]), seed=5)
    assert sizes(result) == {2: 1, 1: 1}
    assert result.paths["minimum_step"] == 0 and result.paths["step_limit"] == 0
    line = result.of_dimension(1).points[0]
    assert abs(line[0]) < 1e-8 and abs(line[1]) < 1e-8  # on x = y = 0
    for witness in result.sets:  # every witness point lies on its slice
        if len(witness.points):
            homogeneous = np.column_stack([np.ones(len(witness.points)), witness.points])
            assert np.allclose(homogeneous @ witness.slice_rows.T, 0, atol=1e-8)


def test_twisted_cubic_from_three_quadrics():
    # Three quadrics, codimension 2: not a complete intersection; degree 3 (Harris, "Algebraic
    # Geometry: A First Course", Springer 1992, from memory).
    result = witness_supersets(parse_system(["y - x^2", "z - x*y", "x*z - y^2"], ["x", "y", "z"]), seed=1)
    assert sizes(result) == {1: 3}
    assert list(result.of_dimension(1).multiplicity) == [1, 1, 1]


def test_double_plane_has_one_point_reached_twice():
    # x^2 = 0: the plane x = 0 with multiplicity 2 (common practice, no source).
    result = witness_supersets(parse_system(["x^2"], ["x", "y", "z"]), seed=2)
    assert sizes(result) == {2: 1}
    assert list(result.of_dimension(2).multiplicity) == [2]


def test_isolated_points_and_lowest_dimension_bound():
    # x^2 = 1, y = x: two points; searching only dimensions >= 1 finds nothing and says so.
    system = parse_system(["x^2 - 1", "y - x"], ["x", "y"])
    result = witness_supersets(system, seed=0)
    points = result.of_dimension(0).points
    assert sorted(np.round(points[:, 0].real, 8)) == [-1.0, 1.0]
    bounded = witness_supersets(system, WitnessOptions(lowest_dimension=1), seed=0)
    assert bounded.dimensions_searched == [2, 1] and sizes(bounded) == {}


def test_projective_input_and_bad_bound_are_refused():
    with pytest.raises(InputError, match="affine"):
        witness_supersets(parse_system(["x^2 - y*z"], ["x", "y", "z"], projective=True), seed=0)
    with pytest.raises(InputError, match="lowest dimension"):
        witness_supersets(parse_system(["x"], ["x", "y"]), WitnessOptions(lowest_dimension=5), seed=0)


@pytest.mark.parametrize("seed", range(4))
def test_every_line_of_a_chebyshev_derivative(seed):
    # T7'(x) = 7 U6(x) vanishes at x = cos(k pi / 7), k = 1..6 (Abramowitz and Stegun, Handbook of
    # Mathematical Functions, chapter 22): in C^2 six parallel lines, each one witness point. The
    # regeneration's paths to them nearly meet; a jump must be repaired, not lose a line.
    from numag.system.polynomial import Polynomial, PolynomialSystem
    x = Polynomial.variable(0, 2)
    previous, current = Polynomial.constant(1, 2), x
    for _ in range(6):
        previous, current = current, x * current * 2 - previous
    result = witness_supersets(PolynomialSystem(["x", "y"], [current.derivative(0)]), seed=seed)
    found = np.sort(result.of_dimension(1).points[:, 0].real)
    assert np.allclose(found, np.sort(np.cos(np.arange(1, 7) * np.pi / 7)), atol=1e-8)
