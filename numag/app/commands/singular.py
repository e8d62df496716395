"""``numag singular``: every singular point and singular component of X (the main job)."""

import numpy as np

from ...system.files import load_angles
from ...run.executor import using
from ...tracking.tracker import FAILURE_LABELS
from ...witness.cascade import WitnessOptions
from ...witness.decompose import DecomposeOptions
from ...singular.locus import FORMULATIONS, SingularOptions, singular_locus
from ..report import CAUTION, dumps, singular_to_dict
from .certify import _certified, _doubtful, _print_certification
from . import SUMMARIES
from .common import (EXIT_OK, EXIT_UNDECIDED, _Messages, _add_certify_switch, _add_executor_options,
                     _add_work_options, _format_point, _guard_paths, _load, _print_warnings, _seed,
                     _stage_executor, _with_notes, _with_warnings, _write_notes)


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
    locus.set_defaults(run=run)


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


def run(args, out):
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
