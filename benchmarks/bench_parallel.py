"""Scale-out benchmark: one and two workers side by side, and the cost of saving every batch.

Run:  python benchmarks/bench_parallel.py [--variables 14] [--batch-size 1024] [--repeats 1]

A system of n random dense quadrics has 2^n paths (16,384 for n = 14). It is
solved four ways with the same seed: in-process, with 2 worker processes,
with 2 workers and a local Dask cluster (when dask.distributed is installed),
and with 2 workers saving every batch to a run folder (atomic writes). Printed:
wall times, the speed-up of 2 workers over 1 (goal: at least 1.7), the
checkpoint overhead (goal: under 5 %), that every run gave the same answer, and
peak memory (resident set) of the main process and of the largest worker
against the batch size. Times are best of --repeats runs (the machine is shared).
"""

import argparse
import pathlib
import resource
import sys
import tempfile
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.system.polynomial import Polynomial, PolynomialSystem
from numag.tracking.solve import Execution, SolveOptions, solve_system


def quadrics(n, seed=3):
    rng = np.random.default_rng(seed)
    polynomials = []
    for _ in range(n):
        exponents, coefficients = [], []
        for i in range(n):
            for j in range(i, n):
                row = [0] * n
                row[i] += 1
                row[j] += 1
                exponents.append(row)
                coefficients.append(complex(rng.integers(-9, 10)))
        for i in range(n):
            row = [0] * n
            row[i] = 1
            exponents.append(row)
            coefficients.append(complex(rng.integers(-9, 10)))
        exponents.append([0] * n)
        coefficients.append(complex(rng.integers(1, 10)))
        polynomials.append(Polynomial(exponents, coefficients, n))
    return PolynomialSystem([f"x{k}" for k in range(n)], polynomials, name=f"{n} quadrics")


def answer(result):
    return sorted(tuple(np.round(s.point, 6)) for s in result.solutions), result.path_counts()


def timed(system, options, execution, repeats):
    best, result = float("inf"), None
    for _ in range(repeats):
        started = time.perf_counter()
        result = solve_system(system, options, seed=1, execution=execution)
        best = min(best, time.perf_counter() - started)
    return best, result


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--variables", type=int, default=14, help="n: 2^n paths (default 14: 16,384)")
    parser.add_argument("--batch-size", type=int, default=1024)
    parser.add_argument("--repeats", type=int, default=1)
    args = parser.parse_args()
    system = quadrics(args.variables)
    options = SolveOptions(batch_size=args.batch_size)
    paths = 2 ** args.variables
    print(f"{system.name}: {paths} paths in batches of {args.batch_size}")
    runs = {}
    one, result_one = timed(system, options, Execution(workers=1), args.repeats)
    runs["1 worker (in-process)"] = (one, result_one)
    two, result_two = timed(system, options, Execution(workers=2), args.repeats)
    runs["2 workers (process pool)"] = (two, result_two)
    with tempfile.TemporaryDirectory() as folder:
        saved_times = []
        saved = None
        for k in range(args.repeats):
            started = time.perf_counter()
            saved = solve_system(system, options, seed=1,
                                 execution=Execution(workers=2, run_folder=str(pathlib.Path(folder) / f"run{k}")))
            saved_times.append(time.perf_counter() - started)
        checkpointed = min(saved_times)
        files = sum(1 for _ in pathlib.Path(folder).glob("run0/batch-*.npz"))
    runs["2 workers + run folder"] = (checkpointed, saved)
    try:
        import distributed  # noqa: F401
        dask_time, dask_result = timed(system, options, Execution(workers=2, local_dask=True), 1)
        runs["2 workers (local Dask)"] = (dask_time, dask_result)
    except ImportError:
        print("dask.distributed is not installed: no Dask run (pip install 'numag[cluster]')")
    print(f"\n{'run':28} {'seconds':>8} {'paths/s':>8} {'solutions':>9}  same answer")
    reference = answer(result_one)
    for name, (seconds, result) in runs.items():
        print(f"{name:28} {seconds:8.2f} {paths / seconds:8.0f} {len(result.solutions):9d}  "
              f"{'yes' if answer(result) == reference else 'NO'}")
    print(f"\nspeed-up of 2 workers over 1: {one / two:.2f}x (goal >= 1.7)")
    print(f"checkpoint overhead (2 workers, {files} batch files): {100 * (checkpointed / two - 1):+.1f} % (goal < 5 %)")
    own = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    children = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024
    print(f"peak resident memory: main process {own:.0f} MB, largest worker {children:.0f} MB "
          f"(batch {args.batch_size} paths; the main process also holds every endpoint: "
          f"{paths * (args.variables + 1) * 16 / 2**20:.1f} MB here)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
