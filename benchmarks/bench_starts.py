"""Start systems side by side: paths, solutions, set-up and total time per family and start.

Run:  python benchmarks/bench_starts.py [--quick] [--seed 1] [--singular-only]
      python benchmarks/bench_starts.py --polyhedral-setup 5 6 7 8   (mixed cells against tracking, cyclic n)
      python benchmarks/bench_starts.py --mixed-cells 5 6 7 8 [--reference]   (the cells alone, per solver)
      python benchmarks/bench_starts.py --witness [--quick]   (the regeneration's start: witness sets)
      python benchmarks/bench_starts.py --null-vector-locus [--quick]   (singular locus, null-vector form, by start)
      python benchmarks/bench_starts.py --square-null-vector 1 2 3   (square null-vector systems by start, per seed)

Families: cyclic n-roots (70, 156, 924 and 1152 isolated roots for n = 5..8; Bjorck and Froberg
1991, from memory; cyclic 8 also has a one-dimensional set), katsura n (2^n roots, the Bezout number;
from memory), eigenvalue problems (A - lambda I) v = 0, c . v = 1 of random n x n matrices (n
eigenpairs), and the square null-vector systems of shared problems with isolated singular points
(:mod:`numag.singular.isolated`). Each is solved with every start that applies; the columns are
the paths tracked, the isolated solutions found, the start's set-up (the grouping, or the mixed cells
and their linear programs) and the whole solve. A last table runs the whole singular locus of the
shared problems with the total-degree start (witness sets) and the multihomogeneous one (the square
null-vector system, proven finite by slices): all paths, those after X's decomposition, the points.
Results go to benchmarks/results/bench_starts.md (bench_starts_singular.md with --singular-only).
``--witness``: the regeneration (witness sets of every dimension) of the null-vector systems of the
shared problems (x and lambda grouped) and of multi-graded systems, with total-degree factors and
with factors in the groups; the witness sets found must agree (dimension and size), the paths and
seconds are compared (bench_starts_witness.md).
``--null-vector-locus``: the whole singular locus of the affine shared problems through the null-vector
form, by the total-degree and the 2-homogeneous start (x and lambda grouped): pieces, paths (all, and
those of the square attempt), failed paths, seconds (bench_starts_null_vector_locus.md; the test
tests/test_singular_starts.py checks the same answers and fewer paths where Sing(X) is finite).
"""

import argparse
import json
import os
import pathlib
import sys
import time

import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.singular.isolated import isolated_singular_points, null_vector_groups, null_vector_system
from numag.tracking.multihomogeneous import GroupSource
from numag.witness.cascade import WitnessOptions, witness_supersets
from numag.tracking.polyhedral import LinearProgramSolver, mixed_cells, supports_of
from numag.singular.locus import SingularOptions, singular_locus
from numag.tracking.tracker import FAILURE_LABELS
from numag.system.parse import parse_system
from numag.tracking.solve import SolveOptions, solve_system

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent.parent / "tests"))
from test_witness_starts import eigenproblem_parts  # noqa: E402  (the tests' builder)

STARTS = ("total-degree", "multihomogeneous", "polyhedral", "auto")


def cyclic(n):
    names = [f"z{i}" for i in range(n)]
    equations = [" + ".join("*".join(names[(i + j) % n] for j in range(k)) for i in range(n)) for k in range(1, n)]
    equations.append("*".join(names) + " - 1")
    return parse_system(equations, names, name=f"cyclic {n}")


def katsura(n):
    names = [f"u{i}" for i in range(n + 1)]

    def u(index):
        return names[abs(index)] if abs(index) <= n else None

    equations = []
    for m in range(n):
        terms = [f"{u(l)}*{u(m - l)}" for l in range(-n, n + 1) if u(l) and u(m - l)]
        equations.append(" + ".join(terms) + f" - {names[m]}")
    equations.append(" + ".join([names[0]] + [f"2*{v}" for v in names[1:]]) + " - 1")
    return parse_system(equations, names, name=f"katsura {n}")


def eigenproblem(n, seed):
    """The eigenproblem of a random n x n matrix as a polynomial system (the tests' builder)."""
    return eigenproblem_parts(n, seed, name=f"eigenproblem {n}x{n}")[0]


def solve_row(system, start, seed):
    started = time.perf_counter()
    result = solve_system(system, SolveOptions(start=start), seed=seed)
    seconds = time.perf_counter() - started
    block = result.extra["start"]
    counts = result.path_counts()
    return {"family": system.name, "start": block["chosen"], "asked": start, "reason": block["reason"],
            "paths": counts["tracked"],
            "failed": counts["failed"],
            "solutions": len(result.solutions), "unverified": len(result.unverified), "setup_s": round(sum(block["setup_seconds"].values()), 2),
            "total_s": round(seconds, 2), "counts": block["paths"]}


def null_vector_row(name, problem, start, seed):
    system = parse_system(problem["equations"], problem["variables"])
    started = time.perf_counter()
    found = isolated_singular_points(system, start, seed=seed)
    seconds = time.perf_counter() - started
    return {"family": f"null vector of {name}", "start": found.start.get("chosen", start), "asked": start,
            "reason": found.start.get("reason", ""), "paths": found.paths, "failed": found.failed,
            "solutions": len(found.points), "unverified": 0, "setup_s": round(sum(found.start.get("setup_seconds", {}).values()), 2),
            "total_s": round(seconds, 2), "counts": found.start["paths"]}


def singular_row(name, problem, start, seed):
    """``numag singular`` with ``start``: all paths, those beyond X's decomposition, the points found."""
    system = parse_system(problem["equations"], problem["variables"])
    started = time.perf_counter()
    locus = singular_locus(system, SingularOptions(start=start), seed=seed)
    seconds = time.perf_counter() - started
    tracked = locus.paths.get("tracked", 0)
    searches = [s for route in locus.start["codimensions"] for s in route.get("searches", [])]
    return {"family": f"singular locus of {name}", "start": start, "paths": tracked,
            "paths_after_X": tracked - locus.variety.paths.get("tracked", 0),
            "failed": sum(locus.paths.get(label, 0) for label in FAILURE_LABELS),
            "solutions": len(locus.isolated()), "setup_s": 0.0, "total_s": round(seconds, 2),
            "counts": [s["start"]["paths"] for s in searches]}


def witness_rows(name, system, groups, seed, source=GroupSource.FILE):
    """Witness supersets of ``system`` by total-degree factors and by factors in ``groups`` (and ``auto``)."""
    rows, sets = [], {}
    for start in ("total-degree", "multihomogeneous", "auto"):
        started = time.perf_counter()
        supersets = witness_supersets(system, WitnessOptions(start=start, groups=groups, group_source=source),
                                      seed=seed)
        seconds = time.perf_counter() - started
        sets[start] = [(w.dimension, len(w.points)) for w in supersets.sets if len(w.points)]
        rows.append({"family": name, "start": start, "chosen": supersets.start["chosen"],
                     "paths": supersets.paths["tracked"], "product_paths": supersets.paths.get("product_paths", 0),
                     "failed": sum(supersets.paths.get(label, 0) for label in FAILURE_LABELS),
                     "witness_sets": sets[start], "same_as_total_degree": sets[start] == sets["total-degree"],
                     "seconds": round(seconds, 2), "bounds": supersets.start["paths"]})
        print(json.dumps(rows[-1]), flush=True)
    return rows


def witness_main(args, problems):
    """The ``--witness`` tables: regenerations by start, and the singular locus through the null-vector form."""
    rng = np.random.default_rng(args.seed)
    shared = ("node", "cusp", "four_generic_lines", "trifolium_triple_point", "cone_over_smooth_plane_cubic")
    if not args.quick:
        shared += ("tacnode", "affine_cone_over_twisted_cubic", "cayley_cubic")  # Chebyshev: 240 s a run
    cases = []
    for name in shared:
        problem = problems[name]
        system = parse_system(problem["equations"], problem["variables"])
        n = system.n_variables
        codimension = min(system.n_equations, n - 1) if name != "affine_cone_over_twisted_cubic" else 2
        null = null_vector_system(system, codimension, rng)
        cases.append((f"null vector of {name}", null, null_vector_groups(null, n), GroupSource.NULL_VECTOR))
    for n in ((3, 4) if args.quick else (3, 4, 5)):
        system = eigenproblem(n, args.seed + n)
        cases.append((system.name, system, [[f"v{k}" for k in range(n)], ["l"]], GroupSource.FILE))
    rows = []
    for name, system, groups, source in cases:
        rows += witness_rows(name, system, groups, args.seed, source)
    lines = ["| system | start asked | chosen | paths | of them product homotopy | failed | witness sets (dimension, "
             "points) | same as total degree | seconds | bounds by start |", "|---|---|---|---|---|---|---|---|---|---|"]
    lines += [f"| {r['family']} | {r['start']} | {r['chosen']} | {r['paths']} | {r['product_paths']} | {r['failed']} | "
              f"{r['witness_sets']} | "
              f"{'yes' if r['same_as_total_degree'] else 'NO'} | {r['seconds']} | {r['bounds']} |" for r in rows]
    locus_rows = []
    for name in ("affine_cone_over_twisted_cubic",) + (() if args.quick else ("whitney_umbrella",)):
        problem = problems[name]
        system = parse_system(problem["equations"], problem["variables"])
        for start in ("total-degree", "multihomogeneous"):
            started = time.perf_counter()
            locus = singular_locus(system, SingularOptions(formulation="null vector", start=start), seed=args.seed)
            locus_rows.append({"problem": name, "start": start, "paths": locus.paths.get("tracked", 0),
                               "pieces": sorted((c.dimension, c.degree) for c in locus.components if not c.at_infinity),
                               "seconds": round(time.perf_counter() - started, 2)})
            print(json.dumps(locus_rows[-1]), flush=True)
    lines += ["", "| singular locus (null-vector form) of | start | paths | pieces (dimension, degree) | seconds |",
              "|---|---|---|---|---|"]
    lines += [f"| {r['problem']} | {r['start']} | {r['paths']} | {r['pieces']} | {r['seconds']} |" for r in locus_rows]
    table = "\n".join(lines)
    print(table)
    out = pathlib.Path(__file__).resolve().parent / "results"
    os.makedirs(out, exist_ok=True)
    (out / ("bench_starts_witness" + ("_quick.md" if args.quick else ".md"))).write_text(
        f"python benchmarks/bench_starts.py --witness{' --quick' if args.quick else ''} --seed {args.seed}\n\n"
        f"{table}\n")


def null_vector_locus_rows(problems, names, seed):
    """The singular locus through the null-vector form by the total-degree and the 2-homogeneous start."""
    rows = []
    for name in names:
        problem = problems[name]
        system = parse_system(problem["equations"], problem["variables"])
        for start in ("total-degree", "multihomogeneous"):
            started = time.perf_counter()
            locus = singular_locus(system, SingularOptions(formulation="null vector", start=start), seed=seed)
            seconds = time.perf_counter() - started
            routes = locus.start.get("codimensions", [])
            rows.append({"problem": name, "start": start, "paths": locus.paths.get("tracked", 0),
                         "square_system": sum(s["tracked"] for r in routes for s in r.get("searches", [])),
                         "route": ", ".join(r["route"] for r in routes) or "witness sets",
                         "failed": sum(locus.paths.get(label, 0) for label in FAILURE_LABELS),
                         "pieces": sorted((c.dimension, c.degree) for c in locus.components if not c.at_infinity),
                         "seconds": round(seconds, 2)})
            print(json.dumps(rows[-1]), flush=True)
    return rows


def polyhedral_setup_rows(sizes, seed):
    """Cyclic n by the polyhedral start: the mixed cells (set-up) against the two tracking stages."""
    rows = []
    for n in sizes:
        system = cyclic(n)
        started = time.perf_counter()
        result = solve_system(system, SolveOptions(start="polyhedral"), seed=seed)
        total = time.perf_counter() - started
        block = result.extra["start"]
        setup, first = block["setup_seconds"]["polyhedral"], block["random_system_seconds"]
        tracking = total - setup
        rows.append({"family": system.name, "mixed_volume": block["paths"]["polyhedral"],
                     "cells": block["mixed_cells"], "linear_programs": block["linear_programs"],
                     "setup_s": round(setup, 2), "first_stage_s": round(first, 2),
                     "second_stage_s": round(tracking - first, 2), "setup_share_of_tracking": round(setup / tracking, 4),
                     "solutions": len(result.solutions), "failed": result.path_counts()["failed"],
                     "first_stage_lost": block["random_system_paths"]["tracked"]
                     - block["random_system_paths"]["converged"] - block["random_system_paths"]["singular_endpoint"],
                     "multiple": sum(1 for s in result.solutions if s.multiplicity > 1),
                     "not_isolated": len(result.not_isolated)})
        print(json.dumps(rows[-1]), flush=True)
    return rows


def mixed_cell_rows(sizes, seed, solvers):
    """Cyclic n: the mixed cells of one random lifting, timed with each linear-program solver."""
    rows = []
    for n in sizes:
        supports = supports_of(cyclic(n).polynomials)
        rng = np.random.default_rng(seed)
        liftings = [rng.random(len(s)) for s in supports]
        for solver in solvers:
            started = time.perf_counter()
            cells, programs = mixed_cells(supports, liftings, solver)
            seconds = time.perf_counter() - started
            rows.append({"family": f"cyclic {n}", "solver": solver.name.lower(), "mixed_volume": sum(c.volume for c in cells),
                         "cells": len(cells), "linear_programs": programs, "seconds": round(seconds, 2),
                         "ms_per_program": round(1e3 * seconds / programs, 3)})
            print(json.dumps(rows[-1]), flush=True)
    return rows


def goal_rows(rows):
    """Issue 23's goals per family, from the rows of one run: the whole polyhedral solve against total
    degree where the mixed volume is under half the Bezout number, and the set-up's share of tracking."""
    goals = []
    for family in dict.fromkeys(r["family"] for r in rows):
        by_start = {r["asked"]: r for r in rows if r["family"] == family}
        polyhedral, degree = by_start.get("polyhedral"), by_start.get("total-degree")
        if polyhedral is None or polyhedral["start"] != "polyhedral":
            continue
        volume, bezout = polyhedral["counts"]["polyhedral"], polyhedral["counts"]["total-degree"]
        tracking = polyhedral["total_s"] - polyhedral["setup_s"]
        applies = volume < bezout / 2
        auto = by_start.get("auto")
        goals.append({"family": family, "bezout": bezout, "mixed_volume": volume,
                      "total_degree_s": degree["total_s"] if degree else None, "polyhedral_s": polyhedral["total_s"],
                      "setup_share": round(polyhedral["setup_s"] / tracking, 4) if tracking > 0 else None,
                      "auto": f"{auto['start']} ({auto['total_s']} s)" if auto else "",
                      "goal": ("faster" if degree and polyhedral["total_s"] < degree["total_s"] else
                               "NOT faster" if degree else "total degree not run") if applies else "does not apply"})
    return goals


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="small sizes only (a few minutes)")
    parser.add_argument("--seed", type=int, default=1)
    parser.add_argument("--singular-only", action="store_true",
                        help="only the singular locus of the shared problems by each start (total-degree witness "
                             "sets beside the square null-vector system)")
    parser.add_argument("--polyhedral-setup", type=int, nargs="+", metavar="N",
                        help="only cyclic N by the polyhedral start: set-up (mixed cells) against tracking")
    parser.add_argument("--mixed-cells", type=int, nargs="+", metavar="N",
                        help="only the mixed cells of cyclic N, timed with numag's simplex")
    parser.add_argument("--reference", action="store_true",
                        help="with --mixed-cells: also with scipy's linprog (cyclic 8: about 5 minutes)")
    parser.add_argument("--witness", action="store_true",
                        help="only the regeneration's start: witness sets by total-degree and grouped factors")
    parser.add_argument("--square-null-vector", type=int, nargs="+", metavar="SEED",
                        help="only the square null-vector systems of five shared problems by each start, per seed")
    parser.add_argument("--null-vector-locus", action="store_true",
                        help="only the singular locus through the null-vector form, total-degree against grouped")
    args = parser.parse_args()
    if args.square_null_vector:
        problems = {p["name"]: p for p in json.loads(
            (pathlib.Path(__file__).resolve().parent.parent / "tests" / "data" / "problems.json").read_text())}
        lines = ["| problem | seed | start | paths | singular points | failed | seconds |", "|---|---|---|---|---|---|---|"]
        for name in ("node", "four_generic_lines", "trifolium_triple_point", "cone_over_smooth_plane_cubic", "tacnode"):
            for seed in args.square_null_vector:
                for start in STARTS[:3]:
                    r = null_vector_row(name, problems[name], start, seed)
                    lines.append(f"| {name} | {seed} | {start} | {r['paths']} | {r['solutions']} | {r['failed']} | "
                                 f"{r['total_s']} |")
                    print(lines[-1], flush=True)
        out = pathlib.Path(__file__).resolve().parent / "results"
        os.makedirs(out, exist_ok=True)
        (out / "bench_starts_square_null_vector.md").write_text(
            f"python benchmarks/bench_starts.py --square-null-vector {' '.join(map(str, args.square_null_vector))}\n\n"
            + "\n".join(lines) + "\n")
        return
    if args.null_vector_locus:
        problems = {p["name"]: p for p in json.loads(
            (pathlib.Path(__file__).resolve().parent.parent / "tests" / "data" / "problems.json").read_text())}
        names = ["cusp", "node", "tacnode", "smooth_conic", "four_generic_lines", "trifolium_triple_point",
                 "cone_over_smooth_plane_cubic", "whitney_umbrella", "two_quadrics_union",
                 "affine_cone_over_twisted_cubic"] + ([] if args.quick else ["chebyshev_T4x_eq_T5y"])
        rows = null_vector_locus_rows(problems, names, args.seed)
        lines = ["| problem | start | route | paths | of them the square null-vector system | failed | pieces (dimension, degree) | "
                 "seconds |", "|---|---|---|---|---|---|---|---|"]
        lines += [f"| {r['problem']} | {r['start']} | {r['route']} | {r['paths']} | {r['square_system']} | "
                  f"{r['failed']} | {r['pieces']} | {r['seconds']} |" for r in rows]
        table = "\n".join(lines)
        print(table)
        out = pathlib.Path(__file__).resolve().parent / "results"
        os.makedirs(out, exist_ok=True)
        (out / ("bench_starts_null_vector_locus" + ("_quick.md" if args.quick else ".md"))).write_text(
            f"python benchmarks/bench_starts.py --null-vector-locus{' --quick' if args.quick else ''} "
            f"--seed {args.seed}\n\n{table}\n")
        return
    if args.witness:
        witness_main(args, {p["name"]: p for p in json.loads(
            (pathlib.Path(__file__).resolve().parent.parent / "tests" / "data" / "problems.json").read_text())})
        return
    if args.mixed_cells:
        solvers = [LinearProgramSolver.SIMPLEX] + ([LinearProgramSolver.HIGHS] if args.reference else [])
        rows = mixed_cell_rows(args.mixed_cells, args.seed, solvers)
        lines = ["| family | solver | mixed volume | cells | linear programs | seconds | ms per program |",
                 "|---|---|---|---|---|---|---|"]
        lines += [f"| {r['family']} | {r['solver']} | {r['mixed_volume']} | {r['cells']} | {r['linear_programs']} | "
                  f"{r['seconds']} | {r['ms_per_program']} |" for r in rows]
        print("\n".join(lines))
        return
    if args.polyhedral_setup:
        rows = polyhedral_setup_rows(args.polyhedral_setup, args.seed)
        lines = ["| family | mixed volume | cells | linear programs | set-up s | first stage s | second stage s | "
                 "set-up / tracking | solutions | of them multiple | not isolated | failed | first stage lost |",
                 "|---|---|---|---|---|---|---|---|---|---|---|---|---|"]
        lines += [f"| {r['family']} | {r['mixed_volume']} | {r['cells']} | {r['linear_programs']} | {r['setup_s']} | "
                  f"{r['first_stage_s']} | {r['second_stage_s']} | {100 * r['setup_share_of_tracking']:.1f} % | "
                  f"{r['solutions']} | {r['multiple']} | {r['not_isolated']} | {r['failed']} | {r['first_stage_lost']} |"
                  for r in rows]
        print("\n".join(lines))
        out = pathlib.Path(__file__).resolve().parent / "results"
        os.makedirs(out, exist_ok=True)
        (out / "bench_starts_polyhedral_setup.md").write_text(
            f"`python benchmarks/bench_starts.py --polyhedral-setup {' '.join(map(str, args.polyhedral_setup))} "
            f"--seed {args.seed}`\n\n" + "\n".join(lines) + "\n")
        return
    if args.quick:
        cyclics, katsuras, eigens = (5, 6), (3, 4), (4, 6)
        shared = ("node", "four_generic_lines", "trifolium_triple_point", "cone_over_smooth_plane_cubic")
    else:
        cyclics, katsuras, eigens = (5, 6, 7, 8), (3, 4, 5, 6), (4, 6, 8)
        shared = ("node", "cusp", "four_generic_lines", "chebyshev_T4x_eq_T5y", "trifolium_triple_point",
                  "cone_over_smooth_plane_cubic")
    rows = []
    systems = [cyclic(n) for n in cyclics] + [katsura(n) for n in katsuras] + \
        [eigenproblem(n, args.seed + n) for n in eigens]
    if args.singular_only:
        systems, shared_null = [], ()
    else:
        shared_null = shared
    for system in systems:
        for start in STARTS:
            if start == "total-degree" and system.name in ("cyclic 7", "cyclic 8"):
                continue  # 5,040 and 40,320 paths: beyond this benchmark's budget on a shared machine
            row = solve_row(system, start, args.seed)
            if start not in ("total-degree", "auto") and row["start"] != start:
                print(f"{system.name}: {start} fell back to {row['start']} ({row['reason']})", flush=True)
                continue
            rows.append(row)
            print(json.dumps(rows[-1]), flush=True)
    problems = {p["name"]: p for p in json.loads((pathlib.Path(__file__).resolve().parent.parent / "tests" / "data"
                                                   / "problems.json").read_text())}
    for name in shared_null:
        for start in STARTS:
            rows.append(null_vector_row(name, problems[name], start, args.seed))
            print(json.dumps(rows[-1]), flush=True)
    singular_rows = []
    for name in shared:  # the whole singular locus: X's decomposition, the candidates, the points at infinity
        for start in ("total-degree", "multihomogeneous", "auto"):
            singular_rows.append(singular_row(name, problems[name], start, args.seed))
            print(json.dumps(singular_rows[-1]), flush=True)
    lines = ["| family | start asked | chosen | paths | failed | solutions | unverified | set-up s | total s |",
             "|---|---|---|---|---|---|---|---|---|"]
    lines += [f"| {r['family']} | {r['asked']} | {r['start']} | {r['paths']} | {r['failed']} | {r['solutions']} | "
              f"{r['unverified']} | {r['setup_s']} | {r['total_s']} |" for r in rows]
    lines += ["", "| family | Bezout | mixed volume | total degree s | polyhedral s | set-up / tracking | auto | "
              "polyhedral faster where the mixed volume is under half the Bezout number |", "|---|---|---|---|---|---|---|---|"]
    for g in goal_rows(rows):
        share = "" if g["setup_share"] is None else f"{100 * g['setup_share']:.1f} %"
        lines.append(f"| {g['family']} | {g['bezout']} | {g['mixed_volume']} | {g['total_degree_s']} | "
                     f"{g['polyhedral_s']} | {share} | {g['auto']} | {g['goal']} |")
    lines += ["", "| singular locus of | start | paths | paths after X | failed | singular points | total s |",
              "|---|---|---|---|---|---|---|"]
    lines += [f"| {r['family'][len('singular locus of '):]} | {r['start']} | {r['paths']} | {r['paths_after_X']} | "
              f"{r['failed']} | {r['solutions']} | {r['total_s']} |" for r in singular_rows]
    table = "\n".join(lines)
    print(table)
    out = pathlib.Path(__file__).resolve().parent / "results"
    os.makedirs(out, exist_ok=True)
    name = "bench_starts_singular" if args.singular_only else "bench_starts"
    (out / (name + ("_quick.md" if args.quick else ".md"))).write_text(
        f"python benchmarks/bench_starts.py{' --quick' if args.quick else ''}"
        f"{' --singular-only' if args.singular_only else ''} --seed {args.seed}\n\n{table}\n")


if __name__ == "__main__":
    main()
