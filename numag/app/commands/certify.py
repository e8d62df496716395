"""``numag certify``: certificates for the points of a saved report, and how every sub-command
prints certificates (``--certify``).
"""

from ...system.display import counted
from ...run.executor import make_executor
from ..report import CAUTION, certification_doubtful as _doubtful, certify_report, dumps, read_report, write_report
from . import SUMMARIES
from .common import (EXIT_OK, EXIT_UNDECIDED, _MAX_WORKERS, _count, _progress)


def add_parser(commands):
    """Add ``numag certify`` to the sub-parsers ``commands`` of the command line."""
    from ...certify.records import CertifyOptions
    certify = commands.add_parser(
        "certify", help=SUMMARIES["certify"],
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
    certify.set_defaults(run=run)


#: Certificates of ``--certify`` start at this precision and rise up to the command's --digits when needed.
_CERTIFY_START_DIGITS = 30


def _certified(data, args):
    """The report with certificates when ``--certify`` was given (from 30 digits up to --digits)."""
    if not getattr(args, "certify", False):
        return data
    # the certificate records are imported where certificates are made or printed: every command calls these
    # helpers, and a run without --certify should not pay for the import (decision 0067)
    from ...certify.records import CertifyOptions
    options = CertifyOptions(digits=min(args.digits, _CERTIFY_START_DIGITS), max_digits=args.digits)
    return certify_report(data, options, progress=_progress(args))


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
    from ...certify.records import ClaimStatus, Kind, Status
    c = certificate
    extra = []
    for check in c.get("claim_checks", []):
        if check["status"] != ClaimStatus.PROVED:
            found = "" if check["found"] is None else f", F gives {check['found']}"
            extra.append(f"claim {check['name']} {check['reported']}: {check['status']}{found} ({check['how']})")
    rank = _rank_text(c)
    if c["status"] != Status.CERTIFIED:
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
        if c["kind"] == Kind.NUMERICAL and isinstance(c["backward_error"], float):
            parts.append(f"backward error {c['backward_error']:.1e} (< {c['threshold']:.0e})")
        if c["deflations"]:
            parts.append(counted(c['deflations'], 'deflation'))
        if c.get("multiplicity") is not None:
            parts.append(f"multiplicity {c['multiplicity']} ({c['multiplicity_method']})")
        if c.get("distance"):
            parts.append(f"{c['distance']:.1e} from the given point")
        if c.get("holds_judged_point") is False:
            parts.append("OF A NEARBY POINT OF X: the box does not hold the point the verdict is about, so it is "
                         "no proof for that point")
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
                  f"; {counted(summary['overlapping_pairs'], 'pair')} of boxes meet (points may coincide)")
    if summary.get("claims_failed"):
        out.write(f"\n  {counted(summary['claims_failed'], 'claim')} of the report did not hold")
    out.write("\n  numerical: exactly one zero of a square subsystem in the box, every other equation bounded "
              "over it (backward error);\n  exact: proved for the exact equations (only these prove a point "
              "singular).\n")


def run(args, out):
    from ...certify.records import CertifyOptions
    data = read_report(args.report_file)
    options = CertifyOptions(digits=args.digits, max_digits=args.max_digits, exact=not args.numerical_only).validated()
    with make_executor(args.workers or 1) as executor:
        certified = certify_report(data, options, progress=_progress(args), executor=executor)
    write_report(args.output or args.report_file, certified)
    if args.json:
        out.write(dumps(certified) + "\n")
    else:
        out.write(f"numag certify: {args.report_file} (a report of 'numag {certified['command']}')\n")
        _print_certification(certified, out)
        out.write(f"\nwritten to {args.output or args.report_file}\n\n{CAUTION}\n")
    return EXIT_UNDECIDED if _doubtful(certified) else EXIT_OK
