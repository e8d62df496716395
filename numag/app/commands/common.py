"""What every sub-command shares: exit codes, option types and option groups (work limits, executors,
``--certify``), loading a system file for numerical work, the path guard, notes and warnings, point
formatting and progress lines.

Examples
--------
>>> _format_point(["x", "y"], [1, 2 - 1j])
'x=1, y=2-1*I'
"""

import argparse
import math
import re
import sys
import time

from ...errors import NumagError, SystemFileError
from ...system.files import load_system
from ...system.polynomial import prepared_for_numerics, regeneration_bound
from ...run.executor import WorkLimits, make_executor
from ..report import completeness_warnings

from . import EXIT_INPUT, EXIT_INTERNAL, EXIT_MISMATCH, EXIT_OK, EXIT_UNDECIDED  # noqa: F401 - re-exported


_MAX_WORKERS = 1024


_SCHEDULER = re.compile(r"(tcp|tls|ws|wss)://(\[[0-9A-Fa-f:.]+\]|[A-Za-z0-9.-]+):[0-9]{1,5}\Z")


def _seed(text):
    """A seed: an integer from 0 to 2^63 - 1 (numpy's generators take no negative seeds)."""
    return _checked_seed(text, "the seed", argparse.ArgumentTypeError)


def _checked_seed(value, what, error=NumagError):
    try:
        seed = int(value) if isinstance(value, str) or (isinstance(value, int) and not isinstance(value, bool)) \
            else None
    except ValueError:
        seed = None
    if seed is None or not 0 <= seed < 2 ** 63:
        raise error(f"{what} must be an integer from 0 to 2^63 - 1, got {str(value)[:40]!r}")
    return seed


def _count(low, high):
    """An integer option from ``low`` to ``high``."""
    def parse(text):
        try:
            value = int(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"expected an integer, got {text[:40]!r}") from None
        if not low <= value <= high:
            raise argparse.ArgumentTypeError(f"must be from {low} to {high}, got {value}")
        return value
    return parse


def _positive_number(text):
    """A finite positive number (no nan, no inf)."""
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number, got {text[:40]!r}") from None
    if not (math.isfinite(value) and value > 0):
        raise argparse.ArgumentTypeError(f"must be a finite positive number, got {text[:40]!r}")
    return value


def _scheduler_address(text):
    """A Dask scheduler address: tcp:// (or tls, ws, wss) host:port; nothing else is opened."""
    if not _SCHEDULER.match(text):
        raise argparse.ArgumentTypeError(f"{text[:60]!r} is not a scheduler address of the form tcp://host:port")
    return text


def _add_work_options(command):
    command.add_argument("--max-paths", type=_count(1, 10**12), default=WorkLimits.max_paths, metavar="N",
                         help="refuse runs that would track more paths (estimated before tracking: the Bezout "
                              "number, or each homotopy's paths added up; default %(default)s)")
    command.add_argument("--max-memory", type=_positive_number, default=WorkLimits.max_memory / 1024 ** 3,
                         metavar="GIB", help="refuse an evaluation table or batch of paths estimated above this "
                                             "many GiB (default %(default)s)")


def _load(args):
    """The system file as numerical work needs it (zero equations dropped, huge coefficients rescaled)."""
    system = load_system(args.system_file)
    try:
        system, args.notes = prepared_for_numerics(system)
    except NumagError as err:
        raise SystemFileError(str(err), args.system_file) from None
    return system


def _guard_paths(args, system, command):
    """Refuse before any tracking when the paths a command may need exceed ``--max-paths``.

    decompose (and check, which decomposes X): the regeneration's bound of F. singular and compare
    add the cheaper of the two formulations of "rank J < c" for the codimension of a complete
    intersection. solve checks its exact Bezout number itself (before allocating anything).
    """
    n = system.ambient_dimension
    degrees = system.degrees
    estimate = regeneration_bound(degrees, n)
    if command in ("singular", "compare"):
        c = min(len(degrees), n)
        minor = sum(sorted(d - 1 for d in degrees)[-c:]) if c else 0
        minors = regeneration_bound(degrees + [minor] * (n - c + 1), n)
        null_vector = regeneration_bound(degrees + [max(degrees)] * n + [1], n + c)
        estimate += min(minors, null_vector)
    if estimate > args.max_paths:
        raise NumagError(f"'numag {command}' may need about {estimate:,} paths (the regeneration's bound from the "
                         f"degrees; structured systems often need far fewer), over the limit of {args.max_paths:,}: "
                         "raise --max-paths to run it")


def _write_notes(args, out):
    for note in getattr(args, "notes", []):
        out.write(f"note: {note}\n")


def _with_notes(data, args):
    notes = getattr(args, "notes", [])
    if notes:
        data["notes"] = list(notes) + list(data.get("notes", []))
    return data


def _add_executor_options(command):
    command.add_argument("--workers", type=_count(1, _MAX_WORKERS), metavar="N",
                         help="worker processes for runs of more than one batch of paths (default: every core; "
                              "a single batch runs in-process)")
    command.add_argument("--scheduler", type=_scheduler_address, metavar="ADDRESS",
                         help="run the batches on a Dask cluster (tcp://host:8786; pip install 'numag[cluster]')")
    command.add_argument("--local-dask", action="store_true", help="start a local Dask cluster for the batches")


def _stage_executor(args):
    """The executor of the path-tracking stages (lazy: a pool starts only when a homotopy needs it)."""
    return make_executor(args.workers, args.scheduler, args.local_dask, batches=2)


def _add_certify_switch(command):
    command.add_argument("--certify", action="store_true",
                         help="certify the resulting points at --digits digits (see 'numag certify')")


def _format_complex(z):
    size = max(1.0, abs(z))
    real = 0.0 if abs(z.real) <= 1e-14 * size else z.real
    imag = 0.0 if abs(z.imag) <= 1e-14 * size else z.imag
    if imag == 0.0:
        return f"{real:.10g}"
    sign = "+" if imag >= 0 else "-"
    return f"{real:.10g}{sign}{abs(imag):.10g}*I"


def _format_point(names, point):
    return ", ".join(f"{n}={_format_complex(complex(z))}" for n, z in zip(names, point))


def _with_warnings(data):
    """The report with its ``warnings`` (what the run may have missed; see completeness_warnings)."""
    data["warnings"] = completeness_warnings(data)
    return data


def _print_warnings(data, out):
    for warning in (data or {}).get("warnings", []):
        out.write(f"\nwarning: {warning}\n")


class _Progress:
    """Progress on standard error for runs longer than a couple of seconds, at most once a second."""

    def __init__(self, quiet):
        self.quiet = quiet
        self.started = time.perf_counter()
        self.last = 0.0
        self.last_done = None
        self.base = None  # paths already done at the first report (read back from a run folder)

    def __call__(self, done, total):
        now = time.perf_counter() - self.started
        if self.base is None:  # the first report only marks where this run starts
            self.base = done if done < total else 0
            if done < total:
                return
        if self.quiet or now < 2.0 or done == self.last_done or (now - self.last < 1.0 and done < total):
            return
        self.last, self.last_done = now, done
        rate = (done - self.base) / now if now > 0 else 0.0
        left = (total - done) / rate if rate > 0 else float("inf")
        sys.stderr.write(f"numag: {done}/{total} paths ({100 * done / total:.0f}%), {rate:.0f} paths/s, "
                         f"about {left:.0f} s left\n")


class _Messages:
    """Progress messages on standard error for runs longer than a couple of seconds."""

    def __init__(self, quiet):
        self.quiet = quiet
        self.started = time.perf_counter()

    def __call__(self, message):
        now = time.perf_counter() - self.started
        if not self.quiet and now >= 2.0:
            sys.stderr.write(f"numag: {message} ({now:.0f} s)\n")
