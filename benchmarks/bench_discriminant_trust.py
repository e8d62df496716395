"""Discriminants a tester found silently wrong (decision 0092): before/after as silent wrong answers against sympy.

Run:  python benchmarks/bench_discriminant_trust.py [--seeds 1 2 3] [--checkout DIR] [--only quartic curve nodes]

Cases (sympy the reference only; discriminants of these forms: common practice, no source):

- ``quartic``: (x - c)^4 - 5 (x - c)^2 + 4 - p, p in [-5, 8], at c = 0 and 1234: right when the real
  discriminant points are sympy's p = -9/4, 4 (within 1e-6) and the regions' real counts 0, 4, 2 (sympy's real
  roots at the samples);
- ``curve``: (y + 2345)^2 - (x - 1234)^4 + a (x - 1234)^2 - b, a, b in [-3, 3], 3 lines a = -3, 0, 3: lines whose
  cuts in b are sympy's real roots of 16 b (a^2 - 4 b)^2 (the discriminant of x^4 - a x^2 + b, y = 0), of 3;
- ``nodes``: x^2 + y^2 = a, y = x^2 + b (x, y in units 1, 1000, 0.001 by the shift column 0, 1, 2): nodes
  reported, of sympy's 0 (the factors a - b^2 and 4a + 4b + 1 of the resultant meet only tangentially).

A row is SILENT when found != expected and the exit code is 0.
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

QUARTIC_POINTS = sorted({float(r) for r in sympy.real_roots(sympy.discriminant(x ** 4 - 5 * x ** 2 + 4 - p, x))})
CURVE_LINES = (-3, 0, 3)
CURVE_CUTS = {v: sorted({float(r) for r in sympy.real_roots(sympy.Poly(
    sympy.discriminant(x ** 4 - a * x ** 2 + b, x).subs(a, v), b))}) for v in CURVE_LINES}


def _quartic_right(data):
    points = sorted(float(v) for v in data.get("real_points") or [])
    right = len(points) == len(QUARTIC_POINTS) and all(abs(u - v) < 1e-6 for u, v in zip(points, QUARTIC_POINTS))
    counts = []
    for region in data["regions"]:
        sample = sympy.Rational(str(round(float(region["sample"][0]), 6)))
        counts.append(len(sympy.real_roots(x ** 4 - 5 * x ** 2 + 4 - sample)))
        right &= region["real_solutions"] == counts[-1]
    return int(right and counts == [0, 4, 2])


def _curve_lines_right(data):
    right = 0
    for line, expected in CURVE_CUTS.items():
        cuts = sorted({float(r["high"]) for r in data["regions"] if abs(float(r["line"]) - line) < 1e-9
                       and r["high"] not in ("infinity", None) and abs(float(r["high"])) < 1e300})
        right += len(cuts) == len(expected) and all(abs(c - e) < 1e-6 for c, e in zip(cuts, expected))
    return right


def _nodes(data):
    return sum(1 for s in (data.get("curve") or {}).get("special", []) if s["kind"] == "node")


def cases():
    """(label, shift label, command, file text, expected, count)."""
    rows = []
    for c in (0, 1234):
        t = f"(x-({c}))"
        rows.append(("quartic points and counts", c, "discriminant --no-infinity",
                     f'variables = ["x"]\nparameters = ["p"]\nequations = ["{t}^4-5*{t}^2+4-p"]\n[ranges]\np = [-5, 8]\n',
                     1, _quartic_right))
    rows.append(("curve family lines", 1234, "discriminant --no-infinity --no-components --lines 3 --trace-lines 20",
                 'variables = ["x", "y"]\nparameters = ["a", "b"]\n'
                 'equations = ["(y+2345)^2-(x-1234)^4+a*(x-1234)^2-b"]\n[ranges]\na = [-3, 3]\nb = [-3, 3]\n',
                 len(CURVE_LINES), _curve_lines_right))
    for k, unit in enumerate(("x", "x/1000", "1000*x")):
        v = unit.replace("x", "y")
        rows.append(("nodes of circle and parabola", k, "discriminant --no-infinity --no-components",
                     f'variables = ["x", "y"]\nparameters = ["a", "b"]\n'
                     f'equations = ["({unit})^2+({v})^2-a", "{v}-({unit})^2-b"]\n[ranges]\na = [-1, 3]\nb = [-2, 2]\n',
                     0, _nodes))
    return rows


def run(checkout, command, text, seed, folder):
    path = pathlib.Path(folder) / "system.toml"
    path.write_text(text)
    name, *options = command.split()
    child = subprocess.run([sys.executable, "-m", "numag", name, str(path), *options, "--seed", str(seed), "--json"],
                           cwd=checkout, capture_output=True, text=True, timeout=1800)
    try:
        return json.loads(child.stdout), child.returncode
    except json.JSONDecodeError:
        return None, child.returncode


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    parser.add_argument("--checkout", type=pathlib.Path, default=CHECKOUT)
    parser.add_argument("--only", nargs="+", default=None, metavar="WORD")
    args = parser.parse_args()
    silent = 0
    print(f"{'case':30s} {'shift':>6s} {'seed':>4s} {'found':>5s} {'expected':>8s} {'exit':>4s}")
    with tempfile.TemporaryDirectory() as folder:
        for label, shift, command, text, expected, count in cases():
            if args.only and not any(word in label for word in args.only):
                continue
            for seed in args.seeds:
                data, code = run(args.checkout, command, text, seed, folder)
                found = None if data is None else count(data)
                wrong = found != expected and code == 0
                silent += wrong
                print(f"{label:30s} {shift:6d} {seed:4d} {str(found):>5s} {expected:8d} {code:4d}"
                      f"{'  SILENT' if wrong else ''}", flush=True)
    print(f"silent wrong answers (found != expected, exit 0): {silent}")


if __name__ == "__main__":
    main()
