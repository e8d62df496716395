"""Saving results to JSON and reading them back: :func:`save` and :func:`load` for every result type.

A saved result is the same JSON envelope the command line writes with ``--json`` (see
:mod:`numag.app.report`), so a report saved from Python can be read by ``numag certify``,
``check --points-file`` or ``check --decomposition``, and a report written by the command line
can be loaded in Python. The files hold JSON only (never pickle): loading a file runs no code
from it.

=============================  ===================  =====================================
result type                    ``command`` written  read back as
=============================  ===================  =====================================
:class:`CheckReport`           ``check``            ``CheckReport``
:class:`SolveResult`           ``solve``            ``SolveResult``
:class:`Decomposition`         ``decompose``        ``Decomposition``
:class:`SingularLocus`         ``singular``         ``SingularLocus``
:class:`Comparison`            ``compare``          ``Comparison``
:class:`Certificate`           ``certificate``      ``Certificate``
:class:`SweepResult`           ``sweep``            ``SweepResult``
:class:`Discriminant`          ``discriminant``     ``Discriminant``
=============================  ===================  =====================================

The families' results (``numag sweep``, ``numag discriminant``) carry their own ``kind`` beside the
envelope's keys; files written before they had an envelope (a ``kind`` and no ``command``, as
``--output`` wrote them) and the commands' ``--json`` output load as well.

Examples
--------
>>> import os, tempfile
>>> from numag.system.parse import parse_system
>>> from numag.singular.smoothness import check_points
>>> report = check_points(parse_system(["y^2 - x^3"], ["x", "y"]), [[0, 0]], seed=0)
>>> path = os.path.join(tempfile.mkdtemp(), "check.json")
>>> save(report, path)
>>> load(path).points[0].verdict
'singular'
"""

from ..errors import InputError
from ..version import __version__
from ..tracking.solve import SolveOptions, SolveResult
from ..witness.decompose import Decomposition, DecomposeOptions
from ..singular.locus import SingularLocus, SingularOptions
from ..singular.smoothness import CheckReport
from ..families.discriminant import Discriminant
from ..families.sweep import SweepResult
from ..certify.records import Certificate
from .compare import Comparison
from .report import (CAUTION, certificate_from_dict, certificate_to_dict, check_report_from_dict,
                     check_report_to_dict, check_warnings, completeness_warnings, discriminant_warnings,
                     compare_from_dict, compare_to_dict, decomposition_from_dict,
                     decomposition_to_dict, read_report, singular_from_dict, singular_to_dict,
                     solve_report_from_dict, solve_report_to_dict, write_report)

__all__ = ["save", "load", "to_dict", "from_dict"]

#: Results whose envelope records the options of the run: their default options.
_DEFAULT_OPTIONS = {SolveResult: SolveOptions, Decomposition: DecomposeOptions, SingularLocus: SingularOptions}

#: The families' results: they write their own dictionaries (with a ``kind``), wrapped in the envelope.
_FAMILY_RESULTS = {"sweep": SweepResult, "discriminant": Discriminant}

_DEFAULTS_NOTE = ("The options of the run were not given when the result was saved: the options recorded here "
                  "are the defaults.")


def to_dict(result, options=None):
    """The JSON envelope of a result (what :func:`save` writes).

    Parameters
    ----------
    result : CheckReport, SolveResult, Decomposition, SingularLocus, Comparison, Certificate, SweepResult, Discriminant
    options : SolveOptions, DecomposeOptions or SingularOptions, optional
        The options of the run, recorded in the envelope (solve, decompose, singular). When not
        given, the result's own ``options`` (those of its run, or those its report recorded); when it has
        none either, the defaults are recorded and a note says so.

    Returns
    -------
    dict

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> from numag.singular.smoothness import check_points
    >>> to_dict(check_points(parse_system(["x - 1"], ["x"]), [[1]], seed=0))["counts"]["smooth"]
    1
    """
    if isinstance(result, CheckReport):
        data = check_report_to_dict(result)
        data["warnings"] = check_warnings(data)  # as the command line writes them
        return data
    if isinstance(result, Comparison):
        return compare_to_dict(result)
    if isinstance(result, Certificate):
        return {"numag_version": __version__, "command": "certificate", "certificate": certificate_to_dict(result),
                "caution": CAUTION}
    for command, kind in _FAMILY_RESULTS.items():
        if isinstance(result, kind):
            data = {"numag_version": __version__, "command": command, **result.to_dict(), "caution": CAUTION}
            if kind is Discriminant:
                data["warnings"] = discriminant_warnings(result)  # as the command line writes them
            return data
    for kind, write in ((SolveResult, solve_report_to_dict), (Decomposition, decomposition_to_dict),
                        (SingularLocus, singular_to_dict)):
        if isinstance(result, kind):
            options = result.options if options is None else options
            defaults = options is None
            data = write(result, _DEFAULT_OPTIONS[kind]() if defaults else options)
            if defaults and _DEFAULTS_NOTE not in data.get("notes", []):
                data["notes"] = list(data.get("notes", [])) + [_DEFAULTS_NOTE]
            data["warnings"] = completeness_warnings(data)  # as the command line writes them
            return data
    raise InputError(f"numag cannot save a {type(result).__name__}: give a result of check_points, solve_system, "
                     "decompose, singular_locus, compare_system, sweep, discriminant or a certificate")


def from_dict(data, with_options=False):
    """Rebuild a result from its JSON envelope (the inverse of :func:`to_dict`).

    Parameters
    ----------
    data : dict
    with_options : bool, default False
        Also return the recorded options (None for results that record none).

    Returns
    -------
    result, or (result, options) when ``with_options``
    """
    command = data.get("command") if isinstance(data, dict) else None
    if command is None and isinstance(data, dict) and data.get("kind") in _FAMILY_RESULTS:
        command = data["kind"]  # a family's result without the envelope (older --output, --json)
    command = command if isinstance(command, str) else None
    readers = {"check": lambda d: (check_report_from_dict(d), None), "solve": solve_report_from_dict,
               "decompose": decomposition_from_dict, "singular": singular_from_dict,
               "compare": lambda d: (compare_from_dict(d), None),
               "certificate": lambda d: (certificate_from_dict(d["certificate"]), None),
               **{name: (lambda d, kind=kind: (kind.from_dict(d), None)) for name, kind in _FAMILY_RESULTS.items()}}
    if command not in readers:
        raise InputError(f"not a saved numag result (command {str(command)[:30]!r}; expected one of "
                         f"{', '.join(readers)})")
    try:
        result, options = readers[command](data)
        if isinstance(result, tuple(_DEFAULT_OPTIONS)):
            _record_options(result, options, data)
    except (KeyError, TypeError, ValueError, IndexError, AttributeError, OverflowError) as err:
        if isinstance(err, InputError):
            raise
        raise InputError(f"the report of 'numag {command}' is damaged ({type(err).__name__}: {str(err)[:80]})") \
            from None
    return (result, options) if with_options else result


def _record_options(result, options, data):
    """Give a loaded result the options its report records (None where they were only the defaults)."""
    assumed = _DEFAULTS_NOTE in (data.get("notes") or [])
    result.options = None if assumed else options
    if isinstance(result, SingularLocus):
        if assumed:  # the note is the envelope's, not the run's: saving again writes it again
            result.notes = [note for note in result.notes if note != _DEFAULTS_NOTE]


def save(result, path, options=None):
    """Save a result as a JSON report (the same envelope as the command line's ``--json``).

    Parameters
    ----------
    result : CheckReport, SolveResult, Decomposition, SingularLocus, Comparison, Certificate, SweepResult, Discriminant
    path : str or path-like
        Replaced atomically when it is a regular file.
    options : optional
        The options of the run (see :func:`to_dict`).

    Examples
    --------
    See the module's example.
    """
    write_report(path, to_dict(result, options))


def load(path, with_options=False):
    """Read a result saved by :func:`save` or by the command line's ``--json``.

    Parameters
    ----------
    path : str or path-like
    with_options : bool, default False
        Also return the recorded options.

    Raises
    ------
    InputError
        One line naming the file when it is not a readable numag result.

    Examples
    --------
    See the module's example.
    """
    data = read_report(path)
    try:
        return from_dict(data, with_options)
    except InputError as err:
        raise InputError(f"{str(path)}: {err}") from None
