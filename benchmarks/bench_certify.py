"""Certification benchmark: the nodes of Barth's sextic and Kummer's quartic at 16, 50 and 100 digits.

Run:  python benchmarks/bench_certify.py [--quick]

The singular points are found once (``singular_locus``), then each is certified
numerically (Krawczyk box of the partials in a chart, backward error of the
other equations) and, separately, exactly (coordinates recognised and every
equation reduced to zero). Printed side by side: seconds in all, seconds per
certified point, how many were certified, whether the boxes are pairwise
disjoint, the largest radius and backward error. Goal (issue: certification):
the 65 nodes of Barth's sextic (W. Barth, J. Algebraic Geom. 1996) certified in
under 10 s on a 2-core machine; the line "goal" prints the measured ratio.
"""

import argparse
import json
import pathlib
import time

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from numag.certify.certificates import certify_singular_point, overlapping_pairs
from numag.certify.records import CertifyOptions
from numag.system.parse import parse_system
from numag.singular.locus import singular_locus

PROBLEMS = pathlib.Path(__file__).resolve().parent.parent / "tests" / "data" / "problems.json"
GOAL_SECONDS = 10.0


def load(name):
    entry = {p["name"]: p for p in json.loads(PROBLEMS.read_text())}[name]
    return parse_system(entry["equations"], entry["variables"], projective=entry["projective"], name=name)


def certify_all(system, points, digits, exact):
    options = CertifyOptions(digits=digits, exact=exact)
    started = time.perf_counter()
    certificates = [certify_singular_point(system, point, codimension, options) for point, codimension in points]
    seconds = time.perf_counter() - started
    overlapping = overlapping_pairs(certificates)
    return certificates, seconds, overlapping


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="only 16 and 50 digits, numerical only")
    args = parser.parse_args()
    digit_list = (16, 50) if args.quick else (16, 50, 100)
    kinds = (False,) if args.quick else (False, True)
    header = (f"{'problem':26s} {'digits':>6s} {'kind':>9s} {'points':>6s} {'certified':>9s} {'exact':>5s} "
              f"{'seconds':>8s} {'s/point':>8s} {'disjoint':>8s} {'max radius':>10s} {'max bkw err':>11s}")
    print(header)
    barth_numerical_50 = None
    for name in ("kummer_quartic_mu2_eq_2", "barth_sextic_exact"):
        system = load(name)
        locus = singular_locus(system, seed=1)
        points = [(c.points[0], c.codimension) for c in locus.components if c.dimension == 0]
        for exact in kinds:
            for digits in digit_list:
                certificates, seconds, overlapping = certify_all(system, points, digits, exact)
                certified = [c for c in certificates if c.certified]
                exact_count = sum(c.kind == "exact" for c in certified)
                radius = max((c.radius for c in certified), default=float("nan"))
                backward = max((c.backward_error or 0.0 for c in certified), default=float("nan"))
                print(f"{name:26s} {digits:6d} {'exact' if exact else 'numerical':>9s} {len(points):6d} "
                      f"{len(certified):9d} {exact_count:5d} {seconds:8.2f} "
                      f"{seconds / max(len(certified), 1):8.4f} {'yes' if not overlapping else 'NO':>8s} "
                      f"{radius:10.1e} {backward:11.1e}")
                if name == "barth_sextic_exact" and digits == 50 and not exact:
                    barth_numerical_50 = seconds
    if barth_numerical_50 is not None:
        print(f"\ngoal: 65 Barth nodes certified (numerical, 50 digits) in {barth_numerical_50:.2f} s; "
              f"goal {GOAL_SECONDS:.0f} s; ratio {barth_numerical_50 / GOAL_SECONDS:.2f} (below 1 meets it)")


if __name__ == "__main__":
    main()
