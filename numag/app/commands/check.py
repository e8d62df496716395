"""``numag check``: smooth or singular at given points (the Jacobian criterion, with evidence)."""

from ...errors import NumagError
from ...system.files import load_points, parse_point_assignment
from ...numeric.seeds import resolved_seed
from ...witness.decompose import decompose
from ...singular.smoothness import CheckOptions, check_points
from ..report import CAUTION, check_report_to_dict, dumps
from .certify import _certified, _doubtful, _print_certification
from . import SUMMARIES
from .common import (EXIT_OK, EXIT_UNDECIDED, _Messages, _add_certify_switch, _add_work_options, _format_point,
                     _guard_paths, _load, _positive_number, _seed, _with_notes, _write_notes)


def add_parser(commands):
    """Add ``numag check`` to the sub-parsers ``commands`` of the command line."""
    check = commands.add_parser(
        "check", help=SUMMARIES["check"],
        description="Decide for each point whether the variety is smooth there: rank of the Jacobian "
                    "against the local codimension, with small singular values tested at rising precision.")
    check.add_argument("system_file", metavar="FILE", help="system file (TOML)")
    check.add_argument("--point", action="append", default=[], metavar="x=..,y=..",
                       help="a point as name=value pairs (values in the equation grammar, e.g. x=1+2*I); "
                            "repeat for several points")
    check.add_argument("--points-file", metavar="JSON", help="a JSON file of points")
    check.add_argument("--local-dimension", type=int, metavar="K",
                       help="dimension of X at the points (default: computed from the components of X "
                            "through each point)")
    check.add_argument("--without-components", action="store_true",
                       help="do not decompose X: assume a complete intersection unless --local-dimension "
                            "is given (faster on large systems, wrong on reducible X)")
    check.add_argument("--digits", type=int, default=CheckOptions.max_digits, metavar="D",
                       help="highest precision (decimal digits) for undecided ranks (default %(default)s)")
    check.add_argument("--point-tolerance", type=_positive_number, default=CheckOptions.point_tolerance, metavar="T",
                       help="relative accuracy of the given points (default %(default)s)")
    check.add_argument("--seed", type=_seed, help="seed for the random choices (recorded in the report)")
    check.add_argument("--json", action="store_true", help="print the report as JSON")
    _add_certify_switch(check)
    _add_work_options(check)
    check.set_defaults(run=run)


def _print_check(report, out, data=None):
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
        if v.components:
            names = ", ".join(f"{c['id']} (dimension {c['dimension']}, degree {c['degree']})" for c in v.components)
            out.write(f"  components of X through the point: {names}\n")
        for note in v.notes:
            out.write(f"  note: {note}\n")
    counts = ", ".join(f"{n} {c}" for n, c in report.counts().items())
    out.write(f"\nsummary: {counts}\n")
    _print_certification(data, out)
    out.write(f"\n{CAUTION}\n")


def run(args, out):
    system = _load(args)
    points = [parse_point_assignment(text, system.variables, index)
              for index, text in enumerate(args.point, 1)]
    if args.points_file:
        points += load_points(args.points_file, system.variables)
    if not points:
        raise NumagError("no points to check: give --point x=..,y=.. or --points-file FILE.json")
    options = CheckOptions(local_dimension=args.local_dimension, point_tolerance=args.point_tolerance,
                           max_digits=args.digits)
    options.validated(system)
    decomposition = None
    seed = resolved_seed(args.seed)
    if args.local_dimension is None and not args.without_components and not system.projective:
        _guard_paths(args, system, "check")
        decomposition = decompose(system, seed=seed, progress=_Messages(args.json))
    report = check_points(system, points, options, seed=seed, decomposition=decomposition)
    data = _certified(_with_notes(check_report_to_dict(report), args), args)
    if args.json:
        out.write(dumps(data) + "\n")
    else:
        _write_notes(args, out)
        _print_check(report, out, data)
    return EXIT_UNDECIDED if report.undecided or _doubtful(data) else EXIT_OK
