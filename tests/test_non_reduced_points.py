"""An isolated point of multiplicity > 1 is a non-reduced component of dimension 0, not a singular point; a local
dimension no component can have is refused (decision 0145).

The reference is sympy (Meurer et al., "SymPy: symbolic computing in Python", PeerJ Computer Science, 2017): the
point is the only zero near itself (a zero-dimensional Groebner basis) and the length of the local ring there,
its multiplicity, is > 1 (the standard monomials of a Groebner basis of the equations centred at the point, as
``tests/corpus.py`` counts them). That such a point is a non-reduced component whose reduced structure, a point,
is smooth, and that a regular zero (J of rank n) is one of multiplicity 1, is common practice, no source. Krull's
height theorem (m equations leave every component of codimension <= m; one nonzero equation: exactly 1) is from
memory (Eisenbud, "Commutative Algebra with a View Toward Algebraic Geometry", 1995, Theorem 10.2).
"""

import subprocess
import sys

import pytest
import sympy

from numag.errors import InputError
from numag.singular.kinds import PieceKind, Verdict
from numag.singular.locus import SingularOptions, singular_locus
from numag.singular.smoothness import CheckOptions, check_points
from numag.system.parse import parse_system
from numag.witness.decompose import decompose

from corpus import _nilpotent_point_length
from test_check_far import exact_text, system_of

X, Y, A, B = sympy.symbols("x y a b")

#: name -> (equations, variables, the fat point): common practice, no source. The changes: the point 1000 times
#: farther and nearer (units x 1e-3 and x 1000), and a rational linear change x = a + 2 b, y = 3 a - b.
CASES = {
    "double root": ([(X - 1) ** 2], (X,), (1,)),
    "double root, times 1000": ([(X - 1000) ** 2], (X,), (1000,)),
    "double root, times 1/1000": ([(X - sympy.Rational(1, 1000)) ** 2], (X,), (sympy.Rational(1, 1000),)),
    "triple root beside a simple one": ([(X - 1) ** 3 * (X - 3)], (X,), (1,)),
    "x^2 and y": ([X ** 2, Y], (X, Y), (0, 0)),
    "x^2 and y at (2000, 1000)": ([(X - 2000) ** 2, Y - 1000], (X, Y), (2000, 1000)),
    "x^2 and y at (1/500, 1/1000)": ([(X - sympy.Rational(1, 500)) ** 2, Y - sympy.Rational(1, 1000)], (X, Y),
                                     (sympy.Rational(1, 500), sympy.Rational(1, 1000))),
    "x^2 and y, linear change": ([(A + 2 * B) ** 2, 3 * A - B], (A, B), (0, 0)),
    "a double point beside two simple ones": ([Y - X ** 2, Y * (Y - 1)], (X, Y), (0, 0)),
}


def local_length(equations, variables, point):
    """sympy: the multiplicity of ``point`` as an isolated zero of the equations.

    The equations' zeros are finitely many (a zero-dimensional Groebner basis) and the point is one of them; the
    length of the local ring there is that of C[x]/(I + m^N) centred at the point for N above it (m^N lies in the
    local ideal once N >= the length, and adding it cuts off the other zeros): N = 6 exceeds every case here.
    """
    assert sympy.groebner([sympy.expand(e) for e in equations], *variables, order="grevlex").is_zero_dimensional
    assert all(e.subs(dict(zip(variables, point))) == 0 for e in equations)
    centred = [sympy.expand(e.subs({v: v + c for v, c in zip(variables, point)}, simultaneous=True))
               for e in equations]
    monomials = [sympy.Mul(*[v ** k for v, k in zip(variables, exps)]) for exps in _exponents(len(variables), 6)]
    length = _nilpotent_point_length(centred + monomials, variables)
    assert length is not None and length < 6
    return length


def _exponents(n, total):
    if n == 1:
        return [(total,)]
    return [(k,) + rest for k in range(total + 1) for rest in _exponents(n - 1, total - k)]


RUNS = [(name, seed) for name in CASES for seed in (1, 2, 3)]


@pytest.mark.parametrize("name, seed", RUNS)
def test_check_calls_a_fat_point_non_reduced(name, seed):
    equations, variables, point = CASES[name]
    assert local_length(equations, variables, point) > 1
    system = system_of([sympy.expand(e) for e in equations], variables)
    report = check_points(system, [exact_text(point)], seed=seed, decomposition=decompose(system, seed=seed))
    (verdict,) = report.points
    assert verdict.verdict is Verdict.NON_REDUCED, verdict.notes
    assert not any("next to this one" in note for note in verdict.notes)


@pytest.mark.parametrize("name, seed", RUNS)
def test_the_singular_locus_lists_a_fat_point_as_non_reduced(name, seed):
    equations, variables, point = CASES[name]
    assert local_length(equations, variables, point) > 1
    system = system_of([sympy.expand(e) for e in equations], variables)
    locus = singular_locus(system, SingularOptions(), seed=seed)
    pieces = [c for c in locus.components if not c.at_infinity]
    assert len(pieces) == 1, pieces  # the simple zeros (multiplicity 1, sympy above) are no pieces
    (piece,) = pieces
    assert (piece.dimension, piece.kind) == (0, PieceKind.NON_REDUCED)
    assert max(abs(complex(p) - complex(c)) for p, c in zip(piece.points[0], point)) <= 1e-6 * (
        1 + max(abs(complex(c)) for c in point))
    assert not locus.isolated()


@pytest.mark.parametrize("seed", (1, 2, 3))
def test_a_projective_double_point_is_non_reduced(seed):
    # x^2 y on P^1: (0 : 1) a double root, (1 : 0) a simple one (sympy's factor list)
    assert sorted(k for _, k in sympy.factor_list(X ** 2 * Y)[1]) == [1, 2]
    system = parse_system(["x^2*y"], ["x", "y"], projective=True)
    locus = singular_locus(system, SingularOptions(), seed=seed)
    assert [(c.dimension, c.kind) for c in locus.components] == [(0, PieceKind.NON_REDUCED)]
    point = locus.components[0].points[0]
    assert abs(point[0]) <= 1e-8 * abs(point[1])
    (verdict,) = check_points(system, [[0, 1]], seed=seed).points
    assert verdict.verdict is Verdict.NON_REDUCED


@pytest.mark.parametrize("seed", (1, 2, 3))
def test_positive_dimension_and_embedded_points_unchanged(seed):
    # controls, common practice, no source: the node of y^2 = x^2 (x + 1) is singular; every point of the double
    # line x^2 = 0 is non-reduced; (x^2, x y) has the embedded point (0, 0) on the line x = 0 (decision 0105)
    node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    assert check_points(node, [[0, 0]], seed=seed).points[0].verdict is Verdict.SINGULAR
    double = parse_system(["x^2"], ["x", "y"])
    verdicts = check_points(double, [[0, 0], [0, 3]], seed=seed, decomposition=decompose(double, seed=seed)).points
    assert [v.verdict for v in verdicts] == [Verdict.NON_REDUCED] * 2
    embedded = parse_system(["x^2", "x*y"], ["x", "y"])
    (verdict,) = check_points(embedded, [[0, 0]], seed=seed, decomposition=decompose(embedded, seed=seed)).points
    assert verdict.verdict is Verdict.EMBEDDED


def test_a_local_dimension_no_component_has_is_refused():
    # y^2 - x^2 (x + 1): one nonzero equation, every component of X has dimension 1 (Krull)
    node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    for wrong in (0, 2):
        with pytest.raises(InputError, match="local_dimension .*Krull|local_dimension .*open set"):
            check_points(node, [[0, 0]], CheckOptions(local_dimension=wrong), seed=1)
    assert check_points(node, [[0, 0]], CheckOptions(local_dimension=1), seed=1).points[0].verdict is Verdict.SINGULAR


def test_the_command_line_exits_2_on_an_impossible_local_dimension(tmp_path):
    path = tmp_path / "node.toml"
    path.write_text('variables = ["x","y"]\nequations = ["y^2 - x^2*(x+1)"]\n')
    run = subprocess.run([sys.executable, "-m", "numag", "check", str(path), "--point", "x=0,y=0",
                          "--local-dimension", "2", "--seed", "1"], capture_output=True, text=True)
    assert run.returncode == 2 and "--local-dimension" in run.stderr, run.stderr


@pytest.mark.parametrize("seed", (1, 2, 3))
def test_a_given_dimension_0_is_checked_against_nearby_points(seed):
    # (x y, x y): the two axes (sympy's Groebner basis is not zero-dimensional), so local dimension 0 at their
    # node is wrong: undecided, never "non-reduced"; (x^2, y) with it given: the fat point, non-reduced
    assert not sympy.groebner([X * Y, X * Y], X, Y).is_zero_dimensional
    axes = parse_system(["x*y", "x*y"], ["x", "y"])
    (verdict,) = check_points(axes, [[0, 0]], CheckOptions(local_dimension=0), seed=seed).points
    assert verdict.verdict is Verdict.UNDECIDED
    fat = parse_system(["x^2", "y"], ["x", "y"])
    (verdict,) = check_points(fat, [[0, 0]], CheckOptions(local_dimension=0), seed=seed).points
    assert verdict.verdict is Verdict.NON_REDUCED


@pytest.mark.parametrize("seed", (1, 2, 3))
def test_the_kind_survives_the_json_and_the_plot_marks_it(tmp_path, seed):
    # (x^2, y): the fat origin (sympy length 2, above) is non-reduced in the saved report, after reloading it,
    # and in the picture's marked points
    from numag.app.plot import _marked_points
    from numag.app.report import singular_to_dict
    from numag.app.saved import load, save
    equations, variables, point = CASES["x^2 and y"]
    assert local_length(equations, variables, point) == 2
    system = system_of(equations, variables)
    locus = singular_locus(system, SingularOptions(), seed=seed)
    path = tmp_path / "locus.json"
    save(locus, path)
    assert [c.kind for c in load(path).components] == [PieceKind.NON_REDUCED]
    data = singular_to_dict(locus, SingularOptions())
    assert [c["kind"] for c in data["components"]] == ["non-reduced"]
    assert [kind for _, kind, _ in _marked_points(data, 2, [])] == ["non-reduced point"]
