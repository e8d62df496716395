"""The anatomy in the readable summary and in the JSON reports of ``singular`` and ``check``.

Examples
--------
>>> import io, numpy as np
>>> from numag.anatomy.records import Branch, Motion, PointAnatomy
>>> anatomy = PointAnatomy(np.zeros(2), 1, 2, branches=[Branch(1, np.array([1, 0j]), True),
...                        Branch(1, np.array([0j, 1]), True)], motion=Motion.SWITCH)
>>> out = io.StringIO(); write_point_anatomy(anatomy, ["x", "y"], out); print(out.getvalue().splitlines()[0])
        multiplicity 2
"""

import numpy as np

from ..anatomy.records import TypeTest
from ..system.display import counted
from .commands.common import _format_point

__all__ = ["write_point_anatomy", "write_component_anatomy", "attach_to_singular", "attach_to_check"]


def _direction(names, tangent):
    tangent = np.asarray(tangent)
    if np.all(np.abs(tangent.imag) <= 1e-9):
        return "(" + ", ".join(f"{n} {v.real:+.4f}" for n, v in zip(names, tangent)) + ")"
    return "(" + ", ".join(f"{n} {v.real:+.4f}{v.imag:+.4f}i" for n, v in zip(names, tangent)) + ")"


def _rates(rates):
    """'crank +1.0000 deg, rocker -0.6000 deg per degree of the fastest' style text."""
    return ", ".join(f"{label} {value:+.4f} deg" for label, value in rates.items()) + " (per degree of the fastest)"


def write_point_anatomy(anatomy, names, out, indent="        "):
    """Write a :class:`~numag.anatomy.records.PointAnatomy` as indented lines."""
    multiplicity = "not counted" if anatomy.multiplicity is None else str(anatomy.multiplicity)
    if anatomy.multiplicity is None and anatomy.multiplicity_read is not None:  # decision 0120
        multiplicity = f"undecided (read {anatomy.multiplicity_read}, not confirmed by the type)"
    out.write(f"{indent}multiplicity {multiplicity}\n")
    h = anatomy.hypersurface
    if h is not None:
        qh = "" if h.quasi_homogeneous is None else (", quasi-homogeneous" if h.quasi_homogeneous
                                                       else ", not quasi-homogeneous")
        # None is infinite for a non-isolated singularity, and undecided where the reading was not trusted
        unknown = "infinite" if h.decided_by is TypeTest.MILNOR_INFINITE else "undecided"
        mu = unknown if h.milnor is None else str(h.milnor)
        tau = unknown if h.tjurina is None else str(h.tjurina)
        paths = "" if h.milnor_by_paths is None else f" ({h.milnor_by_paths} by homotopy paths)"
        if h.milnor is None and unknown == "undecided":
            # decision 0120: what was read, and the bound known, never a number as fact
            known = ([f"at least {h.milnor_at_least}"] if h.milnor_at_least else []) + (
                [f"read {h.milnor_read} by the local dual space"] if h.milnor_read is not None else []) + (
                [f"{h.milnor_by_paths} by homotopy paths"] if h.milnor_by_paths is not None else [])
            paths = f" ({'; '.join(known)})" if known else ""
        if h.tjurina is None and unknown == "undecided" and h.tjurina_read is not None:
            tau += f" (read {h.tjurina_read})"
        corank = str(h.corank) if h.corank_decided else f"undecided (read {h.corank})"
        out.write(f"{indent}type {h.type.label}: Hessian corank {corank}, Milnor number {mu}{paths}, Tjurina number "
                  f"{tau}{qh}\n")
        values = ", ".join(f"{v:.3g}" for v in h.hessian.singular_values)
        out.write(f"{indent}  decided by: {h.decided_by.value} (scaled Hessian singular values [{values}], zero "
                  f"below {h.hessian.tolerance:.1g})\n")
    if anatomy.intersection is not None:
        reading = anatomy.intersection
        mu = "undecided" if reading.milnor is None else str(reading.milnor)
        delta = "" if reading.delta is None else f", delta {reading.delta} (mu = 2 delta - r + 1)"
        out.write(f"{indent}complete intersection: Milnor number {mu} (Le-Greuel formula){delta}\n")
        for note in reading.notes:
            out.write(f"{indent}  note: {note}\n")
    if anatomy.branches is not None:
        reality = "reality not decided" if anatomy.real_branches is None else f"{anatomy.real_branches} real"
        out.write(f"{indent}{counted(len(anatomy.branches), 'branch', 'branches')}, {reality}\n")
        for k, branch in enumerate(anatomy.branches, 1):
            kind = "reality not decided" if branch.real is None else ("real" if branch.real else "complex")
            where = _rates(branch.angle_rates) if branch.angle_rates else "tangent " + _direction(names, branch.tangent)
            out.write(f"{indent}  branch {k}: {kind}, multiplicity {branch.multiplicity}, {where}\n")
    elif anatomy.branches_read is not None:  # decision 0120: read, not confirmed by the type
        read = anatomy.branches_read
        real = "" if any(b.real is None for b in read) else f", {sum(1 for b in read if b.real)} real"
        out.write(f"{indent}branches undecided (the local monodromy read "
                  f"{counted(len(read), 'branch', 'branches')} of multiplicities "
                  f"{sorted(b.multiplicity for b in read)}{real}, not confirmed by the type)\n")
    if anatomy.sentence:
        out.write(f"{indent}{anatomy.sentence}\n")
    for note in anatomy.notes:
        out.write(f"{indent}note: {note}\n")


def write_component_anatomy(anatomy, names, out, indent="        "):
    """Write a :class:`~numag.anatomy.records.ComponentAnatomy` as indented lines."""
    out.write(f"{indent}transversal type (a generic normal slice at a generic point):\n")
    write_point_anatomy(anatomy.transversal, [f"u{j + 1}" for j in range(len(names) - anatomy.dimension)], out,
                        indent + "  ")
    if anatomy.special_points_searched:
        found = counted(len(anatomy.special_points), "special point")
        out.write(f"{indent}{found} where the transversal type changes\n")
        if anatomy.rejected_candidates:
            out.write(f"{indent}{counted(anatomy.rejected_candidates, 'candidate')} rejected: not on this component\n")
        if anatomy.undecided_candidates:
            out.write(f"{indent}{counted(anatomy.undecided_candidates, 'place')} where a special point may lie: "
                      "undecided\n")
    else:
        out.write(f"{indent}special points where the transversal type changes: not searched\n")
    for point in anatomy.special_points:
        shown = np.where(np.abs(point.point) < 1e-12 * (1 + np.max(np.abs(point.point))), 0, point.point)
        out.write(f"{indent}  at {_format_point(names, shown)}:\n")
        write_point_anatomy(point, [f"u{j + 1}" for j in range(len(names) - anatomy.dimension)], out, indent + "    ")
    for note in anatomy.notes:
        out.write(f"{indent}note: {note}\n")


def attach_to_singular(data, locus_anatomy):
    """Put each anatomy under ``anatomy`` of its component in a ``singular`` JSON report."""
    for entry in data["components"]:
        if entry["id"] in locus_anatomy.points:
            entry["anatomy"] = locus_anatomy.points[entry["id"]].to_dict()
        elif entry["id"] in locus_anatomy.components:
            entry["anatomy"] = locus_anatomy.components[entry["id"]].to_dict()
    data["anatomy_notes"] = list(locus_anatomy.notes)
    data["anatomy_not_given"] = list(locus_anatomy.not_given)  # singular pieces with no anatomy (decision 0147)
    data["anatomy_seconds"] = locus_anatomy.seconds
    return data


def attach_to_check(data, anatomies):
    """Put each anatomy under ``anatomy`` of its point in a ``check`` JSON report."""
    for entry in data["points"]:
        if entry["index"] in anatomies:
            entry["anatomy"] = anatomies[entry["index"]].to_dict()
    return data
