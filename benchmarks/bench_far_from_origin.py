"""Features about 1 apart translated far from the origin: solve, singular and discriminant against exact answers.

Run:  python benchmarks/bench_far_from_origin.py [--seeds 1 2 3] [--shifts 0 12 123 1234] [--checkout DIR]
      [--only discriminant sweep curve]

Each case is a problem whose answer does not depend on a translation x -> x - c, run at several shifts c
(the same geometry, far from the origin when c is large; decision 0071 covers isolated singular candidates
only). Expected counts are exact, from sympy on the unshifted problem (sympy is the reference only):

- ``solve``: (x - c)^3 - 3 (x - c), three simple roots c and c +- sqrt 3;
- ``singular``: two circles of radius 5 about (c, -2c) and (c + 6, -2c), two nodes;
- ``discriminant``: (x - c)^3 - 3 (x - c) + p with the parameter p, real discriminant points p = -2, 2;
- ``sweep`` of the same family at p = -4.5, -3.5, ..., 4.5: values whose real count is sympy's (1 or 3);
- ``discriminant`` of the curve family (y + 2c)^2 = (x - c)^3 + a (x - c) + b, a, b in [-3, 3]: vertical lines
  a = -3, -2, ..., 3 whose cuts in b are the real roots of 4 a^3 + 27 b^2 (sympy) within 1e-6.

Printed per case, shift and seed: found / expected, the exit code (0 = no warning) and whether the row is a
silent wrong answer (found != expected with exit 0). The last line counts silent wrong answers.
"""

import argparse
import json
import pathlib
import subprocess
import sys
import tempfile

import sympy

CHECKOUT = pathlib.Path(__file__).resolve().parent.parent
x, p, a, b = sympy.symbols("x p a b")


def cases(c):
    """(label, command, file text, expected count, how to count the JSON report) at shift ``c``."""
    cubic = f"(x-({c}))^3-3*(x-({c}))"
    circles = f"((x-({c}))^2+(y+{2 * c})^2-25)*((x-({c + 6}))^2+(y+{2 * c})^2-25)"
    return [
        ("three simple roots", "solve", f'variables = ["x"]\nequations = ["{cubic}"]\n',
         len(sympy.roots(x ** 3 - 3 * x)),
         lambda d: sum(1 for s in d["solutions"] if not s.get("at_infinity"))),
        ("two nodes of two circles", "singular", f'variables = ["x", "y"]\nequations = ["{circles}"]\n', 2,
         lambda d: sum(len(k["points"]) for k in d["components"] if k["dimension"] == 0 and not k.get("at_infinity"))),
        ("discriminant p = -2, 2", "discriminant",
         f'variables = ["x"]\nparameters = ["p"]\nequations = ["{cubic}+p"]\n',
         len([r for r in sympy.real_roots(sympy.discriminant(x ** 3 - 3 * x + p, x))]),
         lambda d: len(d.get("real_points") or d.get("points") or [])),
        ("sweep real counts (values)", "sweep --grid p=-4.5:4.5:10",
         f'variables = ["x"]\nparameters = ["p"]\nequations = ["{cubic}+p"]\n', len(SWEEP_COUNTS),
         lambda d: sum(sum(v["real"]) == e for v, e in zip(d["values"], SWEEP_COUNTS))),
        ("curve family cuts (lines)", "discriminant --no-infinity --no-components",
         f'variables = ["x", "y"]\nparameters = ["a", "b"]\nequations = ["(y+({2 * c}))^2-(x-({c}))^3-a*(x-({c}))-b"]'
         '\n[ranges]\na = [-3, 3]\nb = [-3, 3]\n', len(CURVE_CUTS), _lines_right),
    ]


#: sympy's real root counts of x^3 - 3x + p at the sweep's values.
SWEEP_COUNTS = [len(sympy.real_roots(x ** 3 - 3 * x + sympy.Rational(2 * k + 1, 2))) for k in range(-5, 5)]
#: sympy's real roots b of the discriminant -4 a^3 - 27 b^2 of x^3 + a x + b on the lines a = -3, ..., 3.
CURVE_CUTS = {v: sorted({float(r) for r in sympy.real_roots(sympy.Poly(
    sympy.discriminant(x ** 3 + a * x + b, x).subs(a, v), b))}) for v in range(-3, 4)}


def _lines_right(data):
    right = 0
    for line, expected in CURVE_CUTS.items():
        cuts = sorted({r["high"] for r in data["regions"]
                       if r["line"] == line and r["high"] not in ("infinity", None) and abs(float(r["high"])) < 1e300})
        right += len(cuts) == len(expected) and all(abs(float(c) - e) < 1e-6 for c, e in zip(cuts, expected))
    return right


def run(checkout, command, text, seed, folder):
    path = pathlib.Path(folder) / "system.toml"
    path.write_text(text)
    name, *options = command.split()  # a sub-command and its options: "sweep --grid p=-4.5:4.5:10"
    child = subprocess.run([sys.executable, "-m", "numag", name, str(path), *options, "--seed", str(seed), "--json"],
                           cwd=checkout, capture_output=True, text=True, timeout=600)
    try:
        return json.loads(child.stdout), child.returncode
    except json.JSONDecodeError:
        return None, child.returncode


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    parser.add_argument("--shifts", type=int, nargs="+", default=[0, 12, 123, 1234])
    parser.add_argument("--checkout", type=pathlib.Path, default=CHECKOUT)
    parser.add_argument("--only", nargs="+", default=None, metavar="WORD",
                        help="run only the cases whose label contains one of these words")
    args = parser.parse_args()
    silent = 0
    print(f"{'case':28s} {'shift':>6s} {'seed':>4s} {'found':>5s} {'expected':>8s} {'exit':>4s}")
    with tempfile.TemporaryDirectory() as folder:
        for c in args.shifts:
            for label, command, text, expected, count in cases(c):
                if args.only and not any(word in label for word in args.only):
                    continue
                for seed in args.seeds:
                    data, code = run(args.checkout, command, text, seed, folder)
                    found = None if data is None else count(data)
                    wrong = found != expected and code == 0
                    silent += wrong
                    print(f"{label:28s} {c:6d} {seed:4d} {str(found):>5s} {expected:8d} {code:4d}"
                          f"{'  SILENT' if wrong else ''}", flush=True)
    print(f"silent wrong answers (found != expected, exit 0): {silent}")


if __name__ == "__main__":
    main()
