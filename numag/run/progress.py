"""The one progress protocol: every long computation of numag reports through the same callable.

``progress(message, *, done=None, total=None)``: ``message`` is a short sentence for a person (always
given); ``done`` and ``total`` are counts of paths when the stage tracks paths (the batched-tracking
service gives both, before its first batch and after each batch or step), else None. A caller passes
any callable of this shape (the command line's progress lines on standard error, a logger, a test's
list); ``None`` means silence. Progress never changes a result, and a progress callable does not cross
processes (only batches run in this process report steps).

Examples
--------
>>> seen = []
>>> def record(message, *, done=None, total=None):
...     seen.append((message, done, total))
>>> tell_paths(record, 3, 8)
>>> record("decomposing X")
>>> seen
[('3 of 8 paths tracked', 3, 8), ('decomposing X', None, None)]
"""

from typing import Protocol

__all__ = ["Progress", "tell_paths"]


class Progress(Protocol):
    """A callable told how a computation advances (see the module's docstring)."""

    def __call__(self, message: str, *, done: int | None = None, total: int | None = None) -> None:
        ...


def tell_paths(progress, done, total):
    """Tell ``progress`` (a :class:`Progress` or None) that ``done`` of ``total`` paths are tracked."""
    if progress is not None:
        progress(f"{done} of {total} paths tracked", done=done, total=total)
