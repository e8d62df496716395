"""Embedded points: the given equations' Jacobian drops rank where X is smooth (decision 0105).

{x^2, x y} cut out the line x = 0 with an embedded point at the origin: (x^2, x y) = (x) cap (x^2, y) (Cox, Little
and O'Shea, "Ideals, Varieties, and Algorithms", 4th ed. 2015, chapter 4, section 8). J = ((2 x, 0), (y, x)) is zero
there, yet the line is smooth. numag's verdict there is "embedded point", not "singular"; points where X really is
singular and that lie on one component (a node, a cusp) or on two (a crossing) stay singular.

The reference is sympy (Meurer et al., "SymPy: symbolic computing in Python", PeerJ Computer Science, 2017): each
case names generators R of X's ideal found by hand (the radical; common practice, no source), and
:func:`radical_by_hand` checks with Groebner bases that F lies in (R) and a power of each r in R lies in (F), so
V(F) = V(R); R being prime or a reduced complete intersection (by hand), the Jacobian criterion on R decides
smooth or singular exactly (rank of J_R at the point against the number of R's equations).
"""

import json

import numpy as np
import pytest
import sympy

from numag.app.compare import compare_answers
from numag.app.reference import exact_reference
from numag.app.report import dumps, singular_from_dict, singular_to_dict
from numag.singular.kinds import Verdict
from numag.singular.locus import SingularOptions, singular_locus
from numag.singular.smoothness import check_points
from numag.witness.decompose import decompose

from test_check_far import exact_text, system_of

X, Y, Z, W = sympy.symbols("x y z w")

#: name -> (equations F, variables, generators R of X's ideal (by hand), the point, X singular there). The equations
#: are common practice, no source; the embedded point of (x^2, x y): Cox, Little and O'Shea 2015, ch. 4 sec. 8.
CASES = {
    "line, embedded point": ([X ** 2, X * Y], (X, Y), [X], (0, 0), False),
    "plane, embedded point": ([X * Z, Y * Z, Z ** 2], (X, Y, Z), [Z], (0, 0, 0), False),
    "parabola, embedded point": ([(Y - X ** 2) * X, (Y - X ** 2) * Y], (X, Y), [Y - X ** 2], (0, 0), False),
    # controls: singular points of X cut out by more equations than the codimension
    "node in a doubled plane": ([Y ** 2 - X ** 2 - X ** 3, X * Z, Y * Z, Z ** 2], (X, Y, Z),
                                [Z, Y ** 2 - X ** 2 - X ** 3], (0, 0, 0), True),
    "cusp in a doubled plane": ([Y ** 2 - X ** 3, X * Z, Y * Z, Z ** 2], (X, Y, Z), [Z, Y ** 2 - X ** 3], (0, 0, 0),
                                True),
    "two crossing lines": ([X * Y, Z, X * Z], (X, Y, Z), [Z, X * Y], (0, 0, 0), True),
    # a point of an embedded curve: Newton's samples of X next to it fall onto that curve (x and y halve together)
    # and once made it "non-reduced"; the plane is reduced and smooth there
    "plane, embedded line": ([X ** 2, X * Y], (X, Y, Z), [X], (0, 0, 5), False),
    "plane, embedded parabola": ([Z ** 2, Z * (X - Y ** 2)], (X, Y, Z), [Z], (1, 1, 0), False),
    # the Whitney umbrella x^2 = y^2 z in the hyperplane w = 0, cut out with w's multiples: a point of its double
    # line is singular (its ideal there is the reduced complete intersection (w, x^2 - y^2 z)), not non-reduced
    "umbrella in a doubled hyperplane": ([W ** 2, W * X, W * Y, W * Z, X ** 2 - Y ** 2 * Z], (X, Y, Z, W),
                                         [W, X ** 2 - Y ** 2 * Z], (0, 0, 1, 0), True),
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
    """F, R, the variables and the point in the user's coordinates."""
    equations, variables, radical, point, singular = CASES[name]
    n = len(variables)
    matrix = CHANGES[change](n)
    user = sympy.symbols("u v s t")[:n]
    substitution = dict(zip(variables, matrix * sympy.Matrix(user)))

    def moved(expressions):
        return [sympy.expand(e.subs(substitution, simultaneous=True)) for e in expressions]

    return moved(equations), moved(radical), user, list(matrix.inv() * sympy.Matrix(point)), singular


def radical_by_hand(equations, radical, variables, point):
    """sympy: V(F) = V(R) (F in (R), r^k in (F)); the rank of J_F drops at the point; whether X = V(R) is singular
    there by the Jacobian criterion on R (R generates X's ideal: checked by hand for each case)."""
    at = dict(zip(variables, point))
    by_radical = sympy.groebner(radical, *variables, order="grevlex")
    assert all(by_radical.reduce(f)[1] == 0 for f in equations)
    by_equations = sympy.groebner(equations, *variables, order="grevlex")
    assert all(any(by_equations.reduce(sympy.expand(r ** k))[1] == 0 for k in (1, 2, 3)) for r in radical)
    assert all(f.subs(at) == 0 for f in equations)
    codimension = len(radical)
    assert sympy.Matrix([[f.diff(v) for v in variables] for f in equations]).subs(at).rank() < codimension
    return sympy.Matrix([[r.diff(v) for v in variables] for r in radical]).subs(at).rank() < codimension


RUNS = [(name, change) for name in CASES for change in CHANGES]


@pytest.mark.parametrize("index", range(len(RUNS)), ids=[f"{n}-{c}" for n, c in RUNS])
def test_check_tells_embedded_points_from_singular_points(index):
    name, change = RUNS[index]
    equations, radical, variables, point, singular = changed(name, change)
    assert radical_by_hand(equations, radical, variables, point) is singular
    system = system_of(equations, variables)
    seed = 1 + index % 3
    decomposition = decompose(system, seed=seed)
    # every witness point lies on X = V(R) (R by hand above): a move that jumped to another component of a random
    # combination of F once left a parabola's sample point off X, and the check at the origin undecided
    for component in decomposition.components:
        for sample in component.points:
            at = dict(zip(variables, (sympy.nsimplify(complex(c).real, rational=True)
                                      + sympy.I * sympy.nsimplify(complex(c).imag, rational=True) for c in sample)))
            norm = float(np.linalg.norm(sample))
            for r in radical:
                # each term's size with every coordinate replaced by the point's norm (a term that is one
                # coordinate, z at a point with z = 3e-307, is not its own yardstick)
                size = sum(abs(complex(c)) * norm ** sum(m) for m, c in sympy.Poly(r, *variables).terms())
                assert abs(complex(r.subs(at))) <= 1e-8 * size, (component.id, sample)
    (verdict,) = check_points(system, [exact_text(point)], seed=seed, decomposition=decomposition).points
    assert verdict.verdict is (Verdict.SINGULAR if singular else Verdict.EMBEDDED), (seed, verdict.notes)
    assert not verdict.verdict.is_singular or singular


@pytest.mark.parametrize("name, seed", [("line, embedded point", 1), ("plane, embedded point", 2),
                                        ("parabola, embedded point", 3)])
def test_the_singular_locus_lists_no_embedded_point_as_singular(name, seed):
    equations, radical, variables, point, singular = changed(name, "linear")
    assert radical_by_hand(equations, radical, variables, point) is singular is False
    locus = singular_locus(system_of(equations, variables), SingularOptions(), seed=seed)
    assert [c for c in locus.components if not c.at_infinity] == []
    assert locus.discarded.get("embedded_point") == 1
    (embedded,) = locus.embedded  # listed apart, in the user's coordinates
    assert np.max(np.abs(embedded - np.array([complex(c) for c in point]))) <= 1e-8
    saved, _ = singular_from_dict(json.loads(dumps(singular_to_dict(locus, SingularOptions()))))
    assert len(saved.embedded) == 1 and np.max(np.abs(saved.embedded[0] - embedded)) <= 1e-12


@pytest.mark.parametrize("name, seed", [("line, embedded point", 3), ("node in a doubled plane", 1)])
def test_compare_sets_embedded_points_apart_on_both_sides(name, seed):
    # the reference saturates the equations' ideal by a combination of the minors (sympy), so its points are X's
    # singular points; numag's singular points and embedded points are compared with its two counts
    equations, radical, variables, point, singular = changed(name, "unit")
    system = system_of(equations, variables)
    reference = exact_reference(system, seconds=60, seed=seed)
    assert reference.singular_points == (1 if radical_by_hand(equations, radical, variables, point) else 0)
    assert reference.embedded_points == (0 if singular else 1)
    comparison = compare_answers(system, singular_locus(system, SingularOptions(), seed=seed), reference, 1.0)
    assert comparison.verdict == "agree", [(r.quantity, r.numag, r.exact) for r in comparison.rows]
    assert any(r.quantity.startswith("embedded points") and r.agree for r in comparison.rows)
