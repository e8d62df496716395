"""Curve anatomy far from the origin: a value is stated only where it is decided (decision 0120).

D5 and J10 moved to (1234, -2345) and read at the exact point and at a point 3e-13 (relative) off it, as a
computed singular point is: the type, mu, tau, multiplicity and branches are each either right or undecided (null
in JSON, "undecided" in the text), never a wrong number beside a doubt flag. References: the types from Arnold's
normal forms (V. I. Arnold, "Normal forms of functions near degenerate critical points, the Weyl groups A_k, D_k,
E_k and Lagrangian singularities", 1972; "Normal forms of functions near degenerate critical points", 1974: J10 =
y^3 + a x^4 y + x^6 is not simple); Milnor numbers as sympy's Groebner dimension of the Jacobian ideal (A. Meurer
et al., "SymPy: symbolic computing in Python", PeerJ Computer Science, 2017); multiplicities and branches of the
normal forms: common practice, no source (y = t x^2 with t a root of the cubic in t below).
"""

import io
import json

import numpy as np
import pytest
import sympy

from numag.anatomy.records import Family, PointAnatomy
from numag.anatomy.survey import point_anatomy
from numag.app.anatomy_text import write_point_anatomy
from numag.system.parse import parse_system

X, Y = sympy.symbols("x y")
CENTRE = (1234, -2345)
#: name -> (normal form, Arnold's label, multiplicity, branch multiplicities)
FORMS = {
    "D5": (X**2 * Y + Y**4, "D5", 3, [1, 2]),                   # y (x^2 + y^3): a line and a cusp
    "J10": (Y**3 + X**6, "not simple", 3, [1, 1, 1]),           # y = t x^2, t^3 = -1: three smooth branches
    "J10 with x^4 y": (Y**3 - X**6 + X**4 * Y, "not simple", 3, [1, 1, 1]),  # t^3 + t - 1: three distinct roots
}


def _milnor(form):
    """dim C[x, y] / (f_x, f_y) by sympy's Groebner basis (the origin is the only critical point of these forms)."""
    basis = sympy.groebner([form.diff(X), form.diff(Y)], X, Y, order="grevlex")
    leading = [sympy.Poly(g, X, Y).monoms(order="grevlex")[0] for g in basis.exprs]
    return sum(1 for i in range(20) for j in range(20)
               if not any(i >= a and j >= b for a, b in leading))


def _text(form):
    shifted = form.subs({X: X - CENTRE[0], Y: Y - CENTRE[1]}, simultaneous=True)
    return str(sympy.expand(shifted)).replace("**", "^")


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("offset", [0.0, 3e-13])
@pytest.mark.parametrize("name", list(FORMS))
def test_no_wrong_value_beside_a_doubt(name, offset, seed):
    form, label, multiplicity, branches = FORMS[name]
    mu = _milnor(form)
    assert mu == {"D5": 5}.get(name, 10)  # Arnold: D5 has mu 5, J10 mu 10
    system = parse_system([_text(form)], ["x", "y"])
    point = [CENTRE[0] * (1 + offset), CENTRE[1] * (1 - offset)]
    anatomy = point_anatomy(system, point, seed=seed)
    h = anatomy.hypersurface
    assert h.type.family is Family.UNDECIDED or h.type.label == label
    assert h.milnor is None or h.milnor == mu
    assert h.tjurina is None or h.tjurina == mu  # quasi-homogeneous (Saito 1971): tau = mu
    assert anatomy.multiplicity is None or anatomy.multiplicity == multiplicity
    assert anatomy.branches is None or sorted(b.multiplicity for b in anatomy.branches) == branches
    if h.type.family is Family.UNDECIDED:
        assert anatomy.incomplete
        data = json.loads(json.dumps(anatomy.to_dict()))
        assert data["hypersurface"]["milnor"] is None and data["hypersurface"]["tjurina"] is None
        assert data["branches"] is None and data["real_branches"] is None
        out = io.StringIO()
        write_point_anatomy(PointAnatomy.from_dict(data), ["x", "y"], out)
        text = out.getvalue()
        assert "Milnor number undecided" in text and "Tjurina number undecided" in text
        assert not any(line.strip().startswith(("1 branch", "2 branches", "3 branches")) for line in text.splitlines())
    else:
        assert np.allclose(anatomy.point, CENTRE, rtol=1e-9)
