"""Proper groups of an exact hypersurface held against the trace test in high precision (decision 0144).

Irreducible plane curves that are unions of two simpler curves to within a small written constant: two parabolas
crossing plus 1/10^10, a quintic with two nodes 2e-6 apart plus a far branch, two circles plus x/10^6 (its trace is
linear to 1e-27, below double precision). The double-precision trace test confirmed proper parts of them (exit 0).
The reference is sympy's factorisation over Q(i) (Meurer et al., "SymPy: symbolic computing in Python", PeerJ
Computer Science, 2017): a decomposition whose groups are all confirmed must give sympy's factor degrees; a split of
an irreducible curve must not be confirmed. As written, in units 1000 times larger and after a rational linear change.
"""

import numpy as np
import pytest
import sympy

from numag.system.parse import parse_system
from numag.witness.decompose import decompose
from numag.witness.precise_trace import precise_verdicts

X, Y = sympy.symbols("x y")
PARABOLAS = (Y - X**2) * (Y + X**2 - 1) + sympy.Rational(1, 10**10)
CLOSE_NODES = Y**2 - (X**2 - sympy.Rational(1, 10**12))**2 * (X + 2)
TWO_CIRCLES = (X**2 + Y**2 - 1) * (X**2 + Y**2 - 4) + X / 10**6
REDUCIBLE = (X**2 + Y**2 - 1) * (X**2 + Y**2 - 4) * (X - 3 * Y + 1)


def _changed(f, change):
    if change == "as written":
        return sympy.expand(f)
    if change == "x1000":
        return sympy.expand(f.subs({X: 1000 * X, Y: 1000 * Y}, simultaneous=True))
    return sympy.expand(f.subs({X: 2 * X + Y / 3, Y: X - Y / 2}, simultaneous=True))


def _factor_degrees(f):
    """Degrees of the irreducible factors of f over Q(i), sorted (sympy)."""
    _, factors = sympy.factor_list(f, X, Y, gaussian=True)
    return sorted(sympy.Poly(g, X, Y).total_degree() for g, m in factors for _ in range(m))


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("change", ["as written", "x1000", "linear"])
@pytest.mark.parametrize("name, f", [("parabolas", PARABOLAS), ("close nodes", CLOSE_NODES),
                                     ("two circles", TWO_CIRCLES), ("reducible", REDUCIBLE)])
def test_confirmed_groups_are_the_factors(name, f, change, seed):
    g = _changed(f, change)
    expected = _factor_degrees(g)
    result = decompose(parse_system([str(g)], ["x", "y"]), seed=seed)
    found = sorted(c.degree for c in result.components)
    if not result.unconfirmed:
        assert found == expected, (name, change, seed, found)
    else:  # undecided is allowed (exit 3); a confirmed group is never a proper part of a factor
        assert name != "reducible", (change, seed, found)
        assert len(expected) == 1 and all(not c.confirmed for c in result.components if c.degree < expected[0])


def test_a_parabola_beside_a_line_is_linear_and_one_point_is_not():
    # the two points of y = x^2 on a line have a linear trace; one of them alone does not (common practice, no source)
    f = parse_system(["(y - x^2) * (y + 1)"], ["x", "y"]).polynomials[0]
    rows = np.array([[-0.5 + 0.2j, 0.3 - 0.1j, 1.0]])  # y = 0.5 - 0.2i - (0.3 - 0.1i) x
    t = np.roots([1, 0.3 - 0.1j, -0.5 + 0.2j])
    points = np.vstack([np.column_stack([t, 0.5 - 0.2j - (0.3 - 0.1j) * t]),
                        [[(1.5 - 0.2j) / (0.3 - 0.1j), -1.0]]])  # y = -1 on the line
    assert precise_verdicts(f, rows, points, [[0], [0, 1], [2]], seed=3) == [False, True, True]


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_roots_from_guesses_are_the_whole_set_or_none(seed):
    # roots chosen by hand, two of them 1e-6 apart; the polynomial's coefficients from them exactly (hand computation,
    # common practice, no source): from guesses near the roots the Weierstrass steps give every root to the working
    # precision; from guesses anywhere they give every root or None, never a list with a root twice or one missing
    import mpmath

    from numag.witness.precise_trace import _roots

    rng = np.random.default_rng(seed)
    with mpmath.mp.workdps(60):
        roots = [mpmath.mpc(1), mpmath.mpc(1, 1e-6), mpmath.mpc(-2, 3), mpmath.mpc(0.5, -4), mpmath.mpc(-7)]
        coefficients = [mpmath.mpc(1)]
        for r in roots:  # times (t - r), lowest coefficient first
            coefficients = [-r * coefficients[0]] + [coefficients[k - 1] - r * coefficients[k]
                                                     for k in range(1, len(coefficients))] + [coefficients[-1]]
        near = [complex(r) + 1e-9 * complex(*rng.standard_normal(2)) for r in roots]
        found = _roots(coefficients, 5, guesses=near)
        assert found is not None
        assert all(min(abs(f - r) for f in found) < mpmath.mpf(10) ** -50 for r in roots)
        for _ in range(5):
            anywhere = [complex(*rng.standard_normal(2)) * 5 for _ in roots]
            found = _roots(coefficients, 5, guesses=anywhere, polish=False)
            if found is not None:
                assert all(min(abs(f - r) for f in found) < 1e-7 for r in roots)
                assert all(min(abs(r - f) for r in roots) < 1e-7 for f in found)
