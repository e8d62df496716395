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


# --- decision 0071: features far from the origin judged again in coordinates centred at them -------------------

import sympy  # noqa: E402  (the exact reference of the cases below)

from numag.app.report import singular_to_dict  # noqa: E402
from numag.singular.locus import SingularOptions  # noqa: E402
from numag.singular.kinds import PieceKind  # noqa: E402
from numag.system.polynomial import PolynomialSystem  # noqa: E402

#: A cusp at (7, 7) and a line 1e-4 from it: the cusp and three crossings (one real) within 2e-3 (sympy).
CUSP_AND_LINE = ("cusp at (7, 7) and a line 1e-4 away", "(((y - 7) - (2/5)*(x - 7))^2 - ((x - 7) + (1/3)*(y - 7))^3)"
                 "*((y - 7) - (2/5)*(x - 7) - 1/10000)", ["x", "y"])


def warnings_of(locus):
    """What makes the command line exit 3: the completeness warnings of a locus and its undecided pieces."""
    undecided = [f"piece {c.id} undecided" for c in locus.components if c.kind is PieceKind.UNDECIDED]
    return completeness_warnings(singular_to_dict(locus, SingularOptions())) + undecided

#: (label, equation, variables). Each has its singular features at 1e-5..2e-3 of their distance from the origin.
FAR_FEATURES = [
    # an ellipse of semi-axes 2e-5, 1e-5 cut by a line 5e-6 from its centre (5/17, 36/17): two crossings 3e-5 apart
    ("ellipse 2e-5 and a line", "((u + (1/3)*v - 1)^2 + 4*((-2/5)*u + v - 2)^2 - 4/10000000000)"
                                "*((-2/5)*u + v - 2 - 1/200000)", ["u", "v"]),
    # two nodes 1e-4 apart at (100, -50): (y + 50)^2 = ((x - 100)^2 - (5e-5)^2)^2
    ("node pair 1e-4 apart at (100, -50)", "(y + 50)^2 - ((x - 100)^2 - 25/10000000000)^2", ["x", "y"]),
    ("loop 1e-5 after a linear change", "((-2/5)*u + v - 2)^2 - (u + (1/3)*v - 1)^2*(u + (1/3)*v - 1 + 1/100000)",
     ["u", "v"]),
]


def sympy_singular_points(system):
    """Every solution of f = grad f = 0 by sympy (exact, over C), as complex points; the test's reference.

    sympy's solve of the polynomial system in exact rationals (Meurer et al., "SymPy: symbolic computing in
    Python", PeerJ Computer Science 3:e103, 2017). A double coefficient is taken as the rational it is.
    """
    symbols = sympy.symbols(system.variables)
    polynomial = system.polynomials[0]
    f = sympy.Integer(0)
    for exponents, coefficient in zip(polynomial.exponents, polynomial.coefficients):
        value = complex(coefficient) if not polynomial.is_exact else None
        # exact text read exactly (nsimplify rounded -12500000000003/312500000 to -40000, which made the two circles'
        # nodes disappear from the reference; decision 0083)
        term = sympy.sympify(coefficient.to_text().replace("^", "**")) if value is None else \
            sympy.Rational(*value.real.as_integer_ratio()) + sympy.I * sympy.Rational(*value.imag.as_integer_ratio())
        for symbol, power in zip(symbols, exponents):
            term *= symbol ** int(power)
        f += term
    solutions = sympy.solve([f] + [sympy.diff(f, s) for s in symbols], symbols, dict=True)
    return np.array([[complex(sympy.N(s[x], 30)) for x in symbols] for s in solutions], dtype=complex).reshape(
        len(solutions), len(symbols))


def matched(points, reference):
    """How many reference points have a point of ``points`` within 1e-7 of their size (the refined points sit
    within 1e-12; features are 1e-5 and more apart)."""
    return sum(bool(len(points)) and bool(np.any(np.linalg.norm(points - r, axis=1) <= 1e-7 * (1 + np.linalg.norm(r))))
               for r in reference)


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("label, equation, names", FAR_FEATURES, ids=[case[0] for case in FAR_FEATURES])
def test_features_far_from_the_origin_exact_input_are_found(label, equation, names, seed):
    system = parse_system([equation], names)
    reference = sympy_singular_points(system)
    locus = singular_locus(system, seed=seed)
    points = affine_points(locus)
    warnings = warnings_of(locus)
    assert len(points) == len(reference) and matched(points, reference) == len(reference), (
        label, points, reference, locus.discarded)
    assert not warnings, warnings


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("label, equation, names", [FAR_FEATURES[1], CUSP_AND_LINE],
                         ids=[FAR_FEATURES[1][0], CUSP_AND_LINE[0]])
def test_features_far_from_the_origin_double_input_are_right_or_flagged(label, equation, names, seed):
    # rounded to doubles the polynomial is another one (sympy: no singular point at all for these two); numag must
    # give that count or say that it cannot tell (a near-singular point, decision 0062)
    exact = parse_system([equation], names)
    system = PolynomialSystem(names, [p.numeric() for p in exact.polynomials])
    reference = sympy_singular_points(system)
    locus = singular_locus(system, seed=seed)
    points = affine_points(locus)
    flagged = warnings_of(locus)
    assert (len(points) == len(reference) and matched(points, reference) == len(reference)) or flagged, (
        label, points, reference, locus.discarded)


#: Cases numag does not always settle (decision 0071, "Left"): each must come out right or flagged, never silently
#: wrong. The cusp and its line: every point is found at seeds 1-3; at seeds 1 and 3 a second candidate of the cusp is
#: not settled on X in the centred run, which keeps the first run's multiple endpoints there undecided (flagged).
HARDER = [
    CUSP_AND_LINE,
    # the node pair after a rational linear change: b^2 = (a^2 - (5e-5)^2)^2 is flat along a (b ~ 1e-9 where
    # a ~ 1e-4), which powers of ten per coordinate cannot balance once x and y are mixed (at the origin too)
    ("node pair 1e-4 apart, sheared", "((y + 50) - (2/5)*(x - 100))^2 - (((x - 100) + (1/3)*(y + 50))^2 "
                                      "- 25/10000000000)^2", ["x", "y"]),
    # two circles of radius 7e-5 crossing at two nodes 1e-4 apart about (100, -50), rotated by (3/5, 4/5): in
    # double precision the curve looks like the two isotropic lines through the centre, counted twice
    ("two circles crossing, 1e-4", "((((3/5)*(x - 100) + (4/5)*(y + 50)) - 1/20000)^2 + ((-4/5)*(x - 100) "
                                   "+ (3/5)*(y + 50))^2 - 5/1000000000)*((((3/5)*(x - 100) + (4/5)*(y + 50)) "
                                   "+ 1/20000)^2 + ((-4/5)*(x - 100) + (3/5)*(y + 50))^2 - 5/1000000000)",
     ["x", "y"]),
]


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("label, equation, names", HARDER, ids=[case[0] for case in HARDER])
def test_harder_features_far_from_the_origin_are_right_or_flagged(label, equation, names, seed):
    system = parse_system([equation], names)
    reference = sympy_singular_points(system)
    locus = singular_locus(system, seed=seed)
    points = affine_points(locus)
    flagged = warnings_of(locus)
    assert (len(points) == len(reference) and matched(points, reference) == len(reference)) or flagged, (
        label, points, reference, locus.discarded)
    assert matched(points, reference) == len(points)  # nothing reported that is not a singular point


def test_parabolas_and_a_line_far_from_the_origin_are_found_or_flagged():
    # y = x^2 and y = x^2 + 10^-3 cut by x = 3: the nodes (3, 9), (3, 9.001) (sympy, as above); the regeneration
    # along x = 3 averages the two nodes with two paths to infinity: those paths now count as failed
    system = parse_system(["(y - x^2)*(y - x^2 - 1/1000)*(x - 3)"], ["x", "y"])
    reference = sympy_singular_points(system)
    locus = singular_locus(system, seed=1)
    points = affine_points(locus)
    flagged = warnings_of(locus)
    assert (len(points) == len(reference) == matched(points, reference)) or flagged, (points, locus.paths)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_cusp_and_line_points_found_by_the_centred_run_are_kept_and_its_doubt_counted(seed):
    # The cusp at (7, 7) and its three crossings (sympy's solution of (f, grad f), as above). When the centred run
    # does not settle its region, its points are kept all the same and the first run's multiple endpoints there are
    # counted (a warning, exit 3): 2 of the 4 points with exit 0 came out once (decision 0071, addendum).
    label, equation, names = CUSP_AND_LINE
    system = parse_system([equation], names)
    reference = sympy_singular_points(system)
    locus = singular_locus(system, seed=seed)
    points = affine_points(locus)
    assert len(points) == len(reference) == matched(points, reference), (points, locus.discarded, locus.notes)
    undecided = locus.discarded.get("unresolved_multiple_endpoint", 0)
    assert bool(undecided) == any("multiple endpoint" in warning for warning in warnings_of(locus))
    assert warnings_of(locus) or not any("did not settle" in note for note in locus.notes)  # never silent
