"""``numag decompose``: the irreducible components of X with dimension, degree and witness points."""

import numpy as np

from ...run.executor import using
from ...system.files import load_groups
from ...tracking.starts import StartKind
from ...tracking.tracker import FAILURE_LABELS
from ...witness.cascade import WitnessOptions
from ...witness.decompose import DecomposeOptions, decompose
from ..report import CAUTION, decomposition_to_dict, dumps
from . import SUMMARIES
from .plot import add_plot_options, check_plot_request, plot_after, with_angles
from .common import (EXIT_OK, EXIT_UNDECIDED, _WITNESS_ACCURACY, _add_executor_options, _add_work_options, _counted,
                     _guard_paths, _headline, _load, _PointFormat, _print_warnings, _progress, _seed, _stage_executor,
                     _unsearched, _with_notes, _with_warnings, _write_notes)


def add_parser(commands):
    """Add ``numag decompose`` to the sub-parsers ``commands`` of the command line."""
    parts = commands.add_parser(
        "decompose", help=SUMMARIES["decompose"],
        description="Witness sets of every dimension (regenerative cascade), split into irreducible "
                    "components by monodromy loops confirmed by the trace test.")
    parts.add_argument("system_file", metavar="FILE", help="system file (TOML, affine)")
    parts.add_argument("--lowest-dimension", type=int, metavar="K",
                       help="do not search components of dimension below K (default: down to points)")
    parts.add_argument("--max-loops", type=int, default=DecomposeOptions.max_loops, metavar="N",
                       help="monodromy loops per dimension before giving up confirming (default %(default)s)")
    parts.add_argument("--start", choices=[k.value for k in StartKind], default=WitnessOptions.start.value,
                       help="factors of the regeneration: total-degree, multihomogeneous (in the file's 'groups' or "
                            "the best grouping found), or auto (the groups where every equation has as many "
                            "factors in them as its degree; polyhedral has no product form and acts as auto; "
                            "default %(default)s)")
    parts.add_argument("--seed", type=_seed, help="seed of the random choices (recorded in the report)")
    parts.add_argument("--json", action="store_true", help="print the report as JSON (no progress lines)")
    _add_executor_options(parts)
    _add_work_options(parts)
    add_plot_options(parts)
    parts.set_defaults(run=run)


def _print_decompose(result, out, data=None):
    system = result.system
    counts = result.paths
    out.write(_headline("decompose", system, result.seed, kind=False))
    searched = result.dimensions_searched
    out.write(f"dimensions searched: {searched[0]} down to {searched[-1]}\n")
    failed = sum(counts.get(label, 0) for label in FAILURE_LABELS)
    out.write(f"paths: {counts.get('tracked', 0)} tracked, {failed} failed; endpoints not on X "
              f"{counts.get('not_on_X', 0)}, at infinity or lost {counts.get('at_infinity_or_failed', 0)}, "
              f"on a larger component (removed) {counts.get('on_larger_component', 0)}; "
              f"{result.seconds:.2f} s\n")
    start = result.extra.get("start")
    if start and start["chosen"] != StartKind.TOTAL_DEGREE.value or start and len(start["paths"]) > 1:
        out.write(f"start: {start['chosen']} ({start['reason']}; bounds by start "
                  + ", ".join(f"{k} {v}" for k, v in start["paths"].items())
                  + (f"; groups {start['groups']['groups']}" if "groups" in start else "") + ")\n")
    lowest = (data or {}).get("options", {}).get("lowest_dimension")
    out.write(f"\n{_counted(len(result.components), 'irreducible component')}{_unsearched(lowest)}\n")
    text = _PointFormat()
    for c in result.components:
        # the multiplicity (paths per witness point) says more only when above 1
        kind = "reduced" if c.reduced else "non-reduced" + (f" (multiplicity {c.multiplicity})"
                                                            if c.multiplicity > 1 else "")
        sure = "confirmed by the trace test" if c.confirmed else "NOT confirmed (trace test failed)"
        real = int(sum(c.real))
        out.write(f"  {c.id:4d}  dimension {c.dimension}  degree {c.degree}  {kind}  {sure}  "
                  f"{_counted(real, 'real witness point')}\n")
        sample = c.points[int(np.argmax(c.real))] if len(c.real) else c.points[0]  # a real one if any
        out.write(f"        e.g. {text(system.variables, sample, _WITNESS_ACCURACY)}\n")
    _print_warnings(data, out)
    out.write(("\n" + text.footnote()) if text.used else "")
    out.write(f"\n{CAUTION}\n")


def run(args, out):
    system = _load(args)
    _guard_paths(args, system, "decompose")
    check_plot_request(args, system)
    groups = load_groups(args.system_file, system.variables) if args.start != StartKind.TOTAL_DEGREE.value else None
    options = DecomposeOptions(witness=WitnessOptions(lowest_dimension=args.lowest_dimension, start=args.start,
                                                      groups=groups), max_loops=args.max_loops)
    with _stage_executor(args) as executor, using(executor):
        result = decompose(system, options, seed=args.seed, progress=_progress(args))
        execution = executor.describe()
    data = decomposition_to_dict(result, options)
    data["execution"] = execution
    data = with_angles(_with_notes(_with_warnings(data), args), args.system_file)
    if args.json:
        out.write(dumps(data) + "\n")
    else:
        _write_notes(args, out)
        _print_decompose(result, out, data)
    pictured = plot_after(data, args, out)
    return EXIT_UNDECIDED if data["warnings"] or pictured else EXIT_OK
