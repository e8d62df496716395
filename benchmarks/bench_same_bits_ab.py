"""Singular loci of two checkouts side by side: CPU seconds, and a digest of every number of the answers.

Run:  python benchmarks/bench_same_bits_ab.py --before /path/to/other/checkout [--after .] [--repeats 3]
      [--cases quadrics4:1,quadrics4:2,quadrics4:3,quadrics3:1,quadrics3/1000:1,quadrics3*1000:1,
      quadrics3-changed:1,six-bar:1,T9/T11:1]

A change made to spend less time without changing a decision (decision 0138) is checked here by the strongest
test there is: both checkouts must give the same answer to the last bit. Each case (``name:seed``) runs in a
child process from each checkout's root (its own numag and its own ``benchmarks/``), the two alternating run
by run so that a shared machine's load falls on both alike, with one BLAS thread. A child times
``singular_locus`` in CPU seconds (start-up excluded) and prints a SHA-256 digest of the whole result: every
piece with its witness points and slices, the decomposition of X, the path counts, the discarded candidates and
the notes (timings left out), doubles by their bytes.

Cases (the same members as ``bench_scale.py``):

* quadrics4: the union of 4 random quadrics (``families.quadric_union(4, default_rng(15))``; 6 curves of degree
  4; ``bench_scale.py --sections families --sizes quadrics=4``);
* quadrics3: the union of 3 random quadrics (``bench_scale.py --sections singular``; 3 curves of degree 4);
  quadrics3/1000 and quadrics3*1000 the same written in y with x = 1000 y and x = y / 1000, quadrics3-changed
  after the rational linear
  change x = M y, M = [[1, 1, 0], [0, 1, 1], [1, 0, 2]];
* six-bar: ``bench_scale.six_bar()`` (4 singular points); T9/T11: T9(x) = T11(y) (40 nodes and one at infinity).

Printed per case: the median CPU seconds before and after, their ratio, the pieces, and whether every run of
both checkouts gave the same digest.
"""

import argparse
import os
import statistics
import sys

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
from checkout import ROOT

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from bench_judging_ab import run_child  # noqa: E402
from bench_start_ab import checkout_roots  # noqa: E402

_CHILD = r"""
import dataclasses, hashlib, json, sys, time
sys.path.insert(0, "benchmarks")
import checkout  # noqa: F401
import numpy as np
from bench_scale import chebyshev_curve, pieces_of, six_bar
from families import quadric_union
from numag.singular.locus import singular_locus

def feed(digest, value):
    if isinstance(value, np.ndarray):
        digest.update(str(value.dtype).encode() + str(value.shape).encode())
        digest.update(np.ascontiguousarray(value).tobytes())
    elif dataclasses.is_dataclass(value) and not isinstance(value, type):
        for field in dataclasses.fields(value):
            if field.name not in ("seconds", "elapsed"):
                digest.update(field.name.encode())
                feed(digest, getattr(value, field.name))
    elif isinstance(value, dict):
        for key in sorted(value, key=str):
            digest.update(str(key).encode())
            feed(digest, value[key])
    elif isinstance(value, (list, tuple)):
        digest.update(b"[")
        for item in value:
            feed(digest, item)
        digest.update(b"]")
    elif isinstance(value, (float, complex)):
        digest.update(np.complex128(value).tobytes())
    elif hasattr(value, "to_texts"):  # a system: its equations as written
        digest.update("\n".join(value.to_texts()).encode())
    else:
        digest.update(repr(value).encode())

def moved(system, matrix):  # x = matrix y: exact (integer matrix), the same names
    from numag.system.polynomial import PolynomialSystem
    return PolynomialSystem(list(system.variables), [p.substitute_linear(np.array(matrix)) for p in system.polynomials],
                            name=system.name)

def in_thousandths(system):  # x = y / 1000, written exactly
    import re
    from numag.system.parse import parse_system
    return parse_system([re.sub(r"\b(x|y|z)\b", r"(\1/1000)", text) for text in system.to_texts()],
                        list(system.variables), name=system.name)

name, seed = sys.argv[1].rsplit(":", 1)
system = {"quadrics4": lambda: quadric_union(4, np.random.default_rng(15)),
          "quadrics3": lambda: quadric_union(3, np.random.default_rng(11)),
          "quadrics3/1000": lambda: moved(quadric_union(3, np.random.default_rng(11)), 1000 * np.eye(3, dtype=int)),
          "quadrics3*1000": lambda: in_thousandths(quadric_union(3, np.random.default_rng(11))),
          "quadrics3-changed": lambda: moved(quadric_union(3, np.random.default_rng(11)),
                                             [[1, 1, 0], [0, 1, 1], [1, 0, 2]]),
          "six-bar": six_bar, "T9/T11": lambda: chebyshev_curve(9, 11)}[name]()
start = time.process_time()
found = singular_locus(system, seed=int(seed))
cpu = time.process_time() - start
digest = hashlib.sha256()
feed(digest, found)
print(json.dumps({"cpu": cpu, "digest": digest.hexdigest()[:16], "pieces": pieces_of(found)}))
"""


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--before", required=True, help="the other checkout (e.g. the main branch's worktree)")
    parser.add_argument("--after", default=str(ROOT), help="this checkout (default)")
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--cases", default="quadrics4:1,quadrics4:2,quadrics4:3,quadrics3:1,quadrics3/1000:1,"
                        "quadrics3*1000:1,quadrics3-changed:1,six-bar:1,T9/T11:1")
    args = parser.parse_args()
    roots = checkout_roots(args.before, args.after)
    print(f"load average {os.getloadavg()[0]:.1f}; median of {args.repeats} runs; CPU seconds (start-up excluded)")
    for label, root in roots.items():
        print(f"  {label}: {root}")
    print(f"{'case':14} {'before cpu':>10} {'after cpu':>10} {'after/before':>13}  {'same bits':9}  pieces")
    for case in args.cases.split(","):
        records = {label: [] for label in roots}
        for _ in range(args.repeats):
            for label, root in roots.items():
                records[label].append(run_child(root, _CHILD, case))
        median = {label: statistics.median(r["cpu"] for r in runs) for label, runs in records.items()}
        digests = {r["digest"] for runs in records.values() for r in runs}
        print(f"{case:14} {median['before']:10.2f} {median['after']:10.2f} {median['after'] / median['before']:13.2f}  "
              f"{'yes' if len(digests) == 1 else 'NO':9}  {records['after'][0]['pieces']}", flush=True)
        if len(digests) != 1:
            for label in roots:
                print(f"    {label}: {[r['digest'] for r in records[label]]}")


if __name__ == "__main__":
    main()
