"""The anatomy of projective input (decision 0147): singular points read in the affine chart of their largest
coordinate; components of positive dimension not given, and said so (a note, a count, a warning)."""

import io
import json

import numpy as np
import pytest

from numag.anatomy.survey import locus_anatomy, point_anatomy
from numag.app.cli import main
from numag.singular.locus import singular_locus
from numag.system.parse import parse_system

SEEDS = [1, 2, 3]
#: y^2 z = x^2 (x + z): a nodal cubic, node at (0 : 0 : 1); in the chart z = 1, y^2 = x^2 (x + 1), tangent cone
#: y^2 - x^2: two real lines y = +-x crossing, type A1, Milnor number 1 (common practice, no source)
NODE = "y^2*z - x^2*(x + z)"
#: the same after x -> x - 2 z (a rational linear change): the node at (2 : 0 : 1), whose largest coordinate is x,
#: so it is read in the chart x = 1 (hand substitution)
MOVED = "y^2*z - (x - 2*z)^2*(x - z)"


def _singular_points(equation, seed):
    system = parse_system([equation], ["x", "y", "z"], projective=True)
    locus = singular_locus(system, seed=seed)
    return locus, [c for c in locus.components if c.kind == "singular" and c.dimension == 0]


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("equation, where", [(NODE, [0, 0, 1]), (MOVED, [2, 0, 1])])
def test_a_projective_node_has_the_anatomy_of_its_affine_chart(seed, equation, where):
    locus, points = _singular_points(equation, seed)
    assert len(points) == 1
    found = points[0].points[0]
    assert np.allclose(found / found[np.argmax(np.abs(found))], np.array(where) / max(where), atol=1e-8)
    anatomy = locus_anatomy(locus).points[points[0].id]
    # hand (above): A1, Milnor and Tjurina numbers 1, two real branches
    assert anatomy.hypersurface.type.label == "A1"
    assert (anatomy.hypersurface.milnor, anatomy.hypersurface.tjurina) == (1, 1)
    assert anatomy.branches is not None and len(anatomy.branches) == 2 and anatomy.real_branches == 2
    # and the affine chart z = 1 written by hand gives the same (the anatomy of affine input, decisions before 0147)
    affine = point_anatomy(parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"]), np.zeros(2), seed=seed)
    assert affine.hypersurface.type.label == anatomy.hypersurface.type.label
    assert affine.hypersurface.milnor == anatomy.hypersurface.milnor


def test_a_projective_singular_line_is_said_to_have_no_anatomy(tmp_path):
    # x^2 w = y^2 z: the closure of the Whitney umbrella, singular along the line x = y = 0 (its partials
    # 2 x w, -2 y z, -y^2, x^2 all vanish there; hand). Its anatomy is not computed for projective input: the JSON
    # counts it, a note says why and a warning makes the exit undecided (never silently nothing).
    path = tmp_path / "umbrella.toml"
    path.write_text('variables = ["x","y","z","w"]\nequations = ["x^2*w - y^2*z"]\nprojective = true\n')
    out = io.StringIO()
    assert main(["singular", str(path), "--anatomy", "--seed", "1", "--json"], out=out) == 3
    data = json.loads(out.getvalue())
    lines = [c["id"] for c in data["components"] if c["kind"] == "singular" and c["dimension"] == 1]
    assert len(lines) == 1 and data["anatomy_not_given"] == lines
    assert any("no anatomy" in note for note in data["anatomy_notes"])
    assert any("no anatomy given" in warning for warning in data["warnings"])


@pytest.mark.parametrize("seed", SEEDS)
def test_check_gives_the_anatomy_at_a_projective_singular_point(tmp_path, seed):
    # the node of y^2 z = x^2 (x + z) at (0 : 0 : 1), given exactly: A1 with two real branches (hand, above)
    path = tmp_path / "node.toml"
    path.write_text(f'variables = ["x","y","z"]\nequations = ["{NODE}"]\nprojective = true\n')
    out = io.StringIO()
    assert main(["check", str(path), "--point", "x=0,y=0,z=1", "--anatomy", "--seed", str(seed), "--json"],
                out=out) == 0
    point = json.loads(out.getvalue())["points"][0]
    assert point["verdict"] == "singular"
    assert '"A1"' in json.dumps(point["anatomy"])
