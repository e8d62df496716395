"""``numag discriminant``: the parameter values where a member of a family is singular, and what happens between."""

import math

from ...system.display import counted
from ...errors import NumagError
from ...run.executor import using
from ...system.safeio import write_file
from ...tracking.tracker import FAILURE_LABELS
from ...families.discriminant import DiscriminantOptions, discriminant
from ...families.branches import CountKind
from ...families.records import MISSED_ON_LINES, ComponentKind
from ..picture import discriminant_svg, sweep_svg
from ..report import CAUTION, discriminant_warnings, dumps, undecided_special_points
from ..saved import save
from .common import (EXIT_OK, EXIT_UNDECIDED, _add_executor_options, _add_fixing_option, _add_work_options,
                     _format_complex, _load_free_family, _PointFormat, _progress, _root_accuracy, _rounding_floor, _seed,
                     _stage_executor)


def add_parser(commands):
    """Add ``numag discriminant`` to the sub-parsers ``commands`` of the command line."""
    command = commands.add_parser(
        "discriminant", help="where a member of a family is singular (parameter values), and the regions between",
        description="For a system file with parameters: the projection to parameter space of the points (x, p) "
                    "where F = 0 and J_x drops rank, as components with dimension, degree and real samples; "
                    "for one parameter the points themselves and the regions between them with the number of "
                    "real solutions or real branches of a sample member; for two, the traced real curve with its "
                    "cusps and nodes, and cells on lines merged into regions of the plane.")
    command.add_argument("system_file", metavar="FILE", help="system file (TOML) with 'parameters'")
    command.add_argument("--no-regions", action="store_true", help="skip solving one sample per region")
    command.add_argument("--no-infinity", action="store_true",
                         help="skip members singular at infinity in x (a second computation)")
    command.add_argument("--no-curve", action="store_true",
                         help="two parameters: skip tracing the real discriminant curve (and merging the cells)")
    command.add_argument("--lines", type=int, default=DiscriminantOptions.lines, metavar="N",
                         help="two parameters: vertical lines across the first one's range (default %(default)s)")
    command.add_argument("--trace-lines", type=int, default=DiscriminantOptions.trace_lines, metavar="N",
                         help="two parameters, members that are curves: parallel lines the curve is traced across "
                              "(default %(default)s)")
    command.add_argument("--no-components", action="store_true",
                         help="skip decomposing the incidence set (no dimensions or degrees; the curve and the "
                              "regions remain)")
    command.add_argument("--seed", type=_seed, help="seed of the random choices (recorded in the report)")
    command.add_argument("--output", metavar="JSON", help="save the result (reload with numag.load)")
    command.add_argument("--svg", metavar="FILE", help="draw the result (regions and counts) as an SVG picture")
    command.add_argument("--json", action="store_true", help="print the result as JSON (no progress lines)")
    _add_fixing_option(command)
    _add_executor_options(command)
    _add_work_options(command)
    command.set_defaults(run=run)


def _failed(result):
    tracked = sum(result.paths.get(label, 0) for label in FAILURE_LABELS)
    traced = result.curve.failed_arcs + undecided_special_points(result.curve) if result.curve is not None else 0
    return tracked + sum(r.count.failed + r.count.undecided for r in result.regions) + traced \
        + result.paths.get(MISSED_ON_LINES, 0)


def _count_text(count):
    if count.kind is CountKind.SOLUTIONS:
        return counted(count.solutions, "real solution")
    if count.kind is CountKind.BRANCHES:
        return counted(count.branches, "real branch", "real branches")
    return "not counted (members of dimension 2 or more)"


def _unsure_text(count):
    """Why a region's count is not sure: failed paths, solutions not told real or complex (decision 0104)."""
    why = ([f"{counted(count.failed, 'path')} failed"] if count.failed else []) + \
        ([f"{counted(count.undecided, 'solution')} neither real nor paired with its conjugate: undecided"]
         if count.undecided else [])
    return f"  ({'; '.join(why)})" if why else ""


def _interval(low, high, floor=None, known=None):
    known = known or {}
    left = "-inf" if math.isinf(low) else known.get(low) or _format_complex(complex(low), floor)
    right = "inf" if math.isinf(high) else known.get(high) or _format_complex(complex(high), floor)
    return f"({left}, {right})"


def _point_texts(result, text):
    """One parameter: each real discriminant point as text to its accuracy (a point where m paths met is known to
    about eps^(1/m) of the scale of the points, the sweep's rule), by value."""
    scale = max([1.0] + [abs(float(v)) for v in result.real_points])
    texts = {}
    for value in result.real_points:
        paths = max([int(c.multiplicity) for c in result.components if c.kind == ComponentKind.FINITE
                     and c.dimension == 0 and len(c.points) and c.points[0, 0].real == value] or [1])
        if paths > 1:  # relative to the scale of the points, not to the value (a double point at 0 beside 800)
            accuracy = _root_accuracy(16, paths) * scale / math.sqrt(1.0 + float(value) ** 2)
            texts[float(value)] = text([""], [value], accuracy)[1:]
    return texts


def _print(result, out):
    names = ", ".join(result.parameters)
    out.write(f"numag discriminant: {counted(len(result.equations), 'equation')} in {', '.join(result.variables)}; "
              f"parameters {names}; members of codimension {result.codimension}; seed {result.seed}\n")
    out.write(f"paths: {result.paths.get('tracked', 0)} tracked, {_failed(result)} failed; {result.seconds:.2f} s\n")
    floor = _rounding_floor(result)
    text = _PointFormat()
    known = _point_texts(result, text) if len(result.parameters) == 1 else {}
    finite = [c for c in result.components if c.kind == ComponentKind.FINITE]
    others = len(result.components) - len(finite)
    out.write(f"\n{counted(len(result.components), 'component')} of the discriminant ({len(finite)} with members "
              f"singular at a finite point{f', {others} of another kind' if others else ''})\n")
    for k, c in enumerate(result.components, 1):
        real_point = known.get(complex(c.points[0, 0]).real) if c.dimension == 0 and c.real[0] else None
        sample = f"{result.parameters[0]}={real_point}" if real_point else ", ".join(
            f"{p}={_format_complex(complex(z), floor)}" for p, z in zip(result.parameters, c.points[0]))
        out.write(f"  {k:3d}  {c.kind.value:13s} dimension {c.dimension}  degree {c.degree}  "
                  f"{counted(int(sum(c.real)), 'real sample')}  e.g. {sample}\n")
    if len(result.parameters) == 1:
        points = ", ".join(known.get(float(v)) or _format_complex(complex(v), floor) for v in result.real_points) \
            or "none"
        out.write(f"\nreal discriminant points ({names}): {points}\n")
        infinite = [c.points[0, 0] for c in result.components if c.kind == ComponentKind.AT_INFINITY
                    and c.dimension == 0 and c.real[0]]
        if infinite:
            out.write(f"real values where a member is singular at infinity in x: "
                      f"{', '.join(_format_complex(complex(v.real)) for v in sorted(infinite, key=lambda z: z.real))}\n")
    if result.regions:
        out.write("\nregions (one sample member solved in each)\n")
        for region in result.regions:
            where = _interval(region.low, region.high, floor, known)
            if region.line is not None:
                where = f"{result.parameters[0]} = {region.line:.6g}, {result.parameters[1]} in {where}"
            else:
                where = f"{names} in {where}"
            out.write(f"  {where}: {_count_text(region.count)}{_unsure_text(region.count)}\n")
    if result.curve is not None:
        _print_curve(result, out)
    for note in result.notes:
        out.write(f"\nnote: {note}\n")
    if text.footnote():
        out.write(f"\n{text.footnote()}")
    for warning in discriminant_warnings(result):
        out.write(f"warning: {warning}\n")
    out.write(f"\n{CAUTION}\n")


def _print_curve(result, out):
    """Two parameters: the traced real curve, its cusps and nodes, and the regions of the plane."""
    curve, (first, second) = result.curve, result.parameters
    low, high = curve.box
    out.write(f"\nreal discriminant curve: {counted(len(curve.arcs), 'traced piece')} in {first} in "
              f"[{low[0]:.6g}, {high[0]:.6g}], {second} in [{low[1]:.6g}, {high[1]:.6g}]"
              + (f" ({counted(curve.failed_arcs, 'arc end')} failed)" if curve.failed_arcs else "")
              + "; the arcs run on to half the box beyond it\n")
    for point in curve.special:
        accuracy = "refined" if point.refined else \
            f"a {point.candidate.value} candidate at the traced accuracy: not confirmed" if point.candidate else \
            "at the traced accuracy"
        out.write(f"  {point.kind.value:9s} at {first}={point.point[0]:.10g}, {second}={point.point[1]:.10g} "
                  f"({accuracy})\n")
    if result.plane_regions:
        out.write(f"\n{counted(len(result.plane_regions), 'region')} of the plane (cells joined where the curve does "
                  "not separate them; one sample each)\n")
        for k, region in enumerate(result.plane_regions, 1):
            out.write(f"  {k:3d}  sample {first}={region.sample[0]:.6g}, {second}={region.sample[1]:.6g}: "
                      f"{_count_text(region.count)}; {counted(len(region.cells), 'cell')}"
                      f"{_unsure_text(region.count)}\n")


def run(args, out):
    family = _load_free_family(args, "a discriminant is of a family")
    if not 1 <= args.lines <= 1000:
        raise NumagError(f"--lines must be from 1 to 1000, got {args.lines}")
    if not 2 <= args.trace_lines <= 10000:
        raise NumagError(f"--trace-lines must be from 2 to 10000, got {args.trace_lines}")
    options = DiscriminantOptions(regions=not args.no_regions, at_infinity=not args.no_infinity, lines=args.lines,
                                  curve=not args.no_curve, trace_lines=args.trace_lines,
                                  components=not args.no_components)
    with _stage_executor(args) as executor, using(executor):
        result = discriminant(family, options, seed=args.seed, progress=_progress(args))
    if args.output:
        save(result, args.output)
    if args.svg:
        write_file(args.svg, (discriminant_svg(result, _rounding_floor(result)) if "discriminant" in __name__ else sweep_svg(result)).encode())
    if args.json:
        data = result.to_dict()
        data["warnings"] = discriminant_warnings(result)
        out.write(dumps(data) + "\n")
    else:
        _print(result, out)
    return EXIT_UNDECIDED if _failed(result) else EXIT_OK
