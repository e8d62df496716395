"""Numerical irreducible decomposition (numag.witness.decompose), checked against known varieties and sympy."""

import itertools
from fractions import Fraction

import numpy as np
import pytest

from numag.witness.decompose import DecomposeOptions, components_through, decompose
from numag.system.parse import parse_system
from numag.app.report import decomposition_from_dict, decomposition_to_dict, dumps
from numag.singular.smoothness import check_points


def minors(size, rank):
    """The (rank + 1)-minors of a size x size matrix of unknowns a<i><j>, as text."""
    names = [[f"a{i}{j}" for j in range(size)] for i in range(size)]
    k = rank + 1
    equations = []
    for rows in itertools.combinations(range(size), k):
        for cols in itertools.combinations(range(size), k):
            terms = []
            for perm in itertools.permutations(range(k)):
                inversions = sum(perm[i] > perm[j] for i in range(k) for j in range(i + 1, k))
                sign = "-" if inversions % 2 else "+"
                terms.append(sign + "*".join(names[rows[i]][cols[perm[i]]] for i in range(k)))
            equations.append("".join(terms))
    return equations, [v for row in names for v in row]


def summary(result):
    return [(c.dimension, c.degree) for c in result.components]


def test_twisted_cubic_is_one_smooth_curve_of_degree_three():
    # Dimension 1, degree 3, smooth (Harris, "Algebraic Geometry: A First Course", Springer 1992,
    # from memory).
    system = parse_system(["y - x^2", "z - x*y", "x*z - y^2"], ["x", "y", "z"])
    result = decompose(system, seed=1)
    assert summary(result) == [(1, 3)]
    component = result.components[0]
    assert component.confirmed and component.reduced and component.multiplicity == 1
    report = check_points(system, [[2, 4, 8], [0, 0, 0], [-1, 1, -1]], seed=1, decomposition=result)
    assert [v.verdict for v in report.points] == ["smooth"] * 3
    assert all(v.local_dimension == 1 for v in report.points)


def test_three_by_three_matrices_of_rank_one():
    # Dimension 5, degree 6: the affine cone over the Segre variety P^2 x P^2, whose degree is
    # binomial(4, 2) = 6; equally the determinantal degree formula for m x n matrices of rank <= r,
    # prod_{i=0}^{n-r-1} (m+i)! i! / ((r+i)! (m-r+i)!) (Harris 1992, Example 19.10; from memory).
    equations, variables = minors(3, 1)
    result = decompose(parse_system(equations, variables), seed=3)
    assert summary(result) == [(5, 6)]
    assert result.components[0].confirmed and result.components[0].reduced


def test_plane_union_line_and_the_point_where_they_meet():
    # z = 0 together with x = y = 0 (common practice, no source): two components of degree 1; the
    # point where the line meets the plane is singular, and the verdict names both components.
    system = parse_system(["x*z", "y*z"], ["x", "y", "z"])
    result = decompose(system, seed=2)
    assert summary(result) == [(2, 1), (1, 1)]
    report = check_points(system, [[0, 0, 0], [1, 1, 0], [0, 0, 2]], seed=2, decomposition=result)
    meeting, on_plane, on_line = report.points
    assert meeting.verdict == "singular" and len(meeting.components) == 2
    assert any("2 components" in note for note in meeting.notes)
    assert on_plane.verdict == "smooth" and on_plane.local_dimension == 2
    assert on_line.verdict == "smooth" and on_line.local_dimension == 1
    assert [c.id for c in components_through(result, [0, 0, 2])] == [2]


def test_double_plane_is_one_component_of_multiplicity_two():
    # x^2 = 0 in C^3: the plane x = 0 counted twice (common practice, no source). The point check
    # must say non-reduced, not singular.
    system = parse_system(["x^2"], ["x", "y", "z"])
    result = decompose(system, seed=4)
    assert summary(result) == [(2, 1)]
    component = result.components[0]
    assert not component.reduced and component.multiplicity == 2
    verdict = check_points(system, [[0, 1, 2]], seed=4, decomposition=result).points[0]
    assert verdict.verdict == "non-reduced"


def test_non_reduced_component_of_degree_two_is_deflated_and_split():
    # (y - x^2)^2 = 0: the parabolic cylinder (degree 2) with multiplicity 2 (common practice, no
    # source). Its witness points are singular for the equation; deflation lets monodromy move them.
    result = decompose(parse_system(["(y - x^2)^2"], ["x", "y", "z"]), seed=5)
    assert summary(result) == [(2, 2)]
    assert result.components[0].confirmed and not result.components[0].reduced


def test_circle_line_and_plane_at_two_heights():
    # z (z - 1) = 0 with (x^2 + y^2 - 1)(x - y) z = 0: the plane z = 0, and at z = 1 a circle and a
    # line (common practice, no source).
    system = parse_system(["(x^2 + y^2 - 1)*(x - y)*z", "z^2 - z"], ["x", "y", "z"])
    result = decompose(system, seed=6)
    assert summary(result) == [(2, 1), (1, 2), (1, 1)]
    assert all(c.confirmed for c in result.components)


def test_report_round_trip():
    system = parse_system(["x*z", "y*z"], ["x", "y", "z"])
    options = DecomposeOptions()
    result = decompose(system, options, seed=7)
    data = decomposition_to_dict(result, options)
    again, again_options = decomposition_from_dict(__import__("json").loads(dumps(data)))
    assert decomposition_to_dict(again, again_options) == data
    assert [c.id for c in components_through(again, [0, 0, 0])] == [1, 2]


# --- exact reference: sympy's Groebner basis, dimension and degree counted from leading terms ------

sympy = pytest.importorskip("sympy")


def exact_dimension_and_degree(equations, names, rng):
    """Dimension of V(I) from the leading monomials of a grevlex Groebner basis; the degree of its
    top-dimensional part by cutting with random rational hyperplanes and counting standard monomials."""
    symbols = sympy.symbols(names)
    polys = [sympy.sympify(e.replace("^", "**"), locals=dict(zip(names, symbols))) for e in equations]

    def leading(polys_):
        basis = sympy.groebner(polys_, *symbols, order="grevlex")
        return [sympy.Poly(g, *symbols).monoms(order="grevlex")[0] for g in basis.exprs]

    lead = leading(polys)
    n = len(symbols)
    dimension = max(len(subset) for k in range(n + 1) for subset in itertools.combinations(range(n), k)
                    if not any(all(m[j] == 0 for j in range(n) if j not in subset) for m in lead))
    cuts = [sum(Fraction(int(rng.integers(-9, 10)), 1) * s for s in symbols) + int(rng.integers(1, 9))
            for _ in range(dimension)]
    lead = leading(polys + cuts)
    bound = max(max(m) for m in lead) + 1
    degree = sum(1 for e in itertools.product(range(bound), repeat=n)
                 if not any(all(a >= b for a, b in zip(e, m)) for m in lead))
    return dimension, degree


def random_quadric(names, rng):
    terms = [f"({int(rng.integers(-5, 6)) or 1})*{a}*{b}" for a, b in itertools.combinations_with_replacement(names, 2)]
    terms += [f"({int(rng.integers(-5, 6)) or 1})*{a}" for a in names] + [str(int(rng.integers(-5, 6)) or 1)]
    return " + ".join(terms)


@pytest.mark.parametrize("case", range(4))
def test_dimension_and_degree_agree_with_sympy(case):
    # Reference library: sympy's Groebner bases (grevlex); the counting is ours, in this test.
    rng = np.random.default_rng(100 + case)
    names = ["x", "y", "z", "w"][: 3 + case % 2]
    if case == 0:    # one quadric surface in C^3
        equations = [random_quadric(names, rng)]
    elif case == 1:  # two quadrics in C^4: a surface of degree 4
        equations = [random_quadric(names, rng) for _ in range(2)]
    elif case == 2:  # a plane times two quadrics in C^3: the plane (top dimension) and a quartic curve
        plane = "(x + 2*y - 3*z + 1)"
        equations = [f"{plane}*({random_quadric(names, rng)})" for _ in range(2)]
    else:            # three quadrics in C^4: a curve of degree 8
        equations = [random_quadric(names, rng) for _ in range(3)]
    exact = exact_dimension_and_degree(equations, names, rng)
    result = decompose(parse_system(equations, names), seed=case)
    top = result.dimension()
    assert (top, sum(c.degree for c in result.components if c.dimension == top)) == exact
    if case == 2:  # the quartic curve of the two quadrics, off the plane
        assert sum(c.degree for c in result.components if c.dimension == 1) == 4


def test_same_answer_with_worker_processes():
    # batches of 2 paths send every homotopy of more than 2 paths through the pool; the answer must not
    # change (the affine cone over the twisted cubic: dimension 2, degree 3, problem file)
    from dataclasses import replace as _replace
    from numag.run.executor import LocalPool, using
    from numag.witness.cascade import WitnessOptions
    system = parse_system(["x0*x2 - x1^2", "x1*x3 - x2^2", "x0*x3 - x1*x2"], ["x0", "x1", "x2", "x3"])
    options = DecomposeOptions(witness=WitnessOptions(batch_size=2))
    alone = decompose(system, options, seed=4)
    with LocalPool(2) as executor, using(executor):
        pooled = decompose(system, options, seed=4)
    assert [(c.dimension, c.degree) for c in alone.components] == [(c.dimension, c.degree) for c in pooled.components]
    assert np.allclose(alone.components[0].points, pooled.components[0].points)


def test_a_jump_that_joins_two_components_is_undone_by_the_trace_test_of_the_parts(monkeypatch):
    # A conic and a cubic (x^2 + y^2 - 1)(y - x^3) = 0: two components of degrees 2 and 3 (common practice,
    # no source). A monodromy path that jumps where they meet joins all five witness points in one
    # group, and the union of two components passes the trace test too; the parts of the group are
    # then tried by the trace test and the group is split again. The jump is forced here: every loop
    # links all the points.
    import importlib
    module = importlib.import_module("numag.witness.decompose")

    def joined_match(points, reference, tolerance):
        return np.roll(np.arange(len(reference)), 1)[:len(points)]

    monkeypatch.setattr(module, "_match", joined_match)
    system = parse_system(["(x^2 + y^2 - 1)*(y - x^3)"], ["x", "y"])
    for seed in (1, 2, 3):
        result = decompose(system, seed=seed)
        assert sorted(summary(result)) == [(1, 2), (1, 3)]
        assert all(c.confirmed for c in result.components)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_path_statuses_add_up_after_a_jump_repair(seed, monkeypatch):
    # The paths block of a report adds up (converged + singular + at infinity + failed = tracked); a
    # jump repair re-tracks paths, counted apart (common practice, no source: each path is counted once).
    # A jump is made to happen: the first regular endpoint of each homotopy is reported as shared once.
    import numag.tracking.service as service
    from numag.app.report import decomposition_path_counts
    real_crossed, faked = service._crossed, set()

    def crossed_once(run, projective, tolerance):
        found = real_crossed(run, projective, tolerance)
        regular = np.nonzero(run.status == service.PathStatus.CONVERGED)[0]
        if len(found) == 0 and id(run) not in faked and len(regular):
            faked.add(id(run))
            return regular[:1]
        return found

    monkeypatch.setattr(service, "_crossed", crossed_once)
    # a circle and a line through it (two components, degrees 2 and 1; common practice, no source)
    result = decompose(parse_system(["(x^2 + y^2 - 1)*(x - 2*y)"], ["x", "y"]), seed=seed)
    assert sorted(c.degree for c in result.components) == [1, 2]
    assert result.paths.get("retracked_after_jump", 0) > 0
    block = decomposition_path_counts(result.paths)
    assert block["tracked"] == block["converged"] + block["singular_endpoint"] + block["at_infinity"] + block["failed"]


def test_membership_on_a_combined_system_is_confirmed_across_seeds():
    # A sphere of radius 13 and the line x = 3, y = 4 through two of its points (3, 4, +-12) (common practice,
    # no source: the line meets the sphere where z^2 = 169 - 9 - 16). The sphere's test system combines both
    # equations, whose combination also vanishes on a plane holding the whole line: a far point of the line
    # must not be put on the sphere at any seed, and the crossing must be on both components at every seed.
    system = parse_system(["(x^2 + y^2 + z^2 - 169)*(x - 3)", "(x^2 + y^2 + z^2 - 169)*(y - 4)"], ["x", "y", "z"])
    decomposition = decompose(system, seed=1)
    assert sorted((c.dimension, c.degree) for c in decomposition.components) == [(1, 1), (2, 2)]
    for seed in range(1, 13):
        far = components_through(decomposition, [3, 4, 1000], seed=seed)
        assert [(c.dimension, c.degree) for c in far] == [(1, 1)], seed
        crossing = components_through(decomposition, [3, 4, 12], seed=seed)
        assert sorted((c.dimension, c.degree) for c in crossing) == [(1, 1), (2, 2)], seed
