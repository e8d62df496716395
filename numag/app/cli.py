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
import math
import re
import signal
import sys
import time
import warnings

import numpy as np

from ..errors import NumagError, SystemFileError, one_line
from ..version import __version__
from ..system.files import load_angles, load_points, load_system, parse_point_assignment, system_from_mapping
from ..system.polynomial import prepared_for_numerics, regeneration_bound
from ..run.checkpoint import RunFolder
from ..run.executor import WorkLimits, abort_workers, make_executor, using, work_limits
from ..tracking.solve import Execution, SolveOptions, solve_system
from ..tracking.tracker import FAILURE_LABELS
from ..witness.cascade import WitnessOptions
from ..witness.decompose import DecomposeOptions, decompose
from ..singular.locus import FORMULATIONS, SingularOptions, singular_locus
from ..singular.smoothness import CheckOptions, check_points
from ..certify.records import CertifyOptions
from .compare import compare_system
from .report import (CAUTION, certify_report, check_report_to_dict, compare_to_dict, completeness_warnings,
                     decomposition_to_dict, dumps, read_report, singular_to_dict, solve_report_to_dict,
                     write_report)

__all__ = ["main", "build_parser", "EXIT_OK", "EXIT_INTERNAL", "EXIT_INPUT", "EXIT_UNDECIDED", "EXIT_MISMATCH"]

EXIT_OK, EXIT_INTERNAL, EXIT_INPUT, EXIT_UNDECIDED, EXIT_MISMATCH = 0, 1, 2, 3, 4


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
    check.set_defaults(run=_run_check)

    solve = commands.add_parser(
        "solve", help="isolated solutions of a square system (homotopy continuation)",
        description="Track every path of a total-degree homotopy and report the distinct isolated "
                    "solutions with multiplicities, the points at infinity, and every path's fate.")
    solve.add_argument("system_file", metavar="FILE", nargs="?",
                       help="system file (TOML); not needed with --resume (the run folder has the system)")
    solve.add_argument("--digits", type=int, default=SolveOptions.refine_digits, metavar="D",
                       help="precision (decimal digits) for refining singular solutions (default %(default)s)")
    solve.add_argument("--square-up", action="store_true",
                       help="allow more equations than unknowns (random combinations; solutions rechecked)")
    solve.add_argument("--batch-size", type=_count(1, 10**7), default=SolveOptions.batch_size, metavar="N",
                       help="paths tracked together (default %(default)s)")
    solve.add_argument("--seed", type=_seed, help="seed of the random choices (recorded in the report)")
    solve.add_argument("--json", action="store_true", help="print the report as JSON (no progress lines)")
    _add_executor_options(solve)
    solve.add_argument("--run-folder", metavar="DIR",
                       help="save the run: a manifest and every finished batch (atomic writes), for --resume")
    solve.add_argument("--resume", metavar="DIR",
                       help="continue the run saved in DIR: finished batches are read back, not tracked again")
    _add_certify_switch(solve)
    _add_work_options(solve)
    solve.set_defaults(run=_run_solve)

    locus = commands.add_parser(
        "singular", help="where X is singular: every singular point and component (the main job)",
        description="Decompose X, then find every point where the Jacobian's rank drops below the codimension "
                    "of the component it lies on, or where components meet: singular points and singular "
                    "components with dimension, degree and witness points.")
    locus.add_argument("system_file", metavar="FILE", help="system file (TOML)")
    locus.add_argument("--formulation", choices=FORMULATIONS, default=SingularOptions.formulation,
                       help="how 'rank J < c' is written: the minors, the null-vector form, the gradient "
                            "(hypersurfaces), or chosen by estimated cost (default %(default)s)")
    locus.add_argument("--lowest-dimension", type=int, metavar="K",
                       help="do not search components (of X and of the singular locus) below dimension K")
    locus.add_argument("--at-infinity", action="store_true",
                       help="several equations: also search singular points at infinity (of V(F^h); a second "
                            "computation of the same size). Hypersurfaces always get them.")
    locus.add_argument("--digits", type=int, default=SingularOptions.digits, metavar="D",
                       help="highest precision (decimal digits) for escalated rank decisions (default %(default)s)")
    locus.add_argument("--seed", type=_seed, help="seed of the random choices (recorded in the report)")
    locus.add_argument("--json", action="store_true", help="print the report as JSON (no progress lines)")
    _add_executor_options(locus)
    _add_certify_switch(locus)
    _add_work_options(locus)
    locus.set_defaults(run=_run_singular)

    parts = commands.add_parser(
        "decompose", help="irreducible components of X: dimension, degree, witness points",
        description="Witness sets of every dimension (regenerative cascade), split into irreducible "
                    "components by monodromy loops confirmed by the trace test.")
    parts.add_argument("system_file", metavar="FILE", help="system file (TOML, affine)")
    parts.add_argument("--lowest-dimension", type=int, metavar="K",
                       help="do not search components of dimension below K (default: down to points)")
    parts.add_argument("--max-loops", type=int, default=DecomposeOptions.max_loops, metavar="N",
                       help="monodromy loops per dimension before giving up confirming (default %(default)s)")
    parts.add_argument("--seed", type=_seed, help="seed of the random choices (recorded in the report)")
    parts.add_argument("--json", action="store_true", help="print the report as JSON (no progress lines)")
    _add_executor_options(parts)
    _add_work_options(parts)
    parts.set_defaults(run=_run_decompose)

    certify = commands.add_parser(
        "certify", help="certify the points of a saved report (solve, singular or check)",
        description="Prove what can be proved about each point of a saved JSON report: a box holding exactly "
                    "one zero (Krawczyk's interval test, with Smale's alpha test beside it), real where the "
                    "box is symmetric, the backward error of the other equations, exact coordinates where "
                    "they can be recognised, and rank bounds for smooth points. Writes the certificates "
                    "into the report.")
    certify.add_argument("report_file", metavar="REPORT", help="JSON report of numag solve, singular or check")
    certify.add_argument("-o", "--output", metavar="FILE",
                         help="write the certified report here (default: replace REPORT atomically)")
    certify.add_argument("--digits", type=int, default=CertifyOptions.digits, metavar="D",
                         help="precision (decimal digits) of refinement and interval arithmetic (default %(default)s)")
    certify.add_argument("--max-digits", type=int, metavar="M",
                         help="raise the precision up to M digits while a certificate stays undecided for lack of "
                              "it (default: D, no raising)")
    certify.add_argument("--numerical-only", action="store_true",
                         help="do not try to recognise exact coordinates (faster)")
    certify.add_argument("--workers", type=_count(1, _MAX_WORKERS), metavar="N",
                         help="worker processes for the points (default: in-process)")
    certify.add_argument("--json", action="store_true", help="print the certified report as JSON")
    certify.set_defaults(run=_run_certify)

    versus = commands.add_parser(
        "compare", help="numag's singular locus beside an exact Groebner-basis reference (sympy)",
        description="Run numag's singular locus and an exact reference (sympy Groebner bases of F and the "
                    "c x c minors, in a child process with a time limit) and print side by side: dimensions, "
                    "degrees, counts, the largest distance between numerical and exact points, both times.")
    versus.add_argument("system_file", metavar="FILE", help="system file (TOML)")
    versus.add_argument("--time-limit", type=_positive_number, default=60.0, metavar="S",
                        help="seconds the exact reference may take (default %(default)s)")
    versus.add_argument("--tolerance", type=_positive_number, default=1e-6, metavar="T",
                        help="largest relative distance of matched points that still agrees (default %(default)s)")
    versus.add_argument("--seed", type=_seed, help="seed of the random choices (recorded in the report)")
    versus.add_argument("--json", action="store_true", help="print the comparison as JSON")
    _add_work_options(versus)
    versus.set_defaults(run=_run_compare)
    return parser


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


def _run_check(args, out):
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
    seed = args.seed if args.seed is not None else int(np.random.SeedSequence().entropy % (2**32))
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


#: Certificates of ``--certify`` start at this precision and rise up to the command's --digits when needed.
_CERTIFY_START_DIGITS = 30


def _certified(data, args):
    """The report with certificates when ``--certify`` was given (from 30 digits up to --digits)."""
    if not getattr(args, "certify", False):
        return data
    options = CertifyOptions(digits=min(args.digits, _CERTIFY_START_DIGITS), max_digits=args.digits)
    return certify_report(data, options, progress=_Messages(args.json))


def _with_warnings(data):
    """The report with its ``warnings`` (what the run may have missed; see completeness_warnings)."""
    data["warnings"] = completeness_warnings(data)
    return data


def _print_warnings(data, out):
    for warning in (data or {}).get("warnings", []):
        out.write(f"\nwarning: {warning}\n")


def _doubtful(data):
    """True when a certificate is undecided or refuted, or a claim of the report failed its check."""
    summary = data.get("certification")
    if not summary:
        return False
    return (summary["counts"]["undecided"] + summary["counts"]["refuted"] + summary.get("claims_failed", 0)) > 0


def _rank_text(c):
    lower, upper = c.get("rank_lower"), c.get("rank_upper")
    if lower is None:
        return None
    text = f"rank J >= {lower} on the box"
    if c.get("lower_singular_value") is not None:
        text += f" (sigma_{lower} >= {c['lower_singular_value']:.2g})"
    if upper is not None and upper == lower:
        text = f"rank J = {lower}: >= {lower} on the box, <= {upper} at the exact point"
    return text


def _certificate_line(certificate):
    c = certificate
    extra = []
    for check in c.get("claim_checks", []):
        if check["status"] != "proved":
            found = "" if check["found"] is None else f", F gives {check['found']}"
            extra.append(f"claim {check['name']} {check['reported']}: {check['status']}{found} ({check['how']})")
    rank = _rank_text(c)
    if c["status"] != "certified":
        text = f"{c['status']}: {c['reason']}"
        if rank is not None:
            text += f"\n            {rank}"
    else:
        kind = c["kind"] + (f", {c['exact_method']}" if c.get("exact_method") else "")
        method = "" if c["method"] == c.get("exact_method") else f"{c['method']}, "
        parts = [f"certified ({kind}, {method}{c['claim']})", f"radius {c['radius']:.1e}"]
        if c.get("at_infinity"):
            parts.append(f"at infinity (w = 0 exactly, chart {c['chart']})")
        if c["real"] is True:
            parts.append("real")
        if c["kind"] == "numerical" and isinstance(c["backward_error"], float):
            parts.append(f"backward error {c['backward_error']:.1e} (< {c['threshold']:.0e})")
        if c["deflations"]:
            parts.append(f"{c['deflations']} deflation(s)")
        if c.get("multiplicity") is not None:
            parts.append(f"multiplicity {c['multiplicity']} ({c['multiplicity_method']})")
        if c.get("distance"):
            parts.append(f"{c['distance']:.1e} from the given point")
        if len(c.get("digits_tried", [])) > 1:
            parts.append(f"at {c['digits']} digits (tried {', '.join(str(d) for d in c['digits_tried'])})")
        if c["distinct"] is False:
            parts.append("BOX MEETS ANOTHER BOX")
        text = ", ".join(parts)
        if rank is not None:
            text += f"\n            {rank}"
        if c["exact_coordinates"] is not None:
            text += "\n            exact: (" + ", ".join(c["exact_coordinates"]) + ")"
            if c["minimal_polynomial"]:
                text += f" where t is the root of {c['minimal_polynomial']} near the centre"
    for line in extra:
        text += f"\n            {line}"
    return text


def _print_certification(data, out):
    """Certificates of a report (as written by :func:`numag.app.report.certify_report`), if any."""
    summary = (data or {}).get("certification")
    if not summary:
        return
    out.write(f"\ncertificates at {summary['digits']} digits ({summary['seconds']:.2f} s):\n")
    rows = []
    if data["command"] == "solve":
        rows = [(f"solution {k}", e["certificate"]) for k, e in enumerate(data["solutions"], 1)]
        rows += [(f"at infinity {k}", e["certificate"]) for k, e in enumerate(data["at_infinity"], 1)]
    elif data["command"] == "singular":
        for component in data["components"]:
            for k, c in enumerate(component["certificates"], 1):
                label = f"component {component['id']}" + (f" point {k}" if len(component["certificates"]) > 1 else "")
                rows.append((label, c))
    else:
        rows = [(f"point {e['index']}", e["certificate"]) for e in data["points"]]
    for label, certificate in rows:
        out.write(f"  {label}: {_certificate_line(certificate)}\n")
    counts, kinds = summary["counts"], summary["certified_by_kind"]
    out.write(f"  {counts['certified']} certified ({kinds['exact']} exact, {kinds['numerical']} numerical), "
              f"{counts['refuted']} refuted, {counts['undecided']} undecided")
    if summary["all_distinct"] is not None:
        out.write("; certified boxes pairwise disjoint" if summary["all_distinct"] else
                  f"; {summary['overlapping_pairs']} pair(s) of boxes meet (points may coincide)")
    if summary.get("claims_failed"):
        out.write(f"\n  {summary['claims_failed']} claim(s) of the report did not hold")
    out.write("\n  numerical: exactly one zero of a square subsystem in the box, every other equation bounded "
              "over it (backward error);\n  exact: proved for the exact equations (only these prove a point "
              "singular).\n")


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


def _print_decompose(result, out, data=None):
    system = result.system
    counts = result.paths
    out.write(f"numag decompose: {system.name or 'system'}: {system.n_equations} equation(s) in "
              f"{system.n_variables} variables, seed {result.seed}\n")
    searched = result.dimensions_searched
    out.write(f"dimensions searched: {searched[0]} down to {searched[-1]}\n")
    failed = sum(counts.get(label, 0) for label in FAILURE_LABELS)
    out.write(f"paths: {counts.get('tracked', 0)} tracked, {failed} failed; endpoints not on X "
              f"{counts.get('not_on_X', 0)}, at infinity or lost {counts.get('at_infinity_or_failed', 0)}, "
              f"on a larger component (removed) {counts.get('on_larger_component', 0)}; "
              f"{result.seconds:.2f} s\n")
    out.write(f"\n{len(result.components)} irreducible component(s)\n")
    for c in result.components:
        kind = "reduced" if c.reduced else f"non-reduced (multiplicity {c.multiplicity})"
        sure = "confirmed by the trace test" if c.confirmed else "NOT confirmed (trace test failed)"
        real = int(sum(c.real))
        out.write(f"  {c.id:4d}  dimension {c.dimension}  degree {c.degree}  {kind}  {sure}  "
                  f"{real} real witness point(s)\n")
        sample = c.points[int(np.argmax(c.real))] if len(c.real) else c.points[0]  # a real one if any
        out.write(f"        e.g. {_format_point(system.variables, sample)}\n")
    _print_warnings(data, out)
    out.write(f"\n{CAUTION}\n")


def _angles_text(point, angles):
    if not angles or np.any(np.abs(point.imag) > 1e-8 * (1 + np.abs(point))):
        return ""
    def degrees(c, s):
        value = round(float(np.degrees(np.arctan2(point[s].real, point[c].real))), 4)
        return 180.0 if value == -180.0 else value + 0.0  # + 0.0 turns -0.0 into 0.0

    return "  (" + ", ".join(f"{label} {degrees(c, s):.4f} deg" for label, (c, s) in angles.items()) + ")"


def _print_singular(result, out, angles, data=None):
    system = result.system
    kind = "projective" if system.projective else "affine"
    out.write(f"numag singular: {system.name or 'system'}: {system.n_equations} equation(s) in "
              f"{system.n_variables} variables ({kind}), seed {result.seed}\n")
    if result.variety is not None:
        parts = ", ".join(f"dimension {c.dimension} degree {c.degree}" for c in result.variety.components)
        out.write(f"X: {len(result.variety.components)} component(s): {parts or 'empty'}\n")
    counts = result.paths
    failed = sum(counts.get(label, 0) for label in FAILURE_LABELS)
    dropped = ", ".join(f"{k.replace('_', ' ')} {v}" for k, v in result.discarded.items()) or "none"
    out.write(f"paths: {counts.get('tracked', 0)} tracked, {failed} failed; candidates dropped: {dropped}; "
              f"{result.seconds:.2f} s\n")
    affine = [c for c in result.components if not c.at_infinity]
    points = [c for c in affine if c.dimension == 0 and c.kind == "singular"]
    real = sum(1 for c in points if c.real[0])
    out.write(f"\n{len(points)} singular point(s), {real} real\n")
    names = system.variables
    for c in points:
        where = f"  on components {', '.join(map(str, c.on_components))}" if c.on_components else ""
        out.write(f"  {c.id:4d}  {'real' if c.real[0] else 'complex'}  {_format_point(names, c.points[0])}"
                  f"{_angles_text(c.points[0], angles)}{where}\n")
    larger = [c for c in affine if c.dimension > 0 or c.kind != "singular"]
    if larger:
        out.write(f"\n{len(larger)} singular or non-reduced component(s) of positive dimension or undecided\n")
        for c in larger:
            out.write(f"  {c.id:4d}  {c.kind}  dimension {c.dimension}  degree {c.degree}  "
                      f"{int(sum(c.real))} real witness point(s)  ({c.formulation})\n")
            out.write(f"        e.g. {_format_point(names, c.points[int(np.argmax(c.real))])}\n")
    infinite = [c for c in result.components if c.at_infinity]
    if infinite:
        homogeneous = ["(w)"] + list(names)
        out.write(f"\n{len(infinite)} singular point(s) at infinity of the closure (homogeneous coordinates "
                  f"{', '.join(homogeneous)}):\n")
        for c in infinite:
            out.write(f"  {c.id:4d}  {_format_point(homogeneous, c.points[0])}\n")
    for note in result.notes:
        out.write(f"\nnote: {note}\n")
    _print_warnings(data, out)
    _print_certification(data, out)
    out.write(f"\n{CAUTION}\n")


def _run_singular(args, out):
    system = _load(args)
    _guard_paths(args, system, "singular")
    angles = load_angles(args.system_file, system.variables)
    options = SingularOptions(formulation=args.formulation, digits=args.digits, infinity_for_systems=args.at_infinity,
                              decompose=DecomposeOptions(witness=WitnessOptions(lowest_dimension=args.lowest_dimension)))
    if args.lowest_dimension is not None:
        options.decompose.witness.validated(system.n_variables)
    with _stage_executor(args) as executor, using(executor):
        result = singular_locus(system, options, seed=args.seed, progress=_Messages(args.json))
        data = _with_notes(singular_to_dict(result, options), args)
        data["execution"] = executor.describe()
    data = _with_warnings(_certified(data, args))
    if args.json:
        out.write(dumps(data) + "\n")
    else:
        _write_notes(args, out)
        _print_singular(result, out, angles, data)
    undecided = any(c.kind == "undecided" for c in result.components)
    return EXIT_UNDECIDED if undecided or _doubtful(data) or data["warnings"] else EXIT_OK


def _run_decompose(args, out):
    system = _load(args)
    _guard_paths(args, system, "decompose")
    options = DecomposeOptions(witness=WitnessOptions(lowest_dimension=args.lowest_dimension),
                               max_loops=args.max_loops)
    if args.max_loops < 1:
        raise NumagError(f"--max-loops must be positive, got {args.max_loops}")
    with _stage_executor(args) as executor, using(executor):
        result = decompose(system, options, seed=args.seed, progress=_Messages(args.json))
        execution = executor.describe()
    data = decomposition_to_dict(result, options)
    data["execution"] = execution
    data = _with_notes(_with_warnings(data), args)
    if args.json:
        out.write(dumps(data) + "\n")
    else:
        _write_notes(args, out)
        _print_decompose(result, out, data)
    return EXIT_UNDECIDED if data["warnings"] else EXIT_OK


def _print_solve(result, out, data=None):
    system = result.system
    counts = result.path_counts()
    kind = "projective" if system.projective else "affine"
    out.write(f"numag solve: {system.name or 'system'}: {system.n_equations} equation(s) in "
              f"{system.n_variables} variables ({kind}), seed {result.seed}\n")
    failed = ", ".join(f"{label} {n}" for label, n in counts["failed_by_reason"].items() if n) or "none"
    out.write(f"paths: {counts['tracked']} tracked: {counts['converged']} converged, "
              f"{counts['singular_endpoint']} singular endpoints, {counts['at_infinity']} at infinity, "
              f"{counts['failed']} failed ({failed}); {counts['retracked']} re-tracked, "
              f"{counts['rescued_in_high_precision']} of them in high precision; "
              f"{result.seconds:.2f} s\n")
    execution = result.extra.get("execution")
    if execution:
        failed = execution["failed_batches"]
        out.write(f"run: {execution['executor']}, {execution['workers']} worker(s), {execution['batches']} batch(es) "
                  f"of up to {execution['batch_size']} paths, {execution['batches_resumed']} read back from the run "
                  f"folder, {execution['retries']} retried, {len(failed)} failed"
                  + (f"; saved in {execution['run_folder']}" if execution["run_folder"] else "") + "\n")
        for failure in failed:
            out.write(f"  batch {failure['index']} (paths {failure['paths'][0]}-{failure['paths'][1]}) failed "
                      f"{failure['attempts']} times: {failure['error']}\n")
        for rejected in execution.get("batches_rejected", []):
            out.write(f"  batch {rejected['index']} of the run folder was not trusted and was tracked again: "
                      f"{rejected['reason']}\n")
    if result.squared_up:
        out.write("note: more equations than unknowns; random combinations were tracked and every "
                  f"solution was kept only if it satisfies all equations ({len(result.discarded)} discarded)\n")
    real = sum(1 for s in result.solutions if s.real)
    out.write(f"\n{len(result.solutions)} isolated solution(s), {real} real\n")
    names = system.variables
    for k, s in enumerate(result.solutions, 1):
        out.write(f"  {k:4d}  multiplicity {s.multiplicity}  {'real' if s.real else 'complex'}  "
                  f"cond {s.condition:.2g}  {_format_point(names, s.point)}\n")
    if result.at_infinity:
        homogeneous = names if system.projective else ["(w)"] + list(names)
        out.write(f"\n{len(result.at_infinity)} point(s) at infinity (homogeneous coordinates "
                  f"{', '.join(homogeneous)}):\n")
        for s in result.at_infinity:
            out.write(f"        paths {s.multiplicity}  {_format_point(homogeneous, s.point)}\n")
    if result.not_isolated:
        out.write(f"\n{len(result.not_isolated)} endpoint group(s) lie on positive-dimensional solution "
                  "sets (not counted as solutions):\n")
        for s in result.not_isolated:
            out.write(f"        paths {s.multiplicity}  {_format_point(names, s.point)}\n")
    _print_warnings(data, out)
    _print_certification(data, out)
    out.write(f"\n{CAUTION}\n")


def _run_solve(args, out):
    if args.resume:
        if args.run_folder:
            raise NumagError("give either --run-folder (a new run) or --resume (an interrupted one), not both")
        manifest = RunFolder.open(args.resume).manifest
        if manifest.get("kind") != "solve":
            raise NumagError(f"{args.resume} holds a run of {str(manifest.get('kind'))[:40]!r}, not of 'numag solve'")
        try:
            system = system_from_mapping({k: v for k, v in manifest["system"].items() if v is not None},
                                         path=f"{args.resume}/manifest.json")
            saved = manifest["options"]
            options = SolveOptions(refine_digits=saved["refine_digits"], square_up=saved["square_up"],
                                   batch_size=saved["batch_size"],
                                   cluster_tolerance=saved["cluster_tolerance"]).validated()
            seed = _checked_seed(manifest["seed"], f"the seed in {args.resume}/manifest.json")
        except (KeyError, TypeError, AttributeError):
            raise NumagError(f"{args.resume}/manifest.json is damaged: it does not describe a solve run") from None
        if args.system_file is not None and _load(args).to_texts() != system.to_texts():
            raise NumagError(f"{args.system_file} is not the system of the run in {args.resume}")
    else:
        if args.system_file is None:
            raise NumagError("a system file is needed (or --resume DIR)")
        system = _load(args)
        options = SolveOptions(refine_digits=args.digits, square_up=args.square_up, batch_size=args.batch_size)
        seed = args.seed
        if args.run_folder and seed is None:  # a saved run must be reproducible: fix the seed now
            seed = int(np.random.SeedSequence().entropy % (2**32))
    execution = Execution(workers=args.workers, scheduler=args.scheduler, local_dask=args.local_dask,
                          run_folder=args.resume or args.run_folder, resume=bool(args.resume))
    result = solve_system(system, options, seed=seed, progress=_Progress(args.json), execution=execution)
    data = _with_warnings(_certified(_with_notes(solve_report_to_dict(result, options), args), args))
    if args.json:
        out.write(dumps(data) + "\n")
    else:
        _write_notes(args, out)
        _print_solve(result, out, data)
    return EXIT_UNDECIDED if _doubtful(data) or data["warnings"] else EXIT_OK


def _print_compare(comparison, out):
    system = comparison.system
    out.write(f"numag compare: {system.name or 'system'}: {system.n_equations} equation(s) in "
              f"{system.n_variables} variables ({'projective' if system.projective else 'affine'}), "
              f"seed {comparison.locus.seed}\n\n")
    width = max(len(r.quantity) for r in comparison.rows) if comparison.rows else 10
    out.write(f"  {'quantity':{width}}  {'numag':>10}  {'exact':>10}  agree\n")
    for r in comparison.rows:
        mark = {True: "yes", False: "NO", None: "-"}[r.agree]
        mine = "-" if r.numag is None else str(r.numag)
        exact = "-" if r.exact is None else str(r.exact)
        out.write(f"  {r.quantity:{width}}  {mine:>10}  {exact:>10}  {mark}\n")
    reference = comparison.reference
    if comparison.digits is not None:
        out.write(f"\n  coordinates agree to {comparison.digits:.1f} digits\n")
    if reference.exact_points:
        out.write("  exact singular points (sympy):\n")
        for point in reference.exact_points[:20]:
            out.write(f"    ({', '.join(point)})\n")
        if len(reference.exact_points) > 20:
            out.write(f"    ... {len(reference.exact_points) - 20} more\n")
    ratio = comparison.ratio
    out.write(f"\n  numag {comparison.numag_seconds:.2f} s; exact reference "
              + (f"{comparison.reference_seconds:.2f} s (ratio {ratio:.2f}: reference / numag)"
                 if ratio is not None else f"{reference.status} after {reference.seconds:.1f} s") + "\n")
    out.write(f"\nverdict: {comparison.verdict.upper()}\n")
    for note in comparison.notes:
        out.write(f"note: {note}\n")
    out.write(f"\ncompared: {comparison.scope}\n\n{CAUTION}\n")


def _run_compare(args, out):
    system = _load(args)
    _guard_paths(args, system, "compare")
    if not args.time_limit > 0:
        raise NumagError(f"--time-limit must be positive, got {args.time_limit}")
    if not args.tolerance > 0:
        raise NumagError(f"--tolerance must be positive, got {args.tolerance}")
    comparison = compare_system(system, seconds=args.time_limit, seed=args.seed, tolerance=args.tolerance,
                                progress=_Messages(args.json))
    if args.json:
        out.write(dumps(_with_notes(compare_to_dict(comparison), args)) + "\n")
    else:
        _write_notes(args, out)
        _print_compare(comparison, out)
    return {"agree": EXIT_OK, "mismatch": EXIT_MISMATCH, "incomplete": EXIT_UNDECIDED}[comparison.verdict]


def _run_certify(args, out):
    data = read_report(args.report_file)
    options = CertifyOptions(digits=args.digits, max_digits=args.max_digits, exact=not args.numerical_only).validated()
    with make_executor(args.workers or 1) as executor:
        certified = certify_report(data, options, progress=_Messages(args.json), executor=executor)
    write_report(args.output or args.report_file, certified)
    if args.json:
        out.write(dumps(certified) + "\n")
    else:
        out.write(f"numag certify: {args.report_file} (a report of 'numag {certified['command']}')\n")
        _print_certification(certified, out)
        out.write(f"\nwritten to {args.output or args.report_file}\n\n{CAUTION}\n")
    return EXIT_UNDECIDED if _doubtful(certified) else EXIT_OK


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
        args = build_parser().parse_args(argv)
    except SystemExit as stop:  # usage errors (already printed on one line), --help, --version
        return stop.code if isinstance(stop.code, int) else EXIT_INPUT
    limits = WorkLimits(max_paths=getattr(args, "max_paths", WorkLimits.max_paths),
                        max_memory=int(getattr(args, "max_memory", WorkLimits.max_memory / 1024 ** 3) * 1024 ** 3))
    previous = _on_terminate()
    try:
        # numpy's floating-point warnings are not messages for the user: every result carries its
        # own evidence (residuals, path statuses), and exit codes count what failed
        with warnings.catch_warnings(), np.errstate(all="ignore"), work_limits(limits):
            warnings.simplefilter("ignore", RuntimeWarning)
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
    except Exception as err:  # noqa: BLE001 - last resort: one line, never a traceback
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
    def handler(signum, frame):
        abort_workers()
        raise SystemExit(128 + signum)

    try:
        return signal.signal(signal.SIGTERM, handler)
    except ValueError:  # not the main thread (a library caller running main in a thread)
        return None


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
