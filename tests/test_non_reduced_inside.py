"""A non-reduced component hides the singular points of X's reduced structure inside it (decision 0136).

The Jacobian of f = g^m h vanishes all along V(g) when m > 1, so the points where another component meets
V(g), or where V(g) is singular itself, are no candidates of their own. numag does not search them; it must
say so (a completeness warning, exit 3), never report "0 singular points" with exit 0. A linear space alone
is smooth and needs no warning.

Reference (common practice, no source): the reduced structures below are read off the factors by hand and
checked with sympy's factor_list; their singular points are where two factors meet or where a factor's
gradient vanishes on it.
"""

import pytest
import sympy

from numag.app.report import completeness_warnings, singular_to_dict
from numag.singular.locus import SingularOptions, singular_locus
from numag.system.parse import parse_system

X, Y, Z = sympy.symbols("x y z")

# (equations, unknowns, whether X_red has a singular point inside a non-reduced component)
CASES = {
    "double line crossed": (["(x - y)^2*(x + y)"], ["x", "y"], True),          # they meet at the origin
    "double cusp": (["(y^2 - x^3)^2"], ["x", "y"], True),                       # the cusp of the reduced curve
    "double plane on a hyperboloid": (["z^2*(x^2 + y^2 - z^2 - 1)"], ["x", "y", "z"], True),  # the circle z = 0
    "double line alone": (["(3*x - 2*y + 1)^2"], ["x", "y"], False),           # a line is smooth
}
# Units and a rational change: x -> 1000 x, and x -> x + y/3 - 2
CHANGES = {"as written": {}, "kilo": {"x": "(1000*x)", "y": "(1000*y)"},
           "linear": {"x": "(x + y/3 - 2)"}}


def _changed(equations, change):
    return [e.replace("x", "X").replace("y", "Y").replace("X", change.get("x", "x")).replace("Y", change.get("y", "y"))
            for e in equations]


def _reference_has_multiple_factor(equation, unknowns):
    """sympy: the equation has a factor of multiplicity > 1 (the non-reduced component the case is about)."""
    expression = sympy.parse_expr(equation.replace("^", "**"), {u: sympy.Symbol(u) for u in unknowns})
    return any(power > 1 for _, power in sympy.factor_list(sympy.expand(expression))[1])


@pytest.mark.parametrize("change", list(CHANGES))
@pytest.mark.parametrize("name", list(CASES))
@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_non_reduced_component_is_never_silent(name, change, seed):
    equations, unknowns, hidden = CASES[name]
    equations = _changed(equations, CHANGES[change])
    assert _reference_has_multiple_factor(equations[0], unknowns)
    locus = singular_locus(parse_system(equations, unknowns), SingularOptions(), seed=seed)
    warnings = completeness_warnings(singular_to_dict(locus, SingularOptions()))
    flagged = bool(locus.discarded.get("non_reduced_inside_unsearched"))
    if hidden:  # nothing lists those points: the run must say it did not search them
        assert flagged and any("non-reduced component" in w for w in warnings), (locus.components, warnings)
    else:
        assert not flagged, warnings
