"""Everyday use (issue 20): what reusing a saved decomposition saves, and how long a run stays silent.

Run:  python benchmarks/bench_everyday.py [--repeats 3]

1. ``numag check`` on the demo linkage's points: decomposing X every time against reading a saved
   ``numag decompose --json`` report (``--decomposition``); wall time of the check itself, median of
   the repeats, verdicts compared.
2. The longest silence on standard error of ``numag singular`` runs (the progress reporter's lines,
   time-stamped as they arrive): the heartbeat bounds it by about 10 s after a 2 s grace period.

Results go to benchmarks/results/everyday.txt.
"""

import argparse
import io
import json
import pathlib
import statistics
import subprocess
import sys
import tempfile
import time

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
import numag
from numag.app.cli import main

ROOT = pathlib.Path(__file__).resolve().parents[1]
EXAMPLES = pathlib.Path(numag.__file__).parent / "examples"


def timed_check(argv):
    out = io.StringIO()
    started = time.perf_counter()
    code = main(argv + ["--json", "--quiet"], out=out)
    return time.perf_counter() - started, code, [p["verdict"] for p in json.loads(out.getvalue())["points"]]


def reuse(repeats, folder):
    linkage, points = str(EXAMPLES / "parallel_linkage.toml"), str(EXAMPLES / "checkpoints_linkage.json")
    parts = folder / "parts.json"
    out = io.StringIO()
    started = time.perf_counter()
    main(["decompose", linkage, "--json", "--seed", "1"], out=out)
    decompose_seconds = time.perf_counter() - started
    parts.write_text(out.getvalue())
    fresh, saved = [], []
    for seed in range(1, repeats + 1):
        argv = ["check", linkage, "--points-file", points, "--seed", str(seed)]
        fresh.append(timed_check(argv))
        saved.append(timed_check(argv + ["--decomposition", str(parts)]))
    same = all(a[2] == b[2] for a, b in zip(fresh, saved))
    return [f"check, demo linkage, 4 points ({repeats} seeds): decompose once {decompose_seconds:.2f} s",
            f"  decomposing X each time: median {statistics.median(t for t, _, _ in fresh):.2f} s",
            f"  --decomposition parts.json: median {statistics.median(t for t, _, _ in saved):.2f} s",
            f"  same verdicts: {same} ({fresh[0][2]})"]


def silence(argv):
    """Wall time and the longest gap between lines on standard error (start and end included)."""
    started = time.perf_counter()
    child = subprocess.Popen([sys.executable, "-m", "numag"] + argv, cwd=ROOT, stdout=subprocess.DEVNULL,
                             stderr=subprocess.PIPE, text=True)
    stamps = [0.0]
    for _ in child.stderr:
        stamps.append(time.perf_counter() - started)
    child.wait()
    stamps.append(time.perf_counter() - started)
    return stamps[-1], max(b - a for a, b in zip(stamps, stamps[1:])), len(stamps) - 2


def silences(folder):
    six = folder / "two_loops.toml"
    # a two-loop planar linkage (our own scenario): crank, coupler and rocker of a four-bar, and a dyad
    # hung from the coupler; unknowns are cosines and sines of the five joint angles
    six.write_text('name = "two_loops"\nvariables = ["c1", "s1", "c2", "s2", "c3", "s3"]\nequations = [\n'
                   '  "c1^2 + s1^2 - 1", "c2^2 + s2^2 - 1", "c3^2 + s3^2 - 1",\n'
                   '  "(4 + c2 - c1)^2 + (s2 - s1)^2 - 16",\n'
                   '  "(2*c1 + 3*c3 - 1)^2 + (2*s1 + 3*s3 - 2)^2 - 9",\n]\n')
    lines = []
    for name, argv in (("singular, demo linkage", ["singular", str(EXAMPLES / "parallel_linkage.toml")]),
                       ("singular, two-loop linkage", ["singular", str(six)])):
        wall, gap, count = silence(argv + ["--seed", "1"])
        lines.append(f"{name}: {wall:.1f} s wall, {count} progress lines, longest silence {gap:.1f} s")
    return lines


def run():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--out", default=str(ROOT / "benchmarks" / "results" / "everyday.txt"))
    args = parser.parse_args()
    with tempfile.TemporaryDirectory(prefix="numag-everyday-") as folder:
        folder = pathlib.Path(folder)
        lines = [f"numag everyday use ({time.strftime('%Y-%m-%d')})", ""] + reuse(args.repeats, folder) + [""]
        lines += silences(folder)
    text = "\n".join(lines) + "\n"
    print(text)
    pathlib.Path(args.out).parent.mkdir(parents=True, exist_ok=True)
    pathlib.Path(args.out).write_text(text)
    return 0


if __name__ == "__main__":
    sys.exit(run())
