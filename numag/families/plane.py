"""Two parameters: the real discriminant curve traced, its cusps and nodes, and the regions of the plane.

For a family with two parameters p = (p_1, p_2) the discriminant is (in general) a plane curve. Its
real points are traced as the image of the real curve of the incidence set

    S = {(x, p) : F(x, p) = 0, all c x c minors of J_x F = 0}

with :func:`numag.witness.realcurve.trace_real_curve` (the tracer of ``numag plot``) and projected to p.
The box of the trace is the ``[ranges]`` box in p; in x it is the extent of the real points of S over a
few lines p_1 = const (one sweep of S with p_1 as its parameter), padded.

Special points of the traced curve (common practice, no source: a generic plane projection of a smooth
space curve is smooth except where the tangent is vertical, a cusp, or where two points share an image,
a node):

* **cusp**: the projected polyline turns back on itself while the curve S does not (the tangent of S has
  no p-part there);
* **node**: two pieces of the projected polyline cross.

Both are refined by (Gauss-)Newton with G = (F, the c x c minors of J_x F) (:class:`SingularIncidence`, also
used for the curve traced across lines, :mod:`numag.families.lines`): a cusp on {G = 0, J_x G v = 0, c . v = 1}
in (x, p, v) (a kernel vector v in x alone is tangent to S and has no p-part; for square members this is
{F = 0, J_x F v = 0, grad_x(det J_x F) . v = 0, c . v = 1}), a node on {G(x_1, p) = 0, G(x_2, p) = 0} in
(x_1, x_2, p). Where the minors are not all expanded (random complex combinations) or Newton does not
converge near the traced point they are given at the traced accuracy (``refined`` false).

Regions: the cells (line p_1 = v, interval of p_2 between real discriminant points) of
:mod:`numag.families.discriminant` are merged across neighbouring lines when a horizontal segment joins
them in the strip between the lines without crossing the traced curve (the curve's pieces in the strip
block the p_2-ranges they span) and their sample members have the same real count; each region keeps
the sample of its widest cell.

Examples
--------
>>> strip_blocked([np.array([[0.0, 0.0], [1.0, 1.0]])], 0.25, 0.5)
[(0.25, 0.5)]
"""

from dataclasses import dataclass, field
import enum
import math

import numpy as np

from ..errors import InputError, LimitError
from ..system.display import counted
from ..system.family import Family
from ..system.polynomial import Polynomial, PolynomialSystem
from ..numeric.cluster import connected_components
from ..numeric.evaluate import BatchEvaluator
from ..tracking.solve import solve_system
from ..witness.realcurve import RealCurveOptions, VertexKind, trace_real_curve
from ..singular.locus import minors_system
from .branches import RealCount
from .records import REAL_TOLERANCE
from .sweep import sweep

__all__ = ["CurvePointKind", "CurvePoint", "DiscriminantCurve", "PlaneRegion", "SingularIncidence", "conjugate_pair_points",
           "trace_discriminant_curve", "classify_join", "meeting_points", "clipped", "reach_box",
           "merge_cells", "strip_blocked", "CellMerge"]

#: A projected turn sharper than this (cosine between the directions before and after) is a cusp candidate.
_TURN_COSINE = -0.5
#: Newton is accepted when the residual is below this and the step stayed within the traced accuracy.
_NEWTON_TOLERANCE = 1e-10


class CurvePointKind(str, enum.Enum):
    """What a special point of the real discriminant curve is."""

    CUSP = "cusp"   #: the curve turns back on itself (a member with a degenerate singular point, e.g. a triple root)
    NODE = "node"   #: two arcs cross (a member with two singular points)
    #: an isolated real point of the discriminant: the real member is singular only at a conjugate pair of points
    ISOLATED = "isolated"
    #: arcs of the discriminant meet at the image of a singular point of the incidence set S (e.g. two components
    #: meeting, transversally or tangentially: x^3 + a x^2 + b at a = b = 0, the triple root)
    MEETING = "meeting"
    #: a candidate (``candidate``: the kind it was taken for) that Newton did not refine: neither confirmed nor
    #: ruled out, given at the traced accuracy
    UNDECIDED = "undecided"


@dataclass
class CurvePoint:
    """A cusp or node of the real discriminant curve.

    Attributes
    ----------
    kind : CurvePointKind
    point : ndarray of float, shape (2,)
        In the parameter plane.
    refined : bool
        Newton converged on the system of its kind, or a crossing was located on a circle of line offsets
        (decision 0093); else: at the traced accuracy, and the kind is UNDECIDED.
    candidate : CurvePointKind or None
        For an UNDECIDED point: the kind it was a candidate for.
    """

    kind: CurvePointKind
    point: np.ndarray
    refined: bool
    candidate: object = None

    def to_dict(self):
        data = {"kind": self.kind.value, "point": [float(v) for v in self.point], "refined": bool(self.refined)}
        if self.candidate is not None:
            data["candidate"] = self.candidate.value
        return data

    @classmethod
    def from_dict(cls, data):
        candidate = data.get("candidate")
        return cls(CurvePointKind(data["kind"]), np.array(data["point"], dtype=float), bool(data["refined"]),
                   None if candidate is None else CurvePointKind(candidate))

    @classmethod
    def found(cls, kind, point, refined):
        """A special point of ``kind`` if Newton refined it, else an UNDECIDED candidate for that kind.

        Examples
        --------
        >>> CurvePoint.found(CurvePointKind.CUSP, np.zeros(2), False).kind.value
        'undecided'
        """
        point = np.asarray(point, dtype=float).copy()
        if refined:
            return cls(kind, point, True)
        return cls(CurvePointKind.UNDECIDED, point, False, kind)


@dataclass
class DiscriminantCurve:
    """The traced real discriminant curve of a two-parameter family.

    Attributes
    ----------
    arcs : list of ndarray, shape (P, 2)
        Polylines in the parameter plane, cut to the box enlarged by half its size on every side (:func:`reach_box`).
    box : tuple of ndarray
        Lower and upper corners in the parameter plane.
    special : list of CurvePoint
    failed_arcs : int
        Arc ends of the trace that stalled or were misjoined (the picture may miss a piece).
    notes : list of str
    multiple : list of bool
        Per arc: on a multiple component of the discriminant (the member's singular points are multiple there,
        e.g. a length 0 of a linkage where the member splits); empty when not told apart.
    """

    arcs: list
    box: tuple
    special: list
    failed_arcs: int = 0
    notes: list = field(default_factory=list)
    multiple: list = field(default_factory=list)

    def to_dict(self):
        return {"arcs": [a.tolist() for a in self.arcs], "box": [list(map(float, c)) for c in self.box],
                "special": [s.to_dict() for s in self.special], "failed_arcs": int(self.failed_arcs),
                "notes": list(self.notes), "multiple": [bool(m) for m in self.multiple]}

    @classmethod
    def from_dict(cls, data):
        return cls([np.array(a, dtype=float).reshape(-1, 2) for a in data["arcs"]],
                   tuple(np.array(c, dtype=float) for c in data["box"]),
                   [CurvePoint.from_dict(s) for s in data["special"]], int(data["failed_arcs"]), list(data["notes"]),
                   [bool(m) for m in data.get("multiple", [])])


@dataclass
class PlaneRegion:
    """A region of the parameter plane: cells on neighbouring lines joined without crossing the curve.

    Attributes
    ----------
    cells : list of int
        Indices into the discriminant's cells (``Discriminant.regions``).
    sample : ndarray of float, shape (2,)
        The sample member whose count is given (the widest cell's).
    count : RealCount
    """

    cells: list
    sample: np.ndarray
    count: RealCount

    def to_dict(self):
        return {"cells": [int(c) for c in self.cells], "sample": [float(v) for v in self.sample],
                "count": self.count.kind.value,
                "real_solutions": self.count.solutions, "real_branches": self.count.branches,
                "failed": int(self.count.failed), "undecided": int(self.count.undecided)}

    @classmethod
    def from_dict(cls, data):
        return cls([int(c) for c in data["cells"]], np.array(data["sample"], dtype=float),
                   RealCount(data["real_solutions"], data["real_branches"], int(data["failed"]),
                             int(data.get("undecided", 0))))


def _box(family):
    """The [ranges] box of the two parameters (-1..1 where no range is given) and whether one was missing."""
    low, high, missing = [], [], []
    for name in family.parameters:
        interval = family.ranges.get(name)
        low.append(interval.low if interval else -1.0)
        high.append(interval.high if interval else 1.0)
        if interval is None:
            missing.append(name)
    return np.array(low), np.array(high), missing


def _permuted(polynomial, order):
    """The polynomial with its variables reordered: new variable j is old variable ``order[j]``."""
    return Polynomial(polynomial.exponents[:, order], polynomial.numeric_coefficients(), polynomial.n_variables)


def _real_combinations(polynomials, count, rng):
    weights = rng.standard_normal((count, len(polynomials)))
    combined = []
    for row in weights / np.linalg.norm(weights, axis=1, keepdims=True):
        total = Polynomial.zero(polynomials[0].n_variables)
        for w, p in zip(row, polynomials):
            total = total + p * float(w)
        combined.append(total)
    return combined


def _x_extent(incidence, n, box, lines, rng):
    """Lower and upper bounds of the real points of S over lines p_1 = const in the box (None when none).

    S with p_1 as its only parameter is a square family after n + 1 real random combinations of its
    equations (solutions of the combinations off S only widen the box).
    """
    order = list(range(n)) + [n + 1, n]  # (x, p_2, p_1): the parameter last
    polynomials = [_permuted(p.numeric(), order) for p in incidence.polynomials]
    if len(polynomials) > n + 1:
        polynomials = _real_combinations(polynomials, n + 1, rng)
    names = [incidence.variables[k] for k in order]
    family = Family(PolynomialSystem(names, polynomials), (names[-1],))
    values = np.linspace(box[0][0], box[1][0], max(lines, 3))[:, None]
    result = sweep(family, values, seed=int(rng.integers(2 ** 63)))
    found = []
    for member in result.values:
        if len(member.points) == 0:
            continue
        points = member.points[member.real].real
        inside = (points[:, n] >= box[0][1]) & (points[:, n] <= box[1][1]) if len(points) else []
        found += [p[:n] for p in points[inside]] if len(points) else []
    if not found:
        return None
    found = np.array(found)
    low, high = found.min(axis=0), found.max(axis=0)
    pad = np.maximum(0.5 * (high - low), 0.5)
    return low - pad, high + pad


def trace_discriminant_curve(family, codimension, max_exact_minors, lines, rng, resolution=200):
    """The real discriminant curve of a two-parameter family, traced, with its cusps and nodes.

    Parameters
    ----------
    family : Family
        Two parameters, real coefficients.
    codimension : int
    max_exact_minors : int
        The incidence set's minors must all be expanded (random combinations are complex).
    lines : int
        Lines p_1 = const on which the x-extent of the trace's box is measured.
    rng : numpy.random.Generator
    resolution : int
        Largest step of the trace: the box diagonal divided by this.

    Returns
    -------
    DiscriminantCurve

    Raises
    ------
    InputError
        Complex coefficients, or minors too many to expand.
    """
    n = family.n_variables
    if family.n_parameters != 2:
        raise InputError("the discriminant curve is traced for two parameters")
    try:
        incidence, _ = minors_system(family.system, codimension, rng, max_exact_minors, n_columns=n)
    except LimitError as err:
        raise InputError(f"the minors of J_x are too large to expand ({err})") from None
    if not incidence.has_real_coefficients:
        raise InputError("the real discriminant curve is traced for real families with all minors expanded")
    low, high, missing = _box(family)
    notes = []
    if missing:
        notes.append(f"No [ranges] interval for {', '.join(missing)}: the curve is traced for -1 to 1 there.")
    extent = _x_extent(incidence, n, (low, high), lines, rng)
    if extent is None:
        extent = (np.full(n, -1.0), np.full(n, 1.0))
        notes.append("No real singular point over the sampled lines: x was traced from -1 to 1.")
    curve = trace_real_curve(incidence, RealCurveOptions(box=(np.concatenate([extent[0], low]),
                                                              np.concatenate([extent[1], high])),
                                                         resolution=resolution),
                             seed=int(rng.integers(2 ** 31)))
    notes += curve.notes
    pieces = [b.points for b in curve.branches(clip=False) if len(b.points) >= 2]
    diagonal = float(np.linalg.norm(high - low))
    refining = SingularIncidence(incidence, n, codimension)
    special = _cusps(refining, pieces, n, diagonal) + _nodes(refining, pieces, n, diagonal, span=high - low) \
        + meeting_points(refining, curve, n, low, high)
    # the tracer's region reaches past the box; the arcs are given up to half the box beyond it (what the regions use)
    lifts, _ = clipped(pieces, *reach_box(low, high))
    arcs = [snapped_ends(refining, lift, *reach_box(low, high))[:, n:] for lift in lifts]
    return DiscriminantCurve(arcs, (low, high), special, curve.failed_arcs, notes)


def reach_box(low, high):
    """The [ranges] box enlarged by half its size on every side: where the curve's arcs are given.

    Examples
    --------
    >>> [c.tolist() for c in reach_box(np.array([-3.0, 0.0]), np.array([3.0, 2.0]))]
    [[-6.0, -1.0], [6.0, 3.0]]
    """
    span = high - low
    return low - 0.5 * span, high + 0.5 * span


def _cusps(incidence, pieces, n, diagonal):
    """Points where a piece's projection turns back (the tangent of S has no p-part)."""
    found = []
    for piece in pieces:
        steps = np.diff(piece[:, n:], axis=0)
        lengths = np.linalg.norm(steps, axis=1)
        full = np.linalg.norm(np.diff(piece, axis=0), axis=1)
        keep = lengths > 1e-14 * diagonal
        if keep.sum() < 3:
            continue
        index = np.nonzero(keep)[0]
        units = steps[keep] / lengths[keep, None]
        # a cusp's turn happens over one or two steps (a step may straddle it)
        for gap in (1, 2):
            cosines = np.sum(units[:-gap] * units[gap:], axis=1)
            for k in np.nonzero(cosines < _TURN_COSINE)[0]:
                segment = index[k:k + gap + 1]
                # the slowest projected step among those of the turn: closest to the cusp
                slowest = segment[np.argmin(lengths[segment] / np.maximum(full[segment], 1e-300))]
                found.append(piece[slowest] + 0.5 * (piece[slowest + 1] - piece[slowest]))
    points = _distinct(found, 1e-3 * diagonal)
    return [_cusp_point(incidence, point, n) for point in points]


def _nodes(incidence, pieces, n, diagonal, reach=None, span=None):
    """Crossings of the projected pieces (each pair of segments; pieces are short polylines), refined.

    Crossings of two lifts of one arc covered twice by S are no nodes and are left out (decision 0092).
    """
    segments, lifts = [], []
    for number, piece in enumerate(pieces):
        for k in range(len(piece) - 1):
            segments.append((number, k, piece[k, n:], piece[k + 1, n:]))
            lifts.append((piece[k], piece[k + 1]))
    if not segments:
        return []
    starts = np.array([s[2] for s in segments])
    stops = np.array([s[3] for s in segments])
    found = []
    # vectorised over all pairs: solve a + t (b - a) = c + u (d - c)
    a, b = starts[:, None, :], stops[:, None, :]
    c, d = starts[None, :, :], stops[None, :, :]
    r, s = b - a, d - c
    denominator = r[..., 0] * s[..., 1] - r[..., 1] * s[..., 0]
    with np.errstate(all="ignore"):
        t = ((c - a)[..., 0] * s[..., 1] - (c - a)[..., 1] * s[..., 0]) / denominator
        u = ((c - a)[..., 0] * r[..., 1] - (c - a)[..., 1] * r[..., 0]) / denominator
    crossing = (np.abs(denominator) > 0) & (t > 0) & (t < 1) & (u > 0) & (u < 1)
    crossing &= np.triu(np.ones(crossing.shape, dtype=bool), k=1)
    for i, j in zip(*np.nonzero(crossing)):
        if segments[i][0] == segments[j][0] and abs(segments[i][1] - segments[j][1]) <= 2:
            continue  # neighbouring segments of one piece: a turn, not a crossing
        first = lifts[i][0] + t[i, j] * (lifts[i][1] - lifts[i][0])
        second = lifts[j][0] + u[i, j] * (lifts[j][1] - lifts[j][0])
        found.append((first, second))
    kept, points = [], []
    for first, second in found:
        if all(np.linalg.norm(first[n:] - p) > 1e-3 * diagonal for p in points):
            kept.append((first, second))
            points.append(first[n:])
    nodes = [_node_point(incidence, first, second, n, reach, span) for first, second in kept]
    return [node for node in nodes if node is not None]


def _distinct(points, radius):
    kept = []
    for point in points:
        if all(np.linalg.norm(point - k) > radius for k in kept):
            kept.append(point)
    return kept


class SingularIncidence:
    """G = (F, the c x c minors of J_x F) as real polynomials in (x, p), ready for Newton refinement.

    One place for the refinement of special points of the discriminant curve, whatever the members' dimension:
    for square members G = (F, det J_x F); for members that are curves (more unknowns than equations) all the
    minors, and the refining systems below are overdetermined but consistent (solved by Gauss-Newton, which
    converges quadratically to a solution where the Jacobian has full column rank).

    * cusp: {G = 0, J_x G v = 0, c . v = 1} in (x, p, v) (the tangent of S has no p-part: a vector v in x alone
      is tangent to S; for square members J_x G v = 0 reads J_x F v = 0, grad_x det . v = 0);
    * node: {G(x_1, p) = 0, G(x_2, p) = 0} in (x_1, x_2, p), x_1 != x_2.

    Parameters
    ----------
    family : Family
        Two parameters.
    codimension : int
    max_exact_minors : int
        The minors are all expanded (real) when there are at most this many; otherwise :meth:`of` gives None.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> cubic = Family(parse_system(["x^3 + p*x + q"], ["x", "p", "q"]), ("p", "q"))
    >>> incidence = SingularIncidence.of(cubic, 1, 24)
    >>> cusp = incidence.refined_cusp(np.array([0.01, -0.02, 0.01]), reach=0.5)
    >>> cusp.refined, bool(np.abs(cusp.point).max() < 1e-8)
    (True, True)
    """

    def __init__(self, incidence, n, codimension):
        self.n = n
        self.codimension = codimension
        self.polynomials = [p.numeric() for p in incidence.polynomials]
        self.values_of = BatchEvaluator(self.polynomials)
        # the rows of J_x G, one polynomial per entry, with their own derivatives in (x, p) for the cusp's Newton
        self.rows_of = BatchEvaluator([p.derivative(j) for p in self.polynomials for j in range(n)])

    @classmethod
    def of(cls, family, codimension, max_exact_minors):
        """The incidence of a family, or None when its minors are not all expanded with real coefficients."""
        n = family.n_variables
        try:
            # the generator is only drawn from for random combinations of minors, which are refused below
            incidence, _ = minors_system(family.system, codimension, np.random.default_rng(0), max_exact_minors,
                                         n_columns=n)
        except LimitError:
            return None
        if not incidence.has_real_coefficients:
            return None
        return cls(incidence, n, codimension)

    def _evaluate(self, evaluator, z):
        values, jacobian = evaluator.evaluate(np.asarray(z, dtype=complex)[None, :])
        return values[0].real, jacobian[0].real

    def refined_cusp(self, start, reach=None):
        """Newton from a traced point (x, p) of S near a cusp of the projection.

        Parameters
        ----------
        start : ndarray, shape (n + 2,)
        reach : float, optional
            Largest accepted move in p (default 5 % of 1 + |p|: the traced accuracy of the curve tracer).

        Returns
        -------
        CurvePoint
        """
        n = self.n
        rows = len(self.polynomials)
        _, jacobian = self._evaluate(self.values_of, start)
        vector = np.linalg.svd(jacobian[:, :n])[2][-1]
        normal = vector.copy()  # c with c . v = 1 at the start

        def residual_and_jacobian(z):
            x_p, v = z[:n + 2], z[n + 2:]
            g, g_j = self._evaluate(self.values_of, x_p)
            j, j_j = self._evaluate(self.rows_of, x_p)
            matrix = j.reshape(rows, n)
            second = j_j.reshape(rows, n, n + 2)  # d(dG_i/dx_k)/dz_l
            values = np.concatenate([g, matrix @ v, [normal @ v - 1.0]])
            top = np.hstack([g_j, np.zeros((rows, n))])
            middle = np.hstack([np.einsum("ikl,k->il", second, v), matrix])
            last = np.concatenate([np.zeros(n + 2), normal])[None, :]
            return values, np.vstack([top, middle, last])

        z, converged = _newton(residual_and_jacobian, np.concatenate([start, vector]))
        moved = np.linalg.norm(z[n:n + 2] - start[n:])
        limit = 0.05 * (1 + np.linalg.norm(start[n:])) if reach is None else reach
        good = bool(converged and moved <= limit)
        return CurvePoint.found(CurvePointKind.CUSP, (z if good else start)[n:n + 2], good)

    def refined_node(self, first, second, reach=None, span=None):
        """Newton on {G(x_1, p) = 0, G(x_2, p) = 0} from a traced crossing (two lifts (x, p) of one p).

        Parameters
        ----------
        first, second : ndarray
            The lifts (x, p).
        reach : float, optional
        span : ndarray, optional
            The box's size per parameter (the units in which p is moved to test that the node is isolated).

        Returns
        -------
        CurvePoint or None
            Not ``refined`` when Newton fails, the two points meet, or p moves further than ``reach``; None when
            the node system's solutions through it form a curve (an arc of the discriminant covered twice by S:
            no node).
        """
        n = self.n
        rows = len(self.polynomials)

        def residual_and_jacobian(z):
            one, two, p = z[:n], z[n:2 * n], z[2 * n:]
            values, jacobians = self.values_of.evaluate(np.array([np.concatenate([one, p]), np.concatenate([two, p])],
                                                                 dtype=complex))
            values, jacobians = values.real, jacobians.real
            matrix = np.zeros((2 * rows, 2 * n + 2))
            matrix[:rows, :n] = jacobians[0][:, :n]
            matrix[rows:, n:2 * n] = jacobians[1][:, :n]
            matrix[:rows, 2 * n:] = jacobians[0][:, n:]
            matrix[rows:, 2 * n:] = jacobians[1][:, n:]
            return np.concatenate([values[0], values[1]]), matrix

        start = np.concatenate([first[:n], second[:n], 0.5 * (first[n:] + second[n:])])
        z, converged = _newton(residual_and_jacobian, start)
        apart = np.linalg.norm(z[:n] - z[n:2 * n]) > 1e-6 * (1 + np.linalg.norm(z[:n]))
        moved = np.linalg.norm(z[2 * n:] - start[2 * n:])
        limit = 0.05 * (1 + np.linalg.norm(start[2 * n:])) if reach is None else reach
        good = bool(converged and apart and moved <= limit)
        if good and self._node_continues(residual_and_jacobian, z, span):
            # not a point at all: every member along this arc has the two singular points (the arc is covered
            # twice by S; x^2 + y^2 = a, y = x^2 + b along a + b = -1/4, with x and -x), and the two lifts'
            # traced polylines, lying on one another, "cross" anywhere (decision 0092)
            return None
        return CurvePoint.found(CurvePointKind.NODE, z[2 * n:] if good else start[2 * n:], good)

    def _node_continues(self, residual_and_jacobian, z, span):
        """Whether the node system's solution through ``z`` goes on along a curve (the arc is covered twice by S).

        A node is an isolated solution of {G(x_1, p) = 0, G(x_2, p) = 0}. Along the null direction of its Jacobian
        (columns scaled: unit-free), p is moved by 1e-3 of the box (``span`` per parameter) and pinned there on a
        hyperplane; if Newton still solves the system there with the two points apart, the solutions form a curve.
        At a node (transversal or tangential) there is no solution off it: Newton's residual stays of the step's
        size (or its square), far above the tolerance.
        """
        n = self.n
        span = np.ones(len(z) - 2 * n) if span is None else np.asarray(span, dtype=float)
        _, jacobian = residual_and_jacobian(z)
        columns = np.linalg.norm(jacobian, axis=0)
        columns[columns == 0] = 1.0
        null = np.linalg.svd(jacobian / columns[None, :])[2][-1] / columns
        direction = null[2 * n:] / span  # in units of the box
        if not np.linalg.norm(direction) > 0:
            return False
        null = null / np.linalg.norm(direction)
        target = z + 1e-3 * null
        normal = null[2 * n:] / span ** 2  # the hyperplane through target, normal to the step in the box's units

        def pinned(w):
            values, matrix = residual_and_jacobian(w)
            row = np.concatenate([np.zeros(2 * n), normal])
            return np.concatenate([values, [normal @ (w[2 * n:] - target[2 * n:])]]), np.vstack([matrix, row])

        moved, converged = _newton(pinned, target)
        apart = np.linalg.norm(moved[:n] - moved[n:2 * n]) > 1e-6 * (1 + np.linalg.norm(moved[:n]))
        return bool(converged and apart)


    def _second_derivatives(self):
        """The rows of the full Jacobian of G (in x and p), one polynomial per entry, ready to evaluate."""
        if not hasattr(self, "_gradients_of"):
            self._gradients_of = BatchEvaluator([p.derivative(j) for p in self.polynomials for j in range(self.n + 2)])
        return self._gradients_of

    def fold_point(self, start, direction, reach):
        """A fold of the projection towards lines along ``direction``, sought from a point (x, p) of S.

        A fold is a smooth point of S whose tangent's p-part is along the lines (a critical point of the
        p-coordinate across them): Gauss-Newton on {G = 0, J G v = 0, m . v_p = 0, c . v = 1} in (x, p, v), v in
        (x, p), m the lines' normal. A cusp (v_p = 0) solves it too: the caller tells them apart.

        Returns
        -------
        ndarray, shape (n + 2,), or None
            The point (x, p), or None when Newton fails or p moves further than ``reach``.

        Examples
        --------
        >>> from numag.system.parse import parse_system
        >>> circle = Family(parse_system(["x^2 + a^2 + b^2 - 1"], ["x", "a", "b"]), ("a", "b"))
        >>> start = np.array([0.0, 0.6, 0.8])   # on the circle a^2 + b^2 = 1 (x = 0)
        >>> fold = SingularIncidence.of(circle, 1, 24).fold_point(start, np.array([1.0, 0.0]), 1.0)
        >>> np.round(fold, 10).tolist()   # the top of the circle: the tangent along a
        [0.0, 0.0, 1.0]
        """
        n, size = self.n, self.n + 2
        rows = len(self.polynomials)
        gradients = self._second_derivatives()
        normal = np.array([-direction[1], direction[0]], dtype=float)
        start = np.asarray(start, dtype=float)
        _, jacobian = self._evaluate(self.values_of, start)
        vector = np.linalg.svd(jacobian)[2][-1]
        scale = vector.copy()

        def residual_and_jacobian(z):
            point, v = z[:size], z[size:]
            g, g_j = self._evaluate(self.values_of, point)
            j, j_j = self._evaluate(gradients, point)
            matrix = j.reshape(rows, size)
            second = j_j.reshape(rows, size, size)
            values = np.concatenate([g, matrix @ v, [normal @ v[n:], scale @ v - 1.0]])
            top = np.hstack([g_j, np.zeros((rows, size))])
            middle = np.hstack([np.einsum("ikl,k->il", second, v), matrix])
            across = np.concatenate([np.zeros(size + n), normal])[None, :]
            last = np.concatenate([np.zeros(size), scale])[None, :]
            return values, np.vstack([top, middle, across, last])

        z, converged = _newton(residual_and_jacobian, np.concatenate([start, vector]))
        if not converged or np.linalg.norm(z[n:size] - start[n:]) > reach:
            return None
        return z[:size]

    def refined_meeting(self, start, reach):
        """Gauss-Newton from a singular point of the traced S onto {G = 0, w^T J G = 0, c . w = 1} in (x, p, w).

        Where two components of S meet (or S is otherwise singular) the rank of J G drops: a left null vector w
        exists. Converges quadratically where the meeting is an ordinary one (distinct tangents of S).

        Returns
        -------
        CurvePoint
            MEETING when converged within ``reach`` (in p) of the start, else UNDECIDED.

        Examples
        --------
        >>> from numag.system.parse import parse_system
        >>> cubic = Family(parse_system(["x^3 + a*x^2 + b"], ["x", "a", "b"]), ("a", "b"))
        >>> meeting = SingularIncidence.of(cubic, 1, 24).refined_meeting(np.array([1e-4, -2e-4, 1e-5]), 0.1)
        >>> meeting.kind.value, bool(np.abs(meeting.point).max() < 1e-10)
        ('meeting', True)
        """
        n, size = self.n, self.n + 2
        rows = len(self.polynomials)
        gradients = self._second_derivatives()
        _, jacobian = self._evaluate(self.values_of, start)
        left = np.linalg.svd(jacobian)[0][:, -1]
        scale = left.copy()

        def residual_and_jacobian(z):
            point, w = z[:size], z[size:]
            g, g_j = self._evaluate(self.values_of, point)
            j, j_j = self._evaluate(gradients, point)
            matrix = j.reshape(rows, size)
            second = j_j.reshape(rows, size, size)
            values = np.concatenate([g, w @ matrix, [scale @ w - 1.0]])
            top = np.hstack([g_j, np.zeros((rows, rows))])
            middle = np.hstack([np.einsum("ikl,i->kl", second, w), matrix.T])
            last = np.concatenate([np.zeros(size), scale])[None, :]
            return values, np.vstack([top, middle, last])

        z, converged = _newton(residual_and_jacobian, np.concatenate([start, left]))
        moved = np.linalg.norm(z[n:size] - start[n:])
        good = bool(converged and moved <= reach)
        return CurvePoint.found(CurvePointKind.MEETING, z[n:size] if good else start[n:], good)


def classify_join(incidence, lift, ends, n, reach):
    """A join of two arc ends on one trace line: a refined cusp, nothing (a fold), or an UNDECIDED candidate.

    The join's middle is not a point of the curve (its two ends are): Newton decides. A cusp refined from the
    middle within ``reach`` is reported. Else a fold is sought from each end (:meth:`SingularIncidence.fold_point`,
    within ``reach`` beyond the join's length, the lines along the join); a fold found is a cusp if the cusp's
    Newton converges from it, else nothing is reported. What is neither is UNDECIDED.

    Parameters
    ----------
    incidence : SingularIncidence or None
    lift : ndarray, shape (n + 2,)
        Mean x of the two ends, middle of the join in p.
    ends : ndarray, shape (2, n + 2)
        The two ends (points of S).
    n : int
    reach : float

    Returns
    -------
    CurvePoint or None

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> circle = SingularIncidence.of(Family(parse_system(["x^2 + a^2 + b^2 - 1"], ["x", "a", "b"]), ("a", "b")), 1, 24)
    >>> ends = np.array([[0.0, -0.6, 0.8], [0.0, 0.6, 0.8]])   # a chord of the circle, below its top
    >>> print(classify_join(circle, ends.mean(axis=0), ends, 1, 0.5))
    None
    """
    lift, ends = np.asarray(lift, dtype=float), np.asarray(ends, dtype=float)
    if incidence is None:
        return CurvePoint.found(CurvePointKind.CUSP, lift[n:], False)
    cusp = incidence.refined_cusp(lift, reach)
    if cusp.refined:
        return cusp
    chord = ends[1, n:] - ends[0, n:]
    length = float(np.linalg.norm(chord))
    if length > 0:
        for end in ends:
            fold = incidence.fold_point(end, chord / length, reach + length)
            if fold is None:
                continue
            # a cusp also has a tangent with no p-part across the lines: the cusp's own Newton tells
            at_fold = incidence.refined_cusp(fold, reach)
            return at_fold if at_fold.refined else None
    return cusp


def meeting_points(incidence, curve, n, low, high):
    """The images of the singular vertices of the traced S inside the box (low, high), refined.

    Parameters
    ----------
    incidence : SingularIncidence
    curve : RealCurve
        The trace of S in (x, p).
    low, high : ndarray, shape (2,)

    Returns
    -------
    list of CurvePoint
    """
    diagonal = float(np.linalg.norm(high - low))
    found = []
    for vertex, kind in zip(curve.vertices, curve.vertex_kinds):
        if kind != VertexKind.SINGULAR or not np.all((vertex[n:] >= low) & (vertex[n:] <= high)):
            continue
        # the tracer knows a singular point of multiplicity k to about eps^(1/k): Newton may move it that far
        point = incidence.refined_meeting(np.asarray(vertex, dtype=float), 1e-3 * diagonal)
        if all(np.linalg.norm(point.point - f.point) > 1e-6 * diagonal for f in found):
            found.append(point)
    return found


def clipped(arcs, low, high):
    """The polylines cut to the box (low, high): the pieces inside, ending on its boundary, and their arc indices.

    The box bounds the last ``len(low)`` columns (the parameters of lifts (x, p)); an end on the boundary is
    interpolated on the segment that leaves the box, with its bounded coordinate set to the bound exactly.

    Examples
    --------
    >>> pieces, sources = clipped([np.array([[0.0, 0.0], [2.0, 0.0], [2.0, 2.0]])], np.zeros(2), np.ones(2))
    >>> [p.tolist() for p in pieces], sources
    ([[[0.0, 0.0], [1.0, 0.0]]], [0])
    """
    pieces, sources = [], []
    for number, arc in enumerate(arcs):
        inside = np.all((arc[:, -len(low):] >= low) & (arc[:, -len(low):] <= high), axis=1)
        current = []
        for k in range(len(arc)):
            if inside[k]:
                if not current and k > 0:
                    current.append(_boundary(arc[k], arc[k - 1], low, high))
                current.append(arc[k])
                continue
            if current:
                current.append(_boundary(arc[k - 1], arc[k], low, high))
                pieces.append(np.array(current))
                sources.append(number)
                current = []
        if current:
            pieces.append(np.array(current))
            sources.append(number)
    keep = [k for k, piece in enumerate(pieces) if len(piece) >= 2]
    return [pieces[k] for k in keep], [sources[k] for k in keep]


def _boundary(inside, outside, low, high):
    """Where the segment from a point inside the box to one outside leaves it (bounds on the last columns)."""
    step = outside - inside
    tail = slice(len(inside) - len(low), len(inside))
    with np.errstate(divide="ignore", invalid="ignore"):
        limits = np.where(step[tail] > 0, (high - inside[tail]) / step[tail],
                          np.where(step[tail] < 0, (low - inside[tail]) / step[tail], np.inf))
    axis = int(np.argmin(limits))
    point = inside + min(1.0, float(limits[axis])) * step
    if limits[axis] <= 1.0:
        point[tail.start + axis] = high[axis] if step[tail][axis] > 0 else low[axis]
    return point


def snapped_ends(incidence, lift, low, high):
    """A clipped lift (x, p) with its ends on the box's boundary moved onto S along the boundary.

    An end cut from a chord lies off the curve by the chord's sag; Gauss-Newton on G with the bounded
    coordinate held puts it back, when it converges within the last step. Ends it does not are kept.

    Parameters
    ----------
    incidence : SingularIncidence or None
    lift : ndarray, shape (P, n + 2)
    low, high : ndarray, shape (2,)

    Returns
    -------
    ndarray, shape (P, n + 2)
    """
    lift = np.array(lift, dtype=float)
    if incidence is None or len(lift) < 2:
        return lift
    n = incidence.n
    for end, neighbour in ((0, 1), (-1, -2)):
        on_bound = np.nonzero((lift[end, n:] == low) | (lift[end, n:] == high))[0]
        if len(on_bound) != 1:
            continue
        held = n + int(on_bound[0])
        free = [k for k in range(n + 2) if k != held]

        def residual_and_jacobian(z, start=lift[end]):
            point = start.copy()
            point[free] = z
            values, jacobian = incidence._evaluate(incidence.values_of, point)
            return values, jacobian[:, free]

        z, converged = _newton(residual_and_jacobian, lift[end, free])
        step = np.linalg.norm(lift[end] - lift[neighbour])
        if converged and np.linalg.norm(z - lift[end, free]) <= step:
            lift[end, free] = z
    return lift


#: The system of two singular points over one parameter value is solved when its total degree is at most this
#: (x^4 + a x^2 + b x + 1: 144; a four-bar with two free lengths: 5,184, left out).
MAX_PAIR_PATHS = 2000


def _embedded(polynomial, columns, size):
    """The polynomial with its variable j moved to position ``columns[j]`` of ``size`` variables."""
    exponents = np.zeros((polynomial.n_terms, size), dtype=np.int64)
    exponents[:, columns] = polynomial.exponents
    return Polynomial(exponents, polynomial.numeric_coefficients(), size)


def conjugate_pair_points(incidence, rng, max_paths=MAX_PAIR_PATHS):
    """Isolated real points of the discriminant: real p whose member is singular at a conjugate pair x, conj(x) only.

    A real member singular at a non-real point x is singular at conj(x) too: two conditions on p, so such values
    are isolated points of the real plane, off the real curve of S that the tracers follow. They are among the
    solutions of the square system {G(x_1, p) = 0, G(x_2, p) = 0} in (x_1, x_2, p), G = (F, the minors of J_x)
    with the minors replaced by n + 1 - c real random combinations (solutions of the combinations off S are
    dropped by the check of all minors). The diagonal x_1 = x_2 is a curve of solutions, never isolated; the real
    p with x_2 = conj(x_1) not real are kept unless the same member also has a real singular point (then p lies
    on a real arc).

    Parameters
    ----------
    incidence : SingularIncidence
    rng : numpy.random.Generator
    max_paths : int
        Skip (return None) when the system's total degree is larger.

    Returns
    -------
    list of ndarray, shape (2,), or None
        The points, sorted; None when not searched (too many paths).
    dict
        Tracked paths by status.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> quartic = Family(parse_system(["x^4 + a*x^2 + b*x + 1"], ["x", "a", "b"]), ("a", "b"))
    >>> points, _ = conjugate_pair_points(SingularIncidence.of(quartic, 1, 24), np.random.default_rng(1))
    >>> np.round(np.array(points), 8).tolist()   # the member (x^2 + 1)^2
    [[2.0, 0.0]]
    """
    n, c = incidence.n, incidence.codimension
    equations, minors = incidence.polynomials[:c], incidence.polynomials[c:]
    if len(minors) > n + 1 - c:
        minors = _real_combinations(minors, n + 1 - c, rng)
    per_copy = equations + minors
    size = 2 * n + 2
    first = list(range(n)) + [2 * n, 2 * n + 1]
    second = list(range(n, 2 * n)) + [2 * n, 2 * n + 1]
    polynomials = [_embedded(p, first, size) for p in per_copy] + [_embedded(p, second, size) for p in per_copy]
    if math.prod(p.degree for p in polynomials) > max_paths:
        return None, {}
    names = [f"u{k + 1}" for k in range(2 * n)] + ["p1", "p2"]
    solved = solve_system(PolynomialSystem(names, polynomials, name="two singular points"),
                          seed=int(rng.integers(2 ** 63)))
    points = np.array([s.point for s in solved.solutions if s.isolated], dtype=complex).reshape(-1, size)
    found = []
    if len(points):
        p = points[:, 2 * n:]
        real_p = np.all(np.abs(p.imag) <= REAL_TOLERANCE * (1 + np.abs(p)), axis=1)
        full = np.array([incidence.values_of.evaluate(np.hstack([points[:, :n], p]), jacobian=False),
                         incidence.values_of.evaluate(np.hstack([points[:, n:2 * n], p]), jacobian=False)])
        on_s = np.all(np.linalg.norm(full, axis=2) <= 1e-8 * (1 + np.linalg.norm(points, axis=1)), axis=0)

        def real(x):
            return np.all(np.abs(x.imag) <= REAL_TOLERANCE * (1 + np.abs(x)), axis=1)

        one, two = points[:, :n], points[:, n:2 * n]
        scale = 1 + np.linalg.norm(one, axis=1)
        conjugate = (np.linalg.norm(two - one.conj(), axis=1) <= 1e-6 * scale) & ~real(one)
        real_singular = real_p & on_s & (real(one) | real(two))
        for k in np.nonzero(real_p & on_s & conjugate)[0]:
            value = p[k].real
            same = np.linalg.norm(p.real - value, axis=1) <= 1e-6 * (1 + np.linalg.norm(value))
            if np.any(same & real_singular):
                continue  # the member also has a real singular point: p lies on a real arc
            if all(np.linalg.norm(value - f) > 1e-6 * (1 + np.linalg.norm(value)) for f in found):
                found.append(value)
    found.sort(key=tuple)
    return found, solved.path_counts()


def _newton(residual_and_jacobian, start, iterations=30):
    """Gauss-Newton from ``start`` (real systems, square or overdetermined); the point and whether it converged."""
    z = np.array(start, dtype=float)
    for _ in range(iterations):
        values, jacobian = residual_and_jacobian(z)
        try:
            step = np.linalg.lstsq(jacobian, values, rcond=None)[0]
        except np.linalg.LinAlgError:
            return z, False
        z = z - step
        if not np.all(np.isfinite(z)):
            return start, False
        if np.linalg.norm(step) <= 1e-14 * (1 + np.linalg.norm(z)):
            break
    values, _ = residual_and_jacobian(z)
    return z, bool(np.linalg.norm(values) <= _NEWTON_TOLERANCE * (1 + np.linalg.norm(z)))


def _cusp_point(incidence, point, n, reach=None):
    """A cusp refined on the incidence, or at the traced position when there is none to refine on."""
    if incidence is None:
        return CurvePoint.found(CurvePointKind.CUSP, point[n:], False)
    return incidence.refined_cusp(np.asarray(point, dtype=float), reach)


def _node_point(incidence, first, second, n, reach=None, span=None):
    """A node refined on the incidence, or the middle of the traced crossing; None for an arc covered twice."""
    if incidence is None:
        return CurvePoint.found(CurvePointKind.NODE, 0.5 * (first[n:] + second[n:]), False)
    return incidence.refined_node(np.asarray(first, dtype=float), np.asarray(second, dtype=float), reach, span)


def strip_blocked(arcs, left, right):
    """The p_2-intervals spanned by the pieces of the polylines inside the strip left <= p_1 <= right.

    A connected piece inside the strip meets every horizontal segment across the strip at a height it
    spans, so these intervals (merged) are the heights where the strip cannot be crossed.

    Parameters
    ----------
    arcs : list of ndarray, shape (P, 2)
    left, right : float

    Returns
    -------
    list of (float, float)
        Sorted, disjoint.
    """
    intervals = []
    for arc in arcs:
        a, b = arc[:-1], arc[1:]
        dx = b[:, 0] - a[:, 0]
        with np.errstate(divide="ignore", invalid="ignore"):
            t_left = np.where(dx != 0, (left - a[:, 0]) / dx, np.where(a[:, 0] >= left, -np.inf, np.inf))
            t_right = np.where(dx != 0, (right - a[:, 0]) / dx, np.where(a[:, 0] <= right, np.inf, -np.inf))
        enter = np.maximum(0.0, np.minimum(t_left, t_right))
        leave = np.minimum(1.0, np.maximum(t_left, t_right))
        inside = enter <= leave
        for k in np.nonzero(inside)[0]:
            y0 = a[k, 1] + enter[k] * (b[k, 1] - a[k, 1]) if math.isfinite(enter[k]) else a[k, 1]
            y1 = a[k, 1] + leave[k] * (b[k, 1] - a[k, 1]) if math.isfinite(leave[k]) else b[k, 1]
            intervals.append((float(min(y0, y1)), float(max(y0, y1))))
    intervals.sort()
    merged = []
    for low, high in intervals:
        if merged and low <= merged[-1][1]:
            merged[-1] = (merged[-1][0], max(merged[-1][1], high))
        else:
            merged.append((low, high))
    return merged


def _free(low, high, blocked, tolerance):
    """Whether (low, high) minus the blocked intervals keeps a piece longer than the tolerance."""
    position = low
    for b_low, b_high in blocked:
        if b_high <= position:
            continue
        if b_low >= high:
            break
        if b_low - position > tolerance:
            return True
        position = max(position, b_high)
    return high - position > tolerance


#: Pixels on each side of the raster the reach box is cut into by the traced arcs (decision 0087): a pixel is
#: 1/400 of the reach box, 1/200 of the [ranges] box.
_RASTER = 400
#: Half the width of a drawn arc, in pixels: 8-connected strokes this wide leave no 4-connected leak.
_WALL = 1.5
#: A dangling arc end is bridged to the nearest other arc within this part of the reach box (a trace step or a
#: line spacing left open at a fold): a bridge can only keep pieces apart, never join them.
_BRIDGE = 0.1


@dataclass
class CellMerge:
    """Result of :func:`merge_cells`.

    Attributes
    ----------
    regions : list of PlaneRegion
        Regions of the reach box (the [ranges] box and half its size around it, where the curve is traced).
    conflicts : int
        Pairs of neighbouring cells, or pieces between the arcs, holding cells that the traced curve does not
        separate but whose counts differ (the trace missed an arc
        there, e.g. real discriminant points over non-real singular points); they were kept apart.
    beyond : int
        Cells wholly outside the reach box, in no region (the curve is not known there).
    unmet : int
        Pieces of the [ranges] box between the traced arcs that no line crosses: regions whose count is unknown.
    """

    regions: list
    conflicts: int = 0
    beyond: int = 0
    unmet: int = 0

    def notes(self):
        """What the regions cannot say, as sentences for the discriminant's notes."""
        notes = []
        if self.conflicts:
            notes.append(f"In {counted(self.conflicts, 'place')} cells that the traced curve does not separate have "
                         "different counts: the trace misses an arc there (real discriminant points over non-real "
                         "singular points are not traced); those cells were kept apart.")
        if self.beyond:
            notes.append(f"{counted(self.beyond, 'cell')} {'lies' if self.beyond == 1 else 'lie'} wholly beyond half "
                         "the box around it, where the curve is not traced: in no region of the plane.")
        if self.unmet:
            verb = "is" if self.unmet == 1 else "are"
            notes.append(f"{counted(self.unmet, 'piece')} of the box between the traced arcs {verb} crossed by no "
                         "line: a region (or a part of one) whose count is not known; more --lines would sample it.")
        counts = [(r.count.solutions, r.count.branches) for r in self.regions]
        if len(set(counts)) < len(counts):
            # cells join where the traced arcs leave a passage; a passage narrower than the raster or a region
            # narrower than the line spacing (the horn next to a cusp) can leave one region in pieces
            notes.append("Regions with the same count may be pieces of one region: cells are joined where the "
                         "traced arcs leave a passage between them, so the number of regions is an upper bound.")
        return notes


def _segments_drawn(arcs, low, high, resolution):
    """Walls: the pixels within :data:`_WALL` of the polylines (coordinates scaled to the unit square)."""
    walls = np.zeros((resolution, resolution), dtype=bool)
    scale = (resolution - 1) / (high - low)
    step = 0.5  # samples per pixel along a segment: no pixel the segment passes is skipped
    for arc in arcs:
        if len(arc) < 2:
            continue
        a, b = (arc[:-1] - low) * scale, (arc[1:] - low) * scale
        lengths = np.linalg.norm(b - a, axis=1)
        counts = np.maximum(1, np.ceil(lengths / step).astype(int)) + 1
        which = np.repeat(np.arange(len(a)), counts)
        t = np.concatenate([np.linspace(0.0, 1.0, c) for c in counts])
        points = a[which] + t[:, None] * (b[which] - a[which])
        reach = int(math.ceil(_WALL))
        for di in range(-reach, reach + 1):
            for dj in range(-reach, reach + 1):
                if di * di + dj * dj > _WALL * _WALL + 0.5:
                    continue
                i = np.rint(points[:, 0]).astype(int) + di
                j = np.rint(points[:, 1]).astype(int) + dj
                keep = (i >= 0) & (i < resolution) & (j >= 0) & (j < resolution)
                walls[i[keep], j[keep]] = True
    return walls


def _bridges(arcs, low, high):
    """Segments from each arc end inside the box that touches nothing to the nearest point of another arc."""
    span = high - low
    unit = [(arc - low) / span for arc in arcs if len(arc) >= 2]
    near = 2.0 / _RASTER
    bridges = []
    for k, arc in enumerate(unit):
        others = [u for m, u in enumerate(unit) if m != k]
        for end, far in ((arc[0], arc[-1]), (arc[-1], arc[0])):
            if np.any(end <= near) or np.any(end >= 1 - near):
                continue  # cut at the reach box: nothing lies beyond
            candidates = np.vstack(others + [far[None, :]])
            distance = np.linalg.norm(candidates - end, axis=1)
            nearest = int(np.argmin(distance))
            if near < distance[nearest] <= _BRIDGE:
                bridges.append(np.vstack([end, candidates[nearest]]) * span + low)
    return bridges


def _pieces_of(arcs, low, high):
    """Label of every pixel of the reach box: the 4-connected pieces between the arcs (0 on the arcs)."""
    from scipy import ndimage  # imported where used: `import numag` stays fast

    walls = _segments_drawn(list(arcs) + _bridges(arcs, low, high), low, high, _RASTER)
    labels, _ = ndimage.label(~walls)
    return labels


def _piece_of_cell(labels, cell, low, high):
    """The one piece the middle half of a cell (clipped to the reach box) lies in, or None (none or several)."""
    bottom, top = max(cell.low, low[1]), min(cell.high, high[1])
    if not low[0] <= cell.line <= high[0] or top <= bottom:
        return None
    heights = bottom + (top - bottom) * np.linspace(0.25, 0.75, 9)
    scale = (_RASTER - 1) / (high - low)
    i = int(np.rint((cell.line - low[0]) * scale[0]))
    j = np.rint((heights - low[1]) * scale[1]).astype(int)
    found = set(labels[i, j].tolist()) - {0}
    return found.pop() if len(found) == 1 else None


def _pieces_in_box(labels, low, high, box_low, box_high):
    """The labels of the pieces that meet the [ranges] box."""
    scale = (_RASTER - 1) / (high - low)
    i0, j0 = np.ceil((box_low - low) * scale).astype(int)
    i1, j1 = np.floor((box_high - low) * scale).astype(int)
    return set(np.unique(labels[i0:i1 + 1, j0:j1 + 1]).tolist()) - {0}


def merge_cells(cells, curve):
    """Regions of the plane: cells joined where the traced curve does not separate them.

    Two joins, both only between cells of equal counts: cells on neighbouring lines where the strip between
    them is crossable (intervals the arcs leave free), and cells whose middles lie in one piece of the reach
    box cut by the arcs (a flood fill of a raster, :data:`_RASTER` pixels a side), which joins cells of lines
    that are not neighbours and around arcs that end between two lines. A piece holding cells of different
    counts leaks (an arc the trace missed): it joins nothing.

    Parameters
    ----------
    cells : list of Region
        Intervals of p_2 on lines p_1 = ``line`` (from :mod:`numag.families.discriminant`).
    curve : DiscriminantCurve

    Returns
    -------
    CellMerge

    Examples
    --------
    >>> from numag.families.discriminant import Region
    >>> circle = np.column_stack([np.cos(np.linspace(0, 2 * np.pi, 60)), np.sin(np.linspace(0, 2 * np.pi, 60))])
    >>> curve = DiscriminantCurve([circle], (np.array([-2.0, -2.0]), np.array([2.0, 2.0])), [], 0, [])
    >>> inside, outside = RealCount(2, None, 0), RealCount(0, None, 0)
    >>> cells = [Region(-np.inf, np.inf, np.array([-1.5, 0.0]), outside, -1.5),
    ...          Region(-np.inf, -0.8, np.array([0.0, -2.0]), outside, 0.0),
    ...          Region(-0.8, 0.8, np.array([0.0, 0.0]), inside, 0.0),
    ...          Region(0.8, np.inf, np.array([0.0, 2.0]), outside, 0.0)]
    >>> sorted(sorted(r.cells) for r in merge_cells(cells, curve).regions)
    [[0, 1, 3], [2]]
    """
    low, high = curve.box
    span = high - low
    reach_low, reach_high = reach_box(low, high)
    # the trace reaches half the box beyond it; unbounded cells end there
    floor, ceiling = reach_low[1], reach_high[1]
    # the polyline's chords stray from the curve by up to about a trace step (1/200 of the box diagonal):
    # a passage narrower than 1/100 of the box's height is not trusted, and the cells stay apart (the safe side)
    tolerance = 0.01 * span[1]
    lines = sorted({c.line for c in cells})
    inside = [k for k, c in enumerate(cells) if c.low < ceiling and c.high > floor]
    joined = []  # pairs of cells of one region
    conflicts = 0
    by_line = {line: [k for k in inside if cells[k].line == line] for line in lines}

    def count(k):
        return cells[k].count.solutions, cells[k].count.branches

    labels = _pieces_of(curve.arcs, reach_low, reach_high)
    piece_of = {k: _piece_of_cell(labels, cells[k], reach_low, reach_high) for k in inside}
    for left, right in zip(lines[:-1], lines[1:]):
        blocked = strip_blocked(curve.arcs, left, right)
        for i in by_line[left]:
            for j in by_line[right]:
                a, b = cells[i], cells[j]
                overlap_low = max(a.low, b.low, floor)
                overlap_high = min(a.high, b.high, ceiling)
                if overlap_high <= overlap_low or not _free(overlap_low, overlap_high, blocked, tolerance):
                    continue
                if count(i) == count(j):
                    joined.append((i, j))
                elif piece_of[i] is None or piece_of[i] == piece_of[j]:
                    # a coarse polygon's chord can open a passage the curve does not have; the flood fill,
                    # which looks at the cells' middles, then sees them apart and this is no conflict
                    conflicts += 1
    in_piece = {}
    for k in inside:
        if piece_of[k] is not None:
            in_piece.setdefault(piece_of[k], []).append(k)
    for members in in_piece.values():
        if len({count(k) for k in members}) == 1:
            joined += [(members[0], k) for k in members[1:]]
        else:
            conflicts += 1
    unmet = len(_pieces_in_box(labels, reach_low, reach_high, low, high) - set(in_piece))
    region_of = connected_components(len(cells), joined)
    regions = {}
    for k in inside:
        regions.setdefault(int(region_of[k]), []).append(k)

    def width(k):
        cell = cells[k]
        return min(cell.high, ceiling) - max(cell.low, floor)

    result = []
    for members in regions.values():
        widest = max(members, key=width)
        result.append(PlaneRegion(members, cells[widest].sample.copy(), cells[widest].count))
    result.sort(key=lambda r: (tuple(r.sample)))
    return CellMerge(result, conflicts, len(cells) - len(inside), unmet)
