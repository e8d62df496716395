"""The regeneration's start: factors in variable groups (x and lambda for the null-vector system)."""

import json
import subprocess
import sys

import numpy as np
import pytest

from numag.errors import InputError
from numag.singular.isolated import null_vector_groups, null_vector_system
from numag.singular.kinds import PieceKind
from numag.singular.locus import SingularOptions, singular_locus
from numag.system.parse import parse_system
from numag.tracking.multihomogeneous import GroupSource
from numag.tracking.starts import StartKind, choose_witness_start
from numag.witness.cascade import WitnessOptions, witness_supersets


def eigenproblem_parts(n, seed, name=None):
    """(A - l I) v = 0, c . v = 1 for a random n x n matrix A: (system, A, the names of v)."""
    rng = np.random.default_rng(seed)
    matrix, normal = rng.standard_normal((n, n)), rng.standard_normal(n)
    names = [f"v{k}" for k in range(n)]
    equations = [" + ".join(f"({float(matrix[i, j])!r})*{names[j]}" for j in range(n)) + f" - l*{names[i]}"
                 for i in range(n)]
    equations.append(" + ".join(f"({float(normal[j])!r})*{names[j]}" for j in range(n)) + " - 1")
    return parse_system(equations, names + ["l"], name=name), matrix, names


def _same_points(a, b):
    if len(a) != len(b):
        return False
    if len(a) == 0:
        return True
    distance = np.abs(a[:, None, :] - b[None, :, :]).max(axis=2)
    return distance.min(axis=1).max() < 1e-6 and distance.min(axis=0).max() < 1e-6


@pytest.mark.parametrize("seed", [3, 17])
@pytest.mark.parametrize("name", ["node", "four_generic_lines", "cone_over_smooth_plane_cubic"])
def test_null_vector_regeneration_with_x_and_lambda_grouped_finds_the_same_witness_points_with_fewer_paths(
        problems, name, seed):
    # the singular points of each shared problem (tests/data/problems.json, each entry's "source": common
    # practice, no source) are the x parts of the null-vector system's isolated solutions; the grouped
    # regeneration must find the same witness points as the total-degree one, tracking fewer paths: its
    # moves to factors in x alone or in lambda alone reach fewer points of each witness curve
    problem = problems[name]
    system = parse_system(problem["equations"], problem["variables"])
    null = null_vector_system(system, 1, np.random.default_rng(seed))
    groups = null_vector_groups(null, system.n_variables)
    by_degree = witness_supersets(null, WitnessOptions(), seed=seed)
    grouped = witness_supersets(null, WitnessOptions(start="multihomogeneous", groups=groups,
                                                     group_source=GroupSource.NULL_VECTOR), seed=seed)
    assert grouped.start["chosen"] == "multihomogeneous"
    assert grouped.start["groups"] == {"groups": groups, "source": "null vector"}
    for a, b in zip(by_degree.sets, grouped.sets):
        assert a.dimension == b.dimension and _same_points(a.points, b.points)
    isolated = grouped.of_dimension(0).points
    singular = isolated[:, :system.n_variables]
    assert len({tuple(np.round(p, 6)) for p in singular}) == problem["expected"]["singular_points"]
    assert grouped.paths["tracked"] < by_degree.paths["tracked"]


@pytest.mark.parametrize("seed", [2, 11])
def test_eigenvalues_by_the_grouped_regeneration_equal_numpys(seed):
    # (A - l I) v = 0, c . v = 1: n eigenpairs of a random matrix (numpy.linalg.eig as the reference library);
    # its 2-homogeneous Bezout number is n against 2^n (Morgan and Sommese 1987, "A homotopy for solving
    # general polynomial systems that respects m-homogeneous structures", Appl. Math. Comput.; from memory)
    n = 4
    system, matrix, names = eigenproblem_parts(n, seed)
    choice = choose_witness_start(system, StartKind.AUTO, groups=[names, ["l"]])
    assert choice.kind is StartKind.MULTIHOMOGENEOUS
    assert choice.counts == {"total-degree": 2 ** n, "multihomogeneous": n}
    grouped = witness_supersets(system, WitnessOptions(start="auto", groups=(tuple(names), ("l",))), seed=seed)
    by_degree = witness_supersets(system, WitnessOptions(), seed=seed)
    found = grouped.of_dimension(0).points[:, -1]
    expected = np.linalg.eigvals(matrix)
    # matched by distance (sorting would order the two members of a conjugate pair by rounding)
    assert len(found) == n and _same_points(found[:, None], expected[:, None])
    assert grouped.paths["tracked"] < by_degree.paths["tracked"]


@pytest.mark.parametrize("seed", [3, 8])
def test_singular_locus_through_the_null_vector_form_with_the_grouped_regeneration(problems, seed):
    # the affine cone over the twisted cubic (tests/data/problems.json "affine_cone_over_twisted_cubic":
    # common practice, no source): three quadrics, codimension 2, no complete intersection, so the
    # witness sets of the null-vector system (x and lambda grouped) find its one singular point, the vertex
    problem = problems["affine_cone_over_twisted_cubic"]
    system = parse_system(problem["equations"], problem["variables"])
    by_degree = singular_locus(system, SingularOptions(formulation="null vector"), seed=seed)
    grouped = singular_locus(system, SingularOptions(formulation="null vector", start="multihomogeneous"), seed=seed)
    for locus in (by_degree, grouped):
        points = [c.points[0] for c in locus.components
                  if c.dimension == 0 and c.kind is PieceKind.SINGULAR and not c.at_infinity]
        assert len(points) == problem["expected"]["singular_points"] == 1
        assert np.abs(points[0]).max() < 1e-6
    (route,) = grouped.start["codimensions"]
    assert route["route"] == "witness sets"
    # with more equations than the codimension the null-vector rows also vanish on a hypersurface of X's smooth
    # points; where such a candidate set is judged smooth, the codimension is computed again in the minors
    # formulation (decision 0150: a point components share hides inside it) and the route is the minors'
    again = [n for n in grouped.notes if "computed again in the minors formulation" in n]
    if not again:
        assert route["regeneration"]["chosen"] == "multihomogeneous"
        assert route["regeneration"]["groups"]["source"] == "null vector"
        assert grouped.paths["tracked"] < by_degree.paths["tracked"]


def test_choice_rules_and_refusals():
    # the counts are exact integers of the stated formulas (Bezout numbers of the stand-in; common practice)
    bilinear = parse_system(["x*l - y - 1", "y*l - 2*x"], ["x", "y", "l"])
    assert choose_witness_start(bilinear, StartKind.TOTAL_DEGREE).report() == {
        "chosen": "total-degree", "reason": "asked for", "paths": {"total-degree": 4}, "setup_seconds": {}}
    surplus = parse_system(["x*l - y", "y*l - x^2 - 1"], ["x", "y", "l"])  # (2, 1) for a quadric: 3 factors
    choice = choose_witness_start(surplus, StartKind.AUTO, groups=[["x", "y"], ["l"]])
    assert choice.kind is StartKind.TOTAL_DEGREE and "equation 2" in choice.reason
    forced = choose_witness_start(surplus, StartKind.MULTIHOMOGENEOUS, groups=[["x", "y"], ["l"]])
    assert forced.kind is StartKind.MULTIHOMOGENEOUS
    polyhedral = choose_witness_start(bilinear, StartKind.POLYHEDRAL, groups=[["x", "y"], ["l"]])
    assert polyhedral.kind is StartKind.MULTIHOMOGENEOUS and "no product form" in polyhedral.reason
    # a fibre has fewer unknowns: names that are not variables are left out
    fibre = parse_system(["x*l - 1"], ["x", "l"])
    assert choose_witness_start(fibre, StartKind.AUTO, groups=[["x", "y"], ["l"]]).groups.names == (("x",), ("l",))
    with pytest.raises(InputError, match="unknown start"):
        WitnessOptions(start="newton")
    with pytest.raises(InputError, match="affine"):
        choose_witness_start(parse_system(["x^2 - y^2"], ["x", "y"], projective=True), StartKind.AUTO)


def test_decompose_command_reports_the_regeneration_start(tmp_path):
    # x*l = y + 1, y*l = 2 x is the rational curve x = l / (l^2 - 2), y = 2 / (l^2 - 2), one component of
    # degree 3 (by hand; common practice, no source); its groups are in the file
    path = tmp_path / "pencil.toml"
    path.write_text('variables = ["x", "y", "l"]\nequations = ["x*l - y - 1", "y*l - 2*x"]\n'
                    'groups = [["x", "y"], ["l"]]\n')
    runs = {}
    for start in ("total-degree", "auto"):
        done = subprocess.run([sys.executable, "-m", "numag", "decompose", str(path), "--start", start, "--seed", "4",
                               "--json"], capture_output=True, text=True, timeout=300)
        assert done.returncode == 0, done.stderr
        runs[start] = json.loads(done.stdout)
    block = runs["auto"]["start"]
    assert block["chosen"] == "multihomogeneous" and block["groups"] == {"groups": [["x", "y"], ["l"]],
                                                                          "source": "file"}
    assert runs["auto"]["options"]["start"] == "auto" and runs["total-degree"]["start"]["chosen"] == "total-degree"
    for data in runs.values():
        assert [(c["dimension"], c["degree"]) for c in data["components"]] == [(1, 3)]
    refused = subprocess.run([sys.executable, "-m", "numag", "decompose", str(path), "--start", "newton"],
                             capture_output=True, text=True, timeout=300)
    assert refused.returncode == 2 and "Traceback" not in refused.stderr
