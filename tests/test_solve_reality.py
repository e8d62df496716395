"""The reality of multiple roots in `solve`: decided at the root's own accuracy (decision 0120).

A root of multiplicity m is known only to about the m-th root of its residual, so its imaginary part is judged
against that, not against the 1e-8 of a simple root; in between "clearly zero" and "clearly nonzero" the reality
is undecided (JSON null, a warning, exit 3). References: sympy's roots with multiplicities (A. Meurer et al.,
"SymPy: symbolic computing in Python", PeerJ Computer Science, 2017). The rule itself: common practice, no source.
"""

import json

import numpy as np
import pytest
import sympy

from numag.app.report import completeness_warnings, solve_report_from_dict, solve_report_to_dict
from numag.numeric.cluster import reality, root_accuracy
from numag.system.parse import parse_system
from numag.tracking.solve import SolveOptions, solve_system

X, Y, Z = sympy.symbols("x y z")
#: y - x^2, z - x y, z - 3x^2 + 3x - 1: the twisted cubic met by a cubic surface at (1, 1, 1) three times
TRIPLE = [Y - X**2, Z - X * Y, Z - 3 * X**2 + 3 * X - 1]
#: (scale, shift) of x, y, z: the user's x is u / scale + shift (u the coordinate above)
FRAMES = {"plain": (1, (0, 0, 0)), "units x1000": (sympy.Rational(1, 1000), (0, 0, 0)),
          "far": (1, (1234, -2345, 777))}


def _moved(equations, scale, shift):
    """The equations in the user's coordinates x = u / scale + shift (exactly)."""
    substitution = {v: (v - s) * sympy.Integer(1) / scale for v, s in zip((X, Y, Z), shift)}
    return [sympy.expand(e.subs(substitution, simultaneous=True)) for e in equations]


def _exact_roots(equations):
    """sympy's roots of the eliminated x-polynomial, with multiplicities, and the point of each."""
    basis = sympy.groebner(equations, Z, Y, X, order="lex")
    univariate = [g for g in basis.exprs if g.free_symbols <= {X}]
    return sympy.roots(sympy.Poly(univariate[0], X))


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("frame", list(FRAMES))
def test_a_real_triple_root_is_real(frame, seed):
    scale, shift = FRAMES[frame]
    equations = _moved(TRIPLE, scale, shift)
    roots = _exact_roots(equations)
    assert list(roots.values()) == [3]  # sympy: one root of multiplicity 3, real
    (x_root,) = roots
    assert x_root.is_real
    result = solve_system(parse_system([str(e).replace("**", "^") for e in equations], ["x", "y", "z"]), seed=seed)
    assert [s.multiplicity for s in result.solutions] == [3]
    (solution,) = result.solutions
    assert abs(solution.point[0] - complex(x_root)) <= 1e-4 * (1 + abs(complex(x_root)))
    assert solution.real is True
    assert not completeness_warnings(solve_report_to_dict(result, SolveOptions()))


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_complex_triple_root_is_complex(seed):
    # (x^2 + 1)^3 = 0 through y: y - x^2 - 1, y^3; sympy: x = +-i, each of multiplicity 3
    roots = sympy.roots(sympy.Poly((X**2 + 1) ** 3, X))
    assert roots == {sympy.I: 3, -sympy.I: 3}
    result = solve_system(parse_system(["y - x^2 - 1", "y^3"], ["x", "y"]), seed=seed)
    found = sorted((s.multiplicity, round(s.point[0].imag)) for s in result.solutions)
    assert found == [(3, -1), (3, 1)]
    assert [s.real for s in result.solutions] == [False, False]


def test_the_accuracy_of_a_multiple_root_is_its_residuals_mth_root():
    # (x - 1)^3 at x = 1 + d: residual d^3, so a point 1e-6 off is known to about 1e-6 (times the local constant)
    # and 1e-6 i is no clear imaginary part there; a simple root at that residual is known to 1e-8 and is complex
    d = 1e-6
    accuracy = root_accuracy(d**3, 3)
    assert d <= accuracy <= 1e3 * d
    assert reality(np.array([1 + 1j * d]), accuracy) is True
    assert reality(np.array([1 + 1j * d]), root_accuracy(d**3, 1)) is None or \
        reality(np.array([1 + 1j * d]), root_accuracy(d**3, 1)) is False
    assert reality(np.array([1 + 0.5j]), accuracy) is False
    # beyond the accuracy but not clearly: undecided
    assert reality(np.array([1 + 10j * accuracy]), accuracy) is None


def test_undecided_reality_is_null_in_json_and_warned():
    result = solve_system(parse_system(["y - x^2", "z - x*y", "z - 3*x^2 + 3*x - 1"], ["x", "y", "z"]), seed=1)
    result.solutions[0].real = None  # as the rule leaves a root whose imaginary part is not clearly anything
    data = json.loads(json.dumps(solve_report_to_dict(result, SolveOptions())))
    assert data["solutions"][0]["real"] is None
    assert any("undecided reality" in w for w in completeness_warnings(data))
    assert solve_report_from_dict(data)[0].solutions[0].real is None
