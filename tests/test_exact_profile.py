"""X's decomposition held against the equation's exact multiplicity profile on rational lines (decision 0128)."""

import random

import pytest

from numag.system.parse import parse_system
from numag.system.univariate import multiplicity_profile
from numag.witness.decompose import decompose

sympy = pytest.importorskip("sympy")
X, Y, T = sympy.symbols("x y t")


def _text(expression):
    return str(sympy.expand(expression)).replace("**", "^")


@pytest.mark.parametrize("draw", range(40))
def test_the_profile_is_sympys_square_free_factorisation(draw):
    # products of random factors to random powers, restricted to a random integer line: the profile is the
    # degrees of sympy's square-free factorisation by multiplicity (sympy.sqf_list, a general-purpose reference)
    rng = random.Random(draw)
    f = sympy.Integer(1)
    for _ in range(rng.randint(1, 3)):
        factor = sum(rng.randint(-3, 3) * X ** i * Y ** j for i in range(3) for j in range(3) if i + j <= 2)
        if not factor.free_symbols:
            continue
        f *= factor ** rng.randint(1, 3)
    if not f.free_symbols:
        return
    offset, direction = [rng.randint(-50, 50) for _ in range(2)], [rng.randint(-50, 50) for _ in range(2)]
    profile = multiplicity_profile(parse_system([_text(f)], ["x", "y"]).polynomials[0], offset, direction)
    g = sympy.Poly(sympy.expand(f.subs({X: offset[0] + T * direction[0], Y: offset[1] + T * direction[1]})), T)
    if g.degree() != sympy.Poly(sympy.expand(f), X, Y).total_degree():
        assert profile is None
        return
    expected = {}
    for factor, m in sympy.sqf_list(g)[1]:
        expected[m] = expected.get(m, 0) + factor.degree()
    assert profile == expected


def _far(expression):
    """x -> 2x + y - 1234, y -> x + y + 567: a rational linear change and a far shift (terms up to 1e16)."""
    return expression.subs({X: 2 * X + Y - 1234, Y: X + Y + 567}, simultaneous=True)


def _sympy_profile(expression):
    """{multiplicity: sum of the degrees of the irreducible factors of that multiplicity} (sympy.factor_list)."""
    profile = {}
    for factor, m in sympy.factor_list(sympy.expand(expression))[1]:
        profile[m] = profile.get(m, 0) + sympy.Poly(factor, X, Y).total_degree()
    return profile


@pytest.mark.parametrize("curve", ["quintic", "doubled_conic", "line_and_parabola"])
@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_far_decomposition_is_right_or_flagged(curve, seed):
    # y = x^5 (irreducible, reduced), (y - x^2)^2 (a doubled conic), x^2 (y - x^2) (a double line and a conic),
    # each after the far change: the decomposition agrees with sympy's factorisation or says it does not
    # (before decision 0128 the quintic came out "degree 1, multiplicity 5" with no warning at one seed)
    expression = {"quintic": Y - X ** 5, "doubled_conic": (Y - X ** 2) ** 2,
                  "line_and_parabola": X ** 2 * (Y - X ** 2)}[curve]
    moved = _far(expression)
    result = decompose(parse_system([_text(moved)], ["x", "y"]), seed=seed)
    found = {}
    for c in result.components:
        found[c.multiplicity] = found.get(c.multiplicity, 0) + c.degree
    flagged = result.paths.get("exact_profile_differs", 0) or any(
        result.paths.get(label, 0) for label in ("minimum_step", "step_limit", "non_finite", "endgame_unsettled",
                                                  "batch_failed", "degree_check_failed"))
    assert flagged or found == _sympy_profile(moved)
    if result.paths.get("exact_profile_differs", 0):  # never a false alarm: the flag means the answer differs
        assert found != _sympy_profile(moved)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_an_empty_decomposition_of_a_non_constant_equation_is_flagged(seed):
    # A non-constant f vanishes somewhere on every line in general position (fundamental theorem of algebra;
    # common practice, no source), so "no component" is never right: the check must say so.
    from numag.witness.decompose import _exact_profile_check, exact_profile
    system = parse_system(["(y - x^2)^2 - 3"], ["x", "y"])
    assert _exact_profile_check(system, [], exact_profile(system, seed)) == {"exact_profile_differs": 1}
