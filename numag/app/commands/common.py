"""What every sub-command shares: exit codes, option types and option groups (work limits, executors,
``--certify``), loading a system file for numerical work, the path guard, notes and warnings, point
formatting and the progress reporter.

Examples
--------
>>> _format_point(["x", "y"], [1, 2 - 1j])
'x=1, y=2-1*I'
"""

import argparse
import math
import re

from ...errors import NumagError, SystemFileError
from ...system.display import counted as _counted
from ...system.files import load_family
from ...system.polynomial import prepared_for_numerics, regeneration_bound
from ...run.executor import WorkLimits, make_executor
from ..progress import Reporter
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


def _add_at_option(command):
    """``--at b=3,c=1/2``: every sub-command that reads a system file solves one member of a family."""
    command.add_argument("--at", metavar="VALUES", help="for a system file with parameters: their values, "
                         "e.g. b=3,c=1/2 (substituted exactly)")


def _add_fixing_option(command):
    """``--at c=4`` on the family commands: some parameters fixed (exactly), the others left free."""
    command.add_argument("--at", metavar="VALUES", help="fix some of the parameters, e.g. c=4 (substituted "
                         "exactly); the others stay free")


def _load_free_family(args, purpose):
    """The family of ``args.system_file`` with the parameters of ``--at`` fixed; refused without parameters."""
    family = load_family(args.system_file)
    if not family.parameters:
        raise SystemFileError(f"has no 'parameters': {purpose}", args.system_file, "parameters")
    return family.fixing(args.at) if getattr(args, "at", None) else family


def _load_member(path, at):
    """The system of a file; for a family, its member at the values of ``--at`` (exactly substituted)."""
    family = load_family(path)
    if not family.parameters:
        if at:
            raise SystemFileError("has no parameters, but --at gives values", path)
        return family.system
    if not at:
        raise SystemFileError(f"describes a family with parameters {', '.join(family.parameters)}: give their "
                              f"values (--at {family.parameters[0]}=...)", path, "parameters")
    return family.member(family.values_from_text(at))


def _load(args):
    """The system file as numerical work needs it (zero equations dropped, huge coefficients rescaled)."""
    system = _load_member(args.system_file, getattr(args, "at", None))
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


def _unsearched(lowest, dimension=None):
    """What ``--lowest-dimension K`` left out, for the counts it affects ('' when nothing was left out).

    ``dimension``: the count is of sets of this one dimension (entirely unsearched when below K).

    Examples
    --------
    >>> _unsearched(2), _unsearched(1, dimension=0), _unsearched(None)
    (' (dimensions below 2 not searched: --lowest-dimension 2)', ' (not searched: --lowest-dimension 1)', '')
    """
    if not lowest:
        return ""
    if dimension is not None and dimension < lowest:
        return f" (not searched: --lowest-dimension {lowest})"
    return f" (dimensions below {lowest} not searched: --lowest-dimension {lowest})"


def _headline(command, system, seed, kind=True):
    """The first line of a command's report: the system, its size and the seed."""
    space = f" ({'projective' if system.projective else 'affine'})" if kind else ""
    return (f"numag {command}: {system.name or 'system'}: {_counted(system.n_equations, 'equation')} in "
            f"{_counted(system.n_variables, 'variable')}{space}, seed {seed}\n")


#: Parts of a coordinate below this (relative to the point) are rounding, whatever the point's accuracy.
_ROUNDING = 1e-14


def _significant_digits(part, floor, known=False):
    """Significant digits of ``part`` worth printing: 10, or where ``known`` is set, only those above ``floor``.

    A part known to ``floor`` (a triple root to 1e-8) printed with 10 digits shows noise as data
    ("1.000000007"); its last printed digit is kept at or above the floor.

    Examples
    --------
    >>> _significant_digits(1.000000007, 2e-8, known=True), _significant_digits(1.000000007, 2e-8)
    (8, 10)
    >>> _significant_digits(123.456, 0.05, known=True)
    4
    """
    if not known or part == 0.0 or floor <= 0.0:
        return 10
    return max(1, min(10, math.floor(math.log10(abs(part))) - math.ceil(math.log10(floor)) + 1))


def _format_complex(z, floor=None, known=False, digits=None):
    """A coordinate as text; real or imaginary parts of size at most ``floor`` are printed as 0.

    With ``known`` the floor is the point's accuracy and the parts keep no digit below it; ``digits``
    (significant digits of each part) overrides both.
    """
    floor = _ROUNDING * max(1.0, abs(z)) if floor is None else floor
    real = 0.0 if abs(z.real) <= floor else z.real
    imag = 0.0 if abs(z.imag) <= floor else z.imag
    a, b = _significant_digits(real, floor, known), _significant_digits(imag, floor, known)
    if digits is not None:
        a = b = digits
    if imag == 0.0:
        return f"{real:.{a}g}"
    if real == 0.0:  # purely imaginary: no "0+" in front
        return f"{imag:.{b}g}*I"
    sign = "+" if imag >= 0 else "-"
    return f"{real:.{a}g}{sign}{abs(imag):.{b}g}*I"


def _rounding_floor(result):
    """Parts below this are printed as 0: rounding relative to the largest value of one parameter found.

    With one parameter a discriminant point at 0 comes out as 1e-13 beside points near 200; printed
    alone it would read as a value.
    """
    if len(result.parameters) != 1:
        return None
    values = [abs(complex(v)) for v in result.real_points]
    values += [abs(complex(c.points[0, 0])) for c in result.components if c.dimension == 0 and len(c.points)]
    return _ROUNDING * max([1.0] + values)  # as _format_complex: never below its own floor


def _format_point(names, point):
    return ", ".join(f"{n}={_format_complex(complex(z))}" for n, z in zip(names, point))


def _distinct_digits(values):
    """Significant digits (10 at least, 17 at most) at which distinct ``values`` print distinct.

    Values the user chose (a family's parameter values) are data, not rounding: two of them 1e-14 apart
    printed with 10 digits read as the same value. 17 digits tell any two doubles apart (IEEE 754).

    Examples
    --------
    >>> _distinct_digits([1.0, 2.0]), _distinct_digits([2.0, 2.0 + 1e-14]), _distinct_digits([1.0, 1.0])
    (10, 15, 10)
    """
    values = [complex(v) for v in values]
    wanted = len(set(values))
    for digits in range(10, 17):
        if len({_format_complex(v, 0.0, digits=digits) for v in values}) == wanted:
            return digits
    return 17


def _format_values(names, points):
    """Each of ``points`` (parameter values) as ``name=value`` text, every parameter with the digits that
    keep its distinct values apart (``_distinct_digits``); parts are never treated as rounding.

    Examples
    --------
    >>> _format_values(["p"], [[1.99999999999999], [2.0], [2.00000000000001]])
    ['p=1.99999999999999', 'p=2', 'p=2.00000000000001']
    """
    columns = list(zip(*points)) or [[] for _ in names]
    digits = [_distinct_digits(column) for column in columns]
    return [", ".join(f"{n}={_format_complex(complex(z), 0.0, digits=d)}" for n, z, d in zip(names, point, digits))
            for point in points]


#: Accuracy (relative) of witness and sample points refined on X in double precision.
_WITNESS_ACCURACY = 1e-10


def _root_accuracy(digits, multiplicity):
    """Relative accuracy of a root of the given multiplicity refined at ``digits`` digits: about eps^(1/m)
    (common practice: a root of multiplicity m moves by eps^(1/m) under perturbations of size eps).

    Examples
    --------
    >>> _root_accuracy(16, 1), _root_accuracy(16, 2)
    (1e-14, 1e-06)
    """
    return max(_ROUNDING, 100 * (10.0 ** -digits) ** (1.0 / max(1, int(multiplicity))))


#: The coarsest relative accuracy a printed point is rounded to.
_COARSEST = 0.1


class _PointFormat:
    """Points as text with the noise below their accuracy printed as 0, and one footnote saying so.

    A computed point is known only to its accuracy (relative to ``sqrt(1 + |p|^2)``): a real or
    imaginary part below it is noise of the computation (1e-17*I on a real point), and printed as 0.
    The JSON report keeps every digit.

    Examples
    --------
    >>> text = _PointFormat()
    >>> text(["x", "y"], [1 + 3e-12j, 2e-9], accuracy=1e-8)
    'x=1, y=0'
    >>> text(["w", "x", "p"], [1e-13, 1e-13, 1.0], accuracy=1.7)  # a point at infinity of multiplicity 9
    'w=0, x=0, p=1'
    >>> text(["x"], [1.000000007], accuracy=1e-8)  # a triple root: no digit below its accuracy
    'x=1'
    >>> text.footnote()[:22]
    'note: digits below the'
    """

    def __init__(self):
        self.used = []  # the accuracies that turned a nonzero part into 0

    def __call__(self, names, point, accuracy=_ROUNDING):
        values = [complex(z) for z in point]
        size = math.sqrt(1.0 + sum(abs(z) ** 2 for z in values))
        # at most 0.1: a root of multiplicity 9 is known to about 100 eps^(1/9) > 1, and its largest coordinate (1
        # for a point at infinity) was printed as 0
        floor = min(max(accuracy, _ROUNDING), _COARSEST) * size
        # digits below the accuracy are noise too: a triple root known to 1e-8 is not printed as 1.000000007
        known = accuracy > _ROUNDING
        parts = [part for z in values for part in (z.real, z.imag)]
        if known and any(0 < abs(part) <= floor or (abs(part) > floor and _significant_digits(part, floor, True) < 10)
                         for part in parts):
            self.used.append(accuracy)
        return ", ".join(f"{n}={_format_complex(z, floor, known)}" for n, z in zip(names, values))

    def footnote(self):
        """One line for the end of the report ('' when no part was rounded to 0)."""
        if not self.used:
            return ""
        low, high = min(self.used), max(self.used)
        accuracy = f"{high:.0e}" if low == high else f"{low:.0e} to {high:.0e}"
        return (f"note: digits below the points' accuracy ({accuracy}, relative to sqrt(1 + |point|^2)) are not "
                "printed, and real or imaginary parts below it are printed as 0; the JSON report (--json) keeps every "
                "digit.\n")


def _with_warnings(data):
    """The report with its ``warnings`` (what the run may have missed; see completeness_warnings)."""
    data["warnings"] = completeness_warnings(data)
    return data


def _print_warnings(data, out):
    for warning in (data or {}).get("warnings", []):
        out.write(f"\nwarning: {warning}\n")


def _reporter(args):
    """The progress reporter of a sub-command (see :mod:`numag.app.progress`): quiet with --json or --quiet.

    ``main`` opens one for the run and puts it in ``args.progress``; every stage of every command reports to it.
    """
    return Reporter(quiet=bool(getattr(args, "json", False) or getattr(args, "quiet", False)))


def _progress(args):
    """The run's progress reporter (a quiet one when a command runs without ``main``)."""
    return getattr(args, "progress", None) or Reporter(quiet=True)
