"""How long each picture takes (``numag plot``), split into tracing the real curve and drawing.

Run:  python benchmarks/bench_plot.py [--repeats R] [--seeds S]

For each case the report is computed once (not timed); then ``plot_report`` is timed R times (median),
and beside it the real-curve tracing alone (``trace_real_curve``: critical points, fibres, arcs) with
its counts: critical values, arcs, branches, traced points. The first drawing of a run also pays for
importing matplotlib; that import is timed apart. With ``--seeds S``, also the number of branches in the
box of curves whose answer is known, traced with seeds 1..S (every seed should give it). Writes
benchmarks/results/plot.txt.
"""

import argparse
import collections
import pathlib
import statistics
import tempfile
import time

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.app.commands.plot import with_angles
from numag.app.plot import PlotOptions, plot_report
from numag.app.report import check_report_to_dict, singular_to_dict
from numag.singular.locus import SingularOptions, singular_locus
from numag.singular.smoothness import check_points
from numag.system.files import load_points, load_system
from numag.system.parse import parse_system
from numag.witness.decompose import decompose
from numag.witness.realcurve import RealCurveOptions, trace_real_curve

LINKAGE = str(checkout.ROOT / "numag/examples/parallel_linkage.toml")
CHECKPOINTS = str(checkout.ROOT / "numag/examples/checkpoints_linkage.json")


def cases():
    """(name, report, options, system traced as a curve or None)."""
    nodal = parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"], name="nodal cubic")
    yield "nodal cubic (plane)", singular_to_dict(singular_locus(nodal, seed=1), SingularOptions()), \
        PlotOptions(box=(-2, 2, -2, 2)), nodal
    tacnode = parse_system(["(y - x^2)*(y + x^2) - x^6"], ["x", "y"], name="two tangent parabolas")
    yield "y^2 - x^4 - x^6 (plane)", singular_to_dict(singular_locus(tacnode, seed=1), SingularOptions()), \
        PlotOptions(box=(-1.5, 1.5, -1.5, 1.5)), tacnode
    linkage = load_system(LINKAGE)
    data = with_angles(singular_to_dict(singular_locus(linkage, seed=1), SingularOptions()), LINKAGE)
    yield "parallel linkage (joint angles)", data, PlotOptions(), linkage
    points = load_points(CHECKPOINTS, linkage.variables)
    report = check_points(linkage, points, seed=1, decomposition=decompose(linkage, seed=1))
    yield "linkage check points (joint angles)", with_angles(check_report_to_dict(report), LINKAGE), \
        PlotOptions(), linkage
    umbrella = parse_system(["x^2 - y^2*z"], ["x", "y", "z"], name="Whitney umbrella")
    data = singular_to_dict(singular_locus(umbrella, seed=1), SingularOptions())
    for resolution in (30, 60, 120):
        yield f"Whitney umbrella (surface, {resolution}^3)", data, PlotOptions(resolution=resolution), None


def known_branches():
    """(name, system, options, branches in the box): answers known by hand (common practice, no source)."""
    yield "y^2 = x^2 (x + 1) in [-2, 2]^2", parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"]), \
        RealCurveOptions(box=((-2, -2), (2, 2))), 3
    yield "y^2 = x^4 + x^6 in [-1.5, 1.5]^2", parse_system(["y^2 - x^4 - x^6"], ["x", "y"]), \
        RealCurveOptions(box=((-1.5, -1.5), (1.5, 1.5))), 4
    yield "y^2 = x^3 in [-2, 2]^2", parse_system(["y^2 - x^3"], ["x", "y"]), RealCurveOptions(box=((-2, -2), (2, 2))), 2
    yield "two concentric circles", parse_system(["(x^2 + y^2 - 1)*(x^2 + y^2 - 4)"], ["x", "y"]), None, 2
    yield "parallel linkage", load_system(LINKAGE), None, 4


def sweep(seeds):
    lines = ["", f"branches in the box over seeds 1-{seeds}: expected, then count of seeds per answer"]
    for name, system, options, expected in known_branches():
        counts, failed = collections.Counter(), 0
        for seed in range(1, seeds + 1):
            curve = trace_real_curve(system, options, seed=seed)
            counts[len(curve.branches())] += 1
            failed += curve.failed_arcs
        lines.append(f"{name:40s} expected {expected}: {dict(sorted(counts.items()))}, failed arc ends {failed}")
        print(lines[-1])
    return lines


def main():
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--seeds", type=int, default=0)
    args = parser.parse_args()
    started = time.perf_counter()
    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot  # noqa: F401
    lines = [f"importing matplotlib: {time.perf_counter() - started:.2f} s (once per process)", "",
             f"{'case':40s} {'picture s':>10s} {'trace s':>8s} {'crit':>5s} {'arcs':>5s} {'branches':>8s} "
             f"{'points':>7s}"]
    print(lines[0])
    folder = pathlib.Path(tempfile.mkdtemp())
    for name, data, options, curve_system in cases():
        seconds = []
        for repeat in range(args.repeats):
            clock = time.perf_counter()
            plot_report(data, folder / f"picture-{repeat}.png", options)
            seconds.append(time.perf_counter() - clock)
        trace = crit = arcs = branches = points = ""
        if curve_system is not None:
            clock = time.perf_counter()
            curve = trace_real_curve(curve_system, seed=1)
            trace = f"{time.perf_counter() - clock:.2f}"
            crit, arcs = len(curve.critical_values), len(curve.arcs)
            branches, points = len(curve.branches()), len(curve.points())
        line = (f"{name:40s} {statistics.median(seconds):10.2f} {trace:>8s} {crit!s:>5s} {arcs!s:>5s} "
                f"{branches!s:>8s} {points!s:>7s}")
        print(line)
        lines.append(line)
    if args.seeds:
        lines += sweep(args.seeds)
    results = checkout.ROOT / "benchmarks" / "results"
    results.mkdir(exist_ok=True)
    (results / "plot.txt").write_text("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
