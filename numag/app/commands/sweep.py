"""``numag sweep``: the members of a family at many parameter values, by one batched parameter homotopy."""

import csv
import io

import numpy as np

from ...errors import InputError
from ...system.display import counted
from ...system.safeio import MAX_INPUT_BYTES, read_limited, write_file
from ...tracking.solve import Execution
from ...families.records import PointKind
from ...families.sweep import MAX_VALUES, sweep, parse_grid, parse_value
from ..picture import discriminant_svg, sweep_svg
from ..report import CAUTION, dumps
from ..saved import save
from .common import (EXIT_OK, EXIT_UNDECIDED, _add_executor_options, _add_fixing_option, _add_work_options,
                     _PointFormat, _format_values, _load_free_family, _progress, _seed, _root_accuracy)


def add_parser(commands):
    """Add ``numag sweep`` to the sub-parsers ``commands`` of the command line."""
    command = commands.add_parser(
        "sweep", help="solve a family at many parameter values (parameter homotopy from one random member)",
        description="Solve the member at a random complex parameter value once, then carry its solutions to "
                    "every requested value (all values and paths tracked together); per value the real "
                    "solutions and the points where J_x drops rank.")
    command.add_argument("system_file", metavar="FILE", help="system file (TOML) with 'parameters', square in x")
    values = command.add_mutually_exclusive_group(required=True)
    values.add_argument("--grid", metavar="SPEC", help="name=start:stop:count, evenly spaced, ends included "
                        "(several joined by ';' make a product grid), e.g. b=0:10:1001")
    values.add_argument("--values", metavar="CSV", help="a CSV file with a header naming the parameters and one "
                        "row of values per member")
    command.add_argument("--csv", metavar="FILE", help="write one row per real solution (and per value without one)")
    command.add_argument("--output", metavar="JSON", help="save the result (reload with numag.load)")
    command.add_argument("--svg", metavar="FILE", help="draw the result (regions and counts) as an SVG picture")
    command.add_argument("--json", action="store_true", help="print the result as JSON (no progress lines)")
    command.add_argument("--seed", type=_seed, help="seed of the random choices (recorded in the result)")
    _add_fixing_option(command)
    _add_executor_options(command)
    _add_work_options(command)
    command.set_defaults(run=run)


def read_values(path, parameters):
    """Parameter values from a CSV file: a header naming every parameter, then one row per member."""
    raw = read_limited(path, MAX_INPUT_BYTES, "values file")
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as err:
        raise InputError(f"{path}: is not UTF-8 text (byte {err.start})") from None
    rows = list(csv.reader(io.StringIO(text)))
    if not rows:
        raise InputError(f"{path}: is empty; expected a header naming {', '.join(parameters)}")
    header = [h.strip() for h in rows[0]]
    missing = [p for p in parameters if p not in header]
    if missing or len(set(header)) != len(header):
        raise InputError(f"{path}: line 1: the header must name each parameter once ({', '.join(parameters)})")
    columns = [header.index(p) for p in parameters]
    values = []
    for line, row in enumerate(rows[1:], 2):
        if not any(cell.strip() for cell in row):
            continue
        if len(row) != len(header):
            raise InputError(f"{path}: line {line}: {len(row)} cells, the header has {len(header)}")
        try:  # exact rationals (4/2, 1e-3), each rounded once to a double
            entry = [float(parse_value(row[k])) for k in columns]
        except InputError as err:
            raise InputError(f"{path}: line {line}: {err}") from None
        values.append(entry)
        if len(values) > MAX_VALUES:
            raise InputError(f"{path}: more than {MAX_VALUES:,} values")
    if not values:
        raise InputError(f"{path}: no values after the header")
    return np.array(values)


def _csv_text(result):
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    # undecided: solutions of the value told neither real nor paired with their conjugate (decision 0104); where
    # it is not 0 the real count beside it is not sure (the command exits 3)
    writer.writerow(list(result.parameters) + ["real_solutions", "rank_drops", "failed_paths", "undecided", "solution",
                                               "kind"] + list(result.variables))
    for member in result.values:
        head = [f"{complex(v).real:.17g}" for v in member.parameters] + [
            member.real_count, len(member.rank_drops), member.failed, member.undecided]
        real = np.nonzero(member.real)[0]
        if len(real) == 0:
            writer.writerow(head + ["", ""] + [""] * len(result.variables))
        for number, k in enumerate(real, 1):
            writer.writerow(head + [number, member.kinds[k].value] + [f"{z.real:.17g}" for z in member.points[k]])
    return out.getvalue()


def _print(result, out):
    counts = result.real_counts()
    out.write(f"numag sweep: {counted(len(result.values), 'value')} of {', '.join(result.parameters)}; "
              f"{counted(result.start_solutions, 'solution')} per member (from a random complex member); "
              f"seed {result.seed}\n")
    out.write(f"paths: {result.paths.get('tracked', 0)} tracked, {result.failed} failed; {result.seconds:.2f} s\n\n")
    if len(result.start_multiple) and result.undecided:
        # decision 0143: a multiple point of the random member that 40 digits did not pull apart was not moved;
        # the values not solved again on their own are undecided
        out.write(f"warning: {counted(len(result.start_multiple), 'multiple point')} of the random member not "
                  "resolved and not moved\n")
    if result.undecided:
        out.write(f"warning: {counted(result.undecided, 'solution')} neither real nor paired with its conjugate "
                  "(or not resolved): the real counts of their values are undecided (see --csv or --output)\n\n")
    out.write("real solutions by value (runs of equal counts)\n")
    start = 0
    names = result.parameters
    # the values as given, each with the digits that tell it from its neighbours (decision 0147)
    texts = dict(zip((id(m) for m in result.values), _format_values(names, [m.parameters for m in result.values])))
    # a value whose count is in doubt (a failed path, a solution not resolved) is never merged into a run of sure
    # counts: its count is printed as undecided (a member that is a whole curve of solutions ends here too)
    sure = [not (m.failed or m.undecided) for m in result.values]
    for k in range(1, len(counts) + 1):
        if k == len(counts) or (counts[k], sure[k]) != (counts[start], sure[start]):
            first = texts[id(result.values[start])]
            last = texts[id(result.values[k - 1])]
            span = first if k - 1 == start else f"{first} to {last}"
            out.write(f"  {span}: {counts[start]}{'' if sure[start] else ' (undecided)'}\n")
            start = k
    drops = [(m, p, int(paths)) for m in result.values
             for p, kind, paths in zip(m.points, m.kinds, m.paths) if kind == PointKind.RANK_DROP]
    out.write(f"\n{counted(len(drops), 'point')} where J_x drops rank\n")
    text = _PointFormat()
    for member, point, paths in drops[:20]:
        # a root where `paths` paths meet is known to about eps^(1/paths) of its size: no digit below that. One
        # path at a rank drop is not a multiple root (mu paths end at one): close roots not pulled apart, or a
        # point of a curve of solutions of that member
        where = text(result.variables, point, _root_accuracy(16, paths))
        note = "" if paths > 1 else " (one path: not resolved; close roots or a curve of solutions)"
        out.write(f"  at {texts[id(member)]}: {where}{note}\n")
    if len(drops) > 20:
        out.write(f"  ... and {len(drops) - 20} more (see --csv or --output)\n")
    out.write(f"\n{CAUTION}\n")


def run(args, out):
    family = _load_free_family(args, "a sweep is over a family")
    values = parse_grid(args.grid, family.parameters) if args.grid is not None else read_values(args.values,
                                                                                              family.parameters)
    execution = Execution(workers=args.workers, scheduler=args.scheduler, local_dask=args.local_dask)
    result = sweep(family, values, seed=args.seed, progress=_progress(args), execution=execution)
    if args.csv:
        write_file(args.csv, _csv_text(result).encode("utf-8"))
    if args.output:
        save(result, args.output)
    if args.svg:
        write_file(args.svg, (discriminant_svg(result) if "discriminant" in __name__ else sweep_svg(result)).encode())
    if args.json:
        out.write(dumps(result.to_dict()) + "\n")
    else:
        _print(result, out)
    return EXIT_UNDECIDED if result.failed or result.undecided or result.paths.get("start_failed") else EXIT_OK
