"""``numag check``: smooth or singular at given points (the Jacobian criterion, with evidence)."""

import numpy as np

from ...errors import NumagError
from ...system.exact import ExactCoefficient
from ...system.files import load_points, parse_point_assignment
from ...numeric.seeds import resolved_seed
from ...witness.decompose import DecomposeOptions, decompose
from ...singular.smoothness import CheckOptions, check_points
from ...system.files import load_angles
from ...anatomy.survey import check_anatomy, projective_chart
from ..anatomy_text import attach_to_check, write_point_anatomy
from ...singular.kinds import Verdict
from ..report import (CAUTION, check_report_to_dict, check_warnings, completeness_warnings, decomposition_from_dict,
                      decomposition_to_dict, dumps, read_report,
                      system_to_dict)
from .certify import _certified, _print_certification
from . import SUMMARIES
from .plot import add_plot_options, check_plot_request, plot_after, with_angles
from .common import (EXIT_OK, EXIT_UNDECIDED, _add_certify_switch, _add_work_options, _counted, _format_point,
                     _guard_paths, _headline, _load, _PointFormat, _positive_number, _print_warnings, _progress, _seed,
                     _with_notes, _write_notes)


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
    check.add_argument("--decomposition", metavar="JSON",
                       help="reuse the components of X from a saved 'numag decompose --json' report of the "
                            "same system instead of decomposing X again")
    check.add_argument("--without-components", action="store_true",
                       help="do not decompose X: assume a complete intersection unless --local-dimension "
                            "is given (faster on large systems, wrong on reducible X)")
    check.add_argument("--digits", type=int, default=CheckOptions.max_digits, metavar="D",
                       help="highest precision (decimal digits) for undecided ranks (default %(default)s)")
    check.add_argument("--point-tolerance", type=_positive_number, default=CheckOptions.point_tolerance, metavar="T",
                       help="relative accuracy of the given points, in the units they are given in (default: "
                            "from the data: exact points are judged exactly, decimals of 15 or more digits to their "
                            "last digit)")
    check.add_argument("--seed", type=_seed, help="seed for the random choices (recorded in the report)")
    check.add_argument("--json", action="store_true", help="print the report as JSON")
    check.add_argument("--anatomy", action="store_true",
                       help="at singular points also the anatomy: multiplicity, type, Milnor and Tjurina numbers, "
                            "branches of curves")
    _add_certify_switch(check)
    _add_work_options(check)
    add_plot_options(check)
    check.set_defaults(run=run)


def _print_check(report, out, data=None, anatomies=None):
    system = report.system
    out.write(_headline("check", system, report.seed))
    text = _PointFormat()
    # the given points' accuracy, and so of what they move to (None: from the data, decision 0072)
    accuracy = report.options.point_tolerance or 0.0
    for v in report.points:
        e = v.evidence
        out.write(f"\npoint {v.index}: {_format_point(system.variables, v.given)}\n")
        out.write(f"  verdict: {v.verdict.upper()}\n")
        unreached = v.verdict == "undecided" and v.local_dimension_source == "not judged (no point of X reached)"
        if v.verdict == "off" or unreached:  # nothing judged (undecided: no point of X reached, decision 0120)
            out.write(f"  residual of F at the given point (scaled): {v.residual:.3g}\n")
            if not unreached:
                out.write(f"  Newton moved it {v.distance:.3g} (to {text(system.variables, v.point, accuracy)})\n")
            for note in v.notes:
                out.write(f"  note: {note}\n")
            continue
        if v.distance > 0:
            out.write(f"  speaks about: {text(system.variables, v.point, accuracy)} "
                      f"(distance {v.distance:.3g} from the given point)\n")
        out.write(f"  residual of F at the given point (scaled): {v.residual:.3g}\n")
        if v.judged is not None:  # decision 0072: which point the verdict is about
            out.write(f"  judged: {v.judged}"
                      + (f" (the digits given allow it to be off by {v.data_radius:.3g})" if v.data_radius else "")
                      + "\n")
        if v.on_x_exactly is not None:
            out.write(f"  membership: F {'vanishes' if v.on_x_exactly else 'does not vanish'} at the given point "
                      "in exact arithmetic\n")
        codim = "unknown" if v.codimension is None else str(v.codimension)
        out.write(f"  rank of J: {v.rank}; a smooth point needs {codim} "
                  f"(local dimension {v.local_dimension if v.local_dimension is not None else 'unknown'}: "
                  f"{v.local_dimension_text()})\n")
        out.write(f"  tangent space dimension: {v.tangent_dimension}\n")
        values = ", ".join(f"{s:.3g}" for s in e.singular_values)
        gap = "n/a" if e.gap is None else ("infinite" if e.gap == float("inf") else f"{e.gap:.3g}")
        out.write(f"  evidence: scaled singular values [{values}], zero below {e.tolerance:.2g}, gap {gap}, "
                  f"{e.digits} digits{', escalated' if e.escalated else ''}\n")
        if v.backward_error is not None:
            out.write(f"  backward error: a relative change of {v.backward_error:.3g} of the coefficients makes it "
                      f"singular (double-precision input resolves {v.backward_tolerance:.2g}; "
                      f"{'near-singular' if v.near_singular else 'clear'})\n")
        if v.nearest_rank_drop is not None and v.verdict is Verdict.SMOOTH:
            out.write(f"  nearest point found where the rank drops: "
                      f"{text(system.variables, v.nearest_rank_drop, accuracy)} "
                      f"(distance {v.nearest_rank_drop_distance:.3g})\n")
        if v.components:
            names = ", ".join(f"{c['id']} (dimension {c['dimension']}, degree {c['degree']})" for c in v.components)
            out.write(f"  components of X through the point: {names}\n")
        for note in v.notes:
            out.write(f"  note: {note}\n")
        if anatomies and v.index in anatomies:
            out.write("  anatomy:\n")
            names = projective_chart(system, v.point)[1] if system.projective else system.variables
            write_point_anatomy(anatomies[v.index], names, out, "    ")
    counts = ", ".join(f"{n} {c}" for n, c in report.counts().items())
    out.write(f"\nsummary: {counts}\n")
    _print_warnings(data, out)
    _print_certification(data, out)
    out.write(("\n" + text.footnote()) if text.used else "")
    out.write(f"\n{CAUTION}\n")


def _saved_decomposition(args, system):
    """The decomposition of a saved report, refused (one line naming the file) when it is of another system."""
    if args.local_dimension is not None or args.without_components:
        raise NumagError("--decomposition gives the local dimension from the components of X: it excludes "
                         "--local-dimension and --without-components")
    if system.projective:
        raise NumagError("--decomposition: decompositions are of affine systems, this one is projective")
    where = args.decomposition
    data = read_report(where)
    if data.get("command") != "decompose":
        raise NumagError(f"{where}: not a report of 'numag decompose' (it is of {str(data.get('command'))[:20]!r})")
    try:
        decomposition, _ = decomposition_from_dict(data)
    except NumagError as err:
        raise NumagError(f"{where}: {err}") from None
    except (KeyError, TypeError, ValueError, AttributeError, IndexError, OverflowError) as err:
        raise NumagError(f"{where}: the decomposition report is damaged ({type(err).__name__}: "
                         f"{str(err)[:80]})") from None
    _check_components(decomposition, where)
    saved, ours = system_to_dict(decomposition.system), system_to_dict(system)
    for key in ("variables", "equations"):
        if saved[key] != ours[key]:
            raise NumagError(f"{where}: the decomposition is of another system (its {key} differ from "
                             f"{args.system_file}'s)")
    return decomposition


def _check_components(decomposition, where):
    """Refuse a saved decomposition whose components cannot be witness sets of its system (one line)."""
    n = decomposition.system.n_variables
    for k, c in enumerate(decomposition.components, 1):
        shapes_fit = (0 <= c.dimension <= n and c.degree >= 1 and c.multiplicity >= 1
                      and c.points.shape == (c.degree, n) and c.slice_rows.shape == (c.dimension, n + 1)
                      and np.ndim(c.real) == 1 and len(c.real) == c.degree)
        if not shapes_fit or not (np.all(np.isfinite(c.points)) and np.all(np.isfinite(c.slice_rows))):
            raise NumagError(f"{where}: component {k} is damaged (its dimension, degree, witness points and slice "
                             "do not fit together, or are not finite)")


def _with_exact_points(data, points, accuracies, system):
    """The report with each exactly given point's coordinates as texts (``given_exact``): certificates decide
    at such a point in exact arithmetic (decision 0133). Points a saved report states an accuracy for were
    computed: they get none."""
    if system.projective:
        return data
    for entry, point, accuracy in zip(data["points"], points, accuracies):
        if accuracy is None and all(isinstance(c, ExactCoefficient) for c in point):
            entry["given_exact"] = [c.to_text() for c in point]
    return data


def run(args, out):
    system = _load(args)
    check_plot_request(args, system)
    points = [parse_point_assignment(text, system.variables, index)
              for index, text in enumerate(args.point, 1)]
    accuracies = [None] * len(points)  # a saved singular report states its points' accuracy (decision 0110)
    if args.points_file:
        from ...singular.locus import POINT_TOLERANCE  # here: the module is large, and --help needs none of it
        # an older singular report states no accuracy: its points get the tolerance they were judged at
        points += load_points(args.points_file, system.variables, accuracies, unstated_tolerance=POINT_TOLERANCE)
    if not points:
        raise NumagError("no points to check: give --point x=..,y=.. or --points-file FILE.json")
    options = CheckOptions(local_dimension=args.local_dimension, point_tolerance=args.point_tolerance,
                           max_digits=args.digits)
    options.validated(system)
    decomposition = None
    seed = resolved_seed(args.seed)
    if args.decomposition:
        decomposition = _saved_decomposition(args, system)
    elif args.local_dimension is None and not args.without_components and not system.projective:
        _guard_paths(args, system, "check")
        decomposition = decompose(system, seed=seed, progress=_progress(args))
    _progress(args)(f"judging {_counted(len(points), 'point')} by the Jacobian criterion")
    report = check_points(system, points, options, seed=seed, decomposition=decomposition, accuracies=accuracies)
    anatomies = None
    if args.anatomy:
        anatomies = check_anatomy(report, decomposition, load_angles(args.system_file, system.variables))
    data = with_angles(_certified(_with_exact_points(_with_notes(check_report_to_dict(report), args), points,
                                                     accuracies, system), args), args.system_file)
    # The components through each point and the local dimension come from the decomposition: what its run may
    # have missed (failed paths, groups the trace test did not confirm) is said here too, and exit code 3.
    components_doubts = [] if decomposition is None else completeness_warnings(
        decomposition_to_dict(decomposition, decomposition.options or DecomposeOptions()))
    if components_doubts:
        data["decomposition_warnings"] = components_doubts
    if anatomies is not None:
        attach_to_check(data, anatomies)
        data["anatomy_incomplete"] = sorted(k for k, a in anatomies.items() if a.incomplete)
    # every reason for exit 3 below, one sentence each, in the report too (as `singular` writes them)
    data["warnings"] = check_warnings(data)
    if args.json:
        out.write(dumps(data) + "\n")
    else:
        _write_notes(args, out)
        _print_check(report, out, data, anatomies)
    pictured = plot_after(data, args, out)
    # the warnings name every reason (undecided or off points, near-singular verdicts, doubtful certificates,
    # incomplete anatomies, the decomposition's doubts): one place decides both the lines and the exit code
    return EXIT_UNDECIDED if data["warnings"] or pictured else EXIT_OK
