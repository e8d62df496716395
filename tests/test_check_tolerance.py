"""`check --point-tolerance`: the user's tolerance in the user's units, and verdicts that agree with their notes
(decision 0120).

A cusp given to 6 digits next to an irrational point: the nearest points of X on the side where the real curve has
none are complex, and the verdict was "off" with the note "reached a point of X at distance 0". A node 1e-4 away in
the user's units (4 times the tolerance) was taken as within 1e-5 because y is scaled by 10 in the balanced units.
References: sympy (A. Meurer et al., "SymPy: symbolic computing in Python", PeerJ Computer Science, 2017) for the
exact singular points and distances; the cusp and node normal forms: common practice, no source.
"""

import io
import json

import pytest
import sympy

import numag.singular.smoothness as smoothness
from numag.app.cli import EXIT_OK, EXIT_UNDECIDED, main

SEEDS = (1, 2, 3)
X, Y = sympy.symbols("x y")
#: (y - b)^2 - (x - a)^3 at irrational-looking centres, the point given rounded to 6 significant digits
CUSPS = {"sqrt": ("sqrt(2)", "-sqrt(3)", sympy.sqrt(2), -sympy.sqrt(3)),
         "far": ("1234 + sqrt(2)", "-2345 + sqrt(3)", 1234 + sympy.sqrt(2), -2345 + sympy.sqrt(3)),
         "both positive": ("sqrt(2)", "sqrt(3)", sympy.sqrt(2), sympy.sqrt(3))}


def _run(tmp_path, equation, point, seed, tolerance="1e-5"):
    path = tmp_path / "system.toml"
    path.write_text(f'variables = ["x", "y"]\nequations = ["{equation}"]\n')
    out = io.StringIO()
    code = main(["check", str(path), "--point", point, "--point-tolerance", tolerance, "--json", "--seed", str(seed)],
                out=out)
    return code, json.loads(out.getvalue())["points"][0]


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("name", list(CUSPS))
def test_a_cusp_given_to_six_digits_is_judged_singular(tmp_path, name, seed):
    a_text, b_text, a, b = CUSPS[name]
    f = (Y - b) ** 2 - (X - a) ** 3
    # sympy: (a, b) is singular, and the 6-digit point is within the tolerance of it (relative to its size)
    assert all(sympy.simplify(e.subs({X: a, Y: b})) == 0 for e in (f, f.diff(X), f.diff(Y)))
    given = (sympy.Float(sympy.N(a, 6), 6), sympy.Float(sympy.N(b, 6), 6))
    distance = sympy.sqrt((given[0] - a) ** 2 + (given[1] - b) ** 2)
    size = sympy.sqrt(1 + given[0] ** 2 + given[1] ** 2)
    assert sympy.N(distance) < sympy.Rational(1, 2) * 1e-5 * sympy.N(size)
    code, verdict = _run(tmp_path, f"(y - ({b_text}))^2 - (x - ({a_text}))^3",
                         f"x={sympy.N(a, 6)},y={sympy.N(b, 6)}", seed)
    assert verdict["verdict"] == "singular", verdict["notes"]
    assert code == EXIT_OK
    assert not any("beyond the point tolerance" in note for note in verdict["notes"])


@pytest.mark.parametrize("seed", SEEDS)
def test_the_point_tolerance_is_in_the_users_units(tmp_path, seed):
    # a node at (1, 2) whose y is scaled by 10; the point (1.0001, 2) is 1e-4 from it (sympy), beyond 1e-5 times
    # the point's size, and 1e-5 from a smooth point of X within it: smooth there, not the node
    f = (X - 1) ** 2 - (10 * (Y - 2)) ** 2 + (X - 1) ** 3
    assert all(e.subs({X: 1, Y: 2}) == 0 for e in (f, f.diff(X), f.diff(Y)))
    given = (sympy.Rational(10001, 10000), 2)
    tolerance = 1e-5 * sympy.N(sympy.sqrt(1 + given[0] ** 2 + given[1] ** 2))
    assert sympy.N(sympy.sqrt((given[0] - 1) ** 2)) > 3 * tolerance
    smooth = sympy.nsolve(f.subs(X, given[0]), Y, 2 + sympy.Rational(1, 10 ** 5))
    assert abs(smooth - 2) < tolerance / 2
    code, verdict = _run(tmp_path, "(x - 1)^2 - (10*(y - 2))^2 + (x - 1)^3", "x=1.0001,y=2", seed)
    assert verdict["verdict"] == "smooth", verdict["notes"]
    assert verdict["distance"] <= tolerance


def test_no_point_of_x_reached_is_undecided_not_off(tmp_path, monkeypatch):
    # as when Newton in extended precision reaches no point of X from a point double cannot tell from X: the
    # verdict says undecided, and its note does not claim a point of X was reached (common practice, no source)
    def nowhere(self, start, goal=None):
        return smoothness.np.array([complex(smoothness.mpmath.mpmathify(v.to_context(smoothness.mpmath.mp)))
                                    if hasattr(v, "to_context") else complex(v) for v in start]), False

    monkeypatch.setattr(smoothness._Checker, "nearest_on_x", nowhere)
    code, verdict = _run(tmp_path, "(y + sqrt(3))^2 - (x - sqrt(2))^3", "x=1.41421,y=-1.73205", 1)
    assert verdict["verdict"] == "undecided"
    assert code == EXIT_UNDECIDED
    assert not any("reached a point of X" in note for note in verdict["notes"])


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("written", ("exact", "decimal"))
@pytest.mark.parametrize("scale", (1, 1000))
def test_newton_sliding_to_a_node_is_not_the_nearest_point(tmp_path, seed, written, scale):
    # decision 0141: from (t, 0), between the branches of the node y^2 = x^2 (x + 1), Gauss-Newton converges to the
    # node (distance t, twice its first step); the nearest points of X are smooth, about t / sqrt(2) away. With the
    # tolerance between the two the verdict is about a smooth point within it; it was "off" (exit 3). References:
    # sympy (A. Meurer et al., "SymPy: symbolic computing in Python", PeerJ Computer Science, 2017) for the nearest
    # point by Lagrange multipliers; the node's normal form: common practice, no source.
    t = sympy.Rational(scale, 100)
    f = (Y / scale) ** 2 - (X / scale) ** 2 * (X / scale + 1)
    lam = sympy.Symbol("lam")
    lagrange = [2 * (X - t) - lam * f.diff(X), 2 * Y - lam * f.diff(Y), f]
    near = sympy.nsolve(lagrange, (X, Y, lam), (t / 2, t / 2, 1), prec=30)
    d = sympy.sqrt((near[0] - t) ** 2 + near[1] ** 2)
    assert sympy.N(f.diff(Y).subs({X: near[0], Y: near[1]})) != 0 and d < 0.75 * t  # smooth, nearer than the node
    size = sympy.sqrt(1 + t ** 2)
    tolerance = float((d + t) / 2 / size)
    point = f"x={t},y=0" if written == "exact" else f"x={sympy.N(t, 20)},y=0.0"
    code, verdict = _run(tmp_path, f"(y/{scale})^2 - (x/{scale})^2*(x/{scale} + 1)", point, seed,
                         tolerance=f"{tolerance:.6g}")
    assert verdict["verdict"] == "smooth", verdict["notes"]
    assert code == EXIT_OK
    assert verdict["distance"] <= tolerance * float(size)
