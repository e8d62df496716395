"""Run folders: a manifest and one file per finished batch, each written atomically.

A long run writes ``manifest.json`` (what is being computed: the system, the
options, the seed, the batches) when it starts and ``batch-NNNNNN.npz`` after
each batch: numpy arrays only (read back with ``allow_pickle=False``), written to
a temporary file in the same folder, flushed to disk (fsync) and renamed, so a
batch file is either complete or absent. Resuming reads the manifest, checks
that it describes the same run, and skips the batches whose files exist.

Examples
--------
>>> import tempfile
>>> folder = RunFolder.create(tempfile.mkdtemp() + "/run", {"kind": "demo", "batches": 2})
>>> folder.write_batch(0, {"values": np.arange(3)})
>>> sorted(folder.finished()), folder.read_batch(0)["values"].tolist()
([0], [0, 1, 2])
"""

import json
import os
import pathlib
import re
import tempfile

import numpy as np

from .errors import InputError

__all__ = ["RunFolder", "atomic_write_bytes"]

_BATCH = re.compile(r"^batch-(\d{6})\.npz$")


def atomic_write_bytes(path, data):
    """Write ``data`` to ``path`` through a temporary file in the same folder: fsync, then rename."""
    path = pathlib.Path(path)
    handle, temporary = tempfile.mkstemp(prefix=".numag-", dir=path.parent)
    try:
        with os.fdopen(handle, "wb") as stream:
            stream.write(data)
            stream.flush()
            os.fsync(stream.fileno())
        os.replace(temporary, path)
    except BaseException:
        if os.path.exists(temporary):
            os.unlink(temporary)
        raise


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
        if (path / "manifest.json").exists():
            raise InputError(f"{path} already holds a run: resume it (--resume {path}) or choose another folder")
        if path.exists() and not path.is_dir():
            raise InputError(f"{path} exists and is not a folder")
        try:
            path.mkdir(parents=True, exist_ok=True)
        except OSError as err:
            raise InputError(f"cannot create the run folder {path}: {err.strerror}") from None
        folder = cls(path, manifest)
        atomic_write_bytes(path / "manifest.json", (json.dumps(manifest, indent=2) + "\n").encode())
        return folder

    @classmethod
    def open(cls, path):
        """Open an existing run folder (for resuming)."""
        path = pathlib.Path(path)
        try:
            manifest = json.loads((path / "manifest.json").read_text())
        except FileNotFoundError:
            raise InputError(f"{path} holds no run (no manifest.json)") from None
        except json.JSONDecodeError as err:
            raise InputError(f"{path}/manifest.json is damaged: {err.msg} at line {err.lineno}") from None
        return cls(path, manifest)

    def batch_path(self, index):
        return self.path / f"batch-{index:06d}.npz"

    def write_batch(self, index, arrays):
        """Write one batch's arrays atomically."""
        import io
        buffer = io.BytesIO()
        np.savez(buffer, **{key: np.asarray(value) for key, value in arrays.items()})
        atomic_write_bytes(self.batch_path(index), buffer.getvalue())

    def read_batch(self, index):
        """The arrays of a finished batch (no pickled objects are ever loaded)."""
        try:
            with np.load(self.batch_path(index), allow_pickle=False) as data:
                return {key: data[key] for key in data.files}
        except (OSError, ValueError) as err:
            raise InputError(f"batch file {self.batch_path(index)} is unreadable: {err}") from None

    def finished(self):
        """Indices of the batches whose files exist."""
        found = set()
        for entry in self.path.iterdir():
            match = _BATCH.match(entry.name)
            if match:
                found.add(int(match.group(1)))
        return found
