"""A doubled component that meets another component elsewhere: its points are "non-reduced", not "singular".

x^2 (z - 1) = 0 is the plane x = 0 counted twice and the plane z = 1. Along x = 0, J = (2 x (z - 1), 0, x^2) is zero
everywhere, so the rank test cannot tell smooth from singular there: numag's kind for such a point is
"non-reduced" (decision 0096). Before it, the nearby sampling (decision 0084) searched for rank drops from samples
1e-7 off the doubled plane; Gauss-Newton on (F, J V) halves x while the rows linear in x pull z, and it ended on the
line x = 0, z = 1 where the two components meet, a unit away: "full rank at sampled points", the point "singular",
exit 0.

The reference is sympy (Meurer et al., "SymPy: symbolic computing in Python", PeerJ Computer Science, 2017): F(p)
and J(p) vanish exactly, the point lies on a factor of multiplicity > 1 and on no other component
(:func:`on_the_doubled_component_only`). That a repeated factor makes every point of its component one where the
Jacobian criterion is blind is common practice, no source.
"""

import pytest
import sympy

from numag.app.compare import compare_answers
from numag.certify.certificates import certify_singular_point
from numag.certify.records import ClaimStatus
from numag.singular.kinds import PieceKind, Verdict
from numag.singular.locus import SingularOptions, singular_locus
from numag.singular.smoothness import check_points
from numag.witness.decompose import decompose

from test_check_far import exact_text, system_of

X, Y, Z = sympy.symbols("x y z")

#: name -> (equations, variables, the doubled factor, points on it only). Numbers: common practice, no source.
CASES = {
    "doubled plane and a plane": ([X ** 2 * (Z - 1)], (X, Y, Z), X, [(0, 5, 0), (0, sympy.Rational(-1, 3), 7)]),
    "doubled slanted plane": ([(X - Y) ** 2 * (Z - 1)], (X, Y, Z), X - Y, [(1, 1, 0)]),
    "doubled plane and an empty real sphere": ([X ** 2 * (X ** 2 + Y ** 2 + Z ** 2 + 1)], (X, Y, Z), X, [(0, 1, 2)]),
    "doubled line and a line": ([(X - Y) ** 2 * (Z - 1), X + Y + Z - 7], (X, Y, Z), X - Y, [(1, 1, 5)]),
    # controls, right before decision 0096 too: the other component far away, or none
    "doubled plane, the other far": ([X ** 2 * (X - 10)], (X, Y, Z), X, [(0, 1, 2)]),
    "doubled plane alone": ([(X - Y) ** 2], (X, Y, Z), X - Y, [(1, 1, 0)]),
}

#: the user's coordinates u with the model's m = M (u - t): units 1000 times larger and smaller, a rational
#: linear change, a far shift
CHANGES = {
    "unit": (sympy.eye(3), (0, 0, 0)),
    "times 1000": (sympy.eye(3) / 1000, (0, 0, 0)),
    "times 1/1000": (sympy.eye(3) * 1000, (0, 0, 0)),
    "linear": (sympy.Matrix([[1, sympy.Rational(1, 2), 0], [0, 1, sympy.Rational(1, 3)],
                             [sympy.Rational(1, 5), 0, 1]]), (0, 0, 0)),
    "far": (sympy.eye(3), (1234, -2345, 3456)),
}


def changed(name, change):
    equations, variables, doubled, points = CASES[name]
    matrix, shift = CHANGES[change]
    user = sympy.symbols("u v s")
    t = sympy.Matrix(shift)
    substitution = dict(zip(variables, matrix * (sympy.Matrix(user) - t)))
    moved = [sympy.expand(e.subs(substitution, simultaneous=True)) for e in equations]
    moved_doubled = sympy.expand(doubled.subs(substitution, simultaneous=True))
    inverse = matrix.inv()
    return moved, user, moved_doubled, [list(t + inverse * sympy.Matrix(p)) for p in points]


def on_the_doubled_component_only(equations, variables, doubled, point):
    """sympy: F and J vanish at the point, ``doubled`` divides the first equation at least twice and vanishes
    there, and the rest of X (the cofactor; further equations define the doubled piece with it) does not."""
    at = dict(zip(variables, point))
    assert all(e.subs(at) == 0 for e in equations)
    first = equations[0]
    assert all(first.diff(v).subs(at) == 0 for v in variables)  # the first row of J is zero at the point
    quotient, remainder = sympy.div(first, sympy.expand(doubled ** 2), *variables)
    assert remainder == 0 and doubled.subs(at) == 0
    assert quotient.subs(at) != 0  # not on the other component
    # the rank of J is below the codimension: the other equations (linear here) add their own rank only
    rank = sympy.Matrix([[e.diff(v) for v in variables] for e in equations]).subs(at).rank()
    assert rank < len(equations)


RUNS = [(name, change) for name in CASES for change in CHANGES]


@pytest.mark.parametrize("index", range(len(RUNS)), ids=[f"{n}-{c}" for n, c in RUNS])
def test_points_of_a_doubled_component_are_non_reduced(index):
    name, change = RUNS[index]
    equations, variables, doubled, points = changed(name, change)
    for point in points:
        on_the_doubled_component_only(equations, variables, doubled, point)
    system = system_of(equations, variables)
    seed = 1 + index % 3
    report = check_points(system, [exact_text(p) for p in points], seed=seed, decomposition=decompose(system, seed=seed))
    for verdict in report.points:
        assert verdict.verdict is Verdict.NON_REDUCED, (seed, verdict.notes)
        assert not any("full rank at sampled points" in note for note in verdict.notes)


@pytest.mark.parametrize("seed", (1, 2, 3))
def test_where_the_doubled_plane_meets_the_other_the_point_is_singular(seed):
    # (0, 5, 1) lies on x = 0 and on z = 1 (sympy): two components meet there, X is not locally irreducible
    equations, variables, _, _ = changed("doubled plane and a plane", "unit")
    point = (0, 5, 1)
    assert X.subs(dict(zip((X, Y, Z), point))) == 0 and (Z - 1).subs(dict(zip((X, Y, Z), point))) == 0
    system = system_of(equations, variables)
    (verdict,) = check_points(system, [exact_text(point)], seed=seed, decomposition=decompose(system, seed=seed)).points
    assert verdict.verdict is Verdict.SINGULAR, verdict.notes


LOCI = [
    ([(X - Y) ** 2 * (Z - 1)], (X, Y, Z), 1),
    ([X ** 2 * (Z - 1)], (X, Y, Z), 2),
    ([X ** 2 * (X ** 2 + Y ** 2 + Z ** 2 + 1)], (X, Y, Z), 3),
]


@pytest.mark.parametrize("equations, variables, seed", LOCI)
def test_the_singular_locus_lists_the_doubled_component_as_non_reduced(equations, variables, seed):
    # sympy: the repeated factors (multiplicity > 1) are the generically non-reduced components
    (f,) = equations
    repeated = sorted(sympy.Poly(g, *variables).total_degree() for g, k in sympy.factor_list(sympy.expand(f))[1]
                      if k > 1)
    system = system_of([sympy.expand(f)], variables)
    locus = singular_locus(system, SingularOptions(), seed=seed)
    top = len(variables) - 1
    kinds = sorted((c.kind.value, c.degree) for c in locus.components if c.dimension == top and not c.at_infinity)
    assert kinds == [("non-reduced", d) for d in repeated]


def test_compare_reports_a_kind_mismatch():
    # the exact side's repeated factor of x^2 (z - 1): one non-reduced component of degree 1 (sympy, in the
    # reference); numag's component relabelled "singular" must be a mismatch, as it is left it agrees
    from numag.app.reference import exact_reference
    system = system_of([X ** 2 * (Z - 1)], (X, Y, Z))
    locus = singular_locus(system, SingularOptions(), seed=1)
    reference = exact_reference(system, seconds=60, seed=1)
    assert reference.non_reduced_degrees == [1]
    assert compare_answers(system, locus, reference, 1.0).verdict == "agree"
    for component in locus.components:
        if component.kind is PieceKind.NON_REDUCED:
            component.kind = PieceKind.SINGULAR
    comparison = compare_answers(system, locus, reference, 1.0)
    assert comparison.verdict == "mismatch"
    assert any(r.quantity.startswith("non-reduced") and r.agree is False for r in comparison.rows)


def test_compare_says_when_it_cannot_compare_kinds():
    from numag.app.reference import exact_reference
    system = system_of([(X - Y) ** 2 * (Z - 1), X + Y + Z - 7], (X, Y, Z))
    locus = singular_locus(system, SingularOptions(), seed=2)
    reference = exact_reference(system, seconds=60, seed=2)
    comparison = compare_answers(system, locus, reference, 1.0)
    assert reference.non_reduced_degrees is None
    assert any("kinds not compared" in note for note in comparison.notes)


def test_a_singular_point_certificate_lists_reducedness_as_unverified():
    # rank J = 0 < 1 exactly at (0, 5, 0) of x^2 (z - 1) = 0, a smooth point of the plane x = 0 (sympy above):
    # the certificate proves the rank drop, not that the variety is singular
    system = system_of([X ** 2 * (Z - 1)], (X, Y, Z))
    certificate = certify_singular_point(system, [0.0, 5.0, 0.0], 1)
    assert certificate.status == "certified"
    (reduced,) = [c for c in certificate.claim_checks if c.name == "reduced"]
    assert reduced.status is ClaimStatus.UNVERIFIED
