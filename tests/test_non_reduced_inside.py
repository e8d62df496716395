"""The singular points of X's reduced structure inside a non-reduced component (decisions 0136, 0140).

The Jacobian of f = g^m h vanishes all along V(g) when m > 1, so the points where another component meets V(g),
or where V(g) is singular itself, are no candidates of their own. numag searches them as the points of V(g) where
f vanishes to order > m (decision 0140) and lists them as singular pieces; where that search gives no answer it
must say so (a completeness warning, exit 3), never report "0 singular points" with exit 0.

Reference (common practice, no source): sympy's factor_list gives each factor g of multiplicity m > 1, and sympy's
solve of g together with every partial derivative of f of order m gives the points of V(g) where ord f > m (on
V(g) the partials of order < m vanish anyway; ord_p f = m ord_p g + ord_p h, hand computation). A curve of such
points is measured by its dimension and its degree (its points on a rational plane, by sympy's solve).
"""

from itertools import combinations_with_replacement

import numpy as np
import pytest
import sympy

from numag.app.report import completeness_warnings, singular_from_dict, singular_to_dict
from numag.singular.kinds import CandidateSystem, PieceKind
from numag.singular.locus import SingularOptions, singular_locus
from numag.system.parse import parse_system

# (equations, unknowns); the first four are the tester's (decision 0136), the rest ours
CASES = {
    "double line crossed": (["(x - y)^2*(x + y)"], ["x", "y"]),           # they meet at the origin
    "double cusp": (["(y^2 - x^3)^2"], ["x", "y"]),                        # the cusp of the reduced curve
    "double line on a cusp": (["(y - 5)^2*(y^2 - x^3)"], ["x", "y"]),      # x^3 = 25 on y = 5
    "double plane on a hyperboloid": (["z^2*(x^2 + y^2 - z^2 - 1)"], ["x", "y", "z"]),  # the circle z = 0
    "double and triple line": (["x^2*y^3"], ["x", "y"]),                   # two non-reduced components meet
    "double parabola on a parabola": (["(x - y^2)^2*(x + y^2 - 2)"], ["x", "y"]),   # (1, 1), (1, -1)
    "double circle alone": (["(x^2 + y^2 - 1)^2"], ["x", "y"]),            # smooth reduced structure: nothing
    "double line alone": (["(3*x - 2*y + 1)^2"], ["x", "y"]),              # a line is smooth: nothing
}
# Units and a rational change: x -> 1000 x, and x -> x + y/3 - 2
CHANGES = {"as written": {}, "kilo": {"x": "(1000*x)", "y": "(1000*y)"},
           "linear": {"x": "(x + y/3 - 2)"}}


def _changed(equations, change):
    return [e.replace("x", "X").replace("y", "Y").replace("X", change.get("x", "x")).replace("Y", change.get("y", "y"))
            for e in equations]


def _reference(equation, unknowns):
    """sympy: (points, curve degree) where f vanishes to order > m on a factor of multiplicity m > 1; the curves
    of such points measured together by their number of points on a rational plane (their degree; 0 if none)."""
    symbols = sympy.symbols(unknowns)
    f = sympy.expand(sympy.parse_expr(equation.replace("^", "**"), dict(zip(unknowns, symbols))))
    points, curve_degree = set(), 0
    for g, m in sympy.factor_list(f)[1]:
        if m < 2:
            continue
        equations = [g] + [sympy.diff(f, *combo) for combo in combinations_with_replacement(symbols, m)]
        solutions = sympy.solve(equations, symbols, dict=True)
        isolated = [s for s in solutions if len(s) == len(symbols) and all(v.is_number for v in s.values())]
        points.update(tuple(complex(s[v]) for v in symbols) for s in isolated)
        if len(isolated) < len(solutions):  # a curve (sympy gives it in branches): its points on a plane
            plane = sum((k + 2) * s for k, s in enumerate(symbols)) - sympy.Rational(3, 7)
            on_plane = sympy.solve(equations + [plane], symbols, dict=True)
            assert all(len(p) == len(symbols) for p in on_plane)  # finitely many: a curve
            curve_degree += len(on_plane)
    return sorted(points, key=lambda p: (p[0].real, p[0].imag, p[1].real, p[1].imag)), curve_degree


def _same_points(found, expected):
    scale = max([max(abs(c) for c in p) for p in expected] + [1e-3])
    unmatched = list(found)
    for point in expected:
        distances = [np.linalg.norm(np.asarray(q) - np.asarray(point)) for q in unmatched]
        if not distances or min(distances) > 1e-6 * scale:
            return False
        unmatched.pop(int(np.argmin(distances)))
    return not unmatched


@pytest.mark.parametrize("change", list(CHANGES))
@pytest.mark.parametrize("name", list(CASES))
@pytest.mark.parametrize("seed", [1, 2, 3])
def test_the_inside_of_a_non_reduced_component_is_answered_or_flagged(name, change, seed):
    equations, unknowns = CASES[name]
    equations = _changed(equations, CHANGES[change])
    expected_points, expected_curve_degree = _reference(equations[0], unknowns)
    locus = singular_locus(parse_system(equations, unknowns), SingularOptions(), seed=seed)
    warnings = completeness_warnings(singular_to_dict(locus, SingularOptions()))
    undecided = [c for c in locus.components if c.kind is PieceKind.UNDECIDED and not c.at_infinity]
    # the search must answer the cases as written at seeds 1 and 2 (deterministic runs; seed 3 of the double cusp
    # has jumped paths in X's own candidates, exit 3 before the search)
    assert change != "as written" or seed == 3 or not (warnings or undecided), (warnings, locus.notes)
    if locus.discarded.get("non_reduced_inside_unsearched"):  # no answer (failed paths, ...): it must say so
        assert any("non-reduced component" in w for w in warnings), warnings
        return
    if undecided:
        return  # a piece undecided (exit 3): the run claims no complete answer
    # answered: exactly sympy's points, and sympy's curve by its degree, listed as singular pieces
    inside = [c for c in locus.components if c.formulation is CandidateSystem.HIGHER_PARTIALS]
    assert all(c.kind is PieceKind.SINGULAR for c in inside)
    found_points = [tuple(c.points[0]) for c in inside if c.dimension == 0]
    assert _same_points(found_points, expected_points), (found_points, expected_points)
    assert all(c.dimension <= 1 for c in inside)
    assert sum(c.degree for c in inside if c.dimension == 1) == expected_curve_degree


def test_a_piece_inside_survives_the_json_round_trip():
    # the new kind of source is read back from a report (common practice, no source)
    system = parse_system(["(x - y)^2*(x + y)"], ["x", "y"])
    locus = singular_locus(system, SingularOptions(), seed=1)
    back = singular_from_dict(singular_to_dict(locus, SingularOptions()))[0]
    kinds = sorted((c.formulation.value, c.kind.value, c.dimension) for c in back.components)
    assert kinds == sorted((c.formulation.value, c.kind.value, c.dimension) for c in locus.components)
    assert CandidateSystem.HIGHER_PARTIALS in [c.formulation for c in back.components]
