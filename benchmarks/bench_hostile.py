"""The standing hostile-input suite, full run: a table per category of what bad input gets.

Run:  python benchmarks/bench_hostile.py [--quick] [--seed S] [--out benchmarks/results/hostile.txt]

Every input is something a careless or hostile user could give: equations in the grammar and beside
it, system files, points files, options, reports, run folders, and kills of running commands. For
each category the table counts

* tried: inputs run;
* refused: clear refusals (exit code 2, or the API's InputError, with one line naming the problem);
* answered: a result (exit code 0 or 3), checked where the right answer is known;
* internal: internal errors (exit code 1, a traceback, any other exception, a refusal of more than
  one line, debris or workers left behind);
* hangs: over the time allowed (60 s for a command, 10 s for one equation);
* wrong: an answer that is not the right one (a parsed equation that differs from sympy's expansion
  of the same expression, a resumed run whose solutions differ from a clean run's, a certificate for a
  point that is not a solution, a report left half-written by a kill).

The goal is 0 internal errors, 0 hangs and 0 wrong answers. sympy serves as the exact reference for
the grammar (it never reads our text: the same random expression is built as a sympy object).
"""

import argparse
import hashlib
import io
import json
import os
import pathlib
import random
import shutil
import signal
import subprocess
import sys
import tempfile
import time

import checkout  # noqa: F401  (this checkout's numag, not an installed one)
import numpy as np

import numag
from numag.run.checkpoint import RunFolder
from numag.app.cli import main
from numag.errors import InputError
from numag.system.parse import parse_polynomial

ROOT = pathlib.Path(numag.__file__).resolve().parent.parent
EXAMPLES = ROOT / "numag" / "examples"


class Hang(BaseException):
    """Raised by the alarm: an input ran over its time."""


def _alarm(signum, frame):
    raise Hang()


class Tally:
    """Counts of one category."""

    def __init__(self, name):
        self.name = name
        self.counts = dict(tried=0, refused=0, answered=0, internal=0, hangs=0, wrong=0)
        self.examples = []
        self.current = None  # what is being tried, for the examples

    def add(self, outcome, example=None):
        self.counts["tried"] += 1
        self.counts[outcome] += 1
        if outcome in ("internal", "hangs", "wrong") and example is not None and len(self.examples) < 8:
            where = f"[{self.current}] " if self.current else ""
            self.examples.append(f"{outcome}: {where}{' '.join(str(example)[:240].split())}")


def timed(seconds, function, *args):
    """Run ``function(*args)`` under an alarm; Hang when it takes longer."""
    signal.signal(signal.SIGALRM, _alarm)
    signal.alarm(seconds)
    try:
        return function(*args)
    finally:
        signal.alarm(0)


def run_cli(argv, seconds=60):
    """(exit code, stdout, stderr) of the command line run in this process, or 'hang'."""
    out, err = io.StringIO(), io.StringIO()
    saved = sys.stderr
    sys.stderr = err
    try:
        code = timed(seconds, main, argv, out)
    except Hang:
        return "hang", out.getvalue(), err.getvalue()
    except BaseException as caught:  # noqa: BLE001 - anything escaping main is an internal error here
        return 1, out.getvalue(), f"{type(caught).__name__}: {caught}"
    finally:
        sys.stderr = saved
    return code, out.getvalue(), err.getvalue()


def judge_cli(tally, argv, check=None, seconds=60):
    """Run a command line and count its outcome; ``check(code, out)`` returns False for a wrong answer."""
    code, out, err = run_cli(argv, seconds)
    if code == "hang":
        tally.add("hangs", argv)
    elif code == 2:
        clear = err.startswith("numag: error:") and err.count("\n") == 1 and "Traceback" not in err
        tally.add("refused" if clear else "internal", f"{argv}: {err}")
    elif code in (0, 3):
        stray = [line for line in err.splitlines() if line.strip() and not line.startswith("numag:")]
        if stray:  # warnings or tracebacks beside an answer: not a clear answer
            tally.add("internal", f"{argv}: {stray[0]}")
        else:
            tally.add("answered" if check is None or check(code, out) else "wrong", f"{argv}: {out[:200]}")
    else:
        tally.add("internal", f"{argv}: {code} {err}")
    return code, out


# --- the grammar (API) ----------------------------------------------------------------------------

_TOKENS = ["x", "y", "z", "I", "sqrt", "(", ")", "+", "-", "*", "/", "^", "**", "=", "0", "1", "2", "7",
           "1.5e3", "3/4", ".5", "1e400", "1e-400", " ", "2x", ".", "e", "$", "\u00e9", "\n", "((", "))",
           "99999999999999999999", "sqrt(2)", "sqrt(-1)", "x^1001", "1/0", "x^(2)", "^^", "=="]


def _random_tree(rng, depth):
    """A random expression as (text, sympy expression) built side by side."""
    import sympy
    x, y = sympy.symbols("x y")
    if depth == 0 or rng.random() < 0.3:
        choice = rng.randrange(6)
        if choice == 0:
            return "x", x
        if choice == 1:
            return "y", y
        if choice == 2:
            value = rng.randrange(0, 50)
            return str(value), sympy.Integer(value)
        if choice == 3:
            p, q = rng.randrange(-9, 10), rng.randrange(1, 9)
            return f"({p}/{q})", sympy.Rational(p, q)
        if choice == 4:
            r = rng.choice([2, 3, 5, 8, 12])
            return f"sqrt({r})", sympy.sqrt(r)
        return "I", sympy.I
    a_text, a = _random_tree(rng, depth - 1)
    kind = rng.randrange(5)
    if kind == 4:
        k = rng.randrange(0, 4)
        return f"({a_text})^{k}", a ** k
    b_text, b = _random_tree(rng, depth - 1)
    if kind == 0:
        return f"({a_text} + {b_text})", a + b
    if kind == 1:
        return f"({a_text} - {b_text})", a - b
    if kind == 2:
        return f"{a_text}*{b_text}", a * b
    value = rng.choice([2, 3, 7])
    return f"({a_text})/{value}", a / value


def grammar(tally, rng, count):
    """Token soup, mutated valid equations and hostile shapes through parse_polynomial."""
    import sympy
    x, y = sympy.symbols("x y")
    hostile = ["(" * n + "x" + ")" * n for n in (50, 100, 101, 196, 1000, 100000)]
    hostile += ["-" * n + "x" for n in (979, 10000, 1000000)] + ["sqrt(" * 200 + "2" + ")" * 200]
    hostile += ["x/(" + " + ".join(f"sqrt({p})" for p in (2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43)) + ")",
                "*".join(f"(1 + sqrt({p}))" for p in (2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53,
                                                       59, 61, 67, 71)) + "*x",
                "3^1000*x - 1", "1e400*x^2 - 1e400", "1" * 1000 + "*x", "1" * 1001 + "*x", "x^1000000000",
                "(x + y + 1)^1000", "(x+y)^500*(x-y)^500", "1e1000000*x", "x" * 100000, "x+" * 200000 + "x"]
    for text in hostile:
        _parse_once(tally, text, None, None)
    for _ in range(count):
        roll = rng.random()
        if roll < 0.55:
            text = "".join(rng.choice(_TOKENS) for _ in range(rng.randrange(1, 40)))
            _parse_once(tally, text, None, None)
        elif roll < 0.75:
            text, _ = _random_tree(rng, 3)
            position = rng.randrange(len(text) + 1)
            text = text[:position] + rng.choice(_TOKENS) + text[position + rng.randrange(0, 3):]
            _parse_once(tally, text, None, None)
        else:
            text, expression = _random_tree(rng, rng.randrange(1, 5))
            _parse_once(tally, text, sympy.Poly(sympy.expand(expression), x, y), (x, y))


def _parse_once(tally, text, expected, symbols):
    try:
        polynomial = timed(10, parse_polynomial, text, ["x", "y"])
    except Hang:
        tally.add("hangs", text)
        return
    except InputError:
        tally.add("refused")
        return
    except Exception as err:  # noqa: BLE001
        tally.add("internal", f"{text[:80]}: {type(err).__name__}: {err}")
        return
    try:
        again = timed(30, parse_polynomial, polynomial.to_text(["x", "y"]), ["x", "y"])
    except (Hang, Exception) as err:  # noqa: BLE001 - what numag writes must read back
        again = err
    if again != polynomial:
        tally.add("wrong", f"{text[:80]}: does not read back ({type(again).__name__})")
        return
    if expected is not None and not _agrees(polynomial, expected, symbols):
        tally.add("wrong", f"{text}: differs from sympy")
        return
    tally.add("answered")


def _agrees(polynomial, expected, symbols):
    import sympy
    terms = {}
    for exponents, coefficient in zip(polynomial.exponents, polynomial.coefficients):
        terms[tuple(int(e) for e in exponents)] = sum(
            (sympy.Rational(re.numerator, re.denominator) + sympy.I * sympy.Rational(im.numerator, im.denominator))
            * sympy.sqrt(radicand) for radicand, (re, im) in coefficient.parts.items())
    reference = {monomial: value for monomial, value in expected.terms() if value != 0}
    if set(terms) != set(reference):
        return False
    return all(sympy.simplify(terms[m] - reference[m]) == 0 for m in terms)


# --- the command line --------------------------------------------------------------------------------

def _system(folder, name, variables, equations, extra=""):
    path = folder / f"{name}.toml"
    path.write_text(f"variables = {json.dumps(variables)}\nequations = {json.dumps(equations)}\n{extra}")
    return str(path)


def _solutions(out):
    return sorted(round(s["point"][0][0], 6) for s in json.loads(out)["solutions"])


def command_line(tally, folder, rng, quick):
    """Bad files, bad options, hostile systems, on every sub-command."""
    circle = _system(folder, "circle", ["x", "y"], ["x^2 + y^2 - 1", "x - y"])
    plane = _system(folder, "plane", ["x", "y"], ["x^2 + y^2 - 1"])
    bad_files = {"missing": str(folder / "missing.toml"), "folder": str(folder), "zero": "/dev/zero",
                 "random": "/dev/urandom", "null": "/dev/null"}
    texts = {"empty": "", "binary": "\x00\x01\x02", "not toml": "variables = [", "no equations": 'variables = ["x"]',
             "unknown key": 'variables = ["x"]\nequations = ["x"]\nfoo = 1', "deep": "a = " + "[" * 2000 + "]" * 2000,
             "wrong types": "variables = 1\nequations = 2", "reserved": 'variables = ["I"]\nequations = ["I"]',
             "twice": 'variables = ["x", "x"]\nequations = ["x"]', "not homogeneous":
             'variables = ["x", "y"]\nequations = ["x - 1"]\nprojective = true',
             "angles": 'variables = ["x"]\nequations = ["x"]\nangles = { a = ["x", "q"] }',
             "groups": 'variables = ["x", "y"]\nequations = ["x*y", "x"]\ngroups = [["x"], ["x", "y"], 3]',
             "latin1": "variables = [\"\xe9\"]", "huge": "# " + "x" * (51 * 1024 * 1024)}
    for name, text in texts.items():
        path = folder / f"text-{name.replace(' ', '-')}.toml"
        path.write_bytes(text.encode("latin-1") if name == "latin1" else text.encode())
        bad_files[name] = str(path)
    link = folder / "link.toml"
    link.symlink_to("/dev/zero")
    bad_files["link to a device"] = str(link)
    for command in ("solve", "singular", "decompose", "compare"):
        for path in bad_files.values():
            judge_cli(tally, [command, path])
    for path in bad_files.values():
        judge_cli(tally, ["check", path, "--point", "x=0"])
        judge_cli(tally, ["check", plane, "--points-file", path])
        judge_cli(tally, ["certify", path])
    equations = {
        "nested": ["(" * 200 + "x" + ")" * 200], "signs": ["-" * 979 + "x"], "power of 3": ["3^1000*x - 1"],
        "huge decimal": ["1e400*x^2 - 1e400"], "huge literal": ["1" * 1000 + "*x - 1"], "near overflow":
        ["1e308*x^2 - 1"], "tiny": ["1e-400*x^2 - 1"], "spread": ["1e150*x^2 - 1e-150"], "zero": ["0"],
        "cancels": ["x - x"], "constant": ["3"], "sqrt bomb": ["x/(" + " + ".join(
            f"sqrt({p})" for p in (2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43)) + ") - 1"],
        "linear": ["x - 1"], "degree limit": ["x^1001"], "division by zero": ["x/0"], "text": ["hello"],
    }
    for name, eqs in equations.items():
        path = _system(folder, f"eq-{name.replace(' ', '-')}", ["x"], eqs)
        for command in ("solve", "singular", "decompose"):
            judge_cli(tally, [command, path, "--json", "--seed", "1"])
        judge_cli(tally, ["check", path, "--point", "x=1", "--json", "--seed", "1"])
    # answers that exact arithmetic keeps, checked
    judge_cli(tally, ["solve", _system(folder, "keep", ["x"], ["1e400*x^2 - 1e400"]), "--json", "--seed", "2"],
              lambda code, out: _solutions(out) == [-1.0, 1.0])
    judge_cli(tally, ["solve", _system(folder, "dropped", ["x"], ["x - x", "x^2 - 4"]), "--json", "--seed", "2"],
              lambda code, out: _solutions(out) == [-2.0, 2.0])
    for eqs, variables in ((["x - 1"], ["x"]), (["x - 1", "y + x"], ["x", "y"]), (["x + y + z - 1"], ["x", "y", "z"]),
                           (["x - 1", "x - 2"], ["x", "y"])):
        judge_cli(tally, ["singular", _system(folder, "linear", variables, eqs), "--json", "--seed", "3"],
                  lambda code, out: json.loads(out)["components"] == [])
    options = [["--seed", "-1"], ["--seed", "x"], ["--seed", "1e3"], ["--seed", str(2 ** 70)], ["--workers", "0"],
               ["--workers", "-3"], ["--workers", "100000"], ["--scheduler", "file:///etc/passwd"],
               ["--scheduler", "http://example"], ["--scheduler", "tcp://"], ["--digits", "3"],
               ["--digits", "100000"], ["--max-paths", "0"], ["--max-paths", "-5"], ["--max-memory", "nan"],
               ["--max-memory", "-1"], ["--batch-size", "0"], ["--batch-size", "nan"], ["--frobnicate"]]
    for option in options:
        judge_cli(tally, ["solve", circle] + option)
        judge_cli(tally, ["singular", plane] + option)
    for option in (["--tolerance", "inf"], ["--tolerance", "nan"], ["--tolerance", "-1"], ["--time-limit", "0"],
                   ["--time-limit", "inf"], ["--time-limit", "nan"]):
        judge_cli(tally, ["compare", plane] + option)
    for option in (["--point-tolerance", "inf"], ["--point-tolerance", "0"], ["--local-dimension", "-1"],
                   ["--local-dimension", "99"], ["--point", "x=1e1000,y=0"], ["--point", "x=nan,y=0"],
                   ["--point", "x=1,y=1,z=2"], ["--point", "x=1"], ["--point", ""], ["--point", "x=(" * 300]):
        judge_cli(tally, ["check", plane, "--point", "x=1,y=0"] + option)
    points = {"deep": "[" * 100000 + "]" * 100000, "dup": '[{"x": 1, "x": 2, "y": 0}]', "nan": "[[NaN, 0]]",
              "huge": "[[1e400, 0]]", "wrong": '[{"x": true, "y": null}]', "object": '{"no": 1}',
              "pairs": "[[[1, 2, 3], 0]]", "string": '"x"', "long string": json.dumps([["9" * 5000, "0"]])}
    for name, text in points.items():
        path = folder / f"points-{name.replace(' ', '-')}.json"
        path.write_text(text)
        judge_cli(tally, ["check", plane, "--points-file", str(path)])
    quadrics = _system(folder, "quadrics50", [f"x{i}" for i in range(50)], [f"x{i}^2 - 1" for i in range(50)])
    point = ",".join(f"x{i}=1" for i in range(50))
    for argv in (["solve", quadrics], ["decompose", quadrics], ["singular", quadrics], ["check", quadrics, "--point",
                                                                                        point]):
        judge_cli(tally, argv)
    # families (issue 22): bad --at, --grid, --values, ranges; discriminant and sweep of files without parameters
    family = _system(folder, "family", ["x"], ["x^2 - b"], 'parameters = ["b"]\n[ranges]\nb = [0, 1]\n')
    for at in ("", "b", "b=", "c=1", "b=1,b=2", "b=1e1000", "b=nan", "b=(" * 300, "b=x"):
        judge_cli(tally, ["solve", family, "--at", at])
    judge_cli(tally, ["solve", family])
    judge_cli(tally, ["solve", circle, "--at", "b=1"])
    for grid in ("", "b", "b=0:1", "b=0:1:0", "b=0:1:10000000", "b=0:inf:3", "c=0:1:3", "b=0:1:2;b=0:1:2", "b=a:b:c"):
        judge_cli(tally, ["sweep", family, "--grid", grid])
    for name, text in {"empty": "", "header": "c\n1\n", "nan": "b\nnan\n", "ragged": "b\n1,2\n",
                       "words": "b\nhello\n", "only header": "b\n"}.items():
        path = folder / f"values-{name.replace(' ', '-')}.csv"
        path.write_text(text)
        judge_cli(tally, ["sweep", family, "--values", str(path)])
    for ranges in ("b = [1, 0]", "b = [0]", "c = [0, 1]", "b = ['a', 1]", "b = [0, 1e400]", "b = 3"):
        bad = _system(folder, "bad-ranges", ["x"], ["x^2 - b"], f'parameters = ["b"]\n[ranges]\n{ranges}\n')
        judge_cli(tally, ["discriminant", bad])
    for command in ("discriminant", "sweep"):
        judge_cli(tally, [command, circle] + (["--grid", "b=0:1:2"] if command == "sweep" else []))
    if not quick:
        linear = _system(folder, "linear1000", [f"x{i}" for i in range(1000)], [f"x{i} - {i}" for i in range(1000)])
        judge_cli(tally, ["solve", linear])


# --- run folders -----------------------------------------------------------------------------------

def _forge(folder, index, change):
    run = RunFolder.open(folder)
    arrays = run.read_batch(index)
    change(arrays)
    run.write_batch(index, arrays)


def run_folders(tally, folder, rng, quick):
    """Tampered run folders: resume must refuse, or give exactly the clean run's answer."""
    system = _system(folder, "cubics", ["x", "y", "z"], ["x^3 + y^3 + z^3 - 3", "x*y*z - 1 + x^2",
                                                          "x^2 - y^2 + z^3 - 2"])
    other = _system(folder, "other", ["x", "y", "z"], ["x^3 - 2", "y^3 - x", "z^3 - y - 1"])
    base = ["--batch-size", "4", "--seed", "5", "--json"]
    references = {}
    for name, path in (("cubics", system), ("other", other)):
        references[name] = json.loads(run_cli(["solve", path] + base)[1])
    other_run = folder / "other-run"
    run_cli(["solve", other, "--run-folder", str(other_run)] + base)

    def answer_is_clean(code, out):
        # right: exactly what a clean run of the system the report names gives (a folder that is wholly
        # another run's is that run); failed paths must be said (exit 3), never hidden
        data = json.loads(out)
        reference = references.get(data["system"]["name"])
        if reference is None:
            return False
        if data["paths"]["failed"]:
            return code == 3
        first = lambda report: sorted(np.array(s["point"]).ravel()[0] for s in report["solutions"])
        return data["path_status"] == reference["path_status"] and len(data["solutions"]) == len(
            reference["solutions"]) and np.allclose(first(data), first(reference), atol=1e-8)

    def fresh():
        path = folder / f"run-{rng.randrange(10**9)}"
        run_cli(["solve", system, "--run-folder", str(path)] + base)
        return path

    def manifest_edit(key, value):
        def change(path):
            data = json.loads((path / "manifest.json").read_text())
            target = data
            for part in key[:-1]:
                target = target[part]
            target[key[-1]] = value
            (path / "manifest.json").write_text(json.dumps(data))
        return change

    def batch(index, edit):
        return lambda path: _forge(path, index, edit)

    def endpoints_random(arrays):
        arrays["endpoints"] = np.asarray(rng.random(), dtype=float) + np.random.default_rng(1).standard_normal(
            arrays["endpoints"].shape) * 1j
        arrays["status"][:] = 1

    def raw(index, transform):
        def change(path):
            target = path / f"batch-{index:06d}.npz"
            target.write_bytes(transform(target.read_bytes()))
        return change

    tamperings = {
        "manifest of another run": lambda path: shutil.copy(other_run / "manifest.json", path / "manifest.json"),
        "manifest and batches of another run": lambda path: [shutil.copy(p, path / p.name)
                                                             for p in other_run.iterdir()],
        "seed changed": manifest_edit(["seed"], 6), "system changed": manifest_edit(["system", "equations", 0], "x^3 - 3"),
        "options changed": manifest_edit(["options", "batch_size"], 5), "paths changed": manifest_edit(["paths"], 9),
        "kind changed": manifest_edit(["kind"], "other"), "fingerprints removed": manifest_edit(["fingerprints"], {}),
        "checksums removed": manifest_edit(["batch_files"], []),
        "truncated manifest": lambda path: (path / "manifest.json").write_text((path / "manifest.json").read_text()[:50]),
        "empty manifest": lambda path: (path / "manifest.json").write_text(""),
        "manifest is a list": lambda path: (path / "manifest.json").write_text("[1, 2]"),
        "deep manifest": lambda path: (path / "manifest.json").write_text("[" * 100000 + "]" * 100000),
        "duplicate keys": lambda path: (path / "manifest.json").write_text('{"kind": "solve", "kind": "solve"}'),
        "manifest to /dev/zero": lambda path: ((path / "manifest.json").unlink(),
                                                (path / "manifest.json").symlink_to("/dev/zero")),
        "manifest removed": lambda path: (path / "manifest.json").unlink(),
        "random endpoints": batch(0, endpoints_random),
        "statuses at infinity": batch(1, lambda a: a["status"].__setitem__(slice(None), 3)),
        "statuses failed": batch(2, lambda a: a["status"].__setitem__(slice(None), 4)),
        "statuses unknown": batch(2, lambda a: a["status"].__setitem__(slice(None), 99)),
        "indices shifted": batch(3, lambda a: a.__setitem__("indices", a["indices"] + 1)),
        "endpoints scaled": batch(4, lambda a: a.__setitem__("endpoints", a["endpoints"] * 1.001)),
        "endpoints NaN": batch(0, lambda a: a["endpoints"].__setitem__((0, 0), np.nan)),
        "winding changed": batch(1, lambda a: a.__setitem__("winding", a["winding"] + 5)),
        "array removed": batch(1, lambda a: a.pop("winding")),
        "truncated batch": raw(0, lambda data: data[: len(data) // 2]),
        "flipped byte": raw(1, lambda data: data[:100] + bytes([data[100] ^ 1]) + data[101:]),
        "random bytes": raw(2, lambda data: os.urandom(len(data))),
        "empty batch": raw(3, lambda data: b""),
        "batch removed": lambda path: (path / "batch-000000.npz").unlink(),
        "stray batch": lambda path: shutil.copy(path / "batch-000000.npz", path / "batch-000099.npz"),
        "batch swapped": lambda path: (shutil.copy(path / "batch-000000.npz", folder / "swap"),
                                       shutil.copy(path / "batch-000001.npz", path / "batch-000000.npz"),
                                       shutil.copy(folder / "swap", path / "batch-000001.npz")),
        "batch is a folder": lambda path: ((path / "batch-000002.npz").unlink(), (path / "batch-000002.npz").mkdir()),
        "batch to /dev/zero": lambda path: ((path / "batch-000002.npz").unlink(),
                                             (path / "batch-000002.npz").symlink_to("/dev/zero")),
        "folder is a file": lambda path: (shutil.rmtree(path), path.write_text("x")),
    }
    for name, tamper in tamperings.items():
        for with_file in ([], [system]):
            path = fresh()
            tamper(path)
            tally.current = name
            judge_cli(tally, ["solve"] + with_file + ["--resume", str(path), "--json"], answer_is_clean)
    tally.current = None
    judge_cli(tally, ["solve", other, "--resume", str(fresh()), "--json"], answer_is_clean)
    judge_cli(tally, ["solve", system, "--run-folder", str(fresh())] + base)  # a folder that holds a run


# --- reports -----------------------------------------------------------------------------------------

def _mutations(value, rng):
    """A few random replacements somewhere in a JSON value."""
    junk = [None, True, 0, -1, 1e308, "x", "", [], {}, [[1, 2]], [[1e400, 0]], "NaN", {"a": 1}, [None] * 3, 10 ** 30]
    data = json.loads(json.dumps(value))
    for _ in range(rng.randrange(1, 4)):
        paths = []

        def walk(node, prefix):
            paths.append(prefix)
            if isinstance(node, dict):
                for key, item in node.items():
                    walk(item, prefix + [key])
            elif isinstance(node, list):
                for index, item in enumerate(node[:4]):
                    walk(item, prefix + [index])
        walk(data, [])
        path = rng.choice(paths[1:])
        target = data
        for part in path[:-1]:
            target = target[part]
        target[path[-1]] = rng.choice(junk)
    return data


def reports(tally, folder, rng, quick):
    """Tampered and hostile reports through ``numag certify``."""
    saved = {}
    for name, argv in {"check": ["check", str(EXAMPLES / "parallel_linkage.toml"), "--point", "c1=1,s1=0,c2=1,s2=0",
                                 "--without-components"],
                       "solve": ["solve", str(EXAMPLES / "mechanism_positions.toml")],
                       "singular": ["singular", _system(folder, "cusp", ["x", "y"], ["y^2 - x^3"])]}.items():
        code, out, _ = run_cli(argv + ["--json", "--seed", "1"])
        saved[name] = json.loads(out)
    certify = ["--digits", "20", "--numerical-only"]
    for round_ in range(40 if quick else 120):
        which = rng.choice(sorted(saved))
        path = folder / f"report-{round_}.json"
        path.write_text(json.dumps(_mutations(saved[which], rng)))
        judge_cli(tally, ["certify", str(path), "-o", str(folder / "certified.json")] + certify)
    # a solution moved off the variety must not come back certified at the moved place
    moved = json.loads(json.dumps(saved["solve"]))
    for solution in moved["solutions"]:
        solution["point"][0][0] += 0.5
    path = folder / "moved.json"
    path.write_text(json.dumps(moved))

    def not_certified_there(code, out):
        data = json.loads((folder / "moved-out.json").read_text())
        return all(s["certificate"]["status"] != "certified" or abs(s["certificate"]["center"][0][0]
                                                                     - s["point"][0][0]) > 0.1
                   for s in data["solutions"])
    judge_cli(tally, ["certify", str(path), "-o", str(folder / "moved-out.json")] + certify, not_certified_there)
    hostile = {"deep": "[" * 100000 + "]" * 100000, "dup": '{"command": "solve", "command": "check"}',
               "nan": '{"command": NaN}', "list": "[]", "string": '"solve"', "empty": "", "binary": "\x00\xff"}
    for name, text in hostile.items():
        path = folder / f"hostile-{name}.json"
        path.write_bytes(text.encode("latin-1"))
        judge_cli(tally, ["certify", str(path)])
    for path in ("/dev/zero", "/dev/urandom", str(folder), str(folder / "missing.json")):
        judge_cli(tally, ["certify", path])
    # writes: through a link, to a device, keeping the mode
    good = folder / "good.json"
    good.write_text(json.dumps(saved["check"]))
    os.chmod(good, 0o644)
    link = folder / "good-link.json"
    link.symlink_to(good)
    judge_cli(tally, ["certify", str(link)] + certify,
              lambda code, out: link.is_symlink() and (os.stat(good).st_mode & 0o777) == 0o644)
    judge_cli(tally, ["certify", str(good), "-o", "/dev/null"] + certify,
              lambda code, out: os.path.exists("/dev/null") and not os.path.isfile("/dev/null"))


def reused(tally, folder, rng, quick):
    """Tampered reports reused by ``numag check``: as --decomposition and as --points-file (issue 20)."""
    axes = _system(folder, "axes", ["x", "y", "z"], ["x*y", "x*z", "y*z", "x*y*z"])
    saved = {}
    for name, argv in {"decompose": ["decompose", axes],
                       "check": ["check", axes, "--point", "x=0,y=0,z=1", "--local-dimension", "1"],
                       "solve": ["solve", str(EXAMPLES / "mechanism_positions.toml")]}.items():
        code, out, _ = run_cli(argv + ["--json", "--seed", "1"])
        saved[name] = json.loads(out)
    for round_ in range(20 if quick else 60):
        which = rng.choice(sorted(saved))
        path = folder / f"reused-{round_}.json"
        path.write_text(json.dumps(_mutations(saved[which], rng)))
        if which == "decompose":
            judge_cli(tally, ["check", axes, "--decomposition", str(path), "--point", "x=0,y=0,z=0", "--seed", "2"])
        elif which == "check":
            judge_cli(tally, ["check", axes, "--points-file", str(path), "--local-dimension", "1", "--seed", "2"])
        else:
            judge_cli(tally, ["check", str(EXAMPLES / "mechanism_positions.toml"), "--points-file", str(path),
                              "--without-components", "--seed", "2"])


# --- kills -------------------------------------------------------------------------------------------

def _alive(pid):
    try:
        with open(f"/proc/{pid}/stat") as handle:
            return handle.read().rsplit(")", 1)[1].split()[0] != "Z"
    except FileNotFoundError:
        return False


def kills(tally, folder, rng, quick):
    """Kill certify part-way (debris and half-written reports) and --workers 2 runs (orphans)."""
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    code, out, _ = run_cli(["check", str(EXAMPLES / "parallel_linkage.toml"), "--point", "c1=1,s1=0,c2=1,s2=0",
                            "--without-components", "--json", "--seed", "1"])
    (folder / "good.json").write_text(out)
    big = folder / "big.json"
    code, out, _ = run_cli(["singular", _system(folder, "nodal", ["x", "y", "z"],
                                                ["x^2*y^2 + y^2*z^2 + z^2*x^2 - 2*x*y*z - 1/4"]), "--json", "--seed", "1"])
    big.write_text(out)
    durations = {}
    for report in (big, folder / "good.json"):  # how long an uninterrupted run takes: kills land anywhere in it
        began = time.perf_counter()
        subprocess.run([sys.executable, "-m", "numag", "certify", str(report), "-o", str(folder / "timing.json"),
                        "--digits", "30"], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env, cwd=ROOT)
        durations[report] = time.perf_counter() - began
    for attempt in range(12 if quick else 40):
        source = rng.choice(sorted(durations))
        original = source.read_text()
        target = folder / f"kill-{attempt}.json"
        target.write_text(original)
        child = subprocess.Popen([sys.executable, "-m", "numag", "certify", str(target), "--digits", "30"],
                                 stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env, cwd=ROOT)
        time.sleep(rng.uniform(0.2, durations[source] + 0.2))
        child.send_signal(rng.choice([signal.SIGTERM, signal.SIGKILL]))
        child.wait()
        run_cli(["certify", str(folder / "good.json"), "-o", str(folder / "sweeper.json"), "--digits", "20",
                 "--numerical-only"])  # the next run in the folder sweeps a killed run's temporary files
        debris = [p.name for p in folder.iterdir() if p.name.startswith(".numag-")]
        try:
            json.loads(target.read_text())
            whole = True
        except ValueError:
            whole = False
        if not whole:
            tally.add("wrong", f"kill {attempt}: the report was left half-written")
        elif debris:
            tally.add("internal", f"kill {attempt}: temporary files left: {debris}")
        else:
            tally.add("answered")
    quartics = _system(folder, "quartics", ["x", "y", "z", "w"], ["x^4 + y^3*z - 2*z + 1", "y^4 - x*z^2 + 3*x - 1",
                                                                  "z^4 + x^2*y^2 - y - 2", "w^3 - x - y - z"])
    for attempt in range(2 if quick else 6):
        child = subprocess.Popen([sys.executable, "-m", "numag", "solve", quartics, "--workers", "2", "--batch-size",
                                  "16"], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env, cwd=ROOT)
        workers = []
        deadline = time.monotonic() + 60
        while len(workers) < 2 and time.monotonic() < deadline:
            time.sleep(0.2)
            workers = [int(p) for p in os.listdir("/proc") if p.isdigit() and _parent(int(p)) == child.pid]
        child.send_signal(signal.SIGKILL if attempt % 2 == 0 else signal.SIGTERM)
        child.wait()
        deadline = time.monotonic() + 30
        while any(_alive(pid) for pid in workers) and time.monotonic() < deadline:
            time.sleep(0.2)
        left = [pid for pid in workers if _alive(pid)]
        for pid in left:
            os.kill(pid, signal.SIGKILL)
        tally.add("internal" if left or len(workers) < 2 else "answered",
                  f"workers left behind: {left}" if left else f"saw {len(workers)} workers")


def _parent(pid):
    try:
        with open(f"/proc/{pid}/stat") as handle:
            return int(handle.read().rsplit(")", 1)[1].split()[1])
    except (FileNotFoundError, ValueError, IndexError):
        return None


def isolation(tally, folder, rng, quick):
    """``numag compare`` from a folder holding a planted numag package must not run it."""
    try:
        import sympy  # noqa: F401
    except ImportError:
        return
    planted = folder / "planted"
    (planted / "numag").mkdir(parents=True)
    marker = folder / "planted-ran"
    for name in ("__init__.py", "reference.py", "__main__.py"):
        (planted / "numag" / name).write_text(f"open({str(marker)!r}, 'w').write('ran')\n")
    system = _system(planted, "cusp", ["x", "y"], ["y^2 - x^3"])
    env = dict(os.environ, PYTHONPATH=f"{ROOT}{os.pathsep}{planted}")
    result = subprocess.run([sys.executable, "-c", "import sys; sys.path.insert(0, sys.argv[1]); "
                             "from numag.app.cli import main; sys.exit(main(sys.argv[2:]))", str(ROOT), "compare", system],
                            cwd=planted, env=env, capture_output=True, text=True, timeout=300)
    if marker.exists():
        tally.add("wrong", "the planted package ran")
    elif result.returncode in (0, 3):
        tally.add("answered")
    else:
        tally.add("internal", result.stderr[-300:])


def main_bench():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="a smaller sample (about three minutes)")
    parser.add_argument("--seed", type=int, default=17)
    parser.add_argument("--parser-inputs", type=int, default=None)
    parser.add_argument("--out", default=str(ROOT / "benchmarks" / "results" / "hostile.txt"))
    args = parser.parse_args()
    rng = random.Random(args.seed)
    started = time.perf_counter()
    tallies = []
    with tempfile.TemporaryDirectory(prefix="numag-hostile-") as root:
        root = pathlib.Path(root)
        for name, stage in (("grammar (API)", None), ("command line", command_line), ("run folders", run_folders),
                            ("reports (certify)", reports), ("reused reports (check)", reused),
                            ("kills (certify, --workers 2)", kills),
                            ("child isolation (compare)", isolation)):
            tally = Tally(name)
            began = time.perf_counter()
            folder = root / name.split()[0]
            folder.mkdir()
            if stage is None:
                grammar(tally, rng, args.parser_inputs or (3000 if args.quick else 22000))
            else:
                stage(tally, folder, rng, args.quick)
            tallies.append(tally)
            print(f"{name}: {tally.counts} ({time.perf_counter() - began:.0f} s)", file=sys.stderr, flush=True)
    lines = [f"numag hostile-input suite ({'quick' if args.quick else 'full'}, seed {args.seed}, "
             f"{time.strftime('%Y-%m-%d')}, {time.perf_counter() - started:.0f} s)", "",
             f"{'category':32} {'tried':>7} {'refused':>8} {'answered':>9} {'internal':>9} {'hangs':>6} {'wrong':>6}"]
    for tally in tallies:
        c = tally.counts
        lines.append(f"{tally.name:32} {c['tried']:7d} {c['refused']:8d} {c['answered']:9d} {c['internal']:9d} "
                     f"{c['hangs']:6d} {c['wrong']:6d}")
    total = {key: sum(t.counts[key] for t in tallies) for key in tallies[0].counts}
    lines.append(f"{'total':32} {total['tried']:7d} {total['refused']:8d} {total['answered']:9d} "
                 f"{total['internal']:9d} {total['hangs']:6d} {total['wrong']:6d}")
    for tally in tallies:
        for example in tally.examples:
            lines.append(f"  {tally.name}: {example}")
    text = "\n".join(lines) + "\n"
    print(text)
    pathlib.Path(args.out).parent.mkdir(parents=True, exist_ok=True)
    pathlib.Path(args.out).write_text(text)
    return 0 if total["internal"] + total["hangs"] + total["wrong"] == 0 else 1


if __name__ == "__main__":
    sys.exit(main_bench())
