"""`check` far from the origin, in other units and after a linear change: the same verdicts as at the origin.

Four geometries whose singular points are known by construction: a sphere and a line through two of its points,
a plane and a line crossing it, two spheres touching at one point (one equation), and a nodal cubic curve. Each
is moved by shifts of 0, 123 and 1234 (per coordinate, mixed signs), written in units 1000 times larger and
smaller, and after a rational linear change of coordinates; the crossing (or node, or point of contact) and
smooth points of each piece are checked at exact points and at points rounded to 12 digits (then with a point
tolerance far above the rounding and far below the features' size, so no verdict sits at a threshold's edge).

The reference is sympy (Meurer et al., "SymPy: symbolic computing in Python", PeerJ Computer Science, 2017):
the gcd of the equations splits each union into its pieces, and the pieces and their gradients are evaluated at
the exact points (:func:`sympy_verdict`). Decision 0084: before it, the far crossing of the sphere and the line
was called "non-reduced" (exit 0) at 11 seeds of 12, the sphere's membership test having missed it.
"""

from fractions import Fraction

import numpy as np
import pytest
import sympy

from numag.singular.kinds import Verdict
from numag.singular.smoothness import CheckOptions, check_points
from numag.system.parse import parse_constant, parse_system
from numag.witness.decompose import decompose

X, Y, Z = sympy.symbols("x y z")
SPHERE = X ** 2 + Y ** 2 + Z ** 2 - 169
PLANE = Z - 2 * X + Y - 5

#: name -> (equations in the model coordinates, number of variables, the singular point, smooth points). The
#: numbers are common practice, no source; sympy confirms each verdict (test_the_reference_verdicts).
GEOMETRIES = {
    # the line x = 3, y = 4 meets the sphere of radius 13 where z^2 = 169 - 9 - 16
    "sphere and line": ([SPHERE * (X - 3), SPHERE * (Y - 4)], 3, (3, 4, 12), [(0, 5, 12), (3, 4, 20)]),
    # the same line meets the plane z = 2 x - y + 5 at z = 7
    "plane and line": ([PLANE * (X - 3), PLANE * (Y - 4)], 3, (3, 4, 7), [(0, 0, 5), (3, 4, 10)]),
    # spheres of radii 2 and 1 about (0, 0, 0) and (3, 0, 0) touch at (2, 0, 0)
    "two spheres touching": ([(X ** 2 + Y ** 2 + Z ** 2 - 4) * ((X - 3) ** 2 + Y ** 2 + Z ** 2 - 1)], 3, (2, 0, 0),
                             [(0, 0, 2), (4, 0, 0)]),
    # the nodal cubic y^2 = x^2 (x + 1), node at the origin
    "node of a curve": ([Y ** 2 - X ** 2 * (X + 1)], 2, (0, 0), [(-1, 0), (3, 6)]),
}

#: Changes of coordinates: the model coordinates m = M (u - t) of the user's u (shift t, matrix M).
SHIFTS = {0: (0, 0, 0), 123: (123, -234, 345), 1234: (1234, -2345, 3456)}
MATRICES = {
    "unit": sympy.eye(3),
    "times 1000": sympy.eye(3) / 1000,  # the user's lengths are 1000 times larger
    "times 1/1000": sympy.eye(3) * 1000,
    "linear": sympy.Matrix([[1, sympy.Rational(1, 2), 0], [0, 1, sympy.Rational(1, 3)],
                            [sympy.Rational(1, 5), 0, 1]]),
}
CHANGES = [(0, "unit"), (123, "unit"), (1234, "unit"), (1234, "times 1000"), (1234, "times 1/1000"),
           (123, "linear"), (1234, "linear")]


def changed(name, shift, matrix):
    """The geometry's equations and points in the user's coordinates u (exact)."""
    equations, n, singular, smooth = GEOMETRIES[name]
    model, user = (X, Y, Z)[:n], sympy.symbols("u v w")[:n]
    m, t = MATRICES[matrix][:n, :n], sympy.Matrix(SHIFTS[shift][:n])
    substitution = dict(zip(model, m * (sympy.Matrix(user) - t)))
    moved = [sympy.expand(e.subs(substitution, simultaneous=True)) for e in equations]
    inverse = m.inv()
    points = [list(t + inverse * sympy.Matrix(p)) for p in [singular] + smooth]
    return moved, user, points


def sympy_verdict(equations, variables, point):
    """The verdict by sympy: the gcd g of the equations and the rest split X into V(g) and V(rest); a point on
    both is singular (pieces of different dimensions meet), else the Jacobian criterion on its piece."""
    at = dict(zip(variables, point))
    if len(equations) == 1:
        f = equations[0]
        assert all(k == 1 for _, k in sympy.sqf_list(f)[1])  # reduced: the Jacobian criterion applies
        assert f.subs(at) == 0
        return Verdict.SINGULAR if all(f.diff(v).subs(at) == 0 for v in variables) else Verdict.SMOOTH
    g = sympy.gcd(equations[0], equations[1])
    rest = [sympy.cancel(e / g) for e in equations]
    on_g, on_rest = g.subs(at) == 0, all(r.subs(at) == 0 for r in rest)
    assert on_g or on_rest
    if on_g and on_rest:
        return Verdict.SINGULAR
    if on_g:
        return Verdict.SMOOTH if any(g.diff(v).subs(at) != 0 for v in variables) else Verdict.SINGULAR
    rank = sympy.Matrix([[r.diff(v) for v in variables] for r in rest]).subs(at).rank()
    return Verdict.SMOOTH if rank == len(rest) else Verdict.SINGULAR


def system_of(equations, variables):
    return parse_system([str(e).replace("**", "^") for e in equations], [str(v) for v in variables])


def exact_text(point):
    """The point as a user writes it, read by numag's own parser."""
    return [parse_constant(str(c)) for c in point]


def twelve_digits(point):
    """The point rounded to 12 significant digits."""
    return [float(f"{float(c):.11e}") for c in point]


def seeds_for(index):
    """Seeds 1-4 spread over the cases (each case one seed), all four for the far crossing of the brief."""
    return (1, 2, 3, 4)[index % 4:index % 4 + 1]


def test_the_reference_verdicts():
    # sympy: the constructed singular points are singular and the others smooth, in the model coordinates
    for name, (equations, n, singular, smooth) in GEOMETRIES.items():
        variables = (X, Y, Z)[:n]
        assert sympy_verdict(equations, variables, singular) is Verdict.SINGULAR, name
        assert all(sympy_verdict(equations, variables, p) is Verdict.SMOOTH for p in smooth), name


CASES = [(name, shift, matrix) for name in GEOMETRIES for shift, matrix in CHANGES]


@pytest.mark.parametrize("index", range(len(CASES)), ids=[f"{n}-{s}-{m}" for n, s, m in CASES])
def test_exact_points_get_the_reference_verdicts(index):
    name, shift, matrix = CASES[index]
    equations, variables, points = changed(name, shift, matrix)
    expected = [sympy_verdict(equations, variables, p) for p in points]
    system = system_of(equations, variables)
    for seed in seeds_for(index):
        report = check_points(system, [exact_text(p) for p in points], seed=seed,
                              decomposition=decompose(system, seed=seed))
        assert [v.verdict for v in report.points] == expected, (seed, [v.notes for v in report.points])


@pytest.mark.parametrize("seed", (1, 2, 3, 4))
def test_the_far_crossing_of_a_sphere_and_a_line_is_singular_on_both(seed):
    equations, variables, points = changed("sphere and line", 1234, "unit")
    assert points[0] == [1237, -2341, 3468]
    system = system_of(equations, variables)
    (crossing,) = check_points(system, [exact_text(points[0])], seed=seed,
                               decomposition=decompose(system, seed=seed)).points
    assert crossing.verdict is Verdict.SINGULAR
    assert sorted((c["dimension"], c["degree"]) for c in crossing.components) == [(1, 1), (2, 2)]


@pytest.mark.parametrize("name", list(GEOMETRIES))
@pytest.mark.parametrize("shift, matrix", [(1234, "unit"), (123, "linear")])
def test_points_of_twelve_digits_get_the_reference_verdicts(name, shift, matrix):
    equations, variables, points = changed(name, shift, matrix)
    expected = [sympy_verdict(equations, variables, p) for p in points]
    system = system_of(equations, variables)
    seed = 1 + list(GEOMETRIES).index(name)
    # the rounding is below 1e-11 of the point's size; the features are 1 apart or more, 1e-3 of it at 1234 away
    options = CheckOptions(point_tolerance=1e-9)
    report = check_points(system, [twelve_digits(p) for p in points], options, seed=seed,
                          decomposition=decompose(system, seed=seed))
    assert [v.verdict for v in report.points] == expected, [v.notes for v in report.points]


def test_without_components_a_crossing_read_as_non_reduced_is_undecided():
    # Assumed a complete intersection (codimension 2) at the crossing, the rank drops at the sampled points
    # next to it because they lie on the sphere (dimension 2): the sampling cannot say "non-reduced" there.
    equations, variables, points = changed("sphere and line", 1234, "unit")
    system = system_of(equations, variables)
    for seed in (1, 2):
        (verdict,) = check_points(system, [exact_text(points[0])], seed=seed).points
        assert verdict.verdict is Verdict.UNDECIDED
        assert any("manifold of dimension 2" in note for note in verdict.notes)


@pytest.mark.parametrize("shift", (0, 1234))
def test_a_doubled_sphere_is_non_reduced_near_and_far(shift):
    # (s)^2 = 0 for a sphere s = 0 of radius 13 (common practice, no source: J = 2 s grad s vanishes on X): far
    # from the origin the sampling, in the point's own units, saw full rank before decision 0084
    t = SHIFTS[shift]
    s = (X - t[0]) ** 2 + (Y - t[1]) ** 2 + (Z - t[2]) ** 2 - 169
    system = system_of([sympy.expand(s ** 2)], (X, Y, Z))
    point = [t[0] + 3, t[1] + 4, t[2] + 12]
    assert s.subs(dict(zip((X, Y, Z), point))) == 0  # sympy: on the sphere
    for seed in (1, 2):
        (verdict,) = check_points(system, [[Fraction(c) for c in point]], seed=seed,
                                  decomposition=decompose(system, seed=seed)).points
        assert verdict.verdict is Verdict.NON_REDUCED, verdict.notes


@pytest.mark.parametrize("shift, offset, seed", [(0, sympy.Rational(1, 10 ** 9), 1), (0, sympy.Rational(1, 10 ** 12), 2),
                                                 (1234, sympy.Rational(1, 10 ** 9), 3)])
def test_a_point_of_the_line_just_off_the_plane_is_smooth(shift, offset, seed):
    # On the line x = 3, y = 4 of the plane-and-line union, a point 1e-9 (1e-12) above the crossing is only on
    # the line: exactly, J has rank 2 there, and the tangent space (dimension 3 - 2 = 1) cannot hold the plane
    # (dimension 2): smooth. Tangent space dimension >= local dimension at every point of V(F) (common practice,
    # from memory: I. R. Shafarevich, "Basic Algebraic Geometry 1", ch. II). sympy's verdict agrees. Before, the
    # membership test's tolerance put the plane through the point and made it "singular".
    equations, variables, points = changed("plane and line", shift, "unit")
    point = [points[0][0], points[0][1], points[0][2] + offset]
    assert sympy_verdict(equations, variables, point) is Verdict.SMOOTH
    system = system_of(equations, variables)
    (verdict,) = check_points(system, [exact_text(point)], seed=seed, decomposition=decompose(system, seed=seed)).points
    assert verdict.verdict is Verdict.SMOOTH, verdict.notes
    assert [(c["dimension"], c["degree"]) for c in verdict.components] == [(1, 1)]
