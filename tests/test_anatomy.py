"""The anatomy of singular points and components (numag.anatomy) against published normal forms and sympy."""

import json
import pathlib

import numpy as np
import pytest

import numag
from numag.system.parse import parse_system
from numag.system.polynomial import PolynomialSystem
from numag.system.files import load_angles
from numag.witness.local import LocalOptions, hypersurface_witness, local_picture
from numag.anatomy.records import ComponentAnatomy, Family, Motion, PointAnatomy, TypeTest
from numag.anatomy.survey import LocusAnatomy, component_anatomy, locus_anatomy, point_anatomy

EXAMPLES = pathlib.Path(numag.__file__).parent / "examples"
SEEDS = [0, 1, 2]

# Normal forms of the simple plane curve singularities and their Milnor numbers: Arnold, "Normal forms of
# functions near degenerate critical points, the Weyl groups A_k, D_k, E_k and Lagrangian singularities",
# Funct. Anal. Appl. 6, 1972 (mu of each normal form is the index k; common practice).
PLANE_FORMS = [
    ("x^2 + y^2", "A1", 1),
    ("y^2 - x^3", "A2", 2),
    ("y^2 - x^4", "A3", 3),
    ("y^2 - x^5", "A4", 4),
    ("y^2 - x^6", "A5", 5),
    ("y^2 - x^7", "A6", 6),
    ("x^2*y - y^3", "D4", 4),
    ("x^2*y + y^4", "D5", 5),
    ("x^2*y + y^5", "D6", 6),
    ("x^3 + y^4", "E6", 6),
    ("x^3 + x*y^3", "E7", 7),
    ("x^3 + y^5", "E8", 8),
]
# A_k surfaces x^2 + y^2 + z^(k+1) (Arnold 1972, same normal forms with a square added).
SURFACE_FORMS = [("x^2 + y^2 + z^2", "A1", 1), ("x^2 + y^2 + z^3", "A2", 2), ("x^2 + y^2 + z^4", "A3", 3),
                 ("x^2 + y^2 + z^5", "A4", 4), ("x^2 + y^2 + z^6", "A5", 5), ("x^2*y - y^3 + z^2", "D4", 4)]


def moved(equation, names, seed):
    """The hypersurface after a random linear change of coordinates and of units, its point moved to a
    random place: f(A (y - p)) with A a random matrix times powers of ten. Returns (system, p)."""
    f = parse_system([equation], names).polynomials[0]
    if seed == 0:
        return PolynomialSystem(list(names), [f]), np.zeros(len(names))
    rng = np.random.default_rng(100 + seed)
    n = len(names)
    units = 10.0 ** rng.integers(-2, 3, n)
    # a random rotation times stretches in [1/2, 2] (condition number at most 4): in coordinates of
    # condition 100 and more the singularity's features shrink below the local radius (decision 0044)
    rotation, _ = np.linalg.qr(rng.standard_normal((n, n)))
    matrix = rotation @ np.diag(2.0 ** rng.uniform(-1, 1, n)) @ np.diag(1 / units)
    point = rng.standard_normal(n) * units
    return PolynomialSystem(list(names), [f.numeric().substitute_linear(matrix, -matrix @ point)]), point


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("equation, label, mu", PLANE_FORMS, ids=[f[1] for f in PLANE_FORMS])
def test_simple_plane_curve_types(equation, label, mu, seed):
    # Arnold 1972 (see PLANE_FORMS): type and Milnor number of each normal form, also after a random linear
    # change of coordinates and units, moved to a random point. Normal forms are quasi-homogeneous:
    # tau = mu (Saito 1971, "Quasihomogene isolierte Singularitaeten von Hyperflaechen", Invent. Math. 14).
    system, point = moved(equation, ["x", "y"], seed)
    anatomy = point_anatomy(system, point, seed=seed)
    h = anatomy.hypersurface
    assert (h.type.label, h.milnor, h.tjurina, h.quasi_homogeneous) == (label, mu, mu, True)
    # the multiplicity of a simple curve singularity: 2 for A_k, 3 for D_k and E_k (the order of the normal form)
    assert anatomy.multiplicity == (2 if label.startswith("A") else 3)


def gaussian_moved(equation, names, seed, condition):
    """f(A (y - p)) with A = (a Gaussian matrix with its singular values set to span ``condition``) times
    units 10^-3..10^3, and p a random point in those units. Returns (system, p)."""
    f = parse_system([equation], names).polynomials[0]
    rng = np.random.default_rng(500 + seed)
    n = len(names)
    units = 10.0 ** rng.integers(-3, 4, n)
    left, _, right = np.linalg.svd(rng.standard_normal((n, n)))
    matrix = left @ np.diag(np.geomspace(1.0, 1.0 / condition, n)) @ right @ np.diag(1 / units)
    point = rng.standard_normal(n) * units
    return PolynomialSystem(list(names), [f.numeric().substitute_linear(matrix, -matrix @ point)]), point


# Condition 1e3 for every type whose defining terms stay above rounding there (measured, decision 0044); A5
# and A6 at 1e2 (at 1e3 their x^6, x^7 terms sink to rounding level: see the next test).
GAUSSIAN_CASES = [(e, "xy", label, mu, 1e2 if label in ("A5", "A6") else 1e3) for e, label, mu in PLANE_FORMS] + \
    [(e, "xyz", label, mu, 1e3) for e, label, mu in SURFACE_FORMS]


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("equation, names, label, mu, condition", GAUSSIAN_CASES,
                         ids=[f"{c[2]}-{len(c[1])}d" for c in GAUSSIAN_CASES])
def test_simple_types_after_an_ill_conditioned_change(equation, names, label, mu, condition, seed):
    # Arnold 1972 (see PLANE_FORMS): the type, mu and tau are invariants of the singularity under any
    # invertible linear change of coordinates and units (common practice); here a Gaussian matrix of
    # condition number up to 1e3 and units 10^-3..10^3 (decision 0044).
    # Where double precision cannot tell (a double root of the kernel cubic split by rounding), the answer is
    # undecided and the anatomy incomplete; a type, when given, is the right one. How many are decided is
    # checked in the next test.
    # The local picture likewise: where what is unknown about the frame polynomial (rounding magnified by the
    # change) moves its local points by more than 1% of their distances at every radius tried, the multiplicity
    # or the branches are left untold (decision 0056: E7, E8 and D6 at some placements); a count is the right one.
    system, point = gaussian_moved(equation, list(names), seed, condition)
    anatomy = point_anatomy(system, point, seed=seed)
    h = anatomy.hypersurface
    assert anatomy.multiplicity in (None, 2 if label.startswith("A") or len(names) == 3 else 3)
    if h.type.family is Family.UNDECIDED:
        assert anatomy.incomplete
    else:
        assert (h.type.label, h.milnor, h.tjurina) == (label, mu, mu)
        picture_told = anatomy.multiplicity is not None and (len(names) == 3 or anatomy.branches is not None)
        assert anatomy.incomplete == (not picture_told)


def test_most_types_are_decided_after_an_ill_conditioned_change():
    # Of the 48 cases above with seed 1..3 (condition 1e3, A5/A6 1e2), measured: 45 decided and right, 3
    # undecided (D5 and D6: their cubic's double root splits at rounding level). At least 40 must be decided
    # (Arnold 1972 for the expected types; the margin keeps this off the edge of any single decision).
    decided = 0
    for equation, names, label, mu, condition in GAUSSIAN_CASES:
        for seed in (1, 2, 3):
            system, point = gaussian_moved(equation, list(names), seed, condition)
            h = point_anatomy(system, point, seed=seed).hypersurface
            decided += h.type.label == label and h.milnor == mu
    assert decided >= 40


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("equation, label", [("y^2 - x^6", "A5"), ("y^2 - x^7", "A6")])
def test_a_case_beyond_double_precision_is_reported_undecided(equation, label, seed):
    # y^2 - x^7 after a change of condition 1e3 with units 10^-3..10^3: the x^7 term's coefficient sits at the
    # rounding level of the Taylor expansion at the point (measured: its rounding level exceeds it), so no
    # type can be read in double precision. Reported undecided (incomplete), never another type (the
    # previous code said A9 or "not isolated"; decision 0044). The type, if given, must be the right one.
    system, point = gaussian_moved(equation, ["x", "y"], seed, 1e3)
    anatomy = point_anatomy(system, point, seed=seed)
    h = anatomy.hypersurface
    assert h.type.label == label or (h.type.family is Family.UNDECIDED and anatomy.incomplete)
    if label == "A6":
        assert h.type.family is Family.UNDECIDED and h.decided_by is TypeTest.BEYOND_PRECISION
    if h.type.family is Family.UNDECIDED:
        # an undecided reading of the point says nothing about what a mechanism can do there
        assert anatomy.motion is None and anatomy.sentence is None


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("equation, label, mu", SURFACE_FORMS, ids=[f[1] for f in SURFACE_FORMS])
def test_simple_surface_types(equation, label, mu, seed):
    # Arnold 1972: the surface normal forms (a square added to the curve's); each has a quadratic term, so
    # multiplicity 2 (the order of the lowest term; common practice).
    system, point = moved(equation, ["x", "y", "z"], seed)
    anatomy = point_anatomy(system, point, seed=seed)
    assert (anatomy.hypersurface.type.label, anatomy.hypersurface.milnor) == (label, mu)
    assert anatomy.multiplicity == 2
    assert anatomy.branches is None  # branches are for curves


def test_the_four_nodes_of_the_cayley_cubic():
    # Cayley's nodal cubic surface x^2 + y^2 + z^2 + 2xyz - 1 = 0 has four ordinary nodes, at (1, 1, -1),
    # (1, -1, 1), (-1, 1, 1), (-1, -1, -1) (from memory; Cayley, "A memoir on cubic surfaces", Phil. Trans.
    # 1869: the cubic surface with four nodes). Each is an A1 point with mu = tau = 1 and multiplicity 2.
    system = parse_system(["x^2 + y^2 + z^2 + 2*x*y*z - 1"], ["x", "y", "z"])
    locus = numag.singular_locus(system, seed=4)
    anatomy = locus_anatomy(locus, seed=4)
    nodes = sorted(tuple(np.round(a.point.real).astype(int)) for a in anatomy.points.values())
    assert nodes == sorted([(1, 1, -1), (1, -1, 1), (-1, 1, 1), (-1, -1, -1)])
    for a in anatomy.points.values():
        assert (a.hypersurface.type.label, a.hypersurface.milnor, a.hypersurface.tjurina, a.multiplicity) == \
            ("A1", 1, 1, 2)


def test_not_simple_and_not_quasi_homogeneous():
    # f = x^4 + y^5 + x^2 y^3 is semi-quasi-homogeneous but not quasi-homogeneous: mu = 12, tau = 11 (common
    # practice, no source; verified here with sympy Groebner bases). The cubic term vanishes: not simple.
    sympy = pytest.importorskip("sympy")
    x, y = sympy.symbols("x y")
    f = x**4 + y**5 + x**2 * y**3
    fx, fy = f.diff(x), f.diff(y)

    def quotient_dimension(ideal):
        basis = sympy.groebner(ideal, x, y, order="grevlex")
        leading = [sympy.Poly(g, x, y).monoms(order="grevlex")[0] for g in basis.exprs]
        return sum(1 for a in range(40) for b in range(40) if not any(a >= m[0] and b >= m[1] for m in leading))

    # tau: (f, f_x, f_y) has the origin as its only zero, so the global count is the local one
    assert sympy.solve([f, fx, fy], [x, y]) == [(0, 0)]
    tau = quotient_dimension([f, fx, fy])
    # mu: (f_x, f_y) also vanishes at two other points, each a simple zero (Hessian determinant non-zero)
    others = [s for s in sympy.solve([fx, fy], [x, y], dict=True) if s != {x: 0, y: 0}]
    hessian = sympy.Matrix([[fx.diff(x), fx.diff(y)], [fy.diff(x), fy.diff(y)]]).det()
    assert all(sympy.simplify(hessian.subs(s)) != 0 for s in others)
    mu = quotient_dimension([fx, fy]) - len(others)
    assert (mu, tau) == (12, 11)
    for seed in SEEDS:
        system, point = moved("x^4 + y^5 + x^2*y^3", ["x", "y"], seed)
        h = point_anatomy(system, point, seed=seed).hypersurface
        assert (h.milnor, h.tjurina, h.quasi_homogeneous) == (mu, tau, False)
        assert (h.type.family, h.decided_by) == (Family.NOT_SIMPLE, TypeTest.CUBIC_VANISHES)


def tangent_cone_value(cone, tangent):
    """|cone(t)| for a unit tangent t (0 on the tangent cone)."""
    x, y = tangent
    return abs(cone(x, y))


@pytest.mark.parametrize("seed", SEEDS)
def test_node_has_two_real_branches_along_its_tangent_cone(seed):
    # y^2 = x^2 + x^3: a node with tangent cone y^2 - x^2 = 0 (common practice, no source).
    anatomy = point_anatomy(parse_system(["y^2 - x^2 - x^3"], ["x", "y"]), [0, 0], seed=seed)
    assert [(b.multiplicity, b.real) for b in anatomy.branches] == [(1, True), (1, True)]
    assert all(tangent_cone_value(lambda x, y: y * y - x * x, b.tangent) < 1e-3 for b in anatomy.branches)
    assert anatomy.motion is Motion.SWITCH and anatomy.transversal


@pytest.mark.parametrize("seed", SEEDS)
def test_cusp_is_one_branch_of_multiplicity_two(seed):
    # y^2 = x^3: one real branch of multiplicity 2 tangent to y = 0: a dead point (common practice, no source).
    anatomy = point_anatomy(parse_system(["y^2 - x^3"], ["x", "y"]), [0, 0], seed=seed)
    assert [(b.multiplicity, b.real) for b in anatomy.branches] == [(2, True)]
    assert abs(anatomy.branches[0].tangent[1]) < 1e-3
    assert anatomy.motion is Motion.DEAD_POINT


@pytest.mark.parametrize("seed", SEEDS)
def test_ordinary_triple_point_has_three_branches(seed):
    # x^3 - 3 x y^2 + x^4 + y^4: an ordinary triple point, tangent cone x (x^2 - 3 y^2) (three distinct
    # lines; common practice, no source). D4 type, three smooth real branches.
    anatomy = point_anatomy(parse_system(["x^3 - 3*x*y^2 + x^4 + y^4"], ["x", "y"]), [0, 0], seed=seed)
    assert anatomy.multiplicity == 3 and anatomy.hypersurface.type.label == "D4"
    assert [(b.multiplicity, b.real) for b in anatomy.branches] == [(1, True)] * 3
    assert all(tangent_cone_value(lambda x, y: x**3 - 3 * x * y * y, b.tangent) < 1e-3 for b in anatomy.branches)
    tangents = np.array([b.tangent for b in anatomy.branches])
    assert np.max(np.abs(tangents @ tangents.conj().T - np.eye(3))) < 0.9  # three different lines


@pytest.mark.parametrize("seed", SEEDS)
def test_isolated_real_point_has_two_conjugate_branches(seed):
    # x^2 + y^2 = 0: two complex conjugate lines y = +-i x, no real branch: an isolated real point (common
    # practice, no source).
    anatomy = point_anatomy(parse_system(["x^2 + y^2"], ["x", "y"]), [0, 0], seed=seed)
    assert [(b.multiplicity, b.real) for b in anatomy.branches] == [(1, False), (1, False)]
    assert sorted(round(float((b.tangent[1] / b.tangent[0]).imag)) for b in anatomy.branches) == [-1, 1]
    assert anatomy.real_branches == 0 and anatomy.motion is Motion.LOCKED
    assert "locked" in anatomy.sentence


@pytest.mark.parametrize("seed", [1, 5])
def test_demo_linkage_branch_points_have_two_real_branches(seed):
    # The parallelogram four-bar at its change points: two real branches (parallelogram and crossed
    # motion) cross; along the parallelogram branch crank and rocker turn together (by construction of the
    # parallelogram; common practice, no source).
    path = EXAMPLES / "parallel_linkage.toml"
    system = numag.load_system(path)
    angles = load_angles(path, system.variables)
    locus = numag.singular_locus(system, seed=seed)
    anatomy = locus_anatomy(locus, angles=angles)
    assert len(anatomy.points) == 2
    for a in anatomy.points.values():
        assert a.multiplicity == 2 and a.real_branches == 2 and a.motion is Motion.SWITCH
        rates = [b.angle_rates for b in a.branches]
        assert any(abs(r["crank"] - r["rocker"]) < 1e-4 for r in rates)
        assert "switch branch" in a.sentence


@pytest.mark.parametrize("seed", [2, 7])
def test_whitney_umbrella_pinch_point(seed):
    # x^2 = y^2 z: singular along the z-axis with transversal type A1, except at the pinch point (the
    # origin), where the normal slice is a cusp, A2 (common practice, no source).
    umbrella = parse_system(["x^2 - y^2*z"], ["x", "y", "z"])
    locus = numag.singular_locus(umbrella, seed=seed)
    line = [c for c in locus.components if c.dimension == 1][0]
    anatomy = component_anatomy(umbrella, line, seed=seed)
    assert anatomy.transversal.hypersurface.type.label == "A1" and anatomy.transversal.multiplicity == 2
    # the normal slice is complex: its branches' reality is not decided (not "0 real"), no motion is told
    transversal = anatomy.transversal
    assert transversal.real_branches is None and transversal.motion is None
    assert all(b.real is None for b in transversal.branches or [])
    assert len(anatomy.special_points) == 1
    pinch = anatomy.special_points[0]
    assert np.max(np.abs(pinch.point)) < 1e-8
    assert (pinch.hypersurface.type.label, pinch.hypersurface.milnor) == ("A2", 2)
    data = json.loads(json.dumps(anatomy.to_dict(), allow_nan=False))
    assert ComponentAnatomy.from_dict(data).to_dict() == anatomy.to_dict()


def test_json_round_trip_of_a_locus_anatomy():
    system = parse_system(["y^2 - x^2 - x^3"], ["x", "y"])
    locus = numag.singular_locus(system, seed=3)
    anatomy = locus_anatomy(locus)
    text = json.dumps(anatomy.to_dict(), allow_nan=False)
    back = LocusAnatomy.from_dict(json.loads(text))
    assert back.to_dict() == anatomy.to_dict()
    point = next(iter(back.points.values()))
    assert isinstance(point, PointAnatomy) and point.motion is Motion.SWITCH


def test_cli_singular_anatomy_on_the_demo_linkage(tmp_path):
    from numag.app.cli import main
    import io
    import contextlib
    out = io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(io.StringIO()):
        code = main(["singular", str(EXAMPLES / "parallel_linkage.toml"), "--seed", "1", "--anatomy"])
    text = out.getvalue()
    assert code == 0
    assert text.count("two real branches cross transversally: the mechanism can switch branch here") == 2
    assert "rocker +1.0000 deg" in text


def test_cli_check_anatomy_json_on_a_branch_point():
    # the crank and rocker both at 180 degrees: a branch point of the demo linkage (common practice, no source)
    from numag.app.cli import main
    import io
    import contextlib
    out = io.StringIO()
    with contextlib.redirect_stderr(io.StringIO()):
        code = main(["check", str(EXAMPLES / "parallel_linkage.toml"), "--point", "c1=-1,s1=0,c2=-1,s2=0",
                     "--anatomy", "--json", "--seed", "3"], out=out)
    data = json.loads(out.getvalue())
    anatomy = data["points"][0]["anatomy"]
    assert code == 0 and anatomy["real_branches"] == 2 and anatomy["motion"] == "switch"
    assert PointAnatomy.from_dict(anatomy).to_dict() == anatomy


def test_bad_input_is_one_line():
    # a projective system and a point of the wrong size: one-line messages, no traceback (project rule)
    with pytest.raises(numag.NumagError, match="affine"):
        point_anatomy(parse_system(["x^2 - y*z"], ["x", "y", "z"], projective=True), [0, 0, 1], seed=0)
    with pytest.raises(numag.NumagError, match="coordinates"):
        point_anatomy(parse_system(["y^2 - x^3"], ["x", "y"]), [0, 0, 0], seed=0)


def test_a_non_isolated_point_is_reported_as_such():
    # x^2 y^2 = 0 is singular along both axes: at the origin mu is infinite, "not isolated" (common practice)
    anatomy = point_anatomy(parse_system(["x^2*y^2"], ["x", "y"]), [0, 0], seed=1)
    assert anatomy.hypersurface.type.family is Family.NOT_ISOLATED and anatomy.hypersurface.milnor is None


@pytest.mark.parametrize("seed", [1, 2])
@pytest.mark.parametrize("equations, branches, motion", [
    (["y^2 - x^3", "z - x - y"], [(2, True)], Motion.DEAD_POINT),                     # a space cusp
    (["y^2 - x^2 - x^3", "z - x*y"], [(1, True), (1, True)], Motion.SWITCH),          # a space node
    (["x^2 + y^2", "z - y"], [(1, False), (1, False)], Motion.LOCKED),                # two conjugate lines
], ids=["cusp", "node", "conjugate-lines"])
def test_branches_of_space_curves(equations, branches, motion, seed):
    # plane curves lifted to space by a graph z = g(x, y): the same branches as the plane curve (common
    # practice, no source); several equations go through the decomposition and tracked local slices
    anatomy = point_anatomy(parse_system(equations, ["x", "y", "z"]), [0, 0, 0], seed=seed)
    assert sorted((b.multiplicity, b.real) for b in anatomy.branches) == sorted(branches)
    assert anatomy.multiplicity == 2 and anatomy.motion is motion


def test_an_unclear_local_picture_counts_nothing():
    # A slice moved by 0.75 instead of 0.1 leaves every local point of the node y^2 = x^2 + x^3 between
    # "converging" and "staying" on every attempt (common practice, no source: the local points of a node lie
    # about eps / |a . t| from it, so they move by the factor eps2 / eps1). The picture is then unclear, and an
    # unclear picture must not report a multiplicity or branches (before, the last attempt's count was kept).
    f = parse_system(["y^2 - x^2 - x^3"], ["x", "y"]).polynomials[0].numeric()
    rng = np.random.default_rng(4)
    points, rows = hypersurface_witness(f, rng)
    picture = local_picture([f], 1, np.zeros(2), points, rows, rng, real=True,
                            options=LocalOptions(shrink=0.75, attempts=2))
    assert (picture.multiplicity, picture.orbits, picture.real_orbits) == (None, None, None)
    assert any("not counted" in note for note in picture.notes)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_real_point_with_rounding_in_its_imaginary_parts_has_real_branches(seed):
    # x^4 - y^4 = (x - y)(x + y)(x^2 + y^2): two real lines and two complex conjugate ones through the origin
    # (common practice, no source). A computed singular point carries rounding in its imaginary parts; it is
    # the real point, and its branches are read on real slices (before: 0 or 4 real branches by the seed).
    system = parse_system(["x^4 - y^4"], ["x", "y"])
    anatomy = point_anatomy(system, np.array([3e-13j, -2e-13j]), seed=seed)
    assert anatomy.multiplicity == 4
    assert sorted(b.real for b in anatomy.branches) == [False, False, True, True]
    assert anatomy.motion is Motion.SWITCH


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("equation, multiplicity, motion", [
    ("y^2 - x^3", 2, Motion.DEAD_POINT),       # (t^2, t^3): x = t^2 >= 0, the motion turns back
    ("y^3 - x^4", 3, Motion.SINGULAR_PASS),    # (t^3, t^4): x = t^3 runs through 0, y = |x|^(4/3)
    ("y^3 - x^5", 3, Motion.SINGULAR_PASS),    # (t^3, t^5)
    ("y^2 - x^5", 2, Motion.DEAD_POINT),       # (t^2, t^5)
], ids=["cusp", "y3-x4", "y3-x5", "y2-x5"])
def test_a_real_branch_turns_back_only_at_even_multiplicity(equation, multiplicity, motion, seed):
    # Hand computation: each curve is one real branch through the origin with the parametrisation beside it,
    # whose multiplicity is the lower exponent; along the tangent (the x-axis) the point moves as t^m, which keeps
    # its sign for m even (a dead point) and changes it for m odd (the motion passes). y^3 = x^4 was called a dead
    # point because its branch is singular.
    anatomy = point_anatomy(parse_system([equation], ["x", "y"]), [0, 0], seed=seed)
    assert [(b.multiplicity, b.real) for b in anatomy.branches] == [(multiplicity, True)]
    assert anatomy.motion is motion
