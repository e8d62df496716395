"""`singular` on equations with embedded components (decision 0108): right / wrong / undecided against sympy.

Run:  python benchmarks/bench_embedded_locus.py [--quick] [--checkout ROOT] [--umbrella]

The cases of tests/test_embedded_locus.py (a plane with an embedded line, point or parabola, a hyperplane with an
embedded line in four unknowns, a cone with an embedded line through its vertex), in units x1, x1000, x1/1000 and
after a rational linear change, each at seeds 1, 2, 3. The expected answer is sympy's (the primary decomposition by
hand, checked with Groebner bases; the Jacobian criterion on X's ideal). Per run:

- Sing(X): "right" (numag's affine singular pieces, as (dimension, degree), are sympy's and no completeness warning),
  "undecided" (a completeness warning or an undecided piece: exit 3), "wrong" (a different answer, no warning: silent);
- the embedded sets (embedded points and components, as (dimension, degree)): right or wrong (not listed as such);
- CPU seconds of `singular`.

``--umbrella`` adds {w^2, w x, w y, w z, x^2 - y^2 z} (the Whitney umbrella in the hyperplane w = 0, the ideal not
radical; Sing(X) the line x = y = w = 0), unit and linear change only (minutes per run). ``--checkout`` measures
another checkout (before/after: the code before decision 0108 lists a witness point of an embedded line as an
embedded point).
"""

import argparse
import collections
import os
import sys
import time

import checkout  # noqa: F401  (this checkout's numag, not an installed one)


def main():
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--quick", action="store_true", help="units x1 and the linear change only, seed 1")
    parser.add_argument("--checkout", help="the numag checkout to measure (default: this one)")
    parser.add_argument("--umbrella", action="store_true", help="also the umbrella in a doubled hyperplane (slow)")
    parser.add_argument("--only", help="run only the cases whose name contains this text")
    args = parser.parse_args()
    here = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
    if args.checkout:
        sys.path.insert(0, os.path.abspath(args.checkout))
        for name in [m for m in sys.modules if m == "numag" or m.startswith("numag.")]:
            del sys.modules[name]
    sys.path.insert(0, os.path.join(here, "tests"))
    import sympy
    from test_embedded_locus import CASES, CHANGES, changed  # the cases and their sympy check
    from test_check_far import system_of
    import numag
    from numag.app.report import completeness_warnings, singular_to_dict
    from numag.singular.kinds import PieceKind
    from numag.singular.locus import SingularOptions, singular_locus
    print(f"numag from {os.path.dirname(numag.__file__)}")
    cases = dict(CASES)
    if args.umbrella:
        x, y, z, w = sympy.symbols("x y z w")
        # X's ideal (w, x^2 - y^2 z) by hand; Sing(X) = the line w = x = y = 0 (common practice, no source)
        cases["umbrella in a doubled hyperplane"] = ([w ** 2, w * x, w * y, w * z, x ** 2 - y ** 2 * z],
                                                     (x, y, z, w), [w, x ** 2 - y ** 2 * z], None, [(1, 1)], None)
    changes = ["unit", "linear"] if args.quick or args.umbrella else list(CHANGES)
    seeds = (1,) if args.quick else (1, 2, 3)
    print(f"{'case':40s} {'Sing(X) right/wrong/undecided':>30s} {'embedded sets right/wrong':>26s} {'CPU s':>8s}")
    totals = collections.Counter()
    for name, (equations, variables, radical, embedded, singular, sets) in cases.items():
        if args.only and args.only not in name:
            continue
        counts, seconds = collections.Counter(), 0.0
        for change in (["unit", "linear"] if sets is None else changes):
            if name in CASES:
                equations_u, _, _, variables_u, _, _ = changed(name, change)
            else:
                matrix = CHANGES[change](len(variables))
                variables_u = sympy.symbols("u v s t")[:len(variables)]
                substitution = dict(zip(variables, matrix * sympy.Matrix(variables_u)))
                equations_u = [sympy.expand(e.subs(substitution, simultaneous=True)) for e in equations]
            system = system_of(equations_u, variables_u)
            for seed in seeds:
                started = time.process_time()
                locus = singular_locus(system, SingularOptions(), seed=seed)
                seconds += time.process_time() - started
                pieces = sorted((c.dimension, c.degree) for c in locus.components
                                if not c.at_infinity and c.kind in (PieceKind.SINGULAR, PieceKind.NON_REDUCED))
                flagged = bool(completeness_warnings(singular_to_dict(locus, SingularOptions()))) or any(
                    c.kind is PieceKind.UNDECIDED for c in locus.components)
                if pieces == sorted(singular) and not flagged:
                    counts["right"] += 1
                elif flagged:
                    counts["undecided"] += 1
                else:
                    counts["wrong"] += 1
                if sets is not None:
                    listed = sorted([(c.dimension, c.degree) for c in getattr(locus, "embedded_components", [])]
                                    + [(0, 1)] * len(locus.embedded))
                    counts["sets right" if listed == sorted(sets) else "sets wrong"] += 1
        totals.update(counts)
        print(f"{name:40s} {counts['right']:>14d}/{counts['wrong']}/{counts['undecided']:<13d} "
              f"{counts['sets right']:>12d}/{counts['sets wrong']:<13d} {seconds:8.1f}")
    print(f"total: Sing(X) right {totals['right']}, wrong {totals['wrong']}, undecided {totals['undecided']}; "
          f"embedded sets right {totals['sets right']}, wrong {totals['sets wrong']}")


if __name__ == "__main__":
    main()
