"""A projective hypersurface singular along a curve, with the default formulation.

The gradient system finds isolated zeros only; when its zeros are not isolated the default formulation now takes
the chart route with minors instead of stopping with "use the minors formulation" (exit 2). Asked for by name,
the gradient formulation still says why it cannot serve.

Reference (common practice, no source; by hand): the closure of Whitney's umbrella x^2 w - y^2 z has partials
2 x w, -2 y z, -y^2, x^2, which vanish together exactly on the line x = y = 0; sympy evaluates f and its partials
at the reported points.
"""

import numpy as np
import pytest
import sympy

from numag.errors import InputError
from numag.singular.kinds import Formulation, PieceKind
from numag.singular.locus import SingularOptions, singular_locus
from numag.system.parse import parse_system

UNKNOWNS = ["x", "y", "z", "w"]
UMBRELLA = "x^2*w - y^2*z"
# an integer change of the homogeneous coordinates (invertible: determinant 1)
CHANGE = {"x": "(x + w)", "y": "(y - 2*z)", "z": "(z + x)", "w": "w"}


def _changed(equation):
    marked = equation
    for name in UNKNOWNS:
        marked = marked.replace(name, name.upper())
    for name in UNKNOWNS:
        marked = marked.replace(name.upper(), CHANGE[name])
    return marked


def _vanishes_with_gradient(equation, point):
    symbols = sympy.symbols(UNKNOWNS)
    f = sympy.parse_expr(equation.replace("^", "**"), dict(zip(UNKNOWNS, symbols)))
    values = [f] + [sympy.diff(f, s) for s in symbols]
    at = dict(zip(symbols, [complex(c) for c in point / np.linalg.norm(point)]))
    return max(abs(complex(v.subs(at))) for v in values) <= 1e-8


@pytest.mark.parametrize("changed", [False, True])
@pytest.mark.parametrize("seed", [1, 2, 3])
def test_the_umbrellas_closure_is_singular_along_a_line(changed, seed):
    equation = _changed(UMBRELLA) if changed else UMBRELLA
    locus = singular_locus(parse_system([equation], UNKNOWNS, projective=True), SingularOptions(), seed=seed)
    pieces = [c for c in locus.components if c.kind is not PieceKind.UNDECIDED]
    assert [(c.dimension, c.degree, c.kind) for c in pieces] == [(1, 1, PieceKind.SINGULAR)], locus.components
    assert all(_vanishes_with_gradient(equation, p) for p in pieces[0].points)


def test_the_gradient_formulation_asked_by_name_says_why_not():
    with pytest.raises(InputError, match="positive-dimensional"):
        singular_locus(parse_system([UMBRELLA], UNKNOWNS, projective=True),
                       SingularOptions(formulation=Formulation.GRADIENT), seed=1)
