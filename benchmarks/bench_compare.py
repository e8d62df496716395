"""numag beside the exact reference on the shared problems and on scaled families: where exact stops.

Run:  python benchmarks/bench_compare.py [--quick] [--time-limit 60] [--output benchmarks/results]
(or scripts/comparison_suite.sh, which installs the extras first)

For each problem: numag's singular locus and the exact reference (sympy
Groebner bases of F and all c x c minors, in a child process killed at the
time limit) one after the other; the table gives both times and their ratio,
the verdict, agreement of dimensions, degrees and counts, and the digits of
agreement of the coordinates. Families:

* the shared problems with verified exact answers (tests/data/problems.json,
  sources named there);
* Chebyshev curves T_a(x) = T_b(y), a, b coprime: (a - 1)(b - 1)/2 real nodes
  (Koseleff and Pecker, "Chebyshev knots", 2011; from memory);
* unions of k generic quadric surfaces in C^3: singular along the k(k - 1)/2
  intersection curves of degree 4;
* nodal surfaces of degree 3 to 7: T_d(x) + T_d(y) + T_d(z) + 1 = 0 (sums of
  Chebyshev polynomials, after Chmutov's construction; the counts are whatever
  both sides find -- the exact side is the check);
* determinantal varieties: m x n matrices of rank <= 1 (the 2 x 2 minors),
  singular only at the origin (the cone over a Segre variety).

Writes comparison.csv and comparison.json to --output, and comparison.png
(time against problem size, both methods, log scale) when matplotlib is
installed (pip install 'numag[plot]').
"""

import argparse
import csv
import itertools
import json
import pathlib
import sys
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from families import chebyshev, quadric_unions as shared_quadric_unions
from numag.app.compare import compare_system
from numag.system.parse import parse_system
from numag.system.polynomial import PolynomialSystem

ROOT = pathlib.Path(__file__).resolve().parent.parent
PROBLEMS = ROOT / "tests" / "data" / "problems.json"


def shared_problems():
    for entry in json.loads(PROBLEMS.read_text()):
        system = parse_system(entry["equations"], entry["variables"], projective=entry["projective"],
                              name=entry["name"])
        yield "shared problems", system, len(entry["variables"])


def chebyshev_curves(pairs):
    for a, b in pairs:
        yield "Chebyshev curves", PolynomialSystem(["x", "y"], [chebyshev(a, 0, 2) - chebyshev(b, 1, 2)],
                                                   name=f"T{a}(x)=T{b}(y)"), a * b


def nodal_surfaces(degrees):
    for d in degrees:
        f = chebyshev(d, 0, 3) + chebyshev(d, 1, 3) + chebyshev(d, 2, 3) + 1
        yield "nodal surfaces", PolynomialSystem(["x", "y", "z"], [f], name=f"T{d}(x)+T{d}(y)+T{d}(z)+1"), d


def quadric_unions(counts, seed=11):
    for k, system in shared_quadric_unions(counts, seed):
        yield "unions of quadrics", system, 2 * k


def determinantal(shapes):
    for m, n in shapes:
        names = [f"a{i}{j}" for i in range(1, m + 1) for j in range(1, n + 1)]
        minors = [f"a{i1}{j1}*a{i2}{j2} - a{i1}{j2}*a{i2}{j1}"
                  for i1, i2 in itertools.combinations(range(1, m + 1), 2)
                  for j1, j2 in itertools.combinations(range(1, n + 1), 2)]
        yield "rank-one matrices", parse_system(minors, names, name=f"rank<=1 {m}x{n}"), m * n


def problems(quick):
    yield from shared_problems()
    yield from chebyshev_curves([(3, 4), (4, 5)] if quick else [(3, 4), (4, 5), (5, 7), (7, 9)])
    yield from nodal_surfaces([3, 4] if quick else [3, 4, 5, 6, 7])
    yield from quadric_unions([2] if quick else [2, 3])
    yield from determinantal([(2, 3)] if quick else [(2, 3), (2, 4), (3, 3)])


def agreement(comparison, prefix):
    rows = [r for r in comparison.rows if r.quantity.startswith(prefix)]
    if not rows or any(r.agree is None for r in rows):
        return "-"
    return "yes" if all(r.agree for r in rows) else "NO"


def plot(records, path):
    try:
        import matplotlib
        matplotlib.use("Agg")
        import matplotlib.pyplot as plt
    except ImportError:
        print("matplotlib is not installed: no plot (pip install 'numag[plot]')")
        return False
    families = [f for f in dict.fromkeys(r["family"] for r in records) if f != "shared problems"]
    figure, axes = plt.subplots(1, len(families), figsize=(4 * len(families), 3.6), squeeze=False)
    for axis, family in zip(axes[0], families):
        rows = [r for r in records if r["family"] == family]
        sizes = [r["size"] for r in rows]
        axis.plot(sizes, [r["numag_seconds"] for r in rows], "o-", label="numag")
        finished = [(r["size"], r["reference_seconds"]) for r in rows if r["reference_status"] == "finished"]
        stopped = [(r["size"], r["time_limit"]) for r in rows if r["reference_status"] != "finished"]
        if finished:
            axis.plot(*zip(*finished), "s--", label="exact reference")
        if stopped:
            axis.plot(*zip(*stopped), "x", color="red", markersize=10, label="reference stopped (limit)")
        axis.set_yscale("log")
        axis.set_title(family)
        axis.set_xlabel("problem size")
        axis.set_ylabel("seconds")
        axis.legend(fontsize=7)
    figure.tight_layout()
    figure.savefig(path, dpi=120)
    return True


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="small sizes only")
    parser.add_argument("--time-limit", type=float, default=60.0, help="seconds for the exact reference")
    parser.add_argument("--output", default=str(ROOT / "benchmarks" / "results"), help="folder for the tables")
    args = parser.parse_args()
    output = pathlib.Path(args.output)
    output.mkdir(parents=True, exist_ok=True)
    started = time.perf_counter()
    records = []
    header = (f"{'family':19} {'problem':30} {'numag s':>8} {'exact s':>9} {'ratio':>7} {'verdict':>10} "
              f"{'dims':>4} {'degs':>4} {'counts':>6} {'digits':>6}")
    print(header)
    print("-" * len(header))
    for family, system, size in problems(args.quick):
        comparison = compare_system(system, seconds=args.time_limit, seed=1)
        reference = comparison.reference
        ratio = comparison.ratio
        record = {
            "family": family, "problem": system.name, "size": size, "numag_seconds": comparison.numag_seconds,
            "reference_status": reference.status, "reference_seconds": comparison.reference_seconds,
            "time_limit": args.time_limit, "ratio": ratio, "verdict": comparison.verdict,
            "dimensions_agree": agreement(comparison, "dimension"), "degrees_agree": agreement(comparison, "degree"),
            "counts_agree": agreement(comparison, "singular points") if any(
                r.quantity == "singular points" for r in comparison.rows) else "-",
            "digits": comparison.digits,
            "numag_singular_points": next((r.numag for r in comparison.rows if r.quantity == "singular points"), None),
        }
        records.append(record)
        exact_text = (f"{comparison.reference_seconds:9.2f}" if reference.status == "finished"
                      else f"{'>' + format(args.time_limit, 'g'):>9}")
        print(f"{family:19} {system.name:30.30} {comparison.numag_seconds:8.2f} {exact_text} "
              f"{(f'{ratio:7.2f}' if ratio is not None else '      -')} {comparison.verdict:>10} "
              f"{record['dimensions_agree']:>4} {record['degrees_agree']:>4} {record['counts_agree']:>6} "
              f"{(f'{comparison.digits:6.1f}' if comparison.digits is not None else '     -')}", flush=True)
    with open(output / "comparison.csv", "w", newline="") as handle:
        writer = csv.DictWriter(handle, fieldnames=list(records[0]))
        writer.writeheader()
        writer.writerows(records)
    (output / "comparison.json").write_text(json.dumps(records, indent=2) + "\n")
    finished = [r for r in records if r["reference_status"] == "finished"]
    beyond = [r["problem"] for r in records if r["reference_status"] != "finished"]
    mismatches = [r["problem"] for r in records if r["verdict"] == "mismatch"]
    ratios = [r["ratio"] for r in finished if r["ratio"]]
    print(f"\n{len(records)} problems in {time.perf_counter() - started:.0f} s; the reference finished "
          f"{len(finished)} within {args.time_limit:g} s; mismatches: {', '.join(mismatches) or 'none'}")
    if ratios:
        print(f"median ratio (reference s / numag s) where both finished: {float(np.median(ratios)):.2f}")
    print(f"beyond the reference's time limit, numag went on: {', '.join(beyond) or 'none'}")
    plotted = plot(records, output / "comparison.png")
    print(f"tables: {output / 'comparison.csv'}, {output / 'comparison.json'}"
          + (f"; plot: {output / 'comparison.png'}" if plotted else ""))
    return 1 if mismatches else 0


if __name__ == "__main__":
    sys.exit(main())
