"""Units for the computation (numag.numeric.scaling): least-squares balancing of coefficient magnitudes.

The method is that of Meintjes and Morgan, "A methodology for solving chemical equilibrium
systems", Appl. Math. Comput. 1987, and Morgan, "Solving Polynomial Systems Using Continuation
for Engineering and Scientific Problems", Prentice-Hall 1987 (chapter on scaling).
"""

from fractions import Fraction

import pytest
from hypothesis import given, settings, strategies as st
import numpy as np

from numag.system.parse import parse_system
from numag.numeric.scaling import Scaling

LINKAGE = ["x1^2 + y1^2 - 4", "(x2 - 4)^2 + y2^2 - 9", "(x2 - x1)^2 + (y2 - y1)^2 - 9"]
NAMES = ["x1", "y1", "x2", "y2"]


def in_units(equations, names, powers):
    """The equations with x_j replaced by x_j / 10^powers[j] (x_j measured in units 10^-powers[j] times as large)."""
    substituted = []
    for text in equations:
        for name, k in zip(names, powers):
            text = text.replace(name, f"(({name})/{10 ** k})" if k >= 0 else f"(({name})*{10 ** -k})")
        substituted.append(text)
    return parse_system(substituted, names)


@settings(max_examples=25, deadline=None)
@given(st.lists(st.integers(-4, 4), min_size=4, max_size=4), st.lists(st.integers(-8, 8), min_size=3, max_size=3))
def test_a_change_of_units_gives_the_same_computed_problem(powers, equation_powers):
    # In other units (x_j -> 10^k x_j) and with equations multiplied by 10^k, the balanced problem is
    # the same, coefficient for coefficient: the least-squares solution moves by exactly those powers
    # (a property of the method; exact rational input keeps it exact).
    base = parse_system(LINKAGE, NAMES)
    moved = in_units(LINKAGE, NAMES, powers)
    moved = parse_system([f"{Fraction(10) ** r}*({t})" for t, r in zip(moved.to_texts(), equation_powers)], NAMES)
    first = Scaling.balancing(base)
    second = Scaling.balancing(moved)
    assert first.scale_system(base).to_texts() == second.scale_system(moved).to_texts()
    assert np.all(np.array(second.variable_exponents) - np.array(first.variable_exponents) == np.array(powers))


def test_tiny_and_huge_circles_become_the_unit_circle():
    # x^2 + y^2 = r^2 for r = 1e-12 and 1e12: the radius is the unit of both unknowns (by hand)
    for exponent in (-12, 12):
        system = parse_system([f"x^2 + y^2 - 1e{2 * exponent}"], ["x", "y"])
        scaling = Scaling.balancing(system)
        assert scaling.variable_exponents == (exponent, exponent)
        assert scaling.scale_system(system).to_texts() == ["x^2 + y^2 - 1"]


def test_points_and_hyperplanes_move_both_ways():
    # x = 10^c y; a hyperplane a . (1, y) = 0 holds the same points as its image in x (by hand)
    scaling = Scaling((3, -2), (0,))
    rng = np.random.default_rng(2)
    y = rng.standard_normal((5, 2)) + 1j * rng.standard_normal((5, 2))
    x = scaling.to_user(y)
    assert np.allclose(scaling.to_computed(x), y)
    rows = rng.standard_normal((1, 3)) + 1j * rng.standard_normal((1, 3))
    rows[0, 0] = -(rows[0, 1:] @ y[0])  # through y[0]
    image = scaling.hyperplanes_to_user(rows)
    assert abs(image[0, 0] + image[0, 1:] @ x[0]) < 1e-12 * np.linalg.norm(x[0])
    assert np.allclose(scaling.hyperplanes_to_computed(image) * (rows[0, 0] / scaling.hyperplanes_to_computed(
        image)[0, 0]), rows)


def test_exact_input_stays_exact_and_json_round_trips():
    # powers of ten multiply rationals exactly (common practice, no source)
    system = parse_system(["1/3*x^2 - 7000*y"], ["x", "y"])
    scaling = Scaling.balancing(system)
    scaled = scaling.scale_system(system)
    assert scaled.is_exact
    assert Scaling.from_json(scaling.to_json(system.variables), system.variables) == scaling



@pytest.mark.parametrize("powers", [(0, 0), (3, -3), (-3, 3), (2, 5)])
def test_tiny_terms_do_not_set_the_units(powers):
    # p = x^4 - 5 x^2 + 4 with tiny x^3 and x terms, and its x-derivative: the solutions are x = 0, +-sqrt(5/2)
    # and p = 4, -9/4 (solved by hand; common practice, no source). p is in one term, so its unit follows its
    # equation's power of ten; fitted with equal weight, the two tiny terms (1e-6 of the rest) put the solutions'
    # p at 10^3 in the computed units. In any units, balanced without the tiny terms, the solutions are of order one (decisions 0099, 0102).
    equations = ["x^4 - 1/1250000*x^3 - 5*x^2 + 1/500000*x - p + 4", "4*x^3 - 3/1250000*x^2 - 10*x + 1/500000"]
    system = in_units(equations, ["x", "p"], powers)
    scaling = Scaling.balancing(system, ignore_tiny=True)  # as solve's first run (decision 0102)
    solutions = np.array([[0.0, 4.0], [2.5 ** 0.5, -2.25], [-(2.5 ** 0.5), -2.25]]) * 10.0 ** np.array(powers)
    computed = np.abs(scaling.to_computed(solutions))
    assert computed.max() <= 10 and computed[1:].min() >= 0.1


@pytest.mark.parametrize("powers", [(1, -2), (3, 3), (-4, 2)])
def test_units_fitted_without_tiny_terms_are_still_a_change_of_units(powers):
    # leaving tiny terms out (decision 0102) keeps the balancing equivariant: in units x -> 10^k x the exponents
    # move by exactly k, and the balanced problem is the same (a property of the method)
    equations = ["x^4 - 1/1250000*x^3 - 5*x^2 + 1/500000*x - p + 4", "4*x^3 - 3/1250000*x^2 - 10*x + 1/500000"]
    base = in_units(equations, ["x", "p"], (0, 0))
    moved = in_units(equations, ["x", "p"], powers)
    first, second = Scaling.balancing(base, ignore_tiny=True), Scaling.balancing(moved, ignore_tiny=True)
    assert first.scale_system(base).to_texts() == second.scale_system(moved).to_texts()
    assert np.all(np.array(second.variable_exponents) - np.array(first.variable_exponents) == np.array(powers))
