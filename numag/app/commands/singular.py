"""``numag singular``: every singular point and singular component of X (the main job)."""

import numpy as np

from ...system.files import load_angles, load_groups
from ...run.executor import using
from ...tracking.tracker import FAILURE_LABELS
from ...witness.cascade import WitnessOptions
from ...witness.decompose import DecomposeOptions
from ...singular.locus import EMBEDDED_EXPLANATION, FORMULATIONS, SingularOptions, singular_locus
from ...anatomy.survey import infinity_chart, locus_anatomy, projective_chart
from ..anatomy_text import attach_to_singular, write_component_anatomy, write_point_anatomy
from ...singular.kinds import PieceKind
from ...tracking.starts import StartKind
from ..report import CAUTION, dumps, singular_to_dict
from .certify import _certified, _doubtful, _print_certification
from . import SUMMARIES
from .plot import add_plot_options, check_plot_request, plot_after, with_angles
from .common import (EXIT_OK, EXIT_UNDECIDED, _WITNESS_ACCURACY, _add_certify_switch, _add_executor_options,
                     _add_work_options, _counted, _guard_paths, _headline, _load, _PointFormat, _print_warnings,
                     _progress, _seed, _stage_executor, _unsearched, _with_notes, _with_warnings, _write_notes)


def add_parser(commands):
    """Add ``numag singular`` to the sub-parsers ``commands`` of the command line."""
    locus = commands.add_parser(
        "singular", help=SUMMARIES["singular"],
        description="Decompose X, then find every point where the Jacobian's rank drops below the codimension "
                    "of the component it lies on, or where components meet: singular points and singular "
                    "components with dimension, degree and witness points.")
    locus.add_argument("system_file", metavar="FILE", help="system file (TOML)")
    locus.add_argument("--formulation", choices=FORMULATIONS, default=SingularOptions.formulation,
                       help="how 'rank J < c' is written: the minors, the null-vector form, the gradient "
                            "(hypersurfaces), or chosen by estimated cost (default %(default)s)")
    locus.add_argument("--start", choices=[k.value for k in StartKind], default=SingularOptions.start.value,
                       help="start of the singular points' search: total-degree (witness sets), or multihomogeneous, "
                            "polyhedral, auto (the square null-vector system, x and lambda grouped, where X is a "
                            "reduced complete intersection; default %(default)s)")
    locus.add_argument("--lowest-dimension", type=int, metavar="K",
                       help="do not search components (of X and of the singular locus) below dimension K")
    locus.add_argument("--at-infinity", action="store_true",
                       help="several equations: also search singular points at infinity (of V(F^h); a second "
                            "computation of the same size). Hypersurfaces always get them.")
    locus.add_argument("--digits", type=int, default=SingularOptions.digits, metavar="D",
                       help="highest precision (decimal digits) for escalated rank decisions (default %(default)s)")
    locus.add_argument("--seed", type=_seed, help="seed of the random choices (recorded in the report)")
    locus.add_argument("--json", action="store_true", help="print the report as JSON (no progress lines)")
    locus.add_argument("--anatomy", action="store_true",
                       help="also the anatomy of each singular point (multiplicity, type, Milnor and Tjurina numbers, "
                            "branches of curves) and the transversal type along singular components")
    _add_executor_options(locus)
    _add_certify_switch(locus)
    _add_work_options(locus)
    add_plot_options(locus)
    locus.set_defaults(run=run)


def _angles_text(point, angles):
    if not angles or np.any(np.abs(point.imag) > 1e-8 * (1 + np.abs(point))):
        return ""
    def degrees(c, s):
        value = round(float(np.degrees(np.arctan2(point[s].real, point[c].real))), 4)
        return 180.0 if value == -180.0 else value + 0.0  # + 0.0 turns -0.0 into 0.0

    return "  (" + ", ".join(f"{label} {degrees(c, s):.4f} deg" for label, (c, s) in angles.items()) + ")"


def _print_singular(result, out, angles, data=None, anatomy=None):
    system = result.system
    out.write(_headline("singular", system, result.seed))
    lowest = (data or {}).get("options", {}).get("lowest_dimension")
    if result.variety is not None:
        parts = ", ".join(f"dimension {c.dimension} degree {c.degree}" for c in result.variety.components)
        out.write(f"X: {_counted(len(result.variety.components), 'component')}: {parts or 'empty'}"
                  f"{_unsearched(lowest)}\n")
    counts = result.paths
    failed = sum(counts.get(label, 0) for label in FAILURE_LABELS)
    dropped = ", ".join(f"{k.replace('_', ' ')} {v}" for k, v in result.discarded.items()) or "none"
    out.write(f"paths: {counts.get('tracked', 0)} tracked, {failed} failed; candidates dropped: {dropped}; "
              f"{result.seconds:.2f} s\n")
    for route in result.start.get("codimensions", []):
        searches = "; ".join(f"{s['tracked']} paths ({s['start'].get('chosen')}; by start "
                             + ", ".join(f"{k} {v}" for k, v in s["start"].get("paths", {}).items())
                             + (f"; cut by {_counted(s['hyperplanes'], 'hyperplane')}" if s["hyperplanes"] else "")
                             + ")"
                             for s in route.get("searches", []))
        regeneration = route.get("regeneration")
        out.write(f"start for codimension {route['codimension']}: {route['route']} ({route['why']})"
                  + (f": {searches}" if searches else "")
                  + (f"; regeneration {regeneration['chosen']} ({regeneration['reason']})" if regeneration else "")
                  + "\n")
    affine = [c for c in result.components if not c.at_infinity]
    points = [c for c in affine if c.dimension == 0 and c.kind is PieceKind.SINGULAR]
    real = sum(1 for c in points if c.real[0])
    out.write(f"\n{_counted(len(points), 'singular point')}, {real} real{_unsearched(lowest, dimension=0)}\n")
    names = system.variables
    text = _PointFormat()
    for c in points:
        where = f"  on components {', '.join(map(str, c.on_components))}" if c.on_components else ""
        out.write(f"  {c.id:4d}  {'real' if c.real[0] else 'complex'}  {text(names, c.points[0], _WITNESS_ACCURACY)}"
                  f"{_angles_text(c.points[0], angles)}{where}\n")
        if anatomy is not None and c.id in anatomy.points:  # projective: read in an affine chart, its names
            chart = projective_chart(system, c.points[0])[1] if system.projective else names
            write_point_anatomy(anatomy.points[c.id], chart, out)
    if result.near_singular:  # decision 0062: never dropped silently
        out.write(f"\n{_counted(len(result.near_singular), 'near-singular point')} (smooth as written; the input's "
                  "precision cannot tell them from singular points)\n")
        for k, near in enumerate(result.near_singular, 1):
            out.write(f"  {k:4d}  {'real' if near.real else 'complex'}  "
                      f"{text(names, near.point, _WITNESS_ACCURACY)}\n        {near.explanation()}\n")
    if result.embedded:  # decision 0105: listed apart, never among X's singular points
        out.write(f"\n{_counted(len(result.embedded), 'embedded point')} of the equations, not singular points of X "
                  f"({EMBEDDED_EXPLANATION})\n")
        for k, point in enumerate(result.embedded, 1):
            real = bool(np.all(np.abs(np.imag(point)) <= _WITNESS_ACCURACY * (1 + np.linalg.norm(point))))
            out.write(f"  {k:4d}  {'real' if real else 'complex'}  {text(names, point, _WITNESS_ACCURACY)}\n")
    if result.embedded_components:  # decision 0108: listed apart, never among X's singular pieces
        out.write(f"\n{_counted(len(result.embedded_components), 'embedded component')} of the equations of positive "
                  "dimension, not singular sets of X (the Jacobian of the given equations drops rank all along each, "
                  "but its generic point lies on one reduced component of X with multiplicity 1 there, so X is smooth "
                  "there)\n")
        for k, c in enumerate(result.embedded_components, 1):
            out.write(f"  {k:4d}  dimension {c.dimension}  degree {c.degree}  "
                      f"{_counted(int(sum(c.real)), 'real witness point')}  on components "
                      f"{', '.join(map(str, c.on_components))}\n")
            out.write(f"        e.g. {text(names, c.points[int(np.argmax(c.real))], _WITNESS_ACCURACY)}\n")
    larger = [c for c in affine if c.dimension > 0 or c.kind is not PieceKind.SINGULAR]
    if larger:
        # one heading for three kinds of piece: a point is named a point, not a set of dimension 0
        out.write(f"\n{_counted(len(larger), 'piece')} of positive dimension, non-reduced or undecided"
                  f"{_unsearched(lowest)}\n")
        for c in larger:
            shape = (f"point  {'real' if c.real[0] else 'complex'}" if c.dimension == 0 else
                     f"dimension {c.dimension}  degree {c.degree}  {_counted(int(sum(c.real)), 'real witness point')}")
            out.write(f"  {c.id:4d}  {c.kind}  {shape}  ({c.formulation})\n")
            where = text(names, c.points[int(np.argmax(c.real))], _WITNESS_ACCURACY)
            out.write(f"        {'e.g.' if c.dimension else 'at'} {where}\n")
            if anatomy is not None and c.id in anatomy.components:
                write_component_anatomy(anatomy.components[c.id], names, out)
    infinite = [c for c in result.components if c.at_infinity]
    if infinite:
        homogeneous = ["(w)"] + list(names)
        out.write(f"\n{_counted(len(infinite), 'singular point')} at infinity of the closure"
                  f"{_unsearched(lowest, dimension=0)} (homogeneous coordinates "
                  f"{', '.join(homogeneous)}):\n")
        for c in infinite:
            out.write(f"  {c.id:4d}  {text(homogeneous, c.points[0], _WITNESS_ACCURACY)}\n")
            if anatomy is not None and c.id in anatomy.points:  # read in an affine chart, its names
                write_point_anatomy(anatomy.points[c.id], infinity_chart(system, c.points[0])[1], out)
    for note in result.notes + (anatomy.notes if anatomy is not None else []):
        out.write(f"\nnote: {note}\n")
    _print_warnings(data, out)
    _print_certification(data, out)
    out.write(("\n" + text.footnote()) if text.used else "")
    out.write(f"\n{CAUTION}\n")


def run(args, out):
    system = _load(args)
    _guard_paths(args, system, "singular")
    check_plot_request(args, system)
    angles = load_angles(args.system_file, system.variables)
    options = SingularOptions(formulation=args.formulation, digits=args.digits, infinity_for_systems=args.at_infinity,
                              start=args.start,
                              decompose=DecomposeOptions(witness=WitnessOptions(
                                  lowest_dimension=args.lowest_dimension,
                                  groups=None if args.start == StartKind.TOTAL_DEGREE.value
                                  else load_groups(args.system_file, system.variables))))
    if args.lowest_dimension is not None:
        options.decompose.witness.validated(system.n_variables)
    with _stage_executor(args) as executor, using(executor):
        result = singular_locus(system, options, seed=args.seed, progress=_progress(args))
        data = _with_notes(singular_to_dict(result, options), args)
        data["execution"] = executor.describe()
        anatomy = locus_anatomy(result, angles=angles) if args.anatomy else None
        if anatomy is not None:
            attach_to_singular(data, anatomy)
    data = with_angles(_with_warnings(_certified(data, args)), args.system_file)
    if anatomy is not None and anatomy.incomplete():
        incomplete = [k for k in anatomy.incomplete() if k not in anatomy.not_given]
        noun, pronoun = ("component", "its") if len(incomplete) == 1 else ("components", "their")
        if incomplete:
            data["warnings"].append(f"the anatomy of singular {noun} {', '.join(map(str, incomplete))} "
                                    f"is incomplete (see {pronoun} notes)")
        if anatomy.not_given:
            noun = "piece" if len(anatomy.not_given) == 1 else "pieces"
            data["warnings"].append(f"no anatomy given for singular {noun} {', '.join(map(str, anatomy.not_given))} "
                                    "(see the notes)")
    if args.json:
        out.write(dumps(data) + "\n")
    else:
        _write_notes(args, out)
        _print_singular(result, out, angles, data, anatomy)
    undecided = any(c.kind is PieceKind.UNDECIDED for c in result.components)
    pictured = plot_after(data, args, out)
    return EXIT_UNDECIDED if undecided or _doubtful(data) or data["warnings"] or pictured else EXIT_OK
