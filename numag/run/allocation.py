"""Keeping freed memory in the process, so that large numpy arrays do not cost page faults.

Every batched evaluation allocates arrays of a few megabytes (monomial values,
Jacobians, series coefficients) and frees them a moment later. With the C
library's default settings such blocks are handed back to the operating
system on release and every page of the next allocation faults again: on 1,024
paths of ten quadrics that was half the time of an evaluation (1,376 page
faults per call, 8.3 ms against 4.2 ms without them). Asking the allocator to
keep a pad of freed memory at the top of the heap removes the faults; the cost
is that the process holds up to that pad (64 MiB) of freed memory.

Only glibc has the setting (``mallopt``); elsewhere this does nothing. The
environment variable ``NUMAG_KEEP_ALLOCATOR`` set to ``1`` leaves the
allocator untouched.

Examples
--------
>>> retain_freed_memory() in (True, False)
True
"""

import ctypes
import os

__all__ = ["retain_freed_memory"]

#: mallopt parameter numbers from glibc's malloc.h.
_M_TOP_PAD = -2
_PAD_BYTES = 64 * 1024 * 1024
_state = {"done": False, "applied": False}


def retain_freed_memory():
    """Ask glibc to keep a 64 MiB pad of freed memory (once per process); True when applied.

    Returns
    -------
    bool
        False where the C library has no ``mallopt`` or when ``NUMAG_KEEP_ALLOCATOR=1``.
    """
    if _state["done"]:
        return _state["applied"]
    _state["done"] = True
    if os.environ.get("NUMAG_KEEP_ALLOCATOR") == "1":
        return False
    try:
        # the symbols already loaded in this process, the C library's among them: ctypes.util.find_library
        # would run ldconfig in a child process on every `import numag` (about 4 ms; decision 0067)
        library = ctypes.CDLL(None)
        mallopt = library.mallopt
    except (OSError, AttributeError):
        return False
    mallopt.argtypes = [ctypes.c_int, ctypes.c_int]
    mallopt.restype = ctypes.c_int
    _state["applied"] = bool(mallopt(_M_TOP_PAD, _PAD_BYTES))
    return _state["applied"]
