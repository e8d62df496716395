"""``numag decompose``: the irreducible components of X with dimension, degree and witness points."""

import numpy as np

from ...errors import NumagError
from ...run.executor import using
from ...tracking.tracker import FAILURE_LABELS
from ...witness.cascade import WitnessOptions
from ...witness.decompose import DecomposeOptions, decompose
from ..report import CAUTION, decomposition_to_dict, dumps
from . import SUMMARIES
from .common import (EXIT_OK, EXIT_UNDECIDED, _Messages, _add_executor_options, _add_work_options, _format_point,
                     _guard_paths, _load, _print_warnings, _seed, _stage_executor, _with_notes, _with_warnings,
                     _write_notes)


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
    parts.add_argument("--seed", type=_seed, help="seed of the random choices (recorded in the report)")
    parts.add_argument("--json", action="store_true", help="print the report as JSON (no progress lines)")
    _add_executor_options(parts)
    _add_work_options(parts)
    parts.set_defaults(run=run)


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


def run(args, out):
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
