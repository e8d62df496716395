"""Run folders: a manifest and one file per finished batch, each written atomically and checked on reading.

A long run writes ``manifest.json`` (what is being computed: the system, the
options, the seed, the batches) when it starts and ``batch-NNNNNN.npz`` after
each batch: numpy arrays only (read back with ``allow_pickle=False``), written to
a temporary file in the same folder, flushed to disk (fsync) and renamed, so a
batch file is either complete or absent.

Saved state is verified, never trusted: the manifest carries a fingerprint
(sha256) of each of its parts (the system, the options, the seed, ...), so an
edited or damaged manifest is refused naming the part that changed; after each
batch the manifest records the batch file's sha256 and the shape of each array,
and :meth:`RunFolder.read_batch` refuses a file that does not match them
(:class:`DamagedBatch`: the caller tracks that batch again). What the arrays
*say* is checked by the caller (``solve`` verifies endpoints against F).

Examples
--------
>>> import tempfile
>>> folder = RunFolder.create(tempfile.mkdtemp() + "/run", {"kind": "demo", "batches": 2})
>>> folder.write_batch(0, {"values": np.arange(3)})
>>> sorted(folder.finished()), folder.read_batch(0)["values"].tolist()
([0], [0, 1, 2])
>>> RunFolder.open(folder.path).manifest["kind"]
'demo'
"""

import hashlib
import io
import json
import pathlib
import re

import numpy as np

from ..errors import InputError
from ..system.safeio import MAX_INPUT_BYTES, atomic_write_bytes, loads_json, read_limited

__all__ = ["RunFolder", "DamagedBatch", "atomic_write_bytes", "manifest_fingerprints"]

_BATCH = re.compile(r"^batch-(\d{6})\.npz$")
#: Manifest keys that are bookkeeping, not part of what the run computes.
_BOOKKEEPING = ("numag_version", "fingerprints", "batch_files")


class DamagedBatch(InputError):
    """A batch file that fails its checksum or shape check (it is tracked again, not trusted)."""


def _digest(value):
    return hashlib.sha256(json.dumps(value, sort_keys=True, separators=(",", ":")).encode()).hexdigest()


def manifest_fingerprints(manifest):
    """sha256 of each part of a manifest (canonical JSON), bookkeeping keys left out.

    Examples
    --------
    >>> sorted(manifest_fingerprints({"seed": 1, "system": {"equations": ["x"]}}))
    ['seed', 'system']
    """
    return {key: _digest(value) for key, value in manifest.items() if key not in _BOOKKEEPING}


class RunFolder:
    """A folder holding one run's manifest and finished batches.

    Use :meth:`create` for a new run and :meth:`open` to resume one.
    """

    def __init__(self, path, manifest):
        self.path = pathlib.Path(path)
        self.manifest = manifest

    @classmethod
    def create(cls, path, manifest):
        """Start a run folder; refuses a folder that already holds a run (resume it instead)."""
        path = pathlib.Path(path)
        if (path / "manifest.json").exists() or (path / "manifest.json").is_symlink():
            raise InputError(f"{path} already holds a run: resume it (--resume {path}) or choose another folder")
        if path.exists() and not path.is_dir():
            raise InputError(f"{path} exists and is not a folder")
        try:
            path.mkdir(parents=True, exist_ok=True)
        except OSError as err:
            raise InputError(f"cannot create the run folder {path}: {err.strerror}") from None
        manifest = dict(manifest)
        manifest["fingerprints"] = manifest_fingerprints(manifest)
        manifest["batch_files"] = {}
        folder = cls(path, manifest)
        folder._save_manifest()
        return folder

    @classmethod
    def open(cls, path):
        """Open an existing run folder (for resuming); refuses a damaged or edited manifest."""
        path = pathlib.Path(path)
        where = str(path / "manifest.json")
        if not path.is_dir():
            raise InputError(f"{path} holds no run (no such folder)")
        if not (path / "manifest.json").exists():
            raise InputError(f"{path} holds no run (no manifest.json)")
        manifest = loads_json(read_limited(path / "manifest.json", MAX_INPUT_BYTES, "manifest"), where)
        if not isinstance(manifest, dict) or not isinstance(manifest.get("fingerprints"), dict) \
                or not isinstance(manifest.get("batch_files"), dict):
            raise InputError(f"{where} is not a numag manifest with checksums (damaged, or written by an older "
                             "numag): start the run again in a new folder")
        recorded = manifest["fingerprints"]
        actual = manifest_fingerprints(manifest)
        differs = sorted(set(recorded) ^ set(actual) | {k for k in actual if recorded.get(k) != actual[k]})
        if differs:
            raise InputError(f"{where} was changed after the run started (fingerprint mismatch in: "
                             f"{', '.join(differs)}): refusing to resume it")
        return cls(path, manifest)

    def _save_manifest(self):
        atomic_write_bytes(self.path / "manifest.json", (json.dumps(self.manifest, indent=2) + "\n").encode())

    def batch_path(self, index):
        return self.path / f"batch-{index:06d}.npz"

    def write_batch(self, index, arrays):
        """Write one batch's arrays atomically, then record its checksum and shapes in the manifest."""
        buffer = io.BytesIO()
        arrays = {key: np.asarray(value) for key, value in arrays.items()}
        np.savez(buffer, **arrays)
        data = buffer.getvalue()
        try:
            atomic_write_bytes(self.batch_path(index), data)
        except OSError as err:  # e.g. a folder standing where the batch file goes
            raise InputError(f"cannot write {self.batch_path(index)}: {err.strerror or err}") from None
        self.manifest["batch_files"][str(index)] = {
            "sha256": hashlib.sha256(data).hexdigest(),
            "arrays": {key: [value.dtype.str, list(value.shape)] for key, value in arrays.items()}}
        self._save_manifest()

    def read_batch(self, index):
        """The arrays of a finished batch, after its checksum and shapes were checked.

        Raises
        ------
        DamagedBatch
            Naming the file and what does not match (the caller tracks the batch again).
        """
        path = self.batch_path(index)
        record = self.manifest["batch_files"].get(str(index))
        if not isinstance(record, dict) or not isinstance(record.get("arrays"), dict):
            raise DamagedBatch(f"{path.name} is not recorded in the manifest")
        try:
            data = read_limited(path, 4 * MAX_INPUT_BYTES, "batch file")
        except InputError as err:
            raise DamagedBatch(str(err)) from None
        if hashlib.sha256(data).hexdigest() != record.get("sha256"):
            raise DamagedBatch(f"{path.name} fails its checksum (sha256)")
        try:
            with np.load(io.BytesIO(data), allow_pickle=False) as loaded:
                arrays = {key: loaded[key] for key in loaded.files}
        except (OSError, ValueError, EOFError) as err:
            raise DamagedBatch(f"{path.name} is unreadable: {err}") from None
        shapes = {key: [value.dtype.str, list(value.shape)] for key, value in arrays.items()}
        if shapes != record["arrays"]:
            raise DamagedBatch(f"{path.name} does not have the recorded arrays and shapes")
        return arrays

    def finished(self):
        """Indices of the batches whose files exist."""
        found = set()
        for entry in self.path.iterdir():
            match = _BATCH.match(entry.name)
            if match:
                found.add(int(match.group(1)))
        return found
