"""Start-up and whole `numag solve` processes of two checkouts side by side (issue 19 item 3, decision 0067).

Run:  python benchmarks/bench_start_ab.py --before /path/to/other/checkout [--after .] [--repeats 5]

Each command runs as a child process from each checkout's root, the two checkouts alternating run by run so
that a shared machine's load falls on both alike; one untimed run first compiles the bytecode (into a cache
folder per checkout, as an installed package has its .pyc files). Printed: median wall and CPU seconds of the
child (CPU from ``os.wait4``: the reliable column on a shared machine). The solve rows are
``python benchmarks/bench_scale.py --sections solve``'s systems (dense real quadrics of bench_yardstick, seed 7).
"""

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from checkout import ROOT

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from bench_scale import _child_environment, _system_file  # noqa: E402
from bench_yardstick import quadrics  # noqa: E402


def _timed(root, arguments, cache):
    """Wall and CPU seconds of ``python arguments`` run from ``root``."""
    start = time.perf_counter()
    child = subprocess.Popen([sys.executable] + arguments, cwd=root, env=_child_environment(cache),
                             stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    _, status, usage = os.wait4(child.pid, 0)
    seconds = time.perf_counter() - start
    message = child.stderr.read()
    child.stderr.close()
    if os.waitstatus_to_exitcode(status) not in (0, 3):
        raise SystemExit(f"{root}: {' '.join(arguments)} failed: {message.strip()[-300:]}")
    return seconds, usage.ru_utime + usage.ru_stime


def checkout_roots(before, after):
    """``{"before": path, "after": path}`` of two numag checkouts (SystemExit naming a folder that is not one)."""
    roots = {"before": os.path.abspath(before), "after": os.path.abspath(after)}
    for root in roots.values():
        if not os.path.isfile(os.path.join(root, "numag", "__init__.py")):
            raise SystemExit(f"{root}: not a numag checkout (no numag/__init__.py)")
    return roots


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--before", required=True, help="the other checkout (e.g. the main branch's worktree)")
    parser.add_argument("--after", default=str(ROOT), help="this checkout (default)")
    parser.add_argument("--repeats", type=int, default=5)
    args = parser.parse_args()
    roots = checkout_roots(args.before, args.after)
    print(f"load average {os.getloadavg()[0]:.1f}; median of {args.repeats}; wall s / CPU s")
    for label, root in roots.items():
        print(f"  {label}: {root}")
    with tempfile.TemporaryDirectory() as folder:
        systems = {n: _system_file(quadrics(n, 7), folder, f"quadrics{n}") for n in (8, 10)}
        cases = [("python -c pass", ["-c", "pass"]),
                 ("import numag", ["-c", "import numag"]),
                 ("numag --help", ["-m", "numag", "--help"]),
                 ("numag solve --help", ["-m", "numag", "solve", "--help"])]
        cases += [(f"numag solve, {2 ** n} paths", ["-m", "numag", "solve", path, "--seed", "7", "--json"])
                  for n, path in systems.items()]
        print(f"{'command':26s} {'before':>16s} {'after':>16s}")
        for label, arguments in cases:
            caches = {name: os.path.join(folder, f"cache-{name}") for name in roots}
            for name, root in roots.items():
                _timed(root, arguments, caches[name])  # compiles the bytecode, untimed
            runs = {name: [] for name in roots}
            for _ in range(args.repeats):
                for name, root in roots.items():
                    runs[name].append(_timed(root, arguments, caches[name]))
            cells = [f"{statistics.median(w for w, _ in r):.3f} / {statistics.median(c for _, c in r):.3f}"
                     for r in runs.values()]
            print(f"{label:26s} {cells[0]:>16s} {cells[1]:>16s}", flush=True)


if __name__ == "__main__":
    main()
