"""``numag compare``: numag's singular locus beside the exact reference."""

from ...errors import NumagError
from ..compare import compare_system
from ..report import CAUTION, compare_to_dict, dumps
from . import SUMMARIES
from .common import (EXIT_MISMATCH, EXIT_OK, EXIT_UNDECIDED, _add_work_options, _guard_paths, _headline, _load,
                     _positive_number, _progress, _seed, _with_notes, _write_notes)


def add_parser(commands):
    """Add ``numag compare`` to the sub-parsers ``commands`` of the command line."""
    versus = commands.add_parser(
        "compare", help=SUMMARIES["compare"],
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
    versus.set_defaults(run=run)


def _print_compare(comparison, out):
    system = comparison.system
    out.write(_headline("compare", system, comparison.locus.seed) + "\n")
    width = max(len(r.quantity) for r in comparison.rows) if comparison.rows else 10
    out.write(f"  {'quantity':{width}}  {'numag':>10}  {'exact':>10}  agree\n")
    for r in comparison.rows:
        mark = {True: "yes", False: "NO", None: "-"}[r.agree]
        mine = "-" if r.numag is None else str(r.numag)
        exact = "-" if r.exact is None else str(r.exact)
        out.write(f"  {r.quantity:{width}}  {mine:>10}  {exact:>10}  {mark}\n")
    reference = comparison.reference
    if comparison.digits is not None:
        digits = "every digit" if comparison.digits == float("inf") else f"{comparison.digits:.1f} digits"
        out.write(f"\n  coordinates agree to {digits}: largest relative distance {comparison.max_distance:.1e}\n")
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


def run(args, out):
    system = _load(args)
    _guard_paths(args, system, "compare")
    if not args.time_limit > 0:
        raise NumagError(f"--time-limit must be positive, got {args.time_limit}")
    if not args.tolerance > 0:
        raise NumagError(f"--tolerance must be positive, got {args.tolerance}")
    comparison = compare_system(system, seconds=args.time_limit, seed=args.seed, tolerance=args.tolerance,
                                progress=_progress(args))
    if args.json:
        out.write(dumps(_with_notes(compare_to_dict(comparison), args)) + "\n")
    else:
        _write_notes(args, out)
        _print_compare(comparison, out)
    return {"agree": EXIT_OK, "mismatch": EXIT_MISMATCH, "incomplete": EXIT_UNDECIDED}[comparison.verdict]
