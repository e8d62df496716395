import itertools
import io
import json
import pathlib

import numpy as np
import pytest
import sympy

import numag
from numag.errors import InputError
from numag.system.parse import parse_system
from numag.app.report import dumps, solve_report_from_dict, solve_report_to_dict
from numag.tracking.solve import SolveOptions, solve_system
from numag.tracking.tracker import PathStatus


def cyclic(n):
    names = [f"z{i}" for i in range(n)]
    equations = [" + ".join("*".join(names[(i + j) % n] for j in range(k)) for i in range(n)) for k in range(1, n)]
    equations.append("*".join(names) + " - 1")
    return parse_system(equations, names)


def test_cyclic_5_has_70_isolated_solutions():
    # cyclic 5-roots: 70 isolated solutions (Bjorck and Froberg, J. Symbolic Comput. 1991, from memory)
    result = solve_system(cyclic(5), seed=3)
    assert len(result.solutions) == 70
    assert all(s.multiplicity == 1 for s in result.solutions)
    counts = result.path_counts()
    assert counts["tracked"] == 120 and counts["failed"] == 0
    assert counts["converged"] + counts["singular_endpoint"] + counts["at_infinity"] + counts["failed"] == 120


def test_cyclic_4_positive_dimensional_set_is_flagged_not_counted():
    # the cyclic 4-roots solution set is one-dimensional (a fact of the field, from memory; here: the two
    # curves z2 = -z0, z3 = -z1, z0 z1 = +-1)
    result = solve_system(cyclic(4), seed=0)
    assert result.solutions == []
    assert len(result.not_isolated) > 0
    for group in result.not_isolated:
        z = group.point
        assert abs(z[2] + z[0]) < 1e-6 and abs(z[3] + z[1]) < 1e-6 and abs(abs(z[0] * z[1]) - 1) < 1e-6


@pytest.mark.parametrize("seed", [0, 1, 2, 3])
def test_an_endgame_estimate_on_the_way_to_infinity_is_not_counted_as_a_solution(seed):
    # Cyclic 6 has 156 isolated solutions (Bjorck and Froberg 1991, from memory); its total-degree run reported
    # 159: three cycles of 4 paths went to the points at infinity (0 : 0, a, 0, b, 0, c) with a + b + c = 0
    # (decision 0049). There every homogenised equation but the last vanishes identically and the last is
    # -X_0^6 (from the equations themselves, common practice, no source), so an endgame estimate with
    # X_0 ~ eps^(1/6) relative passes every homogeneous residual test. Here such an estimate, with the sizes
    # seen in that run (|X_0| / ||X|| = 4.5e-4, winding 4, condition 1e16), is classified and collected as
    # solve does: at infinity, and no solution.
    from numag.tracking.homotopy import StraightLineHomotopy
    from numag.tracking.solve import _collect, _unresolved_infinity
    from numag.tracking.tracker import TrackerOptions
    system = cyclic(6)
    rng = np.random.default_rng(seed)
    homotopy = StraightLineHomotopy.total_degree(system, rng)
    a, b = rng.standard_normal(2) + 1j * rng.standard_normal(2)
    direction = np.array([0, a, 0, b, 0, -(a + b)])
    homogeneous = np.concatenate([[4.5e-4 * np.linalg.norm(direction)], direction])
    homogeneous /= homogeneous @ homotopy.patch  # on the patch, as the tracker's endpoints are
    x0 = homogeneous[0]
    values = [poly.evaluate(homogeneous[1:] / x0) * x0 ** poly.degree for poly in system.polynomials]
    size = np.linalg.norm(homogeneous)
    assert max(abs(v) for v in values[:-1]) < 1e-12 * size and abs(values[-1] + x0 ** 6) < 1e-12 * size ** 6
    # ... and a genuine singular endpoint beside it: the triple root (0, 1) of x^3 = 0, y = x + 1, estimated
    # to 1e-6, keeps its status (common practice, no source)
    triple = parse_system(["x^3", "y - x - 1"], ["x", "y"])
    triple_homotopy = StraightLineHomotopy.total_degree(triple, rng)
    estimate = np.array([1.0, 1e-6, 1.0 + 1e-6], dtype=complex)
    estimate /= estimate @ triple_homotopy.patch
    singular = np.full(4, int(PathStatus.SINGULAR_ENDPOINT))
    assert _unresolved_infinity(triple_homotopy, np.tile(estimate, (3, 1)), singular[:3], TrackerOptions()).size == 0
    endpoints = np.tile(homogeneous, (4, 1))
    status = singular.copy()
    status[_unresolved_infinity(homotopy, endpoints, status, TrackerOptions())] = PathStatus.AT_INFINITY
    collected = _collect(system, endpoints, status, np.full(4, 4), np.full(4, 1e16), SolveOptions(), rng)
    assert collected[0] == []  # before decision 0049 the four paths were one solution of multiplicity 4
    assert len(collected[1]) == 1 and collected[1][0].multiplicity == 4 and collected[1][0].at_infinity


def test_unverified_groups_are_reported_and_warned():
    # the JSON report keeps the groups refinement could not settle and warns (exit 3); a report of a run without
    # them has none (common practice, no source)
    from numag.app.report import completeness_warnings
    result = solve_system(parse_system(["x^3", "y - x - 1"], ["x", "y"]), seed=0)
    data = solve_report_to_dict(result, SolveOptions())
    assert data["unverified"] == [] and not any("do not satisfy" in w for w in completeness_warnings(data))
    result.unverified = [result.solutions[0]]
    data = json.loads(dumps(solve_report_to_dict(result, SolveOptions())))
    assert len(data["unverified"]) == 1
    assert any(w.startswith("1 singular endpoint group (3 paths) does not satisfy the equations") for w in
               completeness_warnings(data))
    again, _ = solve_report_from_dict(data)
    assert len(again.unverified) == 1 and again.unverified[0].multiplicity == 3


def test_triple_root_multiplicity_and_accuracy():
    # x^3 = 0 with y = x + 1: the root (0, 1) has multiplicity 3 (common practice, no source)
    result = solve_system(parse_system(["x^3", "y - x - 1"], ["x", "y"]), seed=1)
    (solution,) = result.solutions
    assert solution.multiplicity == 3
    assert np.abs(solution.point - np.array([0, 1])).max() < 1e-8


def test_tangent_curves_multiplicity_two():
    # the parabola y = x^2 is tangent to y = 0 at the origin: intersection multiplicity 2, and it meets
    # the line y = 1 ... here the second curve is the circle x^2 + (y - 1)^2 = 1, tangent at the origin
    # with intersection multiplicity 2; the other two intersections are (+-1, 1) (common practice, no source)
    system = parse_system(["y - x^2", "x^2 + (y - 1)^2 - 1"], ["x", "y"])
    result = solve_system(system, seed=2)
    by_multiplicity = sorted((s.multiplicity, tuple(np.round(s.point.real, 8))) for s in result.solutions)
    assert by_multiplicity[-1][0] == 2 and np.allclose(by_multiplicity[-1][1], [0, 0], atol=1e-8)
    assert sorted(p for m, p in by_multiplicity if m == 1) == [(-1.0, 1.0), (1.0, 1.0)]


def test_surplus_paths_end_at_infinity():
    # x y = 1 and x y + x = 2 have the single solution (1, 1); Bezout's bound 4 leaves 3 paths at infinity
    result = solve_system(parse_system(["x*y - 1", "x*y + x - 2"], ["x", "y"]), seed=1)
    assert [tuple(np.round(s.point, 10)) for s in result.solutions] == [(1, 1)]
    counts = result.path_counts()
    assert counts["at_infinity"] == 3 and sum(s.multiplicity for s in result.at_infinity) == 3
    for point in result.at_infinity:
        assert abs(point.point[0]) < 1e-7  # homogenising coordinate first


def standard_monomial_count(polynomials, symbols):
    """Number of standard monomials of a zero-dimensional ideal from sympy's Groebner basis."""
    basis = sympy.groebner(polynomials, *symbols, order="grevlex")
    leading = [sympy.Poly(g, *symbols).monoms(order="grevlex")[0] for g in basis.exprs]
    bound = max(max(m) for m in leading) + 1
    return sum(1 for e in itertools.product(range(bound), repeat=len(symbols))
               if not any(all(a >= b for a, b in zip(e, m)) for m in leading))


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_counts_agree_with_sympy_groebner(seed):
    # sympy's Groebner basis (Meurer et al., PeerJ CS 2017) as the reference library: for a system with
    # generic coefficients on a sparse support the number of isolated solutions is the number of
    # standard monomials
    rng = np.random.default_rng(seed)
    a = [int(v) for v in rng.integers(1, 9, size=6)]
    equations = [f"{a[0]}*x^2*y + {a[1]}*x - {a[2]}", f"{a[3]}*x*y^2 - {a[4]}*y + {a[5]}"]
    x, y = sympy.symbols("x y")
    expected = standard_monomial_count([sympy.sympify(e.replace("^", "**")) for e in equations], [x, y])
    result = solve_system(parse_system(equations, ["x", "y"]), seed=seed)
    assert sum(s.multiplicity for s in result.solutions) == expected
    assert len(result.solutions) == expected


def test_non_square_input_is_refused_or_squared_up():
    system = parse_system(["x - 1", "y - 2", "x + y - 3"], ["x", "y"])
    with pytest.raises(InputError, match="--square-up"):
        solve_system(system)
    result = solve_system(system, SolveOptions(square_up=True), seed=0)
    assert result.squared_up and [tuple(np.round(s.point.real, 10)) for s in result.solutions] == [(1, 2)]
    with pytest.raises(InputError, match="not isolated"):
        solve_system(parse_system(["x - y"], ["x", "y"]))


def test_projective_system():
    # two conics in P^2 meet in 4 points (Bezout); x^2 - z^2 = 0 and y^2 - z^2 = 0: [+-1 : +-1 : 1]
    system = parse_system(["x^2 - z^2", "y^2 - z^2"], ["x", "y", "z"], projective=True)
    result = solve_system(system, seed=5)
    points = sorted(tuple(np.round((s.point / s.point[2]).real, 8)) for s in result.solutions)
    assert points == [(-1, -1, 1), (-1, 1, 1), (1, -1, 1), (1, 1, 1)]


def test_same_seed_same_answer_and_batch_independence():
    system = cyclic(5)
    a = solve_system(system, SolveOptions(batch_size=32), seed=9)
    b = solve_system(system, SolveOptions(batch_size=4096), seed=9)
    assert np.array_equal(a.status, b.status)
    key = lambda result: sorted(tuple(np.round(s.point, 6)) for s in result.solutions)
    assert key(a) == key(b)


def test_solve_report_round_trip():
    system = parse_system(["x^3", "y - x - 1"], ["x", "y"])
    options = SolveOptions()
    result = solve_system(system, options, seed=4)
    text = dumps(solve_report_to_dict(result, options))
    data = json.loads(text)
    assert data["components"][0]["dimension"] == 0 and data["components"][0]["degree"] == 1
    assert data["components"][0]["multiplicity"] == 3
    back, back_options = solve_report_from_dict(data)
    assert back_options == options
    assert dumps(solve_report_to_dict(back, back_options)) == text


def test_path_jumping_is_detected_and_repaired():
    # Bezout's theorem: 2^6 solutions of 6 generic quadrics. Reckless tracker settings make paths jump
    # onto each other (two paths at one regular solution); solve must notice and track them again.
    from numag.tracking.tracker import TrackerOptions
    rng = np.random.default_rng(3)
    names = [f"x{j}" for j in range(6)]
    monomials = [m for d in range(3) for m in itertools.combinations_with_replacement(names, d)]
    equations = [" + ".join(f"({c:.8f})*{'*'.join(m) or '1'}" for c, m in zip(rng.standard_normal(len(monomials)),
                                                                           monomials)) for _ in range(6)]
    system = parse_system(equations, names)
    reckless = TrackerOptions(corrector_iterations=8, predictor_error=0.5, max_step=1.0, chord_corrector=False,
                              first_contraction=0.5)
    result = solve_system(system, SolveOptions(tracker=reckless), seed=0)
    assert result.path_counts()["retracked"] > 0
    assert len(result.solutions) == 64 and all(s.multiplicity == 1 for s in result.solutions)


def test_parameter_homotopy_agrees_with_total_degree():
    # Bezout: 3 x 2 = 6 solutions for generic coefficients; moving the solutions of one generic system to
    # another by a parameter homotopy must find the same solutions as solving the target directly
    from numag.tracking.solve import continue_solutions
    start = parse_system(["x^3 + 2*x*y - 3*y + 1", "x*y + y^2 - 5*x + 2"], ["x", "y"])
    target = parse_system(["2*x^3 - x*y + 4*y - 7/2", "3*x*y - y^2 + x - 1"], ["x", "y"])
    first = solve_system(start, seed=0)
    assert len(first.solutions) == 6
    moved = continue_solutions(start, [s.point for s in first.solutions], target, seed=1)
    direct = solve_system(target, seed=2)
    key = lambda result: sorted(tuple(np.round(s.point, 7)) for s in result.solutions)
    assert len(moved.solutions) == 6 and key(moved) == key(direct)


@pytest.mark.parametrize("name", ["four_generic_lines", "chebyshev_T4x_eq_T5y", "trifolium_triple_point",
                                  "cayley_cubic", "kummer_quartic_mu2_eq_2", "barth_sextic_exact"])
def test_singular_points_of_hypersurfaces_from_their_gradients(problems, name):
    # The singular points of a hypersurface f = 0 are the zeros of its gradient that lie on f = 0
    # (for homogeneous f Euler's formula makes f = 0 automatic). Expected counts and their sources are in
    # tests/data/problems.json: Chebyshev curves (Koseleff and Pecker), Cayley's 4-nodal cubic (Cayley 1869),
    # the Kummer quartic (16 nodes), Barth's sextic (65 nodes: W. Barth, "Two projective surfaces with many
    # nodes, admitting the symmetries of the icosahedron", J. Algebraic Geom. 1996).
    from numag.system.polynomial import PolynomialSystem
    entry = problems[name]
    surface = parse_system(entry["equations"], entry["variables"], projective=entry["projective"])
    f = surface.polynomials[0]
    gradient = PolynomialSystem(surface.variables, f.gradient(), projective=surface.projective)
    result = solve_system(gradient, SolveOptions(square_up=surface.projective), seed=1)
    assert result.path_counts()["failed"] == 0
    on_f = [s for s in result.solutions
            if abs(f.evaluate(s.point)) <= 1e-8 * (1 + np.linalg.norm(s.point)) ** f.degree]
    assert len(on_f) == entry["expected"]["singular_points"]
    assert sum(s.real for s in on_f) == entry["expected"]["real_singular_points"]


def test_squared_up_extra_solutions_are_discarded():
    # x = 1, y = 2, x + y = 3 plus x*y = 2: one solution; random combinations of the four equations
    # in two unknowns have more, which must be discarded (common practice, no source)
    system = parse_system(["x - 1", "y - 2", "x*y - 2", "x^2 - 1"], ["x", "y"])
    result = solve_system(system, SolveOptions(square_up=True), seed=4)
    assert [tuple(np.round(s.point.real, 10)) for s in result.solutions] == [(1, 2)]
    assert len(result.discarded) >= 1


# --- executors and run folders ----------------------------------------------------------------------

def _answer(result):
    """Solutions as a set of rounded points, and every path's status: what must not depend on the executor."""
    points = {tuple(np.round(s.point, 8)) for s in result.solutions}
    return points, result.status.tolist(), result.path_counts()


def _cubics():
    # three cubics in three unknowns: Bezout number 27 (common practice, no source)
    return parse_system(["x^3 + y^3 + z^3 - 3", "x*y*z - 1 + x^2", "x^2 - y^2 + z^3 - 2"], ["x", "y", "z"])


def test_same_seed_same_answer_with_one_two_workers_and_dask():
    pytest.importorskip("distributed")
    from numag.tracking.solve import Execution
    options = SolveOptions(batch_size=5)
    one = solve_system(_cubics(), options, seed=8, execution=Execution(workers=1))
    two = solve_system(_cubics(), options, seed=8, execution=Execution(workers=2))
    dask = solve_system(_cubics(), options, seed=8, execution=Execution(local_dask=True, workers=2))
    assert _answer(one) == _answer(two) == _answer(dask)
    assert [r.extra["execution"]["executor"] for r in (one, two, dask)] == ["in-process", "process pool", "dask"]
    assert one.extra["execution"]["batches"] == 6 and two.extra["execution"]["workers"] == 2


def test_killed_run_resumes_without_tracking_finished_batches_again(tmp_path):
    import os
    import signal
    import subprocess
    import sys
    import time
    from numag.app.cli import main
    system_file = tmp_path / "quartics.toml"
    # 4 x 4 x 4 = 64 paths in batches of 2: long enough to be killed mid-way
    system_file.write_text('variables = ["x", "y", "z"]\nequations = ["x^4 + y^3*z - 2*z + 1", '
                           '"y^4 - x*z^2 + 3*x - 1", "z^4 + x^2*y^2 - y - 2"]\n')
    folder = tmp_path / "run"
    env = dict(os.environ, PYTHONPATH=str(pathlib.Path(numag.__file__).parent.parent))
    child = subprocess.Popen([sys.executable, "-m", "numag", "solve", str(system_file), "--run-folder", str(folder),
                              "--batch-size", "2", "--workers", "1", "--seed", "6", "--json"],
                             stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env)
    deadline = time.time() + 120
    while time.time() < deadline and len(list(folder.glob("batch-*.npz"))) < 4:
        time.sleep(0.01)
    child.send_signal(signal.SIGKILL)
    child.wait()
    # a batch counts once its checksum is in the manifest (a kill between writing the file and recording
    # it leaves a file that resume does not trust: it is tracked again)
    recorded = json.loads((folder / "manifest.json").read_text())["batch_files"]
    finished = {p.name: p.stat().st_mtime_ns for p in folder.glob("batch-*.npz") if str(int(p.name[6:12])) in recorded}
    assert 3 <= len(finished) < 32, "the run must be killed part-way"
    out = io.StringIO()
    assert main(["solve", "--resume", str(folder), "--json"], out=out) == 0
    resumed = json.loads(out.getvalue())
    assert resumed["execution"]["batches_resumed"] == len(finished)
    assert {p.name: p.stat().st_mtime_ns for p in folder.glob("batch-*.npz") if p.name in finished} == finished
    assert len(list(folder.glob("batch-*.npz"))) == 32
    out = io.StringIO()
    assert main(["solve", str(system_file), "--batch-size", "2", "--seed", "6", "--json"], out=out) == 0
    whole = json.loads(out.getvalue())
    assert resumed["path_status"] == whole["path_status"]
    # the same solutions up to rounding: batches tracked in another process need not agree to the
    # last bit (BLAS kernels may take other code paths for other memory alignments)
    ordered = lambda report: sorted((np.array(s["point"]).ravel() for s in report["solutions"]),
                                    key=lambda p: tuple(np.round(p, 6)))
    assert len(resumed["solutions"]) == len(whole["solutions"])
    assert np.allclose(ordered(resumed), ordered(whole), rtol=1e-10, atol=1e-12)


def test_a_run_folder_of_another_run_is_refused(tmp_path):
    from numag.errors import InputError
    from numag.tracking.solve import Execution
    solve_system(_cubics(), SolveOptions(batch_size=10), seed=1, execution=Execution(run_folder=str(tmp_path / "r")))
    with pytest.raises(InputError, match="different run"):
        solve_system(_cubics(), SolveOptions(batch_size=10), seed=2,
                     execution=Execution(run_folder=str(tmp_path / "r"), resume=True))
    with pytest.raises(InputError, match="already holds a run"):
        solve_system(_cubics(), SolveOptions(batch_size=10), seed=1, execution=Execution(run_folder=str(tmp_path / "r")))


def _forge(folder, index, change):
    """Change batch ``index`` of a run folder and record the new file's checksum: a consistent forgery."""
    import hashlib
    from numag.run.checkpoint import RunFolder
    run = RunFolder.open(folder)
    arrays = run.read_batch(index)
    change(arrays)
    run.write_batch(index, arrays)  # writes the file and records its sha256 and shapes
    return hashlib.sha256(run.batch_path(index).read_bytes()).hexdigest()


@pytest.mark.parametrize("seed", [1, 4])
def test_tampered_batches_are_tracked_again_never_trusted(tmp_path, seed):
    from numag.tracking.solve import Execution
    options = SolveOptions(batch_size=9)
    folder = tmp_path / "r"
    clean = solve_system(_cubics(), options, seed=seed, execution=Execution(run_folder=str(folder)))
    rng = np.random.default_rng(seed)

    def random_endpoints(arrays):
        arrays["endpoints"] = rng.standard_normal(arrays["endpoints"].shape) + 1j
        arrays["status"][:] = PathStatus.CONVERGED

    def all_at_infinity(arrays):
        arrays["status"][:] = PathStatus.AT_INFINITY

    def other_paths(arrays):
        arrays["indices"] = arrays["indices"] + 1

    _forge(folder, 0, random_endpoints)
    _forge(folder, 1, all_at_infinity)
    _forge(folder, 2, other_paths)
    raw = bytearray((folder / "batch-000000.npz").read_bytes())
    resumed = solve_system(_cubics(), options, seed=seed, execution=Execution(run_folder=str(folder), resume=True))
    rejected = {r["index"]: r["reason"] for r in resumed.extra["execution"]["batches_rejected"]}
    assert set(rejected) == {0, 1, 2}
    assert "do not solve the system" in rejected[0] and "statuses do not match" in rejected[1]
    assert "other paths" in rejected[2]
    assert len(resumed.solutions) == len(clean.solutions) and np.array_equal(resumed.status, clean.status)
    # a file changed without its checksum: refused by the checksum, tracked again
    (folder / "batch-000000.npz").write_bytes(bytes(raw[:-7]) + b"1234567")
    again = solve_system(_cubics(), options, seed=seed, execution=Execution(run_folder=str(folder), resume=True))
    assert "checksum" in again.extra["execution"]["batches_rejected"][0]["reason"]
    assert len(again.solutions) == len(clean.solutions)


def test_an_edited_manifest_is_refused_on_resume(tmp_path):
    from numag.app.cli import main
    from numag.tracking.solve import Execution
    folder = tmp_path / "r"
    solve_system(_cubics(), SolveOptions(batch_size=10), seed=1, execution=Execution(run_folder=str(folder)))
    manifest = json.loads((folder / "manifest.json").read_text())
    manifest["seed"] = 2
    (folder / "manifest.json").write_text(json.dumps(manifest))
    assert main(["solve", "--resume", str(folder)], out=io.StringIO()) == 2
    manifest["seed"] = 1
    manifest["system"]["equations"][0] = "x^3 - 2"
    (folder / "manifest.json").write_text(json.dumps(manifest))
    with pytest.raises(InputError, match="fingerprint mismatch in: system"):
        solve_system(_cubics(), SolveOptions(batch_size=10), seed=1,
                     execution=Execution(run_folder=str(folder), resume=True))


def test_solve_reaches_the_ambient_executor_like_every_stage():
    # One way to an executor: `using` reaches solve as it reaches the witness stages; one batch stays
    # here, several go to the ambient executor; an executor named in Execution still comes first.
    from numag.run.executor import InProcess, using
    from numag.tracking.solve import Execution

    class Recording(InProcess):
        name = "recording"

        def run(self, function, batches, attempts=2):
            self.batches_seen = getattr(self, "batches_seen", 0) + len(batches)
            return super().run(function, batches, attempts)

    options = SolveOptions(batch_size=10)
    plain = solve_system(_cubics(), options, seed=4, execution=Execution(workers=1))
    with Recording() as ambient, using(ambient):
        several = solve_system(_cubics(), options, seed=4)
        seen = ambient.batches_seen  # the 3 batches (and a fresh-gamma repair round's, if one ran)
        single = solve_system(_cubics(), SolveOptions(batch_size=64), seed=4)
        named = solve_system(_cubics(), options, seed=4, execution=Execution(workers=1))
    assert several.extra["execution"]["executor"] == "recording" and seen >= 3
    assert single.extra["execution"]["executor"] == "in-process"
    assert named.extra["execution"]["executor"] == "in-process" and ambient.batches_seen == seen
    assert _answer(several) == _answer(plain)  # the same paths whoever runs them (decision 0006)


#: p as a quartic in x, with two tiny odd terms, and the cubic x where its derivative in x vanishes.
PERTURBED = ["x^4 - 1/1250000*x^3 - 62499999999997/12500000000000*x^2 + 62499999999999/31250000000000000000*x - p"
             " + 2499999999999875000000000001/625000000000000000000000000",
             "4*x^3 - 3/1250000*x^2 - 2*62499999999997/12500000000000*x + 62499999999999/31250000000000000000"]


def perturbed_in_units(kx, kp):
    """PERTURBED with x -> x / 10^kx, p -> p / 10^kp, and its three solutions from sympy's exact cubic roots."""
    x, p = sympy.symbols("x p")
    first, second = (sympy.sympify(e.replace("^", "**")) for e in PERTURBED)
    moved = [sympy.expand(e.subs({x: x / sympy.Integer(10) ** kx, p: p / sympy.Integer(10) ** kp},
                                 simultaneous=True)) for e in (first, second)]
    roots = sympy.Poly(second, x).nroots(n=40)
    truth = [(complex(r) * 10.0 ** kx, complex(sympy.solve(first.subs(x, r), p)[0]) * 10.0 ** kp) for r in roots]
    return parse_system([str(e).replace("**", "^") for e in moved], ["x", "p"]), np.array(truth)



@pytest.mark.parametrize("seed, kx, kp, start", [(1, 0, 0, "total-degree"), (2, -3, 3, "total-degree"),
                                                 (3, 3, -3, "total-degree"), (1, 3, 3, "polyhedral"),
                                                 (2, -3, -3, "polyhedral"), (3, 0, 3, "polyhedral")])
def test_finite_regular_solutions_next_to_tiny_terms_are_found(seed, kx, kp, start):
    # The cubic's three simple real roots (sympy's exact polynomial roots, as reference) give three regular
    # solutions. Tiny terms of the first equation dragged its power of ten in the balancing by 10^3, p's unit
    # with it (p is in one term): the solutions then had projective condition 1e11 and every path was
    # reported at infinity, 0 solutions, exit 0 (decision 0099). In any units, from either start, all three.
    system, truth = perturbed_in_units(kx, kp)
    result = solve_system(system, SolveOptions(start=start), seed=seed)
    assert len(result.solutions) == 3 and all(s.multiplicity == 1 for s in result.solutions)
    found = np.array([s.point for s in result.solutions])
    for expected in truth:
        closest = np.min(np.max(np.abs(found - expected) / np.abs(expected)[None, :].clip(1e-300), axis=1))
        assert closest < 1e-6
    assert result.path_counts()["failed"] == 0
