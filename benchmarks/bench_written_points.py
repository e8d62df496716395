"""`numag check` at points whose digits as written decide the verdict (decision 0132), before and after.

Run:  python benchmarks/bench_written_points.py --checkout DIR [--seeds 1 2 3]

Each case is run in this checkout and in ``DIR`` (e.g. an export of the main branch before the decision), side by
side, through the command line (``--json --without-components``), in the user's units and with lengths times 1000
and 1/1000 (the decimals' point moved, the rationals multiplied: the same data in other units).
The expected verdict comes from sympy (F and the rank of J evaluated exactly at the exact point or at the decimal
as written; distances to the node from the parametrisation); sympy is the reference only.
A verdict other than the expected one is marked (!); "singular|undecided" accepts either (a 32-digit decimal of a
node: the data stand for the node).
"""

import argparse
import json
import pathlib
import subprocess
import sys
import tempfile
from decimal import Context, Decimal

import checkout
import sympy

X, Y = sympy.symbols("x y")
S2, S3 = sympy.sqrt(2), sympy.sqrt(3)
SYSTEMS = {
    "node": Y ** 2 - X ** 2 * (X + 1),
    "node11": (Y - 1) ** 2 - (X - 1) ** 2 * X,
    "sqnode": (Y - S3) ** 2 - (X - S2) ** 2 * (X - S2 + 1),
    "circle": X ** 2 + Y ** 2 - 1,
}
_T = 1 + sympy.Rational(1, 10 ** 20)
#: (label, system, coordinates as text, expected)
CASES = [
    ("node, t = 1 + 1e-20, rationals", "node", [str(_T ** 2 - 1), str(_T * (_T ** 2 - 1))], "smooth"),
    ("node at (0, 0)", "node", ["0", "0"], "singular"),
    ("node11, 30-digit decimals 2e-14 from it", "node11",
     ["1.0000000000000200000000000001", "1.000000000000020000000000000300000000000001"], "smooth"),
    ("node11, 34/50-digit decimals 2e-16 from it", "node11",
     ["1.000000000000000200000000000000010", "1.00000000000000020000000000000003000000000000000001"], "smooth"),
    ("node11, 31-digit decimal 1e-30 from it", "node11",
     ["1.000000000000000000000000000001", "0.999999999999999999999999999999"], "singular|undecided"),
    ("sqnode, sqrt expression 2e-20 from it", "sqnode",
     ["sqrt(2)+2/10^20+1/10^40", "sqrt(3)+(1+1/10^20)*(2/10^20+1/10^40)"], "smooth"),
    ("sqnode, 32-digit decimal of the node", "sqnode",
     ["1.4142135623730950488016887242097", "1.7320508075688772935274463415059"], "singular|undecided"),
    ("circle, 3/5 + 1/10^20, 4/5", "circle", ["3/5+1/10^20", "4/5"], "off"),
    ("circle, 0.6000000000000000000100000, 0.8", "circle", ["0.6000000000000000000100000", "0.8"], "off"),
    ("circle, 0.6, 0.8", "circle", ["0.6", "0.8"], "smooth"),
    ("circle, 3/5, 81/100", "circle", ["3/5", "81/100"], "off"),
]
UNITS = {"unit": 0, "x1000": 3, "x0.001": -3}


def in_units(text, places):
    """The coordinate times 10^places, written the same way (a decimal's point moved, anything else multiplied)."""
    if all(c.isdigit() or c == "." for c in text):
        return format(Decimal(text).scaleb(places, context=Context(prec=400)), "f")
    return f"({text})*10^{places}" if places >= 0 else f"({text})/10^{-places}"


def equation(name, places):
    f = sympy.Integer(10) ** places
    return str(sympy.expand(SYSTEMS[name].subs({X: X / f, Y: Y / f}, simultaneous=True) * f ** 3)).replace("**", "^")


def verdicts(checkout_dir, name, places, points, seed):
    with tempfile.TemporaryDirectory() as folder:
        path = pathlib.Path(folder) / "system.toml"
        path.write_text(f'variables = ["x", "y"]\nequations = ["{equation(name, places)}"]\n')
        arguments = []
        for point in points:
            arguments += ["--point", ",".join(f"{n}={in_units(v, places)}" for n, v in zip("xy", point))]
        run = subprocess.run([sys.executable, "-m", "numag", "check", str(path), *arguments, "--json",
                              "--without-components", "--seed", str(seed)], cwd=checkout_dir, capture_output=True,
                             text=True, timeout=1200)
        try:
            return [p["verdict"] for p in json.loads(run.stdout)["points"]]
        except (ValueError, KeyError):
            return ["error"] * len(points)


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--checkout", required=True, help="the checkout to compare with (before)")
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    args = parser.parse_args()
    got = {}
    for which, folder in (("before", args.checkout), ("after", str(checkout.ROOT))):
        for name in SYSTEMS:
            mine = [c for c in CASES if c[1] == name]
            for unit, places in UNITS.items():
                for seed in args.seeds:
                    for case, v in zip(mine, verdicts(folder, name, places, [c[2] for c in mine], seed)):
                        got.setdefault((which, case[0], unit), []).append(v)
    totals = {"before": [0, 0], "after": [0, 0]}
    for label, _, _, expected in CASES:
        for unit in UNITS:
            row = []
            for which in ("before", "after"):
                vs = got[(which, label, unit)]
                ok = [v in expected.split("|") for v in vs]
                totals[which][0] += sum(ok)
                totals[which][1] += len(ok) - sum(ok)
                row.append(" ".join(v if k else f"{v}(!)" for v, k in zip(vs, ok)))
            print(f"{label:44s} {unit:6s} expected {expected:18s} before: {row[0]:32s} after: {row[1]}", flush=True)
    for which, (right, wrong) in totals.items():
        print(f"{which}: right {right}, wrong or undecided {wrong}")


if __name__ == "__main__":
    main()
