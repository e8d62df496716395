"""`numag singular` on systems whose Jacobian and deflation minors are large: no refusal, the right answer.

Swallowtail: the discriminant of t^4 + a t^2 + b t + c, a surface in (a, b, c). Its singular locus is the
cuspidal edge (quartics with a triple root, (t - r)^3 (t + 3r): a = -6r^2, b = 8r^3, c = -3r^4, a rational
curve of degree 4) and the self-intersection curve (two double roots, (t^2 - s^2)^2: b = 0, c = a^2 / 4, a
parabola) (from memory; both are checked with sympy below).
"""

import contextlib
import io
import json

import numpy as np
import pytest

from numag.app.report import decode_point

sympy = pytest.importorskip("sympy")

SWALLOWTAIL = "16*a^4*c - 4*a^3*b^2 - 128*a^2*c^2 + 144*a*b^2*c - 27*b^4 + 256*c^3"


def _sympy_swallowtail():
    """The discriminant by sympy (reference only), and the two curves checked to be singular on it."""
    t, a, b, c, r, s = sympy.symbols("t a b c r s")
    disc = sympy.discriminant(t**4 + a * t**2 + b * t + c, t)
    grad = [disc] + [sympy.diff(disc, v) for v in (a, b, c)]
    edge = {a: -6 * r**2, b: 8 * r**3, c: -3 * r**4}
    crossing = {a: -2 * s**2, b: 0, c: s**4}
    assert all(sympy.expand(g.subs(edge, simultaneous=True)) == 0 for g in grad)
    assert all(sympy.expand(g.subs(crossing, simultaneous=True)) == 0 for g in grad)
    return disc, (a, b, c)


def _run_singular(tmp_path, equation, variables, seed):
    from numag.app.cli import main
    path = tmp_path / "system.toml"
    path.write_text(f"variables = {json.dumps(variables)}\nequations = [{json.dumps(equation)}]\n")
    out = io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(io.StringIO()):
        code = main(["singular", str(path), "--seed", str(seed), "--json", "--workers", "1"])
    return code, json.loads(out.getvalue())


@pytest.mark.parametrize("seed", [1, 2])
def test_swallowtail_cuspidal_edge_and_self_intersection(tmp_path, seed):
    disc, symbols = _sympy_swallowtail()
    # our input is sympy's discriminant, written out by hand above; check it is the same polynomial
    a, b, c = symbols
    assert sympy.expand(disc - (16 * a**4 * c - 4 * a**3 * b**2 - 128 * a**2 * c**2 + 144 * a * b**2 * c
                                - 27 * b**4 + 256 * c**3)) == 0
    code, report = _run_singular(tmp_path, SWALLOWTAIL, ["a", "b", "c"], seed)
    assert code != 2  # never a refusal
    # the partials hold the line a = b = 0 three times; regenerated on deflated equations, no path fails there
    assert report["paths"]["failed"] == 0
    pieces = [p for p in report["components"] if not p["at_infinity"] and p["dimension"] == 1]
    assert sorted(p["degree"] for p in pieces) == [2, 4]
    assert not [p for p in report["components"] if not p["at_infinity"] and p["dimension"] == 0]
    for piece in pieces:
        points = np.array([decode_point(p) for p in piece["points"]], dtype=complex)
        assert len(points) == piece["degree"]
        a_, b_, c_ = points.T
        if piece["degree"] == 2:  # the parabola b = 0, 4c = a^2
            assert np.allclose(b_, 0, atol=1e-7) and np.allclose(4 * c_, a_**2, atol=1e-7)
        else:  # the cuspidal edge: r = -3b / (4a) reproduces (a, b, c)
            r = -3 * b_ / (4 * a_)
            assert np.allclose(np.column_stack([-6 * r**2, 8 * r**3, -3 * r**4]), points, atol=1e-6)
