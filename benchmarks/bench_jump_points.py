"""Special points along a singular line after a rational linear change (decision 0126): found, undecided or missed.

Run:  python benchmarks/bench_jump_points.py [--checkout DIR] [--seeds 3]

Two surfaces double along a line with a special point at the origin: y^2 = x^3 + z x^2 (A1 across, A2 at the origin
where the Hessian's rank drops from 2 to 1) and the Whitney umbrella x^2 - y^2 z (pinch point A2; common practice,
no source). Each plain, shifted by (3, -7, 5), and after x = M u - (1, 1, 1), M = [[1, 2, 0], [0, 1, -1], [1, 0, 3]],
in units 1, 1e3 and 1e-3; sympy checks that f and grad f vanish at the moved origin and the Hessian's rank there is
1. Each run is ``numag singular FILE --anatomy --seed S``; a row says per seed "found" (the point listed, within
1e-6 relative), "undecided" (exit 3 and the point not listed) or "MISSED" (exit 0 without it: a silent wrong
answer), with the CPU seconds of the run. With ``--checkout DIR`` the same runs of that checkout side by side.
"""

import argparse
import os
import pathlib
import re
import resource
import subprocess
import sys
import tempfile

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
import sympy as sp

x, y, z = sp.symbols("x y z")
SURFACES = {"node to cusp": y**2 - x**3 - z * x**2, "umbrella": x**2 - y**2 * z}
M = sp.Matrix([[1, 2, 0], [0, 1, -1], [1, 0, 3]])
SHIFT = sp.Matrix([-1, -1, -1])


def frames():
    """(name, old coordinates in the new ones, the new point of the old origin)."""
    u = sp.Matrix([x, y, z])
    yield "plain", u, (0, 0, 0)
    yield "shift", u + sp.Matrix([3, -7, 5]), (-3, 7, -5)
    origin = M.inv() * (-SHIFT)
    for unit in (1, 1000, sp.Rational(1, 1000)):
        yield f"linear, units x{unit}", M * (u / unit) + SHIFT, tuple(unit * origin)


def run(root, path, seed):
    """(exit code, text, CPU seconds) of one CLI run with ``root``'s numag (run from there: ``-m`` puts the working
    folder first on the path)."""
    env = dict(os.environ, PYTHONPATH=str(root), OMP_NUM_THREADS="1")
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    done = subprocess.run([sys.executable, "-m", "numag.app.cli", "singular", path, "--anatomy", "--seed", str(seed)],
                          env=env, cwd=str(root), capture_output=True, text=True, timeout=600)
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return done.returncode, done.stdout, after.ru_utime + after.ru_stime - before.ru_utime - before.ru_stime


def verdict(code, text, point):
    """found, undecided or MISSED: the point listed among the special points (relative 1e-6)."""
    scale = 1 + max(abs(float(c)) for c in point)
    for line in re.findall(r"^ +at (x=.*):$", text, flags=re.M):
        values = dict(re.findall(r"(\w)=([^,]+)", line))
        try:
            at = [complex(values[v].replace("*I", "j").replace(" ", "")) for v in "xyz"]
        except (KeyError, ValueError):
            continue
        if max(abs(a - complex(p)) for a, p in zip(at, point)) < 1e-6 * scale:
            return "found"
    return "undecided" if code == 3 else ("MISSED" if code == 0 else f"exit {code}")


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--checkout", help="another checkout to run beside this one (before)")
    parser.add_argument("--seeds", type=int, default=3)
    args = parser.parse_args()
    roots = ([("before", pathlib.Path(args.checkout).resolve())] if args.checkout else []) + [("this", checkout.ROOT)]
    with tempfile.TemporaryDirectory() as folder:
        for name, f in SURFACES.items():
            for frame, old, point in frames():
                g = sp.expand(f.subs(dict(zip((x, y, z), old)), simultaneous=True))
                at = dict(zip((x, y, z), point))
                assert g.subs(at) == 0 and all(sp.diff(g, v).subs(at) == 0 for v in (x, y, z))
                assert sp.hessian(g, (x, y, z)).subs(at).rank() == 1
                path = pathlib.Path(folder) / "case.toml"
                path.write_text(f'variables = ["x", "y", "z"]\nequations = ["{str(g).replace("**", "^")}"]\n')
                for label, root in roots:
                    cells = []
                    for seed in range(1, args.seeds + 1):
                        code, text, cpu = run(root, str(path), seed)
                        cells.append(f"{verdict(code, text, point)} {cpu:.1f}s")
                    print(f"{name:13s} {frame:22s} {label:7s} " + " | ".join(cells), flush=True)


if __name__ == "__main__":
    main()
