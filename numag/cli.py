"""The command line: ``numag <command> ...`` (also ``python -m numag``).

Exit codes
----------
0  the job ran and every decision was reached
1  an unexpected internal error (please report it)
2  bad input: a file, an equation, a point or an option (one-line message)
3  the job ran, but at least one decision is undecided
"""

import argparse
import sys

from . import __version__
from .errors import NumagError
from .files import load_points, load_system, parse_point_assignment
from .report import CAUTION, check_report_to_dict, dumps
from .smoothness import CheckOptions, check_points

__all__ = ["main", "build_parser", "EXIT_OK", "EXIT_INTERNAL", "EXIT_INPUT", "EXIT_UNDECIDED"]

EXIT_OK, EXIT_INTERNAL, EXIT_INPUT, EXIT_UNDECIDED = 0, 1, 2, 3


class _Parser(argparse.ArgumentParser):
    """argparse that reports usage errors as numag does: one line, exit code 2."""

    def error(self, message):
        self.exit(EXIT_INPUT, f"numag: error: {message} (see '{self.prog} --help')\n")


def build_parser():
    """The argument parser of the ``numag`` command."""
    parser = _Parser(prog="numag", description="Where is a variety singular? Numerical algebraic "
                     "geometry by homotopy continuation.")
    parser.add_argument("--version", action="version", version=f"numag {__version__}")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    commands.required = True

    check = commands.add_parser(
        "check", help="smooth or singular at given points (Jacobian criterion, with evidence)",
        description="Decide for each point whether the variety is smooth there: rank of the Jacobian "
                    "against the local codimension, with small singular values tested at rising precision.")
    check.add_argument("system_file", metavar="FILE", help="system file (TOML)")
    check.add_argument("--point", action="append", default=[], metavar="x=..,y=..",
                       help="a point as name=value pairs (values in the equation grammar, e.g. x=1+2*I); "
                            "repeat for several points")
    check.add_argument("--points-file", metavar="JSON", help="a JSON file of points")
    check.add_argument("--local-dimension", type=int, metavar="K",
                       help="dimension of X at the points (default: assume a complete intersection)")
    check.add_argument("--digits", type=int, default=CheckOptions.max_digits, metavar="D",
                       help="highest precision (decimal digits) for undecided ranks (default %(default)s)")
    check.add_argument("--point-tolerance", type=float, default=CheckOptions.point_tolerance, metavar="T",
                       help="relative accuracy of the given points (default %(default)s)")
    check.add_argument("--seed", type=int, help="seed for the random choices (recorded in the report)")
    check.add_argument("--json", action="store_true", help="print the report as JSON")
    check.set_defaults(run=_run_check)
    return parser


def _format_complex(z):
    if abs(z.imag) <= 1e-14 * max(1.0, abs(z.real)):
        return f"{z.real:.10g}"
    sign = "+" if z.imag >= 0 else "-"
    return f"{z.real:.10g}{sign}{abs(z.imag):.10g}*I"


def _format_point(names, point):
    return ", ".join(f"{n}={_format_complex(complex(z))}" for n, z in zip(names, point))


def _print_check(report, out):
    system = report.system
    kind = "projective" if system.projective else "affine"
    out.write(f"numag check: {system.name or 'system'}: {system.n_equations} equation(s) in "
              f"{system.n_variables} variables ({kind}), seed {report.seed}\n")
    for v in report.points:
        e = v.evidence
        out.write(f"\npoint {v.index}: {_format_point(system.variables, v.given)}\n")
        out.write(f"  verdict: {v.verdict.upper()}\n")
        if v.distance > 0:
            out.write(f"  speaks about: {_format_point(system.variables, v.point)} "
                      f"(distance {v.distance:.3g} from the given point)\n")
        out.write(f"  residual of F at the given point (scaled): {v.residual:.3g}\n")
        codim = "unknown" if v.codimension is None else str(v.codimension)
        out.write(f"  rank of J: {v.rank}; a smooth point needs {codim} "
                  f"(local dimension {v.local_dimension if v.local_dimension is not None else 'unknown'}: "
                  f"{v.local_dimension_source})\n")
        out.write(f"  tangent space dimension: {v.tangent_dimension}\n")
        values = ", ".join(f"{s:.3g}" for s in e.singular_values)
        gap = "n/a" if e.gap is None else ("infinite" if e.gap == float("inf") else f"{e.gap:.3g}")
        out.write(f"  evidence: scaled singular values [{values}], zero below {e.tolerance:.2g}, gap {gap}, "
                  f"{e.digits} digits{', escalated' if e.escalated else ''}\n")
        if v.nearest_rank_drop is not None and v.verdict == "smooth":
            out.write(f"  nearest point found where the rank drops: "
                      f"{_format_point(system.variables, v.nearest_rank_drop)} "
                      f"(distance {v.nearest_rank_drop_distance:.3g})\n")
        for note in v.notes:
            out.write(f"  note: {note}\n")
    counts = ", ".join(f"{n} {c}" for n, c in report.counts().items())
    out.write(f"\nsummary: {counts}\n{CAUTION}\n")


def _run_check(args, out):
    system = load_system(args.system_file)
    points = [parse_point_assignment(text, system.variables, index)
              for index, text in enumerate(args.point, 1)]
    if args.points_file:
        points += load_points(args.points_file, system.variables)
    if not points:
        raise NumagError("no points to check: give --point x=..,y=.. or --points-file FILE.json")
    options = CheckOptions(local_dimension=args.local_dimension, point_tolerance=args.point_tolerance,
                           max_digits=args.digits)
    report = check_points(system, points, options, seed=args.seed)
    if args.json:
        out.write(dumps(check_report_to_dict(report)) + "\n")
    else:
        _print_check(report, out)
    return EXIT_UNDECIDED if report.undecided else EXIT_OK


def main(argv=None, out=None):
    """Run the command line; returns the exit code.

    Examples
    --------
    >>> import io
    >>> main(["check", "no-such-file.toml", "--point", "x=0"], out=io.StringIO())
    2
    """
    out = out or sys.stdout
    args = build_parser().parse_args(argv)
    try:
        return args.run(args, out)
    except NumagError as err:
        message = str(err)
        sys.stderr.write(f"numag: error: {message}\n")
        return EXIT_INPUT
    except KeyboardInterrupt:
        sys.stderr.write("numag: interrupted\n")
        return 130
    except BrokenPipeError:  # the reader (e.g. `head`) went away: nothing more to say
        try:
            sys.stdout = None
        finally:
            return EXIT_OK
    except Exception as err:  # noqa: BLE001 - last resort: one line, never a traceback
        sys.stderr.write(f"numag: internal error: {type(err).__name__}: {err} (please report this with the "
                         "command and input)\n")
        return EXIT_INTERNAL


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
