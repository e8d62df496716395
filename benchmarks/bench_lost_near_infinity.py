"""Singular points lost near a set at infinity: surfaces whose partials' top forms share a factor, after rational
linear changes in units of 1/1000 and 1000, against sympy.

Each class is a surface with isolated singular points known exactly (sympy finds them on the original equation;
they are mapped by the change exactly). The surface is moved by x -> unit A x + shift (A a random rational matrix
of small integers and halves, shift small rationals), so that its features sit at 1/unit times their size. On
such surfaces F's top form is a product (x^2 y^2, x^2 y^2 z^2) and the candidates' equations F, f_v have top forms
with a common factor: the last regeneration move's target has a positive-dimensional set at infinity, and a path
to a finite singular point can pass near it (decision 0031, a tester's thirteenth round; decision 0121).

Every case runs ``python -m numag singular FILE --json --seed S`` of a checkout and counts, over cases x seeds:
right (every point found, exit 0), flagged (exit 3; points missing or not), lost (a point missing with exit 0:
a silent wrong answer), extra (a point found that sympy does not have, exit 0).

    python benchmarks/bench_lost_near_infinity.py [--draws 6] [--seeds 1 2 3] [--checkout DIR ...]
    python benchmarks/bench_lost_near_infinity.py --scan 200 --seeds 1 2 3 4 5   # search for new losses

``--checkout`` may be given twice (before and after): the same cases run on both, side by side.
``--instrument`` runs the cases in this process on this checkout instead and counts the second looks of decision
0121: paths whose end at infinity was in doubt, those whose deep sample stood at infinity (with the largest
X_0 / ||X|| of such a sample against the threshold: how close they came to being looked at again), those
tracked again, and how they ended.
"""

import argparse
import concurrent.futures
import pathlib
import tempfile

import checkout  # noqa: F401  (this checkout's numag and tests first on sys.path)
import numpy as np
import sympy

from bench_coordinates import found_points, run_case  # noqa: E402  (the one CLI runner and reader)

X, Y, Z = sympy.symbols("x y z")

#: name -> the surface (its isolated singular points found by sympy; by hand: the gradient of
#: (x^2 - a)(y^2 - b) - z^2 vanishes on X at (+-sqrt a, +-sqrt b, 0), common practice, no source)
CLASSES = {
    "four-nodes": (X**2 - 1) * (Y**2 - 1) - Z**2,
    "four-nodes-4-9": (X**2 - 4) * (Y**2 - 9) - Z**2,
    "four-nodes-quarter": (4 * X**2 - 1) * (Y**2 - 1) - Z**2,
    "origin-node": (X**2 - 1) * (Y**2 - 1) - Z**2 - 1,
    "triple-origin": (X**2 - 1) * (Y**2 - 1) * (Z**2 - 1) + 1,
    "four-nodes-cubic-z": (X**2 - 1) * (Y**2 - 1) - Z**2 * (Z - 3),
}

#: Draws found by ``--scan`` that lost a point silently (class, unit, matrix, shift), kept as the benchmark's cases.
RECORDED = [
    ("four-nodes", 1000, [["3", "3", "1"], ["0", "-1", "1"], ["1", "-1/2", "2/3"]], ["7/3", "14/3", "7"]),
]


def singular_points(expression):
    """The singular points of V(expression) in C^3 (sympy, exact)."""
    gradient = [sympy.diff(expression, v) for v in (X, Y, Z)]
    return [tuple(s[v] for v in (X, Y, Z)) for s in sympy.solve([expression] + gradient, [X, Y, Z], dict=True)]


def moved(name, unit, matrix, shift):
    """(the moved expression, its singular points as complex arrays): x -> unit A x + shift."""
    a = sympy.Matrix([[sympy.Rational(c) for c in row] for row in matrix]) * sympy.nsimplify(unit)
    b = sympy.Matrix([sympy.Rational(c) for c in shift])
    images = a * sympy.Matrix([X, Y, Z]) + b
    expression = sympy.expand(CLASSES[name].subs(dict(zip((X, Y, Z), images)), simultaneous=True))
    denominators = [sympy.fraction(c)[1] for c in sympy.Poly(expression, X, Y, Z).coeffs()]
    expression = sympy.expand(expression * sympy.lcm(denominators))
    inverse = a.inv()
    points = [np.array([complex(sympy.N(c, 30)) for c in inverse * (sympy.Matrix(p) - b)])
              for p in singular_points(CLASSES[name])]
    return expression, points


def random_draw(rng, name=None):
    """(class, unit, matrix, shift) with small integer-and-half entries, an invertible matrix."""
    name = name or rng.choice(sorted(CLASSES))
    while True:
        matrix = [[str(sympy.Rational(int(rng.integers(-6, 7)), int(rng.choice([1, 1, 2, 3])))) for _ in range(3)]
                  for _ in range(3)]
        if sympy.Matrix([[sympy.Rational(c) for c in row] for row in matrix]).det() != 0:
            break
    shift = [str(sympy.Rational(int(rng.integers(-20, 21)), int(rng.choice([1, 3, 7])))) for _ in range(3)]
    return str(name), int(rng.choice([1000, 1])) if rng.random() < 0.8 else sympy.Rational(1, 1000), matrix, shift


def judge(report, code, expected):
    """'right', 'flagged', 'lost' or 'extra' for one run, and the number of expected points found."""
    if report is None:
        return "flagged", 0
    found = found_points(report)
    scale = max(np.linalg.norm(e) for e in expected) if expected else 1.0
    spread = max((np.linalg.norm(a - b) for a in expected for b in expected), default=scale) or scale

    def near(a, b):
        return np.linalg.norm(a - b) <= 1e-6 * max(np.linalg.norm(b), spread)
    hits = sum(any(near(f, e) for f in found) for e in expected)
    extra = sum(not any(near(f, e) for e in expected) for f in found)
    if code != 0:
        return "flagged", hits
    if hits < len(expected):
        return "lost", hits
    return ("extra" if extra else "right"), hits


def run_all(cases, seeds, root, timeout, workers):
    """{(case index, seed): (verdict, hits, expected, seconds)} for the checkout at ``root``."""
    with tempfile.TemporaryDirectory() as folder:
        jobs = []
        for k, (name, unit, matrix, shift) in enumerate(cases):
            expression, expected = moved(name, unit, matrix, shift)
            path = pathlib.Path(folder) / f"case{k}.toml"
            path.write_text(f'name = "{name}"\nvariables = ["x", "y", "z"]\n'
                            f'equations = ["{str(expression).replace("**", "^")}"]\n')
            jobs += [(k, seed, path, expected) for seed in seeds]

        def one(job):
            k, seed, path, expected = job
            report, code, seconds = run_case(root, path, seed, timeout)
            verdict, hits = judge(report, code, expected)
            return (k, seed), (verdict, hits, len(expected), seconds, code)
        with concurrent.futures.ThreadPoolExecutor(workers) as pool:
            results = {}
            for key, value in pool.map(one, jobs):
                results[key] = value
                if value[0] == "lost":
                    print(f"  LOST case {key[0]} {cases[key[0]]} seed {key[1]}: {value[1]}/{value[2]}", flush=True)
            return results


def instrument(cases, seeds):
    """Counts of the second looks (decision 0121) over cases x seeds, in this process."""
    import numag.tracking.tracker as tracker
    from numag.singular.locus import singular_locus
    from numag.system.parse import parse_system
    counts = {"runs": 0, "in_doubt": 0, "stood_by_deep_sample": 0, "tracked_again": 0, "finite_after": 0,
              "failed_after": 0, "largest_deep_x0_that_stood": 0.0, "smallest_deep_x0_tracked_again": np.inf}
    looked = tracker._look_again

    def counted(homotopy, paths, deep, opts, endpoints, status, steps, condition, winding):
        with np.errstate(all="ignore"):
            x0 = np.abs(deep[:, 0]) / np.linalg.norm(deep, axis=1)
        stood = ~np.isfinite(x0) | (x0 <= opts.infinity_threshold)
        counts["in_doubt"] += len(paths)
        counts["stood_by_deep_sample"] += int(stood.sum())
        counts["tracked_again"] += int((~stood).sum())
        if np.any(stood):
            counts["largest_deep_x0_that_stood"] = max(counts["largest_deep_x0_that_stood"], float(x0[stood].max()))
        if np.any(~stood & np.isfinite(x0)):
            counts["smallest_deep_x0_tracked_again"] = min(counts["smallest_deep_x0_tracked_again"],
                                                           float(x0[~stood & np.isfinite(x0)].min()))
        looked(homotopy, paths, deep, opts, endpoints, status, steps, condition, winding)
        after = status[paths[~stood]]
        counts["finite_after"] += int(np.sum((after == tracker.PathStatus.CONVERGED)
                                             | (after == tracker.PathStatus.SINGULAR_ENDPOINT)))
        counts["failed_after"] += int(np.sum(after >= tracker.PathStatus.FAILED_MIN_STEP))
    tracker._look_again = counted
    try:
        for name, unit, matrix, shift in cases:
            expression, _ = moved(name, unit, matrix, shift)
            system = parse_system([str(expression).replace("**", "^")], ["x", "y", "z"])
            for seed in seeds:
                singular_locus(system, seed=seed)
                counts["runs"] += 1
    finally:
        tracker._look_again = looked
    return counts


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--draws", type=int, default=6, help="random draws per class beside the recorded cases")
    parser.add_argument("--scan", type=int, default=0, help="this many random draws instead (a search)")
    parser.add_argument("--draw-seed", type=int, default=121)
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    parser.add_argument("--checkout", action="append", help="checkout(s) to run (default: this one)")
    parser.add_argument("--timeout", type=float, default=120)
    parser.add_argument("--workers", type=int, default=2)
    parser.add_argument("--instrument", action="store_true", help="count the second looks in this process")
    parser.add_argument("--out", default=str(checkout.ROOT / "benchmarks" / "results" / "lost_near_infinity.txt"))
    args = parser.parse_args()
    rng = np.random.default_rng(args.draw_seed)
    if args.scan:
        cases = [random_draw(rng) for _ in range(args.scan)]
    else:
        cases = list(RECORDED) + [random_draw(rng, name) for name in sorted(CLASSES) for _ in range(args.draws)]
    if args.instrument:
        counts = instrument(cases, args.seeds)
        print(", ".join(f"{k} {v:.2g}" if isinstance(v, float) else f"{k} {v}" for k, v in counts.items()))
        return
    roots = args.checkout or [str(checkout.ROOT)]
    lines = [f"{len(cases)} cases x seeds {args.seeds}"]
    print(lines[0], flush=True)
    for root in roots:
        results = run_all(cases, args.seeds, root, args.timeout, args.workers)
        totals = {}
        for verdict, *_ in results.values():
            totals[verdict] = totals.get(verdict, 0) + 1
        seconds = sum(v[3] for v in results.values())
        row = f"{root}: " + ", ".join(f"{k} {totals.get(k, 0)}" for k in ("right", "flagged", "lost", "extra")) \
            + f" ({seconds:.0f} s wall in runs)"
        for (k, seed), (verdict, hits, count, _, code) in sorted(results.items()):
            if verdict != "right":
                lines.append(f"  {verdict}: {cases[k]} seed {seed}: {hits}/{count} exit {code}")
        lines.append(row)
        print("\n".join(lines[-1:]), flush=True)
    out = pathlib.Path(args.out)
    out.parent.mkdir(parents=True, exist_ok=True)
    out.write_text("\n".join(lines) + "\n")
    print("\n".join(lines))


if __name__ == "__main__":
    main()
