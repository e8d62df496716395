"""Anatomy decisions that do not depend on units or on the distance from the origin (decision 0073)."""

import numpy as np
import pytest

from numag.system.parse import parse_system
from numag.anatomy.hypersurface import morse_alpha
from numag.anatomy.records import Family
from numag.anatomy.survey import point_anatomy

# Two parabolas y - 2 = +-((x - 1)^2 - 1e-8) cross transversally where (x - 1)^2 = 1e-8: two nodes (A1) at
# x = 1 +- 1e-4, y = 2, and a Morse critical point of critical value -1e-16 between them (worked by hand;
# common practice, no source). The feature (2e-4) is 1e-4 of the distance from the origin.
NODES = "(Y - 2)^2 - ((X - 1)^2 - 1/100000000)^2"
# The same curve in other units (x in thousandths and in thousands of the original unit): the node moves with it.
UNITS = [("X", "Y", (1.0001, 2.0)), ("(x/1000)", "(y/1000)", (1000.1, 2000.0)),
         ("(1000*x)", "(1000*y)", (1.0001e-3, 2e-3))]


@pytest.mark.parametrize("x_of, y_of, node", UNITS)
@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_node_next_to_another_is_a_node_in_any_unit(x_of, y_of, node, seed):
    equation = NODES.replace("X", x_of.replace("X", "x")).replace("Y", y_of.replace("Y", "y"))
    system = parse_system([equation], ["x", "y"])
    anatomy = point_anatomy(system, np.array(node), seed=seed)
    h = anatomy.hypersurface
    assert h.type.label == "A1" and h.milnor == 1 and h.corank == 0, (equation, seed, h.type.label)
    # the local picture agrees: two real branches (the two parabolas)
    assert anatomy.branches is not None and len(anatomy.branches) == 2
    assert all(branch.real for branch in anatomy.branches)
    # a node's branches cross transversally (Morse lemma), although their slopes differ by 4e-4 only
    assert anatomy.transversal and "cross transversally" in anatomy.sentence


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_node_after_a_rational_linear_change_is_never_a_higher_type(seed):
    # X = 2x + y, Y = x + y: the node (1.0001, 2) is at (-0.9999, 2.9999). Here the Taylor rounding of the
    # expanded polynomial reaches the feature (Smale's alpha about 9 at the node): A1 or undecided, nothing else
    equation = NODES.replace("X", "(2*x + y)").replace("Y", "(x + y)")
    anatomy = point_anatomy(parse_system([equation], ["x", "y"]), np.array([-0.9999, 2.9999]), seed=seed)
    assert anatomy.hypersurface.type.family in (Family.A, Family.UNDECIDED)
    assert anatomy.hypersurface.type.index in (1, None)


def test_smale_alpha_has_wide_margins_on_both_sides():
    # Smale 1986, "Newton's method estimates from data at one point": alpha < 0.157 gives a regular zero of
    # grad f; at a point d off an A_k (k >= 2), D4 or E6 alpha is of order one whatever d is (beta ~ d, gamma
    # ~ 1 / d; Arnold 1972 normal forms). The test's threshold is 0.05: every value below is a factor 5 from it.
    nodes = parse_system([NODES.replace("X", "x").replace("Y", "y")], ["x", "y"]).polynomials[0]
    assert morse_alpha(nodes, [1.0001, 2.0]).alpha < 0.01
    assert morse_alpha(parse_system(["x^2 - y^2"], ["x", "y"]).polynomials[0], [1e-10, 3e-11]).alpha < 1e-10
    for equation in ["y^2 - x^3", "y^2 - x^4", "y^2 - x^6", "x^2*y - y^3", "x^3 + y^4"]:
        f = parse_system([equation], ["x", "y"]).polynomials[0]
        for offset in (1e-3, 1e-7):
            assert morse_alpha(f, [offset, 0.3 * offset]).alpha > 0.25, (equation, offset)
        assert not morse_alpha(f, [0.0, 0.0]).morse


def test_smale_alpha_does_not_change_with_the_unit():
    # alpha is invariant under x -> c x and f -> c' f (Smale 1986); the coefficients' rounding differs a little
    values = []
    for x_of, y_of, node in UNITS:
        equation = NODES.replace("X", x_of.replace("X", "x")).replace("Y", y_of.replace("Y", "y"))
        values.append(morse_alpha(parse_system([equation], ["x", "y"]).polynomials[0], node).alpha)
    assert max(values) < 3 * min(values) and max(values) < 0.01
