"""Validation benchmark: problems nobody tuned for, with answers known by construction.

Runs the corpus of ``tests/corpus.py`` (families of problems whose answers follow from their
construction, each in other units, equation scalings, linear coordinates, translations and seeds)
through numag's Python API (``singular_locus``, ``solve_system``, ``decompose`` + ``check_points``),
compares every answer exactly with the expected one (counts, real counts, dimensions, degrees, kinds,
verdicts; places of isolated points within 1e-6), and prints per family: problems tried, exact
matches, undecided (numag said it could not decide: counted apart), wrong, errors, time-outs and
time; then the invariance runs per transformation and per base problem. Each problem runs in a
child process under a time limit, so one slow problem cannot stall the run.

    python benchmarks/bench_validation.py --quick          # a few problems per family (minutes)
    python benchmarks/bench_validation.py                  # the whole corpus
    python benchmarks/bench_validation.py --family chebyshev_curves --seed 3
    python benchmarks/bench_validation.py --only conic-and-tangent --verbose

Results go to ``benchmarks/results/validation[_quick].json`` (every problem: equations, expected,
numag's answer, outcome, differences, seconds). Exit code 0 when everything matched, 1 otherwise.
"""

import argparse
import dataclasses
import json
import pathlib
import sys
import time

import checkout  # noqa: F401  (this checkout's numag, not an installed one)

sys.path.insert(0, str(checkout.ROOT / "tests"))
import corpus  # noqa: E402
from corpus import Outcome, Task  # noqa: E402

RESULTS = checkout.ROOT / "benchmarks" / "results"
def _plain(value):
    if dataclasses.is_dataclass(value):
        return {k: _plain(v) for k, v in dataclasses.asdict(value).items()}
    if isinstance(value, complex):
        return [value.real, value.imag]
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items()}
    if hasattr(value, "value") and isinstance(getattr(value, "value"), str):  # enums
        return value.value
    return value


def _tasks(problem):
    tasks = [problem.task]
    if problem.checks:
        tasks.append(Task.CHECK)
    return tasks


COLUMNS = ("tried", "match", "undecided", "wrong", "error", "timeout")


def _tally(records, key):
    table = {}
    for record in records:
        row = table.setdefault(key(record), dict.fromkeys(COLUMNS, 0) | {"seconds": 0.0})
        row["tried"] += 1
        row[record["outcome"]] += 1
        row["seconds"] += record["seconds"]
    return table


def _print_table(title, table, out, first="family"):
    out.write(f"\n{title}\n")
    width = max([len(first)] + [len(str(k)) for k in table]) + 2
    out.write(f"{first:<{width}}" + "".join(f"{c:>10}" for c in COLUMNS) + f"{'seconds':>10}\n")
    total = dict.fromkeys(COLUMNS, 0) | {"seconds": 0.0}
    for key, row in table.items():
        out.write(f"{str(key):<{width}}" + "".join(f"{row[c]:>10}" for c in COLUMNS) + f"{row['seconds']:>10.1f}\n")
        for c in list(COLUMNS) + ["seconds"]:
            total[c] += row[c]
    out.write(f"{'total':<{width}}" + "".join(f"{total[c]:>10}" for c in COLUMNS) + f"{total['seconds']:>10.1f}\n")


_LETTER = {"match": "M", "undecided": "U", "wrong": "W", "error": "E", "timeout": "T"}


def _invariance_by_base(records):
    """Per base problem and task: outcome letter per transformation, and whether numag's answer stayed the same."""
    rows = {}
    for record in records:
        key = (record["base"], record["task"])
        row = rows.setdefault(key, {"cells": [], "fingerprints": set()})
        row["cells"].append(f"{record['transform']}:{_LETTER[record['outcome']]}")
        row["fingerprints"].add(json.dumps(record["fingerprint"]))
    return rows


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--quick", action="store_true", help="one or two base problems per family; base, units, "
                                                              "linear change only")
    parser.add_argument("--family", action="append", choices=sorted(corpus.FAMILIES),
                        help="only this family (repeat for several)")
    parser.add_argument("--only", help="only problems whose name contains this text")
    parser.add_argument("--seed", type=int, default=0, help="seed of the constructions, transformations and runs")
    parser.add_argument("--extra-seeds", type=int, default=None,
                        help="more runs of each base problem with other seeds (default: 0 quick, 1 full)")
    parser.add_argument("--time-limit", type=float, default=None,
                        help="seconds per problem and task (default 60 quick, 120 full)")
    parser.add_argument("--json", type=pathlib.Path, help="where to write the results "
                                                          "(default benchmarks/results/validation[_quick].json)")
    parser.add_argument("--verbose", action="store_true", help="one line per problem as it finishes")
    args = parser.parse_args(argv)
    extra = args.extra_seeds if args.extra_seeds is not None else (0 if args.quick else 1)
    if args.time_limit is None:
        args.time_limit = 60.0 if args.quick else 120.0

    started = time.perf_counter()
    problems = corpus.corpus(seed=args.seed, quick=args.quick, families=args.family, extra_seeds=extra)
    if args.only:
        problems = [p for p in problems if args.only in p.name]
    generated = time.perf_counter() - started
    jobs = [(p, t) for p in problems for t in _tasks(p)]
    print(f"{len(problems)} problems ({len({p.base for p in problems})} base problems), {len(jobs)} runs; corpus "
          f"generated in {generated:.1f} s; time limit {args.time_limit:.0f} s per run", flush=True)

    records = []
    for index, (problem, task) in enumerate(jobs, 1):
        outcome, differences, answer, seconds = corpus.run_limited(problem, task, args.seed, args.time_limit)
        records.append({
            "name": problem.name, "family": problem.family, "base": problem.base, "transform": problem.transform.value,
            "detail": problem.detail, "task": task.value, "outcome": outcome.value, "differences": differences,
            "seconds": round(seconds, 3), "seed": problem.seed_for(args.seed), "variables": list(problem.variables),
            "equations": list(problem.equations), "projective": problem.projective, "source": problem.source,
            "expected": _plain(problem.expected), "checks": _plain(problem.checks),
            "answer": _plain(answer) if answer is not None else None,
            "fingerprint": _plain(answer.fingerprint()) if answer is not None else outcome.value,
        })
        if args.verbose or outcome is not Outcome.MATCH:
            print(f"[{index}/{len(jobs)}] {problem.name} ({task.value}): {outcome.value} in {seconds:.1f} s"
                  + (f" -- {'; '.join(differences)}" if differences else ""), flush=True)

    out = sys.stdout
    _print_table("Per family and task", _tally(records, lambda r: f"{r['family']} ({r['task']})"), out)
    _print_table("Invariance: per transformation (every family)", _tally(records, lambda r: r["transform"]), out,
                 first="transform")
    out.write("\nInvariance: per base problem (M match, U undecided, W wrong, E error, T time-out; 'same' = numag's "
              "answer identical in every version)\n")
    by_base = _invariance_by_base(records)
    same = 0
    for (base, task), row in by_base.items():
        identical = len(row["fingerprints"]) == 1
        same += identical
        out.write(f"  {base} ({task}): {' '.join(row['cells'])}  {'same' if identical else 'DIFFERS'}\n")
    out.write(f"\n{same} of {len(by_base)} base problems gave the same answer in every version.\n")
    total = time.perf_counter() - started
    out.write(f"Total {total:.0f} s (runs {sum(r['seconds'] for r in records):.0f} s).\n")

    path = args.json or RESULTS / ("validation_quick.json" if args.quick else "validation.json")
    path.parent.mkdir(parents=True, exist_ok=True)
    summary = {"command": " ".join(["python", "benchmarks/bench_validation.py"] + (argv or sys.argv[1:])),
               "seed": args.seed, "time_limit": args.time_limit, "seconds": round(total, 1),
               "families": _tally(records, lambda r: f"{r['family']} ({r['task']})"),
               "transforms": _tally(records, lambda r: r["transform"]),
               "same_answer_in_every_version": same, "base_problems": len(by_base), "records": records}
    path.write_text(json.dumps(summary, indent=1))
    out.write(f"Results: {path}\n")
    return 0 if all(r["outcome"] == "match" for r in records) else 1


if __name__ == "__main__":
    sys.exit(main())
