"""Reading and writing files safely: bounded reads, strict JSON, atomic writes that respect links.

Everything numag reads from a path (system files, points files, reports, run
folders) goes through :func:`read_limited`, which reads at most ``limit + 1``
bytes, so a device (``/dev/zero``), a pipe or a huge file is refused with a
message instead of filling the memory (a size check by ``stat`` says 0 for
devices and pipes). JSON is decoded strictly (:func:`loads_json`): no
duplicate keys, no ``NaN``/``Infinity`` literals, and nesting that exhausts
the decoder is refused, not an internal error.

Writes go through :func:`write_file`: a regular file (or a new one) is replaced
atomically (temporary file in the same folder, fsync, rename) keeping the
existing file's permission bits; a symbolic link is followed to its target; a
special file (a device, a pipe) is written through, never replaced. Temporary
files are named ``.numag-<pid>-*.tmp``; those of processes that no longer run
are swept by the next write in the same folder.

Examples
--------
>>> import tempfile, os
>>> folder = tempfile.mkdtemp()
>>> write_file(os.path.join(folder, "a.json"), b'{"x": 1}')
>>> loads_json(read_limited(os.path.join(folder, "a.json"), 100, "report"), "a.json")
{'x': 1}
>>> loads_json(b'{"x": 1, "x": 2}', "a.json")
Traceback (most recent call last):
...
numag.errors.SystemFileError: a.json: key 'x' appears twice in one object
"""

import json
import os
import re
import stat
import tempfile

from ..errors import SystemFileError

__all__ = ["MAX_INPUT_BYTES", "read_limited", "loads_json", "write_file", "atomic_write_bytes",
           "sweep_temporary_files"]

#: Largest file numag reads (bytes): system files, points files, reports, manifests.
MAX_INPUT_BYTES = 50 * 1024 * 1024
_TEMPORARY = re.compile(r"^\.numag-(\d+)-.*\.tmp$")


def read_limited(path, limit=MAX_INPUT_BYTES, what="file"):
    """Read at most ``limit`` bytes of ``path``; refuse longer input, devices and folders.

    Parameters
    ----------
    path : str or os.PathLike
    limit : int
        Largest accepted size in bytes; ``limit + 1`` bytes are read at most, whatever the file is.
    what : str
        What the file is, for messages ("system file", "report", ...).

    Returns
    -------
    bytes

    Raises
    ------
    SystemFileError
        Naming the path and the problem (missing, a folder, a device, too large, unreadable).

    Examples
    --------
    >>> read_limited("/dev/zero", 10, "points file")
    Traceback (most recent call last):
    ...
    numag.errors.SystemFileError: /dev/zero: is a device, not a points file
    """
    path = os.fspath(path)
    try:
        with open(path, "rb") as handle:
            mode = os.fstat(handle.fileno()).st_mode
            if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
                raise SystemFileError(f"is a device, not a {what}", path)
            data = handle.read(limit + 1)
    except FileNotFoundError:
        raise SystemFileError(f"no such {what} (file not found)", path) from None
    except IsADirectoryError:
        raise SystemFileError(f"is a directory, not a {what}", path) from None
    except PermissionError:
        raise SystemFileError(f"permission denied reading the {what}", path) from None
    except OSError as err:
        raise SystemFileError(f"cannot read the {what}: {err.strerror or err}", path) from None
    if len(data) > limit:
        raise SystemFileError(f"{what} is larger than the {limit}-byte limit", path)
    return data


def _unique_keys(pairs):
    seen = {}
    for key, value in pairs:
        if key in seen:
            raise ValueError(f"key {key!r} appears twice in one object")
        seen[key] = value
    return seen


def _no_constant(name):
    raise ValueError(f"{name} is not a JSON number (numag writes strict JSON)")


def loads_json(raw, where):
    """Decode strict JSON from bytes (UTF-8): no duplicate keys, no NaN/Infinity, bounded nesting.

    Parameters
    ----------
    raw : bytes or str
    where : str
        The file's name, for messages.

    Raises
    ------
    SystemFileError
        Naming the file and what is wrong (line and column for syntax errors).
    """
    try:
        text = raw.decode("utf-8") if isinstance(raw, bytes) else raw
    except UnicodeDecodeError as err:
        raise SystemFileError(f"is not UTF-8 text (byte {err.start})", where) from None
    try:
        return json.loads(text, object_pairs_hook=_unique_keys, parse_constant=_no_constant)
    except json.JSONDecodeError as err:
        raise SystemFileError(f"is not valid JSON (line {err.lineno}, column {err.colno}: {err.msg})",
                              where) from None
    except RecursionError:
        raise SystemFileError("is nested too deeply to be a numag file", where) from None
    except ValueError as err:
        raise SystemFileError(str(err), where) from None


def _alive(pid):
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:  # someone else's process: alive
        return True
    return True


def sweep_temporary_files(folder):
    """Remove numag's temporary files in ``folder`` left by processes that no longer run.

    Returns
    -------
    int
        Number of files removed.
    """
    removed = 0
    try:
        entries = os.listdir(folder)
    except OSError:
        return 0
    for name in entries:
        match = _TEMPORARY.match(name)
        if match and int(match.group(1)) != os.getpid() and not _alive(int(match.group(1))):
            try:
                os.unlink(os.path.join(folder, name))
                removed += 1
            except OSError:
                pass
    return removed


def atomic_write_bytes(path, data, mode=None):
    """Replace ``path`` by ``data`` atomically: a temporary file in the same folder, fsync, rename.

    Parameters
    ----------
    path : str or os.PathLike
        A regular file or a new name (callers resolve links first; see :func:`write_file`).
    data : bytes
    mode : int, optional
        Permission bits of the result; default: those of the file replaced, or 0o666 less the umask.
    """
    path = os.fspath(path)
    folder = os.path.dirname(os.path.abspath(path))
    sweep_temporary_files(folder)
    if mode is None:
        try:
            mode = stat.S_IMODE(os.stat(path).st_mode)
        except FileNotFoundError:
            umask = os.umask(0)
            os.umask(umask)
            mode = 0o666 & ~umask
    handle, temporary = tempfile.mkstemp(prefix=f".numag-{os.getpid()}-", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(handle, "wb") as stream:
            stream.write(data)
            stream.flush()
            os.fchmod(stream.fileno(), mode)
            os.fsync(stream.fileno())
        os.replace(temporary, path)
    except BaseException:  # also on SIGTERM (turned into SystemExit by the command line): no debris
        if os.path.exists(temporary):
            os.unlink(temporary)
        raise


def write_file(path, data):
    """Write ``data`` where the user asked: follow links; replace regular files atomically; write through others.

    Parameters
    ----------
    path : str or os.PathLike
    data : bytes

    Raises
    ------
    SystemFileError
        When the target cannot be written (a folder, no permission, a missing folder).
    """
    path = os.fspath(path)
    target = os.path.realpath(path)  # a link is followed to its target, never replaced by a file
    try:
        try:
            mode = os.stat(target).st_mode
        except FileNotFoundError:
            mode = None
        if mode is not None and stat.S_ISDIR(mode):
            raise SystemFileError("is a directory", path)
        if mode is not None and not stat.S_ISREG(mode):
            with open(target, "wb") as stream:  # a device or a pipe: write through it
                stream.write(data)
            return
        atomic_write_bytes(target, data)
    except PermissionError:
        raise SystemFileError("permission denied writing", path) from None
    except FileNotFoundError:
        raise SystemFileError("cannot write: the folder does not exist", path) from None
    except IsADirectoryError:
        raise SystemFileError("is a directory", path) from None
    except OSError as err:
        raise SystemFileError(f"cannot write: {err.strerror or err}", path) from None
