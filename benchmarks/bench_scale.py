"""Large systems (issue 19): reading, start-up, the whole solve process, judging candidates, memory.

Run:  python benchmarks/bench_scale.py [--quick] [--sections parse,start,solve,singular,memory]
      [--memory-exponent 17]

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


def section_solve(quick, repeats=3):
    from threadpoolctl import threadpool_limits
    print("\n== the whole `numag solve` process against the plain tracker (dense real quadrics, seed 7)")
    print("   (the plain tracker's time is tracking alone, in this process; numag's is the whole child process,")
    print(f"   start-up included, with compiled bytecode; median of {repeats}; CPU seconds are the reliable column")
    print("   on a shared machine)")
    _row("paths", "plain wall/cpu", "numag wall/cpu", "ratio wall/cpu", "goal", widths=(8, 16, 16, 16, 8))
    with tempfile.TemporaryDirectory() as folder:
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
                 f"{plain[0] / ours[0]:.2f} / {plain[1] / ours[1]:.2f}", f">= {goal}", widths=(8, 16, 16, 16, 8))


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
        pieces = {}
        for component in locus.components:
            key = (f"dim {component.dimension} deg {component.degree}"
                   + (" at infinity" if component.at_infinity else "") + f" {component.kind}")
            pieces[key] = pieces.get(key, 0) + 1
        _row(system.name, f"{seconds:.2f}", f"{cpu:.2f}", goal,
             "; ".join(f"{v} x {k}" for k, v in sorted(pieces.items())) + f" ({expected})")


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
    from numag.singular import smoothness
    print("\n== judging candidates: the six-bar's 4 singular points, 1e-9 off (as candidates are), seed 0")
    _row("judged", "cpu s", "mpmath runs", "", "verdicts")
    rng = np.random.default_rng(0)
    candidates = [p + 1e-9 * rng.standard_normal(len(p)) for p in _six_bar_folds()]
    checker = smoothness._Checker
    escalate, settle, near = checker.escalate, checker.settle_in_double, checker.rank_drops_near_in_double
    runs = []
    smoothness._Checker.escalate = lambda self, *args: runs.append(1) or escalate(self, *args)
    try:
        for label, settling in (("batched, double first", settle), ("mpmath for each (before)", None)):
            checker.settle_in_double = settling or (lambda self, *args: None)
            checker.rank_drops_near_in_double = near if settling else (lambda self, *args: None)
            runs.clear()
            start = time.process_time()
            report = smoothness.check_points(six_bar(), candidates, seed=0)
            _row(label, f"{time.process_time() - start:.2f}", len(runs), "",
                 ", ".join(v.verdict for v in report.points))
    finally:
        checker.escalate, checker.settle_in_double, checker.rank_drops_near_in_double = escalate, settle, near


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
    parser.add_argument("--sections", default="parse,start,solve,judge,singular,memory")
    parser.add_argument("--memory-exponent", type=int, default=17, help="2^N paths for the memory row")
    args = parser.parse_args()
    print(f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores; numag from {ROOT}")
    sections = args.sections.split(",")
    if "parse" in sections:
        section_parse(args.quick)
    if "start" in sections:
        section_start(args.quick)
    if "solve" in sections:
        section_solve(args.quick)
    if "judge" in sections:
        section_judge(args.quick)
    if "singular" in sections:
        section_singular(args.quick)
    if "memory" in sections:
        section_memory(args.quick, args.memory_exponent)


if __name__ == "__main__":
    main()
