"""Imports flow one way, in pipeline order: system -> run -> numeric -> tracking -> witness -> singular -> families ->
certify -> anatomy -> app (common practice, no source: a layered package keeps its dependency graph acyclic).

A module may import its own package and any earlier package, never a later one; ``numag.errors``,
``numag.kinds`` and ``numag.version`` are below every package. Within a package, the module-level
imports form no cycle.
"""

import ast
import pathlib

import numag

# The pipeline: a package may import only itself and the packages before it. `run` (executors, run
# folders) sits below `numeric` so that evaluation can charge memory and the tracker can use executors.
FOUNDATION = ("errors", "kinds", "version")
PACKAGES = ("system", "run", "numeric", "tracking", "witness", "singular", "families", "certify", "anatomy", "app")
TOP = ("__init__", "__main__")
PACKAGE_ROOT = pathlib.Path(numag.__file__).parent


def rank_of(part):
    """The place of a first-level name of numag (a module of the foundation, a package, or the top)."""
    if part in FOUNDATION:
        return 0
    if part in PACKAGES:
        return 1 + PACKAGES.index(part)
    if part in TOP:
        return 1 + len(PACKAGES)
    raise AssertionError(f"numag.{part} is neither a package of the pipeline nor a foundation module "
                         "(tests/test_layering.py)")


def module_name(path):
    """``numag/witness/cascade.py`` -> ``("witness", "cascade")``."""
    return path.relative_to(PACKAGE_ROOT).with_suffix("").parts


def imported_modules(source, own, top_level_only=False):
    """The numag modules (as tuples of names below numag) that the source of module ``own`` imports."""
    tree = ast.parse(source)
    nodes = tree.body if top_level_only else ast.walk(tree)
    package = own[:-1]  # the package holding the module (for an __init__, its own package)
    for node in nodes:
        if isinstance(node, ast.ImportFrom) and node.level >= 1:
            base = package[:len(package) - (node.level - 1)] if node.level > 1 else package
            if node.module:
                yield tuple(base) + tuple(node.module.split("."))
            else:
                for alias in node.names:
                    yield tuple(base) + (alias.name,)
        elif isinstance(node, ast.ImportFrom) and node.module and node.module.startswith("numag."):
            yield tuple(node.module.split(".")[1:])
        elif isinstance(node, ast.Import):
            for alias in node.names:
                if alias.name.startswith("numag."):
                    yield tuple(alias.name.split(".")[1:])


def upward_imports(source, own):
    """Imports of module ``own`` from a later package of the pipeline: ``[(own, imported), ...]``."""
    found = []
    for imported in imported_modules(source, own):
        if not imported or imported[0] == "__version__":
            continue
        if rank_of(imported[0]) > rank_of(own[0]):
            found.append((".".join(own), ".".join(imported)))
    return found


def all_modules():
    return sorted(PACKAGE_ROOT.rglob("*.py"))


def test_every_module_sits_in_a_package_of_the_pipeline():
    for path in all_modules():
        rank_of(module_name(path)[0])


def test_imports_flow_in_pipeline_order():
    for path in all_modules():
        assert upward_imports(path.read_text(), module_name(path)) == []


def test_an_import_from_a_later_package_is_caught():
    # The check itself can fail: the tracker importing the witness cascade is upwards.
    source = "from ..witness.cascade import membership\nfrom ..numeric.evaluate import BatchEvaluator\n"
    assert upward_imports(source, ("tracking", "tracker")) == [("tracking.tracker", "witness.cascade")]
    assert upward_imports("from numag.app import cli\n", ("system", "parse")) == [("system.parse", "app")]


def test_no_import_cycle_inside_a_package():
    graph = {}
    for path in all_modules():
        own = module_name(path)
        if len(own) != 2 or own[1] == "__init__":
            continue
        graph[own] = {imported[:2] for imported in imported_modules(path.read_text(), own, top_level_only=True)
                      if imported[:1] == own[:1] and len(imported) >= 2}
    state = {}

    def visit(node, trail):
        if state.get(node) == "done":
            return
        assert state.get(node) != "open", "import cycle: " + " -> ".join(".".join(m) for m in trail + [node])
        state[node] = "open"
        for nxt in sorted(graph.get(node, ())):
            visit(nxt, trail + [node])
        state[node] = "done"

    for node in sorted(graph):
        visit(node, [])
