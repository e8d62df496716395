"""Families F(x; p): parameters in system files, the discriminant, regions with real counts, sweeps.

The checks against something outside numag name their source beside them.
"""

import io
import json
import math

import numpy as np
import pytest
import numag

from numag.app.cli import main
from numag.errors import InputError, SystemFileError
from numag.families.discriminant import DiscriminantOptions, discriminant
from numag.families.records import ComponentKind, PointKind
from numag.families.sweep import LABEL_UNIT, SweepHomotopy, parse_grid, real_by_separation, sweep
from numag.system.exact import ExactCoefficient
from numag.system.files import family_from_mapping
from numag.tracking.solve import solve_system

CUBIC = {"variables": ["x"], "parameters": ["p", "q"], "equations": ["x^3 + p*x + q"],
         "ranges": {"p": [-3, 3], "q": [-2, 2]}}
# A four-bar: ground pivots (0, 0) and (4, 0), crank 2 to A = (x1, y1), rocker 3 to B = (x2, y2), coupler |AB| = b.
FOUR_BAR = {"name": "four-bar", "variables": ["x1", "y1", "x2", "y2"], "parameters": ["b"],
            "equations": ["x1^2 + y1^2 = 4", "(x2 - 4)^2 + y2^2 = 9", "(x2 - x1)^2 + (y2 - y1)^2 = b^2"],
            "ranges": {"b": [0, 12]}}
# The same linkage with the crank held at 60 degrees (x1 = 1): isolated assembly positions.
FOUR_BAR_AT_CRANK = dict(FOUR_BAR, name="four-bar at a crank angle", equations=FOUR_BAR["equations"] + ["x1 = 1"])


def _write(tmp_path, name, data):
    lines = []
    for key, value in data.items():
        if key == "ranges":
            continue
        lines.append(f"{key} = {json.dumps(value)}")
    if "ranges" in data:
        lines.append("[ranges]")
        lines += [f"{k} = {json.dumps(v)}" for k, v in data["ranges"].items()]
    path = tmp_path / name
    path.write_text("\n".join(lines) + "\n")
    return str(path)


# --- system files ---------------------------------------------------------------------------------------

def test_a_member_is_the_exact_substitution():
    family = family_from_mapping(CUBIC)
    assert family.variables == ("x",) and family.parameters == ("p", "q")
    assert family.ranges["q"].low == -2.0
    member = family.member(family.values_from_text("p=-3, q=1/3"))
    assert member.to_texts() == ["x^3 - 3*x + 1/3"] and member.is_exact


@pytest.mark.parametrize("data, words", [
    (dict(CUBIC, ranges={"r": [0, 1]}), "names no parameter"),
    (dict(CUBIC, ranges={"p": [1, 0]}), "low < high"),
    (dict(CUBIC, parameters=["x"]), "both a variable and a parameter"),
    (dict(CUBIC, parameters="p"), "list of strings"),
])
def test_bad_families_are_named(data, words):
    with pytest.raises(SystemFileError, match=words):
        family_from_mapping(data)


def test_every_command_that_reads_a_system_takes_at(tmp_path):
    path = _write(tmp_path, "cubic.toml", CUBIC)
    out = io.StringIO()
    assert main(["solve", path, "--at", "p=-3,q=2", "--seed", "1"], out=out) == 0
    assert "x=-2" in out.getvalue()  # x^3 - 3x + 2 = (x - 1)^2 (x + 2) (common practice, no source)
    assert main(["solve", path], out=io.StringIO()) == 2             # values missing
    assert main(["check", path, "--at", "p=1", "--point", "x=0"], out=io.StringIO()) == 2  # q missing
    assert main(["singular", path, "--at", "p=0,q=0", "--seed", "1"], out=io.StringIO()) in (0, 3)



@pytest.mark.parametrize("seed", [1, 2, 3])
def test_family_commands_fix_some_parameters_with_at(tmp_path, seed):
    # x^3 + p x + q at p = -3: the discriminant -4 p^3 - 27 q^2 = 108 - 27 q^2 vanishes at q = +-2, with 3 real
    # roots between and 1 outside (common practice, no source)
    path = _write(tmp_path, "cubic.toml", CUBIC)
    out = io.StringIO()
    assert main(["discriminant", path, "--at", "p=-3", "--seed", str(seed), "--json"], out=out) == 0
    data = json.loads(out.getvalue())
    assert data["parameters"] == ["q"]
    assert np.allclose(sorted(complex(*v).real if isinstance(v, list) else float(v) for v in data["real_points"]),
                       [-2, 2], atol=1e-8)
    out = io.StringIO()
    assert main(["sweep", path, "--at", "p=-3", "--grid", "q=-3:3:7", "--seed", str(seed)], out=out) == 0
    assert "q=-1 to q=1: 3" in out.getvalue() and "q=-3: 1" in out.getvalue()


@pytest.mark.parametrize("at, words", [("p=-3,q=1", "leave at least one free"), ("r=1", "not a parameter"),
                                       ("p=", "not of the form")])
def test_fixing_every_or_an_unknown_parameter_is_refused(tmp_path, capsys, at, words):
    path = _write(tmp_path, "cubic.toml", CUBIC)
    for command in (["discriminant", path], ["sweep", path, "--grid", "q=0:1:2"]):
        assert main(command + ["--at", at], out=io.StringIO()) == 2
        assert words in capsys.readouterr().err

# --- the cubic x^3 + p x + q ------------------------------------------------------------------------------

@pytest.fixture(scope="module")
def cubic_discriminant():
    return discriminant(family_from_mapping(CUBIC), DiscriminantOptions(lines=5), seed=11)


def test_cubic_discriminant_is_the_curve_of_degree_three(cubic_discriminant):
    # The discriminant of x^3 + p x + q is 4 p^3 + 27 q^2 = 0, a curve of degree 3 (common practice, no source).
    finite = [c for c in cubic_discriminant.components if c.kind == ComponentKind.FINITE]
    assert [(c.dimension, c.degree) for c in finite] == [(1, 3)]
    p, q = finite[0].points[:, 0], finite[0].points[:, 1]
    assert np.all(np.abs(4 * p ** 3 + 27 * q ** 2) <= 1e-8 * (1 + np.abs(p) ** 3 + np.abs(q) ** 2))
    rows = finite[0].slice_rows  # the witness points lie on the (real) slice, one line in the plane
    assert np.allclose(rows[0, 0] + rows[0, 1] * p + rows[0, 2] * q, 0, atol=1e-9)


def test_discriminant_path_counts_add_up(cubic_discriminant):
    # The blocks of several homotopies are added; the total of failures is the sum of its reasons and the
    # statuses add up to the paths tracked (the README's promise for every 'paths' block).
    from numag.tracking.tracker import FAILURE_LABELS
    paths = cubic_discriminant.paths
    assert paths["failed"] == sum(paths.get(label, 0) for label in FAILURE_LABELS)
    assert paths["converged"] + paths["singular_endpoint"] + paths["at_infinity"] + paths["failed"] == paths["tracked"]


def test_cubic_discriminant_has_a_cusp_at_the_origin():
    # On the line p = -t the curve 4 p^3 + 27 q^2 = 0 has the two real points q = +-2 (t / 3)^(3/2), which meet
    # at the origin tangent to one line (a cusp: q ~ |p|^(3/2)); on p = 0 they are one (common practice, no source).
    family = family_from_mapping(CUBIC)
    for t in (1e-1, 1e-3):
        line = family.restricted(0, ExactCoefficient.rational(-1) * ExactCoefficient.from_complex(t))
        points = discriminant(line, DiscriminantOptions(regions=False, at_infinity=False), seed=5).real_points
        assert np.allclose(points, [-2 * (t / 3) ** 1.5, 2 * (t / 3) ** 1.5], rtol=1e-7, atol=1e-14)
    origin = discriminant(family.restricted(0, ExactCoefficient.rational(0)),
                          DiscriminantOptions(regions=False, at_infinity=False), seed=5)
    assert len(origin.real_points) == 1 and abs(origin.real_points[0]) <= 1e-8


def test_cubic_regions_count_three_real_roots_inside_the_cusp(cubic_discriminant):
    # 3 real roots where 4 p^3 + 27 q^2 < 0, 1 where it is > 0 (common practice, no source).
    regions = cubic_discriminant.regions
    assert regions and all(r.count.failed == 0 for r in regions)
    for region in regions:
        p, q = region.sample
        assert region.count.solutions == (3 if 4 * p ** 3 + 27 * q ** 2 < 0 else 1)
    assert {r.count.solutions for r in regions} == {1, 3}


# --- the four-bar with a free coupler length b --------------------------------------------------------------

@pytest.fixture(scope="module")
def four_bar_discriminant():
    return discriminant(family_from_mapping(FOUR_BAR), seed=7)


def test_four_bar_discriminant_points_match_the_elimination(four_bar_discriminant):
    sympy = pytest.importorskip("sympy")
    # sympy's elimination (lex Groebner basis of F and the 3 x 3 minors of J_x) is the reference.
    x1, y1, x2, y2, b = sympy.symbols("x1 y1 x2 y2 b")
    equations = [x1 ** 2 + y1 ** 2 - 4, (x2 - 4) ** 2 + y2 ** 2 - 9, (x2 - x1) ** 2 + (y2 - y1) ** 2 - b ** 2]
    jacobian = sympy.Matrix(equations).jacobian([x1, y1, x2, y2])
    minors = [jacobian[:, list(columns)].det() for columns in ((0, 1, 2), (0, 1, 3), (0, 2, 3), (1, 2, 3))]
    basis = sympy.groebner(equations + minors, x1, y1, x2, y2, b, order="lex")
    eliminant = [g for g in basis.exprs if g.free_symbols <= {b}][0]
    roots = sorted(float(r) for r in sympy.real_roots(sympy.Poly(eliminant, b)))
    roots = sorted(set(round(r, 12) for r in roots))
    assert np.allclose(four_bar_discriminant.real_points, roots, atol=1e-8)
    # with b >= 0: b = 0 and the Grashof equalities b = 1, 3, 5, 9 (common practice, no source)
    nonnegative = four_bar_discriminant.real_points[four_bar_discriminant.real_points > -1e-8]
    assert np.allclose(nonnegative, [0, 1, 3, 5, 9], atol=1e-8)


def test_four_bar_picture_labels_the_lengths_as_the_text_does(four_bar_discriminant):
    import xml.dom.minidom
    from numag.app.commands.common import _rounding_floor
    from numag.app.picture import discriminant_svg

    # The dots are labelled b = 0, +-1, +-3, +-5, +-9 (sympy's eliminant b^2 (b^2 - 1)(b^2 - 9)(b^2 - 25)(b^2 - 81),
    # as above); b = 0 computes as a rounding error, which the picture must not print as a value.
    svg = discriminant_svg(four_bar_discriminant, _rounding_floor(four_bar_discriminant))
    labels = [t.firstChild.data for t in xml.dom.minidom.parseString(svg).getElementsByTagName("text")
              if t.getAttribute("font-size") == "10"]
    assert labels == ["-9", "-5", "-3", "-1", "0", "1", "3", "5", "9"]


def test_four_bar_branches_change_at_the_grashof_lengths(four_bar_discriminant):
    # Lengths 4, 2, 3, b: a Grashof linkage (s + l < p + q) has two assembly branches, a non-Grashof one has one,
    # and with b > 2 + 3 + 4 it cannot be assembled (Grashof's criterion; common practice, no source).
    expected = {(0, 1): 2, (1, 3): 1, (3, 5): 2, (5, 9): 1, (9, math.inf): 0}
    found = {}
    for region in four_bar_discriminant.regions:
        if region.low >= -1e-8:
            found[(round(region.low), region.high if math.isinf(region.high) else round(region.high))] = \
                region.count.branches
    assert found == expected
    assert all(r.count.failed == 0 for r in four_bar_discriminant.regions)


def test_four_bar_singular_at_infinity_for_every_length_is_told_apart(four_bar_discriminant):
    # Every circle passes through the circular points (1 : +-i : 0) at infinity (common practice, no source):
    # the closures of all members meet there, for every b, which is no condition on b.
    kinds = [c.kind for c in four_bar_discriminant.components]
    assert kinds.count(ComponentKind.FINITE) == 9 and kinds.count(ComponentKind.EVERY_MEMBER) == 1
    assert all(c.dimension == 0 for c in four_bar_discriminant.components if c.kind == ComponentKind.FINITE)


def test_solutions_running_off_to_infinity_are_told_apart():
    # b x^2 = 1: for b -> 0 both roots x = +-1/sqrt(b) run off to infinity; no finite member is singular
    # (common practice, no source). The value b = 0 still cuts the line: no real root below, two above.
    family = family_from_mapping({"variables": ["x"], "parameters": ["b"], "equations": ["b*x^2 - 1"]})
    result = discriminant(family, seed=3)
    assert [(c.kind, c.dimension) for c in result.components] == [(ComponentKind.AT_INFINITY, 0)]
    assert abs(result.components[0].points[0, 0]) <= 1e-10 and len(result.real_points) == 0
    assert [r.count.solutions for r in result.regions] == [0, 2]


def test_discriminant_round_trip(tmp_path, cubic_discriminant):
    path = tmp_path / "cubic.json"
    numag.save(cubic_discriminant, path)
    again = numag.load(path)
    assert again.to_dict() == cubic_discriminant.to_dict()
    assert again.components[0].kind == ComponentKind.FINITE


# --- sweeps --------------------------------------------------------------------------------------------------

def test_the_label_coordinate_never_moves():
    family = family_from_mapping(FOUR_BAR_AT_CRANK)
    rng = np.random.default_rng(0)
    homotopy = SweepHomotopy(family, [1 + 1j], [[2.0], [3.0]], rng.standard_normal(5) + 0j, 1j)
    points = homotopy.start_points(rng.standard_normal((3, 4)) + 0j)
    assert homotopy.labels_of(points).tolist() == [0, 0, 0, 1, 1, 1]
    values, jacobian, derivative = homotopy.evaluate(points, np.full(len(points), 0.5))
    step = np.linalg.solve(jacobian, np.stack([values, derivative], axis=2))
    assert np.all(np.abs(step[:, -1, :]) <= 1e-12 * LABEL_UNIT * 1e3 + 1e-15)


def test_sweep_matches_direct_solves(tmp_path):
    # 1,000 coupler lengths; the member at 20 of them solved directly (total degree) is the reference.
    family = family_from_mapping(FOUR_BAR_AT_CRANK)
    rng = np.random.default_rng(2024)
    values = rng.uniform(0.2, 8.0, 1000)
    # the assembly positions collide at b = sqrt(12) -+ 3, where A = (1, sqrt 3) is at distance sqrt 12 from
    # the rocker pivot (common practice, no source): checks keep away from them
    critical = np.array([math.sqrt(12) - 3, math.sqrt(12) + 3])
    away = np.nonzero(np.min(np.abs(values[:, None] - critical[None, :]), axis=1) > 0.05)[0]
    checked = rng.choice(away, 20, replace=False)
    result = sweep(family, values[:, None], seed=3)
    assert result.failed == 0 and result.start_solutions == 4
    for k in checked:
        direct = solve_system(family.member([ExactCoefficient.from_complex(values[k])]), seed=int(k))
        expected = np.array([s.point for s in direct.solutions])
        found = result.values[k].points
        assert found.shape == expected.shape
        distance = np.abs(found[:, None, :] - expected[None, :, :]).max(axis=2)
        assert np.all(distance.min(axis=1) <= 1e-10 * (1 + np.abs(found).max()))
        assert result.values[k].real_count == sum(s.real for s in direct.solutions)
    # 4 real positions exactly for sqrt(12) - 3 < b < sqrt(12) + 3 (the triangle inequality)
    inside = (values > critical[0]) & (values < critical[1])
    sure = np.min(np.abs(values[:, None] - critical[None, :]), axis=1) > 1e-6
    assert np.array_equal(result.real_counts()[sure], np.where(inside, 4, 0)[sure])
    path = tmp_path / "sweep.json"
    numag.save(result, path)
    assert numag.load(path).to_dict() == result.to_dict()


@pytest.mark.parametrize("scale", [1e-6, 1.0, 1e6])
def test_realness_by_separation_is_scale_free(scale):
    # A real polynomial's non-real roots come in conjugate pairs (common practice, no source): (x - 1)(x - 1 - d)
    # (x^2 + 1) with d = 1e-6 has two real roots 1e-6 apart, computed here with imaginary parts of 1e-10 (as near
    # a fold), and the pair +-i; the verdict is the same at every scale of x.
    roots = scale * np.array([[1 + 1e-10j], [1 + 1e-6 - 1e-10j], [1j], [-1j]])
    assert real_by_separation(roots).tolist() == [True, True, False, False]
    assert real_by_separation(np.zeros((0, 1))).shape == (0,)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_real_counts_next_to_the_discriminant_do_not_depend_on_the_seed(seed):
    # x^3 - 3x + q has 3 real roots for |q| < 2 and 1 for |q| > 2 (the discriminant 108 - 27 q^2; common practice,
    # no source); values 1e-7 from q = +-2, where two real roots are about 4e-4 apart
    family = family_from_mapping({"variables": ["x"], "parameters": ["q"], "equations": ["x^3 - 3*x + q"]})
    values = np.array([2 - 1e-7, 2 + 1e-7, -2 + 1e-7, -2 - 1e-7, 0.5, 3.0])
    result = sweep(family, values[:, None], seed=seed)
    assert result.failed == 0
    assert result.real_counts().tolist() == [3, 1, 3, 1, 3, 1]


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_roots_closer_than_double_precision_resolves_are_pulled_apart(seed):
    sympy = pytest.importorskip("sympy")
    # x^3 - 3x + q from 1e-11 to 1e-14 of q = +-2, where two roots are 4e-6 to 1e-7 apart (real inside, a conjugate
    # pair outside): the tracked endpoints merge them; sympy's real root isolation (Meurer et al., "SymPy: symbolic
    # computing in Python", PeerJ Computer Science, 2017) on the exact binary value of each q gives the count.
    family = family_from_mapping({"variables": ["x"], "parameters": ["q"], "equations": ["x^3 - 3*x + q"]})
    offsets = 10.0 ** -np.arange(11, 15)
    values = np.concatenate([2 - offsets, 2 + offsets, -2 + offsets, -2 - offsets, [2.0]])
    x = sympy.symbols("x")
    expected = [len(sympy.Poly(x ** 3 - 3 * x + sympy.Rational(float(q)), x).real_roots(multiple=True))
                for q in values]
    result = sweep(family, values[:, None], seed=seed)
    assert result.failed == 0 and expected[:-1] == [3] * 4 + [1] * 4 + [3] * 4 + [1] * 4
    assert result.real_counts().tolist()[:-1] == expected[:-1]
    separated = result.values[0]  # 1e-11 below 2: the roots 1 -+ sqrt(1e-11 / 3), each its own regular point
    assert separated.kinds == [PointKind.REGULAR] * 3 and separated.paths.tolist() == [1, 1, 1]
    # q = 2 exactly: the double root x = 1 stays one point where J_x drops rank (sympy counts it twice)
    on = result.values[-1]
    assert on.real_count == 2 and on.kinds.count(PointKind.RANK_DROP) == 1 and expected[-1] == 3
    assert abs(on.rank_drops[0, 0] - 1) <= 1e-6


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_four_bar_within_1e_12_of_a_branch_point_keeps_its_four_positions(seed):
    # Crank at 60 degrees: A = (1, +-sqrt 3), 2 sqrt 3 from the rocker pivot (4, 0). The coupler circle about A
    # (radius b) meets the rocker circle (radius 3) in two real points when |b - 3| < 2 sqrt 3 < b + 3 and in none
    # beyond (two circles; common practice, no source): 4 positions just below b = 3 + 2 sqrt 3, 0 just above.
    family = family_from_mapping(FOUR_BAR_AT_CRANK)
    edge = 3 + 2 * math.sqrt(3)
    result = sweep(family, [[edge - 1e-12], [edge + 1e-12], [edge - 1e-3]], seed=seed)
    assert result.failed == 0 and result.real_counts().tolist() == [4, 0, 4]
    assert all(kind == PointKind.REGULAR for member in result.values for kind in member.kinds)


def test_sweep_reports_the_rank_drop_on_the_discriminant():
    family = family_from_mapping({"variables": ["x"], "parameters": ["q"], "equations": ["x^3 - 3*x + q"]})
    result = sweep(family, [[2.0], [0.0]], seed=4)
    # x^3 - 3x + 2 = (x - 1)^2 (x + 2): a double root at x = 1 (common practice, no source)
    at_two = result.values[0]
    assert [k for k in at_two.kinds].count(PointKind.RANK_DROP) == 1
    assert abs(at_two.rank_drops[0, 0] - 1) <= 1e-6
    assert result.values[1].real_count == 3 and result.values[1].rank_drops.shape[0] == 0


def test_grids_and_value_files(tmp_path):
    assert parse_grid("b=0:10:1001", ["b"]).shape == (1001, 1)
    for bad in ("b=0:10", "c=0:1:2", "b=0:1:0", "b=0:inf:3"):
        with pytest.raises(InputError):
            parse_grid(bad, ["b"])
    path = _write(tmp_path, "bar.toml", FOUR_BAR_AT_CRANK)
    values = tmp_path / "values.csv"
    values.write_text("b\n1.5\n2.5\n")
    csv_out = tmp_path / "out.csv"
    assert main(["sweep", path, "--values", str(values), "--csv", str(csv_out), "--seed", "1"], out=io.StringIO()) == 0
    rows = csv_out.read_text().splitlines()
    assert rows[0].startswith("b,real_solutions") and len(rows) == 1 + 8  # 4 real positions at each length
    values.write_text("c\n1\n")
    assert main(["sweep", path, "--values", str(values)], out=io.StringIO()) == 2
    assert main(["sweep", path, "--grid", "b=1:2"], out=io.StringIO()) == 2
    assert main(["discriminant", _write(tmp_path, "plain.toml", {"variables": ["x"], "equations": ["x^2"]})],
                out=io.StringIO()) == 2


def test_the_sweep_csv_has_an_undecided_column_as_the_readme_says(tmp_path):
    import csv
    import dataclasses
    import pathlib
    import re

    from numag.app.commands.sweep import _csv_text

    # x^2 = p: two real roots for p > 0, none for p < 0 (common practice, no source)
    family = family_from_mapping({"variables": ["x"], "parameters": ["p"], "equations": ["x^2 - p"]})
    result = sweep(family, [[1.0], [-1.0]], seed=1)
    rows = list(csv.DictReader(io.StringIO(_csv_text(result))))
    assert [(r["p"], r["real_solutions"], r["undecided"]) for r in rows] == [("1", "2", "0"), ("1", "2", "0"),
                                                                             ("-1", "0", "0")]
    assert sorted(float(r["x"]) for r in rows[:2]) == pytest.approx([-1.0, 1.0], abs=1e-12)
    # a value whose count is undecided (decision 0104) says so in its rows
    doubtful = dataclasses.replace(result, values=[dataclasses.replace(result.values[1], undecided=2)])
    assert [r["undecided"] for r in csv.DictReader(io.StringIO(_csv_text(doubtful)))] == ["2"]
    # the README documents the header the command writes
    readme = (pathlib.Path(__file__).resolve().parents[1] / "README.md").read_text()
    header = next(csv.reader(io.StringIO(_csv_text(result))))
    documented = re.search(r"`--csv` writes one row per real solution.*?then the unknowns", readme, re.S).group(0)
    assert all(f"`{name}`" in documented for name in header[1:-1])


def test_command_line_tables_pictures_and_saved_results(tmp_path):
    import xml.dom.minidom

    # x^2 = p has no real root for p < 0 and two for p > 0 (common practice, no source)
    path = _write(tmp_path, "square.toml", {"variables": ["x"], "parameters": ["p"], "equations": ["x^2 - p"]})
    out = io.StringIO()
    saved, picture = tmp_path / "d.json", tmp_path / "d.svg"
    assert main(["discriminant", path, "--seed", "2", "--output", str(saved), "--svg", str(picture)], out=out) == 0
    assert "p in (-inf, 0): 0 real solutions" in out.getvalue() and "p in (0, inf): 2 real solutions" in out.getvalue()
    assert [r.count.solutions for r in numag.load(saved).regions] == [0, 2]
    labels = [t.firstChild.data for t in xml.dom.minidom.parse(str(picture)).getElementsByTagName("text")]
    assert "0" in labels and "2" in labels
    picture = tmp_path / "s.svg"
    assert main(["sweep", path, "--grid", "p=-1:1:4", "--seed", "2", "--svg", str(picture), "--json"], out=out) == 0
    assert xml.dom.minidom.parse(str(picture)).getElementsByTagName("polyline")


def test_an_undecided_discriminant_says_why():
    # exit 3 must come with its reason, in the text and in the JSON: failed paths are named by kind
    from numag.app.report import discriminant_warnings as _warnings
    result = discriminant(numag_family("x^3 - 3*x + b"), DiscriminantOptions(regions=False), seed=1)
    assert _warnings(result) == []
    result.paths["endgame_unsettled"] = 3
    (warning,) = _warnings(result)
    assert "3 paths" in warning and "3 endgame_unsettled" in warning


def numag_family(equation):
    from numag.system.files import family_from_mapping
    return family_from_mapping({"variables": ["x"], "parameters": ["b"], "equations": [equation]})


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_sweep_prints_neighbouring_values_apart(tmp_path, seed):
    # x^3 - 3 x + p: discriminant 108 - 27 p^2 (= -4 a^3 - 27 b^2 for x^3 + a x + b, common practice, no source)
    # vanishes at p = 2: 3 real roots below, a double root and a simple one at 2, 1 real root above. The five
    # values 5e-15 apart must print as five different numbers, each within a rounding of the grid's value (hand:
    # the grid is 1.99999999999999 + k * 5e-15, k = 0..4), in the order given.
    path = tmp_path / "cub.toml"
    path.write_text('variables = ["x"]\nparameters = ["p"]\nequations = ["x^3 - 3*x + p"]\n')
    out = io.StringIO()
    assert main(["sweep", str(path), "--grid", "p=1.99999999999999:2.00000000000001:5", "--seed", str(seed)],
                out=out) == 0
    text = out.getvalue()
    lines = text.split("runs of equal counts)\n")[1].split("\n\n")[0].splitlines()
    shown, counts = [], []
    for line in lines:
        span, count = line.strip().rsplit(": ", 1)
        shown += [float(v.split("=")[1]) for v in span.split(" to ")]
        counts.append(int(count))
    assert counts == [3, 2, 1]
    grid = [1.99999999999999 + k * 5e-15 for k in range(5)]
    assert len(set(shown)) == len(shown) == 5 and shown == sorted(shown)  # runs of 2, 1 and 2 values: all shown
    assert all(min(abs(v - g) for g in grid) < 1e-15 for v in shown)


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("unit", [1, 1000])
def test_a_swept_rank_drop_prints_no_digit_below_its_accuracy(tmp_path, seed, unit):
    # x^3 - 3x + 2 = (x - 1)^2 (x + 2): the double root x = 1 at p = 2 (hand computation), in units of x times
    # `unit`. A root where two paths meet is known to about sqrt(eps): "1+6e-14*I" was rounding printed as data.
    equation = f"x^3 - {3 * unit ** 2}*x + {2 * unit ** 3}*p / 2"
    path = _write(tmp_path, "fold.toml", {"variables": ["x"], "parameters": ["p"], "equations": [equation]})
    out = io.StringIO()
    assert main(["sweep", path, "--grid", "p=1:3:5", "--seed", str(seed)], out=out) == 0
    text = out.getvalue()
    assert f"at p=2: x={unit}\n" in text, text


@pytest.mark.parametrize("text, exponent", [("1e400", 400), ("-3e-500", -500), ("12345e305", 309)])
def test_a_value_beyond_the_double_range_is_named_by_its_size(text, exponent):
    # the largest double is about 1.8e308 (IEEE 754, common practice, no source): the error gave the first 40
    # digits of 10^400, which read as 10^39; a value below its range was read as 0, another member
    from numag.families.sweep import parse_value
    with pytest.raises(InputError, match=rf"about 10\^{exponent} is (beyond|below) the double range"):
        parse_value(text)


def test_a_grid_end_beyond_the_double_range_says_so():
    # the same range (IEEE 754, common practice, no source) for --grid's ends: "is not start:stop:count" hid it
    with pytest.raises(InputError, match=r"--grid: p: a value of about 10\^400 is beyond the double range"):
        parse_grid("p=1e400:2:3", ["p"])
