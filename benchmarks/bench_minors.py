"""Jacobian minors expanded into polynomials against minors evaluated from the Jacobian (numeric.minors).

Run:  python benchmarks/bench_minors.py [--quick] [--points N] [--singular] [--barth]

For each case, side by side in one run: the expansion of the minors (time, number of terms, or the limit
that refused it) and the evaluated form (set-up, values and gradients at N points in double, one point in
mpmath at 30 digits). The cases are the ones the singular-locus pipeline builds: the c x c minors of F, and
the random (r + 1)-minors that deflation adds to an augmented system F + minors, and beside them the size of
the same deflation step in the kernel form (new unknowns lambda, J B lambda = 0, h . lambda = 1). Results also go to
benchmarks/results/bench_minors.json.

Second table (decision 0050): the same deflation minors as the witness pipeline holds a homotopy with them,
c random combinations of F and the minor raised to one degree by X_0 powers, written out by polynomial
arithmetic (``combine_equations`` of the expanded minor) or evaluated from values and gradients
(``CombinedRows``), and which of the two ``holding_rows`` picks (``EXPANSION_MONOMIALS``). With ``--singular``,
``numag singular``'s computation on the swallowtail surface (time, pieces, paths); ``--barth`` adds Barth's
sextic with the golden ratio as an unknown (many minutes on a shared 2-core machine).
"""

import argparse
import json
import os
import time

import mpmath
import numpy as np

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.errors import LimitError
from numag.numeric.minors import EvaluatedMinors, expanded_minors, kernel_deflation, random_minor_weights
from numag.system.parse import parse_system

SWALLOWTAIL = (["16*a^4*c - 4*a^3*b^2 - 128*a^2*c^2 + 144*a*b^2*c - 27*b^4 + 256*c^3"], ["a", "b", "c"])
BARTH_PHI = (["4*(p^2*x^2 - y^2)*(p^2*y^2 - z^2)*(p^2*z^2 - x^2) - (1 + 2*p)*(x^2 + y^2 + z^2 - 1)^2",
              "p^2 - p - 1"], ["x", "y", "z", "p"])


def augmented(polynomials, size, rng):
    """F with its size x size minors (all of them, each divided by its norm): what deflation starts from."""
    n = polynomials[0].n_variables
    weights = random_minor_weights(len(polynomials), n, size, 60, rng)
    return list(polynomials) + expanded_minors(polynomials, weights, normalize=True)


def cases(rng):
    swallowtail = [p.numeric() for p in parse_system(*SWALLOWTAIL).polynomials]
    barth = [p.numeric() for p in parse_system(*BARTH_PHI).polynomials]
    swallowtail_aug = augmented(swallowtail, 1, rng)
    barth_aug = augmented(barth, 2, rng)
    return [
        ("swallowtail: random 1x1 minors of F (the partials)", swallowtail, 1),
        ("swallowtail + partials: random 2x2 minor (deflation)", swallowtail_aug, 2),
        ("swallowtail + partials: random 3x3 minor (deflation)", swallowtail_aug, 3),
        ("Barth, golden ratio as unknown: random 2x2 minor of F", barth, 2),
        ("Barth + 2x2 minors: random 3x3 minor (deflation)", barth_aug, 3),
        ("Barth + 2x2 minors: random 4x4 minor (deflation)", barth_aug, 4),
    ]


def measure(name, polynomials, size, rng, points, quick):
    n = polynomials[0].n_variables
    weights = random_minor_weights(len(polynomials), n, size, 0, rng, count=1)
    row = {"case": name, "equations": len(polynomials), "unknowns": n, "size": size,
           "input_terms": sum(p.n_terms for p in polynomials)}
    started = time.perf_counter()
    try:
        expanded = expanded_minors(polynomials, weights)
        row["expanded_terms"] = sum(p.n_terms for p in expanded)
        row["expanded_outcome"] = "built"
    except LimitError as err:
        row["expanded_terms"] = None
        row["expanded_outcome"] = f"refused: {err}"
    row["expand_seconds"] = time.perf_counter() - started

    started = time.perf_counter()
    minors = EvaluatedMinors.from_weights(polynomials, weights)
    row["evaluated_setup_seconds"] = time.perf_counter() - started
    row["evaluated_degree"] = minors.degrees[0]
    row["second_derivative_terms"] = int(sum(p.n_terms for p in minors.derivatives))
    at = rng.standard_normal((points, n)) + 1j * rng.standard_normal((points, n))
    started = time.perf_counter()
    values, gradients = minors.evaluate(at)
    row["evaluated_seconds"] = time.perf_counter() - started
    row["points"] = points
    if row["expanded_outcome"] == "built" and not quick:
        from numag.numeric.evaluate import BatchEvaluator
        started = time.perf_counter()
        evaluator = BatchEvaluator(expanded)
        reference, reference_gradients = evaluator.evaluate(at)
        row["expanded_eval_seconds"] = time.perf_counter() - started
        row["max_relative_difference"] = float(np.max(np.abs(reference[:, 0] - values[:, 0])
                                                      / np.maximum(np.abs(reference[:, 0]), 1e-300)))
    if size < n:  # the same rank condition by deflation in the kernel form: new equations, their terms
        started = time.perf_counter()
        kernel = kernel_deflation(polynomials, size - 1, rng)[len(polynomials):]
        row["kernel_seconds"] = time.perf_counter() - started
        row["kernel_terms"] = sum(p.n_terms for p in kernel)
        row["kernel_new_unknowns"] = size
    with mpmath.workdps(30):
        started = time.perf_counter()
        minors.evaluate_precise([mpmath.mpc(complex(v)) for v in at[0]], mpmath.mp)
        row["mpmath_point_seconds"] = time.perf_counter() - started
    return row


def held_rows(name, polynomials, size, rng, points):
    """Rows holding a homotopy on a deflated component: expanded by polynomial arithmetic against evaluated."""
    from numag.numeric.evaluate import BatchEvaluator
    from numag.numeric.minors import CombinedRows
    from numag.witness.cascade import combine_equations, random_rows
    from numag.witness.decompose import EXPANSION_MONOMIALS, expansion_bound
    n = polynomials[0].n_variables
    codimension = size  # the rows a component of codimension `size` is held by
    weights = random_minor_weights(len(polynomials), n, size, 0, rng, count=1)
    homogeneous = [p.homogenize(0) for p in polynomials]
    row = {"case": name, "bound": expansion_bound(polynomials, size, n)}
    row["picked"] = "evaluated" if row["bound"] > EXPANSION_MONOMIALS else "expanded"
    at = rng.standard_normal((points, n + 1)) + 1j * rng.standard_normal((points, n + 1))
    started = time.perf_counter()
    try:
        minor = expanded_minors(polynomials, weights, normalize=True)
        combined = combine_equations(homogeneous + [p.homogenize(0) for p in minor], codimension,
                                     np.random.default_rng(1))
        row["expanded_build_seconds"] = time.perf_counter() - started
        row["expanded_terms"] = sum(p.n_terms for p in combined)
        evaluator = BatchEvaluator(combined)
        started = time.perf_counter()
        evaluator.evaluate(at)
        row["expanded_eval_seconds"] = time.perf_counter() - started
    except LimitError as err:
        row["expanded_terms"], row["expanded_outcome"] = None, f"refused: {err}"
    started = time.perf_counter()
    minors = EvaluatedMinors.from_weights(polynomials, weights, homogenized=True)
    rows = CombinedRows(homogeneous, minors, random_rows(np.random.default_rng(1), codimension,
                                                        len(homogeneous) + 1))
    row["evaluated_build_seconds"] = time.perf_counter() - started
    started = time.perf_counter()
    rows.evaluate(at)
    row["evaluated_eval_seconds"] = time.perf_counter() - started
    return row


def singular_runs(barth):
    """numag singular's computation (API, seed 1, in-process) on the swallowtail and, optionally, Barth."""
    from numag.singular.locus import singular_locus
    runs = [("swallowtail", SWALLOWTAIL)] + ([("Barth, golden ratio as unknown", BARTH_PHI)] if barth else [])
    out = []
    for name, (equations, variables) in runs:
        started = time.perf_counter()
        locus = singular_locus(parse_system(equations, variables), seed=1)
        affine = [c for c in locus.components if not c.at_infinity]
        out.append({"case": name, "seconds": time.perf_counter() - started,
                    "points": sum(1 for c in affine if c.dimension == 0),
                    "curves": sorted(c.degree for c in affine if c.dimension == 1),
                    "paths": int(locus.paths.get("tracked", 0)),
                    "failed": {k: v for k, v in locus.paths.items() if k in ("minimum_step", "step_limit",
                                                                             "endgame_unsettled", "jumped") and v}})
        print(f"singular {name}: {out[-1]['seconds']:.1f} s, {out[-1]['points']} affine points, curves of degrees "
              f"{out[-1]['curves']}, {out[-1]['paths']} paths, failed {out[-1]['failed']}", flush=True)
    return out


def main():
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--quick", action="store_true", help="skip evaluating the expanded minors")
    parser.add_argument("--points", type=int, default=1000)
    parser.add_argument("--singular", action="store_true", help="also time numag singular on the swallowtail")
    parser.add_argument("--barth", action="store_true", help="with --singular: also Barth's sextic (minutes)")
    args = parser.parse_args()
    rng = np.random.default_rng(0)
    rows = []
    header = (f"{'case':56s} {'terms in':>8s} {'expanded':>10s} {'expand s':>9s} {'eval s':>8s} "
              f"{'setup s':>8s} {'deg':>4s} {'mp s':>6s}")
    print(header)
    for name, polynomials, size in cases(rng):
        row = measure(name, polynomials, size, rng, args.points, args.quick)
        rows.append(row)
        terms = row["expanded_terms"] if row["expanded_terms"] is not None else "refused"
        print(f"{name:56s} {row['input_terms']:8d} {terms!s:>10s} {row['expand_seconds']:9.2f} "
              f"{row['evaluated_seconds']:8.3f} {row['evaluated_setup_seconds']:8.3f} {row['evaluated_degree']:4d} "
              f"{row['mpmath_point_seconds']:6.3f}", flush=True)
        if row["expanded_outcome"] != "built":
            print(f"    expansion {row['expanded_outcome']}")
        if "kernel_terms" in row:
            print(f"    kernel form: {row['kernel_new_unknowns']} new unknowns, {len(polynomials) + 1} new equations, "
                  f"{row['kernel_terms']} terms, built in {row['kernel_seconds']:.3f} s")
        if "expanded_eval_seconds" in row:
            print(f"    expanded minor evaluated at {args.points} points in {row['expanded_eval_seconds']:.3f} s; "
                  f"largest relative difference {row['max_relative_difference']:.1e}")
    print(f"(eval s: values and gradients at {args.points} points in double; mp s: one point at 30 digits)")
    print()
    print(f"{'held rows (witness pipeline)':56s} {'bound':>7s} {'picked':>9s} {'terms':>7s} {'build s':>8s} "
          f"{'eval s':>8s} {'ev build':>8s} {'ev eval':>8s}")
    held = []
    for name, polynomials, size in cases(rng):
        if size == 1 or size > 3:  # small sizes by default: the 4 x 4 expansion alone takes 20 s
            continue
        row = held_rows(name, polynomials, size, rng, args.points)
        held.append(row)
        print(f"{name:56s} {row['bound']:7d} {row['picked']:>9s} {row['expanded_terms']!s:>7s} "
              f"{row.get('expanded_build_seconds', float('nan')):8.2f} {row.get('expanded_eval_seconds', float('nan')):8.3f} "
              f"{row['evaluated_build_seconds']:8.3f} {row['evaluated_eval_seconds']:8.3f}", flush=True)
    rows.append({"held_rows": held})
    if args.singular:
        rows.append({"singular": singular_runs(args.barth)})
    folder = os.path.join(os.path.dirname(__file__), "results")
    os.makedirs(folder, exist_ok=True)
    with open(os.path.join(folder, "bench_minors.json"), "w") as handle:
        json.dump(rows, handle, indent=1)


if __name__ == "__main__":
    main()
