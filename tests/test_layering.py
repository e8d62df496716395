"""Imports flow one way: command line -> reports/files -> verdicts -> refinement -> evaluation -> core."""

import ast
import pathlib

import numag

# A module may import only modules of a strictly lower layer.
LAYERS = [
    {"errors", "cluster", "allocation"},
    {"exact", "executor", "safeio"},
    {"polynomial", "checkpoint"},
    {"parse", "reference", "scaling"},
    {"evaluate", "linalg", "rescue"},
    {"refine", "homotopy", "tracker"},
    {"solve", "witness", "certify"},
    {"decompose"},
    {"smoothness"},
    {"singular"},
    {"files", "compare"},
    {"report"},
    {"cli"},
    {"__main__"},
]


def layer_of(name):
    for level, names in enumerate(LAYERS):
        if name in names:
            return level
    raise AssertionError(f"module numag.{name} is not placed in a layer of tests/test_layering.py")


def internal_imports(path):
    tree = ast.parse(path.read_text())
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and node.level == 1:
            if node.module:
                yield node.module.split(".")[0]
            else:
                for alias in node.names:
                    yield alias.name
        elif isinstance(node, ast.ImportFrom) and node.module and node.module.startswith("numag."):
            yield node.module.split(".")[1]


def test_imports_flow_downwards():
    package = pathlib.Path(numag.__file__).parent
    for path in sorted(package.glob("*.py")):
        name = path.stem
        if name == "__init__":
            continue
        for imported in internal_imports(path):
            if imported == "__init__" or imported == "" or imported == "__version__":
                continue
            assert layer_of(imported) < layer_of(name), f"numag.{name} imports numag.{imported} (upwards)"
