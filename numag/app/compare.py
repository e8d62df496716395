"""numag beside the exact reference (``numag compare``): counts, dimensions, degrees, distances, times.

The numerical side is :func:`numag.singular.locus.singular_locus`; the exact side is
:func:`numag.app.reference.exact_reference` (sympy Groebner bases in a child process
under a time limit). Like is compared with like: the exact side sees
V(F + all c x c minors of J), which holds the singular points AND the
generically non-reduced components, so numag's components of kind "singular"
and "non-reduced" are compared with it; affine input is compared on affine
points only (numag's points at infinity are listed apart).

Examples
--------
>>> from numag.system.parse import parse_system
>>> comparison = compare_system(parse_system(["y^2 - x^3"], ["x", "y"]), seconds=60, seed=1)
>>> comparison.verdict, [row.quantity for row in comparison.rows if row.agree][:3]
('agree', ['dimension of X', 'degree of X', 'components of X (top dimension; degrees)'])
"""

from dataclasses import dataclass, field
import math
import time

import numpy as np

from ..system.display import counted, html_table
from ..singular.locus import SingularOptions, singular_locus
from ..singular.kinds import PieceKind
from .reference import REFERENCE_SCOPE, ReferenceStatus, exact_reference

__all__ = ["ComparisonRow", "Comparison", "numag_summary", "compare_answers", "compare_system", "agreement_digits",
           "VERDICTS"]

#: Outcomes of a comparison.
VERDICTS = ("agree", "mismatch", "incomplete")


@dataclass
class ComparisonRow:
    """One quantity side by side; ``agree`` is None when one side has no value."""

    quantity: str
    numag: object
    exact: object
    agree: object


@dataclass
class Comparison:
    """Result of :func:`compare_answers`.

    Attributes
    ----------
    system : PolynomialSystem
    locus : SingularLocus
        numag's answer.
    reference : ReferenceAnswer
        The exact side's answer (with its status).
    rows : list of ComparisonRow
    max_distance : float or None
        Largest distance from an exact singular point to the nearest numerical one (relative
        to 1 + |p|), over the points the reference could give.
    digits : float or None
        Digits of agreement of the coordinates: -log10(max_distance).
    numag_seconds, reference_seconds : float
        numag's wall time; the reference's computation time (without the child interpreter's start
        and sympy's import) when it finished, else its wall time.
    verdict : str
        "agree", "mismatch" (some row disagrees) or "incomplete" (the reference did not finish,
        or numag left a candidate undecided).
    scope : str
        What is compared.
    notes : list of str
    """

    system: object
    locus: object
    reference: object
    rows: list
    max_distance: object
    digits: object
    numag_seconds: float
    reference_seconds: float
    verdict: str
    scope: str = REFERENCE_SCOPE
    notes: list = field(default_factory=list)

    def __repr__(self):
        digits = "" if self.digits is None else f", coordinates agree to {self.digits:.1f} digits"
        return (f"Comparison({self.system.name or 'system'}: {self.verdict}, {len(self.rows)} quantities, reference "
                f"{self.reference.status}{digits})")

    def _repr_html_(self):
        rows = [[r.quantity, "-" if r.numag is None else r.numag, "-" if r.exact is None else r.exact,
                 {True: "yes", False: "NO", None: "-"}[r.agree]] for r in self.rows]
        return html_table(repr(self), ["quantity", "numag", "exact", "agree"], rows)

    @property
    def ratio(self):
        """Reference seconds / numag seconds (above 1: numag faster); None when the reference did not finish."""
        if self.reference.status != ReferenceStatus.FINISHED or self.numag_seconds <= 0:
            return None
        return self.reference_seconds / self.numag_seconds


def agreement_digits(distance):
    """Digits of agreement for a largest relative distance, as it is shown (two significant digits).

    -log10 of the distance printed, so that the digits and the distance shown beside them agree (points
    refined at high precision can agree far beyond 16 digits); infinity for a distance of 0.

    Examples
    --------
    >>> round(agreement_digits(3.44e-11), 2), agreement_digits(0.0)
    (10.46, inf)
    """
    shown = float(f"{distance:.1e}")
    return math.inf if shown == 0 else -math.log10(shown)


def numag_summary(locus):
    """numag's answer in the reference's terms (dimensions, degrees, counts, points).

    Returns
    -------
    dict
        ``variety_dimension``, ``variety_degree``, ``equidimensional``, ``singular_dimension``
        (-1 when empty), ``singular_points``, ``real_singular_points``, ``singular_degree``
        (top-dimensional part), ``points`` (array of the isolated points), ``undecided``.
    """
    system = locus.system
    component_degrees = None
    if locus.variety is not None and locus.variety.components:
        dims = [c.dimension for c in locus.variety.components]
        top = max(dims)
        degree = sum(c.degree for c in locus.variety.components if c.dimension == top)
        equidimensional = len(set(dims)) == 1
        component_degrees = sorted(c.degree for c in locus.variety.components if c.dimension == top)
    else:  # the gradient shortcut of projective hypersurfaces: X itself is not decomposed
        top = system.n_variables - 2
        degree = system.polynomials[0].degree
        equidimensional = True
    compared = [c for c in locus.components if c.kind in (PieceKind.SINGULAR, PieceKind.NON_REDUCED)
                and (system.projective or not c.at_infinity)]
    undecided = [c for c in locus.components if c.kind is PieceKind.UNDECIDED]
    # an embedded component whose inside was not searched for singular points of X (decision 0108)
    unsearched = int(locus.discarded.get("embedded_component_unsearched", 0))
    # the generically non-reduced components of X (top dimension: those of one equation, the reference's case)
    non_reduced = sorted(c.degree for c in compared if c.kind is PieceKind.NON_REDUCED and c.dimension == top)
    singular_dimension = max((c.dimension for c in compared), default=-1)
    points = [c.points[0] for c in compared if c.dimension == 0]
    summary = {"variety_dimension": top, "variety_degree": degree, "equidimensional": equidimensional,
               "component_degrees": component_degrees,
               "singular_dimension": singular_dimension, "singular_points": None,
               "real_singular_points": None, "singular_degree": None,
               "points": np.array(points, dtype=complex).reshape(len(points), system.n_variables),
               "undecided": len(undecided) + unsearched, "non_reduced_degrees": non_reduced}
    if singular_dimension <= 0:
        summary["singular_points"] = len(points)
        summary["real_singular_points"] = sum(bool(c.real[0]) for c in compared if c.dimension == 0)
    else:
        summary["singular_degree"] = sum(c.degree for c in compared if c.dimension == singular_dimension)
    return summary


def _in_chart(points, chart):
    """Homogeneous points moved to the reference's chart a . x = 1."""
    if chart is None or len(points) == 0:
        return points
    a = np.asarray(chart, dtype=float)
    scale = points @ a
    with np.errstate(divide="ignore", invalid="ignore"):
        return points / scale[:, None]


def _components_row(mine, exact):
    """numag's top-dimensional component degrees against the reference's irreducible factors over Q.

    Equal lists agree. Components over C refine those over Q (a factor irreducible over Q can
    split into conjugate components over C), so numag may have more, grouped into the reference's
    degrees; fewer, or degrees that cannot be so grouped, is a mismatch. A finer split that can be
    grouped is undecided here (agree None): the reference cannot say whether the factor splits.

    Examples
    --------
    >>> _components_row([3], [3]).agree, _components_row([1, 1, 1], [3]).agree, _components_row([3], [1, 2]).agree
    (True, None, False)
    """
    if mine is None or exact is None:
        return None
    mine, exact = sorted(mine), sorted(exact)
    agree = True if mine == exact else (None if len(mine) > len(exact) and _groups_into(mine, exact) else False)
    return ComparisonRow("components of X (top dimension; degrees)", mine, exact, agree)


def _kinds_row(mine, exact):
    """numag's generically non-reduced components of X (degrees) against the reference's repeated factors.

    V(F, minors) holds singular points and non-reduced components alike, so dimensions and degrees cannot
    tell a doubled plane reported "singular" from one reported "non-reduced"; the kinds are compared here.
    A repeated factor over Q may split over C (grouped as in :func:`_components_row`: undecided).

    Examples
    --------
    >>> _kinds_row([1], [1]).agree, _kinds_row([], [1]).agree, _kinds_row([1, 1], [2]).agree, _kinds_row([1], None)
    (True, False, None, None)
    """
    if mine is None or exact is None:
        return None
    mine, exact = sorted(mine), sorted(exact)
    agree = True if mine == exact else (None if len(mine) > len(exact) and _groups_into(mine, exact) else False)
    return ComparisonRow("non-reduced components of X (degrees)", mine, exact, agree)


def _groups_into(parts, totals):
    """Can ``parts`` be split into groups whose sums are exactly ``totals``? (small lists: backtracking)"""
    if sum(parts) != sum(totals):
        return False
    remaining = list(totals)

    def place(k):
        if k == len(parts):
            return all(r == 0 for r in remaining)
        for j in range(len(remaining)):
            if remaining[j] >= parts[k]:
                remaining[j] -= parts[k]
                if place(k + 1):
                    return True
                remaining[j] += parts[k]
        return False

    return place(0)


def compare_answers(system, locus, reference, numag_seconds, tolerance=1e-6):
    """Side-by-side rows and a verdict for numag's ``locus`` against the exact ``reference``.

    Parameters
    ----------
    system : PolynomialSystem
    locus : SingularLocus
    reference : ReferenceAnswer
    numag_seconds : float
    tolerance : float
        Largest relative distance between matched points that still agrees.

    Returns
    -------
    Comparison
    """
    ours = numag_summary(locus)
    rows = []

    unsearched = int(locus.discarded.get("embedded_component_unsearched", 0))

    def row(quantity, mine, exact, inside=False):
        agree = None if mine is None or exact is None else mine == exact
        if inside and unsearched and agree is False and mine < exact:
            # singular points of X inside an embedded component numag did not search (decision 0108): numag's
            # fewer is undecided there, not wrong (the run's warning says so); more is still a mismatch
            agree = None
        rows.append(ComparisonRow(quantity, mine, exact, agree))

    row("dimension of X", ours["variety_dimension"], reference.variety_dimension)
    row("degree of X", ours["variety_degree"], reference.variety_degree)
    notes = []
    components = _components_row(ours["component_degrees"], reference.component_degrees)
    if components is not None:
        rows.append(components)
        if components.agree is None:
            notes.append("numag splits X into more components than the reference's irreducible factors over Q "
                         f"({components.numag} against {components.exact}); the reference does not test "
                         "irreducibility over C, so the finer split is neither confirmed nor refuted")
    kinds = _kinds_row(ours["non_reduced_degrees"], reference.non_reduced_degrees)
    if kinds is not None:
        rows.append(kinds)
    elif reference.status == ReferenceStatus.FINISHED and ours["singular_dimension"] >= 0:
        notes.append("kinds not compared: the reference knows which components are non-reduced for one "
                     "equation only (its repeated factors)")
    embedded = locus.discarded.get("embedded_point", 0)
    if reference.embedded_points is not None:
        # decision 0105: the reference saturated away the equations' embedded points, so its singular locus is X's
        row("embedded points of the equations (X smooth there)", embedded, reference.embedded_points)
        row("dimension of Sing(X) (V(F, minors) without embedded points)", ours["singular_dimension"],
            reference.singular_dimension)
    elif reference.rank_drop_dimension is not None:
        # decision 0108: the reference saturated away the equations' embedded components of positive dimension
        rank_drop = max([ours["singular_dimension"], 0 if embedded else -1]
                        + [c.dimension for c in locus.embedded_components])
        row("dimension of V(F, minors) (with the embedded components)", rank_drop, reference.rank_drop_dimension)
        if rank_drop == reference.rank_drop_dimension and rank_drop > 0:
            top = [c.degree for c in locus.embedded_components if c.dimension == rank_drop] + [
                c.degree for c in locus.components if c.dimension == rank_drop and not c.at_infinity
                and c.kind in (PieceKind.SINGULAR, PieceKind.NON_REDUCED)]
            row("degree of V(F, minors)'s top-dimensional part", sum(top), reference.rank_drop_degree)
        row("dimension of Sing(X) (V(F, minors) without embedded components)", ours["singular_dimension"],
            reference.singular_dimension, inside=True)
    else:
        row("dimension of V(F, minors)", ours["singular_dimension"], reference.singular_dimension)
        if locus.embedded_components:
            ours["undecided"] += len(locus.embedded_components)
            notes.append(f"numag calls {counted(len(locus.embedded_components), 'set')} of V(F, minors) embedded "
                         "components of the equations (X smooth at their generic points, decision 0108); the "
                         "reference did not separate them, so they count as undecided here")
        if embedded:
            ours["undecided"] += embedded
            notes.append(f"numag calls {counted(embedded, 'point')} of V(F, minors) embedded points of the equations "
                         "(X smooth there, decision 0105); the reference did not separate them (it does when V(F, "
                         "minors) is finite), so they count as undecided here")
    exact_dimension = reference.singular_dimension
    if exact_dimension is not None and exact_dimension <= 0 and ours["singular_dimension"] <= 0:
        row("singular points", ours["singular_points"], reference.singular_points, inside=True)
        row("real singular points", ours["real_singular_points"], reference.real_singular_points, inside=True)
    elif exact_dimension is not None and exact_dimension > 0:
        row("degree of the top-dimensional part", ours["singular_degree"], reference.singular_degree,
            inside=ours["singular_dimension"] == exact_dimension)
    max_distance = digits = None
    if reference.points is not None and len(reference.points) and len(ours["points"]):
        mine = _in_chart(ours["points"], reference.chart) if system.projective else ours["points"]
        worst = 0.0
        for exact_point in np.asarray(reference.points, dtype=complex):
            gaps = np.max(np.abs(mine - exact_point[None, :]), axis=1) / (1.0 + np.max(np.abs(exact_point)))
            worst = max(worst, float(np.nanmin(gaps)))
        max_distance = worst
        digits = agreement_digits(worst)
        rows.append(ComparisonRow("largest distance to an exact point", f"{worst:.1e}", f"<= {tolerance:g}",
                                  worst <= tolerance))
    elif reference.points is None and reference.status == ReferenceStatus.FINISHED and exact_dimension == 0:
        notes.append("the reference gave counts but no coordinates (the random form was not separating)")
    if not ours["equidimensional"]:
        notes.append("X is not equidimensional: the reference uses the codimension of its top-dimensional part, "
                     "so singular points on lower-dimensional components may differ")
    if exact_dimension is not None and exact_dimension > 0:
        notes.append("a positive-dimensional locus is compared by its top-dimensional part only")
    if ours["undecided"]:
        notes.append(f"numag left {counted(ours['undecided'], 'candidate')} undecided")
    if any(r.agree is False for r in rows):
        verdict = "mismatch"
    elif (reference.status != ReferenceStatus.FINISHED or ours["undecided"]
          or any(r is not None and r.agree is None for r in (components, kinds))):
        verdict = "incomplete"
        if reference.status != ReferenceStatus.FINISHED:
            notes.append(f"reference {reference.status}: {reference.message}")
    else:
        verdict = "agree"
    reference_seconds = reference.compute_seconds if reference.status == ReferenceStatus.FINISHED else reference.seconds
    return Comparison(system, locus, reference, rows, max_distance, digits, float(numag_seconds),
                      float(reference_seconds if reference_seconds is not None else reference.seconds), verdict,
                      notes=notes)


def compare_system(system, seconds=60.0, seed=None, options=None, tolerance=1e-6, progress=None):
    """Run numag's singular locus and the exact reference on ``system``, one after the other.

    Parameters
    ----------
    system : PolynomialSystem
    seconds : float
        Time limit of the exact reference.
    seed : int, optional
    options : SingularOptions, optional
    tolerance : float
    progress : Progress, optional
        Told one-line messages (:mod:`numag.run.progress`).

    Returns
    -------
    Comparison
    """
    started = time.perf_counter()
    locus = singular_locus(system, options or SingularOptions(), seed=seed, progress=progress)
    numag_seconds = time.perf_counter() - started
    if progress is not None:
        progress(f"numag: {numag_seconds:.2f} s; exact reference (time limit {seconds:g} s) ...")
    reference = exact_reference(system, seconds=seconds, seed=locus.seed)
    return compare_answers(system, locus, reference, numag_seconds, tolerance)
