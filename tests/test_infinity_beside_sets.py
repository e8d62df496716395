"""An isolated singular point at infinity is listed beside a singular set that reaches infinity (decision 0156).

(p - 2)(x^2 + y^2 - 1), (p^2 - 2)(x^2 + y^2 - 1) and (p^2 - 2)(x^2 + y^2) - 1 in (p, x, y): the closure of each
is singular at the vertex (w : p : x : y) = (0 : 1 : 0 : 0) at infinity of its cylinder or cone (every partial of
the homogenised polynomial vanishes there: checked with sympy below). The first two are singular along circles too,
whose closures reach infinity at (0 : 0 : 1 : +-i), away from the vertex (by hand: p = 2 w or p^2 = 2 w^2 with
w = 0 gives p = 0); the last two have singular sets inside the hyperplane at infinity (p = 0, w = 0 and
x^2 + y^2 = 0, w = 0). Before, any such set made numag list no point at infinity at all: exit 0, the vertex missing.
"""

import numpy as np
import pytest
import sympy

from conftest import run_singular_json

W, P, X, Y = sympy.symbols("w p x y")
SURFACES = {
    "plane and cylinder": (P - 2 * W) * (X**2 + Y**2 - W**2),
    "two planes and cylinder": (P**2 - 2 * W**2) * (X**2 + Y**2 - W**2),
    "cone over a quartic": (P**2 - 2 * W**2) * (X**2 + Y**2) - W**4,
}
TEXT = {"plane and cylinder": "(p - 2)*(x^2 + y^2 - 1)", "two planes and cylinder": "(p^2 - 2)*(x^2 + y^2 - 1)",
        "cone over a quartic": "(p^2 - 2)*(x^2 + y^2) - 1"}


@pytest.mark.parametrize("name", sorted(SURFACES))
def test_reference_the_vertex_is_singular(name):
    homogeneous = SURFACES[name]
    vertex = {W: 0, P: 1, X: 0, Y: 0}
    assert homogeneous.subs(vertex) == 0
    assert all(sympy.diff(homogeneous, s).subs(vertex) == 0 for s in (W, P, X, Y))


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("name", sorted(SURFACES))
def test_the_vertex_at_infinity_is_listed(tmp_path, name, seed):
    code, data = run_singular_json(tmp_path, ["p", "x", "y"], [TEXT[name]], seed)
    at_infinity = [np.array([complex(*c) for c in piece["points"][0]]) for piece in data["components"]
                   if piece["at_infinity"]]
    vertex = np.array([0, 1, 0, 0])
    assert any(np.linalg.norm(point / point[1] - vertex) <= 1e-8 for point in at_infinity if abs(point[1]) > 0.5)
    assert code == 0 or data["warnings"]
