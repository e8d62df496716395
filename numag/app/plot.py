"""Pictures of saved reports: real curves with their singular points, real surfaces, mechanisms' joint angles.

:func:`plot_report` draws the report of ``singular``, ``decompose``, ``solve`` or ``check`` (matplotlib, the
optional extra ``plot``; surfaces by marching cubes from scikit-image, in the same extra):

* **two unknowns**: the real points of every equation's curve, traced by
  :func:`numag.witness.realcurve.trace_real_curve`;
* **three unknowns, one equation**: the real surface in a box (marching cubes on a grid of signs), with
  singular points and singular curves (traced from the equations F, dF) drawn on it;
* **a curve in more unknowns**: its traced real points projected on two or three chosen unknowns
  (``axes``), or, with the system file's ``angles`` table, on the torus of two joint angles, with the branch
  points marked and the real directions of the branches through them drawn as arrows;
* points of the report: singular points (labelled by id, and by type where the report names one),
  ``check`` points by verdict, real solutions of ``solve``.

The caption gives the box, the resolution, the seed and the projection, and the caution line.

Examples
--------
>>> parse_axes("x,y", ["x", "y", "z"])
(0, 1)
"""

from dataclasses import dataclass, field
import enum
import io
import math
import os
import textwrap
import time

import numpy as np

from ..errors import InputError, NumagError
from ..system.display import counted
from ..system.files import angles_from_mapping, system_from_mapping
from ..system.polynomial import PolynomialSystem
from ..system.safeio import write_file
from ..numeric.evaluate import BatchEvaluator
from ..numeric.seeds import resolved_seed
from ..witness.realcurve import RealCurveOptions, VertexKind, trace_real_curve
from .report import CAUTION

__all__ = ["PlotKind", "PlotOptions", "MarkedPoint", "PlotResult", "plot_report", "parse_axes", "parse_box",
           "FORMATS"]

#: File endings a picture can be written as.
FORMATS = (".png", ".svg", ".pdf")

#: Commands whose reports can be drawn.
PLOTTABLE = ("singular", "decompose", "solve", "check")

#: Grid points per side of the box for marching cubes when no resolution is given (60^3 evaluations).
SURFACE_RESOLUTION = 60

#: Largest grid side for marching cubes (the grid has side^3 points).
MAX_SURFACE_RESOLUTION = 300

#: Imaginary parts below this (relative to the point's size) count as real for drawing.
_REAL = 1e-8

# marker, colour and legend text per kind of marked point
_STYLE = {
    "singular": ("o", "tab:red", "singular point"),
    "smooth": ("o", "tab:green", "check: smooth"),
    "non-reduced": ("s", "tab:orange", "check: non-reduced"),
    "undecided": ("D", "tab:gray", "check: undecided"),
    "singular (check)": ("X", "tab:red", "check: singular"),
    "solution": ("*", "tab:purple", "solution"),
    "non-reduced point": ("s", "tab:orange", "non-reduced point"),   # a fat point of X (decision 0145)
    "undecided point": ("D", "tab:gray", "undecided point"),
}


#: the kinds of a singular report's points, where the traced curves may be singular
_PIECES = ("singular", "non-reduced point", "undecided point")


class PlotKind(str, enum.Enum):
    """What a picture shows."""

    PLANE = "plane curves"
    SURFACE = "surface"
    PROJECTION = "projection"
    ANGLES = "joint angles"


@dataclass(frozen=True)
class PlotOptions:
    """Options of :func:`plot_report` (defaults declared once).

    Attributes
    ----------
    axes : tuple of str, optional
        Two or three unknowns to draw (required for curves in more than three unknowns without angles).
    angles : tuple of str, optional
        Two labels of the system file's ``angles`` table (default: its first two).
    box : tuple of float, optional
        ``(low_1, high_1, low_2, high_2[, low_3, high_3])`` for the drawn coordinates (degrees for angles;
        default from the critical and marked points).
    resolution : int, optional
        Curves: the largest step is the box diagonal over this (default 200); surfaces: grid points per
        side (default 60).
    seed : int, optional
        Seed of the projection and homotopies (default: the report's seed).
    """

    axes: tuple = None
    angles: tuple = None
    box: tuple = None
    resolution: int = None
    seed: int = None


@dataclass
class MarkedPoint:
    """A point drawn with a marker: ``coordinates`` are its data coordinates in the picture."""

    label: str
    kind: str
    coordinates: tuple
    point: np.ndarray


@dataclass
class PlotResult:
    """What :func:`plot_report` drew.

    Attributes
    ----------
    path : str
    kind : PlotKind
    marked : list of MarkedPoint
    curves : list of RealCurve
        The traced curves (one per equation in the plane; X, or the singular curves of a surface).
    directions : list of (str, tuple)
        For joint-angle pictures: a branch point's label and the unit direction (in the two angles) of
        each real branch leaving it.
    triangles : int
        Triangles of a surface.
    caption : str
    seconds : float
    notes : list of str
    """

    path: str
    kind: PlotKind
    marked: list
    curves: list
    directions: list
    triangles: int
    caption: str
    seconds: float
    notes: list = field(default_factory=list)


def parse_axes(text, variables):
    """``"x,y"`` -> indices of two or three distinct unknowns (one-line errors).

    Examples
    --------
    >>> parse_axes("z,x", ["x", "y", "z"])
    (2, 0)
    """
    names = [name.strip() for name in str(text).split(",")]
    if len(names) not in (2, 3):
        raise InputError(f"--axes needs two or three unknowns separated by commas, got {str(text)[:60]!r}")
    missing = [name for name in names if name not in variables]
    if missing:
        raise InputError(f"--axes names {missing[0]!r}, which is not an unknown of the system "
                         f"({', '.join(variables)})")
    if len(set(names)) != len(names):
        raise InputError(f"--axes names an unknown twice: {str(text)[:60]!r}")
    return tuple(variables.index(name) for name in names)


def parse_box(text):
    """``"-2,2,-1,1"`` -> a tuple of 4 or 6 finite numbers, each lower bound below its upper one.

    Examples
    --------
    >>> parse_box("-2,2,-1,1.5")
    (-2.0, 2.0, -1.0, 1.5)
    """
    try:
        values = tuple(float(v) for v in str(text).split(","))
    except ValueError:
        raise InputError(f"--box needs numbers separated by commas, got {str(text)[:60]!r}") from None
    if len(values) not in (4, 6) or not all(math.isfinite(v) for v in values):
        raise InputError(f"--box needs 4 or 6 finite numbers (low,high per drawn coordinate), got {str(text)[:60]!r}")
    if any(values[k] >= values[k + 1] for k in range(0, len(values), 2)):
        raise InputError(f"--box: each lower bound must be below its upper bound, got {str(text)[:60]!r}")
    return values


def _pyplot():
    """matplotlib's pyplot on the Agg backend (no display needed), or a one-line error."""
    try:
        import matplotlib
    except ImportError:
        raise NumagError("pictures need matplotlib: pip install 'numag[plot]'") from None
    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt
    return plt


def _real_point(pairs, n=None):
    """The real point of a report's ``[[re, im], ...]`` (None when it is not real); checked for ``n`` coordinates."""
    point = np.array([complex(float(re), float(im)) for re, im in pairs])
    if n is not None and point.shape != (n,):
        raise ValueError(f"a point has {len(point)} coordinates, the system {n} unknowns")
    if not np.all(np.isfinite(point)):
        raise ValueError("a point has non-finite coordinates")
    if np.all(np.abs(point.imag) <= _REAL * (1 + np.abs(point))):
        return point.real
    return None


def _label(component):
    """A singular point's label: its id, and its type where the report names one."""
    anatomy = component.get("anatomy")
    kind = component.get("type")
    if isinstance(anatomy, dict):
        # `--anatomy` reports: Arnold's type of a hypersurface point, else the branches' motion.
        hypersurface = anatomy.get("hypersurface")
        named = hypersurface.get("type") if isinstance(hypersurface, dict) else None
        kind = named.get("label") if isinstance(named, dict) else anatomy.get("motion")
    return f"{component['id']}" + (f" {kind}" if isinstance(kind, str) and kind else "")


def _marked_points(data, n, notes):
    """(label, kind, real point) for the report's real points; complex ones are counted in ``notes``."""
    found, complex_points = [], 0
    command = data["command"]
    if command == "singular":
        for c in data["components"]:
            if c.get("at_infinity") or c.get("dimension") != 0:
                continue
            point = _real_point(c["points"][0], n)
            if point is None:
                complex_points += 1
            else:
                kind = c.get("kind", "singular")  # the piece's kind, as `singular` lists it
                found.append((_label(c), "singular" if kind == "singular" else
                              "non-reduced point" if kind == "non-reduced" else "undecided point", point))
    elif command == "check":
        for p in data["points"]:
            point = _real_point(p["point"], n)
            kind = "singular (check)" if p["verdict"] == "singular" else str(p["verdict"])
            if point is None:
                complex_points += 1
            else:
                found.append((f"p{p['index']}", kind if kind in _STYLE else "undecided", point))
    elif command == "solve":
        for k, s in enumerate(data["solutions"], 1):
            point = _real_point(s["point"], n)
            if point is None:
                complex_points += 1
            else:
                found.append((f"s{k}", "solution", point))
    if complex_points:
        verb = "is" if complex_points == 1 else "are"
        notes.append(f"{counted(complex_points, 'point')} of the report {verb} not real and {verb} not drawn")
    return found


def _singular_curve_components(data, n):
    """A singular report's affine singular curves (their witness points checked)."""
    if data["command"] != "singular":
        return []
    curves = [c for c in data["components"] if not c.get("at_infinity") and c.get("dimension") == 1]
    return [dict(c, points=[_real_point(p, n) for p in c["points"]]) for c in curves]


def _read_report(data, seed):
    """What a picture needs from a report, every field checked: a damaged report is refused in one line."""
    system, angles = _system_of(data)
    notes = []
    try:
        marked = _marked_points(data, system.n_variables, notes)
        singular_curves = _singular_curve_components(data, system.n_variables)
        seed = data.get("seed") if seed is None else seed
        if seed is not None and not (isinstance(seed, int) and not isinstance(seed, bool) and 0 <= seed < 2 ** 63):
            raise ValueError(f"the seed must be an integer from 0 to 2^63 - 1, got {str(seed)[:40]!r}")
    except (KeyError, TypeError, ValueError, IndexError, AttributeError) as err:
        raise InputError(f"the report lacks or garbles what the picture needs ({type(err).__name__}: "
                         f"{str(err)[:80]})") from None
    return system, angles, marked, singular_curves, resolved_seed(seed), notes


def _system_of(data):
    if not isinstance(data, dict) or data.get("command") not in PLOTTABLE:
        command = data.get("command") if isinstance(data, dict) else None
        raise InputError(f"numag plot draws reports of {', '.join(PLOTTABLE)}; this is a report of {command!r}")
    block = data.get("system")
    if not isinstance(block, dict):
        raise InputError("the report has no 'system' table")
    block = {k: v for k, v in block.items() if v is not None}
    system = system_from_mapping(block)
    angles = angles_from_mapping(block, system.variables)
    return system, angles


def plot_report(data, path, options=None):
    """Draw a saved report of ``singular``, ``decompose``, ``solve`` or ``check`` into ``path``.

    Parameters
    ----------
    data : dict
        The report's JSON envelope (its ``system`` may carry the ``angles`` table).
    path : str or os.PathLike
        Ends in .png, .svg or .pdf (the format).
    options : PlotOptions, optional

    Returns
    -------
    PlotResult

    Raises
    ------
    InputError
        A report that cannot be drawn (complex coefficients, a set of dimension 2 or more in more than
        three unknowns), a bad option, or a file name of another format.

    Examples
    --------
    >>> import tempfile, os
    >>> from numag.system.parse import parse_system
    >>> from numag.singular.locus import singular_locus, SingularOptions
    >>> from numag.app.report import singular_to_dict
    >>> data = singular_to_dict(singular_locus(parse_system(["y^2 - x^3"], ["x", "y"]), seed=1), SingularOptions())
    >>> result = plot_report(data, os.path.join(tempfile.mkdtemp(), "cusp.png"))
    >>> result.kind.value, [m.coordinates for m in result.marked]
    ('plane curves', [(0.0, 0.0)])
    """
    started = time.perf_counter()
    options = options or PlotOptions()
    path = os.fspath(path)
    suffix = os.path.splitext(path)[1].lower()
    if suffix not in FORMATS:
        raise InputError(f"the picture's file name must end in {', '.join(FORMATS)}: {path!r}")
    system, angles, marked, singular_curves, seed, notes = _read_report(data, options.seed)
    if system.projective:
        raise InputError("numag plot draws affine systems (write a projective one in a chart)")
    if not system.has_real_coefficients:
        raise InputError("numag plot draws real points: the equations have complex coefficients")
    if options.resolution is not None and not 10 <= options.resolution <= 100_000:
        raise InputError(f"--resolution must be from 10 to 100000, got {options.resolution}")
    plt = _pyplot()
    n, m = system.n_variables, system.n_equations
    if n < 2:
        raise InputError("numag plot draws systems in two or more unknowns (one unknown has only points)")
    axes = parse_axes(",".join(options.axes), system.variables) if options.axes else None
    if options.angles is not None or (angles and axes is None and n > 3):
        kind = PlotKind.ANGLES
    elif n == 2 and axes is None:
        kind = PlotKind.PLANE
    elif n == 3 and m == 1 and axes is None:
        kind = PlotKind.SURFACE
    else:
        kind = PlotKind.PROJECTION
        if axes is None:
            if n > 3 or m < n - 1:
                raise InputError(f"{n} unknowns: choose the unknowns to draw with --axes x,y or --axes x,y,z"
                                 + (" (or --angles, from the system file's angles table)" if angles else ""))
            axes = tuple(range(n))
        if m < n - 1:
            raise InputError(f"{counted(m, 'equation')} in {counted(n, 'unknown')}: numag plot draws curves in any "
                             "number of unknowns and surfaces in three")
    figure = plt.figure(figsize=(7.5, 7.5) if kind != PlotKind.SURFACE else (8, 8))
    try:
        if kind == PlotKind.PLANE:
            result = _draw_plane(figure, system, marked, options, seed, notes)
        elif kind == PlotKind.SURFACE:
            result = _draw_surface(figure, system, marked, singular_curves, options, seed, notes)
        elif kind == PlotKind.ANGLES:
            result = _draw_angles(figure, system, angles, marked, options, seed, notes)
        else:
            result = _draw_projection(figure, system, axes, marked, options, seed, notes)
        curves, drawn, directions, triangles, description = result
        title = f"{str(system.name or 'system')[:60]}: {data['command']} report, {kind.value}"
        figure.suptitle(title, fontsize=11)
        caption = description + f"; seed {seed}. " + CAUTION
        figure.text(0.02, 0.01, "\n".join(textwrap.wrap(caption, 120)), fontsize=6.5, va="bottom", ha="left")
        figure.subplots_adjust(bottom=0.16)
        buffer = io.BytesIO()
        figure.savefig(buffer, format=suffix[1:], dpi=150)
    finally:
        plt.close(figure)
    write_file(path, buffer.getvalue())
    for curve in curves:
        notes.extend(curve.notes)
    return PlotResult(path, kind, drawn, curves, directions, triangles, caption,
                      time.perf_counter() - started, notes)


def _box_pairs(box, count):
    """The option's box as (low, high) arrays for ``count`` drawn coordinates, or None."""
    if box is None:
        return None
    if len(box) != 2 * count:
        raise InputError(f"--box needs {2 * count} numbers here (low,high for each of {count} drawn coordinates), "
                         f"got {len(box)}")
    values = np.array(box, dtype=float)
    return values[0::2], values[1::2]


def _curve_options(options, box):
    resolution = options.resolution or RealCurveOptions.resolution
    return RealCurveOptions(box=box, resolution=resolution)


def _describe_box(low, high, names):
    return ", ".join(f"{name} in [{a:.4g}, {b:.4g}]" for name, a, b in zip(names, low, high))


def _mark(ax, marked, coordinates_of, legends=None):
    """Draw marked points with a marker per kind and a label each; returns the MarkedPoints drawn.

    ``legends`` replaces legend texts by kind (a singular point of a linkage is a branch point).
    """
    drawn, seen = [], set()
    for label, kind, point in marked:
        coordinates = coordinates_of(point)
        if coordinates is None:
            continue
        marker, colour, legend = _STYLE[kind]
        legend = (legends or {}).get(kind, legend)
        # not clipped: a point on the window's edge (an angle of 180 degrees) is drawn whole
        ax.scatter(*[[c] for c in coordinates], marker=marker, s=70, facecolors="none" if marker == "o" else colour,
                   edgecolors=colour, linewidths=2, zorder=5, label=None if kind in seen else legend, clip_on=False)
        seen.add(kind)
        if len(coordinates) == 2:
            ax.annotate(label, coordinates, textcoords="offset points", xytext=(9, -3), fontsize=8, color=colour,
                        annotation_clip=False)
        else:
            ax.text(*coordinates, f" {label}", fontsize=8, color=colour)
        drawn.append(MarkedPoint(label, kind, tuple(float(c) for c in coordinates), point))
    return drawn


def _draw_plane(figure, system, marked, options, seed, notes):
    ax = figure.add_subplot(1, 1, 1)
    box = _box_pairs(options.box, 2)
    singular = np.array([p for _, kind, p in marked if kind in _PIECES]).reshape(-1, 2)
    curves = []
    colours = ["tab:blue", "tab:olive", "tab:cyan", "tab:brown", "tab:pink"]
    for k, polynomial in enumerate(system.polynomials):
        if polynomial.degree < 1:
            continue
        one = PolynomialSystem(system.variables, [polynomial], name=system.name)
        curve = trace_real_curve(one, _curve_options(options, box), seed=seed + k, marked=singular)
        curves.append(curve)
    if box is None:
        boxes = [c.box for c in curves] or [(np.full(2, -2.0), np.full(2, 2.0))]
        box = (np.min([b[0] for b in boxes], axis=0), np.max([b[1] for b in boxes], axis=0))
    for k, curve in enumerate(curves):
        colour = colours[k % len(colours)]
        for j, branch in enumerate(curve.branches(clip=False)):
            label = (f"{system.polynomials[k].to_text(system.variables)} = 0"[:60]) if j == 0 else None
            ax.plot(branch.points[:, 0], branch.points[:, 1], color=colour, linewidth=1.4, label=label)
    drawn = _mark(ax, marked, lambda p: (float(p[0]), float(p[1])))
    ax.set_xlim(box[0][0], box[1][0])
    ax.set_ylim(box[0][1], box[1][1])
    ax.set_aspect("equal", adjustable="box")
    ax.set_xlabel(system.variables[0])
    ax.set_ylabel(system.variables[1])
    ax.grid(alpha=0.3)
    ax.legend(loc="upper right", fontsize=8)
    resolution = options.resolution or RealCurveOptions.resolution
    description = (f"Real points traced by continuation between the critical points of a random projection; "
                   f"box {_describe_box(box[0], box[1], system.variables)}; resolution {resolution} "
                   f"(largest step = box diagonal / {resolution}); every traced point satisfies its equation to "
                   f"{RealCurveOptions.tolerance:g} relative to its terms")
    return curves, drawn, [], 0, description


def _draw_projection(figure, system, axes, marked, options, seed, notes):
    three = len(axes) == 3
    ax = figure.add_subplot(1, 1, 1, projection="3d" if three else None)
    names = [system.variables[a] for a in axes]
    singular = np.array([p for _, kind, p in marked if kind in _PIECES]).reshape(-1, system.n_variables)
    curves = []
    if system.n_equations >= system.n_variables:  # isolated points: nothing to trace
        notes.append("the system has as many equations as unknowns: only its points are drawn")
    else:
        curve = trace_real_curve(system, _curve_options(options, None), seed=seed, marked=singular)
        curves.append(curve)
        for branch in curve.branches(clip=False):
            ax.plot(*[branch.points[:, a] for a in axes], color="tab:blue", linewidth=1.4)
    drawn = _mark(ax, marked, lambda p: tuple(float(p[a]) for a in axes))
    box = _box_pairs(options.box, len(axes))
    if box is not None:
        for setter, low, high in zip((ax.set_xlim, ax.set_ylim, getattr(ax, "set_zlim", None)), box[0], box[1]):
            setter(low, high)
    ax.set_xlabel(names[0])
    ax.set_ylabel(names[1])
    if three:
        ax.set_zlabel(names[2])
    else:
        ax.grid(alpha=0.3)
    if drawn:
        ax.legend(loc="upper right", fontsize=8)
    resolution = options.resolution or RealCurveOptions.resolution
    traced = "" if not curves else (f"real curve traced in {system.n_variables} unknowns in the box "
                                    f"{_describe_box(curves[0].box[0], curves[0].box[1], system.variables)}, "
                                    f"resolution {resolution}, ")
    window = "" if box is None else f"window {_describe_box(box[0], box[1], names)}, "
    description = f"Projection on ({', '.join(names)}); {traced}{window}".rstrip(", ")
    return curves, drawn, [], 0, description


def _angle_degrees(points, pair):
    c, s = pair
    return np.degrees(np.arctan2(points[:, s], points[:, c]))


def _draw_angles(figure, system, angles, marked, options, seed, notes):
    if not angles or len(angles) < 2:
        raise InputError("--angles needs the system file's angles table with at least two angles "
                         "(angles = { crank = [\"c1\", \"s1\"], rocker = [\"c2\", \"s2\"] })")
    labels = tuple(options.angles) if options.angles else tuple(angles)[:2]
    if len(labels) != 2 or labels[0] == labels[1]:
        raise InputError(f"--angles needs two different angle labels, got {','.join(labels)!r}")
    missing = [label for label in labels if label not in angles]
    if missing:
        raise InputError(f"--angles names {missing[0]!r}, which is not in the angles table ({', '.join(angles)})")
    if system.n_equations < system.n_variables - 1:
        raise InputError(f"{counted(system.n_equations, 'equation')} in {counted(system.n_variables, 'unknown')}: "
                         "the configuration set is not a curve, numag plot draws configuration curves")
    pairs = [angles[label] for label in labels]
    ax = figure.add_subplot(1, 1, 1)
    singular = np.array([p for _, kind, p in marked if kind in _PIECES]).reshape(-1, system.n_variables)
    curve = trace_real_curve(system, _curve_options(options, None), seed=seed, marked=singular)
    colours = ["tab:blue", "tab:olive", "tab:cyan", "tab:brown", "tab:pink", "tab:purple"]
    for j, branch in enumerate(curve.branches(clip=False)):
        theta = np.column_stack([_angle_degrees(branch.points, pair) for pair in pairs])
        # the torus is cut at +-180 degrees: break the line where it wraps around
        jumps = np.nonzero(np.any(np.abs(np.diff(theta, axis=0)) > 180, axis=1))[0] + 1
        for piece in np.split(theta, jumps):
            ax.plot(piece[:, 0], piece[:, 1], color=colours[j % len(colours)], linewidth=1.6)
    drawn = _mark(ax, marked, lambda p: tuple(float(_angle_degrees(p[None, :], pair)[0]) for pair in pairs),
                  legends={"singular": "branch point (singular configuration)"})
    box = _box_pairs(options.box, 2) or (np.array([-180.0, -180.0]), np.array([180.0, 180.0]))
    directions = _branch_directions(curve, pairs, drawn, ax, box)
    ax.set_xlim(box[0][0], box[1][0])
    ax.set_ylim(box[0][1], box[1][1])
    ax.set_aspect("equal", adjustable="box")
    ax.set_xticks(np.arange(-180, 181, 90))
    ax.set_yticks(np.arange(-180, 181, 90))
    ax.set_xlabel(f"{labels[0]} angle (degrees)")
    ax.set_ylabel(f"{labels[1]} angle (degrees)")
    ax.grid(alpha=0.3)
    if drawn:  # above the window: the corners of the torus's square often hold branch points
        ax.legend(loc="lower left", bbox_to_anchor=(0.0, 1.01), fontsize=8, ncol=3, frameon=False)
    resolution = options.resolution or RealCurveOptions.resolution
    description = (f"Configuration curve on the torus of the angles {labels[0]} and {labels[1]} (atan2 of the "
                   f"sine and cosine unknowns); traced in {system.n_variables} unknowns in the box "
                   f"{_describe_box(curve.box[0], curve.box[1], system.variables)}, resolution {resolution}; "
                   "arrows: the real directions of the branches leaving each branch point")
    return [curve], drawn, directions, 0, description


def _torus_copies(centre, box):
    """The copies of an angle point (shifted by multiples of 360 degrees) that lie in the window."""
    copies = []
    for dx in (-360.0, 0.0, 360.0):
        for dy in (-360.0, 0.0, 360.0):
            copy = centre + np.array([dx, dy])
            if np.all(copy >= box[0] - 1e-6) and np.all(copy <= box[1] + 1e-6):
                copies.append(copy)
    return copies


def _branch_directions(curve, pairs, drawn, ax, box):
    """Unit directions (in the two angles) of the real branches leaving each singular vertex, drawn as arrows
    at every copy of the vertex in the window (a point at 180 degrees is also at -180)."""
    directions = []
    diagonal = float(np.linalg.norm(curve.box[1] - curve.box[0]))
    for vertex, kind in enumerate(curve.vertex_kinds):
        if kind != VertexKind.SINGULAR:
            continue
        centre = np.array([_angle_degrees(curve.vertices[vertex][None, :], pair)[0] for pair in pairs])
        near = [d for d in drawn if np.linalg.norm(np.array(d.coordinates) - centre) < 1.0]
        # a branch point the report does not list (a decompose report lists none) is named by its angles
        label = near[0].label if near else f"at ({centre[0]:.4g}, {centre[1]:.4g})"
        for branch in curve.branches(clip=False):
            for end, at in ((0, branch.points), (1, branch.points[::-1])):
                if len(branch.vertices) != 2 or not np.allclose(at[0], curve.vertices[vertex], atol=1e-9 * diagonal):
                    continue
                # the branch's direction: towards its first point a little away from the vertex
                distance = np.linalg.norm(at - at[0], axis=1)
                far = np.nonzero(distance >= 0.02 * diagonal)[0]
                target = at[far[0]] if len(far) else at[-1]
                theta = np.array([_angle_degrees(target[None, :], pair)[0] for pair in pairs])
                step = (theta - centre + 180.0) % 360.0 - 180.0
                norm = np.linalg.norm(step)
                if norm == 0:
                    continue
                unit = step / norm
                directions.append((label, (float(unit[0]), float(unit[1]))))
                for copy in _torus_copies(centre, box):
                    tip = copy + 22 * unit
                    if np.all(tip >= box[0]) and np.all(tip <= box[1]):  # a branch into the window
                        ax.annotate("", xy=tuple(tip), xytext=tuple(copy),
                                    arrowprops=dict(arrowstyle="->", color="black", linewidth=1.2), zorder=6)
        for copy in _torus_copies(centre, box):
            if not np.allclose(copy, centre):
                ax.scatter([copy[0]], [copy[1]], marker="o", s=70, facecolors="none", edgecolors="tab:red",
                           linewidths=2, zorder=5, clip_on=False)
    return directions


def _surface_grid(system, low, high, resolution):
    """Values of the one equation on a resolution^3 grid, evaluated in slabs (to bound memory)."""
    evaluator = BatchEvaluator([p.numeric() for p in system.polynomials])
    axes = [np.linspace(low[k], high[k], resolution) for k in range(3)]
    volume = np.empty((resolution, resolution, resolution))
    y, z = np.meshgrid(axes[1], axes[2], indexing="ij")
    for i, x in enumerate(axes[0]):  # one slab of resolution^2 points per call: vectorised, bounded memory
        points = np.column_stack([np.full(y.size, x), y.ravel(), z.ravel()]).astype(complex)
        volume[i] = evaluator.evaluate(points, jacobian=False)[:, 0].real.reshape(resolution, resolution)
    return volume, axes


def _draw_surface(figure, system, marked, singular_curves, options, seed, notes):
    try:
        from skimage.measure import marching_cubes
    except ImportError:
        raise NumagError("surfaces need scikit-image: pip install 'numag[plot]'") from None
    from mpl_toolkits.mplot3d.art3d import Poly3DCollection

    ax = figure.add_subplot(1, 1, 1, projection="3d")
    resolution = options.resolution or SURFACE_RESOLUTION
    if resolution > MAX_SURFACE_RESOLUTION:
        raise InputError(f"--resolution for a surface is at most {MAX_SURFACE_RESOLUTION} grid points per side "
                         f"(its cube is evaluated), got {resolution}")
    box = _box_pairs(options.box, 3)
    points = np.array([p for _, _, p in marked]).reshape(-1, 3)
    if box is None:
        witness = [p for c in singular_curves for p in c["points"]]
        anchors = np.vstack([points] + [w[None, :] for w in witness if w is not None] + [np.zeros((1, 3))])
        centre = 0.5 * (anchors.min(axis=0) + anchors.max(axis=0))
        half = np.maximum(0.5 * (anchors.max(axis=0) - anchors.min(axis=0)) * 1.5, 1.5)
        box = (centre - half.max(), centre + half.max())
    low, high = box
    volume, _ = _surface_grid(system, low, high, resolution)
    triangles = 0
    if volume.min() < 0 < volume.max():
        spacing = tuple((high - low) / (resolution - 1))
        vertices, faces, _, _ = marching_cubes(volume, level=0.0, spacing=spacing)
        vertices += low
        triangles = len(faces)
        mesh = Poly3DCollection(vertices[faces], alpha=0.35, facecolor="tab:blue", edgecolor="none")
        ax.add_collection3d(mesh)
    else:
        notes.append("the equation does not change sign in the box: marching cubes finds no surface there")
    curves = []
    singular_points = points[[k == "singular" for _, k, _ in marked]] if len(points) else points
    for component in singular_curves:
        # the singular curve lies in V(df/dx, df/dy, df/dz) and on f = 0: trace the first (random real
        # combinations of the partials: lower degrees, fewer paths than with f) and keep the arcs on f = 0
        f = system.polynomials[0]
        equations = PolynomialSystem(system.variables, list(f.gradient()), name=system.name)
        box_options = RealCurveOptions(box=(low, high), resolution=options.resolution or RealCurveOptions.resolution)
        try:
            curve = trace_real_curve(equations, box_options, seed=seed, marked=singular_points, constraints=[f])
        except InputError as err:
            notes.append(f"singular curve {component['id']} was not traced ({err}); its witness points are drawn")
            witness = np.array([w for w in component["points"] if w is not None]).reshape(-1, 3)
            if len(witness):
                ax.scatter(witness[:, 0], witness[:, 1], witness[:, 2], color="tab:red", marker="^", s=40)
            continue
        curves.append(curve)
        for j, branch in enumerate(curve.branches()):
            ax.plot(branch.points[:, 0], branch.points[:, 1], branch.points[:, 2], color="tab:red", linewidth=2.5,
                    label="singular curve" if j == 0 and len(curves) == 1 else None)
        break  # one trace of V(f, grad f) draws every singular curve
    drawn = _mark(ax, marked, lambda p: (float(p[0]), float(p[1]), float(p[2])))
    ax.set_xlim(low[0], high[0])
    ax.set_ylim(low[1], high[1])
    ax.set_zlim(low[2], high[2])
    ax.set_xlabel(system.variables[0])
    ax.set_ylabel(system.variables[1])
    ax.set_zlabel(system.variables[2])
    if drawn or curves:
        ax.legend(loc="upper right", fontsize=8)
    description = (f"Real surface by marching cubes on a {resolution}^3 grid in the box "
                   f"{_describe_box(low, high, system.variables)} (parts where the equation keeps its sign, "
                   "such as a double line, are not seen by marching cubes: singular curves are traced and drawn "
                   "in red)")
    return curves, drawn, [], triangles, description
