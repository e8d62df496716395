"""The longest functions of a Python package, and its lines per sub-package (figures for a closing note).

A function's length is its line span in the source, decorators and docstring included
(``end_lineno - lineno + 1`` of the ``ast`` node); nested functions are counted on their own as well.

Usage::

    python scripts/longest_functions.py [--top 5] [ROOT]      # ROOT defaults to numag/

Examples
--------
>>> source = "def f():\\n    return 1\\n\\n\\nclass A:\\n    def g(self):\\n        x = 1\\n        return x\\n"
>>> [(name, lines) for name, _, lines in function_lengths(source, "m.py")]
[('A.g', 3), ('f', 2)]
"""

import argparse
import ast
import pathlib
import sys


def function_lengths(source, filename):
    """``[(qualified name, "file:line", lines), ...]`` of every function in ``source``, longest first."""
    found = []

    def visit(node, prefix):
        for child in ast.iter_child_nodes(node):
            if isinstance(child, (ast.FunctionDef, ast.AsyncFunctionDef)):
                name = prefix + child.name
                found.append((name, f"{filename}:{child.lineno}", child.end_lineno - child.lineno + 1))
                visit(child, name + ".")
            elif isinstance(child, ast.ClassDef):
                visit(child, prefix + child.name + ".")
            else:
                visit(child, prefix)

    visit(ast.parse(source, filename), "")
    return sorted(found, key=lambda item: (-item[2], item[0]))


def lines_per_package(root):
    """``{sub-package or top-level module: lines}`` under ``root`` (every ``.py`` file, blank lines included)."""
    counts = {}
    for path in sorted(root.rglob("*.py")):
        relative = path.relative_to(root)
        key = relative.parts[0] if len(relative.parts) > 1 else relative.name
        counts[key] = counts.get(key, 0) + len(path.read_text().splitlines())
    return counts


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("root", nargs="?", default="numag")
    parser.add_argument("--top", type=int, default=5)
    args = parser.parse_args(argv)
    root = pathlib.Path(args.root)
    if not root.is_dir():
        print(f"error: {root} is not a directory", file=sys.stderr)
        return 2
    counts = lines_per_package(root)
    print("lines per package")
    for key, lines in sorted(counts.items(), key=lambda item: -item[1]):
        print(f"  {key:<16} {lines:>6}")
    print(f"  {'total':<16} {sum(counts.values()):>6}")
    every = []
    for path in sorted(root.rglob("*.py")):
        every += function_lengths(path.read_text(), str(path))
    every.sort(key=lambda item: (-item[2], item[0]))
    print(f"longest functions (of {len(every)})")
    for name, where, lines in every[:args.top]:
        print(f"  {lines:>4}  {name}  ({where})")
    return 0


if __name__ == "__main__":
    sys.exit(main())
