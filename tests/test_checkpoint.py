"""Run folders: atomic batch files, no pickles, refusal of a second run in one folder."""

import io

import numpy as np
import pytest

from numag.checkpoint import RunFolder
from numag.errors import InputError


def test_batches_round_trip_and_no_temporary_files(tmp_path):
    folder = RunFolder.create(tmp_path / "run", {"kind": "test", "batches": 3})
    folder.write_batch(2, {"status": np.array([1, 2]), "endpoints": np.array([[1 + 2j]])})
    again = RunFolder.open(tmp_path / "run")
    assert again.manifest == {"kind": "test", "batches": 3} and again.finished() == {2}
    data = again.read_batch(2)
    assert data["status"].tolist() == [1, 2] and data["endpoints"][0, 0] == 1 + 2j
    assert sorted(p.name for p in (tmp_path / "run").iterdir()) == ["batch-000002.npz", "manifest.json"]


def test_a_folder_holds_one_run_and_pickles_are_refused(tmp_path):
    RunFolder.create(tmp_path / "run", {"kind": "test"})
    with pytest.raises(InputError, match="already holds a run"):
        RunFolder.create(tmp_path / "run", {"kind": "test"})
    with pytest.raises(InputError, match="holds no run"):
        RunFolder.open(tmp_path / "empty")
    buffer = io.BytesIO()
    np.savez(buffer, evil=np.array([{"a": 1}], dtype=object))  # an object array is stored as a pickle
    (tmp_path / "run" / "batch-000000.npz").write_bytes(buffer.getvalue())
    with pytest.raises(InputError, match="unreadable"):
        RunFolder.open(tmp_path / "run").read_batch(0)
