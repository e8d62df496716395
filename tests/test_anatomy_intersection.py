"""Milnor numbers of isolated complete-intersection singularities of curves (the Le-Greuel formula), and the
anatomy of a hypersurface's singular points at infinity (decision 0086)."""

import itertools

import numpy as np
import pytest

import numag
from numag.anatomy.intersection import complete_intersection_milnor
from numag.anatomy.survey import locus_anatomy, point_anatomy
from numag.system.parse import parse_system
from numag.system.polynomial import PolynomialSystem

# Simple space-curve ICIS of Giusti's list (M. Giusti, "Classification des singularites isolees simples
# d'intersections completes", Proc. Symp. Pure Math. 40, 1983; names and normal forms from memory), the index
# being mu. Each mu is checked below against sympy's Groebner bases of the Le-Greuel formula's ideals (Le 1974,
# Greuel 1975), the first equation chosen with an isolated singularity of its own.
GIUSTI = [("S5", ["x^2 + y^2 + z^2", "y*z"], 5), ("S6", ["x^2 + y^2 + z^3", "y*z"], 6),
          ("T7", ["x^2 + y^3 + z^3", "y*z"], 7), ("U7", ["x^2 + y*z", "x*y + z^3"], 7),
          ("W8", ["y^2 + x*z", "x^2 + z^3"], 8), ("Z9", ["x^2 + y^2 + 2*z^3", "y^2 + z^3"], 9)]
NAMES = ["x", "y", "z"]


def _sympy_length(generators, symbols):
    """dim Q[x]/I by sympy's Groebner basis (standard monomials); None when I is not zero-dimensional. The ideals
    here are weighted homogeneous, so a zero-dimensional one has its only zero at the origin: the global length is
    the local one."""
    import sympy
    basis = sympy.groebner(generators, *symbols, order="grevlex")
    leading = [sympy.Poly(q, *symbols).monoms(order="grevlex")[0] for q in basis.exprs]
    for k in range(len(symbols)):  # zero-dimensional: a pure power of every variable leads some element
        if not any(m[k] > 0 and sum(m) == m[k] for m in leading):
            return None
    bound = 1 + max(sum(m) for m in leading)
    return sum(1 for e in itertools.product(range(bound), repeat=len(symbols))
               if not any(all(a >= b for a, b in zip(e, m)) for m in leading))


def _sympy_milnor(equations):
    """mu(f1, f2) = dim O/(f1, 2x2 minors of d(f1, f2)) - dim O/(grad f1) (Le-Greuel), in sympy."""
    sympy = pytest.importorskip("sympy")
    (f1, f2), symbols = parse_system(equations, NAMES).to_sympy()
    jacobian = sympy.Matrix([f1, f2]).jacobian(symbols)
    minors = [jacobian.extract([0, 1], list(c)).det() for c in ((0, 1), (0, 2), (1, 2))]
    return _sympy_length([f1] + minors, symbols) - _sympy_length([f1.diff(s) for s in symbols], symbols)


@pytest.mark.parametrize("name, equations, mu", GIUSTI, ids=[g[0] for g in GIUSTI])
def test_giusti_space_curves_mu_against_sympy(name, equations, mu):
    assert _sympy_milnor(equations) == mu
    system = parse_system(equations, NAMES)
    for seed in (1, 2, 3):
        reading = complete_intersection_milnor([p.numeric() for p in system.polynomials], [0, 0, 0], seed=seed)
        assert reading.milnor == mu, (seed, reading)


def _moved_system(equations, seed):
    """The equations after a random linear change of coordinates (condition <= 4) and units, the singular point
    moved to a random place, and each equation mixed with the others (the ICIS does not change)."""
    rng = np.random.default_rng(300 + seed)
    polynomials = [p.numeric() for p in parse_system(equations, NAMES).polynomials]
    units = 10.0 ** rng.integers(-2, 3, 3)
    rotation, _ = np.linalg.qr(rng.standard_normal((3, 3)))
    matrix = rotation @ np.diag(2.0 ** rng.uniform(-1, 1, 3)) @ np.diag(1 / units)
    point = rng.standard_normal(3) * units
    moved = [p.substitute_linear(matrix, -matrix @ point) for p in polynomials]
    mixing = np.array([[1.0, rng.uniform(-1, 1)], [rng.uniform(-1, 1), 1.0]])
    mixed = [moved[0].scaled(mixing[i, 0]) + moved[1].scaled(mixing[i, 1]) for i in range(2)]
    return PolynomialSystem(list(NAMES), mixed), point


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("name, equations, mu", GIUSTI[:4], ids=[g[0] for g in GIUSTI[:4]])
def test_icis_mu_after_a_change_of_coordinates(name, equations, mu, seed):
    # mu is invariant under a change of coordinates and of the equations (Le 1974); sources as for GIUSTI
    system, point = _moved_system(equations, seed)
    anatomy = point_anatomy(system, point, seed=seed)
    assert anatomy.intersection is not None
    assert anatomy.intersection.milnor in (None, mu)
    if anatomy.intersection.milnor is not None and anatomy.branches is not None:
        # mu = 2 delta - r + 1 (Buchweitz and Greuel 1980): delta must be a non-negative integer
        assert anatomy.intersection.delta == (mu + len(anatomy.branches) - 1) // 2


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_node_on_a_cone_is_a_space_curve_with_mu_one(seed):
    # X = {x^2 + y^2 - z^2 = 0, z = x^3}: z eliminated, the plane curve x^2 + y^2 = x^6, a node at the origin
    # whose branches are complex conjugate (x = +-i y): mu = 1 (Milnor 1968: mu = 2 delta - r + 1 with delta = 1,
    # r = 2), an isolated real point (common practice, no source).
    system = parse_system(["x^2 + y^2 - z^2", "z - x^3"], NAMES)
    anatomy = point_anatomy(system, [0, 0, 0], seed=seed)
    assert (anatomy.intersection.milnor, anatomy.intersection.delta) == (1, 1)
    assert anatomy.multiplicity == 2 and anatomy.real_branches == 0
    again = type(anatomy).from_dict(anatomy.to_dict())
    assert again.intersection == anatomy.intersection


def test_four_lines_have_mu_five_and_delta_four():
    # S5 = {x^2 + y^2 + z^2 = 0, y z = 0}: four lines through the origin, not in a plane; mu = 5 (Giusti, as
    # above), so delta = (5 + 4 - 1) / 2 = 4 (Buchweitz and Greuel 1980), and the four branches are smooth.
    system = parse_system(["x^2 + y^2 + z^2", "y*z"], NAMES)
    anatomy = point_anatomy(system, [0, 0, 0], seed=1)
    assert sorted(b.multiplicity for b in anatomy.branches) == [1, 1, 1, 1]
    assert (anatomy.intersection.milnor, anatomy.intersection.delta) == (5, 4)


def test_not_a_complete_intersection_point_is_undecided():
    # V(x y, (x + y) z) is the three coordinate axes (x = 0: y z = 0; y = 0: x z = 0), which need three equations
    # (common practice, no source): the Le-Greuel algebras are not finite, and mu is undecided, never a number.
    system = parse_system(["x*y", "x*z + y*z"], NAMES)
    reading = complete_intersection_milnor([p.numeric() for p in system.polynomials], [0, 0, 0], seed=1)
    assert reading.milnor is None and reading.notes


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_cusp_at_infinity_is_read_in_an_affine_chart(seed):
    # x^2 y = 1 has no affine singular point; its closure x^2 y = w^3 has one at (w : x : y) = (0 : 0 : 1), read in
    # the chart y = 1 as x^2 = w^3: a cusp, A2 with mu = 2, one real branch of multiplicity 2 (worked by hand:
    # common practice, no source); the other point at infinity, (0 : 1 : 0), is smooth (y = w^3 in the chart x = 1).
    system = parse_system(["x^2*y - 1"], ["x", "y"])
    locus = numag.singular_locus(system, seed=seed)
    infinite = [c for c in locus.components if c.at_infinity]
    assert len(infinite) == 1
    anatomy = locus_anatomy(locus, seed=seed)
    reading = anatomy.points[infinite[0].id]
    assert (reading.hypersurface.type.label, reading.hypersurface.milnor) == ("A2", 2)
    assert [b.multiplicity for b in reading.branches] == [2] and reading.real_branches == 1
    assert reading.motion is None and "at infinity" in reading.notes[0]
