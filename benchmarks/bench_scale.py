"""Large systems (issue 19): reading, start-up, the whole solve process, judging candidates, memory.

Run:  python benchmarks/bench_scale.py [--quick] [--full] [--sections parse,start,solve,judge,singular,check,large,
      conjugates,families,memory] [--sizes nodal=7,quadrics=4] [--memory-exponent 17] [--reference-limit 600] [--numag-limit 600]
      [--golden [--golden-seeds 1,2]]

Everything side by side in one run, one table per section (2 cores; the machine's load is printed first,
since times on a shared machine are upper bounds). The goals are the issue's:

* parse: one equation of 100,000 written-out terms read in under 3 s (``--quick``: 20,000);
* start: ``import numag`` and ``python -m numag --help`` under 0.3 s, beside ``python -c pass``;
* solve: the whole ``python -m numag solve`` process (start-up, reading, tracking, clustering, report)
  against the plain batched tracker of ``bench_yardstick.py`` (RK4 + Newton, affine, no endgame, one BLAS
  thread; about 50 lines of numpy inside a 150-line script) on dense real quadrics: >= 3 times as fast on
  256 paths, >= 8 times on 1,024;
* judge: the six-bar's 4 singular points judged in one batch (double first) beside mpmath for each (the
  way before issue 19), CPU seconds and verdicts;
* singular: the singular locus of a six-bar linkage in 10 unknowns (< 5 s), the Chebyshev curve
  T9(x) = T11(y) (40 nodes, < 2 s) and the union of three quadrics (< 10 s);
* check: ``python -m numag check`` of one folded configuration of the six-bar (the whole process);
* large: the singular locus of 3 x 3 matrices of rank <= 1 (``--full``: 4 x 4 matrices of rank <= 2, whose
  singular locus is the rank <= 1 matrices, dimension 7, degree 20; < 120 s), with the minors formulation
  (large minors evaluated, decision 0058) and with auto, each in a child process with a time limit;
* conjugates: nodes of two conjugate Cayley cubics (``--full``: four conjugate Togliatti quintics, 124
  nodes, < 60 s), the generator of the number field an unknown;
* families: per formulation a growing family -- nodal surfaces T_d(x) + T_d(y) + T_d(z) + 1 = 0 of degree
  3 to 10, the determinant of n x n matrices (n = 2 to 5), unions of k quadrics, mechanisms of a crank driving k
  change-point four-bars (k = 1 to 5) -- numag's time against size with sympy's Groebner time (grevlex, of F and
  its partials; for the mechanisms F and the maximal minors of its Jacobian) beside it, each in a child process with a
  time limit (``--reference-limit``, default 600 s), the crossover size and the ratio at the largest size
  both finish;
* golden (``--golden``, not in the default run): Barth's sextic with the golden ratio as an unknown p
  (p^2 - p - 1 = 0) in two affine charts, and the swallowtail, each in a child process (decision 0061);
* memory: peak resident memory of a ``numag solve`` process on 2^17 = 131,072 paths of 17 dense quadrics
  (< 500 MB; ``--quick``: 2^12), beside 2^14 paths for the bytes per path (both above one batch).

The problems are built here; where each comes from is printed beside it.
"""

import argparse
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from checkout import ROOT
from numag.singular.locus import singular_locus
from numag.system.parse import parse_polynomial, parse_system

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from bench_yardstick import plain_tracker, quadrics  # noqa: E402
from families import chebyshev, quadric_union  # noqa: E402

_ONE_THREAD = {"OMP_NUM_THREADS": "1", "OPENBLAS_NUM_THREADS": "1", "MKL_NUM_THREADS": "1"}


def _row(*cells, widths=(34, 12, 12, 12, 30)):
    print("  ".join(str(c).ljust(w) for c, w in zip(cells, widths)))


def _written_out(n_terms, n_variables=4, top_power=20, seed=0):
    """One equation of ``n_terms`` distinct terms ``c*x0^a*x1^b...`` with integer c in [-999, 999]."""
    rng = np.random.default_rng(seed)
    names = [f"x{j}" for j in range(n_variables)]
    exponents = np.unique(rng.integers(0, top_power + 1, size=(2 * n_terms, n_variables)), axis=0)
    exponents = exponents[rng.permutation(len(exponents))[:n_terms]]
    coefficients = rng.integers(1, 1000, size=n_terms) * rng.choice([-1, 1], size=n_terms)
    terms = []
    for c, powers in zip(coefficients, exponents):
        factors = [name if k == 1 else f"{name}^{k}" for name, k in zip(names, powers) if k]
        terms.append("*".join([str(int(c))] + factors))
    return " + ".join(terms).replace("+ -", "- "), names


def section_parse(quick):
    print("\n== reading (one written-out equation; 4 unknowns, powers up to 20, integer coefficients)")
    _row("terms", "characters", "wall s", "cpu s", "terms per cpu s")
    sizes = [495, 3003, 20_000] + ([] if quick else [100_000])
    for size in sizes:
        text, names = _written_out(size)
        wall, cpu = time.perf_counter(), time.process_time()
        polynomial = parse_polynomial(text, names)
        wall, cpu = time.perf_counter() - wall, time.process_time() - cpu
        assert polynomial.n_terms == size
        _row(size, len(text), f"{wall:.2f}", f"{cpu:.2f}", f"{size / cpu:,.0f}")
    print("goal: 100,000 terms under 3 s (before issue 19: 3,003 terms took 11.3 s, quadratic)")


def _children_cpu():
    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    return usage.ru_utime + usage.ru_stime


def _wall_times(command, repeats=5):
    """Median and best wall seconds, and median CPU seconds (less sensitive to a loaded machine)."""
    times, cpu = [], []
    for _ in range(repeats):
        start, start_cpu = time.perf_counter(), _children_cpu()
        subprocess.run(command, cwd=ROOT, check=True, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        times.append(time.perf_counter() - start)
        cpu.append(_children_cpu() - start_cpu)
    return statistics.median(times), min(times), statistics.median(cpu)


def section_start(quick):
    print("\n== start-up (child processes from the checkout root, median and best of 5)")
    _row("command", "median s", "best s", "cpu s", "")
    for label, command in (("python -c pass", [sys.executable, "-c", "pass"]),
                           ("python -c 'import numag'", [sys.executable, "-c", "import numag"]),
                           ("python -m numag --help", [sys.executable, "-m", "numag", "--help"]),
                           ("python -m numag solve --help", [sys.executable, "-m", "numag", "solve", "--help"])):
        median, best, cpu = _wall_times(command)
        _row(label, f"{median:.3f}", f"{best:.3f}", f"{cpu:.3f}")
    print("goal: import numag and numag --help under 0.3 s (before issue 19: 0.7 s and 1.2 s)")


def _system_file(system, folder, name):
    path = os.path.join(folder, f"{name}.toml")
    equations = ",\n".join(f'  "{p.to_text(system.variables)}"' for p in system.polynomials)
    with open(path, "w", encoding="utf-8") as handle:
        handle.write(f'name = "{name}"\nvariables = {list(system.variables)!r}\nequations = [\n{equations}\n]\n'
                     .replace("'", '"'))
    return path


def _child_environment(cache):
    """One BLAS thread, and compiled bytecode in ``cache`` as an installed package has it.

    This machine sets PYTHONDONTWRITEBYTECODE, which makes every child compile numag's sources again
    (0.2 s of a small solve); a user's installation has its .pyc files.
    """
    environment = dict(os.environ, **_ONE_THREAD, PYTHONPYCACHEPREFIX=cache)
    environment.pop("PYTHONDONTWRITEBYTECODE", None)
    return environment


def _numag_process(arguments, cache):
    """Wall seconds, CPU seconds, peak resident MB and exit code of one ``python -m numag`` child.

    CPU and peak memory are the child's own (``os.wait4``): the CPU column does not depend on what
    else the shared machine runs; the peak is the main process's (and any worker's, if larger).
    """
    start = time.perf_counter()
    child = subprocess.Popen([sys.executable, "-m", "numag"] + arguments, cwd=ROOT, env=_child_environment(cache),
                             stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    _, status, usage = os.wait4(child.pid, 0)
    seconds = time.perf_counter() - start
    code = os.waitstatus_to_exitcode(status)
    message = child.stderr.read()
    child.stderr.close()
    if code not in (0, 3):
        raise SystemExit(f"numag {' '.join(arguments)} failed: {message.strip()[-300:]}")
    return seconds, usage.ru_utime + usage.ru_stime, usage.ru_maxrss / 1024, code


def _python_process(arguments, cache):
    """CPU seconds of one ``python ARGUMENTS`` child in the environment of :func:`_numag_process`."""
    child = subprocess.Popen([sys.executable] + arguments, cwd=ROOT, env=_child_environment(cache),
                             stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    _, _, usage = os.wait4(child.pid, 0)
    return usage.ru_utime + usage.ru_stime


def section_solve(quick, repeats=3):
    from threadpoolctl import threadpool_limits
    print("\n== the whole `numag solve` process against the plain tracker (dense real quadrics, seed 7)")
    print("   (the plain tracker's time is tracking alone, in this process; numag's is the whole child process,")
    print(f"   start-up included, with compiled bytecode; median of {repeats}; CPU seconds are the reliable column")
    print("   on a shared machine)")
    print("   ceiling: plain CPU / CPU of a child that only starts Python and imports numpy, the best ratio any")
    print("   numpy process could reach, whatever its tracking costs (decision 0094)")
    _row("paths", "plain wall/cpu", "numag wall/cpu", "ratio wall/cpu", "goal", "ceiling",
         widths=(8, 16, 16, 16, 8, 8))
    with tempfile.TemporaryDirectory() as folder:
        floor = statistics.median(_python_process(["-c", "import numpy"], folder) for _ in range(repeats))
        for n, goal in ((8, 3), (10, 8)):
            system = quadrics(n, 7)
            plain_wall, plain_cpu = [], []
            with threadpool_limits(limits=1):
                for _ in range(repeats):
                    start, start_cpu = time.perf_counter(), time.process_time()
                    plain_tracker(system, 7)
                    plain_wall.append(time.perf_counter() - start)
                    plain_cpu.append(time.process_time() - start_cpu)
            path = _system_file(system, folder, f"quadrics{n}")
            arguments = ["solve", path, "--seed", "7", "--json"]
            _numag_process(arguments, folder)  # compiles the bytecode once, untimed
            runs = [_numag_process(arguments, folder) for _ in range(repeats)]
            plain = statistics.median(plain_wall), statistics.median(plain_cpu)
            ours = statistics.median(r[0] for r in runs), statistics.median(r[1] for r in runs)
            _row(2 ** n, f"{plain[0]:.2f} / {plain[1]:.2f}", f"{ours[0]:.2f} / {ours[1]:.2f}",
                 f"{plain[0] / ours[0]:.2f} / {plain[1] / ours[1]:.2f}", f">= {goal}", f"{plain[1] / floor:.1f}",
                 widths=(8, 16, 16, 16, 8, 8))
        print(f"   (python -c 'import numpy' child: {floor:.3f} CPU s)")


def six_bar():
    """Ten unknowns: a crank carrying two change-point four-bars at right angles, and a coupler midpoint.

    Joints A (crank tip) and C (the crank's second arm, A turned by 90 degrees) on a crank pivoted at the
    origin (arm 2); rockers pivoted at (4, 0) (length 3) carry B and D; couplers AB and CD have length 3;
    E is the midpoint of BD. Six links: ground, crank, two couplers, two rockers. Each four-bar has
    crank + ground = coupler + rocker (a Grashof change point; common practice, no source), so the
    configuration curve is singular where either one folds (A or C at (-2, 0)), once for each of the other
    loop's two assembly positions: 4 singular points, all real (by construction, checked by the run).
    """
    names = ["ax", "ay", "bx", "by", "cx", "cy", "dx", "dy", "ex", "ey"]
    equations = ["ax^2 + ay^2 - 4", "(bx - 4)^2 + by^2 - 9", "(ax - bx)^2 + (ay - by)^2 - 9", "cx + ay", "cy - ax",
                 "(dx - 4)^2 + dy^2 - 9", "(cx - dx)^2 + (cy - dy)^2 - 9", "2*ex - bx - dx", "2*ey - by - dy"]
    return parse_system(equations, names, name="six-bar")


def chebyshev_curve(a, b):
    """T_a(x) = T_b(y): (a-1)(b-1)/2 real nodes for coprime a, b (P.-V. Koseleff and D. Pecker, "Chebyshev
    knots", J. Knot Theory Ramif. 20 (2011); cited from memory, as in tests/data/problems.json)."""
    from numag.system.polynomial import PolynomialSystem
    return PolynomialSystem(["x", "y"], [chebyshev(a, 0, 2) - chebyshev(b, 1, 2)], name=f"T{a}(x) = T{b}(y)")


def pieces_of(locus):
    """A singular locus's pieces, counted by dimension, degree, place and kind ("2 x dim 0 deg 1 singular")."""
    pieces = {}
    for component in locus.components:
        key = (f"dim {component.dimension} deg {component.degree}"
               + (" at infinity" if component.at_infinity else "") + f" {component.kind}")
        pieces[key] = pieces.get(key, 0) + 1
    return "; ".join(f"{v} x {k}" for k, v in sorted(pieces.items()))


def section_singular(quick):
    print("\n== singular loci (in this process, seed 1)")
    _row("problem", "wall s", "cpu s", "goal s", "pieces (expected)")
    rng = np.random.default_rng(11)
    cases = [(six_bar(), 5, "4 points (construction)"),
             (chebyshev_curve(9, 11), 2, "40 affine nodes (Koseleff-Pecker) + (1:0:0) at infinity")]
    if not quick:
        cases.append((quadric_union(3, rng), 10, "3 curves of degree 4, V(f_i, f_j) (common practice)"))
    for system, goal, expected in cases:
        start, start_cpu = time.perf_counter(), time.process_time()
        locus = singular_locus(system, seed=1)
        seconds, cpu = time.perf_counter() - start, time.process_time() - start_cpu
        _row(system.name, f"{seconds:.2f}", f"{cpu:.2f}", goal, f"{pieces_of(locus)} ({expected})")


def _six_bar_folds():
    """The six-bar's 4 folded configurations (one loop folded, the other in either assembly position)."""
    folds = []
    for sign in (1, -1):
        d = np.array([2.0, -1.0]) + sign * 2 / np.sqrt(5) * np.array([1.0, -2.0])  # |D-(4,0)| = |D-(0,-2)| = 3
        folds.append(np.concatenate([[-2, 0], [1, 0], [0, -2], d, (np.array([1.0, 0.0]) + d) / 2]))
        b = np.array([2.0, 1.0]) + sign * 2 / np.sqrt(5) * np.array([1.0, 2.0])  # |B-(4,0)| = |B-(0,2)| = 3
        folds.append(np.concatenate([[0, 2], b, [-2, 0], [1, 0], (b + np.array([1.0, 0.0])) / 2]))
    return folds


def section_judge(quick):
    from numag.numeric import linalg
    from numag.singular import smoothness
    print("\n== judging candidates: the six-bar's 4 singular points, 1e-9 off (as candidates are), seed 0")
    print("   (mpmath least squares: the escalation's Gauss-Newton steps through numpy's SVD refined at the working")
    print("   precision (decision 0052), or through mpmath's pure-Python SVD for every step (before 0052))")
    _row("judged", "cpu s", "mpmath runs", "", "verdicts")
    rng = np.random.default_rng(0)
    candidates = [p + 1e-9 * rng.standard_normal(len(p)) for p in _six_bar_folds()]
    checker = smoothness._Checker
    escalate, settle, near = checker.escalate, checker.settle_in_double, checker.rank_drops_near_in_double
    refined = linalg._refined_least_squares
    runs = []
    smoothness._Checker.escalate = lambda self, *args: runs.append(1) or escalate(self, *args)
    try:
        for label, settling, double_route in (("batched, double first", settle, True),
                                              ("batched, mpmath SVD steps (before 0052)", settle, False),
                                              ("mpmath for each (before 0038)", None, False)):
            checker.settle_in_double = settling or (lambda self, *args, **kwargs: None)
            checker.rank_drops_near_in_double = near if settling else (lambda self, *args, **kwargs: None)
            linalg._refined_least_squares = refined if double_route else (lambda *args: None)
            runs.clear()
            start = time.process_time()
            report = smoothness.check_points(six_bar(), candidates, seed=0)
            _row(label, f"{time.process_time() - start:.2f}", len(runs), "",
                 ", ".join(v.verdict for v in report.points))
    finally:
        checker.escalate, checker.settle_in_double, checker.rank_drops_near_in_double = escalate, settle, near
        linalg._refined_least_squares = refined


def section_check(quick):
    print("\n== `numag check` of one folded configuration of the six-bar (whole process, one BLAS thread)")
    _row("point", "wall s", "cpu s", "exit", "goal s")
    names = ["ax", "ay", "bx", "by", "cx", "cy", "dx", "dy", "ex", "ey"]
    with tempfile.TemporaryDirectory() as folder:
        path = _system_file(six_bar(), folder, "six_bar")
        # A at (-2, 0): the first loop folded; D on both circles |D - (4, 0)| = |D - C| = 3 (exact, sqrt(5))
        point = dict(zip(names, ["-2", "0", "1", "0", "0", "-2", "2+2/sqrt(5)", "-1-4/sqrt(5)",
                                 "(3+2/sqrt(5))/2", "(-1-4/sqrt(5))/2"]))
        text = ",".join(f"{k}={v}" for k, v in point.items())
        for label, extra in (("with the components of X", []), ("--without-components", ["--without-components"])):
            cpu = _children_cpu()
            seconds, code = _numag_process(["check", path, "--point", text, "--seed", "1", "--json"] + extra)
            _row(label, f"{seconds:.2f}", f"{_children_cpu() - cpu:.2f}", code, 5)


def matrix_minors_system(size, rank, name):
    """The (rank + 1)-minors of a generic size x size matrix (unknowns m11..m_nn): rank <= ``rank``."""
    import itertools

    from numag.system.polynomial import Polynomial, PolynomialSystem
    names = [f"m{i}{j}" for i in range(1, size + 1) for j in range(1, size + 1)]
    entries = [[Polynomial.variable(i * size + j, size * size) for j in range(size)] for i in range(size)]

    def det(rows, cols):
        if len(rows) == 1:
            return entries[rows[0]][cols[0]]
        total = None
        for k, col in enumerate(cols):  # Laplace along the first row: exact, small sizes only
            term = entries[rows[0]][col] * det(rows[1:], cols[:k] + cols[k + 1:])
            term = term if k % 2 == 0 else term * -1
            total = term if total is None else total + term
        return total

    minors = [det(list(r), list(c)) for r in itertools.combinations(range(size), rank + 1)
              for c in itertools.combinations(range(size), rank + 1)]
    return PolynomialSystem(names, minors, name=name)


def nodal_surface(degree):
    """T_d(u) + T_d(v) + T_d(w) + 1 = 0 with u = x, v = x + y, w = x + y + z: 3 p m^2 nodes, affine and real.

    The gradient in (u, v, w) vanishes where each coordinate is a critical point cos(k pi / d) of T_d
    (k = 1..d-1, value (-1)^k, a simple critical point); the sum is -1 for one value +1 and two values -1:
    p = floor((d-1)/2) and m = ceil((d-1)/2) choices, in 3 orders. The top form 2^(d-1) (u^d + v^d + w^d) is
    smooth: nothing at infinity. The unimodular change of coordinates keeps the count and makes the partials
    in x, y, z other than univariate (in u, v, w they are a Groebner basis already, and sympy's time would say
    nothing). (Chebyshev construction of nodal surfaces, after S. V. Chmutov 1992, "Examples of projective
    surfaces with many singularities", J. Algebraic Geom. 1, from memory; the count is worked out here.)
    """
    from numag.system.polynomial import Polynomial, PolynomialSystem
    x, y, z = (Polynomial.variable(j, 3) for j in range(3))

    def chebyshev_of(form):  # T_0 = 1, T_1 = u, T_(k+1) = 2 u T_k - T_(k-1) (common practice)
        previous, current = Polynomial.constant(1, 3), form
        for _ in range(degree - 1):
            previous, current = current, form * current * 2 - previous
        return current

    f = chebyshev_of(x) + chebyshev_of(x + y) + chebyshev_of(x + y + z) + Polynomial.constant(1, 3)
    plus, minus = (degree - 1) // 2, degree // 2
    return PolynomialSystem(["x", "y", "z"], [f], name=f"nodal surface d={degree}"), 3 * plus * minus ** 2


def determinantal_degree(size, rank):
    """Degree of the n x n matrices of rank <= r: prod_{i<n-r} (n+i)! i! / ((r+i)! (n-r+i)!)
    (J. Harris, "Algebraic Geometry: A First Course", 1992, Example 19.10; from memory)."""
    from math import factorial
    degree = 1
    for i in range(size - rank):
        degree = degree * factorial(size + i) * factorial(i) // (factorial(rank + i) * factorial(size - rank + i))
    return degree


def _numag_child(system, seed, queue):
    _numag_child_with(system, seed, "auto", queue)


def _numag_child_with(system, seed, formulation, queue):
    from numag.singular.locus import SingularOptions, singular_locus
    start = time.process_time()
    try:
        locus = singular_locus(system, SingularOptions(formulation=formulation), seed=seed)
    except Exception as error:  # reported in the table, not raised: the benchmark goes on
        queue.put((time.process_time() - start, f"error: {type(error).__name__}: {str(error)[:80]}"))
        return
    pieces = {}
    for component in locus.components:
        key = (component.dimension, component.degree, component.at_infinity)
        pieces[key] = pieces.get(key, 0) + 1
    summary = "; ".join(f"{count} x dim {d} deg {g}" + (" inf" if inf else "")
                        for (d, g, inf), count in sorted(pieces.items()))
    failed = sum(locus.paths.get(label, 0) for label in ("minimum_step", "step_limit", "non_finite",
                                                           "endgame_unsettled", "batch_failed", "failed"))
    if failed:  # the run's own warning: pieces may be missing
        summary += f" [{failed} failed paths, flagged]"
    queue.put((time.process_time() - start, summary))


def _sympy_child(plain, queue):
    import sympy

    from numag.app.reference import _expressions
    symbols, expressions = _expressions(plain, sympy)
    equations = expressions + [sympy.diff(e, s) for e in expressions for s in symbols]
    start = time.process_time()
    basis = sympy.groebner(equations, *symbols, order="grevlex")
    queue.put((time.process_time() - start, f"{len(basis.exprs)} polynomials"))


# rotations with rational entries (Pythagorean triples), so the loops' folds sit at distinct crank angles and
# no two loops are folded at once: 0, 90 degrees, atan(4/3), atan(12/5) + 90 degrees, atan(3/4) + 180 degrees
_ROTATIONS = [("1", "0"), ("0", "1"), ("3/5", "4/5"), ("-12/13", "5/13"), ("-4/5", "-3/5")]


def loop_mechanism(loops):
    """A crank carrying ``loops`` change-point four-bars at rational angles: 2 + 2 * loops links.

    The crank tip A (|A| = 2, pivot at the origin) turned by the loop's rotation R_j drives a coupler of length 3
    to B_j, on a rocker of length 3 pivoted at (4, 0): |B_j - (4, 0)| = 3, |B_j - R_j A| = 3 (written with R_j A
    substituted, so 2 + 2 * loops unknowns and 1 + 2 * loops equations; two loops are the six-bar of
    :func:`six_bar` without its coupler midpoint). crank + ground = coupler + rocker (a Grashof change point;
    common practice, no source): loop j folds where R_j A = (-2, 0) (then B_j = (1, 0)), and there every other
    loop, whose crank is then neither at (2, 0) nor at (-2, 0), has two real assembly positions: the
    configuration curve has loops * 2^(loops - 1) real singular points (by construction, worked out by hand;
    the run checks the count).
    """
    names = ["ax", "ay"] + [f"b{j}{axis}" for j in range(1, loops + 1) for axis in "xy"]
    equations = ["ax^2 + ay^2 - 4"]
    for j, (cos, sin) in enumerate(_ROTATIONS[:loops], 1):
        cx, cy = f"({cos}*ax - {sin}*ay)", f"({sin}*ax + {cos}*ay)"
        equations += [f"(b{j}x - 4)^2 + b{j}y^2 - 9", f"({cx} - b{j}x)^2 + ({cy} - b{j}y)^2 - 9"]
    return parse_system(equations, names, name=f"{2 + 2 * loops} links")


def _sympy_minors_child(plain, queue):
    """sympy's Groebner basis (grevlex) of F and all maximal minors of its Jacobian (the minors are formed
    before the clock starts: only the basis is timed)."""
    import itertools

    import sympy

    from numag.app.reference import _expressions
    symbols, expressions = _expressions(plain, sympy)
    jacobian = sympy.Matrix([[sympy.diff(e, s) for s in symbols] for e in expressions])
    size = len(expressions)
    minors = [sympy.expand(jacobian[:, list(columns)].det(method="berkowitz"))
              for columns in itertools.combinations(range(len(symbols)), size)]
    start = time.process_time()
    basis = sympy.groebner(expressions + [m for m in minors if m != 0], *symbols, order="grevlex")
    queue.put((time.process_time() - start, f"{len(basis.exprs)} polynomials"))


def _timed_pair(system, seed, numag_limit, reference_limit, reference=None, reference_cpu_limit=None):
    """numag's and sympy's (CPU s, summary) in child processes, None on time-out; and the CPU seconds each
    had used when it was stopped (None where it finished)."""
    from numag.app.reference import system_to_plain
    from reference_timing import run_with_time_limit
    stopped_ours, stopped_theirs = [], []
    ours = run_with_time_limit(_numag_child, (system, seed), numag_limit, stopped_ours)
    theirs = run_with_time_limit(reference or _sympy_child, (system_to_plain(system),), reference_limit,
                                 stopped_theirs, cpu_limit=reference_cpu_limit)
    return ours, theirs, (stopped_ours or [None])[0], (stopped_theirs or [None])[0]


def _stopped_text(limit, cpu):
    """A time-out as text: the wall limit, with the CPU seconds used by then (a lower bound) where known."""
    return f"> {limit:g} wall" + (f" ({cpu:.0f} cpu)" if cpu is not None else "")


def section_large(full, numag_limit):
    """Determinantal varieties, both formulations (the minors one evaluates its large minors, decision 0058).

    Default: 3 x 3 matrices of rank <= 1 (the 9 2 x 2 minors; Sing X = the zero matrix, one point). ``--full``:
    4 x 4 matrices of rank <= 2 (the 16 3 x 3 minors; Sing X = rank <= 1, dimension 7, degree 20 = C(6, 3),
    the Segre variety P^3 x P^3; J. Harris, "Algebraic Geometry: A First Course", 1992, Example 19.10, from
    memory; degree checked on a random slice by :func:`segre_slice_count`). Goal for the full size: < 120 s.
    """
    size, rank, expected = (4, 2, "1 x dim 7 deg 20") if full else (3, 1, "1 x dim 0 deg 1")
    print(f"\n== {size} x {size} matrices of rank <= {rank}: Sing X = rank <= {rank - 1} ({expected}); child processes, "
          f"wall-time limit {numag_limit} s")
    _row("problem", "cpu s", "goal s", "formulation", "pieces (expected: " + expected + ")")
    system = matrix_minors_system(size, rank, f"{size} x {size} rank <= {rank}")
    from reference_timing import run_with_time_limit
    # the minors formulation only at the full size: its regeneration meets X in deg X * D^k points after k random
    # minors (3 x 3: 1,536 after 13 equations, not finished in 600 s; decision 0058)
    for formulation in ("minors", "auto") if full else ("auto",):
        ours = run_with_time_limit(_numag_child_with, (system, 1, formulation), numag_limit)
        _row(system.name, f"{ours[0]:.1f}" if ours else f"> {numag_limit} wall", 120 if full else "", formulation,
             ours[1] if ours else "time limit")
    if full:
        print(f"  degree of rank <= 1 4 x 4 matrices on a random slice (sympy Groebner basis): {segre_slice_count(4)}")


def segre_slice_count(size, seed=3):
    """Points of the rank <= 1 size x size matrices M = u v^T on 2 size - 1 random rational affine hyperplanes.

    Counted exactly with sympy: a Groebner basis (grevlex) of the sliced equations in the chart u_1 = 1, and the
    standard monomials (the dimension of the quotient ring, the number of points with multiplicity). This is
    the degree of the variety without any numag code.
    """
    import itertools

    import sympy
    rng = np.random.default_rng(seed)
    u = [sympy.Integer(1)] + list(sympy.symbols(f"u2:{size + 1}"))
    v = list(sympy.symbols(f"v1:{size + 1}"))
    equations = []
    for _ in range(2 * size - 1):
        a = rng.integers(-9, 10, size=(size, size))
        b = int(rng.integers(1, 10))
        equations.append(sympy.expand(sum(int(a[i, j]) * u[i] * v[j] for i in range(size) for j in range(size)) - b))
    unknowns = u[1:] + v
    basis = sympy.groebner(equations, *unknowns, order="grevlex")
    if not basis.is_zero_dimensional:
        return "not zero-dimensional"
    leads = [sympy.Poly(g, *unknowns).monoms(order="grevlex")[0] for g in basis.exprs]
    top = max(max(lead) for lead in leads) + 1
    return sum(1 for exponent in itertools.product(range(top), repeat=len(unknowns))
               if not any(all(e >= l for e, l in zip(exponent, lead)) for lead in leads))


def conjugate_surfaces(full):
    """Two equations in four unknowns: a surface with coefficients in Q(a), and a's minimal polynomial.

    ``full``: Togliatti's quintic with 31 nodes (E. G. Togliatti 1940, in the form with w = 1,
    64 (x - 1)(x^4 - 4 x^3 - 10 x^2 y^2 - 4 x^2 + 16 x - 20 x y^2 + 5 y^4 + 16 - 20 y^2)
    - 5 a (2 z - a)(4 (x^2 + y^2 - z^2) + 1 + 3 s)^2 with a = sqrt(5 - sqrt 5), s = sqrt 5 = 5 - a^2; from
    memory), a^4 - 10 a^2 + 20 = 0: four conjugate quintics, 4 x 31 = 124 nodes when all are affine. Default:
    the Cayley cubic 4 (x^2 + y^2 + z^2) + 16 x y z - 1 (4 nodes (+-1/2, +-1/2, +-1/2) with product -1/8, worked
    out by hand) scaled by a with a^2 = 2: 4 a (x^2 + y^2 + z^2) + 16 x y z - 2 a, two conjugate cubics, 8 nodes.
    """
    if full:
        s = "(5 - a^2)"
        quintic = (f"64*(x - 1)*(x^4 - 4*x^3 - 10*x^2*y^2 - 4*x^2 + 16*x - 20*x*y^2 + 5*y^4 + 16 - 20*y^2)"
                   f" - 5*a*(2*z - a)*(4*(x^2 + y^2 - z^2) + 1 + 3*{s})^2")
        return parse_system([quintic, "a^4 - 10*a^2 + 20"], ["x", "y", "z", "a"], name="4 conjugate quintics"), 124
    return parse_system(["4*a*(x^2 + y^2 + z^2) + 16*x*y*z - 2*a", "a^2 - 2"], ["x", "y", "z", "a"],
                        name="2 conjugate Cayley cubics"), 8


def section_conjugates(full, numag_limit):
    """Nodes of conjugate surfaces given with the number field's generator as an unknown (goal: < 60 s, full)."""
    system, expected = conjugate_surfaces(full)
    print(f"\n== {system.name} (two equations in four unknowns; child processes, wall-time limit {numag_limit} s)")
    _row("problem", "cpu s", "goal s", "formulation", f"pieces (expected: {expected} x dim 0 deg 1)")
    from reference_timing import run_with_time_limit
    for formulation in ("minors", "auto"):
        ours = run_with_time_limit(_numag_child_with, (system, 1, formulation), numag_limit)
        _row(system.name, f"{ours[0]:.1f}" if ours else f"> {numag_limit} wall", 60 if full else "", formulation,
             ours[1] if ours else "time limit")


def section_families(quick, numag_limit, reference_limit, chosen=("nodal", "det", "quadrics", "mechanisms"),
                     sizes=None, reference_cpu_limit=None):
    """Time against size per family; ``sizes`` (family key -> set of sizes) keeps only those members, so that a
    few sizes can be measured again with long limits."""
    print(f"\n== growing families (child processes; wall-time limits: numag {numag_limit} s, sympy {reference_limit} s"
          + (f", sympy also stopped at {reference_cpu_limit:g} CPU s" if reference_cpu_limit else "")
          + "; CPU seconds of the computation, start-up excluded)")
    families = [
        ("nodal surfaces T_d(x)+T_d(x+y)+T_d(x+y+z)+1", [(d, nodal_surface(d)) for d in range(3, 7 if quick else 11)],
         lambda d, expected: f"{expected} x dim 0 deg 1"),
        ("det of n x n matrices", [(n, (matrix_minors_system(n, n - 1, f"det {n} x {n}"), None))
                                   for n in range(2, 4 if quick else 6)],
         lambda n, _: f"1 x dim {n * n - 4} deg {determinantal_degree(n, n - 2)}"),
        ("unions of k random quadrics", [(k, (quadric_union(k, np.random.default_rng(11 + k)), None))
                                         for k in range(2, 4 if quick else 6)],
         lambda k, _: f"{k * (k - 1) // 2} x dim 1 deg 4"),
        ("mechanisms: a crank driving k change-point four-bars (2 + 2k links)",
         [(k, (loop_mechanism(k), None)) for k in range(1, 4 if quick else 6)],
         lambda k, _: f"{k * 2 ** (k - 1)} x dim 0 deg 1"),
    ]
    references = {"mechanisms": _sympy_minors_child}
    for key, (title, members, expectation) in zip(("nodal", "det", "quadrics", "mechanisms"), families):
        if key not in chosen:
            continue
        print(f"-- {title}")
        _row("size", "numag cpu s", "sympy cpu s", "sympy / numag", "numag's pieces (expected)", widths=(8, 22, 22, 14, 60))
        crossover, last_ratio = None, None
        for size, (system, expected) in members:
            if sizes and size not in sizes.get(key, ()):
                continue
            ours, theirs, ours_stopped, theirs_stopped = _timed_pair(system, 1, numag_limit, reference_limit,
                                                                     references.get(key), reference_cpu_limit)
            ours_text = f"{ours[0]:.2f}" if ours else _stopped_text(numag_limit, ours_stopped)
            theirs_text = f"{theirs[0]:.2f}" if theirs else _stopped_text(reference_limit, theirs_stopped)
            if not theirs and reference_cpu_limit and (theirs_stopped or 0) >= reference_cpu_limit:
                theirs_text = f"> {theirs_stopped:.0f} cpu (stopped)"
            ratio = theirs[0] / ours[0] if ours and theirs and ours[0] > 0 else None
            ratio_text = f"{ratio:.2f}" if ratio else ""
            if ours and not theirs and theirs_stopped and ours[0] > 0:  # sympy stopped: its CPU by then, a bound
                ratio_text = f"> {theirs_stopped / ours[0]:.1f}"
            if ours and theirs:
                last_ratio = (size, ratio)
            if ours and crossover is None and (theirs is None or theirs[0] > ours[0]):
                crossover = size
            _row(size, ours_text, theirs_text, ratio_text,
                 f"{ours[1] if ours else 'time limit'} ({expectation(size, expected)})", widths=(8, 22, 22, 14, 60))
        print(f"crossover (first size where numag is ahead): {crossover}; ratio at the largest size both finish: "
              + (f"{last_ratio[1]:.2f} at {last_ratio[0]}" if last_ratio else "none"))


BARTH_GOLDEN = ["4*(p^2*x^2 - y^2)*(p^2*y^2 - z^2)*(p^2*z^2 - x^2) - (1 + 2*p)*(x^2 + y^2 + z^2 - w^2)^2*w^2",
                "p^2 - p - 1"]
SWALLOWTAIL = "16*a^4*c - 4*a^3*b^2 - 128*a^2*c^2 + 144*a*b^2*c - 27*b^4 + 256*c^3"


def barth_golden(chart):
    """Barth's sextic with the golden ratio as an unknown p (p^2 - p - 1 = 0) in an affine chart of P^3.

    ``chart`` "w = 1": the chart of tests/data/problems.json (50 nodes per conjugate there, 15 at infinity);
    "w = 1 - (x + 2y + 3z)/7": a chart whose hyperplane at infinity misses the 65 nodes (all affine there).
    Source of the 65 real nodes: W. Barth, "Two projective surfaces with many nodes, admitting the
    symmetries of the icosahedron", J. Algebraic Geom. 5 (1996) 173-186 (as in tests/data/problems.json).
    """
    w = "1" if chart == "w = 1" else "(1 - (x + 2*y + 3*z)/7)"
    return parse_system([BARTH_GOLDEN[0].replace("w", w), BARTH_GOLDEN[1]], ["x", "y", "z", "p"],
                        name=f"Barth, p golden, {chart}")


def _golden_child(chart, seed, queue):
    start = time.process_time()
    locus = singular_locus(barth_golden(chart), seed=seed)
    points = [c for c in locus.components if c.dimension == 0 and not c.at_infinity]
    phi = (1 + 5 ** 0.5) / 2
    over_phi = [c for c in points if abs(c.points[0][3] - phi) <= 1e-8]
    failed = sum(locus.paths.get(label, 0) for label in ("minimum_step", "step_limit", "non_finite",
                                                           "endgame_unsettled", "batch_failed"))
    queue.put((time.process_time() - start,
               f"{len(points)} points ({sum(c.kind == 'singular' for c in points)} singular), {len(over_phi)} with "
               f"p = phi ({sum(bool(c.real[0]) for c in over_phi)} real), other pieces "
               f"{len(locus.components) - len(points)}, {locus.paths.get('tracked', 0)} paths, {failed} failed, "
               f"split over {(locus.variety.extra.get('fibres') or {}).get('unknowns')}"))


def _swallowtail_child(seed, queue):
    start = time.process_time()
    locus = singular_locus(parse_system([SWALLOWTAIL], ["a", "b", "c"]), seed=seed)
    # The quartic t^4 + a t^2 + b t + c with a triple root, (t - s)^3 (t + 3 s): a = -6 s^2, b = 8 s^3,
    # c = -3 s^4, the curve {8 a^3 + 27 b^2 = 0, a^2 + 12 c = 0} of degree 4; with two double roots,
    # (t^2 - s^2)^2: the conic {b = 0, a^2 - 4 c = 0} (common practice, no source: expanded by hand).
    curves = {4: lambda a, b, c: (8 * a ** 3 + 27 * b ** 2, a ** 2 + 12 * c), 2: lambda a, b, c: (b, a ** 2 - 4 * c)}
    pieces = []
    for component in (c for c in locus.components if not c.at_infinity):
        equations = curves.get(component.degree) if component.dimension == 1 else None
        on = equations is not None and all(
            max(abs(v) for v in equations(*point)) <= 1e-6 * (1 + np.linalg.norm(point)) ** 3
            for point in component.points)
        pieces.append(f"dim {component.dimension} deg {component.degree} {component.kind}"
                      + (" (on the expected curve)" if on else " (NOT the expected curve)"))
    infinite = sum(c.at_infinity for c in locus.components)
    failed = sum(locus.paths.get(label, 0) for label in ("minimum_step", "step_limit", "non_finite",
                                                           "endgame_unsettled", "batch_failed"))
    queue.put((time.process_time() - start, "; ".join(pieces) + f"; {infinite} at infinity; {failed} failed paths"))


def section_golden(numag_limit, seeds):
    print("\n== an auxiliary algebraic unknown (issue 19, decision 0061): Barth's sextic with p^2 - p - 1 = 0, and "
          "the swallowtail (discriminant of the quartic) in three unknowns; child processes, CPU seconds")
    from reference_timing import run_with_time_limit
    _row("problem", "seed", "cpu s", "wall s", "result (expected)", widths=(38, 6, 10, 10, 60))
    expectations = {"w = 1": "100 points, 50 with p = phi, all real (50 affine nodes per conjugate)",
                    "w = 1 - (x + 2y + 3z)/7": "130 points, 65 with p = phi, all real (Barth's 65 nodes)"}
    for seed in seeds:
        for chart, expected in expectations.items():
            started = time.perf_counter()
            ours = run_with_time_limit(_golden_child, (chart, seed), numag_limit)
            _row(f"Barth, p golden, {chart}", seed, f"{ours[0]:.1f}" if ours else "-",
                 f"{time.perf_counter() - started:.1f}", f"{ours[1] if ours else 'time limit'} ({expected})",
                 widths=(38, 6, 10, 10, 60))
        started = time.perf_counter()
        ours = run_with_time_limit(_swallowtail_child, (seed,), numag_limit)
        _row("swallowtail (quartic discriminant)", seed, f"{ours[0]:.1f}" if ours else "-",
             f"{time.perf_counter() - started:.1f}",
             f"{ours[1] if ours else 'time limit'} (curves of degree 4 and 2)", widths=(38, 6, 10, 10, 60))


def section_memory(quick, exponent):
    exponent = 12 if quick else exponent
    # the bytes per path come from two sizes above one batch (4,096 paths): a single batch is tracked in
    # the main process, and its working arrays would be counted as if they grew with the paths
    sizes = (exponent,) if quick or exponent <= 14 else (14, exponent)
    print(f"\n== memory: `numag solve --json` on 2^k paths of k dense quadrics (k = {', '.join(map(str, sizes))}); "
          "peak resident memory of the child (os.wait4)")
    _row("paths", "wall s", "cpu s", "peak RSS MB", "goal MB", widths=(10, 10, 10, 14, 10))
    peaks = {}
    with tempfile.TemporaryDirectory() as folder:
        for k in sizes:
            path = _system_file(quadrics(k, 5), folder, f"quadrics{k}")
            seconds, cpu, peak, _ = _numag_process(["solve", path, "--seed", "5", "--json", "--max-paths",
                                                    str(2 ** k)], folder)
            peaks[k] = peak
            _row(f"{2 ** k:,}", f"{seconds:.1f}", f"{cpu:.1f}", f"{peak:.0f}", 500, widths=(10, 10, 10, 14, 10))
    if len(sizes) == 2:
        small = sizes[0]
        per_path = (peaks[exponent] - peaks[small]) * 2 ** 20 / (2 ** exponent - 2 ** small)
        print(f"about {per_path:,.0f} bytes per path between the two sizes (the report is written solution by "
              f"solution); 100,000 paths: about {peaks[small] + per_path * (100_000 - 2 ** small) / 2 ** 20:.0f} MB")


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--quick", action="store_true", help="smaller sizes (about a minute)")
    parser.add_argument("--sections",
                        default="parse,start,solve,judge,singular,check,large,conjugates,families,memory")
    parser.add_argument("--families", default="nodal,det,quadrics,mechanisms", help="which growing families (section families)")
    parser.add_argument("--sizes", default="", help="only these family members, e.g. nodal=7,quadrics=4,quadrics=5 "
                        "(section families; default: every size)")
    parser.add_argument("--reference-limit", type=float, default=600.0, help="seconds for each sympy run")
    parser.add_argument("--reference-cpu-limit", type=float, default=None,
                        help="also stop each sympy run once it has used this many CPU seconds (section families; "
                        "a bound that does not depend on the machine's load)")
    parser.add_argument("--numag-limit", type=float, default=600.0, help="seconds for each numag child run")
    parser.add_argument("--repeats", type=int, default=3, help="runs of each size in section solve (median)")
    parser.add_argument("--memory-exponent", type=int, default=17, help="2^N paths for the memory row")
    parser.add_argument("--golden", action="store_true", help="also Barth's sextic with the golden ratio as an "
                        "unknown in two charts and the swallowtail (several minutes per seed)")
    parser.add_argument("--golden-seeds", default="1", help="seeds of the --golden rows, comma-separated")
    parser.add_argument("--full", action="store_true",
                        help="sections large and conjugates at the issue's sizes (4 x 4 rank <= 2; four quintics)")
    args = parser.parse_args()
    print(f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores; numag from {ROOT}")
    sections = args.sections.split(",")
    if "parse" in sections:
        section_parse(args.quick)
    if "start" in sections:
        section_start(args.quick)
    if "solve" in sections:
        section_solve(args.quick, args.repeats)
    if "judge" in sections:
        section_judge(args.quick)
    if "singular" in sections:
        section_singular(args.quick)
    if "check" in sections:
        section_check(args.quick)
    if "large" in sections:
        section_large(args.full, args.numag_limit)
    if "conjugates" in sections:
        section_conjugates(args.full, args.numag_limit)
    if "families" in sections:
        sizes = {}
        for item in filter(None, args.sizes.split(",")):
            key, _, size = item.partition("=")
            sizes.setdefault(key.strip(), set()).add(int(size))
        section_families(args.quick, args.numag_limit, args.reference_limit, args.families.split(","), sizes,
                         args.reference_cpu_limit)
    if "memory" in sections:
        section_memory(args.quick, args.memory_exponent)
    if args.golden:
        section_golden(args.numag_limit, [int(seed) for seed in args.golden_seeds.split(",")])


if __name__ == "__main__":
    main()
