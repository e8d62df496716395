import itertools

import numpy as np
import pytest
import sympy

from numag.errors import InputError, PointError
from numag.system.parse import parse_constant, parse_system
from numag.singular.smoothness import CheckOptions, check_points


def verdicts(system, points, **options):
    report = check_points(system, points, CheckOptions(**options), seed=11)
    return [v.verdict for v in report.points], report


def curve_points(equation, xs, branch=1):
    """Points (x, y) on y^2 = g(x) with g from the equation 'y^2 - g'."""
    x = sympy.Symbol("x")
    g = sympy.sympify(equation.replace("^", "**").split("y**2 - ", 1)[1].replace("y", "0"))
    return [[complex(value), branch * complex(sympy.sqrt(g.subs(x, value)))] for value in xs]


@pytest.mark.parametrize("name", ["cusp", "node"])
def test_plane_cubics_singular_exactly_at_origin(problems, name):
    # cusp y^2 = x^3 and node y^2 = x^2 (x + 1): singular exactly at the origin
    # (common practice, no source; problem file entries "cusp", "node")
    entry = problems[name]
    system = parse_system(entry["equations"], entry["variables"])
    others = curve_points(entry["equations"][0], [sympy.Rational(1, 3), 2, -sympy.Rational(1, 2), 5]
                          if name == "node" else [sympy.Rational(1, 3), 2, 5, sympy.Rational(1, 100)])
    result, report = verdicts(system, [[0, 0]] + others)
    assert result == ["singular"] + ["smooth"] * len(others)
    assert report.points[0].tangent_dimension == 2 and report.points[1].tangent_dimension == 1


def test_whitney_umbrella_singular_along_z_axis(problems):
    # x^2 = y^2 z is singular along the z-axis (common practice, no source; problem "whitney_umbrella")
    entry = problems["whitney_umbrella"]
    system = parse_system(entry["equations"], entry["variables"])
    on_axis = [[0, 0, z] for z in (0, 1, -2, 7)]
    off_axis = [[2, 1, 4], [3, 3, 1], [1j, 1, -1]]
    result, _ = verdicts(system, on_axis + off_axis)
    assert result == ["singular"] * 4 + ["smooth"] * 3


def test_cone_vertex_singular_elsewhere_smooth():
    # x^2 + y^2 = z^2: only the vertex is singular (common practice, no source)
    system = parse_system(["x^2 + y^2 - z^2"], ["x", "y", "z"])
    result, _ = verdicts(system, [[0, 0, 0], [3, 4, 5], [1, 0, -1], [5, 12, 13]])
    assert result == ["singular", "smooth", "smooth", "smooth"]


def test_point_near_node_names_the_refined_singular_point():
    system = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    offset = 1e-12
    point = [offset, offset * np.sqrt(1 + offset)]
    # with a point tolerance given, a rank drop within it names the point (decision 0072: without one, these
    # 17-digit coordinates are judged to their last digit, and the point 1.4e-12 from the node is smooth)
    (verdict,), report = verdicts(system, [point], point_tolerance=1e-6)
    v = report.points[0]
    assert verdict == "singular"
    assert np.abs(v.point).max() < 1e-20  # the node itself (common practice, no source)
    assert v.distance == pytest.approx(np.linalg.norm(point), rel=1e-6)
    assert v.evidence.escalated


def test_badly_scaled_smooth_point_is_smooth():
    # 1e-12 (x^2 + y^2 - 1): a smooth circle although every Jacobian entry is tiny
    system = parse_system(["1e-12*(x^2 + y^2 - 1)"], ["x", "y"])
    (verdict,), report = verdicts(system, [[0.6, 0.8]])
    assert verdict == "smooth" and not report.points[0].evidence.escalated


def test_flex_of_cubic_is_smooth():
    # y = x^3 is smooth everywhere, including at and near its flex (common practice, no source)
    system = parse_system(["y - x^3"], ["x", "y"])
    result, _ = verdicts(system, [[0, 0], [1e-7, 1e-21], [1e-3, 1e-9]])
    assert result == ["smooth"] * 3


def test_smooth_point_near_a_singular_point_reports_its_distance():
    system = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    point = curve_points("y^2 - x^2*(x + 1)", [sympy.Rational(1, 100000)])[0]
    (verdict,), report = verdicts(system, [point])
    v = report.points[0]
    assert verdict == "smooth"
    assert v.nearest_rank_drop is not None
    assert v.nearest_rank_drop_distance == pytest.approx(np.linalg.norm(point), rel=1e-3)


def test_non_reduced_component_is_not_called_singular():
    # x^2 = 0 is the line x = 0 counted twice: non-reduced, not "singular everywhere" (design notes, trap 1)
    system = parse_system(["x^2"], ["x", "y"])
    result, report = verdicts(system, [[0, 3], [0, -1]])
    assert result == ["non-reduced", "non-reduced"]


def test_equations_as_given_embedded_point():
    # F = (x^2, x y): rank 0 at the origin although V(F) is the smooth line x = 0 (design notes, section 1)
    system = parse_system(["x^2", "x*y"], ["x", "y"])
    result, report = verdicts(system, [[0, 3], [0, 0]], local_dimension=1)
    assert result == ["smooth", "singular"]
    assert any("equations as given" in note for note in report.points[1].notes)


def test_cayley_cubic_nodes(problems):
    # Cayley's 4-nodal cubic surface: nodes at the coordinate points
    # (A. Cayley, "A memoir on cubic surfaces", Phil. Trans. R. Soc. 159, 1869; problem "cayley_cubic")
    entry = problems["cayley_cubic"]
    system = parse_system(entry["equations"], entry["variables"], projective=True)
    nodes = [list(row) for row in np.eye(4, dtype=int)]
    smooth = [[1, 1, -1, -1], [1, -1, 2, -2]]  # on the surface: the sum of 1/x_k vanishes
    for p in smooth:
        assert sum(np.prod([p[j] for j in range(4) if j != k]) for k in range(4)) == 0
    result, report = verdicts(system, nodes + smooth)
    assert result == ["singular"] * 4 + ["smooth"] * 2
    assert report.points[0].tangent_dimension == 3  # projective tangent space of a surface node


def test_twisted_cubic_is_smooth_with_given_dimension(problems):
    # the twisted cubic is a smooth curve (problem "twisted_cubic_projective": common practice, Harris)
    entry = problems["twisted_cubic_projective"]
    system = parse_system(entry["equations"], entry["variables"], projective=True)
    points = [[s**3, s**2 * t, s * t**2, t**3] for s, t in [(1, 0), (0, 1), (1, 1), (2, -1), (1, 3)]]
    result, report = verdicts(system, points, local_dimension=1)
    assert result == ["smooth"] * 5
    assert all(v.tangent_dimension == 1 for v in report.points)


def test_cone_over_twisted_cubic(problems):
    # the affine cone is singular only at its vertex (problem "affine_cone_over_twisted_cubic")
    entry = problems["affine_cone_over_twisted_cubic"]
    system = parse_system(entry["equations"], entry["variables"])
    dim = entry["expected"]["variety"]["dim"]
    result, _ = verdicts(system, [[0, 0, 0, 0], [1, 1, 1, 1], [8, 4, 2, 1]], local_dimension=dim)
    assert result == ["singular", "smooth", "smooth"]


def test_rank_one_matrices(problems):
    # 3x3 matrices of rank <= 1: dimension 5, singular only at 0 (problem "rank1_3x3_matrices")
    entry = problems["rank1_3x3_matrices"]
    system = parse_system(entry["equations"], entry["variables"])
    u, v = np.array([1, 2, -1]), np.array([3, 1, 2])
    rank_one = list(np.outer(u, v).reshape(-1).astype(int))
    result, _ = verdicts(system, [[0] * 9, rank_one], local_dimension=entry["expected"]["variety"]["dim"])
    assert result == ["singular", "smooth"]


def test_four_lines_nodes_match_sympy(problems):
    # The 6 pairwise intersections of 4 generic lines are the nodes (problem "four_generic_lines");
    # the intersections themselves are computed by sympy's linear solver (reference library).
    entry = problems["four_generic_lines"]
    system = parse_system(entry["equations"], entry["variables"])
    x, y = sympy.symbols("x y")
    lines = [x - y + 1, 2 * x + y - 3, x + 3 * y + 2, 3 * x - 2 * y - 7]
    nodes = []
    for a, b in itertools.combinations(lines, 2):
        s = sympy.solve([a, b], [x, y])
        nodes.append([parse_constant(str(s[x])), parse_constant(str(s[y]))])
    result, _ = verdicts(system, nodes + [[0, 1], [2, -1]])
    assert len(nodes) == entry["expected"]["singular_points"]
    assert result == ["singular"] * 6 + ["smooth"] * 2


def test_point_not_on_variety_is_judged_off_and_the_others_as_usual():
    # The unit circle is smooth everywhere; (1/2, 1/2) is off it by 1/2 in F (common practice, no source).
    system = parse_system(["x^2 + y^2 - 1"], ["x", "y"])
    report = check_points(system, [[1, 0], [0.5, 0.5], [0.6, 0.8]], seed=0)
    assert [v.verdict for v in report.points] == ["smooth", "off", "smooth"]
    off = report.points[1]
    assert report.off and off.rank is None and off.residual > 0.1
    assert abs(np.linalg.norm(off.point) - 1) < 1e-10  # where Newton ended: on the circle
    assert off.distance == pytest.approx(np.linalg.norm(off.point - off.given)) and off.distance > 1e-3


def test_undecided_local_dimension_for_overdetermined_system():
    # the three coordinate axes, cut out by 4 equations in 3 unknowns: no complete intersection
    system = parse_system(["x*y", "x*z", "y*z", "x*y*z"], ["x", "y", "z"])
    result, report = verdicts(system, [[0, 0, 2], [0, 0, 0]])
    assert result == ["undecided", "undecided"]
    assert report.points[0].local_dimension_source == "unknown"
    result, _ = verdicts(system, [[0, 0, 2], [0, 0, 0]], local_dimension=1)
    assert result == ["smooth", "singular"]  # the axes meet at the origin (common practice, no source)


def test_options_are_validated():
    system = parse_system(["x^2 + y^2 - 1"], ["x", "y"])
    with pytest.raises(InputError, match="local_dimension"):
        check_points(system, [[1, 0]], CheckOptions(local_dimension=5))
    with pytest.raises(InputError, match="digits"):
        check_points(system, [[1, 0]], CheckOptions(max_digits=4))


def test_projective_zero_point_refused():
    system = parse_system(["x^2 + y^2 - z^2"], ["x", "y", "z"], projective=True)
    with pytest.raises(PointError, match="all homogeneous coordinates are zero"):
        check_points(system, [[0, 0, 0]])


def test_same_seed_same_report():
    system = parse_system(["x^2"], ["x", "y"])
    a = check_points(system, [[0, 1]], seed=5)
    b = check_points(system, [[0, 1]], seed=5)
    assert a.points[0].verdict == b.points[0].verdict and a.seed == b.seed == 5


def _six_bar_singular_points():
    """The four folded configurations of a crank carrying two change-point four-bars at right angles
    (ground pivots (0, 0) and (4, 0), crank 2, couplers 3, rockers 3; a Grashof change point folds where
    crank + ground = coupler + rocker; common practice, no source): A or C at (-2, 0), each with the other
    loop's two assembly positions (intersections of two circles of radius 3, worked by hand)."""
    names = ["ax", "ay", "bx", "by", "cx", "cy", "dx", "dy", "ex", "ey"]
    equations = ["ax^2 + ay^2 - 4", "(bx - 4)^2 + by^2 - 9", "(ax - bx)^2 + (ay - by)^2 - 9", "cx + ay", "cy - ax",
                 "(dx - 4)^2 + dy^2 - 9", "(cx - dx)^2 + (cy - dy)^2 - 9", "2*ex - bx - dx", "2*ey - by - dy"]
    points = []
    for sign in (1, -1):
        d = np.array([2.0, -1.0]) + sign * 2 / np.sqrt(5) * np.array([1.0, -2.0])  # |D-(4,0)| = |D-(0,-2)| = 3
        points.append(np.concatenate([[-2, 0], [1, 0], [0, -2], d, (np.array([1.0, 0.0]) + d) / 2]))
        b = np.array([2.0, 1.0]) + sign * 2 / np.sqrt(5) * np.array([1.0, 2.0])  # |B-(4,0)| = |B-(0,2)| = 3
        points.append(np.concatenate([[0, 2], b, [-2, 0], [1, 0], (b + np.array([1.0, 0.0])) / 2]))
    return parse_system(equations, names), points


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_clear_rank_drops_are_settled_in_double_with_the_same_verdicts(seed, monkeypatch):
    # The batched double-precision test settles clear decisions: "smooth" far from a regular rank-drop zero,
    # "singular" at one where the rank-drop system is well conditioned (decision 0074). Cusps and tacnodes
    # (Milnor number > 1: that system is not regular there) are escalated. Every verdict equals the one of
    # the mpmath escalation alone.
    from numag.singular import smoothness
    system, singular = _six_bar_singular_points()
    rng = np.random.default_rng(seed)
    nearby = [p + 1e-9 * rng.standard_normal(len(p)) for p in singular]  # candidates are approximations
    escalations = []
    original = smoothness._Checker.escalate
    monkeypatch.setattr(smoothness._Checker, "escalate",
                        lambda self, *args: escalations.append(1) or original(self, *args))
    candidates = CheckOptions(point_tolerance=1e-6)  # the locus's tolerance for computed candidates
    settled = check_points(system, nearby, candidates, seed=seed).points
    assert [v.verdict for v in settled] == ["singular"] * 4 and not escalations
    for verdict, exact in zip(settled, singular):  # the folds themselves, to double rounding
        assert np.linalg.norm(verdict.point - exact) <= 1e-12 * np.linalg.norm(exact)
    # a node at 0, a cusp and a tacnode at 0 (common practice, no source); a Grashof change-point four-bar
    # folded at A = (-2, 0), B = (1, 0) (tests/corpus.py, linkages: common practice, no source), and smooth
    # points of each
    node = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"])
    cusp = parse_system(["y^2 - x^3"], ["x", "y"])
    tacnode = parse_system(["y^2 - x^4"], ["x", "y"])
    four_bar = parse_system(["ax^2 + ay^2 - 4", "(bx - 4)^2 + by^2 - 9", "(ax - bx)^2 + (ay - by)^2 - 9"],
                            ["ax", "ay", "bx", "by"])
    crank_up = [0, 2, 2 + 2 / np.sqrt(5) * 1, 1 + 2 / np.sqrt(5) * 2]  # |B-(4,0)| = |B-A| = 3
    cases = [(node, [[1e-10, 0], [3, 6]]), (four_bar, [[-2, 1e-10, 1, 0], crank_up]),
             (cusp, [[1e-9, 0], [4, 8]]), (tacnode, [[1e-8, 0], [1, 1]])]
    escalations.clear()
    fast = [[v.verdict for v in check_points(s, points, candidates, seed=seed).points] for s, points in cases]
    assert fast == [["singular", "smooth"]] * 4 and len(escalations) == 2  # the cusp and the tacnode only
    escalations.clear()
    monkeypatch.setattr(smoothness._Checker, "settle_in_double", lambda self, *args, **kwargs: None)
    assert [[v.verdict for v in check_points(s, points, candidates, seed=seed).points] for s, points in cases] == fast
    assert [v.verdict for v in check_points(system, nearby, candidates, seed=seed).points] == ["singular"] * 4
    assert len(escalations) == 4 + 4


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_non_reduced_sampling_of_many_points_in_one_batch_matches_one_at_a_time(seed):
    # (x^2 + y^2 - 1)^2 (y - 2) = 0: the circle counted twice (non-reduced along it) and the line y = 2 meeting
    # it nowhere; (x^2 + y^2 - 1)(y - x) has nodes where the line crosses the circle (common practice, no
    # source). The sampling of all singular points shares batches (decision 0074); each verdict is the one of
    # its own call.
    candidates = CheckOptions(point_tolerance=1e-6)  # computed points: the locus's tolerance
    thick = parse_system(["(x^2 + y^2 - 1)^2*(y - 2)"], ["x", "y"])
    crossing = parse_system(["(x^2 + y^2 - 1)*(y - x)"], ["x", "y"])
    r = 1 / np.sqrt(2)
    cases = [(thick, [[0.6, 0.8], [0, 1], [3, 2]]), (crossing, [[r, r], [-r, -r], [0, 0], [0.6, 0.8]])]
    for system, points in cases:
        together = [v.verdict for v in check_points(system, points, candidates, seed=seed).points]
        alone = [check_points(system, [point], candidates, seed=seed).points[0].verdict for point in points]
        assert together == alone
    assert [v.verdict for v in check_points(cases[0][0], cases[0][1], candidates, seed=seed).points] == \
        ["non-reduced", "non-reduced", "smooth"]
    assert [v.verdict for v in check_points(cases[1][0], cases[1][1], candidates, seed=seed).points] == \
        ["singular", "singular", "smooth", "smooth"]
