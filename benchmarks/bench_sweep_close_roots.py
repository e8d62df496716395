"""Two close simple roots in a batched sweep (decision 0134): x^3 - 3x + p at p = 1.9999999999 beside another value,
in units 1, 1000 and 1/1000 and after x -> (2x + 1)/3, seeds 1-3, against mpmath's roots.

Run:  python benchmarks/bench_sweep_close_roots.py [--checkout DIR] [--seeds 1 2 3]

Each case runs `numag sweep --json` in the checkout measured (this one, and ``--checkout``, e.g. the main branch
before the decision, side by side). A case is right when the member at p = 1.9999999999 has exactly mpmath's three
simple roots (to 1e-9 relative), no rank drop and nothing undecided; printed per checkout: right, silent wrong
(exit 0) and flagged (exit 3) counts, and CPU seconds of the runs.
"""

import argparse
import json
import os
import pathlib
import resource
import subprocess
import sys
import tempfile

import mpmath
import numpy as np
import sympy

import checkout

X, P = sympy.symbols("x p")
CUBIC = X ** 3 - 3 * X + P
NEAR_FOLD = "1.9999999999"
FORMS = {"plain": (CUBIC, lambda r: r), "x1000": (sympy.expand(CUBIC.subs(X, X / 1000) * 10 ** 9), lambda r: r * 1000),
         "x1e-3": (sympy.expand(CUBIC.subs(X, X * 1000) / 10 ** 9), lambda r: r / 1000),
         "linear": (sympy.expand(CUBIC.subs(X, (2 * X + 1) / 3) * 27), lambda r: (3 * r - 1) / 2)}
OTHERS = ["-2", "-3", "0.5"]


def roots():
    with mpmath.workdps(40):
        found = mpmath.polyroots([1, 0, -3, mpmath.mpf(float(NEAR_FOLD))], maxsteps=200, extraprec=200)
    return sorted(float(mpmath.re(r)) for r in found)


def run_case(directory, form, other, seed, work):
    expression, _ = FORMS[form]
    path = pathlib.Path(work) / f"{form}.toml"
    path.write_text(f'variables = ["x"]\nparameters = ["p"]\nequations = ["{str(expression).replace("**", "^")}"]\n')
    values = pathlib.Path(work) / "values.csv"
    values.write_text(f"p\n{NEAR_FOLD}\n{other}\n")
    env = dict(os.environ, PYTHONPATH=str(directory), OMP_NUM_THREADS="1")
    done = subprocess.run([sys.executable, "-m", "numag", "sweep", str(path), "--values", str(values), "--json",
                           "--seed", str(seed)], cwd=directory, capture_output=True, text=True, env=env)
    return done.returncode, json.loads(done.stdout) if done.stdout.strip() else None


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--checkout", help="another checkout measured beside this one")
    parser.add_argument("--seeds", type=int, nargs="+", default=[1, 2, 3])
    args = parser.parse_args()
    want = roots()
    for directory in [checkout.ROOT] + ([pathlib.Path(args.checkout).resolve()] if args.checkout else []):
        right = wrong = flagged = 0
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        with tempfile.TemporaryDirectory() as work:
            for form, (_, to_form) in FORMS.items():
                for other in OTHERS:
                    for seed in args.seeds:
                        code, data = run_case(directory, form, other, seed, work)
                        member = data["values"][0] if data else None
                        got = sorted(complex(*z[0]).real for z in member["points"]) if member else []
                        good = (code == 0 and len(got) == 3 and member["undecided"] == 0
                                and all(k == "regular" for k in member["kinds"])
                                and np.allclose(got, sorted(to_form(r) for r in want), rtol=1e-9, atol=0))
                        right += good
                        wrong += (not good) and code == 0
                        flagged += code == 3
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpu = after.ru_utime + after.ru_stime - before.ru_utime - before.ru_stime
        print(f"{directory}: {right} right, {wrong} silent wrong (exit 0), {flagged} flagged (exit 3) of "
              f"{len(FORMS) * len(OTHERS) * len(args.seeds)}; {cpu:.1f} CPU s")


if __name__ == "__main__":
    main()
