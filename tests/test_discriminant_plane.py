"""Two parameters: the real discriminant curve traced, its cusps and nodes, the regions of the plane.

The checks against something outside numag name their source beside them.
"""

import io
import json
import xml.dom.minidom

import numpy as np
import pytest

from numag.app.cli import main
from numag.families.branches import CountKind
from numag.families.discriminant import Discriminant, DiscriminantOptions, discriminant
from numag.families.plane import CurvePointKind, SingularIncidence, _nodes, strip_blocked
from numag.system.files import family_from_mapping

CUBIC = {"variables": ["x"], "parameters": ["p", "q"], "equations": ["x^3 + p*x + q"],
         "ranges": {"p": [-3, 3], "q": [-3, 3]}}
# x^4 + a x^2 + b x + 1 = (x^2 - 1)^2 at (a, b) = (-2, 0): a member with two double roots.
QUARTIC = {"variables": ["x"], "parameters": ["a", "b"], "equations": ["x^4 + a*x^2 + b*x + 1"],
           "ranges": {"a": [-3, -1], "b": [-1, 1]}}


@pytest.fixture(scope="module", params=[3, 8])
def cubic(request):
    return discriminant(family_from_mapping(CUBIC), DiscriminantOptions(lines=7), seed=request.param)


def _cubic_form(p, q):
    return 4 * p ** 3 + 27 * q ** 2


def test_traced_curve_lies_on_the_cubic_discriminant(cubic):
    # The discriminant of x^3 + p x + q is 4 p^3 + 27 q^2 = 0 (common practice, no source).
    curve = cubic.curve
    assert curve is not None and curve.failed_arcs == 0
    points = np.vstack(curve.arcs)
    p, q = points[:, 0], points[:, 1]
    assert np.all(np.abs(_cubic_form(p, q)) <= 1e-7 * (1 + np.abs(p) ** 3 + q ** 2))
    # it is traced across the box: both branches q = +-2 (-p / 3)^(3/2) reach p = -3 (q = +-2)
    inside = points[(p >= -3) & (p <= 3) & (q >= -3) & (q <= 3)]
    assert inside[:, 0].min() <= -2.9 and inside[:, 1].min() <= -1.8 and inside[:, 1].max() >= 1.8


def test_the_cubic_curve_has_one_cusp_at_the_origin(cubic):
    # The curve 4 p^3 + 27 q^2 = 0 is smooth away from the origin and has a cusp there: q ~ |p|^(3/2)
    # (common practice, no source).
    special = cubic.curve.special
    assert [s.kind for s in special] == [CurvePointKind.CUSP]
    assert special[0].refined and np.linalg.norm(special[0].point) <= 1e-8


def test_cells_merge_into_the_two_regions_of_the_cubic(cubic):
    # 3 real roots where 4 p^3 + 27 q^2 < 0, 1 real root where it is > 0, and the complement of the cuspidal
    # curve in the plane has exactly these two connected components (common practice, no source).
    regions = cubic.plane_regions
    assert len(regions) == 2
    assert sorted(r.count.solutions for r in regions) == [1, 3]
    for region in regions:
        p, q = region.sample
        assert region.count.solutions == (3 if _cubic_form(p, q) < 0 else 1)
        for cell in region.cells:  # every cell of the region has its sample on the same side of the curve
            p, q = cubic.regions[cell].sample
            assert (_cubic_form(p, q) < 0) == (region.count.solutions == 3)
    assert sorted(c for r in regions for c in r.cells) == list(range(len(cubic.regions)))
    # two regions of different counts: nothing to say about pieces of one region; what the trace cannot see
    # (isolated real points over non-real singular points, unless asked for) is always said
    assert not any("pieces of one region" in note for note in cubic.notes)
    assert any("conjugate pair of singular points) were not searched" in note for note in cubic.notes)


def test_plane_results_round_trip_and_are_drawn(cubic, tmp_path):
    again = Discriminant.from_dict(json.loads(json.dumps(cubic.to_dict())))
    assert len(again.plane_regions) == 2 and again.curve.special[0].kind == CurvePointKind.CUSP
    assert all(np.array_equal(a, b) for a, b in zip(again.curve.arcs, cubic.curve.arcs))
    report = tmp_path / "cubic.json"
    report.write_text(json.dumps({"command": "discriminant", **cubic.to_dict()}))
    out = io.StringIO()
    assert main(["plot", str(report), "-o", str(tmp_path / "cubic.svg")], out=out) == 0
    picture = xml.dom.minidom.parse(str(tmp_path / "cubic.svg"))
    assert len(picture.getElementsByTagName("polyline")) == len(cubic.curve.arcs)
    assert len(picture.getElementsByTagName("polygon")) == 1  # the cusp's triangle
    assert main(["plot", str(report), "-o", str(tmp_path / "cubic.png")], out=io.StringIO()) == 2


def test_a_crossing_strip_is_blocked_where_the_curve_spans():
    # a segment from (0, 0) to (1, 1) spans heights 0.25 to 0.5 in the strip 0.25 <= p_1 <= 0.5 (common practice,
    # no source: a line's clipping to a strip)
    assert strip_blocked([np.array([[0.0, 0.0], [1.0, 1.0]])], 0.25, 0.5) == [(0.25, 0.5)]
    assert strip_blocked([np.array([[0.0, 0.0], [0.2, 1.0]])], 0.25, 0.5) == []


def test_node_of_the_quartic_refined_and_checked_with_sympy():
    # At (a, b) = (-2, 0) the member is (x^2 - 1)^2: two double roots x = 1, -1, a node of the discriminant.
    # sympy's discriminant is the reference: zero with zero gradient and an indefinite Hessian there.
    sympy = pytest.importorskip("sympy")
    x, a, b = sympy.symbols("x a b")
    delta = sympy.discriminant(x ** 4 + a * x ** 2 + b * x + 1, x)
    family = family_from_mapping(QUARTIC)
    rng = np.random.default_rng(4)
    for _ in range(3):
        # starts near the two lifts (x, a, b) = (+-1, -2, 0), as a crossing of two traced arcs gives them
        first = np.array([1.0, -2.0, 0.0]) + 1e-3 * rng.standard_normal(3)
        second = np.array([-1.0, -2.0, 0.0]) + 1e-3 * rng.standard_normal(3)
        node = SingularIncidence.of(family, 1, 24).refined_node(first, second)
        assert node.refined and node.kind == CurvePointKind.NODE
        at = {a: node.point[0], b: node.point[1]}
        assert abs(float(delta.subs(at))) <= 1e-9
        gradient = [float(sympy.diff(delta, v).subs(at)) for v in (a, b)]
        assert max(abs(g) for g in gradient) <= 1e-7
        hessian = np.array([[float(sympy.diff(delta, u, v).subs(at)) for v in (a, b)] for u in (a, b)])
        assert np.linalg.det(hessian) < -1.0  # two real tangents: a node, not an isolated point or a cusp


def test_crossing_pieces_of_the_quartic_give_its_node():
    # The double root t of x^4 + a x^2 + b x + 1 parametrises its discriminant: a = (1 - 3 t^4) / t^2,
    # b = 2 t^3 - 2 / t (from F(t) = F'(t) = 0, common practice, no source); t = 1 and t = -1 both map to
    # (-2, 0), with the transverse tangents (-8, 8) and (8, 8). Pieces of the incidence curve (x, a, b) = (t, a, b)
    # sampled around t = 1 and t = -1 cross there once.
    sympy = pytest.importorskip("sympy")
    pieces = []
    for t in (np.linspace(0.7, 1.35, 41), np.linspace(-1.3, -0.75, 37)):
        pieces.append(np.column_stack([t, (1 - 3 * t ** 4) / t ** 2, 2 * t ** 3 - 2 / t]))
    nodes = _nodes(SingularIncidence.of(family_from_mapping(QUARTIC), 1, 24), pieces, 1, 2.0)
    assert len(nodes) == 1 and nodes[0].refined
    x, a, b = sympy.symbols("x a b")
    delta = sympy.discriminant(x ** 4 + a * x ** 2 + b * x + 1, x)  # the reference
    at = {a: nodes[0].point[0], b: nodes[0].point[1]}
    assert abs(float(delta.subs(at))) <= 1e-9 and np.allclose(nodes[0].point, [-2, 0], atol=1e-12)


def test_members_of_dimension_two_say_they_are_not_counted():
    # The spheres x^2 + y^2 + z^2 = p are smooth surfaces except at p = 0, the cone's vertex (common practice,
    # no source); surfaces get no real count, and the result says so.
    family = family_from_mapping({"variables": ["x", "y", "z"], "parameters": ["p"],
                                  "equations": ["x^2 + y^2 + z^2 - p"]})
    result = discriminant(family, DiscriminantOptions(at_infinity=False), seed=3)
    assert np.allclose(result.real_points, [0.0], atol=1e-8)
    assert len(result.regions) == 2
    assert all(r.count.kind is CountKind.NOT_COUNTED for r in result.regions)
    assert all(r.to_dict()["count"] == "not counted" for r in result.regions)


def test_isolated_real_point_of_the_quartic_over_a_conjugate_pair():
    # At (a, b) = (2, 0) the member is (x^2 + 1)^2: double roots at x = i and -i only, so (2, 0) is an isolated real
    # point of the discriminant, off every traced arc (common practice, no source). sympy's discriminant is the
    # reference: zero with zero gradient and a definite Hessian there (no real tangent).
    sympy = pytest.importorskip("sympy")
    from numag.families.plane import conjugate_pair_points
    x, a, b = sympy.symbols("x a b")
    delta = sympy.discriminant(x ** 4 + a * x ** 2 + b * x + 1, x)
    points, paths = conjugate_pair_points(SingularIncidence.of(family_from_mapping(QUARTIC), 1, 24),
                                          np.random.default_rng(1))
    assert paths["tracked"] == 144 and len(points) == 1  # (-2, 0), over the real pair x = 1, -1, is left out
    at = {a: points[0][0], b: points[0][1]}
    assert abs(float(delta.subs(at))) <= 1e-9
    assert max(abs(float(sympy.diff(delta, v).subs(at))) for v in (a, b)) <= 1e-7
    hessian = np.array([[float(sympy.diff(delta, u, v).subs(at)) for v in (a, b)] for u in (a, b)])
    assert np.all(np.linalg.eigvalsh(hessian) > 1.0)  # definite: an isolated real point
    assert np.allclose(points[0], [2.0, 0.0], atol=1e-10)


def test_progress_tells_lines_in_the_users_units():
    """A family balanced into other units still reports its lines in the units of its [ranges].

    Two circles of radius 1/1000 and q whose centres are p/10^6 apart (elementary geometry: common practice,
    no source); the lines are evenly spaced across the range of p, which the user wrote in thousands.
    """
    family = family_from_mapping({"variables": ["x", "y"], "parameters": ["p", "q"],
                                  "equations": ["x^2 + y^2 - 1/10^6", "(x - p/10^6)^2 + y^2 - q^2"],
                                  "ranges": {"p": [0, 5000], "q": [0, 0.005]}})
    told = []
    discriminant(family, DiscriminantOptions(lines=3, curve=False, components=False, at_infinity=False), seed=1,
                 progress=told.append)
    lines = [float(message.split("=")[1]) for message in told if message.startswith("line p =")]
    assert np.allclose(lines, [0.0, 2500.0, 5000.0], rtol=1e-5)
