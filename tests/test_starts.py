"""Start systems: multihomogeneous counts and starts, mixed volumes and polyhedral starts, the choice."""

import itertools
import json
import subprocess
import sys

import numpy as np
import pytest
from scipy.spatial import ConvexHull, QhullError

from numag.errors import InputError
from numag.numeric.cluster import cluster_labels
from numag.numeric.evaluate import BatchEvaluator
from numag.singular.isolated import isolated_singular_points
from numag.system.parse import parse_system
from numag.tracking.homotopy import StraightLineHomotopy
from numag.tracking.multihomogeneous import VariableGroups, best_groups, multihomogeneous_bezout
from numag.tracking.polyhedral import (PolyhedralHomotopy, PolyhedralStart, ZeroCoordinates, binomial_solutions,
                                       mixed_volume, smith_normal_form, supports_of, track_cells)
from numag.tracking.service import track
from numag.tracking.tracker import PathStatus
from numag.tracking.solve import SolveOptions, solve_system
from numag.tracking.starts import StartKind, choose_start


def cyclic(n):
    names = [f"z{i}" for i in range(n)]
    equations = [" + ".join("*".join(names[(i + j) % n] for j in range(k)) for i in range(n)) for k in range(1, n)]
    equations.append("*".join(names) + " - 1")
    return parse_system(equations, names)


def eigen_system(matrix, normal):
    """(A - lambda I) v = 0, c . v = 1 in the unknowns v_1..v_n, lambda."""
    n = len(matrix)
    names = [f"v{k}" for k in range(n)]
    equations = [" + ".join(f"({float(matrix[i, j])!r})*{names[j]}" for j in range(n)) + f" - l*{names[i]}"
                 for i in range(n)]
    equations.append(" + ".join(f"({float(normal[j])!r})*{names[j]}" for j in range(n)) + " - 1")
    return parse_system(equations, names + ["l"])


# --- multihomogeneous ---------------------------------------------------------------------------

def test_multihomogeneous_count_of_the_eigenvalue_problem_is_n():
    # (A - lambda I) v = 0, c . v = 1: n bilinear equations and one linear in v; with groups v and lambda the
    # count is the coefficient of z1^n z2 in (z1 + z2)^n z1 = n, the number of eigenpairs (Morgan and Sommese
    # 1987, Appl. Math. Comput., from memory); one group gives the Bezout number 2^n
    degrees = [[1, 1]] * 6 + [[1, 0]]
    assert multihomogeneous_bezout(degrees, [6, 1]) == 6
    assert multihomogeneous_bezout([[2]] * 6 + [[1]], [7]) == 2 ** 6


def test_multihomogeneous_count_against_expanding_the_product():
    # the coefficient of prod z_j^k_j in prod_i sum_j d_ij z_j, expanded term by term (common practice, no source)
    rng = np.random.default_rng(4)
    for _ in range(20):
        sizes = [2, 1, 2]
        degrees = rng.integers(0, 4, size=(5, 3))
        expected = 0
        for choice in itertools.product(range(3), repeat=5):
            if [choice.count(j) for j in range(3)] == sizes:
                expected += int(np.prod([degrees[i, j] for i, j in enumerate(choice)]))
        assert multihomogeneous_bezout(degrees, sizes) == expected


def test_best_grouping_of_the_eigenvalue_problem_separates_v_and_lambda():
    rng = np.random.default_rng(0)
    system = eigen_system(rng.standard_normal((4, 4)), rng.standard_normal(4))
    groups, count = best_groups(system)
    assert count == 4 and groups.names == (("v0", "v1", "v2", "v3"), ("l",))


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_eigenvalues_of_a_random_6x6_matrix_with_six_paths(seed):
    # the eigenvalues of A with 6 paths of the 2-homogeneous start, against numpy.linalg.eig (LAPACK)
    rng = np.random.default_rng(100 + seed)
    matrix = rng.standard_normal((6, 6))
    system = eigen_system(matrix, rng.standard_normal(6))
    result = solve_system(system, SolveOptions(start="multihomogeneous", groups=(tuple(f"v{k}" for k in range(6)),
                                                                                   ("l",))), seed=seed)
    assert result.path_counts()["tracked"] == 6
    assert result.extra["start"]["paths"] == {"total-degree": 64, "multihomogeneous": 6}
    found = np.sort_complex(np.array([s.point[-1] for s in result.solutions]))
    expected = np.sort_complex(np.linalg.eig(matrix)[0])
    assert len(found) == 6
    # each eigenvalue matched to its nearest (sorting complex numbers can swap near-equal real parts)
    assert max(np.min(np.abs(found - e)) for e in expected) < 1e-8
    assert max(np.min(np.abs(expected - f)) for f in found) < 1e-8


def test_multihomogeneous_start_solutions_are_solutions_and_do_not_depend_on_the_batch():
    rng = np.random.default_rng(3)
    system = parse_system(["x*u + y*v - 1", "x*v - y + 2*u", "x + y - 1 + x*y", "u - v + 3"], ["x", "y", "u", "v"])
    homotopy = StraightLineHomotopy.multihomogeneous(system, VariableGroups.of(system, [["x", "y"], ["u", "v"]]), rng)
    every = homotopy.start.solutions()
    assert len(every) == homotopy.start.n_paths == multihomogeneous_bezout([[1, 1], [1, 1], [2, 0], [0, 1]], [2, 2])
    assert np.max(np.abs(homotopy.start.values(every))) < 1e-12
    assert np.allclose(homotopy.start.solutions([3, 1]), every[[3, 1]])
    assert len(cluster_labels(every[:, 1:], 1e-8)) == len(set(cluster_labels(every[:, 1:], 1e-8)))


def test_groups_that_are_not_a_partition_are_refused():
    system = parse_system(["x*y - 1", "x + y"], ["x", "y"])
    for groups, words in [([["x"]], "'y' is in no group"), ([["x", "y"], ["y"]], "two groups"),
                          ([["x", "z"]], "not a variable")]:
        with pytest.raises(InputError, match=words):
            VariableGroups.of(system, groups)


# --- polyhedral ---------------------------------------------------------------------------------

@pytest.mark.parametrize("n, expected", [(5, 70), (6, 156)])
def test_mixed_volume_of_cyclic_n(n, expected):
    # cyclic 5: 70, cyclic 6: 156 roots, equal to their mixed volumes (Bjorck and Froberg 1991, from memory)
    start = PolyhedralStart.random(cyclic(n).polynomials, np.random.default_rng(n))
    assert start.zero_coordinates == ZeroCoordinates.EXCLUDED  # z_0 ... z_{n-1} = 1: no zero coordinate
    assert start.n_paths == expected


@pytest.mark.parametrize("degrees", [(2, 3), (2, 2, 2), (3, 1, 2)])
def test_mixed_volume_of_a_dense_system_is_its_bezout_number(degrees):
    # full supports {|a| <= d_i}: the mixed volume is prod d_i (Bernstein 1975; common practice, no source)
    n = len(degrees)
    supports = [np.array([a for a in itertools.product(range(d + 1), repeat=n) if sum(a) <= d]) for d in degrees]
    assert mixed_volume(supports, np.random.default_rng(sum(degrees))) == int(np.prod(degrees))


def test_mixed_area_of_a_square_and_a_triangle_by_hand():
    # MV(P, Q) = area(P + Q) - area(P) - area(Q): unit square P (area 1), triangle Q = conv{0, 2e1, e2}
    # (area 1); P + Q = conv{(0,0), (3,0), (3,1), (1,2), (0,2)} has area 5 (shoelace), so MV = 3
    # (common practice, computed by hand)
    square = np.array([[0, 0], [1, 0], [0, 1], [1, 1]])
    triangle = np.array([[0, 0], [2, 0], [0, 1]])
    for seed in range(3):
        assert mixed_volume([square, triangle], np.random.default_rng(seed)) == 3


def _volume(points):
    try:
        return ConvexHull(points).volume
    except QhullError:  # a flat set: volume 0
        return 0.0


def _brute_force_mixed_volume(supports):
    """Sum over nonempty S of (-1)^(n - |S|) vol(sum_{i in S} P_i) (inclusion-exclusion)."""
    n = len(supports)
    total = 0.0
    for size in range(1, n + 1):
        for subset in itertools.combinations(range(n), size):
            points = supports[subset[0]]
            for i in subset[1:]:
                points = (points[:, None, :] + supports[i][None, :, :]).reshape(-1, n)
            total += (-1) ** (n - size) * _volume(np.unique(points, axis=0).astype(float))
    return total


@pytest.mark.parametrize("n, seed", [(2, 0), (2, 1), (2, 2), (3, 3), (3, 4), (3, 5)])
def test_mixed_volume_against_minkowski_sum_volumes(n, seed):
    # the mixed volume as the alternating sum of volumes of Minkowski sums (the inclusion-exclusion
    # formula; e.g. Cox, Little and O'Shea, "Using Algebraic Geometry", 2005, ch. 7), volumes by scipy's ConvexHull
    rng = np.random.default_rng(seed)
    supports = [np.unique(rng.integers(0, 3, size=(rng.integers(3, 6), n)), axis=0) for _ in range(n)]
    expected = _brute_force_mixed_volume(supports)
    assert abs(expected - round(expected)) < 1e-9
    if any(len(s) < 2 for s in supports):
        pytest.skip("a support of one point")
    assert mixed_volume(supports, np.random.default_rng(seed + 10)) == round(expected)


def test_smith_normal_form_and_binomial_solutions():
    # U M W = D with U, W unimodular; x^V = beta has |det V| solutions (common practice, no source)
    rng = np.random.default_rng(7)
    for _ in range(10):
        matrix = rng.integers(-3, 4, size=(3, 3))
        if round(abs(np.linalg.det(matrix))) == 0:
            continue
        u, d, w = (np.array(a, dtype=object) for a in smith_normal_form(matrix.tolist()))
        assert (u.dot(matrix.astype(object)).dot(w) == d).all()
        assert abs(round(np.linalg.det(u.astype(float)))) == 1 and abs(round(np.linalg.det(w.astype(float)))) == 1
        beta = rng.standard_normal(3) + 1j * rng.standard_normal(3)
        roots = binomial_solutions(matrix, beta)
        assert len(roots) == round(abs(np.linalg.det(matrix)))
        powers = np.prod(roots[:, None, :] ** matrix[None, :, :], axis=2)
        assert np.allclose(powers, beta[None, :], rtol=1e-9)
        assert len(set(cluster_labels(roots, 1e-8))) == len(roots)


@pytest.mark.parametrize("n, expected", [(5, 70), (6, 156)])
def test_every_solution_of_cyclic_n_with_as_many_paths(n, expected):
    # cyclic 5 and 6 have 70 and 156 isolated regular solutions (Bjorck and Froberg 1991, from memory)
    system = cyclic(n)
    result = solve_system(system, SolveOptions(start="polyhedral"), seed=n)
    counts = result.path_counts()
    assert counts["tracked"] == expected and result.extra["start"]["chosen"] == "polyhedral"
    assert len(result.solutions) == expected and all(s.multiplicity == 1 for s in result.solutions)
    points = np.array([s.point for s in result.solutions])
    values = BatchEvaluator([p.numeric() for p in system.polynomials]).evaluate(points, jacobian=False)
    assert np.max(np.abs(values)) < 1e-8


def test_zero_coordinates_are_found_after_adding_the_origin():
    # x^2 + y - x = y (y - x) = 0 by hand: y = 0 gives x^2 - x = 0 (x = 0, 1), y = x gives x^2 = 0 (x = 0 twice);
    # the roots are (1, 0) and (0, 0) with multiplicity 3 (common practice, computed by hand)
    system = parse_system(["x^2 + y - x", "y^2 - x*y"], ["x", "y"])
    result = solve_system(system, SolveOptions(start="polyhedral"), seed=1)
    assert result.extra["start"]["zero_coordinates"] == ZeroCoordinates.ORIGIN_ADDED.value
    found = sorted((round(s.point[0].real, 6) + 0.0, round(s.point[1].real, 6) + 0.0, s.multiplicity)
                   for s in result.solutions)
    assert found == [(0.0, 0.0, 3), (1.0, 0.0, 1)]


# --- the choice -------------------------------------------------------------------------------

def test_auto_takes_the_polyhedral_start_for_a_sparse_system_and_says_why():
    # x^3 y^3 - x - 1 = x^3 y^3 - y - 2 = 0: y = x - 1 and x^3 (x - 1)^3 = x + 1, six roots (by hand),
    # against a Bezout number of 36
    system = parse_system(["x^3*y^3 - x - 1", "x^3*y^3 - y - 2"], ["x", "y"])
    result = solve_system(system, SolveOptions(start="auto"), seed=2)
    block = result.extra["start"]
    assert block["chosen"] == "polyhedral" and block["paths"]["polyhedral"] == 6 and "mixed volume" in block["reason"]
    assert result.path_counts()["tracked"] == 6 and len(result.solutions) == 6


@pytest.mark.parametrize("seed", [0, 1])
def test_auto_leaves_the_cell_search_out_where_its_set_up_would_dominate(seed):
    # the 6 x 6 eigenproblem: 6 eigenpairs by the 2-homogeneous start (v and l grouped; its count is
    # n, common practice, no source); its cell search (once 44 s against 0.8 s for the 6 paths,
    # decision 0047) is estimated from the relation table and not done: decided by counts, no clock
    rng = np.random.default_rng(200 + seed)
    system = eigen_system(rng.standard_normal((6, 6)), rng.standard_normal(6))
    choice = choose_start(system, StartKind.AUTO, rng=np.random.default_rng(seed))
    assert choice.kind is StartKind.MULTIHOMOGENEOUS and choice.n_paths == 6
    assert choice.polyhedral is None and "polyhedral" not in choice.counts
    assert "mixed volume was not computed" in choice.reason


def test_unknown_start_and_projective_polyhedral_are_refused():
    with pytest.raises(InputError, match="unknown start"):
        SolveOptions(start="simplex").validated()
    projective = parse_system(["x^2 - y*z", "x - y"], ["x", "y", "z"], projective=True)
    with pytest.raises(InputError, match="affine systems"):
        choose_start(projective, StartKind.POLYHEDRAL)
    assert choose_start(projective, StartKind.AUTO).kind == StartKind.TOTAL_DEGREE


def test_solve_command_reads_groups_and_reports_the_start(tmp_path):
    path = tmp_path / "eigen.toml"
    path.write_text('variables = ["u", "v", "l"]\nequations = ["2*u + v - l*u", "u + 3*v - l*v", "u + 2*v - 1"]\n'
                    'groups = [["u", "v"], ["l"]]\n')
    done = subprocess.run([sys.executable, "-m", "numag", "solve", str(path), "--start", "multihomogeneous",
                           "--seed", "1", "--json"], capture_output=True, text=True, timeout=300)
    data = json.loads(done.stdout)
    assert data["start"]["chosen"] == "multihomogeneous" and data["start"]["groups"]["source"] == "file"
    assert data["paths"]["tracked"] == 2 and len(data["solutions"]) == 2
    path.write_text('variables = ["u", "v"]\nequations = ["u*v - 1", "u + v"]\ngroups = [["u"], ["w"]]\n')
    done = subprocess.run([sys.executable, "-m", "numag", "solve", str(path)], capture_output=True, text=True,
                          timeout=300)
    assert done.returncode == 2 and "not a variable" in done.stderr and "Traceback" not in done.stderr


# --- the null-vector system -------------------------------------------------------------------

@pytest.mark.parametrize("name", ["node", "cusp", "four_generic_lines", "trifolium_triple_point",
                                  "cone_over_smooth_plane_cubic", "smooth_conic"])
def test_null_vector_singular_points_with_the_two_homogeneous_start(problems, name):
    # the singular points of the shared problems (each entry's "source"), the same with both starts,
    # found with fewer paths of the 2-homogeneous start (x and lambda grouped)
    problem = problems[name]
    system = parse_system(problem["equations"], problem["variables"])
    by_degree = isolated_singular_points(system, "total-degree", seed=5)
    grouped = isolated_singular_points(system, "multihomogeneous", seed=5)
    expected = problem["expected"]["singular_points"]
    assert len(by_degree.points) == len(grouped.points) == expected
    if expected:
        distance = np.abs(by_degree.points[:, None, :] - grouped.points[None, :, :]).max(axis=2)
        assert distance.min(axis=1).max() < 1e-6
    assert grouped.paths < by_degree.paths
    assert grouped.start["groups"]["groups"][1] == ["lambda1"]


@pytest.mark.parametrize("start", ["multihomogeneous", "polyhedral"])
def test_run_folders_hold_the_structured_starts_paths(tmp_path, start):
    # path k is computed from k alone: a run saved in batches of 2 is read back whole on resume, with the
    # same answer, and the run folder refuses a resume with another start
    from numag.tracking.solve import Execution
    system = parse_system(["x*u + y*v - 1", "x*v - y + 2*u", "x + y - 1 + x*y", "u - v + 3"], ["x", "y", "u", "v"])
    options = SolveOptions(start=start, batch_size=2)
    folder = str(tmp_path / "run")
    first = solve_system(system, options, seed=4, execution=Execution(run_folder=folder))
    again = solve_system(system, options, seed=4, execution=Execution(run_folder=folder, resume=True))
    assert again.extra["execution"]["batches_resumed"] == again.extra["execution"]["batches"] > 1
    assert np.array_equal(first.status, again.status)
    key = lambda point: tuple(np.round(point, 6))
    assert np.allclose(sorted((s.point for s in first.solutions), key=key),
                       sorted((s.point for s in again.solutions), key=key))
    other = "polyhedral" if start == "multihomogeneous" else "multihomogeneous"
    with pytest.raises(InputError, match="different run"):
        solve_system(system, SolveOptions(start=other, batch_size=2), seed=4,
                     execution=Execution(run_folder=folder, resume=True))


def test_lost_first_stage_paths_become_a_warning():
    # a path of the polyhedral first stage that fails starts nothing: the report must say so (exit 3)
    from numag.app.report import completeness_warnings
    block = {"random_system_paths": {"tracked": 10, "converged": 7, "singular_endpoint": 1}}
    assert "2 paths of the polyhedral start's first stage" in completeness_warnings({"start": block})[0]
    block["random_system_paths"]["converged"] = 9
    assert completeness_warnings({"start": block}) == []


@pytest.mark.parametrize("kind", ["total-degree", "multihomogeneous", "polyhedral"])
def test_precise_start_evaluation_agrees_with_double(kind):
    # the precision rescue evaluates the homotopy in mpmath: it must be the same H, dH/dX and dH/ds as
    # the batched double evaluation (mpmath as the reference; common practice, no source)
    import mpmath
    system = parse_system(["x*u + y*v - 1", "x*v - y + 2*u", "x + y - 1 + x*y", "u - v + 3"], ["x", "y", "u", "v"])
    rng = np.random.default_rng(8)
    point = rng.standard_normal(5) + 1j * rng.standard_normal(5)
    if kind == "polyhedral":  # a point of the cell with the most distinct powers of t (its label appended)
        start = PolyhedralStart.random(system.polynomials, rng)
        homotopy = PolyhedralHomotopy(start, rng.standard_normal(5) + 1j * rng.standard_normal(5))
        cell = max(range(len(start.cells)), key=lambda c: len(np.unique(homotopy.powers[c])))
        assert len(np.unique(homotopy.powers[cell])) > 2
        point = np.append(point, homotopy.start_solutions([homotopy.ends[cell] - 1])[0, -1])
        assert homotopy.cell_of(point[None, :])[0] == cell
    else:
        homotopy = (StraightLineHomotopy.total_degree(system, rng) if kind == "total-degree" else
                    StraightLineHomotopy.multihomogeneous(system, VariableGroups.of(system, [["x", "y"], ["u", "v"]]),
                                                          rng))
    s = 0.37
    values, jacobian, derivative = homotopy.evaluate(point[None, :], np.array([s]))
    with mpmath.workdps(30):
        precise = homotopy.evaluate_precise([mpmath.mpc(z.real, z.imag) for z in point], mpmath.mpf(s), mpmath.mp)
    as_array = lambda m: np.array(m.tolist(), dtype=complex)
    assert np.allclose(as_array(precise[0]).ravel(), values[0], rtol=1e-12, atol=1e-12)
    assert np.allclose(as_array(precise[1]), jacobian[0], rtol=1e-12, atol=1e-12)
    assert np.allclose(as_array(precise[2]).ravel(), derivative[0], rtol=1e-12, atol=1e-12)


def test_first_stage_in_batches_on_worker_processes_reaches_the_same_points():
    # the polyhedral first stage through the executor: 2 worker processes, batches of 2 paths mixing
    # cells, against one batch in this process; x^3 y^3 - x - 1 = x^3 y^3 - y - 2 = 0 has six roots
    # (y = x - 1, x^3 (x - 1)^3 = x + 1, by hand), as does the random system on its supports
    from numag.run.executor import make_executor
    system = parse_system(["x^3*y^3 - x - 1", "x^3*y^3 - y - 2"], ["x", "y"])
    start = PolyhedralStart.random(system.polynomials, np.random.default_rng(5))
    here, here_counts = track_cells(start, np.random.default_rng(6))
    executor = make_executor(workers=2, batches=3)
    try:
        there, there_counts = track_cells(start, np.random.default_rng(6), batch_size=2, executor=executor)
        assert executor.describe()["workers"] == 2
    finally:
        executor.close()
    assert here_counts.converged == there_counts.converged == start.n_paths == 6
    key = lambda point: (round(point[0].real, 6), round(point[0].imag, 6))
    assert np.allclose(sorted(here, key=key), sorted(there, key=key), atol=1e-8)
    values = [sum(c * np.prod(there ** a, axis=1) for a, c in zip(support, coefficients))
              for support, coefficients in zip(start.supports, start.coefficients)]
    assert np.max(np.abs(values)) < 1e-8


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_one_batch_of_many_cells_is_each_cell_s_own_homotopy(seed):
    # the batched polyhedral homotopy against the formula written out here, row by row: H_i = sum_a c_a
    # t^e_ca X^a on the homogenised terms with the powers e_ca = (<a, alpha_c> + w(a) - beta_ci) / e_min
    # of each row's own cell (Huber and Sturmfels 1995, "A polyhedral method for solving sparse polynomial
    # systems", Math. Comp.; from memory), and dH/ds against a central difference (common practice, no source)
    system = parse_system(["x*u + y*v - 1", "x*v - y + 2*u", "x + y - 1 + x*y", "u - v + 3"], ["x", "y", "u", "v"])
    rng = np.random.default_rng(seed)
    start = PolyhedralStart.random(system.polynomials, rng)
    homotopy = PolyhedralHomotopy(start, rng.standard_normal(5) + 1j * rng.standard_normal(5))
    paths = rng.permutation(start.n_paths)  # every cell's paths, mixed up in one batch
    points = homotopy.start_solutions(paths)
    points[:, :-1] += 0.3 * (rng.standard_normal((len(paths), 5)) + 1j * rng.standard_normal((len(paths), 5)))
    s = rng.random(len(paths))
    values, _, derivative = homotopy.evaluate(points, s)
    cells = np.searchsorted(np.cumsum([c.volume for c in start.cells]), paths, side="right")
    for row, cell in enumerate(cells):
        normal = start.cells[cell].normal
        lifted = [support @ normal + lifting for support, lifting in zip(start.supports, start.liftings)]
        powers = [l - l[list(start.cells[cell].pairs[i])].min() for i, l in enumerate(lifted)]
        positive = np.concatenate(powers)
        scale = positive[positive > 1e-12].min()
        x0, x = points[row, 0], points[row, 1:-1]

        def h(t):
            out = []
            for support, coefficients, e in zip(start.supports, start.coefficients, powers):
                degree = support.sum(axis=1).max()
                out.append(sum(c * t ** max(p / scale, 0) * np.prod(x ** a) * x0 ** (degree - a.sum())
                               for a, c, p in zip(support, coefficients, e)))
            return np.array(out)

        t = 1 - s[row]
        assert np.allclose(values[row, :4], h(t), rtol=1e-10, atol=1e-10)
        step = 1e-6
        assert np.allclose(derivative[row, :4], -(h(t + step) - h(t - step)) / (2 * step), rtol=1e-5, atol=1e-6)
    assert np.array_equal(homotopy.cell_of(points), cells)
    assert np.all(values[:, 4] == 0)  # the label row


@pytest.mark.parametrize("seed", [3, 4])
def test_the_polyhedral_homotopy_is_holomorphic_on_the_endgame_loops(seed):
    # the Cauchy endgame integrates around s = 0: there dH/ds must be the complex derivative of H (a
    # difference quotient in a complex direction agrees with it; common practice, no source). With
    # t = 1 - Re s it was not.
    system = parse_system(["x^2*y + 3*x - 1", "x*y^2 - y + 2"], ["x", "y"])
    rng = np.random.default_rng(seed)
    start = PolyhedralStart.random(system.polynomials, rng)
    homotopy = PolyhedralHomotopy(start, rng.standard_normal(3) + 1j * rng.standard_normal(3))
    points = homotopy.start_solutions()
    points[:, :-1] += 0.2 * (rng.standard_normal(points[:, :-1].shape) + 1j * rng.standard_normal(points[:, :-1].shape))
    s = 0.1 * np.exp(2j * np.pi * rng.random(len(points)))
    _, _, derivative = homotopy.evaluate(points, s)
    step = 1e-6 * np.exp(1j * 0.7)
    difference = (homotopy.evaluate_values(points, s + step) - homotopy.evaluate_values(points, s - step)) / (2 * step)
    assert np.allclose(derivative[:, :2], difference[:, :2], rtol=1e-5, atol=1e-6)


def test_the_polyhedral_first_stage_reports_its_paths():
    # progress of the first stage in the one protocol: a stage sentence, then paths done of the mixed volume
    # (cyclic 5 has mixed volume 70: Bjorck and Froberg 1991, from memory)
    seen = []
    solve_system(cyclic(5), SolveOptions(start="polyhedral"), seed=2,
                 progress=lambda message, done=None, total=None: seen.append((message, done, total)))
    first = [k for k, (message, _, _) in enumerate(seen) if message.startswith("the polyhedral first stage")]
    second = [k for k, (message, _, _) in enumerate(seen) if message.startswith("the polyhedral second stage")]
    assert len(first) == len(second) == 1 and first[0] < second[0]
    counts = [(done, total) for _, done, total in seen[first[0]:second[0]] if total is not None]
    assert counts and counts[-1] == (70, 70) and all(total == 70 for _, total in counts)


@pytest.mark.parametrize("seed", [0, 3, 5])
def test_badly_scaled_simple_roots_of_the_random_system_are_reached_as_regular(seed):
    # A random system on the supports, then x -> 1000 x, z -> z / 1000: its roots stay simple (a generic
    # system's roots in the torus are: Bernstein 1975, "The number of roots of a system of equations",
    # from memory) but their projective condition numbers reach 1e9 and more. The first stage judges an
    # endpoint by Newton settling on it, not by its condition: every path converges, and the points are
    # the unscaled system's roots scaled back (a diagonal change of variables, by hand).
    system = parse_system(["x*y + y*z + z*x + x + 1", "x*y*z - 2*x + y - 3", "x^2*z + y^2 + z - 1"], ["x", "y", "z"])
    scale = np.array([1e3, 1.0, 1e-3])
    start = PolyhedralStart.random(system.polynomials, np.random.default_rng(seed))
    plain, plain_counts = track_cells(start, np.random.default_rng(seed + 10))
    start.coefficients = [c * np.prod(scale ** -s, axis=1) for c, s in zip(start.coefficients, start.supports)]
    scaled, counts = track_cells(start, np.random.default_rng(seed + 10))
    assert counts.converged == plain_counts.converged == start.n_paths
    key = lambda point: (round(point[1].real, 5), round(point[1].imag, 5))
    assert np.allclose(sorted(scaled / scale, key=key), sorted(plain, key=key), rtol=1e-7, atol=1e-9)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_auto_weighs_paths_by_their_start_not_only_their_count(seed):
    # l = 2 and two cubics in (x, y) with l in every coefficient: 9 roots (Bezout's theorem for two general
    # plane cubics; common practice, no source). The 2-homogeneous count ((x, y) and l grouped) is 9 against
    # a Bezout number of 16, but a path of products of linear forms costs about twice a total-degree one
    # (decision 0088), so auto takes the total-degree start, whose estimated cost (16) is below 2 x 9; the
    # cell search (a relation table of 45,360 entries) is estimated dearer still and not done
    rng = np.random.default_rng(40 + seed)
    monomials = [f"x^{i}*y^{j}*l^{k}" for i in range(4) for j in range(4 - i) for k in range(2)]

    def dense():
        return " + ".join(f"({c:.6f})*{m}" for c, m in zip(rng.uniform(-2, 2, len(monomials)), monomials))

    system = parse_system(["l - 2", dense(), dense()], ["x", "y", "l"])
    choice = choose_start(system, StartKind.AUTO, rng=np.random.default_rng(seed))
    assert choice.counts == {"total-degree": 16, "multihomogeneous": 9}
    assert choice.kind is StartKind.TOTAL_DEGREE and choice.polyhedral is None
    assert choice.report()["estimated_cost"] == {"total-degree": 16.0, "multihomogeneous": 18.0}
    assert "no other start costs less" in choice.reason and "not computed" in choice.reason
    auto = solve_system(system, SolveOptions(start="auto"), seed=seed)
    grouped = solve_system(system, SolveOptions(start="multihomogeneous"), seed=seed)
    assert auto.extra["start"]["chosen"] == "total-degree"
    assert len(auto.solutions) == len(grouped.solutions) == 9
    key = lambda point: tuple(np.round(point, 6))
    assert np.allclose(sorted((s.point for s in auto.solutions), key=key),
                       sorted((s.point for s in grouped.solutions), key=key), atol=1e-8)


@pytest.mark.parametrize("seed", [1, 2, 3])
@pytest.mark.parametrize("name", ["four_generic_lines", "trifolium_triple_point"])
def test_auto_takes_the_polyhedral_start_of_a_null_vector_system_at_an_equal_count(problems, name, seed):
    # the square null-vector systems of the shared problems (each entry's "source"): the mixed volume equals
    # the 2-homogeneous count (12), and a polyhedral path costs about a total-degree one, a 2-homogeneous
    # path twice as much (decision 0088: measured 0.6 to 4.1 times, median 1.8), so auto takes the polyhedral
    # start; the singular points are those of the total-degree start
    problem = problems[name]
    system = parse_system(problem["equations"], problem["variables"])
    auto = isolated_singular_points(system, "auto", seed=seed)
    by_degree = isolated_singular_points(system, "total-degree", seed=seed)
    counts = auto.start["paths"]
    assert counts["polyhedral"] == counts["multihomogeneous"] == 12 < counts["total-degree"] == 16
    assert auto.start["chosen"] == "polyhedral" and "least estimated cost" in auto.start["reason"]
    costs = auto.start["estimated_cost"]
    assert costs["polyhedral"] < costs["total-degree"] < costs["multihomogeneous"]
    assert len(auto.points) == len(by_degree.points) == problem["expected"]["singular_points"]
    distance = np.abs(auto.points[:, None, :] - by_degree.points[None, :, :]).max(axis=2)
    assert distance.min(axis=1).max() < 1e-6 and distance.min(axis=0).max() < 1e-6


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_a_lost_first_stage_path_goes_again_on_another_patch_with_smaller_steps(monkeypatch, seed):
    # every root of the random system is finite and regular, so a first-stage path that ends at infinity
    # jumped (seen on the cone over a plane cubic's null-vector system, seed 3: decision 0088); the loss is
    # forced here on the first tracking, and the path must reach the root it was missing. x y = 1,
    # x^2 + y^2 = 4 with random coefficients on the same monomials: 4 roots (the mixed volume; common
    # practice, no source), checked by evaluating the random system
    import numag.tracking.polyhedral as polyhedral
    real_track, calls = polyhedral.track, []

    def losing_the_first_path(homotopy, starts, options=None, **kwargs):
        run = real_track(homotopy, starts, options, **kwargs)
        calls.append(options)
        if len(calls) == 1:
            run.status[0] = PathStatus.AT_INFINITY
        return run

    monkeypatch.setattr(polyhedral, "track", losing_the_first_path)
    system = parse_system(["x*y - 1", "x^2 + y^2 - 4"], ["x", "y"])
    start = PolyhedralStart.random(system.polynomials, np.random.default_rng(seed))
    points, counts = track_cells(start, np.random.default_rng(seed + 10))
    assert len(calls) == 2 and calls[1].max_step < calls[0].max_step
    assert counts.converged == 4 and counts.at_infinity == 0 and counts.retracked == 1
    assert len(set(cluster_labels(points, 1e-8))) == 4
    values = BatchEvaluator([p.numeric() for p in start.random_polynomials()]).evaluate(points, jacobian=False)
    assert np.max(np.abs(values)) < 1e-10
