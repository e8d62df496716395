"""A double factor of the discriminant (a length 0 of a linkage that enters squared) found, and printed to its accuracy.

Decision 0151. The four-bar with ground 400, crank 100, rocker 300 (crank and rocker circles touching) and a free
coupler l: the eliminant of F and the 3 x 3 minors of J_x is l^2 (l^2 - 200^2)(l^2 - 600^2)(l^2 - 800^2) (hand
computation, checked with sympy: a lex Groebner basis of F and the minors). At l = 100 the real configuration
(c1, s1, c2, s2) = (1, 0, -17/18, sqrt(35)/18) is a smooth point of the member (hand computation, checked with sympy),
and the linkage is not a Grashof one, so 0 < |l| < 200 has one real branch (Grashof, "Theoretische Maschinenlehre",
1883, from memory). The missed l = 0 was a finite root of the block of circles and minors whose direction is a zero at
infinity too: the tracker called it a point at infinity.
"""

import io
import re

import numpy as np
import pytest

from numag.app.commands.discriminant import _print
from numag.families.discriminant import DiscriminantOptions, discriminant
from numag.system.files import family_from_mapping
from numag.system.parse import parse_system
from numag.tracking.solve import solve_system

#: sympy's real roots of l^2 (l^2 - 200^2)(l^2 - 600^2)(l^2 - 800^2), in millimetres
EXACT_MM = [-800.0, -600.0, -200.0, 0.0, 200.0, 600.0, 800.0]


def fourbar(unit, input_sine=False):
    """The touching four-bar with lengths in millimetres divided by ``unit`` (1: mm, 100: dm)."""
    ground, crank, rocker = (f"{v / unit:g}" for v in (400, 100, 300))
    equations = ["c1^2 + s1^2 - 1", "c2^2 + s2^2 - 1",
                 f"({ground} + {rocker}*c2 - {crank}*c1)^2 + ({rocker}*s2 - {crank}*s1)^2 - l^2"]
    if input_sine:  # the crank's sine fixed at 0: the member is a set of points
        equations.append("s1")
    return family_from_mapping({"variables": ["c1", "s1", "c2", "s2"], "parameters": ["l"], "equations": equations,
                                "ranges": {"l": [0, 1000 / unit]}})


@pytest.mark.parametrize("unit, seed", [(1, 1), (1, 2), (1, 3), (100, 1), (100, 2), (100, 3)])
def test_the_double_factor_l_squared_is_a_discriminant_point_and_the_regions_beside_it_have_one_branch(unit, seed):
    result = discriminant(fourbar(unit), DiscriminantOptions(at_infinity=False), seed=seed)
    exact = np.array(EXACT_MM) / unit
    assert len(result.real_points) == len(exact)
    assert np.allclose(result.real_points, exact, atol=1e-6 * 800 / unit)
    assert result.paths["failed"] == 0
    beside = [r for r in result.regions if abs(r.sample[0]) < 200 / unit]  # (-200, 0) and (0, 200)
    assert len(beside) == 2
    assert all(r.count.branches == 1 and r.count.sure for r in beside)


@pytest.mark.parametrize("seed", [1, 2])
def test_a_double_discriminant_point_is_printed_to_its_accuracy(seed):
    # exact (hand computation): with s1 = 0 the members' double roots are at l^2 = 0, 200^2, 600^2, 800^2
    result = discriminant(fourbar(1, input_sine=True), DiscriminantOptions(at_infinity=False), seed=seed)
    out = io.StringIO()
    _print(result, out)
    line = next(t for t in out.getvalue().splitlines() if t.startswith("real discriminant points"))
    printed = [float(v) for v in re.findall(r"-?[\d.]+(?:e-?\d+)?", line.split(":", 1)[1])]
    # every digit printed is a claim: the double point at 0 reads 0, not 1000 * 2^-28
    assert printed == EXACT_MM


@pytest.mark.parametrize("unit, seed", [(1, 1), (1, 2), (1, 3), (1000, 1), (0.001, 2)])
def test_finite_double_roots_whose_directions_are_zeros_at_infinity_are_not_put_at_infinity(unit, seed):
    # y^2 = 0, x^2 y + x^2 - 1 = 0: (x, y) = (+-1, 0), each of multiplicity 2 (hand computation); the top forms y^2 and
    # x^2 y vanish in the direction (1, 0) of both roots, so F^h(0, X) = 0 there as well
    x = f"(x/{unit:g})" if unit >= 1 else f"({1 / unit:g}*x)"
    system = parse_system(["y^2", f"{x}^2*y + {x}^2 - 1"], ["x", "y"])
    result = solve_system(system, seed=seed)
    found = sorted((round(s.point[0].real / unit, 6), s.multiplicity) for s in result.solutions)
    assert found == [(-1.0, 2), (1.0, 2)]
