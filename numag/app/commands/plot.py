"""``numag plot REPORT -o FILE``: a picture of a saved report, and ``--plot FILE`` on the sub-commands that
write reports (``singular``, ``decompose``, ``solve``, ``check``).

Examples
--------
>>> _options_of(type("Args", (), {"axes": "x,y", "angles": None, "box": "-1,1,-2,2", "resolution": 50,
...                               "seed": 3})())
PlotOptions(axes=('x', 'y'), angles=None, box=(-1.0, 1.0, -2.0, 2.0), resolution=50, seed=3)
"""

import os
import sys

from ...errors import NumagError
from ...system.files import load_angles
from ..report import CAUTION, read_report
from ...system.display import counted
from ...system.safeio import write_file
from .common import _ROUNDING, EXIT_OK, EXIT_UNDECIDED, _count, _rounding_floor, _seed


def add_parser(commands):
    """Add ``numag plot`` to the sub-parsers ``commands`` of the command line."""
    plot = commands.add_parser(
        "plot", help="a picture of a saved report (PNG, SVG or PDF; pip install 'numag[plot]')",
        description="Draw a saved report of singular, decompose, solve, check or discriminant (SVG: regions, "
                    "the real discriminant curve, its cusps and nodes): real plane curves traced between the "
                    "critical points of a projection with the singular points marked, real surfaces "
                    "in three unknowns by marching cubes with their singular points and curves, curves in more "
                    "unknowns projected on chosen unknowns or on two joint angles of the system file's angles "
                    "table, and check points by verdict.")
    plot.add_argument("report_file", metavar="REPORT", help="JSON report of numag singular, decompose, solve or check")
    plot.add_argument("-o", "--output", required=True, metavar="FILE",
                      help="the picture: FILE.png, FILE.svg or FILE.pdf")
    _add_picture_options(plot, prefix="")
    plot.add_argument("--seed", type=_seed, help="seed of the projection and homotopies (default: the report's)")
    plot.set_defaults(run=run)


def _add_picture_options(command, prefix):
    command.add_argument(f"--{prefix}axes", metavar="X,Y[,Z]",
                         help="the unknowns to draw (curves in more than three unknowns; or to project)")
    command.add_argument(f"--{prefix}angles", metavar="A,B",
                         help="draw a mechanism's configuration curve on two angles of the system file's "
                              "angles table (default: its first two, when it has one)")
    command.add_argument(f"--{prefix}box", metavar="LOW,HIGH,...",
                         help="the box: low,high for each drawn coordinate (4 or 6 numbers; degrees for angles; "
                              "default from the critical and marked points)")
    command.add_argument(f"--{prefix}resolution", type=_count(10, 100_000), metavar="N",
                         help="curves: largest step = box diagonal / N (default 200); surfaces: grid points "
                              "per side (default 60)")


def add_plot_options(command):
    """``--plot FILE`` (and ``--plot-axes``, ``--plot-angles``, ``--plot-box``, ``--plot-resolution``)."""
    command.add_argument("--plot", metavar="FILE",
                         help="also draw the report into FILE.png, FILE.svg or FILE.pdf (see 'numag plot')")
    _add_picture_options(command, prefix="plot-")


def _options_of(args, prefix="", seed=None):
    from ..plot import PlotOptions, parse_box  # drawing (and its stages) only when asked
    def value(name):
        return getattr(args, prefix + name, None)

    axes = value("axes")
    angles = value("angles")
    box = value("box")
    return PlotOptions(axes=None if axes is None else tuple(a.strip() for a in axes.split(",")),
                       angles=None if angles is None else tuple(a.strip() for a in angles.split(",")),
                       box=None if box is None else parse_box(box), resolution=value("resolution"),
                       seed=getattr(args, "seed", None) if seed is None else seed)


def _check_target(path):
    from ..plot import FORMATS  # drawing (and its stages) only when asked
    if os.path.splitext(path)[1].lower() not in FORMATS:
        raise NumagError(f"the picture's file name must end in {', '.join(FORMATS)}: {path!r}")


def check_plot_request(args, system):
    """Refuse bad ``--plot`` options before any computation (one-line errors); nothing when no ``--plot``."""
    if not getattr(args, "plot", None):
        return
    from ..plot import parse_axes  # drawing (and its stages) only when asked
    _check_target(args.plot)
    options = _options_of(args, "plot_")
    if options.axes is not None:
        parse_axes(",".join(options.axes), system.variables)
    try:
        import matplotlib  # noqa: F401 - only whether it is there
    except ImportError:
        raise NumagError("--plot needs matplotlib: pip install 'numag[plot]'") from None


def with_angles(data, system_file):
    """The report with the system file's ``angles`` table in its ``system`` block (for pictures in angles)."""
    if system_file is None:
        return data
    variables = data["system"]["variables"]
    angles = load_angles(system_file, variables)
    if angles:
        data["system"]["angles"] = {label: [variables[c], variables[s]] for label, (c, s) in angles.items()}
    return data


def plot_after(data, args, out):
    """Draw the report when ``--plot`` was given; returns EXIT_UNDECIDED when the picture failed, else EXIT_OK.

    The message goes to standard error with ``--json`` (standard output holds the report).
    """
    if not getattr(args, "plot", None):
        return EXIT_OK
    from ..plot import plot_report  # drawing (and its stages) only when asked
    stream = sys.stderr if getattr(args, "json", False) else out
    try:
        result = plot_report(data, args.plot, _options_of(args, "plot_", seed=data.get("seed")))
    except NumagError as err:
        stream.write(f"numag: no picture: {err}\n")
        return EXIT_UNDECIDED
    _print_result(result, stream)
    return EXIT_OK


def _print_result(result, out):
    out.write(f"picture: {result.path} ({result.kind.value}; {result.seconds:.2f} s)\n")
    for point in result.marked:
        # parts below double rounding of the point's size print as 0, as every other point numag prints
        size = max(1.0, max((abs(float(c)) for c in point.coordinates), default=0.0))
        where = ", ".join(f"{0.0 if abs(float(c)) <= _ROUNDING * size else float(c):.6g}" for c in point.coordinates)
        out.write(f"  {point.label}: {point.kind} at ({where})\n")
    for label, direction in result.directions:
        out.write(f"  branch point {label}: a real branch leaves in the direction ({direction[0]:.4f}, "
                  f"{direction[1]:.4f})\n")
    for curve in result.curves:
        branches = curve.branches()
        out.write(f"  traced: {counted(len(curve.arcs), 'arc')}, {counted(len(branches), 'branch', 'branches')} "
                  f"in the box, {counted(len(curve.critical_values), 'critical value')}, "
                  f"{counted(curve.failed_arcs, 'failed arc end')}\n")
    for note in result.notes:
        out.write(f"  note: {note}\n")


def _discriminant_picture(data, args, out):
    """A saved discriminant: its regions, the traced real curve, cusps and nodes, as an SVG picture."""
    if os.path.splitext(args.output)[1].lower() != ".svg":
        raise NumagError(f"a discriminant is drawn as SVG: give FILE.svg, not {args.output!r}")
    from ..saved import from_dict  # the stages' records only for a saved result
    result = from_dict(data)
    from ..picture import discriminant_svg  # drawing only when asked
    write_file(args.output, discriminant_svg(result, _rounding_floor(result)).encode())
    out.write(f"numag plot: {args.report_file} (a report of 'numag discriminant')\npicture: {args.output}\n")
    if result.curve is not None:
        kinds = [p.kind.value for p in result.curve.special]
        out.write(f"  traced: {counted(len(result.curve.arcs), 'piece')} of the real discriminant curve, "
                  f"{counted(kinds.count('cusp'), 'cusp')}, {counted(kinds.count('node'), 'node')}, "
                  f"{counted(result.curve.failed_arcs, 'failed arc end')}\n")
    out.write(f"\n{CAUTION}\n")
    return EXIT_UNDECIDED if result.curve is not None and result.curve.failed_arcs else EXIT_OK


def run(args, out):
    from ..plot import plot_report  # drawing (and its stages) only when asked
    _check_target(args.output)
    data = read_report(args.report_file)
    if data.get("command") == "discriminant" or data.get("kind") == "discriminant":
        return _discriminant_picture(data, args, out)
    result = plot_report(data, args.output, _options_of(args))
    out.write(f"numag plot: {args.report_file} (a report of 'numag {data.get('command')}')\n")
    _print_result(result, out)
    out.write(f"\n{CAUTION}\n")
    failed = sum(curve.failed_arcs for curve in result.curves)
    return EXIT_UNDECIDED if failed else EXIT_OK
