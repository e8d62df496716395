"""Run folders: atomic batch files, no pickles, refusal of a second run in one folder, verified saved state."""

import hashlib
import io
import json

import numpy as np
import pytest

from numag.run.checkpoint import DamagedBatch, RunFolder
from numag.errors import InputError


def test_batches_round_trip_and_no_temporary_files(tmp_path):
    folder = RunFolder.create(tmp_path / "run", {"kind": "test", "batches": 3})
    folder.write_batch(2, {"status": np.array([1, 2]), "endpoints": np.array([[1 + 2j]])})
    again = RunFolder.open(tmp_path / "run")
    assert {k: again.manifest[k] for k in ("kind", "batches")} == {"kind": "test", "batches": 3}
    assert again.finished() == {2} and set(again.manifest["batch_files"]) == {"2"}
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
    data = buffer.getvalue()
    (tmp_path / "run" / "batch-000000.npz").write_bytes(data)
    # a forger who also records the file's checksum and shape still gets no pickle loaded
    manifest = json.loads((tmp_path / "run" / "manifest.json").read_text())
    manifest["batch_files"]["0"] = {"sha256": hashlib.sha256(data).hexdigest(), "arrays": {"evil": ["|O", [1]]}}
    (tmp_path / "run" / "manifest.json").write_text(json.dumps(manifest))
    with pytest.raises(DamagedBatch, match="unreadable"):
        RunFolder.open(tmp_path / "run").read_batch(0)


def test_an_edited_manifest_is_refused_naming_the_part(tmp_path):
    RunFolder.create(tmp_path / "run", {"kind": "test", "seed": 7, "system": {"equations": ["x - 1"]}})
    path = tmp_path / "run" / "manifest.json"
    manifest = json.loads(path.read_text())
    manifest["seed"] = 8
    path.write_text(json.dumps(manifest))
    with pytest.raises(InputError, match=r"fingerprint mismatch in: seed"):
        RunFolder.open(tmp_path / "run")
    path.write_text(path.read_text()[:25])  # truncated
    with pytest.raises(InputError, match="not valid JSON"):
        RunFolder.open(tmp_path / "run")
    path.write_text('{"kind": "test"}')  # no checksums: refused, not trusted
    with pytest.raises(InputError, match="with checksums"):
        RunFolder.open(tmp_path / "run")


def test_a_changed_or_truncated_batch_fails_its_check(tmp_path):
    folder = RunFolder.create(tmp_path / "run", {"kind": "test"})
    folder.write_batch(0, {"status": np.array([1, 2, 3])})
    folder.write_batch(1, {"status": np.array([1, 2, 3])})
    path = folder.batch_path(0)
    raw = bytearray(path.read_bytes())
    raw[-30] ^= 1
    path.write_bytes(bytes(raw))
    folder = RunFolder.open(tmp_path / "run")
    with pytest.raises(DamagedBatch, match="checksum"):
        folder.read_batch(0)
    folder.batch_path(1).write_bytes(folder.batch_path(1).read_bytes()[:40])
    with pytest.raises(DamagedBatch, match="checksum"):
        folder.read_batch(1)
    buffer = io.BytesIO()
    np.savez(buffer, status=np.array([1, 2]))  # well-formed, recorded checksum, but the wrong shape
    folder.batch_path(1).write_bytes(buffer.getvalue())
    folder.manifest["batch_files"]["1"]["sha256"] = hashlib.sha256(buffer.getvalue()).hexdigest()
    with pytest.raises(DamagedBatch, match="shapes"):
        folder.read_batch(1)
