"""The command line: ``numag <command> ...`` (also ``python -m numag``).

Exit codes
----------
0  the job ran and every decision was reached
1  an unexpected internal error (please report it)
2  bad input: a file, an equation, a point or an option (one-line message)
3  the job ran, but at least one decision is undecided (compare: the reference did not finish)
4  compare: numag and the exact reference disagree
"""

import argparse
import importlib
import signal
import sys
import traceback
import warnings

from ..errors import NumagError, one_line
from ..version import __version__
from .commands import EXIT_INPUT, EXIT_INTERNAL, EXIT_MISMATCH, EXIT_OK, EXIT_UNDECIDED, SUMMARIES

__all__ = ["main", "build_parser", "EXIT_OK", "EXIT_INTERNAL", "EXIT_INPUT", "EXIT_UNDECIDED", "EXIT_MISMATCH"]


class _Parser(argparse.ArgumentParser):
    """argparse that reports usage errors as numag does: one line, exit code 2."""

    def error(self, message):
        self.exit(EXIT_INPUT, f"numag: error: {message} (see '{self.prog} --help')\n")


def build_parser(detailed=None):
    """The argument parser of the ``numag`` command.

    Parameters
    ----------
    detailed : collection of str, optional
        The sub-commands whose options are added (their modules, and the stages behind them, are
        imported); the others are only listed with their summaries. None: all of them.
    """
    parser = _Parser(prog="numag", description="Where is a variety singular? Numerical algebraic "
                     "geometry by homotopy continuation.")
    parser.add_argument("--version", action="version", version=f"numag {__version__}")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    commands.required = True

    for name, summary in SUMMARIES.items():
        if detailed is None or name in detailed:
            importlib.import_module(f".commands.{name}", __package__).add_parser(commands)
        else:
            commands.add_parser(name, help=summary)
    if detailed is None or set(detailed) - _WITHOUT_AT:
        from .commands.common import _add_at_option
        for name, command in commands.choices.items():  # a member of a family (issue 22): one option everywhere
            if name not in _WITHOUT_AT:
                _add_at_option(command)
    _add_debug_switch(parser, commands)
    return parser


#: Sub-commands without ``--at``: they read a report (its system is a member already) or take whole families.
_WITHOUT_AT = {"certify", "discriminant", "sweep", "plot"}


def _add_debug_switch(parser, commands):
    """``--debug`` and ``--quiet``, before or after the sub-command."""
    switches = {"--debug": "on an internal error, show the traceback (for a bug report) besides the one-line message",
                "--quiet": "no progress on standard error (--json is quiet too)"}
    for switch, help_text in switches.items():
        parser.add_argument(switch, action="store_true", help=help_text)
        for command in commands.choices.values():
            command.add_argument(switch, action="store_true", default=argparse.SUPPRESS, help=help_text)


def _requested_command(argv):
    """The sub-command named on the command line, as a set of at most one name.

    ``numag --help`` and ``numag --version`` then import no command (a second each otherwise).
    """
    words = sys.argv[1:] if argv is None else argv
    first = next((word for word in words if not str(word).startswith("-")), None)
    return {first} if first in SUMMARIES else set()


def main(argv=None, out=None):
    """Run the command line; returns the exit code.

    Examples
    --------
    >>> import io
    >>> main(["check", "no-such-file.toml", "--point", "x=0"], out=io.StringIO())
    2
    """
    out = out or sys.stdout
    try:
        args = build_parser(_requested_command(argv)).parse_args(argv)
    except SystemExit as stop:  # usage errors (already printed on one line), --help, --version
        return stop.code if isinstance(stop.code, int) else EXIT_INPUT
    import numpy as np  # here, not at the top: `numag --help` does not need numpy

    from ..run.executor import WorkLimits, work_limits
    from .commands.common import _reporter

    limits = WorkLimits(max_paths=getattr(args, "max_paths", WorkLimits.max_paths),
                        max_memory=int(getattr(args, "max_memory", WorkLimits.max_memory / 1024 ** 3) * 1024 ** 3))
    previous = _on_terminate()
    try:
        # numpy's floating-point warnings are not messages for the user: every result carries its
        # own evidence (residuals, path statuses), and exit codes count what failed
        with warnings.catch_warnings(), np.errstate(all="ignore"), work_limits(limits), _reporter(args) as progress:
            warnings.simplefilter("ignore", RuntimeWarning)
            args.progress = progress  # one reporter for every stage of the run (quiet with --json, --quiet)
            return args.run(args, out)
    except NumagError as err:
        sys.stderr.write(f"numag: error: {one_line(str(err))}\n")
        return EXIT_INPUT
    except SystemExit as stop:  # SIGTERM: temporary files were removed on the way out
        if stop.code == 128 + signal.SIGTERM:
            sys.stderr.write("numag: terminated\n")
        raise
    except KeyboardInterrupt:
        sys.stderr.write("numag: interrupted\n")
        return 130
    except BrokenPipeError:  # the reader (e.g. `head`) went away: nothing more to say
        try:
            sys.stdout = None
        finally:
            return EXIT_OK
    except Exception as err:  # noqa: BLE001 - last resort: one line, a traceback only when asked for (--debug)
        if getattr(args, "debug", False):
            traceback.print_exc(file=sys.stderr)
        sys.stderr.write(f"numag: internal error: {type(err).__name__}: {one_line(str(err))[:300]} (please report this with the "
                         "command and input)\n")
        return EXIT_INTERNAL
    finally:
        if previous is not None:
            signal.signal(signal.SIGTERM, previous)


def _on_terminate():
    """On SIGTERM: stop the workers, then leave through SystemExit so that temporary files are removed.

    Returns the previous handler (None when not in the main thread, where handlers cannot be set).
    """
    from ..run.executor import abort_workers  # already imported by main: no import inside the handler

    def handler(signum, frame):
        abort_workers()
        raise SystemExit(128 + signum)

    try:
        return signal.signal(signal.SIGTERM, handler)
    except ValueError:  # not the main thread (a library caller running main in a thread)
        return None


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
