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
