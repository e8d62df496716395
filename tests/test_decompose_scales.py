"""Irreducible curves and surfaces with features at very different scales are not split (decision 0135).

Each X is one irreducible hypersurface with a feature far smaller or far larger than the rest: a cubic 1e-10 from a
nodal one (near the node it is an exact hyperbola, whose two points on a line have a linear trace to 1e-11, the
third point far away), a quintic with two nodes 2e-4 apart next to a branch at distance 1. The trace test at one
scale confirmed proper parts of them (exit 0: "conic + line", "2 + 2 + 1"). The reference is sympy's factorisation
over Q(i) (Meurer et al., "SymPy: symbolic computing in Python", PeerJ Computer Science, 2017): the degrees of the
irreducible factors and their multiplicities, in the user's units, in units 1000 times larger and smaller, and after
a rational linear change of coordinates.
"""

import pytest
import sympy

from numag.system.parse import parse_system
from numag.tracking.tracker import FAILURE_LABELS
from numag.witness.decompose import decompose

X, Y, Z = sympy.symbols("x y z")
NEAR_NODE = Y**2 - X**2 * (X + 1) - sympy.Rational(1, 10**10)
CLOSE_NODES = Y**2 - (X**2 - sympy.Rational(1, 10**8))**2 * (X - 1)
NEAR_CONE = Z**2 - X**2 * (X + 1) - Y**2 - sympy.Rational(1, 10**10)


def _changed(f, variables, change):
    """f in other coordinates: ``units`` (old = k new) or a rational linear map (old = M new)."""
    if change == "as written":
        return sympy.expand(f)
    if change in ("x1000", "x1e-3"):
        k = sympy.Integer(1000) if change == "x1000" else sympy.Rational(1, 1000)
        return sympy.expand(f.subs({v: k * v for v in variables}, simultaneous=True))
    # a rational linear change of the first two coordinates (the third, if any, is kept)
    a, b = variables[:2]
    return sympy.expand(f.subs({a: 2 * a + b / 3, b: a - b / 2}, simultaneous=True))


def _factor_degrees(f, variables):
    """(degree, multiplicity) of each irreducible factor of f over Q(i), sorted (sympy)."""
    _, factors = sympy.factor_list(f, *variables, gaussian=True)
    return sorted((sympy.Poly(g, *variables).total_degree(), m) for g, m in factors)


def _found_degrees(f, variables, seed):
    system = parse_system([str(f)], [str(v) for v in variables])
    result = decompose(system, seed=seed)
    top = len(variables) - 1
    return result, sorted((c.degree, c.multiplicity) for c in result.components if c.dimension == top)


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("change", ["as written", "x1000", "x1e-3", "linear"])
@pytest.mark.parametrize("name, f, variables", [("near-node cubic", NEAR_NODE, (X, Y)),
                                                ("quintic with close nodes", CLOSE_NODES, (X, Y))])
def test_multiscale_curve_is_not_split(name, f, variables, change, seed):
    g = _changed(f, variables, change)
    expected = _factor_degrees(g, variables)
    assert expected == [(sympy.Poly(f, *variables).total_degree(), 1)]  # irreducible over Q(i) (sympy)
    result, found = _found_degrees(g, variables, seed)
    if any(result.paths.get(label, 0) for label in FAILURE_LABELS):
        pytest.skip("paths failed: the run is incomplete and says so")
    assert found == expected and not result.unconfirmed, (name, change, seed, found)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_surface_near_a_cone_is_not_split(seed):
    expected = _factor_degrees(NEAR_CONE, (X, Y, Z))
    assert expected == [(3, 1)]
    result, found = _found_degrees(NEAR_CONE, (X, Y, Z), seed)
    assert found == expected and not result.unconfirmed, (seed, found)


X1, Y1, X2, Y2, T = sympy.symbols("x1 y1 x2 y2 t")


def _kite(ground, long):
    """A kite four-bar's loop-closure equations: ground pivots (0, 0) and (ground, 0), crank = ground to the joint
    (x1, y1), coupler = rocker = ``long`` to the joint (x2, y2)."""
    return [X1**2 + Y1**2 - ground**2, (X2 - ground)**2 + Y2**2 - long**2, (X2 - X1)**2 + (Y2 - Y1)**2 - long**2]


def _kite_components(ground, long):
    """(dimension, degree) of the kite's components, by hand, with sympy checking the two steps of the derivation.

    Hand derivation (from memory of the kite's folded mode in mechanisms texts; the algebra by hand): the joint Q =
    (x2, y2) is as far from the pivot B = (ground, 0) as from P = (x1, y1), and |P| = |B|, so Q . (P - B) = 0 (the first
    identity below). Either P = B (the folded mode: Q anywhere on the circle about B, a conic) or P = ground (1 - t^2,
    2t) / (1 + t^2), y2 = t x2 and (1 + t^2) x2^2 - 2 ground x2 + ground^2 - long^2 = 0, whose discriminant in x2 is no
    square in C[t] when long != ground (the second check): one irreducible curve, of degree 6 - 2 = 4 (the three
    quadrics meet in a curve of degree 6 in C^4 here, two of its eight points on a general slice being at infinity).
    """
    e1, e2, e3 = _kite(ground, long)
    assert sympy.expand(e2 - e3 + e1 - 2 * (X2 * (X1 - ground) + Y1 * Y2)) == 0
    discriminant = sympy.discriminant((1 + T**2) * X2**2 - 2 * ground * X2 + ground**2 - long**2, X2)
    _, factors = sympy.factor_list(discriminant, T, gaussian=True)
    assert sorted(sympy.degree(g, T) for g, _ in factors if sympy.degree(g, T) > 0) == [2]  # not a square
    return [(1, 2), (1, 4)]


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("units", ["mm", "m", "mm, changed"])
def test_kite_four_bar_components(units, seed):
    """The kite in millimetres (crank = ground = 1, coupler = rocker = 1000) had stayed undecided: its trace moves at
    the larger scales failed at the minimum step (decision 0142). After the rational change it may stay undecided
    (flagged), never silently wrong."""
    ground, long = (sympy.Rational(1, 1000), 1) if units == "m" else (1, 1000)
    expected = _kite_components(ground, long)
    equations = _kite(ground, long)
    if units == "mm, changed":  # a rational linear change of each joint's coordinates
        a, b, c, d = sympy.symbols("a b c d")
        change = {X1: a + b / 3, Y1: b - a / 2, X2: c + d / 3, Y2: d - c / 2}
        equations = [sympy.expand(e.subs(change, simultaneous=True)) for e in equations]
        names = ["a", "b", "c", "d"]
    else:
        names = ["x1", "y1", "x2", "y2"]
    result = decompose(parse_system([str(e) for e in equations], names), seed=seed)
    confirmed = all(c.confirmed for c in result.components)
    if confirmed:  # never a silent wrong answer
        assert sorted((c.dimension, c.degree) for c in result.components) == expected
    if units != "mm, changed":  # after the change the largest scale's trace is still 6e-10 (decision 0142): flagged
        assert confirmed
