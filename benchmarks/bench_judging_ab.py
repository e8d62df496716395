"""Judging candidates, two checkouts side by side (issue 19 item 4, decision 0074).

Run:  python benchmarks/bench_judging_ab.py --before /path/to/other/checkout [--after .] [--repeats 3]
      [--cases six-bar,T9/T11,folds]

Each case runs in a child process from each checkout's root (its own numag and its own
``benchmarks/bench_scale.py``), the two checkouts alternating run by run so that a shared machine's load
falls on both alike. A child times its computation in CPU seconds (``time.process_time``, start-up
excluded) and the share spent in ``check_points`` (judging the candidates), and prints what it found:

* six-bar: ``singular_locus`` of ``bench_scale.six_bar()`` (10 unknowns; goal < 5 CPU s), seed 1;
* T9/T11: ``singular_locus`` of T9(x) = T11(y) (40 affine nodes and (1:0:0) at infinity; goal < 2 CPU s), seed 1;
* folds: ``check_points`` of the six-bar's 4 folded configurations, 1e-9 off, seed 0, and the mpmath
  escalations it needed.

Printed per case: the median CPU seconds before and after, the judging share, and whether the answers agree
(pieces by dimension, degree and kind with their points to 1e-6; verdicts).
"""

import argparse
import json
import os
import statistics
import subprocess
import sys

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from checkout import ROOT

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from bench_start_ab import checkout_roots  # noqa: E402

_CHILD = r"""
import json, sys, time
sys.path.insert(0, "benchmarks")
import checkout  # noqa: F401
import numpy as np
from bench_scale import six_bar, chebyshev_curve, pieces_of, _six_bar_folds
from numag.singular import locus as locus_module, smoothness

case = sys.argv[1]
judging = [0.0]
escalations = []
check_points = smoothness.check_points
def timed_check(*args, **kwargs):
    start = time.process_time()
    try:
        return check_points(*args, **kwargs)
    finally:
        judging[0] += time.process_time() - start
locus_module.check_points = timed_check
escalate = smoothness._Checker.escalate
smoothness._Checker.escalate = lambda self, *args: escalations.append(1) or escalate(self, *args)
start = time.process_time()
if case == "folds":
    rng = np.random.default_rng(0)
    candidates = [p + 1e-9 * rng.standard_normal(len(p)) for p in _six_bar_folds()]
    report = timed_check(six_bar(), candidates, seed=0)
    answer = [[v.verdict.value, [round(float(c), 6) + 0.0 for c in np.asarray(v.point).real]] for v in report.points]
else:
    system = six_bar() if case == "six-bar" else chebyshev_curve(9, 11)
    found = locus_module.singular_locus(system, seed=1)
    answer = [pieces_of(found)] + sorted(
        [c.kind.value, c.dimension, c.degree, c.at_infinity,
         [[round(float(v.real), 6) + 0.0, round(float(v.imag), 6) + 0.0] for v in np.asarray(c.points[0])]]
        for c in found.components)
cpu = time.process_time() - start
print(json.dumps({"cpu": cpu, "judging": judging[0], "escalations": len(escalations), "answer": answer}))
"""


def run_child(root, child, case):
    """The JSON record the code ``child`` prints last, run with the argument ``case`` from ``root`` (its numag, one
    BLAS thread)."""
    environment = dict(os.environ, OMP_NUM_THREADS="1", OPENBLAS_NUM_THREADS="1", MKL_NUM_THREADS="1",
                       PYTHONPATH=root)
    done = subprocess.run([sys.executable, "-c", child, case], cwd=root, env=environment, capture_output=True,
                          text=True)
    if done.returncode != 0:
        raise SystemExit(f"{root}: case {case} failed: {done.stderr.strip()[-400:]}")
    return json.loads(done.stdout.strip().splitlines()[-1])


def _run(root, case):
    """The child's record for ``case`` run from ``root``."""
    return run_child(root, _CHILD, case)


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--before", required=True, help="the other checkout (e.g. the main branch's worktree)")
    parser.add_argument("--after", default=str(ROOT), help="this checkout (default)")
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--cases", default="six-bar,T9/T11,folds")
    args = parser.parse_args()
    roots = checkout_roots(args.before, args.after)
    print(f"load average {os.getloadavg()[0]:.1f}; median of {args.repeats} runs; CPU seconds (start-up excluded)")
    for label, root in roots.items():
        print(f"  {label}: {root}")
    goals = {"six-bar": "< 5", "T9/T11": "< 2", "folds": "-"}
    print(f"{'case':10} {'before cpu':>11} {'(judging)':>10} {'after cpu':>10} {'(judging)':>10} {'goal':>5} "
          f"{'mpmath runs b/a':>16}  same answer")
    for case in args.cases.split(","):
        records = {label: [] for label in roots}
        for _ in range(args.repeats):
            for label, root in roots.items():
                records[label].append(_run(root, case))
        median = {label: (statistics.median(r["cpu"] for r in runs), statistics.median(r["judging"] for r in runs))
                  for label, runs in records.items()}
        answers = {label: [json.dumps(r["answer"]) for r in runs] for label, runs in records.items()}
        same = len(set(answers["before"] + answers["after"])) == 1
        runs = "/".join(str(records[label][0]["escalations"]) for label in roots)
        print(f"{case:10} {median['before'][0]:11.2f} {median['before'][1]:10.2f} {median['after'][0]:10.2f} "
              f"{median['after'][1]:10.2f} {goals.get(case, '-'):>5} {runs:>16}  {'yes' if same else 'NO'}")
        if not same:
            for label in roots:
                print(f"    {label}: {records[label][0]['answer']}")


if __name__ == "__main__":
    main()
