"""A real singular line is shown with a real sample point; a non-real one keeps its non-real point (decision 0155).

Whitney's umbrella y^2 = z^2 x is singular exactly along the x-axis (common practice, no source; checked below
with sympy: the Groebner basis of F and its partials has radical (y, z)). Here it is given after a rational
linear change of the unknowns and in other units, so that the singular line is a real line in no coordinate
direction. (x^2 + y^2)^2 = z^2 is singular along the two conjugate lines x = +-i y, z = 0 (sympy below): no real
point but the origin, so their sample points stay non-real.
"""

import numpy as np
import pytest
import sympy

from conftest import run_singular_json

U, V, W = sympy.symbols("u v w")
# x = 1000 u + 2 v - w + 3, y = u - v / 1000 + 2 w, z = 3 u + w / 1000 - 1: a change of units and coordinates
CHANGE = {"x": 1000 * U + 2 * V - W + 3, "y": U - V / 1000 + 2 * W, "z": 3 * U + W / 1000 - 1}
UMBRELLA = sympy.expand(CHANGE["y"] ** 2 - CHANGE["z"] ** 2 * CHANGE["x"])
CONJUGATE = "(u^2 + v^2)^2 - w^2"


def sympy_singular_ideal(polynomial):
    return sympy.groebner([polynomial] + [sympy.diff(polynomial, s) for s in (U, V, W)], U, V, W, order="lex")


def test_reference_singular_sets():
    # on the umbrella's singular set y = z = 0 (in the new unknowns) and x free: every basis element vanishes there,
    # and y^2, z^2 lie in the ideal (so its radical is (y, z))
    basis = sympy_singular_ideal(UMBRELLA)
    assert basis.contains(sympy.expand(CHANGE["y"] ** 2)) and basis.contains(sympy.expand(CHANGE["z"] ** 2))
    conjugate = sympy_singular_ideal(sympy.sympify(CONJUGATE.replace("^", "**")))
    assert conjugate.contains(W) and conjugate.contains(sympy.expand((U**2 + V**2) ** 2))


def run(tmp_path, equation, seed):
    code, data = run_singular_json(tmp_path, ["u", "v", "w"], [equation], seed)
    return code, [c for c in data["components"] if c["dimension"] == 1]


def decoded(point):
    return np.array([complex(*c) for c in point])


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_the_umbrellas_line_has_a_real_point(tmp_path, seed):
    code, lines = run(tmp_path, str(UMBRELLA).replace("**", "^"), seed)
    assert code == 0 and len(lines) == 1 and lines[0]["kind"] == "singular"
    (point,) = [decoded(p) for p in lines[0]["points"]]
    assert lines[0]["real"] == [True] and np.all(np.abs(point.imag) <= 1e-12 * (1 + np.abs(point)))
    u, v, w = point.real
    y, z = (float(CHANGE[name].subs({U: u, V: v, W: w})) for name in ("y", "z"))
    assert abs(y) <= 1e-8 * (1 + abs(u)) and abs(z) <= 1e-6 * (1 + abs(u))  # on the singular line


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_conjugate_lines_keep_their_non_real_points(tmp_path, seed):
    code, lines = run(tmp_path, CONJUGATE, seed)
    assert code == 0 and len(lines) == 2
    for line in lines:
        (point,) = [decoded(p) for p in line["points"]]
        assert line["real"] == [False]
        assert abs(point[0] ** 2 + point[1] ** 2) <= 1e-8 * (1 + np.abs(point[:2]).max() ** 2) and abs(point[2]) <= 1e-8
