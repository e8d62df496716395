"""Two parameters, met on lines: the real discriminant curve and the cells of the plane from one sweep.

For a family whose members are curves (a linkage with two free lengths) the incidence set S in (x, p)
has more equations than unknowns, and tracing its real curve was measured far too slow (decision 0054:
a four-bar with two free lengths was not traced after 15 minutes). Here the discriminant is met on lines
of the parameter plane. On the line p = o + t d the null-vector system

    F(x, o + t d) = 0,   lambda^T A J_x F(x, o + t d) B = 0,   b . lambda = 1

(:func:`numag.singular.isolated.null_vector_system` with the columns of x only)
is square in (x, lambda, t); its solutions are the singular points of the members on the line, and their
real t are the line's real discriminant points (also those over non-real singular points). With (o, d)
as the four parameters of one family every line is one member, and one sweep solves all lines together.

* **Trace** (:func:`discriminant_on_lines`): parallel lines in a random real direction across the box;
  each real point is moved along the real segment (gamma = 1: the continuation of the real curve) to the
  next line and linked to the real point it reaches. A point where several paths meet (a double line of
  the discriminant, such as a length 0 of a linkage) cannot be moved in double precision: it is linked to
  the nearest such point of the next line. Two arc ends on one line whose moves were lost (the real pair
  turned complex: a fold of the curve between the lines) and that are neighbours on the line are joined.
  Chains of links are the polylines.
* **Multiple components** (a double line such as a length 0 that enters squared, where the member splits):
  every line meets them in multiple solutions of the line system, which the sweep drops. The multiple
  solutions of the sweep's start member are moved to every line on the line system deflated once and
  squared by random combinations (:func:`_deflated`), kept where the unsquared equations hold; their real
  points are traced and cut the cells like the others, and their arcs are flagged.
* **Cells**: the real points on vertical lines p_1 = v cut each line into intervals (the caller counts
  one sample per interval, all in one call).

Examples
--------
>>> from numag.system.parse import parse_system
>>> from numag.system.family import Family
>>> circle = Family(parse_system(["x^2 + y^2 - r - s"], ["x", "y", "r", "s"]), ("r", "s"))
>>> found = discriminant_on_lines(circle, 1, ((-1.0, -1.0), (1.0, 1.0)), [0.0], 12, np.random.default_rng(1))
>>> [np.round(cuts, 8).tolist() for _, cuts in found.cuts]   # r + s = 0 meets r = 0 at s = 0
[[0.0]]
"""

from dataclasses import dataclass, field
import math

import numpy as np

from ..system.family import Family
from ..system.polynomial import Polynomial, PolynomialSystem
from ..system.display import counted
from ..numeric.cluster import cluster_labels, connected_components, groups
from ..numeric.evaluate import BatchEvaluator
from ..tracking.tracker import TrackerOptions
from ..singular.isolated import null_vector_system
from .records import REAL_TOLERANCE, PointKind
from .plane import CurvePoint, CurvePointKind
from .sweep import SweepOptions, move_points, sweep

__all__ = ["LineDiscriminant", "line_family", "discriminant_on_lines", "CrossingCircle"]

#: Real t values of one line closer than this (relative) are one discriminant point: a double root of the
#: line's discriminant is known to about the square root of the precision.
_SAME_T = 1e-6
#: A moved point reached a real point of the next line when closer than this (relative, in (x, lambda, t)).
_SAME_POINT = 1e-6
#: Multiple points are linked across at most this many line spacings.
_REACH = 10.0
#: Moves between lines are tracked in double precision only.
_NO_RESCUE = SweepOptions(tracker=TrackerOptions(rescue_digits=0))


@dataclass
class LineDiscriminant:
    """The real discriminant on lines of a two-parameter family.

    Attributes
    ----------
    arcs : list of ndarray, shape (P, 2)
        Polylines of the real discriminant curve in the parameter plane.
    lifts : list of ndarray, shape (P, n + 2)
        The same polylines with the real parts of a singular point x in front (for the node search).
    cuts : list of (float, ndarray)
        Per vertical line p_1 = v: v and the sorted distinct real discriminant values of p_2 on it.
    failed : int
        Paths of the sweep that failed; the picture may miss a piece where it is not zero.
    lost_links : int
        Arc ends in the box whose move to the neighbouring line was lost and that were joined to no neighbour
        (a gap in the picture).
    notes : list of str
    paths : dict
        The sweep's tracked paths by status.
    cusps : list of ndarray, shape (2,)
        Joins of two arc ends that arrive side by side in one direction (a cusp, not a fold), at the traced
        accuracy: within about a line spacing.
    cusp_lifts : list of ndarray, shape (n + 2,)
        The same joins with the mean of the real parts of the two ends' singular points x in front (where the
        refinement starts).
    cusp_ends : list of ndarray, shape (2, n + 2)
        The same joins' two ends (points of the incidence set: where a fold between the lines is sought from).
    spacing : float
        Distance between neighbouring trace lines.
    multiple_arcs : list of bool
        Per arc: made of multiple points only (a multiple component of the discriminant, e.g. a length 0).
    multiple_degree : int
        Distinct multiple points of the line system on a generic (random complex) line: the degree of the
        discriminant's multiple components together (0: none).
    missed_multiple : int
        Points of the multiple components that lines miss after every retry (fewer distinct points on a line
        than the degree, less its points at infinity): failures, counted in the exit code.
    """

    arcs: list
    lifts: list
    cuts: list
    failed: int = 0
    lost_links: int = 0
    notes: list = field(default_factory=list)
    paths: dict = field(default_factory=dict)
    cusps: list = field(default_factory=list)
    cusp_lifts: list = field(default_factory=list)
    cusp_ends: list = field(default_factory=list)
    spacing: float = 0.0
    multiple_arcs: list = field(default_factory=list)
    multiple_degree: int = 0
    #: settles crossings that Newton could not refine (:meth:`settled`); not saved with results
    crossings: object = field(default=None, repr=False, compare=False)
    #: points of the multiple components that lines miss after every retry (failures: decision 0107)
    missed_multiple: int = 0

    def settled(self, point):
        """A crossing that Newton left UNDECIDED, located by Cauchy integrals on a circle (:class:`CrossingCircle`).

        Returns
        -------
        CurvePoint
            A refined NODE or MEETING, or ``point`` itself when it stays undecided.
        str or None
            Why it stays undecided (None when settled).
        """
        if self.crossings is None:
            return point, "no lines to settle it on"
        return self.crossings.settle(point)


def _free_name(base, taken):
    name = base
    while name in taken:
        name += "_"
    return name


def _composed(polynomial, images, size):
    """The polynomial with variable j replaced by the polynomial ``images[j]`` (in ``size`` variables)."""
    result = Polynomial.zero(size)
    powers = {}
    for row, coefficient in zip(polynomial.exponents, polynomial.numeric_coefficients()):
        term = Polynomial.constant(complex(coefficient), size)
        for j in np.nonzero(row)[0]:
            key = (int(j), int(row[j]))
            if key not in powers:
                powers[key] = images[j] ** int(row[j])
            term = term * powers[key]
        result = result + term
    return result


def line_family(family, codimension, rng):
    """The null-vector system of a two-parameter family on the line p = o + t d, (o, d) its parameters.

    Parameters
    ----------
    family : Family
        Two parameters.
    codimension : int
        Of a generic member (the rank J_x must reach).
    rng : numpy.random.Generator

    Returns
    -------
    Family
        Unknowns (x, lambda, t), parameters (o_1, o_2, d_1, d_2): square.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> circle = Family(parse_system(["x^2 + y^2 - r"], ["x", "y", "r", "s"]), ("r", "s"))
    >>> lines = line_family(circle, 1, np.random.default_rng(0))
    >>> lines.n_variables, lines.system.n_equations, lines.parameters[0]
    (4, 4, 'o1')
    """
    n, c = family.n_variables, codimension
    augmented = null_vector_system(family.system, c, rng, n_columns=n)  # unknowns (x, p, lambda)
    taken = set(augmented.variables)
    t = _free_name("t", taken)
    parameters = [_free_name(name, taken | {t}) for name in ("o1", "o2", "d1", "d2")]
    size = n + c + 1 + 4
    variable = [Polynomial.variable(j, size) for j in range(size)]
    along = variable[n + c]
    images = variable[:n] + [variable[n + c + 1 + i] + along * variable[n + c + 3 + i] for i in range(2)] \
        + variable[n:n + c]
    polynomials = [_composed(p, images, size) for p in augmented.polynomials]
    names = list(augmented.variables[:n]) + list(augmented.variables[n + 2:]) + [t] + parameters
    return Family(PolynomialSystem(names, polynomials, name=f"{family.system.name or 'family'} on lines"),
                  tuple(parameters))


@dataclass
class _Line:
    """The real points of one line: full points (x, lambda, t), their t-clusters, the clusters' p."""

    origin: np.ndarray
    direction: np.ndarray
    points: np.ndarray      # (S, n + c + 1) complex, real t
    multiple: np.ndarray    # (S,) bool: several paths meet there
    cluster: np.ndarray     # (S,) int: index into t_values
    t_values: np.ndarray    # (Q,) sorted distinct real t

    def plane(self, clusters):
        return self.origin + np.asarray(self.t_values)[clusters, None] * self.direction


def _real_points(member, origin, direction, double=None):
    """The real points of one line: the sweep's member there, and the points of multiple components (``double``,
    shape (D, n + c + 1), flagged multiple)."""
    points = member.points
    flags = np.array([k == PointKind.RANK_DROP for k in member.kinds], dtype=bool)
    if double is not None and len(double):
        points = np.vstack([points.reshape(-1, double.shape[1]), double])
        flags = np.concatenate([flags, np.ones(len(double), dtype=bool)])
    if len(points) == 0:
        return _Line(origin, direction, np.zeros((0, 0), complex), np.zeros(0, bool), np.zeros(0, np.int64),
                     np.zeros(0))
    t = points[:, -1]
    real = np.abs(t.imag) <= REAL_TOLERANCE * (1 + np.abs(t))
    points = points[real]
    multiple = flags[real]
    values = points[:, -1].real
    if len(values) == 0:
        return _Line(origin, direction, points, multiple, np.zeros(0, np.int64), np.zeros(0))
    labels = cluster_labels(values.astype(complex)[:, None], _SAME_T)
    members_of = groups(labels)
    means = np.array([values[g].mean() for g in members_of])
    order = np.argsort(means)
    rank = np.empty(len(order), dtype=np.int64)
    rank[order] = np.arange(len(order))
    cluster = np.empty(len(values), dtype=np.int64)
    for g, group in enumerate(members_of):
        cluster[group] = rank[g]
    return _Line(origin, direction, points, multiple, cluster, means[order])


def discriminant_on_lines(family, codimension, box, verticals, trace_lines, rng):
    """The real discriminant curve of a two-parameter family traced across lines, and the cuts of vertical lines.

    Parameters
    ----------
    family : Family
        Two parameters, real coefficients.
    codimension : int
    box : (array_like, array_like)
        Lower and upper corners in the parameter plane; the curve is traced in the box enlarged by half
        its size on every side.
    verticals : sequence of float
        Values v of the lines p_1 = v whose real discriminant points are returned (the cells' lines).
    trace_lines : int
        Parallel lines of the trace (the polylines' resolution: the box's diagonal over about this).
    rng : numpy.random.Generator

    Returns
    -------
    LineDiscriminant
    """
    low, high = (np.asarray(corner, dtype=float) for corner in box)
    lines = line_family(family, codimension, rng)
    span = high - low
    # the cells are joined up to half the box beyond it: the trace goes a little further, so that no arc ends
    # a line spacing short of that edge and leaves a false passage there
    outer_low, outer_high = low - 0.625 * span, high + 0.625 * span
    angle = rng.uniform(0.0, math.pi)
    direction = np.array([math.cos(angle), math.sin(angle)])
    normal = np.array([-direction[1], direction[0]])
    corners = np.array([[a, b] for a in (outer_low[0], outer_high[0]) for b in (outer_low[1], outer_high[1])])
    offsets = np.linspace((corners @ normal).min(), (corners @ normal).max(), max(int(trace_lines), 2))
    spacing = float(offsets[1] - offsets[0])
    values = [np.concatenate([s * normal, direction]) for s in offsets]
    values += [np.array([v, 0.0, 0.0, 1.0]) for v in verticals]
    # measured on a four-bar with two free lengths: 48 polyhedral paths against 128 of total degree, most of
    # them to the circular points at infinity (12.8 s against 18.5 s of processor time for the one solve)
    # the start member's multiple points are the discriminant's multiple components, followed below on their own
    # (decision 0107): no member is solved again for them (decision 0143 amendment)
    swept = sweep(lines, np.array(values), SweepOptions(start="polyhedral", solve_again=False),
                  seed=int(rng.integers(2 ** 63)))
    # the points a little beyond the lines' reach are kept too: a fold's other arc may leave the box there
    keep_low, keep_high = low - 1.25 * span, high + 1.25 * span
    failed = swept.failed + int(swept.paths.get("start_failed", 0))
    # multiple components of the discriminant (the start member's multiple points): followed on a deflated system
    # its own generator, seeded from the sweep's recorded seed: the draws of everything after stay those of a family
    # without multiple components
    double, double_degree, double_failed, double_missed = _multiple_components(
        lines, swept, np.array(values), np.random.default_rng([int(swept.seed), 69]), (keep_low, keep_high))
    double_moves = len(swept.start_multiple) * len(values)
    traced = [_real_points(member, value[:2], value[2:], double[k])
              for k, (member, value) in enumerate(zip(swept.values[:len(offsets)], values))]
    cuts = [(float(v), _real_points(member, np.array([v, 0.0]), np.array([0.0, 1.0]), double[len(offsets) + k]).t_values)
            for k, (v, member) in enumerate(zip(verticals, swept.values[len(offsets):]))]
    for line in traced:
        inside = np.all((line.plane(line.cluster) >= keep_low) & (line.plane(line.cluster) <= keep_high), axis=1) \
            if len(line.points) else np.zeros(0, bool)
        line.points, line.multiple, line.cluster = line.points[inside], line.multiple[inside], line.cluster[inside]
    edges, unjoined = _links(lines, traced, spacing, rng)
    # an unjoined end beyond the box is a fold whose other arc lies beyond the points kept: no gap in the box
    lost = sum(bool(np.all((traced[k].plane([c])[0] >= low) & (traced[k].plane([c])[0] <= high)))
               for k, c in unjoined)
    arcs, lifts, multiple_arcs = _polylines(traced, edges, family.n_variables)
    cusp_lifts, cusp_ends = _cusps_at_joins(traced, edges, family.n_variables)
    cusps = [lift[family.n_variables:].copy() for lift in cusp_lifts]
    notes = []
    if failed:
        notes.append(f"{failed} paths of the sweep across the lines failed: a piece of the curve may be missing.")
    if lost:
        notes.append(f"{lost} arc {'end' if lost == 1 else 'ends'} of the traced curve could not be continued to the "
                     "next line and joined to no neighbour: the picture may have a gap there.")
    if double_degree:
        notes.append(f"The discriminant has {counted(double_degree, 'multiple point')} on a generic line: a component "
                     "along which the member's singular points are multiple solutions of the line system (a double "
                     "structure, such as a length 0 of a linkage entering squared, where the member splits); its real "
                     f"points were followed on a deflated system ({counted(sum(multiple_arcs), 'traced arc')}"
                     + (f"; {double_failed} of {double_moves} moves onto lines failed" if double_failed else "")
                     + (f"; {counted(int(np.count_nonzero(double_missed)), 'line')} of {len(values)} "
                        f"{'misses' if np.count_nonzero(double_missed) == 1 else 'miss'} "
                        f"{counted(int(double_missed.sum()), 'real point')} of it in the region, counted as failed"
                        if double_missed.any() else "; no line misses a real point of it in the region"
                        if double_failed else "")
                     + ").")
    crossings = CrossingCircle(lines, family.n_variables, traced, normal, direction, spacing, swept.seed)
    return LineDiscriminant(arcs, lifts, cuts, failed, lost, notes, dict(swept.paths), cusps, cusp_lifts, cusp_ends,
                            spacing, multiple_arcs, double_degree, crossings, int(double_missed.sum()))


#: A point moved on the deflated system is on the multiple component when the full (not squared) system holds to
#: this (relative): the squared system also holds at every regular point of the line system.
_DEFLATED_RESIDUAL = 1e-8
#: Rounds of continuing a failed move on the deflated system from a neighbouring parallel line.
_DEFLATED_RETRIES = 3


def _deflated(lines_family, rng):
    """The line system with one deflation step, squared: unknowns (z, w), z = (x, lambda, t), parameters (o, d).

    The 2N equations G(z) = 0 and J_z G(z) B (w, 1) = 0 (B random, N x N), of which 2N - 1 random
    combinations A (G, J_z G B (w, 1)) are taken: at a double solution of G = 0 whose kernel is a line the
    2N equations have a Jacobian of full column rank (the one-step deflation of a multiplicity-2 root), and
    generic combinations of all of them keep it (measured: combining only the rows J_z G B (w, 1) left the
    square system singular, since those rows alone can always absorb the second-order term). The 2N equations
    themselves are returned too, for the check.

    Returns
    -------
    Family
        Square, unknowns (z, w), the same parameters.
    BatchEvaluator
        G and the full rows J_z G B (w, 1), in (z, w, o, d).
    """
    big = lines_family.n_variables
    system = lines_family.system
    size = 2 * big - 1 + 4
    variable = [Polynomial.variable(j, size) for j in range(size)]
    images = variable[:big] + variable[2 * big - 1:]  # z, then (o, d) after w
    equations = [_composed(p.numeric(), images, size) for p in system.polynomials]
    b_matrix = (rng.standard_normal((big, big)) + 1j * rng.standard_normal((big, big))) / math.sqrt(2 * big)
    a_matrix = (rng.standard_normal((2 * big - 1, 2 * big)) + 1j * rng.standard_normal((2 * big - 1, 2 * big))) \
        / math.sqrt(4 * big)
    kernel = [Polynomial.constant(complex(b_matrix[j, -1]), size)
              + sum((variable[big + k] * complex(b_matrix[j, k]) for k in range(big - 1)), Polynomial.zero(size))
              for j in range(big)]
    rows = []
    for p in system.polynomials:
        derivative = [_composed(p.numeric().derivative(j), images, size) for j in range(big)]
        rows.append(sum((d * w for d, w in zip(derivative, kernel)), Polynomial.zero(size)))
    squared = [sum((r * complex(a) for r, a in zip(equations + rows, weights)), Polynomial.zero(size))
               for weights in a_matrix]
    names = list(system.variables[:big]) + [_free_name(f"w{k + 1}", set(system.variables)) for k in range(big - 1)] \
        + list(lines_family.parameters)
    family = Family(PolynomialSystem(names, squared, name="deflated lines"), lines_family.parameters)
    return family, BatchEvaluator(equations + rows), b_matrix


def _multiple_components(lines_family, swept, values, rng, region):
    """Real points of the discriminant's multiple components on every line, and their degree.

    The start member's multiple points (every line meets a multiple component in multiple solutions of the line
    system, so the sweep cannot move them) are moved to every line on the deflated system (:func:`_deflated`).

    ``region`` (lower and upper corners) is the part of the plane kept: misses beyond it do not count.

    Returns
    -------
    list of ndarray, shape (D_k, N)
        Per line (the order of ``values``): the distinct points z = (x, lambda, t) reached, real t or not.
    int
        Distinct multiple points of the start member in the parameter plane (the degree).
    int
        Failed paths.
    ndarray of int, shape (len(values),)
        Per line, the real points of the multiple components in ``region`` it misses (:func:`_lines_missing_points`).
    """
    starts = swept.start_multiple
    big = lines_family.n_variables
    empty = [np.zeros((0, big), dtype=complex) for _ in values]
    if len(starts) == 0:
        return empty, 0, 0, np.zeros(len(values), dtype=np.int64)
    start_value = np.asarray(swept.start_parameters, dtype=complex)
    plane = start_value[:2] + starts[:, -1:] * start_value[2:]
    start_class = cluster_labels(plane, _SAME_T)
    degree = len(groups(start_class))
    family, full, b_matrix = _deflated(lines_family, rng)
    # the kernel of J_z G at each start, in the coordinates w of B (w, 1)
    _, jacobians = BatchEvaluator([p.numeric() for p in lines_family.system.polynomials]).evaluate(
        np.hstack([starts, np.tile(start_value, (len(starts), 1))]))
    kernels = np.array([np.linalg.svd(j[:, :big])[2][-1].conj() for j in jacobians])
    coordinates = np.linalg.solve(b_matrix, kernels.T).T
    with np.errstate(all="ignore"):
        coordinates = coordinates[:, :-1] / coordinates[:, -1:]
    points = np.hstack([starts, coordinates])
    moves = [(i, k) for k in range(len(values)) for i in range(len(starts))]
    targets = values[[k for _, k in moves]]
    ends, lost = move_points(family, np.tile(start_value, (len(moves), 1)), points[[i for i, _ in moves]],
                             targets, seed=int(rng.integers(2 ** 63)), options=_NO_RESCUE, per_path=True)
    # Measured (four-bar, seed 5: 67 of 180 direct moves failed, 51 after three rounds of retries through random
    # lines between, which took 100 of the 120 s): the failed moves are those of the points over b = 0 to lines
    # that meet b = 0 far outside the box (|c| of 12 to 80: the member's singular points are then near the
    # circular points at infinity, |x| of 20 to 800, where every member is singular and the deflated system
    # degenerates) and to the vertical lines b = v, which never meet b = 0; of the moves to points inside the
    # region kept, one failed. A failed move is continued instead from the point reached on a line of the same
    # direction (only the offset o moves, so the point stays finite between two lines crossing the component
    # in the region): the points in the region are reached, the far ones stay failed, each tried once
    # (decision 0076).
    index = {move: j for j, move in enumerate(moves)}
    directions = np.round(values[:, 2:].real, 12)
    groups_of_lines = [np.nonzero(np.all(directions == direction, axis=1))[0]
                       for direction in np.unique(directions, axis=0)]
    tried = set()
    for _ in range(_DEFLATED_RETRIES):
        retry = []
        for i in range(len(starts)):
            for lines_here in groups_of_lines:
                here = np.array([index[(i, k)] for k in lines_here])
                reached = here[np.all(np.isfinite(ends[here]), axis=1)]
                if not len(reached):
                    continue
                # the source: the reached point nearest the middle of its lines (short moves to the others)
                source = reached[np.argmin(np.abs(np.array([moves[j][1] for j in reached]) - lines_here.mean()))]
                # once each: a move that fails from a reached neighbour line goes far out (measured above)
                retry += [(j, source) for j in here[lost[here]] if j not in tried]
        tried.update(j for j, _ in retry)
        # a start point whose every move to the lines of one direction failed: one move to the middle line of
        # those, again through a random line between, and the neighbours continue from there
        seeds = []
        for i in range(len(starts)):
            for lines_here in groups_of_lines:
                here = [index[(i, k)] for k in lines_here]
                if np.all(lost[here]) and not any(np.isfinite(ends[j]).all() for j in here):
                    seeds.append(here[len(here) // 2])
        if not retry and not seeds:
            break
        progress = False
        if retry:
            rows, sources = (np.array(column) for column in zip(*retry))
            again, again_lost = move_points(family, targets[sources], ends[sources], targets[rows],
                                            seed=int(rng.integers(2 ** 63)), options=_NO_RESCUE, per_path=True)
            ends[rows], lost[rows] = again, again_lost
            progress = bool(np.any(~again_lost))
        if seeds:
            rows = np.array(seeds)
            between = 0.5 * (start_value + targets[rows]) + 0.25 * (rng.standard_normal((len(rows), 4))
                                                                   + 1j * rng.standard_normal((len(rows), 4)))
            halfway, _ = move_points(family, np.tile(start_value, (len(rows), 1)), points[[moves[j][0] for j in rows]],
                                     between, seed=int(rng.integers(2 ** 63)), options=_NO_RESCUE)
            reached = np.all(np.isfinite(halfway), axis=1)
            if reached.any():
                again, again_lost = move_points(family, between[reached], halfway[reached], targets[rows[reached]],
                                                seed=int(rng.integers(2 ** 63)), options=_NO_RESCUE, per_path=True)
                ends[rows[reached]], lost[rows[reached]] = again, again_lost
                progress = progress or bool(np.any(~again_lost))
        if not progress:
            break
    failed = int(np.sum(lost))  # a path at infinity is no failure: that line meets the component there
    finite = np.all(np.isfinite(ends), axis=1)
    check = np.zeros(len(moves), dtype=bool)
    if finite.any():
        residual = full.evaluate(np.hstack([ends[finite], targets[finite]]), jacobian=False)
        size = 1 + np.linalg.norm(ends[finite], axis=1)
        check[finite] = np.linalg.norm(residual, axis=1) <= _DEFLATED_RESIDUAL * size
    found = [[] for _ in values]
    for (_, k), end, good in zip(moves, ends, check):
        if good and all(np.linalg.norm(end[:big] - other) > _SAME_POINT * (1 + np.linalg.norm(end[:big]))
                        for other in found[k]):
            found[k].append(end[:big])
    found = [np.array(f, dtype=complex).reshape(-1, big) for f in found]
    t_values = np.where(finite, ends[:, big - 1], 0.0)
    return found, degree, int(failed), _lines_missing_points(t_values, check, moves, start_class, values, region)


def _lines_missing_points(t_values, reached, moves, start_class, values, region):
    """Per line, the real points of the multiple components in the region that its moves missed.

    A line meets the multiple components in ``degree`` points of the projective plane, but a move may fail where
    the point is far out (near the circular points at infinity, where every member is singular) or at infinity
    (a line parallel to a component, such as b = v beside b = 0); neither changes the picture or the cells, which
    see real points in the region only. The starts over one plane point (a class) stay on one component along
    every move. So a class that no move reached on a line is a miss that counts when its real points reached on
    the other lines, inside the region, lie on both sides of that line (its real arc crosses the line there), or
    when a neighbouring parallel line has one (the outermost lines).
    A failed move whose line still got its point (another start of the class reached it) is no miss.

    Parameters
    ----------
    t_values : ndarray of complex, shape (M,)
        Per move, the line parameter t reached (any value where not reached).
    reached : ndarray of bool, shape (M,)
        Per move: it reached a point of the multiple components.
    moves : list of (int, int)
        (start, line) of every move.
    start_class : ndarray of int
        Per start point, its plane point (starts over one plane point share a class).
    values : ndarray, shape (L, 4)
        The lines (o, d).
    region : (ndarray, ndarray)
        Lower and upper corners of the part of the plane kept.

    Returns
    -------
    ndarray of int, shape (L,)
        Per line, the classes missed whose real arc crosses it in the region.

    Examples
    --------
    >>> values = np.array([[0, -1, 1, 0], [0, 0, 1, 0], [0, 1, 1, 0]], dtype=complex)
    >>> moves = [(0, 0), (0, 1), (0, 2)]
    >>> box = (np.array([-5.0, -5.0]), np.array([5.0, 5.0]))
    >>> _lines_missing_points(np.zeros(3), np.array([True, False, True]), moves, np.array([0]), values, box).tolist()
    [0, 1, 0]
    """
    low, high = region
    lines_of = {}
    points_of = {}
    for (i, k), t, good in zip(moves, t_values, reached):
        g = int(start_class[i])
        if not good:
            continue
        lines_of.setdefault(g, set()).add(k)
        if abs(t.imag) <= REAL_TOLERANCE * (1 + abs(t)):
            point = values[k, :2].real + t.real * values[k, 2:].real
            if np.all((point >= low) & (point <= high)):
                points_of.setdefault(g, []).append((k, point))
    # the neighbours of each line among its parallel lines (by offset): an outermost line has one
    directions = np.round(values[:, 2:].real, 12)
    neighbours = [set() for _ in values]
    for direction in np.unique(directions, axis=0):
        same = np.nonzero(np.all(directions == direction, axis=1))[0]
        normal = np.array([-direction[1], direction[0]])
        order = same[np.argsort(values[same, :2].real @ normal)]
        for a, b in zip(order[:-1], order[1:]):
            neighbours[a].add(int(b))
            neighbours[b].add(int(a))
    scale = float(np.linalg.norm(high - low))
    missing = np.zeros(len(values), dtype=np.int64)
    for k in range(len(values)):
        origin, direction = values[k, :2].real, values[k, 2:].real
        normal = np.array([-direction[1], direction[0]])
        for g in {int(c) for c in start_class}:
            if k in lines_of.get(g, ()):
                continue
            others = [(line, point) for line, point in points_of.get(g, []) if line != k]
            side = np.array([float((point - origin) @ normal) for _, point in others])
            across = len(side) and side.max() > _SAME_T * scale and side.min() < -_SAME_T * scale
            # an outermost line has its real points on one side only: a neighbour's real point in the region counts
            beside = any(line in neighbours[k] for line, _ in others)
            if across or beside:
                missing[k] += 1
    return missing


def _moves(lines_family, traced, moves, rng):
    """Move real points (line k, point i) to line k2 along the real segment, all together.

    Returns, per move, the index of the real point of line k2 reached (None where none) and whether the
    move was lost (failed, or reached a non-real point: the real pair turned complex at a fold).
    """
    if not moves:
        return []
    starts = [np.concatenate([traced[k].origin, traced[k].direction]) for k, _, _ in moves]
    targets = [np.concatenate([traced[k2].origin, traced[k2].direction]) for _, _, k2 in moves]
    points = [traced[k].points[i] for k, i, _ in moves]
    # no mpmath rescue: a move that fails in double precision along the real segment meets a fold (a branch point
    # on the segment), where more digits cannot help (measured: a parabola's fold cost 3,658 precise evaluations,
    # most of the trace's time)
    ends, _ = move_points(lines_family, starts, points, targets, real_segment=True, seed=int(rng.integers(2 ** 63)),
                          options=_NO_RESCUE)
    results = []
    for (_, _, k2), end in zip(moves, ends):
        there = traced[k2]
        if not np.all(np.isfinite(end)):
            results.append((None, True))
            continue
        if len(there.points):
            distance = np.linalg.norm(there.points - end, axis=1)
            j = int(np.argmin(distance))
            if distance[j] <= _SAME_POINT * (1 + np.linalg.norm(end)):
                results.append((j, False))
                continue
        t = end[-1]
        results.append((None, abs(t.imag) > REAL_TOLERANCE * (1 + abs(t))))
    return results


def _links(lines_family, traced, spacing, rng):
    """Edges between clusters (line, t-cluster) of the same or neighbouring lines, and the lost ends left unjoined
    (a set of (line, cluster))."""
    edges = set()
    moves = [(k, int(i), k + 1) for k in range(len(traced) - 1) for i in np.nonzero(~traced[k].multiple)[0]]
    results = _moves(lines_family, traced, moves, rng)
    linked, lost_forward = set(), set()
    for (k, i, k2), (reached, lost) in zip(moves, results):
        node = (k, int(traced[k].cluster[i]))
        if reached is not None:
            edges.add((node, (k2, int(traced[k2].cluster[reached]))))
            linked.add(node)
        elif lost:
            lost_forward.add(node)
    lost_forward -= linked
    # points nothing reached: moved back, to tell a fold (lost) from an arc entering the box
    targets = {b for _, b in edges}
    backward = [(k, int(i), k - 1) for k in range(1, len(traced)) for i in np.nonzero(~traced[k].multiple)[0]
                if (k, int(traced[k].cluster[i])) not in targets]
    results = _moves(lines_family, traced, backward, rng)
    lost_backward, linked = set(), set()
    for (k, i, k2), (reached, lost) in zip(backward, results):
        node = (k, int(traced[k].cluster[i]))
        if reached is not None:
            edges.add(((k2, int(traced[k2].cluster[reached])), node))
            linked.add(node)
        elif lost:
            lost_backward.add(node)
    lost_backward -= linked
    # several paths meeting: a double line of the discriminant; the nearest multiple point of the next line
    for k in range(len(traced) - 1):
        here, there = traced[k], traced[k + 1]
        mine = np.unique(here.cluster[here.multiple])
        theirs = np.unique(there.cluster[there.multiple])
        if not len(mine) or not len(theirs):
            continue
        distance = np.linalg.norm(here.plane(mine)[:, None, :] - there.plane(theirs)[None, :, :], axis=2)
        for row, cluster in enumerate(mine):
            column = int(np.argmin(distance[row]))
            if int(np.argmin(distance[:, column])) == row and distance[row, column] <= _REACH * spacing:
                edges.add(((k, int(cluster)), (k + 1, int(theirs[column]))))
    # two lost ends side by side on one line: a fold of the curve between this line and its neighbour
    for ends_of in (lost_forward, lost_backward):
        by_line = {}
        for k, cluster in ends_of:
            by_line.setdefault(k, []).append(cluster)
        for k, clusters in by_line.items():
            clusters.sort()
            values = traced[k].t_values
            for first, second in zip(clusters[:-1], clusters[1:]):
                # a real pair turns complex only by meeting: two neighbours whose moves both went complex met
                # between the lines, however far apart they are on this one (a flat fold)
                if second == first + 1:
                    edges.add(((k, first), (k, second)))
    joined = {node for a, b in edges if a[0] == b[0] for node in (a, b)}
    # failed moves are not counted as failures: at a fold the real path meets a branch point and the tracker
    # stops there; an end that is left unjoined is returned instead
    return edges, (lost_forward | lost_backward) - joined


#: Two arcs joined on one line arrive at a cusp when their last steps point the same way (cosine above this); at a
#: fold they converge from opposite sides (common practice, no source: the branches of a cusp share their tangent,
#: those of a fold of the projection continue each other).
_CUSP_COSINE = 0.5


def _cusps_at_joins(traced, edges, n):
    """The joins of two arc ends on one line that may be cusps (both arcs arrive pointing the same way), as lifts
    (mean real x of the two ends, middle of the join in the plane), and their two ends as lifts."""
    neighbours = {}
    for a, b in edges:
        neighbours.setdefault(a, []).append(b)
        neighbours.setdefault(b, []).append(a)
    cusps, ends = [], []
    for a, b in edges:
        if a[0] != b[0]:
            continue
        steps = []
        for node in (a, b):
            before = [other for other in neighbours[node] if other[0] != node[0]]
            if len(before) != 1:
                break
            here = traced[node[0]].plane([node[1]])[0]
            steps.append(here - traced[before[0][0]].plane([before[0][1]])[0])
        if len(steps) == 2:
            first, second = (step / max(np.linalg.norm(step), 1e-300) for step in steps)
            if first @ second > _CUSP_COSINE:
                line = traced[a[0]]
                x = [line.points[np.nonzero(line.cluster == end)[0][0], :n].real for end in (a[1], b[1])]
                cusps.append(np.concatenate([0.5 * (x[0] + x[1]),
                                             0.5 * (line.plane([a[1]])[0] + line.plane([b[1]])[0])]))
                ends.append(np.array([np.concatenate([x[k], line.plane([end])[0]]) for k, end in enumerate((a[1], b[1]))]))
    return cusps, ends


def _polylines(traced, edges, n):
    """Chains of the edges as polylines (a node of more than two edges ends the chains through it)."""
    degree = {}
    for a, b in edges:
        degree[a] = degree.get(a, 0) + 1
        degree[b] = degree.get(b, 0) + 1
    kept = [(a, b) for a, b in sorted(edges) if degree[a] <= 2 and degree[b] <= 2]
    nodes = sorted({node for edge in kept for node in edge})
    index = {node: k for k, node in enumerate(nodes)}
    neighbours = {node: [] for node in nodes}
    for a, b in kept:
        neighbours[a].append(b)
        neighbours[b].append(a)
    component = connected_components(len(nodes), [(index[a], index[b]) for a, b in kept])
    arcs, lifts, multiple = [], [], []
    for label in np.unique(component):
        members = [nodes[k] for k in np.nonzero(component == label)[0]]
        ends = [node for node in members if len(neighbours[node]) == 1]
        start = ends[0] if ends else members[0]  # a closed curve starts anywhere
        walk, previous = [start], None
        while True:
            following = [node for node in neighbours[walk[-1]] if node != previous and node != walk[0]]
            if not following:
                if not ends and len(walk) > 2:
                    walk.append(walk[0])  # close the loop
                break
            previous = walk[-1]
            walk.append(following[0])
        lift, all_multiple = [], True
        for k, cluster in walk:
            line = traced[k]
            inside = np.nonzero(line.cluster == cluster)[0]
            representative = line.points[inside[0]]
            all_multiple &= bool(np.all(line.multiple[inside]))
            lift.append(np.concatenate([representative[:n].real, line.plane([cluster])[0]]))
        lift = np.array(lift)
        arcs.append(lift[:, n:].copy())
        lifts.append(lift)
        multiple.append(all_multiple)
    return arcs, lifts, multiple


#: Points on the circle around a crossing (Cauchy integrals by the FFT) and steps from the start line onto it.
_CIRCLE_POINTS = 128
_ONTO_CIRCLE = 16
#: The circle's radius in trace-line spacings: it holds the start line (0.3 to 1.2 spacings from the estimate).
_CIRCLE_RADIUS = 1.6
#: Taylor coefficients of the second half below this (relative to the largest): the samples resolve the functions.
_TAIL = 1e-9
#: A settled crossing lies within this (relative to the circle's radius) of the real line of offsets.
_REAL_OFFSET = 1e-7


def _newton_along(evaluate, unknowns, z, values):
    """Continue the roots z (K, U) of ``evaluate`` through the parameter values ``values`` (L, K, 4), Newton from a
    secant predictor; the roots at every value (L, K, U) and whether every step converged (K,)."""
    path = np.empty((len(values),) + z.shape, dtype=complex)
    good = np.ones(len(z), dtype=bool)
    previous = z.copy()
    for step, value in enumerate(values):
        guess = z + (z - previous) if step else z.copy()
        previous = z
        for _ in range(8):
            residual, jacobian = evaluate(np.hstack([guess, value]))
            delta = np.array([np.linalg.lstsq(j[:, :unknowns], r, rcond=None)[0] for j, r in zip(jacobian, residual)])
            guess = guess - delta
            if np.all(np.linalg.norm(delta, axis=1) <= 1e-13 * (1 + np.linalg.norm(guess, axis=1))):
                break
        residual = evaluate(np.hstack([guess, value]))[0]
        good &= np.linalg.norm(residual, axis=1) <= 1e-10 * (1 + np.linalg.norm(guess, axis=1))
        z = guess
        path[step] = z
    return path, good


class CrossingCircle:
    """Crossings of the traced curve located by Cauchy integrals on a circle of complex line offsets.

    Where two arcs of the real discriminant cross at a point whose singular points coincide (a simple arc meeting a
    multiple one, such as a Grashof line of a four-bar meeting the length 0), neither the node's system nor the
    meeting's Newton has a regular solution (decision 0076's diagnosis, 0093). On the parallel trace lines
    p = s n + t d each arc is an analytic function t_i(s) of the offset s (a regular root of the line system, or of
    its once deflated system on a multiple arc), also for complex s. The roots near the estimate are continued from
    a trace line onto the circle |s - s_0| = r (1.6 spacings) and once around it by Newton; a root that does not come
    back to itself met a branch point inside (undecided). For each pair, f = t_i - t_j winds once around the circle
    exactly when the arcs cross inside it, at the root of the Taylor series of f (its coefficients from the FFT of
    the samples); the crossing is t_i's Taylor series there. Two arcs whose singular points x coincide there meet
    (MEETING), else they cross (NODE).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> family = Family(parse_system(["x^2 - (r - s) * (r + s)"], ["x", "r", "s"]), ("r", "s"))
    >>> found = discriminant_on_lines(family, 1, ((-1.0, -1.0), (1.0, 1.0)), [], 12, np.random.default_rng(3))
    >>> point, reason = found.settled(CurvePoint.found(CurvePointKind.NODE, np.array([0.01, -0.02]), False))
    >>> point.kind.value, bool(np.abs(point.point).max() < 1e-10), reason
    ('meeting', True, None)
    """

    def __init__(self, lines_family, n, traced, normal, direction, spacing, seed):
        self.traced, self.normal, self.direction, self.spacing = traced, normal, direction, spacing
        self.n = n
        self.size = lines_family.n_variables
        self.simple = BatchEvaluator([p.numeric() for p in lines_family.system.polynomials])
        self.lines_family, self.seed = lines_family, seed
        self._deflation = None  # (full evaluator, B) of :func:`_deflated`, built when a multiple root is followed
        self.offsets = np.array([line.origin @ normal for line in traced])

    def settle(self, point):
        """``point`` (an UNDECIDED crossing) settled, or kept with the reason."""
        estimate = np.asarray(point.point, dtype=float)
        s0, t0 = float(estimate @ self.normal), float(estimate @ self.direction)
        radius = _CIRCLE_RADIUS * self.spacing
        distance = np.abs(self.offsets - s0)
        usable = np.nonzero((distance >= 0.3 * self.spacing) & (distance <= 1.2 * self.spacing))[0]
        if not len(usable):
            return point, "no trace line near it"
        line = self.traced[usable[np.argmin(distance[usable])]]
        near = np.abs(line.points[:, -1].real - t0) <= 2.0 * radius if len(line.points) else np.zeros(0, bool)
        if np.sum(near) < 2:
            return point, "fewer than two arcs near it"
        s_start = float(line.origin @ self.normal)
        rise = math.sqrt(radius ** 2 - (s_start - s0) ** 2)
        angle = math.atan2(rise, s_start - s0)
        onto = s_start + 1j * rise * np.linspace(0.0, 1.0, _ONTO_CIRCLE + 1)[1:]
        around = s0 + radius * np.exp(1j * (angle + 2 * math.pi * np.arange(1, _CIRCLE_POINTS + 1) / _CIRCLE_POINTS))
        offsets = np.concatenate([onto, around])
        arcs = []  # per arc near it: its t, and the x of its singular points, sampled on the circle
        for multiple in (False, True):
            chosen = line.points[near & (line.multiple == multiple)]
            if not len(chosen):
                continue
            found, reason = self._around(chosen, multiple, np.concatenate([line.origin, line.direction]), offsets)
            if found is None:
                return point, reason
            arcs += found
        arcs = _distinct_arcs(arcs)
        settled = []
        for i in range(len(arcs)):
            for j in range(i + 1, len(arcs)):
                difference = arcs[i].t - arcs[j].t
                if np.max(np.abs(difference)) <= 1e-10 * (1 + np.max(np.abs(arcs[i].t))):
                    continue  # one arc in the plane with two singular points over it
                turns = np.sum(np.angle(np.roll(difference, -1) / difference)) / (2 * math.pi)
                winding = int(round(float(turns)))
                if winding == 0:
                    continue
                if winding != 1:
                    return point, "arcs touching or crossing more than once near it"
                u = _root_on_circle(difference)
                if u is None:
                    return point, "the circle's samples do not resolve the arcs"
                offset = s0 + radius * np.exp(1j * angle) * u
                if abs(offset.imag) > _REAL_OFFSET * radius:
                    return point, "the arcs cross at a non-real offset"
                at = offset.real * self.normal + _series_at(arcs[i].t, u).real * self.direction
                one, two = arcs[i].x_at(u), arcs[j].x_at(u)
                if one is None or two is None:
                    return point, "singular points of a multiple arc meet near it, not where the arcs cross"
                settled.append((at, np.linalg.norm(one - two) <= 1e-6 * (1 + np.linalg.norm(one))))  # same x
        if not settled:
            return point, "no two arcs cross near it"
        spread = max(np.linalg.norm(at - settled[0][0]) for at, _ in settled)
        if spread > 1e-8 * radius:
            return point, "several crossings near it"
        kind = CurvePointKind.MEETING if any(meets for _, meets in settled) else CurvePointKind.NODE
        return CurvePoint(kind, settled[0][0], True), None

    def _around(self, chosen, multiple, start_value, offsets):
        """Per root, (x, t) sampled on the circle (M, n + 1; the first sample at the angle reached), or None."""
        size = self.size
        values = np.array([np.concatenate([s * self.normal, self.direction]) for s in offsets], dtype=complex)
        if multiple:
            if self._deflation is None:
                # its own generator: the draws of the rest of the computation stay the same
                deflated = _deflated(self.lines_family, np.random.default_rng([int(self.seed), 93]))
                self._deflation = deflated[1:]
            full, b_matrix = self._deflation
            # the kernel of J_z G at each multiple root, in the coordinates w of B (w, 1), as in _multiple_components
            _, jacobians = self.simple.evaluate(np.hstack([chosen, np.tile(start_value, (len(chosen), 1))]))
            kernels = np.array([np.linalg.svd(j[:, :size])[2][-1].conj() for j in jacobians])
            w = np.linalg.solve(b_matrix, kernels.T).T
            with np.errstate(all="ignore"):
                z = np.hstack([chosen, w[:, :-1] / w[:, -1:]])
            if not np.all(np.isfinite(z)):
                return None, "no kernel at a multiple root near it"
            evaluate, unknowns = full.evaluate, 2 * size - 1
        else:
            z, evaluate, unknowns = chosen.copy(), self.simple.evaluate, size
        path, good = _newton_along(evaluate, unknowns, z, np.repeat(values[:, None, :], len(z), axis=1))
        if not np.all(good):
            return None, "Newton lost a root near it on the circle"
        n = self.n
        # samples at angle + 2 pi j / M, j = 1 .. M; the last is the first point on the circle again
        circle = np.roll(path[-_CIRCLE_POINTS:, :, :size], 1, axis=0)
        first = path[_ONTO_CIRCLE - 1, :, :size]
        # after one turn each root is back, or at another one: a branch point inside the circle
        apart = np.linalg.norm(path[-1, :, :size][:, None, :] - first[None, :, :], axis=2) \
            / (1 + np.linalg.norm(first, axis=1))[None, :]
        ends = np.argmin(apart, axis=1)
        if np.any(apart[np.arange(len(z)), ends] > 1e-8) or len(set(ends.tolist())) != len(z):
            return None, "a root near it came back to no root after a turn"
        arcs = []
        for k in range(len(z)):
            if ends[k] == k:
                arcs.append(_CircleArc(circle[:, k, -1], circle[:, k, :n], None))
            elif ends[ends[k]] == k and k < ends[k]:
                # two singular points over one arc, exchanged around a branch point (a linkage's double line, where
                # the two points of the split member merge): t is one function, x is known by the pair's mean
                # and squared half difference
                j = ends[k]
                if np.max(np.abs(circle[:, k, -1] - circle[:, j, -1])) > 1e-8 * (1 + np.max(np.abs(circle[:, k, -1]))):
                    return None, "an arc turns back near it (a branch point of the curve)"
                # at every sample k and j are the two singular points over that offset: their symmetric functions
                # are single-valued
                pair_k, pair_j = circle[:, k, :n], circle[:, j, :n]
                arcs.append(_CircleArc(circle[:, k, -1], 0.5 * (pair_k + pair_j), (0.5 * (pair_k - pair_j)) ** 2))
            elif ends[ends[k]] != k:
                return None, "three or more singular points exchanged near it"
        return arcs, None


@dataclass
class _CircleArc:
    """One arc near a crossing sampled on the circle: t, and x (or, for two singular points exchanged around the
    circle, their mean and squared half difference)."""

    t: np.ndarray
    x: np.ndarray
    spread: object = None

    def x_at(self, u):
        """x at u (None where two exchanged singular points have not merged there)."""
        mean = _series_at(self.x, u)
        if self.spread is None:
            return mean
        half = _series_at(self.spread, u)
        return mean if np.linalg.norm(half) <= 1e-12 * (1 + np.linalg.norm(mean)) ** 2 else None


def _distinct_arcs(arcs):
    """The arcs without repeats (a multiple root found both by the sweep and on the deflated system)."""
    kept = []
    for arc in arcs:
        if all(np.max(np.abs(arc.x - other.x)) > 1e-8 * (1 + np.max(np.abs(other.x)))
               or np.max(np.abs(arc.t - other.t)) > 1e-8 * (1 + np.max(np.abs(other.t))) for other in kept):
            kept.append(arc)
    return kept


def _taylor(samples):
    """Taylor coefficients in u = (s - s_0) / (r e^(i angle)) of equally spaced samples on the circle (FFT), and
    whether their second half is negligible."""
    coefficients = np.fft.fft(samples, axis=0) / len(samples)
    half = len(samples) // 2
    head = np.max(np.abs(coefficients[:half]))
    return coefficients[:half], bool(np.max(np.abs(coefficients[half:])) <= _TAIL * max(head, 1e-300))


def _root_on_circle(difference):
    """The one root inside the unit disc of the Taylor series of the samples ``difference`` (None: not resolved)."""
    coefficients, resolved = _taylor(difference)
    if not resolved:
        return None
    keep = np.abs(coefficients) > 1e-15 * np.max(np.abs(coefficients))
    degree = int(np.nonzero(keep)[0].max())
    roots = np.roots(coefficients[:degree + 1][::-1])
    inside = roots[np.abs(roots) < 1.0]
    if len(inside) != 1:
        return None
    u = complex(inside[0])
    for _ in range(5):  # polish on the series itself
        powers = u ** np.arange(degree + 1)
        value = coefficients[:degree + 1] @ powers
        slope = (np.arange(1, degree + 1) * coefficients[1:degree + 1]) @ powers[:-1]
        if slope == 0:
            break
        u -= value / slope
    return u


def _series_at(samples, u):
    """The sampled functions (columns) at u in the unit disc, from their Taylor series."""
    coefficients, _ = _taylor(samples)
    return (u ** np.arange(len(coefficients))) @ coefficients
