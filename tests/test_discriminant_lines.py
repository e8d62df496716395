"""Two parameters, members that are curves: the discriminant traced across lines, the regions of the plane.

The checks against something outside numag name their source beside them.
"""

import itertools
import math

import numpy as np
import pytest

from numag.families.branches import CountKind
from numag.families.discriminant import DiscriminantOptions, discriminant
from numag.families.lines import discriminant_on_lines, line_family
from numag.families.plane import CurvePointKind, reach_box
from numag.families.records import MISSED_ON_LINES
from numag.system.family import Family
from numag.system.files import family_from_mapping
from numag.system.parse import parse_system

# A four-bar: ground pivots (0, 0) and (4, 0), crank 2 to A = (x1, y1), coupler b from A to B = (x2, y2), rocker c
# from (4, 0) to B. Both b and c are free: every member is a curve (the linkage's motion).
FOUR_BAR = {"variables": ["x1", "y1", "x2", "y2"], "parameters": ["b", "c"],
            "equations": ["x1^2 + y1^2 = 4", "(x2 - 4)^2 + y2^2 = c^2", "(x2 - x1)^2 + (y2 - y1)^2 = b^2"],
            "ranges": {"b": [0.5, 8], "c": [1, 5]}}
LOW, HIGH = np.array([0.5, 1.0]), np.array([8.0, 5.0])


@pytest.fixture(scope="module")
def four_bar():
    options = DiscriminantOptions(lines=5, trace_lines=40, components=False, at_infinity=False)
    return discriminant(family_from_mapping(FOUR_BAR), options, seed=5)


@pytest.fixture(scope="module")
def eliminant_lines():
    """The linear factors (a, b0, c0) of a b + b0 c + c0 of sympy's eliminant, and the eliminant's factors."""
    sympy = pytest.importorskip("sympy")
    # sympy's elimination (lex Groebner basis of F and the 3 x 3 minors of J_x, x eliminated) is the reference.
    x1, y1, x2, y2, b, c = sympy.symbols("x1 y1 x2 y2 b c")
    equations = [x1 ** 2 + y1 ** 2 - 4, (x2 - 4) ** 2 + y2 ** 2 - c ** 2, (x2 - x1) ** 2 + (y2 - y1) ** 2 - b ** 2]
    jacobian = sympy.Matrix(equations).jacobian([x1, y1, x2, y2])
    minors = [jacobian[:, list(columns)].det() for columns in itertools.combinations(range(4), 3)]
    basis = sympy.groebner(equations + minors, x1, y1, x2, y2, b, c, order="lex")
    eliminant = [g for g in basis.exprs if g.free_symbols <= {b, c}][0]
    factors = sympy.factor_list(eliminant)[1]
    lines = []
    for factor, power in factors:
        poly = sympy.Poly(factor, b, c)
        assert poly.total_degree() == 1
        lines.append(((float(poly.coeff_monomial(b)), float(poly.coeff_monomial(c)), float(poly.coeff_monomial(1))),
                      power))
    return lines


def test_the_eliminant_is_the_grashof_lines_and_the_zero_lengths(eliminant_lines):
    # Grashof's equalities 4 +- 2 +- b +- c = 0 (all four joints on one line) and the lines b = 0, c = 0 where a
    # length vanishes, the latter doubled (common practice, no source; sympy's elimination above).
    found = {}
    for (a, b0, c0), power in eliminant_lines:
        scale = a if a else b0
        found[(round(a / scale, 12), round(b0 / scale, 12), round(c0 / scale, 12))] = power
    grashof = {(1.0, float(sign_c), float(sign_k * k)): 1
               for sign_c, sign_k, k in itertools.product((1, -1), (1, -1), (2, 6))}
    assert found == {**grashof, (1.0, 0.0, 0.0): 2, (0.0, 1.0, 0.0): 2}


def _distance_to(point, line):
    (a, b0, c0), _ = line
    return abs(a * point[0] + b0 * point[1] + c0) / math.hypot(a, b0)


def test_every_traced_point_lies_on_a_grashof_line(four_bar, eliminant_lines):
    curve = four_bar.curve
    assert curve is not None and curve.failed_arcs == 0 and len(curve.arcs) >= 6
    points = np.vstack(curve.arcs)
    nearest = np.array([min(_distance_to(p, line) for line in eliminant_lines) for p in points])
    assert nearest.max() <= 1e-6


def test_each_grashof_line_across_the_box_is_traced_through(four_bar, eliminant_lines):
    # Each line of sympy's eliminant that crosses the box is covered along its whole segment in the box: samples
    # along the segment have a traced point of the same line within a few line spacings.
    crossing = 0
    for line in eliminant_lines:
        (a, b0, c0), power = line
        if power != 1:
            continue  # b = 0 and c = 0 lie outside the box (traced as multiple components: the test below)
        direction = np.array([-b0, a]) / math.hypot(a, b0)
        foot = -c0 * np.array([a, b0]) / (a * a + b0 * b0)
        ts = np.linspace(-20, 20, 4001)
        along = foot + ts[:, None] * direction
        inside = along[np.all((along >= LOW) & (along <= HIGH), axis=1)]
        if len(inside) < 2:
            continue
        crossing += 1
        # the samples lie on segments of the polylines whose both ends are on this line
        covered = np.zeros(len(inside), dtype=bool)
        for arc in four_bar.curve.arcs:
            for start, stop in zip(arc[:-1], arc[1:]):
                if max(_distance_to(start, line), _distance_to(stop, line)) > 1e-6:
                    continue
                step = stop - start
                t = np.clip((inside - start) @ step / max(step @ step, 1e-300), 0.0, 1.0)
                covered |= np.linalg.norm(start + t[:, None] * step - inside, axis=1) <= 1e-6
        assert covered.all()
    assert crossing == 5  # b + c = 2, b + c = 6, b - c = 2, c - b = 2 and b - c = 6 cross the box [0.5, 8] x [1, 5]


def test_the_double_lines_of_zero_length_are_found_flagged_and_cut_the_cells(four_bar, eliminant_lines):
    # b = 0 and c = 0 are the factors of power 2 of sympy's eliminant (above): there the member splits (a circle of
    # radius 0 is a pair of complex lines) and the line system has double solutions on every line
    double = [line for line in eliminant_lines if line[1] == 2]
    assert any("multiple point" in note and "length 0" in note for note in four_bar.notes)
    # every line crossing b = 0 or c = 0 in the region got that point (decision 0107: a miss would be counted)
    assert four_bar.paths.get(MISSED_ON_LINES, 0) == 0
    curve = four_bar.curve
    assert len(curve.multiple) == len(curve.arcs) and any(curve.multiple)
    for arc, flagged in zip(curve.arcs, curve.multiple):
        on_double = max(min(_distance_to(p, line) for line in double) for p in arc) <= 1e-8
        assert flagged == on_double
    # c = 0 crosses every vertical line b = v of the cells: each has a cut there
    for value, cuts in {c.line: None for c in four_bar.regions}.items():
        lows = [c.low for c in four_bar.regions if c.line == value]
        assert min(abs(low) for low in lows) <= 1e-8


def test_crossings_of_the_grashof_lines_are_the_nodes(four_bar, eliminant_lines):
    # Two lines of the eliminant meet in one point; in the box these are (4, 2) and (2, 4) (common practice, no
    # source: b + c = 6 meets b - c = 2 and c - b = 2).
    nodes = [s.point for s in four_bar.curve.special if s.kind == CurvePointKind.NODE]
    assert not any(s.kind == CurvePointKind.CUSP for s in four_bar.curve.special)
    crossings = []  # of all lines of the eliminant: b = 0 and c = 0 are traced too
    for (first, _), (second, _) in itertools.combinations(eliminant_lines, 2):
        matrix = np.array([first[:2], second[:2]])
        if abs(np.linalg.det(matrix)) > 1e-9:
            crossings.append(np.linalg.solve(matrix, -np.array([first[2], second[2]])))
    for node in nodes:
        assert min(np.linalg.norm(node - c) for c in crossings) <= 1e-6
    # refined by Gauss-Newton on two copies of (F, the 3 x 3 minors of J_x) over one (b, c); crossings on the
    # double lines b = 0, c = 0 (where X splits) are not regular solutions of that system and are not required to be
    off_double_lines = [s for s in four_bar.curve.special if np.abs(s.point).min() > 1e-6]
    assert off_double_lines and all(s.refined for s in off_double_lines)
    for expected in ([4.0, 2.0], [2.0, 4.0]):
        assert min(np.linalg.norm(node - expected) for node in nodes) <= 1e-10
    for expected in ([4.0, 2.0], [2.0, 4.0]):
        assert min(np.linalg.norm(node - expected) for node in nodes) <= 1e-6


def test_crossings_on_the_double_lines_are_located_on_circles_of_lines(four_bar, eliminant_lines):
    # Where a Grashof line meets b = 0 or c = 0 the singular points of the two arcs coincide (x = (2, 0, 4, 0) at
    # (b, c) = (2, 0)): neither the node's nor the meeting's Newton has a regular solution there (decision 0087).
    # Located by Cauchy integrals on a circle of line offsets (decision 0093), they are meetings at the exact
    # crossings of sympy's eliminant lines (common practice, no source), and nothing is left undecided.
    crossings = []
    for (first, _), (second, _) in itertools.combinations(eliminant_lines, 2):
        matrix = np.array([first[:2], second[:2]])
        if abs(np.linalg.det(matrix)) > 1e-9:
            crossings.append(np.linalg.solve(matrix, -np.array([first[2], second[2]])))
    special = four_bar.curve.special
    assert not [s for s in special if s.kind == CurvePointKind.UNDECIDED]
    on_double_lines = [s for s in special if np.abs(s.point).min() <= 1e-6]
    assert len(on_double_lines) >= 4  # (0, +-2), (+-2, 0) at least lie within the traced region
    for point in on_double_lines:
        assert point.kind == CurvePointKind.MEETING and point.refined
        assert min(np.linalg.norm(point.point - c) for c in crossings) <= 1e-8


def _grashof_branches(b, c):
    """Real assembly branches of the four-bar with lengths 4, 2, |b|, |c| (Grashof's criterion; common practice,
    no source): none when the longest link exceeds the sum of the others, two when s + l < p + q, else one."""
    lengths = sorted([4.0, 2.0, abs(b), abs(c)])
    if lengths[3] > sum(lengths[:3]):
        return 0
    return 2 if lengths[0] + lengths[3] < lengths[1] + lengths[2] else 1


def test_cells_and_regions_have_grashofs_branch_counts(four_bar):
    cells = four_bar.regions
    assert len(cells) >= 5 * 9 and all(c.count.failed == 0 for c in cells)
    for cell in cells:
        assert cell.count.kind == CountKind.BRANCHES
        assert cell.count.branches == _grashof_branches(*cell.sample)
    regions = four_bar.plane_regions
    # every cell reaching into the box and half its size around it (where the curve is traced) is in one region
    floor, ceiling = reach_box(LOW, HIGH)[0][1], reach_box(LOW, HIGH)[1][1]
    reaching = [k for k, c in enumerate(cells) if c.low < ceiling and c.high > floor]
    assert regions and sorted(k for r in regions for k in r.cells) == reaching
    for region in regions:
        assert {cells[k].count.branches for k in region.cells} == {region.count.branches}
    # the traced lines separate the cells: the regions inside the box, where b and c are lengths, are joined
    # across the lines p_1 = const (no region is one cell only there)
    inside = [r for r in regions if np.all((r.sample >= LOW) & (r.sample <= HIGH))]
    assert inside and any(len(r.cells) > 1 for r in inside)


def test_line_points_are_the_discriminant_of_a_circle_family():
    # x^2 + y^2 = r^2 + s is singular (at the origin) exactly where r^2 + s = 0 (common practice, no source): on the
    # vertical lines r = v the real discriminant point is s = -v^2, and the traced curve is the parabola.
    family = Family(parse_system(["x^2 + y^2 - r^2 - s"], ["x", "y", "r", "s"]), ("r", "s"))
    found = discriminant_on_lines(family, 1, ((-2.0, -4.0), (2.0, 1.0)), [-1.5, 0.25, 1.0], 30,
                                  np.random.default_rng(3))
    for value, cuts in found.cuts:
        assert np.allclose(cuts, [-value ** 2], atol=1e-9)
    points = np.vstack(found.arcs)
    assert np.abs(points[:, 1] + points[:, 0] ** 2).max() <= 1e-9
    assert points[:, 0].min() <= -1.9 and points[:, 0].max() >= 1.9  # traced through the box
    assert len(line_family(family, 1, np.random.default_rng(0)).parameters) == 4
    assert found.cusps == []  # the parabola folds over the lines (its ends joined) but has no cusp


@pytest.mark.parametrize("seed", [1, 2])
def test_curves_of_the_cubic_family_have_the_cuspidal_discriminant_and_two_or_one_branches(seed):
    # y^2 = x^3 + p x + q is singular where the cubic has a double root: 4 p^3 + 27 q^2 = 0, a cusp at the origin;
    # its real points form two components where the cubic has three real roots (4 p^3 + 27 q^2 < 0) and one
    # elsewhere (common practice, no source: the real picture of plane cubics).
    family = family_from_mapping({"variables": ["x", "y"], "parameters": ["p", "q"],
                                  "equations": ["y^2 - x^3 - p*x - q"], "ranges": {"p": [-3, 3], "q": [-3, 3]}})
    options = DiscriminantOptions(lines=5, trace_lines=40, components=False, at_infinity=False)
    result = discriminant(family, options, seed=seed)
    points = np.vstack(result.curve.arcs)
    assert np.abs(4 * points[:, 0] ** 3 + 27 * points[:, 1] ** 2).max() <= 1e-8 * (1 + np.abs(points).max() ** 3)
    assert result.curve.failed_arcs == 0
    cusps = [s.point for s in result.curve.special if s.kind == CurvePointKind.CUSP]
    assert len(cusps) == 1 and np.linalg.norm(cusps[0]) <= 1e-8  # refined from about a line spacing (0.48) away
    assert all(s.refined for s in result.curve.special)
    for cell in result.regions:
        p, q = cell.sample
        assert cell.count.branches == (2 if 4 * p ** 3 + 27 * q ** 2 < 0 else 1) and cell.count.failed == 0
    assert sorted(r.count.branches for r in result.plane_regions) == [1, 2]


def test_a_bad_number_of_trace_lines_is_one_line_and_exit_2(tmp_path, capsys):
    import io
    from numag.app.cli import main
    path = tmp_path / "bar.toml"
    path.write_text('variables = ["x", "y"]\nparameters = ["r", "s"]\nequations = ["x^2 + y^2 - r^2 - s"]\n')
    assert main(["discriminant", str(path), "--trace-lines", "1"], out=io.StringIO()) == 2
    err = capsys.readouterr().err
    assert "--trace-lines must be from 2" in err and "Traceback" not in err


def test_cells_without_the_curve_count_circles():
    # x^2 + y^2 = r^2 + s is a circle (one real branch) where r^2 + s > 0 and has no real point where it is < 0
    # (common practice, no source); --no-curve: the cells alone, no curve and no merged regions.
    family = family_from_mapping({"variables": ["x", "y"], "parameters": ["r", "s"],
                                  "equations": ["x^2 + y^2 - r^2 - s"], "ranges": {"r": [-1, 2], "s": [-3, 3]}})
    options = DiscriminantOptions(lines=3, curve=False, components=False, at_infinity=False)
    result = discriminant(family, options, seed=2)
    assert result.curve is None and result.plane_regions == []
    assert len(result.regions) == 6
    for cell in result.regions:
        r, s = cell.sample
        assert cell.count.branches == (1 if r * r + s > 0 else 0) and cell.count.failed == 0
        assert min(abs(cell.low + r * r), abs(cell.high + r * r)) <= 1e-9  # cut at s = -r^2


def test_a_line_that_misses_a_real_crossing_of_a_double_line_in_the_region_is_counted():
    # The double lines b = 0 and c = 0 cross the line p = o + t d at t = -o_b / d_b and t = -o_c / d_c (elementary
    # geometry, no source); b = 0 is parallel to the vertical lines b = v and meets them only at infinity.
    from numag.families.lines import _lines_missing_points

    slope = np.array([1.0, 0.6]) / np.linalg.norm([1.0, 0.6])
    lines = [np.concatenate([[0.0, s], slope]) for s in (-2.0, -1.0, 0.5, 1.5)] + \
        [np.array([v, 0.0, 0.0, 1.0]) for v in (1.0, 4.0)]
    values = np.array(lines, dtype=complex)
    region = (np.array([-5.0, -5.0]), np.array([10.0, 10.0]))
    moves, t_values, reached = [], [], []
    for k, (o, d) in enumerate((v[:2].real, v[2:].real) for v in values):
        for start, axis in ((0, 0), (1, 0), (2, 1), (3, 1)):  # two starts over b = 0, two over c = 0
            moves.append((start, k))
            parallel = abs(d[axis]) < 1e-12
            t_values.append(0.0 if parallel else -o[axis] / d[axis])
            reached.append(not parallel)
    moves_of = {move: j for j, move in enumerate(moves)}
    classes = np.array([0, 0, 1, 1])
    reached = np.array(reached)
    t_values = np.array(t_values, dtype=complex)
    # every line got its points, the vertical ones only c = 0's: nothing missed
    assert _lines_missing_points(t_values, reached, moves, classes, values, region).tolist() == [0] * 6
    # one start over b = 0 failed on the second line, its partner reached the point: no miss
    once = reached.copy()
    once[moves_of[(0, 1)]] = False
    assert _lines_missing_points(t_values, once, moves, classes, values, region).tolist() == [0] * 6
    # both starts over b = 0 failed there: b = 0 crosses that line between its neighbours, a miss
    twice = once.copy()
    twice[moves_of[(1, 1)]] = False
    assert _lines_missing_points(t_values, twice, moves, classes, values, region).tolist() == [0, 1, 0, 0, 0, 0]
    # c = 0 missed on the vertical line b = 1 (its real points elsewhere lie on both sides of b = 1) and on the
    # outermost sloped line (its neighbour has a real point of c = 0 in the region)
    vertical = reached.copy()
    vertical[[moves_of[(2, 4)], moves_of[(3, 4)], moves_of[(2, 0)], moves_of[(3, 0)]]] = False
    assert _lines_missing_points(t_values, vertical, moves, classes, values, region).tolist() == [1, 0, 0, 0, 1, 0]
    # a crossing beyond the region does not count: the region cut to b, c in [0.2, 10]
    far = (np.array([0.2, 0.2]), np.array([10.0, 10.0]))
    assert _lines_missing_points(t_values, twice, moves, classes, values, far).tolist() == [0] * 6


def test_points_missed_on_lines_reach_the_warnings_and_the_exit_code():
    from numag.app.commands.discriminant import _failed
    from numag.app.report import discriminant_warnings
    from numag.families.discriminant import Discriminant

    def result(missed):
        paths = {"tracked": 10, MISSED_ON_LINES: missed} if missed else {"tracked": 10}
        return Discriminant(("x",), ("b", "c"), ["x"], 1, [], np.zeros(0), [], paths, [], 1, 0.0)

    assert _failed(result(0)) == 0 and discriminant_warnings(result(0)) == []
    assert _failed(result(2)) == 2
    assert any("2 points of multiple components" in w for w in discriminant_warnings(result(2)))
    again = Discriminant.from_dict(result(2).to_dict())  # saved and reloaded, still counted
    assert _failed(again) == 2
