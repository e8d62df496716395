"""Shared test helpers: the problem set with exact answers (copied from the project's shared problems)."""

import json
import pathlib

import pytest

DATA = pathlib.Path(__file__).parent / "data"


def load_problems():
    """The problems with independently verified exact answers; each entry names its source."""
    with open(DATA / "problems.json") as handle:
        return {entry["name"]: entry for entry in json.load(handle)}


@pytest.fixture(scope="session")
def problems():
    return load_problems()


def run_singular_json(tmp_path, variables, equations, seed):
    """``numag singular FILE --seed SEED --json`` on a file of these variables and equations: (exit code, report)."""
    import io

    from numag.app.cli import main
    path = tmp_path / "system.toml"
    path.write_text(f"variables = {json.dumps(variables)}\nequations = {json.dumps(equations)}\n")
    out = io.StringIO()
    code = main(["singular", str(path), "--seed", str(seed), "--json"], out=out)
    return code, json.loads(out.getvalue())
