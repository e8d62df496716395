"""What `numag check` says at points whose answer depends on the data's precision (decision 0072).

Run:  python benchmarks/bench_check_data.py [--checkout DIR] [--seeds 1 2 3]

Cases (the expected verdict is sympy's, with F and grad F evaluated exactly; sympy is the reference only):
the saddle (1, 2) between the two nodes of (y-2)^2 - ((x-1)^2 - 1e-6)^2, exact (not on X: f = -1e-12);
Cayley's cubic x^2 + y^2 + z^2 - 2xyz - 1 at its node (1, 1, 1) and at the exact smooth point
(1 + 1e-6, 1 + 1e-6, 1) of its line (t, t, 1); the same surface moved so that its node is at (1/3, 2/7, 8/9),
at that node written as 17-digit decimals (rounded data: "singular", about the rank drop within the
digits' reach, as a pasted computed singular point should be; "smooth" would be a guess) and 1.4e-6 from it (smooth). Each in the user's units, with lengths times 1000 and 1/1000,
and after a rational linear change; the verdicts go through the command line (`--json`), so the same script
measures another checkout (`--checkout`, e.g. the main branch before this decision).

Printed: one row per case and change with the verdicts over the seeds; a verdict other than the expected one is
marked; the last line counts right / undecided / wrong.
"""

import argparse
import json
import pathlib
import subprocess
import sys
import tempfile
from fractions import Fraction

import checkout  # noqa: F401 - this checkout's numag for sympy-free helpers; the runs use --checkout
import sympy

X, Y, Z = sympy.symbols("x y z")
TWO_NODES = (Y - 2) ** 2 - ((X - 1) ** 2 - sympy.Rational(1, 10 ** 6)) ** 2
CAYLEY = X ** 2 + Y ** 2 + Z ** 2 - 2 * X * Y * Z - 1
MOVED = CAYLEY.subs({X: X + sympy.Rational(2, 3), Y: Y + sympy.Rational(5, 7), Z: Z + sympy.Rational(1, 9)},
                    simultaneous=True)
R = sympy.Rational
CHANGES = {
    "unit": sympy.eye(3),
    "x1000": sympy.eye(3) / 1000,
    "x0.001": sympy.eye(3) * 1000,
    "linear": sympy.Matrix([[1, R(1, 3), 0], [R(2, 5), 1, 0], [0, R(-1, 7), 1]]),
}
#: (label, expression, variables, point, rounded, expected); rounded points are written as doubles print them
CASES = [
    ("saddle between two nodes, exact", TWO_NODES, 2, [1, 2], False, "off"),
    ("Cayley node, exact", CAYLEY, 3, [1, 1, 1], False, "singular"),
    ("Cayley 1.4e-6 from the node, exact", CAYLEY, 3, [1 + R(1, 10 ** 6), 1 + R(1, 10 ** 6), 1], False, "smooth"),
    ("moved Cayley node, 17 digits", MOVED, 3, [R(1, 3), R(2, 7), R(8, 9)], True, "singular"),
    ("moved Cayley 1.4e-6 from node, 17 digits", MOVED, 3, [R(1, 3) + R(1, 10 ** 6), R(2, 7) + R(1, 10 ** 6), R(8, 9)],
     True, "smooth"),
]


def changed(expression, n, point, change):
    a = CHANGES[change][:n, :n]
    old, new = (X, Y, Z)[:n], sympy.symbols("u v w")[:n]
    moved = sympy.expand(expression.subs(dict(zip(old, a * sympy.Matrix(new))), simultaneous=True))
    return moved, [str(s) for s in new], list(a.inv() * sympy.Matrix(point))


def verdict(checkout_dir, expression, names, point, rounded, seed):
    with tempfile.TemporaryDirectory() as folder:
        path = pathlib.Path(folder) / "system.toml"
        path.write_text(f'variables = {json.dumps(names)}\nequations = ["{str(expression).replace("**", "^")}"]\n')
        values = [repr(float(Fraction(str(v)))) if rounded else str(v) for v in point]
        assignment = ",".join(f"{n}={v}" for n, v in zip(names, values))
        run = subprocess.run([sys.executable, "-m", "numag", "check", str(path), "--point", assignment, "--json",
                              "--without-components", "--seed", str(seed)], cwd=checkout_dir, capture_output=True,
                             text=True, timeout=600)
        try:
            return json.loads(run.stdout)["points"][0]["verdict"]
        except (ValueError, KeyError, IndexError):
            return "error"


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--checkout", default=str(checkout.ROOT), help="the checkout to measure (default: this one)")
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    args = parser.parse_args()
    right = undecided = wrong = 0
    for label, expression, n, point, rounded, expected in CASES:
        for change in CHANGES:
            moved, names, moved_point = changed(expression, n, point, change)
            got = [verdict(args.checkout, moved, names, moved_point, rounded, seed) for seed in args.seeds]
            right += sum(g == expected for g in got)
            undecided += sum(g == "undecided" != expected for g in got)
            wrong += sum(g not in (expected, "undecided") for g in got)
            marks = " ".join(g if g == expected else f"{g}(!)" for g in got)
            print(f"{label:44s} {change:7s} expected {expected:9s} got {marks}", flush=True)
    print(f"right {right}, undecided {undecided}, wrong {wrong}")


if __name__ == "__main__":
    main()
