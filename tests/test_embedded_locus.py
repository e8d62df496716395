"""Embedded components of positive dimension: `singular` and `compare` on equations with embedded structure
(decision 0108).

{x^2, x y} in x, y, z cut out the plane x = 0, and their Jacobian drops rank all along the line x = y = 0:
(x^2, x y) = (x) cap (x^2, y), an embedded line (Cox, Little and O'Shea, "Ideals, Varieties, and Algorithms", 4th ed.
2015, chapter 4, section 8, for the embedded point of the same ideal in two unknowns). X is smooth there. numag lists
such a set apart as an embedded component (never a singular piece), and the exact reference saturates it away.

The reference is sympy (Meurer et al., "SymPy: symbolic computing in Python", PeerJ Computer Science, 2017). Each
case names a primary decomposition found by hand (common practice, no source), checked here with Groebner bases:
F = R cap Q (intersection by elimination), R = X's ideal (F in (R), r^k in (F), R prime or a reduced complete
intersection by hand) and V(Q) inside V(R); then the Jacobian criterion on R gives Sing(X) and V(F + minors) gives
the rank-drop set, whose dimensions and degrees are the expected answer.
"""

import itertools
import json

import numpy as np
import pytest
import sympy

from numag.app.compare import compare_answers
from numag.app.reference import exact_reference
from numag.app.report import completeness_warnings, dumps, singular_from_dict, singular_to_dict
from numag.singular.kinds import PieceKind
from numag.singular.locus import SingularOptions, singular_locus

from test_check_far import system_of

X, Y, Z, W = sympy.symbols("x y z w")

#: name -> (F, variables, R = X's ideal (by hand), Q = the embedded primary component (by hand), Sing(X) as
#: (dimension, degree) pieces, the embedded sets as (dimension, degree)). The equations are common practice, no source.
CASES = {
    "plane, embedded line": ([X ** 2, X * Y], (X, Y, Z), [X], [X ** 2, Y], [], [(1, 1)]),
    "plane, embedded point": ([X * Z, Y * Z, Z ** 2], (X, Y, Z), [Z], [X, Y, Z ** 2], [], [(0, 1)]),
    "hyperplane, embedded line": ([X ** 2, X * Y, X * Z], (X, Y, Z, W), [X], [X ** 2, Y, Z], [], [(1, 1)]),
    "plane, embedded parabola": ([Z ** 2, Z * (X - Y ** 2)], (X, Y, Z), [Z], [Z ** 2, X - Y ** 2], [], [(1, 2)]),
    # the cone x y = z^2 with an embedded line through its vertex: the minors vanish all along the line, so the
    # vertex (X's singular point) is no component of V(F + minors) of its own; numag must not call X smooth silently
    "cone, embedded line through the vertex": ([X * (X * Y - Z ** 2), Z * (X * Y - Z ** 2)], (X, Y, Z),
                                               [X * Y - Z ** 2], [X ** 2, X * Z, Z ** 2], [(0, 1)], [(1, 1)]),
}

#: the user's coordinates u with the model's m = M u: units 1000 times larger and smaller, a rational linear change
CHANGES = {
    "unit": lambda n: sympy.eye(n),
    "times 1000": lambda n: sympy.eye(n) / 1000,
    "times 1/1000": lambda n: sympy.eye(n) * 1000,
    "linear": lambda n: sympy.Matrix([[1, sympy.Rational(1, 2), 0, 0], [0, 1, sympy.Rational(1, 3), 0],
                                      [sympy.Rational(1, 5), 0, 1, 0], [0, 0, sympy.Rational(1, 7), 1]])[:n, :n],
}


def changed(name, change):
    """F, R, Q and the variables in the user's coordinates, with the expected pieces."""
    equations, variables, radical, embedded, singular, sets = CASES[name]
    n = len(variables)
    matrix = CHANGES[change](n)
    user = sympy.symbols("u v s t")[:n]
    substitution = dict(zip(variables, matrix * sympy.Matrix(user)))

    def moved(expressions):
        return [sympy.expand(e.subs(substitution, simultaneous=True)) for e in expressions]

    return moved(equations), moved(radical), moved(embedded), user, singular, sets


def _basis(ideal, variables):
    return sympy.groebner(ideal, *variables, order="grevlex")


def _intersection(first, second, variables):
    """Generators of (first) cap (second): (t first + (1 - t) second) without t (common practice, no source)."""
    t = sympy.Dummy("t")
    basis = sympy.groebner([t * f for f in first] + [(1 - t) * g for g in second], t, *variables, order="lex")
    return [g for g in basis.exprs if t not in g.free_symbols]


def _dimension(ideal, variables):
    """Dimension of V(ideal) from the leading monomials of a grevlex basis (largest independent set)."""
    basis = _basis(ideal, variables)
    if list(basis.exprs) == [1]:
        return -1
    leading = [sympy.Poly(g, *variables).monoms(order="grevlex")[0] for g in basis.exprs]
    n = len(variables)
    for size in range(n, -1, -1):
        for subset in itertools.combinations(range(n), size):
            if all(any(m[k] for k in range(n) if k not in subset) for m in leading):
                return size
    return -1


def _minors(equations, variables, codimension):
    jacobian = sympy.Matrix([[f.diff(v) for v in variables] for f in equations])
    return [jacobian.extract(list(r), list(c)).det() for r in itertools.combinations(range(len(equations)), codimension)
            for c in itertools.combinations(range(len(variables)), codimension)]


def by_hand(name, change="unit"):
    """sympy: the primary decomposition by hand holds; (dim Sing(X), dim V(F + minors)) from R and F."""
    equations, radical, embedded, variables, singular, sets = changed(name, change)
    ideal = _basis(equations, variables)
    assert _basis(_intersection(radical, embedded, variables), variables) == ideal  # F = R cap Q
    assert all(any(ideal.reduce(sympy.expand(r ** k))[1] == 0 for k in (1, 2, 3)) for r in radical)  # V(F) = V(R)
    assert all(_basis(embedded, variables).reduce(r)[1] == 0 or
               any(_basis(embedded, variables).reduce(sympy.expand(r ** k))[1] == 0 for k in (1, 2, 3))
               for r in radical)  # V(Q) inside V(R): embedded
    codimension = len(variables) - _dimension(radical, variables)
    singular_dimension = _dimension(radical + _minors(radical, variables, codimension), variables)
    rank_drop_dimension = _dimension(equations + _minors(equations, variables, codimension), variables)
    return singular_dimension, rank_drop_dimension


@pytest.mark.parametrize("name", list(CASES))
def test_the_decompositions_by_hand_hold(name):
    equations, radical, embedded, variables, singular, sets = changed(name, "unit")
    expected_singular = max((d for d, _ in singular), default=-1)
    assert by_hand(name) == (expected_singular, max([expected_singular] + [d for d, _ in sets]))


def answer(locus):
    """numag's answer: Sing(X)'s affine pieces and the embedded sets, as sorted (dimension, degree) lists."""
    pieces = sorted((c.dimension, c.degree) for c in locus.components
                    if not c.at_infinity and c.kind in (PieceKind.SINGULAR, PieceKind.NON_REDUCED))
    sets = sorted([(c.dimension, c.degree) for c in locus.embedded_components] + [(0, 1)] * len(locus.embedded))
    return pieces, sets


RUNS = [(name, change) for name in CASES for change in CHANGES]


@pytest.mark.parametrize("index", range(len(RUNS)), ids=[f"{n}-{c}" for n, c in RUNS])
def test_singular_lists_embedded_components_apart(index):
    name, change = RUNS[index]
    equations, radical, embedded, variables, singular, sets = changed(name, change)
    seed = 1 + index % 3
    locus = singular_locus(system_of(equations, variables), SingularOptions(), seed=seed)
    pieces, found = answer(locus)
    warnings = completeness_warnings(singular_to_dict(locus, SingularOptions()))
    assert found == sorted(sets), (seed, found)
    if pieces == sorted(singular) and not warnings:
        assert not locus.discarded.get("embedded_component_unsearched")
    else:  # the cone's vertex inside the embedded line: never silent
        assert singular and locus.discarded.get("embedded_component_unsearched") and warnings, (seed, pieces)
        assert any("embedded component" in w for w in warnings)


def test_embedded_components_read_back_in_the_users_coordinates():
    equations, radical, embedded, variables, singular, sets = changed("plane, embedded parabola", "times 1000")
    locus = singular_locus(system_of(equations, variables), SingularOptions(), seed=2)
    (component,) = locus.embedded_components
    # its witness points lie on the parabola of the user's coordinates: z = 0, x = y^2 with (x, y, z) = u / 1000
    u, v, s = (component.points[:, k] / 1000 for k in range(3))
    assert np.max(np.abs(s)) <= 1e-9 and np.max(np.abs(u - v ** 2)) <= 1e-9
    saved, _ = singular_from_dict(json.loads(dumps(singular_to_dict(locus, SingularOptions()))))
    (back,) = saved.embedded_components
    assert back.kind is PieceKind.EMBEDDED and (back.dimension, back.degree) == (1, 2)
    assert np.max(np.abs(back.points - component.points)) <= 1e-12


@pytest.mark.parametrize("name, seed", [("plane, embedded line", 1), ("plane, embedded parabola", 2),
                                        ("hyperplane, embedded line", 3)])
def test_compare_saturates_embedded_components_away(name, seed):
    equations, radical, embedded, variables, singular, sets = changed(name, "linear")
    singular_dimension, rank_drop_dimension = by_hand(name, "linear")
    system = system_of(equations, variables)
    reference = exact_reference(system, seconds=60, seed=seed)
    assert (reference.singular_dimension, reference.rank_drop_dimension) == (singular_dimension, rank_drop_dimension)
    comparison = compare_answers(system, singular_locus(system, SingularOptions(), seed=seed), reference, 1.0)
    assert comparison.verdict == "agree", [(r.quantity, r.numag, r.exact) for r in comparison.rows]


def test_compare_does_not_call_the_unsearched_vertex_agreeing():
    name = "cone, embedded line through the vertex"
    equations, radical, embedded, variables, singular, sets = changed(name, "unit")
    assert by_hand(name) == (0, 1)
    system = system_of(equations, variables)
    reference = exact_reference(system, seconds=60, seed=3)
    assert reference.singular_points == 1
    comparison = compare_answers(system, singular_locus(system, SingularOptions(), seed=3), reference, 1.0)
    assert comparison.verdict in ("incomplete", "agree")  # agree only if numag found the vertex
    if comparison.verdict == "agree":
        assert any(r.quantity == "singular points" and r.numag == 1 for r in comparison.rows)
