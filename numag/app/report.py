"""Reports as JSON: one envelope for every sub-command, and the round trip back to dataclasses.

The envelope (documented in the README) always has

* ``numag_version``, ``command``, ``seed``;
* ``system``: ``name``, ``variables``, ``equations`` (text that reads back exactly),
  ``projective``;
* ``paths``: counts of tracked paths by status (``tracked``, ``converged``,
  ``singular_endpoint``, ``at_infinity``, ``failed`` with ``failed_by_reason``);
  they always add up, and are all zero for commands that track no paths;
* ``components``: a list (empty for commands that compute none);
* ``caution``: the standing caution about numerical results.

A complex point is a list of ``[real, imaginary]`` pairs, one per variable.
A gap of infinity is written as the string ``"infinity"``.

Examples
--------
>>> encode_point(np.array([1 + 2j, 3]))
[[1.0, 2.0], [3.0, 0.0]]
"""

import copy
import dataclasses
from dataclasses import dataclass
import enum
from typing import TYPE_CHECKING
import json
import math
import os
import time

import numpy as np

from ..errors import InputError, NumagError
from ..version import __version__
from ..system.display import counted
from ..system.files import system_from_mapping
from ..system.polynomial import PolynomialSystem
from ..system.safeio import MAX_INPUT_BYTES, loads_json, read_limited, write_file
from ..run.executor import InProcess
from ..numeric.linalg import RankEvidence
from ..numeric.scaling import Scaling
from ..tracking.infinity import InfinityKind
from ..tracking.solve import Solution, SolveOptions, SolveResult, lost_first_stage_paths
from ..tracking.tracker import FAILURE_LABELS, PathStatus, TrackerOptions
from ..families.records import MISSED_ON_LINES

if TYPE_CHECKING:  # the stages are imported where their results are converted: `numag solve` starts faster
    from ..certify.records import CertifyOptions, Claim

__all__ = ["CAUTION", "encode_point", "decode_point", "empty_path_counts", "system_to_dict",
           "check_report_to_dict", "check_report_from_dict", "check_warnings", "certification_doubtful", "dumps",
           "json_chunks", "write_json", "EncodedSequence",
           "loads_check_report",
           "solve_report_to_dict", "solve_report_from_dict", "certificate_to_dict", "certificate_from_dict",
           "certify_report", "read_report", "write_report", "compare_to_dict", "compare_from_dict", "json_keys"]

#: Printed with every result (terminal and JSON).
CAUTION = ("Numerical results. Before relying on them for a real machine or structure, verify them with "
           "certification and defer to the applicable standards and licensed engineering practice.")


def encode_point(point):
    """Complex vector -> list of [real, imaginary] pairs."""
    # the complex numbers' memory read as (real, imaginary) pairs of floats, converted at once: a float() per
    # number was a third of the Python work of a 1,024-solution report
    return np.ascontiguousarray(point, dtype=complex).view(np.float64).reshape(-1, 2).tolist()


def decode_point(pairs):
    """List of [real, imaginary] pairs -> complex vector."""
    try:
        return np.array([complex(float(re), float(im)) for re, im in pairs], dtype=complex)
    except (TypeError, ValueError):
        raise InputError(f"a point must be a list of [real, imaginary] pairs, got {str(pairs)[:60]}") from None


def _encode_float(value):
    if value is None:
        return None
    value = float(value)
    if value == float("inf"):
        return "infinity"
    return value


def _decode_float(value):
    if value is None:
        return None
    return float("inf") if value == "infinity" else float(value)


def empty_path_counts():
    """Path counts of a command that tracks no paths."""
    return {"tracked": 0, "converged": 0, "singular_endpoint": 0, "at_infinity": 0, "failed": 0,
            "failed_by_reason": {}}


def system_to_dict(system):
    """The system as the keys of a system file (exact text)."""
    return {"name": system.name, "variables": list(system.variables), "equations": system.to_texts(),
            "projective": system.projective}


def _evidence_to_dict(evidence):
    return {"rank": evidence.rank, "singular_values": [float(v) for v in evidence.singular_values],
            "row_scales": [float(v) for v in evidence.row_scales], "tolerance": float(evidence.tolerance),
            "gap": _encode_float(evidence.gap), "digits": evidence.digits, "escalated": evidence.escalated,
            "point": encode_point(evidence.point)}


def _evidence_from_dict(data):
    return RankEvidence(rank=int(data["rank"]), singular_values=np.array(data["singular_values"], dtype=float),
                        row_scales=np.array(data["row_scales"], dtype=float), tolerance=float(data["tolerance"]),
                        gap=_decode_float(data["gap"]), digits=int(data["digits"]),
                        escalated=bool(data["escalated"]), point=decode_point(data["point"]))


def _verdict_to_dict(v):
    return {
        "index": v.index, "given": encode_point(v.given), "point": encode_point(v.point),
        "distance": _encode_float(v.distance), "residual": _encode_float(v.residual), "verdict": v.verdict, "rank": v.rank,
        "codimension": v.codimension, "tangent_dimension": v.tangent_dimension,
        "local_dimension": v.local_dimension, "local_dimension_source": v.local_dimension_text(),
        "evidence": _evidence_to_dict(v.evidence),
        "nearest_rank_drop": None if v.nearest_rank_drop is None else encode_point(v.nearest_rank_drop),
        "nearest_rank_drop_distance": _encode_float(v.nearest_rank_drop_distance),
        "notes": list(v.notes),
        "components": [dict(c) for c in v.components],
        "backward_error": _encode_float(v.backward_error),
        "backward_tolerance": _encode_float(v.backward_tolerance),
        "near_singular": v.near_singular,
        "newton": None if v.newton is None else v.newton.value,
        "judged": None if v.judged is None else v.judged.value,
        "on_x_exactly": v.on_x_exactly,
        "data_radius": _encode_float(v.data_radius),
    }


def _verdict_from_dict(d):
    from ..numeric.refine import ZeroKind
    from ..singular.kinds import JudgedPoint, LocalDimensionSource, Verdict
    from ..singular.smoothness import PointVerdict
    return PointVerdict(
        index=int(d["index"]), given=decode_point(d["given"]), point=decode_point(d["point"]),
        distance=_decode_float(d["distance"]), residual=_decode_float(d["residual"]),
        verdict=Verdict.parse(d["verdict"], "verdict"), rank=d["rank"],
        codimension=d["codimension"], tangent_dimension=d["tangent_dimension"],
        local_dimension=d["local_dimension"],
        local_dimension_source=LocalDimensionSource.from_text(d["local_dimension_source"]),
        evidence=_evidence_from_dict(d["evidence"]),
        nearest_rank_drop=None if d["nearest_rank_drop"] is None else decode_point(d["nearest_rank_drop"]),
        nearest_rank_drop_distance=_decode_float(d["nearest_rank_drop_distance"]), notes=list(d["notes"]),
        components=[dict(c) for c in d.get("components", [])],
        backward_error=_decode_float(d.get("backward_error")), backward_tolerance=_decode_float(d.get("backward_tolerance")),
        newton=None if d.get("newton") is None else ZeroKind.parse(d["newton"], "newton"),
        judged=None if d.get("judged") is None else JudgedPoint.parse(d["judged"], "judged"),
        on_x_exactly=d.get("on_x_exactly") if isinstance(d.get("on_x_exactly"), bool) else None,
        data_radius=_decode_float(d.get("data_radius")))


def check_report_to_dict(report):
    """A :class:`~numag.singular.smoothness.CheckReport` as the JSON envelope."""
    options = report.options
    return {
        "numag_version": __version__,
        "command": "check",
        "seed": report.seed,
        "system": system_to_dict(report.system),
        "scaling": _scaling_to_dict(report.scaling, report.system),
        "options": {"local_dimension": options.local_dimension, "point_tolerance": options.point_tolerance,
                    "digits": options.max_digits, "suspect_threshold": options.suspect_threshold,
                    "neighbour_samples": options.neighbour_samples,
                    "neighbour_radius": options.neighbour_radius},
        "paths": empty_path_counts(),
        "components": [],
        "counts": json_keys(report.counts()),
        "points": [_verdict_to_dict(v) for v in report.points],
        "caution": CAUTION,
    }


def _discarded(data, reason):
    """How many candidates a report's ``discarded`` block counts for ``reason`` (0 when it has none)."""
    discarded = data.get("discarded")
    return int(discarded.get(reason, 0)) if isinstance(discarded, dict) else 0


def completeness_warnings(data):
    """What a report's run may have missed, one sentence each (empty when nothing).

    Failed paths may have led to solutions, components or singular points; candidates that could
    not be settled on X were neither kept nor refuted; groups the trace test did not confirm may
    be parts of larger components. Each of these makes the command's exit code 3.

    Examples
    --------
    >>> completeness_warnings({"paths": {"failed": 2, "failed_by_reason": {"minimum_step": 2}}})[0][:32]
    '2 paths failed (minimum_step 2):'
    """
    warnings = []
    paths = data.get("paths") or {}
    failed = int(paths.get("failed", 0))
    if failed:
        reasons = ", ".join(f"{k} {v}" for k, v in (paths.get("failed_by_reason") or {}).items() if v)
        warnings.append(f"{counted(failed, 'path')} failed ({reasons}): what they lead to (solutions, witness points, "
                        "singular candidates) may be missing; run again with another --seed to compare.")
    lost = lost_first_stage_paths(data.get("start"))
    if lost > 0:  # a first-stage path that did not reach a regular solution of the random system starts no path
        warnings.append(f"{counted(lost, 'path')} of the polyhedral start's first stage did not reach a regular "
                        "solution of the random system: solutions they lead to may be missing; run again with "
                        "another --seed.")
    unsettled = _discarded(data, "not_settled_on_X")
    if unsettled:
        warnings.append(f"{counted(unsettled, 'singular candidate')} could not be settled on X (Newton refinement "
                        "drifted): singular points there may be missing.")
    vanishing = _discarded(data, "smooth_with_vanishing_jacobian")
    if vanishing:  # features far smaller than the coordinates' unit look like this (decision 0064, addendum)
        warnings.append(f"{counted(vanishing, 'singular candidate')} judged smooth where the Jacobian nearly "
                        "vanishes relative to its terms (below 1e-8): features there may be far smaller than the "
                        "coordinates' unit and singular points nearby may be missing; move the origin near them "
                        "and rescale the coordinates to decide.")
    merged = _discarded(data, "merged_on_refinement")
    if merged:  # two candidates refined onto one point, not settled in centred coordinates (decision 0071)
        warnings.append(f"{counted(merged, 'singular candidate')} refined onto a singular point found from another "
                        "candidate, and coordinates centred there did not settle it: a singular point nearby may be "
                        "missing; move the origin near it and rescale the coordinates to decide.")
    unresolved = _discarded(data, "unresolved_multiple_endpoint")
    if unresolved:  # several paths ended together far from the point refinement found (decision 0071, addendum)
        warnings.append(f"{counted(unresolved, 'multiple endpoint')} refined onto a singular point far from where "
                        "the paths ended, and coordinates centred there did not settle the points nearby: several "
                        "singular points close together may have been taken for one, and some may be missing; "
                        "move the origin near them and rescale the coordinates to decide.")
    missed = _discarded(data, "missed_in_centred_coordinates")
    if missed:  # the run in centred coordinates lacked singular points the first run found (decision 0083)
        warnings.append(f"{counted(missed, 'singular point')} found in the user's coordinates but not in coordinates "
                        "centred at the features: the two runs disagree and other points may be missing; run again "
                        "with another --seed to compare.")
    beyond = _discarded(data, "found_beyond_centred_region")
    if beyond:  # a clean run in centred coordinates found singular points the first run lacks (decision 0071)
        warnings.append(f"{counted(beyond, 'singular point')} found in coordinates centred at a doubtful candidate, "
                        "outside its region, but not in the user's coordinates: listed, but the two runs disagree "
                        "and other points may be missing; run again with another --seed to compare.")
    unexplained = _discarded(data, "unexplained_endpoint")
    if unexplained:  # endpoints Newton dropped, and coordinates centred there did not settle them (decision 0090)
        warnings.append(f"{counted(unexplained, 'endpoint')} of the singular candidates' system where Newton stalled "
                        "(not a zero in the computed units), and coordinates centred there did not settle them: a "
                        "singular point there may be missing; move the origin near it and rescale to decide.")
    mismatched = _discarded(data, "tangent_dimension_mismatch")
    if mismatched:  # the rank-drop system's decomposition disagrees with itself: its pieces cannot be trusted
        warnings.append(f"{counted(mismatched, 'candidate component')} of the rank-drop system had a tangent space of "
                        "another dimension than its witness slicing: that decomposition may be wrong and singular "
                        "pieces may be missing; run again with another --seed or --formulation to compare.")
    inside = _discarded(data, "embedded_component_unsearched")
    if inside:  # the minors vanish all along an embedded component: its singular points are no candidates (0108)
        warnings.append(f"{counted(inside, 'embedded component')} of the equations (the Jacobian drops rank all "
                        "along it, X smooth at its generic point): singular points of X inside it are not separated "
                        "by the rank condition and were not searched; undecided there.")
    non_reduced = _discarded(data, "non_reduced_inside_unsearched")
    if non_reduced:  # J vanishes along a non-reduced component: its meetings and its own singular points (0136)
        warnings.append(f"{counted(non_reduced, 'non-reduced component')} of X (J vanishes all along it): points "
                        "inside it where another component meets it, or where it is singular itself, are no "
                        "separate candidates and were not searched; undecided there (check a point to judge it).")
    hidden = _discarded(data, "null_vector_inside_unsearched")
    if hidden:  # the random row combination vanishes along them at smooth points of X (decision 0150)
        warnings.append(f"{counted(hidden, 'candidate set')} of the null-vector formulation lay on smooth points of X "
                        "and the minors formulation was not used (too large or estimated too costly): singular points "
                        "of X inside them (where components meet, or where one is singular) are no separate "
                        "candidates and were not searched; undecided there (--formulation minors searches them, at "
                        "a higher cost; decision 0153).")
    paths_block = data.get("paths") or {}
    if int((paths_block.get("endpoints") or {}).get("degree_check_failed", 0)):
        warnings.append("The components' degrees times multiplicities do not add up as Bezout's theorem requires "
                        "for the dimension of a complete intersection: a component may be missing or counted "
                        "twice.")
    if int((paths_block.get("endpoints") or {}).get("exact_profile_differs", 0)):  # decision 0128
        warnings.append("X's components do not match the equation's exact multiplicity profile (the distinct points "
                        "of each multiplicity a rational line meets, by square-free factorisation): components were "
                        "merged, split, lost or given the wrong multiplicity; undecided.")
    unverified = data.get("unverified") if isinstance(data.get("unverified"), list) else []
    if unverified:  # solve: singular endpoint groups that do not satisfy F (decision 0049)
        paths = sum(int(group.get("multiplicity", 0)) for group in unverified if isinstance(group, dict))
        warnings.append(f"{counted(len(unverified), 'singular endpoint group')} ({counted(paths, 'path')}) "
                        f"{'does' if len(unverified) == 1 else 'do'} not satisfy the equations "
                        "after refinement and are not counted: they may be points at infinity that the endgame could "
                        "not resolve, or solutions missed; run again with another --seed or --start to compare.")
    infinite = data.get("at_infinity") if isinstance(data.get("at_infinity"), (list, EncodedSequence)) else []
    unsure = [p for p in infinite if isinstance(p, dict) and p.get("kind") == InfinityKind.UNDECIDED]
    if unsure:  # solve: the slices could not tell an isolated point at infinity from one on a set (decision 0112)
        warnings.append(f"{counted(len(unsure), 'group')} of endpoints at infinity could not be told isolated points "
                        "or points of a positive-dimensional set at infinity: the list of points at infinity is "
                        "undecided there (the finite solutions are not affected).")
    undecided = data.get("undecided") if isinstance(data.get("undecided"), list) else []
    if undecided:  # solve: multiple groups far from the origin that centred coordinates did not confirm (0081)
        paths = sum(int(group.get("multiplicity", 0)) for group in undecided if isinstance(group, dict))
        warnings.append(f"{counted(len(undecided), 'multiple endpoint group')} ({counted(paths, 'path')}) away from "
                        "the origin could not be settled in coordinates centred there (the two runs count different "
                        "paths near it) and are not counted: several simple solutions close together may have been "
                        "taken for one; move the origin near them and rescale the coordinates to decide.")
    solved = data.get("solutions") if data.get("command") == "solve" else None
    unsure_real = [s for s in solved if isinstance(s, dict) and "real" in s and s["real"] is None] \
        if isinstance(solved, (list, EncodedSequence)) else []
    if unsure_real:  # solve: an imaginary part beyond the root's accuracy but not clearly (decision 0120)
        warnings.append(f"{counted(len(unsure_real), 'solution')} of undecided reality: the imaginary parts are "
                        "beyond the point's accuracy (a multiple root is known only to about the m-th root of "
                        "its residual) but not clearly; real or complex cannot be told at this precision "
                        "(raise --digits or move the origin near it to decide).")
    near = data.get("near_singular") if isinstance(data.get("near_singular"), list) else []
    if near:  # decision 0062: smooth as written, singular within the coefficients' precision
        warnings.append(f"{counted(len(near), 'candidate')} the check calls smooth for the coefficients as written "
                        f"{'is a singular point' if len(near) == 1 else 'are singular points'} after a relative "
                        "change of the coefficients within their precision (listed as near-singular): the input "
                        "cannot tell which is meant; give exact coefficients to decide.")
    unconfirmed = data.get("unconfirmed", 0)
    if unconfirmed:
        warnings.append(f"{counted(unconfirmed, 'group')} of witness points not confirmed by the trace test: they "
                        "may be parts of larger components (raise --max-loops or change --seed).")
    pieces = data.get("components") if data.get("command") == "singular" else None
    undecided = [c for c in pieces if isinstance(c, dict) and c.get("kind") == "undecided"] \
        if isinstance(pieces, (list, EncodedSequence)) else []
    if undecided:  # listed with their notes; said here too, so that every exit 3 has its warning line
        warnings.append(f"{counted(len(undecided), 'piece')} of the singular locus undecided (listed as such, with "
                        "notes): the Jacobian criterion could not tell singular from smooth there at this precision "
                        "(a larger --digits, or `certify` on the saved report, may decide).")
    return warnings


def certification_doubtful(data):
    """True when a report's certificate is undecided or refuted, or a claim of the report failed its check.

    Examples
    --------
    >>> certification_doubtful({"certification": {"counts": {"undecided": 1, "refuted": 0}}})
    True
    """
    summary = data.get("certification")
    if not summary:
        return False
    return (summary["counts"]["undecided"] + summary["counts"]["refuted"] + summary.get("claims_failed", 0)) > 0


def check_warnings(data):
    """Why a ``check`` report's exit code says undecided, one sentence each (empty when nothing).

    Undecided points, non-reduced points (smoothness of the variety undecided there), points not on X, smooth
    verdicts that a change of the coefficients within their precision
    turns singular, doubtful certificates, incomplete anatomies and what decomposing X (the components through
    the points) may have missed.

    Examples
    --------
    >>> check_warnings({"points": [{"index": 2, "verdict": "undecided", "near_singular": False}]})[0][:24]
    'point 2 undecided: the J'
    """
    points = [p for p in data.get("points") or [] if isinstance(p, dict)]

    def indices(selected):
        numbers = [str(p.get("index") if isinstance(p, dict) else p) for p in selected]
        return ("point " if len(numbers) == 1 else "points ") + ", ".join(numbers)

    warnings = []
    undecided = [p for p in points if p.get("verdict") == "undecided"]
    if undecided:
        warnings.append(f"{indices(undecided)} undecided: the Jacobian criterion could not tell singular from "
                        "smooth there at this precision (see the notes; a larger --digits or `certify` may decide).")
    doubled = [p for p in points if p.get("verdict") == "non-reduced"]
    if doubled:  # the verdict says what holds (multiplicity > 1), not whether the variety is smooth there
        warnings.append(f"{indices(doubled)} non-reduced: the equations define X with multiplicity > 1 there, so the "
                        "Jacobian criterion cannot tell whether the variety is smooth; equations of multiplicity 1 "
                        "(the repeated factor taken once) would decide.")
    off = [p for p in points if p.get("verdict") == "off"]
    if off:
        warnings.append(f"{indices(off)} not on X within the point tolerance, or Newton's method could not settle "
                        "there: no verdict (see the notes).")
    near = [p for p in points if p.get("near_singular")]
    if near:
        warnings.append(f"{indices(near)}: smooth for the coefficients as written, singular after a relative change "
                        "of them within their precision; the input cannot tell which is meant.")
    if certification_doubtful(data):
        warnings.append("a certificate is undecided or refuted, or a claim of the report failed its check (see "
                        "`certification`).")
    if data.get("anatomy_incomplete"):
        warnings.append(f"the anatomy of {indices(data['anatomy_incomplete'])} is "
                        "incomplete (see the notes).")
    warnings.extend(f"decomposing X (the components through the points): {warning}"
                    for warning in data.get("decomposition_warnings") or [])
    return warnings


def discriminant_warnings(result):
    """Why a discriminant's exit code says undecided: the failed paths by kind, failed region counts and arc ends.

    The ``warnings`` of its report, written by the command line and by :func:`numag.save` alike.
    """
    kinds = [f"{result.paths[label]} {label}" for label in FAILURE_LABELS if result.paths.get(label, 0)]
    warnings = [f"{counted(sum(result.paths.get(label, 0) for label in FAILURE_LABELS), 'path')} of the "
                f"incidence systems failed ({', '.join(kinds)}): components of the discriminant may be missing"] \
        if kinds else []
    region_failures = sum(r.count.failed for r in result.regions)
    if region_failures:
        warnings.append(f"{counted(region_failures, 'path')} of the regions' sample members failed: their counts "
                        "may be low")
    region_undecided = sum(r.count.undecided for r in result.regions)
    if region_undecided:
        warnings.append(f"{counted(region_undecided, 'solution')} of the regions' sample members could be told "
                        "neither real nor paired with a conjugate: those real counts are undecided")
    missed = result.paths.get(MISSED_ON_LINES, 0)
    if missed:
        warnings.append(f"{counted(missed, 'point')} of multiple components of the discriminant missed on the lines "
                        "they cross (their moves failed): the curve or the cells may lack them there")
    if result.curve is not None and result.curve.failed_arcs:
        warnings.append(f"{counted(result.curve.failed_arcs, 'arc end')} of the traced curve failed")
    if result.curve is not None and undecided_special_points(result.curve):
        warnings.append(f"{counted(undecided_special_points(result.curve), 'special point')} of the traced curve "
                        "could not be refined (undecided)")
    return warnings


def undecided_special_points(curve):
    """How many special points of a traced discriminant curve Newton neither confirmed nor ruled out."""
    return sum(point.refined is False and point.candidate is not None for point in curve.special)


def options_to_dict(options):
    """Every field of a run's options (nested options too) as JSON values: kinds by their text, tuples as lists.

    The report's ``options_in_full``, read back by :func:`options_from_dict`; the ``options`` block beside it
    keeps the few a reader looks at.

    Examples
    --------
    >>> options_to_dict(SolveOptions(start="polyhedral"))["start"]
    'polyhedral'
    >>> options_to_dict(SolveOptions())["tracker"]["max_steps"]
    2000
    """
    def plain(value):
        if dataclasses.is_dataclass(value):
            return options_to_dict(value)
        if isinstance(value, enum.Enum):
            return value.value
        if isinstance(value, (tuple, list)):
            return [plain(v) for v in value]
        return value
    return {f.name: plain(getattr(options, f.name)) for f in dataclasses.fields(options)}


def options_from_dict(kind, data):
    """The options of class ``kind`` that :func:`options_to_dict` wrote (fields it lacks keep their defaults).

    Examples
    --------
    >>> options_from_dict(SolveOptions, options_to_dict(SolveOptions(refine_digits=40))) == SolveOptions(refine_digits=40)
    True
    """
    if not isinstance(data, dict):
        raise InputError(f"options of {kind.__name__} are not a mapping")
    defaults = kind()

    def typed(value, default, name):
        if dataclasses.is_dataclass(default):
            return options_from_dict(type(default), value)
        if isinstance(default, enum.Enum):
            try:
                return type(default)(value)
            except ValueError:
                raise InputError(f"unknown {name} {str(value)[:30]!r}") from None
        if isinstance(value, list):
            return tuple(typed(v, None, name) for v in value)
        return value
    known = {f.name for f in dataclasses.fields(kind)}
    unknown = sorted(set(data) - known)
    if unknown:
        raise InputError(f"unknown option {unknown[0]!r} of {kind.__name__}")
    return kind(**{name: typed(value, getattr(defaults, name), name) for name, value in data.items()})


def _scaling_to_dict(scaling, system):
    return None if scaling is None else scaling.to_json(system.variables)


def _scaling_from_dict(data, system):
    """The report's ``scaling`` (None for reports written before it existed)."""
    block = data.get("scaling")
    return None if block is None else Scaling.from_json(block, system.variables)


def _report_system(data, command):
    """Check that ``data`` is a report of ``command`` and rebuild its system."""
    if not isinstance(data, dict) or data.get("command") != command:
        raise InputError(f"not a report of 'numag {command}'")
    if not isinstance(data.get("system"), dict):
        raise InputError(f"the report of 'numag {command}' has no 'system' table")
    system_data = dict(data["system"])
    if system_data.get("name") is None:
        system_data.pop("name", None)
    return system_from_mapping(system_data)


def check_report_from_dict(data):
    """Rebuild a :class:`~numag.singular.smoothness.CheckReport` from its JSON envelope."""
    from ..singular.smoothness import CheckOptions, CheckReport
    system = _report_system(data, "check")
    o = data["options"]
    options = CheckOptions(local_dimension=o["local_dimension"], point_tolerance=o["point_tolerance"],
                           max_digits=o["digits"], suspect_threshold=o["suspect_threshold"],
                           neighbour_samples=o["neighbour_samples"], neighbour_radius=o["neighbour_radius"])
    return CheckReport(system=system, points=[_verdict_from_dict(d) for d in data["points"]], options=options,
                       seed=data["seed"], scaling=_scaling_from_dict(data, system))


def json_chunks(data, indent=0):
    """Pieces of the JSON text of a report, one entry of a list at a time (strict JSON: no NaN or Infinity).

    Dictionaries are written one key a line; a list of dictionaries, lists or texts one entry a line
    (a solution, a point, an equation); a list of numbers on one line. Each line comes from the C encoder, so a report
    of a million numbers is written in a fraction of a second, and a list may be any iterable with
    ``len`` (a lazy sequence such as :class:`EncodedSequence`): entries are encoded as they are
    written, never all held at once. ``json.dumps(data, indent=2)`` took 60 % of a 1,024-path
    ``solve`` (its indenting encoder is pure Python, a line per number; decision 0051).

    Examples
    --------
    >>> print("".join(json_chunks({"a": 1, "b": [[1, 2], [3]], "c": {"d": [1, 2], "e": ["x", "y"]}})))
    {
      "a": 1,
      "b": [
        [1, 2],
        [3]
      ],
      "c": {
        "d": [1, 2],
        "e": [
          "x",
          "y"
        ]
      }
    }
    """
    if isinstance(data, dict):
        if not data:
            yield "{}"
            return
        inner = " " * (indent + 2)
        yield "{"
        for k, (key, value) in enumerate(data.items()):
            yield ("\n" if k == 0 else ",\n") + inner + json.dumps(str(key)) + ": "
            yield from json_chunks(value, indent + 2)
        yield "\n" + " " * indent + "}"
    elif isinstance(data, (list, tuple, EncodedSequence)) and len(data) and _nested(data):
        inner = " " * (indent + 2)
        yield "["
        for k, entry in enumerate(data):
            yield ("\n" if k == 0 else ",\n") + inner + _ENCODER.encode(entry)
        yield "\n" + " " * indent + "]"
    else:
        yield _ENCODER.encode(list(data) if isinstance(data, EncodedSequence) else data)


#: json.dumps(entry, allow_nan=False) made a new encoder for every entry (a line per solution, per path status)
_ENCODER = json.JSONEncoder(allow_nan=False)


def _nested(entries):
    """True when the first entry of a list is a dictionary, a list or text (then one entry is written a line)."""
    return isinstance(next(iter(entries)), (dict, list, tuple, str))


class EncodedSequence:
    """A read-only list whose entries are made on access: ``encode(items[k])``.

    A report of many solutions keeps the solutions (arrays) and builds each one's dictionary only while
    it is read or written (:func:`json_chunks`), so the dictionaries of 100,000 solutions never exist
    at once (issue 19, item 5). It compares equal to the list it stands for.

    Examples
    --------
    >>> squares = EncodedSequence([1, 2, 3], lambda v: {"square": v * v})
    >>> len(squares), squares[1], squares == [{"square": 1}, {"square": 4}, {"square": 9}]
    (3, {'square': 4}, True)
    """

    __slots__ = ("_items", "_encode")

    def __init__(self, items, encode):
        self._items, self._encode = items, encode

    def __len__(self):
        return len(self._items)

    def __getitem__(self, index):
        if isinstance(index, slice):
            return [self._encode(item) for item in self._items[index]]
        return self._encode(self._items[index])

    def __iter__(self):
        return (self._encode(item) for item in self._items)

    def __eq__(self, other):
        return isinstance(other, (list, EncodedSequence)) and len(self) == len(other) and all(
            a == b for a, b in zip(self, other))

    def __bool__(self):
        return len(self._items) > 0

    def __repr__(self):
        return f"EncodedSequence({len(self)} entries)"


def dumps(data):
    """JSON text of a report dictionary (strict JSON: no NaN or Infinity literals); see :func:`json_chunks`."""
    return "".join(json_chunks(data))


def write_json(data, out):
    """Write the JSON text of a report to the text stream ``out`` piece by piece, then a newline."""
    for chunk in json_chunks(data):
        out.write(chunk)
    out.write("\n")


def loads_check_report(text):
    """Parse JSON text of a check report."""
    return check_report_from_dict(json.loads(text))


# --- solve ---------------------------------------------------------------------------------------

_STATUS_BY_LABEL = {status.label: status for status in PathStatus}


def _solution_to_dict(solution):
    return {"point": encode_point(solution.point), "multiplicity": solution.multiplicity,
            "winding": solution.winding, "at_infinity": solution.at_infinity, "real": solution.real,
            "condition": _encode_float(solution.condition), "isolated": solution.isolated,
            "digits": solution.digits, "paths": [int(k) for k in solution.paths]}


def _at_infinity_to_dict(solution):
    """A group at infinity: a solution's keys, its kind in the set at infinity and that set's dimension there."""
    kind = (InfinityKind.ON_POSITIVE_DIMENSIONAL_SET if solution.set_dimension > 0
            else InfinityKind.UNDECIDED if solution.dimension_at_least else InfinityKind.ISOLATED)
    return {**_solution_to_dict(solution), "kind": kind, "dimension": int(solution.set_dimension),
            "dimension_at_least": bool(solution.dimension_at_least)}


def _solution_from_dict(d):
    return Solution(point=decode_point(d["point"]), multiplicity=int(d["multiplicity"]), winding=int(d["winding"]),
                    at_infinity=bool(d["at_infinity"]), real=None if d["real"] is None else bool(d["real"]),
                    condition=_decode_float(d["condition"]), isolated=bool(d["isolated"]),
                    paths=np.array(d["paths"], dtype=np.int64), digits=int(d["digits"]),
                    set_dimension=int(d.get("dimension", 0)),  # absent before decision 0112
                    dimension_at_least=bool(d.get("dimension_at_least", False)))


def _component(identifier, solution):
    """Every isolated point is a component of its own: dimension 0, degree 1."""
    return {"id": identifier, "dimension": 0, "degree": 1, "points": [encode_point(solution.point)],
            "real": [solution.real], "multiplicity": solution.multiplicity, "at_infinity": solution.at_infinity,
            "formulation": "square system", "slice": None}


def solve_report_to_dict(result, options, lazy=False):
    """A :class:`~numag.tracking.solve.SolveResult` as the JSON envelope.

    With ``lazy``, ``components``, ``solutions`` and ``at_infinity`` are :class:`EncodedSequence` s:
    each solution's dictionary is made while it is read or written (:func:`write_json`), so that a
    report of 100,000 solutions holds the solutions once, not twice more as dictionaries and text.
    The JSON text is the same either way.
    """
    found = result.solutions + result.at_infinity
    if lazy:
        components = EncodedSequence(range(len(found)), lambda k: _component(k + 1, found[k]))
        solutions = EncodedSequence(result.solutions, _solution_to_dict)
        at_infinity = EncodedSequence(result.at_infinity, _at_infinity_to_dict)
    else:
        components = [_component(k + 1, s) for k, s in enumerate(found)]
        solutions = [_solution_to_dict(s) for s in result.solutions]
        at_infinity = [_at_infinity_to_dict(s) for s in result.at_infinity]
    return {
        "numag_version": __version__,
        "command": "solve",
        "seed": result.seed,
        "system": system_to_dict(result.system),
        "scaling": _scaling_to_dict(result.scaling, result.system),
        "options": {"digits": options.refine_digits, "cluster_tolerance": options.cluster_tolerance,
                    "square_up": options.square_up, "batch_size": options.batch_size, "start": options.start},
        "options_in_full": options_to_dict(options),
        "paths": result.path_counts(),
        "components": components,
        "solutions": solutions,
        "at_infinity": at_infinity,
        "sets_at_infinity": [_at_infinity_to_dict(s) for s in result.sets_at_infinity],
        "not_isolated": [_solution_to_dict(s) for s in result.not_isolated],
        "discarded": [_solution_to_dict(s) for s in result.discarded],
        "unverified": [_solution_to_dict(s) for s in result.unverified],
        "undecided": [_solution_to_dict(s) for s in result.undecided],
        "centred": result.extra.get("centred") or [],
        "squared_up": result.squared_up,
        "seconds": result.seconds,
        "evaluations": result.evaluations,
        "execution": result.extra.get("execution"),
        "start": result.extra.get("start"),
        "steps": {"median": float(np.median(result.steps)) if len(result.steps) else 0.0,
                  "max": int(result.steps.max()) if len(result.steps) else 0},
        "path_status": [PathStatus(int(code)).label for code in result.status],
        "path_steps": [int(v) for v in result.steps],
        "path_winding": [int(v) for v in result.winding],
        "path_retracked": [bool(v) for v in result.retracked],
        "path_digits": [int(v) for v in result.digits],
        "caution": CAUTION,
    }


def solve_report_from_dict(data):
    """Rebuild a :class:`~numag.tracking.solve.SolveResult` (and its options) from its JSON envelope."""
    system = _report_system(data, "solve")
    o = data["options"]
    options = SolveOptions(tracker=TrackerOptions(), cluster_tolerance=o["cluster_tolerance"],
                           refine_digits=o["digits"], square_up=o["square_up"], batch_size=o["batch_size"],
                           start=o.get("start", "total-degree"))
    if data.get("options_in_full") is not None:  # absent before decision 0078
        options = options_from_dict(SolveOptions, data["options_in_full"])
    try:
        status = np.array([int(_STATUS_BY_LABEL[label]) for label in data["path_status"]], dtype=np.int64)
    except KeyError as err:
        raise InputError(f"unknown path status {err}") from None
    result = SolveResult(
        system=system, solutions=[_solution_from_dict(d) for d in data["solutions"]],
        at_infinity=[_solution_from_dict(d) for d in data["at_infinity"]],
        sets_at_infinity=[_solution_from_dict(d) for d in data.get("sets_at_infinity", [])],
        not_isolated=[_solution_from_dict(d) for d in data["not_isolated"]], status=status,
        steps=np.array(data["path_steps"], dtype=np.int64), winding=np.array(data["path_winding"], dtype=np.int64),
        retracked=np.array(data["path_retracked"], dtype=bool), seed=data["seed"], seconds=float(data["seconds"]),
        evaluations=int(data["evaluations"]), squared_up=bool(data["squared_up"]),
        digits=np.array(data["path_digits"], dtype=np.int64),
        discarded=[_solution_from_dict(d) for d in data["discarded"]],
        unverified=[_solution_from_dict(d) for d in data.get("unverified", [])],  # absent before decision 0049
        undecided=[_solution_from_dict(d) for d in data.get("undecided", [])])  # absent before decision 0081
    if data.get("centred"):
        result.extra["centred"] = data["centred"]
    if data.get("execution") is not None:
        result.extra["execution"] = data["execution"]
    if data.get("start") is not None:
        result.extra["start"] = data["start"]
    result.scaling = _scaling_from_dict(data, system)
    return result, options


# --- decompose -----------------------------------------------------------------------------------

_ENDPOINT_KEYS = ("not_on_X", "at_infinity_or_failed", "on_larger_component", "membership_paths",
                  "degree_check_failed", "residual_not_explained", "zero_undecided",  # the last two: decision 0064
                  "exact_profile_differs")  # decision 0128


def decomposition_path_counts(counts):
    """The ``paths`` block of a decomposition: counts by status (adding up) and what became of endpoints."""
    by_reason = {label: int(counts.get(label, 0)) for label in FAILURE_LABELS}
    return {
        "tracked": int(counts.get("tracked", 0)),
        "converged": int(counts.get("converged", 0)),
        "singular_endpoint": int(counts.get("singular_endpoint", 0)),
        "at_infinity": int(counts.get("at_infinity", 0)),
        "failed": int(sum(by_reason.values())),
        "failed_by_reason": by_reason,
        "endpoints": {key: int(counts.get(key, 0)) for key in _ENDPOINT_KEYS},
    }


def _decomposition_component(c):
    return {"id": c.id, "dimension": c.dimension, "degree": c.degree,
            "points": [encode_point(p) for p in c.points], "real": [bool(r) for r in c.real],
            "multiplicity": c.multiplicity, "reduced": c.reduced, "at_infinity": False,
            "formulation": "witness set", "confirmed": c.confirmed, "trace_defect": _encode_float(c.trace_defect),
            "slice": [encode_point(row) for row in c.slice_rows]}


def decomposition_to_dict(result, options):
    """A :class:`~numag.witness.decompose.Decomposition` as the JSON envelope."""
    return {
        "numag_version": __version__,
        "command": "decompose",
        "seed": result.seed,
        "system": system_to_dict(result.system),
        "scaling": _scaling_to_dict(result.scaling, result.system),
        "options": {"lowest_dimension": options.witness.lowest_dimension, "max_loops": options.max_loops,
                    "trace_tolerance": options.trace_tolerance, "start": options.witness.start.value},
        "options_in_full": options_to_dict(options),
        "start": result.extra.get("start"),
        "unexplained": _encode_points(result.extra.get("unexplained")),
        "exact_profile": _encode_profile(result.extra.get("exact_profile")),
        "dimensions_searched": list(result.dimensions_searched),
        "paths": decomposition_path_counts(result.paths),
        "path_counts": {str(k): int(v) for k, v in result.paths.items()},  # every count, as the run kept it
        "monodromy_loops": {str(k): int(v) for k, v in result.loops.items()},
        "components": [_decomposition_component(c) for c in result.components],
        "unconfirmed": len(result.unconfirmed),
        "seconds": result.seconds,
        "caution": CAUTION,
    }


def _encode_points(points):
    """Points kept beside a run (e.g. where Newton stalled, decision 0090) as JSON, or None when there are none kept."""
    return None if points is None else [encode_point(p) for p in np.asarray(points)]


def _decode_points(encoded, n):
    """The inverse of :func:`_encode_points`: an array of shape (K, n)."""
    return np.array([decode_point(p) for p in encoded], dtype=complex).reshape(-1, n)


def _component_from_dict(d, n):
    from ..witness.decompose import Component
    points = np.array([decode_point(p) for p in d["points"]], dtype=complex).reshape(-1, n)
    rows = np.array([decode_point(r) for r in d["slice"]], dtype=complex).reshape(-1, n + 1)
    return Component(id=int(d["id"]), dimension=int(d["dimension"]), degree=int(d["degree"]), points=points,
                     real=np.array(d["real"], dtype=bool), multiplicity=int(d["multiplicity"]),
                     reduced=bool(d["reduced"]), slice_rows=rows, confirmed=bool(d["confirmed"]),
                     trace_defect=_decode_float(d["trace_defect"]))


def _path_counts_from_dict(data):
    """The run's path counts: as kept (``path_counts``, from decision 0078 on) or rebuilt from ``paths``."""
    if data.get("path_counts") is not None:
        return {str(k): int(v) for k, v in data["path_counts"].items()}
    return _counts_from_paths(data["paths"])


def _counts_from_paths(paths):
    """Flat path counts (statuses, failure reasons, endpoint fates) from a ``paths`` block."""
    counts = {key: paths[key] for key in ("tracked", "converged", "singular_endpoint", "at_infinity")}
    counts.update(paths["failed_by_reason"])
    counts.update(paths["endpoints"])
    return counts


def decomposition_from_dict(data):
    """Rebuild a :class:`~numag.witness.decompose.Decomposition` (and its options) from its JSON envelope."""
    from ..witness.cascade import WitnessOptions
    from ..witness.decompose import DecomposeOptions, Decomposition
    system = _report_system(data, "decompose")
    o = data["options"]
    options = DecomposeOptions(witness=WitnessOptions(lowest_dimension=o["lowest_dimension"],
                                                      start=o.get("start", WitnessOptions.start.value)),
                               max_loops=int(o["max_loops"]), trace_tolerance=float(o["trace_tolerance"]))
    if data.get("options_in_full") is not None:  # absent before decision 0078
        options = options_from_dict(DecomposeOptions, data["options_in_full"])
    components = [_component_from_dict(d, system.n_variables) for d in data["components"]]
    counts = _path_counts_from_dict(data)
    result = Decomposition(system, components, [int(d) for d in data["dimensions_searched"]], counts,
                           {int(k): int(v) for k, v in data["monodromy_loops"].items()}, data["seed"],
                           float(data["seconds"]), scaling=_scaling_from_dict(data, system))
    if data.get("start"):
        result.extra["start"] = data["start"]
    if data.get("unexplained") is not None:  # absent before it was saved
        result.extra["unexplained"] = _decode_points(data["unexplained"], system.n_variables)
    if _decode_profile(data.get("exact_profile")) is not None:  # absent before decision 0140
        result.extra["exact_profile"] = _decode_profile(data["exact_profile"])
    return result, options


def _encode_profile(profile):
    """An exact multiplicity profile {multiplicity: sum of degrees} for JSON (keys as text), or None.

    >>> _decode_profile(_encode_profile({2: 1, 1: 3}))
    {2: 1, 1: 3}
    """
    return None if profile is None else {str(int(k)): int(v) for k, v in profile.items()}


def _decode_profile(data):
    """The inverse of :func:`_encode_profile`; None for anything else (a report edited by hand is not trusted).

    >>> _decode_profile(["2", 1]) is None
    True
    """
    try:
        return {int(k): int(v) for k, v in data.items()}
    except (AttributeError, TypeError, ValueError):
        return None


# --- singular ------------------------------------------------------------------------------------

def _singular_component(c):
    from ..singular.locus import POINT_TOLERANCE
    return {"id": c.id, "dimension": c.dimension, "degree": c.degree,
            "points": [encode_point(p) for p in c.points], "real": [bool(r) for r in c.real],
            "multiplicity": None if c.multiplicity is None else int(c.multiplicity), "at_infinity": c.at_infinity,
            "formulation": c.formulation, "kind": c.kind, "on_components": [int(k) for k in c.on_components],
            "rank": c.rank, "codimension": c.codimension, "notes": list(c.notes),
            # the relative tolerance the points were judged singular at: what `check --points-file` takes as
            # their accuracy (decision 0110), not the 17 digits they are printed with
            "point_tolerance": POINT_TOLERANCE}


def singular_to_dict(result, options):
    """A :class:`~numag.singular.locus.SingularLocus` as the JSON envelope."""
    variety = result.variety
    return {
        "numag_version": __version__,
        "command": "singular",
        "seed": result.seed,
        "system": system_to_dict(result.system),
        "scaling": _scaling_to_dict(result.scaling, result.system),
        "options": {"formulation": options.formulation, "digits": options.digits,
                    "at_infinity_for_systems": options.infinity_for_systems,
                    "lowest_dimension": options.decompose.witness.lowest_dimension,
                    "max_exact_minors": options.max_exact_minors, "start": options.start.value},
        "options_in_full": options_to_dict(options),
        "start": result.start,
        "paths": decomposition_path_counts(result.paths),
        "path_counts": {str(k): int(v) for k, v in result.paths.items()},  # every count, as the run kept it
        "components": [_singular_component(c) for c in result.components],
        # the components of X (in a random chart for projective input: only their dimensions and degrees)
        "variety": [] if variety is None or result.system.projective else
        [_decomposition_component(c) for c in variety.components],
        "variety_summary": [] if variety is None else
        [{"dimension": c.dimension, "degree": c.degree} for c in variety.components],
        # X's components the trace test did not confirm: a warning and exit 3, as for `decompose` (decision 0135)
        "unconfirmed": 0 if variety is None else len(variety.unconfirmed),
        # the rest of X's decomposition run, so that the report loads whole (decision 0078)
        "variety_run": None if variety is None or result.system.projective else
        {"dimensions_searched": [int(d) for d in variety.dimensions_searched],
         "path_counts": {str(k): int(v) for k, v in variety.paths.items()},
         "monodromy_loops": {str(k): int(v) for k, v in variety.loops.items()}, "seed": variety.seed,
         "seconds": variety.seconds, "start": variety.extra.get("start"),
         "unexplained": _encode_points(variety.extra.get("unexplained")),
         "exact_profile": _encode_profile(variety.extra.get("exact_profile")),
         "options_in_full": None if variety.options is None else options_to_dict(variety.options)},
        "discarded": dict(result.discarded),
        "near_singular": [p.to_dict(encode_point) for p in result.near_singular],
        "embedded_points": [encode_point(p) for p in result.embedded],  # decision 0105: X smooth there
        "embedded_components": [_singular_component(c) for c in result.embedded_components],  # decision 0108
        "notes": list(result.notes),
        "seconds": result.seconds,
        "caution": CAUTION,
    }


def singular_from_dict(data):
    """Rebuild a :class:`~numag.singular.locus.SingularLocus` (and its options) from its JSON envelope."""
    from ..singular.kinds import CandidateSystem, PieceKind
    from ..singular.locus import SingularComponent, SingularLocus, SingularOptions
    from ..singular.nearness import NearSingularPoint
    from ..witness.cascade import WitnessOptions
    from ..witness.decompose import DecomposeOptions, Decomposition
    system = _report_system(data, "singular")
    o = data["options"]
    options = SingularOptions(formulation=o["formulation"], digits=int(o["digits"]),
                              infinity_for_systems=bool(o.get("at_infinity_for_systems", False)),
                              max_exact_minors=int(o["max_exact_minors"]), start=o.get("start", "total-degree"),
                              decompose=DecomposeOptions(witness=WitnessOptions(lowest_dimension=o["lowest_dimension"])))
    if data.get("options_in_full") is not None:  # absent before decision 0078
        options = options_from_dict(SingularOptions, data["options_in_full"])
    def piece(d):
        points = np.array([decode_point(p) for p in d["points"]], dtype=complex)
        return SingularComponent(
            id=int(d["id"]), dimension=int(d["dimension"]), degree=int(d["degree"]), points=points,
            real=np.array(d["real"], dtype=bool), multiplicity=d["multiplicity"], at_infinity=bool(d["at_infinity"]),
            formulation=CandidateSystem.parse(d["formulation"], "formulation"),
            kind=PieceKind.parse(d["kind"], "kind"), on_components=list(d["on_components"]), rank=d["rank"],
            codimension=d["codimension"], notes=list(d["notes"]))

    components = [piece(d) for d in data["components"]]
    counts = _path_counts_from_dict(data)
    variety = None
    if data["variety"]:
        parts = [_component_from_dict(d, system.n_variables) for d in data["variety"]]
        run = data.get("variety_run") or {}  # absent before decision 0078
        variety = Decomposition(system, parts, [int(d) for d in run.get("dimensions_searched", [])],
                                {str(k): int(v) for k, v in (run.get("path_counts") or {}).items()},
                                {int(k): int(v) for k, v in (run.get("monodromy_loops") or {}).items()},
                                run.get("seed", data["seed"]), float(run.get("seconds", 0.0)),
                                scaling=_scaling_from_dict(data, system))
        if run.get("start"):
            variety.extra["start"] = run["start"]
        if run.get("unexplained") is not None:  # absent before it was saved
            variety.extra["unexplained"] = _decode_points(run["unexplained"], system.n_variables)
        if _decode_profile(run.get("exact_profile")) is not None:  # absent before decision 0140
            variety.extra["exact_profile"] = _decode_profile(run["exact_profile"])
        if run.get("options_in_full") is not None:
            variety.options = options_from_dict(DecomposeOptions, run["options_in_full"])
    result = SingularLocus(system=system, components=components, variety=variety, paths=counts,
                           discarded=dict(data["discarded"]), seed=data["seed"], seconds=float(data["seconds"]),
                           notes=list(data["notes"]), scaling=_scaling_from_dict(data, system),
                           start=dict(data.get("start") or {}),
                           near_singular=[NearSingularPoint.from_dict(d, decode_point)
                                          for d in data.get("near_singular") or []],
                           embedded=[np.asarray(decode_point(p), dtype=complex)  # absent before decision 0105
                                     for p in data.get("embedded_points") or []],
                           embedded_components=[piece(d) for d in data.get("embedded_components") or []])  # 0108
    return result, options


# --- certificates ----------------------------------------------------------------------------------

_CERTIFIABLE = ("solve", "singular", "check")


def _claim_check_to_dict(check):
    return {"name": check.name, "reported": check.reported, "found": check.found, "status": check.status,
            "how": check.how}


def certificate_to_dict(c):
    """A :class:`~numag.certify.certificates.Certificate` as JSON (status, kind, box, backward error, rank, claim checks...)."""
    return {"status": c.status, "kind": c.kind, "claim": c.claim, "center": encode_point(c.center),
            "center_text": list(c.center_text), "radius": _encode_float(c.radius),
            "radii": None if c.radii is None else [_encode_float(r) for r in c.radii], "digits": c.digits,
            "digits_tried": [int(d) for d in c.digits_tried],
            "method": c.method, "real": c.real, "backward_error": _encode_float(c.backward_error),
            "residual_bound": _encode_float(c.residual_bound), "threshold": _encode_float(c.threshold),
            "alpha": _encode_float(c.alpha), "alpha_certified": c.alpha_certified,
            "alpha_radius": _encode_float(c.alpha_radius), "deflations": c.deflations,
            "square_equations": [int(k) for k in c.square_equations], "chart": c.chart,
            "zero_coordinates": [int(k) for k in c.zero_coordinates], "at_infinity": c.at_infinity,
            "exact_coordinates": c.exact_coordinates, "minimal_polynomial": c.minimal_polynomial,
            "exact_method": c.exact_method, "multiplicity": c.multiplicity,
            "multiplicity_method": c.multiplicity_method,
            "lower_singular_value": _encode_float(c.lower_singular_value), "rank_lower": c.rank_lower,
            "rank_upper": c.rank_upper, "distance": _encode_float(c.distance), "distinct": c.distinct,
            "claim_checks": [_claim_check_to_dict(k) for k in c.claim_checks],
            "reason": c.reason, "notes": list(c.notes)}


def certificate_from_dict(d):
    """Rebuild a :class:`~numag.certify.certificates.Certificate` from :func:`certificate_to_dict` output."""
    from ..certify.records import Certificate, Claim, ClaimCheck, ClaimStatus, Kind, STATUSES, Status
    try:
        if d["status"] not in STATUSES:
            raise InputError(f"unknown certificate status {d['status']!r}")
        checks = [ClaimCheck(k["name"], k["reported"], k["found"], ClaimStatus(k["status"]), k.get("how", ""))
                  for k in d.get("claim_checks", [])]
        radii = d.get("radii")
        return Certificate(
            status=Status(d["status"]), kind=Kind(d["kind"]), claim=d["claim"] and Claim(d["claim"]),
            center=decode_point(d["center"]), center_text=list(d["center_text"]),
            radius=_decode_float(d["radius"]), digits=int(d["digits"]), method=d["method"], real=d["real"],
            backward_error=_decode_float(d["backward_error"]), residual_bound=_decode_float(d["residual_bound"]),
            threshold=_decode_float(d.get("threshold")), alpha=_decode_float(d["alpha"]),
            alpha_certified=bool(d["alpha_certified"]), alpha_radius=_decode_float(d["alpha_radius"]),
            deflations=int(d["deflations"]), square_equations=list(d["square_equations"]), chart=d["chart"],
            radii=None if radii is None else [_decode_float(r) for r in radii],
            zero_coordinates=list(d.get("zero_coordinates", [])), at_infinity=bool(d.get("at_infinity", False)),
            exact_coordinates=d["exact_coordinates"], minimal_polynomial=d["minimal_polynomial"],
            exact_method=d.get("exact_method"), multiplicity=d.get("multiplicity"),
            multiplicity_method=d.get("multiplicity_method", ""),
            lower_singular_value=_decode_float(d["lower_singular_value"]), rank_lower=d.get("rank_lower"),
            rank_upper=d.get("rank_upper"), distance=_decode_float(d.get("distance")), distinct=d["distinct"],
            claim_checks=checks, digits_tried=list(d.get("digits_tried", [])), reason=d["reason"],
            notes=list(d["notes"]))
    except (KeyError, TypeError, ValueError) as err:
        raise InputError(f"a certificate is malformed ({type(err).__name__}: {err})") from None


def _not_certified(reason, point, digits):
    from ..certify.records import Certificate, Kind, Status
    return Certificate(status=Status.UNDECIDED, kind=Kind.NUMERICAL, claim="",
                       center=np.asarray(point, dtype=complex), center_text=[], radius=None, digits=digits,
                       reason=reason)


@dataclass
class _Task:
    """One point to certify (travels to worker processes)."""

    claim: "Claim"            # REGULAR_ZERO, SMOOTH_POINT, SINGULAR_POINT or RANK
    system: PolynomialSystem
    point: np.ndarray
    options: "CertifyOptions"  # certify/records.py, imported where certification runs
    codimension: object = None
    slices: int = 0
    at_infinity: bool = False
    multiplicity: object = None
    exact: object = None      # the point's exact coordinates as texts, where the report gives them (decision 0133)
    given: object = None      # exact texts of a given point the verdict is not about (it judged a nearby point)
    verdict: str = ""


def _run_task(task):
    from ..certify.certificates import certify_rank, certify_regular_zero, certify_singular_point, certify_smooth_point
    from ..certify.records import Claim
    if task.claim is Claim.REGULAR_ZERO:
        return certify_regular_zero(task.system, task.point, task.options, at_infinity=task.at_infinity,
                                    multiplicity=task.multiplicity)
    point = task.point if task.exact is None else task.exact
    if task.claim is Claim.SMOOTH_POINT:
        certificate = certify_smooth_point(task.system, point, task.codimension, task.options)
    elif task.claim is Claim.RANK:
        return certify_rank(task.system, point, task.options)
    else:
        certificate = certify_singular_point(task.system, point, task.codimension, task.options, slices=task.slices,
                                             at_infinity=task.at_infinity)
    if task.given is not None:
        check = _given_point_check(task)
        if check is not None:
            certificate.claim_checks.append(check)
    return certificate


def _given_point_check(task):
    """The verdict held against the exactly given point, where the report judged a nearby point instead (the
    digits read as rounded data): a ClaimCheck when exact arithmetic decides it there, else None (decision 0133)."""
    from ..certify.certificates import certify_rank
    from ..certify.records import ClaimCheck, ClaimStatus, Kind, Status
    from ..singular.kinds import Verdict
    at = certify_rank(task.system, task.given, task.options)
    if at.kind != Kind.EXACT or at.status == Status.UNDECIDED:
        return None
    c = int(task.codimension)
    if at.status == Status.REFUTED:
        found, holds = "not on X", False
    else:
        found = f"rank J = {at.rank_upper}"
        holds = at.rank_upper < c if task.verdict == Verdict.SINGULAR else at.rank_upper == c
    how = (f"exact arithmetic at the point as given ({found}, codimension {c}); the verdict is about a nearby point "
           "that the report's reading of the digits as rounded allows")
    return ClaimCheck("verdict at the given point", task.verdict, found,
                      ClaimStatus.PROVED if holds else ClaimStatus.REFUTED, how)


def _certify_batch(batch):
    """Certify a batch of tasks (runs on workers)."""
    return [_run_task(task) for task in batch]


def _point_of(entry, key, system, at_infinity, where):
    """A report's point, checked for its number of coordinates (one-line error naming where)."""
    point = decode_point(entry[key])
    expected = system.n_variables + (1 if at_infinity else 0)
    if point.shape != (expected,):
        raise InputError(f"{where}: the point has {len(point)} coordinates, expected {expected}")
    if not np.all(np.isfinite(point)):
        raise InputError(f"{where}: the point has non-finite coordinates")
    return point


def _singular_tasks(system, component, options, where):
    """Tasks (or finished 'undecided' certificates) for the points of one singular component."""
    from ..certify.records import Claim
    from ..singular.kinds import PieceKind
    at_infinity = bool(component["at_infinity"]) and not system.projective
    points = [_point_of({"p": p}, "p", system, at_infinity, f"{where}, point {k}")
              for k, p in enumerate(component["points"], 1)]
    digits = options.digits
    if component["kind"] == PieceKind.NON_REDUCED:
        return [_not_certified("a generically non-reduced component of X: the equations cannot tell whether "
                               "the variety is smooth there", p, digits) for p in points]
    codimension = component.get("codimension")
    if codimension is None:
        if system.n_equations != 1:
            return [_not_certified("the report gives no codimension for this component", p, digits)
                    for p in points]
        codimension = 1
    dimension = int(component["dimension"])
    return [_Task(Claim.SINGULAR_POINT, system, p, options, int(codimension), dimension, at_infinity) for p in points]


def _exact_judged_point(system, verdict, where):
    """The judged point's exact coordinates (texts) when the report gives them and calls the point exact data
    (the given point judged as it is, data radius 0), else None."""
    if verdict.get("data_radius") != 0 or verdict.get("given") != verdict.get("point"):
        return None
    return _exact_given_point(system, verdict, where)


def _exact_given_point(system, verdict, where):
    """The given point's exact coordinates (texts, checked to read as numbers) when the report gives them."""
    texts = verdict.get("given_exact")
    if texts is None or system.projective:
        return None
    _require(isinstance(texts, list) and len(texts) == system.n_variables
             and all(isinstance(t, str) and len(t) <= _MAX_EXACT_TEXT for t in texts),
             f"{where}'s 'given_exact'", f"a list of {system.n_variables} texts of numbers")
    from ..system.parse import parse_constant
    given = _point_of(verdict, "given", system, False, where)
    for text, double in zip(texts, given):
        try:
            value = complex(parse_constant(text))
        except (NumagError, ArithmeticError, ValueError) as err:
            raise InputError(f"the report is damaged: {where}'s 'given_exact' holds {text[:40]!r} ({err})") from None
        # the texts are the point the doubles of 'given' round: anything else is another point
        _require(abs(value - double) <= 2.0 ** -50 * abs(double), f"{where}'s 'given_exact'",
                 "the exact coordinates its 'given' doubles round")
    return list(texts)


#: Longest text of one exact coordinate read from a report (a rational of a few thousand digits).
_MAX_EXACT_TEXT = 20000


def _check_task(system, verdict, options, where):
    from ..certify.records import Claim
    from ..singular.kinds import Verdict
    point = _point_of(verdict, "point", system, False, where)
    exact = _exact_judged_point(system, verdict, where)
    if verdict["verdict"] == "off":
        return _not_certified("the point is not on X (verdict 'off'): there is nothing to certify", point,
                              options.digits)
    codimension = verdict.get("codimension")
    # an exactly given point the verdict is not about (it judged a nearby one): the verdict is held against it too
    given = _exact_given_point(system, verdict, where) if exact is None else None
    if verdict["verdict"] == Verdict.SMOOTH and codimension is not None:
        return _Task(Claim.SMOOTH_POINT, system, point, options, int(codimension), exact=exact, given=given,
                     verdict=Verdict.SMOOTH)
    if verdict["verdict"] == Verdict.SINGULAR and codimension is not None:
        return _Task(Claim.SINGULAR_POINT, system, point, options, int(codimension), exact=exact, given=given,
                     verdict=Verdict.SINGULAR)
    # no claim the certificate could prove (or no codimension to prove it with): the rank of J, proved
    return _Task(Claim.RANK, system, point, options, exact=exact)


def _require(condition, where, what):
    if not condition:
        raise InputError(f"the report is damaged: {where} must be {what}")


def _require_point(point, size, where):
    _require(isinstance(point, list) and len(point) == size and all(
        isinstance(pair, list) and len(pair) == 2 and all(
            isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(v) for v in pair)
        for pair in point), where, f"a list of {size} [real, imaginary] pairs of finite numbers")


def _validated_for_certify(data, command, system):
    """Check every field certification reads, so that a damaged report is refused naming the field."""
    n = system.n_variables
    def entries(key):
        _require(isinstance(data.get(key), list) and all(isinstance(e, dict) for e in data[key]), f"'{key}'",
                 "a list of objects")
        return data[key]
    def codimension(entry, where):
        value = entry.get("codimension")
        _require(value is None or (isinstance(value, int) and not isinstance(value, bool) and 0 <= value <= n),
                 f"{where}'s 'codimension'", f"null or an integer from 0 to {n}")
    if command == "solve":
        for key, size in (("solutions", n), ("at_infinity", n if system.projective else n + 1)):
            for k, entry in enumerate(entries(key), 1):
                _require_point(entry.get("point"), size, f"'{key}' item {k}'s 'point'")
    elif command == "singular":
        for k, component in enumerate(entries("components"), 1):
            where = f"component {k}"
            _require(isinstance(component.get("at_infinity"), bool), f"{where}'s 'at_infinity'", "true or false")
            _require(isinstance(component.get("kind"), str), f"{where}'s 'kind'", "text")
            dimension = component.get("dimension")
            _require(isinstance(dimension, int) and not isinstance(dimension, bool) and 0 <= dimension <= n,
                     f"{where}'s 'dimension'", f"an integer from 0 to {n}")
            codimension(component, where)
            points = component.get("points")
            _require(isinstance(points, list), f"{where}'s 'points'", "a list")
            size = n + 1 if component["at_infinity"] and not system.projective else n
            for j, point in enumerate(points, 1):
                _require_point(point, size, f"{where}'s point {j}")
    else:
        for k, verdict in enumerate(entries("points"), 1):
            _require_point(verdict.get("point"), n, f"point {k}'s 'point'")
            _require(isinstance(verdict.get("verdict"), str), f"point {k}'s 'verdict'", "text")
            codimension(verdict, f"point {k}")


def certify_report(data, options=None, progress=None, executor=None):
    """Certificates for the points of a saved report of ``solve``, ``singular`` or ``check``.

    Nothing the report claims is trusted: its points are where to look, and its claims (a codimension,
    a multiplicity, a point being at infinity, a verdict) are checked against the system; a claim that
    does not hold is listed in the certificate's ``claim_checks`` and counted.

    Parameters
    ----------
    data : dict
        The JSON envelope (it is not modified).
    options : CertifyOptions, optional
    progress : Progress, optional
        Told a one-line message as points are certified (:mod:`numag.run.progress`).
    executor : numag.run.executor.Executor, optional
        Runs the points in batches (worker processes, Dask); default in-process.

    Returns
    -------
    dict
        A copy with a ``certificate`` for each solution (``solve``), a ``certificates`` list
        parallel to ``points`` for each component (``singular``), a ``certificate`` per point
        (``check``: the verdict's, with the rank of J proved on its box; a rank certificate where the
        verdict claims nothing), and a ``certification`` summary: counts by status and kind, claims
        that failed, proved ranks, overlapping boxes (``all_distinct`` true when no two certified
        boxes meet), digits and time.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> from numag.singular.locus import SingularOptions, singular_locus
    >>> locus = singular_locus(parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"]), seed=1)
    >>> report = certify_report(singular_to_dict(locus, SingularOptions()))
    >>> report["components"][0]["certificates"][0]["status"], report["certification"]["all_distinct"]
    ('certified', True)
    """
    from ..certify.certificates import overlapping_pairs
    from ..certify.records import ALPHA_ZERO_TEXT, CertifyOptions, Claim, Kind, STATUSES, Status
    started = time.perf_counter()
    options = (options or CertifyOptions()).validated()
    command = data.get("command") if isinstance(data, dict) else None
    if command not in _CERTIFIABLE:
        raise InputError(f"certify needs a report of 'numag solve', 'numag singular' or 'numag check', "
                         f"not of {command!r}")
    data = copy.deepcopy({key: list(value) if isinstance(value, EncodedSequence) else value
                          for key, value in data.items()})  # a lazy report's entries become real lists
    system = _report_system(data, command)
    _validated_for_certify(data, command, system)
    # slots: (entry, key, space, task or finished certificate); space groups boxes for disjointness
    slots = []
    try:
        if command == "solve":
            for key, at_infinity in (("solutions", False), ("at_infinity", True)):
                for k, entry in enumerate(data[key], 1):
                    infinity = at_infinity and not system.projective
                    point = _point_of(entry, "point", system, infinity, f"{key} {k}")
                    task = _Task(Claim.REGULAR_ZERO, system, point, options, at_infinity=infinity,
                                 multiplicity=None if infinity else entry.get("multiplicity"))
                    slots.append((entry, "certificate", "infinity" if infinity else "affine", task))
        elif command == "singular":
            for component in data["components"]:
                component["certificates"] = []
                space = "infinity" if component["at_infinity"] and not system.projective else "affine"
                where = f"component {component.get('id')}"
                for task in _singular_tasks(system, component, options, where):
                    slots.append((component, "certificates", space if component["dimension"] == 0 else None,
                                  task))
        else:
            for k, verdict in enumerate(data["points"], 1):
                slots.append((verdict, "certificate", None, _check_task(system, verdict, options, f"point {k}")))
    except (KeyError, TypeError) as err:
        raise InputError(f"the report lacks or garbles the key {err}") from None
    pending = [k for k, slot in enumerate(slots) if isinstance(slot[3], _Task)]
    results = {k: slot[3] for k, slot in enumerate(slots) if not isinstance(slot[3], _Task)}
    size = 4
    batches = [pending[i:i + size] for i in range(0, len(pending), size)]
    owned = executor is None
    executor = executor or InProcess()
    try:
        for position, certificates in executor.run(_certify_batch, [[slots[k][3] for k in b] for b in batches]):
            for k, certificate in zip(batches[position], certificates):
                results[k] = certificate
            if progress is not None:
                progress(f"certified {len(results)} of {counted(len(slots), 'point')}")
        for failure in executor.failures:
            for k in batches[failure.index]:
                results[k] = _not_certified(f"certification failed on a worker: {failure.error}",
                                            slots[k][3].point, options.digits)
    finally:
        if owned:
            executor.close()
    spaces = {}
    for k, (entry, key, space, _) in enumerate(slots):
        certificate = results[k]
        if space is not None:
            spaces.setdefault(space, []).append(certificate)
    overlapping = sum(len(overlapping_pairs(group)) for group in spaces.values())
    every = [results[k] for k in range(len(slots))]
    for k, (entry, key, _, _) in enumerate(slots):
        certificate, holds = results[k], None
        if command == "check" and certificate.status == Status.CERTIFIED:
            # decision 0110: a box that does not hold the point the verdict is about is no proof for that point
            # (the point is stored in doubles: its rounding, a few units of 2^-52 of its size, is not a distance);
            # decision 0133: such a certificate is not "certified" -- the claim it proves is about another point
            size = math.sqrt(1.0 + sum(re * re + im * im for re, im in entry["point"]))
            holds = not (isinstance(certificate.distance, float) and isinstance(certificate.radius, float)
                         and certificate.distance > certificate.radius + 2.0 ** -48 * size)
            if not holds:
                certificate.status = Status.UNDECIDED
                certificate.reason = (f"the box proves the claim ({certificate.claim}) at a point of X "
                                      f"{certificate.distance:.2g} from the point the verdict is about, outside the "
                                      f"box (radius {certificate.radius:.2g}): no proof for the judged point")
        encoded = certificate_to_dict(certificate)
        if holds is not None:
            encoded["holds_judged_point"] = holds
        if key == "certificates":
            entry[key].append(encoded)
        else:
            entry[key] = encoded
    counts = {status: sum(c.status == status for c in every) for status in STATUSES}
    kinds = {kind.value: sum(c.status == Status.CERTIFIED and c.kind == kind for c in every) for kind in Kind}
    failed_claims = [f"{check.name}: reported {check.reported}, {check.status} ({check.how})"
                     for c in every for check in c.failed_claims]
    data["certification"] = {
        "digits": options.digits, "max_digits": options.limit, "exact_attempted": options.exact,
        "counts": counts, "certified_by_kind": kinds,
        "claims_failed": len(failed_claims), "failed_claims": failed_claims,
        "ranks": {"lower_bound_proved": sum(c.rank_lower is not None for c in every),
                  "exact": sum(c.rank_lower is not None and c.rank_lower == c.rank_upper for c in every)},
        "overlapping_pairs": overlapping, "all_distinct": overlapping == 0 if command != "check" else None,
        "alpha_constant": ALPHA_ZERO_TEXT, "seconds": time.perf_counter() - started,
        "executor": executor.describe(),
        "meaning": ("numerical: a box provably holding exactly one zero of a square subsystem, every other "
                    "equation of the claim bounded over it below the threshold relative to its terms "
                    "(backward error); exact: proved for the exact equations (recognised coordinates, "
                    "root separation). Being singular is not an open condition: only exact certificates "
                    "prove it. A report's claims are checked, not trusted (claim_checks)."),
    }
    return data


def json_keys(mapping):
    """A mapping with its keys in the one style of JSON reports: words joined by ``_``.

    Examples
    --------
    >>> json_keys({"smooth": 1, "non-reduced": 0})
    {'smooth': 1, 'non_reduced': 0}
    """
    return {str(key).replace("-", "_").replace(" ", "_"): value for key, value in mapping.items()}


def read_report(path):
    """Load a saved JSON report (size-limited, strict JSON), with one-line errors naming the file.

    Keys of older reports are read in today's style (``counts`` of ``check``: ``non-reduced`` ->
    ``non_reduced``).
    """
    data = loads_json(read_limited(path, MAX_INPUT_BYTES, "report"), os.fspath(path))
    if not isinstance(data, dict):
        raise InputError(f"{os.fspath(path)}: not a numag report (a JSON object is expected)")
    if isinstance(data.get("counts"), dict):
        data["counts"] = json_keys(data["counts"])
    return data


def write_report(path, data):
    """Write a report where the user asked: regular files are replaced atomically keeping their mode,
    links are followed to their target, devices and pipes are written through (see :func:`numag.system.safeio.write_file`)."""
    write_file(path, (dumps(data) + "\n").encode("utf-8"))


# --- compare -------------------------------------------------------------------------------------

def _plain(value):
    if isinstance(value, (np.integer,)):
        return int(value)
    if isinstance(value, (np.floating,)):
        return float(value)
    return value


def compare_to_dict(comparison):
    """A :class:`~numag.app.compare.Comparison` as the JSON envelope (numag's locus included)."""
    from ..singular.locus import SingularOptions
    reference = comparison.reference
    locus_data = singular_to_dict(comparison.locus, comparison.locus.options or SingularOptions())
    locus_data["options_known"] = comparison.locus.options is not None
    return {
        "numag_version": __version__,
        "command": "compare",
        "seed": comparison.locus.seed,
        "system": system_to_dict(comparison.system),
        "paths": locus_data["paths"],
        "components": locus_data["components"],
        "verdict": comparison.verdict,
        "rows": [{"quantity": r.quantity, "numag": _plain(r.numag), "exact": _plain(r.exact), "agree": r.agree}
                 for r in comparison.rows],
        "max_distance": _encode_float(comparison.max_distance),
        "digits_of_agreement": _encode_float(comparison.digits),
        "numag_seconds": comparison.numag_seconds,
        "reference_seconds": comparison.reference_seconds,
        "ratio": _encode_float(comparison.ratio),
        "reference": {"status": reference.status, "message": reference.message, "wall_seconds": reference.seconds,
                      "compute_seconds": reference.compute_seconds,
                      "variety_dimension": reference.variety_dimension, "variety_degree": reference.variety_degree,
                      "component_degrees": reference.component_degrees,
                      "codimension": reference.codimension, "minors": reference.minors,
                      "singular_dimension": reference.singular_dimension,
                      "singular_points": reference.singular_points,
                      "real_singular_points": reference.real_singular_points,
                      "scheme_length": reference.scheme_length, "singular_degree": reference.singular_degree,
                      "chart": reference.chart, "exact_points": reference.exact_points,
                      "non_reduced_degrees": reference.non_reduced_degrees,
                      "rank_drop_points": reference.rank_drop_points, "embedded_points": reference.embedded_points,
                      "rank_drop_dimension": reference.rank_drop_dimension,
                      "rank_drop_degree": reference.rank_drop_degree,
                      "points": None if reference.points is None else [encode_point(p) for p in reference.points]},
        "scope": comparison.scope,
        "notes": list(comparison.notes),
        # numag's whole answer, so that the comparison reads back (compare_from_dict)
        "locus": locus_data,
        "caution": CAUTION,
    }


def compare_from_dict(data):
    """Rebuild a :class:`~numag.app.compare.Comparison` from :func:`compare_to_dict` output."""
    from .compare import Comparison, ComparisonRow  # the comparison's own module; it imports no report code
    from .reference import ReferenceAnswer
    _report_system(data, "compare")
    if not isinstance(data.get("locus"), dict):
        raise InputError("the report of 'numag compare' was written before it kept numag's locus ('locus'): "
                         "it cannot be read back as a comparison")
    locus, options = singular_from_dict(data["locus"])
    locus.options = options if data["locus"].get("options_known") else None  # absent before decision 0078
    r = data["reference"]
    points = r.get("points")
    reference = ReferenceAnswer(
        status=r["status"], seconds=float(r["wall_seconds"]), compute_seconds=r["compute_seconds"],
        variety_dimension=r["variety_dimension"], variety_degree=r["variety_degree"],
        codimension=r["codimension"], minors=r["minors"], singular_dimension=r["singular_dimension"],
        singular_points=r["singular_points"], real_singular_points=r["real_singular_points"],
        scheme_length=r["scheme_length"], singular_degree=r["singular_degree"],
        component_degrees=r["component_degrees"],
        points=None if points is None else [list(decode_point(p)) for p in points],
        exact_points=r["exact_points"], chart=r["chart"], message=r["message"],
        non_reduced_degrees=r.get("non_reduced_degrees"),  # absent before decision 0096
        rank_drop_points=r.get("rank_drop_points"), embedded_points=r.get("embedded_points"),  # ... before 0105
        rank_drop_dimension=r.get("rank_drop_dimension"), rank_drop_degree=r.get("rank_drop_degree"))  # ... 0108
    rows = [ComparisonRow(row["quantity"], row["numag"], row["exact"], row["agree"]) for row in data["rows"]]
    return Comparison(locus.system, locus, reference, rows, _decode_float(data["max_distance"]),
                      _decode_float(data["digits_of_agreement"]), float(data["numag_seconds"]),
                      float(data["reference_seconds"]), data["verdict"], data["scope"], list(data["notes"]))
