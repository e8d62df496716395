"""Where the CPU time of a whole `numag solve` process goes, and the plain tracker's counts beside it (decision 0075).

Run:  python benchmarks/bench_solve_profile.py [--checkout ROOT ...] [--repeats 3] [--sizes 8 10]

For each checkout (default: this one) and each size n, a child process runs ``python -m numag solve FILE
--seed 7 --json`` on the n dense real quadrics of bench_yardstick (seed 7, 2^n paths), with one BLAS thread and
compiled bytecode, after wrapping a few functions with CPU-second counters (``time.process_time``, no profiler:
the phases keep their own speed). Printed per phase: median CPU milliseconds over the repeats. The phases nest:

* start-up: the interpreter (a ``python -c pass`` child, measured apart) and every import the run makes;
* reading (``parse_system``), balancing (``Scaling.scale_system``);
* tracking (``track_paths``), of which evaluations of H with its Jacobian (``evaluate``), of H alone
  (``evaluate_values``, the chord corrector's), batched solves, batched inverses (the chord corrector's),
  the final Newton and condition numbers (``_classify``), the Cauchy endgame, and the rest (the steps' own
  bookkeeping);
* clustering (``cluster_labels``), the JSON report (``write_json``), and what is left (the argument parser,
  the homotopy's set-up, the jump check).

Then the deterministic counts, this checkout only: per path, the plain tracker's steps and evaluations (rows of
F and J) and numag's steps, evaluations with the Jacobian and value-only evaluations. Counts decide; the CPU
milliseconds say where the cost sits (decision 0022). Last, one homotopy evaluation (H with J, H alone) on 1,024
points of the 10 quadrics and of cyclic 6 (mixed degrees), per checkout.
"""

import argparse
import os
import statistics
import subprocess
import sys
import tempfile

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from checkout import ROOT

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from bench_scale import _child_environment, _system_file  # noqa: E402
from bench_yardstick import PlainQuadrics, plain_tracker, quadrics  # noqa: E402

#: (label, module, attribute path) of the wrapped functions, in the order printed.
PHASES = [("reading", "numag.system.parse", "parse_system"),
          ("balancing", "numag.numeric.scaling", "Scaling.scale_system"),
          ("tracking", "numag.tracking.tracker", "track_paths"),
          ("  evaluate H, J", "numag.tracking.homotopy", "StraightLineHomotopy.evaluate"),
          ("  evaluate H alone", "numag.tracking.homotopy", "StraightLineHomotopy.evaluate_values"),
          ("  batched solves", "numag.tracking.tracker", "_solve_columns"),
          ("  batched inverses", "numag.tracking.tracker", "_inverse"),
          ("  final Newton, conditions", "numag.tracking.tracker", "_classify"),
          ("  Cauchy endgame", "numag.tracking.tracker", "_cauchy_endgame"),
          ("clustering", "numag.numeric.cluster", "cluster_labels"),
          ("JSON report", "numag.app.report", "write_json")]

_CHILD = r"""
import importlib, json, sys, time
sys.path.insert(0, {root!r})
spent = {{}}

def wrap(label, module, path):
    owner = importlib.import_module(module)
    *outer, name = path.split(".")
    for part in outer:
        owner = getattr(owner, part)
    function = getattr(owner, name)
    def timed(*args, **kwargs):
        start = time.process_time()
        try:
            return function(*args, **kwargs)
        finally:
            spent[label] = spent.get(label, 0.0) + time.process_time() - start
    setattr(owner, name, timed)

for label, module, path in {phases!r}:
    wrap(label, module, path)
# the commands import these names into their own modules: wrap them there too
import numag.tracking.solve as solve, numag.app.commands.solve as command, numag.system.files as files
files.parse_system = sys.modules["numag.system.parse"].parse_system
solve.cluster_labels = sys.modules["numag.numeric.cluster"].cluster_labels
command.write_json = sys.modules["numag.app.report"].write_json
from numag.app.cli import main
code = main(["solve", {path!r}, "--seed", "7", "--json"], out=open("/dev/null", "w"))
spent["whole process"] = time.process_time()
print(json.dumps({{"code": code, "spent": spent}}))
"""


def _child(root, path, cache):
    """CPU seconds per phase of one solve process run from ``root``."""
    script = _CHILD.format(root=str(root), phases=PHASES, path=path)
    done = subprocess.run([sys.executable, "-c", script], cwd=root, env=_child_environment(cache),
                          capture_output=True, text=True, check=False)
    if done.returncode != 0:
        raise SystemExit(f"{root}: the profiled solve failed: {done.stderr.strip()[-400:]}")
    import json
    result = json.loads(done.stdout.strip().splitlines()[-1])
    if result["code"] not in (0, 3):
        raise SystemExit(f"{root}: numag solve exited with {result['code']}")
    return result["spent"]


_EVALUATIONS = r"""
import sys, time
sys.path.insert(0, {root!r})
import numpy as np
from numag.system.parse import parse_system
from numag.tracking.homotopy import StraightLineHomotopy
names = [f"z{{i}}" for i in range(6)]
cyclic = [" + ".join("*".join(names[(i + j) % 6] for j in range(k)) for i in range(6)) for k in range(1, 6)]
systems = {{"10 dense quadrics": parse_system({quadrics!r}, [f"x{{j}}" for j in range(10)]),
           "cyclic 6": parse_system(cyclic + ["*".join(names) + " - 1"], names)}}
for label, system in systems.items():
    homotopy = StraightLineHomotopy.total_degree(system, np.random.default_rng(1))
    points = np.random.default_rng(2).standard_normal((1024, homotopy.size)) + 1j
    s = np.full(1024, 0.3)
    for what, call in (("H, J", lambda: homotopy.evaluate(points, s)), ("H alone", lambda: homotopy.evaluate_values(points, s))):
        call()
        start = time.process_time()
        for _ in range(100):
            call()
        print(f"{{label}}|{{what}}|{{(time.process_time() - start) * 10:.3f}}")
"""


def _evaluation_costs(roots, cache_folder):
    """CPU ms of one homotopy evaluation on 1,024 points (H with J, H alone), per checkout (median of 3 runs)."""
    equations = [p.to_text(quadrics(10, 7).variables) for p in quadrics(10, 7).polynomials]
    print("\n== one evaluation of the homotopy on 1,024 points, CPU ms (median of 3 children)")
    rows = {}
    for root in roots:
        runs = []
        for _ in range(3):
            done = subprocess.run([sys.executable, "-c", _EVALUATIONS.format(root=str(root), quadrics=equations)],
                                  cwd=root, env=_child_environment(cache_folder), capture_output=True, text=True,
                                  check=True)
            runs.append({tuple(line.split("|")[:2]): float(line.split("|")[2])
                         for line in done.stdout.strip().splitlines()})
        rows[root] = {key: statistics.median(r[key] for r in runs) for key in runs[0]}
    print(f"{'system, evaluation':30s}" + "".join(f"{os.path.basename(r) or r:>16s}" for r in roots))
    for key in rows[roots[0]]:
        print(f"{', '.join(key):30s}" + "".join(f"{rows[r][key]:16.3f}" for r in roots))


def _interpreter(cache):
    """CPU seconds of ``python -c pass`` (the interpreter's own start, site included)."""
    child = subprocess.Popen([sys.executable, "-c", "pass"], env=_child_environment(cache))
    _, _, usage = os.wait4(child.pid, 0)
    return usage.ru_utime + usage.ru_stime


def _counts(n):
    """Per path: the plain tracker's steps and evaluation rows; numag's steps, full and value-only evaluation rows."""
    import numpy as np
    from threadpoolctl import threadpool_limits

    from numag.tracking import homotopy
    from numag.tracking.solve import solve_system

    system, paths = quadrics(n, 7), 2 ** n
    rows = {"full": 0, "values": 0}
    original = homotopy.StraightLineHomotopy.evaluate, homotopy.StraightLineHomotopy.evaluate_values

    def full_rows(self, points, s):
        rows["full"] += len(points)
        return original[0](self, points, s)

    def value_rows(self, points, s):
        rows["values"] += len(points)
        return original[1](self, points, s)

    plain = PlainQuadrics(system)  # the yardstick's own evaluator counts its rows
    with threadpool_limits(limits=1):
        plain_tracker(system, 7, plain)
        rows["plain"] = plain.rows
        homotopy.StraightLineHomotopy.evaluate, homotopy.StraightLineHomotopy.evaluate_values = full_rows, value_rows
        try:
            result = solve_system(system, seed=7)
        finally:
            homotopy.StraightLineHomotopy.evaluate, homotopy.StraightLineHomotopy.evaluate_values = original
    # the plain tracker makes 7 evaluations a step (4 stages, 3 Newton corrections), every one with J
    steps = float(np.mean(result.steps))
    return {"plain steps": rows["plain"] / 7 / paths, "plain evaluations": rows["plain"] / paths,
            "numag steps": steps, "numag evaluations with J": rows["full"] / paths,
            "numag value-only evaluations": rows["values"] / paths}


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--checkout", action="append", help="a numag checkout (repeat for several; default: this)")
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--sizes", type=int, nargs="+", default=[8, 10])
    args = parser.parse_args()
    roots = [os.path.abspath(r) for r in (args.checkout or [str(ROOT)])]
    print(f"load average {os.getloadavg()[0]:.1f}; CPU ms, median of {args.repeats}")
    with tempfile.TemporaryDirectory() as folder:
        for n in args.sizes:
            path = _system_file(quadrics(n, 7), folder, f"quadrics{n}")
            table = {}
            for root in roots:
                cache = os.path.join(folder, f"cache-{roots.index(root)}")
                _child(root, path, cache)  # compiles the bytecode, untimed
                runs = []
                for _ in range(args.repeats):  # alternate nothing here: one checkout's runs in a row
                    spent = _child(root, path, cache)
                    spent["interpreter"] = _interpreter(cache)
                    runs.append(spent)
                table[root] = {key: statistics.median(r.get(key, 0.0) for r in runs)
                               for key in set().union(*runs)}
            print(f"\n== {2 ** n} paths ({n} dense quadrics)")
            print(f"{'phase':30s}" + "".join(f"{os.path.basename(r) or r:>16s}" for r in roots))
            labels = ["whole process", "interpreter"] + [label for label, _, _ in PHASES]
            for label in labels:
                print(f"{label:30s}" + "".join(f"{1000 * table[r].get(label, 0.0):16.1f}" for r in roots))
            inner = ["  evaluate H, J", "  evaluate H alone", "  batched solves", "  batched inverses",
                     "  final Newton, conditions", "  Cauchy endgame"]
            print(f"{'  the steps bookkeeping':30s}" + "".join(
                f"{1000 * (table[r].get('tracking', 0) - sum(table[r].get(k, 0) for k in inner[:4] + inner[5:])):16.1f}"
                for r in roots))
            print(f"{'the rest (imports, parser, set-up)':30s}" + "".join(
                f"{1000 * (table[r]['whole process'] - sum(table[r].get(k, 0) for k in ('reading', 'balancing', 'tracking', 'clustering', 'JSON report'))):16.1f}"
                for r in roots))
            counts = _counts(n)
            print("counts per path (this checkout): " + ", ".join(f"{k} {v:.1f}" for k, v in counts.items()))
        _evaluation_costs(roots, os.path.join(folder, "cache-evaluations"))


if __name__ == "__main__":
    main()
