"""Start-up: `import numag` and `numag --help` import no stage and no heavy dependency (issue 19, item 3).

Each check runs a fresh child interpreter (this process has imported everything already) and reads
its ``sys.modules``: deterministic, no timing.
"""

import json
import os
import subprocess
import sys

import pytest

import numag

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))

#: Modules that the start-up must not import: the heavy dependencies and every stage.
_HEAVY = ("scipy.spatial", "scipy.sparse", "scipy.linalg", "networkx", "mpmath", "sympy")
_STAGES = ("numag.numeric.evaluate", "numag.tracking.solve", "numag.witness.decompose", "numag.singular.locus",
           "numag.singular.smoothness", "numag.certify.certificates", "numag.app.report")


def _modules_after(code):
    """The names in sys.modules of a child interpreter after it ran ``code`` (from the checkout root)."""
    script = code + "\nimport json, sys\nsys.__stdout__.write('\\n' + json.dumps(sorted(sys.modules)))\n"
    completed = subprocess.run([sys.executable, "-c", script], cwd=ROOT, capture_output=True, text=True,
                               timeout=120)
    assert completed.returncode == 0, completed.stderr
    return set(json.loads(completed.stdout.strip().splitlines()[-1]))


@pytest.mark.parametrize("code", ["import numag",
                                  "from numag.app.cli import main\nmain(['--help'])",
                                  "from numag.app.cli import main\nmain(['--version'])"])
def test_start_up_imports_no_stage_and_no_heavy_dependency(code):
    loaded = _modules_after(code)
    assert not loaded & set(_HEAVY + _STAGES)


def test_a_command_imports_only_what_it_needs_for_its_help():
    loaded = _modules_after("from numag.app.cli import main\nmain(['solve', '--help'])")
    assert "numag.tracking.solve" in loaded
    assert not loaded & {"networkx", "numag.app.commands.compare", "numag.app.commands.decompose"}


def test_public_names_resolve_on_first_use_and_are_listed():
    assert set(numag.__all__) <= set(dir(numag))
    for name in numag.__all__:
        assert getattr(numag, name) is not None
    assert numag.check_points.__module__ == "numag.singular.smoothness"
    with pytest.raises(AttributeError, match="no attribute 'no_such_name'"):
        numag.no_such_name  # noqa: B018


def test_star_import_gives_the_public_api():
    completed = subprocess.run([sys.executable, "-c", "from numag import *\nprint(sorted(dir()))"], cwd=ROOT,
                               capture_output=True, text=True, timeout=120)
    for name in ("solve_system", "singular_locus", "certify_rank", "NumagError"):
        assert f"'{name}'" in completed.stdout


def test_a_plain_solve_loads_neither_scipy_nor_mpmath(tmp_path):
    # a total-degree solve of a small regular system needs numpy only (decision 0051): scipy's optimizer and
    # mpmath are imported where a polyhedral start, a rescue or a certificate needs them
    path = tmp_path / "circle.toml"
    path.write_text('variables = ["x", "y"]\nequations = ["x^2 + y^2 - 1", "x - y"]\n')
    loaded = _modules_after(f"from numag.app.cli import main\nmain(['solve', {str(path)!r}, '--seed', '1'])")
    assert "numag.tracking.solve" in loaded
    assert not loaded & {"scipy", "mpmath", "networkx", "sympy"}
    # in-process tracking from a total-degree start of regular endpoints: no process pool, no cell search,
    # no refinement, and no numpy.ma (numpy imports it for a plain np.unique; decision 0067)
    assert not loaded & {"concurrent.futures", "multiprocessing", "numag.tracking.polyhedral", "numag.numeric.refine",
                         "numpy.ma"}
