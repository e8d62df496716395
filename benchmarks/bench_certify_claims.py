"""Certificates against the truth at the point they name (decision 0133): this checkout beside another.

Four cases, each in units 1, 1000 and 1/1000 and at seeds 1-3, the truth by sympy (exact F and rank of J at
the exact point):

* ``umbrella exact``: ``check --certify`` at an exact point of the singular line of
  (x + y/2 - 3)^2 - (y - 2z + 1/5)^2 (x - y + z - 7/3): singular (rank 0).
* ``umbrella doubles``: ``certify_rank`` at the doubles of that point: a certificate of rank 1 is false.
* ``edited node``: a ``check`` report of an exact smooth point of y^2 = x^2 (x + 1) 8e-7 from the node, its
  verdict edited to "singular", through ``numag certify``: a "certified" without a failed claim is false.
* ``node 1e-20``: ``check --certify`` at the exact point t = 1 + 10^-20 of that node curve (smooth, F = 0):
  exit 0 with a certified singular verdict is false.

Outcome per run: ``right`` (a true claim certified, exit 0), ``exit 3`` (undecided, or a claim flagged as
failed; no false certificate), ``FALSE`` (a false claim certified, exit 0).

Usage: ``python benchmarks/bench_certify_claims.py [--quick] [--checkout DIR]``.
"""

import argparse
from fractions import Fraction
import json
import os
import pathlib
import subprocess
import sys
import tempfile

import checkout  # noqa: F401  (this checkout first on the path)
import sympy

UMBRELLA = "(x+y/2-3)^2 - (y-2*z+1/5)^2*(x-y+z-7/3)"
NODE = "y^2 - x^2*(x+1)"


def scaled(equation, variables, unit):
    return "".join(f"({ch}/({unit}))" if ch in variables else ch for ch in equation)


def exact_rank(equation, variables, point):
    symbols = sympy.symbols(variables)
    f = sympy.Matrix([sympy.sympify(equation.replace("^", "**"))])
    at = dict(zip(symbols, [sympy.Rational(str(c)) for c in point]))
    return sympy.simplify(f.subs(at)[0]), f.jacobian(symbols).subs(at).rank()


def numag(root, argv, folder):
    env = dict(os.environ, PYTHONPATH=str(root), OMP_NUM_THREADS="1")
    done = subprocess.run([sys.executable, "-m", "numag"] + argv, capture_output=True, text=True, env=env,
                          cwd=folder)
    return done.returncode, done.stdout


def system_file(folder, name, equation, variables):
    path = pathlib.Path(folder) / f"{name}.toml"
    path.write_text(f"variables = {json.dumps(variables)}\nequations = [{json.dumps(equation)}]\n")
    return str(path)


def assignment(variables, point):
    return ",".join(f"{v}={c}" for v, c in zip(variables, point))


def outcome(false_certified, code):
    return "FALSE" if false_certified and code == 0 else ("exit 3" if code == 3 else "right")


def case_umbrella_exact(root, folder, unit, seed):
    variables = ["x", "y", "z"]
    equation = scaled(UMBRELLA, variables, unit)
    point = [Fraction(37, 60) * unit, Fraction(143, 30) * unit, Fraction(149, 60) * unit]
    value, rank = exact_rank(equation, variables, point)
    assert value == 0 and rank == 0
    code, out = numag(root, ["check", system_file(folder, "umb", equation, variables), "--point",
                             assignment(variables, point), "--certify", "--json", "--seed", str(seed)], folder)
    certificate = json.loads(out)["points"][0]["certificate"]
    if certificate["status"] == "certified" and code == 0:
        return "right"
    return outcome(False, code)


def case_umbrella_doubles(root, folder, unit, seed):
    variables = ["x", "y", "z"]
    equation = scaled(UMBRELLA, variables, unit)
    point = [Fraction(37, 60) * unit, Fraction(143, 30) * unit, Fraction(149, 60) * unit]
    script = ("import json, sys\nfrom numag import certify_rank, CertifyOptions\n"
              "from numag.system.parse import parse_system\n"
              f"s = parse_system([{equation!r}], {variables!r})\n"
              f"c = certify_rank(s, {[float(c) for c in point]!r}, CertifyOptions(digits=30, seed={seed}))\n"
              "print(json.dumps([c.status, c.rank_lower, c.rank_upper]))\n")
    env = dict(os.environ, PYTHONPATH=str(root), OMP_NUM_THREADS="1")
    status, low, high = json.loads(subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                                                  env=env, cwd=folder, check=True).stdout)
    # sympy: rank 0 at the rational point, which the doubles' rounding covers
    if status == "certified":
        return "right" if low == high == 0 else "FALSE"
    return "exit 3"


def check_on_node(root, folder, unit, seed, t, extra):
    """``check`` at the exact point x = t^2 - 1, y = t (t^2 - 1) of the node curve (smooth for t != +-1)."""
    variables = ["x", "y"]
    equation = scaled(NODE, variables, unit)
    point = [(t * t - 1) * unit, t * (t * t - 1) * unit]
    value, rank = exact_rank(equation, variables, point)
    assert value == 0 and rank == 1  # smooth
    return numag(root, ["check", system_file(folder, "node", equation, variables), "--point",
                        assignment(variables, point), "--json", "--seed", str(seed)] + extra, folder)


def case_edited_node(root, folder, unit, seed):
    code, out = check_on_node(root, folder, unit, seed, 1 + Fraction(4, 10 ** 7), [])
    report = json.loads(out)
    report["points"][0]["verdict"] = "singular"
    edited = pathlib.Path(folder) / "edited.json"
    edited.write_text(json.dumps(report))
    code, out = numag(root, ["certify", str(edited), "-o", str(pathlib.Path(folder) / "edited-out.json"),
                             "--json"], folder)
    data = json.loads(out)
    certified = data["points"][0]["certificate"]["status"] == "certified"
    return outcome(certified and data["certification"]["claims_failed"] == 0, code)


def case_node_tiny(root, folder, unit, seed):
    code, out = check_on_node(root, folder, unit, seed, 1 + Fraction(1, 10 ** 20), ["--certify"])
    entry = json.loads(out)["points"][0]
    false = entry["verdict"] == "singular" and entry["certificate"]["status"] == "certified"
    return outcome(false, code)


CASES = {"umbrella exact": case_umbrella_exact, "umbrella doubles": case_umbrella_doubles,
         "edited node": case_edited_node, "node 1e-20": case_node_tiny}


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="unit 1 and seed 1 only")
    parser.add_argument("--checkout", metavar="DIR", help="another checkout measured beside this one")
    args = parser.parse_args()
    roots = {"this": checkout.ROOT}
    if args.checkout:
        roots["other"] = pathlib.Path(args.checkout).resolve()
    units = [Fraction(1)] if args.quick else [Fraction(1), Fraction(1000), Fraction(1, 1000)]
    seeds = [1] if args.quick else [1, 2, 3]
    print(f"{'case':18} " + " ".join(f"{name:>32}" for name in roots))
    for name, case in CASES.items():
        cells = []
        for root in roots.values():
            tally = {"right": 0, "exit 3": 0, "FALSE": 0}
            with tempfile.TemporaryDirectory() as folder:
                for unit in units:
                    for seed in seeds:
                        tally[case(root, folder, unit, seed)] += 1
            cells.append(" ".join(f"{k} {v}" for k, v in tally.items()))
        print(f"{name:18} " + " ".join(f"{c:>32}" for c in cells), flush=True)


if __name__ == "__main__":
    main()
