"""The non-reduced sampling decides "full rank next to a sample" in double precision (decision 0117).

At a singular point the checker samples nearby points of X and asks whether J's rank drops within 1e-3 of the
sampling radius of every one (then X is non-reduced there). "No" is now decided in double where J has clearly full
rank on that whole ball around a sample; a sample left by Newton slightly off a non-reduced component is not
clear (its c-th singular value is at most sqrt(residual)) and goes to mpmath as before.

The reference is sympy (Meurer et al., "SymPy: symbolic computing in Python", PeerJ Computer Science, 2017): F and
its gradient vanish at the point, and the squarefree part of F (sympy's factorisation) is singular there too
(a reduced singular point: a node) or not (a point of a multiple factor only: non-reduced). That a multiple factor
makes the Jacobian vanish along its component is common practice, no source.
"""

import numpy as np
import pytest
import sympy

from numag.singular import smoothness
from numag.singular.smoothness import CheckOptions, check_points
from numag.system.parse import parse_constant, parse_system

X, Y = sympy.symbols("x y")
U, V = sympy.symbols("u v")
#: name -> (equation in x, y, the point, its kind); numbers: common practice, no source
CASES = {
    "node": (Y ** 2 - X ** 2 * (X + 1), (0, 0), "singular"),
    "doubled line and a line": (X ** 2 * (Y - 1), (0, 5), "non-reduced"),
    "tripled line and a line": (X ** 3 * (Y - 1), (0, 5), "non-reduced"),
    "tripled slanted line and a circle": ((X - 3 * Y + 1) ** 3 * (X ** 2 + Y ** 2 - 4), (2, 1), "non-reduced"),
    "fourfold slanted line and a circle": ((X - 3 * Y + 1) ** 4 * (X ** 2 + Y ** 2 - 4), (2, 1), "non-reduced"),
    "tripled line far out": ((X - 1234) ** 3 * (Y + 2345), (1234, 5), "non-reduced"),
    "doubled slanted line and a cubic": ((X - Y) ** 2 * (Y ** 2 - X ** 2 * (X + 1) - 7), (1, 1), "non-reduced"),
}
#: the node 1e4 from the origin in units 1000 times smaller: x = (u - 10^4) / 1000, y = (v + 10^4) / 1000
FAR = {X: (U - 10 ** 4) / sympy.Integer(1000), Y: (V + 10 ** 4) / sympy.Integer(1000)}


def sympy_kind(equation, point):
    """"singular" when the squarefree part is singular at the point, "non-reduced" when only F's gradient vanishes
    there, "smooth" otherwise (the point is on F = 0)."""
    at = dict(zip((X, Y), point))
    assert equation.subs(at) == 0
    squarefree = sympy.Mul(*[f for f, _ in sympy.factor_list(equation)[1]])
    if any(sympy.diff(squarefree, v).subs(at) != 0 for v in (X, Y)):
        return "non-reduced" if any(sympy.diff(equation, v).subs(at) == 0 for v in (X, Y)) else "smooth"
    return "singular"


def system_of(equation, variables):
    return parse_system([str(sympy.expand(equation)).replace("**", "^")], [str(v) for v in variables])


@pytest.fixture
def mpmath_runs(monkeypatch):
    """The sampling test's runs in mpmath, one per singular point double precision left open (all checkers)."""
    runs = []
    original = smoothness._Checker._rank_drops_at_samples_mp
    monkeypatch.setattr(smoothness._Checker, "_rank_drops_at_samples_mp",
                        lambda self, *args: runs.append(1) or original(self, *args))
    return runs


def test_the_reference_kinds():
    for name, (equation, point, kind) in CASES.items():
        assert sympy_kind(equation, point) == kind, name


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_node_is_judged_without_mpmath_sampling(seed, mpmath_runs):
    equation, point, kind = CASES["node"]
    report = check_points(system_of(equation, (X, Y)), [point], seed=seed)
    assert [v.verdict for v in report.points] == [kind]
    assert not mpmath_runs  # full rank next to the samples, decided in double


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_far_node_in_other_units_is_judged_without_mpmath_sampling(seed, mpmath_runs):
    equation, point, kind = CASES["node"]
    moved = sympy.expand(equation.subs(FAR, simultaneous=True) * 10 ** 9)  # integer coefficients
    far_point = [parse_constant(str(10 ** 4 + 1000 * point[0])), parse_constant(str(-10 ** 4 + 1000 * point[1]))]
    assert moved.subs({U: 10 ** 4, V: -10 ** 4}) == 0
    report = check_points(system_of(moved, (U, V)), [far_point], seed=seed)
    assert [v.verdict for v in report.points] == [kind]
    assert not mpmath_runs


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("name", [name for name, case in CASES.items() if case[2] == "non-reduced"])
def test_non_reduced_points_stay_non_reduced(seed, name, monkeypatch):
    # the rank drops at every sample: the double-precision full-rank test must not call any of them clear, and
    # the verdicts are those of the sampling in mpmath alone (the test switched off). The tripled lines were
    # "singular" before their samples were polished (samples 5e-5 off them; decision 0117)
    equation, point, kind = CASES[name]
    system = system_of(equation, (X, Y))
    assert check_points(system, [point], seed=seed).points[0].verdict == kind
    clear = []
    original = smoothness._Checker.full_rank_around
    monkeypatch.setattr(smoothness._Checker, "full_rank_around",
                        lambda self, *args: clear.append(original(self, *args)) or clear[-1])
    check_points(system, [point], seed=seed)
    assert clear and not any(np.any(c) for c in clear)
    monkeypatch.setattr(smoothness._Checker, "full_rank_around",
                        lambda self, samples, codim, reach: np.zeros(len(samples), dtype=bool))
    assert check_points(system, [point], seed=seed).points[0].verdict == kind


def test_what_makes_a_sample_clear():
    # y^2 = x^2 (x + 1): a point of a branch 0.01 from the node has full rank on a ball of radius 1e-5 around it,
    # not on one of radius 0.01 (which reaches the node); x^2 (y - 1): a point 1e-6 off the doubled line has
    # residual 1e-12 and c-th singular value about 1e-6 = sqrt(residual), which the test does not take for full
    # rank even on a ball of radius 1e-9 (common practice, no source)
    node = smoothness._Checker(parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"]), CheckOptions(), None)
    sample = np.array([[0.01, 0.01 * np.sqrt(1.01)]])
    assert node.full_rank_around(sample, 1, np.array([1e-5]))[0]
    assert not node.full_rank_around(sample, 1, np.array([1e-2]))[0]
    doubled = smoothness._Checker(parse_system(["x^2*(y - 1)"], ["x", "y"]), CheckOptions(), None)
    near = np.array([[1e-6, 5.0]])
    assert not doubled.full_rank_around(near, 1, np.array([1e-9]))[0]
